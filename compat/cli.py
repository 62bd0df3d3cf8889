"""The ``dimfit`` commands that need no terminal app (docs/design.md, "Commands").

    dimfit check FILE [--json | --markdown]
    dimfit simulate FILE [--setting S | --firing-angle DEG] [--cycles N]
                         [--from cold|steady] [--json | --csv]
    dimfit sweep FILE [--points N] [--direction up|down|both] [--json]
    dimfit size FILE [--json]
    dimfit diagnose FILE --symptom NAME [--observed KEY=VALUE ...] [--json | --markdown]
    dimfit demo [PATH]           write the demo circuit, then check it
    dimfit catalogue             the built-in archetypes
    dimfit selftest              compile the simulator now and check it on a closed form
    dimfit describe lamp|dimmer  a profile from a label and a meter reading (compat/describe.py)

Exit codes: 0 done (``check``: suitable, cautions allowed); 1 ``check`` found the
circuit unsuitable or a site test needed; 2 bad input (one line on stderr, never a
traceback); 3 the simulator could not go on with a legal circuit (one line naming the
element suspected; the circuit and the simulation's settings are written to a new
``dimfit-bug-report-N.toml`` for a bug report); 4 the command did not finish within its
time budget (``TIME_BUDGET_S``, or ``$DIMFIT_TIME_BUDGET_S`` seconds); 130 interrupted
(Ctrl-C: one line, the work abandoned at once).  Heavy modules (the simulator, the checks) are imported inside the command
that needs them, so ``dimfit catalogue`` and bad-input errors are quick.  Progress goes
to stderr, and only when stderr is a terminal.

The installed ``dimfit`` command is ``tui.cli.main``: it passes ``open_app`` to ``main``
here, which adds ``dimfit`` (no command) and ``dimfit open FILE``.  This module never
imports ``tui`` (the layers are tui -> compat -> loads); ``python -m compat.cli`` runs
every command but those two.
"""
from __future__ import annotations

import argparse
import csv
import dataclasses
import json
import math
import os
import signal
import sys
import threading
import time
import tomllib
import warnings
from collections.abc import Callable, Sequence

from compat.report import terminal_safe
from loads.errors import InputError, SolverError

PROG = "dimfit"
DEFAULT_DEMO_PATH = "dimfit-demo.toml"
# One-line form of the cautions for outputs that show figures without a verdict.
FIGURES_NOTE = ("Figures are model estimates. Mains work only by qualified persons: isolate and prove dead; "
                "local wiring rules and makers' instructions take precedence.")


# Exit codes of their own (see the module docstring).
EXIT_SOLVER = 3
EXIT_TIME_BUDGET = 4
EXIT_INTERRUPTED = 130
# Engineering choice: the longest each command may take before it stops with a message.
# A check of the demo takes a few seconds on one core and each range input adds two
# evaluations; three minutes leave room for a dozen ranges on a slow machine, and a
# practitioner waiting longer is better told.  Sizing runs many evaluations.  The
# environment variable DIMFIT_TIME_BUDGET_S (seconds) replaces every budget.
TIME_BUDGET_S = {"check": 180.0, "demo": 180.0, "simulate": 120.0, "sweep": 180.0, "size": 600.0,
                 "diagnose": 180.0}
# How long an abandoned command's worker is given to notice the cancel event.
CANCEL_GRACE_S = 0.5
BUG_REPORT_STEM = "dimfit-bug-report"


class UsageError(Exception):
    """A bad command line (reported in one line, exit 2)."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # argparse's hook: raise instead of printing usage and exiting
        command = self.prog.partition(" ")[2]
        raise UsageError(f"{command}: {message}" if command else message)


def _one_line(message: str) -> str:
    """A message on one line, control characters escaped (it may quote a file)."""
    return terminal_safe(" ".join(str(message).split("\n")).replace("\r", " "))


def _out(text: str) -> None:
    """Print a command's output: every text in it that came from a file (names) has its
    control characters escaped; the output's own line breaks are kept."""
    print(terminal_safe(text, keep_newlines=True))


class _Run:
    """The command being run: its cancel event, and whether work was abandoned (a
    worker still running when main returned: the process must end at once, see
    ``finish``)."""

    cancel = threading.Event()
    abandoned = False


