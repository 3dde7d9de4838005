"""A fuselage whose tail cone follows the tails (pure math, m, aircraft-frame x).

When the sizing moves the tails (a longer optimum arm for a larger wing), the body's end is
put a stated distance behind the rearmost tail root's trailing edge. What stays: everything
ahead of the tail cone's start (nose, cabin); what stretches: the tail cone alone, so the
equivalent radii at its start and at its end (what the minimum-wetted-area arm uses) do not
change.

- parametric form: ``length`` and ``tail_cone_length`` change by the same amount;
- stations form: the stations aft of the cone's start (the last station before the areas
  shrink monotonically to the tail) are moved along x by one linear stretch between the
  cone's start and the new end; their sections are unchanged.
"""

from __future__ import annotations

import dataclasses
import math

from geomgen.design import FuselageSpec
from geomgen.errors import InputError
from geomgen.shapes.fuselage import expand, section_area

#: a tail cone shorter than this fraction of its start's equivalent diameter is refused: the
#: body would end in a step rather than a cone (common practice: cones run 2-4 diameters)
MIN_CONE_DIAMETERS = 0.5


def body_end(spec: FuselageSpec) -> float:
    """Fuselage station of the body's tail end (m)."""
    if spec.parametric is not None:
        return spec.parametric.nose_x + spec.parametric.length
    return spec.stations[-1].x


def cone_start(spec: FuselageSpec) -> tuple[float, float]:
    """Fuselage station (m) where the tail cone starts (the last station before the areas
    shrink monotonically to the tail, as for the tail-cone radii), and its equivalent diameter
    2 sqrt(area / pi) (m)."""
    stations = expand(spec)
    areas = [section_area(s) for s in stations]
    i = len(areas) - 1
    while i > 0 and areas[i - 1] > areas[i]:
        i -= 1
    return stations[i].x, 2.0 * math.sqrt(areas[i] / math.pi)


def follow(spec: FuselageSpec, end_x: float, source: str, why: str) -> FuselageSpec:
    """The fuselage with its tail cone stretched (or shortened) to end at ``end_x`` (m).

    ``why`` says what put the end there, for the refusal when the cone would vanish."""
    x_cone, diameter = cone_start(spec)
    shortest = MIN_CONE_DIAMETERS * diameter
    if end_x - x_cone < shortest:
        raise InputError(
            f"{why}, so the body would end at x = {end_x:.3f} m, only "
            f"{(end_x - x_cone) * 1000:.0f} mm behind the tail cone's start (x = {x_cone:.3f} "
            f"m; at least {shortest * 1000:.0f} mm, {MIN_CONE_DIAMETERS:g} of its diameter); "
            f"start the tail cone at least {math.ceil((x_cone - end_x + shortest) * 1000)} mm "
            f"further forward or give the tails a longer arm",
            source=source,
            path="fuselage.end_behind_tails",
        )
    if spec.parametric is not None:
        p = spec.parametric
        grow = end_x - body_end(spec)
        body = dataclasses.replace(
            p, length=p.length + grow, tail_cone_length=p.tail_cone_length + grow
        )
        return dataclasses.replace(spec, parametric=body)
    k = (end_x - x_cone) / (body_end(spec) - x_cone)
    stations = tuple(
        dataclasses.replace(s, x=x_cone + (s.x - x_cone) * k) if s.x > x_cone else s
        for s in spec.stations
    )
    return dataclasses.replace(spec, stations=stations)
