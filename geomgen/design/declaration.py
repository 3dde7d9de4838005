"""The design file: declaration of its keys, loading, validation, and the frozen ``Design``.

A design file is YAML (read with the safe loader) describing one airplane. Every dimensional
value carries a unit and is converted to SI here; the rest of geomgen sees only ``Design``.
Frames: chord fractions run 0 at the leading edge to 1 at the trailing edge; spanwise positions
are measured from the plane of symmetry (from the root for the vertical tail).
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

from geomgen.design.fields import (
    AnyOf,
    FieldError,
    Flag,
    ListOf,
    Mapping,
    Number,
    Quantity,
    Text,
    between,
    ge,
)
from geomgen.errors import InputError

#: Design files larger than this are refused before parsing (bytes).
MAX_DESIGN_BYTES = 1_000_000
#: Design files holding more values than this (after YAML aliases are expanded) are refused.
MAX_DESIGN_VALUES = 100_000
#: Design files nesting lists or mappings deeper than this are refused (the deepest key path
#: of a valid design, model.tunnel.speed or fuselage.stations[i].x, is 3 or 4 levels).
MAX_DESIGN_DEPTH = 32

DEG = math.pi / 180.0

#: cross-section shapes of a fuselage station
BODY_SHAPES = ("ellipse", "superellipse", "rounded_rectangle")

# --- declaration of the keys --------------------------------------------------------------------

_FRACTION = between(0.0, 1.0, lo_open=True, hi_open=True)
_ANGLE_SMALL = between(-45 * DEG, 45 * DEG)


def _span_position(what: str) -> AnyOf:
    return AnyOf(
        description=f"{what}: a fraction of the semi-span (0 to 1) or a length from the root",
        options=(Number(bounds=between(0.0, 1.0)), Quantity(dimension="length", bounds=ge(0.0))),
        summary='a fraction of the semi-span in [0, 1] or a length such as "1.2 m"',
        tagged=True,
    )


_HINGE_AT = AnyOf(
    description=(
        "chord fraction of the hinge line (0 = leading edge, 1 = trailing edge); for a "
        "'straight' hinge a list [inner end, outer end], or one number for a common hinge"
    ),
    options=(
        Number(bounds=_FRACTION),
        ListOf(item=Number(bounds=_FRACTION), min_items=2, max_items=2),
    ),
    summary="a chord fraction in (0, 1) or a list of two",
)


def _control(kind_word: str) -> Mapping:
    return Mapping(
        description=f"{kind_word}: a moving part cut free at its hinge line",
        optional=True,
        fields=(
            ("span_start", _span_position("inner end")),
            ("span_end", _span_position("outer end")),
            (
                "hinge",
                Text(
                    choices=("constant_fraction", "straight"),
                    default="constant_fraction",
                    description="constant_fraction: at a fixed fraction of the local chord; "
                    "straight: a straight line between the chord fractions given at its ends",
                ),
            ),
            ("hinge_at", _HINGE_AT),
            (
                "common_hinge",
                Flag(
                    default=False,
                    description="elevator only: both halves share one straight hinge line "
                    "perpendicular to the plane of symmetry",
                ),
            ),
            (
                "deflection",
                Quantity(
                    dimension="angle",
                    bounds=between(-60 * DEG, 60 * DEG),
                    default="0 deg",
                    description="deflection the moving part is built at: trailing edge down "
                    "positive (rudder: trailing edge left positive)",
                ),
            ),
            (
                "deflection_range",
                Quantity(
                    dimension="angle",
                    bounds=between(0.0, 60 * DEG, lo_open=True),
                    default="25 deg",
                    description="the cove of the fixed part clears deflections up to this, "
                    "both ways",
                ),
            ),
            (
                "hinge_gap",
                Quantity(
                    dimension="length",
                    bounds=between(0.0, 0.05),
                    default="1 mm",
                    description="gap between the moving part's rounded nose and the cove",
                ),
            ),
            (
                "side_gap",
                Quantity(
                    dimension="length",
                    bounds=between(0.0, 0.05),
                    default="2 mm",
                    description="spanwise gap at each end of the moving part",
                ),
            ),
        ),
    )


_DRAWINGS = Mapping(
    description="settings of drawings and 1:1 section templates",
    default={},
    fields=(
        (
            "template_spacing",
            Quantity(
                dimension="length",
                bounds=between(0.01, 10.0),
                optional=True,
                description="spanwise spacing of extra section templates between the root, "
                "panel breaks and tip (none if left out)",
            ),
        ),
        (
            "paper",
            Text(choices=("A4", "Letter"), default="A4", description="page size of the PDF"),
        ),
    ),
)


_SOLIDS = Mapping(
    description="settings of the solids, exports and self-checks",
    default={},
    fields=(
        (
            "te_thickness",
            Quantity(
                dimension="length",
                bounds=between(0.0, 0.02),
                default="0.5 mm",
                description="minimum trailing-edge thickness, blended over the aft chord",
            ),
        ),
        (
            "tessellation",
            Number(
                bounds=between(1e-5, 0.01),
                default=0.0005,
                description="largest deviation of the STL from the true surface, as a "
                "fraction of the local chord",
            ),
        ),
        (
            "section_points",
            Number(
                bounds=between(21, 301),
                integer=True,
                default=61,
                description="points per surface (upper or lower) of each section",
            ),
        ),
    ),
)


def _angles(kind: str) -> ListOf:
    return ListOf(
        item=Quantity(dimension="angle", bounds=between(-60 * DEG, 60 * DEG)),
        min_items=1,
        max_items=12,
        optional=True,
        description=f"{kind} deflections to print, one swappable piece each (trailing edge "
        "down positive; rudder: trailing edge left)",
    )


_MODEL = Mapping(
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
                "(default: linear in span up to the surface's twist)",
            ),
        ),
        ("airfoil", Text(optional=True, description="section at the panel's outer end")),
    ),
)


def _body_shape(prefix: str) -> Text:
    # no default in the declaration: the parametric keys must be told apart from stations
    return Text(
        choices=BODY_SHAPES,
        optional=True,
        description=f"{prefix}cross-section: ellipse (default), superellipse "
        "(|y/a|^n + |z/b|^n = 1, needs exponent) or rounded_rectangle (needs corner_radius)",
    )


_BODY_EXPONENT = Number(
    bounds=between(2.0, 10.0),
    optional=True,
    description="super-ellipse exponent n (2 = ellipse; larger = squarer)",
)
_BODY_CORNER = Quantity(
    dimension="length",
    bounds=between(0.0, 50.0, lo_open=True),
    optional=True,
    description="corner radius of a rounded rectangle, less than half the smaller of width "
    "and height",
)
_BODY_SIZE = between(0.0, 50.0)

_BODY_STATION = Mapping(
    description="one fuselage station (cross-section), nose to tail",
    fields=(
        (
            "x",
            Quantity(
                dimension="length",
                bounds=between(-1000.0, 1000.0),
                description="fuselage station (x aft) of the section",
            ),
        ),
        (
            "width",
            Quantity(
                dimension="length",
                bounds=_BODY_SIZE,
                description="full width (y); 0 with height 0 at the first or last station only "
                "(a pointed nose or tail)",
            ),
        ),
        (
            "height",
            Quantity(
                dimension="length",
                bounds=_BODY_SIZE,
                description="full height (z); 0 with width 0 at the first or last station only",
            ),
        ),
        (
            "z",
            Quantity(
                dimension="length",
                bounds=between(-1000.0, 1000.0),
                default="0 m",
                description="water line of the section centre (z up)",
            ),
        ),
        ("shape", _body_shape("")),
        ("exponent", _BODY_EXPONENT),
        ("corner_radius", _BODY_CORNER),
    ),
)

#: keys of the short parametric form of the fuselage (the alternative to ``stations``)
BODY_PARAMETRIC_KEYS = (
    "nose_x",
    "length",
    "max_width",
    "max_height",
    "nose_length",
    "tail_cone_length",
    "tail_end_radius",
    "centre_z",
    "shape",
    "exponent",
    "corner_radius",
)


def _body_length(description: str, bounds=None) -> Quantity:
    return Quantity(
        dimension="length",
        bounds=bounds or between(0.0, 200.0, lo_open=True),
        optional=True,
        description=description,
    )


_FUSELAGE = Mapping(
    optional=True,
    description="the fuselage: a list of stations, or the short parametric form (length, "
    "max_width, max_height, nose_length, tail_cone_length, tail_end_radius, ...), not both",
    fields=(
        (
            "stations",
            ListOf(
                item=_BODY_STATION,
                min_items=2,
                max_items=200,
                optional=True,
                description="cross-sections from nose to tail, x increasing",
            ),
        ),
        (
            "nose_x",
            _body_length(
                "parametric form: fuselage station of the nose tip (default 0 m)",
                between(-1000.0, 1000.0),
            ),
        ),
        ("length", _body_length("parametric form: nose tip to tail end")),
        ("max_width", _body_length("parametric form: full width of the largest section")),
        ("max_height", _body_length("parametric form: full height of the largest section")),
        (
            "nose_length",
            _body_length(
                "parametric form: the nose grows like a half-ellipse profile over this length"
            ),
        ),
        (
            "tail_cone_length",
            _body_length(
                "parametric form: the tail cone shrinks linearly over this length to the tail end"
            ),
        ),
        (
            "tail_end_radius",
            _body_length(
                "parametric form: half-width and half-height of the tail end (0: pointed)",
                _BODY_SIZE,
            ),
        ),
        (
            "centre_z",
            _body_length(
                "parametric form: water line of the section centres (default 0 m)",
                between(-1000.0, 1000.0),
            ),
        ),
        ("shape", _body_shape("parametric form: ")),
        ("exponent", _BODY_EXPONENT),
        ("corner_radius", _BODY_CORNER),
    ),
)


def _surface(which: str, *, tail: bool, fin: bool = False, controls: tuple[str, ...]) -> Mapping:
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
                    "arm (needs tail_cone or a fuselage)",
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
                description="tip incidence minus root incidence (washout negative)",
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
                fields=tuple((c, _control(c)) for c in controls),
            ),
        ),
        (
            "spar_at",
            Number(
                bounds=_FRACTION,
                optional=True,
                description="chord fraction of the main spar, marked on section templates",
            ),
        ),
    ]
    return Mapping(description=which, optional=tail, fields=tuple(planform))


DESIGN = Mapping(
    description="one airplane for geomgen",
    fields=(
        (
            "name",
            Text(
                max_length=60,
                pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]*$",
                pattern_words="letters, digits, '.', '_' or '-', starting with a letter or digit",
                description="short name; used as the output folder name",
            ),
        ),
        ("title", Text(optional=True, description="longer title for reports")),
        (
            "date",
            Text(
                optional=True,
                pattern=r"^\d{4}-\d{2}-\d{2}$",
                pattern_words="a date written YYYY-MM-DD",
                description="design date YYYY-MM-DD, printed on reports",
            ),
        ),
        (
            "units",
            Text(
                choices=("si", "imperial"),
                default="si",
                description="unit system of human-readable outputs",
            ),
        ),
        (
            "requirements",
            Mapping(
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
            ),
        ),
        ("wing", _surface("main wing", tail=False, controls=("aileron", "flap"))),
        ("horizontal_tail", _surface("horizontal tail", tail=True, controls=("elevator",))),
        (
            "vertical_tail",
            _surface("vertical tail, one-sided", tail=True, fin=True, controls=("rudder",)),
        ),
        ("solids", _SOLIDS),
        ("drawings", _DRAWINGS),
        (
            "tail_cone",
            Mapping(
                optional=True,
                description="tail-cone radii for the minimum-wetted-area tail arm",
                fields=(
                    (
                        "front_radius",
                        Quantity(dimension="length", bounds=between(0.0, 5.0, lo_open=True)),
                    ),
                    ("rear_radius", Quantity(dimension="length", bounds=between(0.0, 5.0))),
                ),
            ),
        ),
        ("fuselage", _FUSELAGE),
        ("model", _MODEL),
    ),
)


def json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a design file, generated from the declaration."""
    body = DESIGN.schema()
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": "geomgen design file",
        **body,
    }


