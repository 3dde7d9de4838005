"""``report.md``: the sizing and layout as Markdown tables in the user's unit system (SI or
imperial), between two copies of the safety caution. Values come from the sizing and layout
(SI, aircraft frame: x aft, y right, z up) and are converted for display only."""

from __future__ import annotations

import math

from geomgen import __version__
from geomgen.design.units import to_output
from geomgen.geometry.layout import Layout, SurfaceLayout
from geomgen.outputs.report import CAUTION, SURFACE_TITLES, body_data
from geomgen.outputs.stability_report import stability_markdown


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
    lines += stability_markdown(sz, lambda x: f(x, "length"))
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
    (
        "twist at mid-panel (ruled panel; linear in span would be)",
        lambda s, f: "; ".join(
            f"{_deg(s.sizing.planform.section_frame(m)[1])} ({_deg(s.sizing.planform.at(m)[3])})"
            for m in s.sizing.planform.panel_middles()
        ),
    ),
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
    b = body_data(layout)
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
