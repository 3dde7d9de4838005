"""Shop drawings as DXF, 1:1 in millimetres ($INSUNITS = mm): the plan view of the airplane,
each surface's planform in its own plane, and the section templates.

Coordinates are those of the aircraft frame in mm, so a point read off a drawing in a CAD
package is its fuselage station and butt line (or water line): the plan view has X = x (aft),
Y = y (right), seen from above; a wing or horizontal-tail planform has X = x, Y = y of the right
half without incidence, twist or dihedral (spanwise positions projected, as everywhere in
geomgen); the fin's planform has X = x, Y = z. Templates are drawn in each section's own plane
(see :mod:`geomgen.outputs.templates`). A design with a fuselage adds its outline seen from
above to the plan view (layer ``fuselage``) and its former templates to the template
drawing. ezdxf is imported inside the functions.
"""

from __future__ import annotations

import math
import textwrap
import uuid
from pathlib import Path

import numpy as np

from geomgen.design import BodyStation
from geomgen.errors import GeometryError
from geomgen.geometry.frame import place
from geomgen.geometry.layout import PART_NAMES, Layout, SurfaceLayout, corner_labels
from geomgen.outputs.report import CAUTION, SURFACE_TITLES
from geomgen.outputs.templates import (
    FormerTemplate,
    SectionTemplate,
    former_templates,
    section_templates,
)
from geomgen.shapes.fuselage import expand, loft_sections
from geomgen.store.stamp import output_time

#: Layers of the plan view and planform drawings: name -> (ACI colour, line type).
LAYERS = {
    "outline": (7, "Continuous"),  # surface outlines and panel breaks
    "controls": (3, "Continuous"),  # outlines of the moving parts
    "hinge-line": (1, "DASHED"),
    "mgc": (5, "Continuous"),  # mean geometric chords and their quarter-chord points
    "spar-line": (4, "DASHDOT"),
    "centreline": (8, "CENTER"),  # plane of symmetry
    "dimensions": (6, "Continuous"),
    "labels": (7, "Continuous"),  # corner keys, titles, the caution
}
#: Colours and line types of a template's parts (the template's own layer holds them all).
TEMPLATE_STYLE = {
    "outline": (256, "ByLayer"),
    "chord": (8, "DASHDOT"),
    "edge": (7, "Continuous"),
    "hinge": (1, "DASHED"),
    "spar": (5, "DASHDOT2"),
    "label": (7, "Continuous"),
    "waterline": (8, "DASHDOT"),  # a former's centre water line
    "centreline": (8, "CENTER"),  # a former's vertical centre line
    "centre": (7, "Continuous"),  # the ring at a former's centre
}
TEMPLATE_LAYER_COLOURS = {"wing": 7, "horizontal_tail": 3, "vertical_tail": 5}
#: ACI colour of the fuselage: its outline in the plan view and its former templates' layers.
FUSELAGE_COLOUR = 30
#: Plan-view outline of the fuselage: at least this many steps per station interval.
BODY_OUTLINE_STEPS = 16
M = 1000.0  # mm per m


# --- common ------------------------------------------------------------------------------------


def _document(ltscale: float, layers: dict | None = None):
    import ezdxf
    from ezdxf import units

    doc = ezdxf.new("R2010", setup=True)
    doc.units = units.MM  # $INSUNITS
    doc.header["$MEASUREMENT"] = 1  # metric
    doc.header["$LTSCALE"] = ltscale
    for name, (colour, linetype) in (LAYERS if layers is None else layers).items():
        doc.layers.add(name, color=colour, linetype=linetype)
    return doc


def _save(doc, path: Path, what: str, layout: Layout) -> Path:
    auditor = doc.audit()
    if auditor.has_errors:
        problems = "; ".join(str(e.message) for e in auditor.errors[:3])
        raise GeometryError(
            f"the DXF does not pass its audit: {problems}", part=what, operation="DXF export"
        )
    path.parent.mkdir(parents=True, exist_ok=True)
    _stamp(doc, output_time(layout.sizing.design), f"{layout.sizing.design.name}/{path.name}")
    doc.saveas(path)
    return path


#: namespace of the drawings' GUIDs (uuid5 of the drawing's name and date: same in, same out)
_GUIDS = uuid.UUID("5d0b8a54-7c1e-5f3a-9e26-41b7c0d9e8f3")


