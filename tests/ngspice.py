"""Run the ngspice reference decks in ``tests/data/spice/`` and measure their waveforms.

ngspice (the general-purpose circuit simulator, batch mode ``ngspice -b``) is the
independent reference the ``reference_sim`` tests and ``python -m tests.bench`` compare
our solver against.  This module

* finds the program (``shutil.which("ngspice")``) and supplies the pytest fixture
  ``ngspice_exe``: a test that needs ngspice is *skipped* with a reason when it is
  absent, except when the environment has ``CI=true``, where the absence *fails* the
  test (a CI machine that silently skips its reference checks proves nothing);
* renders a deck with chosen ``.param`` values and transient span, runs it in a
  temporary directory, and refuses a run whose transient aborted — ngspice exits with
  status 0 even after "Timestep too small", so the log and the data's end time are
  checked;
* parses the ``wrdata`` file (single time column, vector names in the header) and
  the ``rusage all`` report ("Total analysis time");
* measures waveforms on ngspice's own non-uniform time points: integrals and rms over
  whole cycles, level crossings, peaks, time above a level.

Every deck in ``tests/data/spice/`` follows the same conventions: parameters as
``.param name=value`` (each name defined once), a single ``tran tmax tstop 0 tmax`` line
and a single ``wrdata out.dat ...`` line in its ``.control`` block.
"""
from __future__ import annotations

import math
import os
import re
import shutil
import subprocess
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

SPICE_DIR = Path(__file__).resolve().parent / "data" / "spice"

# Messages by which ngspice announces a failed or aborted analysis (seen in ngspice-39
# logs; `ngspice -b` exits with status 0 even when a transient aborts, see
# tests/data/spice/README.md, "The earlier step studies").
_ABORT_PATTERNS = re.compile(
    r"timestep too small|simulation\(s\) aborted|transient solution failed|"
    r"doAnalyses:|singular matrix|no convergence|fatal error|^error[: ]|"
    r"could not find|unknown (?:model|parameter|subckt)",
    re.IGNORECASE | re.MULTILINE)

_RUSAGE_KEYS = {
    "Total analysis time (seconds)": "total_analysis_s",
    "Transient analysis time": "transient_analysis_s",
    "Accepted timepoints": "accepted_timepoints",
    "Rejected timepoints": "rejected_timepoints",
    "Transient iterations": "transient_iterations",
}


class NgspiceError(RuntimeError):
    """ngspice could not be run, or its analysis aborted, or its output is unusable."""


def find_ngspice() -> str | None:
    """Path of the ngspice program on PATH, or None."""
    return shutil.which("ngspice")


def ci_requires_ngspice() -> bool:
    """True when the environment says this is CI (``CI=true``)."""
    return os.environ.get("CI", "").strip().lower() == "true"


# --------------------------------------------------------------------------------------
# pytest support
# --------------------------------------------------------------------------------------
def require_ngspice() -> str:
    """Path of ngspice for a test: skip without it, or fail when ``CI=true``."""
    import pytest

    exe = find_ngspice()
    if exe is None:
        reason = "ngspice not found on PATH (install the 'ngspice' package to run reference_sim tests)"
        if ci_requires_ngspice():
            pytest.fail("CI=true but " + reason, pytrace=False)
        pytest.skip(reason)
    return exe


try:  # the fixture is only defined when pytest is importable (the bench does not need it)
    import pytest as _pytest

    @_pytest.fixture(scope="session")
    def ngspice_exe() -> str:
        """Session fixture: the ngspice path (skip when absent; fail when CI=true)."""
        return require_ngspice()
except ImportError:  # pragma: no cover - pytest is a test dependency
    pass


