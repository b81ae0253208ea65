"""Integration with the shipped parameter sets of valband.params.

Sources: Slater & Koster, Phys. Rev. 94, 1498 (1954), Table I, for the bond along (1,1,0)/√2
(l = m = 1/√2, n = 0): E_{s,xy} = (√3/2)·sdσ, E_{x,y} = (ppσ − ppπ)/2,
E_{xy,xy} = (3/4)ddσ + (1/4)ddδ, E_{3z²−r², 3z²−r²} = (1/4)ddσ + (3/4)ddδ; the Frobenius norm
of a block is rotation invariant, so it equals that of the diagonal bond-frame matrix.
"""

import numpy as np
import pytest

try:
    from valband.params.model import list_parameter_sets, load_parameter_set
except ImportError:  # valband.params not written yet
    list_parameter_sets = None

from valband.tb import BOND_INTEGRALS, build_model

from .models import fcc_cu

pytestmark = pytest.mark.skipif(
    list_parameter_sets is None or "harrison-universal" not in list_parameter_sets(),
    reason="valband.params or its 'harrison-universal' set is not available yet",
)


def test_fcc_cu_with_harrison_universal():
    params = load_parameter_set("harrison-universal")
    st = fcc_cu()
    model = build_model(st, params)
    assert model.n_orbitals == 9
    assert model.n_electrons == params.element("Cu").valence_electrons
    assert (model.parameter_set, model.parameter_version) == (params.name, params.version)
    assert model.orthogonal == params.orthogonal
    # the (1,1,0)/√2 nearest-neighbour bond, in either stored direction
    rs = model.real_space_hamiltonian()
    d110 = 3.61 / 2 * np.array([1.0, 1.0, 0.0])
    (b,) = np.flatnonzero(np.all(np.abs(rs.vectors - d110) < 1e-9, axis=1))
    E = rs.hamiltonian[b]
    V = dict(zip(BOND_INTEGRALS, params.hopping("Cu", "Cu", np.array([np.linalg.norm(d110)]))[0]))
    s, x, y, xy, z2 = 0, 1, 2, 4, 8
    assert E[s, xy] == pytest.approx(np.sqrt(3) / 2 * V["sds"], abs=1e-12)
    assert E[x, y] == pytest.approx((V["pps"] - V["ppp"]) / 2, abs=1e-12)
    assert E[xy, xy] == pytest.approx(0.75 * V["dds"] + 0.25 * V["ddd"], abs=1e-12)
    assert E[z2, z2] == pytest.approx(0.25 * V["dds"] + 0.75 * V["ddd"], abs=1e-12)
    frob = (V["sss"] ** 2 + V["sps"] ** 2 + V["pss"] ** 2 + V["sds"] ** 2 + V["dss"] ** 2
            + V["pps"] ** 2 + 2 * V["ppp"] ** 2 + V["pds"] ** 2 + V["dps"] ** 2
            + 2 * V["pdp"] ** 2 + 2 * V["dpp"] ** 2 + V["dds"] ** 2 + 2 * V["ddp"] ** 2
            + 2 * V["ddd"] ** 2)  # fmt: skip
    assert np.sum(E**2) == pytest.approx(frob, rel=1e-12)
    H, S = model.hamiltonian_and_overlap(np.random.default_rng(3).uniform(-1, 1, (20, 3)))
    np.testing.assert_array_equal(H, np.conj(np.swapaxes(H, 1, 2)))
    assert (S is None) == params.orthogonal


@pytest.mark.skipif(
    list_parameter_sets is None or "example-nonorthogonal" not in list_parameter_sets(),
    reason="no non-orthogonal shipped set",
)
def test_shipped_nonorthogonal_set_builds_positive_overlap():
    # S(k) of a physical overlap is positive definite (common practice)
    params = load_parameter_set("example-nonorthogonal")
    symbol = sorted(params.elements)[0]
    el = params.element(symbol)
    from ase.data import atomic_numbers, reference_states

    ref = reference_states[atomic_numbers[symbol]]
    if not ref or ref.get("symmetry") not in ("fcc", "bcc") or "a" not in ref:
        pytest.skip(f"no cubic ASE reference lattice for {symbol}")
    from valband.structure import build_structure

    model = build_model(build_structure(f"{symbol} {ref['symmetry']}"), params)
    assert model.n_orbitals == el.n_orbitals
    H, S = model.hamiltonian_and_overlap(np.random.default_rng(4).uniform(-1, 1, (10, 3)))
    assert S is not None
    assert np.linalg.eigvalsh(S).min() > 0
