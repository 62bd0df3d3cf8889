"""Circuit files and profile files: strict reading, exact writing (docs/design.md, Files).

Files are TOML, read with :mod:`tomllib` and written with :mod:`tomli_w`.  Inside the
code every quantity is SI; in the files a practitioner's unit is part of the key name
(``holding_current_ma = 25.0``).  This module is the one place that converts: the key
table below is built from the model dataclasses' fields plus a small unit map
(``_FILE_UNIT``) naming the fields whose file unit differs from SI.

Reading is strict: unknown keys, wrong types, values the models reject, missing
required keys, an unknown ``kind`` and malformed TOML all raise
:class:`loads.errors.InputError` whose ``str()`` is one line,
``FILE:LINE: KEY: reason``.  Keys inside arrays of tables are named like
``loads[2].rated_power_w`` (1-based).

Inputs a practitioner cannot know may be given as a range ``{min = .., max = ..}``
(only for the keys in ``RANGEABLE``); the circuit carries the midpoint and
``Circuit.ranges`` records the range.

Writing is exact and safe: values are formatted by tomli_w, tables and keys laid out
in field order with ranges as inline tables; every field is written (None-valued optional fields are
left out, TOML has no null), in a stable order, floats rounded to 12 significant
digits in the file's unit so that 47 nF is written as 47.0; write → read → write gives
the same bytes.  Files are written to a temporary file in the same folder and renamed
into place; an existing file is replaced only when ``overwrite=True``.
"""
from __future__ import annotations

import dataclasses
import difflib
import enum
import math
import os
import re
import tempfile
import tomllib
import types
import typing
from dataclasses import dataclass
from pathlib import Path

import tomli_w

from loads.breaker import Breaker
from loads.circuit import LOAD_CLASSES, Circuit, Range, paired_values
from loads.dimmer import Dimmer, RcDiac
from loads.errors import InputError
from loads.linear import Linear
from loads.load import LoadGroup, LoadKind
from loads.supply import Supply

SCHEMA = 1

# ---------------------------------------------------------------------------------
# The unit map: file unit suffix -> (SI suffix of the field, file units per SI unit,
# unit as shown in messages).  The factors are exact powers of ten.
_UNITS: dict[str, tuple[str, float, str]] = {
    "ma": ("a", 1e3, "mA"),
    "uh": ("h", 1e6, "µH"),
    "mh": ("h", 1e3, "mH"),
    "nf": ("f", 1e9, "nF"),
    "uf": ("f", 1e6, "µF"),
    "us": ("s", 1e6, "µs"),
    "ms": ("s", 1e3, "ms"),
    "pct": ("fraction", 100.0, "%"),
    "a_per_ms": ("a_per_s", 1e-3, "A/ms"),
}
_SI_SYMBOL = {"a": "A", "h": "H", "f": "F", "s": "s", "fraction": "", "a_per_s": "A/s"}

# Fields whose file unit is not the SI unit (engineering choice: the unit printed on
# parts and used on site – triac currents in mA, chokes in µH, film capacitors in nF,
# electrolytics in µF, gate pulses in µs, light in %).  Every other field keeps its
# SI name in the file.  tests/loads/test_files.py checks that no field ending in _h,
# _f, _s or _fraction is missing here.
_FILE_UNIT: dict[str, str] = {
    "holding_current_a": "ma",
    "latching_current_a": "ma",
    "gate_trigger_current_a": "ma",
    "self_supply_a": "ma",
    "bleeder_a": "ma",
    "diac_off_current_a": "ma",
    "source_inductance_h": "uh",
    "choke_inductance_h": "uh",
    "inductance_h": "mh",
    "wiring_capacitance_f": "nf",
    "timing_capacitance_f": "nf",
    "snubber_capacitance_f": "nf",
    "turn_off_time_s": "us",
    "trip_delay_s": "us",
    "triac_turn_off_time_s": "us",
    "commutating_di_dt_a_per_s": "a_per_ms",
    "input_capacitance_f": "nf",
    "parallel_capacitance_f": "nf",
    "series_capacitance_f": "nf",
    "bulk_capacitance_f": "uf",
    "gate_window_s": "us",
    "soft_start_s": "ms",
    "min_light_fraction": "pct",
}

# Inputs that may be given as {min, max}: (class, field).
RANGEABLE: frozenset[tuple[type, str]] = frozenset({
    (Dimmer, "holding_current_a"), (Dimmer, "latching_current_a"),
    (Dimmer, "gate_trigger_current_a"), (Dimmer, "self_supply_a"), (Dimmer, "trip_current_a"),
    (RcDiac, "breakover_v"),
    (Supply, "source_resistance_ohm"), (Supply, "source_inductance_h"),
    *((LOAD_CLASSES[LoadKind.ELECTRONIC_DRIVER], f) for f in
      ("input_capacitance_f", "bulk_capacitance_f", "series_resistance_ohm", "start_voltage_v", "bleeder_a",
       "input_damping_ohm")),
})



class Physical(typing.NamedTuple):
    """The physical range of one numeric key, in the key's FILE unit.

    Outside ``low``–``high`` a value is refused (one-line error): no real part has it,
    and the simulator's steps collapse or a division by zero waits there.  Inside, but
    outside ``usual_low``–``usual_high``, it is read with a one-line warning (legal but
    unusual: check the figure).  ``zero``: exactly 0 is also accepted and means "none"
    (no snubber, no choke...), which the models treat as absent rather than tiny."""

    low: float
    high: float
    usual_low: float
    usual_high: float
    zero: bool = False


