"""Filament lamp physics (loads.filament): geometry, heat balance, steady state, light."""
from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
import scipy.constants as const
from scipy.integrate import quad, solve_ivp

from loads.errors import InputError, ModelRangeWarning
from loads.filament import (
    P_MASS_KG, P_OPERATING_K, PHOTOPIC_V, Filament, geometry, initial_temperature_k, light_fraction, pack,
    planck_spectral_radiance_w_m3_sr, radiated_power_w, resistance_ohm, steady_power_w,
    steady_temperature_k, temperature_rate_k_s,
)
from loads.tungsten import specific_heat_j_kg_k

# Lamps the trade checks are run on: general-service filaments, 25–100 W, 230 V and
# 120 V, operating at 2700–2900 K (from memory).
GENERAL_SERVICE = [
    Filament(rated_power_w=w, rated_voltage_v=v, operating_temperature_k=t)
    for w in (25.0, 40.0, 60.0, 100.0) for v in (230.0, 120.0) for t in (2700.0, 2800.0, 2900.0)
]
LAMP_100W_230V = Filament(rated_power_w=100.0, rated_voltage_v=230.0)  # default 2800 K, 300 K ambient


def _ids(lamps):
    return [f"{lamp.rated_power_w:.0f}W-{lamp.rated_voltage_v:.0f}V-{lamp.operating_temperature_k:.0f}K" for lamp in lamps]


# --- analytic -------------------------------------------------------------------

@pytest.mark.analytic
@pytest.mark.parametrize("lamp", GENERAL_SERVICE + [
    Filament(rated_power_w=2000.0, rated_voltage_v=230.0, operating_temperature_k=3200.0, ambient_temperature_k=330.0),
    Filament(rated_power_w=10.0, rated_voltage_v=12.0, operating_temperature_k=1800.0),
], ids=_ids(GENERAL_SERVICE) + ["2000W-halogen", "10W-12V-1800K"])
def test_geometry_round_trip(lamp):
    # Closed-form geometry: R(T_op) = V²/P and radiated power at T_op = P.
    # rtol 1e-9: only floating-point rounding separates the two sides.
    g = geometry(lamp)
    p = pack(lamp)
    t_op = lamp.operating_temperature_k
    assert resistance_ohm(t_op, p) == pytest.approx(lamp.rated_voltage_v ** 2 / lamp.rated_power_w, rel=1e-9)
    assert g.hot_resistance_ohm == pytest.approx(resistance_ohm(t_op, p), rel=1e-9)
    assert radiated_power_w(t_op, p) == pytest.approx(lamp.rated_power_w, rel=1e-9)
    assert g.area_m2 == pytest.approx(math.pi * g.diameter_m * g.length_m, rel=1e-12)
    assert g.mass_kg == pytest.approx(19250.0 * g.length_m * math.pi * g.diameter_m ** 2 / 4, rel=1e-12)
    assert g.cold_resistance_ohm == pytest.approx(resistance_ohm(lamp.ambient_temperature_k, p), rel=1e-12)


@pytest.mark.analytic
@pytest.mark.parametrize("lamp", [LAMP_100W_230V, GENERAL_SERVICE[0], GENERAL_SERVICE[-1]], ids=str)
def test_steady_state_energy_balance(lamp):
    p = pack(lamp)
    # At rated voltage the steady temperature is the operating temperature
    # (atol 1e-6 K: the root finder's tolerance is 1e-9 K, rounding of the geometry adds a little).
    assert steady_temperature_k(lamp, lamp.rated_voltage_v) == pytest.approx(lamp.operating_temperature_k, abs=1e-6)
    assert steady_power_w(lamp, lamp.rated_voltage_v) == pytest.approx(lamp.rated_power_w, rel=1e-9)
    for frac in (0.1, 0.3, 0.6, 0.9, 1.05):
        v = frac * lamp.rated_voltage_v
        t = steady_temperature_k(lamp, v)
        p_el = v ** 2 / resistance_ohm(t, p)
        # electrical power in = power radiated out; rtol 1e-9 (root tolerance)
        assert steady_power_w(lamp, v) == pytest.approx(p_el, rel=1e-12)
        assert radiated_power_w(t, p) == pytest.approx(p_el, rel=1e-9)
        # and the kernel's dT/dt vanishes there: compare with the rate the rated power
        # would give from cold (atol: 1e-9 of that scale)
        scale = lamp.rated_power_w / (p[P_MASS_KG] * specific_heat_j_kg_k(300.0))
        assert abs(temperature_rate_k_s(t, p_el, p)) < 1e-9 * scale


