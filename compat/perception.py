"""How bright a lamp looks: perceived brightness and CIE lightness.

Measured light (a photometer's reading) is not what the eye reports.  Two scales:

* the lighting rule perceived ≈ √(measured) (IES_HANDBOOK: the widely used
  square-law rule of dimming), and
* CIE 1976 lightness L* (CIE15): L* = 116·(Y/Yn)^(1/3) − 16 for Y/Yn > (6/29)³,
  and L* = (29/3)³·Y/Yn ≈ 903.3·Y/Yn below.
"""
from __future__ import annotations

import numpy as np

# CIE15: the break point of the L* function, (6/29)³ ≈ 0.008856, and the slope of
# its linear part, (29/3)³ ≈ 903.3.
_CIE_EPSILON = (6.0 / 29.0) ** 3
_CIE_KAPPA = (29.0 / 3.0) ** 3


def perceived_brightness(light_fraction):
    """Perceived brightness by the square-law rule (IES_HANDBOOK) [1] for a measured
    light fraction [1] (0 = dark, 1 = full).  Negative inputs are clipped to 0."""
    y = np.clip(np.asarray(light_fraction, dtype=float), 0.0, None)
    out = np.sqrt(y)
    return float(out) if out.ndim == 0 else out


def cie_lightness(relative_luminance):
    """CIE 1976 lightness L* (0..100) for a relative luminance Y/Yn [1] (CIE15)."""
    y = np.clip(np.asarray(relative_luminance, dtype=float), 0.0, None)
    out = np.where(y > _CIE_EPSILON, 116.0 * np.cbrt(y) - 16.0, _CIE_KAPPA * y)
    return float(out) if out.ndim == 0 else out
