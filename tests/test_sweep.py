"""``geomgen sweep``: rows against independent runs, the lift equation across a stall-speed
sweep, the same CSV from one process, a process pool and a Dask cluster, failing variants,
and bad ``--vary`` options."""

from __future__ import annotations

import contextlib
import csv
import io
import json
import math
from pathlib import Path

import pytest
import yaml
from designs import DEMO, demo_document

from geomgen.cli import main
from geomgen.commands.pipeline import run_size
from geomgen.commands.sweep_summary import EXPOSED_COLUMNS, REPORT_COLUMNS

#: 1 kn = 1852 m / 3600 s exactly (international nautical mile, 1929)
KN = 1852.0 / 3600.0

#: a small grid of the demo that sizes in every point: 2 x 2 variants, first --vary slowest
GRID = ["--vary", "requirements.stall_speed=42:45:3 kn", "--vary", "wing.aspect_ratio=7.4,8.2"]


def sweep(out: Path, *args: str) -> tuple[int, str, str]:
    """``geomgen sweep <demo> --out OUT ARGS`` in-process: exit code, stdout, stderr."""
    stdout, stderr = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(stdout), contextlib.redirect_stderr(stderr):
        code = main(["sweep", str(DEMO), "--out", str(out), *args])
    return code, stdout.getvalue(), stderr.getvalue()


def rows(out: Path) -> list[dict[str, str]]:
    with (out / "veyra-t2-sweep" / "summary.csv").open(encoding="utf-8", newline="") as f:
        return list(csv.DictReader(f))


def report_number(report: dict, path: tuple[str, ...]) -> float:
    node = report
    for p in path:
        node = node[p]
    return node["value"]


