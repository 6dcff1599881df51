"""Measured data files of a column (``spectrum:``, ``autocorrelation:``): read through the
checker's injected reader, analysed, and turned into stated values or compared with them."""

from __future__ import annotations

from speccheck.checking.wording import format_ratio
from speccheck.physics.quantities import ALIASES, MEASURED
from speccheck.reading.units import UnitError, choose_unit, format_quantity
from speccheck.reading.values import Stated


def measure(col, key: str, raw: dict) -> None:
    """Read a measured file; its widths become stated values or are compared with them."""
    from speccheck.reading import measured

    at = col.paths[key]
    name = raw.get("file")
    unit_key, dimension = MEASURED[key]
    unit_text = raw.get(unit_key, "nm" if dimension == "m" else "fs")
    if not isinstance(name, str):
        return  # the schema reports it
    try:
        unit = col.c.units.parse(str(unit_text))
        if unit.dimension != dimension:
            raise measured.DataProblem(f"{unit_key} {unit_text!r} is not a unit of "
                                       f"{'length' if dimension == 'm' else 'time'}")
        if col.c.read is None:
            raise measured.DataProblem("data files are not read in this mode")
        try:
            data = col.c.read(name, col.report.path)
        except (OSError, ValueError) as exc:
            raise measured.DataProblem(f"cannot read it: {getattr(exc, 'strerror', None) or exc}") from None
        x, y = measured.read_table(data.decode("utf-8", errors="replace"))
        x = x * unit.factor
        if key == "spectrum":
            result = measured.analyse_spectrum(x, y, col.c.units.constants.c)
            use_measured(col, "spectral_bandwidth", "spectral_bandwidth_wavelength",
                              result.fwhm_wavelength, unit.text, name, key, at)
            use_measured(col, "spectral_bandwidth", "spectral_bandwidth",
                              result.fwhm_frequency, "THz", name, key, at, compare_only=True)
            use_measured(col, "wavelength", "wavelength", result.centre_wavelength, unit.text, name, key,
                              at, compare=False)
            use_measured(col, "transform_limited_duration", "transform_limited_duration",
                              result.transform_limited_duration, "fs", name, key, at)
        else:
            width = measured.analyse_autocorrelation(x, y)
            use_measured(col, "autocorrelation_width", "autocorrelation_width", width, unit.text, name,
                              key, at)
    except (measured.DataProblem, UnitError) as exc:
        col.report.add("measured-data", f"{col.name}.{key}: {name}: {exc}", at,
                        quantities=(col.dotted(key),))


def use_measured(col, key: str, quantity: str, si: float, unit: str, name: str, source_key: str,
                 at, compare: bool = True, compare_only: bool = False) -> None:
    tol = col.tolerance
    text = f"{format_quantity(col.c.units, si, choose_unit(col.c.units, si, unit))} (from {name})"
    stated = col.stated.get(quantity)
    if stated is None:
        if compare_only or any(q in col.stated for q in ALIASES.get(key, {}).values()):
            return
        col.stated[quantity] = Stated(quantity, si * (1 - tol), si * (1 + tol), si, unit, text)
        col.keys[quantity] = source_key
        col.measured.add(quantity)
        return
    if compare and (si * (1 + tol) < stated.low or si * (1 - tol) > stated.high):
        col.report.add(
            "measured-mismatch",
            f"{col.name}.{col.keys[quantity]} is stated as {stated.text}, but {name} measures "
            f"{format_quantity(col.c.units, si, choose_unit(col.c.units, si, stated.unit))} "
            f"(FWHM); the stated value is {format_ratio(stated.typical / si) if stated.typical else 'outside'} "
            "the measured one.",
            col.at(quantity), quantities=(col.dotted(quantity), col.dotted(source_key)))
