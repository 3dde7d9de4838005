"""The printed model's parts list (Markdown and CSV) and its report (Markdown).

Sizes in model millimetres, volumes in cm^3, masses in g (solid pieces at the material's
density); the report's Reynolds numbers are on the wing's mean geometric chord.
"""

from __future__ import annotations

import csv
import io
import math
from collections.abc import Callable

import numpy as np

from geomgen.outputs.report import CAUTION

HEADER = ["piece", "from part", "size (mm)", "volume (cm^3)", "mass (g)", "print with"]


def _rows(rows, density: float, words: Callable) -> list[list[str]]:
    out = []
    for name, part, size, volume_mm3, normal in rows:
        mass_g = volume_mm3 * 1e-9 * density * 1000.0
        half = "left" if "-left" in name else "right"
        out.append(
            [
                name,
                part,
                " x ".join(f"{v:.1f}" for v in sorted(size, reverse=True)),
                f"{volume_mm3 / 1000.0:.2f}",
                f"{mass_g:.1f}",
                words(np.asarray(normal), half),
            ]
        )
    return out


def parts_markdown(rows, density: float, words: Callable) -> str:
    """The parts list as a Markdown table, with the caution."""
    body = _rows(rows, density, words)
    total = sum(float(r[4]) for r in body)
    lines = [
        "# Parts list of the printed model",
        "",
        f"> {CAUTION}",
        "",
        f"{len(body)} pieces; masses are for solid pieces at {density / 1000.0:.3f} g/cm^3 "
        f"(less with a sparse infill); total {total:.0f} g. Sizes are the oriented bounding "
        "box, largest first. Print each piece with its largest flat face down.",
        "",
        "| " + " | ".join(HEADER) + " |",
        "|" + "---|" * len(HEADER),
    ]
    lines += ["| " + " | ".join(r) + " |" for r in body]
    return "\n".join(lines) + "\n"


def parts_csv(rows, density: float, words: Callable) -> str:
    """The parts list as CSV (one header row)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(HEADER)
    writer.writerows(_rows(rows, density, words))
    return out.getvalue()


def report_markdown(layout, spec, k: float, effect, plans, variants, te_full: float, system) -> str:
    """What the model is: scale, settings, pieces and holes, and the scale effect."""
    d = layout.sizing.design
    pf = layout.sizing.wing.planform
    lines = [
        f"# Wind-tunnel model of {d.title}",
        "",
        f"> {CAUTION}",
        "",
        f"Scale 1:{1 / k:.4g} (model span {pf.span * k * 1000:.1f} mm, wing area "
        f"{pf.area * k * k * 1e4:.1f} cm^2, MGC {pf.mgc * k * 1000:.2f} mm). Areas scale by "
        f"k^2 = {k * k:.4g} and volumes by k^3 = {k**3:.4g}.",
        "",
        "## Settings",
        "",
        f"- printer build volume {' x '.join(f'{v * 1000:.0f}' for v in spec.build_volume)} mm, "
        f"nozzle {spec.nozzle_diameter * 1000:.2f} mm",
        f"- trailing edges at least {spec.min_te_thickness * 1000:.2f} mm on the model "
        f"({te_full * 1000:.2f} mm full size, blended in over the aft chord)",
        f"- walls around holes at least {spec.min_wall * 1000:.2f} mm",
        f"- dowels {spec.dowel_diameter * 1000:.2f} mm x {spec.dowel_length * 1000:.1f} mm; "
        f"hinge key bars {spec.hinge_key * 1000:.2f} mm square",
        f"- sting bore {spec.sting_diameter * 1000:.1f} mm, {spec.sting_depth * 1000:.0f} mm "
        f"deep, along {spec.sting_axis}"
        + ("" if layout.body is not None else " (into the right wing half's root face)"),
    ]
    if spec.spar_diameter is not None:
        lines.append(
            f"- spar rod {spec.spar_diameter * 1000:.2f} mm at {spec.spar_at:.0%} of the chord"
        )
    lines += ["", "## Pieces and joints", ""]
    lines += ["| part | pieces | joints at (mm) | holes |", "|---|---|---|---|"]
    for p in plans:
        kinds: dict[str, int] = {}
        for h in p.holes:
            kinds[h.kind] = kinds.get(h.kind, 0) + 1
        holes = ", ".join(f"{n} {kind}" for kind, n in kinds.items()) or "none"
        joints = ", ".join(f"{j.station:.1f}" for j in p.joints) or "-"
        lines.append(f"| {p.part} | {len(p.pieces)} | {joints} | {holes} |")
    lines += ["", "## Control-surface pieces", ""]
    lines += ["| piece | deflection |", "|---|---|"]
    lines += [f"| {v.name} | {math.degrees(v.deflection):+.1f} deg |" for v, _, _ in variants]
    e = effect
    lines += [
        "",
        "## Scale effect",
        "",
        "Reynolds number Re = V c / nu on the wing's mean geometric chord. The tunnel's air "
        "density is from the ideal gas law at its pressure and temperature, its viscosity "
        "from Sutherland's law; the full-size value is at the stall speed in the standard "
        "atmosphere at the design altitude.",
        "",
        "| | chord (m) | speed (m/s) | kinematic viscosity (m^2/s) | Reynolds number |",
        "|---|---|---|---|---|",
        f"| model in the tunnel | {e.model_chord:.4f} | {e.tunnel_speed:.2f} | "
        f"{e.tunnel_viscosity / e.tunnel_density:.4e} | {e.model_reynolds:.4g} |",
        f"| full size at the stall | {e.full_chord:.4f} | {e.full_speed:.2f} | "
        f"{e.full_kinematic_viscosity:.4e} | {e.full_reynolds:.4g} |",
        "",
        f"The model runs at {e.model_reynolds / e.full_reynolds:.3f} of the full-size Reynolds "
        "number: expect lower maximum lift and more drag than full size.",
        "",
        f"> {CAUTION}",
        "",
    ]
    _ = system
    return "\n".join(lines)
