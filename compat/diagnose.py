"""From a symptom seen on site to the modelled mechanisms that can cause it.

An installer states what the lamps do (``Symptom``: the trade's plain words, named
here).  ``diagnose`` runs the circuit over its unknown inputs — the ranges the file
gives, plus the inputs of ``WIDEN`` that bear on the symptom and that the file gives
as a single figure, widened to the span of ordinary parts — and asks, case by case,
which ``Mechanism`` reproduces the symptom.  Each case is one circuit (the midpoint of
every unknown, then each unknown at its low and its high end with the others at their
midpoints, as ``compat.evaluate`` judges ranges) simulated once (``evaluate.gather``)
and judged once (``evaluate.judge``): a mechanism reads the check results and their
details, so nothing is simulated twice.  The off-state leakage paths are told apart by
one extra off-state run per path; a late start (pops-on, dead travel) by where the
dimmer starts and stops firing, the knob turned in finer steps there
(``firing_thresholds``), and by a trial filament lamp in the lamps' place
(``trial_circuit``).

Score (documented in docs/design.md, Diagnosis): the share of the cases still
plausible (after the observations) in which the mechanism reproduces the symptom, in
[0, 1]; ties are broken by the largest excess over the mechanism's threshold
(``Finding.excess``, the mechanism's quantity over its limit, minus 1).  A mechanism
with score 0 does not reproduce the symptom in any plausible case, and the output says
why, with its figure.

Observations (``OBSERVATIONS``) narrow the unknowns: a case whose simulated reading
disagrees with what the installer saw is dropped, and each unknown's range shrinks to
the values of the cases kept; the inputs narrowed are named.

For each mechanism that reproduces the symptom the diagnosis gives one measurement or
trial with the tools an electrician carries (``Reading``), the reading expected if it is
the cause and if the runner-up is, and the remedy with its sizing (``compat.sizing``).
"""
from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from enum import StrEnum

import numpy as np

from compat import breaker_band, derating, phase_sense, sizing
from compat import checks as ck
from compat.evaluate import (OFF_ANALYSED_CYCLES, OFF_CYCLES, OFF_SAMPLES_PER_CYCLE, combine, gather, judge,
                             set_path, settings_grid, turn, walk)
from compat.runs import SettingRun
from compat.report import CheckResult, Report, Status
from compat.runs import Evidence
from compat.symptoms import Symptom
from compat.switch_on import breaker_max_counts, default_simulator
from compat.verdict import attached_cautions, overall
from loads.circuit import Circuit
from loads.dimmer import Control, Edge, Wiring
from loads.driver import ElectronicDriver
from loads.electronic_transformer import ElectronicTransformer
from loads.errors import InputError
from loads.filament import Filament
from loads.transformer import MagneticTransformer


class Mechanism(StrEnum):
    """A modelled cause, each read from the check results of a simulated case."""

    LATCHING = "latching-failure"                # the switch's current at firing below its latching current
    HOLDING = "holding-drop-out"                 # the current falls below the holding current before the zero
    PROTECTION = "protection-tripping"           # a trailing-edge dimmer's over-current protection acts
    NOT_DIMMABLE = "not-dimmable-lamp"           # a lamp not made for dimming draws its power whatever the phase
    SNUBBER_LEAK = "snubber-leakage"             # off-state current through the capacitor across the switch
    SELF_SUPPLY_LEAK = "self-supply-leakage"     # a two-wire dimmer's own supply drawn through the lamps
    TIMING_LEAK = "timing-network-leakage"       # a rotary dimmer's timing network, through the lamps
    OVERLOAD = "overload"                        # more load than the (derated) rating, or switch loss above allowance
    CURRENT_SPIKES = "current-spikes"            # capacitor-input lamps' spikes at each firing (peak, crest)
    SWITCH_ON_SURGE = "switch-on-surge"          # the surge at switch-on against the breaker's magnetic release
    DC_IN_CORE = "dc-in-core"                    # uneven firing leaves DC in an iron-core transformer
    TURN_OFF_SPIKE = "turn-off-spike"            # a trailing edge cutting an inductive current drives the clamp
    TIMING_HYSTERESIS = "timing-network-hysteresis"  # a rotary dimmer fires from off only well up the knob
    END_STOP = "dimmer-end-stop"                 # the dimmer does not fire at all over the bottom of its travel
    LAMP_START = "lamp-start"                    # the switch conducts but the lamps need more conduction to start
    PHASE_UNSEEN = "phase-unseen"                # the lamps' terminals stay charged while the switch is off


MECHANISM_TEXT = {
    Mechanism.LATCHING: "the switch does not latch: its current at firing stays below the latching current",
    Mechanism.HOLDING: "the switch drops out: its current falls below the holding current before the half-cycle ends",
    Mechanism.PROTECTION: "the trailing-edge dimmer's over-current protection shuts it down on the lamps' current",
    Mechanism.NOT_DIMMABLE: "a lamp not made for dimming draws its power whatever the phase",
    Mechanism.SNUBBER_LEAK: "current through the capacitor across the dimmer's switch (its snubber) lights the lamps",
    Mechanism.SELF_SUPPLY_LEAK: "the two-wire dimmer's own supply current, drawn through the lamps, lights them",
    Mechanism.TIMING_LEAK: "the rotary dimmer's timing network passes current through the lamps",
    Mechanism.OVERLOAD: "the load is above the dimmer's derated rating, or the switch loses more than it can shed",
    Mechanism.CURRENT_SPIKES: "capacitor-input lamps draw a current spike at every firing",
    Mechanism.SWITCH_ON_SURGE: "the switch-on surge moves the breaker's magnetic release into its trip band",
    Mechanism.DC_IN_CORE: "uneven firing of the two polarities leaves DC in an iron-core transformer",
    Mechanism.TURN_OFF_SPIKE: "a trailing edge cutting an inductive current drives the dimmer into its clamp",
    Mechanism.TIMING_HYSTERESIS: "the rotary dimmer's timing network fires from off only well up the knob: with no "
                                 "firing in the half-cycle before, its capacitor starts from another charge and "
                                 "reaches the trigger diode's breakover later than once it fires",
    Mechanism.END_STOP: "the dimmer does not fire at all over the bottom of its travel (its timing network or end "
                        "stop), whatever the lamps",
    Mechanism.LAMP_START: "the dimmer's switch conducts, but the lamps need more conduction than it gives there "
                          "to start (their converter's start voltage)",
    Mechanism.PHASE_UNSEEN: "the lamps cannot see the dimmer's phase: while its switch is off nothing pulls their "
                            "terminals below their phase detector's level (no bleeder), so they read more of the "
                            "half-cycle than it passes and stay bright",
}

# Which mechanisms can produce each symptom (common practice, no source: the causes an
# installer looks for, restricted to those the simulator models).
CANDIDATES: dict[Symptom, tuple[Mechanism, ...]] = {
    Symptom.FLICKER_LOW: (Mechanism.HOLDING, Mechanism.LATCHING, Mechanism.PROTECTION, Mechanism.NOT_DIMMABLE),
    Symptom.FLICKER_ALL: (Mechanism.HOLDING, Mechanism.LATCHING, Mechanism.PROTECTION, Mechanism.NOT_DIMMABLE),
    Symptom.GLOW_WHEN_OFF: (Mechanism.SNUBBER_LEAK, Mechanism.SELF_SUPPLY_LEAK, Mechanism.TIMING_LEAK),
    Symptom.FLASHES_WHEN_OFF: (Mechanism.SNUBBER_LEAK, Mechanism.SELF_SUPPLY_LEAK, Mechanism.TIMING_LEAK),
    Symptom.DROPS_OUT: (Mechanism.HOLDING, Mechanism.LATCHING, Mechanism.PROTECTION),
    Symptom.POPS_ON: (Mechanism.TIMING_HYSTERESIS, Mechanism.LAMP_START, Mechanism.END_STOP, Mechanism.LATCHING,
                      Mechanism.HOLDING),
    Symptom.DEAD_TRAVEL: (Mechanism.END_STOP, Mechanism.LAMP_START, Mechanism.LATCHING, Mechanism.HOLDING,
                          Mechanism.PROTECTION),
    Symptom.BUZZING: (Mechanism.DC_IN_CORE, Mechanism.HOLDING, Mechanism.NOT_DIMMABLE, Mechanism.TURN_OFF_SPIKE),
    Symptom.TRIPS_AT_SWITCH_ON: (Mechanism.SWITCH_ON_SURGE, Mechanism.OVERLOAD),
    Symptom.RUNS_HOT: (Mechanism.OVERLOAD, Mechanism.CURRENT_SPIKES),
    Symptom.LAMPS_FAIL_EARLY: (Mechanism.NOT_DIMMABLE, Mechanism.CURRENT_SPIKES, Mechanism.DC_IN_CORE,
                               Mechanism.TURN_OFF_SPIKE),
    Symptom.STAYS_BRIGHT: (Mechanism.PHASE_UNSEEN, Mechanism.NOT_DIMMABLE),
}

# Engineering choice: "low settings" are the bottom half of the knob's travel; flicker
# at every setting means some flicker above it too.
LOW_SETTING_MAX = 0.5
# Engineering choice: the lamps going out or coming on at a tenth of the travel or more
# is what an installer calls "drops out" or "pops on" (below that it is the end stop).
DROP_POP_MIN_SETTING = 0.10
# Engineering choice: at least 15 % of the knob's travel dark is dead travel a customer
# notices (a few per cent at the bottom is the knob's end stop).
DEAD_TRAVEL_MIN = 0.15
# Engineering choice: off-state flashes slower than 10 a second are seen one by one
# (as compat.checks.check_off_state words them); faster ones run together as a glow.
FLASH_MIN_PERIOD_S = 0.1
# Engineering choice: the dimmer firing turning down at least a twentieth of the knob's
# travel below where it first fires turning up is hysteresis an installer can see (the
# knob's resolution by eye, as READINGS take it).
HYSTERESIS_MIN = 0.05
# Engineering choice: evaluate each case on 11 settings each way (as the sizing search,
# compat.sizing.SEARCH_SETTINGS): enough to place a drop-out to a twentieth of the travel
# after refine_drop_out, and quick enough for 1 + 2k cases.
DIAGNOSE_SETTINGS = sizing.SEARCH_SETTINGS
# The trial filament lamp put in place of the lamps to tell the dimmer's own trouble from
# the lamps' (pops-on, dead travel): a 60 W lamp, the largest of the trial lamps an
# electrician can buy anywhere (compat.trial_plan.TRIAL_LAMPS_W; common practice, no source).
TRIAL_FILAMENT_W = 60.0
# A path removed from the off-state circuit: a timing network's end-stop resistor
# raised to this is open for the purpose (engineering choice: 1 GΩ passes 0.3 µA at 325 V).
OPEN_RESISTANCE_OHM = 1e9


