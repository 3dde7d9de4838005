"""The stages in order, for the CLI: size (design -> reports) and build (-> solids, exports,
checks). Each function returns what it wrote; errors are raised, never printed here."""

from __future__ import annotations

import json
import os
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from geomgen.errors import GeometryError, InputError
from geomgen.store.folder import OutputFolder
from geomgen.store.lock import FolderLock

PROFILES_DIR = Path(__file__).resolve().parents[2] / "profiles"


def airfoil_dirs(design_path: Path) -> tuple[Path, ...]:
    """Where section files are looked up: beside the design, then the shipped profiles/."""
    return (design_path.resolve().parent, PROFILES_DIR)


def _size(design_path: Path):
    from geomgen import design as design_module
    from geomgen.geometry.junction import mount
    from geomgen.geometry.layout import lay_out
    from geomgen.sizing.aircraft import size

    dirs = airfoil_dirs(design_path)
    d = design_module.load(design_path)
    return d, mount(lay_out(size(d, dirs), dirs), dirs), dirs


def run_size(design_path: Path, out_root: Path, units: str | None, drawings: bool = True) -> Path:
    """Sizing and layout of one design; writes report.json and report.md, and unless
    ``drawings`` is False the three-view, the DXF files and report.html. Returns the folder."""
    d, layout, dirs = _size(design_path)
    system = units or d.units
    from geomgen.commands.build_tasks import write_drawings, write_reports

    with FolderLock(out_root / d.name, "size"), OutputFolder(out_root / d.name) as folder:
        write_reports(folder, layout, system)
        if drawings:
            from geomgen.outputs.html_report import write_html

            svg = write_drawings(folder, layout, system, dirs)
            write_html(layout, folder.path("report.html"), svg=svg, units=system)
    return out_root / d.name


@dataclass(frozen=True)
class BuildResult:
    folder: Path
    parts: tuple[tuple[str, float, float], ...]  # name, volume (mm^3), STL deflection (mm)
    checks: int  # number of checks run (all passed)
    reused: tuple[str, ...] = ()  # solids taken from the cache (fixed part names, fuselage)
    rebuilt: tuple[str, ...] = ()  # solids built anew
    unchanged: bool = False  # nothing changed: every output of the last build was kept
    #: units (surface sides by their fixed part, fuselage) whose STL files, meshes and checks
    #: came from the cache
    outputs_reused: tuple[str, ...] = ()


#: the stamp a build leaves in its folder: the key of its inputs and its files' hashes
BUILD_STAMP = ".build-stamp.json"


def run_build(
    design_path: Path,
    out_root: Path,
    units: str | None,
    only: set[str] | None = None,
    progress: Callable[[str], None] = lambda _: None,
    fresh: bool = False,
    jobs: int = 1,
) -> BuildResult:
    """Size, lay out, build the solids, export STEP and STL, check everything. Solids come
    from the cache under ``out_root/.cache`` when their inputs are unchanged, and a build
    whose inputs are all unchanged keeps the last outputs; ``fresh`` ignores both. The
    output folder is locked from the check for unchanged inputs to the swap of the new
    outputs: a second run into it refuses at once."""
    t0 = time.perf_counter()

    def stage(text: str) -> None:
        progress(f"[{time.perf_counter() - t0:6.1f} s] {text}")

    _check_cache_folder(out_root)
    d, layout, dirs = _size(design_path)
    stage("sized and laid out")
    if only is not None:
        known = set(layout.part_names) | ({"fuselage"} if d.fuselage else set())
        unknown = sorted(only - known)
        if unknown:
            raise InputError(
                f"unknown part {unknown[0]!r}; parts of this design: {', '.join(sorted(known))}",
                path="--only",
            )
    with FolderLock(out_root / d.name, "build"):
        return _build_locked(
            design_path, out_root, units, only, fresh, jobs, d, layout, dirs, stage
        )


