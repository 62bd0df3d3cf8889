"""Ranges on every rangeable key of every table reach the right field of the right table,
and each end the evaluation simulates is the circuit built by hand (issue 13, item 1).

The simulations themselves are replaced by a recorder: what is checked here is which
circuits ``evaluate`` asks to be simulated, against circuits written out by hand from
the file's numbers; the judging of one circuit is tested elsewhere."""
import dataclasses

import pytest

import compat.evaluate as ev
from compat.checks import CHECK_IDS
from compat.report import CheckResult, Status
from loads.circuit import Circuit
from loads.dimmer import Dimmer, RcDiac
from loads.driver import ElectronicDriver
from loads.files import KEYS, RANGEABLE, parse_circuit
from loads.supply import Supply

# Two driver groups around a filament group, so that a range on group 3 that landed on
# group 1 or 2 would show.
BASE = {
    "supply": {"voltage_v": "230.0", "frequency_hz": "50.0"},
    "dimmer": {"edge": '"leading"', "wiring": '"two-wire"', "control": '"rc-diac"', "rated_load_w": "400.0",
               "min_load_w": "0.0"},
    "dimmer.rc_diac": {"breakover_v": "32.0"},
    "loads": [
        {"name": '"led a"', "kind": '"electronic-driver"', "count": "2", "rated_power_w": "6.0",
         "rated_voltage_v": "230.0"},
        {"name": '"lamp"', "kind": '"filament"', "count": "1", "rated_power_w": "60.0", "rated_voltage_v": "230.0"},
        {"name": '"led b"', "kind": '"electronic-driver"', "count": "3", "rated_power_w": "8.0",
         "rated_voltage_v": "230.0"},
    ],
}
TABLE_OF = {Supply: "supply", Dimmer: "dimmer", RcDiac: "dimmer.rc_diac", ElectronicDriver: "loads[3]"}


def text_of(tables) -> str:
    out = ["schema = 1"]
    for name in ("supply", "dimmer", "dimmer.rc_diac"):
        out.append(f"[{name}]")
        out += [f"{k} = {v}" for k, v in tables[name].items()]
    for group in tables["loads"]:
        out.append("[[loads]]")
        out += [f"{k} = {v}" for k, v in group.items()]
    return "\n".join(out) + "\n"


def with_key(table: str, key: str, value: str):
    tables = {k: (dict(v) if isinstance(v, dict) else [dict(g) for g in v]) for k, v in BASE.items()}
    if table.startswith("loads["):
        tables["loads"][int(table[6:-1]) - 1][key] = value
    else:
        tables[table][key] = value
    return text_of(tables)


def recorded_circuits(circuit: Circuit, monkeypatch) -> list[Circuit]:
    """The circuits ``evaluate`` simulates, in order (nominal, then each range's ends)."""
    seen = []

    def gather(c, **_):
        seen.append(c)
        return ev.Evidence(circuit=c)

    def judged(_ev, _sim):
        return [CheckResult(id=i, status=Status.PASS, value=None, limit=None, unit="", margin=None, message="m")
                for i in CHECK_IDS]

    monkeypatch.setattr(ev, "gather", gather)
    monkeypatch.setattr(ev, "_judge_with_breaker", judged)
    ev.evaluate(circuit, simulator=object())
    return seen


def replaced(circuit: Circuit, table: str, field: str, value: float) -> Circuit:
    """By hand: the circuit with one field of one table set."""
    if table == "supply":
        return dataclasses.replace(circuit, supply=dataclasses.replace(circuit.supply, **{field: value}))
    if table == "dimmer":
        return dataclasses.replace(circuit, dimmer=dataclasses.replace(circuit.dimmer, **{field: value}))
    if table == "dimmer.rc_diac":
        rc = dataclasses.replace(circuit.dimmer.rc_diac, **{field: value})
        return dataclasses.replace(circuit, dimmer=dataclasses.replace(circuit.dimmer, rc_diac=rc))
    assert table == "loads[3]"
    groups = list(circuit.loads)
    groups[2] = dataclasses.replace(groups[2], **{field: value})
    return dataclasses.replace(circuit, loads=tuple(groups))