# ---------------------------------------------------------------- unknowns

@dataclass(frozen=True, slots=True, kw_only=True)
class Widen:
    """An input diagnose widens when the file gives it as one figure: dotted path in SI
    names, its file key, the span of ordinary parts [SI], where that span comes from,
    and when it applies."""

    path: str
    file_key: str
    low: float
    high: float
    origin: str
    applies: Callable[[Circuit], bool] = field(default=lambda c: True, compare=False)

    def __post_init__(self) -> None:
        if not (0 <= self.low < self.high):
            raise ValueError(f"widen {self.path}: need 0 ≤ low < high")


def _leading(c: Circuit) -> bool:
    return c.dimmer.edge is Edge.LEADING


def _two_wire(c: Circuit) -> bool:
    return c.dimmer.wiring is Wiring.TWO_WIRE


WIDEN: dict[str, Widen] = {w.path: w for w in (
    Widen(path="dimmer.holding_current_a", file_key="dimmer.holding_current_ma", low=0.005, high=0.050,
          origin="wall-dimmer triacs hold at 5–50 mA (common practice, no source)", applies=_leading),
    Widen(path="dimmer.latching_current_a", file_key="dimmer.latching_current_ma", low=0.010, high=0.100,
          origin="latching 1.5–3 × holding (from memory), over holding 5–50 mA", applies=_leading),
    Widen(path="dimmer.self_supply_a", file_key="dimmer.self_supply_ma", low=0.0005, high=0.005,
          origin="two-wire electronic dimmers draw a few mA for themselves (common practice, no source)",
          applies=_two_wire),
    Widen(path="supply.source_inductance_h", file_key="supply.source_inductance_uh", low=100e-6, high=800e-6,
          origin="final-circuit loop inductance, up to the IEC 60725 reference impedance's 0.8 mH (from memory)"),
    # one unknown per LED lamp or driver group (``GROUP_PATH``)
    Widen(path="loads[*].input_capacitance_f", file_key="loads[*].input_capacitance_nf", low=22e-9, high=220e-9,
          origin="LED lamps' and drivers' input (interference) capacitors, not printed: tens to a couple of hundred "
                 "nF (common practice, no source)"),
)}
# A widened path of every group of a kind: "*" stands for each group's index (from 1).
GROUP_PATH = "loads[*]"

# The inputs that bear on each symptom's mechanisms (engineering choice: the triac's
# currents decide latching and holding; the self-supply the off-state; the loop
# inductance the surge and the spikes at firing).
WIDENED_FOR: dict[Symptom, tuple[str, ...]] = {
    Symptom.FLICKER_LOW: ("dimmer.holding_current_a", "dimmer.latching_current_a", "supply.source_inductance_h"),
    Symptom.FLICKER_ALL: ("dimmer.holding_current_a", "dimmer.latching_current_a", "supply.source_inductance_h"),
    Symptom.DROPS_OUT: ("dimmer.holding_current_a", "dimmer.latching_current_a", "supply.source_inductance_h"),
    Symptom.POPS_ON: ("dimmer.holding_current_a", "dimmer.latching_current_a"),
    Symptom.DEAD_TRAVEL: ("dimmer.holding_current_a", "dimmer.latching_current_a", "supply.source_inductance_h"),
    Symptom.BUZZING: ("dimmer.holding_current_a", "dimmer.latching_current_a"),
    Symptom.GLOW_WHEN_OFF: ("dimmer.self_supply_a",),
    Symptom.FLASHES_WHEN_OFF: ("dimmer.self_supply_a",),
    Symptom.TRIPS_AT_SWITCH_ON: ("supply.source_inductance_h",),
    Symptom.RUNS_HOT: ("supply.source_inductance_h",),
    Symptom.LAMPS_FAIL_EARLY: ("supply.source_inductance_h",),
    # what holds the terminals up (the lamps' input capacitors) and what pulls them down
    # while the switch is off (a two-wire dimmer's own supply current)
    Symptom.STAYS_BRIGHT: ("loads[*].input_capacitance_f", "dimmer.self_supply_a"),
}


def _trailing(c: Circuit) -> bool:
    return c.dimmer.edge is Edge.TRAILING


# Inputs widened for a symptom only on some circuits (engineering choice: on a trailing
# edge the flicker mechanism is the protection tripping on the lamps' charging peaks,
# which the loop inductance sets; a leading edge's are the triac's currents).
WIDEN_ONLY_IF: dict[tuple[Symptom, str], Callable[[Circuit], bool]] = {
    (s, "supply.source_inductance_h"): _trailing
    for s in (Symptom.FLICKER_LOW, Symptom.FLICKER_ALL, Symptom.DROPS_OUT, Symptom.DEAD_TRAVEL)}


@dataclass(frozen=True, slots=True, kw_only=True)
class Unknown:
    """One input the diagnosis varies: path (SI names), file key, range [SI], origin
    ("file": the file's range; "widened": not measured, widened to ``why``)."""

    path: str
    file_key: str
    low: float
    high: float
    origin: str
    why: str = ""

    def __post_init__(self) -> None:
        if not self.low <= self.high:
            raise ValueError(f"unknown {self.path}: low above high")

    @property
    def mid(self) -> float:
        return 0.5 * (self.low + self.high)


def unknowns_for(circuit: Circuit, symptom: Symptom) -> tuple[Unknown, ...]:
    """The file's ranges, then the inputs of ``WIDENED_FOR[symptom]`` the file gives as
    one figure, widened (``WIDEN``)."""
    out = [Unknown(path=r.path, file_key=r.file_key, low=r.low, high=r.high, origin="file") for r in circuit.ranges]
    have = {u.path for u in out}
    for path in WIDENED_FOR[symptom]:
        w = WIDEN[path]
        only_if = WIDEN_ONLY_IF.get((symptom, path), lambda c: True)
        if not w.applies(circuit) or not only_if(circuit):
            continue
        if path.startswith(GROUP_PATH):
            concrete = [(path.replace("*", str(i)), w.file_key.replace("*", str(i)))
                        for i, g in enumerate(circuit.loads, start=1) if isinstance(g, ElectronicDriver)]
        else:
            concrete = [(path, w.file_key)]
        for p, key in concrete:
            if p not in have:
                out.append(Unknown(path=p, file_key=key, low=w.low, high=w.high, origin="widened", why=w.origin))
    return tuple(out)


# ---------------------------------------------------------------- cases

@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class Case:
    """One circuit of the diagnosis: label, the unknowns' values [SI], its evidence, its
    check results by id, the off-state result with each leakage path alone, and (for
    pops-on and dead travel) the walks up and down with a trial filament lamp in place of
    the lamps (``trial_circuit``)."""

    label: str
    key: str
    values: dict
    evidence: Evidence
    checks: dict
    off_paths: dict
    trial_up: tuple = ()
    trial_down: tuple = ()
    fire_up: float | None = None
    fire_down: float | None = None
    beside_down: tuple = ()

    @property
    def circuit(self) -> Circuit:
        return self.evidence.circuit


def _case_circuit(base: Circuit, unknowns: Sequence[Unknown], values: dict) -> Circuit:
    c = base
    for u in unknowns:
        c = set_path(c, u.path, values[u.path])
    return c


def _off_result(circuit: Circuit, sim) -> CheckResult:
    res = sim.simulate(circuit, setting=0.0, no_firing=True, start="cold", cycles=OFF_CYCLES,
                       samples_per_cycle=OFF_SAMPLES_PER_CYCLE)
    return ck.check_off_state(circuit, res, OFF_ANALYSED_CYCLES)


def leakage_paths(circuit: Circuit) -> dict[Mechanism, Circuit]:
    """The circuit with one off-state leakage path left and the others removed, for
    each path the dimmer has (snubber capacitor, two-wire self-supply, rc-diac timing
    network)."""
    d = circuit.dimmer
    rc = d.rc_diac if d.control is Control.RC_DIAC else None
    rc_open = dataclasses.replace(rc, fixed_resistance_ohm=OPEN_RESISTANCE_OHM) if rc is not None else None
    out = {}

    def only(**kw):
        return dataclasses.replace(circuit, dimmer=dataclasses.replace(d, **kw), ranges=())

    if d.snubber_capacitance_f > 0:
        out[Mechanism.SNUBBER_LEAK] = only(self_supply_a=0.0, rc_diac=rc_open) if rc else only(self_supply_a=0.0)
    if d.self_supply_a > 0:
        out[Mechanism.SELF_SUPPLY_LEAK] = (only(snubber_capacitance_f=0.0, rc_diac=rc_open) if rc
                                           else only(snubber_capacitance_f=0.0))
    if rc is not None:
        out[Mechanism.TIMING_LEAK] = only(snubber_capacitance_f=0.0, self_supply_a=0.0)
    return out


def _trial_lamp(circuit: Circuit) -> Filament:
    """The trial filament lamp (``TRIAL_FILAMENT_W``) for this circuit's supply."""
    return Filament(name="trial filament lamp", count=1, rated_power_w=TRIAL_FILAMENT_W,
                    rated_voltage_v=float(circuit.supply.voltage_v))


def beside_circuit(circuit: Circuit) -> Circuit:
    """The circuit with the trial filament lamp added across the lamps: a path that
    pulls their terminals down while the switch is off."""
    return dataclasses.replace(circuit, loads=circuit.loads + (_trial_lamp(circuit),), ranges=())


