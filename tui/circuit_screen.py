"""The main screen: it owns the circuit being edited, its file, and the last report.

Every accepted edit replaces the (immutable) circuit, marks it unsaved, and schedules
a check after a short quiet spell.  The check runs in one thread worker
(``exclusive=True``) on the circuit as it was when the worker started, with a cancel
event; its progress and result come back as messages tagged with a generation number,
so a result for an older circuit is never shown as current.
"""
from __future__ import annotations

import dataclasses
import math
import os
import re
import tempfile
import threading
import time
from pathlib import Path

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Footer, Header, TabbedContent, TabPane

from compat.report import Report, Status, terminal_safe
from loads.errors import InputError
from loads.load import LoadGroup
from tui.modals import (CautionsScreen, CheckDetailsScreen, ChoiceScreen, HelpScreen, PathPrompt, PickerScreen,
                        SizingScreen, TextPrompt)
from tui.widgets import CautionStrip, CheckList, CircuitOutline, PartEditor, VerdictBar

# Engineering choice: long enough to cover a burst of keystrokes, short enough that
# the verdict seems to follow the typing.
DEBOUNCE_S = 0.4
# Engineering choice: progress messages at most this often (the UI needs no more).
PROGRESS_INTERVAL_S = 0.1
# A first correction device when the user fits one by hand: an R–C bypass of
# 220 Ω and 100 nF (common practice, no source: X2 capacitors of 47–470 nF with a
# series resistor of a few hundred ohms).  The sizing screen proposes a real one.
DEFAULT_CORRECTION = dict(name="correction device", resistance_ohm=220.0, series_capacitance_f=100e-9)
# The picker's first entry: describe the lamp or dimmer from its label (tui/label_forms.py).
FROM_LABEL = object()


_INDEX = re.compile(r"^loads\[(\d+)\]")


def _value_at(circuit, path: str):
    """The value a range's path (``loads[2].bleeder_a``, ``dimmer.rc_diac.breakover_v``) names."""
    obj = circuit
    for part in path.split("."):
        m = re.fullmatch(r"(\w+)\[(\d+)\]", part)
        if m:
            seq = getattr(obj, m.group(1), ())
            i = int(m.group(2)) - 1
            obj = seq[i] if 0 <= i < len(seq) else None
        else:
            obj = getattr(obj, part, None)
        if obj is None:
            return None
    return obj


def ranges_still_meant(circuit):
    """The circuit without ranges that no longer describe it: a value edited away from
    its range's midpoint (the rule the file writer applies), a part replaced, a group
    that is gone.  The checks would otherwise still judge the range's ends."""
    kept = []
    for r in circuit.ranges:
        value = _value_at(circuit, r.path)
        if isinstance(value, (int, float)) and math.isclose(value, 0.5 * (r.low + r.high), rel_tol=1e-9,
                                                              abs_tol=1e-300):
            kept.append(r)
    if len(kept) == len(circuit.ranges):
        return circuit
    return dataclasses.replace(circuit, ranges=tuple(kept))


def renumbered(ranges, mapping) -> tuple:
    """Ranges of lamp groups moved to new places: ``mapping(i)`` is the new 1-based
    index of group i, or None where the group is gone."""
    out = []
    for r in ranges:
        m = _INDEX.match(r.path)
        if m is None:
            out.append(r)
            continue
        new = mapping(int(m.group(1)))
        if new is None:
            continue
        out.append(dataclasses.replace(r, path=_INDEX.sub(f"loads[{new}]", r.path, count=1),
                                       file_key=_INDEX.sub(f"loads[{new}]", r.file_key, count=1)))
    return tuple(out)


