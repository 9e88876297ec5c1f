"""How hot a conductor gets carrying a current: the adiabatic temperature (no cooling) and the
steady-state temperature of a conductor in still free air (natural convection and radiation from
its surface, through its insulation).

Adiabatic (IEC 60949 eq. 1; the same relation gives the k of IEC 60364-5-54 Annex A)::

    θf = (β + θi) · exp(I²t / (K² S²)) − β          S in mm², t in s

Steady state, per metre of conductor: the heat q = I²ρ₂₀(1 + α₂₀(θc − 20))/S leaves through the
insulation's thermal resistance T1 = ρT·ln(D/d)/(2π) (IEC 60287-2-1, from memory) to the surface at
θs = θc − q·T1, and from the surface by natural convection and radiation::

    q = π D (h_c + h_r)(θs − θa)

with h_c = Nu·k/D from the Churchill–Chu correlation for a horizontal cylinder (F. P. Incropera and
D. P. DeWitt, *Fundamentals of Heat and Mass Transfer*, eq. 9.34; S. W. Churchill and H. H. S. Chu,
Int. J. Heat Mass Transfer 18, 1975)::

    Nu = {0.60 + 0.387 Ra^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}²,   Ra = g ΔT D³ / (T_film ν α)

air's properties at the film temperature (θs + θa)/2, linear between the rows of Incropera's Table
A.4 (from memory), and h_r = εσ(Ts² + Ta²)(Ts + Ta) with ε 0.9 for PVC or XLPE and 0.05 for bare
copper (the clean-metal end, which cools least; from memory).  The conductor is taken alone in
still air at the plan's ambient: a wire tied into a loom, inside a cable's sheath or laid on warm
parts runs hotter."""

from __future__ import annotations

import math
import sys

__all__ = [
    "adiabatic_temperature",
    "steady_temperature",
    "surface_loss",
    "air",
    "ADIABATIC",
    "MELTING",
    "AIR",
    "EMISSIVITY",
    "INSULATION_THICKNESS",
    "THERMAL_RESISTIVITY",
]

#: IEC 60949 Table 1: K (A·√s/mm²) and β (K); copper also IEC 60364-5-54 Annex A; aluminium from
#: memory
ADIABATIC = {"copper": (226.0, 234.5), "aluminium": (148.0, 228.0)}

#: copper's melting point, °C (CRC Handbook): a figure at or above it is reported as melting
MELTING = 1084.6

#: air at 1 atm (Incropera & DeWitt, Table A.4, from memory):
#: T (K), ν (m²/s), k (W/(m·K)), α (m²/s), Pr
AIR = (
    (250.0, 11.44e-6, 22.3e-3, 15.9e-6, 0.720),
    (300.0, 15.89e-6, 26.3e-3, 22.5e-6, 0.707),
    (350.0, 20.92e-6, 30.0e-3, 29.9e-6, 0.700),
    (400.0, 26.41e-6, 33.8e-3, 38.3e-6, 0.690),
    (450.0, 32.39e-6, 37.3e-3, 47.2e-6, 0.686),
    (500.0, 38.79e-6, 40.7e-3, 56.7e-6, 0.684),
    (600.0, 52.69e-6, 46.9e-3, 76.9e-6, 0.685),
    (700.0, 68.10e-6, 52.4e-3, 98.8e-6, 0.695),
    (800.0, 84.93e-6, 57.3e-3, 120.0e-6, 0.709),
)

#: surface emissivity (from memory): insulated wire; clean bare copper (the low end, cooling least)
EMISSIVITY = {"pvc": 0.9, "xlpe": 0.9, "bare": 0.05}
#: insulation wall of hook-up wire, m: 0.6 mm, that of H05V-K 0.5–1 mm² (IEC 60227-3, from memory)
INSULATION_THICKNESS = 0.6e-3
#: thermal resistivity of the insulation, K·m/W (IEC 60287-2-1 Table 1, from memory)
THERMAL_RESISTIVITY = {"pvc": 5.0, "xlpe": 3.5}

STEFAN_BOLTZMANN = 5.670e-8
GRAVITY = 9.81


def adiabatic_temperature(
    material: str, current: float, duration: float, area: float, start: float
) -> float | None:
    """Temperature after ``duration`` with no heat lost, °C (infinite at or above the melting
    point); None for a material without IEC 60949 constants.

    Parameters:
        material: a MATERIALS name (aluminium alloys take aluminium's constants).
        current: A.
        duration: s.
        area: m².
        start: the starting temperature θi, °C.
    Returns:
        θf, °C.
    References:
        IEC 60949 eq. 1 and Table 1; IEC 60364-5-54 Annex A.
    """
    consts = ADIABATIC.get("aluminium" if material.startswith("aluminium") else material)
    if consts is None:
        return None
    K, beta = consts
    s_mm2 = area * 1e6
    x = current * current * duration / (K * K * s_mm2 * s_mm2)
    if x >= math.log((MELTING + beta) / (start + beta)):
        return math.inf
    return (beta + start) * math.exp(x) - beta


