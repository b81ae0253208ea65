"""Bad input raises SettingsError naming the problem (source: common practice — the
project's error policy; the physical constraints are those of the method)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.dos.models import reciprocal
from valband.dos import (
    band_descriptors,
    hilbert_upper_edge,
    smearing_count,
    smearing_dos,
    tetrahedron_count,
    tetrahedron_dos,
)
from valband.errors import SettingsError

EIG = np.array([[-1.0, 0.5], [0.0, 1.0]])
W = np.array([0.5, 0.5])
E = np.linspace(-3, 3, 61)
RC = reciprocal(np.eye(3) * 3.0)
MESH = (2, 2, 2)
EIG_IR = np.arange(16, dtype=float).reshape(8, 2) / 8.0
IRMAP = np.arange(8)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"width": 0.0}, "width must be a finite number > 0"),
        ({"width": -0.1}, "width must be a finite number > 0"),
        ({"width": math.nan}, "width must be a finite number > 0"),
        ({"kind": "voigt"}, "smearing kind must be one of"),
        ({"energies": np.array([0.0, 0.1, 0.3])}, "uniform grid"),
        ({"energies": E[::-1]}, "strictly ascending"),
        ({"energies": np.array([1.0])}, "at least 2"),
        ({"eigenvalues": np.array([[np.nan, 0.0], [0.0, 1.0]])}, "NaN or infinite"),
        ({"eigenvalues": np.zeros(4)}, r"shape \(nk, nb\)"),
        ({"k_weights": np.array([0.5, 0.4])}, "sum to 1"),
        ({"k_weights": np.array([1.5, -0.5])}, "non-negative"),
        ({"k_weights": np.array([1.0])}, r"k_weights must have shape \(nk,\)"),
        (
            {"channel_weights": np.ones((2, 3, 1))},
            r"channel_weights must have shape \(nk, nb, nch\)",
        ),
        ({"degeneracy": 0}, "degeneracy"),
    ],
)
def test_smearing_dos_rejects(kwargs, match):
    args = {"eigenvalues": EIG, "k_weights": W, "energies": E, "width": 0.1}
    args.update(kwargs)
    with pytest.raises(SettingsError, match=match):
        smearing_dos(**args)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"width": 0.0}, "width"),
        ({"energy": math.nan}, "NaN"),
        ({"k_weights": np.array([0.7, 0.7])}, "sum to 1"),
    ],
)
def test_smearing_count_rejects(kwargs, match):
    args = {"eigenvalues": EIG, "k_weights": W, "energy": 0.0, "width": 0.1}
    args.update(kwargs)
    with pytest.raises(SettingsError, match=match):
        smearing_count(**args)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"mesh": (2, 2)}, "mesh must be three positive integers"),
        ({"mesh": (2, 0, 2)}, "mesh must be three positive integers"),
        ({"mesh": (2.5, 2, 2)}, "mesh must be three positive integers"),
        ({"reciprocal_cell": np.eye(2)}, r"reciprocal_cell must have shape \(3, 3\)"),
        ({"reciprocal_cell": np.zeros((3, 3))}, "singular"),
        ({"ir_map": np.arange(7)}, r"ir_map must have shape \(nfull,\)"),
        ({"ir_map": np.arange(8) + 1}, r"ir_map entries must lie in \[0, 8\)"),
        ({"ir_map": np.arange(8.0)}, "ir_map must hold integers"),
        ({"eig_ir": np.full((8, 2), np.nan)}, "eig_ir contains"),
        ({"energies": np.array([0.0, 0.2, 0.3])}, "uniform grid"),
        ({"channel_weights_ir": np.ones((8, 1, 2))}, "channel_weights_ir must have shape"),
    ],
)
def test_tetrahedron_dos_rejects(kwargs, match):
    args = {"mesh": MESH, "reciprocal_cell": RC, "ir_map": IRMAP, "eig_ir": EIG_IR, "energies": E}
    args.update(kwargs)
    with pytest.raises(SettingsError, match=match):
        tetrahedron_dos(**args)


def test_tetrahedron_count_rejects_nan_energy():
    with pytest.raises(SettingsError, match="energy must not be NaN"):
        tetrahedron_count(MESH, RC, IRMAP, EIG_IR, math.nan)


@pytest.mark.parametrize(
    "window, match",
    [
        ((1.0, 1.0), "emin < emax"),
        ((2.0, -1.0), "emin < emax"),
        ((-5.0, 1.0), "outside the energy grid"),
        ((-1.0, 3.5), "outside the energy grid"),
        ((math.nan, 1.0), "finite"),
        ((0.0, 0.05), "at least 3 are needed"),
    ],
)
def test_descriptor_window_rejects(window, match):
    rho = np.exp(-(E**2))
    with pytest.raises(SettingsError, match=match):
        band_descriptors(E, rho, window=window)


def test_descriptors_reject_bad_dos():
    with pytest.raises(SettingsError, match=r"dos must have shape \(ne,\)"):
        band_descriptors(E, np.ones(5))
    with pytest.raises(SettingsError, match="no states"):
        band_descriptors(E, np.zeros_like(E))
    with pytest.raises(SettingsError, match="uniform grid"):
        hilbert_upper_edge(np.array([0.0, 0.1, 0.3, 0.4]), np.ones(4))
