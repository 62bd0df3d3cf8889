"""One function per check id (``CHECK_IDS``; what each judges: docs/design.md, Checks).

Each takes the circuit and the part of the ``Evidence`` it needs and returns a
``CheckResult``: status, value, limit, unit, margin (fraction of the limit, positive
inside), a one-sentence message for a practitioner, a remedy where one exists, the
bibliography keys behind the criterion, and ``safety`` for surge, spike, DC and
overload matters.  Where the physics decides, the check judges the simulated
waveforms, not a rule of thumb.
"""
from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from compat import breaker_band, derating, flicker, harmonics, phase_sense, reference_lamp
from compat.notation import check_figure, setting_text
from compat.perception import cie_lightness, perceived_brightness
from compat.report import CheckResult, Status
from compat.runs import SettingRun, samples_per_cycle, tail
from loads.circuit import Circuit
from loads.dimmer import Control, Dimmer, Edge, GateDrive, Wiring
from loads.driver import ElectronicDriver
from loads.electronic_transformer import ElectronicTransformer
from loads.linear import Linear
from loads.simulation import EARLY_DROPOUT_DEG, STABLE_ANGLE_DEG, SimResult
from loads.transformer import MagneticTransformer

CHECK_IDS = ("rating", "minimum-load", "edge-match", "dimmable", "latching", "holding", "repetitive-peak", "inrush", "breaker",
             "off-state", "dc-offset", "turn-off-surge", "dimming-range", "flicker", "harmonics", "dissipation")

# Engineering choice: a setting gives light when its mean light exceeds 0.2 % of full
# (well below the 5 % dimming target, well above numerical noise).
LIT_FRACTION = 0.002
# Engineering choice: off-state light above 0.1 % of a group's rated light is visible
# in a dark room as a glow (no source; an LED at 1/1000 of full is plainly seen at night).
OFF_VISIBLE_FRACTION = 0.001
# LRC_ASSIST_DIMMING: dim to 5 % or lower; at full, at least 90 % of the plain-switch light.
DIM_TARGET_LOW = 0.05
DIM_TARGET_HIGH = 0.90
# Engineering choice: lamps whose lowest light is within this factor of the light a
# filament lamp gives at the bottom of the same dimmer's travel dim as far as the dimmer
# allows (a filament of another wattage, or a lamp with another light-vs-angle curve,
# differs by some tens of per cent there).
DIM_FLOOR_HEADROOM = 1.25
# Engineering choice: an inductive ratio ωL/R above this makes a linear load "inductive"
# for edge matching (its current lags by more than ~6°).
INDUCTIVE_RATIO = 0.1
# TRADE: a solid-state dimmer dissipates about 1–2 % of the load power as heat; the
# allowance is the upper figure applied to the derated rating (the heat it is built to shed).
DISSIPATION_SHARE = 0.02
# Engineering choice: a peak within 2 % of the clamp voltage means the clamp conducts
# (the simulator holds the voltage at the clamp level while it does).
CLAMP_REACHED = 0.98
# From memory: disc varistors of the sizes fitted across wall dimmers (7–14 mm) are rated
# for a mean power of about 0.25–0.6 W; a clamp is there for occasional mains surges, so
# energy absorbed every half-cycle is judged against the small end.
CLAMP_MEAN_POWER_W = 0.25
# Engineering choice: symmetric firing into a transformer gives peaks equal within a few
# per cent; a saturating core gives peaks several times larger in one polarity.  The
# caution also starts when the settled DC reaches half the saturation headroom.
DC_ASYMMETRY_CAUTION_PCT = 15.0
DC_ASYMMETRY_FAIL_PCT = 50.0


def _margin(value: float, limit: float, *, upper: bool = True) -> float:
    """Fraction of the limit by which value is inside it (upper: value must stay below)."""
    if limit == 0:
        return 0.0 if value == limit else (-math.inf if (value > 0) == upper else math.inf)
    return (limit - value) / abs(limit) if upper else (value - limit) / abs(limit)


def _finite(x):
    return None if x is None or not math.isfinite(x) else float(x)


def _res(check_id: str, status: Status, value, limit, unit: str, margin, message: str, *, remedy=None,
         sources=(), safety=False, details=None) -> CheckResult:
    for name, x in (("value", value), ("limit", limit), ("margin", margin)):
        if x is not None and math.isnan(x):         # a NaN is a bug upstream: never report it as "no value"
            raise ValueError(f"check {check_id}: {name} is NaN")
    return CheckResult(id=check_id, status=status, value=_finite(value), limit=_finite(limit), unit=unit,
                       margin=_finite(margin), message=message, remedy=remedy, sources=tuple(sources),
                       safety=safety, details=details or {})


def _na(check_id: str, why: str, *, sources=(), safety=False) -> CheckResult:
    return _res(check_id, Status.NOT_APPLICABLE, None, None, "", None, why, sources=sources, safety=safety)


def _fmt_setting(run: SettingRun) -> str:
    return setting_text(run.setting, run.direction)


def _offer(circuit: Circuit, *options: tuple[str | None, str], lead: str = "") -> str | None:
    """A remedy sentence from (needs, text) options, leaving out what the circuit
    already has: needs "no-device" (no load-correction device fitted), "leading" (the
    dimmer is leading edge, so a trailing-edge one is a change), "two-wire" (no neutral
    at the dimmer yet), or None (always offered).  Joined as "a, b or c" after ``lead``."""
    d = circuit.dimmer
    has = {"no-device": circuit.correction is None, "leading": d.edge is Edge.LEADING,
           "two-wire": d.wiring is Wiring.TWO_WIRE, None: True}
    texts = [t for need, t in options if has[need]]
    if not texts:
        return None
    body = lead + (texts[0] if len(texts) == 1 else ", ".join(texts[:-1]) + " or " + texts[-1])
    return body[0].upper() + body[1:] + "."


# ---------------------------------------------------------------- nameplate checks

def check_rating(circuit: Circuit) -> CheckResult:
    """Load (W, VA, LED rule) against the dimmer's derated rating."""
    use = derating.rating_use(circuit.dimmer, circuit.loads)
    u = use.utilisation
    details = {"derating_factor": use.factor, "rules": [(r.text, r.origin) for r in use.rules],
               "groups": [(g.name, g.load, g.rating, g.unit, g.rule.text, g.rule.origin) for g in use.groups]}
    over_count = use.max_lamps is not None and use.led_units > use.max_lamps
    status = Status.FAIL if (u > 1.0 or over_count) else Status.PASS
    msg = f"The lamps take {100 * u:.0f} % of the dimmer's {_rating_words(circuit, use)}."
    if over_count:
        msg = (f"{use.led_units} LED lamps exceed the dimmer's printed cap of {use.max_lamps}; "
               f"they take {100 * u:.0f} % of its derated rating.")
    remedy = None
    if status is Status.FAIL:
        remedy = "Fit a dimmer with a larger rating for this load type, or split the lamps over two dimmers."
    return _res("rating", status, 100 * u, 100.0, "%", 1.0 - u, msg, remedy=remedy, sources=("TRADE",),
                safety=True, details=details)


_KIND_WORDS = {"filament": "filament lamps", "electronic-driver": "LED lamps",
               "magnetic-transformer": "iron-core transformers", "electronic-transformer": "electronic transformers",
               "linear": "other loads"}


def _rating_words(circuit: Circuit, use: derating.RatingUse) -> str:
    """The rating and how each group was counted against it, in words: "400 W rating:
    42 W of filament lamps (10 %) and 24 W of LED lamps (60 %); LED lamps count at
    10 × their watts on this dimmer (the rule of the trade for a dimmer with no printed
    rating for them, common practice, no source)"."""
    d = circuit.dimmer
    rating = f"{d.rated_load_w:.0f} W rating"
    if use.rules:
        rating += (f", derated to {use.factor * d.rated_load_w:.0f} W ("
                   + "; ".join(f"{r.text}, {r.origin}" for r in use.rules) + ")")
    parts, how = [], []
    for load, g in zip(circuit.loads, use.groups):
        words = _KIND_WORDS.get(str(load.kind), load.name)
        parts.append(f"{g.load:.0f} {g.unit} of {words} ({100 * g.share:.0f} %)")
        type_rated = g.rating / use.factor if use.factor > 0 else g.rating
        mult = d.rated_load_w / type_rated if type_rated > 0 else math.inf
        if abs(mult - 1.0) > 1e-9 or g.unit != "W":
            why = (f"its printed rating of {type_rated:.0f} {g.unit} for them" if g.rule.factor == 1.0
                   else f"the rule of the trade for a dimmer with no printed rating for them, {g.rule.origin}")
            how.append(f"{words} count at {mult:.3g} × their {'watts' if g.unit == 'W' else 'VA'} on this dimmer ({why})")
    return rating + ": " + " and ".join(parts) + ("; " + "; ".join(how) if how else "")


def _linear_apparent_va(g: Linear, voltage_v: float, frequency_hz: float) -> float:
    """Apparent power of a linear load at rated voltage and frequency [VA]."""
    w = 2 * math.pi * frequency_hz
    z = complex(g.resistance_ohm, w * g.inductance_h)
    if g.series_capacitance_f > 0:
        z += 1 / (1j * w * g.series_capacitance_f)
    y = 1 / z + 1j * w * g.parallel_capacitance_f
    return g.count * voltage_v ** 2 * abs(y)


