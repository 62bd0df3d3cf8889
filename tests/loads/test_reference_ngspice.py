"""Our circuit simulator against ngspice, run live on the same circuits.

The decks are in ``tests/data/spice/`` (see its README for what each models and how to
rerun it); ``tests/ngspice.py`` runs them and measures their waveforms, and builds the
same circuits from our dataclasses.  Each ngspice run is a few mains cycles at the
converged step of the step studies (``tests/data/spice/README.md``), from
the same cold start as ours (everything at 0 V, 0 A at t = 0, supply phase 0).

Tolerances come from the issue that asked for these checks: peak currents within 2 %,
rms values within 1 %, event times within 1 % of the half-cycle or 20 µs, firing angles
within 2°.  For event times we apply the tighter of the two (20 µs is 0.43° at 60 Hz,
0.36° at 50 Hz): 1 % of a half-cycle (83–100 µs) would be as long as the ~100 µs
conduction of case (c) itself, a check that could not fail.  Where the issue gives no
tolerance (the bus-capacitor voltage of case c) the bus extremes are held to the rms
tolerance, 1 % of their value, which we chose; it is said beside the check.

Without ngspice these tests are skipped with a reason, except with CI=true, where they fail.
"""
from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

from tests import ngspice as ng

pytestmark = pytest.mark.reference_sim

# --- tolerances: from the issue (see module docstring) -------------------------------
PEAK_RTOL = 0.02            # issue: peak current within 2 %
RMS_RTOL = 0.01             # issue: rms within 1 %
EVENT_ATOL_S = 20e-6        # issue: 1 % of the half-cycle or 20 µs; the tighter applies
EVENT_HALF_CYCLE_FRACTION = 0.01
ANGLE_ATOL_DEG = 2.0        # issue: firing angles within 2°
BUS_RTOL = 0.01             # our choice (no figure in the issue): as the rms tolerance

# Resampling grid for our waveforms: 4000 per cycle (4.2 µs at 60 Hz) keeps the sampled
# peak of a sine within 3e-7 of the true one, 1 − cos(0.045°) (engineering choice).
SAMPLES_PER_CYCLE = 4000

RC_DIAC_POTS_OHM = (0.0, 50e3, 100e3, 125e3)


def event_atol_s(frequency_hz: float) -> float:
    return min(EVENT_HALF_CYCLE_FRACTION * 0.5 / frequency_hz, EVENT_ATOL_S)


def event_atol_deg(frequency_hz: float) -> float:
    return event_atol_s(frequency_hz) * 360.0 * frequency_hz


# --- running both sides ----------------------------------------------------------------
def _ours(case: ng.Case, samples_per_cycle: int = SAMPLES_PER_CYCLE, **params: float):
    from loads.simulation import simulate

    circuit = ng.our_circuit(case, **params)
    if case.firing_angle_deg is not None:
        return simulate(circuit, firing_angle_deg=case.firing_angle_deg, cycles=case.cycles,
                        start="cold", samples_per_cycle=samples_per_cycle)
    return simulate(circuit, setting=ng.our_setting(case, **params), cycles=case.cycles,
                    start="cold", samples_per_cycle=samples_per_cycle)


def _half_cycle_windows(case: ng.Case) -> list[tuple[float, float]]:
    half = 0.5 * case.period_s
    return [(k * half, (k + 1) * half) for k in range(2 * case.cycles)]


