"""The build of every part, mm in the aircraft frame (x aft, y right, z up): each surface side
lofted with its control surfaces cut free (or read back from the build cache, or the left side
mirrored from the right), the fuselage, and the ``Part`` records the exports take; a moving
part turned to any deflection (rad) for the printed model.

The build cache keeps a side as BREP files with their volumes and the data its checks need.
"""

from __future__ import annotations

import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import Any

import cadquery as cq
import numpy as np

from geomgen.errors import GeometryError
from geomgen.geometry.layout import PART_NAMES, Layout, SurfaceLayout, fixed_part_name
from geomgen.solids.body import build_fuselage
from geomgen.solids.controls import _deflect, build_side
from geomgen.solids.kernel import _VOLUMES, MM, volume
from geomgen.solids.records import Build, ControlBuild, Part, SideBuild


def build(layout: Layout, dirs: tuple = (), only: set[str] | None = None, store=None) -> Build:
    """Loft every surface side, cut its control surfaces free, deflect them, and loft the
    fuselage when there is one; ``only`` limits the build to the named parts' surfaces (part
    names as in the report)."""
    d = layout.sizing.design
    points, te = d.solids.section_points, d.solids.te_thickness
    sides: list[SideBuild] = []
    parts: list[Part] = []
    for sl in layout.surfaces:
        base = PART_NAMES[sl.key]
        for side in sl.sides:
            names = {fixed_part_name(sl.key, side)} | {
                c.name for c in sl.controls if c.side == side
            }
            if only is not None and not names & only:
                continue
            right = next((b for b in sides if b.surface is sl and b.side == "right"), None)
            key = side_key(sl, side, layout, dirs) if store is not None else ""
            entry = store.get(key, fixed_part_name(sl.key, side)) if store is not None else None
            if entry is not None:
                sb = load_side(sl, side, entry)
            else:
                if side == "left" and right is not None:
                    made = mirror_side(right)
                else:
                    made = build_side(sl, side, points, te, dirs)
                # one path: a side just built is used as read back from its BREP files, as a
                # cached one is, so fresh, cached and resumed builds mesh the same solids
                sb = _through_brep(
                    store,
                    key,
                    lambda folder, m=made: save_side(m, folder),
                    lambda folder, sl=sl, side=side: load_side(sl, side, folder),
                )
            sides.append(sb)
            chords = [st.chord for st in sl.sizing.planform.stations]
            fixed_name = base if side == "centre" else f"{base}-{side}"
            parts.append(
                Part(fixed_name, base, sl.key, side, sb.fixed, False, 0.0, min(chords) * MM)
            )
            for cb in sb.controls:
                c = cb.layout
                spec = next(x for x in sl.sizing.spec.controls if x.kind == c.kind)
                lo, hi = sorted((c.s_start, c.s_end))
                chord_min = min(sl.sizing.planform.at(lo)[1], sl.sizing.planform.at(hi)[1])
                parts.append(
                    Part(
                        c.name,
                        c.kind,
                        sl.key,
                        side,
                        cb.moving,
                        True,
                        spec.deflection,
                        chord_min * MM,
                    )
                )
    if layout.body is not None and (only is None or "fuselage" in only):
        body = layout.body
        size_min = min(max(st.width for st in body), max(st.height for st in body))
        shape = None
        if store is not None:
            from geomgen.store.cache import key_of

            key = key_of("fuselage", body)
            entry = store.get(key, "fuselage")
            if entry is not None:
                shape = _load_shape(entry, "fuselage")
        if shape is None:
            made = build_fuselage(body)
            shape = _through_brep(
                store,
                key if store is not None else "",
                lambda folder: _save_shape(made, folder, "fuselage"),
                lambda folder: _load_shape(folder, "fuselage"),
            )
        parts.append(
            Part("fuselage", "fuselage", "fuselage", "centre", shape, False, 0.0, size_min * MM)
        )
    return Build(layout=layout, sides=tuple(sides), parts=tuple(parts))


# --- the build cache: sides stored as BREP files with what the checks need -----------------


def side_key(sl: SurfaceLayout, side: str, layout: Layout, dirs: tuple) -> str:
    """Cache key of one surface side: its layout (sizing, spec, corners, controls, mount),
    the solids settings, the coordinates of every section it uses, and the versions."""
    from geomgen.shapes import airfoils
    from geomgen.store.cache import key_of

    names = sorted({n for st in sl.sizing.planform.stations for n in st.airfoil[:2]})
    sections = [(n, airfoils.load(n, dirs).upper, airfoils.load(n, dirs).lower) for n in names]
    return key_of("surface side", side, sl, layout.sizing.design.solids, sections)


