"""Public face of the circuit simulator: run a circuit, get waveforms and figures.

``simulate`` runs one control setting (or one forced firing angle) for N mains cycles
from a cold start, from a switch-on (a cold start at which the dimmer starts up as it
does), from the periodic steady state, from the lamp-out state, or from a state carried
over from a previous run; ``sweep`` walks the control range up or down carrying the state from one
setting to the next.  The numerical work is done in ``loads.kernel``.

Angles are measured from the supply zero crossing that starts each half-cycle [deg].
"""
from __future__ import annotations

import dataclasses
import math
import threading
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from enum import StrEnum

import numpy as np

from loads import driver as _drv
from loads import electronic_transformer as _et
from loads import filament as _fil
from loads import kernel as K
from loads import linear as _lin
from loads import transformer as _tr
from loads.circuit import Circuit
from loads.dimmer import Control, Edge, GateDrive
from loads.errors import InputError, SolverError
from loads.load import LoadKind


class Start(StrEnum):
    COLD = "cold"        # filaments at ambient, capacitors empty, the dimmer's control already running
    SWITCH_ON = "switch-on"   # as cold, and the supply appears at the switch-on angle: the dimmer
                              # starts up as it does (a phase controller waits for the first zero
                              # crossing; a trailing-edge dimmer closes there, with its soft start)
    STEADY = "steady"    # run until the half-cycles repeat, then record
    OFF = "off"          # lamp-out periodic state: dimmer energised, switch never fired


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class HalfCycles:
    """Per-half-cycle figures; every field is an array with one entry per half-cycle.

    start_s: time of the supply zero crossing that starts it [s];
    polarity: +1 or −1;
    firing_angle_deg: first firing of the switch (nan: did not fire) [deg];
    extinction_angle_deg: where the last conduction that started in it ended; may
    exceed 180 with inductive loads (nan: did not fire) [deg];
    firings: how many times the switch was triggered (>1: re-firing);
    failed_latches: triggers whose gate drive ended before the current reached the
    latching current;
    early_dropouts: conductions that fell below the holding current more than
    EARLY_DROPOUT_DEG before the end of the half-cycle;
    time_above_holding_s: time the switch current was at or above the holding current [s];
    peak_current_a: largest |switch current| [A]; peak_line_current_a: largest |line current| [A];
    i2t_a2s: ∫ i_switch² dt [A²s]; line_i2t_a2s: ∫ i_line² dt, what the breaker sees [A²s];
    load_rms_v, load_rms_a: at the load terminals [V], [A]; power_w: mean v·i into the loads [W];
    mean_current_a: mean line current (its sign shows a DC component) [A];
    light: mean light per group as a fraction of that group's rated light, shape
    (n_half, n_groups) [1];
    turn_off_energy_j: heat left in a trailing-edge switch by its turn-off, ∫ v·i dt while
    its voltage rises at the set slope [J]; clamp_energy_j: energy the dimmer's clamp
    absorbed [J] (both zeros where not given)."""

    start_s: np.ndarray
    polarity: np.ndarray
    firing_angle_deg: np.ndarray
    extinction_angle_deg: np.ndarray
    firings: np.ndarray
    failed_latches: np.ndarray
    early_dropouts: np.ndarray
    time_above_holding_s: np.ndarray
    peak_current_a: np.ndarray
    peak_line_current_a: np.ndarray
    i2t_a2s: np.ndarray
    line_i2t_a2s: np.ndarray
    load_rms_v: np.ndarray
    load_rms_a: np.ndarray
    power_w: np.ndarray
    mean_current_a: np.ndarray
    light: np.ndarray
    turn_off_energy_j: np.ndarray | None = None
    clamp_energy_j: np.ndarray | None = None

    def __post_init__(self) -> None:
        for name in ("turn_off_energy_j", "clamp_energy_j"):
            if getattr(self, name) is None:
                object.__setattr__(self, name, np.zeros(len(self.start_s)))

    def __len__(self) -> int:
        return len(self.start_s)


# A drop-out this far or more before the end of the half-cycle counts as early
# (engineering choice: clear of the normal turn-off of a resistive load near 180°).
EARLY_DROPOUT_DEG = 10.0


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class SimResult:
    """Sampled waveforms and per-half-cycle figures of one run.

    t_s [s]; supply_v: source EMF [V]; load_v: load terminal voltage [V];
    load_a: current into the load terminal from the dimmer (= line current) [A];
    dimmer_a: current in the switch [A]; dimmer_v: voltage across the dimmer [V];
    group_a: each group's total current, shape (n_groups, n) [A];
    group_light: each group's instantaneous light as a fraction of rated, shape
    (n_groups, n) [1]; timing_v: timing-capacitor voltage (rc-diac; zeros otherwise) [V].
    """

    t_s: np.ndarray
    supply_v: np.ndarray
    load_v: np.ndarray
    load_a: np.ndarray
    dimmer_a: np.ndarray
    dimmer_v: np.ndarray
    group_a: np.ndarray
    group_light: np.ndarray
    timing_v: np.ndarray
    half_cycles: HalfCycles
    frequency_hz: float
    setting: float | None
    forced_firing_angle_deg: float | None
    final_state: object          # opaque; pass as ``start=`` to continue

    def last_cycle(self) -> dict[str, float]:
        """load_rms_v, load_rms_a, power_w over the last full mains cycle."""
        hc = self.half_cycles
        if len(hc) < 2:
            raise ValueError("fewer than two half-cycles simulated")
        v2 = np.mean(hc.load_rms_v[-2:] ** 2)
        a2 = np.mean(hc.load_rms_a[-2:] ** 2)
        return {"load_rms_v": float(np.sqrt(v2)), "load_rms_a": float(np.sqrt(a2)),
                "power_w": float(np.mean(hc.power_w[-2:]))}


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class SweepPoint:
    """One setting of a sweep, judged over the last ``analysed`` half-cycles.

    firing_angle_deg / conduction_angle_deg: means over fired half-cycles (None: none
    fired); fired_fraction: share of analysed half-cycles that fired [1];
    light_fraction: total light relative to all lamps at full on a plain switch [1];
    group_light: per group, fraction of its rated light [1];
    stable: every analysed half-cycle fired, latched and held, and the firing angles
    agree within STABLE_ANGLE_DEG;
    light_t_s, light: the total light waveform over the analysed span (for flicker)."""

    direction: str
    setting: float
    firing_angle_deg: float | None
    conduction_angle_deg: float | None
    load_rms_v: float
    load_rms_a: float
    power_w: float
    light_fraction: float
    group_light: tuple[float, ...]
    fired_fraction: float
    failed_latches: int
    early_dropouts: int
    refirings: int
    stable: bool
    light_t_s: np.ndarray
    light: np.ndarray


