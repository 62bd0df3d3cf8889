"""Circuit and profile files: strict reading, exact round trip, atomic writes.

These are file-format tests (our own behaviour, docs/design.md, Files), not physics: no outside
reference is involved, so they carry no published/reference_sim/analytic marker.
"""
from __future__ import annotations

import dataclasses
import math
import os
import re
from pathlib import Path

import pytest

from loads import catalogue, files
from loads.circuit import LOAD_CLASSES, Circuit, Range
from loads.dimmer import Dimmer, GateDrive
from loads.driver import ElectronicDriver
from loads.errors import InputError
from loads.filament import Filament
from loads.linear import Linear

DATA = Path(__file__).resolve().parent.parent / "data"
BAD = DATA / "bad"
GOOD_FILES = sorted(DATA.glob("*.toml"))
REPO = Path(__file__).resolve().parents[2]

# file name -> (line or None, key or None, a fragment of the reason)
EXPECTED = {
    "malformed.toml": (12, None, "malformed TOML"),
    "unknown_key_top.toml": (3, "colour", "unknown key"),
    "unknown_key_dimmer.toml": (15, "dimmer.holding_current", "unknown key (did you mean 'holding_current_ma'?)"),
    "unknown_key_loads.toml": (28, "loads[2].input_capacitance_f", "unknown key (did you mean 'input_capacitance_nf'?)"),
    "unknown_key_rc_diac.toml": (18, "dimmer.rc_diac.breakover_voltage", "unknown key"),
    "correction_unknown_key.toml": (32, "correction.inductance_mh", "unknown key"),
    "wrong_type_string.toml": (5, "supply.voltage_v", "must be a number, not a text string"),
    "wrong_type_bool.toml": (19, "loads[1].rated_power_w", "must be a number, not true/false"),
    "wrong_type_count.toml": (24, "loads[2].count", "must be a whole number, not a decimal number"),
    "negative_wattage.toml": (19, "loads[1].rated_power_w", "-60.0 W must be between 0 and 10 kW"),
    "negative_ma.toml": (14, "dimmer.holding_current_ma", "-5 mA must be positive"),
    "zero_hz.toml": (6, "supply.frequency_hz", "0.0 Hz is not a mains frequency"),
    "nan_value.toml": (5, "supply.voltage_v", "must be a finite number"),
    "missing_schema.toml": (1, "schema", "required key is missing"),
    "wrong_schema.toml": (1, "schema", "unsupported schema 2"),
    "missing_key.toml": (4, "supply.voltage_v", "required key is missing"),
    "missing_supply.toml": (None, "supply", "required [supply] table is missing"),
    "unknown_kind.toml": (23, "loads[2].kind", "unknown load kind 'led'"),
    "missing_kind.toml": (22, "loads[2].kind", "required key is missing"),
    "bad_enum.toml": (9, "dimmer.edge", "'middle' is not one of \"leading\", \"trailing\""),
    "range_min_above_max.toml": (27, "loads[2].input_capacitance_nf", "range min 100 is above max 22"),
    "range_not_allowed.toml": (12, "dimmer.rated_load_w", "a range {min, max} is not allowed for this key"),
    "range_bad_end.toml": (14, "dimmer.holding_current_ma", "range min: -5 mA must be positive"),
    "range_extra_key.toml": (14, "dimmer.holding_current_ma", "unknown key 'typ'"),
    "no_loads.toml": (None, "loads", "at least one lamp group"),
    "empty_loads.toml": (3, "loads", "0 lamp groups: at least one is needed"),
    "loads_not_array.toml": (16, "loads", "must be an array of tables"),
    "count_zero.toml": (24, "loads[2].count", "0 must be a whole number 1–500"),
    "rc_diac_on_trailing.toml": (11, "dimmer.control", "needs a leading-edge dimmer"),
    "not_utf8.toml": (None, None, "not a UTF-8 text file"),
}