# The file reference's physical ranges, per field (SI field name; the bounds in the
# file unit of its key).  Origins: the outer bounds are engineering choices, a decade
# or more beyond any part of the trade (common practice, no source) and inside what the
# simulator resolves; the usual bounds are the span of ordinary parts (common practice,
# no source).  tests/loads/test_physical_ranges.py checks that every float key has a row.
PHYSICAL: dict[str, Physical] = {
    # supply
    "voltage_v": Physical(10.0, 1000.0, 90.0, 300.0),
    "frequency_hz": Physical(10.0, 1000.0, 45.0, 65.0),
    "source_resistance_ohm": Physical(0.0, 100.0, 0.01, 5.0, zero=True),   # 0: an ideal source
    "source_inductance_h": Physical(0.0, 1e5, 1.0, 5000.0, zero=True),     # µH; 0: an ideal source
    "wiring_capacitance_f": Physical(0.01, 1e4, 0.1, 200.0, zero=True),  # nF (≈ 100 pF/m of cable)
    # breaker
    "rated_current_a": Physical(0.5, 125.0, 2.0, 63.0),
    "instantaneous_trip_a": Physical(1.0, 1e5, 5.0, 2000.0),
    # rc-diac timing network
    "fixed_resistance_ohm": Physical(10.0, 1e7, 470.0, 1e5),
    "variable_resistance_ohm": Physical(0.0, 1e8, 1e4, 2e6),
    "timing_capacitance_f": Physical(1.0, 1e4, 22.0, 1000.0),       # nF
    "breakover_v": Physical(5.0, 200.0, 20.0, 45.0),
    "snapback_v": Physical(0.0, 100.0, 1.0, 20.0),
    "asymmetry_v": Physical(-50.0, 50.0, -5.0, 5.0),
    "gate_resistance_ohm": Physical(1.0, 1e5, 10.0, 2000.0),
    "diac_off_current_a": Physical(0.001, 100.0, 0.1, 10.0),          # mA
    # dimmer
    "rated_load_w": Physical(1.0, 1e4, 20.0, 3600.0),
    "rated_transformer_va": Physical(1.0, 1e4, 20.0, 3600.0),
    "rated_led_w": Physical(1.0, 1e4, 5.0, 2000.0),
    "min_load_w": Physical(0.0, 1e4, 0.0, 100.0),
    "ambient_temperature_c": Physical(-20.0, 60.0, -10.0, 45.0),
    "holding_current_a": Physical(0.01, 1000.0, 1.0, 100.0),         # mA
    "latching_current_a": Physical(0.01, 2000.0, 1.0, 200.0),        # mA
    "gate_trigger_current_a": Physical(0.01, 1000.0, 1.0, 100.0),    # mA
    "gate_window_s": Physical(1.0, 9999.0, 10.0, 5000.0),            # µs
    "on_state_voltage_v": Physical(0.0, 4.99, 0.5, 2.0, zero=True),   # 0: an ideal switch
    "on_state_resistance_ohm": Physical(1e-4, 10.0, 1e-3, 1.0),
    "surge_peak_a": Physical(1.0, 1e4, 10.0, 1000.0),
    "surge_i2t_a2s": Physical(0.01, 1e5, 0.5, 5000.0),
    "repetitive_peak_a": Physical(0.1, 1000.0, 1.0, 200.0),
    "commutating_di_dt_a_per_s": Physical(0.0, 1e4, 0.5, 100.0),     # A/ms
    "triac_turn_off_time_s": Physical(0.0, 1000.0, 5.0, 200.0),      # µs
    "choke_inductance_h": Physical(1.0, 1e5, 10.0, 2000.0, zero=True),  # µH
    "snubber_capacitance_f": Physical(0.1, 1e4, 4.7, 470.0, zero=True),  # nF
    "snubber_resistance_ohm": Physical(1.0, 1e6, 10.0, 1e4),
    "self_supply_a": Physical(0.01, 100.0, 0.1, 20.0, zero=True),    # mA
    "clamp_voltage_v": Physical(50.0, 2000.0, 150.0, 1000.0),
    "turn_off_time_s": Physical(0.1, 1000.0, 5.0, 300.0, zero=True),  # µs
    "trip_current_a": Physical(0.1, 1000.0, 1.0, 100.0),
    "trip_delay_s": Physical(0.0, 1000.0, 0.0, 100.0, zero=True),     # µs
    "soft_start_s": Physical(0.0, 5000.0, 0.0, 1000.0),              # ms
    "min_firing_angle_deg": Physical(0.0, 180.0, 0.0, 60.0),
    "max_firing_angle_deg": Physical(0.0, 180.0, 120.0, 180.0),
    # every lamp group
    "rated_power_w": Physical(0.1, 1e4, 1.0, 2000.0),
    "rated_voltage_v": Physical(10.0, 1000.0, 90.0, 300.0),
    # filament
    "operating_temperature_k": Physical(1500.0, 3400.0, 2300.0, 3300.0),
    "ambient_temperature_k": Physical(250.0, 400.0, 263.0, 318.0),
    # transformers
    "rated_va": Physical(0.1, 1e4, 5.0, 1000.0),
    "secondary_voltage_v": Physical(0.5, 1000.0, 6.0, 48.0),
    "lamp_power_w": Physical(0.0, 2e4, 1.0, 1000.0),
    "winding_resistance_pct": Physical(0.01, 49.99, 1.0, 20.0),
    "leakage_reactance_pct": Physical(0.01, 49.99, 0.5, 20.0),
    "magnetising_current_pct": Physical(0.01, 49.99, 1.0, 30.0),
    "core_loss_pct": Physical(0.01, 49.99, 0.5, 10.0),
    "saturation_flux_ratio": Physical(1.001, 2.999, 1.05, 2.0),
    "saturated_inductance_ratio": Physical(1e-4, 0.999, 1e-3, 0.2),
    # electronic drivers and transformers
    "input_capacitance_f": Physical(0.01, 1e5, 1.0, 1000.0, zero=True),   # nF
    "series_resistance_ohm": Physical(0.01, 1e4, 0.5, 200.0),
    "input_damping_ohm": Physical(0.1, 1e5, 10.0, 1000.0, zero=True),   # 0: no damper
    "bulk_capacitance_f": Physical(1e-4, 1e4, 0.47, 1000.0),              # µF
    "start_voltage_v": Physical(0.0, 1500.0, 10.0, 300.0),
    "stop_voltage_v": Physical(0.1, 1500.0, 5.0, 300.0),
    "bleeder_a": Physical(0.0, 1000.0, 0.0, 50.0),                        # mA
    "min_light_fraction": Physical(0.0, 99.9, 0.1, 20.0),                 # %
    "converter_power_w": Physical(0.1, 1e4, 0.5, 2000.0),
    # linear (and the correction device)
    "resistance_ohm": Physical(0.1, 1e7, 1.0, 1e5),
    "inductance_h": Physical(1e-3, 1e5, 0.01, 5000.0, zero=True),        # mH
    "parallel_capacitance_f": Physical(0.01, 1e5, 1.0, 1e4, zero=True),  # nF
    "series_capacitance_f": Physical(1.0, 1e5, 10.0, 1e4, zero=True),    # nF
}

