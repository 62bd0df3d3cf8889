"""Run every simulation a check needs, once, and judge the circuit.

``evaluate`` walks the control range down (from the steady state at full) and up (from
the lamp-out state), keeping each setting's full simulated result so that the switch
checks (latching, holding, peaks, DC, spike, dissipation, harmonics, flicker) read the
same half-cycles and waveforms the dimming curve came from; it adds switch-on runs
across the switch-on angle (the supply appears on the circuit at rest and the dimmer
starts up as it does) and one off-state run.  Inputs given as ranges are
evaluated at each end; a check whose result flips between pass and fail names the
deciding input and the verdict becomes ``site-test-needed``.
"""
from __future__ import annotations

import dataclasses
import re
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from threading import Event, Lock

import numpy as np

from compat import checks as ck
from compat.report import CheckResult, Report, Status
from compat.runs import Cancelled, Evidence, SettingRun
from compat.switch_on import INRUSH_ANGLES_DEG, breaker_max_counts, default_simulator, switch_on_runs
from compat.verdict import attached_cautions, overall
from loads.circuit import Circuit, with_range_end
from loads.dimmer import Edge
from loads.errors import InputError

MIN_SETTINGS = 21                  # brief: at least 21 settings per direction
# The same walk as loads.simulation.sweep (engineering choice there: 6 cycles per
# point, the last 3 analysed, 200 samples per cycle); kept equal so rows match `dimfit sweep`.
CYCLES_PER_POINT = 6
ANALYSED_CYCLES = 3
SWEEP_SAMPLES_PER_CYCLE = 200
# Engineering choice: one second at 50 Hz off-state, the first fifth discarded as the
# cold-start transient; long enough to see a bus that charges and flashes a few times
# a second.  Slower flashes are reported as "at least once" or missed.
OFF_CYCLES = 50
OFF_ANALYSED_CYCLES = 40
OFF_SAMPLES_PER_CYCLE = 100
# Engineering choice: harmonics up to the 40th of a current with jumps need a fine grid
# (at 200 samples/cycle orders 160–240 alias onto 40–0); the worst sweep setting is
# re-run from its own end state at this resolution for the harmonics check.
HARMONICS_SAMPLES_PER_CYCLE = 4000
HARMONICS_CYCLES = 2
# Engineering choice: evaluate each range input at its two ends with the others at
# their midpoint (1 + 2k runs) rather than all 2^k corners, to keep the check quick.
# An end that would cross a field kept in order with it (latching below holding) moves
# that field to it, latching = holding (loads.circuit.ORDERED_FIELDS), so that each
# end is a device that exists.
RANGE_MODE = "one-at-a-time"

SWEEP_KEYS = ("direction", "setting", "firing_angle_deg", "conduction_angle_deg", "load_rms_v", "load_rms_a",
              "power_w", "light_fraction", "stable")


def settings_grid(n: int) -> list[float]:
    """n settings evenly over 0..1 (n ≥ 2) [1]."""
    return [float(x) for x in np.linspace(0.0, 1.0, max(int(n), 2))]


def walk(circuit: Circuit, settings: list[float], direction: str, sim, *, tick=None, cancel=None,
         watch=None) -> tuple[SettingRun, ...]:
    """The sweep in one direction, keeping every setting's result: down from the steady
    state at full, up from the lamp-out state."""
    order = sorted(settings, reverse=(direction == "down"))
    state: object = "steady" if direction == "down" else "off"
    return tuple(turn(circuit, state, direction, order, sim, tick=tick, cancel=cancel, watch=watch))


