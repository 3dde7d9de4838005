"""Self-checks of the built solids (mm, aircraft frame x aft, y right, z up): meshes and the
written STL files, every surface side and its control surfaces against the sizing and layout,
the junctions with the fuselage, the STEP read-back and the fuselage solid.

Every check records what was measured, what was expected, the tolerance and pass/fail; the
build writes them to checks.json and fails (exit 1) naming every check that did not pass.
Lengths in mm, areas in mm^2, volumes in mm^3 (the solids' unit).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import trimesh

from geomgen.checks.common import Check, _abs, _flag, _rel, load_mesh
from geomgen.checks.tolerances import TOLERANCES
from geomgen.geometry.body_side import contains, station_of
from geomgen.geometry.junction import area_between
from geomgen.geometry.layout import fixed_part_name
from geomgen.geometry.sections import volume_from_sections
from geomgen.shapes import fuselage
from geomgen.shapes.fuselage import BodyStation
from geomgen.solids import controls, kernel, meshing, records

MM = kernel.MM


def projected_area(mesh: trimesh.Trimesh, axis: np.ndarray) -> float:
    """Area of the mesh's shadow along ``axis`` (mm^2) for a closed surface that the axis
    crosses twice at most (a wing in plan view, a fin in side view): half the sum of the
    triangles' |area x cos(normal, axis)|."""
    return 0.5 * float(np.abs(mesh.area_faces * (mesh.face_normals @ axis)).sum())


def mesh_checks(part: str, mesh: trimesh.Trimesh, solid_volume: float) -> list[Check]:
    """Watertight, consistent winding, positive volume, mesh volume vs the solid's."""
    t = TOLERANCES
    return [
        _flag("mesh is watertight", part, mesh.is_watertight),
        _flag("mesh winding is consistent", part, mesh.is_winding_consistent),
        _flag("mesh volume is positive", part, mesh.volume > 0),
        _rel(
            "mesh volume vs solid volume",
            part,
            mesh.volume,
            solid_volume,
            t.mesh_vs_solid_volume,
            "mm^3",
        ),
    ]


def stl_checks(
    part: str, path: Path, solid_volume: float
) -> tuple[list[Check], tuple[np.ndarray, np.ndarray]]:
    """Checks of one written STL file, and its mesh as (vertices, faces) arrays (mm) for
    whoever shows it next (report.html), so the file is read once."""
    mesh = trimesh.load_mesh(str(path), file_type="stl")
    return mesh_checks(part, mesh, solid_volume), (
        np.asarray(mesh.vertices, dtype=np.float64),
        np.asarray(mesh.faces, dtype=np.int64),
    )


def surface_checks(build: records.Build, dirs: tuple = ()) -> list[Check]:
    """Checks of every surface side and its control surfaces against the sizing and layout."""
    t = TOLERANCES
    d = build.layout.sizing.design
    points, te = d.solids.section_points, d.solids.te_thickness
    out: list[Check] = []
    for sb in build.sides:
        sl = sb.surface
        ss = sl.sizing
        name = fixed_part_name(sl.key, sb.side)
        whole_volume = kernel.volume(sb.whole)
        expected_volume = volume_from_sections(ss, points, te, dirs, start=sl.mount_s) * MM**3
        out.append(
            _rel(
                "surface volume vs integral of section areas",
                name,
                whole_volume,
                expected_volume,
                t.volume_vs_sections,
                "mm^3",
            )
        )
        chord_min = min(st.chord for st in ss.planform.stations) * MM
        deflection = d.solids.tessellation * chord_min * t.area_mesh_coarsening
        whole_mesh = load_mesh(*meshing.mesh_arrays(sb.whole, deflection))
        out.append(_flag("mesh of the uncut surface is watertight", name, whole_mesh.is_watertight))
        view = np.array([0.0, 1.0, 0.0]) if sl.key == "vertical_tail" else np.array([0, 0, 1.0])
        out.append(
            _rel(
                "projected area vs sizing area",
                name,
                projected_area(whole_mesh, view),
                area_between(ss.planform, sl.mount_s, ss.planform.semi_span) * MM**2,
                t.projected_area,
                "mm^2",
            )
        )
        fixed_volume = kernel.volume(sb.fixed)
        for cb in sb.controls:
            c = cb.layout
            moving_volume = kernel.volume(cb.moving_undeflected)
            # gaps: the cove's volume minus the moving part's, between 0 and a few percent
            gap = cb.cut_region_volume - moving_volume
            out.append(
                _abs(
                    "gap volume (cove minus moving part) / moving part",
                    c.name,
                    gap / moving_volume,
                    t.max_gap_fraction / 2,
                    t.max_gap_fraction / 2,
                    "1",
                )
            )
            aft_mesh = load_mesh(*meshing.mesh_arrays(cb.aft_portion, deflection))
            # seen along the sections' thickness direction (turned by incidence and twist):
            # the hinge cut is square to the chord, so in plan view a surface set at an
            # incidence shows its cut face, a strip t sin(i) wide (0.8 % of an aileron's area
            # on a random design at -3 deg, measured)
            chord_normal = controls._thickness_normal(sl, 0.5 * (c.s_start + c.s_end))
            out.append(
                _rel(
                    "control area aft of the hinge vs report",
                    c.name,
                    projected_area(aft_mesh, chord_normal),
                    c.area * MM**2,
                    t.projected_area,
                    "mm^2",
                )
            )
            point, normal = cb.hinge_plane
            local_chord = min(ss.planform.at(c.s_start)[1], ss.planform.at(c.s_end)[1]) * MM
            distances = meshing.face_points_on_plane(
                cb.aft_portion, point, normal, 1e-3 * local_chord
            )
            worst = max(distances) if distances else float("inf")
            out.append(
                _abs(
                    "cut face lies on the hinge plane",
                    c.name,
                    worst,
                    0.0,
                    t.hinge_plane * local_chord,
                    "mm",
                )
            )
        if sb.controls:
            # the fixed part plus what the coves took out is the uncut surface (no overlap, no
            # loss); the coves minus the moving parts are the gaps
            moving_total = sum(kernel.volume(cb.moving_undeflected) for cb in sb.controls)
            gaps = sum(cb.cut_region_volume for cb in sb.controls) - moving_total
            out.append(
                _rel(
                    "fixed + moving parts vs uncut surface minus gaps",
                    name,
                    fixed_volume + moving_total,
                    whole_volume - gaps,
                    t.boolean_consistency,
                    "mm^3",
                )
            )
    return out


