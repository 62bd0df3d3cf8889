"""A diagnosis (``compat.diagnose.Diagnosis``) as plain text and as Markdown.

Both carry the mechanisms ranked with their score and figure, the ones that do not
reproduce the symptom and why, the measurement that tells each possible cause from the
runner-up, the remedies, the trial plan and the safety cautions.
"""
from __future__ import annotations

from compat.diagnose import MECHANISM_TEXT, Diagnosis, Separation
from compat.symptoms import SYMPTOM_TEXT
from compat.render import _wrap as _wrap80

SCORE_NOTE = ("score: the share of the simulated cases (the unknown inputs at their ends and midpoints, after the "
              "observations) in which the mechanism reproduces the symptom.")


def _unit(v: float | None, unit: str) -> str:
    """A reading as the tool shows it: currents below 0.1 A in mA."""
    if v is None:
        return "—"
    if unit == "A" and abs(v) < 0.1:
        return f"{1000 * v:.3g} mA"
    return f"{v:.3g}" + (f" {unit}" if unit and not unit.startswith("of ") else "")


def measurement_text(s: Separation) -> str:
    """One sentence: the reading, and what each result points to."""
    rd = s.reading
    tail = "" if s.separates else (" These differ by no more than the tool's resolution: this reading does not tell "
                                  "them apart.")
    return (f"{rd.procedure} ({rd.tool}, resolution {_unit(rd.resolution, rd.unit)}). "
            f"Expect about {_unit(s.expected_if_top, rd.unit)} if this is the cause "
            f"({s.top_case}), {'at least' if s.runner_up_at_least else 'about'} "
            f"{_unit(s.expected_if_runner_up, rd.unit)} if {s.runner_up} is ({s.runner_up_case})."
            + ("" if s.runner_up_acts else f" ({s.runner_up} reproduces the symptom in no case: that is the reading "
                                           "where it comes closest.)") + tail)


# SI to the file's unit, by the key's suffix (as loads/files.py writes them).
_FILE_SCALE = {"_ma": 1e3, "_uh": 1e6, "_mh": 1e3, "_nf": 1e9, "_uf": 1e6, "_us": 1e6, "_ms": 1e3}


def file_units(key: str, value_si: float) -> float:
    """A value [SI] in the unit of its file key (``holding_current_ma``: mA)."""
    return value_si * next((f for suffix, f in _FILE_SCALE.items() if key.endswith(suffix)), 1.0)


def _unknown_lines(d: Diagnosis) -> list[str]:
    out = []
    for u in d.unknowns:
        what = "from the file" if u.origin == "file" else f"widened: {u.why}"
        lo, hi = file_units(u.file_key, u.low), file_units(u.file_key, u.high)
        line = f"{u.file_key}: {lo:.4g} to {hi:.4g} ({what})"
        if u.path in d.narrowed:
            nlo, nhi = (file_units(u.file_key, x) for x in d.narrowed[u.path])
            line += f"; narrowed by the observations to {nlo:.4g} to {nhi:.4g}"
        out.append(line)
    return out


def render_diagnosis(d: Diagnosis, *, wrap: bool = True) -> str:
    """Plain text for a terminal, wrapped at the table's 80 columns (``wrap=False``:
    one line per item, for a window that wraps its own text)."""
    def _wrap(text: str, first: str, rest: str | None = None) -> list[str]:
        return _wrap80(text, first, rest) if wrap else [first + text]

    lines = [d.circuit, f"Symptom: {SYMPTOM_TEXT[d.symptom]} ({d.symptom})",
             f"Cases simulated: {d.cases_run}; kept after the observations: {len(d.cases_kept)}", ""]
    if d.unknowns:
        lines.append("Unknown inputs:")
        for t in _unknown_lines(d):
            lines += _wrap(t, "  - ", "    ")
    if d.observations:
        lines.append("Observations: " + ", ".join(f"{o.key}={o.value:g}" for o in d.observations))
    lines.append("")
    possible = d.possible
    lines.append("Possible causes, best first:" if possible else "No modelled mechanism reproduces the symptom.")
    for r in possible:
        lines += _wrap(f"{r.mechanism} (score {r.score:.2f}): {MECHANISM_TEXT[r.mechanism]}.", "  ", "    ")
        lines += _wrap(f"evidence: {r.evidence}", "    ", "      ")
        s = d.separations.get(r.mechanism)
        if s is not None:
            lines += _wrap("measure: " + measurement_text(s), "    ", "      ")
        if d.remedies.get(r.mechanism):
            lines += _wrap("remedy: " + d.remedies[r.mechanism], "    ", "      ")
    rest = [r for r in d.ranked if r.score <= 0]
    if rest:
        lines += ["", "Ruled out, and why:"]
        for r in rest:
            lines += _wrap(f"{r.mechanism}: {r.evidence}", "  ", "    ")
    for n in d.notes:
        lines += [""] + _wrap(n, "")
    lines += ["", f"Verdict over these cases: {d.verdict}", "", "Trial on site:"]
    for step in d.trial_plan:
        lines += _wrap(step, "  ", "     ")
    lines += ["", *_wrap(SCORE_NOTE, ""), "", "Cautions:"]
    for t in d.cautions:
        lines += _wrap(t, "  - ", "    ")
    return "\n".join(lines) + "\n"


def _md(s: str) -> str:
    return s.replace("|", "\\|")


def render_diagnosis_markdown(d: Diagnosis) -> str:
    """A Markdown report of the diagnosis."""
    out = [f"# {d.circuit}: diagnosis", "", f"**Symptom: {SYMPTOM_TEXT[d.symptom]}** (`{d.symptom}`)", "",
           f"Cases simulated: {d.cases_run}; kept after the observations: {len(d.cases_kept)}. "
           f"Verdict over these cases: {d.verdict}.", ""]
    if d.unknowns:
        out += ["## Unknown inputs", ""] + [f"- {t}" for t in _unknown_lines(d)] + [""]
    out += ["## Mechanisms", "", "| mechanism | score | reproduces | evidence |", "|---|---|---|---|"]
    for r in d.ranked:
        out.append(f"| {r.mechanism} | {r.score:.2f} | {'yes' if r.score > 0 else 'no'} | {_md(r.evidence)} |")
    out += ["", SCORE_NOTE, ""]
    for r in d.possible:
        out += [f"### {r.mechanism}", "", MECHANISM_TEXT[r.mechanism][0].upper() + MECHANISM_TEXT[r.mechanism][1:] + ".", ""]
        s = d.separations.get(r.mechanism)
        if s is not None:
            out += [f"- Measure: {measurement_text(s)}"]
        if d.remedies.get(r.mechanism):
            out += [f"- Remedy: {d.remedies[r.mechanism]}"]
        out.append("")
    for n in d.notes:
        out += [n, ""]
    out += ["## Trial on site", ""] + [s for s in d.trial_plan] + [""]
    out += ["## Cautions", ""] + [f"- {t}" for t in d.cautions] + [""]
    return "\n".join(out)


def diagnose_text(circuit, symptom: str, *, progress=None, cancel=None) -> str:
    """``compat.diagnose.diagnose`` rendered as text (what the app shows: a string
    crosses from its worker process whole)."""
    from compat.diagnose import diagnose

    return render_diagnosis(diagnose(circuit, symptom, progress=progress, cancel=cancel), wrap=False)
