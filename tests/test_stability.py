"""Static stability: lift-curve slopes, downwash gradient, neutral point and static margins.

Each check is against something outside geomgen: a limit of aerodynamic theory named beside it,
another published form of the same equation, or a number worked by hand (the working in the
comment). No textbook worked neutral-point example is reproduced: the neutral point is checked
against a hand calculation of the standard equation instead.
"""

from __future__ import annotations

import math

import pytest
from designs import demo_document, make_design

from geomgen.design.fields import FieldError
from geomgen.design.requirements import CG
from geomgen.sizing.aircraft import size
from geomgen.sizing.stability import (
    cg_margin,
    downwash_gradient,
    helmbold_slope,
    neutral_point_x,
)

TWO_PI = 2.0 * math.pi


# --- lift-curve slope ------------------------------------------------------------------------


def test_infinite_wing_has_the_section_slope() -> None:
    # a wing of infinite aspect ratio is the section itself: a -> a0 (thin-airfoil 2 pi)
    assert helmbold_slope(1e7) == pytest.approx(TWO_PI, rel=1e-6)
    assert helmbold_slope(1e7, section_slope=5.9) == pytest.approx(5.9, rel=1e-6)


def test_slender_wing_limit_is_jones() -> None:
    # R. T. Jones, NACA Report 835 (1946): a slender wing has C_L_alpha = pi A / 2
    for a in (1e-3, 1e-4):
        assert helmbold_slope(a) == pytest.approx(math.pi * a / 2, rel=2 * a)


@pytest.mark.parametrize("aspect", [0.5, 2.0, 6.0, 10.0, 30.0])
@pytest.mark.parametrize("a0", [5.7, TWO_PI])
def test_matches_helmbolds_original_form(aspect: float, a0: float) -> None:
    # Helmbold (1942) as usually printed for an unswept wing in incompressible flow:
    # a = a0 A / (sqrt(A^2 + (a0/pi)^2) + a0/pi)
    k = a0 / math.pi
    expected = a0 * aspect / (math.sqrt(aspect**2 + k**2) + k)
    assert helmbold_slope(aspect, section_slope=a0) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("aspect", [20.0, 50.0, 200.0])
def test_high_aspect_ratio_tends_to_elliptic_lifting_line(aspect: float) -> None:
    # Prandtl's lifting-line result for the elliptic wing: a = a0 / (1 + a0 / (pi A)); the
    # Helmbold equation agrees with it to first order in 1/A, so the gap is O(1/A^2)
    lifting_line = TWO_PI / (1 + TWO_PI / (math.pi * aspect))
    gap = abs(helmbold_slope(aspect) / lifting_line - 1)
    assert gap < (2.0 / aspect) ** 2


def test_hand_value_at_aspect_ratio_six() -> None:
    # by hand: 2 pi 6 / (2 + sqrt(36 + 4)) = 37.69911 / 8.32456 = 4.52866 per rad
    assert helmbold_slope(6.0) == pytest.approx(4.52866, abs=1e-5)


def test_prandtl_glauert_on_the_infinite_wing() -> None:
    # Prandtl-Glauert: a section's slope grows as 1 / sqrt(1 - M^2)
    for mach in (0.3, 0.5, 0.7):
        ratio = helmbold_slope(1e7, mach=mach) / helmbold_slope(1e7)
        assert ratio == pytest.approx(1 / math.sqrt(1 - mach**2), rel=1e-6)


def test_simple_sweep_theory_on_the_infinite_wing() -> None:
    # simple sweep theory: a swept infinite wing has a0 cos(sweep)
    for deg in (15.0, 30.0, 45.0):
        sweep = math.radians(deg)
        assert helmbold_slope(1e7, half_chord_sweep=sweep) == pytest.approx(
            TWO_PI * math.cos(sweep), rel=1e-6
        )


def test_mach_one_is_refused() -> None:
    with pytest.raises(ValueError, match="Mach"):
        helmbold_slope(6.0, mach=1.0)


# --- downwash gradient ------------------------------------------------------------------------


def test_downwash_gradient_at_a_hand_point() -> None:
    # USAF DATCOM Sec. 4.4.1 (formula given from memory, see geomgen.sizing.stability), worked by
    # hand for A = 8, taper 0.5, no sweep, b = 10 m, l_H = 4 m, h_H = 1 m:
    #   K_A = 1/8 - 1/(1 + 8^1.7) = 0.125 - 1/35.2968 = 0.096669
    #   K_lambda = (10 - 1.5) / 7 = 1.214286
    #   K_H = (1 - 0.1) / 0.8^(1/3) = 0.9 / 0.928318 = 0.969496
    #   4.44 (K_A K_lambda K_H)^1.19 = 4.44 * 0.113803^1.19 = 4.44 * 0.075305 = 0.33435
    assert downwash_gradient(8.0, 0.5, 0.0, 10.0, 4.0, 1.0) == pytest.approx(0.33435, abs=5e-5)


def test_downwash_falls_with_tail_height_and_arm() -> None:
    base = downwash_gradient(8.0, 0.5, 0.0, 10.0, 4.0, 0.0)
    assert downwash_gradient(8.0, 0.5, 0.0, 10.0, 4.0, 1.0) < base
    assert downwash_gradient(8.0, 0.5, 0.0, 10.0, 6.0, 0.0) < base
    # a tail below the wing is taken like one above it
    assert downwash_gradient(8.0, 0.5, 0.0, 10.0, 4.0, -1.0) == downwash_gradient(
        8.0, 0.5, 0.0, 10.0, 4.0, 1.0
    )


