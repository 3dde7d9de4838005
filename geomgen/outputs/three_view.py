"""Three-view drawing sheet of a laid-out design: plan, front and side view on one A3 page.

Drawn with matplotlib's object API (no pyplot state, Agg for the PNG) on one set of axes whose
data unit is the millimetre of paper, origin at the lower-left corner of the sheet. Each view
maps aircraft-frame points (m; x aft, y right, z up) onto the paper at one common scale:

- plan view, seen from above with the nose up: x aft runs down the page, y (starboard) right;
- front view, seen from ahead looking aft: y (starboard) runs to the left, z up;
- side view, seen from port with the nose to the left: x aft runs right, z up.

The SVG keeps an id on what a reader (or a test) may want to find: ``corner-WR1`` (the key's
text), ``corner-point-WR1`` (a dot on the point), ``ref-origin-plan``, ``ref-x1-plan`` and
``ref-y1-plan`` (invisible markers at the datum and 1 m along two axes, one set per view;
matplotlib leaves out a marker that falls off the paper),
``table-WR1-x``, ``dim-tail-arm-horizontal_tail``, ``hinge-aileron-right``, ``title-date``...
Output is deterministic: SVG ids are salted with a fixed string and the only date written is
:func:`geomgen.stamp.output_time` of the design (SVG ``dc:date``, PNG "Creation Time"), never the
clock, so two runs give byte-identical files. matplotlib is imported only when a sheet is drawn.
"""

from __future__ import annotations

import math
import textwrap
from dataclasses import dataclass, field
from email.utils import format_datetime
from pathlib import Path
from typing import Any

from geomgen import __version__
from geomgen.design.units import to_output
from geomgen.geometry.layout import (
    PART_NAMES,
    CornerLabel,
    Layout,
    SurfaceLayout,
    corner_labels,
    place,
)
from geomgen.outputs.report import CAUTION
from geomgen.store.stamp import output_time

Point = tuple[float, float, float]
Page = tuple[float, float]  # paper position, mm from the sheet's lower-left corner

#: ISO 216 A3, landscape (mm).
PAPER_NAME, PAPER_W, PAPER_H = "A3", 420.0, 297.0
MARGIN = 10.0  # border frame inset from the paper edge (mm)
COLUMN_W = 128.0  # right-hand column: coordinate table, legend, scale bar, title block
GUTTER = 8.0
PT = 25.4 / 72.0  # mm per typographic point
DPI = 150  # PNG resolution
SVG_SALT = "geomgen-three-view"

INK = "#000000"
GREY = "#555555"
FILL = "#e6e6e6"
LW_OUTLINE = 0.5 / PT  # line widths in points (0.5, 0.35, 0.18 mm)
LW_MEDIUM = 0.35 / PT
LW_THIN = 0.18 / PT
ARROW = (2.2, 0.45)  # dimension arrowhead length and half-width (mm)
#: white box behind a text, so lines passing under it break there
_MASK = {"boxstyle": "square,pad=0.12", "facecolor": "white", "edgecolor": "none"}


@dataclass(frozen=True)
class _Projection:
    name: str
    title: str
    note: str
    h: tuple[int, float]  # aircraft axis (0 x, 1 y, 2 z) and sign along the page's rightward
    v: tuple[int, float]  # ... and along the page's upward direction


_PLAN = _Projection(
    "plan",
    "PLAN VIEW",
    "from above, nose up: x aft down the page, y starboard right",
    (1, 1),
    (0, -1),
)
_FRONT = _Projection(
    "front", "FRONT VIEW", "looking aft: y starboard to the left, z up", (1, -1), (2, 1)
)
_SIDE = _Projection("side", "SIDE VIEW", "from port, nose left: x aft right, z up", (0, 1), (2, 1))
_AXIS_NAMES = "xyz"


@dataclass(frozen=True)
class _View:
    """One projection placed on the paper: page = origin + k * (signed aircraft coordinates)."""

    proj: _Projection
    k: float  # paper mm per metre
    ou: float  # paper position of the datum (mm)
    ov: float

    def __call__(self, p: Point) -> Page:
        (ih, sh), (iv, sv) = self.proj.h, self.proj.v
        return (self.ou + self.k * sh * p[ih], self.ov + self.k * sv * p[iv])


@dataclass(frozen=True)
class _Control:
    name: str
    surface: str
    hinge: tuple[Point, ...]  # inner end to outer end
    trailing_edge: tuple[Point, ...]  # the same stations, on the trailing edge


@dataclass(frozen=True)
class _Mgc:
    surface: str
    side: str
    le: Point
    te: Point
    quarter: Point
    length: float


@dataclass(frozen=True)
class _Geometry:
    outlines: tuple[tuple[str, str, tuple[CornerLabel, ...]], ...]  # surface, side, corners
    controls: tuple[_Control, ...]
    mgcs: tuple[_Mgc, ...]
    symmetric: dict[str, bool]
    body: dict[str, tuple[Point, ...]] = field(default_factory=dict)  # view name -> outline

    def points(self) -> list[Point]:
        pts = [c.point for _, _, cs in self.outlines for c in cs]
        for outline in self.body.values():
            pts += list(outline)
        for c in self.controls:
            pts += list(c.hinge) + list(c.trailing_edge)
        for m in self.mgcs:
            pts += [m.le, m.te]
        return pts


