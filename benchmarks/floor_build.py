"""Floor for ``geomgen build``: the demo's solids with plain cadquery/OCP and no geomgen code.

It does the kernel work that ``geomgen build`` does for a design, and nothing else (no
self-checks, no volumes, no reports), so the time it takes is the least a build can cost:

  sections  NACA 4-digit sections with numpy on one cosine grid, blended between stations,
            trailing edge thickened to the minimum, placed on the chord lines of the report
  lofts     per surface side a ruled loft through the stations (upper + lower spline per
            section, the same parameter at the same grid point of every section)
  controls  per control surface: moving part = whole & ((aft half-space | nose cone) between
            the side planes less the side gaps); fixed part = whole - ((two half-spaces turned
            by +-range | cone grown by the hinge gap) between the side planes); deflection
  mirror    left sides as mirror images of the right sides
  step      one STEP assembly in mm with named, coloured parts
  stl       one binary STL per part, face deflection forced, tolerance = tessellation x the
            smallest chord over the part's span

Numbers come from the report.json that ``geomgen size`` writes (corner points, hinge points,
stations, apex) and from the design file for what the report lacks (section names, control
deflections, ranges and gaps, solids settings).

Run:  /work/venv/bin/python benchmarks/floor_build.py --report out/veyra-t2/report.json
"""

from __future__ import annotations

import argparse
import json
import math
import re
import sys
import tempfile
import time
from contextlib import contextmanager
from pathlib import Path

import numpy as np
import yaml

ROOT = Path(__file__).resolve().parent.parent
MM = 1000.0
PART = {"wing": "wing", "horizontal_tail": "stabilizer", "vertical_tail": "fin"}
COLOURS = {  # RGB 0-1 by kind of part; the same values as the tool's STEP output
    "wing": (0.82, 0.84, 0.86),
    "stabilizer": (0.78, 0.80, 0.84),
    "fin": (0.74, 0.77, 0.82),
    "aileron": (0.90, 0.40, 0.20),
    "flap": (0.20, 0.55, 0.85),
    "elevator": (0.95, 0.72, 0.10),
    "rudder": (0.30, 0.70, 0.35),
}
# values used when the design file leaves a setting out (the tool's defaults)
SOLIDS = {"te_thickness": "0.5 mm", "tessellation": 0.0005, "section_points": 61}
CONTROL = {
    "deflection": "0 deg",
    "deflection_range": "25 deg",
    "hinge_gap": "1 mm",
    "side_gap": "2 mm",
}
NOSE_RADIUS_FACTOR = 1.05  # nose radius over the local half-thickness at the hinge

TIMES: list[tuple[str, float]] = []


@contextmanager
def stage(label: str):
    t0 = time.perf_counter()
    yield
    TIMES.append((label, time.perf_counter() - t0))


_UNITS = {
    "": 1.0,
    "m": 1.0,
    "mm": 1e-3,
    "cm": 1e-2,
    "in": 0.0254,
    "ft": 0.3048,
    "deg": math.pi / 180,
    "rad": 1.0,
}


def si(value) -> float:
    """'10 deg' -> rad, '1 mm' -> m, 0.74 -> 0.74."""
    if isinstance(value, int | float):
        return float(value)
    m = re.fullmatch(r"\s*([-+0-9.eE]+)\s*([a-z]*)\s*", str(value))
    if not m or m.group(2) not in _UNITS:
        raise ValueError(f"cannot read the quantity {value!r}")
    return float(m.group(1)) * _UNITS[m.group(2)]


def v3(q: dict) -> np.ndarray:
    return np.array(q["value"], dtype=float)


def unit(v: np.ndarray) -> np.ndarray:
    return v / np.linalg.norm(v)


# --- sections (numpy) -------------------------------------------------------------------------


