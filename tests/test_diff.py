"""``geomgen diff``: two design files or two output folders, compared quantity by quantity."""

from __future__ import annotations

import copy
import json
import math
import re
import shutil
from pathlib import Path

import pytest
import yaml
from designs import DEMO, demo_document

from geomgen.cli import main
from geomgen.commands import diff
from geomgen.commands.pipeline import _size
from geomgen.outputs.report import report_data

#: the wing-area factor of the scaled design
K = 1.21


def run(capsys: pytest.CaptureFixture, *args: str) -> tuple[int, str, str]:
    """``geomgen diff ARGS`` in-process: (exit code, stdout, stderr)."""
    code = main(["diff", *map(str, args)])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def designs(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path, float]:
    """The demo and a copy with its wing area set to K times the demo's sized area."""
    folder = tmp_path_factory.mktemp("designs")
    sized_area = report_data(_size(DEMO)[1])["surfaces"]["wing"]["area"]["value"]
    doc = demo_document()
    assert doc["wing"]["area"] == "from_stall"  # the demo sizes its wing from the stall
    doc["wing"]["area"] = f"{sized_area * K!r} m^2"
    scaled = folder / "scaled.yaml"
    scaled.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return DEMO, scaled, sized_area


@pytest.fixture(scope="module")
def scaled_result(designs) -> dict:
    old, new, _ = designs
    return diff.diff_paths(old, new)


def _by_key(result: dict) -> dict[str, dict]:
    return {q["key"]: q for q in result["quantities"]}


def _md_rows(markdown: str, title: str) -> list[list[str]]:
    """The body rows of the Markdown table under ``## title``."""
    section = markdown.split(f"## {title}\n", 1)[1].split("\n## ", 1)[0]
    rows = [line for line in section.splitlines() if line.startswith("| ")]
    return [[c.strip() for c in row.strip("|").split(" | ")] for row in rows[1:]]


# --- equal ----------------------------------------------------------------------------------------


def test_the_demo_against_itself_is_empty_and_exits_0(capsys):
    # a design compared with itself has no differences (common practice)
    code, out, err = run(capsys, DEMO, DEMO)
    assert code == 0 and err == ""
    assert out.splitlines()[0].startswith("# geomgen diff:")
    assert "No differences." in out
    code, out, _ = run(capsys, DEMO, DEMO, "--format", "json")
    assert code == 0
    assert json.loads(out) == {
        "equal": True,
        "quantities": [],
        "points": [],
        "parts": [],
        "only_old": [],
        "only_new": [],
    }


# --- a scaled wing --------------------------------------------------------------------------------


def test_scaling_the_wing_area_scales_span_and_chords_by_its_root(designs, scaled_result):
    # at a fixed aspect ratio b = sqrt(AR S) (definition of aspect ratio), and with the taper
    # and the break's chord ratio fixed every planform length scales alike (geometric
    # similarity): span, semi-span and chords by sqrt(K)
    _, _, sized_area = designs
    q = _by_key(scaled_result)
    assert not scaled_result["equal"]
    assert q["surfaces.wing.area"]["old"] == pytest.approx(sized_area, rel=1e-12)
    assert q["surfaces.wing.area"]["new"] == pytest.approx(K * sized_area, rel=1e-12)
    root = math.sqrt(K)
    for key in ("span", "semi_span", "root_chord", "tip_chord", "mgc.length"):
        row = q[f"surfaces.wing.{key}"]
        assert row["new"] / row["old"] == pytest.approx(root, rel=1e-9), key
        assert row["percent"] == pytest.approx(100 * (root - 1), rel=1e-9), key
        assert row["delta"] == pytest.approx(row["old"] * (root - 1), rel=1e-9), key
        assert row["unit"] == "m"
    # the aspect ratio and the taper ratio were held: not listed
    assert "surfaces.wing.aspect_ratio" not in q
    assert "surfaces.wing.taper_ratio" not in q
    assert scaled_result["only_old"] == [] and scaled_result["only_new"] == []