def turn(circuit: Circuit, state, direction: str, settings, sim, *, tick=None, cancel=None,
         watch=None) -> list[SettingRun]:
    """The knob turned through ``settings`` in the order given, from ``state`` (a start
    or a run's final state), the circuit's state carried from one setting to the next.
    ``watch``: called with each setting's run as soon as it is simulated."""
    weights = sim.reference_light_weights(circuit)
    wsum = float(np.sum(weights))
    runs = []
    for s in settings:
        if cancel is not None and cancel.is_set():
            raise Cancelled()
        res = sim.simulate(circuit, setting=s, cycles=CYCLES_PER_POINT, start=state,
                           samples_per_cycle=SWEEP_SAMPLES_PER_CYCLE, settle_lamps=True)
        state = res.final_state
        point = sim.sweep_point(res, direction, s, ANALYSED_CYCLES, weights, wsum)
        runs.append(SettingRun(direction=direction, setting=s, result=res, analysed_cycles=ANALYSED_CYCLES, point=point))
        if watch is not None:
            watch(runs[-1])
        if tick:
            tick()
    return runs


def light_weights(circuit: Circuit, sim) -> np.ndarray:
    """Each group's share of the circuit's reference light (summing to 1; all zeros if
    no group gives light), as the checks weigh the light of a run [1]."""
    w = np.asarray(sim.reference_light_weights(circuit), dtype=float)
    return w / w.sum() if w.sum() > 0 else w


def gather(circuit: Circuit, *, settings: int = MIN_SETTINGS, progress=None, cancel=None, simulator=None,
           watch=None) -> Evidence:
    """Every simulation the checks need, for one circuit (no ranges), sweeping
    ``settings`` points each way (``evaluate`` never asks for fewer than MIN_SETTINGS;
    the sizing search may).  ``watch``: called with each run of either walk as soon as
    it is simulated, from the thread that walks (the sizing search uses it to set
    ``cancel`` once a failure is certain)."""
    sim = simulator or default_simulator()
    grid = settings_grid(settings)
    total = 2 * len(grid) + len(INRUSH_ANGLES_DEG) + 1
    done = [0]
    lock = Lock()

    def tick():
        with lock:
            done[0] += 1
            if progress is not None:
                progress(done[0], total)

    # the single runs (off-state, then each switch-on angle), taken by whichever thread
    # is free once its walk is done: the walks differ in cost from circuit to circuit
    singles = ["off"] + list(INRUSH_ANGLES_DEG)
    single_out: dict = {}
    taken = [0]

    def take_singles():
        while True:
            with lock:
                if taken[0] >= len(singles):
                    return
                job = singles[taken[0]]
                taken[0] += 1
            if cancel is not None and cancel.is_set():
                raise Cancelled()
            if job == "off":
                single_out[job] = sim.simulate(circuit, setting=0.0, no_firing=True, start="cold", cycles=OFF_CYCLES,
                                               samples_per_cycle=OFF_SAMPLES_PER_CYCLE)
            else:
                single_out[job] = switch_on_runs(circuit, sim, angles_deg=(job,))[0]
            tick()

    def second_thread():
        up = walk(circuit, grid, "up", sim, tick=tick, cancel=cancel, watch=watch)
        take_singles()
        return up

    # the runs are independent but for the state each walk carries: the compiled
    # integrator releases the GIL, so the upward walk goes in a second thread while this
    # one walks down (from the steady state at full, the costliest start); the off-state
    # and switch-on runs go to whichever finishes first; about even shares on two cores
    with ThreadPoolExecutor(max_workers=1) as pool:
        second = pool.submit(second_thread)
        down = walk(circuit, grid, "down", sim, tick=tick, cancel=cancel, watch=watch)
        bottom = refine_drop_out(circuit, down, sim, cancel=cancel)
        take_singles()
        up = second.result()
    off = single_out["off"]
    inrush = tuple(single_out[a] for a in INRUSH_ANGLES_DEG)
    if cancel is not None and cancel.is_set():
        raise Cancelled()
    w = light_weights(circuit, sim)
    fine = harmonics_run(circuit, down + up, sim)
    return Evidence(circuit=circuit, down=down, up=up, inrush=inrush, off=off, light_weights=w,
                    harmonics=(fine,) if fine is not None else (), bottom=bottom)


