"""Which parameters the editor shows for each part of a circuit, in which units.

A ``FieldSpec`` names an attribute path on a model dataclass (SI names, e.g.
``rc_diac.timing_capacitance_f``) and how it is shown and typed (``nF``).  ``with_text``
builds the changed object with ``dataclasses.replace`` so that the model's own
validation decides what is acceptable; its InputError is shown at the field.
This is presentation only: no physics and no file keys live here.
"""
from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from compat.report import terminal_safe
from loads.breaker import Breaker, Curve
from loads.dimmer import Control, Edge, Wiring
from loads.driver import BleederKind
from loads.errors import InputError
from loads.files import check_physical
from loads.load import LoadGroup, LoadKind
from loads.supply import PRESETS
from tui.units import format_number, format_quantity, parse_quantity


@dataclass(frozen=True, slots=True)
class FieldSpec:
    """path: attribute path on the part; label: what the practitioner reads; unit and
    prefix: how it is shown; scale: SI value = typed value (in the unit's base) × scale
    (0.01 for a percentage stored as a fraction); kind: float | int | text | choice |
    bool; choices: for ``choice``; optional: empty text means None."""

    path: str
    label: str
    unit: str = ""
    prefix: str | None = None
    scale: float = 1.0
    kind: str = "float"
    choices: tuple[str, ...] = ()
    optional: bool = False

    @property
    def dom_id(self) -> str:
        return "f-" + self.path.replace(".", "-").replace("_", "-")


def _f(path, label, unit="", prefix=None, **kw) -> FieldSpec:
    return FieldSpec(path, label, unit, prefix, **kw)


SUPPLY_FIELDS = (
    _f("voltage_v", "Voltage (rms)", "V", ""),
    _f("frequency_hz", "Frequency", "Hz", ""),
    _f("source_resistance_ohm", "Loop resistance", "Ω", ""),
    _f("source_inductance_h", "Loop inductance", "H", "µ"),
    _f("wiring_capacitance_f", "Cable capacitance", "F", "n"),
)
SUPPLY_PRESETS = PRESETS  # "230 V 50 Hz" -> (230.0, 50.0)

BREAKER_FIELDS = (
    _f("curve", "Curve", kind="choice", choices=("none",) + tuple(c.value for c in Curve)),
    _f("rated_current_a", "Rated current", "A", ""),
    _f("instantaneous_trip_a", "Instant trip current", "A", "", optional=True),
)

_DIMMER_COMMON = (
    _f("name", "Name", kind="text"),
    _f("edge", "Edge", kind="choice", choices=tuple(e.value for e in Edge)),
    _f("wiring", "Wiring", kind="choice", choices=tuple(w.value for w in Wiring)),
    _f("control", "Control", kind="choice", choices=tuple(c.value for c in Control)),
    _f("rated_load_w", "Rated load (filament)", "W", ""),
    _f("rated_transformer_va", "Rated transformer load", "VA", "", optional=True),
    _f("rated_led_w", "Rated LED load", "W", "", optional=True),
    _f("min_load_w", "Minimum load", "W", ""),
    _f("max_lamps", "Lamp-count cap", kind="int", optional=True),
    _f("gang", "Gang count", kind="int"),
    _f("fins_removed", "Fins removed", kind="int"),
    _f("ambient_temperature_c", "Ambient temperature", "°C", ""),
)
_DIMMER_LEADING = (
    _f("holding_current_a", "Holding current", "A", "m"),
    _f("latching_current_a", "Latching current", "A", "m"),
    _f("gate_trigger_current_a", "Gate trigger current", "A", "m"),
    _f("on_state_voltage_v", "On-state voltage", "V", ""),
    _f("on_state_resistance_ohm", "On-state resistance", "Ω", "m"),
    _f("surge_peak_a", "Surge peak", "A", ""),
    _f("surge_i2t_a2s", "Surge I²t", "A²s", ""),
    _f("repetitive_peak_a", "Repetitive peak current", "A", ""),
)
_DIMMER_TRAILING = (
    _f("clamp_voltage_v", "Clamp voltage", "V", ""),
    _f("trip_current_a", "Over-current trip", "A", ""),
)
_DIMMER_TAIL = (
    _f("choke_inductance_h", "Choke inductance", "H", "µ"),
    _f("snubber_capacitance_f", "Snubber capacitance", "F", "n"),
    _f("snubber_resistance_ohm", "Snubber resistance", "Ω", ""),
    _f("self_supply_a", "Self-supply current", "A", "m"),
)
_DIMMER_PHASE = (
    _f("gate_window_s", "Gate drive window", "s", "µ"),
    _f("min_firing_angle_deg", "Firing angle at full", "°", ""),
    _f("max_firing_angle_deg", "Firing angle at lowest", "°", ""),
)
_DIMMER_RC_DIAC = (
    _f("rc_diac.fixed_resistance_ohm", "Fixed resistor", "Ω", "k"),
    _f("rc_diac.variable_resistance_ohm", "Variable resistor", "Ω", "k"),
    _f("rc_diac.timing_capacitance_f", "Timing capacitor", "F", "n"),
    _f("rc_diac.breakover_v", "Trigger breakover", "V", ""),
    _f("rc_diac.snapback_v", "Trigger snap-back", "V", ""),
    _f("rc_diac.asymmetry_v", "Trigger asymmetry", "V", ""),
)

