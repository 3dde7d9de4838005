"""Airfoil sections: NACA 4- and 5-digit generators, coordinate files, resampling and blending.

Frame of every section: unit chord, x from 0 at the leading edge (LE) to 1 at the trailing
edge (TE), y up. All lengths are fractions of the chord. Pure numpy.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from geomgen.errors import InputError

__all__ = [
    "MAX_TE_GAP",
    "MIN_FILE_POINTS",
    "NACA5_MEAN_LINES",
    "Airfoil",
    "blend",
    "load",
    "naca4",
    "naca5",
    "naca5_mean_line",
    "read_coordinates",
    "resample",
    "with_min_te_thickness",
    "write_coordinates",
]

MIN_FILE_POINTS = 10
"""A coordinate file needs at least this many distinct points."""

MAX_TE_GAP = 0.03
"""Largest trailing-edge gap (chord fraction) a file may have; wider means the outline is not
closed (a truncated file). Also the largest thickness `with_min_te_thickness` will add."""

_UNIT_FRAME_TOL = 1e-5  # a file already in the unit-chord frame keeps its own chord line
_X_TURN_BACK_TOL = 1e-4  # rounding noise allowed when a surface must run forward in x

# NACA 4-digit thickness polynomial, NACA Report 460: a0 sqrt(x) + a1 x + ... + a4 x^4.
_THICKNESS = (0.2969, -0.1260, -0.3516, 0.2843, -0.1015)
_THICKNESS_CLOSED_A4 = -0.1036  # later computational variant closing the trailing edge

NACA5_MEAN_LINES: dict[str, tuple[float, float]] = {
    # first three digits: (m, k1), NACA Report 537; design lift coefficient 0.3
    "210": (0.0580, 361.4),
    "220": (0.1260, 51.64),
    "230": (0.2025, 15.957),
    "240": (0.2900, 6.643),
    "250": (0.3910, 3.230),
}


def _frozen(a: np.ndarray) -> np.ndarray:
    a = np.array(a, dtype=float)
    a.setflags(write=False)
    return a


@dataclass(frozen=True, eq=False)
class Airfoil:
    """A section in the unit-chord frame (lengths in chords).

    `upper` and `lower` are (N, 2) arrays of (x, y) running from the shared leading-edge point to
    the trailing edge, x increasing (a cambered NACA upper surface may dip a hair below x = 0
    right at the nose).
    """

    name: str
    upper: np.ndarray
    lower: np.ndarray

    def __post_init__(self) -> None:
        for side in ("upper", "lower"):
            arr = np.asarray(getattr(self, side), dtype=float)
            if arr.ndim != 2 or arr.shape[1] != 2 or arr.shape[0] < 2:
                raise InputError(
                    f"{side} surface must be an (N, 2) array with N >= 2 (got {arr.shape})",
                    source=self.name,
                )
            if not np.all(np.isfinite(arr)):
                raise InputError(f"{side} surface must hold finite numbers", source=self.name)
            object.__setattr__(self, side, _frozen(arr))
        if np.hypot(*(self.upper[0] - self.lower[0])) > 1e-9:
            raise InputError(
                "upper and lower surfaces must start at the same leading-edge point",
                source=self.name,
            )

    def loop(self) -> np.ndarray:
        """Single closed outline TE -> upper -> LE -> lower -> TE, (N + M - 1, 2), chords."""
        return np.vstack([self.upper[::-1], self.lower[1:]])

    @property
    def thickness(self) -> float:
        """Largest upper(x) - lower(x) on a common x grid, i.e. t/c normal to the chord line."""
        r = resample(self, 201)
        return float(np.max(r.upper[:, 1] - r.lower[:, 1]))

    @property
    def area(self) -> float:
        """Enclosed area in chord^2 (outline closed by the trailing-edge segment)."""
        x, y = self.loop().T
        return float(abs(0.5 * (np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))))

    @property
    def te_thickness(self) -> float:
        """Trailing-edge gap: distance between the surfaces' last points, chords."""
        return float(np.hypot(*(self.upper[-1] - self.lower[-1])))


