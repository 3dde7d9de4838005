"""Stage 5 beside the solids, every file a user opens that is not a solid: report.json/md,
the three-view, the shop DXFs, the 1:1 section and former templates (PDF), report.html.

No CAD or mesh library. May import: the floors below (errors, store, design, shapes, sizing,
geometry)."""