def test_moved_points_are_labelled_and_measured(scaled_result):
    points = {p["label"]: p for p in scaled_result["points"]}
    tip = points["wing right panel 1 le_outer"]
    assert tip["key"] == "surfaces.wing.corners.right[1].le_outer"
    # the tip's spanwise position is the semi-span: it scales by sqrt(K) (as above)
    assert tip["new"][1] / tip["old"][1] == pytest.approx(math.sqrt(K), rel=1e-9)
    # distance moved: Euclidean distance of the two points (definition)
    assert tip["distance"] == pytest.approx(math.dist(tip["old"], tip["new"]), rel=1e-12)
    assert tip["distance"] >= abs(tip["new"][1] - tip["old"][1])
    assert tip["unit"] == "m"
    hinge = points["wing aileron-left hinge line outer end"]
    assert hinge["key"] == "surfaces.wing.hinge_lines.aileron-left.points[1].point"
    assert hinge["new"][1] < 0  # the left side
    # every moved point is also a changed quantity
    keys = {q["key"] for q in scaled_result["quantities"]}
    assert {p["key"] for p in scaled_result["points"]} <= keys


def test_the_scaled_design_exits_1_and_json_agrees_with_markdown(designs, capsys):
    old, new, _ = designs
    code, markdown, err = run(capsys, old, new)
    assert code == 1 and err == ""
    code_json, out, _ = run(capsys, old, new, "--format", "json")
    assert code_json == 1
    data = json.loads(out)
    assert data["equal"] is False
    assert set(data) == {"equal", "quantities", "points", "parts", "only_old", "only_new"}

    rows = _md_rows(markdown, "Changed quantities")
    assert [r[0] for r in rows] == [q["key"] for q in data["quantities"]]
    for row, q in zip(rows, data["quantities"], strict=True):
        assert row[5] == (q["unit"] or "-")
        if isinstance(q["new"], float):
            # the Markdown shows 7 significant digits of the JSON's value
            assert float(row[2]) == pytest.approx(q["new"], rel=1e-6)
            assert float(row[3]) == pytest.approx(q["delta"], rel=1e-3, abs=1e-12)
    span = next(r for r in rows if r[0] == "surfaces.wing.span")
    assert float(span[4]) == pytest.approx(100 * (math.sqrt(K) - 1), rel=1e-3)

    points = _md_rows(markdown, "Moved points")
    assert [r[0] for r in points] == [p["label"] for p in data["points"]]
    for row, p in zip(points, data["points"], strict=True):
        assert float(row[3]) == pytest.approx(p["distance"], rel=1e-3)


# --- output folders -------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def folders(designs, tmp_path_factory) -> tuple[Path, Path]:
    """``geomgen size --no-drawings`` of the demo and of the scaled copy."""
    old, new, _ = designs
    root = tmp_path_factory.mktemp("folders")
    found = []
    for name, path in (("old", old), ("new", new)):
        assert main(["size", str(path), "--out", str(root / name), "--no-drawings"]) == 0
        found.append(root / name / "veyra-t2")
    return found[0], found[1]


def test_two_output_folders_diff_like_their_design_files(folders, scaled_result, capsys):
    old, new = folders
    code, out, _ = run(capsys, old, new, "--format", "json")
    assert code == 1
    # report.json holds the same floats as the in-process sizing (JSON round-trips them)
    assert json.loads(out) == json.loads(diff.to_json(scaled_result))
    code, out, _ = run(capsys, old, old)
    assert code == 0 and "No differences." in out


def test_bad_input_exits_2_with_one_line(folders, tmp_path, capsys):
    old, _ = folders
    cases = [
        (DEMO, tmp_path / "missing.yaml", "no such design file or output folder"),
        (tmp_path, DEMO, "must hold report.json"),
        (DEMO, old / "report.json", "must be a design file"),
        (old, DEMO, "compare two design files or two output folders"),
    ]
    for a, b, words in cases:
        code, out, err = run(capsys, a, b)
        assert code == 2 and out == ""
        assert len(err.splitlines()) == 1
        assert err.startswith("geomgen: error: ") and words in err
    code, _, err = run(capsys, DEMO, DEMO, "--tolerance", "-1")
    assert code == 2 and err.startswith("geomgen: error: --tolerance:")


