"""Widgets of the main screen; each shows one thing and posts messages up.

* ``CircuitOutline`` – the parts of the circuit; keys to add, count, copy, remove.
* ``PartEditor`` – the fields of one part; posts ``Edited`` with a valid new object,
  marks an invalid field with its reason and posts nothing.
* ``VerdictBar`` – overall verdict, counts, progress and whether it is out of date.
* ``CheckList`` – every check with status, value, limit and margin.
* ``CautionStrip`` – the safety cautions in one line, louder on a failing safety check.

Status colours come from CSS classes (``status-fail``, ``verdict-unsuitable``) set here
and styled in ``dimfit.tcss``.
"""
from __future__ import annotations

import math

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.widget import Widget
from textual.widgets import Input, Label, ListItem, ListView, OptionList, ProgressBar, Select, Static
from textual.widgets.option_list import Option

from compat.notation import check_figures
from compat.report import CheckResult, Report, Status, Verdict, terminal_safe
from loads.errors import InputError
from tui.fields import (SUPPLY_PRESETS, FieldSpec, error_text, field_text, fields_for, get_value, parse_field,
                        with_value)
from tui.units import format_number, format_quantity


# ---------------------------------------------------------------- outline
def part_keys(circuit) -> list[str]:
    return ["supply", "breaker", "dimmer"] + [f"load:{i}" for i in range(len(circuit.loads))] + ["correction"]


def part_label(circuit, key: str) -> str:
    if key == "supply":
        s = circuit.supply
        return f"Supply      {format_number(s.voltage_v)} V {format_number(s.frequency_hz)} Hz"
    if key == "breaker":
        b = circuit.breaker
        return "Breaker     none" if b is None else f"Breaker     {b.curve.value} {format_number(b.rated_current_a)} A"
    if key == "dimmer":
        d = circuit.dimmer
        return f"Dimmer      {d.edge.value} {format_number(d.rated_load_w)} W"
    if key == "correction":
        c = circuit.correction
        if c is None:
            return "Correction  none"
        return f"Correction  {format_quantity(c.series_capacitance_f, 'F')} {format_quantity(c.resistance_ohm, 'Ω')}"
    group = circuit.loads[int(key.split(":")[1])]
    return f"  {group.count:>3}× {terminal_safe(group.name)} · {format_number(group.rated_power_w)} W"


def _clip(text: str, width: int) -> str:
    return text if len(text) <= width else text[: width - 1] + "…"


class CircuitOutline(OptionList):
    """The circuit's parts; highlight one to edit it."""

    BINDINGS = [
        Binding("a", "add", "Add"),
        Binding("plus,equals_sign", "count(1)", "+1", key_display="+", show=False),
        Binding("minus", "count(-1)", "-1", key_display="-", show=False),
        Binding("d", "duplicate", "Copy"),
        Binding("delete,x", "remove", "Remove"),
        Binding("p", "profile", "Save profile", show=False),
        Binding("f", "fit", "Fit correction", show=False),
    ]

    class Selected(Message):
        def __init__(self, key: str) -> None:
            super().__init__()
            self.key = key

    class Command(Message):
        """action: add | count | duplicate | remove | profile | fit; key: the part."""

        def __init__(self, action: str, key: str | None, delta: int = 0) -> None:
            super().__init__()
            self.action = action
            self.key = key
            self.delta = delta

    def show_circuit(self, circuit, select: str | None = None) -> None:
        current = select or self.current_key
        self.clear_options()
        width = max(self.scrollable_content_region.width, 30)
        self.add_options([Option(_clip(part_label(circuit, k), width), id=k) for k in part_keys(circuit)])
        try:
            self.highlighted = self.get_option_index(current) if current else 0
        except Exception:
            self.highlighted = 0

    @property
    def current_key(self) -> str | None:
        if self.highlighted is None:
            return None
        return self.get_option_at_index(self.highlighted).id

    def on_option_list_option_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        self.post_message(self.Selected(event.option.id))

    def action_add(self) -> None:
        self.post_message(self.Command("add", self.current_key))

    def action_count(self, delta: int) -> None:
        self.post_message(self.Command("count", self.current_key, delta))

    def action_duplicate(self) -> None:
        self.post_message(self.Command("duplicate", self.current_key))

    def action_remove(self) -> None:
        self.post_message(self.Command("remove", self.current_key))

    def action_profile(self) -> None:
        self.post_message(self.Command("profile", self.current_key))

    def action_fit(self) -> None:
        self.post_message(self.Command("fit", self.current_key))