def time_budget_s(command: str) -> float | None:
    """The time budget of ``command`` in seconds (None: unbounded)."""
    env = os.environ.get("DIMFIT_TIME_BUDGET_S")
    if env:
        try:
            value = float(env)
        except ValueError:
            raise InputError(f"{env!r} is not a number of seconds", key="DIMFIT_TIME_BUDGET_S") from None
        if not 0.0 < value < 1e7:
            raise InputError(f"{env!r} is not a number of seconds above 0", key="DIMFIT_TIME_BUDGET_S")
        return value
    return TIME_BUDGET_S.get(command)


def _bounded(command: str, func, args) -> int:
    """Run ``func(args)`` in a worker thread and wait for it at most the command's time
    budget.  The main thread only waits, so Ctrl-C (KeyboardInterrupt) reaches it at
    once; on it, or when the budget runs out, the cancel event is set and the work is
    abandoned."""
    budget = time_budget_s(command)
    if budget is None:
        return func(args)
    _Run.cancel = threading.Event()
    box: dict[str, object] = {}
    # the worker's end is watched with an event of our own, not Thread.join/is_alive: a
    # KeyboardInterrupt inside join() can leave a running thread marked as stopped
    finished = threading.Event()

    def work():
        try:
            # Ctrl-C goes to the main thread: the kernel delivers a signal to any thread
            # that does not block it, and a worker busy in compiled code would hold it
            # (threads this one starts inherit the mask)
            if hasattr(signal, "pthread_sigmask"):
                signal.pthread_sigmask(signal.SIG_BLOCK, {signal.SIGINT, signal.SIGTERM})
            box["code"] = func(args)
        except BaseException as err:   # noqa: BLE001 - handed to the main thread
            box["error"] = err
        finally:
            finished.set()

    worker = threading.Thread(target=work, name=f"dimfit-{command}", daemon=True)
    try:
        worker.start()
        deadline = time.monotonic() + budget
        while not finished.is_set() and time.monotonic() < deadline:
            finished.wait(min(0.1, max(deadline - time.monotonic(), 0.0)))   # short waits: a signal is seen at once
        if not finished.is_set():
            _Run.cancel.set()
            finished.wait(CANCEL_GRACE_S)
            _Run.abandoned = not finished.is_set()
            return _stop(EXIT_TIME_BUDGET, f"{command}: stopped after its time budget of {budget:g} s "
                         "(a larger one: set DIMFIT_TIME_BUDGET_S to the seconds to allow)")
        if isinstance(box.get("error"), _cancelled_type()):
            return _stop(EXIT_TIME_BUDGET, f"{command}: stopped after its time budget of {budget:g} s "
                         "(a larger one: set DIMFIT_TIME_BUDGET_S to the seconds to allow)")
    except KeyboardInterrupt:
        _Run.cancel.set()
        _Run.abandoned = not finished.is_set()
        raise
    if "error" in box:
        raise box["error"]  # type: ignore[misc]
    return int(box.get("code", 0))  # type: ignore[arg-type]


def _cancelled_type():
    from compat.runs import Cancelled

    return Cancelled


def _stop(code: int, message: str) -> int:
    print(f"{PROG}: error: {_one_line(message)}", file=sys.stderr)
    return code


def finish(code: int) -> int:
    """End of the program (not of ``main``): where a command's worker was abandoned
    (Ctrl-C, time budget) the process ends at once, without waiting for it and without
    the interpreter's shutdown, whose thread joins a second Ctrl-C would interrupt."""
    if _Run.abandoned:
        for stream in (sys.stdout, sys.stderr):
            try:
                stream.flush()
            except (OSError, ValueError):
                pass
        os._exit(code)
    return code


