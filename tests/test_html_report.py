"""report.html: one self-contained page (tables, drawing, checks, 3D view).

The fast tests read the HTML text. The tests marked ``browser`` open the page in headless
Chromium through chromedriver (Debian packages ``chromium`` and ``chromium-driver``) and look at
it as a person would: console, visible table text, pixels of the 3D view. They fail when
Chromium is missing; deselect them with ``-m "not browser"``.
"""

from __future__ import annotations

import base64
import json
import math
import re
import time
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest
from designs import DEMO, demo_document, make_design

from geomgen import design
from geomgen.commands.pipeline import airfoil_dirs
from geomgen.geometry.layout import Layout, corner_labels, fixed_part_name, lay_out
from geomgen.outputs.html_report import to_html, write_html
from geomgen.outputs.report import CAUTION, to_json
from geomgen.sizing.aircraft import size

CHROMIUM = Path("/usr/bin/chromium")
CHROMEDRIVER = Path("/usr/bin/chromedriver")

# Output units: exact definitions. International foot 0.3048 m and pound 0.45359237 kg
# (international yard and pound agreement, 1959); knot 1852 m/h (international nautical mile);
# standard gravity 9.80665 m/s^2 (CGPM 1901); the slug is 1 lbf s^2/ft; degree = pi/180 rad.
FT = 0.3048
LBF = 0.45359237 * 9.80665
TO_SI = {
    "1": 1.0,
    "1/rad": 1.0,  # lift-curve slopes: per rad in both unit systems
    "m": 1.0,
    "m^2": 1.0,
    "m/s": 1.0,
    "N": 1.0,
    "Pa": 1.0,
    "K": 1.0,
    "kg/m^3": 1.0,
    "N/m^2": 1.0,
    "deg": math.pi / 180.0,
    "ft": FT,
    "ft^2": FT**2,
    "kn": 1852.0 / 3600.0,
    "lbf": LBF,
    "lbf/ft^2": LBF / FT**2,
    "slug/ft^3": (LBF / FT) / FT**3,
}

NUMBER = re.compile(r"^\s*([-+]?\d+(?:\.(\d*))?)(?:e([-+]?\d+))?")


# --- fixtures --------------------------------------------------------------------------------


def _layout(d: design.Design) -> Layout:
    dirs = airfoil_dirs(DEMO)
    return lay_out(size(d, dirs), dirs)


@pytest.fixture(scope="module")
def layout() -> Layout:
    return _layout(design.load(DEMO))


def _slab(quad: np.ndarray, normal: np.ndarray, half: float) -> tuple[np.ndarray, np.ndarray]:
    """A closed box: the quadrilateral ``quad`` (4, 3) moved by +-half along ``normal``."""
    v = np.vstack([quad + half * normal, quad - half * normal])
    faces = [(0, 1, 2), (0, 2, 3), (4, 6, 5), (4, 7, 6)]
    for i in range(4):
        j = (i + 1) % 4
        faces += [(i, j, j + 4), (i, j + 4, i + 4)]
    return v, np.array(faces)


def _join(pieces: list[tuple[np.ndarray, np.ndarray]]) -> tuple[np.ndarray, np.ndarray]:
    vs, fs, n = [], [], 0
    for v, f in pieces:
        vs.append(v)
        fs.append(f + n)
        n += len(v)
    return np.vstack(vs), np.vstack(fs)


def slab_meshes(layout: Layout) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """Quick stand-in meshes (mm): one slab per panel for the fixed parts, one per control
    surface between its hinge line and the trailing edge, a little thicker so it shows."""
    out: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    x_aft = np.array([1.0, 0.0, 0.0])
    for sl in layout.surfaces:
        normal = np.array([0.0, 0.0, 1.0]) if sl.sizing.planform.symmetric else np.eye(3)[1]
        for side in sl.sides:
            pieces = [
                _slab(
                    np.array([c.le_inner, c.te_inner, c.te_outer, c.le_outer]) * 1000,
                    normal,
                    20.0,
                )
                for c in sl.corners
                if c.side == side
            ]
            out[fixed_part_name(sl.key, side)] = _join(pieces)
            for ctl in sl.controls:
                if ctl.side != side:
                    continue
                a, b = np.array(ctl.hinge[0].point), np.array(ctl.hinge[-1].point)
                quad = np.array([a, a + ctl.chord_inner * x_aft, b + ctl.chord_outer * x_aft, b])
                out[ctl.name] = _slab(quad * 1000, normal, 30.0)
    return out


