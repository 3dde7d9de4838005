"""The grid of a ``geomgen sweep``: the ``--vary`` options, checked against the design's
mapping and its declaration, and one design mapping per variant.

A ``--vary`` option names a key of the design file by its dotted path (list items as
``panels[1]``) and the values it takes:

- a range ``START:STOP:STEP``, STOP included when the steps land on it;
- a list ``v1,v2,...`` (numbers, numbers with units, or words such as ``optimum``).

Dimensionless keys take bare numbers; dimensional keys take numbers with a unit, written on
every value (``40 kn:50 kn:5 kn``) or once at the end, where it applies to every bare number
(``40:50:5 kn``, ``3.6,4,4.4 m``). Several ``--vary`` make a grid: every combination, the first
``--vary`` changing slowest.

Each variant's mapping is the design's with the values set, ``name`` made unique
(``<name>-vNNN``) and section files found beside the original design named relative to the
variant's folder.
"""

from __future__ import annotations

import itertools
import math
import os
import re
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from geomgen.errors import InputError

#: at most this many variants in one sweep
MAX_VARIANTS = 500

#: a number, optionally followed by a unit (the number part as the design file writes it)
_VALUE = re.compile(
    r"^\s*(?P<num>[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$"
)
_STEP = re.compile(r"^(?P<key>[A-Za-z_][A-Za-z0-9_]*)(?P<index>(?:\[\d+\])*)$")


@dataclass(frozen=True)
class Vary:
    """One ``--vary``: the key path as written, its steps, and the values as written."""

    key: str
    steps: tuple[str | int, ...]  # mapping keys (str) and list indices (int)
    values: tuple[Any, ...]  # YAML values: int/float (dimensionless), str, bool


@dataclass(frozen=True)
class Variant:
    index: int
    name: str
    values: tuple[Any, ...]  # one per Vary, grid order
    design_path: Path


# --- --vary -------------------------------------------------------------------------------------


def _vary_error(message: str) -> InputError:
    return InputError(message, path="--vary")


def _split_path(key: str) -> tuple[str | int, ...]:
    steps: list[str | int] = []
    for part in key.split("."):
        m = _STEP.match(part)
        if m is None:
            raise _vary_error(
                f"{key!r} is not a key path; write dotted keys with list items as [N], "
                "e.g. wing.aspect_ratio or wing.panels[1].chord_ratio"
            )
        steps.append(m["key"])
        steps += [int(i) for i in re.findall(r"\d+", m["index"])]
    return tuple(steps)


def _declared_field(steps: tuple[str | int, ...], document: dict, source: str, key: str):
    """The declaration (geomgen.design.fields) of the key at ``steps``; its parents must be in the
    design (list items too), the key itself may be left out if the design file allows it."""
    from geomgen import design as design_module
    from geomgen.design.fields import AnyOf, ListOf, Mapping, key_hint

    field: Any = design_module.DESIGN
    node: Any = document
    for depth, step in enumerate(steps):
        where = _path_text(steps[:depth]) or "the top level"
        last = depth == len(steps) - 1
        if isinstance(step, str):
            mappings = [f for f in _options(field, AnyOf) if isinstance(f, Mapping)]
            known = {k: f for m in mappings for k, f in m.fields}
            if step not in known:
                allowed = ", ".join(known) if known else "none (it is a single value)"
                hint = key_hint(design_module.DESIGN, step, list(known), _path_text(steps[:depth]))
                raise _vary_error(
                    f"unknown key {_path_text(steps[: depth + 1])!r} in {source}"
                    f"{f' ({hint})' if hint else ''}; keys allowed in {where}: {allowed}"
                )
            field = known[step]
            if not isinstance(node, dict) or (step not in node and not last):
                raise _vary_error(
                    f"{_path_text(steps[: depth + 1])!r} is not in {source}; only keys whose "
                    "enclosing group is in the design can be varied"
                )
            node = node.get(step)
        else:
            lists = [f for f in _options(field, AnyOf) if isinstance(f, ListOf)]
            if not lists or not isinstance(node, list) or step >= len(node):
                count = len(node) if isinstance(node, list) else 0
                raise _vary_error(
                    f"{key!r}: {where} has no item [{step}] in {source} "
                    f"(list items there: {count}, numbered from 0)"
                )
            field = lists[0].item
            node = node[step]
    if isinstance(node, (dict, list)) or all(
        isinstance(f, (Mapping, ListOf)) for f in _options(field, AnyOf)
    ):
        raise _vary_error(f"{key!r} is a group of values; vary one value inside it")
    return field


