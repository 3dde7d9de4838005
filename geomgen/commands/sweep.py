"""``geomgen sweep``: one design run over a grid of changed values, one CSV row per variant.

A ``--vary`` option names a key of the design file by its dotted path (list items as
``panels[1]``) and the values it takes:

- a range ``START:STOP:STEP``, STOP included when the steps land on it;
- a list ``v1,v2,...`` (numbers, numbers with units, or words such as ``optimum``).

Dimensionless keys take bare numbers; dimensional keys take numbers with a unit, written on
every value (``40 kn:50 kn:5 kn``) or once at the end, where it applies to every bare number
(``40:50:5 kn``, ``3.6,4,4.4 m``). Several ``--vary`` make a grid: every combination, the first
``--vary`` changing slowest.

Every variant gets its own design file ``OUT/<name>-sweep/<name>-vNNN/design.yaml`` (the
design's mapping with the values set and ``name`` made unique), sized (or built) into that same
folder by :func:`run_variant`, a plain top-level function that runs in this process, in a
local process pool or on the workers of a Dask distributed cluster (which must see the same
file system). ``summary.csv`` holds one row per variant in grid order.
"""

from __future__ import annotations

import csv
import io
import itertools
import json
import math
import os
import re
import shutil
import sys
from collections.abc import Callable, Sequence
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

#: summary columns read from report.json: column name, path in the report, expected SI unit
REPORT_COLUMNS: tuple[tuple[str, tuple[str, ...], str], ...] = (
    ("wing_area_m2", ("surfaces", "wing", "area"), "m^2"),
    ("wing_span_m", ("surfaces", "wing", "span"), "m"),
    ("wing_mgc_m", ("surfaces", "wing", "mgc", "length"), "m"),
    ("wing_wetted_area_m2", ("surfaces", "wing", "wetted_area"), "m^2"),
    ("horizontal_tail_area_m2", ("surfaces", "horizontal_tail", "area"), "m^2"),
    ("horizontal_tail_arm_m", ("tails", "horizontal_tail", "tail_arm"), "m"),
    ("vertical_tail_area_m2", ("surfaces", "vertical_tail", "area"), "m^2"),
    ("vertical_tail_arm_m", ("tails", "vertical_tail", "tail_arm"), "m"),
)
#: exposed areas (designs with a fuselage only): a column appears when any variant has it
EXPOSED_COLUMNS: tuple[tuple[str, tuple[str, ...], str], ...] = tuple(
    (
        f"{s}_exposed_area_m2",
        ("surfaces", s, "fuselage_junction", "exposed_area"),
        "m^2",
    )
    for s in ("wing", "horizontal_tail", "vertical_tail")
)
#: columns of ``--build`` sweeps
BUILD_COLUMNS = ("parts_volume_mm3", "checks_passed")


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


