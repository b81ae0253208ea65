"""Tabulated valence-subshell cross sections: build, store, read, interpolate, look up.

A :class:`CrossSectionTable` holds σ per electron (Mb) and β of every valence subshell of one
element on a photon-energy grid (eV), computed with
:func:`valband.atom.photoionization.valence_cross_sections`. :func:`cross_sections` is the
lookup the spectra use: the table shipped in ``valband/data/xsec`` if there is one, else the
user cache, else a new table (built once, then stored in the cache).

Grid
----
:data:`DEFAULT_GRID` is log-spaced from 10 eV to 10 keV with :data:`POINTS_PER_DECADE` = 15
points per decade (46 points). :func:`build_table` adds a point just above every threshold
that falls inside the grid (binding energy + :data:`THRESHOLD_OFFSET_EV`) and then refines
adaptively: every interval is checked at its logarithmic midpoint, which is computed and kept;
where log–log interpolation between the interval's ends misses the midpoint by more than
:data:`REFINE_SIGMA_TOL` (relative, σ) or :data:`REFINE_BETA_TOL` (absolute, β) both halves are
checked again, up to :data:`REFINE_LEVELS` levels. The refinement is needed near Cooper minima,
where an s subshell's single dipole channel passes through zero (e.g. Cu 4s near 24 eV);
elsewhere 15 points per decade is already well within 1 %. Tests check log–log interpolation
against a direct calculation at the lab sources (within 2 %, Cu and Au).

Interpolation
-------------
σ per electron is interpolated linearly in (ln E, ln σ) and β linearly in ln E. Below a
subshell's threshold (its binding energy) σ = 0 and β = NaN. Between the threshold and the
first open grid point σ and β are held at that point's values: one-electron photoionization
into the attractive field of the ion has a finite, smoothly varying cross section at
threshold (Fano & Cooper, Rev. Mod. Phys. 40, 441 (1968), Sec. 2). A segment with σ = 0 at an
open end (a sampled exact zero) is interpolated linearly in σ.

File format (JSON, ``<El>-<relativity>.json``)
----------------------------------------------
::

    {"schema": "valband.xsec_table", "schema_version": 1,
     "element": "Cu", "relativity": "scalar",
     "subshells": [{"label": "3d", "l": 2, "occupation": 10.0, "binding_energy_ev": 5.33}, ...],
     "photon_energies_ev": [...],                    # ascending, n_energy
     "sigma_per_electron_mb": [[...], ...],          # n_subshell × n_energy, Mb per electron
     "beta": [[...], ...],                           # same shape, null below threshold
     "provenance": {"valband_version": ..., "method": ..., "functional": ...,
                    "relativistic_exchange": true, "grid": ..., "created": ISO 8601}}

Reading checks the schema name and version, the shapes and the grid order, and names the
file in any error.

Cache
-----
``$VALBAND_CACHE_DIR/xsec``, else ``$XDG_CACHE_HOME/valband/xsec``, else
``~/.cache/valband/xsec``. Files are written atomically. A cache file that cannot be read (or
that does not hold the element, relativity, exchange treatment (``relativistic_exchange``,
on with relativity "scalar"; absent in tables made before it existed) and default grid
asked for) is reported with a
:class:`XsecCacheWarning` and rebuilt; it is never used.
"""

from __future__ import annotations

import datetime as _dt
import json
import math
import warnings
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from valband.atom.xc import resolve_relativistic_exchange
from valband.errors import InputError, SettingsError, ValbandWarning

__all__ = [
    "DEFAULT_GRID",
    "POINTS_PER_DECADE",
    "PHOTON_SOURCES",
    "SHIPPED_ELEMENTS",
    "TABLE_SCHEMA",
    "TABLE_SCHEMA_VERSION",
    "CrossSectionTable",
    "XsecCacheWarning",
    "build_table",
    "cache_dir",
    "clear_memo",
    "cross_sections",
    "interpolate",
    "load_table",
    "photon_energy_of",
    "save_table",
    "shipped_table_path",
    "table_for",
]

