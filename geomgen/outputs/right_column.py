"""The right-hand column of the three-view sheet: the corner-point table, the key to lines, the
scale bar and the title block, stacked from the top edge of the frame down to its lower right
corner (paper mm from the sheet's lower-left corner). Lengths are written in the output unit
(m or ft) of the units system asked for; the scale is the sheet's ratio 1:n.
"""

from __future__ import annotations

import textwrap
from pathlib import Path

from geomgen import __version__
from geomgen.design.units import to_output
from geomgen.geometry.layout import PART_NAMES, Layout, corner_labels
from geomgen.outputs.report import CAUTION
from geomgen.outputs.sheet import (
    COLUMN_W,
    FILL,
    GREY,
    INK,
    LW_MEDIUM,
    LW_OUTLINE,
    LW_THIN,
    MARGIN,
    PAPER_H,
    PAPER_NAME,
    PAPER_W,
    PT,
    Sheet,
    quarter_symbol,
    signed,
)


def right_column(sheet: Sheet, layout: Layout, units: str, n: int) -> None:
    u0 = PAPER_W - MARGIN - COLUMN_W
    u1 = PAPER_W - MARGIN
    title_top = _title_block(sheet, layout, units, n, u0, u1)
    scale_top = _scale_bar(sheet, units, n, u0, title_top + 4.0)
    legend_top = _legend(sheet, u0, scale_top + 3.0)
    _table(sheet, layout, units, u0, u1, legend_top + 4.0, PAPER_H - MARGIN)


def _table(sheet: Sheet, layout: Layout, units: str, u0, u1, v_bottom, v_top) -> None:
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
            text = signed(to_output(c.point[j], "length", units)[0], 3)
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


def _legend(sheet: Sheet, u0: float, v_bottom: float) -> float:
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
            quarter_symbol(sheet, (u + 2.5, v), None)
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


def _scale_bar(sheet: Sheet, units: str, n: int, u0: float, v: float) -> float:
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


def _title_block(sheet: Sheet, layout: Layout, units: str, n: int, u0: float, u1: float) -> float:
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
