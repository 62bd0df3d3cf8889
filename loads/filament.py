"""Filament lamp (mains incandescent or halogen): electrical and thermal model.

The parameters (``Filament``) first; the equations, the kernel functions the simulator
calls, the steady state and the light model follow below.
"""
from __future__ import annotations

import math
import warnings
from dataclasses import dataclass
from functools import lru_cache

import numba
import numpy as np

from loads import tungsten
from loads.errors import InputError, ModelRangeWarning, require
from loads.load import LoadGroup, LoadKind
from loads.tungsten import emissivity, resistivity_ohm_m, specific_heat_j_kg_k

# General-service filaments run at about 2700–2900 K (from memory).
DEFAULT_OPERATING_TEMPERATURE_K = 2800.0


@dataclass(frozen=True, slots=True, kw_only=True)
class Filament(LoadGroup):
    """operating_temperature_k: filament temperature at rated voltage [K];
    ambient_temperature_k: surroundings and cold filament [K]."""

    operating_temperature_k: float = DEFAULT_OPERATING_TEMPERATURE_K
    ambient_temperature_k: float = 300.0

    kind = LoadKind.FILAMENT

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(1500 <= self.operating_temperature_k <= 3400, "operating_temperature_k", self.operating_temperature_k,
                "K is outside 1500–3400 K")
        require(250 <= self.ambient_temperature_k <= 400, "ambient_temperature_k", self.ambient_temperature_k,
                "K is outside 250–400 K")


# =====================================================================================
# Physics: straight-wire equivalent filament, heat balance, light from temperature.
# =====================================================================================
#
# Model (sources by key, see loads.sources; material data in loads.tungsten):
#
#   The filament is a straight tungsten wire of length l and diameter d (the coil is
#   "unwound").  Cross-section S = pi d²/4, surface A = pi d l, mass m = rho_W·l·S.
#     resistance      R(T) = rho(T)·l/S                          (TOLIAS_2017 rho)
#     heat balance    m·c(T)·dT/dt = p_elec − eps(T)·sigma·A·(T⁴ − T_amb⁴)
#                     (TOLIAS_2017 c and eps; sigma from CODATA)
#   Geometry is solved in closed form at the rated point (V_r, P_r, T_op):
#     R_hot = V_r²/P_r,  A = P_r / (eps(T_op)·sigma·(T_op⁴ − T_amb⁴)),
#     d³ = 4·rho(T_op)·A / (pi²·R_hot),  l = A/(pi·d).
#
#   Radiation is the only loss.  Conduction along the leads and supports, and
#   conduction/convection through the fill gas of gas-filled and halogen lamps, are
#   neglected.  What that does: all of the rated power is put down to radiation, so the
#   solved radiating area, and with it the mass, is somewhat too large (warm-up a little
#   slow); near rated voltage the extra losses, which grow much more slowly with T than
#   T⁴, would lower the power exponent d ln P/d ln V slightly; under deep dimming they
#   take a larger share, so a real filament runs cooler and gives less light than the
#   model at low settings.  The coil's turns also partly face each other, so a real
#   coiled wire has more surface (and mass) than the straight-wire equivalent that
#   radiates the same power; that too makes real warm-up slower than the model's.  The
#   cold/hot resistance ratio depends on rho(T) alone and is not affected by either.
#
#   Light: luminous flux ∝ eps(T)·A·∫ B(lambda, T)·V(lambda) dlambda, with Planck's law
#   B (CODATA constants) and the CIE photopic V(lambda) (CIE_PHOTOPIC_V, 10 nm values
#   typed from memory, unverified), summed at 10 nm as CIE practice does.  The total
#   emissivity is used as a grey-body factor: tungsten's spectral emissivity is higher
#   in the visible than its total emissivity and falls with wavelength, so absolute
#   efficacy is not modelled; only light relative to the rated point is given.

