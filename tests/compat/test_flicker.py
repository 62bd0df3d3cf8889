"""Flicker metrics on synthetic light waveforms with known answers (IES_HANDBOOK
definitions) and the IEEE 1789 lines (IEEE1789_2015, from memory)."""
import math

import numpy as np
import pytest

from compat.flicker import (RiskBand, assess, dominant_frequency_hz, flicker_index, ieee1789_low_risk_pct,
                            ieee1789_no_effect_pct, modulation_spectrum, percent_flicker, remove_drift,
                            stroboscopic_visibility, svm_threshold)

FS = 50.0 * 2000          # 2000 samples per 50 Hz cycle


def t_axis(cycles=4, f=50.0):
    n = int(round(cycles * FS / f))
    return (np.arange(n) + 0.5) / FS


@pytest.mark.analytic
def test_full_wave_rectified_sine():
    # Light ∝ |sin ωt|: percent flicker 100 %.  Flicker index [derived]: mean 2/π; the
    # wave exceeds its mean between x1 = asin(2/π) and π − x1, so
    # FI = (2cos x1 − (2/π)(π − 2x1)) / 2 = cos x1 − 1 + 2x1/π ≈ 0.2105.
    x = np.abs(np.sin(2 * math.pi * 50.0 * t_axis()))
    x1 = math.asin(2 / math.pi)
    fi = math.cos(x1) - 1 + 2 * x1 / math.pi
    assert fi == pytest.approx(0.2105, abs=1e-4)
    # midpoint samples miss the zero by half a step: min = sin(π/2000)/… ≈ 0.0016
    assert percent_flicker(x) == pytest.approx(100.0, abs=0.35)
    x0 = np.abs(np.sin(2 * math.pi * 50.0 * np.arange(8000) / FS))   # samples on the zeros
    assert percent_flicker(x0) == pytest.approx(100.0, abs=1e-9)
    assert flicker_index(x) == pytest.approx(fi, abs=1e-5)           # atol: 2000 samples/cycle, midpoint rule
    assert dominant_frequency_hz(x, FS) == pytest.approx(100.0, abs=1e-9)


@pytest.mark.analytic
def test_sine_squared_light():
    # Light ∝ sin²ωt (a lamp with no thermal smoothing): FI = (1/2)/(π/2) = 1/π [derived].
    x = np.sin(2 * math.pi * 50.0 * t_axis()) ** 2
    assert percent_flicker(x) == pytest.approx(100.0, abs=1e-3)      # min is sin² of half a step: ~2.5e-6
    assert flicker_index(x) == pytest.approx(1 / math.pi, abs=1e-5)


@pytest.mark.analytic
@pytest.mark.parametrize("duty", [0.1, 0.25, 0.5, 0.8])
def test_square_wave(duty):
    # On/off light with duty d: mean d, area above mean d(1 − d), FI = 1 − d [derived].
    t = t_axis()
    x = (np.mod(t * 100.0, 1.0) < duty).astype(float)
    assert percent_flicker(x) == 100.0
    assert flicker_index(x) == pytest.approx(1 - duty, abs=1e-3)   # atol: edge quantisation at 2000/cycle


@pytest.mark.analytic
def test_sinusoidal_modulation_depth_and_frequency():
    # m + A·sin 2πft: percent flicker = 100·A/m, one spectral line at f of 100·A/m %.
    t = t_axis()
    x = 1.0 + 0.2 * np.sin(2 * math.pi * 100.0 * t)
    assert percent_flicker(x) == pytest.approx(20.0, rel=1e-5)   # midpoint samples miss the crest slightly
    f, mod = modulation_spectrum(x, FS)
    k = int(np.argmax(mod))
    assert f[k] == pytest.approx(100.0) and mod[k] == pytest.approx(20.0, rel=1e-9)
    # FI of a sinusoid: (A/π)/m per period = 0.2/π [derived]
    assert flicker_index(x) == pytest.approx(0.2 / math.pi, abs=1e-6)