def test_tolerance_separates_noise_from_change(folders, tmp_path):
    old, _ = folders
    report = json.loads((old / "report.json").read_text(encoding="utf-8"))
    changed = copy.deepcopy(report)
    changed["surfaces"]["wing"]["span"]["value"] *= 1 + 1e-6
    result = diff.compare(report, changed)
    assert [q["key"] for q in result["quantities"]] == ["surfaces.wing.span"]
    assert result["quantities"][0]["percent"] == pytest.approx(1e-4, rel=1e-6)
    assert diff.compare(report, changed, tolerance=1e-5)["equal"]
    # bookkeeping keys are not differences; a quantity on one side only is
    changed = copy.deepcopy(report)
    changed["design"]["source"] = "elsewhere.yaml"
    changed["caution"] = "another wording"
    assert diff.compare(report, changed)["equal"]
    del changed["fuselage"]["max_width"]
    result = diff.compare(report, changed)
    assert [q["key"] for q in result["only_old"]] == ["fuselage.max_width"]
    assert not result["equal"]


# --- parts ----------------------------------------------------------------------------------------


def _box(lo, hi):
    return {"min": list(lo), "max": list(hi), "unit": "mm"}


def _part(name, volume, lo, hi):
    return {"name": name, "volume": {"value": volume, "unit": "mm^3"}, "bounding_box": _box(lo, hi)}


def test_parts_json_changes(folders, tmp_path, capsys):
    old_report = folders[0] / "report.json"
    old_parts = [
        _part("wing-right", 2.0e7, (1550, 0, 900), (2935, 4825, 1170)),
        _part("fin", 4.0e6, (5100, -60, 600), (6640, 60, 1980)),
        _part("aileron-right", 5.0e5, (2580, 2270, 1030), (2860, 4540, 1180)),
        _part("rudder", 9.0e5, (5900, -30, 820), (6640, 30, 1980)),
    ]
    new_parts = copy.deepcopy(old_parts[:3])
    new_parts[0]["volume"]["value"] = 2.1e7  # +5 %
    new_parts[1]["bounding_box"]["max"] = [6643, 64, 1980]  # one corner 3-4-5 mm away
    new_parts.append(_part("fuselage", 3.2e9, (0, -430, 300), (6350, 430, 1400)))
    dirs = []
    for name, parts in (("a", old_parts), ("b", new_parts)):
        d = tmp_path / name
        d.mkdir()
        shutil.copy(old_report, d / "report.json")
        (d / "parts.json").write_text(json.dumps({"parts": parts}), encoding="utf-8")
        dirs.append(d)

    code, out, _ = run(capsys, *dirs, "--format", "json")
    assert code == 1
    data = json.loads(out)
    assert data["quantities"] == [] and data["points"] == []
    parts = {p["name"]: p for p in data["parts"]}
    assert set(parts) == {"wing-right", "fin", "rudder", "fuselage"}  # aileron unchanged
    wing = parts["wing-right"]
    assert wing["status"] == "changed"
    assert (wing["volume_old"], wing["volume_new"]) == (2.0e7, 2.1e7)
    assert wing["percent"] == pytest.approx(5.0, rel=1e-12)  # (2.1 - 2.0) / 2.0
    assert wing["largest_corner_move"] == 0.0
    # the (max x, max y) corners moved by (3, 4, 0) mm: 5 mm (Pythagoras)
    assert parts["fin"]["largest_corner_move"] == pytest.approx(5.0, rel=1e-12)
    assert parts["fin"]["percent"] == 0.0
    assert parts["rudder"]["status"] == "only_old" and parts["rudder"]["volume_new"] is None
    assert parts["fuselage"]["status"] == "only_new"

    code, markdown, _ = run(capsys, *dirs)
    rows = {r[0]: r for r in _md_rows(markdown, "Changed parts")}
    assert rows["wing-right"][1:5] == ["changed", "2e+07", "2.1e+07", "5"]
    assert rows["fin"][5] == "5"
    assert rows["rudder"][1] == "only in old" and rows["fuselage"][1] == "only in new"

    # parts.json on one side only: reported, not compared
    (dirs[1] / "parts.json").unlink()
    code, out, _ = run(capsys, *dirs, "--format", "json")
    data = json.loads(out)
    assert code == 1 and data["parts"] == []
    assert [q["key"] for q in data["only_old"]] == ["parts.json"]
    assert re.search(r"^## Only in old$", run(capsys, *dirs)[1], re.M)
