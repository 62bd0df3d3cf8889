"""What a check of a circuit produces: one result per check, a verdict, cautions.

These are plain, immutable records so that the command line, the Markdown report and
the terminal app all show the same thing.  The JSON keys are stable (docs/design.md,
JSON output).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from enum import StrEnum


class Status(StrEnum):
    PASS = "pass"
    CAUTION = "caution"
    FAIL = "fail"
    NOT_APPLICABLE = "not-applicable"


class Verdict(StrEnum):
    SUITABLE = "suitable"
    SUITABLE_WITH_CAUTIONS = "suitable-with-cautions"
    UNSUITABLE = "unsuitable"
    SITE_TEST_NEEDED = "site-test-needed"


@dataclass(frozen=True, slots=True, kw_only=True)
class CheckResult:
    """id: stable check id (``compat.checks.CHECK_IDS``); value/limit in ``unit``; margin: how far inside
    the limit, as a fraction of the limit (positive passes, negative fails; None where
    it has no meaning); message: one sentence for a practitioner; remedy: what to change
    (None if nothing); sources: bibliography keys behind the criterion; deciding_input:
    for a range input whose ends straddle pass and fail, the file key that decides;
    safety: a failure here is a safety matter (surge, spike, DC, overload)."""

    id: str
    status: Status
    value: float | None
    limit: float | None
    unit: str
    margin: float | None
    message: str
    remedy: str | None = None
    sources: tuple[str, ...] = ()
    deciding_input: str | None = None
    safety: bool = False
    details: dict = field(default_factory=dict)

    def to_json(self) -> dict:
        return {"id": self.id, "status": str(self.status), "value": self.value, "limit": self.limit,
                "unit": self.unit, "margin": self.margin, "message": self.message, "remedy": self.remedy,
                "sources": list(self.sources), "deciding_input": self.deciding_input, "safety": self.safety}


@dataclass(frozen=True, slots=True, kw_only=True)
class Report:
    """The whole answer for one circuit."""

    circuit: str
    verdict: Verdict
    checks: tuple[CheckResult, ...]
    sweep: tuple[dict, ...] = ()          # rows with the sweep keys (compat.evaluate.sweep_rows)
    cautions: tuple[str, ...] = ()

    def to_json(self) -> dict:
        return {"schema": 1, "circuit": self.circuit, "verdict": str(self.verdict),
                "checks": [c.to_json() for c in self.checks], "sweep": list(self.sweep),
                "cautions": list(self.cautions)}


def terminal_safe(text: str, *, keep_newlines: bool = False) -> str:
    """``text`` with every character a terminal would act on rather than show (escape
    sequences, carriage return, backspace, bell, bidirectional overrides...) written as
    its Python escape (``\\x1b``), so that a name from a file cannot retitle, clear or
    rewrite the screen.  ``keep_newlines``: leave line feeds (a whole output's lines)."""
    out = []
    for ch in str(text):
        if ch.isprintable() or (keep_newlines and ch == "\n"):
            out.append(ch)
        else:
            out.append(ch.encode("unicode_escape").decode("ascii"))
    return "".join(out)
