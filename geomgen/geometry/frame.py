"""Placing unit-chord section points on a surface in the aircraft frame (pure numpy).

Aircraft frame: x aft, y right (starboard), z up, origin at the user's datum, metres. The
lowest module of the geometry stage: layout, sections, the body-side queries and the junction
all place points through ``place``.
"""

from __future__ import annotations

import math

import numpy as np

from geomgen.sizing.aircraft import SurfaceSizing


def place(ss: SurfaceSizing, side: str, s: float, points: np.ndarray) -> np.ndarray:
    """Place section points given in unit-chord coordinates (x/c, y/c) at spanwise position s.

    The section is the one the ruled panel has at s (``Planform.section_frame``: its chord and
    its chord-weighted twist; the points are that section's unit-chord shape), first turned by
    that twist about its own ``twist_axis`` point, then the
    whole surface is turned rigidly by the incidence about a spanwise axis through the root's
    ``twist_axis`` point (so an untwisted surface stays a rigid body and straight lines on it,
    such as a common hinge, stay straight). Returns an (N, 3) array in the aircraft frame (m);
    ``side`` is right, left or centre (fin).
    """
    pts = np.asarray(points, dtype=float).reshape(-1, 2)
    pf = ss.planform
    x_le, chord_linear, rise, _ = pf.at(s)
    # the ruled panel's section: its own chord and twist (equal to the linear ones on a panel
    # of one twist), about the blended axis point
    chord, twist = pf.section_frame(s)
    ct, st = math.cos(twist), math.sin(twist)
    return _turned(ss, side, s, pts, (x_le, chord_linear, rise, chord, ct, st))


def _turned(ss: SurfaceSizing, side: str, s, pts: np.ndarray, frame) -> np.ndarray:
    """The arithmetic of ``place``, for one station (floats) or one per point (arrays):
    ``frame`` is (x_le, linear chord, rise, ruled chord, cos twist, sin twist)."""
    x_le, chord_linear, rise, chord, ct, st = frame
    pf, spec = ss.planform, ss.spec
    a = spec.twist_axis
    # twist about the section's own axis point (local frame: x aft from apex, n normal)
    u = (pts[:, 0] - a) * chord
    v = pts[:, 1] * chord
    x = x_le + a * chord_linear + u * ct + v * st
    n = rise - u * st + v * ct
    # incidence: rigid turn about the root's axis point (x = a c_root, n = 0), nose up positive
    x0 = a * pf.root_chord
    ci, si = math.cos(spec.incidence), math.sin(spec.incidence)
    xr = x0 + (x - x0) * ci + n * si
    nr = -(x - x0) * si + n * ci
    out = np.empty((len(pts), 3))
    out[:, 0] = ss.apex_x + xr
    if pf.symmetric:
        out[:, 1] = s if side == "right" else -s
        out[:, 2] = ss.apex_z + nr
    else:
        out[:, 1] = nr
        out[:, 2] = ss.apex_z + s
    return out


def place_each(ss: SurfaceSizing, side: str, s: np.ndarray, points: np.ndarray) -> np.ndarray:
    """``place`` of each point at its own station: point i (x/c, y/c) of ``points`` (N, 2) at
    s[i]. Returns (N, 3), m, equal to placing each point alone (the same operations in the same
    order; the per-station numbers come from the planform one station at a time)."""
    pts = np.asarray(points, dtype=float).reshape(-1, 2)
    s = np.asarray(s, dtype=float).reshape(-1)
    pf = ss.planform
    n_pts = len(pts)
    x_le = np.empty(n_pts)
    chord_linear = np.empty(n_pts)
    rise = np.empty(n_pts)
    chord = np.empty(n_pts)
    ct = np.empty(n_pts)
    st = np.empty(n_pts)
    for i, si in enumerate(s.tolist()):
        x_le[i], chord_linear[i], rise[i], _ = pf.at(si)
        chord[i], twist = pf.section_frame(si)
        ct[i], st[i] = math.cos(twist), math.sin(twist)
    return _turned(ss, side, s, pts, (x_le, chord_linear, rise, chord, ct, st))
