"""``report.html``: one self-contained page with the sizing tables, the three-view drawing, the
corner points and hinge lines, the self-checks and an interactive 3D view of the parts.

Everything the page needs is inline (styles, scripts, the drawing, the meshes), so it opens
offline and can be mailed as one file. The 3D view uses three.js, vendored under
``vendor/three-0.147.0/`` (MIT licence, copied beside it). Every value cell carries
``data-key`` (its path in report.json, list indices as numbers, e.g.
``surfaces.wing.apex.0``), ``data-si-value`` (the exact SI value written to report.json) and
``data-unit`` (the unit the visible text is in). The output is deterministic: no timestamps.
"""

from __future__ import annotations

import base64
import json
from collections.abc import Iterable, Mapping
from html import escape
from pathlib import Path
from typing import Any

import numpy as np

from geomgen import __version__
from geomgen.design.units import OUTPUT_UNITS, SI_UNITS, to_output
from geomgen.geometry.layout import Layout, corner_labels
from geomgen.outputs.report import CAUTION, SURFACE_TITLES, report_data

VENDOR = Path(__file__).resolve().parent / "vendor" / "three-0.147.0"
VENDOR_SCRIPTS = ("three.min.js", "OrbitControls.js")

#: kind of quantity for each SI unit symbol written into report.json
_KIND_OF_UNIT = {unit: kind for kind, unit in SI_UNITS.items()}

#: display colour of each kind of part (the first word of its name)
PART_COLOURS = {
    "wing": "#aebbd0",
    "stabilizer": "#aebbd0",
    "fin": "#aebbd0",
    "aileron": "#e07b39",
    "flap": "#3c9d5d",
    "elevator": "#d1495b",
    "rudder": "#8e6cc9",
}
_OTHER_COLOUR = "#9a9a9a"

_SIDE_WORDS = {"right": "right", "left": "left", "centre": "-"}


def part_kind(name: str) -> str:
    """The kind of a part from its name: ``aileron-right`` -> ``aileron``."""
    return name.split("-", 1)[0]


def part_colour(name: str) -> str:
    return PART_COLOURS.get(part_kind(name), _OTHER_COLOUR)


def write_html(
    layout: Layout,
    path: Path,
    *,
    checks: dict | None = None,
    svg: str | None = None,
    meshes: dict[str, tuple[np.ndarray, np.ndarray]] | None = None,
    units: str = "si",
) -> None:
    """Write report.html for ``layout``.

    ``checks`` is the checks.json mapping, ``svg`` the SVG text of the three-view drawing and
    ``meshes`` maps part names to (vertices in mm (n, 3), triangle vertex indices (m, 3)) in the
    aircraft frame; each section is left out when its argument is None. ``units`` is ``si`` or
    ``imperial`` for the visible text (the data attributes are always SI).
    """
    text = to_html(layout, checks=checks, svg=svg, meshes=meshes, units=units)
    Path(path).write_text(text, encoding="utf-8")


def to_html(
    layout: Layout,
    *,
    checks: dict | None = None,
    svg: str | None = None,
    meshes: dict[str, tuple[np.ndarray, np.ndarray]] | None = None,
    units: str = "si",
) -> str:
    """The text of report.html (see ``write_html``)."""
    if units not in OUTPUT_UNITS:
        raise ValueError(f"units must be one of {', '.join(OUTPUT_UNITS)} (got {units!r})")
    data = report_data(layout)
    c = _Cells(data, units)
    d = data["design"]
    sections: list[tuple[str, str, str]] = [  # id, heading, body
        ("stall", "Stall requirement and wing area", _stall_section(c)),
        ("surfaces", "Surfaces", _surfaces_section(layout, c)),
    ]
    tails = _tails_section(layout, c)
    if tails:
        sections.append(("tails", "Tail arms and volume coefficients", tails))
    if svg is not None:
        sections.append(("three-view", "Three-view", _svg_section(svg)))
    sections.append(("corners", f"Corner points ({c.unit('length')})", _corners_section(layout, c)))
    hinges = _hinges_section(layout, c)
    if hinges:
        sections.append(("hinges", f"Hinge lines ({c.unit('length')})", hinges))
    if checks is not None:
        sections.append(("checks", "Self-checks of the solids", _checks_section(checks)))
    if meshes:
        sections.append(("view3d-section", "3D view", _view_section(meshes)))

    meta = (
        f"Design <code>{escape(d['name'])}</code> from <code>{escape(d['source'])}</code>"
        + (f", dated {escape(str(d['date']))}" if d["date"] else "")
        + f". Made by geomgen {escape(__version__)}. Units: {escape(units)}. "
        + escape(data["frame"][0].upper() + data["frame"][1:])
        + "."
    )
    toc = "".join(f'<li><a href="#{i}">{escape(h)}</a></li>' for i, h, _ in sections)
    body = "".join(
        f'<section id="{i}"><h2>{escape(h)}</h2>\n{b}</section>\n' for i, h, b in sections
    )
    caution = f'<p class="caution" role="note">{escape(CAUTION)}</p>'
    parts = [
        '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n',
        # nothing may be fetched: the page works offline and shows what it holds only
        '<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; '
        "script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:\">\n",
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n',
        f'<meta name="generator" content="geomgen {escape(__version__)}">\n',
        f"<title>{escape(d['title'])}</title>\n<style>{_CSS}</style>\n</head>\n<body>\n",
        f'<header><h1>{escape(d["title"])}</h1>\n{caution}\n<p class="meta">{meta}</p>\n',
        f'<nav><ul class="toc">{toc}</ul></nav></header>\n<main>\n{body}</main>\n',
        f"<footer>{caution}</footer>\n",
    ]
    if meshes:
        parts.append(_view_scripts(meshes))
    parts.append("</body>\n</html>\n")
    return "".join(parts)


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