def counted_load_w(circuit: Circuit) -> tuple[float, list[tuple[str, float]]]:
    """What counts against the dimmer's minimum load: lamp watts (transformers: the
    lamps they feed) plus a correction device at its apparent power at the supply
    voltage (engineering choice: it is fitted to provide current, not watts, and such
    devices are rated in the watts of minimum load they stand in for) [W]."""
    parts = []
    for g in circuit.loads:
        if isinstance(g, MagneticTransformer | ElectronicTransformer):
            parts.append((g.name, g.count * g.lamp_power_w))
        else:
            parts.append((g.name, g.total_rated_power_w))
    if circuit.correction is not None:
        parts.append((circuit.correction.name, _linear_apparent_va(circuit.correction, circuit.supply.voltage_v,
                                                                   circuit.supply.frequency_hz)))
    return sum(p for _, p in parts), parts


# The simulated checks that show whether a load-correction device carries the switch
# where the lamps' watts are below the dimmer's minimum (engineering choice: these are
# the failures a minimum load exists to prevent).
MIN_LOAD_EVIDENCE = ("latching", "holding", "off-state")


def check_minimum_load(circuit: Circuit, simulated: dict[str, Status] | None = None) -> CheckResult:
    """Total load against the dimmer's minimum load, and each electronic transformer's
    lamps against that transformer's own minimum load (per unit); the worse failure
    leads, and every failing one is named.

    simulated: status of the ``MIN_LOAD_EVIDENCE`` checks on the simulated circuit.  With
    a load-correction device fitted, the device is there to stand in for missing watts,
    so the simulation decides the dimmer's minimum: it is met if the switch latches and
    holds and the lamps stay dark when off.

    TRADE (common practice, no source): a self-oscillating electronic transformer
    below its minimum load does not start its oscillator reliably, and its lamps
    flicker or stay dark, whatever the dimmer."""
    dimmer = _dimmer_minimum_load(circuit, simulated)
    units = [_transformer_minimum_load(g) for g in circuit.loads
             if isinstance(g, ElectronicTransformer) and g.min_load_w > 0]
    failing = [r for r in [dimmer] + units if r.status is Status.FAIL]
    if not failing or failing == [dimmer]:
        return dimmer
    # the worse failure leads with its figures; the message and remedy name every one
    failing.sort(key=lambda r: r.margin)
    worst = failing[0]
    msg = " ".join(r.message for r in failing)
    remedy = " ".join(r.remedy for r in failing)
    details = {"parts": dimmer.details.get("parts"), "failing": [(r.details.get("group", "dimmer"), r.value, r.limit)
                                                                 for r in failing]}
    return _res("minimum-load", Status.FAIL, worst.value, worst.limit, "W", worst.margin, msg, remedy=remedy,
                sources=("TRADE",), details=details)


def _transformer_minimum_load(g: ElectronicTransformer) -> CheckResult:
    """One electronic transformer group's lamps per unit against its own minimum load."""
    m, lamp = g.min_load_w, g.lamp_power_w
    ok = lamp >= m
    per = "each" if g.count > 1 else "the"
    msg = (f"{g.name}: {per} electronic transformer carries {lamp:.0f} W of lamps and needs at least {m:.0f} W "
           "to start its oscillator; below that its lamps flicker or stay dark." if not ok else
           f"{g.name}: {per} electronic transformer carries {lamp:.0f} W of lamps, above its {m:.0f} W minimum.")
    remedy = None if ok else (f"Put more or bigger lamps on each {g.name} (at least {m:.0f} W per transformer), "
                              f"or use a transformer whose minimum load is {lamp:.0f} W or less.")
    return _res("minimum-load", Status.PASS if ok else Status.FAIL, lamp, m, "W", _margin(lamp, m, upper=False),
                msg, remedy=remedy, sources=("TRADE",), details={"group": g.name, "per_unit": True})


def _dimmer_minimum_load(circuit: Circuit, simulated: dict[str, Status] | None) -> CheckResult:
    """Total load against the dimmer's minimum load (with a device: the simulation)."""
    total, parts = counted_load_w(circuit)
    m = circuit.dimmer.min_load_w
    if m <= 0:
        return _res("minimum-load", Status.PASS, total, 0.0, "W", None,
                    "The dimmer states no minimum load.", sources=("TRADE",))
    ok = total >= m
    details = {"parts": parts}
    if not ok and circuit.correction is not None and simulated:
        seen = {k: simulated.get(k, Status.NOT_APPLICABLE) for k in MIN_LOAD_EVIDENCE}
        bad = [k for k, v in seen.items() if v is Status.FAIL]
        warn = [k for k, v in seen.items() if v is Status.CAUTION]
        details["simulated"] = {k: str(v) for k, v in seen.items()}
        dev = circuit.correction.name
        if not bad:
            status = Status.CAUTION if warn else Status.PASS
            msg = (f"The lamps' {total:.0f} W is below the dimmer's {m:.0f} W minimum, but with {dev} fitted the "
                   f"simulated switch latches and holds and the lamps stay dark when off"
                   + (f" (cautions: {', '.join(warn)})." if warn else "."))
            return _res("minimum-load", status, total, m, "W", _margin(total, m, upper=False), msg,
                        sources=("TRADE",), details=details)
        msg = (f"The circuit puts {total:.0f} W on a dimmer that needs at least {m:.0f} W, and {dev} does not make "
               f"up for it: the simulation fails {', '.join(bad)}.")
        remedy = (f"Add at least {m - total:.0f} W of load (more lamps, a filament lamp), a larger load-correction "
                  "device, or a dimmer with a lower minimum.")
        return _res("minimum-load", Status.FAIL, total, m, "W", _margin(total, m, upper=False), msg,
                    remedy=remedy, sources=("TRADE",), details=details)
    msg = (f"The circuit puts {total:.0f} W on a dimmer that needs at least {m:.0f} W."
           if not ok else f"The circuit's {total:.0f} W is above the dimmer's {m:.0f} W minimum.")
    remedy = None if ok else _offer(circuit, (None, f"add at least {m - total:.0f} W of load (more lamps, a filament lamp)"),
                                    ("no-device", "fit a load-correction device across the lamps"),
                                    (None, "use a dimmer with a lower minimum"))
    return _res("minimum-load", Status.PASS if ok else Status.FAIL, total, m, "W", _margin(total, m, upper=False),
                msg, remedy=remedy, sources=("TRADE",), details=details)


def check_dimmable(circuit: Circuit) -> CheckResult:
    """Every lamp group made for dimming.  A driver sold as non-dimmable draws its
    power whatever the phase: on a phase-cut dimmer it flickers, buzzes, and its input
    parts take the dimmer's current spikes, so it fails early (TRADE)."""
    plain = [g for g in circuit.loads if isinstance(g, ElectronicDriver) and not g.dimmable]
    if not plain:
        return _res("dimmable", Status.PASS, None, None, "", None,
                    "Every lamp group on the circuit is made for dimming.", sources=("TRADE",))
    n = sum(g.count for g in plain)
    names = ", ".join(g.name for g in plain)
    return _res("dimmable", Status.FAIL, None, None, "", None,
                f"{names} {'is' if len(plain) == 1 else 'are'} not made for dimming: on a phase-cut dimmer such lamps "
                "flicker, buzz or fail early, and their makers rule it out.",
                remedy="Fit lamps marked dimmable, or replace the dimmer with a plain switch.",
                sources=("TRADE",), safety=True, details={"groups": [g.name for g in plain], "lamps": n})


def load_character(group, frequency_hz: float) -> str:
    """"inductive", "capacitive" or "resistive" as the dimmer sees the group."""
    if isinstance(group, MagneticTransformer):
        return "inductive"
    if isinstance(group, ElectronicDriver | ElectronicTransformer):
        return "capacitive"
    if isinstance(group, Linear):
        if group.series_capacitance_f > 0 or group.parallel_capacitance_f > 0:
            return "capacitive"
        if 2 * math.pi * frequency_hz * group.inductance_h > INDUCTIVE_RATIO * group.resistance_ohm:
            return "inductive"
    return "resistive"


def check_edge_match(circuit: Circuit) -> CheckResult:
    """Dimmer edge against the load's character (TRADE)."""
    f = circuit.supply.frequency_hz
    chars = [(g, load_character(g, f)) for g in circuit.loads]
    total = sum(derating.group_load(g)[0] for g in circuit.loads)
    ind = [g for g, c in chars if c == "inductive"]
    cap = [g for g, c in chars if c == "capacitive"]
    edge = circuit.dimmer.edge
    if edge is Edge.TRAILING and ind:
        share = sum(derating.group_load(g)[0] for g in ind) / total
        return _res("edge-match", Status.FAIL, 100 * share, 0.0, "%", None,
                    f"A trailing-edge dimmer cuts the current of an inductive load ({', '.join(g.name for g in ind)}) "
                    "and raises a voltage spike every half-cycle.",
                    remedy="Use a leading-edge dimmer rated for iron-core transformers, or a transformer made for trailing edge.",
                    sources=("TRADE",), safety=True)
    if edge is Edge.LEADING and cap:
        share = sum(derating.group_load(g)[0] for g in cap) / total
        return _res("edge-match", Status.CAUTION, 100 * share, 0.0, "%", None,
                    f"A leading-edge dimmer switches on into capacitor-input electronics ({', '.join(g.name for g in cap)}), "
                    "which draws a current spike at every firing; see the repetitive-peak check.",
                    remedy="A trailing-edge dimmer suits capacitor-input lamps better.", sources=("TRADE",))
    if ind and cap:
        return _res("edge-match", Status.CAUTION, None, None, "%", None,
                    "The circuit mixes inductive and capacitive loads, which no single edge suits perfectly.",
                    remedy="Put the transformer loads and the electronic lamps on separate dimmers.", sources=("TRADE",))
    kind = "leading" if edge is Edge.LEADING else "trailing"
    return _res("edge-match", Status.PASS, 0.0, 0.0, "%", None,
                f"The {kind}-edge dimmer suits these loads.", sources=("TRADE",))


# ---------------------------------------------------------------- switch behaviour

