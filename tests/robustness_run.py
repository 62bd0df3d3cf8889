"""Random legal circuits through the full ``dimfit check`` (issue 13), outside the suite.

    .venv/bin/python -m tests.robustness_run [--circuits 300] [--seed 1] [--jobs 2]
                                             [--budget 60] [--max-minutes 15] [--keep DIR]

Each circuit is drawn over the file reference's documented ranges
(``loads.files.PHYSICAL``): every required key, and each optional numeric key with
probability 0.35, from its ordinary span (85 %) or anywhere in its physical range
(15 %), log-uniform where the span covers more than a decade; enums at random; one to
three lamp groups of 1–10 units of 3–150 W.  The models' rules between keys
(latching ≥ holding, lamps within a transformer's VA, voltages below the rated
voltage...) are then kept (``legal``); what the models still refuse must be refused
with one line.  Each file goes through ``dimfit check --json`` in a forked
process (the kernel compiled once, in the parent) with ``DIMFIT_TIME_BUDGET_S`` set to
``--budget``; a child still running 15 s after that is killed.

Outcomes: completed (exit 0/1, a verdict, every figure finite or null), refused
(exit 2 with one line), solver gave up (exit 3 with one line and a bug report), timed
out (exit 4, or killed), NaN (a non-finite number reached the report), crashed
(anything else: a traceback, another exit code, more than one error line).  Files of
every outcome but completed are kept in ``--keep`` (default: a temporary folder).
"""
from __future__ import annotations

import argparse
import json
import math
import multiprocessing as mp
import os
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

import numpy as np

from loads.circuit import LOAD_CLASSES
from loads.dimmer import Dimmer, RcDiac
from loads.files import KEYS, PHYSICAL, REQUIRED
from loads.load import LoadKind
from loads.supply import PRESETS, Supply

P_OPTIONAL = 0.35        # each optional numeric key is set with this probability
P_FULL_RANGE = 0.15      # ... and drawn from the whole physical range, not the ordinary span
KILL_GRACE_S = 15.0


def draw_number(rng, row, kind: str, per_si_int: bool = False) -> float:
    full = rng.random() < P_FULL_RANGE
    lo, hi = (row.low, row.high) if full else (row.usual_low, row.usual_high)
    if row.zero and rng.random() < 0.1:
        return 0.0
    if lo > 0 and hi / lo > 10:
        x = math.exp(rng.uniform(math.log(lo), math.log(hi)))
    else:
        x = rng.uniform(lo, hi)
    return float(f"{x:.4g}")


def table_values(rng, cls, fixed: dict[str, object], skip=()) -> dict[str, object]:
    """File key -> value for one table: ``fixed``, every required key and some optional ones."""
    values = dict(fixed)
    required = set(REQUIRED.get(cls, ()))
    for key in KEYS[cls].values():
        if key.file_key in values or key.file_key in skip or key.kind == "table":
            continue
        if key.kind == "enum":
            if key.file_key in required or rng.random() < P_OPTIONAL:
                values[key.file_key] = str(rng.choice([m.value for m in key.enum]))
            continue
        if key.kind == "bool":
            if rng.random() < P_OPTIONAL:
                values[key.file_key] = bool(rng.random() < 0.5)
            continue
        row = PHYSICAL.get(key.field)
        if key.kind not in ("float", "int") or row is None:
            continue
        if key.file_key not in required and rng.random() >= P_OPTIONAL:
            continue
        x = draw_number(rng, row, key.kind)
        values[key.file_key] = int(round(x)) if key.kind == "int" else x
    return values


