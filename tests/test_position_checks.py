"""The self-checks that see where a part is: every written mesh against the layout (spanwise
ends, foremost point, body nose and tail) and every hinge axis against the mean line of the
uncut solid. A part moved by 10 mm, or a hinge axis moved by 1 mm off the mean line, must fail
(before these checks, an STL moved 10 mm passed every check)."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
import trimesh

from geomgen.checks.solid_checks import position_checks
from geomgen.checks.tolerances import TOLERANCES
from geomgen.solids import controls

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def built(demo_build):
    assert demo_build.code == 0, demo_build.stderr
    folder = demo_build.out_root / "veyra-t2" / "stl"
    meshes = {}
    for p in demo_build.build.parts:
        m = trimesh.load_mesh(str(folder / f"{p.name}.stl"), file_type="stl")
        meshes[p.name] = (np.asarray(m.vertices, dtype=float), np.asarray(m.faces))
    return demo_build.build, meshes


def _failed(checks) -> set[tuple[str, str]]:
    return {(c.part, c.name) for c in checks if not c.passed}


def test_the_demo_passes_and_every_part_is_placed(built):
    build, meshes = built
    checks = position_checks(build, meshes)
    assert _failed(checks) == set()
    placed = {c.part for c in checks}
    assert placed == {p.name for p in build.parts}  # every part has a position check
    # the spanwise ends are where the layout puts them to 0.01 mm (the end faces are planes)
    ends = [c for c in checks if "end vs layout" in c.name]
    assert ends and all(abs(c.measured - c.expected) <= TOLERANCES.part_position for c in ends)


@pytest.mark.parametrize(
    "part, shift, fails",
    [
        ("wing-right", (10.0, 0.0, 0.0), "fixed part's foremost x vs layout"),
        ("stabilizer-left", (0.0, -10.0, 0.0), "fixed part's tip end vs layout station"),
        ("fin", (0.0, 0.0, 10.0), "fixed part's root end vs layout station"),
        ("aileron-right", (0.0, 10.0, 0.0), "moving part's inner end vs layout"),
        ("rudder", (0.0, 0.0, -10.0), "moving part's outer end vs layout"),
        ("fuselage", (10.0, 0.0, 0.0), "fuselage nose x vs first station"),
    ],
)
def test_a_mesh_moved_10_mm_fails(built, part, shift, fails):
    build, meshes = built
    moved = dict(meshes)
    v, f = meshes[part]
    moved[part] = (v + np.array(shift), f)
    assert (part, fails) in _failed(position_checks(build, moved))


def test_a_hinge_axis_off_the_mean_line_fails(built):
    build, meshes = built
    sides = []
    target = "flap-right"
    for sb in build.sides:
        cbs = []
        for cb in sb.controls:
            if cb.layout.name == target:
                p0, p1 = cb.axis
                s_mid = 0.5 * (cb.layout.s_start + cb.layout.s_end)
                up = controls._thickness_normal(sb.surface, s_mid)
                cb = dataclasses.replace(cb, axis=(p0 + up, p1 + up))  # 1 mm up
            cbs.append(cb)
        sides.append(dataclasses.replace(sb, controls=tuple(cbs)))
    moved = dataclasses.replace(build, sides=tuple(sides))
    failed = {name for part, name in _failed(position_checks(moved, meshes)) if part == target}
    assert {n for n in failed if n.startswith("hinge axis")} == {
        f"hinge axis ({w}) off the uncut solid's mean line vs layout"
        for w in ("inner end", "middle", "outer end")
    }
