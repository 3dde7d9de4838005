"""The three-view sheet read back from its SVG and checked against report.json.

Reference values are the demo's report.json, written by ``geomgen size``. The sheet's own
placement is never trusted: the data -> SVG transform of each view is fitted from the invisible
reference markers at the datum and 1 m along the view's two axes, and every other check goes
through that fitted transform (an independent path from the corner points to the paper).
"""

from __future__ import annotations

import json
import math
import re
import struct
import subprocess
import sys
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from pathlib import Path

import pytest
from designs import DEMO, demo_document, make_design

from geomgen import design
from geomgen.commands import pipeline
from geomgen.geometry.layout import Layout, corner_labels, lay_out
from geomgen.outputs.report import CAUTION
from geomgen.outputs.three_view import three_view
from geomgen.sizing.aircraft import size

SVG = "{http://www.w3.org/2000/svg}"
MM_PER_PT = 25.4 / 72  # 1 pt = 1/72 in (SVG/CSS unit definition), 1 in = 25.4 mm exactly
A3 = (420.0, 297.0)  # ISO 216 A3, mm (landscape)
FT = 0.3048  # international foot, m (exact by definition)
#: positions agree to 0.001 pt on paper (0.35 micrometre; 0.02 mm full size at 1:50): the
#: SVG writes coordinates with six decimals, so this is drawing precision, not a fudge
TOL_PT = 1e-3
PRINTED = 0.0005 + 1e-9  # the table and dimensions print three decimals


@dataclass(frozen=True)
class Sheet:
    svg: Path
    png: Path
    groups: dict[str, ET.Element]
    root: ET.Element


def read_sheet(svg: Path, png: Path) -> Sheet:
    parser = ET.XMLParser(target=ET.TreeBuilder(insert_comments=True))
    root = ET.parse(svg, parser).getroot()
    groups = {g.get("id"): g for g in root.iter(SVG + "g") if g.get("id")}
    return Sheet(svg, png, groups, root)


def text_of(group: ET.Element) -> str:
    """Text of a matplotlib text artist drawn as glyph outlines: it keeps each line as a comment."""
    lines = [c.text.strip() for c in group.iter() if c.tag is ET.Comment and c.text]
    return " ".join(lines)


def number(text: str) -> float:
    return float(text.replace("\u2212", "-"))


def marker(sheet: Sheet, gid: str) -> tuple[float, float]:
    use = next(sheet.groups[gid].iter(SVG + "use"))
    return float(use.get("x")), float(use.get("y"))


def flat(points) -> list[float]:
    return [c for p in points for c in p]


def path_points(sheet: Sheet, gid: str) -> list[tuple[float, float]]:
    d = next(sheet.groups[gid].iter(SVG + "path")).get("d")
    values = [float(v) for v in re.findall(r"-?\d+(?:\.\d+)?", d)]
    return list(zip(values[0::2], values[1::2], strict=True))


def fitted(sheet: Sheet, view: str, axes: str):
    """Affine map from two aircraft coordinates (named by ``axes``, e.g. "xy") to SVG points,
    fitted from the view's reference markers at the datum and 1 m along each axis."""
    o = marker(sheet, f"ref-origin-{view}")
    a = marker(sheet, f"ref-{axes[0]}1-{view}")
    b = marker(sheet, f"ref-{axes[1]}1-{view}")

    def to_svg(p: float, q: float) -> tuple[float, float]:
        return (
            o[0] + p * (a[0] - o[0]) + q * (b[0] - o[0]),
            o[1] + p * (a[1] - o[1]) + q * (b[1] - o[1]),
        )

    return to_svg


def scale_n(sheet: Sheet) -> int:
    match = re.match(r"1:(\d+) ", text_of(sheet.groups["title-scale"]))
    assert match, text_of(sheet.groups["title-scale"])
    return int(match[1])


