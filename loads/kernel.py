"""The circuit integrator: a compiled (numba) TR-BDF2 solver with located events.

The circuit is one loop: supply EMF e(t) behind R_s, L_s → dimmer (switch branch with
choke L_c; snubber R–C, rc-diac timing branch and two-wire self-supply across it) →
load terminal b (node capacitance C_b = wiring + input capacitors) → lamp groups →
neutral.  Unknowns y (index constants below):

    L_s·di_L/dt   = e − R_s·i_L − v_d − v_b                      line current
    L_c·di_sw/dt  = v_d − V_T·sat(i_sw) − r_T·i_sw   (switch on; algebraic if L_c = 0)
             0    = i_sw                              (switch off)
             0    = i_L − i_sw − i_sn − i_t − i_ss − i_clamp − G_leak·v_d   (KCL, dimmer)
    C_b·dv_b/dt   = i_L − Σ_k n_k·i_k(v_b, x_k) − (v_b − v_w)/R_w  load terminal
    C_sn·dv_sn/dt = i_sn = (v_d − v_sn)/R_sn                     snubber
    C_t·dv_t/dt   = (v_d − v_t)/R_t − i_diac                     timing capacitor
    C_w·dv_w/dt   = (v_b − v_w)/R_w                               cable capacitance (damped)
    M_k·dx_k/dt   = f_k(v_b, x_k)                                 each load unit's states

i.e. a semi-explicit DAE  M·y' = F(t, y, mode)  with a diagonal, mode-dependent mass M
(zero rows are algebraic).  Between events every element is smooth, and most are
linear; switching devices, diode bridges, converter start/stop and core saturation are
discrete modes whose changes are *events*: guard functions g(y) are watched, a sign
change inside a step is located by bisection/secant on the step length to within
EVENT_TOL_S, and the modes are updated exactly there.  Time events (supply zero
crossings, phase-control gate pulses, trailing-edge turn-off) end steps exactly.

Integration: TR-BDF2 (Bank et al. 1985; one trapezoidal stage to t+γh, one BDF2 stage
to t+h, γ = 2 − √2), L-stable and second order, with both stages sharing the iteration
matrix M − d·h·J (d = γ/2); the local error estimate
    LTE ≈ C·h³·y''' ,  C = (−3γ² + 4γ − 2)/(12(2 − γ)),
with h³y''' from the second divided difference of F over the three stage points; the
error test covers the differential unknowns (the algebraic ones follow from them).
Being L-stable, the method damps oscillations it does not resolve: a high-Q parasitic
ring that the error test lets through fades faster than it physically would.
After every mode change the algebraic unknowns are made consistent by one backward
Euler step of 1 ns (fast parasitic modes relax; the
state advances by that 1 ns, well inside the event tolerance).

Why compiled: a pure-Python step costs tens of microseconds and a mains cycle needs
hundreds to thousands of steps around the fast switching transients; numba brings a
step to a few microseconds (see README, Speed).  numba's on-disk cache of this module
is keyed on this file's text alone: it does not see edits to the load modules whose
unit functions are compiled into it; after such an edit clear loads/__pycache__/kernel.*
(or change this file).

Compile time (the first run, measured with numba 0.68): numba compiles every function
on its own (type inference, lowering, LLVM, a cache entry), and links and optimises
each callee's machine code again into every caller, so a function costs ~0.05-0.1 s
however small and a wrapper with two dozen array arguments ~0.5 s.  The load modules'
unit functions and the three wrappers of ``run`` (``_settle_modes``, ``_bail_forward``,
``_modes_neutral``) are therefore inlined by numba itself (``inline="always"``: its
IR-level inlining, before typing) into their callers and never compiled on their
own.  The larger functions stay separate: inlining everything made the compile slower
(numba's SSA and rewrite passes grow faster than linearly with a function's size).
``run`` copies arrays with ``_copy_into``, not slice assignment, which would compile
numba's shape-mismatch message with its string formatting (~1.5 s).
"""
from __future__ import annotations

import math

import numba
import numpy as np

from loads import driver as _drv
from loads import electronic_transformer as _et
from loads import filament as _fil
from loads import linear as _lin
from loads import transformer as _tr

# --- unknowns y[...] (the load groups' own unknowns follow, from N_CORE) -------------
IL = 0        # line current, source to load terminal [A]
ISW = 1       # switch current [A]
VD = 2        # voltage across the dimmer [V]
VB = 3        # load terminal voltage [V]
VSN = 4       # snubber capacitor voltage [V]
VT = 5        # rc-diac timing capacitor voltage [V]
VW = 6        # wiring (cable) capacitance voltage, behind its damping resistor [V]
N_CORE = 7

# --- circuit parameters P[...] (floats, SI; filled by loads.simulation.pack) ------------
# supply and wiring
VPK = 0       # supply peak EMF [V]
OMEGA = 1     # supply angular frequency [rad/s]
RS = 2        # source resistance [Ω]
LS = 3        # source inductance [H]
CB = 4        # capacitance at the load terminal [F]
CW = 33       # cable capacitance kept behind RW [F]
RW = 34       # its damping resistance [Ω]
# the dimmer's power path
LC = 5        # RFI choke [H]
RON = 6       # switch on-state resistance [Ω]
VTD = 7       # switch on-state voltage [V]
GLEAK = 27    # switch off-state conductance [S]
IH = 8        # holding current [A]
ILATCH = 9    # latching current [A]
DIDTC = 35    # commutating di/dt limit [A/s] (inf: none)
TQ = 36       # triac turn-off time [s]
RSN = 12      # snubber resistance [Ω]
CSN = 13      # snubber capacitance [F]
ISS = 22      # two-wire self-supply current [A]
VCL = 23      # trailing-edge clamp voltage [V]
RCL = 24      # clamp slope resistance [Ω]
TRIP = 25     # trailing-edge protection trip current [A]
TRAMP = 32    # trailing-edge turn-off time: the dimmer voltage's rise to the supply peak [s]
SOFT = 37     # trailing-edge soft-start time [s]
SLOPE = 38    # trailing-edge turn-off: slope of the dimmer voltage, VPK / TRAMP [V/s] (0: opens at once)
TRIPD = 39    # trailing-edge protection: time the current must stay above TRIP to trip it [s]
# the dimmer's control
ALPHA = 26    # phase controller's firing angle [rad]
IGT = 10      # gate trigger current [A]
GATEW = 11    # gate drive window [s]
RT = 14       # rc-diac timing resistance, fixed + pot [Ω]
CT = 15       # rc-diac timing capacitance [F]
VBOP = 16     # diac breakover voltage, positive [V]
VBON = 17     # diac breakover voltage, negative [V]
VONP = 18     # diac voltage after snapback, positive [V]
VONN = 19     # diac voltage after snapback, negative [V]
RG = 20       # diac-to-gate resistance [Ω]
IDOFF = 21    # diac turn-off current [A]
# the solver and the records
HMAX = 28     # largest step [s]
RTOL = 29     # relative tolerance [1]
EVTOL = 30    # event location tolerance [s]
EARLY = 31    # a drop-out this far before the half-cycle's end is early [deg]
N_P = 40

# --- integer parameters IP[...] ----------------------------------------------------------
EDGE = 0      # LEADING | TRAILING
CONTROL = 1   # PHASE | RC_DIAC
NOFIRE = 2    # 1: the switch never fires (lamp-out state)
NG = 3        # number of load groups [1]
NY = 4        # number of unknowns [1]
GDRIVE = 5    # SINGLE_PULSE | UNTIL_LATCHED | RETRIGGER: a phase controller's gate drive (loads.dimmer)
N_IP = 6
LEADING, TRAILING = 0, 1
PHASE, RC_DIAC = 0, 1
SINGLE_PULSE, UNTIL_LATCHED, RETRIGGER = 0, 1, 2
# Engineering choice: a retriggering phase controller sees its switch as off once the
# voltage across it, in the half-cycle's polarity, exceeds this: well above the
# triac's on-state drop (1–1.5 V), far below the supply's voltage where a re-fire matters.
RETRIGGER_SENSE_V = 10.0
# Engineering choice (from memory: a controller's pulse train is made of pulses of some
# tens of µs to ~100 µs): a re-fire drives the gate for one such pulse, never longer than
# the dimmer's own gate window (which may be a drive held far longer at the firing angle).
RETRIGGER_PULSE_S = 100e-6

# --- discrete state S[...] (ints; one mode per group follows, from N_S) ------------------
SW_ON = 0     # switch conducting: 0 off, 1 on, RAMPING
GATE = 1      # gate driven: 0 | 1
LATCHED = 2   # 0 no, 1 yes, CARRIED, DIPPING
DIAC_ON = 3   # rc-diac's diac conducting: 0 | 1
DIAC_POL = 4  # its polarity: +1 | −1
CLAMP = 5     # trailing-edge clamp conducting: 0 | 1
HCIDX = 6     # index of the current half-cycle record [1]
FIRE_HC = 7   # half-cycle record of the conduction under way (−1: none) [1]
TRIPPED = 8   # trailing-edge protection has tripped: 0 | 1
CPOL = 9      # polarity of the conduction under way (of a trailing-edge turn-off too): +1 | −1
REFIRED = 10  # the gate drive under way is a retriggering controller's re-fire: 0 | 1
N_S = 11
RAMPING = 2   # S[SW_ON] while a trailing-edge switch turns off (its voltage rising at SLOPE)
CARRIED = 2   # S[LATCHED]: conducting on through a failed commutation
DIPPING = 3   # S[LATCHED]: below I_H for less than the turn-off time, still conducting