# ---------------------------------------------------------------- editor
def same_value(a, b) -> bool:
    """Equal, or floats equal to display precision (a shown "47 nF" reads back as
    4.7000000000000004e-08, which is not a change)."""
    if isinstance(a, float) and isinstance(b, float):
        return math.isclose(a, b, rel_tol=1e-9, abs_tol=0.0)
    return a == b


class FieldRow(Vertical):
    """Label, entry and (when invalid) the reason, for one field."""

    def __init__(self, spec: FieldSpec, text: str, generation: int = 0) -> None:
        super().__init__(id="row-" + spec.dom_id, classes="field-row")
        self.spec = spec
        self.text = text
        self.generation = generation      # which showing of a part this row belongs to

    def compose(self) -> ComposeResult:
        spec = self.spec
        with Horizontal(classes="field-line"):
            yield Label(spec.label, classes="field-label")
            if spec.kind == "choice":
                yield Select([(c, c) for c in spec.choices], value=self.text, allow_blank=False, id=spec.dom_id,
                             compact=True)
            elif spec.kind == "bool":
                yield Select([("yes", "yes"), ("no", "no")], value=self.text or "no", allow_blank=False,
                             id=spec.dom_id, compact=True)
            else:
                hint = "none" if spec.optional else ""
                unit = spec.unit and f"{spec.prefix or ''}{spec.unit}"
                yield Input(self.text, placeholder=hint or unit, id=spec.dom_id, compact=True,
                            select_on_focus=False)
        yield Static("", classes="field-error", markup=False)

    def show_error(self, reason: str | None) -> None:
        self.set_class(reason is not None, "-invalid")
        self.query_one(".field-error", Static).update(reason or "")


