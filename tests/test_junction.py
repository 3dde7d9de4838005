"""Surfaces mounted on the fuselage (pure math): body side, exposed areas, the solid's root
station, containment, refusals; and the self-check that catches a surface piercing the body."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from designs import PROFILES, demo_document, make_design, trapezoid_document

from geomgen.design import BodyStation
from geomgen.errors import InputError
from geomgen.geometry import body_side, junction
from geomgen.geometry.layout import lay_out
from geomgen.sizing.aircraft import size

R = 0.4  # m, radius of the invented cylindrical body
AXIS_Z = 1.0  # m, water line of its axis
AREA, AR = 6.0, 6.0  # m^2, - (an invented plain wing)


def cylinder(x0: float = -1.0, x1: float = 6.0) -> dict:
    """A circular cylinder with flat ends: two equal ellipse stations."""
    return {
        "stations": [
            {"x": f"{x} m", "width": f"{2 * R} m", "height": f"{2 * R} m", "z": f"{AXIS_Z} m"}
            for x in (x0, x1)
        ]
    }


def mid_wing_document(taper: float = 1.0, section: str = "naca0012") -> dict:
    """A straight, untwisted wing with no dihedral or incidence, its chord plane through the
    cylinder's axis; no tails, no control surfaces."""
    doc = trapezoid_document(area=f"{AREA} m^2", aspect_ratio=AR, taper_ratio=taper)
    for key in ("horizontal_tail", "vertical_tail", "tail_cone"):
        doc.pop(key, None)
    wing = doc["wing"]
    wing.pop("controls", None)
    wing["root_airfoil"] = wing["tip_airfoil"] = section
    wing["apex"] = {"x": "1 m", "z": f"{AXIS_Z} m"}
    doc["fuselage"] = cylinder()
    return doc


def fin(apex_z: float, **extra) -> dict:
    """An invented fin with its reference root at water line ``apex_z`` (m)."""
    return {
        "volume_coefficient": 0.04,
        "tail_arm": "3.5 m",
        "aspect_ratio": 1.5,
        "taper_ratio": 0.6,
        "root_airfoil": "naca0010",
        "apex": {"z": f"{apex_z} m"},
        **extra,
    }


def mounted(doc: dict):
    d = make_design(doc)
    dirs = (PROFILES,)
    return junction.mount(lay_out(size(d, dirs), dirs), dirs)


def test_straight_wing_on_a_cylinder_exposes_all_but_the_strip_inside() -> None:
    layout = mounted(mid_wing_document())
    j = layout.surface("wing").junction
    pf = layout.surface("wing").sizing.planform
    # the chord plane runs through the axis, so the body side is at y = R all along the chord
    assert j.side_min == pytest.approx(R, rel=2e-4)
    assert j.side_max == pytest.approx(R, rel=2e-4)
    # exposed area = reference minus the rectangle c x 2R inside the body (plane geometry)
    assert j.reference_area == pytest.approx(AREA, rel=1e-12)
    assert j.exposed_area == pytest.approx(AREA - 2 * R * pf.root_chord, rel=1e-3)
    # the skin at half-thickness h meets a circle of radius R at y = sqrt(R^2 - h^2)
    # (Pythagoras); NACA 0012's greatest half-thickness is 0.06 c (Abbott & von Doenhoff,
    # Appendix I, 6.00 % at 30 % chord, from memory of the table)
    h = 0.06 * pf.root_chord
    assert j.skin_min == pytest.approx(math.sqrt(R**2 - h**2), rel=1e-3)
    # the solid starts inside by 2 % of the root chord (the project's overlap)
    assert j.mount_s == pytest.approx(j.skin_min - 0.02 * pf.root_chord, rel=1e-9)
    assert j.root_inside


def test_tapered_wing_exposed_area_is_the_trapezoid_outboard_of_the_body() -> None:
    taper = 0.5
    layout = mounted(mid_wing_document(taper=taper))
    j = layout.surface("wing").junction
    pf = layout.surface("wing").sizing.planform
    # inside the body: a trapezoid from y = 0 to y = R on each side, chord linear in y
    # (Raymer, Aircraft Design, ch. 7: c(y) = c_r (1 - (1 - lambda) y / (b/2)))
    c_at_r = pf.root_chord * (1 - (1 - taper) * R / pf.semi_span)
    inside = 2 * R * (pf.root_chord + c_at_r) / 2
    assert j.exposed_area == pytest.approx(AREA - inside, rel=1e-3)
    # Raymer's wetted-area estimate on the exposed area (ch. 7): S_exp (1.977 + 0.52 t/c)
    # (t/c of the generated coordinates is 0.12 within 1e-4)
    assert j.exposed_wetted_area == pytest.approx(j.exposed_area * (1.977 + 0.52 * 0.12), rel=1e-5)


