"""How dimfit writes figures for people: margins, quantities, settings and sources.

Every text a person reads — the terminal table, the Markdown report, the ``size``
answer, the check messages and the app — writes these four things through here, so
they read the same everywhere.  The JSON outputs do not: they keep raw SI numbers with
their ``unit`` field.

* **Margins** (``margin_text``): how far a value is inside its limit, as a share of the
  limit — ``+30 %`` is 30 % inside, ``-16 %`` is 16 % outside.  Up to ±100 % a
  percentage; beyond, a ratio to the limit, which reads better than a four-digit
  percentage: ``32× the need`` (a value that must reach the limit is 32 times it) and
  ``5.1× the limit`` (a value that must stay below the limit is 5.1 times it).
* **Quantities** (``check_figure``, ``quantity``): each check shows its value, its
  limit and the figures of its message in one unit, chosen per check
  (``CHECK_UNITS``), never per number.
* **Settings** (``setting_text``): the knob position from 0 (lowest) to 1 (full), with
  the direction it was turned to get there, since a dimmer can behave differently
  turned down than turned up: ``setting 0.55 on the way down``.
* **Sources** (``source_title``): the short title of a bibliography key (standard
  number, book and edition, or "common practice, no source").
"""
from __future__ import annotations

import math

from compat.report import CheckResult, Status
from loads.errors import InputError
from loads.sources import short_title

# Beyond this share of the limit a margin is written as a ratio (engineering choice: a
# percentage reads well up to "all of it"; past that "5× the limit" says more).
MARGIN_PERCENT_CAP = 1.0

# The unit each check is shown in, where it differs from its SI unit: the trade quotes
# latching and holding currents, small harmonic currents and DC magnetising currents in
# mA (common practice, no source); angles in degrees.  (SI unit, shown unit, factor).
CHECK_UNITS: dict[str, tuple[str, str, float]] = {
    "latching": ("A", "mA", 1e3),
    "harmonics": ("A", "mA", 1e3),
    "dc-offset": ("A", "mA", 1e3),
    "holding": ("deg", "°", 1.0),
}
# Spellings of SI units for people.
_UNIT_SHOWN = {"deg": "°"}

_DIRECTION_TEXT = {"down": "on the way down", "up": "on the way up"}


def margin_text(margin: float | None) -> str:
    """A margin (fraction of the limit, positive inside) as people read it (module doc)."""
    if margin is None or not math.isfinite(margin):
        return "—"
    if abs(margin) <= MARGIN_PERCENT_CAP:
        pct = 100 * margin
        if round(pct) == 0:
            return "0 %"
        return f"{'+' if pct > 0 else '-'}{abs(pct):.0f} %"
    # margin = (value − limit)/limit for a lower limit: value/limit = 1 + margin;
    # margin = (limit − value)/limit for an upper limit: value/limit = 1 − margin
    if margin > 0:
        return f"{_ratio(1 + margin)}× the need"
    return f"{_ratio(1 - margin)}× the limit"


def _ratio(r: float) -> str:
    return f"{r:.1f}" if r < 10 else f"{r:.0f}"


def number(x: float) -> str:
    """A reading with the precision a meter would show: three significant figures,
    no more than one decimal above 10 and none above 100."""
    a = abs(x)
    if a < 1e-12:                      # below any meaningful reading: numerical zero
        return "0"
    if a >= 100:
        return f"{x:.0f}"
    if a >= 10:
        return f"{x:.1f}"
    if a >= 0.1:
        return f"{x:.2f}"
    return f"{x:.3g}"


def unit_text(unit: str) -> str:
    """An SI unit field as people write it (``deg`` → ``°``)."""
    return _UNIT_SHOWN.get(unit, unit)


def quantity(x: float | None, unit: str) -> str:
    """``x`` in ``unit`` (no prefix chosen here: the caller picks the unit), "—" if none."""
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return "—"
    u = unit_text(unit)
    sep = "" if u == "°" else " "
    return f"{number(x)}{sep}{u}".strip()


def check_unit(check_id: str, unit: str) -> tuple[str, float]:
    """(shown unit, factor from SI) for a check's figures."""
    si, shown, factor = CHECK_UNITS.get(check_id, (unit, unit_text(unit), 1.0))
    if si != unit:                      # a check reporting in another unit than usual
        return unit_text(unit), 1.0
    return shown, factor


def check_figure(check_id: str, x: float | None, unit: str) -> str:
    """A figure of a check (value, limit or one in its message), given in SI ``unit``,
    written in the check's own unit."""
    shown, factor = check_unit(check_id, unit)
    return quantity(None if x is None else factor * x, shown)


def check_figures(c: CheckResult) -> tuple[str, str, str]:
    """(value, limit, margin) of a check as every renderer shows them: in the check's
    own unit, "—" where the check does not apply."""
    if c.status is Status.NOT_APPLICABLE:
        return "—", "—", "—"
    return check_figure(c.id, c.value, c.unit), check_figure(c.id, c.limit, c.unit), margin_text(c.margin)


def check_name(c: CheckResult, mark: str = " *") -> str:
    """The check id, marked as a safety matter where the check applies."""
    return c.id + (mark if c.safety and c.status is not Status.NOT_APPLICABLE else "")


def setting_text(setting: float, direction: str | None = None) -> str:
    """``setting 0.55 on the way down``: the knob position, 0 lowest, 1 full, and the
    direction it was turned to reach it."""
    s = f"setting {setting:.2f}"
    return s + (f" {_DIRECTION_TEXT.get(direction, direction)}" if direction else "")


def source_title(key: str) -> str:
    """The short title of a bibliography key (the key itself if the bibliography does
    not know it: a report is still shown, with the key to look up)."""
    try:
        return short_title(key)
    except InputError:
        return key


def sources_text(keys) -> str:
    """Short titles of several keys, in the order given, without repeats."""
    seen = []
    for k in keys:
        t = source_title(k)
        if t not in seen:
            seen.append(t)
    return "; ".join(seen)