def checks_mapping() -> dict:
    """A checks.json mapping (same keys as geomgen.checks.Check) with one failed check."""
    rows = [
        ("mesh is watertight", "wing-right", 1.0, 1.0, 0.0, False, "yes/no", True),
        ("mesh volume vs solid volume", "fin", 6.04e7, 6.05e7, 0.005, True, "mm^3", True),
        ("cut face lies on the hinge plane", "rudder", 0.02, 0.0, 0.001, False, "mm", False),
    ]
    keys = ("name", "part", "measured", "expected", "tolerance", "relative", "unit", "passed")
    checks = [dict(zip(keys, r, strict=True)) for r in rows]
    return {"caution": CAUTION, "passed": False, "count": len(checks), "checks": checks}


SVG = (
    '<?xml version="1.0" encoding="utf-8"?>\n'
    '<svg xmlns="http://www.w3.org/2000/svg" width="400" height="200" viewBox="0 0 400 200">'
    '<rect id="drawing-mark" x="10" y="10" width="380" height="180" fill="none" '
    'stroke="#000"/></svg>\n'
)


class _Cells(HTMLParser):
    """Collects every element with data-key: its attributes and its visible text."""

    def __init__(self) -> None:
        super().__init__()
        self.cells: list[dict] = []
        self.open: dict | None = None
        self.tags: list[tuple[str, dict]] = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append((tag, a))
        if "data-key" in a:
            self.open = {"attrs": a, "text": ""}

    def handle_data(self, data):
        if self.open is not None:
            self.open["text"] += data

    def handle_endtag(self, tag):
        if self.open is not None and tag == "td":
            self.cells.append(self.open)
            self.open = None


def parse(text: str) -> _Cells:
    p = _Cells()
    p.feed(text)
    return p


def lookup(data, key: str):
    """The SI value at a data-key: a dotted report.json path; a last part that is a number
    picks one coordinate of a point."""
    head, _, last = key.rpartition(".")
    if last.isdigit():
        node = _walk(data, head)
        return node["value"][int(last)], node["unit"]
    node = _walk(data, key)
    return node["value"], node["unit"]


def _walk(data, key: str):
    for part in key.split("."):
        data = data[int(part)] if isinstance(data, list) else data[part]
    return data


def assert_cell_matches(report: dict, key: str, si_text: str, unit: str, text: str) -> None:
    """The cell's SI attribute is report.json's value, and its visible number, read in its
    unit, is that value rounded to the digits shown."""
    expected, _ = lookup(report, key)
    assert float(si_text) == expected, key
    m = NUMBER.match(text)
    assert m, f"{key}: no number in {text!r}"
    rest = text[m.end() :].strip()
    if rest and unit != "1":
        assert rest.startswith(unit), f"{key}: unit {unit!r} not shown in {text!r}"
    decimals = len(m.group(2) or "")
    exponent = int(m.group(3) or 0)
    half_step = 0.5 * 10.0 ** (exponent - decimals)
    shown = float(m.group(1)) * 10.0**exponent
    target = expected / TO_SI[unit]
    assert abs(shown - target) <= half_step * (1 + 1e-9) + 1e-12, (key, text, target)


# --- HTML text -------------------------------------------------------------------------------


def test_page_is_self_contained(layout):
    text = to_html(layout, checks=checks_mapping(), svg=SVG, meshes=slab_meshes(layout))
    tags = parse(text).tags
    for tag, attrs in tags:
        assert "src" not in attrs, f"<{tag}> loads {attrs['src']}"
        assert tag not in {"link", "iframe", "object", "embed", "img"}, tag
        if "href" in attrs:
            assert attrs["href"].startswith("#"), attrs["href"]
    csp = [a for t, a in tags if t == "meta" and a.get("http-equiv") == "Content-Security-Policy"]
    assert csp and "default-src 'none'" in csp[0]["content"]
    # three.js and its orbit controls are inline
    assert "OrbitControls" in text and 'const e="147"' in text