def position_checks(build: records.Build, meshes: dict, dirs: tuple = ()) -> list[Check]:
    """Each written mesh where the layout puts it, and each hinge axis on the uncut solid's
    mean line (mm).

    Positions: a surface side's fixed part reaches from its solid root station to its tip and
    forward to the foremost point of its placed sections; a moving part, turned back to zero
    deflection, spans its control's stations less the side gaps; the fuselage reaches from its
    first to its last station. Hinge axes: at both ends and the middle, the axis lies halfway
    between the uncut solid's surfaces along the sections' thickness direction."""
    from geomgen.geometry.body_side import station_of
    from geomgen.geometry.sections import surface_sections

    t = TOLERANCES
    d = build.layout.sizing.design
    points, te = d.solids.section_points, d.solids.te_thickness
    chordal = {p.name: d.solids.tessellation * p.local_chord_min for p in build.parts}
    out: list[Check] = []

    def extent(label, part, got, want, slack=0.0):
        out.append(_abs(label, part, got, want, t.part_position + slack, "mm"))

    for sb in build.sides:
        sl, side = sb.surface, sb.side
        ss = sl.sizing
        name = fixed_part_name(sl.key, side)
        if name in meshes:
            v = meshes[name][0]
            s = station_of(ss, side, v / MM) * MM
            extent("fixed part's root end vs layout station", name, s.min(), sl.mount_s * MM)
            extent(
                "fixed part's tip end vs layout station", name, s.max(), ss.planform.semi_span * MM
            )
            secs = surface_sections(sl, side, points, te, dirs).sections
            x_min = min(min(sec.upper[:, 0].min(), sec.lower[:, 0].min()) for sec in secs) * MM
            extent("fixed part's foremost x vs layout", name, v[:, 0].min(), x_min, chordal[name])
        for cb in sb.controls:
            c = cb.layout
            spec = next(x for x in ss.spec.controls if x.kind == c.kind)
            p0, p1 = (np.asarray(p, dtype=float) for p in cb.axis)
            if c.name in meshes:
                back = controls.undeflect_points(sl, p0, p1, spec.deflection, meshes[c.name][0])
                s = station_of(ss, side, back / MM) * MM
                gap = spec.side_gap * MM
                extent("moving part's inner end vs layout", c.name, s.min(), c.s_start * MM + gap)
                extent("moving part's outer end vs layout", c.name, s.max(), c.s_end * MM - gap)
            reach = 2.0 * max(st.chord for st in ss.planform.stations) * MM
            # the built axis against the solid; the layout's hinge line against its mean line
            q0, q1 = (np.array(c.hinge[i].point) * MM for i in (0, -1))
            for where, point, planned in (
                ("inner end", p0, q0),
                ("middle", 0.5 * (p0 + p1), 0.5 * (q0 + q1)),
                ("outer end", p1, q1),
            ):
                station = float(station_of(ss, side, point[None, :] / MM)[0])
                normal = controls._thickness_normal(sl, station)
                hit = controls.thickness_probe(sb.whole, point, normal, reach)
                chord = ss.planform.section_frame(station)[0] * MM
                measured = float("inf")
                if hit is not None:
                    measured = float(np.dot(point - 0.5 * (hit[0] + hit[1]), normal))
                out.append(
                    _abs(
                        f"hinge axis ({where}) off the uncut solid's mean line vs layout",
                        c.name,
                        measured,
                        _layout_mean_line_offset(ss, side, station, planned, normal, dirs),
                        t.hinge_mean_line * chord,
                        "mm",
                    )
                )
    body = build.layout.body
    if body is not None and "fuselage" in meshes:
        v = meshes["fuselage"][0]
        slack = chordal["fuselage"]
        extent("fuselage nose x vs first station", "fuselage", v[:, 0].min(), body[0].x * MM, slack)
        extent("fuselage tail x vs last station", "fuselage", v[:, 0].max(), body[-1].x * MM, slack)
    return out


