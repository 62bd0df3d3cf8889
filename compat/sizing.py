"""Remedies found by searching the simulation (docs/design.md, Remedies and sizing).

* lamp counts: for each group, the fewest and the most units that pass, by bisection
  on the count — the checks that fail with too few lamps (minimum load, latching,
  holding, off-state, dimming range, flicker) and those that fail with too many
  (rating, peaks, inrush, breaker, harmonics, dissipation) are searched separately;
* load-correction device: the smallest series R–C (a ``Linear`` with
  ``series_capacitance_f`` in ``Circuit.correction``) that makes a failing circuit
  pass, found by a scan of preferred (E3, then E6) capacitances, with its loss;
* the dimmer edge that would pass, and the derated rating the load needs;
* the breaker curve whose instantaneous band holds the switch-on surge, and how many
  units of each group a given breaker holds.

The searches run a coarser sweep than ``evaluate`` (``SEARCH_SETTINGS`` points); the
correction device is then confirmed by a full ``evaluate``.  A probe of the correction
search, asked only pass or fail, stops at its first failure that the full judging
cannot excuse (``_FailureWatch``).  The rating check bounds the lamp counts before any
simulation, and the circuit as it is is judged by its own full evaluation.
"""
from __future__ import annotations

import dataclasses
import math
from concurrent.futures import ThreadPoolExecutor
from functools import lru_cache
from threading import Event, Lock

import numpy as np

from compat import breaker_band, derating, phase_sense
from compat import checks as ck
from compat.evaluate import (MIN_SETTINGS, TRIM_MAX_SETTING, UNTRIMMED_MAX_SETTING, evaluate, gather, judge,
                             light_weights)
from compat.report import Status, Verdict
from compat.runs import Cancelled, SettingRun
from compat.switch_on import (MAX_COUNT, breaker_max_counts, default_simulator, max_passing, min_passing,
                               peak_line_current_a, switch_on_runs, with_count)
from loads.circuit import Circuit
from loads.dimmer import Control, Dimmer, Edge
from loads.linear import Linear

# Engineering choice: 11 settings are enough to find where a count starts to fail; the
# final answer is confirmed with the full evaluation.
SEARCH_SETTINGS = 11
LOW_SIDE = ("minimum-load", "latching", "holding", "off-state", "dimming-range", "flicker")
HIGH_SIDE = ("rating", "repetitive-peak", "inrush", "breaker", "harmonics", "dissipation")
# Correction device (engineering choice): the smallest resistor limits the spike each
# time the switch fires into the capacitor to about 1 A at the mains peak; the
# capacitance is searched between 10 nF and 10 µF.
CORRECTION_SPIKE_A = 1.0
CORRECTION_C_RANGE_F = (10e-9, 10e-6)
# Purchasable parts: IEC 60063 preferred numbers (from memory).  Capacitors in the E6
# series, whose tolerance class is ±20 %; resistors in E12 values, sold at ±5 % or
# better (common practice, no source).
E6 = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
PREFERRED_C_F = tuple(10e-9 * b for b in E6)      # one decade of E6 capacitances
CAPACITOR_SERIES, CAPACITOR_TOLERANCE = "E6", 0.20
RESISTOR_SERIES, RESISTOR_TOLERANCE = "E12", 0.05
# A capacitor connected across the mains is a class X2 safety capacitor (IEC 60384-14,
# from memory); X2 parts are sold for 275 V and 305 V AC (common practice, no source),
# chosen at or above the supply voltage plus 10 % (engineering choice: the supply
# tolerance).
X2_RATINGS_V = (275.0, 305.0)
SUPPLY_TOLERANCE = 0.10
# The resistor's power rating: at least twice its dissipation (common practice, no
# source: a resistor run at half its rating stays cool enough to last), rounded up to
# the ratings resistors are sold in.
RESISTOR_POWER_MARGIN = 2.0
RESISTOR_RATINGS_W = (0.25, 0.5, 1.0, 2.0, 3.0, 5.0, 10.0)
# coarse scan: the E3 series over the range (engineering choice: 10 evaluations per resistor)
CORRECTION_C_GRID_F = tuple(b * 10.0 ** e for e in range(-8, -4) for b in (1.0, 2.2, 4.7))