def _spice_half_cycles(case: ng.Case, run: ng.Run, switch: str, load: str, volt: str,
                       holding_a: float, gate_s: float) -> dict[str, np.ndarray]:
    """Per half-cycle figures from an ngspice run, defined as our HalfCycles fields."""
    t = run.t
    i_sw = np.abs(run.data[switch])
    out: dict[str, list[float]] = {k: [] for k in
                                   ("fire_deg", "ext_deg", "above_s", "peak_sw_a", "peak_load_a",
                                    "rms_a", "rms_v")}
    deg = 360.0 * case.frequency_hz
    half = 0.5 * case.period_s
    for t0, t1 in _half_cycle_windows(case):
        t_fire = ng.first_rise_above(t, i_sw, holding_a, t0, t1)
        out["fire_deg"].append((t_fire - t0) * deg)
        # end of that conduction: the current falls below I_H after the gate drive ended
        # (gate_s); it may run into the next half-cycle (R–L)
        t_end = ng.first_fall_below(t, i_sw, holding_a, t_fire + gate_s, t_fire + half) \
            if not math.isnan(t_fire) else math.nan
        out["ext_deg"].append((t_end - t0) * deg)
        out["above_s"].append(ng.time_above(t, i_sw, holding_a, t0, t1))
        out["peak_sw_a"].append(ng.peak(t, i_sw, t0, t1))
        out["peak_load_a"].append(ng.peak(t, run.data[load], t0, t1))
        out["rms_a"].append(ng.rms(t, run.data[load], t0, t1))
        out["rms_v"].append(ng.rms(t, run.data[volt], t0, t1))
    return {k: np.array(v) for k, v in out.items()}


def _our_peak_per_half_cycle(res, wave: np.ndarray) -> np.ndarray:
    """max |wave| in each half-cycle of our resampled waveform."""
    half = 0.5 / res.frequency_hz
    k = np.floor((res.t_s + 1e-12) / half).astype(int)
    n = len(res.half_cycles)
    return np.array([np.max(np.abs(wave[k == j])) if np.any(k == j) else math.nan for j in range(n)])


def _cycles_rms(per_half: np.ndarray, first_half: int) -> float:
    """rms over half-cycles first_half… (equal lengths: root of the mean square)."""
    return float(np.sqrt(np.mean(per_half[first_half:] ** 2)))


def _assert_close(name: str, ours, spice, *, rtol: float = 0.0, atol: float = 0.0) -> None:
    ours, spice = np.asarray(ours, float), np.asarray(spice, float)
    assert ours.shape == spice.shape, f"{name}: ours {ours.shape} vs ngspice {spice.shape}"
    bad = ~np.isclose(ours, spice, rtol=rtol, atol=atol, equal_nan=True)
    assert not np.any(bad), (f"{name}: ours {np.round(ours[bad], 6).tolist()} vs ngspice "
                             f"{np.round(spice[bad], 6).tolist()} at half-cycles "
                             f"{np.nonzero(bad)[0].tolist()} (rtol {rtol}, atol {atol})")


# --- the fixture machinery itself -------------------------------------------------------
def test_missing_ngspice_skips_locally_and_fails_on_ci(monkeypatch):
    monkeypatch.setattr(ng, "find_ngspice", lambda: None)
    monkeypatch.delenv("CI", raising=False)
    with pytest.raises(pytest.skip.Exception):
        ng.require_ngspice()
    monkeypatch.setenv("CI", "true")
    with pytest.raises(pytest.fail.Exception):
        ng.require_ngspice()


@pytest.mark.analytic
def test_measurements_on_a_sine():
    # The measuring helpers on a 50 Hz unit sine sampled on an uneven grid, against
    # closed forms: rms 1/sqrt(2); zero crossings at k*T/2; |sin| >= 0.5 for 2/3 of each
    # half-cycle; peak 1.  rtol 1e-5 / atol 1e-8 s: trapezoid and linear-interpolation
    # errors at ~2 µs spacing are ~1e-7 relative.
    period = 0.02
    rng = np.random.default_rng(1)
    t = np.sort(np.concatenate(([0.0, 3 * period], rng.uniform(0.0, 3 * period, 30000))))
    y = np.sin(2 * np.pi * t / period)
    assert ng.rms_cycles(t, y, period, 0, 2) == pytest.approx(math.sqrt(0.5), rel=1e-5)
    np.testing.assert_allclose(ng.crossings(t, y, 0.0, +1, 1e-4, 3 * period - 1e-4), [period, 2 * period],
                               atol=1e-8)
    assert ng.time_above(t, y, 0.5, period / 2, period) == pytest.approx(period / 3, rel=1e-5)
    assert ng.peak(t, y, 0, period) == pytest.approx(1.0, rel=1e-5)
    assert ng.first_rise_above(t, y, 0.5, 0, period) == pytest.approx(period / 12, abs=1e-8)
    assert ng.first_fall_below(t, y, 0.5, 0, period) == pytest.approx(5 * period / 12, abs=1e-8)