def _layout_mean_line_offset(ss, side: str, station: float, point, normal, dirs: tuple) -> float:
    """Signed distance (mm, along ``normal``) of a hinge axis point from the layout's mean line
    at its station: 0 at the hinge points; in between, a straight hinge that crosses chord
    fractions on a twisted panel leaves the warped mean surface by a little (about the
    fraction change x chord x twist change / 4), and the solid must show the same."""
    from geomgen.geometry.frame import place
    from geomgen.geometry.layout import mean_line_offset

    le, te = place(ss, side, station, np.array([[0.0, 0.0], [1.0, 0.0]])) * MM
    f = float(np.dot(point - le, te - le) / np.dot(te - le, te - le))
    mean = place(ss, side, station, np.array([[f, mean_line_offset(ss, station, f, dirs)]]))[0]
    return float(np.dot(point - mean * MM, normal))


def junction_checks(build: records.Build, meshes: dict) -> list[Check]:
    """Checks of every surface side mounted on the fuselage, on its STL mesh (mm): the points
    of its root end lie inside the body (so a union of the parts would be closed), and no
    point outside the body lies inboard of where the surface's skin meets the body side (a
    surface that pierced out of the far side of the body would have some)."""
    t = TOLERANCES
    body = build.layout.body
    out: list[Check] = []
    if body is None:
        return out
    for sb in build.sides:
        sl, j = sb.surface, sb.surface.junction
        name = fixed_part_name(sl.key, sb.side)
        if j is None or name not in meshes:
            continue
        vertices = meshes[name][0] / MM
        s = station_of(sl.sizing, sb.side, vertices)
        near = s < j.side_max + 0.25 * sl.sizing.planform.root_chord
        inside = np.zeros(len(vertices), dtype=bool)
        inside[near] = contains(body, vertices[near])
        root_end = s <= j.mount_s + t.junction_band
        if j.root_inside:
            out.append(
                _abs(
                    "root-end mesh points outside the body",
                    name,
                    float(np.count_nonzero(root_end & ~inside)),
                    0.0,
                    0.0,
                    "points",
                )
            )
            limit = j.skin_min - t.junction_slack * sl.sizing.planform.root_chord
        else:  # the halves join at the plane of symmetry (or a fin keeps its root)
            limit = j.mount_s - t.junction_band
        out.append(
            _abs(
                "mesh points outside the body inboard of its side (far-side piercing)",
                name,
                float(np.count_nonzero(~inside & (s < limit))),
                0.0,
                0.0,
                "points",
            )
        )
    return out


def step_checks(
    step_names_volumes: dict[str, float], parts: tuple[records.Part, ...]
) -> list[Check]:
    """The STEP file read back holds the same parts with the same volumes."""
    t = TOLERANCES
    out = [
        _flag(
            "STEP holds exactly the built parts",
            "STEP",
            sorted(step_names_volumes) == sorted(p.name for p in parts),
        )
    ]
    for p in parts:
        if p.name in step_names_volumes:
            out.append(
                _rel(
                    "STEP read-back volume",
                    p.name,
                    step_names_volumes[p.name],
                    kernel.volume(p.shape),
                    t.step_readback,
                    "mm^3",
                )
            )
    return out


def fuselage_checks(
    shape: kernel.cq.Shape,
    stations: tuple[BodyStation, ...],
    tessellation_mm: float,
    ruled: bool = False,
    part: str = "fuselage",
    arrays: tuple | None = None,
) -> list[Check]:
    """Checks of the fuselage solid (mm) against its stations (m): the mesh (without the
    zero-area triangles at a pointed end, as written to STL) is watertight and consistently
    wound; the volume agrees with the integral of section areas along x, and the surface area
    with the integral of section perimeters (times the slope factor) plus the flat end faces.
    ``ruled`` must be what the body was lofted with; ``arrays``: the body's mesh as written
    to STL (vertices, faces), made at ``tessellation_mm`` when not given."""
    t = TOLERANCES
    # the exact-geometry integrals first: once meshed, a shape integrates far more slowly
    solid_volume = kernel.volume(shape)
    solid_area = kernel.surface_area(shape)
    if arrays is None:
        arrays = meshing.body_mesh_arrays(shape, tessellation_mm)
    mesh = load_mesh(*arrays)
    lateral = fuselage.wetted_area_by_perimeters(stations, ruled)
    return [
        _flag("mesh is watertight", part, mesh.is_watertight),
        _flag("mesh winding is consistent", part, mesh.is_winding_consistent),
        _rel(
            "body volume vs integral of section areas",
            part,
            solid_volume,
            fuselage.volume_by_sections(stations, ruled) * MM**3,
            t.body_volume_vs_sections,
            "mm^3",
        ),
        _rel(
            "body surface area vs integral of section perimeters plus end faces",
            part,
            solid_area,
            (lateral + fuselage.end_face_area(stations)) * MM**2,
            t.body_area_vs_perimeters,
            "mm^2",
        ),
    ]