TABLE_SCHEMA = "valband.xsec_table"
TABLE_SCHEMA_VERSION = 1

#: Base grid density (points per decade of photon energy).
POINTS_PER_DECADE = 15
#: Default photon-energy grid, eV: 10 eV … 10 keV, log-spaced, 15 points per decade (46 points).
DEFAULT_GRID: tuple[float, ...] = tuple(
    float(x) for x in np.logspace(1.0, 4.0, 3 * POINTS_PER_DECADE + 1)
)
#: Extra grid point this far above each threshold inside the grid (eV of kinetic energy).
THRESHOLD_OFFSET_EV = 0.02
#: Adaptive refinement: relative σ miss, absolute β miss, number of bisection levels.
REFINE_SIGMA_TOL = 0.01
REFINE_BETA_TOL = 0.02
REFINE_LEVELS = 3

#: Elements with shipped tables (those of the shipped parameter sets), scalar-relativistic.
SHIPPED_ELEMENTS: tuple[str, ...] = (
    "Al", "Fe", "Co", "Ni", "Cu", "Zn", "Ga", "Ru", "Rh", "Pd", "Ag", "In", "Sn", "Os", "Ir",
    "Pt", "Au",
)  # fmt: skip

#: Laboratory photon sources (eV); common practice (standard line energies of lab XPS/UPS/HAXPES).
PHOTON_SOURCES: dict[str, float] = {
    "He-I": 21.22,
    "He-II": 40.81,
    "Mg-Ka": 1253.6,
    "Al-Ka": 1486.6,
    "Cr-Ka": 5414.7,
    "Ga-Ka": 9251.7,
}

_SHIPPED_DIR = Path(__file__).resolve().parents[1] / "data" / "xsec"
_RELATIVITIES = ("none", "scalar")


class XsecCacheWarning(ValbandWarning):
    """A cached cross-section table could not be used and is being rebuilt."""


