"""Text renderings carry every check, the curve and the cautions."""
from compat.cautions import cautions
from compat.render import render_markdown, render_sizing, render_table
from compat.report import CheckResult, Report, Status, Verdict
from loads.circuit import Circuit
from loads.filament import Filament

REPORT = Report(circuit="hall", verdict=Verdict.UNSUITABLE,
                checks=(CheckResult(id="minimum-load", status=Status.FAIL, value=24.0, limit=40.0, unit="W", margin=-0.4,
                                    message="Too little load | really.", remedy="Add load."),
                        CheckResult(id="inrush", status=Status.PASS, value=9.5, limit=80.0, unit="A", margin=0.88,
                                    message="Fine.", safety=True)),
                sweep=({"direction": "down", "setting": 1.0, "firing_angle_deg": 20.0, "conduction_angle_deg": 160.0,
                        "load_rms_v": 228.0, "load_rms_a": 0.3, "power_w": 66.0, "light_fraction": 0.97, "stable": True},
                       {"direction": "up", "setting": 0.0, "firing_angle_deg": None, "conduction_angle_deg": None,
                        "load_rms_v": 0.0, "load_rms_a": 0.0, "power_w": 0.0, "light_fraction": 0.0, "stable": True}),
                cautions=cautions())


def test_table():
    t = render_table(REPORT)
    assert "UNSUITABLE" in t and "minimum-load" in t and "24.0 W" in t and "-40 %" in t and "remedy: Add load." in t
    flat = " ".join(t.split())                            # the table wraps its text at 80 columns
    assert all(c in flat for c in cautions())
    assert max(len(line) for line in t.splitlines()) <= 80


def test_markdown():
    c = Circuit(name="hall", loads=(Filament(name="pendant", count=2),))
    md = render_markdown(REPORT, c)
    assert md.startswith("# hall") and "## Dimming curve" in md and "| down | 1.00 | 20° |" in md
    assert "Too little load \\| really." in md            # table cells escape the pipe
    assert "2 × pendant" in md and "## Remedies" in md and all(x in md for x in cautions())


def test_sizing_text():
    result = {"circuit": "hall", "verdict": "unsuitable", "failing": ["holding"],
              "counts": {"led": {"count": 4, "fewest": 6, "most": 20, "passes": True}},
              "correction": {"capacitance_f": 220e-9, "resistance_ohm": 325.0, "loss_w": 0.25, "rms_current_a": 0.015,
                             "verdict": "suitable-with-cautions", "failing": []},
              "edge": {"edge": "trailing", "verdict": "suitable", "failing": []},
              "rating_needed_w": 240.0, "derating_factor": 1.0, "breaker_curve": "B", "breaker_counts": {"led": 60},
              "surge_peak_a": 12.0}
    t = render_sizing(result)
    assert "passes with 6 to 20" in t and "220 nF" in t and "325 Ω" in t and "0.25 W" in t
    assert "trailing-edge" in t and "60 × led" in t and all(c in t for c in cautions())


def test_sizing_counts_never_contradict_themselves():
    # "fewest that pass none passes; most that pass 5" said two things at once
    base = {"circuit": "hall", "verdict": "unsuitable", "failing": [], "correction": None, "edge": None}
    low_fails = render_sizing(base | {"counts": {"led": {"count": 4, "fewest": None, "most": 5, "passes": False}}})
    assert "no count passes" in low_fails and "up to 5" in low_fails and "none passes" not in low_fails
    high_fails = render_sizing(base | {"counts": {"led": {"count": 4, "fewest": None, "most": None, "passes": False}}})
    assert "even one lamp fails" in high_fails
    one = render_sizing(base | {"counts": {"led": {"count": 4, "fewest": 3, "most": 3, "passes": True}}})
    assert "passes only with 3" in one


def test_sizing_names_parts_to_buy():
    corr = {"capacitance_f": 330e-9, "resistance_ohm": 330.0, "loss_w": 0.15, "rms_current_a": 0.021,
            "verdict": "suitable-with-cautions", "failing": [], "capacitor_series": "E6", "capacitor_tolerance_pct": 20.0,
            "capacitor_class": "X2", "capacitor_rated_voltage_v": 275.0, "resistor_series": "E12",
            "resistor_tolerance_pct": 5.0, "resistor_rating_w": 0.5}
    t = render_sizing({"circuit": "hall", "verdict": "unsuitable", "counts": {}, "correction": corr})
    assert "330 nF capacitor (class X2, rated 275 V AC or more, E6 ±20 %)" in t
    assert "330 Ω resistor (±5 %, 0.5 W or more)" in t and "20 % less capacitance" in t


NA = CheckResult(id="dc-offset", status=Status.NOT_APPLICABLE, value=19.5, limit=None, unit="V", margin=None,
                 message="No iron-core transformer.", safety=True)
MIXED = Report(circuit="units", verdict=Verdict.SUITABLE, checks=(
    CheckResult(id="latching", status=Status.PASS, value=1.84, limit=0.05, unit="A", margin=1.84 / 0.05 - 1,
                message="m", sources=("TEXTBOOK_TRIAC",)),
    CheckResult(id="harmonics", status=Status.PASS, value=0.0556, limit=0.0577, unit="A", margin=1 - 0.0556 / 0.0577,
                message="m", sources=("IEC61000_3_2",)),
    CheckResult(id="flicker", status=Status.FAIL, value=2.02, limit=0.42, unit="%", margin=1 - 2.02 / 0.42,
                message="m", sources=("IEEE1789_2015", "TRADE")),
    NA), cautions=cautions())


def test_one_unit_per_check_and_readable_margins():
    t = render_table(MIXED)
    row = {line.split()[0]: line for line in t.splitlines() if line and line.split()[0] in
           ("latching", "harmonics", "flicker", "dc-offset")}
    assert "1840 mA" in row["latching"] and "50.0 mA" in row["latching"] and "37× the need" in row["latching"]
    assert "55.6 mA" in row["harmonics"] and "57.7 mA" in row["harmonics"] and "+4 %" in row["harmonics"]
    assert "4.8× the limit" in row["flicker"] and "%" not in row["flicker"].split("2.02 %")[1].split("0.42 %")[1]
    # a check that does not apply shows no figure and no safety mark
    assert "19.5" not in row["dc-offset"] and "*" not in row["dc-offset"]


def test_markdown_shows_source_titles_and_one_curve_vocabulary():
    md = render_markdown(MIXED, Circuit(name="units", loads=(Filament(name="pendant", count=2),)))
    assert "IEC 61000-3-2 (harmonic limits)" in md and "common practice, no source" in md
    assert "IEC61000_3_2" not in md and "TRADE" not in md
    md = render_markdown(REPORT, Circuit(name="hall", loads=(Filament(name="pendant", count=2),)))
    head = next(line for line in md.splitlines() if line.startswith("| direction"))
    assert head.endswith("| perceived | CIE L* | stable |") and "steady" not in md
