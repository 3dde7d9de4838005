"""Stage 4, the aircraft frame: corner points and hinge lines (``layout``), surfaces mounted
on the fuselage (``junction``, its record in ``mount``) and airfoil sections placed for lofting
(``sections``).

Pure numpy. May import: the floors below (errors, design, shapes, sizing)."""