# Units of keys kept in SI, for messages (the suffix of the key).
_SUFFIX_UNIT = {"_v": "V", "_hz": "Hz", "_ohm": "Ω", "_w": "W", "_va": "VA", "_a": "A", "_k": "K", "_c": "°C",
                "_deg": "°", "_a2s": "A²s"}


def unit_of(key: "Key") -> str:
    """The unit of a file key as shown in messages ("" for ratios)."""
    if key.file_unit:
        return key.file_unit
    return next((u for suffix, u in _SUFFIX_UNIT.items() if key.file_key.endswith(suffix)), "")


@dataclass(frozen=True, slots=True)
class Key:
    """One file key of one dataclass.

    field: dataclass field (SI name); file_key: the key in the file; per_si: file
    units per SI unit (1 for unscaled keys); kind: float | int | bool | str | enum |
    table; optional: None is allowed (the key may be left out and is not written);
    enum: the StrEnum for kind "enum", the nested dataclass for kind "table"; rangeable: may be written as {min, max}."""

    field: str
    file_key: str
    per_si: float
    kind: str
    optional: bool
    enum: type | None
    rangeable: bool
    file_unit: str = ""
    si_unit: str = ""


def _classify(hint) -> tuple[str, bool, type | None]:
    optional = False
    args = typing.get_args(hint)
    if typing.get_origin(hint) in (typing.Union, types.UnionType):
        optional = type(None) in args
        rest = [a for a in args if a is not type(None)]
        if len(rest) != 1:
            raise TypeError(f"unsupported field type {hint!r}")
        hint = rest[0]
    if hint is bool:
        return "bool", optional, None
    if hint is int:
        return "int", optional, None
    if hint is float:
        return "float", optional, None
    if hint is str:
        return "str", optional, None
    if isinstance(hint, type) and issubclass(hint, enum.Enum):
        return "enum", optional, hint
    if isinstance(hint, type) and dataclasses.is_dataclass(hint):
        return "table", optional, hint
    raise TypeError(f"unsupported field type {hint!r}")


def _keys_of(cls: type) -> dict[str, Key]:
    """File key -> Key for every field of ``cls``, in field order."""
    hints = typing.get_type_hints(cls)
    table: dict[str, Key] = {}
    for f in dataclasses.fields(cls):
        kind, optional, enum_type = _classify(hints[f.name])
        file_key, per_si, file_unit, si_unit = f.name, 1.0, "", ""
        unit = _FILE_UNIT.get(f.name)
        if unit is not None:
            si_suffix, per_si, file_unit = _UNITS[unit]
            if not f.name.endswith("_" + si_suffix):
                raise TypeError(f"{cls.__name__}.{f.name}: unit map says _{si_suffix}")
            file_key = f.name[: -len(si_suffix)] + unit
            si_unit = _SI_SYMBOL[si_suffix]
        table[file_key] = Key(f.name, file_key, per_si, kind, optional, enum_type,
                              (cls, f.name) in RANGEABLE, file_unit, si_unit)
    return table


KEYS: dict[type, dict[str, Key]] = {
    cls: _keys_of(cls) for cls in (Supply, Breaker, RcDiac, Dimmer, *LOAD_CLASSES.values())
}

# The correction device is a Linear load restricted to these keys.
CORRECTION_KEYS = ("name", "count", "resistance_ohm", "series_capacitance_nf")

# Keys a file must give (engineering choice: what is printed on the part or known on
# site; everything else has a documented default in the model).
REQUIRED: dict[type, tuple[str, ...]] = {
    Supply: ("voltage_v", "frequency_hz"),
    Breaker: ("curve", "rated_current_a"),
    RcDiac: (),
    Dimmer: ("edge", "wiring", "control", "rated_load_w", "min_load_w"),
    LOAD_CLASSES[LoadKind.FILAMENT]: ("rated_power_w", "rated_voltage_v"),
    LOAD_CLASSES[LoadKind.MAGNETIC_TRANSFORMER]: ("rated_voltage_v", "rated_va", "secondary_voltage_v", "lamp_power_w"),
    LOAD_CLASSES[LoadKind.ELECTRONIC_DRIVER]: ("rated_power_w", "rated_voltage_v"),
    LOAD_CLASSES[LoadKind.ELECTRONIC_TRANSFORMER]: ("rated_voltage_v", "rated_va", "lamp_power_w"),
    Linear: ("resistance_ohm",),
}
_CORRECTION_REQUIRED = ("resistance_ohm", "series_capacitance_nf")

_CIRCUIT_TOP = ("schema", "name", "supply", "breaker", "dimmer", "loads", "correction")
_PROFILE_TOP = ("schema", "dimmer", "loads")


def file_key_of(cls: type, field: str) -> str:
    """The file key of a dataclass field (``holding_current_a`` → ``holding_current_ma``)."""
    for key in KEYS[cls].values():
        if key.field == field:
            return key.file_key
    return field


