"""Declarative field specs: one declaration gives the JSON Schema and the value checks.

A design file's keys are declared once with the classes below. From that declaration geomgen
(1) emits a JSON Schema (``geomgen schema``) that editors use to complete and check files,
(2) validates the structure with the ``jsonschema`` library, and (3) converts every value into
plain SI floats with its range checked. Messages name the key path, e.g.
``wing.taper_ratio: must be in (0, 1.5] (got -0.2)``.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass, field
from typing import Any

from geomgen.design.units import DIMENSIONS, OUTPUT_UNITS, UnitParseError, parse_quantity


class FieldError(ValueError):
    """A value broke its declaration. ``path`` is the dotted key path."""

    def __init__(self, path: str, message: str):
        self.path = path
        self.message = message
        super().__init__(f"{path}: {message}" if path else message)


class UnknownKeyError(FieldError):
    """A key the mapping at its place does not declare. ``key`` is the key as written,
    ``known`` the keys allowed at that place (see :func:`key_hint` for a suggestion)."""

    def __init__(self, path: str, key: str, known: tuple[str, ...]):
        self.key = key
        self.known = known
        super().__init__(path, f"unknown key; allowed here: {', '.join(known)}")


def _fmt(x: float) -> str:
    return f"{x:g}"


def _shown(value: Any) -> str:
    """A value as the message shows it: its repr, a long one cut short."""
    try:
        text = repr(value)
    except ValueError:  # an int past the interpreter's limit of digits for text
        return f"a whole number of about {int(value.bit_length() * 0.30103)} digits"
    return text if len(text) <= 60 else f"{text[:40]}... ({len(text)} characters)"


@dataclass(frozen=True)
class Bounds:
    """Allowed interval of a value in SI; ``None`` = unbounded. Exclusive ends are open."""

    low: float | None = None
    high: float | None = None
    low_open: bool = False
    high_open: bool = False

    def check(self, value: float) -> bool:
        if not math.isfinite(value):
            return False
        if self.low is not None and (value < self.low or (self.low_open and value == self.low)):
            return False
        return self.high is None or not (
            value > self.high or (self.high_open and value == self.high)
        )

    def describe(self, scale: float = 1.0, unit: str = "") -> str:
        """Human text such as ``in (0, 1.5]`` or ``> 0 m``; values shown times ``scale``."""
        u = f" {unit}" if unit else ""
        lo = None if self.low is None else _fmt(self.low * scale)
        hi = None if self.high is None else _fmt(self.high * scale)
        if lo is not None and hi is not None:
            left, right = "(" if self.low_open else "[", ")" if self.high_open else "]"
            return f"in {left}{lo}, {hi}{right}{u}"
        if lo is not None:
            return f"{'>' if self.low_open else '>='} {lo}{u}"
        if hi is not None:
            return f"{'<' if self.high_open else '<='} {hi}{u}"
        return "any finite value"


def gt(x: float) -> Bounds:
    return Bounds(low=x, low_open=True)


def ge(x: float) -> Bounds:
    return Bounds(low=x)


def between(lo: float, hi: float, *, lo_open: bool = False, hi_open: bool = False) -> Bounds:
    return Bounds(lo, hi, lo_open, hi_open)


@dataclass(frozen=True)
class Field:
    """Base of every declaration."""

    description: str = ""
    default: Any = None  # None = required (unless ``optional``)
    optional: bool = False
    examples: tuple = ()  # shown in the JSON Schema (editors offer them)

    @property
    def required(self) -> bool:
        return self.default is None and not self.optional

    def schema(self) -> dict[str, Any]:  # pragma: no cover - overridden
        raise NotImplementedError

    def _schema_common(self, body: dict[str, Any]) -> dict[str, Any]:
        if self.description:
            body["description"] = self.description
        if self.default is not None:
            body["default"] = self.default
        if self.examples:
            body["examples"] = list(self.examples)
        return body

    def parse(self, value: Any, path: str) -> Any:  # pragma: no cover - overridden
        raise NotImplementedError


@dataclass(frozen=True)
class Number(Field):
    """A dimensionless number (bare YAML number)."""

    bounds: Bounds = Bounds()
    integer: bool = False

    def schema(self) -> dict[str, Any]:
        body: dict[str, Any] = {"type": "integer" if self.integer else "number"}
        b = self.bounds
        if b.low is not None:
            body["exclusiveMinimum" if b.low_open else "minimum"] = b.low
        if b.high is not None:
            body["exclusiveMaximum" if b.high_open else "maximum"] = b.high
        return self._schema_common(body)

    def parse(self, value: Any, path: str) -> float | int:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            allowed = self.bounds.describe()
            raise FieldError(path, f"must be a plain number {allowed} (got {_shown(value)})")
        try:
            number = float(value)
        except OverflowError:  # an int beyond every float
            number = math.inf
        if self.integer and math.isfinite(number) and not number.is_integer():
            raise FieldError(path, f"must be a whole number (got {_shown(value)})")
        if not self.bounds.check(number):
            raise FieldError(path, f"must be {self.bounds.describe()} (got {_shown(value)})")
        return int(value) if self.integer else number


@dataclass(frozen=True)
class Quantity(Field):
    """A dimensional value written as ``"<number> <unit>"``; parsed to SI."""

    dimension: str = "length"
    bounds: Bounds = Bounds()

    def schema(self) -> dict[str, Any]:
        dim = DIMENSIONS[self.dimension]
        body = {
            "type": "string",
            "pattern": r"^\s*[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?\s*[A-Za-z°µ]",
            "examples": [dim.example.split('"')[1]],
        }
        return self._schema_common(body)

    def parse(self, value: Any, path: str) -> float:
        try:
            si = parse_quantity(value, self.dimension)
        except UnitParseError as err:
            raise FieldError(path, _with_article(str(err), self.dimension)) from None
        if not self.bounds.check(si):
            unit, scale = _display_unit(self.dimension)
            raise FieldError(
                path, f"must be {self.bounds.describe(scale, unit)} (got {_shown(value)})"
            )
        return si


def _with_article(message: str, dimension: str) -> str:
    """ "must be a area" -> "must be an area": the article follows the dimension's name."""
    if dimension[:1] in "aeiou":
        return message.replace(f"must be a {dimension}", f"must be an {dimension}")
    return message


