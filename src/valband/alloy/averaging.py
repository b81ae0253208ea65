"""Configuration averages of random alloys: mean DOS, per-configuration descriptors, spread.

A random alloy's observables are averages over its configurations. Each configuration of
:func:`valband.structure.random_configurations` (independent seeds derived from one master
seed, all recorded) is a supercell whose DOS is computed with the same settings; then

mean DOS
    per lattice site: every configuration's DOS divided by its number of sites, on the
    energy axis E − E_F of that configuration (each keeps its own Fermi level), put on one
    common grid (linear interpolation; zero beyond a configuration's range, which already
    extends past its bands) and averaged. The channels are per element and shell (summed
    over that element's sites, per lattice site), labelled ``Channel(0, element, shell)``,
    so :func:`valband.workflows.describe` reads them as a one-site cell: the element curves
    are the partial DOS per lattice site (x_a ρ_a), the descriptors those of ρ_a.
spread
    the descriptors of each configuration (cell average and per element) and, per
    descriptor, the mean and the sample standard deviation (ddof = 1; 0 for one
    configuration) over configurations; the standard deviation of the total DOS per energy.

Γ-only supercells (mesh 1, or "1x1x1") are diagonalised in real arithmetic: at k = 0 every
Bloch phase is 1, so H(Γ) is real symmetric with real orbitals (exact, and several times
faster than the complex solver).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.errors import InputError
from valband.kspace import parse_mesh
from valband.results import Channel, DOSResult
from valband.structure import Structure, random_configurations
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos, describe

__all__ = [
    "DESCRIPTOR_FIELDS",
    "ConfigurationAverage",
    "average_dos",
    "configuration_average",
    "descriptor_statistics",
]

#: Descriptors whose mean and spread are reported.
DESCRIPTOR_FIELDS = ("centre", "width", "filling", "skewness", "kurtosis", "upper_edge")


class _RealAtGamma:
    """A model view whose H(k), S(k) are returned real when every k is Γ (exact there)."""

    def __init__(self, model) -> None:
        self._model = model

    def __getattr__(self, name):
        return getattr(self._model, name)

    def hamiltonian_and_overlap(self, kpts):
        h, s = self._model.hamiltonian_and_overlap(kpts)
        if np.all(np.asarray(kpts) == 0.0):
            h = np.ascontiguousarray(h.real)
            s = None if s is None else np.ascontiguousarray(s.real)
        return h, s


def _gamma_only(settings: DOSSettings) -> bool:
    mesh = parse_mesh(settings.mesh)
    return mesh == (1, 1, 1)


def average_dos(results: Sequence[DOSResult], note: str = "") -> tuple[DOSResult, NDArray]:
    """Mean DOS per lattice site of several results, and the std of the total per energy.

    See the module docstring for the grid and channel conventions. All results must share the
    energy step.
    """
    if not results:
        raise InputError("no DOS results to average")
    step = results[0].step
    if any(abs(r.step - step) > 1e-9 * step for r in results):
        raise InputError("the DOS results to average have different energy steps")
    lo = min(float(r.energies[0]) for r in results)
    hi = max(float(r.energies[-1]) for r in results)
    n = int(round((hi - lo) / step)) + 1
    grid = lo + step * np.arange(n)
    keys: dict[tuple, None] = {}
    for r in results:
        for c in r.channel_labels:
            keys[(c.element, c.shell, c.orbital)] = None
    index = {k: i for i, k in enumerate(keys)}
    totals = np.zeros((len(results), n))
    chans = np.zeros((len(keys), n))
    n_el = []
    for ir, r in enumerate(results):
        per = 1.0 / r.n_sites
        totals[ir] = per * np.interp(grid, r.energies, r.total, left=0.0, right=0.0)
        for c, row in zip(r.channel_labels, r.channels, strict=True):
            chans[index[(c.element, c.shell, c.orbital)]] += per * np.interp(
                grid, r.energies, row, left=0.0, right=0.0
            )
        n_el.append(r.n_electrons / r.n_sites)
    chans /= len(results)
    labels = tuple(Channel(0, e, sh, o) for e, sh, o in keys)
    spread = totals.std(axis=0, ddof=1) if len(results) > 1 else np.zeros(n)
    settings = dict(results[0].settings)
    settings.update(
        averaged_over=len(results),
        normalisation="per lattice site; each configuration on its own E - E_F axis",
        fermi_levels_eV=[r.fermi_level for r in results],
        note=note,
    )
    mean = DOSResult(
        energies=grid,
        total=totals.mean(axis=0),
        channels=chans,
        channel_labels=labels,
        fermi_level=float(np.mean([r.fermi_level for r in results])),
        n_electrons=float(np.mean(n_el)),
        n_sites=1,
        settings=settings,
        provenance=dict(results[0].provenance),
    )
    return mean, spread


def descriptor_statistics(rows: Sequence[dict]) -> dict:
    """Mean and sample std (ddof = 1) of each descriptor over the rows of a table.

    ``rows[i]["descriptors"]`` = {"cell": {...}, "elements": {el: {...}}}.
    """
    out: dict = {"cell": {}, "elements": {}}

    def stats(values):
        v = np.asarray(values, dtype=float)
        return {"mean": float(v.mean()), "std": float(v.std(ddof=1)) if len(v) > 1 else 0.0,
                "n": int(len(v))}  # fmt: skip

    for f in DESCRIPTOR_FIELDS:
        out["cell"][f] = stats([r["descriptors"]["cell"][f] for r in rows])
    elements = dict.fromkeys(e for r in rows for e in r["descriptors"]["elements"])
    for e in elements:
        vals = [r["descriptors"]["elements"][e] for r in rows if e in r["descriptors"]["elements"]]
        out["elements"][e] = {f: stats([v[f] for v in vals]) for f in DESCRIPTOR_FIELDS}
    out["fermi_level_eV"] = stats([r["fermi_level_eV"] for r in rows])
    return out


@dataclass(frozen=True, eq=False)
class ConfigurationAverage:
    """Result of :func:`configuration_average`.

    Attributes
    ----------
    mean : DOSResult (per lattice site, channels per element and shell)
    total_std : (n_e,) sample std of the total DOS per site over configurations
    rows : tuple of dict, one per configuration (index, seed, counts, fermi_level_eV,
        descriptors {"cell", "elements"})
    statistics : dict, :func:`descriptor_statistics` of the rows
    mean_descriptors : DescriptorTable of the mean DOS
    seeds : tuple of int; master_seed : int
    info : dict (composition, supercell, parent, shell, window)
    """

    mean: DOSResult
    total_std: NDArray[np.float64]
    rows: tuple[dict, ...]
    statistics: dict
    mean_descriptors: object
    seeds: tuple[int, ...]
    master_seed: int
    info: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        """JSON-ready summary (without the curves)."""
        return {
            "method": "configuration average",
            "master_seed": self.master_seed,
            "seeds": list(self.seeds),
            "configurations": list(self.rows),
            "statistics": self.statistics,
            "descriptors_of_mean_dos": self.mean_descriptors.to_dict(),
            **self.info,
        }


def configuration_average(
    parent: Structure,
    composition: Mapping[str, float],
    params,
    supercell=1,
    *,
    n_configs: int,
    seed: int,
    settings: DOSSettings | None = None,
    shell: str = "d",
    window: tuple[float, float] | None = None,
    sublattice: str | None = None,
    progress: bool = False,
) -> ConfigurationAverage:
    """DOS and descriptors of a random alloy averaged over ``n_configs`` configurations.

    Parameters
    ----------
    parent, composition, supercell, sublattice
        As for :func:`valband.structure.random_configurations`.
    params
        Parameter set for :func:`valband.tb.build_model`.
    n_configs, seed
        Number of configurations and the master seed (per-configuration seeds derived from it
        and recorded).
    settings
        DOS settings for every configuration (mesh of the *supercell*).
    shell, window
        Descriptors as in :func:`valband.workflows.describe`.
    """
    s = settings or DOSSettings()
    s.validate()
    real = _gamma_only(s)
    results, rows, seeds = [], [], []
    for conf in random_configurations(
        parent, composition, supercell, n_configs=n_configs, seed=seed, sublattice=sublattice
    ):
        model = build_model(conf.structure, params)
        res = compute_dos(_RealAtGamma(model) if real else model, s, progress=progress)
        table = describe(res, shell, window)
        results.append(res)
        seeds.append(conf.seed)
        rows.append({
            "index": conf.index,
            "seed": conf.seed,
            "counts": {e: conf.structure.symbols.count(e) for e in conf.structure.elements},
            "n_sites": conf.structure.n_sites,
            "fermi_level_eV": res.fermi_level,
            "descriptors": {
                "cell": table.cell.to_dict(),
                "elements": {e: d.to_dict() for e, d in table.elements.items()},
            },
        })  # fmt: skip
    mean, spread = average_dos(results, note=f"master seed {seed}, seeds {seeds}")
    return ConfigurationAverage(
        mean=mean,
        total_std=spread,
        rows=tuple(rows),
        statistics=descriptor_statistics(rows),
        mean_descriptors=describe(mean, shell, window),
        seeds=tuple(seeds),
        master_seed=int(seed),
        info={
            "composition": dict(composition),
            "supercell": np.asarray(supercell).tolist(),
            "parent": parent.source,
            "shell": shell,
            "window_eV": None if window is None else list(window),
            "real_gamma_solver": real,
        },
    )
