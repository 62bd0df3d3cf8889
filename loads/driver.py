"""Capacitor-input electronics (LED retrofit lamp, LED driver).

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from loads.errors import require
from loads.load import LoadGroup, LoadKind


# Common practice, from memory: LED lamps and drivers made for phase-cut dimmers carry a
# bleeder and an R–C damper on their input together (tens to hundreds of ohms); a lamp
# with a bleeder is taken to have one of 100 Ω unless its file says otherwise
# (engineering choice of value: near the surge impedance √(L/C) of a few lamps' input
# capacitors with a typical supply's inductance, where a damper works best).
DEFAULT_DAMPING_OHM = 100.0
# A converter's under-voltage lock-out always has hysteresis (commonly 10–40 % of its
# start voltage: common practice, from memory).  A stop voltage within this fraction of
# the start is taken as this far below it (engineering choice): with no gap the model's
# converter would stop and restart at every solver step while the bus sits at the
# threshold (20,000 events per cycle were measured on a random legal circuit).
UVLO_MIN_GAP_FRACTION = 0.05


class BleederKind(StrEnum):
    RESISTIVE = "resistive"
    CONSTANT_CURRENT = "constant-current"


@dataclass(frozen=True, slots=True, kw_only=True)
class ElectronicDriver(LoadGroup):
    """input_capacitance_f: filter capacitor across the terminals [F];
    series_resistance_ohm: damping resistor between terminals and bridge [Ω];
    bulk_capacitance_f: capacitor after the bridge [F];
    start_voltage_v / stop_voltage_v: bus voltage at which the converter starts / stops [V];
    bleeder_a: bleeder current at the rated peak voltage (0: none) [A];
    bleeder_kind: resistive | constant-current;
    min_light_fraction: lowest light the decode curve gives while running [1];
    dimmable: false → draws full power whatever the phase;
    converter_power_w: drawn from the bulk capacitor at full light (None: derived so the
    input power undimmed at rated voltage equals rated_power_w) [W];
    input_damping_ohm: resistance in series with the input capacitor, an R–C damper that
    lamps made for phase dimmers carry against the ring at each firing (0: the capacitor
    sits directly across the terminals; None: ``DEFAULT_DAMPING_OHM`` for a lamp with a
    bleeder, which marks it as made for phase dimmers, else 0) [Ω]."""

    input_capacitance_f: float = 47e-9        # common practice, no source (X-capacitor tens of nF)
    series_resistance_ohm: float = 10.0       # common practice, no source (fusible input resistor)
    bulk_capacitance_f: float = 4.7e-6        # common practice, no source
    start_voltage_v: float = 60.0             # engineering choice: converter starts at ~1/5 of the 230 V peak
    stop_voltage_v: float | None = None       # None: 0.8 × start (engineering choice)
    bleeder_a: float = 0.0
    bleeder_kind: BleederKind = BleederKind.RESISTIVE
    min_light_fraction: float = 0.05
    dimmable: bool = True
    converter_power_w: float | None = None
    input_damping_ohm: float | None = None

    kind = LoadKind.ELECTRONIC_DRIVER

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        object.__setattr__(self, "bleeder_kind", BleederKind(self.bleeder_kind))
        require(self.input_capacitance_f >= 0, "input_capacitance_f", self.input_capacitance_f, "F must not be negative")
        require(self.series_resistance_ohm > 0, "series_resistance_ohm", self.series_resistance_ohm, "Ω must be positive")
        require(self.bulk_capacitance_f > 0, "bulk_capacitance_f", self.bulk_capacitance_f, "F must be positive")
        require(0 < self.start_voltage_v < 1.5 * self.rated_voltage_v, "start_voltage_v", self.start_voltage_v,
                "V must be positive and below the rated peak")
        if self.stop_voltage_v is not None:
            require(0 < self.stop_voltage_v <= self.start_voltage_v, "stop_voltage_v", self.stop_voltage_v,
                    "V must be positive and not above the start voltage")
        require(self.bleeder_a >= 0, "bleeder_a", self.bleeder_a, "A must not be negative")
        require(0 <= self.min_light_fraction < 1, "min_light_fraction", self.min_light_fraction, "must be between 0 and 1")
        require(self.converter_power_w is None or self.converter_power_w > 0, "converter_power_w",
                self.converter_power_w, "W must be positive")
        require(self.input_damping_ohm is None or self.input_damping_ohm >= 0, "input_damping_ohm",
                self.input_damping_ohm, "Ω must not be negative")

    @property
    def damping_ohm(self) -> float:
        """The input damper in effect [Ω] (see ``input_damping_ohm``)."""
        if self.input_damping_ohm is not None:
            return self.input_damping_ohm
        return DEFAULT_DAMPING_OHM if self.bleeder_a > 0 else 0.0

    @property
    def stop_v(self) -> float:
        """The converter's stop voltage in effect [V]: the file's, but at least
        ``UVLO_MIN_GAP_FRACTION`` of the start voltage below it."""
        stop = self.stop_voltage_v if self.stop_voltage_v is not None else 0.8 * self.start_voltage_v
        return min(stop, (1.0 - UVLO_MIN_GAP_FRACTION) * self.start_voltage_v)


# ---------------------------------------------------------------------------
# Kernel model (one unit).  Equations:
#
#   bridge:     i_br = sgn(v) · max(0, |v| − 2·V_D − v_bus) / R_s        (ideal diodes, drop V_D);
#               conduction and its polarity are a mode, so inside a step the law is
#               linear (s·v − 2·V_D − v_bus) / R_s, and its start and end are located events
#   bleeder:    resistive  i_bl = v / R_bl,   R_bl = √2·V_rated / I_bl
#               constant-current  i_bl = I_bl · clip(v / V_knee, −1, 1)
#   terminal:   i = i_br + i_bl            (the input capacitor is part of the node capacitance)
#   damper:     with R_d > 0 the input capacitor is a state behind R_d instead:
#               i += (v − v_in)/R_d,  C_in·dv_in/dt = (v − v_in)/R_d
#   bus:        C_bulk · dv_bus/dt = |i_br| − i_conv,
#               i_conv = P_conv · level / v_bus   while the converter runs
#   converter:  starts when v_bus ≥ V_start, stops when v_bus ≤ V_stop (hysteresis)
#   decode:     each half-cycle the driver measures the conduction it sees, c = the time
#               from the first rise of |v| above V_sense to its last fall below it (or the
#               end of the half-cycle), as a share of the half-cycle, and moves its level
#               toward decode(c) (a first-order filter of FILTER_GAIN per half-cycle);
#               light = level while running.  A terminal that never falls below V_sense
#               (input capacitors holding it up) reads as full conduction.
# ---------------------------------------------------------------------------
import math  # noqa: E402

import numba  # noqa: E402
import numpy as np  # noqa: E402

BRIDGE_DIODE_DROP_V = 0.7       # common practice, no source (silicon rectifier forward drop)
BLEEDER_KNEE_V = 10.0           # engineering choice: a constant-current bleeder regulates above ~10 V
SENSE_FRACTION = 0.2            # engineering choice: phase detector threshold, 20 % of the rated peak
DECODE_LOW = 0.15               # engineering choice: conduction share at which light reaches its minimum
DECODE_HIGH = 0.90              # engineering choice: conduction share that gives full light
FILTER_GAIN = 0.3               # engineering choice: ~3 half-cycles to follow a change (≈ 30 ms at 50 Hz)

# parameter vector layout
_RS, _VDD, _CB, _PCONV, _VSTART, _VSTOP, _BLKIND, _BLPAR, _VSENSE, _MINL, _DIMM, _RD, _CIN = range(13)
N_PARAMS = 13
N_STATES = 1                    # the bus; a damped input capacitor adds one (n_states)


def n_states(d: "ElectronicDriver") -> int:
    """States of one unit: the bus voltage, and the damped input capacitor's if any."""
    return 2 if d.damping_ohm > 0 else 1
