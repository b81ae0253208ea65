"""Bad input to the tight-binding layer: clear valband errors naming what is wrong.

Source: the project's error rules (common practice): ParameterError for missing or malformed
parameter data, InputError for malformed arguments; isolated atoms are physical and allowed
(with no bond inside the cutoff the levels stay at the onsite energies, the free-atom limit of
tight binding, common practice).
"""

import numpy as np
import pytest

from valband.errors import InputError, ParameterError
from valband.structure import Structure, build_structure
from valband.tb import build_model

from .models import fcc_cu, two_element_cell
from .toy_params import ToyElement, ToyParams, constant, integrals, random_integrals, spd_params


def test_element_without_parameters_is_named(rng):
    params = spd_params(rng, ("Cu",))
    with pytest.raises(ParameterError, match="'Zn'"):
        build_model(two_element_cell(), params)


def test_pair_without_parameters_is_named(rng):
    params = spd_params(rng, ("Cu",))
    params.elements["Zn"] = params.elements["Cu"]
    with pytest.raises(ParameterError, match="Cu–Zn"):
        build_model(two_element_cell(), params)


def test_element_without_onsite_energy(rng):
    params = spd_params(rng, ("Cu",))
    params.elements["Cu"] = ToyElement(("s", "d"), {"s": 0.0}, 11.0)
    with pytest.raises(ParameterError, match=r"'Cu' has no onsite energy .* d shell"):
        build_model(fcc_cu(), params)


@pytest.mark.parametrize("shells", [("d", "s"), (), ("s", "f"), ("s", "s")])
def test_bad_shell_lists(shells, rng):
    params = spd_params(rng, ("Cu",))
    params.elements["Cu"] = ToyElement(shells, {s: 0.0 for s in shells}, 1.0)
    with pytest.raises(ParameterError, match="'Cu' has shells"):
        build_model(fcc_cu(), params)


def test_too_many_valence_electrons(rng):
    params = spd_params(rng, ("Cu",))
    params.elements["Cu"] = ToyElement(("d",), {"d": -3.0}, 11.0)
    with pytest.raises(ParameterError, match="11.0 valence electrons"):
        build_model(fcc_cu(), params)


def test_wrong_integral_shape(rng):
    params = spd_params(rng, ("Cu",))
    params.hopping = lambda a, b, r: np.zeros((len(r), 10))
    with pytest.raises(ParameterError, match=r"shape \(6, 10\)"):
        build_model(fcc_cu(), params)


def test_non_reciprocal_integrals_are_rejected(rng):
    v = random_integrals(rng)
    params = spd_params(rng, ("Cu",))
    params.hoppings["Cu", "Cu"] = constant(v)  # pss != sps for a like pair
    with pytest.raises(ParameterError, match="not reciprocal"):
        build_model(fcc_cu(), params)


def test_isolated_atoms_are_allowed():
    # a = 10 Å simple cubic with a 3 Å cutoff: no bonds, flat bands at the onsite levels
    st = build_structure("Cu sc 10.0")
    params = ToyParams(
        elements={"Cu": ToyElement(("s", "d"), {"s": 1.5, "d": -3.0}, 11.0)},
        hoppings={("Cu", "Cu"): constant(integrals(sss=-1.0, dds=-0.5))},
        cutoffs={("Cu", "Cu"): 3.0},
    )
    model = build_model(st, params)
    assert model.n_bonds == 0
    H = model.hamiltonian(np.random.default_rng(0).uniform(-1, 1, (4, 3)))
    np.testing.assert_array_equal(H, np.broadcast_to(np.diag([1.5] + [-3.0] * 5), H.shape))
    assert model.n_electrons == 11.0
    rs = model.real_space_hamiltonian()
    assert len(rs.first) == 0 and rs.hamiltonian == ()


def test_bad_k_points(rng):
    model = build_model(fcc_cu(), spd_params(rng, ("Cu",)))
    for bad in (np.zeros(3), np.zeros((2, 2)), np.full((1, 3), np.nan)):
        with pytest.raises(InputError, match="k-points"):
            model.hamiltonian(bad)


def test_model_records_basis_and_provenance(rng):
    # the basis follows valband.conventions.ORBITALS site by site
    st = Structure(
        cell=np.eye(3) * 5.0, positions=[[0, 0, 0], [2.5, 2.5, 2.5]], symbols=("Cu", "Al")
    )
    params = ToyParams(
        elements={
            "Cu": ToyElement(("s", "p", "d"), {"s": 0.0, "p": 4.0, "d": -3.0}, 11.0),
            "Al": ToyElement(("s", "p"), {"s": -2.0, "p": 3.0}, 3.0),
        },
        hoppings={
            pair: constant(integrals(sss=-1.0))
            for pair in [("Cu", "Cu"), ("Cu", "Al"), ("Al", "Al")]
        },
        cutoffs={("Cu", "Cu"): 5.5, ("Cu", "Al"): 4.5, ("Al", "Al"): 5.5},
        name="toy-set",
        version="3.1",
    )
    model = build_model(st, params)
    names = [o.orbital for o in model.orbitals]
    cu = ["s", "px", "py", "pz", "dxy", "dyz", "dzx", "dx2-y2", "dz2"]
    assert names == cu + ["s", "px", "py", "pz"]
    assert model.site_slices == (slice(0, 9), slice(9, 13))
    assert [o.site for o in model.orbitals] == [0] * 9 + [1] * 4
    np.testing.assert_array_equal(model.onsite, [0, 4, 4, 4, -3, -3, -3, -3, -3, -2, 3, 3, 3])
    assert model.n_electrons == 14.0
    assert (model.parameter_set, model.parameter_version) == ("toy-set", "3.1")
    assert model.orthogonal
    assert model.overlap(np.zeros((1, 3))) is None
    np.testing.assert_array_equal(model.select(shell="d"), np.arange(4, 9))
    np.testing.assert_array_equal(model.select(element="Al", shell="p"), [10, 11, 12])
    assert {b.shape for b in model.bond_hamiltonian} == {(9, 9), (9, 4), (4, 4)}
