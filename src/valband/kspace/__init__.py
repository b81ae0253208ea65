"""k-space sampling: Monkhorst–Pack and Γ-centred meshes, irreducible wedge, band paths."""

from valband.kspace.mesh import KMesh, make_mesh, parse_mesh
from valband.kspace.path import BandPathSpec, make_band_path

__all__ = ["KMesh", "make_mesh", "parse_mesh", "BandPathSpec", "make_band_path"]