def _display_unit(dimension: str) -> tuple[str, float]:
    kind = dimension if dimension in OUTPUT_UNITS["si"] else "length"
    return OUTPUT_UNITS["si"][kind][0], OUTPUT_UNITS["si"][kind][1]


@dataclass(frozen=True)
class Text(Field):
    """A string, optionally limited to a set of words or a pattern."""

    choices: tuple[str, ...] = ()
    max_length: int = 200
    pattern: str | None = None
    pattern_words: str = ""  # what the pattern allows, in words, for the message

    def schema(self) -> dict[str, Any]:
        body: dict[str, Any] = {"type": "string", "maxLength": self.max_length}
        if self.choices:
            body["enum"] = list(self.choices)
        if self.pattern:
            body["pattern"] = self.pattern
        return self._schema_common(body)

    def parse(self, value: Any, path: str) -> str:
        if not isinstance(value, str):
            raise FieldError(path, f"must be text (got {_shown(value)})")
        if self.choices and value not in self.choices:
            raise FieldError(
                path, f"must be one of {', '.join(self.choices)} (got {_shown(value)})"
            )
        if len(value) > self.max_length:
            raise FieldError(path, f"must be at most {self.max_length} characters long")
        if self.pattern and not re.fullmatch(self.pattern, value):
            raise FieldError(
                path,
                f"must be {self.pattern_words or 'of the documented form'} (got {_shown(value)})",
            )
        return value


