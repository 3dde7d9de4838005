"""Time ``geomgen build`` against the plain-cadquery floor (benchmarks/floor_build.py) in one run.

Both run as subprocesses of the same interpreter, after one warm-up ``geomgen size`` that also
writes the report.json the floor reads. Each is timed as wall time from spawn to exit, best of
``--runs`` (runs alternate, so drift in the machine's speed hits both alike), and by CPU time
(user + system, all threads), which a busy machine disturbs less. geomgen's own
progress lines ("[  12.3 s] built 12 solids") give its stages; the wrapper also notes when each
line arrived, counted from spawn, so the split includes interpreter start and imports.

Prints markdown tables, then compares the STL files of the two (triangles and mesh volume per
part) to show that the floor built the same solids.

Run:  /work/venv/bin/python benchmarks/build_vs_floor.py [--runs 2] [--keep DIR]
"""

from __future__ import annotations

import argparse
import os
import re
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
TARGET = 1.5  # geomgen build / floor, from the issue
PROGRESS = re.compile(r"^geomgen: \[\s*([0-9.]+) s\] (.*)$")
FLOOR_STAGE = re.compile(r"^(.*\S)\s+([0-9.]+) s$")


@dataclass(frozen=True)
class Run:
    wall: float  # s, spawn to exit
    cpu: float  # s, user + system of the child and its threads
    lines: list[tuple[float, str]]  # output lines with their arrival times since spawn (s)


