"""Fuzzing the reader and ``dimfit check`` (issue 13): mutated and random circuit files
give either a circuit (and a completed check) or one line and exit 2, never a
traceback.  Derandomised under CI (tests/conftest.py)."""
from __future__ import annotations

import re
from pathlib import Path

from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from compat import cli
from loads.circuit import Circuit
from loads.errors import InputError
from loads.files import parse_circuit

ROOT = Path(__file__).resolve().parents[2]
DEMO = (ROOT / "loads" / "catalogue" / "demo.toml").read_text()
# a small circuit whose check takes a few seconds
SMALL = """schema = 1
name = "small"
[supply]
voltage_v = 230.0
frequency_hz = 50.0
[dimmer]
edge = "trailing"
wiring = "with-neutral"
control = "phase"
rated_load_w = 400.0
min_load_w = 10.0
[[loads]]
name = "lamp"
kind = "filament"
count = 2
rated_power_w = 40.0
rated_voltage_v = 230.0
[[loads]]
name = "led"
kind = "electronic-driver"
count = 3
rated_power_w = 7.0
rated_voltage_v = 230.0
"""
NUMBER = re.compile(r"(?<!schema )(?<== )-?[0-9][0-9._eE+-]*")

# values that hit edges: zero, signs, tiny, huge, TOML's special floats, integers
odd_values = st.one_of(
    st.sampled_from(["0", "0.0", "-0.0", "-1", "1e-300", "5e-324", "1e300", "1.7976931348623157e308", "inf",
                     "-inf", "nan", "1e1000", "9" * 30, "true", '"x"', "[]", "{}", "{ min = 1.0, max = 2.0 }",
                     "{ min = 2.0, max = 1.0 }", "{ min = -1.0, max = 1e300 }", "1979-05-27"]),
    st.floats(allow_nan=False, allow_infinity=False).map(repr),
    st.integers(min_value=-10**6, max_value=10**6).map(str),
)
control_chars = st.lists(st.sampled_from(["\x1b", "\x07", "\r", "\x00", "\x7f", "\u202e", "\x1b[2J", "é"]),
                         min_size=1, max_size=4).map("".join)


@st.composite
def mutated(draw, base: str) -> str:
    """``base`` with a few edits: a number replaced, a line dropped or doubled, a slice
    of text replaced by junk or control characters."""
    text = base
    for _ in range(draw(st.integers(1, 3))):
        what = draw(st.sampled_from(["number", "number", "drop", "double", "junk", "control"]))
        lines = text.split("\n")
        i = draw(st.integers(0, len(lines) - 1))
        if what == "number":
            spots = list(NUMBER.finditer(text))
            if spots:
                m = spots[draw(st.integers(0, len(spots) - 1))]
                if draw(st.booleans()):
                    new = draw(odd_values)
                else:                                   # a plausible value: mostly read and checked
                    try:
                        x = float(m.group()) * draw(st.floats(0.3, 3.0))
                        new = repr(x) if re.search(r"[.eE]", m.group()) else str(max(1, round(x)))
                    except ValueError:
                        new = m.group()
                text = text[:m.start()] + new + text[m.end():]
        elif what == "drop":
            text = "\n".join(lines[:i] + lines[i + 1:])
        elif what == "double":
            text = "\n".join(lines[:i + 1] + lines[i:])
        else:
            k = draw(st.integers(0, len(text)))
            n = draw(st.integers(0, 8))
            junk = draw(control_chars) if what == "control" else draw(st.text(max_size=8))
            text = text[:k] + junk + text[k + n:]
    return text


def _read(text: str):
    """The reader's answer: a circuit, or an InputError whose message is one line."""
    try:
        return parse_circuit(text, "fuzz.toml")
    except InputError as err:
        message = str(err)
        assert "\n" not in message and "\r" not in message and "\x1b" not in message, repr(message)
        assert message.startswith("fuzz.toml")
        return err


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.one_of(mutated(DEMO), mutated(SMALL), st.text(max_size=300)))
def test_the_reader_gives_a_circuit_or_one_line(text):
    got = _read(text)
    assert isinstance(got, (Circuit, InputError))


@settings(max_examples=8, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(text=mutated(SMALL))
@example(text=SMALL.replace("count = 3", "count = 5"))
def test_check_on_a_mutated_file_completes_or_exits_2_with_one_line(text, tmp_path, capsys):
    path = tmp_path / "fuzz.toml"
    path.write_text(text, encoding="utf-8")
    code = cli.main(["check", str(path)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err and "\x1b" not in captured.out + captured.err
    if code == 2:
        lines = captured.err.splitlines()
        assert len(lines) == 1 and lines[0].startswith("dimfit: error: "), captured.err
    else:
        assert code in (0, 1), captured.err          # a completed check: a verdict
        assert "Verdict:" in captured.out
        assert all(line.startswith("dimfit: warning: ") for line in captured.err.splitlines()), captured.err
        COMPLETED.append(code)


COMPLETED: list[int] = []


def test_some_fuzzed_checks_completed():
    # the fuzzing above is worth something only if some mutated files made it through a
    # whole check (runs after it in file order)
    assert COMPLETED
