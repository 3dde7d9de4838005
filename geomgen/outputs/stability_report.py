"""The static-stability part of report.json and report.md: neutral point, static margins at the
CG positions, and every slope and ratio they came from (SI; slopes per rad; x in the aircraft
frame), each with a short note on its source (the methods: ``geomgen.sizing.stability``)."""

from __future__ import annotations

from typing import Any

from geomgen.sizing.aircraft import Sizing
from geomgen.sizing.stability import Stability

#: said beside every neutral-point table
NOT_A_SUBSTITUTE = (
    "This neutral point and these static margins are a first estimate from handbook methods; "
    "they do not replace flight test or an analysis by qualified, licensed people."
)

SOURCES = {
    "lift_slopes": "Helmbold equation with the half-chord sweep and the Prandtl-Glauert "
    "factor (USAF DATCOM Sec. 4.1.3.2); section slope from requirements.section_lift_slope "
    "(default 2 pi, thin-airfoil theory, no thickness correction)",
    "mach": "stall speed over the ISA speed of sound at the design's altitude",
    "downwash_gradient": "USAF DATCOM Sec. 4.4.1 low-speed estimate from the wing's aspect "
    "ratio, taper, quarter-chord sweep, span and the tail's arm and height above the wing "
    "root chord plane",
    "tail_dynamic_pressure_ratio": "requirements.tail_dynamic_pressure_ratio (default 0.9, "
    "common practice)",
    "fuselage": "omitted: a body ahead of the wing moves the neutral point forward (often a "
    "few % MGC), so these margins are larger than the airplane's",
    "neutral_point": "stick-fixed; lift-slope-weighted mean of the wing's and tail's MGC "
    "quarter-chord points",
    "static_margin": "(x_np - x_cg) / MGC; positive is stable",
}


def _q(value: float, unit: str) -> dict[str, Any]:
    return {"value": value, "unit": unit}


def stability_data(sizing: Sizing) -> dict[str, Any] | None:
    """report.json's ``stability`` mapping; None without a horizontal tail."""
    s = sizing.stability
    if s is None:
        return None
    return {
        "neutral_point_x": _q(s.neutral_point_x, "m"),
        "neutral_point_mgc_fraction": _q(s.neutral_point_fraction, "1"),
        "cg": [
            {
                "label": m.label,
                "x": _q(m.x, "m"),
                "mgc_fraction": _q(m.fraction_mgc, "1"),
                "static_margin": _q(m.static_margin, "1"),
            }
            for m in s.cg
        ],
        "mach": _q(s.mach, "1"),
        "section_lift_slope": _q(s.section_slope, "1/rad"),
        "wing_lift_slope": _q(s.wing_slope, "1/rad"),
        "tail_lift_slope": _q(s.tail_slope, "1/rad"),
        "wing_half_chord_sweep": _q(s.wing_half_chord_sweep, "rad"),
        "tail_half_chord_sweep": _q(s.tail_half_chord_sweep, "rad"),
        "downwash_gradient": _q(s.downwash_gradient, "1"),
        "tail_dynamic_pressure_ratio": _q(s.tail_q_ratio, "1"),
        "tail_area_ratio": _q(s.area_ratio, "1"),
        "tail_arm": _q(s.tail_arm, "m"),
        "tail_height_above_wing_root": _q(s.tail_height, "m"),
        "wing_mgc": _q(s.mgc, "m"),
        "wing_mgc_leading_edge_x": _q(s.mgc_le_x, "m"),
        "sources": dict(SOURCES),
        "note": NOT_A_SUBSTITUTE,
    }


def _pct(fraction: float) -> str:
    return f"{100 * fraction:.1f} % MGC"


def stability_rows(s: Stability, length) -> list[list[str]]:
    """(quantity, value, source) rows; ``length`` formats a length in m for display."""
    rows = [
        [
            "neutral point (stick-fixed)",
            f"x = {length(s.neutral_point_x)}, {_pct(s.neutral_point_fraction)}",
            "slope-weighted wing and tail aerodynamic centres",
        ],
    ]
    for m in s.cg:
        rows.append(
            [
                f"static margin at the {m.label} CG",
                f"{_pct(m.static_margin)} (CG at x = {length(m.x)}, {_pct(m.fraction_mgc)})",
                "(x_np - x_cg) / MGC",
            ]
        )
    rows += [
        ["wing lift-curve slope", f"{s.wing_slope:.4f} /rad", "Helmbold, Prandtl-Glauert"],
        ["tail lift-curve slope", f"{s.tail_slope:.4f} /rad", "Helmbold, Prandtl-Glauert"],
        ["section lift-curve slope", f"{s.section_slope:.4f} /rad", "input (2 pi default)"],
        ["Mach number", f"{s.mach:.4f}", "stall speed, ISA"],
        ["downwash gradient d eps/d alpha", f"{s.downwash_gradient:.4f}", "USAF DATCOM 4.4.1"],
        ["tail dynamic-pressure ratio", f"{s.tail_q_ratio:.3f}", "input (0.9 default)"],
        ["tail height above the wing root", length(s.tail_height), "MGC c/4 points"],
        ["fuselage contribution", "omitted", "moves the real neutral point forward"],
    ]
    return rows


def stability_markdown(sizing: Sizing, length) -> list[str]:
    """report.md's lines for the neutral point and margins (none without a horizontal tail)."""
    s = sizing.stability
    if s is None:
        return []
    lines = ["## Neutral point and static margins", "", NOT_A_SUBSTITUTE, ""]
    header = ["quantity", "value", "source"]
    lines += ["| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
    lines += ["| " + " | ".join(r) + " |" for r in stability_rows(s, length)]
    lines += [""]
    if not s.cg:
        lines += ["Give `requirements.cg` for the static margins.", ""]
    return lines
