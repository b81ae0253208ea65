"""Homogeneous strain: uniform, biaxial (with Poisson relaxation), full tensor."""

from __future__ import annotations

import numpy as np
import pytest
from ase.build import bulk

from valband.errors import StructureError
from valband.structure import Structure, build_structure, find_neighbours
from valband.structure.strain import (
    apply_strain,
    biaxial_strain_tensor,
    poisson_perpendicular_strain,
    strain_tensor,
)

A = 3.61


@pytest.fixture(scope="module")
def cube():
    # conventional 4-site fcc cube (ASE builder), edges along x, y, z
    return Structure.from_atoms(bulk("Cu", "fcc", a=A, cubic=True), source="Cu cube")


@pytest.mark.parametrize("eps", [-0.03, 0.01, 0.2])
def test_uniform_strain_scales_lengths_and_volume(cube, eps):
    # Geometry: every length × (1 + ε), the volume × (1 + ε)³; fractional coordinates fixed.
    st = apply_strain(cube, eps)
    assert st.volume == pytest.approx(cube.volume * (1 + eps) ** 3, rel=1e-12)
    np.testing.assert_allclose(st.scaled_positions, cube.scaled_positions, atol=1e-12)
    d0 = find_neighbours(cube, A / np.sqrt(2) * 1.01).distances
    d1 = find_neighbours(st, A / np.sqrt(2) * (1 + eps) * 1.01).distances
    np.testing.assert_allclose(d1, d0 * (1 + eps), rtol=1e-12)
    assert f"strained(uniform {eps:g})" in st.source
    assert st.labels == cube.labels


def test_biaxial_without_relaxation(cube):
    # In-plane (xy) lengths × (1 + ε), the z edge unchanged, volume × (1 + ε)² (geometry).
    eps = -0.02
    st = apply_strain(cube, eps, axis="z")
    np.testing.assert_allclose(np.linalg.norm(st.cell, axis=1), [A * (1 + eps)] * 2 + [A])
    assert st.volume == pytest.approx(cube.volume * (1 + eps) ** 2, rel=1e-12)


@pytest.mark.parametrize(("eps", "nu"), [(-0.02, 0.3), (0.015, 0.39), (0.01, 0.0)])
def test_biaxial_with_poisson_relaxation(cube, eps, nu):
    # Linear elasticity, biaxial stress (σ_zz = 0), isotropic: ε_zz = −2ν/(1 − ν)·ε (textbook).
    st = apply_strain(cube, eps, axis="z", poisson=nu)
    perp = np.linalg.norm(st.cell[2]) / A - 1
    assert perp == pytest.approx(-2 * nu / (1 - nu) * eps, rel=1e-12, abs=1e-15)
    assert poisson_perpendicular_strain(eps, nu) == pytest.approx(perp, rel=1e-12, abs=1e-15)
    assert st.volume == pytest.approx(cube.volume * (1 + eps) ** 2 * (1 + perp), rel=1e-12)


def test_biaxial_about_a_general_axis():
    # Strain ⟂ n leaves lengths along n unchanged and stretches perpendicular ones by 1 + ε.
    n = np.array([1.0, 1.0, 1.0]) / np.sqrt(3)
    eps = biaxial_strain_tensor(0.03, n)
    np.testing.assert_allclose((np.eye(3) + eps) @ n, n, atol=1e-15)
    t = np.array([1.0, -1.0, 0.0]) / np.sqrt(2)
    np.testing.assert_allclose((np.eye(3) + eps) @ t, 1.03 * t, atol=1e-15)


def test_tensor_strain_matches_ase_scaled_cell(cube):
    # ASE (general-purpose library): set_cell(new, scale_atoms=True) keeps fractional
    # coordinates, which is what a homogeneous strain does.
    eps = np.array([[0.01, 0.004, 0.0], [0.004, -0.02, 0.003], [0.0, 0.003, 0.015]])
    st = apply_strain(cube, eps)
    atoms = cube.to_atoms()
    atoms.set_cell(cube.cell @ (np.eye(3) + eps).T, scale_atoms=True)
    np.testing.assert_allclose(st.cell, atoms.cell[:], atol=1e-12)
    np.testing.assert_allclose(st.positions, atoms.positions, atol=1e-12)
    assert st.volume == pytest.approx(cube.volume * np.linalg.det(np.eye(3) + eps), rel=1e-12)
    assert "strained(tensor" in st.source


def test_primitive_and_conventional_cells_strain_alike():
    # A strain acts on space, not on a basis: the nearest-neighbour distance set of the
    # primitive fcc cell equals that of the conventional cube after the same strain.
    eps = biaxial_strain_tensor(0.02, "x", poisson=0.34)
    prim = apply_strain(build_structure(f"Cu fcc {A}"), eps)
    conv = apply_strain(Structure.from_atoms(bulk("Cu", "fcc", a=A, cubic=True)), eps)
    dp = np.unique(np.round(find_neighbours(prim, 2.7).distances, 9))
    dc = np.unique(np.round(find_neighbours(conv, 2.7).distances, 9))
    np.testing.assert_allclose(dp, dc)


@pytest.mark.parametrize(
    ("strain", "kwargs", "match"),
    [
        (-1.0, {}, "≤ −1"),
        (-1.5, {}, "≤ −1"),
        (float("nan"), {}, "not finite"),
        (float("inf"), {}, "not finite"),
        ("abc", {}, "not a number"),
        (1.0, {}, "beyond"),
        (-1.0, {"axis": "z"}, "≤ −1"),
        (0.01, {"axis": "w"}, "axis"),
        (0.01, {"axis": [0, 0, 0]}, "axis"),
        (0.01, {"axis": "z", "poisson": 0.6}, "Poisson"),
        (0.01, {"poisson": 0.3}, "needs the axis"),
        (np.diag([0.01, 0.02, 0.03]), {"axis": "z"}, "scalar"),
        (np.array([[0, 0.01, 0], [0, 0, 0], [0, 0, 0]]), {}, "not symmetric"),
        (np.diag([-1.0, 0.0, 0.0]), {}, "principal strain"),
        (np.zeros((2, 2)), {}, "3×3"),
        (np.diag([np.nan, 0, 0]), {}, "NaN"),
    ],
)
def test_bad_strain_is_rejected(cube, strain, kwargs, match):
    with pytest.raises(StructureError, match=match):
        apply_strain(cube, strain, **kwargs)


def test_strain_tensor_of_a_scalar_is_isotropic():
    np.testing.assert_array_equal(strain_tensor(0.01), 0.01 * np.eye(3))
