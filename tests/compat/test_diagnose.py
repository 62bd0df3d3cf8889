"""From a symptom to its cause (issue 12 part 2): scenarios through the real simulator.

Each scenario is an invented circuit in ``tests/data/diagnose/`` built to show one
symptom through one mechanism.  The expected outcome was written here before
``diagnose`` was first run on the file, with its basis beside it:

* the file's own circuit, at the values it gives, shows the symptom through that
  mechanism (it "produces the symptom in the simulator");
* diagnosed with its unknowns widened (``compat.diagnose.WIDEN``), that mechanism ranks
  first, and the measurement offered tells it from the runner-up: the two readings it
  expects differ by more than the resolution of the tool named (``Reading.resolution``:
  a multimeter 1 V, a leakage clamp 0.1 mA, a clamp meter 0.01 A, a knob position 0.05,
  a crest factor 0.1, a ratio 0.05; origins in ``compat.diagnose.READINGS``);
* a healthy circuit for the same symptom shows no mechanism.
"""
from functools import lru_cache
from pathlib import Path

import pytest

from compat.diagnose import (CANDIDATES, READINGS, Mechanism, Observation, Symptom, diagnose, finding,
                             parse_observation, run_cases, unknowns_for)
from loads.errors import InputError
from loads.files import read_circuit

DATA = Path(__file__).resolve().parents[1] / "data" / "diagnose"

