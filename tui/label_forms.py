"""Short forms: a lamp from its label (and a meter), a dimmer from its faceplate.

Reached from the lamp and dimmer pickers ("From the label…").  The forms only collect
what the installer typed, in the trade's words; the estimate itself is
``compat.describe`` (through ``Services.describe``), run in a thread because the lamp's
first estimate takes a second or two.  Each form returns ``(object, ranges, lines)``:
the lamp group or dimmer, its ranges (``loads[1].…`` / ``dimmer.…``) and one line per
range to show, or None when cancelled.
"""
from __future__ import annotations

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Select, Static

from loads.errors import InputError
from tui.units import parse_quantity

# (form id, words on the form, unit typed, keyword of compat.describe, Readings field
# that an error names)
LAMP_FIELDS = (
    ("watts", "Watts on the label", "W", "watts", "rated_power_w"),
    ("volts", "Volts on the label", "V", "volts", "rated_voltage_v"),
    ("pf", "Power factor printed (if any)", "", "pf", "label_power_factor"),
    ("meter_w", "Meter: watts at full", "W", "meter_w", "meter_power_w"),
    ("meter_va", "Meter: VA", "VA", "meter_va", "meter_va"),
    ("meter_pf", "Meter: power factor", "", "meter_pf", "meter_power_factor"),
    ("amps", "Clamp: true-rms amps (one lamp)", "A", "amps", "clamp_current_a"),
    ("crest", "Crest factor (if the meter shows it)", "", "crest", "crest_factor"),
)
DIMMER_FIELDS = (
    ("watts", "Rated load (filament)", "W", "watts", "rated_load_w"),
    ("led_watts", "LED rating (if printed)", "W", "led_watts", "rated_led_w"),
    ("min_watts", "Minimum load", "W", "min_watts", "min_load_w"),
)


class _LabelForm(ModalScreen[tuple | None]):
    """Common part: rows of inputs, an error line, Add / Cancel, a worker."""

    BINDINGS = [Binding("escape", "dismiss(None)", "Cancel")]
    TITLE_TEXT = ""
    HINT = ""
    FIELDS: tuple = ()
    CALL = ""

    class Done(Message):
        def __init__(self, result, error: str | None) -> None:
            super().__init__()
            self.result = result
            self.error = error

    def __init__(self, describe, defaults: dict[str, str] | None = None) -> None:
        super().__init__()
        self.describe = describe
        self.defaults = defaults or {}

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="label-box"):
            yield Static(self.TITLE_TEXT, classes="modal-title")
            yield Static(self.HINT, classes="hint")
            with VerticalScroll(id="label-rows"):
                for fid, words, unit, _kw, _field in self.FIELDS:
                    with Horizontal(classes="form-row"):
                        yield Label(f"{words}{f' [{unit}]' if unit else ''}", classes="form-label", markup=False)
                        yield Input(self.defaults.get(fid, ""), id=f"f-{fid}", compact=True, classes="form-input")
                yield from self.choices()
            yield Label("", id="label-error", classes="form-error")
            with Horizontal(classes="buttons"):
                yield Button("Add", id="add", compact=True)
                yield Button("Cancel", id="cancel", compact=True)

    def choices(self) -> ComposeResult:
        return iter(())

    def on_mount(self) -> None:
        self.query_one(f"#f-{self.FIELDS[0][0]}", Input).focus()

    def _error(self, text: str) -> None:
        self.query_one("#label-error", Label).update(text)

    def values(self) -> dict:
        """The typed numbers by keyword (blank: left out); InputError names the row."""
        out: dict = {}
        for fid, words, unit, kw, _field in self.FIELDS:
            text = self.query_one(f"#f-{fid}", Input).value.strip()
            if not text:
                continue
            try:
                out[kw] = parse_quantity(text, unit)
            except InputError as err:
                raise InputError(err.reason, key=words) from None
        return out

    def words_of(self, key: str | None) -> str:
        for _fid, words, _unit, _kw, field in self.FIELDS:
            if key == field:
                return words
        return {"power_factor": "Meter: power factor", "rms_current_a": "Clamp: true-rms amps (one lamp)",
                "count": "Count"}.get(key or "", key or "")

    @on(Input.Submitted)
    @on(Button.Pressed, "#add")
    def _submit(self) -> None:
        try:
            kwargs = self.values()
            kwargs.update(self.choice_values())
        except InputError as err:
            self._error(f"{err.key}: {err.reason}" if err.key else err.reason)
            return
        self._error("estimating…")
        self.query_one("#add", Button).disabled = True
        self._run(kwargs)

    def choice_values(self) -> dict:
        return {}

    @work(thread=True, exclusive=True, group="describe")
    def _run(self, kwargs: dict) -> None:
        try:
            result = getattr(self.describe, self.CALL)(**kwargs)
        except InputError as err:
            self.post_message(self.Done(None, f"{self.words_of(err.key)}: {err.reason}" if err.key else err.reason))
        except TypeError as err:      # a required figure left blank
            self.post_message(self.Done(None, f"a figure is missing ({err})"))
        except Exception as err:  # noqa: BLE001 - shown to the user, never crash the app
            self.post_message(self.Done(None, f"{type(err).__name__}: {err}"))
        else:
            self.post_message(self.Done(result, None))

    @on(Done)
    def _done(self, message: "_LabelForm.Done") -> None:
        self.query_one("#add", Button).disabled = False
        if message.error:
            self._error(message.error)
            return
        self.dismiss(message.result)

    @on(Button.Pressed, "#cancel")
    def _cancel(self) -> None:
        self.dismiss(None)


