"""Values as a practitioner types them: ``47n``, ``4.7 uF``, ``60 W``, ``150u``, ``4k7``.

``parse_quantity(text, unit)`` turns the typed text into a number in the unit's base
(``"4.7 uF"`` with unit ``"F"`` → 4.7e-6); ``format_quantity(value, unit, prefix)``
writes a base-unit number back the way it is printed on a part (``4.7e-6`` → ``"4.7 µF"``).

Accepted: an optional sign, a decimal number (``.`` or ``,`` as the decimal mark, an
optional exponent), optional spaces, an optional SI prefix (p n u µ m k K M G) and an
optional unit symbol that must match the expected unit.  The resistor/capacitor code
with the prefix as the decimal mark (``4k7``, ``4n7``, ``4R7``) is accepted too
(IEC 60062 letter-and-digit code, from memory).

This module knows nothing about fields or circuits; it is input parsing only.
"""
from __future__ import annotations

import math
import re

from loads.errors import InputError

# SI prefixes (the BIPM SI brochure; ``u`` for µ is the usual ASCII stand-in,
# ``K`` for kilo is common practice on resistor markings, no source).
PREFIXES: dict[str, float] = {
    "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "m": 1e-3,
    "": 1.0, "k": 1e3, "K": 1e3, "M": 1e6, "G": 1e9,
}
# How each unit may be typed (the first spelling is the one shown).
UNIT_SPELLINGS: dict[str, tuple[str, ...]] = {
    "Ω": ("Ω", "ohms", "ohm", "Ohm", "Ohms", "R"),
    "F": ("F",),
    "H": ("H",),
    "A": ("A",),
    "V": ("V",),
    "W": ("W",),
    "VA": ("VA",),
    "Hz": ("Hz", "hz", "HZ"),
    "s": ("s",),
    "°": ("°", "deg"),
    "%": ("%",),
    "K": ("K",),
    "°C": ("°C", "degC", "C"),
    "A²s": ("A²s", "A2s"),
}
_NUMBER = re.compile(r"^\s*([+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")
_CODE = re.compile(r"^\s*([+-]?)(\d+)([pnuµμmkKMGR])(\d+)\s*(.*?)\s*$")


def _split_unit(rest: str, unit: str) -> str:
    """Strip the unit symbol from the end of ``rest``; return what is left (the prefix)."""
    for spelling in sorted(UNIT_SPELLINGS.get(unit, (unit,)), key=len, reverse=True):
        if spelling and rest.endswith(spelling):
            return rest[: -len(spelling)].strip()
    return rest


def parse_quantity(text: str, unit: str = "") -> float:
    """The number typed in ``text``, in the base of ``unit`` (prefix applied).

    Raises InputError with a one-line reason when the text is not a number in that
    unit (unknown prefix, wrong unit, not finite)."""
    raw = text.strip()
    if not raw:
        raise InputError("a value is needed")
    code = _CODE.match(raw)
    if code and not (unit == "K" and code.group(3) == "K"):
        sign, whole, mark, frac, rest = code.groups()
        if rest and _split_unit(rest, unit) != "":
            raise InputError(f"'{rest}' is not {unit or 'a plain number'}")
        scale = 1.0 if mark == "R" else PREFIXES[mark]
        value = float(f"{sign}{whole}.{frac}") * scale
        return value
    match = _NUMBER.match(raw)
    if not match:
        raise InputError(f"'{raw}' is not a number")
    number, rest = match.groups()
    value = float(number.replace(",", "."))
    prefix = _split_unit(rest, unit) if unit else rest
    if unit == "K" and prefix == "K":   # "2800 K" is kelvin, not kilo
        prefix = ""
    if prefix not in PREFIXES:
        if unit:
            raise InputError(f"'{rest}' is not a prefix of {unit} (try e.g. 4.7 u{unit} or 470 n{unit})"
                             if unit in ("F", "H") else f"'{rest}' does not fit the unit {unit}")
        raise InputError(f"'{rest}' is not understood; give a plain number")
    if unit in ("%", "°", "°C") and prefix:
        raise InputError(f"'{rest}': no prefix for {unit}")
    value *= PREFIXES[prefix]
    if not math.isfinite(value):
        raise InputError(f"'{raw}' is not a finite number")
    return value


def format_number(value: float, digits: int = 4) -> str:
    """``value`` with up to ``digits`` significant figures, no trailing zeros."""
    text = f"{value:.{digits}g}"
    if "e" in text:
        mantissa, exponent = text.split("e")
        return f"{mantissa}e{int(exponent)}"
    return text


def format_quantity(value: float | None, unit: str = "", prefix: str | None = None, digits: int = 4) -> str:
    """``value`` (in the unit's base) as text with a prefix: ``prefix`` if given, else an
    engineering prefix chosen by magnitude.  None gives the empty string."""
    if value is None:
        return ""
    if not unit:
        return format_number(value, digits)
    if prefix is None:
        prefix = ""
        if unit not in ("%", "°", "°C", "K", "Hz") and value != 0:
            exponent = math.floor(math.log10(abs(value)) / 3) * 3
            exponent = min(max(exponent, -12), 9)
            prefix = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}[exponent]
    shown = value / PREFIXES[prefix]
    separator = "" if unit in ("%", "°") else " "
    return f"{format_number(shown, digits)}{separator}{prefix}{unit}"
