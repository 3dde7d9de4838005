"""``geomgen diff``: what changed between two designs or two output folders.

Pure: reads report.json / parts.json (or sizes two design files in memory, writing nothing) and
compares the mappings generically. No CAD or mesh library is imported here.

A quantity is every ``{"value", "unit"}`` leaf of report.json (a number or a list of numbers
such as a point); other leaves (names, flags, section texts) are compared for equality. Two
numbers differ when ``|new - old| > max(tolerance * max(|old|, |new|), ABS_FLOOR)``; for a list
of numbers the same test is made on the Euclidean norms of the difference and of the two lists.
"""

from __future__ import annotations

import itertools
import json
import math
from pathlib import Path
from typing import Any

from geomgen.errors import InputError

#: absolute floor below which a difference is rounding noise (SI units)
ABS_FLOOR = 1e-12
DEFAULT_TOLERANCE = 1e-9
#: report keys that differ between any two runs and say nothing about the geometry
BOOKKEEPING = frozenset({"caution", "design.source", "generator.name", "generator.version"})
DESIGN_SUFFIXES = (".yaml", ".yml")
#: hinge-line points in report order: the inner end, then the outer end
HINGE_ENDS = ("inner end", "outer end")


# --- loading ------------------------------------------------------------------------------------


def _kind(path: Path, role: str) -> str:
    if path.is_dir():
        if not (path / "report.json").is_file():
            raise InputError(
                "an output folder must hold report.json (run geomgen size first)",
                source=str(path),
                path=role,
            )
        return "folder"
    if path.is_file():
        if path.suffix.lower() not in DESIGN_SUFFIXES:
            raise InputError(
                "must be a design file (.yaml) or an output folder holding report.json",
                source=str(path),
                path=role,
            )
        return "design"
    raise InputError("no such design file or output folder", source=str(path), path=role)


def _read_json(path: Path) -> dict[str, Any]:
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as err:
        raise InputError(f"cannot be read as JSON ({err})", source=str(path)) from None
    if not isinstance(data, dict):
        raise InputError("must hold a JSON object", source=str(path))
    return data


def _design_report(path: Path) -> dict[str, Any]:
    from geomgen.commands.pipeline import _size
    from geomgen.outputs.report import report_data

    _, layout, _ = _size(path)
    # through JSON, so that the mapping holds exactly what report.json would hold
    return json.loads(json.dumps(report_data(layout)))


def load(path: Path, role: str = "OLD") -> tuple[str, dict[str, Any], dict[str, Any] | None]:
    """(kind, report mapping, parts mapping or None) of a design file or an output folder."""
    kind = _kind(path, role)
    if kind == "design":
        return kind, _design_report(path), None
    parts_path = path / "parts.json"
    parts = _read_json(parts_path) if parts_path.is_file() else None
    if parts is not None and not isinstance(parts.get("parts"), list):
        raise InputError("must hold a list 'parts'", source=str(parts_path))
    return kind, _read_json(path / "report.json"), parts


# --- comparison ---------------------------------------------------------------------------------


def _is_quantity(node: Any) -> bool:
    return isinstance(node, dict) and "value" in node and "unit" in node


def _is_number(x: Any) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def _is_vector(x: Any) -> bool:
    return isinstance(x, list) and bool(x) and all(_is_number(c) for c in x)


def _leaves(node: Any, key: str = "") -> dict[str, tuple[Any, str | None]]:
    """Every leaf of a report mapping by key path: (value, unit); unit None off quantities."""
    out: dict[str, tuple[Any, str | None]] = {}
    if _is_quantity(node):
        out[key] = (node["value"], node["unit"])
    elif isinstance(node, dict):
        for k, v in node.items():
            out.update(_leaves(v, f"{key}.{k}" if key else str(k)))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out.update(_leaves(v, f"{key}[{i}]"))
    else:
        out[key] = (node, None)
    return out


def _differs(a: float, b: float, tolerance: float) -> bool:
    return abs(b - a) > max(tolerance * max(abs(a), abs(b)), ABS_FLOOR)


def _compare_values(old: Any, new: Any, tolerance: float) -> dict[str, Any] | None:
    """delta/percent of a changed value, or None when the two are equal within tolerance."""
    if _is_number(old) and _is_number(new):
        if not _differs(old, new, tolerance):
            return None
        return {"delta": new - old, "percent": 100.0 * (new - old) / abs(old) if old else None}
    if _is_vector(old) and _is_vector(new) and len(old) == len(new):
        d = [b - a for a, b in zip(old, new, strict=True)]
        if not _differs_norm(old, new, d, tolerance):
            return None
        return {"delta": d, "percent": None}
    if old == new:
        return None
    return {"delta": None, "percent": None}


def _differs_norm(old: list, new: list, d: list, tolerance: float) -> bool:
    scale = max(math.hypot(*old), math.hypot(*new))
    return math.hypot(*d) > max(tolerance * scale, ABS_FLOOR)


