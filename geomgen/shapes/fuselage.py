"""The fuselage as a body of cross-sections along x (numpy, no CAD).

A body is a list of stations from nose to tail (``BodyStation``: x, full width and height, the
water line of the section centre and a section shape). Between stations the body is the blend
of the station loops with the weights of a natural cubic spline in x (``ruled=True``: straight
lines between neighbouring stations). Every section shape used here is linear in its sizes at a
fixed loop parameter, so a blend of stations of one shape is that shape with blended sizes, and
its area and perimeter come from closed forms: the solid lofted through the same loops can be
checked against integrals that do not go through the CAD kernel.

Frame: the aircraft frame (x aft, y right, z up), metres. Loops start on the right (+y) at the
centre height and run towards +z.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from geomgen.design import BodyStation, FuselageSpec, ParametricBody

__all__ = [
    "BodyStation",
    "LoftSection",
    "end_face_area",
    "expand",
    "loft_sections",
    "section_area",
    "section_perimeter",
    "section_points",
    "tail_cone_radii",
    "volume_by_sections",
    "wetted_area_by_perimeters",
]

#: Simpson intervals per station interval for the integrals along x (even)
_STEPS = 24
#: loop points used for the slope factor of the wetted area and for blends of unlike shapes
_LOOP = 512
#: a smooth loft has a section at least every 1/_LOFT_STEPS of the body length
_LOFT_STEPS = 24


# --- one section --------------------------------------------------------------------------------


def is_point(st: BodyStation) -> bool:
    """A station of zero width and height: a pointed nose or tail."""
    return st.width == 0.0 and st.height == 0.0


def _family(st: BodyStation) -> tuple[str, float] | None:
    """Stations of one family blend into that family (None: a point, which blends with any)."""
    if is_point(st):
        return None
    if st.shape == "rounded_rectangle":
        return ("rounded_rectangle", 0.0)
    return ("superellipse", 2.0 if st.shape == "ellipse" else st.exponent)


def ramanujan_perimeter(a: float, b: float) -> float:
    """Perimeter of an ellipse of semi-axes a, b: Ramanujan's second approximation,
    pi (a + b) (1 + 3h / (10 + sqrt(4 - 3h))), h = ((a - b) / (a + b))^2 (exact for a circle)."""
    if a + b == 0.0:
        return 0.0
    h = ((a - b) / (a + b)) ** 2
    return math.pi * (a + b) * (1.0 + 3.0 * h / (10.0 + math.sqrt(4.0 - 3.0 * h)))


def superellipse_area(a: float, b: float, n: float) -> float:
    """Area inside |y/a|^n + |z/b|^n = 1: 4ab Gamma(1 + 1/n)^2 / Gamma(1 + 2/n)."""
    return 4.0 * a * b * math.gamma(1.0 + 1.0 / n) ** 2 / math.gamma(1.0 + 2.0 / n)


_GL_NODES, _GL_WEIGHTS = np.polynomial.legendre.leggauss(64)


def superellipse_perimeter(a: float, b: float, n: float) -> float:
    """Perimeter of |y/a|^n + |z/b|^n = 1 by Gauss-Legendre quadrature. Each quarter is split
    at its diagonal point y/a = z/b; on either side the curve is a graph whose slope stays
    finite (y as a function of z near the y axis, z of y near the z axis)."""
    if a == 0.0 or b == 0.0:
        return 2.0 * (a + b) * 2.0
    c = 2.0 ** (-1.0 / n)

    def graph_length(p: float, q: float) -> float:
        # length of w = q (1 - (v/p)^n)^(1/n) for v in [0, c p], split into 8 Gauss panels
        total = 0.0
        edges = np.linspace(0.0, c * p, 9)
        for lo, hi in zip(edges[:-1], edges[1:], strict=True):
            v = 0.5 * (hi - lo) * _GL_NODES + 0.5 * (hi + lo)
            u = v / p
            slope = q / p * (1.0 - u**n) ** (1.0 / n - 1.0) * u ** (n - 1.0)
            total += 0.5 * (hi - lo) * float(_GL_WEIGHTS @ np.sqrt(1.0 + slope**2))
        return total

    return 4.0 * (graph_length(b, a) + graph_length(a, b))


def superellipse_perimeters(a: np.ndarray, b: np.ndarray, n: float) -> np.ndarray:
    """``superellipse_perimeter`` for arrays of semi-axes at one exponent, all at once (the
    same quadrature, vectorised: the body's integrals call it at every grid point)."""
    a = np.asarray(a, dtype=float)
    b = np.asarray(b, dtype=float)
    out = 4.0 * (a + b)  # degenerate sections: twice the flat length, as the scalar form
    ok = (a > 0.0) & (b > 0.0)
    if not np.any(ok):
        return out
    c = 2.0 ** (-1.0 / n)

    def graph_length(p: np.ndarray, q: np.ndarray) -> np.ndarray:
        edges = np.linspace(0.0, 1.0, 9)[None, :] * (c * p)[:, None]  # (N, 9)
        lo, hi = edges[:, :-1, None], edges[:, 1:, None]  # (N, 8, 1)
        v = 0.5 * (hi - lo) * _GL_NODES + 0.5 * (hi + lo)  # (N, 8, 64)
        u = v / p[:, None, None]
        slope = (q / p)[:, None, None] * (1.0 - u**n) ** (1.0 / n - 1.0) * u ** (n - 1.0)
        return (0.5 * (hi - lo)[..., 0] * (np.sqrt(1.0 + slope**2) @ _GL_WEIGHTS)).sum(axis=1)

    out[ok] = 4.0 * (graph_length(b[ok], a[ok]) + graph_length(a[ok], b[ok]))
    return out


def section_area(st: BodyStation) -> float:
    """Area of a station's section (m^2), closed form."""
    a, b = st.width / 2.0, st.height / 2.0
    if st.shape == "rounded_rectangle":
        r = st.corner_radius
        return 4.0 * a * b - (4.0 - math.pi) * r * r
    if st.shape == "superellipse":
        return superellipse_area(a, b, st.exponent)
    return math.pi * a * b


def section_perimeter(st: BodyStation) -> float:
    """Perimeter of a station's section (m): Ramanujan's second approximation for an ellipse,
    quadrature for a super-ellipse, closed form for a rounded rectangle."""
    a, b = st.width / 2.0, st.height / 2.0
    if st.shape == "rounded_rectangle":
        r = st.corner_radius
        return 4.0 * (a + b) - (8.0 - 2.0 * math.pi) * r
    if st.shape == "superellipse":
        return superellipse_perimeter(a, b, st.exponent)
    return ramanujan_perimeter(a, b)


@lru_cache(maxsize=64)
def _unit_superellipse(n: float, count: int) -> tuple[np.ndarray, np.ndarray]:
    """(cos-like, sin-like) of ``count`` points on |u|^n + |v|^n = 1, equally spaced in arc
    length, starting at (1, 0) and running towards +v. For n = 2: cos t, sin t."""
    s = np.arange(count) / count
    if n == 2.0:
        return np.cos(2 * np.pi * s), np.sin(2 * np.pi * s)
    # first quarter as a dense polyline from (1, 0) to (0, 1), then arc-length resampling
    t = np.linspace(0.0, np.pi / 2, 4001)
    # a parameter that keeps the points spread: the polar angle of the curve
    cos_t, sin_t = np.cos(t), np.sin(t)
    rad = (np.abs(cos_t) ** n + np.abs(sin_t) ** n) ** (-1.0 / n)
    u, v = rad * cos_t, rad * sin_t
    length = np.concatenate([[0.0], np.cumsum(np.hypot(np.diff(u), np.diff(v)))])
    length /= length[-1]
    q = 4.0 * s
    quarter = np.floor(q).astype(int)
    f = q - quarter
    uu, vv = np.interp(f, length, u), np.interp(f, length, v)
    # quarters 1-3: (u, v) -> (-v, u) is a quarter turn, and the unit curve is symmetric
    cu = np.choose(quarter, [uu, -vv, -uu, vv])
    cv = np.choose(quarter, [vv, uu, -vv, -uu])
    return cu, cv


Shares = tuple[float, float, float]


def rr_shares(st: BodyStation) -> Shares:
    """How a rounded rectangle's loop parameter is shared, in each quarter, between the half
    side, the corner arc and the half top: in proportion to their lengths, so the loop points
    are equally spaced along the curve (a spline through them then follows it closely)."""
    a, b, r = st.width / 2.0, st.height / 2.0, st.corner_radius
    lengths = (b - r, 0.5 * math.pi * r, a - r)
    total = sum(lengths)
    return tuple(x / total for x in lengths)  # type: ignore[return-value]


def body_shares(stations: tuple[BodyStation, ...]) -> Shares | None:
    """The parameter shares used for every rounded-rectangle loop of a body: those of its
    largest rounded-rectangle section, so that loops of one body correspond point by point
    (None: the body has no rounded-rectangle section)."""
    boxes = [s for s in stations if s.shape == "rounded_rectangle" and not is_point(s)]
    return rr_shares(max(boxes, key=section_area)) if boxes else None


@lru_cache(maxsize=64)
def _rr_basis(count: int, shares: Shares) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Loop of a rounded rectangle as y = a Ua + r Ur, z = b Vb + r Vr at fixed parameters:
    linear in the half-width a, half-height b and corner radius r."""
    s = np.arange(count) / count
    q = 4.0 * s
    quarter = np.floor(q).astype(int)
    f = q - quarter
    # in quarters 1 and 3 the first quarter is run backwards (mirror images), in 0 and 2 forwards
    g = np.where(quarter % 2 == 1, 1.0 - f, f)
    ua, ur, vb, vr = _rr_first_quarter(g, shares)
    sy = np.where((quarter == 1) | (quarter == 2), -1.0, 1.0)
    sz = np.where(quarter >= 2, -1.0, 1.0)
    return sy * ua, sy * ur, sz * vb, sz * vr


def _rr_first_quarter(f: np.ndarray, shares: Shares) -> tuple[np.ndarray, ...]:
    """First quarter, (a, 0) to (0, b), for f in [0, 1]: up the half side, round the corner
    arc, along the half top, each over its share of f."""
    f_side, f_arc, _ = shares
    ua, ur, vb, vr = (np.zeros(f.shape) for _ in range(4))
    side, top = f < f_side, f >= f_side + f_arc
    arc = ~side & ~top
    g = f[side] / f_side  # up the half side: (a, (b - r) g)
    ua[side], vb[side], vr[side] = 1.0, g, -g
    phi = (f[arc] - f_side) / f_arc * (0.5 * np.pi)  # corner: (a - r + r cos, b - r + r sin)
    ua[arc], ur[arc] = 1.0, np.cos(phi) - 1.0
    vb[arc], vr[arc] = 1.0, np.sin(phi) - 1.0
    g = (f[top] - f_side - f_arc) / (1.0 - f_side - f_arc)  # half top: ((a - r)(1 - g), b)
    ua[top], ur[top], vb[top] = 1.0 - g, -(1.0 - g), 1.0
    return ua, ur, vb, vr


def _loop_yz(st: BodyStation, n: int, shares: Shares | None = None) -> np.ndarray:
    """(n, 2) loop of a station relative to its centre: y, z."""
    a, b = st.width / 2.0, st.height / 2.0
    if st.shape == "rounded_rectangle":
        if shares is None:
            shares = rr_shares(st) if not is_point(st) else (0.25, 0.5, 0.25)
        ua, ur, vb, vr = _rr_basis(n, tuple(float(x) for x in shares))
        r = st.corner_radius
        return np.column_stack([a * ua + r * ur, b * vb + r * vr])
    cu, cv = _unit_superellipse(2.0 if st.shape == "ellipse" else float(st.exponent), n)
    return np.column_stack([a * cu, b * cv])


def section_points(st: BodyStation, n: int, shares: Shares | None = None) -> np.ndarray:
    """(n, 3) closed loop of a station in the aircraft frame (m), the first point not repeated:
    x constant, starting at the right (+y) at the centre height, running towards +z. Loops of
    one shape with the same n (and, for rounded rectangles, the same ``shares``: default the
    station's own, ``body_shares`` within a body) correspond point by point, so a blend of them
    is the same shape with blended sizes."""
    yz = _loop_yz(st, n, shares)
    return np.column_stack([np.full(n, st.x), yz[:, 0], yz[:, 1] + st.z])


# --- the body between stations --------------------------------------------------------------


@lru_cache(maxsize=16)
def _spline_matrix(xs: tuple[float, ...]) -> np.ndarray:
    """S (n, n): the natural cubic spline's second derivatives at the stations, M = S @ values
    (zero rows at both ends). Cached per set of stations (read-only)."""
    n = len(xs)
    h = np.diff(np.array(xs))
    # second derivatives M = S @ values: h[i-1] M[i-1] + 2 (h[i-1] + h[i]) M[i] + h[i] M[i+1]
    # = 6 ((y[i+1] - y[i]) / h[i] - (y[i] - y[i-1]) / h[i-1]), M[0] = M[n-1] = 0
    lhs = np.zeros((n - 2, n - 2))
    rhs = np.zeros((n - 2, n))
    for k, i in enumerate(range(1, n - 1)):
        lhs[k, k] = 2.0 * (h[i - 1] + h[i])
        if k > 0:
            lhs[k, k - 1] = h[i - 1]
        if k < n - 3:
            lhs[k, k + 1] = h[i]
        rhs[k, i + 1] += 6.0 / h[i]
        rhs[k, i] -= 6.0 / h[i] + 6.0 / h[i - 1]
        rhs[k, i - 1] += 6.0 / h[i - 1]

    S = np.zeros((n, n))
    S[1:-1] = np.linalg.solve(lhs, rhs)
    S.flags.writeable = False
    return S


def _weights(
    xs: np.ndarray, xq: np.ndarray, ruled: bool, idx: np.ndarray | None = None
) -> tuple[np.ndarray, np.ndarray]:
    """Weights W (len(xq), len(xs)) and their x-derivatives such that W @ values interpolates
    station values at xq: a natural cubic spline in x (zero second derivative at both ends;
    linear in the values, so loops blend point by point), or straight lines if ``ruled``.
    ``idx``: the station interval of each xq (a ruled body has two slopes at a station)."""
    n = len(xs)
    h = np.diff(xs)
    if idx is None:
        idx = np.clip(np.searchsorted(xs, xq, side="right") - 1, 0, n - 2)
    hi = h[idx]
    B = (xq - xs[idx]) / hi
    A = 1.0 - B
    rows = np.arange(len(xq))
    W = np.zeros((len(xq), n))
    dW = np.zeros((len(xq), n))
    W[rows, idx] += A
    W[rows, idx + 1] += B
    dW[rows, idx] -= 1.0 / hi
    dW[rows, idx + 1] += 1.0 / hi
    if ruled or n < 3:
        return W, dW
    S = _spline_matrix(tuple(xs.tolist()))
    c_a = ((A**3 - A) * hi**2 / 6.0)[:, None]
    c_b = ((B**3 - B) * hi**2 / 6.0)[:, None]
    W += c_a * S[idx] + c_b * S[idx + 1]
    dW += (-(3 * A**2 - 1) * hi / 6.0)[:, None] * S[idx] + ((3 * B**2 - 1) * hi / 6.0)[:, None] * S[
        idx + 1
    ]
    return W, dW


def _grid(stations: tuple[BodyStation, ...], steps: int) -> tuple[np.ndarray, np.ndarray]:
    """``steps`` + 1 points over each station interval, (intervals, steps + 1), and the
    interval of each point."""
    xs = np.array([s.x for s in stations])
    grid = np.array([np.linspace(a, b, steps + 1) for a, b in zip(xs[:-1], xs[1:], strict=True)])
    return grid, np.repeat(np.arange(len(xs) - 1), steps + 1)


def _simpson(values: np.ndarray, grid: np.ndarray) -> float:
    """Composite Simpson over every row of a (intervals, steps + 1) grid, summed."""
    h = (grid[:, -1] - grid[:, 0]) / (grid.shape[1] - 1)
    inner = 4.0 * values[:, 1:-1:2].sum(axis=1) + 2.0 * values[:, 2:-1:2].sum(axis=1)
    return float((h / 3.0 * (values[:, 0] + values[:, -1] + inner)).sum())


@lru_cache(maxsize=16)
def _station_loops(stations: tuple[BodyStation, ...], loops: int) -> np.ndarray:
    """The stations' loops (n, loops, 2) (y, z), m, in corresponding points (read-only)."""
    shares = body_shares(stations)
    out = np.stack([_loop_yz(s, loops, shares) + np.array([0.0, s.z]) for s in stations])
    out.flags.writeable = False
    return out


def _blend(
    stations: tuple[BodyStation, ...],
    xq: np.ndarray,
    ruled: bool,
    loops: int,
    idx: np.ndarray | None = None,
    slopes: bool = True,
) -> tuple[np.ndarray, np.ndarray, np.ndarray | None]:
    """Station weights at xq and the blended loops (len(xq), loops, 2) (y, z) with their
    x-derivatives (None unless ``slopes``)."""
    xs = np.array([s.x for s in stations])
    W, dW = _weights(xs, xq, ruled, idx)
    station_loops = _station_loops(tuple(stations), loops)  # (n, loops, 2)
    return (
        W,
        np.einsum("qk,kpj->qpj", W, station_loops),
        np.einsum("qk,kpj->qpj", dW, station_loops) if slopes else None,
    )


def _sizes_and_family(
    stations: tuple[BodyStation, ...], W: np.ndarray
) -> tuple[tuple[str, float] | None, np.ndarray, np.ndarray, np.ndarray]:
    """The one family of every non-point station (None if they differ) and the blended
    half-width, half-height and corner radius."""
    families = {f for f in map(_family, stations) if f is not None}
    family = families.pop() if len(families) == 1 else None
    a = W @ np.array([s.width / 2.0 for s in stations])
    b = W @ np.array([s.height / 2.0 for s in stations])
    r = W @ np.array([s.corner_radius for s in stations])
    return family, a, b, r


def _slope_factor(loop: np.ndarray, dloop: np.ndarray) -> np.ndarray:
    """Mean over each loop (weighted by arc length) of sqrt(1 + v_n^2), v_n being the outward
    speed of the section curve per unit x: the surface element is sqrt(1 + v_n^2) ds dx, as
    |dp/ds x dp/dx|^2 = |t|^2 + (t_y dz/dx - t_z dy/dx)^2 for p = (x, y(s, x), z(s, x))."""
    t = 0.5 * (np.roll(loop, -1, axis=1) - np.roll(loop, 1, axis=1))
    speed = np.hypot(t[..., 0], t[..., 1])
    cross = t[..., 0] * dloop[..., 1] - t[..., 1] * dloop[..., 0]
    total = speed.sum(axis=1)
    weighted = np.sqrt(speed**2 + cross**2).sum(axis=1)
    return np.divide(weighted, total, out=np.ones_like(total), where=total > 0.0)


def _shoelace(loop: np.ndarray) -> np.ndarray:
    y, z = loop[..., 0], loop[..., 1]
    return 0.5 * np.abs((y * np.roll(z, -1, axis=-1) - np.roll(y, -1, axis=-1) * z).sum(axis=-1))


def _polyline(loop: np.ndarray) -> np.ndarray:
    d = np.roll(loop, -1, axis=1) - loop
    return np.hypot(d[..., 0], d[..., 1]).sum(axis=1)


def _areas(family, a, b, r, loop) -> np.ndarray:
    if family is None:  # unlike shapes blend into none of them: the polygon of the blend
        return _shoelace(loop)
    if family[0] == "rounded_rectangle":
        return 4.0 * a * b - (4.0 - math.pi) * r * r
    return np.array([superellipse_area(p, q, family[1]) for p, q in zip(a, b, strict=True)])


def _perimeters(family, a, b, r, loop) -> np.ndarray:
    if family is None:
        return _polyline(loop)
    if family[0] == "rounded_rectangle":
        return 4.0 * (a + b) - (8.0 - 2.0 * math.pi) * r
    if family[1] == 2.0:
        return np.array([ramanujan_perimeter(p, q) for p, q in zip(a, b, strict=True)])
    return superellipse_perimeters(a, b, family[1])


def volume_by_sections(stations: tuple[BodyStation, ...], ruled: bool = False) -> float:
    """Volume (m^3) as the integral of section area along x (Cavalieri: the sections lie in
    parallel planes), Simpson's rule on every station interval. Areas are closed forms of the
    blended sizes when all stations have one shape; otherwise polygons of the blended loops."""
    return _volume_by_sections(tuple(stations), ruled)


@lru_cache(maxsize=8)
def _volume_by_sections(stations: tuple[BodyStation, ...], ruled: bool) -> float:
    grid, idx = _grid(stations, _STEPS)
    W, loop, _ = _blend(stations, grid.ravel(), ruled, _LOOP, idx)
    family, a, b, r = _sizes_and_family(stations, W)
    return _simpson(_areas(family, a, b, r, loop).reshape(grid.shape), grid)


def wetted_area_by_perimeters(stations: tuple[BodyStation, ...], ruled: bool = False) -> float:
    """Lateral surface area (m^2, without flat end faces) as the integral along x of the
    section perimeter times the loop's mean slope factor sqrt(1 + v_n^2) (1 for a cylinder,
    sqrt(1 + r'^2) for a body of revolution). Perimeters are closed forms (Ramanujan's second
    approximation for ellipses) when all stations have one shape."""
    return _wetted_area_by_perimeters(tuple(stations), ruled)


@lru_cache(maxsize=8)
def _wetted_area_by_perimeters(stations: tuple[BodyStation, ...], ruled: bool) -> float:
    grid, idx = _grid(stations, _STEPS)
    W, loop, dloop = _blend(stations, grid.ravel(), ruled, _LOOP, idx)
    family, a, b, r = _sizes_and_family(stations, W)
    values = _perimeters(family, a, b, r, loop) * _slope_factor(loop, dloop)
    return _simpson(values.reshape(grid.shape), grid)


def end_face_area(stations: tuple[BodyStation, ...]) -> float:
    """Area of the flat end faces (m^2): the first and last sections unless they are points."""
    return section_area(stations[0]) + section_area(stations[-1])


def tail_cone_radii(stations: tuple[BodyStation, ...]) -> tuple[float, float]:
    """Equivalent radii sqrt(area / pi) (m) at the start of the tail cone, the last station
    before the areas shrink monotonically to the tail (the largest section of a body that only
    grows and then shrinks), and at the tail end."""
    areas = [section_area(s) for s in stations]
    i = len(areas) - 1
    while i > 0 and areas[i - 1] > areas[i]:
        i -= 1
    return math.sqrt(areas[i] / math.pi), math.sqrt(areas[-1] / math.pi)


# --- sections for the loft ----------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class LoftSection:
    """One section of the loft (m): a closed loop, or a point (pointed nose or tail)."""

    x: float
    points: np.ndarray  # (n, 3); for a point, every row is the point
    is_point: bool


def loft_sections(
    stations: tuple[BodyStation, ...], n: int, ruled: bool = False, between: int = 2
) -> tuple[LoftSection, ...]:
    """Sections to loft through (``n`` loop points each). Ruled: the stations. Smooth: every
    station interval cut into equal steps, at least ``between`` + 1 of them and none longer
    than 1/_LOFT_STEPS of the body, the sections inside blended from the stations, so the
    kernel's smooth fit follows this module's spline instead of making its own curve through
    a few sections (see ``solids.body.build_fuselage`` for what that did)."""
    xs = np.array([s.x for s in stations])
    if ruled:
        xq = xs
    else:
        longest = (xs[-1] - xs[0]) / _LOFT_STEPS
        parts = []
        for a, b in zip(xs[:-1], xs[1:], strict=True):
            k = max(between + 1, math.ceil((b - a) / longest - 1e-9))
            parts.append(a + (b - a) * np.arange(k) / k)
        xq = np.append(np.concatenate(parts), xs[-1])
    _, loop, _ = _blend(stations, xq, ruled, n)
    ends = {0: stations[0], len(xq) - 1: stations[-1]}
    out = []
    for k, x in enumerate(xq):
        end = ends.get(k)
        if end is not None:  # the end stations themselves, exactly
            points = section_points(end, n, body_shares(stations))
            out.append(LoftSection(float(x), points, is_point(end)))
        else:
            out.append(LoftSection(float(x), np.column_stack([np.full(n, x), loop[k]]), False))
    return tuple(out)


# --- the parametric form ------------------------------------------------------------------------

#: stations of the parametric form: the nose at equal steps of the half-ellipse's angle, the
#: constant section, the tail cone in equal steps; a station close to either side of the nose
#: end and the tail-cone start keeps the spline's ringing at those kinks small (a bulge of
#: about 0.1 % of the width on the demo)
_NOSE_STEPS = 6
_CONE_STEPS = 5
_GROWTH = 3.0
_NOSE_KINK = 0.03  # fraction of the nose length
_CONE_KINK = 0.01  # fraction of the tail-cone length


def expand(spec: FuselageSpec) -> tuple[BodyStation, ...]:
    """The stations of a fuselage: as written, or made from the parametric form (a nose growing
    like a half-ellipse profile over nose_length from a point, a constant section, and a tail
    cone shrinking linearly to the tail-end radius)."""
    if spec.parametric is None:
        return spec.stations
    p: ParametricBody = spec.parametric
    a0, b0 = p.max_width / 2.0, p.max_height / 2.0

    def station(x: float, a: float, b: float) -> BodyStation:
        corner = 0.0
        if p.shape == "rounded_rectangle":  # scales with the smaller size of the section
            corner = p.corner_radius * min(a, b) / min(a0, b0)
        return BodyStation(
            x=float(x),
            width=2.0 * a,
            height=2.0 * b,
            z=p.centre_z,
            shape=p.shape,
            exponent=p.exponent,
            corner_radius=corner,
        )

    x0, nose_end = p.nose_x, p.nose_x + p.nose_length
    cone_x, end_x = p.nose_x + p.length - p.tail_cone_length, p.nose_x + p.length
    re = p.tail_end_radius

    def sizes(x: float) -> tuple[float, float]:
        if x >= cone_x:  # the tail cone (taken first: the nose may end where it starts)
            t = min(1.0, (x - cone_x) / p.tail_cone_length)
            return a0 + (re - a0) * t, b0 + (re - b0) * t
        if x < nose_end:  # half-ellipse profile from the tip
            u = 1.0 - (x - x0) / p.nose_length
            f = math.sqrt(max(0.0, 1.0 - u * u))
            return a0 * f, b0 * f
        return a0, b0

    phi = 0.5 * math.pi * np.arange(_NOSE_STEPS) / _NOSE_STEPS
    near_nose = _NOSE_KINK * p.nose_length
    near_cone = _CONE_KINK * p.tail_cone_length
    spacing = p.tail_cone_length / _CONE_STEPS
    xs = [*(x0 + p.nose_length * (1.0 - np.cos(phi))), nose_end, cone_x - near_cone]
    xs += [cone_x, cone_x + near_cone, *(cone_x + spacing * np.arange(1, _CONE_STEPS))]
    if cone_x - near_cone - nose_end > 2.0 * near_nose:
        # the constant section: steps growing by _GROWTH away from both kinks, so the spline's
        # ringing dies out before the steps get long
        middle = 0.5 * (nose_end + cone_x)
        step = near_nose
        while nose_end + step < middle:
            xs.append(nose_end + step)
            step *= _GROWTH
        step = near_cone
        while cone_x - step > middle:
            xs.append(cone_x - step)
            step *= _GROWTH
        xs.append(middle)
    xs = sorted(x for x in xs if x0 < x < end_x)
    keep = [x0]  # drop stations closer than half a kink step to the one kept before
    closest = 0.5 * min(near_nose, near_cone)
    for x in xs:
        if x - keep[-1] > closest and end_x - x > closest:
            keep.append(x)
    keep.append(end_x)
    return tuple(station(x, *sizes(x)) for x in keep)
