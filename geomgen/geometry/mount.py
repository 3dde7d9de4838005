"""The record of one surface mounted on the fuselage (data only, no computation).

It lives apart from ``junction`` (which computes it from a ``Layout``) so that ``layout`` can
hold it without importing the module that builds on ``layout``.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Junction:
    """One surface on the body (m, m^2). Areas of a symmetric surface are both halves."""

    key: str
    side_min: float  # least station of the body side along the root chord line
    side_max: float  # greatest
    skin_min: float  # least station where the root section's skin meets the body
    mount_s: float  # station of the solid's root section (inside the body)
    root_inside: bool  # the solid's root section lies wholly inside the body (a closed joint)
    reference_area: float  # the sized (theoretical) area
    exposed_area: float  # planform outboard of the body side
    exposed_wetted_area: float  # Raymer's estimate on the exposed area
    side_line: tuple[tuple[float, float], ...]  # (x, s) along the root chord, aircraft-frame x
