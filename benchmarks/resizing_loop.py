"""The re-sizing loop's benchmarks, run side by side in one process, written to a markdown table.

  1. demo build (surfaces only) vs the direct-cadquery floor (benchmarks/floor_build.py; the
     floor builds no fuselage), geomgen on every CPU                      target <= 1.5x
  2. the whole demo build, fresh, on 1 and on 2 worker processes         target <= 15 s on 2
  3. one horizontal-tail key changed, rebuild vs fresh build             target <= 25 %
  4. a rebuild with no change vs a fresh build                            target <= 3 %
  5. ``geomgen size --no-drawings`` alone, less the interpreter's own start target <= 0.5 s
  6. a sweep of 8 built variants (a plain wing) on 1 vs 2 local workers    target >= 1.8x
  7. peak memory of a fresh demo build with --jobs 2: the largest sum over the build's
     processes of their proportional set size (shared pages split between the processes
     that share them), sampled every 50 ms                                target < 1 GB

Every figure is a subprocess timed from spawn to exit (so imports count), one at a time; the
commands compared in one row alternate, --runs times each, and the table gives the least and
the median. Writes benchmarks/RESULTS.md (or --table PATH) and prints it.

Run:  .venv/bin/python benchmarks/resizing_loop.py [--runs 3]
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

import yaml

sys.path.insert(0, str(Path(__file__).resolve().parent))
from build_vs_floor import ROOT, run, table  # noqa: E402

DEMO = ROOT / "examples" / "veyra-t2.yaml"


def alternate(commands: dict, runs: int) -> dict[str, list[float]]:
    """Wall times (s) of each named ``(cmd, before)`` pair, run in turn ``runs`` times;
    ``before()`` (or None) is called ahead of each run of its command."""
    times: dict[str, list[float]] = {name: [] for name in commands}
    for _ in range(runs):
        for name, (cmd, before) in commands.items():
            if before is not None:
                before()
            times[name].append(run(cmd).wall)
    return times


def fig(values: list[float], digits: int = 1) -> str:
    return f"{min(values):.{digits}f} s (median {statistics.median(values):.{digits}f})"


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


def tail_changed(work: Path) -> Path:
    """The demo with one horizontal-tail key changed (its aspect ratio), same file name."""
    doc = yaml.safe_load(DEMO.read_text(encoding="utf-8"))
    doc["horizontal_tail"]["aspect_ratio"] = float(doc["horizontal_tail"]["aspect_ratio"]) + 0.3
    path = work / "tail" / DEMO.name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return path


def _tree(pid: int) -> list[int]:
    """pid and its descendants (Linux /proc)."""
    children: dict[int, list[int]] = {}
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
            children.setdefault(int(fields[1]), []).append(int(stat.parent.name))
        except (OSError, IndexError, ValueError):
            pass
    out, todo = [], [pid]
    while todo:
        p = todo.pop()
        out.append(p)
        todo += children.get(p, [])
    return out


def _pss_kb(pid: int) -> int:
    try:
        for line in Path(f"/proc/{pid}/smaps_rollup").read_text().splitlines():
            if line.startswith("Pss:"):
                return int(line.split()[1])
    except OSError:
        pass
    return 0


def peak_pss_mb(cmd: list[str]) -> float:
    """The largest sum of the proportional set sizes of ``cmd``'s process tree (MB)."""
    proc = subprocess.Popen(cmd, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    peak = 0
    done = threading.Event()

    def sample() -> None:
        nonlocal peak
        while not done.is_set():
            peak = max(peak, sum(_pss_kb(p) for p in _tree(proc.pid)))
            time.sleep(0.05)

    t = threading.Thread(target=sample)
    t.start()
    rc = proc.wait()
    done.set()
    t.join()
    if rc != 0:
        raise SystemExit(f"{' '.join(cmd)} failed with exit code {rc}")
    return peak / 1024


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=3, help="runs of each timing (default 3)")
    ap.add_argument("--table", type=Path, default=ROOT / "benchmarks" / "RESULTS.md")
    args = ap.parse_args(argv)
    py = sys.executable
    work = Path(tempfile.mkdtemp(prefix="resizing_loop_"))
    rows = []
    load = os.getloadavg()[0]
    geomgen = [py, "-m", "geomgen.cli"]

    # 1. build vs floor, surfaces only
    parts = surface_parts(py, work / "size")
    reports = work / "size" / "veyra-t2" / "report.json"
    build_cmd = [*geomgen, "build", str(DEMO), "--fresh"]
    build_cmd += ["--only", ",".join(parts), "--out", str(work / "b1")]
    t = alternate(
        {
            "floor": ([py, "benchmarks/floor_build.py", "--report", str(reports)], None),
            "build": (build_cmd, None),
        },
        args.runs,
    )
    ratio = min(t["build"]) / min(t["floor"])
    rows.append(
        (
            "demo build (surfaces only, every CPU) vs the direct-cadquery floor",
            f"{fig(t['build'])} vs {fig(t['floor'])}",
            f"{ratio:.2f}x",
            "<= 1.5x",
            "yes" if ratio <= 1.5 else "no",
        )
    )

    # 2. the whole build, fresh, on 1 and 2 workers
    out = work / "b2"
    full = [*geomgen, "build", str(DEMO), "--out", str(out)]
    t = alternate(
        {
            "one": ([*full, "--fresh", "--jobs", "1"], None),
            "two": ([*full, "--fresh", "--jobs", "2"], None),
        },
        args.runs,
    )
    fresh = min(t["two"])
    rows.append(
        (
            "whole demo build, fresh, --jobs 1 vs --jobs 2",
            f"{fig(t['one'])} vs {fig(t['two'])}",
            f"{min(t['one']) / fresh:.2f}x",
            "<= 15 s on 2",
            "yes" if fresh <= 15 else "no",
        )
    )

    # 3. one horizontal-tail key changed: a rebuild over the cache of the unchanged demo
    snapshot = work / "b2-snapshot"
    shutil.copytree(out, snapshot, symlinks=True)
    changed = tail_changed(work)

    def restore() -> None:
        shutil.rmtree(out)
        shutil.copytree(snapshot, out, symlinks=True)

    t = alternate(
        {"tail": ([*geomgen, "build", str(changed), "--out", str(out), "--jobs", "2"], restore)},
        args.runs,
    )
    rows.append(
        (
            "horizontal_tail.aspect_ratio changed: rebuild vs fresh build (--jobs 2)",
            f"{fig(t['tail'])} vs {fresh:.1f} s",
            f"{min(t['tail']) / fresh:.0%}",
            "<= 25 %",
            "yes" if min(t["tail"]) / fresh <= 0.25 else "no",
        )
    )

    # 4. no change
    restore()
    t = alternate({"again": ([*full, "--jobs", "2"], None)}, args.runs)
    rows.append(
        (
            "rebuild with no change vs fresh build",
            f"{fig(t['again'], 2)} vs {fresh:.1f} s",
            f"{min(t['again']) / fresh:.1%}",
            "<= 3 %",
            "yes" if min(t["again"]) / fresh <= 0.03 else "no",
        )
    )

    # 5. geomgen size alone, less the interpreter start
    size = [*geomgen, "size", str(DEMO), "--no-drawings", "--out", str(work / "s")]
    t = alternate({"bare": ([py, "-c", "pass"], None), "size": (size, None)}, max(5, args.runs))
    net = [a - b for a, b in zip(t["size"], t["bare"], strict=True)]
    rows.append(
        (
            "geomgen size --no-drawings, after interpreter start",
            f"{fig(t['size'], 2)} - {fig(t['bare'], 2)}",
            f"{min(net):.2f} s (median {statistics.median(net):.2f})",
            "<= 0.5 s",
            "yes" if min(net) <= 0.5 else "no",
        )
    )

    # 6. a sweep of 8 built variants on 1 vs 2 workers (each variant builds on one process)
    wing = plain_wing(work)
    sweep = [*geomgen, "sweep", str(wing), "--build"]
    sweep += ["--vary", "wing.aspect_ratio=6.5,7,7.5,8,8.5,9,9.5,10"]
    t = alternate(
        {
            "one": ([*sweep, "--jobs", "1", "--out", str(work / "w1")], None),
            "two": ([*sweep, "--jobs", "2", "--out", str(work / "w2")], None),
        },
        1,
    )
    speedup = min(t["one"]) / min(t["two"])
    rows.append(
        (
            "sweep of 8 built variants, 1 vs 2 workers",
            f"{fig(t['one'])} vs {fig(t['two'])}",
            f"{speedup:.2f}x",
            ">= 1.8x",
            "yes" if speedup >= 1.8 else "no",
        )
    )

    # 7. peak memory of a fresh build on 2 workers
    mb = peak_pss_mb([*full, "--fresh", "--jobs", "2"])
    rows.append(
        (
            "peak memory of a fresh demo build, --jobs 2 (sum of PSS)",
            f"{mb:.0f} MB",
            f"{mb / 1024:.2f} GB",
            "< 1 GB",
            "yes" if mb < 1024 else "no",
        )
    )

    text = "\n".join(
        [
            "# Re-sizing loop benchmarks",
            "",
            f"Measured {time.strftime('%Y-%m-%d')} with `benchmarks/resizing_loop.py --runs "
            f"{args.runs}` on {platform.machine()} with {os.cpu_count()} CPUs, Python "
            f"{platform.python_version()}; 1-minute load average {load:.2f} before the runs. "
            "Wall times from spawn to exit: least and median of the runs (commands in one row "
            "alternate).",
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