# --- the frozen result --------------------------------------------------------------------------


@dataclass(frozen=True)
class Requirements:
    gross_weight: float  # N
    stall_speed: float  # m/s (true airspeed)
    altitude: float  # m, of kind altitude_kind
    altitude_kind: str  # "geometric" | "geopotential"
    cl_max: float


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
class ControlSpec:
    """A control surface as written; span positions are semi-span fractions or lengths (m)."""

    kind: str  # aileron | flap | elevator | rudder
    span_start: float
    span_end: float
    span_start_is_fraction: bool
    span_end_is_fraction: bool
    hinge: str  # constant_fraction | straight
    hinge_at: tuple[float, float]  # chord fraction at the inner and outer end
    common_hinge: bool
    deflection: float  # rad, trailing edge down (rudder: left) positive
    deflection_range: float  # rad, cove clears +- this
    hinge_gap: float  # m
    side_gap: float  # m


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


@dataclass(frozen=True)
class SolidsSpec:
    te_thickness: float  # m, minimum trailing-edge thickness
    tessellation: float  # fraction of the local chord
    section_points: int  # per surface of a section


@dataclass(frozen=True)
class DrawingsSpec:
    template_spacing: float | None  # m, spanwise spacing of extra templates
    paper: str  # A4 | Letter


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