# (symptom, faulty file, true mechanism, healthy file, basis)
SCENARIOS = [
    (Symptom.FLICKER_LOW, "led-rcdiac-3x5w-nobleeder.toml", Mechanism.HOLDING, "ok-le-2x60w-filament.toml",
     "common practice, no source: LED retrofits without a bleeder on a two-wire leading-edge dimmer do not keep "
     "the triac's current above its holding current once their bus is charged; filament lamps are what the "
     "dimmer was made for"),
    (Symptom.DROPS_OUT, "led-rcdiac-3x5w-nobleeder.toml", Mechanism.HOLDING, "ok-le-2x60w-filament.toml",
     "common practice, no source: the same lamps go out turning down as the triac drops out"),
    (Symptom.GLOW_WHEN_OFF, "glow-le-2wire-snubber-4x6w.toml", Mechanism.SNUBBER_LEAK, "ok-2wire-2x60w-filament.toml",
     "common practice, no source: LED lamps glow on the ~7 mA (2πfCV) a 100 nF capacitor across a two-wire "
     "dimmer passes; a 60 W filament needs about 260 mA to glow"),
    (Symptom.FLASHES_WHEN_OFF, "flash-te-2wire-3x7w.toml", Mechanism.SELF_SUPPLY_LEAK, "ok-2wire-2x60w-filament.toml",
     "common practice, no source: a two-wire electronic dimmer's own supply current charges an LED lamp's bus "
     "until it flashes; a filament lamp takes it without light"),
    (Symptom.BUZZING, "hum-rcdiac-asym-2x60va.toml", Mechanism.DC_IN_CORE, "ok-le-neutral-3x60va.toml",
     "common practice, no source: asymmetric firing leaves DC that saturates an iron core, which hums; "
     "a symmetric leading-edge dimmer is what iron-core transformers are put on"),
    (Symptom.TRIPS_AT_SWITCH_ON, "trip-le-32x10w-b10.toml", Mechanism.SWITCH_ON_SURGE, "ok-le-6x10w-b10.toml",
     "from memory: installers put about 15 × 10 W LED drivers on a B10; 32 trip it at switch-on, 6 do not"),
    (Symptom.RUNS_HOT, "hot-le-5x100w.toml", Mechanism.OVERLOAD, "ok-le-2x60w-filament.toml",
     "common practice, no source: 500 W of filament on a 400 W dimmer overloads it; 120 W does not"),
    (Symptom.FLICKER_ALL, "trip-te-8x9w-3a.toml", Mechanism.PROTECTION, "ok-te-2x9w-bleeder.toml",
     "common practice, no source: a trailing-edge dimmer's electronic trip set below the charging peaks of its "
     "capacitor-input lamps shuts it down every half-cycle, at every setting; two lamps stay well below it"),
    (Symptom.LAMPS_FAIL_EARLY, "nondim-te-4x9w.toml", Mechanism.NOT_DIMMABLE, "ok-le-2x60w-filament.toml",
     "lamp makers' instructions, common practice: lamps not made for dimming fail early on a dimmer"),
    # Written before diagnose was first run on this file: the timing network's hysteresis
    # first, the lamps coming on at 0.4.  That expectation was WRONG, and is revised here
    # after the run, with what was measured: with these LED lamps the dimmer fires turning
    # up from 0.3 and turning down to 0.3, not below, on the 0.1 grid (no hysteresis a
    # knob shows); the lamps come on late because the dimmer does not fire at all below
    # 0.3 either way: its end stop.  (With the old diagnose, holding-drop-out "explained"
    # it from a holding failure at 0.3, the setting where the lamps do come on.)
    (Symptom.POPS_ON, "pop-rcdiac-470k-3x8w.toml", Mechanism.END_STOP, "ok-rcdiac-2x60w-filament.toml",
     "common practice, no source: a rotary dimmer whose timing network cannot reach the trigger diode's breakover "
     "over the bottom of the pot gives the lamps nothing there; they come on where it first fires"),
    # Expected before diagnose was first run on this file, but the pot was chosen after
    # the sweeps of the first two pop-on circuits tried (470 kΩ) put the lamps' late start
    # mostly on the end stop: 380 kΩ fires from off only from 0.16 of the travel (closed
    # form in the file; measured single case: from 0.1625 up, to 0.0375 down).  Expected:
    # the timing network's hysteresis ranks first and the trial filament lamp separates
    # it; healthy twin: the 250 kΩ pot fires from off at the bottom (40.6 V > 32 V).
    (Symptom.POPS_ON, "pop-rcdiac-380k-2x40w.toml", Mechanism.TIMING_HYSTERESIS, "ok-rcdiac-2x60w-filament.toml",
     "from memory: a single-RC trigger-diode dimmer snaps the lamps on turning up at a higher setting than the one "
     "at which they go out turning down (the charge its capacitor starts each half-cycle with differs after a "
     "half-cycle that fired); the wider the pot, the further up the knob the snap-on"),
    # Expected: at the bottom the 500 kΩ pot leaves the timing capacitor at 20.5 V, short
    # of 32 V (closed form in the file), so the dimmer does not fire over the bottom
    # quarter or so of the travel, with filament lamps as with any; healthy twin as above.
    (Symptom.DEAD_TRAVEL, "dead-rcdiac-500k-2x60w.toml", Mechanism.END_STOP, "ok-rcdiac-2x60w-filament.toml",
     "common practice, no source: a rotary dimmer whose timing network cannot reach the trigger diode's breakover "
     "at the bottom of the pot gives no light over that part of the knob, even to filament lamps"),
    # Written before diagnose had this symptom.  Expected: the lamps cannot see the
    # dimmer's phase (compat.phase_sense) in every case of the widened input capacitance
    # (22–220 nF); a 60 W filament lamp put beside them pulls their terminals down (its
    # ~900 Ω hot discharges 660 nF in well under a millisecond, closed form R·C), so with
    # it they dim, where lamps not made for dimming would stay at full light.  Healthy
    # twin: 5 mA constant-current bleeders discharge even 220 nF at 23 V/ms, from ~190 V
    # to 65 V in under 6 ms of the 8 ms off-interval at the bottom (closed form).
    (Symptom.STAYS_BRIGHT, "bright-te-neutral-3x7w.toml", Mechanism.PHASE_UNSEEN, "ok-te-2x9w-bleeder.toml",
     "common practice, from memory: LED retrofits without a bleeder on a trailing-edge dimmer hardly dim; lamps "
     "made for phase dimmers (with a bleeder) do"),
    # Expected: lamps not made for dimming draw their power whatever the phase; with a
    # trial filament lamp beside them they still stay bright, which tells them from
    # dimmable lamps that cannot see the phase.
    (Symptom.STAYS_BRIGHT, "nondim-te-4x9w.toml", Mechanism.NOT_DIMMABLE, "ok-te-2x9w-bleeder.toml",
     "lamp makers' instructions, common practice: lamps not marked dimmable do not dim"),
]

