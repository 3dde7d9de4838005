"""The shop DXFs as a DXF reader sees them: ezdxf's audit, and a rendering to PNG with ezdxf's
drawing add-on (``ezdxf.addons.drawing``, matplotlib backend), the renderer ezdxf ships to
view DXF files, independent of geomgen's own writer.

A section template rendered at 1:1 (a PNG whose stated resolution makes one drawing unit one
millimetre on paper) is measured in the image: the distance between its leading- and
trailing-edge marks, the centres of two vertical lines found by the ink-weighted mean of their
pixel columns, is the chord of the section the ruled panel has at that station, within 0.1 mm.
"""

from __future__ import annotations

import json
import logging
import math
from pathlib import Path

import ezdxf
import matplotlib
import numpy as np
import pytest
from designs import DEMO
from ezdxf.addons.drawing import Frontend, RenderContext
from ezdxf.addons.drawing.config import BackgroundPolicy, ColorPolicy, Configuration
from ezdxf.addons.drawing.matplotlib import MatplotlibBackend

from geomgen.commands.pipeline import run_size

matplotlib.use("Agg")

from matplotlib import pyplot as plt  # noqa: E402  (after choosing the non-interactive backend)
from PIL import Image  # noqa: E402  (Pillow: matplotlib's own dependency)

#: rendering resolution of the 1:1 templates: pixels per millimetre of drawing
PX_PER_MM = 4.0
#: black strokes on white: ink is what is darker than this grey level (0 black, 1 white)
INK = 0.5
#: how far the leading- and trailing-edge marks stand beyond the outline, and the other marks
#: (spar, hinge) beyond the surface (mm); geomgen.outputs.templates EDGE_MARK_REACH and
#: INNER_MARK_REACH, restated here as the drawing's reader sees them
EDGE_REACH, INNER_REACH = 6.0, 4.0


@pytest.fixture(scope="module")
def shop(tmp_path_factory: pytest.TempPathFactory) -> dict:
    """``geomgen size`` of the demo: its report.json and the DXF files a user opens."""
    folder = run_size(DEMO, tmp_path_factory.mktemp("dxf-clients"), None)
    return {
        "report": json.loads((folder / "report.json").read_text(encoding="utf-8")),
        "dxf": sorted((folder / "dxf").glob("*.dxf")),
        "png": tmp_path_factory.mktemp("png"),
    }


def _configuration() -> Configuration:
    return Configuration(
        background_policy=BackgroundPolicy.WHITE,
        color_policy=ColorPolicy.BLACK,
        lineweight_scaling=0.0,  # every line at min_lineweight (1/300 inch): about 2 pixels
        min_lineweight=2.0 / (PX_PER_MM * 25.4) * 300.0,
    )


def _render(doc, png: Path, window: tuple[float, float, float, float], px_per_mm: float, only=None):
    """Draw the modelspace (or the entities ``only`` accepts) over ``window`` (x0, y0, x1, y1 in
    drawing units, mm) into ``png`` at ``px_per_mm``, with the resolution that makes the
    image 1:1: 25.4 x px_per_mm dots per inch. The image's grey levels (rows top to bottom)."""
    x0, y0, x1, y1 = window
    dpi = 25.4 * px_per_mm
    # no snapping of straight strokes to whole pixels: the antialiased ink then places a
    # line's centre to a fraction of a pixel
    with plt.rc_context({"path.snap": False}):
        _draw(doc, png, window, dpi, only)
    with Image.open(png) as image:
        assert image.info["dpi"] == pytest.approx((dpi, dpi), abs=0.01)  # PNG pHYs: 1:1
        return np.asarray(image.convert("L"), dtype=float) / 255.0


def _draw(doc, png: Path, window: tuple[float, float, float, float], dpi: float, only) -> None:
    x0, y0, x1, y1 = window
    fig = plt.figure(figsize=((x1 - x0) / 25.4, (y1 - y0) / 25.4), dpi=dpi)
    try:
        ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
        backend = MatplotlibBackend(ax, adjust_figure=False)
        Frontend(RenderContext(doc), backend, config=_configuration()).draw_layout(
            doc.modelspace(), finalize=True, filter_func=only
        )
        ax.set_aspect("auto")
        ax.set_xlim(x0, x1)
        ax.set_ylim(y0, y1)
        fig.savefig(png, dpi=dpi, facecolor="white")
    finally:
        plt.close(fig)


