"""Longitudinal static stability: lift-curve slopes, downwash, stick-fixed neutral point and
static margins (pure math, no CAD).

SI inside: lengths m (aircraft frame, x aft, z up), slopes per rad. Methods used:

- Section lift-curve slope: thin-airfoil theory, a0 = 2 pi per rad, or the design's
  ``requirements.section_lift_slope``; no thickness correction is applied.
- Finite-wing slope: the Helmbold equation in the form with the half-chord sweep and the
  Prandtl-Glauert factor (USAF Stability and Control DATCOM, Section 4.1.3.2, Eq. 4.1.3.2-a;
  the same form as Raymer, "Aircraft Design: A Conceptual Approach", Eq. 12.6):
  a = 2 pi A / (2 + sqrt(4 + A^2 beta^2 / kappa^2 (1 + tan^2 L_c/2 / beta^2))),
  beta^2 = 1 - M^2, kappa = a0 / (2 pi). Equation numbers given from memory.
- Mach number: the stall speed over the ISA speed of sound at the design's altitude (the
  stall point is the state the sizing is built on; at a trainer's speeds M < 0.2 and the
  factor changes the slopes by less than 2 %).
- Downwash gradient at the tail: the DATCOM low-speed estimate (Section 4.4.1; given from
  memory) d eps / d alpha = 4.44 [K_A K_lambda K_H sqrt(cos L_c/4)]^1.19 (a_M / a_0), with
  K_A = 1/A - 1/(1 + A^1.7), K_lambda = (10 - 3 lambda) / 7,
  K_H = (1 - |h_H| / b) / (2 l_H / b)^(1/3): l_H the tail arm (wing MGC c/4 to tail MGC c/4,
  x distance), h_H the height of the tail's MGC c/4 above the wing's root chord plane (the
  magnitude: a tail below the wing is treated like one above it).
- Tail dynamic-pressure ratio eta = q_tail / q: an input, 0.9 by common practice.
- Fuselage and nacelles: OMITTED. A body ahead of the wing moves the neutral point forward,
  so the margins reported here are larger (less conservative) than the airplane's.
- Neutral point: the wing's aerodynamic centre at its MGC quarter chord and the tail's at its
  own; the airplane's lift slope a + eta (S_H/S) a_H (1 - d eps/d alpha) acts at the
  slope-weighted mean of the two, which is the stick-fixed neutral point (the same as
  h_n = h_0 + eta V_H (a_H/a)(1 - d eps/d alpha) with V_H's arm measured from the neutral
  point; e.g. Etkin and Reid, "Dynamics of Flight: Stability and Control", Sec. 2.3).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: thin-airfoil theory's section lift-curve slope, per rad
THIN_AIRFOIL_SLOPE = 2.0 * math.pi
#: common-practice tail dynamic-pressure ratio q_tail / q
DEFAULT_TAIL_Q_RATIO = 0.9


def helmbold_slope(
    aspect_ratio: float,
    half_chord_sweep: float = 0.0,
    mach: float = 0.0,
    section_slope: float = THIN_AIRFOIL_SLOPE,
) -> float:
    """Lift-curve slope (per rad) of a straight-tapered wing: the Helmbold equation with the
    half-chord sweep (rad) and the Prandtl-Glauert factor at Mach ``mach``."""
    if not 0.0 <= mach < 1.0:
        raise ValueError(f"Mach number must be in [0, 1) (got {mach})")
    beta2 = 1.0 - mach * mach
    kappa = section_slope / (2.0 * math.pi)
    a = aspect_ratio
    root = math.sqrt(
        4.0 + a * a * beta2 / kappa**2 * (1.0 + math.tan(half_chord_sweep) ** 2 / beta2)
    )
    return 2.0 * math.pi * a / (2.0 + root)


def downwash_gradient(
    aspect_ratio: float,
    taper_ratio: float,
    quarter_chord_sweep: float,
    span: float,
    tail_arm: float,
    tail_height: float,
    slope_ratio: float = 1.0,
) -> float:
    """d eps / d alpha at the tail, DATCOM's low-speed estimate (Sec. 4.4.1) times the ratio of
    the wing's lift slope at the Mach number to that at M = 0 (``slope_ratio``)."""
    k_a = 1.0 / aspect_ratio - 1.0 / (1.0 + aspect_ratio**1.7)
    k_lambda = (10.0 - 3.0 * taper_ratio) / 7.0
    k_h = (1.0 - abs(tail_height) / span) / (2.0 * tail_arm / span) ** (1.0 / 3.0)
    base = k_a * k_lambda * k_h * math.sqrt(math.cos(quarter_chord_sweep))
    return 4.44 * base**1.19 * slope_ratio


def neutral_point_x(
    wing_ac_x: float,
    tail_ac_x: float,
    wing_slope: float,
    tail_slope: float,
    area_ratio: float,
    downwash: float,
    tail_q_ratio: float,
) -> float:
    """Stick-fixed neutral point x (m): the lift-slope-weighted mean of the wing's and the
    tail's aerodynamic centres (fuselage omitted). ``area_ratio`` = S_H / S."""
    k = tail_q_ratio * area_ratio * tail_slope * (1.0 - downwash)
    return (wing_slope * wing_ac_x + k * tail_ac_x) / (wing_slope + k)


