"""Bad design files: every one is refused with exit code 2 and one clear line on stderr.

Each case starts from the demo design (examples/veyra-t2.yaml), breaks one thing, and runs
``geomgen size`` in-process. The line must start with ``geomgen: error: ``, name the file and
the key path, say what is allowed, and nothing may be written to the output folder.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest
import yaml
from designs import DEMO, demo_document

from geomgen import design
from geomgen.cli import main

DEMO_TEXT = DEMO.read_text(encoding="utf-8")


# --- ways of making a bad design file -----------------------------------------------------------


def _step(node: Any, key: str) -> Any:
    return node[int(key)] if isinstance(node, list) else node[key]


def put(path: str, value: Any) -> Callable[[dict], None]:
    """Set the value at a dotted path ("wing.panels.1.span_fraction") of the demo."""

    def mutate(doc: dict) -> None:
        *parents, last = path.split(".")
        node = doc
        for key in parents:
            node = _step(node, key)
        if isinstance(node, list):
            node[int(last)] = value
        else:
            node[last] = value

    return mutate


def drop(path: str) -> Callable[[dict], None]:
    """Remove the key at a dotted path of the demo."""

    def mutate(doc: dict) -> None:
        *parents, last = path.split(".")
        node = doc
        for key in parents:
            node = _step(node, key)
        del node[last]

    return mutate


def both(*mutations: Callable[[dict], None]) -> Callable[[dict], None]:
    def mutate(doc: dict) -> None:
        for m in mutations:
            m(doc)

    return mutate


def swap_wing_panels(doc: dict) -> None:
    doc["wing"]["panels"].reverse()


def from_demo(mutate: Callable[[dict], None]) -> Callable[[Path], Path]:
    def build(folder: Path) -> Path:
        doc = demo_document()
        mutate(doc)
        path = folder / "bad-design.yaml"
        path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
        return path

    return build


def raw(text: str | bytes) -> Callable[[Path], Path]:
    def build(folder: Path) -> Path:
        path = folder / "bad-design.yaml"
        if isinstance(text, bytes):
            path.write_bytes(text)
        else:
            path.write_text(text, encoding="utf-8")
        return path

    return build


def missing_file(folder: Path) -> Path:
    return folder / "no-such-design.yaml"


def a_directory(folder: Path) -> Path:
    path = folder / "design-folder.yaml"
    path.mkdir()
    return path


def oversized(folder: Path) -> Path:
    path = folder / "huge-design.yaml"
    padding = "# padding\n" * (design.MAX_DESIGN_BYTES // 10 + 1)
    path.write_text(DEMO_TEXT + padding, encoding="utf-8")
    assert path.stat().st_size > design.MAX_DESIGN_BYTES
    return path


def oversized_malformed(folder: Path) -> Path:
    """Over the size limit and not YAML at all: the size is refused before any parsing."""
    path = folder / "huge-design.yaml"
    path.write_text("wing: [unclosed\n" + "x" * design.MAX_DESIGN_BYTES, encoding="utf-8")
    return path


def with_section_file(text: str | bytes, key: str = "wing.root_airfoil") -> Callable[[Path], Path]:
    """The demo with one section read from a coordinate file written beside the design."""

    def build(folder: Path) -> Path:
        section = folder / "bad-section.dat"
        if isinstance(text, bytes):
            section.write_bytes(text)
        else:
            section.write_text(text, encoding="utf-8")
        return from_demo(put(key, section.name))(folder)

    return build


def _pairs(points: list[tuple[float, float]]) -> str:
    return "made-up section\n" + "".join(f"{x:.4f} {y:.4f}\n" for x, y in points)


#: a section outline that stops short: the lower surface ends at mid-chord
UNCLOSED_SECTION = _pairs(
    [(1 - i / 20, 0.06 * (1 - i / 20)) for i in range(21)] + [(i / 20, -0.04) for i in range(1, 11)]
)
#: nine points: one short of coordinates.MIN_FILE_POINTS
TOO_FEW_POINTS = _pairs(
    [(1, 0), (0.75, 0.04), (0.5, 0.06), (0.25, 0.05), (0, 0)]
    + [(0.25, -0.04), (0.5, -0.04), (0.75, -0.02), (1, 0.001)]
)
#: upper and lower surfaces swap sides twice: a figure-of-eight outline
CROSSING_SECTION = _pairs(
    [(1, 0), (0.75, 0.05), (0.5, -0.05), (0.25, 0.05), (0, 0), (0.25, -0.05), (0.5, 0.05)]
    + [(0.75, -0.05), (0.9, 0.01), (0.95, 0.02), (1, 0.001)]
)


def _replace_fuselage(text: str) -> str:
    """The demo with its fuselage section replaced by ``text`` (YAML, top level)."""
    start, end = DEMO_TEXT.index("fuselage:"), DEMO_TEXT.index("model:")
    return DEMO_TEXT[:start] + text + DEMO_TEXT[end:]


#: 100 000 fuselage stations in 0.4 MB, written with one alias each
ALIAS_STATIONS = _replace_fuselage(
    'station: &st {x: "1 m", width: "0.5 m", height: "0.5 m"}\n'
    "fuselage:\n  stations: [" + ", ".join(["*st"] * 100_000) + "]\n"
)

#: mappings nested through aliases: 6 levels of 10 keys, 10^6 values
ALIAS_MAPPING_BOMB = (
    "m0: &m0 {a: x, b: x, c: x, d: x, e: x, f: x, g: x, h: x, i: x, j: x}\n"
    + "".join(
        f"m{i}: &m{i} {{" + ", ".join(f"{k}: *m{i - 1}" for k in "abcdefghij") + "}\n"
        for i in range(1, 6)
    )
)


#: 400 bytes of YAML whose aliases expand to 10^9 strings
ALIAS_BOMB = "a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n" + "".join(
    f"a{i}: &a{i} [{', '.join([f'*a{i - 1}'] * 10)}]\n" for i in range(1, 9)
)


@dataclass(frozen=True)
class Case:
    id: str
    build: Callable[[Path], Path]
    key: str | None  # expected key path in the message (None: the fault is the whole file)
    allowed: str  # words of the message saying what is allowed or what went wrong


CASES = [
    # --- the file itself ---
    Case(
        "malformed-yaml",
        raw("name: veyra-t2\nwing: [unclosed\n  aspect_ratio: 7\n"),
        None,
        "malformed YAML",
    ),
    Case("yaml-list", raw("- name: veyra-t2\n- wing: {}\n"), None, "mapping of keys"),
    Case("empty-file", raw(""), None, "is empty"),
    Case("duplicate-key", raw(DEMO_TEXT + "name: second-name\n"), None, "written twice"),
    Case(
        "python-object-tag",
        raw('name: !!python/object/apply:os.system ["echo unsafe"]\n'),
        None,
        "malformed YAML",
    ),
    Case("not-utf8", raw(b"name: veyra\xff\xfe\n"), None, "UTF-8"),
    Case("missing-file", missing_file, None, "cannot read"),
    Case("directory", a_directory, None, "not a file"),
    Case("over-size-limit", oversized, None, f"at most {design.MAX_DESIGN_BYTES}"),
    Case("alias-expansion", raw(ALIAS_BOMB), None, f"more than {design.MAX_DESIGN_VALUES}"),
    # --- keys ---
    Case(
        "missing-stall-speed",
        from_demo(drop("requirements.stall_speed")),
        "requirements.stall_speed",
        "missing required key",
    ),
    Case("unknown-top-level-key", from_demo(put("wingspan", "10 m")), "wingspan", "allowed here"),
    Case(
        "unknown-nested-key",
        from_demo(put("wing.aspect_ration", 7.8)),
        "wing.aspect_ration",
        "allowed here",
    ),
    Case(
        "optional-key-left-empty",
        from_demo(put("wing.controls.aileron", None)),
        "wing.controls.aileron",
        "leave the key out",
    ),
    Case("name-with-slash", from_demo(put("name", "../veyra")), "name", "letters, digits"),
    # --- units ---
    Case(
        "stall-speed-in-kg",
        from_demo(put("requirements.stall_speed", "52 kg")),
        "requirements.stall_speed",
        "must be a speed",
    ),
    Case(
        "stall-speed-bare-number",
        from_demo(put("requirements.stall_speed", 52)),
        "requirements.stall_speed",
        "with a unit",
    ),
    Case(
        "stall-speed-unknown-unit",
        from_demo(put("requirements.stall_speed", "52 knotz")),
        "requirements.stall_speed",
        "unknown unit",
    ),
    Case(
        "aspect-ratio-with-unit",
        from_demo(put("wing.aspect_ratio", "7 m")),
        "wing.aspect_ratio",
        "plain number",
    ),
    # --- values out of range ---
    Case(
        "negative-gross-weight",
        from_demo(put("requirements.gross_weight", "-650 kg")),
        "requirements.gross_weight",
        "[0.01, 1e+06] N",
    ),
    Case(
        "stall-speed-near-zero",
        from_demo(put("requirements.stall_speed", "0.001 m/s")),
        "requirements.stall_speed",
        "[1, 150] m/s",
    ),
    Case("wing-area-zero", from_demo(put("wing.area", "0 m^2")), "wing.area", "[0.001, 1000] m^2"),
    Case(
        "taper-ratio-zero",
        from_demo(put("horizontal_tail.taper_ratio", 0)),
        "horizontal_tail.taper_ratio",
        "[0.02, 1.5]",
    ),
    Case(
        "taper-ratio-negative",
        from_demo(put("horizontal_tail.taper_ratio", -0.2)),
        "horizontal_tail.taper_ratio",
        "[0.02, 1.5]",
    ),
    Case(
        "aspect-ratio-zero",
        from_demo(put("wing.aspect_ratio", 0)),
        "wing.aspect_ratio",
        "[0.1, 40]",
    ),
    Case(
        "hinge-at-1.2",
        from_demo(put("vertical_tail.controls.rudder.hinge_at", 1.2)),
        "vertical_tail.controls.rudder.hinge_at",
        "(0, 1)",
    ),
    Case(
        "hinge-at-0",
        from_demo(put("vertical_tail.controls.rudder.hinge_at", 0)),
        "vertical_tail.controls.rudder.hinge_at",
        "(0, 1)",
    ),
    Case(
        "altitude-30-km",
        from_demo(put("requirements.altitude", "30 km")),
        "requirements.altitude",
        "[0, 20000] m",
    ),
    Case(
        "altitude-below-zero",
        from_demo(put("requirements.altitude", "-100 m")),
        "requirements.altitude",
        "[0, 20000] m",
    ),
    Case(
        "cl-max-word",
        from_demo(put("requirements.cl_max", "high")),
        "requirements.cl_max",
        "plain number",
    ),
    Case(
        "cl-max-nan",
        raw(DEMO_TEXT.replace("cl_max: 1.7", "cl_max: .nan")),
        "requirements.cl_max",
        "[0.1, 5]",
    ),
    Case(
        "sweep-at-word",
        from_demo(put("horizontal_tail.sweep_at", "leading edge")),
        "horizontal_tail.sweep_at",
        "plain number",
    ),
    # --- control surfaces ---
    Case(
        "aileron-past-tip-length",
        from_demo(put("wing.controls.aileron.span_end", "12 m")),
        "wing.controls.aileron.span_end",
        "semi-span",
    ),
    Case(
        "aileron-past-tip-fraction",
        from_demo(put("wing.controls.aileron.span_end", 1.3)),
        "wing.controls.aileron.span_end",
        "[0, 1]",
    ),
    Case(
        "aileron-ends-inboard-of-start",
        from_demo(put("wing.controls.aileron.span_end", 0.3)),
        "wing.controls.aileron.span_end",
        "outboard of span_start",
    ),
    Case(
        "constant-fraction-hinge-list",
        from_demo(put("wing.controls.flap.hinge_at", [0.74, 0.72])),
        "wing.controls.flap.hinge_at",
        "hinge: straight",
    ),
    Case(
        "common-hinge-on-rudder",
        from_demo(put("vertical_tail.controls.rudder.common_hinge", True)),
        "vertical_tail.controls.rudder.common_hinge",
        "only an elevator",
    ),
    Case(
        "aileron-overlaps-flap",
        from_demo(put("wing.controls.flap.span_end", 0.6)),
        "wing.controls.flap.span_start",
        "may not share span",
    ),
    Case(
        "hinge-leaves-the-chord",
        from_demo(put("horizontal_tail.controls.elevator.hinge_at", 0.98)),
        "horizontal_tail.controls.elevator.hinge_at",
        "must stay in (0, 1)",
    ),
    # --- planform ---
    Case(
        "taper-ratio-and-panels",
        from_demo(put("wing.taper_ratio", 0.6)),
        "wing.taper_ratio",
        "not both",
    ),
    Case(
        "neither-taper-nor-panels",
        from_demo(drop("horizontal_tail.taper_ratio")),
        "horizontal_tail.taper_ratio",
        "panels",
    ),
    Case(
        "panels-out-of-order",
        from_demo(swap_wing_panels),
        "wing.panels[1].span_fraction",
        "root to tip",
    ),
    Case(
        "last-panel-short-of-tip",
        from_demo(put("wing.panels.1.span_fraction", 0.9)),
        "wing.panels[1].span_fraction",
        "span_fraction 1",
    ),
    # --- tails ---
    Case(
        "optimum-arm-without-body-or-tail-cone",
        from_demo(drop("fuselage")),
        "tail_cone",
        "front_radius",
    ),
    Case(
        "tail-overlaps-wing",
        from_demo(put("horizontal_tail.tail_arm", "0.5 m")),
        "horizontal_tail.tail_arm",
        "longer tail arm",
    ),
    Case(
        "tail-arm-word",
        from_demo(put("vertical_tail.tail_arm", "long")),
        "vertical_tail.tail_arm",
        "optimum",
    ),
    # --- sections ---
    Case(
        "unknown-naca-code",
        from_demo(put("wing.root_airfoil", "naca99999")),
        "wing.root_airfoil",
        "mean line",
    ),
    Case(
        "missing-section-file",
        from_demo(put("wing.tip_airfoil", "no-such-section")),
        "wing.tip_airfoil",
        "not found",
    ),
    # === hostile and malformed designs ===========================================================
    # --- the file itself: tags, aliases, nesting, size ---
    Case(
        "custom-tag-on-scalar",
        raw(DEMO_TEXT.replace("name: veyra-t2", "name: !aircraft veyra-t2")),
        None,
        "malformed YAML",
    ),
    Case(
        "custom-tag-on-mapping",
        raw(DEMO_TEXT.replace("\nwing:\n", "\nwing: !surface\n", 1)),
        "wing",
        "the tag !surface is not accepted",
    ),
    Case(
        "alias-mapping-expansion",
        raw(ALIAS_MAPPING_BOMB),
        None,
        f"more than {design.MAX_DESIGN_VALUES}",
    ),
    Case(
        "10000-nested-lists",
        raw("name: " + "[" * 10_000 + "]" * 10_000 + "\n"),
        None,
        f"more than {design.MAX_DESIGN_DEPTH} levels deep",
    ),
    Case(
        "10000-nested-mappings",
        raw("name: " + "{a: " * 10_000 + "1" + "}" * 10_000 + "\n"),
        None,
        f"more than {design.MAX_DESIGN_DEPTH} levels deep",
    ),
    Case(
        "200-nested-block-mappings",
        raw(DEMO_TEXT + "notes:\n" + "".join("  " * i + "k:\n" for i in range(1, 200))),
        None,
        f"more than {design.MAX_DESIGN_DEPTH} levels deep",
    ),
    Case(
        "over-size-limit-refused-before-parsing",
        oversized_malformed,
        None,
        f"at most {design.MAX_DESIGN_BYTES}",
    ),
    # --- wrong types ---
    Case("wing-is-a-list", from_demo(put("wing", [1, 2])), "wing", "must be a mapping"),
    Case(
        "requirements-is-text",
        from_demo(put("requirements", "fast and light")),
        "requirements",
        "must be a mapping",
    ),
    Case(
        "mapping-where-a-number-goes",
        from_demo(put("wing.aspect_ratio", {"value": 7.8})),
        "wing.aspect_ratio",
        "plain number",
    ),
    Case(
        "bool-where-a-quantity-goes",
        from_demo(put("requirements.stall_speed", True)),
        "requirements.stall_speed",
        "with a unit of speed",
    ),
    Case(
        "list-where-a-quantity-goes",
        from_demo(put("wing.dihedral", ["2.5 deg"])),
        "wing.dihedral",
        "with a unit of angle",
    ),
    Case(
        "bool-where-a-number-goes",
        from_demo(put("wing.aspect_ratio", True)),
        "wing.aspect_ratio",
        "plain number",
    ),
    Case(
        "number-where-text-goes",
        from_demo(put("wing.root_airfoil", 2415)),
        "wing.root_airfoil",
        "must be text",
    ),
    Case("apex-is-a-list", from_demo(put("wing.apex", [1.55, 0.95])), "wing.apex", "mapping"),
    Case(
        "panels-is-a-mapping",
        from_demo(put("wing.panels", {"span_fraction": 1.0})),
        "wing.panels",
        "must be a list",
    ),
    Case(
        "controls-is-a-list",
        from_demo(put("wing.controls", ["aileron", "flap"])),
        "wing.controls",
        "mapping",
    ),
    Case("key-is-a-number", raw(DEMO_TEXT + "7: seven\n"), "7", "unknown key"),
    # an unknown key that is declared elsewhere in the file: the message says where it goes
    Case(
        "tail-cone-under-a-tail",
        from_demo(
            put("horizontal_tail.tail_cone", {"front_radius": "0.4 m", "rear_radius": "0.1 m"})
        ),
        "horizontal_tail.tail_cone",
        "unknown key (tail_cone goes at the top level of the file, not under horizontal_tail); "
        "allowed here: volume_coefficient, tail_arm,",
    ),
    Case(
        "gross-weight-under-the-wing",
        from_demo(put("wing.gross_weight", "650 kg")),
        "wing.gross_weight",
        "unknown key (gross_weight goes under requirements, not under wing)",
    ),
    # a typo: the nearest known key of that mapping (difflib's ratio), or of the whole file
    Case(
        "typo-of-a-key-here",
        from_demo(put("wing.aspect_ration", 7.8)),
        "wing.aspect_ration",
        "unknown key (did you mean aspect_ratio?); allowed here: area, aspect_ratio,",
    ),
    Case(
        "typo-of-a-key-in-a-list-item",
        from_demo(put("wing.panels.0.chord_ration", 0.8)),
        "wing.panels[0].chord_ration",
        "unknown key (did you mean chord_ratio?)",
    ),
    Case(
        "typo-of-a-key-elsewhere",
        from_demo(put("vertical_tail.tail_cones", {"front_radius": "0.4 m"})),
        "vertical_tail.tail_cones",
        "unknown key (did you mean tail_cone? it goes at the top level of the file); allowed",
    ),
    Case(
        "top-level-key-under-model",
        from_demo(put("model.fuselage", {})),
        "model.fuselage",
        "unknown key (fuselage goes at the top level of the file, not under model)",
    ),
    # --- NaN and infinity ---
    Case(
        "aspect-ratio-inf",
        raw(DEMO_TEXT.replace("aspect_ratio: 7.8", "aspect_ratio: .inf")),
        "wing.aspect_ratio",
        "[0.1, 40]",
    ),
    Case(
        "cl-max-minus-inf",
        raw(DEMO_TEXT.replace("cl_max: 1.7", "cl_max: -.inf")),
        "requirements.cl_max",
        "[0.1, 5]",
    ),
    Case(
        "stall-speed-nan-kn",
        from_demo(put("requirements.stall_speed", "nan kn")),
        "requirements.stall_speed",
        "number with a unit of speed",
    ),
    Case(
        "altitude-inf-m",
        from_demo(put("requirements.altitude", "inf m")),
        "requirements.altitude",
        "number with a unit of length",
    ),
    Case(
        "area-overflows-to-inf",
        from_demo(put("wing.area", "1e400 m^2")),
        "wing.area",
        "finite",
    ),
    Case(
        "hinge-at-nan",
        raw(DEMO_TEXT.replace("hinge_at: 0.6\n", "hinge_at: .nan\n")),
        "vertical_tail.controls.rudder.hinge_at",
        "(0, 1)",
    ),
    # --- units pint knows that do not fit ---
    Case("area-in-m", from_demo(put("wing.area", "12 m")), "wing.area", "must be an area"),
    Case("sweep-in-m", from_demo(put("wing.sweep", "5 m")), "wing.sweep", "must be an angle"),
    Case("twist-in-kg", from_demo(put("wing.twist", "-2 kg")), "wing.twist", "must be an angle"),
    Case(
        "gross-weight-in-m-per-s",
        from_demo(put("requirements.gross_weight", "650 m/s")),
        "requirements.gross_weight",
        "must be a weight",
    ),
    Case(
        "tail-arm-in-m2",
        from_demo(put("vertical_tail.tail_arm", "4 m^2")),
        "vertical_tail.tail_arm",
        "must be a length",
    ),
    Case(
        "te-thickness-in-deg",
        from_demo(put("solids", {"te_thickness": "0.5 deg"})),
        "solids.te_thickness",
        "must be a length",
    ),
    Case(
        "material-density-in-kg",
        from_demo(put("model.material_density", "1.24 kg")),
        "model.material_density",
        "must be a density",
    ),
    # --- legal alone, inconsistent together ---
    Case(
        "flap-contains-aileron",
        from_demo(
            both(
                put("wing.controls.flap.span_start", 0.46), put("wing.controls.flap.span_end", 0.99)
            )
        ),
        "wing.controls.flap.span_start",
        "may not share span",
    ),
    Case(
        "hinge-at-0.999",
        from_demo(put("vertical_tail.controls.rudder.hinge_at", 0.999)),
        "vertical_tail.controls.rudder.hinge_at",
        "leaves the moving part only",
    ),
    Case(
        "hinge-behind-thick-trailing-edge",
        from_demo(
            both(
                put("vertical_tail.controls.rudder.hinge_at", 0.93),
                put("solids", {"te_thickness": "15 mm"}),
            )
        ),
        "vertical_tail.controls.rudder.hinge_at",
        "4 x solids.te_thickness",
    ),
    Case(
        "hinge-at-the-leading-edge",
        from_demo(put("vertical_tail.controls.rudder.hinge_at", 0.05)),
        "vertical_tail.controls.rudder.hinge_at",
        "too close to the leading edge",
    ),
    Case(
        "te-thickness-beyond-the-smallest-chord",
        from_demo(put("solids", {"te_thickness": "20 mm"})),
        "solids.te_thickness",
        "of the smallest chord",
    ),
    Case("twist-89-deg", from_demo(put("wing.twist", "89 deg")), "wing.twist", "[-45, 45] deg"),
    Case(
        "panel-twist-minus-95-deg",
        from_demo(put("wing.panels.1.twist", "-95 deg")),
        "wing.panels[1].twist",
        "[-45, 45] deg",
    ),
    Case(
        "incidence-60-deg",
        from_demo(put("horizontal_tail.incidence", "60 deg")),
        "horizontal_tail.incidence",
        "[-20, 20] deg",
    ),
    Case(
        "fin-arm-shorter-than-wing-root-chord",
        from_demo(put("vertical_tail.tail_arm", "1 m")),
        "vertical_tail.tail_arm",
        "longer tail arm",
    ),
    # --- section coordinate files ---
    Case("section-file-empty", with_section_file(""), "wing.root_airfoil", "file is empty"),
    Case(
        "section-file-binary",
        with_section_file(bytes(range(256)) * 8),
        "wing.root_airfoil",
        "not a text file",
    ),
    Case(
        "section-file-unclosed",
        with_section_file(UNCLOSED_SECTION, "horizontal_tail.root_airfoil"),
        "horizontal_tail.root_airfoil",
        "not closed",
    ),
    Case(
        "section-file-crosses-itself",
        with_section_file(CROSSING_SECTION, "wing.tip_airfoil"),
        "wing.tip_airfoil",
        "crosses itself",
    ),
    Case(
        "section-file-too-few-points",
        with_section_file(TOO_FEW_POINTS),
        "wing.root_airfoil",
        "at least 10 are needed",
    ),
    Case(
        "section-file-infinite-coordinate",
        with_section_file("made-up\n1 0\ninf 0\n"),
        "wing.root_airfoil",
        "finite numbers",
    ),
    # --- resource limits ---
    Case(
        "1000-fuselage-stations",
        raw(
            _replace_fuselage(
                "fuselage:\n  stations:\n"
                + "".join(
                    f'    - {{x: "{i} mm", width: "0.5 m", height: "0.5 m"}}\n' for i in range(1000)
                )
            )
        ),
        "fuselage.stations",
        "2 to 200 items",
    ),
    Case("100000-fuselage-stations-by-alias", raw(ALIAS_STATIONS), None, "more than 100000"),
    Case(
        "21-wing-panels",
        from_demo(
            put(
                "wing.panels",
                [{"span_fraction": (i + 1) / 21, "chord_ratio": 1.0} for i in range(21)],
            )
        ),
        "wing.panels",
        "1 to 20 items",
    ),
    Case(
        "section-points-100000",
        from_demo(put("solids", {"section_points": 100_000})),
        "solids.section_points",
        "[21, 301]",
    ),
    Case(
        "tessellation-1e-9",
        from_demo(put("solids", {"tessellation": 1e-9})),
        "solids.tessellation",
        "[1e-05, 0.01]",
    ),
    Case(
        "tessellation-1-nm",
        from_demo(put("solids", {"tessellation": "1 nm"})),
        "solids.tessellation",
        "plain number in [1e-05, 0.01]",
    ),
    Case(
        "cg-fraction-out-of-range",
        from_demo(put("requirements.cg", 3.5)),
        "requirements.cg",
        "[-1, 2]",
    ),
    Case(
        "cg-as-a-word",
        from_demo(put("requirements.cg", "middle")),
        "requirements.cg",
        "fraction of the MGC",
    ),
    Case(
        "cg-aft-ahead-of-forward",
        from_demo(put("requirements.cg", {"forward": 0.3, "aft": "1.7 m"})),
        "requirements.cg",
        "forward must lie ahead of aft",
    ),
    Case(
        "cg-without-aft",
        from_demo(put("requirements.cg", {"forward": 0.2})),
        "requirements.cg",
        "aft",
    ),
    Case(
        "tail-dynamic-pressure-ratio-2",
        from_demo(put("requirements.tail_dynamic_pressure_ratio", 2)),
        "requirements.tail_dynamic_pressure_ratio",
        "[0.5, 1.2]",
    ),
]


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_bad_design_is_refused_in_one_line(
    case: Case, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    design_path = case.build(tmp_path)
    out = tmp_path / "out"

    code = main(["size", str(design_path), "--out", str(out)])

    captured = capsys.readouterr()
    assert code == 2, captured.err
    assert captured.out == ""
    assert "Traceback" not in captured.err
    lines = captured.err.splitlines()
    assert len(lines) == 1, captured.err
    line = lines[0]
    assert line.startswith("geomgen: error: ")
    assert str(design_path) in line
    if case.key is not None:
        assert f": {case.key}: " in line, line
    assert case.allowed in line, line
    assert not out.exists() or not any(out.iterdir())


def test_unquoted_yaml_date_is_accepted(tmp_path: Path) -> None:
    """YAML reads an unquoted 2026-12-01 as a date; the design takes it as the text it was."""
    path = tmp_path / "dated.yaml"
    path.write_text(DEMO_TEXT.replace('date: "2026-12-01"', "date: 2026-12-01"), encoding="utf-8")
    assert "date: 2026-12-01\n" in path.read_text(encoding="utf-8")
    assert design.load(path).date == "2026-12-01"


# --- output folders that cannot be written ------------------------------------------------------


def _out_is_a_file(folder: Path) -> Path:
    path = folder / "out"
    path.write_text("a file, not a folder\n", encoding="utf-8")
    return path


def _target_is_a_file(folder: Path) -> Path:
    """The design's own output folder (out/veyra-t2) is a file."""
    (folder / "out").mkdir()
    (folder / "out" / "veyra-t2").write_text("a file, not a folder\n", encoding="utf-8")
    return folder / "out"


