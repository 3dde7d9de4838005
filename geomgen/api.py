"""The public Python API: load a design, size it, lay it out, build it, write the outputs.

Every object here is frozen; each step returns a new one. Units: the sized quantities are
SI with the unit beside each value (as in report.json); corner points and hinge lines are in
metres in the aircraft frame (x aft, y right, z up); parts and meshes are in millimetres in
the same frame. Errors are the CLI's: :class:`geomgen.errors.InputError` naming the key
path for bad input, :class:`geomgen.errors.GeometryError` when a part cannot be built or a
check fails.

Only the names in ``__all__`` are public (``geomgen`` re-exports them); everything else in the
package may change. The CLI runs ``geomgen size`` and ``geomgen build`` through
:func:`size_file` and :func:`build_file`. Imports are lazy: loading and sizing import no CAD
kernel (``geomgen size`` must never import cadquery).
"""

from __future__ import annotations

import copy
import html
import json
import re
import shutil
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from geomgen.errors import InputError

__all__ = [
    "Build",
    "Corners",
    "Design",
    "HingeLine",
    "Layout",
    "Mesh",
    "Quantity",
    "Sizing",
    "build_file",
    "diff_files",
    "diff_text",
    "load",
    "model_file",
    "schema",
    "size_file",
    "sweep_file",
    "watch_file",
]

#: what ``Build.write`` copies for each output kind (paths inside the output folder)
OUTPUT_KINDS: dict[str, tuple[str, ...]] = {
    "reports": ("report.json", "report.md"),
    "drawings": ("three-view.svg", "three-view.png", "dxf", "templates.pdf"),
    "step": ("{name}.step",),
    "stl": ("stl",),
    "checks": ("checks.json", "parts.json"),
    "html": ("report.html",),
}


# --- the commands' own entry points (the CLI calls these) ---------------------------------------


def size_file(
    design_path: str | Path,
    out: str | Path = "out",
    units: str | None = None,
    drawings: bool = True,
) -> Path:
    """What ``geomgen size`` does: size the design file into ``out/<name>/``; the folder."""
    from geomgen.commands.pipeline import run_size

    return run_size(Path(design_path), Path(out), units, drawings=drawings)


def build_file(
    design_path: str | Path,
    out: str | Path = "out",
    units: str | None = None,
    only: Iterable[str] | None = None,
    progress: Callable[[str], None] = lambda _: None,
    fresh: bool = False,
    jobs: int | None = 1,
):
    """What ``geomgen build`` does: build the design file into ``out/<name>/`` with the cache
    in ``out/.cache``, on ``jobs`` worker processes (1: in this process; None: one per CPU;
    the same files whatever the number; InputError on ``--jobs`` outside 1 to 64); the
    pipeline's BuildResult (folder, parts, checks count, reuse)."""
    from geomgen.commands.pipeline import run_build
    from geomgen.commands.workers import check_jobs, default_jobs

    return run_build(
        Path(design_path),
        Path(out),
        units,
        None if only is None else set(only),
        progress=progress,
        fresh=fresh,
        jobs=default_jobs() if jobs is None else check_jobs(jobs),
    )


def schema() -> dict[str, Any]:
    """What ``geomgen schema`` prints: the JSON Schema of a design file."""
    from geomgen.design import json_schema

    return json_schema()


def diff_files(old: str | Path, new: str | Path, tolerance: float | None = None) -> dict[str, Any]:
    """What ``geomgen diff`` compares: two design files or two output folders; the result
    (``equal``, changed quantities, moved points, changed parts, what is only in one). Numbers
    within ``tolerance`` (relative; None: the command's default) count as equal."""
    from geomgen.commands import diff

    chosen = diff.DEFAULT_TOLERANCE if tolerance is None else tolerance
    return diff.diff_paths(Path(old), Path(new), chosen)