# ---------------------------------------------------------------------------
# Running the kernel
# ---------------------------------------------------------------------------

# Engineering choice: below ~1 m of cable the terminal node is still defined.
MIN_NODE_CAPACITANCE_F = 100e-12
# Engineering choice: triac blocking leakage (~1 µA at 100 V), keeps the dimmer voltage defined.
OFF_STATE_CONDUCTANCE_S = 1e-8
CLAMP_RESISTANCE_OHM = 1.0        # engineering choice: slope of the trailing-edge clamp
EVENT_TOL_S = 1e-7                # engineering choice: events located to 0.1 µs (≈ 0.002° at 50 Hz)
DEFAULT_TOLERANCE = 1e-3          # engineering choice: relative step tolerance (see convergence test)
STEADY_MAX_CYCLES = 60            # engineering choice: give up looking for a periodic state after this
STEADY_MAX_CYCLES_CORE = 240      # engineering choice: with iron cores, whose DC settles in ~1 s
# Engineering choice: the lamp-out state is settled when the transient still to come is
# below 1e-4 of each unknown's scale (5 mV on a timing capacitor's 50 V scale), or when
# the change over a cycle is at the solver's own noise (a tenth of the relative
# tolerance, as the absolute tolerances are set).
OFF_SETTLE_TOL = 1e-4
OFF_SETTLE_NOISE = 0.1

# Typical efficacy used only to weight lamp groups when adding their light (common
# practice, no source): filament ~12 lm/W, low-voltage halogen ~16 lm/W, LED ~90 lm/W.
EFFICACY_LM_W = {LoadKind.FILAMENT: 12.0, LoadKind.MAGNETIC_TRANSFORMER: 16.0,
                 LoadKind.ELECTRONIC_TRANSFORMER: 16.0, LoadKind.ELECTRONIC_DRIVER: 90.0,
                 LoadKind.LINEAR: 0.0}

_KIND_CODE = {LoadKind.FILAMENT: K.K_FILAMENT, LoadKind.MAGNETIC_TRANSFORMER: K.K_MAGNETIC,
              LoadKind.ELECTRONIC_DRIVER: K.K_DRIVER, LoadKind.ELECTRONIC_TRANSFORMER: K.K_ETRANS,
              LoadKind.LINEAR: K.K_LINEAR}


@dataclass(frozen=True, slots=True, eq=False)
class _State:
    """Everything the kernel needs to continue a run (opaque to callers)."""

    y: np.ndarray
    s: np.ndarray
    q: np.ndarray
    t_s: float
    signature: tuple


@dataclass(frozen=True, slots=True, eq=False)
class _Packed:
    P: np.ndarray
    IP: np.ndarray
    gk: np.ndarray
    gxo: np.ndarray
    gpo: np.ndarray
    gnp: np.ndarray
    gn: np.ndarray
    GP: np.ndarray
    atol: np.ndarray
    scale: np.ndarray
    ny: int
    kinds: tuple
    signature: tuple


def _group_params(load, frequency_hz: float) -> tuple[np.ndarray, int]:
    kind = load.kind
    if kind is LoadKind.FILAMENT:
        return _fil.pack(load), 1
    if kind is LoadKind.MAGNETIC_TRANSFORMER:
        return _tr.pack(load, frequency_hz), _tr.N_STATES
    if kind is LoadKind.ELECTRONIC_DRIVER:
        return _drv.pack(load), _drv.n_states(load)
    if kind is LoadKind.ELECTRONIC_TRANSFORMER:
        return _et.pack(load), _et.N_STATES
    return _lin.pack(load), _lin.n_states(load)


def _terminal_capacitance_f(load) -> float:
    if load.kind is LoadKind.ELECTRONIC_DRIVER:
        # behind a damping resistor the input capacitor is the unit's own state
        return load.count * load.input_capacitance_f if load.damping_ohm == 0 else 0.0
    if load.kind is LoadKind.ELECTRONIC_TRANSFORMER:
        return load.count * load.input_capacitance_f
    if load.kind is LoadKind.LINEAR:
        return load.count * load.parallel_capacitance_f
    return 0.0