def test_aborted_transient_is_an_error(ngspice_exe):
    # Case (c) with gear and without the damping resistor across L_line aborts with
    # "Timestep too small" at ~5 ms (found while building the deck); ngspice still exits
    # with status 0, so run_deck must find the abort in the log.
    text = (ng.SPICE_DIR / ng.CASE_C.deck).read_text()
    text = text.replace("method=trap", "method=gear").replace("Rlpar l1 l2 100k", "Rlpar l1 l2 1G")
    with pytest.raises(ng.NgspiceError, match=r"(?i)exit 0.*timestep too small"):
        ng.run_deck(text, tstop_s=0.01, exe=ngspice_exe)


# --- case (a): ideal switch + R ------------------------------------------------------------
@pytest.fixture(scope="module")
def case_a(ngspice_exe):
    c = ng.CASE_A
    run = c.run(exe=ngspice_exe)
    return c, run, _spice_half_cycles(c, run, "i(vs)", "i(vsr)", "v(load)", holding_a=1e-3, gate_s=20e-6)


@pytest.mark.published
def test_case_a_deck_reproduces_rashid_example_11_1(case_a):
    # Rashid, Power Electronics 4th ed., Example 11.1: Vo = 84.85 V, Io = 8.485 A at
    # 120 V, R = 10 ohm, alpha = 90 deg.  Closed form Vs*sqrt(1 - a/pi + sin 2a/(2 pi)),
    # scaled by R/(R + ron) for the deck's 1 mohm switch.  rtol 1e-4: the earlier case 1
    # step study (tests/data/spice/README.md) shows 1.5e-5 at this step.
    c, run, hc = case_a
    v_closed = 120.0 * math.sqrt(0.5) * 10.0 / 10.001
    assert _cycles_rms(hc["rms_v"], 0) == pytest.approx(v_closed, rel=1e-4)
    assert _cycles_rms(hc["rms_a"], 0) == pytest.approx(v_closed / 10.0, rel=1e-4)


def test_case_a_ours_matches_ngspice(case_a):
    c, run, hc = case_a
    res = _ours(c)
    ours = res.half_cycles
    assert len(ours) == 2 * c.cycles
    _assert_close("start_s", ours.start_s, [w[0] for w in _half_cycle_windows(c)], atol=1e-9)
    _assert_close("load rms A", ours.load_rms_a, hc["rms_a"], rtol=RMS_RTOL)
    _assert_close("load rms V", ours.load_rms_v, hc["rms_v"], rtol=RMS_RTOL)
    _assert_close("peak load A", _our_peak_per_half_cycle(res, res.group_a[0]), hc["peak_load_a"],
                  rtol=PEAK_RTOL)
    _assert_close("peak switch A", ours.peak_current_a, hc["peak_sw_a"], rtol=PEAK_RTOL)
    _assert_close("firing deg", ours.firing_angle_deg, hc["fire_deg"], atol=event_atol_deg(c.frequency_hz))
    _assert_close("extinction deg", ours.extinction_angle_deg, hc["ext_deg"],
                  atol=event_atol_deg(c.frequency_hz))