@dataclass(frozen=True)
class SweepResult:
    folder: Path
    csv_path: Path
    plot_path: Path | None
    passed: int
    failed: int


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
    """The declaration (geomgen.fields) of the key at ``steps``; its parents must be in the
    design (list items too), the key itself may be left out if the design file allows it."""
    from geomgen import design as design_module
    from geomgen.design.fields import AnyOf, ListOf, Mapping

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
                raise _vary_error(
                    f"unknown key {_path_text(steps[: depth + 1])!r} in {source}; "
                    f"keys allowed in {where}: {allowed}"
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


# --- the worker ---------------------------------------------------------------------------------


def _report_value(report: dict, path: tuple[str, ...], unit: str) -> float | None:
    node: Any = report
    for p in path:
        if not isinstance(node, dict) or p not in node:
            return None
        node = node[p]
    if node["unit"] != unit:
        raise ValueError(f"report.json: {'.'.join(path)} is in {node['unit']}, not {unit}")
    return float(node["value"])


def run_variant(design_path: str, build: bool = False) -> dict:
    """Size (or build) one variant's design file into its own folder (the design file's
    folder); returns a plain row: ``status`` ("ok" or "failed: <message>") and the summary
    numbers. Never raises for a failing variant. Top-level and picklable arguments, for
    process pools and Dask workers."""
    from geomgen.commands.pipeline import run_build, run_size
    from geomgen.errors import GeomgenError

    path = Path(design_path)
    folder = path.parent
    row: dict[str, Any] = {}
    try:
        text = path.read_text(encoding="utf-8")
        try:
            # run_size/run_build replace the folder <out>/<name>, which holds the design file:
            # written back below
            if build:
                result = run_build(path, folder.parent, None)
                row["parts_volume_mm3"] = sum(v for _, v, _ in result.parts)
                checks = json.loads((folder / "checks.json").read_text(encoding="utf-8"))
                row["checks_passed"] = bool(checks["passed"])
            else:
                run_size(path, folder.parent, None, drawings=False)
        finally:
            folder.mkdir(parents=True, exist_ok=True)
            path.write_text(text, encoding="utf-8")
        report = json.loads((folder / "report.json").read_text(encoding="utf-8"))
        for column, where, unit in REPORT_COLUMNS + EXPOSED_COLUMNS:
            value = _report_value(report, where, unit)
            if value is not None:
                row[column] = value
        row["status"] = "ok"
    except GeomgenError as err:
        row = {"status": f"failed: {_one_line(str(err))}"}
    except Exception as err:  # a variant must not stop the sweep; its row says what happened
        row = {"status": f"failed: {type(err).__name__}: {_one_line(str(err))}"}
    return row


def _one_line(text: str) -> str:
    return " ".join(text.split())


# --- running ------------------------------------------------------------------------------------


def _progress(total: int):
    from tqdm import tqdm

    return tqdm(total=total, disable=None, file=sys.stderr, unit="variant", desc="geomgen sweep")


def _run_local(paths: list[str], build: bool, jobs: int) -> list[dict]:
    rows: list[dict] = [{} for _ in paths]
    with _progress(len(paths)) as bar:
        if jobs == 1:
            for i, p in enumerate(paths):
                rows[i] = run_variant(p, build)
                bar.update()
            return rows
        from concurrent.futures import ProcessPoolExecutor, as_completed

        with ProcessPoolExecutor(max_workers=jobs) as pool:
            futures = {pool.submit(run_variant, p, build): i for i, p in enumerate(paths)}
            for f in as_completed(futures):
                rows[futures[f]] = _result_row(f.result, f.exception)
                bar.update()
    return rows


def _run_dask(paths: list[str], build: bool, address: str) -> list[dict]:
    from distributed import Client, as_completed

    try:
        client = Client(address, timeout="20s")
    except (OSError, TimeoutError, ValueError) as err:
        raise InputError(
            f"cannot connect to the Dask scheduler at {address!r} ({_one_line(str(err))})",
            path="--scheduler",
        ) from None
    try:
        futures = client.map(run_variant, paths, build=build, pure=False)
        index = {f.key: i for i, f in enumerate(futures)}
        rows: list[dict] = [{} for _ in paths]
        with _progress(len(paths)) as bar:
            for f in as_completed(futures):
                rows[index[f.key]] = _result_row(lambda f=f: f.result(), f.exception)
                bar.update()
        return rows
    finally:
        client.close()


def _result_row(result: Callable[[], dict], exception: Callable[[], Any]) -> dict:
    """A worker's row, or a failed row when the worker itself died."""
    try:
        err = exception()
    except Exception as lost:  # cancelled futures raise here
        err = lost
    if err is not None:
        return {"status": f"failed: worker lost: {type(err).__name__}: {_one_line(str(err))}"}
    return result()


# --- the summary --------------------------------------------------------------------------------


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value)  # every digit: the CSV holds the report's numbers exactly
    return str(value)


def summary_columns(varies: Sequence[Vary], rows: Sequence[dict], build: bool) -> list[str]:
    cols = ["variant", *(v.key for v in varies), "status"]
    cols += [c for c, _, _ in REPORT_COLUMNS]
    cols += [c for c, _, _ in EXPOSED_COLUMNS if any(c in r for r in rows)]
    if build:
        cols += list(BUILD_COLUMNS)
    return cols


def write_summary(
    path: Path, varies: Sequence[Vary], variants: Sequence[Variant], rows: Sequence[dict], build
) -> list[str]:
    cols = summary_columns(varies, rows, build)
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(cols)
    for variant, row in zip(variants, rows, strict=True):
        cells = {"variant": variant.name, **row}
        cells.update({v.key: _cell(x) for v, x in zip(varies, variant.values, strict=True)})
        writer.writerow([_cell(cells.get(c)) for c in cols])
    tmp = path.with_name(f".{path.name}.tmp")
    tmp.write_text(buf.getvalue(), encoding="utf-8")
    os.replace(tmp, path)
    return cols


# --- the plot -----------------------------------------------------------------------------------


def parse_plot(text: str | None, allowed: Sequence[str]) -> list[tuple[str, str]]:
    """``X:Y[,X:Y...]`` with X and Y columns of the summary."""
    if text is None:
        return []
    pairs = []
    for item in text.split(","):
        x, sep, y = item.strip().rpartition(":")
        x, y = x.strip(), y.strip()
        if not sep or not x or not y:
            raise InputError(
                f"write X:Y[,X:Y...] with summary columns (got {text!r})", path="--plot"
            )
        for c in (x, y):
            if c not in allowed:
                raise InputError(
                    f"{c!r} is not a summary column; allowed: {', '.join(allowed)}", path="--plot"
                )
        pairs.append((x, y))
    return pairs


