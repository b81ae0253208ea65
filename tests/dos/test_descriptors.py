"""Band descriptors and the Hilbert-transform upper edge on closed-form densities."""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.dos import BandDescriptors, band_descriptors, hilbert_transform, hilbert_upper_edge

H = 0.001  # grid step, eV


def _semicircle(e, c, w):
    """ρ(E) = (2/(πW²)) √(W² − (E − c)²): unit weight, radius W."""
    x = e - c
    root = np.sqrt(np.clip(w**2 - x**2, 0.0, None))
    return np.where(np.abs(x) < w, 2.0 / (math.pi * w**2) * root, 0.0)


@pytest.fixture
def grid():
    return np.arange(-8.0, 6.0 + H / 2, H)


def test_semicircle_moments(grid):
    # source: moments of the semicircle (Wigner) law, textbook — mean c, variance W²/4,
    # skewness 0, fourth standardised moment 2
    c, w = -1.7, 2.2
    d = band_descriptors(grid, _semicircle(grid, c, w))
    assert d.n_states == pytest.approx(1.0, abs=1e-4)
    assert d.centre == pytest.approx(c, abs=1e-5)
    assert d.width == pytest.approx(w / 2, rel=1e-4)
    assert d.skewness == pytest.approx(0.0, abs=1e-4)
    assert d.kurtosis == pytest.approx(2.0, rel=1e-3)
    assert d.window == (grid[0], grid[-1])


def test_gaussian_kurtosis_is_three(grid):
    # source: textbook — the fourth standardised moment of a normal distribution is 3
    c, s = -2.0, 0.6
    rho = 3.0 * np.exp(-0.5 * ((grid - c) / s) ** 2) / (math.sqrt(2 * math.pi) * s)
    d = band_descriptors(grid, rho, window=(c - 9 * s, c + 9 * s))
    assert d.kurtosis == pytest.approx(3.0, rel=1e-6)
    assert d.skewness == pytest.approx(0.0, abs=1e-8)
    assert d.width == pytest.approx(s, rel=1e-6)
    assert d.n_states == pytest.approx(3.0, rel=1e-8)
    assert d.window == (c - 9 * s, c + 9 * s)


def test_hilbert_transform_of_semicircle(grid):
    # source: closed-form Hilbert transform of the semicircle (textbook, from
    # P∫_{-1}^{1} √(1 − t²)/(x − t) dt = π x for |x| < 1) — with H = (1/π) P∫ ρ/(E − E'):
    # H = 2x/(πW²) inside the band, (2/(πW²))(x − sign(x)√(x² − W²)) outside, x = E − c;
    # its maximum is at c + W
    c, w = -1.0, 2.0
    e, h = hilbert_transform(grid, _semicircle(grid, c, w))
    x = e - c
    inside = np.abs(x) < w - 0.05
    outside = np.abs(x) > w + 0.05
    exact_in = 2 * x[inside] / (math.pi * w**2)
    xo = x[outside]
    exact_out = (2 / (math.pi * w**2)) * (xo - np.sign(xo) * np.sqrt(xo**2 - w**2))
    assert np.max(np.abs(h[inside] - exact_in)) < 2e-4
    assert np.max(np.abs(h[outside] - exact_out)) < 2e-4
    assert hilbert_upper_edge(grid, _semicircle(grid, c, w)) == pytest.approx(c + w, abs=H)


def test_upper_edge_uses_the_window_only(grid):
    c, w = -2.0, 1.5
    rho = _semicircle(grid, c, w) + 5 * _semicircle(grid, 3.0, 0.5)  # a big peak outside
    d = band_descriptors(grid, rho, window=(-4.0, 0.5))
    assert d.upper_edge == pytest.approx(c + w, abs=H)
    assert d.centre == pytest.approx(c, abs=1e-5)
    assert d.n_states == pytest.approx(1.0, abs=1e-4)


def test_filling_of_symmetric_band_at_fermi_level_is_half(grid):
    # source: symmetry — half the states of a band centred at E_F lie below it
    d = band_descriptors(grid, _semicircle(grid, 0.0, 2.5))
    assert d.filling == pytest.approx(0.5, abs=1e-9)
    below = band_descriptors(grid, _semicircle(grid, -4.0, 2.0))
    assert below.filling == pytest.approx(1.0, abs=1e-9)
    above = band_descriptors(grid, _semicircle(grid, 0.0, 2.0), window=(0.5, 3.0))
    assert above.filling == 0.0


def test_to_dict_round_trip(grid):
    d = band_descriptors(grid, _semicircle(grid, -1.0, 2.0))
    out = d.to_dict()
    assert set(out) == {
        "centre", "width", "filling", "skewness", "kurtosis", "upper_edge", "window", "n_states"
    }
    assert out["window"] == [d.window[0], d.window[1]]
    assert BandDescriptors(**{**out, "window": tuple(out["window"])}) == d
