"""Corner points and hinge lines: plan-view geometry checked with the shoelace formula and
with the definitions of the hinge kinds."""

import math

import numpy as np
import pytest
from designs import demo_document, make_design, trapezoid_document

from geomgen.geometry.layout import lay_out, place
from geomgen.sizing.aircraft import size


def shoelace(points) -> float:
    """Area of a simple polygon from its vertices (Gauss's area formula)."""
    p = np.asarray(points, dtype=float)
    x, y = p[:, 0], p[:, 1]
    return 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


@pytest.fixture(scope="module")
def flat_layout():
    """Trapezoidal wing, no incidence/twist/dihedral: plan view is exact."""
    doc = trapezoid_document(sweep="10 deg", sweep_at=0.0)
    doc["horizontal_tail"]["incidence"] = "0 deg"
    return lay_out(size(make_design(doc)))


@pytest.fixture(scope="module")
def demo_layout():
    return lay_out(size(make_design(demo_document())))


def test_plan_area_of_corner_points_equals_sized_area(flat_layout):
    for key in ("wing", "horizontal_tail"):
        sl = flat_layout.surface(key)
        for side in ("right", "left"):
            area = sum(
                shoelace([(p[0], p[1]) for p in (c.le_inner, c.te_inner, c.te_outer, c.le_outer)])
                for c in sl.corners
                if c.side == side
            )
            assert area == pytest.approx(sl.sizing.planform.area / 2, rel=1e-12)
    fin = flat_layout.surface("vertical_tail")
    side_view = sum(
        shoelace([(p[0], p[2]) for p in (c.le_inner, c.te_inner, c.te_outer, c.le_outer)])
        for c in fin.corners
    )
    assert side_view == pytest.approx(fin.sizing.planform.area, rel=1e-12)


def test_incidence_turns_sections_about_the_twist_axis(demo_layout):
    # A section turned nose up by i about the quarter chord: the LE rises by c/4 sin i and the
    # TE drops by 3c/4 sin i; the chord line's plan length shrinks to c cos i.
    sl = demo_layout.surface("wing")
    root = next(c for c in sl.corners if c.side == "right" and c.panel == 0)
    chord = sl.sizing.planform.root_chord
    i = math.radians(2.0)
    assert root.le_inner[2] - sl.sizing.apex_z == pytest.approx(0.25 * chord * math.sin(i))
    assert root.te_inner[2] - sl.sizing.apex_z == pytest.approx(-0.75 * chord * math.sin(i))
    assert root.te_inner[0] - root.le_inner[0] == pytest.approx(chord * math.cos(i))


def test_left_side_mirrors_the_right(demo_layout):
    for sl in demo_layout.surfaces:
        right = [c for c in sl.corners if c.side == "right"]
        left = [c for c in sl.corners if c.side == "left"]
        for r, lf in zip(right, left, strict=True):
            for a, b in ((r.le_inner, lf.le_inner), (r.te_outer, lf.te_outer)):
                assert (a[0], -a[1], a[2]) == pytest.approx(b, abs=1e-15)


def test_dihedral_raises_the_tip():
    doc = trapezoid_document()
    doc["wing"]["dihedral"] = "4 deg"
    sl = lay_out(size(make_design(doc))).surface("wing")
    tip = next(c for c in sl.corners if c.side == "left")
    semi = sl.sizing.planform.semi_span
    # tan(dihedral) = rise / semi-span: plan-view dihedral angle, sections kept vertical
    assert tip.le_outer[2] - sl.sizing.apex_z == pytest.approx(semi * math.tan(math.radians(4)))
    assert tip.te_outer[2] == pytest.approx(tip.le_outer[2])


def test_washout_cancelling_incidence_levels_the_tip_chord(demo_layout):
    sl = demo_layout.surface("wing")
    tip = next(c for c in sl.corners if c.side == "right" and c.panel == 1)
    # root incidence +2 deg, twist -2 deg: the tip chord line is level
    assert tip.le_outer[2] == pytest.approx(tip.te_outer[2], abs=1e-12)