def _bug_report(err: SolverError, argv: Sequence[str] | None) -> str:
    """Write the circuit and the simulation's settings to a new bug-report file in the
    current folder (else the temporary folder); returns its name ("" if none could be
    written).  Never overwrites: the first free ``dimfit-bug-report-N.toml``."""
    import tempfile

    from loads.files import circuit_to_toml, write_text_atomic

    if err.circuit is None:
        return ""
    settings = ", ".join(f"{k} = {v!r}" for k, v in err.settings.items())
    command = " ".join(argv) if argv is not None else " ".join(sys.argv[1:])
    header = "".join(f"# {_escape(line)}\n" for line in (
        "dimfit bug report: the simulator could not go on with this circuit.",
        f"error: {err}", f"command: dimfit {command}", f"simulation settings: {settings}",
        "The circuit below is the one simulated (a range input at one of its ends where the file has ranges)."))
    text = header + circuit_to_toml(err.circuit)
    for folder in (".", tempfile.gettempdir()):
        for n in range(1, 1000):
            path = os.path.join(folder, f"{BUG_REPORT_STEM}-{n}.toml")
            if os.path.exists(path):
                continue
            try:
                write_text_atomic(path, text, overwrite=False)
            except InputError as write_err:
                if "already exists" in write_err.reason:
                    continue
                break
            return path
    return ""


def _escape(text: str) -> str:
    """Text from a file made safe for a terminal (``report.terminal_safe``)."""
    return terminal_safe(text)


def _fail(message: str) -> int:
    print(f"{PROG}: error: {_one_line(message)}", file=sys.stderr)
    return 2


def _simulator():
    """``loads.simulation``, set to print its COMPILE_NOTICE on stderr the moment it
    starts compiling the integrator (a first run only)."""
    from loads import simulation

    simulation.compile_notice = lambda: print(f"{PROG}: {simulation.COMPILE_NOTICE}", file=sys.stderr, flush=True)
    return simulation


def _read(path: str):
    """The circuit in ``path``; a legal but unusual value gives one warning line each
    on stderr (the physical ranges of the file reference, ``loads.files.PHYSICAL``)."""
    from loads.files import read_circuit

    notes: list[str] = []
    circuit = read_circuit(path, notes=notes)
    for note in notes:
        print(f"{PROG}: warning: {_one_line(note)}", file=sys.stderr)
    return circuit


def _progress(label: str):
    """A progress callback drawing on stderr when it is a terminal, else None."""
    if not sys.stderr.isatty():
        return None

    def report(done: int, total: int) -> None:
        end = "\n" if done >= total else ""
        print(f"\r{label}: {done}/{total}", end=end, file=sys.stderr, flush=True)

    return report


def _finite(x) -> float | None:
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


# --------------------------------------------------------------------------- check

def _check_and_print(circuit, *, as_json: bool = False, as_markdown: bool = False) -> int:
    try:
        from compat.evaluate import evaluate
        from compat.render import render_markdown, render_table
        _simulator()
    except ImportError as err:
        return _fail(f"the checks are not available in this installation ({err})")
    from compat.report import Verdict

    report = evaluate(circuit, progress=_progress("checking"), cancel=_Run.cancel)
    if as_json:
        print(json.dumps(report.to_json(), indent=2, allow_nan=False, default=_json_default))
    elif as_markdown:
        _out(render_markdown(report, circuit))
    else:
        _out(render_table(report))
    return 0 if report.verdict in (Verdict.SUITABLE, Verdict.SUITABLE_WITH_CAUTIONS) else 1


def _json_default(obj):
    """Arrays as lists, enums as their file strings, parameter records (a proposed
    load-correction device) as tables of their fields in SI units."""
    if hasattr(obj, "tolist"):
        return obj.tolist()
    if hasattr(obj, "value"):
        return obj.value
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        return {f.name: getattr(obj, f.name) for f in dataclasses.fields(obj)}
    raise TypeError(f"not JSON serialisable: {type(obj).__name__}")


def cmd_check(args) -> int:
    circuit = _read(args.file)
    return _check_and_print(circuit, as_json=args.json, as_markdown=args.markdown)


# ------------------------------------------------------------------------ simulate

def _angles(values, fired) -> list[float | None]:
    return [(_finite(v) if f else None) for v, f in zip(values, fired)]