def naca4(name: str, n: int) -> tuple[np.ndarray, np.ndarray]:
    """Upper and lower (n, 2) points LE -> TE, unit chord, thickness laid normal to the mean
    line, on the cosine grid x = (1 - cos beta) / 2 (open trailing edge)."""
    code = re.fullmatch(r"naca\s*(\d{4})", name.strip().lower())
    if not code:
        raise ValueError(f"the floor knows NACA 4-digit sections only (got {name!r})")
    d = code.group(1)
    m, p, t = int(d[0]) / 100, int(d[1]) / 10, int(d[2:]) / 100
    x = 0.5 * (1.0 - np.cos(np.linspace(0.0, math.pi, n)))
    yt = 5 * t * (0.2969 * np.sqrt(x) - 0.1260 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1015 * x**4)
    if m > 0:
        fore = x < p
        yc = np.where(
            fore, m / p**2 * (2 * p * x - x**2), m / (1 - p) ** 2 * (1 - 2 * p + 2 * p * x - x**2)
        )
        dyc = np.where(fore, 2 * m / p**2 * (p - x), 2 * m / (1 - p) ** 2 * (p - x))
    else:
        yc = dyc = np.zeros_like(x)
    s, c = np.sin(np.arctan(dyc)), np.cos(np.arctan(dyc))
    return (np.column_stack([x - yt * s, yc + yt * c]), np.column_stack([x + yt * s, yc - yt * c]))


def thicken_te(sec, min_te: float, start: float = 0.5):
    """Trailing edge at least ``min_te`` chords thick: a smoothstep from x = start to the TE,
    half up, half down."""
    up, lo = sec[0].copy(), sec[1].copy()
    gap = up[-1] - lo[-1]
    if math.hypot(*gap) >= min_te:
        return up, lo
    extra = math.sqrt(max(min_te**2 - gap[0] ** 2, 0.0)) - gap[1]
    for arr, sign in ((up, 0.5), (lo, -0.5)):
        r = np.clip((arr[:, 0] - start) / (1 - start), 0.0, 1.0)
        arr[:, 1] += sign * extra * r * r * (3 - 2 * r)
    return up, lo


def mix(a, b, w: float):
    return (1 - w) * a[0] + w * b[0], (1 - w) * a[1] + w * b[1]


class Surface:
    """One surface side as the report lays it out (m, aircraft frame)."""

    def __init__(self, key: str, rep: dict, spec: dict, solids: dict, side: str) -> None:
        self.key, self.side, self.spec = key, side, spec
        self.fin = key == "vertical_tail"
        n = solids["section_points"]
        self.te = si(solids["te_thickness"])
        st = rep["stations"]
        self.s = np.array([x["span_position"]["value"] for x in st])
        self.chord = np.array([x["chord"]["value"] for x in st])
        self.semi = rep["semi_span"]["value"]
        self.apex = v3(rep["apex"])
        panels = rep["corners"][side]
        self.le = [v3(p["le_inner"]) for p in panels] + [v3(panels[-1]["le_outer"])]
        self.te_pts = [v3(p["te_inner"]) for p in panels] + [v3(panels[-1]["te_outer"])]
        # sections named at the root and tip, blended linearly in span fraction in between
        root = naca4(spec["root_airfoil"], n)
        tip = naca4(spec.get("tip_airfoil", spec["root_airfoil"]), n)
        self.base = [mix(root, tip, s / self.semi) for s in self.s]
        # the chord line's angle at each station (incidence + twist), linear within a panel
        j = 1 if self.fin else 2
        self.theta = np.array(
            [
                math.atan2(-(t - le)[j], (t - le)[0])
                for le, t in zip(self.le, self.te_pts, strict=True)
            ]
        )

    def at(self, s: float, values) -> float:
        return float(np.interp(s, self.s, values))

    def unit_section(self, s: float):
        """Unit-chord section at s: the physical sections of the panel's ends interpolated."""
        i = min(int(np.searchsorted(self.s, s, side="right")) - 1, len(self.s) - 2)
        t = (s - self.s[i]) / (self.s[i + 1] - self.s[i])
        chord = self.at(s, self.chord)
        sec = mix(self.base[i], self.base[i + 1], t * self.chord[i + 1] / chord)
        return thicken_te(sec, self.te / chord)

    def normal(self, d: np.ndarray) -> np.ndarray:
        """The section's 'up' direction for the unit chord direction d."""
        return np.array([-d[1], d[0], 0.0]) if self.fin else np.array([-d[2], 0.0, d[0]])

    def placed(self, i: int):
        """Section i in the aircraft frame, mm: LE + c (x d + y n) on the report's chord line."""
        le, te = self.le[i], self.te_pts[i]
        c = float(np.linalg.norm(te - le))
        d = (te - le) / c
        n = self.normal(d)
        up, lo = thicken_te(self.base[i], self.te / self.chord[i])
        return tuple((le + c * (a[:, :1] * d + a[:, 1:] * n)) * MM for a in (up, lo))

    def up_at(self, s: float) -> np.ndarray:
        th = self.at(s, self.theta)
        return np.array(
            [math.sin(th), math.cos(th), 0.0] if self.fin else [math.sin(th), 0.0, math.cos(th)]
        )

    def half_thickness(self, s: float, f: float) -> float:
        """Half the section's thickness at chord fraction f, mm (away from the nose)."""
        up, lo = self.unit_section(s)
        ku, kl = up[:, 0] > 0.1, lo[:, 0] > 0.1
        yu = np.interp(f, up[ku, 0], up[ku, 1])
        yl = np.interp(f, lo[kl, 0], lo[kl, 1])
        return 0.5 * (yu - yl) * self.at(s, self.chord) * MM


