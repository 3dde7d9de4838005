"""The command line: ``geomgen size``, ``geomgen schema`` and ``geomgen --version``."""

from __future__ import annotations

import contextlib
import io
import json
import math
import re
import subprocess
import sys
from pathlib import Path
from typing import Any

import jsonschema
import pytest
from designs import DEMO, ROOT, demo_document

import geomgen
from geomgen.cli import main

# Exact unit definitions: 1 ft = 0.3048 m; 1 lbf = 0.45359237 kg x 9.80665 m/s^2
# (international yard and pound, 1959; standard gravity, CGPM 1901).
FT = 0.3048
LBF = 0.45359237 * 9.80665

SURFACES = ("wing", "horizontal_tail", "vertical_tail")
SURFACE_KEYS = (
    "area",
    "span",
    "aspect_ratio",
    "taper_ratio",
    "root_chord",
    "tip_chord",
    "mgc",
    "sweeps",
    "corners",
    "hinge_lines",
)
#: numbers that are counts or indices, not quantities, and so carry no unit
INDEX_KEYS = {"panel"}


def run_size(out: Path, *extra: str) -> Path:
    """``geomgen size examples/veyra-t2.yaml --out <out> ...`` in-process; the output folder."""
    assert main(["size", str(DEMO.relative_to(ROOT)), "--out", str(out), *extra]) == 0
    return out / "veyra-t2"


@pytest.fixture(scope="module")
def si_reports(tmp_path_factory: pytest.TempPathFactory) -> tuple[dict[str, Any], str]:
    """report.json and report.md of the demo in its own units (SI)."""
    out = tmp_path_factory.mktemp("si")
    with pytest.MonkeyPatch.context() as mp:
        mp.chdir(ROOT)
        folder = run_size(out, "--no-drawings")
    report = json.loads((folder / "report.json").read_text(encoding="utf-8"))
    return report, (folder / "report.md").read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def imperial_markdown(tmp_path_factory: pytest.TempPathFactory) -> str:
    out = tmp_path_factory.mktemp("imperial")
    with pytest.MonkeyPatch.context() as mp:
        mp.chdir(ROOT)
        folder = run_size(out, "--units", "imperial", "--no-drawings")
    return (folder / "report.md").read_text(encoding="utf-8")


@pytest.fixture(autouse=True)
def _in_repository(monkeypatch: pytest.MonkeyPatch) -> None:
    """Run from the repository root, so the demo is named as a user would name it."""
    monkeypatch.chdir(ROOT)


# --- geomgen size -------------------------------------------------------------------------------


#: what `geomgen size` writes (the drawings and shop files need no CAD kernel)
SIZE_OUTPUTS = {
    "report.json",
    "report.md",
    "report.html",
    "three-view.svg",
    "three-view.png",
    "dxf",
}


def test_size_writes_reports_and_drawings(tmp_path: Path, capsys) -> None:
    folder = run_size(tmp_path / "out")
    assert {p.name for p in folder.iterdir()} >= SIZE_OUTPUTS
    captured = capsys.readouterr()
    assert captured.err == ""
    assert str(folder) in captured.out


def test_size_without_drawings_writes_the_reports_only(tmp_path: Path) -> None:
    folder = run_size(tmp_path / "out", "--no-drawings")
    assert sorted(p.name for p in folder.iterdir()) == ["report.json", "report.md"]


def test_report_json_carries_the_caution(si_reports) -> None:
    report, markdown = si_reports
    assert "not an airworthiness" in report["caution"]
    assert report["caution"] in markdown
    assert report["generator"]["version"] == geomgen.__version__


@pytest.mark.parametrize("surface", SURFACES)
def test_report_json_describes_every_surface(si_reports, surface: str) -> None:
    report, _ = si_reports
    entry = report["surfaces"][surface]
    missing = [k for k in SURFACE_KEYS if k not in entry]
    assert not missing, f"{surface} lacks {missing}"
    assert entry["area"]["unit"] == "m^2"
    assert entry["span"]["unit"] == "m"
    assert entry["aspect_ratio"]["unit"] == "1"
    # the planform closes on itself: AR = b^2 / S (fin: h^2 / S)
    b, s = entry["span"]["value"], entry["area"]["value"]
    assert entry["aspect_ratio"]["value"] == pytest.approx(b * b / s, rel=1e-12)


