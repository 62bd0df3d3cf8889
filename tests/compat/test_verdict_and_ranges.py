"""Overall verdict rules (docs/design.md, Verdict), range corners, and the cautions."""
import pytest

from compat.cautions import cautions
from compat.evaluate import combine, set_path
from compat.report import CheckResult, Status, Verdict
from compat.verdict import attached_cautions, overall
from loads.circuit import Circuit
from loads.driver import ElectronicDriver
from loads.errors import InputError
from loads.filament import Filament


def res(status, margin=0.1, check_id="x", deciding=None):
    return CheckResult(id=check_id, status=status, value=1.0, limit=1.0, unit="A", margin=margin, message="m",
                       deciding_input=deciding)


@pytest.mark.analytic
def test_verdict_rules():
    assert overall([res(Status.PASS), res(Status.NOT_APPLICABLE)]) is Verdict.SUITABLE
    assert overall([res(Status.PASS), res(Status.CAUTION)]) is Verdict.SUITABLE_WITH_CAUTIONS
    assert overall([res(Status.CAUTION), res(Status.FAIL)]) is Verdict.UNSUITABLE
    assert overall([res(Status.CAUTION), res(Status.FAIL, deciding="loads[0].count")]) is Verdict.SITE_TEST_NEEDED
    # a plain failure elsewhere outweighs a straddling one
    assert overall([res(Status.FAIL), res(Status.FAIL, deciding="k")]) is Verdict.UNSUITABLE


@pytest.mark.analytic
def test_combine_takes_worst_case_and_names_the_deciding_input():
    nominal = [res(Status.PASS, 0.3, "a"), res(Status.PASS, 0.2, "b")]
    cases = [("k1", [res(Status.PASS, 0.1, "a"), res(Status.FAIL, -0.2, "b")]),
             ("k1", [res(Status.PASS, 0.5, "a"), res(Status.PASS, 0.4, "b")])]
    out = combine(nominal, cases)
    assert out[0].status is Status.PASS and out[0].margin == pytest.approx(0.1) and out[0].deciding_input is None
    assert out[1].status is Status.FAIL and out[1].deciding_input == "k1"
    # failing everywhere: no deciding input, the verdict stays unsuitable
    all_fail = combine([res(Status.FAIL, -0.1)], [("k", [res(Status.FAIL, -0.3)]), ("k", [res(Status.FAIL, -0.2)])])
    assert all_fail[0].deciding_input is None and all_fail[0].margin == pytest.approx(-0.3)
    assert overall(all_fail) is Verdict.UNSUITABLE


@pytest.mark.analytic
def test_set_path():
    c = Circuit(loads=(Filament(name="f", count=2), ElectronicDriver(name="d", count=3)))
    # indices count from 1, as in the file and its messages
    c2 = set_path(c, "loads[2].input_capacitance_f", 1e-7)
    assert c2.loads[1].input_capacitance_f == 1e-7 and c.loads[1].input_capacitance_f != 1e-7
    assert set_path(c, "loads[1].count", 3.4).loads[0].count == 3
    assert set_path(c, "supply.source_resistance_ohm", 1.5).supply.source_resistance_ohm == 1.5
    assert set_path(c, "dimmer.rc_diac.breakover_v", 30.0).dimmer.rc_diac.breakover_v == 30.0
    with pytest.raises(InputError):
        set_path(c, "loads[5].count", 1)
    with pytest.raises(InputError):
        set_path(c, "loads[0].count", 1)
    with pytest.raises(InputError):
        set_path(c, "nothing.here", 1)


def test_cautions_cover_design_points():
    # the README's Safety section: qualified persons, isolate and prove dead,
    # local rules and makers' instructions first, model estimates, differential probes.
    text = " ".join(cautions()).lower()
    for needle in ("qualified", "prove it dead", "local wiring rules", "makers", "estimate",
                   "differential probes", "isolated supply"):
        assert needle in text, needle
    assert attached_cautions() == cautions()


def test_a_range_read_from_a_file_is_applied_to_its_own_group(tmp_path):
    # a range on the second group's input capacitance must reach the second group
    # (the file numbers groups from 1); it used to land on the other group or fail
    from loads.files import read_circuit
    p = tmp_path / "two.toml"
    p.write_text('''schema = 1
[supply]
voltage_v = 230.0
frequency_hz = 50.0
[dimmer]
edge = "leading"
wiring = "with-neutral"
control = "phase"
rated_load_w = 400.0
min_load_w = 0.0
[[loads]]
name = "lamp"
kind = "filament"
count = 1
rated_power_w = 60.0
rated_voltage_v = 230.0
[[loads]]
name = "led"
kind = "electronic-driver"
count = 2
rated_power_w = 6.0
rated_voltage_v = 230.0
input_capacitance_nf = { min = 22.0, max = 100.0 }
''')
    c = read_circuit(p)
    (rg,) = c.ranges
    lo = set_path(c, rg.path, rg.low)
    hi = set_path(c, rg.path, rg.high)
    # rel 1e-12: exact unit conversion nF → F
    assert lo.loads[1].input_capacitance_f == pytest.approx(22e-9, rel=1e-12)
    assert hi.loads[1].input_capacitance_f == pytest.approx(100e-9, rel=1e-12)
    assert lo.loads[0] == c.loads[0] and hi.loads[0] == c.loads[0]
