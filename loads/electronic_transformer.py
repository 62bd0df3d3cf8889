"""Electronic (self-oscillating) low-voltage transformer.

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

import math
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
# Kernel model (one unit).  While |v| is above V_start (and the lamp load is at least
# the minimum load) the converter passes the mains power to its lamps, so it looks like
# a resistance R_eq = V_rated² / P_lamp; below V_start (near each zero) it draws
# nothing.  With lamps below the minimum load it never starts.  The input capacitor is
# part of the node capacitance.
#
# Start threshold: i = (v/R_eq)·σ((|v| − V_start)/w), σ the logistic function, so the
# terminal current is a smooth function of v, with no modes and no events.  A self-
# oscillating converter fed from a source that cannot carry its running current at
# V_start (an open dimmer's snubber or timing network, a trailing-edge switch ramping
# its current down, the charge left on its input after a turn-off) starts, pulls its
# input below V_start, stops, recharges and starts again, in bursts far faster than
# anything the checks judge; on average it holds its input near V_start and takes the
# current the source gives.  The steep smooth step is that average.  With a sharp step
# (start and stop at one voltage) the simulator had to resolve every such burst at the
# event tolerance: tens of thousands of events per mains cycle, and a check of a
# circuit with electronic transformers took minutes.
#
# Lamp: a 12 V halogen filament (loads.filament) heated by the power the converter
# passes, m·c·dT/dt = v·i − radiation; its light follows the filament's temperature.
# The converter is taken as lossless and its input as the fixed R_eq: the filament's
# cold-resistance inrush and the change of its resistance with dimming are not carried
# back to the mains side (the input current follows the mains voltage as before).
# ---------------------------------------------------------------------------
import numba  # noqa: E402
import numpy as np  # noqa: E402

from loads import filament as _fil  # noqa: E402
from loads import tungsten  # noqa: E402
from loads.filament import Filament  # noqa: E402
from loads.transformer import LAMP_OPERATING_TEMPERATURE_K  # noqa: E402

# Low-voltage halogen lamps on electronic transformers are 12 V (common practice, no source).
LAMP_VOLTAGE_V = 12.0
# Engineering choice: the start step's logistic width; its 10–90 % rise spans 4.4·w ≈ 1 V,
# narrow against V_start, so that the converter's start and stop points move by well
# under 1 % of V_start.
START_WIDTH_V = 0.25
# Engineering choice: the logistic's argument is held above this, where σ ≈ 1e-304
# (keeps exp() finite).
_SIGMA_ARG_MIN = -700.0

_VSTART, _REQ, _ACTIVE, _VR, _WIDTH = range(5)
N_HEAD = 5
N_STATES = 1


def lamp(d: ElectronicTransformer) -> Filament:
    """The converter's lamps as one filament of their total power at 12 V."""
    return Filament(name=d.name + " lamps", count=1, rated_power_w=max(d.lamp_power_w, 0.1),
                    rated_voltage_v=LAMP_VOLTAGE_V, operating_temperature_k=LAMP_OPERATING_TEMPERATURE_K)


def pack(d: ElectronicTransformer) -> np.ndarray:
    active = 1.0 if d.lamp_power_w >= d.min_load_w and d.lamp_power_w > 0 else 0.0
    r_eq = d.rated_voltage_v ** 2 / max(d.lamp_power_w, 1e-3)
    head = np.array([d.start_voltage_v, r_eq, active, d.rated_voltage_v, START_WIDTH_V])
    return np.concatenate([head, _fil.pack(lamp(d))])


def lamp_temperature_k(d: ElectronicTransformer, power_w: float) -> float:
    """Temperature at which the converter's lamp radiates power_w [W] in steady state
    (the heat balance of loads.filament with dT/dt = 0) -> [K]."""
    lp = lamp(d)
    p = _fil.pack(lp)
    if power_w <= 0.0:
        return lp.ambient_temperature_k
    top = tungsten.MELTING_POINT_K
    if _fil.radiated_power_w(top, p) <= power_w:
        return top
    # xtol: engineering choice, a µK, far below any physical significance
    return _fil.bracketed_root(lambda t: _fil.radiated_power_w(t, p) - power_w, lp.ambient_temperature_k, top,
                               xtol_k=1e-6)


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_current(v, y, xo, p, mode):
    if p[_ACTIVE] <= 0.0:
        return 0.0
    x = max((abs(v) - p[_VSTART]) / p[_WIDTH], _SIGMA_ARG_MIN)
    return v / p[_REQ] / (1.0 + math.exp(-x))


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_rhs(v, y, xo, p, mode, level, F):
    power = max(v * unit_current(v, y, xo, p, mode), 0.0)
    F[xo] = _fil.temperature_rate_k_s(y[xo], power, p[N_HEAD:])


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mass(p, M, xo):
    M[xo] = 1.0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_guards(v, y, xo, p, mode, g, k):
    return k          # no discrete modes (see the start threshold above)


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mode(v, y, xo, p, mode):
    return 0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_light_state(v, y, xo, p, mode, level):
    return y[xo]
