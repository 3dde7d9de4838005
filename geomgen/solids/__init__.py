"""Stage 5, solids: THE ONLY cadquery/OCP code. Lofts, control-surface cuts, the fuselage,
STEP and STL writers, meshes handed to the checks, the printed model's booleans.

Modules, lowest first: ``kernel`` (validity checks, remembered volumes and areas, vectors),
``records`` (Part, SideBuild, ControlBuild, Build), ``loft`` (section wires, ruled lofts),
``body`` (the fuselage solid), ``controls`` (control-surface regions, cuts, deflection, one
surface side), ``assembly`` (the build of every part, its cache, mirroring), ``step`` (STEP
export and read-back), ``meshing`` (meshes, STL files, face queries), ``printed`` (the printed
model's booleans).

May import: the floors below (errors, store, design, shapes, sizing, geometry)."""
