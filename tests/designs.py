"""Test helpers: the demo design and small designs built from it."""

from __future__ import annotations

import copy
from pathlib import Path

import yaml

from geomgen import design

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "examples" / "veyra-t2.yaml"
PROFILES = ROOT / "profiles"


def demo_document() -> dict:
    """The demo design file as a plain mapping (a fresh copy each call)."""
    return copy.deepcopy(yaml.safe_load(DEMO.read_text()))


#: tail-cone radii standing in for the fuselage in designs without one (the optimum tail arm
#: needs them)
TAIL_CONE = {"front_radius": "0.45 m", "rear_radius": "0.1 m"}


def bodyless_document() -> dict:
    """The demo without its fuselage, the tail-cone radii given instead: for tests of sizing,
    layout and solids that a body would change (mounting, exposed areas)."""
    doc = demo_document()
    doc.pop("fuselage")
    doc["tail_cone"] = dict(TAIL_CONE)
    return doc


def with_body(doc: dict, body: dict | None) -> dict:
    """The design document with this fuselage, or with none and a tail cone instead."""
    doc.pop("fuselage", None)
    doc.pop("tail_cone", None)
    if body is None:
        doc["tail_cone"] = dict(TAIL_CONE)
    else:
        doc["fuselage"] = body
    return doc


def make_design(document: dict) -> design.Design:
    return design.from_mapping(document, source="test.yaml")


def trapezoid_document(
    area: str = "12 m^2",
    aspect_ratio: float = 8.0,
    taper_ratio: float = 0.5,
    sweep: str = "0 deg",
    sweep_at: float = 0.25,
) -> dict:
    """A plain trapezoidal wing with no incidence, twist or dihedral, plus the demo's tails
    (no fuselage, no model section: its deflections name the demo's control surfaces)."""
    doc = bodyless_document()
    doc.pop("model", None)
    wing = doc["wing"]
    wing.pop("panels")
    wing.update(
        area=area,
        aspect_ratio=aspect_ratio,
        taper_ratio=taper_ratio,
        sweep=sweep,
        sweep_at=sweep_at,
        dihedral="0 deg",
        incidence="0 deg",
        twist="0 deg",
    )
    return doc
