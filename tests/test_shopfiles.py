"""DXF shop drawings read back with ezdxf: units, audit, layers, and areas and positions
measured on the drawn entities against report.json, the design file and plane geometry; the
fuselage in the plan view and its former templates against the closed forms of the design
file's body."""

from __future__ import annotations

import json
import math
import re
from itertools import combinations

import ezdxf
import numpy as np
import pytest
from designs import DEMO, demo_document, make_design, with_body
from ezdxf import bbox

from geomgen.commands.pipeline import airfoil_dirs, run_size
from geomgen.geometry.layout import lay_out
from geomgen.outputs import dxf as shopfiles
from geomgen.shapes.fuselage import expand
from geomgen.sizing.aircraft import size

PLAN_LAYERS = {"outline", "hinge-line", "mgc", "dimensions", "labels"}
SURFACE_WORDS = {"wing", "stabilizer", "fin"}

#: A parametric fuselage of our own (design file keys, invented figures): an elliptic body
#: whose nose tip stands 200 mm ahead of the origin of x.
BODY = {
    "nose_x": "-0.2 m",
    "length": "5.8 m",
    "max_width": "0.8 m",
    "max_height": "1.0 m",
    "nose_length": "1.2 m",
    "tail_cone_length": "3.0 m",
    "tail_end_radius": "0.08 m",
    "centre_z": "0.55 m",
    "shape": "ellipse",
}


def body_half_sizes(x_mm: float) -> tuple[float, float]:
    """Half width and half height (mm) of BODY at station x, from the parametric form as the
    design file defines it: a half-ellipse profile over the nose (a0 sqrt(1 - u^2), u = 1 at
    the tip), the largest section, then straight down to the tail-end radius."""
    a0, b0, end = 400.0, 500.0, 80.0
    v = x_mm + 200.0  # from the nose tip
    if v >= 5800.0 - 3000.0:
        t = (v - 2800.0) / 3000.0
        return a0 + (end - a0) * t, b0 + (end - b0) * t
    if v < 1200.0:
        f = math.sqrt(max(0.0, 1.0 - (1.0 - v / 1200.0) ** 2))
        return a0 * f, b0 * f
    return a0, b0


def shoelace(points) -> float:
    """Area of a simple polygon from its vertices (Gauss's area formula)."""
    p = np.asarray(points, dtype=float)
    x, y = p[:, 0], p[:, 1]
    return 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def closed_outlines(doc, layer: str) -> list[np.ndarray]:
    return [
        np.array([v[:2] for v in e.get_points()])
        for e in doc.modelspace().query(f'LWPOLYLINE[layer=="{layer}"]')
        if e.closed
    ]


@pytest.fixture(scope="module")
def drawn(tmp_path_factory):
    """The demo's report.json (from ``geomgen size``) and its three kinds of DXF."""
    out = tmp_path_factory.mktemp("shop")
    report = json.loads((run_size(DEMO, out, None) / "report.json").read_text())
    dirs = airfoil_dirs(DEMO)
    layout = lay_out(size(make_design(demo_document()), dirs), dirs)
    plan = shopfiles.write_plan_dxf(layout, out / "plan.dxf")
    planforms = shopfiles.write_planform_dxfs(layout, out / "planforms")
    tpl = shopfiles.write_template_dxf(layout, out / "templates.dxf", dirs)
    return {
        "report": report,
        "layout": layout,
        "plan": ezdxf.readfile(plan),
        "planforms": {p.name: ezdxf.readfile(p) for p in planforms},
        "templates": ezdxf.readfile(tpl),
    }


@pytest.fixture(scope="module")
def bodied(tmp_path_factory):
    """The demo with BODY: its plan view and template DXF, and the design."""
    out = tmp_path_factory.mktemp("body")
    design = make_design(with_body(demo_document(), BODY))
    layout = lay_out(size(design))
    return {
        "design": design,
        "plan": ezdxf.readfile(shopfiles.write_plan_dxf(layout, out / "plan.dxf")),
        "templates": ezdxf.readfile(shopfiles.write_template_dxf(layout, out / "t.dxf")),
    }


@pytest.fixture(scope="module")
def bare(tmp_path_factory):
    """The demo without a fuselage: its plan view and template DXF."""
    out = tmp_path_factory.mktemp("bare")
    layout = lay_out(size(make_design(with_body(demo_document(), None))))
    return {
        "plan": ezdxf.readfile(shopfiles.write_plan_dxf(layout, out / "plan.dxf")),
        "templates": ezdxf.readfile(shopfiles.write_template_dxf(layout, out / "t.dxf")),
    }