# --- discrete state Q[...] (floats; four per group follow, from N_Q: level [1], t_up [s],
# t_down [s], sense state, see _sense_edges) ----------------------------------------------
GATE_END = 0     # end of the gate drive [s]
T_FIRE = 1       # next phase-control firing [s] (inf: none)
T_OFF = 2        # next trailing-edge turn-off [s] (inf: none)
HC_START = 3     # start of the current half-cycle [s]
RAMP_I0 = 4      # switch current where a turn-off began (its sign: the polarity) [A]
T_RAMP0 = 5      # when that turn-off began [s]
DIDT = 6         # switch current's slope over the last step [A/s]
T_DIP = 7        # when the current fell below I_H [s]
T_DIP_END = 8    # when that dip has lasted the turn-off time [s]
T_SYNC = 9       # the first supply zero crossing after the supply appeared [s] (−inf: long
                 # ago): a phase controller does nothing before it, a soft start ramps from it
RAMP_V0 = 10     # dimmer voltage where a turn-off began [V]
T_TRIP = 11      # when a current above the trip level will have lasted the trip delay [s] (inf: none)
N_Q = 12

# --- half-cycle record columns HC[k, ...] --------------------------------------------------
H_START = 0      # start (supply zero crossing) [s]
H_FIRE = 1       # first firing angle [deg] (nan: none)
H_EXT = 2        # extinction angle [deg] (nan: none)
H_FIRINGS = 3    # triggers [1]
H_FAILED = 4     # triggers that failed to latch [1]
H_EARLY = 5      # early drop-outs [1]
H_ABOVE = 6      # time the switch current was at or above I_H [s]
H_PEAK_SW = 7    # peak |switch current| [A]
H_PEAK_LINE = 8  # peak |line current| [A]
H_I2T = 9        # ∫ i_switch² dt [A²s]
H_V2 = 10        # ∫ v_load² dt [V²s]
H_I2 = 11        # ∫ i_line² dt [A²s]
H_VI = 12        # ∫ v_load·i_line dt [J]
H_I = 13         # ∫ i_line dt [A·s]
H_E_OFF = 14     # ∫ v_dimmer·i_switch dt while the switch turns off: heat in the transistor [J]
H_E_CLAMP = 15   # ∫ v_dimmer·i_clamp dt: energy absorbed by the clamp [J]
N_H = 16

# --- output columns OUT[k, ...] (each group's current [A], then its light state, follow) ---
O_E = 0       # source EMF [V]
O_VB = 1      # load terminal voltage [V]
O_IL = 2      # line current [A]
O_ISW = 3     # switch current [A]
O_VD = 4      # dimmer voltage [V]
O_VT = 5      # timing capacitor voltage [V]
N_O0 = 6

# --- load kinds --------------------------------------------------------------------
K_FILAMENT, K_MAGNETIC, K_DRIVER, K_ETRANS, K_LINEAR = range(5)

GAMMA = 2.0 - math.sqrt(2.0)
D_COEF = GAMMA / 2.0
LTE_C = (-3 * GAMMA ** 2 + 4 * GAMMA - 2) / (12 * (2 - GAMMA))
# quadrature weights exact for quadratics on nodes 0, γ, 1
W_G = 1.0 / (6.0 * GAMMA * (1.0 - GAMMA))
W_1 = 0.5 - GAMMA * W_G
W_0 = 1.0 - W_G - W_1
VT_SMOOTH_MIN_A = 1e-3   # engineering choice: the on-state drop ramps over at least ±1 mA (see residual)
SELF_SUPPLY_KNEE_V = 10.0   # engineering choice: a two-wire supply draws its current once ~10 V is across it
CONSISTENT_STEP_S = 1e-9
NEWTON_TOL = 0.03        # engineering choice: Newton stops at 3 % of the error weights (Hairer & Wanner use 1–10 %)
MAX_BAILS = 2000       # engineering choice: give up after this many 1 ns bail-outs in one run
HOLD_FAC = 1.2         # engineering choice: a step may grow by up to 20 % unused, keeping the factored matrix
NEWTON_TOL_FIRST = 0.003   # engineering choice: a first Newton correction is accepted at 1/10 of NEWTON_TOL
JAC_AGE = 8            # engineering choice: steps between Jacobian refreshes


# --------------------------------------------------------------------------- loads
@numba.njit(cache=True, _nrt=False)
def _unit_current(kind, v, y, xo, p, mode):
    if kind == K_FILAMENT:
        return v / _fil.resistance_ohm(y[xo], p)
    elif kind == K_MAGNETIC:
        return _tr.unit_current(v, y, xo, p, mode)
    elif kind == K_DRIVER:
        return _drv.unit_current(v, y, xo, p, mode)
    elif kind == K_ETRANS:
        return _et.unit_current(v, y, xo, p, mode)
    return _lin.unit_current(v, y, xo, p, mode)


@numba.njit(cache=True, _nrt=False)
def _unit_rhs(kind, v, y, xo, p, mode, level, F):
    if kind == K_FILAMENT:
        t = y[xo]
        r = _fil.resistance_ohm(t, p)
        F[xo] = _fil.temperature_rate_k_s(t, v * v / r, p)
    elif kind == K_MAGNETIC:
        _tr.unit_rhs(v, y, xo, p, mode, level, F)
    elif kind == K_DRIVER:
        _drv.unit_rhs(v, y, xo, p, mode, level, F)
    elif kind == K_ETRANS:
        _et.unit_rhs(v, y, xo, p, mode, level, F)
    else:
        _lin.unit_rhs(v, y, xo, p, mode, level, F)


@numba.njit(cache=True, _nrt=False)
def _unit_mass(kind, p, M, xo):
    if kind == K_FILAMENT:
        M[xo] = 1.0
    elif kind == K_MAGNETIC:
        _tr.unit_mass(p, M, xo)
    elif kind == K_DRIVER:
        _drv.unit_mass(p, M, xo)
    elif kind == K_ETRANS:
        _et.unit_mass(p, M, xo)
    else:
        _lin.unit_mass(p, M, xo)


@numba.njit(cache=True, _nrt=False)
def _unit_guards(kind, v, y, xo, p, mode, g, k):
    if kind == K_MAGNETIC:
        return _tr.unit_guards(v, y, xo, p, mode, g, k)
    elif kind == K_DRIVER:
        return _drv.unit_guards(v, y, xo, p, mode, g, k)
    elif kind == K_ETRANS:
        return _et.unit_guards(v, y, xo, p, mode, g, k)
    return k


@numba.njit(cache=True, _nrt=False)
def _unit_mode(kind, v, y, xo, p, mode):
    if kind == K_MAGNETIC:
        return _tr.unit_mode(v, y, xo, p, mode)
    elif kind == K_DRIVER:
        return _drv.unit_mode(v, y, xo, p, mode)
    elif kind == K_ETRANS:
        return _et.unit_mode(v, y, xo, p, mode)
    return 0


@numba.njit(cache=True, _nrt=False)
def _unit_light_state(kind, v, y, xo, p, mode, level):
    if kind == K_FILAMENT:
        return y[xo]
    elif kind == K_MAGNETIC:
        return _tr.unit_light_state(v, y, xo, p, mode, level)
    elif kind == K_DRIVER:
        return _drv.unit_light_state(v, y, xo, p, mode, level)
    elif kind == K_ETRANS:
        return _et.unit_light_state(v, y, xo, p, mode, level)
    return _lin.unit_light_state(v, y, xo, p, mode, level)


# --------------------------------------------------------------------------- dimmer
@numba.njit(cache=True, _nrt=False)
def _diac_current(y, P, S):
    if S[DIAC_ON] == 0:
        return 0.0
    if S[DIAC_POL] > 0:
        return (y[VT] - P[VONP]) / P[RG]
    return (y[VT] + P[VONN]) / P[RG]


@numba.njit(cache=True, _nrt=False)
def _branch_paths(y, P, IP, g, i):
    """The dimmer's current balance, linear in its voltage v_d (draws g·v_d − i), with the
    snubber's and the rc-diac timing branch's shares added to g [S] and i [A]."""
    if P[CSN] > 0.0:
        g += 1.0 / P[RSN]
        i += y[VSN] / P[RSN]
    if IP[CONTROL] == RC_DIAC:
        g += 1.0 / P[RT]
        i += y[VT] / P[RT]
    return g, i


@numba.njit(cache=True, _nrt=False)
def _open_dimmer_voltage(y, isw, P, IP):
    """Voltage across the open (or ramping) dimmer that its non-clamp paths need to carry
    the line current less the switch's isw (the self-supply taken at its linear slope)."""
    g, i0 = _branch_paths(y, P, IP, P[GLEAK] + P[ISS] / SELF_SUPPLY_KNEE_V, y[IL] - isw)
    vd = i0 / g
    if P[ISS] > 0.0 and abs(vd) > SELF_SUPPLY_KNEE_V:
        # past its knee the self-supply draws a constant current, no more: the voltage
        # the other paths need is then larger (an inductive load's current, forced on by
        # its stored energy, would otherwise be left without the clamp and drive the
        # dimmer to kilovolts: the step collapsed there)
        sign = 1.0 if vd > 0.0 else -1.0
        vd = (i0 - sign * P[ISS]) / (g - P[ISS] / SELF_SUPPLY_KNEE_V)
    return vd


@numba.njit(cache=True, _nrt=False)
def _open_node_voltage(z, il0, gl, P, IP, S):
    """The voltage across an open switch (or an on one behind its choke, whose current is
    then a state) that satisfies the dimmer's KCL row of the residual exactly, with the line current il0 − gl·v_d (gl = 0: the line current is
    taken as it is) and the other unknowns from z (switch current, snubber and timing
    capacitor voltages, the clamp's state).  The row is monotone and piecewise linear in
    v_d (the self-supply is linear within its knee, constant past it), so this is its
    closed-form root.  Newton on that row alone cycles: from past the knee its
    slope is only the snubber's and the leakage's conductance, each correction
    overshoots to the other polarity's side of the knee and back (±40 V and more, for
    ever, with a 25 kΩ snubber and a 1.7 mA self-supply); see ``newton``."""
    g, i0 = _branch_paths(z, P, IP, P[GLEAK] + gl, il0 - z[ISW])
    if IP[EDGE] == TRAILING and S[CLAMP] != 0:
        g += 1.0 / P[RCL]
        i0 += S[CLAMP] * P[VCL] / P[RCL]
    ks = P[ISS] / SELF_SUPPLY_KNEE_V
    vd = i0 / (g + ks)
    if abs(vd) > SELF_SUPPLY_KNEE_V:
        sign = 1.0 if vd > 0.0 else -1.0
        vd = (i0 - sign * P[ISS]) / g
    return vd


