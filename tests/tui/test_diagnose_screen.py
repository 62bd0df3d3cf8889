"""The diagnosis window (F9) through Textual's Pilot, with the diagnosis replaced by a
fake that records its call (the real one is tested in tests/compat/test_diagnose.py)."""
from __future__ import annotations

from textual.widgets import OptionList, Static

from tests.tui.fakes import CAUTIONS, make_app
from tests.tui.test_app import SIZE, settled, sync, wait_for
from compat.symptoms import Symptom
from tui.diagnose_screen import DiagnoseScreen


class FakeDiagnose:
    def __init__(self) -> None:
        self.calls = []

    def __call__(self, circuit, symptom, cancel=None) -> str:
        self.calls.append((circuit.name, symptom))
        return f"Possible causes, best first:\n  holding-drop-out (score 1.00) for {symptom}\n"


@sync
async def test_f9_lists_symptoms_and_shows_the_diagnosis_with_the_cautions():
    fake = FakeDiagnose()
    app = make_app(diagnose=fake)
    async with app.run_test(size=SIZE) as pilot:
        await settled(pilot)
        await pilot.press("f9")
        await wait_for(pilot, lambda: isinstance(pilot.app.screen, DiagnoseScreen))
        options = pilot.app.screen.query_one("#symptoms", OptionList)
        assert options.option_count == len(Symptom)
        options.highlighted = 2                   # the lamps glow when the dimmer is off
        await pilot.press("enter")
        screen = pilot.app.screen
        text = screen.query_one("#diagnosis-text", Static)
        await wait_for(pilot, lambda: "holding-drop-out" in str(text.content))
        assert fake.calls and fake.calls[0][1] == "glow-when-off"
        shown = str(text.content)
        assert all(c in shown for c in CAUTIONS)   # every output with advice carries the cautions
        await pilot.press("escape")
        await wait_for(pilot, lambda: not isinstance(pilot.app.screen, DiagnoseScreen))
