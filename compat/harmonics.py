"""Current harmonics: measurement by FFT, the closed form for a phase-cut resistive
load, and the IEC 61000-3-2 limits (IEC61000_3_2).

Class A (independent phase-control dimmers, among others) has absolute limits in A;
class C (lighting equipment above 25 W) has limits in % of the fundamental, the third
scaled by the circuit power factor λ.  The limits are defined for 220–240 V supplies
(IEC61000_3_2); elsewhere the check is not applicable.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

import numpy as np

# IEC61000_3_2, table for class A: maximum permissible harmonic current [A].
_CLASS_A_FIXED_A = {3: 2.30, 5: 1.14, 7: 0.77, 9: 0.40, 11: 0.33, 13: 0.21,
                    2: 1.08, 4: 0.43, 6: 0.30}
# IEC61000_3_2, class C: % of the fundamental (3rd is 30·λ, handled in the function).
_CLASS_C_FIXED_PCT = {2: 2.0, 5: 10.0, 7: 7.0, 9: 5.0}
MAX_ORDER = 40                      # IEC61000_3_2: harmonics up to the 40th
SUPPLY_RANGE_V = (220.0, 240.0)     # IEC61000_3_2: limits defined for 220–240 V
CLASS_C_MIN_POWER_W = 25.0          # IEC61000_3_2: class C table applies above 25 W


class HarmonicClass(StrEnum):
    A = "A"
    C = "C"


def class_a_limit_a(order: int) -> float:
    """IEC 61000-3-2 class A limit for harmonic ``order`` (2..40) [A]."""
    if not 2 <= order <= MAX_ORDER:
        raise ValueError(f"harmonic order {order} is outside 2–{MAX_ORDER}")
    if order in _CLASS_A_FIXED_A:
        return _CLASS_A_FIXED_A[order]
    if order % 2:                          # odd 15..39
        return 0.15 * 15.0 / order
    return 0.23 * 8.0 / order              # even 8..40


def class_c_limit_pct(order: int, power_factor: float) -> float:
    """IEC 61000-3-2 class C limit for harmonic ``order`` (2..40), % of the fundamental;
    power_factor: the circuit power factor λ (for the 3rd) [1].  Orders not listed
    (even above 2) have no class C limit: inf."""
    if not 2 <= order <= MAX_ORDER:
        raise ValueError(f"harmonic order {order} is outside 2–{MAX_ORDER}")
    if order == 3:
        return 30.0 * power_factor
    if order in _CLASS_C_FIXED_PCT:
        return _CLASS_C_FIXED_PCT[order]
    if order % 2 and 11 <= order <= 39:
        return 3.0
    return math.inf


def applicability(supply_voltage_v: float) -> tuple[bool, str]:
    """Whether the IEC 61000-3-2 limits apply to a supply of this rms voltage [V]."""
    lo, hi = SUPPLY_RANGE_V
    if lo <= supply_voltage_v <= hi:
        return True, f"IEC 61000-3-2 limits apply on {lo:.0f}–{hi:.0f} V supplies"
    return False, (f"IEC 61000-3-2 limits are defined for {lo:.0f}–{hi:.0f} V supplies, "
                   f"not {supply_voltage_v:.0f} V")


def applicable_class() -> tuple[HarmonicClass, str]:
    """The class a wall dimmer with its lamps is judged in, and why."""
    return HarmonicClass.A, "an independent phase-control dimmer is class A equipment (IEC 61000-3-2)"


def harmonic_rms_a(samples: np.ndarray, cycles: int) -> np.ndarray:
    """RMS of each harmonic of a waveform sampled uniformly over exactly ``cycles``
    mains periods; entry n is harmonic n (entry 0 is the mean) [same unit as samples]."""
    x = np.asarray(samples, dtype=float)
    if cycles < 1 or x.size < 4 * cycles:
        raise ValueError("need at least one whole cycle and four samples per cycle")
    spec = np.fft.rfft(x) / x.size
    orders = np.arange(0, x.size // (2 * cycles))
    amp = np.abs(spec[orders * cycles])
    out = amp * math.sqrt(2.0)             # single-sided amplitude 2|X| over √2
    out[0] = spec[0].real                  # the mean (DC) keeps its sign
    return out


def chopped_sine_harmonic_rms(order: int, firing_angle_deg: float, peak_a: float) -> float:
    """Closed-form rms of harmonic ``order`` of a phase-cut sine: a resistive load whose
    current is peak_a·sin θ for α < θ < π in each half-cycle (and the mirror image),
    from its Fourier series [derived; RASHID4, AC voltage controllers] [A].
    Even orders vanish by half-wave symmetry.  Trailing edge gives the same magnitudes."""
    if order % 2 == 0:
        return 0.0
    a = math.radians(firing_angle_deg)
    im = peak_a
    if order == 1:
        an = im * (math.cos(2 * a) - 1.0) / (2 * math.pi)
        bn = im * ((math.pi - a) + math.sin(2 * a) / 2.0) / math.pi
    else:
        n = order
        an = im / math.pi * (1.0 / (n - 1) - 1.0 / (n + 1) + math.cos((n + 1) * a) / (n + 1)
                             - math.cos((n - 1) * a) / (n - 1))
        bn = im / math.pi * (math.sin((n + 1) * a) / (n + 1) - math.sin((n - 1) * a) / (n - 1))
    return math.hypot(an, bn) / math.sqrt(2.0)


@dataclass(frozen=True, slots=True, kw_only=True)
class HarmonicJudgement:
    """worst_order: the harmonic closest to (or furthest over) its limit; value_a and
    limit_a: its rms current and limit [A] (class C: as currents from the % limit);
    ratio: value/limit [1]; per_order: {order: (value_a, limit_a)}."""

    harmonic_class: HarmonicClass
    worst_order: int
    value_a: float
    limit_a: float
    ratio: float
    per_order: dict


def judge(harmonics_a: np.ndarray, harmonic_class: HarmonicClass, power_factor: float = 1.0) -> HarmonicJudgement:
    """Judge rms harmonic currents (index = order, as from ``harmonic_rms_a``) [A]."""
    per: dict[int, tuple[float, float]] = {}
    fund = float(harmonics_a[1]) if len(harmonics_a) > 1 else 0.0
    for n in range(2, min(MAX_ORDER, len(harmonics_a) - 1) + 1):
        if harmonic_class is HarmonicClass.A:
            lim = class_a_limit_a(n)
        else:
            lim = class_c_limit_pct(n, power_factor) / 100.0 * fund
        if math.isfinite(lim):
            per[n] = (float(harmonics_a[n]), lim)
    if not per:
        raise ValueError("no harmonic orders to judge")

    def ratio(item):
        v, lim = item[1]
        return v / lim if lim > 0 else (math.inf if v > 0 else 0.0)

    worst_n, (v, lim) = max(per.items(), key=ratio)
    r = ratio((worst_n, (v, lim)))
    return HarmonicJudgement(harmonic_class=harmonic_class, worst_order=worst_n, value_a=v, limit_a=lim,
                             ratio=r, per_order=per)
