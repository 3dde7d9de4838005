"""Sizing: wing area from the stall requirement, planforms, tail arms and tail areas.

Pure math (no CAD). Everything SI: m, m^2, N, m/s, kg/m^3, rad. Positions are in the aircraft
frame (x aft, y right, z up; origin at the user's datum).

Relations used (named where they are checked in tests):
- lift equation at the stall: W = 1/2 rho V_s^2 S C_Lmax
- tail volume coefficients: V_H = S_H l_H / (S c_MGC), V_V = S_V l_V / (S b)
- tail arms between the quarter-chord points of the mean geometric chords (common practice)
- minimum-wetted-area tail arm: the tail cone's wetted area pi (R1 + R2) l plus the tails'
  2 (S_H + S_V) = 2 S (V_H c + V_V b) / l is least at l = sqrt(2 S (V_H c + V_V b) / (pi (R1+R2)))
- wetted area of a surface: S_wet = S_exposed (1.977 + 0.52 t/c) for t/c > 0.05, else 2.003
- a fuselage that follows the tails (``fuselage.end_behind_tails``): the body's end and the
  tail arm depend on each other (the optimum arm takes the tail-cone radii from the body, the
  body ends behind the tails the arm places); ``size`` solves the pair by fixed-point iteration
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from pathlib import Path

from geomgen.design import Design, SurfaceSpec
from geomgen.errors import InputError
from geomgen.shapes import airfoils
from geomgen.shapes.outline import MAX_TE_GAP
from geomgen.sizing.atmosphere import AtmosphereState, isa
from geomgen.sizing.planform import PanelInput, Planform, build_planform
from geomgen.sizing.stability import Stability, estimate


@dataclass(frozen=True)
class StallPoint:
    """The stall requirement and what the lift equation gives for it."""

    weight: float  # N
    stall_speed: float  # m/s, true airspeed
    cl_max: float
    atmosphere: AtmosphereState
    dynamic_pressure: float  # Pa, 1/2 rho V_s^2
    wing_area_required: float  # m^2, W / (q C_Lmax)
    area_from_stall: bool  # True if the wing area was sized from it
    stall_speed_achieved: float  # m/s with the wing area used
    wing_loading: float  # N/m^2 with the wing area used


@dataclass(frozen=True)
class SurfaceSizing:
    """One surface: its planform and where it sits in the aircraft frame."""

    spec: SurfaceSpec
    planform: Planform
    apex_x: float  # m, root leading edge
    apex_z: float  # m
    thickness_ratio: float  # mean of root and tip t/c
    wetted_area: float  # m^2, Raymer's estimate on the exposed (= reference, no body) area
    volume_coefficient: float | None  # achieved
    tail_arm: float | None  # m, wing MGC c/4 to this surface's MGC c/4 (x distance)

    @property
    def key(self) -> str:
        return self.spec.key

    @property
    def mgc_quarter_chord(self) -> tuple[float, float, float]:
        """Aircraft-frame point of the MGC quarter chord of the right half (fin: its plane)."""
        p = self.planform
        x = self.apex_x + p.mgc_quarter_chord_x
        if p.symmetric:
            return (x, p.mgc_s, self.apex_z + p.mgc_rise)
        return (x, 0.0, self.apex_z + p.mgc_s)


@dataclass(frozen=True)
class TailArmRule:
    """The minimum-wetted-area tail arm, when a tail asks for it."""

    cone_radii: tuple[float, float]  # m
    optimum_arm: float  # m
    cone_wetted_area: float  # m^2 at the optimum arm
    tail_wetted_area: float  # m^2, 2 (S_H + S_V) of the tails that use it, at the optimum


@dataclass(frozen=True)
class BodyFit:
    """The fuselage following the tails: the fixed point of the tail arm and the body's end
    (m, aircraft-frame x)."""

    iterations: int  # sizings run until the body's end stopped moving
    end_behind_tails: float  # m, asked gap between the rearmost tail root TE and the body end
    rearmost_root_te: float  # x of the rearmost tail root's trailing edge
    body_end: float  # x of the body's end, converged
    body_end_as_written: float  # x of the body's end in the design file
    tail_arm: float | None  # the converged optimum arm; None when every tail arm is given


@dataclass(frozen=True)
class Sizing:
    """The sized aircraft. ``design`` is the design as sized: with a fuselage that follows the
    tails, its fuselage is the one that ends behind the tails (see ``body_fit``)."""

    design: Design
    stall: StallPoint
    wing: SurfaceSizing
    horizontal_tail: SurfaceSizing | None
    vertical_tail: SurfaceSizing | None
    tail_arm_rule: TailArmRule | None
    body_fit: BodyFit | None = None
    stability: Stability | None = None  # None without a horizontal tail

    @property
    def surfaces(self) -> tuple[SurfaceSizing, ...]:
        return tuple(s for s in (self.wing, self.horizontal_tail, self.vertical_tail) if s)


def stall_wing_area(weight: float, density: float, stall_speed: float, cl_max: float) -> float:
    """Wing area (m^2) from the lift equation at the stall: S = 2 W / (rho V^2 C_Lmax)."""
    return 2.0 * weight / (density * stall_speed**2 * cl_max)


def optimum_tail_arm(
    wing_area: float, tail_terms: float, front_radius: float, rear_radius: float
) -> float:
    """Minimum-wetted-area tail arm (m); ``tail_terms`` = V_H c_MGC + V_V b (m)."""
    return math.sqrt(2.0 * wing_area * tail_terms / (math.pi * (front_radius + rear_radius)))


def wetted_area(exposed_area: float, thickness_ratio: float) -> float:
    """Raymer's wetted-area estimate of a lifting surface from its exposed planform area."""
    if thickness_ratio > 0.05:
        return exposed_area * (1.977 + 0.52 * thickness_ratio)
    return exposed_area * 2.003


