"""The trial plan on site (issue 12 part 3): printable steps in the Markdown report when
the verdict is site-test-needed, and in the diagnosis.  Expectations written before the
first run; their basis: common practice, no source (a trial lamp, knob up from off then
down from full, watch in the dark when off)."""
from compat.cautions import cautions
from compat.render import render_markdown
from compat.report import CheckResult, Report, Status, Verdict
from compat.trial_plan import trial_lamp_w, trial_plan
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.filament import Filament

LEDS = Circuit(name="hall", dimmer=Dimmer(),
               loads=(ElectronicDriver(name="LED retrofit", count=3, rated_power_w=7.0),))
HOLDING = CheckResult(id="holding", status=Status.FAIL, value=120.0, limit=170.0, unit="deg", margin=-0.3,
                      message="Drops out.", remedy="Add a load-correction device.",
                      deciding_input="dimmer.holding_current_ma",
                      details={"failed_settings": [("down", 0.3), ("down", 0.2)]})
SITE = Report(circuit="hall", verdict=Verdict.SITE_TEST_NEEDED, checks=(HOLDING,), cautions=cautions())


def test_markdown_of_a_site_test_verdict_carries_the_trial():
    md = render_markdown(SITE, LEDS)
    assert "## Trial on site" in md
    trial = md.split("## Trial on site", 1)[1]
    # what to connect: one lamp, then the full group, and a trial filament lamp
    assert "one lamp of LED retrofit" in trial and "3 × LED retrofit" in trial
    assert "60 W filament lamp" in trial            # 3 × 7 W LED count 210 W of 400 W: 60 W still fits
    # the order: up from off, then down from full; watch when off
    up, down, dark = trial.index("slowly up to full"), trial.index("slowly down to the bottom"), trial.index("in the dark")
    assert up < down < dark
    # which result means what, naming the input it turns on and the position from the check
    assert "above position 0.30" in trial and "dimmer.holding_current_ma" in trial
    assert "prove it dead" in trial


def test_other_verdicts_carry_no_trial():
    md = render_markdown(Report(circuit="hall", verdict=Verdict.UNSUITABLE, checks=(HOLDING,), cautions=cautions()),
                         LEDS)
    assert "## Trial on site" not in md


def test_trial_lamp_fits_the_rating_left():
    # a 400 W dimmer with 2 × 60 W filament: 280 W left, the 60 W trial lamp fits
    two = Circuit(name="x", dimmer=Dimmer(), loads=(Filament(name="f", count=2, rated_power_w=60.0),))
    assert trial_lamp_w(two) == 60.0
    # 6 × 65 W = 390 W of 400 W: only 10 W left, no trial lamp fits
    full = Circuit(name="x", dimmer=Dimmer(), loads=(Filament(name="f", count=6, rated_power_w=65.0),))
    assert trial_lamp_w(full) is None
    steps = trial_plan(full, SITE)
    assert not any("trial load" in s for s in steps)
    assert steps[0].startswith("1. ") and steps[-1].startswith(f"{len(steps)}. ")


def test_a_trailing_edge_trial_speaks_of_the_usable_range_not_of_holding_current():
    # a trailing-edge switch needs no latching or holding current (TEXTBOOK_TRIAC, as the
    # checks say), so the trial's meaning for flicker must not blame the switch's current
    trailing = Circuit(name="bed", dimmer=Dimmer(edge="trailing", control="phase", wiring="with-neutral", rc_diac=None,
                                                  choke_inductance_h=0.0),
                       loads=(ElectronicDriver(name="LED retrofit", count=3, rated_power_w=7.0),))
    flicker = CheckResult(id="flicker", status=Status.FAIL, value=40.0, limit=10.0, unit="%", margin=-3.0,
                          message="Flickers.", details={"worst_setting": 0.2})
    steps = trial_plan(trailing, Report(circuit="bed", verdict=Verdict.SITE_TEST_NEEDED, checks=(flicker,)))
    text = " ".join(steps)
    assert "usable range" in text and "above position 0.20" in text
    assert "current it needs" not in text and "trial load" not in text
