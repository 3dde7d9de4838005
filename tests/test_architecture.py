"""The module map is enforced, not just described (see DEVELOPERS.md)."""

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "geomgen"

#: heavy libraries and the only module allowed to import each
OWNERS = {"cadquery": "cad.py", "OCP": "cad.py", "trimesh": "checks.py"}
#: modules of pure math that may import no CAD or mesh library at all
PURE = [
    "units.py",
    "fields.py",
    "design.py",
    "atmosphere.py",
    "planform.py",
    "sizing.py",
    "layout.py",
    "airfoils.py",
    "report.py",
    "sections.py",
    "fuselage.py",
    "drawing.py",
    "shopfiles.py",
    "templates.py",
    "html_report.py",
]


def imported_roots(path: Path) -> set[str]:
    roots = set()
    for node in ast.walk(ast.parse(path.read_text(), filename=str(path))):
        if isinstance(node, ast.Import):
            roots |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            roots.add(node.module.split(".")[0])
    return roots


@pytest.mark.parametrize("path", sorted(PACKAGE.glob("*.py")), ids=lambda p: p.name)
def test_heavy_libraries_are_imported_by_their_owner_only(path):
    for library, owner in OWNERS.items():
        if library in imported_roots(path):
            assert path.name == owner, f"{path.name} imports {library}; only {owner} may"


@pytest.mark.parametrize("name", PURE)
def test_pure_modules_import_no_cad_or_mesh_library(name):
    assert not imported_roots(PACKAGE / name) & set(OWNERS)


def test_no_unsafe_yaml_or_eval():
    for path in PACKAGE.glob("*.py"):
        tree = ast.parse(path.read_text())
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute):
                assert not (
                    node.func.attr == "load" and getattr(node.func.value, "id", "") == "yaml"
                ), f"{path.name}: use yaml.safe_load"
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
                assert node.func.id not in {"eval", "exec"}, f"{path.name} calls {node.func.id}"
