"""Modal screens.  Each returns a value with ``dismiss``; the caller acts on it."""
from __future__ import annotations

import threading
from pathlib import Path

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.screen import ModalScreen
from textual.widgets import Button, DirectoryTree, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from compat.notation import check_figures, sources_text
from compat.report import CheckResult, Status, terminal_safe
from loads.errors import InputError
from tui.units import format_number
from tui.widgets import STATUS_WORDS

HELP_TEXT = """\
[b]Anywhere[/b]
  F1 ?     this help              F8 !     safety cautions
  F3       circuit (edit)         F4       checks
  F5       waveforms              F6       dimming curve
  F7       sizing, correction     ctrl+q   quit (asks if unsaved)
  F9       diagnose a symptom (flicker, glow, trips, hum...)
  ctrl+s   save                   F2       save as
  ctrl+o   open a file            ctrl+r   export report (Markdown)
  tab      next field             escape   close a window

[b]Circuit outline[/b] (left)
  ↑ ↓      choose a part          a        add lamps (catalogue or
  + -      one lamp more / fewer           your profiles); on the
  d        copy the lamp group             dimmer: replace it
  x del    remove the lamp group  p        save lamp/dimmer profile
  f        fit or remove a correction device
  a, last entry "From the label…": a lamp or dimmer from what its
           label says and a meter reads

[b]Fields[/b]: type values as on a job sheet:
  47n  4.7 uF  4n7  60 W  150u  25 mA  4k7
  A bad value is marked at its field with the reason; the circuit
  keeps its last good value.

[b]Checks[/b]: ↑ ↓ and Enter (or a click) open a check's explanation,
  sources and remedy.
[b]Waveforms[/b]: [ ] move the setting by 0.05, { } by 0.01.
"""


class HelpScreen(ModalScreen[None]):
    BINDINGS = [Binding("escape,f1,question_mark,q", "dismiss(None)", "Close")]

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="help-box"):
            yield Static("dimfit · keys", classes="modal-title")
            with VerticalScroll():
                yield Static(HELP_TEXT, id="help-text")
            yield Button("Close", id="close", compact=True)

    @on(Button.Pressed, "#close")
    def _close(self) -> None:
        self.dismiss(None)


class CautionsScreen(ModalScreen[None]):
    BINDINGS = [Binding("escape,f8,exclamation_mark,q", "dismiss(None)", "Close")]

    def __init__(self, cautions: tuple[str, ...], failing_safety: list[str] | None = None) -> None:
        super().__init__()
        self.cautions = cautions
        self.failing_safety = failing_safety or []

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="cautions-box"):
            yield Static("Safety cautions", classes="modal-title")
            with VerticalScroll():
                if self.failing_safety:
                    yield Static(f"Failing safety checks: {', '.join(self.failing_safety)}. Do not energise "
                                 "this circuit as it stands.", classes="cautions-alarm")
                for text in self.cautions:
                    yield Static(f"• {text}", classes="caution-line")
            yield Button("Close", id="close", compact=True)

    @on(Button.Pressed, "#close")
    def _close(self) -> None:
        self.dismiss(None)


class CheckDetailsScreen(ModalScreen[None]):
    """One check: what it found, why, where the rule comes from, what to do."""

    BINDINGS = [Binding("escape,enter,q", "dismiss(None)", "Close")]

    def __init__(self, check: CheckResult, cautions: tuple[str, ...], stale: bool = False) -> None:
        super().__init__()
        self.check = check
        self.cautions = cautions
        self.stale = stale

    def compose(self) -> ComposeResult:
        c = self.check
        with Vertical(classes=f"modal-box status-{c.status.value}", id="details-box"):
            yield Static(f"{c.id} · {STATUS_WORDS.get(c.status, c.status)}", classes="modal-title details-status")
            with VerticalScroll():
                if self.stale:
                    yield Static("(from the last finished check; the circuit has changed since)", classes="stale-note")
                value, limit, margin = check_figures(c)
                yield Static(f"value {value}   limit {limit}   margin {margin}", classes="details-figures",
                             markup=False)
                yield Static(terminal_safe(c.message), classes="details-message", markup=False)
                if c.deciding_input:
                    yield Static(f"Decided by the range given for [b]{c.deciding_input}[/b].")
                yield Static(f"[b]Remedy:[/b] {c.remedy or 'none needed' if c.status is Status.PASS else c.remedy or 'none known'}",
                             classes="details-remedy")
                yield Static(f"[b]Sources:[/b] {sources_text(c.sources) if c.sources else 'none given'}",
                             classes="details-sources")
                if c.safety:
                    yield Static("This is a safety check. " + " ".join(self.cautions), classes="cautions-alarm")
            yield Button("Close", id="close", compact=True)

    @on(Button.Pressed, "#close")
    def _close(self) -> None:
        self.dismiss(None)


