"""Section and former templates as a multi-page PDF at true scale (1:1, mm) on A4 or Letter
paper, portrait: the templates of :mod:`geomgen.outputs.templates` tiled over pages that
overlap, alignment crosses in the overlaps, a 100 mm check bar and the caution on every page.

Drawing coordinates are those of the template (mm, see :mod:`geomgen.outputs.templates`); page
coordinates are mm from the lower-left corner of the paper. Only :func:`write_template_pdf`
imports the PDF library (reportlab), and only when it is called.
"""

from __future__ import annotations

import math
import textwrap
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from geomgen.geometry.layout import Layout
from geomgen.outputs.report import CAUTION
from geomgen.outputs.templates import (
    SMALL_TEXT,
    FormerTemplate,
    Note,
    SectionTemplate,
    former_templates,
    section_templates,
)
from geomgen.store.stamp import output_time

#: Paper sizes, portrait (mm): ISO 216 A4 and ANSI Letter (8.5 in x 11 in, 25.4 mm per inch).
PAPER_MM = {"A4": (210.0, 297.0), "Letter": (215.9, 279.4)}
#: Page layout (mm): blank margin all round, bands for the page label and the check bar.
MARGIN = 10.0
HEADER = 19.0
FOOTER = 21.0
#: Tiles of a section too large for one page overlap by this much (mm).
OVERLAP = 20.0
#: Length of the check bar (mm).
CHECK_BAR = 100.0
PT_PER_MM = 72.0 / 25.4  # 72 pt per inch, 25.4 mm per inch (both exact)


@dataclass(frozen=True)
class Tile:
    """One page's window onto a template (drawing mm): lower-left corner, size, position."""

    x0: float
    y0: float
    width: float
    height: float
    column: int  # 0-based
    row: int  # 0-based, top row first
    columns: int
    rows: int

    def contains(self, box: tuple[float, float, float, float]) -> bool:
        return (
            box[0] >= self.x0
            and box[2] <= self.x0 + self.width
            and box[1] >= self.y0
            and box[3] <= self.y0 + self.height
        )


def _starts(lo: float, hi: float, window: float, overlap: float) -> list[float]:
    """Window starts covering [lo, hi]; one window is centred on a span that fits."""
    span = hi - lo
    if span <= window:
        return [0.5 * (lo + hi) - 0.5 * window]
    n = math.ceil((span - overlap) / (window - overlap))
    return [lo + i * (window - overlap) for i in range(n)]


def tiles(
    extent: tuple[float, float, float, float], width: float, height: float, overlap: float
) -> list[Tile]:
    """Pages covering a drawing of the given extent (mm), left to right, then top to bottom."""
    xs = _starts(extent[0], extent[2], width, overlap)
    # rows run down from the top of the drawing (the top row is the first)
    ys = [
        extent[1] + extent[3] - y - height for y in _starts(extent[1], extent[3], height, overlap)
    ]
    return [
        Tile(x, y, width, height, i, j, len(xs), len(ys))
        for j, y in enumerate(ys)
        for i, x in enumerate(xs)
    ]


@dataclass(frozen=True)
class Cross:
    """An alignment cross (drawing mm) and its label: the position across the joint it marks,
    ``x`` along the chord from the LE for a joint between columns, ``y`` from the chord line
    for a joint between rows."""

    x: float
    y: float
    label: str
    label_above: bool


def alignment_crosses(
    t: SectionTemplate | FormerTemplate, page_tiles: list[Tile], overlap: float
) -> list[Cross]:
    """Two crosses in the middle of every overlap between neighbouring tiles, so each shows on
    both pages: beside the section's surfaces (a former's outline) at a joint between columns
    (clear of the outline where the tile allows), at a quarter and three quarters of the tile's
    width at a joint between rows. Labels name the template's axes (x, y of a section; y, z of
    a former) and the position in mm."""
    edge = 7.0  # keep a cross and its label this far inside the tile
    out: list[Cross] = []
    columns = sorted({tile.x0 for tile in page_tiles})
    rows = sorted({tile.y0 for tile in page_tiles})
    w, h = page_tiles[0].width, page_tiles[0].height
    for x_next in columns[1:]:
        xm = x_next + 0.5 * overlap
        yl, yu = t.surfaces_at(xm)
        for y0 in rows:
            lo, hi = y0 + edge, y0 + h - edge
            ys = sorted({min(max(y, lo), hi) for y in (yl - 15.0, yu + 15.0)})
            if ys[-1] - ys[0] < 20.0:
                ys = [lo, hi]
            mid = 0.5 * (yl + yu)
            out += [Cross(xm, y, f"{t.axes[0]} {xm:.1f}", y > mid) for y in ys]
    for y_below in rows[:-1]:
        ym = y_below + h - 0.5 * overlap
        for x0 in columns:
            out += [Cross(x0 + f * w, ym, f"{t.axes[1]} {ym:.1f}", True) for f in (0.25, 0.75)]
    return out


