"""compute_bands: eigenvalues and orbital character along a path through the special points."""

from __future__ import annotations

from valband.kspace import make_band_path
from valband.results import BandsResult
from valband.results.channels import channel_matrix
from valband.solve import diagonalise
from valband.workflows.provenance import provenance_of

__all__ = ["compute_bands"]


def compute_bands(
    model, path: str | None = None, npoints: int = 300, fermi_level: float = 0.0,
    resolve: str = "l", progress: bool = False,
) -> BandsResult:
    """Bands along ``path`` (ASE special-point letters; None for the lattice's default path).

    ``fermi_level`` (eV, absolute) sets the energy zero; pass the value from a DOS run so the
    bands and the DOS share one reference.
    """
    bp = make_band_path(model.structure, path, npoints)
    chans, cmat = channel_matrix(model.orbitals, resolve)
    eig, w = diagonalise(model, bp.kpoints, cmat, progress=progress)
    return BandsResult(
        kpoints=bp.kpoints,
        distance=bp.distance,
        energies=eig - fermi_level,
        character=w,
        channel_labels=chans,
        label_positions=bp.label_positions,
        labels=bp.labels,
        fermi_level=float(fermi_level),
        settings={"path": bp.path, "npoints": len(bp.kpoints), "resolve": resolve},
        provenance=provenance_of(model),
    )
