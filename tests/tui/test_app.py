"""Behaviour of the terminal app through Textual's Pilot, with the evaluator,
simulator, sizer, files and catalogue replaced by fakes (tests/tui/fakes.py)."""
from __future__ import annotations

import asyncio
import functools
import time

import pytest
from textual.widgets import Button, Input, Label

from compat.report import Verdict
from tests.tui.fakes import FakeEvaluator, FakeFiles, make_app
from tui.circuit_screen import CircuitScreen
from tui.modals import CheckDetailsScreen, ChoiceScreen, PathPrompt, PickerScreen, SizingScreen, TextPrompt
from tui.widgets import CautionStrip, CircuitOutline, FieldRow, VerdictBar

SIZE = (80, 24)


def sync(test):
    """Run an async test on its own event loop (no pytest async plugin is installed)."""
    @functools.wraps(test)
    def run(*args, **kwargs):
        return asyncio.run(test(*args, **kwargs))
    return run


async def wait_for(pilot, condition, timeout_s: float = 5.0) -> None:
    """Let the app run until ``condition()`` holds (fails the test on timeout)."""
    end = time.monotonic() + timeout_s
    while not condition():
        if time.monotonic() > end:
            raise AssertionError("condition not reached in time")
        await pilot.pause(0.02)


def main(app) -> CircuitScreen:
    return app.main_screen


async def settled(pilot) -> CircuitScreen:
    await wait_for(pilot, lambda: isinstance(pilot.app.screen, CircuitScreen))
    screen = main(pilot.app)
    await wait_for(pilot, lambda: screen.report is not None and not screen.stale and not screen.evaluating)
    return screen


async def select_part(pilot, key: str) -> None:
    outline = pilot.app.screen.query_one(CircuitOutline)
    outline.focus()
    outline.highlighted = outline.get_option_index(key)
    await pilot.pause()
    await wait_for(pilot, lambda: pilot.app.screen.query_one("#editor").key == key)


async def type_into(pilot, input_id: str, text: str) -> Input:
    field = pilot.app.screen.query_one(f"#{input_id}", Input)
    field.focus()
    field.value = ""
    await pilot.pause()
    await pilot.press(*list(text))
    await pilot.pause()
    return field


@sync
async def test_editing_a_value_updates_the_verdict():
    evaluator = FakeEvaluator()
    app = make_app(evaluator=evaluator)
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        assert screen.report.verdict is Verdict.SUITABLE_WITH_CAUTIONS     # 42 W + 4 × 6 W = 66 W ≥ 40 W
        await select_part(pilot, "load:0")
        await type_into(pilot, "f-rated-power-w", "10 W")                  # 10 W + 24 W = 34 W < 40 W
        assert screen.circuit.loads[0].rated_power_w == 10.0
        assert screen.dirty
        await wait_for(pilot, lambda: not screen.stale and screen.report.verdict is Verdict.UNSUITABLE)
        assert evaluator.calls[-1].loads[0].rated_power_w == 10.0
        word = screen.query_one("#verdict-word", Label)
        assert "verdict-unsuitable" in word.classes
        assert "UNSUITABLE" in str(word.render())


@sync
async def test_adding_a_lamp_group_from_the_catalogue():
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:1")
        await pilot.press("a")
        await wait_for(pilot, lambda: isinstance(app.screen, PickerScreen))
        await pilot.press("enter")                            # the first lamp archetype
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))
        assert [g.name for g in screen.circuit.loads] == ["halogen", "LED retrofit", "LED 9 W (archetype)"]
        assert screen.query_one(CircuitOutline).current_key == "load:2"
        await wait_for(pilot, lambda: not screen.stale and len(screen.report.checks) > 0)


@sync
async def test_changing_a_count_with_plus_and_minus():
    evaluator = FakeEvaluator()
    app = make_app(evaluator=evaluator)
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:1")
        await pilot.press("plus", "plus", "plus", "minus")
        assert screen.circuit.loads[1].count == 6
        assert screen.query_one("#f-count", Input).value == "6"              # the editor follows
        await wait_for(pilot, lambda: not screen.stale)
        assert evaluator.calls[-1].loads[1].count == 6
        assert "6× LED retrofit" in str(screen.query_one(CircuitOutline).get_option_at_index(4).prompt)


@sync
async def test_count_cannot_go_below_one_and_circuit_is_kept():
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:0")
        await pilot.press("minus")
        assert screen.circuit.loads[0].count == 1
        assert app.is_running


