"""Magnetic pickup: the flux a stray-field source puts through a loop, and the EMF it induces.

A field source (power transformer, choke, mains wiring) is a magnetic dipole at its position,
raised ``height`` above the chassis plane, with its axis along x, y or z (normal to the deck) or,
by default, the orientation that is worst at each channel's output (chosen in
:mod:`groundcheck.physics.orient`). Its strength is stated as the flux density B_ref at a distance
r_ref on its equator, so that its vector potential is A = K·m̂ × R/|R|³ with K = B_ref·r_ref³ (the
moment's μ₀m/4π).  The flux through a loop in the chassis plane is Φ = ∮A·dl, evaluated in closed
form on each straight segment, so that large loops near the source are exact for the dipole (no
uniform-field assumption).  The EMF is E = 2πf·Φ.

When the plan states the source's ``size``, the source is a circular current loop of that diameter
with the same moment at every distance (no switch between two models, so no jump in any figure as a
loop crosses the size): its vector potential is exact at any distance (complete elliptic integrals)
and tends to the dipole's far away; it is integrated along the loop by Gauss–Legendre quadrature.

References: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.4 (the circular loop's vector
potential, eq. 5.37) and §5.6 (the dipole's); W. R. Smythe, *Static and Dynamic Electricity*, 3rd
ed., §7.10 (the closed form in elliptic integrals); Faraday's law, E = −dΦ/dt.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.records import FieldSource
from .special_functions import ellipke

__all__ = [
    "segment_integral",
    "segment_vector",
    "path_vector",
    "path_flux",
    "loop_flux",
    "flux_density",
    "emf",
    "min_distance",
    "ring_quadrature",
    "ring_fluxes",
    "ring_terms",
    "ring_path_flux",
    "hemisphere",
    "cross3",
    "AXES",
]

#: the axes a source can be given, as unit vectors (x and y in the chassis plane, z normal to it)
AXES = {"x": (1.0, 0.0, 0.0), "y": (0.0, 1.0, 0.0), "z": (0.0, 0.0, 1.0)}

#: Gauss–Legendre points per piece of a loop's edge in the ring model, and the longest piece as a
#: share of the distance to the source (pieces shorten near it)
RING_POINTS = 16
RING_PIECE = 0.25


def flux_density(src: FieldSource, p) -> float:
    """|B| (T rms) of the source at point p in the chassis plane, on its equator: B_ref·(r_ref/r)³.

    Parameters:
        src: a field source.
        p: point in the chassis plane, m.
    Returns:
        |B|, T rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (dipole field, 1/r³).
    """
    r = math.hypot(p[0] - src.pos[0], p[1] - src.pos[1], src.height)
    return math.inf if r == 0 else src.b_ref * (src.r_ref / r) ** 3


def segment_vector(p, q, h: float = 0.0) -> np.ndarray:
    """(Fx, Fy, Fz): ∫A·dl along the straight segment p → q in the plane z = 0 of a unit dipole (K
    = 1) at height ``h`` above the origin with its moment along x, y and z (1/m).

    Parameters:
        p, q: the segment's ends relative to the point below the dipole, m.
        h: the dipole's height above the plane, m.
    Returns:
        the three line integrals, 1/m.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6: A = m × R/R³.  With R = (X, Y,
        −h) and r(t) = p + t·d, A·dl = [m_z·c − h·(m_y·d_x − m_x·d_y)]·dt/(a t² + b t + E)^{3/2} (c
        = p × d, a = |d|², b = 2 p·d, E = |p|² + h²), and ∫₀¹ dt/(a t² + b t + E)^{3/2} = [2(2a t +
        b)/(D·√(a t² + b t + E))]₀¹ with D = 4aE − b² = 4(c² + a h²).
    """
    px, py = p
    dx, dy = q[0] - px, q[1] - py
    c = px * dy - py * dx
    a = dx * dx + dy * dy
    if a == 0.0:
        return np.zeros(3)
    b = 2.0 * (px * dx + py * dy)
    e = px * px + py * py + h * h
    d = 4.0 * (c * c + a * h * h)
    if d < 1e-28 * max(a, e) ** 2:
        return np.zeros(3)
    r1 = math.sqrt(a + b + e)
    r0 = math.sqrt(e)
    if r1 == 0.0 or r0 == 0.0:
        return np.zeros(3)
    integral = 2.0 * ((2 * a + b) / r1 - b / r0) / d
    return np.array([h * dy * integral, -h * dx * integral, c * integral])


def segment_integral(p, q) -> float:
    """∫ (x dy − y dx)/r³ along the straight segment p → q, with the dipole at the origin in the
    plane (1/m).

    Parameters:
        p, q: the segment's ends relative to the dipole, m.
    Returns:
        the line integral, 1/m (the z component of :func:`segment_vector` at height 0).
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6; the integral worked in closed
        form here.
    """
    return float(segment_vector(p, q, 0.0)[2])


def path_vector(src: FieldSource, pts) -> np.ndarray:
    """K·(Fx, Fy, Fz) along an open polyline (Wb): the flux the path carries for a moment along x,
    y and z.

    Parameters:
        src: a field source (its position, height and strength; not its axis).
        pts: the polyline's points, m.
    Returns:
        three fluxes, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    ox, oy = src.pos
    total = np.zeros(3)
    for p, q in zip(pts, pts[1:]):
        total += segment_vector((p[0] - ox, p[1] - oy), (q[0] - ox, q[1] - oy), src.height)
    return src.b_ref * src.r_ref**3 * total


