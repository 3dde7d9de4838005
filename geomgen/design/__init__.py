"""Stage 1, the design file: keys, units, loading and validation -> the frozen ``Design``.

What flows in: a YAML design file (or its text, or a mapping). What flows out: ``Design``, every
value in SI. Formulas: none; unit definitions are pint's (``units.py``), ranges sit beside each
key's declaration. May import: ``geomgen.errors`` only (plus pint, pyyaml, jsonschema).
The names below are the stage's public face; importers take them from ``geomgen.design``.
"""

from geomgen.design.declaration import (
    BODY_PARAMETRIC_KEYS,
    BODY_SHAPES,
    DESIGN,
    MAX_DESIGN_BYTES,
    MAX_DESIGN_DEPTH,
    MAX_DESIGN_VALUES,
    BodyStation,
    ControlSpec,
    Design,
    DrawingsSpec,
    FuselageSpec,
    ModelSpec,
    PanelSpec,
    ParametricBody,
    Requirements,
    SolidsSpec,
    SurfaceSpec,
    default_model,
    from_mapping,
    json_schema,
    load,
    loads,
)

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
]
