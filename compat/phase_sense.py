"""Can the lamps see the dimmer's phase?

A capacitor-input lamp or driver reads the dimmer's setting from its own terminal
voltage (``loads.driver``, the decode): it measures how much of each half-cycle the
voltage stands above its phase detector's level V_sense = ``SENSE_FRACTION`` · √2 ·
V_rated.  While the switch is off, nothing but the lamps pulls their terminals down (a
capacitor keeps its charge with no discharge path, textbook).  Lamps without a bleeder
keep them up with their own input capacitors, so they read more of the half-cycle than
the dimmer passes — with a trailing-edge dimmer at a low setting, all of it — and stay
bright, drawing their power through whatever part of the half-cycle the switch still
conducts.  Lamps and drivers made for phase dimmers carry a bleeder or a dimming
interface that discharges them (common practice, from memory).

The finding, per setting of the sweep, averaged over the analysed half-cycles:

    switch share   s = the share of the half-cycle the dimmer passes: trailing edge from
                       its start to the turn-off, (extinction − firing) / 180°; leading
                       edge from the firing to the zero, (180° − firing) / 180° (a triac
                       dropping out earlier is the holding check's matter, and with
                       capacitor-input lamps it stops after each charging pulse, while
                       the lamps rightly read the phase from the firing on); 0 when
                       not fired
    seen share     c = the decode's measure: from the first rise of |v| above V_sense
                       to its last fall below it, or to the half-cycle's end
    held           |v| above V_sense for at least ``HELD_SHARE`` of the switch's
                   off-interval (its median there is reported)

A group cannot see the phase where its terminals are held and c − s ≥ ``MISREAD_SHARE``.
"""
from __future__ import annotations

import dataclasses
import math
from collections.abc import Sequence

import numpy as np

from compat.notation import setting_text
from compat.runs import SettingRun
from loads.circuit import Circuit
from loads.dimmer import Edge
from loads.driver import SENSE_FRACTION, ElectronicDriver

# Engineering choice: lamps reading 0.15 of a half-cycle more than the switch passes sit
# a fifth of their decode's span (0.15 → 0.90 of a half-cycle, ``loads.driver``) brighter
# than the setting asks: more than a knob's slack, a different operating point.
MISREAD_SHARE = 0.15
# Engineering choice: the switch off for at least this share of the half-cycle, so
# that there is an off-interval to be held.
MIN_OFF_SHARE = 0.25
# Engineering choice: terminals above the detector level through nine tenths of the
# off-interval are held by nothing but the lamps' capacitors.  A bleeder that is merely
# slow lets them fall within the interval (the lamps then read late, but still dim): the
# first rule, at half the interval, named a 10 mA constant-current bleeder's 2.5 ms fall
# from 320 V as "held" (57 % of an 80° off-interval) though those drivers dim to 2 %.
HELD_SHARE = 0.9


def _shares(run: SettingRun, v_sense: float, leading: bool) -> tuple[float, float, float, float]:
    """(switch share, seen share, held share of the off-interval, median |v| off [V])."""
    res, hc = run.result, run.half_cycles
    dt = float(res.t_s[1] - res.t_s[0])
    n_half = max(2, int(round(0.5 / res.frequency_hz / dt)))
    angle = np.arange(n_half) * (180.0 / n_half)
    v = np.abs(res.load_v)
    switch, seen, off = [], [], []
    for start, fire, ext in zip(hc.start_s, hc.firing_angle_deg, hc.extinction_angle_deg):
        i0 = int(round((float(start) - float(res.t_s[0])) / dt))
        if i0 < 0 or i0 + n_half > v.size:
            continue
        seg = v[i0:i0 + n_half]
        if not (math.isfinite(fire) and math.isfinite(ext)):
            on_from, on_to = 0.0, 0.0
        else:
            on_from, on_to = float(fire), (180.0 if leading else min(float(ext), 180.0))
        switch.append(max(0.0, on_to - on_from) / 180.0)
        above = np.flatnonzero(seg > v_sense)
        if above.size == 0:
            seen.append(0.0)
        else:
            last = n_half if above[-1] >= n_half - 2 else above[-1] + 1
            seen.append((last - above[0]) / n_half)
        off.append(seg[(angle < on_from) | (angle >= on_to)])
    if not switch:
        return 0.0, 0.0, 0.0, 0.0
    off_all = np.concatenate(off)
    if off_all.size == 0:
        return float(np.mean(switch)), float(np.mean(seen)), 0.0, 0.0
    return (float(np.mean(switch)), float(np.mean(seen)), float(np.mean(off_all > v_sense)),
            float(np.median(off_all)))