def trial_circuit(circuit: Circuit) -> Circuit:
    """The circuit with its lamps replaced by the trial filament lamp: what the dimmer
    does with the load it was made for."""
    return dataclasses.replace(circuit, loads=(_trial_lamp(circuit),), ranges=())


# Engineering choice: where the dimmer starts or stops firing between two settings of the
# sweep, the knob is turned on in eighths of a step (0.0125 of the travel with 11
# settings, a quarter of the knob's resolution), the circuit's state carried.
FIRE_STEPS = 8


def _turn(circuit: Circuit, run: SettingRun, settings, sim, cancel=None) -> list[SettingRun]:
    """The knob turned on from ``run`` through ``settings``, its state carried."""
    return turn(circuit, run.result.final_state, run.direction, settings, sim, cancel=cancel)


def firing_thresholds(circuit: Circuit, ev: Evidence, sim, cancel=None) -> tuple[float | None, float | None]:
    """Turning up from off, the first setting at which the dimmer fires; turning down from
    full, the last at which it still fires (0: it fires at the bottom) [1].  Between the
    sweep's settings the knob is turned on in ``FIRE_STEPS`` steps.  None where it never
    fires that way."""
    def first_change(runs, fired_first: bool):
        for prev, nxt in zip(runs, runs[1:]):
            if _triggered(prev) == fired_first and _triggered(nxt) != fired_first:
                return prev, nxt
        return None

    up, down = list(ev.up), list(ev.down)
    fire_up = next((r.setting for r in up if _triggered(r)), None)
    pair = first_change(up, False)
    if pair is not None:
        a, b = pair
        fine = _turn(circuit, a, [a.setting + (b.setting - a.setting) * k / FIRE_STEPS for k in range(1, FIRE_STEPS)],
                     sim, cancel)
        fire_up = next((r.setting for r in fine if _triggered(r)), b.setting)
    fired_down = [r for r in down if _triggered(r)]
    fire_down = min(r.setting for r in fired_down) if fired_down else None
    pair = first_change(down, True)
    if pair is not None:
        a, b = pair
        fine = _turn(circuit, a, [a.setting - (a.setting - b.setting) * k / FIRE_STEPS for k in range(1, FIRE_STEPS)],
                     sim, cancel)
        fire_down = a.setting
        for r in fine:
            if not _triggered(r):
                break
            fire_down = r.setting
    return (None if fire_up is None else float(fire_up)), (None if fire_down is None else float(fire_down))


def run_cases(circuit: Circuit, unknowns: Sequence[Unknown], *, symptom: Symptom, simulator=None,
              cancel=None, progress=None) -> list[Case]:
    """The nominal case (every unknown at its midpoint) and each unknown at its two ends
    with the others at their midpoints (1 + 2k cases, as compat.evaluate judges ranges)."""
    sim = simulator or default_simulator()
    base = dataclasses.replace(circuit, ranges=())
    mids = {u.path: u.mid for u in unknowns}
    plan = [("nominal", "nominal", dict(mids))]
    for u in unknowns:
        for end, v in (("low", u.low), ("high", u.high)):
            plan.append((f"{u.file_key} at its {end} end", u.file_key, dict(mids, **{u.path: v})))
    out = []
    for i, (label, key, values) in enumerate(plan):
        out.append(_run_case(label, key, _case_circuit(base, unknowns, values), values, symptom, sim, cancel))
        if progress is not None:
            progress(i + 1, len(plan))
    return out


# ---------------------------------------------------------------- readings

@dataclass(frozen=True, slots=True, kw_only=True)
class Reading:
    """A measurement or trial with the tools an electrician carries: id, the tool, what
    to do, the unit shown, the meter's (or the eye's) resolution in that unit and its
    origin, and how to get the expected value from a case (None: not defined there)."""

    id: str
    tool: str
    procedure: str
    unit: str
    resolution: float
    resolution_origin: str
    value: Callable[[Case], float | None] = field(compare=False)


def _down_points(case: Case):
    return [r.point for r in case.evidence.down if r.point is not None]


def _up_points(case: Case):
    return [r.point for r in case.evidence.up if r.point is not None]


def steady_down_to(case: Case) -> float:
    """Turning down from full, the lowest setting reached with the light steady and lit
    at every setting on the way [1] (1.0: not steady even at full)."""
    lowest = 1.0
    for p in sorted(_down_points(case), key=lambda p: -p.setting):
        if not (p.stable and p.light_fraction > ck.LIT_FRACTION):
            break
        lowest = p.setting
    for r in case.evidence.bottom:      # the refined drop-out, between grid settings
        if r.point is not None and r.point.stable and r.point.light_fraction > ck.LIT_FRACTION:
            lowest = min(lowest, r.setting)
    return float(lowest)


def comes_on_at(case: Case) -> float | None:
    """Turning up from off, the first setting at which the lamps give light [1]."""
    lit = [p.setting for p in _up_points(case) if p.light_fraction > ck.LIT_FRACTION]
    return float(min(lit)) if lit else None


def _knob_share(settings, dark) -> float:
    """The share of the knob's travel from the bottom up to the highest of ``dark`` (as
    ``compat.checks.check_dimming_range`` counts dead travel: half a grid step past it) [1]."""
    settings = sorted(settings)
    if not dark or len(settings) < 2:
        return 0.0
    span = settings[-1] - settings[0]
    step = span / (len(settings) - 1)
    return float((max(dark) - settings[0] + step / 2) / span) if span > 0 else 0.0


def trial_comes_on_at(case: Case) -> float | None:
    """Turning up from off, the first setting at which the trial filament lamp (alone, in
    place of the lamps) gives light [1]; None without a trial walk or if it never does."""
    lit = [r.setting for r in case.trial_up if r.point is not None and r.point.light_fraction > ck.LIT_FRACTION]
    return float(min(lit)) if lit else None


def trial_dark_travel(case: Case) -> float | None:
    """Turning down from full, the share of the knob's travel at the bottom over which the
    trial filament lamp gives no light [1]; None without a trial walk."""
    pts = [r.point for r in case.trial_down if r.point is not None]
    if not pts:
        return None
    return _knob_share([p.setting for p in pts], [p.setting for p in pts if p.light_fraction <= ck.LIT_FRACTION])


def on_off_gap(case: Case) -> float | None:
    """How far up the knob the dimmer starts firing turning up from off, above where it
    stops firing turning down from full [1]: its hysteresis, which on site shows as the
    lamps coming on turning up well above where they go out turning down.  Taken from the
    firing itself (``firing_thresholds``), not from the light on the sweep's grid, where a
    filament's heat lags the knob; None where those were not found."""
    if case.fire_up is None or case.fire_down is None:
        return None
    return float(case.fire_up - case.fire_down)


def _full_point(case: Case):
    pts = _down_points(case)
    return max(pts, key=lambda p: p.setting) if pts else None


def full_current_a(case: Case) -> float | None:
    p = _full_point(case)
    return None if p is None else float(p.load_rms_a)


def off_voltage_v(case: Case) -> float | None:
    off = case.evidence.off
    if off is None:
        return None
    from compat.runs import tail
    v = off.load_v[tail(off, OFF_ANALYSED_CYCLES)]
    return float(np.sqrt(np.mean(v ** 2)))


def off_current_a(case: Case) -> float | None:
    """The rms current in the lamp feed with the dimmer off [A]."""
    r = case.checks.get("off-state")
    return None if r is None else r.details.get("leakage_rms_a")


def crest_factor(case: Case) -> float | None:
    r = case.checks.get("repetitive-peak")
    return None if r is None else r.details.get("crest_factor")


def dc_current_a(case: Case) -> float | None:
    r = case.checks.get("dc-offset")
    return None if r is None or r.status is Status.NOT_APPLICABLE else r.details.get("settled_dc_a")


# Engineering choice: the setting at which a dimmable lamp's current is compared with
# full (a third of the travel: well dimmed, still lit on most dimmers).
DIM_RATIO_SETTING = 0.3


def dimmed_current_ratio(case: Case) -> float | None:
    """Load current at about a third of the travel over that at full [1]: a lamp not made
    for dimming draws about its full current whatever the phase."""
    pts = _down_points(case)
    full = _full_point(case)
    if not pts or full is None or full.load_rms_a <= 0:
        return None
    p = min(pts, key=lambda p: abs(p.setting - DIM_RATIO_SETTING))
    return float(p.load_rms_a / full.load_rms_a)


# Engineering choice: lamps whose lowest steady light is a quarter of full or more
# "hardly dim" to a customer: a quarter of the light looks like half of it (the square
# law of compat.perception).  Steady light, as dimming-range reads it: settings where
# the light is unsteady are what a customer calls flicker, another symptom.
STAYS_BRIGHT_MIN = 0.25


def lowest_steady_light(case: Case) -> float | None:
    """The lamps' lowest steady light, as ``dimming-range`` finds it (None: never steady) [1]."""
    return case.checks["dimming-range"].details.get("lowest_stable_light")


def trial_beside_light(case: Case) -> float | None:
    """The lamps' own lowest light turning down with a trial filament lamp beside them
    (``beside_circuit``; the filament's own light left out) [1]; 0 if they go dark."""
    if not case.beside_down:
        return None
    weights = np.append(np.asarray(case.evidence.light_weights, dtype=float), 0.0)
    lit = [x for x in (float(np.mean(r.light(weights))) for r in case.beside_down) if x > ck.LIT_FRACTION]
    return min(lit) if lit else 0.0