# ---------------------------------------------------------------------------------
# Where keys are in the text (for FILE:LINE in messages).

_BARE = r'[A-Za-z0-9_-]+|"(?:[^"\\]|\\.)*"|\'[^\']*\''
_DOTTED = rf'(?:{_BARE})(?:\s*\.\s*(?:{_BARE}))*'
_AOT_RE = re.compile(rf'^\s*\[\[\s*({_DOTTED})\s*\]\]')
_TABLE_RE = re.compile(rf'^\s*\[\s*({_DOTTED})\s*\]')
_KEY_RE = re.compile(rf'^\s*({_DOTTED})\s*=')
_PART_RE = re.compile(_BARE)


def _parts(dotted: str) -> list[str]:
    out = []
    for p in _PART_RE.findall(dotted):
        if p[:1] in "\"'":
            p = p[1:-1]
        out.append(p)
    return out


def _line_index(text: str) -> dict[str, int]:
    """Dotted key path (``loads[2].rated_power_w``, ``dimmer.rc_diac``) -> 1-based line.

    A light scan, good enough to point at a line; the parsing itself is tomllib's."""
    index: dict[str, int] = {}
    aot_count: dict[str, int] = {}
    current: list[str] = []
    in_multiline = None
    for lineno, line in enumerate(text.splitlines(), start=1):
        if in_multiline:
            if line.count(in_multiline) % 2 == 1:
                in_multiline = None
            continue
        m = _AOT_RE.match(line)
        if m:
            name = ".".join(_parts(m.group(1)))
            aot_count[name] = aot_count.get(name, 0) + 1
            current = [f"{name}[{aot_count[name]}]"]
            index.setdefault(current[0], lineno)
            _index_parents(index, name.split(".") + [""], lineno)    # the array itself: its first table
        else:
            m = _TABLE_RE.match(line)
            if m:
                parts = _parts(m.group(1))
                if parts and parts[0] in aot_count:       # sub-table of the last [[x]]
                    parts = [f"{parts[0]}[{aot_count[parts[0]]}]"] + parts[1:]
                current = [".".join(parts)]
                index.setdefault(current[0], lineno)
                _index_parents(index, parts, lineno)   # [a.b] alone also defines a
            else:
                m = _KEY_RE.match(line)
                if m:
                    path = ".".join(current + _parts(m.group(1)))
                    index.setdefault(path, lineno)
        for quote in ('"""', "'''"):
            if line.count(quote) % 2 == 1:
                in_multiline = quote
                break
    return index


def _index_parents(index: dict[str, int], parts: list[str], lineno: int) -> None:
    """Point each enclosing table of a header (``dimmer`` for ``[dimmer.rc_diac]``) at
    it, where the file has no header of its own for that table (yet)."""
    for i in range(1, len(parts)):
        index.setdefault(".".join(parts[:i]), lineno)


class _Context:
    """The file being read: its name and where its keys are."""

    def __init__(self, text: str, source: str, notes: list[str] | None = None) -> None:
        self.source = source
        self._text = text
        self._index: dict[str, int] | None = None
        self.notes = notes

    def warn(self, path: str | None, reason: str) -> None:
        """A one-line warning (legal but unusual), kept where the caller asked."""
        if self.notes is not None:
            self.notes.append(str(self.error(path, reason)))

    def line_of(self, path: str | None) -> int | None:
        if not path:
            return None
        if self._index is None:
            self._index = _line_index(self._text)
        while path:
            if path in self._index:
                return self._index[path]
            cut = max(path.rfind("."), path.rfind("["))
            if cut <= 0:
                return None
            path = path[:cut]
        return None

    def error(self, path: str | None, reason: str) -> InputError:
        return InputError(reason, key=_show(path) if path else None, file=self.source, line=self.line_of(path))


def _show(key: str) -> str:
    """A key as shown in a one-line message (control characters escaped)."""
    return key.encode("unicode_escape").decode("ascii") if not key.isprintable() else key


def _fmt(x: float) -> str:
    return f"{x:.12g}"


def _round12(x: float) -> float:
    """Round to 12 significant digits (so 47 nF writes as 47.0, not 46.99999999)."""
    return float(f"{x:.12g}")


# ---------------------------------------------------------------------------------
# Reading.

def _convert(ctx: _Context, path: str, key: Key, value):
    """One file value -> the dataclass value (SI)."""
    want = {"float": "a number", "int": "a whole number", "bool": "true or false",
            "str": "a text string in quotes", "enum": "one of " + ", ".join(
                f'"{m.value}"' for m in key.enum) if key.enum else ""}.get(key.kind, "")
    if key.kind == "float":
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise ctx.error(path, f"must be {want}, not {_type_name(value)}")
        try:
            number = float(value)
        except OverflowError:
            raise ctx.error(path, "number is too large") from None
        if not math.isfinite(number):
            raise ctx.error(path, f"must be a finite number, not {value!r}")
        return number / key.per_si if key.per_si != 1.0 else number
    if key.kind == "int":
        if isinstance(value, bool) or not isinstance(value, int):
            raise ctx.error(path, f"must be {want}, not {_type_name(value)}")
        if abs(value) > 10**9:
            raise ctx.error(path, f"{value} is too large")
        return value
    if key.kind == "bool":
        if not isinstance(value, bool):
            raise ctx.error(path, f"must be {want}, not {_type_name(value)}")
        return value
    if key.kind == "str":
        if not isinstance(value, str):
            raise ctx.error(path, f"must be {want}, not {_type_name(value)}")
        return value
    if key.kind == "enum":
        if not isinstance(value, str):
            raise ctx.error(path, f"must be {want}, not {_type_name(value)}")
        try:
            return key.enum(value)
        except ValueError:
            raise ctx.error(path, f"{_show(repr(value))} is not {want}") from None
    raise AssertionError(key.kind)


def _type_name(value) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, int):
        return "a whole number"
    if isinstance(value, float):
        return "a decimal number"
    if isinstance(value, str):
        return "a text string"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "an array"
    return "a date/time"


