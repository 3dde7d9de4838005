"""Stage 3, the numbers of the re-sizing: the atmosphere (ISA), planforms (panels, MGC,
sweeps) and the sizing itself (lift equation, tail volume coefficients, tail arms).

Pure math. May import: ``geomgen.errors``, ``geomgen.design``, ``geomgen.shapes``."""
