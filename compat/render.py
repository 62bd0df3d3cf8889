"""Reports as text: a terminal table, a Markdown report, and the sizing answer.

Plain strings only (no terminal library): the command line prints them, the app may
show them, and a report saved as Markdown reads the same.  The safety cautions are
part of every rendering that carries a verdict.
"""
from __future__ import annotations

import math

from compat.perception import cie_lightness, perceived_brightness
from compat.report import Report
from loads.circuit import Circuit

_VERDICT_TEXT = {"suitable": "SUITABLE", "suitable-with-cautions": "SUITABLE WITH CAUTIONS",
                 "unsuitable": "UNSUITABLE", "site-test-needed": "SITE TEST NEEDED"}


def _num(x, unit: str = "") -> str:
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return "—"
    a = abs(x)
    if a < 1e-12:                      # below any meaningful reading: numerical zero
        x, a = 0.0, 0.0
    if a == 0:
        s = "0"
    elif a >= 100:
        s = f"{x:.0f}"
    elif a >= 10:
        s = f"{x:.1f}"
    elif a >= 0.1:
        s = f"{x:.2f}"
    elif unit == "A" and a >= 1e-4:
        return f"{1000 * x:.1f} mA"
    else:
        s = f"{x:.3g}"
    return f"{s} {unit}".strip()


def _margin(m) -> str:
    return "—" if m is None or not math.isfinite(m) else f"{100 * m:+.0f} %"


def render_table(report: Report) -> str:
    """A plain-text table for a terminal: verdict, one line per check, cautions."""
    lines = [f"{report.circuit}", f"Verdict: {_VERDICT_TEXT.get(str(report.verdict), str(report.verdict))}", ""]
    head = ("check", "status", "value", "limit", "margin")
    rows = [(c.id + (" *" if c.safety else ""), str(c.status), _num(c.value, c.unit), _num(c.limit, c.unit),
             _margin(c.margin)) for c in report.checks]
    widths = [max(len(r[i]) for r in rows + [head]) for i in range(5)]
    fmt = "  ".join("{:<%d}" % w for w in widths)
    lines.append(fmt.format(*head))
    lines.append(fmt.format(*("-" * w for w in widths)))
    for c, r in zip(report.checks, rows):
        lines.append(fmt.format(*r))
        lines.append("    " + c.message)
        if c.remedy and str(c.status) in ("fail", "caution"):
            lines.append("    remedy: " + c.remedy)
        if c.deciding_input:
            lines.append("    decided by: " + c.deciding_input)
    lines += ["", "* a safety matter", "", "Cautions:"] + [f"  - {t}" for t in report.cautions]
    return "\n".join(lines) + "\n"


def _md_escape(s: str) -> str:
    return s.replace("|", "\\|")


def _inputs_md(circuit: Circuit) -> list[str]:
    s, d = circuit.supply, circuit.dimmer
    out = ["## Inputs", "",
           f"- Supply: {s.voltage_v:g} V, {s.frequency_hz:g} Hz, loop {s.source_resistance_ohm:g} Ω "
           f"+ {1e6 * s.source_inductance_h:.0f} µH"]
    if circuit.breaker is not None:
        b = circuit.breaker
        out.append(f"- Breaker: {b.rated_current_a:g} A, curve {b.curve}"
                   + (f", instantaneous trip {b.instantaneous_trip_a:g} A" if b.instantaneous_trip_a else ""))
    out.append(f"- Dimmer: {d.name} — {d.edge} edge, {d.wiring}, {d.control} control, rated {d.rated_load_w:g} W, "
               f"minimum {d.min_load_w:g} W, holding {1000 * d.holding_current_a:g} mA, latching "
               f"{1000 * d.latching_current_a:g} mA")
    for g in circuit.loads:
        out.append(f"- {g.count} × {g.name} ({g.kind}, {g.rated_power_w:g} W, {g.rated_voltage_v:g} V)")
    if circuit.correction is not None:
        c = circuit.correction
        out.append(f"- Load-correction device: {1e9 * c.series_capacitance_f:.0f} nF in series with {c.resistance_ohm:.0f} Ω")
    for r in circuit.ranges:
        out.append(f"- Range: {r.file_key} from {r.low:g} to {r.high:g} (SI units)")
    return out + [""]


