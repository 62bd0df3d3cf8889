"""A whole circuit: supply, optional breaker, dimmer, lamp groups, correction device."""
from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

from loads.breaker import Breaker
from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.electronic_transformer import ElectronicTransformer
from loads.errors import require
from loads.filament import Filament
from loads.linear import Linear
from loads.load import LoadGroup, LoadKind
from loads.supply import Supply
from loads.transformer import MagneticTransformer

LOAD_CLASSES: dict[LoadKind, type[LoadGroup]] = {
    LoadKind.FILAMENT: Filament,
    LoadKind.MAGNETIC_TRANSFORMER: MagneticTransformer,
    LoadKind.ELECTRONIC_DRIVER: ElectronicDriver,
    LoadKind.ELECTRONIC_TRANSFORMER: ElectronicTransformer,
    LoadKind.LINEAR: Linear,
}


@dataclass(frozen=True, slots=True)
class Range:
    """An input the practitioner cannot know, given as {min, max} in the file.

    path: dotted field path in SI names, e.g. ``loads[1].input_capacitance_f``;
    file_key: the key as written in the file, e.g. ``loads[1].input_capacitance_nf``;
    low, high: the bounds in SI units.  The circuit itself carries the midpoint."""

    path: str
    file_key: str
    low: float
    high: float


# Fields of one table that keep an order, (lower, upper): a triac latches at no less
# than the current that holds it (latching ≥ holding, TEXTBOOK_TRIAC, from memory); a
# converter stops at no more than the voltage it starts at (its hysteresis).
# When one end of a range input would cross the other field's value, the other field
# is moved to it (latching = holding, the least a switch can have): the range end
# stands for a device that exists, and two ranges that overlap (holding {10, 50},
# latching {25, 100} mA) are legal.
ORDERED_FIELDS: dict[type, tuple[tuple[str, str], ...]] = {
    Dimmer: (("holding_current_a", "latching_current_a"),),
    ElectronicDriver: (("stop_voltage_v", "start_voltage_v"),),
}


def paired_values(cls: type, values: dict, field_name: str, value) -> dict:
    """``values`` (field -> value of one ``cls`` table) with ``field_name`` set to
    ``value`` and any field ordered with it moved so that the order holds."""
    out = dict(values, **{field_name: value})
    for lower, upper in ORDERED_FIELDS.get(cls, ()):
        if field_name == lower and out.get(upper) is not None and out[upper] < value:
            out[upper] = value
        elif field_name == upper and out.get(lower) is not None and out[lower] > value:
            out[lower] = value
    return out


def with_range_end(obj, field_name: str, value):
    """A copy of the frozen dataclass ``obj`` with one field at a range end (and the
    fields ordered with it kept in order, see ``ORDERED_FIELDS``)."""
    values = {f.name: getattr(obj, f.name) for f in dataclasses.fields(obj)}
    new = paired_values(type(obj), values, field_name, value)
    return dataclasses.replace(obj, **{k: v for k, v in new.items() if k == field_name or v != values[k]})


@dataclass(frozen=True, slots=True, kw_only=True)
class Circuit:
    name: str = "circuit"
    supply: Supply = field(default_factory=Supply)
    breaker: Breaker | None = None
    dimmer: Dimmer = field(default_factory=Dimmer)
    loads: tuple[LoadGroup, ...] = ()
    correction: Linear | None = None
    ranges: tuple[Range, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "loads", tuple(self.loads))
        require(len(self.loads) >= 1, "loads", len(self.loads), "lamp groups: at least one is needed")
        require(len(self.loads) <= 12, "loads", len(self.loads), "lamp groups: at most 12")

    @property
    def all_loads(self) -> tuple[LoadGroup, ...]:
        """Lamp groups plus the correction device, if any (what the simulator sees)."""
        return self.loads + ((self.correction,) if self.correction is not None else ())