class CircuitScreen(Screen):
    """Edit a circuit and see its verdict."""

    BINDINGS = [
        Binding("f1", "help", "Help", priority=True),
        Binding("question_mark", "help", "Help", show=False),
        Binding("ctrl+s", "save", "Save", priority=True),
        Binding("f2", "save_as", "Save as", priority=True, show=False),
        Binding("ctrl+o", "open", "Open", priority=True, show=False),
        Binding("ctrl+r", "export", "Export", priority=True, show=False),
        Binding("f3", "tab('edit')", "Circuit", priority=True, show=False),
        Binding("f4", "tab('checks')", "Checks", priority=True, show=False),
        Binding("f5", "waveforms", "Waves", priority=True),
        Binding("f6", "curve", "Curve", priority=True),
        Binding("f7", "sizing", "Sizing", priority=True),
        Binding("f8", "cautions", "Cautions", priority=True),
        Binding("f9", "diagnose", "Diagnose", priority=True, show=False),
        Binding("exclamation_mark", "cautions", "Cautions", show=False),
    ]

    class Progress(Message):
        def __init__(self, generation: int, fraction: float) -> None:
            super().__init__()
            self.generation = generation
            self.fraction = fraction

    class Evaluated(Message):
        def __init__(self, generation: int, report: Report | None, error: str | None) -> None:
            super().__init__()
            self.generation = generation
            self.report = report
            self.error = error

    def __init__(self, circuit, path: Path | None, services) -> None:
        super().__init__()
        self.services = services
        self.circuit = circuit
        self.path = path
        self.dirty = False
        self.report: Report | None = None
        self.report_generation = -1       # generation the shown report belongs to
        self.generation = 0               # bumps on every change of the circuit
        self.evaluating = False
        self.eval_error: str | None = None
        self._cancel: threading.Event | None = None
        self._debounce = None
        self._cautions: tuple[str, ...] | None = None

    # ------------------------------------------------------------ layout
    def compose(self) -> ComposeResult:
        yield Header(show_clock=False, icon="≈")
        yield VerdictBar(id="verdict")
        with TabbedContent(initial="edit", id="tabs"):
            with TabPane("Circuit F3", id="edit"):
                with Horizontal(id="edit-body"):
                    yield CircuitOutline(id="outline")
                    yield PartEditor(id="editor")
            with TabPane("Checks F4", id="checks"):
                yield CheckList(id="check-list")
        yield CautionStrip(id="caution-strip")
        # compact, with the rarer keys only in the help (F1), so the footer fits 80 columns
        yield Footer(compact=True)

    async def on_mount(self) -> None:
        self.query_one(CircuitOutline).show_circuit(self.circuit, "load:0" if self.circuit.loads else "supply")
        await self._show_part()
        self._update_title()
        self.query_one(CautionStrip).show(self.cautions, [])
        self.query_one(CircuitOutline).focus()
        self._start_evaluation()

    @property
    def cautions(self) -> tuple[str, ...]:
        if self.report is not None and self.report.cautions:
            return tuple(self.report.cautions)
        if self._cautions is None:
            self._cautions = tuple(self.services.cautions())
        return self._cautions

    def _update_title(self) -> None:
        self.title = f"dimfit · {'* ' if self.dirty else ''}{terminal_safe(self.circuit.name)}"
        self.sub_title = (self.path.name if self.path else "no file") + (" · unsaved" if self.dirty else "")

    # ------------------------------------------------------------ circuit changes
    async def set_circuit(self, circuit, *, select: str | None = None, dirty: bool = True) -> None:
        """Replace the circuit (already validated), refresh the views, schedule a check."""
        circuit = ranges_still_meant(circuit)
        self.circuit = circuit
        self.dirty = dirty or self.dirty
        self.query_one(CircuitOutline).show_circuit(circuit, select)
        await self._show_part()
        self._update_title()
        self._circuit_changed()

    async def _show_part(self) -> None:
        key = self.query_one(CircuitOutline).current_key or "supply"
        await self.query_one(PartEditor).show_part(key, self._part(key))

    def _part(self, key: str):
        if key.startswith("load:"):
            return self.circuit.loads[int(key[5:])]
        return getattr(self.circuit, key)

    def _with_part(self, key: str, obj):
        if key.startswith("load:"):
            loads = list(self.circuit.loads)
            loads[int(key[5:])] = obj
            return dataclasses.replace(self.circuit, loads=tuple(loads))
        return dataclasses.replace(self.circuit, **{key: obj})

    async def _try_change(self, build, *, select: str | None = None) -> bool:
        """Apply ``build()`` (a new circuit); an InputError is shown, the circuit kept."""
        try:
            circuit = build()
        except InputError as error:
            self.notify(str(error), title="Not changed", severity="error")
            return False
        await self.set_circuit(circuit, select=select)
        return True

    @on(CircuitOutline.Selected)
    async def _selected(self, event: CircuitOutline.Selected) -> None:
        await self.query_one(PartEditor).show_part(event.key, self._part(event.key))

    @on(PartEditor.Edited)
    async def _edited(self, event: PartEditor.Edited) -> None:
        try:
            circuit = ranges_still_meant(self._with_part(event.key, event.obj))
        except InputError as error:
            self.notify(str(error), title="Not changed", severity="error")
            return
        self.circuit = circuit
        self.dirty = True
        outline = self.query_one(CircuitOutline)
        outline.show_circuit(circuit)
        if event.key == "dimmer" or event.key == "breaker":  # the field set may follow the edit
            await self._show_part()
        self._update_title()
        self._circuit_changed()

    @on(PartEditor.PresetChosen)
    async def _preset(self, event: PartEditor.PresetChosen) -> None:
        supply = self.circuit.supply
        if (supply.voltage_v, supply.frequency_hz) == (event.voltage_v, event.frequency_hz):
            return                        # the preset shown on entry: nothing chosen
        await self._try_change(lambda: dataclasses.replace(self.circuit, supply=dataclasses.replace(
            self.circuit.supply, voltage_v=event.voltage_v, frequency_hz=event.frequency_hz)))

    @on(CircuitOutline.Command)
    async def _command(self, event: CircuitOutline.Command) -> None:
        key, loads = event.key or "", list(self.circuit.loads)
        index = int(key[5:]) if key.startswith("load:") else None
        if event.action == "add":
            self.action_add_part("dimmer" if key == "dimmer" else "lamp")
        elif event.action == "count" and index is not None:
            group = loads[index]
            await self._try_change(lambda: self._with_part(key, dataclasses.replace(
                group, count=group.count + event.delta)), select=key)
        elif event.action == "count":
            self.notify("+ and - change the count of a lamp group; choose one in the outline.")
        elif event.action == "duplicate" and index is not None:
            copy = dataclasses.replace(loads[index], name=loads[index].name + " (copy)")
            # later groups move one place on; the copy takes the original's ranges
            moved = renumbered(self.circuit.ranges, lambda i: i if i <= index + 1 else i + 1)
            copied = renumbered([r for r in self.circuit.ranges if _INDEX.match(r.path)
                                 and int(_INDEX.match(r.path).group(1)) == index + 1], lambda i: index + 2)
            await self._try_change(lambda: dataclasses.replace(self.circuit, loads=tuple(
                loads[:index + 1] + [copy] + loads[index + 1:]), ranges=moved + copied), select=f"load:{index + 1}")
        elif event.action == "remove" and index is not None:
            if len(loads) == 1:
                self.notify("A circuit needs at least one lamp group.", severity="warning")
                return
            moved = renumbered(self.circuit.ranges,
                               lambda i: i if i <= index else (None if i == index + 1 else i - 1))
            await self._try_change(lambda: dataclasses.replace(self.circuit, loads=tuple(
                loads[:index] + loads[index + 1:]), ranges=moved), select=f"load:{max(index - 1, 0)}")
        elif event.action == "remove" and key in ("breaker", "correction"):
            await self._try_change(lambda: dataclasses.replace(self.circuit, **{key: None}), select=key)
        elif event.action == "fit":
            await self.toggle_correction()
        elif event.action == "profile":
            self.action_save_profile(key)
        else:
            self.notify("Nothing to do for this part.", severity="information")

    async def toggle_correction(self) -> None:
        from loads.linear import Linear
        if self.circuit.correction is None:
            await self._try_change(lambda: dataclasses.replace(
                self.circuit, correction=Linear(**DEFAULT_CORRECTION)), select="correction")
        else:
            await self._try_change(lambda: dataclasses.replace(self.circuit, correction=None), select="correction")

    # ------------------------------------------------------------ evaluation
    def _circuit_changed(self) -> None:
        self.generation += 1
        if self._cancel is not None:
            self._cancel.set()
        self._show_freshness()
        if self._debounce is not None:
            self._debounce.stop()
        self._debounce = self.set_timer(DEBOUNCE_S, self._start_evaluation)

    def _start_evaluation(self) -> None:
        self._debounce = None
        if self._cancel is not None:
            self._cancel.set()
        self._cancel = threading.Event()
        self.evaluating = True
        self.eval_error = None
        self._show_freshness()
        self.query_one(VerdictBar).show_progress(None)
        self._evaluate(self.circuit, self.generation, self._cancel)

    @work(thread=True, exclusive=True, group="evaluate", exit_on_error=False)
    def _evaluate(self, circuit, generation: int, cancel: threading.Event) -> None:
        last = [0.0, -1.0]

        def progress(done: int, total: int) -> None:
            now, fraction = time.monotonic(), done / total if total else 0.0
            if done == total or (now - last[0] >= PROGRESS_INTERVAL_S and fraction - last[1] >= 0.01):
                last[0], last[1] = now, fraction
                self.post_message(self.Progress(generation, fraction))

        try:
            report = self.services.evaluate(circuit, progress=progress, cancel=cancel)
        except InputError as error:
            self.post_message(self.Evaluated(generation, None, str(error)))
        except ImportError as error:
            self.post_message(self.Evaluated(generation, None, f"the checks are not available ({error})"))
        except Exception as error:  # noqa: BLE001 - shown in the verdict bar; the app keeps running
            if not cancel.is_set():
                self.post_message(self.Evaluated(generation, None, f"{type(error).__name__}: {error}"))
        else:
            if not cancel.is_set():
                self.post_message(self.Evaluated(generation, report, None))

    @on(Progress)
    def _progress(self, message: Progress) -> None:
        if message.generation == self.generation:
            self.query_one(VerdictBar).show_progress(message.fraction)

    @on(Evaluated)
    async def _evaluated(self, message: Evaluated) -> None:
        if message.generation != self.generation:
            return                        # an older circuit's answer: the next one is on its way
        self.evaluating = False
        if message.error is not None:
            self.eval_error = message.error
        else:
            self.report, self.report_generation = message.report, message.generation
            self.query_one(VerdictBar).show_report(self.report)
            await self.query_one(CheckList).show_report(self.report)
            self.query_one(CautionStrip).show(self.cautions, self.failing_safety())
        self._show_freshness()

    @property
    def stale(self) -> bool:
        return self.report is not None and self.report_generation != self.generation

    def failing_safety(self) -> list[str]:
        if self.report is None:
            return []
        return [c.id for c in self.report.checks if c.safety and c.status is Status.FAIL]

    def _show_freshness(self) -> None:
        bar = self.query_one(VerdictBar)
        busy = self.evaluating or self._debounce is not None
        self.query_one(CheckList).set_class(self.stale, "-stale")
        if self.eval_error:
            bar.show_state(f"cannot check: {self.eval_error}", stale=self.stale, busy=False, error=True)
        elif self.stale:
            bar.show_state("out of date · checking…" if busy else "out of date", stale=True, busy=busy)
        elif busy:
            bar.show_state("checking…", stale=False, busy=True)
        else:
            bar.show_state("up to date", stale=False, busy=False)

    def on_unmount(self) -> None:
        if self._cancel is not None:
            self._cancel.set()

    # ------------------------------------------------------------ checks
    @on(CheckList.Chosen)
    def _check_chosen(self, event: CheckList.Chosen) -> None:
        self.app.push_screen(CheckDetailsScreen(event.check, self.cautions, stale=self.stale))

    def action_tab(self, tab: str) -> None:
        self.query_one(TabbedContent).active = tab
        if tab == "checks":
            self.query_one("#check-items").focus()
        else:
            self.query_one(CircuitOutline).focus()

    # ------------------------------------------------------------ other screens
    def action_help(self) -> None:
        self.app.push_screen(HelpScreen())

    def action_cautions(self) -> None:
        self.app.push_screen(CautionsScreen(self.cautions, self.failing_safety()))

    def action_waveforms(self) -> None:
        from tui.waveform_screen import WaveformScreen
        self.app.push_screen(WaveformScreen(self.circuit, self.services, self.cautions))

    def action_curve(self) -> None:
        from tui.curve_screen import CurveScreen
        self.app.push_screen(CurveScreen(self.report, stale=self.stale, cautions=self.cautions))

    def action_diagnose(self) -> None:
        from tui.diagnose_screen import DiagnoseScreen
        self.app.push_screen(DiagnoseScreen(self.circuit, self.services.diagnose, self.cautions))

    def action_sizing(self) -> None:
        async def apply(device) -> None:
            if device is not None:
                if await self._try_change(lambda: dataclasses.replace(self.circuit, correction=device),
                                          select="correction"):
                    self.notify("Correction device applied; checking again.")
        self.app.push_screen(SizingScreen(self.circuit, self.services.size), apply)

    def action_add_part(self, what: str = "lamp") -> None:
        entries, problems = self._catalogue_entries(what)
        if self.services.describe is not None:
            entries.append(("describe it yourself", "From the label…", FROM_LABEL))

        async def chosen(obj) -> None:
            if obj is None:
                return
            if obj is FROM_LABEL:
                self._from_label(what)
                return
            if isinstance(obj, LoadGroup):
                loads = list(self.circuit.loads) + [obj]
                await self._try_change(lambda: dataclasses.replace(self.circuit, loads=tuple(loads)),
                                       select=f"load:{len(loads) - 1}")
            else:
                await self._try_change(lambda: dataclasses.replace(self.circuit, dimmer=obj), select="dimmer")
        title = "Add a lamp group" if what == "lamp" else "Replace the dimmer"
        self.app.push_screen(PickerScreen(title, entries, problems), chosen)

    def _from_label(self, what: str) -> None:
        """The "From the label…" form; the lamp or dimmer it returns joins the circuit
        with its ranges (renumbered to the group's place)."""
        from tui.label_forms import DimmerLabelScreen, LampLabelScreen
        supply = self.circuit.supply

        async def described(result) -> None:
            if result is None:
                return
            obj, ranges, lines = result
            if isinstance(obj, LoadGroup):
                index = len(self.circuit.loads) + 1
                moved = tuple(dataclasses.replace(r, path=r.path.replace("loads[1].", f"loads[{index}].", 1),
                                                  file_key=r.file_key.replace("loads[1].", f"loads[{index}].", 1))
                              for r in ranges)
                done = await self._try_change(lambda: dataclasses.replace(
                    self.circuit, loads=self.circuit.loads + (obj,), ranges=self.circuit.ranges + moved),
                    select=f"load:{index - 1}")
            else:
                kept = tuple(r for r in self.circuit.ranges if not r.path.startswith("dimmer."))
                done = await self._try_change(lambda: dataclasses.replace(
                    self.circuit, dimmer=obj, ranges=kept + tuple(ranges)), select="dimmer")
            if done:
                self.notify("Ranges: " + "; ".join(lines), title=f"Added '{terminal_safe(obj.name)}'", timeout=12)
        if what == "lamp":
            screen = LampLabelScreen(self.services.describe, {"volts": f"{supply.voltage_v:g}",
                                                              "hz": f"{supply.frequency_hz:g}"})
        else:
            screen = DimmerLabelScreen(self.services.describe, {"volts": f"{supply.voltage_v:g}"})
        self.app.push_screen(screen, described)

    def _catalogue_entries(self, what: str) -> tuple[list, list[str]]:
        from loads.dimmer import Dimmer
        want = LoadGroup if what == "lamp" else Dimmer
        entries, problems = [], []
        try:
            for item in self.services.catalogue.list_archetypes():
                obj = getattr(item, "object", None) or getattr(item, "obj", None)
                if isinstance(obj, want):
                    entries.append(("built-in archetypes (invented, generic)", item.name, obj))
        except Exception as error:  # noqa: BLE001 - the picker still offers the profiles
            problems.append(f"Built-in catalogue not available: {error}")
        try:
            for path in self.services.files.list_profiles():
                try:
                    objs = self.services.files.read_profile(path)
                except InputError as error:
                    problems.append(str(error))
                    continue
                objs = objs if isinstance(objs, (list, tuple)) else [objs]
                for obj in objs:
                    if isinstance(obj, want):
                        entries.append(("your profiles", f"{obj.name} ({Path(str(path)).stem})", obj))
        except Exception as error:  # noqa: BLE001
            problems.append(f"Profiles not available: {error}")
        return entries, problems

    def action_save_profile(self, key: str) -> None:
        if not (key.startswith("load:") or key == "dimmer"):
            self.notify("Choose a lamp group or the dimmer to save as a profile.", severity="warning")
            return
        obj = self._part(key)

        def named(name: str | None, overwrite: bool = False) -> None:
            if not name:
                return
            try:
                where = self.services.files.save_profile(obj, name, overwrite=overwrite)
            except (FileExistsError, InputError) as error:
                if isinstance(error, InputError) and "exists" not in error.reason:
                    self.notify(str(error), title="Profile not saved", severity="error")
                    return
                self.app.push_screen(ChoiceScreen(f"A profile called '{name}' exists. Replace it?",
                                                  [("replace", "Replace"), ("cancel", "Keep it")]),
                                     lambda answer: named(name, True) if answer == "replace" else None)
                return
            except OSError as error:
                self.notify(str(error), title="Profile not saved", severity="error")
                return
            self.notify(f"Saved profile '{name}'" + (f" to {where}" if where else ""))
        self.app.push_screen(TextPrompt("Save as profile: name", obj.name), named)

    # ------------------------------------------------------------ files
    def _folder(self) -> Path:
        return self.path.parent if self.path else Path.cwd()

    def action_save(self) -> None:
        if self.path is None:
            self.action_save_as()
        else:
            self.save_to(self.path, overwrite=True)

    def save_to(self, path: Path, *, overwrite: bool, then=None) -> bool:
        try:
            if not overwrite and Path(path).exists():
                raise FileExistsError(path)
            self.services.files.write_circuit(self.circuit, path, overwrite=overwrite)
        except FileExistsError:
            def answer(choice: str | None) -> None:
                if choice == "replace":
                    self.save_to(path, overwrite=True, then=then)
            self.app.push_screen(ChoiceScreen(f"{path} exists. Replace it?",
                                              [("replace", "Replace"), ("cancel", "Cancel")]), answer)
            return False
        except (InputError, OSError) as error:
            self.notify(str(error), title="Not saved", severity="error")
            return False
        self.path, self.dirty = Path(path), False
        self._update_title()
        self.notify(f"Saved {path}")
        if then is not None:
            then()
        return True

    def action_save_as(self, then=None) -> None:
        name = (self.path.name if self.path else _file_name(self.circuit.name) + ".toml")

        def chosen(path: Path | None) -> None:
            if path is not None:
                self.save_to(path, overwrite=False, then=then)
        self.app.push_screen(PathPrompt("Save the circuit as", self._folder(), name), chosen)

    def action_open(self) -> None:
        def chosen(path: Path | None) -> None:
            if path is not None:
                self.app.call_later(self.open_path, path)

        def prompt() -> None:
            self.app.push_screen(PathPrompt("Open a circuit file", self._folder()), chosen)

        def answer(choice: str | None) -> None:
            if choice == "save":
                if self.path is None:
                    self.action_save_as(then=prompt)
                elif self.save_to(self.path, overwrite=True):
                    prompt()
            elif choice == "discard":
                prompt()
        if self.dirty:
            self.app.push_screen(ChoiceScreen("The circuit has unsaved changes.",
                                              [("save", "Save first"), ("discard", "Discard them"),
                                               ("cancel", "Cancel")]), answer)
        else:
            prompt()

    async def open_path(self, path: Path) -> None:
        try:
            circuit = self.services.files.read_circuit(path)
        except (InputError, OSError) as error:
            self.notify(str(error), title="Not opened", severity="error")
            return
        self.path, self.dirty = Path(path), False
        self.report = None
        self.query_one(VerdictBar).show_report(None)
        await self.query_one(CheckList).show_report(None)
        await self.set_circuit(circuit, select="load:0", dirty=False)
        self.notify(f"Opened {path}")

    def action_export(self) -> None:
        if self.report is None or self.stale:
            self.notify("Wait for the checks to finish: the report would not match the circuit.",
                        severity="warning")
            return
        report, circuit = self.report, self.circuit

        def chosen(path: Path | None, overwrite: bool = False) -> None:
            if path is None:
                return
            if path.exists() and not overwrite:
                self.app.push_screen(ChoiceScreen(f"{path} exists. Replace it?",
                                                  [("replace", "Replace"), ("cancel", "Cancel")]),
                                     lambda a: chosen(path, True) if a == "replace" else None)
                return
            try:
                text = self.services.render_markdown(report, circuit)
                write_text_atomic(path, text)
            except Exception as error:  # noqa: BLE001 - reported, never a crash
                # name the file asked for, never the temporary file beside it
                reason = error.strerror if isinstance(error, OSError) and error.strerror else str(error)
                self.notify(f"{path}: {reason}", title="Not exported", severity="error")
                return
            self.notify(f"Report written to {path}")
        default = (self.path.with_suffix(".md").name if self.path else _file_name(self.circuit.name) + ".md")
        self.app.push_screen(PathPrompt("Export the report (Markdown) to", self._folder(), default, browse=False),
                             chosen)

    def request_quit(self) -> None:
        """Quit, asking first when there are unsaved changes."""
        if not self.dirty:
            self.app.exit()
            return

        def answer(choice: str | None) -> None:
            if choice == "discard":
                self.app.exit()
            elif choice == "save":
                if self.path is None:
                    self.action_save_as(then=self.app.exit)
                elif self.save_to(self.path, overwrite=True):
                    self.app.exit()
        self.app.push_screen(ChoiceScreen("The circuit has unsaved changes. Quit anyway?",
                                          [("save", "Save and quit"), ("discard", "Quit without saving"),
                                           ("cancel", "Cancel")]), answer)


def _file_name(name: str) -> str:
    cleaned = "".join(ch if ch.isalnum() or ch in "-_" else "-" for ch in name.strip().lower())
    return "-".join(part for part in cleaned.split("-") if part) or "circuit"


def write_text_atomic(path: Path, text: str) -> None:
    """Write ``text`` to ``path`` via a temporary file in the same folder, then rename."""
    path = Path(path)
    handle, temp = tempfile.mkstemp(dir=path.parent, prefix="." + path.name, suffix=".tmp")
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as out:
            out.write(text)
        os.replace(temp, path)
    except BaseException:
        if os.path.exists(temp):
            os.unlink(temp)
        raise
