"""Sections placed in the aircraft frame, ready for lofting (numpy, no CAD).

For every side of every surface: one section at each station (root, panel breaks, tip), each as
an upper and a lower polyline from the leading edge to the trailing edge, in metres in the
aircraft frame. The unit-chord section at a station is the blend of its named sections,
resampled on a common cosine grid (so corresponding points of neighbouring sections match, and
a ruled loft between them is the straight-tapered panel), with the minimum trailing-edge
thickness of the design blended in over the aft chord.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from geomgen.errors import InputError
from geomgen.geometry.frame import place
from geomgen.geometry.layout import SurfaceLayout
from geomgen.shapes import airfoils
from geomgen.shapes.outline import Airfoil, resample
from geomgen.sizing.aircraft import SurfaceSizing


@dataclass(frozen=True, eq=False)
class PlacedSection:
    """One section in the aircraft frame (m); upper and lower run LE -> TE, same LE point."""

    s: float  # spanwise position from the root, m
    chord: float  # m
    upper: np.ndarray  # (N, 3)
    lower: np.ndarray  # (N, 3)
    area: float  # m^2, area enclosed by the section


@dataclass(frozen=True, eq=False)
class SurfaceSections:
    key: str  # wing | horizontal_tail | vertical_tail
    side: str  # right | left | centre
    sections: tuple[PlacedSection, ...]


@lru_cache(maxsize=128)
def _unit(name: str, dirs: tuple, points: int) -> Airfoil:
    return resample(airfoils.load(name, dirs), points)


def unit_section(
    ss: SurfaceSizing, s: float, points: int, te_thickness: float, dirs: tuple = ()
) -> Airfoil:
    """Unit-chord section of surface ``ss`` at spanwise position s (blended, TE thickened)."""
    pf = ss.planform
    i, t = pf.section_weight(s)
    a, b = pf.stations[i], pf.stations[i + 1]

    def at_station(blend: tuple[str, str, float]) -> Airfoil:
        fa = _load(ss, blend[0], dirs, points)
        fb = _load(ss, blend[1], dirs, points)
        return airfoils.blend(fa, fb, blend[2])

    section = airfoils.blend(at_station(a.airfoil), at_station(b.airfoil), t)
    chord = pf.at(s)[1]
    if te_thickness > 0:
        section = airfoils.with_min_te_thickness(section, te_thickness / chord)
    return section


def _load(ss: SurfaceSizing, name: str, dirs: tuple, points: int) -> Airfoil:
    try:
        return _unit(name, tuple(dirs), points)
    except InputError as err:
        raise InputError(err.detail, source=err.source, path=f"{ss.key}.root_airfoil") from None


def placed_section(
    ss: SurfaceSizing, side: str, s: float, points: int, te_thickness: float, dirs: tuple = ()
) -> PlacedSection:
    af = unit_section(ss, s, points, te_thickness, dirs)
    chord = ss.planform.at(s)[1]
    upper = place(ss, side, s, af.upper)
    lower = place(ss, side, s, af.lower)
    lower[0] = upper[0]  # one leading-edge point shared by both splines
    return PlacedSection(s=s, chord=chord, upper=upper, lower=lower, area=af.area * chord**2)


def surface_sections(
    sl: SurfaceLayout, side: str, points: int, te_thickness: float, dirs: tuple = ()
) -> SurfaceSections:
    """Sections of one side of a surface at its stations: the root (or the mount station
    inside the fuselage, when the surface is mounted on one), the breaks outboard of it, the
    tip."""
    ss = sl.sizing
    return SurfaceSections(
        key=sl.key,
        side=side,
        sections=tuple(
            placed_section(ss, side, s, points, te_thickness, dirs)
            for s in stations_from(ss, sl.mount_s)
        ),
    )


def stations_from(ss: SurfaceSizing, start: float) -> tuple[float, ...]:
    """Spanwise stations of a solid that starts at ``start`` (m): it, then every panel break
    outboard of it and the tip."""
    return (start, *(st.s for st in ss.planform.stations if st.s > start + 1e-9))


def volume_from_sections(
    ss: SurfaceSizing,
    points: int,
    te_thickness: float,
    dirs: tuple = (),
    per_panel: int = 24,
    start: float = 0.0,
) -> float:
    """Volume of one side (m^3) from station ``start`` to the tip as the integral of section
    area along the span (Cavalieri: sections lie in parallel planes perpendicular to the span
    axis), by Simpson's rule on ``per_panel`` intervals in each panel. Independent of the CAD
    loft."""
    total = 0.0
    stations = stations_from(ss, start)
    for a, b in zip(stations, stations[1:], strict=False):
        s = np.linspace(a, b, 2 * per_panel + 1)
        areas = np.array(
            [
                unit_section(ss, v, points, te_thickness, dirs).area * ss.planform.at(v)[1] ** 2
                for v in s
            ]
        )
        h = (b - a) / (2 * per_panel)
        total += h / 3 * (areas[0] + areas[-1] + 4 * areas[1:-1:2].sum() + 2 * areas[2:-1:2].sum())
    return float(total)
