"""The ``fuselage`` section of the design file: stations or the short parametric form.

Declaration of its keys, the frozen ``BodyStation``, ``ParametricBody`` and ``FuselageSpec``
(m, aircraft frame: x aft along the fuselage station, y right, z up on the water line) and their
builders with the checks the schema cannot make.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from geomgen.design.fields import ListOf, Mapping, Number, Quantity, Text, between
from geomgen.errors import InputError

#: cross-section shapes of a fuselage station
BODY_SHAPES = ("ellipse", "superellipse", "rounded_rectangle")


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


FUSELAGE = Mapping(
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
        (
            "end_behind_tails",
            Quantity(
                dimension="length",
                bounds=between(-5.0, 5.0),
                optional=True,
                description="the body ends this far behind the rearmost tail root's trailing "
                "edge: its tail cone stretches or shrinks as the sizing moves the tails (nose "
                "and cabin stay; stations aft of the cone's start stretch along x); leave it "
                "out for a body of fixed length",
            ),
        ),
    ),
)


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
    end_behind_tails: float | None = None  # m; None: the body's length is as written


def fuselage_spec(raw: dict[str, Any] | None, source: str) -> FuselageSpec | None:
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
        return FuselageSpec(
            stations=stations, parametric=None, end_behind_tails=raw["end_behind_tails"]
        )
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
    return FuselageSpec(stations=(), parametric=body, end_behind_tails=raw["end_behind_tails"])


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
