"""compute_dos: mesh → irreducible wedge → H(k) → eigenpairs → Fermi level → total and partial DOS.

Symmetry and projections. The irreducible wedge samples each star of k once, so a channel of one
site is not the full-zone value there; summed over a site's symmetry orbit it is. Shell-resolved
(``resolve="l"``) channels are therefore averaged over each orbit of equivalent sites, which is
exact. Orbital-resolved (``resolve="m"``) channels are not invariant under the point group
(rotations mix d_xy with d_yz …), so they are computed on the full mesh.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Literal

import numpy as np

from valband.conventions import SPIN_DEGENERACY
from valband.dos import (
    find_fermi_level,
    smearing_count,
    smearing_dos,
    tetrahedron_classes,
    tetrahedron_count,
    tetrahedron_dos,
)
from valband.errors import SettingsError
from valband.kspace import make_mesh
from valband.kspace.symmetry import equivalent_sites
from valband.results import DOSResult
from valband.results.channels import channel_matrix
from valband.solve import diagonalise
from valband.workflows.provenance import provenance_of

__all__ = ["DOSSettings", "compute_dos"]

Method = Literal["gaussian", "lorentzian", "tetrahedron"]


@dataclass(frozen=True)
class DOSSettings:
    """Settings of a DOS calculation (all recorded in the result).

    mesh : points per reciprocal lattice vector, e.g. 24 or (24, 24, 12)
    mesh_kind : "monkhorst-pack" or "gamma"
    method : "gaussian", "lorentzian" (smearing) or "tetrahedron" (linear, Blöchl-corrected count)
    width : smearing width in eV (Gaussian σ, Lorentzian HWHM); ignored by the tetrahedron method
    step : energy grid spacing in eV
    emin, emax : grid limits relative to E_F in eV (None: 1 eV beyond the bands)
    resolve : "l" (site × shell channels) or "m" (site × orbital; full mesh)
    symmetry : reduce the mesh with the crystal's symmetry
    n_electrons : valence electrons per cell (None: from the parameter set)
    """

    mesh: int | tuple[int, int, int] | str = 24
    mesh_kind: Literal["monkhorst-pack", "gamma"] = "monkhorst-pack"
    method: Method = "gaussian"
    width: float = 0.1
    step: float = 0.01
    emin: float | None = None
    emax: float | None = None
    resolve: Literal["l", "m"] = "l"
    symmetry: bool = True
    n_electrons: float | None = None

    def validate(self) -> None:
        """Raise :class:`SettingsError` naming the first invalid setting."""
        if self.method not in ("gaussian", "lorentzian", "tetrahedron"):
            raise SettingsError(
                f"DOS method {self.method!r}: accepted 'gaussian', 'lorentzian', 'tetrahedron'"
            )
        if self.method != "tetrahedron" and not (np.isfinite(self.width) and self.width > 0):
            raise SettingsError(f"smearing width {self.width} eV: must be a positive number of eV")
        if not (np.isfinite(self.step) and 0 < self.step <= 1.0):
            raise SettingsError(f"energy step {self.step} eV: must be in (0, 1] eV")
        if self.resolve not in ("l", "m"):
            raise SettingsError(f"resolve {self.resolve!r}: accepted 'l' (shells) or 'm' (orbitals)")
        if self.emin is not None and self.emax is not None and not self.emin < self.emax:
            raise SettingsError(f"energy range [{self.emin}, {self.emax}] eV: emin must be below emax")


def _orbit_average(weights: np.ndarray, chans, structure) -> np.ndarray:
    """Average shell channels over each orbit of symmetry-equivalent sites (in place safe)."""
    rep = equivalent_sites(structure)
    groups: dict[tuple[int, str], list[int]] = {}
    for i, c in enumerate(chans):
        groups.setdefault((int(rep[c.site]), c.shell), []).append(i)
    avg = np.zeros((len(chans), len(chans)))
    for members in groups.values():
        for a in members:
            avg[a, members] = 1.0 / len(members)
    if np.allclose(avg, np.eye(len(chans))):
        return weights
    return weights @ avg.T


def _narrow_bracket(count, eig, k_weights, n_el, half_width, lower, upper,
                    degeneracy=SPIN_DEGENERACY):
    """A tight Fermi-level bracket around the step-function estimate, if it brackets.

    The T = 0 count of the unsmeared states puts E_F within a few smearing widths of the
    state where the cumulative occupation reaches ``n_el``; a narrow bracket saves most of
    the root finder's count evaluations. Falls back to (lower, upper) when it does not hold.
    """
    flat = eig.ravel()
    order = np.argsort(flat)
    occ = np.cumsum(np.repeat(degeneracy * k_weights, eig.shape[1])[order])
    e0 = flat[order[min(int(np.searchsorted(occ, n_el)), flat.size - 1)]]
    a, b = max(lower, e0 - half_width), min(upper, e0 + half_width)
    if a < b and count(a) <= n_el <= count(b):
        return a, b
    return lower, upper


def compute_dos(model, settings: DOSSettings | None = None, progress: bool = False) -> DOSResult:
    """Total and partial DOS of a tight-binding model on a k-mesh.

    Parameters
    ----------
    model : valband.tb.TBModel
    settings : DOSSettings (defaults: 24³ Monkhorst–Pack mesh, Gaussian σ = 0.1 eV, 0.01 eV grid)
    progress : show a progress bar on a terminal

    Returns
    -------
    DOSResult with energies relative to E_F, states / eV / cell including both spins.
    """
    s = settings or DOSSettings()
    s.validate()
    structure = model.structure
    # Spin models (valband.spin) hold one electron per state and may restrict the symmetry
    # that reduces the mesh (a magnetic pattern, or none with magnetism and spin–orbit).
    degeneracy = getattr(model, "spin_degeneracy", SPIN_DEGENERACY)
    cell = getattr(model, "symmetry_cell", structure)
    symmetry = s.symmetry and s.resolve == "l" and cell is not None
    kmesh = make_mesh(structure if cell is None else cell, s.mesh, kind=s.mesh_kind,
                      symmetry=symmetry)
    chans, cmat = channel_matrix(model.orbitals, s.resolve)
    eig, w = diagonalise(model, kmesh.kpoints, cmat, progress=progress)
    if kmesh.symmetry:
        w = _orbit_average(w, chans, cell)

    n_el = model.n_electrons if s.n_electrons is None else float(s.n_electrons)
    n_bands = eig.shape[1]
    max_el = degeneracy * n_bands
    lo, hi = float(eig.min()), float(eig.max())
    if s.method == "tetrahedron":
        rc = structure.reciprocal_cell
        classes = tetrahedron_classes(kmesh.mesh, rc, kmesh.ir_map, kmesh.n_irreducible)

        def count(e: float) -> float:
            return tetrahedron_count(kmesh.mesh, rc, kmesh.ir_map, eig, e,
                                     degeneracy=degeneracy, classes=classes)

        margin = 1e-6
    else:
        def count(e: float) -> float:
            return smearing_count(eig, kmesh.weights, e, s.width, s.method,
                                  degeneracy=degeneracy)

        margin = 50.0 * s.width if s.method == "gaussian" else 1e4 * s.width
    lower, upper = lo - margin, hi + margin
    if s.method == "gaussian" and 0 <= n_el <= max_el:
        lower, upper = _narrow_bracket(count, eig, kmesh.weights, n_el, 12.0 * s.width, lower,
                                       upper, degeneracy)
    e_f = find_fermi_level(count, n_el, lower, upper, max_electrons=max_el, tol=1e-8)

    pad = 1.0 + (0.0 if s.method == "tetrahedron" else 5.0 * s.width)
    emin = s.emin if s.emin is not None else np.floor(lo - e_f - pad)
    emax = s.emax if s.emax is not None else np.ceil(hi - e_f + pad)
    n_e = int(round((emax - emin) / s.step)) + 1
    if n_e > 2_000_000:
        raise SettingsError(f"energy grid of {n_e} points: increase the step or narrow the range")
    grid = emin + s.step * np.arange(n_e)
    if s.method == "tetrahedron":
        total, chan = tetrahedron_dos(
            kmesh.mesh, structure.reciprocal_cell, kmesh.ir_map, eig, grid + e_f, w,
            degeneracy=degeneracy, classes=classes,
        )
    else:
        total, chan = smearing_dos(
            eig, kmesh.weights, grid + e_f, s.width, s.method, w, degeneracy=degeneracy
        )
    recorded = asdict(s)
    recorded.update(mesh=kmesh.to_dict(), n_electrons=n_el, energy_range_eV=[float(grid[0]), float(grid[-1])])
    recorded["band_range_eV"] = [lo - e_f, hi - e_f]
    if s.method == "tetrahedron":
        recorded["width"] = None
        recorded["count"] = "linear tetrahedra with Blöchl's correction"
    return DOSResult(
        energies=grid,
        total=total,
        channels=chan,
        channel_labels=chans,
        fermi_level=float(e_f),
        n_electrons=n_el,
        n_sites=structure.n_sites,
        settings=recorded,
        provenance=provenance_of(model),
    )
