"""Small constants shared by the declarations of several design-file sections.

Angles in the design are radians once read: ``DEG`` turns degrees into them. Chord fractions run
0 at the leading edge to 1 at the trailing edge.
"""

from __future__ import annotations

import math

from geomgen.design.fields import between

DEG = math.pi / 180.0

#: a chord fraction strictly inside the chord (0 and 1 excluded)
FRACTION = between(0.0, 1.0, lo_open=True, hi_open=True)