@dataclass(frozen=True)
class BodyStation:
    """One fuselage cross-section in the aircraft frame (m)."""

    x: float  # fuselage station
    width: float  # full width (y)
    height: float  # full height (z)
    z: float  # water line of the section centre
    shape: str = "ellipse"  # ellipse | superellipse | rounded_rectangle
    exponent: float = 2.0  # superellipse exponent n (2 for an ellipse)
    corner_radius: float = 0.0  # rounded_rectangle only


@dataclass(frozen=True)
class ParametricBody:
    """The short form of a fuselage (m): a half-ellipse nose, a constant section, a straight
    tail cone."""

    nose_x: float  # fuselage station of the nose tip
    length: float  # nose tip to tail end
    max_width: float
    max_height: float
    nose_length: float
    tail_cone_length: float
    tail_end_radius: float  # half-width and half-height of the tail end (0: pointed)
    centre_z: float  # water line of the section centres
    shape: str
    exponent: float
    corner_radius: float  # at the largest section; scales with the section's smaller size


@dataclass(frozen=True)
class FuselageSpec:
    """The fuselage as written: stations (nose to tail) or the parametric form."""

    stations: tuple[BodyStation, ...]  # empty for the parametric form
    parametric: ParametricBody | None


@dataclass(frozen=True)
class Design:
    name: str
    title: str
    date: str | None
    units: str
    requirements: Requirements
    wing: SurfaceSpec
    horizontal_tail: SurfaceSpec | None
    vertical_tail: SurfaceSpec | None
    tail_cone_radii: tuple[float, float] | None  # m (front, rear)
    solids: SolidsSpec
    drawings: DrawingsSpec
    source: str  # file the design came from, for messages
    fuselage: FuselageSpec | None = None
    model: ModelSpec | None = None

    @property
    def surfaces(self) -> tuple[SurfaceSpec, ...]:
        return tuple(s for s in (self.wing, self.horizontal_tail, self.vertical_tail) if s)


