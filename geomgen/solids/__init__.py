"""Stage 5, solids: THE ONLY cadquery/OCP code. Lofts, control-surface cuts, the fuselage,
STEP and STL writers, meshes handed to the checks, the printed model's booleans.

May import: the floors below (errors, store, design, shapes, sizing, geometry)."""
