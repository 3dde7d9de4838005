"""The fuselage at any station, and where a surface's sections meet it (pure numpy).

Frame: aircraft frame (x aft, y right, z up), metres. Spanwise station ``s`` as in the
planform (a wing or horizontal-tail half: |y|; the fin: its height above its apex).
Used by the layout (control surfaces placed from the body side), the junction (mounting,
exposed areas) and the checks.
"""

from __future__ import annotations

import numpy as np

from geomgen.design import BodyStation
from geomgen.geometry.frame import place_each
from geomgen.shapes import fuselage
from geomgen.sizing.aircraft import SurfaceSizing

#: loop points of the body sections used here (the body loft uses the same blend of stations)
LOOP_POINTS = 256


def body_loops(stations: tuple[BodyStation, ...], xq: np.ndarray, n: int = LOOP_POINTS):
    """Closed section loops of the body at each x in ``xq``: (len(xq), n, 2) (y, z), m, and a
    mask of the x that lie within the body's length."""
    xq = np.asarray(xq, dtype=float)
    x0, x1 = stations[0].x, stations[-1].x
    within = (xq >= x0) & (xq <= x1)
    _, loops, _ = fuselage._blend(stations, np.clip(xq, x0, x1), False, n, slopes=False)
    return loops, within


def _crossings(loops: np.ndarray, along: int, at: np.ndarray) -> np.ndarray:
    """Greatest coordinate ``along`` (0: y, 1: z) where each loop crosses the line on which
    the other coordinate equals ``at`` (one value per loop); NaN where it does not cross."""
    other = 1 - along
    a, b = loops, np.roll(loops, -1, axis=1)
    ca, cb = a[..., other] - at[:, None], b[..., other] - at[:, None]
    crosses = (ca <= 0.0) != (cb <= 0.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        t = ca / (ca - cb)
    value = a[..., along] + t * (b[..., along] - a[..., along])
    value = np.where(crosses, value, -np.inf)
    best = value.max(axis=1)
    return np.where(np.isfinite(best), best, np.nan)


def contains(stations: tuple[BodyStation, ...], points: np.ndarray) -> np.ndarray:
    """Whether each point (N, 3), m, lies inside the body: within its length and inside the
    section loop at its x (even-odd rule)."""
    pts = np.asarray(points, dtype=float).reshape(-1, 3)
    if len(pts) == 0:
        return np.zeros(0, dtype=bool)
    loops, within = body_loops(stations, pts[:, 0])
    y, z = pts[:, 1][:, None], pts[:, 2][:, None]
    a, b = loops, np.roll(loops, -1, axis=1)
    straddle = (a[..., 1] > z) != (b[..., 1] > z)
    with np.errstate(invalid="ignore", divide="ignore"):
        y_cross = a[..., 0] + (z - a[..., 1]) * (b[..., 0] - a[..., 0]) / (b[..., 1] - a[..., 1])
    inside = (np.count_nonzero(straddle & (y_cross > y), axis=1) % 2) == 1
    return inside & within


def station_of(ss: SurfaceSizing, side: str, points: np.ndarray) -> np.ndarray:
    """Spanwise station of aircraft-frame points (N, 3) on a surface side (m)."""
    if not ss.planform.symmetric:
        return points[:, 2] - ss.apex_z
    return points[:, 1] if side == "right" else -points[:, 1]


def body_side(
    ss: SurfaceSizing, stations: tuple[BodyStation, ...], unit: np.ndarray, guess: np.ndarray
) -> np.ndarray:
    """Station s at which each unit-chord point (x/c, y/c) of the section placed at s lies on
    the body surface (right side of a symmetric surface), by fixed-point iteration: placing
    the section moves it only slightly out of its plane as s changes (dihedral, taper)."""
    fin = not ss.planform.symmetric
    side = "centre" if fin else "right"
    s = guess.astype(float).copy()
    for _ in range(6):
        pts = place_each(ss, side, s, unit)
        loops, within = body_loops(stations, pts[:, 0])
        if fin:  # the body's top above the point's butt line
            found = _crossings(loops, 1, pts[:, 1]) - ss.apex_z
        else:  # the body's side at the point's water line
            found = _crossings(loops, 0, pts[:, 2])
        found = np.where(within, found, np.nan)
        if np.all(np.isnan(found)):
            break
        done = np.nanmax(np.abs(found - s)) < 1e-7
        s = np.where(np.isnan(found), s, found)
        if done:
            break
    result = np.where(np.isnan(found), np.nan, s)
    lost = np.isnan(result)
    if np.any(lost):
        result[lost] = _body_side_by_halving(ss, stations, side, unit[lost], guess[lost])
    return result


#: halvings of the station interval when the fixed point loses a point (1e-12 of the span)
_HALVINGS = 45


def _body_side_by_halving(
    ss: SurfaceSizing, stations: tuple[BodyStation, ...], side: str, unit, guess
) -> np.ndarray:
    """The body side of points the fixed point lost (m): a steep dihedral carries a point over
    the body's top between two steps, where no side crossing exists at its water line. A point
    inside the body at its guess and outside at the tip is halved to where it leaves the body
    (through the side or the top); any other point has no body side (NaN)."""
    lo = np.asarray(guess, dtype=float).copy()
    hi = np.full(len(lo), ss.planform.semi_span)
    inside_lo = contains(stations, place_each(ss, side, lo, unit))
    inside_hi = contains(stations, place_each(ss, side, hi, unit))
    ok = inside_lo & ~inside_hi
    for _ in range(_HALVINGS):
        mid = 0.5 * (lo + hi)
        inside = contains(stations, place_each(ss, side, mid, unit))
        lo = np.where(inside, mid, lo)
        hi = np.where(inside, hi, mid)
    return np.where(ok, 0.5 * (lo + hi), np.nan)
