"""Bad design files: every one is refused with exit code 2 and one clear line on stderr.

Each case starts from the demo design (examples/veyra-t2.yaml), breaks one thing, and runs
``geomgen size`` in-process. The line must start with ``geomgen: error: ``, name the file and
the key path, say what is allowed, and nothing may be written to the output folder.
"""

from __future__ import annotations

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
