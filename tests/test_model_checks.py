"""Mesh-side checks of the printable model pieces (geomgen/checks/piece_checks.py, threemf_io.py):
3MF written and read back, oriented bounding boxes and the build volume, the print orientation,
ray crossings, the wall around bores, the hole centres of a joint face and the checks built on
them. Every expected value comes from exact geometry (boxes, prisms with regular-polygon
holes, spheres) or from a standard, named beside the assertion. Lengths in model mm.
"""

from __future__ import annotations

import itertools
import math
import zipfile
from xml.etree import ElementTree

import numpy as np
import pytest
import trimesh

from geomgen.checks import piece_checks, threemf_io
from geomgen.checks.tolerances import TOLERANCES

# ------------------------------------------------------------------------------------------
# test pieces: prisms along x built here (no boolean library is installed)
# ------------------------------------------------------------------------------------------


def _ccw_area(uv: np.ndarray) -> float:
    x, y = uv[:, 0], uv[:, 1]
    return 0.5 * float((x * np.roll(y, -1) - np.roll(x, -1) * y).sum())


def _ear_clip(uv: np.ndarray) -> list[tuple[int, int, int]]:
    """Triangles (counter-clockwise) of a simple counter-clockwise polygon."""
    idx = list(range(len(uv)))
    out = []

    def cross(a, b, c):
        return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])

    while len(idx) > 3:
        for k in range(len(idx)):
            a, b, c = idx[k - 1], idx[k], idx[(k + 1) % len(idx)]
            if cross(uv[a], uv[b], uv[c]) <= 0:
                continue
            others = [p for p in idx if p not in (a, b, c)]
            if any(
                cross(uv[a], uv[b], uv[p]) >= 0
                and cross(uv[b], uv[c], uv[p]) >= 0
                and cross(uv[c], uv[a], uv[p]) >= 0
                for p in others
            ):
                continue
            out.append((a, b, c))
            idx.pop(k)
            break
        else:
            raise ValueError("not a simple counter-clockwise polygon")
    out.append(tuple(idx))
    return out


def _prism(
    uv: np.ndarray, cap: list, loops: list[list[int]], x0: float, x1: float
) -> tuple[np.ndarray, np.ndarray]:
    """Extrude a triangulated cross-section in the (y, z) plane from x0 to x1. ``cap`` holds
    counter-clockwise triangles; each loop runs with the section on its left (outline
    counter-clockwise, holes clockwise). Outward winding."""
    m = len(uv)
    vertices = np.vstack(
        [np.column_stack([np.full(m, x0), uv]), np.column_stack([np.full(m, x1), uv])]
    )
    faces = [(c, b, a) for a, b, c in cap] + [(a + m, b + m, c + m) for a, b, c in cap]
    for loop in loops:
        for a, b in zip(loop, loop[1:] + loop[:1], strict=True):
            faces += [(a, b, b + m), (a, b + m, a + m)]
    return vertices, np.array(faces, dtype=np.int64)


def _square_with_hole(centre, radius: float, n: int, phase: float = 0.0, half: float = 10.0):
    """Cross-section: the square [-half, half]^2 with a regular n-gon hole (vertices on the
    circle of ``radius`` about ``centre``, the first at angle ``phase`` from +y toward +z).
    Returns (uv, cap triangles, loops)."""
    c = np.asarray(centre, float)
    ang_in = phase + 2 * np.pi * np.arange(n) / n
    inner = c + radius * np.column_stack([np.cos(ang_in), np.sin(ang_in)])
    # the outline: the corners plus the points straight out from the hole's vertices
    rays = np.column_stack([np.cos(ang_in), np.sin(ang_in)])
    with np.errstate(divide="ignore", invalid="ignore"):
        reach = np.min(np.where(rays != 0, (np.sign(rays) * half - c) / rays, np.inf), axis=1)
    corners = np.array([[half, half], [-half, half], [-half, -half], [half, -half]])
    outer = np.vstack([c + reach[:, None] * rays, corners])
    outer = np.unique(np.round(outer, 12), axis=0)
    ang_out = np.mod(np.arctan2(*(outer - c).T[::-1]) - ang_in[0], 2 * np.pi)
    outer = outer[np.argsort(ang_out)]
    ang_out = np.sort(ang_out)
    ang_rel = ang_in - ang_in[0]
    # zip the two rings together by angle about the hole centre (both are star-shaped)
    nin, nout = len(inner), len(outer)
    uv = np.vstack([inner, outer])
    cap, i, j = [], 0, 0
    while i < nin or j < nout:
        next_in = ang_rel[i + 1] if i + 1 < nin else 2 * np.pi
        next_out = ang_out[j + 1] if j + 1 < nout else 2 * np.pi + ang_out[0]
        if j == nout or (i < nin and next_in <= next_out):
            cap.append((i, nin + j % nout, (i + 1) % nin))
            i += 1
        else:
            cap.append((i % nin, nin + j % nout, nin + (j + 1) % nout))
            j += 1
    loops = [list(range(nin, nin + nout)), list(range(nin))[::-1]]
    return uv, cap, loops