def path_flux(src: FieldSource, pts, m=None) -> float:
    """∫A·dl along an open polyline (Wb) for the moment direction ``m`` (default: the source's
    axis, z if worst).

    Parameters:
        src: a field source.
        pts: the polyline's points, m.
        m: the moment's unit vector.
    Returns:
        the flux share the path carries, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    m = np.array(AXES.get(src.axis, AXES["z"])) if m is None else np.asarray(m)
    return float(path_vector(src, pts) @ m)


def loop_flux(src: FieldSource, polygon, m=None) -> float:
    """Flux (Wb, rms) of the source through a closed polygon, counter-clockwise positive.

    Parameters:
        src: a field source.
        polygon: the loop's corners, m.
        m: the moment's unit vector (default: the source's axis, z if worst).
    Returns:
        the flux through the loop, Wb rms (counter-clockwise positive).
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    pts = list(polygon)
    if len(pts) < 3:
        return 0.0
    return path_flux(src, pts + [pts[0]], m)


def ring_quadrature(src: FieldSource, pts, weight: float = 1.0) -> tuple[np.ndarray, np.ndarray]:
    """Gauss–Legendre points along an open polyline, relative to the source's centre (N × 3, m),
    and their weighted line elements (N × 3, m): ∫A·dl along the path is Σ A(Xᵢ)·Wᵢ.  Pieces
    shorten near the source (at most RING_PIECE of their distance to it).

    Parameters:
        src: a field source with a size.
        pts: the polyline's points in the chassis plane, m.
        weight: a factor on every element (the current's share of a plate passage; −1 takes a chord
        back out).
    Returns:
        (points, elements).
    References:
        Gauss–Legendre quadrature (Abramowitz and Stegun, §25.4.29).
    """
    radius = src.size / 2
    centre = np.array([src.pos[0], src.pos[1], src.height])
    t, w = np.polynomial.legendre.leggauss(RING_POINTS)
    xs, ws = [], []
    for p, q in zip(pts, pts[1:]):
        p3, q3 = np.array([p[0], p[1], 0.0]) - centre, np.array([q[0], q[1], 0.0]) - centre
        length = float(np.linalg.norm(q3 - p3))
        if length == 0.0:
            continue
        near = max(_segment_distance(p3, q3), radius * 0.05)
        pieces = max(1, int(math.ceil(length / (RING_PIECE * near))))
        edges = p3 + (q3 - p3) * (np.arange(pieces + 1) / pieces)[:, None]
        half = 0.5 * (edges[1:] - edges[:-1])
        xs.append(
            (
                (0.5 * (edges[1:] + edges[:-1]))[:, None, :] + half[:, None, :] * t[None, :, None]
            ).reshape(-1, 3)
        )
        ws.append((half[:, None, :] * (weight * w)[None, :, None]).reshape(-1, 3))
    if not xs:
        return np.zeros((0, 3)), np.zeros((0, 3))
    return np.concatenate(xs), np.concatenate(ws)