def _numeric(cell: str) -> tuple[float | None, str]:
    m = _VALUE.match(cell)
    if m is None:
        return None, ""
    return float(m["num"]), m["unit"]


def write_plot(path: Path, csv_path: Path, pairs: Sequence[tuple[str, str]], keys: list[str]):
    """Y against X for each pair (rows that ran; one line per combination of the other
    varied values), stacked, as a PNG drawn with matplotlib's object API and Agg."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    with csv_path.open(encoding="utf-8", newline="") as f:
        rows = [r for r in csv.DictReader(f) if r["status"] == "ok"]
    fig = Figure(figsize=(7.0, 3.6 * len(pairs)), layout="constrained")
    FigureCanvasAgg(fig)
    for n, (x, y) in enumerate(pairs):
        ax = fig.add_subplot(len(pairs), 1, n + 1)
        # a varied X: one line per combination of the other varied values; else one line
        others = [k for k in keys if k not in (x, y)] if x in keys else []
        groups: dict[tuple[str, ...], list[tuple[float, float]]] = {}
        units = {x: "", y: ""}
        for r in rows:
            (xv, xu), (yv, yu) = _numeric(r[x]), _numeric(r[y])
            if xv is None or yv is None:
                continue
            units[x], units[y] = xu or units[x], yu or units[y]
            groups.setdefault(tuple(r[k] for k in others), []).append((xv, yv))
        for label, points in groups.items():
            points.sort()
            text = ", ".join(f"{k}={v}" for k, v in zip(others, label, strict=True))
            ax.plot(*zip(*points, strict=True), marker="o", label=text or None)
        ax.set_xlabel(f"{x} ({units[x]})" if units[x] else x)
        ax.set_ylabel(f"{y} ({units[y]})" if units[y] else y)
        ax.grid(True, alpha=0.3)
        if len(groups) > 1:
            ax.legend(fontsize="small")
    fig.savefig(path, dpi=110)


# --- the sweep ----------------------------------------------------------------------------------


def run_sweep(
    design_path: Path,
    vary: Sequence[str],
    out_root: Path,
    build: bool = False,
    jobs: int = 1,
    scheduler: str | None = None,
    plot: str | None = None,
) -> SweepResult:
    """Check the options, write every variant's design file, run them all, write the summary
    (and the plot). Bad options raise InputError before anything is written."""
    import yaml

    from geomgen import design as design_module

    design_path = Path(design_path)
    base = design_module.load(design_path)  # the design must be valid on its own
    document = yaml.safe_load(design_path.read_text(encoding="utf-8"))
    source = str(design_path)
    varies = parse_varies(vary, document, source)
    if scheduler is None and jobs < 1:
        raise InputError(f"must be 1 or more (got {jobs})", path="--jobs")
    folder = Path(out_root) / f"{base.name}-sweep"
    allowed = [v.key for v in varies] + [c for c, _, _ in REPORT_COLUMNS + EXPOSED_COLUMNS]
    pairs = parse_plot(plot, allowed + (list(BUILD_COLUMNS) if build else []))
    if folder.exists() and not folder.is_dir():
        raise InputError("output path exists and is not a folder", source=str(folder))

    plan = plan_variants(document, design_path, varies, folder)
    try:
        if folder.exists():  # a previous sweep of this design: replaced as a whole
            shutil.rmtree(folder)
        for variant, doc in plan:
            variant.design_path.parent.mkdir(parents=True, exist_ok=True)
            variant.design_path.write_text(
                yaml.safe_dump(doc, sort_keys=False, allow_unicode=True), encoding="utf-8"
            )
    except OSError as err:
        raise InputError(
            f"cannot write the sweep folder ({err.strerror})", source=str(folder)
        ) from None
    variants = [v for v, _ in plan]
    paths = [str(v.design_path.resolve()) for v in variants]
    if scheduler is not None:
        rows = _run_dask(paths, build, scheduler)
    else:
        rows = _run_local(paths, build, jobs)
    csv_path = folder / "summary.csv"
    write_summary(csv_path, varies, variants, rows, build)
    plot_path = None
    if pairs:
        plot_path = folder / "sweep.png"
        write_plot(plot_path, csv_path, pairs, [v.key for v in varies])
    failed = sum(1 for r in rows if r.get("status") != "ok")
    return SweepResult(folder, csv_path, plot_path, len(rows) - failed, failed)
