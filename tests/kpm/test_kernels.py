"""Numba kernels of the recursion agree with their plain scipy/numpy references."""

from __future__ import annotations

import numba
import numpy as np
import pytest
import scipy.sparse as sp

from valband.kpm import KPMSettings, build_sparse, compute_kpm_dos
from valband.kpm import _kernels as K


def _random_csr(n, density, seed):
    a = sp.random(n, n, density=density, format="csr", random_state=seed)
    return (a + a.T).tocsr()


@pytest.mark.parametrize("n, m, density", [(40, 3, 0.2), (3000, 16, 0.01)])  # serial, parallel
def test_kernels_match_references(n, m, density):
    rng = np.random.default_rng(11)
    a = _random_csr(n, density, 5)
    parts = K._csr_parts(a)
    x = rng.standard_normal((n, m))
    prev = rng.standard_normal((n, m))
    np.testing.assert_allclose(K.csr_matmat(parts, x), K.csr_matmat_reference(a, x),
                               rtol=1e-13, atol=1e-13)
    want = K.chebyshev_step_reference(a, 0.07, -0.3, x, prev)
    got = K.chebyshev_step(parts, 0.07, -0.3, x, prev.copy())
    np.testing.assert_allclose(got, want, rtol=1e-13, atol=1e-13)
    chan = rng.integers(0, 7, n)
    np.testing.assert_allclose(K.channel_dots(x, prev, chan, 7),
                               K.channel_dots_reference(x, prev, chan, 7), rtol=1e-12, atol=1e-12)


def test_whole_kpm_numba_equals_scipy_backend(alloy8, nonorthogonal, cu_slab, harrison):
    for st, params in ((alloy8, harrison), (cu_slab, nonorthogonal)):
        sm = build_sparse(st, params)
        base = dict(resolution=0.3, trace="stochastic", n_vectors=3, seed=4)
        a = compute_kpm_dos(sm, KPMSettings(**base, backend="numba"))
        b = compute_kpm_dos(sm, KPMSettings(**base, backend="scipy"))
        np.testing.assert_allclose(a.channels, b.channels, rtol=1e-9, atol=1e-9)
        assert a.fermi_level == pytest.approx(b.fermi_level, abs=1e-8)


def test_bitwise_independent_of_thread_count(alloy8, harrison):
    sm = build_sparse(alloy8.repeat((2, 2, 2)), harrison)  # large enough for parallel kernels
    s = KPMSettings(resolution=0.5, trace="stochastic", n_vectors=4, seed=1)
    before = numba.get_num_threads()
    try:
        numba.set_num_threads(1)
        one = compute_kpm_dos(sm, s)
        numba.set_num_threads(numba.config.NUMBA_NUM_THREADS)
        many = compute_kpm_dos(sm, s)
    finally:
        numba.set_num_threads(before)
    np.testing.assert_array_equal(one.channels, many.channels)