def test_output_is_deterministic(layout, tmp_path):
    kw = dict(checks=checks_mapping(), svg=SVG, meshes=slab_meshes(layout))
    write_html(layout, tmp_path / "a.html", **kw)
    write_html(layout, tmp_path / "b.html", **kw)
    assert (tmp_path / "a.html").read_bytes() == (tmp_path / "b.html").read_bytes()


def test_caution_at_top_and_bottom(layout):
    from html import escape

    text = to_html(layout)
    first, last = text.find(escape(CAUTION)), text.rfind(escape(CAUTION))
    assert text.count(escape(CAUTION)) == 2
    assert first < text.find("<main>") < text.find("</main>") < last


def test_text_is_escaped():
    doc = demo_document()
    doc["title"] = 'Trainer <script>alert("x")</script> & co'
    text = to_html(_layout(make_design(doc)))
    assert "<script>alert" not in text
    assert "Trainer &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; co" in text


def test_optional_sections_are_left_out(layout):
    text = to_html(layout)
    for section in ('id="three-view"', 'id="checks"', 'id="view3d"', "THREE."):
        assert section not in text
    assert len(text) < 200_000  # no three.js without meshes
    full = to_html(layout, checks=checks_mapping(), svg=SVG, meshes=slab_meshes(layout))
    for section in ('id="three-view"', 'id="checks"', 'id="view3d"'):
        assert section in full
    assert "<?xml" not in full and '<rect id="drawing-mark"' in full


@pytest.mark.parametrize("units", ["si", "imperial"])
def test_cells_hold_report_values(layout, units):
    report = json.loads(to_json(layout))
    cells = parse(to_html(layout, units=units)).cells
    keys = {c["attrs"]["data-key"] for c in cells}
    for wanted in (
        "requirements.gross_weight",
        "stall.wing_loading",
        "surfaces.wing.area",
        "surfaces.vertical_tail.sweeps.leading_edge",
        "tails.horizontal_tail.tail_arm",
        "surfaces.horizontal_tail.hinge_lines.elevator-left.points.1.point.2",
    ):
        assert wanted in keys
    units_seen = set()
    for c in cells:
        a = c["attrs"]
        units_seen.add(a["data-unit"])
        assert_cell_matches(report, a["data-key"], a["data-si-value"], a["data-unit"], c["text"])
    assert ("ft" in units_seen) == (units == "imperial")


def test_corner_rows_follow_the_drawing_keys(layout):
    """Each corner key's row shows the report.json corner at that point of the outline."""
    report = json.loads(to_json(layout))
    text = to_html(layout)
    labels = corner_labels(layout)
    rows = re.findall(r'<tr data-corner="([^"]+)">(.*?)</tr>', text)
    assert [k for k, _ in rows] == [lab.key for lab in labels]
    for (_, row), lab in zip(rows, labels, strict=True):
        keys = re.findall(r'data-key="([^"]+)"', row)
        assert len(keys) == 3
        xyz = [lookup(report, k)[0] for k in keys]
        assert xyz == pytest.approx(lab.point, abs=1e-12)


def test_mesh_data_round_trips(layout):
    meshes = slab_meshes(layout)
    text = to_html(layout, meshes=meshes)
    raw = re.search(r'<script type="application/json" id="mesh-data">(.*?)</script>', text)
    payload = json.loads(raw.group(1))
    assert [p["name"] for p in payload["parts"]] == list(meshes)
    for p in payload["parts"]:
        v = np.frombuffer(base64.b64decode(p["vertices"]), dtype="<f4").reshape(-1, 3)
        f = np.frombuffer(base64.b64decode(p["triangles"]), dtype="<u4").reshape(-1, 3)
        v0, f0 = meshes[p["name"]]
        assert len(f) == len(f0)
        # the same triangles, corner by corner (vertices merged, none moved)
        np.testing.assert_array_equal(v[f], v0.astype("<f4")[f0])
        assert len(v) == len(np.unique(v0.astype("<f4"), axis=0))


# --- in a browser ----------------------------------------------------------------------------

