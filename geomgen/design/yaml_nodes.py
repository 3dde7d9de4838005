"""Plain YAML only: the reader of design files and the check of its node tree.

A design file holds plain text, decimal numbers, true/false, null, lists and mappings, and
nothing else. PyYAML's safe loader reads YAML 1.1, which takes more than that silently
(``0x1F`` is 31, ``1:30`` is 90, ``1_7`` is 17, ``017`` is 15) and builds types whose output
depends on the hash seed (``!!set``) or that no key accepts (``!!binary``, ``!!timestamp``).
Here the composed node tree is checked before anything is constructed, so that every refusal
is one line naming the key path and the line:

- numbers are plain decimal (``31``, ``-2.5``, ``1e-3``, ``.inf``); the other YAML 1.1 forms
  are refused saying what YAML 1.1 would have read;
- an explicit tag is one of ``!!str``, ``!!int``, ``!!float``, ``!!bool``, ``!!null``,
  ``!!seq``, ``!!map``, and its value has that tag's plain form (``!!float abc`` is refused);
- a key is a scalar (a mapping or a list as a key is refused), written once per mapping; the
  merge key ``<<`` is refused (write the keys out);
- a whole number has at most :data:`MAX_DIGITS` digits and a decimal number is finite unless
  written as ``.inf``;
- an unquoted date such as ``2026-12-01`` stays the text it was (the ``date`` key checks it
  is a real day).
"""

from __future__ import annotations

import math
import re
from typing import Any

import yaml
from yaml.composer import Composer
from yaml.constructor import SafeConstructor
from yaml.parser import Parser
from yaml.reader import Reader
from yaml.resolver import BaseResolver
from yaml.scanner import Scanner

from geomgen.errors import InputError

#: a whole number longer than this is refused (no design value needs more than 17 significant
#: digits; the interpreter refuses to read integers of more than 4300)
MAX_DIGITS = 30

_TAG = "tag:yaml.org,2002:"
STR, INT, FLOAT, BOOL, NULL = (_TAG + t for t in ("str", "int", "float", "bool", "null"))
SEQ, MAP = _TAG + "seq", _TAG + "map"
#: the tag our resolver gives a plain scalar that YAML 1.1 would have read as a number
YAML11_NUMBER = "tag:geomgen,2026:yaml-1.1-number"

_PLAIN_INT = re.compile(r"[-+]?(0|[1-9][0-9]*)")
_PLAIN_FLOAT = re.compile(
    r"[-+]?(([0-9]+\.[0-9]*|\.[0-9]+)([eE][-+]?[0-9]+)?|[0-9]+[eE][-+]?[0-9]+)"
    r"|[-+]?\.(inf|Inf|INF)|\.(nan|NaN|NAN)"
)
_BOOL = re.compile(r"yes|Yes|YES|no|No|NO|true|True|TRUE|false|False|FALSE|on|On|ON|off|Off|OFF")
_NULL = re.compile(r"~|null|Null|NULL|")
#: YAML 1.1's own number forms (PyYAML's resolver): what is left after the plain forms
_YAML11_INT = re.compile(
    r"[-+]?0b[0-1_]+|[-+]?0[0-7_]+|[-+]?(?:0|[1-9][0-9_]*)|[-+]?0x[0-9a-fA-F_]+"
    r"|[-+]?[1-9][0-9_]*(?::[0-5]?[0-9])+"
)
_YAML11_FLOAT = re.compile(
    r"[-+]?(?:[0-9][0-9_]*)\.[0-9_]*(?:[eE][-+][0-9]+)?|\.[0-9][0-9_]*(?:[eE][-+][0-9]+)?"
    r"|[-+]?[0-9][0-9_]*(?::[0-5]?[0-9])+\.[0-9_]*"
)


class PlainResolver(BaseResolver):
    """Plain scalars: null, true/false (and YAML 1.1's yes/no/on/off), plain decimal numbers;
    YAML 1.1's other number forms get :data:`YAML11_NUMBER`; everything else is text (also
    dates and ``<<``)."""


def _add(tag: str, pattern: re.Pattern, first: str) -> None:
    PlainResolver.add_implicit_resolver(tag, re.compile(f"^(?:{pattern.pattern})$"), list(first))


_add(BOOL, _BOOL, "yYnNtTfFoO")
_add(NULL, _NULL, "~nN")
PlainResolver.add_implicit_resolver(NULL, re.compile(r"^$"), [""])
_add(INT, _PLAIN_INT, "-+0123456789")
_add(FLOAT, _PLAIN_FLOAT, "-+0123456789.")
_add(YAML11_NUMBER, re.compile(f"{_YAML11_INT.pattern}|{_YAML11_FLOAT.pattern}"), "-+0123456789.")


class PlainLoader(Reader, Scanner, Parser, Composer, SafeConstructor, PlainResolver):
    """PyYAML's safe loader with :class:`PlainResolver`: call :func:`check` on the node of
    ``get_single_node()`` before ``construct_document``."""

    def __init__(self, stream: str):
        Reader.__init__(self, stream)
        Scanner.__init__(self)
        Parser.__init__(self)
        Composer.__init__(self)
        SafeConstructor.__init__(self)
        PlainResolver.__init__(self)


