"""Validation of parameter files (schema version 1) into a :class:`ParameterSet`.

Every problem raises :class:`~valband.errors.ParameterError` whose message reads
``<file>: <field path>: <what is wrong>; accepted: <what is accepted>``. Field paths use TOML's
dotted-key syntax, quoting keys that are not plain words, e.g. ``pairs."Cu-Ag".hopping.dds.n``;
array items are written ``[i]``.
"""

from __future__ import annotations

import math
import re
from typing import Any, NoReturn

from ase.data import atomic_numbers

from valband.errors import ParameterError
from valband.params.laws import (
    TAPERS,
    Cutoff,
    DistanceLaw,
    ExponentialLaw,
    PowerLaw,
    ShellTable,
    SplineLaw,
)
from valband.params.model import BOND_INTEGRALS, ElementParams, PairParams, ParameterSet

__all__ = ["SCHEMA_VERSIONS", "LIMITS", "parse_parameter_dict", "field_path"]

#: File-format versions this code reads.
SCHEMA_VERSIONS: tuple[int, ...] = (1,)

#: Accepted ranges of the numbers of a file (documented in README.md).
LIMITS: dict[str, tuple[float, float]] = {
    "distance": (0.0, 20.0),  # Å, r0, cutoffs, nodes, shell distances: 0 < x ≤ 20
    "power_n": (0.0, 20.0),  # 0 ≤ n ≤ 20
    "exponential_q": (0.0, 50.0),  # 0 ≤ q ≤ 50
    "tolerance": (0.0, 0.5),  # Å, 0 < tolerance ≤ 0.5
    "onsite": (-100.0, 100.0),  # eV
}

_SHELL_ORDER = ("s", "p", "d")
_N_ORB = {"s": 1, "p": 3, "d": 5}
_INTEGRALS = BOND_INTEGRALS
_REVERSED = ("pss", "dss", "dps", "dpp")
_LAWS = ("power", "exponential", "spline", "shells")
_BARE = re.compile(r"[A-Za-z0-9_]+")
_PAIR = re.compile(r"([A-Z][a-z]?)-([A-Z][a-z]?)")


def field_path(*keys: str | int) -> str:
    """TOML-style path of a field.

    ``field_path("pairs", "Cu-Ag", "cutoff")`` gives ``pairs."Cu-Ag".cutoff``.
    """
    out = ""
    for k in keys:
        if isinstance(k, int):
            out += f"[{k}]"
            continue
        part = k if _BARE.fullmatch(k) else '"' + k.replace("\\", "\\\\").replace('"', '\\"') + '"'
        out += ("." if out else "") + part
    return out


class _Reader:
    """Carries the file name and formats errors."""

    def __init__(self, origin: str | None) -> None:
        self.origin = origin or "<parameter dict>"

    def fail(self, path: tuple[str | int, ...], problem: str, accepted: str) -> NoReturn:
        where = field_path(*path) or "(top level)"
        raise ParameterError(f"{self.origin}: {where}: {problem}; accepted: {accepted}")

    # -- primitive checks -----------------------------------------------------------------
    def table(self, value: Any, path: tuple[str | int, ...]) -> dict[str, Any]:
        if not isinstance(value, dict):
            self.fail(path, f"expected a table, got {_typename(value)}", "a TOML table")
        return value

    def keys(
        self,
        d: dict[str, Any],
        path: tuple[str | int, ...],
        required: tuple[str, ...],
        optional: tuple[str, ...] = (),
    ) -> None:
        allowed = required + optional
        for k in d:
            if k not in allowed:
                self.fail(path + (k,), "unknown key", "keys " + ", ".join(allowed))
        for k in required:
            if k not in d:
                self.fail(path + (k,), "missing field", "keys " + ", ".join(allowed))

    def string(self, value: Any, path: tuple[str | int, ...], nonempty: bool = True) -> str:
        if not isinstance(value, str):
            self.fail(path, f"expected a string, got {_typename(value)}", "a string")
        if nonempty and not value.strip():
            self.fail(path, "empty string", "a non-empty string")
        return value

    def number(
        self,
        value: Any,
        path: tuple[str | int, ...],
        lo: float | None = None,
        hi: float | None = None,
        lo_open: bool = False,
        unit: str = "",
    ) -> float:
        rng = _range_text(lo, hi, lo_open, unit)
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.fail(path, f"expected a number, got {_typename(value)}", f"a finite number {rng}")
        x = float(value)
        if not math.isfinite(x):
            self.fail(path, f"{value} is not finite", f"a finite number {rng}")
        if lo is not None and (x < lo or (lo_open and x == lo)):
            self.fail(path, f"{x:g} is out of range", f"a number {rng}")
        if hi is not None and x > hi:
            self.fail(path, f"{x:g} is out of range", f"a number {rng}")
        return x

    def number_list(
        self, value: Any, path: tuple[str | int, ...], min_len: int
    ) -> list[float]:
        if not isinstance(value, list):
            self.fail(path, f"expected an array, got {_typename(value)}", "an array of numbers")
        if len(value) < min_len:
            self.fail(path, f"{len(value)} entries", f"an array of at least {min_len} numbers")
        return [self.number(v, path + (i,)) for i, v in enumerate(value)]

    def distance(self, value: Any, path: tuple[str | int, ...]) -> float:
        lo, hi = LIMITS["distance"]
        return self.number(value, path, lo, hi, lo_open=True, unit="Å")


