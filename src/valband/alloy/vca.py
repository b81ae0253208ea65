"""Virtual crystal approximation (VCA) for substitutional alloys on a parent lattice.

Every decorated site of the parent becomes one *virtual* site whose parameters are
concentration averages of the components' (Nordheim's virtual crystal; for tight binding
see e.g. Faulkner, Prog. Mater. Sci. 27, 1 (1982), Sec. 2):

onsite energies
    linear in the fractions, ε_v,l = Σ_a x_a ε_a,l, shell by shell (the components must carry
    the same shells);
bond integrals (hopping and, for non-orthogonal sets, overlap)
    the configurational average of the bond: with independent random occupation of the two
    ends, V_vv(r) = Σ_a Σ_b x_a x_b V_{a→b}(r), i.e. for a binary the AA, AB and BB laws with
    weights x_A², 2 x_A x_B (the two directions A→B and B→A averaged) and x_B²; each law keeps
    its own distance dependence and cutoff taper, so the virtual bond follows the distance
    laws under strain. A virtual site bonded to an ordinary site c gets Σ_a x_a V_{a→c}(r);
    the cutoff of a virtual pair is the largest cutoff of its component pairs;
valence electrons
    Σ_a x_a N_a per virtual site.

The model lives on the parent's geometry (give the lattice constant you want, e.g. Vegard's,
:func:`valband.structure.alloys.vegard_lattice_constant`); the orbitals of a virtual site are
labelled with the composition (``element = "Cu0.5Pd0.5"``), so DOS channels and descriptors
carry that label. VCA has no disorder scattering: the bands stay sharp, which is why the CPA
(:mod:`valband.alloy.cpa`) is needed once the onsite energies differ by a fraction of the
bandwidth; to first order in the onsite differences the two agree.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from valband.alloy.components import check_composition, common_shells, composition_label
from valband.conventions import OrbitalLabel
from valband.errors import InputError, StructureError
from valband.structure import Structure
from valband.tb import TBModel, build_model

__all__ = [
    "VirtualElement",
    "VirtualCrystalParameters",
    "VCAScan",
    "binary_compositions",
    "vca_model",
    "vca_scan",
    "vegard_parent",
]


@dataclass(frozen=True)
class VirtualElement:
    """Averaged element record (the protocol :func:`valband.tb.build_model` reads)."""

    symbol: str
    shells: tuple[str, ...]
    onsite: dict[str, float]
    valence_electrons: float
    components: dict[str, float]


class VirtualCrystalParameters:
    """A parameter set in which some structure symbols stand for concentration averages.

    Parameters
    ----------
    params
        The real parameter set (:class:`valband.params.ParameterSet` or the same protocol).
    mixtures
        Structure symbol → composition ``{element: fraction}``; sites carrying that symbol are
        virtual. Symbols not listed are ordinary elements of ``params``.

    The averaging rules are those of the module docstring. Components with fraction 0 are
    skipped in every average (their pairs need not exist in ``params``).
    """

    def __init__(self, params, mixtures: Mapping[str, Mapping[str, float]]) -> None:
        self.base = params
        self.mixtures = {k: check_composition(v, params) for k, v in mixtures.items()}
        self.labels = {k: composition_label(v) for k, v in self.mixtures.items()}
        self.name = f"{params.name} (virtual crystal " + ", ".join(self.labels.values()) + ")"
        self.version = str(params.version)
        self.orthogonal = bool(params.orthogonal)
        self._records = {}
        for key, comp in self.mixtures.items():
            shells = common_shells(comp, params)
            onsite = {
                sh: float(sum(x * params.element(e).onsite[sh] for e, x in comp.items()))
                for sh in shells
            }
            nval = float(sum(x * params.element(e).valence_electrons for e, x in comp.items()))
            self._records[key] = VirtualElement(self.labels[key], shells, onsite, nval, comp)

    def _parts(self, symbol: str) -> list[tuple[str, float]]:
        comp = self.mixtures.get(symbol)
        if comp is None:
            return [(symbol, 1.0)]
        return [(e, x) for e, x in comp.items() if x > 0.0]

    def element(self, symbol: str):
        """Averaged record of a virtual symbol, or the ordinary element record."""
        if symbol in self._records:
            return self._records[symbol]
        return self.base.element(symbol)

    def cutoff(self, a: str, b: str) -> float:
        """Largest outer cutoff (Å) of the component pairs."""
        return max(
            float(self.base.cutoff(ea, eb)) for ea, _ in self._parts(a) for eb, _ in self._parts(b)
        )

    def _average(self, kind: str, a: str, b: str, r):
        rr = np.atleast_1d(np.asarray(r, dtype=np.float64))
        out = None
        for ea, xa in self._parts(a):
            for eb, xb in self._parts(b):
                v = getattr(self.base, kind)(ea, eb, rr)
                if v is None:
                    return None
                term = xa * xb * np.asarray(v, dtype=np.float64)
                out = term if out is None else out + term
        return out

    def hopping(self, a: str, b: str, r):
        """Σ_a Σ_b x_a x_b V_{a→b}(r), shape (len(r), 14), eV."""
        return self._average("hopping", a, b, r)

    def overlap(self, a: str, b: str, r):
        """Average the overlap integrals the same way, or None for an orthogonal set."""
        if self.orthogonal:
            return None
        return self._average("overlap", a, b, r)


def _virtual_keys(parent: Structure, sublattice: str | None) -> list[str]:
    if sublattice is None:
        return list(parent.elements)
    if sublattice not in parent.elements:
        raise StructureError(
            f"sublattice {sublattice!r}: the parent ({parent.formula}) has no such sites; "
            f"accepted: one of {', '.join(parent.elements)} or None (all sites)"
        )
    return [sublattice]


def vca_model(
    parent: Structure,
    composition: Mapping[str, float],
    params,
    *,
    sublattice: str | None = None,
) -> TBModel:
    """Tight-binding model of the virtual crystal on the parent lattice.

    Parameters
    ----------
    parent
        The lattice (its symbols only mark sublattices; the geometry is used as given, Å).
    composition
        ``{element: fraction}`` of the disordered sites, summing to 1 (zeros allowed).
    params
        Parameter set with every component and every component pair.
    sublattice
        Make only the parent sites of this symbol virtual (default: every site).

    Returns
    -------
    TBModel
        One virtual site per decorated parent site; its orbitals carry the composition label
        as element (e.g. ``"Cu0.5Pd0.5"``); ``n_electrons`` is the averaged count.
    """
    keys = _virtual_keys(parent, sublattice)
    vparams = VirtualCrystalParameters(params, {k: composition for k in keys})
    model = build_model(parent, vparams)
    label = composition_label(vparams.mixtures[keys[0]])
    virtual = set(keys)
    orbitals = tuple(
        OrbitalLabel(o.site, label, o.shell, o.orbital) if parent.symbols[o.site] in virtual else o
        for o in model.orbitals
    )
    site_labels = tuple(
        f"{label}:{i}" if s in virtual else lab
        for i, (s, lab) in enumerate(zip(parent.symbols, parent.labels, strict=True))
    )
    where = "" if sublattice is None else f" on sublattice {sublattice}"
    structure = Structure(
        cell=parent.cell,
        positions=parent.positions,
        symbols=parent.symbols,
        labels=site_labels,
        source=f"{parent.source} virtual crystal {label}{where}",
    )
    return dataclasses.replace(model, orbitals=orbitals, structure=structure)


def binary_compositions(a: str, b: str, x: Sequence[float]) -> list[dict[str, float]]:
    """Compositions A_{1−x} B_x for each x (fraction of ``b``), for the scans."""
    out = []
    for xi in np.asarray(x, dtype=float).ravel():
        if not (0.0 <= xi <= 1.0):
            raise InputError(f"fraction x = {xi:g} of {b}: accepted 0 ≤ x ≤ 1")
        out.append({a: 1.0 - float(xi), b: float(xi)})
    if not out:
        raise InputError("no fractions given for the composition scan")
    return out


def vegard_parent(lattice: str, composition: Mapping[str, float]) -> Structure:
    """One-site (two for hcp) parent cell at Vegard's lattice constant of the composition.

    Uses :func:`valband.structure.alloys.vegard_lattice_constant` (see its docstring for the
    per-element reference constants); Vegard's law is an approximation (up to a few per cent).
    """
    from ase.build import bulk

    from valband.structure.alloys import vegard_lattice_constant

    comp = {e: x for e, x in check_composition(composition).items() if x > 0}
    a, c = vegard_lattice_constant(comp, lattice)
    kwargs = {"a": a} if c is None else {"a": a, "c": c}
    atoms = bulk(next(iter(comp)), lattice, **kwargs)
    src = f"{lattice} a={a:.6g}" + ("" if c is None else f" c={c:.6g}")
    return Structure.from_atoms(atoms, source=f"{src} (Vegard, {composition_label(comp)})")


@dataclass(frozen=True)
class VCAScan:
    """Descriptors of a composition scan.

    Attributes
    ----------
    compositions : tuple of dict
    fermi_levels : ndarray (n,), eV (absolute)
    n_electrons : ndarray (n,), electrons per cell
    descriptors : tuple of BandDescriptors, one per composition (cell average of ``shell``)
    lattice_constants : tuple of float or None (Å, first cell-vector length; None if fixed)
    shell : str
    """

    compositions: tuple[dict[str, float], ...]
    fermi_levels: np.ndarray
    n_electrons: np.ndarray
    descriptors: tuple
    lattice_constants: tuple
    shell: str

    def to_dict(self) -> dict:
        """JSON-ready rows."""
        return {
            "method": "virtual crystal",
            "shell": self.shell,
            "rows": [
                {
                    "composition": c,
                    "fermi_level_eV": float(ef),
                    "n_electrons": float(n),
                    "cell_vector_A": a,
                    **d.to_dict(),
                }
                for c, ef, n, d, a in zip(
                    self.compositions, self.fermi_levels, self.n_electrons, self.descriptors,
                    self.lattice_constants, strict=True,
                )
            ],
        }


def vca_scan(
    parent: Structure | str,
    compositions: Sequence[Mapping[str, float]],
    params,
    settings=None,
    *,
    shell: str = "d",
    window: tuple[float, float] | None = None,
) -> VCAScan:
    """d-band (or ``shell``) descriptors of the virtual crystal for each composition.

    Parameters
    ----------
    parent
        A :class:`Structure` (fixed geometry for every composition) or a lattice name
        ("fcc", "bcc", "hcp", "sc"): then each composition gets Vegard's lattice constant
        (:func:`vegard_parent`).
    compositions
        Sequence of ``{element: fraction}`` (see :func:`binary_compositions`).
    params, settings
        Parameter set and :class:`valband.workflows.DOSSettings`.
    shell, window
        As for :func:`valband.workflows.describe`.
    """
    from valband.workflows import DOSSettings, compute_dos, describe

    s = settings or DOSSettings()
    comps, efs, nels, descs, consts = [], [], [], [], []
    if not compositions:
        raise InputError("no compositions given for the scan")
    for comp in compositions:
        comp = check_composition(comp, params)
        if isinstance(parent, str):
            cell = vegard_parent(parent, comp)
            consts.append(float(np.linalg.norm(cell.cell[0])))
        else:
            cell = parent
            consts.append(None)
        res = compute_dos(vca_model(cell, comp, params), s)
        comps.append(comp)
        efs.append(res.fermi_level)
        nels.append(res.n_electrons)
        descs.append(describe(res, shell, window).cell)
    return VCAScan(tuple(comps), np.array(efs), np.array(nels), tuple(descs), tuple(consts), shell)