# --- loading ------------------------------------------------------------------------------------


def load(path: str | Path) -> Design:
    """Read, validate and convert a design file. Raises InputError with a one-line message."""
    path = Path(path)
    source = str(path)
    try:
        size = path.stat().st_size
    except OSError as err:
        raise InputError(f"cannot read the design file ({err.strerror})", source=source) from None
    if not path.is_file():
        raise InputError("is not a file", source=source)
    if size > MAX_DESIGN_BYTES:
        raise InputError(
            f"design file is {size} bytes; at most {MAX_DESIGN_BYTES} are accepted", source=source
        )
    try:
        text = path.read_text(encoding="utf-8")
    except UnicodeDecodeError:
        raise InputError("is not UTF-8 text; a design file is YAML", source=source) from None
    except OSError as err:
        raise InputError(f"cannot read the design file ({err.strerror})", source=source) from None
    return loads(text, source=source)


def loads(text: str, source: str = "<design>") -> Design:
    """Validate and convert design text (YAML). See :func:`load`."""
    import yaml

    _check_nesting(text, source)
    try:
        loader = _strict_safe_loader()(text)  # a SafeLoader subclass: no arbitrary objects
        try:
            document = loader.get_single_data()
        finally:
            loader.dispose()
    except RecursionError:  # PyYAML composes nested nodes recursively
        raise InputError(_too_deep(), source=source) from None
    except _DuplicateKey as err:
        raise InputError(str(err), source=source) from None
    except yaml.YAMLError as err:
        mark = getattr(err, "problem_mark", None)
        where = f"line {mark.line + 1}, column {mark.column + 1}: " if mark else ""
        problem = getattr(err, "problem", None) or "not valid YAML"
        raise InputError(f"{where}malformed YAML ({problem})", source=source) from None
    return from_mapping(document, source=source)