def all_docs(drawn):
    return [drawn["plan"], drawn["templates"], *drawn["planforms"].values()]


def test_every_dxf_is_in_millimetres_and_passes_the_audit(drawn):
    for doc in all_docs(drawn):
        # DXF reference, header variable $INSUNITS: 4 = millimetres
        assert doc.header["$INSUNITS"] == 4
        auditor = doc.audit()
        assert not auditor.has_errors, [e.message for e in auditor.errors]


def test_plan_and_planforms_have_their_layers(drawn):
    assert set(drawn["planforms"]) == {
        "wing-planform.dxf",
        "stabilizer-planform.dxf",
        "fin-planform.dxf",
    }
    for doc in [drawn["plan"], *drawn["planforms"].values()]:
        names = {layer.dxf.name for layer in doc.layers}
        assert names >= PLAN_LAYERS
        for layer in PLAN_LAYERS - {"hinge-line"}:
            assert len(doc.modelspace().query(f'*[layer=="{layer}"]')) > 0, layer


def _report_plan_area(surface: dict) -> float:
    """Plan area (mm^2) of report.json's corner points, x and y, panel by panel, both sides."""
    total = 0.0
    for panels in surface["corners"].values():
        for c in panels:
            quad = [c[k]["value"][:2] for k in ("le_inner", "te_inner", "te_outer", "le_outer")]
            total += shoelace(quad)
    return total * 1e6


def test_plan_outlines_enclose_the_sized_areas(drawn):
    report = drawn["report"]["surfaces"]
    areas = sorted(shoelace(p) for p in closed_outlines(drawn["plan"], "outline"))
    fin, tail, wing = areas  # the fin's plan projection is a line
    assert fin == pytest.approx(0.0, abs=1.0)
    for drawn_area, key in ((wing, "wing"), (tail, "horizontal_tail")):
        # the shoelace of report.json's own corner points ...
        assert drawn_area == pytest.approx(_report_plan_area(report[key]), rel=1e-9)
        # ... and the sized area: incidence and twist shorten plan chords by cos(angle), at
        # most 1 - cos(2 deg) = 0.06 % here (demo design file)
        assert drawn_area == pytest.approx(report[key]["area"]["value"] * 1e6, rel=1e-3)


def test_plan_dimensions_give_the_tail_arms_and_the_span(drawn):
    report = drawn["report"]
    doc = drawn["plan"]
    dims = doc.modelspace().query('DIMENSION[layer=="dimensions"]')
    measured = {d.dxf.text.replace(" <>", ""): d.get_measurement() for d in dims}
    # what a reader sees: the number written in each dimension's rendered block
    shown = {}
    for d in dims:
        (text,) = [e.text for e in doc.blocks.get(d.dxf.geometry) if e.dxftype() == "MTEXT"]
        shown[d.dxf.text.replace(" <>", "")] = float(text.split()[-1])
    tails = report["tails"]
    # tail arms: x distance between the MGC quarter-chord points (report.json definition)
    for key, words in (("horizontal_tail", "horizontal"), ("vertical_tail", "vertical")):
        arm = tails[key]["tail_arm"]["value"] * 1000
        assert measured[f"{words} tail arm"] == pytest.approx(arm, abs=0.05)
        assert shown[f"{words} tail arm"] == pytest.approx(arm, abs=0.05)
    span = report["surfaces"]["wing"]["span"]["value"] * 1000
    assert measured["<>"] == pytest.approx(span, abs=0.05)
    assert shown["<>"] == pytest.approx(span, abs=0.05)


def test_planform_outlines_enclose_the_sized_areas(drawn):
    report = drawn["report"]["surfaces"]
    for name, key, halves in (
        ("wing-planform.dxf", "wing", 2),
        ("stabilizer-planform.dxf", "horizontal_tail", 2),
        ("fin-planform.dxf", "vertical_tail", 1),
    ):
        (outline,) = closed_outlines(drawn["planforms"][name], "outline")
        area = report[key]["area"]["value"] * 1e6 / halves
        assert shoelace(outline) == pytest.approx(area, rel=1e-3)
        # root chord and span read off the outline (report.json)
        root = outline[np.isclose(outline[:, 1], outline[:, 1].min())]
        assert np.ptp(root[:, 0]) == pytest.approx(report[key]["root_chord"]["value"] * 1000)
        assert np.ptp(outline[:, 1]) == pytest.approx(report[key]["semi_span"]["value"] * 1000)


