"""NACA 4- and 5-digit sections generated from their published thickness and mean lines.

Unit-chord frame as in `outline`: x from 0 at the LE to 1 at the TE, y up, lengths in chords.
Pure numpy.
"""

from __future__ import annotations

import re

import numpy as np

from geomgen.errors import InputError
from geomgen.shapes.outline import Airfoil, _check_points, _cosine_stations

__all__ = [
    "NACA5_MEAN_LINES",
    "naca4",
    "naca5",
    "naca5_mean_line",
]

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


def _half_thickness(x: np.ndarray, t: float, closed_te: bool) -> np.ndarray:
    a0, a1, a2, a3, a4 = _THICKNESS
    if closed_te:
        a4 = _THICKNESS_CLOSED_A4
    return 5.0 * t * (a0 * np.sqrt(x) + x * (a1 + x * (a2 + x * (a3 + x * a4))))


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