def test_every_bad_file_has_an_expectation():
    assert sorted(p.name for p in BAD.glob("*.toml")) == sorted(EXPECTED)


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_bad_file_gives_one_line_naming_file_line_and_key(name):
    line, key, reason = EXPECTED[name]
    path = BAD / name
    with pytest.raises(InputError) as info:
        files.read_circuit(path)
    message = str(info.value)
    assert "\n" not in message
    where = f"{path}:{line}" if line else f"{path}"
    expected_prefix = f"{where}: {key}: " if key else f"{where}: "
    assert message.startswith(expected_prefix), message
    assert reason in message, message


def test_malformed_toml_line_is_tomllibs():
    with pytest.raises(InputError) as info:
        files.parse_circuit("schema = 1\n\n[supply]\nvoltage_v = = 3\n", source="x.toml")
    assert str(info.value).startswith("x.toml:4: malformed TOML")


def test_unreadable_file_is_an_input_error(tmp_path):
    with pytest.raises(InputError, match="cannot read the file"):
        files.read_circuit(tmp_path / "missing.toml")
    with pytest.raises(InputError, match="cannot read the file"):
        files.read_circuit(tmp_path)            # a folder


def test_newline_in_a_quoted_key_stays_on_one_line():
    text = (DATA / "filament_hall.toml").read_text().replace("[supply]\n", '[supply]\n"a\\nb" = 1\n')
    with pytest.raises(InputError) as info:
        files.parse_circuit(text, "f.toml")
    assert "\n" not in str(info.value) and "unknown key" in str(info.value)


# ------------------------------------------------------------------- key table

ALLOWED_SUFFIXES = ("_v", "_hz", "_w", "_va", "_a", "_ma", "_ohm", "_uh", "_mh", "_nf", "_uf", "_us", "_ms",
                    "_k", "_c", "_pct", "_deg", "_a2s")
UNITLESS = {"name", "count", "gang", "fins_removed", "max_lamps", "edge", "wiring", "control", "curve",
            "bleeder_kind", "dimmable", "low_end_trim", "rc_diac", "gate_drive", "saturation_flux_ratio", "saturated_inductance_ratio"}


def test_every_field_of_every_model_has_a_file_key_with_a_unit():
    for cls, table in files.KEYS.items():
        fields = {f.name for f in dataclasses.fields(cls)}
        assert {k.field for k in table.values()} == fields, cls
        for key in table.values():
            if key.file_key in UNITLESS:
                continue
            assert key.file_key.endswith(ALLOWED_SUFFIXES), f"{cls.__name__}.{key.field} -> {key.file_key}"
            # no SI-only units in files (H, F, s, fraction)
            assert not re.search(r"_(h|f|s|fraction)$", key.file_key), key.file_key


@pytest.mark.parametrize("field, file_key, per_si", [
    ("holding_current_a", "holding_current_ma", 1e3),
    ("choke_inductance_h", "choke_inductance_uh", 1e6),
    ("gate_window_s", "gate_window_us", 1e6),
    ("snubber_capacitance_f", "snubber_capacitance_nf", 1e9),
    ("self_supply_a", "self_supply_ma", 1e3),
])
def test_dimmer_unit_map(field, file_key, per_si):
    key = files.KEYS[Dimmer][file_key]
    assert (key.field, key.per_si) == (field, per_si)


def test_scaled_values_read_in_si():
    c = files.read_circuit(DATA / "led_120v.toml")
    driver = c.loads[0]
    assert isinstance(driver, ElectronicDriver)
    # 100 nF, 10 µF, 20 mA, 3 % in the file
    assert driver.input_capacitance_f == pytest.approx(100e-9, rel=1e-15)   # exact decimal scaling
    assert driver.bulk_capacitance_f == pytest.approx(10e-6, rel=1e-15)
    assert driver.bleeder_a == pytest.approx(0.020, rel=1e-15)
    assert driver.min_light_fraction == pytest.approx(0.03, rel=1e-15)
    assert c.dimmer.gate_window_s == pytest.approx(500e-6, rel=1e-15)


# ------------------------------------------------------------------ round trip