def _options(field, any_of_type) -> list:
    return list(field.options) if isinstance(field, any_of_type) else [field]


def _path_text(steps: Sequence[str | int]) -> str:
    out = ""
    for s in steps:
        out += f"[{s}]" if isinstance(s, int) else (f".{s}" if out else s)
    return out


def _format_number(x: float, integer: bool) -> int | float:
    if integer:
        return int(round(x))
    return float(f"{x:.12g}")  # 0.1 + 2 * 0.05 is written 0.2, not 0.20000000000000004


def _number_text(x: int | float) -> str:
    return str(x) if isinstance(x, int) else f"{x:.12g}"


def parse_vary(text: str, document: dict, source: str) -> Vary:
    """One ``KEY=VALUES`` option checked against the design's mapping and its declaration."""
    from geomgen.design.fields import AnyOf, Flag, Number, Quantity, Text

    key, sep, spec = text.partition("=")
    key, spec = key.strip(), spec.strip()
    if not sep or not key or not spec:
        raise _vary_error(
            f"write KEY=START:STOP:STEP or KEY=V1,V2,... (got {text!r}), "
            "e.g. requirements.stall_speed=40:50:5 kn or wing.aspect_ratio=7,7.5,8"
        )
    steps = _split_path(key)
    if steps == ("name",):
        raise _vary_error("'name' cannot be varied: each variant is named <name>-vNNN")
    field = _declared_field(steps, document, source, key)
    options = _options(field, AnyOf)
    numbers = [o for o in options if isinstance(o, Number)]
    quantities = [o for o in options if isinstance(o, Quantity)]
    texts = [o for o in options if isinstance(o, Text)]
    flags = [o for o in options if isinstance(o, Flag)]
    integer = bool(numbers) and all(o.integer for o in numbers)

    if ":" in spec:
        parts = spec.split(":")
        if len(parts) != 3:
            raise _vary_error(f"{key}: a range is START:STOP:STEP (got {spec!r})")
        matches = [_VALUE.match(p) for p in parts]
        if any(m is None for m in matches):
            raise _vary_error(
                f"{key}: START, STOP and STEP of a range are numbers, with a unit for a "
                f"dimensional key (got {spec!r})"
            )
        unit = _common_unit(key, [m["unit"] for m in matches], spec)
        start, stop, step = (float(m["num"]) for m in matches)
        whole = integer or all(re.fullmatch(r"[-+]?\d+", m["num"]) for m in matches)
        if not all(math.isfinite(v) for v in (start, stop, step)):
            raise _vary_error(f"{key}: the range must be finite (got {spec!r})")
        if step <= 0:
            raise _vary_error(f"{key}: STEP must be > 0 (got {spec!r})")
        if stop < start:
            raise _vary_error(f"{key}: the range is empty; STOP must be >= START (got {spec!r})")
        count = math.floor((stop - start) / step + 1e-9) + 1
        if count > MAX_VARIANTS:
            raise _vary_error(
                f"{key}: {count} values; a sweep has at most {MAX_VARIANTS} variants (got {spec!r})"
            )
        numbers_out = [_format_number(start + i * step, bool(whole)) for i in range(count)]
        raw: list[tuple[str, str]] = [(_number_text(x), unit) for x in numbers_out]
    else:
        items = [p.strip() for p in spec.split(",")]
        if any(not p for p in items):
            raise _vary_error(f"{key}: empty value in the list {spec!r}")
        raw = []
        for p in items:
            m = _VALUE.match(p)
            raw.append((m["num"], m["unit"]) if m else (p, "\0word"))
        last_unit = next((u for _, u in reversed(raw) if u and u != "\0word"), "")
        raw = [(n, last_unit if u == "" else u) for n, u in raw]

    values: list[Any] = []
    for num, unit in raw:
        if unit == "\0word":
            if flags and num.lower() in ("true", "false"):
                values.append(num.lower() == "true")
            elif any(not t.choices or num in t.choices for t in texts):
                values.append(num)
            else:
                choices = [c for t in texts for c in t.choices]
                allowed = f"the words {', '.join(choices)} or " if choices else ""
                raise _vary_error(
                    f"{key}: {num!r} is not a value of this key; it takes {allowed}"
                    f"{_kind_words(numbers, quantities)}"
                )
        elif unit:
            if not quantities:
                raise _vary_error(
                    f"{key}: takes {_kind_words(numbers, quantities)} (got {num + ' ' + unit!r})"
                )
            value = f"{num} {unit}"
            _check_unit(key, value, quantities)
            values.append(value)
        else:
            if not numbers:
                raise _vary_error(
                    f"{key}: takes {_kind_words(numbers, quantities)}; write the unit, "
                    f"e.g. {key}=40:50:5 kn or =40,45 kn (got {num})"
                )
            x = float(num)
            values.append(int(x) if integer or re.fullmatch(r"[-+]?\d+", num) else x)
    if len(set(map(repr, values))) != len(values):
        raise _vary_error(f"{key}: a value is given twice in {spec!r}")
    return Vary(key, steps, tuple(values))