@numba.njit(cache=True, _nrt=False)
def _turn_off_voltage(t, P, Q):
    """Voltage across a trailing-edge switch turning off: from where it began, rising at
    the set slope in the direction of the current it carried."""
    pol = 1.0 if Q[RAMP_I0] > 0.0 else -1.0
    return Q[RAMP_V0] + pol * P[SLOPE] * (t - Q[T_RAMP0])


@numba.njit(cache=True, _nrt=False)
def _clamp_current(vd, P, S):
    c = S[CLAMP]
    if c == 0:
        return 0.0
    return (vd - c * P[VCL]) / P[RCL]


# --------------------------------------------------------------------------- system
@numba.njit(cache=True, _nrt=False)
def residual(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, F):
    """F(t, y) for the current modes (see module docstring)."""
    e = P[VPK] * math.sin(P[OMEGA] * t)
    il = y[IL]
    isw = y[ISW]
    vd = y[VD]
    vb = y[VB]
    F[IL] = e - P[RS] * il - vd - vb
    if S[SW_ON] == 1:
        # the on-state drop V_T ramps linearly through zero over ±I_H: continuous, and its
        # kinks sit where the holding guards end a step anyway (a carried current crosses
        # zero inside the linear part)
        F[ISW] = vd - P[VTD] * min(max(isw / max(P[IH], VT_SMOOTH_MIN_A), -1.0), 1.0) - P[RON] * isw
    elif S[SW_ON] == RAMPING:
        # trailing-edge turn-off: the gate drive makes the switch's voltage rise at a set
        # slope; the switch carries whatever current the circuit then drives through it
        # (in its linear region), until that current reaches zero
        F[ISW] = vd - _turn_off_voltage(t, P, Q)
    else:
        F[ISW] = -isw
    isn = 0.0
    if P[CSN] > 0.0:
        isn = (vd - y[VSN]) / P[RSN]
        F[VSN] = isn
    else:
        F[VSN] = -y[VSN]
    it = 0.0
    if IP[CONTROL] == RC_DIAC:
        it = (vd - y[VT]) / P[RT]
        F[VT] = it - _diac_current(y, P, S)
    else:
        F[VT] = -y[VT]
    iss = P[ISS] * min(max(vd / SELF_SUPPLY_KNEE_V, -1.0), 1.0)
    icl = 0.0
    if IP[EDGE] == TRAILING:
        icl = _clamp_current(vd, P, S)
    F[VD] = il - isw - isn - it - iss - icl - P[GLEAK] * vd
    itot = 0.0
    for g in range(IP[NG]):
        p = GP[gpo[g]:gpo[g] + gnp[g]]
        mode = S[N_S + g]
        itot += gn[g] * _unit_current(gk[g], vb, y, gxo[g], p, mode)
        _unit_rhs(gk[g], vb, y, gxo[g], p, mode, Q[N_Q + 4 * g], F)
    if P[RW] > 0.0:
        # the cable's capacitance behind its damping resistance (see loads.supply)
        iw = (vb - y[VW]) / P[RW]
        F[VW] = iw
        itot += iw
    else:
        F[VW] = -y[VW]
    F[VB] = il - itot


@numba.njit(cache=True, _nrt=False)
def mass(P, IP, S, gk, gxo, gpo, gnp, GP, M):
    M[IL] = P[LS]
    M[ISW] = P[LC] if (S[SW_ON] != 0 and P[LC] > 0.0) else 0.0
    M[VD] = 0.0
    M[VB] = P[CB]
    M[VSN] = P[CSN]
    M[VT] = P[CT] if IP[CONTROL] == RC_DIAC else 0.0
    M[VW] = P[CW] if P[RW] > 0.0 else 0.0
    for g in range(IP[NG]):
        _unit_mass(gk[g], GP[gpo[g]:gpo[g] + gnp[g]], M, gxo[g])


@numba.njit(cache=True, _nrt=False)
def guards(y, P, IP, S, gk, gxo, gpo, gnp, GP, g):
    """Functions whose sign change is a mode change; returns how many were written."""
    k = 0
    isw = abs(y[ISW])
    if IP[EDGE] == LEADING:
        if S[SW_ON] != 0:
            # signed in the conduction direction, so a current that swings through zero
            # inside one step is still seen to fall below the threshold
            ic = S[CPOL] * y[ISW]
            if S[GATE] != 0 and S[LATCHED] == 0:
                # a drive held until the switch latches waits for this half-cycle's current
                # (CPOL holds its polarity), not the previous one's still flowing
                g[k] = (S[CPOL] * y[ISW] if IP[GDRIVE] != SINGLE_PULSE else abs(y[ISW])) - P[ILATCH]
                k += 1
            if S[GATE] == 0 and S[LATCHED] != 0:
                g[k] = ic - P[IH]
                k += 1
            if S[LATCHED] == DIPPING:
                # a dip below I_H ends where the current reaches zero (or at the turn-off time)
                g[k] = ic
                k += 1
            if S[LATCHED] == CARRIED:
                g[k] = -ic - P[IH]
                k += 1
        elif IP[CONTROL] == PHASE and IP[GDRIVE] == RETRIGGER and S[FIRE_HC] == S[HCIDX] and IP[NOFIRE] == 0:
            # off after firing in this half-cycle: a retriggering controller watches the
            # voltage across the switch (its polarity is judged in update_modes)
            g[k] = abs(y[VD]) - RETRIGGER_SENSE_V
            k += 1
        if IP[CONTROL] == RC_DIAC:
            if S[DIAC_ON] == 0:
                g[k] = y[VT] - P[VBOP]
                g[k + 1] = -y[VT] - P[VBON]
                k += 2
            else:
                idi = abs(_diac_current(y, P, S))
                g[k] = idi - P[IGT]
                g[k + 1] = idi - P[IDOFF]
                k += 2
    else:
        if S[SW_ON] == 1:
            g[k] = isw - P[TRIP]
            k += 1
        elif S[SW_ON] == RAMPING:
            # a turn-off ends where the switch current reaches zero
            g[k] = S[CPOL] * y[ISW]
            k += 1
        g[k] = abs(y[VD]) - P[VCL]
        k += 1
    vb = y[VB]
    for j in range(IP[NG]):
        k = _unit_guards(gk[j], vb, y, gxo[j], GP[gpo[j]:gpo[j] + gnp[j]], S[N_S + j], g, k)
    return k


@numba.njit(cache=True, _nrt=False)
def outputs(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, o):
    o[O_E] = P[VPK] * math.sin(P[OMEGA] * t)
    o[O_VB] = y[VB]
    o[O_IL] = y[IL]
    o[O_ISW] = y[ISW]
    o[O_VD] = y[VD]
    o[O_VT] = y[VT]
    ng = IP[NG]
    vb = y[VB]
    for g in range(ng):
        p = GP[gpo[g]:gpo[g] + gnp[g]]
        mode = S[N_S + g]
        o[N_O0 + g] = gn[g] * _unit_current(gk[g], vb, y, gxo[g], p, mode)
        o[N_O0 + ng + g] = _unit_light_state(gk[g], vb, y, gxo[g], p, mode, Q[N_Q + 4 * g])


# --------------------------------------------------------------------------- linear algebra
@numba.njit(cache=True, _nrt=False)
def lu_factor(A, piv):
    n = A.shape[0]
    for k in range(n):
        m = k
        big = abs(A[k, k])
        for i in range(k + 1, n):
            if abs(A[i, k]) > big:
                big = abs(A[i, k])
                m = i
        piv[k] = m
        if big == 0.0:
            return False
        if m != k:
            for j in range(n):
                tmp = A[k, j]
                A[k, j] = A[m, j]
                A[m, j] = tmp
        inv = 1.0 / A[k, k]
        for i in range(k + 1, n):
            A[i, k] *= inv
            f = A[i, k]
            if f != 0.0:
                for j in range(k + 1, n):
                    A[i, j] -= f * A[k, j]
    return True


@numba.njit(cache=True, _nrt=False)
def lu_solve(A, piv, b):
    n = A.shape[0]
    for k in range(n):
        m = piv[k]
        if m != k:
            tmp = b[k]
            b[k] = b[m]
            b[m] = tmp
    for i in range(n):
        s = b[i]
        for j in range(i):
            s -= A[i, j] * b[j]
        b[i] = s
    for i in range(n - 1, -1, -1):
        s = b[i]
        for j in range(i + 1, n):
            s -= A[i, j] * b[j]
        b[i] = s / A[i, i]


# --------------------------------------------------------------------------- integrator
@numba.njit(cache=True, _nrt=False)
def jacobian(t, y, F0, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, J, work, F1):
    n = y.shape[0]
    for j in range(n):
        for i in range(n):
            work[i] = y[i]
        dy = 1e-7 * max(abs(y[j]), scale[j])
        work[j] += dy
        residual(t, work, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, F1)
        for i in range(n):
            J[i, j] = (F1[i] - F0[i]) / dy


