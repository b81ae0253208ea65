"""Canonical models for the pipeline tests (session-scoped, immutable)."""

from __future__ import annotations

import pytest

from valband.params import ParameterSet, load_parameter_set
from valband.structure import build_structure, read_structure
from valband.tb import build_model


def d_only_fcc_set(dds: float, ddp: float, ddd: float) -> ParameterSet:
    """An fcc set with nearest-neighbour d–d hopping only (for the moments theorem)."""
    law = lambda v: {"law": "power", "v0": v, "r0": 2.55, "n": 0.0}  # noqa: E731 - constant
    return ParameterSet.from_dict({
        "schema_version": 1, "name": "d-only-test", "version": "1", "orthogonal": True,
        "description": "nearest-neighbour d-d test set", "provenance": "test values",
        "elements": {"Cu": {"shells": ["d"], "valence_electrons": {"value": 9.0, "source": "test"},
                            "onsite": {"d": {"value": 0.0, "source": "test"}}}},
        "pairs": {"Cu-Cu": {"source": "test", "cutoff": {"inner": 2.8, "outer": 3.0, "taper": "cosine"},
                            "hopping": {"dds": law(dds), "ddp": law(ddp), "ddd": law(ddd)}}},
    })


@pytest.fixture(scope="session")
def harrison():
    return load_parameter_set("harrison-universal")


@pytest.fixture(scope="session")
def cu_model(harrison):
    return build_model(build_structure("Cu fcc 3.61"), harrison)


@pytest.fixture(scope="session")
def cu3pd_model(harrison, repo_root):
    return build_model(read_structure(repo_root / "structures" / "Cu3Pd_L12.cif"), harrison)
