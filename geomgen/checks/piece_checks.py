"""Measurements and checks of the printed model's pieces, as meshes in model millimetres:
vertices (N, 3) float, faces (M, 3) int, in the model frame (x aft, y right, z up). The fit in
a printer's build volume, the print orientation, wall thickness around bores (rays cast with
the Möller–Trumbore test), the hole centres of a joint face, and the checks built on them.
"""

from __future__ import annotations

import numpy as np
import trimesh

from geomgen.checks.common import Check, _abs, _at_least, _flag, load_mesh

#: rays are tested against triangles in blocks of at most this many (ray, triangle) pairs; the
#: temporaries of one block peak at about 120 bytes per pair (~120 MB)
_RAY_PAIR_BUDGET = 1_000_000
#: a crossing must lie this far along the ray (mm) to count
_RAY_T_MIN = 1e-9
#: crossings of one ray closer than this (mm) are one (a ray through a shared edge or vertex)
_RAY_T_MERGE = 1e-7
#: barycentric slack so a ray through an edge is caught by both triangles (then merged)
_RAY_EDGE_SLACK = 1e-10
#: convex-hull triangles whose normals differ by less than this (rad) are one flat face
_FLAT_FACE_ANGLE = 1e-3


def obb_extents(vertices: np.ndarray, faces: np.ndarray) -> np.ndarray:
    """The three edge lengths (mm) of the piece's oriented bounding box (trimesh's search over
    the convex hull's face directions for the least volume), ascending."""
    mesh = trimesh.Trimesh(vertices=vertices, faces=faces, process=False)
    return np.sort(np.asarray(mesh.bounding_box_oriented.primitive.extents, dtype=np.float64))


def build_volume_excess(extents_sorted: np.ndarray, build_volume_mm) -> float:
    """How far (mm) the worst box edge overshoots the build volume when the box's edges,
    ascending, go along the build volume's, ascending; 0 when it fits."""
    box = np.sort(np.asarray(extents_sorted, dtype=np.float64))
    excess = box - np.sort(np.asarray(build_volume_mm, dtype=np.float64))
    return float(max(0.0, excess.max()))


def fits_build_volume(extents_sorted: np.ndarray, build_volume_mm) -> bool:
    """True when a box with these edges (mm) fits the build volume (mm) edge-parallel: each
    ascending edge <= the ascending build size. Pairing sorted with sorted is the best of the
    six axis-parallel placements; a box that fits only tilted (a bar along the bed's diagonal)
    is reported as not fitting."""
    return build_volume_excess(extents_sorted, build_volume_mm) == 0.0


def print_orientation(vertices: np.ndarray, faces: np.ndarray) -> tuple[np.ndarray, float]:
    """The outward unit normal (model frame) of the largest flat face of the piece's convex
    hull, and that face's area (mm^2): the piece prints with this normal pointing to -z.
    Hull triangles are one face when their normals agree within 1e-3 rad and their planes
    within 1e-6 of the piece's size. Equal areas (within 1e-9): the most downward normal."""
    hull = trimesh.Trimesh(vertices=vertices, faces=faces, process=False).convex_hull
    normals = np.asarray(hull.face_normals, dtype=np.float64)
    areas = np.asarray(hull.area_faces, dtype=np.float64)
    offsets = np.einsum("ij,ij->i", normals, hull.triangles[:, 0])
    offset_tol = 1e-6 * max(float(np.ptp(hull.vertices, axis=0).max()), 1e-9)
    cos_tol = np.cos(_FLAT_FACE_ANGLE)
    unassigned = np.ones(len(areas), dtype=bool)
    best_normal, best_area = np.array([0.0, 0.0, -1.0]), -1.0
    for seed in np.argsort(-areas, kind="stable"):
        if not unassigned[seed]:
            continue
        group = (
            unassigned
            & (normals @ normals[seed] >= cos_tol)
            & (np.abs(offsets - offsets[seed]) <= offset_tol)
        )
        unassigned &= ~group
        area = float(areas[group].sum())
        if area <= 0.0:
            continue
        normal = (areas[group, None] * normals[group]).sum(axis=0)
        normal /= np.linalg.norm(normal)
        tie = abs(area - best_area) <= 1e-9 * max(area, best_area)
        if (not tie and area > best_area) or (tie and normal[2] < best_normal[2]):
            best_normal, best_area = normal, area
    return best_normal, best_area


