"""The tight-binding model of a crystal: basis, onsite energies, bonds, Bloch matrices.

:func:`build_model` turns a :class:`~valband.structure.Structure` and a parameter set into a
:class:`TBModel`. The parameter set is used only through this protocol:

``params.name``, ``params.version`` (str), ``params.orthogonal`` (bool);
``params.element(symbol)`` → record with ``.shells`` (subset of ("s", "p", "d") in that order),
``.onsite`` (dict shell → eV) and ``.valence_electrons``; ``params.cutoff(a, b)`` → Å;
``params.hopping(a, b, r)`` → (len(r), 14) eV for the directed pair a → b, columns in
:data:`~valband.tb.integrals.BOND_INTEGRALS`; ``params.overlap(a, b, r)`` → same or None.
Each of these raises :class:`~valband.errors.ParameterError` when data are missing.

Bloch phase convention (atomic gauge)
    H_ij(k) = Σ_R H_{i, j+R} exp(i k·(r_j + R − r_i)), with k Cartesian in 1/Å
    (``k_cart = k_frac @ structure.reciprocal_cell``). The phase carries the full bond vector,
    so H(k + G) = U H(k) U^† with a diagonal U of site phases, not H(k) itself; eigenvalues and
    site-diagonal weights are periodic in k. The orbitals are real, so H(−k) = H(k)*.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from numpy.typing import ArrayLike, NDArray

from valband.arrays import readonly
from valband.conventions import SHELL_L, SHELL_ORBITALS, SHELLS, OrbitalLabel
from valband.errors import InputError, ParameterError
from valband.structure import Structure, find_neighbours
from valband.tb.bloch import bloch_sum
from valband.tb.integrals import N_INTEGRALS, reverse_direction
from valband.tb.slater_koster import sk_blocks

__all__ = ["TBModel", "RealSpaceBlocks", "build_model", "canonical_half"]

#: Index of each orbital name inside the full 9×9 s, p, d block.
_ORBITAL_INDEX = {o: i for i, o in enumerate(o for sh in SHELLS for o in SHELL_ORBITALS[sh])}

#: Largest disagreement (relative to the largest integral of the pair) tolerated between
#: ``hopping(b, a, r)`` and the reversed ``hopping(a, b, r)``.
_RECIPROCITY_RTOL = 1e-9


def canonical_half(
    first: NDArray[np.int64], second: NDArray[np.int64], shifts: NDArray[np.int64]
) -> NDArray[np.bool_]:
    """Mask of the canonical half of a list of directed bonds i → j + R.

    A bond is kept when i < j, or when i = j and the first non-zero component of R is
    positive. Every bond or its reverse (j → i − R), never both, is kept.
    """
    first, second, shifts = np.asarray(first), np.asarray(second), np.asarray(shifts)
    nz = shifts != 0
    lead = np.argmax(nz, axis=1)  # index of the first non-zero component (0 if R = 0)
    lead_value = shifts[np.arange(len(shifts)), lead]
    return (first < second) | ((first == second) & (lead_value > 0))


@dataclass(frozen=True, eq=False)
class RealSpaceBlocks:
    """All directed bonds i → j + R of a model with their Hamiltonian and overlap blocks.

    Attributes
    ----------
    first, second : ndarray, shape (n_bonds,), int64
    shifts : ndarray, shape (n_bonds, 3), int64
        Lattice translation R of the image of j (lattice-vector units).
    vectors : ndarray, shape (n_bonds, 3), Å
        r_j + R − r_i.
    hamiltonian : tuple of ndarray, each (norb_i, norb_j), eV
        ⟨i α | H | j+R β⟩.
    overlap : tuple of ndarray or None
        ⟨i α | j+R β⟩; None for an orthogonal model.
    onsite : ndarray, shape (norb,), eV
        Diagonal onsite energies (the onsite overlap is the identity).
    """

    first: NDArray[np.int64]
    second: NDArray[np.int64]
    shifts: NDArray[np.int64]
    vectors: NDArray[np.float64]
    hamiltonian: tuple[NDArray[np.float64], ...]
    overlap: tuple[NDArray[np.float64], ...] | None
    onsite: NDArray[np.float64]


@dataclass(frozen=True, eq=False)
class TBModel:
    """A Slater–Koster tight-binding model of a periodic cell.

    Attributes
    ----------
    structure : Structure
        The cell the model describes.
    orbitals : tuple of OrbitalLabel, length norb
        The basis, site by site, each site's orbitals in the fixed order of
        :data:`valband.conventions.ORBITALS`.
    site_slices : tuple of slice, length n_sites
        Basis indices of each site.
    onsite : ndarray, shape (norb,), eV
        Onsite energies (absolute, as given by the parameter set).
    n_electrons : float
        Valence electrons per cell (both spins).
    orthogonal : bool
        True when the basis is orthonormal (S = 1).
    parameter_set, parameter_version : str
        Name and version of the parameter set, for provenance.
    bond_first, bond_second : ndarray, shape (n_half,), int64
        Sites of the stored bonds: the canonical half of all bonds (see :func:`canonical_half`);
        the other half is their reverse.
    bond_shifts : ndarray, shape (n_half, 3), int64
        Lattice translation R of the image of the second site.
    bond_vectors : ndarray, shape (n_half, 3), Å
        r_j + R − r_i.
    bond_hamiltonian : tuple of ndarray, each (norb_i, norb_j), eV
        Hopping block ⟨i α | H | j+R β⟩ of each stored bond, cut to the two sites' orbitals.
    bond_overlap : tuple of ndarray or None
        Overlap block of each stored bond, or None when orthogonal.
    parameter_caution : str or None
        The parameter set's caution (its optional ``caution`` key), for every output.
    """

    structure: Structure
    orbitals: tuple[OrbitalLabel, ...]
    site_slices: tuple[slice, ...]
    onsite: NDArray[np.float64]
    n_electrons: float
    orthogonal: bool
    parameter_set: str
    parameter_version: str
    bond_first: NDArray[np.int64]
    bond_second: NDArray[np.int64]
    bond_shifts: NDArray[np.int64]
    bond_vectors: NDArray[np.float64]
    bond_hamiltonian: tuple[NDArray[np.float64], ...]
    bond_overlap: tuple[NDArray[np.float64], ...] | None
    parameter_caution: str | None = None

    def __post_init__(self) -> None:
        norb = len(self.orbitals)
        n_sites = self.structure.n_sites
        set_ = object.__setattr__
        set_(self, "onsite", readonly(self.onsite, np.float64))
        for name in ("bond_first", "bond_second", "bond_shifts"):
            set_(self, name, readonly(getattr(self, name), np.int64))
        set_(self, "bond_vectors", readonly(self.bond_vectors, np.float64).reshape(-1, 3))
        set_(self, "bond_shifts", self.bond_shifts.reshape(-1, 3))
        if self.onsite.shape != (norb,):
            raise InputError(f"onsite energies must have shape ({norb},), got {self.onsite.shape}")
        if len(self.site_slices) != n_sites:
            raise InputError(f"{len(self.site_slices)} site slices for {n_sites} sites")
        nh = len(self.bond_first)
        if not (len(self.bond_second) == len(self.bond_shifts) == len(self.bond_vectors) == nh):
            raise InputError("bond arrays (first, second, shifts, vectors) differ in length")
        if not np.all(canonical_half(self.bond_first, self.bond_second, self.bond_shifts)):
            raise InputError(
                "stored bonds must be the canonical half (i < j, or i = j with the first "
                "non-zero component of R positive)"
            )
        if self.orthogonal != (self.bond_overlap is None):
            raise InputError("bond_overlap must be None exactly when the model is orthogonal")
        sizes = [sl.stop - sl.start for sl in self.site_slices]
        pairs = (("bond_hamiltonian", self.bond_hamiltonian), ("bond_overlap", self.bond_overlap))
        for what, blocks in pairs:
            if blocks is None:
                continue
            if len(blocks) != nh:
                raise InputError(f"{what}: {len(blocks)} blocks for {nh} bonds")
            frozen = []
            for b, blk in enumerate(blocks):
                blk = readonly(blk, np.float64)
                want = (sizes[self.bond_first[b]], sizes[self.bond_second[b]])
                if blk.shape != want:
                    raise InputError(f"{what}[{b}] has shape {blk.shape}, expected {want}")
                frozen.append(blk)
            set_(self, what, tuple(frozen))

    # ------------------------------------------------------------------ sizes
    @property
    def n_orbitals(self) -> int:
        """Basis size per cell."""
        return len(self.orbitals)

    @property
    def n_sites(self) -> int:
        """Number of sites in the cell."""
        return self.structure.n_sites

    @property
    def n_bonds(self) -> int:
        """Number of stored (canonical half) bonds."""
        return len(self.bond_first)

    def select(
        self, site: int | None = None, element: str | None = None, shell: str | None = None
    ) -> NDArray[np.int64]:
        """Basis indices of the orbitals matching all given filters (None = any)."""
        return np.array(
            [
                i
                for i, o in enumerate(self.orbitals)
                if (site is None or o.site == site)
                and (element is None or o.element == element)
                and (shell is None or o.shell == shell)
            ],
            dtype=np.int64,
        )

    # ------------------------------------------------------------------ flat element list
    @cached_property
    def _elements(self) -> tuple[NDArray, NDArray, NDArray, NDArray]:
        """rows, cols, bond index and values (n_matrices, n_elements) of the stored blocks."""
        starts = np.array([sl.start for sl in self.site_slices], dtype=np.int64)
        rows, cols, bond, hval, sval = [], [], [], [], []
        for b in range(self.n_bonds):
            h = self.bond_hamiltonian[b]
            ni, nj = h.shape
            r = starts[self.bond_first[b]] + np.arange(ni)
            c = starts[self.bond_second[b]] + np.arange(nj)
            rows.append(np.repeat(r, nj))
            cols.append(np.tile(c, ni))
            bond.append(np.full(ni * nj, b, dtype=np.int64))
            hval.append(h.ravel())
            if self.bond_overlap is not None:
                sval.append(self.bond_overlap[b].ravel())
        cat = lambda x, dt: np.concatenate(x).astype(dt) if x else np.zeros(0, dt)  # noqa: E731
        values = [cat(hval, np.float64)]
        if self.bond_overlap is not None:
            values.append(cat(sval, np.float64))
        return cat(rows, np.int64), cat(cols, np.int64), cat(bond, np.int64), np.stack(values)

    def _kcart(self, kpts: ArrayLike) -> NDArray[np.float64]:
        k = np.asarray(kpts, dtype=np.float64)
        if k.ndim != 2 or k.shape[1] != 3:
            raise InputError(
                f"k-points must be fractional coordinates of shape (nk, 3) (one k-point: (1, 3)), "
                f"got shape {k.shape}"
            )
        if not np.all(np.isfinite(k)):
            raise InputError("k-points contain NaN or infinite values")
        return k @ self.structure.reciprocal_cell

    def _assemble(self, kpts: ArrayLike, with_overlap: bool) -> NDArray[np.complex128]:
        rows, cols, bond, values = self._elements
        diag = [self.onsite]
        if with_overlap:
            diag.append(np.ones(self.n_orbitals))
        else:
            values = values[:1]
        kcart = self._kcart(kpts)
        return bloch_sum(kcart, self.bond_vectors, rows, cols, bond, values, np.stack(diag))

    # ------------------------------------------------------------------ Bloch matrices
    def hamiltonian(self, kpts: ArrayLike) -> NDArray[np.complex128]:
        """H(k) for a chunk of k-points.

        Parameters
        ----------
        kpts : array_like, shape (nk, 3)
            Fractional k-points (``k_cart = kpts @ structure.reciprocal_cell``).

        Returns
        -------
        ndarray, shape (nk, norb, norb), complex128, eV
            Hermitian by construction; atomic gauge (see the module docstring).
        """
        return self._assemble(kpts, with_overlap=False)[0]

    def overlap(self, kpts: ArrayLike) -> NDArray[np.complex128] | None:
        """S(k) for a chunk of fractional k-points, shape (nk, norb, norb); None if orthogonal."""
        if self.orthogonal:
            return None
        return self._assemble(kpts, with_overlap=True)[1]

    def hamiltonian_and_overlap(
        self, kpts: ArrayLike
    ) -> tuple[NDArray[np.complex128], NDArray[np.complex128] | None]:
        """``(H(k), S(k))`` for a chunk of fractional k-points; S is None if orthogonal.

        The phases are computed once for both matrices.
        """
        if self.orthogonal:
            return self.hamiltonian(kpts), None
        both = self._assemble(kpts, with_overlap=True)
        return both[0], both[1]

    # ------------------------------------------------------------------ real space
    def real_space_hamiltonian(self) -> RealSpaceBlocks:
        """All directed bonds (both directions) with their blocks, for moments and checks.

        The reverse of a stored bond i → j + R is j → i − R with the transposed block.
        """
        nh = self.n_bonds
        first = np.concatenate([self.bond_first, self.bond_second])
        second = np.concatenate([self.bond_second, self.bond_first])
        shifts = np.concatenate([self.bond_shifts, -self.bond_shifts])
        vectors = np.concatenate([self.bond_vectors, -self.bond_vectors])
        h = self.bond_hamiltonian + tuple(b.T for b in self.bond_hamiltonian)
        s = None
        if self.bond_overlap is not None:
            s = self.bond_overlap + tuple(b.T for b in self.bond_overlap)
        order = np.lexsort((np.linalg.norm(vectors, axis=1), first)) if 2 * nh else np.zeros(0, int)
        return RealSpaceBlocks(
            first=readonly(first[order], np.int64),
            second=readonly(second[order], np.int64),
            shifts=readonly(shifts[order].reshape(-1, 3), np.int64),
            vectors=readonly(vectors[order].reshape(-1, 3), np.float64),
            hamiltonian=tuple(h[i] for i in order),
            overlap=None if s is None else tuple(s[i] for i in order),
            onsite=self.onsite,
        )


# ---------------------------------------------------------------------- building
def _describe(params) -> str:
    name, version = getattr(params, "name", "?"), getattr(params, "version", "?")
    return f"parameter set {name!r} (version {version})"


def _element_record(params, symbol: str):
    """The element record, checked; ParameterError naming the element when unusable."""
    where = _describe(params)
    try:
        rec = params.element(symbol)
    except ParameterError as exc:
        raise ParameterError(f"{where}: no parameters for element {symbol!r}: {exc}") from exc
    shells = tuple(rec.shells)
    if not shells or any(s not in SHELLS for s in shells) or list(shells) != sorted(
        shells, key=SHELLS.index
    ) or len(set(shells)) != len(shells):
        raise ParameterError(
            f"{where}: element {symbol!r} has shells {shells}; accepted: a non-empty subset of "
            f"{SHELLS} in that order"
        )
    onsite = {}
    for sh in shells:
        try:
            e = float(rec.onsite[sh])
        except (KeyError, TypeError, ValueError):
            raise ParameterError(
                f"{where}: element {symbol!r} has no onsite energy (eV) for its {sh} shell; "
                f"onsite energies are needed for every shell in {shells}"
            ) from None
        if not math.isfinite(e):
            raise ParameterError(f"{where}: element {symbol!r}: onsite {sh} energy is {e}")
        onsite[sh] = e
    try:
        nval = float(rec.valence_electrons)
    except (TypeError, ValueError, AttributeError):
        raise ParameterError(f"{where}: element {symbol!r} has no valence electron count") from None
    capacity = 2 * sum(2 * SHELL_L[sh] + 1 for sh in shells)
    if not (0.0 <= nval <= capacity):
        raise ParameterError(
            f"{where}: element {symbol!r} has {nval} valence electrons; accepted: 0 to "
            f"{capacity} (two per orbital of the shells {shells})"
        )
    return shells, onsite, nval


def _cutoff_function(params, elements: tuple[str, ...]) -> Callable[[str, str], float]:
    where = _describe(params)
    table = {}
    for a in elements:
        for b in elements:
            try:
                rc = float(params.cutoff(a, b))
            except ParameterError as exc:
                raise ParameterError(f"{where}: no cutoff for the pair {a}–{b}: {exc}") from exc
            if not (math.isfinite(rc) and rc > 0):
                raise ParameterError(f"{where}: cutoff of the pair {a}–{b} is {rc} Å; need > 0")
            table[a, b] = rc
    for a, b in table:
        if abs(table[a, b] - table[b, a]) > 1e-9:
            raise ParameterError(
                f"{where}: cutoff({a}, {b}) = {table[a, b]} Å differs from cutoff({b}, {a}) = "
                f"{table[b, a]} Å; cutoffs must be symmetric"
            )
    return lambda a, b: table[a, b]


def _integrals(params, kind: str, a: str, b: str, r: NDArray[np.float64]) -> NDArray[np.float64]:
    """Call ``params.hopping`` or ``params.overlap`` and check the result."""
    where = _describe(params)
    fn = getattr(params, kind)
    try:
        v = fn(a, b, r)
    except ParameterError as exc:
        raise ParameterError(f"{where}: no {kind} integrals for the pair {a}→{b}: {exc}") from exc
    if v is None:
        raise ParameterError(
            f"{where}: {kind}({a!r}, {b!r}) returned None for a non-orthogonal parameter set"
        )
    v = np.asarray(v, dtype=np.float64)
    if v.shape != (len(r), N_INTEGRALS):
        raise ParameterError(
            f"{where}: {kind}({a!r}, {b!r}, r) returned shape {v.shape}; expected "
            f"({len(r)}, {N_INTEGRALS}) (one row per distance, columns in BOND_INTEGRALS order)"
        )
    if not np.all(np.isfinite(v)):
        raise ParameterError(f"{where}: {kind}({a!r}, {b!r}, r) has NaN or infinite values")
    return v


def _check_reciprocity(params, kind: str, a: str, b: str, r, v_ab) -> None:
    """``kind(b, a, r)`` must equal ``kind(a, b, r)`` with the shell letters swapped."""
    pick = np.unique(np.linspace(0, len(r) - 1, min(len(r), 8)).astype(int))
    v_ba = _integrals(params, kind, b, a, r[pick])
    want = reverse_direction(v_ab[pick])
    scale = max(1.0, float(np.max(np.abs(v_ab[pick]), initial=0.0)))
    bad = np.abs(v_ba - want) > _RECIPROCITY_RTOL * scale
    if np.any(bad):
        from valband.tb.integrals import BOND_INTEGRALS

        row, col = np.argwhere(bad)[0]
        name = BOND_INTEGRALS[col]
        rev = name[1] + name[0] + name[2]
        raise ParameterError(
            f"{_describe(params)}: {kind} integrals are not reciprocal at "
            f"r = {r[pick][row]:.4f} Å: {name}({b}→{a}) = {v_ba[row, col]:.6g} eV but "
            f"{rev}({a}→{b}) = {want[row, col]:.6g} eV; "
            "the two must be equal (the name lists the orbital on the first atom first)"
        )


def build_model(structure: Structure, params) -> TBModel:
    """Build the tight-binding model of a cell from a parameter set.

    Parameters
    ----------
    structure : Structure
        The periodic cell.
    params
        A parameter set following the protocol in the module docstring.

    Returns
    -------
    TBModel

    Raises
    ------
    ParameterError
        When an element or element pair of the structure lacks parameters (the message names
        it), or the parameter set returns malformed or non-reciprocal integrals. A site with no
        neighbour inside the cutoff is allowed (its orbitals keep their onsite energies).

    Notes
    -----
    Bonds come from :func:`~valband.structure.find_neighbours` with ``params.cutoff``; the
    canonical half is kept, grouped by directed element pair, and each group costs one call of
    ``params.hopping`` (and ``params.overlap``) plus one small reciprocity check, then one call
    of :func:`~valband.tb.slater_koster.sk_blocks`.
    """
    orthogonal = bool(params.orthogonal)
    records = {e: _element_record(params, e) for e in structure.elements}

    orbitals: list[OrbitalLabel] = []
    slices: list[slice] = []
    onsite: list[float] = []
    for i, sym in enumerate(structure.symbols):
        shells, eps, _ = records[sym]
        start = len(orbitals)
        for sh in shells:
            for o in SHELL_ORBITALS[sh]:
                orbitals.append(OrbitalLabel(site=i, element=sym, shell=sh, orbital=o))
                onsite.append(eps[sh])
        slices.append(slice(start, len(orbitals)))
    n_electrons = float(sum(records[s][2] for s in structure.symbols))
    local = {
        e: np.array(
            [_ORBITAL_INDEX[o] for sh in rec[0] for o in SHELL_ORBITALS[sh]], dtype=np.int64
        )
        for e, rec in records.items()
    }

    nt = find_neighbours(structure, _cutoff_function(params, structure.elements))
    keep = canonical_half(nt.first, nt.second, nt.shifts)
    first, second = nt.first[keep], nt.second[keep]
    shifts, vectors, dist = nt.shifts[keep], nt.vectors[keep], nt.distances[keep]
    nh = len(first)
    hblocks: list[NDArray | None] = [None] * nh
    sblocks: list[NDArray | None] = [None] * nh
    kind_of_site = np.array(
        [structure.elements.index(s) for s in structure.symbols], dtype=np.int64
    )
    pair_code = kind_of_site[first] * len(structure.elements) + kind_of_site[second]
    for code in np.unique(pair_code):
        idx = np.flatnonzero(pair_code == code)
        a = structure.elements[code // len(structure.elements)]
        b = structure.elements[code % len(structure.elements)]
        r = np.ascontiguousarray(dist[idx])
        dirs = vectors[idx] / r[:, None]
        kinds = ["hopping"] if orthogonal else ["hopping", "overlap"]
        for kind, store in zip(kinds, (hblocks, sblocks), strict=False):
            v = _integrals(params, kind, a, b, r)
            _check_reciprocity(params, kind, a, b, r, v)
            full = sk_blocks(dirs, v)
            cut = full[:, local[a]][:, :, local[b]]
            for n, ib in enumerate(idx):
                store[ib] = cut[n]

    return TBModel(
        structure=structure,
        orbitals=tuple(orbitals),
        site_slices=tuple(slices),
        onsite=np.array(onsite),
        n_electrons=n_electrons,
        orthogonal=orthogonal,
        parameter_set=str(params.name),
        parameter_version=str(params.version),
        bond_first=first,
        bond_second=second,
        bond_shifts=shifts,
        bond_vectors=vectors,
        bond_hamiltonian=tuple(hblocks),  # type: ignore[arg-type]
        bond_overlap=None if orthogonal else tuple(sblocks),  # type: ignore[arg-type]
        parameter_caution=getattr(params, "caution", None),
    )