@numba.njit(cache=True, _nrt=False)
def _choke_projects(P, IP, S, M):
    """Whether an on switch behind its choke has its voltage set to the dimmer's KCL root
    (see newton): only where the row has the self-supply's knee to cycle across and a
    slope past it other than the leakage's (snubber or timing branch)."""
    return (S[SW_ON] == 1 and M[ISW] > 0.0 and P[ISS] > 0.0
            and (P[CSN] > 0.0 or IP[CONTROL] == RC_DIAC))


@numba.njit(cache=True, _nrt=False)
def newton(t, z, rhs, c, M, A, piv, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, wt, F, G, nstate, project):
    """Solve M·z − c·F(t, z) = rhs with the factored iteration matrix A = M − c·J.

    Converged when the estimated remaining correction θ/(1 − θ)·‖Δ‖ (θ the contraction
    rate) is below NEWTON_TOL of the error weights (Hairer & Wanner's test); after the
    first correction θ/(1 − θ) is the one carried in nstate[1] from earlier solves, and
    the test is ten times stricter (NEWTON_TOL_FIRST).  On return
    F holds F(t, z) on the differential rows, recovered from M·z − c·F = rhs, and zero on
    the algebraic rows (which the iteration has solved).

    project (with the switch open): after each correction the dimmer's voltage and the
    line current are set to the exact joint solution of their two rows, the dimmer's KCL
    and the line's M·i_L − c·(e − R_s·i_L − v_d − v_b) = rhs, for the other unknowns as
    they stand (``_open_node_voltage``); the corrections counted for them are the changes
    that makes.  The iteration then moves the load and capacitor voltages only.  Past
    the self-supply's knee the dimmer's row has only the snubber's, timing branch's or
    leakage's slope: plain Newton on it swung the voltage to the other side of the knee
    and back for ever, or stopped with a residual of nanoamps that, through a leakage of
    10 nS, left the voltage hundreds of volts off (the clamp then conducted where it
    does not).  The solution is the one the plain iteration converges to where it does;
    the callers try the plain iteration after a projected one fails."""
    n = z.shape[0]
    prev = 0.0
    open_sw = project and S[SW_ON] == 0 and (M[IL] > 0.0 or P[RS] > 0.0)
    # an on switch behind its choke: the switch current is a state, so the dimmer's voltage
    # is again held by its KCL row alone, and plain Newton cycles across the self-supply's
    # knee the same way (an rc-diac's triac firing at −38 V with a 51 mA self-supply and
    # 3.3 kΩ timing branch: ±100–300 V in turn); it is set to that row's root.  The
    # callers try this only after the plain iteration fails: with the line current and
    # the switch current held, the root amplifies their residuals by 1/G_leak where
    # leakage is the row's only slope (a leading-edge dimmer with neutral), so it is
    # used only where a snubber or timing branch gives the row slope (_choke_projects)
    choke_on = project and _choke_projects(P, IP, S, M)
    e = P[VPK] * math.sin(P[OMEGA] * t)
    for it in range(12):
        residual(t, z, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, F)
        for i in range(n):
            G[i] = M[i] * z[i] - c * F[i] - rhs[i]
        lu_solve(A, piv, G)
        vd_old = z[VD]
        il_old = z[IL]
        for i in range(n):
            z[i] -= G[i]
        if open_sw:
            d = M[IL] + c * P[RS]
            gl = c / d
            il0 = (rhs[IL] + c * (e - z[VB])) / d
            z[VD] = _open_node_voltage(z, il0, gl, P, IP, S)
            z[IL] = il0 - gl * z[VD]
            G[VD] = vd_old - z[VD]
            G[IL] = il_old - z[IL]
        elif choke_on:
            z[VD] = _open_node_voltage(z, z[IL], 0.0, P, IP, S)
            G[VD] = vd_old - z[VD]
        nrm = 0.0
        for i in range(n):
            r = G[i] * wt[i]
            nrm += r * r
        nrm = math.sqrt(nrm / n)
        if not np.isfinite(nrm):
            return False
        done = nrm < 1e-3
        if it == 0:
            # the contraction seen in earlier solves predicts the remaining error
            # (Hairer & Wanner's first-iteration test)
            if nstate[1] * nrm < NEWTON_TOL_FIRST:
                done = True
        elif prev > 0.0:
            theta = nrm / prev
            if theta >= 1.0 and it > 2:
                return False
            if theta < 1.0:
                nstate[1] = theta / (1.0 - theta)
                if nstate[1] * nrm < NEWTON_TOL:
                    done = True
        if done:
            for i in range(n):
                F[i] = (M[i] * z[i] - rhs[i]) / c if M[i] != 0.0 else 0.0
            return True
        prev = nrm
    return False


@numba.njit(cache=True, _nrt=False)
def make_consistent(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv, F, G, work, F1, rhs, nstate):
    """Satisfy the algebraic rows after a mode change (backward-Euler steps of 1 ns).
    It factors its own matrix into A, so nstate[0] no longer describes A afterwards."""
    n = y.shape[0]
    nstate[0] = -1.0
    mass(P, IP, S, gk, gxo, gpo, gnp, GP, M)
    # the contraction of a 1 ns solve says nothing of a real step's: this solve starts
    # from no estimate and leaves the steps' one as it was
    eta = nstate[1]
    ok = False
    for k in range(3):
        residual(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, F)
        jacobian(t, y, F, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, J, work, F1)
        c = CONSISTENT_STEP_S
        for i in range(n):
            for j in range(n):
                A[i, j] = -c * J[i, j]
            A[i, i] += M[i]
            rhs[i] = M[i] * y[i]
        if not lu_factor(A, piv):
            break
        nstate[1] = 1.0
        # with the switch open the open dimmer's voltage and the line current are solved
        # in closed form inside the iteration (see newton); the second try is plain.  With
        # it on behind its choke only the second try projects (see trbdf2_step)
        proj = (k != 1) if S[SW_ON] == 0 else (k == 1)
        if newton(t, y, rhs, c, M, A, piv, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, wt, F, G, nstate, proj):
            ok = True
            break
    nstate[1] = eta
    return ok


@numba.njit(cache=True, _nrt=False)
def trbdf2_step(t, h, y, F0, J, M, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol,
                yg, y1, Fg, F1, A, piv, G, rhs, est, nstate):
    """One TR-BDF2 step from (t, y); returns the weighted error norm (inf: failed).
    The iteration matrix M − c·J is factored unless nstate[0] says it already holds
    this c (the caller clears nstate[0] when J or M change)."""
    n = y.shape[0]
    c = D_COEF * h
    nstate[1] = max(nstate[1], 1e-16) ** 0.8     # an old contraction estimate counts for less (Hairer & Wanner)
    if nstate[0] != c:
        for i in range(n):
            for j in range(n):
                A[i, j] = -c * J[i, j]
            A[i, i] += M[i]
        nstate[0] = c
        if not lu_factor(A, piv):
            nstate[0] = -1.0
            return np.inf
    wt = est  # reuse as weights for the Newton norm
    for i in range(n):
        wt[i] = 1.0 / (atol[i] + P[RTOL] * abs(y[i]))
    # trapezoidal stage to t + γh
    for i in range(n):
        if M[i] != 0.0:
            rhs[i] = M[i] * y[i] + c * F0[i]
        else:
            rhs[i] = 0.0
        yg[i] = y[i] + GAMMA * h * (F0[i] / M[i] if M[i] != 0.0 else 0.0)
    # with the switch open the dimmer's voltage and the line current are solved in closed
    # form inside the iteration (see newton); where that fails, once more without.  With
    # the switch on behind its choke the plain iteration comes first, the projected one
    # second (see newton: its closed form alone amplifies the line's and the choke's
    # residuals through a bare leakage)
    open_first = S[SW_ON] == 0
    choke_on = _choke_projects(P, IP, S, M)
    if not newton(t + GAMMA * h, yg, rhs, c, M, A, piv, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, wt, Fg, G, nstate,
                  open_first):
        if not (open_first or choke_on):
            return np.inf
        for i in range(n):
            yg[i] = y[i] + GAMMA * h * (F0[i] / M[i] if M[i] != 0.0 else 0.0)
        if not newton(t + GAMMA * h, yg, rhs, c, M, A, piv, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, wt, Fg, G,
                      nstate, choke_on):
            return np.inf
    # BDF2 stage to t + h
    a1 = 1.0 / (GAMMA * (2.0 - GAMMA))
    a0 = (1.0 - GAMMA) ** 2 / (GAMMA * (2.0 - GAMMA))
    for i in range(n):
        rhs[i] = M[i] * (a1 * yg[i] - a0 * y[i])
        y1[i] = yg[i] + (yg[i] - y[i]) * (1.0 - GAMMA) / GAMMA
    if not newton(t + h, y1, rhs, c, M, A, piv, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, wt, F1, G, nstate,
                  open_first):
        if not (open_first or choke_on):
            return np.inf
        for i in range(n):
            y1[i] = yg[i] + (yg[i] - y[i]) * (1.0 - GAMMA) / GAMMA
        if not newton(t + h, y1, rhs, c, M, A, piv, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, wt, F1, G, nstate,
                      choke_on):
            return np.inf
    # error estimate, filtered through the iteration matrix
    for i in range(n):
        if M[i] != 0.0:
            est[i] = LTE_C * 2.0 * h * (F0[i] / GAMMA - Fg[i] / (GAMMA * (1.0 - GAMMA)) + F1[i] / (1.0 - GAMMA))
        else:
            est[i] = 0.0
    for i in range(n):
        if M[i] != 0.0:
            est[i] /= M[i]
    # error test on the differential unknowns only (algebraic ones follow from them)
    err = 0.0
    nd = 0
    for i in range(n):
        if M[i] != 0.0:
            r = est[i] / (atol[i] + P[RTOL] * max(abs(y[i]), abs(y1[i])))
            err += r * r
            nd += 1
    err = math.sqrt(err / max(nd, 1))
    if not np.isfinite(err):
        return np.inf
    return err