# The reading expected to tell the dimmer's own trouble from the lamps' (engineering
# expectation, written before the first run): a trial filament lamp in place of the
# lamps shows the same late start / the same dark travel if the dimmer is the cause, and
# comes on near the bottom if the lamps are.
# Revised after the first run: for the timing network's hysteresis the expectation was
# the trial lamp; on a circuit of filament lamps a trial filament lamp in their place
# shows nothing new, and what tells the hysteresis from the end stop (the runner-up) is
# the gap between where the lamps come on turning up and where they go out turning
# down (common practice, no source: how the snap-on is described on site).
TRIAL_READING = {Mechanism.TIMING_HYSTERESIS: "on-off-gap", Mechanism.END_STOP: "trial-lamp-dark-travel"}
TRIAL_SCENARIOS = [s for s in SCENARIOS if s[2] in TRIAL_READING]



def _ids(s):
    return f"{s[0]}:{s[2]}"


@lru_cache(maxsize=None)
def _diagnosis(name: str, symptom: Symptom):
    """One diagnosis per file and symptom for the whole module (the simulation is deterministic)."""
    return diagnose(read_circuit(DATA / name), symptom)


@pytest.mark.slow
@pytest.mark.parametrize("scenario", SCENARIOS, ids=_ids)
def test_the_faulty_circuit_shows_the_symptom_through_its_mechanism(scenario):
    symptom, faulty, mechanism, _, _basis = scenario
    circuit = read_circuit(DATA / faulty)
    (case,) = run_cases(circuit, (), symptom=symptom)      # the file's own values, nothing widened
    f = finding(mechanism, symptom, case)
    assert f.reproduces, f.text


@pytest.mark.slow
@pytest.mark.parametrize("scenario", SCENARIOS, ids=_ids)
def test_widened_diagnosis_ranks_the_true_mechanism_first_and_the_measurement_separates(scenario):
    symptom, faulty, mechanism, _, _basis = scenario
    d = _diagnosis(faulty, symptom)
    assert any(u.origin == "widened" for u in d.unknowns), "each scenario widens at least one input"
    assert d.ranked[0].mechanism is mechanism, [(r.mechanism, r.score, r.evidence) for r in d.ranked]
    assert d.ranked[0].score > 0
    sep = d.separations[mechanism]
    assert sep.runner_up is not mechanism and sep.runner_up in CANDIDATES[symptom]
    # the two expected readings differ by more than the tool's stated resolution
    assert sep.expected_if_top is not None and sep.expected_if_runner_up is not None
    assert abs(sep.expected_if_top - sep.expected_if_runner_up) > sep.reading.resolution, sep
    assert sep.separates
    assert d.remedies[mechanism]
    assert d.trial_plan and d.cautions


@pytest.mark.slow
@pytest.mark.parametrize("scenario", SCENARIOS, ids=_ids)
def test_healthy_circuit_shows_no_mechanism(scenario):
    symptom, _, _, healthy, _basis = scenario
    d = _diagnosis(healthy, symptom)
    assert not d.possible, [(r.mechanism, r.score, r.evidence) for r in d.possible]
    assert all(r.evidence for r in d.ranked)          # each ruled out with its reason


@pytest.mark.slow
def test_an_observation_no_case_agrees_with_is_reported_and_narrows_nothing():
    # the 100 nF snubber makes the lamps glow whatever the widened self-supply (see the
    # glow scenario's basis), so "no light when off" fits no simulated case
    d = diagnose(read_circuit(DATA / "glow-le-2wire-snubber-4x6w.toml"), Symptom.GLOW_WHEN_OFF,
                 observations=[Observation(key="light_when_off", value=0.0)])
    assert d.narrowed == {}
    assert any("No simulated case agrees" in n for n in d.notes)
    assert len(d.cases_kept) == d.cases_run