def _round_trip_circuit(circuit: Circuit) -> None:
    text = files.circuit_to_toml(circuit)
    again = files.parse_circuit(text, "written.toml")
    assert files.circuit_to_toml(again) == text
    # and a third time from the re-read object: still identical
    assert files.circuit_to_toml(files.parse_circuit(files.circuit_to_toml(again))) == text


@pytest.mark.parametrize("path", GOOD_FILES, ids=lambda p: p.name)
def test_good_file_round_trips_byte_identical(path, tmp_path):
    circuit = files.read_circuit(path)
    _round_trip_circuit(circuit)
    first = tmp_path / "a.toml"
    files.write_circuit(circuit, first)
    second = tmp_path / "b.toml"
    files.write_circuit(files.read_circuit(first), second)
    assert first.read_bytes() == second.read_bytes()


def test_there_are_good_files():
    assert {p.name for p in GOOD_FILES} >= {"rashid4_ex11_1.toml", "filament_hall.toml", "led_kitchen.toml"}


def test_demo_round_trips_and_equals_its_written_form():
    demo = catalogue.demo_circuit()
    _round_trip_circuit(demo)
    assert files.parse_circuit(files.circuit_to_toml(demo)) == demo


def test_demo_matches_design():
    demo = catalogue.demo_circuit()
    assert (demo.supply.voltage_v, demo.supply.frequency_hz) == (230.0, 50.0)
    assert (demo.breaker.curve.value, demo.breaker.rated_current_a) == ("B", 10.0)
    d = demo.dimmer
    assert (d.edge.value, d.wiring.value, d.control.value, d.rated_load_w, d.min_load_w) == \
        ("leading", "two-wire", "rc-diac", 400.0, 40.0)
    assert len(demo.loads) == 2
    halogen, led = demo.loads
    assert isinstance(halogen, Filament) and (halogen.count, halogen.rated_power_w) == (1, 42.0)
    assert isinstance(led, ElectronicDriver) and (led.count, led.rated_power_w, led.bleeder_a) == (4, 6.0, 0.0)
    assert demo.ranges == ()


def test_demo_parts_are_the_catalogue_archetypes():
    demo = catalogue.demo_circuit()
    assert demo.dimmer == catalogue.get(demo.dimmer.name).object
    for group in demo.loads:
        assert dataclasses.replace(group, count=1) == catalogue.get(group.name).object


def test_every_archetype_round_trips():
    archetypes = catalogue.list_archetypes()
    assert len(archetypes) >= 20
    for a in archetypes:
        text = files.profile_to_toml(a.object)
        obj, ranges = files.parse_profile(text, a.name)
        obj = obj if a.kind == "dimmer" else obj[0]
        assert obj == a.object, a.name
        assert files.profile_to_toml(obj) == text, a.name
        assert ranges == ()


def test_catalogue_contents():
    names = {a.name for a in catalogue.list_archetypes()}
    for w in (25, 40, 60, 100):
        for v in (230, 120):
            assert f"filament lamp {w} W {v} V" in names
    for w in (42, 70):
        halogen = catalogue.get(f"mains halogen lamp {w} W 230 V").object
        assert halogen.operating_temperature_k == pytest.approx(3000.0, abs=200.0)   # mains halogen 2900–3200 K
    for w in (5, 6, 9):
        assert f"LED retrofit lamp {w} W 230 V, no bleeder" in names
        assert catalogue.get(f"LED retrofit lamp {w} W 230 V, with bleeder").object.bleeder_a > 0
    kinds = {type(a.object).__name__ for a in catalogue.list_archetypes()}
    assert kinds >= {"Dimmer", "Filament", "ElectronicDriver", "MagneticTransformer", "ElectronicTransformer"}
    edges = {(a.object.edge.value, a.object.control.value) for a in catalogue.list_archetypes() if a.kind == "dimmer"}
    assert edges == {("leading", "rc-diac"), ("leading", "phase"), ("trailing", "phase")}
    with pytest.raises(KeyError):
        catalogue.get("no such lamp")


