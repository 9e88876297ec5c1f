"""The exact rectifier model: Shockley diodes with series resistance, the transformer's leakage
inductance, an optional choke between the rectifiers and the reservoir (a choke input: in series
with the winding's current, its resistance after the rectifiers, the two rectifier paths sharing
its current near the source's zero crossing), and an optional filter section after the reservoir
(a resistor or a choke, then a second capacitor whose negative lands on a point of the ground
system, the load at its output).

The linear part (reservoir, filter, load) is a state-space system dx/dt = A·x + B·i + s, integrated
with the trapezoidal rule; at each step the winding's equation (source = R·i + diode + reservoir,
plus L·di/dt with leakage) is solved for the new current by Newton's method, the reservoir voltage
being an affine function of it.  The periodic steady state is found by Newton's method on the
winding current and the state at the source's zero crossing, the period map's Jacobian being the
product of the steps' own (implicit differentiation of each step's equation), so each iteration
costs one period; where the diodes block, the linear part's evolution is taken over the whole
stretch at once.

References: O. H. Schade, "Analysis of rectifier operation", Proc. IRE 31(7), 1943; W. Shockley,
"The theory of p-n junctions", Bell Syst. Tech. J. 28, 1949 (the diode law); T. J. Aprille, T. N.
Trick, Proc. IEEE 60(1), 1972 (shooting method); the trapezoidal rule (A-stable; C. W. Gear,
*Numerical Initial Value Problems*, 1971).
"""

from __future__ import annotations

import math

import numpy as np

from ..model.records import Rectifier

__all__ = ["steady_state", "SHOCKLEY_IS", "SHOCKLEY_N", "SHOCKLEY_RS", "THERMAL_VOLTAGE"]

#: the Shockley diode of ``diode shockley``: saturation current (A), emission coefficient and
#: series resistance (Ω) of a common 1 A silicon rectifier's SPICE model (1N4007 class, from
#: memory), at 27 °C (SPICE's default temperature, thermal voltage kT/q = 25.865 mV)
SHOCKLEY_IS = 7.03e-9
SHOCKLEY_N = 1.81
SHOCKLEY_RS = 0.034
THERMAL_VOLTAGE = 1.380649e-23 * 300.15 / 1.602176634e-19