@sync
async def test_invalid_value_is_marked_and_the_circuit_is_kept():
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        before = screen.circuit
        await select_part(pilot, "load:1")
        await type_into(pilot, "f-rated-power-w", "-5 W")
        row = screen.query_one("#row-f-rated-power-w", FieldRow)
        assert "-invalid" in row.classes
        assert "must be between 0 and 10 kW" in str(row.query_one(".field-error").render())
        assert screen.circuit is before and screen.circuit.loads[1].rated_power_w == 6.0
        assert not screen.dirty
        await type_into(pilot, "f-input-capacitance-f", "4.7 uH")        # wrong unit
        cap_row = screen.query_one("#row-f-input-capacitance-f", FieldRow)
        assert "-invalid" in cap_row.classes
        assert "not a prefix of F" in str(cap_row.query_one(".field-error").render())
        # "4.7 u" on the way was a valid 4.7 µF; the invalid end falls back to the value before
        assert screen.circuit.loads[1].input_capacitance_f == before.loads[1].input_capacitance_f
        await type_into(pilot, "f-rated-power-w", "7 W")                  # fixed
        assert "-invalid" not in row.classes
        assert screen.circuit.loads[1].rated_power_w == 7.0
        assert screen.circuit.loads[1].input_capacitance_f == before.loads[1].input_capacitance_f
        assert app.is_running


@sync
async def test_save_then_open_round_trip(tmp_path):
    files = FakeFiles()
    app = make_app(files=files)
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:1")
        await pilot.press("plus")
        assert "*" in screen.title
        await pilot.press("ctrl+s")                                 # no file yet: save as
        await wait_for(pilot, lambda: isinstance(app.screen, PathPrompt))
        app.screen.query_one("#path-input", Input).value = str(tmp_path / "landing.toml")
        await pilot.press("enter")
        await wait_for(pilot, lambda: not screen.dirty)
        assert screen.path == tmp_path / "landing.toml"
        assert "*" not in screen.title and "landing.toml" in screen.sub_title
        assert files.saved[tmp_path / "landing.toml"].loads[1].count == 5
        saved = screen.circuit
        await pilot.press("minus", "minus")                          # change, then reopen the file
        assert screen.dirty
        await pilot.press("ctrl+o")
        await wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        await pilot.click("#discard")
        await wait_for(pilot, lambda: isinstance(app.screen, PathPrompt))
        app.screen.query_one("#path-input", Input).value = str(tmp_path / "landing.toml")
        await pilot.press("enter")
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen) and screen.circuit == saved)
        assert not screen.dirty and screen.circuit.loads[1].count == 5


@sync
async def test_save_refuses_to_overwrite_unasked(tmp_path):
    target = tmp_path / "existing.toml"
    target.write_text("keep me\n")
    files = FakeFiles()
    app = make_app(files=files)
    async with app.run_test(size=SIZE) as pilot:
        await settled(pilot)
        await pilot.press("f2")
        await wait_for(pilot, lambda: isinstance(app.screen, PathPrompt))
        app.screen.query_one("#path-input", Input).value = str(target)
        await pilot.press("enter")
        await wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        await pilot.click("#cancel")
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))
        assert target.read_text() == "keep me\n"
        assert files.saved == {}


@sync
async def test_quitting_with_unsaved_changes_asks_first():
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:1")
        await pilot.press("plus")
        await pilot.press("ctrl+q")
        await wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        assert "unsaved" in app.screen.question
        await pilot.click("#cancel")
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))
        assert app.is_running and screen.dirty
        await pilot.press("ctrl+q")
        await wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        await pilot.click("#discard")
        await wait_for(pilot, lambda: not app.is_running)


@sync
async def test_quitting_without_changes_does_not_ask():
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        await settled(pilot)
        await pilot.press("ctrl+q")
        await wait_for(pilot, lambda: not app.is_running)


