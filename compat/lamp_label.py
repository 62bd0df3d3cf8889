"""A capacitor-input lamp described from its label and a meter reading.

An installer knows a lamp's printed figures (watts, volts, "dimmable", sometimes a
power factor and a recommended dimmer edge) and can measure it at full brightness on a
plain switch: a plug-in meter's W, VA and PF, a true-rms clamp meter's current, and the
crest factor where the meter shows it.  This module turns those into the parameters
of the capacitor-input model of ``loads.driver`` (series resistance R, bulk capacitor
C, input capacitor C_in, bleeder) as ranges ``{min, max}`` that agree with every
reading, so the checks judge the lamp over what it may be.

The closed form: constant DC voltage behind a resistor
-----------------------------------------------------
With a bulk capacitor large enough that its voltage V_dc hardly moves over a cycle
(ω·C·R_L → ∞, R_L = V_dc²/P the converter's equivalent load), the bridge conducts
while |e| = V_pk·|sin θ| exceeds V_dc + V_D (V_D the two diodes' drop), and its
current is that excess over the series resistance R.  This is the limit of the classic
analysis of the capacitor-input rectifier with a series resistance (Schade, Proc. IRE
1943, whose curves run over ω·C·R_L and R/R_L; from memory).  With
k = (V_dc + V_D)/V_pk and θ₁ = arcsin k, over the half-cycle θ ∈ [θ₁, π − θ₁]

    i(θ) = V_pk·(sin θ − k)/R

and, integrating (∫sin² = (π−2θ₁)/2 + k·cos θ₁, ∫sin = 2·cos θ₁, ∫1 = π − 2θ₁):

    P_in·R/V_pk²     = (1/π)·[(π − 2θ₁)/2 − k·cos θ₁]                     (real power)
    I_rms²·R²/V_pk²  = (1/π)·[(π − 2θ₁)·(1/2 + k²) − 3·k·cos θ₁]           (rms current²)
    I_avg·R/V_pk     = (1/π)·[2·cos θ₁ − (π − 2θ₁)·k]                      (mean |i|)
    P_conv           = V_dc·I_avg                                          (power into the bus)
    PF = P_in/(V_rms·I_rms),   crest factor = V_pk·(1 − k)/(R·I_rms)

so one figure, R·P/V², fixes k and with it PF and the crest factor: in this limit the
two readings say the same thing.  ``closed_form`` evaluates it.

The finite capacitor
--------------------
A real lamp's bus sags between charging pulses (ΔV ≈ P/(2·f·C·V_dc)); the pulses start
earlier and the power factor rises, and PF and crest factor then tell R and C apart.
The reduced model below integrates the same equations as ``loads.driver`` with the
supply ideal: in per-unit (V the rms voltage, P the converter's power, θ = ω·t),
u = v_bus/V, r = R·P/V², q = ω·C·V²/P, d = 2·V_D/V:

    q·du/dθ = max(0, √2·|sin θ| − d − u)/r − 1/u,

solved for its periodic state by backward Euler (``STEPS_PER_HALF_CYCLE`` steps) and a
secant iteration on u(0) = u(π).  The input capacitor (C_in·de/dt) and the bleeder
(``loads.driver``'s constant-current law) add currents that do not depend on the bus,
so they are added to the bridge's current afterwards.  The model is tested against
the closed form above (large C) and against the circuit simulator (tests).

The estimate is a set membership: every (r, q) on a grid, with C_in and the bleeder at
several values in their ranges, is mapped to ohms and farads for the measured power,
and kept if it agrees with every reading within the meter's tolerance and lies in the
plausible box; the ranges are the span of what is kept, widened by one grid step each
way (the truth lies between grid points).  A lamp that no point fits (a power factor
above what a capacitor-input lamp with a plausible resistor can draw: a lamp with
power-factor correction, which the model does not have) is refused with the reason.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from loads.circuit import Range
from loads.driver import BLEEDER_KNEE_V, BRIDGE_DIODE_DROP_V, ElectronicDriver
from loads.errors import InputError

# ----------------------------------------------------------------- constants

# Reduced model resolution (engineering choice: checked against the circuit simulator
# to within 1 % in PF and 2 % in crest factor, tests/compat/test_lamp_label.py).
STEPS_PER_HALF_CYCLE = 1200
SECANT_ITERATIONS = 8
# The grid the readings are matched on (engineering choice: a step of PF of about 0.01
# between neighbours, below the meter's tolerance, so a fitting point is never missed).
R_PU_GRID = np.geomspace(2e-5, 0.2, 56)      # r = R·P/V²
Q_PU_GRID = np.geomspace(0.15, 600.0, 44)    # q = ω·C·V²/P

# The box of ordinary parts, all a label alone can say and what readings narrow
# (common practice, no source: fusible input resistors of a few to tens of ohms, bulk
# electrolytics near 0.3–2 µF per watt; the built-in archetypes sit inside it).
# Readings narrow a label, never widen it: a metered lamp's ranges lie inside the
# label-only ones, so measuring never makes a verdict vaguer.
LABEL_R_OHM = (2.2, 47.0)
LABEL_C_F_PER_W = (0.3e-6, 2.2e-6)
# Searched only when the readings fit no ordinary lamp (engineering choice: about three
# times beyond the ordinary box on each side).
SEARCH_R_OHM = (1.0, 150.0)
SEARCH_C_F_PER_W = (0.1e-6, 6.8e-6)
# Engineering choice: an input resistor burning more than 15 % of a lamp's power would
# overheat inside a lamp base; no lamp is modelled with more.
MAX_LOSS_SHARE = 0.15
# Input filter capacitor (common practice, no source: X-capacitors of tens of nF; the
# archetypes carry 33–100 nF).
INPUT_CAPACITANCE_F = (10e-9, 150e-9)
# Bleeder of a lamp sold as dimmable (engineering choice: from none to the archetypes'
# 10 mA at 230 V and 20 mA at 120 V, i.e. about 2.3 W / V_rated of constant current).
BLEEDER_SCALE_W = 2.3
# A lamp's converter starts at about a fifth of its rated peak (engineering choice, as
# loads.driver and the archetypes: 60 V at 230 V, 30 V at 120 V).
START_FRACTION_OF_PEAK = 0.185

# Meter tolerances.  Plug-in meters show PF to 0.01 but at a few watts are good to a few
# hundredths (from memory); a printed PF is a declared value that a lamp may miss by
# about 0.05 (from memory: lamp performance standards allow a measured PF 0.05 below
# the declared one) and often beats (engineering choice: up to 0.10 above it, a printed
# PF being commonly a floor); the power (from memory: ±(2 % + 0.2 W) at lamp powers; a
# label's watts without a meter: ±10 %, from memory, the tolerance lamp standards allow
# on rated power); a true-rms clamp on its lowest range (from memory: ±(2 % + 5 mA));
# crest factor (engineering choice: ±5 %, the meter samples a narrow pulse).  The power
# scales every model current, so its tolerance widens the current's band.
METER_PF_TOL = 0.03
LABEL_PF_TOL = 0.05
METER_W_REL, METER_W_ABS = 0.02, 0.2
LABEL_W_REL = 0.10
CLAMP_A_REL, CLAMP_A_ABS = 0.02, 0.005
METER_VA_REL, METER_VA_ABS = 0.02, 0.3
CREST_REL = 0.05


# ----------------------------------------------------------------- closed form

@dataclass(frozen=True, slots=True, kw_only=True)
class ClosedForm:
    """The constant-DC-voltage rectifier at one operating point (module docstring).

    k: (V_dc + V_D)/V_pk [1]; conduction_deg: conduction per half-cycle [deg];
    power_factor, crest_factor [1]; input_power_w, rms_current_a, peak_current_a,
    bus_voltage_v."""

    k: float
    conduction_deg: float
    power_factor: float
    crest_factor: float
    input_power_w: float
    rms_current_a: float
    peak_current_a: float
    bus_voltage_v: float


def _cf_terms(k: float) -> tuple[float, float, float]:
    th = math.asin(k)
    c = math.cos(th)
    w = math.pi - 2.0 * th
    p = (w / 2.0 - k * c) / math.pi
    i2 = (w * (0.5 + k * k) - 3.0 * k * c) / math.pi
    iavg = (2.0 * c - w * k) / math.pi
    return p, i2, iavg


def closed_form(*, series_resistance_ohm: float, converter_power_w: float, voltage_v: float,
                diode_drop_v: float = 2 * BRIDGE_DIODE_DROP_V) -> ClosedForm:
    """The constant-DC-voltage limit for a lamp of series resistance R drawing
    ``converter_power_w`` from its bus on a supply of ``voltage_v`` rms (module
    docstring); k is found by bisection on P_conv = V_dc·I_avg."""
    if not (series_resistance_ohm > 0 and converter_power_w > 0 and voltage_v > diode_drop_v):
        raise InputError("needs a positive resistance, power and voltage", key="closed_form")
    r, vpk = series_resistance_ohm, math.sqrt(2.0) * voltage_v
    vd = diode_drop_v

    def p_bus(k: float) -> float:
        return (k * vpk - vd) * vpk * _cf_terms(k)[2] / r

    lo, hi = vd / vpk, 1.0 - 1e-15
    # P_bus rises from 0 at k = V_D/V_pk to a maximum, then falls to 0 at k = 1: the
    # operating point is on the falling branch (the bus near the peak)
    ks = np.linspace(lo, hi, 4001)
    pb = np.array([p_bus(float(k)) for k in ks])
    j = int(np.argmax(pb))
    if pb[j] < converter_power_w:
        raise InputError(f"{converter_power_w:g} W cannot pass a {r:g} Ω resistor from {voltage_v:g} V",
                         key="closed_form")
    lo = float(ks[j])
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if p_bus(mid) > converter_power_w:
            lo = mid
        else:
            hi = mid
    k = 0.5 * (lo + hi)
    p, i2, _ = _cf_terms(k)
    p_in = p * vpk * vpk / r + 0.0
    i_rms = math.sqrt(i2) * vpk / r
    i_pk = vpk * (1.0 - k) / r
    # the diodes' drop is part of k, so p_in above is the power leaving the supply
    return ClosedForm(k=k, conduction_deg=math.degrees(math.pi - 2.0 * math.asin(k)),
                      power_factor=p_in / (voltage_v * i_rms), crest_factor=i_pk / i_rms,
                      input_power_w=p_in, rms_current_a=i_rms, peak_current_a=i_pk,
                      bus_voltage_v=k * vpk - vd)


# ----------------------------------------------------------------- reduced model

@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class BridgeTable:
    """Per-unit bridge current over one half-cycle for every (r, q) pair.

    r, q: the pairs [1] (flattened grid); j: current in units of P/V, shape (pairs,
    steps) at θ = (n + 1)·π/steps; bus: u at the start of the half-cycle;
    diode_pu: d = 2·V_D/V used."""

    r: np.ndarray
    q: np.ndarray
    theta: np.ndarray
    j: np.ndarray
    bus: np.ndarray
    diode_pu: float


def _march(u0: np.ndarray, r: np.ndarray, q: np.ndarray, s: np.ndarray, h: float,
           record: bool) -> tuple[np.ndarray, np.ndarray | None]:
    """Backward Euler over one half-cycle from u0; returns u(π) and, if asked, the
    per-unit bridge current at each step."""
    u = u0.copy()
    out = np.empty((u.size, s.size)) if record else None
    qh = q / h
    for n in range(s.size):
        sn = s[n]
        x = u.copy()
        for _ in range(6):                      # Newton on the implicit step
            cond = sn - x > 0.0
            g = qh * (x - u) - np.where(cond, (sn - x) / r, 0.0) + 1.0 / x
            dg = qh + np.where(cond, 1.0 / r, 0.0) - 1.0 / (x * x)
            x = np.maximum(x - g / dg, 1e-3)
        u = x
        if record:
            out[:, n] = np.maximum(sn - u, 0.0) / r
    return u, out


def bridge_table(r: np.ndarray, q: np.ndarray, *, diode_pu: float,
                 steps: int = STEPS_PER_HALF_CYCLE) -> BridgeTable:
    """Periodic per-unit bridge current for each (r, q) (module docstring)."""
    r = np.asarray(r, dtype=float).ravel()
    q = np.asarray(q, dtype=float).ravel()
    h = math.pi / steps
    theta = h * np.arange(1, steps + 1)
    s = math.sqrt(2.0) * np.sin(theta) - diode_pu
    # first guess: the constant-voltage bus from the per-unit closed form (cheap bound)
    u_a = np.full(r.size, math.sqrt(2.0) - diode_pu) * 0.98
    f_a = _march(u_a, r, q, s, h, False)[0] - u_a
    u_b = np.maximum(u_a + f_a, 0.05)
    for _ in range(SECANT_ITERATIONS):
        f_b = _march(u_b, r, q, s, h, False)[0] - u_b
        denom = f_b - f_a
        safe = np.abs(denom) > 1e-14
        step = np.where(safe, f_b * (u_b - u_a) / np.where(safe, denom, 1.0), 0.0)
        u_a, f_a = u_b, f_b
        u_b = np.maximum(u_b - step, 0.05)
    _, j = _march(u_b, r, q, s, h, True)
    return BridgeTable(r=r, q=q, theta=theta, j=j, bus=u_b, diode_pu=diode_pu)


@dataclass(frozen=True, slots=True, kw_only=True)
class Readings:
    """What the installer read or measured; None where not known.

    rated_power_w, rated_voltage_v: the label; dimmable; label_power_factor: printed PF;
    recommended_edge: "leading" | "trailing" | None (printed);
    supply_voltage_v: the voltage during the measurement (None: rated);
    meter_power_w, meter_va, meter_power_factor: plug-in meter at full on a plain switch;
    clamp_current_a: true-rms clamp; crest_factor: where the meter shows it;
    frequency_hz: the mains frequency."""

    rated_power_w: float
    rated_voltage_v: float
    dimmable: bool = True
    label_power_factor: float | None = None
    recommended_edge: str | None = None
    supply_voltage_v: float | None = None
    meter_power_w: float | None = None
    meter_va: float | None = None
    meter_power_factor: float | None = None
    clamp_current_a: float | None = None
    crest_factor: float | None = None
    frequency_hz: float = 50.0

    def __post_init__(self) -> None:
        def need(ok: bool, key: str, reason: str) -> None:
            if not ok:
                raise InputError(reason, key=key)

        def finite(x) -> bool:
            return x is None or (isinstance(x, (int, float)) and math.isfinite(x))

        for key in ("rated_power_w", "rated_voltage_v", "label_power_factor", "supply_voltage_v", "meter_power_w",
                    "meter_va", "meter_power_factor", "clamp_current_a", "crest_factor", "frequency_hz"):
            need(finite(getattr(self, key)), key, "must be a finite number")
        need(0.1 <= self.rated_power_w <= 500.0, "rated_power_w",
             f"{self.rated_power_w:g} W is not a lamp's rating (0.1–500 W)")
        need(10.0 <= self.rated_voltage_v <= 1000.0, "rated_voltage_v",
             f"{self.rated_voltage_v:g} V is outside 10–1000 V")
        need(45.0 <= self.frequency_hz <= 65.0, "frequency_hz", f"{self.frequency_hz:g} Hz is not a mains frequency (45–65 Hz)")
        for key in ("label_power_factor", "meter_power_factor"):
            v = getattr(self, key)
            need(v is None or 0.05 <= v <= 1.0, key, f"{v} is not a power factor (0.05–1)")
        need(self.recommended_edge in (None, "leading", "trailing"), "recommended_edge",
             f"{self.recommended_edge!r} is not leading or trailing")
        if self.supply_voltage_v is not None:
            need(0.7 * self.rated_voltage_v <= self.supply_voltage_v <= 1.2 * self.rated_voltage_v, "supply_voltage_v",
                 f"{self.supply_voltage_v:g} V is too far from the lamp's {self.rated_voltage_v:g} V (70–120 %)")
        if self.meter_power_w is not None:
            need(0.3 * self.rated_power_w <= self.meter_power_w <= 2.0 * self.rated_power_w, "meter_power_w",
                 f"{self.meter_power_w:g} W is not this {self.rated_power_w:g} W lamp at full brightness "
                 "(30–200 % of its rating): measure it alone, at full, on a plain switch")
        if self.meter_va is not None:
            need(self.meter_va > 0, "meter_va", f"{self.meter_va:g} VA must be positive")
            if self.meter_power_w is not None:
                need(self.meter_va >= self.meter_power_w * (1 - METER_W_REL) - METER_W_ABS, "meter_va",
                     f"{self.meter_va:g} VA is below the {self.meter_power_w:g} W measured (VA ≥ W)")
        if self.clamp_current_a is not None:
            need(0.0 < self.clamp_current_a <= 10.0, "clamp_current_a", f"{self.clamp_current_a:g} A is not one lamp's current")
        if self.crest_factor is not None:
            need(1.0 <= self.crest_factor <= 20.0, "crest_factor", f"{self.crest_factor:g} is not a crest factor (1–20)")

    @property
    def voltage_v(self) -> float:
        return self.supply_voltage_v if self.supply_voltage_v is not None else self.rated_voltage_v

    @property
    def power_w(self) -> float:
        return self.meter_power_w if self.meter_power_w is not None else self.rated_power_w

    @property
    def measured(self) -> bool:
        return any(x is not None for x in (self.meter_va, self.meter_power_factor, self.clamp_current_a,
                                           self.crest_factor, self.label_power_factor))

    def bands(self) -> dict[str, tuple[float, float]]:
        """The intervals the readings set on PF, rms current [A] and crest factor."""
        out: dict[str, tuple[float, float]] = {}
        v = self.voltage_v
        if self.meter_power_factor is not None:
            out["power_factor"] = (self.meter_power_factor - METER_PF_TOL, self.meter_power_factor + METER_PF_TOL)
        elif self.label_power_factor is not None:
            out["power_factor"] = (self.label_power_factor - LABEL_PF_TOL, self.label_power_factor + 2 * LABEL_PF_TOL)
        amps = []
        if self.clamp_current_a is not None:
            a = self.clamp_current_a
            amps.append((a * (1 - CLAMP_A_REL) - CLAMP_A_ABS, a * (1 + CLAMP_A_REL) + CLAMP_A_ABS))
        if self.meter_va is not None:
            s = self.meter_va
            amps.append(((s * (1 - METER_VA_REL) - METER_VA_ABS) / v, (s * (1 + METER_VA_REL) + METER_VA_ABS) / v))
        if amps:
            lo, hi = max(a[0] for a in amps), min(a[1] for a in amps)
            if lo > hi:
                raise InputError("the clamp current and the meter's VA disagree beyond their tolerances "
                                 f"({self.clamp_current_a:g} A against {self.meter_va / v:.3g} A from VA/V)",
                                 key="clamp_current_a")
            if self.meter_power_w is not None:
                rel = METER_W_REL + METER_W_ABS / self.meter_power_w
            else:
                rel = LABEL_W_REL
            out["rms_current_a"] = (max(lo, 0.0) / (1 + rel), hi * (1 + rel))
        if self.crest_factor is not None:
            out["crest_factor"] = (self.crest_factor * (1 - CREST_REL), self.crest_factor * (1 + CREST_REL))
        return out


@dataclass(frozen=True, slots=True, kw_only=True)
class Estimate:
    """The lamp model's parameters as ranges (SI) and how they were found.

    ranges: field -> (low, high) for the ElectronicDriver's range inputs; fixed: field ->
    value; points: how many grid points agree with the readings; basis: field -> where
    its range comes from (one line each); notes: what the reader should know."""

    readings: Readings
    ranges: dict[str, tuple[float, float]]
    fixed: dict[str, object]
    points: int
    basis: dict[str, str]
    notes: tuple[str, ...] = field(default=())

    def lamp(self, name: str, count: int = 1) -> tuple[ElectronicDriver, tuple[Range, ...]]:
        """The lamp group at the ranges' midpoints, and its ranges as one group of a
        profile (``loads[1].…``)."""
        kwargs = dict(self.fixed)
        for key, (lo, hi) in self.ranges.items():
            kwargs[key] = 0.5 * (lo + hi)
        lamp = ElectronicDriver(name=name, count=count, **kwargs)
        from loads.files import file_key_of
        ranges = tuple(Range(f"loads[1].{k}", f"loads[1].{file_key_of(ElectronicDriver, k)}", lo, hi)
                       for k, (lo, hi) in self.ranges.items() if hi > lo)
        return lamp, ranges


_TABLE_CACHE: dict[tuple[float, int], BridgeTable] = {}


def _table(diode_pu: float) -> BridgeTable:
    key = (round(diode_pu, 6), STEPS_PER_HALF_CYCLE)
    if key not in _TABLE_CACHE:
        rr, qq = np.meshgrid(R_PU_GRID, Q_PU_GRID, indexing="ij")
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            _TABLE_CACHE[key] = bridge_table(rr, qq, diode_pu=diode_pu)
    return _TABLE_CACHE[key]


def _bleeder_current(theta: np.ndarray, v_pk: float) -> np.ndarray:
    """loads.driver's constant-current bleeder per ampere, over a positive half-cycle."""
    return np.clip(v_pk * np.sin(theta) / BLEEDER_KNEE_V, -1.0, 1.0)