def diff_text(
    result: Mapping[str, Any], old: str = "OLD", new: str = "NEW", form: str = "md"
) -> str:
    """A :func:`diff_files` result as the command prints it: ``form`` "md" (markdown) or "json"."""
    from geomgen.commands import diff

    if form == "json":
        return diff.to_json(dict(result)) + "\n"
    if form == "md":
        return diff.to_markdown(dict(result), old, new)
    raise InputError(f'must be "md" or "json" (got {form!r})', path="--format")


def sweep_file(
    design_path: str | Path,
    vary: Iterable[str],
    out: str | Path = "out",
    build: bool = False,
    jobs: int = 1,
    scheduler: str | None = None,
    plot: str | None = None,
):
    """What ``geomgen sweep`` does: every combination of the ``vary`` texts (``KEY=VALUES``)
    sized (or built) into ``out/<name>-sweep/`` with a summary CSV (and a plot); the sweep's
    result (csv_path, plot_path, passed, failed)."""
    from geomgen.commands.sweep import run_sweep

    return run_sweep(
        Path(design_path),
        list(vary),
        Path(out),
        build=build,
        jobs=jobs,
        scheduler=scheduler,
        plot=plot,
    )


def model_file(
    design_path: str | Path,
    out: str | Path = "out",
    scale: str | None = None,
    span: str | float | None = None,
    progress: Callable[[str], None] = lambda _: None,
):
    """What ``geomgen model`` does: the printable wind-tunnel model into ``out/<name>-model/``
    at ``scale`` ("1:N") or a tip-to-tip ``span`` (metres, or a text with its unit such as
    "900 mm"; 50 mm to 5 m); the model's result (folder, scale, pieces, checks)."""
    from geomgen.commands.model import run_model

    metres = None
    if span is not None:
        if isinstance(span, str):
            from geomgen.design.units import UnitParseError, parse_quantity

            try:
                metres = parse_quantity(span, "length")
            except UnitParseError as err:
                raise InputError(str(err), path="--span") from None
        else:
            metres = float(span)
        if not 0.05 <= metres <= 5.0:
            raise InputError(f"must be 50 mm to 5 m (got {span!r})", path="--span")
    return run_model(Path(design_path), Path(out), scale, metres, progress=progress)


def watch_file(
    design_path: str | Path,
    out: str | Path = "out",
    size_only: bool = False,
    port: int = 8765,
    say: Callable[[str], None] = print,
    tell: Callable[[str], None] = print,
) -> int:
    """What ``geomgen watch`` does: build (or size) the design file each time it is saved,
    ``say`` what changed and ``tell`` errors, serve report.html on ``port``; returns the exit
    code when interrupted."""
    from geomgen.commands.watch import watch

    return watch(
        Path(design_path),
        Path(out),
        size_only=size_only,
        port=port,
        say=say,
        tell=tell,
        run_size=size_file,
        run_build=build_file,
    )


# --- loading and changing a design ---------------------------------------------------------------


def load(source: str | Path | Mapping[str, Any], *, base: str | Path | None = None) -> Design:
    """A design from a file path, a YAML string (text holding a newline or ``": "``) or a
    mapping, validated exactly like a design file (InputError with the key path). Section
    files are looked up beside the file (for text or a mapping: in ``base``, default the
    current folder), then in the shipped profiles/."""
    from geomgen.design.loader import load as load_file
    from geomgen.design.loader import parse_text

    if isinstance(source, Mapping):
        document = _plain_copy(source)
        return _from_document(document, "<design>", Path(base or Path.cwd()), None)
    if isinstance(source, str) and ("\n" in source or ": " in source):
        document = parse_text(source, "<design>")
        return _from_document(document, "<design>", Path(base or Path.cwd()), None)
    path = Path(source)
    spec = load_file(path)  # every refusal worded as for the CLI
    from geomgen.design.loader import read_document

    return Design(spec, read_document(path), path.resolve().parent, path, str(path))


