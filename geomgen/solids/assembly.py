"""The build of every part, mm in the aircraft frame (x aft, y right, z up): each surface side
lofted with its control surfaces cut free (or read back from the build cache, or the left side
mirrored from the right), the fuselage, and the ``Part`` records the exports take; a moving
part turned to any deflection (rad) for the printed model.

The build cache keeps a side as BREP files with their volumes and the data its checks need.
"""

from __future__ import annotations

import tempfile
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import cadquery as cq
import numpy as np

from geomgen.errors import GeometryError
from geomgen.geometry.layout import PART_NAMES, Layout, SurfaceLayout, fixed_part_name
from geomgen.solids.body import build_fuselage
from geomgen.solids.controls import _deflect, build_side
from geomgen.solids.kernel import _VOLUMES, MM, volume
from geomgen.solids.records import Build, ControlBuild, Part, SideBuild


@dataclass(frozen=True)
class SolidUnit:
    """One entry of the build cache a build needs: a surface side (its fixed part and its
    control surfaces) or the fuselage."""

    surface: str | None  # surface key; None for the fuselage
    side: str  # right | left | centre
    key: str  # cache key (exactly its inputs and the versions)
    name: str  # the fixed part's name, or "fuselage"
    mirror_of: str | None = None  # key of the right side a left side is the mirror image of


def plan(layout: Layout, dirs: tuple = (), only: set[str] | None = None) -> tuple[SolidUnit, ...]:
    """The solids a build of ``layout`` needs, in build order; ``only`` limits it to the
    named parts' surfaces (part names as in the report). A left side whose right side is in
    the same build is that side's mirror image."""
    units: list[SolidUnit] = []
    for sl in layout.surfaces:
        for side in sl.sides:
            names = {fixed_part_name(sl.key, side)} | {
                c.name for c in sl.controls if c.side == side
            }
            if only is not None and not names & only:
                continue
            right = next((u for u in units if u.surface == sl.key and u.side == "right"), None)
            units.append(
                SolidUnit(
                    sl.key,
                    side,
                    side_key(sl, side, layout, dirs),
                    fixed_part_name(sl.key, side),
                    right.key if side == "left" and right is not None else None,
                )
            )
    if layout.body is not None and (only is None or "fuselage" in only):
        from geomgen.store.cache import key_of

        units.append(SolidUnit(None, "centre", key_of("fuselage", layout.body), "fuselage"))
    return tuple(units)


def make_entry(layout: Layout, unit: SolidUnit, store, dirs: tuple = ()) -> Path:
    """Build one unit's solids and save them as the cache entry ``unit.key`` (a left side
    that mirrors its right side reads that side's entry, which must be there); returns the
    entry's folder."""
    d = layout.sizing.design
    if unit.surface is None:
        made = build_fuselage(layout.body)
        return store.put(unit.key, lambda folder: _save_shape(made, folder, "fuselage"))
    sl = _surface(layout, unit.surface)
    if unit.mirror_of is not None:
        # the right side as read back from its entry, as a cached one would be
        side = mirror_side(load_side(sl, "right", store.folder(unit.mirror_of)))
    else:
        side = build_side(sl, unit.side, d.solids.section_points, d.solids.te_thickness, dirs)
    return store.put(unit.key, lambda folder: save_side(side, folder))


def _surface(layout: Layout, key: str) -> SurfaceLayout:
    return next(sl for sl in layout.surfaces if sl.key == key)


def part_chords(layout: Layout, unit: SolidUnit) -> list[tuple[str, float]]:
    """Each part of a unit with the smallest local chord over its span (mm; the fuselage:
    the smaller of its largest width and height), in the unit's part order."""
    if unit.surface is None:
        body = layout.body
        return [("fuselage", min(max(st.width for st in body), max(st.height for st in body)) * MM)]
    sl = _surface(layout, unit.surface)
    chords = [st.chord for st in sl.sizing.planform.stations]
    out = [(fixed_part_name(sl.key, unit.side), min(chords) * MM)]
    for c in sl.controls:
        if c.side == unit.side:
            lo, hi = sorted((c.s_start, c.s_end))
            out.append(
                (c.name, min(sl.sizing.planform.at(lo)[1], sl.sizing.planform.at(hi)[1]) * MM)
            )
    return out


