"""Snapshots of the main views with the canned report (tests/tui/fakes.py), at 80×24
(100×30 for the plots).  These pin our own rendering (regression), nothing more.
Update after an intended change with ``pytest tests/tui/test_snapshots.py --snapshot-update``
and look at the SVGs before committing them."""
import time

import pytest
from textual.widgets import Input

from tests.tui.fakes import FakeEvaluator, make_app
from tui.circuit_screen import CircuitScreen

pytestmark = pytest.mark.regression


async def _wait(pilot, condition, timeout_s=10.0):
    end = time.monotonic() + timeout_s
    while not condition():
        assert time.monotonic() < end, "snapshot set-up timed out"
        await pilot.pause(0.02)


async def _settle(pilot):
    app = pilot.app
    await _wait(pilot, lambda: isinstance(app.screen, CircuitScreen))
    screen = app.main_screen
    await _wait(pilot, lambda: screen.report is not None and not screen.evaluating
                and "-stale" not in screen.query_one("#verdict").classes)
    for field in app.query(Input):
        field.cursor_blink = False
    await pilot.pause()
    return screen


def test_main_screen(snap_compare):
    async def run_before(pilot):
        await _settle(pilot)
    assert snap_compare(make_app(evaluator=FakeEvaluator(fail_safety=True)), terminal_size=(80, 24),
                        run_before=run_before)


def test_check_details(snap_compare):
    async def run_before(pilot):
        await _settle(pilot)
        await pilot.press("f4")
        await pilot.pause()
        await pilot.press("down", "down", "enter")            # the "holding" caution
        await _wait(pilot, lambda: type(pilot.app.screen).__name__ == "CheckDetailsScreen")
        await pilot.pause()
    assert snap_compare(make_app(), terminal_size=(80, 24), run_before=run_before)


def test_waveform_view(snap_compare):
    async def run_before(pilot):
        await _settle(pilot)
        await pilot.press("f5")
        await _wait(pilot, lambda: getattr(pilot.app.screen, "figures", None) is not None)
        await pilot.pause()
    assert snap_compare(make_app(), terminal_size=(100, 30), run_before=run_before)


def test_dimming_curve(snap_compare):
    async def run_before(pilot):
        await _settle(pilot)
        await pilot.press("f6")
        await _wait(pilot, lambda: type(pilot.app.screen).__name__ == "CurveScreen")
        await pilot.pause()
    assert snap_compare(make_app(), terminal_size=(100, 30), run_before=run_before)
