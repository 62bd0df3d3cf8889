"""Perceived brightness (square-law rule, IES_HANDBOOK) and CIE 1976 L* (CIE15)."""
import numpy as np
import pytest

from compat.perception import cie_lightness, perceived_brightness


@pytest.mark.published
def test_square_law():
    # Perceived ≈ √measured: 25 % measured looks like 50 %; 1 % like 10 %.
    assert perceived_brightness(0.25) == pytest.approx(0.5, abs=1e-12)
    assert perceived_brightness(0.01) == pytest.approx(0.1, abs=1e-12)
    assert np.allclose(perceived_brightness(np.array([0.0, 1.0])), [0.0, 1.0])
    assert perceived_brightness(-0.1) == 0.0


@pytest.mark.published
def test_cie_lightness():
    # CIE 15: L*(1) = 100; L*(0.18) ≈ 49.5 (mid grey); L*(0.008856) ≈ 8.0 at the break;
    # linear part 903.3·Y below.  Tolerances follow the printed precision.
    assert cie_lightness(1.0) == pytest.approx(100.0, abs=1e-9)
    assert cie_lightness(0.18) == pytest.approx(49.5, abs=0.05)
    assert cie_lightness(0.008856) == pytest.approx(8.0, abs=0.01)
    assert cie_lightness(0.001) == pytest.approx(0.9033, abs=1e-4)
    assert cie_lightness(0.0) == 0.0
    # continuous at the break
    e = (6 / 29) ** 3
    assert cie_lightness(e * (1 + 1e-9)) == pytest.approx(cie_lightness(e * (1 - 1e-9)), abs=1e-5)
