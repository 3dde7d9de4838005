"""The ``solids`` and ``drawings`` sections of the design file: settings of the outputs.

Declaration of their keys and the frozen ``SolidsSpec`` and ``DrawingsSpec`` (lengths in m;
the tessellation as a fraction of the local chord).
"""

from __future__ import annotations

from dataclasses import dataclass

from geomgen.design.fields import Mapping, Number, Quantity, Text, between

SOLIDS = Mapping(
    description="settings of the solids, exports and self-checks",
    default={},
    fields=(
        (
            "te_thickness",
            Quantity(
                dimension="length",
                bounds=between(0.0, 0.02),
                default="0.5 mm",
                description="minimum trailing-edge thickness, blended over the aft chord",
            ),
        ),
        (
            "tessellation",
            Number(
                bounds=between(1e-5, 0.01),
                default=0.0005,
                description="largest deviation of the STL from the true surface, as a "
                "fraction of the local chord",
            ),
        ),
        (
            "section_points",
            Number(
                bounds=between(21, 301),
                integer=True,
                default=61,
                description="points per surface (upper or lower) of each section",
            ),
        ),
    ),
)


DRAWINGS = Mapping(
    description="settings of drawings and 1:1 section templates",
    default={},
    fields=(
        (
            "template_spacing",
            Quantity(
                dimension="length",
                bounds=between(0.01, 10.0),
                optional=True,
                description="spanwise spacing of extra section templates between the root, "
                "panel breaks and tip (none if left out)",
            ),
        ),
        (
            "paper",
            Text(choices=("A4", "Letter"), default="A4", description="page size of the PDF"),
        ),
    ),
)


@dataclass(frozen=True)
class SolidsSpec:
    te_thickness: float  # m, minimum trailing-edge thickness
    tessellation: float  # fraction of the local chord
    section_points: int  # per surface of a section


@dataclass(frozen=True)
class DrawingsSpec:
    template_spacing: float | None  # m, spanwise spacing of extra templates
    paper: str  # A4 | Letter