class ChoiceScreen(ModalScreen[str | None]):
    """A question with buttons; returns the chosen button's id (None on escape)."""

    BINDINGS = [Binding("escape", "dismiss(None)", "Cancel")]

    def __init__(self, question: str, choices: list[tuple[str, str]]) -> None:
        super().__init__()
        self.question = question
        self.choices = choices

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="choice-box"):
            yield Static(self.question, classes="choice-question")
            with Horizontal(classes="buttons"):
                for ident, label in self.choices:
                    yield Button(label, id=ident, compact=True)

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id)


class TextPrompt(ModalScreen[str | None]):
    """Ask for one line of text (a profile name); returns it, or None."""

    BINDINGS = [Binding("escape", "dismiss(None)", "Cancel")]

    def __init__(self, title: str, value: str = "") -> None:
        super().__init__()
        self.title_text = title
        self.value = value

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="prompt-box"):
            yield Static(self.title_text, classes="modal-title")
            yield Input(self.value, id="prompt-input")
            yield Label("", id="prompt-error", classes="field-error")

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        text = event.value.strip()
        if not text:
            self.query_one("#prompt-error", Label).update("a name is needed")
            self.query_one("#prompt-error").add_class("-shown")
            return
        self.dismiss(text)


class _TomlTree(DirectoryTree):
    def filter_paths(self, paths):
        return [p for p in paths if not p.name.startswith(".") and (p.is_dir() or p.suffix in (".toml", ".md"))]


class PathPrompt(ModalScreen[Path | None]):
    """Ask for a file path: type it, or pick a file in the tree.  Returns a Path or None."""

    BINDINGS = [Binding("escape", "dismiss(None)", "Cancel")]

    def __init__(self, title: str, start: Path, value: str = "", browse: bool = True) -> None:
        super().__init__()
        self.title_text = title
        self.start = start
        self.value = value
        self.browse = browse

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="path-box"):
            yield Static(self.title_text, classes="modal-title")
            yield Input(self.value, placeholder="path/to/file.toml", id="path-input")
            yield Label("", id="path-error", classes="field-error")
            if self.browse and self.start.is_dir():
                yield _TomlTree(self.start, id="path-tree")
            yield Static("Enter accepts · escape cancels", classes="hint")

    def on_mount(self) -> None:
        self.query_one("#path-input", Input).focus()

    @on(DirectoryTree.FileSelected)
    def _picked(self, event: DirectoryTree.FileSelected) -> None:
        self.query_one("#path-input", Input).value = str(event.path)
        self.query_one("#path-input", Input).focus()

    @on(Input.Submitted, "#path-input")
    def _submitted(self, event: Input.Submitted) -> None:
        text = event.value.strip()
        if not text:
            self.query_one("#path-error", Label).update("a file name is needed")
            return
        path = Path(text).expanduser()
        if not path.is_absolute():
            path = self.start / path
        self.dismiss(path)


class PickerScreen(ModalScreen[object | None]):
    """Pick a lamp (or dimmer) from the built-in archetypes and the user's profiles.

    entries: (section, label, object) in order; returns the chosen object or None."""

    BINDINGS = [Binding("escape", "dismiss(None)", "Cancel")]

    def __init__(self, title: str, entries: list[tuple[str, str, object]], problems: list[str]) -> None:
        super().__init__()
        self.title_text = title
        self.entries = entries
        self.problems = problems

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="picker-box"):
            yield Static(self.title_text, classes="modal-title")
            options: list = []
            section = None
            for index, (sec, label, _obj) in enumerate(self.entries):
                if sec != section:
                    options.append(Option(f"── {sec} ──", disabled=True))
                    section = sec
                options.append(Option(f"  {label}", id=str(index)))
            if not self.entries:
                options.append(Option("(nothing to choose from)", disabled=True))
            yield OptionList(*options, id="picker-list")
            for problem in self.problems:
                yield Static(problem, classes="hint")
            yield Static("Enter picks · escape cancels", classes="hint")

    def on_mount(self) -> None:
        listing = self.query_one(OptionList)
        listing.focus()
        for index in range(listing.option_count):
            if not listing.get_option_at_index(index).disabled:
                listing.highlighted = index
                break

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        if event.option.id is not None:
            self.dismiss(self.entries[int(event.option.id)][2])


