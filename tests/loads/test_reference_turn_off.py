"""The trailing-edge turn-off into capacitor-input lamps against ngspice (deck
``tests/data/spice/case_e_te_turn_off.cir``, see its header and the README there).

Eight 12 W LED drivers lumped into one (8 × 100 nF input, 4.7/8 Ω, 8 × 22 µF bus, the
converters idle) behind the IEC 60725 reference impedance; a trailing-edge switch closes
at the zero crossing into the empty buses and starts to turn off at 30°, 36° or 45°,
its voltage rising at the supply peak per 100 µs while the recharging buses' current
(10–20 A) flows on until it stops: the situation that decides the corpus's driver cases.
Compared: the current where the turn-off starts, where it ends, the heat it leaves in the
switch (∫ v·i dt over the turn-off) and the dimmer voltage it reaches.

Tolerances: the issue's for the reference checks (tests/loads/test_reference_ngspice.py):
currents within 2 %, event times within 20 µs; the energy, ∝ I², within twice the current
tolerance (derived), and the peak voltage, read from our 1 µs sampling grid (a slope of
3.25 V/µs), within the current tolerance (our choice).  At our step tolerance 1e-5 the
agreement is two orders closer (measured: 0.06 % current, 0.1 % energy, 0.001°), and is
held to that too: what remains at the default tolerance is our solver's own error in the
cold inrush before the turn-off.
"""
from __future__ import annotations

import math

import numpy as np
import pytest

from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.simulation import simulate
from loads.supply import Supply
from tests import ngspice as ng

pytestmark = pytest.mark.reference_sim

DECK = ng.SPICE_DIR / "case_e_te_turn_off.cir"
F = 50.0
CURRENT_RTOL = 0.02         # issue: peak currents within 2 %
EVENT_ATOL_S = 20e-6        # issue: event times within 20 µs (the tighter of its two)
ENERGY_RTOL = 2 * CURRENT_RTOL   # derived: the energy goes as the current squared
TIGHT_RTOL = 3e-3           # our choice: at step tolerance 1e-5 (measured 0.06–0.1 %)
TIGHT_ATOL_S = 1e-6         # our choice: at step tolerance 1e-5 (measured 0.05 µs)


def _ours():
    d = Dimmer(control="phase", edge="trailing", wiring="with-neutral", rc_diac=None, on_state_voltage_v=0.0,
               on_state_resistance_ohm=1e-3, choke_inductance_h=0.0, snubber_capacitance_f=0.0, self_supply_a=0.0,
               rated_load_w=5000.0, min_load_w=0.0, clamp_voltage_v=5000.0, trip_current_a=1000.0,
               turn_off_time_s=100e-6, soft_start_s=0.0)
    return Circuit(supply=Supply(voltage_v=230.0, frequency_hz=F, wiring_capacitance_f=0.0), dimmer=d,
                   loads=[ElectronicDriver(name="driver", count=8, rated_power_w=12.0, input_capacitance_f=100e-9,
                                           series_resistance_ohm=4.7, bulk_capacitance_f=22e-6, start_voltage_v=340.0)])


def _spice(off_deg: float, exe: str) -> tuple[float, float, float, float]:
    t0 = math.radians(off_deg) / (2 * math.pi * F)
    run = ng.run_deck(DECK, params={"toff": off_deg}, tstop_s=t0 + 100e-6, exe=exe)
    t, i, vd = run.t, run.data["i(vsw)"], run.data["v(l2,lamp)"]
    t_x = [x for x in ng.crossings(t, i, 0.0, -1) if x > t0][0]
    return float(np.interp(t0, t, i)), t_x, ng.integral(t, vd * i, t0, t_x), float(np.interp(t_x, t, vd))


@pytest.mark.parametrize("off_deg", [30.0, 36.0, 45.0])
@pytest.mark.parametrize("tolerance", [1e-3, 1e-5])
def test_turn_off_into_recharging_buses_matches_ngspice(ngspice_exe, off_deg, tolerance):
    i0, t_x, e_off, v_x = _spice(off_deg, ngspice_exe)
    res = simulate(_ours(), firing_angle_deg=180.0 - off_deg, cycles=1, start="cold", samples_per_cycle=20000,
                   tolerance=tolerance)
    hc = res.half_cycles
    t0 = math.radians(off_deg) / (2 * math.pi * F)
    ours_i0 = float(np.interp(t0, res.t_s, res.dimmer_a))
    ours_tx = math.radians(hc.extinction_angle_deg[0]) / (2 * math.pi * F)
    first_half = res.t_s < 0.5 / F
    tight = tolerance < 1e-4
    assert ours_i0 == pytest.approx(i0, rel=TIGHT_RTOL if tight else CURRENT_RTOL)
    assert ours_tx == pytest.approx(t_x, abs=TIGHT_ATOL_S if tight else EVENT_ATOL_S)
    assert hc.turn_off_energy_j[0] == pytest.approx(e_off, rel=TIGHT_RTOL if tight else ENERGY_RTOL)
    assert np.max(np.abs(res.dimmer_v[first_half])) == pytest.approx(v_x, rel=CURRENT_RTOL)
    # the slope stopped the current well below the clamp: the clamp took nothing
    assert hc.clamp_energy_j[0] == 0.0
