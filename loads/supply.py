"""The mains supply: an ideal sine EMF behind the loop impedance.

    e(t) = √2 · V_rms · sin(2π f t)

in series with the source (loop) resistance R_s and inductance L_s, which set the
surge peaks when a switch closes onto a capacitor or a cold filament.  The cable's
capacitance between line and neutral at the load end (C_w) is kept as a small physical
capacitor at the load terminal; it also gives the simulator a well-posed node when
only inductive loads are connected.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from loads.errors import require

# IEC 60725 reference impedance for 230/400 V systems, phase + neutral loop:
# 0.4 Ω + j0.25 Ω at 50 Hz (from memory, unverified) → L = 0.25/(2π·50) = 0.796 mH.
DEFAULT_SOURCE_RESISTANCE_OHM = 0.4
DEFAULT_SOURCE_INDUCTANCE_H = 0.25 / (2 * math.pi * 50.0)
# Engineering choice: ~100 pF/m for twin-and-earth / NM cable (common practice, no
# source) over ~20 m of run.
DEFAULT_WIRING_CAPACITANCE_F = 2e-9

# Common mains systems (common practice, no source).
PRESETS: dict[str, tuple[float, float]] = {
    "230 V 50 Hz": (230.0, 50.0),
    "240 V 50 Hz": (240.0, 50.0),
    "120 V 60 Hz": (120.0, 60.0),
    "277 V 60 Hz": (277.0, 60.0),
    "100 V 50 Hz": (100.0, 50.0),
    "100 V 60 Hz": (100.0, 60.0),
}


@dataclass(frozen=True, slots=True, kw_only=True)
class Supply:
    """Mains supply.

    voltage_v: rms EMF [V]; frequency_hz: [Hz]; source_resistance_ohm and
    source_inductance_h: the loop impedance [Ω], [H]; wiring_capacitance_f: line to
    neutral at the load end [F].
    """

    voltage_v: float = 230.0
    frequency_hz: float = 50.0
    source_resistance_ohm: float = DEFAULT_SOURCE_RESISTANCE_OHM
    source_inductance_h: float = DEFAULT_SOURCE_INDUCTANCE_H
    wiring_capacitance_f: float = DEFAULT_WIRING_CAPACITANCE_F

    def __post_init__(self) -> None:
        require(0 < self.voltage_v <= 1000, "voltage_v", self.voltage_v, "V is not a mains voltage (0–1000 V)")
        require(1 <= self.frequency_hz <= 1000, "frequency_hz", self.frequency_hz, "Hz is not a mains frequency (1–1000 Hz)")
        require(self.source_resistance_ohm >= 0, "source_resistance_ohm", self.source_resistance_ohm, "Ω must not be negative")
        require(self.source_inductance_h >= 0, "source_inductance_h", self.source_inductance_h, "H must not be negative")
        require(self.wiring_capacitance_f >= 0, "wiring_capacitance_f", self.wiring_capacitance_f, "F must not be negative")

    @property
    def peak_v(self) -> float:
        return math.sqrt(2.0) * self.voltage_v

    @property
    def omega_rad_s(self) -> float:
        return 2.0 * math.pi * self.frequency_hz

    @property
    def period_s(self) -> float:
        return 1.0 / self.frequency_hz
