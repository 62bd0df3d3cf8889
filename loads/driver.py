"""Capacitor-input electronics (LED retrofit lamp, LED driver).

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from loads.errors import require
from loads.load import LoadGroup, LoadKind


class BleederKind(StrEnum):
    RESISTIVE = "resistive"
    CONSTANT_CURRENT = "constant-current"


@dataclass(frozen=True, slots=True, kw_only=True)
class ElectronicDriver(LoadGroup):
    """input_capacitance_f: filter capacitor across the terminals [F];
    series_resistance_ohm: damping resistor between terminals and bridge [Ω];
    bulk_capacitance_f: capacitor after the bridge [F];
    start_voltage_v / stop_voltage_v: bus voltage at which the converter starts / stops [V];
    bleeder_a: bleeder current at the rated peak voltage (0: none) [A];
    bleeder_kind: resistive | constant-current;
    min_light_fraction: lowest light the decode curve gives while running [1];
    dimmable: false → draws full power whatever the phase;
    converter_power_w: drawn from the bulk capacitor at full light (None: derived so the
    input power undimmed at rated voltage equals rated_power_w) [W]."""

    input_capacitance_f: float = 47e-9        # common practice, no source (X-capacitor tens of nF)
    series_resistance_ohm: float = 10.0       # common practice, no source (fusible input resistor)
    bulk_capacitance_f: float = 4.7e-6        # common practice, no source
    start_voltage_v: float = 60.0             # engineering choice: converter starts at ~1/5 of the 230 V peak
    stop_voltage_v: float | None = None       # None: 0.8 × start (engineering choice)
    bleeder_a: float = 0.0
    bleeder_kind: BleederKind = BleederKind.RESISTIVE
    min_light_fraction: float = 0.05
    dimmable: bool = True
    converter_power_w: float | None = None

    kind = LoadKind.ELECTRONIC_DRIVER

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        object.__setattr__(self, "bleeder_kind", BleederKind(self.bleeder_kind))
        require(self.input_capacitance_f >= 0, "input_capacitance_f", self.input_capacitance_f, "F must not be negative")
        require(self.series_resistance_ohm > 0, "series_resistance_ohm", self.series_resistance_ohm, "Ω must be positive")
        require(self.bulk_capacitance_f > 0, "bulk_capacitance_f", self.bulk_capacitance_f, "F must be positive")
        require(0 < self.start_voltage_v < 1.5 * self.rated_voltage_v, "start_voltage_v", self.start_voltage_v,
                "V must be positive and below the rated peak")
        if self.stop_voltage_v is not None:
            require(0 < self.stop_voltage_v <= self.start_voltage_v, "stop_voltage_v", self.stop_voltage_v,
                    "V must be positive and not above the start voltage")
        require(self.bleeder_a >= 0, "bleeder_a", self.bleeder_a, "A must not be negative")
        require(0 <= self.min_light_fraction < 1, "min_light_fraction", self.min_light_fraction, "must be between 0 and 1")
        require(self.converter_power_w is None or self.converter_power_w > 0, "converter_power_w",
                self.converter_power_w, "W must be positive")

    @property
    def stop_v(self) -> float:
        return self.stop_voltage_v if self.stop_voltage_v is not None else 0.8 * self.start_voltage_v
