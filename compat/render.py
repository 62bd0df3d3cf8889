"""Reports as text: a terminal table, a Markdown report, and the sizing answer.

Plain strings only (no terminal library): the command line prints them, the app may
show them, and a report saved as Markdown reads the same.  The safety cautions are
part of every rendering that carries a verdict.
"""
from __future__ import annotations

import re
import textwrap

from compat.notation import check_figures, check_name, sources_text
from compat.perception import cie_lightness, perceived_brightness
from compat.report import Report
from loads.circuit import Circuit

_VERDICT_TEXT = {"suitable": "SUITABLE", "suitable-with-cautions": "SUITABLE WITH CAUTIONS",
                 "unsuitable": "UNSUITABLE", "site-test-needed": "SITE TEST NEEDED"}


# One line each, under the table and the report (the README says the same at length).
MARGIN_NOTE = ("margin: how far inside (+) or outside (-) its limit a value is, as a share of the limit; "
               "beyond 100 % as a ratio: \"32× the need\" is 32 times the least needed, "
               "\"5.1× the limit\" 5.1 times the most allowed.")
SAFETY_NOTE = "a safety matter: a failure here can damage equipment or trip protection"


# The terminal table's width: a terminal's default, and what a phone shows in landscape.
TABLE_WIDTH = 80


def _wrap(text: str, first: str, rest: str | None = None) -> list[str]:
    """``text`` wrapped to TABLE_WIDTH, the first line after ``first``, the others
    indented like it (or by ``rest``)."""
    # a number stays on the line of its unit ("10 %", "42 A"): joined by a no-break
    # space while wrapping (textwrap does not break there), then given back its space
    kept = re.sub(r"(\d) (?=[%A-Za-zµΩ°×])", "\\1\u00a0", text)
    out = textwrap.wrap(kept, TABLE_WIDTH, initial_indent=first, subsequent_indent=first if rest is None else rest,
                        break_on_hyphens=False) or [first]
    return [line.replace("\u00a0", " ") for line in out]


def render_table(report: Report) -> str:
    """A plain-text table for a terminal: verdict, one line per check, cautions."""
    lines = [f"{report.circuit}", f"Verdict: {_VERDICT_TEXT.get(str(report.verdict), str(report.verdict))}", ""]
    head = ("check", "status", "value", "limit", "margin")
    rows = [(check_name(c), str(c.status), *check_figures(c)) for c in report.checks]
    widths = [max(len(r[i]) for r in rows + [head]) for i in range(5)]
    fmt = "  ".join("{:<%d}" % w for w in widths)
    lines.append(fmt.format(*head))
    lines.append(fmt.format(*("-" * w for w in widths)))
    for c, r in zip(report.checks, rows):
        lines.append(fmt.format(*r).rstrip())
        lines += _wrap(c.message, "    ")
        if c.remedy and str(c.status) in ("fail", "caution"):
            lines += _wrap("remedy: " + c.remedy, "    ")
        if c.deciding_input:
            lines += _wrap("decided by: " + c.deciding_input, "    ")
    lines += ["", *_wrap(f"* {SAFETY_NOTE}", ""), *_wrap(MARGIN_NOTE, ""), "", "Cautions:"]
    for t in report.cautions:
        lines += _wrap(t, "  - ", "    ")
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


CURVE_NOTE = ("light: share of the lamps' full light on a plain switch; perceived: how bright it looks, "
              "by the square-root rule of dimming (IES Lighting Handbook); CIE L*: the CIE 1976 lightness of the "
              "same light (0–100), for comparison; stable: every simulated half-cycle fired, latched and held, "
              "with firing angles within 2°.")


def render_markdown(report: Report, circuit: Circuit) -> str:
    """A Markdown report: inputs, every check with value, limit and margin, the dimming
    curve, remedies and cautions."""
    out = [f"# {report.circuit}", "",
           f"**Verdict: {_VERDICT_TEXT.get(str(report.verdict), str(report.verdict))}**", ""]
    out += _inputs_md(circuit)
    out += ["## Checks", "", "| check | status | value | limit | margin | finding |", "|---|---|---|---|---|---|"]
    for c in report.checks:
        name = check_name(c, " (safety)")
        finding = c.message + (f" Decided by {c.deciding_input}." if c.deciding_input else "")
        # no-break spaces keep "70.5 %" and "32× the need" on one line in a narrow viewer
        value, limit, margin = (x.replace(" ", "\u00a0") for x in check_figures(c))
        out.append(f"| {name} | {c.status} | {value} | {limit} | {margin} | {_md_escape(finding)} |")
    out += ["", f"(safety) marks {SAFETY_NOTE}. {MARGIN_NOTE}", ""]
    if report.sweep:
        out += ["## Dimming curve", "",
                "| direction | setting | firing angle | conduction | load V rms | load A rms | power W | light | perceived | CIE L* | stable |",
                "|---|---|---|---|---|---|---|---|---|---|---|"]
        for r in report.sweep:
            lf = r["light_fraction"]
            fa = "—" if r["firing_angle_deg"] is None else f"{r['firing_angle_deg']:.0f}°"
            ca = "—" if r["conduction_angle_deg"] is None else f"{r['conduction_angle_deg']:.0f}°"
            out.append(f"| {r['direction']} | {r['setting']:.2f} | {fa} | {ca} | {r['load_rms_v']:.0f} | "
                       f"{r['load_rms_a']:.3f} | {r['power_w']:.1f} | {100 * lf:.1f}\u00a0% | "
                       f"{100 * perceived_brightness(lf):.0f}\u00a0% | {cie_lightness(lf):.0f} | "
                       f"{'yes' if r['stable'] else 'no'} |")
        out += ["", CURVE_NOTE, ""]
    remedies = [c for c in report.checks if c.remedy and str(c.status) in ("fail", "caution")]
    if remedies:
        out += ["## Remedies", ""] + [f"- **{c.id}**: {c.remedy}" for c in remedies] + [""]
    if str(report.verdict) == "site-test-needed":
        from compat.trial_plan import trial_plan
        out += ["## Trial on site", "",
                "The verdict turns on an input nobody can read on the dimmer or the lamps; this trial settles it.", ""]
        out += trial_plan(circuit, report) + [""]
    sources = sorted({k for c in report.checks for k in c.sources})
    if sources:
        out += ["## Sources", ""] + [f"- {t}" for t in sources_text(sources).split("; ")] + [""]
    out += ["## Cautions", ""] + [f"- {t}" for t in report.cautions] + [""]
    return "\n".join(out)