def simulation_json(circuit, result, *, start: str) -> dict:
    """The ``simulate --json`` object of one simulation (docs/design.md, JSON output)."""
    import numpy as np

    hc = result.half_cycles
    fired = [math.isfinite(float(a)) for a in hc.firing_angle_deg]
    last = result.last_cycle()
    return {
        "schema": 1,
        "circuit": circuit.name,
        "setting": result.setting,
        "forced_firing_angle_deg": result.forced_firing_angle_deg,
        "start": start,
        "frequency_hz": result.frequency_hz,
        "half_cycles": len(hc),
        "firing_angle_deg": _angles(hc.firing_angle_deg, fired),
        "extinction_angle_deg": _angles(hc.extinction_angle_deg, fired),
        "peak_current_a": _angles(hc.peak_current_a, fired),
        "load_rms_v": last["load_rms_v"],
        "load_rms_a": last["load_rms_a"],
        "power_w": last["power_w"],
        "i2t_a2s": _finite(hc.i2t_a2s[0]),
        "t_s": np.asarray(result.t_s, dtype=float).tolist(),
        "supply_v": np.asarray(result.supply_v, dtype=float).tolist(),
        "load_v": np.asarray(result.load_v, dtype=float).tolist(),
        "load_a": np.asarray(result.load_a, dtype=float).tolist(),
        "dimmer_a": np.asarray(result.dimmer_a, dtype=float).tolist(),
    }


def _simulation_table(circuit, result, *, start: str) -> str:
    hc = result.half_cycles
    what = (f"firing angle {result.forced_firing_angle_deg:g}°" if result.forced_firing_angle_deg is not None
            else f"setting {result.setting:g}" if result.setting is not None else "full setting")
    lines = [f"{circuit.name} — {what}, {len(hc) // 2} cycles from {start}", ""]
    lines.append(f"{'half':>4} {'pol':>3} {'fired °':>8} {'ends °':>8} {'peak A':>8} {'I²t A²s':>9} "
                 f"{'load V':>7} {'load A':>7} {'power W':>8}")

    def cell(x, width, fmt):
        return f"{'—':>{width}}" if x is None or not math.isfinite(float(x)) else f"{float(x):>{width}{fmt}}"

    for i in range(len(hc)):
        fired = math.isfinite(float(hc.firing_angle_deg[i]))
        lines.append(f"{i + 1:>4} {'+' if hc.polarity[i] > 0 else '-':>3} "
                     f"{cell(hc.firing_angle_deg[i] if fired else None, 8, '.1f')} "
                     f"{cell(hc.extinction_angle_deg[i] if fired else None, 8, '.1f')} "
                     f"{cell(hc.peak_current_a[i], 8, '.3f')} {cell(hc.i2t_a2s[i], 9, '.4f')} "
                     f"{cell(hc.load_rms_v[i], 7, '.1f')} {cell(hc.load_rms_a[i], 7, '.3f')} "
                     f"{cell(hc.power_w[i], 8, '.1f')}")
    last = result.last_cycle()
    lines += ["",
              f"last full cycle: load {last['load_rms_v']:.1f} V rms, {last['load_rms_a']:.3f} A rms, "
              f"{last['power_w']:.1f} W",
              f"first half-cycle: I²t {float(hc.i2t_a2s[0]):.4g} A²s, peak {float(hc.peak_current_a[0]):.3g} A",
              "", FIGURES_NOTE]
    return "\n".join(lines)


def cmd_simulate(args) -> int:
    if args.setting is not None and not 0.0 <= args.setting <= 1.0:
        return _fail(f"simulate: --setting {args.setting:g} is outside 0–1 (1 is brightest)")
    if args.firing_angle is not None and not 0.0 <= args.firing_angle <= 180.0:
        return _fail(f"simulate: --firing-angle {args.firing_angle:g} is outside 0–180°")
    if not 1 <= args.cycles <= 1000:
        return _fail(f"simulate: --cycles {args.cycles} is outside 1–1000")
    circuit = _read(args.file)
    try:
        simulate = _simulator().simulate
    except ImportError as err:
        return _fail(f"the simulator is not available in this installation ({err})")
    result = simulate(circuit, setting=args.setting, firing_angle_deg=args.firing_angle,
                      cycles=args.cycles, start=args.start)
    if args.json:
        print(json.dumps(simulation_json(circuit, result, start=args.start), allow_nan=False))
    elif args.csv:
        writer = csv.writer(sys.stdout, lineterminator="\n")
        writer.writerow(["t_s", "supply_v", "load_v", "load_a", "dimmer_a"])
        for row in zip(result.t_s, result.supply_v, result.load_v, result.load_a, result.dimmer_a):
            writer.writerow([f"{float(x):.9g}" for x in row])
    else:
        _out(_simulation_table(circuit, result, start=args.start))
    return 0


