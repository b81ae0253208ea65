"""Real-space sparse H and S of a (large) cell at Γ, assembled from the neighbour table.

At the Γ point of the cell the Bloch sum of :mod:`valband.tb.model` reduces to the real matrix

    H_ij(Γ) = ε_i δ_ij + Σ_R ⟨i | H | j + R⟩,        S_ij(Γ) = δ_ij + Σ_R ⟨i | j + R⟩,

the sum running over every image of j inside the cutoff. For a supercell of L₁×L₂×L₃
primitive cells, the eigenvalues of H(Γ) are those of the primitive cell on the Γ-centred
L₁×L₂×L₃ k-mesh, so a big cell at Γ is a k-mesh in disguise; this is the only k-point the KPM
of this package uses (see :mod:`valband.kpm`).

Assembly is vectorised: the canonical half of the bonds (:func:`valband.tb.model.canonical_half`)
is grouped by directed element pair, each group's integrals come from one call of
``params.hopping`` / ``params.overlap`` (with the same reciprocity check as
:func:`valband.tb.build_model`) and its 9×9 blocks from one call of the numba Slater–Koster
kernel :func:`valband.tb.sk_blocks` per chunk of bonds; the blocks are cut to the sites'
shells and scattered as COO triplets. With B the half-bond matrix, H = diag(ε) + B + Bᵀ, which
is symmetric to the last bit (a + b = b + a), as the dense path is Hermitian by construction.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np
import scipy.sparse as sp
from numpy.typing import NDArray

from valband.conventions import SHELL_ORBITALS, SHELLS, OrbitalLabel
from valband.errors import InputError
from valband.structure import Structure, find_neighbours
from valband.tb.model import (
    _ORBITAL_INDEX,
    _check_reciprocity,
    _cutoff_function,
    _element_record,
    _integrals,
    canonical_half,
)
from valband.tb.slater_koster import sk_blocks

__all__ = ["SparseModel", "build_sparse", "sparse_from_model"]

#: Bonds whose 9×9 blocks are made at once (bounds the temporary memory to ~ 0.2 GB).
_BOND_CHUNK = 100_000


@dataclass(frozen=True, eq=False)
class SparseModel:
    """Γ-point tight-binding matrices of a cell as scipy CSR matrices.

    Attributes
    ----------
    structure : Structure
    hamiltonian : scipy.sparse.csr_matrix, (norb, norb), eV
        H(Γ) on the model's absolute energy scale; symmetric.
    overlap : scipy.sparse.csr_matrix or None
        S(Γ) (unit diagonal); None for an orthogonal set.
    site_start : ndarray, (n_sites + 1,), int64
        Basis indices of site i are ``site_start[i]:site_start[i+1]``.
    orbital_site : ndarray, (norb,), int64
        Site of each basis orbital.
    orbital_shell : ndarray, (norb,), int64
        Index into :data:`valband.conventions.SHELLS` of each orbital.
    orbital_name : ndarray, (norb,), int64
        Index into :data:`valband.conventions.ORBITALS` of each orbital.
    n_electrons : float
        Valence electrons of the cell (both spins).
    parameter_set, parameter_version : str
    """

    structure: Structure
    hamiltonian: sp.csr_matrix
    overlap: sp.csr_matrix | None
    site_start: NDArray[np.int64]
    orbital_site: NDArray[np.int64]
    orbital_shell: NDArray[np.int64]
    orbital_name: NDArray[np.int64]
    n_electrons: float
    parameter_set: str
    parameter_version: str

    def __post_init__(self) -> None:
        n = len(self.orbital_site)
        for m, what in ((self.hamiltonian, "hamiltonian"), (self.overlap, "overlap")):
            if m is not None and m.shape != (n, n):
                raise InputError(f"SparseModel: {what} has shape {m.shape}, expected ({n}, {n})")
        for name in ("site_start", "orbital_site", "orbital_shell", "orbital_name"):
            getattr(self, name).setflags(write=False)

    @property
    def n_orbitals(self) -> int:
        """Basis size."""
        return len(self.orbital_site)

    @property
    def n_sites(self) -> int:
        """Sites in the cell."""
        return self.structure.n_sites

    @property
    def orthogonal(self) -> bool:
        """True when S = 1."""
        return self.overlap is None

    @cached_property
    def site_element(self) -> NDArray[np.int64]:
        """Index into ``structure.elements`` of each site."""
        els = self.structure.elements
        return np.array([els.index(s) for s in self.structure.symbols], dtype=np.int64)

    @property
    def orbitals(self) -> tuple[OrbitalLabel, ...]:
        """Explicit labels (built on demand: costly for very large cells)."""
        from valband.conventions import ORBITALS

        sym = self.structure.symbols
        return tuple(
            OrbitalLabel(int(s), sym[s], SHELLS[int(sh)], ORBITALS[int(o)])
            for s, sh, o in zip(self.orbital_site, self.orbital_shell, self.orbital_name,
                                strict=True)
        )


def _basis(structure: Structure, records: dict):
    """Per-orbital site, shell and orbital-name indices and onsite energies."""
    per_element = {}
    for e, (shells, eps, _) in records.items():
        names = [_ORBITAL_INDEX[o] for sh in shells for o in SHELL_ORBITALS[sh]]
        sh_idx = [SHELLS.index(sh) for sh in shells for _ in SHELL_ORBITALS[sh]]
        onsite = [eps[sh] for sh in shells for _ in SHELL_ORBITALS[sh]]
        per_element[e] = (np.array(names), np.array(sh_idx), np.array(onsite))
    kinds = structure.elements
    site_kind = np.array([kinds.index(s) for s in structure.symbols], dtype=np.int64)
    sizes = np.array([len(per_element[e][0]) for e in kinds], dtype=np.int64)[site_kind]
    start = np.zeros(structure.n_sites + 1, dtype=np.int64)
    np.cumsum(sizes, out=start[1:])
    orb_site = np.repeat(np.arange(structure.n_sites, dtype=np.int64), sizes)
    names = np.empty(start[-1], dtype=np.int64)
    shells = np.empty(start[-1], dtype=np.int64)
    onsite = np.empty(start[-1], dtype=np.float64)
    for k, e in enumerate(kinds):
        sites = np.flatnonzero(site_kind == k)
        nm, sh, eps = per_element[e]
        idx = (start[sites][:, None] + np.arange(len(nm))[None, :]).ravel()
        names[idx] = np.tile(nm, len(sites))
        shells[idx] = np.tile(sh, len(sites))
        onsite[idx] = np.tile(eps, len(sites))
    return start, orb_site, shells, names, onsite, site_kind


def build_sparse(structure: Structure, params) -> SparseModel:
    """H(Γ) and S(Γ) of a cell as CSR matrices, straight from the neighbour table.

    Parameters
    ----------
    structure : Structure
        The cell (for KPM usually a large supercell, slab or particle in a box).
    params
        A parameter set following the protocol of :mod:`valband.tb.model`.

    Returns
    -------
    SparseModel

    Raises
    ------
    ParameterError
        An element or pair lacks parameters (the message names it), as in
        :func:`valband.tb.build_model`.
    """
    orthogonal = bool(params.orthogonal)
    records = {e: _element_record(params, e) for e in structure.elements}
    start, orb_site, orb_shell, orb_name, onsite, site_kind = _basis(structure, records)
    norb = int(start[-1])
    local = {e: np.array([_ORBITAL_INDEX[o] for sh in rec[0] for o in SHELL_ORBITALS[sh]])
             for e, rec in records.items()}

    nt = find_neighbours(structure, _cutoff_function(params, structure.elements))
    keep = canonical_half(nt.first, nt.second, nt.shifts)
    first, second = nt.first[keep], nt.second[keep]
    vectors, dist = nt.vectors[keep], nt.distances[keep]
    n_el = len(structure.elements)
    pair_code = site_kind[first] * n_el + site_kind[second]
    kinds = ["hopping"] if orthogonal else ["hopping", "overlap"]
    coo = {k: ([], [], []) for k in kinds}
    idx_dtype = np.int32 if norb < 2**31 - 1 else np.int64
    for code in np.unique(pair_code):
        members = np.flatnonzero(pair_code == code)
        a, b = structure.elements[code // n_el], structure.elements[code % n_el]
        la, lb = local[a], local[b]
        for kind in kinds:
            r_all = np.ascontiguousarray(dist[members])
            v_all = _integrals(params, kind, a, b, r_all)
            _check_reciprocity(params, kind, a, b, r_all, v_all)
            rows_c, cols_c, vals_c = coo[kind]
            for c0 in range(0, len(members), _BOND_CHUNK):
                sel = members[c0:c0 + _BOND_CHUNK]
                r = dist[sel]
                blocks = sk_blocks(vectors[sel] / r[:, None], v_all[c0:c0 + _BOND_CHUNK])
                blocks = blocks[:, la][:, :, lb]
                rows = start[first[sel]][:, None, None] + np.arange(len(la))[None, :, None]
                cols = start[second[sel]][:, None, None] + np.arange(len(lb))[None, None, :]
                nz = blocks != 0.0
                rows_c.append(np.broadcast_to(rows, blocks.shape)[nz].astype(idx_dtype))
                cols_c.append(np.broadcast_to(cols, blocks.shape)[nz].astype(idx_dtype))
                vals_c.append(blocks[nz])

    def assemble(kind: str, diag: NDArray[np.float64]) -> sp.csr_matrix:
        rows, cols, vals = coo[kind]
        cat = (lambda x, dt: np.concatenate(x) if x else np.zeros(0, dt))  # noqa: E731
        half = sp.coo_matrix((cat(vals, np.float64), (cat(rows, idx_dtype), cat(cols, idx_dtype))),
                             shape=(norb, norb)).tocsr()
        full = (half + half.T + sp.diags(diag, format="csr")).tocsr()
        full.sum_duplicates()
        full.sort_indices()
        return full

    h = assemble("hopping", onsite)
    s = None if orthogonal else assemble("overlap", np.ones(norb))
    return SparseModel(
        structure=structure, hamiltonian=h, overlap=s, site_start=start, orbital_site=orb_site,
        orbital_shell=orb_shell, orbital_name=orb_name,
        n_electrons=float(sum(records[e][2] for e in structure.symbols)),
        parameter_set=str(params.name), parameter_version=str(params.version),
    )


def sparse_from_model(model) -> SparseModel:
    """Build the Γ-point CSR matrices of an existing :class:`~valband.tb.TBModel` (small cells).

    Loops over the model's bond blocks in Python: meant for moderate cells and for checking
    :func:`build_sparse` against the dense route.
    """
    from valband.conventions import ORBITALS

    norb = model.n_orbitals
    starts = np.array([sl.start for sl in model.site_slices] + [norb], dtype=np.int64)

    def half(blocks) -> sp.csr_matrix:
        rows, cols, vals = [], [], []
        for b, blk in enumerate(blocks):
            ni, nj = blk.shape
            r = starts[model.bond_first[b]] + np.arange(ni)
            c = starts[model.bond_second[b]] + np.arange(nj)
            rows.append(np.repeat(r, nj))
            cols.append(np.tile(c, ni))
            vals.append(blk.ravel())
        if not rows:
            return sp.csr_matrix((norb, norb))
        return sp.coo_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                             shape=(norb, norb)).tocsr()

    def full(blocks, diag) -> sp.csr_matrix:
        b = half(blocks)
        m = (b + b.T + sp.diags(diag, format="csr")).tocsr()
        m.sum_duplicates()
        m.sort_indices()
        return m

    h = full(model.bond_hamiltonian, np.asarray(model.onsite))
    s = None if model.orthogonal else full(model.bond_overlap, np.ones(norb))
    orbs = model.orbitals
    return SparseModel(
        structure=model.structure, hamiltonian=h, overlap=s, site_start=starts,
        orbital_site=np.array([o.site for o in orbs], dtype=np.int64),
        orbital_shell=np.array([SHELLS.index(o.shell) for o in orbs], dtype=np.int64),
        orbital_name=np.array([ORBITALS.index(o.orbital) for o in orbs], dtype=np.int64),
        n_electrons=float(model.n_electrons), parameter_set=model.parameter_set,
        parameter_version=model.parameter_version,
    )
