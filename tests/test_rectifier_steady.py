"""The exact rectifier model's steady-state method: invariants of the shooting (the figures
themselves are checked against ngspice in test_rectifier_exact.py and test_hum.py).

- the period map's Jacobian, built from the steps' own, equals a finite-difference one;
- the stretches where the diodes block, taken at once, give the states that stepping gives;
- the state returned is periodic: one more period from it comes back to it, also for a supply whose
  current never stops (a small capacitor before a choke, as the field plan se-power-triode writes
  it).
"""

import math

import numpy as np
import pytest

from groundcheck.model.records import Rectifier
from groundcheck.physics.rectifier import STEPS_PER_PERIOD
from groundcheck.physics.rectifier_exact import _Model, steady_state

SHOCKLEY = Rectifier(
    "r",
    "a",
    "b",
    "full-wave",
    250,
    120,
    0.0,
    47e-6,
    load_current=0.025,
    diode_law="shockley",
    leakage=0.2,
)
CLC = Rectifier(
    "r",
    "a",
    "b",
    "full-wave",
    250,
    120,
    0.0,
    47e-6,
    load_current=0.025,
    diode_law="shockley",
    filter_resistance=80.0,
    filter_inductance=5.0,
    filter_capacitance=47e-6,
    filter_point="x",
)
BRIDGE_CRC = Rectifier(
    "r",
    "a",
    "b",
    "bridge",
    204,
    160,
    1.0,
    47e-6,
    load_current=0.016,
    filter_resistance=1500.0,
    filter_capacitance=100e-6,
    filter_point="x",
)
CHOKE_INPUT = Rectifier(
    "r",
    "a",
    "b",
    "full-wave",
    350,
    95,
    0.0,
    0.1e-6,
    load_current=0.15,
    diode_law="valve",
    valve_drop=50.0,
    valve_current=0.25,
    leakage=0.15,
    filter_resistance=120.0,
    filter_inductance=10.0,
    filter_capacitance=100e-6,
    filter_point="x",
)


def _source(r: Rectifier, f: float = 50.0):
    h = 1.0 / f / STEPS_PER_PERIOD
    w = math.sqrt(2) * r.secondary * np.sin(2 * math.pi * f * np.arange(STEPS_PER_PERIOD) * h)
    return np.abs(w), h


def _end(model: _Model, s: np.ndarray, z: np.ndarray) -> np.ndarray:
    xs, i, _ = model.period(s, z)
    return np.concatenate([[i[-1]], xs[-1]])


@pytest.mark.parametrize(
    "r,z",
    [
        (SHOCKLEY, [0.05, 300.0]),
        (CLC, [0.05, 300.0, 0.1, 280.0]),
        (CHOKE_INPUT, [0.13, -40.0, 0.15, 250.0]),
    ],
)
def test_the_period_maps_jacobian_equals_finite_differences(r, z):
    s, h = _source(r)
    model = _Model(r, h)
    z = np.array(z)
    J = model.period(s, z)[2]
    base = _end(model, s, z)
    for j in range(len(z)):
        dz = np.zeros(len(z))
        dz[j] = 1e-6 * max(abs(z[j]), 1e-3)
        column = (_end(model, s, z + dz) - base) / dz[j]
        # the current's column crosses the diodes' switching, a kink: a looser match there
        assert J[:, j] == pytest.approx(
            column, rel=0.05 if j == 0 else 1e-3, abs=1e-6 * np.abs(J).max()
        )


@pytest.mark.parametrize("r", [SHOCKLEY, CLC, BRIDGE_CRC])
def test_blocked_stretches_taken_at_once_equal_stepping(r, monkeypatch):
    s, h = _source(r)
    model = _Model(r, h)
    z = np.array([0.0, 0.9 * s.max()] + [0.02, 0.8 * s.max()][: len(model.N) - 1])
    xs, i, _ = model.period(s, z)
    monkeypatch.setattr(model, "blocked", lambda *args: [])
    xs_stepped, i_stepped, _ = model.period(s, z)
    assert np.abs(xs - xs_stepped).max() < 1e-9 * s.max()
    assert np.abs(i - i_stepped).max() < 1e-9 * i.max()


@pytest.mark.parametrize("r", [SHOCKLEY, CLC, BRIDGE_CRC, CHOKE_INPUT])
def test_the_steady_state_is_periodic(r):
    s, h = _source(r)
    v, i, out, i_filter = steady_state(r, s, h)
    model = _Model(r, h)
    dim = len(model.N)
    if dim == 1:
        z = [i[0], v[0]]
    elif dim == 2:
        z = [i[0], v[0], out[0]]
    else:  # the choke's current: the filter capacitor's current plus the load's
        z = [i[0], v[0], i_filter[0] + (r.load_current or 0.0), out[0]]
    z = np.array(z)
    end = _end(model, s, z)
    assert np.abs(end[1:] - z[1:]).max() < 1e-6 * s.max()
    assert abs(end[0] - z[0]) < 1e-6 * max(i.max(), 1e-3)
    if r is CHOKE_INPUT:
        assert i.min() > 0  # the current never stops: the start is not a zero of it


def test_a_first_period_without_conduction_still_reaches_the_steady_state():
    # 10 V per diode of a bridge: the first guess (the reservoir at 95 % of the secondary's peak)
    # leaves the diodes off for a whole period, whose Jacobian under a current load is singular.
    # Charge balance (the mean charging current is the load's) and Ohm's law in the filter
    # resistor (the output is the reservoir less 1.5 kΩ × 16 mA), worked by hand
    from dataclasses import replace

    from groundcheck.physics.rectifier import simulate

    r = replace(BRIDGE_CRC, diode_drop=10.0)
    res = simulate(r, 50.0)
    assert res.dc_current == pytest.approx(0.016, rel=1e-3)
    assert res.output_dc == pytest.approx(res.dc_voltage - 1500.0 * 0.016, abs=1e-3)
    assert 0 < res.dc_voltage < math.sqrt(2) * 204 - 2 * 10.0
