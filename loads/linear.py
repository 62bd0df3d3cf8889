"""Linear load: series R–L with an optional capacitor across the pair.

    L·di_L/dt = v − R·i_L,      i = i_L + C·dv/dt

With ``series_capacitance_f`` > 0 the capacitor is in series with R (and L) instead:

    C_s·dv_C/dt = i_L

which is the load-correction (bypass) device: a capacitor with a series resistor,
fitted across the lamps so that the dimmer always sees enough current.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind


@dataclass(frozen=True, slots=True, kw_only=True)
class Linear(LoadGroup):
    """resistance_ohm: R [Ω]; inductance_h: L in series with R [H];
    parallel_capacitance_f: C across R–L [F]; series_capacitance_f: C in series with
    R (and L) – an R–C bypass device [F]."""

    resistance_ohm: float = 100.0
    inductance_h: float = 0.0
    parallel_capacitance_f: float = 0.0
    series_capacitance_f: float = 0.0

    kind = LoadKind.LINEAR

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(self.resistance_ohm > 0, "resistance_ohm", self.resistance_ohm, "Ω must be positive")
        require(self.inductance_h >= 0, "inductance_h", self.inductance_h, "H must not be negative")
        require(self.parallel_capacitance_f >= 0, "parallel_capacitance_f", self.parallel_capacitance_f, "F must not be negative")
        require(self.series_capacitance_f >= 0, "series_capacitance_f", self.series_capacitance_f, "F must not be negative")


# ---------------------------------------------------------------------------
# Kernel model (one unit).  States: i_L (when L > 0), v_C (when a series capacitor is
# fitted).  With L = 0 the current is algebraic: i = (v − v_C)/R.
#   L·di_L/dt = v − R·i_L − v_C,     C_s·dv_C/dt = i
# Light state: instantaneous power as a fraction of rated power.
# ---------------------------------------------------------------------------
import numba  # noqa: E402
import numpy as np  # noqa: E402

_R, _L, _CS, _PR = range(4)
N_PARAMS = 4


def pack(d: Linear) -> np.ndarray:
    return np.array([d.resistance_ohm, d.inductance_h, d.series_capacitance_f, d.rated_power_w])


def n_states(d: Linear) -> int:
    return int(d.inductance_h > 0) + int(d.series_capacitance_f > 0)


@numba.njit(cache=True, _nrt=False, inline="always")
def _vc(y, xo, p):
    if p[_CS] > 0.0:
        return y[xo + 1] if p[_L] > 0.0 else y[xo]
    return 0.0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_current(v, y, xo, p, mode):
    if p[_L] > 0.0:
        return y[xo]
    return (v - _vc(y, xo, p)) / p[_R]


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_rhs(v, y, xo, p, mode, level, F):
    i = unit_current(v, y, xo, p, mode)
    k = xo
    if p[_L] > 0.0:
        F[k] = v - p[_R] * i - _vc(y, xo, p)
        k += 1
    if p[_CS] > 0.0:
        F[k] = i


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mass(p, M, xo):
    k = xo
    if p[_L] > 0.0:
        M[k] = p[_L]
        k += 1
    if p[_CS] > 0.0:
        M[k] = p[_CS]


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_guards(v, y, xo, p, mode, g, k):
    return k


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mode(v, y, xo, p, mode):
    return 0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_light_state(v, y, xo, p, mode, level):
    i = unit_current(v, y, xo, p, mode)
    return i * i * p[_R] / p[_PR]
