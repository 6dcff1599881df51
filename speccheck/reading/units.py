"""The unit boundary: the one place speccheck talks to pint.

A ``UnitSystem`` owns one pint ``UnitRegistry`` per process (created by the
caller and passed in, never a hidden global).  It parses a *unit string* once
into a plain ``Unit`` (a factor to SI and a dimension key) and caches it, so
the engine works on floats.  Only unit strings ever reach pint, never numbers
or expressions: a unit string is screened first, so nothing like
``10**10**10`` can make pint compute.  Physical constants are read from pint's
CODATA values here and nowhere else.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache


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
}

MAX_UNIT_LENGTH = 64

# A unit string may contain letters (with µ μ Ω Å °), %, spaces, * / · ^ ( ),
# and digits only as small exponents or as the "1" of "1/cm".
_UNIT_CHARS = re.compile(r"^[A-Za-zµμΩÅ°%²³¹⁰⁴⁵⁶⁷⁸⁹⁻ ./*^()·⋅\-0-9]+$")
_DIGITS = re.compile(r"\d+")
_EXPONENT_BEFORE = re.compile(r"(\^|\*\*)\s*-?\s*$")
_SUPERSCRIPTS = str.maketrans({"²": "^2", "³": "^3", "¹": "^1", "·": "*", "⋅": "*", "μ": "µ"})
_SUPER_MINUS = re.compile(r"⁻\^?(\d)")


_CONSTANTS = {"c": "speed_of_light", "h": "planck_constant", "eps0": "vacuum_permittivity",
              "e": "elementary_charge", "m_e": "electron_mass"}
MAX_TABLE = 2000  # unit texts remembered on disk


def _table_path():
    """Where the table of pint's answers lives, or None when it is turned off."""
    import os
    from pathlib import Path

    if os.environ.get("SPECCHECK_NO_CACHE"):
        return None
    try:
        from importlib.metadata import version

        pint_version = version("pint")
    except Exception:
        return None
    base = os.environ.get("SPECCHECK_CACHE_DIR") or os.path.join(
        os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache"), "speccheck")
    from speccheck._version import __version__

    # keyed by both versions: a new speccheck may describe units differently, a new pint may
    # carry new CODATA values
    return Path(base) / f"units-{__version__}-pint{pint_version}.json"


class UnitError(ValueError):
    """A unit string that is not a usable unit; the message says why."""


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


def normalise_unit_text(text: str) -> str:
    text = text.strip()
    text = text.translate(_SUPERSCRIPTS)  # "cm⁻¹" -> "cm⁻^1"
    text = _SUPER_MINUS.sub(lambda m: "^-" + m.group(1), text)  # -> "cm^-1"
    return text.replace("**", "^")


def screen_unit_text(text: str) -> None:
    """Reject unit strings that are not plain unit expressions (before pint sees them)."""
    if len(text) > MAX_UNIT_LENGTH:
        raise UnitError(f"unit text is longer than {MAX_UNIT_LENGTH} characters")
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


class UnitSystem:
    """One pint registry per process and the caches built on it.

    pint is imported only when it is needed.  What it answered (the CODATA constants, and
    each unit text's factor and dimension) is kept in a small table on disk
    (``units-<speccheck version>-pint<pint version>.json`` in the user's cache folder; ``SPECCHECK_CACHE_DIR`` moves
    it, ``SPECCHECK_NO_CACHE=1`` turns it off), so a later run that meets only known units
    never imports pint.  The values in that table are pint's, never typed in.
    """

    def __init__(self, registry=None, cache_folder: str | None = ":auto:", table: bool = True) -> None:
        self._registry = registry
        self._cache_folder = cache_folder
        self._table_path = _table_path() if table and registry is None else None
        self._table: dict = {}
        self._constants: dict | None = None
        self._dirty = False
        if self._table_path is not None:
            self._load_table()
        self.parse = lru_cache(maxsize=4096)(self._parse)
        if self._constants is None:
            q = self.registry.Quantity
            self._constants = {name: float(q(1, pint_name).to_base_units().magnitude)
                               for name, pint_name in _CONSTANTS.items()}
            self._dirty = True
        self.constants = Constants(**self._constants)

    @property
    def registry(self):
        if self._registry is None:
            import pint

            try:
                self._registry = pint.UnitRegistry(cache_folder=self._cache_folder)
            except Exception:  # an unwritable cache folder must not stop a check
                self._registry = pint.UnitRegistry()
        return self._registry

    @property
    def _dimensions(self) -> dict:
        if not hasattr(self, "_dimension_keys"):
            self._dimension_keys = {self._dimensionality(key): key for key in DIMENSION_NAMES}
        return self._dimension_keys

    # ------------------------------------------------------------ the table on disk
    def _load_table(self) -> None:
        import json

        try:
            data = json.loads(self._table_path.read_text("utf-8"))
            constants = {k: float(data["constants"][k]) for k in _CONSTANTS}
            table = {str(k): Unit(str(v[0]), float(v[1]), v[2] if v[2] is None else str(v[2]), str(v[3]))
                     for k, v in data["units"].items()}
        except (OSError, ValueError, KeyError, TypeError, IndexError):
            return  # no table yet, or a damaged one: pint answers and the table is written anew
        self._constants, self._table = constants, table

    def save(self) -> None:
        """Write what pint answered this run to the table (atomically; failures are ignored)."""
        if not self._dirty or self._table_path is None:
            return
        import json
        import os
        import tempfile

        data = {"constants": self._constants,
                "units": {k: [u.text, u.factor, u.dimension, u.dimensionality]
                          for k, u in sorted(self._table.items())[:MAX_TABLE]}}
        try:
            self._table_path.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=self._table_path.parent, prefix=".units.")
            with os.fdopen(fd, "w", encoding="utf-8") as out:
                json.dump(data, out, ensure_ascii=False)
            os.replace(tmp, self._table_path)
            self._dirty = False
        except OSError:
            pass

    def _dimensionality(self, text: str):
        if text == "1":
            return frozenset()
        units = self.registry.parse_units(text.replace("^", "**"))
        return frozenset(self.registry.get_dimensionality(units).items())

    def _parse(self, text: str) -> Unit:
        shown = normalise_unit_text(text)
        if shown in ("%", "percent"):
            return Unit("%", 0.01, "1", "dimensionless")
        known = self._table.get(shown)
        if known is not None:
            return known
        screen_unit_text(shown)
        try:
            units = self.registry.parse_units(shown.replace("^", "**"))
            quantity = self.registry.Quantity(1.0, units).to_base_units()
            factor = float(quantity.magnitude)
        except Exception as exc:  # pint's errors are many kinds; all mean "not a unit"
            raise UnitError(_pint_reason(shown, exc)) from None
        if not math.isfinite(factor) or factor == 0.0:
            raise UnitError(f"unit {shown!r} has no finite conversion to SI")
        dims = frozenset(quantity.dimensionality.items())
        dimension = self._dimensions.get(dims)
        described = str(quantity.dimensionality) or "dimensionless"
        unit = Unit(shown, factor, dimension, described)
        if len(self._table) < MAX_TABLE:
            self._table[shown] = unit
            self._dirty = True
        return unit

    def factor(self, text: str) -> float:
        return self.parse(text).factor


