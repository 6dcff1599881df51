"""Small pieces of wording shared by the checks: numbers with units, lists, ratios."""

from __future__ import annotations

from speccheck.reading.units import UnitSystem, choose_unit, format_number, format_quantity


def show(units: UnitSystem, si: float, unit: str, digits: int = 4) -> str:
    """An SI value in ``unit`` (or a prefix of it that fits the number), to ``digits`` significant digits."""
    return format_quantity(units, si, choose_unit(units, si, unit), digits)


def join(parts) -> str:
    parts = list(parts)
    if len(parts) <= 1:
        return "".join(parts)
    return ", ".join(parts[:-1]) + " and " + parts[-1]


def format_ratio(r: float) -> str:
    if r >= 1:
        return f"{format_number(r, 3)}×"
    return f"{format_number(r, 3)}× (1/{format_number(1 / r, 3)} of)"