def _stamp(doc, when, name: str) -> None:
    """Give the drawing ``when`` (stamp.output_time) in place of the clock, and GUIDs derived
    from ``name`` and ``when`` in place of random ones, so the same layout gives the same bytes.

    ezdxf (1.4) stamps $TDCREATE, its "created by" note and a random $FINGERPRINTGUID when the
    document is made, and $TDUPDATE, its "written by" note and a random $VERSIONGUID every
    time it is written (``Drawing._update_metadata``, run by ``Drawing.write``); the second
    set is put right after that step, by wrapping it for this one document. The same step
    puts the CLASSES section in a stable order: ezdxf appends a class for each entity type in
    use by iterating over a set of names, whose order changes with Python's string hashing
    (measured: two ``geomgen size`` runs swapped ACDBPLACEHOLDER and LAYOUT); those classes
    are sorted by name after the ones ezdxf always writes, in ezdxf's order."""
    from collections import OrderedDict

    import ezdxf
    from ezdxf.sections.classes import REQ_R2004, REQUIRED_CLASSES
    from ezdxf.tools.juliandate import juliandate

    day = juliandate(when.replace(tzinfo=None))  # ezdxf takes a naive date; this one is UTC
    note = f"{ezdxf.__version__} @ {when.isoformat()}"

    def guid(kind: str) -> str:
        return "{" + str(uuid.uuid5(_GUIDS, f"{kind} {name} {when.isoformat()}")).upper() + "}"

    meta = doc.ezdxf_metadata()
    meta["CREATED_BY_EZDXF"] = note
    doc.header["$TDCREATE"] = doc.header["$TDUCREATE"] = day
    doc.header["$FINGERPRINTGUID"] = guid("fingerprint")
    update = doc._update_metadata

    def stamped() -> None:
        update()
        always = REQUIRED_CLASSES.get(doc.dxfversion, REQ_R2004)
        classes = doc.classes.classes  # (name, C++ class name) -> class, in output order
        first = [k for k in classes if k[0] in always]
        rest = sorted(k for k in classes if k[0] not in always)
        doc.classes.classes = OrderedDict((k, classes[k]) for k in [*first, *rest])
        doc.ezdxf_metadata()["WRITTEN_BY_EZDXF"] = note
        doc.header["$TDUPDATE"] = doc.header["$TDUUPDATE"] = day
        doc.header["$VERSIONGUID"] = guid("version")

    doc._update_metadata = stamped


def _text(msp, text: str, at, height: float, layer: str, align: str = "left", colour=None):
    from ezdxf.enums import TextEntityAlignment

    where = {
        "left": TextEntityAlignment.LEFT,
        "right": TextEntityAlignment.RIGHT,
        "centre": TextEntityAlignment.CENTER,
        "middle-left": TextEntityAlignment.MIDDLE_LEFT,
        "middle-right": TextEntityAlignment.MIDDLE_RIGHT,
    }[align]
    attribs = {"layer": layer, "height": height}
    if colour is not None:
        attribs["color"] = colour
    msp.add_text(text, dxfattribs=attribs).set_placement((float(at[0]), float(at[1])), align=where)


def _caution(msp, at, height: float, width: float, layer: str = "labels") -> None:
    """The caution as lines of text, top line at ``at``."""
    per_line = max(40, int(width / (0.6 * height)))
    for i, line in enumerate(textwrap.wrap(CAUTION, per_line)):
        _text(msp, line, (at[0], at[1] - 1.6 * height * i), height, layer)


def _dimension(msp, base, p1, p2, angle: float, height: float, text: str = "<>") -> None:
    dim = msp.add_linear_dim(
        base=base,
        p1=p1,
        p2=p2,
        angle=angle,
        text=text,
        override={
            "dimtxt": height,
            "dimasz": height,
            "dimexo": 0.5 * height,
            "dimexe": 0.5 * height,
            "dimgap": 0.4 * height,
            "dimdec": 1,
            "dimlfac": 1.0,  # measure in drawing units (mm)
            "dimtad": 1,
        },
        dxfattribs={"layer": "dimensions"},
    )
    dim.render()


def _polyline(msp, points, layer: str, closed: bool = False, **attribs) -> None:
    pts = [(float(x), float(y)) for x, y in points]
    msp.add_lwpolyline(pts, close=closed, dxfattribs={"layer": layer, **attribs})


