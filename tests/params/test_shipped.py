"""Shipped sets: loading, round trips through dicts and through valband's TOML emitter."""

from __future__ import annotations

import json
import tomllib
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from valband.errors import ParameterError
from valband.params import (
    ParameterSet,
    dumps,
    list_parameter_sets,
    load_parameter_set,
    write_parameter_set,
)

from .helpers import readme_toml_blocks

SHIPPED = list_parameter_sets()


def test_both_sets_are_shipped():
    assert {"harrison-universal", "example-nonorthogonal"} <= set(SHIPPED)


@pytest.mark.parametrize("name", SHIPPED)
def test_load_by_name_and_by_path(name):
    ps = load_parameter_set(name)
    assert ps.name == name  # the file name is the set's name
    assert Path(ps.origin).stem == name
    assert load_parameter_set(Path(ps.origin)) == ps
    assert load_parameter_set(str(ps.origin)) == ps


@pytest.mark.parametrize("name", SHIPPED)
def test_to_dict_is_the_parsed_toml(name):
    # tomllib (Python standard library) is the independent TOML reader
    ps = load_parameter_set(name)
    with open(ps.origin, "rb") as fh:
        assert ps.to_dict() == tomllib.load(fh)


@pytest.mark.parametrize("name", SHIPPED)
def test_from_dict_round_trip(name):
    ps = load_parameter_set(name)
    again = ParameterSet.from_dict(ps.to_dict())
    assert again == ps
    r = np.linspace(1.8, 5.0, 41)
    for (a, b) in ps.pairs:
        np.testing.assert_array_equal(again.hopping(a, b, r), ps.hopping(a, b, r))


@pytest.mark.parametrize("name", SHIPPED)
def test_emitter_output_reads_back_equal(name, tmp_path):
    ps = load_parameter_set(name)
    text = dumps(ps.to_dict(), header="test header\nsecond line")
    assert tomllib.loads(text) == ps.to_dict()  # tomllib: independent reader
    path = write_parameter_set(ps, tmp_path / "copy.toml")
    assert load_parameter_set(path) == ps


@pytest.mark.parametrize("name", SHIPPED)
def test_summary_is_json_serialisable(name):
    ps = load_parameter_set(name)
    s = json.loads(json.dumps(ps.summary()))
    assert set(s["elements"]) == set(ps.elements)
    for p in ps.pairs.values():
        assert s["pairs"][p.key]["cutoff_A"] == ps.cutoff(p.first, p.second)


def test_unknown_set_name_lists_shipped_sets():
    with pytest.raises(ParameterError, match="harrison-universal"):
        load_parameter_set("no-such-set")


def test_missing_file_is_named(tmp_path):
    path = tmp_path / "absent.toml"
    with pytest.raises(ParameterError, match="absent.toml"):
        load_parameter_set(path)


@pytest.mark.parametrize("block", readme_toml_blocks())
def test_readme_examples_are_valid_sets(block):
    ps = ParameterSet.from_dict(tomllib.loads(block), origin="README.md")
    assert ps.to_dict() == tomllib.loads(block)


def test_readme_example_evaluates_each_law():
    ps = ParameterSet.from_dict(tomllib.loads(readme_toml_blocks()[0]))
    col = {n: i for i, n in enumerate(("sss", "sps", "pss", "sds", "dss", "pps", "ppp",
                                       "pds", "pdp", "dps", "dpp", "dds", "ddp", "ddd"))}
    h = ps.hopping("Cu", "Cu", np.array([2.553, 3.61]))
    assert h[0, col["sss"]] == pytest.approx(-1.54)  # power law at r0
    assert h[0, col["sds"]] == pytest.approx(-0.50)  # exponential law at r0
    assert h[1, col["dds"]] == pytest.approx(-0.06)  # spline node
    assert h[1, col["ddp"]] == pytest.approx(0.033)  # shell value
    assert h[0, col["dss"]] == h[0, col["sds"]]  # like pair: dss = sds
    assert np.all(h[:, [col["sps"], col["pps"], col["ppp"], col["pds"]]] == 0)  # no p on Cu


# TOML basic strings may hold any Unicode scalar value (TOML 1.0 spec); surrogates are not
# scalar values.
_text = st.text(st.characters(exclude_categories=("Cs",)), max_size=30)
_scalar = st.one_of(
    _text, st.booleans(), st.integers(-(2**63), 2**63 - 1),
    st.floats(allow_nan=False),
)  # fmt: skip
_value = st.recursive(_scalar, lambda inner: st.lists(inner, max_size=4), max_leaves=8)
_tables = st.recursive(
    st.dictionaries(_text, _value, max_size=4),
    lambda inner: st.dictionaries(_text, st.one_of(_value, inner), max_size=4),
    max_leaves=12,
)


@settings(max_examples=150, deadline=None)
@given(_tables)
def test_emitter_round_trips_arbitrary_documents(doc):
    # tomllib (standard library) is the reference reader of TOML 1.0
    assert tomllib.loads(dumps(doc)) == doc