def test_fin_on_a_cylinder_starts_at_its_top() -> None:
    doc = mid_wing_document()
    # the fin's reference root on the body's axis
    doc["vertical_tail"] = fin(AXIS_Z, sweep="20 deg", sweep_at=0.0)
    layout = mounted(doc)
    sl = layout.surface("vertical_tail")
    j, pf = sl.junction, sl.sizing.planform
    # the chord line at y = 0 meets the circle at its top, R above the axis
    assert j.side_min == pytest.approx(R, rel=2e-4) and j.side_max == pytest.approx(R, rel=2e-4)
    # inside: the trapezoid between the reference root and height R (plane geometry)
    c_r = pf.root_chord
    c_at_r = c_r + (pf.tip_chord - c_r) * R / pf.span
    assert j.exposed_area == pytest.approx(pf.area - R * (c_r + c_at_r) / 2, rel=1e-3)
    # the skin of a section of half-thickness h meets the circle at z = sqrt(R^2 - h^2), where
    # the fin's chord is c(R)
    h = 0.05 * c_at_r  # NACA 0010: 5 % half-thickness at 30 % chord (from memory of the table)
    assert j.skin_min == pytest.approx(math.sqrt(R**2 - h**2), rel=1e-3)


def test_contains_agrees_with_the_circle() -> None:
    # inside a circle of radius R about the axis, and between the flat ends (x in [-1, 6])
    stations = (
        BodyStation(-1.0, 2 * R, 2 * R, AXIS_Z),
        BodyStation(6.0, 2 * R, 2 * R, AXIS_Z),
    )
    rng = np.random.default_rng(7)
    pts = rng.uniform([-2.0, -0.6, AXIS_Z - 0.6], [7.0, 0.6, AXIS_Z + 0.6], size=(4000, 3))
    r = np.hypot(pts[:, 1], pts[:, 2] - AXIS_Z)
    expected = (r < R) & (pts[:, 0] >= -1.0) & (pts[:, 0] <= 6.0)
    got = body_side.contains(stations, pts)
    # the 256-point polygon lies within R (1 - cos(pi/256)) = 3e-5 m of the circle
    clear = np.abs(r - R) > 1e-4
    assert np.array_equal(got[clear], expected[clear])
    assert expected.sum() > 500 and (~expected).sum() > 500


def test_a_wing_above_the_body_is_refused() -> None:
    doc = mid_wing_document()
    doc["wing"]["apex"]["z"] = f"{AXIS_Z + R + 0.2} m"  # a parasol: no joint with the body
    with pytest.raises(InputError, match="does not meet the fuselage") as err:
        mounted(doc)
    assert err.value.path == "wing.apex"


def test_a_wing_thicker_than_the_body_runs_through_it() -> None:
    # a section that stands out above and below a flat body (a wing on a cabin top): the
    # halves run through the body and join at the plane of symmetry
    doc = mid_wing_document(section="naca0024")
    doc["fuselage"] = {
        "stations": [
            {"x": f"{x} m", "width": "0.8 m", "height": "0.2 m", "z": f"{AXIS_Z} m"}
            for x in (-1.0, 6.0)
        ]
    }
    sl = mounted(doc).surface("wing")
    assert sl.mount_s == 0.0 and not sl.junction.root_inside
    # the chord line still meets the body side at its half-width, 0.4 m
    assert sl.junction.side_min == pytest.approx(0.4, rel=2e-4)


def test_a_control_surface_starting_inside_the_body_is_refused() -> None:
    doc = mid_wing_document()
    doc["wing"]["controls"] = {
        "flap": {
            "span_start": f"{R - 0.05} m",
            "span_end": 0.5,
            "hinge": "constant_fraction",
            "hinge_at": 0.75,
        }
    }
    with pytest.raises(InputError, match="starts inside the fuselage") as err:
        mounted(doc)
    assert err.value.path == "wing.controls.flap.span_start"
    doc["wing"]["controls"]["flap"]["span_start"] = f"{R + 0.01} m"
    assert mounted(doc).surface("wing").junction is not None