@pytest.fixture(scope="module")
def grid_serial(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The 2 x 2 grid run in this process (--jobs 1)."""
    out = tmp_path_factory.mktemp("serial")
    code, stdout, _ = sweep(out, *GRID)
    assert code == 0, stdout
    return out


def test_rows_equal_separate_size_runs_of_hand_written_variants(grid_serial, tmp_path):
    # The reference is an independent `run_size` of each variant, its design written here by
    # hand from the demo (not from the sweep's design files).
    got = rows(grid_serial)
    expected_grid = [("42 kn", "7.4"), ("42 kn", "8.2"), ("45 kn", "7.4"), ("45 kn", "8.2")]
    assert [(r["requirements.stall_speed"], r["wing.aspect_ratio"]) for r in got] == expected_grid
    assert [r["variant"] for r in got] == [f"veyra-t2-v00{i}" for i in range(1, 5)]
    for row, (speed, aspect_ratio) in zip(got, expected_grid, strict=True):
        assert row["status"] == "ok"
        doc = demo_document()
        doc["name"] = "by-hand"
        doc["requirements"]["stall_speed"] = speed
        doc["wing"]["aspect_ratio"] = float(aspect_ratio)
        design = tmp_path / f"by-hand-{speed}-{aspect_ratio}.yaml".replace(" ", "")
        design.write_text(yaml.safe_dump(doc), encoding="utf-8")
        folder = run_size(design, tmp_path / design.stem, None, drawings=False)
        report = json.loads((folder / "report.json").read_text(encoding="utf-8"))
        for column, path, _ in REPORT_COLUMNS + EXPOSED_COLUMNS:  # the demo has a fuselage
            assert float(row[column]) == pytest.approx(report_number(report, path), rel=1e-12)
        # the sweep keeps each variant's design file and report beside it
        variant = grid_serial / "veyra-t2-sweep" / row["variant"]
        written = yaml.safe_load((variant / "design.yaml").read_text(encoding="utf-8"))
        assert written["name"] == row["variant"]
        assert written["requirements"]["stall_speed"] == speed
        assert (variant / "report.json").is_file()


def test_wing_area_scales_as_one_over_stall_speed_squared(tmp_path):
    # Lift equation at the stall, W = 1/2 rho V^2 S CL_max (definition of the lift
    # coefficient): at fixed W, rho and CL_max, S is proportional to 1/V^2; the span at a fixed
    # aspect ratio is sqrt(AR S) (definition of the aspect ratio, AR = b^2 / S).
    code, _, _ = sweep(tmp_path, "--vary", "requirements.stall_speed=40:46:2 kn")
    assert code == 0
    got = rows(tmp_path)
    speeds = [float(r["requirements.stall_speed"].removesuffix(" kn")) * KN for r in got]
    assert speeds == pytest.approx([v * KN for v in (40, 42, 44, 46)], rel=1e-12)
    areas = [float(r["wing_area_m2"]) for r in got]
    spans = [float(r["wing_span_m"]) for r in got]
    for v, s, b in zip(speeds, areas, spans, strict=True):
        assert s / areas[0] == pytest.approx((speeds[0] / v) ** 2, rel=1e-9)
        assert b == pytest.approx(math.sqrt(7.8 * s), rel=1e-9)  # the demo's AR 7.8


def test_process_pool_and_dask_cluster_give_the_same_csv(grid_serial, tmp_path):
    distributed = pytest.importorskip("distributed")
    serial = (grid_serial / "veyra-t2-sweep" / "summary.csv").read_text(encoding="utf-8")

    code, _, _ = sweep(tmp_path / "pool", *GRID, "--jobs", "2")
    assert code == 0
    pool = (tmp_path / "pool" / "veyra-t2-sweep" / "summary.csv").read_text(encoding="utf-8")
    assert pool == serial

    with distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
    ) as cluster:
        code, _, _ = sweep(tmp_path / "dask", *GRID, "--scheduler", cluster.scheduler_address)
    assert code == 0
    dask = (tmp_path / "dask" / "veyra-t2-sweep" / "summary.csv").read_text(encoding="utf-8")
    assert dask == serial


def test_a_failing_variant_is_recorded_and_the_others_run(tmp_path):
    # 1.8 is outside the tail taper ratio's allowed (0.02, 1.5]: only that variant fails
    code, stdout, _ = sweep(tmp_path, "--vary", "horizontal_tail.taper_ratio=0.5,1.8,0.8")
    assert code == 1
    assert "2 variant(s) ran, 1 failed" in stdout
    got = rows(tmp_path)
    assert [r["horizontal_tail.taper_ratio"] for r in got] == ["0.5", "1.8", "0.8"]
    assert [r["status"] for r in got][0::2] == ["ok", "ok"]
    assert got[1]["status"].startswith("failed: ")
    assert "horizontal_tail.taper_ratio" in got[1]["status"]
    assert got[1]["wing_area_m2"] == ""
    # the tail's taper ratio changes neither the wing nor the tail area: the tail volume
    # coefficient V_H = S_H l_H / (S c) (common practice) holds no tail taper ratio
    for column in ("wing_area_m2", "horizontal_tail_area_m2"):
        assert float(got[0][column]) == pytest.approx(float(got[2][column]), rel=1e-12)
    folder = tmp_path / "veyra-t2-sweep"
    assert (folder / "veyra-t2-v002" / "design.yaml").is_file()
    assert not (folder / "veyra-t2-v002" / "report.json").exists()


def test_plot_is_a_png(tmp_path):
    code, _, _ = sweep(
        tmp_path, *GRID, "--plot", "requirements.stall_speed:wing_area_m2,wing_span_m:wing_mgc_m"
    )
    assert code == 0
    png = tmp_path / "veyra-t2-sweep" / "sweep.png"
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG spec, 5.2)


@pytest.mark.parametrize(
    "vary",
    [
        "wing.no_such_key=1,2",  # not a key of a design file
        "wing.panels[5].chord_ratio=0.5,0.6",  # the demo's wing has two panels
        "wing.aspect_ratio=8:7:0.5",  # empty range
        "wing.aspect_ratio=7:8:0",  # STEP <= 0
        "wing.aspect_ratio=7:8:-1",
        "wing.aspect_ratio=5:10:0.001",  # 5001 variants
        "requirements.stall_speed=40:50:5",  # a speed needs its unit
        "wing.aspect_ratio=7 m,8 m",  # a dimensionless key takes bare numbers
        "requirements.stall_speed=40,45 m",  # a length is not a speed
        "wing.apex=1,2",  # a group, not a value
        "wing.aspect_ratio",  # no values
    ],
)
def test_bad_vary_exits_2_with_one_line_naming_vary(tmp_path, vary):
    code, stdout, stderr = sweep(tmp_path, "--vary", vary)
    assert code == 2
    assert stderr.count("\n") == 1 and "--vary" in stderr
    assert not (tmp_path / "veyra-t2-sweep").exists()  # nothing written


@pytest.mark.parametrize(
    ("vary", "hint"),
    [
        ("wing.aspect_ration=7,8", "(did you mean aspect_ratio?)"),
        ("wing.stall_speed=40,45 kn", "(stall_speed goes under requirements, not under wing)"),
    ],
)
def test_unknown_vary_key_gets_a_suggestion(tmp_path, vary, hint):
    code, _, stderr = sweep(tmp_path, "--vary", vary)
    assert code == 2
    assert stderr.count("\n") == 1 and hint in stderr, stderr


def test_a_grid_over_the_limit_is_refused(tmp_path):
    # 30 x 20 = 600 variants > 500
    code, _, stderr = sweep(
        tmp_path,
        "--vary",
        "wing.aspect_ratio=6:8.9:0.1",
        "--vary",
        "requirements.cl_max=1.2:2.15:0.05",
    )
    assert code == 2
    assert "--vary" in stderr and "500" in stderr
    assert not (tmp_path / "veyra-t2-sweep").exists()


def _png_size(png: bytes) -> tuple[int, int]:
    """Width and height from the IHDR chunk, the first after the signature (PNG spec, 11.2.2)."""
    import struct

    assert png[12:16] == b"IHDR"
    return struct.unpack(">II", png[16:24])


def test_feasibility_map_marks_each_variant_ok_or_by_its_failing_key(tmp_path):
    from geomgen.commands.sweep_summary import NO_KEY_MARK, OK_MARK, feasibility_maps

    # 65 kn at 300 kg puts the tails over the cabin of the following body (a refusal on
    # fuselage.end_behind_tails measured in the wide walk); the other three corners size
    code, stdout, _ = sweep(
        tmp_path,
        "--vary",
        "requirements.stall_speed=45,65 kn",
        "--vary",
        "requirements.gross_weight=300,650 kg",
        "--plot",
        "requirements.stall_speed:requirements.gross_weight,requirements.stall_speed:wing_area_m2",
    )
    assert code == 1, stdout  # a sweep with a refused variant exits 1
    assert "3 variant(s) ran, 1 failed" in stdout
    got = rows(tmp_path)
    keys = ["requirements.stall_speed", "requirements.gross_weight"]
    maps = feasibility_maps(got, *keys, keys)
    assert len(maps) == 1  # no third varied key: one map
    title, points = maps[0]
    assert title == ""
    marks = {(x, y): m for x, y, m in points}
    assert len(marks) == 4
    # each point is the row's own values and its own status or failing key
    for r in got:
        x, y = float(r[keys[0]].split()[0]), float(r[keys[1]].split()[0])
        want = OK_MARK if r["status"] == "ok" else (r["failing_key"] or NO_KEY_MARK)
        assert marks[(x, y)] == want
    assert marks[(65.0, 300.0)] == "fuselage.end_behind_tails"
    assert sum(m == OK_MARK for m in marks.values()) == 3
    # two panels (the map and one line plot) of 3.6 in at 110 dpi: 792 px high
    png = (tmp_path / "veyra-t2-sweep" / "sweep.png").read_bytes()
    assert _png_size(png)[1] == pytest.approx(2 * 3.6 * 110, abs=2)


def test_feasibility_map_with_a_third_varied_key_is_one_map_per_value(tmp_path):
    from geomgen.commands.sweep_summary import feasibility_maps

    code, stdout, _ = sweep(
        tmp_path,
        "--vary",
        "requirements.stall_speed=42,45 kn",
        "--vary",
        "wing.aspect_ratio=7.4,8.2",
        "--vary",
        "requirements.gross_weight=600,650 kg",
        "--plot",
        "requirements.stall_speed:wing.aspect_ratio",
    )
    assert code == 0, stdout
    keys = ["requirements.stall_speed", "wing.aspect_ratio", "requirements.gross_weight"]
    maps = feasibility_maps(rows(tmp_path), keys[0], keys[1], keys)
    assert [t for t, _ in maps] == [
        "requirements.gross_weight=600 kg",
        "requirements.gross_weight=650 kg",
    ]
    assert all(len(p) == 4 for _, p in maps)
    png = (tmp_path / "veyra-t2-sweep" / "sweep.png").read_bytes()
    assert _png_size(png)[1] == pytest.approx(2 * 3.6 * 110, abs=2)


@pytest.mark.parametrize(
    "plot, words",
    [
        ("requirements.stall_speed:requirements.stall_speed", "two different varied keys"),
        ("requirements.stall_speed:wing.aspect_ratio", "at most 12"),
    ],
)
def test_feasibility_map_refusals(tmp_path, plot, words):
    code, _, stderr = sweep(
        tmp_path,
        "--vary",
        "requirements.stall_speed=42,45 kn",
        "--vary",
        "wing.aspect_ratio=7.4,8.2",
        "--vary",
        "requirements.gross_weight=600:665:5 kg",  # 14 values: 14 maps
        "--plot",
        plot,
    )
    assert code == 2
    assert "--plot" in stderr and words in stderr
    assert len(stderr.strip().splitlines()) == 1
    assert not (tmp_path / "veyra-t2-sweep").exists()  # refused before anything is written


def _entries(cache: Path) -> dict[str, int]:
    """Every cache entry (folder name) with the inode of its folder: an entry made again is a
    new folder (cache.put renames a fresh one into place)."""
    return {p.name: p.stat().st_ino for p in cache.glob("??/*") if p.is_dir()}


@pytest.mark.slow
def test_built_variants_share_the_cache_and_a_new_sweep_keeps_it(tmp_path):
    # the template spacing changes drawings only: every variant has the same solids, which
    # the first variant builds and the others (and the next sweep's) take from the cache
    code, stdout, _ = sweep(tmp_path, "--build", "--vary", "drawings.template_spacing=500,700 mm")
    assert code == 0, stdout
    folder = tmp_path / "veyra-t2-sweep"
    got = rows(tmp_path)
    assert [r["status"] for r in got] == ["ok", "ok"]
    assert got[0]["parts_volume_mm3"] == got[1]["parts_volume_mm3"]
    first = _entries(folder / ".cache")
    # 6 solid entries (wing and stabilizer each side, fin, fuselage) and their 6 unit entries
    assert len(first) == 12
    code, stdout, _ = sweep(tmp_path, "--build", "--vary", "drawings.template_spacing=800 mm")
    assert code == 0, stdout
    assert _entries(folder / ".cache") == first  # the same entries, none made again
    assert sorted(p.name for p in folder.iterdir() if not p.name.startswith(".")) == [
        "summary.csv",
        "veyra-t2-v001",
    ]  # the previous sweep's variants are gone