def _plain_copy(mapping: Mapping[str, Any]) -> Any:
    """A deep copy of a mapping with plain dicts and lists (tuples become lists)."""
    if isinstance(mapping, Mapping):
        return {k: _plain_copy(v) for k, v in mapping.items()}
    if isinstance(mapping, (list, tuple)):
        return [_plain_copy(v) for v in mapping]
    return mapping


def _from_document(document: Any, source: str, base: Path, path: Path | None) -> Design:
    from geomgen.design.loader import from_mapping

    spec = from_mapping(document, source)
    return Design(spec, document, base, path, source)


_STEP = re.compile(r"^(?P<key>[A-Za-z_][A-Za-z0-9_]*)(?P<index>(\[\d+\])*)$")


def _key_steps(key: str) -> tuple[str | int, ...]:
    steps: list[str | int] = []
    for part in key.split("."):
        m = _STEP.match(part)
        if m is None:
            raise InputError(
                "is not a key path; write dotted keys with list items as [N], e.g. "
                "wing.aspect_ratio or wing.panels[1].chord_ratio",
                path=key,
            )
        steps.append(m["key"])
        steps += [int(i) for i in re.findall(r"\d+", m["index"])]
    return tuple(steps)


def _set_key(document: dict, key: str, value: Any, source: str) -> None:
    """Set ``key`` (a dotted key path) in ``document``; missing mappings on the way are made,
    as writing the key into the file would; a list item must exist."""
    steps = _key_steps(key)
    node: Any = document
    for i, step in enumerate(steps):
        last = i == len(steps) - 1
        if isinstance(step, int):
            if not isinstance(node, list) or step >= len(node):
                count = len(node) if isinstance(node, list) else 0
                raise InputError(
                    f"has no item [{step}] (list items there: {count}, numbered from 0)",
                    source=source,
                    path=key,
                )
        elif not isinstance(node, dict):
            raise InputError(
                f"{step!r} is inside a single value, not a group of keys", source=source, path=key
            )
        elif not last and not isinstance(node.get(step), (dict, list)):
            node[step] = {} if isinstance(steps[i + 1], str) else []
        if last:
            node[step] = value
        else:
            node = node[step]


