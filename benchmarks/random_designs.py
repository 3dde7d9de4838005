"""Build many random designs (the strategy of tests/test_properties.py) with every surface.

Run: .venv/bin/python benchmarks/random_designs.py [--examples 200] [--seed 0]
Each design is sized and laid out; the accepted ones are built (cadquery: every surface side,
control surfaces cut free) and checked against their sizing (checks.surface_checks). Prints
how many were refused at input, failed to build (GeometryError naming a part), failed a
check, or passed, with the times. Not a test: exits 1 if any design broke the rules (another
exception, a failed check, an error without a key or part), else 0.
"""

from __future__ import annotations

import argparse
import sys
import time
import traceback
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))

from hypothesis import HealthCheck, Phase, given, seed, settings  # noqa: E402
from test_properties import _check_invariants, _sized, designs  # noqa: E402

from geomgen.checks import solid_checks as checks  # noqa: E402
from geomgen.errors import GeometryError  # noqa: E402
from geomgen.solids import assembly  # noqa: E402


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--examples", type=int, default=200)
    parser.add_argument("--seed", type=int, default=0)
    args = parser.parse_args()
    outcome: Counter[str] = Counter()
    problems: list[str] = []
    build_times: list[float] = []

    @seed(args.seed)
    @settings(
        max_examples=args.examples,
        deadline=None,
        database=None,
        phases=[Phase.generate],  # no shrinking: every example is counted once
        suppress_health_check=list(HealthCheck),
    )
    @given(doc=designs())
    def run(doc: dict) -> None:
        n = sum(outcome.values()) + 1
        try:
            result = _sized(doc)
            if result is None:
                outcome["refused at input"] += 1
                return
            _check_invariants(doc, *result)
            t0 = time.perf_counter()
            try:
                built = assembly.build(result[1], ())
            except GeometryError as err:
                outcome["geometry error"] += 1
                if not err.part:
                    problems.append(f"#{n}: geometry error without a part: {err}")
                return
            failed = [
                f"{c.part}: {c.name}" for c in checks.surface_checks(built, ()) if not c.passed
            ]
            build_times.append(time.perf_counter() - t0)
            if failed:
                outcome["failed checks"] += 1
                problems.append(f"#{n}: failed checks: {'; '.join(failed)}")
            else:
                outcome["built, every check passed"] += 1
        except Exception:  # the benchmark reports every other failure and goes on
            outcome["other exception"] += 1
            problems.append(f"#{n}:\n{traceback.format_exc()}")
        print(f"\r{sum(outcome.values())} designs", end="", file=sys.stderr, flush=True)

    start = time.perf_counter()
    run()
    total = time.perf_counter() - start
    print(file=sys.stderr)
    for what, count in outcome.most_common():
        print(f"{count:5d}  {what}")
    if build_times:
        build_times.sort()
        print(
            f"build + checks per design: median {build_times[len(build_times) // 2]:.1f} s, "
            f"worst {build_times[-1]:.1f} s; all {total:.0f} s"
        )
    for p in problems:
        print(p)
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
