"""Magnetic pickup: the flux a stray-field source puts through a loop, and the EMF it induces.

A field source (power transformer, choke, mains wiring) is treated as a
magnetic dipole at its position whose axis is normal to the chassis plane —
the orientation that couples most to loops lying flat on the deck.  In that
plane its flux density falls as 1/r³: B(r) = B_ref·(r_ref/r)³.  The flux
through a loop is the line integral of the dipole's vector potential round
it, Φ = ∮A·dl with A = K·(−y, x)/r³ and K = B_ref·r_ref³, evaluated in closed
form on each straight segment, so that large loops near the source are exact
for the dipole (no uniform-field assumption).  The EMF is E = 2πf·Φ.

Valid beyond about the source's own size from it (the dipole law holds
within ~2 % beyond five times the source's size); a loop that runs closer is
flagged in the loop's figures.

References: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (the
dipole's vector potential); Faraday's law, E = −dΦ/dt.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.records import FieldSource

__all__ = ["segment_integral", "path_flux", "loop_flux", "flux_density", "emf"]


def flux_density(src: FieldSource, p) -> float:
    """|B| (T rms) of the source at point p in the chassis plane: B_ref·(r_ref/r)³.

    Parameters:
        src: a field source.
        p: point in the chassis plane, m.
    Returns:
        |B|, T rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (dipole field, 1/r³).
    """
    r = math.dist(src.pos, p)
    return math.inf if r == 0 else src.b_ref * (src.r_ref / r) ** 3


def segment_integral(p, q) -> float:
    """∫ (x dy − y dx)/r³ along the straight segment p → q, with the dipole at the origin (1/m).

    With r(t) = p + t·d, x dy − y dx = c·dt where c = p × d is constant, and
    ∫₀¹ dt/|p + t d|³ = [(2a t + b)/(2c²·√(a t² + b t + e))]₀¹ / … in closed form
    (a = |d|², b = 2 p·d, e = |p|², 4ae − b² = 4c²).

    Parameters:
        p, q: the segment's ends relative to the dipole, m.
    Returns:
        the line integral, 1/m.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6; the integral worked in closed form here.
    """
    px, py = p
    dx, dy = q[0] - px, q[1] - py
    c = px * dy - py * dx
    a = dx * dx + dy * dy
    if a == 0.0:
        return 0.0
    b = 2.0 * (px * dx + py * dy)
    e = px * px + py * py
    scale = max(a, e)
    if abs(c) < 1e-14 * scale:
        return 0.0
    r1 = math.sqrt(a + b + e)
    r0 = math.sqrt(e)
    if r1 == 0.0 or r0 == 0.0:
        return 0.0
    return ((2 * a + b) / r1 - b / r0) / (2.0 * c)


def path_flux(src: FieldSource, pts) -> float:
    """∫A·dl along an open polyline (Wb): the share of a loop's flux that the path carries.

    Parameters:
        src: a field source.
        pts: the polyline's points, m.
    Returns:
        the flux share the path carries, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    ox, oy = src.pos
    k = src.b_ref * src.r_ref ** 3
    total = 0.0
    for p, q in zip(pts, pts[1:]):
        total += segment_integral((p[0] - ox, p[1] - oy), (q[0] - ox, q[1] - oy))
    return k * total


def loop_flux(src: FieldSource, polygon) -> float:
    """Flux (Wb, rms) of the source through a closed polygon, counter-clockwise positive.

    Parameters:
        src: a field source.
        polygon: the loop's corners, m.
    Returns:
        the flux through the loop, Wb rms (counter-clockwise positive).
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    pts = list(polygon)
    if len(pts) < 3:
        return 0.0
    return path_flux(src, pts + [pts[0]])


def emf(flux: float, frequency: float) -> float:
    """EMF magnitude (V rms) of an rms flux at a frequency: 2πfΦ (Faraday).

    Parameters:
        flux: Wb rms.
        frequency: Hz.
    Returns:
        the EMF, V rms.
    References:
        Faraday's law of induction.
    """
    return 2 * math.pi * frequency * abs(flux)


def min_distance(src: FieldSource, polygon) -> float:
    """Closest approach of a polygon's edges to the source, m.

    Parameters:
        src: a field source.
        polygon: the loop's corners, m.
    Returns:
        the closest approach of the polygon's edges to the source, m.
    References:
        elementary geometry.
    """
    o = np.asarray(src.pos)
    best = math.inf
    pts = list(polygon)
    for p, q in zip(pts, pts[1:] + pts[:1]):
        p, q = np.asarray(p), np.asarray(q)
        d = q - p
        L2 = float(d @ d)
        t = 0.0 if L2 == 0 else min(1.0, max(0.0, float((o - p) @ d) / L2))
        best = min(best, float(np.linalg.norm(p + t * d - o)))
    return best
