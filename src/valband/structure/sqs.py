"""Special quasirandom structures (SQS) and pair correlations of decorated lattices.

An SQS is a small periodic supercell whose pair correlations over the first few neighbour
shells match those of the infinite random alloy as closely as the cell allows (A. Zunger,
S.-H. Wei, L. G. Ferreira, J. E. Bernard, Phys. Rev. Lett. 65, 353 (1990)).

Pair statistics (shell s, species a, b; directed pairs i → j + R counted with multiplicity)
    p_s(a, b) = (number of s-shell pairs with i of species a and j of species b) / N_s.
    Ideal random alloy: p_s(a, b) = x_a·x_b.
    Warren–Cowley short-range order (J. M. Cowley, Phys. Rev. 77, 669 (1950)):
    α_s(a, b) = 1 − p_s(a, b)/(x_a x_b) for a ≠ b and α_s(a, a) = (p_s(a, a)/x_a − x_a)/(1 − x_a);
    0 for the random alloy.
    Binary spin correlation (σ = +1 on the first species, −1 on the second):
    Π_s = ⟨σ_i σ_j⟩_s = 1 − 4 p_s(A, B); random alloy (2x − 1)², and Π_s − (2x − 1)² = 4x(1 − x)α_s.

Objective (minimised)
    f = Σ_s w_s Σ_{a<b} [4 (p_s(a, b) − x_a x_b)]²,
    which for a binary is Σ_s w_s (Π_s − (2x − 1)²)².
    Default: the first :data:`DEFAULT_SHELLS` = 3 shells, all weights 1. x is the composition
    realised on the cell (whole site counts, :func:`valband.structure.alloys.site_counts`).

Search
    Simulated annealing over swaps of two sites of different species (Metropolis acceptance,
    geometric cooling from a start temperature equal to the mean |Δf| of 64 trial swaps down
    to 10⁻³ of it), starting from ``random_alloy(..., seed)`` and drawing every proposal from
    the same seeded ``numpy`` Generator; the best configuration met is returned. The swap
    updates the pair counts incrementally in a numba kernel (:func:`anneal_numba`);
    :func:`anneal_reference` is the plain-numpy specification (full recount every step).

Shells are grouped by distance with a tolerance of :data:`SHELL_TOL` Å (ideal lattices).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numba
import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError, StructureError
from valband.structure.alloys import (
    _check_seed,
    _decorated_sites,
    _matrix_text,
    _species_array,
    format_composition,
    make_supercell,
    normalise_composition,
    site_counts,
    supercell_matrix,
)
from valband.structure.record import Structure

__all__ = [
    "DEFAULT_SHELLS",
    "DEFAULT_STEPS",
    "SHELL_TOL",
    "SQSResult",
    "ShellCorrelations",
    "ShellTable",
    "anneal_numba",
    "anneal_reference",
    "neighbour_shells",
    "pair_correlations",
    "sqs",
]

#: Number of neighbour shells matched by default (first, second and third neighbours).
DEFAULT_SHELLS = 3
#: Default number of annealing steps (swap proposals).
DEFAULT_STEPS = 20_000
#: Distances closer than this (Å) belong to one shell.
SHELL_TOL = 1e-3
#: An objective at or below this counts as a perfect match and ends the search.
PERFECT = 1e-14
#: Trial swaps used to set the start temperature.
N_TRIAL = 64


# --------------------------------------------------------------------------------------------
# shells
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class ShellTable:
    """Directed pairs of chosen sites within the first shells, as CSR by first site.

    Attributes
    ----------
    sites : ndarray (n,), int64
        Indices (into the structure) of the sites the table is about; pair indices refer to
        positions in this array.
    distances : ndarray (n_shells,), float64, Å
        Shell radii.
    ptr : ndarray (n + 1,), int64
        Pairs of site k are ``ptr[k]:ptr[k+1]``.
    second : ndarray (n_pairs,), int64
        Partner j (position in ``sites``) of each directed pair.
    shell : ndarray (n_pairs,), int64
        Shell index of each pair.
    """

    sites: NDArray[np.int64]
    distances: NDArray[np.float64]
    ptr: NDArray[np.int64]
    second: NDArray[np.int64]
    shell: NDArray[np.int64]

    @property
    def first(self) -> NDArray[np.int64]:
        """First site (position in ``sites``) of each directed pair."""
        return np.repeat(np.arange(len(self.sites)), np.diff(self.ptr))

    @property
    def n_pairs(self) -> NDArray[np.int64]:
        """Directed pairs per shell, shape (n_shells,)."""
        return np.bincount(self.shell, minlength=len(self.distances))


def _pairs_within(
    cell: NDArray, positions: NDArray, rcut: float
) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.float64]]:
    """All directed pairs i → j + R with 0 < |r_j + R − r_i| ≤ rcut (numpy, chunked over i).

    Positions are wrapped into the cell first, so fractional differences lie in (−1, 1) and
    translations up to ⌈rcut / h_k⌉ + 1 cells along each axis suffice (h_k: spacing of the
    lattice planes spanned by the other two vectors).
    """
    frac = np.linalg.solve(cell.T, positions.T).T
    pos = (frac - np.floor(frac)) @ cell
    heights = 1.0 / np.linalg.norm(np.linalg.inv(cell), axis=0)
    reach = np.ceil(rcut / heights).astype(int) + 1
    grid = np.stack(
        np.meshgrid(*[np.arange(-k, k + 1) for k in reach], indexing="ij"), axis=-1
    ).reshape(-1, 3)
    shifts = grid @ cell  # (n_R, 3)
    n = len(pos)
    chunk = max(1, int(2_000_000 // max(1, n * len(shifts))))
    firsts, seconds, dists = [], [], []
    for i0 in range(0, n, chunk):
        rel = pos[None, :, :] - pos[i0 : i0 + chunk, None, :]  # (c, n, 3)
        vec = rel[:, :, None, :] + shifts[None, None, :, :]  # (c, n, n_R, 3)
        d = np.sqrt(np.einsum("cnrk,cnrk->cnr", vec, vec))
        ci, cj, _ = np.nonzero((d <= rcut) & (d > 1e-8))
        firsts.append(ci + i0)
        seconds.append(cj)
        dists.append(d[(d <= rcut) & (d > 1e-8)])
    return np.concatenate(firsts), np.concatenate(seconds), np.concatenate(dists)


def neighbour_shells(
    structure: Structure, n_shells: int = DEFAULT_SHELLS, sites: Sequence[int] | None = None
) -> ShellTable:
    """Find the first ``n_shells`` neighbour shells among ``sites`` (default: all sites).

    A vectorised search over periodic images (:func:`_pairs_within`), widening the cutoff
    until more than ``n_shells`` distinct distances are found (so the last kept shell is
    complete). Every pair with its multiplicity, including images of a site itself.
    """
    n_shells = int(n_shells)
    if n_shells < 1 or n_shells > 20:
        raise SettingsError(f"number of shells must be between 1 and 20, got {n_shells}")
    idx = np.arange(structure.n_sites) if sites is None else np.asarray(sites, dtype=np.int64)
    pos = structure.positions[idx]
    r = (1.0 + 0.9 * n_shells) * (structure.volume / len(idx)) ** (1.0 / 3.0)
    for _ in range(40):
        first, second, dist = _pairs_within(structure.cell, pos, r)
        d = np.sort(dist)
        if len(d):
            starts = np.concatenate([[0], np.flatnonzero(np.diff(d) > SHELL_TOL) + 1])
            if len(starts) > n_shells:
                break
        r *= 1.25
    else:  # pragma: no cover - 40 widenings reach far beyond any sensible shell
        raise StructureError(f"could not find {n_shells} neighbour shells in {structure.source}")
    radii = np.array([d[s] for s in starts[:n_shells]])
    shell = np.searchsorted(radii + SHELL_TOL, dist)
    keep = shell < n_shells
    first, second, shell, dist = first[keep], second[keep], shell[keep], dist[keep]
    order = np.lexsort((dist, first))
    first, second, shell = first[order], second[order], shell[order]
    ptr = np.concatenate([[0], np.cumsum(np.bincount(first, minlength=len(idx)))])
    return ShellTable(
        sites=idx,
        distances=radii,
        ptr=ptr.astype(np.int64),
        second=second.astype(np.int64),
        shell=shell.astype(np.int64),
    )


# --------------------------------------------------------------------------------------------
# correlations
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class ShellCorrelations:
    """Pair statistics of a decorated cell per neighbour shell (definitions: module docstring).

    Attributes
    ----------
    species : tuple of str
        Species order of the matrix axes; a binary's spin is +1 on ``species[0]``.
    fractions : ndarray (K,)
        Composition of the chosen sites.
    distances : ndarray (S,), Å
        Shell radii.
    n_pairs : ndarray (S,), int64
        Directed pairs per shell.
    pair_probabilities : ndarray (S, K, K)
        p_s(a, b).
    warren_cowley : ndarray (S, K, K)
        α_s(a, b).
    spin : ndarray (S,) or None
        Π_s for a binary, else None.
    spin_random : float or None
        (2x − 1)² for a binary (the random alloy's Π_s), else None.
    """

    species: tuple[str, ...]
    fractions: NDArray[np.float64]
    distances: NDArray[np.float64]
    n_pairs: NDArray[np.int64]
    pair_probabilities: NDArray[np.float64]
    warren_cowley: NDArray[np.float64]
    spin: NDArray[np.float64] | None
    spin_random: float | None

    def to_dict(self) -> dict:
        """JSON-ready copy."""
        return {
            "species": list(self.species),
            "fractions": self.fractions.tolist(),
            "shell_distances": self.distances.tolist(),
            "n_pairs": self.n_pairs.tolist(),
            "pair_probabilities": self.pair_probabilities.tolist(),
            "warren_cowley": self.warren_cowley.tolist(),
            "spin": None if self.spin is None else self.spin.tolist(),
            "spin_random": self.spin_random,
        }


def _pair_counts(types: NDArray, table: ShellTable, k: int) -> NDArray[np.int64]:
    """Directed pair counts C[s, a, b] (numpy, vectorised)."""
    first = table.first
    key = (table.shell * k + types[first]) * k + types[table.second]
    return np.bincount(key, minlength=len(table.distances) * k * k).reshape(-1, k, k)


def _objective_reference(counts, norm, target, weights) -> float:
    """Objective f = Σ_s w_s Σ_{a<b} [4 (C_s(a,b)/N_s − x_a x_b)]² (numpy)."""
    k = counts.shape[1]
    iu = np.triu_indices(k, 1)
    dev = 4.0 * (counts / norm[:, None, None] - target)
    return float(np.sum(weights * np.sum(dev[:, iu[0], iu[1]] ** 2, axis=1)))


def _correlations(types, table, species, fractions) -> ShellCorrelations:
    k = len(species)
    counts = _pair_counts(types, table, k)
    n_pairs = counts.sum(axis=(1, 2))
    p = counts / np.maximum(n_pairs, 1)[:, None, None]
    x = np.asarray(fractions, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        alpha = 1.0 - p / np.outer(x, x)
        diag = (np.diagonal(p, axis1=1, axis2=2) / x - x) / (1.0 - x)
    idx = np.arange(k)
    alpha[:, idx, idx] = diag
    spin = spin_random = None
    if k == 2:
        spin = 1.0 - 4.0 * p[:, 0, 1]
        spin_random = float((2.0 * x[0] - 1.0) ** 2)
    return ShellCorrelations(
        species=tuple(species),
        fractions=x,
        distances=table.distances,
        n_pairs=n_pairs.astype(np.int64),
        pair_probabilities=p,
        warren_cowley=alpha,
        spin=spin,
        spin_random=spin_random,
    )


def pair_correlations(
    structure: Structure,
    n_shells: int = DEFAULT_SHELLS,
    *,
    sites: Sequence[int] | None = None,
    species: Sequence[str] | None = None,
) -> ShellCorrelations:
    """Pair probabilities, Warren–Cowley α and (binary) spin correlations per shell.

    Parameters
    ----------
    structure
        A decorated cell.
    n_shells
        Number of neighbour shells (default :data:`DEFAULT_SHELLS`).
    sites
        Sites to consider (a sublattice); default all.
    species
        Species order (default: order of first appearance); a binary's spin is +1 on the first.
    """
    table = neighbour_shells(structure, n_shells, sites)
    symbols = [structure.symbols[i] for i in table.sites]
    present = list(dict.fromkeys(symbols))
    species = list(species) if species is not None else present
    missing = set(present) - set(species)
    if missing:
        raise StructureError(
            f"species order {species} lacks {sorted(missing)} present on the chosen sites"
        )
    lookup = {e: i for i, e in enumerate(species)}
    types = np.array([lookup[s] for s in symbols], dtype=np.int64)
    fractions = np.bincount(types, minlength=len(species)) / len(types)
    return _correlations(types, table, species, fractions)


# --------------------------------------------------------------------------------------------
# annealing kernels
# --------------------------------------------------------------------------------------------
@numba.njit(cache=True)
def _objective_nb(counts, norm, target, weights):  # pragma: no cover - compiled
    k = counts.shape[1]
    total = 0.0
    for s in range(counts.shape[0]):
        acc = 0.0
        for a in range(k):
            for b in range(a + 1, k):
                d = 4.0 * (counts[s, a, b] / norm[s] - target[s, a, b])
                acc += d * d
        total += weights[s] * acc
    return total


@numba.njit(cache=True)
def _touch(types, i, j, ptr, second, shell, counts, sign):  # pragma: no cover - compiled
    """Add ``sign`` × the pairs touching sites i or j to the counts (each pair once)."""
    for u in (i, j):
        for b in range(ptr[u], ptr[u + 1]):
            v = second[b]
            s = shell[b]
            counts[s, types[u], types[v]] += sign
            if v != i and v != j:
                counts[s, types[v], types[u]] += sign


@numba.njit(cache=True)
def _anneal_kernel(
    types, ptr, second, shell, counts, norm, target, weights, pick_i, pick_j, u, temps
):  # pragma: no cover - compiled
    f = _objective_nb(counts, norm, target, weights)
    best_f = f
    best = types.copy()
    accepted = 0
    done = 0
    for step in range(pick_i.size):
        if best_f <= 1e-14:
            break
        done += 1
        i = pick_i[step]
        j = pick_j[step]
        if types[i] == types[j]:
            continue
        _touch(types, i, j, ptr, second, shell, counts, -1)
        ti = types[i]
        types[i] = types[j]
        types[j] = ti
        _touch(types, i, j, ptr, second, shell, counts, 1)
        f_new = _objective_nb(counts, norm, target, weights)
        delta = f_new - f
        if delta <= 0.0 or u[step] < math.exp(-delta / temps[step]):
            f = f_new
            accepted += 1
            if f < best_f:
                best_f = f
                best[:] = types
        else:
            _touch(types, i, j, ptr, second, shell, counts, -1)
            ti = types[i]
            types[i] = types[j]
            types[j] = ti
            _touch(types, i, j, ptr, second, shell, counts, 1)
    return best, best_f, accepted, done


def anneal_numba(types, table: ShellTable, target, weights, pick_i, pick_j, u, temps):
    """Run the swap annealing (numba kernel, incremental pair counts).

    Parameters
    ----------
    types : ndarray (n,), int
        Start configuration (species index per site of ``table``); not modified.
    table
        The shells (:func:`neighbour_shells`).
    target : ndarray (S, K, K)
        x_a x_b.
    weights : ndarray (S,)
        Shell weights w_s.
    pick_i, pick_j : ndarray (n_steps,), int
        Proposed swap partners per step.
    u : ndarray (n_steps,)
        Uniform numbers in [0, 1) for the Metropolis test.
    temps : ndarray (n_steps,)
        Temperature (objective units) per step.

    Returns
    -------
    (best_types, best_objective, n_accepted, n_steps_run)
    """
    types = np.array(types, dtype=np.int64)
    k = target.shape[1]
    counts = _pair_counts(types, table, k).astype(np.int64)
    norm = table.n_pairs.astype(np.float64)
    best, f, acc, done = _anneal_kernel(
        types, table.ptr, table.second, table.shell, counts, norm,
        np.ascontiguousarray(target, dtype=np.float64),
        np.ascontiguousarray(weights, dtype=np.float64),
        np.ascontiguousarray(pick_i, dtype=np.int64), np.ascontiguousarray(pick_j, dtype=np.int64),
        np.ascontiguousarray(u, dtype=np.float64), np.ascontiguousarray(temps, dtype=np.float64),
    )  # fmt: skip
    return best, float(f), int(acc), int(done)


def anneal_reference(types, table: ShellTable, target, weights, pick_i, pick_j, u, temps):
    """Plain-numpy reference of :func:`anneal_numba`: same steps, full recount of every state."""
    types = np.array(types, dtype=np.int64)
    k = target.shape[1]
    norm = table.n_pairs.astype(np.float64)

    def objective(t):
        return _objective_reference(_pair_counts(t, table, k), norm, target, weights)

    f = objective(types)
    best_f, best = f, types.copy()
    accepted = done = 0
    for step in range(len(pick_i)):
        if best_f <= PERFECT:
            break
        done += 1
        i, j = int(pick_i[step]), int(pick_j[step])
        if types[i] == types[j]:
            continue
        trial = types.copy()
        trial[i], trial[j] = types[j], types[i]
        f_new = objective(trial)
        delta = f_new - f
        if delta <= 0.0 or u[step] < math.exp(-delta / temps[step]):
            types, f = trial, f_new
            accepted += 1
            if f < best_f:
                best_f, best = f, types.copy()
    return best, float(best_f), accepted, done


# --------------------------------------------------------------------------------------------
# the search
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class SQSResult:
    """A special quasirandom structure and how well it matches the random alloy.

    Attributes
    ----------
    structure : Structure
        The decorated supercell (``source`` records composition, shells, objective and seed).
    correlations : ShellCorrelations
        Achieved pair statistics (recomputed from ``structure``).
    objective : float
        f of the module docstring (0 = every matched correlation is the random alloy's).
    seed : int
        Seed of the Generator behind the start configuration and every proposal.
    n_shells : int
        Shells matched.
    weights : tuple of float
        Shell weights w_s.
    n_steps : int
        Steps allowed; ``steps_run`` were used (the search stops at a perfect match).
    steps_run, n_accepted : int
        Steps taken and swaps accepted.
    t_start, t_end : float
        Annealing temperatures (objective units).
    """

    structure: Structure
    correlations: ShellCorrelations
    objective: float
    seed: int
    n_shells: int
    weights: tuple[float, ...]
    n_steps: int
    steps_run: int
    n_accepted: int
    t_start: float
    t_end: float

    def to_dict(self) -> dict:
        """JSON-ready summary (without the structure itself)."""
        return {
            "objective": self.objective,
            "seed": self.seed,
            "n_shells": self.n_shells,
            "weights": list(self.weights),
            "n_steps": self.n_steps,
            "steps_run": self.steps_run,
            "n_accepted": self.n_accepted,
            "t_start": self.t_start,
            "t_end": self.t_end,
            "correlations": self.correlations.to_dict(),
        }


def sqs(
    parent: Structure,
    composition: Mapping[str, float],
    supercell=1,
    *,
    seed: int,
    n_shells: int = DEFAULT_SHELLS,
    n_steps: int = DEFAULT_STEPS,
    weights: Sequence[float] | None = None,
    sublattice: str | None = None,
    kernel: str = "numba",
) -> SQSResult:
    """Search a special quasirandom structure on a supercell of ``parent``.

    Parameters
    ----------
    parent, composition, supercell, seed, sublattice
        As for :func:`valband.structure.alloys.random_alloy` (the search starts from that
        random alloy; for a compact supercell with N sites pass
        ``compact_supercell_matrix(parent, N)``).
    n_shells
        Neighbour shells matched (default 3).
    n_steps
        Annealing steps (swap proposals), default :data:`DEFAULT_STEPS`.
    weights
        Shell weights w_s (default all 1).
    kernel
        ``"numba"`` (default) or ``"numpy"`` (the slow reference, for checks).
    """
    seed = _check_seed(seed)
    if kernel not in ("numba", "numpy"):
        raise SettingsError(f"kernel must be 'numba' or 'numpy', got {kernel!r}")
    n_steps = int(n_steps)
    if n_steps < 0:
        raise SettingsError(f"n_steps must be ≥ 0, got {n_steps}")
    comp = normalise_composition(composition)
    if len(comp) < 2:
        raise StructureError(f"an SQS needs at least two elements, got {format_composition(comp)}")
    big = make_supercell(parent, supercell)
    sites = _decorated_sites(big, sublattice)
    counts = site_counts(comp, len(sites))
    table = neighbour_shells(big, n_shells, sites)
    w = np.ones(n_shells) if weights is None else np.asarray(weights, dtype=float)
    if w.shape != (n_shells,) or not np.all(np.isfinite(w)) or np.any(w < 0) or not w.any():
        raise SettingsError(
            f"weights {weights!r}: give {n_shells} finite, non-negative shell weights (not all 0)"
        )
    species = list(comp)
    x = np.array([counts[e] for e in species], dtype=float) / len(sites)
    target = np.broadcast_to(np.outer(x, x), (n_shells, len(x), len(x))).copy()

    rng = np.random.default_rng(seed)
    start = _species_array(counts, rng)
    lookup = {e: i for i, e in enumerate(species)}
    types = np.array([lookup[s] for s in start], dtype=np.int64)
    # start temperature: mean |Δf| of trial swaps from the start configuration
    norm = table.n_pairs.astype(float)

    def objective(t):
        return _objective_reference(_pair_counts(t, table, len(x)), norm, target, w)

    f0 = objective(types)
    deltas = []
    for i, j in rng.integers(0, len(types), size=(N_TRIAL, 2)):
        if types[i] != types[j]:
            t = types.copy()
            t[i], t[j] = types[j], types[i]
            deltas.append(abs(objective(t) - f0))
    t_start = float(np.mean(deltas)) if deltas and np.mean(deltas) > 0 else 1e-3
    t_end = 1e-3 * t_start
    temps = t_start * (t_end / t_start) ** (np.arange(n_steps) / max(n_steps - 1, 1))
    pick = rng.integers(0, len(types), size=(n_steps, 2))
    u = rng.random(n_steps)
    run = anneal_numba if kernel == "numba" else anneal_reference
    best, f, acc, done = run(types, table, target, w, pick[:, 0], pick[:, 1], u, temps)

    symbols = np.array(big.symbols, dtype=object)
    symbols[sites] = np.array(species, dtype=object)[best]
    where = "" if sublattice is None else f" sublattice {sublattice}"
    src = (
        f"sqs {format_composition(comp)} on [{parent.source}]{where} supercell "
        f"{_matrix_text(supercell_matrix(supercell))} shells={n_shells} objective={f:.3g} "
        f"seed={seed}"
    )
    structure = Structure(
        cell=big.cell, positions=big.positions, symbols=tuple(symbols), source=src
    )
    corr = _correlations(best, table, species, x)
    return SQSResult(
        structure=structure,
        correlations=corr,
        objective=f,
        seed=seed,
        n_shells=int(n_shells),
        weights=tuple(float(v) for v in w),
        n_steps=n_steps,
        steps_run=done,
        n_accepted=acc,
        t_start=t_start,
        t_end=t_end,
    )
