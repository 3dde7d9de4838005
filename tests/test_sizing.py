"""Sizing against the lift equation, tail-volume relations and the minimum-wetted-area rule."""

import math

import pytest
from designs import make_design, trapezoid_document

from geomgen.sizing.aircraft import optimum_tail_arm, size, stall_wing_area, wetted_area
from geomgen.sizing.atmosphere import isa


def sea_level_doc(**wing):
    doc = trapezoid_document(area="from_stall", **wing)
    doc["requirements"] = {
        "gross_weight": "700 kg",
        "stall_speed": "50 kn",
        "altitude": "0 m",
        "cl_max": 1.6,
    }
    return doc


def test_wing_area_from_the_lift_equation_worked_by_hand():
    # Lift equation at the stall, W = 1/2 rho V^2 S C_Lmax (any aerodynamics text; Raymer
    # ch. 5). Worked by hand: W = 700 kg x 9.80665 m/s^2 = 6864.655 N;
    # V = 50 kn = 50 x 1852/3600 = 25.72222 m/s; rho = 1.225 kg/m^3 (ISA sea level, ICAO
    # Doc 7488); q = 0.5 x 1.225 x 25.72222^2 = 405.2500 Pa; S = 6864.655/(405.25 x 1.6)
    # = 10.58707 m^2.
    sz = size(make_design(sea_level_doc()))
    assert sz.stall.weight == pytest.approx(6864.655, abs=1e-6)
    assert sz.stall.dynamic_pressure == pytest.approx(405.2500, abs=1e-4)
    assert sz.wing.planform.area == pytest.approx(10.58707, abs=1e-5)
    assert sz.stall.stall_speed_achieved == pytest.approx(50 * 1852 / 3600, rel=1e-12)


def test_altitude_lowers_density_and_raises_area():
    doc = sea_level_doc()
    doc["requirements"]["altitude"] = "8000 ft"
    sz = size(make_design(doc))
    rho = isa(8000 * 0.3048, "geometric").density
    # U.S. Standard Atmosphere 1976 table, 8000 ft: sigma ~ 0.7860 (from memory)
    assert rho / 1.225 == pytest.approx(0.7860, abs=5e-4)
    assert sz.wing.planform.area == pytest.approx(10.58707 * 1.225 / rho, rel=1e-5)


def test_given_area_reports_the_stall_speed_it_gives():
    doc = sea_level_doc()
    doc["wing"]["area"] = "12 m^2"
    sz = size(make_design(doc))
    # V_s = sqrt(2 W / (rho S C_Lmax)) -- lift equation solved for V
    v = math.sqrt(2 * 6864.655 / (1.225 * 12.0 * 1.6))
    assert sz.stall.stall_speed_achieved == pytest.approx(v, rel=1e-7)  # ISA rho to 1e-7
    assert sz.stall.area_from_stall is False
    assert stall_wing_area(6864.655, 1.225, v, 1.6) == pytest.approx(12.0, rel=1e-12)


def fixed_arm_doc(arm_h="4.2 m", arm_v="4.0 m"):
    doc = sea_level_doc()
    doc["horizontal_tail"]["tail_arm"] = arm_h
    doc["vertical_tail"]["tail_arm"] = arm_v
    doc.pop("tail_cone")
    return doc