def _ring_factor(rho: np.ndarray, z: np.ndarray, radius: float, mu0_i: float) -> np.ndarray:
    """A_φ/ρ of a circular current loop (radius, μ₀I) at cylindrical (ρ, z) about its axis (arrays
    alike)."""
    s = (radius + rho) ** 2 + z**2
    k2 = np.minimum(4 * radius * rho / s, 1 - 1e-15)
    small = k2 < 1e-3
    if not small.any():  # the usual case: the elliptic form everywhere, without gathering
        kk, ee = ellipke(k2)
        return (
            mu0_i / (np.pi * np.sqrt(k2)) * np.sqrt(radius / rho) * ((1 - k2 / 2) * kk - ee) / rho
        )
    out = np.empty_like(rho)
    # near the axis (k² small): A_φ = μ₀I·a²ρ/(4 D³)·(1 + 15a²ρ²/(8 D⁴)), D² = a² + ρ² + z², the
    # first terms of the ring's expansion in a²ρ²/D⁴ (Jackson §5.5), free of the cancellation in (1
    # − k²/2)K − E; below k² = 1e-3 it agrees with the elliptic form to 1e-12 (checked with
    # 40-digit arithmetic while writing this)
    D2 = radius**2 + rho[small] ** 2 + z[small] ** 2
    out[small] = (
        mu0_i * radius**2 / (4 * D2**1.5) * (1 + 15 * radius**2 * rho[small] ** 2 / (8 * D2**2))
    )
    big = ~small
    k2b, rb = k2[big], rho[big]
    kk, ee = ellipke(k2b)
    out[big] = (
        mu0_i / (np.pi * np.sqrt(k2b)) * np.sqrt(radius / rb) * ((1 - k2b / 2) * kk - ee) / rb
    )
    return out


def ring_fluxes(
    src: FieldSource,
    X: np.ndarray,
    W: np.ndarray,
    M,
    groups=None,
    count: int = 1,
    terms: tuple | None = None,
) -> np.ndarray:
    """Σ A(Xᵢ)·Wᵢ of the source taken as a circular current loop of diameter ``src.size`` with the
    moment of the dipole (μ₀I = 4K/a², a the radius), for each unit axis in M (n × 3): one flux per
    axis and group of points.

    With A = (A_φ/ρ)·m̂ × X (X from the ring's centre, ρ its distance from the axis), A·W =
    (A_φ/ρ)·m̂·(X × W).

    Parameters:
        src: a field source with a size.
        X, W: quadrature points and elements (:func:`ring_quadrature`).
        M: unit axes, n × 3.
        groups: each point's group (a loop's index), 0 … count − 1; None: one group.
        count: the number of groups.
        terms: :func:`ring_terms` of the same points, when the caller keeps them.
    Returns:
        n × count fluxes, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., eq. 5.37; W. R. Smythe, *Static and
        Dynamic Electricity*, §7.10 (A_φ = μ₀I/(πk)·√(a/ρ)·[(1 − k²/2)K(k) − E(k)]).
    """
    M = np.atleast_2d(np.asarray(M, dtype=float))
    radius = src.size / 2
    mu0_i = 4 * src.b_ref * src.r_ref**3 / radius**2
    C, r2, onehot = ring_terms(X, W, groups, count) if terms is None else terms
    out = np.zeros((len(M), count))
    for lo in range(0, len(M), 16):
        m = M[lo : lo + 16]
        Z = X @ m.T
        rho = np.sqrt(np.maximum(r2[:, None] - Z * Z, 0.0))
        g = _ring_factor(rho.ravel(), Z.ravel(), radius, mu0_i).reshape(Z.shape) * (C @ m.T)
        out[lo : lo + len(m)] = (onehot @ g).T
    return out


