"""The grammar of a stated value, turned into an interval in SI units.

A value is one of

* ``"25 nJ"``                  a plain value: the spec's default tolerance applies
* ``"25 nJ ± 1 nJ"``, ``"25 nJ +/- 4%"``, ``"(25 ± 1) nJ"`` style ``"25 ± 1 nJ"``
* ``">= 20 W"``, ``"<= 300 fs"``, ``"> 1 mJ"``, ``"< 5 %"``  one-sided bounds
* ``{min: 20 W, typical: 22 W, max: 25 W}`` (any subset)
* a bare YAML number, only for dimensionless quantities (``m2: 1.1``)

Numbers are read by a regular expression and ``float``, never evaluated;
only the unit text goes to ``UnitSystem``.  Every problem raises
``ValueProblem`` with a rule id and a message saying what was expected.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Mapping

from speccheck.physics.quantities import ALIASES, BY_NAME
from speccheck.reading.units import DIMENSION_NAMES, AngularUnit, UnitError, UnitSystem

# ASCII digits only: Python's \d (and float()) would also read ١٥ or １５ as 15
_NUMBER = r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?"
_TIMES_TEN = r"(?:\s*[x×*]\s*10\s*(?:\^|\*\*)\s*([+-]?[0-9]{1,4}))?"
# Logarithmic units converted as logarithms: value = reference × 10^(x/10)
_LOG_UNITS = {"dBm": (1e-3, "W"), "dBmW": (1e-3, "W"), "dBW": (1.0, "W"), "dB": (1.0, "1")}
_VALUE = re.compile(rf"^\s*({_NUMBER}){_TIMES_TEN}\s*(.*?)\s*$")
_PLUS_MINUS = re.compile(r"\s*(?:±|\+/-|\+-)\s*")
_BOUND = re.compile(r"^\s*(>=|<=|≥|≤|=>|=<|>|<)\s*(.*)$")
_BOUND_SIDE = {">=": "low", "≥": "low", "=>": "low", ">": "low",
               "<=": "high", "≤": "high", "=<": "high", "<": "high"}
_SPACES = str.maketrans({"\u00a0": " ", "\u2009": " ", "\u202f": " ", "\u2212": "-", "\t": " "})

MAX_VALUE_LENGTH = 200
# Magnitudes (in SI units) a stated value may have: far wider than any laboratory needs, and
# narrow enough that products of a few of them stay inside the range of a float.
SI_RANGE = (1e-100, 1e100)


class ValueProblem(ValueError):
    def __init__(self, rule: str, message: str) -> None:
        super().__init__(message)
        self.rule = rule
        self.message = message


@dataclass(frozen=True)
class Stated:
    quantity: str  # the quantity the value is for (an alias resolved by dimension)
    low: float  # SI; 0.0 means no lower bound
    high: float  # SI; math.inf means no upper bound
    typical: float | None  # the number written, if one was
    unit: str  # unit text to show this quantity in ("1" if dimensionless)
    text: str  # the value as written, for messages


def parse_tolerance(raw, default: float = 0.05) -> float:
    """The spec's default relative tolerance ("5%", 0.05, "2 %")."""
    if isinstance(raw, bool) or raw is None:
        raise ValueProblem("invalid-value", f"tolerance must be a percentage like '5%', got {raw!r}")
    if isinstance(raw, (int, float)):
        value = _to_float(raw, "tolerance")
    else:
        text = str(raw).strip().translate(_SPACES)
        match = re.fullmatch(rf"({_NUMBER})\s*(%?)", text)
        if not match:
            raise ValueProblem("invalid-value", f"tolerance must be a percentage like '5%', got {raw!r}")
        value = float(match.group(1)) / (100.0 if match.group(2) else 1.0)
    if not (math.isfinite(value) and 0.0 <= value < 1.0):
        plain = isinstance(raw, (int, float)) and math.isfinite(value) and 1.0 <= value < 100.0
        hint = f" (a plain number is a fraction, 0.05 for 5%: write '{raw:g}%')" if plain else ""
        raise ValueProblem("invalid-value", f"tolerance must be between 0% and 100%, got {raw!r}{hint}")
    return value


def _alias_of() -> dict[str, str]:
    return {q: key for key, forms in ALIASES.items() for q in forms.values()}


_ALIAS_OF = _alias_of()  # quantity -> the spec key it can be stated under ("spectral_bandwidth")