@dataclass(frozen=True, eq=False)
class Design:
    """A validated design: ``spec`` is the frozen internal ``geomgen.design.Design`` (SI);
    the document (the file's plain values) is kept for :meth:`replace`. ``base`` is the
    folder section files are looked up in; ``path`` the file it came from, unless it was
    made in code or changed since."""

    spec: Any
    _document: Any = field(repr=False)
    base: Path
    path: Path | None = None
    source: str = "<design>"  # named in messages: the file it came from, or <design>

    @property
    def name(self) -> str:
        return self.spec.name

    def to_dict(self) -> dict[str, Any]:
        """The design's values as a file would hold them (a copy)."""
        return copy.deepcopy(self._document)

    def to_yaml(self) -> str:
        import yaml

        return yaml.safe_dump(self._document, sort_keys=False, allow_unicode=True)

    def replace(self, key: str, value: Any) -> Design:
        """A new design with ``key`` (``"wing.aspect_ratio"``, ``"wing.panels[1].twist"``) set
        to ``value``. A string is read as the file would read it (``"8.2"`` is a number,
        ``"46 kn"`` a speed, ``"optimum"`` a word); the result is validated like a file."""
        from geomgen.design.loader import parse_text

        if isinstance(value, str):
            value = parse_text(value, self.source) if value.strip() else value
        document = copy.deepcopy(self._document)
        _set_key(document, key, _plain_copy(value), self.source)
        return _from_document(document, self.source, self.base, None)

    def airfoil_dirs(self) -> tuple[Path, ...]:
        from geomgen.commands.pipeline import airfoil_dirs

        return airfoil_dirs(self.base / "design.yaml")

    def size(self) -> Sizing:
        """Sizing and layout (no CAD kernel): the sized quantities, corners, hinge lines."""
        if self.path is not None:
            from geomgen.commands.pipeline import _size

            _, layout, _ = _size(self.path)
        else:
            from geomgen.geometry.junction import mount
            from geomgen.geometry.layout import lay_out
            from geomgen.sizing.aircraft import size

            dirs = self.airfoil_dirs()
            layout = mount(lay_out(size(self.spec, dirs), dirs), dirs)
        from geomgen.outputs.report import report_data

        # through JSON, so that the mapping holds exactly what report.json holds
        return Sizing(self, layout, json.loads(json.dumps(report_data(layout))))

    def layout(self) -> Layout:
        return self.size().layout()

    def build(
        self,
        out: str | Path = "out",
        *,
        units: str | None = None,
        only: Iterable[str] | None = None,
        fresh: bool = False,
        progress: Callable[[str], None] = lambda _: None,
    ) -> Build:
        """Build into ``out/<name>/`` (cache in ``out/.cache``), as ``geomgen build`` does;
        a design made or changed in code is written first to ``out/<name>.design.yaml``."""
        path = self._file_in(Path(out))
        result = build_file(path, out, units, only, progress, fresh)
        return Build(self, result.folder, result)

    def _file_in(self, out: Path) -> Path:
        """The design file to run the pipeline on: the original file, or this design written
        into ``out`` with the section files beside the original named relative to it."""
        if self.path is not None:
            return self.path
        from geomgen.commands.sweep_grid import _relink_airfoils

        out.mkdir(parents=True, exist_ok=True)
        document = copy.deepcopy(self._document)
        _relink_airfoils(document, self.base, out)
        import yaml

        path = out / f"{self.name}.design.yaml"
        text = yaml.safe_dump(document, sort_keys=False, allow_unicode=True)
        if not path.is_file() or path.read_text(encoding="utf-8") != text:
            path.write_text(text, encoding="utf-8")
        return path

    def _repr_html_(self) -> str:
        """The key table: the file's own values (with their units) of the top sections."""
        rows: list[tuple[str, Any]] = [("source", self.path or "made in code")]
        for section, node in self._document.items():
            if not isinstance(node, dict):
                rows.append((section, node))
                continue
            for k, v in node.items():
                if not isinstance(v, (dict, list)):
                    rows.append((f"{section}.{k}", v))
        return _table(f"geomgen design {self.name}", rows)


def _table(title: str, rows: Iterable[tuple[str, Any]]) -> str:
    body = "".join(
        f"<tr><th style='text-align:left'>{html.escape(str(k))}</th>"
        f"<td style='text-align:left'>{html.escape(_shown(v))}</td></tr>"
        for k, v in rows
    )
    return f"<table><caption>{html.escape(title)}</caption>{body}</table>"


def _shown(v: Any) -> str:
    if isinstance(v, float):
        return f"{v:.6g}"
    if isinstance(v, Quantity):
        return str(v)
    return str(v)


# --- sizing and layout ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Quantity:
    """A value (a number or a point) with its unit, as report.json gives it."""

    value: Any
    unit: str

    def __str__(self) -> str:
        v = self.value
        text = f"{v:.6g}" if isinstance(v, float) else str(v)
        return f"{text} {self.unit}" if self.unit not in ("1", "") else text


#: the key table of a sizing (report keys), shown in notebooks
KEY_QUANTITIES = (
    "stall.wing_area_required",
    "stall.wing_loading",
    "surfaces.wing.area",
    "surfaces.wing.span",
    "surfaces.wing.aspect_ratio",
    "surfaces.wing.mgc.length",
    "surfaces.wing.wetted_area",
    "tails.horizontal_tail.area",
    "tails.horizontal_tail.tail_arm",
    "tails.vertical_tail.area",
    "tails.vertical_tail.tail_arm",
    "fuselage.length",
)


