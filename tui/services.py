"""The work the app asks of the rest of dimfit, injectable for tests.

The app never imports the evaluator, simulator, sizer, file layer or catalogue at
start-up: each default here imports its module on first call (they pull in numpy,
numba and the kernel, which take seconds).  Tests pass fakes instead.
"""
from __future__ import annotations

import importlib
import threading
from dataclasses import dataclass
from typing import Any, Callable

# Shown when the checks module cannot give its own wording (compat.cautions not
# importable yet); the same substance as the cautions every report carries (README, Safety).
FALLBACK_CAUTIONS = (
    "Work on fixed wiring only if you are qualified and permitted to do so.",
    "Isolate the circuit and prove it dead before touching any conductor.",
    "Local wiring rules and the makers' instructions take precedence over this tool.",
    "The figures are estimates from models, not measurements.",
    "To look at dimmer waveforms on a live circuit use differential probes or an "
    "isolated supply; never float an oscilloscope's earth.",
)


def _lazy(module: str, name: str) -> Callable[..., Any]:
    def call(*args, **kwargs):
        return getattr(importlib.import_module(module), name)(*args, **kwargs)
    call.__name__ = name
    call.__qualname__ = f"{module}.{name}"
    return call


class _LazyModule:
    """Attribute access imports the module on first use."""

    def __init__(self, module: str) -> None:
        self._module = module

    def __getattr__(self, name: str):
        return getattr(importlib.import_module(self._module), name)


def _child_call(module: str, name: str, args: tuple, kwargs: dict, queue, cancel, with_progress: bool):
    """Runs in the worker process: call ``module.name`` and answer through ``queue``.
    Where the call starts the simulator compiling (a first run), a ("notice", text)
    message says so first."""
    try:
        from loads import simulation
        simulation.compile_notice = lambda: queue.put(("notice", simulation.COMPILE_NOTICE))
        function = getattr(importlib.import_module(module), name)
        if with_progress:
            kwargs = dict(kwargs, progress=lambda done, total: queue.put(("progress", done, total)),
                          cancel=cancel)
        result = function(*args, **kwargs)
    except Exception as error:  # noqa: BLE001 - sent back as text; the app shows it
        from loads.errors import InputError
        kind = "input" if isinstance(error, InputError) else "import" if isinstance(error, ImportError) else "other"
        queue.put(("error", kind, str(error) if kind != "other" else f"{type(error).__name__}: {error}"))
        return None
    queue.put(("done",))
    return result


class ProcessRunner:
    """Runs the heavy work in one persistent worker process.

    The simulator's compiled kernels hold the GIL for seconds at a time, which froze
    the app's input when they ran in a thread; a process keeps the UI responsive.
    Progress and the cancel request cross the boundary through a manager's queue and
    event.  Started on first use; ``shutdown`` ends it.  ``notice``, if set, is called
    with the worker's notices (the simulator compiling), from the calling thread."""

    def __init__(self) -> None:
        self._pool = None
        self._manager = None
        self._lock = threading.Lock()
        self.notice: Callable[[str], None] | None = None

    def _ensure(self):
        with self._lock:
            if self._pool is None:
                import multiprocessing
                from concurrent.futures import ProcessPoolExecutor
                import sys
                from multiprocessing import resource_tracker
                context = multiprocessing.get_context("spawn")   # never fork a threaded app
                # The tracker process is started with our stderr's file descriptor; while
                # Textual runs, sys.stderr is its capture object with no usable descriptor.
                saved = sys.stderr
                try:
                    if sys.__stderr__ is not None:
                        sys.stderr = sys.__stderr__
                    resource_tracker.ensure_running()
                    self._manager = context.Manager()
                finally:
                    sys.stderr = saved
                self._pool = ProcessPoolExecutor(max_workers=1, mp_context=context)
            return self._pool, self._manager

    def call(self, module: str, name: str, *args, progress=None, cancel=None, with_progress=False, **kwargs):
        import queue as queues
        from loads.errors import InputError
        pool, manager = self._ensure()
        queue, remote_cancel = manager.Queue(), manager.Event()
        future = pool.submit(_child_call, module, name, args, kwargs, queue, remote_cancel, with_progress)
        while True:
            if cancel is not None and cancel.is_set():
                remote_cancel.set()
            try:
                message = queue.get(timeout=0.05)
            except queues.Empty:
                if future.done() and queue.empty():
                    future.result()            # a crashed worker raises here
                    raise RuntimeError("the worker process ended without an answer")
                continue
            if message[0] == "progress":
                if progress is not None:
                    progress(message[1], message[2])
            elif message[0] == "notice":
                if self.notice is not None:
                    self.notice(message[1])
            elif message[0] == "error":
                raise {"input": InputError, "import": ImportError}.get(message[1], RuntimeError)(message[2])
            else:
                return future.result()

    def shutdown(self) -> None:
        with self._lock:
            if self._pool is not None:
                # a check may be running for seconds more: end the worker, not the user's wait
                for process in list(getattr(self._pool, "_processes", {}).values()):
                    process.terminate()
                self._pool.shutdown(wait=False, cancel_futures=True)
                self._manager.shutdown()
                self._pool = self._manager = None


