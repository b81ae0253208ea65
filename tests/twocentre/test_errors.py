"""Bad input gets a clear error naming what is accepted (project rule 5)."""

from __future__ import annotations

import pytest

from valband.errors import InputError, SettingsError
from valband.twocentre import (
    QuadratureSettings,
    bond_grid,
    bond_integrals,
    confined_atom,
    pair_table,
    valence_shells,
)


def test_unknown_element():
    with pytest.raises(InputError, match="accepted: element symbols"):
        confined_atom("Xx")


def test_open_f_shell_refused():
    with pytest.raises(InputError, match="accepted: elements H-U without a partly filled f"):
        confined_atom("Ce")


@pytest.mark.parametrize("bad", [0.0, -2.0, float("nan"), "big"])
def test_bad_r0(bad):
    with pytest.raises(SettingsError, match="accepted: a finite confinement radius > 0 bohr"):
        confined_atom("Al", r0=bad)
    with pytest.raises(SettingsError, match="accepted"):
        confined_atom("Al", r0_density=bad)


def test_bad_power_shells_relativity():
    with pytest.raises(SettingsError, match="accepted: an exponent"):
        confined_atom("Al", power=40)
    with pytest.raises(SettingsError, match="accepted: s, p"):
        confined_atom("Al", shell_r0={"d": 5.0})
    with pytest.raises(SettingsError, match="accepted: a non-empty subset"):
        valence_shells("Cu", ("s", "f"))
    with pytest.raises(SettingsError, match="accepted: none, scalar"):
        confined_atom("Al", relativity="dirac")


@pytest.mark.parametrize("bad", [[-1.0], [2.5, 0.0], [float("inf")], []])
def test_bad_distances(bad, al):
    with pytest.raises(InputError, match="accepted|non-empty"):
        bond_integrals(al.site(), al.site(), bad)


def test_bad_distance_in_pair_table(al):
    with pytest.raises(InputError, match="accepted: finite distances > 0 Å"):
        pair_table(al, al, [2.5, -1.0])


def test_bad_quadrature_settings():
    with pytest.raises(SettingsError, match="n_angular must be an integer 4-400"):
        QuadratureSettings(n_angular=2)
    with pytest.raises(SettingsError, match="radial_step"):
        QuadratureSettings(radial_step=0.0)
    with pytest.raises(InputError, match="> 0 bohr"):
        bond_grid(-1.0)


def test_unbound_free_level_is_explained():
    # the empty Al 3d level is not bound in the free LDA atom: no onsite energy for it
    from valband.errors import CalculationError

    with pytest.raises(CalculationError, match="accepted: valence shells whose free-atom"):
        confined_atom("Al", shells=("s", "p", "d"))


def test_options_with_ready_atoms(al):
    with pytest.raises(SettingsError, match="apply only to elements given by symbol"):
        pair_table(al, "Al", [2.5], r0=5.0)


def test_confinement_radius_too_small():
    # below MIN_R0_FACTOR × r_cov the valence orbital would be squeezed into the core
    from valband.twocentre.confinement import MIN_R0_FACTOR, default_r0

    tiny = 0.9 * MIN_R0_FACTOR * default_r0("Cu")
    with pytest.raises(SettingsError, match="is too small"):
        confined_atom("Cu", shell_r0={"d": tiny})
    with pytest.raises(SettingsError, match=r"\(density\) is too small"):
        confined_atom("Cu", r0_density=tiny)


def test_bad_configuration_and_onsite_rule():
    with pytest.raises(SettingsError, match="accepted: 'solid', 'ground'"):
        confined_atom("Cu", configuration="[Ar] 3d10 4q1")
    with pytest.raises(InputError, match="holds 28 electrons"):
        confined_atom("Cu", configuration="[Ar] 3d9 4s1")
    with pytest.raises(SettingsError, match="accepted: eigenvalue, basis"):
        confined_atom("Cu", onsite="dft")