def _too_deep() -> str:
    return (
        f"nests lists or mappings more than {MAX_DESIGN_DEPTH} levels deep; a design file "
        "needs at most 4"
    )


def _check_nesting(text: str, source: str) -> None:
    """Refuse deep nesting before the YAML composer recurses into it (a RecursionError):
    the depth is counted on the parser's events, which come without recursion."""
    import yaml

    depth = 0
    try:
        for event in yaml.parse(text, Loader=yaml.SafeLoader):
            if isinstance(event, (yaml.SequenceStartEvent, yaml.MappingStartEvent)):
                depth += 1
                if depth > MAX_DESIGN_DEPTH + 1:  # + 1: the document's own mapping
                    raise InputError(_too_deep(), source=source)
            elif isinstance(event, (yaml.SequenceEndEvent, yaml.MappingEndEvent)):
                depth -= 1
    except yaml.YAMLError:
        return  # the loader reports malformed YAML with its line and column


class _DuplicateKey(ValueError):
    pass


@lru_cache(maxsize=1)
def _strict_safe_loader():
    """yaml.SafeLoader that refuses a key written twice in one mapping (PyYAML would keep the
    last one silently, which hides a typo in a design file)."""
    import yaml

    class StrictSafeLoader(yaml.SafeLoader):
        def construct_mapping(self, node, deep=False):
            seen = set()
            for key_node, _ in node.value:
                key = self.construct_object(key_node, deep=True)
                if key in seen:
                    mark = key_node.start_mark
                    raise _DuplicateKey(
                        f"line {mark.line + 1}: key {key!r} is written twice in one mapping; "
                        f"keep one"
                    )
                seen.add(key)
            return super().construct_mapping(node, deep=deep)

    return StrictSafeLoader


def from_mapping(document: Any, source: str = "<design>") -> Design:
    """Validate a parsed document with the JSON Schema, convert it, check combinations."""
    if document is None:
        raise InputError(
            "is empty; a design file is a mapping of keys (name, requirements, wing, ...)",
            source=source,
        )
    if not isinstance(document, dict):
        raise InputError(
            f"a design file must be a mapping of keys (got {type(document).__name__})",
            source=source,
        )
    # One JSON-like copy for both checks: YAML dates become text, and aliases that would
    # expand to a huge tree are refused before anything walks them.
    document = _plain(document, [MAX_DESIGN_VALUES], source)
    _validate_structure(document, source)
    try:
        raw = DESIGN.parse(document, "")
    except FieldError as err:
        raise InputError(err.message, source=source, path=err.path) from None
    design = _build(raw, source)
    if design.fuselage is not None and design.tail_cone_radii is not None:
        raise InputError(
            "leave tail_cone out when a fuselage is given: the tail-cone radii come from the "
            "fuselage",
            source=source,
            path="tail_cone",
        )
    needs_cone = [s.key for s in design.surfaces if s.volume_coefficient and s.tail_arm is None]
    # a fuselage gives the tail-cone radii itself (fuselage.tail_cone_radii)
    if needs_cone and design.tail_cone_radii is None and design.fuselage is None:
        raise InputError(
            "missing required key: tail_arm 'optimum' needs front_radius and rear_radius "
            "(or a fuselage)",
            source=source,
            path="tail_cone",
        )
    return design


