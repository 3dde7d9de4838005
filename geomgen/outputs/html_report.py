"""``report.html``: one self-contained page with the sizing tables, the three-view drawing, the
corner points and hinge lines, the self-checks and an interactive 3D view of the parts.

Everything the page needs is inline (styles, scripts, the drawing, the meshes), so it opens
offline and can be mailed as one file. The 3D view uses three.js, vendored under
``vendor/three-0.147.0/`` (MIT licence, copied beside it); the page's own viewer script and
style sheet are ``assets/viewer.js`` and ``assets/report.css``, read when a page is made. The
sections that show report.json (tables, drawing, checks) are built in
:mod:`geomgen.outputs.html_sections`; this module assembles the page and the 3D view. The output
is deterministic: no timestamps.
"""

from __future__ import annotations

import base64
import json
from collections.abc import Mapping
from html import escape
from pathlib import Path

import numpy as np

from geomgen import __version__
from geomgen.design.units import OUTPUT_UNITS
from geomgen.geometry.layout import Layout
from geomgen.outputs.html_sections import (
    Cells,
    checks_section,
    corners_section,
    hinges_section,
    stability_section,
    stall_section,
    surfaces_section,
    svg_section,
    tails_section,
)
from geomgen.outputs.report import CAUTION, report_data

VENDOR = Path(__file__).resolve().parent / "vendor" / "three-0.147.0"
VENDOR_SCRIPTS = ("three.min.js", "OrbitControls.js")
#: the page's own script (the 3D viewer) and style sheet, inlined as they are
ASSETS = Path(__file__).resolve().parent / "assets"

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
    c = Cells(data, units)
    d = data["design"]
    sections: list[tuple[str, str, str]] = [  # id, heading, body
        ("stall", "Stall requirement and wing area", stall_section(c)),
        ("surfaces", "Surfaces", surfaces_section(layout, c)),
    ]
    tails = tails_section(layout, c)
    if tails:
        sections.append(("tails", "Tail arms and volume coefficients", tails))
    stability = stability_section(c)
    if stability:
        sections.append(("stability", "Neutral point and static margins", stability))
    if svg is not None:
        sections.append(("three-view", "Three-view", svg_section(svg)))
    sections.append(("corners", f"Corner points ({c.unit('length')})", corners_section(layout, c)))
    hinges = hinges_section(layout, c)
    if hinges:
        sections.append(("hinges", f"Hinge lines ({c.unit('length')})", hinges))
    if checks is not None:
        sections.append(("checks", "Self-checks of the solids", checks_section(checks)))
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
    css = _asset("report.css")
    parts = [
        '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n',
        # nothing may be fetched: the page works offline and shows what it holds only
        '<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; '
        "script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:\">\n",
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n',
        f'<meta name="generator" content="geomgen {escape(__version__)}">\n',
        f"<title>{escape(d['title'])}</title>\n<style>{css}</style>\n</head>\n<body>\n",
        f'<header><h1>{escape(d["title"])}</h1>\n{caution}\n<p class="meta">{meta}</p>\n',
        f'<nav><ul class="toc">{toc}</ul></nav></header>\n<main>\n{body}</main>\n',
        f"<footer>{caution}</footer>\n",
    ]
    if meshes:
        parts.append(_view_scripts(meshes))
    parts.append("</body>\n</html>\n")
    return "".join(parts)


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
    scripts.append(f"<script>\n{_asset('viewer.js')}\n</script>\n")
    return "".join(scripts)


def _asset(name: str) -> str:
    """The text of one of the page's own files under ``assets/``."""
    return (ASSETS / name).read_text(encoding="utf-8")
