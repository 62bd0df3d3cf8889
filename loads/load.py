"""What every lamp group has in common, and the list of load kinds.

A group is ``count`` identical units in parallel; the simulator solves one unit and
scales its terminal current by ``count``.
"""
from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from loads.errors import require


class LoadKind(StrEnum):
    FILAMENT = "filament"
    MAGNETIC_TRANSFORMER = "magnetic-transformer"
    ELECTRONIC_DRIVER = "electronic-driver"
    ELECTRONIC_TRANSFORMER = "electronic-transformer"
    LINEAR = "linear"


@dataclass(frozen=True, slots=True, kw_only=True)
class LoadGroup:
    """name: label; count: identical units in parallel; rated_power_w [W] and
    rated_voltage_v [V] where they apply."""

    name: str = "load"
    count: int = 1
    rated_power_w: float = 60.0
    rated_voltage_v: float = 230.0

    kind = None  # set by each subclass (class attribute, not a field)

    def __post_init__(self) -> None:
        require(isinstance(self.count, int) and 1 <= self.count <= 500, "count", self.count, "must be a whole number 1–500")
        require(0 < self.rated_power_w <= 10000, "rated_power_w", self.rated_power_w, "W must be between 0 and 10 kW")
        require(10 <= self.rated_voltage_v <= 1000, "rated_voltage_v", self.rated_voltage_v, "V is outside 10–1000 V")

    @property
    def total_rated_power_w(self) -> float:
        return self.count * self.rated_power_w
