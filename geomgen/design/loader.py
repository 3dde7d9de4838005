"""Loading a design file: size and nesting limits, the strict safe YAML loader, validation.

A design file is YAML (read with the safe loader) describing one airplane. Every dimensional
value carries a unit and is converted to SI (see ``document.py`` for the keys); the rest of
geomgen sees only ``Design``.
"""

from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path
from typing import Any

from geomgen.design.document import DESIGN, Design, build, json_schema
from geomgen.design.fields import FieldError
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
    import yaml

    _check_nesting(text, source)
    document = _read_with_libyaml(text)
    if document is not _UNREAD:
        return from_mapping(document, source=source)
    try:
        loader = _strict_safe_loader()(text)  # a SafeLoader subclass: no arbitrary objects
        try:
            document = loader.get_single_data()
        finally:
            loader.dispose()
    except RecursionError:  # PyYAML composes nested nodes recursively
        raise InputError(_too_deep(), source=source) from None
    except _DuplicateKey as err:
        raise InputError(str(err), source=source) from None
    except yaml.YAMLError as err:
        mark = getattr(err, "problem_mark", None)
        where = f"line {mark.line + 1}, column {mark.column + 1}: " if mark else ""
        problem = getattr(err, "problem", None) or "not valid YAML"
        raise InputError(f"{where}malformed YAML ({problem})", source=source) from None
    return from_mapping(document, source=source)


_UNREAD = object()


def _read_with_libyaml(text: str) -> Any:
    """The document read by PyYAML's libyaml parser with the strict safe constructor (ten
    times faster than the pure-Python parser), or ``_UNREAD`` when libyaml is missing or the
    text is refused: the pure-Python loader then reads it again and words the refusal."""
    loader_class = _strict_safe_loader(libyaml=True)
    if loader_class is None:
        return _UNREAD
    try:
        loader = loader_class(text)
        try:
            return loader.get_single_data()
        finally:
            loader.dispose()
    except Exception:  # noqa: BLE001 - every refusal is worded by the pure-Python loader
        return _UNREAD


def _too_deep() -> str:
    return (
        f"nests lists or mappings more than {MAX_DESIGN_DEPTH} levels deep; a design file "
        "needs at most 4"
    )


def _check_nesting(text: str, source: str) -> None:
    """Refuse deep nesting before the YAML composer recurses into it (a RecursionError):
    the depth is counted on the parser's events, which come without recursion."""
    import yaml

    # libyaml's events first (fast); text it refuses or finds too deep is counted again by
    # the pure-Python parser, which decides as before
    fast = getattr(yaml, "CSafeLoader", None)
    if fast is not None:
        try:
            _count_depth(yaml.parse(text, Loader=fast), source)
            return
        except (yaml.YAMLError, InputError):
            pass
    try:
        _count_depth(yaml.parse(text, Loader=yaml.SafeLoader), source)
    except yaml.YAMLError:
        return  # the loader reports malformed YAML with its line and column


def _count_depth(events, source: str) -> None:
    """Refuse nesting deeper than MAX_DESIGN_DEPTH in a stream of YAML parser events."""
    import yaml

    depth = 0
    for event in events:
        if isinstance(event, (yaml.SequenceStartEvent, yaml.MappingStartEvent)):
            depth += 1
            if depth > MAX_DESIGN_DEPTH + 1:  # + 1: the document's own mapping
                raise InputError(_too_deep(), source=source)
        elif isinstance(event, (yaml.SequenceEndEvent, yaml.MappingEndEvent)):
            depth -= 1


class _DuplicateKey(ValueError):
    pass


@lru_cache(maxsize=2)
def _strict_safe_loader(libyaml: bool = False):
    """yaml.SafeLoader that refuses a key written twice in one mapping (PyYAML would keep the
    last one silently, which hides a typo in a design file); with ``libyaml`` the same on
    yaml.CSafeLoader (None where PyYAML was built without libyaml)."""
    import yaml

    base = getattr(yaml, "CSafeLoader", None) if libyaml else yaml.SafeLoader
    if base is None:
        return None

    class StrictSafeLoader(base):
        def construct_mapping(self, node, deep=False):
            seen = set()
            for key_node, _ in node.value:
                key = self.construct_object(key_node, deep=True)
                if key in seen:
                    mark = key_node.start_mark
                    raise _DuplicateKey(
                        f"line {mark.line + 1}: key {key!r} is written twice in one mapping; "
                        f"keep one"
                    )
                seen.add(key)
            return super().construct_mapping(node, deep=deep)

    return StrictSafeLoader


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
        raise InputError(err.message, source=source, path=err.path) from None
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
        raise InputError(err.message, source=source, path=err.path) from None
    path = ".".join(str(p) for p in error.absolute_path)
    raise InputError(error.message.splitlines()[0][:200], source=source, path=path or None)


def _plain(value: Any, budget: list[int], source: str, depth: int = 0) -> Any:
    """YAML may give dates and other types; make a JSON-like copy for the checks.

    ``budget`` holds how many more values may be copied (YAML aliases can make a small file
    expand into a huge tree); ``depth`` is the nesting level (refused past the limit)."""
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
        return {str(k): _plain(v, budget, source, depth + 1) for k, v in value.items()}
    if isinstance(value, list):
        return [_plain(v, budget, source, depth + 1) for v in value]
    if value is None or isinstance(value, (str, int, float, bool)):
        return value
    return json.loads(json.dumps(value, default=str))