def _typename(value: Any) -> str:
    names = {bool: "a boolean", int: "an integer", float: "a number", str: "a string",
             list: "an array", dict: "a table"}  # fmt: skip
    return names.get(type(value), type(value).__name__)


def _range_text(lo: float | None, hi: float | None, lo_open: bool, unit: str) -> str:
    u = f" {unit}" if unit else ""
    if lo is None and hi is None:
        return ""
    if hi is None:
        return f"{'>' if lo_open else '≥'} {lo:g}{u}"
    if lo is None:
        return f"≤ {hi:g}{u}"
    return f"{lo:g} {'<' if lo_open else '≤'} x ≤ {hi:g}{u}"


# ---------------------------------------------------------------------------------------------
def parse_parameter_dict(d: Any, origin: str | None = None) -> ParameterSet:
    """Validate a parsed parameter file and build the :class:`ParameterSet`.

    Parameters
    ----------
    d
        The dict ``tomllib`` returns for the file.
    origin
        File name for error messages.

    Raises
    ------
    ParameterError
        On the first problem found, naming the file, the field path and what is accepted.
    """
    rd = _Reader(origin)
    top = rd.table(d, ())
    if "schema_version" not in top:
        rd.fail(("schema_version",), "missing field", "schema_version = 1")
    sv = top["schema_version"]
    if isinstance(sv, bool) or not isinstance(sv, int) or sv not in SCHEMA_VERSIONS:
        rd.fail(
            ("schema_version",),
            f"schema version {sv!r} is not supported",
            "an integer among " + ", ".join(map(str, SCHEMA_VERSIONS)),
        )
    rd.keys(
        top,
        (),
        ("schema_version", "name", "version", "description", "orthogonal", "provenance",
         "elements", "pairs"),
        ("orthogonal_counterpart", "caution"),
    )  # fmt: skip
    name = rd.string(top["name"], ("name",))
    version = rd.string(top["version"], ("version",))
    description = rd.string(top["description"], ("description",))
    provenance = rd.string(top["provenance"], ("provenance",))
    orthogonal = top["orthogonal"]
    if not isinstance(orthogonal, bool):
        rd.fail(
            ("orthogonal",), f"expected a boolean, got {_typename(orthogonal)}", "true or false"
        )

    counterpart = None
    if "orthogonal_counterpart" in top:
        counterpart = rd.string(top["orthogonal_counterpart"], ("orthogonal_counterpart",))
        if orthogonal:
            rd.fail(("orthogonal_counterpart",), "an orthogonal set names an orthogonal "
                    "counterpart", "the key only in sets with orthogonal = false")
        if counterpart.strip() != counterpart or "\n" in counterpart:
            rd.fail(("orthogonal_counterpart",), f"{counterpart!r} has surrounding spaces or "
                    "a line break", "a shipped set name or a .toml path (relative to this file)")

    caution = None
    if "caution" in top:
        caution = rd.string(top["caution"], ("caution",))
        if not caution.strip():
            rd.fail(("caution",), "empty caution", "a sentence saying what the set is not for")

    elements_raw = rd.table(top["elements"], ("elements",))
    if not elements_raw:
        rd.fail(("elements",), "no elements", "at least one [elements.<symbol>] table")
    elements = {sym: _parse_element(rd, sym, val) for sym, val in elements_raw.items()}

    pairs_raw = rd.table(top["pairs"], ("pairs",))
    if not pairs_raw:
        rd.fail(("pairs",), "no pairs", 'at least one [pairs."A-B"] table')
    pairs: dict[tuple[str, str], Any] = {}
    for key, val in pairs_raw.items():
        a, b = _pair_symbols(rd, key, elements)
        if (b, a) in pairs and a != b:
            rd.fail(
                ("pairs", key),
                f'duplicated pair: also given as "{b}-{a}"',
                "each unordered pair once (its reversed integrals go into the same table)",
            )
        pairs[(a, b)] = _parse_pair(rd, key, a, b, val, elements, orthogonal)

    return ParameterSet(
        name=name,
        version=version,
        schema_version=sv,
        description=description,
        orthogonal=orthogonal,
        provenance=provenance,
        elements=elements,
        pairs=pairs,
        origin=origin,
        orthogonal_counterpart=counterpart,
        caution=caution,
    )