def _failing(circuit: Circuit, ids, simulator=None, settings=SEARCH_SETTINGS, known=None) -> list[str]:
    """The failing checks among ``ids`` of one probe; ``known``: failing checks already
    judged by a full evaluation ({circuit: ids}), used instead of a coarse probe (the
    full check is the one the answer must pass)."""
    if known is not None and circuit in known:
        return [cid for cid in known[circuit] if cid in ids]
    return [cid for cid in _failing_checks(circuit, simulator, settings) if cid in ids]


@lru_cache(maxsize=256)
def _failing_checks(circuit: Circuit, simulator, settings: int) -> tuple[str, ...]:
    """Every failing check of one probe.  Kept: the searches probe the same circuit
    more than once (the low- and high-side count searches meet at the same counts, the
    correction search starts from the circuit as it is), and the simulation is
    deterministic, so a probe is simulated once."""
    ev = gather(circuit, settings=settings, simulator=simulator)
    return tuple(r.id for r in judge(ev) if r.status is Status.FAIL)


class _FailureWatch:
    """Watches a probe's sweep runs as they are simulated and stops the probe (sets its
    cancel event) at the first failure that its full judging cannot excuse, so a probe
    that fails need not run to its end.  Only a failure certain on one run alone counts:

    * flicker or holding failing on a lit run judged by itself (each is a failure of that
      run, whatever the other runs show: ``checks.check_flicker``, the light swinging
      below the mains frequency; ``checks.check_holding``, early drop-outs with unsteady
      light), never on the up walk's first lit run, the pop-on ``check_flicker`` leaves out;
    * at a setting above the bottom of the travel that ``evaluate`` may excuse (above
      ``UNTRIMMED_MAX_SETTING``, or ``TRIM_MAX_SETTING`` with a low-end trim): a failure
      there stays a failure of the whole sweep (``evaluate._bottom_of_travel``).

    Where no such failure shows, the probe runs to its end and is judged in full, so the
    answer is always the full judging's; the watch only knows it sooner."""

    DECIDING = ("flicker", "holding")

    def __init__(self, circuit: Circuit, simulator, among, tolerated):
        self.weights = light_weights(circuit, simulator or default_simulator())   # as ``gather`` weighs them
        self.circuit = circuit
        self.ids = [cid for cid in self.DECIDING if cid in among and cid not in tolerated]
        self.above = TRIM_MAX_SETTING if circuit.dimmer.low_end_trim else UNTRIMMED_MAX_SETTING
        self.stop = Event()
        self.failed: str | None = None
        self.up_lit_seen = False            # the up walk runs in one thread, in order of setting
        # the two walks' threads judge one at a time (a first judging of flicker may
        # build the reference lamp's curve, which is written to a cache file)
        self.lock = Lock()

    def __call__(self, run: SettingRun) -> None:
        lit = run.light_fraction(self.weights) > ck.LIT_FRACTION
        pop_on = False
        if run.direction == "up" and lit and not self.up_lit_seen:
            self.up_lit_seen, pop_on = True, True
        if self.stop.is_set() or not lit or run.setting <= self.above + 1e-9:
            return
        with self.lock:
            self._judge(run, pop_on)

    def _judge(self, run: SettingRun, pop_on: bool) -> None:
        for cid in self.ids:
            if cid == "flicker" and not pop_on:
                res = ck.check_flicker(self.circuit, (run,), self.weights)
            elif cid == "holding":
                res = ck.check_holding(self.circuit, (run,), self.weights)
                if res.status is Status.FAIL and not res.details.get("unsteady_settings"):
                    continue                 # only the unsteady-light failure is one run's own
            else:
                continue
            if res.status is Status.FAIL:
                self.failed = cid
                self.stop.set()
                return


def _passes(circuit: Circuit, simulator, settings: int, among, tolerated) -> bool:
    """Whether no check among ``among`` fails but those ``tolerated`` on a probe of
    ``settings`` points, judged as ``_failing_checks`` judges it; a probe is stopped as
    soon as a failure is certain (``_FailureWatch``)."""
    watch = _FailureWatch(circuit, simulator, among, tolerated)
    try:
        ev = gather(circuit, settings=settings, simulator=simulator, cancel=watch.stop, watch=watch)
    except Cancelled:
        if watch.failed is None:
            raise
        return False
    return {r.id for r in judge(ev) if r.status is Status.FAIL and r.id in among} <= set(tolerated)


