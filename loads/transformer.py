"""Iron-core (magnetic) low-voltage transformer feeding low-voltage filament lamps.

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind


@dataclass(frozen=True, slots=True, kw_only=True)
class MagneticTransformer(LoadGroup):
    """rated_va [VA]; secondary_voltage_v [V]; lamp_power_w: lamps on the secondary [W];
    winding_resistance_pct: copper loss as % of rated VA (both windings, referred) [%];
    leakage_reactance_pct: short-circuit reactance as % of the rated impedance [%];
    magnetising_current_pct: no-load current as % of rated current at rated voltage [%];
    core_loss_pct: iron loss at rated voltage as % of rated VA [%];
    saturation_flux_ratio: knee of the magnetising curve as a multiple of the rated peak
    flux [1]; saturated_inductance_ratio: slope beyond the knee as a fraction of the
    unsaturated magnetising inductance [1]."""

    rated_va: float = 60.0
    secondary_voltage_v: float = 12.0
    lamp_power_w: float = 50.0
    winding_resistance_pct: float = 6.0       # common practice, no source (small toroids regulate 5–10 %)
    leakage_reactance_pct: float = 3.0        # common practice, no source
    magnetising_current_pct: float = 8.0      # common practice, no source
    core_loss_pct: float = 3.0                # common practice, no source
    saturation_flux_ratio: float = 1.25       # engineering choice: knee 25 % above rated peak flux
    saturated_inductance_ratio: float = 0.02  # engineering choice: air-core-like slope beyond the knee

    kind = LoadKind.MAGNETIC_TRANSFORMER

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(self.rated_va > 0, "rated_va", self.rated_va, "VA must be positive")
        require(0 < self.secondary_voltage_v < self.rated_voltage_v, "secondary_voltage_v", self.secondary_voltage_v,
                "V must be positive and below the primary voltage")
        require(0 <= self.lamp_power_w <= 2 * self.rated_va, "lamp_power_w", self.lamp_power_w, "W must be 0–2× the rated VA")
        for name in ("winding_resistance_pct", "leakage_reactance_pct", "magnetising_current_pct", "core_loss_pct"):
            require(0 < getattr(self, name) < 50, name, getattr(self, name), "% must be between 0 and 50")
        require(1 < self.saturation_flux_ratio < 3, "saturation_flux_ratio", self.saturation_flux_ratio, "must be 1–3")
        require(0 < self.saturated_inductance_ratio < 1, "saturated_inductance_ratio", self.saturated_inductance_ratio,
                "must be between 0 and 1")


# ---------------------------------------------------------------------------
# Kernel model (one unit), all quantities referred to the primary (turns ratio n):
#
#   L_σ · di_1/dt = v − R_w·i_1 − v_m                      (winding resistance, leakage)
#   dλ/dt = v_m                                             (magnetising flux linkage)
#   i_1 = i_m(λ) + v_m/R_c + v_m/(n²·R_lamp(T))             → v_m explicit
#   i_m(λ) = λ/L_m for |λ| ≤ λ_k, beyond the knee the slope is 1/L_sat (piecewise linear)
#   lamp:  m·c·dT/dt = (v_m/n)²/R_lamp(T) − radiation        (loads.filament)
#
# Base values (rated primary voltage V_1, rated S, supply ω): Z_b = V_1²/S,
# R_w = r%·Z_b, L_σ = x%·Z_b/ω, L_m = V_1/(ω·i%·S/V_1), R_c = V_1²/(p_core%·S),
# λ_k = k·√2·V_1/ω, L_sat = s·L_m.  A DC component in v makes λ drift into the knee,
# and the magnetising current grows in peaks.
# ---------------------------------------------------------------------------
import math  # noqa: E402

import numba  # noqa: E402
import numpy as np  # noqa: E402

from loads import filament as _fil  # noqa: E402
from loads.filament import Filament  # noqa: E402

# LV halogen capsules run hotter than general-service lamps: halogen 2900–3200 K (from memory).
LAMP_OPERATING_TEMPERATURE_K = 3000.0

_RW, _LS, _LM, _LSAT, _LK, _RC, _N2 = range(7)
N_HEAD = 7
N_STATES = 3
SATURATED = 1


def secondary_lamp(t: "MagneticTransformer") -> Filament:
    return Filament(name=t.name + " lamps", count=1, rated_power_w=max(t.lamp_power_w, 0.1),
                    rated_voltage_v=max(t.secondary_voltage_v, 10.0),  # the lamp model's floor; referred below
                    operating_temperature_k=LAMP_OPERATING_TEMPERATURE_K)


def pack(t: "MagneticTransformer", frequency_hz: float) -> np.ndarray:
    w = 2 * math.pi * frequency_hz
    v1 = t.rated_voltage_v
    z_b = v1 * v1 / t.rated_va
    l_m = v1 / (w * t.magnetising_current_pct / 100 * t.rated_va / v1)
    lamp = secondary_lamp(t)
    # the lamp model is rated at lamp.rated_voltage_v; refer it with that voltage so that
    # rated secondary voltage gives rated lamp power
    n2 = (v1 / lamp.rated_voltage_v) ** 2
    head = [t.winding_resistance_pct / 100 * z_b, t.leakage_reactance_pct / 100 * z_b / w, l_m,
            t.saturated_inductance_ratio * l_m, t.saturation_flux_ratio * math.sqrt(2) * v1 / w,
            v1 * v1 / (t.core_loss_pct / 100 * t.rated_va), n2]
    return np.concatenate([np.array(head), _fil.pack(lamp)])


@numba.njit(cache=True, _nrt=False, inline="always")
def magnetising_current_a(lam, p):
    lk = p[_LK]
    if abs(lam) <= lk:
        return lam / p[_LM]
    return math.copysign(lk / p[_LM] + (abs(lam) - lk) / p[_LSAT], lam)


@numba.njit(cache=True, _nrt=False, inline="always")
def _vm(y, xo, p):
    r_lamp = p[_N2] * _fil.resistance_ohm(y[xo + 2], p[N_HEAD:])
    return (y[xo] - magnetising_current_a(y[xo + 1], p)) / (1.0 / p[_RC] + 1.0 / r_lamp)


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_current(v, y, xo, p, mode):
    return y[xo]


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_rhs(v, y, xo, p, mode, level, F):
    vm = _vm(y, xo, p)
    F[xo] = v - p[_RW] * y[xo] - vm
    F[xo + 1] = vm
    t = y[xo + 2]
    pl = vm * vm / (p[_N2] * _fil.resistance_ohm(t, p[N_HEAD:]))
    F[xo + 2] = _fil.temperature_rate_k_s(t, pl, p[N_HEAD:])


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mass(p, M, xo):
    M[xo] = p[_LS]
    M[xo + 1] = 1.0
    M[xo + 2] = 1.0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_guards(v, y, xo, p, mode, g, k):
    g[k] = abs(y[xo + 1]) - p[_LK]
    return k + 1


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_mode(v, y, xo, p, mode):
    return SATURATED if abs(y[xo + 1]) > p[_LK] else 0


@numba.njit(cache=True, _nrt=False, inline="always")
def unit_light_state(v, y, xo, p, mode, level):
    return y[xo + 2]
