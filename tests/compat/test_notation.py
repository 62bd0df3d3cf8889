"""How figures are written for people (compat.notation)."""
import pytest

from compat.notation import check_figure, margin_text, quantity, setting_text, source_title, sources_text
from loads.sources import SOURCES


@pytest.mark.analytic
@pytest.mark.parametrize("margin, text", [
    (None, "—"), (0.3, "+30 %"), (-0.16, "-16 %"), (0.001, "0 %"), (1.0, "+100 %"), (-1.0, "-100 %"),
    # beyond ±100 %: the ratio of value to limit (lower limit: 1 + m; upper limit: 1 − m)
    (30.66, "32× the need"), (35.8, "37× the need"), (-4.08, "5.1× the limit"), (-40.61, "42× the limit"),
])
def test_margin_is_a_capped_percentage_then_a_ratio(margin, text):
    assert margin_text(margin) == text


@pytest.mark.analytic
def test_each_check_keeps_one_unit():
    # latching and harmonics in mA whatever the size; holding in degrees; others as given
    assert check_figure("latching", 1.583, "A") == "1583 mA"
    assert check_figure("latching", 0.05, "A") == "50.0 mA"
    assert check_figure("harmonics", 0.0556, "A") == "55.6 mA"
    assert check_figure("holding", 142.0, "deg") == "142°"
    assert check_figure("inrush", 33.7, "A") == "33.7 A" and check_figure("inrush", 0.5, "A") == "0.50 A"
    assert quantity(None, "A") == "—" and quantity(float("inf"), "W") == "—"


def test_settings_and_sources_read_one_way():
    assert setting_text(0.55, "down") == "setting 0.55 on the way down"
    assert setting_text(0.0) == "setting 0.00"
    assert source_title("IEC60898_1") == "IEC 60898-1 (circuit-breakers)"
    assert source_title("TRADE") == "common practice, no source"
    assert source_title("NO_SUCH_KEY") == "NO_SUCH_KEY"           # shown as is, never an error
    assert sources_text(["TRADE", "IEC60898_1", "TRADE"]) == "common practice, no source; IEC 60898-1 (circuit-breakers)"
    # every bibliography entry has a short title of its own, shorter than the full one
    assert all(s.short and len(s.short) <= len(s.title) + 30 for s in SOURCES.values())
