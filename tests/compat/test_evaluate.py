"""The orchestrator: progress, cancel, sweep rows (``SWEEP_KEYS``), reuse of runs."""
import threading

import pytest

from compat.evaluate import DROP_OUT_HALVINGS, MIN_SETTINGS, SWEEP_KEYS, evaluate
from compat.runs import Cancelled
from compat.switch_on import INRUSH_ANGLES_DEG
from loads import simulation
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.filament import Filament

C = Circuit(name="pendant", dimmer=Dimmer(control="phase", wiring="with-neutral", rc_diac=None),
            loads=(Filament(name="lamp", count=1, rated_power_w=60.0),))


class CountingSimulator:
    """The real simulator, counting calls (to show runs are not repeated)."""

    def __init__(self):
        self.calls = 0

    def simulate(self, *a, **k):
        self.calls += 1
        return simulation.simulate(*a, **k)

    def __getattr__(self, name):
        return getattr(simulation, name)


def test_progress_rows_and_number_of_runs():
    seen = []
    sim = CountingSimulator()
    rep = evaluate(C, settings=5, progress=lambda d, t: seen.append((d, t)), simulator=sim)
    total = 2 * MIN_SETTINGS + len(INRUSH_ANGLES_DEG) + 1           # settings below 21 are raised to 21
    assert seen[-1] == (total, total) and [d for d, _ in seen] == sorted(d for d, _ in seen)
    # one run per sweep point, per switch-on angle, the off-state, one fine re-run for
    # harmonics, and the halvings that find where the fake's light is lost going down
    assert sim.calls == total + 1 + DROP_OUT_HALVINGS
    assert len(rep.sweep) == 2 * MIN_SETTINGS
    for row in rep.sweep:
        assert tuple(row) == SWEEP_KEYS
    assert {r["direction"] for r in rep.sweep} == {"down", "up"}


def test_cancel_stops_the_evaluation():
    ev = threading.Event()
    ev.set()
    with pytest.raises(Cancelled):
        evaluate(C, cancel=ev)