# CODATA: h, c and k are exact by the definition of the SI (2019); sigma follows from
# them (2 pi^5 k^4 / (15 h^3 c^2)).  Written here rather than read from scipy.constants,
# whose import costs every command ~60 ms; tests/loads/test_filament.py checks them
# against scipy.constants.
PLANCK_J_S = 6.62607015e-34
LIGHT_SPEED_M_S = 299792458.0
BOLTZMANN_J_K = 1.380649e-23
STEFAN_BOLTZMANN_W_M2_K4 = 2.0 * math.pi ** 5 * BOLTZMANN_J_K ** 4 / (15.0 * PLANCK_J_S ** 3 * LIGHT_SPEED_M_S ** 2)


@dataclass(frozen=True, slots=True, kw_only=True)
class FilamentGeometry:
    """Straight-wire equivalent of one lamp's filament.

    length_m [m]; diameter_m [m]; mass_kg [kg]; area_m2: radiating surface [m²];
    hot_resistance_ohm: at the operating temperature, = V_rated²/P_rated [Ohm];
    cold_resistance_ohm: at the ambient temperature [Ohm]."""

    length_m: float
    diameter_m: float
    mass_kg: float
    area_m2: float
    hot_resistance_ohm: float
    cold_resistance_ohm: float

    @property
    def cross_section_m2(self) -> float:
        return math.pi * self.diameter_m ** 2 / 4.0

    @property
    def cold_to_hot_ratio(self) -> float:
        """R_hot / R_cold [1] (the ideal switch-on current multiple)."""
        return self.hot_resistance_ohm / self.cold_resistance_ohm


@lru_cache(maxsize=256)
def geometry(lamp: Filament) -> FilamentGeometry:
    """Solve the straight-wire filament from the lamp's rated power [W], rated voltage
    [V] and operating temperature [K] (closed form; see the module notes)."""
    t_op = lamp.operating_temperature_k
    t_amb = lamp.ambient_temperature_k
    hot_r = lamp.rated_voltage_v ** 2 / lamp.rated_power_w
    area = lamp.rated_power_w / (emissivity(t_op) * STEFAN_BOLTZMANN_W_M2_K4 * (t_op ** 4 - t_amb ** 4))
    rho_op = resistivity_ohm_m(t_op)
    diameter = (4.0 * rho_op * area / (math.pi ** 2 * hot_r)) ** (1.0 / 3.0)
    length = area / (math.pi * diameter)
    cross = math.pi * diameter ** 2 / 4.0
    cold_r = tungsten.checked_resistivity_ohm_m(t_amb) * length / cross
    return FilamentGeometry(length_m=length, diameter_m=diameter,
                            mass_kg=tungsten.DENSITY_KG_M3 * length * cross, area_m2=area,
                            hot_resistance_ohm=hot_r, cold_resistance_ohm=cold_r)


# --- parameter vector for the simulator kernel -----------------------------------
P_LENGTH_M = 0
P_CROSS_SECTION_M2 = 1
P_AREA_M2 = 2
P_MASS_KG = 3
P_AMBIENT_K = 4
P_OPERATING_K = 5
P_DIAMETER_M = 6
P_HOT_RESISTANCE_OHM = 7
P_COLD_RESISTANCE_OHM = 8
PACK_SIZE = 9


def pack(lamp: Filament) -> np.ndarray:
    """float64 parameter vector of one lamp for the njit kernel functions; index with
    the ``P_*`` constants of this module."""
    g = geometry(lamp)
    p = np.empty(PACK_SIZE, dtype=np.float64)
    p[P_LENGTH_M] = g.length_m
    p[P_CROSS_SECTION_M2] = g.cross_section_m2
    p[P_AREA_M2] = g.area_m2
    p[P_MASS_KG] = g.mass_kg
    p[P_AMBIENT_K] = lamp.ambient_temperature_k
    p[P_OPERATING_K] = lamp.operating_temperature_k
    p[P_DIAMETER_M] = g.diameter_m
    p[P_HOT_RESISTANCE_OHM] = g.hot_resistance_ohm
    p[P_COLD_RESISTANCE_OHM] = g.cold_resistance_ohm
    return p


@numba.njit(cache=True, _nrt=False, inline="always")
def resistance_ohm(t_k, p):
    """Resistance of one filament at temperature t_k [K]; p from ``pack`` -> [Ohm]."""
    return resistivity_ohm_m(t_k) * p[P_LENGTH_M] / p[P_CROSS_SECTION_M2]