# --------------------------------------------------------------------------- NACA generators


def _cosine_stations(points: int) -> np.ndarray:
    beta = np.linspace(0.0, np.pi, points)
    x = 0.5 * (1.0 - np.cos(beta))
    x[0], x[-1] = 0.0, 1.0
    return x


def _half_thickness(x: np.ndarray, t: float, closed_te: bool) -> np.ndarray:
    a0, a1, a2, a3, a4 = _THICKNESS
    if closed_te:
        a4 = _THICKNESS_CLOSED_A4
    return 5.0 * t * (a0 * np.sqrt(x) + x * (a1 + x * (a2 + x * (a3 + x * a4))))


def _check_points(points: int, source: str) -> None:
    if not isinstance(points, int | np.integer) or not 5 <= points <= 10000:
        raise InputError(f"points must be an integer in [5, 10000] (got {points!r})", source=source)


def _wrap_mean_line(
    name: str, x: np.ndarray, yt: np.ndarray, yc: np.ndarray, dyc: np.ndarray
) -> Airfoil:
    """Lay the thickness normal to the mean line (the standard NACA construction)."""
    theta = np.arctan(dyc)
    s, c = np.sin(theta), np.cos(theta)
    upper = np.column_stack([x - yt * s, yc + yt * c])
    lower = np.column_stack([x + yt * s, yc - yt * c])
    return Airfoil(name, upper, lower)


def naca4(code: str, points: int = 81, closed_te: bool = False) -> Airfoil:
    """NACA 4-digit section, e.g. "2412"; `points` cosine-spaced stations per surface.

    closed_te uses the -0.1036 variant of the last thickness coefficient (sharp TE).
    """
    source = f"NACA {code}"
    code = str(code).strip()
    if not re.fullmatch(r"\d{4}", code):
        raise InputError(
            f"NACA 4-digit code must be 4 digits, e.g. '2412' (got {code!r})", source="naca4"
        )
    _check_points(points, source)
    m, p, t = int(code[0]) / 100.0, int(code[1]) / 10.0, int(code[2:]) / 100.0
    if not 0.01 <= t <= 0.40:
        raise InputError(f"thickness digits must be 01 to 40 (got {code[2:]})", source=source)
    if (m == 0.0) != (p == 0.0):
        raise InputError(
            "first two digits must both be 0 (symmetric) or both non-zero "
            f"(camber and its position) (got {code[:2]})",
            source=source,
        )
    x = _cosine_stations(points)
    yt = _half_thickness(x, t, closed_te)
    if m == 0.0:
        yc = np.zeros_like(x)
        dyc = np.zeros_like(x)
    else:
        fore = x < p
        yc = np.where(
            fore, m / p**2 * (2 * p * x - x**2), m / (1 - p) ** 2 * (1 - 2 * p + 2 * p * x - x**2)
        )
        dyc = np.where(fore, 2 * m / p**2 * (p - x), 2 * m / (1 - p) ** 2 * (p - x))
    return _wrap_mean_line(f"NACA {code}", x, yt, yc, dyc)


