"""Confined atoms: valence shells, sign convention, density, neutral potential, onsite energies."""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np
import pytest
from ase.data import atomic_numbers, covalent_radii

from valband.atom.scf import BOHR_ANGSTROM
from valband.twocentre import (
    DENSITY_R0_FACTOR,
    SHELL_R0_FACTORS,
    confined_atom,
    default_r0,
    valence_shells,
)

NIST = Path(__file__).resolve().parents[1] / "data" / "nist_srd141_lda.csv"


def test_valence_shells_of_the_trade():
    # common practice: the valence s, p shell of the period and the (n-1)d shell of the d block
    assert valence_shells("Cu") == {"s": (4, 0), "p": (4, 1), "d": (3, 2)}
    assert valence_shells("Pd") == {"s": (5, 0), "p": (5, 1), "d": (4, 2)}
    assert valence_shells("Au") == {"s": (6, 0), "p": (6, 1), "d": (5, 2)}
    assert valence_shells("Al") == {"s": (3, 0), "p": (3, 1)}
    assert valence_shells("Al", ("s", "p", "d")) == {"s": (3, 0), "p": (3, 1), "d": (3, 2)}


def test_cu_record(cu):
    assert cu.shells == ("s", "p", "d")
    assert [o.label for o in cu.orbitals] == ["4s", "4p", "3d"]
    assert cu.orbital("p").occupation == 0.0  # the empty 4p level of 3d10 4s1
    assert cu.valence_electrons == 11.0
    # default r0 = factor × covalent radius per shell (ASE's table, Cordero et al. 2008:
    # Cu 1.32 Å; bohr = 0.529177 Å, CODATA)
    rcov = covalent_radii[atomic_numbers["Cu"]] / BOHR_ANGSTROM
    assert default_r0("Cu") == pytest.approx(1.32 / 0.529177, rel=1e-4)
    for sh in "spd":
        assert cu.shell_r0[sh] == pytest.approx(SHELL_R0_FACTORS[sh] * rcov)
        assert cu.orbital(sh).r0 == cu.shell_r0[sh]
    assert cu.r0_density == pytest.approx(DENSITY_R0_FACTOR * rcov)
    conf = cu.settings["confinement"]
    assert conf["power"] == 2 and set(conf["r0_orbitals_bohr"]) == {"s", "p", "d"}
    for key in ("method", "functional", "relativity", "grid", "valband_version"):
        assert key in cu.settings
    # scalar-relativistic atoms carry the MacDonald–Vosko relativistic exchange by default
    assert cu.settings["relativistic_exchange"] is True
    assert "MacDonald & Vosko" in cu.settings["functional"]


@pytest.mark.parametrize("shell", ["s", "p", "d"])
def test_orbitals_normalised_outer_lobe_positive(cu, shell):
    o = cu.orbital(shell)
    assert cu.grid.integrate(o.u**2) == pytest.approx(1.0, abs=1e-9)
    significant = np.flatnonzero(np.abs(o.u) > 1e-2 * np.abs(o.u).max())
    assert o.u[significant[-1]] > 0
    np.testing.assert_allclose(o.radial * cu.r, o.u, rtol=1e-14)
    # the number of radial nodes is n - l - 1 (the right state was picked)
    inner = o.u[: significant[-1]]
    nodes = np.count_nonzero(np.diff(np.sign(inner[np.abs(inner) > 1e-8])) != 0)
    assert nodes == o.n - o.l - 1


def test_confinement_raises_levels_and_density_is_neutral(cu):
    # a positive extra potential raises every level (variational principle, common practice)
    for o in cu.orbitals:
        assert o.energy > o.free_energy
    # the density holds Z electrons, and outside it the neutral-atom potential vanishes while
    # it tends to −Z/r at the nucleus (Gauss's law)
    r = cu.r
    assert cu.grid.integrate(4 * np.pi * r**2 * cu.density) == pytest.approx(29.0, abs=1e-6)
    rv = r * cu.neutral_potential
    assert abs(rv[np.searchsorted(r, 20.0)]) < 1e-3
    assert rv[0] == pytest.approx(-29.0, abs=1e-3)
    assert np.all(cu.neutral_potential[r < 10] < 0)


def test_nonrelativistic_onsite_energies_match_nist():
    # NIST SRD 141 (Kotochigova et al., Phys. Rev. A 55, 191 (1997)), LDA with VWN: the onsite
    # energies are the free-atom eigenvalues, so they must reproduce the table (1e-5 Ha, the
    # atom engine's accuracy, plus 1e-5 Ha for the 100-bohr grid)
    ref = {}
    with NIST.open(newline="") as fh:
        for row in csv.DictReader(fh):
            if row["element"] == "Cu":
                ref[row["quantity"]] = float(row["value_hartree"])
    atom = confined_atom("Cu", relativity="none")
    assert atom.settings["relativistic_exchange"] is False  # NIST's LDA tables have none
    assert atom.orbital("s").free_energy == pytest.approx(ref["eps_4s"], abs=2e-5)
    assert atom.orbital("d").free_energy == pytest.approx(ref["eps_3d"], abs=2e-5)


def test_separate_density_and_shell_radii():
    atom = confined_atom("Al", r0=5.0, r0_density=7.0, shell_r0={"p": 6.0})
    assert atom.shell_r0 == {"s": 5.0, "p": 6.0}
    assert atom.r0_density == 7.0
    assert atom.orbital("p").r0 == 6.0
    # a looser confinement leaves a more extended orbital: compare ⟨r⟩ of 3p at 6 and 5 bohr
    tight = confined_atom("Al", r0=5.0)
    mean_r = [a.grid.integrate(a.orbital("p").u ** 2 * a.r) for a in (atom, tight)]
    assert mean_r[0] > mean_r[1]


def test_solid_configuration_rule():
    # common practice for transition metals: d^(n-1) s^1 as in the metal; the Zn group and the
    # noble metals keep their ground states (Cu 3d10 4s1 already is d^(n-1) s^1)
    from valband.twocentre.confinement import _configuration

    def text(el, rule="solid"):
        from valband.atom.configurations import format_configuration, resolve_element

        z, _ = resolve_element(el)
        return format_configuration(_configuration(z, valence_shells(el), rule))

    assert "3d9 4s1" in text("Ni") and "3d8 4s2" in text("Ni", "ground")
    assert "4d9 5s1" in text("Pd") and "5d7 6s1" in text("Os")
    assert "3d10 4s1" in text("Cu") and "3d10 4s2" in text("Zn")
    assert "3s2 3p1" in text("Al")
    assert "3d8.5 4s1.5" in text("Ni", "[Ar] 3d8.5 4s1.5 4p0")


def test_onsite_rules(cu):
    # "basis": <φ|T + v_free|φ> ≥ the free eigenvalue for the same level (variational
    # principle, common practice); the default is the free eigenvalue itself
    basis = confined_atom("Cu", onsite="basis")
    for o, b in zip(cu.orbitals, basis.orbitals, strict=True):
        assert o.onsite == o.free_energy
        assert b.onsite > b.free_energy
    assert basis.settings["onsite_rule"] == "basis"
