"""Stage 1, the design file: keys, units, loading and validation -> the frozen ``Design``.

What flows in: a YAML design file (or its text, or a mapping). What flows out: ``Design``, every
value in SI. Formulas: none; unit definitions are pint's (``units.py``), ranges sit beside each
key's declaration. May import: ``geomgen.errors`` only (plus pint, pyyaml, jsonschema).
The names below are the stage's public face; importers take them from ``geomgen.design``.

Modules, lowest first:
  units.py          pint at the edge: "52 kn" -> SI float; SI -> si/imperial for output
  fields.py         declarative field specs -> JSON Schema + parsing with range checks
  common.py         small constants shared by the sections (DEG, a chord fraction's bounds)
  requirements.py   the requirements section: keys, ``Requirements``
  controls.py       control surfaces: keys, ``ControlSpec``
  surfaces.py       wing and tails, their panels: keys, ``PanelSpec``, ``SurfaceSpec``
  fuselage.py       the fuselage: keys, ``BodyStation``, ``ParametricBody``, ``FuselageSpec``
  printed_model.py  the model section (a printable wind-tunnel model): keys, ``ModelSpec``
  settings.py       the solids and drawings sections: keys, ``SolidsSpec``, ``DrawingsSpec``
  document.py       the top-level keys in file order, the JSON Schema, ``Design``
  loader.py         file limits, the strict safe YAML loader, validation: ``load``, ``loads``
"""

from geomgen.design.controls import ControlSpec
from geomgen.design.document import DESIGN, Design, json_schema
from geomgen.design.fuselage import (
    BODY_PARAMETRIC_KEYS,
    BODY_SHAPES,
    BodyStation,
    FuselageSpec,
    ParametricBody,
)
from geomgen.design.loader import (
    MAX_DESIGN_BYTES,
    MAX_DESIGN_DEPTH,
    MAX_DESIGN_VALUES,
    from_mapping,
    load,
    loads,
    read_document,
)
from geomgen.design.printed_model import ModelSpec, default_model
from geomgen.design.requirements import Requirements
from geomgen.design.settings import DrawingsSpec, SolidsSpec
from geomgen.design.surfaces import PanelSpec, SurfaceSpec

__all__ = [
    "BODY_PARAMETRIC_KEYS",
    "BODY_SHAPES",
    "DESIGN",
    "MAX_DESIGN_BYTES",
    "MAX_DESIGN_DEPTH",
    "MAX_DESIGN_VALUES",
    "BodyStation",
    "ControlSpec",
    "Design",
    "DrawingsSpec",
    "FuselageSpec",
    "ModelSpec",
    "PanelSpec",
    "ParametricBody",
    "Requirements",
    "SolidsSpec",
    "SurfaceSpec",
    "default_model",
    "from_mapping",
    "json_schema",
    "load",
    "loads",
    "read_document",
]
