"""The independent pieces of work of one build, as tasks for ``workers.Tasks``: the drawings
and templates, one unit's solids (a surface side or the fuselage, into its cache entry), one
unit's STL files and checks (into its own entry), and the STEP file with its read-back.

Each task takes the ``BuildContext`` and plain arguments, writes files and returns a small
value; the build reads what they made back in a fixed order (see ``pipeline``).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime
from pathlib import Path
from typing import Any

from geomgen.store.folder import OutputFolder


@dataclass(frozen=True)
class BuildContext:
    """What every task of a build may read: the layout, the section folders, the output
    folder being written (its temporary path), the build cache's folder."""

    layout: Any  # geomgen.geometry.layout.Layout
    dirs: tuple
    system: str  # si | imperial, for human-readable outputs
    folder: OutputFolder
    cache_root: Path
    when: datetime  # the outputs' stamp
    tolerances: Any = None  # the checks' TOLERANCES of the build's own process
    pid: int = 0  # the build's own process

    def adopt(self) -> None:
        """In a worker: run with the tolerances the build's process has (and keyed the unit
        cache with), not the ones the worker's import of the module made."""
        import os

        if self.tolerances is None or os.getpid() == self.pid:
            return
        from geomgen.checks import solid_checks, tolerances

        tolerances.TOLERANCES = self.tolerances
        solid_checks.TOLERANCES = self.tolerances

    @property
    def stl_dir(self) -> Path:
        return self.folder.path("stl/x").parent


def write_reports(folder: OutputFolder, layout, system: str) -> None:
    from geomgen.outputs.markdown_report import to_markdown
    from geomgen.outputs.report import to_json

    folder.write_text("report.json", to_json(layout))
    folder.write_text("report.md", to_markdown(layout, system))


def write_drawings(folder: OutputFolder, layout, system: str, dirs: tuple) -> str:
    """Three-view (SVG, PNG) and the shop DXF files; returns the SVG text for report.html."""
    from geomgen.outputs.three_view import three_view

    svg = folder.path("three-view.svg")
    three_view(layout, svg, folder.path("three-view.png"), system)
    write_shop_files(folder, layout, dirs)
    return svg.read_text(encoding="utf-8")


def write_shop_files(folder: OutputFolder, layout, dirs: tuple) -> None:
    """DXF files 1:1 in mm: plan view, one planform per surface, section templates."""
    from geomgen.outputs.dxf import write_plan_dxf, write_planform_dxfs, write_template_dxf

    write_plan_dxf(layout, folder.path("dxf/plan.dxf"))
    write_planform_dxfs(layout, folder.path("dxf/plan.dxf").parent)
    write_template_dxf(layout, folder.path("dxf/templates.dxf"), dirs)


# --- tasks: fn(context, *args) ----------------------------------------------------------------


def drawings_task(ctx: BuildContext) -> str:
    """The three-view, the DXF files; returns the SVG text."""
    return write_drawings(ctx.folder, ctx.layout, ctx.system, ctx.dirs)


def templates_task(ctx: BuildContext) -> None:
    """The 1:1 templates PDF."""
    from geomgen.outputs.template_pdf import write_template_pdf

    write_template_pdf(ctx.layout, ctx.folder.path("templates.pdf"), ctx.dirs)


def solid_task(ctx: BuildContext, unit) -> None:
    """One unit's solids built and saved as its cache entry."""
    from geomgen.solids import assembly
    from geomgen.store.cache import Cache

    assembly.make_entry(ctx.layout, unit, Cache(ctx.cache_root), ctx.dirs)


def unit_task(ctx: BuildContext, unit, key: str) -> None:
    """One unit's STL files and checks, from its solids as read back from their entry,
    saved as the cache entry ``key``."""
    ctx.adopt()
    from geomgen.commands.part_outputs import make_and_save
    from geomgen.solids import assembly
    from geomgen.store.cache import Cache

    cache = Cache(ctx.cache_root)
    sb, parts = assembly.unit_parts(ctx.layout, unit, cache.folder(unit.key))
    built = assembly.Build(layout=ctx.layout, sides=() if sb is None else (sb,), parts=tuple(parts))
    make_and_save(built, sb, parts, ctx.stl_dir, ctx.dirs, cache, key)


def step_task(ctx: BuildContext, units: tuple, name: str) -> dict[str, float]:
    """The STEP assembly of every unit's parts, written and read back: the part volumes
    (mm^3) it holds."""
    ctx.adopt()
    from geomgen.checks.tolerances import TOLERANCES
    from geomgen.solids import assembly, kernel, step
    from geomgen.store.cache import Cache

    cache = Cache(ctx.cache_root)
    built = assembly.assemble(ctx.layout, units, {u.key: cache.folder(u.key) for u in units})
    path = ctx.folder.path(f"{name}.step")
    step.write_step(built.parts, path, name, when=ctx.when)
    expected = {p.name: kernel.volume(p.shape) for p in built.parts}
    return step.read_step(path, expected, TOLERANCES.step_readback)
