"""Where the first run's compile time goes (issue 10), outside the suite.

    .venv/bin/python -m tests.compile_profile [--top 15]

Compiles the integrator once in a fresh process with an empty numba cache (a temporary
``NUMBA_CACHE_DIR``) by simulating one cycle of the demo circuit, and reports from
numba's event API (``numba.core.event``): how many functions and type specialisations
numba compiled (ours and its own helpers), the time in numba's own passes (type
inference, lowering, ...) and in LLVM (``numba:llvm_lock``), and the functions that
cost most on their own (their passes and LLVM work, the functions they call excluded;
a caller's LLVM work includes linking and optimising its callees' code again).  The
listeners add some overhead: compare runs of this script with each other, and time
the first run itself with ``python -m tests.bench``.
"""
from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from collections import Counter, defaultdict
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]


def _child(top: int) -> None:
    from numba.core import event

    stack: list[list] = []            # [kind, name, start, nested events' time, nested compiles' time]
    own = defaultdict(float)          # per compiled function, nested compiles excluded
    by_kind = defaultdict(float)      # exclusive time: numba passes, LLVM, the rest
    by_pass = defaultdict(float)
    specialisations = Counter()

    class Listener(event.Listener):
        def __init__(self, kind: str):
            self.kind = kind

        def on_start(self, ev):
            if self.kind == "numba:compile":
                py = ev.data["dispatcher"].py_func
                name = f"{py.__module__}.{py.__qualname__}"
                specialisations[name] += 1
            elif self.kind == "numba:run_pass":
                name = ev.data["name"].split(" [")[0]
            else:
                name = ""
            stack.append([self.kind, name, time.perf_counter(), 0.0, 0.0])

        def on_end(self, ev):
            kind, name, t0, nested, nested_compiles = stack.pop()
            dt = time.perf_counter() - t0
            by_kind[kind] += dt - nested
            if kind == "numba:run_pass":
                by_pass[name] += dt - nested
            if kind == "numba:compile":
                own[name] += dt - nested_compiles
            if stack:
                stack[-1][3] += dt
            if kind == "numba:compile":
                for frame in reversed(stack):
                    if frame[0] == "numba:compile":
                        frame[4] += dt
                        break

    for kind in ("numba:compile", "numba:run_pass", "numba:llvm_lock"):
        event.register(kind, Listener(kind))

    from loads import simulation
    from loads.catalogue import demo_circuit

    t0 = time.perf_counter()
    simulation.simulate(demo_circuit(), setting=0.5, cycles=1, samples_per_cycle=20)
    wall = time.perf_counter() - t0

    ours = {n for n in specialisations if n.startswith("loads.")}
    print(f"compile of the integrator (+ one cycle of the demo): {wall:.1f} s wall")
    print(f"functions compiled: {len(specialisations)} ({len(ours)} ours), "
          f"specialisations: {sum(specialisations.values())} "
          f"({sum(specialisations[n] for n in ours)} ours)")
    print(f"time in numba's passes {by_kind['numba:run_pass']:.2f} s, in LLVM {by_kind['numba:llvm_lock']:.2f} s")
    for name, t in sorted(by_pass.items(), key=lambda kv: -kv[1])[:4]:
        print(f"  {name:<30} {t:6.2f} s")
    print(f"the {top} costliest functions on their own (s, specialisations):")
    for name, t in sorted(own.items(), key=lambda kv: -kv[1])[:top]:
        print(f"  {name:<60} {t:6.2f}  {specialisations[name]}")
    several = sorted(n for n in ours if specialisations[n] > 1)
    if several:
        print("ours compiled more than once:", ", ".join(several))


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(prog="python -m tests.compile_profile", description=__doc__.split("\n\n")[0])
    ap.add_argument("--top", type=int, default=15, help="how many functions to list (default 15)")
    ap.add_argument("--child", action="store_true", help=argparse.SUPPRESS)
    args = ap.parse_args(argv)
    if args.child:
        _child(args.top)
        return 0
    with tempfile.TemporaryDirectory(prefix="dimfit-compile-") as tmp:
        env = dict(os.environ) | {"NUMBA_CACHE_DIR": tmp, "PYTHONPATH": str(REPO)}
        return subprocess.run([sys.executable, "-m", "tests.compile_profile", "--child", "--top", str(args.top)],
                              cwd=REPO, env=env).returncode


if __name__ == "__main__":
    sys.exit(main())
