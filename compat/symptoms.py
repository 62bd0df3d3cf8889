"""The symptoms an installer reports, in the trade's plain words (named by us).

Kept apart from ``compat.diagnose`` so that the app and the command line can list them
without importing the simulator.
"""
from __future__ import annotations

from enum import StrEnum


class Symptom(StrEnum):
    """What the installer or the customer sees, in the trade's plain words."""

    FLICKER_LOW = "flicker-low"                  # flickers at low settings, steady higher up
    FLICKER_ALL = "flicker-all"                  # flickers at every setting, full included
    GLOW_WHEN_OFF = "glow-when-off"              # a steady faint glow with the dimmer off
    FLASHES_WHEN_OFF = "flashes-when-off"        # flashes now and then with the dimmer off
    DROPS_OUT = "drops-out"                      # goes out turning down, well above the bottom
    POPS_ON = "pops-on"                          # comes on only well up the knob, turning up
    DEAD_TRAVEL = "dead-travel"                  # part of the knob's travel gives no light
    BUZZING = "buzzing"                          # the lamps, transformers or dimmer hum or buzz
    TRIPS_AT_SWITCH_ON = "trips-at-switch-on"    # the breaker trips when the lights are switched on
    RUNS_HOT = "runs-hot"                        # the dimmer plate runs hot
    LAMPS_FAIL_EARLY = "lamps-fail-early"        # lamps or transformers fail well before their life
    STAYS_BRIGHT = "stays-bright"                # turned to the bottom, the lamps hardly dim


SYMPTOM_TEXT = {
    Symptom.FLICKER_LOW: "the lamps flicker at low settings",
    Symptom.FLICKER_ALL: "the lamps flicker at every setting",
    Symptom.GLOW_WHEN_OFF: "the lamps glow when the dimmer is off",
    Symptom.FLASHES_WHEN_OFF: "the lamps flash now and then when the dimmer is off",
    Symptom.DROPS_OUT: "the lamps go out turning down, well above the bottom of the knob",
    Symptom.POPS_ON: "the lamps come on only well up the knob, turning up",
    Symptom.DEAD_TRAVEL: "part of the knob's travel gives no light",
    Symptom.BUZZING: "something hums or buzzes",
    Symptom.TRIPS_AT_SWITCH_ON: "the breaker trips when the lights are switched on",
    Symptom.RUNS_HOT: "the dimmer runs hot",
    Symptom.LAMPS_FAIL_EARLY: "lamps or transformers fail early",
    Symptom.STAYS_BRIGHT: "the lamps hardly dim: turned to the bottom they stay bright",
}
