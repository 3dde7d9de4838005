"""The lifting surfaces of the design file (wing, horizontal and vertical tail) and their panels.

Declaration of their keys, the frozen ``PanelSpec`` and ``SurfaceSpec`` (SI, angles in rad) and
their builder with the planform checks. Frames: chord fractions run 0 at the leading edge to 1
at the trailing edge; spanwise positions are measured from the plane of symmetry (from the root
for the vertical tail); apex x aft, z up in the aircraft frame.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from geomgen.design.common import DEG, FRACTION
from geomgen.design.controls import ControlSpec, control, control_spec
from geomgen.design.fields import AnyOf, ListOf, Mapping, Number, Quantity, Text, between
from geomgen.errors import InputError

_ANGLE_SMALL = between(-45 * DEG, 45 * DEG)


_PANEL = Mapping(
    description="one straight-tapered panel of a cranked surface, root to tip in order",
    fields=(
        (
            "span_fraction",
            Number(
                bounds=between(0.0, 1.0, lo_open=True),
                description="outer end of the panel, fraction of the semi-span",
            ),
        ),
        (
            "chord_ratio",
            Number(
                bounds=between(0.02, 2.0),
                description="chord at the panel's outer end / root chord",
            ),
        ),
        (
            "sweep",
            Quantity(
                dimension="angle",
                bounds=between(-60 * DEG, 60 * DEG),
                default="0 deg",
                description="panel sweep at sweep_at",
            ),
        ),
        (
            "sweep_at",
            Number(
                bounds=between(0.0, 1.0),
                optional=True,
                description="chord fraction the panel sweep refers to (default: the surface's)",
            ),
        ),
        (
            "dihedral",
            Quantity(
                dimension="angle",
                bounds=_ANGLE_SMALL,
                optional=True,
                description="panel dihedral (default: the surface's)",
            ),
        ),
        (
            "twist",
            Quantity(
                dimension="angle",
                bounds=_ANGLE_SMALL,
                optional=True,
                description="twist at the panel's outer end relative to the root "
                "(default: linear in span up to the surface's twist); within the panel the "
                "ruled law of the surface's twist applies",
            ),
        ),
        ("airfoil", Text(optional=True, description="section at the panel's outer end")),
    ),
)


def surface(which: str, *, tail: bool, fin: bool = False, controls: tuple[str, ...]) -> Mapping:
    planform: list[tuple[str, Any]] = []
    if tail:
        planform += [
            (
                "volume_coefficient",
                Number(bounds=between(0.001, 3.0), description="tail volume coefficient"),
            ),
            (
                "tail_arm",
                AnyOf(
                    options=(
                        Quantity(dimension="length", bounds=between(0.0, 200.0, lo_open=True)),
                        Text(choices=("optimum",)),
                    ),
                    description="distance from the wing's MGC quarter-chord point to this "
                    "tail's MGC quarter-chord point, or 'optimum' for the minimum-wetted-area "
                    "arm (needs the top-level key tail_cone, beside the tails, or a fuselage)",
                    summary='a length such as "4.2 m" or the word optimum',
                ),
            ),
        ]
    else:
        planform += [
            (
                "area",
                AnyOf(
                    options=(
                        Quantity(dimension="area", bounds=between(1e-3, 1e3)),
                        Text(choices=("from_stall",)),
                    ),
                    description="reference area, or 'from_stall' to size it from the "
                    "requirements with the lift equation",
                    summary='an area such as "12.5 m^2" or the word from_stall',
                ),
            ),
        ]
    planform += [
        (
            "aspect_ratio",
            Number(
                bounds=between(0.1, 40.0),
                description="b^2/S (for the one-sided vertical tail h^2/S)",
            ),
        ),
        (
            "taper_ratio",
            Number(
                bounds=between(0.02, 1.5),
                optional=True,
                description="tip chord / root chord (trapezoidal planform; "
                "leave out when panels are given)",
            ),
        ),
        (
            "sweep",
            Quantity(
                dimension="angle",
                bounds=between(-60 * DEG, 60 * DEG),
                default="0 deg",
                description="sweep angle at sweep_at",
            ),
        ),
        (
            "sweep_at",
            Number(
                bounds=between(0.0, 1.0),
                default=0.25,
                description="chord fraction the sweep refers to",
            ),
        ),
    ]
    if not fin:
        planform += [
            (
                "dihedral",
                Quantity(
                    dimension="angle",
                    bounds=_ANGLE_SMALL,
                    default="0 deg",
                    description="dihedral angle",
                ),
            ),
        ]
    planform += [
        (
            "incidence",
            Quantity(
                dimension="angle",
                bounds=between(-20 * DEG, 20 * DEG),
                default="0 deg",
                description="root incidence, nose up positive",
            ),
        ),
        (
            "twist",
            Quantity(
                dimension="angle",
                bounds=_ANGLE_SMALL,
                default="0 deg",
                description="tip incidence minus root incidence (washout negative). It holds "
                "at the root, the panel ends and the tip; in between, a panel is a ruled "
                "surface between its end sections, so its twist is that of their blended chord "
                "line, weighted by chord: tan(twist) = sum(w c sin) / sum(w c cos), w the span "
                "fractions (each template states the angle there)",
            ),
        ),
        (
            "twist_axis",
            Number(
                bounds=between(0.0, 1.0),
                default=0.25,
                description="chord fraction the sections are turned about",
            ),
        ),
        ("root_airfoil", Text(description="root section: NACA 4/5-digit name or a file name")),
        ("tip_airfoil", Text(optional=True, description="tip section (default: root's)")),
        (
            "apex",
            Mapping(
                description="position of the root leading edge in the aircraft frame",
                fields=(
                    *(
                        ()
                        if tail
                        else (
                            (
                                "x",
                                Quantity(
                                    dimension="length",
                                    bounds=between(-1000.0, 1000.0),
                                    description="fuselage station (x aft)",
                                ),
                            ),
                        )
                    ),
                    (
                        "z",
                        Quantity(
                            dimension="length",
                            bounds=between(-1000.0, 1000.0),
                            default="0 m",
                            description="water line (z up)",
                        ),
                    ),
                ),
            ),
        ),
        (
            "panels",
            ListOf(
                item=_PANEL,
                min_items=1,
                max_items=20,
                optional=True,
                description="panels of a cranked planform, root to tip",
            ),
        ),
        (
            "controls",
            Mapping(
                optional=True,
                description="control surfaces on this surface",
                fields=tuple((c, control(c)) for c in controls),
            ),
        ),
        (
            "spar_at",
            Number(
                bounds=FRACTION,
                optional=True,
                description="chord fraction of the main spar, marked on section templates",
            ),
        ),
    ]
    return Mapping(description=which, optional=tail, fields=tuple(planform))


@dataclass(frozen=True)
class PanelSpec:
    """A panel as written in the design (outer end values)."""

    span_fraction: float
    chord_ratio: float
    sweep: float  # rad, at sweep_at
    sweep_at: float
    dihedral: float  # rad
    twist: float | None  # rad at the outer end, relative to the root; None = linear
    airfoil: str | None


@dataclass(frozen=True)
class SurfaceSpec:
    """One lifting surface as written in the design (SI units, angles in rad)."""

    key: str  # wing | horizontal_tail | vertical_tail
    area: float | None  # m^2, None = from the stall requirement (wing) or volume coefficient
    volume_coefficient: float | None
    tail_arm: float | None  # m, None = optimum
    aspect_ratio: float
    taper_ratio: float | None
    sweep: float
    sweep_at: float
    dihedral: float
    incidence: float
    twist: float
    twist_axis: float
    root_airfoil: str
    tip_airfoil: str
    apex_x: float | None
    apex_z: float
    panels: tuple[PanelSpec, ...]
    controls: tuple[ControlSpec, ...]
    spar_at: float | None  # chord fraction of the main spar

    @property
    def symmetric(self) -> bool:
        """True for surfaces with a left and a right half (everything but the fin)."""
        return self.key != "vertical_tail"


def surface_spec(key: str, raw: dict[str, Any] | None, source: str) -> SurfaceSpec | None:
    if raw is None:
        return None
    area = raw.get("area")
    tail_arm = raw.get("tail_arm")
    dihedral = raw.get("dihedral") or 0.0
    panels = tuple(
        PanelSpec(
            span_fraction=p["span_fraction"],
            chord_ratio=p["chord_ratio"],
            sweep=p["sweep"],
            sweep_at=raw["sweep_at"] if p["sweep_at"] is None else p["sweep_at"],
            dihedral=dihedral if p["dihedral"] is None else p["dihedral"],
            twist=p["twist"],
            airfoil=p["airfoil"],
        )
        for p in (raw["panels"] or ())
    )
    controls = tuple(
        control_spec(key, kind, c, source)
        for kind, c in (raw["controls"] or {}).items()
        if c is not None
    )
    _check_planform_keys(key, raw, panels, source)
    return SurfaceSpec(
        key=key,
        area=area if isinstance(area, float) else None,
        volume_coefficient=raw.get("volume_coefficient"),
        tail_arm=tail_arm if isinstance(tail_arm, float) else None,
        aspect_ratio=raw["aspect_ratio"],
        taper_ratio=raw["taper_ratio"],
        sweep=raw["sweep"],
        sweep_at=raw["sweep_at"],
        dihedral=dihedral,
        incidence=raw["incidence"],
        twist=raw["twist"],
        twist_axis=raw["twist_axis"],
        root_airfoil=raw["root_airfoil"],
        tip_airfoil=raw["tip_airfoil"] or raw["root_airfoil"],
        apex_x=raw["apex"].get("x"),
        apex_z=raw["apex"]["z"],
        panels=panels,
        controls=controls,
        spar_at=raw["spar_at"],
    )


def _check_planform_keys(key: str, raw: dict[str, Any], panels: tuple, source: str) -> None:
    """A planform is either trapezoidal (taper_ratio) or made of panels, not both."""
    if raw["taper_ratio"] is not None and panels:
        raise InputError(
            "give taper_ratio for a trapezoidal planform or panels for a cranked one, not both",
            source=source,
            path=f"{key}.taper_ratio",
        )
    if raw["taper_ratio"] is None and not panels:
        raise InputError(
            "missing required key: taper_ratio (or a list of panels)",
            source=source,
            path=f"{key}.taper_ratio",
        )
    previous = 0.0
    for i, panel in enumerate(panels):
        if panel.span_fraction <= previous:
            raise InputError(
                f"must be greater than the previous panel's ({previous:g}); panels run root "
                f"to tip (got {panel.span_fraction:g})",
                source=source,
                path=f"{key}.panels[{i}].span_fraction",
            )
        previous = panel.span_fraction
    if panels and panels[-1].span_fraction != 1.0:
        raise InputError(
            f"the last panel must end at the tip: span_fraction 1 "
            f"(got {panels[-1].span_fraction:g})",
            source=source,
            path=f"{key}.panels[{len(panels) - 1}].span_fraction",
        )