def legal(values: dict[str, object], rng) -> dict[str, object]:
    """Keep the models' rules between keys of one table (the file reference states
    them), so the circuit is legal: latching ≥ holding, lamps within the transformer's
    VA, voltages below the rated voltage..."""
    v = dict(values)

    def g(k, default):
        return v.get(k, default)

    if "latching_current_ma" in v or "holding_current_ma" in v:
        v["latching_current_ma"] = float(f"{g('holding_current_ma', 25.0) * rng.uniform(1.0, 3.0):.4g}")
    if "rated_va" in v:
        factor = 1.5 if v.get("kind") == "electronic-transformer" else 2.0
        v["lamp_power_w"] = float(f"{min(g('lamp_power_w', 50.0), 0.99 * factor * v['rated_va']):.4g}")
        if "min_load_w" in v:
            v["min_load_w"] = float(f"{min(v['min_load_w'], 0.5 * v['rated_va']):.4g}")
    rated_v = g("rated_voltage_v", 230.0)
    if "secondary_voltage_v" in v:
        v["secondary_voltage_v"] = float(f"{min(v['secondary_voltage_v'], 0.5 * rated_v):.4g}")
    if "start_voltage_v" in v:
        v["start_voltage_v"] = float(f"{min(v['start_voltage_v'], 0.9 * rated_v):.4g}")
    if "stop_voltage_v" in v:
        v["stop_voltage_v"] = float(f"{min(v['stop_voltage_v'], g('start_voltage_v', 60.0)):.4g}")
    if "max_firing_angle_deg" in v or "min_firing_angle_deg" in v:
        lo = min(g("min_firing_angle_deg", 20.0), 90.0)
        v["min_firing_angle_deg"] = lo
        v["max_firing_angle_deg"] = max(g("max_firing_angle_deg", 160.0), lo + 30.0)
    if "min_load_w" in v and "rated_load_w" in v:
        v["min_load_w"] = min(v["min_load_w"], 0.5 * v["rated_load_w"])
    if "breakover_v" in v:
        v["breakover_v"] = max(v["breakover_v"], 15.0)       # above the default 10 V snap-back
    return v


def lines_of(header: str, values: dict[str, object]) -> list[str]:
    def lit(x):
        if isinstance(x, bool):
            return "true" if x else "false"
        if isinstance(x, str):
            return f'"{x}"'
        return repr(x)
    return [header] + [f"{k} = {lit(x)}" for k, x in values.items()]


def random_circuit(rng, n: int) -> str:
    voltage, freq = PRESETS[list(PRESETS)[rng.integers(len(PRESETS))]]
    out = ["schema = 1", f'name = "random {n}"']
    out += lines_of("[supply]", table_values(rng, Supply, {"voltage_v": voltage, "frequency_hz": freq}))
    edge = str(rng.choice(["leading", "trailing"]))
    control = "phase" if edge == "trailing" or rng.random() < 0.5 else "rc-diac"
    rated = float(f"{math.exp(rng.uniform(math.log(150), math.log(2000))):.3g}")
    fixed = {"edge": edge, "wiring": str(rng.choice(["two-wire", "with-neutral"])), "control": control,
             "rated_load_w": rated, "min_load_w": float(f"{rng.uniform(0, 0.2) * rated:.3g}")}
    dimmer = legal(table_values(rng, Dimmer, fixed, skip=("gang", "fins_removed", "max_lamps")), rng)
    out += lines_of("[dimmer]", dimmer)
    if control == "rc-diac" and rng.random() < 0.5:
        out += lines_of("[dimmer.rc_diac]", legal(table_values(rng, RcDiac, {}, skip=("snapback_v", "asymmetry_v")),
                                                  rng))
    kinds = list(LoadKind)
    for g in range(rng.integers(1, 4)):
        kind = kinds[rng.integers(len(kinds))]
        cls = LOAD_CLASSES[kind]
        fixed = {"name": f"group {g + 1}", "kind": kind.value, "count": int(rng.integers(1, 11)),
                 "rated_voltage_v": voltage,
                 "rated_power_w": float(f"{math.exp(rng.uniform(math.log(3), math.log(150))):.3g}")}
        if kind in (LoadKind.MAGNETIC_TRANSFORMER, LoadKind.ELECTRONIC_TRANSFORMER):
            fixed["rated_va"] = float(f"{math.exp(rng.uniform(math.log(20), math.log(300))):.3g}")
        out += lines_of("[[loads]]", legal(table_values(rng, cls, fixed), rng))
    return "\n".join(out) + "\n"


def _child(path: str, out_path: str, err_path: str, budget: float) -> None:
    os.environ["DIMFIT_TIME_BUDGET_S"] = repr(budget)
    os.chdir(os.path.dirname(path))          # bug reports (exit 3) are written beside the circuit
    with open(out_path, "wb") as out, open(err_path, "wb") as err:
        os.dup2(out.fileno(), 1)
        os.dup2(err.fileno(), 2)
    sys.stdout = open(1, "w", closefd=False)
    sys.stderr = open(2, "w", closefd=False)
    from compat import cli
    code = 99
    try:
        code = cli.main(["check", "--json", path])
    except BaseException:                # noqa: BLE001 - a crash: recorded by the parent
        import traceback
        traceback.print_exc()
    sys.stdout.flush()
    sys.stderr.flush()
    os._exit(code)


def _non_finite(obj) -> bool:
    if isinstance(obj, float):
        return not math.isfinite(obj)
    if isinstance(obj, dict):
        return any(_non_finite(v) for v in obj.values())
    if isinstance(obj, list):
        return any(_non_finite(v) for v in obj)
    return False


