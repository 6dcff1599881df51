"""Measured data files (a spectrum, an autocorrelation trace): two columns of numbers.

A pure function of the file's bytes (the checker injects the file reading);
the analysis of the numbers is in ``physics/spectra.py`` and
``physics/autocorrelation.py``.  Every problem raises their ``DataProblem``
with a message saying what was expected; nothing here raises anything else on
bad data.

The format: one row per line, the first two fields of each row read (further
fields are ignored), separated by commas, semicolons, tabs or spaces in any
mix; ``#`` starts a comment; blank lines are skipped; the first line with
content may be a header (anything that does not start with two numbers).

The numbers are parsed by numpy's ``loadtxt`` in one pass, at most
``MAX_ROWS + 1`` rows of them.  Only when that fails, or a number is not
finite, are the lines read one by one, to name the first line at fault (and
to accept what Python's ``float`` reads but numpy does not, such as
``1_000``).
"""

from __future__ import annotations

import io
import re
import warnings

import numpy as np

from speccheck.physics.trace_cleaning import DataProblem

MIN_POINTS = 8
MAX_ROWS = 1_000_000
_SEPARATORS = bytes.maketrans(b",;\t", b"   ")

__all__ = ["DataProblem", "MAX_ROWS", "MIN_POINTS", "read_table"]


# digits other than 0-9 (١٠٣٠, １０３０) and digit groups joined by '_' (9_90): float() reads them
_ODD_NUMBER = re.compile(r"[0-9]_[0-9]|(?![0-9])\d")


def read_table(data: bytes | str) -> tuple[np.ndarray, np.ndarray]:
    """The first two columns of a data file as float arrays (see the module's docstring)."""
    raw = data.encode("utf-8", errors="replace") if isinstance(data, str) else bytes(data)
    raw = raw.removeprefix(b"\xef\xbb\xbf")  # a UTF-8 byte order mark is not part of the first field
    if b"\r" in raw:
        raw = raw.replace(b"\r\n", b"\n").replace(b"\r", b"\n")
    text = raw.translate(_SEPARATORS).decode("utf-8", errors="replace")
    odd = _ODD_NUMBER.search(text)
    if odd:  # float() would read ١٠٣٠, １０３０ and 9_90 as numbers; a spec's values refuse them too
        line = text.count("\n", 0, odd.start()) + 1
        raise DataProblem(f"line {line}: {odd.group()!r} is not a plain number (digits 0-9 only, no '_')")
    stream = io.StringIO(text)
    _skip_header(stream)
    try:
        with warnings.catch_warnings():
            # numpy warns about blank lines not counted towards max_rows, and about no data
            warnings.simplefilter("ignore", UserWarning)
            table = np.loadtxt(stream, dtype=float, comments="#", usecols=(0, 1), ndmin=2, max_rows=MAX_ROWS + 1)
    except ValueError:
        table = None
    del stream
    if table is None or not np.all(np.isfinite(table)):
        return _line_by_line(raw.decode("utf-8", errors="replace"))
    if table.shape[0] > MAX_ROWS:
        raise DataProblem(f"more than {MAX_ROWS} rows")
    if table.shape[0] < MIN_POINTS:
        raise DataProblem(f"{table.shape[0]} data points; at least {MIN_POINTS} are needed for a width")
    return np.ascontiguousarray(table[:, 0]), np.ascontiguousarray(table[:, 1])


def _first_two(line: str) -> tuple[float, float] | None:
    fields = line.split("#", 1)[0].translate(_SEPARATOR_CHARS).split()
    try:
        return float(fields[0]), float(fields[1])
    except (ValueError, IndexError):
        return None


_SEPARATOR_CHARS = str.maketrans(",;\t", "   ")


def _skip_header(stream: io.StringIO) -> None:
    """Moves past the first line with content if it is not two numbers (a header)."""
    while True:
        start = stream.tell()
        line = stream.readline()
        if not line:
            return
        if line.split("#", 1)[0].strip():
            if _first_two(line) is not None:
                stream.seek(start)
            return


def _line_by_line(text: str) -> tuple[np.ndarray, np.ndarray]:
    """The same table read one line at a time, which names the first line at fault."""
    xs, ys = [], []
    header_allowed = True
    for number, line in enumerate(text.split("\n"), start=1):
        if not line.split("#", 1)[0].translate(_SEPARATOR_CHARS).strip():
            continue
        pair = _first_two(line)
        if pair is None:
            if header_allowed:
                header_allowed = False
                continue
            raise DataProblem(f"line {number}: expected two numbers, got {line.strip()[:40]!r}")
        header_allowed = False
        if not (np.isfinite(pair[0]) and np.isfinite(pair[1])):
            raise DataProblem(f"line {number}: {line.strip()[:40]!r} is not finite (NaN or infinite)")
        xs.append(pair[0])
        ys.append(pair[1])
        if len(xs) > MAX_ROWS:
            raise DataProblem(f"more than {MAX_ROWS} rows")
    if len(xs) < MIN_POINTS:
        raise DataProblem(f"{len(xs)} data points; at least {MIN_POINTS} are needed for a width")
    return np.asarray(xs, dtype=float), np.asarray(ys, dtype=float)