def _describe(value, indent: int = 0) -> list[str]:
    """Lines for an arbitrary sizing result (dicts, lists, numbers, model objects)."""
    pad = "  " * indent
    lines: list[str] = []
    if isinstance(value, dict):
        for key, item in value.items():
            if isinstance(item, (dict, list, tuple)) and item:
                lines.append(f"{pad}{key}:")
                lines.extend(_describe(item, indent + 1))
            else:
                lines.append(f"{pad}{key}: {_scalar(item)}")
    elif isinstance(value, (list, tuple)):
        for item in value:
            sub = _describe(item, indent + 1)
            if sub:
                lines.append(pad + "- " + sub[0].strip())
                lines.extend(sub[1:])
    else:
        lines.append(pad + _scalar(value))
    return lines


def _scalar(value) -> str:
    if isinstance(value, float):
        return format_number(value)
    if value is None:
        return "—"
    if hasattr(value, "kind") and hasattr(value, "resistance_ohm"):
        from tui.units import format_quantity
        return (f"{terminal_safe(value.name)}: {format_quantity(value.series_capacitance_f or value.parallel_capacitance_f, 'F')}"
                f" with {format_quantity(value.resistance_ohm, 'Ω')}")
    return str(value)


def find_device(result):
    """The suggested correction device (a linear load group) inside a sizing result."""
    from loads.linear import Linear
    if isinstance(result, Linear):
        return result
    if isinstance(result, dict):
        for key in ("correction", "device", "correction_device", "suggested_correction"):
            if isinstance(result.get(key), Linear):
                return result[key]
        items = result.values()
    elif isinstance(result, (list, tuple)):
        items = result
    else:
        return None
    for item in items:
        found = find_device(item)
        if found is not None:
            return found
    return None


class SizingScreen(ModalScreen[object | None]):
    """Lamp-count limits and a correction device for the circuit; ``a`` applies the
    suggested device (the screen returns it), escape returns None."""

    BINDINGS = [Binding("escape,q", "dismiss(None)", "Close"), Binding("a", "apply", "Apply device")]

    class Done(Message):
        def __init__(self, result, error: str | None) -> None:
            super().__init__()
            self.result = result
            self.error = error

    def __init__(self, circuit, size) -> None:
        super().__init__()
        self.circuit = circuit
        self.sizer = size
        self.device = None
        self.cancel = threading.Event()

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="sizing-box"):
            yield Static("Sizing and load correction", classes="modal-title")
            with VerticalScroll():
                yield Static("sizing… (this runs the simulator several times)", id="sizing-text", markup=False)
            with Horizontal(classes="buttons"):
                yield Button("Apply device (a)", id="apply", disabled=True, compact=True)
                yield Button("Close", id="close", compact=True)

    def on_mount(self) -> None:
        self._run()

    @work(thread=True, exclusive=True, group="size")
    def _run(self) -> None:
        try:
            result = self.sizer(self.circuit)
        except InputError as error:
            self.post_message(self.Done(None, str(error)))
        except Exception as error:  # noqa: BLE001 - shown to the user, never crash the app
            self.post_message(self.Done(None, f"{type(error).__name__}: {error}"))
        else:
            self.post_message(self.Done(result, None))

    def on_sizing_screen_done(self, message: "SizingScreen.Done") -> None:
        text = self.query_one("#sizing-text", Static)
        if message.error:
            text.update(f"Sizing could not run: {message.error}")
            return
        self.device = find_device(message.result)
        try:  # the same text as `dimfit size`
            from compat.render import render_sizing
            lines = [render_sizing(message.result)]
        except Exception:  # noqa: BLE001 - a partial result (or a test's fake) is listed as it is
            lines = _describe(message.result)
        if self.device is None:
            lines.append("\nNo correction device suggested.")
        text.update("\n".join(lines))
        self.query_one("#apply", Button).disabled = self.device is None

    def action_apply(self) -> None:
        if self.device is not None:
            self.dismiss(self.device)

    @on(Button.Pressed, "#apply")
    def _apply(self) -> None:
        self.action_apply()

    @on(Button.Pressed, "#close")
    def _close(self) -> None:
        self.dismiss(None)
