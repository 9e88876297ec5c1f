"""Plate resistance between fastenings against references outside the project, and a plate's skin
effect.

References computed here, never with groundcheck's own solver:

- the infinite sheet with two equipotential discs of radius a, centres d apart: R =
(ρ/(πt))·arccosh(d/(2a)),
  whose limit for d ≫ a is (ρ/(πt))·ln(d/a) — the conduction analogue of the two-wire line's
  capacitance per length, C' = πε/arccosh(d/(2a)) (D. K. Cheng, *Field and Wave Electromagnetics*,
  2nd ed., 1989, §4-5, the two-wire transmission line; the analogy G/σ = C/ε, §5-4);
- a rectangular plate: the Neumann Green's function of the rectangle (the source and its images in
the four edges,
  repeated with periods 2W and 2D) summed in closed form with the Jacobi theta function θ1 (E. T.
  Whittaker and G. N. Watson, *A Course of Modern Analysis*, ch. 21; the doubly periodic
  logarithmic potential, from memory), each contact an equipotential disc found by the method of
  fundamental solutions (M sources inside each disc, the potential matched at M points of its
  circle; G. Fairweather and A. Karageorghis, *Adv. Comput. Math.* 9 (1998) 69). The two checks
  agree to 4e-6 on a plate far larger than the contacts' spacing (asserted below).
- the skin effect of a slab: the one-dimensional diffusion equation solved on 400 layers across the
thickness.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from groundcheck import PlanErrors, load_text
from groundcheck.physics.circuit import build_circuit
from groundcheck.physics.plate import reduce_plate

RHO_AL, T_AL, A = (
    2.65e-8,
    2e-3,
    4e-3,
)  # aluminium (the project's 20 °C value), 2 mm, a 4 mm contact
RS = RHO_AL / T_AL
MU0 = 4e-7 * math.pi


def _theta1(u, q, terms=40):
    n = np.arange(terms)
    return 2 * np.sum(
        (-1) ** n * q ** ((n + 0.5) ** 2) * np.sin(np.multiply.outer(u, 2 * n + 1)), axis=-1
    )


def _green(z, s, w, d):
    """The rectangle's Neumann Green's function for a unit sheet conductance, up to a constant: the
    source at s and its images (±x, ±y), each a doubly periodic lattice of periods 2w and 2d."""
    q, k = math.exp(-math.pi * d / w), math.pi / (2 * w)
    return sum(
        -np.log(np.abs(_theta1(k * (z - zi), q))) / (2 * math.pi)
        for zi in (s, -s.conjugate(), s.conjugate(), -s)
    )


def _disc_resistance(w, d, centres, a=A, m=24):
    """Resistance (per unit sheet resistance) between two equipotential discs on a w × d plate."""
    ang = 2 * math.pi * np.arange(m) / m
    src = np.concatenate([complex(*c) + 0.5 * a * np.exp(1j * (ang + 0.1)) for c in centres])
    col = np.concatenate([complex(*c) + a * np.exp(1j * ang) for c in centres])
    n = 2 * m
    mat = np.zeros((n + 2, n + 2))
    for j in range(n):
        mat[:n, j] = _green(col, src[j], w, d)
    for k in range(2):
        mat[k * m : (k + 1) * m, n + k] = -1.0
        mat[n + k, k * m : (k + 1) * m] = 1.0
    rhs = np.zeros(n + 2)
    rhs[n], rhs[n + 1] = 1.0, -1.0
    x = np.linalg.lstsq(mat, rhs, rcond=None)[0]
    return x[n] - x[n + 1]


def _solved(w, d, centres):
    return reduce_plate(w, d, T_AL, RHO_AL, centres, ["a", "b"]).resistance(0, 1)


def test_reference_is_the_two_disc_formula_far_from_the_edges():
    # the reference itself: on a 10 m plate two discs 20 mm apart are the infinite sheet's
    # arccosh(d/2a)/π
    assert _disc_resistance(10, 10, [(5, 5), (5.02, 5)]) == pytest.approx(
        math.acosh(2.5) / math.pi, rel=2e-5
    )


def test_two_fastenings_20_mm_apart_match_the_infinite_sheet():
    # far from the edges of a 300 × 300 mm plate (its edges add 0.4 %: the finite-plate reference
    # below): (ρ/πt)·arccosh(d/2a) = 0.4987·Rs; the d ≫ a form ln(d/a)/π = 0.5123·Rs is 2.6 % above
    # it at d = 5a
    want = RS * math.acosh(20 / 8) / math.pi
    got = _solved(0.3, 0.3, [(0.14, 0.15), (0.16, 0.15)])
    assert got == pytest.approx(want, rel=0.01)
    assert got == pytest.approx(
        RS * _disc_resistance(0.3, 0.3, [(0.14, 0.15), (0.16, 0.15)]), rel=0.005
    )


@pytest.mark.parametrize(
    "w, d, p1, p2",
    [
        (0.3, 0.2, (0.05, 0.05), (0.25, 0.15)),
        (0.2, 0.1, (0.1, 0.05), (0.12, 0.05)),  # 20 mm apart
        (0.2, 0.1, (0.01, 0.05), (0.19, 0.09)),  # 10 mm from an edge
        (0.1, 0.06, (0.005, 0.03), (0.05, 0.03)),  # a disc 1 mm from being cut by the edge
        (0.3, 0.2, (0.0731, 0.1187), (0.2049, 0.0623)),  # off the grid
    ],
)
def test_plate_resistance_within_1_percent_of_the_rectangle_reference(w, d, p1, p2):
    assert _solved(w, d, [p1, p2]) == pytest.approx(
        RS * _disc_resistance(w, d, [p1, p2]), rel=0.01
    )


def test_moving_both_fastenings_by_a_micrometre_moves_the_resistance_little():
    # the reference moves by well under 1e-4 for a 1 µm shift; the solve may not jump (it moved 5.5
    # % when the grid's nodes fell exactly on the contact circles)
    base = [(0.1, 0.05), (0.12, 0.05)]
    r0 = _solved(0.2, 0.1, base)
    for dx, dy in ((1e-6, 0), (0, 1e-6), (1e-6, 1e-6), (-1e-6, 0.7e-6)):
        moved = [(x + dx, y + dy) for x, y in base]
        assert _solved(0.2, 0.1, moved) == pytest.approx(r0, rel=1e-3)


def _slab_ratio(rho, t, mu_r, f, layers=400):
    """Z□/(ρ/t) of a slab carrying current in its plane, the field ±I/2 on its faces: E and H on
    layers across the thickness, dE/dz = jωμH (Faraday), dH/dz = σE (Ampère)."""
    h = t / layers
    w = 2 * math.pi * f
    # unknowns: E at the layer centres; H at the interfaces follows from the currents below
    n = layers
    mat = np.zeros((n, n), dtype=complex)
    rhs = np.zeros(n, dtype=complex)
    for i in range(n - 1):
        # E[i+1] − E[i] = jωμ·h·H(i+½), H(i+½) = −1/2 + Σ_{m ≤ i} σ·E[m]·h
        mat[i, i + 1], mat[i, i] = 1.0, -1.0
        mat[i, : i + 1] -= 1j * w * MU0 * mu_r * h * h / rho
        rhs[i] = -1j * w * MU0 * mu_r * h * 0.5
    mat[n - 1, :] = h / rho  # the layers carry the unit current
    rhs[n - 1] = 1.0
    e = np.linalg.solve(mat, rhs)
    # the voltage per length along the surface (E at the face, a half layer beyond the outer
    # centre)
    e_face = e[-1] + 1j * w * MU0 * mu_r * (h / 2) * 0.5
    return e_face / (rho / t)


@pytest.mark.parametrize(
    "material, rho, t, mu_r, f",
    [
        ("steel", 1.43e-7, 1.2e-3, 300, 100.0),
        ("steel", 1.43e-7, 1.2e-3, 300, 2000.0),
        ("aluminium", 2.65e-8, 2e-3, 1, 1000.0),
    ],
)
def test_plate_branch_skin_effect_against_the_diffusion_equation(material, rho, t, mu_r, f):
    plan = load_text(
        f"""plan "skin"
