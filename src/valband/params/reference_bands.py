"""Reference band energies for fitting a parameter set: valband's own text format, or ASE JSON.

Two inputs are read (:func:`read_reference_bands` picks by content):

1. **valband reference-band text file** (our own format, version 1)::

       # Reference bands of fcc Cu (comment lines start with '#'; blank lines are ignored)
       %format valband-reference-bands 1
       %fermi-level 5.21                  (optional: E_F on the file's energy scale, eV)
       %band-weights 1 1 1 1 1 1 0.5 0.5 0.5   (optional: one weight >= 0 per band)
       %kpoint-weights                    (optional flag: a 4th number per row is its weight)
       # k1     k2     k3       e_1    e_2   ...  e_n   (eV)
       0.000  0.000  0.000    -4.10   3.21  3.21  3.21  4.15  4.15  24.9  24.9  24.9
       0.500  0.000  0.500    ...

   * The first line that is not a comment or blank must be ``%format valband-reference-bands 1``.
   * Directives start with ``%`` and come before the first data row; unknown ones are refused.
   * Each data row: three k-point coordinates, *fractional* in the reciprocal lattice vectors
     of the structure the fit uses (k_cart = k_frac · reciprocal cell, 2π included), then,
     if ``%kpoint-weights`` is given, the k-point's weight (≥ 0), then the band energies in
     eV in ascending order. Every row carries the same number of bands; a row with fewer
     bands, or NaN/inf, is an error naming the line.
   * The energy zero is arbitrary (the fit aligns it, see :mod:`valband.params.fitting`);
     ``%fermi-level`` only records E_F so reports can show energies relative to it.

2. **ASE band structure JSON** (``ase.spectrum.band_structure.BandStructure``, as written by
   ``BandStructure.write("bands.json")``): the path's ``kpts`` (fractional) and ``energies``
   (spin channel 0; a spin-polarised file with different channels is refused), ``reference``
   as the Fermi level. All bands and k-points have weight 1.

Units: k dimensionless (fractional), energies eV.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from valband.arrays import readonly
from valband.errors import InputError

__all__ = ["FORMAT_LINE", "ReferenceBands", "read_reference_bands", "parse_reference_text",
           "write_reference_bands"]

#: First non-comment line of a valband reference-band file.
FORMAT_LINE = "%format valband-reference-bands 1"
_DIRECTIVES = ("%format", "%fermi-level", "%band-weights", "%kpoint-weights")


@dataclass(frozen=True, eq=False)
class ReferenceBands:
    """Reference band energies at fractional k-points.

    Attributes
    ----------
    kpoints : array (n_k, 3)
        Fractional coordinates in the reciprocal lattice vectors.
    energies : array (n_k, n_bands)
        Band energies (eV), ascending per k-point, arbitrary zero.
    band_weights : array (n_bands,)
        Weight of each band (≥ 0).
    kpoint_weights : array (n_k,)
        Weight of each k-point (≥ 0).
    fermi_level : float or None
        E_F on the file's scale (eV), if given.
    source : str
        Where the data came from (file and format).
    """

    kpoints: NDArray[np.float64] = field(repr=False)
    energies: NDArray[np.float64] = field(repr=False)
    band_weights: NDArray[np.float64] = field(repr=False)
    kpoint_weights: NDArray[np.float64] = field(repr=False)
    fermi_level: float | None
    source: str

    def __post_init__(self) -> None:
        k = np.asarray(self.kpoints, dtype=float)
        e = np.asarray(self.energies, dtype=float)
        if k.ndim != 2 or k.shape[1] != 3 or k.shape[0] == 0:
            raise InputError(f"{self.source}: k-points must have shape (n_k, 3), got {k.shape}")
        if e.ndim != 2 or e.shape[0] != k.shape[0] or e.shape[1] == 0:
            raise InputError(
                f"{self.source}: energies must have shape (n_k, n_bands) = ({k.shape[0]}, n), "
                f"got {e.shape}"
            )
        if not (np.all(np.isfinite(k)) and np.all(np.isfinite(e))):
            raise InputError(f"{self.source}: k-points and energies must be finite (no NaN/inf)")
        bw = np.asarray(self.band_weights, dtype=float)
        kw = np.asarray(self.kpoint_weights, dtype=float)
        for name, w, n in (("band", bw, e.shape[1]), ("k-point", kw, e.shape[0])):
            if w.shape != (n,) or not np.all(np.isfinite(w)) or np.any(w < 0):
                raise InputError(
                    f"{self.source}: {name} weights must be {n} finite numbers >= 0, got "
                    f"shape {w.shape}"
                )
        if not (np.any(bw > 0) and np.any(kw > 0)):
            raise InputError(f"{self.source}: every band or every k-point has weight 0")
        object.__setattr__(self, "kpoints", readonly(k))
        object.__setattr__(self, "energies", readonly(np.sort(e, axis=1)))
        object.__setattr__(self, "band_weights", readonly(bw))
        object.__setattr__(self, "kpoint_weights", readonly(kw))

    @property
    def n_kpoints(self) -> int:
        """Number of k-points."""
        return int(self.kpoints.shape[0])

    @property
    def n_bands(self) -> int:
        """Number of bands per k-point."""
        return int(self.energies.shape[1])


def _number(tok: str, where: str, what: str) -> float:
    try:
        x = float(tok)
    except ValueError:
        raise InputError(f"{where}: {what} {tok!r} is not a number") from None
    if not math.isfinite(x):
        raise InputError(f"{where}: {what} is {tok!r}; accepted: finite numbers (no NaN/inf)")
    return x


def parse_reference_text(text: str, source: str = "<text>") -> ReferenceBands:
    """Parse the valband reference-band text format (module docstring)."""
    fermi = None
    band_w: list[float] | None = None
    kweights = False
    seen_format = False
    rows: list[list[float]] = []
    row_lines: list[int] = []
    for lineno, raw in enumerate(text.splitlines(), start=1):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        where = f"{source}, line {lineno}"
        if line.startswith("%"):
            if rows:
                raise InputError(f"{where}: directive {line.split()[0]!r} after the first data "
                                 "row; accepted: directives before the data")
            key, *vals = line.split()
            if key not in _DIRECTIVES:
                raise InputError(f"{where}: unknown directive {key!r}; accepted: "
                                 + ", ".join(_DIRECTIVES))
            if key == "%format":
                if " ".join(line.split()) != FORMAT_LINE:
                    raise InputError(f"{where}: {line!r}; accepted: {FORMAT_LINE!r}")
                seen_format = True
            elif not seen_format:
                break
            elif key == "%fermi-level":
                if len(vals) != 1:
                    raise InputError(f"{where}: %fermi-level takes one energy in eV")
                fermi = _number(vals[0], where, "Fermi level")
            elif key == "%band-weights":
                if not vals:
                    raise InputError(f"{where}: %band-weights needs one weight per band")
                band_w = [_number(v, where, "band weight") for v in vals]
                if any(w < 0 for w in band_w):
                    raise InputError(f"{where}: band weights must be >= 0")
            else:
                if vals:
                    raise InputError(f"{where}: %kpoint-weights takes no value")
                kweights = True
            continue
        if not seen_format:
            break
        toks = line.split()
        need = 4 + int(kweights)
        if len(toks) < need:
            raise InputError(
                f"{where}: {len(toks)} numbers; accepted: k1 k2 k3 "
                + ("weight " if kweights else "") + "and at least one band energy (eV)"
            )
        rows.append([_number(t, where, "value") for t in toks])
        row_lines.append(lineno)
        if len(rows[-1]) != len(rows[0]):
            nb0 = len(rows[0]) - need + 1
            nb = len(rows[-1]) - need + 1
            raise InputError(
                f"{where}: {nb} band energies, but line {row_lines[0]} has {nb0}; accepted: the "
                "same number of bands on every row (a missing band cannot be guessed)"
            )
    if not seen_format:
        raise InputError(f"{source}: not a valband reference-band file; accepted: a first line "
                         f"{FORMAT_LINE!r} (after comments), or an ASE BandStructure JSON file")
    if not rows:
        raise InputError(f"{source}: no data rows (k1 k2 k3 energies...)")
    data = np.array(rows)
    k = data[:, :3]
    kw = data[:, 3] if kweights else np.ones(len(data))
    e = data[:, 3 + int(kweights):]
    if kweights and np.any(kw < 0):
        raise InputError(f"{source}: k-point weights must be >= 0")
    if band_w is None:
        bw = np.ones(e.shape[1])
    elif len(band_w) != e.shape[1]:
        raise InputError(f"{source}: %band-weights gives {len(band_w)} weights for "
                         f"{e.shape[1]} bands; accepted: one weight per band")
    else:
        bw = np.array(band_w)
    return ReferenceBands(k, e, bw, kw, fermi, f"{source} (valband reference bands v1)")


def _read_ase_json(path: Path, text: str) -> ReferenceBands:
    from ase.io.jsonio import decode
    from ase.spectrum.band_structure import BandStructure

    try:
        obj = decode(text)
    except Exception as exc:  # noqa: BLE001 - ASE raises many kinds
        raise InputError(f"{path}: JSON that ASE cannot decode ({exc})") from None
    if not isinstance(obj, BandStructure):
        raise InputError(f"{path}: JSON holds {type(obj).__name__}, not an ASE BandStructure; "
                         "accepted: BandStructure.write('bands.json') output")
    e = np.asarray(obj.energies, dtype=float)
    if e.ndim != 3 or e.shape[0] not in (1, 2):
        raise InputError(f"{path}: band energies of shape {e.shape}; accepted: (spins, k, bands)")
    if e.shape[0] == 2 and not np.allclose(e[0], e[1], atol=1e-6):
        raise InputError(f"{path}: spin-polarised bands (the two spin channels differ); "
                         "accepted: non-magnetic reference bands")
    k = np.asarray(obj.path.kpts, dtype=float)
    return ReferenceBands(k, e[0], np.ones(e.shape[2]), np.ones(e.shape[1]),
                          float(obj.reference), f"{path} (ASE BandStructure JSON)")


def read_reference_bands(path: str | Path) -> ReferenceBands:
    """Read reference bands from a valband text file or an ASE BandStructure JSON file.

    Raises
    ------
    InputError
        Missing file, unknown format, ragged rows (missing bands), NaN/inf, bad weights.
    """
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except OSError as exc:
        raise InputError(f"cannot read reference bands {p}: {exc.strerror or exc}") from None
    except UnicodeDecodeError:
        raise InputError(f"{p}: not UTF-8 text; accepted: a valband reference-band file or "
                         "ASE BandStructure JSON") from None
    if text.lstrip().startswith("{"):
        try:
            json.loads(text)
        except json.JSONDecodeError as exc:
            raise InputError(f"{p}: invalid JSON ({exc})") from None
        return _read_ase_json(p, text)
    return parse_reference_text(text, str(p))


def write_reference_bands(
    path: str | Path, kpoints, energies, *, band_weights=None, fermi_level=None,
    comment: str = "",
) -> Path:
    """Write bands in the valband text format (e.g. to hand-edit or to share a fit target)."""
    k = np.asarray(kpoints, dtype=float)
    e = np.asarray(energies, dtype=float)
    ref = ReferenceBands(k, e, np.ones(e.shape[1]) if band_weights is None else band_weights,
                         np.ones(len(k)), fermi_level, str(path))
    lines = [f"# {c}" for c in comment.splitlines()] + [FORMAT_LINE]
    if fermi_level is not None:
        lines.append(f"%fermi-level {float(fermi_level):.6f}")
    if band_weights is not None:
        lines.append("%band-weights " + " ".join(f"{w:g}" for w in ref.band_weights))
    lines.append("# k1 k2 k3 (fractional) then band energies (eV)")
    for kk, ee in zip(ref.kpoints, ref.energies, strict=True):
        lines.append(" ".join(f"{x:.8f}" for x in kk) + "   " + " ".join(f"{x:.6f}" for x in ee))
    target = Path(path)
    target.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return target
