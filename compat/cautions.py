"""Safety cautions carried by every verdict, in this project's own words."""
from __future__ import annotations

CAUTIONS: tuple[str, ...] = (
    "Only work on fixed wiring if you are qualified and permitted to do so where you are.",
    "Switch off and lock off the circuit, then prove it dead with a tested voltage indicator before touching anything.",
    "Local wiring rules and the makers' installation instructions come first; where they disagree with this tool, follow them.",
    "Every figure here is an estimate from circuit models, not a measurement; confirm on site before relying on it.",
    "To look at dimmer waveforms on a live circuit use differential probes or an isolated supply; never float an oscilloscope's earth.",
)


def cautions() -> tuple[str, ...]:
    """The cautions, in the order they are shown."""
    return CAUTIONS
