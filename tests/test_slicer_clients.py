"""The printed model's pieces in a 3D-printing slicer: PrusaSlicer's command line (Debian's
``prusa-slicer``, 2.5; no display needed for these actions).

``--info`` reads every STL and the 3MF: each piece one manifold part, with nothing repaired
(no open, fixed or reversed edges or facets). ``--export-gcode`` slices each piece laid as the
parts list says (its print face down, turned about z to fit the bed best) on a printer
of the design's ``model`` settings (build volume, nozzle): PrusaSlicer refuses a piece that
does not fit the bed ("Objects could not fit on the bed") or exceeds the height, so a G-code
file for every piece is the fit, and its print time and filament are read from the G-code.

Marked ``clients`` and ``slow`` (it needs the session's printed model); skipped with the
reason when ``prusa-slicer`` is not installed.
"""

from __future__ import annotations

import csv
import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest
import trimesh
from designs import DEMO

from geomgen.design import load

pytestmark = [pytest.mark.clients, pytest.mark.slow]

SLICER = shutil.which("prusa-slicer")
#: what ``--info`` says of a mesh it had to mend (PrusaSlicer's repair statistics)
REPAIRS = (
    "open_edges",
    "degenerate_facets",
    "edges_fixed",
    "facets_removed",
    "facets_reversed",
    "backwards_edges",
)


def _run(*args: str, cwd: Path) -> subprocess.CompletedProcess:
    if SLICER is None:
        pytest.skip(
            "PrusaSlicer's prusa-slicer is not installed (Debian: apt-get install "
            "prusa-slicer; .ci/run installs it)"
        )
    return subprocess.run(
        [SLICER, "--loglevel", "1", *args],
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=600,
        env={"HOME": str(cwd), "PATH": "/usr/bin:/bin"},  # its settings stay in the scratch
    )


def _info_blocks(text: str) -> list[dict[str, str]]:
    """``--info`` output: one ``[file]`` block of ``key = value`` lines per object."""
    blocks: list[dict[str, str]] = []
    for line in text.splitlines():
        if re.fullmatch(r"\[.+\]", line.strip()):
            blocks.append({"file": line.strip()[1:-1]})
        elif blocks and " = " in line:
            key, value = line.split(" = ", 1)
            blocks[-1][key.strip()] = value.strip()
    return blocks


def _assert_clean(block: dict[str, str]) -> None:
    assert block.get("manifold") == "yes", block
    assert not [k for k in REPAIRS if k in block and float(block[k]) != 0], block


def test_every_stl_piece_and_the_3mf_read_as_manifold_without_repairs(demo_model, tmp_path):
    stls = sorted((demo_model / "stl").glob("*.stl"))
    done = _run("--info", *map(str, stls), cwd=tmp_path)
    assert done.returncode == 0, done.stderr[-2000:]
    blocks = _info_blocks(done.stdout)
    assert [b["file"] for b in blocks] == [p.name for p in stls]
    for block in blocks:
        _assert_clean(block)
    threemf = demo_model / "veyra-t2-model.3mf"
    done = _run("--info", str(threemf), cwd=tmp_path)
    assert done.returncode == 0, done.stderr[-2000:]
    objects = _info_blocks(done.stdout)
    assert len(objects) == len(stls)  # one object per piece
    for block in objects:
        _assert_clean(block)
    # the same pieces: the 3MF's volumes are the STLs' (as PrusaSlicer measures both)
    assert sorted(float(b["volume"]) for b in objects) == pytest.approx(
        sorted(float(b["volume"]) for b in blocks), rel=1e-5
    )


@pytest.mark.xfail(
    strict=True,
    reason="known defect found by this test: the demo's fuselage-4 piece holds a loose "
    "5.7 mm^3 sliver (model x 584-588 mm, z 77 mm) beside its body; "
    "PrusaSlicer counts 2 parts",
)
def test_every_piece_is_one_part(demo_model, tmp_path):
    stls = sorted((demo_model / "stl").glob("*.stl"))
    done = _run("--info", *map(str, stls), cwd=tmp_path)
    assert done.returncode == 0, done.stderr[-2000:]
    several = [b["file"] for b in _info_blocks(done.stdout) if b.get("number_of_parts") != "1"]
    assert several == []


