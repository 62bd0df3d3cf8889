"""Start-up time of the app on the built-in demo (a benchmark, not a test).  From the
repository root, with dimfit installed as in the README:
    .venv/bin/python tests/tui/bench_startup.py"""
import time

t0 = time.perf_counter()
from tui.app import DimfitApp  # noqa: E402  (imported after t0 on purpose: the import is part of start-up)


async def auto(pilot):
    from tui.circuit_screen import CircuitScreen
    while not isinstance(pilot.app.screen, CircuitScreen):
        await pilot.pause(0.01)
    await pilot.pause(0)
    print(f"main screen mounted after {time.perf_counter() - t0:.2f} s")
    pilot.app.exit()

if __name__ == "__main__":
    DimfitApp().run(headless=True, auto_pilot=auto)
