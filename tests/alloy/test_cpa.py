"""Coherent potential approximation: limits, sum rules, split band, weak disorder, supercells."""

from __future__ import annotations

import numpy as np
import pytest

from valband.alloy import CPASettings, cpa_solve, vca_model
from valband.alloy._cpa_kernels import local_green_numba, local_green_numpy
from valband.alloy.components import component_onsite
from valband.alloy.cpa import iterate_cpa
from valband.alloy.orbital_symmetry import site_symmetriser
from valband.dos import smearing_dos
from valband.errors import CalculationError, ParameterError, SettingsError, StructureError
from valband.kspace import make_mesh
from valband.params import load_parameter_set
from valband.solve import diagonalise
from valband.structure import build_structure
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos, describe

from .models import model_alloy_set

ETA = 0.1


def lorentz(mesh=8, kind="gamma", step=0.05, eta=ETA, **kw):
    return DOSSettings(mesh=mesh, mesh_kind=kind, method="lorentzian", width=eta, step=step, **kw)


def test_kernel_numba_matches_numpy_reference():
    # rule 7: the compiled Gauss–Jordan k-sum against batched numpy.linalg.inv, random input
    rng = np.random.default_rng(7)
    nk, n, nz = 13, 9, 11
    w = rng.normal(size=(nk, n, n)) + 1j * rng.normal(size=(nk, n, n))
    w = w + np.conj(np.swapaxes(w, 1, 2))
    wk = rng.random(nk)
    wk /= wk.sum()
    z = rng.normal(size=nz) * 3 + 0.05j
    sig = 0.3 * rng.normal(size=(nz, n, n)) - 0.2j * np.eye(n)
    a = local_green_numba(w, wk, z, sig)
    b = local_green_numpy(w, wk, z, sig)
    assert np.abs(a - b).max() < 1e-11 * np.abs(b).max()


@pytest.mark.parametrize("x_pd", [0.0, 1.0])
def test_pure_limits_are_exact(harrison, x_pd):
    # x = 0 and x = 1: the CPA must be the pure metal (exact limit, Soven 1967): Σ = ε_pure,
    # and the DOS the Lorentzian-broadened DOS of the pure crystal on the same mesh.
    st = build_structure("Cu fcc 3.75")
    s = lorentz(step=0.05)
    res = cpa_solve(st, {"Cu": 1.0 - x_pd, "Pd": x_pd}, harrison, s)
    pure_el = "Pd" if x_pd == 1.0 else "Cu"
    pure = build_model(build_structure(f"{pure_el} fcc 3.75"), harrison)
    eps = component_onsite({pure_el: 1.0}, harrison, ("s", "p", "d"))[0]
    assert np.abs(res.sigma[:, 0] - np.diag(eps)).max() < 1e-9
    km = make_mesh(st, 8, kind="gamma")
    eig, _ = diagonalise(pure, km.kpoints)
    ref, _ = smearing_dos(eig, km.weights, res.energies + res.fermi_level, ETA, "lorentzian")
    assert np.abs(res.dos.total - ref).max() < 1e-8 * ref.max()
    # E_F: the CPA count integrates the grid (trapezoid, step = η/2) plus the analytic tail;
    # compute_dos counts analytically: agreement to a few meV
    ref_ef = compute_dos(pure, lorentz(step=0.05)).fermi_level
    assert res.fermi_level == pytest.approx(ref_ef, abs=3e-3)


def test_identical_components_cpa_equals_vca_equals_pure(fcc):
    # two components with the same parameters: CPA = VCA = pure metal (exact; issue 6)
    ps = model_alloy_set(0.0, valence_b=11.0)
    s = lorentz(step=0.05)
    res = cpa_solve(fcc, {"Cu": 0.4, "Ni": 0.6}, ps, s)
    pure = compute_dos(build_model(fcc, ps), s)
    vca = compute_dos(vca_model(fcc, {"Cu": 0.4, "Ni": 0.6}, ps), s)
    assert res.fermi_level == pytest.approx(pure.fermi_level, abs=3e-3)
    assert vca.fermi_level == pytest.approx(pure.fermi_level, abs=1e-9)
    d_cpa, d_pure = describe(res.dos, "d").cell, describe(pure, "d").cell
    assert d_cpa.centre == pytest.approx(d_pure.centre, abs=5e-3)
    assert d_cpa.filling == pytest.approx(d_pure.filling, abs=1e-3)
    assert np.abs(res.sigma[:, 0] - np.diag(np.diag(res.sigma[0, 0]))).max() < 1e-9