# Engineering choice: four halvings of the grid step between the last lit setting and
# the first dark one find the drop-out to 1/16 of a step (0.003 of the travel with 21
# settings), as a hand turning the knob slowly down would.
DROP_OUT_HALVINGS = 4


def refine_drop_out(circuit: Circuit, down, sim, *, cancel=None) -> tuple[SettingRun, ...]:
    """Where the walk down loses steady light between two grid settings (the lamps go
    dark or start to misfire), the settings between them that still give steady light,
    found by halving the gap from the lit side with the circuit's state carried (the
    knob turned on down slowly).  The dimming range's
    lowest light is read from these too: on a coarse grid the last lit setting can sit
    well above the light at which the lamps really drop out."""
    weights = sim.reference_light_weights(circuit)
    wsum = float(np.sum(weights))
    out = []
    def steady_light(r):
        return r.point is not None and r.point.stable and r.point.light_fraction > ck.LIT_FRACTION

    for hi, lo in zip(down, down[1:]):
        if not steady_light(hi) or steady_light(lo):
            continue
        s_hi, s_lo, state = hi.setting, lo.setting, hi.result.final_state
        for _ in range(DROP_OUT_HALVINGS):
            if cancel is not None and cancel.is_set():
                raise Cancelled()
            s = 0.5 * (s_hi + s_lo)
            res = sim.simulate(circuit, setting=s, cycles=CYCLES_PER_POINT, start=state,
                               samples_per_cycle=SWEEP_SAMPLES_PER_CYCLE)
            point = sim.sweep_point(res, "down", s, ANALYSED_CYCLES, weights, wsum)
            if point.stable and point.light_fraction > ck.LIT_FRACTION:
                out.append(SettingRun(direction="down", setting=s, result=res, analysed_cycles=ANALYSED_CYCLES,
                                      point=point))
                s_hi, state = s, res.final_state
            else:
                s_lo = s
        break                                   # the first drop-out on the way down
    return tuple(out)


def harmonics_run(circuit: Circuit, runs, sim) -> SettingRun | None:
    """The sweep setting with the worst class A harmonic ratio on the coarse grid,
    re-run on a fine grid from its own end state (None if nothing conducted)."""
    from compat import harmonics as hm
    best = None
    for r in ck.regular_runs(runs, circuit.dimmer.edge):
        h = hm.harmonic_rms_a(r.result.load_a[r.span], cycles=r.analysed_cycles)
        ratio = hm.judge(h, hm.HarmonicClass.A).ratio
        if best is None or ratio > best[0]:
            best = (ratio, r)
    if best is None:
        return None
    r = best[1]
    res = sim.simulate(circuit, setting=r.setting, cycles=HARMONICS_CYCLES, start=r.result.final_state,
                       samples_per_cycle=HARMONICS_SAMPLES_PER_CYCLE)
    return SettingRun(direction=r.direction, setting=r.setting, result=res, analysed_cycles=HARMONICS_CYCLES,
                      point=r.point)


# The checks judged on the sweep's settings, which a low-end trim can confine to the
# settings above it.
SWEEP_CHECKS = ("latching", "holding", "repetitive-peak", "dc-offset", "turn-off-surge", "dimming-range", "flicker",
                "dissipation")
# Engineering choice: a trim that must sit above half the knob's travel leaves too little
# range to call the failure a trim matter.
TRIM_MAX_SETTING = 0.5
# Engineering choice: on a dimmer without a trim, lamps that misbehave only in the
# bottom quarter of the knob's travel are a caution (the trade accepts LED lamps that
# flicker or cut out at the very bottom of a leading-edge dimmer, telling the customer
# where the usable range ends); above that, a failure.  Safety failures (a spike into
# the clamp, DC in a core, overload) stay failures wherever the knob can reach them.
UNTRIMMED_MAX_SETTING = 0.25