def test_catalogue_files_are_labelled_invented_and_commented():
    folder = Path(catalogue.__file__).parent
    for path in folder.glob("*.toml"):
        text = path.read_text(encoding="utf-8")
        assert "invented" in text.splitlines()[0].lower(), path.name
        for line in text.splitlines():
            if re.match(r"\s*[a-z_]+\s*=", line) and not line.startswith(("schema", "kind")):
                assert "#" in line, f"{path.name}: value without a comment on its origin: {line!r}"


def test_every_load_kind_round_trips_with_every_field_changed():
    """Each field set away from its default survives write → read (the key table is complete)."""
    for kind, cls in LOAD_CLASSES.items():
        base = cls(name=f"test {kind.value}", rated_voltage_v=230.0, rated_power_w=20.0)
        text = files.profile_to_toml([base])
        (back,), _ = files.parse_profile(text)
        assert back == base
        for key in files.KEYS[cls].values():
            if key.kind != "float":
                continue
            value = getattr(base, key.field)
            if value is None:
                continue
            nudged = value * 1.01 if value else 1.0 / key.per_si   # 1 file unit: inside every physical range
            try:
                changed = dataclasses.replace(base, **{key.field: nudged})
            except InputError:
                continue
            (back,), _ = files.parse_profile(files.profile_to_toml([changed]))
            assert math.isclose(getattr(back, key.field), nudged, rel_tol=1e-11), (cls.__name__, key.field)


def test_dimmer_rc_diac_and_optional_fields_round_trip():
    d = Dimmer(name="x", rated_transformer_va=300.0, rated_led_w=120.0, max_lamps=10, gate_window_s=47e-6,
               snubber_capacitance_f=47e-9)
    (text) = files.profile_to_toml(d)
    assert "snubber_capacitance_nf = 47.0\n" in text and "gate_window_us = 47.0\n" in text
    assert "[dimmer.rc_diac]" in text
    back, _ = files.parse_profile(text)
    assert back == d
    phase = Dimmer(name="p", control="phase", rc_diac=None)
    back, _ = files.parse_profile(files.profile_to_toml(phase))
    assert back == phase and back.rc_diac is None


def test_floats_are_written_in_practitioner_units_without_noise():
    c = files.parse_circuit((DATA / "filament_hall.toml").read_text())
    c = dataclasses.replace(c, loads=(ElectronicDriver(input_capacitance_f=47 * 1e-9, bulk_capacitance_f=4.7e-6,
                                                       bleeder_a=0.0123, min_light_fraction=0.07),))
    text = files.circuit_to_toml(c)
    assert "input_capacitance_nf = 47.0\n" in text
    assert "bulk_capacitance_uf = 4.7\n" in text
    assert "bleeder_ma = 12.3\n" in text
    assert "min_light_pct = 7.0\n" in text


def test_correction_device():
    c = files.read_circuit(DATA / "led_kitchen.toml")
    assert isinstance(c.correction, Linear)
    assert c.correction.series_capacitance_f == pytest.approx(220e-9, rel=1e-15)
    assert c.correction.resistance_ohm == 470.0
    text = files.circuit_to_toml(c)
    section = text.split("[correction]\n", 1)[1]
    assert sorted(line.split(" = ")[0] for line in section.strip().splitlines()) == sorted(files.CORRECTION_KEYS)


def test_readme_example_is_a_valid_circuit():
    readme = (REPO / "README.md").read_text(encoding="utf-8")
    block = re.search(r"```toml\n(.*?)```", readme, re.S).group(1)
    c = files.parse_circuit(block, "README.md")
    assert len(c.loads) == 2 and len(c.ranges) == 1


# ---------------------------------------------------------------------- ranges