def _system(r: Rectifier) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(A, B, s) of the linear part; the state is [v1] with no filter, [v1, v2] with a resistor,
    [v1, i_f, v2] with a choke (v1 the reservoir, v2 the filter output, i_f the choke current)."""
    C1 = r.capacitance
    g = 1.0 / r.load_resistance if r.load_resistance else 0.0
    iload = r.load_current or 0.0
    if r.filter_capacitance is None:
        return np.array([[-g / C1]]), np.array([1.0 / C1]), np.array([-iload / C1])
    C2, R = r.filter_capacitance, r.filter_resistance
    if r.filter_inductance <= 0:
        return (
            np.array([[-1 / (R * C1), 1 / (R * C1)], [1 / (R * C2), -1 / (R * C2) - g / C2]]),
            np.array([1.0 / C1, 0.0]),
            np.array([0.0, -iload / C2]),
        )
    Lf = r.filter_inductance
    return (
        np.array([[0.0, -1 / C1, 0.0], [1 / Lf, -R / Lf, -1 / Lf], [0.0, 1 / C2, -g / C2]]),
        np.array([1.0 / C1, 0.0, 0.0]),
        np.array([0.0, 0.0, -iload / C2]),
    )


class _Model:
    """The trapezoidal rule's step matrices (x1 = M·x0 + N·(i0 + i1) + K) and the winding's
    equation."""

    def __init__(self, r: Rectifier, h: float):
        A, B, s = _system(r)
        P = np.linalg.inv(np.eye(len(B)) - 0.5 * h * A)
        self.M, self.N, self.K = P @ (np.eye(len(B)) + 0.5 * h * A), P @ (0.5 * h * B), P @ (h * s)
        nd = 2 if r.topology == "bridge" else 1
        self.shockley = r.diode_law == "shockley"
        self.valve = r.diode_law == "valve"
        # Child's law, I = K·V^(3/2), through the stated point; a bridge of valves has two in
        # series
        self.k_valve = r.valve_current / r.valve_drop**1.5 if self.valve else 0.0
        self.rt = max(r.winding, 1e-3) + (nd * SHOCKLEY_RS if self.shockley else 0.0)
        self.nvt, self.drop, self.nd = nd * SHOCKLEY_N * THERMAL_VOLTAGE, nd * r.diode_drop, nd
        self.lh = (r.leakage + r.choke_inductance) / h
        self.r = r
        # a choke input: its current shared between the rectifiers' two paths near the source's
        # zero crossing (:func:`_paths`), its resistance after them
        self.choke = r.choke_inductance > 0
        if self.choke:
            self.rw, self.rc = max(r.winding, 1e-3), r.choke_resistance
            self.rt += r.choke_resistance
        self.m, self.n, self.k = self.M.tolist(), self.N.tolist(), self.K.tolist()
        self.n0, self.rows = self.n[0], range(len(self.n))
        self.linear = not (self.shockley or self.valve) and self.lh == 0
        self.free, self.end = _affine(self.m, self.n, self.k)
        self.powers = None

    def vd(self, x: float) -> float:
        if self.valve:
            return self.nd * (x / self.k_valve) ** (2 / 3) if x > 0 else 0.0
        return self.nvt * math.log1p(x / SHOCKLEY_IS) if self.shockley else self.drop

    def dvd(self, x: float) -> float:
        if self.valve:
            return self.nd * (2 / 3) * self.k_valve ** (-2 / 3) * max(x, 1e-9) ** (-1 / 3)
        return self.nvt / (SHOCKLEY_IS + x) if self.shockley else 0.0

    def residual(
        self, x: float, i0: float, d0: float, s1: float, base: float
    ) -> tuple[float, float]:
        """The step's equation in the end current x, and its slope: the inductor's trapezoidal
        rule, or with no leakage the winding's own equation (its drive across R, diode and
        reservoir is zero)."""
        c = self.n0
        if self.choke:
            lost, dlost = self.loss(x, s1)
            drive, slope = s1 - lost - (base + c * x), dlost + c
        else:
            drive = s1 - self.rt * x - self.vd(x) - (base + c * x)
            slope = self.rt + self.dvd(x) + c
        if self.lh > 0:
            return self.lh * (x - i0) - 0.5 * (d0 + drive), self.lh + 0.5 * slope
        return -drive, slope

    def step(self, i0: float, x0: list, s0: float, s1: float) -> tuple:
        """One time step in plain floats (the state is one to three numbers: numpy's per-call cost
        would be most of the work): the end current, the end state and the end current's
        sensitivity to the start, as (a, b, g) with dx/d(i0, x0) = a·e_i + b·e_v1 + g·(N0, M[0])
        (see :meth:`jacobian`)."""
        free = self.free(x0, i0)
        base = free[0]
        if self.linear:
            # constant-drop diodes, no leakage: the equation is linear in x (the root Newton's
            # iteration would find)
            num = s1 - self.drop - base
            if num <= 0.0:
                return 0.0, free, 0.0, 0.0, 0.0
            x = num / (self.rt + self.n0)
            return x, self.end(free, x), 0.0, 0.0, -1.0 / (self.rt + self.n0)
        # the inductor's voltage at the start
        if i0 <= 0:
            d0 = 0.0
        elif self.choke:
            d0 = s0 - self.loss(i0, s0)[0] - x0[0]
        else:
            d0 = s0 - self.rt * i0 - self.vd(i0) - x0[0]
        if self.residual(0.0, i0, d0, s1, base)[0] >= 0.0:  # the diodes block
            return 0.0, free, 0.0, 0.0, 0.0
        x = max(i0, 1e-6)
        for _ in range(60):
            f, df = self.residual(x, i0, d0, s1, base)
            x_new = x - f / df
            x_new = x / 2 if x_new <= 0 else x_new
            done = abs(x_new - x) <= 1e-12 + 1e-10 * x
            x = x_new
            if done:
                break
        end = self.end(free, x)
        if self.lh <= 0:
            return x, end, 0.0, 0.0, -1.0 / df
        # implicit differentiation of the inductor's equation in x, i0, d0(i0, v1) and base
        b = -0.5 / df if i0 > 0 else 0.0
        start = self.loss(i0, s0)[1] if self.choke else self.rt + self.dvd(i0)
        return x, end, self.lh / df + b * start, b, -0.5 / df

    def loss(self, x: float, e: float) -> tuple[float, float]:
        """A choke input's voltage lost between the rectified source ``e`` and the reservoir at
        the choke's current ``x`` (the rectifiers' paths and the choke's resistance), and its
        slope in x."""
        v, dv = _paths(x, e, self.rw, self.diode_one, self.nd == 2)
        return e - v + self.rc * x, self.rc - dv

    def diode_one(self, x: float) -> tuple[float, float]:
        """One rectifier's drop at current x (with its series resistance) and its slope."""
        if self.valve:
            return self.vd(x) / self.nd, self.dvd(x) / self.nd
        if self.shockley:
            return (
                SHOCKLEY_N * THERMAL_VOLTAGE * math.log1p(x / SHOCKLEY_IS) + SHOCKLEY_RS * x,
                SHOCKLEY_N * THERMAL_VOLTAGE / (SHOCKLEY_IS + x) + SHOCKLEY_RS,
            )
        return self.drop / self.nd, 0.0

    def period(self, s: np.ndarray, z0: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """One period from the start z0 = (winding current, state): states (n+1 × dim), currents
        (n+1) and the Jacobian of the end (current, state) with respect to z0.  Where the diodes
        block, the state evolves by the linear part alone: those stretches are computed at once
        (:meth:`blocked`), the rest step by step."""
        src = s.tolist()
        src.append(src[0])
        n = len(s)
        i, x = float(z0[0]), [float(v) for v in z0[1:]]
        xs, cur, coef = [x], [i], []
        step, k = self.step, 0
        while k < n:
            if i == 0.0:
                states = self.blocked(x, src, k)
                if states:
                    xs.extend(states)
                    cur.extend([0.0] * len(states))
                    coef.extend([(0.0, 0.0, 0.0)] * len(states))
                    k += len(states)
                    x = states[-1]
                    continue
            i, x, a, b, g = step(i, x, src[k], src[k + 1])
            xs.append(x)
            cur.append(i)
            coef.append((a, b, g))
            k += 1
        return np.array(xs), np.array(cur), self.jacobian(np.array(coef))

    def blocked(self, x: list, src: list, k: int) -> list:
        """The states after steps k, k+1, … while the diodes stay off, from state x with no winding
        current: each the free evolution M^j·x + (M^(j-1) + … + 1)·K, its reservoir over the source
        less the diodes' drop at zero current (as :meth:`step` decides it); as lists, empty if the
        diodes conduct at step k."""
        if self.powers is None:
            self.powers = _powers(self.M, self.K, len(src) - 1)
        P, Q = self.powers
        left = len(src) - 1 - k
        X = P[1 : left + 1] @ np.asarray(x) + Q[1 : left + 1]
        on = np.asarray(src[k + 1 :]) - self.vd(0.0) - X[:, 0] > 0.0
        count = int(on.argmax()) if on.any() else left
        return X[:count].tolist()

    def jacobian(self, coef: np.ndarray) -> np.ndarray:
        """The product of the steps' Jacobians, last step first, from their coefficients (rows
        a, b, g of :meth:`step`): each step's is [[0, 0], [N, M]] + (1, N) ⊗ (a·e_i + b·e_v1 +
        g·(N0, M[0])), formed for every step at once and multiplied pairwise (a dozen batched
        products for 4096 steps)."""
        dim = len(self.N)
        fixed = np.zeros((dim + 1, dim + 1))
        fixed[1:, 0], fixed[1:, 1:] = self.N, self.M
        grad = np.concatenate([[self.N[0]], self.M[0]])
        rows = coef[:, 2:3] * grad
        rows[:, 0] += coef[:, 0]
        rows[:, 1] += coef[:, 1]
        steps = fixed + np.concatenate([[1.0], self.N])[None, :, None] * rows[:, None, :]
        while len(steps) > 1:
            if len(steps) % 2:
                steps = np.concatenate([steps, np.eye(dim + 1)[None]])
            steps = steps[1::2] @ steps[0::2]
        return steps[0]


def _paths(i: float, e: float, rw: float, diode, bridge: bool) -> tuple[float, float]:
    """The voltage at a choke input's rectifiers' output, and its slope in the choke's current i,
    from the rectified source e (the conducting half-winding's, or the bridge's winding's).  One
    path carries it all until the other's source, at zero current, rises above the output: near
    the zero crossing both conduct, sharing i through the winding's resistance rw and the
    rectifiers' drops (``diode``: one rectifier's drop and slope), the share found by Newton's
    method kept inside its bracket.  Full-wave: the paths' outputs are e − rw·a − d(a) and
    −e − rw·b − d(b), a + b = i; a bridge's, e − rw·(a − b) − 2·d(a) and −e + rw·(a − b) − 2·d(b)
    (one winding carrying a − b)."""
    d_i, g_i = diode(i)
    d_0 = diode(0.0)[0]
    if bridge:
        single, other = e - rw * i - 2 * d_i, -e + rw * i - 2 * d_0
    else:
        single, other = e - rw * i - d_i, -e - d_0
    if other <= single:
        return single, -(rw + (2 if bridge else 1) * g_i)
    k = 2.0 if bridge else 1.0  # the balance of the two paths' outputs, falling in a
    lo, hi, a = 0.0, i, 0.5 * i
    for _ in range(100):
        (da, ga), (db, gb) = diode(a), diode(i - a)
        f = 2 * e - k * (rw * (2 * a - i) + da - db)
        if f > 0:
            lo = a
        else:
            hi = a
        a_new = a + f / (k * (2 * rw + ga + gb))
        a_new = a_new if lo < a_new < hi else 0.5 * (lo + hi)
        done = abs(a_new - a) <= 1e-15 + 1e-13 * i
        a = a_new
        if done:
            break
    (da, ga), (db, gb) = diode(a), diode(i - a)
    par = (rw + ga) * (rw + gb) / (2 * rw + ga + gb)
    if bridge:
        return e - rw * (2 * a - i) - 2 * da, rw - 2 * par
    return e - rw * a - da, -par


def _affine(m: list, n: list, k: list):
    """The step's affine maps in plain floats, written out for the state's one to three numbers
    (a generic sum over rows and columns was half of the stepping's time): free(x0, i0) =
    M·x0 + N·i0 + K and end(free, x) = free + N·x."""
    if len(n) == 1:
        ((m00,),), (n0,), (k0,) = m, n, k
        return (lambda x, i: [m00 * x[0] + n0 * i + k0]), (lambda f, x: [f[0] + n0 * x])
    if len(n) == 2:
        ((m00, m01), (m10, m11)), (n0, n1), (k0, k1) = m, n, k
        return (
            lambda x, i: [
                m00 * x[0] + m01 * x[1] + n0 * i + k0,
                m10 * x[0] + m11 * x[1] + n1 * i + k1,
            ]
        ), (lambda f, x: [f[0] + n0 * x, f[1] + n1 * x])
    ((m00, m01, m02), (m10, m11, m12), (m20, m21, m22)), (n0, n1, n2), (k0, k1, k2) = m, n, k
    return (
        lambda x, i: [
            m00 * x[0] + m01 * x[1] + m02 * x[2] + n0 * i + k0,
            m10 * x[0] + m11 * x[1] + m12 * x[2] + n1 * i + k1,
            m20 * x[0] + m21 * x[1] + m22 * x[2] + n2 * i + k2,
        ]
    ), (lambda f, x: [f[0] + n0 * x, f[1] + n1 * x, f[2] + n2 * x])


def _powers(M: np.ndarray, K: np.ndarray, n: int) -> tuple[np.ndarray, np.ndarray]:
    """M^j and M^(j-1)·K + … + K for j = 0 … n (the free evolution over j steps), by
    doubling."""
    P = np.eye(len(K))[None]
    while len(P) <= n:
        P = np.concatenate([P, P @ np.linalg.matrix_power(M, len(P))])
    P = P[: n + 1]
    Q = np.concatenate([np.zeros((1, len(K))), np.cumsum(P[:-1] @ K, axis=0)])
    return P, Q


def _newton(z: np.ndarray, g: np.ndarray, J: np.ndarray, peak: float) -> np.ndarray:
    """Newton's step on the period map; where it leaps a thousand peaks or more (a period with no
    conduction at all under a current load, whose free evolution has a unit eigenvalue) the
    period's own end instead, one period of the transient."""
    with np.errstate(all="ignore"):
        try:
            step = np.linalg.solve(J - np.eye(len(z)), g)
        except np.linalg.LinAlgError:
            step = None
    if step is None or not np.all(np.isfinite(step)) or np.abs(step[1:]).max() > 1e3 * peak:
        return z + g
    return z - step


def _start(r: Rectifier, peak: float) -> np.ndarray:
    """A first guess of the state at the zero crossing: the reservoir near the peak, the output a
    little below."""
    dim = 1 if r.filter_capacitance is None else (2 if r.filter_inductance <= 0 else 3)
    iload = r.load_current or 0.0
    v = 0.95 * peak
    if r.choke_inductance > 0:
        # a choke input holds the reservoir near the rectified source's mean, 2/π of its peak
        v = 0.6 * peak
    if dim == 1:
        return np.array([v])
    out = max(v - iload * r.filter_resistance, 0.0)
    return np.array([v, out]) if dim == 2 else np.array([v, iload, out])


def steady_state(r: Rectifier, s: np.ndarray, h: float):
    """Periodic steady state for the rectified source ``s`` (one period, step ``h``).

    Parameters:
        r: the rectifier.
        s: the source voltage over one period, already rectified for full-wave and bridge, V.
        h: the time step, s.
    Returns:
        (reservoir voltage, charging current, filter output voltage or None, filter capacitor
        current or None), each one period of samples.
    References:
        the module's references: Newton's method on the period map (Aprille and Trick, 1972).
    """
    model = _Model(r, h)
    peak = float(s.max())
    z = np.concatenate([[0.0], _start(r, peak)])
    if model.choke:  # the choke's current: the load's at the first guess
        z[0] = (r.load_current or 0.0) + (z[-1] / r.load_resistance if r.load_resistance else 0.0)
    # the tolerance: 1e-9 of the peak for the voltages, and of the peak over the winding's
    # resistance for the current
    scale = max(1.0, peak) * np.concatenate([[1.0 / model.rt], np.ones(len(z) - 1)])
    for _ in range(30):
        xs, i, J = model.period(s, z)
        g = np.concatenate([[i[-1]], xs[-1]]) - z
        if np.all(np.abs(g) < 1e-9 * scale):
            break
        z = _newton(z, g, J, peak)
        z[0] = max(z[0], 0.0)
        # the reservoir starts below zero while a choke's current still flows at the crossing
        z[1] = min(max(z[1], -peak), peak)
    xs, i = xs[:-1], i[:-1]
    if r.filter_capacitance is None:
        return xs[:, 0], i, None, None
    v2 = xs[:, -1]
    g = 1.0 / r.load_resistance if r.load_resistance else 0.0
    into = (xs[:, 0] - v2) / r.filter_resistance if r.filter_inductance <= 0 else xs[:, 1]
    return xs[:, 0], i, v2, into - (r.load_current or 0.0) - g * v2
