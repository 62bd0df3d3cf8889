"""Golden files of the demo circuit's terminal table and Markdown report.

regression: our own pinned output, not an outside reference.  The files were reviewed
by eye (the table in an 80-column terminal, the report in a Markdown viewer) when they
were written; a change to a check, a message or the layout shows here as a diff to
review.  After reviewing the new output, rewrite them with

    DIMFIT_UPDATE_GOLDEN=1 python -m pytest tests/compat/test_demo_golden.py
"""
import os
from pathlib import Path

import pytest

from compat.evaluate import evaluate
from compat.render import render_markdown, render_table
from loads.catalogue import demo_circuit

GOLDEN = Path(__file__).resolve().parent.parent / "data" / "golden"


@pytest.fixture(scope="module")
def demo():
    circuit = demo_circuit()
    return circuit, evaluate(circuit)


def _compare(name: str, text: str) -> None:
    path = GOLDEN / name
    if os.environ.get("DIMFIT_UPDATE_GOLDEN"):
        path.write_text(text, encoding="utf-8")
    expected = path.read_text(encoding="utf-8")
    assert text == expected, f"{name} differs from the reviewed golden file (see the module docstring)"


@pytest.mark.regression
@pytest.mark.slow
def test_demo_table(demo):
    _, report = demo
    _compare("demo_table.txt", render_table(report))


@pytest.mark.regression
@pytest.mark.slow
def test_demo_markdown(demo):
    circuit, report = demo
    _compare("demo_report.md", render_markdown(report, circuit))