def _geometry(layout: Layout) -> _Geometry:
    labels = corner_labels(layout)
    outlines = []
    for sl in layout.surfaces:
        for side in sl.sides:
            cs = tuple(c for c in labels if c.surface == sl.key and c.side == side)
            outlines.append((sl.key, side, cs))
    controls = []
    mgcs = []
    for sl in layout.surfaces:
        ss = sl.sizing
        for c in sl.controls:
            te = tuple(
                tuple(float(v) for v in place(ss, c.side, h.s, [[1.0, 0.0]])[0]) for h in c.hinge
            )
            controls.append(_Control(c.name, sl.key, tuple(h.point for h in c.hinge), te))
        mgcs += _mgcs(sl)
    return _Geometry(
        outlines=tuple(outlines),
        controls=tuple(controls),
        mgcs=tuple(mgcs),
        symmetric={sl.key: sl.sizing.planform.symmetric for sl in layout.surfaces},
        body=_body_outlines(layout),
    )


def _body_outlines(layout: Layout) -> dict[str, tuple[Point, ...]]:
    """The fuselage's outline in each view (aircraft frame, m): half widths in plan, half
    heights in side view, the largest section in front view; empty without a fuselage."""
    spec = layout.sizing.design.fuselage
    if spec is None:
        return {}
    from geomgen.shapes.fuselage import expand, section_area, section_points

    st = expand(spec)
    plan = [(s.x, s.width / 2, s.z) for s in st] + [(s.x, -s.width / 2, s.z) for s in st[::-1]]
    side = [(s.x, 0.0, s.z + s.height / 2) for s in st]
    side += [(s.x, 0.0, s.z - s.height / 2) for s in st[::-1]]
    largest = max(st, key=section_area)
    front = [tuple(float(v) for v in p) for p in section_points(largest, 72)]
    return {"plan": tuple(plan), "side": tuple(side), "front": tuple(front)}


def _mgcs(sl: SurfaceLayout) -> list[_Mgc]:
    """The mean geometric chord of each side as planned (before incidence), with its c/4."""
    ss = sl.sizing
    pf = ss.planform
    x_le = ss.apex_x + pf.mgc_x_le
    out = []
    for side in sl.sides:
        if pf.symmetric:
            y = pf.mgc_s if side == "right" else -pf.mgc_s
            z = ss.apex_z + pf.mgc_rise
        else:
            y, z = 0.0, ss.apex_z + pf.mgc_s
        out.append(
            _Mgc(
                sl.key,
                side,
                (x_le, y, z),
                (x_le + pf.mgc, y, z),
                (x_le + 0.25 * pf.mgc, y, z),
                pf.mgc,
            )
        )
    return out


# --- scale and placement ------------------------------------------------------------------------


def _extent(proj: _Projection, pts: list[Point]) -> tuple[float, float, float, float]:
    (ih, sh), (iv, sv) = proj.h, proj.v
    hs = [sh * p[ih] for p in pts]
    vs = [sv * p[iv] for p in pts]
    return min(hs), max(hs), min(vs), max(vs)


def _scales():
    """Drawing scales 1:n with n in the 1-2-5 series (1:1 ... 1:5 000 000)."""
    return [a * 10**e for e in range(7) for a in (1, 2, 5)]


@dataclass(frozen=True)
class _Placement:
    views: dict[str, _View]
    boxes: dict[str, tuple[float, float, float, float]]  # drawn extent on paper: u0, u1, v0, v1
    n: int  # scale 1:n


def _place_views(geo: _Geometry, pads: dict[str, tuple[float, float, float, float]]) -> _Placement:
    """Largest 1-2-5 scale at which the three views fit the left part of the sheet, stacked
    plan (top), front, side (bottom); plan and front share the page position of y = 0."""
    pts = geo.points()
    ext = {p.name: _extent(p, pts) for p in (_PLAN, _FRONT, _SIDE)}
    left, right = MARGIN + 2.0, PAPER_W - MARGIN - COLUMN_W - GUTTER
    bottom, top = MARGIN + 2.0, PAPER_H - MARGIN - 2.0
    width, height = right - left, top - bottom
    size = {k: (max(e[1] - e[0], 1e-6), max(e[3] - e[2], 1e-6)) for k, e in ext.items()}
    k_fit = min(
        min((width - pads[k][0] - pads[k][1]) / size[k][0] for k in size),
        (height - sum(pads[k][2] + pads[k][3] for k in size)) / sum(s[1] for s in size.values()),
    )
    n = next((n for n in _scales() if 1000.0 / n <= k_fit), _scales()[-1])
    k = 1000.0 / n
    used = sum(pads[name][2] + pads[name][3] + k * size[name][1] for name in size)
    gap = (height - used) / 4
    views: dict[str, _View] = {}
    boxes = {}
    v_top = top - gap
    # plan and front: y = 0 at the same page u, centred on the plan view's box
    h0, h1 = ext["plan"][0], ext["plan"][1]
    span_w = pads["plan"][0] + k * (h1 - h0) + pads["plan"][1]
    ou_sym = left + (width - span_w) / 2 + pads["plan"][0] - k * h0
    for proj in (_PLAN, _FRONT, _SIDE):
        hmin, hmax, vmin, vmax = ext[proj.name]
        pl, pr, pb, pa = pads[proj.name]
        if proj.name == "side":
            box_w = pl + k * (hmax - hmin) + pr
            ou = left + (width - box_w) / 2 + pl - k * hmin
        else:
            ou = ou_sym
        ov = v_top - pa - k * vmax
        views[proj.name] = _View(proj, k, ou, ov)
        boxes[proj.name] = (ou + k * hmin, ou + k * hmax, ov + k * vmin, ov + k * vmax)
        v_top = ov + k * vmin - pb - gap
    return _Placement(views, boxes, n)


