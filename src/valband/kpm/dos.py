"""compute_kpm_dos: sparse H, S → Lanczos bounds → Chebyshev moments → DOSResult.

Channels
    ``resolve="site"`` gives the channels of the dense path, one per site and shell
    (``Channel(site, element, shell)``). ``resolve="element"`` (default for large cells) gives
    one channel per element and shell, summed over all its sites and labelled with the first
    site of that element; ``groups`` (e.g. the layers of a slab) gives one channel per group,
    element and shell, labelled with the group's first site of that element. Channel curves
    are cell totals (states / eV / cell), so their sum is the total DOS and
    :func:`~valband.spectra.simulate_spectrum` weights them correctly; the number of sites
    behind each channel is recorded in ``settings["channel_site_counts"]``.
    :func:`~valband.workflows.describe` divides an element's curve by the number of channel
    labels it finds, so on grouped channels its normalised descriptors (centre, width,
    filling, skewness, kurtosis, upper edge) are right but ``n_states`` is per group, not per
    atom; :func:`describe_kpm` returns the table with per-atom ``n_states``.

Fermi level
    From the exact integral of the truncated, Jackson-damped series of the total DOS
    (:func:`valband.kpm.chebyshev.integrated`), solved for N(E_F) = n_electrons by
    :func:`valband.dos.find_fermi_level`.
"""

from __future__ import annotations

import hashlib
import math
import platform
import time
from collections.abc import Sequence
from dataclasses import replace

import numpy as np

from valband.conventions import SHELLS, SPIN_DEGENERACY
from valband.dos import find_fermi_level
from valband.errors import SettingsError
from valband.kpm.chebyshev import (
    integrated,
    jackson_sigma,
    moments_for_resolution,
    reconstruct,
    scale_factors,
)
from valband.kpm.moments import chebyshev_moments
from valband.kpm.operators import Operator, lanczos_bounds
from valband.kpm.settings import KPMSettings, vectors_for_accuracy
from valband.kpm.sparse import SparseModel
from valband.results import DOSResult
from valband.results.channels import Channel

__all__ = ["compute_kpm_dos", "kpm_channels", "describe_kpm"]

#: Largest n_channels × n_energies of a result (about 0.4 GB of float64).
MAX_CHANNEL_VALUES = 50_000_000
#: Space group and positions go into the provenance only up to this many sites.
_PROVENANCE_FULL_SITES = 2000
#: Vectors of n doubles held per real column of a block: the recursion's three (plus a
#: temporary), and CG's temporaries and H·X for a non-orthogonal set.
_VECTORS_PER_COLUMN = {True: 4, False: 11}


def kpm_channels(model: SparseModel, resolve: str = "element",
                 groups: Sequence[Sequence[int]] | None = None):
    """Channels and the channel index of every orbital.

    Returns
    -------
    (tuple of Channel, ndarray (norb,) int64, list of int)
        Labels, orbital → channel index, and the number of sites behind each channel.
    """
    n_sites = model.n_sites
    if groups is None:
        group_of = (np.zeros(n_sites, dtype=np.int64) if resolve == "element"
                    else np.arange(n_sites, dtype=np.int64))
    else:
        group_of = np.full(n_sites, -1, dtype=np.int64)
        for g, members in enumerate(groups):
            idx = np.asarray(list(members), dtype=np.int64)
            if idx.size == 0 or idx.min() < 0 or idx.max() >= n_sites:
                raise SettingsError(f"KPM group {g}: site indices must lie in 0…{n_sites - 1}")
            if np.any(group_of[idx] >= 0):
                raise SettingsError(f"KPM group {g} repeats a site of an earlier group")
            group_of[idx] = g
        if np.any(group_of < 0):
            missing = np.flatnonzero(group_of < 0)[:5].tolist()
            raise SettingsError(f"KPM groups leave sites {missing}… out; every site needs a group")
    el = model.site_element
    n_el = len(model.structure.elements)
    site_key = group_of * n_el + el
    orb_key = site_key[model.orbital_site] * len(SHELLS) + model.orbital_shell
    keys, chan = np.unique(orb_key, return_inverse=True)
    site_counts = np.bincount(site_key, minlength=int(site_key.max()) + 1)
    labels, counts = [], []
    # representative site of each (group, element): its first site
    rep = np.full(site_counts.size, -1, dtype=np.int64)
    present, first_site = np.unique(site_key, return_index=True)
    rep[present] = first_site
    symbols = model.structure.symbols
    for k in keys:
        sk, sh = divmod(int(k), len(SHELLS))
        site = int(rep[sk])
        labels.append(Channel(site, symbols[site], SHELLS[sh]))
        counts.append(int(site_counts[sk]))
    return tuple(labels), chan.astype(np.int64), counts


