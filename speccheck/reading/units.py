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

import bisect
import math
import re
from functools import lru_cache

from speccheck.reading import unit_table
from speccheck.reading.unit_text import (  # noqa: F401  (re-exported: the unit boundary's names)
    CONSTANT_NAMES, DIMENSION_NAMES, AngularUnit, Constants, Unit, UnitError, _RADIAN, normalise_unit_text,
    screen_unit_text)


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
        self._table_path = unit_table.path() if table and registry is None else None
        self._table: dict = {}
        self._constants: dict | None = None
        self._dirty = False
        if self._table_path is not None:
            self._load_table()
        self.parse = lru_cache(maxsize=4096)(self._parse)
        if self._constants is None:
            q = self.registry.Quantity
            self._constants = {name: float(q(1, pint_name).to_base_units().magnitude)
                               for name, pint_name in CONSTANT_NAMES.items()}
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
        """Read the table; every entry is checked, and one that fails is dropped (pint answers
        it again).  Constants that are not the SI's are a damaged table: it is not used."""
        loaded = unit_table.load(self._table_path)
        if loaded is not None:
            self._constants, self._table, damaged = loaded
            self._dirty = damaged  # write the table back without the bad entries

    def save(self) -> None:
        """Write what pint answered this run to the table, merged with what another run wrote
        meanwhile (atomically, under a lock where the platform has one; failures are ignored)."""
        if self._dirty and self._table_path is not None and unit_table.save(
                self._table_path, self._constants, self._table):
            self._dirty = False

    def _dimensionality(self, text: str):
        if text == "1":
            return frozenset()
        units = self.registry.parse_units(text.replace("^", "**"))
        return frozenset(self.registry.get_dimensionality(units).items())

    def _parse(self, text: str) -> Unit:
        shown = normalise_unit_text(text)
        if shown in ("%", "percent"):
            return Unit("%", 0.01, "1", "dimensionless")
        screen_unit_text(shown)  # before the table, so a damaged table cannot let a unit through
        known = self._table.get(shown)
        if known is None:
            known = self._from_pint(shown)
        if _RADIAN.search(shown):
            if known.dimension in ("Hz", "1/m") and re.search(r"rad", shown):
                raise AngularUnit(shown, known.factor, known.dimension)
            raise UnitError(f"{shown!r} holds an angle or a count of turns or cycles, which pint reads as a pure "
                            "number (1 turn = 2π): write the value without it (a frequency in Hz)")
        return known

    def _from_pint(self, shown: str) -> Unit:
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
        if len(self._table) < unit_table.MAX_TABLE:
            self._table[shown] = unit
            self._dirty = True
        return unit

    def factor(self, text: str) -> float:
        return self.parse(text).factor


_CASE_PREFIXES = ("", "a", "f", "p", "n", "u", "µ", "m", "k", "M", "G", "T", "P")
_CASE_BASES = ("s", "Hz", "J", "W", "eV", "m")
# the common units whose spelling differs from another only in case, by their lower-case form
_BY_LOWER: dict[str, list[str]] = {}
for _base in _CASE_BASES:
    for _prefix in _CASE_PREFIXES:
        _BY_LOWER.setdefault((_prefix + _base).lower(), []).append(_prefix + _base)


def _case_hint(text: str) -> str:
    """For a unit written in the wrong case ('mhz', '10 uj', '2 w'): the units it may mean.  Prefixes are
    case-sensitive (M mega, m milli), so every unit that fits is named, never one guessed."""
    fits = [u for u in _BY_LOWER.get(text.strip().lower(), []) if u != text.strip()]
    if not fits:
        return ""
    named = " or ".join(repr(u) for u in fits)
    return f"; did you mean {named}? (unit symbols are case-sensitive: M is mega, m milli)" if len(fits) > 1 else \
        f"; did you mean {named}? (unit symbols are case-sensitive)"


def _pint_reason(text: str, exc: Exception) -> str:
    name = type(exc).__name__
    if name == "UndefinedUnitError":
        return f"unknown unit {text!r}" + _case_hint(text)
    if name == "DefinitionSyntaxError" or isinstance(exc, SyntaxError):
        return f"{text!r} is not a unit expression"
    if isinstance(exc, OverflowError):
        return f"unit {text!r} overflows when converted to SI"
    return f"{text!r} is not a usable unit"


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
    return text.replace("^2", "²").replace("^3", "³").replace("^4", "⁴").replace("^-1", "⁻¹").replace("**", "^")


def choose_unit(units: UnitSystem, si_value: float, display_unit: str, keep: bool = False) -> str:
    """The unit to show a value in: ``display_unit`` with an engineering prefix that fits the
    number; with ``keep`` (a unit the user chose) it is kept while the number reads well."""
    if display_unit in _FIXED or not math.isfinite(si_value) or si_value == 0:
        return display_unit
    # The choice depends only on the number's order of magnitude (its first digits matter only
    # near a prefix boundary): it is made on log10 of the value in steps of 1/10000 of a decade,
    # from a table of the steps where it changes, made once per unit (``_choices``).
    step = round(math.log10(abs(si_value)) * 1e4)
    tables = units.__dict__.setdefault("_unit_choices", {})
    table = tables.get((display_unit, keep))
    if table is None:
        table = tables[(display_unit, keep)] = _choices(units, display_unit, keep)
    steps, names = table
    return names[bisect.bisect_right(steps, step)] if steps else names[0]


def _choices(units: UnitSystem, display_unit: str, keep: bool) -> tuple[list, list]:
    """Where the unit ``_choose_unit`` gives changes, as (steps, names): names[i] holds from steps[i-1]
    up to steps[i].  Its answer flips only where one of its comparisons does (a prefix's threshold, the
    edges of the range a chosen unit is kept in), so it is asked at a few steps about each of those
    and nowhere else; a test asks it at every step over the whole range against this table."""
    base = _base_unit(display_unit)
    if base not in _PREFIXABLE:
        return [], [display_unit]
    edges = [scale * 0.9995 * units.factor(base) for scale, _ in _PREFIXES]
    if keep:
        edges += [0.1 * units.factor(display_unit), 1e4 * units.factor(display_unit)]
    candidates = sorted({s for edge in edges for s in range(math.floor(math.log10(edge) * 1e4) - 3,
                                                             math.ceil(math.log10(edge) * 1e4) + 4)})
    steps: list = []
    names = [_choose_unit(units, 10.0 ** (candidates[0] / 1e4), display_unit, keep)]
    for s in candidates[1:]:
        name = _choose_unit(units, 10.0 ** (s / 1e4), display_unit, keep)
        if name != names[-1]:
            steps.append(s)  # the first step of the new name: bisect_right counts the changes at or below
            names.append(name)
    return steps, names


def _base_unit(display_unit: str) -> str:
    for _, p in _PREFIXES + ((1e-6, "u"),):
        if p and display_unit.startswith(p) and display_unit[len(p):] in _PREFIXABLE:
            return display_unit[len(p):]
    return display_unit


def _choose_unit(units: UnitSystem, si_value: float, display_unit: str, keep: bool) -> str:
    """The choice itself, for a positive value (the table ``_choices`` is made of its answers)."""
    if display_unit in _FIXED or not math.isfinite(si_value) or si_value == 0:
        return display_unit
    base = _base_unit(display_unit)
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


def format_quantity(units: UnitSystem, si_value: float, unit_text: str, digits: int = 4) -> str:
    if unit_text == "1":
        return format_number(si_value, digits)
    value = si_value / units.factor(unit_text)
    sep = "" if unit_text == "%" else " "
    return f"{format_number(value, digits)}{sep}{pretty_unit(unit_text)}"