# ---------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class CrossSectionTable:
    """σ per electron (Mb) and β of one element's valence subshells on a photon-energy grid (eV).

    Attributes
    ----------
    element, relativity : str
        Element symbol; "none" or "scalar" (the bound orbitals' treatment).
    labels, l, occupation, binding_energies_ev : tuple
        Per subshell: label ("3d"), angular momentum, electrons in the neutral atom, binding
        energy (eV, LDA eigenvalue).
    photon_energies_ev : ndarray (n_energy,)
        Ascending grid, eV.
    sigma_per_electron_mb : ndarray (n_subshell, n_energy)
        Mb per electron; 0 below threshold.
    beta : ndarray (n_subshell, n_energy)
        Dipole asymmetry parameter; NaN below threshold.
    provenance : dict
        valband version, method text, grid description, creation time.
    schema_version : int
    """

    element: str
    relativity: str
    labels: tuple[str, ...]
    l: tuple[int, ...]  # noqa: E741 - angular momentum
    occupation: tuple[float, ...]
    binding_energies_ev: tuple[float, ...]
    photon_energies_ev: np.ndarray
    sigma_per_electron_mb: np.ndarray
    beta: np.ndarray
    provenance: dict = field(default_factory=dict)
    schema_version: int = TABLE_SCHEMA_VERSION

    def __post_init__(self) -> None:
        e = np.asarray(self.photon_energies_ev, dtype=np.float64)
        s = np.asarray(self.sigma_per_electron_mb, dtype=np.float64)
        b = np.asarray(self.beta, dtype=np.float64)
        n_sub, n_e = len(self.labels), e.size
        if e.ndim != 1 or n_e < 2 or not np.all(np.isfinite(e)) or np.any(e <= 0) \
                or np.any(np.diff(e) <= 0):
            raise InputError("cross-section table: photon_energies_ev must be ≥ 2 positive, "
                             "strictly ascending values (eV)")
        for name, arr in (("sigma_per_electron_mb", s), ("beta", b)):
            if arr.shape != (n_sub, n_e):
                raise InputError(f"cross-section table: {name} has shape {arr.shape}, expected "
                                 f"(n_subshell, n_energy) = ({n_sub}, {n_e})")
        if not (len(self.l) == len(self.occupation) == len(self.binding_energies_ev) == n_sub):
            raise InputError("cross-section table: subshell labels, l, occupation and binding "
                             "energies must have one entry per subshell")
        if not np.all(np.isfinite(s)) or np.any(s < 0):
            raise InputError("cross-section table: sigma_per_electron_mb must be finite and ≥ 0")
        if self.relativity not in _RELATIVITIES:
            raise InputError(f"cross-section table: relativity {self.relativity!r}; accepted: "
                             f"{', '.join(_RELATIVITIES)}")
        for name, arr in (("photon_energies_ev", e), ("sigma_per_electron_mb", s), ("beta", b)):
            arr.setflags(write=False)
            object.__setattr__(self, name, arr)

    @property
    def energy_range_ev(self) -> tuple[float, float]:
        """(lowest, highest) grid photon energy, eV."""
        return float(self.photon_energies_ev[0]), float(self.photon_energies_ev[-1])

    def to_dict(self) -> dict:
        """JSON form (the file format of the module docstring; NaN β becomes null on writing)."""
        return {
            "schema": TABLE_SCHEMA,
            "schema_version": self.schema_version,
            "element": self.element,
            "relativity": self.relativity,
            "subshells": [
                {"label": lab, "l": int(l), "occupation": float(occ),
                 "binding_energy_ev": float(be)}
                for lab, l, occ, be in zip(self.labels, self.l, self.occupation,  # noqa: E741
                                           self.binding_energies_ev, strict=True)
            ],
            "photon_energies_ev": self.photon_energies_ev.tolist(),
            "sigma_per_electron_mb": self.sigma_per_electron_mb.tolist(),
            "beta": self.beta.tolist(),
            "provenance": dict(self.provenance),
        }

    @classmethod
    def from_dict(cls, data: dict, source: str = "cross-section table") -> CrossSectionTable:
        """Inverse of :meth:`to_dict`; ``source`` (e.g. a file name) is named in errors."""
        if not isinstance(data, dict):
            raise InputError(f"{source}: not a JSON object")
        if data.get("schema") != TABLE_SCHEMA:
            raise InputError(f"{source}: schema {data.get('schema')!r}; expected {TABLE_SCHEMA!r}")
        if data.get("schema_version") != TABLE_SCHEMA_VERSION:
            raise InputError(f"{source}: schema_version {data.get('schema_version')!r}; "
                             f"this valband reads {TABLE_SCHEMA_VERSION}")
        try:
            subs = data["subshells"]
            beta = np.array([[np.nan if v is None else v for v in row] for row in data["beta"]],
                            dtype=np.float64)
            sigma = np.array(data["sigma_per_electron_mb"], dtype=np.float64)
            if sigma.size == 0:
                sigma = sigma.reshape(len(subs), -1)
            if beta.size == 0:
                beta = beta.reshape(len(subs), -1)
            return cls(
                element=str(data["element"]),
                relativity=str(data["relativity"]),
                labels=tuple(str(s["label"]) for s in subs),
                l=tuple(int(s["l"]) for s in subs),
                occupation=tuple(float(s["occupation"]) for s in subs),
                binding_energies_ev=tuple(float(s["binding_energy_ev"]) for s in subs),
                photon_energies_ev=np.array(data["photon_energies_ev"], dtype=np.float64),
                sigma_per_electron_mb=sigma,
                beta=beta,
                provenance=dict(data.get("provenance", {})),
                schema_version=int(data["schema_version"]),
            )
        except InputError as exc:
            raise InputError(f"{source}: {exc}") from None
        except (KeyError, TypeError, ValueError) as exc:
            raise InputError(f"{source}: malformed cross-section table ({type(exc).__name__}: "
                             f"{exc})") from None


# ---------------------------------------------------------------------------------------------
def _check_relativity(relativity: str) -> str:
    if relativity not in _RELATIVITIES:
        raise SettingsError(f"unknown relativity {relativity!r}; accepted: "
                            f"{', '.join(_RELATIVITIES)}")
    return relativity


