"""Sizing searches: the bisection helpers, preferred values, and searches over the
real simulator (common practice, no source, for the scenarios)."""
import dataclasses

import pytest

from compat import breaker_band
from compat.evaluate import evaluate
from compat.report import Status, Verdict
from compat.sizing import (E6, E12, _round_up_preferred, correction_resistances_ohm, resistor_rating_w, round_up_series,
                           smallest_correction, x2_rating_v)
from compat.switch_on import breaker_max_counts, largest_passing_below, max_passing, min_passing, switch_on_surge
from loads.breaker import Breaker
from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver


@pytest.mark.analytic
@pytest.mark.parametrize("threshold", [1, 2, 3, 7, 64, 65, 311, 500])
def test_bisection_finds_the_boundary(threshold):
    calls = []

    def ok_up_to(n):
        calls.append(n)
        return n <= threshold

    assert max_passing(ok_up_to, 1, 500) == threshold
    assert len(calls) <= 2 * 10 + 2                      # logarithmic, not a scan
    assert min_passing(lambda n: n >= threshold, 1, 500) == threshold
    assert min_passing(lambda n: False, 1, 500) is None
    assert max_passing(lambda n: False, 1, 500) == 0


@pytest.mark.analytic
def test_preferred_capacitors():
    # E6 series 10, 15, 22, 33, 47, 68 (common practice, no source)
    assert _round_up_preferred(0.3e-6) == pytest.approx(0.33e-6)
    assert _round_up_preferred(12e-9) == pytest.approx(15e-9)
    assert _round_up_preferred(47e-9) == pytest.approx(47e-9)
    assert _round_up_preferred(70e-9) == pytest.approx(100e-9)
    assert _round_up_preferred(2.1e-6) == pytest.approx(2.2e-6)


@pytest.mark.analytic
def test_parts_are_purchasable():
    # IEC 60063 E12 series 10 12 15 18 22 27 33 39 47 56 68 82 (from memory)
    assert round_up_series(325.3, E12) == pytest.approx(330.0)
    assert round_up_series(990.0, E12) == pytest.approx(1000.0)
    assert round_up_series(83.0, E12) == pytest.approx(100.0)
    assert round_up_series(4.7e-6, E6) == pytest.approx(4.7e-6)
    # the resistors the search tries on 230 V are E12 values, and the first still holds the
    # firing spike to 1 A at the mains peak (325 V / 330 Ω = 0.99 A)
    c = Circuit(loads=(ElectronicDriver(name="drv", count=1, rated_power_w=8.0),))
    assert correction_resistances_ohm(c) == pytest.approx((330.0, 1000.0, 3300.0))
    # X2 class for the supply plus 10 %; resistor rated at twice its loss, rounded up
    assert x2_rating_v(230.0) == 275.0 and x2_rating_v(120.0) == 275.0 and x2_rating_v(277.0) == 305.0
    assert x2_rating_v(400.0) is None
    assert resistor_rating_w(0.15) == 0.5 and resistor_rating_w(0.1) == 0.25 and resistor_rating_w(0.9) == 2.0


@pytest.mark.slow
def test_breaker_count_is_the_boundary_in_the_simulation():
    # IEC 60898-1 band, judged by peak and the release's response; the count found
    # holds and one more does not.
    dim = Dimmer(control="phase", wiring="with-neutral", rc_diac=None, rated_load_w=1000.0, min_load_w=10.0,
                 surge_peak_a=500.0, surge_i2t_a2s=500.0)
    c = Circuit(dimmer=dim, breaker=Breaker(curve="B", rated_current_a=6.0),
                loads=(ElectronicDriver(name="drv", count=10, rated_power_w=8.0),))
    n = breaker_max_counts(c)["drv"]
    at = dataclasses.replace(c, loads=(dataclasses.replace(c.loads[0], count=n),))
    over = dataclasses.replace(c, loads=(dataclasses.replace(c.loads[0], count=n + 1),))
    assert 1 <= n < 500
    assert breaker_band.holds(switch_on_surge(at)[1].zone)
    assert not breaker_band.holds(switch_on_surge(over)[1].zone)