def test_constant_fraction_hinge_sits_at_its_fraction(flat_layout):
    doc = trapezoid_document()
    doc["wing"]["controls"]["flap"]["span_start"] = 0.1
    layout = lay_out(size(make_design(doc)))
    sl = layout.surface("wing")
    flap = next(c for c in sl.controls if c.name == "flap-right")
    pf = sl.sizing.planform
    for h in flap.hinge:
        x_le, chord, _, _ = pf.at(h.s)
        assert h.point[0] - sl.sizing.apex_x == pytest.approx(x_le + 0.74 * chord, abs=1e-12)
        assert h.point[1] == pytest.approx(h.s)
    # projected flap area from the polygon hinge line + trailing edge (shoelace)
    s0, s1 = flap.s_start, flap.s_end
    poly = [
        (flap.hinge[0].point[0], s0),
        (sl.sizing.apex_x + pf.at(s0)[0] + pf.at(s0)[1], s0),
        (sl.sizing.apex_x + pf.at(s1)[0] + pf.at(s1)[1], s1),
        (flap.hinge[-1].point[0], s1),
    ]
    assert flap.area == pytest.approx(shoelace(poly), rel=1e-12)


def test_straight_aileron_hinge_fractions_at_its_ends(demo_layout):
    sl = demo_layout.surface("wing")
    ail = next(c for c in sl.controls if c.name == "aileron-right")
    assert ail.hinge[0].chord_fraction == pytest.approx(0.75)
    assert ail.hinge[-1].chord_fraction == pytest.approx(0.72)
    semi = sl.sizing.planform.semi_span
    assert (ail.s_start, ail.s_end) == pytest.approx((0.47 * semi, 0.94 * semi))
    # flap given by a length "0.55 m" from the plane of symmetry
    flap = next(c for c in sl.controls if c.name == "flap-left")
    assert flap.s_start == pytest.approx(0.55)
    assert flap.hinge[0].point[1] == pytest.approx(-0.55)


def test_common_elevator_hinge_is_perpendicular_to_the_plane_of_symmetry(demo_layout):
    sl = demo_layout.surface("horizontal_tail")
    right = next(c for c in sl.controls if c.name == "elevator-right")
    left = next(c for c in sl.controls if c.name == "elevator-left")
    xs = [h.point[0] for c in (right, left) for h in c.hinge]
    assert max(xs) - min(xs) < 1e-9  # one x along both halves: a line parallel to y
    pf = sl.sizing.planform
    # local fraction at the outer end follows from the geometry of the tapered, swept tail
    x_le, chord, _, _ = pf.at(right.s_end)
    x_le0, chord0, _, _ = pf.at(right.s_start)
    x_h = x_le0 + 0.62 * chord0  # hinge_at 0.62 applies at the inner end
    expected = (x_h - x_le) / chord
    assert right.hinge[-1].chord_fraction == pytest.approx(expected, rel=1e-12)
    assert expected > 0.62  # LE sweeps back faster than the hinge: the fraction grows
    cmp_ = sl.hinge_comparison
    assert cmp_.common_area == pytest.approx(2 * right.area)
    assert cmp_.separate_chord_fraction == 0.62
    # the separate hinges at 0.62 everywhere cut a larger elevator than the common line
    assert cmp_.separate_area > cmp_.common_area
    assert cmp_.common_fraction_of_tail == pytest.approx(cmp_.common_area / pf.area)


def test_hinge_points_lie_on_the_mean_line(demo_layout):
    # A NACA 00xx section is symmetric: its mean line is the chord line, so the hinge point of
    # the rudder must lie in the fin's plane (y = 0) when the fin has no incidence.
    fin = demo_layout.surface("vertical_tail")
    rudder = fin.controls[0]
    assert rudder.name == "rudder"
    for h in rudder.hinge:
        assert h.point[1] == pytest.approx(0.0, abs=1e-12)
    # the cambered wing section: the hinge sits on the mean line, above the chord line by
    # the NACA 4-digit camber y_c = m/(1-p)^2 (1 - 2p + 2p x - x^2) for x >= p (NACA Report
    # 460): NACA 24xx at x = 0.74 gives 0.02/0.36 x (0.2 + 0.592 - 0.5476) = 0.013578 c
    wing = demo_layout.surface("wing")
    flap = next(c for c in wing.controls if c.name == "flap-right")
    h = flap.hinge[0]
    on_chord = place(wing.sizing, "right", h.s, np.array([[0.74, 0.0]]))[0]
    chord = wing.sizing.planform.at(h.s)[1]
    offset = math.dist(h.point, on_chord) / chord
    assert offset == pytest.approx(0.013578, abs=3e-4)
    assert h.point[2] > on_chord[2]