def _leaves(node: Any, path: str = ""):
    """(path, value) of every number that is not inside a {value, unit} pair."""
    if isinstance(node, dict):
        if "value" in node or "unit" in node:
            yield path, node
            return
        for key, child in node.items():
            yield from _leaves(child, f"{path}.{key}")
    elif isinstance(node, list):
        for i, child in enumerate(node):
            yield from _leaves(child, f"{path}[{i}]")
    elif isinstance(node, (int, float)) and not isinstance(node, bool):
        yield path, node


def _is_finite_number(x: Any) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


def test_every_quantity_in_report_json_has_value_and_unit(si_reports) -> None:
    report, _ = si_reports
    quantities = 0
    for path, leaf in _leaves(report):
        if isinstance(leaf, dict):
            quantities += 1
            assert set(leaf) == {"value", "unit"}, path
            assert isinstance(leaf["unit"], str) and leaf["unit"], path
            value = leaf["value"]
            values = value if isinstance(value, list) else [value]
            assert values and all(_is_finite_number(v) for v in values), path
        else:
            key = path.rsplit(".", 1)[-1]
            assert key in INDEX_KEYS and isinstance(leaf, int), f"bare number at {path}"
    assert quantities > 100


def _md_value(markdown: str, row: str, column: int = 1) -> tuple[float, str]:
    """Number and unit in a markdown table row whose first cell is ``row``."""
    for line in markdown.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if cells[0] == row:
            match = re.fullmatch(r"([-+0-9.eE]+) (\S+)", cells[column])
            assert match, f"{row}: {cells[column]!r}"
            return float(match[1]), match[2]
    raise AssertionError(f"no row {row!r} in report.md")


def test_imperial_report_uses_feet_and_pounds_force(imperial_markdown: str) -> None:
    md = imperial_markdown
    assert "Units: imperial" in md
    assert re.search(r"\| \d[\d.]* ft \|", md)
    assert re.search(r"\| \d[\d.]* ft\^2 \|", md)
    assert re.search(r"\| \d[\d.]* lbf \|", md)
    # no SI length, area or force unit is left in the tables
    assert not re.search(r"\d (m|m\^2|N)( |\||$)", md, re.MULTILINE)


@pytest.mark.parametrize(
    ("row", "column", "json_path", "unit", "factor"),
    [
        ("gross weight", 1, ("requirements", "gross_weight"), "lbf", 1 / LBF),
        ("area", 1, ("surfaces", "wing", "area"), "ft^2", 1 / FT**2),
        ("span (fin: height)", 1, ("surfaces", "wing", "span"), "ft", 1 / FT),
        ("root chord", 2, ("surfaces", "horizontal_tail", "root_chord"), "ft", 1 / FT),
    ],
)
def test_imperial_values_are_exact_conversions_of_si(
    si_reports, imperial_markdown, row, column, json_path, unit, factor
) -> None:
    report, _ = si_reports
    entry = report
    for key in json_path:
        entry = entry[key]
    shown, shown_unit = _md_value(imperial_markdown, row, column)
    assert shown_unit == unit
    expected = entry["value"] * factor
    # report.md shows 4 significant figures: half a unit in the 4th is at most 5e-4 relative
    assert shown == pytest.approx(expected, rel=5e-4)
    assert f"{shown:.4g}" == f"{expected:.4g}"