def _symbol(element) -> str:
    from valband.atom.configurations import resolve_element

    return resolve_element(element)[1]


def _check_photon_energy(photon_energy_ev) -> float:
    try:
        e = float(photon_energy_ev)
    except (TypeError, ValueError):
        raise SettingsError(f"photon energy {photon_energy_ev!r}: must be a positive number of eV")\
            from None
    if not math.isfinite(e) or e <= 0:
        raise SettingsError(f"photon energy {photon_energy_ev!r} eV: must be a positive number "
                            "of eV")
    return e


def _row(xs) -> tuple[np.ndarray, np.ndarray]:
    return (np.array([x.sigma_per_electron_mb for x in xs], dtype=np.float64),
            np.array([x.beta for x in xs], dtype=np.float64))


def _loglog_between(e0, e1, s0, s1, b0, b1, e):
    """σ and β at ``e`` from the ends of one segment (arrays over subshells)."""
    t = (math.log(e) - math.log(e0)) / (math.log(e1) - math.log(e0))
    with np.errstate(divide="ignore", invalid="ignore"):
        logs = np.exp((1 - t) * np.log(s0) + t * np.log(s1))
    lin = (1 - t) * s0 + t * s1
    sig = np.where((s0 > 0) & (s1 > 0), logs, lin)
    return sig, (1 - t) * b0 + t * b1


def build_table(element, energies_ev=DEFAULT_GRID, relativity: str = "scalar",
                progress: bool = False, refine: bool = True) -> CrossSectionTable:
    """Compute a :class:`CrossSectionTable` of ``element`` at ``energies_ev`` (eV).

    Parameters
    ----------
    element : str or int
        Element symbol or atomic number.
    energies_ev : sequence of float
        Base grid, eV (positive; sorted here). Default :data:`DEFAULT_GRID`.
    relativity : {"scalar", "none"}
        Treatment of the bound orbitals.
    progress : bool
        Show a progress bar on a terminal.
    refine : bool
        Add threshold points and refine adaptively (module docstring). With ``refine=False``
        the table holds exactly ``energies_ev``.
    """
    from valband import __version__
    from valband.atom.photoionization import valence_atom, valence_cross_sections
    from valband.progress import Progress

    _check_relativity(relativity)
    symbol = _symbol(element)
    try:
        grid = sorted({_check_photon_energy(e) for e in energies_ev})
    except TypeError:
        raise SettingsError("energies_ev must be a sequence of photon energies in eV") from None
    if len(grid) < 2:
        raise SettingsError(f"a cross-section table needs at least 2 distinct photon energies, got "
                            f"{len(grid)}")
    points: dict[float, tuple[np.ndarray, np.ndarray]] = {}
    bar = Progress(len(grid), f"{symbol} cross sections", enabled=progress)

    def compute(e: float):
        xs = valence_cross_sections(symbol, e, relativity)
        points[e] = _row(xs)
        bar.update()
        return xs

    atom = valence_atom(symbol, relativity)
    first = compute(grid[0])
    for e in grid[1:]:
        compute(e)
    if refine:
        lo, hi = grid[0], grid[-1]
        extra = sorted({x.binding_energy_ev + THRESHOLD_OFFSET_EV for x in first
                        if lo < x.binding_energy_ev + THRESHOLD_OFFSET_EV < hi})
        bar.total += len(extra)
        for e in extra:
            if e not in points:
                compute(e)
        todo = list(zip(sorted(points)[:-1], sorted(points)[1:], strict=True))
        for _ in range(REFINE_LEVELS):
            bar.total += len(todo)
            nxt = []
            for e0, e1 in todo:
                m = math.sqrt(e0 * e1)
                (s0, b0), (s1, b1) = points[e0], points[e1]
                compute(m)
                sm, bm = points[m]
                si, bi = _loglog_between(e0, e1, s0, s1, b0, b1, m)
                both = (s0 > 0) & (s1 > 0) & (sm > 0)
                with np.errstate(invalid="ignore", divide="ignore"):
                    ds = np.abs(si[both] / sm[both] - 1.0)
                    db = np.abs(bi[both] - bm[both])
                if ds.size and (ds.max() > REFINE_SIGMA_TOL or db.max() > REFINE_BETA_TOL):
                    nxt += [(e0, m), (m, e1)]
            todo = nxt
            if not todo:
                break
    bar.close()
    energies = np.array(sorted(points))
    sigma = np.stack([points[e][0] for e in energies], axis=1)
    beta = np.stack([points[e][1] for e in energies], axis=1)
    default = tuple(grid) == DEFAULT_GRID
    grid_text = (f"{'default: ' if default else ''}{len(grid)} points {grid[0]:g}–{grid[-1]:g} eV"
                 + (f" ({POINTS_PER_DECADE} per decade, log-spaced)" if default else "")
                 + (f"; + threshold points (BE + {THRESHOLD_OFFSET_EV} eV) and adaptive "
                    f"log-midpoint refinement (σ {REFINE_SIGMA_TOL:g} rel., "
                    f"β {REFINE_BETA_TOL:g} abs., {REFINE_LEVELS} levels): {energies.size} points"
                    if refine else ""))
    return CrossSectionTable(
        element=symbol,
        relativity=relativity,
        labels=tuple(x.subshell for x in first),
        l=tuple(int(x.l) for x in first),
        occupation=tuple(float(x.occupation) for x in first),
        binding_energies_ev=tuple(float(x.binding_energy_ev) for x in first),
        photon_energies_ev=energies,
        sigma_per_electron_mb=sigma,
        beta=beta,
        provenance={
            "valband_version": __version__,
            "method": "valband.atom.photoionization.valence_cross_sections: LDA atom "
                      f"(relativity={relativity}), Latter tail, dipole length form, "
                      "one-electron (Manson & Cooper 1968; Cooper & Zare 1968)",
            "functional": atom.functional,
            "relativistic_exchange": bool(atom.relativistic_exchange),
            "grid": grid_text,
            "default_grid": default,
            "refined": bool(refine),
            "created": _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds"),
        },
    )


