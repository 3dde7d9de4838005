"""``geomgen model``: the printable wind-tunnel model, for the CLI: the full-size solids with
thickened trailing edges, drilled and cut by the model's plan, scaled to the model (model
millimetres), meshed, checked and written as STL per piece, one 3MF, a parts list and a model
report. Returns what it wrote; errors are raised, never printed here."""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from geomgen.commands.pipeline import _checks_json, _size
from geomgen.errors import GeometryError
from geomgen.store.folder import OutputFolder
from geomgen.store.lock import FolderLock


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
    a parts list, a model report and checks. The output folder is locked for the whole
    run: a second run into it refuses at once."""
    t0 = time.perf_counter()

    def stage(text: str) -> None:
        progress(f"[{time.perf_counter() - t0:6.1f} s] {text}")

    d, layout, dirs = _size(design_path)
    with FolderLock(out_root / f"{d.name}-model", "model"):
        return _model_locked(d, layout, dirs, out_root, scale, span, stage)


def _model_locked(d, layout, dirs, out_root, scale, span, stage) -> ModelResult:
    """run_model past sizing, under the lock of its output folder."""
    import dataclasses

    import numpy as np

    from geomgen import design as design_module
    from geomgen.printed_model import plan as mdl

    spec = d.model if d.model is not None else design_module.default_model(d.source)
    k = mdl.model_scale(layout, spec, mdl.parse_scale(scale) if scale else None, span)
    f = 1000.0 * k
    te_full = max(d.solids.te_thickness, spec.min_te_thickness / k)
    d2 = dataclasses.replace(d, solids=dataclasses.replace(d.solids, te_thickness=te_full))
    layout2 = dataclasses.replace(layout, sizing=dataclasses.replace(layout.sizing, design=d2))
    from geomgen.checks import common, piece_checks, threemf_io
    from geomgen.solids import assembly, kernel, meshing, printed

    built = assembly.build(layout2, dirs)
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
                variants.append((v, assembly.deflect_part(built, c.name, v.deflection), key))
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
        full["fuselage"] = printed.cut_away(full["fuselage"], sockets, "fuselage")
        stage("cut the sockets of the surface roots into the fuselage")
    pieces: dict[str, object] = {}
    piece_holes: dict[str, list] = {}
    reassembly = []
    for plan in plans:
        drilled = printed.drill(full[plan.part], [_full_size(h, k) for h in plan.holes], plan.part)
        names = plan.pieces
        for i, name in enumerate(names):
            lo, hi = plan.bounds(i)
            if len(names) == 1:
                piece = drilled
            else:
                a, b = (lo, hi) if plan.sign > 0 else (-hi, -lo)
                piece = printed.slice_between(drilled, plan.axis, a / k, b / k, name)
            pieces[name] = printed.scaled(piece, k, name)
            piece_holes[name] = _holes_in(plan, plan.holes, lo, hi)
        reassembly.append((plan, kernel.volume(full[plan.part]) * k**3))
    for v, shape, key in variants:
        drilled = printed.drill(shape, [_full_size(key, k)], v.name)
        pieces[v.name] = printed.scaled(drilled, k, v.name)
        piece_holes[v.name] = [("hinge key", *_stretch(key, *key.moving), key.size)]
    stage(f"drilled and cut {len(pieces)} pieces")

    meshes = {
        # the body's pointed ends: the mesher leaves zero-area triangles at a tip
        name: (meshing.body_mesh_arrays if name.startswith("fuselage") else meshing.mesh_arrays)(
            shape, MODEL_DEFLECTION
        )
        for name, shape in pieces.items()
    }
    stage("meshed every piece")
    build_mm = tuple(v * 1000.0 for v in spec.build_volume)
    wall_mm = spec.min_wall * 1000.0
    results: list = []
    for name, (v, fcs) in meshes.items():
        results += piece_checks.model_piece_checks(
            name, v, fcs, build_mm, piece_holes[name], wall_mm
        )
    results += _reassembly_checks(reassembly, pieces, common, kernel)
    results += _joint_checks(plans, meshes, piece_checks)
    stage(f"ran {len(results)} checks")

    system = d.units
    effect = mdl.scale_effect(layout2, spec, k)
    rows = []
    for name, shape in pieces.items():
        vol = kernel.volume(shape)
        v, fcs = meshes[name]
        normal, _ = piece_checks.print_orientation(v, fcs)
        size = piece_checks.obb_extents(v, fcs)
        rows.append((name, _source_part(name, plans, variants), size, vol, normal))
    folder_name = f"{d.name}-model"
    with OutputFolder(out_root / folder_name) as folder:
        for name, (v, fcs) in meshes.items():
            meshing.write_stl_arrays(v, fcs, folder.path(f"stl/{name}.stl"), name)
        threemf = folder.path(f"{folder_name}.3mf")
        threemf_io.write_3mf(meshes, threemf)
        back = threemf_io.read_3mf(threemf)
        results.append(threemf_io.threemf_check(meshes, back))
        from geomgen.printed_model.report import parts_csv, parts_markdown, report_markdown

        density = spec.material_density
        folder.write_text("parts.md", parts_markdown(rows, density, piece_checks.orientation_words))
        folder.write_text("parts.csv", parts_csv(rows, density, piece_checks.orientation_words))
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


def _reassembly_checks(reassembly, pieces, common, kernel) -> list:
    """The pieces of each part add up to the scaled part minus its holes (1 %)."""
    from geomgen.checks.tolerances import TOLERANCES

    out = []
    for plan, whole in reassembly:
        total = sum(kernel.volume(pieces[n]) for n in plan.pieces)
        holes = sum(h.section_area * h.length * sum(b - a for a, b in h.solid) for h in plan.holes)
        out.append(
            common._rel(
                "pieces reassemble to the scaled part minus its holes",
                plan.part,
                total,
                whole - holes,
                TOLERANCES.model_reassembly_volume,
                "mm^3",
            )
        )
    return out


def _joint_checks(plans, meshes, piece_checks) -> list:
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
                loops = piece_checks.plane_loop_centres(*meshes[n], point, normal)
                found.append([c for c, _ in loops[1:]])
            out.append(
                piece_checks.hole_alignment_check(
                    f"{plan.part} joint {j.index}",
                    found[0],
                    found[1],
                    TOLERANCES.model_hole_alignment,
                )
            )
    return out