_LOAD_COMMON = (
    _f("name", "Name", kind="text"),
    _f("count", "Count", kind="int"),
    _f("rated_power_w", "Rated power (each)", "W", ""),
    _f("rated_voltage_v", "Rated voltage", "V", ""),
)
_LOAD_KIND_FIELDS: dict[LoadKind, tuple[FieldSpec, ...]] = {
    LoadKind.FILAMENT: (
        _f("operating_temperature_k", "Filament temperature", "K", ""),
    ),
    LoadKind.MAGNETIC_TRANSFORMER: (
        _f("rated_va", "Rated VA", "VA", ""),
        _f("secondary_voltage_v", "Secondary voltage", "V", ""),
        _f("lamp_power_w", "Lamps on secondary", "W", ""),
        _f("winding_resistance_pct", "Winding resistance", "%", ""),
        _f("leakage_reactance_pct", "Leakage reactance", "%", ""),
        _f("magnetising_current_pct", "Magnetising current", "%", ""),
        _f("core_loss_pct", "Core loss", "%", ""),
    ),
    LoadKind.ELECTRONIC_DRIVER: (
        _f("input_capacitance_f", "Input capacitance", "F", "n"),
        _f("series_resistance_ohm", "Series resistance", "Ω", ""),
        _f("bulk_capacitance_f", "Bulk capacitance", "F", "µ"),
        _f("start_voltage_v", "Converter start", "V", ""),
        _f("stop_voltage_v", "Converter stop", "V", "", optional=True),
        _f("bleeder_a", "Bleeder current", "A", "m"),
        _f("bleeder_kind", "Bleeder kind", kind="choice", choices=tuple(b.value for b in BleederKind)),
        _f("min_light_fraction", "Minimum light", "%", "", scale=0.01),
        _f("dimmable", "Dimmable", kind="bool"),
        _f("converter_power_w", "Converter power", "W", "", optional=True),
    ),
    LoadKind.ELECTRONIC_TRANSFORMER: (
        _f("rated_va", "Rated VA", "VA", ""),
        _f("min_load_w", "Minimum lamp load", "W", ""),
        _f("lamp_power_w", "Lamps on output", "W", ""),
        _f("start_voltage_v", "Start voltage", "V", ""),
        _f("input_capacitance_f", "Input capacitance", "F", "n"),
    ),
    LoadKind.LINEAR: (
        _f("resistance_ohm", "Resistance", "Ω", ""),
        _f("inductance_h", "Inductance", "H", "m"),
        _f("parallel_capacitance_f", "Parallel capacitance", "F", "n"),
        _f("series_capacitance_f", "Series capacitance", "F", "n"),
    ),
}
CORRECTION_FIELDS = (
    _f("name", "Name", kind="text"),
    _f("resistance_ohm", "Series resistor", "Ω", ""),
    _f("series_capacitance_f", "Capacitor", "F", "n"),
    _f("inductance_h", "Inductance", "H", "m"),
    _f("parallel_capacitance_f", "Parallel capacitance", "F", "n"),
)


