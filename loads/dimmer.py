"""Phase-cut dimmers: parameters of the switch, its control and its ratings.

Leading edge (forward phase): a triac fires at the firing angle α after each supply
zero crossing.  It turns on when gated and stays on only if its main current reaches
the latching current I_L while the gate is still driven; once latched it turns off when
the current falls below the holding current I_H (BIB_TEXTBOOK_TRIAC).  Holding is judged
on the current in the direction it flows: one that the gate carried through zero (a gated
triac conducts either way) holds the triac on in that direction when the drive ends.  The on-state
drop is V_T + r_T·i.  A current that sweeps through the holding level faster than the
commutating dI/dt (a ring of input capacitors with the line inductance) does not turn
the triac off: it goes on conducting until the current settles in either direction.
Nor does a dip below I_H shorter than the triac's turn-off time ``triac_turn_off_time_s``
(a ring trough that does not reach zero): the triac turns off only once its current has
stayed below I_H for that time, or has reached zero.
A series choke L_c limits di/dt; a snubber R–C sits across the dimmer.

Control:

* ``phase`` – an ideal controller: the gate is driven from α for ``gate_window_s``, and
  with ``gate_drive = "until-latched"`` on after that until the switch has
  latched with the current of this half-cycle's polarity, or the half-cycle ends (a
  pulse train or a gate held on, as dimmers made for inductive loads have: an iron-core
  transformer's lagging current from the previous half-cycle may still flow when the
  window ends, and a single pulse would then leave that polarity unfired).  With
  ``"retrigger"`` (the default) it does that and, when the switch drops out before the
  half-cycle ends (more than the early-drop-out margin before it) and the supply's own
  polarity appears across it above 10 V, it gives the gate another pulse (one pulse of
  a train, at most 100 µs; loads.kernel ``RETRIGGER_PULSE_S``)
  (common practice, from memory: phase-control ICs for triacs watch the voltage across
  the triac and repeat the gate pulse while it is seen inside the conduction interval,
  and microcontroller dimmers send a train of pulses; so a triac that the ring of lamp
  input capacitors turns off a few degrees after firing is fired again).  A reversed
  voltage — lamp capacitors held above a falling supply — does not re-fire it.  With
  ``"single-pulse"`` the drive ends with the window whatever the switch did.
  A setting s ∈ [0, 1] maps linearly to α = α_max − s·(α_max − α_min).
  The controller times its firing from the supply's zero crossings, so after the supply
  appears it does nothing until it has seen the first one.
* ``rc-diac`` – the classic timing network.  The timing capacitor C_t charges through
  R_fixed + (1 − s)·R_var from the voltage across the dimmer, so the charging current
  flows through the load:  C_t·dv_t/dt = (v_dimmer − v_t)/R_t − i_diac.
  The trigger diode breaks over at +V_BO (or −(V_BO − asymmetry) in the negative
  half-cycle), its voltage snaps back by V_snap, and it dumps charge into the gate
  through R_g:  i_diac = (v_t ∓ (V_BO − V_snap))/R_g while |i_diac| > I_diac,off.
  The firing angle is an output, and the charge left on C_t carries into the next
  half-cycle – which is what makes the lamp snap on at a higher setting than the one
  at which it drops out.

Trailing edge (reverse phase): the switch closes at the voltage zero and starts to open at
the set angle whatever the current.  It opens as transistor dimmers do (common practice,
from memory): its gate is discharged through a resistor, so the voltage across it rises
at a controlled slope while the transistor, in its linear region, carries whatever
current the circuit drives through it; the turn-off ends when that current has fallen to
zero.  The slope is that of a rise from zero to the supply's peak voltage in
``turn_off_time_s``.  The energy the turn-off takes from the line inductance and the
supply is heat in the transistor.  Only where the slope reaches the clamp voltage
(V_clamp) before the current has stopped (an inductance too large for the slope to
stop its current, as an iron-core transformer's) does the clamp take the current over.
A current above ``trip_current_a`` for ``trip_delay_s`` (the protection's response)
turns the switch off for the rest of the half-cycle, at once (from memory: protection
circuits pull the gate down hard, since a transistor held in its linear region at that
current would fail), so the line inductance's current then goes to the clamp.  After the supply
appears the switch first closes at the next zero crossing, and over ``soft_start_s`` the
conduction angle is ramped from zero to its set value (sampled at the end of each
half-cycle; 0: no soft start).

``low_end_trim``: the dimmer has a preset with which the installer raises the light at
the bottom of the knob's travel; failures confined to settings below some point then
become a matter of setting the trim, not of the dimmer.

Two-wire dimmers draw their own supply (``self_supply_a``) through the load while the
switch is off.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from enum import StrEnum

from loads.errors import require


class Edge(StrEnum):
    LEADING = "leading"
    TRAILING = "trailing"


class Wiring(StrEnum):
    TWO_WIRE = "two-wire"
    WITH_NEUTRAL = "with-neutral"


class Control(StrEnum):
    PHASE = "phase"
    RC_DIAC = "rc-diac"


class GateDrive(StrEnum):
    """How a phase controller drives a leading-edge switch's gate (see module docstring)."""

    UNTIL_LATCHED = "until-latched"
    SINGLE_PULSE = "single-pulse"
    RETRIGGER = "retrigger"


