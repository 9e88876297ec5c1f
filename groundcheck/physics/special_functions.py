"""Special functions the analyses need, in numpy alone: the Bessel-function ratio of a round wire's skin
effect and the complete elliptic integrals of a circular loop's field.

Written here rather than taken from ``scipy.special``, whose import costs more start-up time than every
plan of usual size spends in these functions; ``tests/test_special_functions.py`` checks each against
``scipy.special`` over the whole range the analyses use.
"""

from __future__ import annotations

import numpy as np

__all__ = ["bessel_skin_ratio", "SERIES_LIMIT", "ellipk", "ellipe"]

#: x = r/δ from which Hankel's expansion is used: its neglected second exponential is e^(−2x) ≈ 7e-13
#: there, and the power series' cancellation below it costs at most a factor e^((√2 − 1)x) ≈ 330
SERIES_LIMIT = 14.0


def bessel_skin_ratio(x):
    """(k·r/2) · J₀(k·r) / J₁(k·r) for k·r = (1 − j)·x, complex, for x = r/δ > 0 (a numpy array).

    Below :data:`SERIES_LIMIT` the power series: with w = −(k·r/2)² = j·x²/2,
    J₀ = Σ wⁿ/(n!)² and J₁ = (k·r/2) Σ wⁿ/(n!(n+1)!), so the ratio is the quotient of the two sums.
    Above it Hankel's expansion: Im(k·r) < 0, so H⁽¹⁾ dominates J = (H⁽¹⁾ + H⁽²⁾)/2 and
    J₀/J₁ = j·P₀/P₁ with P_ν = Σ jⁿ aₙ(ν)/(k·r)ⁿ, aₙ(ν) = (4ν² − 1²)(4ν² − 3²)…(4ν² − (2n−1)²)/(n! 8ⁿ).

    Parameters:
        x: r/δ, dimensionless.
    Returns:
        the complex ratio Z_int / R_dc.
    References:
        M. Abramowitz, I. Stegun, *Handbook of Mathematical Functions*, 9.1.10 (series) and 9.2.7, 9.2.8
        (Hankel's asymptotic expansions); NIST DLMF 10.8.1 and 10.17.
    """
    x = np.asarray(x, dtype=float)
    out = np.empty(x.shape, dtype=complex)
    low = x < SERIES_LIMIT
    out[low] = _series_ratio(x[low])
    out[~low] = _hankel_ratio(x[~low])
    return out


def _series_ratio(x: np.ndarray) -> np.ndarray:
    w = 0.5j * x * x
    t0 = np.ones(x.shape, dtype=complex)        # wⁿ/(n!)²
    t1 = np.ones(x.shape, dtype=complex)        # wⁿ/(n!(n+1)!)
    s0, s1 = t0.copy(), t1.copy()
    for n in range(1, 70):                      # |w| < 98: the terms fall below 1e-17 of the sum by n = 70
        t0 = t0 * w / (n * n)
        t1 = t1 * w / (n * (n + 1))
        s0 += t0
        s1 += t1
    return s0 / s1


def _hankel_ratio(x: np.ndarray) -> np.ndarray:
    z = (1 - 1j) * x
    p0 = np.ones(x.shape, dtype=complex)
    p1 = np.ones(x.shape, dtype=complex)
    a0 = a1 = 1.0
    term = np.ones(x.shape, dtype=complex)
    for n in range(1, 25):                      # |z| ≥ 19.8: the 24th term is below 1e-16
        a0 *= (0.0 - (2 * n - 1) ** 2) / (8 * n)
        a1 *= (4.0 - (2 * n - 1) ** 2) / (8 * n)
        term = term * 1j / z
        p0 += a0 * term
        p1 += a1 * term
    return (z / 2) * 1j * p0 / p1


def _agm(m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(AGM(1, √(1 − m)), Σ 2ⁿ⁻¹ cₙ²) of the arithmetic-geometric mean, for K and E."""
    a = np.ones_like(m)
    b = np.sqrt(1.0 - m)
    c2 = m.copy()                               # c₀² = m
    total = 0.5 * c2
    power = 0.5
    for _ in range(60):                         # converges quadratically: 6 steps at m = 1 − 1e-15
        a, b, c = 0.5 * (a + b), np.sqrt(a * b), 0.5 * (a - b)
        power *= 2.0
        total = total + power * c * c
        if np.all(np.abs(c) <= 1e-17 * a):
            break
    return a, total


def ellipk(m):
    """The complete elliptic integral of the first kind K(m), parameter m = k² in [0, 1).

    K(m) = π / (2 · AGM(1, √(1 − m))).

    Parameters:
        m: the parameter, dimensionless (numpy array or float).
    Returns:
        K(m).
    References:
        M. Abramowitz, I. Stegun, *Handbook of Mathematical Functions*, 17.6 (the arithmetic-geometric mean).
    """
    m = np.asarray(m, dtype=float)
    a, _ = _agm(m)
    return np.pi / (2.0 * a)


def ellipe(m):
    """The complete elliptic integral of the second kind E(m), parameter m = k² in [0, 1).

    E(m) = K(m) · (1 − Σₙ 2ⁿ⁻¹ cₙ²) with c₀² = m and cₙ = (aₙ₋₁ − bₙ₋₁)/2 of the arithmetic-geometric mean.

    Parameters:
        m: the parameter, dimensionless (numpy array or float).
    Returns:
        E(m).
    References:
        M. Abramowitz, I. Stegun, *Handbook of Mathematical Functions*, 17.6.3 and 17.6.4.
    """
    m = np.asarray(m, dtype=float)
    a, total = _agm(m)
    return np.pi / (2.0 * a) * (1.0 - total)
