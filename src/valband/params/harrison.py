"""Generator of the shipped set ``harrison-universal``: Harrison's universal two-centre integrals.

Harrison's scheme (W. A. Harrison, *Electronic Structure and the Properties of Solids*, 1980;
*Elementary Electronic Structure*, 1999) gives every interatomic matrix element from a
universal dimensionless prefactor η and the bond length d (Å):

* s, p – s, p:  V = η ħ²/(m d²)
* s, p – d:     V = η ħ² r_d^{3/2} / (m d^{7/2}),  r_d of the atom that carries the d shell
* d – d:        V = η ħ² (r_dA r_dB)^{3/2} / (m d⁵)

with ħ²/m = :data:`valband.conventions.HBAR2_OVER_M` (≈ 7.62 eV Å²). The integrals are
power laws in d, so the set stores them as ``law = "power"`` about a reference distance r0,
the mean nearest-neighbour distance of the two elements' ASE reference structures
(:data:`ase.data.reference_states`), with v0 = V(r0) rounded to 1 µeV.

Cutoff of each pair: quintic taper from 1.45 r0 to 1.60 r0. In fcc (shells at 1, √2, √3 d_nn),
bcc (1, 2/√3, 1.633 d_nn) and hcp with c/a near ideal (second shell ≤ 1.44 d_nn, third at
c ≥ 1.61 d_nn for ASE's reference c/a between 1.56 and 1.65) it keeps first and second
neighbours at full strength and drops the third (tests check this with ASE's lattices).

Onsite energies are free-atom LDA eigenvalues (non-relativistic, VWN): NIST SRD 141
(Kotochigova, Levine, Shirley, Stiles, Clark, Phys. Rev. A 55, 191 (1997)) for Fe, Cu, Ag and
Al; other values are marked "from memory". They will be replaced by the project's own atom
engine.

Run ``python -m valband.params.harrison [OUTPUT.toml]`` to regenerate the shipped file.
"""

from __future__ import annotations

import argparse
import math
import sys
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import scipy.constants as _sc
from ase.data import atomic_numbers, reference_states

from valband.conventions import HBAR2_OVER_M
from valband.errors import ParameterError
from valband.params.model import BOND_INTEGRALS, ParameterSet
from valband.params.toml_writer import dumps

__all__ = [
    "ETA",
    "ETA_SP_1980",
    "R_D",
    "NIST_LDA_HARTREE",
    "P_LEVEL_OFFSET_EV",
    "CUTOFF_INNER_FACTOR",
    "CUTOFF_OUTER_FACTOR",
    "ELEMENTS",
    "nearest_neighbour_distance",
    "harrison_integral",
    "build_harrison_dict",
    "build_harrison_set",
    "render_harrison_toml",
    "shipped_path",
    "main",
]

_BOOKS = (
    "W. A. Harrison, Electronic Structure and the Properties of Solids (1980) and "
    "Elementary Electronic Structure (1999)"
)

#: Universal prefactors η (dimensionless), recalled from memory of Harrison's books: the
#: s, p values are the 1999 revision; the d values are those of both books.
ETA: dict[str, float] = {
    "sss": -1.32, "sps": 1.42, "pps": 2.22, "ppp": -0.63,
    "sds": -3.16, "pds": -2.95, "pdp": 1.36,
    "dds": -16.2, "ddp": 8.75, "ddd": 0.0,
}  # fmt: skip

#: The 1980 s, p prefactors (from memory), for comparison; not used in the shipped set.
ETA_SP_1980: dict[str, float] = {"sss": -1.40, "sps": 1.84, "pps": 3.24, "ppp": -0.81}

#: d-state radii r_d (Å), recalled from memory of Harrison's Solid State Table (1980).
R_D: dict[str, float] = {
    "Fe": 0.80, "Ni": 0.71, "Cu": 0.67, "Pd": 0.94, "Ag": 0.89, "Pt": 1.04, "Au": 1.01,
}  # fmt: skip

_NIST = "NIST SRD 141 LDA (Kotochigova et al., Phys. Rev. A 55, 191 (1997))"