# --------------------------------------------------------------------------------------
# decks
# --------------------------------------------------------------------------------------
def render_deck(text: str, *, params: dict[str, float] | None = None,
                tmax_s: float | None = None, tstop_s: float | None = None) -> str:
    """The deck text with ``.param`` values and the ``tran`` line replaced.

    Each name in ``params`` must already have a ``.param name=...`` line in the deck
    (a misspelt name raises instead of being silently ignored)."""
    lines = text.splitlines(keepends=True)
    for name, value in (params or {}).items():
        pattern = re.compile(rf"(?<![\w.]){re.escape(name)}(\s*=\s*)\S+", re.IGNORECASE)
        hits = 0
        for k, line in enumerate(lines):
            if line.lstrip().lower().startswith(".param"):
                line, n = pattern.subn(lambda m: f"{name}{m.group(1)}{value:.12g}", line)
                lines[k] = line
                hits += n
        if hits != 1:
            raise NgspiceError(f"deck defines .param {name} {hits} times, expected exactly once")
    text = "".join(lines)
    if tmax_s is not None or tstop_s is not None:
        m = re.search(r"^(\s*tran\s+)(\S+)\s+(\S+)\s+(\S+)\s+(\S+)(.*)$", text, re.MULTILINE)
        if m is None:
            raise NgspiceError("deck has no 'tran tmax tstop tstart tmax' line")
        tmax = f"{tmax_s:.10e}" if tmax_s is not None else m.group(2)
        tstop = f"{tstop_s:.10e}" if tstop_s is not None else m.group(3)
        text = text[:m.start()] + f"{m.group(1)}{tmax} {tstop} {m.group(4)} {tmax}{m.group(6)}" + text[m.end():]
    return text


def deck_tran(text: str) -> tuple[float, float]:
    """(tmax, tstop) from the deck's ``tran`` line [s]."""
    m = re.search(r"^\s*tran\s+(\S+)\s+(\S+)", text, re.MULTILINE)
    if m is None:
        raise NgspiceError("deck has no 'tran' line")
    return _spice_number(m.group(1)), _spice_number(m.group(2))


_SUFFIX = {"t": 1e12, "g": 1e9, "meg": 1e6, "k": 1e3, "m": 1e-3, "u": 1e-6, "n": 1e-9,
           "p": 1e-12, "f": 1e-15}


def _spice_number(token: str) -> float:
    m = re.fullmatch(r"([-+]?[0-9.]+(?:e[-+]?\d+)?)(meg|[tgkmunpf])?[a-z]*", token.strip().lower())
    if m is None:
        raise NgspiceError(f"not a SPICE number: {token!r}")
    return float(m.group(1)) * _SUFFIX.get(m.group(2) or "", 1.0)


@dataclass(frozen=True, slots=True, eq=False)
class Run:
    """One ngspice run: the wrdata vectors (``data['time']`` etc.), its log, the
    ``rusage`` figures (``stats['total_analysis_s']`` [s]) and the wall time of the
    process [s]."""

    data: dict[str, np.ndarray]
    log: str
    stats: dict[str, float] = field(default_factory=dict)
    wall_s: float = math.nan

    @property
    def t(self) -> np.ndarray:
        return self.data["time"]

    @property
    def analysis_s(self) -> float:
        return self.stats.get("total_analysis_s", math.nan)


def parse_rusage(log: str) -> dict[str, float]:
    """The figures printed by ``rusage all`` that we use (analysis time in s)."""
    out: dict[str, float] = {}
    for line in log.splitlines():
        if "=" not in line:
            continue
        key, value = line.split("=", 1)
        key = key.strip()
        if key in _RUSAGE_KEYS:
            try:
                out[_RUSAGE_KEYS[key]] = float(value.split()[0])
            except (ValueError, IndexError):
                pass
    return out


def read_wrdata(path: Path) -> dict[str, np.ndarray]:
    """Vectors of a ``wrdata`` file written with ``wr_singlescale`` + ``wr_vecnames``."""
    with open(path) as fh:
        header = fh.readline().split()
    values = np.loadtxt(path, skiprows=1, ndmin=2)
    if values.shape[1] != len(header):
        raise NgspiceError(f"{path}: {values.shape[1]} columns but header names {len(header)}")
    data = {name: values[:, k] for k, name in enumerate(header)}
    if "time" not in data:
        raise NgspiceError(f"{path}: no time column (wr_singlescale not set?)")
    if np.any(np.diff(data["time"]) < 0):
        raise NgspiceError(f"{path}: time is not monotonic")
    return data