def _cross(msp, at, size: float, layer: str) -> None:
    x, y = float(at[0]), float(at[1])
    msp.add_line((x - size, y), (x + size, y), dxfattribs={"layer": layer})
    msp.add_line((x, y - size), (x, y + size), dxfattribs={"layer": layer})


# --- plan view ---------------------------------------------------------------------------------


def _xy(p) -> tuple[float, float]:
    return (p[0] * M, p[1] * M)


def plan_outline(sl: SurfaceLayout) -> list[tuple[float, float]]:
    """Plan-view outline (mm, X = x, Y = y) of a whole surface through its corner points:
    for a surface with two halves, left tip to right tip along the leading edge and back along
    the trailing edge; for the fin, its outline projected on the plan (a line)."""
    right = [c for c in sl.corners if c.side == sl.sides[0]]
    le = [right[0].le_inner] + [c.le_outer for c in right]
    te = [right[0].te_inner] + [c.te_outer for c in right]
    if len(sl.sides) == 1:
        return [_xy(p) for p in le + te[::-1]]
    left = [c for c in sl.corners if c.side == "left"]
    le_l = [left[0].le_inner] + [c.le_outer for c in left]
    te_l = [left[0].te_inner] + [c.te_outer for c in left]
    loop = le_l[::-1] + le[1:] + te[::-1] + te_l[1:]
    return [_xy(p) for p in loop]


def body_plan_outline(stations: tuple[BodyStation, ...]) -> list[tuple[float, float]]:
    """The fuselage seen from above (mm, X = x, Y = y) as one closed loop: nose to tail along
    the right side, back along the left. Half widths are those of the body between the
    stations (``fuselage.loft_sections``: the spline the solid is lofted along), at least
    ``BODY_OUTLINE_STEPS`` per station interval; a pointed end is one point."""
    sections = loft_sections(stations, 64, between=BODY_OUTLINE_STEPS - 1)
    right = [(sec.x * M, float(sec.points[:, 1].max()) * M) for sec in sections]
    loop = right + [(x, -y) for x, y in right[::-1]]
    out: list[tuple[float, float]] = []
    for p in loop:  # a point at either end would be there twice
        if not out or math.dist(p, out[-1]) > 1e-9:
            out.append(p)
    if len(out) > 1 and math.dist(out[0], out[-1]) <= 1e-9:
        out.pop()
    return out