class LampLabelScreen(_LabelForm):
    TITLE_TEXT = "Lamp from its label"
    HINT = ("Type what the label says; the meter readings are optional (lamp alone, at full, on a "
            "plain switch). Blank: not known. Unknowns become ranges.")
    FIELDS = LAMP_FIELDS
    CALL = "lamp_from_label"

    def choices(self) -> ComposeResult:
        with Horizontal(classes="form-row"):
            yield Label("Label says", classes="form-label")
            yield Select([("dimmable", "dimmable"), ("not dimmable", "not dimmable")], value="dimmable",
                         allow_blank=False, id="f-dimmable", compact=True, classes="form-input")
        with Horizontal(classes="form-row"):
            yield Label("Dimmer edge printed", classes="form-label")
            yield Select([("not printed", "none"), ("leading", "leading"), ("trailing", "trailing")], value="none",
                         allow_blank=False, id="f-edge", compact=True, classes="form-input")
        with Horizontal(classes="form-row"):
            yield Label("How many on the circuit", classes="form-label")
            yield Input(self.defaults.get("count", "1"), id="f-count", compact=True, classes="form-input")

    def choice_values(self) -> dict:
        edge = self.query_one("#f-edge", Select).value
        text = self.query_one("#f-count", Input).value.strip() or "1"
        if not text.isdigit() or not 1 <= int(text) <= 500:
            raise InputError(f"{text!r} is not a lamp count (1–500)", key="How many on the circuit")
        out = {"dimmable": self.query_one("#f-dimmable", Select).value == "dimmable", "count": int(text)}
        if edge != "none":
            out["edge"] = edge
        if "hz" in self.defaults:
            out["hz"] = float(self.defaults["hz"])
        return out


class DimmerLabelScreen(_LabelForm):
    TITLE_TEXT = "Dimmer from its faceplate"
    HINT = "Type what the faceplate or sheet says. Figures it does not print become ranges."
    FIELDS = DIMMER_FIELDS
    CALL = "dimmer_from_faceplate"

    def choices(self) -> ComposeResult:
        rows = (("edge", "Edge", [("leading (triac)", "leading"), ("trailing (transistor)", "trailing")], "leading"),
                ("wiring", "Wiring", [("two-wire (no neutral)", "two-wire"), ("with neutral", "with-neutral")],
                 "two-wire"),
                ("control", "Kind", [("usual for edge and wiring", "usual"), ("electronic phase control", "phase"),
                                     ("rotary RC-diac", "rc-diac")], "usual"),
                ("trim", "Low-end trim", [("no", "no"), ("yes", "yes")], "no"))
        for fid, words, options, value in rows:
            with Horizontal(classes="form-row"):
                yield Label(words, classes="form-label")
                yield Select(options, value=value, allow_blank=False, id=f"f-{fid}", compact=True, classes="form-input")

    def choice_values(self) -> dict:
        out = {"edge": self.query_one("#f-edge", Select).value, "wiring": self.query_one("#f-wiring", Select).value,
               "trim": self.query_one("#f-trim", Select).value == "yes"}
        control = self.query_one("#f-control", Select).value
        if control != "usual":
            out["control"] = control
        if "volts" in self.defaults:
            out["volts"] = float(self.defaults["volts"])
        return out

    def words_of(self, key: str | None) -> str:
        return {"edge": "Edge", "wiring": "Wiring", "control": "Kind", "voltage_v": "Supply"}.get(
            key or "", super().words_of(key))
