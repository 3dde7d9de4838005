"""The stages in order, for the CLI: size (design -> reports) and build (-> solids, exports,
checks). Each function returns what it wrote; errors are raised, never printed here."""

from __future__ import annotations

import json
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from geomgen.errors import GeometryError, InputError
from geomgen.store.folder import OutputFolder

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


def _write_reports(folder: OutputFolder, layout, system: str) -> None:
    from geomgen.outputs.markdown_report import to_markdown
    from geomgen.outputs.report import to_json

    folder.write_text("report.json", to_json(layout))
    folder.write_text("report.md", to_markdown(layout, system))


def _write_drawings(folder: OutputFolder, layout, system: str, dirs: tuple) -> str:
    """Three-view (SVG, PNG) and the shop DXF files; returns the SVG text for report.html."""
    from geomgen.outputs.three_view import three_view

    svg = folder.path("three-view.svg")
    three_view(layout, svg, folder.path("three-view.png"), system)
    _write_shop_files(folder, layout, dirs)
    return svg.read_text(encoding="utf-8")


def _write_shop_files(folder: OutputFolder, layout, dirs: tuple) -> None:
    """DXF files 1:1 in mm: plan view, one planform per surface, section templates."""
    from geomgen.outputs.dxf import write_plan_dxf, write_planform_dxfs, write_template_dxf

    write_plan_dxf(layout, folder.path("dxf/plan.dxf"))
    write_planform_dxfs(layout, folder.path("dxf/plan.dxf").parent)
    write_template_dxf(layout, folder.path("dxf/templates.dxf"), dirs)


def run_size(design_path: Path, out_root: Path, units: str | None, drawings: bool = True) -> Path:
    """Sizing and layout of one design; writes report.json and report.md, and unless
    ``drawings`` is False the three-view, the DXF files and report.html. Returns the folder."""
    d, layout, dirs = _size(design_path)
    system = units or d.units
    with OutputFolder(out_root / d.name) as folder:
        _write_reports(folder, layout, system)
        if drawings:
            from geomgen.outputs.html_report import write_html

            svg = _write_drawings(folder, layout, system, dirs)
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


#: the stamp a build leaves in its folder: the key of its inputs and its files' hashes
BUILD_STAMP = ".build-stamp.json"


def run_build(
    design_path: Path,
    out_root: Path,
    units: str | None,
    only: set[str] | None = None,
    progress: Callable[[str], None] = lambda _: None,
    fresh: bool = False,
) -> BuildResult:
    """Size, lay out, build the solids, export STEP and STL, check everything. Solids come
    from the cache under ``out_root/.cache`` when their inputs are unchanged, and a build
    whose inputs are all unchanged keeps the last outputs; ``fresh`` ignores both."""
    t0 = time.perf_counter()

    def stage(text: str) -> None:
        progress(f"[{time.perf_counter() - t0:6.1f} s] {text}")

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
    from geomgen.solids import cad

    store = Cache(out_root / ".cache", enabled=not fresh)
    built = cad.build(layout, dirs, only, store)
    parts = built.parts
    if store.hits:
        stage(f"reused {len(store.hits)} solid(s) from the cache: {', '.join(store.hits)}")
    body = next((p for p in parts if p.name == "fuselage"), None)
    stage(f"built {len(parts)} solids")
    results: list = []
    part_rows = []
    system = units or d.units
    with OutputFolder(out_root / d.name) as folder:
        _write_reports(folder, layout, system)
        svg = _write_drawings(folder, layout, system, dirs)
        from geomgen.outputs.template_pdf import write_template_pdf

        write_template_pdf(layout, folder.path("templates.pdf"), dirs)
        stage("wrote the reports, drawings, DXF files and 1:1 templates")
        step_path = folder.path(f"{d.name}.step")
        from geomgen.store.stamp import output_time

        cad.write_step(parts, step_path, d.name, when=output_time(d))
        stage(f"wrote {step_path.name}")
        meshes = {}
        for p in parts:
            deflection = d.solids.tessellation * p.local_chord_min
            stl = folder.path(f"stl/{p.name}.stl")
            if p is body:  # pointed ends: the writer drops the tips' zero-area triangles
                cad.write_body_stl(p.shape, stl, deflection)
            else:
                cad.write_stl(p.shape, stl, deflection)
            solid_volume = cad.volume(p.shape)
            part_checks, meshes[p.name] = checks.stl_checks(p.name, stl, solid_volume)
            results += part_checks
            part_rows.append((p.name, solid_volume, deflection))
        stage(f"wrote {len(parts)} STL files")
        results += checks.surface_checks(built, dirs)
        results += checks.junction_checks(built, meshes)
        if body is not None:
            results += checks.fuselage_checks(
                body.shape, layout.body, d.solids.tessellation * body.local_chord_min
            )
        results += checks.step_checks(cad.read_step(step_path), parts)
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
        folder.write_text("parts.json", _parts_json(parts, cad))
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


