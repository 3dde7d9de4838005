"""``report.json``: every quantity the sizing and layout computed, with its value and SI unit,
in the aircraft frame (m; x aft, y right, z up). Also the safety caution and the surface titles
that every report and drawing carries (``report.md`` is written by
:mod:`geomgen.outputs.markdown_report`)."""

from __future__ import annotations

import json
import math
from typing import Any

from geomgen import __version__
from geomgen.design.units import SI_UNITS
from geomgen.geometry.junction import area_between
from geomgen.geometry.layout import Layout, SurfaceLayout
from geomgen.outputs.stability_report import stability_data

CAUTION = (
    "CAUTION: geomgen output is a design aid. It is not an airworthiness, structural or "
    "flight-safety substantiation. Any aircraft or part built from it must follow the "
    "aviation regulations that apply where it is built and flown, and must be reviewed by "
    "qualified, licensed people."
)

SURFACE_TITLES = {
    "wing": "Wing",
    "horizontal_tail": "Horizontal tail",
    "vertical_tail": "Vertical tail (one-sided)",
}


#: the twist law every solid, hinge line and template follows (Planform.section_frame)
TWIST_LAW = (
    "stated twist at the root, each panel end and the tip; between them each panel is a ruled "
    "surface between its end sections, so the twist there is the angle of their blended chord "
    "line, weighted by chord (tan = sum w c sin / sum w c cos, w the span fractions), and the "
    "chord its length"
)


def _q(value: float, kind: str) -> dict[str, Any]:
    return {"value": value, "unit": SI_UNITS[kind]}


def _pt(p) -> dict[str, Any]:
    return {"value": [float(c) for c in p], "unit": "m"}


def _num(value: float) -> dict[str, Any]:
    return {"value": value, "unit": "1"}


# --- JSON ---------------------------------------------------------------------------------------


def report_data(layout: Layout) -> dict[str, Any]:
    """Everything the sizing and layout computed, as a JSON-ready mapping (SI units)."""
    sz = layout.sizing
    d = sz.design
    st = sz.stall
    atm = st.atmosphere
    data: dict[str, Any] = {
        "caution": CAUTION,
        "generator": {"name": "geomgen", "version": __version__},
        "design": {"name": d.name, "title": d.title, "date": d.date, "source": d.source},
        "frame": "aircraft frame: x aft, y right, z up; origin at the design's datum",
        "requirements": {
            "gross_weight": _q(st.weight, "weight"),
            "stall_speed": _q(st.stall_speed, "speed"),
            "cl_max": _num(st.cl_max),
            "altitude_geometric": _q(atm.geometric_altitude, "length"),
            "altitude_geopotential": _q(atm.geopotential_altitude, "length"),
        },
        "atmosphere": {
            "model": "International Standard Atmosphere",
            "density": _q(atm.density, "density"),
            "pressure": _q(atm.pressure, "pressure"),
            "temperature": _q(atm.temperature, "temperature"),
        },
        "stall": {
            "dynamic_pressure": _q(st.dynamic_pressure, "pressure"),
            "wing_area_required": _q(st.wing_area_required, "area"),
            "wing_area_from_stall": st.area_from_stall,
            "stall_speed_with_wing_area": _q(st.stall_speed_achieved, "speed"),
            "wing_loading": _q(st.wing_loading, "wing_loading"),
        },
        "surfaces": {s.key: _surface_data(s) for s in layout.surfaces},
        "tails": _tails_data(layout),
    }
    stability = stability_data(sz)
    if stability is not None:
        data["stability"] = stability
    if layout.body is not None:
        data["fuselage"] = body_data(layout)
    return data