#: the body's end and the tail arm must settle within this many sizings ...
MAX_BODY_ITERATIONS = 20
#: ... to this change of the body's end between two of them (m)
BODY_END_TOLERANCE = 1e-7


def size(design: Design, airfoil_dirs: tuple = ()) -> Sizing:
    """Run the sizing of a design: wing, then tails placed by their arms; with a fuselage that
    follows the tails, repeated until the body's end and the tail arm agree."""
    body = design.fuselage
    if body is None or body.end_behind_tails is None:
        return _with_stability(_size_once(design, airfoil_dirs))
    if design.horizontal_tail is None and design.vertical_tail is None:
        raise InputError(
            "needs a tail to follow: this design has no horizontal or vertical tail",
            source=design.source,
            path="fuselage.end_behind_tails",
        )
    from geomgen.shapes.body_follow import body_end, follow

    gap = body.end_behind_tails
    written = body_end(body)
    current = design
    ends = []
    for i in range(1, MAX_BODY_ITERATIONS + 1):
        sized = _size_once(current, airfoil_dirs)
        te = max(_root_te_x(t) for t in sized.surfaces if t.key != "wing")
        end = te + gap
        ends.append(end)
        assert current.fuselage is not None
        if abs(end - body_end(current.fuselage)) <= BODY_END_TOLERANCE:
            rule = sized.tail_arm_rule
            fit = BodyFit(
                iterations=i,
                end_behind_tails=gap,
                rearmost_root_te=te,
                body_end=end,
                body_end_as_written=written,
                tail_arm=None if rule is None else rule.optimum_arm,
            )
            return _with_stability(dataclasses.replace(sized, body_fit=fit))
        why = (
            f"the rearmost tail root's trailing edge lies at x = {te:.3f} m and "
            f"fuselage.end_behind_tails is {gap * 1000:g} mm"
        )
        current = dataclasses.replace(
            current, fuselage=follow(current.fuselage, end, design.source, why)
        )
    raise InputError(
        f"the body's end and the tail arm did not settle in {MAX_BODY_ITERATIONS} sizings "
        f"(the body's end moved to x = {ends[-1]:.4f} m at the last); give the tails a fixed "
        f"tail_arm or leave end_behind_tails out",
        source=design.source,
        path="fuselage.end_behind_tails",
    )