@sync
async def test_keys_are_handled_during_a_slow_evaluation(monkeypatch):
    # a debounce long enough that the checks right after the key press run before the
    # re-check starts, even on a busy machine
    monkeypatch.setattr("tui.circuit_screen.DEBOUNCE_S", 2.0)
    evaluator = FakeEvaluator(delay_s=30.0)      # far longer than the test; cancelled below
    app = make_app(evaluator=evaluator)
    async with app.run_test(size=SIZE) as pilot:
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))
        screen = main(app)
        await wait_for(pilot, evaluator.started.is_set)
        await select_part(pilot, "load:1")
        await pilot.press("plus")
        # the key was acted on while the first evaluation is still running
        assert screen.circuit.loads[1].count == 5
        assert len(evaluator.calls) == 1 and screen.report is None
        assert screen.query_one("#verdict-state", Label).render().plain.startswith("checking")
        await pilot.press("f1")                                       # other screens open too
        await wait_for(pilot, lambda: type(app.screen).__name__ == "HelpScreen")
        await pilot.press("escape")
        # the running evaluation was told to stop; the edited circuit is checked next
        await wait_for(pilot, lambda: evaluator.cancelled >= 1 and len(evaluator.calls) == 2, timeout_s=10.0)
        assert evaluator.calls[1].loads[1].count == 5
        screen._cancel.set()                                          # let the worker thread end


@sync
async def test_a_result_for_an_older_circuit_is_shown_as_stale():
    evaluator = FakeEvaluator(delay_s=0.5)
    app = make_app(evaluator=evaluator)
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        shown = screen.report
        await select_part(pilot, "load:1")
        await pilot.press("plus")
        assert screen.stale and screen.report is shown
        assert "-stale" in screen.query_one(VerdictBar).classes
        assert "out of date" in screen.query_one("#verdict-state", Label).render().plain
        await wait_for(pilot, lambda: "-stale" not in screen.query_one(VerdictBar).classes)
        assert not screen.stale and screen.report is not shown


@sync
async def test_check_details_and_safety_cautions():
    app = make_app(evaluator=FakeEvaluator(fail_safety=True))
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        strip = screen.query_one(CautionStrip)
        await wait_for(pilot, lambda: "-alarm" in strip.classes)      # the strip follows the result's arrival
        assert "inrush" in str(strip.render())
        await pilot.press("f4")
        await pilot.pause()
        await pilot.press("down", "down", "down", "enter")           # rating, minimum-load, holding, inrush
        await wait_for(pilot, lambda: isinstance(app.screen, CheckDetailsScreen))
        assert app.screen.check.id == "inrush"
        text = " ".join(str(w.render()) for w in app.screen.query("Static"))
        assert "Isolate and prove dead (test wording)." in text and "safety check" in text
        await pilot.press("escape")
        await pilot.press("f8")
        await wait_for(pilot, lambda: type(app.screen).__name__ == "CautionsScreen")
        assert app.screen.failing_safety == ["inrush"]


@sync
async def test_sizing_applies_the_suggested_device():
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        assert screen.circuit.correction is None
        await pilot.press("f7")
        await wait_for(pilot, lambda: isinstance(app.screen, SizingScreen) and app.screen.device is not None)
        await pilot.press("a")
        await wait_for(pilot, lambda: screen.circuit.correction is not None)
        assert screen.circuit.correction.name == "bypass 150 nF"
        assert screen.query_one(CircuitOutline).current_key == "correction"
        assert screen.dirty


@sync
async def test_export_writes_the_markdown_report(tmp_path):
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        await settled(pilot)
        await pilot.press("ctrl+r")
        await wait_for(pilot, lambda: isinstance(app.screen, PathPrompt))
        app.screen.query_one("#path-input", Input).value = str(tmp_path / "report.md")
        await pilot.press("enter")
        await wait_for(pilot, lambda: (tmp_path / "report.md").exists())
        assert (tmp_path / "report.md").read_text() == "# test landing\n\nsuitable-with-cautions\n"
        assert [p.name for p in tmp_path.iterdir()] == ["report.md"]   # no temporary file left


@sync
async def test_saving_a_lamp_as_a_profile_then_picking_it():
    files = FakeFiles()
    app = make_app(files=files)
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:1")
        await pilot.press("p")
        await wait_for(pilot, lambda: isinstance(app.screen, TextPrompt))
        app.screen.query_one(Input).value = "kitchen LED"
        await pilot.press("enter")
        await wait_for(pilot, lambda: "kitchen LED" in files.profiles)
        assert files.profiles["kitchen LED"] == screen.circuit.loads[1]
        await pilot.press("a")
        await wait_for(pilot, lambda: isinstance(app.screen, PickerScreen))
        sections = [e[0] for e in app.screen.entries]
        assert "your profiles" in sections


