"""Refine a parameter set against reference band energies (scipy least squares).

Free parameters (chosen with ``FitSettings.free``; all are changes to the starting set):

``"onsite"``    an additive shift δε (eV) of each onsite energy, per element and shell of the
                structure. With a free alignment shift (the default) a uniform change of all
                onsite energies is (almost) a rigid shift of the bands, so the first shell of the
                first element is held fixed.
``"scale"``     a factor λ on the *hopping* integrals, per element pair and integral class. The
                classes are the unordered shell pairs ss, sp, sd, pp, pd, dd (σ, π, δ of a class
                and, for unlike pairs, e.g. sps and pss share λ), or every stored integral on its
                own with ``classes="integral"``. Overlap integrals are not changed.
``"exponent"``  a change Δn of the distance law, V(r) → V(r)·(r_ref/r)^Δn with r_ref the
                shortest bond of that pair in the structure, per pair and class like ``scale``.
                Power laws absorb it exactly (n → n + Δn); spline and shell tables are rescaled
                at their nodes; exponential laws refuse it.

Confinement radii are not fitted: they would need new two-centre tables at every step.

Alignment: the reference energies carry an arbitrary zero, so the fit compares
E_model − (E_ref + c) with c the weighted mean difference (``shift="free"``, eliminated in closed
form at every step) or a fixed c (``shift="fixed"``, ``shift_value`` eV).

Bands: reference band ``reference_skip + j`` is compared with model band ``model_first + j``
(both sorted at each k-point) for as many j as both have. Weights: per band (file or
``band_weights``), per k-point, and an energy window (reference energies relative to the
reference Fermi level when the file gives one, else on the file's scale); the residual of one
energy is sqrt(w_band·w_k)·(E_model − E_ref − c).

Method: :func:`scipy.optimize.least_squares` (trust-region reflective, bounds, finite-difference
Jacobian). During the fit the factors multiply the evaluated integrals; the refined set writes
the same change into each law (exact for power laws and shell tables, at the nodes for splines),
and the final residuals reported are those of the written set, rebuilt from scratch.

Units: eV, Å. Reference: Slater & Koster, Phys. Rev. 94, 1498 (1954) (integral classes).
"""

from __future__ import annotations

import copy
import dataclasses
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from valband.errors import CalculationError, ParameterError, SettingsError
from valband.params.model import BOND_INTEGRALS, REVERSED_PARTNER, ParameterSet
from valband.params.reference_bands import ReferenceBands

__all__ = [
    "FREE_KINDS",
    "FitSettings",
    "FitParameter",
    "BandResidual",
    "FitResult",
    "fit_parameter_set",
    "subset_parameter_set",
    "adjusted_parameter_dict",
    "model_bands",
    "plot_fit",
]

#: Kinds of free parameters.
FREE_KINDS: tuple[str, ...] = ("onsite", "scale", "exponent")
_CLASSES = ("ss", "sp", "sd", "pp", "pd", "dd")
_LIKE_FORWARD = {"pss": "sps", "dss": "sds", "dps": "pds", "dpp": "pdp"}
_SHELL_ORDER = "spd"
_ORBITALS_OF = {"s": [0], "p": [1, 2, 3], "d": [4, 5, 6, 7, 8]}


def integral_class(name: str) -> str:
    """Unordered shell pair of an integral name (``"pds"`` → ``"pd"``, ``"dps"`` → ``"pd"``)."""
    a, b = sorted(name[:2], key=_SHELL_ORDER.index)
    return a + b