def run_deck(deck: Path | str, *, params: dict[str, float] | None = None,
             tmax_s: float | None = None, tstop_s: float | None = None,
             timeout_s: float = 300.0, exe: str | None = None) -> Run:
    """Run a deck (a path, or deck text) in a fresh temporary directory.

    Raises NgspiceError when ngspice is missing, exits with an error, reports an
    aborted analysis, or writes data that stop short of tstop."""
    exe = exe or find_ngspice()
    if exe is None:
        raise NgspiceError("ngspice not found on PATH")
    text = Path(deck).read_text() if isinstance(deck, Path) else deck
    text = render_deck(text, params=params, tmax_s=tmax_s, tstop_s=tstop_s)
    _, tstop = deck_tran(text)
    m = re.search(r"^\s*wrdata\s+(\S+)", text, re.MULTILINE)
    if m is None:
        raise NgspiceError("deck has no 'wrdata FILE ...' line")
    out_name = m.group(1)
    with tempfile.TemporaryDirectory(prefix="dimfit-ngspice-") as tmp:
        (Path(tmp) / "deck.cir").write_text(text)
        t0 = time.perf_counter()
        proc = subprocess.run([exe, "-b", "deck.cir"], cwd=tmp, capture_output=True,
                              text=True, timeout=timeout_s)
        wall = time.perf_counter() - t0
        log = proc.stdout + "\n" + proc.stderr
        bad = [ln.strip() for ln in log.splitlines() if _ABORT_PATTERNS.search(ln.strip())]
        if proc.returncode != 0 or bad:
            raise NgspiceError(f"ngspice failed (exit {proc.returncode}): " + " | ".join(bad[:5]))
        out = Path(tmp) / out_name
        if not out.exists():
            raise NgspiceError(f"ngspice wrote no {out_name}; log tail: {log[-500:]}")
        data = read_wrdata(out)
    if data["time"][-1] < tstop * (1 - 1e-9):
        raise NgspiceError(f"transient stopped at {data['time'][-1]:.6g} s before tstop {tstop:.6g} s")
    return Run(data=data, log=log, stats=parse_rusage(log), wall_s=wall)


# --------------------------------------------------------------------------------------
# measurements on ngspice's non-uniform time points (linear between points)
# --------------------------------------------------------------------------------------
def window(t: np.ndarray, y: np.ndarray, t0: float, t1: float) -> tuple[np.ndarray, np.ndarray]:
    """Samples of y on [t0, t1] with linearly interpolated end points."""
    i0 = np.searchsorted(t, t0, side="right")
    i1 = np.searchsorted(t, t1, side="left")
    tt = np.concatenate(([t0], t[i0:i1], [t1]))
    yy = np.concatenate(([np.interp(t0, t, y)], y[i0:i1], [np.interp(t1, t, y)]))
    return tt, yy


def integral(t: np.ndarray, y: np.ndarray, t0: float, t1: float) -> float:
    """Trapezoid-rule ∫ y dt over [t0, t1]."""
    tt, yy = window(t, y, t0, t1)
    return float(np.sum(0.5 * (yy[1:] + yy[:-1]) * np.diff(tt)))


def mean(t: np.ndarray, y: np.ndarray, t0: float, t1: float) -> float:
    return integral(t, y, t0, t1) / (t1 - t0)


def rms(t: np.ndarray, y: np.ndarray, t0: float, t1: float) -> float:
    """rms over [t0, t1]; y² is integrated by the trapezoid rule on ngspice's points."""
    return math.sqrt(integral(t, y * y, t0, t1) / (t1 - t0))