KNOB = "engineering choice: a knob position judged by eye to a twentieth of its travel"
READINGS: dict[str, Reading] = {r.id: r for r in (
    Reading(id="steady-down-to", tool="your eyes and the knob",
            procedure="From full, turn the knob slowly down; note the lowest position (0 off, 1 full) down to which "
                      "the light stays steady", unit="of the knob's travel", resolution=0.05, resolution_origin=KNOB,
            value=steady_down_to),
    Reading(id="comes-on-at", tool="your eyes and the knob",
            procedure="From off, turn the knob slowly up; note the position (0 off, 1 full) at which the lamps come on",
            unit="of the knob's travel", resolution=0.05, resolution_origin=KNOB, value=comes_on_at),
    Reading(id="on-off-gap", tool="your eyes and the knob",
            procedure="From off, turn the knob slowly up and note the position (0 off, 1 full) at which the lamps "
                      "come on; then from full turn it slowly down and note where they go out; the first less the "
                      "second", unit="of the knob's travel", resolution=0.05,
            resolution_origin="engineering choice: two positions on the same knob, each judged by eye to a "
                              "twentieth of its travel, compared directly",
            value=on_off_gap),
    Reading(id="trial-lamp-comes-on-at", tool=f"a {TRIAL_FILAMENT_W:.0f} W filament lamp as a trial load, your eyes "
                                             "and the knob",
            procedure=f"With the circuit isolated, connect a {TRIAL_FILAMENT_W:.0f} W filament lamp in place of the "
                      "lamps; from off, turn the knob slowly up and note the position (0 off, 1 full) at which the "
                      "filament lamp first glows", unit="of the knob's travel", resolution=0.05,
            resolution_origin=KNOB, value=trial_comes_on_at),
    Reading(id="trial-lamp-dark-travel", tool=f"a {TRIAL_FILAMENT_W:.0f} W filament lamp as a trial load, your eyes "
                                             "and the knob",
            procedure=f"With the circuit isolated, connect a {TRIAL_FILAMENT_W:.0f} W filament lamp in place of the "
                      "lamps; from full, turn the knob slowly down to the bottom and note how much of the travel at "
                      "the bottom (0 none, 1 all) leaves the filament lamp without any glow",
            unit="of the knob's travel", resolution=0.05, resolution_origin=KNOB, value=trial_dark_travel),
    Reading(id="off-voltage", tool="a multimeter on AC volts",
            procedure="With the dimmer off and the lamps in, measure the voltage across the lamp terminals",
            unit="V", resolution=1.0,
            resolution_origin="from memory: a multimeter shows 0.1 V on its 600 V range; 1 V allows for a wandering reading",
            value=off_voltage_v),
    Reading(id="off-current", tool="a leakage clamp meter (or a multimeter on AC mA in series with the lamp feed, "
                                   "connected with the circuit isolated)",
            procedure="With the dimmer off and the lamps in, measure the current in the lamp feed",
            unit="A", resolution=0.0001,
            resolution_origin="from memory: a leakage clamp meter shows 0.01 mA; 0.1 mA allows for a wandering reading",
            value=off_current_a),
    Reading(id="full-current", tool="a true-rms clamp meter",
            procedure="With the knob at full, clamp the dimmer's switched live and read the current",
            unit="A", resolution=0.01, resolution_origin="from memory: a clamp meter's lowest AC range shows 0.01 A",
            value=full_current_a),
    Reading(id="crest-factor", tool="a true-rms clamp meter that shows crest factor (or peak and rms)",
            procedure="Clamp the dimmer's switched live and read the crest factor (peak over rms) across the knob's travel, the highest",
            unit="", resolution=0.1, resolution_origin="from memory: clamp meters show crest factor to 0.1",
            value=crest_factor),
    Reading(id="dc-current", tool="a clamp meter with a DC current range",
            procedure="Clamp one transformer's primary lead at the setting where it hums most and read the DC current",
            unit="A", resolution=0.01, resolution_origin="from memory: a DC clamp's lowest range shows 0.01 A",
            value=dc_current_a),
    Reading(id="trial-lamp-beside", tool=f"a {TRIAL_FILAMENT_W:.0f} W filament lamp as a trial load, your eyes and "
                                        "the knob",
            procedure=f"With the circuit isolated, connect a {TRIAL_FILAMENT_W:.0f} W filament lamp across the lamps "
                      "(beside them, the lamps left in); from full, turn the knob slowly to the bottom and judge how "
                      "bright the lamps themselves are at their dimmest (0 dark, 1 as at full)",
            unit="of full light", resolution=0.1,
            resolution_origin="engineering choice: near the bottom a tenth of full light looks like a third of it "
                              "(the square law of compat.perception), so a lamp's dimmest light is judged by eye, "
                              "beside the trial lamp, to a tenth of full",
            value=trial_beside_light),
    Reading(id="dimmed-current-ratio", tool="a true-rms clamp meter",
            procedure=f"Clamp the dimmer's switched live; read the current at about {DIM_RATIO_SETTING:g} of the "
                      "knob's travel and at full, and divide the first by the second",
            unit="", resolution=0.05,
            resolution_origin="engineering choice: two clamp readings of a few hundred mA, each to 0.01 A",
            value=dimmed_current_ratio),
)}

# The reading that shows each mechanism best.
TELLTALE: dict[Mechanism, str] = {
    Mechanism.LATCHING: "comes-on-at", Mechanism.HOLDING: "steady-down-to", Mechanism.PROTECTION: "crest-factor",
    Mechanism.NOT_DIMMABLE: "dimmed-current-ratio", Mechanism.SNUBBER_LEAK: "off-current",
    Mechanism.SELF_SUPPLY_LEAK: "off-current", Mechanism.TIMING_LEAK: "off-current",
    Mechanism.OVERLOAD: "full-current", Mechanism.CURRENT_SPIKES: "crest-factor",
    Mechanism.SWITCH_ON_SURGE: "full-current", Mechanism.DC_IN_CORE: "dc-current",
    Mechanism.TURN_OFF_SPIKE: "full-current",
    Mechanism.TIMING_HYSTERESIS: "on-off-gap", Mechanism.END_STOP: "trial-lamp-dark-travel",
    Mechanism.LAMP_START: "trial-lamp-comes-on-at", Mechanism.PHASE_UNSEEN: "trial-lamp-beside",
}
# Where a symptom has a better telltale for a mechanism than its usual one: lamps not
# made for dimming and lamps that cannot see the phase both draw full current dimmed;
# a filament lamp beside them lets only the second kind dim.
TELLTALE_FOR: dict[tuple[Symptom, Mechanism], str] = {
    (Symptom.STAYS_BRIGHT, Mechanism.NOT_DIMMABLE): "trial-lamp-beside",
}


def telltale(symptom: Symptom, m: Mechanism) -> str:
    """The id of the reading that shows mechanism ``m`` best for ``symptom``."""
    return TELLTALE_FOR.get((symptom, m), TELLTALE[m])


# ---------------------------------------------------------------- findings

@dataclass(frozen=True, slots=True, kw_only=True)
class Finding:
    """Does a mechanism reproduce the symptom in one case: yes or no, its excess over
    its threshold (quantity / limit − 1, positive beyond it; 0 where it has no figure),
    and one sentence with the figure."""

    reproduces: bool
    excess: float
    text: str


def _excess(r: CheckResult) -> float:
    """How far beyond its limit a check's value is, from its margin (−margin: 0.3 is 30 %
    beyond); 0 where the check has no margin."""
    return 0.0 if r.margin is None else float(-r.margin)


def _settings_in(pairs, lo: float, hi: float) -> list[float]:
    return sorted({float(s) for _, s in pairs if lo - 1e-9 <= float(s) <= hi + 1e-9})


def _flicker_region(symptom: Symptom) -> tuple[float, float]:
    return (0.0, LOW_SETTING_MAX) if symptom is Symptom.FLICKER_LOW else (0.0, 1.0)


def _switch_finding(m: Mechanism, symptom: Symptom, case: Case) -> Finding:
    """Latching or holding: from the check's failed settings and the sweep's curve."""
    cid = "latching" if m is Mechanism.LATCHING else "holding"
    r = case.checks[cid]
    if r.status is Status.NOT_APPLICABLE:
        return Finding(reproduces=False, excess=0.0, text=f"not applicable: {r.message}")
    failed = r.details.get("failed_settings", [])
    unsteady = r.details.get("unsteady_settings", failed if r.status is Status.FAIL else [])
    dr = case.checks["dimming-range"].details
    if symptom in (Symptom.FLICKER_LOW, Symptom.FLICKER_ALL):
        lo, hi = _flicker_region(symptom)
        where = _settings_in(unsteady if cid == "holding" else failed, lo + 1e-6, hi)
        ok = r.status is Status.FAIL and bool(where)
        if symptom is Symptom.FLICKER_ALL:
            ok = ok and any(s > LOW_SETTING_MAX for s in where)
        text = (f"{cid} fails at settings {', '.join(f'{s:.2f}' for s in where)}: {r.message}" if ok else
                f"{cid} is {r.status}" + (f" (failing settings {', '.join(f'{s:.2f}' for _, s in failed)})"
                                           if failed else "") + ": " + r.message)
        return Finding(reproduces=ok, excess=max(_excess(r), 0.0) + len(where) / 100.0 if ok else _excess(r), text=text)
    if symptom is Symptom.DROPS_OUT:
        down_to = steady_down_to(case)
        where = _settings_in([p for p in failed if p[0] == "down"], 0.0, down_to + 0.1)
        ok = down_to >= DROP_POP_MIN_SETTING and bool(where)
        return Finding(reproduces=ok, excess=down_to if ok else 0.0,
                       text=(f"turning down, the light stays steady only to setting {down_to:.2f}; {cid} fails "
                             f"going down at {', '.join(f'{s:.2f}' for s in where) or 'no setting'}"))
    if symptom is Symptom.POPS_ON:
        on = comes_on_at(case)
        # only a failure where the lamps are still dark (below the setting at which they
        # come on) keeps them from coming on; one at that setting is their start
        where = _settings_in([p for p in failed if p[0] == "up"], 0.0, (on or 0.0) - 1e-6)
        ok = on is not None and on >= DROP_POP_MIN_SETTING and bool(where)
        return Finding(reproduces=ok, excess=(on or 0.0) if ok else 0.0,
                       text=(f"turning up, the lamps come on at setting {on:.2f}" if on is not None else
                             "turning up, the lamps never come on") +
                            f"; {cid} fails going up at {', '.join(f'{s:.2f}' for s in where) or 'no setting'}")
    if symptom is Symptom.DEAD_TRAVEL:
        dead = float(dr.get("dead_travel") or 0.0)
        dark = [row["setting"] for row in dr.get("down", []) if row["light_fraction"] <= ck.LIT_FRACTION]
        where = _settings_in(failed, 0.0, max(dark) if dark else -1.0)
        ok = dead >= DEAD_TRAVEL_MIN and bool(where)
        return Finding(reproduces=ok, excess=dead if ok else 0.0,
                       text=(f"{100 * dead:.0f} % of the travel is dark; {cid} fails in it at "
                             f"{', '.join(f'{s:.2f}' for s in where) or 'no setting'}"))
    if symptom is Symptom.BUZZING:
        chatter = r.status in (Status.FAIL, Status.CAUTION) and bool(failed) and cid == "holding"
        return Finding(reproduces=chatter, excess=max(_excess(r), 0.0) if chatter else _excess(r),
                       text=f"holding is {r.status}: {r.message}")
    return Finding(reproduces=False, excess=0.0, text=f"{cid} does not produce this symptom")


