"""The demo's STEP assembly opened in a general-purpose CAD program: FreeCAD (Debian's
``freecadcmd``, 0.20), importing it as its user interface does.

``tests/clients/freecad_step_tree.py`` runs inside FreeCAD and writes the part tree as JSON;
this test reads it: every part of parts.json by name under one assembly named after the design,
in its colour, one valid closed solid with no free edges, lengths in mm (its bounding box is
parts.json's, in mm, to 0.01 mm), and its volume.

The volume: FreeCAD 0.20's ``Shape.Volume`` integrates with OpenCASCADE's fixed-order Gauss
rule (``BRepGProp::VolumeProperties`` without a tolerance), 0.8 % off on the demo's lofted wing
(measured). So the test checks that FreeCAD's figure is exactly that rule's figure for the
geometry FreeCAD read (OpenCASCADE's own reader and the same rule on the same file, to 1e-9),
and that the adaptive integration of that geometry to 1e-9 equals parts.json within 1e-4.

Marked ``clients`` and ``slow`` (it needs the session's demo build, and FreeCAD takes about
15 s); skipped with the reason when ``freecadcmd`` is not installed.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
from pathlib import Path

import pytest

pytestmark = [pytest.mark.clients, pytest.mark.slow]

FREECAD = shutil.which("freecadcmd")
SCRIPT = Path(__file__).parent / "clients" / "freecad_step_tree.py"


@pytest.fixture(scope="module")
def imported(demo_build, tmp_path_factory: pytest.TempPathFactory) -> dict:
    if FREECAD is None:
        pytest.skip(
            "FreeCAD's freecadcmd is not installed (Debian: apt-get install freecad-python3; "
            ".ci/run installs it)"
        )
    assert demo_build.code == 0, demo_build.stderr
    folder = demo_build.out_root / "veyra-t2"
    scratch = tmp_path_factory.mktemp("freecad")
    env = {
        **os.environ,
        "GEOMGEN_STEP": str(folder / "veyra-t2.step"),
        "GEOMGEN_TREE": str(scratch / "tree.json"),
        "QT_QPA_PLATFORM": "offscreen",  # FreeCAD's window without a display
        "HOME": str(scratch),  # FreeCAD's settings and caches stay in the scratch folder
    }
    done = subprocess.run(
        [FREECAD, str(SCRIPT)], env=env, capture_output=True, text=True, timeout=300
    )
    tree_path = scratch / "tree.json"
    assert tree_path.exists(), (done.returncode, done.stdout[-2000:], done.stderr[-2000:])
    parts = json.loads((folder / "parts.json").read_text(encoding="utf-8"))["parts"]
    return {
        "tree": json.loads(tree_path.read_text(encoding="utf-8")),
        "parts": {p["name"]: p for p in parts},
        "step": folder / "veyra-t2.step",
    }


def _features(imported: dict) -> dict[str, dict]:
    """The imported parts by label; every part of parts.json is one of them (no check below
    can pass on an empty tree)."""
    found = {r["label"]: r for r in imported["tree"]["tree"] if r["type"] == "Part::Feature"}
    assert sorted(found) == sorted(imported["parts"])
    return found


def test_part_tree_holds_every_part_by_name_under_the_design(imported) -> None:
    tree = imported["tree"]["tree"]
    assemblies = [r for r in tree if r["type"] == "App::Part"]
    assert [a["label"] for a in assemblies] == ["veyra-t2"]  # the design's name
    features = _features(imported)
    assert sorted(features) == sorted(imported["parts"])
    assert len(features) == len([r for r in tree if r["type"] == "Part::Feature"])  # no twins
    assert {f["parent"] for f in features.values()} == {"veyra-t2"}


def test_every_part_has_the_colour_of_its_kind(imported) -> None:
    # README: every part named and coloured; the colour of each kind is geomgen.solids.step's
    from geomgen.solids.step import COLOURS

    for name, row in _features(imported).items():
        want = COLOURS[name.split("-")[0]]
        assert row["colour"] == pytest.approx(want, abs=1e-6), name
        assert row["face_colours"] == [pytest.approx(want, abs=1e-6)], name  # every face


def test_every_part_is_one_valid_closed_solid(imported) -> None:
    for name, row in _features(imported).items():
        assert row["shape_type"] == "Solid", name
        assert row["valid"], name
        assert (row["solids"], row["shells"]) == (1, 1), name
        assert row["closed"] == [True], name
        assert row["free_edges"] == 0, name


def test_lengths_come_in_as_millimetres(imported) -> None:
    assert imported["tree"]["length_unit"] == "mm"
    for name, row in _features(imported).items():
        box = imported["parts"][name]["bounding_box"]
        assert imported["parts"][name]["volume"]["unit"] == "mm^3"
        assert box["unit"] == "mm"
        assert row["box"] == pytest.approx([*box["min"], *box["max"]], abs=0.01), name


def _occt_volumes(step: Path) -> dict[str, tuple[float, float]]:
    """OpenCASCADE's own reading of the file: each named part's volume by the fixed-order
    Gauss rule and by the adaptive rule to 1e-9 (mm^3)."""
    import cadquery as cq
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    out = {}
    for name, shape in _named_shapes(cq, step).items():
        fixed, adaptive = GProp_GProps(), GProp_GProps()
        BRepGProp.VolumeProperties_s(shape, fixed)
        BRepGProp.VolumeProperties_s(shape, adaptive, 1e-9)
        out[name] = (fixed.Mass(), adaptive.Mass())
    return out


def _named_shapes(cq, step: Path) -> dict:
    """The parts of a STEP assembly by name, read with OCAF (names from the product labels)."""
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.STEPCAFControl import STEPCAFControl_Reader
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name
    from OCP.TDF import TDF_LabelSequence
    from OCP.TDocStd import TDocStd_Document
    from OCP.XCAFDoc import XCAFDoc_DocumentTool

    doc = TDocStd_Document(TCollection_ExtendedString("step"))
    reader = STEPCAFControl_Reader()
    reader.SetNameMode(True)
    assert reader.ReadFile(str(step)) == IFSelect_RetDone
    assert reader.Transfer(doc)
    tool = XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())
    labels = TDF_LabelSequence()
    tool.GetShapes(labels)
    out = {}
    for i in range(1, labels.Length() + 1):
        label = labels.Value(i)
        if tool.IsAssembly_s(label):
            continue
        attr = TDataStd_Name()
        if label.FindAttribute(TDataStd_Name.GetID_s(), attr):
            out[attr.Get().ToExtString()] = tool.GetShape_s(label)
    return out


def test_volumes_equal_parts_json(imported) -> None:
    occt = _occt_volumes(imported["step"])
    for name, row in _features(imported).items():
        fixed, adaptive = occt[name]
        # FreeCAD read the same geometry: its volume is the fixed rule's, digit for digit
        assert row["volume"] == pytest.approx(fixed, rel=1e-9), name
        # and that geometry's volume, integrated to 1e-9, is the one geomgen reported
        assert adaptive == pytest.approx(imported["parts"][name]["volume"]["value"], rel=1e-4)
