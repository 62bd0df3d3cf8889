"""Speed of our simulator beside ngspice on the reference circuits.  Not a test.

Run from the repository root:

    python -m tests.bench [--repeats N] [--cycles N]

For each reference case of ``tests/data/spice/`` (see its README) it measures, in one
run on this machine:

* ours: the in-process solve time of ``loads.simulation.simulate`` over the case's span
  (``--cycles`` mains cycles from a cold start, default 400 samples per cycle), the
  median of ``--repeats`` calls made after one warm-up call, so numba's compilation
  (seconds, cached on disk afterwards) is not counted;
* ngspice: its own "Total analysis time" (from ``rusage``) for the same circuit and span
  at the converged step of the step studies (``tests/data/spice/README.md``), median of ``--repeats`` runs; this
  excludes process start-up and parsing, and the wrdata output (the process wall time
  is printed beside it);
* the ratio ngspice analysis / ours (above 1: ours is faster).

Then, when they exist: "demo circuit, one setting, 10 cycles" (``loads.catalogue.
demo_circuit()``, setting 0.5), and the full check of the demo circuit
(``compat.evaluate.evaluate``, wall time; its CPU time over both threads is printed
beside it) with the total mains span it simulates, against ngspice
simulating that span of case (c) — the reference circuit closest to the demo circuit
(same 230 V / 50 Hz supply and line impedance, capacitor-input lamps; the demo also has
a halogen lamp and an rc-diac dimmer, which ngspice is not asked to simulate here).

No timing is asserted anywhere; numbers on a 2-core machine shared with other work vary
by ±30 % (``tests/data/spice/README.md``, "Timing noise").
"""
from __future__ import annotations

import argparse
import math
import statistics
import sys
import time

from tests import ngspice as ng

DEMO_SETTING = 0.5   # engineering choice: a mid setting for "one setting"
DEMO_CYCLES = 10


def _time_ours(fn, repeats: int) -> tuple[float, float]:
    """(warm-up time, median of ``repeats`` timed calls) [s]."""
    t0 = time.perf_counter()
    fn()
    warm = time.perf_counter() - t0
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return warm, statistics.median(times)


def _time_spice(case: ng.Case, cycles: int, repeats: int, **params) -> tuple[float, float, int]:
    """(median analysis time, median wall time, accepted time points) of ngspice."""
    runs = [case.run(cycles=cycles, **params) for _ in range(repeats)]
    return (statistics.median(r.analysis_s for r in runs), statistics.median(r.wall_s for r in runs),
            int(runs[-1].stats.get("accepted_timepoints", 0)))


def _simulate_case(case: ng.Case, cycles: int):
    from loads.simulation import simulate

    circuit = ng.our_circuit(case)
    if case.firing_angle_deg is not None:
        return lambda: simulate(circuit, firing_angle_deg=case.firing_angle_deg, cycles=cycles, start="cold")
    return lambda: simulate(circuit, setting=ng.our_setting(case), cycles=cycles, start="cold")