# --- drawing primitives (paper mm) ----------------------------------------------------------------


class _Sheet:
    """Thin helpers over one matplotlib Axes whose data unit is the millimetre of paper."""

    def __init__(self, ax: Any, patches: Any):
        self.ax = ax
        self.patches = patches

    def line(self, pts, lw=LW_THIN, style="-", color=INK, gid=None, z=2.0) -> None:
        us, vs = zip(*pts, strict=True)
        self.ax.plot(
            us,
            vs,
            linewidth=lw,
            linestyle=style,
            color=color,
            gid=gid,
            clip_on=False,
            solid_capstyle="butt",
            dash_capstyle="butt",
            solid_joinstyle="miter",
            zorder=z,
        )

    def marker(self, p: Page, gid=None, size=2.4, marker="o", face=INK, edge=INK, z=4.0):
        """A point symbol of ``size`` points; ``face=edge='none'`` makes an invisible marker."""
        invisible = face == "none" and edge == "none"
        self.ax.plot(
            [p[0]],
            [p[1]],
            linestyle="none",
            marker=marker,
            markersize=size,
            markerfacecolor=face,
            markeredgecolor=edge,
            markeredgewidth=LW_THIN,
            alpha=0.0 if invisible else 1.0,
            gid=gid,
            clip_on=False,
            zorder=z,
        )

    def text(self, p: Page, s: str, size=6.5, ha="left", va="baseline", gid=None, **kw):
        kw.setdefault("color", INK)
        self.ax.text(p[0], p[1], s, fontsize=size, ha=ha, va=va, gid=gid, clip_on=False, **kw)

    def polygon(self, pts, gid=None, face="none", edge=INK, lw=LW_THIN, hatch=None, z=1.0):
        self.ax.add_patch(
            self.patches.Polygon(
                pts,
                closed=True,
                facecolor=face,
                edgecolor=edge,
                linewidth=lw,
                hatch=hatch,
                gid=gid,
                clip_on=False,
                zorder=z,
                joinstyle="miter",
            )
        )

    def arrowhead(self, tip: Page, direction: Page) -> None:
        length, half = ARROW
        du, dv = direction
        base = (tip[0] - du * length, tip[1] - dv * length)
        nu, nv = -dv * half, du * half
        pts = [tip, (base[0] + nu, base[1] + nv), (base[0] - nu, base[1] - nv)]
        self.polygon(pts, face=INK, edge="none", lw=0.0, z=3.0)

    def dimension(self, a: Page, b: Page, at: float, text: str, gid: str) -> None:
        """Horizontal dimension of the distance across the page between a and b, its line at
        page height ``at``: extension lines, arrowheads, the value above the line."""
        gap, over = 1.0, 1.5
        ends = [(a[0], at), (b[0], at)]
        for p, e in ((a, ends[0]), (b, ends[1])):
            sign = 1.0 if e[1] > p[1] else -1.0
            if abs(e[1] - p[1]) > gap:
                self.line([(p[0], p[1] + sign * gap), (e[0], e[1] + sign * over)], color=GREY)
        self.line(ends, lw=LW_THIN, gid=gid)
        length = abs(b[0] - a[0])
        if length < 1e-9:
            return
        right = (1.0 if b[0] > a[0] else -1.0, 0.0)
        left = (-right[0], 0.0)
        if length > 2.5 * ARROW[0]:  # arrows inside, pointing out to the extension lines
            self.arrowhead(ends[1], right)
            self.arrowhead(ends[0], left)
        else:  # arrows outside, pointing in
            self.arrowhead(ends[0], right)
            self.arrowhead(ends[1], left)
        mid = ((a[0] + b[0]) / 2, at + 0.9)
        self.text(mid, text, ha="center", va="bottom", gid=f"{gid}-value", zorder=5.0, bbox=_MASK)


# --- the sheet ----------------------------------------------------------------------------------