#: Free-atom eigenvalues (Hartree) copied from NIST SRD 141, non-relativistic LDA:
#: (element, orbital) → ε.
NIST_LDA_HARTREE: dict[tuple[str, str], float] = {
    ("Fe", "4s"): -0.197978, ("Fe", "3d"): -0.295049,
    ("Cu", "4s"): -0.172056, ("Cu", "3d"): -0.202272,
    ("Ag", "5s"): -0.157408, ("Ag", "4d"): -0.298706,
    ("Al", "3s"): -0.286883, ("Al", "3p"): -0.102545,
}  # fmt: skip

#: Non-relativistic LDA eigenvalues (eV) not in the shared NIST extract: (value, provenance).
_MEMORY_ONSITE_EV: dict[tuple[str, str], tuple[float, str]] = {
    ("Ni", "s"): (-5.8, "4s of 3d8 4s2; from memory (Sc–Fe trend of the NIST SRD 141 LDA "
                 "values), uncertain by about 0.5 eV"),
    ("Ni", "d"): (-9.5, "3d of 3d8 4s2; from memory (Sc–Fe trend of the NIST SRD 141 LDA "
                 "values), uncertain by about 0.5 eV"),
    ("Pd", "s"): (-3.5, "unoccupied 5s of 4d10; from memory of the NIST SRD 141 LDA value, "
                 "uncertain by about 0.7 eV"),
    ("Pd", "d"): (-4.3, "4d of 4d10; from memory of the NIST SRD 141 LDA value, uncertain by "
                 "about 0.5 eV"),
    ("Pt", "s"): (-4.3, "6s of 5d9 6s1, non-relativistic; rough estimate from memory, "
                 "uncertain by about 1 eV"),
    ("Pt", "d"): (-6.7, "5d of 5d9 6s1, non-relativistic; rough estimate from memory, "
                 "uncertain by about 1 eV"),
    ("Au", "s"): (-4.4, "6s of 5d10 6s1, non-relativistic; estimate from memory (relativistic "
                 "6s about -6.0 eV raised by about 1.6 eV), uncertain by about 0.5 eV"),
    ("Au", "d"): (-8.2, "5d of 5d10 6s1, non-relativistic; estimate: j-weighted mean of the "
                 "NIST SRD 141 RLDA 5d levels (-7.19 eV) lowered by about 1 eV (from memory), "
                 "uncertain by about 0.5 eV"),
}  # fmt: skip

#: Unoccupied p level: ε_p = ε_s + this offset (eV) — an estimate from memory of the free-atom
#: ns → np spacing of the late transition and noble metals (about 3.5–4 eV).
P_LEVEL_OFFSET_EV = 3.5

#: Taper window of every pair, in units of the pair's reference distance r0.
CUTOFF_INNER_FACTOR = 1.45
CUTOFF_OUTER_FACTOR = 1.60


@dataclass(frozen=True)
class _Atom:
    shells: tuple[str, ...]
    valence_electrons: float
    configuration: str
    nist_orbitals: dict[str, str]  # shell → NIST orbital label, where the NIST extract has it


#: Elements of the shipped set, in order of atomic number.
ELEMENTS: dict[str, _Atom] = {
    "Al": _Atom(("s", "p"), 3, "3s2 3p1", {"s": "3s", "p": "3p"}),
    "Fe": _Atom(("s", "p", "d"), 8, "3d6 4s2", {"s": "4s", "d": "3d"}),
    "Ni": _Atom(("s", "p", "d"), 10, "3d8 4s2", {}),
    "Cu": _Atom(("s", "p", "d"), 11, "3d10 4s1", {"s": "4s", "d": "3d"}),
    "Pd": _Atom(("s", "p", "d"), 10, "4d10", {}),
    "Ag": _Atom(("s", "p", "d"), 11, "4d10 5s1", {"s": "5s", "d": "4d"}),
    "Pt": _Atom(("s", "p", "d"), 10, "5d9 6s1", {}),
    "Au": _Atom(("s", "p", "d"), 11, "5d10 6s1", {}),
}

_HARTREE_EV = _sc.physical_constants["Hartree energy in eV"][0]
_DIGITS = 6  # rounding of eV values and Å distances in the file


def shipped_path() -> Path:
    """Path of the shipped ``harrison-universal.toml``."""
    return Path(__file__).resolve().parent.parent / "data" / "params" / "harrison-universal.toml"