def write_plan_dxf(layout: Layout, path: str | Path) -> Path:
    """Plan view of the whole airplane (both sides; the fin as its plan projection; the
    fuselage's outline seen from above, if there is one, on layer ``fuselage``), 1:1 mm."""
    path = Path(path)
    wing = layout.sizing.wing
    span = wing.planform.span * M
    h = max(span / 300.0, 5.0)  # text height
    doc = _document(ltscale=h)
    msp = doc.modelspace()
    xs = []
    body = layout.sizing.design.fuselage
    if body is not None:
        doc.layers.add("fuselage", color=FUSELAGE_COLOUR, linetype="Continuous")
        outline = body_plan_outline(expand(body))
        xs += [p[0] for p in outline]
        _polyline(msp, outline, "fuselage", closed=True)
    for sl in layout.surfaces:
        ss = sl.sizing
        pf = ss.planform
        outline = plan_outline(sl)
        xs += [p[0] for p in outline]
        _polyline(msp, outline, "outline", closed=True)
        for side in sl.sides:
            for st in pf.stations[1:-1]:  # panel breaks
                pts = place(ss, side, st.s, np.array([[0.0, 0.0], [1.0, 0.0]]))
                _polyline(msp, [_xy(p) for p in pts], "outline")
            # mean geometric chord and its quarter-chord point
            pts = place(ss, side, pf.mgc_s, np.array([[0.0, 0.0], [1.0, 0.0]]))
            _polyline(msp, [_xy(p) for p in pts], "mgc")
            x4, y4, _ = ss.mgc_quarter_chord
            y4 = -y4 if side == "left" else y4
            _cross(msp, (x4 * M, y4 * M), h, "mgc")
            if side != "left":
                _text(
                    msp,
                    f"MGC {pf.mgc * M:.1f}",
                    (pts[1][0] * M + h, pts[1][1] * M),
                    h,
                    "mgc",
                    "middle-left",
                )
        for c in sl.controls:
            hinge = [_xy(hp.point) for hp in c.hinge]
            te = [_xy(place(ss, c.side, hp.s, np.array([[1.0, 0.0]]))[0]) for hp in c.hinge]
            _polyline(msp, hinge, "hinge-line")
            _polyline(msp, hinge + te[::-1], "controls", closed=True)
    for key in corner_labels(layout):
        x, y = _xy(key.point)
        if key.side == "centre":  # the fin's keys stand clear of the plane of symmetry
            y -= 1.5 * h
        if key.where.startswith("LE"):
            _text(msp, key.key, (x - 0.5 * h, y), h, "labels", "middle-right")
        else:
            _text(msp, key.key, (x + 0.5 * h, y), h, "labels", "middle-left")
    x_min, x_max = min(xs), max(xs)
    msp.add_line((x_min - 5 * h, 0.0), (x_max + 5 * h, 0.0), dxfattribs={"layer": "centreline"})

    # dimensions: wing span, tail arms (between the MGC quarter-chord points)
    semi = wing.planform.semi_span * M
    tip = [c for c in layout.surface("wing").corners if c.side == "right"][-1].le_outer
    _dimension(msp, (x_min - 6 * h, 0.0), (tip[0] * M, semi), (tip[0] * M, -semi), 90, h)
    xw, yw, _ = wing.mgc_quarter_chord
    y_dim = -semi - 6 * h
    tails = [t for t in (layout.sizing.horizontal_tail, layout.sizing.vertical_tail) if t]
    for k, tail in enumerate(tails):
        xt, yt, _ = tail.mgc_quarter_chord
        words = "horizontal tail arm" if tail.key == "horizontal_tail" else "vertical tail arm"
        _dimension(
            msp,
            (xw * M, y_dim - 5 * h * k),
            (xw * M, -yw * M),
            (xt * M, -yt * M),
            0,
            h,
            f"{words} <>",
        )
    y = y_dim - 15 * h
    design = layout.sizing.design
    for line, size in (
        (f"{design.title}: plan view, seen from above", 1.5 * h),
        (
            "1:1 in mm; X = x (aft), Y = y (right) of the aircraft frame; corner keys as in the "
            "report",
            h,
        ),
    ):
        _text(msp, line, (x_min, y), size, "labels")
        y -= 2.5 * h
    _caution(msp, (x_min, y), 0.8 * h, x_max - x_min)
    return _save(doc, path, "plan view", layout)


# --- planforms ---------------------------------------------------------------------------------


def planform_points(sl: SurfaceLayout):
    """The planform of one half (the fin: all of it) in its own plane, mm: the outline (root LE
    along the LE to the tip and back along the TE), (control, hinge points, TE points) per
    control surface, and the function (s, chord fraction) -> (X, Y)."""
    ss = sl.sizing
    pf = ss.planform

    def xy(s: float, fraction: float) -> tuple[float, float]:
        x_le, chord, _, _ = pf.at(s)
        x = (ss.apex_x + x_le + fraction * chord) * M
        return (x, s * M) if pf.symmetric else (x, (ss.apex_z + s) * M)

    le = [xy(st.s, 0.0) for st in pf.stations]
    te = [xy(st.s, 1.0) for st in pf.stations]
    hinges = []
    for c in sl.controls:
        if c.side != sl.sides[0]:
            continue
        hinge = [xy(hp.s, hp.chord_fraction) for hp in c.hinge]
        aft = [xy(hp.s, 1.0) for hp in c.hinge]
        hinges.append((c, hinge, aft))
    return le + te[::-1], hinges, xy


def write_planform_dxfs(layout: Layout, folder: str | Path) -> list[Path]:
    """One DXF per surface, 1:1 mm: the right half's planform of the wing and the horizontal
    tail in their own plane (X = x, Y = y), the fin's side view (X = x, Y = z)."""
    folder = Path(folder)
    paths = []
    keys = {k.surface: [] for k in corner_labels(layout)}
    for k in corner_labels(layout):
        keys[k.surface].append(k)
    for sl in layout.surfaces:
        paths.append(_write_planform(layout, sl, keys[sl.key], folder))
    return paths