class _Cells:
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


def _stall_section(c: _Cells) -> str:
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


def _surfaces_section(layout: Layout, c: _Cells) -> str:
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


def _tails_section(layout: Layout, c: _Cells) -> str:
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


def _svg_section(svg: str) -> str:
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


def _corners_section(layout: Layout, c: _Cells) -> str:
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


def _hinges_section(layout: Layout, c: _Cells) -> str:
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


def _checks_section(checks: Mapping[str, Any]) -> str:
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


# --- 3D view ---------------------------------------------------------------------------------


def _b64(array: np.ndarray) -> str:
    return base64.b64encode(np.ascontiguousarray(array).tobytes()).decode("ascii")


def _mesh_payload(meshes: Mapping[str, tuple[np.ndarray, np.ndarray]]) -> str:
    """JSON of the parts: vertices (mm, little-endian float32) and triangles (little-endian
    uint32), base64. Coincident vertices are merged (STL repeats each one per triangle); no
    triangle is dropped or moved."""
    parts = []
    for name, (vertices, faces) in meshes.items():
        v = np.asarray(vertices, dtype="<f4").reshape(-1, 3)
        f = np.asarray(faces, dtype=np.int64).reshape(-1, 3)
        if len(f) and (f.min() < 0 or f.max() >= len(v)):
            raise ValueError(f"mesh {name!r}: a triangle refers to a vertex that does not exist")
        unique, inverse = np.unique(v, axis=0, return_inverse=True)
        f = inverse.reshape(-1)[f].astype("<u4")
        parts.append(
            {
                "name": name,
                "kind": part_kind(name),
                "colour": part_colour(name),
                "vertices": _b64(unique.astype("<f4")),
                "triangles": _b64(f),
            }
        )
    text = json.dumps({"unit": "mm", "parts": parts}, separators=(",", ":"))
    # inside <script>: "<" could close the element early
    return text.replace("<", "\\u003c")


def _view_section(meshes: Mapping[str, tuple[np.ndarray, np.ndarray]]) -> str:
    boxes = "".join(
        f'<label><input type="checkbox" checked data-part="{escape(name)}">'
        f'<span class="swatch" style="background:{part_colour(name)}"></span>'
        f"{escape(name)}</label>"
        for name in meshes
    )
    return (
        "<p>Drag to turn, scroll to zoom, right-drag to pan. Aircraft frame: x aft, y right, "
        "z up. Tessellated surfaces for a look only: the STEP file is the geometry.</p>\n"
        f'<div class="parts" id="part-toggles">{boxes}'
        '<button type="button" id="view-reset">reset view</button></div>\n'
        '<div id="view3d" class="view3d" data-ready="0">'
        "<noscript>The 3D view needs JavaScript.</noscript></div>\n"
    )


def _vendor(name: str) -> str:
    text = (VENDOR / name).read_text(encoding="utf-8")
    if "</script" in text.lower():
        raise ValueError(f"{name} cannot be inlined: it holds a closing script tag")
    return text


def _view_scripts(meshes: Mapping[str, tuple[np.ndarray, np.ndarray]]) -> str:
    scripts = [f'<script type="application/json" id="mesh-data">{_mesh_payload(meshes)}</script>\n']
    scripts += [
        f"<script>/* {n}: three.js 0.147.0, MIT licence */\n{_vendor(n)}\n</script>\n"
        for n in VENDOR_SCRIPTS
    ]
    scripts.append(f"<script>\n{_VIEWER_JS}\n</script>\n")
    return "".join(scripts)