@dataclass(frozen=True, eq=False)
class Sizing:
    """A sized and laid-out design. ``report`` is the report.json mapping (SI, a unit beside
    every value); ``internal`` the stage's own ``Layout`` (private, may change)."""

    design: Design
    internal: Any = field(repr=False)
    report: Mapping[str, Any] = field(repr=False)

    def quantities(self) -> dict[str, Quantity]:
        """Every quantity of report.json by key path (``surfaces.wing.area``)."""
        from geomgen.commands.diff import _leaves

        return {
            k: Quantity(v, u) for k, (v, u) in _leaves(dict(self.report)).items() if u is not None
        }

    def __getitem__(self, key: str) -> Quantity:
        found = self.quantities()
        if key not in found:
            raise KeyError(f"{key!r} is not a quantity of the report")
        return found[key]

    def layout(self) -> Layout:
        return Layout.of(self.internal)

    def three_view_svg(self) -> str:
        """The three-view drawing (SVG text), as three-view.svg holds it."""
        import tempfile

        from geomgen.outputs.three_view import three_view

        with tempfile.TemporaryDirectory(prefix="geomgen-view-") as tmp:
            svg = Path(tmp) / "three-view.svg"
            three_view(self.internal, svg, Path(tmp) / "three-view.png", self.design.spec.units)
            return svg.read_text(encoding="utf-8")

    def write(self, out: str | Path = "out", *, units: str | None = None, drawings=True) -> Path:
        """Write the reports (and unless ``drawings`` is False the three-view, DXF files and
        report.html) into ``out/<name>/`` as ``geomgen size`` does; the folder."""
        return size_file(self.design._file_in(Path(out)), out, units, drawings)

    def _key_rows(self) -> list[tuple[str, Any]]:
        found = self.quantities()
        return [(k, found[k]) for k in KEY_QUANTITIES if k in found]

    def _repr_html_(self) -> str:
        table = _table(f"geomgen sizing of {self.design.name}", self._key_rows())
        return f"<div>{table}<div style='max-width:100%'>{self.three_view_svg()}</div></div>"


@dataclass(frozen=True)
class Corners:
    """The four corners of one panel of one side (m, aircraft frame)."""

    surface: str
    side: str
    panel: int
    le_inner: tuple[float, float, float]
    te_inner: tuple[float, float, float]
    te_outer: tuple[float, float, float]
    le_outer: tuple[float, float, float]


@dataclass(frozen=True)
class HingeLine:
    """A control surface's hinge line: its points from the inner to the outer end (m)."""

    name: str  # the moving part's name, e.g. aileron-right
    kind: str  # aileron | flap | elevator | rudder
    surface: str
    side: str
    points: tuple[tuple[float, float, float], ...]
    chord_fractions: tuple[float, ...]
    area: float  # m^2, projected area aft of the hinge line (one side)


@dataclass(frozen=True)
class Layout:
    """Corner points and hinge lines of every surface, and the part names a build makes."""

    corners: tuple[Corners, ...]
    hinge_lines: tuple[HingeLine, ...]
    part_names: tuple[str, ...]

    @classmethod
    def of(cls, layout) -> Layout:
        def pt(p) -> tuple[float, float, float]:
            return tuple(float(c) for c in p)

        corners, hinges = [], []
        for sl in layout.surfaces:
            for c in sl.corners:
                corners.append(
                    Corners(
                        sl.key,
                        c.side,
                        c.panel,
                        pt(c.le_inner),
                        pt(c.te_inner),
                        pt(c.te_outer),
                        pt(c.le_outer),
                    )
                )
            for cl in sl.controls:
                hinges.append(
                    HingeLine(
                        cl.name,
                        cl.kind,
                        sl.key,
                        cl.side,
                        tuple(pt(h.point) for h in cl.hinge),
                        tuple(float(h.chord_fraction) for h in cl.hinge),
                        float(cl.area),
                    )
                )
        names = tuple(layout.part_names) + (("fuselage",) if layout.body is not None else ())
        return cls(tuple(corners), tuple(hinges), names)


