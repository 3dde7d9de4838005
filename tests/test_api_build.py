"""The API's build (geomgen.Design.build) against the CLI's: the same files byte for byte,
and its shapes, meshes and checks equal to what the CLI wrote."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import numpy as np
import pytest
import trimesh
from designs import DEMO

import geomgen
from geomgen.errors import InputError

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def api_build(demo_build, tmp_path_factory: pytest.TempPathFactory) -> geomgen.Build:
    """The demo built through the API into a new folder that starts with a copy of the CLI
    build's cache (a cached build is byte-identical to a clean one: tests/test_one_path.py)."""
    out = tmp_path_factory.mktemp("api-build")
    shutil.copytree(demo_build.out_root / ".cache", out / ".cache")
    return geomgen.load(DEMO).build(out)


def _cli_folder(demo_build) -> Path:
    return demo_build.out_root / "veyra-t2"


def test_the_api_build_writes_the_cli_files(api_build, demo_build) -> None:
    cli = _cli_folder(demo_build)
    names = sorted(p.relative_to(cli) for p in cli.rglob("*") if p.is_file())
    assert names == sorted(
        p.relative_to(api_build.folder) for p in api_build.folder.rglob("*") if p.is_file()
    )
    for rel in names:
        assert (cli / rel).read_bytes() == (api_build.folder / rel).read_bytes(), rel


def test_the_sizing_and_checks_are_the_cli_files(api_build, demo_build) -> None:
    cli = _cli_folder(demo_build)
    assert api_build.sizing().report == json.loads((cli / "report.json").read_text())
    written = json.loads((cli / "checks.json").read_text())
    checks = api_build.checks()
    assert len(checks) == written["count"] == api_build.result.checks
    assert [c.as_dict() for c in checks] == written["checks"]
    assert all(c.passed for c in checks)


def test_the_meshes_are_the_cli_stl_files(api_build, demo_build) -> None:
    """Each mesh against the CLI's STL file read by trimesh (an independent STL reader)."""
    meshes = api_build.meshes()
    stl = sorted((_cli_folder(demo_build) / "stl").glob("*.stl"))
    assert sorted(meshes) == [p.stem for p in stl]
    for path in stl:
        theirs = trimesh.load(path, process=True)
        ours = meshes[path.stem]
        assert ours.faces.shape == theirs.faces.shape
        np.testing.assert_array_equal(
            np.unique(ours.vertices, axis=0), np.unique(theirs.vertices, axis=0)
        )
        as_trimesh = ours.trimesh()
        assert as_trimesh.is_watertight
        assert as_trimesh.volume == pytest.approx(theirs.volume, rel=1e-9)


def test_the_shapes_are_the_parts(api_build, demo_build) -> None:
    """The shapes read back from the STEP file: named as the parts, their volumes those of
    parts.json (integrated by OpenCASCADE at eps 1e-5, which is a few 1e-4 off on read-back
    surfaces: solids.step.read_step)."""
    from geomgen.solids.kernel import volume

    parts = json.loads((_cli_folder(demo_build) / "parts.json").read_text())["parts"]
    shapes = api_build.shapes()
    assert sorted(shapes) == sorted(p["name"] for p in parts)
    for p in parts:
        assert volume(shapes[p["name"]], eps=1e-5) == pytest.approx(p["volume"]["value"], rel=1e-3)


def test_write_copies_each_kind(api_build, demo_build, tmp_path: Path) -> None:
    api_build.write(tmp_path / "a", ["stl", "step"])
    cli = _cli_folder(demo_build)
    for path in (cli / "stl").glob("*.stl"):
        assert (tmp_path / "a" / "stl" / path.name).read_bytes() == path.read_bytes()
    assert (tmp_path / "a" / "veyra-t2.step").read_bytes() == (cli / "veyra-t2.step").read_bytes()
    assert not (tmp_path / "a" / "report.json").exists()
    with pytest.raises(InputError, match="unknown output kind 'stls'"):
        api_build.write(tmp_path / "b", ["stls"])


def test_a_build_shows_the_3d_view_in_a_notebook(api_build) -> None:
    import html

    shown = api_build._repr_html_()
    assert "<iframe srcdoc=" in shown
    page = (api_build.folder / "report.html").read_text(encoding="utf-8")
    start = shown.index('srcdoc="') + 8
    framed = shown[start : shown.index('" style=', start)]
    assert html.unescape(framed) == page  # the page itself, with its 3D view
    assert 'id="view3d"' in page or "id='view3d'" in page
