"""Stage 6, self-checks: THE ONLY trimesh code, and every tolerance (``tolerances``).
Watertight meshes, volumes and areas against the sizing, junctions, STEP read-back, the printed
model's pieces and its 3MF.

May import: the floors below, solids included (it measures the solids)."""