def _protection_finding(symptom: Symptom, case: Case) -> Finding:
    c = case.circuit
    if c.dimmer.edge is not Edge.TRAILING:
        return Finding(reproduces=False, excess=0.0, text="a leading-edge dimmer has no over-current protection modelled")
    lo, hi = _flicker_region(symptom) if symptom in (Symptom.FLICKER_LOW, Symptom.FLICKER_ALL) else (0.0, 1.0)
    runs = [r for r in case.evidence.runs if lo - 1e-9 <= r.setting <= hi + 1e-9]
    trips = [r.setting for r in runs if ck.tripped_half_cycles(c, r)]
    if symptom is Symptom.FLICKER_ALL:
        ok = any(s > LOW_SETTING_MAX for s in trips)
    else:
        ok = bool(trips)
    peak = case.checks["repetitive-peak"]
    return Finding(reproduces=ok, excess=(peak.value or 0.0) / c.dimmer.trip_current_a - 1.0,
                   text=(f"the protection trips at settings {', '.join(f'{s:.2f}' for s in sorted(set(trips)))}"
                         if trips else f"the protection does not trip: peaks reach {peak.value or 0.0:.1f} A against "
                                       f"its {c.dimmer.trip_current_a:.1f} A trip level"))


def _check_finding(cid: str, case: Case, *, caution_counts: bool = False) -> Finding:
    r = case.checks[cid]
    bad = r.status is Status.FAIL or (caution_counts and r.status is Status.CAUTION)
    # a check without a figure that passes says nothing of how close it came: it ranks
    # below every mechanism with a figure
    excess = _excess(r) if (bad or r.margin is not None) else -math.inf
    return Finding(reproduces=bad, excess=excess, text=f"{cid} is {r.status}: {r.message}")


def _leak_finding(m: Mechanism, symptom: Symptom, case: Case) -> Finding:
    whole = case.checks["off-state"]
    alone = case.off_paths.get(m)
    if alone is None:
        return Finding(reproduces=False, excess=0.0, text="the dimmer has no such path")
    period = alone.details.get("flash_period_s")
    lit = alone.status is not Status.PASS
    glow = lit and (alone.status is Status.CAUTION or (period is not None and period < FLASH_MIN_PERIOD_S))
    flash = lit and not glow
    shows = glow if symptom is Symptom.GLOW_WHEN_OFF else flash
    leak_ma = 1000 * float(alone.details.get("leakage_rms_a", 0.0))
    text = (f"this path alone passes {leak_ma:.1f} mA and the lamps reach {alone.value or 0.0:.3f} % of full light "
            f"(visible above {alone.limit or 0.0:.1f} %)" + (
                f", {'a glow' if glow else 'flashes'}" if lit else ", too little to see"))
    ok = shows and whole.status is not Status.PASS
    return Finding(reproduces=ok, excess=_excess(alone), text=text)


def _overload_finding(symptom: Symptom, case: Case) -> Finding:
    c = case.circuit
    if symptom is Symptom.TRIPS_AT_SWITCH_ON:
        i = full_current_a(case) or 0.0
        if c.breaker is None:
            return Finding(reproduces=False, excess=0.0, text="no breaker is given for this circuit")
        rated = c.breaker.rated_current_a
        return Finding(reproduces=i > rated, excess=i / rated - 1.0,
                       text=f"the load draws {i:.2f} A at full against the breaker's rated {rated:g} A")
    rating, heat = case.checks["rating"], case.checks["dissipation"]
    worst = rating if _excess(rating) >= _excess(heat) else heat
    ok = rating.status is Status.FAIL or heat.status is Status.FAIL
    return Finding(reproduces=ok, excess=_excess(worst), text=f"{worst.id} is {worst.status}: {worst.message}")


def _spikes_finding(case: Case) -> Finding:
    r = case.checks["repetitive-peak"]
    ok = r.status is Status.FAIL and not r.details.get("protection_trips")
    if case.circuit.dimmer.edge is Edge.TRAILING and r.details.get("protection_trips"):
        ok = False
    inrush = case.checks["inrush"]
    if inrush.status is Status.FAIL:
        return Finding(reproduces=True, excess=max(_excess(r), _excess(inrush)),
                       text=f"inrush is {inrush.status}: {inrush.message}")
    return Finding(reproduces=ok, excess=_excess(r), text=f"repetitive-peak is {r.status}: {r.message}")


def _triggered(run) -> bool:
    """The dimmer's switch was triggered in at least one analysed half-cycle."""
    return bool(np.any(np.isfinite(run.half_cycles.firing_angle_deg)))


def _conducts(run, edge: Edge) -> bool:
    """Every analysed half-cycle fired, latched and (leading edge) held: the switch
    gives the lamps their conduction regularly."""
    hc = run.half_cycles
    held = edge is Edge.TRAILING or not np.any(hc.early_dropouts)
    return bool(len(hc) and np.all(np.isfinite(hc.firing_angle_deg)) and not np.any(hc.failed_latches) and held)


def _dark(run) -> bool:
    return run.point is None or run.point.light_fraction <= ck.LIT_FRACTION


def _pos(x: float | None) -> str:
    return "no setting" if x is None else f"{x:.2f}"


def _fmt(settings) -> str:
    return ", ".join(f"{s:.2f}" for s in settings) or "no setting"


def _late_start_finding(m: Mechanism, symptom: Symptom, case: Case) -> Finding:
    """The timing network's hysteresis, the dimmer's end stop and the lamps' start, read
    from the sweeps: at the settings the lamps are dark (below where they come on turning
    up; the dead travel turning down), does the switch fire at all, and does it conduct?"""
    edge = case.circuit.dimmer.edge
    if symptom is Symptom.POPS_ON:
        on = comes_on_at(case)
        if on is None or on < DROP_POP_MIN_SETTING:
            return Finding(reproduces=False, excess=0.0,
                           text=("turning up, the lamps never come on" if on is None else
                                 f"turning up, the lamps come on at setting {on:.2f}, near the bottom"))
        below = [r for r in case.evidence.up if r.setting < on - 1e-9]
        up, down = case.fire_up, case.fire_down
        if m is Mechanism.TIMING_HYSTERESIS:
            hyst = (up - down) if (up is not None and down is not None) else 0.0
            ok = up is not None and up >= DROP_POP_MIN_SETTING and hyst >= HYSTERESIS_MIN
            return Finding(reproduces=ok, excess=hyst if ok else 0.0,
                           text=(f"turning up, the lamps come on at setting {on:.2f}; from off the dimmer first fires "
                                 f"at {_pos(up)}, and once firing it fires turning down to {_pos(down)}"
                                 + (f": {hyst:.2f} of the travel where it fires only if it fired before" if ok else "")))
        if m is Mechanism.END_STOP:
            ok = down is None or down >= DROP_POP_MIN_SETTING
            return Finding(reproduces=ok, excess=(on if down is None else down) if ok else 0.0,
                           text=(f"turning up, the lamps come on at setting {on:.2f}; turning down, the dimmer "
                                 + ("fires at no setting" if down is None else f"stops firing below {down:.2f}")))
        where = [r.setting for r in below if _conducts(r, edge) and _dark(r)]
        ok = bool(where)
        return Finding(reproduces=ok, excess=on - min(where) if ok else 0.0,
                       text=f"turning up, the lamps come on at setting {on:.2f}; below it the switch conducts in "
                            f"every half-cycle with the lamps dark at {_fmt(where)}")
    if symptom is Symptom.DEAD_TRAVEL:
        dr = case.checks["dimming-range"].details
        dead = float(dr.get("dead_travel") or 0.0)
        settings = [r.setting for r in case.evidence.down]
        dark = [r for r in case.evidence.down if _dark(r)]
        if m is Mechanism.END_STOP:
            where = [r.setting for r in dark if not _triggered(r)]
            what = "the dimmer does not fire at all at"
        else:
            where = [r.setting for r in dark if _conducts(r, edge)]
            what = "the switch conducts in every half-cycle with the lamps dark at"
        share = _knob_share(settings, where)
        ok = dead >= DEAD_TRAVEL_MIN and share >= DEAD_TRAVEL_MIN
        return Finding(reproduces=ok, excess=share if ok else 0.0,
                       text=f"{100 * dead:.0f} % of the travel is dark; {what} {_fmt(where)}")
    return Finding(reproduces=False, excess=0.0, text=f"{m} does not produce this symptom")


def _unseen_finding(case: Case) -> Finding:
    """Lamps that cannot see the phase (``compat.phase_sense``, read from dimming-range)
    and stay bright: their lowest steady light at least ``STAYS_BRIGHT_MIN``."""
    found = case.checks["dimming-range"].details.get("phase_unseen")
    low = lowest_steady_light(case)
    low_text = ("the lamps never give steady light" if low is None else
                f"their lowest steady light is {100 * low:.0f} %")
    if found is None:
        reads = any(isinstance(g, ElectronicDriver) and g.dimmable for g in case.circuit.loads)
        return Finding(reproduces=False, excess=-1.0,
                       text=("the lamps see the dimmer's phase" if reads else
                             "no lamp on the circuit is made for dimming, so none reads the phase") + f"; {low_text}")
    misread = found["seen_share"] - found["switch_share"]
    ok = low is not None and low >= STAYS_BRIGHT_MIN
    return Finding(reproduces=ok, excess=misread / phase_sense.MISREAD_SHARE - 1.0,
                   text=phase_sense.sentence(found) + f"; {low_text}")