@dataclass(frozen=True)
class FitSettings:
    """Settings of a band fit (all recorded in the result).

    Attributes
    ----------
    free : tuple of str
        Kinds of free parameters, a subset of :data:`FREE_KINDS`.
    classes : {"class", "integral"}
        One scale/exponent per integral class (ss … dd) or per stored integral.
    window : (float, float) or None
        Reference energies fitted (eV, relative to the reference Fermi level if given).
    shift : {"free", "fixed"}
        Alignment of the reference energy zero; ``shift_value`` (eV) when fixed.
    reference_skip, model_first : int
        Lowest reference bands skipped; model band matched with the first used reference band.
    band_weights : sequence of float or None
        Overrides the reference file's band weights (one per reference band).
    onsite_bound : float
        |δε| ≤ this (eV).
    scale_bounds : (float, float)
        Bounds of λ.
    exponent_bound : float
        |Δn| ≤ this.
    max_evaluations : int
        Largest number of residual evaluations (scipy's ``max_nfev``).
    tolerance : float
        ``ftol`` = ``xtol`` of scipy's least squares.
    """

    free: tuple[str, ...] = ("onsite", "scale")
    classes: str = "class"
    window: tuple[float, float] | None = None
    shift: str = "free"
    shift_value: float = 0.0
    reference_skip: int = 0
    model_first: int = 0
    band_weights: tuple[float, ...] | None = None
    onsite_bound: float = 3.0
    scale_bounds: tuple[float, float] = (0.5, 1.5)
    exponent_bound: float = 3.0
    max_evaluations: int = 400
    tolerance: float = 1e-8

    def validate(self) -> None:
        """Raise :class:`SettingsError` naming the first bad setting."""
        bad = [f for f in self.free if f not in FREE_KINDS]
        if bad or not self.free or len(set(self.free)) != len(self.free):
            raise SettingsError(f"free parameters {self.free!r}; accepted: a non-empty subset "
                                f"of {', '.join(FREE_KINDS)} without repeats")
        if self.classes not in ("class", "integral"):
            raise SettingsError(f"classes {self.classes!r}; accepted: 'class' or 'integral'")
        if self.shift not in ("free", "fixed"):
            raise SettingsError(f"shift {self.shift!r}; accepted: 'free' or 'fixed'")
        if not math.isfinite(self.shift_value):
            raise SettingsError("shift_value must be a finite number of eV")
        if self.window is not None:
            lo, hi = (float(x) for x in self.window)
            if not (math.isfinite(lo) and math.isfinite(hi) and lo < hi):
                raise SettingsError(
                    f"window {self.window!r}; accepted: (emin, emax) eV with emin < emax")
        for name in ("reference_skip", "model_first"):
            v = getattr(self, name)
            if not (isinstance(v, int) and v >= 0):
                raise SettingsError(f"{name} = {v!r}; accepted: an integer >= 0")
        lo, hi = self.scale_bounds
        if not (0 < lo < 1 < hi and math.isfinite(hi)):
            raise SettingsError(f"scale_bounds {self.scale_bounds!r}; accepted: 0 < low < 1 < high")
        if not (self.onsite_bound > 0 and self.exponent_bound > 0):
            raise SettingsError("onsite_bound and exponent_bound must be > 0")
        if not (isinstance(self.max_evaluations, int) and self.max_evaluations >= 1):
            raise SettingsError(f"max_evaluations = {self.max_evaluations!r}; accepted: >= 1")
        if not (0 < self.tolerance < 1):
            raise SettingsError(f"tolerance = {self.tolerance!r}; accepted: 0 < tolerance < 1")


@dataclass(frozen=True)
class FitParameter:
    """One free parameter: kind, what it acts on, start, result and bounds."""

    kind: str
    target: str
    initial: float
    value: float
    lower: float
    upper: float

    @property
    def at_bound(self) -> bool:
        """True when the result sits on a bound (the fit wanted to go further)."""
        span = self.upper - self.lower
        return min(self.value - self.lower, self.upper - self.value) < 1e-6 * span

    def to_dict(self) -> dict[str, Any]:
        """JSON form."""
        return dataclasses.asdict(self) | {"at_bound": self.at_bound}


@dataclass(frozen=True)
class BandResidual:
    """Residual statistics of one reference band (eV)."""

    reference_band: int
    model_band: int
    n_points: int
    weight: float
    rms_initial: float
    rms: float
    max_abs: float

    def to_dict(self) -> dict[str, Any]:
        """JSON form."""
        return dataclasses.asdict(self)


