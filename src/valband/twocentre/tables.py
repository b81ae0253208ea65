"""Two-centre tables on a distance grid and their parameter sets (TOML format v1).

:func:`pair_table` runs the confined atoms (:mod:`valband.twocentre.confinement`) and the
integrals (:mod:`valband.twocentre.integrals`) for one element pair on a grid of bond
lengths; :func:`parameter_set_dict` turns one or more tables into the dictionary of a
non-orthogonal parameter set with ``law = "spline"`` curves (``valband/params/README.md``),
and :func:`write_parameter_set_toml` validates it with
:meth:`valband.params.ParameterSet.from_dict` and writes it atomically.

Cutoff of each pair (when not given): the shortest tabulated distance beyond which every
|H| < ``hopping_tol`` eV and every |S| < ``overlap_tol``, with a quintic taper over the last
:data:`TAPER_FRACTION` of it. The integrals cut there are below the tolerances, so the taper
changes the model by less than that.
"""

from __future__ import annotations

import json
import os
import tempfile
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

import valband
from valband.errors import SettingsError
from valband.params.model import BOND_INTEGRALS, ParameterSet
from valband.params.toml_writer import dumps

from .confinement import ConfinedAtom, confined_atom
from .integrals import bond_integrals, check_distances
from .quadrature import QuadratureSettings

__all__ = [
    "TAPER_FRACTION",
    "PairTable",
    "pair_table",
    "default_distances",
    "parameter_set_dict",
    "write_parameter_set_toml",
]

#: The taper runs from (1 − TAPER_FRACTION)·outer to outer.
TAPER_FRACTION = 0.1
_FORWARD = ("sss", "sps", "sds", "pps", "ppp", "pds", "pdp", "dds", "ddp", "ddd")
_DIGITS = 9  # decimals kept in the file (eV; 1e-9 eV is far below the quadrature error)


@dataclass(frozen=True, eq=False)
class PairTable:
    """Two-centre integrals of the directed pair first → second on a distance grid.

    Attributes
    ----------
    first, second : str
        Elements (``"sps"`` is s on ``first``, p on ``second``).
    distances : array (n_r,)
        Bond lengths (Å), increasing.
    hopping : array (n_r, 14)
        H integrals (eV), columns in :data:`BOND_INTEGRALS` order, 0 for absent shells.
    overlap : array (n_r, 14)
        S integrals (dimensionless).
    asymmetry : array (n_r, 14)
        Half the difference between the two routes to H (eV), a Hermiticity diagnostic.
    present : array (14,) of bool
        Integrals whose shells both atoms carry.
    atoms : dict
        Element → its :class:`ConfinedAtom` (onsite energies, shells, settings).
    settings : dict
        Method, quadrature and confinement settings (provenance).
    """

    first: str
    second: str
    distances: NDArray[np.float64] = field(repr=False)
    hopping: NDArray[np.float64] = field(repr=False)
    overlap: NDArray[np.float64] = field(repr=False)
    asymmetry: NDArray[np.float64] = field(repr=False)
    present: NDArray[np.bool_] = field(repr=False)
    atoms: dict[str, ConfinedAtom] = field(repr=False)
    settings: dict[str, Any] = field(repr=False)

    @property
    def onsite(self) -> dict[str, dict[str, float]]:
        """Element → {shell: onsite energy (eV, free-atom eigenvalue)}."""
        return {el: atom.onsite_ev() for el, atom in self.atoms.items()}

    def column(self, name: str) -> int:
        """Column of integral ``name`` (one of :data:`BOND_INTEGRALS`)."""
        if name not in BOND_INTEGRALS:
            raise SettingsError(f"unknown integral {name!r}; accepted: {', '.join(BOND_INTEGRALS)}")
        return BOND_INTEGRALS.index(name)


