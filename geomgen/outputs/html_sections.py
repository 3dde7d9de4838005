"""The sections of ``report.html`` that show report.json: the sizing tables (stall
requirement, surfaces, tails), the three-view drawing, the corner points, the hinge lines and
the self-checks, each an HTML fragment.

Every value cell carries ``data-key`` (its path in report.json, list indices as numbers, e.g.
``surfaces.wing.apex.0``), ``data-si-value`` (the exact SI value written to report.json) and
``data-unit`` (the unit the visible text is in, that of the chosen units system).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from html import escape
from typing import Any

from geomgen.design.units import OUTPUT_UNITS, SI_UNITS, to_output
from geomgen.geometry.layout import Layout, corner_labels
from geomgen.outputs.report import SURFACE_TITLES

#: kind of quantity for each SI unit symbol written into report.json
_KIND_OF_UNIT = {unit: kind for kind, unit in SI_UNITS.items()}
_SIDE_WORDS = {"right": "right", "left": "left", "centre": "-"}


# --- value cells ----------------------------------------------------------------------------


def _lookup(data: Any, key: str) -> Any:
    for part in key.split("."):
        data = data[int(part)] if isinstance(data, list) else data[part]
    return data


def _si_repr(value: float) -> str:
    return repr(float(value))


def _number(value: float, spec: str) -> str:
    """``value`` formatted by ``spec``; a ``g`` spec never switches to an exponent for large
    values (95953 Pa, not 9.595e+04 Pa), and a value that rounds to zero shows no minus sign."""
    if spec.endswith("g") and abs(value) >= 1e4:
        spec = ".0f"
    text = format(value, spec)
    if text.startswith("-") and not any(ch in "123456789" for ch in text):
        text = text[1:]
    return text


class Cells:
    """Table cells for report.json values, shown in the chosen unit system."""

    def __init__(self, data: Mapping[str, Any], system: str):
        self.data = data
        self.system = system

    def unit(self, kind: str) -> str:
        return OUTPUT_UNITS[self.system][kind][0]

    def value(self, key: str, fmt: str | None = None, suffix: str = "", unit: bool = True) -> str:
        """A ``<td>`` for the report.json quantity at ``key``; a key ending in a number picks
        one coordinate of a point. ``fmt`` is a format spec for the number in output units;
        ``unit`` False leaves the unit out of the visible text (it is in the column head)."""
        head, _, last = key.rpartition(".")
        if last.isdigit():
            node = _lookup(self.data, head)
            si = node["value"][int(last)]
        else:
            node = _lookup(self.data, key)
            si = node["value"]
        si_unit = node["unit"]
        if si_unit == "1":
            shown, out_unit = si, "1"
            text = _number(shown, fmt or ".4f")
        elif si_unit == "1/rad":  # a lift-curve slope: per rad in both systems
            shown, out_unit = si, si_unit
            text = _number(shown, fmt or ".4f") + (f" {out_unit}" if unit else "")
        else:
            kind = _KIND_OF_UNIT[si_unit]
            shown, out_unit = to_output(si, kind, self.system)
            default = ".2f" if kind == "angle" else ".4g"
            text = _number(shown, fmt or default) + (f" {out_unit}" if unit else "")
        return (
            f'<td class="num" data-key="{escape(key)}" data-si-value="{_si_repr(si)}" '
            f'data-si-unit="{escape(si_unit)}" data-unit="{escape(out_unit)}">'
            f"{escape(text + suffix)}</td>"
        )


def _table(header: Iterable[str], rows: Iterable[str], cls: str = "") -> str:
    head = "".join(f"<th>{escape(h)}</th>" for h in header)
    attr = f' class="{cls}"' if cls else ""
    body = "\n".join(rows)
    return f"<table{attr}>\n<thead><tr>{head}</tr></thead>\n<tbody>\n{body}\n</tbody>\n</table>\n"


def _row(*cells: str) -> str:
    return "<tr>" + "".join(cells) + "</tr>"


def _th(text: str) -> str:
    return f'<th scope="row">{escape(text)}</th>'


def _td(text: str, cls: str = "") -> str:
    attr = f' class="{cls}"' if cls else ""
    return f"<td{attr}>{escape(text)}</td>"


# --- sections -------------------------------------------------------------------------------


def stall_section(c: Cells) -> str:
    from_stall = c.data["stall"]["wing_area_from_stall"]
    rows = [
        _row(_th("gross weight"), c.value("requirements.gross_weight")),
        _row(_th("stall speed (true airspeed)"), c.value("requirements.stall_speed")),
        _row(_th("maximum lift coefficient"), c.value("requirements.cl_max", ".3f")),
        _row(_th("altitude (geometric)"), c.value("requirements.altitude_geometric")),
        _row(_th("altitude (geopotential)"), c.value("requirements.altitude_geopotential")),
        _row(_th("standard-atmosphere density"), c.value("atmosphere.density")),
        _row(_th("standard-atmosphere pressure"), c.value("atmosphere.pressure")),
        _row(_th("standard-atmosphere temperature"), c.value("atmosphere.temperature", ".5g")),
        _row(_th("dynamic pressure at the stall"), c.value("stall.dynamic_pressure")),
        _row(_th("wing area required, 2W/(rho V^2 CLmax)"), c.value("stall.wing_area_required")),
        _row(
            _th("wing area used"),
            c.value(
                "surfaces.wing.area",
                suffix=" (sized from the stall)" if from_stall else " (given)",
            ),
        ),
        _row(_th("stall speed with that area"), c.value("stall.stall_speed_with_wing_area")),
        _row(_th("wing loading"), c.value("stall.wing_loading")),
    ]
    return _table(["quantity", "value"], rows, "quantities")


_SURFACE_ROWS: tuple[tuple[str, str, str | None], ...] = (
    ("area", "area", None),
    ("span (fin: height)", "span", None),
    ("semi-span (fin: height)", "semi_span", None),
    ("aspect ratio", "aspect_ratio", ".3f"),
    ("taper ratio", "taper_ratio", ".3f"),
    ("root chord", "root_chord", None),
    ("tip chord", "tip_chord", None),
    ("MGC length", "mgc.length", None),
    ("MGC spanwise position", "mgc.span_position", None),
    ("MGC leading edge x", "mgc.leading_edge_x", None),
    ("MGC quarter-chord x", "mgc.quarter_chord_point.0", None),
    ("MGC quarter-chord z", "mgc.quarter_chord_point.2", None),
    ("sweep, leading edge", "sweeps.leading_edge", None),
    ("sweep, quarter chord", "sweeps.quarter_chord", None),
    ("sweep, half chord", "sweeps.half_chord", None),
    ("sweep, trailing edge", "sweeps.trailing_edge", None),
    ("dihedral", "dihedral", None),
    ("incidence (root)", "incidence", None),
    ("twist (tip - root)", "twist", None),
    ("apex x", "apex.0", None),
    ("apex z", "apex.2", None),
    ("mean t/c", "thickness_ratio", ".4f"),
    ("wetted area (estimate)", "wetted_area", None),
)


def surfaces_section(layout: Layout, c: Cells) -> str:
    keys = [s.key for s in layout.surfaces]
    rows = [
        _row(_th(label), *(c.value(f"surfaces.{k}.{field}", fmt) for k in keys))
        for label, field, fmt in _SURFACE_ROWS
    ]
    out = [_table(["quantity"] + [SURFACE_TITLES[k] for k in keys], rows, "quantities")]
    u = c.unit("length")
    for k in keys:
        stations = c.data["surfaces"][k]["stations"]
        rows = [
            _row(
                _td(str(i)),
                c.value(f"surfaces.{k}.stations.{i}.span_position", ".4f", unit=False),
                c.value(f"surfaces.{k}.stations.{i}.chord", ".4f", unit=False),
                c.value(f"surfaces.{k}.stations.{i}.leading_edge_x", ".4f", unit=False),
                c.value(f"surfaces.{k}.stations.{i}.twist"),
                _td(st["section"]),
            )
            for i, st in enumerate(stations)
        ]
        out.append(f"<h3>{escape(SURFACE_TITLES[k])}: stations</h3>\n")
        out.append(
            _table(
                [
                    "station",
                    f"span position ({u})",
                    f"chord ({u})",
                    f"leading edge x ({u})",
                    "twist",
                    "section",
                ],
                rows,
            )
        )
        panels = c.data["surfaces"][k]["sweeps"]["panels"]
        if len(panels) > 1:
            rows = [
                _row(
                    _td(str(p["panel"])),
                    *(
                        c.value(f"surfaces.{k}.sweeps.panels.{i}.{f}")
                        for f in ("leading_edge", "quarter_chord", "trailing_edge")
                    ),
                )
                for i, p in enumerate(panels)
            ]
            out.append(f"<h3>{escape(SURFACE_TITLES[k])}: sweep of each panel</h3>\n")
            out.append(_table(["panel", "leading edge", "quarter chord", "trailing edge"], rows))
    return "".join(out)


def tails_section(layout: Layout, c: Cells) -> str:
    tails = c.data["tails"]
    keys = [s.key for s in layout.surfaces if s.key in tails]
    if not keys:
        return ""
    rows = []
    for k in keys:
        rows.append(
            _row(
                _th(SURFACE_TITLES[k]),
                c.value(
                    f"tails.{k}.tail_arm",
                    suffix=" (optimum)" if tails[k]["tail_arm_is_optimum"] else "",
                ),
                c.value(f"tails.{k}.volume_coefficient", ".4f"),
                c.value(f"tails.{k}.area"),
                c.value(f"tails.{k}.apex_to_wing_apex.dx"),
                c.value(f"tails.{k}.apex_to_wing_apex.dz"),
            )
        )
    out = [
        f"<p>{escape(tails['arm_definition'][0].upper() + tails['arm_definition'][1:])}.</p>\n",
        _table(
            ["surface", "tail arm", "volume coefficient", "area", "apex dx from wing apex", "dz"],
            rows,
        ),
    ]
    if "minimum_wetted_area_rule" in tails:
        base = "tails.minimum_wetted_area_rule"
        rows = [
            _row(_th("tail-cone front radius"), c.value(f"{base}.front_radius")),
            _row(_th("tail-cone rear radius"), c.value(f"{base}.rear_radius")),
            _row(_th("tail arm of least wetted area"), c.value(f"{base}.optimum_arm")),
            _row(_th("tail-cone wetted area"), c.value(f"{base}.cone_wetted_area")),
            _row(_th("tails' wetted area"), c.value(f"{base}.tail_wetted_area")),
        ]
        out.append("<h3>Tail arm of least wetted area</h3>\n")
        out.append(_table(["quantity", "value"], rows, "quantities"))
    return "".join(out)


def stability_section(c: Cells) -> str:
    """Neutral point, static margins and the slopes and ratios they came from (report.json's
    ``stability``); empty without a horizontal tail."""
    st = c.data.get("stability")
    if st is None:
        return ""
    src = st["sources"]
    b = "stability"
    rows = [
        _row(_th("neutral point x (stick-fixed)"), c.value(f"{b}.neutral_point_x"), _td("")),
        _row(
            _th("neutral point, fraction of the MGC"),
            c.value(f"{b}.neutral_point_mgc_fraction"),
            _td(src["neutral_point"]),
        ),
    ]
    for i, m in enumerate(st["cg"]):
        rows += [
            _row(_th(f"{m['label']} CG x"), c.value(f"{b}.cg.{i}.x"), _td("")),
            _row(
                _th(f"{m['label']} CG, fraction of the MGC"),
                c.value(f"{b}.cg.{i}.mgc_fraction"),
                _td(""),
            ),
            _row(
                _th(f"static margin at the {m['label']} CG (fraction of the MGC)"),
                c.value(f"{b}.cg.{i}.static_margin"),
                _td(src["static_margin"]),
            ),
        ]
    rows += [
        _row(
            _th("wing lift-curve slope"), c.value(f"{b}.wing_lift_slope"), _td(src["lift_slopes"])
        ),
        _row(_th("tail lift-curve slope"), c.value(f"{b}.tail_lift_slope"), _td("")),
        _row(_th("section lift-curve slope"), c.value(f"{b}.section_lift_slope"), _td("")),
        _row(_th("Mach number"), c.value(f"{b}.mach"), _td(src["mach"])),
        _row(
            _th("downwash gradient"),
            c.value(f"{b}.downwash_gradient"),
            _td(src["downwash_gradient"]),
        ),
        _row(
            _th("tail dynamic-pressure ratio"),
            c.value(f"{b}.tail_dynamic_pressure_ratio", ".3f"),
            _td(src["tail_dynamic_pressure_ratio"]),
        ),
        _row(_th("tail area / wing area"), c.value(f"{b}.tail_area_ratio"), _td("")),
        _row(
            _th("tail height above the wing root chord"),
            c.value(f"{b}.tail_height_above_wing_root"),
            _td(""),
        ),
        _row(_th("fuselage contribution"), _td("omitted"), _td(src["fuselage"])),
    ]
    return f'<p role="note">{escape(st["note"])}</p>\n' + _table(
        ["quantity", "value", "source"], rows, "quantities"
    )


def svg_section(svg: str) -> str:
    """The caller's drawing inline, without an XML declaration or doctype (not allowed inside
    HTML); the SVG markup itself is geomgen's own output and is kept as it is."""
    text = svg.strip()
    if text.startswith("<?xml"):
        text = text[text.index("?>") + 2 :].lstrip()
    if text.startswith("<!DOCTYPE"):
        text = text[text.index(">") + 1 :].lstrip()
    return f'<div class="drawing">\n{text}\n</div>\n'