def _check_symbol(rd: _Reader, sym: str, path: tuple[str | int, ...]) -> None:
    if sym not in atomic_numbers or atomic_numbers[sym] == 0:
        rd.fail(path, f"{sym!r} is not a chemical element", "a chemical symbol such as Cu, Ag, Al")


def _parse_element(rd: _Reader, sym: str, value: Any) -> ElementParams:
    path: tuple[str | int, ...] = ("elements", sym)
    _check_symbol(rd, sym, path)
    el = rd.table(value, path)
    rd.keys(el, path, ("shells", "onsite", "valence_electrons"), ("spin_orbit",))

    shells_raw = el["shells"]
    accepted_shells = 'a non-empty array of distinct shells from "s", "p", "d" in that order'
    if not isinstance(shells_raw, list) or not shells_raw:
        rd.fail(path + ("shells",), f"got {_typename(shells_raw)}", accepted_shells)
    for i, sh in enumerate(shells_raw):
        if sh not in _SHELL_ORDER:
            rd.fail(path + ("shells", i), f"unknown shell {sh!r}", accepted_shells)
    order = [_SHELL_ORDER.index(sh) for sh in shells_raw]
    if order != sorted(set(order)):
        rd.fail(path + ("shells",), f"{shells_raw} repeats or misorders shells", accepted_shells)
    shells = tuple(shells_raw)

    provenance: dict[str, str] = {}
    onsite_raw = rd.table(el["onsite"], path + ("onsite",))
    for sh in onsite_raw:
        if sh not in shells:
            rd.fail(
                path + ("onsite", sh),
                f"onsite energy for shell {sh!r}, which {sym} does not have",
                "one entry per shell of the element: " + ", ".join(shells),
            )
    onsite: dict[str, float] = {}
    for sh in shells:
        if sh not in onsite_raw:
            rd.fail(
                path + ("onsite", sh), "missing field", "one entry per shell: " + ", ".join(shells)
            )
        vpath = path + ("onsite", sh)
        entry = rd.table(onsite_raw[sh], vpath)
        rd.keys(entry, vpath, ("value", "source"))
        lo, hi = LIMITS["onsite"]
        onsite[sh] = rd.number(entry["value"], vpath + ("value",), lo, hi, unit="eV")
        provenance[f"onsite.{sh}"] = rd.string(entry["source"], vpath + ("source",))

    n_max = 2 * sum(_N_ORB[sh] for sh in shells)
    vpath = path + ("valence_electrons",)
    entry = rd.table(el["valence_electrons"], vpath)
    rd.keys(entry, vpath, ("value", "source"))
    n_el = rd.number(entry["value"], vpath + ("value",))
    if not 0.0 < n_el <= n_max:
        rd.fail(
            vpath + ("value",),
            f"{n_el:g} electrons are impossible for shells {', '.join(shells)}",
            f"0 < N ≤ {n_max} (two per orbital)",
        )
    provenance["valence_electrons"] = rd.string(entry["source"], vpath + ("source",))
    spin_orbit: dict[str, float] = {}
    if "spin_orbit" in el:
        for sh, raw in rd.table(el["spin_orbit"], path + ("spin_orbit",)).items():
            spath = path + ("spin_orbit", sh)
            if sh not in ("p", "d") or sh not in shells:
                rd.fail(spath, f"spin–orbit constant for shell {sh!r}",
                        "one entry per p or d shell of the element: "
                        + (", ".join(x for x in shells if x != "s") or "none (s only)"))
            entry = rd.table(raw, spath)
            rd.keys(entry, spath, ("value", "source"))
            spin_orbit[sh] = rd.number(entry["value"], spath + ("value",), 0.0, 5.0, unit="eV")
            provenance[f"spin_orbit.{sh}"] = rd.string(entry["source"], spath + ("source",))
    return ElementParams(
        symbol=sym, shells=shells, onsite=onsite, valence_electrons=n_el, provenance=provenance,
        spin_orbit=spin_orbit,
    )