def holed_box(centre=(2.0, 0.0), radius=3.0, n=24, phase=0.0, x0=0.0, length=40.0):
    """A 40 x 20 x 20 mm box along x with a straight hole along x (regular n-gon section)."""
    uv, cap, loops = _square_with_hole(centre, radius, n, phase)
    return _prism(uv, cap, loops, x0, x0 + length)


def ngon_area(radius: float, n: int) -> float:
    return 0.5 * n * radius**2 * math.sin(2 * math.pi / n)


def channel():
    """A 40 x 20 x 20 mm box along x with a 6 mm wide slot from its axis out through +y."""
    uv = np.array(
        [[-10, -10], [10, -10], [10, -3], [-3, -3], [-3, 3], [10, 3], [10, 10], [-10, 10]],
        dtype=float,
    )
    assert _ccw_area(uv) > 0
    return _prism(uv, _ear_clip(uv), [list(range(len(uv)))], 0.0, 40.0)


def unmerged(vertices, faces):
    """Every face with its own copies of its nodes (as the CAD meshes come)."""
    return vertices[faces].reshape(-1, 3), np.arange(3 * len(faces)).reshape(-1, 3)


def rotation(axis, angle_rad) -> np.ndarray:
    return trimesh.transformations.rotation_matrix(angle_rad, axis)[:3, :3]


@pytest.mark.parametrize("phase", [0.0, math.pi / 24])
@pytest.mark.parametrize("n", [4, 24])
def test_test_pieces_are_closed_with_the_volume_of_their_section(n, phase):
    # exact geometry: (square - regular n-gon) x length; a wrong triangulation changes it
    v, f = holed_box(n=n, phase=phase)
    mesh = trimesh.Trimesh(v, f, process=True)
    assert mesh.is_watertight and mesh.is_winding_consistent
    assert mesh.volume == pytest.approx(40 * (400 - ngon_area(3, n)), rel=1e-12)
    mesh = trimesh.Trimesh(*channel(), process=True)
    assert mesh.is_watertight and mesh.volume == pytest.approx(40 * (400 - 13 * 6), rel=1e-12)


# ------------------------------------------------------------------------------------------
# 3MF
# ------------------------------------------------------------------------------------------


@pytest.fixture
def three_pieces():
    a = trimesh.creation.box(extents=(30, 20, 10))
    b = trimesh.creation.box(extents=(5, 6, 7))
    b.apply_translation((100, 0, 0))
    return {
        "wing right piece 2": (np.asarray(a.vertices), np.asarray(a.faces)),
        "aileron right +10": (np.asarray(b.vertices), np.asarray(b.faces)),
        "ring": holed_box(),
    }


def test_3mf_round_trip_keeps_names_arrays_and_volumes(three_pieces, tmp_path):
    path = tmp_path / "pieces.3mf"
    threemf_io.write_3mf(three_pieces, path)
    back = threemf_io.read_3mf(path)
    # read back sorted by name
    assert list(back) == sorted(three_pieces)
    for name, (v, f) in three_pieces.items():
        v2, f2 = back[name]
        assert len(v2) == len(v) and len(f2) == len(f)
        np.testing.assert_array_equal(v2, v)  # the decimal text round-trips float64
        np.testing.assert_array_equal(f2, f)
        assert trimesh.Trimesh(v2, f2).volume == pytest.approx(trimesh.Trimesh(v, f).volume)
    assert trimesh.Trimesh(*back["ring"]).volume == pytest.approx(40 * (400 - ngon_area(3, 24)))


