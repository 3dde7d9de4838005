"""Planform geometry of one lifting surface (pure math, no CAD).

Local frame of a surface, relative to its apex (the root leading edge):
``x`` chordwise, aft positive; ``s`` spanwise, measured in projection (plan view for a wing or
horizontal tail: the y distance from the plane of symmetry; side view for the fin: the z height
above its root); ``rise`` the offset out of the surface's plane caused by dihedral (m).
Lengths in m, angles in rad. A planform is a chain of straight-tapered panels between stations;
a trapezoidal surface is one panel.
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class Station:
    """A spanwise station where a panel starts or ends (local frame, m / rad)."""

    s: float  # spanwise position from the root
    x_le: float  # leading-edge x relative to the apex
    rise: float  # dihedral offset relative to the apex
    chord: float
    twist: float  # rad, incidence relative to the root, nose up positive
    airfoil: tuple[str, str, float]  # blend: (section a, section b, weight of b)

    @property
    def x_te(self) -> float:
        return self.x_le + self.chord


@dataclass(frozen=True)
class PanelInput:
    """What defines one panel: outer-end span fraction and chord ratio, sweep, dihedral."""

    span_fraction: float
    chord_ratio: float
    sweep: float  # rad
    sweep_at: float  # chord fraction the sweep refers to
    dihedral: float  # rad
    twist: float | None  # rad at the outer end; None = linear in span fraction
    airfoil: str | None  # section at the outer end; None = blended


@dataclass(frozen=True)
class Planform:
    """Sized planform of one surface. ``symmetric`` surfaces have two halves of ``semi_span``."""

    key: str
    symmetric: bool
    area: float  # m^2, reference area (both halves for a symmetric surface)
    span: float  # m, tip to tip (height for the one-sided fin)
    aspect_ratio: float
    root_chord: float
    tip_chord: float
    mgc: float  # mean geometric chord length, m
    mgc_s: float  # its spanwise position, m
    mgc_x_le: float  # x of its leading edge relative to the apex, m
    mgc_rise: float  # its dihedral offset, m
    stations: tuple[Station, ...]  # root, panel breaks, tip

    @property
    def semi_span(self) -> float:
        return self.span / 2 if self.symmetric else self.span

    @property
    def taper_ratio(self) -> float:
        return self.tip_chord / self.root_chord

    @property
    def side_area(self) -> float:
        """Area of one half (all of it for the fin), m^2."""
        return self.area / 2 if self.symmetric else self.area

    @property
    def mgc_quarter_chord_x(self) -> float:
        """x of the MGC's quarter-chord point relative to the apex, m."""
        return self.mgc_x_le + 0.25 * self.mgc

    def panel_index(self, s: float) -> int:
        """Index i of the panel stations[i]..stations[i+1] that holds spanwise position s."""
        for i in range(len(self.stations) - 1):
            if s <= self.stations[i + 1].s:
                return i
        return len(self.stations) - 2

    def at(self, s: float) -> tuple[float, float, float, float]:
        """(x_le, chord, rise, twist) at spanwise position s, interpolated linearly within its
        panel (the planform's chord and twist; the section a ruled panel has there is
        ``section_frame``)."""
        i = self.panel_index(s)
        a, b = self.stations[i], self.stations[i + 1]
        t = (s - a.s) / (b.s - a.s)
        return (
            a.x_le + t * (b.x_le - a.x_le),
            a.chord + t * (b.chord - a.chord),
            a.rise + t * (b.rise - a.rise),
            a.twist + t * (b.twist - a.twist),
        )

    def panel_middles(self) -> list[float]:
        """Spanwise position (m) of the middle of each panel."""
        return [0.5 * (a.s + b.s) for a, b in zip(self.stations, self.stations[1:], strict=False)]

    def section_frame(self, s: float) -> tuple[float, float]:
        """(chord, twist) of the section the ruled panel has at s: m, rad nose up.

        The twist law of every solid, drawing and template: a straight-tapered panel is a
        ruled surface between its end sections, so its section at s is the blend of the two
        *physical* end sections, (1 - t) P_a + t P_b with t the span fraction. Its chord line
        runs from the blended leading edge to the blended trailing edge: as a complex number
        in the section plane, (1 - t) c_a e^(-i twist_a) + t c_b e^(-i twist_b). Its angle is
        the twist (chord-weighted: tan twist = sum w c sin twist / sum w c cos twist) and its
        length the chord, which falls short of the linear chord by about c (dtwist)^2 / 8.
        A panel of one twist has the linear chord and that twist exactly.
        """
        i = self.panel_index(s)
        a, b = self.stations[i], self.stations[i + 1]
        t = (s - a.s) / (b.s - a.s)
        if t == 0.0:
            return a.chord, a.twist
        if t == 1.0:
            return b.chord, b.twist
        if a.twist == b.twist:
            return a.chord + t * (b.chord - a.chord), a.twist
        z = (1 - t) * a.chord * complex(math.cos(a.twist), -math.sin(a.twist)) + t * b.chord * (
            complex(math.cos(b.twist), -math.sin(b.twist))
        )
        return abs(z), -math.atan2(z.imag, z.real)

    def section_weight(self, s: float) -> tuple[int, float]:
        """(i, w): the section at s is (1 - w) x section of stations[i] + w x section of
        stations[i+1], in unit-chord coordinates (w in [0, 1]: outside the stations, the
        nearest station's section).

        A straight-tapered panel is a ruled surface between its end sections: its section at
        s interpolates the *physical* sections linearly, so the unit-chord shape is weighted
        by chord, w = t c_b / c(s), not by span fraction t alone (the two differ when both
        the chord and the section change along the panel).
        """
        i = self.panel_index(s)
        a, b = self.stations[i], self.stations[i + 1]
        t = (s - a.s) / (b.s - a.s)
        chord = a.chord + t * (b.chord - a.chord)
        # beyond the root (a fin extended down to the fuselage) the section is the root's
        return i, min(max(t * b.chord / chord, 0.0), 1.0)

    def sweep(self, fraction: float, panel: int | None = None) -> float:
        """Sweep angle (rad) of the line at chord ``fraction``; whole surface root-to-tip if
        ``panel`` is None, else of that panel."""
        a, b = (
            (self.stations[0], self.stations[-1])
            if panel is None
            else (self.stations[panel], self.stations[panel + 1])
        )
        dx = (b.x_le + fraction * b.chord) - (a.x_le + fraction * a.chord)
        return math.atan2(dx, b.s - a.s)


