"""``dimfit describe lamp|dimmer``: profiles from a label (compat/describe.py,
compat/dimmer_label.py).  Behaviour tests of our own interface, and two circuits built
from label-only profiles whose verdicts were written down before they were run:

* A — four 9 W dimmable LED lamps (label only) on a two-wire trailing-edge dimmer
  rated 250 W, LED 100 W, minimum 10 W (faceplate only), 230 V 50 Hz.  Expected:
  suitable, perhaps with cautions (36 W of LED inside the printed LED rating and above
  the minimum on a trailing-edge dimmer is what the trade fits every day: common
  practice, no source); in particular not ``site-test-needed``: nothing it hangs on is
  unknown.
* B — one 9 W dimmable LED lamp (label only) on a two-wire leading-edge dimmer rated
  400 W, minimum 40 W (faceplate only).  Expected: unsuitable, with ``minimum-load``
  failing on the figures that are printed (9 W against 40 W: the trade's first rule,
  common practice, no source), whatever the unknown ranges are.
"""
from __future__ import annotations

import json
import re

import pytest

from compat import cli
from compat.dimmer_label import Faceplate, estimate as dimmer_estimate
from loads.dimmer import Dimmer
from loads.files import RANGEABLE, parse_circuit, profile_to_toml, read_profile_with_ranges
from loads.driver import ElectronicDriver


def _one_error_line(capsys) -> str:
    captured = capsys.readouterr()
    lines = captured.err.splitlines()
    assert len(lines) == 1, captured.err
    assert lines[0].startswith("dimfit: error: ")
    return lines[0]


def _data_part(text: str) -> str:
    """The profile without its leading comment lines (what the writer produces)."""
    return "".join(line + "\n" for line in text.splitlines() if not line.startswith("#"))


LAMP = ["describe", "lamp", "--watts", "9", "--volts", "230"]
DIMMER = ["describe", "dimmer", "--watts", "400", "--min-watts", "40", "--edge", "leading", "--wiring", "two-wire"]


def test_lamp_profile_round_trips_and_keeps_its_ranges(tmp_path, capsys):
    path = tmp_path / "lamp.toml"
    assert cli.main(LAMP + ["--meter-w", "8.8", "--meter-pf", "0.48", "--crest", "3.8", "-o", str(path)]) == 0
    text = path.read_text()
    assert text.startswith("# dimfit describe lamp")
    loads, ranges = read_profile_with_ranges(path)
    (lamp,) = loads
    assert isinstance(lamp, ElectronicDriver) and lamp.rated_power_w == 9.0 and lamp.dimmable
    assert {r.file_key for r in ranges} == {"loads[1].series_resistance_ohm", "loads[1].bulk_capacitance_uf",
                                            "loads[1].input_capacitance_nf", "loads[1].bleeder_ma"}
    # write → read → write gives the same bytes (the comments aside)
    assert profile_to_toml(loads, ranges) == _data_part(text)
    assert capsys.readouterr().out.startswith(f"wrote {path}")


def test_no_overwrite_without_force(tmp_path, capsys):
    path = tmp_path / "lamp.toml"
    path.write_text("keep me\n")
    assert cli.main(LAMP + ["-o", str(path)]) == 2
    line = _one_error_line(capsys)
    assert str(path) in line and "--force" in line
    assert path.read_text() == "keep me\n"
    assert cli.main(LAMP + ["-o", str(path), "--force"]) == 0
    assert path.read_text().startswith("# dimfit describe lamp")
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".")]      # no temporary file left


