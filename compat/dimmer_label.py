"""A wall dimmer described from its faceplate or its sheet.

What an installer can read: the rated load in W, the LED rating where printed, the
minimum load, leading or trailing edge, two-wire or with a neutral, and whether it has
a low-end trim.  Everything else the model needs (the switch's holding and latching
currents, its gate sensitivity, the trigger diode's breakover, a two-wire dimmer's
self-supply, a transistor dimmer's over-current trip) cannot be read and is given as a
range with its basis, so that a check that depends on it reports ``site-test-needed``
with that input named, and one that does not depend on it is judged as usual.

The figures beside each range are the trade's (common practice, no source) or
recalled (from memory), as ``loads.dimmer`` documents its defaults; no maker's data.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from loads.circuit import Range
from loads.dimmer import Dimmer, RcDiac
from loads.errors import InputError

# Unreadable figures of a leading-edge (triac) dimmer, SI.
HOLDING_A = (5e-3, 50e-3)          # TRADE: wall-dimmer triacs hold at 5–50 mA (common practice, as loads.dimmer)
LATCHING_TO_HOLDING = (1.5, 3.0)   # TEXTBOOK_TRIAC: latching 1.5–3× holding (from memory, as loads.dimmer)
GATE_TRIGGER_A = (5e-3, 35e-3)     # sensitive-gate triacs 5–35 mA (common practice, no source, as loads.dimmer)
BREAKOVER_V = (28.0, 36.0)         # TRADE: trigger diodes break over at 28–36 V (common practice, as loads.dimmer)
# A two-wire electronic dimmer draws its own supply through the lamps: a few mA
# (common practice, no source, as loads.dimmer and the archetypes' 3 mA).
SELF_SUPPLY_A = (0.5e-3, 5e-3)
# A transistor dimmer's electronic over-current trip (engineering choice: "several
# times the rated current" of the trade, common practice, no source; the trailing-edge
# archetype trips at 10 A for 250 W, about 9× its rated current): 4–12× rated rms.
TRIP_TIMES_RATED = (4.0, 12.0)
# A transistor dimmer's switch and protection, as the trailing-edge archetype (each
# figure's origin is in loads/catalogue/dimmer-trailing-two-wire-250w.toml).
TRAILING_FIXED: dict[str, object] = {
    "on_state_voltage_v": 1.5, "on_state_resistance_ohm": 0.5, "choke_inductance_h": 0.0,
    "snubber_capacitance_f": 10e-9, "snubber_resistance_ohm": 100.0, "clamp_voltage_v": 400.0, "soft_start_s": 0.05,
}
# The switch's current ratings (surge peak [A], surge I²t [A²s], repetitive peak [A]) of
# the reference dimmer they come from, and its rated current [A]: the trailing-edge
# archetype (250 W at 230 V) and loads.dimmer's defaults for a 400 W leading-edge dimmer
# at 230 V.  A dimmer rated for more carries a switch rated for more: the peaks are
# scaled with the rated current and the I²t with its square (engineering choice).
SWITCH_RATINGS = {
    "trailing": ((40.0, 8.0, 10.0), 250.0 / 230.0),
    "leading": ((80.0, 30.0, 20.0), 400.0 / 230.0),
}


@dataclass(frozen=True, slots=True, kw_only=True)
class Faceplate:
    """What the dimmer's faceplate or sheet says.

    rated_load_w: the rating (filament) [W]; rated_led_w: the LED rating where printed
    [W]; min_load_w: the minimum load [W]; edge: leading | trailing; wiring: two-wire |
    with-neutral; control: phase | rc-diac (None: the usual kind for the edge and
    wiring, see ``usual_control``); low_end_trim: it has a trim preset;
    voltage_v: the mains it is rated for [V]."""

    rated_load_w: float
    min_load_w: float
    edge: str
    wiring: str
    rated_led_w: float | None = None
    control: str | None = None
    low_end_trim: bool = False
    voltage_v: float = 230.0

    def __post_init__(self) -> None:
        def need(ok: bool, key: str, reason: str) -> None:
            if not ok:
                raise InputError(reason, key=key)

        for key in ("rated_load_w", "min_load_w", "rated_led_w", "voltage_v"):
            v = getattr(self, key)
            need(v is None or (isinstance(v, (int, float)) and math.isfinite(v)), key, "must be a finite number")
        need(1.0 <= self.rated_load_w <= 10000.0, "rated_load_w", f"{self.rated_load_w:g} W is outside 1 W–10 kW")
        need(0.0 <= self.min_load_w < self.rated_load_w, "min_load_w",
             f"{self.min_load_w:g} W must be at least 0 and below the {self.rated_load_w:g} W rating")
        need(self.rated_led_w is None or 0.0 < self.rated_led_w <= self.rated_load_w, "rated_led_w",
             f"{self.rated_led_w} W must be positive and not above the {self.rated_load_w:g} W rating")
        need(self.edge in ("leading", "trailing"), "edge", f"{self.edge!r} is not leading or trailing")
        need(self.wiring in ("two-wire", "with-neutral"), "wiring", f"{self.wiring!r} is not two-wire or with-neutral")
        need(self.control in (None, "phase", "rc-diac"), "control", f"{self.control!r} is not phase or rc-diac")
        need(not (self.control == "rc-diac" and self.edge == "trailing"), "control",
             "an rc-diac timing network drives a leading-edge triac, not a trailing-edge dimmer")
        need(10.0 <= self.voltage_v <= 1000.0, "voltage_v", f"{self.voltage_v:g} V is outside 10–1000 V")

    @property
    def usual_control(self) -> str:
        """The control assumed when not given (common practice, no source): a two-wire
        leading-edge dimmer with no neutral is the plain rotary rc-diac kind; one with a
        neutral, or any trailing-edge dimmer, has an electronic phase controller."""
        if self.control is not None:
            return self.control
        return "rc-diac" if (self.edge == "leading" and self.wiring == "two-wire") else "phase"


@dataclass(frozen=True, slots=True, kw_only=True)
class DimmerEstimate:
    """The dimmer (ranges at their midpoints), its ranges (SI) and their basis."""

    faceplate: Faceplate
    ranges: dict[str, tuple[float, float]]
    fixed: dict[str, object]
    basis: dict[str, str]
    notes: tuple[str, ...] = field(default=())

    def dimmer(self, name: str) -> tuple[Dimmer, tuple[Range, ...]]:
        kwargs = dict(self.fixed)
        rc_kwargs = {}
        for key, (lo, hi) in self.ranges.items():
            if key.startswith("rc_diac."):
                rc_kwargs[key.split(".", 1)[1]] = 0.5 * (lo + hi)
            else:
                kwargs[key] = 0.5 * (lo + hi)
        if kwargs.get("control") == "rc-diac":
            kwargs["rc_diac"] = RcDiac(**rc_kwargs)
        else:
            kwargs["rc_diac"] = None
        from loads.files import file_key_of

        def file_key(key: str) -> str:
            if key.startswith("rc_diac."):
                return "dimmer.rc_diac." + file_key_of(RcDiac, key.split(".", 1)[1])
            return "dimmer." + file_key_of(Dimmer, key)

        ranges = tuple(Range(f"dimmer.{k}", file_key(k), lo, hi) for k, (lo, hi) in self.ranges.items() if hi > lo)
        return Dimmer(name=name, **kwargs), ranges


def estimate(face: Faceplate) -> DimmerEstimate:
    """The dimmer model for a faceplate: read figures fixed, unreadable ones as ranges."""
    control = face.usual_control
    fixed: dict[str, object] = {
        "edge": face.edge, "wiring": face.wiring, "control": control, "rated_load_w": face.rated_load_w,
        "rated_led_w": face.rated_led_w, "min_load_w": face.min_load_w, "low_end_trim": face.low_end_trim,
    }
    ranges: dict[str, tuple[float, float]] = {}
    basis: dict[str, str] = {}
    notes: list[str] = []
    (surge_a, i2t_a2s, repetitive_a), reference_a = SWITCH_RATINGS[face.edge]
    scale = (face.rated_load_w / face.voltage_v) / reference_a
    fixed.update(surge_peak_a=surge_a * scale, surge_i2t_a2s=i2t_a2s * scale * scale, repetitive_peak_a=repetitive_a * scale)
    notes.append(f"switch ratings scaled from a reference {'250' if face.edge == 'trailing' else '400'} W dimmer by "
                 f"its rated current: surge {surge_a * scale:.3g} A, {i2t_a2s * scale * scale:.3g} A²s, repetitive "
                 f"peak {repetitive_a * scale:.3g} A (engineering choice)")
    if face.control is None:
        notes.append(f"control taken as {control} (the usual kind for a {face.wiring} {face.edge}-edge dimmer; "
                     "common practice, no source)")
    if face.edge == "leading":
        ranges["holding_current_a"] = HOLDING_A
        basis["holding_current_a"] = "not printed: wall-dimmer triacs hold at 5–50 mA (common practice, no source)"
        ranges["latching_current_a"] = (LATCHING_TO_HOLDING[0] * HOLDING_A[0], LATCHING_TO_HOLDING[1] * HOLDING_A[1])
        basis["latching_current_a"] = ("not printed: 1.5–3 times the holding current (triac textbooks, from memory)")
        ranges["gate_trigger_current_a"] = GATE_TRIGGER_A
        basis["gate_trigger_current_a"] = "not printed: sensitive-gate triacs 5–35 mA (common practice, no source)"
        if control == "rc-diac":
            ranges["rc_diac.breakover_v"] = BREAKOVER_V
            basis["rc_diac.breakover_v"] = "not printed: trigger diodes break over at 28–36 V (common practice, no source)"
    else:
        fixed.update(TRAILING_FIXED)
        rated_a = face.rated_load_w / face.voltage_v
        ranges["trip_current_a"] = (TRIP_TIMES_RATED[0] * rated_a, TRIP_TIMES_RATED[1] * rated_a)
        basis["trip_current_a"] = ("not printed: an electronic trip at 4–12 times the rated current "
                                   "(engineering choice around the trade's \"several times\"; common practice, no source)")
        notes.append("the switch's voltage drop, clamp and soft start are the trailing-edge archetype's "
                     "(engineering choices, see the built-in catalogue)")
    if face.wiring == "two-wire" and control == "phase":
        ranges["self_supply_a"] = SELF_SUPPLY_A
        basis["self_supply_a"] = ("not printed: a two-wire electronic dimmer draws a few mA through the lamps "
                                  "for itself (common practice, no source)")
    else:
        fixed["self_supply_a"] = 0.0
        basis["self_supply_a"] = ("none: a dimmer with a neutral feeds itself from it" if face.wiring == "with-neutral"
                                  else "none apart from the timing network's own current, which the model carries")
    return DimmerEstimate(faceplate=face, ranges=ranges, fixed=fixed, basis=basis, notes=tuple(notes))