def convert_sweep(
    sweep: float,
    from_fraction: float,
    to_fraction: float,
    aspect_ratio: float,
    taper: float,
    *,
    symmetric: bool = True,
) -> float:
    """Sweep of a trapezoidal planform at another chord fraction (rad).

    tan L_m = tan L_n - k (m - n)(1 - taper) / (AR (1 + taper)), with k = 4 for a symmetric
    surface (AR on the full span) and k = 2 for a one-sided fin (AR = h^2 / S).
    """
    k = 4.0 if symmetric else 2.0
    return math.atan(
        math.tan(sweep)
        - k * (to_fraction - from_fraction) * (1 - taper) / (aspect_ratio * (1 + taper))
    )


def build_planform(
    key: str,
    *,
    area: float,
    aspect_ratio: float,
    panels: tuple[PanelInput, ...],
    symmetric: bool,
    root_airfoil: str,
    tip_airfoil: str,
    twist: float,
) -> Planform:
    """Size a planform from its reference area, aspect ratio and panel chain (SI units)."""
    span = math.sqrt(aspect_ratio * area)
    semi = span / 2 if symmetric else span
    side_area = area / 2 if symmetric else area
    # side area = c_root * semi * sum over panels of d_eta * (r_in + r_out) / 2
    shape = 0.0
    eta_prev, r_prev = 0.0, 1.0
    for p in panels:
        shape += (p.span_fraction - eta_prev) * (r_prev + p.chord_ratio) / 2
        eta_prev, r_prev = p.span_fraction, p.chord_ratio
    root_chord = side_area / (semi * shape)

    airfoils = _airfoil_blends(panels, root_airfoil, tip_airfoil)
    stations = [Station(0.0, 0.0, 0.0, root_chord, 0.0, airfoils[0])]
    for p, foil in zip(panels, airfoils[1:], strict=True):
        a = stations[-1]
        s = p.span_fraction * semi
        ds = s - a.s
        chord = p.chord_ratio * root_chord
        # the line at chord fraction n is swept by p.sweep:
        # x_le_b + n c_b = x_le_a + n c_a + ds tan(sweep)
        x_le = a.x_le + ds * math.tan(p.sweep) + p.sweep_at * (a.chord - chord)
        rise = a.rise + ds * math.tan(p.dihedral)
        tw = twist * p.span_fraction if p.twist is None else p.twist
        stations.append(Station(s, x_le, rise, chord, tw, foil))

    int_c2 = int_cs = int_cx = int_cz = 0.0
    for a, b in zip(stations, stations[1:], strict=False):
        ds = b.s - a.s
        int_c2 += ds * (a.chord**2 + a.chord * b.chord + b.chord**2) / 3
        int_cs += _linear_product_integral(a.chord, b.chord, a.s, b.s, ds)
        int_cx += _linear_product_integral(a.chord, b.chord, a.x_le, b.x_le, ds)
        int_cz += _linear_product_integral(a.chord, b.chord, a.rise, b.rise, ds)
    return Planform(
        key=key,
        symmetric=symmetric,
        area=area,
        span=span,
        aspect_ratio=aspect_ratio,
        root_chord=root_chord,
        tip_chord=stations[-1].chord,
        mgc=int_c2 / side_area,
        mgc_s=int_cs / side_area,
        mgc_x_le=int_cx / side_area,
        mgc_rise=int_cz / side_area,
        stations=tuple(stations),
    )


def _linear_product_integral(f0: float, f1: float, g0: float, g1: float, ds: float) -> float:
    """Exact integral over a panel of width ds of the product of two linear functions."""
    return ds * (2 * f0 * g0 + f0 * g1 + f1 * g0 + 2 * f1 * g1) / 6


def _airfoil_blends(
    panels: tuple[PanelInput, ...], root: str, tip: str
) -> list[tuple[str, str, float]]:
    """Section at each station as a blend (a, b, weight of b), linear in span fraction between
    the stations whose section is named (root, tip and any panel that names one)."""
    etas = [0.0] + [p.span_fraction for p in panels]
    names: list[str | None] = [root] + [p.airfoil for p in panels]
    if names[-1] is None:
        names[-1] = tip
    named = [i for i, n in enumerate(names) if n is not None]
    blends = []
    for i, eta in enumerate(etas):
        if names[i] is not None:
            blends.append((names[i], names[i], 0.0))
            continue
        lo = max(j for j in named if j < i)
        hi = min(j for j in named if j > i)
        w = (eta - etas[lo]) / (etas[hi] - etas[lo])
        blends.append((names[lo], names[hi], w))
    return blends