def _lit_settings(runs: Sequence[SettingRun], weights) -> list[SettingRun]:
    return [r for r in runs if r.light_fraction(weights) > LIT_FRACTION]


def _end_of_travel(runs: Sequence[SettingRun], weights) -> float:
    """The lowest setting at which the lamps give light and the switch behaves (stable),
    in any direction; settings below it are the end of the knob's travel [1]."""
    good = [r.setting for r in runs if r.light_fraction(weights) > LIT_FRACTION
            and (r.point.stable if r.point is not None else _clean(r))]
    return min(good) if good else math.inf


def _clean(run: SettingRun, edge: Edge = Edge.LEADING) -> bool:
    """Every analysed half-cycle fired once, latched and (leading edge) held.  A
    trailing-edge switch is turned off on purpose, so its turn-off is not a drop-out."""
    hc = run.half_cycles
    held = edge is Edge.TRAILING or not np.any(hc.early_dropouts)
    return bool(len(hc) and np.all(np.isfinite(hc.firing_angle_deg)) and not np.any(hc.failed_latches)
                and held and not np.any(hc.firings > 1))


# Engineering choice: a half-cycle whose switch current reached the trip level within
# 0.1 % tripped the trailing-edge dimmer's protection (the simulator turns the switch
# off the moment the current reaches it).
TRIP_REACHED = 0.999


def tripped_half_cycles(circuit: Circuit, run: SettingRun) -> int:
    """Analysed half-cycles in which a trailing-edge dimmer's over-current protection
    acted [1] (0 for leading edge, which has none modelled)."""
    d = circuit.dimmer
    if d.edge is not Edge.TRAILING:
        return 0
    return int(np.sum(run.half_cycles.peak_current_a >= TRIP_REACHED * d.trip_current_a))


def _unseen_first(circuit: Circuit, found: dict | None) -> tuple[tuple[str | None, str], ...]:
    """The remedy option for lamps that cannot see the phase (``found``: what
    ``phase_sense.unseen`` found), to lead a remedy's options where it applies."""
    return ((None, phase_sense.remedy(circuit, found)),) if found is not None else ()


def _trip_remedy(circuit: Circuit, found: dict | None) -> str:
    """What to change when the dimmer's protection trips on the lamps' current."""
    return _offer(circuit, *_unseen_first(circuit, found), (None, "fewer capacitor-input lamps on this dimmer"),
                  (None, "a dimmer with a higher rating (and trip level)"))


def protection_summary(circuit: Circuit, runs: Sequence[SettingRun]) -> tuple[str, float] | None:
    """One sentence on the dimmer's protection tripping, and the share of settings at
    which it did [1]; None if it never did."""
    tripping = [(r, tripped_half_cycles(circuit, r)) for r in runs]
    tripping = [(r, n) for r, n in tripping if n]
    if not tripping:
        return None
    r, n = max(tripping, key=lambda x: x[1])
    settings, total = len({x.setting for x, _ in tripping}), len({x.setting for x in runs})
    return (f"The dimmer's over-current protection trips at {settings} of {total} settings "
            f"({n} of {len(r.half_cycles)} half-cycles at {_fmt_setting(r)}): it shuts down on the lamps' current, "
            "so the lamps stay dark or blink"), settings / total


def _alike(run: SettingRun) -> bool:
    """Every analysed half-cycle did the same: as many triggers, failed latches and early
    drop-outs, firing angles within the sweep's stability spread, and each group's light
    within 10 % (as ``loads.simulation`` judges a steady setting).  Such light repeats
    every half-cycle, so it cannot flicker below twice the mains frequency, whatever the
    switch does inside each half-cycle."""
    hc = run.half_cycles
    if len(hc) < 2:
        return True
    fire = hc.firing_angle_deg
    fired = np.isfinite(fire)
    if fired.any() and not fired.all():
        return False
    if fired.all() and float(np.ptp(fire)) > STABLE_ANGLE_DEG:
        return False
    if any(int(np.ptp(a)) != 0 for a in (hc.firings, hc.failed_latches, hc.early_dropouts)):
        return False
    light = np.atleast_2d(np.asarray(hc.light, dtype=float).T)
    mean = np.mean(light, axis=1)
    return bool(np.all(np.ptp(light, axis=1) <= 0.1 * np.maximum(mean, 1e-9)))


def check_latching(circuit: Circuit, runs: Sequence[SettingRun], weights) -> CheckResult:
    """Does the switch latch at each firing, at every setting (from the simulated half-cycles)."""
    if circuit.dimmer.edge is Edge.TRAILING:
        return _na("latching", "A trailing-edge dimmer's transistor switch needs no latching current.",
                   sources=("TEXTBOOK_TRIAC",))
    if not runs:
        return _na("latching", "No sweep was simulated.")
    il = circuit.dimmer.latching_current_a
    bottom = _end_of_travel(runs, weights)
    worst, worst_peak, worst_failed, bad_in_range, bad_at_bottom = None, math.inf, False, [], []
    for r in runs:
        hc = r.half_cycles
        fired = np.isfinite(hc.firing_angle_deg)
        failed = int(np.sum(hc.failed_latches))
        if failed:
            (bad_at_bottom if (r.setting < bottom and r.light_fraction(weights) <= LIT_FRACTION) else bad_in_range).append(r)
        tried = fired | (hc.failed_latches > 0)
        if np.any(tried):
            # the weakest half-cycle: its peak switch current against the latching current
            peak = float(np.min(hc.peak_current_a[tried]))
            key = (failed > 0, -peak)
            if worst is None or key > (worst_failed, -worst_peak):
                worst, worst_peak, worst_failed = r, peak, failed > 0
    if worst is None:
        return _res("latching", Status.FAIL, 0.0, il, "A", -1.0,
                    "The switch never conducted at any setting: the lamps stay dark.",
                    remedy=_offer(circuit, (None, "raise the load with more lamps"), ("no-device", "a load-correction device"),
                                  (None, "use a dimmer made for this load")),
                    sources=("TEXTBOOK_TRIAC",))
    m = _margin(worst_peak, il, upper=False)
    details = {"worst_setting": worst.setting, "direction": worst.direction, "failed_settings":
               [(r.direction, r.setting) for r in bad_in_range + bad_at_bottom]}
    retrying = [r for r in bad_in_range if _alike(r)]
    if bad_in_range and len(retrying) < len(bad_in_range):
        r = max((x for x in bad_in_range if x not in retrying), key=lambda x: int(np.sum(x.half_cycles.failed_latches)))
        n = int(np.sum(r.half_cycles.failed_latches))
        return _res("latching", Status.FAIL, worst_peak, il, "A", min(m, 0.0),
                    f"At {_fmt_setting(r)} the switch failed to latch {n} time(s) in {len(r.half_cycles)} half-cycles, "
                    "so the lamps flicker or flash.",
                    remedy=_offer(circuit, (None, "more lamps"), ("no-device", "a load-correction device"),
                                  (None, "a dimmer with a lower latching current"), lead="raise the current at firing: "),
                    sources=("TEXTBOOK_TRIAC",), details=details)
    if retrying:
        # Engineering choice: a trigger that fails to latch, followed by one that does, alike
        # in every half-cycle, leaves the light steady: marginal latching, a caution.
        r = max(retrying, key=lambda x: int(np.sum(x.half_cycles.failed_latches)))
        return _res("latching", Status.CAUTION, worst_peak, il, "A", min(m, 0.0),
                    f"At {_fmt_setting(r)} the first trigger of every half-cycle fails to latch and a later one "
                    "latches, alike in each half-cycle: the light is steady, but the latching is marginal.",
                    remedy="Raise the current at firing: more lamps, a load-correction device, or a dimmer with a lower latching current.",
                    sources=("TEXTBOOK_TRIAC",), details=details)
    if bad_at_bottom:
        return _res("latching", Status.CAUTION, worst_peak, il, "A", m,
                    f"Below setting {bottom:.2f} the switch does not latch and the lamps stay off: dead travel at the bottom of the knob.",
                    sources=("TEXTBOOK_TRIAC",), details=details)
    return _res("latching", Status.PASS, worst_peak, il, "A", m,
                f"The switch latches at every firing; the weakest half-cycle peaks at "
                f"{check_figure('latching', worst_peak, 'A')} against {check_figure('latching', il, 'A')} needed "
                f"({_fmt_setting(worst)}).",
                sources=("TEXTBOOK_TRIAC",), details=details)


