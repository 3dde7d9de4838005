"""How the time of a fresh demo build grows with the solids settings and the wing's panels.

Builds the demo (every CPU, ``--fresh``) with one setting changed at a time:
``solids.section_points`` 41, 61, 121; the wing's panels 1 (straight tapered, taper 0.62),
2 (the demo's), 4 (the demo's
planform with its outer panel split in three); and
``solids.tessellation`` 1e-3, 5e-4, 1e-4 (STL chordal tolerance over the local chord).
Wall time from spawn to exit, least of ``--runs``, with the ratio to the demo's own settings;
writes a markdown table to stdout (paste it into RESULTS.md).

Run:  .venv/bin/python benchmarks/growth.py [--runs 1]
"""

from __future__ import annotations

import argparse
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

FOUR_PANELS = [  # the demo's planform, its outer panel split in three at the same taper
    {"span_fraction": 0.45, "chord_ratio": 1.0, "sweep": "0 deg"},
    {"span_fraction": 0.7, "chord_ratio": 0.8273, "sweep": "0 deg", "sweep_at": 0.25},
    {"span_fraction": 0.85, "chord_ratio": 0.7236, "sweep": "0 deg", "sweep_at": 0.25},
    {"span_fraction": 1.0, "chord_ratio": 0.62, "sweep": "0 deg", "sweep_at": 0.25},
]


def variant(doc: dict, what: str, value) -> dict:
    doc = yaml.safe_load(yaml.safe_dump(doc))
    if what == "section_points":
        doc.setdefault("solids", {})["section_points"] = value
    elif what == "tessellation":
        doc.setdefault("solids", {})["tessellation"] = value
    elif value == 1:
        doc["wing"].pop("panels")
        doc["wing"]["taper_ratio"] = 0.62
    elif value == 4:
        doc["wing"]["panels"] = FOUR_PANELS
    return doc


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=1)
    args = ap.parse_args(argv)
    base = yaml.safe_load(DEMO.read_text(encoding="utf-8"))
    solids = base.get("solids", {})
    demo_values = {
        "section_points": solids.get("section_points", 61),
        "panels": len(base["wing"].get("panels", [])) or 1,
        "tessellation": solids.get("tessellation", 0.0005),
    }
    grid = {
        "section_points": [41, 61, 121],
        "panels": [1, 2, 4],
        "tessellation": [1e-3, 5e-4, 1e-4],
    }
    work = Path(tempfile.mkdtemp(prefix="growth_"))
    load = os.getloadavg()[0]
    rows = []
    for what, values in grid.items():
        times = {}
        for value in values:
            folder = work / f"{what}-{value}"
            folder.mkdir()
            path = folder / DEMO.name
            path.write_text(yaml.safe_dump(variant(base, what, value)), encoding="utf-8")
            cmd = [sys.executable, "-m", "geomgen.cli", "build", str(path), "--fresh"]
            cmd += ["--out", str(folder / "out")]
            times[value] = min(run(cmd).wall for _ in range(args.runs))
        ref = times.get(demo_values[what]) or times[values[1]]
        for value in values:
            mark = " (demo)" if value == demo_values[what] else ""
            t = times[value]
            rows.append((what, f"{value}{mark}", f"{t:.1f} s", f"{t / ref:.2f}x"))
    print(
        f"Measured {time.strftime('%Y-%m-%d')} with `benchmarks/growth.py --runs {args.runs}` on "
        f"{platform.machine()} with {os.cpu_count()} CPUs; 1-minute load average {load:.2f} "
        "before the runs.\n"
    )
    print(table(("setting", "value", "fresh build", "vs the demo's"), rows))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