_VIEWER_JS = r"""
(function () {
  "use strict";
  var holder = document.getElementById("view3d");
  var data = JSON.parse(document.getElementById("mesh-data").textContent);

  function decode(b64) {
    var s = atob(b64);
    var bytes = new Uint8Array(s.length);
    for (var i = 0; i < s.length; i++) bytes[i] = s.charCodeAt(i);
    return bytes.buffer;
  }

  function webglAvailable() {
    try {
      var probe = document.createElement("canvas");
      return !!(probe.getContext("webgl2") || probe.getContext("webgl"));
    } catch (e) {
      return false;
    }
  }

  if (!webglAvailable()) {
    holder.textContent = "This browser cannot show the 3D view: WebGL is not available.";
    holder.dataset.ready = "no-webgl";
    return;
  }

  var renderer = new THREE.WebGLRenderer({antialias: true, preserveDrawingBuffer: true});
  renderer.setPixelRatio(window.devicePixelRatio || 1);
  holder.appendChild(renderer.domElement);

  var scene = new THREE.Scene();
  scene.background = new THREE.Color(0xf4f6f9);
  var camera = new THREE.PerspectiveCamera(30, 1, 1, 1e6);
  camera.up.set(0, 0, 1);  // aircraft frame: z up
  scene.add(camera);
  scene.add(new THREE.HemisphereLight(0xffffff, 0x606870, 0.65));
  var lamp = new THREE.DirectionalLight(0xffffff, 0.55);
  lamp.position.set(-1, -1, 2);
  camera.add(lamp);  // the light turns with the view

  var meshes = {};
  var box = new THREE.Box3();
  data.parts.forEach(function (p) {
    var geometry = new THREE.BufferGeometry();
    geometry.setAttribute("position",
      new THREE.BufferAttribute(new Float32Array(decode(p.vertices)), 3));
    geometry.setIndex(new THREE.BufferAttribute(new Uint32Array(decode(p.triangles)), 1));
    geometry.computeBoundingBox();
    box.union(geometry.boundingBox);
    var material = new THREE.MeshPhongMaterial({
      color: new THREE.Color(p.colour), flatShading: true, side: THREE.DoubleSide,
      shininess: 20
    });
    var mesh = new THREE.Mesh(geometry, material);
    mesh.name = p.name;
    scene.add(mesh);
    meshes[p.name] = mesh;
  });

  var centre = box.getCenter(new THREE.Vector3());
  var radius = Math.max(box.getSize(new THREE.Vector3()).length() / 2, 1);
  camera.near = radius / 100;
  camera.far = radius * 100;

  var controls = new THREE.OrbitControls(camera, renderer.domElement);
  controls.minDistance = radius * 0.05;
  controls.maxDistance = radius * 20;

  function render() {
    renderer.render(scene, camera);
  }

  function resize() {
    var width = Math.max(holder.clientWidth, 200);
    var height = Math.max(Math.round(width * 0.55), 320);
    renderer.setSize(width, height);
    camera.aspect = width / height;
    camera.updateProjectionMatrix();
    render();
  }

  function home() {
    // from ahead, to the left and above: x aft, y right, z up
    var dir = new THREE.Vector3(-1.0, -1.25, 0.8).normalize();
    var distance = radius / Math.sin(THREE.MathUtils.degToRad(camera.fov / 2)) * 0.8;
    camera.position.copy(centre).addScaledVector(dir, distance);
    controls.target.copy(centre);
    controls.update();
    render();
  }

  controls.addEventListener("change", render);
  window.addEventListener("resize", resize);
  document.querySelectorAll("#part-toggles input[data-part]").forEach(function (box) {
    box.addEventListener("change", function () {
      var mesh = meshes[box.dataset.part];
      if (mesh) mesh.visible = box.checked;
      render();
    });
  });
  document.getElementById("view-reset").addEventListener("click", home);

  resize();
  home();
  holder.dataset.ready = "1";
})();
"""


_CSS = """
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; margin: 0;
  color: #1d232b; background: #fff; line-height: 1.4; }
header, main, footer { max-width: 1100px; margin: 0 auto; padding: 0 1.2em; }
h1 { font-size: 1.6em; margin: 0.8em 0 0.4em; }
h2 { font-size: 1.25em; border-bottom: 1px solid #c9d1db; padding-bottom: 0.2em;
  margin-top: 1.6em; }
h3 { font-size: 1.05em; margin: 1.2em 0 0.4em; }
.caution { border: 2px solid #c77700; background: #fff6e5; padding: 0.6em 0.9em;
  font-weight: 600; border-radius: 4px; }
.meta { color: #4a5561; font-size: 0.92em; }
.toc { list-style: none; padding: 0; display: flex; flex-wrap: wrap; gap: 0.3em 1.2em; }
table { border-collapse: collapse; margin: 0.4em 0 1em; font-size: 0.9em; }
th, td { border: 1px solid #d5dbe2; padding: 0.22em 0.6em; text-align: left; }
thead th { background: #eef2f6; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr:nth-child(even) td { background: #fafbfc; }
.checks tr.pass td.result { background: #d9f2df; color: #17612b; font-weight: 600; }
.checks tr.fail td { background: #fde3e3; }
.checks tr.fail td.result { background: #e0413a; color: #fff; font-weight: 700; }
.summary.ok { color: #17612b; font-weight: 600; }
.summary.bad { color: #b3211b; font-weight: 700; }
.drawing svg { max-width: 100%; height: auto; border: 1px solid #d5dbe2; background: #fff; }
.parts { display: flex; flex-wrap: wrap; gap: 0.3em 1em; margin: 0.4em 0; align-items: center; }
.parts label { white-space: nowrap; cursor: pointer; }
.swatch { display: inline-block; width: 0.9em; height: 0.9em; margin: 0 0.3em;
  vertical-align: -0.1em; border: 1px solid #778; }
.view3d { border: 1px solid #c9d1db; min-height: 320px; }
.view3d canvas { display: block; }
footer { margin-bottom: 2em; }
@media print { .view3d, .parts, nav { display: none; } }
"""