def _build_locked(design_path, out_root, units, only, fresh, jobs, d, layout, dirs, stage):
    """run_build past sizing, under the lock of its output folder."""
    from geomgen.store.cache import Cache, key_of
    from geomgen.store.stamp import output_time

    build_key = key_of(
        "build",
        design_path.read_bytes(),
        _section_data(layout, dirs),
        sorted(only or ()),
        units,
        output_time(d).isoformat(),  # SOURCE_DATE_EPOCH changes the stamps in the files
    )
    target = out_root / d.name
    if not fresh and _unchanged(target, build_key):
        stage("nothing changed since the last build: every output kept")
        return _kept_result(target)
    from geomgen.checks import solid_checks as checks
    from geomgen.commands import build_tasks as bt
    from geomgen.commands.part_outputs import load_unit, unit_key
    from geomgen.commands.workers import Tasks
    from geomgen.solids import assembly, kernel

    store = Cache(out_root / ".cache", enabled=not fresh)
    units_store = Cache(out_root / ".cache", enabled=not fresh)  # its own hit list
    results: list = []
    part_rows = []
    system = units or d.units
    tessellation = d.solids.tessellation
    with OutputFolder(out_root / d.name) as folder:
        from geomgen.checks import tolerances

        ctx = bt.BuildContext(
            layout,
            dirs,
            system,
            folder,
            out_root / ".cache",
            output_time(d),
            tolerances.TOLERANCES,
            os.getpid(),
        )
        # the workers are forked here, before this process does any kernel work
        with Tasks(jobs, ctx) as tasks:
            later: dict = {}

            def make_missing(planned, missing) -> None:
                """Queue the missing solids, then everything that needs only them or nothing:
                each unit's STL files and checks, the STEP file, the drawings; wait for the
                solids."""
                made = {}
                for u in missing:
                    after = [made[u.mirror_of]] if u.mirror_of in made else []
                    made[u.key] = tasks.add(bt.solid_task, u, after=after, priority=0)
                later["units"] = []
                for u in planned:
                    key = unit_key(u.key, assembly.part_chords(layout, u), tessellation)
                    entry = units_store.get(key, f"outputs of {u.name}")
                    task = None
                    if entry is None:
                        after = [made[u.key]] if u.key in made else []
                        # the fuselage's and the wing's take longest
                        first = u.surface in (None, "wing")
                        task = tasks.add(bt.unit_task, u, key, after=after, priority=2 - first)
                    later["units"].append((u, key, task))
                later["step"] = tasks.add(
                    bt.step_task, planned, d.name, after=list(made.values()), priority=1
                )
                later["drawings"] = tasks.add(bt.drawings_task, priority=2)
                later["templates"] = tasks.add(bt.templates_task, priority=2)
                for task in made.values():
                    tasks.result(task)

            bt.write_reports(folder, layout, system)
            built = assembly.build(layout, dirs, only, store, make_missing)
            parts = built.parts
            if store.hits:
                stage(f"reused {len(store.hits)} solid(s) from the cache: {', '.join(store.hits)}")
            stage(f"built {len(parts)} solids")
            svg = tasks.result(later["drawings"])
            tasks.result(later["templates"])
            stage("wrote the reports, drawings, DXF files and 1:1 templates")
            read_back = tasks.result(later["step"])
            stage(f"wrote {d.name}.step")
            # per unit (a surface side, the fuselage): STL files, meshes and checks
            stl_dir = ctx.stl_dir
            made_units, reused = [], []
            for u, key, task in later["units"]:
                names = [n for n, _ in assembly.part_chords(layout, u)]
                if task is None:
                    reused.append(u.name)
                else:
                    tasks.result(task)
                made_units.append(load_unit(units_store.folder(key), names, stl_dir))
        meshes = {n: m for out in made_units for n, m in out.meshes.items()}
        for p in parts:
            part_rows.append((p.name, kernel.volume(p.shape), tessellation * p.local_chord_min))
        stage(
            f"wrote {len(parts)} STL files"
            + (
                f" ({len(reused)} unit(s) with their checks from the cache: {', '.join(reused)})"
                if reused
                else ""
            )
        )
        # the checks in the order of a clean build: the meshes, each side against the
        # sizing, every part's position, then the checks between parts
        for what in ("stl_checks", "surface_checks", "position_checks"):
            for out in made_units:
                results += getattr(out, what)
        results += checks.junction_checks(built, meshes)
        for out in made_units:
            results += out.body_checks
        results += checks.step_checks(read_back, parts)
        stage(f"ran {len(results)} checks")
        failed = tuple(f"{c.part}: {c.name}" for c in results if not c.passed)
        if failed:
            # the new outputs are discarded (the previous ones stay); the failing checks are
            # kept beside them for inspection
            report = out_root / f"{d.name}.failed-checks.json"
            report.write_text(_checks_json(results), encoding="utf-8")
            raise GeometryError(
                f"{len(failed)} check(s) failed: " + "; ".join(failed) + f" (see {report})",
                operation="self-check",
            )
        checks_text = _checks_json(results)
        folder.write_text("checks.json", checks_text)
        folder.write_text("parts.json", _parts_json(parts, kernel))
        # (the stamp is written last, once report.html is there: see below)
        from geomgen.outputs.html_report import write_html

        write_html(
            layout,
            folder.path("report.html"),
            checks=json.loads(checks_text),
            svg=svg,
            meshes=meshes,
            units=system,
        )
        stage("wrote report.html")
        from geomgen.store.cache import manifest_of

        stamp = {"key": build_key, "files": manifest_of(folder.temp, skip=(BUILD_STAMP,))}
        folder.write_text(BUILD_STAMP, json.dumps(stamp, indent=1, sort_keys=True))
    return BuildResult(
        out_root / d.name,
        tuple(part_rows),
        len(results),
        tuple(store.hits),
        tuple(store.misses),
        outputs_reused=tuple(reused),
    )