def check_holding(circuit: Circuit, runs: Sequence[SettingRun], weights) -> CheckResult:
    """Does conduction hold to the end of each half-cycle; misfires and re-firing."""
    if circuit.dimmer.edge is Edge.TRAILING:
        return _na("holding", "A trailing-edge dimmer's transistor switch conducts until it is turned off; no holding current.",
                   sources=("TEXTBOOK_TRIAC",))
    if not runs:
        return _na("holding", "No sweep was simulated.")
    limit = 180.0 - EARLY_DROPOUT_DEG
    bottom = _end_of_travel(runs, weights)
    worst, worst_ext, bad_in_range, bad_at_bottom = None, math.inf, [], []
    for r in runs:
        hc = r.half_cycles
        fired = np.isfinite(hc.extinction_angle_deg)
        trouble = int(np.sum(hc.early_dropouts)) + int(np.sum(np.clip(hc.firings - 1, 0, None)))
        if trouble:
            (bad_at_bottom if (r.setting < bottom and r.light_fraction(weights) <= LIT_FRACTION) else bad_in_range).append(r)
        if np.any(fired):
            ext = float(np.min(hc.extinction_angle_deg[fired]))
            if ext < worst_ext:
                worst, worst_ext = r, ext
    if worst is None:
        return _res("holding", Status.FAIL, 0.0, limit, "deg", -1.0,
                    "The switch never conducted at any setting.", sources=("TEXTBOOK_TRIAC",))
    m = _margin(worst_ext, limit, upper=False)
    details = {"worst_setting": worst.setting, "direction": worst.direction,
               "holding_current_a": circuit.dimmer.holding_current_a,
               "failed_settings": [(r.direction, r.setting) for r in bad_in_range + bad_at_bottom]}
    ih_ma = 1000 * circuit.dimmer.holding_current_a
    # flicker is claimed only where the light is unsteady and the half-cycles differ:
    # light that repeats every half-cycle does not flicker (see _alike)
    unsteady = [r for r in bad_in_range if r.point is not None and not r.point.stable and not _alike(r)]
    if bad_in_range:
        pool = unsteady or bad_in_range
        r = max(pool, key=lambda x: int(np.sum(x.half_cycles.early_dropouts)) + int(np.sum(x.half_cycles.firings)))
        hc = r.half_cycles
        drops = int(np.sum(hc.early_dropouts))
        refires = int(np.sum(np.clip(hc.firings - 1, 0, None)))
        again = (" (after re-firing, the switch can drop out again in the same half-cycle)"
                 if drops > len(hc) else "")
        what = (f"At {_fmt_setting(r)} the current falls below the {ih_ma:.0f} mA holding current before the half-cycle "
                f"ends: {drops} early drop-out(s) and {refires} re-firing(s) in {len(hc)} half-cycles{again}; "
                f"conduction ends as early as {check_figure('holding', worst_ext, 'deg')}, where it should last to "
                f"{check_figure('holding', limit, 'deg')}")
        remedy = _offer(circuit, ("no-device", "add a load-correction device"),
                        (None, "add a filament lamp so the current stays above the holding current"),
                        ("leading", "use a trailing-edge dimmer"))
        details["unsteady_settings"] = [(x.direction, x.setting) for x in unsteady]
        if unsteady:
            return _res("holding", Status.FAIL, worst_ext, limit, "deg", min(m, 0.0), what + ": the lamps flicker.",
                        remedy=remedy, sources=("TEXTBOOK_TRIAC",), details=details)
        # Engineering choice: drop-outs and re-firing with the light still steady (the
        # sweep judged every such setting stable) are a caution, not a failure: the
        # lamps look right, but the switch chatters (buzz, interference, stress).
        return _res("holding", Status.CAUTION, worst_ext, limit, "deg", m,
                    what + "; the light stays steady, but the switch chatters (buzz, radio interference).",
                    remedy=remedy, sources=("TEXTBOOK_TRIAC",), details=details)
    if bad_at_bottom:
        return _res("holding", Status.CAUTION, worst_ext, limit, "deg", m,
                    f"Only below setting {bottom:.2f}, where the lamps are out, does conduction drop out early.",
                    sources=("TEXTBOOK_TRIAC",), details=details)
    return _res("holding", Status.PASS, worst_ext, limit, "deg", m,
                f"Conduction holds to within {EARLY_DROPOUT_DEG:.0f}° of the end of every half-cycle "
                f"(earliest end {worst_ext:.0f}° at {_fmt_setting(worst)}).",
                sources=("TEXTBOOK_TRIAC",), details=details)


def check_repetitive_peak(circuit: Circuit, runs: Sequence[SettingRun]) -> CheckResult:
    """Per-half-cycle current peaks and crest factor against the switch's rating."""
    if not runs:
        return _na("repetitive-peak", "No sweep was simulated.")
    d = circuit.dimmer
    limit = d.repetitive_peak_a if d.edge is Edge.LEADING else min(d.repetitive_peak_a, d.trip_current_a)
    worst, peak, crest = None, -1.0, 0.0
    for r in runs:
        hc = r.half_cycles
        p = float(np.max(hc.peak_current_a)) if len(hc) else 0.0
        if p > peak:
            i = r.result.dimmer_a[r.span]
            rms = float(np.sqrt(np.mean(i ** 2)))
            worst, peak, crest = r, p, (p / rms if rms > 0 else 0.0)
    m = _margin(peak, limit)
    what = "repetitive peak rating" if limit == d.repetitive_peak_a else "over-current trip level"
    details = {"worst_setting": worst.setting, "direction": worst.direction, "crest_factor": crest}
    trips = protection_summary(circuit, runs)
    if trips is not None:
        details["protection_trips"] = True
        return _res("repetitive-peak", Status.FAIL, peak, limit, "A", min(m, 0.0),
                    f"{trips[0]}; the current peaks reach its {d.trip_current_a:.1f} A trip level (crest factor {crest:.1f}).",
                    remedy=_trip_remedy(circuit, phase_sense.unseen(circuit, runs)),
                    sources=("TRADE",), safety=True, details=details)
    if peak > limit:
        return _res("repetitive-peak", Status.FAIL, peak, limit, "A", m,
                    f"At {_fmt_setting(worst)} the switch current peaks at {peak:.1f} A every half-cycle "
                    f"(crest factor {crest:.1f}), above its {limit:.0f} A {what}.",
                    remedy=_offer(circuit, *_unseen_first(circuit, phase_sense.unseen(circuit, runs)),
                                  (None, "fewer capacitor-input lamps on this dimmer"),
                                  ("leading", "a trailing-edge dimmer"), ("leading", "a larger choke")),
                    sources=("TRADE",), safety=True, details=details)
    return _res("repetitive-peak", Status.PASS, peak, limit, "A", m,
                f"Half-cycle current peaks reach {peak:.2f} A (crest factor {crest:.1f}) against the {limit:.0f} A {what}.",
                sources=("TRADE",), safety=True, details=details)


def check_inrush(circuit: Circuit, inrush: Sequence[tuple[float, SimResult]]) -> CheckResult:
    """Switch-on surge at the worst switch-on angle: peak and I²t against the surge rating."""
    if not inrush:
        return _na("inrush", "No switch-on run was simulated.", safety=True)
    d = circuit.dimmer
    worst_angle, peak, i2t = 0.0, -1.0, 0.0
    for angle, res in inrush:
        p = float(np.max(res.half_cycles.peak_current_a))
        q = float(np.max(res.half_cycles.i2t_a2s))
        if p > peak:
            worst_angle, peak = angle, p
        i2t = max(i2t, q)
    mp = _margin(peak, d.surge_peak_a)
    mi = _margin(i2t, d.surge_i2t_a2s)
    details = {"switch_on_deg": worst_angle, "i2t_a2s": i2t, "i2t_limit_a2s": d.surge_i2t_a2s,
               "peak_margin": mp, "i2t_margin": mi}
    if mp < 0 or mi < 0:
        return _res("inrush", Status.FAIL, peak, d.surge_peak_a, "A", min(mp, mi),
                    f"Switching on cold at {worst_angle:.0f}° draws {peak:.0f} A peak and {i2t:.1f} A²s, "
                    f"beyond the switch's {d.surge_peak_a:.0f} A / {d.surge_i2t_a2s:.0f} A²s surge rating.",
                    remedy="Fewer lamps per dimmer, lamps with a soft start, or a dimmer with a higher surge rating.",
                    sources=("TRADE",), safety=True, details=details)
    return _res("inrush", Status.PASS, peak, d.surge_peak_a, "A", min(mp, mi),
                f"The worst switch-on surge (cold, at {worst_angle:.0f}°) peaks at {peak:.1f} A and {i2t:.2f} A²s, "
                f"inside the switch's {d.surge_peak_a:.0f} A / {d.surge_i2t_a2s:.0f} A²s rating.",
                sources=("TRADE",), safety=True, details=details)


_ZONE_RANK = {breaker_band.TripZone.HOLDS: 0, breaker_band.TripZone.RIDES_THROUGH: 1,
              breaker_band.TripZone.MAY_TRIP: 2, breaker_band.TripZone.TRIPS: 3}


def worst_surge(circuit: Circuit, inrush: Sequence[tuple[float, SimResult]]):
    """(switch-on angle [deg], SurgeJudgement) of the switch-on run hardest on the
    breaker: each run judged on its worst half-cycle's line I²t with its largest line
    peak (IEC60898_1 band, two criteria; see ``compat.breaker_band``)."""
    best = None
    for angle, res in inrush:
        hc = res.half_cycles
        j = breaker_band.judge_surge(circuit.breaker, peak_current_a=float(np.max(hc.peak_line_current_a)),
                                     i2t_a2s=float(np.max(hc.line_i2t_a2s)), frequency_hz=circuit.supply.frequency_hz)
        key = (_ZONE_RANK[j.zone], j.equivalent_rms_a, j.peak_current_a)
        if best is None or key > best[0]:
            best = (key, angle, j)
    return best[1], best[2]


