"""Measured data files of a column (``spectrum:``, ``autocorrelation:``): read through the
checker's injected reader, analysed, and turned into stated values or compared with them.

The analyses (``physics/spectra.py``, ``physics/autocorrelation.py``) give each width with an
interval where the data settle one (the transform-limited duration, the autocorrelation FWHM):
that interval is the stated one; the other widths take the column's tolerance.  What the numbers
do not settle is a ``measured-data-quality`` warning at the file's key.

``DataFiles`` keeps what each file gave for the run: a document reads a file once however many
columns (operating points) use it, and the same bytes are parsed and analysed once in the run,
whichever specs name them.
"""

from __future__ import annotations

import hashlib
from typing import Callable

from speccheck.checking.wording import format_ratio
from speccheck.physics.quantities import ALIASES, MEASURED
from speccheck.reading.units import UnitError, choose_unit, format_quantity
from speccheck.reading.values import Stated

TABLES_KEPT = 4  # parsed tables kept at once (a 1,000,000-row table is 16 MB); analyses are all kept


class DataFiles:
    """The measured data files of one run.  Within a document (``new_document``) a file name is
    read once; across the run, a table is keyed by its bytes (a BLAKE2b digest), so a file that
    changes between documents is read afresh, and equal bytes are parsed and analysed once.  A
    problem is kept as its message and raised again as a new ``DataProblem``."""

    def __init__(self) -> None:
        # (spec, name) -> (digest, bytes), or (None, the message) when it could not be read
        self._names: dict[tuple[str, str], tuple[bytes | None, bytes | str]] = {}
        self._tables: dict[bytes, object] = {}  # digest -> (x, y) or the message of its DataProblem
        self._results: dict[tuple, object] = {}  # (digest, key, unit factor) -> analysis or message

    def new_document(self) -> None:
        self._names.clear()

    def analysis(self, read: Callable[[str, str], bytes], name: str, spec: str, key: str, factor: float,
                 c: float):
        """The analysis of data file ``name`` beside ``spec`` as a ``key`` ("spectrum" or
        "autocorrelation") whose first column is in a unit of ``factor`` SI units."""
        from speccheck.physics.trace_cleaning import DataProblem

        digest, data = self._read(read, name, spec)
        if digest is None:
            raise DataProblem(data)
        wanted = (digest, key, factor)
        if wanted not in self._results:
            try:
                x, y = self._table(digest, data)
                if key == "spectrum":
                    from speccheck.physics.spectra import analyse_spectrum

                    self._results[wanted] = analyse_spectrum(x * factor, y, c)
                else:
                    from speccheck.physics.autocorrelation import analyse_autocorrelation

                    self._results[wanted] = analyse_autocorrelation(x * factor, y)
            except DataProblem as exc:
                self._results[wanted] = str(exc)
        result = self._results[wanted]
        if isinstance(result, str):
            raise DataProblem(result)
        return result

    def _read(self, read, name: str, spec: str) -> tuple[bytes | None, bytes | str]:
        if (spec, name) not in self._names:
            try:
                data = read(name, spec)
            except (OSError, ValueError) as exc:
                self._names[spec, name] = (None, f"cannot read it: {getattr(exc, 'strerror', None) or exc}")
            else:
                self._names[spec, name] = (hashlib.blake2b(data, digest_size=16).digest(), data)
        return self._names[spec, name]

    def _table(self, digest: bytes, data: bytes):
        from speccheck.physics.trace_cleaning import DataProblem
        from speccheck.reading.measured import read_table

        if digest not in self._tables:
            try:
                self._tables[digest] = read_table(data)
            except DataProblem as exc:
                self._tables[digest] = str(exc)
            while len(self._tables) > TABLES_KEPT:
                del self._tables[next(iter(self._tables))]  # the oldest
        table = self._tables[digest]
        if isinstance(table, str):
            raise DataProblem(table)
        return table


def measure(col, key: str, raw: dict) -> None:
    """Read a measured file; its widths become stated values or are compared with them, and
    what its analysis could not settle becomes warnings."""
    from speccheck.physics.trace_cleaning import DataProblem

    at = col.paths[key]
    name = raw.get("file")
    unit_key, dimension = MEASURED[key]
    unit_text = raw.get(unit_key, "nm" if dimension == "m" else "fs")
    if not isinstance(name, str):
        return  # the schema reports it
    try:
        unit = col.c.units.parse(str(unit_text))
        if unit.dimension != dimension:
            raise DataProblem(f"{unit_key} {unit_text!r} is not a unit of {'length' if dimension == 'm' else 'time'}")
        if col.c.read is None:
            raise DataProblem("data files are not read in this mode")
        result = col.c.data_files.analysis(col.c.read, name, col.report.path, key, unit.factor,
                                           col.c.units.constants.c)
    except (DataProblem, UnitError) as exc:
        col.report.add("measured-data", f"{col.name}.{key}: {name}: {exc}", at, quantities=(col.dotted(key),))
        return
    if key == "spectrum":
        use_measured(col, "spectral_bandwidth", "spectral_bandwidth_wavelength", result.fwhm_wavelength, unit.text,
                     name, key, at)
        use_measured(col, "spectral_bandwidth", "spectral_bandwidth", result.fwhm_frequency, "THz", name, key, at,
                     compare_only=True)
        use_measured(col, "wavelength", "wavelength", result.centre_wavelength, unit.text, name, key, at,
                     compare=False)
        use_measured(col, "transform_limited_duration", "transform_limited_duration",
                     result.transform_limited_duration, "fs", name, key, at,
                     interval=(result.transform_limited_low, result.transform_limited_high))
    else:
        use_measured(col, "autocorrelation_width", "autocorrelation_width", result.fwhm, unit.text, name, key, at,
                     interval=(result.low, result.high))
    for warning in result.warnings:
        col.report.add("measured-data-quality", f"{col.name}.{key}: {name}: {warning}", at,
                       quantities=(col.dotted(key),), distinct=warning)


def use_measured(col, key: str, quantity: str, si: float, unit: str, name: str, source_key: str,
                 at, compare: bool = True, compare_only: bool = False, interval=None) -> None:
    """A measured value: stated where the column states nothing for it (with its measured
    ``interval``, else the column's tolerance), compared where it does."""
    units = col.c.units
    low, high = interval if interval is not None else (si * (1 - col.tolerance), si * (1 + col.tolerance))

    def measured_text(shown: str, source: str = "") -> str:
        """The value (and its interval) in ``shown``'s unit, and where it comes from."""
        def at_scale(v: float) -> str:  # all three with the prefix that fits the value
            return format_quantity(units, v, choose_unit(units, si, shown))

        inside = [f"{at_scale(low)} … {at_scale(high)}"] if interval is not None else []
        inside += [f"from {source}"] if source else []
        return f"{at_scale(si)} ({', '.join(inside)})" if inside else at_scale(si)

    stated = col.stated.get(quantity)
    if stated is None:
        if compare_only or any(q in col.stated for q in ALIASES.get(key, {}).values()):
            return
        text = measured_text(unit, name)
        col.stated[quantity] = Stated(quantity, low, high, si, unit, text)
        col.keys[quantity] = source_key
        col.measured.add(quantity)
        return
    if compare and (high < stated.low or low > stated.high):
        col.report.add(
            "measured-mismatch",
            f"{col.name}.{col.keys[quantity]} is stated as {stated.text}, but {name} measures "
            f"{measured_text(stated.unit)} (FWHM); the stated value is "
            f"{format_ratio(stated.typical / si) if stated.typical else 'outside'} the measured one.",
            col.at(quantity), quantities=(col.dotted(quantity), col.dotted(source_key)))
