"""Filament lamp (mains incandescent or halogen): electrical and thermal model.

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind

# REFERENCES: general-service filaments run at about 2700–2900 K [mem].
DEFAULT_OPERATING_TEMPERATURE_K = 2800.0


@dataclass(frozen=True, slots=True, kw_only=True)
class Filament(LoadGroup):
    """operating_temperature_k: filament temperature at rated voltage [K];
    ambient_temperature_k: surroundings and cold filament [K]."""

    operating_temperature_k: float = DEFAULT_OPERATING_TEMPERATURE_K
    ambient_temperature_k: float = 300.0

    kind = LoadKind.FILAMENT

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(1500 <= self.operating_temperature_k <= 3400, "operating_temperature_k", self.operating_temperature_k,
                "K is outside 1500–3400 K")
        require(250 <= self.ambient_temperature_k <= 400, "ambient_temperature_k", self.ambient_temperature_k,
                "K is outside 250–400 K")