class PartEditor(VerticalScroll, can_focus=False):
    """The fields of one part of the circuit."""

    class Edited(Message):
        """A field changed and the part is still valid: ``obj`` is the new part."""

        def __init__(self, key: str, obj) -> None:
            super().__init__()
            self.key = key
            self.obj = obj

    class PresetChosen(Message):
        def __init__(self, voltage_v: float, frequency_hz: float) -> None:
            super().__init__()
            self.voltage_v = voltage_v
            self.frequency_hz = frequency_hz

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.key: str | None = None
        self.obj = None
        self.specs: tuple[FieldSpec, ...] = ()
        self.invalid: dict[str, str] = {}
        self.generation = 0

    def compose(self) -> ComposeResult:
        if self.key is None:
            return
        yield Static(self._title(), classes="editor-title")
        if self.key == "supply":
            options = [(name, name) for name in SUPPLY_PRESETS]
            current = next((n for n, (v, f) in SUPPLY_PRESETS.items()
                            if (v, f) == (self.obj.voltage_v, self.obj.frequency_hz)), Select.BLANK)
            with Horizontal(classes="field-line"):
                yield Label("Preset", classes="field-label")
                yield Select(options, value=current, prompt="values below", id="supply-preset", compact=True)
        if self.key == "correction" and self.obj is None:
            yield Static("No correction device fitted.\n[b]f[/b] on the outline fits one; "
                         "[b]F7[/b] sizes one for this circuit.", classes="editor-note")
            return
        for spec in self.specs:
            yield FieldRow(spec, field_text(self.obj, spec), self.generation)

    def _title(self) -> str:
        if self.key and self.key.startswith("load:"):
            return f"Lamp group {int(self.key[5:]) + 1} · {self.obj.kind.value}"
        return {"supply": "Supply", "breaker": "Breaker", "dimmer": "Dimmer",
                "correction": "Load-correction device"}.get(self.key or "", "")

    async def show_part(self, key: str, obj) -> None:
        """Show part ``key`` (the screen calls this on selection and after changes)."""
        specs = fields_for(key, obj)
        if key == self.key and specs == self.specs and (obj is None) == (self.obj is None):
            if obj is not self.obj:
                self.obj = obj
                self._refresh_values()
            return
        self.key, self.obj, self.specs, self.invalid = key, obj, specs, {}
        self.generation += 1              # events still queued from the old fields are ignored
        self._focus_obj = obj
        await self.recompose()

    def _refresh_values(self) -> None:
        """Show changed values in place (an edit from outside, e.g. the count keys);
        a field being typed in that already means the same value is left alone."""
        for row in self.query(FieldRow):
            spec = row.spec
            text = field_text(self.obj, spec)
            widget = self.query_one("#" + spec.dom_id)
            if isinstance(widget, Input):
                try:
                    same = same_value(parse_field(spec, widget.value), get_value(self.obj, spec.path))
                except InputError:
                    same = False
                if not same:
                    with widget.prevent(Input.Changed):
                        widget.value = text
                    row.show_error(None)
                    self.invalid.pop(spec.path, None)
            elif isinstance(widget, Select) and widget.value != text:
                with widget.prevent(Select.Changed):
                    widget.value = text

    def _spec_for(self, widget: Widget) -> FieldSpec | None:
        return next((s for s in self.specs if s.dom_id == widget.id), None)

    def _apply(self, widget: Widget, value_or_text, *, typed: bool) -> None:
        owner = next((a for a in widget.ancestors if isinstance(a, FieldRow)), None)
        if owner is None or owner.generation != self.generation:
            return                        # a field of the part shown before: not this part's edit
        spec = self._spec_for(widget)
        if spec is None:
            return
        row = self.query_one("#row-" + spec.dom_id, FieldRow)
        if typed and self.obj is not None and value_or_text.strip() == field_text(self.obj, spec):
            row.show_error(None)          # the value as shown (rounded for display): no change
            self.invalid.pop(spec.path, None)
            return
        try:
            value = parse_field(spec, value_or_text) if typed else value_or_text
            current = field_text(self.obj, spec) if spec.kind == "choice" else get_value(self.obj, spec.path)
            if (self.obj is not None or spec.path == "curve") and same_value(value, current):
                row.show_error(None)
                self.invalid.pop(spec.path, None)
                return
            new = with_value(self.obj, spec, value)
        except InputError as error:
            reason = error_text(error, spec)
            self.invalid[spec.path] = reason
            row.show_error(reason)
            self._revert(spec)
            return
        row.show_error(None)
        self.invalid.pop(spec.path, None)
        self.obj = new
        self.post_message(self.Edited(self.key, new))

    def on_descendant_focus(self, event) -> None:
        self._focus_obj = self.obj        # what an invalid entry falls back to

    def _revert(self, spec: FieldSpec) -> None:
        """Typing passes through values nobody meant ("4.7 u" on the way to "4.7 uH"):
        while the text is invalid, the part keeps the value it had when the field was
        entered."""
        base = getattr(self, "_focus_obj", None)
        if base is None or self.obj is base or self.obj is None:
            return
        old = get_value(base, spec.path)
        if same_value(old, get_value(self.obj, spec.path)):
            return
        try:
            new = with_value(self.obj, spec, old)
        except InputError:
            return
        self.obj = new
        self.post_message(self.Edited(self.key, new))

    @on(Input.Changed)
    def _input_changed(self, event: Input.Changed) -> None:
        event.stop()
        self._apply(event.input, event.value, typed=True)

    @on(Input.Submitted)
    def _input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.screen.focus_next()

    @on(Select.Changed)
    def _select_changed(self, event: Select.Changed) -> None:
        event.stop()
        if event.select.id == "supply-preset":
            if event.value in SUPPLY_PRESETS:
                self.post_message(self.PresetChosen(*SUPPLY_PRESETS[event.value]))
            return
        self._apply(event.select, str(event.value), typed=True)



# ---------------------------------------------------------------- verdict
VERDICT_WORDS = {
    Verdict.SUITABLE: "SUITABLE",
    Verdict.SUITABLE_WITH_CAUTIONS: "SUITABLE, WITH CAUTIONS",
    Verdict.UNSUITABLE: "UNSUITABLE",
    Verdict.SITE_TEST_NEEDED: "SITE TEST NEEDED",
}
STATUS_WORDS = {Status.PASS: "pass", Status.CAUTION: "caution", Status.FAIL: "FAIL", Status.NOT_APPLICABLE: "n/a"}


