"""Linear load: series R–L with an optional capacitor across the pair.

    L·di_L/dt = v − R·i_L,      i = i_L + C·dv/dt

With ``series_capacitance_f`` > 0 the capacitor is in series with R (and L) instead:

    C_s·dv_C/dt = i_L

which is the load-correction (bypass) device: a capacitor with a series resistor,
fitted across the lamps so that the dimmer always sees enough current.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import require
from loads.load import LoadGroup, LoadKind


@dataclass(frozen=True, slots=True, kw_only=True)
class Linear(LoadGroup):
    """resistance_ohm: R [Ω]; inductance_h: L in series with R [H];
    parallel_capacitance_f: C across R–L [F]; series_capacitance_f: C in series with
    R (and L) – an R–C bypass device [F]."""

    resistance_ohm: float = 100.0
    inductance_h: float = 0.0
    parallel_capacitance_f: float = 0.0
    series_capacitance_f: float = 0.0

    kind = LoadKind.LINEAR

    def __post_init__(self) -> None:
        LoadGroup.__post_init__(self)
        require(self.resistance_ohm > 0, "resistance_ohm", self.resistance_ohm, "Ω must be positive")
        require(self.inductance_h >= 0, "inductance_h", self.inductance_h, "H must not be negative")
        require(self.parallel_capacitance_f >= 0, "parallel_capacitance_f", self.parallel_capacitance_f, "F must not be negative")
        require(self.series_capacitance_f >= 0, "series_capacitance_f", self.series_capacitance_f, "F must not be negative")