def clip_polyline(points, box: tuple[float, float, float, float]) -> list[np.ndarray]:
    """Pieces of a polyline inside the box (x0, y0, x1, y1), by Liang-Barsky per segment (all
    segments at once). A piece runs on over a vertex its segment reaches unclipped."""
    p = np.asarray(points, dtype=float)
    if len(p) < 2:
        return []
    lo, hi = p.min(axis=0), p.max(axis=0)
    if lo[0] >= box[0] and lo[1] >= box[1] and hi[0] <= box[2] and hi[1] <= box[3]:
        return [p.copy()]  # all inside: every segment whole, one piece
    gap = 1e-6  # clear of the box by more than this: every segment's t0 > 1 or t1 < 0
    if lo[0] > box[2] + gap or lo[1] > box[3] + gap or hi[0] < box[0] - gap or hi[1] < box[1] - gap:
        return []
    a, b = p[:-1], p[1:]
    d = b - a
    # the four edges as q t <= r (left, right, bottom, top)
    q = np.stack([-d[:, 0], d[:, 0], -d[:, 1], d[:, 1]], axis=1)
    r = np.stack([a[:, 0] - box[0], box[2] - a[:, 0], a[:, 1] - box[1], box[3] - a[:, 1]], axis=1)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = r / q
    t0 = np.max(np.where(q < 0.0, t, 0.0), axis=1)
    t1 = np.min(np.where(q > 0.0, t, 1.0), axis=1)
    kept = ~np.any((q == 0.0) & (r < 0.0), axis=1) & (t0 <= t1)
    a2 = np.where((t0 > 0.0)[:, None], a + t0[:, None] * d, a)
    b2 = np.where((t1 < 1.0)[:, None], a + t1[:, None] * d, b)
    # a segment goes on from the one before if that one was kept and ends (near enough,
    # np.allclose's tolerances) unclipped at the point where this one starts
    whole_end = kept & _close(b2, b)
    joins = np.zeros(len(a), dtype=bool)
    joins[1:] = kept[1:] & whole_end[:-1] & _close(b2[:-1], a2[1:])
    idx = np.flatnonzero(kept)
    starts = np.flatnonzero(~joins[idx])
    return [np.vstack([a2[seg[:1]], b2[seg]]) for seg in np.split(idx, starts[1:]) if len(seg)]


