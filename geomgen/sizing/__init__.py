"""Stage 3, the numbers of the re-sizing: the atmosphere (ISA), planforms (panels, MGC,
sweeps), the sizing itself (lift equation, tail volume coefficients, tail arms) and the
static-stability estimate (neutral point, static margins).

Pure math. May import: ``geomgen.errors``, ``geomgen.design``, ``geomgen.shapes``."""