def test_ranges_give_midpoint_and_si_bounds():
    c = files.read_circuit(DATA / "led_kitchen.toml")
    by_key = {r.file_key: r for r in c.ranges}
    assert set(by_key) == {"supply.source_resistance_ohm", "dimmer.self_supply_ma", "loads[1].input_capacitance_nf"}
    r = by_key["loads[1].input_capacitance_nf"]
    assert r == Range("loads[1].input_capacitance_f", "loads[1].input_capacitance_nf", 22e-9, 100e-9)
    assert c.loads[0].input_capacitance_f == pytest.approx(61e-9, rel=1e-12)     # the midpoint
    assert c.dimmer.self_supply_a == pytest.approx(3.5e-3, rel=1e-12)
    assert c.supply.source_resistance_ohm == pytest.approx(0.75, rel=1e-12)


def test_ranges_round_trip_as_inline_min_max():
    c = files.read_circuit(DATA / "led_kitchen.toml")
    text = files.circuit_to_toml(c)
    assert "input_capacitance_nf = { min = 22.0, max = 100.0 }\n" in text
    assert "self_supply_ma = { min = 2.0, max = 5.0 }\n" in text
    assert files.parse_circuit(text).ranges == c.ranges


def test_range_of_a_changed_value_is_dropped_not_written():
    c = files.read_circuit(DATA / "led_kitchen.toml")
    edited = dataclasses.replace(c, dimmer=dataclasses.replace(c.dimmer, self_supply_a=4e-3))
    text = files.circuit_to_toml(edited)
    assert "self_supply_ma = 4.0\n" in text
    assert {r.file_key for r in files.parse_circuit(text).ranges} == {"supply.source_resistance_ohm",
                                                                      "loads[1].input_capacitance_nf"}


def test_every_rangeable_key_accepts_a_range():
    for cls, field in files.RANGEABLE:
        assert files.KEYS[cls][files.file_key_of(cls, field)].rangeable


def test_range_on_rc_diac_breakover():
    text = (DATA / "filament_hall.toml").read_text().replace("breakover_v = 32.0", "breakover_v = { min = 28.0, max = 36.0 }")
    c = files.parse_circuit(text)
    assert c.dimmer.rc_diac.breakover_v == 32.0
    assert c.ranges == (Range("dimmer.rc_diac.breakover_v", "dimmer.rc_diac.breakover_v", 28.0, 36.0),)
    assert files.parse_circuit(files.circuit_to_toml(c)).ranges == c.ranges


def test_profile_ranges_round_trip(tmp_path):
    text = """schema = 1
[[loads]]
kind = "electronic-driver"
rated_power_w = 5.0
rated_voltage_v = 230.0
bulk_capacitance_uf = { min = 2.2, max = 6.8 }
"""
    obj, ranges = files.parse_profile(text)
    assert ranges == (Range("loads[1].bulk_capacitance_f", "loads[1].bulk_capacitance_uf", 2.2e-6, 6.8e-6),)
    path = files.write_profile(obj, tmp_path / "p.toml", ranges=ranges)
    assert files.read_profile_with_ranges(path) == (obj, ranges)


# -------------------------------------------------------------- atomic writes

def test_write_refuses_to_overwrite_and_leaves_no_temp_files(tmp_path):
    circuit = catalogue.demo_circuit()
    target = tmp_path / "c.toml"
    target.write_text("precious")
    with pytest.raises(InputError, match="already exists; not overwritten"):
        files.write_circuit(circuit, target)
    assert target.read_text() == "precious"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["c.toml"]
    files.write_circuit(circuit, target, overwrite=True)
    assert files.read_circuit(target) == circuit
    assert sorted(p.name for p in tmp_path.iterdir()) == ["c.toml"]


