"""Breaker instantaneous band as a criterion (IEC60898_1 instantaneous tripping)."""
import math

import pytest

from compat.breaker_band import PEAK_PER_RMS, TripZone, band_peak_a, holding_curve, judge_peak
from loads.breaker import Breaker, Curve


@pytest.mark.published
@pytest.mark.parametrize("curve, no_trip, must_trip", [("B", 3, 5), ("C", 5, 10), ("D", 10, 20)])
def test_band_edges_are_iec60898_multiples(curve, no_trip, must_trip):
    # IEC 60898-1 instantaneous tripping: B 3/5, C 5/10, D 10/20 × I_n (rms test current).
    b = Breaker(curve=curve, rated_current_a=16.0)
    lo, hi = band_peak_a(b)
    # rtol 1e-12: exact arithmetic on the printed multiples
    assert lo == pytest.approx(no_trip * 16.0 * math.sqrt(2), rel=1e-12)
    assert hi == pytest.approx(must_trip * 16.0 * math.sqrt(2), rel=1e-12)


@pytest.mark.published
@pytest.mark.parametrize("curve, no_trip, must_trip", [("B", 3, 5), ("C", 5, 10), ("D", 10, 20)])
def test_zones_at_the_boundaries(curve, no_trip, must_trip):
    # IEC 60898-1: holds below the no-trip multiple, may trip inside the band, trips at
    # and above the must-trip multiple.  Peaks = √2 × rms multiples (engineering choice).
    b = Breaker(curve=curve, rated_current_a=10.0)
    k = 10.0 * PEAK_PER_RMS
    eps = 1e-6
    assert judge_peak(b, no_trip * k * (1 - eps)).zone is TripZone.HOLDS
    assert judge_peak(b, no_trip * k * (1 + eps)).zone is TripZone.MAY_TRIP
    assert judge_peak(b, must_trip * k * (1 - eps)).zone is TripZone.MAY_TRIP
    assert judge_peak(b, must_trip * k).zone is TripZone.TRIPS
    assert judge_peak(b, -must_trip * k * 2).zone is TripZone.TRIPS      # sign does not matter


@pytest.mark.analytic
def test_margin_is_fraction_of_no_trip_current():
    b = Breaker(curve="B", rated_current_a=10.0)
    lo, _ = band_peak_a(b)
    assert judge_peak(b, lo / 2).margin == pytest.approx(0.5, abs=1e-12)
    assert judge_peak(b, 1.5 * lo).margin == pytest.approx(-0.5, abs=1e-12)


@pytest.mark.analytic
def test_other_curve_uses_given_trip_current():
    b = Breaker(curve="other", rated_current_a=10.0, instantaneous_trip_a=150.0)
    k = 150.0 * PEAK_PER_RMS
    assert judge_peak(b, 0.99 * k).zone is TripZone.HOLDS
    assert judge_peak(b, 1.0 * k).zone is TripZone.TRIPS


@pytest.mark.published
def test_holding_curve_picks_the_first_that_holds():
    # B10 holds below 30·√2 A, C10 below 50·√2 A, D10 below 100·√2 A (IEC 60898-1).
    assert holding_curve(40.0, 10.0) is Curve.B
    assert holding_curve(50.0, 10.0) is Curve.C
    assert holding_curve(100.0, 10.0) is Curve.D
    assert holding_curve(150.0, 10.0) is None