def _check_cache_folder(out_root: Path) -> None:
    """The build cache ``out_root/.cache`` must be a folder (or not be there yet): refused
    before any work, not once the solids are built."""
    cache = out_root / ".cache"
    if (cache.exists() or cache.is_symlink()) and not cache.is_dir():
        raise InputError(
            "the build cache is in the way: it exists and is not a folder; remove it or use "
            "another --out",
            source=str(cache),
        )


def _section_data(layout, dirs: tuple) -> list:
    """Coordinates of every section the surfaces use (a changed coordinate file changes the
    build key)."""
    from geomgen.shapes import airfoils

    names = sorted(
        {n for sl in layout.surfaces for st in sl.sizing.planform.stations for n in st.airfoil[:2]}
    )
    return [(n, airfoils.load(n, dirs).upper, airfoils.load(n, dirs).lower) for n in names]


def _unchanged(target: Path, key: str) -> bool:
    """The folder holds a build of exactly these inputs, every file as that build left it."""
    try:
        stamp = json.loads((target / BUILD_STAMP).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return False
    if stamp.get("key") != key:
        return False
    from geomgen.store.cache import manifest_of

    return stamp.get("files") == manifest_of(target, skip=(BUILD_STAMP,))


def _kept_result(target: Path) -> BuildResult:
    parts = json.loads((target / "parts.json").read_text(encoding="utf-8"))["parts"]
    checks = json.loads((target / "checks.json").read_text(encoding="utf-8"))
    rows = tuple((p["name"], p["volume"]["value"], float("nan")) for p in parts)
    names = tuple(p["name"] for p in parts)
    return BuildResult(target, rows, checks["count"], names, (), True)


def _parts_json(parts, kernel) -> str:
    """Every built part's volume and axis-aligned bounding box (mm), for ``geomgen diff``."""
    rows = []
    for p in parts:
        lo, hi = kernel.bounding_box(p.shape)
        rows.append(
            {
                "name": p.name,
                "volume": {"value": kernel.volume(p.shape), "unit": "mm^3"},
                "bounding_box": {"min": lo, "max": hi, "unit": "mm"},
            }
        )
    return json.dumps({"parts": rows}, indent=2) + "\n"


def _checks_json(results) -> str:
    from geomgen.outputs.report import CAUTION

    data = {
        "caution": CAUTION,
        "passed": all(c.passed for c in results),
        "count": len(results),
        "checks": [c.as_dict() for c in results],
    }
    return json.dumps(data, indent=2) + "\n"