def report_corners(report: dict) -> dict[str, tuple[float, float, float]]:
    """Corner keys mapped to report.json's corner points. Key convention (the docstring of
    layout.corner_labels): per surface side, the leading edge from root to tip, then the
    trailing edge from tip back to root; W/H/V for the surface, R/L for the side, from 1."""
    letters = {"wing": "W", "horizontal_tail": "H", "vertical_tail": "V"}
    sides = {"right": "R", "left": "L", "centre": ""}
    out = {}
    for key, surface in report["surfaces"].items():
        for side, panels in surface["corners"].items():
            pts = [panels[0]["le_inner"]] + [p["le_outer"] for p in panels]
            pts += [panels[-1]["te_outer"]] + [p["te_inner"] for p in reversed(panels)]
            for i, q in enumerate(pts, start=1):
                out[f"{letters[key]}{sides[side]}{i}"] = tuple(q["value"])
    return out


def _layout(d: design.Design) -> Layout:
    dirs = pipeline.airfoil_dirs(DEMO)
    return lay_out(size(d, dirs), dirs)


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    out = tmp_path_factory.mktemp("drawing")
    report = json.loads((pipeline.run_size(DEMO, out, "si") / "report.json").read_text())
    layout = _layout(design.load(DEMO))
    svg, png = out / "demo.svg", out / "demo.png"
    three_view(layout, svg, png, "si")
    return layout, report, read_sheet(svg, png)


@pytest.fixture(scope="module")
def imperial(tmp_path_factory):
    """The demo with another design date, drawn in imperial units."""
    doc = demo_document()
    doc["date"] = "2019-07-14"
    out = tmp_path_factory.mktemp("drawing-imperial")
    svg, png = out / "imperial.svg", out / "imperial.png"
    three_view(_layout(make_design(doc)), svg, png, "imperial")
    return read_sheet(svg, png)


def test_svg_and_png_are_written_at_a3(demo):
    _, _, sheet = demo
    png = sheet.png.read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG specification, 5.2)
    width, height = struct.unpack(">II", png[16:24])  # IHDR is the first chunk
    # ISO 216 A3 at the 150 dpi the sheet is rendered at (1 in = 25.4 mm); whole pixels
    assert abs(width - A3[0] / 25.4 * 150) < 1.0
    assert abs(height - A3[1] / 25.4 * 150) < 1.0
    assert len(png) > 50_000  # a sheet full of lines and text, not an empty page
    assert sheet.root.tag == SVG + "svg"
    assert float(sheet.root.get("width").removesuffix("pt")) * MM_PER_PT == pytest.approx(
        A3[0], abs=0.01
    )
    assert float(sheet.root.get("height").removesuffix("pt")) * MM_PER_PT == pytest.approx(
        A3[1], abs=0.01
    )
    assert sheet.svg.stat().st_size > 50_000


def test_report_keys_are_the_corner_labels(demo):
    layout, report, _ = demo
    # the convention used here to read report.json gives exactly the keys the layout labels
    assert set(report_corners(report)) == {c.key for c in corner_labels(layout)}
    assert len(report_corners(report)) == 24  # 2 x 6 wing, 2 x 4 stabilizer, 4 fin


def test_plan_corner_points_sit_where_report_puts_them(demo):
    _, report, sheet = demo
    to_svg = fitted(sheet, "plan", "xy")
    checked = 0
    for key, (x, y, _) in report_corners(report).items():
        if key.startswith("V"):
            continue  # the fin is labelled in the side view
        u, v = marker(sheet, f"corner-point-{key}")
        eu, ev = to_svg(x, y)
        assert u == pytest.approx(eu, abs=TOL_PT), key
        assert v == pytest.approx(ev, abs=TOL_PT), key
        checked += 1
    assert checked == 20


def test_fin_corner_points_sit_where_report_puts_them_in_the_side_view(demo):
    _, report, sheet = demo
    to_svg = fitted(sheet, "side", "xz")
    for key, (x, _, z) in report_corners(report).items():
        if key.startswith("V"):
            u, v = marker(sheet, f"corner-point-{key}")
            assert (u, v) == pytest.approx(to_svg(x, z), abs=TOL_PT), key