@pytest.mark.slow
def test_an_observation_narrows_the_unknown_it_bears_on():
    # the self-supply decides whether the LED lamps' buses charge up to flash within
    # the off-state run; seeing flashes keeps only the cases that flash, and the
    # self-supply's range shrinks to theirs (engineering expectation: the 0.5 mA end
    # charges their 10 µF buses to 60 V more slowly than the 5 mA end)
    c = read_circuit(DATA / "flash-te-2wire-3x7w.toml")
    d = diagnose(c, Symptom.FLASHES_WHEN_OFF, observations=[Observation(key="light_when_off", value=1.0)])
    assert "dimmer.self_supply_a" in d.narrowed
    lo, hi = d.narrowed["dimmer.self_supply_a"]
    # the kept cases carry the widened span's own end values: equal to float rounding
    assert lo > 0.0005 and hi == pytest.approx(0.005, rel=1e-12, abs=0.0)


def test_unknowns_widen_only_what_the_file_does_not_give_as_a_range():
    c = read_circuit(DATA / "led-rcdiac-3x5w-nobleeder.toml")
    us = unknowns_for(c, Symptom.FLICKER_LOW)
    assert [u.file_key for u in us] == ["dimmer.holding_current_ma", "dimmer.latching_current_ma"]
    assert all(u.origin == "widened" and u.why for u in us)
    # a trailing-edge dimmer has no holding current to widen; its flicker (the protection
    # on the lamps' charging peaks) turns on the loop inductance instead
    assert [u.file_key for u in unknowns_for(read_circuit(DATA / "nondim-te-4x9w.toml"), Symptom.FLICKER_LOW)] == [
        "supply.source_inductance_uh"]


def test_observations_parse_knob_positions_percent_and_yes_no():
    # 30 % / 100 in floating point: equal to rounding
    assert parse_observation("steady_down_to=30%").value == pytest.approx(0.30, rel=1e-12, abs=0.0)
    assert parse_observation("comes_on_at=0.4").value == pytest.approx(0.4, rel=1e-12, abs=0.0)
    assert parse_observation("light_when_off=yes").value == 1.0
    for bad in ("steady_down_to=130%", "nonsense=1", "light_when_off=maybe", "dc_current_a=abc", "full_current_a"):
        with pytest.raises(InputError):
            parse_observation(bad)


def test_every_reading_states_its_resolution_and_origin():
    for rd in READINGS.values():
        assert rd.resolution > 0 and rd.resolution_origin and rd.tool and rd.procedure


@pytest.mark.slow
@pytest.mark.parametrize("scenario", TRIAL_SCENARIOS, ids=_ids)
def test_the_trial_filament_lamp_tells_the_dimmer_from_the_lamps(scenario):
    symptom, faulty, mechanism, _, _basis = scenario
    d = _diagnosis(faulty, symptom)
    sep = d.separations[mechanism]
    assert sep.reading.id == TRIAL_READING[mechanism], sep
    # the dimmer's own trouble: the trial lamp comes on at least a fifth of the travel
    # up, or stays dark over at least DEAD_TRAVEL_MIN of it (the scenarios' closed forms
    # put it at about a third and a quarter); if the runner-up were the cause it comes
    # on / lights within the knob's resolution of the bottom
    # (for the on-off gap: the hysteresis of at least HYSTERESIS_MIN the finding needs,
    # against no gap without it)
    assert sep.expected_if_top >= (0.05 if mechanism is Mechanism.TIMING_HYSTERESIS else 0.15), sep
    assert sep.expected_if_runner_up <= 0.05 + 1e-9, sep


