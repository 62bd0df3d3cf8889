"""The wording of check messages (issue 9): one unit per check, no contradiction, no
dangling reference.  Hand-built records and nameplate circuits whose figures are known by
construction; the status logic is tested elsewhere and is only restated here."""
import math

import numpy as np
import pytest

from compat import checks as ck
from compat.report import Status
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.filament import Filament
from loads.transformer import MagneticTransformer
from tests.compat.records import F, SPC, run, sim_result

W = np.ones(1)
FIL = Circuit(loads=(Filament(name="lamp", count=2, rated_power_w=60.0),))
LED = Circuit(loads=(ElectronicDriver(name="led", count=4, rated_power_w=6.0),))


@pytest.mark.analytic
def test_rating_says_how_each_load_type_counts():
    # the LED rule of the trade: 24 W of LEDs on a 400 W dimmer count as 240 W (60 %)
    c = Circuit(loads=(Filament(name="halogen", count=1, rated_power_w=42.0),
                       ElectronicDriver(name="led", count=4, rated_power_w=6.0)))
    r = ck.check_rating(c)
    assert r.value == pytest.approx(70.5)
    assert "24 W of LED lamps (60 %)" in r.message and "LED lamps count at 10 × their watts on this dimmer" in r.message
    assert "common practice, no source" in r.message and "10%" not in r.message
    # a printed LED rating of 100 W on a 400 W dimmer: each LED watt counts as four
    r = ck.check_rating(Circuit(dimmer=Dimmer(rated_led_w=100.0), loads=c.loads))
    assert "count at 4 × their watts on this dimmer (its printed rating of 100 W for them)" in r.message
    # transformers without a printed rating: 80 % of the filament rating, in VA (1.25 × their VA)
    tr = MagneticTransformer(name="tr", count=1, rated_va=60.0, secondary_voltage_v=12.0, lamp_power_w=50.0)
    r = ck.check_rating(Circuit(loads=(tr,)))
    assert "60 VA of iron-core transformers" in r.message and "count at 1.25 × their VA" in r.message


@pytest.mark.analytic
def test_holding_explains_more_drop_outs_than_half_cycles_and_speaks_degrees():
    ok = [run(1.0, extinction=179.0)]
    bad = ok + [run(0.4, extinction=110.0, drop=[2, 1, 2, 2, 1, 2], firings=[3, 2, 3, 3, 2, 3], stable=False)]
    r = ck.check_holding(FIL, bad, W)
    assert r.status is Status.FAIL and r.unit == "deg"
    assert "10 early drop-out(s)" in r.message and "in 6 half-cycles" in r.message
    assert "drop out again in the same half-cycle" in r.message
    assert "110°" in r.message and "170°" in r.message and "setting 0.40 on the way down" in r.message


@pytest.mark.analytic
def test_off_state_pulses_at_mains_rate_read_as_a_glow_not_flashes():
    cyc = 50
    n = cyc * SPC
    t = np.arange(n) / (SPC * F)
    pulses = ((t % 0.02) < 0.002).astype(float)[None, :] * 0.3        # a 2 ms pulse every mains cycle
    r = ck.check_off_state(LED, sim_result(cyc, light=pulses), 40)
    assert r.status is Status.FAIL                                      # judgement unchanged
    assert "50 times a second" in r.message and "glow" in r.message and "every 0.02 s" not in r.message
    flashes = ((t % 0.25) < 0.01).astype(float)[None, :] * 0.3        # a 10 ms flash every 0.25 s: seen one by one
    r = ck.check_off_state(LED, sim_result(cyc, light=flashes), 40)
    assert "flashes about every 0.25 s" in r.message


@pytest.mark.analytic
def test_latching_and_harmonics_keep_one_unit_in_their_messages():
    r = ck.check_latching(FIL, [run(1.0, peak=1.583), run(0.5, peak=0.9)], W)
    assert r.status is Status.PASS and "900 mA against 50.0 mA needed" in r.message
    assert r.unit == "A"                          # JSON stays SI; the mA is the display unit


@pytest.mark.analytic
def test_no_dangling_check_names():
    c = Circuit(loads=(ElectronicDriver(name="led", count=4, rated_power_w=6.0),))
    r = ck.check_edge_match(c)
    assert "repetitive-peak check" in r.message and "peak-current check" not in r.message
    assert all(word.strip(".,;") in ck.CHECK_IDS for word in r.message.split() if word.endswith("-peak"))
    assert math.isfinite(r.value)