def _sweep_check_calls(c: Circuit, down, up, w, bottom=()) -> dict[str, Callable[[], CheckResult]]:
    """Each sweep check, not yet judged, by id (``SWEEP_CHECKS``)."""
    runs = tuple(down) + tuple(up)
    return {"latching": lambda: ck.check_latching(c, runs, w), "holding": lambda: ck.check_holding(c, runs, w),
            "repetitive-peak": lambda: ck.check_repetitive_peak(c, runs),
            "dc-offset": lambda: ck.check_dc_offset(c, runs),
            "turn-off-surge": lambda: ck.check_turn_off_surge(c, runs),
            "dimming-range": lambda: ck.check_dimming_range(c, down, up, w, bottom),
            "flicker": lambda: ck.check_flicker(c, runs, w), "dissipation": lambda: ck.check_dissipation(c, runs)}


def _sweep_checks(c: Circuit, down, up, w, bottom=()) -> dict[str, CheckResult]:
    return {cid: call() for cid, call in _sweep_check_calls(c, down, up, w, bottom).items()}


def usable_from(ev: Evidence, full: dict[str, CheckResult]) -> tuple[float, dict[str, CheckResult]] | None:
    """Where sweep checks fail only at the bottom of the travel: the lowest setting from
    which every sweep check passes or cautions, with the checks judged on the settings
    from there up; None if they fail higher up than ``TRIM_MAX_SETTING`` or not at all."""
    if not any(r.status is Status.FAIL for r in full.values()):
        return None
    # the checks that failed on the whole travel are judged first: a setting is passed
    # over at its first failing check, so the others need not be judged there
    order = sorted(full, key=lambda cid: full[cid].status is not Status.FAIL)
    for s in sorted({r.setting for r in ev.down}):
        if s <= 0.0:
            continue
        if s > TRIM_MAX_SETTING + 1e-9:
            return None
        down = tuple(r for r in ev.down if r.setting >= s - 1e-9)
        up = tuple(r for r in ev.up if r.setting >= s - 1e-9)
        bottom = tuple(r for r in ev.bottom if r.setting >= s - 1e-9)
        calls = _sweep_check_calls(ev.circuit, down, up, ev.light_weights, bottom)
        above = {}
        for cid in order:
            above[cid] = calls[cid]()
            if above[cid].status is Status.FAIL:
                break
        else:
            return s, {cid: above[cid] for cid in calls}
    return None


def _bottom_of_travel(ev: Evidence, full: dict[str, CheckResult]) -> dict[str, CheckResult]:
    """Failures confined to the bottom of the knob's travel: with a low-end trim, a
    caution that gives the trim setting; without one, a caution that says where the
    usable range ends if that is in the bottom quarter (``UNTRIMMED_MAX_SETTING``), else
    the failure says so."""
    found = usable_from(ev, full)
    if found is None:
        return full
    s, above = found
    row = next((r.point for r in ev.down if abs(r.setting - s) < 1e-9 and r.point is not None), None)
    if ev.circuit.dimmer.edge is Edge.LEADING:
        angle = (f" (firing angle about {row.firing_angle_deg:.0f}°)"
                 if row is not None and np.isfinite(row.firing_angle_deg) else "")
    else:
        angle = (f" (conducting about {row.conduction_angle_deg:.0f}°)"
                 if row is not None and row.conduction_angle_deg is not None
                 and np.isfinite(row.conduction_angle_deg) else "")
    out = dict(full)
    for cid, res in full.items():
        if res.status is not Status.FAIL:
            continue
        details = dict(res.details, usable_from_setting=s)
        kept = above[cid]
        status = Status.CAUTION if kept.status is Status.PASS else kept.status
        if ev.circuit.dimmer.low_end_trim:
            out[cid] = dataclasses.replace(
                kept, status=status,
                message=(f"Below setting {s:.2f} only: {res.message} Set the dimmer's low-end trim to setting "
                         f"{s:.2f}{angle} and it works over the rest of the travel."),
                remedy=f"Set the low-end trim to setting {s:.2f}{angle}.", details=details)
        elif s <= UNTRIMMED_MAX_SETTING + 1e-9 and not res.safety:
            out[cid] = dataclasses.replace(
                kept, status=status,
                message=(f"Below setting {s:.2f} only: {res.message} The usable range ends at setting {s:.2f}"
                         f"{angle}: tell the user, or fit a dimmer with a low-end trim."),
                remedy=f"A dimmer with a low-end trim, set to {s:.2f}.", details=details)
        else:
            out[cid] = dataclasses.replace(
                res, message=res.message + f" It works from setting {s:.2f} up: the usable range ends there.",
                remedy=(res.remedy + " " if res.remedy else "") + f"Or a dimmer with a low-end trim, set to {s:.2f}.",
                details=details)
    return out