def test_3mf_shares_the_vertices_of_a_mesh_given_face_by_face(tmp_path):
    """A mesh whose faces each carry their own vertex copies (as the mesher gives each BRep
    face its own) is written with every position once: read back by index, every edge is
    shared by exactly two triangles (a closed 2-manifold, as a slicer reads it)."""
    box = trimesh.creation.box(extents=(30, 20, 10))
    loose = (np.asarray(box.vertices)[box.faces].reshape(-1, 3), np.arange(36).reshape(-1, 3))
    path = tmp_path / "loose.3mf"
    threemf_io.write_3mf({"loose": loose}, path)
    v, f = threemf_io.read_3mf(path)["loose"]
    assert len(v) == 8  # a box's corners
    edges = np.sort(np.concatenate([f[:, [0, 1]], f[:, [1, 2]], f[:, [2, 0]]]), axis=1)
    _, uses = np.unique(edges, axis=0, return_counts=True)
    assert set(uses) == {2}
    assert trimesh.Trimesh(v, f, process=False).volume == pytest.approx(30 * 20 * 10)


def test_3mf_model_says_millimetre_and_names_the_objects(three_pieces, tmp_path):
    path = tmp_path / "pieces.3mf"
    threemf_io.write_3mf(three_pieces, path)
    with zipfile.ZipFile(path) as z:
        # 3MF Core Specification: the model part is /3D/3dmodel.model (named by the root
        # relationship) and <model unit="..."> gives the unit of all coordinates
        assert "3D/3dmodel.model" in z.namelist()
        root = ElementTree.fromstring(z.read("3D/3dmodel.model"))
    assert root.get("unit") == "millimeter"
    core = "{http://schemas.microsoft.com/3dmanufacturing/core/2015/02}"
    assert root.tag == core + "model"
    names = [o.get("name") for o in root.iter(core + "object")]
    assert names == sorted(three_pieces)
    # every object is placed by a build item (3MF Core: only build items are printed)
    assert len(list(root.iter(core + "item"))) == len(three_pieces)


def test_3mf_is_byte_identical_run_after_run(three_pieces, tmp_path):
    threemf_io.write_3mf(three_pieces, tmp_path / "a.3mf")
    threemf_io.write_3mf(dict(reversed(list(three_pieces.items()))), tmp_path / "b.3mf")
    assert (tmp_path / "a.3mf").read_bytes() == (tmp_path / "b.3mf").read_bytes()


def test_read_3mf_applies_the_placement_transform(tmp_path):
    # a file whose build item moves its object: the vertices come back moved
    box = trimesh.creation.box(extents=(1, 2, 3))
    scene = trimesh.Scene()
    move = trimesh.transformations.translation_matrix((10.0, -5.0, 2.5))
    scene.add_geometry(box, geom_name="moved", node_name="moved", transform=move)
    path = tmp_path / "moved.3mf"
    path.write_bytes(scene.export(file_type="3mf"))
    v, _ = threemf_io.read_3mf(path)["moved"]
    np.testing.assert_allclose(v, np.asarray(box.vertices) + (10.0, -5.0, 2.5))


# ------------------------------------------------------------------------------------------
# bounding box, build volume, print orientation
# ------------------------------------------------------------------------------------------


def test_oriented_box_of_a_turned_box_is_its_edges():
    # exact geometry: turning and moving a box does not change its edges
    box = trimesh.creation.box(extents=(12.0, 47.0, 31.0))
    turn = np.eye(4)
    turn[:3, :3] = rotation((1.0, 2.0, -0.5), 0.7)
    turn[:3, 3] = (5.0, -3.0, 40.0)
    box.apply_transform(turn)
    np.testing.assert_allclose(
        piece_checks.obb_extents(box.vertices, box.faces), [12, 31, 47], 1e-6
    )


def test_build_volume_rule():
    bed = (220.0, 220.0, 250.0)
    # a 240 mm bar fits standing up (250 mm height)
    assert piece_checks.fits_build_volume(np.array([2.0, 2.0, 240.0]), bed)
    # a 260 mm bar would fit along the bed's 311 mm diagonal, but the rule places boxes
    # edge-parallel only, so it is reported as not fitting
    assert not piece_checks.fits_build_volume(np.array([2.0, 2.0, 260.0]), bed)
    assert not piece_checks.fits_build_volume(np.array([3.0, 225.0, 230.0]), bed)
    assert piece_checks.fits_build_volume(np.array([220.0, 220.0, 250.0]), bed)