def _with_stability(sized: Sizing) -> Sizing:
    """The sizing with its static-stability estimate (see ``stability``): the Mach number of
    the stall point, the requirements' CG positions, forward before aft."""
    design = sized.design
    req = design.requirements
    if sized.horizontal_tail is None:
        # no tail, no tail-volume estimate: the CG positions are kept but no neutral point
        # is estimated (a wing-only study, such as a wing cut from a full design)
        return sized
    result = estimate(
        wing=sized.wing,
        tail=sized.horizontal_tail,
        mach=req.stall_speed / sized.stall.atmosphere.speed_of_sound,
        section_slope=req.section_lift_slope,
        tail_q_ratio=req.tail_dynamic_pressure_ratio,
        cg=req.cg,
    )
    if len(result.cg) == 2 and not result.cg[0].x < result.cg[1].x:
        fwd, aft = result.cg
        raise InputError(
            f"forward must lie ahead of aft (forward at x = {fwd.x:.3f} m, aft at x = "
            f"{aft.x:.3f} m)",
            source=design.source,
            path="requirements.cg",
        )
    return dataclasses.replace(sized, stability=result)


def _root_te_x(ss: SurfaceSizing) -> float:
    """x of a surface's root trailing edge in the aircraft frame (m): the root chord turned by
    the incidence about its twist-axis point, as the layout places it."""
    c = ss.planform.root_chord
    x0 = ss.spec.twist_axis * c
    return ss.apex_x + x0 + (c - x0) * math.cos(ss.spec.incidence)


def _size_once(design: Design, airfoil_dirs: tuple = ()) -> Sizing:
    """One sizing of a design as written: wing, then tails placed by their arms."""
    req = design.requirements
    atm = isa(req.altitude, req.altitude_kind)
    q = 0.5 * atm.density * req.stall_speed**2
    required = stall_wing_area(req.gross_weight, atm.density, req.stall_speed, req.cl_max)
    wing_spec = design.wing
    area = required if wing_spec.area is None else wing_spec.area
    stall = StallPoint(
        weight=req.gross_weight,
        stall_speed=req.stall_speed,
        cl_max=req.cl_max,
        atmosphere=atm,
        dynamic_pressure=q,
        wing_area_required=required,
        area_from_stall=wing_spec.area is None,
        stall_speed_achieved=math.sqrt(2 * req.gross_weight / (atm.density * area * req.cl_max)),
        wing_loading=req.gross_weight / area,
    )
    wing_pf = _planform(wing_spec, area)
    if wing_spec.apex_x is None:  # the schema requires it; keep the type checker honest
        raise InputError("missing required key", source=design.source, path="wing.apex.x")
    wing = _surface_sizing(
        wing_spec, wing_pf, wing_spec.apex_x, None, None, airfoil_dirs, design.source
    )
    wing_qc_x = wing.mgc_quarter_chord[0]

    tails = [t for t in (design.horizontal_tail, design.vertical_tail) if t is not None]
    reference = {"horizontal_tail": wing_pf.mgc, "vertical_tail": wing_pf.span}
    rule = None
    arms: dict[str, float] = {}
    optimum = [t for t in tails if t.tail_arm is None]
    if optimum:
        r1, r2 = _tail_cone_radii(design)
        terms = sum(t.volume_coefficient * reference[t.key] for t in optimum)
        arm = optimum_tail_arm(area, terms, r1, r2)
        rule = TailArmRule(
            cone_radii=(r1, r2),
            optimum_arm=arm,
            cone_wetted_area=math.pi * (r1 + r2) * arm,
            tail_wetted_area=2 * area * terms / arm,
        )
        arms.update({t.key: arm for t in optimum})
    arms.update({t.key: t.tail_arm for t in tails if t.tail_arm is not None})

    sized: dict[str, SurfaceSizing] = {}
    for t in tails:
        arm = arms[t.key]
        tail_area = t.volume_coefficient * area * reference[t.key] / arm
        pf = _planform(t, tail_area)
        apex_x = wing_qc_x + arm - pf.mgc_quarter_chord_x
        achieved = tail_area * arm / (area * reference[t.key])
        sized[t.key] = _surface_sizing(t, pf, apex_x, achieved, arm, airfoil_dirs, design.source)
        _check_tail_clear_of_wing(sized[t.key], wing, design.source)
    _check_te_thickness(design, [wing, *sized.values()])
    return Sizing(
        design=design,
        stall=stall,
        wing=wing,
        horizontal_tail=sized.get("horizontal_tail"),
        vertical_tail=sized.get("vertical_tail"),
        tail_arm_rule=rule,
    )


