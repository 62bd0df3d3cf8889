"""``dimfit selftest``: the compiled simulator against the closed form it prints."""
import math

import pytest

from compat import cli, selftest


@pytest.mark.published
def test_closed_form_is_the_textbook_value():
    # single-phase AC voltage controller, resistive load, 120 V, alpha = 90 deg:
    # V_o = 120 * sqrt(1/2) = 84.85 V (Rashid, Power Electronics, Ex. 11.1);
    # rel 1e-12: the same formula in floating point
    assert selftest.closed_form_rms_v(120.0, 90.0) == pytest.approx(120.0 * math.sqrt(0.5), rel=1e-12)
    assert selftest.closed_form_rms_v(120.0, 0.0) == pytest.approx(120.0, rel=1e-12)


@pytest.mark.analytic
def test_selftest_command_passes_and_says_so(capsys):
    assert cli.main(["selftest"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("dimfit selftest: simulator ready") and out.rstrip().endswith(": ok")


@pytest.mark.analytic
def test_selftest_fails_on_a_wrong_answer(monkeypatch):
    # the check can fail: a closed form that disagrees with the simulation by 1 %
    monkeypatch.setattr(selftest, "closed_form_rms_v", lambda v, a: 1.01 * v * math.sqrt(0.5))
    from loads import simulation
    ok, line = selftest.run(simulation)
    assert not ok and line.endswith("WRONG")