def three_view(layout: Layout, svg_path: Path, png_path: Path, units: str = "si") -> None:
    """Draw the three-view sheet of ``layout`` and write it as SVG and PNG (A3 landscape).

    ``units`` ('si' or 'imperial') sets the unit of the coordinate table, the dimensions and the
    scale bar (m or ft); the drawing scale itself is a ratio. Same layout -> same bytes.
    """
    if units not in ("si", "imperial"):
        raise ValueError(f"units must be 'si' or 'imperial' (got {units!r})")
    import matplotlib
    from matplotlib import patches
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    rc = {
        "svg.hashsalt": SVG_SALT,
        "svg.fonttype": "path",  # glyphs as outlines: the sheet looks the same everywhere
        "font.family": "DejaVu Sans",  # shipped with matplotlib
        "hatch.linewidth": LW_THIN,
        "path.simplify": False,
    }
    with matplotlib.rc_context(rc):
        fig = Figure(figsize=(PAPER_W / 25.4, PAPER_H / 25.4))
        FigureCanvasAgg(fig)
        ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
        ax.set_xlim(0.0, PAPER_W)
        ax.set_ylim(0.0, PAPER_H)
        ax.set_axis_off()
        sheet = _Sheet(ax, patches)
        _draw(sheet, layout, units)
        title = f"{layout.sizing.design.title}: three-view"
        when = output_time(layout.sizing.design)
        fig.savefig(svg_path, format="svg", metadata={"Date": when.isoformat(), "Title": title})
        # "Creation Time" is a keyword of the PNG specification (tEXt chunk), RFC 1123 style
        png_meta = {"Title": title, "Creation Time": format_datetime(when, usegmt=True)}
        fig.savefig(png_path, format="png", dpi=DPI, metadata=png_meta)


def _length_text(value_si: float, units: str, digits: int = 3) -> str:
    v, unit = to_output(value_si, "length", units)
    return f"{_signed(v, digits)} {unit}"


def _signed(v: float, digits: int) -> str:
    text = f"{v:.{digits}f}"
    if float(text) == 0.0:
        text = f"{0.0:.{digits}f}"  # no "-0.000"
    return text.replace("-", "\u2212")


def _draw(sheet: _Sheet, layout: Layout, units: str) -> None:
    geo = _geometry(layout)
    sz = layout.sizing
    tails = [t for t in (sz.horizontal_tail, sz.vertical_tail) if t is not None]
    pads = {
        "plan": (14.0, 14.0, 10.0, 16.0),
        "front": (18.0, 18.0, 5.0, 13.0),
        "side": (16.0, 22.0, 10.0 + 7.0 * 2 * len(tails), 14.0),
    }
    placed = _place_views(geo, pads)
    _frame(sheet)
    for name, view in placed.views.items():
        _outlines(sheet, geo, view)
        _view_title(sheet, view, placed.boxes[name], pads[name])
        _references(sheet, view)
    _plan_details(sheet, geo, placed.views["plan"], units)
    _front_details(sheet, geo, placed.views["front"])
    _side_details(sheet, geo, layout, placed.views["side"], units)
    for name in ("plan", "front", "side"):
        # the side view's dimensions take its lower edge: its arrows go to the upper left
        _triad(sheet, placed.views[name], placed.boxes[name], pads[name], top=name == "side")
    _right_column(sheet, layout, units, placed.n)


def _frame(sheet: _Sheet) -> None:
    m = MARGIN
    sheet.polygon(
        [(m, m), (PAPER_W - m, m), (PAPER_W - m, PAPER_H - m), (m, PAPER_H - m)],
        lw=0.7 / PT,
        gid="sheet-frame",
        z=6.0,
    )


def _outlines(sheet: _Sheet, geo: _Geometry, view: _View) -> None:
    body = geo.body.get(view.proj.name)
    if body:
        sheet.polygon([view(p) for p in body], lw=LW_OUTLINE, gid=f"body-{view.proj.name}", z=2.4)
    for key, side, cs in geo.outlines:
        pts = [view(c.point) for c in cs]
        sheet.polygon(pts, lw=LW_OUTLINE, gid=f"outline-{view.proj.name}-{key}-{side}", z=2.5)


def _view_title(sheet: _Sheet, view: _View, box, pad) -> None:
    u = box[0] - pad[0] + 2.0
    v = box[3] + pad[3] - 5.0
    sheet.text((u, v), view.proj.title, size=8.5, weight="bold", gid=f"view-{view.proj.name}")
    sheet.text((u + 27.0, v), view.proj.note, size=6.5)


def _references(sheet: _Sheet, view: _View) -> None:
    """Invisible markers at the datum and 1 m along the view's two axes (for reading back)."""
    name = view.proj.name
    i_h, i_v = view.proj.h[0], view.proj.v[0]
    sheet.marker(view((0.0, 0.0, 0.0)), gid=f"ref-origin-{name}", face="none", edge="none")
    for i in (i_h, i_v):
        p = [0.0, 0.0, 0.0]
        p[i] = 1.0
        gid = f"ref-{_AXIS_NAMES[i]}1-{name}"
        sheet.marker(view((p[0], p[1], p[2])), gid=gid, face="none", edge="none")