def default_distances(
    first: str, second: str, n: int = 40, lo: float = 0.6, hi: float = 3.2
) -> NDArray[np.float64]:
    """Return a distance grid (Å) for a pair: ``lo``× to ``hi``× the sum of covalent radii."""
    from ase.data import atomic_numbers, covalent_radii

    try:
        rsum = covalent_radii[atomic_numbers[first]] + covalent_radii[atomic_numbers[second]]
    except KeyError as exc:
        raise SettingsError(f"unknown element {exc.args[0]!r}; accepted: element symbols") from None
    return np.linspace(lo * rsum, hi * rsum, n)


def _atom(x: str | ConfinedAtom, options: Mapping[str, Any]) -> ConfinedAtom:
    return x if isinstance(x, ConfinedAtom) else confined_atom(x, **options)


def pair_table(
    first: str | ConfinedAtom,
    second: str | ConfinedAtom,
    distances_angstrom: ArrayLike | Sequence[float] | None = None,
    *,
    quadrature: QuadratureSettings | None = None,
    **atom_options: Any,
) -> PairTable:
    """Two-centre H and S tables of the pair first → second.

    Parameters
    ----------
    first, second : str or ConfinedAtom
        Element symbols (then :func:`confined_atom` runs with ``atom_options``, once for a
        like pair) or ready confined atoms.
    distances_angstrom : array_like (n_r,), optional
        Bond lengths (Å, > 0); sorted here. Default :func:`default_distances`.
    quadrature : QuadratureSettings, optional
        Two-centre grid.
    **atom_options
        Passed to :func:`confined_atom` (``r0``, ``power``, ``relativity``, ``r0_density``,
        ``shell_r0``, ``shells``) for elements given by symbol.

    Returns
    -------
    PairTable
    """
    if atom_options and (isinstance(first, ConfinedAtom) or isinstance(second, ConfinedAtom)):
        raise SettingsError(
            "confined-atom options (" + ", ".join(sorted(atom_options)) + ") apply only to "
            "elements given by symbol; accepted: symbols with options, or ready ConfinedAtom "
            "records without them"
        )
    atom_a = _atom(first, atom_options)
    atom_b = (
        atom_a
        if (not isinstance(second, ConfinedAtom) and second == first)
        else _atom(second, atom_options)
    )
    if distances_angstrom is None:
        distances_angstrom = default_distances(atom_a.symbol, atom_b.symbol)
    d = np.sort(check_distances(distances_angstrom, "Å"))
    q = quadrature or QuadratureSettings()
    bi = bond_integrals(atom_a.site(), atom_b.site(), d, quadrature=q)
    atoms = {atom_a.symbol: atom_a, atom_b.symbol: atom_b}
    return PairTable(
        first=atom_a.symbol,
        second=atom_b.symbol,
        distances=bi.distances,
        hopping=bi.hopping,
        overlap=bi.overlap,
        asymmetry=bi.asymmetry,
        present=bi.present,
        atoms=atoms,
        settings={
            **bi.settings,
            "atoms": {el: a.settings for el, a in atoms.items()},
            "max_asymmetry_eV": float(np.max(np.abs(bi.asymmetry))),
        },
    )


def _auto_cutoff(t: PairTable, hopping_tol: float, overlap_tol: float) -> float:
    big = (np.max(np.abs(t.hopping), axis=1) >= hopping_tol) | (
        np.max(np.abs(t.overlap), axis=1) >= overlap_tol
    )
    if big[-1]:
        k = int(np.argmax(np.abs(t.hopping[-1])))
        raise SettingsError(
            f"pair {t.first}-{t.second}: the table ends at {t.distances[-1]:.3f} Å where "
            f"|{BOND_INTEGRALS[k]}| = {abs(t.hopping[-1, k]):.3g} eV (or an overlap) is still "
            f"above the tolerance ({hopping_tol:g} eV, {overlap_tol:g}); accepted: a distance "
            "grid reaching further, larger tolerances, or an explicit cutoff=(inner, outer) Å"
        )
    last_big = int(np.flatnonzero(big)[-1]) if np.any(big) else 0
    return float(t.distances[last_big + 1])