def rms_cycles(t: np.ndarray, y: np.ndarray, period_s: float, first: int, last: int) -> float:
    """rms over whole cycles ``first`` … ``last`` (cycle k spans [k·T, (k+1)·T])."""
    return rms(t, y, first * period_s, (last + 1) * period_s)


def crossings(t: np.ndarray, y: np.ndarray, level: float = 0.0, direction: int = 0,
              t0: float = -np.inf, t1: float = np.inf) -> np.ndarray:
    """Interpolated times where y crosses ``level`` (direction +1 rising, −1 falling, 0 both)."""
    m = (t >= t0) & (t <= t1)
    tt, yy = t[m], y[m] - level
    k = np.nonzero(np.sign(yy[:-1]) * np.sign(yy[1:]) < 0)[0]
    rising = yy[k + 1] > yy[k]
    if direction > 0:
        k = k[rising]
    elif direction < 0:
        k = k[~rising]
    frac = yy[k] / (yy[k] - yy[k + 1])
    return tt[k] + frac * (tt[k + 1] - tt[k])


def first_rise_above(t: np.ndarray, y: np.ndarray, level: float, t0: float, t1: float) -> float:
    """First interpolated time in [t0, t1] at which y rises from below ``level`` to it
    (a value already above the level at t0 is not a rise; nan: none)."""
    k = np.nonzero((y[1:] >= level) & (y[:-1] < level))[0] + 1
    if len(k) == 0:
        return math.nan
    tc = t[k - 1] + (level - y[k - 1]) / (y[k] - y[k - 1]) * (t[k] - t[k - 1])
    tc = tc[(tc >= t0) & (tc <= t1)]
    return float(tc[0]) if len(tc) else math.nan


def first_fall_below(t: np.ndarray, y: np.ndarray, level: float, t0: float, t1: float) -> float:
    """First interpolated time in [t0, t1] at which y falls from ``level`` or above to
    below it (nan: none)."""
    k = np.nonzero((y[1:] < level) & (y[:-1] >= level))[0] + 1
    if len(k) == 0:
        return math.nan
    tc = t[k - 1] + (y[k - 1] - level) / (y[k - 1] - y[k]) * (t[k] - t[k - 1])
    tc = tc[(tc >= t0) & (tc <= t1)]
    return float(tc[0]) if len(tc) else math.nan


def peak(t: np.ndarray, y: np.ndarray, t0: float, t1: float) -> float:
    """Largest |y| on ngspice's points in [t0, t1]."""
    m = (t >= t0) & (t <= t1)
    return float(np.max(np.abs(y[m]))) if np.any(m) else math.nan


def time_above(t: np.ndarray, y: np.ndarray, level: float, t0: float, t1: float) -> float:
    """Total time in [t0, t1] during which |y| ≥ level, with the edges of each interval
    located by linear interpolation between time points [s]."""
    tt, yy = window(t, np.abs(y), t0, t1)
    d = yy - level
    total = 0.0
    for k in range(len(tt) - 1):
        a, b, dt = d[k], d[k + 1], tt[k + 1] - tt[k]
        if dt <= 0:
            continue
        if a >= 0 and b >= 0:
            total += dt
        elif a >= 0 > b:
            total += dt * a / (a - b)
        elif b >= 0 > a:
            total += dt * b / (b - a)
    return total


