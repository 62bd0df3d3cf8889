"""Electronic (self-oscillating) low-voltage transformer.

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind


@dataclass(frozen=True, slots=True, kw_only=True)
class ElectronicTransformer(LoadGroup):
    """rated_va [VA]; min_load_w: below this lamp load it does not oscillate [W];
    lamp_power_w: lamps on the output [W]; start_voltage_v: instantaneous mains voltage
    below which it does not run (dead zone near each zero) [V];
    input_capacitance_f: filter capacitor across the terminals [F]."""

    rated_va: float = 60.0
    min_load_w: float = 10.0
    lamp_power_w: float = 50.0
    start_voltage_v: float = 40.0             # common practice, no source
    input_capacitance_f: float = 10e-9        # common practice, no source

    kind = LoadKind.ELECTRONIC_TRANSFORMER

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(self.rated_va > 0, "rated_va", self.rated_va, "VA must be positive")
        require(0 <= self.min_load_w < self.rated_va, "min_load_w", self.min_load_w, "W must be below the rated VA")
        require(0 <= self.lamp_power_w <= 1.5 * self.rated_va, "lamp_power_w", self.lamp_power_w, "W must be 0–1.5× the rated VA")
        require(0 <= self.start_voltage_v < self.rated_voltage_v, "start_voltage_v", self.start_voltage_v,
                "V must be below the rated voltage")
        require(self.input_capacitance_f >= 0, "input_capacitance_f", self.input_capacitance_f, "F must not be negative")


# ---------------------------------------------------------------------------
# Kernel model (one unit).  While |v| > V_start (and the lamp load is at least the
# minimum load) the converter passes the mains power to its lamps, so it looks like a
# resistance R_eq = V_rated² / P_lamp; below V_start (near each zero) it draws nothing.
# With lamps below the minimum load it never starts.  The input capacitor is part of
# the node capacitance.  Light state: instantaneous lamp power / rated lamp power.
# ---------------------------------------------------------------------------
import numba  # noqa: E402
import numpy as np  # noqa: E402

_VSTART, _REQ, _ACTIVE, _VR = range(4)
N_PARAMS = 4
N_STATES = 0
RUNNING = 1


def pack(d: ElectronicTransformer) -> np.ndarray:
    active = 1.0 if d.lamp_power_w >= d.min_load_w and d.lamp_power_w > 0 else 0.0
    r_eq = d.rated_voltage_v ** 2 / max(d.lamp_power_w, 1e-3)
    return np.array([d.start_voltage_v, r_eq, active, d.rated_voltage_v])


@numba.njit(cache=True, _nrt=False)
def unit_current(v, y, xo, p, mode):
    if mode & RUNNING:
        return v / p[_REQ]
    return 0.0


@numba.njit(cache=True, _nrt=False)
def unit_rhs(v, y, xo, p, mode, level, F):
    pass


@numba.njit(cache=True, _nrt=False)
def unit_mass(p, M, xo):
    pass


@numba.njit(cache=True, _nrt=False)
def unit_guards(v, y, xo, p, mode, g, k):
    g[k] = abs(v) - p[_VSTART]
    return k + 1


@numba.njit(cache=True, _nrt=False)
def unit_mode(v, y, xo, p, mode):
    if p[_ACTIVE] > 0.0 and abs(v) > p[_VSTART]:
        return RUNNING
    return 0


@numba.njit(cache=True, _nrt=False)
def unit_light_state(v, y, xo, p, mode, level):
    if mode & RUNNING:
        return v * v / (p[_VR] * p[_VR])
    return 0.0