def _unknown(ctx: _Context, path: str, key: str, allowed: typing.Iterable[str]) -> InputError:
    close = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
    hint = f" (did you mean '{close[0]}'?)" if close else ""
    return ctx.error(path, "unknown key" + hint)


def _si_reason(key: Key, si_value, reason: str) -> str:
    """Restate a model's message about an SI value in the file's unit."""
    if key.per_si == 1.0 or not isinstance(si_value, float):
        return reason
    head = repr(si_value)
    if not reason.startswith(head + " "):
        return reason
    rest = reason[len(head) + 1:]
    file_value = _fmt(si_value * key.per_si)
    if key.si_unit and rest.startswith(key.si_unit + " "):
        return f"{file_value} {key.file_unit} {rest[len(key.si_unit) + 1:]}"
    shown = f"{_fmt(si_value)} {key.si_unit}".strip() if key.si_unit else f"{_fmt(si_value)} as a fraction"
    return f"{file_value} {key.file_unit} (= {shown}) {rest}"


def _model_error(ctx: _Context, prefix: str, cls: type, kwargs: dict, err: InputError, note: str = "") -> InputError:
    """Translate a dataclass's InputError (SI field) to the file key and line."""
    field = err.key
    reason = err.reason
    key = None
    if field:
        key = next((k for k in KEYS[cls].values() if k.field == field), None)
    if key is not None:
        if reason.startswith("None "):
            reason = reason[5:]
        reason = _si_reason(key, kwargs.get(field), reason)
        path = f"{prefix}.{key.file_key}" if prefix else key.file_key
    else:
        path = f"{prefix}.{field}" if prefix and field else (prefix or field)
    return ctx.error(path, reason + note)


def physical_problem(key: Key, file_value) -> tuple[str, str] | None:
    """("error" | "warning", reason) for a file value outside its key's physical or
    usual range (``PHYSICAL``), else None."""
    row = PHYSICAL.get(key.field)
    if row is None or file_value is None:
        return None
    x = float(file_value)
    if row.zero and x == 0.0:
        return None
    unit = unit_of(key)
    u = f" {unit}" if unit else ""
    if not row.low <= x <= row.high:
        zero = " (or 0 for none)" if row.zero else ""
        return "error", (f"{_fmt(x)}{u} is not physical for this key: the file reference allows "
                         f"{_fmt(row.low)}–{_fmt(row.high)}{u}{zero}")
    if not row.usual_low <= x <= row.usual_high:
        return "warning", (f"{_fmt(x)}{u} is unusual (ordinary parts: {_fmt(row.usual_low)}–"
                           f"{_fmt(row.usual_high)}{u}); check the figure")
    return None


def _check_physical(ctx: "_Context", path: str, key: Key, file_value, prefix: str = "") -> None:
    found = physical_problem(key, file_value)
    if found is None:
        return
    level, reason = found
    if level == "error":
        raise ctx.error(path, prefix + reason)
    ctx.warn(path, prefix + reason)


def check_physical(cls: type, field: str, si_value) -> str | None:
    """For a value typed outside a file (the app): raise InputError if ``si_value`` is
    outside the field's physical range; return the one-line warning if it is unusual."""
    key = next((k for k in KEYS.get(cls, {}).values() if k.field == field), None)
    if key is None or si_value is None or key.kind not in ("float", "int") or isinstance(si_value, bool):
        return None
    found = physical_problem(key, float(si_value) * key.per_si)
    if found is None:
        return None
    if found[0] == "error":
        raise InputError(found[1], key=key.file_key)
    return f"{key.file_key}: {found[1]}"


def _read_range(ctx: _Context, path: str, key: Key, value: dict) -> tuple[float, float]:
    if set(value) != {"min", "max"}:
        extra = sorted(set(value) - {"min", "max"})
        what = f"unknown key '{_show(extra[0])}'" if extra else "min and max are both needed"
        raise ctx.error(path, f"a range takes exactly min and max ({what})")
    low = _convert(ctx, path, key, value["min"])
    high = _convert(ctx, path, key, value["max"])
    if low > high:
        raise ctx.error(path, f"range min {_fmt(value['min'])} is above max {_fmt(value['max'])}")
    return low, high


