"""Distance laws and the smooth cutoff, checked against their closed forms."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import ParameterError
from valband.params import Cutoff, ExponentialLaw, PowerLaw, ShellTable, SplineLaw


def test_power_law_value_at_r0_and_log_log_slope():
    law = PowerLaw(v0=-0.75, r0=2.5, n=3.5)
    assert law(np.array([2.5]))[0] == pytest.approx(-0.75)
    r = np.geomspace(1.5, 6.0, 50)
    # closed form: log|V| = log|v0| + n log r0 − n log r, slope −n on a log-log plot
    slope = np.polyfit(np.log(r), np.log(np.abs(law(r))), 1)[0]
    assert slope == pytest.approx(-3.5, abs=1e-10)


def test_exponential_law_value_at_r0_and_log_slope():
    law = ExponentialLaw(v0=0.4, r0=2.0, q=3.0)
    assert law(np.array([2.0]))[0] == pytest.approx(0.4)
    r = np.linspace(1.5, 5.0, 30)
    # closed form: d log V / dr = −q / r0
    slope = np.polyfit(r, np.log(law(r)), 1)[0]
    assert slope == pytest.approx(-1.5, abs=1e-10)
    assert law(np.array([4.0]))[0] == pytest.approx(0.4 * np.exp(-3.0))


def test_spline_passes_through_nodes_and_reproduces_a_cubic():
    r = (2.0, 2.5, 3.1, 3.6, 4.4)
    v = tuple(0.3 - 0.2 * x + 0.05 * x**2 - 0.01 * x**3 for x in r)
    law = SplineLaw(r=r, v=v)
    np.testing.assert_allclose(law(np.array(r)), v, rtol=0, atol=1e-14)
    # a not-a-knot cubic spline reproduces any cubic polynomial exactly (de Boor, A Practical
    # Guide to Splines, ch. IV; textbook fact)
    x = np.linspace(2.0, 4.4, 37)
    np.testing.assert_allclose(law(x), 0.3 - 0.2 * x + 0.05 * x**2 - 0.01 * x**3, atol=1e-12)


def test_spline_refuses_bonds_shorter_than_its_first_node():
    law = SplineLaw(r=(2.0, 2.5, 3.0, 3.5), v=(1.0, 0.5, 0.25, 0.1), where="f.toml: x")
    with pytest.raises(ParameterError, match="below the first node"):
        law(np.array([1.9]))


def test_shell_table_matches_within_tolerance_only():
    law = ShellTable(tolerance=0.05, shells=((2.55, -0.3), (3.61, -0.05)), where="f.toml: y")
    np.testing.assert_array_equal(law(np.array([2.51, 2.55, 2.59, 3.57, 3.655])),
                                  [-0.3, -0.3, -0.3, -0.05, -0.05])  # fmt: skip
    with pytest.raises(ParameterError, match=r"f\.toml: y: distance 2\.7 Å matches no"):
        law(np.array([2.55, 2.7]))


@pytest.mark.parametrize("taper", ["quintic", "cosine"])
def test_taper_is_one_inside_zero_beyond_and_continuous(taper):
    c = Cutoff(inner=3.0, outer=3.5, taper=taper)
    np.testing.assert_array_equal(c.factor(np.array([1.0, 2.9, 3.0])), 1.0)
    np.testing.assert_array_equal(c.factor(np.array([3.5, 3.5000001, 4.0, 100.0])), 0.0)
    eps = 1e-7
    for edge in (3.0, 3.5):
        lo, hi = c.factor(np.array([edge - eps, edge + eps]))
        assert abs(hi - lo) < 1e-12  # value continuous
        dlo, dhi = c.derivative(np.array([edge - eps, edge + eps]))
        assert abs(dlo) < 1e-5 and abs(dhi) < 1e-5  # first derivative continuous (0 at ends)
    # analytic derivative against a central finite difference inside the window
    r = np.linspace(3.01, 3.49, 25)
    h = 1e-6
    fd = (c.factor(r + h) - c.factor(r - h)) / (2 * h)
    np.testing.assert_allclose(c.derivative(r), fd, atol=1e-7)
    assert np.all(np.diff(c.factor(np.linspace(3.0, 3.5, 101))) <= 0)  # monotonic decrease
    # half-way value: both tapers are symmetric about the window centre, f = 1/2 there
    assert c.factor(np.array([3.25]))[0] == pytest.approx(0.5)


def test_quintic_taper_is_c2_and_cosine_only_c1():
    # closed forms: quintic f″ = −60x + 180x² − 120x³ (per width²) → 0 at both ends;
    # cosine f″ = −(π²/2) cos πx → ∓π²/2 at the ends, so f″ jumps there
    h = 1e-4
    for taper, small in (("quintic", True), ("cosine", False)):
        c = Cutoff(inner=2.0, outer=3.0, taper=taper)
        for r_edge in (2.0 + 1e-3, 3.0 - 1e-3):  # just inside each end of the window
            f = c.factor(np.array([r_edge - h, r_edge, r_edge + h]))
            f2 = (f[0] - 2 * f[1] + f[2]) / h**2
            if small:
                assert abs(f2) < 0.1
            else:
                assert abs(abs(f2) - np.pi**2 / 2) < 0.01