# --------------------------------------------------------------------------- events
@numba.njit(cache=True, _nrt=False)
def _angle_deg(t, t0, P):
    return (t - t0) * P[OMEGA] * 180.0 / math.pi


@numba.njit(cache=True, _nrt=False)
def _record_firing(t, S, Q, HC, P):
    h = S[HCIDX]
    if h < HC.shape[0]:
        if np.isnan(HC[h, H_FIRE]):
            HC[h, H_FIRE] = _angle_deg(t, Q[HC_START], P)
        HC[h, H_FIRINGS] += 1.0
    S[FIRE_HC] = h


@numba.njit(cache=True, _nrt=False)
def _record_off(t, S, Q, HC, P, chop, y, dropout):
    """The switch stops conducting at t; chop cuts the choke's and line's switch current;
    dropout: it fell below the holding current (counted as early if it is)."""
    f = S[FIRE_HC]
    if 0 <= f < HC.shape[0]:
        HC[f, H_EXT] = _angle_deg(t, HC[f, H_START], P)
    h = S[HCIDX]
    if dropout and h == f and h < HC.shape[0]:
        if _angle_deg(t, Q[HC_START], P) < 180.0 - P[EARLY]:
            HC[h, H_EARLY] += 1.0
    if chop:
        y[IL] -= y[ISW]
        y[ISW] = 0.0
    S[SW_ON] = 0
    S[LATCHED] = 0


@numba.njit(cache=True, _nrt=False)
def _start_turn_off(t, y, P, S, Q, HC):
    """A trailing-edge switch starts turning off at t: its voltage rises from where it is
    at the set slope until its current has reached zero (or, with no slope or no
    current, it opens at once)."""
    Q[T_TRIP] = np.inf
    if P[SLOPE] > 0.0 and y[ISW] != 0.0:
        S[SW_ON] = RAMPING
        S[CPOL] = 1 if y[ISW] > 0.0 else -1
        Q[RAMP_I0] = y[ISW]
        Q[RAMP_V0] = y[VD]
        Q[T_RAMP0] = t
    else:
        _record_off(t, S, Q, HC, P, False, y, False)


@numba.njit(cache=True, _nrt=False)
def _series_current_index(kind, p, xo):
    """Index of a unit's inductive terminal-current state, or −1."""
    if kind == K_MAGNETIC:
        return xo
    if kind == K_LINEAR and p[_lin._L] > 0.0:
        return xo
    return -1


@numba.njit(cache=True, _nrt=False)
def _chop_loads(y, cut, IP, gk, gxo, gpo, gnp, gn, GP):
    """A leading-edge switch opening at I_H also cuts the (≤ I_H) current of inductive
    loads in series with it; their energy ½·L·I_H² is dropped, as the choke's is."""
    tot = 0.0
    for g in range(IP[NG]):
        idx = _series_current_index(gk[g], GP[gpo[g]:gpo[g] + gnp[g]], gxo[g])
        if idx >= 0:
            tot += gn[g] * y[idx]
    if tot == 0.0:
        return
    f = min(max(1.0 - cut / tot, 0.0), 1.0)
    for g in range(IP[NG]):
        idx = _series_current_index(gk[g], GP[gpo[g]:gpo[g] + gnp[g]], gxo[g])
        if idx >= 0:
            y[idx] *= f


@numba.njit(cache=True, _nrt=False)
def update_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP):
    """Bring the discrete state in line with y at t; returns True if anything changed."""
    any_change = False
    for _ in range(6):
        changed = False
        if IP[EDGE] == LEADING:
            if _retrigger_due(t, y, P, IP, S, Q, HC):
                _refire_phase(t, y, P, S, Q, HC)
                changed = True
            if IP[CONTROL] == RC_DIAC:
                if S[DIAC_ON] == 0:
                    if y[VT] >= P[VBOP]:
                        S[DIAC_ON] = 1
                        S[DIAC_POL] = 1
                        changed = True
                    elif -y[VT] >= P[VBON]:
                        S[DIAC_ON] = 1
                        S[DIAC_POL] = -1
                        changed = True
                else:
                    if S[DIAC_POL] * _diac_current(y, P, S) < P[IDOFF]:
                        S[DIAC_ON] = 0
                        changed = True
                gate_now = 1 if (S[DIAC_ON] != 0 and abs(_diac_current(y, P, S)) >= P[IGT]) else 0
                if gate_now != S[GATE]:
                    S[GATE] = gate_now
                    changed = True
                    if gate_now != 0 and IP[NOFIRE] == 0:
                        if S[SW_ON] == 0:
                            S[SW_ON] = 1
                            S[LATCHED] = 0
                        elif S[LATCHED] == DIPPING:
                            S[LATCHED] = 1     # gated again during a dip: it conducts on
                        _record_firing(t, S, Q, HC, P)
            if S[SW_ON] != 0:
                i_latch = S[CPOL] * y[ISW] if IP[GDRIVE] != SINGLE_PULSE else abs(y[ISW])
                if S[GATE] != 0 and S[LATCHED] == 0 and i_latch >= P[ILATCH]:
                    S[LATCHED] = 1
                    S[CPOL] = 1 if y[ISW] > 0.0 else -1
                    if IP[GDRIVE] != SINGLE_PULSE and Q[GATE_END] == np.inf:
                        S[GATE] = 0       # past its window, the drive stops once the switch latches
                    changed = True
                if S[GATE] == 0:
                    if S[LATCHED] == 0:
                        h = S[HCIDX]
                        if h < HC.shape[0] and S[REFIRED] == 0:
                            HC[h, H_FAILED] += 1.0
                        _chop_loads(y, y[ISW], IP, gk, gxo, gpo, gnp, gn, GP)
                        _record_off(t, S, Q, HC, P, True, y, False)
                        changed = True
                    elif S[LATCHED] == CARRIED:
                        # carried through a failed commutation: re-armed once the current
                        # exceeds I_H in either direction
                        if S[CPOL] * y[ISW] >= P[IH]:
                            S[LATCHED] = 1
                            changed = True
                        elif -S[CPOL] * y[ISW] >= P[IH]:
                            S[LATCHED] = 1
                            S[CPOL] = -S[CPOL]
                            changed = True
                    elif S[LATCHED] == DIPPING:
                        # below I_H since Q[T_DIP]: back above it within the turn-off time,
                        # the dip did not end conduction; at zero current or once the
                        # turn-off time has passed, it did (from the dip's start)
                        ic = S[CPOL] * y[ISW]
                        if ic >= P[IH]:
                            S[LATCHED] = 1
                            f = S[FIRE_HC]
                            if 0 <= f < HC.shape[0]:
                                HC[f, H_EXT] = np.nan      # the conduction goes on
                            changed = True
                        elif ic <= 0.0 and abs(Q[DIDT]) > P[DIDTC]:
                            S[LATCHED] = CARRIED
                            S[CPOL] = -S[CPOL]
                            changed = True
                        elif ic <= 0.0 or t >= Q[T_DIP_END] - 1e-12:
                            Q[T_DIP_END] = np.inf
                            _chop_loads(y, y[ISW], IP, gk, gxo, gpo, gnp, gn, GP)
                            _record_off(Q[T_DIP], S, Q, HC, P, True, y, True)
                            changed = True
                    elif S[CPOL] * y[ISW] < P[IH]:
                        if -S[CPOL] * y[ISW] >= P[IH]:
                            # the current went through zero while the gate was driven (a
                            # gated triac conducts either way) and flows the other way,
                            # above I_H, when the drive ends: a triac holds on |i|, so it
                            # goes on conducting in that direction
                            S[CPOL] = -S[CPOL]
                            changed = True
                        elif abs(Q[DIDT]) > P[DIDTC]:
                            # the current sweeps through zero faster than the switch can
                            # recover (commutating dI/dt): it goes on conducting
                            S[LATCHED] = CARRIED
                            S[CPOL] = -S[CPOL]
                            changed = True
                        elif P[TQ] > 0.0 and S[CPOL] * y[ISW] > 0.0:
                            # a triac turns off only once its current has stayed below I_H
                            # for its turn-off time: until then it goes on conducting
                            S[LATCHED] = DIPPING
                            Q[T_DIP] = t
                            Q[T_DIP_END] = t + P[TQ]
                            f = S[FIRE_HC]
                            if 0 <= f < HC.shape[0]:
                                # where it ends if the dip lasts (a run may end first)
                                HC[f, H_EXT] = _angle_deg(t, HC[f, H_START], P)
                            changed = True
                        else:
                            _chop_loads(y, y[ISW], IP, gk, gxo, gpo, gnp, gn, GP)
                            _record_off(t, S, Q, HC, P, True, y, True)
                            changed = True
        else:
            if S[SW_ON] == 1 and abs(y[ISW]) >= P[TRIP]:
                # overcurrent: once it has lasted the protection's delay, the protection
                # pulls the gate down at once (no slope: a transistor held in its linear
                # region at that current would fail); the line inductance's current goes
                # to the clamp
                if P[TRIPD] > 0.0 and Q[T_TRIP] == np.inf:
                    Q[T_TRIP] = t + P[TRIPD]
                elif P[TRIPD] <= 0.0 or t >= Q[T_TRIP] - 1e-12:
                    S[TRIPPED] = 1
                    Q[T_OFF] = np.inf
                    Q[T_TRIP] = np.inf
                    _record_off(t, S, Q, HC, P, False, y, False)
                    changed = True
            elif S[SW_ON] == 1:
                Q[T_TRIP] = np.inf      # back below the trip level within the delay
            if S[SW_ON] == RAMPING and abs(y[VD]) >= P[VCL]:
                # the slope has reached the clamp voltage before the current stopped: the
                # clamp takes the current over
                _record_off(t, S, Q, HC, P, False, y, False)
                changed = True
            elif S[SW_ON] == RAMPING and S[CPOL] * y[ISW] <= 0.0:
                # the turn-off ends where the switch current reaches zero; the located
                # crossing leaves up to the event tolerance's worth of current past it,
                # which is taken off (left in the line inductance with the switch open, it
                # would need megavolts across the open paths and drive the clamp)
                _record_off(t, S, Q, HC, P, True, y, False)
                changed = True
            c = 0
            if S[SW_ON] == 0:
                # the line current must go somewhere: where the open dimmer's other paths
                # would need more than the clamp voltage to carry it, the clamp conducts
                # an open switch carries nothing; right after it opened at once, y still
                # holds its old current, which a line inductance keeps flowing (but which
                # without one simply stops)
                isw = y[ISW] if (S[SW_ON] == RAMPING or P[LS] == 0.0) else 0.0
                vd = _open_dimmer_voltage(y, isw, P, IP)
                if vd > P[VCL]:
                    c = 1
                elif vd < -P[VCL]:
                    c = -1
                if c != 0 and c == -S[CLAMP]:
                    # the clamp's current has just reached zero with the switch open: a
                    # located crossing leaves the line current up to the event tolerance
                    # past it, a few µA that the open paths (the leakage alone: 100 MΩ)
                    # would carry only at kilovolts of the other polarity.  The clamp
                    # releases to the open state with that overshoot taken off (the
                    # consistency step then relaxes the line current); it never hands over
                    # straight to the other polarity (that chattered at ~35 ns: ~10⁵
                    # events per cycle with iron-core transformers)
                    c = 0
                    y[IL] = isw
                    if P[CSN] > 0.0:
                        y[IL] -= y[VSN] / P[RSN]
                    if IP[CONTROL] == RC_DIAC:
                        y[IL] -= y[VT] / P[RT]
            if c != S[CLAMP]:
                S[CLAMP] = c
                changed = True
        vb = y[VB]
        for g in range(IP[NG]):
            m = _unit_mode(gk[g], vb, y, gxo[g], GP[gpo[g]:gpo[g] + gnp[g]], S[N_S + g])
            if m != S[N_S + g]:
                S[N_S + g] = m
                changed = True
        if not changed:
            break
        any_change = True
    return any_change


