"""Time `geomgen size` on the demo, from interpreter start to exit, over several runs.

Run: .venv/bin/python benchmarks/size_speed.py [--runs N] [--no-drawings]
Prints the best, median and worst wall time in seconds, and the same less the bare
interpreter start. Not a test: nothing is asserted.
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "examples" / "veyra-t2.yaml"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=7)
    parser.add_argument(
        "--no-drawings", action="store_true", help="time `geomgen size --no-drawings`"
    )
    args = parser.parse_args()
    times = []
    with tempfile.TemporaryDirectory() as out:
        command = [sys.executable, "-m", "geomgen.cli", "size", str(DEMO), "--out", out]
        if args.no_drawings:
            command.append("--no-drawings")
        subprocess.run(command, check=True, capture_output=True)  # warm the file cache
        for _ in range(args.runs):
            start = time.perf_counter()
            subprocess.run(command, check=True, capture_output=True)
            times.append(time.perf_counter() - start)
        bare = []
        for _ in range(args.runs):
            start = time.perf_counter()
            subprocess.run([sys.executable, "-c", "pass"], check=True)
            bare.append(time.perf_counter() - start)
    print(
        f"geomgen size, {args.runs} runs (s): best {min(times):.3f}  "
        f"median {statistics.median(times):.3f}  worst {max(times):.3f}"
    )
    print(f"bare interpreter start (s): best {min(bare):.3f}  median {statistics.median(bare):.3f}")
    print(
        f"after interpreter start (s): best {min(times) - min(bare):.3f}  "
        f"median {statistics.median(times) - statistics.median(bare):.3f}"
    )


if __name__ == "__main__":
    main()
