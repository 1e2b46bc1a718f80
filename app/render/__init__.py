"""Results to pyvista objects: face meshes with colours or stripes, combs, markers, seam lines (no Qt)."""