def test_every_shop_dxf_passes_the_audit_and_renders(shop, caplog) -> None:
    names = {p.name for p in shop["dxf"]}
    # the shop files of the demo (README: dxf/plan.dxf, dxf/<surface>-planform.dxf, templates)
    assert names == {
        "plan.dxf",
        "wing-planform.dxf",
        "stabilizer-planform.dxf",
        "fin-planform.dxf",
        "templates.dxf",
    }
    for path in shop["dxf"]:
        doc = ezdxf.readfile(path)
        auditor = doc.audit()
        assert not auditor.has_errors, (path.name, [e.message for e in auditor.errors])
        assert not auditor.has_fixes, (path.name, [f.message for f in auditor.fixes])
        box = ezdxf.bbox.extents(doc.modelspace())
        window = (box.extmin.x - 10, box.extmin.y - 10, box.extmax.x + 10, box.extmax.y + 10)
        with caplog.at_level(logging.WARNING, logger="ezdxf"):
            grey = _render(doc, shop["png"] / f"{path.stem}.png", window, px_per_mm=0.5)
        assert not [r for r in caplog.records if r.name.startswith("ezdxf")], path.name
        # the whole drawing is drawn: ink in the top and bottom halves and in the left and
        # right halves of the picture, and none on its border (nothing cut off)
        h, w = grey.shape
        for part in (grey[: h // 2], grey[h // 2 :], grey[:, : w // 2], grey[:, w // 2 :]):
            assert (part < INK).any(), path.name
        border = np.concatenate([grey[0], grey[-1], grey[:, 0], grey[:, -1]])
        assert not (border < INK).any(), path.name


def _ruled_chord(report: dict, surface: str, s: float) -> float:
    """The chord (mm) of the section a straight-tapered panel has at spanwise position s (m),
    from report.json's stations: the panel is ruled between its end sections, so the section's
    chord line runs from the blended leading edge to the blended trailing edge, the vector
    (1 - t) c_a (cos twist_a, -sin twist_a) + t c_b (cos twist_b, -sin twist_b) in the section
    plane (t the span fraction between the stations; the chord lines' ends difference, so
    where each section turns about drops out)."""
    stations = report["surfaces"][surface]["stations"]
    for a, b in zip(stations, stations[1:], strict=False):
        sa, sb = a["span_position"]["value"], b["span_position"]["value"]
        if sa <= s <= sb:
            t = (s - sa) / (sb - sa)
            vec = [
                (1 - t) * a["chord"]["value"] * f(a["twist"]["value"])
                + t * b["chord"]["value"] * f(b["twist"]["value"])
                for f in (math.cos, lambda x: -math.sin(x))
            ]
            return 1000.0 * math.hypot(*vec)
    raise AssertionError(f"{s} m is outside the stations of {surface}")


@pytest.mark.parametrize(
    ("layer", "surface", "s"),
    [
        ("wing-y0000", "wing", 0.0),  # the root
        ("wing-y3000", "wing", 3.0),  # inside the tapered, twisted outer panel
        ("stabilizer-y0600", "horizontal_tail", 0.6),
        ("fin-h0600", "vertical_tail", 0.6),
    ],
)
def test_template_rendered_at_full_size_has_its_chord(shop, layer, surface, s) -> None:
    doc = ezdxf.readfile(next(p for p in shop["dxf"] if p.name == "templates.dxf"))
    msp = doc.modelspace()
    # the section's outline: the longest closed polyline (a hinge mark is a small ring)
    closed = [e for e in msp.query(f'LWPOLYLINE[layer=="{layer}"]') if e.closed]
    outline = max(closed, key=len)
    points = np.array([v[:2] for v in outline.get_points()])
    top = points[:, 1].max()
    box = ezdxf.bbox.extents(msp.query(f'*[layer=="{layer}"]'))
    x0, x1 = math.floor(box.extmin.x) - 10.0, math.ceil(box.extmax.x) + 10.0
    y0, y1 = math.floor(box.extmin.y) - 10.0, math.ceil(box.extmax.y) + 10.0
    grey = _render(
        doc,
        shop["png"] / f"{layer}.png",
        (x0, y0, x1, y1),
        PX_PER_MM,
        only=lambda e: e.dxf.layer == layer,
    )
    h, w = grey.shape
    assert (w, h) == (round((x1 - x0) * PX_PER_MM), round((y1 - y0) * PX_PER_MM))
    # a band of rows above the outline, below the edge marks' ends and above the other marks'
    # ends: only the two edge marks cross it
    band_mm = (top + INNER_REACH + 0.6, top + EDGE_REACH - 0.6)
    rows = slice(round((y1 - band_mm[1]) * PX_PER_MM), round((y1 - band_mm[0]) * PX_PER_MM))
    ink = np.clip(1.0 - grey[rows], 0.0, 1.0).sum(axis=0)  # ink per pixel column
    inked = np.flatnonzero(ink > 0.05 * ink.max())
    runs = np.split(inked, np.flatnonzero(np.diff(inked) > 1) + 1)
    assert len(runs) == 2, [(r[0], r[-1]) for r in runs]  # the LE mark and the TE mark
    centres = [x0 + (np.average(r, weights=ink[r]) + 0.5) / PX_PER_MM for r in runs]
    measured = centres[1] - centres[0]
    assert measured == pytest.approx(_ruled_chord(shop["report"], surface, s), abs=0.1)
