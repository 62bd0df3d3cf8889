"""The compiled integrator and the first run: numba's private ``_nrt=False`` flag
(pinned numba range in pyproject.toml), the cache look-up that decides whether to say
"compiling", and the notice itself."""
import os
import subprocess
import sys
from pathlib import Path

import numba
import numpy as np
import pytest

from loads import driver, electronic_transformer, filament, kernel, linear, transformer, tungsten
from loads import simulation as sim

REPO = Path(__file__).resolve().parents[2]


def _dispatchers():
    for mod in (kernel, filament, tungsten, driver, electronic_transformer, transformer, linear):
        for name, obj in vars(mod).items():
            if isinstance(obj, numba.core.registry.CPUDispatcher):
                yield f"{mod.__name__}.{name}", obj


@pytest.mark.regression
def test_every_compiled_function_keeps_nrt_off():
    # regression (our own convention): every compiled function of the simulator but
    # run (it allocates its work arrays) is declared with
    # _nrt=False (no reference counting: 30x less call overhead); numba must still
    # carry the flag as a target option
    allocating = {"loads.kernel.run"}
    found = dict(_dispatchers())
    assert allocating <= set(found) and len(found) > 30
    off = {name for name, d in found.items() if d.targetoptions.get("_nrt") is False}
    assert off == set(found) - allocating, f"without _nrt=False: {sorted(set(found) - off - allocating)}"


@pytest.mark.analytic
def test_numba_still_honours_nrt_false():
    # The flag is private: a numba that accepted it silently but ignored it would let a
    # function that allocates compile.  With NRT off, allocating an array must fail to
    # compile; the same function compiles with NRT on (the control).
    def alloc(n):
        return np.zeros(n)

    with pytest.raises(numba.core.errors.TypingError, match="zeros"):
        numba.njit(_nrt=False)(alloc)(3)
    np.testing.assert_array_equal(numba.njit(alloc)(3), np.zeros(3))   # exact: zeros


@pytest.mark.regression
def test_cache_lookup_sees_a_cold_and_a_warm_cache(tmp_path):
    # warm: this process has simulated, so the integrator is compiled and (the source
    # folder being writable here) in the cache; cold: an empty NUMBA_CACHE_DIR in a
    # fresh process (only the look-up runs, nothing compiles)
    from loads.catalogue import demo_circuit

    sim.simulate(demo_circuit(), setting=0.5, cycles=1, samples_per_cycle=20)
    assert sim._integrator_ready()
    if os.access(Path(kernel.__file__).parent, os.W_OK):
        assert sim.integrator_cached()
    code = "import loads.simulation as s; print(s.integrator_cached())"
    env = dict(os.environ) | {"NUMBA_CACHE_DIR": str(tmp_path), "PYTHONPATH": str(REPO)}
    out = subprocess.run([sys.executable, "-c", code], cwd=REPO, env=env, capture_output=True, text=True,
                         timeout=120)
    assert out.returncode == 0, out.stderr[-500:]
    assert out.stdout.strip() == "False"


@pytest.mark.regression
def test_compile_notice_once_and_only_when_cold(monkeypatch):
    from loads.catalogue import demo_circuit

    calls = []
    monkeypatch.setattr(sim, "compile_notice", lambda: calls.append(1))
    monkeypatch.setattr(sim, "_compile_checked", False)
    monkeypatch.setattr(sim, "_integrator_ready", lambda: False)      # as on a first run
    for _ in range(2):
        sim.simulate(demo_circuit(), setting=0.5, cycles=1, samples_per_cycle=20)
    assert calls == [1]
    monkeypatch.setattr(sim, "_compile_checked", False)
    monkeypatch.setattr(sim, "_integrator_ready", lambda: True)       # cached: say nothing
    sim.simulate(demo_circuit(), setting=0.5, cycles=1, samples_per_cycle=20)
    assert calls == [1]


@pytest.mark.regression
def test_the_app_worker_passes_the_compile_notice_on(monkeypatch):
    # the app's worker (tui.services) sends the notice ahead of the answer and the
    # runner hands it to its callback; the worker process is replaced by the same
    # function run in this thread, with a plain queue and event
    import queue
    import threading
    from concurrent.futures import Future

    from loads.catalogue import demo_circuit
    from tui.services import ProcessRunner

    class InlinePool:
        def submit(self, fn, *args):
            future = Future()
            future.set_result(fn(*args))
            return future

    class InlineManager:
        Queue = staticmethod(queue.Queue)
        Event = staticmethod(threading.Event)

    monkeypatch.setattr(sim, "compile_notice", None)                  # restored after the test
    monkeypatch.setattr(sim, "_compile_checked", False)
    monkeypatch.setattr(sim, "_integrator_ready", lambda: False)      # as on a first run
    runner = ProcessRunner()
    monkeypatch.setattr(runner, "_ensure", lambda: (InlinePool(), InlineManager()))
    seen = []
    runner.notice = seen.append
    res = runner.call("loads.simulation", "simulate", demo_circuit(), setting=0.5, cycles=1, samples_per_cycle=20)
    assert seen == [sim.COMPILE_NOTICE]
    assert res.half_cycles.start_s.size == 2          # and the answer still comes back: one cycle, two half-cycles
    monkeypatch.setattr(sim, "_compile_checked", False)
    monkeypatch.setattr(sim, "_integrator_ready", lambda: True)       # cached: no notice
    runner.call("loads.simulation", "simulate", demo_circuit(), setting=0.5, cycles=1, samples_per_cycle=20)
    assert seen == [sim.COMPILE_NOTICE]
