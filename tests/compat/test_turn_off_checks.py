"""The checks that read a trailing-edge turn-off's energy: ``turn-off-surge`` judges what
the clamp absorbs, ``dissipation`` counts the heat the turn-off leaves in the switch.

Hand-built records (tests/compat/records.py): the energies are written into the
half-cycle figures, so each answer is known by construction (mean power = energy per
half-cycle × 2f, derived)."""
import dataclasses

import numpy as np
import pytest

from compat import checks as ck
from compat.report import Status
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from tests.compat.records import F, SPC, half_cycles, run

CYCLES = 3
TRAIL = Dimmer(edge="trailing", control="phase", rc_diac=None, wiring="with-neutral", rated_load_w=500.0, min_load_w=5.0)
DRIVERS = Circuit(dimmer=TRAIL, loads=(ElectronicDriver(name="driver", count=8, rated_power_w=12.0),))


def _run(*, turn_off_j=0.0, clamp_j=0.0, peak_v=300.0):
    hc = dataclasses.replace(half_cycles(2 * CYCLES), turn_off_energy_j=np.full(2 * CYCLES, turn_off_j),
                             clamp_energy_j=np.full(2 * CYCLES, clamp_j))
    v = np.zeros(CYCLES * SPC)
    v[SPC // 4] = peak_v
    return run(0.1, hc=hc, dimmer_v=v, cycles=CYCLES)


@pytest.mark.analytic
def test_dissipation_counts_the_heat_of_each_turn_off():
    # 0.06 J per half-cycle at 50 Hz is 6 W, inside the 2 % × 500 W = 10 W allowance
    # (DISSIPATION_SHARE, TRADE); 0.12 J is 12 W, outside it; the switch carries no
    # current otherwise, so the turn-off is all the heat
    limit = ck.DISSIPATION_SHARE * TRAIL.rated_load_w
    r = ck.check_dissipation(DRIVERS, [_run(turn_off_j=0.06)])
    assert r.status is Status.PASS and r.limit == pytest.approx(limit, rel=1e-12)   # rel: float rounding only
    r = ck.check_dissipation(DRIVERS, [_run(turn_off_j=0.12)])
    assert r.status is Status.FAIL
    assert r.value == pytest.approx(0.12 * 2 * F, rel=1e-12)                        # rel: float rounding only
    assert "cutting the current" in r.message
    # clamp energy is heat in the dimmer box too
    assert ck.check_dissipation(DRIVERS, [_run(turn_off_j=0.06, clamp_j=0.06)]).status is Status.FAIL


@pytest.mark.analytic
def test_turn_off_surge_judges_the_clamps_absorbed_power_not_the_current_cut():
    # a turn-off that leaves its heat in the switch and keeps below the clamp passes
    # however much current it cut
    r = ck.check_turn_off_surge(DRIVERS, [_run(turn_off_j=0.2)])
    assert r.status is Status.PASS and r.value == pytest.approx(300.0, rel=1e-12)   # rel: float rounding only
    # the clamp absorbing 1 mJ per half-cycle (0.1 W) between samples: a caution
    r = ck.check_turn_off_surge(DRIVERS, [_run(clamp_j=1e-3)])
    assert r.status is Status.CAUTION
    # 10 mJ per half-cycle (1 W) is four times the 0.25 W mean rating of a small varistor
    # (CLAMP_MEAN_POWER_W, from memory): a failure even where no sample caught the clamp
    r = ck.check_turn_off_surge(DRIVERS, [_run(clamp_j=10e-3)])
    assert r.status is Status.FAIL
    assert r.details["clamp_power_w"] == pytest.approx(10e-3 * 2 * F, rel=1e-12)     # rel: float rounding only