@sync
async def test_waveform_screen_moves_the_setting_from_the_keyboard():
    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await settled(pilot)
        await pilot.press("f5")
        await wait_for(pilot, lambda: type(app.screen).__name__ == "WaveformScreen")
        waves = app.screen
        await wait_for(pilot, lambda: waves.figures is not None)
        # the fake simulator fires at 160 − 140·s degrees: 90° at s = 0.5
        assert waves.figures["firing_angle_deg"] == pytest.approx(90.0)
        await pilot.press("right_square_bracket", "right_square_bracket")
        assert waves.setting == pytest.approx(0.6)
        await wait_for(pilot, lambda: waves.figures is not None and waves._timer is None
                       and waves.figures["firing_angle_deg"] == pytest.approx(76.0))
        text = str(waves.query_one("#wave-figures").render())
        assert "setting 0.60" in text and "76°" in text and "[ darker  ] brighter" in text
        await pilot.press("escape")
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))


@sync
async def test_evaluator_error_is_shown_not_raised():
    def broken(circuit, progress=None, cancel=None):
        raise RuntimeError("kernel exploded")
    app = make_app(evaluator=broken)
    async with app.run_test(size=SIZE) as pilot:
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))
        screen = main(app)
        await wait_for(pilot, lambda: screen.eval_error is not None)
        assert "kernel exploded" in screen.query_one("#verdict-state", Label).render().plain
        assert app.is_running


@sync
async def test_just_looking_at_every_part_changes_nothing():
    evaluator = FakeEvaluator()
    app = make_app(evaluator=evaluator)
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        before = screen.circuit
        for key in ("supply", "breaker", "dimmer", "load:0", "load:1", "correction"):
            await select_part(pilot, key)
            await pilot.pause(0.05)
        assert screen.circuit is before and not screen.dirty and len(evaluator.calls) == 1


@sync
async def test_moving_between_parts_never_copies_a_field_into_another_part():
    # the property behind a bug seen in a real terminal (tmux): moving up the outline from
    # one lamp group past another to the dimmer left the middle group's name in the
    # dimmer's name field (a new field's first event arrived after the editor had moved
    # on).  Under Pilot the race does not occur, so this guards the property only; the
    # fix (tui.widgets: FieldRow.generation) was checked in tmux before and after.
    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        screen = await settled(pilot)
        before = screen.circuit
        await select_part(pilot, "load:1")
        outline = pilot.app.screen.query_one(CircuitOutline)
        outline.focus()
        await pilot.press("up", "up")
        await wait_for(pilot, lambda: pilot.app.screen.query_one("#editor").key == "dimmer")
        await pilot.pause(0.3)
        after = main(pilot.app).circuit
        assert after.dimmer.name == before.dimmer.name
        assert after == before
        assert pilot.app.screen.query_one("#f-name", Input).value == before.dimmer.name


@sync
async def test_a_failed_export_names_the_target_file_not_the_temporary_one(tmp_path):
    # issue 13 item 6: the message named the temporary file beside the target
    app = make_app()
    target = tmp_path / "no such folder" / "report.md"
    async with app.run_test(size=SIZE) as pilot:
        await settled(pilot)
        await pilot.press("ctrl+r")
        await wait_for(pilot, lambda: isinstance(app.screen, PathPrompt))
        app.screen.query_one("#path-input", Input).value = str(target)
        await pilot.press("enter")
        await wait_for(pilot, lambda: any(n.title == "Not exported" for n in app._notifications))
        note = next(n for n in app._notifications if n.title == "Not exported")
        assert note.message.startswith(f"{target}: ") and ".tmp" not in note.message


class FakeDescribe:
    """Stands in for compat.describe: records the form's figures, returns a lamp with
    one range (the estimate itself is tested in tests/compat/test_lamp_label.py)."""

    def __init__(self) -> None:
        self.calls: list[dict] = []

    def lamp_from_label(self, **kwargs):
        from loads.circuit import Range
        from loads.driver import ElectronicDriver
        self.calls.append(kwargs)
        if kwargs.get("meter_pf", 0.5) > 0.9:
            from loads.errors import InputError
            raise InputError("no capacitor-input lamp draws this", key="power_factor")
        lamp = ElectronicDriver(name="LED 9 W (from its label)", rated_power_w=kwargs["watts"],
                                series_resistance_ohm=20.0, count=kwargs["count"])
        return lamp, (Range("loads[1].series_resistance_ohm", "loads[1].series_resistance_ohm", 5.0, 35.0),), ["R 5–35 Ω"]