def test_a_fin_far_above_the_body_is_refused() -> None:
    doc = mid_wing_document()
    doc["vertical_tail"] = fin(AXIS_Z + R + 1.0)
    with pytest.raises(InputError) as err:
        mounted(doc)
    assert err.value.path.startswith("vertical_tail.apex")


def test_a_fin_slightly_above_the_body_is_extended_down_to_it() -> None:
    doc = mid_wing_document()
    doc["vertical_tail"] = fin(AXIS_Z + R + 0.05)  # 5 cm above the top
    sl = mounted(doc).surface("vertical_tail")
    assert sl.junction.side_min == pytest.approx(-0.05, abs=2e-4)
    assert sl.mount_s < -0.05  # the solid reaches down into the body
    # its exposed area then exceeds the reference area by the strip below the apex
    assert sl.junction.exposed_area > sl.sizing.planform.area


@pytest.fixture(scope="module")
def fin_build():
    """A fin on the cylinder, built with the CAD kernel, and its mesh (mm)."""
    doc = mid_wing_document()
    doc["vertical_tail"] = fin(AXIS_Z)
    layout = mounted(doc)
    return layout


def _fin_checks(layout, mount_s: float):
    from geomgen.checks import solid_checks as checks
    from geomgen.solids import assembly, meshing

    sl = layout.surface("vertical_tail")
    j = dataclasses.replace(sl.junction, mount_s=mount_s)
    moved = dataclasses.replace(
        layout,
        surfaces=tuple(
            dataclasses.replace(s, junction=j) if s.key == "vertical_tail" else s
            for s in layout.surfaces
        ),
    )
    built = assembly.build(moved, (PROFILES,), only={"fin"})
    fin = next(p for p in built.parts if p.name == "fin")
    meshes = {"fin": meshing.mesh_arrays(fin.shape, 1.0)}
    return {c.name: c for c in checks.junction_checks(built, meshes)}


def test_junction_checks_pass_for_the_mounted_fin(fin_build) -> None:
    layout = fin_build
    results = _fin_checks(layout, layout.surface("vertical_tail").mount_s)
    assert len(results) == 2 and all(c.passed for c in results.values()), results


def test_junction_checks_catch_a_fin_through_the_far_side(fin_build) -> None:
    # forced to start 1.5 R below the axis, the fin comes out of the body's bottom
    layout = fin_build
    results = _fin_checks(layout, -1.5 * R)
    pierce = results["mesh points outside the body inboard of its side (far-side piercing)"]
    assert not pierce.passed and pierce.measured > 0
    root = results["root-end mesh points outside the body"]
    assert not root.passed  # its root end lies outside, below the body


def test_a_steep_dihedral_finds_the_body_side_through_the_top() -> None:
    # 45 deg of dihedral on the shoulder wing carries the chord over the cabin top between two
    # steps of the fixed point (it was refused, blamed on wing.apex with "-888 mm"): the body
    # side is where each chord point leaves the body, checked on the body itself: 1 mm
    # inboard the point is inside, 1 mm outboard outside (common practice: a boundary by
    # bracketing)
    from geomgen.geometry.body_side import body_side, contains
    from geomgen.geometry.frame import place_each
    from geomgen.geometry.junction import mount
    from geomgen.geometry.layout import lay_out
    from geomgen.shapes.fuselage import expand
    from geomgen.sizing.aircraft import size

    doc = demo_document()
    doc["wing"]["dihedral"] = "45 deg"
    layout = mount(lay_out(size(make_design(doc))))
    wing = layout.surface("wing")
    assert wing.junction is not None and wing.junction.exposed_area > 0
    ss = wing.sizing
    stations = expand(make_design(doc).fuselage)
    line = np.column_stack([np.linspace(0.02, 0.98, 25), np.zeros(25)])
    s = body_side(ss, stations, line, np.zeros(len(line)))
    found = ~np.isnan(s)
    assert found.sum() >= 20
    inboard = contains(stations, place_each(ss, "right", s[found] - 1e-3, line[found]))
    outboard = contains(stations, place_each(ss, "right", s[found] + 1e-3, line[found]))
    assert inboard.all() and not outboard.any()