def test_build_volume_rule_is_the_best_axis_parallel_placement():
    # against all six edge-parallel placements, tried one by one
    rng = np.random.default_rng(7)
    for _ in range(300):
        box = np.sort(rng.uniform(1, 300, 3))
        bed = rng.uniform(100, 300, 3)
        any_fits = any(np.all(box[list(p)] <= bed) for p in itertools.permutations(range(3)))
        assert piece_checks.fits_build_volume(box, bed) == any_fits


def test_print_orientation_of_a_plate_is_a_big_face():
    plate = trimesh.creation.box(extents=(100.0, 60.0, 2.0))
    normal, area = piece_checks.print_orientation(plate.vertices, plate.faces)
    # two equal big faces: the one already facing down is chosen
    np.testing.assert_allclose(normal, [0, 0, -1], atol=1e-12)
    assert area == pytest.approx(6000.0)
    turn = rotation((0.3, -1.0, 0.4), 1.1)
    normal, area = piece_checks.print_orientation(plate.vertices @ turn.T, plate.faces)
    assert abs(normal @ (turn @ [0, 0, 1.0])) == pytest.approx(1.0, abs=1e-9)
    assert area == pytest.approx(6000.0)


def test_print_orientation_of_a_wedge_is_its_slope():
    # right-triangle section, legs 30 mm (x) and 10 mm (z), 20 mm wide: faces 600 (bottom),
    # 200 (back) and 20 sqrt(1000) = 632.5 mm^2 (the slope x/30 + z/10 = 1, normal (1, 0, 3))
    points = [(x, y, z) for x, z in [(0, 0), (30, 0), (0, 10)] for y in (0, 20)]
    wedge = trimesh.Trimesh(points).convex_hull
    normal, area = piece_checks.print_orientation(wedge.vertices, wedge.faces)
    np.testing.assert_allclose(normal, np.array([1, 0, 3]) / math.sqrt(10), atol=1e-12)
    assert area == pytest.approx(20 * math.sqrt(1000))


def test_print_orientation_uses_the_hull_and_breaks_ties_downward():
    # the holed box's four 40 x 20 sides tie: the hull ignores the hole, -z wins the tie
    v, f = holed_box()
    normal, area = piece_checks.print_orientation(v, f)
    np.testing.assert_allclose(normal, [0, 0, -1], atol=1e-12)
    assert area == pytest.approx(800.0)


def test_orientation_words():
    assert piece_checks.orientation_words([0, -1, 0]) == "inboard joint face down (face normal -y)"
    assert piece_checks.orientation_words([0, -1, 0], half="left").startswith("outboard joint face")
    assert piece_checks.orientation_words([0, 0, -2]) == "lower side down (face normal -z)"
    assert piece_checks.orientation_words([1, 0, 0]).startswith("aft (trailing-edge) side down")
    tilted = piece_checks.orientation_words(np.array([1, 0, 3]) / math.sqrt(10))
    assert tilted == "upper side down, tilted (face normal (+0.316, +0.000, +0.949))"


# ------------------------------------------------------------------------------------------
# rays
# ------------------------------------------------------------------------------------------


@pytest.fixture
def cube():
    box = trimesh.creation.box(extents=(1.0, 1.0, 1.0))  # [-0.5, 0.5]^3
    return np.asarray(box.vertices), np.asarray(box.faces)


def test_ray_hits_on_a_cube(cube):
    origins = [(-2.0, 0.1, 0.2), (0.1, 0.2, 0.3), (-1.0, -1.0, 0.3), (-2.0, 3.0, 0.0)]
    directions = [(1.0, 0, 0), (0, 0, 5.0), (1.0, 1.0, 0), (1.0, 0, 0)]
    hits = piece_checks.ray_hits(*cube, np.array(origins), np.array(directions))
    # slab distances: in at x = -0.5, out at x = 0.5; from inside, out at z = 0.5
    np.testing.assert_allclose(hits[0], [1.5, 2.5], atol=1e-12)
    np.testing.assert_allclose(hits[1], [0.2], atol=1e-12)
    # through the edge x = y = -0.5 and out through x = y = 0.5: each crossing counted once
    np.testing.assert_allclose(hits[2], [0.5 * math.sqrt(2), 1.5 * math.sqrt(2)], atol=1e-12)
    assert len(hits[3]) == 0