# --- a build -------------------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class Mesh:
    """A triangle mesh in mm, aircraft frame: vertices (n, 3) float64 with coincident
    corners merged, faces (m, 3) vertex indices, as read from the part's STL file."""

    name: str
    vertices: Any
    faces: Any

    def trimesh(self):
        """The mesh as a ``trimesh.Trimesh`` (made in geomgen.checks, trimesh's one owner)."""
        from geomgen.checks.common import load_mesh

        return load_mesh(self.vertices, self.faces)


def read_stl(path: Path) -> tuple[Any, Any]:
    """(vertices, faces) of a binary STL: 80-byte header, count, 50 bytes per triangle (the
    format's own layout); coincident corners merged."""
    import numpy as np

    data = path.read_bytes()
    count = int(np.frombuffer(data, "<u4", 1, 80)[0])
    record = np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("attr", "<u2")])
    if len(data) != 84 + record.itemsize * count:
        raise InputError("is not a binary STL file", source=str(path))
    tri = np.frombuffer(data, record, count, 84)["v"].reshape(-1, 3).astype(np.float64)
    vertices, inverse = np.unique(tri, axis=0, return_inverse=True)
    return vertices, inverse.reshape(-1, 3)


@dataclass(frozen=True, eq=False)
class Build:
    """A finished build in ``folder``: the parts as cadquery shapes (read back from the
    STEP file), as meshes (from the STL files), the checks (checks.json) and the writers.
    ``result`` is the pipeline's BuildResult (parts, checks count, what the cache gave)."""

    design: Design
    folder: Path
    result: Any = field(repr=False)

    @property
    def step_path(self) -> Path:
        return self.folder / f"{self.design.name}.step"

    def sizing(self) -> Sizing:
        return self.design.size()

    def shapes(self) -> dict[str, Any]:
        """Every part as a cadquery Shape by name (mm, aircraft frame), from the STEP file."""
        from geomgen.solids.step import read_step_shapes

        return read_step_shapes(self.step_path)

    def meshes(self) -> dict[str, Mesh]:
        """Every part's mesh by name (mm, aircraft frame), from its STL file."""
        out = {}
        for stl in sorted((self.folder / "stl").glob("*.stl")):
            out[stl.stem] = Mesh(stl.stem, *read_stl(stl))
        return out

    def checks(self) -> tuple[Any, ...]:
        """Every self-check (``geomgen.checks.common.Check``: measured, expected, tolerance)."""
        from geomgen.checks.common import Check

        data = json.loads((self.folder / "checks.json").read_text(encoding="utf-8"))
        return tuple(Check(**c) for c in data["checks"])

    def write(self, out: str | Path, kinds: Iterable[str] | None = None) -> Path:
        """Copy the outputs of ``kinds`` (default all: reports, drawings, step, stl, checks,
        html) into ``out``, byte for byte; the folder."""
        kinds = list(OUTPUT_KINDS) if kinds is None else list(kinds)
        unknown = [k for k in kinds if k not in OUTPUT_KINDS]
        if unknown:
            raise InputError(
                f"unknown output kind {unknown[0]!r}; kinds: {', '.join(OUTPUT_KINDS)}",
                path="kinds",
            )
        out = Path(out)
        out.mkdir(parents=True, exist_ok=True)
        for kind in kinds:
            for pattern in OUTPUT_KINDS[kind]:
                src = self.folder / pattern.format(name=self.design.name)
                if src.is_dir():
                    shutil.copytree(src, out / src.name, dirs_exist_ok=True)
                elif src.is_file():
                    shutil.copy2(src, out / src.name)
        return out

    def _repr_html_(self) -> str:
        sizing = self.sizing()
        parts = [(n, Quantity(v, "mm^3")) for n, v, _ in self.result.parts]
        page = (self.folder / "report.html").read_text(encoding="utf-8")
        frame = (
            f'<iframe srcdoc="{html.escape(page, quote=True)}" '
            "style='width:100%;height:640px;border:1px solid #ccc'></iframe>"
        )
        return (
            f"<div>{sizing._repr_html_()}"
            f"{_table(f'parts ({self.result.checks} checks passed)', parts)}{frame}</div>"
        )
