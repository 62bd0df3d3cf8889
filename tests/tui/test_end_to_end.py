"""The app on the real evaluator and a real circuit file (no fakes)."""
import asyncio
import importlib.util
import time
from pathlib import Path

import pytest

DATA = Path(__file__).resolve().parents[1] / "data"


@pytest.mark.slow
def test_real_evaluator_on_a_circuit_file():
    if importlib.util.find_spec("compat.evaluate") is None:
        pytest.skip("compat.evaluate is not written yet; this test runs the app on the real evaluator")
    from compat.report import Status, Verdict
    from loads.files import read_circuit
    from tui.app import DimfitApp
    from tui.widgets import VERDICT_WORDS

    path = DATA / "filament_hall.toml"
    circuit = read_circuit(path)
    app = DimfitApp(path=path, circuit=circuit)

    async def run():
        async with app.run_test(size=(80, 24)) as pilot:
            end = time.monotonic() + 600          # a full check with a sweep; generous on 2 shared cores
            while True:
                screen = app.main_screen if app.screen_stack[1:] else None
                if screen is not None and (screen.eval_error or (screen.report and not screen.stale)):
                    break
                assert time.monotonic() < end, "the real evaluation did not finish"
                await pilot.pause(0.2)
            assert screen.eval_error is None, screen.eval_error
            report = screen.report
            assert isinstance(report.verdict, Verdict) and report.checks
            assert {c.id for c in report.checks} >= {"rating", "minimum-load", "latching", "holding"}
            assert all(isinstance(c.status, Status) for c in report.checks)
            shown = screen.query_one("#verdict-word").render().plain
            assert shown == VERDICT_WORDS[report.verdict]
            assert len(screen.query("CheckItem")) == len(report.checks)
            assert screen.path == path and not screen.dirty
    asyncio.run(run())