def _bypass_that_cures(c):
    """The device ``smallest_correction`` proposes for a failing circuit, checked to make
    it pass the full evaluation at a loss under 5 W."""
    assert evaluate(c).verdict is Verdict.UNSUITABLE
    corr = smallest_correction(c)
    assert corr is not None
    fixed = evaluate(dataclasses.replace(c, correction=corr["device"]))
    assert not [x.id for x in fixed.checks if x.status is Status.FAIL]
    assert 0 < corr["loss_w"] < 5.0
    return corr


@pytest.mark.slow
def test_correction_device_sized_by_search_makes_failing_led_circuit_pass():
    # common practice, no source: a load-correction (R–C bypass) device across LED
    # retrofit lamps on a two-wire leading-edge dimmer keeps the switch conducting, so the
    # lamps stop flickering.  The circuit is the built-in demo (a halogen lamp and four
    # LED retrofits on an rc-diac dimmer), which fails holding and flicker.
    from loads.catalogue import demo_circuit
    c = demo_circuit()
    corr = _bypass_that_cures(c)
    # the confirmed part is the one to buy: E6 capacitance, E12 resistance, X2, rated power
    assert corr["device"].series_capacitance_f == corr["capacitance_f"]
    assert any(corr["capacitance_f"] == pytest.approx(b * 10.0 ** e) for b in E6 for e in range(-9, -5))
    assert any(corr["resistance_ohm"] == pytest.approx(b * 10.0 ** e) for b in E12 for e in range(1, 5))
    assert corr["capacitor_class"] == "X2" and corr["capacitor_rated_voltage_v"] == 275.0
    assert corr["resistor_rating_w"] >= 2 * corr["loss_w"]
    # and it still passes at the low end of the capacitor's tolerance
    low = dataclasses.replace(corr["device"], series_capacitance_f=0.8 * corr["capacitance_f"])
    assert not [x.id for x in evaluate(dataclasses.replace(c, correction=low)).checks if x.status is Status.FAIL]


@pytest.mark.slow
def test_bypass_cures_three_small_lamps_on_a_phase_dimmer():
    # common practice, no source: a load-correction device across a few LED lamps on a
    # leading-edge dimmer stops the misfiring.  With a device fitted, the minimum load is
    # judged by the simulated switch (latching, holding, off-state), not by watts, so the
    # search finds one; the full evaluation confirms that nothing fails with it.
    c = Circuit(name="three LEDs", dimmer=Dimmer(control="phase", wiring="with-neutral", rc_diac=None),
                loads=(ElectronicDriver(name="5 W LED", count=3, rated_power_w=5.0),))
    _bypass_that_cures(c)


@pytest.mark.regression
@pytest.mark.slow
def test_demo_sizing_answer_is_pinned():
    # Our own pinned output (regression, no outside source): `dimfit size` of the built-in
    # demo as it answered on 2 December 2026, before the sizing search was made cheaper.
    # A faster search must give the same lamp counts, device, edge and breaker counts.
    from compat.sizing import size
    from loads.catalogue import demo_circuit
    out = size(demo_circuit())
    halogen, led = "mains halogen lamp 42 W 230 V", "LED retrofit lamp 6 W 230 V, no bleeder"
    assert out["verdict"] == "unsuitable" and out["failing"] == ["holding", "flicker"]
    assert out["counts"] == {halogen: {"count": 1, "fewest": 2, "most": 3, "passes": True},
                             led: {"count": 4, "fewest": None, "most": 5, "passes": False}}
    corr = out["correction"]
    # rtol 1e-9: the parts are E6/E12 values, so any other answer differs by a whole step
    assert corr["capacitance_f"] == pytest.approx(68e-9, rel=1e-9, abs=0.0)
    assert corr["resistance_ohm"] == pytest.approx(3300.0, rel=1e-9, abs=0.0)
    assert corr["failing"] == [] and corr["verdict"] == "suitable-with-cautions"
    assert out["edge"] == {"edge": "trailing", "verdict": "suitable-with-cautions", "failing": []}
    assert out["breaker_curve"] == "B"
    assert out["breaker_counts"] == {halogen: 40, led: 28}
    # rtol 1e-9: arithmetic on the printed ratings (282 W = 400 W × the LED-rule utilisation)
    assert out["rating_needed_w"] == pytest.approx(282.0, rel=1e-9, abs=0.0)