def status_counts(report: Report) -> str:
    counts = {s: 0 for s in Status}
    for check in report.checks:
        counts[check.status] += 1
    return (f"{counts[Status.FAIL]} fail · {counts[Status.CAUTION]} caution · "
            f"{counts[Status.PASS]} pass · {counts[Status.NOT_APPLICABLE]} n/a")


class VerdictBar(Horizontal):
    """Verdict, counts, progress of the running check, and freshness."""

    def compose(self) -> ComposeResult:
        yield Label("no verdict yet", id="verdict-word", classes="verdict-none")
        yield Label("", id="verdict-counts")
        yield ProgressBar(total=1.0, show_eta=False, show_percentage=True, id="verdict-progress")
        yield Label("", id="verdict-state")

    def show_report(self, report: Report | None) -> None:
        word = self.query_one("#verdict-word", Label)
        for v in Verdict:
            word.remove_class(f"verdict-{v.value}")
        word.remove_class("verdict-none")
        if report is None:
            word.update("no verdict yet")
            word.add_class("verdict-none")
            self.query_one("#verdict-counts", Label).update("")
            return
        word.update(VERDICT_WORDS.get(report.verdict, str(report.verdict)))
        word.add_class(f"verdict-{report.verdict.value}")
        self.query_one("#verdict-counts", Label).update(status_counts(report))

    def show_state(self, text: str, *, stale: bool, busy: bool, error: bool = False) -> None:
        self.set_class(stale, "-stale")
        self.set_class(busy, "-busy")
        self.set_class(error, "-error")
        self.query_one("#verdict-state", Label).update(text)

    def show_progress(self, fraction: float | None) -> None:
        bar = self.query_one(ProgressBar)
        if fraction is None:
            bar.update(total=None)
        else:
            bar.update(total=1.0, progress=fraction)




class CheckItem(ListItem):
    def __init__(self, check: CheckResult) -> None:
        super().__init__(classes=f"check-item status-{check.status.value}" + (" -safety" if check.safety else ""))
        self.check = check

    def compose(self) -> ComposeResult:
        c = self.check
        with Horizontal(classes="check-line"):
            yield Label(STATUS_WORDS.get(c.status, str(c.status)), classes="c-status")
            value, limit, margin = check_figures(c)
            yield Label(c.id + (" ⚠" if c.safety and c.status is Status.FAIL else ""), classes="c-id")
            yield Label(value, classes="c-value")
            yield Label(limit, classes="c-limit")
            yield Label(margin, classes="c-margin")


class CheckList(Vertical):
    """All checks of the last report; Enter or a click opens a check's details."""

    class Chosen(Message):
        def __init__(self, check: CheckResult) -> None:
            super().__init__()
            self.check = check

    def compose(self) -> ComposeResult:
        with Horizontal(classes="check-line check-head"):
            for text, cls in (("status", "c-status"), ("check", "c-id"), ("value", "c-value"),
                              ("limit", "c-limit"), ("margin", "c-margin")):
                yield Label(text, classes=cls)
        yield ListView(id="check-items")

    async def show_report(self, report: Report | None) -> None:
        items = self.query_one("#check-items", ListView)
        index = items.index
        await items.clear()
        if report is not None:
            await items.extend([CheckItem(c) for c in report.checks])
            if report.checks:
                items.index = min(index or 0, len(report.checks) - 1)

    @on(ListView.Selected, "#check-items")
    def _selected(self, event: ListView.Selected) -> None:
        event.stop()
        if isinstance(event.item, CheckItem):
            self.post_message(self.Chosen(event.item.check))


class CautionStrip(Static):
    """The cautions in one line; louder (class ``-alarm``) with a failing safety check."""

    def show(self, cautions: tuple[str, ...], failing_safety: list[str]) -> None:
        self.set_class(bool(failing_safety), "-alarm")
        if failing_safety:
            self.update(f"⚠ SAFETY: {', '.join(failing_safety)} fails. {cautions[0] if cautions else ''} "
                        f"Isolate and prove dead before work. [b]F8[/b] all cautions")
        else:
            self.update("Cautions: qualified persons only · isolate, prove dead · [b]F8[/b] all of them")
