"""The records of a build, lengths in mm in the aircraft frame (x aft, y right, z up):
``Part``, one exported solid; ``ControlBuild`` and ``SideBuild``, what the self-checks need to
know about one surface side and its cut-free control surfaces; ``Build``, all of them for one
layout.
"""

from __future__ import annotations

from dataclasses import dataclass

import cadquery as cq
import numpy as np

from geomgen.geometry.layout import ControlLayout, Layout, SurfaceLayout


@dataclass(frozen=True, eq=False)
class Part:
    """One exported solid, in mm."""

    name: str  # wing-right, aileron-left, fin, rudder, ...
    kind: str  # key of step.COLOURS
    surface: str  # wing | horizontal_tail | vertical_tail
    side: str  # right | left | centre
    shape: cq.Shape  # as exported (moving parts at their design deflection)
    moving: bool
    deflection: float  # rad, design deflection (0 for fixed parts)
    local_chord_min: float  # mm, smallest chord of the surface over the part's span


@dataclass(frozen=True, eq=False)
class ControlBuild:
    """What the self-checks need to know about one cut-free control surface."""

    layout: ControlLayout
    moving_undeflected: cq.Shape
    moving: cq.Shape  # at the design deflection
    axis: tuple[np.ndarray, np.ndarray]  # hinge axis points, mm (inner, outer)
    hinge_plane: tuple[np.ndarray, np.ndarray]  # (point, unit normal pointing aft), mm
    aft_portion: cq.Shape  # whole ∩ region aft of the hinge plane, between the side planes
    cut_region_volume: float  # mm^3, volume of the whole inside the fixed part's cut region


@dataclass(frozen=True, eq=False)
class SideBuild:
    """One side of one surface: the uncut solid, its fixed part, its control surfaces."""

    surface: SurfaceLayout
    side: str
    whole: cq.Shape
    fixed: cq.Shape
    controls: tuple[ControlBuild, ...]


@dataclass(frozen=True, eq=False)
class Build:
    layout: Layout
    sides: tuple[SideBuild, ...]
    parts: tuple[Part, ...]