def _parts_json(parts, cad) -> str:
    """Every built part's volume and axis-aligned bounding box (mm), for ``geomgen diff``."""
    rows = []
    for p in parts:
        lo, hi = cad.bounding_box(p.shape)
        rows.append(
            {
                "name": p.name,
                "volume": {"value": cad.volume(p.shape), "unit": "mm^3"},
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


# --- geomgen model ------------------------------------------------------------------------------


@dataclass(frozen=True)
class ModelResult:
    folder: Path
    scale: float  # model / full size
    pieces: tuple[tuple[str, float, float], ...]  # name, volume (mm^3), mass (g)
    checks: int


#: STL deflection of printed pieces (mm): well under a nozzle width
MODEL_DEFLECTION = 0.05


def run_model(
    design_path: Path,
    out_root: Path,
    scale: str | None = None,
    span: float | None = None,
    progress: Callable[[str], None] = lambda _: None,
) -> ModelResult:
    """Printable wind-tunnel model pieces: scaled solids with thickened trailing edges, cut
    to fit the printer, with dowel, spar, sting and hinge-key holes; STL per piece, one 3MF,
    a parts list, a model report and checks."""
    import dataclasses

    import numpy as np

    from geomgen import design as design_module
    from geomgen.printed_model import plan as mdl

    t0 = time.perf_counter()

    def stage(text: str) -> None:
        progress(f"[{time.perf_counter() - t0:6.1f} s] {text}")

    d, layout, dirs = _size(design_path)
    spec = d.model if d.model is not None else design_module.default_model(d.source)
    k = mdl.model_scale(layout, spec, mdl.parse_scale(scale) if scale else None, span)
    f = 1000.0 * k
    te_full = max(d.solids.te_thickness, spec.min_te_thickness / k)
    d2 = dataclasses.replace(d, solids=dataclasses.replace(d.solids, te_thickness=te_full))
    layout2 = dataclasses.replace(layout, sizing=dataclasses.replace(layout.sizing, design=d2))
    from geomgen.checks import solid_checks as checks
    from geomgen.solids import cad

    built = cad.build(layout2, dirs)
    stage(f"built the full-size solids (trailing edges at least {te_full * 1000:.1f} mm)")
    shapes = {p.name: p.shape for p in built.parts if not p.moving}

    plans: list = []
    # variant, full-size shape at its deflection, key hole (model mm)
    variants: list[tuple[mdl.Variant, object, object]] = []
    asked = mdl.deflections(layout2, spec)
    for sb in built.sides:
        sl, side = sb.surface, sb.side
        plan = mdl.surface_plan(layout2, sl, side, spec, k, te_full, dirs)
        keys = []
        for cb in sb.controls:
            c = cb.layout
            cspec = next(x for x in sl.sizing.spec.controls if x.kind == c.kind)
            p0, p1 = cb.axis
            aft = cb.hinge_plane[1]
            up = np.cross(aft, (p1 - p0) / np.linalg.norm(p1 - p0))
            key = mdl.hinge_key(sl, c, spec, f, up, cspec.side_gap * f)
            keys.append(key)
            for v in (v for v in asked if v.part == c.name):
                variants.append((v, cad.deflect_part(built, c.name, v.deflection), key))
        plans.append(dataclasses.replace(plan, holes=plan.holes + tuple(keys)))
    if layout2.body is not None:
        spars = [h for p in plans for h in p.holes if h.kind == "spar"]
        plans.append(mdl.body_plan(layout2, spec, k, spars))
    else:
        wing = next(i for i, p in enumerate(plans) if p.part == "wing-right")
        sting = mdl.wing_root_sting(layout2, spec, f, dirs)
        plans[wing] = dataclasses.replace(plans[wing], holes=plans[wing].holes + (sting,))
    stage(f"planned {sum(len(p.pieces) for p in plans)} pieces and {len(variants)} deflections")

    # booleans on the full-size solids (mm), the pieces scaled at the end: measured here, the
    # same booleans on solids scaled to 1:10 took 20 times longer and came back invalid
    full = dict(shapes)
    if "fuselage" in full:
        sockets = [s for n, s in full.items() if n != "fuselage"]
        full["fuselage"] = cad.cut_away(full["fuselage"], sockets, "fuselage")
        stage("cut the sockets of the surface roots into the fuselage")
    pieces: dict[str, object] = {}
    piece_holes: dict[str, list] = {}
    reassembly = []
    for plan in plans:
        drilled = cad.drill(full[plan.part], [_full_size(h, k) for h in plan.holes], plan.part)
        names = plan.pieces
        for i, name in enumerate(names):
            lo, hi = plan.bounds(i)
            if len(names) == 1:
                piece = drilled
            else:
                a, b = (lo, hi) if plan.sign > 0 else (-hi, -lo)
                piece = cad.slice_between(drilled, plan.axis, a / k, b / k, name)
            pieces[name] = cad.scaled(piece, k, name)
            piece_holes[name] = _holes_in(plan, plan.holes, lo, hi)
        reassembly.append((plan, cad.volume(full[plan.part]) * k**3))
    for v, shape, key in variants:
        drilled = cad.drill(shape, [_full_size(key, k)], v.name)
        pieces[v.name] = cad.scaled(drilled, k, v.name)
        piece_holes[v.name] = [("hinge key", *_stretch(key, *key.moving), key.size)]
    stage(f"drilled and cut {len(pieces)} pieces")

    meshes = {
        # the body's pointed ends: the mesher leaves zero-area triangles at a tip
        name: (cad.body_mesh_arrays if name.startswith("fuselage") else cad.mesh_arrays)(
            shape, MODEL_DEFLECTION
        )
        for name, shape in pieces.items()
    }
    stage("meshed every piece")
    build_mm = tuple(v * 1000.0 for v in spec.build_volume)
    wall_mm = spec.min_wall * 1000.0
    results: list = []
    for name, (v, fcs) in meshes.items():
        results += checks.model_piece_checks(name, v, fcs, build_mm, piece_holes[name], wall_mm)
    results += _reassembly_checks(reassembly, pieces, checks, cad)
    results += _joint_checks(plans, meshes, checks)
    stage(f"ran {len(results)} checks")

    system = d.units
    effect = mdl.scale_effect(layout2, spec, k)
    rows = []
    for name, shape in pieces.items():
        vol = cad.volume(shape)
        v, fcs = meshes[name]
        normal, _ = checks.print_orientation(v, fcs)
        size = checks.obb_extents(v, fcs)
        rows.append((name, _source_part(name, plans, variants), size, vol, normal))
    folder_name = f"{d.name}-model"
    with OutputFolder(out_root / folder_name) as folder:
        for name, (v, fcs) in meshes.items():
            cad.write_stl_arrays(v, fcs, folder.path(f"stl/{name}.stl"), name)
        threemf = folder.path(f"{folder_name}.3mf")
        checks.write_3mf(meshes, threemf)
        back = checks.read_3mf(threemf)
        results.append(checks.threemf_check(meshes, back))
        from geomgen.printed_model.report import parts_csv, parts_markdown, report_markdown

        density = spec.material_density
        folder.write_text("parts.md", parts_markdown(rows, density, checks.orientation_words))
        folder.write_text("parts.csv", parts_csv(rows, density, checks.orientation_words))
        folder.write_text(
            "model-report.md",
            report_markdown(layout2, spec, k, effect, plans, variants, te_full, system),
        )
        failed = tuple(f"{c.part}: {c.name}" for c in results if not c.passed)
        if failed:
            report = out_root / f"{folder_name}.failed-checks.json"
            report.write_text(_checks_json(results), encoding="utf-8")
            raise GeometryError(
                f"{len(failed)} check(s) failed: " + "; ".join(failed) + f" (see {report})",
                operation="self-check",
            )
        folder.write_text("checks.json", _checks_json(results))
    stage("wrote the pieces, the 3MF, the parts list and the model report")
    masses = tuple((r[0], r[3], r[3] * 1e-9 * spec.material_density * 1000.0) for r in rows)
    return ModelResult(out_root / folder_name, k, masses, len(results))


def _full_size(hole, k: float):
    """A model hole (model mm) at full size (mm), for the booleans."""
    import dataclasses

    return dataclasses.replace(
        hole,
        start=tuple(v / k for v in hole.start),
        end=tuple(v / k for v in hole.end),
        size=hole.size / k,
    )


def _stretch(hole, a: float, b: float):
    import numpy as np

    s, e = np.asarray(hole.start), np.asarray(hole.end)
    return tuple(s + a * (e - s)), tuple(s + b * (e - s))


def _holes_in(plan, holes, lo: float, hi: float) -> list:
    """(kind, start, end, size) of the stretches of holes that run through material of the
    piece between stations lo and hi (mm), for its wall checks; 0.5 mm clear of its faces."""
    import numpy as np

    out = []
    for h in holes:
        s, e = np.asarray(h.start), np.asarray(h.end)
        for a, b in h.solid:
            p, q = s + a * (e - s), s + b * (e - s)
            sp, sq = plan.sign * p[plan.axis], plan.sign * q[plan.axis]
            if abs(sq - sp) < 1e-9:  # across the cut axis: in this piece or not
                if lo + 0.5 < sp < hi - 0.5:
                    out.append((h.kind, tuple(p), tuple(q), h.size))
                continue
            t0 = (max(lo + 0.5, min(sp, sq)) - sp) / (sq - sp)
            t1 = (min(hi - 0.5, max(sp, sq)) - sp) / (sq - sp)
            t0, t1 = sorted((min(max(t0, 0.0), 1.0), min(max(t1, 0.0), 1.0)))
            if (t1 - t0) * np.linalg.norm(q - p) > 1.0:
                out.append((h.kind, tuple(p + t0 * (q - p)), tuple(p + t1 * (q - p)), h.size))
    return out


def _source_part(name: str, plans, variants) -> str:
    for plan in plans:
        if name in plan.pieces:
            return plan.part
    return next(v.part for v, _, _ in variants if v.name == name)


def _reassembly_checks(reassembly, pieces, checks, cad) -> list:
    """The pieces of each part add up to the scaled part minus its holes (1 %)."""
    from geomgen.checks.tolerances import TOLERANCES

    out = []
    for plan, whole in reassembly:
        total = sum(cad.volume(pieces[n]) for n in plan.pieces)
        holes = sum(h.section_area * h.length * sum(b - a for a, b in h.solid) for h in plan.holes)
        out.append(
            checks._rel(
                "pieces reassemble to the scaled part minus its holes",
                plan.part,
                total,
                whole - holes,
                TOLERANCES.model_reassembly_volume,
                "mm^3",
            )
        )
    return out


def _joint_checks(plans, meshes, checks) -> list:
    """The dowel holes on the two faces of every joint line up (0.05 mm)."""
    import numpy as np

    from geomgen.checks.tolerances import TOLERANCES

    out = []
    for plan in plans:
        names = plan.pieces
        for j in plan.joints:
            a, b = names[j.index - 1], names[j.index]
            normal = np.zeros(3)
            normal[plan.axis] = 1.0
            point = np.zeros(3)
            point[plan.axis] = plan.sign * j.station
            found = []
            for n in (a, b):
                loops = checks.plane_loop_centres(*meshes[n], point, normal)
                found.append([c for c, _ in loops[1:]])
            out.append(
                checks.hole_alignment_check(
                    f"{plan.part} joint {j.index}",
                    found[0],
                    found[1],
                    TOLERANCES.model_hole_alignment,
                )
            )
    return out
