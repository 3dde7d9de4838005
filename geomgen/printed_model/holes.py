"""Where the printed model's holes go (pure math): the hole type, and the searches that keep
each hole's wall inside the material: the dowels at a surface joint, a wing half's spar bore
and the fuselage's sting bore.

Model frame as in `plan`: the aircraft frame (x aft, y right, z up) scaled by the model scale
k, in model millimetres: a full-size point p (m) sits at 1000 k p. The walls are measured in the
sections placed at the surface's stations, in their plane (x and z for a wing side, x and y for
the fin).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from geomgen.design import ModelSpec
from geomgen.geometry.frame import place
from geomgen.geometry.layout import Layout, SurfaceLayout, mean_line_offset
from geomgen.geometry.sections import placed_section

#: dowel holes run this much (mm) deeper than half the dowel on each side
DOWEL_CLEARANCE = 0.5
#: chord fractions tried for dowels
_DOWEL_FRACTIONS = np.linspace(0.06, 0.80, 75)


@dataclass(frozen=True)
class Hole:
    """A straight hole (model mm): round of diameter ``size``, or square of side ``size``
    with one pair of sides along ``up``."""

    kind: str  # dowel | spar | sting | hinge key
    start: tuple[float, float, float]
    end: tuple[float, float, float]
    size: float
    up: tuple[float, float, float] | None = None  # square holes only
    #: stretches (fractions of start -> end) that run through material, for the wall
    #: checks (a hinge key crosses its cove, a body's spar bore ends in a wing socket)
    solid: tuple[tuple[float, float], ...] = ((0.0, 1.0),)
    #: a hinge key: the stretch inside the moving part (between its side gaps)
    moving: tuple[float, float] | None = None

    @property
    def length(self) -> float:
        return math.dist(self.start, self.end)

    @property
    def section_area(self) -> float:
        return self.size**2 if self.up is not None else math.pi * self.size**2 / 4.0


# --- walls in a surface's sections -----------------------------------------------------------


def _scale_point(p, f: float) -> tuple[float, float, float]:
    return (float(p[0] * f), float(p[1] * f), float(p[2] * f))


def _axis(sl: SurfaceLayout, side: str) -> tuple[int, float, float]:
    """(axis, sign, offset m) of a surface side: stations s map to axis coordinate
    sign * (s + offset)."""
    if not sl.sizing.planform.symmetric:
        return 2, 1.0, sl.sizing.apex_z
    return 1, (1.0 if side == "right" else -1.0), 0.0


def _section_polygon(sl, side, s, spec_points, te, dirs, f):
    """The section at station s in its plane (model mm): (N, 2) closed polygon of the two
    in-plane coordinates (x and z for a wing side, x and y for the fin)."""
    sec = placed_section(sl.sizing, side, s, spec_points, te, dirs)
    ring = np.vstack([sec.upper, sec.lower[::-1][1:]]) * f
    return ring[:, [0, 1]] if not sl.sizing.planform.symmetric else ring[:, [0, 2]]


def _distance_to_polygon(poly: np.ndarray, q: np.ndarray) -> float:
    """Signed distance (mm) from q to a closed polygon's edges: positive inside."""
    a, b = poly, np.roll(poly, -1, axis=0)
    ab = b - a
    t = np.clip(
        np.einsum("ij,ij->i", q - a, ab) / np.maximum(np.einsum("ij,ij->i", ab, ab), 1e-30), 0, 1
    )
    d = np.linalg.norm(a + t[:, None] * ab - q, axis=1).min()
    straddle = (a[:, 1] > q[1]) != (b[:, 1] > q[1])
    with np.errstate(divide="ignore", invalid="ignore"):
        xc = a[:, 0] + (q[1] - a[:, 1]) * ab[:, 0] / ab[:, 1]
    inside = np.count_nonzero(straddle & (xc > q[0])) % 2 == 1
    return float(d if inside else -d)


def _in_plane(sl: SurfaceLayout, p) -> np.ndarray:
    return np.array([p[0], p[1]]) if not sl.sizing.planform.symmetric else np.array([p[0], p[2]])