@pytest.mark.analytic
def test_steady_and_dark_are_zero():
    assert percent_flicker(np.ones(100)) == 0.0 and flicker_index(np.ones(100)) == 0.0
    assert percent_flicker(np.zeros(100)) == 0.0 and flicker_index(np.zeros(100)) == 0.0
    a = assess(np.zeros(400), FS)
    assert a.band is RiskBand.NO_EFFECT and not math.isnan(a.low_risk_ratio)


@pytest.mark.published
def test_ieee1789_lines():
    # IEEE 1789-2015 (from memory): low risk 0.025·f < 90 Hz, 0.08·f 90–1250 Hz;
    # no observable effect 0.0333·f 90–3000 Hz.
    assert ieee1789_low_risk_pct(60.0) == pytest.approx(1.5)
    assert ieee1789_low_risk_pct(100.0) == pytest.approx(8.0)
    assert ieee1789_low_risk_pct(1250.0) == pytest.approx(100.0)
    assert math.isinf(ieee1789_low_risk_pct(1251.0))
    assert ieee1789_no_effect_pct(100.0) == pytest.approx(3.33)
    assert ieee1789_no_effect_pct(3000.0) == pytest.approx(99.9)
    assert math.isinf(ieee1789_no_effect_pct(3001.0))


@pytest.mark.analytic
def test_bands_at_100_hz():
    t = t_axis()
    for depth, band in [(3.0, RiskBand.NO_EFFECT), (6.0, RiskBand.LOW_RISK), (10.0, RiskBand.ELEVATED)]:
        x = 1.0 + depth / 100 * np.sin(2 * math.pi * 100.0 * t)
        a = assess(x, FS)
        assert a.band is band, depth
        assert a.deciding_hz == pytest.approx(100.0)


@pytest.mark.analytic
def test_misfire_shows_as_low_frequency_modulation():
    # Every fourth half-cycle missing: the pattern repeats every 40 ms, so modulation at
    # 25 Hz appears; judged at 25 Hz the light is in the elevated-risk region even though
    # a 100 Hz-only look would also flag it — the deciding frequency must be below 90 Hz.
    t = t_axis(cycles=8)
    x = np.abs(np.sin(2 * math.pi * 50.0 * t)) * 0.1 + 1.0        # 100 Hz ripple ~ 5 %
    half = np.floor(t * 100.0).astype(int)
    x[half % 4 == 3] = 0.0
    for drift in (None, 1000):          # drift removal must not hide a misfire pattern
        a = assess(x, FS, drift_period_samples=drift)
        assert a.band is RiskBand.ELEVATED
        assert a.deciding_hz < 90.0
    f, mod = modulation_spectrum(x, FS)
    assert mod[np.argmin(np.abs(f - 25.0))] > 10.0


@pytest.mark.analytic
def test_drift_is_not_flicker():
    t = t_axis()
    x = np.linspace(0.8, 1.0, t.size)
    y = remove_drift(x, 1000)
    assert np.ptp(y) == pytest.approx(0.0, abs=1e-9)
    assert assess(x, FS, drift_period_samples=1000).percent_flicker == pytest.approx(0.0, abs=1e-6)
    # ripple that repeats every half-cycle is untouched by drift removal
    r = 1.0 + 0.05 * np.abs(np.sin(2 * math.pi * 50.0 * t))
    assert np.allclose(remove_drift(r, 1000), r, atol=1e-12)
    # ripple on a drift: what remains is the ripple on the mean of the drift (0.15)
    a = assess(r + np.linspace(0.0, 0.3, t.size), FS, drift_period_samples=1000)
    assert a.percent_flicker == pytest.approx(percent_flicker(r + 0.15), rel=1e-9)


