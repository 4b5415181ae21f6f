"""Run every benchmark in bench/ (each prints its own ratio or timing table)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main() -> int:
    status = 0
    for script in sorted(HERE.glob("*.py")):
        if script.name == Path(__file__).name or script.name.startswith("_"):
            continue
        print(f"== {script.name}", flush=True)
        status |= subprocess.run([sys.executable, str(script)], cwd=HERE.parent).returncode
    return status


if __name__ == "__main__":
    sys.exit(main())
