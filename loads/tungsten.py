"""Tungsten: the material data a filament model needs, in SI.

Equations (T in K; sources by key, see ``loads.sources``):

- Electrical resistivity, TOLIAS_2017 fit to WHITE_MINGES_1997, 300–3695 K:
  rho [uOhm·cm] = −0.9680 + 1.9274e-2·T + 7.8260e-6·T² − 1.8517e-9·T³ + 2.0790e-13·T⁴,
  returned here in Ohm·m (1 uOhm·cm = 1e-8 Ohm·m).
- Total hemispherical emissivity, TOLIAS_2017 fit to MATSUMOTO_1999, 300–3695 K:
  eps = 1.85076e-2 + 1.6048e-4·(T − 300) − 1.762608e-8·(T − 300)².
- Isobaric molar heat capacity, TOLIAS_2017, 300–3080 K:
  c_p [J/(mol·K)] = 21.868372 + 8.068661e-3·T − 3.756196e-6·T² + 1.075862e-9·T³
  + 1.406637e4/T²; divided by the molar mass 183.84 g/mol to give J/(kg·K).
  Above 3080 K the fit is not used: the value at 3080 K is held. The true heat
  capacity of tungsten rises steeply towards the melting point, so the held value
  understates it (a filament above 3080 K heats and cools somewhat faster in the
  model than in life).
- Density 19250 kg/m³ (TOLIAS_2017, at 293 K), held constant: the filament's mass
  does not change with temperature, and thermal expansion of the geometry is not
  modelled.
- Melting point 3695 K (a handbook value, transcribed from a printed handbook table;
  not re-checked here).

The measured resistivity table of FORSYTHE_WORTHING_1925 (as tabulated in the CRC
Handbook) is kept as data, ``FORSYTHE_WORTHING_RESISTIVITY``, to check the fit against.

The ``@numba.njit`` scalar functions (``resistivity_ohm_m``, ``emissivity``,
``specific_heat_j_kg_k``) are what the simulator kernel calls at every step; they do
not warn. The ``checked_*`` wrappers take scalars or arrays and warn with
``ModelRangeWarning`` outside the fits' range.
"""
from __future__ import annotations

import warnings

import numba
import numpy as np

from loads.errors import ModelRangeWarning

# FORSYTHE_WORTHING_1925 as tabulated in the CRC Handbook: (T [K], rho [uOhm·cm]).
FORSYTHE_WORTHING_RESISTIVITY = np.array([
    (300, 5.65), (400, 8.06), (500, 10.56), (600, 13.23), (700, 16.09), (800, 19.00),
    (900, 21.94), (1000, 24.93), (1100, 27.94), (1200, 30.98), (1300, 34.08),
    (1400, 37.19), (1500, 40.36), (1600, 43.55), (1700, 46.78), (1800, 50.05),
    (1900, 53.35), (2000, 56.67), (2100, 60.06), (2200, 63.48), (2300, 66.91),
    (2400, 70.39), (2500, 73.91), (2600, 77.49), (2700, 81.04), (2800, 84.70),
    (2900, 88.33), (3000, 92.04), (3100, 95.76), (3200, 99.54), (3300, 103.3),
    (3400, 107.2), (3500, 111.1), (3600, 115.0),
], dtype=np.float64)

UOHM_CM_TO_OHM_M = 1e-8                # definition of the units
MOLAR_MASS_KG_MOL = 183.84e-3          # TOLIAS_2017 (standard atomic weight of W)
DENSITY_KG_M3 = 19250.0                # TOLIAS_2017, at 293 K
MELTING_POINT_K = 3695.0               # handbook value (transcribed from a printed table)
FIT_MIN_K = 300.0                      # TOLIAS_2017: lower end of the solid-phase fits
HEAT_CAPACITY_FIT_MAX_K = 3080.0       # TOLIAS_2017: upper end of the c_p fit