@dataclass(frozen=True, slots=True, kw_only=True)
class RcDiac:
    """The rc-diac timing network.

    fixed_resistance_ohm, variable_resistance_ohm: R_fixed, R_var (linear taper) [Ω];
    timing_capacitance_f: C_t [F]; breakover_v: V_BO in the positive half-cycle [V];
    snapback_v: fall of the diode's voltage once it conducts [V]; asymmetry_v: how much
    lower the negative breakover is [V]; gate_resistance_ohm: gate circuit seen by the
    diode, R_g [Ω]; diac_off_current_a: the diode stops conducting below this [A].
    """

    fixed_resistance_ohm: float = 3300.0      # common practice, no source (a few kΩ end stop)
    variable_resistance_ohm: float = 250e3    # common practice, no source (250–500 kΩ pots)
    timing_capacitance_f: float = 100e-9      # common practice, no source
    breakover_v: float = 32.0                 # TRADE: trigger diodes 28–36 V (common practice)
    snapback_v: float = 10.0                  # TRADE: snap-back of several volts (common practice)
    asymmetry_v: float = 0.0
    gate_resistance_ohm: float = 50.0         # engineering choice: gate–MT1 seen as ~50 Ω (as the ngspice reference)
    diac_off_current_a: float = 1e-3          # engineering choice: as the ngspice reference case

    def __post_init__(self) -> None:
        require(self.fixed_resistance_ohm > 0, "fixed_resistance_ohm", self.fixed_resistance_ohm, "Ω must be positive")
        require(self.variable_resistance_ohm >= 0, "variable_resistance_ohm", self.variable_resistance_ohm, "Ω must not be negative")
        require(self.timing_capacitance_f > 0, "timing_capacitance_f", self.timing_capacitance_f, "F must be positive")
        require(0 < self.breakover_v < 400, "breakover_v", self.breakover_v, "V is outside 0–400 V")
        require(0 <= self.snapback_v < self.breakover_v, "snapback_v", self.snapback_v, "V must be between 0 and the breakover voltage")
        require(abs(self.asymmetry_v) < self.breakover_v - self.snapback_v, "asymmetry_v", self.asymmetry_v,
                "V is larger than the diode's conducting voltage")
        require(self.gate_resistance_ohm > 0, "gate_resistance_ohm", self.gate_resistance_ohm, "Ω must be positive")
        require(self.diac_off_current_a > 0, "diac_off_current_a", self.diac_off_current_a, "A must be positive")