@dataclass(frozen=True, eq=False)
class FitResult:
    """Outcome of :func:`fit_parameter_set`.

    Attributes
    ----------
    parameter_set : ParameterSet
        The refined set (only the structure's elements).
    data : dict
        Its file dictionary (what the TOML holds).
    parameters : tuple of FitParameter
    bands : tuple of BandResidual
    shift : float
        Alignment c (eV): model ≈ reference + c.
    rms_initial, rms : float
        Weighted RMS residual before and after (eV).
    converged : bool
        scipy reported convergence (status > 0).
    status : int
    message : str
    evaluations : int
    kpoints : array (n_k, 3)
    reference, initial_model, model : arrays (n_k, n_used)
        Matched energies (eV): reference + c, the starting and the refined model.
    mask : array (n_k, n_used) of bool
        Energies that entered the fit (window, weight > 0).
    settings : FitSettings
    """

    parameter_set: ParameterSet
    data: dict[str, Any] = field(repr=False)
    parameters: tuple[FitParameter, ...]
    bands: tuple[BandResidual, ...]
    shift: float
    rms_initial: float
    rms: float
    converged: bool
    status: int
    message: str
    evaluations: int
    kpoints: NDArray[np.float64] = field(repr=False)
    reference: NDArray[np.float64] = field(repr=False)
    initial_model: NDArray[np.float64] = field(repr=False)
    model: NDArray[np.float64] = field(repr=False)
    mask: NDArray[np.bool_] = field(repr=False)
    settings: FitSettings = field(repr=False)

    def to_dict(self) -> dict[str, Any]:
        """JSON-serialisable report."""
        return {
            "converged": self.converged, "status": self.status, "message": self.message,
            "evaluations": self.evaluations, "shift_eV": self.shift,
            "rms_initial_eV": self.rms_initial, "rms_eV": self.rms,
            "parameters": [p.to_dict() for p in self.parameters],
            "bands": [b.to_dict() for b in self.bands],
            "settings": dataclasses.asdict(self.settings),
        }  # fmt: skip


# ------------------------------------------------------------------------- set editing
def subset_parameter_set(params: ParameterSet, elements: Sequence[str]) -> dict[str, Any]:
    """File dictionary of ``params`` restricted to ``elements`` and the pairs among them."""
    els = list(dict.fromkeys(elements))
    for e in els:
        params.element(e)
    d = params.to_dict()
    d["elements"] = {e: d["elements"][e] for e in els}
    d["pairs"] = {k: v for k, v in d["pairs"].items() if set(k.split("-")) <= set(els)}
    return d


def _param_key(kind: str, pair: str, name: str, classes: str) -> str:
    return f"{kind}:{pair}:{integral_class(name) if classes == 'class' else name}"


