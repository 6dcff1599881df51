"""The table of pint's answers on disk: what a unit text means (factor to SI and dimension)
and the CODATA constants, so that a run meeting only known units never imports pint.

Every entry read is checked (types, finite values, a unit text that passes the screen, and
the SI's defining constants at their exact values); a bad entry is dropped and answered
again.  Runs that write at the same time merge their entries under a lock.
"""

from __future__ import annotations

import math

from speccheck.reading.unit_text import CONSTANT_NAMES, DIMENSION_NAMES, Unit, UnitError, screen_unit_text

MAX_TABLE = 2000  # unit texts remembered on disk
MAX_TABLE_BYTES = 1024 * 1024  # a larger table is not read (this version writes about 0.2 MB at most)


def path():
    """Where the table of pint's answers lives, or None when it is turned off."""
    import os
    from pathlib import Path

    if os.environ.get("SPECCHECK_NO_CACHE"):
        return None
    try:
        pint_version = _pint_version()
    except Exception:
        return None
    if pint_version is None:
        return None
    base = os.environ.get("SPECCHECK_CACHE_DIR")
    if not base:
        try:  # the platform's cache folder (~/.cache on Linux, ~/Library/Caches on macOS, …)
            import platformdirs

            base = platformdirs.user_cache_dir("speccheck", appauthor=False)
        except Exception:
            return None
    from speccheck._version import __version__

    # keyed by both versions: a new speccheck may describe units differently, a new pint may
    # carry new CODATA values
    return Path(base) / f"units-{__version__}-pint{pint_version}.json"


def _pint_version() -> str | None:
    """pint's version without importing pint: the name of its installed metadata folder beside it
    (``pint-0.25.3.dist-info``), else ``importlib.metadata`` (which costs about 30 ms to import, a
    sixth of a one-spec run, so it is only the fallback)."""
    import importlib.util
    from pathlib import Path

    spec = importlib.util.find_spec("pint")
    if spec is None or not spec.origin:
        return None
    found = list(Path(spec.origin).parent.parent.glob("pint-*.dist-info"))
    if len(found) == 1 and (found[0] / "METADATA").is_file():
        return found[0].name[len("pint-"):-len(".dist-info")]
    from importlib.metadata import version

    return version("pint")


# The constants a table entry must match: the defining constants of the SI are exact (2019
# redefinition), the others to the last digits CODATA revisions change (CODATA 2018/2022).
_EXACT = {"c": 299792458.0, "h": 6.62607015e-34, "e": 1.602176634e-19}
_NEAR = {"eps0": 8.8541878128e-12, "m_e": 9.1093837015e-31}  # from memory, to 1e-8


def _valid_constants(raw) -> dict | None:
    try:
        values = {k: float(raw[k]) for k in CONSTANT_NAMES}
    except (KeyError, TypeError, ValueError):
        return None
    if any(values[k] != v for k, v in _EXACT.items()):
        return None
    if any(not math.isfinite(values[k]) or abs(values[k] / v - 1.0) > 1e-8 for k, v in _NEAR.items()):
        return None
    return values


def _valid_entry(key, raw) -> "Unit | None":
    """One entry of the table, or None when it is not what this version writes."""
    if not (isinstance(key, str) and isinstance(raw, list) and len(raw) == 4):
        return None
    text, factor, dimension, described = raw
    if not (isinstance(text, str) and isinstance(described, str)
            and isinstance(factor, (int, float)) and not isinstance(factor, bool)
            and math.isfinite(factor) and factor > 0.0 and (dimension is None or dimension in DIMENSION_NAMES)):
        return None
    try:
        screen_unit_text(key)
    except UnitError:
        return None
    return Unit(text, float(factor), dimension, described)


class _Lock:
    """An advisory lock on a file beside the table (fcntl where there is one; else none)."""

    def __init__(self, path) -> None:
        self.path, self.fd = path, None

    def __enter__(self):
        import os

        try:
            import fcntl
        except ImportError:
            return self
        self.fd = os.open(self.path, os.O_RDWR | os.O_CREAT, 0o644)
        fcntl.flock(self.fd, fcntl.LOCK_EX)
        return self

    def __exit__(self, *exc) -> None:
        import os

        if self.fd is not None:
            os.close(self.fd)  # closing releases the lock


def _read(table_path) -> dict | None:
    import json

    from speccheck.reading.disk import read_regular

    try:
        raw = read_regular(table_path, MAX_TABLE_BYTES)  # a FIFO or a device there is refused, not read
        if len(raw) > MAX_TABLE_BYTES:
            return None
        data = json.loads(raw.decode("utf-8"))
    except (OSError, ValueError, RecursionError, MemoryError):
        return None  # no table yet, or a damaged one: pint answers and the table is written anew
    return data if isinstance(data, dict) else None


def _entries(data: dict) -> tuple[dict | None, dict, bool]:
    constants = _valid_constants(data.get("constants"))
    units = data.get("units")
    if constants is None or not isinstance(units, dict):
        return None, {}, True
    table = {k: u for k, v in units.items() if (u := _valid_entry(k, v)) is not None}
    return constants, table, len(table) != len(units)


def load(table_path) -> tuple[dict, dict, bool] | None:
    """(constants, table, damaged) from the table at ``table_path``, or None without a usable one."""
    data = _read(table_path)
    if data is None:
        return None
    constants, table, damaged = _entries(data)
    return None if constants is None else (constants, table, damaged)


def save(table_path, constants: dict, table: dict) -> bool:
    """Merge ``table`` into the table on disk and write it atomically; False when that failed."""
    import json
    import os
    import tempfile

    try:
        table_path.parent.mkdir(parents=True, exist_ok=True)
        with _Lock(table_path.with_suffix(".lock")):
            other = _read(table_path)
            merged = _entries(other)[1] if other is not None else {}
            merged.update(table)
            data = {"constants": constants,
                    "units": {k: [u.text, u.factor, u.dimension, u.dimensionality]
                              for k, u in sorted(merged.items())[:MAX_TABLE]}}
            fd, tmp = tempfile.mkstemp(dir=table_path.parent, prefix=".units.")
            try:
                with os.fdopen(fd, "w", encoding="utf-8") as out:
                    json.dump(data, out, ensure_ascii=False)
                os.replace(tmp, table_path)
            except BaseException:
                os.unlink(tmp)
                raise
        return True
    except OSError:
        return False
