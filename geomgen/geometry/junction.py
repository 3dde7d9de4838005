"""Where the lifting surfaces meet the fuselage (pure numpy, no CAD).

Spanwise station ``s`` as in the planform (a wing or horizontal-tail half: |y|; the fin: its
height above its apex, z - apex_z). For each surface this module finds the body side along
the root chord (the station where the surface's chord line leaves the body), the exposed
planform outboard of it, and the station where the surface's solid starts: inside the body by
a small overlap, so that a union of surface and body would be closed, while the parts stay
separate. A fin whose apex lies above the body top is extended down to the body with the
taper and sweep of its first panel.

Frame: aircraft frame (x aft, y right, z up), metres.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from geomgen.design import BodyStation
from geomgen.errors import InputError
from geomgen.geometry.body_side import body_loops, body_side, contains
from geomgen.geometry.frame import place, place_each
from geomgen.geometry.layout import Layout, SurfaceLayout, settled_body_side
from geomgen.geometry.mount import Junction
from geomgen.shapes import fuselage
from geomgen.sizing.aircraft import SurfaceSizing, wetted_area

#: the solid's root section lies this fraction of the root chord inside the body side, measured
#: from the innermost point where the section's surface meets the body (common practice: a few
#: per cent of the chord is enough to close a union and small enough to stay clear of the far side)
OVERLAP_FRACTION = 0.02
#: chord fractions sampled along the root chord
_CHORD_SAMPLES = 41
#: a fin may reach down to the body by at most this fraction of its root chord
_MAX_EXTENSION = 0.5


def _chord_line(n: int) -> np.ndarray:
    f = 0.5 * (1.0 - np.cos(np.linspace(0.0, np.pi, n)))
    return np.column_stack([f, np.zeros(n)])


def _exposed_side_area(ss: SurfaceSizing, side_x: np.ndarray, side_s: np.ndarray) -> float:
    """Planform area of one side outboard of the body-side line s_b(x), m^2, by a midpoint
    grid over the strip of the planform the line crosses (exact elsewhere)."""
    pf = ss.planform
    s_lo = min(0.0, float(side_s.min()))
    s_hi = float(side_s.max())
    outboard = area_between(pf, s_hi, pf.semi_span)
    m = 400
    edges = np.linspace(s_lo, s_hi, m + 1)
    order = np.argsort(side_x)
    sx, sv = side_x[order], side_s[order]
    mids = 0.5 * (edges[:-1] + edges[1:])
    frames = np.array([pf.at(s)[:2] for s in mids.tolist()])  # (m, 2): x_le, chord
    chord = frames[:, 1]
    x = (ss.apex_x + frames[:, 0])[:, None] + chord[:, None] * (np.arange(m) + 0.5) / m
    counts = np.count_nonzero(mids[:, None] > np.interp(x, sx, sv), axis=1)
    total = 0.0
    for c, k in zip(chord.tolist(), counts.tolist(), strict=True):  # the rows in order
        total += c * k / m
    return outboard + total * (s_hi - s_lo) / m


def area_between(pf, s0: float, s1: float) -> float:
    """Planform area between stations s0 < s1 of one side (m^2), exact for straight-tapered
    panels (trapezoids between the panel breaks; s0 < 0 extends the first panel)."""
    nodes = [s0] + [st.s for st in pf.stations if s0 < st.s < s1] + [s1]
    chords = [pf.at(s)[1] for s in nodes]
    return float(np.trapezoid(chords, nodes))


def _junction(
    sl: SurfaceLayout, stations: tuple[BodyStation, ...], unit_upper, unit_lower, source: str
) -> Junction:
    ss = sl.sizing
    pf = ss.planform
    key = ss.key
    line = _chord_line(_CHORD_SAMPLES)
    s_line = body_side(ss, stations, line, np.zeros(len(line)))
    if np.all(np.isnan(s_line)):
        raise _off_body(ss, stations, source)
    # where the chord runs past the body's nose or tail the surface is exposed to its root
    s_line = np.where(np.isnan(s_line), 0.0, s_line)
    side = "centre" if not pf.symmetric else "right"
    side_x = place_each(ss, side, s_line, line)[:, 0]
    surface = np.vstack([unit_upper, unit_lower])
    s_surface = body_side(ss, stations, surface, np.full(len(surface), float(s_line.mean())))
    overhang = bool(np.any(np.isnan(s_surface)))
    mount = float(np.nanmin(s_surface)) - OVERLAP_FRACTION * pf.root_chord
    if overhang:
        # part of the root section lies outside the body (ahead of its nose, behind its tail
        # or above it): the halves of a symmetric surface then join at the plane of symmetry,
        # and a fin keeps its root
        mount = 0.0 if pf.symmetric else min(mount, 0.0)
    if pf.symmetric:
        mount = max(mount, 0.0)
    elif mount < -_MAX_EXTENSION * pf.root_chord:
        raise InputError(
            f"the fin's root lies {-s_line.max():.3f} m above the fuselage top; lower "
            f"{key}.apex.z to the body",
            source=source,
            path=f"{key}.apex.z",
        )
    # the root section at the mount station must lie inside the body: then the junction closes
    if not overhang and not fuselage_contains_section(ss, side, mount, surface, stations):
        raise InputError(
            "the root section does not fit inside the fuselage (the body is thinner than the "
            "section where they meet)",
            source=source,
            path=f"{key}.apex",
        )
    exposed = _exposed_side_area(ss, side_x, s_line)
    halves = 2.0 if pf.symmetric else 1.0
    _check_controls_outboard(sl, stations, source)
    return Junction(
        key=key,
        side_min=float(s_line.min()),
        side_max=float(s_line.max()),
        skin_min=float(np.nanmin(s_surface)),
        mount_s=mount,
        root_inside=not overhang,
        reference_area=pf.area,
        exposed_area=halves * exposed,
        exposed_wetted_area=wetted_area(halves * exposed, ss.thickness_ratio),
        side_line=tuple((float(x), float(s)) for x, s in zip(side_x, s_line, strict=True)),
    )


def _mm_up(length: float) -> int:
    """A length in whole millimetres, rounded up (m -> mm)."""
    return math.ceil(length * 1000.0 - 1e-6)


def _off_body(ss: SurfaceSizing, stations: tuple[BodyStation, ...], source: str) -> InputError:
    """The refusal of a surface whose root chord misses the body, with where the chord and the
    body lie (aircraft-frame x, z in m) and the changes that would mount it."""
    key = ss.key
    side = "centre" if not ss.planform.symmetric else "right"
    root = place(ss, side, 0.0, _chord_line(_CHORD_SAMPLES))
    x_le, x_te = float(root[:, 0].min()), float(root[:, 0].max())
    nose, end = stations[0].x, stations[-1].x
    where = f"the root chord (x = {x_le:.3f} to {x_te:.3f} m) does not meet the fuselage:"
    if x_le >= end:
        short = x_te - end
        ways = [f"make the fuselage {_mm_up(short)} mm longer"]
        if ss.tail_arm is not None:
            kind = "optimum" if ss.spec.tail_arm is None else "given"
            where += f" placed by the {kind} tail arm of {ss.tail_arm:.3f} m, it"
            ways.append(f"give {key}.tail_arm at most {ss.tail_arm - short:.3f} m")
            ways.append('let the body follow the tails (fuselage.end_behind_tails: "0.1 m")')
        else:
            where += " it"
            ways.append(f"move {key}.apex.x at least {_mm_up(short)} mm forward")
        return InputError(
            f"{where} lies behind the body's end (x = {end:.3f} m); " + ", or ".join(ways),
            source=source,
            path=f"{key}.tail_arm" if ss.tail_arm is not None else f"{key}.apex.x",
        )
    if x_te <= nose:
        return InputError(
            f"{where} it lies ahead of the body's nose (x = {nose:.3f} m); move {key}.apex.x "
            f"at least {_mm_up(nose - x_le)} mm aft",
            source=source,
            path=f"{key}.apex.x",
        )
    # within the body's length but above or below it
    xs = np.clip(root[:, 0], nose, end)
    loops, _ = body_loops(stations, xs)
    top = float(loops[..., 1].max(axis=1).max())
    bottom = float(loops[..., 1].min(axis=1).min())
    z = float(root[:, 2].mean())
    if z > top:
        change = f"lower {key}.apex.z by at least {_mm_up(z - top)} mm"
        words = (
            f"passes above the fuselage (z = {z:.3f} m; its top along the chord is at "
            f"most z = {top:.3f} m)"
        )
    elif z < bottom:
        change = f"raise {key}.apex.z by at least {_mm_up(bottom - z)} mm"
        words = (
            f"passes below the fuselage (z = {z:.3f} m; its bottom along the chord is "
            f"at least z = {bottom:.3f} m)"
        )
    else:  # within the body's height, yet outside its sections along the chord
        change = f"move {key}.apex to a point inside the body's section at x = {x_le:.3f} m"
        words = (
            f"lies outside the body's sections there although within its height "
            f"(z = {z:.3f} m between {bottom:.3f} and {top:.3f} m)"
        )
    # (the path names the apex as a whole: its x may be the better change for a wing)
    return InputError(f"{where} {words}; {change}", source=source, path=f"{key}.apex")


def fuselage_contains_section(
    ss: SurfaceSizing, side: str, s: float, unit: np.ndarray, stations: tuple[BodyStation, ...]
) -> bool:
    """Whether the section of unit-chord points placed at station s lies inside the body."""
    return bool(np.all(contains(stations, place(ss, side, s, unit))))


def _check_controls_outboard(
    sl: SurfaceLayout, stations: tuple[BodyStation, ...], source: str
) -> None:
    """A moving part must start outboard of the body side (plus its side gap) everywhere
    along its chord, or it could not move."""
    ss = sl.sizing
    side = "centre" if not ss.planform.symmetric else "right"
    for c in (c for c in sl.controls if c.side == side):
        spec = next(x for x in ss.spec.controls if x.kind == c.kind)
        found = settled_body_side(ss, stations, c.hinge[0].chord_fraction, c.s_start)
        if math.isnan(found):
            continue  # the body ends ahead of the moving part
        need = found + spec.side_gap
        # (1 micrometre: a start placed from the body side lands on it to the iteration's
        # precision)
        if c.s_start < need - 1e-6:
            raise InputError(
                f"starts inside the fuselage: the body side is {found:.4f} m from the root "
                f"there, so start it at {math.ceil(need * 1000) / 1000:.3f} m or more (got "
                f"{c.s_start:.4f} m), or place it from the body side (span_start: body_side)",
                source=source,
                path=f"{ss.key}.controls.{c.kind}.span_start",
            )


def mount(layout: Layout, dirs: tuple = (), section_points: int = 61) -> Layout:
    """The layout with its surfaces mounted on the fuselage (unchanged without one)."""
    spec = layout.sizing.design.fuselage
    if spec is None:
        return layout
    from geomgen.geometry.sections import unit_section

    stations = fuselage.expand(spec)
    source = layout.sizing.design.source
    surfaces = []
    for sl in layout.surfaces:
        af = unit_section(sl.sizing, 0.0, section_points, 0.0, dirs)
        j = _junction(sl, stations, af.upper, af.lower, source)
        surfaces.append(dataclasses.replace(sl, junction=j))
    return dataclasses.replace(layout, surfaces=tuple(surfaces), body=stations)


def exposed_wetted_total(layout: Layout) -> float:
    """Sum of the exposed wetted areas of the surfaces (m^2); NaN without a fuselage."""
    js = [sl.junction for sl in layout.surfaces if sl.junction is not None]
    return sum(j.exposed_wetted_area for j in js) if js else math.nan