# ---------------------------------------------------------------------------------------------
def interpolate(table: CrossSectionTable, photon_energy_ev: float) -> list:
    """σ per electron and β of every subshell of ``table`` at ``photon_energy_ev`` (eV).

    Log–log in σ, linear in ln E for β (module docstring); σ = 0 and β = NaN below a
    subshell's threshold.

    Returns
    -------
    list of valband.atom.photoionization.ValenceCrossSection
        One per subshell, in the table's order; ``note`` says where the values came from.

    Raises
    ------
    SettingsError
        If the energy is not positive and finite or lies outside the table's grid.
    """
    from valband.atom.photoionization import ValenceCrossSection

    e = _check_photon_energy(photon_energy_ev)
    grid = table.photon_energies_ev
    lo, hi = table.energy_range_ev
    if not lo <= e <= hi:
        raise SettingsError(f"photon energy {e:g} eV lies outside the {table.element} table's grid "
                            f"{lo:g}–{hi:g} eV (accepted range); outside it use a direct "
                            "calculation (valence_cross_sections, or `valband xsec --direct`)")
    j = int(np.searchsorted(grid, e, side="right"))
    j = min(max(j, 1), grid.size - 1)
    t_log = (math.log(e) - math.log(grid[j - 1])) / (math.log(grid[j]) - math.log(grid[j - 1]))
    out = []
    for i, label in enumerate(table.labels):
        be = table.binding_energies_ev[i]
        s_row, b_row = table.sigma_per_electron_mb[i], table.beta[i]
        if e < be:
            sig, bet, note = 0.0, math.nan, "below the ionisation threshold: subshell closed"
        else:
            s0, s1 = s_row[j - 1], s_row[j]
            if s0 > 0 and s1 > 0:
                t = t_log
                sig = math.exp((1 - t) * math.log(s0) + t * math.log(s1))
                bet = (1 - t) * b_row[j - 1] + t * b_row[j]
                note = "interpolated (log-log) from table"
            elif s1 > 0 and s0 == 0 and not np.isfinite(b_row[j - 1]):
                # threshold inside this segment: hold the first open point's values
                sig, bet = float(s1), float(b_row[j])
                note = "near threshold: first open table point"
            else:
                t = (e - grid[j - 1]) / (grid[j] - grid[j - 1])
                sig = float((1 - t) * s0 + t * s1)
                bet = float((1 - t_log) * b_row[j - 1] + t_log * b_row[j])
                note = "interpolated (linear) from table"
        occ = table.occupation[i]
        out.append(ValenceCrossSection(
            element=table.element, subshell=label, l=table.l[i], occupation=occ,
            binding_energy_ev=be, photon_energy_ev=e, sigma_mb=sig * occ,
            sigma_per_electron_mb=float(sig), beta=float(bet), note=note,
        ))
    return out


