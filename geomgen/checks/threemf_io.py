"""3MF files of the printed model's pieces (meshes in model millimetres, model frame x aft,
y right, z up): a writer that gives the same bytes for the same pieces, a reader, and the
check that a written file reads back with the same pieces and volumes.
"""

from __future__ import annotations

import io
import re
import uuid
import zipfile
from pathlib import Path
from xml.etree import ElementTree

import numpy as np
import trimesh

from geomgen.checks.common import Check, _abs, load_mesh

#: fixed UUID namespace so a written 3MF is byte-identical run after run
_UUID_NAMESPACE = uuid.UUID("6f1c2d8e-3b0a-5e47-9a16-2c5d8b7e4f90")
_UUID_ATTR = re.compile(rb'(UUID=")[0-9a-fA-F-]{36}(")')


def _meshes_in_3mf_xml(model_xml: bytes) -> tuple[str | None, list[str]]:
    """The ``unit`` attribute of a 3MF model part and the names of its mesh objects, in order."""
    root = ElementTree.fromstring(model_xml)
    names = [
        obj.get("name", "")
        for obj in root.iter()
        if obj.tag.endswith("}object") and any(c.tag.endswith("}mesh") for c in obj)
    ]
    return root.get("unit"), names


def _fixed_uuids(model_xml: bytes) -> bytes:
    """The XML with every UUID attribute replaced, in order, by one derived from its index."""
    counter = iter(range(len(model_xml)))

    def replace(m: re.Match) -> bytes:
        fixed = uuid.uuid5(_UUID_NAMESPACE, str(next(counter)))
        return m.group(1) + str(fixed).encode() + m.group(2)

    return _UUID_ATTR.sub(replace, model_xml)


def shared_vertices(vertices, faces) -> tuple[np.ndarray, np.ndarray]:
    """The same triangles with each vertex position stored once (exact equality), vertices in
    the order of their first appearance, faces pointing at them."""
    v = np.asarray(vertices, dtype=np.float64)
    f = np.asarray(faces, dtype=np.int64)
    _, first, inverse = np.unique(v, axis=0, return_index=True, return_inverse=True)
    order = np.argsort(first)  # unique rows in order of first appearance
    rank = np.empty_like(order)
    rank[order] = np.arange(len(order))
    return v[first[order]], rank[inverse.reshape(-1)][f]


def write_3mf(pieces: dict[str, tuple[np.ndarray, np.ndarray]], path: Path) -> None:
    """Write every piece (vertices mm, faces) as its own named 3MF object, unit millimetre, in
    the model frame (no placement transform), objects sorted by name. Vertices of exactly
    equal coordinates are written once (:func:`shared_vertices`): 3MF is an indexed format,
    and a slicer reading it (PrusaSlicer 2.5) took the mesher's per-face copies of the edge
    vertices for open seams (180 open edges on an aileron piece whose STL it read as
    manifold). The exporter's random UUIDs and the zip dates are replaced by fixed ones, so
    the same pieces give a byte-identical file."""
    if "world" in pieces:
        raise ValueError('"world" is the scene root\'s name and cannot name a piece')
    scene = trimesh.Scene()
    for name in sorted(pieces):
        vertices, faces = shared_vertices(*pieces[name])
        mesh = trimesh.Trimesh(vertices=vertices, faces=faces, process=False)
        scene.add_geometry(mesh, geom_name=name, node_name=name)
    data = trimesh.exchange.threemf.export_3MF(scene)
    out = io.BytesIO()
    with (
        zipfile.ZipFile(io.BytesIO(data)) as src,
        zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as dst,
    ):
        for info in src.infolist():
            content = src.read(info.filename)
            if info.filename.endswith(".model"):
                unit, names = _meshes_in_3mf_xml(content)
                if unit != "millimeter" or names != sorted(pieces):
                    raise RuntimeError(
                        f"3MF exporter wrote unit={unit!r} and objects {names}, expected "
                        f"millimeter and {sorted(pieces)}"
                    )
                content = _fixed_uuids(content)
            fixed = zipfile.ZipInfo(info.filename, date_time=(1980, 1, 1, 0, 0, 0))
            fixed.compress_type = zipfile.ZIP_DEFLATED
            dst.writestr(fixed, content)
    Path(path).write_bytes(out.getvalue())


def read_3mf(path: Path) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """Every object of a 3MF file as name -> (vertices mm, faces), with the file's placement
    transforms applied, vertices as stored (not merged), sorted by name. The name is the
    build item's (trimesh takes it from ``partnumber``, else from the object's ``name``)."""
    scene = trimesh.load(str(path), file_type="3mf", force="scene", process=False)
    unit = scene.metadata.get("units", "millimeter")
    if not str(unit).startswith("millimeter"):
        raise ValueError(f"{path}: 3MF unit is {unit!r}, expected millimeter")
    out: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    for node in sorted(scene.graph.nodes_geometry):
        transform, geometry = scene.graph[node]
        mesh = scene.geometry[geometry]
        vertices = trimesh.transformations.transform_points(
            np.asarray(mesh.vertices, dtype=np.float64), transform
        )
        out[node] = (vertices, np.asarray(mesh.faces, dtype=np.int64))
    return out


def threemf_check(
    written: dict[str, tuple[np.ndarray, np.ndarray]],
    read: dict[str, tuple[np.ndarray, np.ndarray]],
) -> Check:
    """The 3MF file read back holds the same pieces, each with the volume written (1e-6)."""
    ok = sorted(written) == sorted(read)
    worst = 0.0
    if ok:
        for name, (v, f) in written.items():
            a = load_mesh(v, f).volume
            b = load_mesh(*read[name]).volume
            worst = max(worst, abs(a - b) / abs(a))
    return _abs(
        "3MF reads back with the same pieces and volumes",
        "3MF",
        worst if ok else float("inf"),
        0.0,
        1e-6,
        "1",
    )
