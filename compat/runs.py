"""What the checks look at: simulated runs of one circuit, cut to the part analysed.

A ``SettingRun`` is one control setting of a sweep (direction, setting) with the
simulator's full result; the checks use only its last ``analysed_cycles`` mains
cycles, by which time the circuit has settled from the previous setting.  An
``Evidence`` bundles everything one evaluation simulated, so every check reads the same
runs and nothing is simulated twice.
"""
from __future__ import annotations

from dataclasses import dataclass, field, fields

import numpy as np

from loads.circuit import Circuit
from loads.simulation import HalfCycles, SimResult, SweepPoint


class Cancelled(Exception):
    """The caller's cancel event was set during an evaluation."""


def samples_per_cycle(result: SimResult) -> int:
    """Samples per mains cycle of a result's uniform grid [1]."""
    if result.t_s.size < 2:
        raise ValueError("a result needs at least two samples")
    dt = float(result.t_s[1] - result.t_s[0])
    return max(1, int(round(1.0 / (result.frequency_hz * dt))))


def tail(result: SimResult, cycles: int) -> slice:
    """Slice of the sampled arrays covering the last ``cycles`` whole mains cycles."""
    n = samples_per_cycle(result) * int(cycles)
    n = min(n, result.t_s.size)
    return slice(result.t_s.size - n, result.t_s.size)


def tail_half_cycles(hc: HalfCycles, n: int) -> HalfCycles:
    """The last ``n`` half-cycles of a HalfCycles record."""
    n = min(int(n), len(hc))
    return HalfCycles(**{f.name: np.asarray(getattr(hc, f.name))[len(hc) - n:] for f in fields(HalfCycles)})


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class SettingRun:
    """One setting of a sweep: direction ("down" | "up"), setting [1], the simulator's
    result, the number of whole cycles analysed at its end, and the sweep summary."""

    direction: str
    setting: float
    result: SimResult
    analysed_cycles: int
    point: SweepPoint | None = None
    # figures derived from this run, kept so that checks judged again on a subset of
    # the sweep (``compat.evaluate.usable_from``) do not compute them twice
    _memo: dict = field(default_factory=dict, init=False, repr=False, compare=False)

    def memo(self, key, compute):
        """``compute()``, computed once per run and ``key`` (hashable)."""
        try:
            return self._memo[key]
        except KeyError:
            value = self._memo[key] = compute()
            return value

    @property
    def half_cycles(self) -> HalfCycles:
        return self.memo("half_cycles", lambda: tail_half_cycles(self.result.half_cycles, 2 * self.analysed_cycles))

    @property
    def span(self) -> slice:
        return tail(self.result, self.analysed_cycles)

    @property
    def sample_rate_hz(self) -> float:
        return samples_per_cycle(self.result) * self.result.frequency_hz

    def light(self, weights: np.ndarray) -> np.ndarray:
        """Total light over the analysed span as a fraction of all lamps at full [1]."""
        w = np.asarray(weights, dtype=float)
        return self.memo(("light", w.tobytes()), lambda: self._light(w))

    def _light(self, w: np.ndarray) -> np.ndarray:
        gl = np.atleast_2d(self.result.group_light)[:, self.span]
        return w[: gl.shape[0]] @ gl

    def light_fraction(self, weights: np.ndarray) -> float:
        if self.point is not None:
            return float(self.point.light_fraction)
        return float(np.mean(self.light(weights)))

    def fired_fraction(self) -> float:
        hc = self.half_cycles
        return float(np.mean(np.isfinite(hc.firing_angle_deg))) if len(hc) else 0.0


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class Evidence:
    """Everything one evaluation simulated.

    down / up: the sweep in each direction, in the order visited; inrush: switch-on runs
    at setting 1 as (switch-on angle [deg], result); off: the switch never firing, from
    cold; harmonics: the worst setting re-run on a fine grid for the FFT; bottom: settings
    between the last lit grid setting going down and the drop-out (dimming range only);
    light_weights: per-group weights (summing to 1) giving total light fraction."""

    circuit: Circuit
    down: tuple[SettingRun, ...] = ()
    up: tuple[SettingRun, ...] = ()
    inrush: tuple[tuple[float, SimResult], ...] = ()
    off: SimResult | None = None
    harmonics: tuple[SettingRun, ...] = ()
    bottom: tuple[SettingRun, ...] = ()
    light_weights: np.ndarray = field(default_factory=lambda: np.ones(1))

    @property
    def runs(self) -> tuple[SettingRun, ...]:
        return self.down + self.up