def pack(circuit: Circuit, *, setting: float | None, firing_angle_deg: float | None,
         no_firing: bool = False, tolerance: float = DEFAULT_TOLERANCE) -> _Packed:
    sup, dim = circuit.supply, circuit.dimmer
    loads = circuit.all_loads
    if firing_angle_deg is None:
        s = 1.0 if setting is None else setting
        alpha_deg = dim.firing_angle_for_setting_deg(s)
    else:
        s = None
        alpha_deg = firing_angle_deg
    P = np.zeros(K.N_P)
    P[K.VPK] = sup.peak_v
    P[K.OMEGA] = sup.omega_rad_s
    P[K.RS] = sup.source_resistance_ohm
    P[K.LS] = sup.source_inductance_h
    # Node capacitance at the load terminal: the loads' input capacitors, plus the cable's
    # capacitance.  Where an inductor feeds the terminal (line or choke), the cable's
    # capacitance is kept behind a damping resistance R_w = 2·√(L/C_w): the ring of the line
    # inductance with the cable, lightly loaded, would otherwise be an undamped high-
    # frequency oscillation that skin effect, dielectric and core losses (not modelled)
    # damp in a real installation (engineering choice: critical damping).  Where two
    # inductors would meet at a node with nothing else, a floor capacitance keeps the
    # equations well posed.
    c_x = sum(_terminal_capacitance_f(ld) for ld in loads)
    c_w = sup.wiring_capacitance_f
    inductive = any(ld.kind is LoadKind.MAGNETIC_TRANSFORMER or (ld.kind is LoadKind.LINEAR and ld.inductance_h > 0)
                    for ld in loads)
    l_feed = sup.source_inductance_h + (dim.choke_inductance_h if dim.edge is Edge.LEADING else 0.0)
    if c_x + c_w < MIN_NODE_CAPACITANCE_F and inductive and l_feed > 0:
        c_w = MIN_NODE_CAPACITANCE_F
    if l_feed > 0 and c_w > 0:
        P[K.CW] = c_w
        P[K.RW] = 2.0 * math.sqrt(l_feed / c_w)
        P[K.CB] = c_x
    else:
        P[K.CB] = c_x + c_w
    P[K.LC] = dim.choke_inductance_h if dim.edge is Edge.LEADING else 0.0
    P[K.RON] = dim.on_state_resistance_ohm
    P[K.VTD] = dim.on_state_voltage_v if dim.edge is Edge.LEADING else 0.0
    P[K.IH] = dim.holding_current_a
    P[K.ILATCH] = dim.latching_current_a
    P[K.IGT] = dim.gate_trigger_current_a
    P[K.GATEW] = dim.gate_window_s
    P[K.RSN] = dim.snubber_resistance_ohm
    P[K.CSN] = dim.snubber_capacitance_f
    rc = dim.rc_diac if dim.control is Control.RC_DIAC else None
    if rc is not None:
        s_rc = 1.0 if s is None else min(max(s, 0.0), 1.0)
        P[K.RT] = rc.fixed_resistance_ohm + (1.0 - s_rc) * rc.variable_resistance_ohm
        P[K.CT] = rc.timing_capacitance_f
        P[K.VBOP] = rc.breakover_v
        P[K.VBON] = rc.breakover_v - rc.asymmetry_v
        P[K.VONP] = rc.breakover_v - rc.snapback_v
        P[K.VONN] = rc.breakover_v - rc.asymmetry_v - rc.snapback_v
        P[K.RG] = rc.gate_resistance_ohm
        P[K.IDOFF] = rc.diac_off_current_a
    else:
        P[K.RT] = 1.0
        P[K.CT] = 0.0
        P[K.RG] = 1.0
    P[K.ISS] = dim.self_supply_a
    P[K.VCL] = dim.clamp_voltage_v
    P[K.RCL] = CLAMP_RESISTANCE_OHM
    P[K.TRIP] = dim.trip_current_a
    P[K.ALPHA] = math.radians(alpha_deg)
    P[K.GLEAK] = OFF_STATE_CONDUCTANCE_S
    # the largest step follows the tolerance (∝ tol^(1/3), the method's local order), so the
    # tolerance governs accuracy even where no transient limits the step (engineering choice;
    # the default gives T/50)
    P[K.HMAX] = sup.period_s * min(max(0.2 * tolerance ** (1.0 / 3.0), 1.0 / 4000.0), 1.0 / 50.0)
    P[K.RTOL] = tolerance
    P[K.EVTOL] = EVENT_TOL_S
    P[K.EARLY] = EARLY_DROPOUT_DEG
    P[K.TRAMP] = dim.turn_off_time_s if dim.edge is Edge.TRAILING else 0.0
    P[K.SLOPE] = sup.peak_v / dim.turn_off_time_s if (dim.edge is Edge.TRAILING and dim.turn_off_time_s > 0) else 0.0
    P[K.TRIPD] = dim.trip_delay_s if dim.edge is Edge.TRAILING else 0.0
    P[K.DIDTC] = dim.commutating_di_dt_a_per_s if dim.commutating_di_dt_a_per_s > 0 else np.inf
    P[K.TQ] = dim.triac_turn_off_time_s if dim.edge is Edge.LEADING else 0.0
    P[K.SOFT] = dim.soft_start_s if dim.edge is Edge.TRAILING else 0.0

    gk, gxo, gpo, gnp, gn, chunks = [], [], [], [], [], []
    xo, po = K.N_CORE, 0
    state_scale = []
    for ld in loads:
        p, nx = _group_params(ld, sup.frequency_hz)
        gk.append(_KIND_CODE[ld.kind])
        gxo.append(xo)
        gpo.append(po)
        gnp.append(len(p))
        gn.append(float(ld.count))
        chunks.append(p)
        xo += nx
        po += len(p)
        state_scale += _state_scales(ld, nx, sup)
    ny = xo
    gate_code = {GateDrive.SINGLE_PULSE: K.SINGLE_PULSE, GateDrive.UNTIL_LATCHED: K.UNTIL_LATCHED,
                 GateDrive.RETRIGGER: K.RETRIGGER}[dim.gate_drive] if dim.control is Control.PHASE else K.SINGLE_PULSE
    IP = np.array([0 if dim.edge is Edge.LEADING else 1, 0 if dim.control is Control.PHASE else 1,
                   1 if no_firing else 0, len(loads), ny,
                   gate_code], dtype=np.int64)
    i_ref = max(sum(ld.count * ld.rated_power_w for ld in loads) / sup.voltage_v, 0.05)
    scale = np.array([i_ref, i_ref, sup.peak_v, sup.peak_v, sup.peak_v, 50.0, sup.peak_v] + state_scale)
    # absolute tolerances (engineering choice): a tenth of the tolerance of each unknown's
    # scale; the line and switch currents, which pass through zero every half-cycle (and
    # many times in a ring after firing), the tolerance of the rated current but never
    # looser than 1 % of the holding current, the accuracy the holding check needs
    atol = tolerance * 0.1 * scale
    atol[K.IL] = atol[K.ISW] = min(tolerance * i_ref, 0.01 * dim.holding_current_a)
    signature = (ny, tuple(gk), tuple(gnp))
    return _Packed(P=P, IP=IP, gk=np.array(gk, dtype=np.int64), gxo=np.array(gxo, dtype=np.int64),
                   gpo=np.array(gpo, dtype=np.int64), gnp=np.array(gnp, dtype=np.int64),
                   gn=np.array(gn), GP=np.concatenate(chunks) if chunks else np.zeros(1),
                   atol=atol, scale=scale, ny=ny, kinds=tuple(ld.kind for ld in loads),
                   signature=signature)


