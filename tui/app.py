"""dimfit's terminal app.  ``run(path)`` is what the ``dimfit`` command calls.

The App is thin: it loads the circuit, holds the injected services (evaluator,
simulator, sizer, files, catalogue) and pushes the main screen, which owns the state.
Heavy modules (numpy, the simulator, the checks) are imported on first use only.
"""
from __future__ import annotations

from pathlib import Path

from textual.app import App

from tui.services import make_services


def fallback_circuit():
    """A small circuit to show when the built-in catalogue cannot be loaded (invented:
    one 60 W filament lamp on a default leading-edge dimmer)."""
    from loads.circuit import Circuit
    from loads.filament import Filament
    return Circuit(name="fallback (catalogue not available)", loads=(Filament(name="filament lamp"),))


class DimfitApp(App):
    """Will this dimmer work, safely, with these lamps?"""

    CSS_PATH = "dimfit.tcss"
    TITLE = "dimfit"
    ENABLE_COMMAND_PALETTE = False

    def __init__(self, circuit=None, path: str | Path | None = None, *, evaluate=None, simulate=None, size=None,
                 render_markdown=None, files=None, catalogue=None, cautions=None, diagnose=None) -> None:
        """circuit: the circuit to open (None: read ``path``, or the built-in demo);
        evaluate, simulate, size, render_markdown, files, catalogue, cautions, diagnose:
        replacements for the real dimfit functions and modules (tests inject fakes)."""
        super().__init__()
        self.services = make_services(evaluate=evaluate, simulate=simulate, size=size,
                                      render_markdown=render_markdown, files=files, catalogue=catalogue,
                                      cautions=cautions, diagnose=diagnose)
        self.initial_circuit = circuit
        self.initial_path = Path(path) if path is not None else None
        self.startup_problem: str | None = None

    def _load_circuit(self):
        if self.initial_circuit is not None:
            return self.initial_circuit
        if self.initial_path is not None:
            return self.services.files.read_circuit(self.initial_path)
        try:
            return self.services.catalogue.demo_circuit()
        except Exception as error:  # noqa: BLE001 - the app still opens, on a fallback circuit
            self.startup_problem = f"The built-in demo is not available ({error}); showing a fallback circuit."
            return fallback_circuit()

    def on_mount(self) -> None:
        from tui.circuit_screen import CircuitScreen
        self.services.set_notice(self.worker_notice)
        circuit = self._load_circuit()
        self.push_screen(CircuitScreen(circuit, self.initial_path,
                                       self.services))
        if self.startup_problem:
            self.notify(self.startup_problem, severity="warning", timeout=8)

    def worker_notice(self, text: str) -> None:
        """A notice from the work in progress (the simulator compiling on a first run),
        shown as a toast while it lasts; called from the thread that waits for the work."""
        try:
            self.call_from_thread(self.notify, text, title="First run", timeout=30)
        except RuntimeError:               # called from the app's own thread
            self.notify(text, title="First run", timeout=30)

    def on_unmount(self) -> None:
        self.services.shutdown()           # the worker process, if one was started

    @property
    def main_screen(self):
        from tui.circuit_screen import CircuitScreen
        return next(s for s in self.screen_stack if isinstance(s, CircuitScreen))

    async def action_quit(self) -> None:
        """ctrl+q: the main screen asks first if there are unsaved changes."""
        try:
            screen = self.main_screen
        except StopIteration:
            self.exit()
            return
        screen.request_quit()


def run(path: str | None = None) -> None:
    """Open the app on a circuit file, or on the built-in demo when ``path`` is None.
    A file that cannot be read gives a one-line error (exit 2), not a traceback."""
    import sys

    from loads.errors import InputError

    app = DimfitApp(path=path)
    if path is not None:
        try:
            app.initial_circuit = app.services.files.read_circuit(Path(path))
        except (InputError, OSError) as error:
            print(f"dimfit: {error}", file=sys.stderr)
            raise SystemExit(2) from None
    app.run()


if __name__ == "__main__":  # pragma: no cover
    import sys
    run(sys.argv[1] if len(sys.argv) > 1 else None)
