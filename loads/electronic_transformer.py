"""Electronic (self-oscillating) low-voltage transformer.

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind


@dataclass(frozen=True, slots=True, kw_only=True)
class ElectronicTransformer(LoadGroup):
    """rated_va [VA]; min_load_w: below this lamp load it does not oscillate [W];
    lamp_power_w: lamps on the output [W]; start_voltage_v: instantaneous mains voltage
    below which it does not run (dead zone near each zero) [V];
    input_capacitance_f: filter capacitor across the terminals [F]."""

    rated_va: float = 60.0
    min_load_w: float = 10.0
    lamp_power_w: float = 50.0
    start_voltage_v: float = 40.0             # common practice, no source
    input_capacitance_f: float = 10e-9        # common practice, no source

    kind = LoadKind.ELECTRONIC_TRANSFORMER

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(self.rated_va > 0, "rated_va", self.rated_va, "VA must be positive")
        require(0 <= self.min_load_w < self.rated_va, "min_load_w", self.min_load_w, "W must be below the rated VA")
        require(0 <= self.lamp_power_w <= 1.5 * self.rated_va, "lamp_power_w", self.lamp_power_w, "W must be 0–1.5× the rated VA")
        require(0 <= self.start_voltage_v < self.rated_voltage_v, "start_voltage_v", self.start_voltage_v,
                "V must be below the rated voltage")
        require(self.input_capacitance_f >= 0, "input_capacitance_f", self.input_capacitance_f, "F must not be negative")
