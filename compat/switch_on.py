"""The switch-on surge of a circuit, and how many lamps its breaker holds against it.

Both the evaluation (the ``breaker`` check names the most lamps the breaker holds when
it fails) and the sizing search (``dimfit size``) need these, so they live here, below
both: ``compat.evaluate`` and ``compat.sizing`` import this module, never each other.

* ``switch_on_runs``: the supply appearing at each switch-on angle, at full setting,
  the dimmer starting up as it does;
* ``switch_on_peak_a`` / ``switch_on_surge``: the worst of those runs, by line-current
  peak, and as the breaker judges it (``compat.checks.worst_surge``,
  ``compat.breaker_band``);
* ``breaker_max_counts``: for each lamp group, the most units the breaker holds, found
  by bisection on the count (``max_passing`` / ``min_passing``, also used by
  ``compat.sizing.count_limits``).
"""
from __future__ import annotations

import dataclasses
import math

import numpy as np

from compat import breaker_band
from compat import checks as ck
from compat.runs import Cancelled
from loads.circuit import Circuit
from loads.dimmer import Edge

# Engineering choice: switch-on angles 0–180° in 30° steps (the other half-cycle mirrors).
INRUSH_ANGLES_DEG = (0.0, 30.0, 60.0, 90.0, 120.0, 150.0, 180.0)
INRUSH_CYCLES = 2
INRUSH_SAMPLES_PER_CYCLE = 200
MAX_COUNT = 500                           # loads.load: count is 1–500


def default_simulator():
    """``loads.simulation``, imported on first use (it loads the compiled integrator)."""
    from loads import simulation
    return simulation


def switch_on_cycles(circuit: Circuit) -> int:
    """Cycles a switch-on run covers: INRUSH_CYCLES after a trailing-edge soft start has
    brought the conduction to its set value."""
    d = circuit.dimmer
    soft = d.soft_start_s if d.edge is Edge.TRAILING else 0.0
    return INRUSH_CYCLES + math.ceil(soft * circuit.supply.frequency_hz - 1e-9)


def switch_on_runs(circuit: Circuit, sim, *, tick=None, cancel=None, angles_deg=INRUSH_ANGLES_DEG) -> tuple:
    """Switch-on at setting 1 across the switch-on angle, the supply appearing at that
    angle on the circuit at rest and the dimmer starting up as it does (a phase
    controller waits for the first zero crossing; a trailing-edge dimmer closes there,
    with its soft start; a trigger diode fires when its empty timing capacitor first
    reaches breakover): ((angle [deg], result), ...).  ``angles_deg``: the switch-on
    angles run (default: all of ``INRUSH_ANGLES_DEG``; a search may run fewer)."""
    out = []
    cycles = switch_on_cycles(circuit)
    for a in angles_deg:
        if cancel is not None and cancel.is_set():
            raise Cancelled()
        out.append((a, sim.simulate(circuit, setting=1.0, cycles=cycles, start="switch-on", switch_on_deg=a,
                                    samples_per_cycle=INRUSH_SAMPLES_PER_CYCLE)))
        if tick:
            tick()
    return tuple(out)


def peak_line_current_a(runs) -> float:
    """Largest line-current peak of switch-on runs ((angle, result), ...) [A]."""
    return max(float(np.max(r.half_cycles.peak_line_current_a)) for _, r in runs)


def switch_on_peak_a(circuit: Circuit, sim=None) -> float:
    """Worst whole-circuit switch-on line-current peak over the switch-on angles [A]."""
    return peak_line_current_a(switch_on_runs(circuit, sim or default_simulator()))


def switch_on_surge(circuit: Circuit, sim=None, angles_deg=INRUSH_ANGLES_DEG):
    """The switch-on run hardest on the circuit's breaker: (angle [deg],
    ``breaker_band.SurgeJudgement``); the circuit must have a breaker.  ``angles_deg``:
    the switch-on angles compared (default: all)."""
    sim = sim or default_simulator()
    return ck.worst_surge(circuit, switch_on_runs(circuit, sim, angles_deg=angles_deg))


def with_count(circuit: Circuit, index: int, n: int) -> Circuit:
    """The circuit with ``n`` units in lamp group ``index`` (0-based), ranges dropped."""
    loads = list(circuit.loads)
    loads[index] = dataclasses.replace(loads[index], count=int(n))
    return dataclasses.replace(circuit, loads=tuple(loads), ranges=())


def max_passing(ok, lo: int, hi: int) -> int:
    """Largest n in [lo, hi] with ok(n), given ok is true then false; lo-1 if none."""
    if not ok(lo):
        return lo - 1
    good, n = lo, lo
    while True:                        # grow until it fails or hits hi
        n = min(hi, 2 * n)
        if not ok(n):
            bad = n
            break
        good = n
        if n == hi:
            return hi
    return _boundary(ok, good, bad)


def min_passing(ok, lo: int, hi: int) -> int | None:
    """Smallest n in [lo, hi] with ok(n), given ok is false then true; None if none."""
    if not ok(hi):
        return None
    if ok(lo):
        return lo
    return _boundary(ok, hi, lo)


def _boundary(ok, good: int, bad: int) -> int:
    """Bisect between a passing count and a failing one (either order); the passing
    count next to the boundary."""
    while abs(bad - good) > 1:
        mid = (good + bad) // 2
        if ok(mid):
            good = mid
        else:
            bad = mid
    return good


def breaker_max_counts(circuit: Circuit, simulator=None) -> dict[str, int]:
    """For each lamp group, the most units (others unchanged) whose worst switch-on
    surge the breaker is expected to hold (IEC60898_1 band, judged by peak and
    half-cycle I²t, see ``compat.breaker_band``).

    The search runs only the switch-on angle hardest on the breaker for the circuit as
    given; the count it finds is then judged over every angle.  Fewer angles can only
    make a surge look smaller (the worst of a subset), so the search's count is at or
    above the answer: if the count it found holds over every angle it is the answer (the
    count above failed on one angle already), else the answer is searched below it over
    every angle (``largest_passing_below``)."""
    b = circuit.breaker
    if b is None:
        return {}
    worst_deg = switch_on_surge(circuit, simulator)[0]
    out = {}
    for i, g in enumerate(circuit.loads):
        def ok(n, i=i, angles_deg=INRUSH_ANGLES_DEG):
            return breaker_band.holds(switch_on_surge(with_count(circuit, i, n), simulator, angles_deg)[1].zone)

        found = max_passing(lambda n, i=i: ok(n, i, (worst_deg,)), 1, MAX_COUNT)
        if found >= 1 and not ok(found):
            found = largest_passing_below(ok, found)
        out[g.name] = found
    return out


def largest_passing_below(ok, bad: int) -> int:
    """Largest n below ``bad`` (≥ 1, ok(bad) false) with ok(n), given ok is true then
    false; 0 if none.  Steps down 1, 2, 4, ... from ``bad`` and then bisects, so an
    answer just below ``bad`` costs few probes."""
    step = 1
    while bad > 1:
        n = max(1, bad - step)
        if ok(n):
            return _boundary(ok, n, bad)
        bad, step = n, 2 * step
    return 0
