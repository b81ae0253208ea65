"""Non-relativistic LDA atoms against NIST SRD 141.

source: NIST SRD 141, Kotochigova, Levine, Shirley, Stiles, Clark, Phys. Rev. A 55, 191 (1997)
(erratum 56, 5191), non-relativistic spin-unpolarised LDA with VWN correlation; values read from
``tests/data/nist_srd141_lda.csv`` (tabulated to 1e-6 Ha). Tolerance 1e-5 Ha on the total
energy and on every orbital eigenvalue.
"""

from __future__ import annotations

import csv
import functools
from pathlib import Path

import pytest

from valband.atom import solve_atom

CSV = Path(__file__).resolve().parents[1] / "data" / "nist_srd141_lda.csv"
TOL = 1e-5  # Ha
SLOW = {"Fe", "Cu", "Ag"}


def _load() -> dict[str, dict[str, float]]:
    # a missing reference file fails the collection (tests/data is part of the repository)
    out: dict[str, dict[str, float]] = {}
    with CSV.open(newline="") as fh:
        for row in csv.DictReader(fh):
            out.setdefault(row["element"], {})[row["quantity"]] = float(row["value_hartree"])
    return out


REF = _load()
ELEMENTS = list(REF)


@functools.lru_cache(maxsize=None)
def _atom(symbol: str):
    return solve_atom(symbol, relativity="none")


def _params():
    for el in ELEMENTS:
        marks = [pytest.mark.slow] if el in SLOW else []
        yield pytest.param(el, marks=marks, id=el)


@pytest.mark.parametrize("element", list(_params()))
def test_atom_nist_lda_total_energy_and_eigenvalues(element):
    ref = REF[element]
    atom = _atom(element)
    assert atom.relativity == "none" and atom.correlation == "vwn"
    # the non-relativistic NIST tables have no relativistic exchange correction, nor do we here
    assert not atom.relativistic_exchange
    assert atom.total_energy == pytest.approx(ref["Etot"], abs=TOL), "total energy"
    eig = atom.eigenvalues
    wanted = {k[4:]: v for k, v in ref.items() if k.startswith("eps_")}
    # every occupied subshell of our configuration is in the table and vice versa
    assert set(wanted) == set(eig)
    for label, value in wanted.items():
        assert eig[label] == pytest.approx(value, abs=TOL), label


def test_atom_nist_reference_covers_the_required_elements():
    assert {"H", "He", "C", "O", "Ne", "Al", "Si", "Fe", "Cu", "Ag"} <= set(REF)