def check_breaker(circuit: Circuit, inrush: Sequence[tuple[float, SimResult]],
                  max_counts: dict[str, int] | None = None) -> CheckResult:
    """Circuit switch-on surge against the breaker's instantaneous trip band
    (IEC60898_1), by its peak and by its half-cycle I²t (``compat.breaker_band``).

    max_counts: optionally, for each group name, the most units the breaker holds
    (found by search over the simulation, see ``compat.sizing``)."""
    b = circuit.breaker
    if b is None:
        return _na("breaker", "No breaker is given for this circuit.", sources=("IEC60898_1",), safety=True)
    if not inrush:
        return _na("breaker", "No switch-on run was simulated.", sources=("IEC60898_1",), safety=True)
    angle, j = worst_surge(circuit, inrush)
    Z = breaker_band.TripZone
    if b.instantaneous_trip_a is None:
        lo_mult, hi_mult = (x / b.rated_current_a for x in b.band_a())
        name = f"{b.rated_current_a:g} A type {b.curve}"
        band = f"{lo_mult:g} × I_n = {j.no_trip_a:.0f} A rms"
        band_hi = f"{hi_mult:g} × I_n = {j.must_trip_a:.0f} A rms"
    else:
        name = f"{b.rated_current_a:g} A breaker"
        band = band_hi = f"its {j.no_trip_a:.0f} A rms instantaneous trip current"
    surge = (f"The switch-on surge (at {angle:.0f}°) peaks at {j.peak_current_a:.0f} A for about "
             f"{1000 * j.duration_s:.2f} ms, which moves the breaker's release as far as {j.equivalent_rms_a:.1f} A rms would")
    details = {"switch_on_deg": angle, "peak_current_a": j.peak_current_a, "i2t_a2s": j.i2t_a2s,
               "duration_s": j.duration_s, "no_trip_peak_a": j.no_trip_peak_a, "no_trip_a": j.no_trip_a,
               "must_trip_a": j.must_trip_a, "zone": str(j.zone), "max_counts": dict(max_counts or {})}
    counts = ""
    if max_counts:
        counts = " With the other groups as they are, it holds at most " + "; ".join(
            f"{n} × {k}" for k, n in max_counts.items()) + "."
    better = breaker_band.holding_curve(j.peak_current_a, b.rated_current_a, i2t_a2s=j.i2t_a2s,
                                        frequency_hz=circuit.supply.frequency_hz)
    remedy = None
    if not breaker_band.holds(j.zone):
        remedy = "Split the lamps over more circuits or choose lamps with a lower switch-on surge"
        if better is not None and better != b.curve and b.instantaneous_trip_a is None:
            remedy += (f"; a type {better} breaker would hold the surge, if the circuit's fault loop impedance "
                       "allows it under local wiring rules")
        remedy += "." + counts
    if j.zone is Z.TRIPS:
        status, msg = Status.FAIL, f"{surge}, at or above {band_hi}, where a {name} breaker must trip."
    elif j.zone is Z.MAY_TRIP:
        status, msg = Status.FAIL, (f"{surge}, inside the band between {band} and {band_hi} where a {name} breaker "
                                    "may trip: nuisance tripping is likely.")
    elif j.zone is Z.RIDES_THROUGH:
        status, msg = Status.CAUTION, (f"{surge}, below the {band} a {name} breaker must hold; its peak is above "
                                       f"{j.no_trip_peak_a:.0f} A, so a breaker with a quick release may still trip: "
                                       "switch on a few times to confirm.")
    else:
        status, msg = Status.PASS, (f"{surge}; its peak stays below the {j.no_trip_peak_a:.0f} A peak of the "
                                    f"{band} a {name} breaker must hold.")
    return _res("breaker", status, j.equivalent_rms_a, j.no_trip_a, "A", j.margin, msg, remedy=remedy,
                sources=("IEC60898_1",), safety=True, details=details)


# ---------------------------------------------------------------- off state, DC, spike

def capacitive_current_a(capacitance_f: float, voltage_v: float, frequency_hz: float) -> float:
    """Current a capacitor passes at mains: I = 2πfCV [A] (TRADE)."""
    return 2 * math.pi * frequency_hz * capacitance_f * voltage_v


def _flash_period_s(t: np.ndarray, on: np.ndarray) -> float | None:
    rises = np.flatnonzero(on[1:] & ~on[:-1]) + 1
    if rises.size >= 2:
        return float(np.mean(np.diff(t[rises])))
    return None