def render_markdown(report: Report, circuit: Circuit) -> str:
    """A Markdown report: inputs, every check with value, limit and margin, the dimming
    curve, remedies and cautions."""
    out = [f"# {report.circuit}", "",
           f"**Verdict: {_VERDICT_TEXT.get(str(report.verdict), str(report.verdict))}**", ""]
    out += _inputs_md(circuit)
    out += ["## Checks", "", "| check | status | value | limit | margin | finding |", "|---|---|---|---|---|---|"]
    for c in report.checks:
        name = c.id + (" (safety)" if c.safety else "")
        finding = c.message + (f" Decided by {c.deciding_input}." if c.deciding_input else "")
        out.append(f"| {name} | {c.status} | {_num(c.value, c.unit)} | {_num(c.limit, c.unit)} | {_margin(c.margin)} "
                   f"| {_md_escape(finding)} |")
    out.append("")
    if report.sweep:
        out += ["## Dimming curve", "",
                "| direction | setting | firing angle | conduction | load V rms | load A rms | power W | light | perceived | L* | steady |",
                "|---|---|---|---|---|---|---|---|---|---|---|"]
        for r in report.sweep:
            lf = r["light_fraction"]
            fa = "—" if r["firing_angle_deg"] is None else f"{r['firing_angle_deg']:.0f}°"
            ca = "—" if r["conduction_angle_deg"] is None else f"{r['conduction_angle_deg']:.0f}°"
            out.append(f"| {r['direction']} | {r['setting']:.2f} | {fa} | {ca} | {r['load_rms_v']:.0f} | "
                       f"{r['load_rms_a']:.3f} | {r['power_w']:.1f} | {100 * lf:.1f} % | "
                       f"{100 * perceived_brightness(lf):.0f} % | {cie_lightness(lf):.0f} | "
                       f"{'yes' if r['stable'] else 'no'} |")
        out.append("")
    remedies = [c for c in report.checks if c.remedy and str(c.status) in ("fail", "caution")]
    if remedies:
        out += ["## Remedies", ""] + [f"- **{c.id}**: {c.remedy}" for c in remedies] + [""]
    sources = sorted({k for c in report.checks for k in c.sources})
    if sources:
        out += ["## Sources", "", ", ".join(sources), ""]
    out += ["## Cautions", ""] + [f"- {t}" for t in report.cautions] + [""]
    return "\n".join(out)


def render_sizing(result: dict) -> str:
    """The answer of ``compat.sizing.size`` as plain text."""
    lines = [f"{result.get('circuit', 'circuit')}: sizing (now {result.get('verdict')})"]
    if result.get("failing"):
        lines.append("Failing now: " + ", ".join(result["failing"]))
    lines += ["", "Lamp counts (other groups unchanged):"]
    for name, c in result.get("counts", {}).items():
        few = "none passes" if c["fewest"] is None else str(c["fewest"])
        most = "none passes" if c["most"] is None else str(c["most"])
        lines.append(f"  {name}: now {c['count']}; fewest that pass {few}; most that pass {most}")
    corr = result.get("correction")
    lines.append("")
    if corr:
        lines.append(f"Load-correction device: {1e9 * corr['capacitance_f']:.0f} nF in series with "
                     f"{corr['resistance_ohm']:.0f} Ω across the lamps; it dissipates about {corr['loss_w']:.2f} W "
                     f"({1000 * corr['rms_current_a']:.0f} mA); with it the circuit is {corr.get('verdict', '?')}"
                     + (f" (still failing: {', '.join(corr['failing'])})" if corr.get("failing") else "") + ".")
    else:
        lines.append("Load-correction device: none suggested — nothing a bypass cures is failing, or no "
                     "R–C bypass up to 10 µF cures it.")
    e = result.get("edge")
    if e:
        lines.append(f"With a {e['edge']}-edge dimmer the circuit would be {e['verdict']}"
                     + (f" (failing: {', '.join(e['failing'])})" if e["failing"] else "") + ".")
    if result.get("rating_needed_w") is not None:
        lines.append(f"Rating needed: a dimmer printed for at least {result['rating_needed_w']:.0f} W (filament), "
                     f"at the derating factor {result.get('derating_factor', 1.0):.2f}.")
    if result.get("surge_peak_a") is not None:
        lines.append(f"Worst switch-on surge: {result['surge_peak_a']:.1f} A peak.")
    if result.get("breaker_counts"):
        curve = result.get("breaker_curve")
        lines.append("Breaker: " + (f"type {curve} holds this surge" if curve else "no B/C/D curve at this rating is sure to hold it")
                     + "; at the present curve it holds at most "
                     + ", ".join(f"{n} × {k}" for k, n in result["breaker_counts"].items()) + ".")
    lines += ["", "Cautions:"]
    from compat.cautions import cautions
    lines += [f"  - {t}" for t in cautions()]
    return "\n".join(lines) + "\n"
