"""The summary of a ``geomgen sweep``: ``summary.csv``, one row per variant in grid order
(the varied values, the status, and numbers read from each variant's report.json in the SI
unit its column name says), and the optional plot ``sweep.png`` of chosen column pairs.
"""

from __future__ import annotations

import csv
import io
import os
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from geomgen.commands.sweep_grid import _VALUE, Variant, Vary
from geomgen.errors import InputError

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
    cols = ["variant", *(v.key for v in varies), "status", "failing_key"]
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


#: the mark of a variant that ran, in a feasibility map
OK_MARK = "ok"
#: the mark of a failed variant whose error named no key or part
NO_KEY_MARK = "failed (no key named)"
#: at most this many maps (one per combination of the varied keys not on the axes)
MAX_MAPS = 12


def feasibility_maps(
    rows: Sequence[dict[str, str]], x: str, y: str, keys: Sequence[str]
) -> list[tuple[str, list[tuple[float, float, str]]]]:
    """The feasibility map(s) of two varied keys ``x`` and ``y``: one map per combination of
    the other varied keys' values (titled by them), each a list of (x value, y value, mark),
    the mark ``ok`` or the failing key path (or part) of the summary's ``failing_key``.
    Values are in the unit each cell states."""
    others = [k for k in keys if k not in (x, y)]
    maps: dict[str, list[tuple[float, float, str]]] = {}
    for r in rows:
        (xv, _), (yv, _) = _numeric(r[x]), _numeric(r[y])
        if xv is None or yv is None:
            continue
        ok = r["status"] == OK_MARK
        mark = OK_MARK if ok else (r.get("failing_key") or NO_KEY_MARK)
        title = ", ".join(f"{k}={r[k]}" for k in others)
        maps.setdefault(title, []).append((xv, yv, mark))
    return list(maps.items())


def _map_panels(keys: Sequence[str], pairs: Sequence[tuple[str, str]], rows) -> int:
    n = 0
    for x, y in pairs:
        if x in keys and y in keys:
            n += max(1, len(feasibility_maps(rows, x, y, keys)))
        else:
            n += 1
    return n


def check_plot_maps(pairs: Sequence[tuple[str, str]], keys: Sequence[str], counts: dict) -> None:
    """Refuse a feasibility map that would need more than MAX_MAPS panels (``counts``: the
    number of values of each varied key)."""
    for x, y in pairs:
        if x in keys and y in keys:
            if x == y:
                raise InputError(
                    f"a feasibility map needs two different varied keys (got {x!r} twice)",
                    path="--plot",
                )
            maps = 1
            for k in keys:
                if k not in (x, y):
                    maps *= counts[k]
            if maps > MAX_MAPS:
                raise InputError(
                    f"a map of {x} against {y} would be drawn {maps} times (once per value of "
                    f"the other varied keys); allowed: at most {MAX_MAPS}",
                    path="--plot",
                )


def _draw_map(ax, points: list[tuple[float, float, str]], x: str, y: str, units, title: str):
    marks = sorted({m for _, _, m in points}, key=lambda m: (m != OK_MARK, m))
    shapes = "XsD^v<>Ph*p"
    for n, mark in enumerate(marks):
        pts = [(a, b) for a, b, m in points if m == mark]
        if mark == OK_MARK:
            style = {"marker": "o", "color": "tab:green"}
        else:
            style = {"marker": shapes[(n - 1) % len(shapes)], "color": f"C{(n + 2) % 10}"}
        ax.scatter(*zip(*pts, strict=True), s=60, label=f"{mark} ({len(pts)})", **style)
    ax.set_xlabel(f"{x} ({units[x]})" if units[x] else x)
    ax.set_ylabel(f"{y} ({units[y]})" if units[y] else y)
    ax.set_title(f"feasibility: {title}" if title else "feasibility", fontsize="medium")
    ax.grid(True, alpha=0.3)
    ax.legend(
        fontsize="small",
        title="ok or failing key",
        title_fontsize="small",
        loc="upper left",
        bbox_to_anchor=(1.01, 1.0),
    )


def write_plot(path: Path, csv_path: Path, pairs: Sequence[tuple[str, str]], keys: list[str]):
    """Y against X for each pair, stacked, as a PNG drawn with matplotlib's object API and Agg.
    A pair of two varied keys is a feasibility map: every variant at its two values, marked ok
    or by its failing key (one map per combination of the other varied values). Any other
    pair plots the rows that ran, one line per combination of the other varied values."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    with csv_path.open(encoding="utf-8", newline="") as f:
        every = list(csv.DictReader(f))
    rows = [r for r in every if r["status"] == OK_MARK]
    panels = _map_panels(keys, pairs, every)
    fig = Figure(figsize=(7.0, 3.6 * panels), layout="constrained")
    FigureCanvasAgg(fig)
    n = 0
    for x, y in pairs:
        units = {x: "", y: ""}
        for r in every:
            units[x] = units[x] or _numeric(r[x])[1]
            units[y] = units[y] or _numeric(r[y])[1]
        if x in keys and y in keys:
            for title, points in feasibility_maps(every, x, y, keys) or [("", [])]:
                n += 1
                ax = fig.add_subplot(panels, 1, n)
                if points:
                    _draw_map(ax, points, x, y, units, title)
            continue
        n += 1
        ax = fig.add_subplot(panels, 1, n)
        # a varied X: one line per combination of the other varied values; else one line
        others = [k for k in keys if k not in (x, y)] if x in keys else []
        groups: dict[tuple[str, ...], list[tuple[float, float]]] = {}
        for r in rows:
            (xv, _), (yv, _) = _numeric(r[x]), _numeric(r[y])
            if xv is None or yv is None:
                continue
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