# --- kernel ----------------------------------------------------------------------------------


def wire(cq, up: np.ndarray, lo: np.ndarray):
    """Upper spline TE -> LE, lower spline LE -> TE, TE line; parameters fixed per grid point."""
    up = up[::-1]

    def vec(p) -> cq.Vector:
        return cq.Vector(*map(float, p))

    le_tan = vec(unit(lo[1] - up[-2]))
    params = list(np.linspace(0.0, 1.0, len(up)))
    pu, pl = [vec(p) for p in up], [vec(p) for p in lo]
    pl[0] = pu[-1]
    edges = [
        cq.Edge.makeSpline(
            pu, tangents=[vec(unit(up[1] - up[0])), le_tan], parameters=params, scale=False
        ),
        cq.Edge.makeSpline(
            pl, tangents=[le_tan, vec(unit(lo[-1] - lo[-2]))], parameters=params, scale=False
        ),
    ]
    if np.linalg.norm(lo[-1] - up[0]) > 1e-6:
        edges.append(cq.Edge.makeLine(pl[-1], pu[0]))
    return cq.Wire.assembleEdges(edges)


def half_space(cq, point, normal, axis, reach: float):
    """Box of 2R x R x 2R on the side of the plane (through point, containing axis) that
    normal points into."""
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt

    e1 = unit(axis)
    e2 = unit(normal - np.dot(normal, e1) * e1)
    e3 = np.cross(e1, e2)
    o = point - reach * e1 - reach * e3
    ax = gp_Ax2(gp_Pnt(*o), gp_Dir(*e3), gp_Dir(*e1))  # local x = e1, y = e3 x e1 = e2
    return cq.Solid(BRepPrimAPI_MakeBox(ax, 2 * reach, reach, 2 * reach).Shape())


def slab(cq, fin: bool, side: str, s0: float, s1: float, centre, reach: float):
    """Box between the side planes at s0 < s1 (mm), reaching R from centre elsewhere."""
    x, y, z = centre - reach
    if fin:
        return cq.Solid.makeBox(2 * reach, 2 * reach, s1 - s0, cq.Vector(x, y, s0))
    y0 = s0 if side == "right" else -s1
    return cq.Solid.makeBox(2 * reach, s1 - s0, 2 * reach, cq.Vector(x, y0, z))


