"""The paper and pens of the three-view sheet, and the drawing primitives used on it.

One A3 landscape sheet; every position is in millimetres of paper from the sheet's lower-left
corner (:data:`Page`), every aircraft-frame point in metres (:data:`Point`; x aft, y right,
z up). :class:`Sheet` wraps one matplotlib Axes whose data unit is the paper millimetre; the
Axes and matplotlib's ``patches`` module are handed in, so this module imports no matplotlib.
Line widths are in typographic points, as matplotlib takes them.
"""

from __future__ import annotations

from typing import Any

Point = tuple[float, float, float]
Page = tuple[float, float]  # paper position, mm from the sheet's lower-left corner

#: ISO 216 A3, landscape (mm).
PAPER_NAME, PAPER_W, PAPER_H = "A3", 420.0, 297.0
MARGIN = 10.0  # border frame inset from the paper edge (mm)
COLUMN_W = 128.0  # right-hand column: coordinate table, legend, scale bar, title block
GUTTER = 8.0
PT = 25.4 / 72.0  # mm per typographic point

INK = "#000000"
GREY = "#555555"
FILL = "#e6e6e6"
LW_OUTLINE = 0.5 / PT  # line widths in points (0.5, 0.35, 0.18 mm)
LW_MEDIUM = 0.35 / PT
LW_THIN = 0.18 / PT
ARROW = (2.2, 0.45)  # dimension arrowhead length and half-width (mm)
#: white box behind a text, so lines passing under it break there
MASK = {"boxstyle": "square,pad=0.12", "facecolor": "white", "edgecolor": "none"}


# --- drawing primitives (paper mm) ----------------------------------------------------------------


class Sheet:
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
        self.text(mid, text, ha="center", va="bottom", gid=f"{gid}-value", zorder=5.0, bbox=MASK)


def quarter_symbol(sheet: Sheet, p: Page, gid: str | None) -> None:
    sheet.marker(p, gid=gid, size=5.0, marker="o", face="white", edge=INK, z=4.5)
    sheet.marker(p, size=5.0, marker="+", face="none", edge=INK, z=4.6)


def signed(v: float, digits: int) -> str:
    text = f"{v:.{digits}f}"
    if float(text) == 0.0:
        text = f"{0.0:.{digits}f}"  # no "-0.000"
    return text.replace("-", "\u2212")
