"""The trailing-edge turn-off against closed forms.

A transistor dimmer turns off by letting the voltage across it rise at a controlled
slope S while it carries whatever current the circuit drives through it (loads.dimmer).
On a series R–L load fed from an ideal source e(t) = E·sin ωt the current then obeys a
linear first-order equation with sinusoidal and ramp forcing,

    L·di/dt + R·i = E·sin ωt − v_d(t),   v_d(t) = v_0 + S·(t − t_0),

whose solution is the particular part plus the decaying free part (any circuits text;
derived here):

    i(t) = E/Z·sin(ωt − φ) − (v_0 − S·L/R)/R − S·(t − t_0)/R + c·e^{−(t − t_0)·R/L},
    Z = √(R² + ω²L²),  φ = atan(ωL/R),  c fixed by i(t_0) = I_0.

The same form with S = 0 and v_0 = V_cl (resistance R + R_cl) holds once the clamp has
taken the current over, and with S = 0, v_0 = 0 (resistance R + r_T) while the switch
conducts from the zero crossing with i = 0.  Extinction is the root of i (scipy's brentq),
the switch's turn-off energy ∫ v_d·i dt and the clamp's ∫ v_cl·i dt are integrated with
scipy's quad.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq

from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.linear import Linear
from loads.simulation import CLAMP_RESISTANCE_OHM, simulate
from loads.supply import Supply

V_RMS, F = 230.0, 50.0
E = math.sqrt(2.0) * V_RMS
W = 2.0 * math.pi * F
R_ON = 1e-3          # the switch's on-state resistance in these circuits [Ω]
TURN_OFF_S = 100e-6  # the slope: a rise to the supply peak in 100 µs
SLOPE = E / TURN_OFF_S


def _circuit(r_ohm, l_h, clamp_v):
    """An ideal source (no impedance, no cable), a trailing-edge switch with no on-state
    drop, no snubber and no self-supply, and a series R–L load."""
    d = Dimmer(control="phase", edge="trailing", wiring="with-neutral", rc_diac=None, on_state_voltage_v=0.0,
               on_state_resistance_ohm=R_ON, choke_inductance_h=0.0, snubber_capacitance_f=0.0, self_supply_a=0.0,
               rated_load_w=5000.0, min_load_w=0.0, clamp_voltage_v=clamp_v, trip_current_a=1000.0,
               turn_off_time_s=TURN_OFF_S, soft_start_s=0.0)
    return Circuit(supply=Supply(voltage_v=V_RMS, frequency_hz=F, source_resistance_ohm=0.0, source_inductance_h=0.0,
                                 wiring_capacitance_f=0.0),
                   dimmer=d, loads=[Linear(name="R-L", resistance_ohm=r_ohm, inductance_h=l_h, rated_power_w=1000.0)])


def _segment(r, l_h, t0, i0, v0, slope):
    """i(t) of L·di/dt + R·i = E·sin ωt − v0 − slope·(t − t0) with i(t0) = i0."""
    z, phi = math.hypot(r, W * l_h), math.atan2(W * l_h, r)

    def particular(t):
        return E / z * math.sin(W * t - phi) - (v0 - slope * l_h / r) / r - slope * (t - t0) / r
    c = i0 - particular(t0)
    return lambda t: particular(t) + c * math.exp(-(t - t0) * r / l_h)


def _closed_form(r, l_h, off_deg, clamp_v):
    """End of the switch's conduction [s], its turn-off energy [J], the clamp's energy
    [J], the peak dimmer voltage [V] and the end of the clamp's conduction [s] of the
    first half-cycle: conduction from the zero crossing, the slope from off_deg, and the
    clamp if the slope reaches it first."""
    t0 = math.radians(off_deg) / W
    i_on = _segment(r + R_ON, l_h, 0.0, 0.0, 0.0, 0.0)
    i0 = i_on(t0)
    v0 = R_ON * i0
    i_ramp = _segment(r, l_h, t0, i0, v0, SLOPE)
    t_clamp = t0 + (clamp_v - v0) / SLOPE
    t_zero = brentq(i_ramp, t0 + 1e-9, t_clamp) if i_ramp(t_clamp) < 0 else None
    if t_zero is not None:
        e_off = quad(lambda t: (v0 + SLOPE * (t - t0)) * i_ramp(t), t0, t_zero, limit=200)[0]
        return t_zero, e_off, 0.0, v0 + SLOPE * (t_zero - t0), t_zero
    e_off = quad(lambda t: (v0 + SLOPE * (t - t0)) * i_ramp(t), t0, t_clamp, limit=200)[0]
    i1 = i_ramp(t_clamp)
    i_cl = _segment(r + CLAMP_RESISTANCE_OHM, l_h, t_clamp, i1, clamp_v, 0.0)
    t_end = brentq(i_cl, t_clamp + 1e-9, t_clamp + 5e-3)
    e_cl = quad(lambda t: (clamp_v + CLAMP_RESISTANCE_OHM * i_cl(t)) * i_cl(t), t_clamp, t_end, limit=200)[0]
    return t_clamp, e_off, e_cl, clamp_v + CLAMP_RESISTANCE_OHM * i1, t_end


@pytest.mark.analytic
@pytest.mark.parametrize("off_deg", [60.0, 90.0, 135.0])
def test_slope_turn_off_of_an_rl_load_matches_the_closed_form(off_deg):
    # 20 Ω with 2 mH (τ = 0.1 ms), switched off at off_deg: the slope stops the current
    # (10–15 A) below the 1000 V clamp, the inductance's energy and the source's going
    # into the switch.  Closed form: module docstring.
    r, l_h = 20.0, 2e-3
    t_x, e_off, e_cl, v_pk, _ = _closed_form(r, l_h, off_deg, 1000.0)
    assert e_cl == 0.0
    res = simulate(_circuit(r, l_h, 1000.0), firing_angle_deg=180.0 - off_deg, cycles=2, start="cold",
                   samples_per_cycle=20000)
    hc = res.half_cycles
    # every half-cycle is the first one over again (the current is zero at each switch-on),
    # with the sign of the supply
    # rtol: the event location (0.1 µs) and the step tolerance (1e-3) of the simulator
    assert hc.extinction_angle_deg == pytest.approx(np.full(4, math.degrees(W * t_x)), abs=0.01)
    assert hc.turn_off_energy_j == pytest.approx(np.full(4, e_off), rel=5e-3)
    assert np.all(hc.clamp_energy_j == 0.0)
    # the peak on a 1 µs grid: within one grid step of slope (3.3 V) and the step tolerance
    assert np.max(np.abs(res.dimmer_v)) == pytest.approx(v_pk, rel=1e-2)


@pytest.mark.analytic
def test_an_inductance_the_slope_cannot_stop_goes_to_the_clamp():
    # 20 Ω with 50 mH (τ = 2.5 ms, an iron core's kind of inductance), switched off at
    # 90°: the slope reaches the 400 V clamp after 123 µs with the current hardly down; the
    # clamp takes it over and absorbs the rest of the inductance's energy.  Closed form:
    # module docstring, with the clamp's modelled slope resistance.
    r, l_h = 20.0, 50e-3
    t_x, e_off, e_cl, v_pk, t_end = _closed_form(r, l_h, 90.0, 400.0)
    assert e_cl > 10 * e_off > 0.0 and t_end > t_x
    res = simulate(_circuit(r, l_h, 400.0), firing_angle_deg=90.0, cycles=2, start="cold", samples_per_cycle=20000)
    hc = res.half_cycles
    # rtol: the event location (0.1 µs) and the step tolerance (1e-3) of the simulator
    assert hc.extinction_angle_deg == pytest.approx(np.full(4, math.degrees(W * t_x)), abs=0.02)
    assert hc.turn_off_energy_j == pytest.approx(np.full(4, e_off), rel=1e-2)
    assert hc.clamp_energy_j == pytest.approx(np.full(4, e_cl), rel=5e-3)
    assert np.max(np.abs(res.dimmer_v)) == pytest.approx(v_pk, rel=3e-3)


@pytest.mark.analytic
@pytest.mark.parametrize("delay_s", [0.0, 300e-6, 800e-6])
def test_the_protection_trips_once_the_current_has_stayed_above_its_level_for_its_delay(delay_s):
    # 16.2 Ω draws a 20.1 A peak: above the 20 A trip level from asin(20/20.1) = 84.3° to
    # 95.7° of each half-cycle (633 µs).  With no delay the switch opens at 84.3°; with
    # 300 µs it opens 300 µs (5.4°) later; with 800 µs the current falls back first and it
    # never trips (the set turn-off at 180° − 10° ends each half-cycle).  Closed form:
    # i = E·sin ωt / R (no inductance; the switch's 1 mΩ taken into R).
    r = E / 20.1 - R_ON
    d = Dimmer(control="phase", edge="trailing", wiring="with-neutral", rc_diac=None, on_state_voltage_v=0.0,
               on_state_resistance_ohm=R_ON, choke_inductance_h=0.0, snubber_capacitance_f=0.0, rated_load_w=5000.0,
               min_load_w=0.0, clamp_voltage_v=1000.0, trip_current_a=20.0, trip_delay_s=delay_s, turn_off_time_s=0.0,
               soft_start_s=0.0)
    c = Circuit(supply=Supply(voltage_v=V_RMS, frequency_hz=F, source_resistance_ohm=0.0, source_inductance_h=0.0,
                              wiring_capacitance_f=0.0),
                dimmer=d, loads=[Linear(name="R", resistance_ohm=r, rated_power_w=3000.0)])
    hc = simulate(c, firing_angle_deg=10.0, cycles=2, start="cold", samples_per_cycle=2000).half_cycles
    above_deg = math.degrees(math.asin(20.0 / 20.1))
    expect = above_deg + math.degrees(W * delay_s) if delay_s < 600e-6 else 170.0
    # abs: the event location (0.1 µs = 0.002°)
    assert hc.extinction_angle_deg == pytest.approx(np.full(4, expect), abs=0.01)


def test_trip_delay_is_read_in_microseconds_and_round_trips():
    # the file key trip_delay_us (µs) is trip_delay_s inside; it survives write and read
    import dataclasses

    from loads import files
    c = _circuit(20.0, 2e-3, 1000.0)
    c = dataclasses.replace(c, dimmer=dataclasses.replace(c.dimmer, trip_delay_s=20e-6))
    text = files.circuit_to_toml(c)
    assert "trip_delay_us = 20" in text
    again = files.parse_circuit(text, "written.toml")
    assert again.dimmer.trip_delay_s == pytest.approx(20e-6, rel=1e-12)   # rel: float rounding of the unit
    assert files.circuit_to_toml(again) == text