def judge(ev: Evidence, *, breaker_counts: dict[str, int] | None = None) -> list[CheckResult]:
    """All checks, in ``checks.CHECK_IDS`` order."""
    c, w = ev.circuit, ev.light_weights
    sweep = _bottom_of_travel(ev, _sweep_checks(c, ev.down, ev.up, w, ev.bottom))
    off = ck.check_off_state(c, ev.off, OFF_ANALYSED_CYCLES)
    simulated = {"latching": sweep["latching"].status, "holding": sweep["holding"].status, "off-state": off.status}
    out = [
        ck.check_rating(c),
        ck.check_minimum_load(c, simulated),
        ck.check_edge_match(c),
        ck.check_dimmable(c),
        sweep["latching"],
        sweep["holding"],
        sweep["repetitive-peak"],
        ck.check_inrush(c, ev.inrush),
        ck.check_breaker(c, ev.inrush, breaker_counts),
        off,
        sweep["dc-offset"],
        sweep["turn-off-surge"],
        sweep["dimming-range"],
        sweep["flicker"],
        ck.check_harmonics(c, ev.harmonics or ev.runs),
        sweep["dissipation"],
    ]
    assert tuple(r.id for r in out) == ck.CHECK_IDS
    return out


def sweep_rows(ev: Evidence) -> tuple[dict, ...]:
    """Report.sweep rows (their keys: ``SWEEP_KEYS``)."""
    rows = []
    for r in ev.runs:
        p = r.point
        rows.append({"direction": p.direction, "setting": p.setting, "firing_angle_deg": p.firing_angle_deg,
                     "conduction_angle_deg": p.conduction_angle_deg, "load_rms_v": p.load_rms_v,
                     "load_rms_a": p.load_rms_a, "power_w": p.power_w, "light_fraction": p.light_fraction,
                     "stable": bool(p.stable)})
    return tuple(rows)


# ---------------------------------------------------------------- ranges

_PART = re.compile(r"([A-Za-z_]\w*)(?:\[(\d+)\])?")


def set_path(obj, path: str, value):
    """A copy of a frozen dataclass tree with the field at a dotted path (``loads[1].x``) set.

    Indices count as the circuit file does, from 1 (``loads[1]`` is the first group),
    so a ``Range`` read from a file names the group it came from."""
    head, _, rest = path.partition(".")
    m = _PART.fullmatch(head)
    if m is None or not dataclasses.is_dataclass(obj) or not hasattr(obj, m.group(1)):
        raise InputError(f"cannot follow the path {path!r}", key=path)
    name, idx = m.group(1), m.group(2)
    cur = getattr(obj, name)
    if idx is not None:
        seq = list(cur)
        i = int(idx) - 1
        if not 0 <= i < len(seq):
            raise InputError(f"there is no {name}[{idx}] (the file has {len(seq)})", key=path)
        seq[i] = set_path(seq[i], rest, value) if rest else _like(seq[i], value)
        new = tuple(seq)
    elif not rest:
        # a leaf: the fields ordered with it follow (latching ≥ holding), so that a
        # range end builds a device that exists (loads.circuit.ORDERED_FIELDS)
        return with_range_end(obj, name, _like(cur, value))
    else:
        new = set_path(cur, rest, value)
    return dataclasses.replace(obj, **{name: new})