def cone(cq, p0, p1, r0: float, r1: float):
    """Truncated cone about p0 -> p1, 20 % longer at both ends."""
    d = p1 - p0
    length = float(np.linalg.norm(d))
    ext = 0.2 * length
    k = (r1 - r0) / length
    start = p0 - unit(d) * ext
    return cq.Solid.makeCone(
        max(r0 - k * ext, 1e-3),
        max(r1 + k * ext, 1e-3),
        length + 2 * ext,
        cq.Vector(*start),
        cq.Vector(*unit(d)),
    )


def turned(v, axis, angle: float):
    k = unit(axis)
    return (
        v * math.cos(angle)
        + np.cross(k, v) * math.sin(angle)
        + k * np.dot(k, v) * (1 - math.cos(angle))
    )


def control_parts(cq, sf: Surface, whole, fixed, hl: dict, spec: dict):
    """(fixed part with this control's cove cut, moving part at its deflection)."""
    pts = hl["points"]
    p0, p1 = v3(pts[0]["point"]) * MM, v3(pts[-1]["point"]) * MM
    s_start, s_end = hl["span_start"]["value"], hl["span_end"]["value"]
    axis = p1 - p0
    e1 = unit(axis)
    up = sf.up_at(0.5 * (s_start + s_end))
    up = unit(up - np.dot(up, e1) * e1)
    aft = np.cross(e1, up)
    aft = -aft if aft[0] < 0 else aft
    gap, side_gap = si(spec["hinge_gap"]), si(spec["side_gap"])
    r0 = NOSE_RADIUS_FACTOR * sf.half_thickness(s_start, pts[0]["chord_fraction"]["value"])
    r1 = NOSE_RADIUS_FACTOR * sf.half_thickness(s_end, pts[-1]["chord_fraction"]["value"])
    offset = sf.apex[2] if sf.fin else 0.0
    s0, s1 = (s_start + offset) * MM, (s_end + offset) * MM
    reach = 2.0 * (sf.semi + sf.chord.max()) * MM
    rng = si(spec["deflection_range"])
    moving_region = slab(
        cq, sf.fin, sf.side, s0 + side_gap * MM, s1 - side_gap * MM, p0, reach
    ).intersect(half_space(cq, p0, aft, axis, reach).fuse(cone(cq, p0, p1, r0, r1)))
    cove = (
        half_space(cq, p0, turned(aft, e1, rng), axis, reach)
        .fuse(half_space(cq, p0, turned(aft, e1, -rng), axis, reach))
        .fuse(cone(cq, p0, p1, r0 + gap * MM, r1 + gap * MM))
    )
    cut_region = slab(cq, sf.fin, sf.side, s0, s1, p0, reach).intersect(cove)
    fixed = fixed.cut(cut_region)
    moving = whole.intersect(moving_region)
    angle = si(spec["deflection"])
    if angle:
        # positive = trailing edge down (a right-hand turn about the axis pointing right), for
        # the fin trailing edge left (a left-hand turn about the axis pointing up)
        k = 2 if sf.fin else 1
        a, b = (p0, p1) if p1[k] > p0[k] else (p1, p0)
        deg = -math.degrees(angle) if sf.fin else math.degrees(angle)
        moving = moving.rotate(cq.Vector(*a), cq.Vector(*b), deg)
    return fixed, moving


def write_stl(shape, path: Path, deflection: float, angle: float = 0.25) -> None:
    from OCP.BRepMesh import BRepMesh_IncrementalMesh
    from OCP.IMeshTools import IMeshTools_Parameters
    from OCP.StlAPI import StlAPI_Writer

    params = IMeshTools_Parameters()
    params.Deflection, params.Angle, params.Relative = deflection, angle, False
    params.InParallel, params.ForceFaceDeflection = True, True
    BRepMesh_IncrementalMesh(shape.wrapped, params)
    writer = StlAPI_Writer()
    writer.ASCIIMode = False
    if not writer.Write(shape.wrapped, str(path)):
        raise RuntimeError(f"could not write {path}")


