"""Display units: SI (as stored) or US customary (ft, kip/ft, psf, pcf) for people.

Files and the engine stay in SI; only what is shown changes. Factors are exact from the
definitions of the foot (0.3048 m) and the pound-force (4.4482216152605 N)
[pub, NIST Special Publication 811 (2008), Appendix B].

>>> Display("us").format(3.0, "m")
'9.84 ft'
"""

from __future__ import annotations

import re
from dataclasses import dataclass

FOOT_M = 0.3048
POUND_FORCE_N = 4.4482216152605
POUND_KG = 0.45359237
KIP_KN = POUND_FORCE_N  # 1 kip = 1000 lbf = 4.448 kN
CUBIC_YARD_M3 = (3 * FOOT_M) ** 3

SYSTEMS = ("si", "us")

US: dict[str, tuple[str, float]] = {
    # SI unit: (US unit, multiply an SI value by this)
    "m": ("ft", 1.0 / FOOT_M),
    "mm": ("in", 1.0 / 25.4),
    "m2": ("ft²", 1.0 / FOOT_M**2),
    "m3": ("yd³", 1.0 / CUBIC_YARD_M3),
    "kN/m": ("kip/ft", FOOT_M / KIP_KN),
    "kN·m/m": ("kip·ft/ft", 1.0 / KIP_KN),
    "kPa": ("psf", 1000.0 * FOOT_M**2 / POUND_FORCE_N),
    "kN/m3": ("pcf", 1000.0 * FOOT_M**3 / POUND_FORCE_N),
    "kg": ("lb", 1.0 / POUND_KG),
    "kg/m2": ("lb/ft²", FOOT_M**2 / POUND_KG),
    "m/m": ("ft/ft", 1.0),
}
"""SI unit -> US customary unit and factor. Units not listed (deg, %, ratios) are unchanged."""

_IN_WORDS = re.compile(
    r"(?<![\w.])(-?\d+(?:\.\d+)?)\s?(kN/m³|kN/m3|kN/m|kPa|m²|m2|m³|m3|mm|m)(?![\w²³/])"
)
_WORD_UNITS = {"kN/m³": "kN/m3", "m²": "m2", "m³": "m3"}

SI_LABELS = {"m2": "m²", "m3": "m³", "kN/m3": "kN/m³", "kg/m2": "kg/m²"}
DIGITS = {"m": 2, "mm": 1, "m2": 1, "m3": 1, "kN/m": 1, "kN·m/m": 1, "kPa": 1, "kN/m3": 1, "kg": 0}


def convert(value_si: float, unit_si: str, system: str = "si") -> tuple[float, str]:
    """(value, unit label) of an SI value in the chosen system."""
    if system not in SYSTEMS:
        raise ValueError(f"unit system {system!r}: use one of {', '.join(SYSTEMS)}")
    if system == "us" and unit_si in US:
        label, factor = US[unit_si]
        return value_si * factor, label
    return value_si, SI_LABELS.get(unit_si, unit_si)


@dataclass(frozen=True)
class Display:
    """Formats SI values for one unit system: ``Display("us").format(4.0, "m")``."""

    system: str = "si"

    def __post_init__(self) -> None:
        if self.system not in SYSTEMS:
            raise ValueError(f"unit system {self.system!r}: use one of {', '.join(SYSTEMS)}")

    def value(self, value_si: float, unit_si: str) -> float:
        return convert(value_si, unit_si, self.system)[0]

    def label(self, unit_si: str) -> str:
        return convert(0.0, unit_si, self.system)[1]

    def format(self, value_si: float, unit_si: str, digits: int | None = None) -> str:
        value, label = convert(value_si, unit_si, self.system)
        d = DIGITS.get(unit_si, 2) if digits is None else digits
        return f"{value:,.{d}f} {label}"  # thousands by commas, as every amount is shown


def in_words(text: str, display: Display) -> str:
    """``text`` (an engine's reason, a note) with every SI quantity it names (``5.2 m``,
    ``12 kPa``) shown in ``display``'s units, to as many decimals as it was written."""
    if display.system == "si":
        return text

    def convert_one(match: re.Match[str]) -> str:
        number, unit = match.group(1), _WORD_UNITS.get(match.group(2), match.group(2))
        decimals = len(number.split(".")[1]) if "." in number else 0
        value, label = convert(float(number), unit, display.system)
        return f"{value:.{max(decimals, 1 if unit in ('m', 'kPa') else decimals)}f} {label}"

    return _IN_WORDS.sub(convert_one, text)