def test_case_a_zero_source_impedance(case_a):
    # The textbook circuit has no source impedance at all; Supply allows R_s = L_s = 0.
    # The 1 µH of the deck changes its rms results by ~1e-5 (see tests/ngspice.py), far
    # inside the 1 % tolerance, so the same ngspice run is the reference.
    from loads.simulation import simulate

    c, run, hc = case_a
    circuit = dataclasses.replace(ng.our_circuit(c), supply=ng.stiff_supply(source_inductance_h=0.0))
    res = simulate(circuit, firing_angle_deg=c.firing_angle_deg, cycles=c.cycles, start="cold",
                   samples_per_cycle=SAMPLES_PER_CYCLE)
    _assert_close("load rms A", res.half_cycles.load_rms_a, hc["rms_a"], rtol=RMS_RTOL)


# --- case (b): triac + R–L ---------------------------------------------------------------
@pytest.fixture(scope="module")
def case_b(ngspice_exe):
    c = ng.CASE_B
    run = c.run(exe=ngspice_exe)
    return c, run, _spice_half_cycles(c, run, "i(vtri)", "i(vsl)", "v(load)", holding_a=1e-3, gate_s=20e-6)


@pytest.mark.published
def test_case_b_deck_reproduces_rashid_example_11_2(case_b):
    # Rashid 4th ed., Example 11.2: beta = 220.4 deg, load rms current 21.31 A (printed to
    # 4 digits).  The deck's 1 mohm switch lowers the current by ~2e-4 (R + ron), so
    # rtol 5e-4 and 0.05 deg on beta (printed to 0.1 deg).
    c, run, hc = case_b
    assert _cycles_rms(hc["rms_a"], 2) == pytest.approx(21.31, rel=5e-4)  # cycles 1-2 (cycle 0 starts at rest)
    # (the last half-cycle's conduction runs past the end of the run)
    np.testing.assert_allclose(hc["ext_deg"][:-1], 220.4, atol=0.05)


# The load voltage of case (b) needs a finer reference than the deck's converged step:
# after extinction the 100 pF node capacitance, left at the supply voltage (~ -110 V), rings
# with the 6.5 mH load at 197 kHz, Q ~ 3200.  gear at 500 steps/cycle damps the ring away;
# the trapezoidal rule at 100000 steps/cycle (0.17 µs, 30 points per ring period) keeps it.
B_RING_STEPS_PER_CYCLE = 100_000
RING_CW_F = 100e-12


@pytest.fixture(scope="module")
def case_b_ring(ngspice_exe):
    c = ng.CASE_B
    text = (ng.SPICE_DIR / c.deck).read_text().replace("method=gear", "method=trap")
    run = ng.run_deck(text, params=dict(c.params) | {"cw": RING_CW_F}, tmax_s=c.period_s / B_RING_STEPS_PER_CYCLE,
                      tstop_s=c.cycles * c.period_s, exe=ngspice_exe)
    return _spice_half_cycles(c, run, "i(vtri)", "i(vsl)", "v(load)", holding_a=1e-3, gate_s=20e-6)


@pytest.fixture(scope="module")
def case_b_100pf(ngspice_exe):
    c = ng.CASE_B
    run = c.run(exe=ngspice_exe, cw=RING_CW_F)
    return c, run, _spice_half_cycles(c, run, "i(vtri)", "i(vsl)", "v(load)", holding_a=1e-3, gate_s=20e-6)


def test_case_b_ring_reference_matches_scipy(case_b_100pf, case_b_ring):
    # Guard on the reference: the half-cycle load rms with the off-state ring computed as
    # ngspice's conduction part (gear run) + the ring integrated by scipy (DOP853, rtol 1e-10)
    # from the capacitor voltage at extinction, inductor current 0.  rtol 1e-3: the trap
    # run still moves by 3e-3 between 20000 and 100000 steps/cycle.
    from scipy.integrate import solve_ivp

    c, run, hc = case_b_100pf
    t, v = run.t, run.data["v(load)"]
    i_sw = np.abs(run.data["i(vtri)"])
    t0, t1 = 0.5 * c.period_s, c.period_s                       # half-cycle 1
    t_ext = ng.first_fall_below(t, i_sw, 1e-3, t0 + 0.05 * c.period_s, t1)
    t_fire = ng.first_rise_above(t, i_sw, 1e-3, t0, t1)
    on = ng.integral(t, v * v, t0, t_ext) + ng.integral(t, v * v, t_fire, t1)
    r_ohm, l_h, c_f = 2.5, 6.5e-3, 100e-12                      # the deck's R, L, Cw
    ring = solve_ivp(lambda _t, y: [(y[1] - r_ohm * y[0]) / l_h, -y[0] / c_f], [0.0, t_fire - t_ext],
                     [0.0, float(np.interp(t_ext, t, v))], method="DOP853", rtol=1e-10, atol=1e-12,
                     dense_output=True, max_step=2e-7)
    tt = np.linspace(0.0, t_fire - t_ext, 400_001)
    off = np.trapezoid(ring.sol(tt)[1] ** 2, tt)
    assert case_b_ring["rms_v"][1] == pytest.approx(math.sqrt((on + off) / (t1 - t0)), rel=1e-3)