def test_views_point_the_way_the_title_block_says_at_the_printed_scale(demo):
    _, _, sheet = demo
    metre = 1000.0 / scale_n(sheet) / MM_PER_PT  # 1 m at 1:n, in points (definition of scale)
    o = {v: marker(sheet, f"ref-origin-{v}") for v in ("plan", "front", "side")}

    def step(view: str, axis: str) -> tuple[float, float]:
        p = marker(sheet, f"ref-{axis}1-{view}")
        return (p[0] - o[view][0], p[1] - o[view][1])

    # SVG y grows down the page. Plan: x aft down the page, y starboard to the right.
    assert step("plan", "x") == pytest.approx((0.0, metre), abs=TOL_PT)
    assert step("plan", "y") == pytest.approx((metre, 0.0), abs=TOL_PT)
    # Front, looking aft: starboard on the left, z up. Side, from port: x aft right, z up.
    assert step("front", "y") == pytest.approx((-metre, 0.0), abs=TOL_PT)
    assert step("front", "z") == pytest.approx((0.0, -metre), abs=TOL_PT)
    assert step("side", "x") == pytest.approx((metre, 0.0), abs=TOL_PT)
    assert step("side", "z") == pytest.approx((0.0, -metre), abs=TOL_PT)
    # plan and front share the page position of the plane of symmetry
    assert o["plan"][0] == pytest.approx(o["front"][0], abs=TOL_PT)
    assert "x aft down the page" in text_of(sheet.groups["title-views"])


def test_scale_bar_is_as_long_as_its_label_says(demo, imperial):
    for sheet, unit_m in ((demo[2], 1.0), (imperial, FT)):
        label = text_of(sheet.groups["scale-bar-label"])
        value, unit = label.split()
        assert unit == ("m" if unit_m == 1.0 else "ft")
        a, b = marker(sheet, "scale-bar-start"), marker(sheet, "scale-bar-end")
        length_mm = (b[0] - a[0]) * MM_PER_PT
        # the bar's length on paper is its value at the printed scale 1:n
        assert length_mm == pytest.approx(float(value) * unit_m * 1000 / scale_n(sheet), abs=1e-3)
        assert b[1] == pytest.approx(a[1], abs=TOL_PT)


def test_every_corner_key_is_a_label_next_to_its_point(demo):
    layout, _, sheet = demo
    keys = {c.key for c in corner_labels(layout)}
    labels = {
        gid.removeprefix("corner-")
        for gid in sheet.groups
        if gid.startswith("corner-") and not gid.startswith("corner-point-")
    }
    assert labels == keys
    points = {key: marker(sheet, f"corner-point-{key}") for key in keys}
    for key in keys:
        assert text_of(sheet.groups[f"corner-{key}"]) == key
        # the white box behind the key: its centre is nearer the key's own point than any
        # other corner point (a root point is shared by both sides), and within 6 mm of it
        # (the sheet sets keys 2.2 mm off their point; 6 mm allows for the width of the key)
        box = path_points(sheet, f"corner-{key}")[:4]
        centre = (sum(p[0] for p in box) / 4, sum(p[1] for p in box) / 4)
        distance = {k: math.dist(centre, p) for k, p in points.items()}
        assert distance[key] <= min(distance.values()) + TOL_PT, key
        assert distance[key] * MM_PER_PT < 6.0, key


def test_coordinate_table_prints_report_values(demo, imperial):
    _, report, sheet = demo
    corners = report_corners(report)
    assert re.match(r"CORNER POINTS +\(m,", text_of(sheet.groups["table-title"]))
    assert re.match(r"CORNER POINTS +\(ft,", text_of(imperial.groups["table-title"]))
    for key, point in corners.items():
        for axis, value in zip("xyz", point, strict=True):
            si = number(text_of(sheet.groups[f"table-{key}-{axis}"]))
            assert si == pytest.approx(value, abs=PRINTED), (key, axis)
            ft = number(text_of(imperial.groups[f"table-{key}-{axis}"]))
            assert ft == pytest.approx(value / FT, abs=PRINTED), (key, axis)


