"""Breaker instantaneous band as a criterion (IEC60898_1 instantaneous tripping)."""
import math

import pytest

from compat.breaker_band import PEAK_PER_RMS, TripZone, band_peak_a, holding_curve, judge_surge
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


def _i2t_for(breaker, peak_a, equivalent_rms_a, f_hz=50.0):
    """The half-cycle I²t that makes a surge of peak ``peak_a`` drive the release as far
    as ``equivalent_rms_a``: inverting I_eq = I_p·√((1 − e^{−w/τ})/(1 + r)), w = I²t/I_p²."""
    from compat.breaker_band import RELEASE_TIME_CONSTANT_S as tau
    factor = 1 + 1 / math.sqrt(1 + (4 * math.pi * f_hz * tau) ** 2)
    return -peak_a ** 2 * tau * math.log(1 - factor * (equivalent_rms_a / peak_a) ** 2)


@pytest.mark.published
@pytest.mark.parametrize("curve, no_trip, must_trip", [("B", 3, 5), ("C", 5, 10), ("D", 10, 20)])
def test_zones_at_the_boundaries(curve, no_trip, must_trip):
    # IEC 60898-1: holds below the no-trip multiple, may trip inside the band, trips at
    # and above the must-trip multiple (rms test currents); a peak below √2 × the no-trip
    # current holds whatever its I²t (engineering choice: the peak bound)
    b = Breaker(curve=curve, rated_current_a=10.0)
    k = 10.0 * PEAK_PER_RMS
    eps = 1e-6
    peak = 3 * must_trip * k            # well above the band, so the I²t decides
    zone = lambda i_eq: judge_surge(b, peak_current_a=peak, i2t_a2s=_i2t_for(b, peak, i_eq),  # noqa: E731
                                    frequency_hz=50.0).zone
    assert zone(no_trip * 10.0 * (1 - eps)) is TripZone.RIDES_THROUGH
    assert zone(no_trip * 10.0 * (1 + eps)) is TripZone.MAY_TRIP
    assert zone(must_trip * 10.0 * (1 - eps)) is TripZone.MAY_TRIP
    assert zone(must_trip * 10.0 * (1 + eps)) is TripZone.TRIPS
    assert judge_surge(b, peak_current_a=no_trip * k * (1 - eps), i2t_a2s=1e3, frequency_hz=50.0).zone is TripZone.HOLDS
    assert judge_surge(b, peak_current_a=-peak, i2t_a2s=_i2t_for(b, peak, 2 * must_trip * 10.0),
                       frequency_hz=50.0).zone is TripZone.TRIPS      # the sign of the peak does not matter


@pytest.mark.analytic
def test_margin_is_fraction_of_no_trip_current():
    b = Breaker(curve="B", rated_current_a=10.0)
    peak = 200.0
    for i_eq, m in ((15.0, 0.5), (45.0, -0.5)):
        j = judge_surge(b, peak_current_a=peak, i2t_a2s=_i2t_for(b, peak, i_eq), frequency_hz=50.0)
        # abs 1e-9: the closed form inverted and evaluated again
        assert j.margin == pytest.approx(m, abs=1e-9)


@pytest.mark.analytic
def test_other_curve_uses_given_trip_current():
    b = Breaker(curve="other", rated_current_a=10.0, instantaneous_trip_a=150.0)
    k = 150.0 * PEAK_PER_RMS
    assert judge_surge(b, peak_current_a=0.99 * k, i2t_a2s=1e3, frequency_hz=50.0).zone is TripZone.HOLDS
    peak = 3 * k
    assert judge_surge(b, peak_current_a=peak, i2t_a2s=_i2t_for(b, peak, 150.0 * (1 + 1e-6)),
                       frequency_hz=50.0).zone is TripZone.TRIPS


@pytest.mark.published
def test_holding_curve_picks_the_first_that_holds():
    # B10 holds below 30·√2 A, C10 below 50·√2 A, D10 below 100·√2 A (IEC 60898-1); the
    # surges are half-cycles of sine, whose I²t drives the release about as far as their rms
    def curve(peak):
        return holding_curve(peak, 10.0, i2t_a2s=(peak / math.sqrt(2)) ** 2 * 0.01, frequency_hz=50.0)
    assert curve(40.0) is Curve.B
    assert curve(50.0) is Curve.C
    assert curve(100.0) is Curve.D
    assert curve(150.0) is None


@pytest.mark.analytic
@pytest.mark.parametrize("f_hz", [50.0, 60.0])
def test_release_threshold_is_the_peak_of_the_lagged_square_of_a_sine(f_hz):
    # closed form against scipy: x' = (i² − x)/τ driven by a sine of I rms settles to a
    # ripple whose peak is I²·(1 + 1/√(1 + (4πfτ)²)); the judgement's equivalent current
    # of a sine at exactly the no-trip current is therefore that current
    from scipy.integrate import solve_ivp

    from compat.breaker_band import RELEASE_TIME_CONSTANT_S as tau
    i_rms, w = 30.0, 2 * math.pi * f_hz
    sol = solve_ivp(lambda t, x: [(2 * i_rms ** 2 * math.sin(w * t) ** 2 - x[0]) / tau], (0, 20 * tau + 0.2),
                    [i_rms ** 2], max_step=1e-5, rtol=1e-10, atol=1e-9)
    tail = sol.y[0][sol.t > 20 * tau]
    closed = i_rms ** 2 * (1 + 1 / math.sqrt(1 + (2 * w * tau) ** 2))
    # rtol 1e-4: a sampled maximum of a smooth ripple at max_step 10 µs
    assert tail.max() == pytest.approx(closed, rel=1e-4)


@pytest.mark.analytic
@pytest.mark.parametrize("f_hz", [50.0, 60.0])
def test_a_half_cycle_of_sine_is_judged_near_its_rms(f_hz):
    # the rectangular-pulse bound applied to one half-cycle of a sine of I rms (peak
    # √2·I, I²t = I²·T/2) gives an equivalent current within a few per cent of I
    b = Breaker(curve="B", rated_current_a=10.0)
    for i_rms in (20.0, 35.0, 60.0):
        j = judge_surge(b, peak_current_a=math.sqrt(2) * i_rms, i2t_a2s=i_rms ** 2 * 0.5 / f_hz, frequency_hz=f_hz)
        assert 0.98 * i_rms <= j.equivalent_rms_a <= 1.05 * i_rms


@pytest.mark.analytic
def test_short_pulse_is_judged_by_its_i2t():
    # a rectangular pulse of height I and width w ≪ τ drives the lag to I²·w/τ (the
    # limit of I²(1 − e^{−w/τ})); pulses of equal I²t are judged alike whatever their
    # peak (rel 2e-2: 1 − e^{−w/τ} departs from w/τ by w/2τ, about 1 % at 100 µs)
    b = Breaker(curve="B", rated_current_a=10.0)
    a = judge_surge(b, peak_current_a=100.0, i2t_a2s=1.0, frequency_hz=50.0)
    c = judge_surge(b, peak_current_a=300.0, i2t_a2s=1.0, frequency_hz=50.0)
    assert a.equivalent_rms_a == pytest.approx(c.equivalent_rms_a, rel=2e-2)
    assert a.zone is c.zone is TripZone.RIDES_THROUGH
    assert a.duration_s == pytest.approx(1e-4, rel=1e-12)          # I²t / peak²
    # below the peak bound it holds whatever the I²t criterion would say
    assert judge_surge(b, peak_current_a=40.0, i2t_a2s=1.0, frequency_hz=50.0).zone is TripZone.HOLDS