def test_common_elevator_hinge_is_square_to_the_plane_of_symmetry(drawn):
    # design file: common_hinge: true puts both elevator halves on one line perpendicular to
    # the plane of symmetry: one x along the whole hinge line in plan
    doc = drawn["planforms"]["stabilizer-planform.dxf"]
    (hinge,) = doc.modelspace().query('LWPOLYLINE[layer=="hinge-line"]')
    xs = [v[0] for v in hinge.get_points()]
    assert np.ptp(xs) == pytest.approx(0.0, abs=1e-6)


# --- templates -----------------------------------------------------------------------------------


def expected_template_layers(report: dict, spacing: float) -> set[str]:
    """Template names from report.json's stations and the design file's 600 mm spacing."""
    names = set()
    for key, word, axis in (
        ("wing", "wing", "y"),
        ("horizontal_tail", "stabilizer", "y"),
        ("vertical_tail", "fin", "h"),
    ):
        stations = [st["span_position"]["value"] for st in report["surfaces"][key]["stations"]]
        spaced = np.arange(spacing, stations[-1], spacing)
        for s in [*stations, *spaced]:
            names.add(f"{word}-{axis}{round(s * 1000):04d}")
    return names


def template_entities(doc, layer: str):
    msp = doc.modelspace()
    lines = [(e.dxf.start.vec2, e.dxf.end.vec2) for e in msp.query(f'LINE[layer=="{layer}"]')]
    texts = {e.dxf.text: e.dxf.insert.vec2 for e in msp.query(f'TEXT[layer=="{layer}"]')}
    outline = max(closed_outlines(doc, layer), key=shoelace)  # the other: the hinge-axis ring
    return lines, texts, outline


def mark_near(lines, at) -> float:
    """x of the vertical line with an end nearest to a text's insertion point."""
    vertical = [(a, b) for a, b in lines if abs(a[0] - b[0]) < 1e-9]
    a, _ = min(
        vertical,
        key=lambda ab: min(math.dist(ab[0], at), math.dist(ab[1], at)),
    )
    return a[0]


def text_starting(texts: dict, prefix: str):
    (key,) = [k for k in texts if k.startswith(prefix)]
    return texts[key]


def test_template_layers_and_chords(drawn):
    doc = drawn["templates"]
    report = drawn["report"]
    names = {layer.dxf.name for layer in doc.layers}
    # demo design file: drawings.template_spacing: 600 mm
    expected = expected_template_layers(report, 0.6)
    assert names >= expected
    assert len(expected) == 19
    wing = report["surfaces"]["wing"]
    root_chord = wing["root_chord"]["value"] * 1000
    lines, texts, outline = template_entities(doc, "wing-y0000")
    chord = mark_near(lines, texts["TE"]) - mark_near(lines, texts["LE"])
    assert chord == pytest.approx(root_chord, abs=0.5)  # report.json root chord
    # NACA 2415 at the root (design file): section area 0.68508 t c^2, the NACA Report 460
    # thickness distribution integrated in closed form (camber moves area, it adds none);
    # the minimum TE thickness adds less than 0.1 %
    assert shoelace(outline) == pytest.approx(0.68508 * 0.15 * root_chord**2, rel=2e-3)


def test_template_hinge_and_spar_marks(drawn):
    doc = drawn["templates"]
    report = drawn["report"]
    layers = {layer.dxf.name for layer in doc.layers}
    # flap: constant-fraction hinge at 0.74 from 550 mm to the break (demo design file);
    # spar at 0.28 on every wing template (design file)
    flap_stations = ["wing-y0600", "wing-y1200", "wing-y1800"]
    for name in [n for n in layers if n.startswith("wing-")]:
        lines, texts, _ = template_entities(doc, name)
        le, te = mark_near(lines, texts["LE"]), mark_near(lines, texts["TE"])
        spar = mark_near(lines, text_starting(texts, "spar"))
        assert (spar - le) / (te - le) == pytest.approx(0.28, abs=1e-6)
        if name in flap_stations:
            hinge = mark_near(lines, text_starting(texts, "hinge"))
            assert (hinge - le) / (te - le) == pytest.approx(0.74, abs=1e-6)
        if name == "wing-y0000":  # the flap starts outboard of the root
            assert not [t for t in texts if t.startswith("hinge")]
    # elevator: one common hinge square to the plane of symmetry (design file), so the hinge
    # mark's x plus the local LE x (linear between report.json's root and tip stations of the
    # trapezoidal tail) is the same on every template it crosses
    ht = report["surfaces"]["horizontal_tail"]
    (root, tip) = ht["stations"]
    xs = []
    for s_mm in (0, 600, 1200):
        lines, texts, _ = template_entities(doc, f"stabilizer-y{s_mm:04d}")
        if not [t for t in texts if t.startswith("hinge")]:
            continue  # the elevator may start outboard of the root
        le = mark_near(lines, texts["LE"])
        hinge = mark_near(lines, text_starting(texts, "hinge"))
        t = s_mm / 1000 / tip["span_position"]["value"]
        x_le = (1 - t) * root["leading_edge_x"]["value"] + t * tip["leading_edge_x"]["value"]
        xs.append(x_le * 1000 + hinge - le)
    assert len(xs) >= 2
    assert np.ptp(xs) == pytest.approx(0.0, abs=0.01)