def classify(code: int | None, out: str, err: str) -> str:
    lines = err.splitlines()
    if code is None:
        return "timed out"
    if "Traceback" in err or "Exception ignored" in err:
        return "NaN" if "JSON compliant" in err or "NaN" in err else "crashed"
    errors = [ln for ln in lines if not ln.startswith("dimfit: warning: ")]
    if code in (0, 1):
        try:
            report = json.loads(out, parse_constant=lambda c: float("nan"))
        except ValueError:
            return "crashed"
        if _non_finite(report):
            return "NaN"
        return "completed" if not errors and "verdict" in report else "crashed"
    one_line = len(errors) == 1 and errors[0].startswith("dimfit: error: ")
    if code == 2 and one_line:
        return "refused"
    if code == 3 and one_line:
        return "solver gave up"
    if code == 4 and one_line:
        return "timed out"
    return "crashed"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--circuits", type=int, default=300)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--jobs", type=int, default=2)
    ap.add_argument("--budget", type=float, default=60.0, help="DIMFIT_TIME_BUDGET_S for each check [s]")
    ap.add_argument("--max-minutes", type=float, default=15.0, help="stop starting new circuits after this")
    ap.add_argument("--keep", default=None, help="folder for the files of every outcome but completed")
    args = ap.parse_args(argv)
    from compat import evaluate  # noqa: F401 - compile and load the kernel once, before forking
    from loads.catalogue import demo_circuit
    from loads.simulation import simulate
    simulate(demo_circuit(), cycles=1)
    keep = Path(args.keep or tempfile.mkdtemp(prefix="dimfit-robustness-"))
    keep.mkdir(parents=True, exist_ok=True)
    work = Path(tempfile.mkdtemp(prefix="dimfit-robustness-work-"))
    rng = np.random.default_rng(args.seed)
    ctx = mp.get_context("fork")
    texts = [random_circuit(rng, n) for n in range(1, args.circuits + 1)]
    counts: Counter[str] = Counter()
    times: dict[str, list[float]] = {}
    running: dict[int, tuple] = {}
    t_start = time.monotonic()
    nxt = 0
    while nxt < len(texts) or running:
        while nxt < len(texts) and len(running) < args.jobs and time.monotonic() - t_start < 60 * args.max_minutes:
            n = nxt + 1
            path = work / f"c{n:04d}.toml"
            path.write_text(texts[nxt])
            outp, errp = work / f"c{n:04d}.out", work / f"c{n:04d}.err"
            proc = ctx.Process(target=_child, args=(str(path), str(outp), str(errp), args.budget))
            proc.start()
            running[n] = (proc, time.monotonic(), path, outp, errp)
            nxt += 1
        if nxt < len(texts) and time.monotonic() - t_start >= 60 * args.max_minutes and not running:
            break
        time.sleep(0.05)
        for n, (proc, t0, path, outp, errp) in list(running.items()):
            elapsed = time.monotonic() - t0
            if proc.is_alive() and elapsed < args.budget + KILL_GRACE_S:
                continue
            code = None
            if proc.is_alive():
                proc.kill()
            proc.join()
            if elapsed < args.budget + KILL_GRACE_S:
                code = proc.exitcode
            out, err = outp.read_text(errors="replace"), errp.read_text(errors="replace")
            outcome = classify(code, out, err)
            counts[outcome] += 1
            times.setdefault(outcome, []).append(elapsed)
            if outcome != "completed":
                stem = outcome.replace(" ", "-")
                (keep / f"{stem}-c{n:04d}.toml").write_text(path.read_text())
                (keep / f"{stem}-c{n:04d}.err").write_text(err)
                for report in path.parent.glob("dimfit-bug-report-*.toml"):
                    report.rename(keep / f"{stem}-c{n:04d}-{report.name}")
            del running[n]
            done = sum(counts.values())
            if done % 25 == 0:
                print(f"{done} done in {time.monotonic() - t_start:.0f} s: {dict(counts)}", flush=True)
    total = sum(counts.values())
    wall = time.monotonic() - t_start
    print(f"\n{total} random circuits (seed {args.seed}, {args.jobs} jobs, budget {args.budget:g} s each) "
          f"in {wall:.0f} s")
    for outcome in ("completed", "refused", "solver gave up", "timed out", "NaN", "crashed"):
        t = times.get(outcome, [])
        extra = f"  (time per check: median {np.median(t):.1f} s, max {max(t):.1f} s)" if t else ""
        print(f"  {outcome:<15} {counts.get(outcome, 0):>4}{extra}")
    print(f"files of the outcomes other than completed: {keep}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