def _validate_structure(document: dict[str, Any], source: str) -> None:
    """Validate with the jsonschema library; report the first error in our own words."""
    import jsonschema

    validator = jsonschema.Draft202012Validator(json_schema())
    error = jsonschema.exceptions.best_match(validator.iter_errors(document))
    if error is None:
        return
    # The declaration gives the clearer message for the same fault: let it speak first.
    try:
        DESIGN.parse(document, "")
    except FieldError as err:
        raise InputError(err.message, source=source, path=err.path) from None
    path = ".".join(str(p) for p in error.absolute_path)
    raise InputError(error.message.splitlines()[0][:200], source=source, path=path or None)


def _plain(value: Any, budget: list[int], source: str, depth: int = 0) -> Any:
    """YAML may give dates and other types; make a JSON-like copy for the checks.

    ``budget`` holds how many more values may be copied (YAML aliases can make a small file
    expand into a huge tree); ``depth`` is the nesting level (refused past the limit)."""
    if depth > MAX_DESIGN_DEPTH:
        raise InputError(_too_deep(), source=source)
    budget[0] -= 1
    if budget[0] < 0:
        raise InputError(
            f"holds more than {MAX_DESIGN_VALUES} values (counting repeats made by YAML "
            "aliases); a design file is much smaller",
            source=source,
        )
    if isinstance(value, dict):
        return {str(k): _plain(v, budget, source, depth + 1) for k, v in value.items()}
    if isinstance(value, list):
        return [_plain(v, budget, source, depth + 1) for v in value]
    if value is None or isinstance(value, (str, int, float, bool)):
        return value
    return json.loads(json.dumps(value, default=str))


def _build(raw: dict[str, Any], source: str) -> Design:
    req = raw["requirements"]
    requirements = Requirements(
        gross_weight=req["gross_weight"],
        stall_speed=req["stall_speed"],
        altitude=req["altitude"],
        altitude_kind=req["altitude_kind"],
        cl_max=req["cl_max"],
    )
    cone = raw["tail_cone"]
    return Design(
        name=raw["name"],
        title=raw["title"] or raw["name"],
        date=raw["date"],
        units=raw["units"],
        requirements=requirements,
        wing=_surface_spec("wing", raw["wing"], source),
        horizontal_tail=_surface_spec("horizontal_tail", raw["horizontal_tail"], source),
        vertical_tail=_surface_spec("vertical_tail", raw["vertical_tail"], source),
        tail_cone_radii=(cone["front_radius"], cone["rear_radius"]) if cone else None,
        solids=SolidsSpec(**raw["solids"]),
        drawings=DrawingsSpec(**raw["drawings"]),
        source=source,
        fuselage=_fuselage_spec(raw["fuselage"], source),
        model=_model_spec(raw["model"], raw, source),
    )


def default_model(source: str) -> ModelSpec:
    """The model settings of a design without a model section: every default, no scale."""
    spec = _model_spec(_MODEL.parse({}, "model"), {}, source)
    assert spec is not None
    return spec


def _model_spec(
    raw: dict[str, Any] | None, design: dict[str, Any], source: str
) -> ModelSpec | None:
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


