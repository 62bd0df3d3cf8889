"""The bibliography module (loads.sources)."""
from __future__ import annotations

import pytest

from loads.errors import InputError
from loads.sources import SOURCES, Source, cite, full

REQUIRED = [
    "RASHID4", "RASHID4_EX11_1", "RASHID4_EX11_2", "FORSYTHE_WORTHING_1925", "TOLIAS_2017",
    "WHITE_MINGES_1997", "MATSUMOTO_1999", "CODATA", "CIE15", "CIE_PHOTOPIC_V", "IES_HANDBOOK",
    "IEEE1789_2015", "IEC60898_1", "IEC61000_3_2", "IEC60725", "LRC_ASSIST_DIMMING",
    "TEXTBOOK_TRIAC", "TRADE",
]


def test_required_keys_present_and_well_formed():
    for key in REQUIRED:
        s = SOURCES[key]
        assert isinstance(s, Source) and s.authors and s.title, key
        line = cite(key)
        assert line.startswith(f"{key}: ") and "\n" not in line
        assert full(key).splitlines()[0].split() == ["key", key]


def test_recalled_entries_say_so():
    # Figures used from memory must be flagged (loads/sources.py, module docstring).
    for key in ("IES_HANDBOOK", "IEEE1789_2015", "IEC60725", "CIE_PHOTOPIC_V"):
        assert "from memory, unverified" in SOURCES[key].note, key
    assert SOURCES["TRADE"].note == "common practice, no source"


def test_entries_are_frozen():
    with pytest.raises(AttributeError):
        SOURCES["TRADE"].title = "x"  # type: ignore[misc]


def test_unknown_key_is_a_one_line_error():
    with pytest.raises(InputError) as err:
        cite("NO_SUCH_SOURCE")
    assert str(err.value) == "NO_SUCH_SOURCE: unknown source key"