#: what each accepted tag's value must look like, in words
_FORMS = {
    INT: (_PLAIN_INT, "a whole number written in decimal digits"),
    FLOAT: (re.compile(f"{_PLAIN_FLOAT.pattern}|{_PLAIN_INT.pattern}"), "a decimal number"),
    BOOL: (_BOOL, "true or false"),
    NULL: (_NULL, "empty (null)"),
}


def tag_name(tag: str) -> str:
    """``tag:yaml.org,2002:set`` -> ``!!set``."""
    return "!!" + tag[len(_TAG) :] if tag.startswith(_TAG) else tag


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


def _line(node: yaml.Node) -> int:
    return node.start_mark.line + 1


def check(root: yaml.Node, loader: PlainLoader, source: str) -> None:
    """Refuse, in one line naming the key path, any node that is not plain YAML (see the
    module's docstring). Each node is checked once, however many aliases name it."""
    seen: set[int] = set()
    todo: list[tuple[yaml.Node, str]] = [(root, "")]
    while todo:
        node, path = todo.pop()
        if id(node) in seen:
            continue
        seen.add(id(node))

        def refuse(message: str, node: yaml.Node = node, path: str = path) -> InputError:
            return InputError(f"line {_line(node)}: {message}", source=source, path=path or None)

        if isinstance(node, yaml.ScalarNode):
            _check_scalar(node, refuse)
        elif isinstance(node, yaml.SequenceNode):
            if node.tag != SEQ:
                raise refuse(_bad_tag(node.tag))
            todo.extend((item, f"{path}[{i}]") for i, item in reversed(list(enumerate(node.value))))
        elif isinstance(node, yaml.MappingNode):
            if node.tag != MAP:
                raise refuse(_bad_tag(node.tag))
            keys: set[Any] = set()
            items = []
            for key_node, value_node in node.value:
                if not isinstance(key_node, yaml.ScalarNode):
                    kind = "a list" if isinstance(key_node, yaml.SequenceNode) else "a mapping"
                    raise refuse(f"a key must be a plain word (got {kind} used as a key)", key_node)
                _check_scalar(key_node, lambda m, k=key_node: refuse(m, k))
                if key_node.style is None and key_node.value == "<<":
                    raise refuse(
                        "YAML merge keys (<<) are not accepted in a design file; write the "
                        "keys out in full",
                        key_node,
                    )
                key = loader.construct_object(key_node)
                if key in keys:
                    raise refuse(f"key {key!r} is written twice in one mapping; keep one", key_node)
                keys.add(key)
                items.append((value_node, _join(path, str(key))))
            todo.extend(reversed(items))


def _bad_tag(tag: str) -> str:
    return (
        f"malformed YAML (the tag {tag_name(tag)} is not accepted: a design file holds only "
        "plain text, numbers, true/false, lists and mappings)"
    )


def _check_scalar(node: yaml.ScalarNode, refuse) -> None:
    value = node.value
    shown = value if len(value) <= 40 else value[:37] + "..."
    if node.tag == STR:
        return
    if node.tag == YAML11_NUMBER:
        raise refuse(
            f"write numbers in plain decimal (got {shown}, which YAML 1.1 reads as "
            f"{_yaml11_reading(value)}); quote it if it is text"
        )
    if node.tag not in _FORMS:
        raise refuse(_bad_tag(node.tag))
    form, words = _FORMS[node.tag]
    if not form.fullmatch(value):
        raise refuse(f"malformed YAML ({tag_name(node.tag)} {shown!r} is not {words})")
    if node.tag in (INT, FLOAT) and _PLAIN_INT.fullmatch(value):
        digits = len(value.lstrip("+-"))
        if digits > MAX_DIGITS:
            raise refuse(
                f"a whole number of {digits} digits is beyond any design value (at most "
                f"{MAX_DIGITS} digits are read; got {shown})"
            )
    written_inf = value.lower().lstrip("+-") in (".inf", ".nan")
    if node.tag == FLOAT and not written_inf and math.isinf(float(value)):
        raise refuse(f"a number beyond the largest one read, about 1.8e308 (got {shown})")


def _yaml11_reading(value: str) -> str:
    """What PyYAML's YAML 1.1 loader makes of a number form, with its kind in words."""
    text = value.replace("_", "").lstrip("+-").lower()
    if ":" in text:
        kind = "a base-60 number"
    elif text.startswith("0x"):
        kind = "a hexadecimal number"
    elif text.startswith("0b"):
        kind = "a binary number"
    elif text.startswith("0") and len(text) > 1 and "." not in text:
        kind = "an octal number"
    else:
        kind = "a number with digit separators"
    if len(value) > MAX_DIGITS:
        return kind
    try:
        read = yaml.safe_load(value)
    except (yaml.YAMLError, ValueError):
        return kind
    return f"{read!r}, {kind}"