# --- the run ----------------------------------------------------------------------------------


def sf_controls(rep: dict, sf: Surface):
    """Hinge lines of the control surfaces on this surface side, from the report."""
    lines = rep["surfaces"][sf.key]["hinge_lines"].values()
    return [hl for hl in lines if hl["side"] == sf.side]


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument(
        "--report",
        type=Path,
        default=ROOT / "out/veyra-t2/report.json",
        help="report.json written by 'geomgen size' (default: %(default)s)",
    )
    ap.add_argument(
        "--design",
        type=Path,
        default=ROOT / "examples/veyra-t2.yaml",
        help="the design file (default: %(default)s)",
    )
    ap.add_argument("--out", type=Path, default=None, help="output folder (default: a temp one)")
    args = ap.parse_args(argv)
    out = args.out or Path(tempfile.mkdtemp(prefix="floor_build_"))
    (out / "stl").mkdir(parents=True, exist_ok=True)
    t_start = time.perf_counter()

    with stage("import cadquery"):
        import cadquery as cq
    with stage("read inputs, sections (numpy)"):
        rep = json.loads(args.report.read_text(encoding="utf-8"))
        design = yaml.safe_load(args.design.read_text(encoding="utf-8"))
        solids = {**SOLIDS, **(design.get("solids") or {})}
        tess = si(solids["tessellation"])
        sides = []
        for key, srep in rep["surfaces"].items():
            spec = design[key]
            for side in ("right", "centre"):
                if side in srep["corners"]:
                    sf = Surface(key, srep, spec, solids, side)
                    sides.append((sf, [sf.placed(i) for i in range(len(sf.s))]))

    parts: list[tuple[str, str, object, float]] = []  # name, kind, shape (mm), STL tolerance
    for sf, secs in sides:
        base = PART[sf.key]
        with stage(f"loft {base}"):
            whole = cq.Solid.makeLoft([wire(cq, up, lo) for up, lo in secs], True)
        fixed, moving = whole, []
        with stage(f"controls {base}"):
            for hl in sf_controls(rep, sf):
                spec = {**CONTROL, **sf.spec["controls"][hl["kind"]]}
                fixed, m = control_parts(cq, sf, whole, fixed, hl, spec)
                lo, hi = hl["span_start"]["value"], hl["span_end"]["value"]
                chord = min(sf.at(lo, sf.chord), sf.at(hi, sf.chord))
                moving.append((hl["kind"], m, tess * chord * MM))
        mine = [(base, base, fixed, tess * sf.chord.min() * MM)]
        mine += [(kind, kind, m, tol) for kind, m, tol in moving]
        if sf.side == "centre":
            parts += mine
            continue
        parts += [(f"{n}-right", k, s, tol) for n, k, s, tol in mine]
        with stage(f"mirror {base}"):
            parts += [(f"{n}-left", k, s.mirror("XZ"), tol) for n, k, s, tol in mine]

    step = out / f"{rep['design']['name']}.step"
    with stage("STEP export"):
        assy = cq.Assembly(name=rep["design"]["name"])
        for name, kind, shape, _ in parts:
            assy.add(shape, name=name, color=cq.Color(*COLOURS[kind], 1.0))
        assy.export(str(step), exportType="STEP", unit="MM")
    with stage("STL export"):
        for name, _, shape, tol in parts:
            write_stl(shape, out / "stl" / f"{name}.stl", tol)
    total = time.perf_counter() - t_start

    width = max(len(k) for k, _ in TIMES)
    for label, dt in TIMES:
        print(f"{label:<{width}}  {dt:7.2f} s")
    print(f"floor: {len(parts)} parts in {out}")
    print(f"floor total {total:.2f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
