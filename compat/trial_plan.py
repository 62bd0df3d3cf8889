"""A short trial on site, for a verdict that turns on an input nobody can read.

``trial_plan`` turns a report (and, from ``compat.diagnose``, the readings that tell
the likely causes apart) into numbered steps an installer can print: what to connect
(one lamp, then the full group, and a trial filament lamp), which knob positions in
which order (up from off, then down from full), what to watch or measure, and which
result means what.  For a late start (pops-on, dead travel) it compares the two
directions and a trial filament lamp in the lamps' place: the dimmer's timing network or
end stop against lamps that need more conduction to start.  The steps come from the checks that fail or caution, with their
figures; nothing here simulates.
"""
from __future__ import annotations

from collections.abc import Sequence

from compat import derating
from compat.report import Report, Status
from loads.circuit import Circuit
from loads.dimmer import Edge
from loads.driver import ElectronicDriver
from loads.transformer import MagneticTransformer

# Trial filament lamps an electrician can buy anywhere (common practice, no source);
# the largest that the dimmer's derated rating still allows on top of the load is used.
TRIAL_LAMPS_W = (60.0, 40.0, 25.0)
# The checks whose outcome a trial on site can show, in the order the trial reaches them.
SWITCH_CHECKS = ("minimum-load", "latching", "holding", "dimming-range", "flicker")
# The symptoms of a late start (compat.symptoms names), for which the trial compares the
# two directions and a trial filament lamp in place of the lamps.
LATE_START_SYMPTOMS = ("pops-on", "dead-travel")


def trial_lamp_w(circuit: Circuit) -> float | None:
    """The largest trial filament lamp (``TRIAL_LAMPS_W``) the dimmer's derated rating
    allows on top of the present load [W]; None if none fits."""
    use = derating.rating_use(circuit.dimmer, circuit.loads)
    room = circuit.dimmer.rated_load_w * use.factor * (1.0 - use.utilisation)
    return next((w for w in TRIAL_LAMPS_W if w <= room), None)


def _setting_of(check) -> float | None:
    d = check.details
    for key in ("usable_from_setting", "worst_setting"):
        if d.get(key) is not None:
            return float(d[key])
    fs = d.get("failed_settings") or []
    return max(float(s) for _, s in fs) if fs else None


def trial_plan(circuit: Circuit, report: Report, *, symptom: str | None = None, telltales: Sequence = ()) -> list[str]:
    """Numbered steps for a trial on site (plain sentences, one per step)."""
    by_id = {c.id: c for c in report.checks}
    bad = {cid: c for cid, c in by_id.items() if c.status in (Status.FAIL, Status.CAUTION)}
    steps = ["Isolate the circuit, lock it off and prove it dead before connecting or disconnecting anything; "
             "restore the supply only to make the trial, with every cover on."]
    groups = circuit.loads
    first = groups[0]
    if len(groups) > 1 or first.count > 1:
        steps.append(f"Connect one lamp of {first.name} alone first, then the full circuit "
                     f"({', '.join(f'{g.count} × {g.name}' for g in groups)}); make every step below with each.")
    else:
        steps.append(f"Connect the circuit as it will be used ({first.count} × {first.name}).")
    lamp = trial_lamp_w(circuit)
    switchy = circuit.dimmer.edge is Edge.LEADING and any(cid in bad for cid in SWITCH_CHECKS + ("off-state",))
    if lamp is not None and switchy:
        steps.append(f"Have a {lamp:.0f} W filament lamp at hand as a trial load, in a lampholder you can connect "
                     "across the lamps (circuit isolated while you connect it); it adds the current the dimmer's "
                     "switch needs.")
    steps.append("With the knob at off, switch on; turn the knob slowly up to full and note the position "
                 "(0 off, 1 full) at which the lamps come on, and whether they flicker on the way.")
    steps.append("From full, turn the knob slowly down to the bottom and note the position at which the light "
                 "first flickers or goes out.")
    if symptom in LATE_START_SYMPTOMS:
        steps.append("Note both positions: where the lamps come on turning up and where they go out turning down. "
                     "Coming on well above where they go out is the rotary dimmer's timing network (its hysteresis); "
                     "dark over the same bottom part both ways is where the dimmer does not fire at all (its end "
                     "stop or trim).")
        steps.append(f"With the circuit isolated, connect a {TRIAL_LAMPS_W[0]:.0f} W filament lamp in place of the "
                     "lamps and repeat both turns. If the filament lamp also comes on late, or stays dark over the "
                     "same bottom part, the dimmer is the cause (a trim or an electronic phase dimmer cures it); if it "
                     "glows from near the bottom, the lamps need more conduction to start than the dimmer gives "
                     "there (set the trim, or fit lamps with a lower start).")
    steps.append("Switch the dimmer off and watch the lamps in the dark for a minute: a faint glow or flashes.")
    if circuit.breaker is not None and "breaker" in bad:
        steps.append("With the lamps cold, switch on at full five times, a minute apart: note whether the breaker "
                     "holds each time. Never replace the breaker to make it hold.")
    if any(isinstance(g, MagneticTransformer) for g in groups) and "dc-offset" in bad:
        steps.append("At the settings where the transformers hum, clamp one primary lead with a clamp meter on "
                     "DC amperes and note the reading.")
    if any(isinstance(g, ElectronicDriver) for g in groups):
        steps.append("At full, clamp the dimmer's switched live with a true-rms clamp meter and note the current "
                     "(and the crest factor if the meter shows it).")
    steps += _meanings(circuit, bad, lamp if switchy else None)
    for s in telltales:
        a, b = s.expected_if_top, s.expected_if_runner_up
        if a is None or b is None:
            continue
        unit = f" {s.reading.unit}" if s.reading.unit and not s.reading.unit.startswith("of ") else ""
        if s.reading.unit == "A" and max(abs(a), abs(b)) < 0.1:
            a, b, unit = 1000 * a, 1000 * b, " mA"
        steps.append(f"To tell {s.top} from {s.runner_up}: {s.reading.procedure} ({s.reading.tool}). "
                     f"About {a:.3g}{unit} points to {s.top}; {'at least' if s.runner_up_at_least else 'about'} "
                     f"{b:.3g}{unit} to {s.runner_up}"
                     + ("." if s.separates else " (too close to tell apart with this tool)."))
    steps.append("When done, isolate again before changing anything; local wiring rules and the makers' "
                 "instructions come first.")
    return [f"{i}. {t}" for i, t in enumerate(steps, 1)]