# ---------------------------------------------------------------------------------------------
def save_table(table: CrossSectionTable, path: str | Path) -> Path:
    """Write ``table`` as JSON atomically (module docstring format)."""
    from valband.output import write_json

    return write_json(path, table.to_dict())


def load_table(path: str | Path) -> CrossSectionTable:
    """Read a table file; InputError naming the file if it is unreadable or malformed."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as exc:
        raise InputError(f"{path}: cannot read cross-section table ({exc.strerror})") from None
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"{path}: not valid JSON ({exc.msg}, line {exc.lineno})") from None
    return CrossSectionTable.from_dict(data, source=str(path))


def cache_dir() -> Path:
    """Folder of cached tables.

    ``$VALBAND_CACHE_DIR/xsec``, else ``$XDG_CACHE_HOME/valband/xsec``, else
    ``~/.cache/valband/xsec``.
    """
    from valband.cache import cache_root

    return cache_root() / "xsec"


def _file_name(symbol: str, relativity: str) -> str:
    return f"{symbol}-{relativity}.json"


def shipped_table_path(element, relativity: str = "scalar") -> Path | None:
    """Path of the shipped table of ``element`` or None."""
    p = _SHIPPED_DIR / _file_name(_symbol(element), _check_relativity(relativity))
    return p if p.is_file() else None


def _usable(table: CrossSectionTable, symbol: str, relativity: str) -> str | None:
    """Why ``table`` cannot serve (symbol, relativity) on the default grid, or None."""
    if table.element != symbol or table.relativity != relativity:
        return f"holds {table.element} ({table.relativity}), not {symbol} ({relativity})"
    want_x = resolve_relativistic_exchange(None, relativity)
    if table.provenance.get("relativistic_exchange") is not want_x:
        return ("was built " + ("without" if want_x else "with")
                + " the relativistic exchange correction that this valband uses"
                + (" (an older table)" if "relativistic_exchange" not in table.provenance else ""))
    lo, hi = table.energy_range_ev
    if not (math.isclose(lo, DEFAULT_GRID[0]) and math.isclose(hi, DEFAULT_GRID[-1])
            and table.provenance.get("default_grid") and table.provenance.get("refined")):
        return "was not built on the default refined grid"
    return None


_MEMO: dict[tuple[str, str], tuple[CrossSectionTable, str]] = {}


def clear_memo() -> None:
    """Forget the tables held in this process (the next lookup reads files again)."""
    _MEMO.clear()


def table_for(element, relativity: str = "scalar", progress: bool = False
              ) -> tuple[CrossSectionTable, str]:
    """Return the table :func:`cross_sections` uses, and where it came from.

    The second item starts with "shipped: ", "cache: " or "built" (followed by the path).
    A corrupted or mismatched cache file gives a :class:`XsecCacheWarning` and is rebuilt.
    """
    _check_relativity(relativity)
    symbol = _symbol(element)
    key = (symbol, relativity)
    hit = _MEMO.get(key)
    if hit is not None:
        return hit
    shipped = shipped_table_path(symbol, relativity)
    if shipped is not None:
        table = load_table(shipped)  # a broken shipped file is a packaging error: raise
        why = _usable(table, symbol, relativity)
        if why:
            raise InputError(f"{shipped}: shipped table {why}")
        _MEMO[key] = (table, f"shipped: {shipped}")
        return _MEMO[key]
    path = cache_dir() / _file_name(symbol, relativity)
    if path.exists():
        try:
            table = load_table(path)
            why = _usable(table, symbol, relativity)
            if why:
                raise InputError(f"{path}: cached table {why}")
        except InputError as exc:
            warnings.warn(f"ignoring unusable cached cross-section table and rebuilding it: {exc}",
                          XsecCacheWarning, stacklevel=3)
        else:
            _MEMO[key] = (table, f"cache: {path}")
            return _MEMO[key]
    table = build_table(symbol, DEFAULT_GRID, relativity, progress=progress)
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        save_table(table, path)
        where = f"built, cached: {path}"
    except OSError as exc:
        warnings.warn(f"cannot write the cross-section cache {path} ({exc.strerror}); the table "
                      "is kept in memory only", XsecCacheWarning, stacklevel=3)
        where = "built (not cached)"
    _MEMO[key] = (table, where)
    return _MEMO[key]


def cross_sections(element, photon_energy_ev: float, relativity: str = "scalar") -> list:
    """σ (Mb), σ per electron (Mb) and β of each valence subshell of ``element`` at an energy (eV).

    Table lookup (shipped, else cache, else built once and cached) with log–log interpolation;
    see the module docstring. Same result type as
    :func:`valband.atom.photoionization.valence_cross_sections`.

    Raises
    ------
    SettingsError
        Bad photon energy (not positive, or outside 10 eV – 10 keV) or relativity.
    InputError
        Unknown element.
    """
    e = _check_photon_energy(photon_energy_ev)
    table, _ = table_for(element, relativity)
    return interpolate(table, e)


def photon_energy_of(value) -> float:
    """Photon energy in eV from a number (eV) or a source name of :data:`PHOTON_SOURCES`.

    Names are case-insensitive, with or without the dash ("Al-Ka", "alka", "HeII").
    """
    accepted = ("accepted: a positive number of eV or a source name "
                + ", ".join(f"{n} ({v:g} eV)" for n, v in PHOTON_SOURCES.items()))
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        text, e = repr(value), float(value)
    else:
        text = str(value).strip()
        key = text.lower().replace("-", "").replace("_", "").replace(" ", "")
        for name, ev in PHOTON_SOURCES.items():
            if key == name.lower().replace("-", ""):
                return ev
        try:
            e = float(text)
        except ValueError:
            raise SettingsError(f"photon energy {text!r}: not a number of eV or a known source; "
                                f"{accepted}") from None
    if not math.isfinite(e) or e <= 0:
        raise SettingsError(f"photon energy {text}: must be a positive number of eV; {accepted}")
    return e


# ---------------------------------------------------------------------------------------------
def write_shipped(elements=SHIPPED_ELEMENTS, progress: bool = True) -> list[Path]:
    """(Re)generate the shipped scalar-relativistic tables in ``valband/data/xsec``."""
    _SHIPPED_DIR.mkdir(parents=True, exist_ok=True)
    out = []
    for el in elements:
        table = build_table(el, DEFAULT_GRID, "scalar", progress=progress)
        out.append(save_table(table, _SHIPPED_DIR / _file_name(table.element, "scalar")))
        out[-1].chmod(0o644)  # package data: readable by all (the atomic temp file is 0600)
        print(f"{out[-1]}: {table.photon_energies_ev.size} energies", flush=True)
    return out


def _main(argv=None) -> int:
    import argparse

    p = argparse.ArgumentParser(prog="python -m valband.atom.tables",
                                description="Generate the shipped cross-section tables.")
    p.add_argument("--write-shipped", action="store_true",
                   help="write valband/data/xsec/<El>-scalar.json for "
                   f"{', '.join(SHIPPED_ELEMENTS)}")
    p.add_argument("--elements", nargs="+", default=list(SHIPPED_ELEMENTS),
                   help="only these elements")
    args = p.parse_args(argv)
    if not args.write_shipped:
        p.print_help()
        return 2
    write_shipped(args.elements)
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(_main())
