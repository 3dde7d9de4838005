"""Stage 6, self-checks: THE ONLY trimesh code, and every tolerance (``tolerances``).
Watertight meshes, volumes and areas against the sizing, junctions, STEP read-back, the printed
model's pieces and its 3MF.

Modules: ``common`` (the Check record, its pass rules, merged meshes), ``solid_checks`` (the
built solids), ``piece_checks`` (the printed model's pieces), ``threemf_io`` (3MF files and
their read-back check), ``tolerances``.

May import: the floors below, solids included (it measures the solids)."""