def _triad(sheet: _Sheet, view: _View, box, pad, top: bool = False) -> None:
    """Two short arrows at the view's lower (or upper) left showing where its axes point."""
    size = 7.0
    dirs = []
    for axis, sign in (view.proj.h, view.proj.v):
        d = (sign, 0.0) if (axis, sign) == view.proj.h else (0.0, sign)
        dirs.append((_AXIS_NAMES[axis], d))
    base_u = box[0] - pad[0] + 3.0
    base_v = box[3] - size if top else box[2] - pad[2] + 3.0
    o = (
        base_u + size * max(0.0, -min(d[0] for _, d in dirs)),
        base_v + size * max(0.0, -min(d[1] for _, d in dirs)),
    )
    for name, d in dirs:
        tip = (o[0] + size * d[0], o[1] + size * d[1])
        sheet.line([o, tip], lw=LW_THIN)
        sheet.arrowhead(tip, d)
        sheet.text(
            (tip[0] + 1.6 * d[0] + (0.9 if d[0] == 0 else 0.0), tip[1] + 1.6 * d[1]),
            name,
            size=6.5,
            ha="left" if d[0] >= 0 else "right",
            va="center" if d[1] == 0 else ("bottom" if d[1] > 0 else "top"),
            style="italic",
        )


def _label_direction(pts: list[Page], i: int) -> Page:
    """Outward bisector of the polygon's corner i (page mm)."""
    n = len(pts)
    area = sum(pts[j][0] * pts[(j + 1) % n][1] - pts[(j + 1) % n][0] * pts[j][1] for j in range(n))
    orient = 1.0 if area >= 0 else -1.0
    normals = []
    for a, b in ((pts[i - 1], pts[i]), (pts[i], pts[(i + 1) % n])):
        du, dv = b[0] - a[0], b[1] - a[1]
        length = math.hypot(du, dv)
        if length > 1e-9:
            normals.append((orient * dv / length, -orient * du / length))
    if not normals:
        return (0.0, 1.0)
    su, sv = sum(v[0] for v in normals), sum(v[1] for v in normals)
    length = math.hypot(su, sv)
    return (su / length, sv / length) if length > 1e-9 else normals[0]


def _corner_labels(sheet: _Sheet, view: _View, cs: tuple[CornerLabel, ...], side: str) -> None:
    pts = [view(c.point) for c in cs]
    on_side = view.proj.name == "plan" and side in ("right", "left")
    for i, c in enumerate(cs):
        d = _label_direction(pts, i)
        if on_side and abs(c.point[1]) < 1e-9:  # root: keep each side's key on its own side
            sign = 1.0 if (side == "right") == (view.proj.h[1] > 0) else -1.0
            d = (0.6 * sign, 0.8 if d[1] >= 0 else -0.8)
        p = pts[i]
        sheet.marker(p, gid=f"corner-point-{c.key}", size=2.2)
        at = (p[0] + 2.2 * d[0], p[1] + 2.2 * d[1])
        ha = "left" if d[0] > 0.35 else "right" if d[0] < -0.35 else "center"
        va = "bottom" if d[1] > 0.35 else "top" if d[1] < -0.35 else "center"
        sheet.text(
            at,
            c.key,
            size=6.5,
            ha=ha,
            va=va,
            gid=f"corner-{c.key}",
            weight="bold",
            zorder=5.0,
            bbox=_MASK,
        )


def _controls(sheet: _Sheet, geo: _Geometry, view: _View, surfaces: set[str]) -> None:
    for c in geo.controls:
        if c.surface not in surfaces:
            continue
        hinge = [view(p) for p in c.hinge]
        te = [view(p) for p in reversed(c.trailing_edge)]
        sheet.polygon(
            hinge + te, gid=f"control-{c.name}", face=FILL, edge=GREY, lw=LW_THIN, hatch="////"
        )
        sheet.line(
            [hinge[0], hinge[-1]],
            lw=LW_MEDIUM,
            style=(0, (5.0, 2.5)),
            gid=f"hinge-{c.name}",
            z=3.0,
        )


def _mgc(sheet: _Sheet, m: _Mgc, view: _View, units: str, text: bool, plan: bool) -> None:
    le, te, q = view(m.le), view(m.te), view(m.quarter)
    gid = f"mgc-c4-{m.surface}-{m.side}" if plan else f"mgc-c4-{m.surface}-side"
    sheet.line([le, te], lw=LW_THIN, style=(0, (8.0, 1.5, 1.5, 1.5)), z=3.0)
    _quarter_symbol(sheet, q, gid)
    if text:
        label = f"MGC {_length_text(m.length, units)}"
        if plan:  # ahead of the leading edge, outboard, on a leader
            out = 1.0 if (m.side == "right") == (view.proj.h[1] > 0) else -1.0
            at = (le[0] + 5.0 * out, le[1] + 4.5)
            sheet.line([(le[0], le[1] + 0.6), at, (at[0] + 1.0 * out, at[1])], lw=LW_THIN)
            sheet.text(
                (at[0] + 1.6 * out, at[1]),
                label,
                size=6.0,
                ha="left" if out > 0 else "right",
                va="center",
                gid=f"mgc-{m.surface}-length",
            )
        else:
            sheet.text(
                (te[0] + 1.5, te[1]),
                label,
                size=6.0,
                ha="left",
                va="center",
                gid=f"mgc-{m.surface}-length",
            )


