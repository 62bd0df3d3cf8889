"""Light modulation: percent flicker, flicker index, its frequencies and IEEE 1789 bands.

Definitions (IES_HANDBOOK):

* percent flicker = 100·(max − min)/(max + min);
* flicker index = (area of the light waveform above its mean) / (total area), over
  whole periods of the waveform.

Risk bands, IEEE Std 1789-2015 recommended practice (IEEE1789_2015, from memory,
unverified): low risk when the modulation % is below 0.025·f under 90 Hz and below
0.08·f from 90 to 1250 Hz (no limit above 1250 Hz); no observable effect below
0.0333·f from 90 to 3000 Hz (no limit above 3000 Hz) and, under 90 Hz, below 0.01·f
(that last figure from memory, unverified).

Stroboscopic visibility measure SVM, CIE TN 006:2016 (CIE_TN006_2016; the formula and
constants from memory, unverified against the printed note — a public summary confirms
the Minkowski form, that SVM = 1 is the visibility threshold of an average observer and
that the measure covers roughly 80 Hz–2 kHz; "Stroboscopic effect: contrast threshold
function and dependence on illumination level", J. Opt. Soc. Am. A 35(2), 309 (2018),
validated it):

    SVM = (Σ_m (C_m / T(f_m))^3.7)^(1/3.7)      over the components f_m ≤ 2 kHz,
    T(f) = 1/(1 + exp(−0.00518·(f − 306.6))) + 20·exp(−f/10),

C_m being the m-th Fourier component's amplitude relative to the mean light.  T(f) is
the threshold modulation of the stroboscopic effect at frequency f (about 0.26 at
100 Hz, 0.5 at 307 Hz, 1 towards 2 kHz); its second term lifts it steeply below
~80 Hz, where SVM does not apply (there the light flickers visibly; IEC TR 61547-1's
PstLM judges that, and is beyond this module).  The EU ecodesign rules for mains light
sources (Regulation (EU) 2019/2020, Annex II; from memory) cap SVM at 0.4 for LED
light sources at full load: a product requirement on a lamp, well below the threshold.

A dimmer that misfires modulates light at a fraction of the mains frequency, so the
waveform is analysed over several mains cycles: the spectrum of the light gives each
component's modulation (a component of amplitude A on a mean m modulates by 100·A/m %)
and each is judged at its own frequency, as well as the overall percent flicker at the
dominant frequency.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

import numpy as np


class RiskBand(StrEnum):
    NO_EFFECT = "no-observable-effect"
    LOW_RISK = "low-risk"
    ELEVATED = "elevated-risk"


def percent_flicker(light) -> float:
    """100·(max − min)/(max + min) [%]; a dark waveform (all zero) gives 0."""
    x = np.asarray(light, dtype=float)
    hi, lo = float(np.max(x)), float(np.min(x))
    if hi + lo <= 0.0:
        return 0.0
    return 100.0 * (hi - lo) / (hi + lo)


def flicker_index(light) -> float:
    """Area above the mean over the total area [1], for a waveform sampled uniformly
    over whole periods (so time integrals are sums).  A dark waveform gives 0."""
    x = np.asarray(light, dtype=float)
    total = float(np.sum(x))
    if total <= 0.0:
        return 0.0
    m = total / x.size
    return float(np.sum(np.clip(x - m, 0.0, None))) / total


def ieee1789_low_risk_pct(frequency_hz: float) -> float:
    """IEEE 1789 low-risk modulation limit at a frequency [%] (IEEE1789_2015, from memory)."""
    f = frequency_hz
    if f < 90.0:
        return 0.025 * f
    if f <= 1250.0:
        return 0.08 * f
    return math.inf


def ieee1789_no_effect_pct(frequency_hz: float) -> float:
    """IEEE 1789 no-observable-effect modulation limit [%] (IEEE1789_2015, from memory;
    the under-90 Hz line 0.01·f is from memory, unverified)."""
    f = frequency_hz
    if f < 90.0:
        return 0.01 * f
    if f <= 3000.0:
        return 0.0333 * f
    return math.inf


def modulation_spectrum(light, sample_rate_hz: float) -> tuple[np.ndarray, np.ndarray]:
    """(frequencies [Hz], modulation of each component [%]) of a light waveform sampled
    uniformly at sample_rate_hz [Hz], DC excluded.  Dark: empty arrays."""
    x = np.asarray(light, dtype=float)
    m = float(np.mean(x))
    if x.size < 4 or m <= 0.0:
        return np.zeros(0), np.zeros(0)
    spec = np.fft.rfft(x - m) / x.size
    amp = 2.0 * np.abs(spec)
    if x.size % 2 == 0:
        amp[-1] /= 2.0                     # the Nyquist bin is not doubled
    freqs = np.fft.rfftfreq(x.size, d=1.0 / sample_rate_hz)
    return freqs[1:], 100.0 * amp[1:] / m


def dominant_frequency_hz(light, sample_rate_hz: float) -> float:
    """Frequency of the largest modulation component [Hz]; 0 for a steady or dark waveform."""
    f, mod = modulation_spectrum(light, sample_rate_hz)
    if f.size == 0 or float(np.max(mod)) <= 0.0:
        return 0.0
    return float(f[int(np.argmax(mod))])


# CIE TN 006:2016 (from memory, see the module docstring)
SVM_EXPONENT = 3.7
SVM_SLOPE_PER_HZ = 0.00518
SVM_MID_HZ = 306.6
SVM_MAX_HZ = 2000.0
# CIE TN 006:2016: SVM = 1 is the threshold of visibility for an average observer
SVM_VISIBLE = 1.0


def svm_threshold(frequency_hz: float) -> float:
    """Stroboscopic-effect threshold modulation T(f) of CIE TN 006 [1] at f [Hz]."""
    f = float(frequency_hz)
    return 1.0 / (1.0 + math.exp(-SVM_SLOPE_PER_HZ * (f - SVM_MID_HZ))) + 20.0 * math.exp(-f / 10.0)


def stroboscopic_visibility(light, sample_rate_hz: float) -> float:
    """SVM of a light waveform [1] sampled uniformly at sample_rate_hz [Hz] over whole
    periods (CIE TN 006, see the module docstring); steady or dark light gives 0."""
    f, mod = modulation_spectrum(light, sample_rate_hz)
    keep = (f > 0.0) & (f <= SVM_MAX_HZ) & (mod > _NOISE_PCT)
    if not np.any(keep):
        return 0.0
    ratio = (mod[keep] / 100.0) / np.array([svm_threshold(x) for x in f[keep]])
    return float(np.sum(ratio ** SVM_EXPONENT) ** (1.0 / SVM_EXPONENT))


@dataclass(frozen=True, slots=True, kw_only=True)
class FlickerAssessment:
    """percent_flicker [%]; flicker_index [1]; dominant_hz [Hz];
    low_risk_ratio: the worst of modulation/low-risk limit over the overall percent
    flicker at the dominant frequency and every spectral component [1] (≤ 1: low risk);
    svm: CIE TN 006 stroboscopic visibility measure of the same light [1];
    no_effect_ratio: the same against the no-observable-effect line [1];
    deciding_hz: the frequency that gave low_risk_ratio [Hz]; band: the risk band."""

    percent_flicker: float
    flicker_index: float
    dominant_hz: float
    low_risk_ratio: float
    no_effect_ratio: float
    deciding_hz: float
    band: RiskBand
    svm: float = 0.0


# Engineering choice: spectral components below this modulation are numerical noise.
_NOISE_PCT = 1e-3


def remove_drift(light, period_samples: int) -> np.ndarray:
    """The waveform with its straight-line drift removed and its mean kept.

    The drift is the least-squares line through the means of successive whole periods
    of ``period_samples`` samples (use a half mains cycle), so ripple that repeats every
    period leaves it untouched.  Engineering choice: after a change of setting a
    filament is still warming or cooling over the analysed span; that slow settling is
    not flicker, and a trend leaks into every low-frequency bin of the spectrum.
    Periodic misfire patterns have no trend and survive (a pattern that does not fit a
    whole number of times into the span leaves a small slope, which is removed with
    it: a small understatement at the lowest frequency)."""
    x = np.asarray(light, dtype=float)
    n_per = int(period_samples)
    k = x.size // n_per if n_per > 0 else 0
    if k < 3:
        return x.copy()
    means = x[: k * n_per].reshape(k, n_per).mean(axis=1)
    centres = (np.arange(k) + 0.5) * n_per - 0.5
    slope, _ = np.polyfit(centres, means, 1)
    idx = np.arange(x.size, dtype=float)
    return np.clip(x - slope * (idx - idx.mean()), 0.0, None)


def assess(light, sample_rate_hz: float, *, drift_period_samples: int | None = None,
           min_frequency_hz: float = 0.0) -> FlickerAssessment:
    """Percent flicker, flicker index, dominant frequency and IEEE 1789 band of a light
    waveform [any unit] sampled at sample_rate_hz [Hz] over whole mains cycles
    (drift_period_samples: if given, remove a straight-line drift first, judged from
    the means of periods of that many samples, see ``remove_drift``; min_frequency_hz:
    components below it are not judged [Hz] — used where the caller knows the switch
    fired regularly, so slower content is settling, not flicker)."""
    light = (remove_drift(light, drift_period_samples) if drift_period_samples
             else np.asarray(light, dtype=float))
    if min_frequency_hz > 0 and light.size >= 4:
        spec = np.fft.rfft(light)
        fr = np.fft.rfftfreq(light.size, d=1.0 / sample_rate_hz)
        spec[(fr > 0) & (fr < min_frequency_hz)] = 0.0
        light = np.clip(np.fft.irfft(spec, n=light.size), 0.0, None)
    pf = percent_flicker(light)
    fi = flicker_index(light)
    f, mod = modulation_spectrum(light, sample_rate_hz)
    band_ok = f >= min_frequency_hz
    dom = float(f[band_ok][int(np.argmax(mod[band_ok]))]) if np.any(band_ok & (mod > 0)) else 0.0
    candidates = [(pf, dom)] if dom > 0 else []
    keep = (mod > _NOISE_PCT) & band_ok
    candidates += list(zip(mod[keep].tolist(), f[keep].tolist()))

    def worst(limit_fn):
        best, best_f = 0.0, 0.0
        for m, fr in candidates:
            lim = limit_fn(fr)
            r = 0.0 if math.isinf(lim) else (m / lim if lim > 0 else math.inf)
            if r > best:
                best, best_f = r, fr
        return best, best_f

    lr, lr_f = worst(ieee1789_low_risk_pct)
    ne, _ = worst(ieee1789_no_effect_pct)
    band = RiskBand.NO_EFFECT if ne <= 1.0 else (RiskBand.LOW_RISK if lr <= 1.0 else RiskBand.ELEVATED)
    return FlickerAssessment(percent_flicker=pf, flicker_index=fi, dominant_hz=dom, low_risk_ratio=lr,
                             no_effect_ratio=ne, deciding_hz=lr_f, band=band,
                             svm=stroboscopic_visibility(light, sample_rate_hz))