RUNNING = 1
CONDUCTING = 2                  # the bridge conducts ...
NEGATIVE = 4                    # ... on the negative half-wave


def pack(d: "ElectronicDriver") -> np.ndarray:
    v_pk = math.sqrt(2.0) * d.rated_voltage_v
    if d.bleeder_a <= 0:
        bl_kind, bl_par, p_bleed = 0.0, 0.0, 0.0
    elif d.bleeder_kind is BleederKind.RESISTIVE:
        bl_kind, bl_par = 1.0, v_pk / d.bleeder_a
        p_bleed = d.rated_voltage_v ** 2 / bl_par
    else:
        bl_kind, bl_par = 2.0, d.bleeder_a
        p_bleed = d.bleeder_a * d.rated_voltage_v * 2 * math.sqrt(2) / math.pi  # mean |v| × I_bl
    p_conv = d.converter_power_w if d.converter_power_w is not None else max(d.rated_power_w - p_bleed, 0.05 * d.rated_power_w)
    return np.array([d.series_resistance_ohm, 2 * BRIDGE_DIODE_DROP_V, d.bulk_capacitance_f, p_conv,
                     d.start_voltage_v, d.stop_v, bl_kind, bl_par, SENSE_FRACTION * v_pk,
                     d.min_light_fraction, 1.0 if d.dimmable else 0.0, d.damping_ohm,
                     d.input_capacitance_f])


