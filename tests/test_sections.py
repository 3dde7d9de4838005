"""Sections placed in the aircraft frame, before any CAD: areas and volume against the NACA
thickness integral, planes and edges against the planform, trailing-edge thickening."""

from __future__ import annotations

import math

import numpy as np
import pytest
from designs import PROFILES, demo_document, make_design, trapezoid_document

from geomgen.geometry.layout import lay_out
from geomgen.geometry.sections import surface_sections, volume_from_sections
from geomgen.sizing.aircraft import size

#: NACA 4-digit thickness form, open trailing edge (NACA Report 460, Jacobs, Ward & Pinkerton
#: 1933; Abbott & von Doenhoff, Theory of Wing Sections, 1959, section 6.4)
NACA_THICKNESS = (0.2969, -0.1260, -0.3516, 0.2843, -0.1015)

AREA, ASPECT_RATIO, TAPER = 1.5, 6.0, 0.5  # m^2, -, - (an invented plain wing)
SWEEP_QUARTER = math.radians(15.0)


def naca_area_per_thickness() -> float:
    """Integral over the unit chord of 2 y_t dx, divided by t, term by term:
    10 (a0 2/3 + a1/2 + a2/3 + a3/4 + a4/5) = 0.68508 (NACA Report 460 thickness form)."""
    a0, a1, a2, a3, a4 = NACA_THICKNESS
    return 10.0 * (a0 * 2 / 3 + a1 / 2 + a2 / 3 + a3 / 4 + a4 / 5)


def plain_wing(te: str, section: str = "naca0012"):
    """(SurfaceLayout, Design) of a straight-tapered wing with no twist, dihedral or
    incidence, one section throughout, no tails or control surfaces."""
    doc = trapezoid_document(
        area=f"{AREA} m^2",
        aspect_ratio=ASPECT_RATIO,
        taper_ratio=TAPER,
        sweep="15 deg",
        sweep_at=0.25,
    )
    for key in ("horizontal_tail", "vertical_tail", "tail_cone"):
        doc.pop(key, None)
    doc["wing"].pop("controls", None)
    doc["wing"]["root_airfoil"] = doc["wing"]["tip_airfoil"] = section
    doc["solids"] = {"te_thickness": te}
    d = make_design(doc)
    return lay_out(size(d, (PROFILES,)), (PROFILES,)).surface("wing"), d


@pytest.fixture(scope="module")
def sharp():
    return plain_wing("0 mm")


def planform() -> tuple[float, float, float]:
    """(semi-span, root chord, LE sweep) of the plain wing: b = sqrt(AR S),
    c_r = 2S / (b (1 + taper)), tan L_LE = tan L_25 + (1 - taper) / (AR (1 + taper))
    (Raymer, Aircraft Design: A Conceptual Approach, ch. 7, sweep conversion with n = 1/4)."""
    b = math.sqrt(ASPECT_RATIO * AREA)
    c_root = 2 * AREA / (b * (1 + TAPER))
    tan_le = math.tan(SWEEP_QUARTER) + (1 - TAPER) / (ASPECT_RATIO * (1 + TAPER))
    return b / 2, c_root, math.atan(tan_le)


def test_section_area_is_the_naca_thickness_integral(sharp) -> None:
    sl, d = sharp
    secs = surface_sections(sl, "right", d.solids.section_points, 0.0, (PROFILES,))
    for sec in secs.sections:
        # area of a 4-digit section: 0.68508 t c^2 (NACA Report 460 form, integrated); the
        # section is a polygon through points on the true outline, so a little smaller
        # (second order in the point spacing: 61 cosine-spaced points per surface here)
        exact = naca_area_per_thickness() * 0.12 * sec.chord**2
        assert sec.area == pytest.approx(exact, rel=1e-3)
        assert sec.area <= exact


