"""``dimfit selftest``: compile the simulator now, and check it on a circuit whose answer
is known in closed form.

The first simulation in a fresh installation compiles the integrator (numba, 15-60 s,
cached on disk afterwards); this command does it at a time the user chooses (after
installing, say), and then proves the compiled code right on this machine: a 10 Ω
resistive load on 120 V 60 Hz, phase-controlled at a 90° firing angle, whose load
voltage is V_s·sqrt(1 − α/π + sin 2α/(2π)) (the standard result for a single-phase
AC voltage controller with a resistive load; 84.85 V here).
"""
from __future__ import annotations

import math
import time

SUPPLY_V = 120.0           # the closed form's circuit (any voltage would do)
FREQUENCY_HZ = 60.0
LOAD_OHM = 10.0
FIRING_ANGLE_DEG = 90.0
# engineering choice: the switch's 1 mΩ, the 1 µH line and the event location put the
# simulated rms within ~1e-4 of the closed form; 0.5 % leaves room and still catches a
# broken build
RTOL = 5e-3


def closed_form_rms_v(v_s: float, alpha_deg: float) -> float:
    """rms load voltage of a resistive load phase-controlled at alpha_deg [V]."""
    a = math.radians(alpha_deg)
    return v_s * math.sqrt(1.0 - a / math.pi + math.sin(2.0 * a) / (2.0 * math.pi))


def circuit():
    """The self-test circuit: an ideal phase-control switch (no on-state drop, latching
    and holding at 1 mA) and a 10 Ω load on a stiff 120 V 60 Hz supply."""
    from loads.circuit import Circuit
    from loads.dimmer import Dimmer
    from loads.linear import Linear
    from loads.supply import Supply

    return Circuit(
        name="selftest",
        supply=Supply(voltage_v=SUPPLY_V, frequency_hz=FREQUENCY_HZ, source_resistance_ohm=0.0,
                      source_inductance_h=1e-6, wiring_capacitance_f=100e-12),
        dimmer=Dimmer(name="ideal", edge="leading", wiring="with-neutral", control="phase",
                      on_state_voltage_v=0.0, on_state_resistance_ohm=1e-3, choke_inductance_h=0.0,
                      snubber_capacitance_f=0.0, self_supply_a=0.0, holding_current_a=1e-3,
                      latching_current_a=1e-3, gate_window_s=20e-6, min_firing_angle_deg=10.0,
                      max_firing_angle_deg=170.0, rc_diac=None, commutating_di_dt_a_per_s=0.0),
        loads=(Linear(name="R", resistance_ohm=LOAD_OHM, rated_voltage_v=SUPPLY_V,
                      rated_power_w=SUPPLY_V ** 2 / LOAD_OHM),))


def run(sim) -> tuple[bool, str]:
    """Simulate the self-test circuit with ``sim`` (``loads.simulation``): (passed, one
    line saying what was compiled and compared)."""
    t0 = time.perf_counter()
    res = sim.simulate(circuit(), firing_angle_deg=FIRING_ANGLE_DEG, cycles=3, start="cold", samples_per_cycle=400)
    took = time.perf_counter() - t0
    ours = float(math.sqrt(sum(x ** 2 for x in res.half_cycles.load_rms_v[-2:]) / 2))
    want = closed_form_rms_v(SUPPLY_V, FIRING_ANGLE_DEG)
    ok = math.isfinite(ours) and abs(ours - want) <= RTOL * want
    return ok, (f"simulator ready ({took:.1f} s); {LOAD_OHM:g} Ω at {FIRING_ANGLE_DEG:g}° on {SUPPLY_V:g} V: "
                f"{ours:.2f} V rms, closed form {want:.2f} V: {'ok' if ok else 'WRONG'}")