@pytest.mark.analytic
def test_zero_voltage_leaves_the_filament_at_ambient():
    lamp = Filament(rated_power_w=60.0, ambient_temperature_k=310.0)
    assert steady_temperature_k(lamp, 0.0) == 310.0 == initial_temperature_k(lamp)
    assert steady_power_w(lamp, 0.0) == 0.0
    assert temperature_rate_k_s(310.0, 0.0, pack(lamp)) == 0.0


@pytest.mark.analytic
def test_cooling_decays_at_the_linearised_time_constant():
    # Near steady state on constant voltage, T − T_ss decays as exp(−t/tau) with
    # tau = m·c / (dP_rad/dT − dP_el/dT).  Integrate the kernel's dT/dt with scipy
    # solve_ivp (rtol 1e-10) from T_ss + 0.5 K; the slope of ln(T − T_ss) over 2 tau
    # must give tau within 0.5 % (the 0.5 K offset leaves a second-order error ~0.1 %).
    lamp = LAMP_100W_230V
    p = pack(lamp)
    v = lamp.rated_voltage_v
    t_ss = steady_temperature_k(lamp, v)
    h = 1e-3
    g = lambda t: radiated_power_w(t, p) - v ** 2 / resistance_ohm(t, p)  # noqa: E731
    tau = p[P_MASS_KG] * specific_heat_j_kg_k(t_ss) / ((g(t_ss + h) - g(t_ss - h)) / (2 * h))
    sol = solve_ivp(lambda _t, y: [temperature_rate_k_s(y[0], v ** 2 / resistance_ohm(y[0], p), p)],
                    (0.0, 2 * tau), [t_ss + 0.5], rtol=1e-10, atol=1e-10, dense_output=True)
    d0, d1 = sol.sol(0.0)[0] - t_ss, sol.sol(2 * tau)[0] - t_ss
    tau_fit = 2 * tau / math.log(d0 / d1)
    print(f"tau linearised {tau * 1e3:.2f} ms, integrated {tau_fit * 1e3:.2f} ms")
    assert tau_fit == pytest.approx(tau, rel=5e-3)


@pytest.mark.analytic
def test_light_fraction_is_one_at_the_operating_temperature_and_rises_with_t():
    for lamp in (LAMP_100W_230V, GENERAL_SERVICE[0]):
        p = pack(lamp)
        t_op = lamp.operating_temperature_k
        # rtol 1e-12: the table is normalised at the same point it is read
        assert light_fraction(t_op, lamp) == pytest.approx(1.0, rel=1e-12)
        assert light_fraction(t_op, p) == pytest.approx(1.0, rel=1e-12)
    t = np.linspace(300.0, 3600.0, 1001)
    lf = light_fraction(t, LAMP_100W_230V)
    assert lf.shape == t.shape and np.all(np.diff(lf) > 0)
    assert light_fraction(1000.0, LAMP_100W_230V) < 1e-6   # dull red: essentially no light
    assert light_fraction(100.0, LAMP_100W_230V) == 0.0


@pytest.mark.analytic
def test_light_table_interpolation_matches_direct_sum():
    # The 1 K table read by linear interpolation of ln(light) vs the direct sum at
    # off-grid temperatures; rtol 1e-5: interpolation error of a smooth log at 1 K steps.
    from loads.filament import emissivity, visible_radiance
    t_op = 2800.0
    ref = emissivity(t_op) * visible_radiance(t_op)
    for t in (1234.56, 2222.22, 2799.5, 3333.3):
        direct = emissivity(t) * visible_radiance(t) / ref
        assert light_fraction(t, LAMP_100W_230V) == pytest.approx(float(direct), rel=1e-5)


@pytest.mark.analytic
def test_planck_law_integrates_to_stefan_boltzmann():
    # ∫ B dλ over all wavelengths × π = σ T⁴ (CODATA constants via scipy.constants);
    # checks the Planck function the light model uses.  rtol 1e-8: quad accuracy.
    t = 2800.0
    total, _ = quad(lambda lam: float(planck_spectral_radiance_w_m3_sr(lam, t)), 5e-8, 2e-4, limit=400,
                    points=[1e-6], epsrel=1e-11)
    tail = 2 * const.c * const.k * t / 3 / (2e-4) ** 3   # Rayleigh–Jeans tail beyond 200 µm
    assert math.pi * (total + tail) == pytest.approx(const.sigma * t ** 4, rel=1e-8)


# --- published (some from memory) -----------------------------------------------

@pytest.mark.published
def test_photopic_v_table_area_and_peak():
    # CIE_PHOTOPIC_V, from memory: ∫V(λ)dλ ≈ 106.86 nm, maximum 1 at 555 nm (so the
    # 550 and 560 nm values are nearly equal, just below 1).  atol 0.05 nm: the
    # recalled figure's last digit.
    assert PHOTOPIC_V.sum() * 10.0 == pytest.approx(106.86, abs=0.05)
    assert 0.99 < PHOTOPIC_V[17] < 1.0 and 0.99 < PHOTOPIC_V[18] < 1.0
    assert PHOTOPIC_V.argmax() in (17, 18)