def test_size_runs_as_a_program(tmp_path: Path) -> None:
    result = subprocess.run(
        [sys.executable, "-m", "geomgen.cli", "size", str(DEMO), "--out", str(tmp_path)],
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert result.returncode == 0, result.stderr
    assert (tmp_path / "veyra-t2" / "report.json").is_file()
    bad = subprocess.run(
        [sys.executable, "-m", "geomgen.cli", "size", str(tmp_path / "none.yaml")],
        capture_output=True,
        text=True,
        timeout=60,
        cwd=tmp_path,
    )
    assert bad.returncode == 2
    assert bad.stderr.startswith("geomgen: error: ") and "Traceback" not in bad.stderr


def test_size_does_not_import_the_cad_kernel(tmp_path: Path) -> None:
    code = (
        "import sys; from geomgen.cli import main; "
        f"assert main(['size', {str(DEMO)!r}, '--out', {str(tmp_path)!r}]) == 0; "
        "assert 'cadquery' not in sys.modules and 'OCP' not in sys.modules, 'CAD imported'"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=60
    )
    assert result.returncode == 0, result.stderr


def test_size_without_drawings_imports_only_what_it_uses(tmp_path: Path) -> None:
    # the demo's units are all in the table of common units: pint is not needed; no drawing
    # is made: neither matplotlib, reportlab nor ezdxf
    code = (
        "import sys; from geomgen.cli import main; "
        f"assert main(['size', {str(DEMO)!r}, '--out', {str(tmp_path)!r}, '--no-drawings']) == 0; "
        "unused = [m for m in ('pint', 'matplotlib', 'reportlab', 'ezdxf', 'cadquery', 'trimesh') "
        "if m in sys.modules]; assert not unused, unused"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=60
    )
    assert result.returncode == 0, result.stderr


def test_rerun_replaces_outputs_and_leaves_no_temporary_folders(tmp_path: Path) -> None:
    out = tmp_path / "out"
    folder = run_size(out, "--no-drawings")
    stale = folder / "stale-from-an-older-run.txt"
    stale.write_text("old", encoding="utf-8")
    first = (folder / "report.json").read_text(encoding="utf-8")

    assert run_size(out, "--no-drawings") == folder

    assert not stale.exists()
    assert sorted(p.name for p in folder.iterdir()) == ["report.json", "report.md"]
    assert (folder / "report.json").read_text(encoding="utf-8") == first
    hidden = [p.name for p in out.iterdir() if p.name.startswith(".")]
    assert not hidden, f"temporary folders left behind: {hidden}"


# --- geomgen schema -----------------------------------------------------------------------------


@pytest.fixture(scope="module")
def schema() -> dict[str, Any]:
    buffer = io.StringIO()
    with contextlib.redirect_stdout(buffer):
        assert main(["schema"]) == 0
    return json.loads(buffer.getvalue())


def test_schema_is_a_valid_json_schema(schema) -> None:
    jsonschema.Draft202012Validator.check_schema(schema)
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_demo_validates_against_the_schema(schema) -> None:
    jsonschema.Draft202012Validator(schema).validate(demo_document())


def test_unknown_key_fails_the_schema(schema) -> None:
    doc = demo_document()
    doc["wing"]["aspect_ration"] = 7.8
    errors = list(jsonschema.Draft202012Validator(schema).iter_errors(doc))
    assert errors
    assert any("aspect_ration" in e.message for e in errors)


# --- geomgen --version --------------------------------------------------------------------------


def test_version(capsys) -> None:
    with pytest.raises(SystemExit) as exit_info:
        main(["--version"])
    assert exit_info.value.code == 0
    assert capsys.readouterr().out.strip() == f"geomgen {geomgen.__version__}"


def test_angles_in_report_json_are_radians(si_reports) -> None:
    # report.json is SI: the demo's "2.5 deg" dihedral is 2.5 x pi/180 rad (definition of the
    # degree); the human-readable report.md shows degrees.
    data = si_reports[0]
    dihedral = data["surfaces"]["wing"]["dihedral"]
    assert dihedral["unit"] == "rad"
    assert dihedral["value"] == pytest.approx(2.5 * math.pi / 180, rel=1e-12)
    assert "| dihedral | 2.50 deg |" in si_reports[1]