def rating_count_bound(circuit: Circuit, index: int) -> int:
    """The most units of group ``index`` (others unchanged) that the rating check passes,
    0 if none: arithmetic on the printed ratings, no simulation (the load the rating
    counts grows with the count)."""
    return max_passing(lambda n: ck.check_rating(with_count(circuit, index, n)).status is not Status.FAIL,
                       1, MAX_COUNT)


def count_limits(circuit: Circuit, simulator=None, progress=None, known=None) -> dict[str, dict]:
    """Fewest and most units of each group that pass, the other groups unchanged.

    The most units: the rating check (arithmetic) bounds the count before any
    simulation; the bound itself is probed first, since the rating is the usual limit,
    and only if a simulated check fails there is the count searched below it.
    ``known``: failing checks of circuits already fully evaluated ({circuit: ids})."""
    out = {}
    for i, g in enumerate(circuit.loads):
        def low_ok(n, i=i):
            return not _failing(with_count(circuit, i, n), LOW_SIDE, simulator, known=known)

        def high_ok(n, i=i):
            return not _failing(with_count(circuit, i, n), HIGH_SIDE, simulator, known=known)

        bound = rating_count_bound(circuit, i)
        if bound < 1:
            most = 0
        elif bound < MAX_COUNT and high_ok(bound):
            most = bound
        else:
            most = max_passing(high_ok, 1, bound if bound == MAX_COUNT else bound - 1)
        fewest = min_passing(low_ok, 1, max(most, 1)) if most >= 1 else None
        out[g.name] = {"count": g.count, "fewest": fewest, "most": most if most >= 1 else None,
                       "passes": fewest is not None and most >= 1 and fewest <= most}
        if progress:
            progress(i + 1, len(circuit.loads))
    return out


def correction_device(circuit: Circuit, capacitance_f: float, resistance_ohm: float | None = None) -> Linear:
    """A series R–C load-correction device [F], [Ω] (default R: the spike limit)."""
    r = resistance_ohm if resistance_ohm is not None else circuit.supply.peak_v / CORRECTION_SPIKE_A
    return Linear(name="load-correction device", count=1, rated_power_w=1.0,
                  rated_voltage_v=circuit.supply.voltage_v, resistance_ohm=r, series_capacitance_f=capacitance_f)


def _round_up_preferred(c: float) -> float:
    """The next E6 value at or above c [F]."""
    return round_up_series(c, E6)


def round_up_series(x: float, series: tuple[float, ...]) -> float:
    """The smallest value of a preferred-number series (one decade of mantissas) at or
    above x."""
    if x <= 0:
        return x
    decade = 10.0 ** math.floor(math.log10(x))
    for scale in (decade, 10 * decade):
        for base in series:
            v = round(base * scale, 12 - int(math.floor(math.log10(base * scale))))
            if v >= x * (1 - 1e-9):
                return v
    return x


def correction_resistances_ohm(circuit: Circuit) -> tuple[float, ...]:
    """Series resistors tried, as E12 values: the spike limit (rounded up, so the spike
    stays within it), then more resistive devices (engineering choice: a mostly
    resistive bypass keeps its current in phase with the voltage, so the switch holds
    to the end of the half-cycle, at the price of more heat)."""
    r0 = round_up_series(circuit.supply.peak_v / CORRECTION_SPIKE_A, E12)
    return (r0, round_up_series(3 * r0, E12), round_up_series(10 * r0, E12))


def x2_rating_v(supply_v: float) -> float | None:
    """The X2 capacitor's rated AC voltage for this supply (None: above every class)."""
    need = supply_v * (1 + SUPPLY_TOLERANCE)
    return next((v for v in X2_RATINGS_V if v >= need), None)


def resistor_rating_w(loss_w: float) -> float:
    """The resistor's power rating: twice its loss, rounded up to a sold rating [W]."""
    need = RESISTOR_POWER_MARGIN * loss_w
    return next((w for w in RESISTOR_RATINGS_W if w >= need), math.ceil(need))


_ALL = set(LOW_SIDE) | set(HIGH_SIDE) | {"edge-match", "dc-offset", "turn-off-surge"}