def _check_te_thickness(design: Design, surfaces: list[SurfaceSizing]) -> None:
    """The minimum trailing-edge thickness is blended into every section: refuse one thicker
    than MAX_TE_GAP of the smallest chord (it would no longer be a trailing edge)."""
    te = design.solids.te_thickness
    chord, where = min((st.chord, s.key) for s in surfaces for st in s.planform.stations)
    limit = MAX_TE_GAP * chord
    if te > limit:
        raise InputError(
            f"must be at most {MAX_TE_GAP:g} of the smallest chord ({chord * 1000:.1f} "
            f"mm, {where}), i.e. {limit * 1000:.2f} mm (got {te * 1000:g} mm)",
            source=design.source,
            path="solids.te_thickness",
        )


def _tail_cone_radii(design: Design) -> tuple[float, float]:
    """Tail-cone radii (m) for the minimum-wetted-area arm: from the fuselage when one is
    given (equivalent radii sqrt(area / pi) where the body starts to shrink and at its end),
    else from the design's tail_cone."""
    if design.fuselage is not None:
        from geomgen.shapes.fuselage import expand, tail_cone_radii

        front, rear = tail_cone_radii(expand(design.fuselage))
        if not front > rear:
            raise InputError(
                f"the body does not narrow toward the tail (equivalent radii {front:.3f} m "
                f"and {rear:.3f} m), so it has no tail cone for the optimum tail arm",
                source=design.source,
                path="fuselage",
            )
        return front, rear
    if design.tail_cone_radii is None:  # checked at load time
        raise InputError("missing required key", source=design.source, path="tail_cone")
    return design.tail_cone_radii


def _panels(spec: SurfaceSpec) -> tuple[PanelInput, ...]:
    if spec.panels:
        return tuple(
            PanelInput(
                p.span_fraction, p.chord_ratio, p.sweep, p.sweep_at, p.dihedral, p.twist, p.airfoil
            )
            for p in spec.panels
        )
    assert spec.taper_ratio is not None  # the loader guarantees taper_ratio or panels
    return (
        PanelInput(1.0, spec.taper_ratio, spec.sweep, spec.sweep_at, spec.dihedral, None, None),
    )


def _planform(spec: SurfaceSpec, area: float) -> Planform:
    return build_planform(
        spec.key,
        area=area,
        aspect_ratio=spec.aspect_ratio,
        panels=_panels(spec),
        symmetric=spec.symmetric,
        root_airfoil=spec.root_airfoil,
        tip_airfoil=spec.tip_airfoil,
        twist=spec.twist,
    )


def _surface_sizing(
    spec: SurfaceSpec,
    pf: Planform,
    apex_x: float,
    volume_coefficient: float | None,
    arm: float | None,
    airfoil_dirs: tuple,
    source: str,
) -> SurfaceSizing:
    t_root = _thickness(spec.root_airfoil, f"{spec.key}.root_airfoil", airfoil_dirs, source)
    t_tip = _thickness(spec.tip_airfoil, f"{spec.key}.tip_airfoil", airfoil_dirs, source)
    tc = 0.5 * (t_root + t_tip)
    return SurfaceSizing(
        spec=spec,
        planform=pf,
        apex_x=apex_x,
        apex_z=spec.apex_z,
        thickness_ratio=tc,
        wetted_area=wetted_area(pf.area, tc),
        volume_coefficient=volume_coefficient,
        tail_arm=arm,
    )


def _thickness(name: str, path: str, dirs: tuple, source: str) -> float:
    try:
        return airfoils.load(name, dirs).thickness
    except InputError as err:
        # name the coordinate file when the fault is in it
        where = f" ({err.source})" if err.source and Path(err.source).is_file() else ""
        raise InputError(err.detail + where, source=source, path=path) from None


def _check_tail_clear_of_wing(tail: SurfaceSizing, wing: SurfaceSizing, source: str) -> None:
    """A tail whose root leading edge lies ahead of the wing's root trailing edge is refused."""
    wing_te = wing.apex_x + wing.planform.root_chord
    if tail.apex_x < wing_te:
        raise InputError(
            f"the tail's root leading edge (x = {tail.apex_x:.3f} m) would lie ahead of the "
            f"wing's root trailing edge (x = {wing_te:.3f} m); use a longer tail arm",
            source=source,
            path=f"{tail.key}.tail_arm",
        )