def _corner_paths(layout: Layout) -> dict[tuple[str, str, tuple[float, ...]], str]:
    """report.json path of every corner point, by (surface, side, point)."""
    out: dict[tuple[str, str, tuple[float, ...]], str] = {}
    for sl in layout.surfaces:
        index: dict[str, int] = {}
        for pc in sl.corners:
            j = index.get(pc.side, 0)
            index[pc.side] = j + 1
            for field in ("le_inner", "te_inner", "te_outer", "le_outer"):
                point = tuple(float(v) for v in getattr(pc, field))
                path = f"surfaces.{sl.key}.corners.{pc.side}.{j}.{field}"
                out.setdefault((sl.key, pc.side, point), path)
    return out


def corners_section(layout: Layout, c: Cells) -> str:
    paths = _corner_paths(layout)
    rows = []
    for lab in corner_labels(layout):
        path = paths[(lab.surface, lab.side, tuple(float(v) for v in lab.point))]
        rows.append(
            f'<tr data-corner="{escape(lab.key)}">'
            + _td(lab.key, "key")
            + _td(SURFACE_TITLES[lab.surface])
            + _td(_SIDE_WORDS[lab.side])
            + _td(lab.where)
            + "".join(c.value(f"{path}.{i}", ".4f", unit=False) for i in range(3))
            + "</tr>"
        )
    return (
        "<p>Leading and trailing edges of the chord line at each panel end, per side: the "
        "leading edge from root to tip, then the trailing edge from tip to root. The keys are "
        "those of the drawings.</p>\n"
        + _table(["key", "surface", "side", "where", "x", "y", "z"], rows)
    )


