"""The ``requirements`` section of the design file: what the sizing starts from.

Declaration of its keys, the frozen ``Requirements`` (SI: N, m/s, m) and its builder.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from geomgen.design.fields import Mapping, Number, Quantity, Text, between

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
    ),
)


@dataclass(frozen=True)
class Requirements:
    gross_weight: float  # N
    stall_speed: float  # m/s (true airspeed)
    altitude: float  # m, of kind altitude_kind
    altitude_kind: str  # "geometric" | "geopotential"
    cl_max: float


def requirements_spec(req: dict[str, Any]) -> Requirements:
    """The frozen requirements from the parsed section."""
    return Requirements(
        gross_weight=req["gross_weight"],
        stall_speed=req["stall_speed"],
        altitude=req["altitude"],
        altitude_kind=req["altitude_kind"],
        cl_max=req["cl_max"],
    )