@dataclass(frozen=True)
class Date(Field):
    """A day of the calendar written YYYY-MM-DD (ASCII digits; a day that exists, year 1 on).
    YAML reads an unquoted date as text here (see ``yaml_nodes``)."""

    def schema(self) -> dict[str, Any]:
        body = {"type": "string", "pattern": DATE_PATTERN, "format": "date", "maxLength": 10}
        return self._schema_common(body)

    def parse(self, value: Any, path: str) -> str:
        import datetime

        if not isinstance(value, str) or not re.fullmatch(DATE_PATTERN, value):
            raise FieldError(
                path, f"must be a date written YYYY-MM-DD in the digits 0-9 (got {_shown(value)})"
            )
        try:
            datetime.date.fromisoformat(value)
        except ValueError as err:
            raise FieldError(
                path, f"must be a day of the calendar, YYYY-MM-DD ({err}; got {_shown(value)})"
            ) from None
        return value


#: YYYY-MM-DD in ASCII digits (``\d`` would take the digits of every script)
DATE_PATTERN = r"^[0-9]{4}-[0-9]{2}-[0-9]{2}$"


@dataclass(frozen=True)
class AnyOf(Field):
    """The value may take any of several forms; the first that parses wins."""

    options: tuple[Field, ...] = ()
    summary: str = ""  # what is allowed, in words, for the message
    tagged: bool = False  # return (index of the option that parsed, value)

    def schema(self) -> dict[str, Any]:
        return self._schema_common({"anyOf": [o.schema() for o in self.options]})

    def parse(self, value: Any, path: str) -> Any:
        errors = []
        for index, option in enumerate(self.options):
            try:
                parsed = option.parse(value, path)
                return (index, parsed) if self.tagged else parsed
            except FieldError as err:
                errors.append(err.message)
        # A value of the right shape but out of range: report that message, it is the useful one.
        for option, message in zip(self.options, errors, strict=True):
            if _shape_fits(option, value):
                raise FieldError(path, message)
        raise FieldError(path, f"must be {self.summary} (got {_shown(value)})")


def _shape_fits(option: Field, value: Any) -> bool:
    if isinstance(option, AnyOf):
        return any(_shape_fits(o, value) for o in option.options)
    if isinstance(option, Number):
        return isinstance(value, (int, float)) and not isinstance(value, bool)
    if isinstance(option, Quantity):
        return isinstance(value, str) and any(c.isdigit() for c in value)
    if isinstance(option, ListOf):
        return isinstance(value, list)
    if isinstance(option, Mapping):
        return isinstance(value, dict)
    return False


@dataclass(frozen=True)
class Flag(Field):
    """A yes/no value (YAML true/false, yes/no)."""

    def schema(self) -> dict[str, Any]:
        return self._schema_common({"type": "boolean"})

    def parse(self, value: Any, path: str) -> bool:
        if not isinstance(value, bool):
            raise FieldError(path, f"must be true or false (got {_shown(value)})")
        return value


@dataclass(frozen=True)
class ListOf(Field):
    """A list of items of one declaration."""

    item: Field = field(default_factory=Field)
    min_items: int = 0
    max_items: int = 1000

    def schema(self) -> dict[str, Any]:
        body = {
            "type": "array",
            "items": self.item.schema(),
            "minItems": self.min_items,
            "maxItems": self.max_items,
        }
        return self._schema_common(body)

    def parse(self, value: Any, path: str) -> list[Any]:
        if not isinstance(value, list):
            raise FieldError(path, f"must be a list (got {type(value).__name__})")
        if not self.min_items <= len(value) <= self.max_items:
            if self.min_items == self.max_items:
                wanted = f"exactly {self.min_items} item{'s' if self.min_items != 1 else ''}"
            else:
                wanted = f"{self.min_items} to {self.max_items} items"
            raise FieldError(path, f"must have {wanted} (got {len(value)})")
        return [self.item.parse(v, f"{path}[{i}]") for i, v in enumerate(value)]


