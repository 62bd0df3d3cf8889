"""Flicker judged on the light of whole circuits (issue 8 item 7).

Expected verdicts, written down before these were run, with their basis:

* a dimmed filament lamp on a leading-edge dimmer, 230 V 50 Hz and 120 V 60 Hz, at
  settings 1.0, 0.5 and 0.2: flicker passes, no caution — the trade's reference for
  acceptable light (common practice, no source);
* capacitor-input LED lamps on a trailing-edge dimmer with regular firing: pass, or a
  stroboscopic caution; never a failure (common practice, no source: the recommended
  pairing; bulk-capacitor ripple at twice mains frequency is not visible flicker);
* the demo circuit (two-wire rc-diac dimmer, halogen and LED lamps without a bleeder),
  whose switch misfires at some settings: a misfire that does not repeat within the
  three analysed cycles modulates the light at the span's lowest frequency, 16.7 Hz:
  flicker fails there (issue 8 item 7: an LED lamp misfiring at 17 Hz must fail;
  IEEE 1789's low-risk line is 0.025·f % below 90 Hz).
"""
import pytest

from compat import checks as ck
from compat.evaluate import gather, walk
from compat.report import Status
from loads import simulation as sim
from loads.breaker import Breaker
from loads.catalogue import demo_circuit
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.filament import Filament
from loads.supply import Supply

LEADING = Dimmer(control="phase", wiring="with-neutral", rc_diac=None)
# trailing-edge dimmers carry no RFI choke (common practice, no source)
TRAILING = Dimmer(edge="trailing", control="phase", wiring="with-neutral", rc_diac=None, choke_inductance_h=0.0)


@pytest.mark.parametrize("supply,lamp", [
    (Supply(voltage_v=230.0, frequency_hz=50.0), Filament(name="60 W", count=2, rated_power_w=60.0)),
    (Supply(voltage_v=120.0, frequency_hz=60.0), Filament(name="60 W", count=1, rated_power_w=60.0, rated_voltage_v=120.0)),
])
def test_dimmed_filament_lamp_raises_no_flicker_caution(supply, lamp):
    c = Circuit(name="filament", supply=supply, dimmer=LEADING, breaker=Breaker(), loads=(lamp,))
    runs = walk(c, [1.0, 0.5, 0.2], "down", sim)
    w = sim.reference_light_weights(c)
    r = ck.check_flicker(c, runs, w / w.sum())
    assert r.status is Status.PASS, r.message
    # the light does ripple at twice mains frequency (IEEE 1789's 100/120 Hz line is
    # crossed), and its SVM stays within the reference lamp's
    per = r.details["per_setting"]
    assert max(p[2] for p in per) > 8.0 and all(p[4] > 0.0 for p in per)
    assert r.details["svm"] <= r.limit


def test_led_lamps_on_trailing_edge_never_fail_flicker():
    c = Circuit(name="LED", dimmer=TRAILING, breaker=Breaker(),
                loads=(ElectronicDriver(name="7 W LED", count=6, rated_power_w=7.0),))
    ev = gather(c)
    r = ck.check_flicker(c, ev.runs, ev.light_weights)
    assert r.status in (Status.PASS, Status.CAUTION), r.message
    assert r.details["deciding_hz"] >= 90.0 or r.details["deciding_hz"] == 0.0


@pytest.mark.regression
def test_demo_misfiring_fails_flicker_at_17_hz_and_holding_does_not_fail():
    c = demo_circuit()
    ev = gather(c)
    w = ev.light_weights
    r = ck.check_flicker(c, ev.runs, w)
    assert r.status is Status.FAIL
    # the lowest frequency of the three analysed cycles, 50/3 Hz (atol: a third of a bin)
    assert r.details["deciding_hz"] == pytest.approx(50.0 / 3.0, abs=0.5)
    # regression (our own output, issue 8 item 7): with the triac's turn-off time the
    # ring troughs no longer end conduction; what remains are commutations the slow ring
    # allows, alike in every half-cycle: the switch chatters, the light is steady.  On
    # the walk down from full (the brightening walk starts from the lamp-out state and
    # misfires at its bottom setting, which is a genuine failure)
    h = ck.check_holding(c, ev.down, w)
    assert h.status is not Status.FAIL and "flicker" not in h.message
