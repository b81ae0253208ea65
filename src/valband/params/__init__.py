"""Slater–Koster parameter sets: data model, TOML file format (schema 1), shipped sets.

The file format is documented in ``README.md`` beside this module; the shipped sets live in
``valband/data/params/`` (see :func:`list_parameter_sets`).
"""

from valband.params.laws import (
    Cutoff,
    DistanceLaw,
    ExponentialLaw,
    PowerLaw,
    ShellTable,
    SplineLaw,
)
from valband.params.model import (
    BOND_INTEGRALS,
    REVERSED_PARTNER,
    ElementParams,
    PairParams,
    ParameterSet,
    integral_shells,
    list_parameter_sets,
    load_parameter_set,
    orthogonal_counterpart,
)
from valband.params.schema import SCHEMA_VERSIONS
from valband.params.toml_writer import dumps, write_parameter_set

__all__ = [
    "BOND_INTEGRALS",
    "REVERSED_PARTNER",
    "SCHEMA_VERSIONS",
    "ElementParams",
    "PairParams",
    "ParameterSet",
    "Cutoff",
    "DistanceLaw",
    "PowerLaw",
    "ExponentialLaw",
    "SplineLaw",
    "ShellTable",
    "integral_shells",
    "load_parameter_set",
    "list_parameter_sets",
    "orthogonal_counterpart",
    "dumps",
    "write_parameter_set",
]
