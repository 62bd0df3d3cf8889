"""The diagnosis window: pick what the lamps do, and see which modelled mechanisms can
cause it, the measurement that tells them apart, the remedy and a trial plan for site
(the same text as ``dimfit diagnose``).  The work runs in the services' worker process;
the window lists the symptoms without importing the simulator."""
from __future__ import annotations

import threading

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.message import Message
from textual.screen import ModalScreen
from textual.widgets import Button, OptionList, Static
from textual.widgets.option_list import Option

from compat.report import terminal_safe
from compat.symptoms import SYMPTOM_TEXT


class DiagnoseScreen(ModalScreen[None]):
    """↑ ↓ and Enter choose the symptom; the diagnosis replaces the list."""

    BINDINGS = [Binding("escape,q", "dismiss(None)", "Close")]

    class Done(Message):
        def __init__(self, text: str | None, error: str | None) -> None:
            super().__init__()
            self.text = text
            self.error = error

    def __init__(self, circuit, diagnose, cautions: tuple[str, ...]) -> None:
        super().__init__()
        self.circuit = circuit
        self.diagnoser = diagnose
        self.cautions = cautions
        self.cancel = threading.Event()
        self.symptom: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="diagnose-box"):
            yield Static("Diagnose: what do the lamps do?", classes="modal-title")
            yield OptionList(*(Option(f"{text} ({s})", id=str(s)) for s, text in SYMPTOM_TEXT.items()),
                             id="symptoms")
            with VerticalScroll(id="diagnosis-scroll"):
                yield Static("", id="diagnosis-text", markup=False)
            yield Button("Close", id="close", compact=True)

    def on_mount(self) -> None:
        self.query_one("#diagnosis-scroll").display = False
        self.query_one("#symptoms", OptionList).focus()

    @on(OptionList.OptionSelected, "#symptoms")
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        self.symptom = event.option.id
        self.query_one("#symptoms").display = False
        self.query_one("#diagnosis-scroll").display = True
        self.query_one("#diagnosis-text", Static).update(
            f"diagnosing '{self.symptom}'… (the circuit is simulated over its unknown inputs)")
        self._run(self.symptom)

    @work(thread=True, exclusive=True, group="diagnose")
    def _run(self, symptom: str) -> None:
        try:
            text = self.diagnoser(self.circuit, symptom, cancel=self.cancel)
        except Exception as error:  # noqa: BLE001 - shown to the user, never crash the app
            self.post_message(self.Done(None, f"{type(error).__name__}: {error}"))
        else:
            self.post_message(self.Done(text, None))

    def on_diagnose_screen_done(self, message: "DiagnoseScreen.Done") -> None:
        text = self.query_one("#diagnosis-text", Static)
        if message.error:
            text.update(f"The diagnosis could not run: {terminal_safe(message.error)}")
            return
        body = terminal_safe(message.text, keep_newlines=True)
        if not all(c in body for c in self.cautions):
            body += "\nCautions:\n" + "\n".join(f"  - {c}" for c in self.cautions)
        text.update(body)
        self.query_one("#diagnosis-scroll").focus()

    def on_unmount(self) -> None:
        self.cancel.set()

    @on(Button.Pressed, "#close")
    def _close(self) -> None:
        self.dismiss(None)
