"""Band-shape measures of fcc metals and the reference targets the confinement is fitted to.

A parameter set's d band has a *position* (centre) and a *shape* (width, level spacings, the
ratios and distance scaling of the dd integrals). This module measures both on a model of an
fcc metal and reads the reference values (:func:`load_targets`, the file
``valband/data/targets/confinement-targets.toml``, every value with its source).

Level labels (Bouckaert–Smoluchowski–Wigner notation, no spin–orbit coupling) are assigned
from degeneracy and shell character, not from the order of the eigenvalues, so a level that
moves past another keeps its name:

* Γ: Γ1 = lowest level; Γ25′ = the threefold level of d character, Γ12 = the twofold one;
* X: X1 = lowest level; X5 = the highest twofold level of d character; X3 = the second
  non-degenerate level of d character (X1 is the first); X4′ = the non-degenerate level of
  largest p weight with s weight < 0.05 (pure p in fcc);
* L: L1 = lowest level; L3 = the highest twofold level of d character; L2′ = the
  non-degenerate level of largest p weight with s weight < 0.05.

Weights are Mulliken weights c_iν (S c_ν)_i summed over a shell's orbitals. Energies are eV
relative to the Fermi level of the same model.

dd integrals near equilibrium: ratios ddπ/ddσ and ddδ/ddσ at the nearest-neighbour distance
(canonical −6 : 4 : −1 gives −2/3 and 1/6; O. K. Andersen, canonical band theory) and the
local distance exponent n = −d ln|ddσ|/d ln R by a central difference of ±2 % (canonical and
Harrison's universal d–d law R⁻⁵).
"""

from __future__ import annotations

import tomllib
from importlib import resources
from typing import Any

import numpy as np

from valband.errors import InputError

__all__ = [
    "FCC_POINTS",
    "TARGETS_FILE",
    "load_targets",
    "fcc_levels",
    "dd_shape",
    "target_value",
]

#: Fractional coordinates (primitive reciprocal basis of ASE's fcc cell) of Γ, X, L.
FCC_POINTS = {"G": (0.0, 0.0, 0.0), "X": (0.5, 0.0, 0.5), "L": (0.5, 0.5, 0.5)}
#: Reference targets of the confinement fit (package data).
TARGETS_FILE = "data/targets/confinement-targets.toml"
_DEGENERATE = 1e-4  # eV: levels closer than this are one degenerate level


def load_targets() -> dict[str, Any]:
    """Return the reference targets (``{"target": [ {...}, ... ], ...}``).

    Each target has ``element``, ``quantity`` (see :func:`target_value`), ``value``,
    ``tolerance`` (the uncertainty it is weighted by), ``role`` ("fit" or "held-out") and
    ``source``.
    """
    text = resources.files("valband").joinpath(TARGETS_FILE).read_text(encoding="utf-8")
    data = tomllib.loads(text)
    for t in data["target"]:
        for key in ("element", "quantity", "value", "tolerance", "role", "source"):
            if key not in t:
                raise InputError(f"{TARGETS_FILE}: target {t!r} has no {key!r}")
        if t["role"] not in ("fit", "held-out"):
            raise InputError(f"{TARGETS_FILE}: role {t['role']!r}; accepted: fit, held-out")
    return data


def _groups(e: np.ndarray) -> list[np.ndarray]:
    out, start = [], 0
    for i in range(1, len(e) + 1):
        if i == len(e) or e[i] - e[i - 1] > _DEGENERATE:
            out.append(np.arange(start, i))
            start = i
    return out


def _point_levels(model, k, ef: float) -> list[dict[str, float]]:
    import scipy.linalg

    h, s = model.hamiltonian_and_overlap(np.asarray([k], dtype=float))
    hk = h[0]
    sk = s[0] if s is not None else np.eye(hk.shape[0])
    e, c = scipy.linalg.eigh(hk, sk)
    w = np.real(np.conj(c) * (sk @ c))
    shell = {sh: w[model.select(shell=sh)].sum(axis=0) for sh in ("s", "p", "d")}
    levels = []
    for g in _groups(e):
        levels.append({"e": float(e[g].mean() - ef), "deg": len(g),
                       **{sh: float(v[g].mean()) for sh, v in shell.items()}})
    return levels