def finding(m: Mechanism, symptom: Symptom, case: Case) -> Finding:
    """Whether mechanism ``m`` reproduces ``symptom`` in ``case``."""
    if m in (Mechanism.LATCHING, Mechanism.HOLDING):
        return _switch_finding(m, symptom, case)
    if m is Mechanism.PROTECTION:
        return _protection_finding(symptom, case)
    if m is Mechanism.NOT_DIMMABLE:
        return _check_finding("dimmable", case)
    if m in (Mechanism.SNUBBER_LEAK, Mechanism.SELF_SUPPLY_LEAK, Mechanism.TIMING_LEAK):
        return _leak_finding(m, symptom, case)
    if m is Mechanism.OVERLOAD:
        return _overload_finding(symptom, case)
    if m is Mechanism.CURRENT_SPIKES:
        return _spikes_finding(case)
    if m is Mechanism.SWITCH_ON_SURGE:
        # a surge the breaker "may still" trip on (rides through by its impulse, not by
        # its peak) is a possible cause once the installer has seen it trip
        return _check_finding("breaker", case, caution_counts=True)
    if m is Mechanism.DC_IN_CORE:
        return _check_finding("dc-offset", case, caution_counts=(symptom is Symptom.BUZZING))
    if m is Mechanism.TURN_OFF_SPIKE:
        return _check_finding("turn-off-surge", case)
    if m in (Mechanism.TIMING_HYSTERESIS, Mechanism.END_STOP, Mechanism.LAMP_START):
        return _late_start_finding(m, symptom, case)
    if m is Mechanism.PHASE_UNSEEN:
        return _unseen_finding(case)
    raise ValueError(m)


# ---------------------------------------------------------------- observations

@dataclass(frozen=True, slots=True, kw_only=True)
class Observation:
    """What the installer saw, as a key and a value: a reading (``READINGS`` id, the
    value in its unit, kept when the case's reading is within ``tolerance``) or a yes/no
    (``glows``: the lamps show light with the dimmer off)."""

    key: str
    value: float


# Observation keys: the key, the reading it is compared with, and the tolerance within
# which a case agrees (engineering choice: twice the reading's resolution, and 10 % for
# meter readings, whichever is larger).
OBSERVATIONS = {
    "steady_down_to": "steady-down-to", "comes_on_at": "comes-on-at", "off_voltage_v": "off-voltage",
    "off_current_a": "off-current",
    "full_current_a": "full-current", "crest_factor": "crest-factor", "dc_current_a": "dc-current",
    "trial_lamp_beside": "trial-lamp-beside",
    "light_when_off": None,
}


def parse_observation(text: str) -> Observation:
    """``KEY=VALUE`` from the command line: a reading key with a number (a knob position
    0–1, or with ``%`` 0–100), or ``light_when_off=yes|no``."""
    key, sep, raw = text.partition("=")
    key, raw = key.strip(), raw.strip()
    if not sep or key not in OBSERVATIONS:
        raise InputError(f"unknown observation {text!r}; known: " + ", ".join(f"{k}=…" for k in OBSERVATIONS),
                         key="--observed")
    if OBSERVATIONS[key] is None:
        if raw.lower() not in ("yes", "no"):
            raise InputError(f"{raw!r} is not yes or no", key=f"--observed {key}")
        return Observation(key=key, value=1.0 if raw.lower() == "yes" else 0.0)
    pct = raw.endswith("%")
    try:
        v = float(raw.rstrip("%").strip())
    except ValueError:
        raise InputError(f"{raw!r} is not a number", key=f"--observed {key}") from None
    if pct:
        v /= 100.0
    share = key in ("steady_down_to", "comes_on_at", "trial_lamp_beside")
    if not math.isfinite(v) or v < 0 or (share and v > 1.0):
        raise InputError(f"{raw!r} is out of range" + (" (a share 0–1 or 0–100 %)" if share else ""),
                         key=f"--observed {key}")
    return Observation(key=key, value=v)


def agrees(case: Case, obs: Observation) -> bool:
    """Does the case's simulated reading agree with what was seen."""
    if obs.key == "light_when_off":
        return (case.checks["off-state"].status is not Status.PASS) == (obs.value > 0.5)
    rd = READINGS[OBSERVATIONS[obs.key]]
    v = rd.value(case)
    if obs.key == "comes_on_at" and v is None:
        return False
    if v is None:
        return False
    tol = max(2 * rd.resolution, 0.10 * abs(obs.value)) if rd.unit not in ("of the knob's travel",) else 2 * rd.resolution
    return abs(v - obs.value) <= tol + 1e-12


# ---------------------------------------------------------------- the diagnosis

@dataclass(frozen=True, slots=True, kw_only=True)
class Ranked:
    """One mechanism's standing: score [0, 1], cases where it reproduces the symptom,
    its best excess, the sentence from its best case, and the label of that case."""

    mechanism: Mechanism
    score: float
    cases_reproducing: tuple[str, ...]
    excess: float
    evidence: str
    best_case: str
    applies: bool = True


@dataclass(frozen=True, slots=True, kw_only=True)
class Separation:
    """The measurement that tells the leading mechanism from the runner-up: the reading,
    where it is taken from (case labels), the value expected if each is the cause."""

    reading: Reading
    top: Mechanism
    runner_up: Mechanism
    expected_if_top: float | None
    expected_if_runner_up: float | None
    top_case: str
    runner_up_case: str
    runner_up_at_least: bool = False      # expected_if_runner_up is the least it would read
    runner_up_acts: bool = True           # False: the runner-up reproduces the symptom in no case; its
                                          # reading is from the case where it comes closest

    @property
    def separates(self) -> bool:
        a, b = self.expected_if_top, self.expected_if_runner_up
        if a is None or b is None:
            return False
        if self.runner_up_at_least:
            return a < b - self.reading.resolution
        return abs(a - b) > self.reading.resolution


@dataclass(frozen=True, slots=True, kw_only=True)
class Diagnosis:
    """Everything ``diagnose`` found (keys of ``to_json``: README, diagnose --json)."""

    circuit: str
    symptom: Symptom
    unknowns: tuple[Unknown, ...]
    narrowed: dict
    observations: tuple[Observation, ...]
    cases_run: int
    cases_kept: tuple[str, ...]
    ranked: tuple[Ranked, ...]
    separations: dict
    remedies: dict
    trial_plan: tuple[str, ...]
    verdict: str
    notes: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()

    @property
    def possible(self) -> tuple[Ranked, ...]:
        return tuple(r for r in self.ranked if r.score > 0)

    def to_json(self) -> dict:
        def num(x):
            return None if x is None or not math.isfinite(float(x)) else float(x)

        def sep_json(s: Separation | None):
            if s is None:
                return None
            return {"reading": s.reading.id, "tool": s.reading.tool, "procedure": s.reading.procedure,
                    "unit": s.reading.unit, "resolution": s.reading.resolution,
                    "resolution_origin": s.reading.resolution_origin, "runner_up": str(s.runner_up),
                    "expected_if_cause": num(s.expected_if_top), "expected_if_runner_up": num(s.expected_if_runner_up),
                    "separates": s.separates, "case": s.top_case, "runner_up_case": s.runner_up_case,
                    "runner_up_at_least": s.runner_up_at_least, "runner_up_acts": s.runner_up_acts}

        return {
            "schema": 1, "circuit": self.circuit, "symptom": str(self.symptom), "verdict": self.verdict,
            "unknowns": [{"key": u.file_key, "low": u.low, "high": u.high, "origin": u.origin, "why": u.why,
                          "narrowed_low": self.narrowed.get(u.path, (u.low, u.high))[0],
                          "narrowed_high": self.narrowed.get(u.path, (u.low, u.high))[1],
                          "narrowed": u.path in self.narrowed} for u in self.unknowns],
            "observations": [{"key": o.key, "value": o.value} for o in self.observations],
            "cases_run": self.cases_run, "cases_kept": list(self.cases_kept),
            "mechanisms": [{"id": str(r.mechanism), "score": r.score, "reproduces": r.score > 0,
                            "cases_reproducing": list(r.cases_reproducing), "excess": num(r.excess),
                            "description": MECHANISM_TEXT[r.mechanism], "evidence": r.evidence,
                            "measurement": sep_json(self.separations.get(r.mechanism)),
                            "remedy": self.remedies.get(r.mechanism)} for r in self.ranked],
            "trial_plan": list(self.trial_plan), "notes": list(self.notes), "cautions": list(self.cautions),
        }


def rank(symptom: Symptom, cases: Sequence[Case]) -> list[Ranked]:
    """Every candidate mechanism of the symptom, best first (score, then excess)."""
    out = []
    for m in CANDIDATES[symptom]:
        why_not = applies(m, cases[0].circuit) if cases else None
        if why_not is not None:
            out.append(Ranked(mechanism=m, score=0.0, cases_reproducing=(), excess=-math.inf,
                              evidence=f"does not apply: {why_not}", best_case=cases[0].label, applies=False))
            continue
        found = [(c, finding(m, symptom, c)) for c in cases]
        yes = [(c, f) for c, f in found if f.reproduces]
        pool = yes or found
        best_c, best_f = max(pool, key=lambda cf: cf[1].excess)
        out.append(Ranked(mechanism=m, score=len(yes) / len(cases) if cases else 0.0,
                          cases_reproducing=tuple(c.label for c, _ in yes), excess=best_f.excess,
                          evidence=best_f.text, best_case=best_c.label))
    out.sort(key=lambda r: (-r.score, not r.applies, -r.excess, CANDIDATES[symptom].index(r.mechanism)))
    return out