CHROMIUM_FLAGS = (
    "--headless=new",
    "--no-sandbox",  # CI runs as root
    "--disable-dev-shm-usage",
    # WebGL on the CPU: SwiftShader through ANGLE (no GPU on CI)
    "--use-angle=swiftshader",
    "--enable-unsafe-swiftshader",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
    "--disable-quic",
    "--window-size=1280,1000",
    "--force-device-scale-factor=1",
)

# reads the 3D view's pixels (the renderer keeps its drawing buffer): how many differ from the
# background (the corner pixel), how many distinct colours, and a checksum
PIXELS_JS = """
var c = document.querySelector('#view3d canvas');
var t = document.createElement('canvas');
t.width = c.width; t.height = c.height;
var g = t.getContext('2d');
g.drawImage(c, 0, 0);
var d = g.getImageData(0, 0, c.width, c.height).data;
var bg = [d[0], d[1], d[2]];
var n = 0, sum = 0, colours = new Set();
for (var i = 0; i < d.length; i += 4) {
  if (Math.abs(d[i] - bg[0]) + Math.abs(d[i + 1] - bg[1]) + Math.abs(d[i + 2] - bg[2]) > 6) n++;
  colours.add((d[i] << 16) | (d[i + 1] << 8) | d[i + 2]);
  sum = (sum * 31 + d[i] + 7 * d[i + 1] + 13 * d[i + 2]) % 1000000007;
}
return {drawn: n, colours: colours.size, total: c.width * c.height, sum: sum};
"""


@pytest.fixture(scope="module")
def driver(tmp_path_factory):
    if not (CHROMIUM.exists() and CHROMEDRIVER.exists()):
        pytest.fail(
            "headless Chromium is needed: apt-get install -y chromium chromium-driver "
            '(or deselect these tests with -m "not browser")'
        )
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service

    options = webdriver.ChromeOptions()
    options.binary_location = str(CHROMIUM)
    for flag in CHROMIUM_FLAGS:
        options.add_argument(flag)
    options.add_argument(f"--user-data-dir={tmp_path_factory.mktemp('chromium-profile')}")
    options.set_capability("goog:loggingPrefs", {"browser": "ALL"})
    # an explicit driver path: selenium then looks nothing up on the network
    drv = webdriver.Chrome(options=options, service=Service(str(CHROMEDRIVER)))
    yield drv
    drv.quit()


@pytest.fixture(scope="module")
def page(driver, layout, tmp_path_factory):
    """report.html of the demo with stand-in meshes, loaded and drawn; the browser's log of
    the load."""
    folder = tmp_path_factory.mktemp("html")
    path = folder / "report.html"
    meshes = slab_meshes(layout)
    write_html(layout, path, checks=checks_mapping(), svg=SVG, meshes=meshes, units="si")
    driver.get(path.as_uri())
    deadline = time.monotonic() + 20
    while driver.execute_script("return document.getElementById('view3d').dataset.ready") == "0":
        assert time.monotonic() < deadline, "the 3D view did not finish drawing"
        time.sleep(0.1)
    driver.execute_script("document.getElementById('view3d').scrollIntoView()")
    driver.save_screenshot(str(folder / "view3d.png"))
    return {"path": path, "log": driver.get_log("browser"), "meshes": meshes, "folder": folder}


def severe(log: list[dict]) -> list[dict]:
    return [e for e in log if e["level"] == "SEVERE"]


@pytest.mark.browser
def test_browser_loads_page_without_errors(driver, page):
    assert severe(page["log"]) == []
    assert driver.execute_script("return document.getElementById('view3d').dataset.ready") == "1"
    assert driver.title.startswith("Veyra T2")


@pytest.mark.browser
def test_browser_shows_report_values(driver, page, layout):
    report = json.loads(to_json(layout))
    cells = driver.execute_script(
        "return Array.from(document.querySelectorAll('[data-key]')).map(function (e) {"
        "return [e.dataset.key, e.dataset.siValue, e.dataset.unit, e.innerText]; });"
    )
    assert len(cells) > 300
    for key, si, unit, text in cells:
        assert_cell_matches(report, key, si, unit, text)
    # every corner point of the layout is on show
    corners = driver.execute_script(
        "return Array.from(document.querySelectorAll('tr[data-corner]'))"
        ".map(function (r) { return r.dataset.corner; });"
    )
    assert corners == [lab.key for lab in corner_labels(layout)]


