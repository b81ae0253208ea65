"""Shared fixtures of the spin tests: parameter sets and small models (session-scoped)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from valband.params import ParameterSet, load_parameter_set
from valband.structure import build_structure
from valband.tb import build_model

#: Reference data of the tests inside the repository (sources: tests/data/README.md).
REFERENCE_DATA = Path(__file__).resolve().parents[1] / "data"

#: Elements the moment and non-magnetism tests need, with their lattices (ASE reference states).
METALS = {"Fe": "bcc", "Co": "hcp", "Ni": "fcc", "Cu": "fcc", "Ag": "fcc", "Au": "fcc",
          "Pd": "fcc", "Pt": "fcc"}


@pytest.fixture
def rng():
    """A seeded generator (seed 20240817), so failures reproduce."""
    return np.random.default_rng(20240817)


@pytest.fixture(scope="session")
def harrison():
    return load_parameter_set("harrison-universal")


#: The shipped first-principles set (valband.twocentre: confined scalar-relativistic LDA atoms,
#: non-orthogonal spd) — the one whose d bands the moment and spectrum tests rely on.
FIRST_PRINCIPLES_SET = "valband-tc-2026"


@pytest.fixture(scope="session")
def first_principles_set() -> ParameterSet:
    return load_parameter_set(FIRST_PRINCIPLES_SET)


@pytest.fixture(scope="session")
def metal_model(first_principles_set):
    """element → (model of its ASE reference lattice, first-principles parameter set)."""
    cache = {}

    def get(el):
        if el not in cache:
            ps = first_principles_set
            cache[el] = (build_model(build_structure(f"{el} {METALS[el]}"), ps), ps)
        return cache[el]

    return get


def isolated(spec: str, params):
    """A model of a cell so dilated that no bond is inside the cutoff (the atomic limit)."""
    model = build_model(build_structure(spec), params)
    assert model.n_bonds == 0
    return model