def _pair_symbols(rd: _Reader, key: str, elements: dict[str, Any]) -> tuple[str, str]:
    path: tuple[str | int, ...] = ("pairs", key)
    m = _PAIR.fullmatch(key)
    if m is None:
        rd.fail(
            path, f"pair key {key!r} is not of the form A-B", 'two chemical symbols, e.g. "Cu-Ag"'
        )
    a, b = m.group(1), m.group(2)
    for sym in (a, b):
        _check_symbol(rd, sym, path)
        if sym not in elements:
            rd.fail(
                path,
                f"element {sym} has no [elements.{sym}] table",
                "pairs of the set's elements: " + ", ".join(elements),
            )
    return a, b


def _parse_pair(
    rd: _Reader,
    key: str,
    a: str,
    b: str,
    value: Any,
    elements: dict[str, Any],
    orthogonal: bool,
) -> PairParams:
    path: tuple[str | int, ...] = ("pairs", key)
    pt = rd.table(value, path)
    rd.keys(pt, path, ("source", "cutoff", "hopping"), ("overlap",))
    source = rd.string(pt["source"], path + ("source",))

    cpath = path + ("cutoff",)
    ct = rd.table(pt["cutoff"], cpath)
    rd.keys(ct, cpath, ("inner", "outer", "taper"))
    inner = rd.distance(ct["inner"], cpath + ("inner",))
    outer = rd.distance(ct["outer"], cpath + ("outer",))
    if outer <= inner:
        rd.fail(
            cpath + ("outer",), f"outer {outer:g} Å ≤ inner {inner:g} Å", "0 < inner < outer ≤ 20 Å"
        )
    taper = ct["taper"]
    if taper not in TAPERS:
        accepted = " or ".join(f'"{t}"' for t in TAPERS)
        rd.fail(cpath + ("taper",), f"unknown taper {taper!r}", accepted)
    cutoff = Cutoff(inner=inner, outer=outer, taper=taper)

    sa, sb = elements[a].shells, elements[b].shells
    expected = tuple(
        n for n in _INTEGRALS
        if n[0] in sa and n[1] in sb and not (a == b and n in _REVERSED)
    )  # fmt: skip
    hopping = _parse_integrals(rd, path + ("hopping",), pt["hopping"], a, b, sa, sb, expected,
                               cutoff, overlap=False)  # fmt: skip
    overlap = None
    if orthogonal and "overlap" in pt:
        rd.fail(
            path + ("overlap",),
            "overlap integrals in an orthogonal set",
            "no overlap table when orthogonal = true (set orthogonal = false to use them)",
        )
    if not orthogonal:
        if "overlap" not in pt:
            rd.fail(path + ("overlap",), "missing field",
                    "an overlap table for every pair when orthogonal = false")  # fmt: skip
        overlap = _parse_integrals(rd, path + ("overlap",), pt["overlap"], a, b, sa, sb,
                                   expected, cutoff, overlap=True)  # fmt: skip
    return PairParams(first=a, second=b, cutoff=cutoff, hopping=hopping, overlap=overlap,
                      source=source)  # fmt: skip


def _parse_integrals(
    rd: _Reader,
    path: tuple[str | int, ...],
    value: Any,
    a: str,
    b: str,
    sa: tuple[str, ...],
    sb: tuple[str, ...],
    expected: tuple[str, ...],
    cutoff: Cutoff,
    overlap: bool,
) -> dict[str, DistanceLaw]:
    t = rd.table(value, path)
    for name in t:
        if name in expected:
            continue
        if name not in _INTEGRALS:
            rd.fail(path + (name,), "unknown integral", "integral names " + ", ".join(expected))
        if name[0] not in sa or name[1] not in sb:
            if name[0] not in sa:
                sym, shells, which, sh = a, sa, "first", name[0]
            else:
                sym, shells, which, sh = b, sb, "second", name[1]
            rd.fail(
                path + (name,),
                f"integral needs a {sh} shell on {sym} ({which} element), which has shells "
                + ", ".join(shells),
                "integrals of the shells present: " + ", ".join(expected),
            )
        partner = {"pss": "sps", "dss": "sds", "dps": "pds", "dpp": "pdp"}[name]
        rd.fail(
            path + (name,),
            f"reversed integral in a like pair (it equals {partner})",
            "for like pairs only " + ", ".join(expected),
        )
    out: dict[str, DistanceLaw] = {}
    for name in expected:
        if name not in t:
            what = "missing field"
            if a != b and name in _REVERSED:
                what = (
                    f"missing reversed integral ({name[0]} on {a}, {name[1]} on {b}) "
                    "of an unlike pair"
                )
            accepted = "every integral of the shells present: " + ", ".join(expected)
            rd.fail(path + (name,), what, accepted)
        out[name] = _parse_law(rd, path + (name,), t[name], cutoff, overlap)
    return out