def adjusted_parameter_dict(
    base: dict[str, Any],
    onsite: dict[tuple[str, str], float],
    scale: dict[str, float],
    exponent: dict[str, float],
    r_ref: dict[str, float],
    classes: str = "class",
    note: str = "",
) -> dict[str, Any]:
    """Apply onsite shifts and hopping scale/exponent changes to a set's file dictionary.

    ``onsite`` maps (element, shell) → δε (eV); ``scale`` and ``exponent`` map
    ``"scale:A-B:cls"`` / ``"exponent:A-B:cls"`` → λ / Δn (missing keys: 1 / 0), with cls an
    integral class or name per ``classes``; ``r_ref`` maps ``"A-B"`` → r_ref (Å).
    """
    d = copy.deepcopy(base)
    for (el, sh), delta in onsite.items():
        entry = d["elements"][el]["onsite"][sh]
        entry["value"] = float(entry["value"]) + float(delta)
        if delta:
            entry["source"] = f"{entry['source']}; {delta:+.6f} eV from a band fit{note}"
    for key, pair in d["pairs"].items():
        a, b = key.split("-")
        for name, law in pair["hopping"].items():
            lam = scale.get(_param_key("scale", key, name, classes), 1.0)
            dn = exponent.get(_param_key("exponent", key, name, classes), 0.0)
            if lam == 1.0 and dn == 0.0:
                continue
            ref = r_ref.get(key, 1.0)
            kind = law["law"]
            if kind == "power":
                law["v0"] = lam * law["v0"] * (ref / law["r0"]) ** dn
                law["n"] = law["n"] + dn
                if not 0 <= law["n"] <= 20:
                    raise ParameterError(f"pairs.{key}.hopping.{name}: fitted exponent "
                                         f"{law['n']:.3g} leaves the range 0-20")
            elif kind == "spline":
                r = np.asarray(law["r"], dtype=float)
                law["v"] = [float(v) for v in lam * np.asarray(law["v"]) * (ref / r) ** dn]
            elif kind == "shells":
                law["shells"] = [[s[0], lam * s[1] * (ref / s[0]) ** dn] for s in law["shells"]]
            elif dn == 0.0:
                law["v0"] = lam * law["v0"]
            else:
                raise ParameterError(f"pairs.{key}.hopping.{name}: an exponent change cannot "
                                     "be written into an exponential law; accepted: fit "
                                     "'exponent' only for power, spline or shell laws")
            change = f"; scaled by {lam:.6f}"
            if dn:
                change += f", distance exponent {dn:+.4f} about {ref:.4f} A"
            law["source"] = (law.get("source") or pair["source"]) + change + f" in a band fit{note}"
    return d


# ------------------------------------------------------------------------- evaluator
class _Evaluator:
    """Fast band energies of one structure under parameter changes (bond list built once).

    ``r_ref`` (optional, pair key → Å) fixes the distance about which exponent changes act
    (default: the pair's shortest bond in the structure).
    """

    def __init__(self, structure, params: ParameterSet, settings: FitSettings,
                 r_ref: dict[str, float] | None = None):
        from valband.tb import build_model

        self.structure = structure
        self.params = params
        self.settings = settings
        self.base = build_model(structure, params)
        m = self.base
        sym = structure.symbols
        self.bond_pairs = []
        self.dist = np.linalg.norm(m.bond_vectors, axis=1)
        h0 = np.zeros((m.n_bonds, len(BOND_INTEGRALS)))
        groups: dict[tuple[str, str], list[int]] = {}
        for b in range(m.n_bonds):
            groups.setdefault((sym[m.bond_first[b]], sym[m.bond_second[b]]), []).append(b)
        self.groups = {k: np.array(v, dtype=np.int64) for k, v in groups.items()}
        for (a, b), idx in self.groups.items():
            h0[idx] = params.hopping(a, b, self.dist[idx])
        self.h0 = h0
        self.r_ref = {}
        self.columns: dict[tuple[str, str], list[tuple[int, str]]] = {}
        for (a, b), idx in self.groups.items():
            pair = params.pair(a, b)
            key = pair.key
            self.r_ref[key] = min(self.r_ref.get(key, np.inf), float(self.dist[idx].min()))
            cols = []
            for k, name in enumerate(BOND_INTEGRALS):
                if not np.any(h0[idx, k] != 0):
                    continue
                stored = name if (a, b) == (pair.first, pair.second) else REVERSED_PARTNER[name]
                if pair.first == pair.second:
                    stored = _LIKE_FORWARD.get(stored, stored)
                cols.append((k, stored))
            self.columns[(a, b)] = cols
        if r_ref is not None:  # exponent changes about given distances (A-B key -> Å)
            self.r_ref.update(r_ref)
        self.local = {}
        for el in structure.elements:
            rec = params.element(el)
            self.local[el] = np.array([i for sh in rec.shells for i in _ORBITALS_OF[sh]])
        self.orbital_keys = [(o.element, o.shell) for o in m.orbitals]

    def keys(self) -> list[tuple[str, str, float, float, float]]:
        """(kind, target, start, lower, upper) of every free parameter."""
        s = self.settings
        out = []
        if "onsite" in s.free:
            seen = list(dict.fromkeys(self.orbital_keys))
            if s.shift == "free":
                seen = seen[1:]
            out += [("onsite", f"{el}:{sh}", 0.0, -s.onsite_bound, s.onsite_bound)
                    for el, sh in seen]
        pair_keys = []
        for (a, b), cols in self.columns.items():
            key = self.params.pair(a, b).key
            for _k, stored in cols:
                pk = _param_key("scale", key, stored, s.classes).split(":", 1)[1]
                if pk not in pair_keys:
                    pair_keys.append(pk)
        if "scale" in s.free:
            out += [("scale", pk, 1.0, *s.scale_bounds) for pk in pair_keys]
        if "exponent" in s.free:
            out += [("exponent", pk, 0.0, -s.exponent_bound, s.exponent_bound)
                    for pk in pair_keys]
        return out

    def model(self, onsite, scale, exponent):
        """Return a TBModel with the changes applied to the evaluated integrals."""
        from valband.tb.slater_koster import sk_blocks

        m = self.base
        s = self.settings
        eps = m.onsite + np.array([onsite.get(k, 0.0) for k in self.orbital_keys])
        blocks = list(m.bond_hamiltonian)
        for (a, b), idx in self.groups.items():
            key = self.params.pair(a, b).key
            v = self.h0[idx].copy()
            r = self.dist[idx]
            for k, stored in self.columns[(a, b)]:
                lam = scale.get(_param_key("scale", key, stored, s.classes), 1.0)
                dn = exponent.get(_param_key("exponent", key, stored, s.classes), 0.0)
                v[:, k] *= lam * (self.r_ref[key] / r) ** dn
            full = sk_blocks(m.bond_vectors[idx] / r[:, None], v)
            cut = full[:, self.local[a]][:, :, self.local[b]]
            for n, ib in enumerate(idx):
                blocks[ib] = cut[n]
        return dataclasses.replace(m, onsite=eps, bond_hamiltonian=tuple(blocks))


