"""Scalar-relativistic LDA atoms: d levels and relativistic shifts.

sources
- NIST SRD 141 fully relativistic LDA (RLDA) d_{3/2}, d_{5/2} eigenvalues of Cu, Ag, Au
  (``tests/data/nist_srd141_rlda_d_levels.csv``; Kotochigova et al., Phys. Rev. A 55, 191
  (1997)). A scalar-relativistic level is the (2j+1)-weighted j average (4ε_{3/2}+6ε_{5/2})/10
  to first order in the spin–orbit coupling (common practice). The rest is of second order:
  the Dirac j = 3/2 and 5/2 radial functions, and the j-split cores (p_{1/2} contracts more
  than p_{3/2}), relax differently from one scalar-relativistic orbital, so the remainder
  grows with the splitting. Tolerance: 4 % of the d_{3/2}–d_{5/2} splitting (Cu 11 meV,
  Ag 22 meV, Au 61 meV). Measured with the MacDonald–Vosko relativistic exchange (default):
  Cu +1.6, Ag +4.9, Au +45 meV (0.6, 0.9, 2.9 % of the splitting); without it +13.4, +22.3,
  +67 meV (4.9, 4.0, 4.4 %). The correction moves all three towards NIST, which is evidence
  that the NIST RLDA tables include it (the relativistic-LDA form the database documents);
  that comparison is a test of its own.
- Au 5d rises by about 1 eV and 6s falls by about 1.6 eV from the non-relativistic to the
  scalar-relativistic atom (METHODS.md, from NIST ScRLDA vs LDA eigenvalues; common practice).
  Loose windows: 5d +0.7 … +1.5 eV, 6s −2.0 … −1.2 eV.
"""

from __future__ import annotations

import csv
import functools
from pathlib import Path

import pytest

from valband.atom import solve_atom

CSV = Path(__file__).resolve().parents[1] / "data" / "nist_srd141_rlda_d_levels.csv"


def _load():
    # a missing reference file fails the collection (tests/data is part of the repository)
    with CSV.open(newline="") as fh:
        return list(csv.DictReader(fh))


ROWS = _load()


@functools.lru_cache(maxsize=None)
def _atom(symbol: str, relativity: str, relativistic_exchange=None):
    return solve_atom(symbol, relativity=relativity, relativistic_exchange=relativistic_exchange)


def _nist(row):
    lo = float(row["eps_j_minus_hartree"])
    hi = float(row["eps_j_plus_hartree"])
    return lo, hi, (4 * lo + 6 * hi) / 10.0  # d_{3/2}: 2j+1 = 4, d_{5/2}: 6


def test_reference_holds_the_three_noble_metals():
    assert [r["element"] for r in ROWS] == ["Cu", "Ag", "Au"]


@pytest.mark.slow
@pytest.mark.parametrize("row", ROWS, ids=[r["element"] for r in ROWS])
def test_atom_scalar_relativistic_d_level_is_j_average(row):
    lo, hi, avg = _nist(row)
    atom = _atom(row["element"], "scalar")
    assert atom.relativistic_exchange  # the default of a scalar-relativistic atom
    eps = atom.eigenvalues[row["shell"]]
    assert lo < eps < hi
    assert abs(eps - avg) < 0.04 * (hi - lo)


@pytest.mark.slow
@pytest.mark.parametrize("row", ROWS, ids=[r["element"] for r in ROWS])
def test_relativistic_exchange_moves_the_d_level_towards_nist(row):
    # NIST SRD 141 RLDA j-average (see the module docstring): with the MacDonald–Vosko
    # correction our d level is closer to it than without (by 12, 17, 22 meV measured)
    _, _, avg = _nist(row)
    shell = row["shell"]
    on = _atom(row["element"], "scalar").eigenvalues[shell]
    off = _atom(row["element"], "scalar", False).eigenvalues[shell]
    assert abs(on - avg) < abs(off - avg)


@pytest.mark.slow
def test_atom_gold_relativistic_shifts():
    nr = _atom("Au", "none").eigenvalues_ev()
    sr = _atom("Au", "scalar").eigenvalues_ev()
    d_shift = sr["5d"] - nr["5d"]
    s_shift = sr["6s"] - nr["6s"]
    assert 0.7 < d_shift < 1.5
    assert -2.0 < s_shift < -1.2
    # so the 6s–5d separation shrinks (common practice: the relativistic narrowing of the
    # 5d–6s gap in gold)
    assert 0 < (sr["6s"] - sr["5d"]) < (nr["6s"] - nr["5d"]) - 2.0


def test_atom_scalar_relativity_is_small_for_light_atoms():
    # relativistic corrections scale as (Zα)²: below 1e-4 relative for the total energy of C
    # (common practice; the Breit–Pauli mass-velocity + Darwin estimate for C is ~ −0.015 Ha, from memory)
    nr = _atom("C", "none")
    sr = _atom("C", "scalar")
    d = sr.total_energy - nr.total_energy
    assert -0.03 < d < -0.005
    for label in nr.eigenvalues:
        assert abs(sr.eigenvalues[label] - nr.eigenvalues[label]) < 5e-3 * abs(
            nr.eigenvalues[label]
        )