def _apart(ba, bb) -> bool:
    return (
        ba.extmax.x < bb.extmin.x
        or bb.extmax.x < ba.extmin.x
        or ba.extmax.y < bb.extmin.y
        or bb.extmax.y < ba.extmin.y
    )


@pytest.mark.parametrize("which", ["drawn", "bodied"])
def test_templates_do_not_overlap(which, request):
    """Section and former templates stand apart, and clear of every title and caution line."""
    doc = request.getfixturevalue(which)["templates"]
    msp = doc.modelspace()
    words = SURFACE_WORDS | {"former"}
    names = [n.dxf.name for n in doc.layers if n.dxf.name.split("-")[0] in words]
    if which == "bodied":
        assert [n for n in names if n.startswith("former-")]
    boxes = {n: bbox.extents(msp.query(f'*[layer=="{n}"]'), fast=True) for n in names}
    for a, b in combinations(names, 2):
        assert _apart(boxes[a], boxes[b]), (a, b)
    texts = msp.query('TEXT[layer=="labels"]')
    assert len(texts) > 3
    for text in texts:
        box = bbox.extents([text], fast=True)
        for name in names:
            assert _apart(box, boxes[name]), (text.dxf.text, name)


# --- fuselage ------------------------------------------------------------------------------------


def test_fuselage_drawings_are_in_millimetres_and_pass_the_audit(bodied, bare):
    for doc in (bodied["plan"], bodied["templates"], bare["plan"], bare["templates"]):
        # DXF reference, header variable $INSUNITS: 4 = millimetres
        assert doc.header["$INSUNITS"] == 4
        auditor = doc.audit()
        assert not auditor.has_errors, [e.message for e in auditor.errors]


def test_plan_view_draws_the_fuselage_seen_from_above(bodied):
    doc = bodied["plan"]
    assert "fuselage" in {layer.dxf.name for layer in doc.layers}
    (outline,) = closed_outlines(doc, "fuselage")
    x, y = outline[:, 0], outline[:, 1]
    # nose tip at nose_x, tail end a length further aft (design file: -0.2 m, 5.8 m)
    assert (x.min(), x.max()) == pytest.approx((-200.0, 5600.0), abs=1e-6)
    # both sides: mirror images about the plane of symmetry
    assert np.sort(y) == pytest.approx(np.sort(-y), abs=1e-6)
    # as wide as max_width; the spline between the stations bulges by less than 0.3 %
    assert 400.0 - 1e-6 <= y.max() <= 400.0 * 1.003
    # the tail end: 2 x tail_end_radius wide (design file)
    assert np.ptp(y[np.isclose(x, 5600.0)]) == pytest.approx(160.0, abs=1e-6)
    # plan area from the design file's profile by plane geometry: a half ellipse of semi-axes
    # nose_length and max_width / 2 (pi a b / 2), the rectangle of the largest section, the
    # trapezoid of the tail cone. The drawn half widths follow the spline the solid is lofted
    # along, which leaves the exact nose profile most near the tip (vertical tangent there):
    # 0.04 % in area measured.
    a0, nose, cone, end = 400.0, 1200.0, 3000.0, 80.0
    area = math.pi * a0 * nose / 2 + 2 * a0 * (5800.0 - nose - cone) + (a0 + end) * cone
    assert shoelace(outline) == pytest.approx(area, rel=1e-3)


SIZE = r"(\d+\.\d) mm wide x (\d+\.\d) mm high"