def _element_entry(atom: ConfinedAtom) -> dict[str, Any]:
    conf = atom.settings["confinement"]
    what = (
        "energy <phi|T + v_free|phi> of the confined {label} basis orbital in the free-atom "
        "potential"
        if atom.settings.get("onsite_rule") == "basis"
        else "free-atom eigenvalue of the {label} level"
    )
    rel_x = (" with MacDonald-Vosko relativistic exchange"
             if atom.settings.get("relativistic_exchange") else "")
    src = (
        f"{what}, {atom.relativity}-relativistic LDA (VWN){rel_x}, configuration "
        f"{atom.configuration}; valband.atom.solve_atom"
    )
    return {
        "shells": list(atom.shells),
        "valence_electrons": {
            "value": atom.valence_electrons,
            "source": "electrons in "
            + " ".join(f"{o.label}{o.occupation:g}" for o in atom.orbitals)
            + " of the neutral ground-state configuration",
        },
        "onsite": {
            o.shell: {
                "value": round(o.onsite_ev, _DIGITS),
                "source": src.format(label=o.label)
                + f" (basis orbital confined with r0 = {conf['r0_orbitals_bohr'][o.shell]:.4g} "
                f"bohr, power {conf['power']:g})",
            }
            for o in atom.orbitals
        },
    }


def _spline(
    r: NDArray[np.float64], v: NDArray[np.float64], digits: int = _DIGITS
) -> dict[str, Any]:
    return {"law": "spline", "r": [float(x) for x in r],
            "v": [round(float(x), digits) for x in v]}  # fmt: skip