def _dowel_fractions(sl, side, s, spec, f, te, dirs, points, spar) -> list[float]:
    """Chord fractions of the dowels at a joint: the first and last fractions where the
    dowel keeps its wall inside the sections along its hole (ahead of any control surface's
    cove), clear of the spar bore."""
    ss = sl.sizing
    # the dowel runs straight along the span axis: its wall is checked in the joint's
    # section and in the sections at both ends of its hole
    reach = (spec.dowel_length * 500.0 + DOWEL_CLEARANCE) / f
    ends = [max(sl.mount_s, s - reach), s, min(ss.planform.semi_span, s + reach)]
    polys = [_section_polygon(sl, side, v, points, te, dirs, f) for v in ends]
    r = spec.dowel_diameter * 500.0
    need = r + spec.min_wall * 1000.0
    chord = ss.planform.at(s)[1] * f
    aft_limit = 0.80
    for c in (c for c in sl.controls if c.side == side):
        if c.s_start - 1e-9 <= s <= c.s_end + 1e-9:
            hinge = np.interp(s, [h.s for h in c.hinge], [h.chord_fraction for h in c.hinge])
            aft_limit = min(aft_limit, hinge - 0.10)
    ok = []
    for fr in _DOWEL_FRACTIONS:
        if fr > aft_limit:
            break
        p = place(ss, side, s, np.array([[fr, mean_line_offset(ss, s, fr, dirs)]]))[0] * f
        q = _in_plane(sl, p)
        if min(_distance_to_polygon(poly, q) for poly in polys) < need:
            continue
        if (
            spar is not None
            and abs(fr - spec.spar_at) * chord < r + spec.spar_diameter * 500 + need
        ):
            continue
        ok.append(float(fr))
    if not ok:
        return []
    if len(ok) == 1 or (ok[-1] - ok[0]) * chord < 2 * r + spec.min_wall * 1000.0:
        return [ok[0]]
    return [ok[0], ok[-1]]


def _spar_bore(sl, side, spec, f, te, dirs, start, end, points) -> Hole | None:
    """A straight spar bore from the root face outboard, at ``spar_at`` on the mean line,
    as far out as it keeps its wall (checked at stations along it)."""
    ss = sl.sizing
    r = spec.spar_diameter * 500.0
    need = r + spec.min_wall * 1000.0
    axis, sign, offset = _axis(sl, side)
    s0 = sl.mount_s
    p0 = (
        place(
            ss, side, s0, np.array([[spec.spar_at, mean_line_offset(ss, s0, spec.spar_at, dirs)]])
        )[0]
        * f
    )
    semi = ss.planform.semi_span
    for s1 in np.linspace(semi * 0.95, s0 + 0.1 * (semi - s0), 18):
        p1 = (
            place(
                ss,
                side,
                s1,
                np.array([[spec.spar_at, mean_line_offset(ss, s1, spec.spar_at, dirs)]]),
            )[0]
            * f
        )
        good = True
        for t in np.linspace(0.0, 1.0, 9):
            s = s0 + t * (s1 - s0)
            q = _in_plane(sl, p0 + t * (p1 - p0))
            if _distance_to_polygon(_section_polygon(sl, side, s, points, te, dirs, f), q) < need:
                good = False
                break
        if good:
            direction = (p1 - p0) / np.linalg.norm(p1 - p0)
            begin = p0 - direction * 2.0  # opens at the root face
            total = float(np.linalg.norm(p1 - begin))
            return Hole(
                "spar",
                _scale_point(begin, 1.0),
                _scale_point(p1, 1.0),
                r * 2,
                solid=((2.5 / total, 1.0),),
            )
    return None


# --- fuselage ---------------------------------------------------------------------------------


def _sting(layout: Layout, spec: ModelSpec, f: float) -> Hole:
    """The sting bore: forward along x from the body's tail end on its centre line, or up
    from the body's bottom at the wing's MGC quarter chord."""
    body = layout.body
    assert body is not None
    size = spec.sting_diameter * 1000.0
    depth = spec.sting_depth * 1000.0
    if spec.sting_axis == "x":
        tail = body[-1]
        x1 = tail.x * f
        return Hole("sting", (x1 + 2.0, 0.0, tail.z * f), (x1 - depth, 0.0, tail.z * f), size)
    from geomgen.geometry.body_side import body_loops

    x = layout.sizing.wing.mgc_quarter_chord[0]
    loops, _ = body_loops(body, np.array([x]))
    bottom = loops[0][:, 1].min() * f
    return Hole("sting", (x * f, 0.0, bottom - 2.0), (x * f, 0.0, bottom + depth), size)


__all__ = [
    "DOWEL_CLEARANCE",
    "Hole",
]
