"""DXF shop drawings read back with ezdxf: units, audit, layers, and areas and positions
measured on the drawn entities against report.json, the design file and plane geometry."""

from __future__ import annotations

import json
import math
from itertools import combinations

import ezdxf
import numpy as np
import pytest
from designs import DEMO, demo_document, make_design
from ezdxf import bbox

from geomgen import shopfiles
from geomgen.layout import lay_out
from geomgen.pipeline import airfoil_dirs, run_size
from geomgen.sizing import size

PLAN_LAYERS = {"outline", "hinge-line", "mgc", "dimensions", "labels"}
SURFACE_WORDS = {"wing", "stabilizer", "fin"}


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
        le = mark_near(lines, texts["LE"])
        hinge = mark_near(lines, text_starting(texts, "hinge"))
        t = s_mm / 1000 / tip["span_position"]["value"]
        x_le = (1 - t) * root["leading_edge_x"]["value"] + t * tip["leading_edge_x"]["value"]
        xs.append(x_le * 1000 + hinge - le)
    assert np.ptp(xs) == pytest.approx(0.0, abs=0.01)


def test_templates_do_not_overlap(drawn):
    doc = drawn["templates"]
    names = [n.dxf.name for n in doc.layers if n.dxf.name.split("-")[0] in SURFACE_WORDS]
    boxes = {n: bbox.extents(doc.modelspace().query(f'*[layer=="{n}"]'), fast=True) for n in names}
    for a, b in combinations(names, 2):
        ba, bb = boxes[a], boxes[b]
        apart = (
            ba.extmax.x < bb.extmin.x
            or bb.extmax.x < ba.extmin.x
            or ba.extmax.y < bb.extmin.y
            or bb.extmax.y < ba.extmin.y
        )
        assert apart, (a, b)
