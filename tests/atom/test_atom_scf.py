"""The self-consistent atom: result record, units, ions, options and failures.

sources
- Hartree energy 27.211386245988 eV (CODATA 2018, from memory; rel. 1e-9 also covers CODATA 2022).
- Charge conservation ∫ρ d³r = Z − charge and ionisation lowering the levels (textbook).
- The NIST README (tests/data/README.md): PW92 differs from the VWN values by about
  1e-4 Ha in light atoms and more in heavier ones (checked here: 1e-4 … 1e-2 Ha for Ne).
- A confining potential raises every level (variational principle, textbook).
"""

from __future__ import annotations

import dataclasses
import functools
import math

import numpy as np
import pytest

from valband.atom import AtomResult, ConfigurationError, solve_atom
from valband.errors import CalculationError, InputError, SettingsError


@functools.lru_cache(maxsize=None)
def _cu(relativity="none", charge=0.0, configuration=None):
    return solve_atom("Cu", configuration, relativity=relativity, charge=charge)


def test_atom_result_record():
    a = _cu()
    assert isinstance(a, AtomResult)
    assert a.z == 29 and a.symbol == "Cu" and a.converged and a.iterations > 1
    assert a.configuration_text() == "[Ar] 3d10 4s1"
    with pytest.raises(dataclasses.FrozenInstanceError):
        a.z = 30  # type: ignore[misc]
    for arr in (a.r, a.potential, a.density, a.hartree_potential, a.xc_potential, a.orbitals[0].u):
        assert not arr.flags.writeable
    r = a.r
    assert a.grid.integrate(4 * math.pi * r * r * a.density) == pytest.approx(29.0, abs=1e-8)
    # potential = nuclear + Hartree + xc and tends to −(Z − N)/r = 0 far out
    assert np.allclose(
        a.potential, -29 / r + a.hartree_potential + a.xc_potential, rtol=0, atol=1e-9 * 29 / r
    )
    assert abs(a.potential[-1]) < 1e-6
    assert a.density_residual < 1e-9 and a.energy_change < 1e-10


def test_atom_units_at_the_edge():
    a = _cu()
    ev = a.eigenvalues_ev()
    assert set(ev) == set(a.eigenvalues)
    for k, e in a.eigenvalues.items():
        assert ev[k] / e == pytest.approx(27.211386245988, rel=1e-9)
    assert a.orbital("3d").energy_ev == pytest.approx(ev["3d"])
    assert a.orbital((4, 0)).label == "4s"
    assert a.total_energy_ev() / a.total_energy == pytest.approx(27.211386245988, rel=1e-9)
    assert a.r_angstrom()[-1] / a.r[-1] == pytest.approx(0.529177210903, rel=1e-9)
    with pytest.raises(SettingsError, match="4p"):
        a.orbital("4p")


def test_atom_ion_and_empty_level():
    neutral = _cu()
    ion = _cu(charge=1.0)
    assert ion.configuration_text() == "[Ar] 3d10"
    assert ion.grid.integrate(4 * math.pi * ion.r**2 * ion.density) == pytest.approx(28.0, abs=1e-8)
    assert ion.eigenvalues["3d"] < neutral.eigenvalues["3d"] - 0.3
    # far out the ion's potential is −1/r
    assert ion.potential[-1] * ion.r[-1] == pytest.approx(-1.0, abs=1e-6)
    empty = solve_atom("Cu", "[Ar] 3d10 4s1 4p0")
    assert empty.orbital("4p").occupation == 0.0
    assert empty.eigenvalues["4s"] < empty.eigenvalues["4p"] < 0
    # an empty level does not change the density or the energy
    assert empty.total_energy == pytest.approx(neutral.total_energy, abs=1e-8)


def test_atom_fractional_occupation_between_integer_ones():
    a = solve_atom("Cu", "[Ar] 3d9.5 4s1.5")
    assert electron_total(a) == pytest.approx(29.0, abs=1e-8)
    # removing d charge deepens the d level (less self-repulsion): textbook Janak behaviour
    assert a.eigenvalues["3d"] < _cu().eigenvalues["3d"]


def electron_total(a):
    return a.grid.integrate(4 * math.pi * a.r**2 * a.density)


def test_atom_pw92_option():
    vwn = solve_atom("Ne")
    pw = solve_atom("Ne", correlation="pw92")
    assert pw.correlation == "pw92"
    assert 1e-4 < abs(pw.total_energy - vwn.total_energy) < 1e-2


def test_atom_confinement_raises_levels():
    free = _cu()
    conf = solve_atom("Cu", extra_potential=lambda r: (r / 6.0) ** 2)
    assert conf.energies.external > 0
    for k in free.eigenvalues:
        assert conf.eigenvalues[k] > free.eigenvalues[k]
    assert conf.eigenvalues["4s"] - free.eigenvalues["4s"] > 0.1


def test_atom_scalar_relativistic_runs_and_binds_deeper_s():
    nr = _cu()
    sr = solve_atom("Cu", relativity="scalar", relativistic_exchange="off")
    assert sr.relativity == "scalar"
    # hydrogen-like 1s mass-velocity + Darwin shift −Z⁴α²/8 ≈ −4.7 Ha for Z = 29 (textbook);
    # screening makes it somewhat smaller in the atom. The textbook shift is the kinetic one,
    # so it is compared with the relativistic exchange correction off.
    shift = sr.eigenvalues["1s"] - nr.eigenvalues["1s"]
    assert -4.8 < shift < -3.0
    assert sr.total_energy < nr.total_energy
    # the default scalar atom adds the MacDonald–Vosko exchange correction, which weakens the
    # exchange where the density is high (Φ, ψ < 1; MacDonald & Vosko, J. Phys. C 12, 2977
    # (1979)) and so lifts 1s again: the sign is physics, the bound "smaller than the kinetic
    # shift" a regression guard (measured 0.95 Ha against 3.9 Ha)
    rx = _cu(relativity="scalar")
    lift = rx.eigenvalues["1s"] - sr.eigenvalues["1s"]
    assert 0 < lift < abs(shift)


def test_atom_non_convergence_raises():
    with pytest.raises(CalculationError, match="did not converge in 3 iterations"):
        solve_atom("Cu", max_iterations=3)


@pytest.mark.parametrize(
    ("kwargs", "exc", "words"),
    [
        (
            {"element": "Cu", "configuration": "[Ar] 3d10"},
            ConfigurationError,
            ["28 electrons", "Z - charge", "29"],
        ),
        (
            {"element": "Cu", "configuration": "[Ar] 3d10 4s1", "charge": 1.0},
            ConfigurationError,
            ["Z - charge"],
        ),
        ({"element": "Qq"}, ConfigurationError, ["unknown element"]),
        ({"element": "Cu", "relativity": "dirac"}, SettingsError, ["relativity", "scalar"]),
        ({"element": "Cu", "correlation": "pbe"}, SettingsError, ["correlation", "vwn"]),
        ({"element": "Cu", "mixing": 0.0}, SettingsError, ["mixing"]),
        ({"element": "Cu", "history": 0}, SettingsError, ["history"]),
        ({"element": "Cu", "density_tol": -1.0}, SettingsError, ["density_tol"]),
        ({"element": "Cu", "extra_potential": lambda r: r[:3]}, SettingsError, ["extra_potential"]),
        ({"element": "Cu", "charge": 40.0}, ConfigurationError, ["charge"]),
    ],
)
def test_atom_bad_input(kwargs, exc, words):
    with pytest.raises(exc) as info:
        solve_atom(**kwargs)
    assert isinstance(info.value, InputError)
    for w in words:
        assert w in str(info.value)