@numba.njit(cache=True, _nrt=False, inline="always")
def radiated_power_w(t_k, p):
    """Net power radiated by one filament at t_k [K] to surroundings at ambient -> [W]."""
    t_amb = p[P_AMBIENT_K]
    return emissivity(t_k) * STEFAN_BOLTZMANN_W_M2_K4 * p[P_AREA_M2] * (t_k ** 4 - t_amb ** 4)


@numba.njit(cache=True, _nrt=False, inline="always")
def temperature_rate_k_s(t_k, power_w, p):
    """dT/dt of one filament at t_k [K] taking electrical power power_w [W] -> [K/s]."""
    return (power_w - radiated_power_w(t_k, p)) / (p[P_MASS_KG] * specific_heat_j_kg_k(t_k))


def initial_temperature_k(lamp: Filament) -> float:
    """Temperature of a filament that has been off for a long time [K]."""
    return lamp.ambient_temperature_k


# --- steady state on a sine ------------------------------------------------------

def steady_temperature_k(lamp: Filament, v_rms: float) -> float:
    """Filament temperature in steady state on a sine of v_rms [V] -> [K].

    Solves v_rms²/R(T) = eps(T)·sigma·A·(T⁴ − T_amb⁴) with brentq.  The temperature
    ripple at twice mains frequency is neglected (so the mean of v²/R(T(t)) is taken as
    v_rms²/R(T_mean)); for mains-frequency filaments that ripple is small.
    Raises InputError if v_rms is negative or would melt the filament."""
    if not (v_rms >= 0.0 and math.isfinite(v_rms)):
        raise InputError(f"{v_rms!r} V must be a finite voltage of 0 V or more", key="v_rms")
    t_amb = lamp.ambient_temperature_k
    if v_rms == 0.0:
        return t_amb
    p = pack(lamp)

    def balance(t_k: float) -> float:
        return v_rms ** 2 / resistance_ohm(t_k, p) - radiated_power_w(t_k, p)

    top = tungsten.MELTING_POINT_K
    if balance(top) > 0.0:
        raise InputError(f"{v_rms:g} V would drive the filament past tungsten's melting point "
                         f"({top:.0f} K)", key="v_rms")
    # xtol: engineering choice, far below any physical significance (nK).
    return bracketed_root(balance, t_amb, top, xtol_k=1e-9)


def bracketed_root(f, lo: float, hi: float, *, xtol_k: float) -> float:
    """The temperature in [lo, hi] [K] where ``f`` changes sign, to within ``xtol_k``
    [K], by bisection (f(lo) and f(hi) of opposite signs, or one of them zero).

    Plain bisection, not scipy's ``brentq``: the heat balances solved here are monotone
    and cheap, ~42 halvings reach a nanokelvin on 300–3700 K, and importing
    ``scipy.optimize`` would cost a ``dimfit check`` about 0.1–0.2 s."""
    f_lo = f(lo)
    if f_lo == 0.0:
        return float(lo)
    if f(hi) == 0.0:
        return float(hi)
    while hi - lo > xtol_k:
        mid = 0.5 * (lo + hi)
        if mid in (lo, hi):        # the floating-point grid is finer than xtol_k no more
            break
        f_mid = f(mid)
        if f_mid == 0.0:
            return float(mid)
        if (f_mid > 0.0) == (f_lo > 0.0):
            lo, f_lo = mid, f_mid
        else:
            hi = mid
    return float(0.5 * (lo + hi))


def steady_power_w(lamp: Filament, v_rms: float) -> float:
    """Electrical power of one lamp in steady state on a sine of v_rms [V] -> [W]."""
    t = steady_temperature_k(lamp, v_rms)
    return v_rms ** 2 / resistance_ohm(t, pack(lamp))


# --- light from temperature ------------------------------------------------------