def body_data(layout: Layout) -> dict[str, Any]:
    from geomgen.shapes import fuselage

    body = layout.body
    assert body is not None
    front, rear = fuselage.tail_cone_radii(body)
    out = {
        "station_count": _num(len(body)),
        "nose_x": _q(body[0].x, "length"),
        "length": _q(body[-1].x - body[0].x, "length"),
        "max_width": _q(max(st.width for st in body), "length"),
        "max_height": _q(max(st.height for st in body), "length"),
        "volume_by_sections": _q(fuselage.volume_by_sections(body), "volume"),
        "wetted_area_by_perimeters": _q(fuselage.wetted_area_by_perimeters(body), "area"),
        "tail_cone_equivalent_radii": {
            "front": _q(front, "length"),
            "rear": _q(rear, "length"),
        },
    }
    fit = layout.sizing.body_fit
    if fit is not None:  # the tail cone followed the tails: the fixed point of body and arm
        out["follows_tails"] = {
            "iterations": _num(fit.iterations),
            "end_behind_tails": _q(fit.end_behind_tails, "length"),
            "rearmost_tail_root_te_x": _q(fit.rearmost_root_te, "length"),
            "end_x": _q(fit.body_end, "length"),
            "end_x_as_written": _q(fit.body_end_as_written, "length"),
            "converged_tail_arm": None if fit.tail_arm is None else _q(fit.tail_arm, "length"),
        }
    return out


def _surface_data(sl: SurfaceLayout) -> dict[str, Any]:
    ss = sl.sizing
    pf = ss.planform
    spec = ss.spec
    x_mgc, y_mgc, z_mgc = ss.mgc_quarter_chord
    sweeps = {
        "leading_edge": _q(pf.sweep(0.0), "angle"),
        "quarter_chord": _q(pf.sweep(0.25), "angle"),
        "half_chord": _q(pf.sweep(0.5), "angle"),
        "trailing_edge": _q(pf.sweep(1.0), "angle"),
        "panels": [
            {
                "panel": i,
                "leading_edge": _q(pf.sweep(0.0, i), "angle"),
                "quarter_chord": _q(pf.sweep(0.25, i), "angle"),
                "trailing_edge": _q(pf.sweep(1.0, i), "angle"),
            }
            for i in range(len(pf.stations) - 1)
        ],
    }
    corners: dict[str, list[dict[str, Any]]] = {}
    for c in sl.corners:
        corners.setdefault(c.side, []).append(
            {
                "panel": c.panel,
                "le_inner": _pt(c.le_inner),
                "te_inner": _pt(c.te_inner),
                "te_outer": _pt(c.te_outer),
                "le_outer": _pt(c.le_outer),
            }
        )
    hinges = {
        c.name: {
            "kind": c.kind,
            "side": c.side,
            "hinge": c.hinge_kind,
            "span_start": _q(c.s_start, "length"),
            "span_end": _q(c.s_end, "length"),
            "points": [
                {
                    "span_position": _q(h.s, "length"),
                    "chord_fraction": _num(h.chord_fraction),
                    "point": _pt(h.point),
                }
                for h in c.hinge
            ],
            "hinge_length": _q(c.hinge_length, "length"),
            "area": _q(c.area, "area"),
            "fraction_of_surface_area": _num(c.area / pf.side_area),
            "chord_inner": _q(c.chord_inner, "length"),
            "chord_outer": _q(c.chord_outer, "length"),
        }
        for c in sl.controls
    }
    out: dict[str, Any] = {
        "area": _q(pf.area, "area"),
        "span": _q(pf.span, "length"),
        "semi_span": _q(pf.semi_span, "length"),
        "aspect_ratio": _num(pf.aspect_ratio),
        "taper_ratio": _num(pf.taper_ratio),
        "root_chord": _q(pf.root_chord, "length"),
        "tip_chord": _q(pf.tip_chord, "length"),
        "mgc": {
            "length": _q(pf.mgc, "length"),
            "span_position": _q(pf.mgc_s, "length"),
            "leading_edge_x": _q(ss.apex_x + pf.mgc_x_le, "length"),
            "quarter_chord_point": _pt((x_mgc, y_mgc, z_mgc)),
        },
        "sweeps": sweeps,
        "dihedral": _q(spec.dihedral, "angle"),
        "incidence": _q(spec.incidence, "angle"),
        "twist": _q(spec.twist, "angle"),
        "apex": _pt((ss.apex_x, 0.0, ss.apex_z)),
        "thickness_ratio": _num(ss.thickness_ratio),
        "wetted_area": _q(ss.wetted_area, "area"),
        "stations": [
            {
                "span_position": _q(st.s, "length"),
                "chord": _q(st.chord, "length"),
                "leading_edge_x": _q(ss.apex_x + st.x_le, "length"),
                "twist": _q(st.twist, "angle"),
                "section": _section_text(st.airfoil),
            }
            for st in pf.stations
        ],
        "twist_law": TWIST_LAW,
        "twist_mid_panel": [
            {
                "span_position": _q(mid, "length"),
                "twist": _q(pf.section_frame(mid)[1], "angle"),
                "twist_linear_in_span": _q(pf.at(mid)[3], "angle"),
                "chord": _q(pf.section_frame(mid)[0], "length"),
            }
            for mid in pf.panel_middles()
        ],
        "corners": corners,
        "hinge_lines": hinges,
    }
    if sl.junction is not None:
        j = sl.junction
        out["fuselage_junction"] = {
            "body_side_station_min": _q(j.side_min, "length"),
            "body_side_station_max": _q(j.side_max, "length"),
            "solid_root_station": _q(j.mount_s, "length"),
            "solid_root_inside_body": j.root_inside,
            "reference_area": _q(j.reference_area, "area"),
            "exposed_area": _q(j.exposed_area, "area"),
            "exposed_wetted_area": _q(j.exposed_wetted_area, "area"),
            "solid_planform_area_one_side": _q(area_between(pf, j.mount_s, pf.semi_span), "area"),
        }
    if sl.hinge_comparison is not None:
        h = sl.hinge_comparison
        out["elevator_hinge_comparison"] = {
            "common_straight_hinge": {
                "area": _q(h.common_area, "area"),
                "fraction_of_tail_area": _num(h.common_fraction_of_tail),
                "chord_fraction_inner": _num(h.common_chord_fractions[0]),
                "chord_fraction_outer": _num(h.common_chord_fractions[1]),
            },
            "separate_constant_fraction_hinges": {
                "area": _q(h.separate_area, "area"),
                "fraction_of_tail_area": _num(h.separate_fraction_of_tail),
                "chord_fraction": _num(h.separate_chord_fraction),
            },
        }
    return out