def check_off_state(circuit: Circuit, off: SimResult | None, analysed_cycles: int | None = None) -> CheckResult:
    """Off-state leakage into the load: glow, periodic flashing (switch never fires)."""
    if off is None:
        return _na("off-state", "No off-state run was simulated.")
    cycles = analysed_cycles or max(1, len(off.half_cycles) // 4)
    sl = tail(off, cycles)
    i = off.load_a[sl]
    leak = float(np.sqrt(np.mean(i ** 2)))
    gl = np.atleast_2d(off.group_light)[:, sl]
    t = off.t_s[sl]
    worst_g, worst_light = 0, -1.0
    for k in range(min(gl.shape[0], len(circuit.loads))):     # lamp groups only, not a correction device
        if float(np.max(gl[k])) > worst_light:
            worst_g, worst_light = k, float(np.max(gl[k]))
    groups = circuit.all_loads
    gname = groups[worst_g].name if worst_g < len(groups) else "load"
    on = gl[worst_g] > OFF_VISIBLE_FRACTION
    lim = OFF_VISIBLE_FRACTION
    details = {"leakage_rms_a": leak, "group": gname,
               "snubber_estimate_a": capacitive_current_a(circuit.dimmer.snubber_capacitance_f, circuit.supply.voltage_v,
                                                          circuit.supply.frequency_hz)}
    m = _margin(worst_light, lim)
    worst_light = round(worst_light, 8)     # a cold filament's 1e-30 is shown as 0
    if not np.any(on):
        return _res("off-state", Status.PASS, 100 * worst_light, 100 * lim, "%", m,
                    f"With the dimmer off, {1000 * leak:.1f} mA leaks through the lamps and none of them lights.",
                    details=details, sources=("TRADE",))
    share_on = float(np.mean(on))
    period = _flash_period_s(t, on)
    details["flash_period_s"] = period
    remedy = _offer(circuit, ("no-device", "fit a load-correction device across the lamps"),
                    ("two-wire", "use a dimmer with a neutral connection"))
    if remedy is None:
        remedy = "Fit a larger load-correction device, or a dimmer with less off-state leakage (a smaller snubber)."
    if share_on > 0.5 and (period is None or period < 2.5 / off.frequency_hz):
        return _res("off-state", Status.CAUTION, 100 * worst_light, 100 * lim, "%", m,
                    f"With the dimmer off, {1000 * leak:.1f} mA leaks through the lamps and {gname} glows "
                    f"at {100 * worst_light:.2f} % of full.",
                    remedy=remedy, details=details, sources=("TRADE",))
    # Engineering choice: flashes faster than 10 a second run together for the eye
    # (a flickering glow); slower ones are seen one by one.
    if period is not None and period < 0.1:
        what = (f"lights in a short pulse {1 / period:.0f} times a second, seen as a faint flickering glow "
                f"({100 * worst_light:.2f} % of full at its brightest)")
    else:
        what = "charges up and flashes " + (f"about every {period:.2f} s" if period is not None
                                            else f"at least once in {t[-1] - t[0] + 1 / off.frequency_hz:.1f} s")
    return _res("off-state", Status.FAIL, 100 * worst_light, 100 * lim, "%", m,
                f"With the dimmer off, {1000 * leak:.1f} mA leaks into {gname}, which {what}.",
                remedy=remedy, details=details, sources=("TRADE",))


# Engineering choice: a transformer's DC current flows in its primary alone, taken as
# half of the referred winding resistance (copper split evenly between the windings).
PRIMARY_SHARE_OF_WINDING_R = 0.5


def transformer_primary_resistance_ohm(tr: MagneticTransformer) -> float:
    """DC resistance of one transformer's primary [Ω], from its regulation figure."""
    z_rated = tr.rated_voltage_v ** 2 / tr.rated_va
    return PRIMARY_SHARE_OF_WINDING_R * tr.winding_resistance_pct / 100.0 * z_rated


def transformer_dc_headroom_a(tr: MagneticTransformer, flux_fraction: float = 1.0) -> float:
    """DC magnetising current one transformer takes before its core reaches the
    saturation knee [A]: (knee flux − AC flux amplitude)/rated flux × the magnetising
    current peak, the magnetising branch being linear below the knee.  flux_fraction:
    the AC flux amplitude at the setting judged, as a fraction of that at rated voltage
    (1 at full; a dimmed transformer swings less flux, leaving more room for DC) [1]."""
    i_rated = tr.rated_va / tr.rated_voltage_v
    i_mag_peak = math.sqrt(2.0) * tr.magnetising_current_pct / 100.0 * i_rated
    return (tr.saturation_flux_ratio - min(max(flux_fraction, 0.0), 1.0)) * i_mag_peak


def switched_flux_fraction(run: SettingRun) -> float:
    """The largest AC flux amplitude the conduction windows give, as a fraction of the
    rated one [1]: a half-cycle conducting from α to β applies V̂/ω·(cos α − cos β) of
    volt-seconds, against 2·V̂/ω for a whole half-cycle of sine (flux is the integral of
    the applied voltage; the same windows as ``switched_dc_voltage_v``)."""
    hc = run.half_cycles
    fire = np.asarray(hc.firing_angle_deg, dtype=float)
    ext = np.asarray(hc.extinction_angle_deg, dtype=float)
    ok = np.isfinite(fire)
    if not np.any(ok):
        return 0.0
    b = np.where(np.isfinite(ext), ext, 180.0)
    swing = (np.cos(np.radians(fire[ok])) - np.cos(np.radians(b[ok]))) / 2.0
    return float(min(max(np.max(swing), 0.0), 1.0))


def switched_dc_voltage_v(circuit: Circuit, run: SettingRun) -> float:
    """The DC voltage the dimmer's conduction pattern imposes on the load [V]: the mean,
    over the analysed whole cycles, of the supply EMF inside the simulated conduction
    windows (firing to extinction angle of each half-cycle, signed by its polarity):
    V_dc = V̂·Σ ±(cos α − cos β) / (2π·cycles).  Windows that mirror each other cancel.
    This is what persists: the mean load voltage of a few cycles in a sweep also holds
    the flux of an iron core relaxing after the setting changed (it reverses with the
    sweep direction and dies away with the magnetising time constant).  A conduction
    still running at the end of the record closes with its cycle dropped; one carried
    into the next half-cycle without an extinction of its own ends at that one's firing
    (or, with none, its own firing angle 180° later)."""
    hc = run.half_cycles
    n = (len(hc) // 2) * 2
    fire = np.asarray(hc.firing_angle_deg[len(hc) - n:], dtype=float)
    ext = np.asarray(hc.extinction_angle_deg[len(hc) - n:], dtype=float)
    pol = np.asarray(hc.polarity[len(hc) - n:], dtype=float)
    if n >= 2 and np.isfinite(fire[-1]) and not np.isfinite(ext[-1]):
        n -= 2
    if n < 2:
        return 0.0
    total = 0.0
    for j in range(n):
        if not np.isfinite(fire[j]):
            continue
        if np.isfinite(ext[j]):
            b = ext[j]
        elif j + 1 < len(fire) and np.isfinite(fire[j + 1]):
            b = 180.0 + fire[j + 1]
        else:
            b = 180.0 + fire[j]
        total += pol[j] * (math.cos(math.radians(fire[j])) - math.cos(math.radians(b)))
    return float(circuit.supply.peak_v * total / (2.0 * math.pi * (n // 2)))


def fires_symmetrically(dimmer: Dimmer) -> bool:
    """By its build, does the dimmer fire both polarities alike: a trailing-edge switch,
    a phase controller whose gate drive lasts until the switch latches, or a trigger
    diode without asymmetry."""
    if dimmer.edge is Edge.TRAILING:
        return True
    if dimmer.control is Control.PHASE:
        return dimmer.gate_drive is not GateDrive.SINGLE_PULSE
    return dimmer.rc_diac is None or dimmer.rc_diac.asymmetry_v == 0.0


def _dc_remedy(dimmer: Dimmer) -> str:
    """The remedy for DC in a transformer, worded by its cause in this dimmer."""
    if dimmer.edge is Edge.LEADING and dimmer.control is Control.RC_DIAC and not fires_symmetrically(dimmer):
        return ("Its trigger diode breaks over at different voltages in the two polarities: use a dimmer with "
                "symmetric firing made for iron-core transformers, or electronic transformers.")
    if dimmer.edge is Edge.LEADING and dimmer.control is Control.PHASE and not fires_symmetrically(dimmer):
        return ("Its single short gate pulse can end while the previous half-cycle's current still flows, leaving "
                "one polarity unfired: use a dimmer that drives the gate until the switch latches (as those made "
                "for iron-core transformers do), or electronic transformers.")
    return ("The dimmer fires both polarities alike, so the DC comes from conduction that differs between them "
            "(see the latching and holding checks): cure that, or use electronic transformers.")


def check_dc_offset(circuit: Circuit, runs: Sequence[SettingRun]) -> CheckResult:
    """Firing asymmetry: DC in the line current and saturation of iron-core transformers.

    The DC voltage the dimmer leaves on the load is the one its conduction pattern
    imposes (``switched_dc_voltage_v``, from the simulated firing and extinction angles).
    In a transformer it walks the flux until the primary carries the DC current
    V_dc/R_primary — with a magnetising time constant of seconds, longer than the
    simulated span — so the settled DC current is computed from V_dc and compared with
    the current that takes the core to its saturation knee.  Magnetising peaks already
    visible in the simulation (peak asymmetry between polarities) are reported as well;
    the mean load voltage measured over the analysed cycles is kept in the details."""
    if not runs:
        return _na("dc-offset", "No sweep was simulated.", safety=True)
    trs = [g for g in circuit.loads if isinstance(g, MagneticTransformer)]
    # A change of setting leaves an iron core's flux relaxing for about a second (L_m/R),
    # and while it does the firing itself differs slightly between polarities; that
    # part of the DC reverses with the direction the knob moved, so where a setting was
    # visited both ways the DC that persists is the mean of the two (engineering
    # choice: the first-order response to a step up and a step down are opposite).
    measured = [(r, switched_dc_voltage_v(circuit, r)) for r in runs]
    by_setting: dict[float, list[float]] = {}
    for r, v in measured:
        by_setting.setdefault(round(r.setting, 9), []).append(v)
    worst = None
    for r, v_measured in measured:
        hc = r.half_cycles
        n2 = (len(hc) // 2) * 2
        if n2 == 0 or not np.any(np.isfinite(hc.firing_angle_deg)):
            continue
        both = by_setting[round(r.setting, 9)]
        v_dc = float(np.mean(both)) if len(both) > 1 else v_measured
        i_dc = float(np.mean(hc.mean_current_a[len(hc) - n2:]))
        pos = hc.polarity[len(hc) - n2:] > 0
        pk = hc.peak_line_current_a[len(hc) - n2:]
        ppos, pneg = float(np.max(pk[pos], initial=0.0)), float(np.max(pk[~pos], initial=0.0))
        lo_, hi_ = min(ppos, pneg), max(ppos, pneg)
        asym = 100.0 * (hi_ / lo_ - 1.0) if lo_ > 0 else 0.0
        flux = switched_flux_fraction(r)
        if trs:
            ratio = max(abs(v_dc) / transformer_primary_resistance_ohm(g) / transformer_dc_headroom_a(g, flux)
                        for g in trs)
        else:
            ratio = 0.0
        key = (ratio, asym)
        if worst is None or key > worst[0]:
            worst = (key, r, v_dc, i_dc, asym, flux)
    if worst is None:
        return _na("dc-offset", "No half-cycle conducted.", safety=True)
    (ratio, asym), r, v_dc, i_dc, asym, flux = worst
    details = {"worst_setting": r.setting, "direction": r.direction, "dc_voltage_v": v_dc, "dc_current_a": i_dc,
               "peak_asymmetry_pct": asym, "mean_load_voltage_v": float(np.mean(r.result.load_v[r.span])),
               "fires_symmetrically": fires_symmetrically(circuit.dimmer)}
    if not trs:
        return _res("dc-offset", Status.NOT_APPLICABLE, None, None, "V", None,
                    f"No iron-core transformer on the circuit; the {abs(v_dc):.2f} V DC the dimmer leaves does no harm to these lamps.",
                    sources=("TRADE",), safety=True, details=details)
    g = max(trs, key=lambda g: abs(v_dc) / transformer_primary_resistance_ohm(g) / transformer_dc_headroom_a(g, flux))
    i_set = abs(v_dc) / transformer_primary_resistance_ohm(g)
    head = transformer_dc_headroom_a(g, flux)
    details.update({"settled_dc_a": i_set, "headroom_a": head, "transformer": g.name, "flux_fraction": flux})
    m = _margin(i_set, head)
    base = (f"At {_fmt_setting(r)} the dimmer leaves {abs(v_dc):.2f} V DC on the load, which settles to "
            f"{1000 * i_set:.0f} mA DC in {g.name}'s primary against {1000 * head:.0f} mA that takes its core to saturation")
    if ratio > 1.0 or asym > DC_ASYMMETRY_FAIL_PCT:
        return _res("dc-offset", Status.FAIL, i_set, head, "A", m,
                    base + ": the core saturates, hums and overheats.",
                    remedy=_dc_remedy(circuit.dimmer),
                    sources=("TRADE",), safety=True, details=details)
    if ratio > 0.5 or asym > DC_ASYMMETRY_CAUTION_PCT:
        return _res("dc-offset", Status.CAUTION, i_set, head, "A", m, base + ": close to saturation; listen for hum.",
                    remedy=_dc_remedy(circuit.dimmer),
                    sources=("TRADE",), safety=True, details=details)
    return _res("dc-offset", Status.PASS, i_set, head, "A", m, base + "; the core stays out of saturation.",
                sources=("TRADE",), safety=True, details=details)


def clamp_power_w(circuit: Circuit, run: SettingRun) -> float:
    """Mean power absorbed by the dimmer's clamp over the analysed half-cycles [W]."""
    hc = run.half_cycles
    if not len(hc):
        return 0.0
    return float(np.sum(hc.clamp_energy_j)) * 2.0 * circuit.supply.frequency_hz / len(hc)


def turn_off_power_w(circuit: Circuit, run: SettingRun) -> float:
    """Mean heat left in a trailing-edge switch by its turn-offs over the analysed
    half-cycles [W] (the energy its voltage slope takes from the circuit)."""
    hc = run.half_cycles
    if not len(hc):
        return 0.0
    return float(np.sum(hc.turn_off_energy_j)) * 2.0 * circuit.supply.frequency_hz / len(hc)


def check_turn_off_surge(circuit: Circuit, runs: Sequence[SettingRun]) -> CheckResult:
    """Trailing edge interrupting a current: what reaches the clamp.  The switch turns off
    at a controlled voltage slope and takes the line inductance's energy as heat (counted
    in ``dissipation``); only an inductance whose current the slope cannot stop before the
    clamp voltage (an iron-core transformer's) drives the clamp, every half-cycle.  Fails
    where the clamp absorbs more than a varistor's mean rating, or where the sampled
    voltage sits at the clamp (it conducts for a sample interval or more); a caution where
    it absorbs less, or the voltage comes within 10 % of the clamp."""
    d = circuit.dimmer
    if d.edge is Edge.LEADING:
        return _na("turn-off-surge", "A leading-edge switch turns off at current zero and interrupts no current.",
                   sources=("TEXTBOOK_TRIAC",), safety=True)
    if not runs:
        return _na("turn-off-surge", "No sweep was simulated.", safety=True)
    worst, peak = max(((r, float(np.max(np.abs(r.result.dimmer_v[r.span])))) for r in runs), key=lambda x: x[1])
    w_clamp, p_clamp = max(((r, clamp_power_w(circuit, r)) for r in runs), key=lambda x: x[1])
    clamp = d.clamp_voltage_v
    m = _margin(peak, clamp)
    details = {"worst_setting": worst.setting, "direction": worst.direction, "mains_peak_v": circuit.supply.peak_v,
               "clamp_power_w": p_clamp, "clamp_power_limit_w": CLAMP_MEAN_POWER_W}
    inductive = any(load_character(g, circuit.supply.frequency_hz) == "inductive" for g in circuit.loads)
    remedy = ("Use a leading-edge dimmer for iron-core transformer loads." if inductive else
              _offer(circuit, *_unseen_first(circuit, phase_sense.unseen(circuit, runs)),
                     (None, "fewer capacitor-input lamps on this dimmer"),
                     lead="The current cut is the lamps' own surge in the wiring's inductance; the cure is "))
    absorbed = (f"; its clamp absorbs {p_clamp:.2f} W on average at {_fmt_setting(w_clamp)}, against the "
                f"{CLAMP_MEAN_POWER_W:.2f} W a varistor of this kind is rated for" if p_clamp > 0 else "")
    if peak >= CLAMP_REACHED * clamp or p_clamp > CLAMP_MEAN_POWER_W:
        worst = worst if peak >= CLAMP_REACHED * clamp else w_clamp
        return _res("turn-off-surge", Status.FAIL, max(peak, CLAMP_REACHED * clamp), clamp, "V", min(m, 0.0),
                    f"At {_fmt_setting(worst)} cutting the load current drives the dimmer into its "
                    f"{clamp:.0f} V clamp every half-cycle{absorbed}.",
                    remedy=remedy,
                    sources=("TRADE",), safety=True, details=details)
    if p_clamp > 0:
        return _res("turn-off-surge", Status.CAUTION, max(peak, CLAMP_REACHED * clamp), clamp, "V", min(m, 0.0),
                    f"At {_fmt_setting(w_clamp)} the turn-off reaches the dimmer's {clamp:.0f} V clamp{absorbed}.",
                    remedy=remedy, sources=("TRADE",), safety=True, details=details)
    status = Status.CAUTION if peak > 0.9 * clamp else Status.PASS
    return _res("turn-off-surge", status, peak, clamp, "V", m,
                f"The dimmer voltage peaks at {peak:.0f} V against its {clamp:.0f} V clamp.",
                sources=("TRADE",), safety=True, details=details)


# ---------------------------------------------------------------- what the customer sees

def dimming_curve(runs: Sequence[SettingRun], weights) -> list[dict]:
    """Light, perceived brightness (square law) and L* per setting, in sweep order."""
    rows = []
    for r in runs:
        lf = r.light_fraction(weights)
        rows.append({"direction": r.direction, "setting": r.setting, "light_fraction": lf,
                     "perceived": perceived_brightness(lf), "lightness": cie_lightness(lf),
                     "stable": bool(r.point.stable) if r.point is not None else _clean(r)})
    return rows


def check_dimming_range(circuit: Circuit, down: Sequence[SettingRun], up: Sequence[SettingRun], weights,
                        bottom: Sequence[SettingRun] = ()) -> CheckResult:
    """Lowest and highest stable light, dead travel, drop-out and pop-on (LRC_ASSIST_DIMMING).

    The lowest light is judged against 5 %, or against the light a filament lamp gives
    at the bottom of this dimmer's travel where that is higher (``DIM_FLOOR_HEADROOM``;
    ``compat.reference_lamp.dimmer_floor_light``): a filament lamp on a dimmer is the
    trade's reference, so the range the dimmer gives it is the dimmer's own."""
    if not down:
        return _na("dimming-range", "No sweep was simulated.")
    curve_d = dimming_curve(down, weights)
    curve_u = dimming_curve(up, weights)
    # bottom: settings between the grid's last lit one and the drop-out, found going down
    # (they count for the lowest steady light, not for the curve's rows)
    stable_lit = [row for row in curve_d + curve_u + dimming_curve(bottom, weights)
                  if row["stable"] and row["light_fraction"] > LIT_FRACTION]
    details = {"down": curve_d, "up": curve_u}
    swept = list(down) + list(up)
    trips = protection_summary(circuit, swept)
    if trips is not None:
        details["protection_trips"] = True
    unseen = details["phase_unseen"] = phase_sense.unseen(circuit, swept)
    why = (" " + phase_sense.sentence(unseen) + ".") if unseen is not None else ""
    # Engineering choice: protection acting at half the settings or more leaves no
    # dimming range worth the name; at fewer, the range is judged on the rest, with a caution.
    if trips is not None and trips[1] >= 0.5:
        return _res("dimming-range", Status.FAIL, 0.0, 100 * DIM_TARGET_LOW, "%", None,
                    trips[0] + "; there is no usable dimming range." + why,
                    remedy=_trip_remedy(circuit, unseen),
                    sources=("LRC_ASSIST_DIMMING",), details=details)
    if not stable_lit:
        cure = ("See latching and holding: the dimmer does not work with this load." if circuit.dimmer.edge is Edge.LEADING
                else "The lamps do not run steadily on this dimmer at any setting: try a leading-edge dimmer or other lamps.")
        return _res("dimming-range", Status.FAIL, 0.0, 100 * DIM_TARGET_LOW, "%", None,
                    "There is no setting at which the lamps give stable light." + why,
                    remedy=cure, sources=("LRC_ASSIST_DIMMING",), details=details)
    low = min(stable_lit, key=lambda row: row["light_fraction"])
    high = max(stable_lit, key=lambda row: row["light_fraction"])
    # drop-out: the first setting in the down sweep at which the lamps go dark after being lit
    drop = next((row["setting"] for prev, row in zip(curve_d, curve_d[1:])
                 if prev["light_fraction"] > LIT_FRACTION >= row["light_fraction"]), None)
    # pop-on: the first setting in the up sweep at which light appears, and how much
    pop = next((row for prev, row in zip(curve_u, curve_u[1:])
                if prev["light_fraction"] <= LIT_FRACTION < row["light_fraction"]), None)
    settings = sorted({row["setting"] for row in curve_d})
    dark = [row["setting"] for row in curve_d if row["light_fraction"] <= LIT_FRACTION]
    span = (max(settings) - min(settings)) if len(settings) > 1 else 1.0
    step = span / (len(settings) - 1) if len(settings) > 1 else 0.0
    dead = (max(dark) - min(settings) + step / 2) / span if dark and span > 0 else 0.0
    hyst = (pop["setting"] - drop) if (pop is not None and drop is not None) else None
    details.update({"lowest_stable_light": low["light_fraction"], "lowest_stable_setting": low["setting"],
                    "highest_stable_light": high["light_fraction"], "drop_out_setting": drop,
                    "pop_on_setting": pop["setting"] if pop else None,
                    "pop_on_light": pop["light_fraction"] if pop else None,
                    "hysteresis": hyst, "dead_travel": dead})
    parts = [f"stable light from {100 * low['light_fraction']:.1f} % (it looks like {100 * low['perceived']:.0f} %) "
             f"to {100 * high['light_fraction']:.0f} % of full"]
    if drop is not None:
        parts.append(f"go out at {setting_text(drop, 'down')}")
    if pop is not None:
        parts.append(f"come back on at {setting_text(pop['setting'], 'up')} with {100 * pop['light_fraction']:.1f} % light")
    if dead > 0:
        parts.append(f"{100 * dead:.0f} % of the knob travel gives no light")
    msg = "The lamps give " + "; ".join(parts) + "."
    lowv = low["light_fraction"]
    # The dimmer's own floor: what a filament lamp gives at the bottom of its travel.
    # Lamps that dim as far as that are judged to dim as well as this dimmer allows.
    floor = reference_lamp.dimmer_floor_light(circuit)
    target = max(DIM_TARGET_LOW, DIM_FLOOR_HEADROOM * floor)
    details.update({"dimmer_floor_light": floor, "low_target": target})
    if floor > DIM_TARGET_LOW and lowv <= target:
        msg = (msg[:-1] + f"; that is as far as this dimmer goes: at the end of its travel a filament lamp "
               f"gives {100 * floor:.1f} % of its light.")
    m = _margin(lowv, target)
    problems = []
    if trips is not None:
        msg = trips[0] + ". Elsewhere " + msg[0].lower() + msg[1:]
        problems.append("the protection trips at some settings")
    if lowv > target:
        problems.append(f"they do not dim as far as a filament lamp on this dimmer ({100 * floor:.1f} %)"
                        if target > DIM_TARGET_LOW else "they do not dim to 5 %")
    if high["light_fraction"] < DIM_TARGET_HIGH:
        problems.append("they do not reach 90 % of full light")
    if problems:
        return _res("dimming-range", Status.CAUTION, 100 * lowv, 100 * target, "%", m,
                    msg[:-1] + "; " + " and ".join(problems) + "." + why,
                    remedy=(phase_sense.remedy(circuit, unseen).capitalize() + ", or a dimmer matched to these lamps "
                            "(edge, minimum load), usually widen the range." if unseen is not None else
                            "A dimmer matched to these lamps (edge, minimum load) usually widens the range."),
                    sources=("LRC_ASSIST_DIMMING", "IES_HANDBOOK"), details=details)
    return _res("dimming-range", Status.PASS, 100 * lowv, 100 * target, "%", m, msg + why,
                sources=("LRC_ASSIST_DIMMING", "IES_HANDBOOK"), details=details)


def check_flicker(circuit: Circuit, runs: Sequence[SettingRun], weights) -> CheckResult:
    """Light modulation per setting, judged on the light.

    Visible flicker (fail): a component below 90 Hz beyond IEEE 1789's low-risk line —
    at mains frequency and below, which only a switch that does not fire alike in every
    half-cycle produces (a misfire pattern, or one polarity weaker).  A short-term
    perceptibility measure (IEC TR 61547-1's PstLM) would judge that better; it is beyond
    this tool.  Stroboscopic effect (caution): the CIE TN 006 SVM above both its
    visibility threshold (1) and the SVM of a filament lamp giving the same light on the
    same supply (``compat.reference_lamp``), since the trade accepts a dimmed filament
    lamp's light at every setting (common practice, no source).  IEEE 1789's lines at
    100/120 Hz and above are reported, not judged: a dimmed filament lamp crosses them."""
    lit = _lit_settings(runs, weights)
    if not lit:
        return _na("flicker", "The lamps give no light at any setting.", sources=("IEEE1789_2015",))
    # The first lit setting of the up sweep is the pop-on from the lamp-out state: its
    # light is still rising through the analysed span (a start-up, judged by
    # dimming-range), so it is left out here (engineering choice).
    up_lit = [r for r in lit if r.direction == "up"]
    pop_on = min(up_lit, key=lambda r: r.setting) if up_lit else None
    per = []
    for r in lit:
        if r is pop_on and len(lit) > 1:
            continue
        x = r.light(weights)
        half = samples_per_cycle(r.result) // 2
        # A switch that fired regularly in every analysed half-cycle cannot modulate the
        # light below the mains frequency; slower content there is a lamp still
        # settling after the change of setting (engineering choice).
        fmin = 0.99 * r.result.frequency_hz if (_clean(r, circuit.dimmer.edge) or _alike(r)) else 0.0
        a = r.memo(("flicker", fmin, x.tobytes()),
                   lambda: flicker.assess(x, r.sample_rate_hz, drift_period_samples=half, min_frequency_hz=fmin))
        ref = reference_lamp.filament_svm(circuit, float(np.mean(x)))
        per.append((r, a, ref))
    worst_r, worst, _ = max(per, key=lambda p: p[1].low_risk_ratio)
    lim = flicker.ieee1789_low_risk_pct(worst.deciding_hz) if worst.deciding_hz > 0 else math.inf
    value = worst.low_risk_ratio * lim if math.isfinite(lim) else worst.percent_flicker
    s_r, s_a, s_ref = max(per, key=lambda p: p[1].svm / max(flicker.SVM_VISIBLE, p[2]))
    s_lim = max(flicker.SVM_VISIBLE, s_ref)
    ref_w = reference_lamp.reference_power_w(circuit)
    details = {"per_setting": [(r.direction, r.setting, a.percent_flicker, a.flicker_index, a.dominant_hz, str(a.band),
                                a.svm, ref) for r, a, ref in per],
               "worst_setting": worst_r.setting, "direction": worst_r.direction,
               "percent_flicker": worst.percent_flicker, "flicker_index": worst.flicker_index,
               "dominant_hz": worst.dominant_hz, "deciding_hz": worst.deciding_hz,
               "svm": s_a.svm, "svm_setting": s_r.setting, "svm_direction": s_r.direction,
               "svm_filament": s_ref, "reference_filament_w": ref_w}
    src = ("IEEE1789_2015", "IES_HANDBOOK", "CIE_TN006_2016")
    low_f = [(r, a) for r, a, _ in per if a.band is flicker.RiskBand.ELEVATED and a.deciding_hz < 90.0]
    if low_f:
        r, a = max(low_f, key=lambda p: p[1].low_risk_ratio)
        return _res("flicker", Status.FAIL, value, lim, "%", 1.0 - worst.low_risk_ratio,
                    f"Visible flicker: at {_fmt_setting(r)} the light swings at {a.deciding_hz:.0f} Hz, "
                    "beyond IEEE 1789's low-risk line.",
                    remedy=_offer(circuit, ("no-device", "fit a load-correction device across the lamps"),
                                  (None, "add a filament lamp"), ("leading", "use a trailing-edge dimmer"),
                                  lead="the switch fires unevenly from one half-cycle to the next; to steady it, "),
                    sources=src, details=details)
    desc = (f"at {_fmt_setting(s_r)} the light modulates {s_a.percent_flicker:.0f} % "
            f"(mostly at {s_a.dominant_hz:.0f} Hz), SVM {s_a.svm:.2f}")
    if s_a.svm > s_lim:
        return _res("flicker", Status.CAUTION, s_a.svm, s_lim, "SVM", 1.0 - s_a.svm / s_lim,
                    f"Stroboscopic effect: {desc}, above both the visibility threshold (1) and the {s_ref:.2f} of a "
                    f"{ref_w:.0f} W filament lamp giving the same light; moving things may look jerky, "
                    "but the light does not flicker visibly.",
                    sources=src, details=details)
    return _res("flicker", Status.PASS, s_a.svm, s_lim, "SVM", 1.0 - s_a.svm / s_lim,
                f"The light does not flicker visibly at any lit setting; its stroboscopic visibility is at most "
                f"that of a {ref_w:.0f} W filament lamp giving the same light, or below the threshold ({desc}).",
                sources=src, details=details)


def regular_runs(runs: Sequence[SettingRun], edge: Edge = Edge.LEADING) -> list[SettingRun]:
    """Settings at which the switch fired regularly in every analysed half-cycle (the
    periodic operation a harmonic measurement assumes); all runs that conducted if none."""
    clean = [r for r in runs if _clean(r, edge)]
    return clean or [r for r in runs if np.any(np.isfinite(r.half_cycles.firing_angle_deg))]


def check_harmonics(circuit: Circuit, runs: Sequence[SettingRun]) -> CheckResult:
    """Line-current harmonics at the worst setting against the applicable IEC 61000-3-2
    table.  Judged at settings with regular firing: a misfiring current is not periodic
    and its FFT over a few cycles is not a harmonic measurement (engineering choice)."""
    ok, why = harmonics.applicability(circuit.supply.voltage_v)
    if not ok:
        return _na("harmonics", why + ".", sources=("IEC61000_3_2",))
    judged = regular_runs(runs, circuit.dimmer.edge)
    if not judged:
        return _na("harmonics", "The switch did not conduct at any setting.", sources=("IEC61000_3_2",))
    cls, cls_why = harmonics.applicable_class()
    best = None
    for r in judged:
        x = r.result.load_a[r.span]
        h = harmonics.harmonic_rms_a(x, cycles=r.analysed_cycles)
        j = harmonics.judge(h, cls)
        if best is None or j.ratio > best[1].ratio:
            best = (r, j)
    r, j = best
    details = {"class": str(cls), "why": cls_why, "worst_setting": r.setting, "direction": r.direction,
               "order": j.worst_order, "regular_firing": _clean(r, circuit.dimmer.edge)}
    # IEC 61000-3-2 sets emission limits for products as tested, not for an installation:
    # exceeding them with this load is a caution for the practitioner, not a failure of
    # the circuit (engineering choice)
    status = Status.CAUTION if j.ratio > 1.0 else Status.PASS
    verb = "exceeds" if status is Status.CAUTION else "is within"
    return _res("harmonics", status, j.value_a, j.limit_a, "A", 1.0 - j.ratio,
                f"The worst harmonic, the {j.worst_order}{_ordinal(j.worst_order)} at {_fmt_setting(r)}, is "
                f"{check_figure('harmonics', j.value_a, 'A')} and {verb} the class {cls} limit of "
                f"{check_figure('harmonics', j.limit_a, 'A')}"
                + (" (a product emission limit; this load would not pass it)." if status is Status.CAUTION else "."),
                remedy=("Split the load over more dimmers or use lamps with power-factor correction."
                        if status is Status.CAUTION else None),
                sources=("IEC61000_3_2",), details=details)


def _ordinal(n: int) -> str:
    return "th" if 10 <= n % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")


def switch_dissipation_w(circuit: Circuit, switch_a: np.ndarray) -> float:
    """Mean switch loss V_T·|i| + r_T·i² over whole cycles of the switch current [W]."""
    d = circuit.dimmer
    i = np.asarray(switch_a, dtype=float)
    return float(np.mean(d.on_state_voltage_v * np.abs(i) + d.on_state_resistance_ohm * i ** 2))


def dimmer_heat_w(circuit: Circuit, run: SettingRun) -> float:
    """Mean heat in the dimmer at one setting [W]: the switch's conduction loss, the heat
    its trailing-edge turn-offs leave in it and what its clamp absorbs."""
    return (switch_dissipation_w(circuit, run.result.dimmer_a[run.span]) + turn_off_power_w(circuit, run)
            + clamp_power_w(circuit, run))


def check_dissipation(circuit: Circuit, runs: Sequence[SettingRun]) -> CheckResult:
    """Heat in the dimmer (switch conduction loss, trailing-edge turn-off and clamp
    energy) against its allowance (TRADE)."""
    if not runs:
        return _na("dissipation", "No sweep was simulated.", safety=True)
    d = circuit.dimmer
    allowance = DISSIPATION_SHARE * d.rated_load_w * derating.derating_factor(d)
    worst, p = max(((r, dimmer_heat_w(circuit, r)) for r in runs), key=lambda x: x[1])
    m = _margin(p, allowance)
    details = {"worst_setting": worst.setting, "direction": worst.direction,
               "turn_off_w": turn_off_power_w(circuit, worst), "clamp_w": clamp_power_w(circuit, worst)}
    if p > allowance:
        return _res("dissipation", Status.FAIL, p, allowance, "W", m,
                    f"The switch dissipates {p:.1f} W at {_fmt_setting(worst)}"
                    + (f" ({details['turn_off_w'] + details['clamp_w']:.1f} W of it from cutting the current at each "
                       "turn-off)" if details["turn_off_w"] + details["clamp_w"] > 0.05 * p else "")
                    + f", more than the {allowance:.1f} W the dimmer box is built to shed.",
                    remedy=_offer(circuit, *_unseen_first(circuit, phase_sense.unseen(circuit, runs)),
                                  (None, "a dimmer with a higher rating"),
                                  (None, "less load"), lead="Use "),
                    sources=("TRADE",), safety=True, details=details)
    return _res("dissipation", Status.PASS, p, allowance, "W", m,
                f"The switch dissipates at most {check_figure('dissipation', p, 'W')} ({_fmt_setting(worst)}) against "
                f"an allowance of {check_figure('dissipation', allowance, 'W')}.",
                sources=("TRADE",), safety=True, details=details)