def _state_scales(ld, nx: int, sup) -> list[float]:
    if ld.kind is LoadKind.FILAMENT:
        return [1000.0]
    if ld.kind is LoadKind.MAGNETIC_TRANSFORMER:
        return [ld.rated_va / ld.rated_voltage_v, sup.peak_v / sup.omega_rad_s, 1000.0]
    if ld.kind is LoadKind.ELECTRONIC_DRIVER:
        return [sup.peak_v] * _drv.n_states(ld)
    if ld.kind is LoadKind.ELECTRONIC_TRANSFORMER:
        return [1000.0]
    out = []
    if ld.kind is LoadKind.LINEAR:
        if ld.inductance_h > 0:
            out.append(sup.peak_v / ld.resistance_ohm)
        if ld.series_capacitance_f > 0:
            out.append(sup.peak_v)
    return out


def _cold_state(circuit: Circuit, pk: _Packed, t0: float, start_up: bool = False) -> _State:
    y = np.zeros(pk.ny)
    for g, ld in enumerate(circuit.all_loads):
        xo = int(pk.gxo[g])
        if ld.kind is LoadKind.FILAMENT:
            y[xo] = _fil.initial_temperature_k(ld)
        elif ld.kind is LoadKind.MAGNETIC_TRANSFORMER:
            y[xo + 2] = 300.0
        elif ld.kind is LoadKind.ELECTRONIC_TRANSFORMER:
            y[xo] = _fil.initial_temperature_k(_et.lamp(ld))
    s = np.zeros(K.N_S + len(pk.gk), dtype=np.int64)
    q = np.zeros(K.N_Q + 4 * len(pk.gk))
    q[K.T_FIRE] = np.inf
    q[K.T_OFF] = np.inf
    q[K.T_TRIP] = np.inf
    # start_up: the supply appears at t0 and a phase controller starts at the first zero
    # crossing; otherwise its control has long been running
    half = math.pi / pk.P[K.OMEGA]
    q[K.T_SYNC] = math.ceil(t0 / half - 1e-9) * half if start_up else -np.inf
    for g in range(len(pk.gk)):
        q[K.N_Q + 4 * g] = 1.0          # drivers start at full level until they have decoded a half-cycle
        q[K.N_Q + 4 * g + 1] = np.inf   # phase sense: no rising edge seen yet
    return _State(y=y, s=s, q=q, t_s=t0, signature=pk.signature)


def _run(pk: _Packed, state: _State, cycles: float, samples_per_cycle: int):
    f = pk.P[K.OMEGA] / (2 * math.pi)
    period = 1.0 / f
    t0 = state.t_s
    t_end = t0 + cycles * period
    n_samp = int(round(cycles * samples_per_cycle)) + 1
    dt = period / samples_per_cycle
    ng = len(pk.gk)
    out = np.zeros((n_samp, K.N_O0 + 2 * ng))
    half = period / 2
    n_half = int(math.ceil((t_end - math.floor(t0 / half + 1e-9) * half) / half - 1e-9)) + 1
    hc = np.zeros((n_half, K.N_H))
    hc[:, K.H_FIRE] = np.nan
    hc[:, K.H_EXT] = np.nan
    y = state.y.copy()
    s = state.s.copy()
    q = state.q.copy()
    s[K.HCIDX] = 0
    s[K.FIRE_HC] = -1
    counters = np.zeros(3, dtype=np.int64)
    rc = K.run(t0, t_end, y, pk.P, pk.IP, s, q, pk.gk, pk.gxo, pk.gpo, pk.gnp, pk.gn, pk.GP,
               pk.atol, pk.scale, t0, dt, out, hc, counters)
    for factor in (0.1, 10.0):
        if rc == 0:
            break
        # the step collapsed at a kink: run the same span again at another tolerance
        P2 = pk.P.copy()
        P2[K.RTOL] *= factor
        y, s, q = state.y.copy(), state.s.copy(), state.q.copy()
        s[K.HCIDX] = 0
        s[K.FIRE_HC] = -1
        hc[:] = 0.0
        hc[:, K.H_FIRE] = np.nan
        hc[:, K.H_EXT] = np.nan
        rc = K.run(t0, t_end, y, P2, pk.IP, s, q, pk.gk, pk.gxo, pk.gpo, pk.gnp, pk.gn, pk.GP,
                   pk.atol * factor, pk.scale, t0, dt, out, hc, counters)
    if rc != 0:
        filled = np.nonzero(np.any(out != 0.0, axis=1))[0]
        k = int(filled[-1]) if filled.size else 0
        t_fail = t0 + k * dt
        raise SolverError(f"the simulator could not go on at t = {1e3 * t_fail:.3f} ms (its step size collapsed)",
                          t_s=t_fail, outputs=out[k].copy())
    last = int(s[K.HCIDX])
    # keep only half-cycles that ended inside the run
    n_done = min(last, n_half)
    hc = hc[:n_done]
    end_state = _State(y=y, s=s, q=q, t_s=t_end, signature=pk.signature)
    return out, hc, end_state, counters


def _light_waveforms(circuit: Circuit, pk: _Packed, out: np.ndarray) -> np.ndarray:
    ng = len(pk.gk)
    light = np.empty((ng, out.shape[0]))
    for g, ld in enumerate(circuit.all_loads):
        x = out[:, K.N_O0 + ng + g]
        if ld.kind is LoadKind.FILAMENT:
            light[g] = _fil.light_fraction(x, ld)
        elif ld.kind is LoadKind.MAGNETIC_TRANSFORMER:
            light[g] = _fil.light_fraction(x, _tr.secondary_lamp(ld))
        elif ld.kind is LoadKind.ELECTRONIC_TRANSFORMER:
            light[g] = _fil.light_fraction(x, _et.lamp(ld))
        else:
            light[g] = x
    return light


