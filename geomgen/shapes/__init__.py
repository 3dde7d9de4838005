"""Stage 2, shapes the sizing needs: airfoil sections (NACA 4/5-digit, coordinate files,
blends) and the fuselage (stations, section shapes, exact areas, perimeters, integrals).

Pure numpy. May import: ``geomgen.errors``, ``geomgen.design``."""
