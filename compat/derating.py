"""The dimmer's usable rating: derating rules and load-type rules, each with its origin.

A dimmer's printed rating holds for one dimmer alone in its box, with its cooling
fins, at a normal room temperature, feeding filament lamps.  The rules below reduce it
for ganging, removed fins and a hot enclosure, and translate other load types onto it.
Every rule is data with its origin so that a report can show it; where the dimmer
prints a figure for a load type (``rated_transformer_va``, ``rated_led_w``) that
figure is used instead of the rule of thumb.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.dimmer import Dimmer
from loads.driver import ElectronicDriver
from loads.electronic_transformer import ElectronicTransformer
from loads.load import LoadGroup, LoadKind
from loads.transformer import MagneticTransformer

NO_SOURCE = "common practice, no source"

# Ganging: neighbours in one box heat each other (common practice, no source).
GANG_FACTOR = {1: 1.0, 2: 0.8}            # 3 gangs or more: GANG_FACTOR_MANY
GANG_FACTOR_MANY = 0.7
# Side fins broken off to fit a multi-gang box: 1 side, 2 sides (common practice, no source).
FINS_FACTOR = {0: 1.0, 1: 0.8, 2: 0.6}
# Ambient: rating holds up to this temperature, then falls linearly (engineering
# choice, no source: semiconductor junction headroom shrinks with the ambient).
REFERENCE_AMBIENT_C = 25.0
AMBIENT_SLOPE_PER_K = 0.01
# Load types without a printed rating (common practice, no source):
# iron-core and electronic transformers: 80 % of the filament rating, counted in VA;
TRANSFORMER_SHARE = 0.8
# LED / electronic drivers: 10 % of the filament rating (each LED watt counts as ten).
LED_SHARE = 0.10


@dataclass(frozen=True, slots=True, kw_only=True)
class Rule:
    """One step in the rating arithmetic: what it says, the factor, where it comes from."""

    text: str
    factor: float
    origin: str


@dataclass(frozen=True, slots=True, kw_only=True)
class GroupUse:
    """A lamp group against the rating for its type: load [W or VA], rating [W or VA],
    unit, the rule used, and the share of the rating it takes [1]."""

    name: str
    load: float
    rating: float
    unit: str
    rule: Rule
    share: float


@dataclass(frozen=True, slots=True, kw_only=True)
class RatingUse:
    """factor: product of the derating rules [1]; rules: the derating steps;
    groups: each group's use; utilisation: the sum of the shares [1] (≤ 1 fits);
    led_units / max_lamps: the lamp-count cap if printed."""

    factor: float
    rules: tuple[Rule, ...]
    groups: tuple[GroupUse, ...]
    utilisation: float
    led_units: int
    max_lamps: int | None


def derating_rules(dimmer: Dimmer) -> tuple[Rule, ...]:
    """The derating steps that apply to this dimmer (an empty tuple: none)."""
    rules: list[Rule] = []
    gang = GANG_FACTOR.get(dimmer.gang, GANG_FACTOR_MANY)
    fins = FINS_FACTOR[dimmer.fins_removed]
    # Engineering choice: ganging and fin removal describe the same heat problem (fins
    # come off so dimmers fit side by side), so the stricter of the two applies, not both.
    if gang < 1.0 or fins < 1.0:
        if fins <= gang:
            rules.append(Rule(text=f"{dimmer.fins_removed} side fin(s) removed: × {fins:.2f}", factor=fins, origin=NO_SOURCE))
        else:
            rules.append(Rule(text=f"{dimmer.gang}-gang box: × {gang:.2f}", factor=gang, origin=NO_SOURCE))
    if dimmer.ambient_temperature_c > REFERENCE_AMBIENT_C:
        f = max(0.0, 1.0 - AMBIENT_SLOPE_PER_K * (dimmer.ambient_temperature_c - REFERENCE_AMBIENT_C))
        rules.append(Rule(text=f"ambient {dimmer.ambient_temperature_c:.0f} °C above {REFERENCE_AMBIENT_C:.0f} °C: × {f:.2f}",
                          factor=f, origin="engineering choice, no source"))
    return tuple(rules)


def derating_factor(dimmer: Dimmer) -> float:
    """Product of the derating steps [1]."""
    f = 1.0
    for r in derating_rules(dimmer):
        f *= r.factor
    return f


def group_load(group: LoadGroup) -> tuple[float, str]:
    """What a group puts on the dimmer's rating: (amount, "W" or "VA")."""
    if isinstance(group, MagneticTransformer | ElectronicTransformer):
        return group.count * group.rated_va, "VA"
    return group.count * group.rated_power_w, "W"


def type_rating(dimmer: Dimmer, group: LoadGroup) -> tuple[float, Rule]:
    """The rating before derating that applies to a group's load type, and its rule."""
    kind = group.kind
    if kind in (LoadKind.MAGNETIC_TRANSFORMER, LoadKind.ELECTRONIC_TRANSFORMER):
        if dimmer.rated_transformer_va is not None:
            return dimmer.rated_transformer_va, Rule(text=f"printed transformer rating {dimmer.rated_transformer_va:.0f} VA",
                                                     factor=1.0, origin="the dimmer's own printed figure")
        r = TRANSFORMER_SHARE * dimmer.rated_load_w
        return r, Rule(text=f"transformer load: {TRANSFORMER_SHARE:.0%} of the {dimmer.rated_load_w:.0f} W rating, in VA",
                       factor=TRANSFORMER_SHARE, origin=NO_SOURCE)
    if kind is LoadKind.ELECTRONIC_DRIVER:
        if dimmer.rated_led_w is not None:
            return dimmer.rated_led_w, Rule(text=f"printed LED rating {dimmer.rated_led_w:.0f} W", factor=1.0,
                                            origin="the dimmer's own printed figure")
        r = LED_SHARE * dimmer.rated_load_w
        return r, Rule(text=f"LED load: {LED_SHARE:.0%} of the {dimmer.rated_load_w:.0f} W rating", factor=LED_SHARE,
                       origin=NO_SOURCE)
    return dimmer.rated_load_w, Rule(text=f"printed rating {dimmer.rated_load_w:.0f} W", factor=1.0,
                                     origin="the dimmer's own printed figure")


def rating_use(dimmer: Dimmer, groups: tuple[LoadGroup, ...]) -> RatingUse:
    """How much of the derated rating the lamp groups use (mixed loads add their shares)."""
    rules = derating_rules(dimmer)
    factor = derating_factor(dimmer)
    uses = []
    for g in groups:
        load, unit = group_load(g)
        rating, rule = type_rating(dimmer, g)
        derated = rating * factor
        share = load / derated if derated > 0 else float("inf")
        uses.append(GroupUse(name=g.name, load=load, rating=derated, unit=unit, rule=rule, share=share))
    led_units = sum(g.count for g in groups if isinstance(g, ElectronicDriver))
    return RatingUse(factor=factor, rules=rules, groups=tuple(uses), utilisation=sum(u.share for u in uses),
                     led_units=led_units, max_lamps=dimmer.max_lamps)
