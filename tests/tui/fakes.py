"""Fakes for the app's services: canned reports, a slow evaluator, files in memory.

The canned report is invented for display tests; it is not a result of the checks.
"""
from __future__ import annotations

import math
import threading
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from compat.report import CheckResult, Report, Status, Verdict
from loads.circuit import Circuit
from loads.breaker import Breaker
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.errors import InputError
from loads.filament import Filament
from loads.linear import Linear

CAUTIONS = ("Qualified persons only (test wording).", "Isolate and prove dead (test wording).")


def sample_circuit(name: str = "test landing") -> Circuit:
    """An invented circuit like the demo: one halogen lamp and four LED retrofit lamps."""
    return Circuit(
        name=name,
        breaker=Breaker(curve="B", rated_current_a=10.0),
        dimmer=Dimmer(name="rotary 400 W", rated_load_w=400.0, min_load_w=40.0),
        loads=(Filament(name="halogen", count=1, rated_power_w=42.0),
               ElectronicDriver(name="LED retrofit", count=4, rated_power_w=6.0)),
    )


def _sweep_rows() -> tuple[dict, ...]:
    """An invented dimming curve: dimming down drops out below 30 %, brightening up
    pops on at 45 %, 25 % and 30 % down unstable."""
    rows = []
    for direction, settings in (("down", [1 - i / 20 for i in range(21)]), ("up", [i / 20 for i in range(21)])):
        threshold = 0.3 if direction == "down" else 0.45
        for s in settings:
            lit = s >= threshold
            alpha = 160 - 140 * s
            light = (s ** 2.2) if lit else 0.0
            rows.append(dict(direction=direction, setting=round(s, 3), firing_angle_deg=alpha if lit else None,
                             conduction_angle_deg=180 - alpha if lit else None, load_rms_v=230 * s,
                             load_rms_a=0.3 * s, power_w=66 * s, light_fraction=light,
                             stable=not (direction == "down" and round(s, 2) in (0.3, 0.35))))
    return tuple(rows)


def canned_report(circuit: Circuit, *, fail_safety: bool = False) -> Report:
    """A fixed report whose figures follow the circuit's total lamp wattage, so that an
    edit visibly changes the verdict: minimum load fails below 40 W."""
    total_w = sum(g.total_rated_power_w for g in circuit.loads)
    min_ok = total_w >= circuit.dimmer.min_load_w
    checks = (
        CheckResult(id="rating", status=Status.PASS, value=total_w, limit=circuit.dimmer.rated_load_w, unit="W",
                    margin=1 - total_w / circuit.dimmer.rated_load_w, message="The load is inside the rating.",
                    sources=("TEST_SOURCE",)),
        CheckResult(id="minimum-load", status=Status.PASS if min_ok else Status.FAIL, value=total_w,
                    limit=circuit.dimmer.min_load_w, unit="W", margin=total_w / circuit.dimmer.min_load_w - 1,
                    message="Total load against the dimmer's minimum.",
                    remedy=None if min_ok else "Add load or fit a correction device."),
        CheckResult(id="holding", status=Status.CAUTION, value=142.0, limit=170.0, unit="deg", margin=-0.16,
                    message="Conduction may end early at low settings.", remedy="Fit a correction device.",
                    sources=("TEST_TRIAC",)),
        CheckResult(id="inrush", status=Status.FAIL if fail_safety else Status.PASS, value=95.0, limit=80.0,
                    unit="A", margin=-0.19 if fail_safety else 0.2, message="Switch-on surge against the rating.",
                    safety=True),
        CheckResult(id="harmonics", status=Status.NOT_APPLICABLE, value=None, limit=None, unit="",
                    margin=None, message="No limit applies below 75 W."),
    )
    verdict = Verdict.UNSUITABLE if (not min_ok or fail_safety) else Verdict.SUITABLE_WITH_CAUTIONS
    return Report(circuit=circuit.name, verdict=verdict, checks=checks, sweep=_sweep_rows(), cautions=CAUTIONS)


