"""KPM against exact diagonalisation (numpy/scipy eigh) of small cells at Γ."""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.linalg

from valband.kpm import KPMSettings, build_sparse, compute_kpm_dos, describe_kpm, kpm_channels
from valband.kpm.chebyshev import scale_factors
from valband.kpm.moments import chebyshev_moments
from valband.kpm.operators import Operator, lanczos_bounds
from valband.tb import build_model
from valband.workflows import describe

GAMMA = np.zeros((1, 3))


def _gauss_dos(grid, levels, weights, width):
    """Σ_ν w_ν G_width(E − E_ν), both spins (the reference curve)."""
    z = (grid[:, None] - levels[None, :]) / width
    return 2.0 * (np.exp(-0.5 * z * z) @ weights) / (width * math.sqrt(2 * math.pi))


def _smooth(grid, curve, width):
    """Convolve a curve on a uniform grid with a normalised Gaussian."""
    h = grid[1] - grid[0]
    k = np.arange(-int(6 * width / h), int(6 * width / h) + 1) * h
    g = np.exp(-0.5 * (k / width) ** 2)
    return np.convolve(curve, g / g.sum(), mode="same")


def test_dos_converges_to_exact_diagonalisation(alloy8, harrison):
    h = build_model(alloy8, harrison).hamiltonian(GAMMA)[0].real
    levels = np.linalg.eigvalsh(h)  # the exact spectrum (LAPACK via numpy)
    sm = build_sparse(alloy8, harrison)
    width = 0.3  # eV, the common smoothing of both curves
    errors = []
    for n in (48, 96, 192, 384, 768):
        dos = compute_kpm_dos(sm, KPMSettings(n_moments=n, trace="exact", step=0.02))
        e = dos.energies + dos.fermi_level
        ref = _gauss_dos(e, levels, np.ones_like(levels), width)
        got = _smooth(e, dos.total, width)
        inner = slice(int(2 / 0.02), -int(2 / 0.02))  # away from the grid ends of the convolution
        errors.append(np.max(np.abs(got - ref)[inner]) / ref.max())
        # sum rule: ∫ DOS = 2 × number of orbitals (both spins), and N(E_F) = electrons
        assert np.trapezoid(dos.total, dos.energies) == pytest.approx(2 * 72, rel=2e-3)
        at_ef = np.interp(0.0, dos.energies, dos.integrated())
        assert at_ef == pytest.approx(sm.n_electrons, abs=0.05 * 2 * 72 / len(dos.energies) + 0.05)
    assert all(b < a for a, b in zip(errors, errors[1:], strict=False)), errors
    assert errors[-1] < 0.02 and errors[-1] < errors[0] / 10, errors


def test_exact_trace_moments_equal_eigenvalue_moments(alloy8, harrison):
    h = build_model(alloy8, harrison).hamiltonian(GAMMA)[0].real
    levels, vecs = np.linalg.eigh(h)
    sm = build_sparse(alloy8, harrison)
    op = Operator(sm.hamiltonian)
    bounds = lanczos_bounds(op, 40, seed=3)
    # Lanczos bounds enclose the spectrum (residual padding)
    assert bounds["emin"] <= levels[0] + 1e-9 and bounds["emax"] >= levels[-1] - 1e-9
    a, b = scale_factors(bounds["emin"], bounds["emax"], 0.05)
    labels, chan, _ = kpm_channels(sm, "site")
    res = chebyshev_moments(op, a, b, 200, chan, len(labels), "exact", 0, 0, 16)
    x = (levels - b) / a
    t = np.cos(np.outer(np.arange(200), np.arccos(x)))  # T_n(x_ν)
    weights = vecs**2  # (orbital, state)
    want = np.stack([(weights[chan == c].sum(axis=0) * t).sum(axis=1)
                     for c in range(len(labels))])
    np.testing.assert_allclose(res.moments, want, rtol=0, atol=1e-9 * 72)