# --------------------------------------------------------------------------- sweep

def sweep_row(point) -> dict:
    """One sweep point with the report's sweep keys (plus the switch's counters)."""
    return {"direction": point.direction, "setting": _finite(point.setting),
            "firing_angle_deg": _finite(point.firing_angle_deg),
            "conduction_angle_deg": _finite(point.conduction_angle_deg),
            "load_rms_v": _finite(point.load_rms_v), "load_rms_a": _finite(point.load_rms_a),
            "power_w": _finite(point.power_w), "light_fraction": _finite(point.light_fraction),
            "stable": bool(point.stable), "fired_fraction": _finite(point.fired_fraction),
            "failed_latches": int(point.failed_latches), "early_dropouts": int(point.early_dropouts),
            "refirings": int(point.refirings)}


def cmd_sweep(args) -> int:
    if not 2 <= args.points <= 1001:
        return _fail(f"sweep: --points {args.points} is outside 2–1001")
    circuit = _read(args.file)
    try:
        sweep = _simulator().sweep
    except ImportError as err:
        return _fail(f"the simulator is not available in this installation ({err})")
    ascending = [i / (args.points - 1) for i in range(args.points)]
    directions = ["down", "up"] if args.direction == "both" else [args.direction]
    rows = []
    for direction in directions:
        settings = list(reversed(ascending)) if direction == "down" else ascending
        points = sweep(circuit, settings, direction, progress=_progress(f"sweep {direction}"), cancel=_Run.cancel)
        if _Run.cancel.is_set():             # stopped part-way: no partial curve is shown
            return EXIT_TIME_BUDGET
        rows += [sweep_row(p) for p in points]
    if args.json:
        print(json.dumps({"schema": 1, "circuit": circuit.name, "sweep": rows}, indent=2, allow_nan=False))
        return 0

    def cell(x, width, fmt):
        return f"{'—':>{width}}" if x is None else f"{x:>{width}{fmt}}"

    lines = [circuit.name, "", f"{'dir':<5} {'setting':>7} {'fired °':>8} {'conducts °':>10} {'load V':>7} "
             f"{'load A':>7} {'power W':>8} {'light %':>8}  stable"]
    for r in rows:
        light = None if r["light_fraction"] is None else 100.0 * r["light_fraction"]
        lines.append(f"{r['direction']:<5} {r['setting']:>7.3f} {cell(r['firing_angle_deg'], 8, '.1f')} "
                     f"{cell(r['conduction_angle_deg'], 10, '.1f')} {cell(r['load_rms_v'], 7, '.1f')} "
                     f"{cell(r['load_rms_a'], 7, '.3f')} {cell(r['power_w'], 8, '.1f')} {cell(light, 8, '.1f')}  "
                     f"{'yes' if r['stable'] else 'NO'}")
    lines += ["", FIGURES_NOTE]
    _out("\n".join(lines))
    return 0


# ---------------------------------------------------------------------------- size

def cmd_size(args) -> int:
    circuit = _read(args.file)
    try:
        from compat.render import render_sizing
        from compat.sizing import size
        _simulator()
    except ImportError as err:
        return _fail(f"sizing is not available in this installation ({err})")
    result = size(circuit, progress=_progress("sizing"))
    if args.json:
        print(json.dumps(result, indent=2, allow_nan=False, default=_json_default))
    else:
        _out(render_sizing(result))
    return 0


# ------------------------------------------------------------------------ diagnose