def _section_text(blend: tuple[str, str, float]) -> str:
    a, b, w = blend
    return a if w == 0.0 or a == b else f"{a} blended {w:.3f} toward {b}"


def _tails_data(layout: Layout) -> dict[str, Any]:
    sz = layout.sizing
    wing = sz.wing
    out: dict[str, Any] = {
        "arm_definition": "x distance between the quarter-chord points of the wing's and the "
        "tail's mean geometric chords",
        "wing_mgc_quarter_chord": _pt(wing.mgc_quarter_chord),
    }
    for t in (sz.horizontal_tail, sz.vertical_tail):
        if t is None:
            continue
        dx = t.apex_x - wing.apex_x
        dz = t.apex_z - wing.apex_z
        out[t.key] = {
            "tail_arm": _q(t.tail_arm, "length"),
            "tail_arm_is_optimum": t.spec.tail_arm is None,
            "volume_coefficient": _num(t.volume_coefficient),
            "area": _q(t.planform.area, "area"),
            "apex_to_wing_apex": {
                "dx": _q(dx, "length"),
                "dz": _q(dz, "length"),
                "distance": _q(math.hypot(dx, dz), "length"),
            },
        }
    if sz.tail_arm_rule is not None:
        r = sz.tail_arm_rule
        out["minimum_wetted_area_rule"] = {
            "front_radius": _q(r.cone_radii[0], "length"),
            "rear_radius": _q(r.cone_radii[1], "length"),
            "optimum_arm": _q(r.optimum_arm, "length"),
            "cone_wetted_area": _q(r.cone_wetted_area, "area"),
            "tail_wetted_area": _q(r.tail_wetted_area, "area"),
            "tail_wetted_area_assumption": "2 (S_H + S_V) on the reference areas",
        }
        exposed = [
            sl.junction.exposed_wetted_area
            for sl in layout.surfaces
            if sl.key != "wing" and sl.junction is not None
        ]
        if exposed:
            out["minimum_wetted_area_rule"]["tail_exposed_wetted_area_at_this_arm"] = _q(
                sum(exposed), "area"
            )
    return out


def to_json(layout: Layout) -> str:
    return json.dumps(report_data(layout), indent=2, sort_keys=False) + "\n"