@numba.njit(cache=True, _nrt=False, inline="always")
def resistivity_ohm_m(t_k: float) -> float:
    """Electrical resistivity of tungsten at t_k [K] -> [Ohm·m] (TOLIAS_2017)."""
    t = t_k
    rho_uohm_cm = -0.9680 + t * (1.9274e-2 + t * (7.8260e-6 + t * (-1.8517e-9 + t * 2.0790e-13)))
    return rho_uohm_cm * UOHM_CM_TO_OHM_M


@numba.njit(cache=True, _nrt=False, inline="always")
def emissivity(t_k: float) -> float:
    """Total hemispherical emissivity of tungsten at t_k [K] -> [1] (TOLIAS_2017)."""
    x = t_k - 300.0
    return 1.85076e-2 + x * (1.6048e-4 - 1.762608e-8 * x)


@numba.njit(cache=True, _nrt=False, inline="always")
def molar_heat_capacity_j_mol_k(t_k: float) -> float:
    """Isobaric molar heat capacity at t_k [K] -> [J/(mol·K)] (TOLIAS_2017, held above
    3080 K at its 3080 K value)."""
    t = t_k if t_k < HEAT_CAPACITY_FIT_MAX_K else HEAT_CAPACITY_FIT_MAX_K
    return (21.868372 + t * (8.068661e-3 + t * (-3.756196e-6 + t * 1.075862e-9))
            + 1.406637e4 / (t * t))


@numba.njit(cache=True, _nrt=False, inline="always")
def specific_heat_j_kg_k(t_k: float) -> float:
    """Isobaric specific heat at t_k [K] -> [J/(kg·K)]: molar c_p / 183.84 g/mol
    (TOLIAS_2017; held above 3080 K at its 3080 K value)."""
    return molar_heat_capacity_j_mol_k(t_k) / MOLAR_MASS_KG_MOL


# --- Python-level wrappers: arrays welcome, warn outside the range ----------------

def _check_range(t_k: np.ndarray, low_k: float, high_k: float, what: str) -> None:
    if t_k.size and (np.nanmin(t_k) < low_k or np.nanmax(t_k) > high_k):
        warnings.warn(f"tungsten {what}: temperature {np.nanmin(t_k):.0f}–{np.nanmax(t_k):.0f} K "
                      f"is outside the fit's range {low_k:.0f}–{high_k:.0f} K", ModelRangeWarning,
                      stacklevel=3)


def _apply(func, t_k):
    t = np.asarray(t_k, dtype=np.float64)
    out = np.array([func(float(x)) for x in t.ravel()], dtype=np.float64).reshape(t.shape)
    return float(out) if out.ndim == 0 else out


def checked_resistivity_ohm_m(t_k):
    """``resistivity_ohm_m`` for a scalar or array t_k [K] -> [Ohm·m]; warns outside
    300–3695 K."""
    _check_range(np.asarray(t_k, dtype=np.float64), FIT_MIN_K, MELTING_POINT_K, "resistivity")
    return _apply(resistivity_ohm_m, t_k)


def checked_emissivity(t_k):
    """``emissivity`` for a scalar or array t_k [K] -> [1]; warns outside 300–3695 K."""
    _check_range(np.asarray(t_k, dtype=np.float64), FIT_MIN_K, MELTING_POINT_K, "emissivity")
    return _apply(emissivity, t_k)


def checked_specific_heat_j_kg_k(t_k):
    """``specific_heat_j_kg_k`` for a scalar or array t_k [K] -> [J/(kg·K)]; warns
    outside 300–3695 K, and above 3080 K, where the value at 3080 K is held."""
    _check_range(np.asarray(t_k, dtype=np.float64), FIT_MIN_K, HEAT_CAPACITY_FIT_MAX_K,
                 "specific heat (held at its 3080 K value above 3080 K)")
    return _apply(specific_heat_j_kg_k, t_k)