def test_volume_from_sections_is_the_closed_form(sharp) -> None:
    sl, d = sharp
    semi, c_root, _ = planform()
    # V = A t (b/2) c_r^2 (1 + taper + taper^2) / 3: the integral of A t c(y)^2 over the
    # semi-span with c linear in y (sweep only shears the sections: Cavalieri's principle)
    exact = naca_area_per_thickness() * 0.12 * semi * c_root**2 * (1 + TAPER + TAPER**2) / 3
    measured = volume_from_sections(sl.sizing, d.solids.section_points, 0.0, (PROFILES,))
    assert measured == pytest.approx(exact, rel=1e-3)


def test_sections_lie_in_streamwise_planes_at_their_stations(sharp) -> None:
    sl, d = sharp
    semi, c_root, sweep_le = planform()
    apex_x, apex_z = 1.55, 0.95  # the demo's wing apex (m), kept by trapezoid_document
    for side, sign in (("right", 1.0), ("left", -1.0)):
        secs = surface_sections(sl, side, d.solids.section_points, 0.0, (PROFILES,))
        assert [s.s for s in secs.sections] == pytest.approx([0.0, semi], rel=1e-12)
        for sec in secs.sections:
            pts = np.vstack([sec.upper, sec.lower])
            # wing sections lie in planes y = const (common practice: streamwise sections)
            assert np.abs(pts[:, 1] - sign * sec.s).max() < 1e-12
            # leading edge on the swept LE line, trailing edge one chord aft, no dihedral
            le_x = apex_x + sec.s * math.tan(sweep_le)
            assert sec.upper[0][[0, 2]] == pytest.approx([le_x, apex_z], abs=1e-9)
            te = 0.5 * (sec.upper[-1] + sec.lower[-1])
            assert te[[0, 2]] == pytest.approx([le_x + sec.chord, apex_z], abs=1e-9)
        root, tip = secs.sections
        assert root.chord == pytest.approx(c_root, rel=1e-12)
        assert tip.chord == pytest.approx(TAPER * c_root, rel=1e-12)


def test_fin_sections_lie_in_waterline_planes() -> None:
    d = make_design(demo_document())
    sl = lay_out(size(d, (PROFILES,)), (PROFILES,)).surface("vertical_tail")
    secs = surface_sections(sl, "centre", d.solids.section_points, 0.0, (PROFILES,))
    for sec in secs.sections:
        pts = np.vstack([sec.upper, sec.lower])
        # a one-sided fin: sections in planes z = apex z + s (its span is its height)
        assert np.abs(pts[:, 2] - (sl.sizing.apex_z + sec.s)).max() < 1e-12
        # symmetric sections (NACA 00xx) about the fin's plane y = 0, no incidence here
        assert np.abs(sec.upper[:, 1] + sec.lower[:, 1]).max() < 1e-12


def test_minimum_trailing_edge_thickness(sharp) -> None:
    sl, d = sharp
    thick, _ = plain_wing("2 mm")
    te = 0.002  # m, the design file's minimum trailing-edge thickness
    sharp_secs = surface_sections(sl, "right", d.solids.section_points, 0.0, (PROFILES,))
    thick_secs = surface_sections(thick, "right", d.solids.section_points, te, (PROFILES,))
    for a, b in zip(sharp_secs.sections, thick_secs.sections, strict=True):
        # the open-TE form ends 2 y_t(1) = 10 t (a0 + a1 + a2 + a3 + a4) c = 0.00252 c thick
        # for t = 0.12 (NACA Report 460 form at x = 1): under 2 mm on these chords, so the
        # minimum applies, and is met exactly
        natural = 2 * 5 * 0.12 * sum(NACA_THICKNESS) * a.chord
        assert natural < te
        assert np.linalg.norm(a.upper[-1] - a.lower[-1]) == pytest.approx(natural, rel=1e-6)
        assert np.linalg.norm(b.upper[-1] - b.lower[-1]) == pytest.approx(te, rel=1e-6)
        # only the aft chord is thickened: the front quarter is untouched
        front = a.upper[:, 0] - a.upper[0, 0] < 0.25 * a.chord
        assert np.abs(b.upper[front] - a.upper[front]).max() < 1e-12
        assert np.abs(b.lower[front] - a.lower[front]).max() < 1e-12