def _half_cycles(hc: np.ndarray, t: np.ndarray, light: np.ndarray, kinds) -> HalfCycles:
    half = np.diff(hc[:, K.H_START]) if len(hc) > 1 else np.array([])
    starts = hc[:, K.H_START]
    if len(hc):
        dur = np.full(len(hc), (starts[1] - starts[0]) if len(hc) > 1 else np.nan)
        # the first record may be a partial half-cycle (switch-on mid-cycle): its span is
        # from the run start; use the nominal length for all later ones
        if len(half):
            dur[:] = np.median(half)
    else:
        dur = np.zeros(0)
    span = np.where(dur > 0, dur, np.nan)
    t_first = t[0]
    eff = np.maximum(starts, t_first)
    span_eff = np.where(np.isfinite(span), starts + span - eff, np.nan)
    with np.errstate(invalid="ignore", divide="ignore"):
        rms_v = np.sqrt(hc[:, K.H_V2] / span_eff)
        rms_a = np.sqrt(hc[:, K.H_I2] / span_eff)
        power = hc[:, K.H_VI] / span_eff
        mean_i = hc[:, K.H_I] / span_eff
    ng = light.shape[0]
    lt = np.full((len(hc), ng), np.nan)
    # each half-cycle's samples: t is uniform and rising, so they are one slice,
    # [first t ≥ its start, first t ≥ its end)
    with np.errstate(invalid="ignore"):
        lo = np.searchsorted(t, eff - 1e-12, side="left")
        hi = np.searchsorted(t, starts + span - 1e-12, side="left")
    for j in range(len(hc)):
        if np.isfinite(span[j]) and hi[j] > lo[j]:
            # the same samples in the layout a boolean mask gives (column-major), so the
            # sums are added in the same order and the means are the same to the bit
            lt[j] = np.asfortranarray(light[:, lo[j]:hi[j]]).mean(axis=1)
    k = np.round(starts / span) if len(hc) else np.zeros(0)
    polarity = np.where(k % 2 == 0, 1, -1)
    return HalfCycles(start_s=starts, polarity=polarity, firing_angle_deg=hc[:, K.H_FIRE],
                      extinction_angle_deg=hc[:, K.H_EXT], firings=hc[:, K.H_FIRINGS].astype(int),
                      failed_latches=hc[:, K.H_FAILED].astype(int), early_dropouts=hc[:, K.H_EARLY].astype(int),
                      time_above_holding_s=hc[:, K.H_ABOVE], peak_current_a=hc[:, K.H_PEAK_SW],
                      peak_line_current_a=hc[:, K.H_PEAK_LINE], i2t_a2s=hc[:, K.H_I2T],
                      line_i2t_a2s=hc[:, K.H_I2],
                      load_rms_v=rms_v, load_rms_a=rms_a, power_w=power, mean_current_a=mean_i, light=lt,
                      turn_off_energy_j=hc[:, K.H_E_OFF], clamp_energy_j=hc[:, K.H_E_CLAMP])


STABLE_ANGLE_DEG = 2.0     # engineering choice: firing angles that wander more than this are unstable


def _check_args(setting, firing_angle_deg, cycles, samples_per_cycle) -> None:
    if setting is not None and firing_angle_deg is not None:
        raise InputError("give a setting or a firing angle, not both", key="setting")
    if setting is not None and not (0.0 <= setting <= 1.0):
        raise InputError(f"{setting!r} is outside 0–1", key="setting")
    if firing_angle_deg is not None and not (0.0 <= firing_angle_deg <= 180.0):
        raise InputError(f"{firing_angle_deg!r}° is outside 0–180°", key="firing_angle_deg")
    if not (isinstance(cycles, (int, float)) and 0 < cycles <= 2000):
        raise InputError(f"{cycles!r} is not a number of cycles between 1 and 2000", key="cycles")
    if not (10 <= samples_per_cycle <= 20000):
        raise InputError(f"{samples_per_cycle!r} is outside 10–20000", key="samples_per_cycle")


def _settled_off(pk: _Packed, st: _State, max_cycles: int) -> _State:
    """The lamp-out periodic state: with nothing firing, power, angles and firings are all
    zero and say nothing, so settling is judged on the state vector itself.  One cycle
    at a time, the change of every unknown over the cycle, relative to its scale, is
    watched; its ratio to the previous cycle's change r gives the transient's decay per
    cycle, and the transient still to come is about change·r/(1 − r) (a geometric tail).
    Settled when that is below OFF_SETTLE_TOL, or when the change over a cycle is at the
    solver's noise (a drift that slow, such as a cold filament warming by a few hundredths
    of a kelvin a cycle on the off-state current, matters to no check)."""
    prev_y, prev_d = st.y, None
    for _ in range(max_cycles):
        _, _, st, _ = _run(pk, st, 1, 20)
        d = float(np.max(np.abs(st.y - prev_y) / pk.scale))
        if d <= OFF_SETTLE_NOISE * pk.P[K.RTOL]:
            break
        if prev_d is not None and prev_d > 0.0:
            r = d / prev_d
            if r < 1.0 and d * r / (1.0 - r) <= OFF_SETTLE_TOL:
                break
        prev_y, prev_d = st.y, d
    return st


# Engineering choice: the steady search starts lamp buses at 90 % of the mains peak
# (a running capacitor-input lamp's bus sits within its ripple below the peak).
STEADY_START_BUS_FRACTION = 0.9