def count_text(c: dict) -> str:
    """One lamp group's count limits from ``compat.sizing.count_limits``, in words."""
    few, most = c["fewest"], c["most"]
    if most is None:
        return (f"now {c['count']}; no count passes: even one lamp fails a check of too much load "
                "(rating, peaks, surge, breaker, harmonics or heat)")
    if few is None:
        return (f"now {c['count']}; no count passes: up to {most} the dimmer still misbehaves (minimum load, "
                f"latching, holding, off-state, dimming range or flicker), above {most} it is overloaded")
    return f"now {c['count']}; passes with {few} to {most}" if few < most else f"now {c['count']}; passes only with {few}"


def correction_text(corr: dict) -> str:
    """A proposed load-correction device as parts to buy."""
    c_nf, r = 1e9 * corr["capacitance_f"], corr["resistance_ohm"]
    cap = f"a {c_nf:.0f} nF capacitor" if c_nf < 1000 else f"a {c_nf / 1000:g} µF capacitor"
    if corr.get("capacitor_class"):
        volts = corr.get("capacitor_rated_voltage_v")
        cap += (f" (class {corr['capacitor_class']}, rated {volts:.0f} V AC or more, "
                f"{corr.get('capacitor_series', '')} ±{corr.get('capacitor_tolerance_pct', 0):.0f} %)"
                if volts else f" (class {corr['capacitor_class']}, rated for the supply voltage)")
    res = f"a {r:.0f} Ω resistor" if r < 1000 else f"a {r / 1000:g} kΩ resistor"
    if corr.get("resistor_rating_w") is not None:
        res += f" (±{corr.get('resistor_tolerance_pct', 0):.0f} %, {corr['resistor_rating_w']:g} W or more)"
    text = (f"{cap} in series with {res}, across the lamps; it dissipates about {corr['loss_w']:.2f} W and carries "
            f"{1000 * corr['rms_current_a']:.0f} mA")
    if corr.get("verdict"):
        text += (f"; with it the circuit is {corr['verdict']}"
                 + (f" (still failing: {', '.join(corr['failing'])})" if corr.get("failing") else ""))
        if corr.get("capacitor_tolerance_pct"):
            text += (f", checked also with {corr['capacitor_tolerance_pct']:.0f} % less capacitance "
                     "(the low end of its tolerance)")
    return text + "."


def render_sizing(result: dict) -> str:
    """The answer of ``compat.sizing.size`` as plain text."""
    lines = [f"{result.get('circuit', 'circuit')}: sizing (now {result.get('verdict')})"]
    if result.get("failing"):
        lines.append("Failing now: " + ", ".join(result["failing"]))
    lines += ["", "Lamp counts (other groups unchanged):"]
    for name, c in result.get("counts", {}).items():
        lines.append(f"  {name}: {count_text(c)}")
    corr = result.get("correction")
    lines.append("")
    if corr:
        lines.append("Load-correction device: " + correction_text(corr))
    else:
        lines.append("Load-correction device: none suggested — nothing a bypass cures is failing, or no "
                     "R–C bypass up to 10 µF cures it.")
    b = result.get("bleeder")
    if b:
        lines.append(f"Bleeders: {b['group']} cannot see the dimmer's phase (no discharge path while the switch is "
                     "off); with constant-current bleeders of "
                     + ", ".join(f"{ma:.0f} mA per lamp in {k}" for k, ma in b["bleeder_ma"].items())
                     + f" (closed form C·ΔV/Δt) the circuit would be {b['verdict']}"
                     + (f" (failing: {', '.join(b['failing'])})" if b["failing"] else "")
                     + ": choose lamps or drivers made for this dimmer's edge, with a bleeder of that order.")
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