# --------------------------------------------------------------------------------------
# The reference cases: each deck with its span and converged step, and the same circuit
# built from the project's dataclasses (imported lazily, so this module runs without them).
# --------------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class Case:
    """One reference circuit.

    key: short name; deck: file in SPICE_DIR; frequency_hz: mains [Hz];
    steps_per_cycle: the converged ngspice step T/tmax from the step studies
    (tests/data/spice/README.md);
    cycles: mains cycles simulated in the tests; firing_angle_deg: forced firing angle
    for phase control (None: rc-diac, the angle is an output); params: deck .param
    overrides."""

    key: str
    title: str
    deck: str
    frequency_hz: float
    steps_per_cycle: int
    cycles: int
    firing_angle_deg: float | None = 90.0
    params: tuple[tuple[str, float], ...] = ()

    @property
    def period_s(self) -> float:
        return 1.0 / self.frequency_hz

    @property
    def tmax_s(self) -> float:
        return self.period_s / self.steps_per_cycle

    def run(self, *, cycles: int | None = None, exe: str | None = None, **params: float) -> Run:
        """Run the deck over ``cycles`` mains cycles at the converged step."""
        n = self.cycles if cycles is None else cycles
        merged = dict(self.params) | params
        return run_deck(SPICE_DIR / self.deck, params=merged, tmax_s=self.tmax_s,
                        tstop_s=n * self.period_s, exe=exe)


# Step sizes: the earlier step studies, tests/data/spice/README.md (coarsest step whose results change by less
# than their stated tolerance when halved): case 1 125, case 2 model B 500, case 3 4000,
# case 4 8000 steps per cycle.
CASE_A = Case("a", "ideal switch + R (Rashid Ex. 11.1), α 90°", "case_a_resistive.cir", 60.0, 125, 3)
# Case (b) as the textbook has it: no node capacitance (cw = 0 leaves 1 fF in the deck, which
# ngspice needs for a node with only switch and inductor); the off-state ring test sets
# cw = 100 pF on both sides.
CASE_B = Case("b", "triac I_H 1 mA + R–L (Rashid Ex. 11.2), α 90°", "case_b_rl_triac.cir", 60.0, 500, 3,
              params=(("cw", 0.0),))
CASE_C = Case("c", "triac I_H 20 mA + 7 W capacitor-input lamp, α 90°", "case_c_led_triac.cir", 50.0, 4000, 10)
CASE_D = Case("d", "rc-diac + triac + 100 Ω lamp, pot 100 kΩ", "case_d_rc_diac.cir", 60.0, 8000, 6,
              firing_angle_deg=None, params=(("pot", 100e3),))
CASES = (CASE_A, CASE_B, CASE_C, CASE_D)

RC_DIAC_POT_OHM = 250e3      # the deck's pot range; our setting s = 1 − pot / 250 kΩ


def our_dimmer(**kw):
    """A Dimmer matched to the decks: no on-state voltage, 1 mΩ on-state resistance (the
    decks' switch ron), no choke, no snubber, no self-supply, and a switch that always
    commutates at its holding current (the decks' switches have no commutation limit)."""
    from loads.dimmer import Dimmer

    base = dict(name="reference", edge="leading", wiring="with-neutral", control="phase",
                on_state_voltage_v=0.0, on_state_resistance_ohm=1e-3, choke_inductance_h=0.0,
                snubber_capacitance_f=0.0, self_supply_a=0.0, min_firing_angle_deg=10.0,
                max_firing_angle_deg=170.0, rc_diac=None, commutating_di_dt_a_per_s=0.0)
    base.update(kw)
    return Dimmer(**base)


# Cases (a), (b), (d) have no source impedance in the textbook.  (a) and (d) get a 1 µH
# source inductance in deck and circuit (engineering choice: it bounds the current that
# charges the 100 pF node capacitance when the switch closes -- 1.7 A for ~0.3 µs instead
# of an unresolved spike -- and changes the deck's rms results by ~1e-5 (a) and its firing
# angles by < 0.05° (d); the lamp resistance damps the 1 µH–100 pF ring, ζ = 5 and 0.5).
# (b) has none: with the R–L load nothing damps that 16 MHz ring, which carries the switch
# current through zero when the gate pulse ends and drops the triac (see its deck).
STIFF_SOURCE_INDUCTANCE_H = 1e-6


def stiff_supply(*, source_inductance_h: float = STIFF_SOURCE_INDUCTANCE_H):
    """120 V 60 Hz, no source resistance, 1 µH (or as given), 100 pF node capacitance."""
    from loads.supply import Supply

    return Supply(voltage_v=120.0, frequency_hz=60.0, source_resistance_ohm=0.0,
                  source_inductance_h=source_inductance_h, wiring_capacitance_f=100e-12)