def nearest_neighbour_distance(symbol: str) -> float:
    """Nearest-neighbour distance (Å) of the element's ASE reference structure (fcc/bcc/hcp)."""
    ref = reference_states[atomic_numbers[symbol]]
    sym = None if ref is None else ref.get("symmetry")
    if sym == "fcc":
        return ref["a"] / math.sqrt(2.0)
    if sym == "bcc":
        return ref["a"] * math.sqrt(3.0) / 2.0
    if sym == "hcp":
        a, c = ref["a"], ref["a"] * ref["c/a"]
        return min(a, math.sqrt(a * a / 3.0 + c * c / 4.0))
    raise ParameterError(
        f"{symbol}: ASE reference structure {sym!r} has no nearest-neighbour rule here; "
        "accepted: elements whose reference structure is fcc, bcc or hcp"
    )


def _eta_key(name: str) -> str:
    """η entry of an integral: the reversed integrals (pss, dss, dps, dpp) use their partner's."""
    return {"pss": "sps", "dss": "sds", "dps": "pds", "dpp": "pdp"}.get(name, name)


def _exponent(name: str) -> float:
    n_d = name[:2].count("d")
    return (2.0, 3.5, 5.0)[n_d]


def harrison_integral(
    name: str, a: str, b: str, d: float | np.ndarray, eta: dict[str, float] | None = None
) -> float | np.ndarray:
    """Harrison's universal two-centre integral of the directed pair a → b (eV).

    Parameters
    ----------
    name
        One of :data:`~valband.params.model.BOND_INTEGRALS` (shell on a, shell on b, σ/π/δ).
    a, b
        Elements; r_d is taken from :data:`R_D` for the atom(s) carrying the d shell.
    d
        Bond length(s), Å.
    eta
        Prefactors (default :data:`ETA`).

    Returns
    -------
    float or ndarray
        η ħ²/(m d²), η ħ² r_d^{3/2}/(m d^{7/2}) or η ħ² (r_dA r_dB)^{3/2}/(m d⁵).
    """
    eta = ETA if eta is None else eta
    la, lb = name[0], name[1]
    factor = 1.0
    if la == "d":
        factor *= R_D[a] ** 1.5
    if lb == "d":
        factor *= R_D[b] ** 1.5
    return eta[_eta_key(name)] * HBAR2_OVER_M * factor / np.asarray(d, dtype=float) ** _exponent(
        name
    )


def _onsite(symbol: str) -> dict[str, dict[str, Any]]:
    atom = ELEMENTS[symbol]
    out: dict[str, dict[str, Any]] = {}
    for sh in atom.shells:
        orb = atom.nist_orbitals.get(sh)
        if orb is not None:
            ha = NIST_LDA_HARTREE[(symbol, orb)]
            out[sh] = {
                "value": round(ha * _HARTREE_EV, _DIGITS),
                "source": f"{_NIST}: eps_{orb} = {ha} Ha ({atom.configuration})",
            }
        elif (symbol, sh) in _MEMORY_ONSITE_EV:
            value, why = _MEMORY_ONSITE_EV[(symbol, sh)]
            out[sh] = {"value": value, "source": why}
        elif sh == "p":
            es = out["s"]["value"]
            out[sh] = {
                "value": round(es + P_LEVEL_OFFSET_EV, _DIGITS),
                "source": f"rule eps_p = eps_s + {P_LEVEL_OFFSET_EV} eV (np unoccupied, not "
                "tabulated; offset from memory of the free-atom ns-np spacing)",
            }
        else:  # pragma: no cover - table completeness is a programming error
            raise KeyError((symbol, sh))
    return out


def _pair(a: str, b: str) -> dict[str, Any]:
    r0 = round(0.5 * (nearest_neighbour_distance(a) + nearest_neighbour_distance(b)), _DIGITS)
    sa, sb = ELEMENTS[a].shells, ELEMENTS[b].shells
    names = [
        n for n in BOND_INTEGRALS
        if n[0] in sa and n[1] in sb and not (a == b and n in ("pss", "dss", "dps", "dpp"))
    ]  # fmt: skip
    hopping = {
        n: {
            "law": "power",
            "v0": round(float(harrison_integral(n, a, b, r0)), _DIGITS) + 0.0,
            "r0": r0,
            "n": _exponent(n),
        }
        for n in names
    }
    rd = ", ".join(f"r_d({x}) = {R_D[x]} Å" for x in dict.fromkeys((a, b)) if x in R_D)
    source = (
        "Harrison's universal scheme (eta from memory of Harrison 1980/1999): power laws "
        f"about r0 = {r0} Å, the mean nearest-neighbour distance of the ASE reference "
        "structures" + (f"; {rd} (Solid State Table, from memory)" if rd else "")
        + f"; quintic taper from {CUTOFF_INNER_FACTOR} r0 to {CUTOFF_OUTER_FACTOR} r0"
    )
    return {
        "source": source,
        "cutoff": {
            "inner": round(CUTOFF_INNER_FACTOR * r0, 4),
            "outer": round(CUTOFF_OUTER_FACTOR * r0, 4),
            "taper": "quintic",
        },
        "hopping": hopping,
    }


