"""Control surfaces of the design file (aileron, flap, elevator, rudder): keys, record, builder.

Span positions are a fraction of the semi-span or a length from the root (m); hinge positions
are chord fractions (0 at the leading edge, 1 at the trailing edge); angles in rad, trailing edge
down positive (rudder: trailing edge left positive); gaps in m.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from geomgen.design.common import DEG, FRACTION
from geomgen.design.fields import AnyOf, Flag, ListOf, Mapping, Number, Quantity, Text, between, ge
from geomgen.errors import InputError


#: the inner end of a control surface: as a position from the root, or from the body side
def _span_position(description: str, word: str, what: str, summary: str, examples: tuple) -> AnyOf:
    """A control surface's span end: a fraction of the semi-span, a length from the root, the
    reference ``word`` (body_side or tip) itself, or {word: LENGTH} measured from it."""
    return AnyOf(
        description=description,
        options=(
            Number(bounds=between(0.0, 1.0)),
            Quantity(dimension="length", bounds=ge(0.0)),
            Text(choices=(word,)),
            Mapping(
                fields=(
                    (
                        word,
                        Quantity(dimension="length", bounds=between(0.0, 50.0), description=what),
                    ),
                )
            ),
        ),
        summary=summary,
        tagged=True,
        examples=examples,
    )


_SPAN_START = _span_position(
    "inner end: a fraction of the semi-span (0 to 1), a length from the root, body_side "
    "(at the body side plus side_gap: the fuselage's side for a wing or tail half, the top "
    "of the body for a fin), or {body_side: LENGTH} (that much further outboard); "
    "positions from the body side follow the body when the sizing moves the surface",
    "body_side",
    "outboard of the body side plus side_gap",
    'a fraction of the semi-span in [0, 1], a length such as "1.2 m", body_side, or '
    '{body_side: "20 mm"}',
    (0.47, "0.55 m", "body_side", {"body_side": "20 mm"}),
)
#: the outer end: as a position from the root, or from the tip
_SPAN_END = _span_position(
    "outer end: a fraction of the semi-span (0 to 1), a length from the root, tip, or "
    "{tip: LENGTH} (that much inboard of the tip); positions from the tip follow the span",
    "tip",
    "inboard of the tip",
    'a fraction of the semi-span in [0, 1], a length such as "2.1 m", tip, or {tip: "150 mm"}',
    (0.94, "2.1 m", "tip", {"tip": "150 mm"}),
)

_HINGE_AT = AnyOf(
    description=(
        "chord fraction of the hinge line (0 = leading edge, 1 = trailing edge); for a "
        "'straight' hinge a list [inner end, outer end], or one number for a common hinge"
    ),
    options=(
        Number(bounds=FRACTION),
        ListOf(item=Number(bounds=FRACTION), min_items=2, max_items=2),
    ),
    summary="a chord fraction in (0, 1) or a list of two",
)


def control(kind_word: str) -> Mapping:
    return Mapping(
        description=f"{kind_word}: a moving part cut free at its hinge line",
        optional=True,
        fields=(
            ("span_start", _SPAN_START),
            ("span_end", _SPAN_END),
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
    #: "root": span_start as above; "body_side": span_start is a length outboard of the body
    #: side plus side_gap
    span_start_from: str = "root"
    #: "root": span_end as above; "tip": span_end is a length inboard of the tip
    span_end_from: str = "root"


def control_spec(surface: str, kind: str, c: dict[str, Any], source: str) -> ControlSpec:
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
    if start[0] == end[0] and start[0] < 2 and start[1] >= end[1]:
        raise InputError(
            f"must be outboard of span_start (got span_start {start[1]:g}, span_end {end[1]:g})",
            source=source,
            path=f"{path}.span_end",
        )
    return ControlSpec(
        kind=kind,
        span_start=_from_reference(start, "body_side"),
        span_end=_from_reference(end, "tip"),
        span_start_is_fraction=start[0] == 0,
        span_end_is_fraction=end[0] == 0,
        hinge=c["hinge"],
        hinge_at=tuple(hinge_at) if is_pair else (hinge_at, hinge_at),
        common_hinge=c["common_hinge"],
        deflection=c["deflection"],
        deflection_range=c["deflection_range"],
        hinge_gap=c["hinge_gap"],
        side_gap=c["side_gap"],
        span_start_from="body_side" if start[0] >= 2 else "root",
        span_end_from="tip" if end[0] >= 2 else "root",
    )


def _from_reference(tagged: tuple[int, Any], word: str) -> float:
    """A span position's number: the fraction or length as written (options 0, 1), zero for
    the bare word (2), or the length given under the word (3)."""
    option, value = tagged
    if option == 2:
        return 0.0
    if option == 3:
        return value[word]
    return value
