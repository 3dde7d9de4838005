"""STEP export and read-back, mm in the aircraft frame (x aft, y right, z up): one assembly
with every part named and coloured by kind, the same bytes for the same parts (the header's
time stamp set, the occurrences numbered in file order, the colour entities in a stable
order), and the part names and volumes read back from a file.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from datetime import UTC, datetime
from pathlib import Path

import cadquery as cq

from geomgen.errors import GeometryError
from geomgen.solids.kernel import _VOLUMES, volume
from geomgen.solids.records import Part
from geomgen.store.stamp import output_time

#: Colours by kind of part (RGB, 0-1), so a CAD user tells the parts apart at a glance.
COLOURS: dict[str, tuple[float, float, float]] = {
    "wing": (0.82, 0.84, 0.86),
    "stabilizer": (0.78, 0.80, 0.84),
    "fin": (0.74, 0.77, 0.82),
    "aileron": (0.90, 0.40, 0.20),
    "flap": (0.20, 0.55, 0.85),
    "elevator": (0.95, 0.72, 0.10),
    "rudder": (0.30, 0.70, 0.35),
    "fuselage": (0.88, 0.88, 0.84),
}


def write_step(parts: Iterable[Part], path: Path, name: str, when: datetime | None = None) -> None:
    """One STEP assembly in mm, every part named and coloured by kind. The same parts give
    the same bytes: the header's time stamp is ``when`` (default :func:`stamp.output_time`
    without a design: SOURCE_DATE_EPOCH or the fixed date), and the colour entities, which
    the writer emits in an order that changes from run to run, are put in a stable order."""
    assy = cq.Assembly(name=name)
    for p in parts:
        assy.add(p.shape, name=p.name, color=cq.Color(*COLOURS[p.kind], 1.0))
    try:
        assy.export(str(path), exportType="STEP", unit="MM")
    except Exception as err:
        raise GeometryError(str(err), part=name, operation="STEP export") from err
    text = Path(path).read_bytes().decode("latin-1")  # Part 21 files are 8-bit text
    text = _stable_presentation(_stamped_header(text, when or output_time(None), name))
    Path(path).write_bytes(_numbered_occurrences(text).encode("latin-1"))


def _numbered_occurrences(text: str) -> str:
    """Number the assembly's part occurrences 1, 2, ... in file order: OCCT's writer takes
    these ids from a counter that lives as long as the process, so a second export in one
    process wrote '3', '4' where the first wrote '1', '2' (measured). The id is the
    occurrence's own label (ISO 10303-44 product structure), not a reference. Each such
    instance is rewrapped by :func:`_wrapped`: OCCT had broken its lines where the longer
    ids fell, so a second export in one process differed in its line breaks (measured: the
    demo built twice in one process, 6 bytes longer)."""
    count = iter(range(1, 1 << 30))

    def renumbered(m: re.Match) -> str:
        body = re.sub(rf"({_STRING})|\s*\n\s*", lambda w: w.group(1) or "", m.group(2))
        body = re.sub(r"^(\s*)'\d+'", lambda w: f"{w.group(1)}'{next(count)}'", body)
        return _wrapped(f"#{m.group(1)} = NEXT_ASSEMBLY_USAGE_OCCURRENCE({body};")[:-1]

    return _OCCURRENCE.sub(renumbered, text)


# ISO 10303-21 (the STEP clear-text file): a string is '...' with '' for a quote inside; an
# entity instance is "#id = ...;"; whitespace outside strings carries no meaning.
_STRING = r"'(?:[^']|'')*'"
_TOKEN = re.compile(rf"{_STRING}|#(\d+)")
_INSTANCE = re.compile(rf"#(\d+)\s*=\s*((?:{_STRING}|[^';])*);")
_OCCURRENCE = re.compile(rf"#(\d+) = NEXT_ASSEMBLY_USAGE_OCCURRENCE\(((?:{_STRING}|[^';])*);")


def _stamped_header(text: str, when: datetime, name: str) -> str:
    """Set the time stamp (FILE_NAME's second attribute, in ISO 10303-21 an ISO 8601 date and
    time) to ``when`` in UTC: OCCT writes the clock's local time there. A text rewrite of that
    one string in the HEADER section, since cadquery's exporter gives no hook between the
    transfer and the write; the other header strings OCCT writes are constants."""
    end = text.find("ENDSEC;")
    header = re.compile(rf"(FILE_NAME\(\s*{_STRING}\s*,\s*)'[^']*'")
    fixed, count = header.subn(
        lambda m: m.group(1) + "'" + when.astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%S+00:00") + "'",
        text[:end],
        count=1,
    )
    if count != 1:
        raise GeometryError("no FILE_NAME in the header", part=name, operation="STEP export")
    return fixed + text[end:]


def _stable_presentation(text: str) -> str:
    """Renumber the colour entities that close the DATA section (from the first
    MECHANICAL_DESIGN_GEOMETRIC_PRESENTATION_REPRESENTATION on) in a stable order.

    OCCT 7.9's STEPCAFControl_Writer emits one presentation per part in an order that changes
    from run to run, and a colour used by several parts sits with whichever of them came
    first (measured: two builds of the demo differed only there and in the header). The
    block's entities form a graph whose roots are the presentations; this sorts the roots by
    their content (references into the block expanded, references to the geometry, which is
    numbered the same every time, kept) and numbers the block afresh in depth-first order
    from them, each instance rewrapped by :func:`_wrapped`. The graph, hence the file's
    meaning, is unchanged. If the block is not such a graph (nothing outside the block may
    refer into it; every instance must hang off a root) the text is left as it was."""
    first = re.search(
        r"^#(\d+)\s*=\s*MECHANICAL_DESIGN_GEOMETRIC_PRESENTATION_REPRESENTATION", text, re.M
    )
    end = text.rfind("ENDSEC;")
    if first is None or end < first.start():
        return text
    start = int(first.group(1))
    head, block, tail = text[: first.start()], text[first.start() : end], text[end:]
    entities: dict[int, str] = {}
    at = 0
    for m in _INSTANCE.finditer(block):
        if block[at : m.start()].strip():
            return text
        entities[int(m.group(1))] = m.group(2)
        at = m.end()
    if block[at:].strip() or any(i < start for i in entities):
        return text
    for m in _TOKEN.finditer(head[head.find("DATA;") :]):
        if m.group(1) and int(m.group(1)) >= start:
            return text

    def refs(i: int) -> list[int]:
        return [int(g) for g in _TOKEN.findall(entities[i]) if g and int(g) in entities]

    def expanded(i: int, seen: tuple = ()) -> str:
        if i in seen:
            return "#?"
        return _TOKEN.sub(
            lambda m: (
                "{" + expanded(int(m.group(1)), (*seen, i)) + "}"
                if m.group(1) and int(m.group(1)) in entities
                else m.group(0)
            ),
            entities[i],
        )

    roots = [i for i, body in entities.items() if body.lstrip().startswith("MECHANICAL_DESIGN")]
    order: dict[int, int] = {}

    def visit(i: int) -> None:
        if i not in order:
            order[i] = start + len(order)
            for j in refs(i):
                visit(j)

    for root in sorted(roots, key=expanded):
        visit(root)
    if len(order) != len(entities):
        return text
    renumbered = {
        order[i]: _TOKEN.sub(
            lambda m: (
                f"#{order[int(m.group(1))]}"
                if m.group(1) and int(m.group(1)) in order
                else m.group(0)
            ),
            re.sub(rf"({_STRING})|\s*\n\s*", lambda m: m.group(1) or "", body),
        )
        for i, body in entities.items()
    }
    lines = "".join(_wrapped(f"#{i} = {renumbered[i]};") for i in sorted(renumbered))
    return head + lines + tail


def _wrapped(line: str, width: int = 72) -> str:
    """One instance on lines of at most ``width`` characters where it can be done, broken
    after a comma outside strings and continued with an indent (like OCCT's own writer)."""
    out, current, at = [], "", 0
    pieces = []  # the line cut just after each comma outside a string
    for m in re.finditer(rf"{_STRING}|,", line):
        if m.group(0) == ",":
            pieces.append(line[at : m.end()])
            at = m.end()
    pieces.append(line[at:])
    for piece in pieces:
        if current and len(current) + len(piece) > width:
            out.append(current)
            current = "  "
        current += piece
    out.append(current)
    return "\n".join(out) + "\n"


def read_step(
    path: Path, expected: dict[str, float] | None = None, tolerance: float = 0.0
) -> dict[str, float]:
    """Part names and volumes (mm^3) of a STEP assembly read back from disk.

    Volumes are integrated with a loose tolerance first: surfaces read back from STEP can
    integrate far more slowly (an aileron: 15 s at eps 1e-8, 2.5 s at 1e-6, 0.75 s at 1e-5;
    the fixed rule, no eps, was 2.4e-4 off on a wing half). The loose value can itself be a
    few 1e-4 off (a re-sized demo's flaps: -4.2e-4 at 1e-5, 7e-9 at 1e-7), so a part whose
    loose value misses ``expected`` by more than ``tolerance`` (relative) is integrated again
    at 1e-7 before anyone judges it."""
    back = cq.Assembly.importStep(str(path))
    out = {}
    for name, child in back.traverse():
        if child.obj is not None and name != back.name:
            shape = child.obj if isinstance(child.obj, cq.Shape) else child.obj.val()
            part = name.split("/")[-1]
            v = volume(shape, eps=1e-5)
            want = (expected or {}).get(part)
            if want is not None and abs(v - want) > tolerance * abs(want):
                _VOLUMES.pop(shape, None)
                v = volume(shape, eps=1e-7)
            out[part] = v
    return out


def read_step_shapes(path: Path) -> dict[str, cq.Shape]:
    """Every part of a STEP assembly written by :func:`write_step`, by name (mm, aircraft
    frame), in file order."""
    back = cq.Assembly.importStep(str(path))
    out = {}
    for name, child in back.traverse():
        if child.obj is not None and name != back.name:
            shape = child.obj if isinstance(child.obj, cq.Shape) else child.obj.val()
            out[name.split("/")[-1]] = shape
    return out
