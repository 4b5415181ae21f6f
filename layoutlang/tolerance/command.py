"""`layoutlang tolerance FILE`: sensitivity, estimate and Monte Carlo yield of a script's
tolerances against its own expectations.

Batches run on this machine's cores (threads: numpy releases the interpreter lock in its array
loops) or, with `--scheduler ADDRESS`, on a running dask.distributed cluster (the optional
`cluster` extra). A batch is a pure function of (script, seed, batch index), so every way of
running gives the same numbers. Exit status: 0 every expectation (yields included) holds, 1 one
fails, 2 a script or usage error.
"""

from __future__ import annotations

import argparse
import functools
import os
import sys
from pathlib import Path

from ..errors import LayoutValueError

__all__ = ["add_command", "run", "local_runner", "cluster_runner", "remote_batch"]


def _count(text: str) -> int:
    """A sample count: '20000', '1e6' or '1_000_000'."""
    try:
        value = float(text.replace("_", ""))
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number of samples: {text!r}") from None
    if value != int(value) or not 10 <= value <= 10**8:
        raise argparse.ArgumentTypeError("the number of samples is a whole number from 10 to 1e8")
    return int(value)


def add_command(commands) -> None:
    tolerance = commands.add_parser(
        "tolerance", help="sensitivity, estimate and Monte Carlo yield of a script's tolerances")
    tolerance.add_argument("file", help="a layout script (.lay) with 'tolerance' lines")
    tolerance.add_argument("--json", action="store_true", help="machine-readable output")
    tolerance.add_argument("--samples", type=_count, metavar="N",
                           help="Monte Carlo units (default: the script's, else 2000); e.g. 1e6")
    tolerance.add_argument("--seed", type=int, metavar="S", help="seed (default: the script's)")
    tolerance.add_argument("--scheduler", metavar="ADDRESS",
                           help="run the batches on a dask.distributed scheduler, e.g. "
                                "tcp://10.0.0.5:8786 (needs the 'cluster' extra)")
    tolerance.add_argument("--worst", metavar="DIR",
                           help="write the worst units as scripts into DIR")
    tolerance.add_argument("--histograms", metavar="FILE",
                           help="draw each expectation's distribution (png, svg or pdf)")


def run(args: argparse.Namespace) -> int:
    from ..checks import check_program
    from ..interpret.interpreter import load_file
    from .analysis import analyse

    program = load_file(args.file)
    if program.tolerances is None:
        raise LayoutValueError(f"{args.file} has no tolerances",
                               hint="add lines such as 'tolerance radius of front ± 0.1 mm'")
    text = Path(args.file).read_text(encoding="utf-8")
    base = str(Path(args.file).resolve().parent)
    samples = args.samples or program.tolerances.samples
    seed = program.tolerances.seed if args.seed is None else args.seed
    if args.scheduler:
        runner = cluster_runner(args.scheduler, text, args.file, base, samples, seed)
    else:
        runner = local_runner(text, args.file, base, samples, seed)
    result = analyse(program, samples=samples, seed=seed, runner=runner,
                     progress=_progress_bar(sys.stderr))
    from dataclasses import replace

    from .run import remember

    program = replace(program, tolerances=replace(program.tolerances, samples=samples, seed=seed))
    remember(program, result)
    checked = check_program(program)
    if args.worst:
        from .worst import write_worst

        for path in write_worst(program, result, text, Path(args.worst)):
            print(f"wrote {path}", file=sys.stderr)
    if args.histograms:
        from ..reports.tolerance_plot import save_histograms

        save_histograms(result, program.system.units, args.histograms)
    if args.json:
        from ..reports.machine import check_json, dumps
        from ..reports.tolerance import tolerance_json

        data = {"file": args.file, **tolerance_json(result), "checks": check_json(program, checked)}
        sys.stdout.write(dumps(data))
    else:
        from ..reports.text import expectation_lines
        from ..reports.tolerance import tolerance_lines

        lines = [f"layout: {program.system.title or args.file}"]
        lines += tolerance_lines(result, program.system.units, program.file)
        lines += ["", "expectations"] + expectation_lines(checked)
        sys.stdout.write("\n".join(lines) + "\n")
    if result.monte_carlo is not None and result.monte_carlo.partial:
        return 130
    return 0 if all(r.passed for r in checked) else 1


def _progress_bar(stream):
    """A one-line progress bar on a terminal; nothing when output is piped."""
    if not getattr(stream, "isatty", lambda: False)():
        return None

    def show(done: int, total: int) -> None:
        width = 30
        filled = width * done // total
        stream.write(f"\r  monte carlo [{'#' * filled}{'.' * (width - filled)}] "
                     f"{done}/{total} batches")
        if done == total:
            stream.write("\n")
        stream.flush()

    return show


@functools.lru_cache(maxsize=4)
def _program(text: str, file: str, base: str, samples: int, seed: int):
    """The program of a script with the run's settings (cached per process: a worker loads
    the script once for all the batches it runs)."""
    from dataclasses import replace

    from ..interpret.interpreter import interpret
    from ..syntax.parser import parse
    from .perturb import image_plane

    program = interpret(parse(text, file), base=Path(base))
    program = replace(program, tolerances=replace(program.tolerances, samples=samples, seed=seed))
    return program, image_plane(program.system)


def remote_batch(text: str, file: str, base: str, samples: int, seed: int, index: int,
                 size: int):
    """One batch, from the script's text alone (what a cluster worker runs)."""
    import numpy as np

    from .analysis import run_batch

    program, plane = _program(text, file, base, samples, seed)
    with np.errstate(all="ignore"):
        return run_batch(program, index, size, plane)


def local_runner(text: str, file: str, base: str, samples: int, seed: int,
                 workers: int | None = None):
    """Batches on this machine's cores, in order (threads over independent batches)."""
    from concurrent.futures import ThreadPoolExecutor

    workers = workers or min(4, os.cpu_count() or 1)

    def runner(jobs):
        jobs = list(jobs)
        if workers == 1 or len(jobs) == 1:
            for index, size in jobs:
                yield remote_batch(text, file, base, samples, seed, index, size)
            return
        with ThreadPoolExecutor(workers) as pool:
            futures = [pool.submit(remote_batch, text, file, base, samples, seed, i, n)
                       for i, n in jobs]
            try:
                for future in futures:
                    yield future.result()
            except KeyboardInterrupt:
                for future in futures:
                    future.cancel()
                raise

    return runner


def cluster_runner(address, text: str, file: str, base: str, samples: int, seed: int,
                   timeout: float = 10.0):
    """Batches on a dask.distributed scheduler (an address, or a Client)."""
    try:
        from distributed import Client
    except ImportError:
        raise LayoutValueError(
            "--scheduler needs dask.distributed, which is not installed",
            hint="install the extra: pip install 'layoutlang[cluster]'") from None

    def runner(jobs):
        jobs = list(jobs)
        try:
            client = address if isinstance(address, Client) else Client(address, timeout=f"{timeout}s")
        except (OSError, TimeoutError) as error:
            raise LayoutValueError(f"cannot reach the scheduler at {address}: {error}") from None
        try:
            futures = client.map(remote_batch, [text] * len(jobs), [file] * len(jobs),
                                 [base] * len(jobs), [samples] * len(jobs), [seed] * len(jobs),
                                 [i for i, _ in jobs], [n for _, n in jobs], pure=False)
            for future in futures:  # in batch order, whatever order they finish in
                yield future.result()
        finally:
            if client is not address:
                client.close()

    return runner
