"""Waveforms at one control setting: supply and load voltage, load current.

The screen owns the setting; ``[``/``]`` move it (``{``/``}`` finely).  Each change
starts (after a short pause) one thread worker, exclusive, that runs the simulator on
the circuit the screen was opened with; the figures beside the plot are read from the
simulator's result (per-half-cycle angles, last-cycle rms and power).
"""
from __future__ import annotations

import math
import threading

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Footer, Header, Static

from compat.report import terminal_safe
from loads.errors import InputError
from tui.units import format_number, format_quantity

from textual_plotext import PlotextPlot

CYCLES_SHOWN = 3          # engineering choice: enough to see both polarities and repeatability
SETTLE_CYCLES = 4         # engineering choice: cycles run after a knob move before the plotted ones
STEP = 0.05               # engineering choice: 20 steps across the knob's travel
FINE_STEP = 0.01
DEBOUNCE_S = 0.25         # engineering choice: holding [ or ] runs one simulation, not many


def make_plot(**kwargs):
    """A plot widget drawn with the app's theme (textual-plotext)."""
    return PlotextPlot(**kwargs)


def waveform_figures(result) -> dict[str, float | None]:
    """Figures shown beside the plot, read from a SimResult (last full cycle)."""
    import numpy as np
    hc = result.half_cycles
    firing = np.asarray(hc.firing_angle_deg[-2:], dtype=float)
    extinction = np.asarray(hc.extinction_angle_deg[-2:], dtype=float)
    fired = ~np.isnan(firing)
    n_per_cycle = max(int(round(len(result.t_s) / max(len(hc) / 2, 1))), 1)
    tail = slice(-n_per_cycle, None)
    figures: dict[str, float | None] = {
        "firing_angle_deg": float(np.mean(firing[fired])) if fired.any() else None,
        "conduction_angle_deg": float(np.mean(extinction[fired] - firing[fired])) if fired.any() else None,
        "supply_peak_v": float(np.max(np.abs(result.supply_v[tail]))),
        "load_peak_v": float(np.max(np.abs(result.load_v[tail]))),
        "load_peak_a": float(np.max(np.abs(result.load_a[tail]))),
    }
    figures.update(result.last_cycle())
    return figures


