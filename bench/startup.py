"""Benchmark: wall time of `layoutlang check` on a 10-surface numeric script.

Reported as a ratio to `python -c "import numpy, lark"` measured in the same run (best of
several runs each, interleaved so both see the same machine load). Goal <= 1.3.

Both commands run with bytecode caching on, as on a user's machine (an installed package has
its .pyc files; PYTHONDONTWRITEBYTECODE in a developer's shell would otherwise make every run
recompile our sources while numpy and lark come precompiled).
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
from pathlib import Path

from _timing import best_of  # bench/ is on the path when run as a script

RUNS = 15

SCRIPT = """# ten-surface numeric layout for the start-up benchmark
medium crown index 1.52
medium flint index 1.62
object 500 before, height 10
start in air
""" + "".join(
    f"surface s{i} radius {(-1) ** i * (40 + 3 * i)} into {'crown' if i % 2 == 0 else 'air'}\n"
    f"gap {2 + i % 3}\n" for i in range(9)
) + """surface s9 radius -80 into air
stop at s4, diameter 8
image at focus
expect focal length > 0
expect f-number < 100
"""


ENVIRONMENT = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def run(command: list[str]) -> None:
    subprocess.run(command, check=True, stdout=subprocess.DEVNULL, env=ENVIRONMENT)


def main() -> float:
    with tempfile.TemporaryDirectory() as folder:
        script = Path(folder) / "ten.lay"
        script.write_text(SCRIPT)
        ours = [sys.executable, "-m", "layoutlang", "check", str(script)]
        baseline = [sys.executable, "-c", "import numpy, lark"]
        run(ours)  # warm the parser cache and the file system
        ours_time, base_time = best_of(lambda: run(ours), lambda: run(baseline), repeats=RUNS)
    ratio = ours_time / base_time
    print(f"layoutlang check, 10 surfaces: {ours_time * 1000:.0f} ms; "
          f"import numpy, lark: {base_time * 1000:.0f} ms; ratio = {ratio:.2f} (goal <= 1.3)")
    return ratio


if __name__ == "__main__":
    main()