def _provenance(model: SparseModel) -> dict:
    import ase
    import numba
    import numpy
    import scipy

    import valband

    st = model.structure
    record = {"formula": st.formula, "source": st.source, "n_sites": st.n_sites,
              "cell_angstrom": st.cell.tolist()}
    if st.n_sites <= _PROVENANCE_FULL_SITES:
        from valband.kspace.symmetry import space_group

        record.update(space_group=space_group(st), symbols=list(st.symbols),
                      positions_angstrom=st.positions.tolist())
    else:
        h = hashlib.sha256(np.ascontiguousarray(st.positions).tobytes())
        h.update(" ".join(st.symbols).encode())
        record.update(space_group=None, sha256_positions_symbols=h.hexdigest(),
                      note=f"positions omitted above {_PROVENANCE_FULL_SITES} sites")
    return {
        "valband_version": valband.__version__,
        "structure": record,
        "parameter_set": {"name": model.parameter_set, "version": model.parameter_version},
        "software": {"python": platform.python_version(), "numpy": numpy.__version__,
                     "scipy": scipy.__version__, "ase": ase.__version__,
                     "numba": numba.__version__},
    }


def _trace_plan(s: KPMSettings, n: int, a: float, smallest: int) -> tuple[str, int, str]:
    rule = "given"
    if s.n_vectors is not None:
        r = int(s.n_vectors)
    else:
        r = vectors_for_accuracy(a, s.resolution, smallest, s.accuracy)
        rule = "R = ceil(a / (sqrt(pi) * resolution * D_c * accuracy^2))"
    trace = s.trace
    if trace == "auto":
        trace = "exact" if n <= 2 * r else "stochastic"
    return trace, r, rule


def compute_kpm_dos(model: SparseModel, settings: KPMSettings | None = None,
                    groups: Sequence[Sequence[int]] | None = None,
                    progress: bool = False) -> DOSResult:
    """Total and channel DOS of a large cell at Γ by the kernel polynomial method.

    Parameters
    ----------
    model : SparseModel (:func:`valband.kpm.build_sparse`)
    settings : KPMSettings (defaults: δ = 0.1 eV, η = 0.05, element channels)
    groups : optional partition of the sites (e.g. slab layers) → one channel per group,
        element and shell (overrides ``settings.resolve``)
    progress : progress bar on a terminal

    Returns
    -------
    DOSResult with energies relative to E_F, states / eV / cell including both spins;
    ``settings`` records method "kpm", N, R, the trace, seed, bounds, scaling, the rules
    used, the Jackson width actually reached, timings and the stochastic error estimate.
    """
    s = settings or KPMSettings()
    s.validate()
    if s.threads is None:
        return _compute(model, s, groups, progress)
    import numba

    before = numba.get_num_threads()
    numba.set_num_threads(min(int(s.threads), numba.config.NUMBA_NUM_THREADS))
    try:
        return _compute(model, s, groups, progress)
    finally:
        numba.set_num_threads(before)