def _write_planform(layout: Layout, sl: SurfaceLayout, keys, folder: Path) -> Path:
    ss = sl.sizing
    pf = ss.planform
    side = sl.sides[0]
    h = max(pf.semi_span * M / 150.0, 4.0)
    doc = _document(ltscale=h / 2)
    msp = doc.modelspace()
    outline, hinges, xy = planform_points(sl)
    _polyline(msp, outline, "outline", closed=True)
    for st in pf.stations[1:-1]:
        _polyline(msp, [xy(st.s, 0.0), xy(st.s, 1.0)], "outline")
    for c, hinge, aft in hinges:
        _polyline(msp, hinge, "hinge-line")
        _polyline(msp, hinge + aft[::-1], "controls", closed=True)
        mid = len(hinge) // 2
        at = (0.5 * (hinge[mid - 1][0] + aft[mid][0]), 0.5 * (hinge[mid - 1][1] + aft[mid][1]))
        _text(msp, c.name, at, h, "controls", "centre")
    if ss.spec.spar_at is not None:
        _polyline(msp, [xy(st.s, ss.spec.spar_at) for st in pf.stations], "spar-line")
        x, y = xy(0.5 * pf.semi_span, ss.spec.spar_at)
        _text(msp, f"spar {100 * ss.spec.spar_at:.1f} %", (x + 0.5 * h, y), h, "spar-line")
    # mean geometric chord
    le_mgc, te_mgc = xy(pf.mgc_s, 0.0), xy(pf.mgc_s, 1.0)
    mgc_le = (ss.apex_x + pf.mgc_x_le) * M
    y_mgc = le_mgc[1]
    _polyline(msp, [(mgc_le, y_mgc), (mgc_le + pf.mgc * M, y_mgc)], "mgc")
    _cross(msp, (mgc_le + 0.25 * pf.mgc * M, y_mgc), h, "mgc")
    _text(msp, f"MGC {pf.mgc * M:.1f}", (te_mgc[0] + h, y_mgc), h, "mgc", "middle-left")
    # corner keys, in the outline's order
    order = [k for k in keys if k.side == side]
    if len(order) == len(outline):
        for k, p in zip(order, outline, strict=True):
            if k.where.startswith("LE"):
                _text(msp, k.key, (p[0] - 0.5 * h, p[1]), h, "labels", "middle-right")
            else:
                _text(msp, k.key, (p[0] + 0.5 * h, p[1]), h, "labels", "middle-left")
    # dimensions: root and tip chords, stations from the root, semi-span (the fin: height)
    root_le, root_te = xy(0.0, 0.0), xy(0.0, 1.0)
    tip_le, tip_te = xy(pf.semi_span, 0.0), xy(pf.semi_span, 1.0)
    _dimension(msp, (root_le[0], root_le[1] - 4 * h), root_le, root_te, 0, h)
    _dimension(msp, (tip_le[0], tip_le[1] + 4 * h), tip_le, tip_te, 0, h)
    x_left = min(p[0] for p in outline) - 6 * h
    for i, st in enumerate(pf.stations[1:], start=1):
        _dimension(
            msp, (x_left - 5 * h * (len(pf.stations) - 1 - i), 0.0), root_le, xy(st.s, 0.0), 90, h
        )
    # title, frame, caution
    if pf.symmetric:
        what = f"{SURFACE_TITLES[sl.key].lower()}, right half: planform in its own plane"
        frame = "1:1 in mm; X = x (aft), Y = y (right) of the aircraft frame, without incidence, "
        frame += "twist or dihedral (spanwise positions projected)"
        area = f"area of this half {pf.side_area:.4f} m² (both halves {pf.area:.4f} m²)"
    else:
        what = "fin: side view in its own plane"
        frame = "1:1 in mm; X = x (aft), Y = z (up) of the aircraft frame, without incidence"
        area = f"area {pf.area:.4f} m²"
    x0 = x_left - 5 * h * len(pf.stations)
    y = min(p[1] for p in outline) - 10 * h
    title = layout.sizing.design.title
    for line, size in ((f"{title}: {what}", 1.5 * h), (frame, h), (area, h)):
        _text(msp, line, (x0, y), size, "labels")
        y -= 2.2 * h
    width = max(p[0] for p in outline) - x0
    _caution(msp, (x0, y), 0.8 * h, width)
    return _save(doc, folder / f"{PART_NAMES[sl.key]}-planform.dxf", f"{sl.key} planform", layout)


# --- templates ---------------------------------------------------------------------------------