@numba.njit(cache=True, _nrt=False)
def _half_cycle_polarity(Q, P):
    """+1 in a half-cycle of positive supply voltage, −1 in a negative one."""
    k = int(round(Q[HC_START] * P[OMEGA] / math.pi))
    return 1 if k % 2 == 0 else -1


@numba.njit(cache=True, _nrt=False)
def _fire_phase(t, y, P, IP, S, Q, HC):
    """Phase control: the gate drive starts at t."""
    Q[T_FIRE] = np.inf
    if IP[GDRIVE] != SINGLE_PULSE:
        pol = _half_cycle_polarity(Q, P)
        if S[SW_ON] != 0:
            # the previous half-cycle's current still flows: the gate takes it over, so
            # the switch conducts on without a break (that conduction ends here)
            f = S[FIRE_HC]
            if 0 <= f < HC.shape[0]:
                HC[f, H_EXT] = _angle_deg(t, HC[f, H_START], P)
        S[CPOL] = pol
        S[LATCHED] = 1 if pol * y[ISW] >= P[ILATCH] else 0
    else:
        S[LATCHED] = 0 if abs(y[ISW]) < P[ILATCH] else 1
        S[CPOL] = 1 if y[ISW] > 0.0 else -1
    S[SW_ON] = 1
    S[GATE] = 1
    S[REFIRED] = 0
    Q[GATE_END] = t + P[GATEW]
    _record_firing(t, S, Q, HC, P)


@numba.njit(cache=True, _nrt=False)
def _retrigger_due(t, y, P, IP, S, Q, HC):
    """A retriggering phase controller fires again: its switch, fired in this
    half-cycle, dropped out early (more than the early-drop-out margin before the
    half-cycle's end: a drop-out after that is the natural one, where the controller's
    pulses have stopped) and is off with the supply's own polarity across it above the
    sense level.  A reversed voltage (lamp capacitors held above a falling supply) does
    not re-fire it."""
    if IP[CONTROL] != PHASE or IP[GDRIVE] != RETRIGGER or IP[NOFIRE] != 0 or S[SW_ON] != 0:
        return False
    h = S[HCIDX]
    if S[FIRE_HC] != h or Q[T_FIRE] != np.inf:
        return False
    if _half_cycle_polarity(Q, P) * y[VD] < RETRIGGER_SENSE_V:
        return False
    if _angle_deg(t, Q[HC_START], P) >= 180.0:
        return False
    if h < HC.shape[0]:
        return HC[h, H_EXT] < 180.0 - P[EARLY]
    return _angle_deg(t, Q[HC_START], P) < 180.0 - P[EARLY]


@numba.njit(cache=True, _nrt=False)
def _refire_phase(t, y, P, S, Q, HC):
    """The retriggering controller's new gate pulse: one pulse of its train (the gate
    window at most), in which the
    switch latches if this half-cycle's current reaches the latching current; if it
    does not, the switch stops conducting at the window's end (the controller pulses
    again while it sees the supply's voltage across the switch).  A re-fire that finds
    no current to latch is not a failed firing: the controller only looked."""
    pol = _half_cycle_polarity(Q, P)
    S[CPOL] = pol
    S[LATCHED] = 1 if pol * y[ISW] >= P[ILATCH] else 0
    S[SW_ON] = 1
    S[GATE] = 1
    S[REFIRED] = 1
    Q[GATE_END] = t + min(P[GATEW], RETRIGGER_PULSE_S)
    _record_firing(t, S, Q, HC, P)


@numba.njit(cache=True, _nrt=False)
def _start_half_cycle(t, P, IP, S, Q, HC):
    h = S[HCIDX]
    if h < HC.shape[0]:
        HC[h, H_START] = t
    Q[HC_START] = t
    S[TRIPPED] = 0
    Q[T_TRIP] = np.inf
    alpha_t = P[ALPHA] / P[OMEGA]
    if IP[EDGE] == LEADING and IP[CONTROL] == PHASE:
        Q[T_FIRE] = t + alpha_t if IP[NOFIRE] == 0 else np.inf
    else:
        Q[T_FIRE] = np.inf
    if IP[EDGE] == TRAILING:
        Q[T_OFF] = _trailing_off_time(t, P, Q) if IP[NOFIRE] == 0 else np.inf
    else:
        Q[T_OFF] = np.inf


@numba.njit(cache=True, _nrt=False)
def _trailing_off_time(t_hc, P, Q):
    """When a trailing-edge switch starts its turn-off in the half-cycle starting at t_hc:
    the set conduction time, ramped from zero over the soft start after the supply's
    first zero crossing (the ramp's value at the half-cycle's end, so no half-cycle is
    skipped), and never shorter than the turn-off time itself."""
    half = math.pi / P[OMEGA]
    cond = half - P[ALPHA] / P[OMEGA]
    if P[SOFT] > 0.0 and t_hc + half - Q[T_SYNC] < P[SOFT]:
        cond = max(cond * (t_hc + half - Q[T_SYNC]) / P[SOFT], P[TRAMP])
    return t_hc + cond


@numba.njit(cache=True, _nrt=False)
def _end_half_cycle(t, P, IP, S, Q, gk, gpo, gnp, GP):
    """Driver phase decoders update once per half-cycle: the conduction they saw is the
    time from the first rise of |v| above their sense level to its last fall below it
    (or to the end of the half-cycle while it is still above)."""
    half = math.pi / P[OMEGA]
    for g in range(IP[NG]):
        if gk[g] == K_DRIVER:
            b = N_Q + 4 * g
            state = Q[b + 3]
            if state == 1.0:
                share = (t - Q[b + 1]) / half
            elif state == 2.0:
                share = (Q[b + 2] - Q[b + 1]) / half
            else:
                share = 0.0
            Q[b] = _drv.decoded_level(min(max(share, 0.0), 1.0), Q[b], GP[gpo[g]:gpo[g] + gnp[g]])
            if state == 1.0:
                Q[b + 1] = t          # still above: the next half-cycle starts seen
            else:
                Q[b + 1] = np.inf
                Q[b + 3] = 0.0


@numba.njit(cache=True, _nrt=False)
def _sense_edges(t0, t1, a, b, thr, Q, base):
    """Record where |v| (linear from a at t0 to b at t1) crosses a driver's sense level:
    state 0 not yet above in this half-cycle, 1 above, 2 was above and fell below."""
    if a < thr <= b:
        tc = t0 + (thr - a) / (b - a) * (t1 - t0)
        if Q[base + 3] == 0.0:
            Q[base + 1] = tc
        Q[base + 3] = 1.0
    elif a >= thr > b:
        Q[base + 2] = t0 + (a - thr) / (a - b) * (t1 - t0)
        Q[base + 3] = 2.0


