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

Then the user's waits of issue 10, each with ours beside its goal: the first
``dimfit demo`` after ``pip install .`` (the wheel built from a copy of the sources,
which compiles the simulator into it, installed into a temporary folder; the build
and install time printed beside it), the first ``dimfit demo`` where nothing is
compiled yet (numba compiling, in a fresh process with empty caches, with the time to
the first line on stderr), ``dimfit check`` of the demo in process and as
a whole process, ``dimfit size`` of the demo, the stiff-supply case (case (c)'s deck
at 120 V 60 Hz behind 100 µH with a 100 nF input capacitor, per cycle over 400 cycles,
against ngspice in the same run) and one setting of the demo.  ``--quick`` leaves out
the first run (15-60 s of compiling) and the sizing.

No timing is asserted anywhere; numbers on a 2-core machine shared with other work vary
by ±30 % (``tests/data/spice/README.md``, "Timing noise").
"""
from __future__ import annotations

import argparse
import dataclasses
import math
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from tests import ngspice as ng

DEMO_SETTING = 0.5   # engineering choice: a mid setting for "one setting"
DEMO_CYCLES = 10
# The stiff-supply case of issue 10: case (c)'s deck and circuit at 120 V 60 Hz, the line
# 100 µH (its 0.4 Ω kept), the lamp's input capacitor 100 nF, 400 cycles from cold.
STIFF_PARAMS = {"vrms": 120.0, "freq": 60.0, "lline": 100e-6, "cx": 100e-9}
STIFF_CYCLES = 400
STIFF_FALLBACK_CYCLES = 60   # ngspice's deck aborts near 1.5 s (88 cycles) on this supply
REPO = Path(__file__).resolve().parent.parent


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


def _stiff_circuit():
    from loads.supply import Supply

    c = ng.our_circuit(ng.CASE_C)
    sup = dataclasses.replace(c.supply, voltage_v=STIFF_PARAMS["vrms"], frequency_hz=STIFF_PARAMS["freq"],
                              source_inductance_h=STIFF_PARAMS["lline"])
    assert isinstance(sup, Supply)
    lamp = dataclasses.replace(c.loads[0], input_capacitance_f=STIFF_PARAMS["cx"],
                               rated_voltage_v=STIFF_PARAMS["vrms"])
    return dataclasses.replace(c, name="stiff", supply=sup, loads=(lamp,))


def _process(args: list[str], env: dict | None = None, code: str | None = None,
             where: Path = REPO) -> tuple[float, float, int]:
    """(wall time, time to the first byte on stderr, exit code) of ``python -m tui.cli
    ARGS`` (or ``python -c CODE ARGS``) run from ``where`` with ``where`` as its path
    (the repository root, or an installed copy)."""
    cmd = [sys.executable, "-c", code, *args] if code else [sys.executable, "-m", "tui.cli", *args]
    e = {k: v for k, v in os.environ.items() if k != "NUMBA_CACHE_DIR"} | {"PYTHONPATH": str(where)} | (env or {})
    t0 = time.perf_counter()
    proc = subprocess.Popen(cmd, cwd=where, env=e, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    first = proc.stderr.read(1)
    t_first = time.perf_counter() - t0 if first else math.nan
    proc.stderr.read()
    rc = proc.wait()
    return time.perf_counter() - t0, t_first, rc


# the first run, as a new user meets it: empty numba cache, empty reference-lamp cache
_FIRST_RUN = ("import sys, pathlib; import compat.reference_lamp as r; r.CACHE_DIR = pathlib.Path(sys.argv[1]); "
              "from tui.cli import main; sys.exit(main(sys.argv[2:]))")


def _install_copy(tmp: Path) -> tuple[float, Path]:
    """Build the wheel from a copy of the sources as ``pip install .`` does (build
    isolation; setup.py compiles the simulator into it) and install it, without its
    dependencies (they are this environment's), into tmp/site: (seconds for both, the
    site folder)."""
    from tests.wheel import build_wheel, install_wheel

    t0 = time.perf_counter()
    built, dist = build_wheel(tmp)
    built.check_returncode()
    install_wheel(next(dist.glob("dimfit-*.whl")), tmp / "site").check_returncode()
    return time.perf_counter() - t0, tmp / "site"


def _goal_row(label, ours, goal, note=""):
    print(f"{label:<62} {ours:>22} {goal:>28}  {note}")


def _row(label, span, ours, spice, wall, note=""):
    ratio = spice / ours if ours and ours > 0 and not math.isnan(spice) else math.nan
    f = lambda x: "—" if x is None or (isinstance(x, float) and math.isnan(x)) else f"{x:.4f}"  # noqa: E731
    r = "—" if math.isnan(ratio) else f"{ratio:.2f}"
    print(f"{label:<52} {span:>12} {f(ours):>10} {f(spice):>10} {f(wall):>10} {r:>8}  {note}")


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(prog="python -m tests.bench", description=__doc__.split("\n")[0])
    ap.add_argument("--repeats", type=int, default=5, help="timed runs per entry (median), default 5")
    ap.add_argument("--cycles", type=int, default=10, help="mains cycles per reference case, default 10")
    ap.add_argument("--quick", action="store_true", help="leave out the first run (compiling) and the sizing")
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

    # --- the stiff-supply case (issue 10): per cycle over STIFF_CYCLES, both simulators
    goals = {}
    stiff = _stiff_circuit()
    sp_note = ""
    try:
        run = ng.CASE_C.run(cycles=STIFF_CYCLES, **STIFF_PARAMS)
        sp_cyc, sp_wall = run.analysis_s / STIFF_CYCLES, run.wall_s
    except ng.NgspiceError as e:
        # the deck aborts part-way on this supply (timestep too small): its time per
        # cycle over the longest span it completes is the comparison
        print(f"  (ngspice on the stiff-supply case over {STIFF_CYCLES} cycles: {str(e)[:90]})")
        try:
            run = ng.CASE_C.run(cycles=STIFF_FALLBACK_CYCLES, **STIFF_PARAMS)
            sp_cyc, sp_wall = run.analysis_s / STIFF_FALLBACK_CYCLES, math.nan
            sp_note = f"ngspice per cycle over its first {STIFF_FALLBACK_CYCLES} cycles (it aborts before {STIFF_CYCLES}); "
        except ng.NgspiceError as e2:
            sp_cyc, sp_wall = math.nan, math.nan
            print(f"  (and over {STIFF_FALLBACK_CYCLES} cycles: {str(e2)[:90]})")
    from loads.simulation import simulate

    warm, ours = _time_ours(lambda: simulate(stiff, firing_angle_deg=90.0, cycles=STIFF_CYCLES, start="cold",
                                             samples_per_cycle=200), max(1, n // 2))
    _row("(e) stiff 120 V 60 Hz, 100 µH, 100 nF lamp, α 90°", f"{STIFF_CYCLES} cyc", ours, sp_cyc * STIFF_CYCLES,
         sp_wall, sp_note + f"case (c) deck with {STIFF_PARAMS}; 1 ngspice run; our warm-up {warm:.2f} s")
    goals["stiff"] = (ours / STIFF_CYCLES, sp_cyc)

    # --- demo circuit ------------------------------------------------------------------
    from compat.evaluate import evaluate
    from loads.catalogue import demo_circuit

    demo = demo_circuit()
    warm, ours = _time_ours(lambda: simulate(demo, setting=DEMO_SETTING, cycles=DEMO_CYCLES), n)
    _row(f"demo circuit, one setting ({DEMO_SETTING}), {DEMO_CYCLES} cycles", f"{DEMO_CYCLES} cyc", ours,
         per_cycle_c * DEMO_CYCLES, math.nan,
         f"ngspice: case (c) per-cycle analysis time × {DEMO_CYCLES}; our warm-up {warm:.2f} s")
    goals["setting"] = ours

    import loads.simulation as sim

    span = {"cycles": 0.0}
    real_run = sim._run

    def counting_run(pk, state, cycles, samples_per_cycle):
        span["cycles"] += cycles
        return real_run(pk, state, cycles, samples_per_cycle)

    t0 = time.perf_counter()
    evaluate(demo)                # the warm-up call (fills the in-process and disk caches)
    warm = time.perf_counter() - t0
    try:
        sim._run = counting_run   # count the mains span one full check simulates
        evaluate(demo)
    finally:
        sim._run = real_run
    total = span["cycles"]
    times, cpu = [], []
    for _ in range(max(1, n - 1)):
        t0, c0 = time.perf_counter(), time.process_time()
        evaluate(demo)
        times.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    ours = statistics.median(times)
    goals["check"] = (ours, statistics.median(cpu))
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

    # --- the user's waits (issue 10), ours beside the goal ------------------------------
    from loads.files import write_circuit

    with tempfile.TemporaryDirectory(prefix="dimfit-bench-") as tmp:
        demo_file = write_circuit(demo, Path(tmp) / "demo.toml")
        if not args.quick:
            first_wall, first_line, _ = _process([str(Path(tmp) / "ref-cache"), "demo", str(Path(tmp) / "d.toml")],
                                                 env={"NUMBA_CACHE_DIR": str(Path(tmp) / "numba-cache")},
                                                 code=_FIRST_RUN)
            install_s, site = _install_copy(Path(tmp))
            installed_wall, _, _ = _process([str(Path(tmp) / "ref-cache-2"), "demo", str(Path(tmp) / "d2.toml")],
                                            code=_FIRST_RUN, where=site)
        proc = [_process(["check", str(demo_file)]) for _ in range(n)]
        proc_wall = statistics.median(p[0] for p in proc)
    if not args.quick:
        from compat.sizing import size

        t0 = time.perf_counter()
        size(demo)
        size_wall = time.perf_counter() - t0
    print()
    print("The waits of issue 10 (python -m tests.bench; the same run as above)")
    _goal_row("what the user does", "ours", "goal")
    print("-" * 116)
    if args.quick:
        _goal_row("first `dimfit demo` after `pip install .`", "not run (--quick)", "≤ 10 s, or compiled at install")
        _goal_row("first `dimfit demo`, nothing compiled yet", "not run (--quick)", "a line at once")
    else:
        _goal_row("first `dimfit demo` after `pip install .`", f"{installed_wall:.1f} s", "≤ 10 s, or compiled at install",
                  f"installed copy, empty reference-lamp cache; building and installing took {install_s:.0f} s")
        _goal_row("first `dimfit demo`, nothing compiled yet", f"{first_wall:.1f} s, line at {first_line:.2f} s",
                  "a line at once", "editable install or a wheel from another machine: empty numba cache")
    w, c = goals["check"]
    _goal_row("`dimfit check` of the demo, in process (evaluate)", f"{w:.2f} s wall ({c:.2f} s CPU)", "≤ 0.3 s wall",
              f"median of {max(1, n - 1)}")
    _goal_row("`dimfit check` of the demo, whole process", f"{proc_wall:.2f} s", "≤ 1 s",
              f"python -m tui.cli check, median of {n}")
    if args.quick:
        _goal_row("`dimfit size` of the demo", "not run (--quick)", "≤ 3 s")
    else:
        _goal_row("`dimfit size` of the demo", f"{size_wall:.1f} s", "≤ 3 s", "in process, 1 run")
    ours_c, sp_c = goals["stiff"]
    ratio = sp_c / ours_c if ours_c > 0 and math.isfinite(sp_c) else math.nan
    _goal_row("stiff supply, capacitor-input lamp, per cycle (400 cyc)",
              f"{ours_c * 1e3:.3f} ms vs {sp_c * 1e3:.2f} ms = {ratio:.0f}×", "≥ 50× ngspice", "row (e) above")
    _goal_row("one setting of the demo, 10 cycles", f"{goals['setting'] * 1e3:.1f} ms", "≤ 10 ms",
              f"median of {n}")
    return 0

if __name__ == "__main__":
    sys.exit(main())