def _steady(circuit: Circuit, pk: _Packed, t0: float, no_firing: bool) -> _State:
    """Run until the half-cycles repeat; return the state at a cycle boundary."""
    st = _cold_state(circuit, pk, t0)
    cored = any(ld.kind is LoadKind.MAGNETIC_TRANSFORMER for ld in circuit.all_loads)
    if no_firing:
        # lamps out: filaments stay at ambient (the off-state current warms them by
        # millikelvin), so the search starts from the cold state
        return _settled_off(pk, st, STEADY_MAX_CYCLES_CORE if cored else STEADY_MAX_CYCLES)
    # start filaments hot so the thermal transient is short (engineering choice)
    y = st.y.copy()
    for g, ld in enumerate(circuit.all_loads):
        if ld.kind is LoadKind.FILAMENT:
            y[int(pk.gxo[g])] = ld.operating_temperature_k
        elif ld.kind is LoadKind.MAGNETIC_TRANSFORMER:
            y[int(pk.gxo[g]) + 2] = _tr.LAMP_OPERATING_TEMPERATURE_K
        elif ld.kind is LoadKind.ELECTRONIC_TRANSFORMER:
            y[int(pk.gxo[g])] = _tr.LAMP_OPERATING_TEMPERATURE_K
        elif ld.kind is LoadKind.ELECTRONIC_DRIVER:
            # a capacitor-input lamp's bus sits near the mains peak once running: start it
            # there (engineering choice, as the filaments start hot).  This is the state a
            # dimmer reaches through its soft start; charging empty bulk capacitors at full
            # conduction instead can trip a trailing-edge dimmer's protection at every
            # half-cycle, a start-up the switch-on runs judge, not the periodic state
            y[int(pk.gxo[g])] = STEADY_START_BUS_FRACTION * circuit.supply.peak_v
    st = dataclasses.replace(st, y=y)
    # an electronic transformer's lamp is heated by the power it passes but does not act
    # back on it, so the electrical figures repeat before the lamp has settled: its
    # temperature is watched as well (engineering choice: to 0.5 K per two cycles)
    et_lamps = [int(pk.gxo[g]) for g, ld in enumerate(circuit.all_loads)
                if ld.kind is LoadKind.ELECTRONIC_TRANSFORMER]
    prev = None
    prev_et = None
    done = 0
    # an iron core's DC settles over tens of cycles (L_m/R); wait for it, more finely
    max_cycles = STEADY_MAX_CYCLES_CORE if cored else STEADY_MAX_CYCLES
    dc_tol = 5e-5 if cored else 1e-3
    while done < max_cycles:
        out, hc, st, _ = _run(pk, st, 2, 400 if done == 0 else 40)
        done += 2
        if done == 2:
            # move each filament to the temperature its measured rms gives (one jump)
            v_rms = math.sqrt(max(np.mean(hc[-2:, K.H_V2]) / (0.5 / (pk.P[K.OMEGA] / (2 * math.pi))), 0.0))
            y = st.y.copy()
            for g, ld in enumerate(circuit.all_loads):
                if ld.kind is LoadKind.FILAMENT and v_rms > 0.05 * ld.rated_voltage_v:
                    try:
                        y[int(pk.gxo[g])] = _fil.steady_temperature_k(ld, min(v_rms, 1.2 * ld.rated_voltage_v))
                    except (ValueError, InputError):
                        pass
            y = _settled_et_lamps(circuit, pk, y, out, 400)
            st = dataclasses.replace(st, y=y)
            continue
        # the DC line current settles with the slowest time constant (an iron core's
        # magnetising L/R, ~1 s), so it is watched too
        dc = np.sum(hc[-2:, K.H_I])
        rms = math.sqrt(max(np.sum(hc[-2:, K.H_I2]), 0.0) * (pk.P[K.OMEGA] / (2 * math.pi)))
        sig = np.concatenate([hc[-2:, K.H_VI], np.nan_to_num(hc[-2:, K.H_FIRE], nan=-1.0), hc[-2:, K.H_FIRINGS],
                              [dc * (pk.P[K.OMEGA] / (2 * math.pi))]])
        if prev is not None:
            scale = max(np.max(np.abs(prev[:2])), 1e-3)
            d_pow = np.max(np.abs(sig[:2] - prev[:2])) / scale
            d_ang = np.max(np.abs(sig[2:4] - prev[2:4]))
            d_fire = np.max(np.abs(sig[4:6] - prev[4:6]))
            d_dc = abs(sig[6] - prev[6])
            d_et = max((abs(st.y[i] - prev_et[i]) for i in et_lamps), default=0.0)
            if d_pow < 2e-3 and d_ang < 0.05 and d_fire == 0 and d_dc < max(dc_tol * rms, 1e-6) and d_et < 0.5:
                break
        prev = sig
        prev_et = st.y.copy()
    return st


def _settled_et_lamps(circuit: Circuit, pk: _Packed, y: np.ndarray, out: np.ndarray,
                      samples_per_cycle: int) -> np.ndarray:
    """y with each electronic transformer's lamp at the temperature at which it radiates
    the mean power the unit took over the last cycle of ``out`` (one jump)."""
    y = y.copy()
    last = slice(out.shape[0] - 1 - samples_per_cycle, out.shape[0] - 1)
    for g, ld in enumerate(circuit.all_loads):
        if ld.kind is LoadKind.ELECTRONIC_TRANSFORMER:
            p_unit = float(np.mean(out[last, K.O_VB] * out[last, K.N_O0 + g])) / ld.count
            y[int(pk.gxo[g])] = _et.lamp_temperature_k(ld, p_unit)
    return y


# ---------------------------------------------------------------------------
# The first run: numba compiles the integrator (15-60 s) and caches it on disk
# ---------------------------------------------------------------------------

# Called once per process, with no argument, just before the first simulation when the
# compiled integrator is not in numba's cache (a first run, or kernel.py edited): the
# command line prints a line on stderr, the app shows one.  None: say nothing.
compile_notice: Callable[[], None] | None = None
# What the command line (after "dimfit: ") and the app say then.
COMPILE_NOTICE = "compiling the simulator (first run only, 15–60 s)…"
_compile_checked = False
_compile_lock = threading.Lock()