def _read_table(ctx: _Context, cls: type, table, prefix: str, *, allowed: typing.Sequence[str] | None = None,
                required: typing.Sequence[str] | None = None, skip: typing.Sequence[str] = ()
                ) -> tuple[object, list[Range]]:
    """Build ``cls`` from a file table; returns the object and its ranges."""
    if not isinstance(table, dict):
        raise ctx.error(prefix, f"must be a table, not {_type_name(table)}")
    keys = KEYS[cls]
    allowed_keys = list(allowed) if allowed is not None else list(keys)
    required_keys = REQUIRED[cls] if required is None else required
    kwargs: dict[str, object] = {}
    ranged: dict[str, tuple[float, float, str]] = {}     # field -> (low, high, file path)
    nested_ranges: list[Range] = []
    physical: list[tuple[str, Key, object, str]] = []   # checked once the model has had its say
    for name, value in table.items():
        if name in skip:
            continue
        path = f"{prefix}.{name}"
        if name not in allowed_keys or name not in keys:
            raise _unknown(ctx, path, name, allowed_keys)
        key = keys[name]
        if key.kind == "table":
            obj, sub_ranges = _read_table(ctx, key.enum, value, path)
            kwargs[key.field] = obj
            nested_ranges.extend(sub_ranges)
            continue
        if isinstance(value, dict) and key.kind == "float":
            if not key.rangeable:
                raise ctx.error(path, "a range {min, max} is not allowed for this key; give one value")
            low, high = _read_range(ctx, path, key, value)
            for end, bound in (("min", value["min"]), ("max", value["max"])):
                physical.append((path, key, bound, f"range {end}: "))
            ranged[key.field] = (low, high, path)
            kwargs[key.field] = 0.5 * (low + high)
            continue
        kwargs[key.field] = _convert(ctx, path, key, value)
        if key.kind in ("float", "int"):
            physical.append((path, key, value, ""))
    for name in required_keys:
        if name not in table:
            raise ctx.error(f"{prefix}.{name}", "required key is missing")
    for key in keys.values():                      # optional nested tables absent: None
        if key.kind == "table" and key.field not in kwargs and key.optional:
            kwargs[key.field] = None
    try:
        obj = cls(**kwargs)
    except InputError as err:
        raise _model_error(ctx, prefix, cls, kwargs, err) from None
    except ArithmeticError:          # a value so far out that the model's own sums fail
        for args in physical:
            _check_physical(ctx, *args)
        raise
    for field, (low, high, path) in ranged.items():
        for end, bound in (("min", low), ("max", high)):
            # each end as the evaluation builds it: the others at their midpoints, a
            # field kept in order with this one moved with it (latching ≥ holding)
            trial = paired_values(cls, kwargs, field, bound)
            try:
                cls(**trial)
            except InputError as err:
                file_key = path.rsplit(".", 1)[1]
                if err.key == field:
                    e = _model_error(ctx, prefix, cls, trial, err)
                    raise InputError(f"range {end}: {e.reason}", key=e.key, file=e.file, line=e.line) from None
                raise _model_error(ctx, prefix, cls, trial, err,
                                   note=f" (with {file_key} at its {end} {_fmt(bound * keys[file_key].per_si)})") from None
    for args in physical:
        _check_physical(ctx, *args)
    ranges = [Range(f"{prefix}.{field}", path, low, high) for field, (low, high, path) in ranged.items()]
    return obj, nested_ranges + ranges


def _read_load(ctx: _Context, table, path: str) -> tuple[LoadGroup, list[Range]]:
    if not isinstance(table, dict):
        raise ctx.error(path, f"must be a table, not {_type_name(table)}")
    if "kind" not in table:
        raise ctx.error(f"{path}.kind", "required key is missing (one of "
                        + ", ".join(f'"{k.value}"' for k in LoadKind) + ")")
    kind = table["kind"]
    if not isinstance(kind, str) or kind not in {k.value for k in LoadKind}:
        raise ctx.error(f"{path}.kind", f"unknown load kind {_show(repr(kind))} (one of "
                        + ", ".join(f'"{k.value}"' for k in LoadKind) + ")")
    cls = LOAD_CLASSES[LoadKind(kind)]
    return _read_table(ctx, cls, table, path, skip=("kind",))


def _read_loads(ctx: _Context, value) -> tuple[list[LoadGroup], list[Range]]:
    if not isinstance(value, list):
        raise ctx.error("loads", "must be an array of tables, written [[loads]]")
    groups, ranges = [], []
    for i, table in enumerate(value, start=1):
        group, group_ranges = _read_load(ctx, table, f"loads[{i}]")
        groups.append(group)
        ranges.extend(group_ranges)
    return groups, ranges


def _load_toml(text: str, source: str, notes: list[str] | None = None) -> tuple[dict, _Context]:
    ctx = _Context(text, source, notes)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        message = str(err)
        line = None
        m = re.search(r"\s*\(at line (\d+), column (\d+)\)$", message)
        if m:
            line = int(m.group(1))
            message = message[: m.start()] + f" at column {m.group(2)}"
        elif message.endswith("(at end of document)"):
            line = max(1, text.count("\n") + (0 if text.endswith("\n") else 1))
            message = message[: -len("(at end of document)")].rstrip() + " at the end of the file"
        message = message[:1].lower() + message[1:]
        raise InputError(f"malformed TOML: {_show(message)}", file=source, line=line) from None
    except (ValueError, RecursionError) as err:     # e.g. integers beyond Python's digit limit
        text_err = str(err).splitlines()[0] if str(err) else type(err).__name__
        if "int_max_str_digits" in text_err or "integer string conversion" in text_err:
            # Python's own advice (sys.set_int_max_str_digits) means nothing to a user
            m = re.search(r"value has (\d+) digits", text_err)
            digits = f" ({m.group(1)} digits)" if m else ""
            text_err = f"a whole number is far too long{digits}; no key takes a number that large"
        elif isinstance(err, RecursionError):
            text_err = "arrays or tables nested too deeply"
        long_number = re.search(r"[0-9_]{4000,}", text)
        line = text.count("\n", 0, long_number.start()) + 1 if long_number else None
        raise InputError(f"malformed TOML: {_show(text_err)}", file=source, line=line) from None
    _check_schema(ctx, data)
    return data, ctx


def _check_schema(ctx: _Context, data: dict) -> None:
    if "schema" not in data:
        raise InputError("required key is missing (write schema = 1 at the top)", key="schema", file=ctx.source, line=1)
    schema = data["schema"]
    if isinstance(schema, bool) or not isinstance(schema, int):
        raise ctx.error("schema", f"must be the whole number {SCHEMA}, not {_type_name(schema)}")
    if schema != SCHEMA:
        raise ctx.error("schema", f"unsupported schema {schema} (this version reads schema {SCHEMA})")


def _decode(raw: bytes, source: str) -> str:
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError as err:
        raise InputError(f"not a UTF-8 text file (bad byte at offset {err.start})", file=source) from None


def _read_bytes(path) -> bytes:
    try:
        return Path(path).read_bytes()
    except OSError as err:
        raise InputError(f"cannot read the file: {err.strerror or err}", file=str(path)) from None


