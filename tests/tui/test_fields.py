"""The editor's field table: typed text becomes a validated model object."""
import math

import pytest

from loads.breaker import Breaker
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.errors import InputError
from tui.fields import error_text, field_text, fields_for, with_text


def spec(key, obj, path):
    return next(s for s in fields_for(key, obj) if s.path == path)


def test_capacitance_typed_in_nanofarads_is_stored_in_farads():
    lamp = ElectronicDriver(name="led", count=4, rated_power_w=6.0)
    new = with_text(lamp, spec("load:0", lamp, "input_capacitance_f"), "100n")
    assert math.isclose(new.input_capacitance_f, 100e-9, rel_tol=1e-12)
    assert lamp.input_capacitance_f == 47e-9          # the original is untouched (frozen)
    assert field_text(new, spec("load:0", new, "input_capacitance_f")) == "100 nF"


def test_percentage_field_scales_to_a_fraction():
    lamp = ElectronicDriver()
    new = with_text(lamp, spec("load:0", lamp, "min_light_fraction"), "10 %")
    assert math.isclose(new.min_light_fraction, 0.10, rel_tol=1e-12)


def test_nested_rc_diac_field():
    dimmer = Dimmer()
    new = with_text(dimmer, spec("dimmer", dimmer, "rc_diac.timing_capacitance_f"), "47n")
    assert math.isclose(new.rc_diac.timing_capacitance_f, 47e-9, rel_tol=1e-12)


def test_dimmer_fields_follow_edge_and_control():
    leading = {s.path for s in fields_for("dimmer", Dimmer())}
    trailing = {s.path for s in fields_for("dimmer", Dimmer(edge="trailing", control="phase"))}
    assert "holding_current_a" in leading and "rc_diac.breakover_v" in leading
    assert "clamp_voltage_v" in trailing and "holding_current_a" not in trailing
    assert "min_firing_angle_deg" in trailing


def test_model_rejection_names_the_reason():
    lamp = ElectronicDriver()
    field = spec("load:0", lamp, "rated_power_w")
    with pytest.raises(InputError) as caught:
        with_text(lamp, field, "-5 W")
    assert "W must be between 0 and 10 kW" in error_text(caught.value, field)


def test_cross_field_rule_names_the_other_field():
    dimmer = Dimmer(rated_load_w=400.0, min_load_w=40.0)
    field = spec("dimmer", dimmer, "rated_load_w")
    with pytest.raises(InputError) as caught:
        with_text(dimmer, field, "30 W")
    assert error_text(caught.value, field).startswith("min_load_w:")


def test_breaker_none_and_back():
    field = spec("breaker", Breaker(), "curve")
    assert with_text(Breaker(), field, "none") is None
    fitted = with_text(None, field, "C")
    assert isinstance(fitted, Breaker) and fitted.curve.value == "C"


def test_optional_field_empty_means_none():
    lamp = ElectronicDriver(stop_voltage_v=40.0)
    assert with_text(lamp, spec("load:0", lamp, "stop_voltage_v"), "").stop_voltage_v is None


def test_count_must_be_whole():
    lamp = ElectronicDriver()
    with pytest.raises(InputError, match="whole number"):
        with_text(lamp, spec("load:0", lamp, "count"), "2.5")