@pytest.mark.slow
def test_the_pop_on_scenario_shows_hysteresis_in_the_firing_itself():
    # from off the dimmer first fires where the timing capacitor's swing reaches 32 V,
    # setting 0.16 by the closed form in the file (which leaves out the lamps' drop and the
    # snap-back's charge); turning down it fires well below that (the hysteresis).
    # Tolerance: the knob is turned in eighths of a tenth (0.0125), and the closed form
    # is an estimate: one such step either way.
    (case,) = run_cases(read_circuit(DATA / "pop-rcdiac-380k-2x40w.toml"), (), symptom=Symptom.POPS_ON)
    assert case.fire_up == pytest.approx(0.16, rel=0.0, abs=0.0125 + 1e-9)
    assert case.fire_up - case.fire_down >= 0.05
    f = finding(Mechanism.TIMING_HYSTERESIS, Symptom.POPS_ON, case)
    assert f.reproduces and "fires only if it fired before" in f.text, f.text
    assert not finding(Mechanism.END_STOP, Symptom.POPS_ON, case).reproduces


@pytest.mark.slow
def test_the_trial_plan_for_a_late_start_compares_both_ways_and_a_filament_lamp():
    d = _diagnosis("pop-rcdiac-380k-2x40w.toml", Symptom.POPS_ON)
    text = "\n".join(d.trial_plan)
    assert "where they go out turning down" in text
    assert "filament lamp in place of the lamps" in text
    # the measurement that tells the hysteresis from the end stop is in the plan
    assert "To tell timing-network-hysteresis from dimmer-end-stop" in text
    # a symptom that is not a late start gets neither step
    assert "in place of the lamps" not in "\n".join(_diagnosis("hot-le-5x100w.toml", Symptom.RUNS_HOT).trial_plan)


@pytest.mark.slow
@pytest.mark.parametrize("scenario", [s for s in SCENARIOS if s[0] is Symptom.STAYS_BRIGHT], ids=_ids)
def test_a_filament_lamp_beside_the_lamps_tells_unseen_phase_from_not_dimmable(scenario):
    # Expected before the run: the trial lamp beside them lets lamps that cannot see the
    # phase dim (a quarter of full light or less at the bottom) and leaves lamps not made
    # for dimming at 0.9 of full or more, the same bound as their current (NOT_DIMMING_RATIO).
    # Revised after the first run: the lamps not made for dimming read 0.35, not 0.9 —
    # at the bottom of a trailing-edge dimmer (about 20° of conduction) their converters
    # draw full power from a bus the short conduction cannot keep up, stop and start
    # again, so their mean light falls to about a third (the same 0.36 as without the
    # trial lamp in the corpus's led-nondimmable-te).  What tells the two apart is that
    # they stay lit (a quarter of full or more, the symptom's threshold) while the lamps
    # that cannot see the phase go nearly dark (0.05).
    symptom, faulty, mechanism, _, _basis = scenario
    sep = _diagnosis(faulty, symptom).separations[mechanism]
    assert sep.reading.id == "trial-lamp-beside", sep
    unseen, not_dimmable = ((sep.expected_if_top, sep.expected_if_runner_up) if mechanism is Mechanism.PHASE_UNSEEN
                            else (sep.expected_if_runner_up, sep.expected_if_top))
    assert unseen <= 0.1 and not_dimmable >= 0.25, sep


@pytest.mark.slow
def test_the_trial_lamp_beside_narrows_stays_bright():
    # Expected before the key existed: the installer who tried the 60 W filament lamp
    # beside the lamps and saw them dim nearly to dark (0.05 of full) is told phase-unseen,
    # every case agreeing (the bright-te scenario's cases all read about 0.05 on it); one
    # who saw them stay at 0.6 of full agrees with no simulated case, and is told so.
    c = read_circuit(DATA / "bright-te-neutral-3x7w.toml")
    seen_dark = diagnose(c, Symptom.STAYS_BRIGHT, observations=[parse_observation("trial_lamp_beside=5%")])
    assert seen_dark.ranked[0].mechanism is Mechanism.PHASE_UNSEEN and len(seen_dark.cases_kept) == seen_dark.cases_run
    seen_lit = diagnose(c, Symptom.STAYS_BRIGHT, observations=[parse_observation("trial_lamp_beside=0.6")])
    assert any("No simulated case agrees" in n for n in seen_lit.notes)
    with pytest.raises(InputError):
        parse_observation("trial_lamp_beside=1.5")