def integrator_cached() -> bool:
    """Whether numba's on-disk cache holds the compiled integrator (``kernel.run``) for
    the current ``kernel.py``: a look at numba's cache index (~1 ms), the same test numba
    makes before it loads or compiles.  False when the cache cannot be read."""
    try:
        return bool(K.run._cache._cache_file._load_index())   # numba internals, pinned in pyproject.toml
    except Exception:
        return False


def _announce_compile() -> None:
    global _compile_checked
    if _compile_checked:
        return
    with _compile_lock:
        if _compile_checked:
            return
        _compile_checked = True
        if compile_notice is not None and not _integrator_ready():
            compile_notice()


def _integrator_ready() -> bool:
    """Compiled in this process already, or in numba's cache."""
    return bool(K.run.signatures) or integrator_cached()


def compile_ahead() -> None:
    """Compile, and leave in numba's on-disk cache, everything a simulation compiles:
    the integrator and the few compiled functions that are also called from Python
    (filament and tungsten figures), by simulating each built-in dimmer with every
    built-in lamp kind for one cycle, from cold and from the steady state.  The build
    runs this (setup.py) so that an installed copy carries its compiled code; after
    that, the first simulation loads it (~1 s) instead of compiling (15-60 s).

    numba keys its cache on this machine's processor, numba's version and the text of
    the source file (a hash, not the file's time), so a copy installed from a wheel
    built elsewhere, or a kernel.py edited since, compiles on first use as before."""
    from loads.catalogue import demo_circuit, list_archetypes

    demo = demo_circuit()
    lamps = [a.object for a in list_archetypes() if a.kind == "lamp"]
    by_kind = {ld.kind: ld for ld in lamps}            # one group of each lamp kind
    for d in (a.object for a in list_archetypes() if a.kind == "dimmer"):
        c = dataclasses.replace(demo, dimmer=d, loads=tuple(by_kind.values()))
        for start in (Start.COLD, Start.STEADY):
            simulate(c, setting=0.5, cycles=1, start=start, samples_per_cycle=40)
    simulate(demo, setting=0.5, cycles=1, start=Start.OFF, settle_lamps=True, samples_per_cycle=40)


def simulate(circuit: Circuit, *, setting: float | None = None, firing_angle_deg: float | None = None,
             cycles: int = 10, start: str | Start | object = Start.COLD, switch_on_deg: float = 0.0,
             no_firing: bool = False, samples_per_cycle: int = 400,
             tolerance: float = DEFAULT_TOLERANCE, settle_lamps: bool = False) -> SimResult:
    """Simulate ``circuit`` for ``cycles`` mains cycles (see module docstring).

    settle_lamps: continuing a carried state or from the lamp-out state, start the lamps
    of electronic transformers at the temperature of this run's mean lamp power (the
    sweeps use this: they stand for a knob turned slowly, and a 12 V halogen takes
    ~0.1–0.5 s to settle, longer than a sweep point).  Those lamps do not act back on the
    circuit, so the run is made once to measure the power and again from the same state."""
    _check_args(setting, firing_angle_deg, cycles, samples_per_cycle)
    _announce_compile()
    if firing_angle_deg is None and setting is None:
        setting = 1.0
    try:
        return _simulate(circuit, setting=setting, firing_angle_deg=firing_angle_deg, cycles=cycles, start=start,
                         switch_on_deg=switch_on_deg, no_firing=no_firing, samples_per_cycle=samples_per_cycle,
                         tolerance=tolerance, settle_lamps=settle_lamps)
    except SolverError as err:
        settings = {"setting": setting, "firing_angle_deg": firing_angle_deg, "cycles": cycles,
                    "start": start.value if isinstance(start, Start) else
                    (str(start) if isinstance(start, str) else "a state carried from the previous run"),
                    "switch_on_deg": switch_on_deg, "no_firing": no_firing,
                    "samples_per_cycle": samples_per_cycle, "tolerance": tolerance, "settle_lamps": settle_lamps}
        raise SolverError(err.reason, t_s=err.t_s, outputs=err.outputs, suspect=suspected_element(circuit, err.outputs),
                          circuit=circuit, settings=settings) from None


def suspected_element(circuit: Circuit, outputs) -> str | None:
    """The element whose figure at the point of failure is furthest beyond its scale
    (engineering choice: the dimmer's voltage against its clamp or 1.5× the supply peak,
    the load terminals' voltage against 1.5× the peak, a group's current against 20× its
    rated peak current); a guide for the bug report, not a diagnosis."""
    if outputs is None:
        return None
    o = np.asarray(outputs, dtype=float)
    peak = circuit.supply.peak_v
    d = circuit.dimmer
    vd_scale = d.clamp_voltage_v if d.edge is Edge.TRAILING else 1.5 * peak
    cand = [(abs(o[K.O_VD]) / vd_scale, f"the dimmer ({o[K.O_VD]:.0f} V across it)"),
            (abs(o[K.O_VB]) / (1.5 * peak), f"the load terminals and cable capacitance ({o[K.O_VB]:.0f} V)")]
    for g, ld in enumerate(circuit.all_loads):
        rated_peak = math.sqrt(2.0) * ld.count * ld.rated_power_w / ld.rated_voltage_v
        i = o[K.N_O0 + g] if K.N_O0 + g < o.size else 0.0
        what = "the correction device" if ld is circuit.correction else f"lamp group {g + 1} '{ld.name}'"
        cand.append((abs(i) / (20.0 * max(rated_peak, 1e-6)), f"{what} ({i:.3g} A)"))
    cand = [(r if np.isfinite(r) else np.inf, name) for r, name in cand]
    return max(cand, key=lambda c: c[0])[1]


