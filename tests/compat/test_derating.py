"""Derating and load-type rules (common practice, no source; printed figures win)."""
import pytest

from compat.derating import (AMBIENT_SLOPE_PER_K, LED_SHARE, NO_SOURCE, TRANSFORMER_SHARE, derating_factor,
                             derating_rules, rating_use)
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.filament import Filament
from loads.transformer import MagneticTransformer


@pytest.mark.analytic
def test_no_derating_for_single_dimmer_at_room_temperature():
    d = Dimmer()
    assert derating_rules(d) == () and derating_factor(d) == 1.0


@pytest.mark.analytic
def test_ganging_and_fins_take_the_stricter_not_both():
    # common practice, no source: 2-gang × 0.8, one fin off × 0.8, two fins × 0.6
    assert derating_factor(Dimmer(gang=2)) == pytest.approx(0.8)
    assert derating_factor(Dimmer(gang=3)) == pytest.approx(0.7)
    assert derating_factor(Dimmer(gang=2, fins_removed=1)) == pytest.approx(0.8)
    assert derating_factor(Dimmer(gang=3, fins_removed=2)) == pytest.approx(0.6)
    assert all(r.origin == NO_SOURCE for r in derating_rules(Dimmer(gang=3, fins_removed=2)))


@pytest.mark.analytic
def test_ambient_derating_is_linear_above_reference():
    assert derating_factor(Dimmer(ambient_temperature_c=45.0)) == pytest.approx(1 - 20 * AMBIENT_SLOPE_PER_K)
    assert derating_factor(Dimmer(ambient_temperature_c=10.0)) == 1.0


@pytest.mark.analytic
def test_load_types_and_printed_figures():
    d = Dimmer(rated_load_w=400.0, min_load_w=40.0)
    led = ElectronicDriver(name="led", count=4, rated_power_w=6.0)
    use = rating_use(d, (led,))
    assert use.groups[0].rating == pytest.approx(LED_SHARE * 400.0)
    assert use.utilisation == pytest.approx(24.0 / (LED_SHARE * 400.0))
    # the dimmer's printed LED figure overrides the rule of thumb
    d2 = Dimmer(rated_load_w=400.0, min_load_w=40.0, rated_led_w=150.0)
    assert rating_use(d2, (led,)).utilisation == pytest.approx(24.0 / 150.0)
    tr = MagneticTransformer(name="tr", count=2, rated_va=60.0, secondary_voltage_v=12.0, lamp_power_w=50.0)
    assert rating_use(d, (tr,)).utilisation == pytest.approx(120.0 / (TRANSFORMER_SHARE * 400.0))
    d3 = Dimmer(rated_load_w=400.0, min_load_w=40.0, rated_transformer_va=300.0, gang=2)
    assert rating_use(d3, (tr,)).utilisation == pytest.approx(120.0 / (300.0 * 0.8))
    # mixed loads add their shares
    fil = Filament(name="f", count=1, rated_power_w=42.0)
    assert rating_use(d, (fil, led)).utilisation == pytest.approx(42 / 400 + 24 / 40)
    assert rating_use(d, (fil, led)).led_units == 4