def _not_writable(folder: Path) -> Path:
    if os.geteuid() != 0:
        locked = folder / "locked"
        locked.mkdir()
        locked.chmod(0o500)
        return locked / "out"
    # root writes through file modes; sysfs refuses new folders even to root
    if not Path("/sys/kernel").is_dir():
        pytest.skip("running as root without /sys: no folder is read-only here")
    return Path("/sys/geomgen-test-out")


@pytest.mark.parametrize(
    "make_out",
    [_out_is_a_file, _target_is_a_file, _not_writable],
    ids=["out-is-a-file", "target-is-a-file", "out-not-writable"],
)
def test_unusable_output_folder_is_refused_in_one_line(
    make_out: Callable[[Path], Path], tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = make_out(tmp_path)
    before = sorted(p.relative_to(tmp_path) for p in tmp_path.rglob("*"))
    try:
        code = main(["size", str(DEMO), "--out", str(out), "--no-drawings"])
    finally:
        if out.parent.name == "locked":
            out.parent.chmod(0o700)
    captured = capsys.readouterr()
    assert code == 2, captured.err
    assert "Traceback" not in captured.err
    lines = captured.err.splitlines()
    assert len(lines) == 1, captured.err
    assert lines[0].startswith(f"geomgen: error: {out}")
    assert "output" in lines[0]
    assert sorted(p.relative_to(tmp_path) for p in tmp_path.rglob("*")) == before


# --- resource limits of geomgen model -----------------------------------------------------------


def _model_design(folder: Path, model: dict[str, Any]) -> Path:
    """The demo with its model section updated; a value None removes the key."""
    doc = demo_document()
    doc["model"].update(model)
    doc["model"] = {k: v for k, v in doc["model"].items() if v is not None}
    path = folder / "model-design.yaml"
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return path


SMALL_PRINTER = {"build_volume": ["60 mm"] * 3}


@pytest.mark.parametrize(
    ("args", "model", "key"),
    [
        # 1:1 on a 60 mm printer: about 440 pieces (the wing halves alone need 107 each)
        (["--scale", "1:1"], SMALL_PRINTER, "--scale"),
        ([], {**SMALL_PRINTER, "scale": "1:1"}, "model.scale"),
        ([], {**SMALL_PRINTER, "scale": None, "span": "5 m"}, "model.span"),
    ],
    ids=["scale-on-command-line", "scale-in-design", "span-in-design"],
)
def test_model_of_too_many_pieces_is_refused_up_front(
    args: list[str], model: dict, key: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from geomgen.printed_model import plan as mdl

    path = _model_design(tmp_path, model)
    out = tmp_path / "out"
    assert main(["model", str(path), "--out", str(out), *args]) == 2
    lines = capsys.readouterr().err.splitlines()
    assert len(lines) == 1, lines
    assert str(path) in lines[0] and f": {key}: " in lines[0], lines[0]
    assert f"at most {mdl.MAX_MODEL_PIECES} are made" in lines[0]
    assert not out.exists() or not any(out.iterdir())


def test_model_at_full_size_is_refused_before_any_solid(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    """1:1 on the default 220 mm printer: about 104 pieces, within the limit, but the wing's
    1.38 m root chord cannot be printed at all; refused before the solids are built."""
    out = tmp_path / "out"
    assert main(["model", str(DEMO), "--scale", "1:1", "--out", str(out)]) == 1
    lines = capsys.readouterr().err.splitlines()
    assert len(lines) == 1
    assert "wing-right plan pieces: the root chord is 1382 mm" in lines[0], lines[0]
    assert "more than the printer's 220 mm" in lines[0]
    assert not out.exists() or not any(out.iterdir())


def test_plan_cuts_refuses_absurd_piece_counts() -> None:
    from geomgen.errors import GeometryError
    from geomgen.printed_model import plan as mdl

    assert len(mdl.plan_cuts(0.0, 1000.0, 208.0, [])) == 4  # ceil(1000 / 208) = 5 pieces
    with pytest.raises(GeometryError, match=f"at most {mdl.MAX_MODEL_PIECES} are made"):
        mdl.plan_cuts(0.0, 1_000_000.0, 8.0, [])


def test_schema_says_where_tail_cone_goes() -> None:
    """A user reading the schema (or an editor's hover text) learns that tail_cone is a
    top-level key, from both the key and the tail_arm that needs it."""
    schema = design.json_schema()
    assert (
        "top-level key (not under horizontal_tail or vertical_tail)"
        in (schema["properties"]["tail_cone"]["description"])
    )
    for tail in ("horizontal_tail", "vertical_tail"):
        arm = schema["properties"][tail]["properties"]["tail_arm"]["description"]
        assert "the top-level key tail_cone" in arm, arm
        assert "tail_cone" not in schema["properties"][tail]["properties"]