def test_nonorthogonal_ldos_equals_mulliken(cu_slab, nonorthogonal):
    model = build_model(cu_slab, nonorthogonal)
    h, s = (m[0].real for m in model.hamiltonian_and_overlap(GAMMA))
    levels, c = scipy.linalg.eigh(h, s)  # generalised problem, cᵀ S c = 1
    mulliken = c * (s @ c)  # w_iν = c_iν (S c)_iν (Mulliken 1955), rows = orbitals
    sm = build_sparse(cu_slab, nonorthogonal)
    op = Operator(sm.hamiltonian, sm.overlap, cg_tol=1e-13)
    bounds = lanczos_bounds(op, 60, seed=0)
    assert bounds["emin"] <= levels[0] + 1e-8 and bounds["emax"] >= levels[-1] - 1e-8
    a, b = scale_factors(bounds["emin"], bounds["emax"], 0.05)
    labels, chan, _ = kpm_channels(sm, "site")
    res = chebyshev_moments(op, a, b, 120, chan, len(labels), "exact", 0, 0, 20)
    t = np.cos(np.outer(np.arange(120), np.arccos((levels - b) / a)))
    want = np.stack([(mulliken[chan == k].sum(axis=0) * t).sum(axis=1)
                     for k in range(len(labels))])
    np.testing.assert_allclose(res.moments, want, rtol=0, atol=1e-8)
    assert op.stats["cg_max_iterations"] > 1  # the overlap was really inverted


def test_nonorthogonal_dos_converges_and_keeps_counts(cu_slab, nonorthogonal):
    model = build_model(cu_slab, nonorthogonal)
    h, s = (m[0].real for m in model.hamiltonian_and_overlap(GAMMA))
    levels = scipy.linalg.eigvalsh(h, s)
    sm = build_sparse(cu_slab, nonorthogonal)
    dos = compute_kpm_dos(sm, KPMSettings(n_moments=600, trace="exact", resolve="site",
                                          step=0.02))
    e = dos.energies + dos.fermi_level
    ref = _gauss_dos(e, levels, np.ones_like(levels), 0.3)
    got = _smooth(e, dos.total, 0.3)
    inner = slice(100, -100)
    assert np.max(np.abs(got - ref)[inner]) / ref.max() < 0.03
    assert np.trapezoid(dos.total, dos.energies) == pytest.approx(2 * sm.n_orbitals, rel=2e-3)
    # the channels sum to the total, like Mulliken weights
    np.testing.assert_allclose(dos.channels.sum(axis=0), dos.total, rtol=1e-12, atol=1e-12)


def test_describe_works_and_element_channels_match_site_channels(alloy8, harrison):
    sm = build_sparse(alloy8, harrison)
    common = dict(n_moments=400, trace="exact", step=0.02)
    by_site = compute_kpm_dos(sm, KPMSettings(resolve="site", **common))
    by_el = compute_kpm_dos(sm, KPMSettings(resolve="element", **common))
    assert by_el.fermi_level == pytest.approx(by_site.fermi_level, abs=1e-10)
    for el in ("Cu", "Pd"):
        np.testing.assert_allclose(by_el.select(element=el, shell="d"),
                                   by_site.select(element=el, shell="d"), atol=1e-9)
    site_table = describe(by_site, "d", "full")
    el_table = describe_kpm(by_el, "d", "full")
    for el in ("Cu", "Pd"):
        a, b = site_table.elements[el], el_table.elements[el]
        assert b.centre == pytest.approx(a.centre, abs=1e-9)
        assert b.filling == pytest.approx(a.filling, abs=1e-9)
        assert b.n_states == pytest.approx(a.n_states, rel=1e-9)  # per atom after the fix
        assert a.n_states == pytest.approx(10.0, rel=2e-3)  # five d orbitals × 2 spins
    assert el_table.cell.n_states == pytest.approx(site_table.cell.n_states, rel=1e-9)
