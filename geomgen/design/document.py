"""The design file as a whole: its top-level keys, its JSON Schema and the frozen ``Design``.

Each section's keys are declared in its own module (requirements, surfaces, controls, fuselage,
printed_model, settings); here they are put together in file order, which is also the order of
the JSON Schema. Every value of ``Design`` is in SI.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from geomgen.design.fields import Date, Mapping, Quantity, Text, between
from geomgen.design.fuselage import FUSELAGE, FuselageSpec, fuselage_spec
from geomgen.design.printed_model import MODEL, ModelSpec, model_spec
from geomgen.design.requirements import REQUIREMENTS, Requirements, requirements_spec
from geomgen.design.settings import DRAWINGS, SOLIDS, DrawingsSpec, SolidsSpec
from geomgen.design.surfaces import SurfaceSpec, surface, surface_spec

#: a design's name: the name of its output folder. Names ending in what geomgen adds to a name
#: for the files beside the outputs (``NAME-model/``, ``NAME-sweep/``,
#: ``NAME.failed-checks.json``) are refused: design ``a-model`` would share the folder of the
#: printed model of design ``a``. (ASCII only, any case: also on a case-blind file system.)
NAME_PATTERN = (
    r"^(?!.*(?:-[mM][oO][dD][eE][lL]|-[sS][wW][eE][eE][pP]"
    r"|\.[fF][aA][iI][lL][eE][dD]-[cC][hH][eE][cC][kK][sS]\.[jJ][sS][oO][nN])$)"
    r"[A-Za-z0-9][A-Za-z0-9._-]*$"
)

DESIGN = Mapping(
    description="one airplane for geomgen",
    fields=(
        (
            "name",
            Text(
                max_length=60,
                pattern=NAME_PATTERN,
                pattern_words="letters, digits, '.', '_' or '-', starting with a letter or "
                "digit, not ending in '-model', '-sweep' or '.failed-checks.json' (the names "
                "of the folders and files geomgen writes beside a design's outputs)",
                description="short name; used as the output folder name",
            ),
        ),
        ("title", Text(optional=True, description="longer title for reports")),
        (
            "date",
            Date(optional=True, description="design date YYYY-MM-DD, printed on reports"),
        ),
        (
            "units",
            Text(
                choices=("si", "imperial"),
                default="si",
                description="unit system of human-readable outputs",
            ),
        ),
        ("requirements", REQUIREMENTS),
        ("wing", surface("main wing", tail=False, controls=("aileron", "flap"))),
        ("horizontal_tail", surface("horizontal tail", tail=True, controls=("elevator",))),
        (
            "vertical_tail",
            surface("vertical tail, one-sided", tail=True, fin=True, controls=("rudder",)),
        ),
        ("solids", SOLIDS),
        ("drawings", DRAWINGS),
        (
            "tail_cone",
            Mapping(
                optional=True,
                description="a top-level key (not under horizontal_tail or vertical_tail): the "
                "tail-cone radii for the minimum-wetted-area tail arm of either tail "
                "(tail_arm: optimum); leave it out when a fuselage is given",
                fields=(
                    (
                        "front_radius",
                        Quantity(dimension="length", bounds=between(0.0, 5.0, lo_open=True)),
                    ),
                    ("rear_radius", Quantity(dimension="length", bounds=between(0.0, 5.0))),
                ),
            ),
        ),
        ("fuselage", FUSELAGE),
        ("model", MODEL),
    ),
)


def json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a design file, generated from the declaration."""
    body = DESIGN.schema()
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": "geomgen design file",
        **body,
    }


@dataclass(frozen=True)
class Design:
    name: str
    title: str
    date: str | None
    units: str
    requirements: Requirements
    wing: SurfaceSpec
    horizontal_tail: SurfaceSpec | None
    vertical_tail: SurfaceSpec | None
    tail_cone_radii: tuple[float, float] | None  # m (front, rear)
    solids: SolidsSpec
    drawings: DrawingsSpec
    source: str  # file the design came from, for messages
    fuselage: FuselageSpec | None = None
    model: ModelSpec | None = None

    @property
    def surfaces(self) -> tuple[SurfaceSpec, ...]:
        return tuple(s for s in (self.wing, self.horizontal_tail, self.vertical_tail) if s)


def build(raw: dict[str, Any], source: str) -> Design:
    cone = raw["tail_cone"]
    return Design(
        name=raw["name"],
        title=raw["title"] or raw["name"],
        date=raw["date"],
        units=raw["units"],
        requirements=requirements_spec(raw["requirements"]),
        wing=surface_spec("wing", raw["wing"], source),
        horizontal_tail=surface_spec("horizontal_tail", raw["horizontal_tail"], source),
        vertical_tail=surface_spec("vertical_tail", raw["vertical_tail"], source),
        tail_cone_radii=(cone["front_radius"], cone["rear_radius"]) if cone else None,
        solids=SolidsSpec(**raw["solids"]),
        drawings=DrawingsSpec(**raw["drawings"]),
        source=source,
        fuselage=fuselage_spec(raw["fuselage"], source),
        model=model_spec(raw["model"], raw, source),
    )