# CIE_PHOTOPIC_V: CIE 1924 photopic V(lambda), 380–780 nm at 10 nm.
# Values typed from memory, unverified against the printed table.
PHOTOPIC_WAVELENGTH_M = np.arange(380, 781, 10, dtype=np.float64) * 1e-9
PHOTOPIC_V = np.array([
    0.000039, 0.000120, 0.000396, 0.001210, 0.004000, 0.011600, 0.023000, 0.038000,  # 380–450
    0.060000, 0.090980, 0.139020, 0.208020, 0.323000, 0.503000, 0.710000, 0.862000,  # 460–530
    0.954000, 0.994950, 0.995000, 0.952000, 0.870000, 0.757000, 0.631000, 0.503000,  # 540–610
    0.381000, 0.265000, 0.175000, 0.107000, 0.061000, 0.032000, 0.017000, 0.008210,  # 620–690
    0.004102, 0.002091, 0.001047, 0.000520, 0.000249, 0.000120, 0.000060, 0.000030,  # 700–770
    0.000015,                                                                        # 780
], dtype=np.float64)


def planck_spectral_radiance_w_m3_sr(wavelength_m, t_k):
    """Planck's law B(lambda, T) [W/(m²·sr·m)] for wavelength_m [m] and t_k [K] (arrays
    broadcast).  Constants: CODATA (exact SI values)."""
    h, c, k = PLANCK_J_S, LIGHT_SPEED_M_S, BOLTZMANN_J_K
    lam = np.asarray(wavelength_m, dtype=np.float64)
    t = np.asarray(t_k, dtype=np.float64)
    return 2.0 * h * c ** 2 / lam ** 5 / np.expm1(h * c / (lam * k * t))


def visible_radiance(t_k):
    """∫ B(lambda, T)·V(lambda) dlambda over 380–780 nm by 10 nm summation (CIE
    practice) [W/(m²·sr)], for a scalar or array t_k [K]."""
    t = np.asarray(t_k, dtype=np.float64)
    b = planck_spectral_radiance_w_m3_sr(PHOTOPIC_WAVELENGTH_M, t[..., None])
    return (b * PHOTOPIC_V).sum(axis=-1) * 10e-9


# Table of ln(eps(T)·∫B·V) in T.  Engineering choice: 1 K steps make linear
# interpolation of the logarithm exact to far better than 1e-5 relative.  Below 300 K
# the emissivity fit is extrapolated; the light there is below 1e-25 of any lamp's rated
# light, so the error cannot matter.  Above the melting point there is no filament.
LIGHT_TABLE_MIN_K = 200.0
LIGHT_TABLE_MAX_K = tungsten.MELTING_POINT_K
_LIGHT_T_K = np.arange(LIGHT_TABLE_MIN_K, LIGHT_TABLE_MAX_K + 0.5, 1.0)
# (emissivity's own Python body, applied to the whole array: one numpy expression
# instead of ~3500 calls into the compiled function at import)
_LIGHT_LN = np.log(emissivity.py_func(_LIGHT_T_K) * visible_radiance(_LIGHT_T_K))


def _ln_light(t_k: np.ndarray) -> np.ndarray:
    return np.interp(t_k, _LIGHT_T_K, _LIGHT_LN)


def light_fraction(t_k, lamp_or_p):
    """Luminous output at filament temperature t_k [K] (scalar or array) relative to the
    output at the lamp's rated operating temperature [1].

    lamp_or_p: a ``Filament`` or its ``pack`` vector.  Below 200 K the light is 0; above
    the melting point a ModelRangeWarning is given and the value at the melting point
    returned."""
    t_op = (lamp_or_p.operating_temperature_k if isinstance(lamp_or_p, Filament)
            else float(lamp_or_p[P_OPERATING_K]))
    t = np.asarray(t_k, dtype=np.float64)
    if t.size and np.nanmax(t) > LIGHT_TABLE_MAX_K:
        warnings.warn(f"filament temperature {np.nanmax(t):.0f} K is above tungsten's melting "
                      f"point; light held at its value there", ModelRangeWarning, stacklevel=2)
    out = np.exp(_ln_light(t) - _ln_light(np.float64(t_op)))
    out = np.where(t < LIGHT_TABLE_MIN_K, 0.0, out)
    return float(out) if out.ndim == 0 else out