def ring_terms(X: np.ndarray, W: np.ndarray, groups=None, count: int = 1) -> tuple:
    """What :func:`ring_fluxes` reads of its points for every axis: X × W, |X|² and the points'
    groups as a (sparse) matrix.

    Parameters:
        X, W: quadrature points and elements.
        groups: each point's group, or None.
        count: the number of groups.
    Returns:
        (X × W, |X|², groups × points matrix).
    References:
        none (bookkeeping).
    """
    import scipy.sparse as sp

    groups = np.zeros(len(X), dtype=int) if groups is None else np.asarray(groups)
    onehot = sp.csr_matrix((np.ones(len(X)), (groups, np.arange(len(X)))), shape=(count, len(X)))
    return np.cross(X, W), np.einsum("ij,ij->i", X, X), onehot


def ring_path_flux(src: FieldSource, pts, m) -> float:
    """∫A·dl (Wb) along an open polyline of the source taken as a ring of diameter ``src.size``
    with axis ``m``.

    Parameters:
        src: a field source with a size.
        pts: the polyline's points in the chassis plane, m.
        m: the ring's unit axis.
    Returns:
        the flux share the path carries, Wb rms.
    References:
        :func:`ring_fluxes`, :func:`ring_quadrature`.
    """
    X, W = ring_quadrature(src, pts)
    m = np.asarray(m, dtype=float)
    return float(ring_fluxes(src, X, W, m / np.linalg.norm(m))[0, 0])


def _segment_distance(p3: np.ndarray, q3: np.ndarray) -> float:
    d = q3 - p3
    L2 = float(d @ d)
    t = 0.0 if L2 == 0 else min(1.0, max(0.0, float(-p3 @ d) / L2))
    return float(np.linalg.norm(p3 + t * d))


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
    """Closest approach of a polygon's edges to the source's centre (its height included), m.

    Parameters:
        src: a field source.
        polygon: the loop's corners, m.
    Returns:
        the closest approach of the polygon's edges to the source, m.
    References:
        elementary geometry.
    """
    centre = np.array([src.pos[0], src.pos[1], src.height])
    pts = [np.array([p[0], p[1], 0.0]) - centre for p in polygon]
    return min((_segment_distance(p, q) for p, q in zip(pts, pts[1:] + pts[:1])), default=math.inf)


def hemisphere(n: int) -> np.ndarray:
    """n directions spread evenly over the upper hemisphere (a Fibonacci lattice), with the three
    axes.

    Parameters:
        n: the lattice's directions.
    Returns:
        (n + 3) × 3 unit vectors.
    References:
        Á. González, "Measurement of areas on a sphere using Fibonacci and latitude–longitude
        lattices", Math. Geosci. 42 (2010) 49 (from memory).
    """
    k = np.arange(n) + 0.5
    z = 1 - k / n
    r = np.sqrt(1 - z * z)
    phi = math.pi * (3 - math.sqrt(5)) * k
    return np.vstack([np.column_stack([r * np.cos(phi), r * np.sin(phi), z]), np.eye(3)])


def cross3(a, b) -> np.ndarray:
    """a × b of two 3-vectors: the products and differences of numpy's ``cross``, in the same
    order (so to the same last bit), without its set-up for arrays of vectors.

    Parameters:
        a, b: 3-vectors.
    Returns:
        their cross product.
    References:
        none (the cross product's components).
    """
    a0, a1, a2 = float(a[0]), float(a[1]), float(a[2])
    b0, b1, b2 = float(b[0]), float(b[1]), float(b[2])
    return np.array([a1 * b2 - a2 * b1, a2 * b0 - a0 * b2, a0 * b1 - a1 * b0])
