"""Loading a design file: size and nesting limits, the strict safe YAML loader, validation.

A design file is YAML (read with the safe loader) describing one airplane. Every dimensional
value carries a unit and is converted to SI (see ``document.py`` for the keys); the rest of
geomgen sees only ``Design``.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from geomgen.design.document import DESIGN, Design, build, json_schema
from geomgen.design.fields import FieldError, UnknownKeyError, unknown_key_message
from geomgen.errors import InputError

#: Design files larger than this are refused before parsing (bytes).
MAX_DESIGN_BYTES = 1_000_000
#: Design files holding more values than this (after YAML aliases are expanded) are refused.
MAX_DESIGN_VALUES = 100_000
#: Design files nesting lists or mappings deeper than this are refused (the deepest key path
#: of a valid design, model.tunnel.speed or fuselage.stations[i].x, is 3 or 4 levels).
MAX_DESIGN_DEPTH = 32


def load(path: str | Path) -> Design:
    """Read, validate and convert a design file. Raises InputError with a one-line message."""
    path = Path(path)
    source = str(path)
    try:
        size = path.stat().st_size
    except OSError as err:
        raise InputError(f"cannot read the design file ({err.strerror})", source=source) from None
    if not path.is_file():
        raise InputError("is not a file", source=source)
    if size > MAX_DESIGN_BYTES:
        raise InputError(
            f"design file is {size} bytes; at most {MAX_DESIGN_BYTES} are accepted", source=source
        )
    try:
        text = path.read_text(encoding="utf-8")
    except UnicodeDecodeError:
        raise InputError("is not UTF-8 text; a design file is YAML", source=source) from None
    except OSError as err:
        raise InputError(f"cannot read the design file ({err.strerror})", source=source) from None
    return loads(text, source=source)


def loads(text: str, source: str = "<design>") -> Design:
    """Validate and convert design text (YAML). See :func:`load`."""
    return from_mapping(parse_text(text, source), source=source)


def read_document(path: str | Path) -> dict[str, Any]:
    """The design file at ``path`` as the plain values the loader reads: for commands that
    rewrite a design (the sweep's variants). Call :func:`load` on it first: that checks it."""
    return parse_text(Path(path).read_text(encoding="utf-8"), str(path))


def parse_text(text: str, source: str = "<design>") -> Any:
    """YAML text -> plain Python values (dict, list, str, int, float, bool, None), read with
    :mod:`geomgen.design.yaml_nodes` (plain YAML only: see there). InputError on bad text."""
    import yaml

    from geomgen.design.yaml_nodes import PlainLoader, check

    _check_nesting(text, source)
    try:
        loader = PlainLoader(text)
        try:
            node = loader.get_single_node()
            if node is None:
                return None
            check(node, loader, source)
            return loader.construct_document(node)
        finally:
            loader.dispose()
    except RecursionError:  # PyYAML composes nested nodes recursively
        raise InputError(_too_deep(), source=source) from None
    except yaml.YAMLError as err:
        mark = getattr(err, "problem_mark", None)
        where = f"line {mark.line + 1}, column {mark.column + 1}: " if mark else ""
        problem = getattr(err, "problem", None) or "not valid YAML"
        raise InputError(f"{where}malformed YAML ({problem})", source=source) from None


def _too_deep() -> str:
    return (
        f"nests lists or mappings more than {MAX_DESIGN_DEPTH} levels deep; a design file "
        "needs at most 4"
    )


def _check_nesting(text: str, source: str) -> None:
    """Refuse deep nesting before the YAML composer recurses into it (a RecursionError):
    the depth is counted on the parser's events, which come without recursion."""
    import yaml

    depth = 0
    try:
        for event in yaml.parse(text, Loader=yaml.SafeLoader):
            if isinstance(event, (yaml.SequenceStartEvent, yaml.MappingStartEvent)):
                depth += 1
                if depth > MAX_DESIGN_DEPTH + 1:  # + 1: the document's own mapping
                    raise InputError(_too_deep(), source=source)
            elif isinstance(event, (yaml.SequenceEndEvent, yaml.MappingEndEvent)):
                depth -= 1
    except yaml.YAMLError:
        return  # the loader reports malformed YAML with its line and column


def from_mapping(document: Any, source: str = "<design>") -> Design:
    """Validate a parsed document with the JSON Schema, convert it, check combinations."""
    if document is None:
        raise InputError(
            "is empty; a design file is a mapping of keys (name, requirements, wing, ...)",
            source=source,
        )
    if not isinstance(document, dict):
        raise InputError(
            f"a design file must be a mapping of keys (got {type(document).__name__})",
            source=source,
        )
    # One JSON-like copy for both checks: YAML dates become text, and aliases that would
    # expand to a huge tree are refused before anything walks them.
    document = _plain(document, [MAX_DESIGN_VALUES], source)
    _validate_structure(document, source)
    try:
        raw = DESIGN.parse(document, "")
    except FieldError as err:
        raise _refusal(err, source) from None
    design = build(raw, source)
    if design.fuselage is not None and design.tail_cone_radii is not None:
        raise InputError(
            "leave tail_cone out when a fuselage is given: the tail-cone radii come from the "
            "fuselage",
            source=source,
            path="tail_cone",
        )
    needs_cone = [s.key for s in design.surfaces if s.volume_coefficient and s.tail_arm is None]
    # a fuselage gives the tail-cone radii itself (fuselage.tail_cone_radii)
    if needs_cone and design.tail_cone_radii is None and design.fuselage is None:
        raise InputError(
            "missing required key: tail_arm 'optimum' needs front_radius and rear_radius "
            "(or a fuselage)",
            source=source,
            path="tail_cone",
        )
    return design


def _refusal(err: FieldError, source: str) -> InputError:
    """The InputError of a declaration's refusal; an unknown key gets a suggestion (where
    the key belongs, or the nearest known key)."""
    message = unknown_key_message(err, DESIGN) if isinstance(err, UnknownKeyError) else err.message
    return InputError(message, source=source, path=err.path)


def _validate_structure(document: dict[str, Any], source: str) -> None:
    """Validate with the jsonschema library; report the first error in our own words."""
    import jsonschema

    validator = jsonschema.Draft202012Validator(json_schema())
    error = jsonschema.exceptions.best_match(validator.iter_errors(document))
    if error is None:
        return
    # The declaration gives the clearer message for the same fault: let it speak first.
    try:
        DESIGN.parse(document, "")
    except FieldError as err:
        raise _refusal(err, source) from None
    path = ".".join(str(p) for p in error.absolute_path)
    raise InputError(error.message.splitlines()[0][:200], source=source, path=path or None)


def _plain(value: Any, budget: list[int], source: str, depth: int = 0, path: str = "") -> Any:
    """YAML may give dates and other types; make a JSON-like copy for the checks.

    ``budget`` holds how many more values may be copied (YAML aliases can make a small file
    expand into a huge tree); ``depth`` is the nesting level (refused past the limit); ``path``
    the key path of ``value``. A whole number beyond :data:`yaml_nodes.MAX_DIGITS` digits is
    refused here (no check downstream could even show it: Python refuses to write an int of
    more than 4300 digits as text)."""
    from geomgen.design.yaml_nodes import MAX_DIGITS

    if depth > MAX_DESIGN_DEPTH:
        raise InputError(_too_deep(), source=source)
    budget[0] -= 1
    if budget[0] < 0:
        raise InputError(
            f"holds more than {MAX_DESIGN_VALUES} values (counting repeats made by YAML "
            "aliases); a design file is much smaller",
            source=source,
        )
    if isinstance(value, dict):
        return {
            str(k): _plain(v, budget, source, depth + 1, f"{path}.{k}" if path else str(k))
            for k, v in value.items()
        }
    if isinstance(value, list):
        return [_plain(v, budget, source, depth + 1, f"{path}[{i}]") for i, v in enumerate(value)]
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) >= 10**MAX_DIGITS:
        digits = int(abs(value).bit_length() * 0.30103) + 1
        raise InputError(
            f"a whole number of about {digits} digits is beyond any design value (at most "
            f"{MAX_DIGITS} digits are read)",
            source=source,
            path=path or None,
        )
    if value is None or isinstance(value, (str, int, float, bool)):
        return value
    return json.loads(json.dumps(value, default=str))