def unseen(circuit: Circuit, runs: Sequence[SettingRun]) -> dict | None:
    """The setting at which a dimmable driver group misreads the phase most, as
    {group, setting, direction, switch_share, seen_share, held_v, sense_v}; None if no
    group does."""
    worst = None
    leading = circuit.dimmer.edge is Edge.LEADING
    for g in circuit.loads:
        if not isinstance(g, ElectronicDriver) or not g.dimmable:
            continue
        v_sense = SENSE_FRACTION * math.sqrt(2.0) * g.rated_voltage_v
        for r in runs:
            s, c, held, v_off = r.memo(("phase_sense", v_sense, leading), lambda r=r: _shares(r, v_sense, leading))
            if 1.0 - s < MIN_OFF_SHARE or held < HELD_SHARE or c - s < MISREAD_SHARE:
                continue
            if worst is None or c - s > worst["seen_share"] - worst["switch_share"]:
                worst = {"group": g.name, "setting": r.setting, "direction": r.direction, "switch_share": s,
                         "seen_share": c, "held_v": v_off, "sense_v": v_sense}
    return worst


def sentence(found: dict) -> str:
    """The finding in words."""
    return (f"The lamps cannot see the dimmer's phase ({found['group']}): at {setting_text(found['setting'], found['direction'])} "
            f"the switch conducts for {100 * found['switch_share']:.0f} % of each half-cycle, but while it is off their "
            f"input capacitors hold their terminals at about {found['held_v']:.0f} V, above the {found['sense_v']:.0f} V "
            f"at which they sense voltage, so they read {100 * found['seen_share']:.0f} % and stay bright; lamps and "
            "drivers made for phase dimmers carry a bleeder that pulls their terminals down")


# Engineering choice: a bleeder is sized to pull a lamp's input capacitor from the crest
# of its rated voltage down to its phase detector's level within a quarter of a
# half-cycle, I = C·ΔV/Δt (closed form for a constant current).
BLEEDER_FALL_SHARE = 0.25


def bleeder_needed_a(g: ElectronicDriver, frequency_hz: float) -> float:
    """Constant bleeder current per lamp that lets it see the phase [A] (``BLEEDER_FALL_SHARE``)."""
    v_pk = math.sqrt(2.0) * g.rated_voltage_v
    dv = v_pk * (1.0 - SENSE_FRACTION)
    return g.input_capacitance_f * dv / (BLEEDER_FALL_SHARE * 0.5 / frequency_hz)


def with_bleeders(circuit: Circuit) -> tuple[Circuit, dict[str, float]]:
    """The circuit with every dimmable lamp or driver group whose bleeder is below
    ``bleeder_needed_a`` given a constant-current bleeder of that size, and the sizes
    given, by group name [A]."""
    f = circuit.supply.frequency_hz
    given, loads = {}, []
    for g in circuit.loads:
        if isinstance(g, ElectronicDriver) and g.dimmable:
            need = bleeder_needed_a(g, f)
            if g.bleeder_a < need:
                given[g.name] = need
                g = dataclasses.replace(g, bleeder_a=need, bleeder_kind="constant-current")
        loads.append(g)
    return dataclasses.replace(circuit, loads=tuple(loads), ranges=()), given


def remedy(circuit: Circuit, found: dict) -> str:
    """The cure in a few words, never proposing what the lamps already have: a bleeder,
    or a stronger one where the group that cannot see the phase has a bleeder."""
    has = any(g.name == found["group"] and isinstance(g, ElectronicDriver) and g.bleeder_a > 0 for g in circuit.loads)
    return f"lamps or drivers with {'a stronger bleeder' if has else 'a bleeder'} (made for this dimmer's edge)"