def parse_circuit(text: str, source: str = "<string>", *, notes: list[str] | None = None) -> Circuit:
    """A circuit from the text of a circuit file; ``source`` names it in messages.
    ``notes``: a list that gets one line per legal but unusual value (``PHYSICAL``)."""
    data, ctx = _load_toml(text, source, notes)
    for name in data:
        if name not in _CIRCUIT_TOP:
            raise _unknown(ctx, name, name, _CIRCUIT_TOP)
    for name in ("supply", "dimmer", "loads"):
        if name not in data:
            what = "[[loads]] tables (at least one lamp group)" if name == "loads" else f"[{name}] table"
            raise InputError(f"required {what} is missing", key=name, file=source)
    name = data.get("name", "circuit")
    if not isinstance(name, str):
        raise ctx.error("name", f"must be a text string in quotes, not {_type_name(name)}")
    ranges: list[Range] = []
    supply, r = _read_table(ctx, Supply, data["supply"], "supply")
    ranges += r
    breaker = None
    if "breaker" in data:
        breaker, r = _read_table(ctx, Breaker, data["breaker"], "breaker")
        ranges += r
    dimmer, r = _read_table(ctx, Dimmer, data["dimmer"], "dimmer")
    ranges += r
    loads, r = _read_loads(ctx, data["loads"])
    ranges += r
    correction = None
    if "correction" in data:
        correction, r = _read_table(ctx, Linear, data["correction"], "correction",
                                    allowed=CORRECTION_KEYS, required=_CORRECTION_REQUIRED)
        ranges += r
    try:
        return Circuit(name=name, supply=supply, breaker=breaker, dimmer=dimmer, loads=tuple(loads),
                       correction=correction, ranges=tuple(ranges))
    except InputError as err:
        key = err.key
        if key == "loads" and len(loads) > 1:
            key = f"loads[{min(len(loads), 13)}]"     # too many: point at the first one too many
        raise ctx.error(key, err.reason) from None


def read_circuit(path, *, notes: list[str] | None = None) -> Circuit:
    """Read a circuit file [path]; ``notes``: see ``parse_circuit``."""
    return parse_circuit(_decode(_read_bytes(path), str(path)), str(path), notes=notes)


def parse_profile(text: str, source: str = "<string>") -> tuple[Dimmer | list[LoadGroup], tuple[Range, ...]]:
    """A profile (one [dimmer] or one or more [[loads]]) and any ranges in it.

    Range paths are ``dimmer.…`` or ``loads[i].…`` as in a circuit file."""
    data, ctx = _load_toml(text, source)
    for name in data:
        if name not in _PROFILE_TOP:
            raise _unknown(ctx, name, name, _PROFILE_TOP)
    if ("dimmer" in data) == ("loads" in data):
        raise InputError("a profile holds either one [dimmer] table or [[loads]] tables", file=source)
    if "dimmer" in data:
        dimmer, ranges = _read_table(ctx, Dimmer, data["dimmer"], "dimmer")
        return dimmer, tuple(ranges)
    loads, ranges = _read_loads(ctx, data["loads"])
    if not loads:
        raise ctx.error("loads", "a profile needs at least one [[loads]] table")
    return loads, tuple(ranges)


def read_profile(path) -> Dimmer | list[LoadGroup]:
    """Read a profile file: a Dimmer or a list of load groups (ranges as midpoints)."""
    return parse_profile(_decode(_read_bytes(path), str(path)), str(path))[0]


def read_profile_with_ranges(path) -> tuple[Dimmer | list[LoadGroup], tuple[Range, ...]]:
    """Read a profile file and the ranges given in it."""
    return parse_profile(_decode(_read_bytes(path), str(path)), str(path))


# ---------------------------------------------------------------------------------
# Writing.

def _value_out(key: Key, value):
    if key.kind == "float":
        return _round12(float(value) * key.per_si)
    if key.kind == "enum":
        return str(value.value)
    return value


def _table_out(obj, prefix: str, ranges: dict[str, Range], *, only: typing.Sequence[str] | None = None) -> dict:
    cls = type(obj)
    out: dict[str, object] = {}
    if isinstance(obj, LoadGroup) and only is None:
        out["name"] = obj.name
        out["kind"] = str(obj.kind.value)
    for key in KEYS[cls].values():
        if only is not None and key.file_key not in only:
            continue
        if key.file_key in out:
            continue
        value = getattr(obj, key.field)
        if value is None:
            continue
        if key.kind == "table":
            out[key.file_key] = _table_out(value, f"{prefix}.{key.field}", ranges)
            continue
        rng = ranges.get(f"{prefix}.{key.field}")
        if rng is not None and key.rangeable and math.isclose(value, 0.5 * (rng.low + rng.high), rel_tol=1e-9, abs_tol=1e-300):
            out[key.file_key] = _RangeOut(_value_out(key, rng.low), _value_out(key, rng.high))
            continue
        out[key.file_key] = _value_out(key, value)
    return out


@dataclass(frozen=True, slots=True)
class _RangeOut:
    """A range on its way out: written as an inline table ``{ min = .., max = .. }``."""

    min: float
    max: float


def _literal(value) -> str:
    """One TOML value as tomli_w writes it."""
    return tomli_w.dumps({"v": value})[len("v = "):].rstrip("\n")


def _plain(obj):
    if isinstance(obj, _RangeOut):
        return {"min": obj.min, "max": obj.max}
    if isinstance(obj, dict):
        return {k: _plain(v) for k, v in obj.items()}
    if isinstance(obj, list):
        return [_plain(v) for v in obj]
    return obj


def _dumps(doc: dict) -> str:
    """The document as TOML: tables in the order given, keys in field order, ranges as
    inline tables.  Values are formatted by tomli_w; the result is parsed back with
    tomllib and compared with ``doc`` as a guard."""
    chunks: list[str] = []

    def body(table: dict) -> list[tuple[str, dict]]:
        subtables = []
        for k, v in table.items():
            if isinstance(v, dict):
                subtables.append((k, v))
            elif isinstance(v, _RangeOut):
                chunks.append(f"{k} = {{ min = {_literal(v.min)}, max = {_literal(v.max)} }}\n")
            else:
                chunks.append(f"{k} = {_literal(v)}\n")
        return subtables

    def table(header: str, name: str, content: dict) -> None:
        chunks.append(f"\n{header}\n")
        for sub_name, sub in body(content):
            table(f"[{name}.{sub_name}]", f"{name}.{sub_name}", sub)

    top = {k: v for k, v in doc.items() if not isinstance(v, (dict, list))}
    body(top)
    for name, value in doc.items():
        if isinstance(value, dict):
            table(f"[{name}]", name, value)
        elif isinstance(value, list):
            for item in value:
                table(f"[[{name}]]", name, item)
    text = "".join(chunks)
    if tomllib.loads(text) != _plain(doc):
        raise AssertionError("TOML writer produced text that does not read back as written")
    return text


