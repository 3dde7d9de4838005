"""The ``requirements`` section of the design file: what the sizing starts from.

Declaration of its keys, the frozen ``Requirements`` (SI: N, m/s, m) and its builder.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

from geomgen.design.fields import AnyOf, Mapping, Number, Quantity, Text, between

#: one CG position: a bare number is a fraction of the wing's MGC aft of its leading edge
#: (0.28 = 28 % MGC); a length is an x station in the aircraft frame ("2.05 m")
CG_POSITION = AnyOf(
    options=(
        Number(bounds=between(-1.0, 2.0)),
        Quantity(dimension="length", bounds=between(-1000.0, 1000.0)),
    ),
    summary='a fraction of the MGC such as 0.28 or an x station such as "2.05 m"',
    tagged=True,
)

CG = AnyOf(
    options=(
        CG_POSITION,
        Mapping(
            fields=(
                ("forward", replace(CG_POSITION, description="the forward CG limit")),
                ("aft", replace(CG_POSITION, description="the aft CG limit")),
            ),
            description="the forward and the aft CG limit",
        ),
    ),
    optional=True,
    description="centre of gravity for the static margins: one position, or "
    "{forward: ..., aft: ...}; each a bare number = fraction of the wing's MGC aft of its "
    'leading edge (0.28 = 28 % MGC) or a length = x station in the aircraft frame ("2.05 m")',
    summary='a fraction of the MGC such as 0.28, an x station such as "2.05 m", or a '
    "mapping with forward and aft",
    tagged=True,
)

REQUIREMENTS = Mapping(
    description="what the sizing starts from",
    fields=(
        (
            "gross_weight",
            Quantity(
                dimension="weight",
                # limits keep the sizing arithmetic finite (1 g to 100 t)
                bounds=between(0.01, 1e6),
                description="design gross weight, as a mass or a force",
            ),
        ),
        (
            "stall_speed",
            Quantity(
                dimension="speed",
                bounds=between(1.0, 150.0),
                description="stall speed (true airspeed)",
            ),
        ),
        (
            "altitude",
            Quantity(
                dimension="length",
                bounds=between(0.0, 20000.0),
                default="0 m",
                description="altitude of the stall requirement, 0 to 20 km",
            ),
        ),
        (
            "altitude_kind",
            Text(
                choices=("geometric", "geopotential"),
                default="geometric",
                description="how altitude is measured",
            ),
        ),
        (
            "cl_max",
            Number(
                bounds=between(0.1, 5.0),
                description="maximum lift coefficient of the airplane",
            ),
        ),
        ("cg", CG),
        (
            "tail_dynamic_pressure_ratio",
            Number(
                bounds=between(0.5, 1.2),
                default=0.9,
                description="q at the horizontal tail over the free-stream q, for the neutral "
                "point (0.9 by common practice)",
            ),
        ),
        (
            "section_lift_slope",
            Number(
                bounds=between(3.0, 7.5),
                default=2 * math.pi,
                description="section lift-curve slope of wing and tail airfoils, per rad, "
                "for the neutral point (thin-airfoil theory: 2 pi)",
            ),
        ),
    ),
)


@dataclass(frozen=True)
class Requirements:
    gross_weight: float  # N
    stall_speed: float  # m/s (true airspeed)
    altitude: float  # m, of kind altitude_kind
    altitude_kind: str  # "geometric" | "geopotential"
    cl_max: float
    #: CG positions (label, kind, value): label "given", "forward" or "aft"; kind "mgc"
    #: (value a fraction of the wing's MGC aft of its leading edge) or "x" (value in m)
    cg: tuple[tuple[str, str, float], ...] = ()
    tail_dynamic_pressure_ratio: float = 0.9
    section_lift_slope: float = 2 * math.pi


def requirements_spec(req: dict[str, Any]) -> Requirements:
    """The frozen requirements from the parsed section."""
    return Requirements(
        gross_weight=req["gross_weight"],
        stall_speed=req["stall_speed"],
        altitude=req["altitude"],
        altitude_kind=req["altitude_kind"],
        cl_max=req["cl_max"],
        cg=_cg(req["cg"]),
        tail_dynamic_pressure_ratio=req["tail_dynamic_pressure_ratio"],
        section_lift_slope=req["section_lift_slope"],
    )


def _cg(tagged: tuple[int, Any] | None) -> tuple[tuple[str, str, float], ...]:
    """The parsed ``cg`` key as (label, kind, value) triples, forward first."""
    if tagged is None:
        return ()
    option, value = tagged

    def one(label: str, position: tuple[int, float]) -> tuple[str, str, float]:
        return (label, "mgc" if position[0] == 0 else "x", position[1])

    if option == 0:
        return (one("given", value),)
    return (one("forward", value["forward"]), one("aft", value["aft"]))