@dataclass(frozen=True)
class Tolerances:
    """The relative tolerance of a plain stated value, by precedence (strongest first):

    1. the spec's per-quantity setting (``defaults: {tolerances: {repetition_rate: 0.01%}}``);
    2. the project configuration's per-quantity setting (``[tolerances]``);
    3. the spec's global ``defaults: {tolerance: …}``;
    4. the configuration's global ``tolerance``;
    5. the built-in table (``Quantity.tolerance``, ``stages.PARAM_TOLERANCES``).

    Names are quantities, spec keys (``spectral_bandwidth`` covers all its forms) or stage
    parameters.  Bounds (``>=``, ``{min, max}``) are exact and never take a tolerance."""

    spec: Mapping[str, float] = field(default_factory=dict)
    config: Mapping[str, float] = field(default_factory=dict)
    spec_global: float | None = None
    config_global: float | None = None
    margin: float = 0.01  # how far typical values may disagree before a warning (checking.nominal)

    def of(self, name: str, builtin: float) -> float:
        names = (name, _ALIAS_OF.get(name, name))
        for table in (self.spec, self.config):
            for n in names:
                if n in table:
                    return table[n]
        if builtin == 0.0:  # exact by its nature (a whole number of pulses, a harmonic order)
            return 0.0
        for value in (self.spec_global, self.config_global):
            if value is not None:
                return value
        return builtin

    def quantity(self, name: str) -> float:
        return self.of(name, BY_NAME[name].tolerance if name in BY_NAME else 0.05)

    @property
    def fallback(self) -> float:
        """One number for values of no quantity (measured widths): the global setting or 5%."""
        return next((v for v in (self.spec_global, self.config_global) if v is not None), 0.05)


def tolerance_names() -> frozenset[str]:
    """Every name a per-quantity tolerance may be given for."""
    from speccheck.physics.stages import PARAM_TOLERANCES

    return frozenset(BY_NAME) | frozenset(ALIASES) | frozenset(PARAM_TOLERANCES)


def _tolerance_of(tolerance, quantity: str) -> float:
    return tolerance.quantity(quantity) if isinstance(tolerance, Tolerances) else tolerance