def orientation_words(normal: np.ndarray, half: str = "right") -> str:
    """A short phrase saying which side of a piece goes down on the bed, from the outward
    normal of that face in the model frame (x aft, y right, z up). ``half`` is the wing half
    the piece belongs to ("right" or "left"), which says whether -y is inboard."""
    n = np.asarray(normal, dtype=np.float64)
    n = n / np.linalg.norm(n)
    axis = int(np.argmax(np.abs(n)))
    sign = 1 if n[axis] > 0 else -1
    inboard_sign = -1 if half == "right" else 1
    words = {
        (0, -1): "forward (leading-edge) side",
        (0, 1): "aft (trailing-edge) side",
        (1, inboard_sign): "inboard joint face",
        (1, -inboard_sign): "outboard joint face",
        (2, -1): "lower side",
        (2, 1): "upper side",
    }[(axis, sign)]
    if abs(n[axis]) >= np.cos(np.radians(1.0)):
        return f"{words} down (face normal {'+' if sign > 0 else '-'}{'xyz'[axis]})"
    return f"{words} down, tilted (face normal ({n[0]:+.3f}, {n[1]:+.3f}, {n[2]:+.3f}))"


def ray_hits(
    vertices: np.ndarray, faces: np.ndarray, origins: np.ndarray, directions: np.ndarray
) -> list[np.ndarray]:
    """For each ray (origin mm, direction: any length, normalised here) the ascending distances
    (mm) t > 1e-9 at which it crosses a triangle (Möller–Trumbore, in blocks of ray-triangle
    pairs so memory stays bounded); crossings closer than 1e-7 mm are merged, so a ray through
    an edge or vertex shared by several triangles counts once. Rays in a triangle's plane
    do not hit it."""
    v = np.asarray(vertices, dtype=np.float64)
    f = np.asarray(faces, dtype=np.int64)
    o = np.atleast_2d(np.asarray(origins, dtype=np.float64))
    d = np.atleast_2d(np.asarray(directions, dtype=np.float64))
    d = d / np.linalg.norm(d, axis=1, keepdims=True)
    n_rays = len(o)
    if len(f) == 0 or n_rays == 0:
        return [np.empty(0) for _ in range(n_rays)]
    v0 = v[f[:, 0]]
    e1 = v[f[:, 1]] - v0
    e2 = v[f[:, 2]] - v0
    # parallel test relative to the triangle's size (|d| = 1)
    det_min = 1e-12 * np.linalg.norm(e1, axis=1) * np.linalg.norm(e2, axis=1)
    ray_block = max(1, _RAY_PAIR_BUDGET // len(f))
    tri_block = min(len(f), _RAY_PAIR_BUDGET)
    hit_ray: list[np.ndarray] = []
    hit_t: list[np.ndarray] = []
    for r0 in range(0, n_rays, ray_block):
        ob, db = o[r0 : r0 + ray_block, None, :], d[r0 : r0 + ray_block, None, :]
        for f0 in range(0, len(f), tri_block):
            sl = slice(f0, f0 + tri_block)
            a, b1, b2 = v0[None, sl], e1[None, sl], e2[None, sl]
            pvec = np.cross(db, b2)
            det = np.einsum("rfk,rfk->rf", b1, pvec)
            ok = np.abs(det) > det_min[None, sl]
            inv = np.divide(1.0, det, out=np.zeros_like(det), where=ok)
            tvec = ob - a
            u = np.einsum("rfk,rfk->rf", tvec, pvec) * inv
            del pvec
            qvec = np.cross(tvec, b1)
            del tvec
            w = np.einsum("rfk,rfk->rf", db, qvec) * inv
            t = np.einsum("rfk,rfk->rf", b2, qvec) * inv
            del qvec
            ok &= (u >= -_RAY_EDGE_SLACK) & (w >= -_RAY_EDGE_SLACK)
            ok &= (u + w <= 1.0 + _RAY_EDGE_SLACK) & (t > _RAY_T_MIN)
            ray_idx, tri_idx = np.nonzero(ok)
            hit_ray.append(ray_idx + r0)
            hit_t.append(t[ray_idx, tri_idx])
    rays = np.concatenate(hit_ray)
    ts = np.concatenate(hit_t)
    order = np.lexsort((ts, rays))
    rays, ts = rays[order], ts[order]
    keep = np.ones(len(ts), dtype=bool)
    keep[1:] = (rays[1:] != rays[:-1]) | (ts[1:] - ts[:-1] > _RAY_T_MERGE)
    rays, ts = rays[keep], ts[keep]
    bounds = np.searchsorted(rays, np.arange(n_rays + 1))
    return [ts[bounds[i] : bounds[i + 1]] for i in range(n_rays)]


def _perpendicular_basis(axis: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Two unit vectors making a right-handed frame with the unit ``axis``; the first is the
    model axis most nearly perpendicular to ``axis`` (ties: x, then y, then z), projected."""
    first = np.eye(3)[int(np.argmin(np.abs(axis)))]
    first = first - (first @ axis) * axis
    first /= np.linalg.norm(first)
    return first, np.cross(axis, first)


def bore_wall(
    vertices: np.ndarray,
    faces: np.ndarray,
    start: np.ndarray,
    end: np.ndarray,
    size: float,
    samples: int = 9,
    directions: int = 16,
) -> float:
    """The least wall thickness (mm) around a straight hole whose axis runs start -> end (mm);
    ``size`` is the hole's diameter (round) or side (square), mm. At ``samples`` points from
    10 % to 90 % along the axis, ``directions`` rays perpendicular to it (the first along the
    model axis most nearly perpendicular to the hole, so a wall facing x, y or z is met square
    on) each cross the hole's own wall and then the outer skin; the wall is the distance
    between the two. 0.0 when any ray leaves the piece without two crossings or first meets a
    surface farther than the hole's half diagonal (x 1.05): the hole breaks through there."""
    p0 = np.asarray(start, dtype=np.float64)
    p1 = np.asarray(end, dtype=np.float64)
    axis = p1 - p0
    axis /= np.linalg.norm(axis)
    e1, e2 = _perpendicular_basis(axis)
    fractions = np.linspace(0.1, 0.9, samples)
    angles = 2.0 * np.pi * np.arange(directions) / directions
    points = p0 + fractions[:, None] * (p1 - p0)
    dirs = np.cos(angles)[:, None] * e1 + np.sin(angles)[:, None] * e2
    origins = np.repeat(points, directions, axis=0)
    ray_dirs = np.tile(dirs, (samples, 1))
    reach = 1.05 * size / np.sqrt(2.0)
    least = float("inf")
    for hits in ray_hits(vertices, faces, origins, ray_dirs):
        if len(hits) < 2 or hits[0] > reach:
            return 0.0
        least = min(least, float(hits[1] - hits[0]))
    return least


def plane_loop_centres(
    vertices: np.ndarray,
    faces: np.ndarray,
    point: np.ndarray,
    normal: np.ndarray,
    tol: float = 1e-4,
) -> list[tuple[np.ndarray, float]]:
    """The closed boundary loops of the piece's flat region in the plane through ``point``
    with ``normal`` (mm; triangles whose three vertices lie within ``tol`` mm of the plane):
    each loop's area centroid (mm, in the plane) and enclosed area (mm^2), largest first (the
    outline, then the holes in the face such as dowel holes). Coincident vertices are merged
    first, so meshes whose faces carry their own copies of edge nodes work too."""
    mesh = load_mesh(vertices, faces)
    p = np.asarray(point, dtype=np.float64)
    n = np.asarray(normal, dtype=np.float64)
    n = n / np.linalg.norm(n)
    distance = np.abs((mesh.vertices - p) @ n)
    flat = np.all(distance[mesh.faces] <= tol, axis=1)
    tris = np.asarray(mesh.faces[flat], dtype=np.int64)
    if len(tris) == 0:
        return []
    directed = np.concatenate([tris[:, [0, 1]], tris[:, [1, 2]], tris[:, [2, 0]]])
    undirected = np.sort(directed, axis=1)
    _, inverse, counts = np.unique(undirected, axis=0, return_inverse=True, return_counts=True)
    boundary = directed[counts[inverse.ravel()] == 1]
    following: dict[int, list[int]] = {}
    for a, b in boundary.tolist():
        following.setdefault(a, []).append(b)
    e1, e2 = _perpendicular_basis(n)
    loops: list[tuple[np.ndarray, float]] = []
    while following:
        first = next(iter(following))
        loop = [first]
        current = first
        closed = False
        while current in following:
            nexts = following[current]
            nxt = nexts.pop()
            if not nexts:
                del following[current]
            if nxt == first:
                closed = True
                break
            loop.append(nxt)
            current = nxt
        if not closed:  # an open chain (a face cut off by the tolerance): no loop
            continue
        uv = np.column_stack([(mesh.vertices[loop] - p) @ e1, (mesh.vertices[loop] - p) @ e2])
        x, y = uv[:, 0], uv[:, 1]
        xn, yn = np.roll(x, -1), np.roll(y, -1)
        cross = x * yn - xn * y
        signed = 0.5 * cross.sum()
        if len(loop) < 3 or signed == 0.0:
            continue
        cx = ((x + xn) * cross).sum() / (6.0 * signed)
        cy = ((y + yn) * cross).sum() / (6.0 * signed)
        loops.append((p + cx * e1 + cy * e2, abs(float(signed))))
    loops.sort(key=lambda item: -item[1])
    return loops


def model_piece_checks(
    name: str,
    vertices: np.ndarray,
    faces: np.ndarray,
    build_volume_mm,
    bores,
    min_wall_mm: float,
) -> list[Check]:
    """Checks of one printable piece (mm): its mesh is closed, its oriented bounding box fits
    the build volume (measured = the worst overshoot, mm), and the wall around each bore —
    ``bores`` holds (kind, start, end, size) with the axis ends and size in mm — is at least
    ``min_wall_mm``. Every check's ``part`` is the piece's name."""
    mesh = load_mesh(vertices, faces)
    excess = build_volume_excess(obb_extents(mesh.vertices, mesh.faces), build_volume_mm)
    out = [
        _flag("mesh is watertight", name, mesh.is_watertight),
        _abs("oriented bounding box fits the build volume", name, excess, 0.0, 0.0, "mm"),
    ]
    for kind, start, end, size in bores:
        wall = bore_wall(mesh.vertices, mesh.faces, start, end, size)
        out.append(_at_least(f"wall around {kind} hole", name, wall, min_wall_mm, "mm"))
    return out


def hole_alignment_check(
    joint: str, centres_a: list[np.ndarray], centres_b: list[np.ndarray], tol_mm: float
) -> Check:
    """The hole centres (mm) of a joint's two faces pair up: closest pairs first, each centre
    used once; measured = the largest distance of a pair (inf when the counts differ). With
    holes much farther apart than ``tol_mm`` this is the only pairing that can pass."""
    a = np.asarray(centres_a, dtype=np.float64).reshape(-1, 3)
    b = np.asarray(centres_b, dtype=np.float64).reshape(-1, 3)
    worst = float("inf") if len(a) != len(b) else 0.0
    if len(a) == len(b) and len(a):
        dist = np.linalg.norm(a[:, None, :] - b[None, :, :], axis=2)
        for _ in range(len(a)):
            i, j = np.unravel_index(int(np.argmin(dist)), dist.shape)
            worst = max(worst, float(dist[i, j]))
            dist[i, :] = np.inf
            dist[:, j] = np.inf
    return _abs("hole centres line up across the joint", joint, worst, 0.0, tol_mm, "mm")