metal deck: {material} {t * 1e3:g} mm, 200 x 100 mm, at 0,0
point a: stud, at 50,50 on deck
point b: stud, at 150,50 on deck
bolt fa: a to deck
bolt fb: b to deck
""",
        "skin.gplan",
    )
    c = build_circuit(plan)
    plate = [i for i, b in enumerate(c.branches) if b.metal == "deck"]
    assert len(plate) == 1
    r_dc = c.branches[plate[0]].r
    # the DC resistance is the plate's, at the project's 20 °C resistivity
    assert r_dc == pytest.approx(
        rho / t * _disc_resistance(0.2, 0.1, [(0.05, 0.05), (0.15, 0.05)]), rel=0.01
    )
    z = c.impedance(f)[plate[0]]
    assert z == pytest.approx(r_dc * _slab_ratio(rho, t, mu_r, f), rel=2e-3)


def test_steel_differs_between_100_hz_and_2_khz_and_a_stated_permeability_is_used():
    text = """plan "skin"
metal deck: steel 1.2 mm, 200 x 100 mm, at 0,0{extra}
point a: stud, at 50,50 on deck
point b: stud, at 150,50 on deck
bolt fa: a to deck
bolt fb: b to deck
"""
    c = build_circuit(load_text(text.format(extra=""), "s.gplan"))
    i = next(k for k, b in enumerate(c.branches) if b.metal == "deck")
    r = c.branches[i].r
    # skin depth at 2 kHz with μr 300 (from memory): √(ρ/(π f μ0 μr)) = 0.246 mm in 1.2 mm sheet
    assert math.sqrt(1.43e-7 / (math.pi * 2000 * MU0 * 300)) == pytest.approx(0.246e-3, rel=0.01)
    assert c.impedance(2000.0)[i].real > 2 * c.impedance(100.0)[i].real
    stated = build_circuit(load_text(text.format(extra=", permeability 1000"), "s.gplan"))
    assert stated.impedance(2000.0)[i] == pytest.approx(
        r * _slab_ratio(1.43e-7, 1.2e-3, 1000, 2000.0), rel=2e-3
    )


@pytest.mark.parametrize("value", ["0.5", "1e6", "mm"])
def test_a_permeability_out_of_range_is_a_located_error(value):
    with pytest.raises(PlanErrors) as err:
        load_text(
            f'plan "p"\nmetal deck: steel 1.2 mm, 200 x 100 mm, permeability {value}\n', "p.gplan"
        )
    assert err.value.errors[0].location.line == 2
    assert "permeability" in str(err.value)
