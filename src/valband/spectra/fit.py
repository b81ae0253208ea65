"""Fit a simulated valence-band spectrum to a measured one.

Model on the measured binding-energy axis BE (eV, ascending)::

    y(BE) = s · Σ_g w_g M_g(BE − δ)  +  background(BE)
    M_g   = G_FWHM ∗ L_{Γ₀,a} [ σ_g A_g D_g(E) f(E, T) ]        (E = −BE, per group g)

with g the element × shell groups of the partial DOS (``Cu:d``, summed over sites),
M_g as in :func:`~valband.spectra.simulate.simulate_spectrum` with ``keep_area=False`` (cross
section σ, angular factor A, Fermi–Dirac f, lifetime Lorentzian L, instrument Gaussian G;
broadened on the DOS grid extended by zeros beyond the fit window, so that no weight is
folded back at the grid's ends); δ the energy shift
(positive: the measured features lie δ higher in BE than the model's), s the intensity scale
(measured units per Mb·states/eV/cell), w_g optional free component weights (1 = the atomic
cross-section weighting; when they are free the largest group keeps w = 1, because the scale
already sets the overall height).

Backgrounds (all linear in their amplitudes; the shapes move with the shift):

``none``      0
``constant``  c
``linear``    c + d·(BE − BE_lo)
``shirley``   c + k_S · ∫_{−∞}^{BE} P(BE′) dBE′        (Shirley's assumption, "active" form)
``tougaard``  c + k_T · ∫_0^∞ T/(C + T²)² P(BE − T) dT  (universal cross-section shape,
              C = 1643 eV², Tougaard, Surf. Interface Anal. 11, 453 (1988); k_T plays B)

where P = s Σ w_g M_g is the fitted peak, c (measured units), d (per eV), k_S (per eV) and
k_T (eV²) are the background parameters. Building the background from the *model* rather than
from the data (as :mod:`valband.spectra.background` does) lets it be fitted together with
everything else.

Free parameters: any of ``shift``, ``d_offset`` (eV), ``scale``, ``gaussian_fwhm`` (eV),
``gamma0`` (eV), ``lifetime_a`` (1/eV), ``background`` (all amplitudes of the chosen
background) and ``weights``; the rest stay at their initial values (default free:
:data:`DEFAULT_FREE`, i.e. the lifetime law is fitted, within bounds that keep it physical).

d-band offset δ_d (``d_offset``): the d groups' pDOS is moved by δ_d to higher binding energy
*before* the Fermi–Dirac occupation and the broadening, i.e. relative to the s, p groups and to
the Fermi edge, which stays fixed — the quantity of interest once the edge was calibrated (then
``compare`` fits δ_d instead of the global shift). It acts on top of the photoemission d-band
correction (:mod:`valband.spectra.quasiparticle`, on by default, ``d_correction``). It starts
from a coarse scan (0.1 eV steps) with the linear parameters solved at each step.

Weighted least squares (:func:`scipy.optimize.least_squares`, trust-region reflective with
bounds) on r_i = (y_i − model_i)/σ_i with σ the measured uncertainty (Poisson √counts, at
least 1) when the spectrum has one, else σ = 1 and the covariance scaled by the reduced χ².
The shift starts from the best point of a coarse scan over its bounds (linear parameters
solved at each step), so a calibration offset of an electronvolt or so is found without an
initial guess. The Jacobian is by forward differences with absolute steps (:data:`FD_STEP` of
each parameter's scale), which stay finite for a parameter at zero.

Goodness of fit: χ², reduced χ² = χ²/(N − n_free) and the R-factor
R = Σ|y − model| / Σ|y| over the fitted points.

Experimental d-band centre
--------------------------
:func:`spectrum_band_centre` takes the first moment of a background-subtracted spectrum over a
binding-energy window, on the DOS descriptor's definition ε = ∫E ρ dE / ∫ρ dE with E = −BE
relative to E_F. The fit reports it for the measurement (measured − fitted background, on the
shift-corrected axis BE − δ), for the fitted model's peak, and the model's own d-band centre of
the occupied d pDOS over the same window. A measured moment is that of the cross-section
weighted spectrum: s and p states and the instrument broadening pull it away from the d-band
centre of the DOS — compare like with like (the model's spectrum moment), not the spectrum's
moment with the DOS descriptor.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import least_squares, lsq_linear

from valband.errors import CalculationError, InputError, SettingsError
from valband.results.dos import DOSResult
from valband.spectra.background import shirley_shape, tougaard_shape
from valband.spectra.broadening import (
    DEFAULT_A_PER_EV,
    DEFAULT_GAMMA0_EV,
    FWHM_PER_SIGMA,
    GAUSS_CUTOFF,
    check_uniform_grid,
    fermi_dirac,
    gaussian_broaden,
    lifetime_width,
    lorentzian_numba,
)
from valband.spectra.measured import MeasuredSpectrum
from valband.spectra.simulate import (
    DEFAULT_GAUSSIAN_FWHM_EV,
    DEFAULT_GEOMETRY,
    _geometry,
    _photon,
    _site_weights,
    channel_weights,
    resolve_d_correction,
)

__all__ = ["SpectrumFit", "FitParameter", "fit_spectrum", "spectrum_band_centre",
           "BACKGROUNDS", "DEFAULT_FREE", "FIT_KIND"]

FIT_KIND = "valband.spectrum_fit"
BACKGROUNDS = ("none", "constant", "linear", "shirley", "tougaard")
#: Parameters fitted unless the caller says otherwise.
DEFAULT_FREE = ("shift", "scale", "gaussian_fwhm", "gamma0", "lifetime_a", "background")
_FREE_NAMES = ("shift", "d_offset", "scale", "gaussian_fwhm", "gamma0", "lifetime_a",
               "background", "weights")
#: Default bounds of the nonlinear parameters.
DEFAULT_SHIFT_RANGE_EV = 2.0
#: Bounds of the d-band offset, eV: beyond the largest correction fitted (Ag, −1.3 eV).
DEFAULT_D_OFFSET_RANGE_EV = 1.5
#: FWHM up to 1.5 eV: above any valence-band XPS/UPS/HAXPES resolution in use (common practice).
#: Lifetime: Γ₀ ≤ 0.5 eV HWHM at E_F and a ≤ 0.1 eV⁻¹ (HWHM 0.9 eV at 3 eV, 2.5 eV at 5 eV:
#: about five times the widest d-hole widths of the noble metals and Ni, see
#: :mod:`valband.spectra.broadening`), so a free lifetime cannot swallow the band shape.
_WIDTH_BOUNDS = {"gaussian_fwhm": (1e-3, 1.5), "gamma0": (0.0, 0.5), "lifetime_a": (0.0, 0.1)}
_UNITS = {"shift": "eV", "d_offset": "eV", "gaussian_fwhm": "eV", "gamma0": "eV",
          "lifetime_a": "1/eV",
          "bg_constant": "intensity", "bg_slope": "intensity/eV", "bg_shirley": "1/eV",
          "bg_tougaard": "eV^2", "scale": "intensity per (Mb states/eV/cell)"}
_MIN_POINTS = 10


@dataclass(frozen=True)
class FitParameter:
    """One fit parameter: value, 1σ uncertainty (None when fixed), bounds and unit."""

    name: str
    value: float
    error: float | None
    free: bool
    lower: float
    upper: float
    unit: str

    def to_dict(self) -> dict:
        """JSON-ready dictionary (infinite bounds as null)."""
        fin = (lambda v: v if math.isfinite(v) else None)  # noqa: E731
        return {"value": self.value, "error": self.error, "free": self.free,
                "lower": fin(self.lower), "upper": fin(self.upper), "unit": self.unit}


@dataclass(frozen=True, eq=False)
class SpectrumFit:
    """Result of :func:`fit_spectrum`; arrays on the fitted points of the measured axis.

    Attributes
    ----------
    parameters : {name: FitParameter} — shift, scale, gaussian_fwhm, gamma0, lifetime_a, the
        background amplitudes (bg_*) and weights (w_<El>:<shell>)
    covariance : (n_free, n_free), order of ``free_names``
    chi2, reduced_chi2, dof, r_factor, n_points
    binding_energy, measured, model, background, residual : (N,) on the fitted points
        (``residual`` = measured − model, in measured units)
    components : (n_groups, N) the fitted peak per group (no background), in measured units
    component_names : ("Cu:d", …)
    window : (BE_low, BE_high) of the fitted points, eV
    band_centre : dict — experimental and model centres (module docstring), window, notes
    settings : dict — photon energy, temperature, geometry, background kind, weighting, bounds
    provenance : dict — measured file/block, the DOS provenance and Fermi level
    """

    parameters: dict[str, FitParameter]
    free_names: tuple[str, ...]
    covariance: NDArray[np.float64]
    chi2: float
    reduced_chi2: float
    dof: int
    r_factor: float
    n_points: int
    binding_energy: NDArray[np.float64]
    measured: NDArray[np.float64]
    model: NDArray[np.float64]
    background: NDArray[np.float64]
    residual: NDArray[np.float64]
    sigma: NDArray[np.float64]
    weighted: bool
    components: NDArray[np.float64]
    component_names: tuple[str, ...]
    window: tuple[float, float]
    band_centre: dict = field(default_factory=dict)
    settings: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def value(self, name: str) -> float:
        """Fitted (or fixed) value of a parameter."""
        try:
            return self.parameters[name].value
        except KeyError:
            raise InputError(f"no fit parameter {name!r}; have "
                             f"{', '.join(self.parameters)}") from None

    def error(self, name: str) -> float | None:
        """1σ uncertainty of a free parameter (None when fixed)."""
        self.value(name)
        return self.parameters[name].error

    def summary(self) -> dict:
        """JSON-ready summary without the arrays (the ``fit`` block of ``summary.json``)."""
        return {
            "kind": FIT_KIND,
            "parameters": {k: p.to_dict() for k, p in self.parameters.items()},
            "free": list(self.free_names),
            "covariance": self.covariance.tolist(),
            "chi2": self.chi2, "reduced_chi2": self.reduced_chi2, "dof": self.dof,
            "r_factor": self.r_factor,
            "r_factor_definition": "sum|measured - model| / sum|measured|",
            "n_points": self.n_points,
            "window_eV": list(self.window),
            "components": list(self.component_names),
            "band_centre": self.band_centre,
            "settings": self.settings,
            "provenance": self.provenance,
        }


# ------------------------------------------------------------------------------ moments
def spectrum_band_centre(be, signal, window) -> float:
    """First moment ε = ∫E y dE / ∫y dE with E = −BE (eV rel. E_F) over a BE window.

    ``be`` ascending (non-uniform allowed), ``signal`` background-subtracted; the window
    (BE_low, BE_high) in eV is cut exactly (linear interpolation at its ends), trapezoid rule
    as in :func:`valband.dos.band_descriptors`.
    """
    e = np.asarray(be, dtype=np.float64)
    y = np.asarray(signal, dtype=np.float64)
    lo, hi = sorted(float(v) for v in window)
    if not (lo < hi and lo >= e[0] - 1e-9 and hi <= e[-1] + 1e-9):
        raise SettingsError(f"band-centre window ({lo:.4g}, {hi:.4g}) eV must be non-empty and "
                            f"inside the spectrum ({e[0]:.4g} to {e[-1]:.4g} eV)")
    inner = (e > lo) & (e < hi)
    x = np.concatenate([[lo], e[inner], [hi]])
    v = np.interp(x, e, y)
    area = float(np.trapezoid(v, x))
    if not area > 0:
        raise SettingsError(f"band-centre window ({lo:.4g}, {hi:.4g}) eV holds no positive "
                            f"intensity (integral {area:.3g}) after background subtraction")
    return -float(np.trapezoid(x * v, x)) / area


# ------------------------------------------------------------------------------ the model
class _Model:
    """Peak and background shapes on a uniform BE grid, with caching of the broadening.

    ``raw`` (n_groups, n_full) holds the unbroadened group curves on ``full_grid``; the
    Lorentzian is evaluated only at the output points ``out_range`` (every source point
    contributes), the Gaussian and the background shapes on that output grid. The groups in
    ``d_rows`` can be moved by a d-band offset δ: their weighted pDOS before occupation
    (``d_pre``, on the DOS grid E − E_F ascending) is shifted by −δ in E (weight conserved),
    multiplied by the fixed Fermi–Dirac ``occ`` and put on the BE grid again, so the Fermi edge
    stays where it is.
    """

    def __init__(self, full_grid: NDArray, raw: NDArray, out_range: tuple[int, int],
                 background: str, d_rows=(), d_pre=None, occ=None, embed=None):
        self.full_grid, self.raw, self.out_range, self.kind = full_grid, raw, out_range, background
        self.grid = full_grid[out_range[0]:out_range[1]]
        self.h = float(full_grid[1] - full_grid[0])
        self.d_rows = tuple(d_rows)
        self.d_pre, self.occ, self.embed = d_pre, occ, embed
        self._lorentz: dict = {}
        self._cache: dict = {}

    def _lor(self, src: NDArray, g0: float, a: float) -> NDArray:
        g = lifetime_width(self.full_grid, g0, a)
        if not np.any(g > 0):
            return src[:, self.out_range[0]:self.out_range[1]].copy()
        return lorentzian_numba(self.full_grid, src, g, keep_area=False,
                                out_range=self.out_range)

    def _raw_d(self, d_off: float) -> NDArray:
        """Unbroadened d groups on the full BE grid at d-band offset ``d_off`` (eV)."""
        from valband.spectra.quasiparticle import map_density

        if d_off == 0.0:
            return self.raw[list(self.d_rows)]
        e = self.embed["energies"]
        moved = map_density(e, self.d_pre, -d_off, 1.0) * self.occ[None, :]
        out = np.zeros((len(self.d_rows), self.full_grid.size))
        k = self.embed["offset"]
        out[:, k:k + e.size] = moved[:, ::-1]
        return out

    def broadened(self, fwhm: float, g0: float, a: float, per_group: bool = True,
                  d_off: float = 0.0) -> NDArray:
        """Broadened curves on the output grid: (n_groups, n) or, summed, (1, n); cached.

        The Lorentzian is cached on (Γ₀, a, δ), so changing the Gaussian width or the shift
        reuses it.
        keep_area=False: weight spread beyond the grid is not observed.
        """
        key = (fwhm, g0, a, per_group, d_off)
        got = self._cache.get(key)
        if got is None:
            if len(self._lorentz) > 24:
                self._lorentz.clear()
            lkey = (g0, a, d_off, per_group)
            parts = self._lorentz.get(lkey)
            if parts is None:
                src = self.raw
                if self.d_rows and d_off != 0.0:
                    src = src.copy()
                    src[list(self.d_rows)] = self._raw_d(d_off)
                # summed over the groups before the O(n²) Lorentzian unless asked per group
                parts = self._lor(src if per_group else src.sum(axis=0, keepdims=True), g0, a)
                self._lorentz[lkey] = parts
            got = gaussian_broaden(self.grid, parts, fwhm, keep_area=False)
            if len(self._cache) > 16:
                self._cache.clear()
            self._cache[key] = got
        return got

    def shape(self, peak: NDArray) -> NDArray:
        """Background shape of the given peak curve(s) on the grid (last axis)."""
        if self.kind == "shirley":
            return shirley_shape(self.h, peak)
        if self.kind == "tougaard":
            return tougaard_shape(self.h, peak)
        raise AssertionError(self.kind)


def _background_names(kind: str) -> tuple[str, ...]:
    return {"none": (), "constant": ("bg_constant",), "linear": ("bg_constant", "bg_slope"),
            "shirley": ("bg_constant", "bg_shirley"),
            "tougaard": ("bg_constant", "bg_tougaard")}[kind]


def _groups(dos: DOSResult, weights: NDArray) -> tuple[tuple[str, ...], NDArray]:
    """Sum weighted channels into element × shell groups: names and (n_groups, n_e)."""
    names = tuple(dict.fromkeys(f"{c.element}:{c.shell}" for c in dos.channel_labels))
    out = np.zeros((len(names), dos.energies.size))
    for w, c, row in zip(weights, dos.channel_labels, dos.channels, strict=True):
        out[names.index(f"{c.element}:{c.shell}")] += w * row
    return names, out


def _check_free(free, kind: str) -> set[str]:
    if isinstance(free, str):
        free = (free,)
    try:
        chosen = set(free)
    except TypeError:
        raise SettingsError(f"free {free!r}: expected names among {', '.join(_FREE_NAMES)}") \
            from None
    bad = chosen - set(_FREE_NAMES)
    if bad:
        raise SettingsError(f"free parameter(s) {', '.join(sorted(bad))}: accepted "
                            f"{', '.join(_FREE_NAMES)}")
    if kind == "none":
        chosen.discard("background")
    return chosen


def _number(v, what: str) -> float:
    try:
        x = float(v)
    except (TypeError, ValueError):
        raise SettingsError(f"{what} {v!r}: must be a number") from None
    if not math.isfinite(x):
        raise SettingsError(f"{what} {v!r}: must be finite")
    return x


# ------------------------------------------------------------------------------ the fit
#: Finite-difference step of the fit's Jacobian, in units of each parameter's scale.
FD_STEP = 1e-5


def fit_spectrum(measured: MeasuredSpectrum, dos: DOSResult, photon_energy=None, *,
                 temperature: float = 300.0, geometry=DEFAULT_GEOMETRY, layer_weights=None,
                 background: str = "shirley", free: Iterable[str] = DEFAULT_FREE,
                 initial: Mapping[str, float] | None = None,
                 shift_range: tuple[float, float] = (-DEFAULT_SHIFT_RANGE_EV,
                                                     DEFAULT_SHIFT_RANGE_EV),
                 window: tuple[float, float] | None = None,
                 band_window: tuple[float, float] | None = None,
                 band_shell: str = "d", d_correction="auto") -> SpectrumFit:
    """Fit the spectrum simulated from ``dos`` to ``measured`` (model in the module docstring).

    Parameters
    ----------
    measured : MeasuredSpectrum (:func:`~valband.spectra.read_spectrum`)
    dos : DOSResult on a uniform grid
    photon_energy : eV or source name; default the measured spectrum's own
    temperature : K (Fermi–Dirac occupation, fixed)
    geometry, layer_weights : as for :func:`~valband.spectra.simulate_spectrum`
    background : one of :data:`BACKGROUNDS` (default ``shirley``)
    free : parameter names among ``shift, scale, gaussian_fwhm, gamma0, lifetime_a,
        background, weights`` (default :data:`DEFAULT_FREE`)
    initial : starting (or fixed) values: ``shift`` (0), ``gaussian_fwhm``
        (0.3 eV), ``gamma0`` (0.01 eV), ``lifetime_a`` (0.01 1/eV), ``d_offset`` (0); linear
        parameters start
        from a linear least-squares solve
    shift_range : bounds of the shift, eV (default ±2 eV)
    window : BE range of the fitted points, eV; default the measured range inside the DOS
        grid (less 0.5 eV at its deep end)
    band_window : BE window of the band-centre moments, eV; default (0, deep end of the fit
        window)
    band_shell : shell of the model descriptor (default d)
    d_correction : "auto" (default: the photoemission d-band correction fitted on the DOS's
        parameter set), None/False (off) or element → QPCorrection; as in
        :func:`~valband.spectra.simulate_spectrum`

    Returns
    -------
    SpectrumFit

    Raises
    ------
    SettingsError for bad settings (unknown background or parameter, bad bounds, windows
    outside the data, too few points); InputError for a bad DOS; CalculationError when the
    optimiser fails.
    """
    if not isinstance(measured, MeasuredSpectrum):
        raise InputError(f"fit_spectrum: measured must be a MeasuredSpectrum, got "
                         f"{type(measured).__name__}")
    if not isinstance(dos, DOSResult):
        raise InputError(f"fit_spectrum: dos must be a DOSResult, got {type(dos).__name__}")
    if background not in BACKGROUNDS:
        raise SettingsError(f"background {background!r}: accepted {', '.join(BACKGROUNDS)}")
    if photon_energy is None:
        if measured.photon_energy is None:
            raise SettingsError("fit_spectrum: no photon energy — give photon_energy (eV or a "
                                "source name); the measured file does not state one")
        photon_energy = measured.photon_energy
    hv, source = _photon(photon_energy)
    t = _number(temperature, "temperature (K)")
    if t < 0:
        raise SettingsError(f"temperature {t} K: must be ≥ 0")
    theta, pol = _geometry(geometry)
    chosen = _check_free(free, background)
    dos, d_record = resolve_d_correction(dos, d_correction)
    has_d = any(c.shell == "d" for c in dos.channel_labels)
    if "d_offset" in chosen and not has_d:
        chosen.discard("d_offset")
        d_record["d_offset_note"] = "d_offset not fitted: the DOS has no d channel"
    init = dict(initial or {})
    known = {"shift", "d_offset", "gaussian_fwhm", "gamma0", "lifetime_a", "scale"}
    if set(init) - known:
        raise SettingsError(f"initial values for {', '.join(sorted(set(init) - known))}: "
                            f"accepted keys {', '.join(sorted(known))}")
    s_lo, s_hi = (_number(v, "shift_range (eV)") for v in shift_range)
    if not s_lo < s_hi:
        raise SettingsError(f"shift_range ({s_lo}, {s_hi}) eV: lower must be below upper")

    # ---- measured points in the window
    check_uniform_grid(dos.energies, "DOS energy grid")
    be_dos_lo, be_dos_hi = -float(dos.energies[-1]), -float(dos.energies[0])
    e_all, y_all = measured.binding_energy, measured.intensity
    if window is None:
        lo = max(float(e_all[0]), be_dos_lo)
        hi = min(float(e_all[-1]), be_dos_hi - 0.5)
    else:
        lo, hi = sorted(_number(v, "fit window (eV)") for v in window)
    mask = (e_all >= lo) & (e_all <= hi)
    if np.count_nonzero(mask) < _MIN_POINTS:
        raise SettingsError(f"fit window ({lo:.4g}, {hi:.4g}) eV holds "
                            f"{np.count_nonzero(mask)} measured points (need ≥ {_MIN_POINTS}); "
                            f"the measurement spans {e_all[0]:.4g} to {e_all[-1]:.4g} eV and "
                            f"the DOS {be_dos_lo:.4g} to {be_dos_hi:.4g} eV in binding energy")
    e, y = e_all[mask], y_all[mask]
    if not np.any(y > 0):
        raise InputError(f"the measured spectrum has no positive intensity in the fit window "
                         f"({lo:.4g}, {hi:.4g}) eV (all {y.size} values ≤ 0): nothing to fit; "
                         "accepted: counts or count rates with a valence band in the window")
    if measured.uncertainty is not None:
        sigma = np.maximum(measured.uncertainty[mask], 1.0 if measured.unit == "counts"
                           else 1e-12 * max(float(np.abs(y).max()), 1e-300))
        weighted = True
    else:
        sigma = np.ones_like(y)
        weighted = False

    # ---- unbroadened group curves on a BE grid covering the window ± shifts and widths
    w_ch, used = channel_weights(dos, hv, (theta, pol))
    site_w = _site_weights(layer_weights, dos.sites)
    w_ch = w_ch * np.array([site_w[c.site] for c in dos.channel_labels])
    occ = fermi_dirac(dos.energies, t)
    names, groups_pre = _groups(dos, w_ch)
    groups = groups_pre * occ[None, :]
    d_rows = tuple(i for i, n in enumerate(names) if n.endswith(":d"))
    h = float(dos.energies[1] - dos.energies[0])
    be_dos = -dos.energies[::-1]
    # output grid: the window, moved by any allowed shift, plus the widest Gaussian's reach
    pad = max(abs(s_lo), abs(s_hi)) + GAUSS_CUTOFF * _WIDTH_BOUNDS["gaussian_fwhm"][1] \
        / FWHM_PER_SIGMA + 0.5
    k_lo = min(0, math.floor((e[0] - pad - be_dos[0]) / h))
    k_hi = max(be_dos.size - 1, math.ceil((e[-1] + pad - be_dos[0]) / h))
    full = be_dos[0] + h * np.arange(k_lo, k_hi + 1)
    raw = np.zeros((len(names), full.size))
    raw[:, -k_lo:-k_lo + be_dos.size] = groups[:, ::-1]
    j0 = max(0, int(np.searchsorted(full, e[0] - pad)) - 1)
    j1 = min(full.size, int(np.searchsorted(full, e[-1] + pad)) + 1)
    model = _Model(full, raw, (j0, j1), background, d_rows=d_rows,
                   d_pre=groups_pre[list(d_rows)], occ=occ,
                   embed={"energies": np.asarray(dos.energies), "offset": -k_lo})
    grid = model.grid

    # ---- parameter vector
    bg_names = _background_names(background)
    areas = raw.sum(axis=1)
    ref = int(np.argmax(areas))
    w_names = tuple(f"w_{n}" for i, n in enumerate(names) if i != ref)
    nonlin = {"shift": float(init.get("shift", 0.0)),
              "d_offset": float(init.get("d_offset", 0.0)),
              "gaussian_fwhm": float(init.get("gaussian_fwhm", DEFAULT_GAUSSIAN_FWHM_EV)),
              "gamma0": float(init.get("gamma0", DEFAULT_GAMMA0_EV)),
              "lifetime_a": float(init.get("lifetime_a", DEFAULT_A_PER_EV))}
    for k, v in nonlin.items():
        _number(v, f"initial {k}")
    bounds = {"shift": (s_lo, s_hi),
              "d_offset": (-DEFAULT_D_OFFSET_RANGE_EV, DEFAULT_D_OFFSET_RANGE_EV),
              **_WIDTH_BOUNDS, "scale": (0.0, np.inf),
              "bg_constant": (-np.inf, np.inf), "bg_slope": (-np.inf, np.inf),
              "bg_shirley": (0.0, np.inf), "bg_tougaard": (0.0, np.inf)}
    bounds |= {n: (0.0, np.inf) for n in w_names}
    for k in ("shift", "d_offset", "gaussian_fwhm", "gamma0", "lifetime_a"):
        lo_b, hi_b = bounds[k]
        if not lo_b <= nonlin[k] <= hi_b and k in chosen | ({"shift"} if k == "shift" else set()):
            raise SettingsError(f"initial {k} = {nonlin[k]:g} lies outside its bounds "
                                f"({lo_b:g}, {hi_b:g})")
    all_names = ("shift", "d_offset", "gaussian_fwhm", "gamma0", "lifetime_a", "scale",
                 *bg_names, *w_names)
    is_free = {n: (n in chosen) for n in ("shift", "d_offset", "gaussian_fwhm", "gamma0",
                                           "lifetime_a", "scale")}
    is_free |= {n: "background" in chosen for n in bg_names}
    is_free |= {n: "weights" in chosen for n in w_names}

    x_rel = e - e[0]

    weights_free = "weights" in chosen and bool(w_names)

    def evaluate(p: dict, per_group: bool = False) -> tuple[NDArray, NDArray, NDArray]:
        """Peak, background (N,) and total (N,) at parameters p.

        The peak is per group (n_g, N), or summed (1, N) when the weights are fixed and
        ``per_group`` is false.
        """
        per_group = per_group or weights_free
        curves = model.broadened(p["gaussian_fwhm"], p["gamma0"], p["lifetime_a"], per_group,
                                 p["d_offset"])
        wts = np.ones(len(names) if per_group else 1)
        if per_group:
            for i, n in enumerate(names):
                if i != ref:
                    wts[i] = p[f"w_{n}"]
        at = e - p["shift"]
        peak_grid = p["scale"] * (wts @ curves)
        comps = np.stack([np.interp(at, grid, c) for c in curves]) * (p["scale"] * wts)[:, None]
        bg = np.zeros_like(e)
        if "bg_constant" in p:
            bg = bg + p["bg_constant"]
        if "bg_slope" in p:
            bg = bg + p["bg_slope"] * x_rel
        if "bg_shirley" in p:
            bg = bg + p["bg_shirley"] * np.interp(at, grid, model.shape(peak_grid))
        if "bg_tougaard" in p:
            bg = bg + p["bg_tougaard"] * np.interp(at, grid, model.shape(peak_grid))
        return comps, bg, comps.sum(axis=0) + bg

    def linear_solve(p: dict) -> dict:
        """Best linear parameters (scale, background amplitudes, weights) at p's widths/shift."""
        curves = model.broadened(p["gaussian_fwhm"], p["gamma0"], p["lifetime_a"],
                                 weights_free, p["d_offset"])
        at = e - p["shift"]
        cols, cnames = [], []
        base = np.ones(len(names) if weights_free else 1)
        if weights_free:
            for i, n in enumerate(names):
                if i != ref:
                    base[i] = p.get(f"w_{n}", 1.0)
        if weights_free:   # columns per group: scale·w_g (reference group: scale)
            for i, n in enumerate(names):
                cols.append(np.interp(at, grid, curves[i]))
                cnames.append("scale" if i == ref else f"w_{n}")
        else:
            cols.append(np.interp(at, grid, base @ curves))
            cnames.append("scale")
        shape_col = None
        if background in ("shirley", "tougaard"):
            shape_col = np.interp(at, grid, model.shape(base @ curves))
        for bn in bg_names:
            col = {"bg_constant": np.ones_like(e), "bg_slope": x_rel}.get(bn, shape_col)
            cols.append(col)
            cnames.append(bn)
        a_mat = np.stack(cols, axis=1) / sigma[:, None]
        lb = np.array([bounds[n][0] if n in bounds else 0.0 for n in cnames])
        ub = np.array([bounds[n][1] for n in cnames])
        norms = np.linalg.norm(a_mat, axis=0)
        norms[norms == 0] = 1.0
        sol = lsq_linear(a_mat / norms, y / sigma, bounds=(lb * norms, ub * norms))
        v = sol.x / norms
        out = dict(p)
        sc = v[cnames.index("scale")]
        out["scale"] = float(sc)
        tiny = sc <= 1e-12 * max(float(np.abs(v).max()), 1e-300)
        for n, val in zip(cnames, v, strict=True):
            if n.startswith("w_"):
                out[n] = 1.0 if tiny else float(val / sc)
            elif n in ("bg_shirley", "bg_tougaard"):
                # the shape column was built without the scale: amplitude per unit peak
                out[n] = 0.0 if tiny else float(val / sc)
            elif n.startswith("bg_"):
                out[n] = float(val)
        return out

    # ---- start: scan the shift (if free), linear parameters solved at each step
    p0 = {**nonlin, "scale": 1.0, **{n: 0.0 for n in bg_names}, **{n: 1.0 for n in w_names}}
    if "scale" in init:
        p0["scale"] = _number(init["scale"], "initial scale")

    def chi2_of(p):
        return float(np.sum(((y - evaluate(p)[2]) / sigma) ** 2))

    if is_free["shift"]:
        step = max(h, min(0.02, 0.25 * nonlin["gaussian_fwhm"]))
        best = None
        for s in np.arange(s_lo, s_hi + 0.5 * step, step):
            cand = linear_solve(p0 | {"shift": float(s)})
            c2 = chi2_of(cand)
            if best is None or c2 < best[0]:
                best = (c2, cand)
        p0 = best[1]
    else:
        p0 = linear_solve(p0)
    if is_free["d_offset"]:   # coarse scan of the d-band offset at the best shift
        d_lo, d_hi = bounds["d_offset"]
        best = None
        for dv in np.arange(d_lo, d_hi + 0.05, 0.1):
            cand = linear_solve(p0 | {"d_offset": float(dv)})
            c2 = chi2_of(cand)
            if best is None or c2 < best[0]:
                best = (c2, cand)
        p0 = best[1]
    if "scale" in init and not is_free["scale"]:   # a fixed scale keeps the user's value
        p0["scale"] = float(init["scale"])

    free_names = tuple(n for n in all_names if is_free[n])
    if not free_names:
        raise SettingsError("fit_spectrum: no free parameters; choose some of "
                            f"{', '.join(_FREE_NAMES)}")
    x0 = np.array([p0[n] for n in free_names])
    lb = np.array([bounds[n][0] for n in free_names])
    ub = np.array([bounds[n][1] for n in free_names])
    x0 = np.clip(x0, lb, ub)
    scale_of = {n: max(abs(p0[n]), 1e-3) for n in free_names}
    scale_of |= {k: 0.01 for k in ("shift", "d_offset", "gaussian_fwhm", "gamma0")
                 if k in scale_of}
    scale_of |= {"lifetime_a": 0.01} if "lifetime_a" in scale_of else {}
    if "bg_constant" in scale_of:
        scale_of["bg_constant"] = max(abs(p0["bg_constant"]), 1e-3 * float(np.abs(y).max()))
    x_scale = np.array([scale_of[n] for n in free_names])

    def params_of(x) -> dict:
        return p0 | dict(zip(free_names, (float(v) for v in x), strict=True))

    def resid(x):
        return (y - evaluate(params_of(x))[2]) / sigma

    def jac(x):
        # forward differences with absolute steps of 1e-5 of each parameter's scale: a
        # relative step (scipy's diff_step) vanishes for a parameter that sits at ~0 (a shift
        # scanned to 1.8e-15 eV got a zero derivative and stuck with error 0)
        f0 = resid(x)
        out = np.empty((f0.size, x.size))
        for i in range(x.size):
            h = FD_STEP * x_scale[i]
            if x[i] + h > ub[i]:
                h = -h
            xi = x.copy()
            xi[i] += h
            out[:, i] = (resid(xi) - f0) / h
        return out

    try:
        res = least_squares(resid, x0, jac=jac, bounds=(lb, ub), x_scale=x_scale,
                            method="trf", xtol=1e-10, ftol=1e-10, gtol=1e-10,
                            max_nfev=400 * len(x0))
    except (ValueError, np.linalg.LinAlgError) as exc:
        raise CalculationError(f"spectrum fit failed: {exc}") from None
    if res.status <= 0:
        raise CalculationError(f"spectrum fit did not converge: {res.message}")

    p = params_of(res.x)
    comps, bg, total = evaluate(p, per_group=True)
    n_pts = e.size
    dof = n_pts - len(free_names)
    chi2 = float(np.sum(res.fun ** 2))
    red = chi2 / dof if dof > 0 else float("nan")
    jtj = res.jac.T @ res.jac
    try:
        cov = np.linalg.inv(jtj)
    except np.linalg.LinAlgError:
        cov = np.linalg.pinv(jtj)
    if not weighted:
        cov = cov * red
    err = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    errs = dict(zip(free_names, (float(v) for v in err), strict=True))
    params = {n: FitParameter(n, float(p[n]), errs.get(n), is_free[n], float(bounds[n][0]),
                              float(bounds[n][1]),
                              _UNITS.get(n, "relative to the atomic cross section"))
              for n in all_names}
    r_factor = float(np.sum(np.abs(y - total)) / np.sum(np.abs(y)))

    # ---- band centres
    corrected = e - p["shift"]
    b_lo, b_hi = band_window if band_window is not None else (
        max(0.0, float(corrected[0])), float(corrected[-1]))
    b_lo, b_hi = sorted((_number(b_lo, "band window (eV)"), _number(b_hi, "band window (eV)")))
    centre = {"window_eV": [b_lo, b_hi], "shell": band_shell,
              "definition": "-∫BE·I dBE / ∫I dBE over the window (E = -BE relative to E_F)",
              "note": "a measured moment is that of the cross-section weighted spectrum; s, p "
                      "states and broadening shift it from the DOS d-band centre: compare it "
                      "with model_spectrum_centre_eV"}
    try:
        centre["measured_eV"] = spectrum_band_centre(corrected, y - bg, (b_lo, b_hi))
        centre["model_spectrum_centre_eV"] = spectrum_band_centre(corrected, total - bg,
                                                                  (b_lo, b_hi))
    except SettingsError as exc:
        centre["measured_eV"] = centre["model_spectrum_centre_eV"] = None
        centre["error"] = str(exc)
    centre["model_dos_centre_eV"] = _dos_centre(dos, band_shell, (b_lo, b_hi))

    settings = {
        "photon_energy_eV": hv, "photon_source": source, "temperature_K": t,
        "geometry": {"theta_deg": theta, "polarization": pol},
        "background": background, "free": sorted(chosen),
        "weighting": "1/uncertainty" if weighted else "uniform (covariance scaled by reduced chi2)",
        "shift_range_eV": [s_lo, s_hi], "reference_group": names[ref],
        "cross_sections": used,
        "layer_weights": {str(s): w for s, w in site_w.items()} if layer_weights is not None
        else None,
        "model": "scale * sum_g w_g M_g(BE - shift) + background",
        "d_band_correction": d_record,
        "d_offset_definition": "d components (pDOS before occupation) moved by d_offset to "
                               "higher binding energy relative to the s, p components and to "
                               "the fixed Fermi edge; applied after the d-band correction",
    }
    provenance = {"measured_source": measured.source, "measured_block": measured.block,
                  "measured_unit": measured.unit, "dos_provenance": dos.provenance,
                  "dos_settings": dos.settings, "fermi_level_eV": dos.fermi_level,
                  "optimizer": {"method": "scipy.optimize.least_squares trf",
                                "nfev": int(res.nfev), "message": str(res.message)}}
    return SpectrumFit(parameters=params, free_names=free_names, covariance=cov, chi2=chi2,
                       reduced_chi2=red, dof=dof, r_factor=r_factor, n_points=n_pts,
                       binding_energy=e.copy(), measured=y.copy(), model=total, background=bg,
                       residual=y - total, sigma=sigma, weighted=weighted, components=comps,
                       component_names=names,
                       window=(float(e[0]), float(e[-1])), band_centre=centre,
                       settings=settings, provenance=provenance)


def _dos_centre(dos: DOSResult, shell: str, window: tuple[float, float]) -> float | None:
    """Model d-band centre (eV rel. E_F) of the occupied pDOS of ``shell`` over a BE window."""
    from valband.dos import band_descriptors

    rows = [r for r, c in zip(dos.channels, dos.channel_labels, strict=True) if c.shell == shell]
    if not rows:
        return None
    lo = max(-window[1], float(dos.energies[0]))
    hi = min(-window[0], float(dos.energies[-1]))
    if not hi > lo:
        return None
    try:
        return float(band_descriptors(dos.energies, np.sum(rows, axis=0), (lo, hi)).centre)
    except (SettingsError, CalculationError):
        return None