def _quarter_symbol(sheet: _Sheet, p: Page, gid: str | None) -> None:
    sheet.marker(p, gid=gid, size=5.0, marker="o", face="white", edge=INK, z=4.5)
    sheet.marker(p, size=5.0, marker="+", face="none", edge=INK, z=4.6)


def _plan_details(sheet: _Sheet, geo: _Geometry, view: _View, units: str) -> None:
    pts = geo.points()
    xs = [p[0] for p in pts]
    a, b = view((min(xs), 0.0, 0.0)), view((max(xs), 0.0, 0.0))
    sheet.line(
        [(a[0], a[1] + 6.0), (b[0], b[1] - 6.0)],
        lw=LW_THIN,
        style=(0, (12.0, 2.0, 2.0, 2.0)),
        color=GREY,
        gid="centre-line-plan",
        z=1.5,
    )
    sheet.text((a[0], a[1] + 6.5), "CL", size=5.5, ha="center", va="bottom")
    symmetric = {k for k, v in geo.symmetric.items() if v}
    _controls(sheet, geo, view, symmetric)
    for m in geo.mgcs:
        if m.surface in symmetric:
            _mgc(sheet, m, view, units, text=m.side == "right", plan=True)
    for key, side, cs in geo.outlines:
        if key in symmetric:
            _corner_labels(sheet, view, cs, side)


def _front_details(sheet: _Sheet, geo: _Geometry, view: _View) -> None:
    pts = geo.points()
    zs = [p[2] for p in pts]
    a, b = view((0.0, 0.0, min(zs))), view((0.0, 0.0, max(zs)))
    sheet.line(
        [(a[0], a[1] - 4.0), (b[0], b[1] + 4.0)],
        lw=LW_THIN,
        style=(0, (12.0, 2.0, 2.0, 2.0)),
        color=GREY,
        gid="centre-line-front",
        z=1.5,
    )


def _side_details(sheet: _Sheet, geo: _Geometry, layout: Layout, view: _View, units: str) -> None:
    sz = layout.sizing
    one_sided = {k for k, v in geo.symmetric.items() if not v}
    _controls(sheet, geo, view, one_sided)
    for m in geo.mgcs:
        if m.surface in one_sided:
            _mgc(sheet, m, view, units, text=True, plan=False)
        elif m.side == "right":
            _quarter_symbol(sheet, view(m.quarter), f"mgc-c4-{m.surface}-side")
    for key, side, cs in geo.outlines:
        if key in one_sided:
            _corner_labels(sheet, view, cs, side)
    wing = sz.wing
    tails = [t for t in (sz.horizontal_tail, sz.vertical_tail) if t is not None]
    if not tails:
        return
    apex_w = (wing.apex_x, 0.0, wing.apex_z)
    sheet.marker(view(apex_w), gid="apex-wing-side", marker="^", size=3.5, face="white")
    bottom = min(view(p)[1] for p in geo.points())
    dims = []
    for t in tails:
        word = PART_NAMES[t.key]
        apex_t = (t.apex_x, 0.0, t.apex_z)
        sheet.marker(view(apex_t), gid=f"apex-{t.key}-side", marker="^", size=3.5, face="white")
        dx, dz = t.apex_x - wing.apex_x, t.apex_z - wing.apex_z
        direct = math.hypot(dx, dz)
        arm = t.mgc_quarter_chord[0] - wing.mgc_quarter_chord[0]
        dims.append(
            (
                abs(arm),
                wing.mgc_quarter_chord,
                t.mgc_quarter_chord,
                f"{word} tail arm {_length_text(arm, units)}",
                f"dim-tail-arm-{t.key}",
            )
        )
        dims.append(
            (
                abs(dx),
                apex_w,
                apex_t,
                f"{word} apex from wing apex: \u0394x {_length_text(dx, units)}, "
                f"\u0394z {_length_text(dz, units)}, direct {_length_text(direct, units)}",
                f"dim-apex-{t.key}",
            )
        )
    dims.sort(key=lambda d: d[0])
    for row, (_, a, b, text, gid) in enumerate(dims):
        sheet.dimension(view(a), view(b), bottom - 8.0 - 7.0 * row, text, gid)


# --- right-hand column: table, legend, scale bar, title block -------------------------------------


def _right_column(sheet: _Sheet, layout: Layout, units: str, n: int) -> None:
    u0 = PAPER_W - MARGIN - COLUMN_W
    u1 = PAPER_W - MARGIN
    title_top = _title_block(sheet, layout, units, n, u0, u1)
    scale_top = _scale_bar(sheet, units, n, u0, title_top + 4.0)
    legend_top = _legend(sheet, u0, scale_top + 3.0)
    _table(sheet, layout, units, u0, u1, legend_top + 4.0, PAPER_H - MARGIN)