def _points(report: dict[str, Any]) -> dict[str, tuple[str, list[float]]]:
    """Corner points and hinge-line ends by key path: (readable label, point in m)."""
    out: dict[str, tuple[str, list[float]]] = {}
    surfaces = report.get("surfaces")
    if not isinstance(surfaces, dict):
        return out
    for skey, surface in surfaces.items():
        if not isinstance(surface, dict):
            continue
        sname = str(skey).replace("_", " ")
        corners = surface.get("corners")
        for side, panels in corners.items() if isinstance(corners, dict) else ():
            for i, panel in enumerate(panels if isinstance(panels, list) else ()):
                if not isinstance(panel, dict):
                    continue
                number = panel.get("panel", i)
                for corner, q in panel.items():
                    if _is_quantity(q) and _is_vector(q["value"]):
                        key = f"surfaces.{skey}.corners.{side}[{i}].{corner}"
                        out[key] = (f"{sname} {side} panel {number} {corner}", q["value"])
        hinges = surface.get("hinge_lines")
        for name, hinge in hinges.items() if isinstance(hinges, dict) else ():
            points = hinge.get("points") if isinstance(hinge, dict) else None
            for j, p in enumerate(points if isinstance(points, list) else ()):
                q = p.get("point") if isinstance(p, dict) else None
                if _is_quantity(q) and _is_vector(q["value"]):
                    end = HINGE_ENDS[j] if j < len(HINGE_ENDS) else f"point {j}"
                    key = f"surfaces.{skey}.hinge_lines.{name}.points[{j}].point"
                    out[key] = (f"{sname} {name} hinge line {end}", q["value"])
    return out


def _box_corners(box: dict[str, Any]) -> list[tuple[float, ...]]:
    lo, hi = box["min"], box["max"]
    return list(itertools.product(*zip(lo, hi, strict=True)))


def _parts_by_name(parts: dict[str, Any], source: str) -> dict[str, dict[str, Any]]:
    out = {}
    for p in parts["parts"]:
        try:
            name = p["name"]
            float(p["volume"]["value"])
            if len(p["bounding_box"]["min"]) != 3 or len(p["bounding_box"]["max"]) != 3:
                raise ValueError
        except (KeyError, TypeError, ValueError):
            raise InputError(
                "every part needs a name, a volume and a 3D bounding box",
                source=source,
                path="parts",
            ) from None
        out[name] = p
    return out


def _compare_parts(old: dict, new: dict, tolerance: float) -> list[dict[str, Any]]:
    rows = []
    for name in [*old, *(n for n in new if n not in old)]:
        a, b = old.get(name), new.get(name)
        row: dict[str, Any] = {"name": name, "status": "changed"}
        if a is None or b is None:
            row["status"] = "only_new" if a is None else "only_old"
        va = float(a["volume"]["value"]) if a else None
        vb = float(b["volume"]["value"]) if b else None
        row.update(volume_old=va, volume_new=vb, volume_unit="mm^3", percent=None)
        row.update(largest_corner_move=None, length_unit="mm")
        if a is not None and b is not None:
            ca, cb = _box_corners(a["bounding_box"]), _box_corners(b["bounding_box"])
            moves = [math.dist(p, q) for p, q in zip(ca, cb, strict=True)]
            scale = max(math.hypot(*c) for c in [*ca, *cb])
            moved = max(moves) > max(tolerance * scale, ABS_FLOOR)
            if not moved and not _differs(va, vb, tolerance):
                continue
            row["percent"] = 100.0 * (vb - va) / abs(va) if va else None
            row["largest_corner_move"] = max(moves)
        rows.append(row)
    return rows


def compare(
    old_report: dict[str, Any],
    new_report: dict[str, Any],
    old_parts: dict[str, Any] | None = None,
    new_parts: dict[str, Any] | None = None,
    tolerance: float = DEFAULT_TOLERANCE,
) -> dict[str, Any]:
    """The difference of two report mappings (and parts mappings, when both are given):
    {"equal", "quantities", "points", "parts", "only_old", "only_new"}."""
    a = {k: v for k, v in _leaves(old_report).items() if k not in BOOKKEEPING}
    b = {k: v for k, v in _leaves(new_report).items() if k not in BOOKKEEPING}
    quantities = []
    for key in a.keys() & b.keys():
        (va, ua), (vb, ub) = a[key], b[key]
        change = _compare_values(va, vb, tolerance)
        if ua != ub and change is None:
            change = {"delta": None, "percent": None}
        if change is None:
            continue
        unit = ua if ua == ub else f"{ua} -> {ub}"
        quantities.append({"key": key, "old": va, "new": vb, **change, "unit": unit})
    order = {k: i for i, k in enumerate([*a, *b])}
    quantities.sort(key=lambda q: order[q["key"]])

    points = []
    pa, pb = _points(old_report), _points(new_report)
    for key in [k for k in pa if k in pb]:
        (label, p), (_, q) = pa[key], pb[key]
        if len(p) != len(q):
            continue
        d = [y - x for x, y in zip(p, q, strict=True)]
        if _differs_norm(p, q, d, tolerance):
            points.append(
                {"label": label, "key": key, "old": p, "new": q, "distance": math.hypot(*d)}
            )
            points[-1]["unit"] = "m"

    def only(side: dict, other: dict) -> list[dict[str, Any]]:
        return [{"key": k, "value": v, "unit": u} for k, (v, u) in side.items() if k not in other]

    only_old, only_new = only(a, b), only(b, a)
    parts: list[dict[str, Any]] = []
    if old_parts is not None and new_parts is not None:
        parts = _compare_parts(
            _parts_by_name(old_parts, "OLD parts.json"),
            _parts_by_name(new_parts, "NEW parts.json"),
            tolerance,
        )
    elif old_parts is not None:
        only_old.append({"key": "parts.json", "value": None, "unit": None})
    elif new_parts is not None:
        only_new.append({"key": "parts.json", "value": None, "unit": None})
    equal = not (quantities or points or parts or only_old or only_new)
    return {
        "equal": equal,
        "quantities": quantities,
        "points": points,
        "parts": parts,
        "only_old": only_old,
        "only_new": only_new,
    }


