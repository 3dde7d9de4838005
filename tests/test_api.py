"""The public API (geomgen.load, Design.replace, size, layout): the same designs, numbers and
refusals as the design files and the CLI."""

from __future__ import annotations

import contextlib
import io
import json
import math
import subprocess
import sys
from pathlib import Path

import pytest
import yaml
from designs import DEMO, demo_document

import geomgen
from geomgen.cli import main
from geomgen.errors import InputError

#: 1 kn = 1852 m per hour, exactly (the international knot's definition)
KNOT = 1852.0 / 3600.0


def _cli(argv: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def demo() -> geomgen.Design:
    return geomgen.load(DEMO)


def test_import_geomgen_gives_the_api_and_stays_light() -> None:
    code = (
        "import sys, geomgen; assert 'geomgen.api' not in sys.modules; "
        "d = geomgen.load(sys.argv[1]); d.replace('wing.aspect_ratio', 8.2).size(); "
        "heavy = [m for m in ('cadquery', 'OCP', 'trimesh', 'matplotlib') if m in sys.modules]; "
        "assert not heavy, heavy"
    )
    result = subprocess.run(
        [sys.executable, "-c", code, str(DEMO)], capture_output=True, text=True, timeout=60
    )
    assert result.returncode == 0, result.stderr
    assert set(geomgen.api.__all__) <= set(dir(geomgen))


def test_a_path_text_and_mapping_give_the_same_sizing(demo) -> None:
    from_text = geomgen.load(DEMO.read_text(encoding="utf-8"), base=DEMO.parent)
    from_dict = geomgen.load(demo_document(), base=DEMO.parent)
    a = demo.size().quantities()
    for other in (from_text, from_dict):
        b = other.size().quantities()
        # everything but the design's source equal
        assert {k: v for k, v in a.items() if k != "design.source"} == {
            k: v for k, v in b.items() if k != "design.source"
        }


def test_the_sizing_is_the_cli_report(demo, tmp_path: Path) -> None:
    code, _, err = _cli(["size", str(DEMO), "--out", str(tmp_path), "--no-drawings"])
    assert code == 0, err
    written = json.loads((tmp_path / "veyra-t2" / "report.json").read_text(encoding="utf-8"))
    assert demo.size().report == written


def test_replace_resizes_by_the_lift_equation(demo) -> None:
    # W = 1/2 rho V^2 S CL_max: at the same weight and density S goes as 1 / V^2
    base = demo.size()["surfaces.wing.area"]
    faster = demo.replace("requirements.stall_speed", "46 kn").size()["surfaces.wing.area"]
    assert base.unit == faster.unit == "m^2"
    assert faster.value == pytest.approx(base.value * (45 / 46) ** 2, rel=1e-12)
    # the same speed in m/s by the knot's definition gives the same wing
    in_si = demo.replace("requirements.stall_speed", f"{46 * KNOT!r} m/s").size()
    assert in_si["surfaces.wing.area"].value == pytest.approx(faster.value, rel=1e-12)


def test_replace_takes_plain_numbers_and_number_text(demo) -> None:
    a = demo.replace("wing.aspect_ratio", 8.2).size()
    b = demo.replace("wing.aspect_ratio", "8.2").size()
    assert a.report == b.report
    # AR = b^2 / S (the aspect ratio's definition)
    span, area = a["surfaces.wing.span"].value, a["surfaces.wing.area"].value
    assert span**2 / area == pytest.approx(8.2, rel=1e-12)
    assert demo.size()["surfaces.wing.aspect_ratio"].value == pytest.approx(7.8)
    assert demo.replace("wing.panels[1].chord_ratio", 0.55).spec.wing.panels[1].chord_ratio == 0.55


@pytest.mark.parametrize(
    "key, value",
    [
        ("wing.aspect_ratio", "-3"),
        ("wing.aspect_ratio", "eight"),
        ("requirements.stall_speed", "46 m"),
        ("wing.aspect_ratiox", 8),
        ("horizontal_tail.tail_arm", "somewhere"),
        ("wing.panels[0].span_fraction", 1.2),
    ],
)
def test_replace_refuses_like_a_design_file(demo, tmp_path: Path, key, value) -> None:
    """The same one-line message as the CLI gives for a file holding that value."""
    doc = demo_document()
    node = doc
    steps = key.replace("[", ".").replace("]", "").split(".")
    for s in steps[:-1]:
        node = node[int(s)] if s.isdigit() else node[s]
    node[steps[-1]] = yaml.safe_load(value) if isinstance(value, str) else value
    bad = tmp_path / DEMO.name
    bad.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    code, _, err = _cli(["size", str(bad), "--out", str(tmp_path / "out")])
    assert code == 2
    with pytest.raises(InputError) as refused:
        geomgen.load(DEMO).replace(key, value)
    # the message names the design's file; the CLI's names the copy
    assert err.strip() == f"geomgen: error: {refused.value}".replace(str(DEMO), str(bad))


def test_replace_refuses_a_missing_list_item_and_a_bad_key_path(demo) -> None:
    with pytest.raises(InputError, match=r"wing\.panels\[5\]\.twist: has no item \[5\]"):
        demo.replace("wing.panels[5].twist", "1 deg")
    with pytest.raises(InputError, match="is not a key path"):
        demo.replace("wing..aspect_ratio", 8)


def test_replace_leaves_the_design_as_it_was(demo) -> None:
    demo.replace("wing.aspect_ratio", 9.0)
    assert demo.spec.wing.aspect_ratio == 7.8
    assert demo.to_dict()["wing"]["aspect_ratio"] == 7.8


def test_the_layout_corners_hold_the_wing_area(demo) -> None:
    """Each panel is a trapezoid: area = (inner chord + outer chord) / 2 x its projected span
    (the trapezoid formula; chords are the corner distances, which incidence and twist keep;
    spanwise positions are projected in plan view, DEVELOPERS.md)."""
    sizing = demo.size()
    total = 0.0
    for c in sizing.layout().corners:
        if c.surface == "wing":
            chords = math.dist(c.le_inner, c.te_inner) + math.dist(c.le_outer, c.te_outer)
            total += chords / 2 * abs(c.le_outer[1] - c.le_inner[1])
    assert total == pytest.approx(sizing["surfaces.wing.area"].value, rel=1e-9)


def test_the_layout_hinge_lines_are_the_reports(demo) -> None:
    sizing = demo.size()
    layout = sizing.layout()
    names = {h.name for h in layout.hinge_lines}
    assert {"aileron-right", "aileron-left", "flap-right", "elevator-left", "rudder"} <= names
    aileron = next(h for h in layout.hinge_lines if h.name == "aileron-right")
    # the demo's straight aileron hinge: chord fractions 0.75 inboard, 0.72 outboard
    assert aileron.chord_fractions[0] == pytest.approx(0.75)
    assert aileron.chord_fractions[-1] == pytest.approx(0.72)
    assert math.dist(aileron.points[0], aileron.points[-1]) > 1.0
    assert set(layout.part_names) >= names | {"fuselage", "wing-right"}


def test_a_design_changed_in_code_is_written_as_a_design_file(demo, tmp_path: Path) -> None:
    """What a build or a writer runs on: the changed design as a file beside the outputs,
    which sizes as the design in memory does."""
    changed = demo.replace("wing.aspect_ratio", 8.2)
    written = changed._file_in(tmp_path)
    assert written == tmp_path / "veyra-t2.design.yaml"
    assert geomgen.load(written).size().quantities() == changed.size().quantities()
    assert demo._file_in(tmp_path) == DEMO  # an unchanged file design runs on its own file


def test_a_design_and_a_sizing_show_themselves_in_a_notebook(demo) -> None:
    from html.parser import HTMLParser

    class Cells(HTMLParser):
        def __init__(self) -> None:
            super().__init__()
            self.text: list[str] = []
            self.tags: list[str] = []

        def handle_starttag(self, tag, attrs) -> None:
            self.tags.append(tag)

        def handle_data(self, data) -> None:
            self.text.append(data)

    shown = Cells()
    shown.feed(demo._repr_html_())
    assert "requirements.stall_speed" in shown.text and "45 kn" in shown.text  # the file's words
    sizing = demo.size()
    page = Cells()
    page.feed(sizing._repr_html_())
    assert "svg" in page.tags  # the three-view
    area = sizing["surfaces.wing.area"]
    assert f"{area.value:.6g} m^2" in page.text


def test_the_command_entry_points_give_what_the_commands_print(demo, tmp_path: Path) -> None:
    # the CLI is a thin layer over the API (issue 21): the API's schema and diff are what the
    # commands print. A higher aspect ratio leaves the wing area alone (the lift equation
    # S = 2 W / (rho V^2 CL_max) holds no aspect ratio) and changes the span (b^2 = AR S)
    code, printed, _ = _cli(["schema"])
    assert code == 0 and json.loads(printed) == geomgen.schema()
    wider = demo.replace("wing.aspect_ratio", 9.0)
    old, new = tmp_path / "old.yaml", tmp_path / "new.yaml"
    old.write_text(demo.to_yaml(), encoding="utf-8")
    new.write_text(wider.to_yaml(), encoding="utf-8")
    result = geomgen.diff_files(old, new)
    assert result["equal"] is False
    changed = {q["key"] for q in result["quantities"]}
    assert "surfaces.wing.span" in changed and "surfaces.wing.area" not in changed
    for form in ("md", "json"):
        code, printed, _ = _cli(["diff", str(old), str(new), "--format", form])
        assert code == 1 and printed == geomgen.diff_text(result, str(old), str(new), form)
    with pytest.raises(InputError, match="--format"):
        geomgen.diff_text(result, form="csv")


@pytest.mark.parametrize("span", ["10 mm", "7 m", 0.01, "wide"])
def test_model_file_refuses_a_span_like_the_command(span, tmp_path: Path) -> None:
    # the model's span is 50 mm to 5 m tip to tip (geomgen model --help)
    with pytest.raises(InputError) as err:
        geomgen.model_file(DEMO, tmp_path, span=span)
    assert err.value.path == "--span"
    assert not any(tmp_path.iterdir())  # nothing written
