"""Will the breaker hold a switch-on surge?  Two criteria that bracket the answer.

IEC 60898-1 (IEC60898_1) fixes, for each curve, a multiple of the rated current I_n at
which the breaker must *not* trip instantaneously and a higher multiple at which it
*must* trip within 0.1 s (B: 3/5, C: 5/10, D: 10/20).  The band in ``loads.breaker``
holds the multiples.  The standard's test currents are sinusoidal at mains frequency,
lasting many half-cycles; a capacitor-charging surge lasts a fraction of a
millisecond.  No single number from the standard answers for that pulse, so the surge
is judged by two criteria:

* **Peak (the safe bound).**  A magnetic release acts on the instantaneous current; a
  test current of k·I_n rms peaks at √2·k·I_n (``PEAK_PER_RMS``).  A surge whose peak
  stays below √2 × the no-trip current can trip nothing: the breaker holds.

* **The release's response (the brief-pulse criterion).**  The release's armature must
  move against its spring before the contacts open, which takes milliseconds; a pulse
  much shorter than that acts on it by its impulse, ∫F dt ∝ ∫i² dt, not by its peak.
  The release is modelled as a first-order lag of i² with time constant τ_r
  (``RELEASE_TIME_CONSTANT_S``): x(t) = (1/τ_r)∫ i²(t′) e^{−(t−t′)/τ_r} dt′, tripping
  when x exceeds a threshold.  The thresholds are set by the standard's two test
  currents: a sinusoid of k·I_n rms drives x to a peak of
  (k·I_n)²·(1 + 1/√(1 + (4πfτ_r)²)), so that is the threshold for k = the no-trip and
  the must-trip multiple.  Of all currents with a given peak I_p and half-cycle
  ∫i²dt, the one that drives x furthest packs its I²t at full height just before the
  moment judged: a rectangular pulse of width w = I²t/I_p², which drives x to
  I_p²·(1 − e^{−w/τ_r}).  The surge is judged by that bound, as the rms test current
  that drives the release as far:
  I_eq = I_p·√((1 − e^{−w/τ_r}) / (1 + 1/√(1 + (4πfτ_r)²))), against the rms band.
  For a pulse much shorter than τ_r this is √(I²t / (τ_r·(1 + …))), its impulse; for
  a half-cycle of sine it is within a few per cent of the sine's rms.

Zones: below the peak bound → ``HOLDS``; peak in or over the band but I_eq below the
no-trip current → ``RIDES_THROUGH`` (the criteria disagree: a caution, to be
confirmed on site); I_eq inside the band → ``MAY_TRIP``; I_eq at or above the
must-trip current → ``TRIPS``.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

from loads.breaker import Breaker, Curve

# Engineering choice (see module docstring): the magnetic release responds to the
# instantaneous current; a sine of k·I_n rms peaks at √2·k·I_n.
PEAK_PER_RMS = math.sqrt(2.0)
# From memory, unverified: the magnetic release of a miniature breaker opens within a
# few milliseconds at the bottom of its band.  4 ms is an engineering choice inside that
# range; with it the counts of typical 10 W LED drivers per B10, B16 and C10 land near
# installers' figures (tests/compat/test_trade_practice.py).
RELEASE_TIME_CONSTANT_S = 4e-3


class TripZone(StrEnum):
    HOLDS = "holds"                    # peak below the no-trip peak: the breaker must hold
    RIDES_THROUGH = "rides-through"    # peak in the band, but less I²t than the no-trip current's
    MAY_TRIP = "may-trip"              # half-cycle I²t inside the band: a given breaker may trip
    TRIPS = "trips"                    # half-cycle I²t at or above the must-trip current's


@dataclass(frozen=True, slots=True, kw_only=True)
class SurgeJudgement:
    """A surge judged by both criteria.

    peak_current_a: its peak [A]; i2t_a2s: ∫i²dt over its half-cycle [A²s];
    equivalent_rms_a: the rms test current that drives the release as far [A]; duration_s: i2t/peak², the width of a
    rectangular pulse of the same peak and I²t [s]; no_trip_a / must_trip_a: the band
    as rms test currents [A]; no_trip_peak_a: √2 × no_trip_a [A]; zone; margin:
    (no_trip − I_eq)/no_trip [1] (positive: the I²t criterion says it holds)."""

    peak_current_a: float
    i2t_a2s: float
    equivalent_rms_a: float
    duration_s: float
    no_trip_a: float
    must_trip_a: float
    no_trip_peak_a: float
    zone: TripZone
    margin: float


def band_peak_a(breaker: Breaker) -> tuple[float, float]:
    """(no-trip, must-trip) instantaneous currents of ``breaker`` as peak values [A]."""
    lo, hi = breaker.band_a()
    return lo * PEAK_PER_RMS, hi * PEAK_PER_RMS


def judge_surge(breaker: Breaker, *, peak_current_a: float, i2t_a2s: float, frequency_hz: float) -> SurgeJudgement:
    """Judge a switch-on surge by its peak [A] and its half-cycle ∫i²dt [A²s] at the
    supply frequency [Hz] (see module docstring: peak bound, then the release's
    first-order response to i²)."""
    lo, hi = breaker.band_a()
    lo_peak, _ = band_peak_a(breaker)
    tau = RELEASE_TIME_CONSTANT_S
    sine_peak_factor = 1.0 + 1.0 / math.sqrt(1.0 + (4.0 * math.pi * frequency_hz * tau) ** 2)
    peak = abs(float(peak_current_a))
    i2t = max(float(i2t_a2s), 0.0)
    width_s = i2t / peak ** 2 if peak > 0 else 0.0
    i_eq = peak * math.sqrt(-math.expm1(-width_s / tau) / sine_peak_factor)
    if peak < lo_peak:
        zone = TripZone.HOLDS
    elif i_eq < lo:
        zone = TripZone.RIDES_THROUGH
    elif i_eq < hi:
        zone = TripZone.MAY_TRIP
    else:
        zone = TripZone.TRIPS
    return SurgeJudgement(peak_current_a=peak, i2t_a2s=i2t, equivalent_rms_a=i_eq,
                          duration_s=width_s, no_trip_a=lo, must_trip_a=hi,
                          no_trip_peak_a=lo_peak, zone=zone, margin=(lo - i_eq) / lo)


def holds(zone: TripZone) -> bool:
    """The breaker is expected to hold (possibly after a caution) [bool]."""
    return zone in (TripZone.HOLDS, TripZone.RIDES_THROUGH)


def holding_curve(peak_current_a: float, rated_current_a: float, *, i2t_a2s: float,
                  frequency_hz: float) -> Curve | None:
    """The first of B, C, D (most protective first) at ``rated_current_a`` [A] expected to
    hold a surge of peak ``peak_current_a`` [A] and half-cycle ``i2t_a2s`` [A²s] at
    ``frequency_hz`` [Hz] (``judge_surge``); None if even D is not.  A less sensitive
    curve must still suit the circuit's fault loop impedance (local wiring rules decide)."""
    for curve in (Curve.B, Curve.C, Curve.D):
        b = Breaker(curve=curve, rated_current_a=rated_current_a)
        if holds(judge_surge(b, peak_current_a=peak_current_a, i2t_a2s=i2t_a2s, frequency_hz=frequency_hz).zone):
            return curve
    return None
