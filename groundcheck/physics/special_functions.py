"""Special functions the analyses need, in numpy alone: the Bessel-function ratio of a round
wire's skin effect and the complete elliptic integrals of a circular loop's field.

Written here rather than taken from ``scipy.special``, whose import costs more start-up time than
every plan of usual size spends in these functions; ``tests/test_special_functions.py`` checks
each against ``scipy.special`` over the whole range the analyses use.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["bessel_skin_ratio", "SERIES_LIMIT", "ellipk", "ellipe"]

#: x = r/δ from which Hankel's expansion is used: its neglected second exponential is
#: e^(−2x) ≈ 7e-13 there, and the power series' cancellation below it costs at most a factor
#: e^((√2 − 1)x) ≈ 330
SERIES_LIMIT = 14.0


def bessel_skin_ratio(x):
    """(k·r/2) · J₀(k·r) / J₁(k·r) for k·r = (1 − j)·x, complex, for x = r/δ > 0 (a numpy array).

    Below :data:`SERIES_LIMIT` the power series: with w = −(k·r/2)² = j·x²/2,
    J₀ = Σ wⁿ/(n!)² and J₁ = (k·r/2) Σ wⁿ/(n!(n+1)!), so the ratio is the quotient of the two sums.
    Above it Hankel's expansion: Im(k·r) < 0, so H⁽¹⁾ dominates J = (H⁽¹⁾ + H⁽²⁾)/2 and
    J₀/J₁ = j·P₀/P₁ with P_ν = Σ jⁿ aₙ(ν)/(k·r)ⁿ and
    aₙ(ν) = (4ν² − 1²)(4ν² − 3²)…(4ν² − (2n−1)²)/(n! 8ⁿ).

    Parameters:
        x: r/δ, dimensionless.
    Returns:
        the complex ratio Z_int / R_dc.
    References:
        M. Abramowitz, I. Stegun, *Handbook of Mathematical Functions*, 9.1.10 (series) and 9.2.7,
        9.2.8 (Hankel's asymptotic expansions); NIST DLMF 10.8.1 and 10.17.
    """
    x = np.asarray(x, dtype=float)
    out = np.empty(x.shape, dtype=complex)
    low = x < SERIES_LIMIT
    if low.any():
        out[low] = _series_ratio(x[low])
    if not low.all():
        out[~low] = _hankel_ratio(x[~low])
    return out


#: terms of the power series: with |w| = x²/2 < 98 the 80th is below 1e-60 of the largest
_SERIES_TERMS = 80
_N = np.arange(1, _SERIES_TERMS + 1)
#: 1/(n!)² and 1/(n!(n+1)!) for n = 1, 2, …
_C0 = np.array([1.0 / math.factorial(n) ** 2 for n in _N])
_C1 = np.array([1.0 / (math.factorial(n) * math.factorial(n + 1)) for n in _N])
#: Hankel's aₙ(0) and aₙ(1) for n = 1 … 24 (|k·r| ≥ 19.8: the 24th term is below 1e-16)
_A0 = np.cumprod([(0.0 - (2 * n - 1) ** 2) / (8 * n) for n in range(1, 25)])
_A1 = np.cumprod([(4.0 - (2 * n - 1) ** 2) / (8 * n) for n in range(1, 25)])


def _powers(q: np.ndarray, count: int) -> np.ndarray:
    """qⁿ for n = 1 … count (len(q) × count), by repeated multiplication."""
    return np.cumprod(np.broadcast_to(q[:, None], (len(q), count)), axis=1)


def _series_ratio(x: np.ndarray) -> np.ndarray:
    powers = _powers(0.5j * x * x, _SERIES_TERMS)  # wⁿ, w = j·x²/2
    return (1.0 + powers @ _C0) / (1.0 + powers @ _C1)


def _hankel_ratio(x: np.ndarray) -> np.ndarray:
    z = (1 - 1j) * x
    powers = _powers(1j / z, len(_A0))  # (j/z)ⁿ
    return (z / 2) * 1j * (1.0 + powers @ _A0) / (1.0 + powers @ _A1)


def _agm(m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(AGM(1, √(1 − m)), Σ 2ⁿ⁻¹ cₙ²) of the arithmetic-geometric mean, for K and E.

    The steps run in place, and convergence is read at the largest m alone: cₙ/aₙ grows with m,
    so when the largest m's has converged every other has."""
    shape = np.shape(m)
    m = np.atleast_1d(m)
    a = np.ones_like(m)
    b = np.sqrt(1.0 - m)
    total = 0.5 * m  # c₀² = m, times 2⁻¹
    power = 0.5
    worst = int(np.argmax(m)) if m.size else 0
    c, ab = np.empty_like(m), np.empty_like(m)
    for _ in range(60):  # converges quadratically: 6 steps at m = 1 − 1e-15
        np.subtract(a, b, out=c)
        c *= 0.5
        np.multiply(a, b, out=ab)
        a += b
        a *= 0.5
        np.sqrt(ab, out=b)
        power *= 2.0
        # a few units in the last place: no step changes K or E
        done = m.size == 0 or abs(c[worst]) <= 4e-16 * a[worst]
        c *= c
        c *= power  # a power of two: exact
        total += c
        if done:
            break
    return a.reshape(shape), total.reshape(shape)


def ellipke(m):
    """K(m) and E(m) together, from one arithmetic-geometric mean (see :func:`ellipk`,
    :func:`ellipe`).

    Parameters:
        m: the parameter, dimensionless (numpy array or float).
    Returns:
        (K(m), E(m)).
    References:
        M. Abramowitz, I. Stegun, *Handbook of Mathematical Functions*, 17.6.
    """
    m = np.asarray(m, dtype=float)
    a, total = _agm(m)
    k = np.pi / (2.0 * a)
    return k, k * (1.0 - total)


def ellipk(m):
    """The complete elliptic integral of the first kind K(m), parameter m = k² in [0, 1).

    K(m) = π / (2 · AGM(1, √(1 − m))).

    Parameters:
        m: the parameter, dimensionless (numpy array or float).
    Returns:
        K(m).
    References:
        M. Abramowitz, I. Stegun, *Handbook of Mathematical Functions*, 17.6 (the
        arithmetic-geometric mean).
    """
    m = np.asarray(m, dtype=float)
    a, _ = _agm(m)
    return np.pi / (2.0 * a)


def ellipe(m):
    """The complete elliptic integral of the second kind E(m), parameter m = k² in [0, 1).

    E(m) = K(m) · (1 − Σₙ 2ⁿ⁻¹ cₙ²) with c₀² = m and cₙ = (aₙ₋₁ − bₙ₋₁)/2 of the
    arithmetic-geometric mean.

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