@pytest.mark.published
@pytest.mark.parametrize("lamp", GENERAL_SERVICE, ids=_ids(GENERAL_SERVICE))
def test_cold_to_hot_resistance_ratio(lamp):
    # Common practice, no source: "cold resistance is about 1/14–1/15 of hot".  Band 13–17 as the issue asks, for 2700–2900 K.
    # (Marked published for want of a trade marker; the check value is trade lore.)
    ratio = geometry(lamp).cold_to_hot_ratio
    assert 13.0 <= ratio <= 17.0, ratio


def _exponent(lamp, quantity):
    # d ln Q / d ln V from a central difference over ±5 % of rated voltage.
    v = lamp.rated_voltage_v * np.array([0.95, 1.05])
    q = np.array([quantity(lamp, x) for x in v])
    return float(np.diff(np.log(q))[0] / np.diff(np.log(v))[0])


def _current(lamp, v):
    return v / resistance_ohm(steady_temperature_k(lamp, v), pack(lamp))


def _light(lamp, v):
    return light_fraction(steady_temperature_k(lamp, v), lamp)


# The exponents of the straight-wire model depend only on the operating and ambient
# temperatures (geometry scales out of d ln Q / d ln V), so two lamps per temperature suffice.
EXPONENT_LAMPS = [lamp for lamp in GENERAL_SERVICE if (lamp.rated_power_w, lamp.rated_voltage_v) in ((100.0, 230.0), (25.0, 120.0))]


@pytest.mark.published
@pytest.mark.parametrize("lamp", EXPONENT_LAMPS, ids=_ids(EXPONENT_LAMPS))
def test_lamp_law_exponents_near_rated_voltage(lamp):
    # IES_HANDBOOK lamp laws, FROM MEMORY (unverified): near rated voltage power ∝ V^1.54,
    # current ∝ V^0.54, light ∝ V^3.38.  Tolerance ±0.15 on power and current as the issue
    # asks (the recalled exponents are averages over lamp types; the model neglects gas
    # and lead losses).  Light is reported; it is asserted only loosely (±0.3), since the
    # grey-body light model does not follow tungsten's spectral emissivity.
    k_p = _exponent(lamp, steady_power_w)
    k_i = _exponent(lamp, _current)
    k_l = _exponent(lamp, _light)
    print(f"\n{_ids([lamp])[0]}: power {k_p:.3f} (1.54), current {k_i:.3f} (0.54), light {k_l:.3f} (3.38)")
    assert k_p == pytest.approx(1.54, abs=0.15)
    assert k_i == pytest.approx(0.54, abs=0.15)
    assert k_l == pytest.approx(3.38, abs=0.3)


def _warm_up(lamp, v_rms, t_end_s=1.0):
    """Integrate the heat balance from cold on the rms voltage (2f ripple ignored)."""
    p = pack(lamp)
    rate = lambda _t, y: [temperature_rate_k_s(y[0], v_rms ** 2 / resistance_ohm(y[0], p), p)]  # noqa: E731
    sol = solve_ivp(rate, (0.0, t_end_s), [initial_temperature_k(lamp)], method="LSODA",
                    rtol=1e-9, atol=1e-6, dense_output=True)
    assert sol.success
    t = np.linspace(0.0, t_end_s, 100_001)   # 10 µs grid for reading off the time
    current = v_rms / np.array([resistance_ohm(x, p) for x in sol.sol(t)[0]])
    return t, current


@pytest.mark.published
def test_warm_up_time_of_a_100w_230v_lamp():
    # Common practice, no source: the switch-on surge of a 100 W
    # lamp settles within about 0.05–0.1 s.  The model has no lead, support or gas losses
    # and a straight wire lighter than a real coil, so it is expected to be somewhat fast;
    # band 0.02–0.3 s (engineering choice: a factor of about 2.5–3 either side of lore).
    lamp = LAMP_100W_230V
    t, current = _warm_up(lamp, lamp.rated_voltage_v)
    final = lamp.rated_voltage_v / geometry(lamp).hot_resistance_ohm
    settle = t[np.argmax(current <= 1.1 * final)]
    print(f"\n100 W 230 V: current within 10 % of final after {settle * 1e3:.1f} ms; "
          f"first current / final {current[0] / final:.2f}; final {final:.4f} A, at 1 s {current[-1]:.4f} A")
    assert current[-1] == pytest.approx(final, rel=1e-4)   # it does settle to the steady state
    assert 0.02 <= settle <= 0.3