def cmd_diagnose(args) -> int:
    """Exit 0: a modelled mechanism reproduces the symptom; 1: none does."""
    from compat.diagnose import Symptom, parse_observation

    observations = [parse_observation(t) for t in (args.observed or [])]
    try:
        symptom = Symptom(args.symptom)
    except ValueError:
        raise InputError(f"{args.symptom!r} is not a symptom; known: " + ", ".join(s.value for s in Symptom),
                         key="--symptom") from None
    circuit = _read(args.file)
    try:
        from compat.diagnose import diagnose
        from compat.diagnose_render import render_diagnosis, render_diagnosis_markdown
        _simulator()
    except ImportError as err:
        return _fail(f"the diagnosis is not available in this installation ({err})")
    d = diagnose(circuit, symptom, observations=observations, progress=_progress("diagnosing"), cancel=_Run.cancel)
    if args.json:
        print(json.dumps(d.to_json(), indent=2, allow_nan=False, default=_json_default))
    elif args.markdown:
        _out(render_diagnosis_markdown(d))
    else:
        _out(render_diagnosis(d))
    return 0 if d.possible else 1


# ------------------------------------------------------------------ demo, catalogue

def cmd_demo(args) -> int:
    from loads.catalogue import demo_circuit, demo_text
    from loads.files import write_text_atomic

    circuit = demo_circuit()
    write_text_atomic(args.path, demo_text(), overwrite=False)
    print(f"wrote the demo circuit to {_one_line(args.path)}", file=sys.stderr)
    code = _check_and_print(circuit)
    # The demo's job is done once its check is shown, whatever the verdict.
    return 0 if code in (0, 1) else code


def _summary(obj) -> str:
    from loads.dimmer import Dimmer

    if isinstance(obj, Dimmer):
        return f"{obj.edge.value} edge, {obj.wiring.value}, {obj.control.value}, {obj.rated_load_w:g} W, min {obj.min_load_w:g} W"
    return f"{obj.kind.value}, {obj.rated_power_w:g} W {obj.rated_voltage_v:g} V"


def cmd_selftest(args) -> int:
    from compat import selftest

    ok, line = selftest.run(_simulator())
    print(f"{PROG} selftest: {line}")
    return 0 if ok else 1


def cmd_catalogue(args) -> int:
    from loads.catalogue import list_archetypes

    items = list_archetypes()
    width = max(len(a.name) for a in items)
    print("Built-in archetypes (invented and generic, not real products):")
    for a in items:
        print(f"  {a.kind:<6}  {a.name:<{width}}  {_summary(a.object)}")
    return 0


# ------------------------------------------------------------------------ open

def _open_command(open_app: Callable[[str | None], int | None]) -> Callable[[argparse.Namespace], int]:
    """``dimfit open FILE`` (and ``dimfit`` alone) with the app the caller supplies:
    ``open_app(path)`` runs it (None: the demo circuit) and returns an exit code or None."""
    def cmd_open(args) -> int:
        path = getattr(args, "file", None)
        if path is not None:
            _read(path)                  # bad input: one line, exit 2, before the app starts
        result = open_app(path)
        return result if isinstance(result, int) else 0
    return cmd_open


# ---------------------------------------------------------------------------- main