def test_hinge_lines_and_control_surfaces_follow_report(demo):
    _, report, sheet = demo
    views = {"plan": fitted(sheet, "plan", "xy"), "side": fitted(sheet, "side", "xz")}
    corners = report_corners(report)
    n = 0
    for key, surface in report["surfaces"].items():
        view, pick = ("side", (0, 2)) if key == "vertical_tail" else ("plan", (0, 1))
        to_svg = views[view]
        for name, hinge in surface["hinge_lines"].items():
            ends = [hinge["points"][0]["point"]["value"], hinge["points"][-1]["point"]["value"]]
            expected = [to_svg(p[pick[0]], p[pick[1]]) for p in ends]
            drawn = path_points(sheet, f"hinge-{name}")
            assert flat(drawn) == pytest.approx(flat(expected), abs=TOL_PT), name
            # the shaded polygon runs along the hinge points, then back along the trailing edge
            polygon = path_points(sheet, f"control-{name}")
            hinge_pts = [
                to_svg(h["point"]["value"][pick[0]], h["point"]["value"][pick[1]])
                for h in hinge["points"]
            ]
            k = len(hinge_pts)
            assert flat(polygon[:k]) == pytest.approx(flat(hinge_pts), abs=TOL_PT), name
            trailing = [corners[c] for c in _trailing_edge_keys(key, hinge["side"], corners)]
            te = [to_svg(p[pick[0]], p[pick[1]]) for p in trailing]
            for q in polygon[k : 2 * k]:
                # on the trailing edge between corner points, within 1 mm full size (twist
                # bends the trailing edge's path slightly off the straight line between them)
                gap = min(_distance_to_segment(q, a, b) for a, b in zip(te, te[1:], strict=False))
                assert gap * MM_PER_PT * scale_n(sheet) < 1.0, name
            n += 1
    assert n == 7  # flap and aileron on both sides, elevator on both sides, rudder


