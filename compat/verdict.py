"""The overall verdict from the checks, with the cautions always attached.

* any check fails in every case considered → ``unsuitable``;
* otherwise, a check that fails only at some ends of an input given as a range (its
  result names the deciding input) → ``site-test-needed``;
* otherwise any caution → ``suitable-with-cautions``; else ``suitable``.
"""
from __future__ import annotations

from collections.abc import Sequence

from compat.cautions import cautions
from compat.report import CheckResult, Status, Verdict


def overall(checks: Sequence[CheckResult]) -> Verdict:
    """The verdict for a set of check results."""
    if any(c.status is Status.FAIL and c.deciding_input is None for c in checks):
        return Verdict.UNSUITABLE
    if any(c.status is Status.FAIL for c in checks):
        return Verdict.SITE_TEST_NEEDED
    if any(c.status is Status.CAUTION for c in checks):
        return Verdict.SUITABLE_WITH_CAUTIONS
    return Verdict.SUITABLE


def attached_cautions() -> tuple[str, ...]:
    """The safety cautions every verdict carries (always attached, whatever the verdict)."""
    return cautions()