def hinges_section(layout: Layout, c: Cells) -> str:
    out = []
    for sl in layout.surfaces:
        if not sl.controls:
            continue
        k = sl.key
        title = SURFACE_TITLES[k]
        rows = []
        for ctl in sl.controls:
            base = f"surfaces.{k}.hinge_lines.{ctl.name}"
            for i in range(len(ctl.hinge)):
                rows.append(
                    _row(
                        _td(ctl.name),
                        _td(ctl.hinge_kind.replace("_", " ")),
                        _td(str(i)),
                        c.value(f"{base}.points.{i}.span_position", ".4f", unit=False),
                        c.value(f"{base}.points.{i}.chord_fraction", ".4f"),
                        *(
                            c.value(f"{base}.points.{i}.point.{j}", ".4f", unit=False)
                            for j in (0, 1, 2)
                        ),
                    )
                )
        out.append(f"<h3>{escape(title)}</h3>\n")
        out.append(
            _table(
                ["part", "hinge", "point", "span position", "chord fraction", "x", "y", "z"], rows
            )
        )
        rows = []
        for ctl in sl.controls:
            base = f"surfaces.{k}.hinge_lines.{ctl.name}"
            rows.append(
                _row(
                    _td(ctl.name),
                    c.value(f"{base}.area"),
                    c.value(f"{base}.fraction_of_surface_area", ".4f"),
                    c.value(f"{base}.hinge_length"),
                    c.value(f"{base}.chord_inner"),
                    c.value(f"{base}.chord_outer"),
                )
            )
        out.append(
            _table(
                [
                    "part",
                    "area",
                    "fraction of side area",
                    "hinge length",
                    "chord inner",
                    "chord outer",
                ],
                rows,
            )
        )
        if "elevator_hinge_comparison" in c.data["surfaces"][k]:
            base = f"surfaces.{k}.elevator_hinge_comparison"
            com, sep = f"{base}.common_straight_hinge", f"{base}.separate_constant_fraction_hinges"
            rows = [
                _row(
                    _td("one common straight hinge, perpendicular to the plane of symmetry"),
                    c.value(f"{com}.area"),
                    c.value(f"{com}.fraction_of_tail_area", ".4f"),
                    c.value(f"{com}.chord_fraction_inner", ".4f"),
                    c.value(f"{com}.chord_fraction_outer", ".4f"),
                ),
                _row(
                    _td("two separate constant-fraction hinges"),
                    c.value(f"{sep}.area"),
                    c.value(f"{sep}.fraction_of_tail_area", ".4f"),
                    c.value(f"{sep}.chord_fraction", ".4f"),
                    c.value(f"{sep}.chord_fraction", ".4f"),
                ),
            ]
            out.append("<h3>Elevator: one common hinge against two separate hinges</h3>\n")
            out.append(
                _table(
                    [
                        "hinge",
                        "elevator area (both halves)",
                        "fraction of tail area",
                        "chord fraction inner",
                        "chord fraction outer",
                    ],
                    rows,
                )
            )
    return "".join(out)