def unit_parts(layout: Layout, unit: SolidUnit, entry: Path) -> tuple[SideBuild | None, list]:
    """One unit read back from its cache entry: its SideBuild (None for the fuselage) and
    its ``Part`` records."""
    chord_min = dict(part_chords(layout, unit))
    if unit.surface is None:
        shape = _load_shape(entry, "fuselage")
        return None, [
            Part(
                "fuselage",
                "fuselage",
                "fuselage",
                "centre",
                shape,
                False,
                0.0,
                chord_min["fuselage"],
            )
        ]
    sl = _surface(layout, unit.surface)
    sb = load_side(sl, unit.side, entry)
    fixed_name = fixed_part_name(sl.key, unit.side)
    parts = [
        Part(
            fixed_name,
            PART_NAMES[sl.key],
            sl.key,
            unit.side,
            sb.fixed,
            False,
            0.0,
            chord_min[fixed_name],
        )
    ]
    for cb in sb.controls:
        c = cb.layout
        spec = next(x for x in sl.sizing.spec.controls if x.kind == c.kind)
        parts.append(
            Part(
                c.name,
                c.kind,
                sl.key,
                unit.side,
                cb.moving,
                True,
                spec.deflection,
                chord_min[c.name],
            )
        )
    return sb, parts


def assemble(layout: Layout, units: tuple[SolidUnit, ...], entries: dict[str, Path]) -> Build:
    """The Build of ``units`` read back from their cache entries (key -> folder)."""
    sides: list[SideBuild] = []
    parts: list[Part] = []
    for unit in units:
        sb, unit_part_list = unit_parts(layout, unit, entries[unit.key])
        if sb is not None:
            sides.append(sb)
        parts += unit_part_list
    return Build(layout=layout, sides=tuple(sides), parts=tuple(parts))


def build(
    layout: Layout,
    dirs: tuple = (),
    only: set[str] | None = None,
    store=None,
    make_missing: Callable[[tuple[SolidUnit, ...], tuple[SolidUnit, ...]], None] | None = None,
) -> Build:
    """Loft every surface side, cut its control surfaces free, deflect them, and loft the
    fuselage when there is one; ``only`` limits the build to the named parts' surfaces (part
    names as in the report). Units found in ``store`` are read back; the others are made
    (in order, or by ``make_missing(units, missing)``, which must leave their entries in
    ``store``). One path: a solid just made is used as read back from its BREP files, as a
    cached one is, so fresh, cached, resumed and parallel builds mesh the same solids.
    Without a store the entries go to a temporary folder."""
    if store is None:
        from geomgen.store.cache import Cache

        with tempfile.TemporaryDirectory(prefix="geomgen-brep-") as tmp:
            return _build(layout, dirs, only, Cache(Path(tmp), enabled=False), make_missing)
    return _build(layout, dirs, only, store, make_missing)


def _build(layout, dirs, only, store, make_missing) -> Build:
    units = plan(layout, dirs, only)
    entries: dict[str, Path] = {}
    missing = []
    for unit in units:
        entry = store.get(unit.key, unit.name)
        if entry is None:
            missing.append(unit)
        else:
            entries[unit.key] = entry
    if make_missing is not None:
        make_missing(units, tuple(missing))
    else:
        for unit in missing:
            make_entry(layout, unit, store, dirs)
    for unit in missing:
        entries[unit.key] = store.folder(unit.key)
    return assemble(layout, units, entries)


# --- the build cache: sides stored as BREP files with what the checks need -----------------


def side_key(sl: SurfaceLayout, side: str, layout: Layout, dirs: tuple) -> str:
    """Cache key of one surface side: its layout (sizing, spec, corners, controls, mount),
    the solids settings, the coordinates of every section it uses, and the versions."""
    from geomgen.shapes import airfoils
    from geomgen.store.cache import key_of

    names = sorted({n for st in sl.sizing.planform.stations for n in st.airfoil[:2]})
    sections = [(n, airfoils.load(n, dirs).upper, airfoils.load(n, dirs).lower) for n in names]
    return key_of("surface side", side, sl, layout.sizing.design.solids, sections)


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