def _row(label, span, ours, spice, wall, note=""):
    ratio = spice / ours if ours and ours > 0 and not math.isnan(spice) else math.nan
    f = lambda x: "—" if x is None or (isinstance(x, float) and math.isnan(x)) else f"{x:.4f}"  # noqa: E731
    r = "—" if math.isnan(ratio) else f"{ratio:.2f}"
    print(f"{label:<52} {span:>12} {f(ours):>10} {f(spice):>10} {f(wall):>10} {r:>8}  {note}")


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(prog="python -m tests.bench", description=__doc__.split("\n")[0])
    ap.add_argument("--repeats", type=int, default=5, help="timed runs per entry (median), default 5")
    ap.add_argument("--cycles", type=int, default=10, help="mains cycles per reference case, default 10")
    args = ap.parse_args(argv)
    if ng.find_ngspice() is None:
        print("ngspice not found on PATH: install it (Debian: apt-get install ngspice)", file=sys.stderr)
        return 2
    n, cyc = args.repeats, args.cycles
    print(f"ours: simulate() solve time, median of {n} after a warm-up call (numba compile excluded)")
    print(f"ngspice: 'Total analysis time' from rusage, median of {n} runs, at the converged step")
    print("ratio: ngspice analysis time / ours (above 1: ours is faster); same circuit and span")
    print()
    print(f"{'circuit':<52} {'span':>12} {'ours s':>10} {'ngspice s':>10} {'ng wall s':>10} {'ratio':>8}")
    print("-" * 110)
    per_cycle_c = math.nan
    for case in ng.CASES:
        label = f"({case.key}) {case.title}"
        span = f"{cyc} cyc"
        try:
            spice, wall, pts = _time_spice(case, cyc, n)
        except ng.NgspiceError as e:
            _row(label, span, math.nan, math.nan, math.nan, f"ngspice failed: {e}")
            continue
        if case is ng.CASE_C:
            per_cycle_c = spice / cyc
        try:
            warm, ours = _time_ours(_simulate_case(case, cyc), n)
            note = f"{case.steps_per_cycle} steps/cyc, {pts} pts; our warm-up {warm:.2f} s"
        except Exception as e:  # the simulator is still being written: report, do not stop
            ours, note = math.nan, f"ours failed: {type(e).__name__}: {str(e)[:60]}"
        _row(label, span, ours, spice, wall, note)

    # --- demo circuit ------------------------------------------------------------------
    try:
        from loads.catalogue import demo_circuit
    except ImportError as e:
        print(f"{'demo circuit, one setting, 10 cycles':<52} skipped: loads.catalogue.demo_circuit missing ({e})")
        return 0
    from loads.simulation import simulate

    demo = demo_circuit()
    try:
        warm, ours = _time_ours(lambda: simulate(demo, setting=DEMO_SETTING, cycles=DEMO_CYCLES), n)
        _row(f"demo circuit, one setting ({DEMO_SETTING}), {DEMO_CYCLES} cycles", f"{DEMO_CYCLES} cyc", ours,
             per_cycle_c * DEMO_CYCLES, math.nan,
             f"ngspice: case (c) per-cycle analysis time × {DEMO_CYCLES}; our warm-up {warm:.2f} s")
    except Exception as e:
        print(f"{'demo circuit, one setting, 10 cycles':<52} ours failed: {type(e).__name__}: {e}")

    try:
        from compat.evaluate import evaluate
    except ImportError as e:
        print(f"{'demo circuit, full check':<52} skipped: compat.evaluate.evaluate missing ({e})")
        return 0
    import loads.simulation as sim

    span = {"cycles": 0.0}
    real_run = sim._run

    def counting_run(pk, state, cycles, samples_per_cycle):
        span["cycles"] += cycles
        return real_run(pk, state, cycles, samples_per_cycle)

    try:
        sim._run = counting_run   # count the mains span the full check simulates
        t0 = time.perf_counter()
        evaluate(demo)            # also the warm-up call
        warm = time.perf_counter() - t0
    except Exception as e:
        print(f"{'demo circuit, full check':<52} ours failed: {type(e).__name__}: {e}")
        return 1
    finally:
        sim._run = real_run
    total = span["cycles"]
    times, cpu = [], []
    try:
        for _ in range(max(1, n - 1)):   # the counting call above was the warm-up
            t0, c0 = time.perf_counter(), time.process_time()
            evaluate(demo)
            times.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
    except Exception as e:
        print(f"{'demo circuit, full check':<52} ours failed: {type(e).__name__}: {e}")
        return 1
    ours = statistics.median(times)
    if total <= 0:
        _row("demo circuit, full check", "?", ours, math.nan, math.nan, "span unknown (no simulate runs counted)")
        return 0
    # ngspice has no deck of the demo circuit (its filaments are thermal); it simulates a
    # reference circuit over the same total span, measured: case (c) where its deck holds
    # out that long, else case (d); extrapolated only if both abort
    cycles = int(math.ceil(total))
    for case in (ng.CASE_C, ng.CASE_D):
        try:
            spice, wall, _ = _time_spice(case, cycles, 1)
            note = f"ngspice: case ({case.key}) over the same {cycles} cycles, 1 run"
            break
        except ng.NgspiceError as e:
            print(f"  (ngspice case ({case.key}) over {cycles} cycles aborted: {str(e)[:80]})")
    else:
        spice, wall = per_cycle_c * total, math.nan
        note = f"ngspice: case (c) per-cycle analysis time × {total:g} cycles (extrapolated: both decks aborted)"
    _row("demo circuit, full check", f"{total:g} cyc", ours, spice, wall,
         note + f"; ours is wall time on 2 threads, CPU time {statistics.median(cpu):.2f} s (both threads); "
                f"our warm-up {warm:.2f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