def smallest_correction(circuit: Circuit, simulator=None, known=None) -> dict | None:
    """The smallest correction capacitance (an E3 scan upward, then the E6 value below
    the first pass, for each series resistor of ``correction_resistances_ohm``) that
    clears every failure a bypass can cure (``LOW_SIDE``) and adds none; its loss from
    a steady simulation at full.  None if no device in range passes.  ``known``: failing
    checks of circuits already fully evaluated ({circuit: ids})."""
    # a bypass can cure the low-side failures (too little load); it cannot cure an
    # overload, a surge or a wrong edge, so those may stay failing as long as it adds no
    # failure of its own
    try:
        before = set(_failing(dataclasses.replace(circuit, ranges=()), _ALL, simulator, known=known))
    except RuntimeError:
        before = set()
    curable = set(LOW_SIDE)
    if not before & curable:
        return None
    tolerated = before - curable
    best = None
    for r in correction_resistances_ohm(circuit):
        def ok(c, r=r):
            cc = dataclasses.replace(circuit, correction=correction_device(circuit, c, r), ranges=())
            try:
                return _passes(cc, simulator, SEARCH_SETTINGS, _ALL, tolerated)
            except RuntimeError:            # the simulator gave up on this circuit: not a pass
                return False

        # passing need not be monotonic in C (a large C brings its own spikes), so scan
        # a coarse grid upward for the first pass, then try the E6 value below it
        grid = [c for c in CORRECTION_C_GRID_F if CORRECTION_C_RANGE_F[0] <= c <= CORRECTION_C_RANGE_F[1]]
        if best is None:
            # the first resistor: the lowest grid value that passes, scanning upward
            first = next((k for k, c in enumerate(grid) if ok(c)), None)
            if first is None:
                continue
            top, failed = grid[first], (grid[first - 1] if first > 0 else None)
        else:
            # the next resistors only matter below the best so far: scan down from just
            # below it while it passes (the failures that make passing non-monotonic
            # come with large capacitances, above it)
            top, failed = best[0], None
            for c in reversed([c for c in grid if c < best[0]]):
                if not ok(c):
                    failed = c
                    break
                top = c
        # the answer is bought as an E6 part, so the search needs no finer step than
        # E6: the grid is E3, and between two E3 values lies one E6 value to try
        c = top
        if failed is not None:
            between = _round_up_preferred(failed * 1.01)
            if between < top and ok(between):
                c = between
        if best is None or c < best[0]:
            best = (c, r)
    if best is None:
        return None
    c, r = best
    # confirm the part as bought on the full sweep (the search ran a coarser one): its
    # E6 value, and that value at the low end of its tolerance (less capacitance, less
    # current to carry the switch); step up the E6 values until both pass, or give up at
    # the top of the range.  The low end is judged first (the full sweep without the
    # report: the same runs and checks as ``evaluate``): it fails more often, and then
    # the nominal part's evaluation is not needed.
    while True:
        dev = correction_device(circuit, c, r)
        fixed = dataclasses.replace(circuit, correction=dev, ranges=())
        low = dataclasses.replace(circuit, correction=correction_device(circuit, c * (1 - CAPACITOR_TOLERANCE), r),
                                  ranges=())
        if _passes(low, simulator, MIN_SETTINGS, ck.CHECK_IDS, tolerated):
            full = evaluate(fixed, simulator=simulator)
            if {x.id for x in full.checks if x.status is Status.FAIL} <= tolerated:
                break
        bigger = _round_up_preferred(c * 1.01)
        if bigger > CORRECTION_C_RANGE_F[1] * (1 + 1e-9):
            return None
        c = bigger
    from loads.simulation import simulate
    sim = simulator.simulate if simulator is not None else simulate
    res = sim(fixed, setting=1.0, cycles=4, start="steady", samples_per_cycle=400)
    i = res.group_a[-1][-400 * 2:]
    loss = float(np.mean(i ** 2) * dev.resistance_ohm)
    return {"capacitance_f": c, "resistance_ohm": dev.resistance_ohm, "loss_w": loss,
            "rms_current_a": float(np.sqrt(np.mean(i ** 2))), "device": dev,
            "capacitor_series": CAPACITOR_SERIES, "capacitor_tolerance_pct": 100 * CAPACITOR_TOLERANCE,
            "capacitor_class": "X2", "capacitor_rated_voltage_v": x2_rating_v(circuit.supply.voltage_v),
            "resistor_series": RESISTOR_SERIES, "resistor_tolerance_pct": 100 * RESISTOR_TOLERANCE,
            "resistor_rating_w": resistor_rating_w(loss), "report": full}


