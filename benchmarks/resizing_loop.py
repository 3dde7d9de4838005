"""The re-sizing loop's benchmarks, run side by side in one process, written to a markdown table.

  1. demo build vs the direct-cadquery floor (benchmarks/floor_build.py), the surfaces only
     (the floor builds no fuselage), wall time, best of --runs            target <= 1.5x
  2. a rebuild with no change vs a full build of the demo                  target < 10 %
  3. ``geomgen size --no-drawings`` alone, less the interpreter's own start target < 0.5 s
  4. a sweep of 8 built variants (a plain wing) on 1 vs 2 local workers    target >= 1.7x
  5. peak memory (resident set) of a full demo build                       target < 1 GB

Every figure is a subprocess timed from spawn to exit (so imports count), one at a time.
Writes benchmarks/RESULTS.md (or --table PATH) and prints it.

Run:  /work/venv/bin/python benchmarks/resizing_loop.py [--runs 2]
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import sys
import tempfile
import time
from pathlib import Path

import yaml

sys.path.insert(0, str(Path(__file__).resolve().parent))
from build_vs_floor import ROOT, run, table  # noqa: E402

DEMO = ROOT / "examples" / "veyra-t2.yaml"


def best(cmd: list[str], runs: int, before=None) -> float:
    """Least wall time (s) of ``runs`` runs; ``before()`` is called ahead of each run."""
    times = []
    for _ in range(runs):
        if before is not None:
            before()
        times.append(run(cmd).wall)
    return min(times)


def surface_parts(py: str, work: Path) -> list[str]:
    """The demo's part names other than the fuselage (from its report)."""
    run([py, "-m", "geomgen.cli", "size", str(DEMO), "--no-drawings", "--out", str(work)])
    report = json.loads((work / "veyra-t2" / "report.json").read_text(encoding="utf-8"))
    names = []
    for key, surface in report["surfaces"].items():
        sides = ["right", "left"] if key != "vertical_tail" else ["centre"]
        base = {"wing": "wing", "horizontal_tail": "stabilizer", "vertical_tail": "fin"}[key]
        for side in sides:
            names.append(base if side == "centre" else f"{base}-{side}")
        names += list(surface["hinge_lines"])
    return names


def plain_wing(work: Path) -> Path:
    """A plain tapered wing with an aileron and no tails or body: a quick build to sweep."""
    doc = yaml.safe_load(DEMO.read_text(encoding="utf-8"))
    for key in ("horizontal_tail", "vertical_tail", "fuselage", "model"):
        doc.pop(key, None)
    doc["name"] = "sweep-wing"
    wing = doc["wing"]
    wing.pop("panels")
    wing.update(area="9 m^2", taper_ratio=0.6, twist="0 deg")
    wing["controls"] = {"aileron": wing["controls"]["aileron"]}
    doc["drawings"] = {"paper": "A4"}
    path = work / "sweep-wing.yaml"
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return path


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=2, help="runs of each timing, best taken")
    ap.add_argument("--table", type=Path, default=ROOT / "benchmarks" / "RESULTS.md")
    args = ap.parse_args(argv)
    py = sys.executable
    work = Path(tempfile.mkdtemp(prefix="resizing_loop_"))
    rows = []
    load = os.getloadavg()[0]

    # 1. build vs floor, surfaces only
    parts = surface_parts(py, work / "size")
    reports = work / "size" / "veyra-t2" / "report.json"
    floor = best([py, "benchmarks/floor_build.py", "--report", str(reports)], args.runs)
    build_cmd = [py, "-m", "geomgen.cli", "build", str(DEMO), "--fresh"]
    build_cmd += ["--only", ",".join(parts), "--out", str(work / "b1")]
    build = best(build_cmd, args.runs)
    rows.append(
        (
            "demo build (surfaces) vs the direct-cadquery floor",
            f"{build:.1f} s vs {floor:.1f} s",
            f"{build / floor:.2f}x",
            "<= 1.5x",
            "yes" if build / floor <= 1.5 else "no",
        )
    )

    # 2. no-change rebuild vs full build (the whole demo)
    out = work / "b2"
    full_cmd = [py, "-m", "geomgen.cli", "build", str(DEMO), "--out", str(out)]
    full = best([*full_cmd, "--fresh"], 1)
    again = best(full_cmd, args.runs)
    rows.append(
        (
            "rebuild with no change vs full build",
            f"{again:.2f} s vs {full:.1f} s",
            f"{again / full:.1%}",
            "< 10 %",
            "yes" if again / full < 0.10 else "no",
        )
    )

    # 3. geomgen size alone, less the interpreter start
    bare = best([py, "-c", "pass"], max(3, args.runs))
    size = best(
        [py, "-m", "geomgen.cli", "size", str(DEMO), "--no-drawings", "--out", str(work / "s")],
        max(3, args.runs),
    )
    rows.append(
        (
            "geomgen size --no-drawings, after interpreter start",
            f"{size:.2f} s - {bare:.2f} s",
            f"{size - bare:.2f} s",
            "< 0.5 s",
            "yes" if size - bare < 0.5 else "no",
        )
    )

    # 4. a sweep of 8 built variants on 1 vs 2 workers
    wing = plain_wing(work)
    sweep = [py, "-m", "geomgen.cli", "sweep", str(wing), "--build"]
    sweep += ["--vary", "wing.aspect_ratio=6.5,7,7.5,8,8.5,9,9.5,10"]
    one = best([*sweep, "--jobs", "1", "--out", str(work / "w1")], 1)
    two = best([*sweep, "--jobs", "2", "--out", str(work / "w2")], 1)
    rows.append(
        (
            "sweep of 8 built variants, 1 vs 2 workers",
            f"{one:.1f} s vs {two:.1f} s",
            f"{one / two:.2f}x",
            ">= 1.7x",
            "yes" if one / two >= 1.7 else "no",
        )
    )

    # 5. peak memory of a full build (resident set of the child, kB on Linux)
    probe = (
        "import resource, subprocess, sys; "
        "subprocess.run(sys.argv[1:], check=True, stdout=subprocess.DEVNULL); "
        "print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)"
    )
    peak = run([py, "-c", probe, *full_cmd, "--fresh"])
    kb = int(peak.lines[-1][1])
    rows.append(
        (
            "peak memory of a full demo build",
            f"{kb / 1024:.0f} MB",
            f"{kb / 1024 / 1024:.2f} GB",
            "< 1 GB",
            "yes" if kb < 1024 * 1024 else "no",
        )
    )

    text = "\n".join(
        [
            "# Re-sizing loop benchmarks",
            "",
            f"Measured {time.strftime('%Y-%m-%d')} with `benchmarks/resizing_loop.py --runs "
            f"{args.runs}` on {platform.machine()} with {os.cpu_count()} CPUs, Python "
            f"{platform.python_version()}; 1-minute load average {load:.2f} before the runs. "
            "Wall times from spawn to exit, best of the runs.",
            "",
            table(("what", "measured", "ratio", "target", "met"), rows),
            "",
        ]
    )
    args.table.write_text(text, encoding="utf-8")
    print(text)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
