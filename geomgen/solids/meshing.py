"""Meshes and STL files of the solids, mm in the aircraft frame (x aft, y right, z up): the
triangle arrays handed to the checks, binary STL files (also of a body with pointed ends), and
the face queries the checks use (planar faces in a plane, the flat root and tip faces).

Measured on cadquery 2.8 / OCP 7.9 (see DEVELOPERS.md): meshes force the face deflection
(otherwise BRepMesh silently coarsens faces that a boolean trimmed).
"""

from __future__ import annotations

from pathlib import Path

import cadquery as cq
import numpy as np
from OCP.BRep import BRep_Tool
from OCP.BRepMesh import BRepMesh_IncrementalMesh
from OCP.IMeshTools import IMeshTools_Parameters
from OCP.StlAPI import StlAPI_Writer
from OCP.TopAbs import TopAbs_Orientation
from OCP.TopLoc import TopLoc_Location

from geomgen.errors import GeometryError
from geomgen.solids.kernel import _unit


def write_stl(shape: cq.Shape, path: Path, deflection: float, angle: float = 0.25) -> None:
    """Binary STL in mm; ``deflection`` is the largest distance (mm) between the mesh and the
    true surface. Forces the face deflection: without it BRepMesh coarsens faces that a boolean
    trimmed to the tolerance of their cut edges."""
    _mesh(shape, deflection, angle)
    writer = StlAPI_Writer()
    writer.ASCIIMode = False
    if not writer.Write(shape.wrapped, str(path)):
        raise GeometryError("could not write the file", part=path.stem, operation="STL export")


def face_points_on_plane(
    shape: cq.Shape, point: np.ndarray, normal: np.ndarray, tol: float
) -> list[float]:
    """Distances to the plane of sample points of every planar face of ``shape`` that lies in
    that plane (within ``tol``, mm), for checking cut faces."""
    n = _unit(normal)
    distances = []
    for face in shape.Faces():
        if face.geomType() != "PLANE":
            continue
        fn = np.array(face.normalAt().toTuple())
        if abs(abs(np.dot(fn, n)) - 1.0) > 1e-6:
            continue
        samples = [np.array(v.toTuple()) for v in face.Vertices()]
        samples.append(np.array(face.Center().toTuple()))
        d = [abs(float(np.dot(q - point, n))) for q in samples]
        if min(d) < tol:
            distances.extend(d)
    return distances


def face_area(shape: cq.Shape) -> float:
    return float(shape.Area())


def planar_cap_area(shape: cq.Shape, key: str) -> float:
    """Area of the flat root and tip faces of a lofted surface (mm^2), to subtract from the
    total area when comparing with a wetted-area estimate."""
    axis = np.array([0.0, 0.0, 1.0]) if key == "vertical_tail" else np.array([0.0, 1.0, 0.0])
    total = 0.0
    for face in shape.Faces():
        if face.geomType() == "PLANE":
            fn = np.array(face.normalAt().toTuple())
            if abs(abs(np.dot(fn, axis)) - 1.0) < 1e-6:
                total += face.Area()
    return total


def _mesh(shape: cq.Shape, deflection: float, angle: float) -> None:
    params = IMeshTools_Parameters()
    params.Deflection = deflection
    params.Angle = angle
    params.Relative = False
    params.InParallel = True
    params.ForceFaceDeflection = True
    mesher = BRepMesh_IncrementalMesh(shape.wrapped, params)
    if not mesher.IsDone():
        raise GeometryError("meshing failed", operation="mesh")


def mesh_arrays(shape: cq.Shape, deflection: float, angle: float = 0.25):
    """Triangle mesh of a shape as (vertices (n, 3), faces (m, 3)) arrays, mm; vertices on
    shared edges are repeated per face (merge them before checking watertightness)."""
    _mesh(shape, deflection, angle)
    vertices, faces, offset = [], [], 0
    for f in shape.Faces():
        loc = TopLoc_Location()
        tri = BRep_Tool.Triangulation_s(f.wrapped, loc)
        if tri is None:
            raise GeometryError("a face has no triangulation", operation="mesh")
        trsf = loc.Transformation()
        nodes = [tri.Node(i).Transformed(trsf) for i in range(1, tri.NbNodes() + 1)]
        vertices.append(np.array([(p.X(), p.Y(), p.Z()) for p in nodes]))
        t = np.array([(x.Value(1), x.Value(2), x.Value(3)) for x in tri.Triangles()]) - 1
        if f.wrapped.Orientation() == TopAbs_Orientation.TopAbs_REVERSED:
            t = t[:, [0, 2, 1]]
        faces.append(t + offset)
        offset += tri.NbNodes()
    return np.vstack(vertices), np.vstack(faces)


def body_mesh_arrays(shape: cq.Shape, deflection: float, angle: float = 0.25):
    """``mesh_arrays`` without the triangles that have two corners at one point (mm).

    Measured: BRepMesh meshes the degenerate edge at a pointed end (a loft's vertex, the tip
    of ``makeCone``, the poles of ``makeSphere``) with one triangle whose two corners are both
    the tip; it has no area and no volume, but as an edge from the tip to itself it makes the
    merged mesh fail a watertightness test. Without it the mesh is closed."""
    vertices, faces = mesh_arrays(shape, deflection, angle)
    tri = vertices[faces]
    sides = [np.linalg.norm(tri[:, i] - tri[:, (i + 1) % 3], axis=1) for i in range(3)]
    scale = max(float(np.ptp(vertices, axis=0).max()), 1.0)
    return vertices, faces[np.min(sides, axis=0) > 1e-9 * scale]


def write_stl_arrays(vertices: np.ndarray, faces: np.ndarray, path: Path, name: str) -> None:
    """Binary STL of a triangle mesh (mm): 80-byte header, count, then per triangle the unit
    normal, three corners and a zero attribute word (the format's own layout)."""
    tri = vertices[faces].astype(np.float64)
    normals = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
    lengths = np.linalg.norm(normals, axis=1, keepdims=True)
    normals = np.divide(normals, lengths, out=np.zeros_like(normals), where=lengths > 0)
    record = np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("attr", "<u2")])
    data = np.zeros(len(faces), dtype=record)
    data["n"], data["v"] = normals, tri
    header = f"geomgen {name}".encode()[:80].ljust(80, b" ")
    try:
        with open(path, "wb") as out:
            out.write(header)
            out.write(np.uint32(len(faces)).tobytes())
            out.write(data.tobytes())
    except OSError as err:
        raise GeometryError(str(err), part=name, operation="STL export") from err


def write_body_stl(shape: cq.Shape, path: Path, deflection: float, angle: float = 0.25) -> None:
    """Binary STL (mm) of a body with pointed ends (the fuselage), without the tip's zero-area
    triangles (see ``body_mesh_arrays``); ``deflection`` as in ``write_stl``."""
    write_stl_arrays(*body_mesh_arrays(shape, deflection, angle), path, path.stem)
