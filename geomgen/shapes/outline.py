"""The airfoil section type: upper and lower surfaces in the unit-chord frame, and resampling.

Frame of every section: unit chord, x from 0 at the leading edge (LE) to 1 at the trailing
edge (TE), y up. All lengths are fractions of the chord. Pure numpy. The NACA generators
(`naca`), coordinate files (`coordinates`) and the blends and name lookup (`airfoils`) build on
this module.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geomgen.errors import InputError

__all__ = [
    "MAX_TE_GAP",
    "Airfoil",
    "resample",
]

MAX_TE_GAP = 0.03
"""Largest trailing-edge gap (chord fraction) a file may have; wider means the outline is not
closed (a truncated file). Also the largest thickness `with_min_te_thickness` will add."""


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


# --------------------------------------------------------------------------- resample


def _cosine_stations(points: int) -> np.ndarray:
    beta = np.linspace(0.0, np.pi, points)
    x = 0.5 * (1.0 - np.cos(beta))
    x[0], x[-1] = 0.0, 1.0
    return x


def _check_points(points: int, source: str) -> None:
    if not isinstance(points, int | np.integer) or not 5 <= points <= 10000:
        raise InputError(f"points must be an integer in [5, 10000] (got {points!r})", source=source)


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