@dataclass(frozen=True, slots=True, kw_only=True)
class Dimmer:
    """A wall dimmer.  Currents in A, voltages in V, times in s, L in H, C in F."""

    name: str = "dimmer"
    edge: Edge = Edge.LEADING
    wiring: Wiring = Wiring.TWO_WIRE
    control: Control = Control.RC_DIAC
    # ratings
    rated_load_w: float = 400.0
    rated_transformer_va: float | None = None
    rated_led_w: float | None = None
    min_load_w: float = 40.0
    max_lamps: int | None = None
    gang: int = 1
    fins_removed: int = 0
    ambient_temperature_c: float = 25.0
    # switching device (leading edge)
    holding_current_a: float = 0.025          # TRADE: wall-dimmer triacs 5–50 mA (common practice)
    latching_current_a: float = 0.050         # TEXTBOOK_TRIAC: latching 1.5–3× holding (from memory)
    gate_trigger_current_a: float = 0.010     # common practice, no source (sensitive-gate triacs 5–35 mA)
    gate_window_s: float = 100e-6             # engineering choice: a short pulse train from a phase controller
    gate_drive: GateDrive = GateDrive.RETRIGGER   # common practice, from memory: electronic phase controllers
                                              # drive the gate until the switch latches and fire it again
                                              # when it drops out inside the conduction interval
    on_state_voltage_v: float = 1.0           # common practice, no source (triac V_T ≈ 1–1.5 V)
    on_state_resistance_ohm: float = 0.02     # common practice, no source (triac slope resistance tens of mΩ)
    surge_peak_a: float = 80.0                # common practice, no source (a 4–8 A triac: 60–100 A for one half-cycle)
    surge_i2t_a2s: float = 30.0               # common practice, no source
    repetitive_peak_a: float = 20.0           # common practice, no source
    commutating_di_dt_a_per_s: float = 10e3   # common practice, no source: triacs commutate a current
                                              # falling at up to a few to tens of A/ms (0: always)
    triac_turn_off_time_s: float = 20e-6      # common practice, from memory: a triac's commutated turn-off
                                              # time t_q is some tens of µs; a dip below I_H shorter than it
                                              # does not turn the triac off (0: it turns off at once)
    choke_inductance_h: float = 60e-6         # TRADE: 40–100 µH chokes (common practice)
    snubber_capacitance_f: float = 0.0
    snubber_resistance_ohm: float = 100.0     # common practice, no source
    self_supply_a: float = 0.0                # two-wire electronic dimmers: a few mA [trade]
    # trailing edge
    clamp_voltage_v: float = 400.0            # common practice, no source (a TVS above the 230 V mains peak)
    turn_off_time_s: float = 100e-6           # from memory: a trailing-edge dimmer's falling edge spans a few
                                              # degrees of the mains cycle on an oscilloscope (~100–300 µs), slow
                                              # to limit interference; the short end (engineering choice: more of
                                              # an inductance's energy then reaches the clamp, not understated)
    trip_current_a: float = 20.0              # common practice, no source
    trip_delay_s: float = 0.0                 # engineering choice: the protection acts at once
    soft_start_s: float = 0.05                # from memory: transistor dimmers bring the lamps up over a few
                                              # mains cycles to a fraction of a second at switch-on; the short
                                              # end (engineering choice: the surge is not understated)
    # phase control
    min_firing_angle_deg: float = 20.0
    max_firing_angle_deg: float = 160.0
    # an installer-set low-end trim (a preset that raises the knob's lowest position)
    low_end_trim: bool = False
    rc_diac: RcDiac | None = field(default_factory=RcDiac)

    def __post_init__(self) -> None:
        object.__setattr__(self, "edge", Edge(self.edge))
        object.__setattr__(self, "wiring", Wiring(self.wiring))
        object.__setattr__(self, "control", Control(self.control))
        object.__setattr__(self, "gate_drive", GateDrive(self.gate_drive))
        require(self.rated_load_w > 0, "rated_load_w", self.rated_load_w, "W must be positive")
        for name in ("rated_transformer_va", "rated_led_w"):
            v = getattr(self, name)
            require(v is None or v > 0, name, v, "must be positive")
        require(self.min_load_w >= 0, "min_load_w", self.min_load_w, "W must not be negative")
        require(self.min_load_w < self.rated_load_w, "min_load_w", self.min_load_w, "W must be below the rated load")
        require(self.max_lamps is None or self.max_lamps >= 1, "max_lamps", self.max_lamps, "must be at least 1")
        require(1 <= self.gang <= 6, "gang", self.gang, "must be 1–6")
        require(0 <= self.fins_removed <= 2, "fins_removed", self.fins_removed, "must be 0, 1 or 2")
        require(-20 <= self.ambient_temperature_c <= 60, "ambient_temperature_c", self.ambient_temperature_c, "°C is outside −20–60 °C")
        require(self.holding_current_a > 0, "holding_current_a", self.holding_current_a, "A must be positive")
        require(self.latching_current_a >= self.holding_current_a, "latching_current_a", self.latching_current_a,
                "A must not be below the holding current")
        require(self.gate_trigger_current_a > 0, "gate_trigger_current_a", self.gate_trigger_current_a, "A must be positive")
        require(0 < self.gate_window_s < 0.01, "gate_window_s", self.gate_window_s, "s must be between 0 and 10 ms")
        require(0 <= self.on_state_voltage_v < 5, "on_state_voltage_v", self.on_state_voltage_v, "V is outside 0–5 V")
        require(self.on_state_resistance_ohm > 0, "on_state_resistance_ohm", self.on_state_resistance_ohm, "Ω must be positive")
        for name in ("surge_peak_a", "surge_i2t_a2s", "repetitive_peak_a", "clamp_voltage_v", "trip_current_a",
                     "snubber_resistance_ohm"):
            require(getattr(self, name) > 0, name, getattr(self, name), "must be positive")
        require(self.commutating_di_dt_a_per_s >= 0, "commutating_di_dt_a_per_s", self.commutating_di_dt_a_per_s,
                "A/s must not be negative")
        require(0 <= self.turn_off_time_s <= 1e-3, "turn_off_time_s", self.turn_off_time_s, "s must be 0–1 ms")
        require(0 <= self.trip_delay_s <= 1e-3, "trip_delay_s", self.trip_delay_s, "s must be 0–1 ms")
        require(0 <= self.triac_turn_off_time_s <= 1e-3, "triac_turn_off_time_s", self.triac_turn_off_time_s,
                "s must be 0–1 ms")
        require(0 <= self.soft_start_s <= 5.0, "soft_start_s", self.soft_start_s, "s must be 0–5 s")
        for name in ("choke_inductance_h", "snubber_capacitance_f", "self_supply_a"):
            require(getattr(self, name) >= 0, name, getattr(self, name), "must not be negative")
        require(0 <= self.min_firing_angle_deg < self.max_firing_angle_deg <= 180, "min_firing_angle_deg",
                self.min_firing_angle_deg, "° must satisfy 0 ≤ min < max ≤ 180")
        if self.control is Control.RC_DIAC:
            require(self.edge is Edge.LEADING, "control", "rc-diac", "needs a leading-edge dimmer")
            if self.rc_diac is None:
                object.__setattr__(self, "rc_diac", RcDiac())

    def firing_angle_for_setting_deg(self, setting: float) -> float:
        """Phase control: α for a setting in [0, 1] (1 is brightest) [deg]."""
        s = min(max(setting, 0.0), 1.0)
        return self.max_firing_angle_deg - s * (self.max_firing_angle_deg - self.min_firing_angle_deg)