def test_former_templates_are_the_body_sections(bodied):
    doc = bodied["templates"]
    msp = doc.modelspace()
    formers = sorted(n.dxf.name for n in doc.layers if n.dxf.name.startswith("former-"))
    # a former at the stations a builder needs: every station that is not a point has one,
    # or lies within 2 % of the body length of one, or has the same section as the one
    # before (then listed on it); formers stand at least 2 % of the length apart, but for the
    # last (common practice: no former a few centimetres from another)
    stations = expand(bodied["design"].fuselage)
    length_mm = 1000 * (stations[-1].x - stations[0].x)
    former_x = sorted(int(n.removeprefix("former-x")) for n in formers)
    listed = [
        float(v)
        for e in msp.query("TEXT")
        if "same former at x" in e.dxf.text
        for v in re.findall(r"\d+", e.dxf.text.split("same former at x", 1)[1])
    ]
    assert len(formers) > 5 and listed
    for st in stations[1:]:
        x = 1000 * st.x
        assert min(abs(x - f) for f in former_x + listed) <= 0.02 * length_mm + 0.5, x
    pairs = zip(former_x[:-2], former_x[1:-1], strict=True)
    assert all(b - a >= 0.02 * length_mm - 1 for a, b in pairs)
    for name in formers:
        outline, ring = sorted(closed_outlines(doc, name), key=shoelace, reverse=True)
        texts = [e.dxf.text for e in msp.query(f'TEXT[layer=="{name}"]')]
        (x_mm,) = [float(m[1]) for t in texts if (m := re.search(r"at x = (-?\d+\.\d) mm", t))]
        assert abs(int(name.removeprefix("former-x")) - x_mm) <= 0.55  # named in whole mm
        a, b = body_half_sizes(x_mm)
        width, height = np.ptp(outline[:, 0]), np.ptp(outline[:, 1])
        # x in the label is rounded to 0.1 mm; the nose grows by at most 1.3 mm per mm there
        assert (width, height) == pytest.approx((2 * a, 2 * b), abs=0.15)
        # ... and as the label gives them
        (size_text,) = [m.groups() for t in texts if (m := re.search(SIZE, t))]
        assert tuple(map(float, size_text)) == pytest.approx((2 * a, 2 * b), abs=0.15)
        # an ellipse encloses pi a b (Archimedes); the 256-point polygon inscribed in it (an
        # affine image of a regular 256-gon, area 128 sin(2 pi / 256) a b) falls 1.0e-4 short
        assert shoelace(outline) == pytest.approx(math.pi * width * height / 4, rel=2e-4)
        assert shoelace(outline) < math.pi * width * height / 4
        # the centre mark: at the outline's middle (an ellipse is symmetric about its centre)
        # and on the centre water line, centre_z = 0.55 m (design file)
        centre = ring.mean(axis=0)
        middle = 0.5 * (outline.min(axis=0) + outline.max(axis=0))
        assert centre == pytest.approx(middle, abs=1e-6)
        assert centre[1] == pytest.approx(550.0, abs=1e-6)
        # the centre line is vertical through the mark on a whole 10 mm, the water line
        # horizontal through it; both reach past the outline
        lines = [(e.dxf.start.vec2, e.dxf.end.vec2) for e in msp.query(f'LINE[layer=="{name}"]')]
        (cl,) = [(p, q) for p, q in lines if abs(p.x - q.x) < 1e-9]
        (wl,) = [(p, q) for p, q in lines if abs(p.y - q.y) < 1e-9]
        assert cl[0].x == pytest.approx(centre[0], abs=1e-9)
        assert cl[0].x / 10 == pytest.approx(round(cl[0].x / 10), abs=1e-9)
        assert min(cl[0].y, cl[1].y) < outline[:, 1].min()
        assert max(cl[0].y, cl[1].y) > outline[:, 1].max()
        assert wl[0].y == pytest.approx(550.0, abs=1e-9)
        assert min(wl[0].x, wl[1].x) < outline[:, 0].min()
        assert max(wl[0].x, wl[1].x) > outline[:, 0].max()


def test_no_fuselage_draws_no_fuselage(bare):
    plan, tpl = bare["plan"], bare["templates"]
    assert "fuselage" not in {layer.dxf.name for layer in plan.layers}
    assert not plan.modelspace().query('*[layer=="fuselage"]')
    assert not [n for n in tpl.layers if n.dxf.name.startswith("former")]
    assert not [e for e in tpl.modelspace().query("TEXT") if "former" in e.dxf.text]