#: Public name of the evaluator (used by :mod:`valband.params.orthogonal`).
BandEvaluator = _Evaluator


def model_bands(model, kpoints: NDArray[np.float64]) -> NDArray[np.float64]:
    """Sorted eigenvalues (n_k, n_orbitals) of a model at fractional k-points (eV)."""
    h, s = model.hamiltonian_and_overlap(np.asarray(kpoints, dtype=float))
    if s is None:
        e = np.linalg.eigvalsh(h)
    else:
        try:
            chol = np.linalg.cholesky(s)
        except np.linalg.LinAlgError:
            raise CalculationError(
                "the overlap matrix is not positive definite at a reference k-point; accepted: "
                "a parameter set with a valid overlap") from None
        inv = np.linalg.inv(chol)
        e = np.linalg.eigvalsh(inv @ h @ np.conj(np.swapaxes(inv, 1, 2)))
    if not np.all(np.isfinite(e)):
        raise CalculationError("the model gives non-finite band energies")
    return e


def _split(keys, x):
    onsite, scale, exponent = {}, {}, {}
    for (kind, target, *_), v in zip(keys, x, strict=True):
        if kind == "onsite":
            el, sh = target.split(":")
            onsite[(el, sh)] = float(v)
        elif kind == "scale":
            scale[f"scale:{target}"] = float(v)
        else:
            exponent[f"exponent:{target}"] = float(v)
    return onsite, scale, exponent