def build_harrison_dict(elements: list[str] | None = None) -> dict[str, Any]:
    """The ``harrison-universal`` set as a file dict (all pairs of ``elements``).

    Parameters
    ----------
    elements
        Subset of :data:`ELEMENTS` (default: all of them).
    """
    symbols = list(ELEMENTS) if elements is None else elements
    for s in symbols:
        if s not in ELEMENTS:
            raise ParameterError(
                f"Harrison generator has no data for {s!r}; accepted: " + ", ".join(ELEMENTS)
            )
    symbols = sorted(symbols, key=lambda s: atomic_numbers[s])
    el_tables = {
        s: {
            "shells": list(ELEMENTS[s].shells),
            "valence_electrons": {
                "value": float(ELEMENTS[s].valence_electrons),
                "source": f"s + p + d electrons of the neutral atom ({ELEMENTS[s].configuration})",
            },
            "onsite": _onsite(s),
        }
        for s in symbols
    }
    pairs = {
        f"{a}-{b}": _pair(a, b) for i, a in enumerate(symbols) for b in symbols[i:]
    }
    return {
        "schema_version": 1,
        "name": "harrison-universal",
        "version": "1.0",
        "description": (
            "Orthogonal s, p, d tight-binding set from Harrison's universal two-centre matrix "
            "elements (power laws in the bond length) with free-atom LDA onsite energies. The "
            "onsite energies will later be replaced by values from valband's own atom engine."
        ),
        "caution": (
            "band shapes and workflow only: E_F sits too close to the top of the noble-metal d "
            "bands (Cu d-band centre -1.0 eV, about -2.7 eV published) and alloy trends can "
            "have the wrong sign (Pd up in Cu-Pd, Pt up in Pt3Ni); use the default set for "
            "d-band positions"
        ),
        "orthogonal": True,
        "provenance": (
            "generated by valband.params.harrison (python -m valband.params.harrison); "
            "universal prefactors eta and d radii r_d recalled from memory of " + _BOOKS
            + "; onsite energies from NIST SRD 141 non-relativistic LDA where the shared "
            "extract has them, otherwise marked from memory; hbar^2/m from CODATA via "
            "scipy.constants"
        ),
        "elements": el_tables,
        "pairs": pairs,
    }


def build_harrison_set(elements: list[str] | None = None) -> ParameterSet:
    """The ``harrison-universal`` set, validated (see :func:`build_harrison_dict`)."""
    return ParameterSet.from_dict(build_harrison_dict(elements), origin="valband.params.harrison")


_HEADER = (
    "valband parameter set harrison-universal (format: valband/params/README.md).\n"
    "Generated by valband.params.harrison; do not edit by hand. Regenerate with\n"
    "    python -m valband.params.harrison src/valband/data/params/harrison-universal.toml"
)


def render_harrison_toml() -> str:
    """TOML text of the shipped set, exactly as in ``data/params/harrison-universal.toml``."""
    return dumps(build_harrison_set().to_dict(), header=_HEADER)


def main(argv: list[str] | None = None) -> int:
    """Write the set to the path given (or to standard output)."""
    parser = argparse.ArgumentParser(
        prog="python -m valband.params.harrison",
        description="Write the harrison-universal parameter set as TOML.",
    )
    parser.add_argument("output", nargs="?", help="output .toml path (default: standard output)")
    args = parser.parse_args(argv)
    text = render_harrison_toml()
    if args.output:
        Path(args.output).write_text(text, encoding="utf-8")
    else:
        sys.stdout.write(text)
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