def _through_brep(store, key: str, save: Callable[[Path], None], load: Callable[[Path], Any]):
    """Save what was just built (into the cache entry ``key``, or a temporary folder without
    a cache) and return it as read back: the solids a cache hit would give, to the bit."""
    if store is not None:
        return load(store.put(key, save))
    with tempfile.TemporaryDirectory(prefix="geomgen-brep-") as tmp:
        save(Path(tmp))
        return load(Path(tmp))


def _save_shape(shape: cq.Shape, folder: Path, name: str) -> None:
    shape.exportBrep(str(folder / f"{name}.brep"))
    (folder / f"{name}.volume").write_text(repr(volume(shape)), encoding="utf-8")


def _load_shape(folder: Path, name: str) -> cq.Shape:
    shape = cq.Shape.importBrep(str(folder / f"{name}.brep"))
    if not shape.isValid():
        raise GeometryError("a cached solid reads back invalid", part=name, operation="cache")
    _VOLUMES[shape] = float((folder / f"{name}.volume").read_text(encoding="utf-8"))
    return shape


def save_side(sb: SideBuild, folder: Path) -> None:
    """Write a side's solids (BREP) and the data its checks need (JSON)."""
    import json

    _save_shape(sb.whole, folder, "whole")
    _save_shape(sb.fixed, folder, "fixed")
    meta = []
    for i, cb in enumerate(sb.controls):
        for what in ("moving_undeflected", "moving", "aft_portion"):
            _save_shape(getattr(cb, what), folder, f"c{i}-{what}")
        meta.append(
            {
                "name": cb.layout.name,
                "axis": [list(map(float, p)) for p in cb.axis],
                "hinge_plane": [list(map(float, p)) for p in cb.hinge_plane],
                "cut_region_volume": repr(cb.cut_region_volume),
            }
        )
    (folder / "controls.json").write_text(json.dumps(meta, indent=1), encoding="utf-8")


def load_side(sl: SurfaceLayout, side: str, folder: Path) -> SideBuild:
    """A side read back from the cache (its layout from the current one: the key matched)."""
    import json

    meta = json.loads((folder / "controls.json").read_text(encoding="utf-8"))
    controls = []
    for i, m in enumerate(meta):
        c = next(x for x in sl.controls if x.side == side and x.name == m["name"])
        controls.append(
            ControlBuild(
                layout=c,
                moving_undeflected=_load_shape(folder, f"c{i}-moving_undeflected"),
                moving=_load_shape(folder, f"c{i}-moving"),
                axis=tuple(np.array(p) for p in m["axis"]),  # type: ignore[arg-type]
                hinge_plane=tuple(np.array(p) for p in m["hinge_plane"]),  # type: ignore[arg-type]
                aft_portion=_load_shape(folder, f"c{i}-aft_portion"),
                cut_region_volume=float(m["cut_region_volume"]),
            )
        )
    return SideBuild(
        surface=sl,
        side=side,
        whole=_load_shape(folder, "whole"),
        fixed=_load_shape(folder, "fixed"),
        controls=tuple(controls),
    )


def _mirror(shape: cq.Shape, part: str) -> cq.Shape:
    """Mirror image in the plane of symmetry; a mirror keeps the volume, so the source's is
    reused instead of integrated again."""
    image = shape.mirror("XZ")
    if not image.isValid():
        raise GeometryError("the kernel returned an invalid shape", part=part, operation="mirror")
    _VOLUMES[image] = volume(shape)
    return image


def mirror_side(right: SideBuild) -> SideBuild:
    """The left side as the mirror image of the right side in the plane of symmetry (the
    layout mirrors exactly, so this equals a fresh build at a fraction of the cost)."""
    sl = right.surface
    name = fixed_part_name(sl.key, "left")
    flip = np.array([1.0, -1.0, 1.0])
    controls = []
    for cb in right.controls:
        left = next(c for c in sl.controls if c.side == "left" and c.kind == cb.layout.kind)
        p0, p1 = cb.axis
        point, normal = cb.hinge_plane
        controls.append(
            ControlBuild(
                layout=left,
                moving_undeflected=_mirror(cb.moving_undeflected, left.name),
                moving=_mirror(cb.moving, left.name),
                axis=(p0 * flip, p1 * flip),
                hinge_plane=(point * flip, normal * flip),
                aft_portion=_mirror(cb.aft_portion, left.name),
                cut_region_volume=cb.cut_region_volume,
            )
        )
    return SideBuild(
        surface=sl,
        side="left",
        whole=_mirror(right.whole, name),
        fixed=_mirror(right.fixed, name),
        controls=tuple(controls),
    )


def deflect_part(build_: Build, name: str, angle: float) -> cq.Shape:
    """The undeflected moving part ``name`` turned by ``angle`` (rad) about its hinge axis."""
    for sb in build_.sides:
        for cb in sb.controls:
            if cb.layout.name == name:
                return _deflect(cb.moving_undeflected, sb.surface, *cb.axis, angle)
    raise KeyError(name)