def fields_for(part_key: str, obj) -> tuple[FieldSpec, ...]:
    """The fields shown for a part: ``supply``, ``breaker``, ``dimmer``, ``correction``
    or ``load:N``.  The dimmer's fields follow its edge and control."""
    if part_key == "supply":
        return SUPPLY_FIELDS
    if part_key == "breaker":
        return BREAKER_FIELDS if obj is not None else BREAKER_FIELDS[:1]
    if part_key == "correction":
        return CORRECTION_FIELDS
    if part_key == "dimmer":
        fields = _DIMMER_COMMON
        fields += _DIMMER_LEADING if obj.edge is Edge.LEADING else _DIMMER_TRAILING
        fields += _DIMMER_TAIL
        fields += _DIMMER_RC_DIAC if obj.control is Control.RC_DIAC else _DIMMER_PHASE
        return fields
    if isinstance(obj, LoadGroup):
        return _LOAD_COMMON + _LOAD_KIND_FIELDS.get(obj.kind, ())
    return ()


def get_value(obj, path: str):
    for name in path.split("."):
        if obj is None:
            return None
        obj = getattr(obj, name)
    return obj


def field_text(obj, spec: FieldSpec) -> str:
    """What the field shows for ``obj`` (the editable text)."""
    if spec.path == "curve" and obj is None:
        return "none"
    value = get_value(obj, spec.path)
    if value is None:
        return ""
    if spec.kind in ("text", "choice"):
        return str(value)
    if spec.kind == "bool":
        return "yes" if value else "no"
    if spec.kind == "int":
        return str(value)
    return format_quantity(value / spec.scale, spec.unit, spec.prefix)


def parse_field(spec: FieldSpec, text: str):
    """The SI value typed for ``spec`` (InputError with a one-line reason if not)."""
    text = text.strip()
    if spec.optional and text in ("", "none", "-"):
        return None
    if spec.kind == "text":
        if not text:
            raise InputError("a name is needed")
        return text
    if spec.kind == "choice":
        if text not in spec.choices:
            raise InputError(f"choose one of {', '.join(spec.choices)}")
        return text
    if spec.kind == "bool":
        if text.lower() in ("yes", "true", "1", "on"):
            return True
        if text.lower() in ("no", "false", "0", "off"):
            return False
        raise InputError("yes or no")
    if spec.kind == "int":
        value = parse_quantity(text, "")
        if value != int(value):
            raise InputError(f"'{text}' is not a whole number")
        return int(value)
    return parse_quantity(text, spec.unit) * spec.scale


def _replace_path(obj, path: str, value):
    head, _, rest = path.partition(".")
    if rest:
        return dataclasses.replace(obj, **{head: _replace_path(getattr(obj, head), rest, value)})
    return dataclasses.replace(obj, **{head: value})


def with_value(obj, spec: FieldSpec, value):
    """``obj`` with the field set to ``value`` (SI), validated by the model."""
    if spec.path == "curve":                  # the breaker part: "none" removes it
        if value == "none":
            return None
        base = obj if obj is not None else Breaker()
        return dataclasses.replace(base, curve=value)
    try:
        parent = obj
        *heads, last = spec.path.split(".")
        for head in heads:
            parent = getattr(parent, head)
        new = _replace_path(obj, spec.path, value)        # the model's own rules first
        if parent is not None:
            # the file reference's physical range (loads.files.PHYSICAL): what a file
            # may not hold, the app may not take either
            check_physical(type(parent), last, value)
        return new
    except TypeError as error:               # a wrong type reaching the dataclass
        raise InputError(str(error)) from error


def with_text(obj, spec: FieldSpec, text: str):
    """``obj`` with the field set from the typed ``text``; raises InputError."""
    return with_value(obj, spec, parse_field(spec, text))


def error_text(error: InputError, spec: FieldSpec) -> str:
    """The reason shown at the field: the model's reason, with the other field's
    name when the rule that failed is about another field."""
    reason = error.reason
    last = spec.path.rsplit(".", 1)[-1]
    if error.key and error.key != last:
        return f"{error.key}: {reason}"
    return reason


def count_text(group: LoadGroup) -> str:
    return f"{group.count}× {terminal_safe(group.name)} {format_number(group.rated_power_w)} W"
