"""Virial theorem of the self-consistent non-relativistic LDA atom.

source: textbook — for any density functional, stationarity under uniform scaling
ρ_λ(r) = λ³ρ(λr) gives 2T_s + E_nuc + E_H + d/dλ E_xc[ρ_λ]|_{λ=1} = 0, and for the LDA
d/dλ E_xc[ρ_λ] = 3∫ρ(v_xc − ε_xc) d³r (equal to E_x for exchange alone) (Parr & Yang,
Density-Functional Theory of Atoms and Molecules, §4.7; Levy & Perdew, Phys. Rev. A 32, 2010
(1985)). Checked to 1e-6 relative to |E|.
"""

from __future__ import annotations

import pytest

from valband.atom import solve_atom


@pytest.mark.parametrize("element", ["He", "Ne", "Si", pytest.param("Cu", marks=pytest.mark.slow)])
def test_atom_virial_theorem(element):
    atom = solve_atom(element)
    e = atom.energies
    assert abs(2 * e.kinetic + e.nuclear + e.hartree + e.xc_virial) < 1e-6 * abs(e.total)
    assert abs(atom.virial_residual()) < 1e-6
    # and the components add up to the total
    assert e.kinetic + e.nuclear + e.hartree + e.xc + e.external == pytest.approx(e.total, abs=1e-9)
    assert e.kinetic > 0 and e.nuclear < 0 and e.hartree > 0 and e.xc < 0