def fit_parameter_set(
    params: ParameterSet, structure, reference: ReferenceBands, settings: FitSettings | None = None
) -> FitResult:
    """Refine ``params`` so that the model bands of ``structure`` match ``reference``.

    Parameters
    ----------
    params : ParameterSet
        Starting set (must cover the structure's elements and pairs).
    structure : valband.structure.Structure
        Cell in which the reference k-points are fractional coordinates.
    reference : ReferenceBands
        Target energies (eV).
    settings : FitSettings, optional

    Returns
    -------
    FitResult
        Also when the fit did not converge (``converged`` False, ``message`` says why).

    Raises
    ------
    SettingsError
        Bad settings, no band overlap between model and reference, or no energy in the window.
    ParameterError
        An exponent fit on an exponential law.
    """
    from scipy.optimize import least_squares

    s = settings or FitSettings()
    s.validate()
    sub = ParameterSet.from_dict(subset_parameter_set(params, structure.elements),
                                 origin=params.origin)
    ev = _Evaluator(structure, sub, s)
    if "exponent" in s.free:
        for pair in sub.pairs.values():
            bad = [n for n, law in pair.hopping.items() if law.kind == "exponential"]
            if bad:
                raise ParameterError(f"pair {pair.key}: exponential laws ({', '.join(bad)}) "
                                     "cannot take a fitted exponent; accepted: drop 'exponent'")
    n_model = ev.base.n_orbitals
    ref_e = reference.energies
    n_used = min(reference.n_bands - s.reference_skip, n_model - s.model_first)
    if n_used <= 0:
        raise SettingsError(
            f"no bands to compare: the reference has {reference.n_bands} bands (skipping "
            f"{s.reference_skip}), the model {n_model} (starting at {s.model_first}); accepted: "
            "reference_skip < reference bands and model_first < model bands"
        )
    ref = ref_e[:, s.reference_skip:s.reference_skip + n_used]
    bw = np.asarray(s.band_weights if s.band_weights is not None else reference.band_weights,
                    dtype=float)
    if bw.shape != (reference.n_bands,) or np.any(~np.isfinite(bw)) or np.any(bw < 0):
        raise SettingsError(f"band_weights: need {reference.n_bands} finite weights >= 0")
    bw = bw[s.reference_skip:s.reference_skip + n_used]
    w = reference.kpoint_weights[:, None] * bw[None, :]
    if s.window is not None:
        zero = reference.fermi_level or 0.0
        rel = ref - zero
        w = w * ((rel >= s.window[0]) & (rel <= s.window[1]))
    mask = w > 0
    if not np.any(mask):
        raise SettingsError("no reference energy has weight > 0 inside the energy window; "
                            "accepted: a window that contains reference energies")
    sqrt_w = np.sqrt(w[mask])
    kpts = reference.kpoints
    cols = slice(s.model_first, s.model_first + n_used)
    keys = ev.keys()
    x0 = np.array([k[2] for k in keys])
    lower = np.array([k[3] for k in keys])
    upper = np.array([k[4] for k in keys])

    def energies(x):
        return model_bands(ev.model(*_split(keys, x)), kpts)[:, cols]

    def shift_of(em):
        if s.shift == "fixed":
            return s.shift_value
        return float(np.sum(w[mask] * (em - ref)[mask]) / np.sum(w[mask]))

    def residual(x):
        em = energies(x)
        return sqrt_w * (em - ref - shift_of(em))[mask]

    e_start = energies(x0)
    r0 = residual(x0)
    if keys:
        sol = least_squares(residual, x0, bounds=(lower, upper), method="trf", x_scale="jac",
                            max_nfev=s.max_evaluations, ftol=s.tolerance, xtol=s.tolerance,
                            gtol=s.tolerance)
        x, status, message, nfev = sol.x, int(sol.status), str(sol.message), int(sol.nfev)
    else:  # pragma: no cover - an empty structure has no parameters
        x, status, message, nfev = x0, 1, "no free parameters", 0
    onsite, scale, exponent = _split(keys, x)
    note = f" (valband.params.fitting, {nfev} evaluations, status {status})"
    data = adjusted_parameter_dict(subset_parameter_set(sub, structure.elements), onsite, scale,
                                   exponent, ev.r_ref, s.classes, note)
    refined = ParameterSet.from_dict(data, origin="band fit")
    from valband.tb import build_model

    e_final = model_bands(build_model(structure, refined), kpts)[:, cols]
    c = shift_of(e_final)
    wsum = np.sum(w[mask])
    rms0 = math.sqrt(float(np.sum(r0**2)) / wsum)
    rf = sqrt_w * (e_final - ref - c)[mask]
    rms = math.sqrt(float(np.sum(rf**2)) / wsum)
    c0 = shift_of(e_start)
    bands = []
    for j in range(n_used):
        mj = mask[:, j]
        if not np.any(mj):
            continue
        wj = w[mj, j]
        d0 = (e_start[mj, j] - ref[mj, j] - c0)
        d1 = (e_final[mj, j] - ref[mj, j] - c)
        bands.append(BandResidual(
            reference_band=s.reference_skip + j, model_band=s.model_first + j,
            n_points=int(np.count_nonzero(mj)), weight=float(np.mean(wj)),
            rms_initial=math.sqrt(float(np.sum(wj * d0**2) / np.sum(wj))),
            rms=math.sqrt(float(np.sum(wj * d1**2) / np.sum(wj))),
            max_abs=float(np.max(np.abs(d1))),
        ))  # fmt: skip
    fitted = tuple(
        FitParameter(kind=k[0], target=k[1], initial=k[2], value=float(v), lower=k[3], upper=k[4])
        for k, v in zip(keys, x, strict=True)
    )
    data["provenance"] = (
        f"{data['provenance']} | refined by a band fit (valband.params.fitting): reference "
        f"{reference.source}, structure {getattr(structure, 'source', '')}, "
        f"{int(np.count_nonzero(mask))} energies, free {', '.join(s.free)}, rms "
        f"{rms0:.4f} -> {rms:.4f} eV, shift {c:+.4f} eV, status {status}"
    )
    refined = ParameterSet.from_dict(data, origin="band fit")
    return FitResult(
        parameter_set=refined, data=data, parameters=fitted, bands=tuple(bands), shift=c,
        rms_initial=rms0, rms=rms, converged=status > 0, status=status, message=message,
        evaluations=nfev, kpoints=np.asarray(kpts), reference=ref + c, initial_model=e_start,
        model=e_final, mask=mask, settings=s,
    )  # fmt: skip