class ValueParser:
    def __init__(self, units: UnitSystem) -> None:
        self.units = units
        self._extra: dict[str, dict[str, str]] = {}  # labels of non-quantity values -> dimensions
        self._signed: set[str] = set()  # labels whose values may be negative

    def parse_as(self, label: str, raw, dimension: str, tolerance: float, signed: bool = False) -> Stated:
        """Parse a value that is not a block quantity (a stage parameter) with one dimension;
        ``signed`` values (a GDD) may be negative."""
        self._extra[label] = {dimension: label}
        if signed:
            self._signed.add(label)
        return self.parse(label, raw, tolerance)

    # ---------------------------------------------------------------- public
    def parse(self, key: str, raw, tolerance: float) -> Stated:
        """Parse the value of spec key ``key`` (a quantity name or an alias)."""
        if isinstance(raw, dict):
            return self._parse_mapping(key, raw, tolerance)
        if isinstance(raw, bool) or raw is None:
            raise ValueProblem("invalid-value", f"{key}: expected a number with a unit, got {_show(raw)}")
        if isinstance(raw, list):
            raise ValueProblem("invalid-value", f"{key}: expected a number with a unit, got a list")
        if isinstance(raw, (int, float)):
            return self._from_number(key, _to_float(raw, f"{key}:"), None, tolerance, str(raw))
        text = str(raw)
        if len(text) > MAX_VALUE_LENGTH:
            raise ValueProblem("invalid-value", f"{key}: value is longer than {MAX_VALUE_LENGTH} characters")
        digits = sorted({ch for ch in text if not ch.isascii() and ch.isdecimal()})  # not ² ³: those are units'
        if digits:
            raise ValueProblem("invalid-value", f"{key}: {text.strip()!r} has digits that are not 0-9 "
                               f"({''.join(digits)!r}); write the number with ASCII digits")
        return self._parse_text(key, text.translate(_SPACES), tolerance)

    # --------------------------------------------------------------- helpers
    def _parse_text(self, key: str, text: str, tolerance: float) -> Stated:
        bound = _BOUND.match(text)
        if bound:
            number, unit = self._number_and_unit(key, bound.group(2), text)
            quantity, si, unit_text = self._to_si(key, number, unit, text)
            if si <= 0.0 and _BOUND_SIDE[bound.group(1)] == "high":
                raise ValueProblem("non-positive-value", f"{key}: an upper bound of {text.strip()!r} leaves no positive value")
            if _BOUND_SIDE[bound.group(1)] == "low":
                return Stated(quantity, max(si, 0.0), math.inf, None, unit_text, text.strip())
            return Stated(quantity, 0.0, si, None, unit_text, text.strip())
        parts = _PLUS_MINUS.split(text)
        if len(parts) > 2:
            raise ValueProblem("invalid-value", f"{key}: more than one ± in {text.strip()!r}")
        if len(parts) == 2:
            return self._parse_plus_minus(key, parts[0], parts[1], text)
        number, unit = self._number_and_unit(key, text, text)
        return self._from_number(key, number, unit, tolerance, text.strip())

    def _parse_plus_minus(self, key: str, main: str, tol: str, text: str) -> Stated:
        number, unit = self._number_and_unit(key, main, text)
        tol_number, tol_unit = self._number_and_unit(key, tol, text)
        if (unit or "").strip() in _LOG_UNITS or (tol_unit or "").strip() in _LOG_UNITS:
            return self._log_plus_minus(key, number, (unit or tol_unit).strip(), tol_number,
                                        (tol_unit or "").strip(), text)
        if tol_number < 0 or not math.isfinite(tol_number):
            raise ValueProblem("invalid-value", f"{key}: the ± part of {text.strip()!r} must be a non-negative number")
        if tol_unit in ("%", "percent"):
            rel = tol_number / 100.0
            if rel >= 1.0:
                raise ValueProblem("invalid-value", f"{key}: a tolerance of 100% or more in {text.strip()!r} says nothing")
            return self._from_number(key, number, unit, rel, text.strip())
        if not unit and tol_unit:  # "25 ± 1 nJ": both in the unit written last
            unit = tol_unit
        quantity, si, unit_text = self._to_si(key, number, unit, text)
        _, tol_si, _ = self._to_si(key, tol_number, tol_unit or unit, text, positive=False)
        _finite_spread(key, abs(si) + tol_si, text)
        if key in self._signed:
            return Stated(quantity, si - tol_si, si + tol_si, si, unit_text, text.strip())
        _positive(key, si, text)
        return Stated(quantity, max(si - tol_si, 0.0), si + tol_si, si, unit_text, text.strip())

    def _parse_mapping(self, key: str, raw: dict, tolerance: float) -> Stated:
        parsed: dict[str, Stated] = {}
        signed = key in self._signed
        for name in ("min", "typical", "max"):
            if name in raw and signed:  # the parts of a signed value (a GDD) are signed too
                self._signed.add(f"{key}.{name}")
                if key in self._extra:
                    self._extra[f"{key}.{name}"] = self._extra[key]
            if name in raw:
                if isinstance(raw[name], (dict, list)):
                    raise ValueProblem("invalid-value", f"{key}.{name}: expected a plain value like '20 W', got "
                                       f"{'a mapping' if isinstance(raw[name], dict) else 'a list'}")
                parsed[name] = self.parse(f"{key}.{name}", raw[name], 0.0)
        if not parsed:
            raise ValueProblem("invalid-value", f"{key}: give at least one of min, typical, max")
        for name, part in parsed.items():
            if part.typical is None:  # a bound (">= 20 W") or a nested mapping has no single number
                raise ValueProblem("invalid-value", f"{key}.{name}: expected a plain value like '20 W', "
                                   f"got {part.text!r}")
        quantities = {s.quantity for s in parsed.values()}
        if len(quantities) > 1:
            raise ValueProblem("wrong-dimension", f"{key}: min, typical and max must have the same dimension")
        first = next(iter(parsed.values()))
        text = ", ".join(f"{k}: {v.text}" for k, v in parsed.items())
        if set(parsed) == {"typical"}:
            tolerance = _tolerance_of(tolerance, first.quantity)
            t = parsed["typical"].typical
            _finite_spread(key, abs(t) * (1 + tolerance), text)
            low, high = sorted((t * (1 - tolerance), t * (1 + tolerance)))
            return Stated(first.quantity, low, high, t, first.unit, text)
        low = parsed["min"].typical if "min" in parsed else (-math.inf if signed else 0.0)
        high = parsed["max"].typical if "max" in parsed else math.inf
        typical = parsed["typical"].typical if "typical" in parsed else None
        if low > high or (typical is not None and not low <= typical <= high):
            raise ValueProblem("empty-interval", f"{key}: min ≤ typical ≤ max does not hold in {{{text}}}")
        return Stated(first.quantity, low, high, typical, first.unit, "{" + text + "}")

    def _from_number(self, key, number: float, unit: str | None, tolerance, text: str) -> Stated:
        quantity, si, unit_text = self._to_si(key, number, unit, text)
        tolerance = _tolerance_of(tolerance, quantity)
        _finite_spread(key, abs(si) * (1 + tolerance), text)
        if key in self._signed:
            low, high = sorted((si * (1 - tolerance), si * (1 + tolerance)))
            return Stated(quantity, low, high, si, unit_text, text)
        _positive(key, si, text)
        return Stated(quantity, si * (1 - tolerance), si * (1 + tolerance), si, unit_text, text)

    def _number_and_unit(self, key: str, part: str, text: str) -> tuple[float, str]:
        match = _VALUE.match(part)
        if not match and part.strip().lower().lstrip("+-.").startswith(("nan", "inf")):
            raise ValueProblem("non-finite-value", f"{key}: {text.strip()!r} is not a finite number")
        if not match:
            raise ValueProblem(
                "invalid-value",
                f"{key}: cannot read {text.strip()!r}; expected a number and a unit like '25 nJ', "
                "a tolerance like '25 nJ ± 1 nJ', or a bound like '>= 20 W'",
            )
        number = float(match.group(1))
        if match.group(2) is not None:
            mantissa = number
            try:
                number *= 10.0 ** int(match.group(2))
            except OverflowError:  # 10^350 is beyond a float
                number = math.inf
            if number == 0.0 and mantissa != 0.0:  # 10^-350 underflows to zero
                raise ValueProblem("invalid-value", f"{key}: {text.strip()!r} is outside the range speccheck "
                                   f"handles ({SI_RANGE[0]:g} to {SI_RANGE[1]:g} in SI units)")
        if math.isnan(number) or math.isinf(number):
            raise ValueProblem("non-finite-value", f"{key}: {text.strip()!r} is not a finite number")
        return number, match.group(3)

    def _to_si(self, key, number: float, unit: str | None, text: str, positive: bool = True):
        """Resolve the quantity by the unit's dimension and convert to SI."""
        base = key.split(".")[0]
        parent = key.rpartition(".")[0]  # "s1.gdd.min": a part of the {min, typical, max} of "s1.gdd"
        names = (self._extra.get(key) or self._extra.get(parent) or self._extra.get(base) or ALIASES.get(base)
                 or ({BY_NAME[base].si_unit: base} if base in BY_NAME else None))
        if names is None:
            raise ValueProblem("invalid-value", f"{key}: {text.strip()!r} is not a value speccheck knows here")
        if not math.isfinite(number):
            raise ValueProblem("non-finite-value", f"{key}: {text.strip()!r} is not a finite number")
        if not unit:
            if "1" in names:
                return names["1"], number, "1"
            raise ValueProblem("missing-unit", missing_unit(key, text, names))
        if unit.strip() in _LOG_UNITS and (log := self._logarithmic(key, number, unit.strip(), names, text)):
            return log
        try:
            parsed = self.units.parse(unit)
        except AngularUnit as exc:
            what = "frequency" if exc.dimension == "Hz" else "wavenumber"
            as_f = number * exc.factor / (2.0 * math.pi)
            unit_f = "Hz" if exc.dimension == "Hz" else "1/m"
            raise ValueProblem("unknown-unit", f"{key}: {text.strip()!r} is an angular {what} (rad); speccheck "
                               f"reads a {what} as cycles, f = ω/2π: write '{as_f:.4g} {unit_f}'") from None
        except UnitError as exc:
            raise ValueProblem("unknown-unit", f"{key}: {exc}") from None
        if parsed.dimension not in names:
            got = DIMENSION_NAMES.get(parsed.dimension or "", parsed.dimensionality)
            expected = " or ".join(DIMENSION_NAMES[d] for d in names)
            raise ValueProblem(
                "wrong-dimension",
                f"{key}: {text.strip()!r} is {_article(got)} {got}, expected {_article(expected)} {expected} (e.g. '{_example(names)}')",
            )
        si = number * parsed.factor
        if not math.isfinite(si):
            raise ValueProblem("non-finite-value", f"{key}: {text.strip()!r} overflows in SI units")
        if si != 0.0 and not SI_RANGE[0] <= abs(si) <= SI_RANGE[1]:
            raise ValueProblem("invalid-value", f"{key}: {text.strip()!r} is outside the range speccheck "
                               f"handles ({SI_RANGE[0]:g} to {SI_RANGE[1]:g} in SI units)")
        return names[parsed.dimension], si, parsed.text


    def _log_plus_minus(self, key, number: float, unit: str, tol: float, tol_unit: str, text: str) -> Stated:
        """"30 dBm ± 1 dB": the ± is a ratio in dB, so the interval is 10^((x ∓ t)/10) — uneven in
        watts.  A ± in dBm or dBW (a power, not a ratio) says nothing that adds up, and is refused."""
        if unit not in _LOG_UNITS or tol_unit != "dB" or tol < 0:
            raise ValueProblem("invalid-value", f"{key}: in {text.strip()!r} the ± of a value in {unit} must be a "
                               f"ratio in dB, like '30 dBm ± 1 dB'")
        quantity, low, _ = self._to_si(key, number - tol, unit, text)
        _, high, _ = self._to_si(key, number + tol, unit, text)
        _, typical, unit_text = self._to_si(key, number, unit, text)
        return Stated(quantity, low, high, typical, unit_text, text.strip())

    def _logarithmic(self, key, number: float, unit: str, names: dict, text: str):
        """A value in dB, dBm or dBW, converted as a logarithm (30 dBm = 1 W; a 30 dB gain = ×1000)."""
        ref, dimension = _LOG_UNITS[unit]
        if dimension not in names:
            expected = " or ".join(DIMENSION_NAMES[d] for d in names)
            what = "a ratio (a power in dB needs its reference: dBm for 1 mW, dBW for 1 W)" if dimension == "1" \
                else "a power"
            raise ValueProblem("wrong-dimension", f"{key}: {text.strip()!r} is {what}, expected "
                               f"{_article(expected)} {expected} (e.g. '{_example(names)}')")
        exponent = number / 10.0
        if not -100.0 <= exponent <= 100.0:
            raise ValueProblem("invalid-value", f"{key}: {text.strip()!r} is outside the range speccheck handles")
        si = ref * 10.0 ** exponent
        return names[dimension], si, "W" if dimension == "W" else "1"