def _fuselage_spec(raw: dict[str, Any] | None, source: str) -> FuselageSpec | None:
    """Either stations or the parametric keys, not both; checks what the schema cannot."""
    if raw is None:
        return None
    given = [k for k in BODY_PARAMETRIC_KEYS if raw[k] is not None]
    if raw["stations"] is not None:
        if given:
            raise InputError(
                "give stations or the parametric keys (length, max_width, ...), not both",
                source=source,
                path=f"fuselage.{given[0]}",
            )
        stations = tuple(
            _body_station(st, f"fuselage.stations[{i}]", source)
            for i, st in enumerate(raw["stations"])
        )
        _check_body_stations(stations, source)
        return FuselageSpec(stations=stations, parametric=None)
    for key in ("length", "max_width", "max_height", "nose_length", "tail_cone_length"):
        if raw[key] is None:
            raise InputError(
                "missing required key (give stations, or length, max_width, max_height, "
                "nose_length, tail_cone_length and tail_end_radius)",
                source=source,
                path=f"fuselage.{key}",
            )
    if raw["tail_end_radius"] is None:
        raise InputError(
            "missing required key (half-width and half-height of the tail end; 0 m: pointed)",
            source=source,
            path="fuselage.tail_end_radius",
        )
    shape, exponent, corner = _body_shape_keys(raw, "fuselage", source)
    body = ParametricBody(
        nose_x=raw["nose_x"] or 0.0,
        length=raw["length"],
        max_width=raw["max_width"],
        max_height=raw["max_height"],
        nose_length=raw["nose_length"],
        tail_cone_length=raw["tail_cone_length"],
        tail_end_radius=raw["tail_end_radius"],
        centre_z=raw["centre_z"] or 0.0,
        shape=shape,
        exponent=exponent,
        corner_radius=corner,
    )
    if body.nose_length + body.tail_cone_length > body.length * (1 + 1e-12):
        raise InputError(
            f"nose_length + tail_cone_length must not exceed length ({body.length:g} m; got "
            f"{body.nose_length:g} + {body.tail_cone_length:g} m)",
            source=source,
            path="fuselage.tail_cone_length",
        )
    smaller = min(body.max_width, body.max_height) / 2
    if body.tail_end_radius > smaller:
        raise InputError(
            f"must be at most half the smaller of max_width and max_height ({smaller:g} m; "
            f"got {body.tail_end_radius:g} m)",
            source=source,
            path="fuselage.tail_end_radius",
        )
    if shape == "rounded_rectangle" and corner >= smaller:
        raise InputError(
            f"must be less than half the smaller of max_width and max_height ({smaller:g} m; "
            f"got {corner:g} m)",
            source=source,
            path="fuselage.corner_radius",
        )
    return FuselageSpec(stations=(), parametric=body)


def _body_shape_keys(raw: dict[str, Any], path: str, source: str) -> tuple[str, float, float]:
    """(shape, exponent, corner radius) with the keys that belong to the shape only."""
    shape = raw["shape"] or "ellipse"
    exponent, corner = raw["exponent"], raw["corner_radius"]
    if shape == "superellipse" and exponent is None:
        raise InputError(
            "missing required key: a superellipse needs its exponent (2 to 10)",
            source=source,
            path=f"{path}.exponent",
        )
    if shape != "superellipse" and exponent is not None:
        raise InputError(
            f"exponent belongs to shape superellipse only (shape is {shape})",
            source=source,
            path=f"{path}.exponent",
        )
    if shape != "rounded_rectangle" and corner is not None:
        raise InputError(
            f"corner_radius belongs to shape rounded_rectangle only (shape is {shape})",
            source=source,
            path=f"{path}.corner_radius",
        )
    if shape == "rounded_rectangle" and corner is None:
        raise InputError(
            "missing required key: a rounded_rectangle needs its corner_radius",
            source=source,
            path=f"{path}.corner_radius",
        )
    return shape, (exponent if shape == "superellipse" else 2.0), corner or 0.0


def _body_station(raw: dict[str, Any], path: str, source: str) -> BodyStation:
    shape, exponent, corner = _body_shape_keys(raw, path, source)
    pointed = raw["width"] == 0.0 and raw["height"] == 0.0
    station = BodyStation(
        x=raw["x"],
        width=raw["width"],
        height=raw["height"],
        z=raw["z"],
        shape=shape,
        exponent=exponent,
        corner_radius=0.0 if pointed else corner,  # a point has no corners
    )
    if shape == "rounded_rectangle" and not pointed:
        smaller = min(station.width, station.height) / 2
        if corner >= smaller:
            raise InputError(
                f"must be less than half the smaller of width and height ({smaller:g} m; "
                f"got {corner:g} m)",
                source=source,
                path=f"{path}.corner_radius",
            )
    return station