def our_circuit(case: Case, **params: float):
    """The case's circuit in our dataclasses (params: deck overrides such as pot)."""
    from loads.circuit import Circuit
    from loads.dimmer import RcDiac
    from loads.driver import ElectronicDriver
    from loads.linear import Linear
    from loads.supply import Supply

    p = dict(case.params) | params
    if case.key == "a":
        # Deck: ideal switch gated α…180°.  Ours: a triac that latches and holds at 1 mA
        # (turns off 0.003° before the zero crossing with 10 Ω at 120 V: negligible).
        return Circuit(
            name="ref-a",
            supply=stiff_supply(),
            dimmer=our_dimmer(holding_current_a=1e-3, latching_current_a=1e-3, gate_window_s=20e-6),
            loads=(Linear(name="R", resistance_ohm=10.0, rated_voltage_v=120.0, rated_power_w=1440.0),))
    if case.key == "b":
        return Circuit(
            name="ref-b",
            supply=Supply(voltage_v=120.0, frequency_hz=60.0, source_resistance_ohm=0.0,
                          source_inductance_h=0.0, wiring_capacitance_f=float(p.get("cw", 0.0))),
            dimmer=our_dimmer(holding_current_a=1e-3, latching_current_a=1e-3, gate_window_s=20e-6),
            loads=(Linear(name="RL", resistance_ohm=2.5, inductance_h=6.5e-3, rated_voltage_v=120.0,
                          rated_power_w=2000.0),))
    if case.key == "c":
        # The deck has no wiring capacitor: the node capacitance is C_x = 47 nF alone.
        # dimmable=False: our driver then draws converter_power_w whatever the phase,
        # as the deck's constant-power sink (a dimmable driver scales it by its decoded level).
        return Circuit(
            name="ref-c",
            supply=Supply(voltage_v=230.0, frequency_hz=50.0, source_resistance_ohm=0.4,
                          source_inductance_h=0.795775e-3, wiring_capacitance_f=0.0),
            dimmer=our_dimmer(holding_current_a=0.02, latching_current_a=0.02, gate_window_s=20e-6),
            loads=(ElectronicDriver(name="lamp", rated_power_w=7.0, rated_voltage_v=230.0,
                                    input_capacitance_f=47e-9, series_resistance_ohm=10.0,
                                    bulk_capacitance_f=4.7e-6, start_voltage_v=60.0,
                                    stop_voltage_v=48.0, bleeder_a=0.0, dimmable=False,
                                    converter_power_w=7.0),))
    if case.key == "d":
        return Circuit(
            name="ref-d",
            supply=stiff_supply(),
            dimmer=our_dimmer(control="rc-diac", holding_current_a=0.02, latching_current_a=0.02,
                              gate_trigger_current_a=0.01, min_firing_angle_deg=0.0,
                              max_firing_angle_deg=180.0,
                              rc_diac=RcDiac(fixed_resistance_ohm=3300.0,
                                             variable_resistance_ohm=RC_DIAC_POT_OHM,
                                             timing_capacitance_f=0.1e-6, breakover_v=32.0,
                                             snapback_v=10.0, asymmetry_v=0.0,
                                             gate_resistance_ohm=10.0 + 50.0,  # diac ron + R_GK
                                             diac_off_current_a=1e-3)),
            loads=(Linear(name="lamp", resistance_ohm=100.0, rated_voltage_v=120.0, rated_power_w=144.0),))
    raise KeyError(case.key)


def our_setting(case: Case, **params: float) -> float | None:
    """The rc-diac setting for the deck's pot value (None for phase control)."""
    if case.firing_angle_deg is not None:
        return None
    pot = (dict(case.params) | params)["pot"]
    return 1.0 - pot / RC_DIAC_POT_OHM
