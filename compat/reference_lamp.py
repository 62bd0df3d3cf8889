"""The trade's reference for acceptable light: a dimmed filament lamp.

A filament lamp on a leading-edge dimmer ripples at twice the mains frequency, more so
as it is dimmed (a cooler filament's light varies more steeply with its temperature),
and the trade accepts that light at every setting (common practice, no source).  The
flicker check therefore compares a circuit's stroboscopic visibility (SVM, see
``compat.flicker``) with that of a filament lamp giving the same mean light on the same
supply, simulated with the same models, so an error in the filament model moves both.

The reference lamp is a general-service lamp of ``REFERENCE_FILAMENT_W`` (or the
circuit's smallest filament lamp, if smaller) on an ideal phase-control leading-edge
dimmer with neutral, at the circuit's supply voltage and frequency and the default loop
impedance.  A smaller lamp has a thinner filament and ripples more, so the smallest
common lamp is the most lenient reference the trade still calls acceptable.
"""
from __future__ import annotations

import hashlib
import os
from functools import lru_cache
from pathlib import Path

import numpy as np

from compat import flicker
from compat.runs import samples_per_cycle
from loads import simulation as sim
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.filament import Filament
from loads.supply import Supply

# common practice, no source: 25 W is the smallest general-service filament lamp in
# ordinary household use
REFERENCE_FILAMENT_W = 25.0
# engineering choice: firing angles of the reference curve [deg]; the light falls to a
# few parts per thousand of full by 150° and the curve is interpolated in between
_ANGLES_DEG = tuple(float(a) for a in range(0, 176, 10))
_CYCLES = 5               # engineering choice: from the steady state, 5 cycles, the last 3 analysed
_ANALYSED = 3
_SAMPLES_PER_CYCLE = 200  # as the sweep's grid (compat.evaluate)


def reference_power_w(circuit: Circuit) -> float:
    """Rated power of the reference filament lamp for a circuit [W]."""
    own = [g.rated_power_w for g in circuit.all_loads if isinstance(g, Filament)]
    return min([REFERENCE_FILAMENT_W, *own])


# The curve takes 18 steady-state simulations (~0.1 s), the same in every process, so
# it is also kept on disk beside the compiled integrator's cache (``__pycache__``),
# named by its three parameters and a digest of the source of every module that shapes
# it; an edit to any of them, or an unwritable folder, means it is simply simulated.
CACHE_DIR = Path(__file__).resolve().parent / "__pycache__"
_SHAPING_MODULES = ("compat/reference_lamp.py", "compat/flicker.py", "compat/runs.py", "loads/*.py")


@lru_cache(maxsize=1)
def _source_digest() -> str:
    root = Path(__file__).resolve().parent.parent
    h = hashlib.sha256()
    for pattern in _SHAPING_MODULES:
        for f in sorted(root.glob(pattern)):
            h.update(f.name.encode())
            h.update(f.read_bytes())
    return h.hexdigest()[:16]


def _cache_file(voltage_v: float, frequency_hz: float, power_w: float) -> Path:
    return CACHE_DIR / f"reference_lamp-{voltage_v!r}V-{frequency_hz!r}Hz-{power_w!r}W-{_source_digest()}.npy"


@lru_cache(maxsize=16)
def filament_svm_curve(voltage_v: float, frequency_hz: float, power_w: float) -> tuple[np.ndarray, np.ndarray]:
    """(mean light as a fraction of the lamp's rated light [1], SVM [1]) of the reference
    lamp across the firing angles, sorted by light (from the disk cache when it holds
    this curve, see ``CACHE_DIR``)."""
    path = _cache_file(voltage_v, frequency_hz, power_w)
    try:
        kept = np.load(path, allow_pickle=False)
        if kept.shape == (2, len(_ANGLES_DEG)):
            return kept[0].copy(), kept[1].copy()
    except (OSError, ValueError):
        pass
    light, svm = simulated_svm_curve(voltage_v, frequency_hz, power_w)
    try:
        CACHE_DIR.mkdir(exist_ok=True)
        tmp = path.with_name(f"{path.stem}.{os.getpid()}.tmp.npy")
        np.save(tmp, np.stack([light, svm]), allow_pickle=False)
        os.replace(tmp, path)       # atomic: a concurrent reader sees all of it or none
    except OSError:
        pass
    return light, svm


def simulated_svm_curve(voltage_v: float, frequency_hz: float, power_w: float) -> tuple[np.ndarray, np.ndarray]:
    """``filament_svm_curve``, simulated (no cache)."""
    c = Circuit(name="reference filament lamp", supply=Supply(voltage_v=voltage_v, frequency_hz=frequency_hz),
                dimmer=Dimmer(control="phase", wiring="with-neutral", rc_diac=None),
                loads=(Filament(name="reference", count=1, rated_power_w=power_w, rated_voltage_v=voltage_v),))
    light, svm = [], []
    for a in _ANGLES_DEG:
        r = sim.simulate(c, firing_angle_deg=a, cycles=_CYCLES, start="steady", samples_per_cycle=_SAMPLES_PER_CYCLE)
        spc = samples_per_cycle(r)
        x = np.atleast_2d(r.group_light)[0, -_ANALYSED * spc:]
        x = flicker.remove_drift(x, spc // 2)
        light.append(float(np.mean(x)))
        svm.append(flicker.stroboscopic_visibility(x, spc * frequency_hz))
    order = np.argsort(light)
    return np.asarray(light)[order], np.asarray(svm)[order]


def filament_svm(circuit: Circuit, light_fraction: float) -> float:
    """SVM of the reference filament lamp giving ``light_fraction`` of its rated light
    on the circuit's supply [1] (interpolated in the light; the ends held)."""
    s = circuit.supply
    lf, svm = filament_svm_curve(float(s.voltage_v), float(s.frequency_hz), float(reference_power_w(circuit)))
    return float(np.interp(light_fraction, lf, svm))


# engineering choice: the bottom of a dimmer's travel is judged from this many cycles
# from the steady start, the last _ANALYSED averaged (a filament settles in a few cycles
# at the steady start's temperature; the rc-diac timing network in one or two)
_FLOOR_CYCLES = 8


def dimmer_floor_light(circuit: Circuit) -> float:
    """Light of the reference filament lamp on the circuit's own dimmer and supply at the
    bottom of the knob's travel (setting 0), as a fraction of its rated light [1].

    This is the dimmer's own floor: a dimmer whose latest firing angle is 104° leaves a
    filament lamp at about a sixth of its light whatever lamps are fitted, so the lamps'
    dimming range is judged against it (``compat.checks.check_dimming_range``).  0 when
    the reference lamp does not light at the bottom of the travel."""
    return _floor_light(circuit.supply, circuit.dimmer, float(reference_power_w(circuit)))


@lru_cache(maxsize=64)
def _floor_light(supply: Supply, dimmer: Dimmer, power_w: float) -> float:
    """``dimmer_floor_light`` for one supply, dimmer and reference lamp (kept: every
    check of a sizing search asks it again for the same dimmer)."""
    ref = Filament(name="reference", count=1, rated_power_w=power_w, rated_voltage_v=float(supply.voltage_v))
    c = Circuit(name="dimmer floor", supply=supply, dimmer=dimmer, loads=(ref,))
    r = sim.simulate(c, setting=0.0, cycles=_FLOOR_CYCLES, start="steady", samples_per_cycle=_SAMPLES_PER_CYCLE)
    spc = samples_per_cycle(r)
    return float(np.mean(np.atleast_2d(r.group_light)[0, -_ANALYSED * spc:]))