@pytest.fixture(scope="module")
def ours_b():
    return _ours(ng.CASE_B)


def test_case_b_ours_matches_ngspice(case_b, ours_b):
    c, run, hc = case_b
    res = ours_b
    ours = res.half_cycles
    assert len(ours) == 2 * c.cycles
    _assert_close("load rms A", ours.load_rms_a, hc["rms_a"], rtol=RMS_RTOL)
    _assert_close("load rms V", ours.load_rms_v, hc["rms_v"], rtol=RMS_RTOL)
    _assert_close("peak load A", _our_peak_per_half_cycle(res, res.group_a[0]), hc["peak_load_a"],
                  rtol=PEAK_RTOL)
    _assert_close("peak switch A", ours.peak_current_a, hc["peak_sw_a"], rtol=PEAK_RTOL)
    _assert_close("firing deg", ours.firing_angle_deg, hc["fire_deg"], atol=event_atol_deg(c.frequency_hz))
    # the last half-cycle's conduction runs past the end of the run (β ≈ 220°)
    _assert_close("extinction deg", ours.extinction_angle_deg[:-1], hc["ext_deg"][:-1],
                  atol=event_atol_deg(c.frequency_hz))


@pytest.mark.xfail(strict=True, reason=(
    "known limitation: TR-BDF2 is L-stable, and over the ~600 periods of this undamped parasitic "
    "ring (100 pF with 6.5 mH, 197 kHz, Q ≈ 3200) its numerical damping removes most of it; "
    "measured: ours 94.45 V against 96.30 V.  The conduction itself (current, peaks, extinction) "
    "agrees above; the ring carries 0.6 µJ and matters to no check."))
def test_case_b_load_voltage_with_off_state_ring(case_b_ring):
    ours = _ours(ng.CASE_B, cw=RING_CW_F)
    _assert_close("load rms V (ring resolved)", ours.half_cycles.load_rms_v, case_b_ring["rms_v"],
                  rtol=RMS_RTOL)


# --- case (c): triac + capacitor-input lamp ------------------------------------------------
@pytest.fixture(scope="module")
def case_c(ngspice_exe):
    c = ng.CASE_C
    run = c.run(exe=ngspice_exe)
    hc = _spice_half_cycles(c, run, "i(vtri)", "i(vtri)", "v(lamp)", holding_a=0.02, gate_s=20e-6)
    t, vbus = run.t, run.data["v(bp,bn)"]
    last = (t >= (c.cycles - 1) * c.period_s)
    hc["bus_max_v"] = float(np.max(vbus[last]))
    hc["bus_min_v"] = float(np.min(vbus[last]))
    return c, run, hc


@pytest.fixture(scope="module")
def ours_c():
    # 20000 samples per cycle (1 µs at 50 Hz) to follow the ~100 µs conduction.
    return _ours(ng.CASE_C, samples_per_cycle=20000)


def test_case_c_ngspice_has_settled(case_c):
    # Guard on the reference itself: the last two half-cycles agree to 0.1 %, so the
    # "steady" figures below are steady (from the 40-cycle run the peaks settle by ~8 cycles).
    c, run, hc = case_c
    assert hc["peak_sw_a"][-1] == pytest.approx(hc["peak_sw_a"][-3], rel=1e-3)