def test_failed_write_leaves_old_file_and_no_temp(tmp_path, monkeypatch):
    target = tmp_path / "c.toml"
    target.write_text("old")

    def broken_replace(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(InputError, match="cannot write the file: No space left on device"):
        files.write_circuit(catalogue.demo_circuit(), target, overwrite=True)
    assert target.read_text() == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["c.toml"]


def test_written_file_has_ordinary_permissions(tmp_path):
    target = files.write_circuit(catalogue.demo_circuit(), tmp_path / "c.toml")
    mask = os.umask(0o022)
    os.umask(mask)
    assert target.stat().st_mode & 0o777 == 0o666 & ~mask


def test_profiles_folder(tmp_path, monkeypatch):
    monkeypatch.setenv("DIMFIT_PROFILE_DIR", str(tmp_path / "profiles"))
    assert files.profile_dir() == tmp_path / "profiles"
    assert files.list_profiles() == []
    lamp = catalogue.get("LED retrofit lamp 9 W 230 V, with bleeder").object
    dimmer = catalogue.get("two-wire trailing-edge 250 W").object
    p1 = files.save_profile(lamp, "My LED lamp, 9 W!")
    p2 = files.save_profile(dimmer, "Hall dimmer")
    assert p1.name == "my-led-lamp-9-w.toml"
    assert files.list_profiles() == sorted([p1, p2])
    assert files.read_profile(p1) == [lamp]
    assert files.read_profile(p2) == dimmer
    with pytest.raises(InputError, match="already exists"):
        files.save_profile(lamp, "my led lamp 9 w")
    files.save_profile(dataclasses.replace(lamp, count=2), "my led lamp 9 w", overwrite=True)
    assert files.read_profile(p1)[0].count == 2


def test_profile_dir_default_is_user_data_folder(monkeypatch):
    monkeypatch.delenv("DIMFIT_PROFILE_DIR", raising=False)
    path = files.profile_dir()
    assert path.name == "profiles" and "dimfit" in str(path)


def test_profile_must_hold_dimmer_or_loads():
    with pytest.raises(InputError, match="either one"):
        files.parse_profile("schema = 1\n", "p.toml")
    with pytest.raises(InputError, match=r"p.toml:2: supply: unknown key"):
        files.parse_profile("schema = 1\n[supply]\nvoltage_v = 230.0\n", "p.toml")


def test_triac_turn_off_time_round_trips_and_is_checked():
    d = Dimmer(name="t", triac_turn_off_time_s=35e-6)
    text = files.profile_to_toml(d)
    assert "triac_turn_off_time_us = 35.0\n" in text
    back, _ = files.parse_profile(text)
    assert back == d
    bad = text.replace("triac_turn_off_time_us = 35.0", "triac_turn_off_time_us = 5000.0")
    with pytest.raises(InputError) as e:
        files.parse_profile(bad, "p.toml")
    msg = str(e.value)
    assert "\n" not in msg and "p.toml" in msg and "triac_turn_off_time_us" in msg


def test_gate_drive_and_soft_start_round_trip_and_bad_values_name_the_key():
    d = Dimmer(name="x", control="phase", rc_diac=None, gate_drive="single-pulse", soft_start_s=0.12)
    text = files.profile_to_toml(d)
    assert 'gate_drive = "single-pulse"\n' in text and "soft_start_ms = 120.0\n" in text
    back, _ = files.parse_profile(text)
    assert back == d and back.gate_drive is GateDrive.SINGLE_PULSE
    assert Dimmer().gate_drive is GateDrive.RETRIGGER and Dimmer().soft_start_s == 0.05
    for bad, key in (('gate_drive = "held"', "gate_drive"), ("soft_start_ms = -5.0", "soft_start_ms")):
        wrong = re.sub(r"^" + key + r" = .*$", bad, text, flags=re.M)
        with pytest.raises(InputError) as info:
            files.parse_profile(wrong, "p.toml")
        assert key in str(info.value) and "\n" not in str(info.value)


def test_input_damping_round_trips_and_is_checked():
    from loads.driver import ElectronicDriver
    d = ElectronicDriver(name="lamp", count=2, rated_power_w=9.0, input_damping_ohm=68.0)
    text = files.profile_to_toml([d])
    assert "input_damping_ohm = 68.0\n" in text
    back, _ = files.parse_profile(text)
    assert back == [d]
    with pytest.raises(InputError) as e:
        files.parse_profile(text.replace("input_damping_ohm = 68.0", "input_damping_ohm = -1.0"), "p.toml")
    assert "\n" not in str(e.value) and "input_damping_ohm" in str(e.value) and "p.toml" in str(e.value)