def applies(m: Mechanism, circuit: Circuit) -> str | None:
    """None if mechanism ``m`` can act in this circuit, else why it cannot."""
    d = circuit.dimmer
    if m in (Mechanism.LATCHING, Mechanism.HOLDING) and d.edge is not Edge.LEADING:
        return "a trailing-edge dimmer's transistor switch needs no latching or holding current"
    if m in (Mechanism.PROTECTION, Mechanism.TURN_OFF_SPIKE) and d.edge is not Edge.TRAILING:
        return "a leading-edge dimmer turns off at current zero and has no over-current protection modelled"
    if m is Mechanism.NOT_DIMMABLE and not any(isinstance(g, ElectronicDriver) for g in circuit.loads):
        return "no LED lamp or driver on the circuit"
    if m is Mechanism.PHASE_UNSEEN and not any(isinstance(g, ElectronicDriver) for g in circuit.loads):
        return "no LED lamp or driver on the circuit: nothing reads the dimmer's phase"
    if m is Mechanism.DC_IN_CORE and not any(isinstance(g, MagneticTransformer) for g in circuit.loads):
        return "no iron-core transformer on the circuit"
    if m is Mechanism.SNUBBER_LEAK and d.snubber_capacitance_f <= 0:
        return "the dimmer has no snubber capacitor"
    if m is Mechanism.SELF_SUPPLY_LEAK and d.wiring is not Wiring.TWO_WIRE:
        return "a dimmer with a neutral takes its own supply from the neutral, not through the lamps"
    if m is Mechanism.TIMING_LEAK and d.control is not Control.RC_DIAC:
        return "the dimmer has no rc-diac timing network"
    if m is Mechanism.TIMING_HYSTERESIS and d.control is not Control.RC_DIAC:
        return ("the dimmer has no rc-diac timing network: its controller fires at the set angle whatever the "
                "half-cycle before did")
    if m is Mechanism.LAMP_START and not any(isinstance(g, (ElectronicDriver, ElectronicTransformer))
                                             for g in circuit.loads):
        return "no lamp with a converter that needs a start voltage (LED lamp, driver, electronic transformer)"
    if m in (Mechanism.SWITCH_ON_SURGE,) and circuit.breaker is None:
        return "no breaker is given for this circuit"
    return None


# Engineering choice: the holding and latching currents of a sensitive triac, used to
# show the circuit without a holding or latching failure (the low end of WIDEN's spans).
CURED_HOLDING_A = 0.005
CURED_LATCHING_A = 0.005
# Engineering choice: a lamp with a low start, used to show the circuit without the
# lamps' start mechanism (the driver model's default start, a fifth of the 230 V peak).
CURED_START_V = 60.0


def cured(m: Mechanism, circuit: Circuit) -> Circuit | None:
    """The circuit without mechanism ``m`` (the part that causes it changed so that it
    cannot act), for the reading expected if another mechanism were the cause; None
    where no single part stands for the mechanism."""
    d = circuit.dimmer
    if m is Mechanism.HOLDING:
        new = dataclasses.replace(d, holding_current_a=CURED_HOLDING_A,
                                  latching_current_a=max(d.latching_current_a, CURED_HOLDING_A))
    elif m is Mechanism.LATCHING:
        new = dataclasses.replace(d, latching_current_a=max(d.holding_current_a, CURED_LATCHING_A))
    elif m is Mechanism.SNUBBER_LEAK:
        new = dataclasses.replace(d, snubber_capacitance_f=0.0)
    elif m is Mechanism.SELF_SUPPLY_LEAK:
        new = dataclasses.replace(d, self_supply_a=0.0)
    elif m is Mechanism.DC_IN_CORE:
        if d.control is Control.RC_DIAC and d.rc_diac is not None:
            new = dataclasses.replace(d, rc_diac=dataclasses.replace(d.rc_diac, asymmetry_v=0.0))
        else:
            new = dataclasses.replace(d, gate_drive="until-latched")
    elif m is Mechanism.NOT_DIMMABLE:
        loads = tuple(dataclasses.replace(g, dimmable=True) if isinstance(g, ElectronicDriver) else g
                      for g in circuit.loads)
        return dataclasses.replace(circuit, loads=loads, ranges=())
    elif m is Mechanism.PROTECTION:
        new = dataclasses.replace(d, trip_current_a=10 * d.trip_current_a)
    elif m in (Mechanism.TIMING_HYSTERESIS, Mechanism.END_STOP):
        if d.control is not Control.RC_DIAC:
            return None
        new = dataclasses.replace(d, control=Control.PHASE)       # the cure offered: an electronic phase dimmer
    elif m is Mechanism.PHASE_UNSEEN:
        return phase_sense.with_bleeders(circuit)[0]
    elif m is Mechanism.LAMP_START:
        starts = [g for g in circuit.loads if isinstance(g, ElectronicDriver) and g.start_voltage_v > CURED_START_V]
        if not starts:
            return None
        loads = tuple(dataclasses.replace(g, start_voltage_v=CURED_START_V, stop_voltage_v=None) if g in starts else g
                      for g in circuit.loads)
        return dataclasses.replace(circuit, loads=loads, ranges=())
    else:
        return None
    return dataclasses.replace(circuit, dimmer=new, ranges=())


def _run_case(label: str, key: str, circuit: Circuit, values: dict, symptom: Symptom, sim, cancel=None) -> Case:
    ev = gather(circuit, settings=DIAGNOSE_SETTINGS, simulator=sim, cancel=cancel)
    grid = settings_grid(DIAGNOSE_SETTINGS)
    off_paths = {}
    if symptom in (Symptom.GLOW_WHEN_OFF, Symptom.FLASHES_WHEN_OFF):
        off_paths = {m: _off_result(pc, sim) for m, pc in leakage_paths(circuit).items()}
    trial_up = trial_down = ()
    fire_up = fire_down = None
    if symptom in (Symptom.POPS_ON, Symptom.DEAD_TRAVEL):
        trial = trial_circuit(circuit)
        trial_up = walk(trial, grid, "up", sim, cancel=cancel)
        trial_down = walk(trial, grid, "down", sim, cancel=cancel)
        fire_up, fire_down = firing_thresholds(circuit, ev, sim, cancel)
    beside_down = ()
    if symptom is Symptom.STAYS_BRIGHT:
        beside_down = walk(beside_circuit(circuit), grid, "down", sim, cancel=cancel)
    return Case(label=label, key=key, values=values, evidence=ev, checks={r.id: r for r in judge(ev)},
                off_paths=off_paths, trial_up=trial_up, trial_down=trial_down, fire_up=fire_up, fire_down=fire_down,
                beside_down=beside_down)


def separation(symptom: Symptom, cases: Sequence[Case], a: Ranked, b: Ranked, *, simulator=None,
               cancel=None) -> Separation:
    """The reading that tells mechanism ``a`` (the cause) from ``b``.  Expected if ``a``
    is the cause: in the case where ``a`` is strongest.  Expected if ``b`` is: in the
    case where ``b`` is strongest without ``a``; where ``a`` acts in every case, in
    ``b``'s strongest case with ``a`` cured (``cured``: one more simulated case).  The
    reading is ``a``'s telltale if it tells them apart by more than its resolution, else
    ``b``'s, else the telltale of any candidate that differs most."""
    by_label = {c.label: c for c in cases}
    ca = by_label[a.best_case]

    def strength(c):
        f = finding(b.mechanism, symptom, c)
        return (f.reproduces, f.excess)

    without_a = [c for c in cases if not finding(a.mechanism, symptom, c).reproduces]
    if without_a:
        cb = max(without_a, key=strength)
    else:
        base = max(cases, key=strength)
        fixed = cured(a.mechanism, base.circuit)
        if fixed is None:
            cb = base
        else:
            cb = _run_case(f"{base.label}, without {a.mechanism}", base.key, fixed, base.values, symptom,
                           simulator or default_simulator(), cancel)
    acts = finding(b.mechanism, symptom, cb).reproduces
    ids = [telltale(symptom, a.mechanism), telltale(symptom, b.mechanism)] + [telltale(symptom, m)
                                                                               for m in CANDIDATES[symptom]]
    found = []          # (gap in resolutions, reading, expected if a, if b, where b's figure is from, at least, b acts)
    for rid in dict.fromkeys(ids):
        rd = READINGS[rid]
        va, vb = rd.value(ca), rd.value(cb)
        gap = abs(va - vb) / rd.resolution if va is not None and vb is not None else -1.0
        found.append((gap, rd, va, vb, cb.label, False, acts))
    # the runner-up's own telltale against the least it reads where it acts
    rd = READINGS[telltale(symptom, b.mechanism)]
    bound, va = presence_bound(b.mechanism, symptom, ca), rd.value(ca)
    if bound is not None and va is not None:
        found.insert(2, ((bound - va) / rd.resolution, rd, va, bound, f"where {b.mechanism} would act", True, True))
    # a reading from a case where the runner-up does not act says nothing of it: used
    # only when no reading from a case (or a bound) where it acts tells them apart
    pick = (next((f for f in found[:3] if f[0] > 1.0 and f[6]), None)
            or max((f for f in found if f[6]), key=lambda f: f[0], default=None))
    if pick is None or pick[0] <= 1.0:
        # the runner-up acts nowhere: the cause's own telltale where it tells them apart
        # (the reading made for it), else the reading that differs most
        pick = found[0] if found[0][0] > 1.0 else max(found, key=lambda f: f[0])
    _, rd, va, vb, label_b, at_least, b_acts = pick
    return Separation(reading=rd, top=a.mechanism, runner_up=b.mechanism, expected_if_top=va, expected_if_runner_up=vb,
                      top_case=ca.label, runner_up_case=label_b, runner_up_at_least=at_least, runner_up_acts=b_acts)


# Engineering choice: a lamp that draws 90 % or more of its full current at a third of
# the knob's travel is not dimming (a dimmable lamp draws well under that).
NOT_DIMMING_RATIO = 0.9


def presence_bound(m: Mechanism, symptom: Symptom, case: Case) -> float | None:
    """The least value of ``m``'s telltale reading at which ``m`` acts in ``case``
    (its check's limit expressed in the reading), or None where it has none."""
    c = case.circuit
    if m is Mechanism.OVERLOAD:
        if symptom is Symptom.TRIPS_AT_SWITCH_ON:
            return None if c.breaker is None else c.breaker.rated_current_a
        return c.dimmer.rated_load_w * derating.derating_factor(c.dimmer) / c.supply.voltage_v
    if m is Mechanism.CURRENT_SPIKES:
        r = case.checks["repetitive-peak"]
        crest = r.details.get("crest_factor")
        return None if not crest or not r.value or r.limit is None else crest * r.limit / r.value
    if m is Mechanism.DC_IN_CORE:
        r = case.checks["dc-offset"]
        return None if r.limit is None else (0.5 if symptom is Symptom.BUZZING else 1.0) * r.limit
    if m is Mechanism.NOT_DIMMABLE:
        # lamps that ignore the phase draw as they did with a trial lamp beside them, so
        # where they are the cause of lamps staying bright they read at least the
        # symptom's own threshold on the trial (engineering approximation)
        return STAYS_BRIGHT_MIN if symptom is Symptom.STAYS_BRIGHT else NOT_DIMMING_RATIO
    return None