def test_tail_volume_relations_and_arms_between_quarter_chords():
    # V_H = S_H l_H / (S c_MGC) and V_V = S_V l_V / (S b) (Raymer ch. 6, eqs. for tail volume
    # coefficients); arms between the MGC quarter-chord points (common practice).
    sz = size(make_design(fixed_arm_doc()))
    w = sz.wing.planform
    ht, vt = sz.horizontal_tail, sz.vertical_tail
    assert ht.planform.area * 4.2 / (w.area * w.mgc) == pytest.approx(0.62, rel=1e-12)
    assert vt.planform.area * 4.0 / (w.area * w.span) == pytest.approx(0.042, rel=1e-12)

    # quarter-chord points of the MGCs, from Raymer's trapezoid formulas (independent of the
    # code's panel integrals): x = apex + x_le(y_MGC) + c_MGC/4
    def qc_x(surface, taper, ar, half_span_factor):
        p = surface.planform
        b_side = p.semi_span
        y = b_side / 3 * (1 + 2 * taper) / (1 + taper)
        x_le = y * math.tan(p.sweep(0.0))
        mgc = 2 / 3 * p.root_chord * (1 + taper + taper**2) / (1 + taper)
        return surface.apex_x + x_le + mgc / 4

    x_w = qc_x(sz.wing, 0.5, 8.0, 2)
    assert qc_x(ht, 0.65, 4.6, 2) - x_w == pytest.approx(4.2, abs=1e-9)
    assert qc_x(vt, 0.55, 1.5, 1) - x_w == pytest.approx(4.0, abs=1e-9)


def test_vertical_tail_is_one_sided():
    # For the one-sided fin AR = h^2 / S_V (common practice; Raymer ch. 4 uses the same).
    sz = size(make_design(fixed_arm_doc()))
    vt = sz.vertical_tail.planform
    assert vt.span**2 / vt.area == pytest.approx(1.5, rel=1e-12)
    assert vt.semi_span == vt.span


def test_optimum_tail_arm_is_a_minimum_of_the_wetted_area():
    # Cone wetted area ~ pi (R1 + R2) l (lateral area of a frustum of slant ~ l) plus tail
    # wetted area ~ 2 S (V_H c + V_V b) / l; d/dl = pi (R1+R2) - 2 S (...)/l^2 = 0 gives
    # l* = sqrt(2 S (V_H c + V_V b) / (pi (R1 + R2))). Derived here; checked numerically.
    sz = size(make_design(sea_level_doc()))
    w = sz.wing.planform
    terms = 0.62 * w.mgc + 0.042 * w.span
    r1, r2 = 0.45, 0.1
    arm = optimum_tail_arm(w.area, terms, r1, r2)
    assert sz.horizontal_tail.tail_arm == pytest.approx(arm)
    assert sz.vertical_tail.tail_arm == pytest.approx(arm)

    def total(length):
        return math.pi * (r1 + r2) * length + 2 * w.area * terms / length

    h = 1e-4 * arm
    assert (total(arm) - total(arm - h)) < 0 < (total(arm + h) - total(arm))  # slope sign change
    for k in (0.8, 0.95, 1.05, 1.25):
        assert total(k * arm) > total(arm)

    # and the same with the tails actually sized at neighbouring fixed arms
    def sized_total(length):
        s = size(make_design(fixed_arm_doc(f"{length} m", f"{length} m")))
        tails = s.horizontal_tail.planform.area + s.vertical_tail.planform.area
        return math.pi * (r1 + r2) * length + 2 * tails

    at_opt = sized_total(arm)
    assert at_opt == pytest.approx(total(arm), rel=1e-9)
    assert sized_total(0.9 * arm) > at_opt < sized_total(1.1 * arm)


@pytest.mark.parametrize(("tc", "factor"), [(0.12, 1.977 + 0.52 * 0.12), (0.04, 2.003)])
def test_wetted_area_estimate_raymer(tc, factor):
    # Raymer ch. 7: S_wet = S_exposed (1.977 + 0.52 t/c) for t/c > 0.05, else 2.003 S_exposed.
    assert wetted_area(10.0, tc) == pytest.approx(10.0 * factor, rel=1e-12)


def test_demo_sizes_consistently(demo_path):
    from geomgen import design

    sz = size(design.load(demo_path))
    # tail arms equal for both tails at the shared optimum, and both tails behind the wing
    assert sz.horizontal_tail.tail_arm == pytest.approx(sz.vertical_tail.tail_arm)
    assert sz.horizontal_tail.apex_x > sz.wing.apex_x + sz.wing.planform.root_chord
    # t/c from the sections: NACA 2415 root and 2412 tip average to 0.135 (NACA 4-digit naming)
    assert sz.wing.thickness_ratio == pytest.approx(0.135, abs=2e-4)
