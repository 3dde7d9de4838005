"""Run by FreeCAD's own interpreter (``freecadcmd``), not by pytest: imports the STEP file named
by the environment variable GEOMGEN_STEP the way FreeCAD's user interface does (its window made
offscreen, so the importer keeps each part's colour) and writes the part tree as JSON: every
object with its label, type, parent, colour
(RGB 0..1) and, for a shape, its validity, solids, closedness, volume (mm^3, FreeCAD's own
figure) and bounding box (mm) in the document's frame. The JSON goes to the file named by
GEOMGEN_TREE (FreeCAD's console cuts long printed lines).
"""

import json
import os
import sys

import FreeCAD
import FreeCADGui

FreeCADGui.showMainWindow()  # the importer colours parts only through the window's views
import ImportGui  # noqa: E402  (needs the window above)


def parent_of(obj):
    """The label of the assembly (App::Part) holding ``obj``, or None."""
    parents = [p for p in obj.InList if p.TypeId == "App::Part"]
    return parents[0].Label if parents else None


def shape_facts(obj):
    """What a CAD user checks of an imported part, in the document's frame."""
    shape = obj.Shape.copy()
    shape.Placement = obj.getGlobalPlacement()
    box = shape.optimalBoundingBox() if hasattr(shape, "optimalBoundingBox") else shape.BoundBox
    return {
        "shape_type": shape.ShapeType,
        "valid": shape.isValid(),
        "solids": len(shape.Solids),
        "shells": len(shape.Shells),
        "closed": [s.isClosed() for s in shape.Solids],
        "free_edges": len(shape.Shells[0].getFreeEdges().Edges) if shape.Shells else None,
        "volume": shape.Volume,
        "box": [box.XMin, box.YMin, box.ZMin, box.XMax, box.YMax, box.ZMax],
    }


def main():
    doc = FreeCAD.newDocument("imported")
    ImportGui.insert(os.environ["GEOMGEN_STEP"], doc.Name, merge=False, useLinkGroup=False, mode=0)
    tree = []
    for obj in doc.Objects:
        if obj.TypeId not in ("App::Part", "Part::Feature"):
            continue  # the origin's axes and planes
        row = {"label": obj.Label, "type": obj.TypeId, "parent": parent_of(obj)}
        if obj.TypeId == "Part::Feature":
            row["colour"] = list(obj.ViewObject.ShapeColor[:3])
            row["face_colours"] = sorted({tuple(c[:3]) for c in obj.ViewObject.DiffuseColor})
            row.update(shape_facts(obj))
        tree.append(row)
    # FreeCAD keeps lengths in mm inside; the user's unit schema shows them in this unit
    unit = FreeCAD.Units.Quantity(1.0, FreeCAD.Units.Length).getUserPreferred()[2]
    out = {"tree": tree, "length_unit": unit, "version": FreeCAD.Version()[:3]}
    with open(os.environ["GEOMGEN_TREE"], "w", encoding="utf-8") as f:
        json.dump(out, f)
    sys.stdout.write("GEOMGEN-TREE written\n")


main()