@dataclass(frozen=True)
class Mapping(Field):
    """A mapping with declared keys; unknown keys are refused."""

    fields: tuple[tuple[str, Field], ...] = ()

    def schema(self) -> dict[str, Any]:
        body: dict[str, Any] = {
            "type": "object",
            "properties": {k: f.schema() for k, f in self.fields},
            "additionalProperties": False,
        }
        required = [k for k, f in self.fields if f.required]
        if required:
            body["required"] = required
        return self._schema_common(body)

    def parse(self, value: Any, path: str) -> dict[str, Any]:
        if not isinstance(value, dict):
            found = type(value).__name__
            if path:  # the path leads the message already
                raise FieldError(path, f"must be a mapping of keys (got {found})")
            raise FieldError(path, f"the design must be a mapping of keys (got {found})")
        known = dict(self.fields)
        for key in value:
            if key not in known:
                raise UnknownKeyError(_join(path, str(key)), str(key), tuple(known))
        out: dict[str, Any] = {}
        for key, spec in self.fields:
            sub = _join(path, key)
            if key in value and value[key] is not None:
                out[key] = spec.parse(value[key], sub)
            elif key in value and value[key] is None:
                hint = "" if spec.required else "; leave the key out if it is not wanted"
                raise FieldError(sub, f"must have a value (got nothing){hint}")
            elif spec.default is not None:
                out[key] = spec.parse(spec.default, sub)
            elif spec.required:
                raise FieldError(sub, f"missing required key ({spec.description or 'see schema'})")
            else:
                out[key] = None
        return out


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


def declared_places(root: Field) -> dict[str, list[str]]:
    """Every key declared anywhere under ``root`` -> the paths of the mappings declaring it,
    in declaration order (``""`` = the top level; list items written ``[i]``)."""
    places: dict[str, list[str]] = {}

    def walk(spec: Field, path: str) -> None:
        if isinstance(spec, Mapping):
            for key, sub in spec.fields:
                if path not in places.setdefault(key, []):
                    places[key].append(path)
                walk(sub, _join(path, key))
        elif isinstance(spec, ListOf):
            walk(spec.item, f"{path}[i]")
        elif isinstance(spec, AnyOf):
            for option in spec.options:
                walk(option, path)

    walk(root, "")
    return places


def _where(places: list[str]) -> str:
    """``["", "wing"]`` -> ``at the top level of the file or under wing`` (three at most)."""
    shown = ["at the top level of the file" if p == "" else f"under {p}" for p in places[:3]]
    more = f", and {len(places) - 3} more places" if len(places) > 3 else ""
    return " or ".join(shown) + more


def key_hint(root: Field, key: str, known: tuple[str, ...] | list[str], here: str) -> str:
    """What to say of an unknown ``key`` in the mapping at path ``here`` allowing ``known``
    (``root`` the whole file's declaration): where the key goes if it is declared elsewhere,
    else the nearest known key here, else the nearest key declared elsewhere (difflib's
    ratio, at least 0.6 here and 0.75 elsewhere); ``""`` when nothing is near."""
    places = declared_places(root)
    if key in places:
        not_here = f", not under {here}" if here else ", not at the top level"
        return f"{key} goes {_where(places[key])}{not_here}"
    near = difflib.get_close_matches(key, list(known), n=1, cutoff=0.6)
    if near:
        return f"did you mean {near[0]}?"
    near = difflib.get_close_matches(key, list(places), n=1, cutoff=0.75)
    if near:
        return f"did you mean {near[0]}? it goes {_where(places[near[0]])}"
    return ""


def unknown_key_message(err: UnknownKeyError, root: Field) -> str:
    """The one-line message of an unknown key: the hint in brackets, then what is allowed."""
    here = err.path[: -len(err.key) - 1] if err.path != err.key else ""
    hint = key_hint(root, err.key, err.known, here)
    return f"unknown key ({hint}); allowed here: {', '.join(err.known)}" if hint else err.message