def _table(sheet: _Sheet, layout: Layout, units: str, u0, u1, v_bottom, v_top) -> None:
    labels = corner_labels(layout)
    unit = to_output(1.0, "length", units)[1]
    rows = len(labels) + 2
    h = min(4.6, (v_top - v_bottom) / rows)
    size = min(7.0, h / 0.62)
    cols = [u0, u0 + 12.0, u0 + 40.0, u0 + 69.0, u0 + 98.0, u1]
    v = v_top
    sheet.text(
        (u0 + 2.0, v - h + 1.2),
        f"CORNER POINTS  ({unit}, aircraft frame from the datum)",
        size=size,
        weight="bold",
        gid="table-title",
    )
    v -= h
    sheet.line([(u0, v), (u1, v)], lw=LW_THIN)
    heads = ["key", "point", "x", "y", "z"]
    for j, head in enumerate(heads):
        if j < 2:
            sheet.text((cols[j] + 1.5, v - h + 1.2), head, size=size, style="italic")
        else:
            sheet.text(
                (cols[j + 1] - 2.0, v - h + 1.2), head, size=size, ha="right", style="italic"
            )
    v -= h
    sheet.line([(u0, v), (u1, v)], lw=LW_MEDIUM)
    previous = None
    for i, c in enumerate(labels):
        group = (c.surface, c.side)
        if previous is not None and group != previous:
            sheet.line([(u0, v), (u1, v)], lw=LW_THIN, color=GREY)
        previous = group
        if i % 2 == 1:
            sheet.polygon([(u0, v), (u1, v), (u1, v - h), (u0, v - h)], face="#f2f2f2", edge="none")
        base = v - h + 1.2
        sheet.text((cols[0] + 1.5, base), c.key, size=size, weight="bold")
        where = f"{PART_NAMES[c.surface]} {c.where}"
        sheet.text((cols[1] + 1.5, base), where, size=size)
        for j, axis in enumerate("xyz"):
            text = _signed(to_output(c.point[j], "length", units)[0], 3)
            sheet.text(
                (cols[j + 3] - 2.0, base), text, size=size, ha="right", gid=f"table-{c.key}-{axis}"
            )
        v -= h
    sheet.line([(u0, v), (u1, v)], lw=LW_THIN)
    for u in cols[1:-1]:
        sheet.line([(u, v), (u, v_top - h)], lw=LW_THIN, color=GREY)
    sheet.line([(u1, v), (u1, v_top)], lw=LW_THIN)
    sheet.line([(u0, v), (u0, v_top)], lw=LW_THIN)
    sheet.line([(u0, v_top), (u1, v_top)], lw=LW_THIN)


