"""Public face of the circuit simulator: run a circuit, get waveforms and figures.

``simulate`` runs one control setting (or one forced firing angle) for N mains cycles
from a cold start, from the periodic steady state, or from a state carried over from a
previous run; ``sweep`` walks the control range up or down carrying the state from one
setting to the next.  The numerical work is done in ``loads.kernel``.

Angles are measured from the supply zero crossing that starts each half-cycle [deg].
"""
from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

import numpy as np


class Start(StrEnum):
    COLD = "cold"        # filaments at ambient, capacitors empty
    STEADY = "steady"    # run until the half-cycles repeat, then record
    OFF = "off"          # lamp-out periodic state: dimmer energised, switch never fired


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class HalfCycles:
    """Per-half-cycle figures; every field is an array with one entry per half-cycle.

    start_s: time of the supply zero crossing that starts it [s];
    polarity: +1 or −1;
    firing_angle_deg: first firing of the switch (nan: did not fire) [deg];
    extinction_angle_deg: where the last conduction that started in it ended; may
    exceed 180 with inductive loads (nan: did not fire) [deg];
    firings: how many times the switch was triggered (>1: re-firing);
    failed_latches: triggers whose gate drive ended before the current reached the
    latching current;
    early_dropouts: conductions that fell below the holding current more than
    EARLY_DROPOUT_DEG before the end of the half-cycle;
    time_above_holding_s: time the switch current was at or above the holding current [s];
    peak_current_a: largest |switch current| [A]; peak_line_current_a: largest |line current| [A];
    i2t_a2s: ∫ i_switch² dt [A²s];
    load_rms_v, load_rms_a: at the load terminals [V], [A]; power_w: mean v·i into the loads [W];
    mean_current_a: mean line current (its sign shows a DC component) [A];
    light: mean light per group as a fraction of that group's rated light, shape
    (n_half, n_groups) [1]."""

    start_s: np.ndarray
    polarity: np.ndarray
    firing_angle_deg: np.ndarray
    extinction_angle_deg: np.ndarray
    firings: np.ndarray
    failed_latches: np.ndarray
    early_dropouts: np.ndarray
    time_above_holding_s: np.ndarray
    peak_current_a: np.ndarray
    peak_line_current_a: np.ndarray
    i2t_a2s: np.ndarray
    load_rms_v: np.ndarray
    load_rms_a: np.ndarray
    power_w: np.ndarray
    mean_current_a: np.ndarray
    light: np.ndarray

    def __len__(self) -> int:
        return len(self.start_s)


# A drop-out this far or more before the end of the half-cycle counts as early
# (engineering choice: clear of the normal turn-off of a resistive load near 180°).
EARLY_DROPOUT_DEG = 10.0


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class SimResult:
    """Sampled waveforms and per-half-cycle figures of one run.

    t_s [s]; supply_v: source EMF [V]; load_v: load terminal voltage [V];
    load_a: current into the load terminal from the dimmer (= line current) [A];
    dimmer_a: current in the switch [A]; dimmer_v: voltage across the dimmer [V];
    group_a: each group's total current, shape (n_groups, n) [A];
    group_light: each group's instantaneous light as a fraction of rated, shape
    (n_groups, n) [1]; timing_v: timing-capacitor voltage (rc-diac; zeros otherwise) [V].
    """

    t_s: np.ndarray
    supply_v: np.ndarray
    load_v: np.ndarray
    load_a: np.ndarray
    dimmer_a: np.ndarray
    dimmer_v: np.ndarray
    group_a: np.ndarray
    group_light: np.ndarray
    timing_v: np.ndarray
    half_cycles: HalfCycles
    frequency_hz: float
    setting: float | None
    forced_firing_angle_deg: float | None
    final_state: object          # opaque; pass as ``start=`` to continue

    def last_cycle(self) -> dict[str, float]:
        """load_rms_v, load_rms_a, power_w over the last full mains cycle."""
        hc = self.half_cycles
        if len(hc) < 2:
            raise ValueError("fewer than two half-cycles simulated")
        v2 = np.mean(hc.load_rms_v[-2:] ** 2)
        a2 = np.mean(hc.load_rms_a[-2:] ** 2)
        return {"load_rms_v": float(np.sqrt(v2)), "load_rms_a": float(np.sqrt(a2)),
                "power_w": float(np.mean(hc.power_w[-2:]))}


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class SweepPoint:
    """One setting of a sweep, judged over the last ``analysed`` half-cycles.

    firing_angle_deg / conduction_angle_deg: means over fired half-cycles (None: none
    fired); fired_fraction: share of analysed half-cycles that fired [1];
    light_fraction: total light relative to all lamps at full on a plain switch [1];
    group_light: per group, fraction of its rated light [1];
    stable: every analysed half-cycle fired, latched and held, and the firing angles
    agree within STABLE_ANGLE_DEG;
    light_t_s, light: the total light waveform over the analysed span (for flicker)."""

    direction: str
    setting: float
    firing_angle_deg: float | None
    conduction_angle_deg: float | None
    load_rms_v: float
    load_rms_a: float
    power_w: float
    light_fraction: float
    group_light: tuple[float, ...]
    fired_fraction: float
    failed_latches: int
    early_dropouts: int
    refirings: int
    stable: bool
    light_t_s: np.ndarray
    light: np.ndarray
