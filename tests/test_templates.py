"""Section templates as a PDF at true scale, measured in the PDF's own units (points): page
size, the 100 mm check bar, the chord between the leading- and trailing-edge marks, and the
tiling of a section larger than a page; fuselage former templates: their size, centre mark,
centre lines and tiling."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
import pytest
from designs import demo_document, make_design, trapezoid_document, with_body
from pypdf import PdfReader
from pypdf.generic import ContentStream

from geomgen.geometry.layout import lay_out
from geomgen.outputs import templates
from geomgen.outputs.template_pdf import write_template_pdf
from geomgen.sizing.aircraft import size

# 72 pt per inch (PDF 1.7, ISO 32000-1, 8.3.2.3: default user space unit 1/72 in) and
# 25.4 mm per inch exactly (international inch, 1959)
PT_PER_MM = 72 / 25.4
MM = 1 / PT_PER_MM


# --- a small reader of what a page draws ------------------------------------------------------


@dataclass
class Page:
    width: float  # pt
    height: float
    segments: np.ndarray  # (N, 4) stroked straight segments x0, y0, x1, y1 in pt
    texts: list[tuple[str, float, float]]  # text and its start point in pt
    plain: str  # extracted text

    def find(self, pattern: str) -> list[tuple[str, float, float]]:
        return [t for t in self.texts if re.fullmatch(pattern, t[0])]

    def vertical(self, longer_than_mm: float) -> np.ndarray:
        s = self.segments
        keep = (np.abs(s[:, 0] - s[:, 2]) < 1e-6) & (np.abs(s[:, 3] - s[:, 1]) > longer_than_mm)
        return s[keep]

    def mark_near(self, text: str, longer_than_mm: float = 10 * PT_PER_MM) -> float:
        """x (pt) of the vertical segment with an end nearest to the start of ``text``."""
        (_, tx, ty), *_ = self.find(re.escape(text))
        v = self.vertical(longer_than_mm)
        d = np.minimum(np.hypot(v[:, 0] - tx, v[:, 1] - ty), np.hypot(v[:, 2] - tx, v[:, 3] - ty))
        return float(v[np.argmin(d), 0])

    def crosses(self) -> list[tuple[float, float]]:
        """Centres (pt) of crosses: a horizontal and a vertical segment of equal length that
        bisect each other."""
        s = self.segments
        length = np.hypot(s[:, 2] - s[:, 0], s[:, 3] - s[:, 1])
        mid = 0.5 * (s[:, :2] + s[:, 2:])
        hor = np.flatnonzero((np.abs(s[:, 1] - s[:, 3]) < 1e-6) & (length < 20 * PT_PER_MM))
        ver = np.flatnonzero((np.abs(s[:, 0] - s[:, 2]) < 1e-6) & (length < 20 * PT_PER_MM))
        out = []
        for i in hor:
            for j in ver:
                if np.allclose(mid[i], mid[j], atol=1e-3) and abs(length[i] - length[j]) < 1e-3:
                    out.append((float(mid[i, 0]), float(mid[i, 1])))
        return out


def read_pages(path) -> list[Page]:
    reader = PdfReader(path)
    return [_read_page(page, reader) for page in reader.pages]


def _read_page(page, reader) -> Page:
    """Interprets the path and text operators of a content stream (PDF 1.7 sections 8.5, 9.4)
    with the current transformation matrix."""

    def mul(a, b):  # affine matrices [a b c d e f], a applied first
        return [
            a[0] * b[0] + a[1] * b[2],
            a[0] * b[1] + a[1] * b[3],
            a[2] * b[0] + a[3] * b[2],
            a[2] * b[1] + a[3] * b[3],
            a[4] * b[0] + a[5] * b[2] + b[4],
            a[4] * b[1] + a[5] * b[3] + b[5],
        ]

    def apply(m, x, y):
        return (m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5])

    ctm, stack = [1, 0, 0, 1, 0, 0], []
    tlm = [1, 0, 0, 1, 0, 0]
    path, segments, texts = [], [], []
    start = current = None
    for operands, op in ContentStream(page.get_contents(), reader).operations:
        op = op.decode() if isinstance(op, bytes) else op
        args = [float(a) for a in operands] if op in ("m", "l", "cm", "re", "Td", "Tm") else []
        if op == "q":
            stack.append(ctm)
        elif op == "Q":
            ctm = stack.pop()
        elif op == "cm":
            ctm = mul(args, ctm)
        elif op == "m":
            start = current = apply(ctm, *args)
        elif op == "l":
            p = apply(ctm, *args)
            path.append((*current, *p))
            current = p
        elif op == "h":
            if current != start:
                path.append((*current, *start))
            current = start
        elif op == "re":
            x, y, w, h = args
            c = [apply(ctm, x, y), apply(ctm, x + w, y), apply(ctm, x + w, y + h)]
            c.append(apply(ctm, x, y + h))
            path += [(*c[i], *c[(i + 1) % 4]) for i in range(4)]
        elif op in ("S", "s", "B", "B*", "b", "b*"):
            segments += path
            path = []
        elif op in ("f", "F", "f*", "n"):
            path = []
        elif op == "BT":
            tlm = [1, 0, 0, 1, 0, 0]
        elif op == "Td":
            tlm = mul([1, 0, 0, 1, *args], tlm)
        elif op == "Tm":
            tlm = args
        elif op in ("Tj", "TJ"):
            parts = operands[0] if op == "TJ" else [operands[0]]
            text = "".join(str(p) for p in parts if isinstance(p, str))
            texts.append((text, *apply(mul(tlm, ctm), 0.0, 0.0)))
    box = page.mediabox
    return Page(
        float(box.width),
        float(box.height),
        np.array(segments, dtype=float).reshape(-1, 4),
        texts,
        page.extract_text(),
    )


def template_pages(pages: list[Page], name: str) -> list[Page]:
    return [p for p in pages if p.find(rf"{re.escape(name)} .*")]


# --- fixtures ------------------------------------------------------------------------------------

#: A model-size fuselage of our own (design file keys, invented figures): a pointed nose, an
#: elliptic former that fits on a page, a wider super-elliptic one that does not, a pointed tail.
MODEL_BODY = {
    "stations": [
        {"x": "-50 mm", "width": "0 m", "height": "0 m", "z": "20 mm"},
        {"x": "100 mm", "width": "120 mm", "height": "160 mm", "z": "20 mm"},
        {
            "x": "300 mm",
            "width": "300 mm",
            "height": "180 mm",
            "z": "20 mm",
            "shape": "superellipse",
            "exponent": 3,
        },
        {"x": "900 mm", "width": "0 m", "height": "0 m", "z": "20 mm"},
    ]
}


def small_layout(paper: str = "A4", body: dict | None = None):
    """A model-size airplane whose every section fits on one page, with this fuselage."""
    doc = trapezoid_document(area="0.12 m^2", aspect_ratio=6.0, taper_ratio=0.8)
    doc["wing"]["controls"].pop("flap")
    for key in ("horizontal_tail", "vertical_tail"):
        doc[key]["tail_arm"] = "0.6 m"
    # the controls as fractions of the small tails' spans
    doc["horizontal_tail"]["controls"]["elevator"]["span_start"] = 0.0
    doc["vertical_tail"]["controls"]["rudder"]["span_start"] = 0.04
    doc["drawings"] = {"paper": paper}
    return lay_out(size(make_design(with_body(doc, body))))


@pytest.fixture(scope="module")
def small(tmp_path_factory):
    layout = small_layout()
    path = write_template_pdf(layout, tmp_path_factory.mktemp("small") / "t.pdf")
    return layout, path, read_pages(path)


@pytest.fixture(scope="module")
def bodied(tmp_path_factory):
    """The small airplane with MODEL_BODY: its sections and two formers."""
    layout = small_layout(body=MODEL_BODY)
    path = write_template_pdf(layout, tmp_path_factory.mktemp("body") / "t.pdf")
    return layout, read_pages(path)


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    """The demo without its fuselage and without extra spaced templates: root, break and tip
    sections, most tiled."""
    doc = with_body(demo_document(), None)
    doc["drawings"] = {"paper": "A4"}
    layout = lay_out(size(make_design(doc)))
    path = write_template_pdf(layout, tmp_path_factory.mktemp("demo") / "t.pdf")
    return layout, read_pages(path)


# --- tests ---------------------------------------------------------------------------------------


def test_pages_are_a4_in_points(small, demo, bodied):
    for page in small[2] + demo[1] + bodied[1]:
        # ISO 216 A4: 210 mm x 297 mm = 595.28 pt x 841.89 pt
        assert page.width == pytest.approx(595.28, abs=0.01)
        assert page.height == pytest.approx(841.89, abs=0.01)


def test_letter_pages_are_8_5_by_11_inches(tmp_path):
    path = write_template_pdf(small_layout("Letter"), tmp_path / "letter.pdf")
    pages = read_pages(path)
    assert pages
    for page in pages:
        # ANSI Letter 8.5 in x 11 in at 72 pt per inch = 612 pt x 792 pt
        assert (page.width, page.height) == pytest.approx((612.0, 792.0), abs=0.01)
        assert page.find("100 mm")


def test_check_bar_measures_100_mm(small, demo, bodied):
    for page in small[2] + demo[1] + bodied[1]:
        ((_, tx, ty),) = page.find("100 mm")
        s = page.segments
        horizontal = s[np.abs(s[:, 1] - s[:, 3]) < 1e-6]
        # the bar ends just left of its label, on the label's baseline
        near = horizontal[(np.abs(horizontal[:, 1] - ty) < 1.0) & (horizontal[:, 2] < tx)]
        bar = near[np.argmax(near[:, 2])]
        # 100 mm = 100 x 72 / 25.4 pt = 283.46 pt (exact inch, PDF user unit 1/72 in)
        assert abs(bar[2] - bar[0]) == pytest.approx(283.46, abs=0.01)
        assert tx - bar[2] < 10 * PT_PER_MM


def test_chord_between_le_and_te_marks(small):
    layout, _, pages = small
    checked = 0
    for sl in layout.surfaces:
        pf = sl.sizing.planform
        for s in templates.template_positions(sl.sizing, None):
            (page,) = template_pages(pages, templates.template_name(sl.key, s))
            assert page.find(r".* tile 1 of 1")
            chord_mm = (page.mark_near("TE") - page.mark_near("LE")) * MM
            # local chord of a straight-tapered panel, linear between the root and tip chords
            # (plan geometry of a trapezoid)
            expected = pf.root_chord + (pf.tip_chord - pf.root_chord) * s / pf.semi_span
            assert chord_mm == pytest.approx(expected * 1000, abs=0.5)
            checked += 1
    assert checked == 6  # root and tip of three surfaces


def test_every_page_has_its_label_and_the_caution(small, demo):
    pages = small[2] + demo[1]
    total = len(pages)
    for number, page in enumerate(pages[len(small[2]) :], start=1):
        assert f"sheet {number} of {len(demo[1])}" in page.plain
    for page in pages:
        assert re.search(r"(wing|stabilizer|fin)-[yh]\d{4} .*tile \d+ of \d+", page.plain)
        assert "CAUTION: geomgen output is a design aid" in page.plain
    assert total > 10


def test_large_section_is_tiled_with_matching_crosses(demo):
    layout, pages = demo
    root = template_pages(pages, "wing-y0000")
    chord = layout.surface("wing").sizing.planform.root_chord * 1000
    # a 1.38 m chord needs more than one 190 mm wide A4 page
    assert len(root) >= math.ceil(chord / 190)
    for k, page in enumerate(root, start=1):
        assert page.find(rf"wing-y0000 .*tile {k} of {len(root)}")
    # Offsets between neighbouring pages from their shared crosses: every cross of a joint
    # must give the same offset (the tiles overlay rigidly) and carry the same label.
    offset_x = 0.0
    for a, b in zip(root, root[1:], strict=False):
        shared = []
        labels_a, labels_b = _crosses_by_label(a), _crosses_by_label(b)
        for label in labels_a.keys() & labels_b.keys():
            # crosses of equal label pair up from the bottom
            for (cx, cy), (dx, dy) in zip(labels_a[label], labels_b[label], strict=True):
                shared.append((dx - cx, dy - cy))
        assert len(shared) == 2
        (ox1, oy1), (ox2, oy2) = shared
        assert (ox1, oy1) == pytest.approx((ox2, oy2), abs=1e-3)
        assert oy1 == pytest.approx(0.0, abs=1e-3)  # tiles of one row share their y
        offset_x += ox1
    # the chord reassembled over the tiles: LE on the first page, TE on the last
    le = root[0].mark_near("LE")
    te = root[-1].mark_near("TE")
    # root chord: report value; the tiles hold the drawing 1:1 (72 / 25.4 pt per mm)
    assert (te - offset_x - le) * MM == pytest.approx(chord, abs=0.5)
    # the first joint's crosses are labelled with their distance from the LE in mm
    cx, cy = root[0].crosses()[0]
    label = _label_of(root[0], cx, cy)
    assert float(label.split()[1]) == pytest.approx((cx - le) * MM, abs=0.1)


def _crosses_by_label(page: Page, axes: str = "xy") -> dict[str, list[tuple[float, float]]]:
    out: dict[str, list[tuple[float, float]]] = {}
    for c in page.crosses():
        label = _label_of(page, *c, axes)
        if label is not None:
            out.setdefault(label, []).append(c)
    return {k: sorted(v, key=lambda c: c[1]) for k, v in out.items()}


def _label_of(page: Page, x: float, y: float, axes: str = "xy") -> str | None:
    """The cross label (``x 175.8``; a former's: ``y 16.0``) nearest to a cross, within 12 mm."""
    best = None
    for text, tx, ty in page.find(rf"[{axes}] -?\d+\.\d"):
        d = math.hypot(tx - x, ty - y)
        if d < 12 * PT_PER_MM and (best is None or d < best[0]):
            best = (d, text)
    return best[1] if best else None


def test_drawing_stays_inside_the_margins(demo):
    # printers cannot print to the paper's edge; 5 mm is the common unprintable border
    # (common practice)
    for page in demo[1]:
        s = page.segments
        xs, ys = s[:, [0, 2]], s[:, [1, 3]]
        assert xs.min() >= 5 * PT_PER_MM and xs.max() <= page.width - 5 * PT_PER_MM
        assert ys.min() >= 5 * PT_PER_MM and ys.max() <= page.height - 5 * PT_PER_MM


def test_pdf_is_deterministic(small, tmp_path):
    layout, path, _ = small
    again = write_template_pdf(layout, tmp_path / "again.pdf")
    assert again.read_bytes() == path.read_bytes()


def test_template_positions_follow_the_spacing():
    layout = lay_out(size(make_design(demo_document())))
    ss = layout.surface("wing").sizing
    semi = ss.planform.semi_span
    got = templates.template_positions(ss, 0.6)
    # root, the break at 45 % of the semi-span, the tip (design file) and every 600 mm
    expected = sorted({0.0, 0.45 * semi, semi} | {0.6 * k for k in range(1, 9)})
    assert got == pytest.approx(expected, abs=1e-9)
    assert templates.template_name("wing", 0.6) == "wing-y0600"
    # with the body side among them the spaced ones still run to the tip (they stopped at the
    # body side: the demo's wing had no spaced templates at all)
    side = 0.376
    got = templates.template_positions(ss, 0.6, side)
    assert got == pytest.approx(sorted([*expected, side]), abs=1e-9)
    assert templates.template_name("vertical_tail", 0.25) == "fin-h0250"


# --- fuselage formers ----------------------------------------------------------------------------


def former_parts(page: Page) -> tuple[np.ndarray, np.ndarray, tuple[float, float]]:
    """The outline's and the centre ring's segments (pt) on a former page, and the ring's
    centre: the slanted segments (every other stroke is level or upright), those within 5 mm
    of the middle of the outline's vertical line of symmetry being the ring."""
    s = page.segments
    slanted = s[(np.abs(s[:, 0] - s[:, 2]) > 1e-6) & (np.abs(s[:, 1] - s[:, 3]) > 1e-6)]
    # the centre line: the longest upright segment
    upright = page.vertical(0.0)
    cl = upright[np.argmax(np.abs(upright[:, 3] - upright[:, 1]))]
    near_cl = np.abs(0.5 * (slanted[:, 0] + slanted[:, 2]) - cl[0]) < 5 * PT_PER_MM
    # the ring is the cluster of short slanted segments about the centre line
    short = np.hypot(slanted[:, 2] - slanted[:, 0], slanted[:, 3] - slanted[:, 1]) < PT_PER_MM
    ring = slanted[near_cl & short]
    outline = slanted[~(near_cl & short)]
    centre = ring[:, :2].mean(axis=0)
    return outline, ring, (float(centre[0]), float(centre[1]))


def test_every_fuselage_station_but_the_points_has_a_former(bodied, small):
    layout, pages = bodied
    names = {p.find(r"former-\S+ .*")[0][0].split()[0] for p in pages if p.find(r"former-\S+ .*")}
    # MODEL_BODY: formers at 100 mm and 300 mm; the pointed nose and tail have none
    assert names == {"former-x0100", "former-x0300"}
    assert not [p for p in small[2] if "former" in p.plain]  # no fuselage, no formers
    sections = len(small[2])  # the same airplane without the fuselage
    one = template_pages(pages, "former-x0100")
    wide = template_pages(pages, "former-x0300")
    assert len(one) == 1 and one[0].find(r"former-x0100 .*tile 1 of 1")
    # 300 mm across (MODEL_BODY) takes more than one 190 mm wide A4 drawing area
    assert len(wide) >= math.ceil(300 / 190)
    assert len(pages) == sections + len(one) + len(wide)
    for k, page in enumerate(wide, start=1):
        assert page.find(rf"former-x0300 .*tile {k} of {len(wide)}")
    for number, page in enumerate(pages, start=1):
        assert f"sheet {number} of {len(pages)}" in page.plain
        assert "CAUTION: geomgen output is a design aid" in page.plain


def test_ellipse_former_is_drawn_1_to_1_with_its_centre_marks(bodied):
    _, pages = bodied
    (page,) = template_pages(pages, "former-x0100")
    outline, ring, (cx, cy) = former_parts(page)
    assert len(ring) >= 12
    xs, ys = outline[:, [0, 2]], outline[:, [1, 3]]
    # 120 mm wide, 160 mm high (MODEL_BODY) at 72 / 25.4 pt per mm
    assert np.ptp(xs) * MM == pytest.approx(120.0, abs=0.02)
    assert np.ptp(ys) * MM == pytest.approx(160.0, abs=0.02)
    # an ellipse encloses pi a b (Archimedes); the 256-point polygon inscribed in it falls
    # 1.0e-4 short (an affine image of a regular 256-gon: 128 sin(2 pi / 256) a b)
    area = 0.5 * abs(np.sum(outline[:, 0] * outline[:, 3] - outline[:, 2] * outline[:, 1]))
    assert area * MM**2 == pytest.approx(math.pi * 60.0 * 80.0, rel=2e-4)
    # the centre mark in the middle of the outline (an ellipse is symmetric about its centre)
    assert cx == pytest.approx(0.5 * (xs.min() + xs.max()), abs=0.01)
    assert cy == pytest.approx(0.5 * (ys.min() + ys.max()), abs=0.01)
    # the centre line upright and the water line level through it, both past the outline
    s = page.segments
    level = s[(np.abs(s[:, 1] - s[:, 3]) < 1e-6) & (np.abs(s[:, 1] - cy) < 0.01)]
    assert level[:, [0, 2]].min() < xs.min() and level[:, [0, 2]].max() > xs.max()
    upright = page.vertical(0.0)
    upright = upright[np.abs(upright[:, 0] - cx) < 0.01]
    assert upright[:, [1, 3]].min() < ys.min() and upright[:, [1, 3]].max() > ys.max()
    # labelled: the water line of the centre (MODEL_BODY: z 20 mm) and the centre line
    assert page.find(r"WL 20\.0") and page.find("CL")


def test_wide_former_is_tiled_with_matching_crosses(bodied):
    _, pages = bodied
    wide = template_pages(pages, "former-x0300")
    assert len(wide) == 2 and "row 1 of 1" in wide[0].plain  # one row of two tiles
    assert "crosses of equal y or z coincide" in wide[0].plain
    a, b = wide
    shared = []
    labels_a, labels_b = _crosses_by_label(a, "yz"), _crosses_by_label(b, "yz")
    for label in labels_a.keys() & labels_b.keys():
        for (cx, cy), (dx, dy) in zip(labels_a[label], labels_b[label], strict=True):
            shared.append((dx - cx, dy - cy))
    assert len(shared) == 2
    (ox1, oy1), (ox2, oy2) = shared
    assert (ox1, oy1) == pytest.approx((ox2, oy2), abs=1e-3)
    assert oy1 == pytest.approx(0.0, abs=1e-3)
    # the width reassembled over the tiles: 300 mm (MODEL_BODY), drawn 1:1
    left = former_parts(a)[0][:, [0, 2]].min()
    slanted = b.segments[np.abs(b.segments[:, 0] - b.segments[:, 2]) > 1e-6]
    right = slanted[np.abs(slanted[:, 1] - slanted[:, 3]) > 1e-6][:, [0, 2]].max()
    assert (right - ox1 - left) * MM == pytest.approx(300.0, abs=0.02)
    # the centre mark and both extremes of the height lie on the first tile: 180 mm high
    outline, _, (cx, _) = former_parts(a)
    assert np.ptp(outline[:, [1, 3]]) * MM == pytest.approx(180.0, abs=0.02)
    # a joint's crosses are labelled with their y (right of the centre line) in mm
    (label,) = labels_a.keys() & labels_b.keys()
    (x_cross, _), _ = labels_a[label]
    assert label.startswith("y ")
    assert float(label.split()[1]) == pytest.approx((x_cross - cx) * MM, abs=0.1)