def _compute(model: SparseModel, s: KPMSettings, groups, progress: bool) -> DOSResult:
    t0 = time.perf_counter()
    op = Operator(model.hamiltonian, model.overlap, backend=s.backend, cg_tol=s.cg_tol)
    bounds = lanczos_bounds(op, s.lanczos_steps, seed=s.seed)
    a, b = scale_factors(bounds["emin"], bounds["emax"], s.margin)
    t_bounds = time.perf_counter() - t0

    labels, chan, counts = kpm_channels(model, s.resolve, groups)
    n = model.n_orbitals
    n_mom = int(s.n_moments) if s.n_moments is not None else moments_for_resolution(a, s.resolution)
    orbitals_per_channel = np.bincount(chan, minlength=len(labels))
    of_shell = [k for k, c in enumerate(labels) if c.shell == s.accuracy_shell]
    smallest = int(orbitals_per_channel[of_shell or slice(None)].min())
    trace, n_vec, rule = _trace_plan(s, n, a, smallest)

    lo_e, hi_e = b - a, b + a
    step = s.step if s.step is not None else max(s.resolution / 4.0, 1e-4)
    # grid limits are fixed after E_F; check the channel budget with the widest grid now
    n_e_est = int(math.ceil((hi_e - lo_e) / step)) + 3
    if len(labels) * n_e_est > MAX_CHANNEL_VALUES:
        raise SettingsError(
            f"KPM: {len(labels)} channels × {n_e_est} energies exceed "
            f"{MAX_CHANNEL_VALUES:,} values; use resolve='element', layer groups, or a coarser "
            "step"
        )
    per_col = _VECTORS_PER_COLUMN[model.orthogonal] * 8 * n
    block = int(max(2, min(64, (s.memory_mb * 2**20) // per_col)))
    block -= block % 2
    res = chebyshev_moments(op, a, b, n_mom, chan, len(labels), trace, n_vec, s.seed, block,
                            progress=progress)
    t_moments = time.perf_counter() - t0 - t_bounds

    total_mu = res.moments.sum(axis=0)
    n_el = model.n_electrons if s.n_electrons is None else float(s.n_electrons)

    def count(e: float) -> float:
        return SPIN_DEGENERACY * float(integrated(total_mu, (e - b) / a))

    e_f = find_fermi_level(count, n_el, lo_e, hi_e, max_electrons=SPIN_DEGENERACY * n,
                           tol=1e-8)
    emin = s.emin if s.emin is not None else math.floor(lo_e - e_f)
    emax = s.emax if s.emax is not None else math.ceil(hi_e - e_f)
    n_e = int(round((emax - emin) / step)) + 1
    if len(labels) * n_e > MAX_CHANNEL_VALUES:
        raise SettingsError(
            f"KPM: {len(labels)} channels × {n_e} energies exceed {MAX_CHANNEL_VALUES:,} "
            "values; narrow emin/emax or coarsen the step"
        )
    grid = emin + step * np.arange(n_e)
    x = (grid + e_f - b) / a
    chan_dos = SPIN_DEGENERACY * reconstruct(res.moments, x) / a
    total = chan_dos.sum(axis=0)

    stochastic_error = None
    if res.per_vector is not None and n_vec > 1:
        per = SPIN_DEGENERACY * reconstruct(res.per_vector, x) / a  # (R, n_e)
        sem = per.std(axis=0, ddof=1) / math.sqrt(n_vec)
        peak = float(total.max()) if total.size else 0.0
        stochastic_error = float(sem.max() / peak) if peak > 0 else None

    recorded = s.to_dict()
    recorded.update(
        method="kpm", k_point="Gamma of the cell", kernel="jackson", n_moments=n_mom,
        moment_rule="smallest N with a*sigma_Jackson(N, 0) <= resolution (N ~ pi a / resolution)"
        if s.n_moments is None else "given",
        jackson_sigma_centre_eV=a * jackson_sigma(n_mom, 0.0),
        trace=trace, n_vectors=n_vec if trace == "stochastic" else None, vector_rule=rule,
        random_vectors="random phase exp(i phi), phi ~ U[0, 2 pi), rng([seed, j])",
        stochastic_error_peak_rel=stochastic_error,
        bounds=bounds, scale_a_eV=a, scale_b_eV=b, spectrum_eV=[lo_e, hi_e],
        resolve="groups" if groups is not None else s.resolve,
        channel_site_counts=counts, n_orbitals=n, n_electrons=n_el,
        nnz_hamiltonian=int(model.hamiltonian.nnz),
        nnz_overlap=None if model.overlap is None else int(model.overlap.nnz),
        orthogonal=model.orthogonal, block_columns=block, n_blocks=res.n_blocks,
        operator=dict(op.stats), energy_range_eV=[float(grid[0]), float(grid[-1])], step=step,
        timings_s={"bounds": t_bounds, "moments": t_moments,
                   "total": time.perf_counter() - t0},
        ldos="Mulliken: Tr[P_c delta(E - S^-1 H)] (equals Re c*(Sc) weights of the dense path)",
    )
    return DOSResult(
        energies=grid, total=total, channels=chan_dos, channel_labels=labels,
        fermi_level=float(e_f), n_electrons=n_el, n_sites=model.n_sites, settings=recorded,
        provenance=_provenance(model),
    )


def describe_kpm(dos: DOSResult, shell: str = "d", window=None, site_labels=None):
    """:func:`~valband.workflows.describe` with ``n_states`` per atom for grouped channels.

    Uses ``dos.settings["channel_site_counts"]``; on a result without it (a k-mesh DOS)
    this is ``describe`` itself.
    """
    from valband.workflows import describe

    table = describe(dos, shell, window, site_labels)
    counts = dos.settings.get("channel_site_counts")
    if not counts:
        return table
    by_site = {c.site: n for c, n in zip(dos.channel_labels, counts, strict=True)
               if c.shell == shell}
    per_el: dict[str, int] = {}
    for c, n in zip(dos.channel_labels, counts, strict=True):
        if c.shell == shell:
            per_el[c.element] = per_el.get(c.element, 0) + n
    reps = {e: sum(1 for c in dos.channel_labels if c.shell == shell and c.element == e)
            for e in per_el}
    elements = {e: replace(d, n_states=d.n_states * reps[e] / per_el[e])
                for e, d in table.elements.items()}
    sites = {i: replace(d, n_states=d.n_states / by_site[i]) for i, d in table.sites.items()}
    n_atoms = sum(per_el.values())
    cell = replace(table.cell, n_states=table.cell.n_states * len(table.sites) / n_atoms)
    labels = dict(table.site_labels)
    if dos.settings.get("resolve") != "site":
        for i in sites:
            labels.setdefault(i, f"{by_site[i]} sites")
    return replace(table, cell=cell, elements=elements, sites=sites, site_labels=labels)