@dataclass(frozen=True)
class CgMargin:
    """One CG position and the static margin there, (x_np - x_cg) / c_MGC."""

    label: str  # "forward", "aft" or "given"
    x: float  # m, aircraft frame
    fraction_mgc: float  # (x - x_MGC,LE) / c_MGC
    static_margin: float  # fraction of the MGC; positive = stable


@dataclass(frozen=True)
class Stability:
    """The longitudinal static-stability estimate and every input it used (SI, per rad)."""

    mach: float  # stall speed / speed of sound at the design's altitude
    section_slope: float  # per rad, the same for wing and tail
    wing_aspect_ratio: float
    wing_half_chord_sweep: float  # rad, root to tip
    wing_quarter_chord_sweep: float  # rad, root to tip
    wing_taper_ratio: float  # tip chord / root chord
    wing_span: float  # m
    wing_slope: float  # per rad, at the Mach number
    wing_slope_incompressible: float  # per rad, at M = 0
    tail_aspect_ratio: float
    tail_half_chord_sweep: float  # rad
    tail_slope: float  # per rad, at the Mach number
    area_ratio: float  # S_H / S
    tail_arm: float  # m, wing MGC c/4 to tail MGC c/4 (x)
    tail_height: float  # m, tail MGC c/4 above the wing's root chord plane
    downwash_gradient: float
    tail_q_ratio: float
    tail_volume_coefficient: float
    mgc: float  # m, wing MGC length
    mgc_le_x: float  # m, x of the wing MGC's leading edge
    wing_ac_x: float  # m
    tail_ac_x: float  # m
    neutral_point_x: float  # m, aircraft frame
    cg: tuple[CgMargin, ...]  # the requirements' CG positions, forward first

    @property
    def neutral_point_fraction(self) -> float:
        """Neutral point as a fraction of the MGC aft of its leading edge."""
        return (self.neutral_point_x - self.mgc_le_x) / self.mgc


def cg_margin(label: str, x: float, np_x: float, mgc_le_x: float, mgc: float) -> CgMargin:
    """The static margin at CG x (m): (x_np - x_cg) / c_MGC."""
    return CgMargin(label, x, (x - mgc_le_x) / mgc, (np_x - x) / mgc)


def estimate(
    *,
    wing,
    tail,
    mach: float,
    section_slope: float,
    tail_q_ratio: float,
    cg: tuple[tuple[str, str, float], ...] = (),
) -> Stability:
    """The estimate for a sized wing and horizontal tail (``SurfaceSizing`` objects).

    ``cg``: (label, kind, value) with kind "x" (m, aircraft frame) or "mgc" (fraction of the
    MGC aft of its leading edge)."""
    wp, tp = wing.planform, tail.planform
    w_half = wp.sweep(0.5)
    t_half = tp.sweep(0.5)
    a_w = helmbold_slope(wp.aspect_ratio, w_half, mach, section_slope)
    a_w0 = helmbold_slope(wp.aspect_ratio, w_half, 0.0, section_slope)
    a_t = helmbold_slope(tp.aspect_ratio, t_half, mach, section_slope)
    wing_ac = wing.mgc_quarter_chord
    tail_ac = tail.mgc_quarter_chord
    arm = tail_ac[0] - wing_ac[0]
    height = tail_ac[2] - wing.apex_z
    w_qc = wp.sweep(0.25)
    de = downwash_gradient(wp.aspect_ratio, wp.taper_ratio, w_qc, wp.span, arm, height, a_w / a_w0)
    ratio = tp.area / wp.area
    np_x = neutral_point_x(wing_ac[0], tail_ac[0], a_w, a_t, ratio, de, tail_q_ratio)
    le_x = wing.apex_x + wp.mgc_x_le
    margins = []
    for label, kind, value in cg:
        x = value if kind == "x" else le_x + value * wp.mgc
        margins.append(cg_margin(label, x, np_x, le_x, wp.mgc))
    return Stability(
        mach=mach,
        section_slope=section_slope,
        wing_aspect_ratio=wp.aspect_ratio,
        wing_half_chord_sweep=w_half,
        wing_quarter_chord_sweep=w_qc,
        wing_taper_ratio=wp.taper_ratio,
        wing_span=wp.span,
        wing_slope=a_w,
        wing_slope_incompressible=a_w0,
        tail_aspect_ratio=tp.aspect_ratio,
        tail_half_chord_sweep=t_half,
        tail_slope=a_t,
        area_ratio=ratio,
        tail_arm=arm,
        tail_height=height,
        downwash_gradient=de,
        tail_q_ratio=tail_q_ratio,
        tail_volume_coefficient=tp.area * arm / (wp.area * wp.mgc),
        mgc=wp.mgc,
        mgc_le_x=le_x,
        wing_ac_x=wing_ac[0],
        tail_ac_x=tail_ac[0],
        neutral_point_x=np_x,
        cg=tuple(margins),
    )