def _parse_law(
    rd: _Reader, path: tuple[str | int, ...], value: Any, cutoff: Cutoff, overlap: bool
) -> DistanceLaw:
    t = rd.table(value, path)
    if "law" not in t:
        rd.fail(path + ("law",), "missing field", "law = " + " | ".join(f'"{x}"' for x in _LAWS))
    law = t["law"]
    if law not in _LAWS:
        rd.fail(path + ("law",), f"unknown law {law!r}", " or ".join(f'"{x}"' for x in _LAWS))
    where = f"{rd.origin}: {field_path(*path)}"
    vmax = 1.0 if overlap else None
    vmin = -1.0 if overlap else None
    vunit = "" if overlap else "eV"

    def value_num(v: Any, p: tuple[str | int, ...]) -> float:
        # |S| ≤ 1 for normalised orbitals (Cauchy–Schwarz)
        return rd.number(v, p, vmin, vmax, unit=vunit)

    if law in ("power", "exponential"):
        exp_key = "n" if law == "power" else "q"
        rd.keys(t, path, ("law", "v0", "r0", exp_key), ("source",))
        v0 = value_num(t["v0"], path + ("v0",))
        r0 = rd.distance(t["r0"], path + ("r0",))
        lo, hi = LIMITS["power_n" if law == "power" else "exponential_q"]
        e = rd.number(t[exp_key], path + (exp_key,), lo, hi)
        src = _opt_source(rd, t, path)
        if law == "power":
            return PowerLaw(v0=v0, r0=r0, n=e, source=src, where=where)
        return ExponentialLaw(v0=v0, r0=r0, q=e, source=src, where=where)

    if law == "spline":
        rd.keys(t, path, ("law", "r", "v"), ("source",))
        r = rd.number_list(t["r"], path + ("r",), 4)
        v = rd.number_list(t["v"], path + ("v",), 4)
        if len(r) != len(v):
            rd.fail(
                path + ("v",), f"{len(v)} values for {len(r)} nodes", "as many values as nodes in r"
            )
        for i, x in enumerate(r):
            rd.distance(x, path + ("r", i))
            if i and x <= r[i - 1]:
                rd.fail(path + ("r", i), f"nodes not increasing ({r[i - 1]:g} then {x:g} Å)",
                        "strictly increasing distances")  # fmt: skip
        for i, x in enumerate(v):
            value_num(x, path + ("v", i))
        if r[-1] < cutoff.outer:
            rd.fail(
                path + ("r",),
                f"table ends at {r[-1]:g} Å, before the outer cutoff {cutoff.outer:g} Å",
                "a last node at or beyond the pair's outer cutoff",
            )
        return SplineLaw(r=tuple(r), v=tuple(v), source=_opt_source(rd, t, path), where=where)

    rd.keys(t, path, ("law", "tolerance", "shells"), ("source",))
    lo, hi = LIMITS["tolerance"]
    tol = rd.number(t["tolerance"], path + ("tolerance",), lo, hi, lo_open=True, unit="Å")
    raw = t["shells"]
    accepted = "an array of [distance Å, value] pairs with increasing distances"
    if not isinstance(raw, list) or not raw:
        rd.fail(path + ("shells",), f"got {_typename(raw)}", accepted)
    shells: list[tuple[float, float]] = []
    for i, item in enumerate(raw):
        ip = path + ("shells", i)
        if not isinstance(item, list) or len(item) != 2:
            rd.fail(ip, f"got {_typename(item)}", "[distance Å, value]")
        dist = rd.distance(item[0], ip + (0,))
        val = value_num(item[1], ip + (1,))
        if shells and dist - shells[-1][0] <= 2 * tol:
            rd.fail(
                ip + (0,),
                f"shell at {dist:g} Å not above the previous {shells[-1][0]:g} Å by more than "
                "twice the tolerance",
                "strictly increasing shells separated by > 2·tolerance",
            )
        if dist + tol > cutoff.inner:
            rd.fail(
                ip + (0,),
                f"shell at {dist:g} Å (± {tol:g}) reaches into the taper starting at "
                f"{cutoff.inner:g} Å",
                "shells with distance + tolerance ≤ the inner cutoff",
            )
        shells.append((dist, val))
    src = _opt_source(rd, t, path)
    return ShellTable(tolerance=tol, shells=tuple(shells), source=src, where=where)


def _opt_source(rd: _Reader, t: dict[str, Any], path: tuple[str | int, ...]) -> str | None:
    if "source" not in t:
        return None
    return rd.string(t["source"], path + ("source",))