def _print_normals(folder: Path) -> dict[str, np.ndarray]:
    """The print face's outward normal of each piece, from parts.csv ('(face normal -y)' or
    '(face normal (+0.094, +0.007, -0.996))')."""
    axes = {"x": (1, 0, 0), "y": (0, 1, 0), "z": (0, 0, 1)}
    out = {}
    with (folder / "parts.csv").open(encoding="utf-8") as f:
        for row in csv.DictReader(f):
            words = row["print with"]
            tilted = re.search(r"face normal \(([-+\d., ]+)\)", words)
            square = re.search(r"face normal ([+-])([xyz])", words)
            if tilted:
                n = np.array([float(v) for v in tilted.group(1).split(",")])
            else:
                assert square, words
                n = np.array(axes[square.group(2)], dtype=float)
                n *= 1.0 if square.group(1) == "+" else -1.0
            out[row["piece"]] = n / np.linalg.norm(n)
    return out


def _laid_down(mesh: trimesh.Trimesh, normal: np.ndarray, bed: tuple[float, float]):
    """The piece turned so that its print face's normal points down (-z), then about z to the
    angle (whole degrees) at which its footprint fits the bed with the most room, as a user
    places a long piece across the bed's diagonal."""
    laid = mesh.copy()
    laid.apply_transform(trimesh.geometry.align_vectors(normal, [0.0, 0.0, -1.0]))
    xy = laid.vertices[:, :2]

    def crowding(deg: float) -> float:
        a = np.radians(deg)
        turned = xy @ np.array([[np.cos(a), np.sin(a)], [-np.sin(a), np.cos(a)]])
        extent = turned.max(axis=0) - turned.min(axis=0)
        return float(max(extent[0] / bed[0], extent[1] / bed[1]))

    best = min(range(180), key=crowding)
    laid.apply_transform(trimesh.transformations.rotation_matrix(np.radians(best), (0, 0, 1)))
    return laid


def _minutes(text: str) -> float:
    """'1h 23m 23s' -> minutes."""
    units = {"d": 1440.0, "h": 60.0, "m": 1.0, "s": 1.0 / 60.0}
    return sum(float(v) * units[u] for v, u in re.findall(r"(\d+)([dhms])", text))


def test_every_piece_slices_within_the_build_volume(demo_model, tmp_path):
    spec = load(DEMO).model  # the design's printer: model.build_volume, model.nozzle_diameter
    bx, by, bz = (v * 1000.0 for v in spec.build_volume)
    normals = _print_normals(demo_model)
    stls = sorted((demo_model / "stl").glob("*.stl"))
    assert sorted(p.stem for p in stls) == sorted(normals)
    printer = [
        "--bed-shape",
        f"0x0,{bx:g}x0,{bx:g}x{by:g},0x{by:g}",
        "--max-print-height",
        f"{bz:g}",
        "--nozzle-diameter",
        f"{spec.nozzle_diameter * 1000:g}",
    ]
    for stl in stls:
        laid = _laid_down(trimesh.load(stl, process=True), normals[stl.stem], (bx, by))
        assert laid.is_watertight, stl.stem
        laid_path = tmp_path / stl.name
        laid.export(laid_path)
        gcode = tmp_path / f"{stl.stem}.gcode"
        done = _run("--export-gcode", *printer, "-o", str(gcode), str(laid_path), cwd=tmp_path)
        assert done.returncode == 0, (stl.stem, done.stderr[-1500:])
        assert "error" not in done.stderr.lower(), (stl.stem, done.stderr[-1500:])
        text = gcode.read_text(encoding="utf-8", errors="replace")
        time_m = re.search(r"^; estimated printing time \(normal mode\) = (.+)$", text, re.M)
        filament = re.search(r"^; filament used \[cm3\] = ([\d.]+)$", text, re.M)
        assert time_m and filament, stl.stem
        assert _minutes(time_m.group(1)) > 0
        # filament laid down is at most the solid piece (default sparse infill) and more than
        # nothing; PrusaSlicer's own volume of the mesh in mm^3 -> cm^3
        assert 0 < float(filament.group(1)) <= laid.volume / 1000.0 * 1.05, stl.stem