@pytest.mark.analytic
def test_min_frequency_ignores_slow_content():
    # a slow 12.5 Hz swell under a 100 Hz ripple: judged from 50 Hz up, only the ripple counts
    t = t_axis(cycles=8)
    x = 1.0 + 0.02 * np.sin(2 * math.pi * 100.0 * t) + 0.05 * np.sin(2 * math.pi * 12.5 * t)
    assert assess(x, FS).band is RiskBand.ELEVATED
    a = assess(x, FS, min_frequency_hz=49.5)
    assert a.band is RiskBand.NO_EFFECT and a.dominant_hz == pytest.approx(100.0)


# ---------------------------------------------------------------- SVM (CIE TN 006)

@pytest.mark.published
def test_svm_threshold_curve():
    # CIE TN 006:2016 (formula and constants from memory, unverified):
    # T(f) = 1/(1 + exp(−0.00518·(f − 306.6))) + 20·exp(−f/10).  Its logistic part is
    # one half at its midpoint 306.6 Hz and tends to 1 (100 % modulation just visible)
    # towards 2 kHz; the second term lifts it steeply below ~50 Hz.
    assert svm_threshold(306.6) == pytest.approx(0.5, abs=1e-12)
    assert svm_threshold(100.0) == pytest.approx(1 / (1 + math.exp(0.00518 * 206.6)) + 20 * math.exp(-10.0), rel=1e-12)
    assert 0.25 < svm_threshold(100.0) < 0.26 and svm_threshold(120.0) < svm_threshold(100.0) * 1.2
    assert svm_threshold(2000.0) == pytest.approx(1.0, abs=2e-4)
    assert svm_threshold(17.0) > 3.0          # at a misfire's 17 Hz SVM hardly counts (that is flicker)


@pytest.mark.analytic
@pytest.mark.parametrize("f,m", [(100.0, 0.05), (100.0, 0.3), (150.0, 0.2), (300.0, 0.5), (1000.0, 0.8)])
def test_svm_of_a_sine_modulation(f, m):
    # one component: the Minkowski sum is that component's C/T(f)
    t = t_axis(cycles=6)
    x = 1.0 + m * np.sin(2 * math.pi * f * t)
    assert stroboscopic_visibility(x, FS) == pytest.approx(m / svm_threshold(f), rel=1e-9)   # exact DFT bins


@pytest.mark.analytic
def test_svm_minkowski_sum_and_band():
    t = t_axis(cycles=6)
    x = 2.0 + 0.2 * np.sin(2 * math.pi * 100.0 * t) + 0.6 * np.cos(2 * math.pi * 400.0 * t)
    a, b = 0.1 / svm_threshold(100.0), 0.3 / svm_threshold(400.0)
    assert stroboscopic_visibility(x, FS) == pytest.approx((a ** 3.7 + b ** 3.7) ** (1 / 3.7), rel=1e-9)
    # components above 2 kHz are not counted
    assert stroboscopic_visibility(1.0 + 0.5 * np.sin(2 * math.pi * 2500.0 * t), FS) == 0.0
    assert stroboscopic_visibility(np.ones(1000), FS) == 0.0 and stroboscopic_visibility(np.zeros(1000), FS) == 0.0


@pytest.mark.analytic
def test_svm_of_a_square_wave():
    # on/off light at 100 Hz, duty 1/2: odd harmonics k of relative amplitude 4/(kπ)
    # [Fourier series]; the sum runs to 2 kHz (k ≤ 19).  rtol 1e-3: the sampled square's
    # DFT exceeds the series by ~(πk/N)²/6 with N = 1000 samples a period.
    t = t_axis(cycles=6)
    x = (np.mod(t * 100.0, 1.0) < 0.5).astype(float)
    want = sum((4 / (k * math.pi) / svm_threshold(100.0 * k)) ** 3.7 for k in range(1, 20, 2)) ** (1 / 3.7)
    assert stroboscopic_visibility(x, FS) == pytest.approx(want, rel=1e-3)
    assert want > 4.0
