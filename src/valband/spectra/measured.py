"""Measured valence-band spectra: the :class:`MeasuredSpectrum` container and its file reader.

:func:`read_spectrum` reads two-column text/CSV files (comma, semicolon, tab or whitespace
delimited; header and comment lines allowed) and dispatches VAMAS files (ISO 14976) to
:mod:`valband.spectra.vamas`. The axis is returned as binding energy BE (eV, ascending); a
kinetic-energy axis is converted with the photoemission energy balance (common practice)::

    BE = hν − E_kin − φ

with hν the photon energy and φ the analyser work function (eV).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from valband.arrays import readonly
from valband.errors import InputError
from valband.output import SCHEMA_VERSION

__all__ = ["MeasuredSpectrum", "read_spectrum", "read_text_spectrum", "INTENSITY_UNITS",
           "MEASURED_KIND", "COMMENT_CHARS"]

#: Intensity units a measured spectrum may carry.
INTENSITY_UNITS = ("counts", "counts/s", "arb.")
MEASURED_KIND = "valband.measured_spectrum"
#: First characters that mark a comment line in text files.
COMMENT_CHARS = ("#", "%", ";", "!")
_AXES = ("auto", "binding", "kinetic")
_VAMAS_ID = "VAMAS Surface Chemical Analysis Standard Data Transfer Format"


@dataclass(frozen=True, eq=False)
class MeasuredSpectrum:
    """A measured photoemission spectrum on a binding-energy axis.

    Attributes
    ----------
    binding_energy : (n,) float64, eV
        BE = E_F − E, strictly ascending; steps need not be uniform.
    intensity : (n,) float64
        In ``unit``: ``"counts"``, ``"counts/s"`` or ``"arb."``. Counts and count rates are
        non-negative.
    unit : str
    uncertainty : (n,) float64 or None
        One standard deviation in ``unit``; √counts (Poisson, common practice) when the unit
        is counts and no other value is given.
    source : str or None
        File the spectrum was read from.
    block : str or None
        Block name inside a multi-block file (VAMAS).
    photon_energy : float or None, eV
    metadata : dict
        Reader choices and file fields (axis decision, work function, header text, ...).
    """

    binding_energy: NDArray[np.float64]
    intensity: NDArray[np.float64]
    unit: str = "counts"
    uncertainty: NDArray[np.float64] | None = None
    source: str | None = None
    block: str | None = None
    photon_energy: float | None = None
    metadata: dict = field(default_factory=dict)

    def __post_init__(self) -> None:
        be, y = readonly(self.binding_energy), readonly(self.intensity)
        object.__setattr__(self, "binding_energy", be)
        object.__setattr__(self, "intensity", y)
        if be.ndim != 1 or y.shape != be.shape or be.size < 2:
            raise InputError("MeasuredSpectrum: binding_energy and intensity must be 1-D arrays "
                             f"of equal length ≥ 2; got shapes {be.shape} and {y.shape}")
        if not (np.isfinite(be).all() and np.isfinite(y).all()):
            raise InputError("MeasuredSpectrum: binding_energy and intensity must be finite")
        if not (np.diff(be) > 0).all():
            raise InputError("MeasuredSpectrum: binding_energy must be strictly ascending")
        if self.unit not in INTENSITY_UNITS:
            raise InputError(f"MeasuredSpectrum: unit {self.unit!r}; accepted: "
                             f"{', '.join(INTENSITY_UNITS)}")
        if self.unit != "arb." and (y < 0).any():
            raise InputError(f"MeasuredSpectrum: negative intensity in {self.unit}")
        unc = self.uncertainty
        if unc is None and self.unit == "counts":
            unc = np.sqrt(y)
        if unc is not None:
            unc = readonly(unc)
            if unc.shape != y.shape or not np.isfinite(unc).all() or (unc < 0).any():
                raise InputError("MeasuredSpectrum: uncertainty must be finite, ≥ 0 and match "
                                 "the intensity")
        object.__setattr__(self, "uncertainty", unc)
        if self.photon_energy is not None:
            hv = float(self.photon_energy)
            if not (math.isfinite(hv) and hv > 0):
                raise InputError(f"MeasuredSpectrum: photon_energy {hv} eV; must be > 0")
            object.__setattr__(self, "photon_energy", hv)
        if self.source is not None:
            object.__setattr__(self, "source", str(self.source))
        object.__setattr__(self, "metadata", dict(self.metadata))

    def to_dict(self) -> dict:
        """JSON-ready dictionary (inverse: :meth:`from_dict`)."""
        return {
            "kind": MEASURED_KIND,
            "schema_version": SCHEMA_VERSION,
            "binding_energy_eV": self.binding_energy.tolist(),
            "intensity": self.intensity.tolist(),
            "unit": self.unit,
            "uncertainty": None if self.uncertainty is None else self.uncertainty.tolist(),
            "source": self.source,
            "block": self.block,
            "photon_energy_eV": self.photon_energy,
            "metadata": self.metadata,
        }

    @classmethod
    def from_dict(cls, d: dict) -> MeasuredSpectrum:
        """Inverse of :meth:`to_dict`."""
        if not isinstance(d, dict) or d.get("kind") != MEASURED_KIND:
            got = d.get("kind") if isinstance(d, dict) else type(d).__name__
            raise InputError(f"measured-spectrum dictionary: kind {got!r}; expected "
                             f"{MEASURED_KIND!r}")
        try:
            unc = d.get("uncertainty")
            return cls(binding_energy=np.array(d["binding_energy_eV"], dtype=np.float64),
                       intensity=np.array(d["intensity"], dtype=np.float64),
                       unit=d["unit"],
                       uncertainty=None if unc is None else np.array(unc, dtype=np.float64),
                       source=d.get("source"), block=d.get("block"),
                       photon_energy=d.get("photon_energy_eV"),
                       metadata=dict(d.get("metadata") or {}))
        except (KeyError, TypeError, ValueError) as exc:
            if isinstance(exc, InputError):
                raise
            raise InputError(f"measured-spectrum dictionary: missing or malformed field ({exc})"
                             ) from exc


# ----------------------------------------------------------------------------- dispatch

def read_spectrum(path: str | Path, *, axis: str = "auto", photon_energy: float | None = None,
                  work_function: float = 4.5, block: str | int | None = None
                  ) -> MeasuredSpectrum:
    """Read a measured spectrum from a text/CSV or VAMAS file.

    Parameters
    ----------
    path : file
        ``.vms``/``.vamas`` files, or any file whose first line is the VAMAS identifier, are
        read by :func:`valband.spectra.vamas.read_vamas`; anything else as text
        (:func:`read_text_spectrum`).
    axis : {"auto", "binding", "kinetic"}
        What the first column (or the VAMAS abscissa) is. ``"auto"`` decides from the header
        (words *binding*/*BE*, *kinetic*/*KE*; VAMAS: the abscissa label) and otherwise assumes
        binding energy; the choice is recorded in ``metadata["axis"]`` /
        ``metadata["axis_from"]``.
    photon_energy : float, eV, optional
        hν for a kinetic-energy axis (required then for text files). For VAMAS files it
        replaces the block's source energy when given.
    work_function : float, eV
        Analyser work function φ in BE = hν − E_kin − φ. For VAMAS files the block's value is
        used when the file has one; this is the fallback.
    block : str or int, optional
        VAMAS block by name or 0-based index; needed when the file holds several blocks.

    Returns
    -------
    MeasuredSpectrum
    """
    path = Path(path)
    if axis not in _AXES:
        raise InputError(f"read_spectrum: axis {axis!r}; accepted: {', '.join(_AXES)}")
    if photon_energy is not None:
        photon_energy = float(photon_energy)
        if not (math.isfinite(photon_energy) and photon_energy > 0):
            raise InputError(f"read_spectrum: photon_energy {photon_energy} eV; must be > 0")
    work_function = float(work_function)
    if not (math.isfinite(work_function) and work_function >= 0):
        raise InputError(f"read_spectrum: work_function {work_function} eV; must be ≥ 0")
    lines = _read_lines(path)
    if path.suffix.lower() in (".vms", ".vamas") or (
            lines and lines[0].strip().startswith(_VAMAS_ID)):
        from valband.spectra.vamas import read_vamas, select_block

        spectra = read_vamas(path, axis=axis, photon_energy=photon_energy,
                             work_function=work_function)
        return select_block(spectra, block, path)
    if block is not None:
        raise InputError(f"{path}: block={block!r} given, but a text file has no blocks "
                         "(blocks exist in VAMAS files only)")
    return _parse_text(path, lines, axis, photon_energy, work_function)


def read_text_spectrum(path: str | Path, *, axis: str = "auto",
                       photon_energy: float | None = None,
                       work_function: float = 4.5) -> MeasuredSpectrum:
    """Read a two-column text/CSV spectrum (see :func:`read_spectrum` for the parameters)."""
    path = Path(path)
    if axis not in _AXES:
        raise InputError(f"read_text_spectrum: axis {axis!r}; accepted: {', '.join(_AXES)}")
    return _parse_text(path, _read_lines(path), axis, photon_energy, float(work_function))


def _read_lines(path: Path) -> list[str]:
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise InputError(f"{path}: cannot read spectrum file ({exc.strerror})") from exc
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = raw.decode("latin-1")
    return text.splitlines()


# ----------------------------------------------------------------------------- text files

_NUMBER_START = re.compile(r"^[+-]?(\d|\.\d|nan|inf)", re.IGNORECASE)


def _delimiter_of(line: str) -> str | None:
    """Delimiter of a data line: ';' over tab over ',' over whitespace (None)."""
    for d in (";", "\t", ","):
        if d in line:
            return d
    return None


def _split(line: str, delim: str | None) -> list[str]:
    fields = [f.strip() for f in (line.split(delim) if delim else line.split())]
    while fields and fields[-1] == "":  # a trailing delimiter
        fields.pop()
    return fields


def _to_float(text: str, decimal_comma: bool) -> float:
    if decimal_comma:
        text = text.replace(",", ".")
    return float(text)


def _is_comment(s: str) -> bool:
    return s.startswith(COMMENT_CHARS)


def _axis_hint(text: str) -> str | None:
    words = set(re.findall(r"[a-z]+", text.lower()))
    b = bool(words & {"binding", "be", "eb", "ebin", "bindingenergy"})
    k = bool(words & {"kinetic", "ke", "ek", "ekin", "kineticenergy"})
    if b == k:
        return None
    return "binding" if b else "kinetic"


def _unit_hint(text: str) -> str | None:
    t = text.lower().replace(" ", "")
    if any(w in t for w in ("cps", "counts/s", "c/s", "cts/s", "count/s", "countspersecond",
                            "countrate", "counts/sec", "s^-1", "s-1", "1/s")):
        return "counts/s"
    if any(w in t for w in ("a.u", "arb")):
        return "arb."
    if any(w in t for w in ("counts", "count", "cts")):
        return "counts"
    return None


def _parse_text(path: Path, lines: list[str], axis: str, photon_energy: float | None,
                work_function: float) -> MeasuredSpectrum:
    header: list[tuple[int, str]] = []
    comments: list[tuple[int, str]] = []
    rows: list[tuple[int, float, float]] = []
    delim: str | None = None
    ncol = 0
    decimal_comma = False
    for lineno, raw in enumerate(lines, start=1):
        s = raw.strip()
        if not s:
            continue
        if _is_comment(s):
            comments.append((lineno, s.lstrip("".join(COMMENT_CHARS)).strip()))
            continue
        if not rows and not _NUMBER_START.match(s):
            header.append((lineno, s))
            continue
        if not rows:
            delim = _delimiter_of(s)
        fields = _split(s, delim)
        if not rows:
            decimal_comma = delim == ";" and "," in s and "." not in s
            ncol = len(fields)
            if ncol < 2:
                raise InputError(f"{path}, line {lineno}: only one column ({s!r}); a spectrum "
                                 "file needs two columns: energy (eV) and intensity")
        try:
            vals = [_to_float(f, decimal_comma) for f in fields]
        except ValueError:
            raise InputError(f"{path}, line {lineno}: non-numeric value in {s!r}; data rows "
                             f"hold numbers separated by {_delim_name(delim)}") from None
        if len(fields) != ncol:
            raise InputError(f"{path}, line {lineno}: {len(fields)} column(s) where the first "
                             f"data row has {ncol} (delimiter {_delim_name(delim)}); got {s!r}")
        x, y = vals[:2]
        if not (math.isfinite(x) and math.isfinite(y)):
            raise InputError(f"{path}, line {lineno}: NaN or infinite value in {s!r}; every "
                             "energy and intensity must be a finite number")
        rows.append((lineno, x, y))
    if not rows:
        what = "is empty" if not header and not comments else "has no data rows"
        raise InputError(f"{path}: {what} (line 1 to {len(lines)}); expected rows of two "
                         "numbers: energy (eV) and intensity")
    if len(rows) < 2:
        raise InputError(f"{path}, line {rows[0][0]}: only one data row; a spectrum needs ≥ 2")

    linenos = np.array([r[0] for r in rows])
    x = np.array([r[1] for r in rows])
    y = np.array([r[2] for r in rows])
    _check_axis(path, x, linenos)

    # header words: column names line(s); else the last comment line before the data
    hint_lines = [h for _, h in header] or [c for n, c in comments if n < linenos[0]][-1:]
    hint_fields = _split(hint_lines[-1], delim) if hint_lines else []
    x_text = hint_fields[0] if len(hint_fields) >= 2 else " ".join(hint_lines)
    y_text = " ".join(hint_fields[1:]) if len(hint_fields) >= 2 else " ".join(hint_lines)
    file_axis = _axis_hint(x_text)
    unit = _unit_hint(y_text)
    meta: dict = {"format": "text", "delimiter": _delim_name(delim), "n_columns": ncol,
                  "header": [h for _, h in header], "comments": [c for _, c in comments]}
    if decimal_comma:
        meta["decimal_comma"] = True
    meta["unit_from"] = "header" if unit else "assumed"
    unit = unit or "counts"

    neg = np.flatnonzero(y < 0) if unit != "arb." else np.array([], dtype=int)
    if neg.size:
        i = neg[0]
        raise InputError(f"{path}, line {linenos[i]}: negative intensity {y[i]} {unit}; counts "
                         "and count rates must be ≥ 0")

    if axis == "auto":
        chosen = file_axis or "binding"
        meta["axis_from"] = (("header" if header else "comment line before the data")
                             if file_axis else "assumed (no axis word in header)")
    else:
        if file_axis is not None and file_axis != axis:
            raise InputError(f"{path}, line {header[-1][0] if header else comments[-1][0]}: "
                             f"axis={axis!r} requested but the header says {file_axis} energy "
                             f"({x_text!r}); pass axis='auto' or fix the header")
        chosen = axis
        meta["axis_from"] = "argument"
    meta["axis"] = chosen
    be = _to_binding(path, x, chosen, photon_energy, work_function, meta)
    order = np.argsort(be, kind="stable")
    return MeasuredSpectrum(binding_energy=be[order], intensity=y[order], unit=unit,
                            source=str(path), photon_energy=photon_energy, metadata=meta)


def _delim_name(delim: str | None) -> str:
    return {";": "semicolon", "\t": "tab", ",": "comma", None: "whitespace"}[delim]


def _check_axis(path: Path, x: NDArray, linenos: NDArray) -> None:
    """Duplicated energies and an axis that goes up and down are errors (line numbers)."""
    order = np.argsort(x, kind="stable")
    dup = np.flatnonzero(np.diff(x[order]) == 0)
    if dup.size:
        a, b = sorted((linenos[order[dup[0]]], linenos[order[dup[0] + 1]]))
        raise InputError(f"{path}, line {b}: energy {x[order[dup[0]]]} eV duplicates line {a}; "
                         "each energy may appear once")
    sign = np.sign(np.diff(x))
    flip = np.flatnonzero(sign != sign[0])
    if flip.size:
        i = flip[0]  # x[i] is the turning point
        raise InputError(f"{path}, line {linenos[i + 1]}: energy axis changes direction at "
                         f"line {linenos[i]} ({x[i - 1]} → {x[i]} → {x[i + 1]} eV); the axis "
                         "must be monotonic (ascending or descending)")


def _to_binding(path: Path, x: NDArray, axis: str, photon_energy: float | None,
                work_function: float, meta: dict) -> NDArray:
    """BE from the file's axis; kinetic: BE = hν − E_kin − φ (common practice)."""
    if axis == "binding":
        return x
    if photon_energy is None:
        raise InputError(f"{path}: the energy axis is kinetic energy; pass photon_energy (eV) "
                         "to convert it with BE = hν − E_kin − φ")
    meta["work_function_eV"] = work_function
    meta["conversion"] = "BE = hv - E_kin - phi"
    return photon_energy - x - work_function
