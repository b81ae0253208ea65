"""VAMAS (ISO 14976) surface-chemical-analysis transfer files: reader and writer, common case.

Supported: experiment modes ``NORM`` and ``SDP``, scan mode ``REGULAR``, any number of blocks,
one or more corresponding variables (the first is the intensity), an energy abscissa labelled
``Kinetic Energy`` or ``Binding Energy`` (eV). A kinetic axis is converted with
BE = hν − E_kin − φ (common practice), hν being the block's analysis-source characteristic
energy and φ the block's analyser work function.

Layout assumed (ISO 14976:1998, written from memory — no copy of the standard was consulted).
Every item is one line.

Header: format identifier; institution; instrument model; operator; experiment identifier;
number of comment lines, then the lines; experiment mode; scan mode; number of spectral regions
(NORM/SDP); number of experimental variables, then label and unit for each; number of entries
in the parameter inclusion/exclusion list (only 0 is supported: every block carries every
field), then the entries; number of manually entered items, then the items; number of future
upgrade experiment entries; number of future upgrade block entries; the future upgrade
experiment entries; number of blocks.

Block: block identifier; sample identifier; year, month, day, hours, minutes, seconds, hours
ahead of GMT (7 lines); number of comment lines, then the lines; technique; one value per
experimental variable; analysis-source label; (SDP) sputtering particle atomic number, number
of atoms, charge (3 lines); analysis-source characteristic energy (eV); source strength;
beam width x, y; source polar angle of incidence; source azimuth; analyser mode; pass energy
(or retard ratio); (technique ``AES diff``) differential width; lens magnification; analyser
work function (eV); target bias; analysis width x, y; analyser take-off polar angle, azimuth;
species label; transition label; charge of detected particle; (REGULAR) abscissa label, units,
start, increment; number of corresponding variables, then label and units for each; signal
mode; collection time; number of scans; signal time correction; (SDP) sputtering source
energy, current, width x, width y, polar angle, azimuth, mode (7 lines); sample normal polar
angle of tilt, azimuth; sample rotation angle; number of additional numerical parameters, then
label, units, value for each; the future upgrade block entries; number of ordinate values
(points × corresponding variables); minimum and maximum of each corresponding variable; the
ordinate values, one per line, interleaved point by point. The file ends with
``end of experiment``.

The value 1E37 stands for "not known" (assumption, from memory). Fields the reader does not use
are read as text, so their content may be anything; the numbers it uses (counts, abscissa
start and increment, source energy, work function, ordinates) are checked strictly, with the
file and line named in every error. A block identifier that is a bare number cannot be told
apart from a surplus ordinate value; such names are refused by :func:`write_vamas` and read
as an error.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from valband.errors import InputError
from valband.output import atomic_write
from valband.spectra.measured import MeasuredSpectrum

__all__ = ["read_vamas", "write_vamas", "select_block", "VAMAS_IDENTIFIER", "UNKNOWN"]

VAMAS_IDENTIFIER = "VAMAS Surface Chemical Analysis Standard Data Transfer Format 1988 May 4"
#: The "no value" marker (from memory).
UNKNOWN = 1e37
_MODES = ("NORM", "SDP")
_SPUTTER_MODES = ("SDP",)
_END = "end of experiment"
_UNIT_IN = {"c": "counts", "counts": "counts", "count": "counts", "cts": "counts",
            "c/s": "counts/s", "cps": "counts/s", "counts/s": "counts/s"}
_UNIT_OUT = {"counts": "c", "counts/s": "c/s", "arb.": "d"}


class _Cursor:
    """Line-by-line reader that names the file, line and item in its errors."""

    def __init__(self, path: Path, lines: list[str]):
        self.path, self.lines, self.i = path, lines, 0
        self.context = "header"

    def _fail(self, msg: str) -> InputError:
        return InputError(f"{self.path}, line {self.i}: {self.context}: {msg}")

    def text(self, what: str) -> str:
        if self.i >= len(self.lines):
            raise InputError(f"{self.path}: file ends after line {len(self.lines)} while "
                             f"reading {what} ({self.context}); the file is truncated")
        s = self.lines[self.i].rstrip("\r\n")
        self.i += 1
        return s.strip()

    def peek(self) -> str | None:
        return self.lines[self.i].strip() if self.i < len(self.lines) else None

    def integer(self, what: str, minimum: int = 0) -> int:
        s = self.text(what)
        try:
            v = int(s)
        except ValueError:
            raise self._fail(f"{what} must be an integer, got {s!r}") from None
        if v < minimum:
            raise self._fail(f"{what} must be ≥ {minimum}, got {v}")
        return v

    def number(self, what: str) -> float:
        s = self.text(what)
        try:
            v = float(s)
        except ValueError:
            raise self._fail(f"{what} must be a number, got {s!r}") from None
        if not math.isfinite(v):
            raise self._fail(f"{what} must be finite, got {s!r}")
        return v

    def skip(self, n: int, what: str) -> list[str]:
        return [self.text(what) for _ in range(n)]


def _known(v: float) -> float | None:
    return None if abs(v) >= 0.99 * UNKNOWN else v


def read_vamas(path: str | Path, *, axis: str = "auto", photon_energy: float | None = None,
               work_function: float = 4.5) -> list[MeasuredSpectrum]:
    """Read every block of a VAMAS file as a :class:`MeasuredSpectrum` (BE ascending, eV).

    Parameters
    ----------
    path : file
    axis : {"auto", "binding", "kinetic"}
        ``"auto"`` follows each block's abscissa label; an explicit value must agree with it.
    photon_energy : float, eV, optional
        Replaces the blocks' source energy (needed for a kinetic axis when the file lacks it).
    work_function : float, eV
        φ used when a block's analyser work function is not known (1E37).

    Returns
    -------
    list of MeasuredSpectrum, in file order; ``block`` holds the block identifier.
    """
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise InputError(f"{path}: cannot read VAMAS file ({exc.strerror})") from exc
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = raw.decode("latin-1")
    cur = _Cursor(path, text.splitlines())
    first = cur.text("format identifier")
    if not first.startswith(VAMAS_IDENTIFIER.rsplit(" 1988", 1)[0]):
        raise InputError(f"{path}, line 1: not a VAMAS file; the first line must be "
                         f"{VAMAS_IDENTIFIER!r}, got {first[:60]!r}")
    head: dict = {}
    for key in ("institution", "instrument", "operator", "experiment"):
        head[key] = cur.text(f"{key} identifier")
    head["comments"] = cur.skip(cur.integer("number of comment lines"), "comment line")
    mode = cur.text("experiment mode")
    if mode not in _MODES:
        raise cur._fail(f"experiment mode {mode!r} is not supported; accepted: "
                        f"{', '.join(_MODES)}")
    scan = cur.text("scan mode")
    if scan.upper() != "REGULAR":
        raise cur._fail(f"scan mode {scan!r} is not supported; accepted: REGULAR")
    cur.text("number of spectral regions")
    n_expvar = cur.integer("number of experimental variables")
    expvars = [(cur.text("experimental variable label"), cur.text("experimental variable unit"))
               for _ in range(n_expvar)]
    s = cur.text("number of entries in the parameter inclusion/exclusion list")
    if s not in ("0", "+0", "-0"):
        raise cur._fail(f"parameter inclusion/exclusion list with {s!r} entries is not "
                        "supported; accepted: 0 (every block carries every field)")
    cur.skip(cur.integer("number of manually entered items"), "manually entered item")
    n_fut_exp = cur.integer("number of future upgrade experiment entries")
    n_fut_blk = cur.integer("number of future upgrade block entries")
    cur.skip(n_fut_exp, "future upgrade experiment entry")
    n_blocks = cur.integer("number of blocks", minimum=1)

    out = []
    for k in range(n_blocks):
        out.append(_read_block(cur, k, n_blocks, mode, expvars, n_fut_blk, head, axis,
                               photon_energy, float(work_function)))
    cur.context = "end of file"
    end = cur.text(f"the closing line {_END!r}")
    if end.lower() != _END:
        raise cur._fail(f"expected {_END!r} after block {n_blocks - 1}, got {end!r}; the "
                        "header's number of blocks or a block's number of values is wrong")
    return out


def _read_block(cur: _Cursor, k: int, n_blocks: int, mode: str, expvars, n_fut_blk: int,
                head: dict, axis: str, photon_energy, work_function: float
                ) -> MeasuredSpectrum:
    cur.context = f"block {k}"
    name = cur.text("block identifier")
    if name.lower() == _END:
        raise cur._fail(f"{_END!r} found, but the header announces {n_blocks} blocks")
    if _is_number(name):
        raise cur._fail(f"block identifier {name!r} is a number: the previous block holds "
                        "more ordinate values than it declares (or the name is invalid)")
    cur.context = f"block {k} ({name!r})"
    meta: dict = {"format": "vamas", "block_index": k, "experiment_mode": mode,
                  "institution": head["institution"], "instrument": head["instrument"],
                  "file_comments": head["comments"]}
    meta["sample"] = cur.text("sample identifier")
    meta["date"] = cur.skip(7, "date/time field")
    meta["comments"] = cur.skip(cur.integer("number of block comment lines"), "comment line")
    technique = cur.text("technique")
    meta["technique"] = technique
    meta["experimental_variables"] = {f"{lab} ({unit})": cur.text(f"value of {lab}")
                                      for lab, unit in expvars}
    meta["source_label"] = cur.text("analysis source label")
    if mode in _SPUTTER_MODES:
        cur.skip(3, "sputtering particle field")
    hv_file = _known(cur.number("analysis source characteristic energy (eV)"))
    cur.skip(5, "analysis source field")  # strength, width x, y, polar, azimuth
    meta["analyser_mode"] = cur.text("analyser mode")
    meta["pass_energy"] = cur.text("analyser pass energy")
    if technique.upper() == "AES DIFF":
        cur.text("differential width")
    cur.text("analyser magnification")
    phi_file = _known(cur.number("analyser work function (eV)"))
    cur.skip(5, "analyser field")  # target bias, width x, y, take-off polar, azimuth
    meta["species"] = cur.text("species label")
    meta["transition"] = cur.text("transition label")
    cur.text("charge of detected particle")
    label = cur.text("abscissa label")
    label_line = cur.i
    units = cur.text("abscissa units")
    if units.lower() != "ev":
        raise cur._fail(f"abscissa units {units!r}; accepted: eV")
    start = cur.number("abscissa start")
    step = cur.number("abscissa increment")
    if step == 0:
        raise cur._fail("abscissa increment is 0; it must be non-zero")
    nvar = cur.integer("number of corresponding variables", minimum=1)
    variables = [(cur.text("corresponding variable label"),
                  cur.text("corresponding variable units")) for _ in range(nvar)]
    meta["signal_mode"] = cur.text("signal mode")
    meta["collection_time"] = cur.text("signal collection time")
    meta["scans"] = cur.text("number of scans")
    cur.text("signal time correction")
    if mode in _SPUTTER_MODES:
        cur.skip(7, "sputtering source field")
    cur.skip(3, "sample orientation field")  # tilt polar, azimuth, rotation
    n_add = cur.integer("number of additional numerical parameters")
    meta["additional_parameters"] = {}
    for _ in range(n_add):
        lab, unit, val = cur.skip(3, "additional numerical parameter")
        meta["additional_parameters"][f"{lab} ({unit})"] = val
    cur.skip(n_fut_blk, "future upgrade block entry")
    n_val = cur.integer("number of ordinate values", minimum=1)
    if n_val % nvar:
        raise cur._fail(f"number of ordinate values {n_val} is not a multiple of the "
                        f"{nvar} corresponding variables")
    n_pts = n_val // nvar
    if n_pts < 2:
        raise cur._fail(f"{n_pts} data point(s); a spectrum needs ≥ 2")
    cur.skip(2 * nvar, "ordinate minimum/maximum")
    first_value_line = cur.i + 1
    vals = np.empty(n_val)
    for j in range(n_val):
        if cur.peek() is not None and cur.peek().lower() == _END:
            cur.i += 1
            raise cur._fail(f"{_END!r} after {j} ordinate values; the block declares {n_val} "
                            "(wrong number of data values or truncated block)")
        vals[j] = cur.number(f"ordinate value {j + 1} of {n_val}")
    nxt = cur.peek()
    if nxt is not None and _is_number(nxt):
        cur.i += 1
        raise cur._fail(f"more ordinate values than the {n_val} declared (found {nxt!r}); "
                        "wrong number of data values")

    y = vals.reshape(n_pts, nvar)[:, 0]
    meta["corresponding_variables"] = [f"{lab} ({u})" for lab, u in variables]
    meta["intensity_units"] = variables[0][1]
    unit = _UNIT_IN.get(variables[0][1].strip().lower(), "arb.")
    if unit != "arb." and (y < 0).any():
        j = int(np.flatnonzero(y < 0)[0])
        raise InputError(f"{cur.path}, line {first_value_line + j * nvar}: {cur.context}: "
                         f"negative intensity {y[j]} {unit}; counts must be ≥ 0")
    x = start + step * np.arange(n_pts)
    lab = label.lower()
    file_axis = ("kinetic" if "kinetic" in lab else "binding" if "binding" in lab else None)
    if file_axis is None:
        raise InputError(f"{cur.path}, line {label_line}: {cur.context}: abscissa label "
                         f"{label!r}; accepted: 'Kinetic Energy', 'Binding Energy'")
    if axis not in ("auto", file_axis):
        raise InputError(f"{cur.path}, line {label_line}: {cur.context}: axis={axis!r} "
                         f"requested but the abscissa is {label!r}")
    meta["axis"] = file_axis
    meta["axis_from"] = "abscissa label"
    meta["abscissa_start_eV"], meta["abscissa_increment_eV"] = start, step
    hv = photon_energy if photon_energy is not None else hv_file
    phi = phi_file if phi_file is not None else work_function
    meta["work_function_eV"] = phi
    meta["work_function_from"] = "file" if phi_file is not None else "default"
    if file_axis == "kinetic":
        if hv is None:
            raise InputError(f"{cur.path}: {cur.context}: kinetic-energy abscissa but no "
                             "source energy in the block (1E37); pass photon_energy (eV)")
        x = hv - x - phi
        meta["conversion"] = "BE = hv - E_kin - phi"
    order = np.argsort(x, kind="stable")
    return MeasuredSpectrum(binding_energy=x[order], intensity=y[order], unit=unit,
                            source=str(cur.path), block=name, photon_energy=hv, metadata=meta)


def _is_number(s: str) -> bool:
    try:
        float(s)
    except ValueError:
        return False
    return True


def select_block(spectra: Sequence[MeasuredSpectrum], block: str | int | None,
                 path: str | Path) -> MeasuredSpectrum:
    """Pick one block by name or 0-based index (the only one when ``block`` is None)."""
    names = [s.block for s in spectra]
    listing = ", ".join(f"{i}: {n!r}" for i, n in enumerate(names))
    if block is None:
        if len(spectra) == 1:
            return spectra[0]
        raise InputError(f"{path}: {len(spectra)} blocks; choose one with block=name or index "
                         f"({listing})")
    if isinstance(block, (int, np.integer)) and not isinstance(block, bool):
        if -len(spectra) <= block < len(spectra):
            return spectra[int(block)]
        raise InputError(f"{path}: block index {block} out of range; available blocks: "
                         f"{listing}")
    hits = [s for s in spectra if s.block == block]
    if len(hits) == 1:
        return hits[0]
    if not hits:
        raise InputError(f"{path}: no block named {block!r}; available blocks: {listing}")
    raise InputError(f"{path}: {len(hits)} blocks are named {block!r}; choose by index "
                     f"({listing})")


def _fmt(v: float | None) -> str:
    return "1E37" if v is None else repr(float(v))


def write_vamas(path: str | Path, spectra: Sequence[MeasuredSpectrum] | MeasuredSpectrum,
                *, comment: Sequence[str] = ("written by valband",)) -> Path:
    """Write spectra as a VAMAS file (NORM, REGULAR, binding-energy abscissa), atomically.

    Each spectrum becomes one block named ``spectrum.block`` (or ``block<i>``); its axis must
    be uniform (regular scan mode, relative step deviation ≤ 1e-9). Numbers are written with
    ``repr`` (shortest round-trip form), so :func:`read_vamas` returns the same intensities and
    photon energy and the axis to ~1e-12 eV. Unknown values are written as 1E37.
    """
    if isinstance(spectra, MeasuredSpectrum):
        spectra = [spectra]
    spectra = list(spectra)
    path = Path(path)
    if not spectra:
        raise InputError(f"write_vamas {path}: no spectra given; need at least one")
    lines = [VAMAS_IDENTIFIER, "Not Specified", "Not Specified", "Not Specified",
             "Not Specified", str(len(comment)), *comment, "NORM", "REGULAR",
             str(len(spectra)), "0", "0", "0", "0", "0", str(len(spectra))]
    for i, sp in enumerate(spectra):
        if not isinstance(sp, MeasuredSpectrum):
            raise InputError(f"write_vamas {path}: item {i} is {type(sp).__name__}; "
                             "expected MeasuredSpectrum")
        lines += _block_lines(path, i, sp)
    lines.append(_END)
    with atomic_write(path) as fh:
        fh.write("\n".join(lines) + "\n")
    return path


def _block_lines(path: Path, i: int, sp: MeasuredSpectrum) -> list[str]:
    name = sp.block if sp.block else f"block{i}"
    if "\n" in name or _is_number(name.strip()) or name.strip().lower() == _END:
        raise InputError(f"write_vamas {path}: block name {name!r} cannot be written; it must "
                         f"be one line, not a bare number and not {_END!r}")
    be = sp.binding_energy
    steps = np.diff(be)
    step = (be[-1] - be[0]) / (len(be) - 1)
    if np.max(np.abs(steps - step)) > 1e-9 * max(abs(step), 1e-300) + 1e-12:
        raise InputError(f"write_vamas {path}: spectrum {name!r} has non-uniform energy steps "
                         f"({steps.min():.6g} to {steps.max():.6g} eV); VAMAS regular scan "
                         "mode needs a uniform axis")
    m = sp.metadata
    phi = m.get("work_function_eV") if m.get("work_function_from", "file") == "file" else None
    comments = [str(c) for c in m.get("comments", [])]
    y = sp.intensity
    technique = m.get("technique") or "XPS"
    out = [name, str(m.get("sample") or "unknown"), *["0"] * 7,
           str(len(comments)), *comments, technique,
           str(m.get("source_label") or "unknown"), _fmt(sp.photon_energy),
           *["1E37"] * 5, "FAT", "1E37"]
    if technique.upper() == "AES DIFF":
        out.append("1E37")
    out += ["1E37", _fmt(phi), "0", "1E37", "1E37", "1E37", "1E37",
            str(m.get("species") or "unknown"), str(m.get("transition") or "VB"), "-1",
            "Binding Energy", "eV", repr(float(be[0])), repr(float(step)),
            "1", "Intensity", _UNIT_OUT[sp.unit], "pulse counting", "1E37", "1", "0",
            "1E37", "1E37", "1E37", "0", str(len(y)), repr(float(y.min())),
            repr(float(y.max())), *(repr(float(v)) for v in y)]
    return out