def _pint_reason(text: str, exc: Exception) -> str:
    name = type(exc).__name__
    if name == "UndefinedUnitError":
        return f"unknown unit {text!r}"
    if name == "DefinitionSyntaxError" or isinstance(exc, SyntaxError):
        return f"{text!r} is not a unit expression"
    if isinstance(exc, OverflowError):
        return f"unit {text!r} overflows when converted to SI"
    return f"{text!r} is not a usable unit ({name})"


# ---------------------------------------------------------------- formatting

_PREFIXES = (
    (1e-18, "a"), (1e-15, "f"), (1e-12, "p"), (1e-9, "n"), (1e-6, "µ"), (1e-3, "m"),
    (1.0, ""), (1e3, "k"), (1e6, "M"), (1e9, "G"), (1e12, "T"), (1e15, "P"), (1e18, "E"),
)
_PREFIXABLE = {"W", "J", "Hz", "s", "eV", "V/m", "m"}
# Display units whose natural prefix is fixed by habit; derived values are shown in them.
_FIXED = {"W/cm^2", "J/cm^2", "1/cm", "1", "%"}


def format_number(x: float, digits: int = 4) -> str:
    if x == 0 or not math.isfinite(x):
        return repr(x) if not math.isfinite(x) else "0"
    exponent = math.floor(math.log10(abs(x)))
    if -3 <= exponent < 5:
        decimals = max(digits - 1 - exponent, 0)
        text = f"{x:.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
        return text
    # the float's own decimal exponent form: no 10**exponent that underflows (5e-324)
    # and no mantissa rounded up to 10 ("10e8")
    mantissa, exponent = f"{x:.{max(digits - 1, 0)}e}".split("e")
    if "." in mantissa:
        mantissa = mantissa.rstrip("0").rstrip(".")
    return f"{mantissa}e{int(exponent)}"


def pretty_unit(text: str) -> str:
    return text.replace("^2", "²").replace("^3", "³").replace("^-1", "⁻¹").replace("**", "^")


def choose_unit(units: UnitSystem, si_value: float, display_unit: str, keep: bool = False) -> str:
    """The unit to show a value in: ``display_unit`` with an engineering prefix that fits the
    number; with ``keep`` (a unit the user chose) it is kept while the number reads well."""
    if display_unit in _FIXED or not math.isfinite(si_value) or si_value == 0:
        return display_unit
    # The choice depends only on the number's order of magnitude (its first digits matter only
    # near a prefix boundary): cache it by log10 of the value in steps of 1/10000 of a decade.
    step = round(math.log10(abs(si_value)) * 1e4)
    return _choose_unit(units, math.copysign(10.0 ** (step / 1e4), si_value), display_unit, keep)


@lru_cache(maxsize=8192)
def _choose_unit(units: UnitSystem, si_value: float, display_unit: str, keep: bool) -> str:
    if display_unit in _FIXED or not math.isfinite(si_value) or si_value == 0:
        return display_unit
    base = display_unit
    for _, p in _PREFIXES + ((1e-6, "u"),):
        if p and display_unit.startswith(p) and display_unit[len(p):] in _PREFIXABLE:
            base = display_unit[len(p):]
            break
    if base not in _PREFIXABLE:
        return display_unit
    if keep and 0.1 <= abs(si_value / units.factor(display_unit)) < 1e4:
        return display_unit  # the unit people chose reads well: keep it (1030 nm, not 1.03 µm)
    in_base = si_value / units.factor(base)
    best = base
    for scale, p in _PREFIXES:
        if abs(in_base) >= scale * 0.9995:
            best = p + base
    return best


def format_quantity(units: UnitSystem, si_value: float, unit_text: str) -> str:
    if unit_text == "1":
        return format_number(si_value)
    value = si_value / units.factor(unit_text)
    sep = "" if unit_text == "%" else " "
    return f"{format_number(value)}{sep}{pretty_unit(unit_text)}"