def plot_fit(result: FitResult, path) -> None:
    """Plot reference and fitted bands per k-point (top) and residuals per band (bottom)."""
    from valband.report.plots import new_figure, save_figure

    fig, ax = new_figure(7.0, 6.0)
    fig.clear()
    top, bottom = fig.subplots(2, 1, sharex=True, height_ratios=(2, 1))
    k = np.arange(result.reference.shape[0])
    n = result.reference.shape[1]
    colours = ["#283593", "#c2185b", "#00897b", "#ef6c00", "#6d4c41", "#7b1fa2"]
    for j in range(n):
        c = colours[j % len(colours)]
        m = result.mask[:, j]
        top.plot(k, result.reference[:, j], "o", ms=3.5, mfc="none", color=c)
        top.plot(k, result.model[:, j], "-", lw=1.0, color=c)
        top.plot(k, result.initial_model[:, j], ":", lw=0.8, color=c)
        res = result.model[:, j] - result.reference[:, j]
        label = f"band {j + result.settings.reference_skip}"
        bottom.plot(k[m], res[m], ".-", lw=0.7, ms=3, color=c, label=label)
    top.set_ylabel("E (eV, model scale)")
    top.set_title(f"band fit: circles reference + {result.shift:+.3f} eV, lines fitted, dotted "
                  f"start; rms {result.rms_initial:.3f} -> {result.rms:.3f} eV", fontsize=9)
    bottom.axhline(0.0, color="k", lw=0.6)
    bottom.set_xlabel("reference k-point index")
    bottom.set_ylabel("fitted - reference (eV)")
    if n <= 12:
        bottom.legend(frameon=False, fontsize=7, ncols=4)
    save_figure(fig, path)