def test_json_prints_the_ranges_with_units_and_basis(tmp_path, capsys):
    path = tmp_path / "lamp.toml"
    assert cli.main(LAMP + ["--pf", "0.5", "-o", str(path), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["kind"] == "lamp" and doc["file"] == str(path)
    by_key = {r["key"]: r for r in doc["ranges"]}
    r = by_key["loads[1].series_resistance_ohm"]
    assert r["unit"] == "Ω" and 0 < r["min"] < r["max"] and "common practice" in r["basis"]
    assert by_key["loads[1].bulk_capacitance_uf"]["unit"] == "F"     # SI in JSON, as every --json


@pytest.mark.parametrize("argv,option", [
    (["describe", "lamp", "--watts", "-9", "--volts", "230"], "--watts"),
    (LAMP + ["--meter-pf", "1.7"], "--meter-pf"),
    (LAMP + ["--meter-pf", "0.97"], "--meter-pf"),          # beyond a capacitor-input lamp
    (LAMP + ["--crest", "0.2"], "--crest"),
    (LAMP + ["--meter-w", "9", "--meter-va", "4"], "--meter-va"),
    (LAMP + ["--supply-volts", "120"], "--supply-volts"),
    (LAMP + ["--count", "0"], "--count"),
    (LAMP + ["--amps", "abc"], "--amps"),
    (["describe", "dimmer", "--watts", "-5", "--min-watts", "0", "--edge", "leading", "--wiring", "two-wire"],
     "--watts"),
    (["describe", "dimmer", "--watts", "400", "--min-watts", "500", "--edge", "leading", "--wiring", "two-wire"],
     "--min-watts"),
    (["describe", "dimmer", "--watts", "400", "--min-watts", "40", "--edge", "trailing", "--wiring", "two-wire",
      "--control", "rc-diac"], "--control"),
    (DIMMER + ["--led-watts", "900"], "--led-watts"),
])
def test_bad_input_is_one_line_naming_the_option(argv, option, tmp_path, capsys):
    path = tmp_path / "out.toml"
    assert cli.main(argv + ["-o", str(path)]) == 2
    assert option in _one_error_line(capsys)
    assert not path.exists()


def test_dimmer_profile_ranges_are_rangeable_and_round_trip(tmp_path, capsys):
    for edge, wiring in (("leading", "two-wire"), ("leading", "with-neutral"), ("trailing", "two-wire"),
                         ("trailing", "with-neutral")):
        path = tmp_path / f"{edge}-{wiring}.toml"
        argv = ["describe", "dimmer", "--watts", "250", "--min-watts", "10", "--edge", edge, "--wiring", wiring,
                "-o", str(path)]
        assert cli.main(argv) == 0
        dimmer, ranges = read_profile_with_ranges(path)
        assert isinstance(dimmer, Dimmer) and dimmer.edge.value == edge
        assert profile_to_toml(dimmer, ranges) == _data_part(path.read_text())
        for rg in ranges:
            field = rg.path.rsplit(".", 1)[1]
            owner = type(dimmer.rc_diac) if ".rc_diac." in rg.path else Dimmer
            assert (owner, field) in RANGEABLE, rg.path
    capsys.readouterr()


def test_dimmer_ranges_follow_the_kind_of_dimmer():
    rotary = dimmer_estimate(Faceplate(rated_load_w=400, min_load_w=40, edge="leading", wiring="two-wire"))
    assert rotary.fixed["control"] == "rc-diac" and "rc_diac.breakover_v" in rotary.ranges
    assert rotary.fixed["self_supply_a"] == 0.0 and "trip_current_a" not in rotary.ranges
    neutral = dimmer_estimate(Faceplate(rated_load_w=400, min_load_w=40, edge="leading", wiring="with-neutral"))
    assert neutral.fixed["control"] == "phase" and "rc_diac.breakover_v" not in neutral.ranges
    assert neutral.fixed["self_supply_a"] == 0.0                 # fed from its neutral
    transistor = dimmer_estimate(Faceplate(rated_load_w=250, min_load_w=10, edge="trailing", wiring="two-wire"))
    assert "holding_current_a" not in transistor.ranges          # a transistor switch does not latch
    assert transistor.ranges["self_supply_a"] == (0.5e-3, 5e-3)
    # 4–12 × the rated current, 250 W / 230 V (engineering choice, compat/dimmer_label.py)
    assert transistor.ranges["trip_current_a"] == pytest.approx((4 * 250 / 230, 12 * 250 / 230), rel=1e-12)


def _circuit(tmp_path, dimmer_argv, lamp_argv, count: int, name: str):
    d, lp = tmp_path / f"{name}-dimmer.toml", tmp_path / f"{name}-lamp.toml"
    assert cli.main(dimmer_argv + ["-o", str(d)]) == 0
    assert cli.main(lamp_argv + ["-o", str(lp)]) == 0
    body = (f'schema = 1\nname = "{name}"\n\n[supply]\nvoltage_v = 230.0\nfrequency_hz = 50.0\n'
            + re.sub(r"^schema = 1\n", "", _data_part(d.read_text()))
            + re.sub(r"^schema = 1\n", "", _data_part(lp.read_text())).replace("count = 1", f"count = {count}"))
    path = tmp_path / f"{name}.toml"
    path.write_text(body)
    return path


@pytest.mark.slow
def test_circuit_a_label_only_on_a_trailing_edge_dimmer_checks_suitable(tmp_path, capsys):
    path = _circuit(tmp_path, ["describe", "dimmer", "--watts", "250", "--led-watts", "100", "--min-watts", "10",
                               "--edge", "trailing", "--wiring", "two-wire"], LAMP, 4, "A")
    circuit = parse_circuit(path.read_text(), str(path))
    assert len(circuit.ranges) == 6       # trip, self-supply; R, C, C_in, bleeder
    capsys.readouterr()
    code = cli.main(["check", str(path), "--json"])
    report = json.loads(capsys.readouterr().out)
    assert report["verdict"] in ("suitable", "suitable-with-cautions"), report["verdict"]
    assert code == 0


@pytest.mark.slow
def test_circuit_b_one_lamp_below_a_rotary_dimmers_minimum_is_unsuitable(tmp_path, capsys):
    path = _circuit(tmp_path, DIMMER, LAMP, 1, "B")
    capsys.readouterr()
    assert cli.main(["check", str(path), "--json"]) == 1
    report = json.loads(capsys.readouterr().out)
    assert report["verdict"] == "unsuitable"
    minimum = next(c for c in report["checks"] if c["id"] == "minimum-load")
    assert minimum["status"] == "fail" and not minimum.get("deciding_input")


def test_switch_ratings_follow_the_dimmers_rating():
    # our own rule (engineering choice, compat/dimmer_label.py): the reference dimmer's
    # figures at its own rating, peaks ∝ rated current, I²t ∝ its square; exact to rounding
    same = dimmer_estimate(Faceplate(rated_load_w=250, min_load_w=10, edge="trailing", wiring="two-wire")).fixed
    assert (same["surge_peak_a"], same["surge_i2t_a2s"], same["repetitive_peak_a"]) == pytest.approx(
        (40.0, 8.0, 10.0), rel=1e-12)
    double = dimmer_estimate(Faceplate(rated_load_w=800, min_load_w=40, edge="leading", wiring="with-neutral")).fixed
    assert (double["surge_peak_a"], double["surge_i2t_a2s"], double["repetitive_peak_a"]) == pytest.approx(
        (160.0, 120.0, 40.0), rel=1e-12)
