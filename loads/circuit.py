"""A whole circuit: supply, optional breaker, dimmer, lamp groups, correction device."""
from __future__ import annotations

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