def test_sum_rules_and_cpa_condition(fcc):
    # the component curves x_a ρ_a add up to the medium's −(2/π) Im Tr G (CPA condition
    # Σ_a x_a G_a = G, Soven 1967), and each component's count over all energies is its 18
    # states (impurity Green function normalisation); the electrons add up to the total
    ps = model_alloy_set(1.5, ds=0.5, dp=0.5, valence_b=10.0)
    res = cpa_solve(fcc, {"Cu": 0.3, "Ni": 0.7}, ps, lorentz(step=0.05))
    assert np.abs(res.dos.total - res.medium_dos).max() < 1e-4 * res.dos.total.max()
    n = res.component_electrons
    assert 0.3 * n["Cu"] + 0.7 * n["Ni"] == pytest.approx(0.3 * 11 + 0.7 * 10, abs=1e-6)
    e = res.energies
    for el, rho in res.component_dos.items():
        inside = np.trapezoid(rho.sum(axis=(0, 1)), e)
        # Lorentzian tails beyond both grid ends: Σ_states (1/π)(η/d) with d ≥ the padding
        assert 18.0 - 0.5 < inside < 18.0, el


@pytest.mark.parametrize("x", [0.25, 0.5])
def test_split_band_limit(fcc, x):
    # onsite difference (40 eV) ≫ bandwidth (hoppings scaled by 0.2: ~6 eV): the DOS splits
    # into two sub-bands holding x and 1 − x of the states, each made of one component's
    # states (Velický, Kirkpatrick & Ehrenreich, Phys. Rev. 175, 747 (1968), Sec. IV)
    ps = model_alloy_set(40.0, ds=40.0, dp=40.0, scale=0.2, valence_b=11.0)
    res = cpa_solve(fcc, {"Cu": 1.0 - x, "Ni": x}, ps, lorentz(step=0.05))
    e = res.energies + res.fermi_level
    gap_mid = 15.0  # eV: Cu levels −5.5 … −1.2, the shifted ones 34.5 … 38.8
    low, high = e < gap_mid, e >= gap_mid
    tot = res.dos.total
    n_low, n_high = np.trapezoid(tot[low], e[low]), np.trapezoid(tot[high], e[high])
    assert n_low / (n_low + n_high) == pytest.approx(1.0 - x, abs=0.005)
    ni = res.component_dos["Ni"].sum(axis=(0, 1))
    assert np.trapezoid(ni[low], e[low]) / np.trapezoid(ni, e) < 0.005
    assert res.iterations.max() <= 200


def test_weak_disorder_second_order(fcc, harrison):
    # Σ = ε̄ + x(1−x) Δ G Δ + O(Δ³) (Velický, Kirkpatrick & Ehrenreich 1968, Eq. (3.14) in
    # their single-band form; here Δ = ε_A − ε_B per orbital, G the VCA local Green function):
    # VCA equals CPA to first order in the disorder
    km = make_mesh(fcc, 8, kind="gamma")
    sym = site_symmetriser(fcc, ("s", "p", "d"), km)
    z = np.linspace(-9.0, 0.0, 7) + 0.3j
    x = np.array([0.3, 0.7])
    errors = []
    for delta in (0.1, 0.05):
        ps = model_alloy_set(delta, ds=delta / 2, dp=delta / 2, valence_b=10.0)
        comp = {"Cu": 0.3, "Ni": 0.7}
        model = vca_model(fcc, comp, ps)
        w = model.hamiltonian(km.kpoints) - np.diag(model.onsite)[None]
        eps = component_onsite(comp, ps, ("s", "p", "d"))
        sol = iterate_cpa(w, km.weights, z, eps, x, 1, symmetrise=sym, tol=1e-12)
        dd = eps[0] - eps[1]
        gv = local_green_numba(w, km.weights, z, np.broadcast_to(np.diag(x @ eps), (7, 9, 9)))
        gv = sym(gv)
        second = 0.3 * 0.7 * dd[:, None] * gv * dd[None, :]
        dev = sol["sigma"][:, 0] - np.diag(x @ eps) - second
        errors.append(np.abs(dev).max() / np.abs(second).max())
    assert errors[0] < 0.1
    assert errors[1] / errors[0] == pytest.approx(0.5, abs=0.15)  # next order is Δ³: ∝ Δ