def _like(old, value):
    if isinstance(old, bool):
        return bool(value)
    if isinstance(old, int):
        return int(round(value))
    return float(value)


_RANK = {Status.FAIL: 3, Status.CAUTION: 2, Status.PASS: 1, Status.NOT_APPLICABLE: 0}


def _worse(a: CheckResult, b: CheckResult) -> CheckResult:
    ka = (_RANK[a.status], -(a.margin if a.margin is not None else 0.0))
    kb = (_RANK[b.status], -(b.margin if b.margin is not None else 0.0))
    return a if ka >= kb else b


def combine(nominal: list[CheckResult], cases: list[tuple[str, list[CheckResult]]]) -> list[CheckResult]:
    """Worst case per check over the nominal circuit and every range end (``cases``:
    (file key of the range input, results at one end)).  Where the outcomes straddle
    fail and not-fail, the result names the deciding input: the first range whose two
    ends disagree (or, failing that, the first whose end fails)."""
    out = []
    for i, base in enumerate(nominal):
        outcomes = [base] + [res[i] for _, res in cases]
        worst = outcomes[0]
        for o in outcomes[1:]:
            worst = _worse(worst, o)
        fails = [o.status is Status.FAIL for o in outcomes]
        if worst.status is Status.FAIL and not all(fails):
            by_key: dict[str, list[bool]] = {}
            for key, res in cases:
                by_key.setdefault(key, []).append(res[i].status is Status.FAIL)
            deciding = next((k for k, f in by_key.items() if any(f) and not all(f)), None)
            if deciding is None:
                deciding = next((k for k, f in by_key.items() if any(f)), cases[0][0])
            worst = dataclasses.replace(worst, deciding_input=deciding,
                                        message=worst.message + f" This turns on {deciding}: test on site.")
        out.append(worst)
    return out


def evaluate(circuit: Circuit, *, settings: int = MIN_SETTINGS, progress: Callable[[int, int], None] | None = None,
             cancel: Event | None = None, simulator=None) -> Report:
    """Simulate and judge ``circuit``; the report carries every check, the dimming curve
    (rows with the ``SWEEP_KEYS``) and the safety cautions."""
    sim = simulator or default_simulator()
    base = dataclasses.replace(circuit, ranges=())
    n_cases = 1 + 2 * len(circuit.ranges)
    per_case = 2 * max(int(settings), MIN_SETTINGS) + len(INRUSH_ANGLES_DEG) + 1
    offset = [0]

    def prog(done, total):
        if progress is not None:
            progress(offset[0] + done, n_cases * per_case)

    settings = max(int(settings), MIN_SETTINGS)
    ev = gather(base, settings=settings, progress=prog, cancel=cancel, simulator=sim)
    nominal = _judge_with_breaker(ev, sim)
    cases = []
    for rg in circuit.ranges:
        for end in (rg.low, rg.high):
            offset[0] += per_case
            corner = set_path(base, rg.path, end)
            cev = gather(corner, settings=settings, progress=prog, cancel=cancel, simulator=sim)
            cases.append((rg.file_key, _judge_with_breaker(cev, sim)))
    results = combine(nominal, cases) if cases else nominal
    return Report(circuit=circuit.name, verdict=overall(results), checks=tuple(results), sweep=sweep_rows(ev),
                  cautions=attached_cautions())


def _judge_with_breaker(ev: Evidence, sim) -> list[CheckResult]:
    res = judge(ev)
    b = next(r for r in res if r.id == "breaker")
    if b.status is Status.FAIL:
        counts = breaker_max_counts(ev.circuit, simulator=sim)
        res = [ck.check_breaker(ev.circuit, ev.inrush, counts) if r.id == "breaker" else r for r in res]
    return res
