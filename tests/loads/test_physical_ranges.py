"""Values that pass the models' own checks but are not physical (issue 13, item 2):
each numeric key has a physical range in the file reference (``loads.files.PHYSICAL``);
outside it the reader gives one line and the command exits 2, legal but unusual gives
one warning line."""
import pytest

from compat.cli import main
from loads.files import KEYS, PHYSICAL, parse_circuit
from loads.errors import InputError

CIRCUIT = """schema = 1
[supply]
voltage_v = {voltage_v}
frequency_hz = 50.0
wiring_capacitance_nf = {wiring_capacitance_nf}
[dimmer]
edge = "trailing"
wiring = "with-neutral"
control = "phase"
rated_load_w = 400.0
min_load_w = 0.0
[[loads]]
name = "led"
kind = "electronic-driver"
count = 2
rated_power_w = {rated_power_w}
rated_voltage_v = 230.0
series_resistance_ohm = {series_resistance_ohm}
input_capacitance_nf = {input_capacitance_nf}
bleeder_ma = {bleeder_ma}
"""
NORMAL = {"voltage_v": "230.0", "wiring_capacitance_nf": "2.0", "rated_power_w": "8.0",
          "series_resistance_ohm": "10.0", "input_capacitance_nf": "47.0", "bleeder_ma": "0.0"}


def test_every_numeric_key_has_a_physical_range():
    missing = sorted({f"{cls.__name__}.{k.file_key}" for cls, keys in KEYS.items() for k in keys.values()
                      if k.kind == "float" and k.field not in PHYSICAL})
    assert missing == []
    for field, row in PHYSICAL.items():
        assert row.low <= row.usual_low <= row.usual_high <= row.high, field


# the values of the issue that ended in tracebacks (collapsed step, ZeroDivisionError)
NOT_PHYSICAL = [("wiring_capacitance_nf", "1e300"), ("wiring_capacitance_nf", "1e-20"),
                ("series_resistance_ohm", "1e-300"), ("input_capacitance_nf", "1e-20"),
                ("bleeder_ma", "1e100"), ("voltage_v", "5e-324"), ("rated_power_w", "1e-200")]


@pytest.mark.parametrize("key,value", NOT_PHYSICAL)
def test_values_that_are_not_physical_give_one_line_and_exit_2(key, value, tmp_path, capsys):
    p = tmp_path / "c.toml"
    p.write_text(CIRCUIT.format(**dict(NORMAL, **{key: value})))
    code = main(["check", str(p)])
    err = capsys.readouterr().err
    assert code == 2
    assert err.count("\n") == 1 and err.startswith("dimfit: error: ") and key in err and "not physical" in err
    assert "Traceback" not in err


def test_a_legal_but_unusual_value_is_read_with_one_warning():
    notes = []
    c = parse_circuit(CIRCUIT.format(**dict(NORMAL, input_capacitance_nf="10000.0")), "u.toml", notes=notes)
    assert c.loads[0].input_capacitance_f == pytest.approx(10e-6, rel=1e-12)   # exact nF → F
    assert len(notes) == 1 and "input_capacitance_nf" in notes[0] and "unusual" in notes[0]
    assert notes[0].startswith("u.toml:") and "\n" not in notes[0]


def test_zero_means_none_where_the_table_says_so():
    notes = []
    parse_circuit(CIRCUIT.format(**dict(NORMAL, wiring_capacitance_nf="0.0", input_capacitance_nf="0.0")),
                  "z.toml", notes=notes)
    assert notes == []


def test_a_range_end_outside_the_physical_range_is_refused():
    text = CIRCUIT.format(**dict(NORMAL, input_capacitance_nf="{ min = 1e-20, max = 100.0 }"))
    with pytest.raises(InputError, match="range min: .*not physical"):
        parse_circuit(text, "r.toml")


def test_the_app_refuses_what_the_file_refuses():
    from loads.driver import ElectronicDriver
    from tui.fields import FieldSpec, with_value
    spec = FieldSpec(path="series_resistance_ohm", label="R", kind="float", unit="Ω")
    with pytest.raises(InputError, match="not physical"):
        with_value(ElectronicDriver(), spec, 1e-300)
    assert with_value(ElectronicDriver(), spec, 22.0).series_resistance_ohm == 22.0