@numba.njit(cache=True, _nrt=False)
def _accumulate(t, h, o0, og, o1, P, IP, S, Q, HC, gk, gpo, gnp, GP):
    k = S[HCIDX]
    if k >= HC.shape[0]:
        return
    HC[k, H_V2] += h * (W_0 * o0[O_VB] ** 2 + W_G * og[O_VB] ** 2 + W_1 * o1[O_VB] ** 2)
    HC[k, H_I2] += h * (W_0 * o0[O_IL] ** 2 + W_G * og[O_IL] ** 2 + W_1 * o1[O_IL] ** 2)
    HC[k, H_VI] += h * (W_0 * o0[O_VB] * o0[O_IL] + W_G * og[O_VB] * og[O_IL] + W_1 * o1[O_VB] * o1[O_IL])
    HC[k, H_I2T] += h * (W_0 * o0[O_ISW] ** 2 + W_G * og[O_ISW] ** 2 + W_1 * o1[O_ISW] ** 2)
    HC[k, H_I] += h * (W_0 * o0[O_IL] + W_G * og[O_IL] + W_1 * o1[O_IL])
    for a in (o0, og, o1):
        if abs(a[O_ISW]) > HC[k, H_PEAK_SW]:
            HC[k, H_PEAK_SW] = abs(a[O_ISW])
        if abs(a[O_IL]) > HC[k, H_PEAK_LINE]:
            HC[k, H_PEAK_LINE] = abs(a[O_IL])
    if S[SW_ON] != 0:
        HC[k, H_ABOVE] += h * _share_above(abs(o0[O_ISW]), abs(og[O_ISW]), abs(o1[O_ISW]), P[IH])
    if S[SW_ON] == RAMPING:
        HC[k, H_E_OFF] += h * (W_0 * o0[O_VD] * o0[O_ISW] + W_G * og[O_VD] * og[O_ISW] + W_1 * o1[O_VD] * o1[O_ISW])
    if S[CLAMP] != 0:
        HC[k, H_E_CLAMP] += h * (W_0 * o0[O_VD] * _clamp_current(o0[O_VD], P, S)
                                 + W_G * og[O_VD] * _clamp_current(og[O_VD], P, S)
                                 + W_1 * o1[O_VD] * _clamp_current(o1[O_VD], P, S))
    for g in range(IP[NG]):
        if gk[g] == K_DRIVER:
            thr = GP[gpo[g] + _drv._VSENSE]
            tg = t + GAMMA * h
            _sense_edges(t, tg, abs(o0[O_VB]), abs(og[O_VB]), thr, Q, N_Q + 4 * g)
            _sense_edges(tg, t + h, abs(og[O_VB]), abs(o1[O_VB]), thr, Q, N_Q + 4 * g)


@numba.njit(cache=True, _nrt=False)
def _share_above(a0, ag, a1, level):
    """Share of a step during which a piecewise-linear a(t) through 0, γ, 1 is ≥ level."""
    return GAMMA * _seg_above(a0, ag, level) + (1.0 - GAMMA) * _seg_above(ag, a1, level)


@numba.njit(cache=True, _nrt=False)
def _seg_above(a, b, level):
    if a >= level and b >= level:
        return 1.0
    if a < level and b < level:
        return 0.0
    x = (level - a) / (b - a)
    return 1.0 - x if b >= level else x


@numba.njit(cache=True, _nrt=False, inline="always")
def _modes_neutral(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, snap):
    """Update the modes after a located crossing; True if nothing the residual reads
    changed (switch on/off, diac, clamp, load modes)."""
    ng = IP[NG]
    snap[0] = S[SW_ON]
    snap[1] = S[DIAC_ON]
    snap[2] = S[DIAC_POL]
    snap[3] = S[CLAMP]
    for g in range(ng):
        snap[4 + g] = S[N_S + g]
    update_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP)
    if snap[0] != S[SW_ON] or snap[1] != S[DIAC_ON] or snap[2] != S[DIAC_POL] or snap[3] != S[CLAMP]:
        return False
    for g in range(ng):
        if snap[4 + g] != S[N_S + g]:
            return False
    return True


@numba.njit(cache=True, _nrt=False, inline="always")
def _bail_forward(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv, F0, G, work, F1, rhs,
                  counters, nstate):
    """Where no converging step can be found, one backward-Euler step of 1 ns (the
    consistency step, taken at t + 1 ns) carries the state past the difficulty, and the
    modes are brought up to date.  False once this has happened too often in one run."""
    counters[1] += 1000000
    if counters[1] > MAX_BAILS * 1000000:
        return False
    make_consistent(t + CONSISTENT_STEP_S, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv,
                    F0, G, work, F1, rhs, nstate)
    update_modes(t + CONSISTENT_STEP_S, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP)
    for i in range(y.shape[0]):
        if not np.isfinite(y[i]):
            return False
    return True


# --- the phases of one step of ``run`` ---------------------------------------------------
# Event location and the mode update after an event are functions; the phases every
# step goes through (step attempt, recording, the timed events) are named sections of
# ``run``: as separate functions (with ~30 array arguments each; numba would not inline
# them) they made the reference cases ~30 % slower (tests.bench's cases, min of 15 runs).

@numba.njit(cache=True, _nrt=False)
def _copy_into(dst, src):
    """dst[:] = src without numba's temporary copy (which needs its runtime) and without
    its shape-mismatch error message (which costs ~1.5 s of compiling)."""
    for i in range(src.shape[0]):
        dst[i] = src[i]


@numba.njit(cache=True, _nrt=False)
def _locate_event(t, h, ng0, y, F0, J, M, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol,
                  yg, y1, Fg, F1, A, piv, G, rhs, est, nstate, g0, g1, gm, glo, ghi, ytry, yhi, yghi):
    """Event location: a guard changed sign over the accepted step [t, t + h]; narrow
    the step to end just past the earliest crossing, within P[EVTOL].  On success y1 and
    yg hold the shortened step's end and stage values; returns (the step to the event,
    whether no converging step reaches it: then bail out)."""
    lo = 0.0
    hi = h
    _copy_into(glo, g0)
    _copy_into(ghi, g1)
    _copy_into(ytry, y1)
    _copy_into(yhi, y1)
    _copy_into(yghi, yg)
    hi_valid = True
    bail = False
    while hi - lo > P[EVTOL]:
        # earliest crossing estimate by linear interpolation of each guard
        frac = 1.0
        for i in range(ng0):
            if (glo[i] < 0.0) != (ghi[i] < 0.0):
                f = glo[i] / (glo[i] - ghi[i])
                if f < frac:
                    frac = f
        if hi_valid and (hi - lo) * (1.0 - frac) < 0.5 * P[EVTOL]:
            # the crossing is estimated within the tolerance below hi: one trial
            # just short of hi brackets it (or moves hi down)
            hm = hi - 0.5 * P[EVTOL]
        else:
            hm = lo + (hi - lo) * min(max(frac, 0.05), 0.95)
            hm = min(hm + 0.25 * P[EVTOL], hi - 0.25 * P[EVTOL])
        err2 = trbdf2_step(t, hm, y, F0, J, M, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol,
                           yg, ytry, Fg, F1, A, piv, G, rhs, est, nstate)
        any_c = False
        if np.isinf(err2):
            # Newton failed on the trial (a kink inside it): shrink from above
            if hm - lo < 1e-12:
                bail = True
                break
            hi = hm
            hi_valid = False
            continue
        guards(ytry, P, IP, S, gk, gxo, gpo, gnp, GP, gm)
        for i in range(ng0):
            if (g0[i] < 0.0) != (gm[i] < 0.0):
                any_c = True
                break
        if any_c:
            hi = hm
            hi_valid = True
            _copy_into(ghi, gm)
            _copy_into(yhi, ytry)
            _copy_into(yghi, yg)
        else:
            lo = hm
            _copy_into(glo, gm)
    if not bail and not hi_valid:
        if np.isinf(trbdf2_step(t, hi, y, F0, J, M, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol,
                                yghi, yhi, Fg, F1, A, piv, G, rhs, est, nstate)):
            bail = True
    if not bail:
        _copy_into(y1, yhi)
        _copy_into(yg, yghi)
    return hi, bail


@numba.njit(cache=True, _nrt=False, inline="always")
def _settle_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv, F0, G, work, F1, rhs,
                  nstate):
    """Mode update, part 2: modes and a consistent state at t, alternated until the
    modes stand (at most five rounds)."""
    for _ in range(5):
        update_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP)
        make_consistent(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv, F0, G, work, F1,
                        rhs, nstate)
        if not update_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP):
            break