@pytest.mark.analytic
@pytest.mark.parametrize("threshold", [0, 1, 2, 5, 40, 63])
def test_largest_passing_below_finds_the_boundary(threshold):
    # a count found on fewer switch-on angles lies at or above the answer; the answer
    # is searched below it (analytic: a step function, the boundary known)
    calls = []

    def ok(n):
        calls.append(n)
        return n <= threshold

    assert largest_passing_below(ok, 64) == threshold
    assert len(calls) <= 2 * 7 + 1                     # logarithmic in the distance
    assert largest_passing_below(ok, threshold + 1) == threshold


@pytest.mark.analytic
def test_rating_bounds_the_count_search_without_simulating():
    # Closed form on the demo's printed figures: a 400 W leading-edge dimmer with no
    # LED rating counts LED lamps at 10 × their watts (common practice, no source, the
    # rule compat.derating states).  Halogen: 42 n + 4 × 6 × 10 ≤ 400 gives n ≤ 3.8, so 3;
    # LED: 42 + 60 n ≤ 400 gives n ≤ 5.97, so 5.
    from compat.sizing import rating_count_bound
    from loads.catalogue import demo_circuit
    c = demo_circuit()
    assert rating_count_bound(c, 0) == 3
    assert rating_count_bound(c, 1) == 5


@pytest.mark.slow
def test_count_search_simulates_no_count_the_rating_refuses(monkeypatch):
    # the search probes (simulations) stay within the rating's bound, and the counts are
    # those of the pinned demo answer (regression: our own output, see the test above)
    import compat.checks as ck
    import compat.sizing as sz
    from loads.catalogue import demo_circuit
    probed = []
    real = sz._failing_checks

    def recording(circuit, simulator, settings):
        probed.append(circuit)
        return real(circuit, simulator, settings)

    monkeypatch.setattr(sz, "_failing_checks", recording)
    c = dataclasses.replace(demo_circuit(), ranges=())
    known = {c: tuple(x.id for x in evaluate(c).checks if x.status is Status.FAIL)}
    out = sz.count_limits(c, known=known)
    assert probed and all(ck.check_rating(p).status is not Status.FAIL for p in probed)
    assert c not in probed                                   # the full check of the circuit is reused
    assert [(v["fewest"], v["most"]) for v in out.values()] == [(2, 3), (None, 5)]


@pytest.mark.regression
@pytest.mark.slow
@pytest.mark.parametrize("capacitance_nf, settings", [(26.4, 21), (37.6, 21), (54.4, 21), (22.0, 11), (33.0, 11)])
def test_a_probe_stopped_early_answers_as_the_full_judging(monkeypatch, capacitance_nf, settings):
    # The correction search stops a probe at the first failure its full judging cannot
    # excuse.  Regression (our own output, no outside source): the demo with the devices
    # the pinned search probes (3.3 kΩ; 26.4, 37.6 and 54.4 nF are the low ends of 33, 47
    # and 68 nF parts on the full sweep), judged both ways; the stopped probes stop early.
    import compat.checks as ck
    import compat.sizing as sz
    from compat.evaluate import gather, judge
    from loads.catalogue import demo_circuit
    base = dataclasses.replace(demo_circuit(), ranges=())
    c = dataclasses.replace(base, correction=sz.correction_device(base, capacitance_nf * 1e-9, 3300.0))
    among = set(ck.CHECK_IDS) if settings == 21 else sz._ALL
    watches = []

    class Recording(sz._FailureWatch):
        def __init__(self, *a):
            super().__init__(*a)
            self.runs = 0
            watches.append(self)

        def __call__(self, run):
            self.runs += 1
            super().__call__(run)

    monkeypatch.setattr(sz, "_FailureWatch", Recording)
    quick = sz._passes(c, None, settings, among, set())
    full = {r.id for r in judge(gather(c, settings=settings)) if r.status is Status.FAIL} & among
    assert quick == (not full)
    (w,) = watches
    if not quick:
        assert w.failed in full and w.runs < 2 * settings     # stopped before both walks ended
    else:
        assert w.failed is None and w.runs == 2 * settings