def run(cmd: list[str]) -> Run:
    """Run one subprocess to the end (one at a time, so the children's CPU time is its own)."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    proc = subprocess.Popen(
        cmd, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True, bufsize=1
    )
    lines = []
    assert proc.stdout is not None
    for line in proc.stdout:
        lines.append((time.perf_counter() - t0, line.rstrip("\n")))
    rc = proc.wait()
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime
    if rc != 0:
        sys.stdout.write("\n".join(text for _, text in lines) + "\n")
        raise SystemExit(f"{' '.join(cmd)} failed with exit code {rc}")
    return Run(wall, cpu, lines)


def progress(lines: list[tuple[float, str]]) -> list[tuple[str, float, float]]:
    """(stage, geomgen's own clock s, arrival since spawn s) of geomgen build's progress lines."""
    out = []
    for arrived, text in lines:
        m = PROGRESS.match(text)
        if m:
            out.append((m.group(2), float(m.group(1)), arrived))
    return out


def read_stl(path: Path) -> tuple[int, float]:
    """Triangle count and enclosed volume (mm^3, divergence theorem) of a binary STL."""
    data = path.read_bytes()
    n = int(np.frombuffer(data, "<u4", 1, 80)[0])
    rec = np.dtype([("normal", "<f4", 3), ("v", "<f4", (3, 3)), ("attr", "<u2")])
    v = np.frombuffer(data, rec, n, 84)["v"].astype(float)
    return n, float(np.einsum("ij,ij->i", v[:, 0], np.cross(v[:, 1], v[:, 2])).sum() / 6.0)


def _all(runs: list[Run]) -> str:
    return ", ".join(f"{r.wall:.2f}" for r in runs)


def table(header: tuple[str, ...], rows: list[tuple]) -> str:
    lines = ["| " + " | ".join(header) + " |", "|" + "|".join("---" for _ in header) + "|"]
    lines += ["| " + " | ".join(str(x) for x in r) + " |" for r in rows]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--design", type=Path, default=ROOT / "examples/veyra-t2.yaml")
    ap.add_argument("--runs", type=int, default=2, help="runs of each, best taken (default 2)")
    ap.add_argument(
        "--keep",
        type=Path,
        default=None,
        help="keep the outputs in this folder (default: a temp folder, removed)",
    )
    args = ap.parse_args(argv)
    work = (args.keep or Path(tempfile.mkdtemp(prefix="build_vs_floor_"))).resolve()
    work.mkdir(parents=True, exist_ok=True)
    py = sys.executable
    design = str(args.design.resolve())  # the children run in the repository's root
    load = os.getloadavg()[0]
    if load > 0.5:
        print(f"note: 1-minute load average {load:.2f} before the runs; timings will be noisy")
    try:
        size = run([py, "-m", "geomgen.cli", "size", design, "--out", str(work / "size")])
        reports = list((work / "size").glob("*/report.json"))
        if len(reports) != 1:
            raise SystemExit(f"expected one report.json under {work / 'size'}")
        floors: list[Run] = []
        builds: list[Run] = []
        for i in range(args.runs):
            floors.append(
                run(
                    [
                        py,
                        str(ROOT / "benchmarks/floor_build.py"),
                        "--report",
                        str(reports[0]),
                        "--design",
                        design,
                        "--out",
                        str(work / f"floor{i}"),
                    ]
                )
            )
            builds.append(
                run([py, "-m", "geomgen.cli", "build", design, "--out", str(work / f"build{i}")])
            )
            print(
                f"run {i + 1}/{args.runs}: floor {floors[-1].wall:.2f} s, "
                f"geomgen build {builds[-1].wall:.2f} s",
                flush=True,
            )
        report(args, py, size.wall, floors, builds, work, reports[0].parent.name)
        print(f"\n1-minute load average before / after: {load:.2f} / {os.getloadavg()[0]:.2f}")
    finally:
        if args.keep is None:
            shutil.rmtree(work, ignore_errors=True)
    return 0


def report(args, py, size_wall, floors: list[Run], builds: list[Run], work, name) -> None:
    fi = min(range(len(floors)), key=lambda i: floors[i].wall)
    bi = min(range(len(builds)), key=lambda i: builds[i].wall)
    floor, build = floors[fi].wall, builds[bi].wall
    f_cpu, b_cpu = min(r.cpu for r in floors), min(r.cpu for r in builds)
    ratio = build / floor
    verdict = f"target <= {TARGET}: {'met' if ratio <= TARGET else 'NOT met'}"
    print(f"\n## geomgen build vs the floor ({args.design}, best of {args.runs}, {py})\n")
    print(
        table(
            ("", "wall s (best)", "CPU s (best)", "wall s, all runs"),
            [
                ("floor (plain cadquery)", f"{floor:.2f}", f"{f_cpu:.2f}", _all(floors)),
                ("geomgen build", f"{build:.2f}", f"{b_cpu:.2f}", _all(builds)),
                ("ratio build / floor", f"{ratio:.2f}", f"{b_cpu / f_cpu:.2f}", verdict),
                ("warm-up geomgen size", f"{size_wall:.2f}", "", "once, not in the ratio"),
            ],
        )
    )

    stages = progress(builds[bi].lines)
    rows, prev = [], 0.0
    for label, own, arrived in stages:
        rows.append((label, f"{own:.1f}", f"{own - prev:.1f}", f"{arrived:.1f}"))
        prev = own
    rows.append(("exit", "", "", f"{build:.1f}"))
    print("\n### geomgen build's stages (best run)\n")
    print(table(("stage done", "geomgen clock s", "stage s", "since spawn s"), rows))

    # the split: until the solids exist; the checks stage (the STL checks run inside the STL
    # stage); everything else
    built = next((a for label, _, a in stages if label.startswith("built ")), float("nan"))
    checks, prev = float("nan"), 0.0
    for label, own, _ in stages:
        if re.fullmatch(r"ran \d+ checks", label):
            checks = own - prev
        prev = own
    rest = build - built - checks
    print("\n### Split (best run)\n")
    print(
        table(
            ("part of geomgen build", "s", "x floor"),
            [
                ("spawn until 'built N solids'", f"{built:.2f}", f"{built / floor:.2f}"),
                ("the 'ran N checks' stage", f"{checks:.2f}", f"{checks / floor:.2f}"),
                (
                    "everything else: reports, drawings, STEP, STL (+ STL checks), exit",
                    f"{rest:.2f}",
                    f"{rest / floor:.2f}",
                ),
                ("whole build", f"{build:.2f}", f"{ratio:.2f}"),
            ],
        )
    )

    rows = []
    for _, text in floors[fi].lines:
        m = FLOOR_STAGE.match(text)
        if m:
            rows.append((m.group(1), m.group(2)))
    rows.append(("wall since spawn", f"{floor:.2f}"))
    print("\n### Floor stages (best run)\n")
    print(table(("stage", "s"), rows))

    rows = []
    for path in sorted((work / f"build{bi}" / name / "stl").glob("*.stl")):
        other = work / f"floor{fi}" / "stl" / path.name
        if not other.exists():
            rows.append((path.stem, "-", "-", "missing from the floor"))
            continue
        (n_b, v_b), (n_f, v_f) = read_stl(path), read_stl(other)
        rows.append((path.stem, n_b, n_f, f"{(v_f - v_b) / v_b:+.1e}"))
    print("\n### Same solids? STL per part (geomgen vs floor)\n")
    print(
        table(
            ("part", "triangles geomgen", "triangles floor", "mesh volume floor/geomgen - 1"), rows
        )
    )
    if args.keep:
        print(f"\noutputs kept in {work}")


if __name__ == "__main__":
    sys.exit(main())