def _switch_on(lamp, angle_deg, cycles, f_hz=50.0, t0_k=None):
    """Integrate the heat balance on the instantaneous sine, switched on at angle_deg;
    returns (t, current)."""
    p = pack(lamp)
    v_pk = math.sqrt(2.0) * lamp.rated_voltage_v
    w = 2 * math.pi * f_hz
    phi = math.radians(angle_deg)

    def v(t):
        return v_pk * np.sin(w * t + phi)

    rate = lambda t, y: [temperature_rate_k_s(y[0], v(t) ** 2 / resistance_ohm(y[0], p), p)]  # noqa: E731
    t_end = cycles / f_hz
    t0 = initial_temperature_k(lamp) if t0_k is None else t0_k
    # max_step 20 µs: resolves the sine (1000 steps per cycle); rtol 1e-9.
    sol = solve_ivp(rate, (0.0, t_end), [t0], rtol=1e-9, atol=1e-6, max_step=2e-5, dense_output=True)
    t = np.linspace(0.0, t_end, int(cycles * 2000) + 1)
    temp = sol.sol(t)[0]
    current = v(t) / np.array([resistance_ohm(x, p) for x in temp])
    return t, current


@pytest.mark.published
def test_cold_switch_on_peak_current_ratio():
    # Common practice, no source: switch-on current about
    # 10–15× running current; the issue asks for a cold/hot peak ratio of 10–17.
    # Worst case: switched on cold at the voltage peak (90°).  The hot peak is taken from
    # the periodic steady state on the same sine (includes the 2f temperature ripple).
    lamp = LAMP_100W_230V
    _, i_cold = _switch_on(lamp, 90.0, cycles=0.5)
    _, i_hot = _switch_on(lamp, 0.0, cycles=10, t0_k=steady_temperature_k(lamp, lamp.rated_voltage_v))
    hot_peak = np.abs(i_hot[-2000:]).max()
    worst = np.abs(i_cold).max() / hot_peak
    _, i_zero = _switch_on(lamp, 0.0, cycles=0.5)
    at_zero = np.abs(i_zero).max() / hot_peak
    print(f"\n100 W 230 V cold switch-on peak / hot peak: at 90° {worst:.2f}, at 0° {at_zero:.2f}; "
          f"hot peak {hot_peak:.4f} A")
    assert 10.0 <= worst <= 17.0
    # Switched on at the zero crossing the filament warms before the voltage peaks,
    # so the surge must be smaller than the worst case (a limit, not a trade figure).
    assert at_zero < worst


# --- bad input and range -----------------------------------------------------------

@pytest.mark.parametrize("v", [-1.0, float("nan"), float("inf")])
def test_steady_state_rejects_bad_voltage(v):
    with pytest.raises(InputError, match="v_rms"):
        steady_temperature_k(LAMP_100W_230V, v)


def test_steady_state_refuses_to_melt_the_filament():
    with pytest.raises(InputError, match="melting point"):
        steady_temperature_k(LAMP_100W_230V, 3.0 * 230.0)


def test_light_fraction_warns_above_melting_point():
    with pytest.warns(ModelRangeWarning, match="melting"):
        light_fraction(np.array([2800.0, 3800.0]), LAMP_100W_230V)
    with warnings.catch_warnings():
        warnings.simplefilter("error", ModelRangeWarning)
        light_fraction(np.array([300.0, 3600.0]), pack(LAMP_100W_230V))


def test_pack_is_float64_and_carries_the_operating_temperature():
    p = pack(LAMP_100W_230V)
    assert p.dtype == np.float64 and p[P_OPERATING_K] == 2800.0


def test_kernel_functions_are_callable_from_another_njit_function():
    # The simulator kernel calls these inside its own compiled loop.
    import numba

    @numba.njit
    def euler(t0, v, p, dt, n):
        t = t0
        for _ in range(n):
            t += dt * temperature_rate_k_s(t, v * v / resistance_ohm(t, p), p)
        return t

    p = pack(LAMP_100W_230V)
    t_py = 300.0
    for _ in range(10):
        t_py += 1e-5 * temperature_rate_k_s(t_py, 230.0 ** 2 / resistance_ohm(t_py, p), p)
    # rtol 1e-12: same arithmetic, compiled vs interpreted call path
    assert euler(300.0, 230.0, p, 1e-5, 10) == pytest.approx(t_py, rel=1e-12)


@pytest.mark.published
def test_physical_constants_are_codata():
    # CODATA 2022 (the set scipy.constants ships): h, c, k exact by the 2019 SI, sigma
    # derived; the model writes them out to spare the scipy.constants import.
    # rtol 1e-15: the same double, allowing one rounding in sigma's formula.
    from loads import filament as fil
    assert fil.PLANCK_J_S == const.h and fil.LIGHT_SPEED_M_S == const.c and fil.BOLTZMANN_J_K == const.k
    assert fil.STEFAN_BOLTZMANN_W_M2_K4 == pytest.approx(const.sigma, rel=1e-15, abs=0.0)
