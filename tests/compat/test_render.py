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
    assert all(c in t for c in cautions())


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
    assert "fewest that pass 6; most that pass 20" in t and "220 nF" in t and "325 Ω" in t and "0.25 W" in t
    assert "trailing-edge" in t and "60 × led" in t and all(c in t for c in cautions())
