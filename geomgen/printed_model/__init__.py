"""Stage 6 beside the checks, the printed wind-tunnel model: its plan (scale, cuts, holes,
deflections, Reynolds numbers, numpy only) and its parts list and report.

May import: the floors below (errors, design, sizing, geometry, outputs for the caution)."""