def write_template_dxf(layout: Layout, path: str | Path, dirs: tuple = ()) -> Path:
    """Section templates, 1:1 mm, each on its own layer named by surface and station (e.g.
    ``wing-y0600``): a column per surface, templates stacked root to tip without overlap. Each
    template's leading edge sits on whole 10 mm and its chord line on a whole 10 mm, so a
    point's position on the template is read off by subtraction.

    With a fuselage, its former templates follow in a row to the right, each on its own layer
    named by its fuselage station (e.g. ``former-x1300``): Y is the water line z itself and
    X is y plus the former's centre-line X (a whole 10 mm)."""
    path = Path(path)
    templates = section_templates(layout, dirs)
    formers = former_templates(layout)
    layers = {"labels": (7, "Continuous")}
    layers |= {t.name: (TEMPLATE_LAYER_COLOURS[t.surface], "Continuous") for t in templates}
    layers |= {f.name: (FUSELAGE_COLOUR, "Continuous") for f in formers}
    doc = _document(ltscale=4.0, layers=layers)
    msp = doc.modelspace()
    gap = 40.0
    x_column = 0.0
    top = 0.0
    for key in (sl.key for sl in layout.surfaces):
        column = [t for t in templates if t.surface == key]
        if not column:
            continue
        extents = [t.extent() for t in column]
        x_shift = _round_up(x_column - min(e[0] for e in extents))
        y_cursor = top
        for t, e in zip(column, extents, strict=True):
            y_shift = _round_up(y_cursor - e[3] - 10.0)  # the chord line: y = 0 of the template
            _draw_template(msp, t, (x_shift, y_shift))
            y_cursor = y_shift + e[1] - gap
        x_column = x_shift + max(e[2] for e in extents) + 3 * gap
    title = layout.sizing.design.title
    _text(msp, f"{title}: section templates, 1:1 in mm", (0.0, top + 3 * gap), 8.0, "labels")
    _text(
        msp,
        "each template on its own layer; x along the chord from the LE, y across it",
        (0.0, top + 3 * gap - 12.0),
        5.0,
        "labels",
    )
    caution_width = max(x_column, 600.0)
    _caution(msp, (0.0, top + 3 * gap - 24.0), 3.5, caution_width)
    if formers:
        _draw_formers(msp, formers, caution_width + 3 * gap, gap)
    return _save(doc, path, "section templates", layout)


def _draw_formers(msp, formers: tuple[FormerTemplate, ...], x_start: float, gap: float) -> None:
    """Former templates in a row from ``x_start`` (mm), each at its own water line (Y = z,
    unshifted) with its centre line on a whole 10 mm, under a heading."""
    x_cursor = x_start
    top = -math.inf
    for f in formers:
        e = f.extent()
        x_shift = _round_up(x_cursor - e[0])
        _draw_template(msp, f, (x_shift, 0.0))
        x_cursor = x_shift + e[2] + gap
        top = max(top, e[3])
    y = top + 2 * gap
    _text(msp, "fuselage formers, 1:1 in mm, seen from aft", (x_start, y + 12.0), 8.0, "labels")
    _text(
        msp,
        "each former on its own layer; Y = z (water line) of the aircraft frame, X = y plus the "
        "X of the former's centre line (CL)",
        (x_start, y),
        5.0,
        "labels",
    )


def _round_up(v: float, step: float = 10.0) -> float:
    return step * math.ceil(v / step)


def _draw_template(msp, t: SectionTemplate | FormerTemplate, shift: tuple[float, float]) -> None:
    """One template's strokes and notes on its own layer, moved by ``shift`` (mm)."""
    dx, dy = shift
    for stroke in t.strokes:
        colour, linetype = TEMPLATE_STYLE[stroke.kind]
        attribs = {"color": colour, "linetype": linetype}
        pts = [(x + dx, y + dy) for x, y in stroke.points]
        if len(pts) == 2 and not stroke.closed:
            msp.add_line(pts[0], pts[1], dxfattribs={"layer": t.name, **attribs})
        else:
            _polyline(msp, pts, t.name, closed=stroke.closed, **attribs)
    for note in t.notes:
        colour = TEMPLATE_STYLE.get(note.kind, TEMPLATE_STYLE["label"])[0]
        _text(
            msp,
            note.text,
            (note.at[0] + dx, note.at[1] + dy),
            note.height,
            t.name,
            "centre" if note.align == "centre" else "left",
            colour,
        )