def _pure_p(levels: list[dict[str, float]]) -> float:
    cand = [lv for lv in levels if lv["deg"] == 1 and lv["s"] < 0.05]
    return max(cand, key=lambda lv: lv["p"])["e"] if cand else float("nan")


def fcc_levels(model, fermi_level: float) -> dict[str, float]:
    """Labelled levels of a one-atom fcc model at Γ, X, L (eV relative to ``fermi_level``).

    Parameters
    ----------
    model : TBModel
        One-atom fcc cell (ASE's primitive cell) with s, p, d orbitals.
    fermi_level : float
        E_F of the model (eV).

    Returns
    -------
    dict
        Γ1, Γ25′, Γ12, X1, X3, X5, X4′, L1, L3, L2′ (keys ``G1 G25p G12 X1 X3 X5 X4p L1 L3
        L2p``); NaN where a level is not found.
    """
    g = _point_levels(model, FCC_POINTS["G"], fermi_level)
    x = _point_levels(model, FCC_POINTS["X"], fermi_level)
    lp = _point_levels(model, FCC_POINTS["L"], fermi_level)
    nan = float("nan")

    def pick(levels, deg, nth=-1):
        c = [lv["e"] for lv in levels if lv["deg"] == deg and lv["d"] > 0.5]
        return c[nth] if c else nan

    x_single = [lv["e"] for lv in x if lv["deg"] == 1 and lv["d"] > 0.3]
    return {
        "G1": g[0]["e"],
        "G25p": pick(g, 3, 0),
        "G12": pick(g, 2, 0),
        "X1": x[0]["e"],
        "X3": x_single[1] if len(x_single) > 1 else nan,
        "X5": pick(x, 2, -1),
        "X4p": _pure_p(x),
        "L1": lp[0]["e"],
        "L3": pick(lp, 2, -1),
        "L2p": _pure_p(lp),
    }


def dd_shape(ps, element: str, distance: float, other: str | None = None) -> dict[str, float]:
    """dd integrals of a pair near a bond length: ddσ (eV), ratios and distance exponent.

    Parameters
    ----------
    ps : ParameterSet
    element, other : str
        The pair (``other`` defaults to ``element``).
    distance : float
        Bond length (Å).

    Returns
    -------
    dict
        ``dds`` (eV), ``pi_sigma`` = ddπ/ddσ, ``delta_sigma`` = ddδ/ddσ, ``exponent`` =
        −d ln|ddσ|/d ln R by central difference over R·(1 ± 0.02).
    """
    from valband.params.model import BOND_INTEGRALS

    b = other or element
    r = distance * np.array([1.0, 0.98, 1.02])
    v = ps.hopping(element, b, r)
    i = {n: BOND_INTEGRALS.index(n) for n in ("dds", "ddp", "ddd")}
    dds = v[:, i["dds"]]
    return {
        "dds": float(dds[0]),
        "pi_sigma": float(v[0, i["ddp"]] / dds[0]),
        "delta_sigma": float(v[0, i["ddd"]] / dds[0]),
        "exponent": float(-np.log(abs(dds[2] / dds[1])) / np.log(1.02 / 0.98)),
    }


def target_value(quantity: str, levels: dict[str, float] | None, dd: dict[str, float] | None,
                 centre: float | None = None) -> float:
    """Model value of a target quantity.

    ``quantity`` is ``level:LABEL`` (a level of :func:`fcc_levels`), ``spacing:A-B`` (level A
    minus level B), ``centre`` (d-band centre, eV), or ``dd:KEY`` (a key of :func:`dd_shape`).
    """
    kind, _, what = quantity.partition(":")
    if kind == "level" and levels is not None:
        return levels[what]
    if kind == "spacing" and levels is not None:
        a, _, b = what.partition("-")
        return levels[a] - levels[b]
    if kind == "centre" and centre is not None:
        return centre
    if kind == "dd" and dd is not None:
        return dd[what]
    raise InputError(f"target quantity {quantity!r}; accepted: level:LABEL, spacing:A-B, centre, "
                     "dd:KEY (with the measurement it needs)")
