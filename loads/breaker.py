"""Miniature circuit-breaker: the instantaneous (magnetic) trip band.

IEC 60898-1 (IEC60898_1): a type B breaker must not trip instantaneously at 3·I_n and
must trip within 0.1 s at 5·I_n; type C 5·I_n / 10·I_n; type D 10·I_n / 20·I_n.
Between the two multiples the breaker may or may not trip.  ``curve = "other"`` takes
a user-supplied instantaneous trip current (breakers built to other standards).
"""
from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from loads.errors import require


class Curve(StrEnum):
    B = "B"
    C = "C"
    D = "D"
    OTHER = "other"


# IEC60898_1, instantaneous tripping: (no-trip multiple, must-trip multiple) of I_n.
INSTANTANEOUS_BAND = {Curve.B: (3.0, 5.0), Curve.C: (5.0, 10.0), Curve.D: (10.0, 20.0)}
# IEC60898_1 preferred rated currents [A].
PREFERRED_RATINGS_A = (6.0, 10.0, 13.0, 16.0, 20.0, 25.0, 32.0)


@dataclass(frozen=True, slots=True, kw_only=True)
class Breaker:
    """curve: B | C | D | other; rated_current_a: I_n [A];
    instantaneous_trip_a: trip current for curve "other" (overrides the band) [A]."""

    curve: Curve = Curve.B
    rated_current_a: float = 10.0
    instantaneous_trip_a: float | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "curve", Curve(self.curve))
        require(0 < self.rated_current_a <= 125, "rated_current_a", self.rated_current_a, "A is not a breaker rating (0–125 A)")
        if self.curve is Curve.OTHER:
            require(self.instantaneous_trip_a is not None, "instantaneous_trip_a", None, "is required with curve = \"other\"")
        if self.instantaneous_trip_a is not None:
            require(self.instantaneous_trip_a > self.rated_current_a, "instantaneous_trip_a", self.instantaneous_trip_a,
                    "A must exceed the rated current")

    def band_a(self) -> tuple[float, float]:
        """(highest current that must not trip, lowest current that must trip) [A]."""
        if self.instantaneous_trip_a is not None:
            return (self.instantaneous_trip_a, self.instantaneous_trip_a)
        lo, hi = INSTANTANEOUS_BAND[self.curve]
        return (lo * self.rated_current_a, hi * self.rated_current_a)
