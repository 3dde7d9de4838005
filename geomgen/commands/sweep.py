"""``geomgen sweep``: one design run over a grid of changed values, one CSV row per variant.

The grid (the ``--vary`` options and one design mapping per variant) is in
:mod:`geomgen.commands.sweep_grid`, the summary and the plot in
:mod:`geomgen.commands.sweep_summary`.

Every variant gets its own design file ``OUT/<name>-sweep/<name>-vNNN/design.yaml`` (the
design's mapping with the values set and ``name`` made unique), sized (or built) into that same
folder by :func:`run_variant`, a plain top-level function that runs in this process, in a
local process pool or on the workers of a Dask distributed cluster (which must see the same
file system). ``summary.csv`` holds one row per variant in grid order.
"""

from __future__ import annotations

import json
import shutil
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from geomgen.commands.sweep_grid import parse_varies, plan_variants
from geomgen.commands.sweep_summary import (
    BUILD_COLUMNS,
    EXPOSED_COLUMNS,
    REPORT_COLUMNS,
    check_plot_maps,
    parse_plot,
    write_plot,
    write_summary,
)
from geomgen.errors import InputError


@dataclass(frozen=True)
class SweepResult:
    folder: Path
    csv_path: Path
    plot_path: Path | None
    passed: int
    failed: int


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
        # the key path (bad input) or the part (geometry) that stopped it, in a column of its
        # own so the envelope can be read off the summary
        where = getattr(err, "path", None) or getattr(err, "part", None) or ""
        row = {"status": f"failed: {_one_line(str(err))}", "failing_key": where}
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
    document = design_module.read_document(design_path)  # read as load() read it
    source = str(design_path)
    varies = parse_varies(vary, document, source)
    if scheduler is None and jobs < 1:
        raise InputError(f"must be 1 or more (got {jobs})", path="--jobs")
    folder = Path(out_root) / f"{base.name}-sweep"
    allowed = [v.key for v in varies] + [c for c, _, _ in REPORT_COLUMNS + EXPOSED_COLUMNS]
    pairs = parse_plot(plot, allowed + (list(BUILD_COLUMNS) if build else []))
    check_plot_maps(pairs, [v.key for v in varies], {v.key: len(v.values) for v in varies})
    if folder.exists() and not folder.is_dir():
        raise InputError("output path exists and is not a folder", source=str(folder))

    from geomgen.store.lock import FolderLock

    # one sweep of a design into an output folder at a time (its variants lock their own)
    with FolderLock(folder, "sweep"):
        plan = plan_variants(document, design_path, varies, folder)
        try:
            if folder.exists():
                # a previous sweep of this design: replaced, all but its build cache (shared by
                # the variants, keyed by exactly their inputs: the surfaces a new sweep shares
                # with the old one are not built again)
                for old in folder.iterdir():
                    if old.name == ".cache" and old.is_dir() and not old.is_symlink():
                        continue
                    if old.is_dir() and not old.is_symlink():
                        shutil.rmtree(old)
                    else:
                        old.unlink()
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
