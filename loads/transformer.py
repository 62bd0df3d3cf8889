"""Iron-core (magnetic) low-voltage transformer feeding low-voltage filament lamps.

Parameters only in this part; the equations and kernel functions follow below.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind


@dataclass(frozen=True, slots=True, kw_only=True)
class MagneticTransformer(LoadGroup):
    """rated_va [VA]; secondary_voltage_v [V]; lamp_power_w: lamps on the secondary [W];
    winding_resistance_pct: copper loss as % of rated VA (both windings, referred) [%];
    leakage_reactance_pct: short-circuit reactance as % of the rated impedance [%];
    magnetising_current_pct: no-load current as % of rated current at rated voltage [%];
    core_loss_pct: iron loss at rated voltage as % of rated VA [%];
    saturation_flux_ratio: knee of the magnetising curve as a multiple of the rated peak
    flux [1]; saturated_inductance_ratio: slope beyond the knee as a fraction of the
    unsaturated magnetising inductance [1]."""

    rated_va: float = 60.0
    secondary_voltage_v: float = 12.0
    lamp_power_w: float = 50.0
    winding_resistance_pct: float = 6.0       # common practice, no source (small toroids regulate 5–10 %)
    leakage_reactance_pct: float = 3.0        # common practice, no source
    magnetising_current_pct: float = 8.0      # common practice, no source
    core_loss_pct: float = 3.0                # common practice, no source
    saturation_flux_ratio: float = 1.25       # engineering choice: knee 25 % above rated peak flux
    saturated_inductance_ratio: float = 0.02  # engineering choice: air-core-like slope beyond the knee

    kind = LoadKind.MAGNETIC_TRANSFORMER

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(self.rated_va > 0, "rated_va", self.rated_va, "VA must be positive")
        require(0 < self.secondary_voltage_v < self.rated_voltage_v, "secondary_voltage_v", self.secondary_voltage_v,
                "V must be positive and below the primary voltage")
        require(0 <= self.lamp_power_w <= 2 * self.rated_va, "lamp_power_w", self.lamp_power_w, "W must be 0–2× the rated VA")
        for name in ("winding_resistance_pct", "leakage_reactance_pct", "magnetising_current_pct", "core_loss_pct"):
            require(0 < getattr(self, name) < 50, name, getattr(self, name), "% must be between 0 and 50")
        require(1 < self.saturation_flux_ratio < 3, "saturation_flux_ratio", self.saturation_flux_ratio, "must be 1–3")
        require(0 < self.saturated_inductance_ratio < 1, "saturated_inductance_ratio", self.saturated_inductance_ratio,
                "must be between 0 and 1")