def default_cautions() -> tuple[str, ...]:
    try:
        module = importlib.import_module("compat.cautions")
    except ImportError:
        return FALLBACK_CAUTIONS
    for name in ("CAUTIONS", "cautions", "SAFETY_CAUTIONS"):
        value = getattr(module, name, None)
        if callable(value):
            value = value()
        if value:
            return tuple(str(v) for v in value)
    return FALLBACK_CAUTIONS


@dataclass(slots=True)
class Services:
    """evaluate(circuit, progress=None, cancel=None) -> Report;
    simulate(circuit, setting=..., cycles=..., start=...) -> SimResult;
    size(circuit) -> dict; render_markdown(report, circuit) -> str;
    files: read_circuit, write_circuit, save_profile, list_profiles, read_profile;
    catalogue: list_archetypes, demo_circuit; cautions() -> tuple[str, ...];
    describe: lamp_from_label, dimmer_from_faceplate (compat.describe; None: not offered);
    diagnose(circuit, symptom, cancel=None) -> str (the text of ``dimfit diagnose``);
    set_notice(callback): where the work's notices go (the simulator compiling on a
    first run), called from the thread that waits for the work."""

    evaluate: Callable[..., Any]
    simulate: Callable[..., Any]
    size: Callable[..., Any]
    render_markdown: Callable[..., str]
    files: Any
    catalogue: Any
    cautions: Callable[[], tuple[str, ...]]
    shutdown: Callable[[], None] = lambda: None
    describe: Any = None
    diagnose: Callable[..., str] | None = None
    set_notice: Callable[[Callable[[str], None]], None] = lambda callback: None


def make_services(*, evaluate=None, simulate=None, size=None, render_markdown=None, files=None,
                  catalogue=None, cautions=None, describe=None, diagnose=None) -> Services:
    """Services with the real dimfit modules wherever no replacement is given."""
    runner = ProcessRunner()

    def real_evaluate(circuit, progress=None, cancel=None):
        return runner.call("compat.evaluate", "evaluate", circuit, progress=progress, cancel=cancel,
                           with_progress=True)

    def real_simulate(circuit, **kwargs):
        return runner.call("loads.simulation", "simulate", circuit, **kwargs)

    def real_size(circuit):
        return runner.call("compat.sizing", "size", circuit)

    def real_diagnose(circuit, symptom, cancel=None):
        return runner.call("compat.diagnose_render", "diagnose_text", circuit, symptom, cancel=cancel,
                           with_progress=True)

    services = Services(
        evaluate=evaluate or real_evaluate,
        simulate=simulate or real_simulate,
        size=size or real_size,
        render_markdown=render_markdown or _lazy("compat.render", "render_markdown"),
        files=files or _LazyModule("loads.files"),
        catalogue=catalogue or _LazyModule("loads.catalogue"),
        cautions=cautions or default_cautions,
        shutdown=runner.shutdown,
        describe=describe or _LazyModule("compat.describe"),
        diagnose=diagnose or real_diagnose,
        set_notice=lambda callback: setattr(runner, "notice", callback),
    )
    return services
