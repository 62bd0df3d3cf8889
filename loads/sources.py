"""The bibliography: every source the models, checks and tests cite, by a short stable key.

Docstrings, constant comments and check results cite these keys (``TOLIAS_2017``,
``IEC60898_1``); ``cite(key)`` gives a one-line reference and ``full(key)`` the whole
entry, so the app can show the source behind any figure.

``note`` is honest about provenance: an entry whose details (or whose figures used
here) were recalled rather than read from the source says "from memory, unverified".
Figures said to be transcribed were copied from the printed source by the project;
they are not re-derived here.
"""
from __future__ import annotations

from dataclasses import dataclass

from loads.errors import InputError

FROM_MEMORY = "from memory, unverified"


@dataclass(frozen=True, slots=True, kw_only=True)
class Source:
    """authors: people or body responsible; title: of the work; edition: edition,
    journal volume or version ("" if none); year: of publication (0 if not applicable);
    locator: where in the work (chapter, table, example, page); note: provenance and
    caveats, "from memory, unverified" where recalled rather than read; short: the
    title shown in reports (standard number, book and edition, "common practice")."""

    authors: str
    title: str
    edition: str = ""
    year: int = 0
    locator: str = ""
    note: str = ""
    short: str = ""


SOURCES: dict[str, Source] = {
    # --- power electronics -------------------------------------------------------
    "RASHID4": Source(
        authors="M. H. Rashid",
        title="Power Electronics: Devices, Circuits, and Applications",
        edition="4th ed., Pearson",
        year=2014,
        locator="chapter on AC voltage controllers",
        note="publisher and year from memory, unverified",
        short="Power Electronics textbook, 4th ed. (2014)",
    ),
    "RASHID4_EX11_1": Source(
        authors="M. H. Rashid",
        title="Power Electronics: Devices, Circuits, and Applications",
        edition="4th ed., Pearson",
        year=2014,
        locator="Example 11.1 (single-phase full-wave controller, resistive load: "
                "120 V, 60 Hz, R = 10 ohm, alpha = 90 deg)",
        note="printed results as transcribed by the project from the book; "
             "publisher and year from memory, unverified",
        short="Power Electronics textbook, 4th ed. (2014), Example 11.1",
    ),
    "RASHID4_EX11_2": Source(
        authors="M. H. Rashid",
        title="Power Electronics: Devices, Circuits, and Applications",
        edition="4th ed., Pearson",
        year=2014,
        locator="Example 11.2 (single-phase full-wave controller, R-L load: "
                "120 V, 60 Hz, R = 2.5 ohm, L = 6.5 mH, alpha = 90 deg)",
        note="printed results as transcribed by the project from the book; a printed "
             "rms output voltage that differs from the waveform's is reported as an "
             "erratum; publisher and year from memory, unverified",
        short="Power Electronics textbook, 4th ed. (2014), Example 11.2",
    ),
    "TEXTBOOK_TRIAC": Source(
        authors="various",
        title="General power-electronics textbooks, chapters on thyristors and triacs",
        locator="latching and holding current; gate triggering",
        note="general textbook knowledge, no single text re-read; the figure "
             "'latching is typically 1.5-3x holding' is from memory, unverified",
        short="power-electronics textbooks (triacs)",
    ),
    # --- tungsten ----------------------------------------------------------------
    "FORSYTHE_WORTHING_1925": Source(
        authors="W. E. Forsythe and A. G. Worthing",
        title="The properties of tungsten and the characteristics of tungsten lamps",
        edition="Astrophysical Journal 61",
        year=1925,
        locator="p. 146 ff.; resistivity of tungsten 300-3600 K as tabulated in the "
                "CRC Handbook of Chemistry and Physics",
        note="values used as transcribed by the project from the CRC "
             "Handbook tabulation; the article title and the handbook edition from "
             "memory, unverified",
        short="tungsten lamps, Astrophys. J. 61 (1925)",
    ),
    "TOLIAS_2017": Source(
        authors="P. Tolias",
        title="Analytical expressions for thermophysical properties of solid and liquid "
              "tungsten relevant for fusion applications",
        edition="Nuclear Materials and Energy 13",
        year=2017,
        locator="pp. 42-57; fits for solid tungsten: electrical resistivity, total "
                "hemispherical emissivity, isobaric heat capacity, density",
        note="coefficients as transcribed by the project from the paper; the paper "
             "was not re-read for this code",
        short="tungsten properties, Nucl. Mater. Energy 13 (2017)",
    ),
    "WHITE_MINGES_1997": Source(
        authors="G. K. White and M. L. Minges",
        title="Thermophysical properties of some key solids: an update",
        edition="International Journal of Thermophysics 18",
        year=1997,
        locator="p. 1269 ff.; tungsten resistivity (the data behind the TOLIAS_2017 fit)",
        note="cited through TOLIAS_2017; title from memory, unverified",
        short="tungsten data, Int. J. Thermophys. 18 (1997)",
    ),
    "MATSUMOTO_1999": Source(
        authors="T. Matsumoto, A. Cezairliyan and D. Basak",
        title="Hemispherical total emissivity of niobium, molybdenum, and tungsten at "
              "high temperatures using a combined transient and brief steady-state "
              "technique",
        edition="International Journal of Thermophysics 20",
        year=1999,
        locator="p. 943 ff.; tungsten total hemispherical emissivity (the data behind "
                "the TOLIAS_2017 fit)",
        note="cited through TOLIAS_2017; title from memory, unverified",
        short="tungsten emissivity, Int. J. Thermophys. 20 (1999)",
    ),
    # --- constants, colour, light ------------------------------------------------
    "CODATA": Source(
        authors="CODATA Task Group on Fundamental Constants",
        title="CODATA recommended values of the fundamental physical constants",
        edition="CODATA 2022 (h, c and k exact since the 2019 SI; the tests compare with scipy.constants)",
        year=2022,
        locator="Stefan-Boltzmann constant, Planck constant, speed of light, "
                "Boltzmann constant",
        note="written in loads/filament.py; sigma computed from h, c and k",
        short="CODATA 2022 constants",
    ),
    "CIE15": Source(
        authors="Commission Internationale de l'Eclairage (CIE)",
        title="Colorimetry",
        edition="CIE 15, 3rd ed. (CIE 15:2004)",
        year=2004,
        locator="CIE standard illuminant A (Planckian radiator, about 2856 K); "
                "CIE 1976 lightness L*",
        note="edition and year from memory, unverified",
        short="CIE 15:2004 Colorimetry",
    ),
    "CIE_PHOTOPIC_V": Source(
        authors="Commission Internationale de l'Eclairage (CIE)",
        title="CIE 1924 photopic luminous efficiency function V(lambda)",
        edition="as tabulated in the CIE system of physical photometry "
                "(ISO 23539 / CIE S 010)",
        year=1924,
        locator="V(lambda), 380-780 nm at 10 nm steps",
        note="the 10 nm values used in loads.filament were typed from memory, "
             "unverified against the printed table; the standard's designation from "
             "memory, unverified",
        short="CIE 1924 V(λ)",
    ),
    "IES_HANDBOOK": Source(
        authors="Illuminating Engineering Society",
        title="IES Lighting Handbook, Reference volume",
        edition="edition not checked",
        locator="incandescent 'lamp laws' (exponents of light, power, current, "
                "efficacy, life against voltage); definitions of percent flicker and "
                "flicker index",
        note="lamp-law exponents from memory, unverified; flicker definitions as "
             "transcribed by the project",
        short="IES Lighting Handbook",
    ),
    "IEEE1789_2015": Source(
        authors="IEEE",
        title="IEEE Recommended Practices for Modulating Current in High-Brightness LEDs "
              "for Mitigating Health Risks to Viewers",
        edition="IEEE Std 1789-2015",
        year=2015,
        locator="low-risk and no-observable-effect regions of modulation vs frequency",
        note="region boundaries from memory, unverified",
        short="IEEE Std 1789-2015 (LED flicker)",
    ),
    "CIE_TN006_2016": Source(
        authors="CIE",
        title="Visual Aspects of Time-Modulated Lighting Systems – Definitions and Measurement Models",
        edition="CIE TN 006:2016",
        year=2016,
        locator="stroboscopic visibility measure SVM: Minkowski sum (exponent 3.7) of the Fourier "
                "components over the threshold curve T(f)",
        note="formula and constants from memory, unverified (a public summary confirms the Minkowski "
             "form and SVM = 1 at the visibility threshold; validated in J. Opt. Soc. Am. A "
             "35(2), 309, 2018); the EU ecodesign cap SVM ≤ 0.4 (Regulation (EU) 2019/2020) also from memory",
        short="CIE TN 006:2016 (stroboscopic effect)",
    ),
    "LRC_ASSIST_DIMMING": Source(
        authors="Lighting Research Center, Rensselaer Polytechnic Institute (ASSIST)",
        title="ASSIST recommends: recommendation on lamp dimming performance",
        locator="user-acceptance targets: dim to 5 % or lower; at full, at least 90 % "
                "of the light on a plain switch",
        note="exact title and year from memory, unverified",
        short="ASSIST recommends: lamp dimming",
    ),
    # --- standards ---------------------------------------------------------------
    "IEC60898_1": Source(
        authors="International Electrotechnical Commission",
        title="Electrical accessories - Circuit-breakers for overcurrent protection for "
              "household and similar installations - Part 1: Circuit-breakers for a.c. "
              "operation",
        edition="IEC 60898-1",
        locator="time-current characteristics: instantaneous-trip bands B, C, D and the "
                "conventional thermal test points",
        note="edition year not checked; table number from memory, unverified",
        short="IEC 60898-1 (circuit-breakers)",
    ),
    "IEC61000_3_2": Source(
        authors="International Electrotechnical Commission",
        title="Electromagnetic compatibility (EMC) - Part 3-2: Limits - Limits for "
              "harmonic current emissions (equipment input current <= 16 A per phase)",
        edition="IEC 61000-3-2",
        locator="Class A limits (A); Class C limits (% of fundamental)",
        note="edition year not checked",
        short="IEC 61000-3-2 (harmonic limits)",
    ),
    "IEC60725": Source(
        authors="International Electrotechnical Commission",
        title="Consideration of reference impedances and public supply network "
              "impedances for use in determining the disturbance characteristics of "
              "electrical equipment having a rated current <= 75 A per phase",
        edition="IEC TR 60725",
        locator="reference impedance of the low-voltage supply",
        note=FROM_MEMORY,
        short="IEC TR 60725 (supply impedance)",
    ),
    # --- the trade -----------------------------------------------------------------
    "TRADE": Source(
        authors="-",
        title="Common practice of the electrical trade",
        locator="",
        note="common practice, no source",
        short="common practice, no source",
    ),
}


def _entry(key: str) -> Source:
    try:
        return SOURCES[key]
    except KeyError:
        raise InputError("unknown source key", key=key) from None


def cite(key: str) -> str:
    """One line: ``KEY: authors, title, edition (year), locator [note]``."""
    s = _entry(key)
    parts = [s.authors, s.title]
    if s.edition:
        parts.append(s.edition + (f" ({s.year})" if s.year else ""))
    elif s.year:
        parts.append(str(s.year))
    if s.locator:
        parts.append(s.locator)
    line = f"{key}: " + ", ".join(p for p in parts if p and p != "-")
    if s.note:
        line += f" [{s.note}]"
    return line


def short_title(key: str) -> str:
    """The title shown in reports: standard number, book and edition, or "common
    practice, no source" (the full title if no short one is given)."""
    s = _entry(key)
    return s.short or s.title


def full(key: str) -> str:
    """The whole entry, one field per line, for the app's 'source behind this' view."""
    s = _entry(key)
    rows = [("key", key), ("authors", s.authors), ("title", s.title), ("edition", s.edition),
            ("year", str(s.year) if s.year else ""), ("where", s.locator), ("note", s.note)]
    return "\n".join(f"{name:8} {value}" for name, value in rows if value)