def size(circuit: Circuit, progress=None, simulator=None) -> dict:
    """All remedies for ``circuit`` (see module docstring).  Keys: verdict, counts,
    correction, edge, rating_needed_w, breaker_curve, breaker_counts, surge_peak_a, bleeder
    (None, or where lamps cannot see the dimmer's phase: group, bleeder_ma by group,
    verdict and failing with those bleeders)."""
    base = dataclasses.replace(circuit, ranges=())
    report = evaluate(base, simulator=simulator)
    failing = [c.id for c in report.checks if c.status is Status.FAIL]
    # the circuit as it is has had its full check: the searches use that, not a coarse probe
    known = {base: tuple(failing)}
    steps = [0]
    total = 5
    lock = Lock()

    def step():
        with lock:
            steps[0] += 1
            if progress:
                progress(steps[0], total)

    def beside():
        """The searches that do not depend on the correction device's."""
        counts = count_limits(base, simulator, known=known)
        step()
        other = Edge.TRAILING if base.dimmer.edge is Edge.LEADING else Edge.LEADING
        # Engineering choice: a trailing-edge dimmer switches softly and carries no RFI
        # choke (its current would be cut at every turn-off); a leading-edge one gets the
        # default choke back.
        dim2 = dataclasses.replace(base.dimmer, edge=other,
                                   control=Control.PHASE if other is Edge.TRAILING else base.dimmer.control,
                                   choke_inductance_h=0.0 if other is Edge.TRAILING else Dimmer().choke_inductance_h)
        alt = evaluate(dataclasses.replace(base, dimmer=dim2), simulator=simulator)
        edge = {"edge": str(other), "verdict": str(alt.verdict),
                "failing": [c.id for c in alt.checks if c.status is Status.FAIL]}
        step()
        runs = switch_on_runs(base, simulator or default_simulator())     # one set of runs serves both figures
        peak = peak_line_current_a(runs)
        curve = None
        bcounts = {}
        if base.breaker is not None:
            _, surge = ck.worst_surge(base, runs)
            c = breaker_band.holding_curve(surge.peak_current_a, base.breaker.rated_current_a, i2t_a2s=surge.i2t_a2s,
                                           frequency_hz=base.supply.frequency_hz)
            curve = str(c) if c is not None else None
            bcounts = breaker_max_counts(base, simulator)
        step()
        return counts, edge, peak, curve, bcounts, bleeders()

    def bleeders():
        """Where lamps cannot see the dimmer's phase: the closed-form bleeder each needs
        (``compat.phase_sense``) and the full check of the circuit with them."""
        found = {c.id: c for c in report.checks}["dimming-range"].details.get("phase_unseen")
        if found is None:
            return None
        fixed, given = phase_sense.with_bleeders(base)
        if not given:
            return None
        check = evaluate(fixed, simulator=simulator)
        return {"group": found["group"], "bleeder_ma": {k: 1000 * v for k, v in given.items()},
                "verdict": str(check.verdict), "failing": [c.id for c in check.checks if c.status is Status.FAIL]}

    # The correction search is the longest chain of probes, each waiting on the one
    # before; the lamp counts, the other edge and the breaker's counts do not depend on
    # it, so they run beside it in a second thread (the compiled integrator releases the
    # GIL; each probe is deterministic, so the answers are those of running them in turn).
    with ThreadPoolExecutor(max_workers=1) as pool:
        others = pool.submit(beside)
        correction = None
        if report.verdict is Verdict.UNSUITABLE:
            correction = smallest_correction(base, simulator, known=known)
            if correction is not None:
                check = correction.pop("report")   # the full evaluation that confirmed the device
                correction["verdict"] = str(check.verdict)
                correction["failing"] = [c.id for c in check.checks if c.status is Status.FAIL]
        step()
        counts, edge, peak, curve, bcounts, bleed = others.result()
    use = derating.rating_use(base.dimmer, base.loads)
    need = base.dimmer.rated_load_w * use.utilisation
    step()
    return {"circuit": base.name, "verdict": str(report.verdict), "failing": failing, "counts": counts,
            "correction": correction, "edge": edge, "rating_needed_w": need, "derating_factor": use.factor,
            "breaker_curve": curve, "breaker_counts": bcounts, "surge_peak_a": peak, "bleeder": bleed}