def _close(u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """Row-wise np.allclose(u_i, v_i, atol=1e-12) (its default rtol 1e-5), finite input."""
    return np.all(np.abs(u - v) <= 1e-12 + 1e-5 * np.abs(v), axis=1)


# --- PDF ----------------------------------------------------------------------------------------

_WIDTHS_PT = {
    "outline": 0.6,
    "chord": 0.35,
    "edge": 0.5,
    "hinge": 0.5,
    "spar": 0.5,
    "cross": 0.4,
    "bar": 0.6,
    "tick": 0.4,
    "waterline": 0.35,
    "centreline": 0.35,
    "centre": 0.4,
}
#: Dash patterns, in line widths (on, off, ...); other kinds are solid.
_DASHES = {
    "chord": (6, 2, 1, 2),
    "hinge": (4, 2),
    "spar": (1.5, 1.5),
    "waterline": (6, 2, 1, 2),
    "centreline": (10, 2, 2, 2),
}
#: Colours (RGB, 0..1) of lines and notes; others are black.
_COLOURS = {"hinge": (0xC0 / 255, 0.0, 0.0), "spar": (0.0, 0x40 / 255, 0xC0 / 255)}
_CROSS = 5.0  # half-length of an alignment cross's arms (mm)
#: One of the 14 standard PDF fonts (PDF 1.7, 9.6.2.2): every reader has it, nothing embedded.
_FONT = "Helvetica"


def write_template_pdf(layout: Layout, path: str | Path, dirs: tuple = ()) -> Path:
    """Every section template, then every fuselage former template (if the design has a
    fuselage), at true scale on the design's paper (A4 or Letter, portrait).

    A template larger than a page's drawing area is tiled over several pages that overlap by
    ``OVERLAP``; crosses in each overlap, labelled with their drawing position, show on both
    pages. Every page carries a 100 mm check bar, its label (template, tile i of n) and the
    caution. Output is deterministic: the PDF's creation and modification dates are
    :func:`geomgen.store.stamp.output_time` of the design, never the clock. Drawn with
    reportlab, imported here only."""
    from reportlab import rl_config
    from reportlab.pdfgen.canvas import Canvas

    path = Path(path)
    design = layout.sizing.design
    paper = design.drawings.paper
    width, height = PAPER_MM[paper]
    region = (MARGIN, MARGIN + FOOTER, width - MARGIN, height - MARGIN - HEADER)
    rw, rh = region[2] - region[0], region[3] - region[1]
    formers = former_templates(layout)
    templates = (*section_templates(layout, dirs), *formers)
    plans = []
    for t in templates:
        ext = t.extent(labels=False, pad=4.0)  # the page label names the template
        page_tiles = tiles(ext, rw, rh, OVERLAP)
        strokes = [
            (s.kind, np.array(s.points + ((s.points[0],) if s.closed else ()), dtype=float))
            for s in t.strokes
        ]
        plans.append((t, strokes, page_tiles, alignment_crosses(t, page_tiles, OVERLAP)))
    sheets = sum(len(p[2]) for p in plans)
    # PDF date (PDF 1.7, 7.9.4): D:YYYYMMDDHHmmSS and Z for UTC
    when = output_time(design).strftime("D:%Y%m%d%H%M%SZ")
    canvas = Canvas(
        str(path),
        pagesize=(width * PT_PER_MM, height * PT_PER_MM),
        pageCompression=1,
        invariant=1,  # no clock, no random file identifier
    )
    canvas.setDateFormatter(lambda *_: when)
    canvas.setTitle(
        f"{design.title}: {'section and former' if formers else 'section'} templates (1:1)"
    )
    canvas.setCreator("geomgen")
    canvas.setAuthor("")
    canvas.setSubject("")
    sheet = _Sheet(canvas, design.title, paper, (width, height), region)
    number = 0
    # page streams deflated only (reportlab's default adds an ASCII85 layer: 25 % larger and
    # slow to encode); the setting is read as each page is made
    a85, rl_config.useA85 = rl_config.useA85, 0
    try:
        for t, strokes, page_tiles, crosses in plans:
            for k, tile in enumerate(page_tiles, start=1):
                number += 1
                notes = _notes_on([n for n in t.notes if n.kind != "label"], tile, page_tiles)
                sheet.draw(t, strokes, tile, k, len(page_tiles), notes, crosses, number, sheets)
                canvas.showPage()
        canvas.save()
    finally:
        rl_config.useA85 = a85
    return path


def _notes_on(notes, tile: Tile, page_tiles: list[Tile]) -> list[Note]:
    """Notes a tile shows: those it holds whole (in an overlap: on both pages), and a note
    that no tile holds whole on the tile that holds its anchor."""
    window = (tile.x0, tile.y0, tile.x0 + tile.width, tile.y0 + tile.height)
    out = []
    for note in notes:
        box = note.box()
        if tile.contains(box) or (
            not any(other.contains(box) for other in page_tiles) and _inside(note.at, window)
        ):
            out.append(note)
    return out


class _Sheet:
    """Draws one page after another on a reportlab canvas: positions in page mm (from the
    lower-left corner of the paper), written in points (72 / 25.4 pt per mm)."""

    def __init__(self, canvas, title: str, paper: str, size: tuple[float, float], region):
        self.canvas = canvas
        self.title, self.paper, self.size, self.region = title, paper, size, region
        self.words = canvas.beginText()  # the page's text object, begun anew by draw
        self.font_size: float | None = None
        self.colour: tuple[float, float, float] | None = None

    def lines(self, polylines: list[np.ndarray], kind: str) -> None:
        """Polylines of one kind (page mm) stroked as one path, in a saved graphics state."""
        if not polylines:
            return
        c = self.canvas
        w = _WIDTHS_PT[kind]
        c.saveState()
        c.setLineWidth(w)
        c.setLineJoin(1)  # round joins; caps stay butt (PDF default)
        c.setStrokeColorRGB(*_COLOURS.get(kind, (0.0, 0.0, 0.0)))
        if kind in _DASHES:
            c.setDash([w * x for x in _DASHES[kind]], 0)
        p = c.beginPath()
        for q in polylines:
            (x, y), *rest = (np.asarray(q, dtype=float) * PT_PER_MM).tolist()
            p.moveTo(x, y)
            for x, y in rest:
                p.lineTo(x, y)
        c.drawPath(p, stroke=1, fill=0)
        c.restoreState()

    def text(self, x, y, text, height_mm, align="left", colour=(0.0, 0.0, 0.0)) -> None:
        """One line of text with its baseline at y (page mm); x its left end, middle or right
        end (align). Lines go into the page's one text object, written by :meth:`draw`."""
        size = height_mm * PT_PER_MM / 0.72  # letter height -> font size: capitals are 0.72 em
        words = self.words
        if size != self.font_size:
            words.setFont(_FONT, size)
            self.font_size = size
        if colour != self.colour:
            words.setFillColorRGB(*colour)
            self.colour = colour
        x = float(x) * PT_PER_MM
        if align != "left":
            w = self.canvas.stringWidth(text, _FONT, size)
            x -= 0.5 * w if align == "centre" else w
        words.setTextOrigin(x, float(y) * PT_PER_MM)
        words.textOut(text)

    def draw(self, t, strokes, tile, k, n, notes, crosses, number, sheets) -> None:
        """One page: the tile's strokes, crosses and notes, the page label, the check bar and
        the caution; every line of text in one text object, drawn last."""
        width, height = self.size
        self.words = self.canvas.beginText()
        self.font_size = self.colour = None  # set by the first line of text
        # drawing mm -> page mm
        shift = np.array([self.region[0] - tile.x0, self.region[1] - tile.y0])
        window = (tile.x0, tile.y0, tile.x0 + tile.width, tile.y0 + tile.height)
        by_kind: dict[str, list[np.ndarray]] = {}
        for kind, points in strokes:
            for piece in clip_polyline(points, window):
                by_kind.setdefault(kind, []).append(piece + shift)
        for cross in crosses:
            if _inside((cross.x, cross.y), window):
                c = np.array([cross.x, cross.y]) + shift
                by_kind.setdefault("cross", []).extend(
                    [c + [[-_CROSS, 0.0], [_CROSS, 0.0]], c + [[0.0, -_CROSS], [0.0, _CROSS]]]
                )
                y = c[1] + _CROSS + 1.0 if cross.label_above else c[1] - _CROSS - 1.0 - SMALL_TEXT
                self.text(c[0], y, cross.label, SMALL_TEXT, "centre")
        for kind, polylines in by_kind.items():
            self.lines(polylines, kind)
        for note in notes:
            x, y = np.array(note.at) + shift
            colour = _COLOURS.get(note.kind, (0.0, 0.0, 0.0))
            self.text(x, y, note.text, note.height, note.align, colour)

        # page label
        top = height - MARGIN
        head, detail, frame = t.page_lines()
        self.text(MARGIN, top - 3.5, f"{head}   tile {k} of {n}", 3.5)
        self.text(width - MARGIN, top - 3.5, f"sheet {number} of {sheets}", 2.4, "right")
        self.text(MARGIN, top - 8.0, detail, 2.2)
        self.text(MARGIN, top - 11.7, f"{frame}; {self.title}", 2.2)
        if n > 1:
            self.text(
                MARGIN,
                top - 15.4,
                f"column {tile.column + 1} of {tile.columns}, row "
                f"{tile.row + 1} of {tile.rows}: overlap the neighbouring tiles so that "
                f"crosses of equal {t.axes[0]} or {t.axes[1]} coincide",
                2.2,
            )

        # check bar with a tick every 10 mm, the print note, the caution
        y_bar, x_bar = MARGIN + FOOTER - 4.0, MARGIN
        self.lines([np.array([[x_bar, y_bar], [x_bar + CHECK_BAR, y_bar]])], "bar")
        ticks = [
            np.array([[x, y_bar], [x, y_bar + (3.0 if i % 5 == 0 else 1.5)]])
            for i, x in enumerate(x_bar + 10.0 * np.arange(11))
        ]
        self.lines(ticks, "tick")
        self.text(x_bar + CHECK_BAR + 3.0, y_bar, "100 mm", 3.0)
        note = f"print on {self.paper} at 100 % (actual size, no fit to page): the bar must measure"
        self.text(x_bar, y_bar - 4.5, note + " 100 mm", 2.2)
        y = y_bar - 9.0
        for line in textwrap.wrap(CAUTION, 135):
            self.text(MARGIN, y, line, 2.0)
            y -= 2.9
        self.canvas.drawText(self.words)


def _inside(p, box) -> bool:
    return box[0] <= p[0] <= box[2] and box[1] <= p[1] <= box[3]