def _legend(sheet: _Sheet, u0: float, v_bottom: float) -> float:
    """Line-style key in two columns; returns its top."""
    row = 5.0
    top = v_bottom + 3 * row + 1.0
    entries = [
        ("outline", "surface outline (chord plane)"),
        ("hinge", "hinge line"),
        ("control", "control surface, aft of hinge"),
        ("mgc", "mean geometric chord, c/4 marked"),
        ("centre", "centre line"),
        ("corner", "corner point and its key"),
    ]
    for i, (kind, text) in enumerate(entries):
        u = u0 + 2.0 + (i // 3) * 64.0
        v = top - 3.0 - (i % 3) * row
        a, b = (u, v), (u + 10.0, v)
        if kind == "outline":
            sheet.line([a, b], lw=LW_OUTLINE)
        elif kind == "hinge":
            sheet.line([a, b], lw=LW_MEDIUM, style=(0, (5.0, 2.5)))
        elif kind == "control":
            box = [(u, v - 1.5), (u + 10.0, v - 1.5), (u + 10.0, v + 1.5), (u, v + 1.5)]
            sheet.polygon(box, face=FILL, edge=GREY, hatch="////")
        elif kind == "mgc":
            sheet.line([a, b], lw=LW_THIN, style=(0, (8.0, 1.5, 1.5, 1.5)))
            _quarter_symbol(sheet, (u + 2.5, v), None)
        elif kind == "centre":
            sheet.line([a, b], lw=LW_THIN, style=(0, (12.0, 2.0, 2.0, 2.0)), color=GREY)
        else:
            sheet.marker((u + 1.0, v), size=2.2)
            sheet.text((u + 2.6, v + 0.4), "WR1", size=6.0, weight="bold", va="bottom")
        sheet.text((u + 13.0, v), text, size=6.0, va="center")
    sheet.text((u0 + 2.0, top + 1.0), "KEY TO LINES", size=6.5, weight="bold", va="bottom")
    return top + 4.0


def _nice_bar(units: str, k: float, room: float) -> tuple[float, int]:
    """Scale-bar length (output units) of a 1-2-5 value that fits ``room`` mm, and divisions."""
    per_unit = k * to_output(1.0, "length", units)[0] ** -1  # paper mm per output unit
    best = (0.0, 5)
    for e in range(-3, 7):
        for a, divisions in ((1, 5), (2, 4), (5, 5)):
            length = a * 10.0**e
            if length * per_unit <= room:
                best = max(best, (length, divisions))
    return best


def _scale_bar(sheet: _Sheet, units: str, n: int, u0: float, v: float) -> float:
    """Alternating black and white bar of a round length in the output unit; returns its top."""
    k = 1000.0 / n
    length, divisions = _nice_bar(units, k, COLUMN_W - 30.0)
    unit = to_output(1.0, "length", units)[1]
    mm = length * k / to_output(1.0, "length", units)[0]
    u = u0 + 4.0
    h = 1.6
    step = mm / divisions
    for i in range(divisions):
        box = [(u + i * step, v), (u + (i + 1) * step, v), (u + (i + 1) * step, v + h)]
        box.append((u + i * step, v + h))
        sheet.polygon(box, face=INK if i % 2 == 0 else "white", edge=INK, lw=LW_THIN)
    sheet.marker((u, v), gid="scale-bar-start", face="none", edge="none")
    sheet.marker((u + mm, v), gid="scale-bar-end", face="none", edge="none")
    for i in range(divisions + 1):
        value = length * i / divisions
        text = f"{value:g}"
        sheet.text((u + i * step, v + h + 0.8), text, size=5.5, ha="center", va="bottom")
    sheet.text(
        (u + mm + 3.0, v),
        f"{length:g} {unit}",
        size=6.5,
        va="bottom",
        gid="scale-bar-label",
    )
    sheet.text((u, v + h + 4.5), f"SCALE BAR  (1:{n})", size=6.5, weight="bold", va="bottom")
    return v + h + 8.0


def _title_block(sheet: _Sheet, layout: Layout, units: str, n: int, u0: float, u1: float) -> float:
    """The title block in the lower right corner; returns its top edge."""
    d = layout.sizing.design
    v0 = MARGIN
    caution = textwrap.wrap(CAUTION, 100)
    rows = [  # heights of the rows, top to bottom (mm)
        12.5,  # title
        10.0,  # date | units | scale
        10.0,  # views
        2.6 * len(caution) + 3.0,  # caution
        5.0,  # generator
    ]
    top = v0 + sum(rows)
    sheet.polygon([(u0, v0), (u1, v0), (u1, top), (u0, top)], lw=0.7 / PT, gid="title-block", z=6.0)
    edges = [top]
    for r in rows:
        edges.append(edges[-1] - r)
    for v in edges[1:-1]:
        sheet.line([(u0, v), (u1, v)], lw=LW_THIN)
    pad = 2.0
    # title row
    title = textwrap.wrap(d.title, 46) or [d.name]
    size = 10.0 if len(title) == 1 else 8.0
    if len(title) > 2:
        title = [title[0], textwrap.shorten(" ".join(title[1:]), 44, placeholder=" ...")]
    sheet.text(
        (u0 + pad, edges[0] - 2.0),
        "\n".join(title),
        size=size,
        weight="bold",
        va="top",
        gid="title-design",
        linespacing=1.1,
    )
    sheet.text(
        (u0 + pad, edges[1] + 1.5),
        f"design {d.name}  \u00b7  file {Path(d.source).name}  \u00b7  three-view, sheet 1 of 1",
        size=6.0,
        gid="title-name",
    )
    # date | units | scale
    unit = to_output(1.0, "length", units)[1]
    cells = [
        ("DESIGN DATE", d.date or "not given", "title-date"),
        ("UNITS", f"{'SI' if units == 'si' else 'imperial'}, lengths in {unit}", "title-units"),
        ("SCALE", f"1:{n} on {PAPER_NAME} ({PAPER_W:g} \u00d7 {PAPER_H:g} mm)", "title-scale"),
    ]
    widths = [34.0, 40.0, u1 - u0 - 74.0]
    u = u0
    for (head, value, gid), w in zip(cells, widths, strict=True):
        if u > u0:
            sheet.line([(u, edges[1]), (u, edges[2])], lw=LW_THIN)
        sheet.text((u + pad, edges[1] - 3.2), head, size=5.5, color=GREY)
        sheet.text((u + pad, edges[2] + 2.0), value, size=7.0, weight="bold", gid=gid)
        u += w
    # views
    sheet.text((u0 + pad, edges[2] - 3.2), "VIEWS AND FRAME", size=5.5, color=GREY)
    views = (
        "plan: nose up, x aft down the page  \u00b7  front: looking aft  \u00b7  side: from port"
        "\nframe: x aft, y starboard, z up, origin at the datum; outlines in the chord plane"
    )
    sheet.text((u0 + pad, edges[3] + 1.3), views, size=6.0, gid="title-views", linespacing=1.25)
    # caution
    sheet.text(
        (u0 + pad, edges[3] - 1.5),
        "\n".join(caution),
        size=5.6,
        va="top",
        gid="title-caution",
        linespacing=1.3,
        weight="bold",
    )
    sheet.text(
        (u0 + pad, edges[5] + 1.6),
        f"drawn by geomgen {__version__} from the sizing and layout of the design file",
        size=5.5,
        color=GREY,
        gid="title-generator",
    )
    return top