def air(t_kelvin: float) -> tuple[float, ...]:
    """Air's properties at a temperature, linear between the rows of :data:`AIR` (held at its
    ends).

    Parameters:
        t_kelvin: K.
    Returns:
        (ν in m²/s, k in W/(m·K), α in m²/s, Pr).
    References:
        Incropera & DeWitt, Table A.4 (from memory).
    """
    if t_kelvin <= AIR[0][0]:
        return AIR[0][1:]
    for lo, hi in zip(AIR, AIR[1:]):
        if t_kelvin <= hi[0]:
            f = (t_kelvin - lo[0]) / (hi[0] - lo[0])
            return tuple(a + (b - a) * f for a, b in zip(lo[1:], hi[1:]))
    return AIR[-1][1:]


def surface_loss(surface: float, ambient: float, diameter: float, emissivity: float) -> float:
    """Heat leaving a horizontal cylinder's surface per metre, W/m (natural convection and
    radiation).

    Parameters:
        surface: surface temperature, °C.
        ambient: still air's temperature, °C.
        diameter: outer diameter, m.
        emissivity: of the surface.
    Returns:
        W/m (zero at or below the ambient).
    References:
        Churchill & Chu 1975 (Incropera & DeWitt eq. 9.34); the Stefan–Boltzmann law.
    """
    dt = surface - ambient
    if dt <= 0:
        return 0.0
    ts, ta = surface + 273.15, ambient + 273.15
    film = (ts + ta) / 2.0
    nu, k, alpha, pr = air(film)
    ra = GRAVITY * dt * diameter**3 / (film * nu * alpha)
    nusselt = (0.60 + 0.387 * ra ** (1 / 6) / (1 + (0.559 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
    h = nusselt * k / diameter + emissivity * STEFAN_BOLTZMANN * (ts * ts + ta * ta) * (ts + ta)
    return math.pi * diameter * h * dt


def steady_temperature(
    current: float,
    area: float,
    diameter: float,
    wall: float,
    insulation: str,
    rho20: float,
    alpha: float,
    ambient: float,
) -> float:
    """The conductor's steady-state temperature in still free air, °C (infinite when it would
    reach the melting point first).

    Parameters:
        current: A.
        area: conducting cross-section, m².
        diameter: the conductor's diameter (round) or perimeter-equivalent diameter, m.
        wall: the insulation's thickness around it, m (0 for none).
        insulation: pvc, xlpe or bare (the wall's thermal resistivity and the emissivity).
        rho20: resistivity at 20 °C, Ω·m.
        alpha: its temperature coefficient at 20 °C, 1/K.
        ambient: °C.
    Returns:
        θc, °C.
    References:
        Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 9.34 and Table A.4;
        IEC 60287-2-1 (T1 of an insulation wall).
    """
    if current <= 0:
        return ambient
    outer = diameter + 2 * wall
    t1 = THERMAL_RESISTIVITY.get(insulation, 0.0) * math.log(outer / diameter) / (2 * math.pi)
    eps = EMISSIVITY.get(insulation, 0.9)

    def excess(tc: float) -> float:  # heat made minus heat shed, W/m: positive at the ambient
        q = current * current * rho20 * (1 + alpha * (tc - 20.0)) / area
        return q - surface_loss(tc - q * t1, ambient, outer, eps)

    return _root(excess, ambient, MELTING)


#: the root is found to within this, °C, besides a few units in the last place
ROOT_TOLERANCE = 1e-12


def _root(f, lo: float, hi: float) -> float:
    """The root of ``f`` in [lo, hi], f(lo) and f(hi) of opposite signs (infinite when f(hi) > 0,
    the balance not reached below ``hi``), by Brent's method: inverse quadratic interpolation and
    secant steps that keep the root bracketed, a bisection wherever they would not converge
    quickly.  On a smooth heat balance it takes about ten evaluations where bisection takes sixty
    to reach the same bracket.

    References: R. P. Brent, *Algorithms for Minimization without Derivatives*, 1973, ch. 4
    (zeroin); W. H. Press et al., *Numerical Recipes*, 3rd ed., §9.3."""
    a, b = lo, hi
    fa, fb = f(a), f(b)
    if fb > 0:
        return math.inf
    c, fc = b, fb
    d = e = b - a
    for _ in range(200):
        if (fb > 0) == (fc > 0) and fb != 0:
            c, fc = a, fa
            d = e = b - a
        if abs(fc) < abs(fb):
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 2 * sys.float_info.epsilon * abs(b) + 0.5 * ROOT_TOLERANCE
        xm = 0.5 * (c - b)
        if abs(xm) <= tol or fb == 0:
            return b
        if abs(e) >= tol and abs(fa) > abs(fb):
            s = fb / fa
            if a == c:  # secant
                p, q = 2 * xm * s, 1 - s
            else:  # inverse quadratic interpolation
                q, r = fa / fc, fb / fc
                p = s * (2 * xm * q * (q - r) - (b - a) * (r - 1))
                q = (q - 1) * (r - 1) * (s - 1)
            if p > 0:
                q = -q
            p = abs(p)
            if 2 * p < min(3 * xm * q - abs(tol * q), abs(e * q)):
                e, d = d, p / q
            else:
                d = e = xm
        else:
            d = e = xm
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, xm)
        fb = f(b)
    return b