def test_case_c_first_firing_peak(case_c, ours_c):
    c, run, hc = case_c
    assert ours_c.half_cycles.peak_current_a[0] == pytest.approx(hc["peak_sw_a"][0], rel=PEAK_RTOL)


def test_case_c_peaks_every_half_cycle(case_c, ours_c):
    c, run, hc = case_c
    _assert_close("peak switch A", ours_c.half_cycles.peak_current_a, hc["peak_sw_a"], rtol=PEAK_RTOL)


def test_case_c_time_above_holding(case_c, ours_c):
    c, run, hc = case_c
    _assert_close("time above I_H s", ours_c.half_cycles.time_above_holding_s, hc["above_s"],
                  atol=event_atol_s(c.frequency_hz))
    _assert_close("extinction deg", ours_c.half_cycles.extinction_angle_deg, hc["ext_deg"],
                  atol=event_atol_deg(c.frequency_hz))


def test_case_c_lamp_voltage_rms(case_c, ours_c):
    c, run, hc = case_c
    _assert_close("lamp rms V", ours_c.half_cycles.load_rms_v, hc["rms_v"], rtol=RMS_RTOL)


def test_case_c_bus_voltage_extremes(case_c, ours_c):
    # Our SimResult has no bus waveform; while the bridge conducts the bus is
    # |v_lamp| − 2·0.7 V − R_in·|i_bridge| exactly (our driver model, loads/driver.py), and
    # the bus extremes fall at the edges of conduction (it rises only while charging), so
    # max/min over conducting samples of the last cycle are the bus max/min.
    c, run, hc = case_c
    res = ours_c
    last = res.t_s >= (c.cycles - 1) * c.period_s
    i_br = np.abs(res.group_a[0][last])
    on = i_br > 1e-6
    vbus = np.abs(res.load_v[last][on]) - 1.4 - 10.0 * i_br[on]
    assert np.max(vbus) == pytest.approx(hc["bus_max_v"], rel=BUS_RTOL)
    assert np.min(vbus) == pytest.approx(hc["bus_min_v"], rel=BUS_RTOL)


# --- case (d): rc-diac -------------------------------------------------------------------
@pytest.fixture(scope="module", params=RC_DIAC_POTS_OHM, ids=lambda p: f"pot{p / 1e3:g}k")
def case_d(request, ngspice_exe):
    c, pot = ng.CASE_D, request.param
    run = c.run(exe=ngspice_exe, pot=pot)
    return c, pot, _spice_half_cycles(c, run, "i(vtri)", "i(vsl)", "v(a)", holding_a=0.02, gate_s=0.0)


def test_case_d_firing_angles(case_d):
    c, pot, hc = case_d
    res = _ours(c, pot=pot)
    _assert_close(f"firing deg at pot {pot:g}", res.half_cycles.firing_angle_deg, hc["fire_deg"],
                  atol=ANGLE_ATOL_DEG)
    _assert_close(f"lamp rms A at pot {pot:g}", _cycles_rms(res.half_cycles.load_rms_a, 2),
                  _cycles_rms(hc["rms_a"], 2), rtol=RMS_RTOL)
    _assert_close(f"peak lamp A at pot {pot:g}", _our_peak_per_half_cycle(res, res.group_a[0]),
                  hc["peak_load_a"], rtol=PEAK_RTOL)
    # Not compared: the switch-current peak.  At closing, the 100 pF node capacitance rings
    # with the 1 µH source inductance (~60 ns, ζ = 0.5 with the 100 Ω lamp); at its
    # converged step (2 µs) ngspice does not resolve it (first firing at pot 100 kΩ:
    # 1.697 A at 2 µs, 1.82 A at 100 ns, 2.12 A at 20 ns; scipy Radau on the closing
    # transient: 2.172 A), so it is no reference for that figure.