def _check_body_stations(stations: tuple[BodyStation, ...], source: str) -> None:
    """x strictly increasing; zero size only as a point (width and height 0) at either end."""
    last = len(stations) - 1
    for i, st in enumerate(stations):
        path = f"fuselage.stations[{i}]"
        if i and st.x <= stations[i - 1].x:
            raise InputError(
                f"must be greater than the previous station's ({stations[i - 1].x:g} m); "
                f"stations run nose to tail (got {st.x:g} m)",
                source=source,
                path=f"{path}.x",
            )
        for key, value in (("width", st.width), ("height", st.height)):
            if value > 0.0:
                continue
            if i not in (0, last):
                raise InputError(
                    f"must be > 0 m between the first and last station; only the nose or "
                    f"tail may be a point (got {value:g} m)",
                    source=source,
                    path=f"{path}.{key}",
                )
            if st.width != st.height:
                raise InputError(
                    f"a pointed end has width and height both 0 m (got {key} 0 m, "
                    f"{'height' if key == 'width' else 'width'} "
                    f"{max(st.width, st.height):g} m)",
                    source=source,
                    path=f"{path}.{key}",
                )
    if all(st.width == 0.0 for st in stations):
        raise InputError(
            "a fuselage needs at least one station of non-zero size",
            source=source,
            path="fuselage.stations",
        )


def _surface_spec(key: str, raw: dict[str, Any] | None, source: str) -> SurfaceSpec | None:
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
        _control_spec(key, kind, c, source)
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


def _control_spec(surface: str, kind: str, c: dict[str, Any], source: str) -> ControlSpec:
    path = f"{surface}.controls.{kind}"
    hinge_at = c["hinge_at"]
    is_pair = isinstance(hinge_at, list)
    if c["hinge"] == "constant_fraction" and is_pair:
        raise InputError(
            "a constant_fraction hinge takes one chord fraction; a list [inner, outer] needs "
            "hinge: straight",
            source=source,
            path=f"{path}.hinge_at",
        )
    if c["common_hinge"]:
        if kind != "elevator":
            raise InputError(
                "only an elevator can have a common hinge (its two halves share one line)",
                source=source,
                path=f"{path}.common_hinge",
            )
        if c["hinge"] != "straight" or is_pair:
            raise InputError(
                "a common hinge is straight and takes one chord fraction (at the inner end): "
                "set hinge: straight and hinge_at: <fraction>",
                source=source,
                path=f"{path}.hinge_at",
            )
    elif c["hinge"] == "straight" and not is_pair:
        raise InputError(
            "a straight hinge takes the chord fractions at both ends, e.g. [0.72, 0.75]",
            source=source,
            path=f"{path}.hinge_at",
        )
    if abs(c["deflection"]) > c["deflection_range"] + 1e-12:
        raise InputError(
            f"must be within the deflection_range of +-{c['deflection_range'] / DEG:g} deg "
            f"(got {c['deflection'] / DEG:g} deg)",
            source=source,
            path=f"{path}.deflection",
        )
    start, end = c["span_start"], c["span_end"]
    if start[0] == end[0] and start[1] >= end[1]:
        raise InputError(
            f"must be outboard of span_start (got span_start {start[1]:g}, span_end {end[1]:g})",
            source=source,
            path=f"{path}.span_end",
        )
    return ControlSpec(
        kind=kind,
        span_start=start[1],
        span_end=end[1],
        span_start_is_fraction=start[0] == 0,
        span_end_is_fraction=end[0] == 0,
        hinge=c["hinge"],
        hinge_at=tuple(hinge_at) if is_pair else (hinge_at, hinge_at),
        common_hinge=c["common_hinge"],
        deflection=c["deflection"],
        deflection_range=c["deflection_range"],
        hinge_gap=c["hinge_gap"],
        side_gap=c["side_gap"],
    )