def test_wedge_equals_full_mesh(harrison):
    # the point-group-symmetrised wedge sum equals the full-mesh sum (exact; a shifted fcc
    # mesh keeps only 12 rotations, a Γ-centred one all 48)
    st = build_structure("Cu fcc 3.75")
    comp = {"Cu": 0.5, "Pd": 0.5}
    for kind in ("monkhorst-pack", "gamma"):
        a = cpa_solve(st, comp, harrison, lorentz(mesh=6, kind=kind, step=0.1, resolve="m"))
        b = cpa_solve(st, comp, harrison,
                      lorentz(mesh=6, kind=kind, step=0.1, resolve="m", symmetry=False))
        assert a.report["k_sum"].startswith("irreducible")
        assert np.abs(a.dos.channels - b.dos.channels).max() < 1e-10
    # cubic site: Σ diagonal, s, p (3), t2g (3), eg (2) channels
    sig = a.sigma[len(a.sigma) // 2, 0]
    assert np.abs(sig - np.diag(np.diag(sig))).max() < 1e-12
    d = np.diag(sig)
    assert np.ptp(d[1:4]) < 1e-12 and np.ptp(d[4:7]) < 1e-12 and np.ptp(d[7:9]) < 1e-12
    assert abs(d[4] - d[7]) > 1e-4  # t2g ≠ eg


def test_cpa_agrees_with_supercell_average(fcc):
    # two independent methods (common practice: CPA is accurate for moderate diagonal
    # disorder): model alloy with a 1 eV d-level difference (bandwidth ~3.5 eV), CPA against
    # 64-atom random supercells at Γ, 3 configurations. Descriptors in the window (−6, 1) eV,
    # which cuts the sp band, so the centres test the d-band shape, not only the first
    # moment (which the moments theorem fixes in both). Measured: centres within 0.006 eV,
    # fillings within 0.02, E_F within 0.002 eV; tolerances 0.05 eV, 0.03, 0.03 eV.
    from valband.alloy import configuration_average
    from valband.structure import compact_supercell_matrix

    ps = model_alloy_set(1.0, ds=0.5, dp=0.5, valence_b=10.0)
    comp = {"Cu": 0.5, "Ni": 0.5}
    s = lorentz(mesh=10, step=0.05, eta=0.15)
    win = (-6.0, 1.0)
    cpa = cpa_solve(fcc, comp, ps, s)
    avg = configuration_average(
        fcc, comp, ps, compact_supercell_matrix(fcc, 64), n_configs=3, seed=5,
        settings=lorentz(mesh=1, step=0.05, eta=0.15), window=win,
    )
    dc = describe(cpa.dos, "d", win).elements
    ds = avg.mean_descriptors.elements
    for el in ("Cu", "Ni"):
        assert dc[el].centre == pytest.approx(ds[el].centre, abs=0.05), el
        assert dc[el].filling == pytest.approx(ds[el].filling, abs=0.03), el
    assert cpa.fermi_level == pytest.approx(avg.statistics["fermi_level_eV"]["mean"], abs=0.03)


def test_bad_input(fcc, harrison):
    with pytest.raises(StructureError, match="sum to"):
        cpa_solve(fcc, {"Cu": 0.5, "Pd": 0.4}, harrison, lorentz())
    with pytest.raises(StructureError, match="unknown element"):
        cpa_solve(fcc, {"Cu": 0.5, "Qq": 0.5}, harrison, lorentz())
    with pytest.raises(SettingsError, match="lorentzian"):
        cpa_solve(fcc, {"Cu": 0.5, "Pd": 0.5}, harrison, DOSSettings(mesh=4))
    with pytest.raises(ParameterError, match="different valence shells"):
        cpa_solve(fcc, {"Cu": 0.5, "Al": 0.5}, harrison, lorentz())
    nonorth = load_parameter_set("example-nonorthogonal")
    el = sorted(nonorth.elements)
    with pytest.raises(ParameterError, match="non-orthogonal"):
        cpa_solve(build_structure(f"{el[0]} fcc"), {el[0]: 1.0}, nonorth, lorentz())
    with pytest.raises(SettingsError, match="mixing"):
        cpa_solve(fcc, {"Cu": 0.5, "Pd": 0.5}, harrison, lorentz(), CPASettings(mixing=0))


def test_non_convergence_raises(fcc, harrison):
    with pytest.raises(CalculationError, match="did not converge.*worst at E"):
        cpa_solve(fcc, {"Cu": 0.5, "Pd": 0.5}, harrison, lorentz(mesh=4, step=0.2),
                  CPASettings(max_iter=1))


def test_scan_component_centres_follow_the_moments_theorem(harrison):
    # the first moment of a component's DOS is its onsite level (G_a = [Ω − ε_a]⁻¹ with
    # Ω(z) = z + O(1/z): moments theorem, exact in CPA), so over the whole grid each component's
    # d-band centre is ε_d(a) − E_F, also for x = 0 (a single impurity in the other metal);
    # the Lorentzian tails cut by the finite grid shift it by ≲ 0.05 eV (measured ≤ 0.03)
    from valband.alloy import binary_compositions, cpa_scan

    st = build_structure("Cu fcc 3.75")
    scan = cpa_scan(st, binary_compositions("Cu", "Pd", [0.0, 0.5, 1.0]), harrison,
                    lorentz(mesh=6, step=0.05))
    eps_d = {"Cu": -5.504102, "Pd": -4.3}  # harrison-universal onsite d energies (eV)
    for row in scan.rows:
        for el, d in row["components"].items():
            assert d["centre"] == pytest.approx(eps_d[el] - row["fermi_level_eV"], abs=0.05)
    assert scan.rows[0]["electrons_per_atom"]["Cu"] == pytest.approx(11.0, abs=1e-6)


def test_numpy_kernel_gives_the_same_cpa(harrison):
    # rule 7 end to end: the whole self-consistency with the numpy reference kernel
    st = build_structure("Cu fcc 3.75")
    s = lorentz(mesh=4, step=0.2)
    a = cpa_solve(st, {"Cu": 0.5, "Pd": 0.5}, harrison, s)
    b = cpa_solve(st, {"Cu": 0.5, "Pd": 0.5}, harrison, s, CPASettings(kernel="numpy"))
    assert a.fermi_level == pytest.approx(b.fermi_level, abs=1e-9)
    assert np.abs(a.dos.channels - b.dos.channels).max() < 1e-8