def _meanings(circuit: Circuit, bad: dict, lamp_w: float | None) -> list[str]:
    """Which result means what, for each check that fails or cautions."""
    out = []
    sw = [bad[c] for c in SWITCH_CHECKS if c in bad]
    if sw:
        at = max((s for s in (_setting_of(c) for c in sw) if s is not None), default=None)
        where = f" above position {at:.2f}" if at is not None and at > 0 else ""
        deciding = ", ".join(sorted({c.deciding_input for c in sw if c.deciding_input}))
        turns = f" ({deciding} is at its unfavourable end)" if deciding else ""
        if circuit.dimmer.edge is Edge.LEADING:
            text = (f"If the lamps flicker, go out or come on late{where}, the dimmer's switch does not get the current "
                    f"it needs from these lamps{turns}; if they stay steady down to the bottom, it does.")
            if lamp_w is not None:
                text += (f" With the {lamp_w:.0f} W trial lamp added the flicker should stop: then a load-correction "
                         "device (`dimfit size`) or a filament lamp on the circuit cures it; if it does not stop, "
                         "suspect the lamps, not the dimmer.")
        else:
            text = (f"If the lamps flicker or go out{where}, they do not run steadily on this dimmer there{turns}: "
                    "tell the user where the usable range ends, or fit lamps made for trailing-edge dimmers; if they "
                    "stay steady down to the bottom, the circuit is fine.")
        out.append(text)
    if "off-state" in bad:
        dec = bad["off-state"].deciding_input
        out.append("Any glow or flash with the dimmer off is current leaking through the dimmer into the lamps"
                   + (f" ({dec} is at its unfavourable end)" if dec else "")
                   + ": a load-correction device across the lamps, or a dimmer with a neutral connection, stops it; "
                   "none in a minute in the dark means the leakage is too small to see.")
    if "breaker" in bad and circuit.breaker is not None:
        out.append("A trip at switch-on is the lamps' surge reaching the breaker's magnetic release: split the lamps "
                   "over more circuits or choose lamps with a lower surge; a trip after running for minutes is "
                   "overload or a fault, not the surge.")
    if "dc-offset" in bad:
        dc = bad["dc-offset"]
        lim = dc.limit
        out.append("A DC reading on the primary that grows as you dim, or loud hum, is uneven firing saturating the "
                   "core" + (f" (the model expects trouble from about {1000 * lim:.0f} mA)" if lim else "")
                   + ": fit a dimmer with symmetric firing made for iron-core transformers.")
    if "repetitive-peak" in bad or "rating" in bad or "dissipation" in bad:
        out.append("A clamp reading above the dimmer's rated current, or a crest factor far above 1.4 (a sine's), "
                   "means the dimmer is carrying more than it is built for: reduce the load or fit a larger dimmer.")
    if "dimmable" in bad:
        out.append("A lamp not marked dimmable cannot be made to work on a dimmer: fit dimmable lamps or a plain switch.")
    return out