@pytest.mark.browser
def test_browser_shows_checks_with_colours(driver, page):
    rows = driver.execute_script(
        "return Array.from(document.querySelectorAll('tr[data-check]')).map(function (r) {"
        "var cell = r.querySelector('td.result');"
        "return [r.dataset.passed, cell.innerText, getComputedStyle(cell).backgroundColor,"
        " r.cells[0].innerText, r.cells[1].innerText, r.cells[2].innerText]; });"
    )
    expected = checks_mapping()["checks"]
    assert len(rows) == len(expected)
    for (passed, result, colour, name, part, measured), ch in zip(rows, expected, strict=True):
        assert (passed, result) == (("true", "pass") if ch["passed"] else ("false", "FAIL"))
        assert (name, part) == (ch["name"], ch["part"])
        r, g, b = (int(v) for v in re.findall(r"\d+", colour)[:3])
        assert (g > r) if ch["passed"] else (r > g + 80), colour
        if ch["unit"] != "yes/no":
            assert float(measured.split()[0]) == pytest.approx(ch["measured"], rel=1e-5)
    summary = driver.find_element("css selector", "#checks .summary").text
    assert summary == "1 of 3 checks FAILED."


@pytest.mark.browser
def test_browser_shows_three_view(driver, page):
    size = driver.execute_script(
        "var r = document.querySelector('#three-view svg #drawing-mark').getBoundingClientRect();"
        "return [r.width, r.height];"
    )
    assert size[0] > 100 and size[1] > 40


@pytest.mark.browser
def test_browser_3d_view_draws_the_parts(driver, page):
    px = driver.execute_script(PIXELS_JS)
    # the parts cover a fair share of the view, shaded (many colours), not all of it
    assert 0.01 * px["total"] < px["drawn"] < 0.9 * px["total"], px
    assert px["colours"] > 50, px
    assert (page["folder"] / "view3d.png").stat().st_size > 10_000


@pytest.mark.browser
def test_browser_checkboxes_hide_and_show_parts(driver, page):
    before = driver.execute_script(PIXELS_JS)
    boxes = driver.find_elements("css selector", "#part-toggles input[data-part]")
    assert [b.get_attribute("data-part") for b in boxes] == list(page["meshes"])
    wing = next(b for b in boxes if b.get_attribute("data-part") == "wing-left")
    wing.click()
    without_wing = driver.execute_script(PIXELS_JS)
    assert without_wing["drawn"] < before["drawn"] - 1000
    for b in boxes:
        if b.is_selected():
            b.click()
    assert driver.execute_script(PIXELS_JS)["drawn"] == 0  # nothing left to draw
    for b in boxes:
        b.click()
    assert driver.execute_script(PIXELS_JS) == before
    assert severe(driver.get_log("browser")) == []


@pytest.mark.browser
def test_browser_mouse_turns_and_zooms(driver, page):
    from selenium.webdriver.common.action_chains import ActionChains
    from selenium.webdriver.common.actions.wheel_input import ScrollOrigin

    driver.execute_script("document.getElementById('view3d').scrollIntoView()")
    canvas = driver.find_element("css selector", "#view3d canvas")
    home = driver.execute_script(PIXELS_JS)
    ActionChains(driver).move_to_element(canvas).click_and_hold().move_by_offset(
        120, 40
    ).release().perform()
    turned = driver.execute_script(PIXELS_JS)
    assert turned["sum"] != home["sum"]
    driver.find_element("id", "view-reset").click()
    assert driver.execute_script(PIXELS_JS) == home
    for _ in range(6):  # each wheel event moves the camera by a fixed step
        ActionChains(driver).scroll_from_origin(
            ScrollOrigin.from_element(canvas), 0, -100
        ).perform()
    zoomed = driver.execute_script(PIXELS_JS)
    assert zoomed["drawn"] > 1.3 * home["drawn"]
    driver.find_element("id", "view-reset").click()
    assert severe(driver.get_log("browser")) == []