@numba.njit(cache=True, _nrt=False, inline="always")
def _polarity(mode):
    return -1.0 if mode & NEGATIVE else 1.0


@numba.njit(cache=True, _nrt=False, inline="always")
def _bridge(v, vbus, p, mode):
    """Bridge current into the bus, |i_br| (linear while the conduction mode lasts)."""
    if mode & CONDUCTING:
        return (_polarity(mode) * v - p[_VDD] - vbus) / p[_RS]
    return 0.0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_current(v, y, xo, p, mode):
    i = _polarity(mode) * _bridge(v, y[xo], p, mode)
    k = p[_BLKIND]
    if k == 1.0:
        i += v / p[_BLPAR]
    elif k == 2.0:
        i += p[_BLPAR] * min(max(v / BLEEDER_KNEE_V, -1.0), 1.0)
    if p[_RD] > 0.0:
        i += (v - y[xo + 1]) / p[_RD]
    return i


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_rhs(v, y, xo, p, mode, level, F):
    vbus = y[xo]
    i_conv = 0.0
    if mode & RUNNING:
        i_conv = p[_PCONV] * level / max(vbus, 1.0)
    F[xo] = _bridge(v, vbus, p, mode) - i_conv
    if p[_RD] > 0.0:
        F[xo + 1] = (v - y[xo + 1]) / p[_RD]


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mass(p, M, xo):
    M[xo] = p[_CB]
    if p[_RD] > 0.0:
        M[xo + 1] = p[_CIN]


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_guards(v, y, xo, p, mode, g, k):
    if mode & CONDUCTING:
        g[k] = _polarity(mode) * v - p[_VDD] - y[xo]
    else:
        g[k] = abs(v) - p[_VDD] - y[xo]
    if mode & RUNNING:
        g[k + 1] = y[xo] - p[_VSTOP]
    else:
        g[k + 1] = y[xo] - p[_VSTART]
    return k + 2


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mode(v, y, xo, p, mode):
    vbus = y[xo]
    if mode & RUNNING:
        m = RUNNING if vbus > p[_VSTOP] else 0
    else:
        m = RUNNING if vbus >= p[_VSTART] else 0
    if mode & CONDUCTING:
        if _polarity(mode) * v - p[_VDD] - vbus > 0.0:
            m |= mode & (CONDUCTING | NEGATIVE)
    elif abs(v) - p[_VDD] - vbus > 0.0:
        m |= CONDUCTING if v > 0.0 else CONDUCTING | NEGATIVE
    return m


@numba.njit(cache=True, _nrt=False, inline="always")
def sense(v, p):
    """1 while the phase detector sees voltage, else 0."""
    return 1.0 if abs(v) > p[_VSENSE] else 0.0


@numba.njit(cache=True, _nrt=False, inline="always")
def decoded_level(conduction_share, level, p):
    """New level after one half-cycle in which the detector saw ``conduction_share``."""
    if p[_DIMM] == 0.0:
        return 1.0
    x = (conduction_share - DECODE_LOW) / (DECODE_HIGH - DECODE_LOW)
    target = max(p[_MINL], min(1.0, x))
    return level + FILTER_GAIN * (target - level)


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_light_state(v, y, xo, p, mode, level):
    return level if (mode & RUNNING) else 0.0
