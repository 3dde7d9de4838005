"""The ``model`` section of the design file: a printable wind-tunnel model.

Declaration of its keys, the frozen ``ModelSpec`` (SI; lengths at model scale, angles in rad)
and its builder, which checks the deflections against the design's control surfaces.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from geomgen.design.common import DEG
from geomgen.design.fields import ListOf, Mapping, Number, Quantity, Text, between
from geomgen.errors import InputError


def _angles(kind: str) -> ListOf:
    return ListOf(
        item=Quantity(dimension="angle", bounds=between(-60 * DEG, 60 * DEG)),
        min_items=1,
        max_items=12,
        optional=True,
        description=f"{kind} deflections to print, one swappable piece each (trailing edge "
        "down positive; rudder: trailing edge left)",
    )


MODEL = Mapping(
    optional=True,
    description="a printable wind-tunnel model (geomgen model): scale, printer, holes, "
    "deflections, tunnel",
    fields=(
        (
            "scale",
            Text(
                optional=True,
                max_length=20,
                pattern=r"1:[0-9]+(\.[0-9]+)?",
                pattern_words="a scale written 1:N, e.g. 1:10",
                description="model scale 1:N (or give span)",
            ),
        ),
        (
            "span",
            Quantity(
                dimension="length",
                bounds=between(0.05, 5.0),
                optional=True,
                description="model span tip to tip, instead of scale",
            ),
        ),
        (
            "build_volume",
            ListOf(
                item=Quantity(dimension="length", bounds=between(0.02, 2.0)),
                min_items=3,
                max_items=3,
                default=["220 mm", "220 mm", "250 mm"],
                description="the printer's build volume, x y z",
            ),
        ),
        (
            "nozzle_diameter",
            Quantity(
                dimension="length",
                bounds=between(0.0001, 0.002),
                default="0.4 mm",
                description="printer nozzle diameter",
            ),
        ),
        (
            "material_density",
            Quantity(
                dimension="density",
                bounds=between(100.0, 20000.0),
                default="1.24 g/cm^3",
                description="density of the printed material (PLA about 1.24 g/cm^3)",
            ),
        ),
        (
            "min_te_thickness",
            Quantity(
                dimension="length",
                bounds=between(0.0001, 0.005),
                optional=True,
                description="least trailing-edge thickness of the model (default 1.5 nozzle "
                "diameters)",
            ),
        ),
        (
            "min_wall",
            Quantity(
                dimension="length",
                bounds=between(0.0002, 0.01),
                default="1.2 mm",
                description="least wall around every hole",
            ),
        ),
        (
            "spar",
            Mapping(
                optional=True,
                description="a round spar rod through the pieces of each wing half",
                fields=(
                    (
                        "diameter",
                        Quantity(dimension="length", bounds=between(0.0005, 0.03)),
                    ),
                    (
                        "at",
                        Number(
                            bounds=between(0.05, 0.7),
                            default=0.3,
                            description="chord fraction of the rod",
                        ),
                    ),
                ),
            ),
        ),
        (
            "dowels",
            Mapping(
                default={},
                description="dowel pins across each joint between pieces",
                fields=(
                    (
                        "diameter",
                        Quantity(dimension="length", bounds=between(0.0005, 0.02), default="3 mm"),
                    ),
                    (
                        "length",
                        Quantity(dimension="length", bounds=between(0.002, 0.1), default="12 mm"),
                    ),
                ),
            ),
        ),
        (
            "hinge_key",
            Quantity(
                dimension="length",
                bounds=between(0.0005, 0.01),
                default="1.5 mm",
                description="side of the square key bar on each hinge axis that holds a "
                "printed control surface at its angle",
            ),
        ),
        (
            "sting",
            Mapping(
                default={},
                description="the bore for the balance sting",
                fields=(
                    (
                        "diameter",
                        Quantity(dimension="length", bounds=between(0.001, 0.05), default="8 mm"),
                    ),
                    (
                        "depth",
                        Quantity(dimension="length", bounds=between(0.002, 0.5), default="40 mm"),
                    ),
                    (
                        "axis",
                        Text(
                            choices=("x", "z"),
                            default="x",
                            description="x: from the tail forward along the body; z: up from "
                            "below at the wing's MGC quarter chord",
                        ),
                    ),
                ),
            ),
        ),
        (
            "deflections",
            Mapping(
                default={},
                description="control-surface deflections to print (default: the design's)",
                fields=tuple((k, _angles(k)) for k in ("aileron", "flap", "elevator", "rudder")),
            ),
        ),
        (
            "tunnel",
            Mapping(
                default={},
                description="wind-tunnel conditions for the model's Reynolds number",
                fields=(
                    (
                        "speed",
                        Quantity(dimension="speed", bounds=between(1.0, 150.0), default="25 m/s"),
                    ),
                    (
                        "temperature",
                        Quantity(
                            dimension="temperature",
                            bounds=between(200.0, 350.0),
                            default="293.15 K",
                        ),
                    ),
                    (
                        "pressure",
                        Quantity(
                            dimension="pressure",
                            bounds=between(50000.0, 120000.0),
                            default="101325 Pa",
                        ),
                    ),
                ),
            ),
        ),
    ),
)


@dataclass(frozen=True)
class ModelSpec:
    """A printable wind-tunnel model (SI; lengths at model scale)."""

    scale: float | None  # model / full size, from "1:N"
    span: float | None  # m, model span tip to tip
    build_volume: tuple[float, float, float]  # m
    nozzle_diameter: float  # m
    material_density: float  # kg/m^3
    min_te_thickness: float  # m
    min_wall: float  # m
    spar_diameter: float | None  # m; None: no spar rod
    spar_at: float  # chord fraction
    dowel_diameter: float  # m
    dowel_length: float  # m
    hinge_key: float  # m, side of the square key bar
    sting_diameter: float  # m
    sting_depth: float  # m
    sting_axis: str  # x | z
    deflections: tuple[tuple[str, tuple[float, ...]], ...]  # control kind -> angles, rad
    tunnel_speed: float  # m/s
    tunnel_temperature: float  # K
    tunnel_pressure: float  # Pa


def default_model(source: str) -> ModelSpec:
    """The model settings of a design without a model section: every default, no scale."""
    spec = model_spec(MODEL.parse({}, "model"), {}, source)
    assert spec is not None
    return spec


def model_spec(raw: dict[str, Any] | None, design: dict[str, Any], source: str) -> ModelSpec | None:
    """The model section; checks what the schema cannot (scale or span, not both; only
    deflections of control surfaces the design has, within their deflection range)."""
    if raw is None:
        return None
    if raw["scale"] is not None and raw["span"] is not None:
        raise InputError("give scale or span, not both", source=source, path="model.span")
    scale = None
    if raw["scale"] is not None:
        n = float(raw["scale"].split(":")[1])
        if not 1.0 <= n <= 1000.0:
            raise InputError(
                f"must be 1:N with N in [1, 1000] (got {raw['scale']!r})",
                source=source,
                path="model.scale",
            )
        scale = 1.0 / n
    controls: dict[str, float] = {}
    for key in ("wing", "horizontal_tail", "vertical_tail"):
        for kind, c in ((design.get(key) or {}).get("controls") or {}).items():
            if c is not None:
                controls[kind] = c["deflection_range"]
    deflections = []
    for kind, angles in raw["deflections"].items():
        if angles is None:
            continue
        path = f"model.deflections.{kind}"
        if kind not in controls:
            have = ", ".join(controls) or "none"
            raise InputError(
                f"the design has no {kind} (its control surfaces: {have})", source=source, path=path
            )
        for i, a in enumerate(angles):
            if abs(a) > controls[kind] + 1e-12:
                raise InputError(
                    f"must be within the {kind}'s deflection_range of "
                    f"{math.degrees(controls[kind]):g} deg (got {math.degrees(a):g} deg)",
                    source=source,
                    path=f"{path}[{i}]",
                )
        if len(set(angles)) != len(angles):
            raise InputError("lists an angle twice", source=source, path=path)
        deflections.append((kind, tuple(angles)))
    spar = raw["spar"]
    return ModelSpec(
        scale=scale,
        span=raw["span"],
        build_volume=tuple(raw["build_volume"]),  # type: ignore[arg-type]
        nozzle_diameter=raw["nozzle_diameter"],
        material_density=raw["material_density"],
        min_te_thickness=raw["min_te_thickness"]
        if raw["min_te_thickness"] is not None
        else 1.5 * raw["nozzle_diameter"],
        min_wall=raw["min_wall"],
        spar_diameter=spar["diameter"] if spar else None,
        spar_at=spar["at"] if spar else 0.3,
        dowel_diameter=raw["dowels"]["diameter"],
        dowel_length=raw["dowels"]["length"],
        hinge_key=raw["hinge_key"],
        sting_diameter=raw["sting"]["diameter"],
        sting_depth=raw["sting"]["depth"],
        sting_axis=raw["sting"]["axis"],
        deflections=tuple(deflections),
        tunnel_speed=raw["tunnel"]["speed"],
        tunnel_temperature=raw["tunnel"]["temperature"],
        tunnel_pressure=raw["tunnel"]["pressure"],
    )
