"""Every tolerance of the self-checks in one place; the checks and the tests import these, so
no limit is written twice."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Tolerances:
    #: mesh volume vs OpenCASCADE volume, relative
    mesh_vs_solid_volume: float = 0.005
    #: a surface's solid volume vs the integral of its section areas along the span, relative
    volume_vs_sections: float = 0.01
    #: plan-view (fin: side-view) projected area vs the sized area, relative
    projected_area: float = 0.005
    #: volumes that booleans must conserve (fixed + cut region = whole), relative
    boolean_consistency: float = 1e-6
    #: the gaps (hinge gap, side gaps, cove) may take at most this fraction of a moving part
    max_gap_fraction: float = 0.10
    #: cut-face points off the hinge plane, as a fraction of the local chord
    hinge_plane: float = 1e-6
    #: a hinge axis point off the mean line of the uncut solid (halfway between its surfaces,
    #: along the sections' thickness direction), as a fraction of the local chord
    hinge_mean_line: float = 1e-4
    #: a written mesh's extreme (spanwise ends, foremost point, body nose and tail) vs where
    #: the layout puts it, mm, on top of the mesh's chordal tolerance for curved extremes
    part_position: float = 0.01
    #: STEP read back vs the built solids, relative volume (read back with the fast rule)
    step_readback: float = 1e-4
    #: meshes used only for the projected-area checks are this many times coarser than the
    #: STL tolerance (a chordal deviation changes a projected area to second order only)
    area_mesh_coarsening: float = 4.0
    #: the fuselage's solid volume vs the integral of its section areas along x, relative
    body_volume_vs_sections: float = 0.01
    #: the fuselage's surface area vs the integral of its section perimeters (times the slope
    #: factor) plus its flat end faces, relative
    body_area_vs_perimeters: float = 0.01
    #: mesh points of a mounted surface within this distance of its root plane must lie inside
    #: the body (m); and no point outside the body may lie more than this inboard of the
    #: least station where the surface's skin meets the body (a far-side piercing would)
    junction_band: float = 1e-4
    #: the same as a fraction of the surface's root chord for the pierce check (the mesh's
    #: chordal error lets skin points near the joint wander slightly inboard)
    junction_slack: float = 0.005
    #: printable model pieces: the hole centres (dowel holes) of the two faces of a joint may
    #: lie at most this far apart (model mm; the figure the printed-model issue asks for)
    model_hole_alignment: float = 0.05
    #: printable model pieces put back together vs the scaled solid they were cut from,
    #: relative volume
    model_reassembly_volume: float = 0.01


TOLERANCES = Tolerances()