def naca5_mean_line(series: str, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Standard 5-digit mean line (first three digits, e.g. "230"): (y_c, dy_c/dx) at x."""
    m, k1 = NACA5_MEAN_LINES[series]
    x = np.asarray(x, dtype=float)
    fore = x < m
    yc = np.where(
        fore, k1 / 6.0 * (x**3 - 3 * m * x**2 + m**2 * (3 - m) * x), k1 * m**3 / 6.0 * (1 - x)
    )
    dyc = np.where(fore, k1 / 6.0 * (3 * x**2 - 6 * m * x + m**2 * (3 - m)), -k1 * m**3 / 6.0)
    return yc, dyc


def naca5(code: str, points: int = 81, closed_te: bool = False) -> Airfoil:
    """NACA 5-digit section with a standard mean line 210-250, e.g. "23012".

    `points` cosine-spaced stations per surface; closed_te as in `naca4`.
    """
    source = f"NACA {code}"
    code = str(code).strip()
    if not re.fullmatch(r"\d{5}", code):
        raise InputError(
            f"NACA 5-digit code must be 5 digits, e.g. '23012' (got {code!r})", source="naca5"
        )
    _check_points(points, source)
    series = code[:3]
    if series not in NACA5_MEAN_LINES:
        allowed = ", ".join(NACA5_MEAN_LINES)
        kind = "reflex mean lines are not supported; " if series[2] == "1" else ""
        raise InputError(f"{kind}mean line must be one of {allowed} (got {series})", source=source)
    t = int(code[3:]) / 100.0
    if not 0.01 <= t <= 0.40:
        raise InputError(f"thickness digits must be 01 to 40 (got {code[3:]})", source=source)
    x = _cosine_stations(points)
    yc, dyc = naca5_mean_line(series, x)
    return _wrap_mean_line(f"NACA {code}", x, _half_thickness(x, t, closed_te), yc, dyc)


# --------------------------------------------------------------------------- resample / blend


def _hermite_dense(pts: np.ndarray, per_segment: int = 16) -> np.ndarray:
    """Densify a polyline with a chord-length parametrised cubic Hermite curve."""
    d = np.diff(pts, axis=0)
    h = np.hypot(d[:, 0], d[:, 1])
    sec = d / h[:, None]
    m = np.empty_like(pts)
    m[1:-1] = (h[1:, None] * sec[:-1] + h[:-1, None] * sec[1:]) / (h[:-1] + h[1:])[:, None]
    if len(h) > 1:
        m[0] = ((2 * h[0] + h[1]) * sec[0] - h[0] * sec[1]) / (h[0] + h[1])
        m[-1] = ((2 * h[-1] + h[-2]) * sec[-1] - h[-1] * sec[-2]) / (h[-1] + h[-2])
    else:
        m[0] = m[-1] = sec[0]
    t = np.linspace(0.0, 1.0, per_segment, endpoint=False)[None, :, None]
    h00, h10 = 2 * t**3 - 3 * t**2 + 1, t**3 - 2 * t**2 + t
    h01, h11 = -2 * t**3 + 3 * t**2, t**3 - t**2
    hh = h[:, None, None]
    seg = (
        h00 * pts[:-1, None]
        + h10 * hh * m[:-1, None]
        + h01 * pts[1:, None]
        + h11 * hh * m[1:, None]
    )
    return np.vstack([seg.reshape(-1, 2), pts[-1:]])


def _forward_in_x(side: np.ndarray) -> np.ndarray:
    """Drop points that do not advance in x (rounding noise) so y is a function of x."""
    keep = np.concatenate([[True], side[1:, 0] > np.maximum.accumulate(side[:-1, 0])])
    return side[keep]


def resample(af: Airfoil, points: int) -> Airfoil:
    """Both surfaces on one cosine-spaced x grid from the nose (min x) to x = 1, chords.

    The outline is followed by a smooth cubic curve; each surface is mapped from its own x span
    onto the common one (they differ by at most the TE offset, ~1e-4 chord).
    """
    _check_points(points, af.name)
    loop = af.loop()
    keep = np.concatenate([[True], np.any(np.diff(loop, axis=0) != 0.0, axis=1)])
    dense = _hermite_dense(loop[keep])
    nose = int(np.argmin(dense[:, 0]))
    x0, y0 = dense[nose]
    g = _cosine_stations(points)
    x_out = x0 + g * (1.0 - x0)
    out = []
    for side in (dense[: nose + 1][::-1], dense[nose:]):
        side = _forward_in_x(side)
        span = side[-1, 0] - x0
        if len(side) < 2 or span <= 0.0:
            raise InputError("a surface has no chordwise extent", source=af.name)
        # interpolate in sqrt of the chord fraction: the nose is ~ sqrt(x), so this stays sharp
        q = np.sqrt(np.clip((side[:, 0] - x0) / span, 0.0, 1.0))
        y = np.interp(np.sqrt(g), q, side[:, 1])
        y[0] = y0
        out.append(np.column_stack([x_out, y]))
    return Airfoil(af.name, out[0], out[1])


def _same_grid(a: Airfoil, b: Airfoil, tol: float = 1e-3) -> bool:
    """True if both sections have their points at the same chord fractions (within tol)."""
    return (
        len(a.upper) == len(b.upper)
        and len(a.lower) == len(b.lower)
        and len(a.upper) >= 41
        and bool(np.all(np.abs(a.upper[:, 0] - b.upper[:, 0]) < tol))
        and bool(np.all(np.abs(a.lower[:, 0] - b.lower[:, 0]) < tol))
    )


def blend(a: Airfoil, b: Airfoil, w: float) -> Airfoil:
    """Linear blend of two sections on a common grid: w = 0 gives `a`, w = 1 gives `b`."""
    if not 0.0 <= w <= 1.0:
        raise InputError(f"blend weight must be in [0, 1] (got {w})", source=f"{a.name}/{b.name}")
    n = max(len(a.upper), len(a.lower), len(b.upper), len(b.lower), 41)
    if _same_grid(a, b):  # already on one grid (e.g. both from resample(.., n)): pair by index
        ra, rb = a, b
    else:
        ra, rb = resample(a, n), resample(b, n)
    name = a.name if w == 0.0 else b.name if w == 1.0 else f"{a.name} {1 - w:g} + {b.name} {w:g}"
    return Airfoil(name, (1 - w) * ra.upper + w * rb.upper, (1 - w) * ra.lower + w * rb.lower)


def with_min_te_thickness(af: Airfoil, min_thickness: float, blend_from: float = 0.5) -> Airfoil:
    """Thicken the TE to at least `min_thickness` (chord fraction) if it is thinner.

    The added thickness rises as a smoothstep (C1) from 0 at x = blend_from to its full value at
    x = 1 and is split half up, half down about the mean line; x < blend_from is untouched.
    """
    if not 0.0 <= min_thickness <= MAX_TE_GAP:
        raise InputError(
            f"minimum TE thickness must be in [0, {MAX_TE_GAP}] chord (got {min_thickness})",
            source=af.name,
        )
    if not 0.0 <= blend_from < 1.0:
        raise InputError(f"blend_from must be in [0, 1) (got {blend_from})", source=af.name)
    if af.te_thickness >= min_thickness:
        return af
    dx, dy = af.upper[-1] - af.lower[-1]
    extra = np.sqrt(max(min_thickness**2 - dx**2, 0.0)) - dy
    extra *= 1.0 + 1e-9  # land on the safe side of the minimum after rounding

    def added(x: np.ndarray) -> np.ndarray:
        s = np.clip((x - blend_from) / (1.0 - blend_from), 0.0, 1.0)
        return extra * s * s * (3.0 - 2.0 * s)

    up, lo = af.upper.copy(), af.lower.copy()
    up[:, 1] += 0.5 * added(up[:, 0])
    lo[:, 1] -= 0.5 * added(lo[:, 0])
    return Airfoil(af.name, up, lo)


# --------------------------------------------------------------------------- coordinate files

_SPLIT = re.compile(r"[\s,;]+")


def _parse_pair(line: str) -> tuple[float, float] | None:
    tokens = [t for t in _SPLIT.split(line.strip()) if t]
    if len(tokens) != 2:
        return None
    try:
        return float(tokens[0]), float(tokens[1])
    except ValueError:
        return None


def _read_text(path: Path) -> str:
    src = str(path)
    try:
        data = path.read_bytes()
    except OSError as err:
        raise InputError(f"cannot read the file ({err.strerror or err})", source=src) from err
    if not data.strip():
        raise InputError("file is empty; expected one 'x y' pair per line", source=src)
    controls = set(range(32)) - {9, 10, 11, 12, 13, 26}
    if b"\x00" in data or any(b in controls for b in data[:65536]):
        raise InputError(
            "not a text file (binary bytes found); expected plain text with 'x y' columns",
            source=src,
        )
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError:
        return data.decode("latin-1")


def _parse(text: str, src: str) -> tuple[str | None, np.ndarray, np.ndarray]:
    """Name line (or None), points (N, 2) and their 1-based line numbers."""
    name: str | None = None
    pts: list[tuple[float, float]] = []
    lines: list[int] = []
    for no, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        pair = _parse_pair(line)
        if pair is None:
            if name is None and not pts:
                name = line
                continue
            shown = line if len(line) <= 40 else line[:37] + "..."
            raise InputError(f"line {no}: expected two numbers 'x y' (got {shown!r})", source=src)
        if not all(np.isfinite(pair)):
            raise InputError(
                f"line {no}: coordinates must be finite numbers (got {line!r})", source=src
            )
        pts.append(pair)
        lines.append(no)
    return name, np.array(pts, dtype=float).reshape(-1, 2), np.array(lines, dtype=int)


def _counts_line(pts: np.ndarray) -> tuple[int, int] | None:
    """Upper/lower point counts if the first pair is a count line (two-block order)."""
    if len(pts) < 3:
        return None
    a, b = pts[0]
    if a != int(a) or b != int(b) or min(a, b) < 3:
        return None
    rest = pts[1:]
    if min(a, b) <= 2.0 * np.ptp(rest, axis=0).max():
        return None
    return int(a), int(b)


def _to_loop(pts: np.ndarray, lines: np.ndarray, src: str) -> tuple[np.ndarray, np.ndarray]:
    """Order the points as one loop TE -> LE -> TE, from single-loop or two-block files."""
    counts = _counts_line(pts)
    if counts is not None:
        pts, lines = pts[1:], lines[1:]
        if sum(counts) != len(pts):
            raise InputError(
                f"point-count line says {counts[0]} + {counts[1]} points but {len(pts)} follow",
                source=src,
            )
        cut = counts[0]
    else:
        if len(pts) < 2:
            return pts, lines
        jumps = np.hypot(*np.diff(pts, axis=0).T)
        extent = np.ptp(pts, axis=0).max()
        j = int(np.argmax(jumps))
        if extent == 0.0 or jumps[j] <= 0.5 * extent:
            return pts, lines  # no chord-long jump: a single loop
        cut = j + 1
    a, b = pts[:cut], pts[cut:]
    la, lb = lines[:cut], lines[cut:]
    if len(a) < 2 or len(b) < 2:
        raise InputError(
            "two-block order needs both surfaces with 2 or more points each", source=src
        )
    tol = MAX_TE_GAP * max(np.ptp(pts, axis=0).max(), 1e-300)
    if np.hypot(*(b[-1] - a[0])) <= tol < np.hypot(*(b[0] - a[0])):
        b, lb = b[::-1], lb[::-1]  # second block given TE -> LE
    if np.hypot(*(b[0] - a[0])) > tol:
        raise InputError(
            "two blocks of points found but they do not start at a common "
            "leading edge; expected each surface listed LE -> TE",
            source=src,
        )
    return np.vstack([a[::-1], b]), np.concatenate([la[::-1], lb])


def _segments_cross(poly: np.ndarray) -> tuple[int, int] | None:
    """First pair of non-adjacent edges of the closed polygon that touch or cross, else None."""
    n = len(poly)
    s0, s1 = poly, np.roll(poly, -1, axis=0)
    eps = 1e-12 * max(float(np.ptp(poly, axis=0).max()), 1e-300) ** 2

    def cross(o: np.ndarray, u: np.ndarray, v: np.ndarray) -> np.ndarray:
        r = (u[..., 0] - o[..., 0]) * (v[..., 1] - o[..., 1]) - (u[..., 1] - o[..., 1]) * (
            v[..., 0] - o[..., 0]
        )
        return np.where(np.abs(r) < eps, 0.0, r)

    j = np.arange(n)[None, :]
    for start in range(0, n, 256):
        i = np.arange(start, min(start + 256, n))[:, None]
        a0, a1 = s0[i[:, 0]][:, None], s1[i[:, 0]][:, None]
        b0, b1 = s0[None], s1[None]
        d1, d2 = cross(b0, b1, a0), cross(b0, b1, a1)
        d3, d4 = cross(a0, a1, b0), cross(a0, a1, b1)
        hit = (d1 * d2 <= 0) & (d3 * d4 <= 0)
        collinear = (d1 == 0) & (d2 == 0) & (d3 == 0) & (d4 == 0)
        if np.any(collinear):  # on one line: they meet only if their extents overlap
            overlap = np.all(
                (np.minimum(a0, a1) <= np.maximum(b0, b1))
                & (np.minimum(b0, b1) <= np.maximum(a0, a1)),
                axis=-1,
            )
            hit = np.where(collinear, overlap, hit)
        hit &= (j > i + 1) & ~((i == 0) & (j == n - 1))
        if np.any(hit):
            ii, jj = np.argwhere(hit)[0]
            return int(i[ii, 0]), int(jj)
    return None


def _normalise(loop: np.ndarray) -> tuple[np.ndarray, int]:
    """Unit-chord frame: LE at the origin, chord line along +x; returns (loop, LE index)."""
    te = 0.5 * (loop[0] + loop[-1])
    near0 = np.hypot(loop[:, 0], loop[:, 1])
    k0 = int(np.argmin(near0))
    if np.hypot(te[0] - 1.0, te[1]) < _UNIT_FRAME_TOL and near0[k0] < _UNIT_FRAME_TOL:
        return loop - loop[k0], k0  # already unit chord: keep the file's own chord line
    k = int(np.argmax(np.hypot(*(loop - te).T)))  # LE: the point farthest from the TE
    chord = te - loop[k]
    length = float(np.hypot(*chord))
    c, s = chord / length
    rot = np.array([[c, s], [-s, c]])  # rotates the chord direction onto +x
    return (loop - loop[k]) @ rot.T / length, k


def read_coordinates(path: str | Path) -> Airfoil:
    """Read an x-y coordinate file and normalise it to the unit-chord frame.

    Accepted: one loop TE -> upper -> LE -> lower -> TE (either direction), or two blocks
    (upper LE -> TE, then lower LE -> TE, optionally after a line with the two point counts);
    an optional name line first; '#' comment lines; space, tab or comma separators.
    The LE is the point farthest from the TE midpoint, except that a file already in the
    unit-chord frame (a point at (0, 0), TE midpoint at (1, 0)) keeps its own chord line, as
    NACA sections measure the chord from the mean line's nose.
    """
    path = Path(path)
    src = str(path)
    name, pts, lines = _parse(_read_text(path), src)
    if len(pts) == 0:
        raise InputError("no 'x y' coordinate lines found", source=src)
    loop, lines = _to_loop(pts, lines, src)
    keep = np.concatenate([[True], np.any(np.diff(loop, axis=0) != 0.0, axis=1)])
    loop, lines = loop[keep], lines[keep]  # repeated consecutive points are harmless
    if len(loop) < MIN_FILE_POINTS:
        raise InputError(
            f"only {len(loop)} distinct points; at least {MIN_FILE_POINTS} are needed", source=src
        )
    if np.ptp(loop, axis=0).max() == 0.0:
        raise InputError("all points coincide", source=src)
    inner = loop[:-1] if np.all(loop[0] == loop[-1]) else loop
    _, first, counts = np.unique(inner, axis=0, return_index=True, return_counts=True)
    if np.any(counts > 1):
        dup = inner[first[np.argmax(counts > 1)]]
        at = lines[np.all(inner == dup, axis=1).nonzero()[0]]
        raise InputError(
            f"point ({dup[0]:g}, {dup[1]:g}) appears more than once (lines "
            f"{', '.join(map(str, at))}); the outline must not touch itself",
            source=src,
        )

    loop, k = _normalise(loop)
    gap = float(np.hypot(*(loop[0] - loop[-1])))
    if gap > MAX_TE_GAP:
        raise InputError(
            f"outline is not closed: trailing-edge ends are {gap:.3g} chord apart "
            f"(at most {MAX_TE_GAP} allowed)",
            source=src,
        )
    x, y = loop.T
    signed = 0.5 * (np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))
    if abs(signed) < 1e-4:
        raise InputError(
            f"outline encloses almost no area ({abs(signed):.2g} chord^2); "
            "points may be collinear or folded back",
            source=src,
        )
    closed = gap == 0.0
    crossing = _segments_cross(loop[:-1] if closed else loop)
    if crossing is not None:
        i, j = crossing
        raise InputError(
            f"outline crosses itself (segments from lines {lines[i]} and "
            f"{lines[j]}); expected one simple loop",
            source=src,
        )
    if signed < 0:  # clockwise: the first surface listed is the lower one
        loop, k = loop[::-1], len(loop) - 1 - k
    nose = int(np.argmin(loop[:, 0]))
    for side, label in ((loop[: nose + 1][::-1], "upper"), (loop[nose:], "lower")):
        back = np.maximum.accumulate(side[:, 0]) - side[:, 0]
        if len(side) < 3 or back.max() > _X_TURN_BACK_TOL:
            raise InputError(
                f"{label} surface must run from the nose to the trailing edge with x increasing",
                source=src,
            )
    upper, lower = loop[: k + 1][::-1], loop[k:]
    loop_name = name if name else path.stem
    return Airfoil(loop_name, upper, lower)


def write_coordinates(af: Airfoil, path: str | Path) -> None:
    """Write a name line then one loop TE -> upper -> LE -> lower -> TE, 'x y' per line."""
    path = Path(path)
    name = af.name.strip().splitlines()[0] if af.name.strip() else "airfoil"
    if _parse_pair(name) is not None:
        name = f"airfoil {name}"
    body = "".join(f"{x:10.6f} {y:10.6f}\n" for x, y in af.loop())
    try:
        path.write_text(f"{name}\n{body}", encoding="utf-8")
    except OSError as err:
        raise InputError(
            f"cannot write the file ({err.strerror or err})", source=str(path)
        ) from err


_NACA_NAME = re.compile(r"naca[\s_-]*(\d+)", re.IGNORECASE)


def load(name: str, search_dirs: Sequence[Path] = ()) -> Airfoil:
    """A section by name: "naca2412" / "NACA 23012" are generated; anything else is a file.

    Files are looked up in each of `search_dirs` as name, name.dat, name.txt, then as a path.
    A NACA name is always generated (81 points per surface), even if a file has that name.
    """
    text = str(name).strip()
    match = _NACA_NAME.fullmatch(text)
    if match:
        digits = match.group(1)
        if len(digits) == 4:
            return naca4(digits)
        if len(digits) == 5:
            return naca5(digits)
        raise InputError(f"NACA codes have 4 or 5 digits (got {digits!r})", source=text)
    tried: list[Path] = []
    for base in [*map(Path, search_dirs), None]:
        for cand in (text, text + ".dat", text + ".txt"):
            p = Path(cand) if base is None else Path(base) / cand
            if p in tried:
                continue
            tried.append(p)
            if p.is_file():
                return read_coordinates(p)
    raise InputError(
        "airfoil not found: give 'naca' + 4 or 5 digits or a coordinate file "
        f"(looked for {', '.join(map(str, tried))})",
        source=text,
    )