def _outward(lo: float, hi: float) -> tuple[float, float]:
    """A range rounded outward to 3 significant digits (a file shows 32.9, not 32.85294...)."""
    def digits(x: float) -> float:
        return 10.0 ** (math.floor(math.log10(abs(x))) - 2) if x != 0 else 1.0
    low = math.floor(lo / digits(lo) + 1e-9) * digits(lo) if lo > 0 else lo      # 1e-9: 0.0025 stays 0.0025
    high = math.ceil(hi / digits(hi) - 1e-9) * digits(hi) if hi > 0 else hi
    return float(f"{low:.12g}"), float(f"{high:.12g}")


def estimate(readings: Readings) -> Estimate:
    """Ranges of the capacitor-input model that agree with ``readings`` (module docstring)."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return _estimate(readings)


def _estimate(readings: Readings) -> Estimate:
    v = readings.voltage_v
    f = readings.frequency_hz
    w = 2.0 * math.pi * f
    v_pk = math.sqrt(2.0) * v
    p_meas = readings.power_w
    tab = _table(2 * BRIDGE_DIODE_DROP_V / v)
    theta = tab.theta
    sin_t, cos_t = np.sin(theta), np.cos(theta)
    e = v_pk * sin_t
    # per-unit bridge input power a = mean(√2·sin θ·j) (≥ 1: the converter's power plus losses)
    a = (tab.j * (math.sqrt(2.0) * sin_t)).mean(axis=1)
    loss_share = 1.0 - 1.0 / a
    bleeder_max = BLEEDER_SCALE_W / readings.rated_voltage_v if readings.dimmable else 0.0
    bleeders = np.array([0.0, 0.25, 0.5, 0.75, 1.0]) * bleeder_max if bleeder_max > 0 else np.array([0.0])
    cins = np.geomspace(*INPUT_CAPACITANCE_F, 5)
    bands = readings.bands()
    measured = readings.measured

    def match(r_box, c_box):
        kept_r, kept_c, kept_cin, kept_bl = [], [], [], []
        for bl in bleeders:
            i_bl = bl * _bleeder_current(theta, v_pk)
            p_bl = float(np.mean(e * i_bl))
            p_conv = (p_meas - p_bl) / a                    # per (r, q)
            ok_p = p_conv > 0.05 * p_meas
            p_conv = np.where(ok_p, p_conv, np.nan)
            big_r = tab.r * v * v / p_conv
            big_c = tab.q * p_conv / (w * v * v)
            ok = ok_p & (big_r >= r_box[0]) & (big_r <= r_box[1]) & (loss_share <= MAX_LOSS_SHARE)
            ok &= (big_c >= c_box[0] * readings.rated_power_w) & (big_c <= c_box[1] * readings.rated_power_w)
            i_br = (p_conv / v)[:, None] * tab.j
            for cin in cins:
                i_tot = i_br + (w * cin * v_pk * cos_t)[None, :] + i_bl[None, :]
                i_rms = np.sqrt(np.mean(i_tot * i_tot, axis=1))
                pf = p_meas / (v * i_rms)
                crest = np.max(np.abs(i_tot), axis=1) / i_rms
                good = ok.copy()
                for name, value in (("power_factor", pf), ("rms_current_a", i_rms), ("crest_factor", crest)):
                    if name in bands:
                        lo, hi = bands[name]
                        good &= (value >= lo) & (value <= hi)
                idx = np.nonzero(good)[0]
                kept_r.append(big_r[idx])
                kept_c.append(big_c[idx])
                kept_cin.append(np.full(idx.size, cin))
                kept_bl.append(np.full(idx.size, bl))
        return [np.concatenate(k) for k in (kept_r, kept_c, kept_cin, kept_bl)]

    # the readings narrow what ordinary parts allow; only where they fit no ordinary
    # lamp is the wider box searched (and said so)
    notes = []
    r_box, c_box = LABEL_R_OHM, LABEL_C_F_PER_W
    r_all, c_all, cin_all, bl_all = match(r_box, c_box)
    widened = False
    if r_all.size == 0 and measured:
        r_box, c_box = SEARCH_R_OHM, SEARCH_C_F_PER_W
        r_all, c_all, cin_all, bl_all = match(r_box, c_box)
        widened = True
        notes.append(f"the readings fit no lamp with ordinary parts ({LABEL_R_OHM[0]:g}–{LABEL_R_OHM[1]:g} Ω, "
                     f"{LABEL_C_F_PER_W[0] * 1e6:g}–{LABEL_C_F_PER_W[1] * 1e6:g} µF/W): the search was widened to "
                     f"{SEARCH_R_OHM[0]:g}–{SEARCH_R_OHM[1]:g} Ω, {SEARCH_C_F_PER_W[0] * 1e6:g}–"
                     f"{SEARCH_C_F_PER_W[1] * 1e6:g} µF/W")
    if r_all.size == 0:
        raise InputError(_no_fit_reason(readings, bands), key=_no_fit_key(bands))
    step_r = R_PU_GRID[1] / R_PU_GRID[0]
    step_q = Q_PU_GRID[1] / Q_PU_GRID[0]
    r_lo, r_hi = max(r_all.min() / step_r, r_box[0]), min(r_all.max() * step_r, r_box[1])
    c_lo = max(c_all.min() / step_q, c_box[0] * readings.rated_power_w)
    c_hi = min(c_all.max() * step_q, c_box[1] * readings.rated_power_w)
    cin_step = cins[1] / cins[0]
    cin_lo = max(cin_all.min() / cin_step, INPUT_CAPACITANCE_F[0])
    cin_hi = min(cin_all.max() * cin_step, INPUT_CAPACITANCE_F[1])
    ranges: dict[str, tuple[float, float]] = {
        "series_resistance_ohm": _outward(r_lo, r_hi),
        "bulk_capacitance_f": _outward(c_lo, c_hi),
        "input_capacitance_f": _outward(cin_lo, cin_hi),
    }
    basis = {
        "series_resistance_ohm": ("ordinary lamps' input resistors, 2.2–47 Ω (common practice, no source)"
                                  + ("; narrowed by the readings within the meter's tolerance" if measured else "")
                                  + ("; widened: see the notes" if widened else "")),
        "bulk_capacitance_f": ("ordinary lamps' bulk capacitors, 0.3–2.2 µF per watt (common practice, no source)"
                               + ("; narrowed by the readings within the meter's tolerance" if measured else "")
                               + ("; widened: see the notes" if widened else "")),
        "input_capacitance_f": "not readable: tens of nF, as ordinary lamps' filter capacitors (common practice, no source)",
    }
    fixed: dict[str, object] = {
        "rated_power_w": readings.rated_power_w, "rated_voltage_v": readings.rated_voltage_v,
        "dimmable": readings.dimmable,
        "start_voltage_v": round(START_FRACTION_OF_PEAK * math.sqrt(2.0) * readings.rated_voltage_v, 1),
    }
    if bleeder_max > 0:
        bl_step = bleeder_max * 0.25
        ranges["bleeder_a"] = _outward(max(bl_all.min() - bl_step, 0.0), min(bl_all.max() + bl_step, bleeder_max))
        fixed["bleeder_kind"] = "constant-current"
        basis["bleeder_a"] = ("not readable: from none to a constant current of 2.3 W over the rated voltage "
                              f"({1000 * bleeder_max:.0f} mA here), as the archetypes (engineering choice)"
                              + ("; narrowed by the readings" if measured else ""))
    else:
        fixed["bleeder_a"] = 0.0
        basis["bleeder_a"] = "none: a lamp not sold as dimmable has no bleeder (common practice, no source)"
    if readings.recommended_edge is not None:
        notes.append(f"printed: {readings.recommended_edge} edge recommended (kept as a note; the checks judge the "
                     "lamp's circuit on each dimmer)")
    if readings.meter_power_w is not None and abs(readings.meter_power_w - readings.rated_power_w) > 0.15 * readings.rated_power_w:
        notes.append(f"measured {readings.meter_power_w:g} W against {readings.rated_power_w:g} W printed: "
                     "was the lamp at full brightness, alone, on a plain switch?")
    return Estimate(readings=readings, ranges=ranges, fixed=fixed, points=int(r_all.size), basis=basis,
                    notes=tuple(notes))


def _no_fit_key(bands: dict) -> str:
    if "power_factor" in bands:
        return "power_factor"
    if "crest_factor" in bands:
        return "crest_factor"
    return "rms_current_a"


def _no_fit_reason(readings: Readings, bands: dict) -> str:
    shown = ", ".join(f"{k.replace('_', ' ')} {lo:.3g}–{hi:.3g}" for k, (lo, hi) in bands.items())
    return (f"no capacitor-input lamp with a plausible input resistor ({SEARCH_R_OHM[0]:g}–{SEARCH_R_OHM[1]:g} Ω, "
            f"losses ≤ {MAX_LOSS_SHARE:.0%}) and bulk capacitor draws these readings ({shown}); "
            "a lamp with power-factor correction is not modelled, or a reading is off")