# --- neutral point ----------------------------------------------------------------------------


def test_neutral_point_hand_calculation() -> None:
    # a = 4.8, a_t = 4.0 /rad, S_t/S = 0.2, eta = 0.9, d eps/d alpha = 0.35, wing ac at
    # x = 2 m, tail ac at x = 6 m, MGC 1.2 m. By hand: k = 0.9 * 0.2 * 4.0 * 0.65 = 0.468;
    # x_np = (4.8 * 2 + 0.468 * 6) / (4.8 + 0.468) = 12.408 / 5.268 = 2.355353 m
    x = neutral_point_x(2.0, 6.0, 4.8, 4.0, 0.2, 0.35, 0.9)
    assert x == pytest.approx(2.355353, abs=1e-6)
    # the standard equation h_n = h_0 + eta V_H (a_t/a)(1 - d eps/d alpha), its tail volume
    # taken on the arm from the neutral point (e.g. Etkin and Reid, Dynamics of Flight, 2.3)
    c = 1.2
    v_h = 0.2 * (6.0 - x) / c
    h_n = 2.0 / c + 0.9 * v_h * (4.0 / 4.8) * (1 - 0.35)
    assert x / c == pytest.approx(h_n, rel=1e-12)


def test_static_margin_definition() -> None:
    # static margin = (x_np - x_cg) / c: a CG 0.12 m ahead of the NP on a 1.2 m MGC is 10 %
    m = cg_margin("aft", 2.0, 2.12, 1.7, 1.2)
    assert m.static_margin == pytest.approx(0.10, abs=1e-12)
    assert m.fraction_mgc == pytest.approx(0.25, abs=1e-12)


# --- on the demo ------------------------------------------------------------------------------


def _stability(mutate=None):
    doc = demo_document()
    if mutate is not None:
        mutate(doc)
    return size(make_design(doc)).stability


def test_demo_has_its_neutral_point_and_margins() -> None:
    s = _stability()
    assert s is not None
    assert [m.label for m in s.cg] == ["forward", "aft"]
    # the demo gives its CG limits as fractions of the MGC: they come back as written
    assert [m.fraction_mgc for m in s.cg] == pytest.approx([0.20, 0.30], abs=1e-12)
    # static margin and NP fraction measure one distance: h_n - h_cg
    for m in s.cg:
        assert m.static_margin == pytest.approx(s.neutral_point_fraction - m.fraction_mgc)
    # the tail volume the neutral point uses is the one the tail was sized for
    assert s.tail_volume_coefficient == pytest.approx(0.62, rel=1e-9)
    assert s.cg[1].static_margin > 0  # stable at the aft limit


def test_cg_as_an_x_station() -> None:
    def put(doc):
        doc["requirements"]["cg"] = "2.0 m"

    s = _stability(put)
    assert s is not None and len(s.cg) == 1
    assert s.cg[0].label == "given" and s.cg[0].x == pytest.approx(2.0, abs=1e-12)
    assert s.cg[0].static_margin == pytest.approx((s.neutral_point_x - 2.0) / s.mgc)


def test_margin_grows_with_tail_volume() -> None:
    margins = []
    for v in (0.45, 0.62, 0.8):

        def put(doc, v=v):
            doc["horizontal_tail"]["volume_coefficient"] = v

        margins.append(_stability(put).cg[1].static_margin)
    assert margins[0] < margins[1] < margins[2]


def test_margin_grows_with_tail_arm_at_a_fixed_tail_area_ratio() -> None:
    # at a fixed volume coefficient a longer arm means a smaller tail; to see the arm alone,
    # scale the volume coefficient with the arm so S_H stays the same
    margins = []
    for arm in (3.5, 4.0, 4.5):

        def put(doc, arm=arm):
            doc["horizontal_tail"]["tail_arm"] = f"{arm} m"
            doc["horizontal_tail"]["volume_coefficient"] = 0.62 * arm / 4.0
            doc["fuselage"]["end_behind_tails"] = "50 mm"

        s = _stability(put)
        margins.append(s.cg[1].static_margin)
    assert margins[0] < margins[1] < margins[2]


def test_margin_falls_as_the_cg_moves_aft() -> None:
    margins = []
    for cg in (0.15, 0.25, 0.35):

        def put(doc, cg=cg):
            doc["requirements"]["cg"] = cg

        margins.append(_stability(put).cg[0].static_margin)
    assert margins[0] > margins[1] > margins[2]
    # linear in the CG: 10 % MGC aft takes 10 % off the margin
    assert margins[0] - margins[1] == pytest.approx(0.10, abs=1e-12)


def test_tail_dynamic_pressure_ratio_moves_the_neutral_point() -> None:
    def put(eta):
        def mutate(doc):
            doc["requirements"]["tail_dynamic_pressure_ratio"] = eta

        return mutate

    assert _stability(put(0.8)).neutral_point_x < _stability(put(1.0)).neutral_point_x


def test_cg_key_forms() -> None:
    # bare number = fraction of the MGC, a length = an x station, or forward/aft
    assert CG.parse(0.28, "requirements.cg") == (0, (0, 0.28))
    assert CG.parse("2.05 m", "requirements.cg") == (0, (1, 2.05))
    parsed = CG.parse({"forward": 0.2, "aft": "2.1 m"}, "requirements.cg")
    assert parsed == (1, {"forward": (0, 0.2), "aft": (1, 2.1)})
    with pytest.raises(FieldError, match="requirements.cg"):
        CG.parse(True, "requirements.cg")