def test_ray_hits_from_inside_a_cube_against_slab_distances(cube, monkeypatch):
    # tiny blocks, so the chunked path is what is tested
    monkeypatch.setattr(piece_checks, "_RAY_PAIR_BUDGET", 50)
    rng = np.random.default_rng(3)
    origins = rng.uniform(-0.45, 0.45, (400, 3))
    directions = rng.normal(size=(400, 3))
    directions /= np.linalg.norm(directions, axis=1, keepdims=True)
    hits = piece_checks.ray_hits(*cube, origins, directions)
    exact = np.min((np.sign(directions) * 0.5 - origins) / directions, axis=1)
    assert all(len(h) == 1 for h in hits)
    np.testing.assert_allclose([h[0] for h in hits], exact, rtol=1e-12, atol=1e-12)


def test_ray_hits_through_a_sphere_are_a_chord(cube):
    r = 7.0
    sphere = trimesh.creation.icosphere(subdivisions=3, radius=r)
    v, f = np.asarray(sphere.vertices), np.asarray(sphere.faces)
    # the facets lie between their planes' distance from the centre and the sphere
    tri = v[f]
    normals = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
    normals /= np.linalg.norm(normals, axis=1, keepdims=True)
    inner = np.min(np.abs(np.einsum("ij,ij->i", normals, tri[:, 0])))
    assert inner > 0.99 * r
    rng = np.random.default_rng(5)
    d = rng.normal(size=(50, 3))
    d /= np.linalg.norm(d, axis=1, keepdims=True)
    origins = -20.0 * d  # 20 mm out, aimed through the centre
    for hits in piece_checks.ray_hits(v, f, origins, d):
        assert len(hits) == 2
        assert 20 - r - 1e-9 <= hits[0] <= 20 - inner + 1e-9
        assert 2 * inner - 1e-9 <= hits[1] - hits[0] <= 2 * r + 1e-9


# ------------------------------------------------------------------------------------------
# wall around bores
# ------------------------------------------------------------------------------------------


def test_wall_around_a_round_hole_off_centre():
    # 20 mm square, hole r = 3 mm, 2 mm off centre toward +y: the thinnest wall is toward +y,
    # 10 - 2 - 3 = 5 mm for the true circle. The mesh's hole is a regular 24-gon inscribed in
    # the circle, 3 cos(pi/24) to 3 mm from the axis, so the wall is 5 to 5 + 3 (1 - cos(pi/24))
    start, end = (0.0, 2.0, 0.0), (40.0, 2.0, 0.0)
    n = 24
    # a vertex of the 24-gon toward +y: exactly 5
    wall = piece_checks.bore_wall(*holed_box(n=n, phase=0.0), start, end, 6.0)
    assert wall == pytest.approx(5.0, abs=1e-9)
    # the middle of an edge toward +y: exactly 5 + 3 (1 - cos(pi/24))
    wall = piece_checks.bore_wall(*holed_box(n=n, phase=math.pi / n), start, end, 6.0)
    assert wall == pytest.approx(5.0 + 3 * (1 - math.cos(math.pi / n)), abs=1e-9)
    assert 5.0 <= wall <= 5.0 + 3 * (1 - math.cos(math.pi / n)) + 1e-12


def test_wall_around_a_square_hole_and_reversed_axis():
    # 6 mm square hole (corners at r = 3 sqrt 2, 45 deg), 2 mm off centre toward +y: 5 mm
    v, f = holed_box(n=4, phase=math.pi / 4, radius=3 * math.sqrt(2))
    assert piece_checks.bore_wall(v, f, (0, 2, 0), (40, 2, 0), 6.0) == pytest.approx(5.0, abs=1e-9)
    assert piece_checks.bore_wall(v, f, (40, 2, 0), (0, 2, 0), 6.0) == pytest.approx(5.0, abs=1e-9)
    # duplicated nodes change nothing
    assert piece_checks.bore_wall(*unmerged(v, f), (0, 2, 0), (40, 2, 0), 6.0) == pytest.approx(5.0)


def test_wall_is_zero_where_the_hole_breaks_through():
    # the slot leaves the piece toward +y: rays that way meet nothing
    assert piece_checks.bore_wall(*channel(), (0, 0, 0), (40, 0, 0), 6.0) == 0.0
    # an axis that misses the hole (inside solid material) fails too
    assert piece_checks.bore_wall(*holed_box(), (0, -5, 0), (40, -5, 0), 6.0) == 0.0