def _common_unit(key: str, units: list[str], spec: str) -> str:
    written = {u for u in units if u}
    if len(written) > 1:
        raise _vary_error(f"{key}: write one unit for START, STOP and STEP (got {spec!r})")
    if written and units[-1] == "":
        raise _vary_error(f"{key}: a unit written once goes at the end, e.g. 40:50:5 kn")
    return written.pop() if written else ""


def _check_unit(key: str, value: str, quantities: list) -> None:
    from geomgen.design.units import UnitParseError, parse_quantity

    errors = []
    for q in quantities:
        try:
            parse_quantity(value, q.dimension)
            return
        except UnitParseError as err:
            errors.append(str(err))
    raise _vary_error(f"{key}: {errors[0]}")


def _kind_words(numbers: list, quantities: list) -> str:
    kinds = []
    if numbers:
        kinds.append("bare numbers")
    kinds += [f"{q.dimension}s with a unit" for q in quantities]
    return " or ".join(kinds) if kinds else "words only"


def parse_varies(texts: Sequence[str], document: dict, source: str) -> tuple[Vary, ...]:
    """Every ``--vary``; refuses repeated keys and grids of more than MAX_VARIANTS."""
    if not texts:
        raise _vary_error("give at least one --vary KEY=START:STOP:STEP or KEY=V1,V2,...")
    varies = tuple(parse_vary(t, document, source) for t in texts)
    keys = [v.steps for v in varies]
    for i, k in enumerate(keys):
        if k in keys[:i]:
            raise _vary_error(f"{varies[i].key} is varied twice; give each key once")
    total = math.prod(len(v.values) for v in varies)
    if total > MAX_VARIANTS:
        raise _vary_error(f"the grid has {total} variants; at most {MAX_VARIANTS} are allowed")
    return varies


# --- variants -----------------------------------------------------------------------------------


def _set(document: dict, steps: tuple[str | int, ...], value: Any) -> None:
    node: Any = document
    for s in steps[:-1]:
        node = node[s]
    node[steps[-1]] = value


def _variant_name(base: str, index: int, width: int) -> str:
    suffix = f"-v{index + 1:0{width}d}"
    return base[: 60 - len(suffix)] + suffix  # a design name has at most 60 characters


_NACA = re.compile(r"naca[\s_-]*\d+", re.IGNORECASE)


def _relink_airfoils(node: Any, design_dir: Path, variant_dir: Path) -> None:
    """Section files found beside the original design are named relative to the variant's
    folder, so the variant's design file finds the same files (profiles/ is searched anyway)."""
    if isinstance(node, list):
        for item in node:
            _relink_airfoils(item, design_dir, variant_dir)
        return
    if not isinstance(node, dict):
        return
    for k, v in node.items():
        if isinstance(v, (dict, list)):
            _relink_airfoils(v, design_dir, variant_dir)
        elif str(k).endswith("airfoil") and isinstance(v, str) and not _NACA.fullmatch(v.strip()):
            for cand in (v.strip(), v.strip() + ".dat", v.strip() + ".txt"):
                p = design_dir / cand
                if p.is_file():
                    node[k] = os.path.relpath(p.resolve(), variant_dir.resolve())
                    break


def plan_variants(
    document: dict, design_path: Path, varies: Sequence[Vary], folder: Path
) -> list[tuple[Variant, dict]]:
    """The grid (first --vary slowest) with each variant's design mapping."""
    import copy

    grid = list(itertools.product(*(v.values for v in varies)))
    width = max(3, len(str(len(grid))))
    out = []
    for i, values in enumerate(grid):
        doc = copy.deepcopy(document)
        name = _variant_name(str(document["name"]), i, width)
        doc["name"] = name
        for v, value in zip(varies, values, strict=True):
            _set(doc, v.steps, value)
        _relink_airfoils(doc, design_path.resolve().parent, folder / name)
        out.append((Variant(i, name, values, folder / name / "design.yaml"), doc))
    return out
