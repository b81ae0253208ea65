"""Spin–orbit constants carried by a parameter set (format v1, optional ``spin_orbit`` table)."""

from __future__ import annotations

import pytest

from valband.errors import ParameterError
from valband.params import load_parameter_set
from valband.params.toml_writer import dumps
from valband.spin.soc import spin_orbit_constants


def _with_xi(tmp_path, value):
    d = load_parameter_set("harrison-universal").to_dict()
    d["elements"]["Pt"]["spin_orbit"] = {"d": {"value": value, "source": "test value"}}
    path = tmp_path / "pt-soc.toml"
    path.write_text(dumps(d), encoding="utf-8")
    return path


def test_set_value_is_used_and_recorded(tmp_path):
    ps = load_parameter_set(_with_xi(tmp_path, 0.65))
    assert ps.element("Pt").spin_orbit == {"d": 0.65}
    assert ps.summary()["elements"]["Pt"]["spin_orbit_eV"] == {"d": 0.65}
    consts = spin_orbit_constants({"Pt": ("s", "p", "d")}, True, ps)
    assert consts["Pt", "d"].xi_ev == 0.65 and "test value" in consts["Pt", "d"].source
    # p has no value in the set: it comes from the atom engine, and says so
    assert "valband.atom" in consts["Pt", "p"].source
    # the field survives a round trip through the writer
    again = load_parameter_set(_with_xi(tmp_path, 0.65))
    assert again.to_dict()["elements"]["Pt"]["spin_orbit"]["d"]["value"] == 0.65


@pytest.mark.parametrize("value", [-0.1, 7.0])
def test_out_of_range_values_are_named(tmp_path, value):
    with pytest.raises(ParameterError, match="spin_orbit"):
        load_parameter_set(_with_xi(tmp_path, value))


def test_shell_the_element_lacks_is_refused(tmp_path):
    d = load_parameter_set("harrison-universal").to_dict()
    d["elements"]["Al"]["spin_orbit"] = {"d": {"value": 0.1, "source": "x"}}
    path = tmp_path / "bad.toml"
    path.write_text(dumps(d), encoding="utf-8")
    with pytest.raises(ParameterError, match="spin–orbit constant for shell 'd'"):
        load_parameter_set(path)
