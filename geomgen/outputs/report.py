"""Reports: ``report.json`` (every quantity with value and SI unit) and ``report.md`` (tables in
the user's unit system). Both carry the safety caution."""

from __future__ import annotations

import json
import math
from typing import Any

from geomgen import __version__
from geomgen.design.units import SI_UNITS, to_output
from geomgen.geometry.junction import area_between
from geomgen.geometry.layout import Layout, SurfaceLayout

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
    if layout.body is not None:
        data["fuselage"] = _body_data(layout)
    return data


def _body_data(layout: Layout) -> dict[str, Any]:
    from geomgen.shapes import fuselage

    body = layout.body
    assert body is not None
    front, rear = fuselage.tail_cone_radii(body)
    return {
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


# --- Markdown -----------------------------------------------------------------------------------


class _Fmt:
    """Formats SI values in the chosen unit system."""

    def __init__(self, system: str):
        self.system = system

    def __call__(self, value: float, kind: str, digits: int = 4) -> str:
        v, unit = to_output(value, kind, self.system)
        return f"{v:.{digits}g} {unit}"

    def unit(self, kind: str) -> str:
        return to_output(1.0, kind, self.system)[1]

    def num(self, value: float, kind: str) -> str:
        v, _ = to_output(value, kind, self.system)
        return f"{v:.4f}"


def _table(header: list[str], rows: list[list[str]]) -> list[str]:
    lines = ["| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
    lines += ["| " + " | ".join(r) + " |" for r in rows]
    return lines + [""]


def to_markdown(layout: Layout, system: str) -> str:
    """Human-readable report in the unit system ``si`` or ``imperial``."""
    f = _Fmt(system)
    sz = layout.sizing
    d = sz.design
    st = sz.stall
    atm = st.atmosphere
    lines = [f"# {d.title}", "", f"> {CAUTION}", ""]
    lines += [
        f"Design `{d.name}` from `{d.source}`" + (f", dated {d.date}" if d.date else "") + ".",
        f"Made by geomgen {__version__}. Units: {system}. Aircraft frame: x aft, y right, z up.",
        "",
        "## Stall requirement and wing area",
        "",
    ]
    lines += _table(
        ["quantity", "value"],
        [
            ["gross weight", f(st.weight, "weight")],
            ["stall speed", f(st.stall_speed, "speed")],
            ["maximum lift coefficient", f"{st.cl_max:.3f}"],
            ["altitude (geometric)", f(atm.geometric_altitude, "length")],
            ["ISA density", f(atm.density, "density")],
            ["dynamic pressure at the stall", f(st.dynamic_pressure, "pressure")],
            ["wing area required, 2W/(rho V^2 CLmax)", f(st.wing_area_required, "area")],
            [
                "wing area used",
                f(sz.wing.planform.area, "area")
                + (" (sized from the stall)" if st.area_from_stall else " (given)"),
            ],
            ["stall speed with that area", f(st.stall_speed_achieved, "speed")],
            ["wing loading", f(st.wing_loading, "wing_loading")],
        ],
    )
    lines += ["## Surfaces", ""]
    rows = []
    keys = [s.key for s in layout.surfaces]
    for label, getter in _SURFACE_ROWS:
        rows.append([label] + [getter(layout.surface(k), f) for k in keys])
    if layout.body is not None:
        for label, getter in _JUNCTION_ROWS:
            rows.append(
                [label]
                + [
                    "-"
                    if layout.surface(k).junction is None
                    else getter(layout.surface(k).junction, f)
                    for k in keys
                ]
            )
    lines += _table(["quantity"] + [SURFACE_TITLES[k] for k in keys], rows)
    lines += _body_markdown(layout, f)
    lines += _tails_markdown(layout, f)
    for sl in layout.surfaces:
        lines += _corners_markdown(sl, f)
    lines += [f"> {CAUTION}", ""]
    return "\n".join(lines)


def _deg(value: float) -> str:
    return f"{math.degrees(value):.2f} deg"


_SURFACE_ROWS = [
    ("area", lambda s, f: f(s.sizing.planform.area, "area")),
    ("span (fin: height)", lambda s, f: f(s.sizing.planform.span, "length")),
    ("aspect ratio", lambda s, f: f"{s.sizing.planform.aspect_ratio:.3f}"),
    ("taper ratio", lambda s, f: f"{s.sizing.planform.taper_ratio:.3f}"),
    ("root chord", lambda s, f: f(s.sizing.planform.root_chord, "length")),
    ("tip chord", lambda s, f: f(s.sizing.planform.tip_chord, "length")),
    ("MGC length", lambda s, f: f(s.sizing.planform.mgc, "length")),
    ("MGC spanwise position", lambda s, f: f(s.sizing.planform.mgc_s, "length")),
    ("MGC leading edge x", lambda s, f: f(s.sizing.apex_x + s.sizing.planform.mgc_x_le, "length")),
    ("MGC quarter-chord x", lambda s, f: f(s.sizing.mgc_quarter_chord[0], "length")),
    ("sweep, leading edge", lambda s, f: _deg(s.sizing.planform.sweep(0.0))),
    ("sweep, quarter chord", lambda s, f: _deg(s.sizing.planform.sweep(0.25))),
    ("sweep, trailing edge", lambda s, f: _deg(s.sizing.planform.sweep(1.0))),
    ("dihedral", lambda s, f: _deg(s.sizing.spec.dihedral)),
    ("incidence (root)", lambda s, f: _deg(s.sizing.spec.incidence)),
    ("twist (tip - root)", lambda s, f: _deg(s.sizing.spec.twist)),
    ("apex x", lambda s, f: f(s.sizing.apex_x, "length")),
    ("apex z", lambda s, f: f(s.sizing.apex_z, "length")),
    ("mean t/c", lambda s, f: f"{s.sizing.thickness_ratio:.4f}"),
    ("wetted area (Raymer, on the reference area)", lambda s, f: f(s.sizing.wetted_area, "area")),
]

_JUNCTION_ROWS = [
    ("fuselage side, spanwise station", lambda j, f: _range(j.side_min, j.side_max, f)),
    ("solid starts at station (inside the body)", lambda j, f: f(j.mount_s, "length")),
    ("exposed area (outboard of the body side)", lambda j, f: f(j.exposed_area, "area")),
    ("exposed wetted area (Raymer)", lambda j, f: f(j.exposed_wetted_area, "area")),
]


def _range(lo: float, hi: float, f) -> str:
    return f(lo, "length") if abs(hi - lo) < 5e-4 else f"{f(lo, 'length')} to {f(hi, 'length')}"


def _body_markdown(layout: Layout, f: _Fmt) -> list[str]:
    if layout.body is None:
        return []
    b = _body_data(layout)
    radii = b["tail_cone_equivalent_radii"]
    return ["## Fuselage", ""] + _table(
        ["quantity", "value"],
        [
            ["stations (as lofted)", str(b["station_count"]["value"])],
            ["nose x", f(b["nose_x"]["value"], "length")],
            ["length", f(b["length"]["value"], "length")],
            ["largest width", f(b["max_width"]["value"], "length")],
            ["largest height", f(b["max_height"]["value"], "length")],
            ["volume (integral of section areas)", f(b["volume_by_sections"]["value"], "volume")],
            [
                "wetted area (integral of section perimeters)",
                f(b["wetted_area_by_perimeters"]["value"], "area"),
            ],
            [
                "tail-cone equivalent radii, front and rear",
                f"{f(radii['front']['value'], 'length')}, {f(radii['rear']['value'], 'length')}",
            ],
        ],
    )


def _tails_markdown(layout: Layout, f: _Fmt) -> list[str]:
    sz = layout.sizing
    tails = [t for t in (sz.horizontal_tail, sz.vertical_tail) if t is not None]
    if not tails:
        return []
    lines = [
        "## Tail arms and volume coefficients",
        "",
        "Tail arms run between the quarter-chord points of the mean geometric chords.",
        "",
    ]
    rows = []
    for t in tails:
        dx, dz = t.apex_x - sz.wing.apex_x, t.apex_z - sz.wing.apex_z
        rows.append(
            [
                SURFACE_TITLES[t.key],
                f(t.tail_arm, "length") + (" (optimum)" if t.spec.tail_arm is None else ""),
                f"{t.volume_coefficient:.4f}",
                f(t.planform.area, "area"),
                f(dx, "length"),
                f(dz, "length"),
            ]
        )
    lines += _table(
        ["surface", "tail arm", "volume coefficient", "area", "apex dx from wing apex", "apex dz"],
        rows,
    )
    if sz.tail_arm_rule is not None:
        r = sz.tail_arm_rule
        lines += [
            f"Minimum-wetted-area tail arm with tail-cone radii {f(r.cone_radii[0], 'length')} "
            f"and {f(r.cone_radii[1], 'length')}: {f(r.optimum_arm, 'length')} (cone wetted "
            f"area {f(r.cone_wetted_area, 'area')}, tails {f(r.tail_wetted_area, 'area')} "
            f"taken as 2 (S_H + S_V) on the reference areas).",
            "",
        ]
        exposed = [
            sl.junction.exposed_wetted_area
            for sl in layout.surfaces
            if sl.key != "wing" and sl.junction is not None
        ]
        if exposed:
            lines += [
                f"Exposed wetted area of the tails on this fuselage at that arm (Raymer): "
                f"{f(sum(exposed), 'area')}.",
                "",
            ]
    return lines


def _corners_markdown(sl: SurfaceLayout, f: _Fmt) -> list[str]:
    u = f.unit("length")
    lines = [f"## {SURFACE_TITLES[sl.key]}: corner points ({u})", ""]
    rows = []
    for c in sl.corners:
        for label, p in (
            ("LE inner", c.le_inner),
            ("TE inner", c.te_inner),
            ("TE outer", c.te_outer),
            ("LE outer", c.le_outer),
        ):
            rows.append([c.side, str(c.panel), label] + [f.num(v, "length") for v in p])
    lines += _table(["side", "panel", "corner", "x", "y", "z"], rows)
    if sl.controls:
        lines += [f"### {SURFACE_TITLES[sl.key]}: hinge lines ({u})", ""]
        rows = []
        for c in sl.controls:
            for h in c.hinge:
                rows.append(
                    [c.name, c.hinge_kind, f.num(h.s, "length"), f"{h.chord_fraction:.4f}"]
                    + [f.num(v, "length") for v in h.point]
                )
        lines += _table(["part", "hinge", "span position", "chord fraction", "x", "y", "z"], rows)
        rows = [
            [
                c.name,
                f(c.area, "area"),
                f"{c.area / sl.sizing.planform.side_area:.4f}",
                f(c.chord_inner, "length"),
                f(c.chord_outer, "length"),
            ]
            for c in sl.controls
        ]
        lines += _table(
            ["part", "area", "fraction of side area", "chord inner", "chord outer"], rows
        )
    if sl.hinge_comparison is not None:
        h = sl.hinge_comparison
        lines += ["### Elevator: one common straight hinge vs two constant-fraction hinges", ""]
        lines += _table(
            [
                "hinge",
                "elevator area (both halves)",
                "fraction of tail area",
                "local chord fraction",
            ],
            [
                [
                    "common, perpendicular to the plane of symmetry",
                    f(h.common_area, "area"),
                    f"{h.common_fraction_of_tail:.4f}",
                    f"{h.common_chord_fractions[0]:.4f} inner to {h.common_chord_fractions[1]:.4f}"
                    " outer",
                ],
                [
                    "two separate, constant fraction",
                    f(h.separate_area, "area"),
                    f"{h.separate_fraction_of_tail:.4f}",
                    f"{h.separate_chord_fraction:.4f}",
                ],
            ],
        )
    return lines
