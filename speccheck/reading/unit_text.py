"""Unit texts before pint sees them: the dimensions speccheck knows, the screen that refuses
anything that is not a plain unit expression (numbers, towers of exponents, logarithmic
units), and the plain records a parsed unit becomes."""

from __future__ import annotations

import re
from dataclasses import dataclass

# Dimension keys speccheck knows, by SI unit, with a human name.
DIMENSION_NAMES: dict[str, str] = {
    "m": "length",
    "s": "time",
    "Hz": "frequency",
    "1/m": "wavenumber",
    "J": "energy",
    "W": "power",
    "W/m^2": "intensity",
    "J/m^2": "fluence",
    "V/m": "electric field",
    "1": "dimensionless",
    "s^2": "group-delay dispersion",
    "s^3": "third-order dispersion",
    "s^4": "fourth-order dispersion",
}

MAX_UNIT_LENGTH = 64

# A unit string may contain letters (with µ μ Ω Å °), %, spaces, * / · ^ ( ),
# and digits only as small exponents or as the "1" of "1/cm".
_UNIT_CHARS = re.compile(r"^[A-Za-zµμΩÅ°%²³¹⁰⁴⁵⁶⁷⁸⁹⁻ ./*^()·⋅\-0-9]+$")
_DIGITS = re.compile(r"\d+")
_EXPONENT_BEFORE = re.compile(r"(\^|\*\*)\s*-?\s*$")
_SUPERSCRIPTS = str.maketrans({"²": "^2", "³": "^3", "¹": "^1", "·": "*", "⋅": "*", "μ": "µ"})
_SUPER_MINUS = re.compile(r"⁻\^?(\d)")


CONSTANT_NAMES = {"c": "speed_of_light", "h": "planck_constant", "eps0": "vacuum_permittivity",
              "e": "elementary_charge", "m_e": "electron_mass"}


class UnitError(ValueError):
    """A unit string that is not a usable unit; the message says why."""


class AngularUnit(UnitError):
    """A unit of angular frequency or angular wavenumber (rad/s, rad/m): pint counts the radian
    as 1, so it would be read as a frequency 2π too large.  ``factor`` is pint's factor, for a
    message that says what the value is as a frequency."""

    def __init__(self, text: str, factor: float, dimension: str) -> None:
        super().__init__(f"{text!r} is an angular unit (ω = 2π f)")
        self.text, self.factor, self.dimension = text, factor, dimension


# Logarithmic units: pint converts "1 dBm" to 1.26 mW, and a number in front would then be
# scaled linearly (30 dBm as 37.8 mW instead of 1 W).  They never reach pint; values.py
# converts the plain ones (dB, dBm, dBW) as logarithms.
_LOGARITHMIC = re.compile(r"(?<![A-Za-z])(?:dB[A-Za-z]*|Np|neper|nepers|decibels?|bels?|B|octaves?|decades?)"
                          r"(?![A-Za-z])")
# Angles and turns: pint counts them as pure numbers (1 turn = 2π, 1 cycle = 2π), so a unit with
# one in it would be read 2π (or 180/π …) off; they are refused wherever they appear.
_PREFIX = r"(?:[yzafpnuµmcdhkMGTPEZY]|da|kilo|mega|giga|tera|peta|milli|micro|nano|pico|femto)?"
_RADIAN = re.compile(r"(?<![A-Za-z])" + _PREFIX + r"(?:rad|radians?|turns?|revolutions?|rev|cycles?|rps|rpm|"
                     r"deg|degrees?|grad|gradians?|gon|arcsec|arcmin|arcseconds?|arcminutes?|sr|steradians?)"
                     r"(?![A-Za-z])")


@dataclass(frozen=True)
class Unit:
    text: str  # as the user wrote it (normalised for display)
    factor: float  # multiply a value in this unit by factor to get SI
    dimension: str | None  # a key of DIMENSION_NAMES, or None if unknown
    dimensionality: str  # pint's own description, for messages


@dataclass(frozen=True)
class Constants:
    c: float
    h: float
    eps0: float
    e: float
    m_e: float


# A grating's line count is written per length ("1200 lines/mm", "1200 l/mm", "1200 gr/mm"): the count
# is a pure number (and "l" would be pint's litre), so it reads as "1/mm".
_LINES_PER = re.compile(r"^(?:lines?|grooves?|gr|l)\s*/\s*(?=(?:[a-zµμ]{0,2}m)$)")


# An area or volume typed without the caret, as people do ("J/cm2", "W/mm2", "µm3"), and a wavenumber
# as "cm-1": a metre with an SI prefix directly followed by 2 or 3 (or -1) is that power of it.
_BARE_POWER = re.compile(r"(?<![A-Za-zµμ])([kcmuµμnpf]?m)(2|3|-1)(?![0-9])")


def normalise_unit_text(text: str) -> str:
    text = _LINES_PER.sub("1/", text.strip())
    text = _BARE_POWER.sub(lambda m: f"{m.group(1)}^{m.group(2)}", text)
    text = text.translate(_SUPERSCRIPTS)  # "cm⁻¹" -> "cm⁻^1"
    text = _SUPER_MINUS.sub(lambda m: "^-" + m.group(1), text)  # -> "cm^-1"
    return text.replace("**", "^")


def screen_unit_text(text: str) -> None:
    """Reject unit strings that are not plain unit expressions (before pint sees them)."""
    if len(text) > MAX_UNIT_LENGTH:
        raise UnitError(f"unit text is longer than {MAX_UNIT_LENGTH} characters")
    if _LOGARITHMIC.search(text):
        raise UnitError(f"{text!r} is a logarithmic unit; write the value in a linear unit (W, or a plain "
                        "ratio), or as a plain number of dB, dBm or dBW")
    if not _UNIT_CHARS.match(text):
        bad = sorted({ch for ch in text if not _UNIT_CHARS.match(ch)})
        raise UnitError(f"unit contains characters no unit has: {''.join(bad)!r}")
    for m in _DIGITS.finditer(text):
        before = text[: m.start()]
        is_exponent = _EXPONENT_BEFORE.search(before) is not None and len(m.group()) <= 2
        is_one_over = m.group() == "1" and text[m.end() :].lstrip().startswith("/")
        if not (is_exponent or is_one_over):
            raise UnitError(f"unexpected number {m.group()!r} inside the unit")
        if is_exponent and text[m.end() :].lstrip().startswith("^"):  # W^2^2^2...: pint would compute a tower
            raise UnitError("an exponent may not itself be raised to a power")
