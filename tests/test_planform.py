"""Planform formulas against Raymer and against independent numerical integration."""

import math

import numpy as np
import pytest

from geomgen.sizing.planform import PanelInput, build_planform, convert_sweep

DEG = math.pi / 180


def trapezoid(area=12.0, ar=8.0, taper=0.5, sweep=0.0, sweep_at=0.25, symmetric=True):
    return build_planform(
        "wing",
        area=area,
        aspect_ratio=ar,
        panels=(PanelInput(1.0, taper, sweep, sweep_at, 0.0, None, None),),
        symmetric=symmetric,
        root_airfoil="naca0012",
        tip_airfoil="naca0012",
        twist=0.0,
    )


def test_trapezoid_against_raymer_chapter_7():
    # Raymer, Aircraft Design: A Conceptual Approach, ch. 7 (trapezoidal wing geometry):
    # b = sqrt(AR S); c_r = 2 S / (b (1 + l)); MGC = 2/3 c_r (1 + l + l^2)/(1 + l);
    # y_MGC = b/6 (1 + 2 l)/(1 + l).
    # Worked by hand for S = 12 m^2, AR = 8, taper l = 0.5:
    #   b = sqrt(96) = 9.797959 m; c_r = 24 / (9.797959 x 1.5) = 1.632993 m; c_t = 0.816497 m
    #   MGC = 2/3 x 1.632993 x 1.75 / 1.5 = 1.270106 m; y_MGC = 9.797959/6 x 2/1.5 = 2.177324 m
    p = trapezoid()
    assert p.span == pytest.approx(9.797959, abs=1e-6)
    assert p.root_chord == pytest.approx(1.632993, abs=1e-6)
    assert p.tip_chord == pytest.approx(0.816497, abs=1e-6)
    assert p.mgc == pytest.approx(1.270106, abs=1e-6)
    assert p.mgc_s == pytest.approx(2.177324, abs=1e-6)
    assert p.taper_ratio == pytest.approx(0.5)


@pytest.mark.parametrize("taper", [0.3, 0.62, 1.0, 1.2])
@pytest.mark.parametrize("ar", [4.6, 7.8, 12.0])
def test_trapezoid_formulas_over_a_range(taper, ar):
    # Raymer ch. 7, same formulas as above, over a spread of aspect and taper ratios.
    s = 11.0
    p = trapezoid(area=s, ar=ar, taper=taper)
    b = math.sqrt(ar * s)
    cr = 2 * s / (b * (1 + taper))
    assert p.root_chord == pytest.approx(cr, rel=1e-12)
    assert p.mgc == pytest.approx(2 / 3 * cr * (1 + taper + taper**2) / (1 + taper), rel=1e-12)
    assert p.mgc_s == pytest.approx(b / 6 * (1 + 2 * taper) / (1 + taper), rel=1e-12)


def _dense_integrals(p, n=200001):
    """Independent numerical integration over a dense grid of the piecewise-linear chord
    through the planform's stations: area, MGC = (1/S_side) int c^2 ds, spanwise position."""
    s_st = np.array([st.s for st in p.stations])
    c_st = np.array([st.chord for st in p.stations])
    x_st = np.array([st.x_le for st in p.stations])
    s = np.linspace(0.0, s_st[-1], n)
    c = np.interp(s, s_st, c_st)
    x = np.interp(s, s_st, x_st)
    side = np.trapezoid(c, s)
    return (
        side,
        np.trapezoid(c**2, s) / side,
        np.trapezoid(c * s, s) / side,
        np.trapezoid(c * x, s) / side,
    )


def cranked():
    # constant-chord centre panel, tapered and swept outer panel, then a short tip panel
    return build_planform(
        "wing",
        area=14.0,
        aspect_ratio=9.0,
        panels=(
            PanelInput(0.4, 1.0, 0.0, 0.25, 2 * DEG, None, None),
            PanelInput(0.85, 0.6, 8 * DEG, 0.25, 4 * DEG, None, None),
            PanelInput(1.0, 0.35, 20 * DEG, 0.0, 6 * DEG, None, None),
        ),
        symmetric=True,
        root_airfoil="naca2415",
        tip_airfoil="naca2412",
        twist=-2 * DEG,
    )


@pytest.mark.parametrize("make", [trapezoid, cranked], ids=["trapezoid", "cranked"])
def test_mgc_against_numerical_integration(make):
    # MGC = (2/S) int_0^{b/2} c(y)^2 dy (definition of the mean geometric chord, Raymer ch. 7),
    # checked by dense trapezoid-rule integration, independent of the exact panel integrals.
    p = make()
    side, mgc, mgc_s, mgc_x = _dense_integrals(p)
    assert side == pytest.approx(p.area / 2, rel=1e-9)
    assert p.mgc == pytest.approx(mgc, rel=1e-8)
    assert p.mgc_s == pytest.approx(mgc_s, rel=1e-8)
    assert p.mgc_x_le == pytest.approx(mgc_x, rel=1e-7, abs=1e-9)


def test_cranked_wing_panel_geometry():
    p = cranked()
    b = math.sqrt(9.0 * 14.0)
    assert p.span == pytest.approx(b)
    assert [st.s for st in p.stations] == pytest.approx([0, 0.4 * b / 2, 0.85 * b / 2, b / 2])
    # the outer panel's quarter-chord line is swept 8 deg: measure it from the stations
    assert p.sweep(0.25, panel=1) == pytest.approx(8 * DEG, abs=1e-12)
    assert p.sweep(0.0, panel=2) == pytest.approx(20 * DEG, abs=1e-12)
    # dihedral rise accumulates panel by panel
    rise = [st.rise for st in p.stations]
    assert rise[1] == pytest.approx(0.4 * b / 2 * math.tan(2 * DEG))
    assert rise[3] - rise[2] == pytest.approx(0.15 * b / 2 * math.tan(6 * DEG))
    # twist linear in span fraction up to -2 deg at the tip
    assert p.stations[-1].twist == pytest.approx(-2 * DEG)
    assert p.stations[1].twist == pytest.approx(-0.8 * DEG)


@pytest.mark.parametrize("symmetric", [True, False], ids=["wing", "fin"])
@pytest.mark.parametrize(("n", "m"), [(0.25, 0.0), (0.0, 1.0), (0.25, 0.7), (0.5, 0.25)])
def test_sweep_conversion_matches_the_geometry_and_round_trips(symmetric, n, m):
    # Raymer ch. 7: tan L_m = tan L_n - 4 (m - n)(1 - l) / (AR (1 + l)) for a wing with AR on
    # the full span; the one-sided fin (AR = h^2/S) has 2 in place of 4 (same geometry, half
    # the span in the definition).
    ar, taper, sweep = 5.0, 0.45, 15 * DEG
    p = trapezoid(ar=ar, taper=taper, sweep=sweep, sweep_at=n, symmetric=symmetric)
    converted = convert_sweep(sweep, n, m, ar, taper, symmetric=symmetric)
    assert p.sweep(m) == pytest.approx(converted, abs=1e-12)  # measured on the stations
    back = convert_sweep(converted, m, n, ar, taper, symmetric=symmetric)
    assert back == pytest.approx(sweep, abs=1e-12)


def test_at_interpolates_within_panels():
    p = cranked()
    s_mid = 0.5 * (p.stations[1].s + p.stations[2].s)
    x_le, chord, _, _ = p.at(s_mid)
    assert chord == pytest.approx(0.5 * (p.stations[1].chord + p.stations[2].chord))
    assert x_le == pytest.approx(0.5 * (p.stations[1].x_le + p.stations[2].x_le))