def _simulate(circuit: Circuit, *, setting, firing_angle_deg, cycles, start, switch_on_deg, no_firing,
              samples_per_cycle, tolerance, settle_lamps) -> SimResult:
    pk = pack(circuit, setting=setting, firing_angle_deg=firing_angle_deg, no_firing=no_firing,
              tolerance=tolerance)
    period = circuit.supply.period_s
    t0 = (switch_on_deg % 360.0) / 360.0 * period
    if isinstance(start, _State):
        if start.signature != pk.signature:
            raise InputError("the saved state belongs to a different circuit", key="start")
        state = start
    else:
        mode = Start(start)
        if mode in (Start.COLD, Start.SWITCH_ON):
            state = _cold_state(circuit, pk, t0, start_up=mode is Start.SWITCH_ON)
        elif mode is Start.STEADY:
            state = _steady(circuit, pk, t0, no_firing)
        else:
            pk_off = pack(circuit, setting=setting, firing_angle_deg=firing_angle_deg, no_firing=True,
                          tolerance=tolerance)
            state = _steady(circuit, pk_off, t0, True)
    out, hc, end, counters = _run(pk, state, cycles, samples_per_cycle)
    carried = isinstance(start, _State) or Start(start) is Start.OFF
    if settle_lamps and carried and LoadKind.ELECTRONIC_TRANSFORMER in pk.kinds:
        state = dataclasses.replace(state, y=_settled_et_lamps(circuit, pk, state.y, out, samples_per_cycle))
        out, hc, end, counters = _run(pk, state, cycles, samples_per_cycle)
    t = state.t_s + np.arange(out.shape[0]) * (period / samples_per_cycle)
    light = _light_waveforms(circuit, pk, out)
    ng = len(pk.gk)
    return SimResult(t_s=t, supply_v=out[:, K.O_E], load_v=out[:, K.O_VB], load_a=out[:, K.O_IL],
                     dimmer_a=out[:, K.O_ISW], dimmer_v=out[:, K.O_VD],
                     group_a=out[:, K.N_O0:K.N_O0 + ng].T.copy(), group_light=light,
                     timing_v=out[:, K.O_VT], half_cycles=_half_cycles(hc, t, light, pk.kinds),
                     frequency_hz=circuit.supply.frequency_hz, setting=setting,
                     forced_firing_angle_deg=firing_angle_deg, final_state=end)


def reference_light_weights(circuit: Circuit) -> np.ndarray:
    """Weight of each group's light in the total: count × rated power × typical efficacy."""
    w = np.array([ld.count * ld.rated_power_w * EFFICACY_LM_W[ld.kind] for ld in circuit.all_loads])
    return w


def sweep(circuit: Circuit, settings: Sequence[float], direction: str = "down", *,
          cycles_per_point: int = 6, analysed_cycles: int = 3,
          progress: Callable[[int, int], None] | None = None, cancel=None) -> list[SweepPoint]:
    """Walk the control range carrying the circuit's state (see module docstring)."""
    if direction not in ("up", "down"):
        raise InputError(f"{direction!r} is not up or down", key="direction")
    if not settings:
        raise InputError("no settings to sweep", key="settings")
    for s in settings:
        _check_args(s, None, cycles_per_point, 400)
    if not (1 <= analysed_cycles <= cycles_per_point):
        raise InputError(f"{analysed_cycles!r} must be 1–cycles_per_point", key="analysed_cycles")
    order = sorted(settings, reverse=(direction == "down"))
    weights = reference_light_weights(circuit)
    wsum = weights.sum()
    state: object = Start.STEADY if direction == "down" else Start.OFF
    points = []
    for k, s in enumerate(order):
        if cancel is not None and cancel.is_set():
            break
        res = simulate(circuit, setting=s, cycles=cycles_per_point, start=state, samples_per_cycle=200,
                       settle_lamps=True)
        state = res.final_state
        points.append(sweep_point(res, direction, s, analysed_cycles, weights, wsum))
        if progress is not None:
            progress(k + 1, len(order))
    return points


def sweep_point(res: SimResult, direction: str, setting: float, analysed_cycles: int,
                 weights: np.ndarray, wsum: float) -> SweepPoint:
    hc = res.half_cycles
    sel = slice(len(hc) - 2 * analysed_cycles, len(hc))
    fire = hc.firing_angle_deg[sel]
    ext = hc.extinction_angle_deg[sel]
    fired = np.isfinite(fire)
    n = len(fire)
    fire_mean = float(np.mean(fire[fired])) if fired.any() else None
    cond = ext - fire
    cond_ok = fired & np.isfinite(cond)
    cond_mean = float(np.mean(cond[cond_ok])) if cond_ok.any() else None
    glight = np.nanmean(hc.light[sel], axis=0) if n else np.zeros(len(weights))
    glight = np.nan_to_num(glight)
    total = float(np.dot(weights, glight) / wsum) if wsum > 0 else 0.0
    t0 = hc.start_s[sel.start] if n else res.t_s[0]
    m = res.t_s >= t0 - 1e-12
    light_wave = (weights @ res.group_light[:, m]) / wsum if wsum > 0 else np.zeros(int(m.sum()))
    per_half_light = hc.light[sel] @ weights / wsum if wsum > 0 else np.zeros(n)
    spread = float(np.ptp(fire[fired])) if fired.sum() > 1 else 0.0
    light_var = float(np.ptp(per_half_light) / max(np.mean(per_half_light), 1e-9)) if n else 0.0
    stable = bool(fired.all() and spread <= STABLE_ANGLE_DEG and int(hc.failed_latches[sel].sum()) == 0
                  and light_var < 0.1) or bool((~fired).all() and total < 1e-3)
    return SweepPoint(direction=direction, setting=float(setting), firing_angle_deg=fire_mean,
                      conduction_angle_deg=cond_mean,
                      load_rms_v=float(np.sqrt(np.mean(hc.load_rms_v[sel] ** 2))),
                      load_rms_a=float(np.sqrt(np.mean(hc.load_rms_a[sel] ** 2))),
                      power_w=float(np.mean(hc.power_w[sel])), light_fraction=total,
                      group_light=tuple(float(x) for x in glight),
                      fired_fraction=float(fired.mean()) if n else 0.0,
                      failed_latches=int(hc.failed_latches[sel].sum()),
                      early_dropouts=int(hc.early_dropouts[sel].sum()),
                      refirings=int(np.maximum(hc.firings[sel] - 1, 0).sum()), stable=stable,
                      light_t_s=res.t_s[m], light=light_wave)