@numba.njit(cache=True, nogil=True)
def run(t0, t_end, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol, scale,
        t_samp0, dt_samp, OUT, HC, counters):
    """Integrate from t0 to t_end, updating y, S, Q in place; fill OUT and HC.

    OUT[k] holds the outputs at t_samp0 + k·dt_samp; HC[j] the figures of the j-th
    half-cycle (S[HCIDX] is the index of the current one on entry).  counters[0] gets the
    accepted steps, counters[1] the rejected ones, counters[2] the located events.
    Returns 0 on success, 1 if the step size collapsed.

    Each step, in named sections: the next time event bounds it; step attempt; event
    location if a guard changed sign (``_locate_event``); where neither converges, the
    1 ns bail-out (``_bail_forward``, one place); recording; mode update (the timed
    events, then ``_settle_modes``)."""
    n = y.shape[0]
    no = OUT.shape[1]
    M = np.zeros(n)
    J = np.zeros((n, n))
    A = np.zeros((n, n))
    piv = np.zeros(n, dtype=np.int64)
    F0 = np.zeros(n)
    Fg = np.zeros(n)
    F1 = np.zeros(n)
    G = np.zeros(n)
    rhs = np.zeros(n)
    est = np.zeros(n)
    work = np.zeros(n)
    yg = np.zeros(n)
    y1 = np.zeros(n)
    ytry = np.zeros(n)
    yhi = np.zeros(n)
    yghi = np.zeros(n)
    wt = np.zeros(n)
    g0 = np.zeros(64)
    g1 = np.zeros(64)
    gm = np.zeros(64)
    glo = np.zeros(64)
    ghi = np.zeros(64)
    o0 = np.zeros(no)
    og = np.zeros(no)
    o1 = np.zeros(no)
    snap = np.zeros(4 + IP[NG], dtype=np.int64)
    nstate = np.empty(2)    # [c of the factored iteration matrix, Newton's θ/(1 − θ)]
    nstate[0] = -1.0
    nstate[1] = 1.0
    half = math.pi / P[OMEGA]
    for i in range(n):
        wt[i] = 1.0 / (atol[i] + P[RTOL] * abs(y[i]))

    t = t0
    k_hb = math.floor(t / half + 1e-9)
    t_hb = (k_hb + 1) * half
    # a phase controller energised inside a half-cycle waits for the next zero crossing
    synced = t >= Q[T_SYNC] - 1e-12
    if abs(t - k_hb * half) < 1e-12:
        _start_half_cycle(t, P, IP, S, Q, HC)
        if IP[EDGE] == TRAILING and IP[NOFIRE] == 0:
            S[SW_ON] = 1
            _record_firing(t, S, Q, HC, P)
    else:
        Q[HC_START] = k_hb * half
        if S[HCIDX] < HC.shape[0]:
            HC[S[HCIDX], H_START] = k_hb * half
        if IP[EDGE] == LEADING and IP[CONTROL] == PHASE and IP[NOFIRE] == 0:
            tf = k_hb * half + P[ALPHA] / P[OMEGA]
            Q[T_FIRE] = tf if (tf > t and synced) else np.inf
        if IP[EDGE] == TRAILING and IP[NOFIRE] == 0:
            to = _trailing_off_time(k_hb * half, P, Q)
            Q[T_OFF] = to if (to > t and synced) else np.inf
            S[SW_ON] = 1 if (to > t and synced) else 0
    if abs(t - Q[T_FIRE]) < 1e-12:
        _fire_phase(t, y, P, IP, S, Q, HC)
    _settle_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv, F0, G, work, F1, rhs,
                  nstate)
    outputs(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, o0)
    ks = 0
    while ks < OUT.shape[0] and t_samp0 + ks * dt_samp <= t + 1e-15:
        _copy_into(OUT[ks], o0)
        ks += 1
    h = 1e-7
    fresh = True
    jac_age = 0          # make_consistent above has just computed the Jacobian
    while t < t_end - 1e-13:
        # next time event
        t_ev = min(t_hb, t_end)
        if S[GATE] != 0 and IP[CONTROL] == PHASE:
            t_ev = min(t_ev, Q[GATE_END])
        if Q[T_FIRE] > t:
            t_ev = min(t_ev, Q[T_FIRE])
        if Q[T_OFF] > t:
            t_ev = min(t_ev, Q[T_OFF])
        if S[SW_ON] == 1 and Q[T_TRIP] > t:
            t_ev = min(t_ev, Q[T_TRIP])
        if S[LATCHED] == DIPPING and Q[T_DIP_END] > t:
            t_ev = min(t_ev, Q[T_DIP_END])
        h = min(h, P[HMAX], t_ev - t)
        if h < 1e-13:
            h = t_ev - t
        m_isw = M[ISW]
        mass(P, IP, S, gk, gxo, gpo, gnp, GP, M)
        if M[ISW] != m_isw:      # the mass matrix changes only with the switch (its choke)
            nstate[0] = -1.0
        residual(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, F0)
        # the Jacobian is kept between steps (modified Newton), refreshed after a failed
        # step and every JAC_AGE steps; after an event the consistency step has just
        # computed it for the new modes
        if jac_age >= JAC_AGE:
            jacobian(t, y, F0, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, J, work, F1)
            nstate[0] = -1.0
            jac_age = 0
        jac_age += 1
        ng0 = guards(y, P, IP, S, gk, gxo, gpo, gnp, GP, g0)
        if fresh:
            outputs(t, y, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, o0)
            fresh = False
        # --- step attempt: TR-BDF2 steps from t, shrinking h until the error test passes
        rejected = False
        while True:
            err = trbdf2_step(t, h, y, F0, J, M, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol,
                              yg, y1, Fg, F1, A, piv, G, rhs, est, nstate)
            if err <= 1.0:
                break
            counters[1] += 1
            rejected = True
            if np.isinf(err):
                h *= 0.25
                if jac_age > 1:
                    jacobian(t, y, F0, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, scale, J, work, F1)
                    nstate[0] = -1.0
                    jac_age = 1
                    h *= 4.0
            else:
                h *= max(0.2, 0.9 * err ** (-1.0 / 3.0))
            if h < 1e-12:
                break
        # the step collapsed (a kink the Newton iteration cannot cross)
        bail = h < 1e-12
        crossed = False
        fac = 1.0
        h_before = h
        if not bail:
            fac = 2.0 if err < 1e-6 else min(2.0, 0.9 * err ** (-1.0 / 3.0))
            if rejected:
                fac = min(fac, 1.0)   # no growth right after a rejection (fewer repeat rejections)
            if 1.0 <= fac <= HOLD_FAC:
                fac = 1.0             # small growth is not worth a new factorisation
            # --- event location: did any guard change sign?
            guards(y1, P, IP, S, gk, gxo, gpo, gnp, GP, g1)
            for i in range(ng0):
                if (g0[i] < 0.0) != (g1[i] < 0.0):
                    crossed = True
                    break
            if crossed:
                h, bail = _locate_event(t, h, ng0, y, F0, J, M, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, atol,
                                        yg, y1, Fg, F1, A, piv, G, rhs, est, nstate, g0, g1, gm, glo, ghi, ytry,
                                        yhi, yghi)
                if not bail:
                    counters[2] += 1
        # --- bail-out
        if bail:
            # no converging step reaches past here: take one backward-Euler step of 1 ns
            # past it, refresh the modes and go on
            if not _bail_forward(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv,
                                 F0, G, work, F1, rhs, counters, nstate):
                return 1
            t += CONSISTENT_STEP_S
            fresh = True
            jac_age = JAC_AGE
            h = 1e-8
            continue
        # --- recording: accept the step [t, t + h]; its half-cycle sums and every output
        # sample inside it
        outputs(t + GAMMA * h, yg, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, og)
        outputs(t + h, y1, P, IP, S, Q, gk, gxo, gpo, gnp, gn, GP, o1)
        _accumulate(t, h, o0, og, o1, P, IP, S, Q, HC, gk, gpo, gnp, GP)
        while ks < OUT.shape[0] and t_samp0 + ks * dt_samp <= t + h + 1e-15:
            x = (t_samp0 + ks * dt_samp - t) / h
            # quadratic through (0, o0), (γ, og), (1, o1)
            l0 = (x - GAMMA) * (x - 1.0) / GAMMA
            lg = x * (x - 1.0) / (GAMMA * (GAMMA - 1.0))
            l1 = x * (x - GAMMA) / (1.0 - GAMMA)
            for c in range(no):
                OUT[ks, c] = l0 * o0[c] + lg * og[c] + l1 * o1[c]
            ks += 1
        Q[DIDT] = (y1[ISW] - y[ISW]) / h      # the switch current's slope over the last step
        t = t + h
        _copy_into(y, y1)
        _copy_into(o0, o1)
        counters[0] += 1
        # --- mode update: the events due at t by the clock (gate window end, trailing
        # turn-off, a trip delay's end, a dip's end, the half-cycle boundary, the firing),
        # then the modes and a consistent state after any event
        timed = False
        if IP[CONTROL] == PHASE and IP[EDGE] == LEADING and S[GATE] != 0 and abs(t - Q[GATE_END]) < 1e-12:
            if IP[GDRIVE] != SINGLE_PULSE and S[LATCHED] == 0 and S[REFIRED] == 0:
                Q[GATE_END] = np.inf     # driven on until it latches or the half-cycle ends
            else:
                S[GATE] = 0
            timed = True
        if abs(t - Q[T_OFF]) < 1e-12:
            Q[T_OFF] = np.inf
            if S[SW_ON] == 1:
                _start_turn_off(t, y, P, S, Q, HC)
            timed = True
        if S[SW_ON] == 1 and abs(t - Q[T_TRIP]) < 1e-12:
            timed = True           # the overcurrent has lasted the trip delay (see update_modes)
        if S[LATCHED] == DIPPING and abs(t - Q[T_DIP_END]) < 1e-12:
            timed = True           # the dip has lasted the turn-off time (see update_modes)
        if abs(t - t_hb) < 1e-12:
            if IP[GDRIVE] != SINGLE_PULSE and S[GATE] != 0 and Q[GATE_END] == np.inf:
                # a drive held past its window ends with its half-cycle; a switch that has
                # not latched by then stops conducting
                S[GATE] = 0
                if S[SW_ON] != 0 and S[LATCHED] == 0:
                    if S[HCIDX] < HC.shape[0]:
                        HC[S[HCIDX], H_FAILED] += 1.0
                    _chop_loads(y, y[ISW], IP, gk, gxo, gpo, gnp, gn, GP)
                    _record_off(t, S, Q, HC, P, True, y, False)
            _end_half_cycle(t, P, IP, S, Q, gk, gpo, gnp, GP)
            S[HCIDX] += 1
            _start_half_cycle(t, P, IP, S, Q, HC)
            if IP[EDGE] == TRAILING and IP[NOFIRE] == 0 and S[SW_ON] == 0:
                S[SW_ON] = 1
                S[FIRE_HC] = S[HCIDX]
                _record_firing(t, S, Q, HC, P)
            t_hb += half
            timed = True
        if abs(t - Q[T_FIRE]) < 1e-12:
            _fire_phase(t, y, P, IP, S, Q, HC)
            timed = True
        event = crossed or timed
        if event and crossed and not timed and _modes_neutral(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, snap):
            # the crossing changed only what the guards watch (latching, carrying, re-arming),
            # not the equations: the state is consistent and the Jacobian still holds
            fresh = True
            h = h_before * 0.25
        elif event:
            _settle_modes(t, y, P, IP, S, Q, HC, gk, gxo, gpo, gnp, gn, GP, scale, wt, M, J, A, piv, F0, G, work, F1,
                          rhs, nstate)
            fresh = True
            jac_age = 0
            # restart from a fraction of the step that was running before the event: the
            # error test shrinks it further if the switching starts a fast transient
            h = max(0.25 * h_before, 1e-8)
        else:
            h = h * fac
    while ks < OUT.shape[0]:
        _copy_into(OUT[ks], o0)
        ks += 1
    return 0
