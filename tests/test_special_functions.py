"""The special functions written with numpy alone (groundcheck.physics.special_functions), checked
against scipy.special — an implementation independent of ours (Cephes/AMOS) — over the whole range
the analyses use. scipy is imported here only, never by the package for these functions."""

import math

import numpy as np
import pytest
from scipy import special

from groundcheck.language.phrases import RANGES
from groundcheck.physics.impedance import MATERIALS, MU0, skin_ratio
from groundcheck.physics.special_functions import SERIES_LIMIT, bessel_skin_ratio, ellipe, ellipk


def _largest_x() -> float:
    """r/δ of the thickest round wire the plan language accepts, of the least resistive material
    at the coldest accepted temperature (−200 °C), at the highest frequency accepted."""
    radius = math.sqrt(RANGES["area"][1] / math.pi)
    rho = min(r20 * (1 + alpha * (-200 - 20)) for r20, alpha, _ in MATERIALS.values())
    delta = math.sqrt(max(rho, 1e-10) / (math.pi * RANGES["frequency"][1] * MU0))
    return radius / delta


def test_bessel_skin_ratio_matches_scipy_over_the_range_used():
    top = 2 * _largest_x()
    assert top > 1000  # the range reaches far into the asymptotic form
    x = np.concatenate(
        [np.geomspace(1e-4, top, 4000), SERIES_LIMIT * (1 + np.array([-1e-9, 0.0, 1e-9]))]
    )
    kr = (1 - 1j) * x
    expected = (
        (kr / 2) * special.jve(0, kr) / special.jve(1, kr)
    )  # exponentially scaled: finite for all x
    got = bessel_skin_ratio(x)
    assert np.max(np.abs(got - expected) / np.abs(expected)) < 1e-9
    assert np.max(np.abs(got.real - expected.real) / expected.real) < 1e-9


def test_skin_ratio_limits_worked_by_hand():
    # a thin wire at low frequency: R_ac = R_dc; a thick one: r/(2δ) + 1/4 (Ramo, Whinnery, Van
    # Duzer §5.6)
    rho = 1.7241e-8
    delta = math.sqrt(rho / (math.pi * 1e6 * MU0))
    assert skin_ratio(1e-7, rho, 50.0) == 1.0
    assert skin_ratio(500 * delta, rho, 1e6) == pytest.approx(250 + 0.25, rel=1e-5)
    # the first terms of the series by hand: with w = j x²/2, Re(S0/S1) = 1 + x⁴/48 − … for small x
    x = 0.05
    assert float(np.real(bessel_skin_ratio(np.array([x]))[0])) == pytest.approx(
        1 + x**4 / 48, rel=1e-9
    )


def test_elliptic_integrals_match_scipy():
    m = np.concatenate([[0.0], np.geomspace(1e-12, 0.5, 500), 1 - np.geomspace(1e-15, 0.5, 500)])
    assert np.max(np.abs(ellipk(m) / special.ellipk(m) - 1)) < 1e-12
    assert np.max(np.abs(ellipe(m) / special.ellipe(m) - 1)) < 1e-12
    # K(0) = E(0) = π/2 (Abramowitz and Stegun 17.3)
    assert float(ellipk(0.0)) == pytest.approx(math.pi / 2, rel=1e-15)
    assert float(ellipe(0.0)) == pytest.approx(math.pi / 2, rel=1e-15)
