"""A Monte Carlo run on a dask.distributed cluster started by the test on the loopback address
gives exactly the numbers of a run in one process (batches are seeded independently)."""

from __future__ import annotations

import pytest

from layoutlang import loads
from layoutlang.tolerance.analysis import monte_carlo
from layoutlang.tolerance.command import cluster_runner
from layoutlang.tolerance.perturb import image_plane

from test_tolerance import TOLERANCES, TRIPLET

distributed = pytest.importorskip("distributed")


def test_local_cluster_run_equals_the_single_process_run():
    text = TRIPLET + TOLERANCES.replace("1500 samples", "2500 samples")
    program = loads(text, "triplet.lay")
    plane = image_plane(program.system)
    alone = monte_carlo(program, plane)
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       host="127.0.0.1", dashboard_address=None)
    try:
        with distributed.Client(cluster) as client:
            shared = monte_carlo(program, plane, runner=cluster_runner(
                client, text, "triplet.lay", ".", 2500, program.tolerances.seed))
    finally:
        cluster.close()
    assert shared == alone
    assert shared.samples == 2500


def test_an_unreachable_scheduler_is_an_error_in_words():
    from layoutlang.errors import LayoutError

    runner = cluster_runner("tcp://127.0.0.1:9", TRIPLET + TOLERANCES, "t.lay", ".", 100, 1,
                            timeout=1.0)
    with pytest.raises(LayoutError, match="cannot reach the scheduler"):
        list(runner([(0, 100)]))