class FakeEvaluator:
    """Records calls; ``delay_s`` makes it slow (it checks ``cancel`` while waiting)."""

    def __init__(self, delay_s: float = 0.0, fail_safety: bool = False) -> None:
        self.delay_s = delay_s
        self.fail_safety = fail_safety
        self.calls: list[Circuit] = []
        self.started = threading.Event()
        self.cancelled = 0

    def __call__(self, circuit, progress=None, cancel=None):
        self.calls.append(circuit)
        self.started.set()
        steps = 10
        for i in range(steps):
            if cancel is not None and cancel.is_set():
                self.cancelled += 1
                raise RuntimeError("cancelled")
            time.sleep(self.delay_s / steps)
            if progress:
                progress(i + 1, steps)
        return canned_report(circuit, fail_safety=self.fail_safety)


@dataclass
class _HalfCycles:
    firing_angle_deg: np.ndarray
    extinction_angle_deg: np.ndarray

    def __len__(self):
        return len(self.firing_angle_deg)


class FakeSimResult:
    """Analytic phase-cut sine on a resistive load (not the simulator)."""

    def __init__(self, circuit, setting: float, cycles: int) -> None:
        f, v = circuit.supply.frequency_hz, circuit.supply.voltage_v
        alpha = 160 - 140 * setting
        n = 400 * cycles
        self.t_s = np.arange(n) / (400 * f)
        phase = (self.t_s * f * 360) % 180
        self.supply_v = math.sqrt(2) * v * np.sin(2 * np.pi * f * self.t_s)
        self.load_v = np.where(phase >= alpha, self.supply_v, 0.0)
        self.load_a = self.load_v / 800.0
        self.half_cycles = _HalfCycles(np.full(2 * cycles, alpha), np.full(2 * cycles, 180.0))
        self.frequency_hz = f
        self.final_state = None           # the fake carries no state between settings

    def last_cycle(self):
        tail = slice(-400, None)
        return {"load_rms_v": float(np.sqrt(np.mean(self.load_v[tail] ** 2))),
                "load_rms_a": float(np.sqrt(np.mean(self.load_a[tail] ** 2))),
                "power_w": float(np.mean(self.load_v[tail] * self.load_a[tail]))}


def fake_simulate(circuit, *, setting=1.0, cycles=3, start="steady", **_):
    return FakeSimResult(circuit, setting, cycles)


def fake_size(circuit):
    return {"groups": [{"name": g.name, "min_count": 1, "max_count": 50} for g in circuit.loads],
            "correction": Linear(name="bypass 150 nF", resistance_ohm=330.0, series_capacitance_f=150e-9)}


@dataclass
class Archetype:
    name: str
    kind: str
    object: object


class FakeCatalogue:
    def list_archetypes(self):
        return [Archetype("invented 9 W LED retrofit", "lamp",
                          ElectronicDriver(name="LED 9 W (archetype)", count=1, rated_power_w=9.0)),
                Archetype("invented 60 W filament", "lamp", Filament(name="filament 60 W", rated_power_w=60.0)),
                Archetype("invented trailing-edge dimmer", "dimmer",
                          Dimmer(name="trailing 250 W", edge="trailing", control="phase", rated_load_w=250.0))]

    def demo_circuit(self):
        return sample_circuit("demo")


class FakeFiles:
    """Circuits kept in memory by path; a marker file is written so paths exist."""

    def __init__(self) -> None:
        self.saved: dict[Path, Circuit] = {}
        self.profiles: dict[str, object] = {}

    def write_circuit(self, circuit, path, overwrite=False):
        path = Path(path)
        if path.exists() and not overwrite:
            raise InputError("exists; not overwritten", file=str(path))
        path.write_text(f"fake circuit file: {circuit.name}\n")
        self.saved[path] = circuit

    def read_circuit(self, path):
        path = Path(path)
        if path not in self.saved:
            raise InputError("no such circuit file", file=str(path))
        return self.saved[path]

    def save_profile(self, obj, name, overwrite=False):
        if name in self.profiles and not overwrite:
            raise FileExistsError(name)
        self.profiles[name] = obj
        return f"profiles/{name}.toml"

    def list_profiles(self):
        return list(self.profiles)

    def read_profile(self, path):
        return self.profiles[path]


def make_app(circuit=None, *, evaluator=None, files=None, **kwargs):
    from tui.app import DimfitApp
    return DimfitApp(circuit=circuit or sample_circuit(), evaluate=evaluator or FakeEvaluator(),
                     simulate=fake_simulate, size=fake_size, files=files or FakeFiles(),
                     catalogue=FakeCatalogue(), render_markdown=lambda r, c: f"# {r.circuit}\n\n{r.verdict}\n",
                     cautions=lambda: CAUTIONS, **kwargs)
