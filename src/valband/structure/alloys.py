"""Substitutional alloys: random decorations of a parent lattice and ordered intermetallics.

Random alloys
    :func:`random_alloy` decorates the sites of a parent cell (or of one of its sublattices),
    repeated into a supercell, at a composition rounded to whole site counts (largest-remainder
    rounding, so every count is within one site of n·x), with a ``numpy`` Generator seeded by
    ``seed``; the same seed gives the same structure. :func:`random_configurations` yields
    independent configurations whose seeds are derived from one master seed
    (``numpy.random.SeedSequence``) and reported with each one.

Ordered intermetallics (Strukturbericht names)
    :func:`l12` A₃B (Cu₃Au type, 4-site cubic cell), :func:`l10` AB (CuAu type, 2-site
    primitive tetragonal cell, with c/a), :func:`b2` AB (CsCl type, 2-site cubic cell).

Default lattice constants
    :func:`vegard_lattice_constant`: Vegard's law (the alloy lattice constant is the
    composition-weighted mean of the components'; L. Vegard, Z. Phys. 5, 17 (1921)) applied to
    each element's lattice constant *on the target lattice*. That constant is ASE's reference
    value (``ase.data.reference_states``) when the element's reference state is that lattice,
    otherwise the lattice constant with the same atomic volume as its reference state
    (fcc a³/4, bcc a³/2, sc a³, diamond a³/8, hcp √3a²c/4 per atom; hcp targets take the ideal
    c/a = √(8/3)). Vegard's law is an approximation: measured alloy constants deviate from it
    by up to a few per cent (common practice); give ``a`` when it is known.
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction

import numpy as np
from numpy.typing import NDArray

from valband.errors import StructureError
from valband.structure.record import Structure

__all__ = [
    "ALLOY_LATTICES",
    "AlloyConfiguration",
    "b2",
    "compact_supercell_matrix",
    "derive_seeds",
    "format_composition",
    "l10",
    "l12",
    "make_supercell",
    "normalise_composition",
    "random_alloy",
    "random_configurations",
    "reference_lattice_constant",
    "site_counts",
    "supercell_matrix",
    "vegard_lattice_constant",
]

#: Target lattices of :func:`reference_lattice_constant` / :func:`vegard_lattice_constant`.
ALLOY_LATTICES = ("fcc", "bcc", "hcp", "sc")

#: Ideal hcp axial ratio √(8/3) (close packing of hard spheres; textbook).
IDEAL_C_OVER_A = math.sqrt(8.0 / 3.0)

#: Fractions may miss 1 by this much (rounded user input such as 0.333 + 0.333 + 0.334)
#: before they are rejected; accepted fractions are then rescaled to sum to 1.
COMPOSITION_SUM_TOL = 1e-3

# Atomic volume per atom (Å³) of each reference lattice as a function of a (and c/a).
_VOLUME_PER_ATOM = {
    "fcc": lambda a, ca: a**3 / 4.0,
    "bcc": lambda a, ca: a**3 / 2.0,
    "sc": lambda a, ca: a**3,
    "diamond": lambda a, ca: a**3 / 8.0,
    "hcp": lambda a, ca: math.sqrt(3.0) / 4.0 * a**3 * ca,
}


# --------------------------------------------------------------------------------------------
# compositions
# --------------------------------------------------------------------------------------------
def normalise_composition(composition: Mapping[str, float],
                          keep_zeros: bool = False) -> dict[str, float]:
    """Validate ``{element: fraction}`` and return it rescaled to sum exactly to 1.

    Elements with fraction 0 are dropped unless ``keep_zeros``. Raises :class:`StructureError`
    for unknown elements, negative or non-finite fractions, no positive fraction, or fractions
    that do not sum to 1 (within :data:`COMPOSITION_SUM_TOL`).
    """
    from ase.data import atomic_numbers

    if not isinstance(composition, Mapping) or not composition:
        raise StructureError(
            f"composition {composition!r}: give a mapping of element to atomic fraction, "
            "e.g. {'Cu': 0.75, 'Pd': 0.25}"
        )
    out: dict[str, float] = {}
    for el, x in composition.items():
        if el not in atomic_numbers or el == "X":
            raise StructureError(
                f"composition {dict(composition)}: unknown element {el!r}; "
                "use chemical symbols such as 'Cu' or 'Pd'"
            )
        try:
            xf = float(x)
        except (TypeError, ValueError):
            raise StructureError(
                f"composition {dict(composition)}: fraction of {el} ({x!r}) is not a number"
            ) from None
        if not math.isfinite(xf) or xf < 0:
            raise StructureError(
                f"composition {dict(composition)}: fraction of {el} is {x!r}; "
                "fractions must be finite and ≥ 0"
            )
        if xf > 0 or keep_zeros:
            out[el] = xf
    total = sum(out.values())
    if not total > 0 or abs(total - 1.0) > COMPOSITION_SUM_TOL:
        raise StructureError(
            f"composition {dict(composition)}: fractions sum to {total:g}; they must sum to 1 "
            f"(within {COMPOSITION_SUM_TOL:g})"
        )
    return {el: x / total for el, x in out.items()}


def format_composition(composition: Mapping[str, float]) -> str:
    """``{'Cu': 0.75, 'Pd': 0.25}`` → ``'Cu0.75Pd0.25'``."""
    return "".join(f"{el}{x:.6g}" for el, x in composition.items())


def _smallest_site_count(composition: Mapping[str, float]) -> int:
    """Least number of sites on which every fraction is a whole count (denominators ≤ 1000)."""
    dens = [Fraction(x).limit_denominator(1000).denominator for x in composition.values()]
    return math.lcm(*dens)


def site_counts(
    composition: Mapping[str, float], n_sites: int, *, exact: bool = False
) -> dict[str, int]:
    """Whole site counts for a composition on ``n_sites`` sites.

    Largest-remainder rounding (floors first, remaining sites to the largest fractional
    parts, ties in composition order): every count is within one site of ``n_sites·x``
    and the counts sum to ``n_sites``.

    Raises
    ------
    StructureError
        If an element of the composition would get no site at all (the composition cannot be
        realised to within one site), or, with ``exact=True``, if any ``n_sites·x`` is not a
        whole number. The message gives the smallest site count that works.
    """
    comp = normalise_composition(composition)
    n = int(n_sites)
    if n < 1:
        raise StructureError(f"need at least one site to decorate, got {n_sites}")
    ideal = {el: n * x for el, x in comp.items()}
    counts = {el: int(math.floor(v + 1e-9)) for el, v in ideal.items()}
    rest = n - sum(counts.values())
    order = sorted(comp, key=lambda el: -(ideal[el] - counts[el]))  # stable: ties keep order
    for el in order[:rest]:
        counts[el] += 1
    need = _smallest_site_count(comp)
    ideal_txt = ", ".join(f"{el} {v:.4g}" for el, v in ideal.items())
    if exact and any(abs(ideal[el] - counts[el]) > 1e-6 for el in comp):
        raise StructureError(
            f"composition {format_composition(comp)} is not exact on {n} sites (n·x = "
            f"{ideal_txt}); use a multiple of {need} sites, or allow rounding (exact=False)"
        )
    empty = [el for el in comp if counts[el] == 0]
    if empty:
        raise StructureError(
            f"composition {format_composition(comp)} cannot be realised on {n} sites to within "
            f"one site: {', '.join(empty)} would get no site (n·x = {ideal_txt}); use a larger "
            f"supercell (a multiple of {need} sites is exact)"
        )
    return counts


def derive_seeds(seed: int, n: int) -> list[int]:
    """``n`` independent 32-bit seeds derived from one master seed (``numpy.random.SeedSequence``).

    Deterministic: the same ``(seed, n)`` always gives the same list, and the first ``m``
    seeds do not depend on ``n``.
    """
    seed = _check_seed(seed)
    if int(n) < 1:
        raise StructureError(f"number of configurations must be ≥ 1, got {n}")
    children = np.random.SeedSequence(seed).spawn(int(n))
    return [int(c.generate_state(1, dtype=np.uint32)[0]) for c in children]


def _check_seed(seed) -> int:
    if isinstance(seed, bool) or not isinstance(seed, int | np.integer) or int(seed) < 0:
        raise StructureError(
            f"seed must be a non-negative integer (it is recorded in the output), got {seed!r}"
        )
    return int(seed)


# --------------------------------------------------------------------------------------------
# supercells
# --------------------------------------------------------------------------------------------
def supercell_matrix(supercell) -> NDArray[np.int64]:
    """Integer 3×3 supercell matrix P (new cell = P @ cell) from an int, a 3-tuple or P itself."""
    arr = np.asarray(supercell)
    try:
        if arr.ndim == 0:
            mat = np.eye(3, dtype=np.int64) * int(arr)
            ok = float(arr) == int(arr)
        elif arr.shape == (3,):
            mat = np.diag(arr.astype(np.int64))
            ok = np.all(arr == mat.diagonal())
        elif arr.shape == (3, 3):
            mat = arr.astype(np.int64)
            ok = np.all(arr == mat)
        else:
            ok = False
    except (TypeError, ValueError):
        ok = False
    if not ok or round(np.linalg.det(mat)) < 1:
        raise StructureError(
            f"supercell {supercell!r}: accepted are a positive integer n (n×n×n), three positive "
            "integers (n1, n2, n3), or an integer 3×3 matrix with positive determinant"
        )
    if arr.ndim <= 1 and np.any(mat.diagonal() < 1):
        raise StructureError(f"supercell {supercell!r}: repeat factors must be ≥ 1")
    return mat


def make_supercell(parent: Structure, supercell) -> Structure:
    """Repeat the parent by ``supercell`` (see :func:`supercell_matrix`); labels renumbered."""
    mat = supercell_matrix(supercell)
    if np.count_nonzero(mat - np.diag(mat.diagonal())) == 0:
        big = parent.repeat(tuple(int(x) for x in mat.diagonal()))
    else:
        from ase.build import make_supercell as ase_make_supercell

        atoms = ase_make_supercell(parent.to_atoms(), mat)
        big = Structure.from_atoms(atoms, source=f"{parent.source} supercell {mat.tolist()}")
    return big


def _hnf_matrices(det: int) -> NDArray[np.int64]:
    """All Hermite normal forms of determinant ``det`` for row bases, shape (m, 3, 3).

    H = [[a, 0, 0], [b, c, 0], [d, e, f]] with a·c·f = det, 0 ≤ b, d < a and 0 ≤ e < c (adding
    whole rows of H to later rows reduces each entry modulo the pivot of its column): one
    matrix per sublattice of index ``det``.
    """
    out = []
    for a in range(1, det + 1):
        if det % a:
            continue
        for c in range(1, det // a + 1):
            if (det // a) % c:
                continue
            f = det // (a * c)
            b, d, e = np.meshgrid(np.arange(a), np.arange(a), np.arange(c), indexing="ij")
            m = np.zeros((b.size, 3, 3), dtype=np.int64)
            m[:, 0, 0] = a
            m[:, 1, 0], m[:, 1, 1] = b.ravel(), c
            m[:, 2, 0], m[:, 2, 1], m[:, 2, 2] = d.ravel(), e.ravel(), f
            out.append(m)
    return np.concatenate(out)


def compact_supercell_matrix(parent: Structure, n_sites: int) -> NDArray[np.int64]:
    """Find the ``n_sites``-site supercell matrix whose shortest lattice vector is longest.

    All Hermite normal forms of index ``n_sites / parent.n_sites`` are scored by the shortest
    nonzero superlattice vector (found among parent lattice vectors shorter than the Hermite
    bound 2^(1/6)·V^(1/3), so the search is exhaustive); ties go to the first in enumeration
    order (deterministic). The winner is Minkowski-reduced (``ase.geometry.minkowski_reduce``).
    Such compact cells keep periodic images of a site far apart, which is what a random or
    quasirandom supercell needs (common practice).
    """
    from ase.geometry import minkowski_reduce

    n = int(n_sites)
    if n < parent.n_sites or n % parent.n_sites:
        raise StructureError(
            f"{n_sites} sites: a supercell of {parent.source or 'the parent'} "
            f"({parent.n_sites} sites) needs a positive multiple of {parent.n_sites} sites"
        )
    det = n // parent.n_sites
    cands = _hnf_matrices(det)
    cell = parent.cell
    radius = 2.0 ** (1.0 / 6.0) * (det * parent.volume) ** (1.0 / 3.0) * (1 + 1e-9) + 1e-9
    # parent lattice vectors (integer coordinates m, row vectors) within the radius
    inv_len = np.linalg.norm(np.linalg.inv(cell), axis=0)  # |column j of inv(cell)|
    nmax = np.ceil(radius * inv_len).astype(int)
    grid = np.stack(
        np.meshgrid(*[np.arange(-k, k + 1) for k in nmax], indexing="ij"), axis=-1
    ).reshape(-1, 3)
    lengths = np.linalg.norm(grid @ cell, axis=1)
    keep = (lengths > 1e-9) & (lengths <= radius)
    grid, lengths = grid[keep], lengths[keep]
    order = np.argsort(lengths, kind="stable")
    grid, lengths = grid[order], lengths[order]
    # m is in the superlattice of H iff m @ adj(H) ≡ 0 (mod det H), exactly in integers.
    # Vectors are tested shortest first, in blocks; a candidate is settled by its first member.
    # (Small integers: the float64 products below are exact; one matrix product per block.)
    adj = np.round(np.linalg.inv(cands) * det)  # (c, 3, 3), integer-valued floats
    flat = adj.transpose(1, 0, 2).reshape(3, -1)  # (3, c·3)
    best = np.full(len(cands), radius)
    open_ = np.arange(len(cands))
    start, size = 0, 4
    while start < len(grid) and len(open_):
        block = grid[start : start + size].astype(np.float64)
        cols = (3 * open_[:, None] + np.arange(3)).ravel()
        prod = (block @ flat[:, cols]).reshape(len(block), len(open_), 3)
        member = np.all(np.mod(prod, det) == 0, axis=2).T  # (open, v)
        hit = member.any(axis=1)
        best[open_[hit]] = lengths[start + np.argmax(member[hit], axis=1)]
        open_ = open_[~hit]
        start, size = start + size, 2 * size
    k = int(np.argmax(np.round(best, 9)))
    mat = cands[k]
    _, op = minkowski_reduce(mat @ cell)
    mat = np.asarray(op, dtype=np.int64) @ mat
    if np.linalg.det(mat) < 0:
        mat = -mat
    return mat


# --------------------------------------------------------------------------------------------
# random alloys
# --------------------------------------------------------------------------------------------
def _decorated_sites(structure: Structure, sublattice: str | None) -> NDArray[np.int64]:
    if sublattice is None:
        return np.arange(structure.n_sites)
    idx = np.flatnonzero(np.array(structure.symbols) == sublattice)
    if len(idx) == 0:
        raise StructureError(
            f"sublattice {sublattice!r}: the parent ({structure.formula}) has no such sites; "
            f"accepted: one of {', '.join(structure.elements)} or None (all sites)"
        )
    return idx


def _species_array(counts: Mapping[str, int], rng: np.random.Generator) -> NDArray[np.str_]:
    """Return the multiset of species, shuffled by ``rng``."""
    species = np.array([el for el, k in counts.items() for _ in range(k)])
    return species[rng.permutation(len(species))]


def random_alloy(
    parent: Structure,
    composition: Mapping[str, float],
    supercell=1,
    *,
    seed: int,
    sublattice: str | None = None,
    exact: bool = False,
) -> Structure:
    """Build a random substitutional alloy on a supercell of ``parent``.

    Parameters
    ----------
    parent
        The lattice to decorate (its own symbols only mark sublattices).
    composition
        ``{element: atomic fraction}`` summing to 1, e.g. ``{"Cu": 0.75, "Pd": 0.25}``.
    supercell
        ``n`` (n×n×n), ``(n1, n2, n3)`` or an integer 3×3 matrix (see :func:`supercell_matrix`).
    seed
        Seed of the ``numpy.random.Generator`` that places the atoms (recorded in ``source``).
    sublattice
        Decorate only the parent sites of this element (default: every site).
    exact
        Require every ``n·x`` to be a whole number instead of rounding to the nearest counts.

    Returns
    -------
    Structure
        Decorated cell with labels ``<symbol><index>``; ``source`` records the parent, the
        requested composition, the supercell, the site counts and the seed.
    """
    return _RandomDecorator(parent, composition, supercell, sublattice, exact)(_check_seed(seed))


class _RandomDecorator:
    """Supercell, sites and counts prepared once; calling with a seed decorates a copy."""

    def __init__(self, parent, composition, supercell, sublattice, exact) -> None:
        comp = normalise_composition(composition)
        self.big = make_supercell(parent, supercell)
        self.sites = _decorated_sites(self.big, sublattice)
        self.counts = site_counts(comp, len(self.sites), exact=exact)
        where = "" if sublattice is None else f" sublattice {sublattice}"
        self.prefix = (
            f"random alloy {format_composition(comp)} on [{parent.source}]{where} supercell "
            f"{_matrix_text(supercell_matrix(supercell))} counts "
            f"{''.join(f'{e}{k}' for e, k in self.counts.items())}"
        )

    def __call__(self, seed: int, note: str = "") -> Structure:
        rng = np.random.default_rng(seed)
        symbols = np.array(self.big.symbols, dtype=object)
        symbols[self.sites] = _species_array(self.counts, rng)
        return Structure(
            cell=self.big.cell,
            positions=self.big.positions,
            symbols=tuple(symbols),
            source=f"{self.prefix} seed={seed}{note}",
        )


def _matrix_text(mat: NDArray[np.int64]) -> str:
    if np.count_nonzero(mat - np.diag(mat.diagonal())) == 0:
        return "x".join(str(int(v)) for v in mat.diagonal())
    return str(mat.tolist()).replace(" ", "")


@dataclass(frozen=True, eq=False)
class AlloyConfiguration:
    """One configuration of :func:`random_configurations`.

    ``random_alloy(parent, composition, supercell, seed=config.seed)`` rebuilds it.
    """

    index: int
    seed: int
    structure: Structure


def random_configurations(
    parent: Structure,
    composition: Mapping[str, float],
    supercell=1,
    *,
    n_configs: int,
    seed: int,
    sublattice: str | None = None,
    exact: bool = False,
) -> Iterator[AlloyConfiguration]:
    """Yield ``n_configs`` independent random alloys; seeds from :func:`derive_seeds`.

    Each configuration carries its own seed (also in its ``source``, together with the master
    seed), so any one of them can be rebuilt alone with :func:`random_alloy`.
    """
    seeds = derive_seeds(seed, n_configs)
    decorate = _RandomDecorator(parent, composition, supercell, sublattice, exact)
    for i, s in enumerate(seeds):
        note = f" (configuration {i} of {len(seeds)} from master seed={int(seed)})"
        yield AlloyConfiguration(index=i, seed=s, structure=decorate(s, note))


# --------------------------------------------------------------------------------------------
# lattice constants
# --------------------------------------------------------------------------------------------
def reference_lattice_constant(element: str, lattice: str) -> tuple[float, float | None]:
    """Return ``(a, c)`` in Å of ``element`` on ``lattice`` from ASE's reference state.

    ``c`` is ``None`` except for hcp. If the element's ASE reference state is another lattice,
    the constant with the same atomic volume is returned (hcp at the ideal c/a); see the module
    docstring. Raises :class:`StructureError` when ASE's reference state has no volume to go by.
    """
    from ase.data import atomic_numbers, reference_states

    if lattice not in ALLOY_LATTICES:
        raise StructureError(
            f"lattice {lattice!r}: accepted lattices are {', '.join(ALLOY_LATTICES)}"
        )
    if element not in atomic_numbers or element == "X":
        raise StructureError(f"unknown element {element!r}; use a chemical symbol such as 'Cu'")
    ref = reference_states[atomic_numbers[element]] or {}
    sym = ref.get("symmetry")
    if sym == lattice and "a" in ref:
        a = float(ref["a"])
        return (a, a * float(ref["c/a"])) if lattice == "hcp" else (a, None)
    if sym not in _VOLUME_PER_ATOM or "a" not in ref:
        raise StructureError(
            f"ASE's reference state of {element} is {sym!r}, from which valband does not derive "
            f"a {lattice} lattice constant; give the lattice constant in Å"
        )
    vol = _VOLUME_PER_ATOM[sym](float(ref["a"]), float(ref.get("c/a", 0.0)))
    if lattice == "hcp":
        a = (4.0 * vol / (math.sqrt(3.0) * IDEAL_C_OVER_A)) ** (1.0 / 3.0)
        return a, a * IDEAL_C_OVER_A
    per_cell = {"fcc": 4.0, "bcc": 2.0, "sc": 1.0}[lattice]
    return (per_cell * vol) ** (1.0 / 3.0), None


def vegard_lattice_constant(
    composition: Mapping[str, float], lattice: str
) -> tuple[float, float | None]:
    """Vegard's-law ``(a, c)`` in Å: fraction-weighted mean of :func:`reference_lattice_constant`.

    For hcp, a and c are averaged separately (``c`` is ``None`` for the cubic lattices).
    """
    comp = normalise_composition(composition)
    pairs = [(x, reference_lattice_constant(el, lattice)) for el, x in comp.items()]
    a = sum(x * ac[0] for x, ac in pairs)
    c = sum(x * ac[1] for x, ac in pairs) if lattice == "hcp" else None
    return a, c


def _check_a(a: float | None, what: str) -> float:
    try:
        af = float(a)
    except (TypeError, ValueError):
        raise StructureError(f"{what}: lattice constant {a!r} is not a number (Å)") from None
    if not (math.isfinite(af) and 0 < af < 100):
        raise StructureError(f"{what}: lattice constant a={a!r} Å is not in (0, 100)")
    return af


def _ordered(
    cell: NDArray, frac: Sequence[Sequence[float]], symbols: Sequence[str], source: str
) -> Structure:
    cell = np.asarray(cell, dtype=float)
    pos = np.asarray(frac, dtype=float) @ cell
    return Structure(cell=cell, positions=pos, symbols=tuple(symbols), source=source)


def l12(majority: str, minority: str, a: float | None = None) -> Structure:
    """L1₂ (Cu₃Au type) A₃B: minority B on the cube corners, majority A on the face centres.

    ``a`` (Å) of the 4-site cubic cell defaults to :func:`vegard_lattice_constant` on fcc at
    x_A = 3/4. Space group Pm-3m (221).
    """
    if majority == minority:
        raise StructureError(f"L1_2: majority and minority must differ, got {majority} twice")
    what = f"L1_2 {majority}3{minority}"
    if a is None:
        a, _ = vegard_lattice_constant({majority: 0.75, minority: 0.25}, "fcc")
    a = _check_a(a, what)
    frac = [(0, 0.5, 0.5), (0.5, 0, 0.5), (0.5, 0.5, 0), (0, 0, 0)]
    return _ordered(
        np.eye(3) * a, frac, (majority, majority, majority, minority), f"{what} a={a:.6g}"
    )


def l10(
    first: str, second: str, a: float | None = None, c_over_a: float = 1.0
) -> Structure:
    """L1₀ (CuAu type) AB: alternate (001) planes of A and B, in the 2-site primitive cell.

    ``a`` (Å) is the edge of the face-centred (conventional) tetragonal cell, default
    :func:`vegard_lattice_constant` on fcc at x = 1/2; ``c = c_over_a·a``. The primitive cell
    is a/√2 × a/√2 × c with A at (0, 0, 0) and B at (½, ½, ½). Space group P4/mmm (123).
    """
    if first == second:
        raise StructureError(f"L1_0: the two elements must differ, got {first} twice")
    what = f"L1_0 {first}{second}"
    if a is None:
        a, _ = vegard_lattice_constant({first: 0.5, second: 0.5}, "fcc")
    a = _check_a(a, what)
    ca = float(c_over_a)
    if not (math.isfinite(ca) and 0.5 <= ca <= 2.0):
        raise StructureError(f"{what}: c/a = {c_over_a!r} is outside the accepted range [0.5, 2]")
    t = a / math.sqrt(2.0)
    cell = np.diag([t, t, ca * a])
    return _ordered(
        cell, [(0, 0, 0), (0.5, 0.5, 0.5)], (first, second), f"{what} a={a:.6g} c/a={ca:.6g}"
    )


def b2(first: str, second: str, a: float | None = None) -> Structure:
    """B2 (CsCl type) AB: A at the cube corner, B at the body centre.

    ``a`` (Å) defaults to :func:`vegard_lattice_constant` on bcc at x = 1/2.
    Space group Pm-3m (221).
    """
    if first == second:
        raise StructureError(f"B2: the two elements must differ, got {first} twice")
    what = f"B2 {first}{second}"
    if a is None:
        a, _ = vegard_lattice_constant({first: 0.5, second: 0.5}, "bcc")
    a = _check_a(a, what)
    return _ordered(
        np.eye(3) * a, [(0, 0, 0), (0.5, 0.5, 0.5)], (first, second), f"{what} a={a:.6g}"
    )