# ------------------------------------------------------------------------------------------
# hole centres on a joint face
# ------------------------------------------------------------------------------------------


@pytest.mark.parametrize("split", [False, True], ids=["shared nodes", "own nodes"])
def test_joint_face_loops_are_the_outline_and_the_hole(split):
    v, f = holed_box(centre=(2.0, -1.5), n=24, x0=10.0)
    if split:
        v, f = unmerged(v, f)
    loops = piece_checks.plane_loop_centres(v, f, (10.0, 0, 0), (-1.0, 0, 0))
    assert len(loops) == 2
    (outline, outline_area), (hole, hole_area) = loops
    # the outline encloses the 20 x 20 square centred on the axis; the hole is a regular
    # 24-gon, whose area centroid is its centre
    assert outline_area == pytest.approx(400.0, rel=1e-12)
    np.testing.assert_allclose(outline, [10, 0, 0], atol=1e-9)
    assert hole_area == pytest.approx(ngon_area(3.0, 24), rel=1e-12)
    np.testing.assert_allclose(hole, [10, 2, -1.5], atol=1e-9)
    # a plane the piece has no face in
    assert piece_checks.plane_loop_centres(v, f, (20.0, 0, 0), (1.0, 0, 0)) == []


def test_joint_with_a_shifted_hole(monkeypatch):
    # two pieces meet at x = 40; the second's hole is 0.06 mm higher
    tol = TOLERANCES.model_hole_alignment
    assert tol == 0.05  # the figure asked for
    a = holed_box(centre=(2.0, 0.0), x0=0.0)
    for shift, ok in [(0.04, True), (0.06, False)]:
        b = holed_box(centre=(2.0, shift), x0=40.0)
        holes_a = [c for c, _ in piece_checks.plane_loop_centres(*a, (40, 0, 0), (1, 0, 0))[1:]]
        holes_b = [c for c, _ in piece_checks.plane_loop_centres(*b, (40, 0, 0), (-1, 0, 0))[1:]]
        check = piece_checks.hole_alignment_check("wing right joint 1-2", holes_a, holes_b, tol)
        assert check.passed is ok
        assert check.measured == pytest.approx(shift, abs=1e-9)
        assert check.part == "wing right joint 1-2"


def test_hole_alignment_pairs_and_counts():
    a = [np.array([0.0, 10.0, 0.0]), np.array([0.0, -10.0, 0.0])]
    b = [np.array([0.0, -10.0, 0.03]), np.array([0.0, 10.02, 0.0])]
    check = piece_checks.hole_alignment_check("j", a, b, 0.05)
    assert check.passed and check.measured == pytest.approx(0.03)
    check = piece_checks.hole_alignment_check("j", a, b[:1], 0.05)
    assert not check.passed and check.measured == math.inf
    assert piece_checks.hole_alignment_check("j", [], [], 0.05).passed


# ------------------------------------------------------------------------------------------
# the checks of one piece
# ------------------------------------------------------------------------------------------


def test_model_piece_checks_pass_and_name_the_piece_when_they_fail():
    v, f = unmerged(*holed_box())
    bores = [("spar", (0.0, 2.0, 0.0), (40.0, 2.0, 0.0), 6.0)]
    good = piece_checks.model_piece_checks("wing right piece 1", v, f, (220, 220, 250), bores, 4.0)
    assert [c.name for c in good] == [
        "mesh is watertight",
        "oriented bounding box fits the build volume",
        "wall around spar hole",
    ]
    assert all(c.passed for c in good)
    assert good[2].measured == pytest.approx(5.0)
    assert (good[2].expected, good[2].tolerance, good[2].relative) == (4.0, 0.0, False)

    bad = piece_checks.model_piece_checks("wing right piece 1", v, f, (30, 30, 30), bores, 6.0)
    failed = {c.name: c for c in bad if not c.passed}
    assert set(failed) == {"oriented bounding box fits the build volume", "wall around spar hole"}
    assert failed["oriented bounding box fits the build volume"].measured == pytest.approx(10.0)
    assert all(c.part == "wing right piece 1" for c in bad)

    open_v, open_f = v, f[:-1]  # one triangle missing
    leaky = piece_checks.model_piece_checks("tip piece", open_v, open_f, (220, 220, 250), [], 1.0)
    assert not leaky[0].passed and leaky[0].part == "tip piece"