def _check_number(value: float, unit: str) -> str:
    if unit == "yes/no":
        return "yes" if value else "no"
    return f"{value:.6g}" + ("" if unit in ("", "1") else f" {unit}")


def checks_section(checks: Mapping[str, Any]) -> str:
    items = list(checks.get("checks", []))
    failed = sum(1 for ch in items if not ch["passed"])
    summary = (
        f"All {len(items)} checks passed."
        if failed == 0
        else f"{failed} of {len(items)} checks FAILED."
    )
    rows = []
    for i, ch in enumerate(items):
        ok = bool(ch["passed"])
        unit = str(ch.get("unit", ""))
        tol = float(ch["tolerance"])
        if unit == "yes/no":
            tol_text = "-"
        elif ch.get("relative"):
            tol_text = f"\u00b1{tol * 100:.3g} %"
        else:
            tol_text = f"\u00b1{tol:.3g}" + ("" if unit in ("", "1") else f" {unit}")
        rows.append(
            f'<tr class="{"pass" if ok else "fail"}" data-check="{i}" '
            f'data-measured="{_si_repr(ch["measured"])}" '
            f'data-expected="{_si_repr(ch["expected"])}" '
            f'data-passed="{"true" if ok else "false"}">'
            + _td(str(ch["name"]))
            + _td(str(ch["part"]))
            + _td(_check_number(float(ch["measured"]), unit), "num")
            + _td(_check_number(float(ch["expected"]), unit), "num")
            + _td(tol_text, "num")
            + _td("pass" if ok else "FAIL", "result")
            + "</tr>"
        )
    cls = "summary ok" if failed == 0 else "summary bad"
    return f'<p class="{cls}">{escape(summary)}</p>\n' + _table(
        ["check", "part", "measured", "expected", "tolerance", "result"], rows, "checks"
    )
