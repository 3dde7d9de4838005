"""Airfoil sections by name, blended between two sections, and with a thickened trailing edge.

`load` generates a NACA name (`naca`) or reads a coordinate file (`coordinates`); the section
type and its resampling are in `outline`. Frame of every section: unit chord, x from 0 at the
leading edge (LE) to 1 at the trailing edge (TE), y up. All lengths are fractions of the
chord. Pure numpy.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from geomgen.errors import InputError
from geomgen.shapes.coordinates import read_coordinates
from geomgen.shapes.naca import naca4, naca5
from geomgen.shapes.outline import MAX_TE_GAP, Airfoil, resample

__all__ = [
    "blend",
    "load",
    "with_min_te_thickness",
]


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