_EXAMPLES = {"m": "800 nm", "s": "150 fs", "Hz": "80 MHz", "1/m": "100 cm^-1", "J": "25 nJ",
             "W": "2 W", "W/m^2": "1e14 W/cm^2", "J/m^2": "1 J/cm^2", "V/m": "1e9 V/m",
             "s^2": "-800 fs^2", "s^3": "2000 fs^3", "s^4": "5000 fs^4", "1": "92%"}


def missing_unit(key: str, text: str, dimensions) -> str:
    """The words for a number written without its unit where ``dimensions`` (keys of
    ``DIMENSION_NAMES``) are expected; the schema reports a bare number in these words too."""
    expected = " or ".join(DIMENSION_NAMES[d] for d in dimensions)
    return (f"{key}: {text.strip()!r} has no unit; expected {_article(expected)} {expected} such as "
            f"'{_example(dimensions)}'")


def _example(names) -> str:
    return " or ".join(_EXAMPLES.get(d, "1") for d in names)


def _positive(key: str, si: float, text: str) -> None:
    if si <= 0.0:
        raise ValueProblem("non-positive-value", f"{key}: {text.strip()!r} must be positive")


def _finite_spread(key: str, far_end: float, text: str) -> None:
    """A value whose tolerance reaches past the float range would read as unbounded."""
    if not math.isfinite(far_end):
        raise ValueProblem("non-finite-value", f"{key}: {text.strip()!r} with its tolerance overflows in SI units")


def _to_float(raw: int | float, what: str) -> float:
    try:
        return float(raw)
    except OverflowError:  # a YAML integer of thousands of digits
        digits = str(raw)
        raise ValueProblem("non-finite-value", f"{what} {digits[:20]}… ({len(digits)} digits) is too "
                           "large for a number") from None


def _show(raw) -> str:
    return "nothing" if raw is None else repr(raw)


def _article(noun: str) -> str:
    return "an" if noun[:1] in "aeiou" else "a"