class WaveformScreen(Screen):
    BINDINGS = [
        Binding("escape,q", "app.pop_screen", "Back"),
        Binding("left_square_bracket", "step(-1)", "Darker", key_display="["),
        Binding("right_square_bracket", "step(1)", "Brighter", key_display="]"),
        Binding("left_curly_bracket", "step(-0.2)", "Fine -", show=False),
        Binding("right_curly_bracket", "step(0.2)", "Fine +", show=False),
        Binding("f8", "cautions", "Cautions"),
    ]

    class Simulated(Message):
        def __init__(self, setting: float, result, error: str | None) -> None:
            super().__init__()
            self.setting = setting
            self.result = result
            self.error = error

    def __init__(self, circuit, services, cautions: tuple[str, ...], setting: float = 0.5) -> None:
        super().__init__()
        self.circuit = circuit
        self.services = services
        self.cautions = cautions
        self.setting = setting
        self.result = None
        self.figures: dict | None = None
        self._timer = None
        self._cancel: threading.Event | None = None

    def compose(self) -> ComposeResult:
        yield Header(show_clock=False, icon="≈")
        with Horizontal(id="wave-body"):
            with Vertical(id="wave-plots"):
                yield make_plot(id="plot-voltage")
                yield make_plot(id="plot-current")
            yield Static("", id="wave-figures")
        yield Static("Scope on a live circuit: differential probes or isolated supply. F8 more",
                     id="wave-caution", classes="cautions-line")
        yield Footer()

    def on_mount(self) -> None:
        self.title = f"dimfit · waveforms · {terminal_safe(self.circuit.name)}"
        self._show()
        self._run_now()

    def action_step(self, steps: float) -> None:
        value = round(min(max(self.setting + steps * STEP, 0.0), 1.0), 4)
        if value == self.setting:
            return
        self.setting = value
        self._show()
        if self._timer is not None:
            self._timer.stop()
        self._timer = self.set_timer(DEBOUNCE_S, self._run_now)

    def action_cautions(self) -> None:
        from tui.modals import CautionsScreen
        self.app.push_screen(CautionsScreen(self.cautions))

    def _run_now(self) -> None:
        self._timer = None
        if self._cancel is not None:
            self._cancel.set()
        self._cancel = threading.Event()
        self._simulate(self.setting, self._cancel)

    @work(thread=True, exclusive=True, group="simulate", exit_on_error=False)
    def _simulate(self, setting: float, cancel: threading.Event) -> None:
        try:
            # like a hand on the knob: each setting starts from where the last one left the
            # circuit (timing capacitor, filaments, bus voltages), so drop-out and snap-on
            # show as they happen; the first starts from the steady state
            previous = getattr(self.result, "final_state", None) or "steady"
            cycles = CYCLES_SHOWN + (SETTLE_CYCLES if previous != "steady" else 0)
            try:
                result = self.services.simulate(self.circuit, setting=setting, cycles=cycles, start=previous)
            except InputError:
                result = self.services.simulate(self.circuit, setting=setting, cycles=CYCLES_SHOWN, start="steady")
            error = None
        except InputError as exc:
            result, error = None, str(exc)
        except Exception as exc:  # noqa: BLE001 - shown on the screen, never a crash
            result, error = None, f"{type(exc).__name__}: {exc}"
        if not cancel.is_set():
            self.post_message(self.Simulated(setting, result, error))

    @on(Simulated)
    def _simulated(self, message: Simulated) -> None:
        if message.setting != self.setting:
            return
        if message.error:
            self.result, self.figures = None, None
            self._show(error=message.error)
            return
        self.result = message.result
        try:
            self.figures = waveform_figures(message.result)
        except Exception as exc:  # noqa: BLE001
            self.figures = None
            self._show(error=f"cannot read the result: {exc}")
            return
        self._plot()
        self._show()

    def _plot(self) -> None:
        result = self.result
        # the last CYCLES_SHOWN mains cycles of the run
        t_last = float(result.t_s[-1]) - CYCLES_SHOWN / float(result.frequency_hz)
        keep = [k for k, t in enumerate(result.t_s) if t >= t_last - 1e-12]
        t0 = float(result.t_s[keep[0]])
        t_ms = [(float(result.t_s[k]) - t0) * 1e3 for k in keep]
        voltage = self.query_one("#plot-voltage")
        plt = voltage.plt
        plt.clear_data()
        plt.clear_figure()
        plt.plot(t_ms, [float(result.supply_v[k]) for k in keep], label="supply V", marker="braille")
        plt.plot(t_ms, [float(result.load_v[k]) for k in keep], label="load V", marker="braille")
        plt.title("voltage [V]")
        current = self.query_one("#plot-current")
        plt = current.plt
        plt.clear_data()
        plt.clear_figure()
        plt.plot(t_ms, [float(result.load_a[k]) for k in keep], label="load A", marker="braille")
        plt.title("load current [A]")
        plt.xlabel("time [ms]")
        voltage.refresh()
        current.refresh()

    def _show(self, error: str | None = None) -> None:
        bar = "█" * int(round(self.setting * 10)) + "░" * (10 - int(round(self.setting * 10)))
        lines = [f"[b]setting[/b] {self.setting:.2f}", bar, ""]
        waiting = self.figures is None or self._timer is not None
        if error:
            lines.append(f"cannot simulate:\n{error}")
        elif self.figures is None:
            lines.append("simulating…")
        else:
            f = self.figures

            def angle(v):
                return "not firing" if v is None or math.isnan(v) else f"{format_number(v, 3)}°"
            lines += [
                f"firing     {angle(f['firing_angle_deg'])}",
                f"conduction {angle(f['conduction_angle_deg'])}",
                "",
                "[b]peaks[/b]",
                f" supply {format_quantity(f['supply_peak_v'], 'V', '', 3)}",
                f" load   {format_quantity(f['load_peak_v'], 'V', '', 3)}",
                f" load   {format_quantity(f['load_peak_a'], 'A', '', 3)}",
                "",
                "[b]rms, last cycle[/b]",
                f" load   {format_quantity(f['load_rms_v'], 'V', '', 3)}",
                f" load   {format_quantity(f['load_rms_a'], 'A', '', 3)}",
                f" power  {format_quantity(f['power_w'], 'W', '', 3)}",
            ]
            if waiting:
                lines.append("\n(updating…)")
        lines.append("\n\\[ darker  ] brighter\n{ } finely · esc back")
        self.query_one("#wave-figures", Static).update("\n".join(lines))

    def on_unmount(self) -> None:
        if self._cancel is not None:
            self._cancel.set()
