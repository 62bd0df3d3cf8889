"""``dimfit diagnose``: exit codes, one-line errors, the JSON keys (README), Markdown."""
import json
from pathlib import Path

import pytest

from compat import cli

DATA = Path(__file__).resolve().parents[1] / "data" / "diagnose"
HOT = str(DATA / "hot-le-5x100w.toml")
JSON_KEYS = {"schema", "circuit", "symptom", "verdict", "unknowns", "observations", "cases_run", "cases_kept",
             "mechanisms", "trial_plan", "notes", "cautions"}
MECHANISM_KEYS = {"id", "score", "reproduces", "cases_reproducing", "excess", "description", "evidence",
                  "measurement", "remedy"}
MEASUREMENT_KEYS = {"reading", "tool", "procedure", "unit", "resolution", "resolution_origin", "runner_up",
                    "expected_if_cause", "expected_if_runner_up", "separates", "case", "runner_up_case",
                    "runner_up_at_least", "runner_up_acts"}


@pytest.mark.parametrize("argv, fragment", [
    (["diagnose", HOT, "--symptom", "smoke"], "--symptom: 'smoke' is not a symptom"),
    (["diagnose", HOT, "--symptom", "runs-hot", "--observed", "colour=red"], "--observed: unknown observation"),
    (["diagnose", HOT, "--symptom", "runs-hot", "--observed", "steady_down_to=150%"], "out of range"),
    (["diagnose", HOT], "the following arguments are required: --symptom"),
    (["diagnose", str(DATA / "missing.toml"), "--symptom", "runs-hot"], "missing.toml"),
])
def test_bad_input_exits_2_with_one_line(argv, fragment, capsys):
    assert cli.main(argv) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and fragment in err and "Traceback" not in err


@pytest.mark.slow
def test_json_keys_and_exit_0_when_a_mechanism_reproduces(capsys):
    assert cli.main(["diagnose", HOT, "--symptom", "runs-hot", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert set(out) == JSON_KEYS and out["schema"] == 1 and out["symptom"] == "runs-hot"
    assert out["mechanisms"][0]["id"] == "overload" and out["mechanisms"][0]["reproduces"]
    assert all(set(m) == MECHANISM_KEYS for m in out["mechanisms"])
    assert set(out["mechanisms"][0]["measurement"]) == MEASUREMENT_KEYS
    assert out["unknowns"][0]["key"] == "supply.source_inductance_uh" and out["unknowns"][0]["origin"] == "widened"
    assert out["cautions"] and out["trial_plan"]


@pytest.mark.slow
def test_text_and_markdown_carry_cautions_and_trial_and_exit_1_when_nothing_reproduces(capsys):
    healthy = str(DATA / "ok-le-2x60w-filament.toml")
    assert cli.main(["diagnose", healthy, "--symptom", "runs-hot"]) == 1
    text = capsys.readouterr().out
    assert "No modelled mechanism reproduces the symptom." in text and "Cautions:" in text
    assert cli.main(["diagnose", HOT, "--symptom", "runs-hot", "--markdown"]) == 0
    md = capsys.readouterr().out
    assert md.startswith("# ") and "## Trial on site" in md and "## Cautions" in md and "prove it dead" in md