def parameter_set_dict(
    tables: Sequence[PairTable],
    *,
    name: str = "twocentre-lda",
    version: str = "0.1",
    description: str | None = None,
    cutoffs: Mapping[str, tuple[float, float]] | None = None,
    hopping_tol: float = 1e-3,
    overlap_tol: float = 1e-4,
    digits: int = _DIGITS,
    extra_provenance: Mapping[str, Any] | None = None,
) -> dict[str, Any]:
    """Parameter-set dictionary (format v1, non-orthogonal, spline laws) from pair tables.

    Parameters
    ----------
    tables : sequence of PairTable
        One per unordered element pair; an element shared by several tables must come from
        the same confined-atom settings (same onsite energies).
    name, version, description : str
        Identification of the set.
    cutoffs : mapping, optional
        ``{"A-B": (inner, outer)}`` in Å for some pairs; others get the automatic cutoff.
    hopping_tol, overlap_tol : float
        Tolerances of the automatic cutoff (eV, dimensionless).
    digits : int
        Decimals kept for the integral values (eV or dimensionless).
    extra_provenance : mapping, optional
        More entries for the set's provenance record (e.g. the generation settings).

    Returns
    -------
    dict
        What the TOML file parses to; :meth:`ParameterSet.from_dict` accepts it.
    """
    if not tables:
        raise SettingsError("need at least one pair table; accepted: a sequence of PairTable")
    elements: dict[str, Any] = {}
    pairs: dict[str, Any] = {}
    provenance: dict[str, Any] = {}
    for t in tables:
        for el, atom in t.atoms.items():
            entry = _element_entry(atom)
            if el in elements and elements[el] != entry:
                raise SettingsError(
                    f"element {el} appears in several tables with different confined atoms "
                    "(onsite energies or shells differ); accepted: one confined atom per element"
                )
            elements[el] = entry
            provenance[el] = atom.settings["confinement"] | {
                "relativity": atom.relativity, "configuration": atom.configuration,
                "onsite_rule": atom.settings.get("onsite_rule", "eigenvalue"),
                "relativistic_exchange": bool(atom.settings.get("relativistic_exchange"))}
        key = f"{t.first}-{t.second}"
        if key in pairs or f"{t.second}-{t.first}" in pairs:
            raise SettingsError(f"pair {key} given twice; accepted: one table per element pair")
        if cutoffs and (key in cutoffs or f"{t.second}-{t.first}" in cutoffs):
            inner, outer = cutoffs.get(key) or cutoffs[f"{t.second}-{t.first}"]
            inner, outer = float(inner), float(outer)
            if not (0 < inner < outer <= float(t.distances[-1])):
                raise SettingsError(
                    f"cutoff of {key} = ({inner}, {outer}) Å; accepted: 0 < inner < outer <= "
                    f"the last tabulated distance {t.distances[-1]:.4g} Å"
                )
        else:
            outer = _auto_cutoff(t, hopping_tol, overlap_tol)
            inner = (1.0 - TAPER_FRACTION) * outer
        names = [
            n for n in BOND_INTEGRALS
            if t.present[BOND_INTEGRALS.index(n)] and (t.first != t.second or n in _FORWARD)
        ]  # fmt: skip
        keep = t.distances <= outer + 1e-9
        nxt = int(np.count_nonzero(keep))
        if nxt < len(t.distances):
            keep[nxt] = True  # one node at or beyond the cutoff
        r = t.distances[keep]
        if r.size < 4:
            raise SettingsError(
                f"pair {key}: only {r.size} tabulated distances up to the cutoff; accepted: at "
                "least 4 (use a finer distance grid)"
            )
        pairs[key] = {
            "source": "two-centre integrals of confined LDA atoms, potential superposition "
            f"(valband.twocentre {valband.__version__}); max route asymmetry "
            f"{t.settings['max_asymmetry_eV']:.2g} eV",
            "cutoff": {"inner": round(inner, 6), "outer": round(outer, 6), "taper": "quintic"},
            "hopping": {n: _spline(r, t.hopping[keep, BOND_INTEGRALS.index(n)], digits)
                        for n in names},
            "overlap": {n: _spline(r, t.overlap[keep, BOND_INTEGRALS.index(n)], digits)
                        for n in names},
        }
    quad = tables[0].settings["quadrature"]
    record = {
        "method": "two-centre integrals (Slater-Koster), potential superposition V_A + V_B of "
        "neutral confined-density atoms; H symmetrised over both atoms' eigen-equations",
        "functional": "; ".join(sorted({str(a.settings.get("functional", "LDA, Slater exchange + "
                                                           "VWN5 correlation"))
                                        for t in tables for a in t.atoms.values()})),
        "confinement": provenance,
        "quadrature": quad,
        "onsite": sorted({a.settings["onsite"] for t in tables for a in t.atoms.values()}),
        "cutoff_rule": {"hopping_tol_eV": hopping_tol, "overlap_tol": overlap_tol,
                        "taper": f"quintic over the last {TAPER_FRACTION:g} of the cutoff"},
        "valband_version": valband.__version__,
        **dict(extra_provenance or {}),
    }
    return {
        "schema_version": 1,
        "name": name,
        "version": version,
        "description": description
        or "first-principles two-centre parameters (confined LDA atoms) for "
        + ", ".join(sorted(elements)),
        "orthogonal": False,
        "provenance": "generated by valband.twocentre: " + json.dumps(record, sort_keys=True),
        "elements": elements,
        "pairs": pairs,
    }


def write_parameter_set_toml(
    path: str | os.PathLike[str], tables: Sequence[PairTable], **options: Any
) -> Path:
    """Validate and write the parameter set of ``tables`` to ``path`` (TOML, atomic rename).

    ``options`` go to :func:`parameter_set_dict`. Returns the path written.
    """
    data = parameter_set_dict(tables, **options)
    ParameterSet.from_dict(data, origin=str(path))  # raises ParameterError if invalid
    target = Path(path)
    text = dumps(data)
    fd, tmp = tempfile.mkstemp(dir=target.parent or Path("."), suffix=".tmp")
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.replace(tmp, target)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return target