@sync
async def test_a_lamp_from_its_label_joins_the_circuit_with_its_ranges():
    describe = FakeDescribe()
    app = make_app()
    app.services.describe = describe
    async with app.run_test(size=(100, 34)) as pilot:
        screen = await settled(pilot)
        await select_part(pilot, "load:1")
        await pilot.press("a")
        await wait_for(pilot, lambda: isinstance(app.screen, PickerScreen))
        assert app.screen.entries[-1][1] == "From the label…"           # beside the catalogue, last
        await pilot.press("end", "enter")
        from tui.label_forms import LampLabelScreen
        await wait_for(pilot, lambda: isinstance(app.screen, LampLabelScreen))
        form = app.screen
        form.query_one("#f-watts", Input).value = "9 W"
        form.query_one("#f-meter_pf", Input).value = "0.95"
        form.query_one("#f-count", Input).value = "3"
        await pilot.click("#add")
        # a reading the model refuses: one line at the form, naming the reading in the trade's words
        await wait_for(pilot, lambda: "Meter: power factor" in str(form.query_one("#label-error", Label).render()))
        form.query_one("#f-meter_pf", Input).value = "0.5"
        # a button ignores clicks for the moment it shows as pressed (Textual's -active)
        await wait_for(pilot, lambda: not form.query_one("#add", Button).has_class("-active"))
        await pilot.click("#add")
        await wait_for(pilot, lambda: isinstance(app.screen, CircuitScreen))
        assert describe.calls[-1]["watts"] == 9.0 and describe.calls[-1]["meter_pf"] == 0.5
        assert describe.calls[-1]["volts"] == 230.0 and describe.calls[-1]["count"] == 3
        assert screen.circuit.loads[-1].name == "LED 9 W (from its label)" and screen.circuit.loads[-1].count == 3
        # the range moved to the group's place in the circuit (the third group)
        assert [r.path for r in screen.circuit.ranges] == ["loads[3].series_resistance_ohm"]
        assert screen.query_one(CircuitOutline).current_key == "load:2"


def test_ranges_follow_their_groups_and_go_when_edited_away():
    # behaviour of our own: a range belongs to a group's value; the checks judge a
    # range's ends, so a range the circuit no longer carries must not stay behind
    import dataclasses

    from loads.circuit import Range
    from tests.tui.fakes import sample_circuit
    from tui.circuit_screen import ranges_still_meant, renumbered
    c = sample_circuit()
    lamp = dataclasses.replace(c.loads[1], bleeder_a=0.005)
    c = dataclasses.replace(c, loads=(c.loads[0], lamp, lamp), ranges=(
        Range("loads[2].bleeder_a", "loads[2].bleeder_ma", 0.0, 0.01),
        Range("loads[3].bleeder_a", "loads[3].bleeder_ma", 0.0, 0.01),
        Range("dimmer.holding_current_a", "dimmer.holding_current_ma", 0.01, 0.04)))
    assert ranges_still_meant(c) is c                          # every value at its midpoint
    edited = dataclasses.replace(c, loads=(c.loads[0], dataclasses.replace(lamp, bleeder_a=0.002), lamp))
    assert [r.path for r in ranges_still_meant(edited).ranges] == ["loads[3].bleeder_a", "dimmer.holding_current_a"]
    # group 2 removed: its range goes, group 3's becomes group 2's
    assert [r.path for r in renumbered(c.ranges, lambda i: i if i < 2 else (None if i == 2 else i - 1))] == [
        "loads[2].bleeder_a", "dimmer.holding_current_a"]
    assert renumbered(c.ranges, lambda i: i + 1)[1].file_key == "loads[4].bleeder_ma"


@sync
async def test_a_notice_from_the_worker_shows_in_the_app():
    # issue 10: the first run's "compiling" notice reaches the app from the thread that
    # waits for the worker process (ProcessRunner.notice, set by the app on mount)
    from loads.simulation import COMPILE_NOTICE

    app = make_app()
    async with app.run_test(size=SIZE) as pilot:
        await settled(pilot)
        runner = app.services.shutdown.__self__            # the app's ProcessRunner
        assert runner.notice == app.worker_notice
        await asyncio.to_thread(runner.notice, COMPILE_NOTICE)
        await wait_for(pilot, lambda: any(n.message == COMPILE_NOTICE for n in app._notifications))