# file ends for each rangeable key (file units), chosen around the models' defaults
ENDS = {"holding_current_ma": (10.0, 40.0), "latching_current_ma": (50.0, 80.0),
        "gate_trigger_current_ma": (5.0, 30.0), "self_supply_ma": (0.0, 5.0), "breakover_v": (28.0, 36.0),
        "source_resistance_ohm": (0.1, 1.0), "source_inductance_uh": (100.0, 1000.0),
        "input_capacitance_nf": (22.0, 100.0), "bulk_capacitance_uf": (2.2, 10.0),
        "series_resistance_ohm": (4.7, 22.0), "start_voltage_v": (40.0, 80.0), "bleeder_ma": (0.0, 10.0),
        "input_damping_ohm": (0.0, 220.0), "trip_current_a": (5.0, 15.0)}


def rangeable_keys():
    for cls, field in sorted(RANGEABLE, key=lambda cf: (cf[0].__name__, cf[1])):
        key = next(k for k in KEYS[cls].values() if k.field == field)
        yield pytest.param(cls, key, id=f"{cls.__name__}.{key.file_key}")


@pytest.mark.analytic
@pytest.mark.parametrize("cls,key", list(rangeable_keys()))
def test_each_rangeable_key_is_evaluated_at_its_two_ends_on_its_own_table(cls, key, monkeypatch):
    table = TABLE_OF[cls]
    low, high = ENDS[key.file_key]
    circuit = parse_circuit(with_key(table, key.file_key, f"{{ min = {low!r}, max = {high!r} }}"), "r.toml")
    # by hand: the file with one value, that value the midpoint in SI as the reader takes it
    nominal = replaced(parse_circuit(with_key(table, key.file_key, repr(0.5 * (low + high))), "n.toml"),
                       table, key.field, 0.5 * (low / key.per_si + high / key.per_si))
    (rg,) = circuit.ranges
    assert rg.file_key == f"{table}.{key.file_key}"
    seen = recorded_circuits(circuit, monkeypatch)
    # by hand: the nominal circuit with the field at each end, in SI (file value / per_si)
    by_hand = [nominal, replaced(nominal, table, key.field, low / key.per_si),
               replaced(nominal, table, key.field, high / key.per_si)]
    assert seen == by_hand


@pytest.mark.analytic
def test_overlapping_holding_and_latching_ranges_are_legal_and_each_end_is_a_real_triac(monkeypatch):
    # holding 10–50 mA and latching 25–100 mA overlap legitimately (a triac with
    # holding 30 mA may latch at 60); the file used to be refused because latching's
    # min was checked against holding's midpoint.
    text = with_key("dimmer", "holding_current_ma", "{ min = 10.0, max = 50.0 }")
    text = text.replace("[dimmer]\n", "[dimmer]\nlatching_current_ma = { min = 25.0, max = 100.0 }\n")
    circuit = parse_circuit(text, "overlap.toml")
    seen = recorded_circuits(circuit, monkeypatch)
    mid = dataclasses.replace(circuit, ranges=())
    d = mid.dimmer
    assert (d.holding_current_a, d.latching_current_a) == pytest.approx((0.030, 0.0625), rel=1e-12)
    # by hand, one at a time, the other at its midpoint; latching's min (25 mA) is below
    # holding's midpoint (30 mA), so holding comes down to 25 mA with it
    ends = {"dimmer.holding_current_ma": [(0.010, 0.0625), (0.050, 0.0625)],
            "dimmer.latching_current_ma": [(0.025, 0.025), (0.030, 0.100)]}
    expected = [(0.030, 0.0625)] + [e for rg in circuit.ranges for e in ends[rg.file_key]]
    got = [(c.dimmer.holding_current_a, c.dimmer.latching_current_a) for c in seen]
    # rel 1e-12: exact mA → A conversions
    assert [x for p in got for x in p] == pytest.approx([x for p in expected for x in p], rel=1e-12)
    assert all(c.dimmer.latching_current_a >= c.dimmer.holding_current_a for c in seen)


@pytest.mark.analytic
def test_a_holding_range_above_a_fixed_latching_current_raises_latching_with_it(monkeypatch):
    # one at a time, holding's max 60 mA above the fixed latching 50 mA would be a triac
    # that does not exist; the end is taken with latching = holding
    text = with_key("dimmer", "holding_current_ma", "{ min = 10.0, max = 60.0 }")
    text = text.replace("[dimmer]\n", "[dimmer]\nlatching_current_ma = 50.0\n")
    seen = recorded_circuits(parse_circuit(text, "h.toml"), monkeypatch)
    got = [(c.dimmer.holding_current_a, c.dimmer.latching_current_a) for c in seen]
    # rel 1e-12: exact mA → A conversions
    assert [x for p in got for x in p] == pytest.approx([0.035, 0.050, 0.010, 0.050, 0.060, 0.060], rel=1e-12)