def _ranges_by_path(ranges: typing.Iterable[Range]) -> dict[str, Range]:
    return {r.path: r for r in ranges}


def circuit_to_toml(circuit: Circuit) -> str:
    """The text of a circuit file.  A range is written back as {min, max} when the
    circuit still carries its midpoint (an edited value drops its stale range)."""
    ranges = _ranges_by_path(circuit.ranges)
    doc: dict[str, object] = {"schema": SCHEMA, "name": circuit.name,
                              "supply": _table_out(circuit.supply, "supply", ranges)}
    if circuit.breaker is not None:
        doc["breaker"] = _table_out(circuit.breaker, "breaker", ranges)
    doc["dimmer"] = _table_out(circuit.dimmer, "dimmer", ranges)
    doc["loads"] = [_table_out(g, f"loads[{i}]", ranges) for i, g in enumerate(circuit.loads, start=1)]
    if circuit.correction is not None:
        doc["correction"] = _table_out(circuit.correction, "correction", ranges, only=CORRECTION_KEYS)
    return _dumps(doc)


def profile_to_toml(obj: Dimmer | LoadGroup | typing.Sequence[LoadGroup], ranges: typing.Iterable[Range] = ()) -> str:
    """The text of a profile file for a dimmer or one or more load groups."""
    by_path = _ranges_by_path(ranges)
    if isinstance(obj, Dimmer):
        doc = {"schema": SCHEMA, "dimmer": _table_out(obj, "dimmer", by_path)}
    else:
        groups = [obj] if isinstance(obj, LoadGroup) else list(obj)
        if not groups or not all(isinstance(g, LoadGroup) for g in groups):
            raise InputError("a profile holds a dimmer or one or more lamp groups")
        doc = {"schema": SCHEMA, "loads": [_table_out(g, f"loads[{i}]", by_path) for i, g in enumerate(groups, start=1)]}
    return _dumps(doc)


def _umask() -> int:
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


_UMASK = _umask()


def write_text_atomic(path, text: str, *, overwrite: bool = False) -> Path:
    """Write ``text`` to ``path`` through a temporary file in the same folder.

    Refuses (InputError) to replace an existing file unless ``overwrite``; on any
    failure the temporary file is removed and the target is untouched."""
    target = Path(path)
    source = str(path)
    if not overwrite and target.exists():
        raise InputError("already exists; not overwritten (choose another name or allow overwriting)", file=source)
    folder = target.parent if str(target.parent) else Path(".")
    tmp_name = None
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
        with os.fdopen(fd, "wb") as fh:
            fh.write(text.encode("utf-8"))
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp_name, 0o666 & ~_UMASK)
        if overwrite:
            os.replace(tmp_name, target)
        else:
            try:
                os.link(tmp_name, target)            # fails if the target appeared meanwhile
            except FileExistsError:
                raise InputError("already exists; not overwritten (choose another name or allow overwriting)",
                                 file=source) from None
            except OSError:                          # no hard links on this file system
                if target.exists():
                    raise InputError("already exists; not overwritten", file=source) from None
                os.replace(tmp_name, target)
            else:
                os.unlink(tmp_name)
        tmp_name = None
    except OSError as err:
        raise InputError(f"cannot write the file: {err.strerror or err}", file=source) from None
    finally:
        if tmp_name is not None:
            try:
                os.unlink(tmp_name)
            except OSError:
                pass
    return target


def write_circuit(circuit: Circuit, path, *, overwrite: bool = False) -> Path:
    """Write a circuit file atomically [path]."""
    return write_text_atomic(path, circuit_to_toml(circuit), overwrite=overwrite)


def write_profile(obj, path, *, overwrite: bool = False, ranges: typing.Iterable[Range] = ()) -> Path:
    """Write a profile file (a Dimmer, a LoadGroup or a list of them) atomically [path]."""
    return write_text_atomic(path, profile_to_toml(obj, ranges), overwrite=overwrite)


# ---------------------------------------------------------------------------------
# The user's profile folder.

def profile_dir() -> Path:
    """Where the user's profiles live: $DIMFIT_PROFILE_DIR, else the platform's user
    data folder for dimfit / "profiles"."""
    env = os.environ.get("DIMFIT_PROFILE_DIR")
    if env:
        return Path(env)
    import platformdirs

    return Path(platformdirs.user_data_dir("dimfit", appauthor=False)) / "profiles"


def _file_name(name: str) -> str:
    stem = re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-")
    if not stem:
        raise InputError("a profile needs a name with at least one letter or digit", key="name")
    return stem[:80] + ".toml"


def save_profile(obj, name: str, *, overwrite: bool = False, ranges: typing.Iterable[Range] = ()) -> Path:
    """Save a dimmer or lamp profile in the profile folder under a file name made from
    ``name``; returns its path."""
    folder = profile_dir()
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise InputError(f"cannot create the profile folder: {err.strerror or err}", file=str(folder)) from None
    return write_profile(obj, folder / _file_name(name), overwrite=overwrite, ranges=ranges)


def list_profiles() -> list[Path]:
    """The user's profile files, sorted by name (empty if the folder does not exist)."""
    folder = profile_dir()
    if not folder.is_dir():
        return []
    return sorted(p for p in folder.glob("*.toml") if p.is_file())
