"""Airfoil coordinate files: reading, checking the outline (closed, one simple loop, surfaces
running forward in x) and normalising it to the unit-chord frame; writing.

Unit-chord frame as in `outline`: x from 0 at the LE to 1 at the TE, y up, lengths in chords.
Pure numpy.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from geomgen.errors import InputError
from geomgen.shapes.outline import MAX_TE_GAP, Airfoil

__all__ = [
    "MIN_FILE_POINTS",
    "read_coordinates",
    "write_coordinates",
]

MIN_FILE_POINTS = 10
"""A coordinate file needs at least this many distinct points."""

_UNIT_FRAME_TOL = 1e-5  # a file already in the unit-chord frame keeps its own chord line
_X_TURN_BACK_TOL = 1e-4  # rounding noise allowed when a surface must run forward in x

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


#: largest coordinate magnitude read from a file: a section in metres, millimetres or chord
#: units is far smaller, and squares of lengths (areas, cross products) stay far from overflow
MAX_COORDINATE = 1e12


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
        if max(abs(pair[0]), abs(pair[1])) > MAX_COORDINATE:
            shown = line if len(line) <= 60 else line[:57] + "..."
            raise InputError(
                f"line {no}: a coordinate beyond {MAX_COORDINATE:g} would overflow the "
                f"section's arithmetic (squares and products past about 1e308); write the "
                f"section in chord units or millimetres (got {shown!r})",
                source=src,
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