def diff_paths(old: Path, new: Path, tolerance: float = DEFAULT_TOLERANCE) -> dict[str, Any]:
    """Compare two design files or two output folders (see :func:`compare`)."""
    if not tolerance >= 0.0 or math.isinf(tolerance):
        raise InputError(f"must be a finite number >= 0 (got {tolerance!r})", path="--tolerance")
    kind_old, kind_new = _kind(old, "OLD"), _kind(new, "NEW")
    if kind_old != kind_new:
        raise InputError(
            f"OLD is a {kind_old} and NEW a {kind_new}: compare two design files "
            "or two output folders"
        )
    _, old_report, old_parts = load(old, "OLD")
    _, new_report, new_parts = load(new, "NEW")
    return compare(old_report, new_report, old_parts, new_parts, tolerance)


# --- output -------------------------------------------------------------------------------------


def to_json(result: dict[str, Any]) -> str:
    return json.dumps(result, indent=2)


def _fmt(x: Any, digits: int = 7) -> str:
    if x is None:
        return "-"
    if isinstance(x, bool):
        return str(x).lower()
    if _is_number(x):
        return f"{x:.{digits}g}"
    if isinstance(x, list):
        return "[" + ", ".join(_fmt(c, digits) for c in x) + "]"
    return str(x).replace("|", "\\|").replace("\n", " ")


def _table(header: list[str], rows: list[list[str]]) -> list[str]:
    lines = ["| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
    return lines + ["| " + " | ".join(r) + " |" for r in rows]


def to_markdown(result: dict[str, Any], old: str = "OLD", new: str = "NEW") -> str:
    lines = [f"# geomgen diff: {old} -> {new}", ""]
    if result["equal"]:
        lines.append("No differences.")
        return "\n".join(lines) + "\n"
    counts = (
        f"{len(result['quantities'])} quantities changed, {len(result['points'])} points "
        f"moved, {len(result['parts'])} parts changed, {len(result['only_old'])} only in old, "
        f"{len(result['only_new'])} only in new."
    )
    lines += [counts]
    if result["quantities"]:
        lines += ["", "## Changed quantities", ""]
        rows = [
            [
                q["key"],
                _fmt(q["old"]),
                _fmt(q["new"]),
                _fmt(q["delta"], 4),
                _fmt(q["percent"], 4),
                _fmt(q["unit"]),
            ]
            for q in result["quantities"]
        ]
        lines += _table(["quantity", "old", "new", "delta", "percent", "unit"], rows)
    if result["points"]:
        lines += ["", "## Moved points", ""]
        rows = [
            [p["label"], _fmt(p["old"]), _fmt(p["new"]), _fmt(p["distance"], 4)]
            for p in result["points"]
        ]
        lines += _table(["point", "old (m)", "new (m)", "moved (m)"], rows)
    if result["parts"]:
        lines += ["", "## Changed parts", ""]
        status = {"changed": "changed", "only_old": "only in old", "only_new": "only in new"}
        rows = [
            [
                p["name"],
                status[p["status"]],
                _fmt(p["volume_old"]),
                _fmt(p["volume_new"]),
                _fmt(p["percent"], 4),
                _fmt(p["largest_corner_move"], 4),
            ]
            for p in result["parts"]
        ]
        header = ["part", "status", "volume old (mm^3)", "volume new (mm^3)", "percent"]
        lines += _table([*header, "largest box-corner move (mm)"], rows)
    for side, title in (("only_old", "Only in old"), ("only_new", "Only in new")):
        if result[side]:
            lines += ["", f"## {title}", ""]
            rows = [[q["key"], _fmt(q["value"]), _fmt(q["unit"])] for q in result[side]]
            lines += _table(["quantity", "value", "unit"], rows)
    return "\n".join(lines) + "\n"