def build_parser(open_app: Callable[[str | None], int | None] | None = None) -> argparse.ArgumentParser:
    """The command line; with ``open_app``, also ``open FILE`` (see ``_open_command``)."""
    from compat.symptoms import Symptom      # a light module (no simulator)

    parser = _Parser(prog=PROG, description="Will this phase-cut dimmer work, safely, with these lamps?")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    if open_app is not None:
        p = sub.add_parser("open", help="open the terminal app on a circuit file")
        p.add_argument("file")
        p.set_defaults(func=_open_command(open_app))

    p = sub.add_parser("check", help="run all checks on a circuit file")
    p.add_argument("file")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--json", action="store_true", help="machine-readable report")
    g.add_argument("--markdown", action="store_true", help="report as Markdown")
    p.set_defaults(func=cmd_check)

    p = sub.add_parser("simulate", help="waveforms at one setting or firing angle")
    p.add_argument("file")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--setting", type=float, help="control setting 0–1 (1 is brightest)")
    g.add_argument("--firing-angle", type=float, metavar="DEG", help="force the firing angle [deg]")
    p.add_argument("--cycles", type=int, default=10, help="mains cycles to simulate (default 10)")
    p.add_argument("--from", dest="start", choices=("cold", "switch-on", "steady"), default="cold",
                   help="cold: filaments cold, capacitors empty (default); switch-on: as cold, the dimmer "
                        "starting up as it does; steady: periodic state")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--json", action="store_true")
    g.add_argument("--csv", action="store_true", help="columns t_s,supply_v,load_v,load_a,dimmer_a")
    p.set_defaults(func=cmd_simulate)

    p = sub.add_parser("sweep", help="the dimming curve across the control range")
    p.add_argument("file")
    p.add_argument("--points", type=int, default=21, help="settings from 0 to 1 (default 21)")
    p.add_argument("--direction", choices=("up", "down", "both"), default="down")
    p.add_argument("--json", action="store_true")
    p.set_defaults(func=cmd_sweep)

    p = sub.add_parser("size", help="lamp-count limits and load-correction sizing")
    p.add_argument("file")
    p.add_argument("--json", action="store_true")
    p.set_defaults(func=cmd_size)

    p = sub.add_parser("diagnose", help="from a symptom seen on site to its likely cause, and a trial plan")
    p.add_argument("file")
    p.add_argument("--symptom", required=True, metavar="NAME", help=", ".join(Symptom))
    p.add_argument("--observed", action="append", metavar="KEY=VALUE",
                   help="what was seen or read: steady_down_to, comes_on_at (knob 0-1 or %%), off_voltage_v, "
                        "off_current_a, full_current_a, crest_factor, dc_current_a, trial_lamp_beside (0-1 or %%), "
                        "light_when_off=yes|no")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--json", action="store_true")
    g.add_argument("--markdown", action="store_true")
    p.set_defaults(func=cmd_diagnose)

    p = sub.add_parser("demo", help="write the demo circuit to a file and check it")
    p.add_argument("path", nargs="?", default=DEFAULT_DEMO_PATH, help=f"(default {DEFAULT_DEMO_PATH})")
    p.set_defaults(func=cmd_demo)

    p = sub.add_parser("catalogue", help="list the built-in archetypes")
    p.set_defaults(func=cmd_catalogue)

    p = sub.add_parser("selftest", help="compile the simulator now (first run only) and check it")
    p.set_defaults(func=cmd_selftest)

    from compat.describe import add_parser as add_describe
    add_describe(sub)
    return parser


def main(argv: Sequence[str] | None = None, *, open_app: Callable[[str | None], int | None] | None = None) -> int:
    """Run the command line; returns the exit code.  ``open_app``: see ``_open_command``
    (without it, ``open`` is not a command and a command is required).  A program ends
    with ``finish(main())``."""
    parser = build_parser(open_app)
    shown = warnings.showwarning
    warnings.showwarning = _show_warning
    try:
        args = parser.parse_args(argv)
        if args.command is None:
            if open_app is None:
                raise UsageError("a command is required")
            return _open_command(open_app)(argparse.Namespace(file=None))
        if args.command in TIME_BUDGET_S:
            return _bounded(args.command, args.func, args)
        return args.func(args)
    except SolverError as err:
        where = _bug_report(err, argv)
        tail = (f"; the circuit and settings are in {where} for a bug report" if where
                else "; no bug report could be written")
        return _stop(EXIT_SOLVER, f"{_escape(str(err))}{tail}")
    except UsageError as err:
        return _fail(f"{err} (see {PROG} --help)")
    except SystemExit as exc:            # --help and friends
        code = exc.code
        return code if isinstance(code, int) else (0 if code is None else 2)
    except InputError as err:
        return _fail(str(err))
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as err:
        return _fail(str(err))
    except OSError as err:
        if isinstance(err, BrokenPipeError):
            return 0
        where = f"{err.filename}: " if err.filename else ""
        return _fail(f"{where}{err.strerror or err}")
    except KeyboardInterrupt:
        print(f"{PROG}: interrupted", file=sys.stderr)
        return EXIT_INTERRUPTED
    finally:
        warnings.showwarning = shown


def _show_warning(message, category, filename, lineno, file=None, line=None) -> None:
    """A model's warning (outside its data's range) as one line, not Python's two."""
    print(f"{PROG}: warning: {_one_line(str(message))}", file=sys.stderr)


if __name__ == "__main__":
    sys.exit(finish(main()))