def remedy(m: Mechanism, case: Case) -> str:
    """The remedy for mechanism ``m`` in ``case``, with the sizing that needs no search
    (``compat.sizing``: the correction device's parts, the rating needed, the breaker
    curve); the capacitance of a correction device is searched by ``dimfit size``."""
    c = case.circuit
    checks = case.checks
    if m in (Mechanism.LATCHING, Mechanism.HOLDING, Mechanism.SNUBBER_LEAK, Mechanism.SELF_SUPPLY_LEAK,
             Mechanism.TIMING_LEAK):
        cid = {Mechanism.LATCHING: "latching", Mechanism.HOLDING: "holding"}.get(m, "off-state")
        base = checks[cid].remedy or ""
        if c.correction is None:
            r_ohm = sizing.correction_resistances_ohm(c)[0]
            x2 = sizing.x2_rating_v(c.supply.voltage_v)
            base += (f" A load-correction device across the lamps: an E12 {r_ohm:.0f} Ω resistor (it holds the "
                     f"firing spike to {sizing.CORRECTION_SPIKE_A:g} A) in series with a class X2 capacitor"
                     + (f" rated {x2:.0f} V AC or more" if x2 else "")
                     + "; `dimfit size FILE` finds the smallest capacitance that works.")
        if m is Mechanism.HOLDING or m is Mechanism.LATCHING:
            base += " A trial filament lamp added across the lamps shows at once whether more current cures it."
        return base.strip()
    if m is Mechanism.OVERLOAD:
        use = derating.rating_use(c.dimmer, c.loads)
        need = c.dimmer.rated_load_w * use.utilisation
        return ((checks["rating"].remedy or "Reduce the load on the dimmer.")
                + f" The load needs a dimmer printed for at least {need:.0f} W (filament), at the derating "
                  f"factor {use.factor:.2f}; or split the lamps over two dimmers.")
    if m is Mechanism.SWITCH_ON_SURGE:
        b = checks["breaker"]
        text = b.remedy or "Split the lamps over more circuits, or choose lamps with a lower switch-on surge."
        if c.breaker is not None and "peak_current_a" in b.details:
            curve = breaker_band.holding_curve(b.details["peak_current_a"], c.breaker.rated_current_a,
                                               i2t_a2s=b.details["i2t_a2s"], frequency_hz=c.supply.frequency_hz)
            if curve is None:
                text += " No B, C or D curve at this rating is sure to hold the surge: split the lamps."
            if not b.details.get("max_counts"):
                counts = breaker_max_counts(c)
                text += " The breaker holds at most " + "; ".join(f"{n} × {k}" for k, n in counts.items()) + \
                        " (the other groups as they are)."
        return text + " Never replace the breaker with a larger rating than the cable allows."
    if m is Mechanism.CURRENT_SPIKES:
        return checks["repetitive-peak"].remedy or checks["inrush"].remedy or "Fewer capacitor-input lamps per dimmer."
    if m is Mechanism.PROTECTION:
        return checks["repetitive-peak"].remedy or "Fewer capacitor-input lamps, or a dimmer with a higher rating."
    if m is Mechanism.DC_IN_CORE:
        return checks["dc-offset"].remedy or "A dimmer with symmetric firing made for iron-core transformers."
    if m is Mechanism.NOT_DIMMABLE:
        return checks["dimmable"].remedy or "Fit lamps marked dimmable, or a plain switch."
    if m is Mechanism.TURN_OFF_SPIKE:
        return checks["turn-off-surge"].remedy or "A leading-edge dimmer for iron-core transformers."
    if m in (Mechanism.TIMING_HYSTERESIS, Mechanism.END_STOP):
        what = ("the lamps come on turning up where they went out turning down" if m is Mechanism.TIMING_HYSTERESIS
                else "the dimmer fires from the bottom of the knob")
        if c.dimmer.low_end_trim:
            return (f"Set the dimmer's low-end trim (its preset) so that {what}: raise it until a filament lamp "
                    "glows at the bottom of the knob, then check the lamps come on there from off.")
        why = ("fires at the set angle whatever the half-cycle before did" if m is Mechanism.TIMING_HYSTERESIS
               else "fires at every position of the knob")
        return (f"A dimmer with a low-end trim (preset), set so that {what}, or an electronic phase dimmer, whose "
                f"controller {why}; otherwise tell the user where on the knob the light begins.")
    if m is Mechanism.PHASE_UNSEEN:
        groups = [g for g in c.loads if isinstance(g, ElectronicDriver) and g.dimmable]
        need = "; ".join(f"{g.name}: about {1000 * phase_sense.bleeder_needed_a(g, c.supply.frequency_hz):.0f} mA per lamp with "
                         f"{1e9 * g.input_capacitance_f:.0f} nF across its input"
                         + (f", where its own bleeder gives {1000 * g.bleeder_a:g} mA" if g.bleeder_a > 0 else "")
                         for g in groups)
        what = "a stronger bleeder" if any(g.bleeder_a > 0 for g in groups) else "a bleeder"
        return (f"Lamps or drivers with {what}, made for this dimmer's edge: while the switch is off the bleeder must "
                "pull each lamp's terminals from the crest to its phase detector's level within a quarter of a "
                f"half-cycle ({need}; closed form C·ΔV/Δt). A filament lamp left on the circuit does the same, as the "
                "trial shows.")
    if m is Mechanism.LAMP_START:
        if c.dimmer.low_end_trim:
            return ("Set the dimmer's low-end trim (its preset) up to the position at which the lamps come on from "
                    "off, so that the bottom of the knob gives them the conduction they need to start.")
        return ("Lamps with a lower start (made for phase dimmers: they start at the conduction the bottom of the knob "
                "gives), or a dimmer with a low-end trim set to the position at which these lamps come on.")
    return ""


def _sizing_case(r: Ranked, kept: Sequence[Case], by_label: dict) -> Case:
    """The case a remedy is sized on: the mechanism's strongest case, except that a
    bleeder is sized on the reproducing case with the most input capacitance (a bleeder
    big enough there is big enough for every lamp the unknowns allow)."""
    if r.mechanism is Mechanism.PHASE_UNSEEN:
        pool = [c for c in kept if c.label in r.cases_reproducing] or list(kept)
        return max(pool, key=lambda c: sum(g.count * g.input_capacitance_f for g in c.circuit.loads
                                            if isinstance(g, ElectronicDriver)))
    return by_label[r.best_case]


def _narrow(unknowns: Sequence[Unknown], kept: Sequence[Case], all_cases: Sequence[Case]) -> dict:
    """For each unknown, the span of its values over the cases kept, where that is
    narrower than over all cases: path → (low, high) [SI]."""
    out = {}
    for u in unknowns:
        before = [c.values[u.path] for c in all_cases]
        after = [c.values[u.path] for c in kept]
        lo, hi = min(after), max(after)
        if lo > min(before) + 1e-15 or hi < max(before) - 1e-15:
            out[u.path] = (lo, hi)
    return out


def diagnose(circuit: Circuit, symptom: Symptom | str, *, observations: Sequence[Observation] = (),
             simulator=None, cancel=None, progress=None) -> Diagnosis:
    """Which modelled mechanisms reproduce ``symptom`` on ``circuit`` over its unknowns
    (see the module docstring)."""
    from compat.trial_plan import trial_plan

    symptom = Symptom(symptom)
    unknowns = unknowns_for(circuit, symptom)
    cases = run_cases(circuit, unknowns, symptom=symptom, simulator=simulator, cancel=cancel, progress=progress)
    notes = []
    kept = [c for c in cases if all(agrees(c, o) for o in observations)]
    if observations and not kept:
        notes.append("No simulated case agrees with every observation: the diagnosis keeps them all; look for a "
                     "fault outside the model (a loose connection, a failing part) or check the readings.")
        kept = list(cases)
    narrowed = _narrow(unknowns, kept, cases) if observations else {}
    ranked = rank(symptom, kept)
    possible = [r for r in ranked if r.score > 0]
    seps, rems = {}, {}
    by_label = {c.label: c for c in kept}
    for i, r in enumerate(possible):
        other = next((x for x in ranked if x is not r and x.applies), None)
        if other is not None:
            seps[r.mechanism] = separation(symptom, kept, r, other, simulator=simulator, cancel=cancel)
        rems[r.mechanism] = remedy(r.mechanism, _sizing_case(r, kept, by_label))
    if not possible:
        notes.append("No modelled mechanism reproduces this symptom on this circuit over its unknowns: look for a "
                     "fault outside the model (a loose or overheated connection, a failing lamp or dimmer).")
    # the verdict over the cases kept, as compat.evaluate combines range ends
    nominal = [kept[0].checks[cid] for cid in ck.CHECK_IDS]
    others = [(c.key, [c.checks[cid] for cid in ck.CHECK_IDS]) for c in kept[1:]]
    results = combine(nominal, others) if others else nominal
    report = Report(circuit=circuit.name, verdict=overall(results), checks=tuple(results), cautions=attached_cautions())
    plan = trial_plan(circuit, report, symptom=str(symptom),
                      telltales=[seps[r.mechanism] for r in possible if r.mechanism in seps])
    return Diagnosis(circuit=circuit.name, symptom=symptom, unknowns=unknowns, narrowed=narrowed,
                     observations=tuple(observations), cases_run=len(cases), cases_kept=tuple(c.label for c in kept),
                     ranked=tuple(ranked), separations=seps, remedies=rems, trial_plan=tuple(plan),
                     verdict=str(report.verdict), notes=tuple(notes), cautions=attached_cautions())