def _trailing_edge_keys(surface: str, side: str, corners: dict) -> list[str]:
    prefix = {"wing": "W", "horizontal_tail": "H", "vertical_tail": "V"}[surface]
    prefix += {"right": "R", "left": "L", "centre": ""}[side]
    keys = sorted(
        (k for k in corners if re.fullmatch(prefix + r"\d+", k)),
        key=lambda k: int(k[len(prefix) :]),
    )
    return keys[len(keys) // 2 :]  # the second half of the outline is the trailing edge


def _distance_to_segment(p, a, b) -> float:
    (px, py), (ax, ay), (bx, by) = p, a, b
    dx, dy = bx - ax, by - ay
    t = max(0.0, min(1.0, ((px - ax) * dx + (py - ay) * dy) / (dx * dx + dy * dy)))
    return ((px - ax - t * dx) ** 2 + (py - ay - t * dy) ** 2) ** 0.5


def test_mgc_quarter_chord_points_are_marked_where_report_puts_them(demo):
    _, report, sheet = demo
    plan, side = fitted(sheet, "plan", "xy"), fitted(sheet, "side", "xz")
    for key in ("wing", "horizontal_tail"):
        x, y, z = report["surfaces"][key]["mgc"]["quarter_chord_point"]["value"]
        assert marker(sheet, f"mgc-c4-{key}-right") == pytest.approx(plan(x, y), abs=TOL_PT)
        assert marker(sheet, f"mgc-c4-{key}-left") == pytest.approx(plan(x, -y), abs=TOL_PT)
        assert marker(sheet, f"mgc-c4-{key}-side") == pytest.approx(side(x, z), abs=TOL_PT)
    x, _, z = report["surfaces"]["vertical_tail"]["mgc"]["quarter_chord_point"]["value"]
    assert marker(sheet, "mgc-c4-vertical_tail-side") == pytest.approx(side(x, z), abs=TOL_PT)
    length = report["surfaces"]["wing"]["mgc"]["length"]["value"]
    text = text_of(sheet.groups["mgc-wing-length"])
    assert number(re.search(r"MGC ([\d.]+) m", text)[1]) == pytest.approx(length, abs=PRINTED)


def test_tail_arm_and_apex_dimensions_match_report(demo):
    _, report, sheet = demo
    side = fitted(sheet, "side", "xz")
    wing_c4 = report["tails"]["wing_mgc_quarter_chord"]["value"]
    wing_apex = report["surfaces"]["wing"]["apex"]["value"]
    for key, word in (("horizontal_tail", "stabilizer"), ("vertical_tail", "fin")):
        tail = report["tails"][key]
        # tail arm: a dimension line from the wing's MGC c/4 to the tail's, both in x
        ends = path_points(sheet, f"dim-tail-arm-{key}")
        tail_c4 = report["surfaces"][key]["mgc"]["quarter_chord_point"]["value"]
        assert ends[0][0] == pytest.approx(side(wing_c4[0], 0.0)[0], abs=TOL_PT)
        assert ends[1][0] == pytest.approx(side(tail_c4[0], 0.0)[0], abs=TOL_PT)
        text = text_of(sheet.groups[f"dim-tail-arm-{key}-value"])
        value = number(re.fullmatch(word + r" tail arm ([\d.]+) m", text)[1])
        assert value == pytest.approx(tail["tail_arm"]["value"], abs=PRINTED)
        # apex to apex: dimension line between the apexes in x, values dx, dz, straight line
        ends = path_points(sheet, f"dim-apex-{key}")
        apex = report["surfaces"][key]["apex"]["value"]
        assert ends[0][0] == pytest.approx(side(wing_apex[0], 0.0)[0], abs=TOL_PT)
        assert ends[1][0] == pytest.approx(side(apex[0], 0.0)[0], abs=TOL_PT)
        text = text_of(sheet.groups[f"dim-apex-{key}-value"])
        found = re.findall(r"(\u2212?[\d.]+) m", text)
        expected = tail["apex_to_wing_apex"]
        for got, name in zip(found, ("dx", "dz", "distance"), strict=True):
            assert number(got) == pytest.approx(expected[name]["value"], abs=PRINTED), name


def test_title_block_carries_design_date_units_and_caution(demo, imperial):
    _, report, sheet = demo
    assert text_of(sheet.groups["title-date"]) == report["design"]["date"] == "2026-12-01"
    assert text_of(imperial.groups["title-date"]) == "2019-07-14"  # from the file, not a clock
    assert text_of(sheet.groups["title-design"]) == report["design"]["title"]
    assert "lengths in m" in text_of(sheet.groups["title-units"])
    assert "lengths in ft" in text_of(imperial.groups["title-units"])
    caution = text_of(sheet.groups["title-caution"])
    assert caution == CAUTION  # kept whole, only wrapped
    assert "not an airworthiness" in caution


def test_two_runs_give_identical_files(demo, tmp_path):
    layout, _, sheet = demo
    svg, png = tmp_path / "again.svg", tmp_path / "again.png"
    three_view(layout, svg, png, "si")
    assert svg.read_bytes() == sheet.svg.read_bytes()
    assert png.read_bytes() == sheet.png.read_bytes()


def test_unknown_unit_system_is_refused(tmp_path):
    with pytest.raises(ValueError, match="units"):
        three_view(None, tmp_path / "a.svg", tmp_path / "a.png", "metric")  # type: ignore[arg-type]
    assert not list(tmp_path.iterdir())


def test_importing_the_module_does_not_import_matplotlib():
    code = "import sys, geomgen.outputs.three_view; print('matplotlib' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
