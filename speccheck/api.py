"""speccheck as a Python library: ``check(*paths)`` and ``check_text(text)`` run the steps of
``speccheck check`` and return a ``Result``; the command line is built on the functions here.

The steps, in order: the project configuration (``load_config``) → the spec files of folders and
globs, its include/exclude patterns applied (``find``) → each file read, checked with any
``--set`` values, its own inline suppressions applied (``batch``) → the configuration's disabled
rules and severities → the exit code (``run``).  ``Result.to_dict()`` is the document
``--format json`` writes.
"""

from __future__ import annotations

import html
import math
import os
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any, Iterable, Mapping, Union

from speccheck import batch, files
from speccheck.records.findings import SEVERITIES, Cell, FileResult, Finding

if TYPE_CHECKING:
    from speccheck.reading.config import Config
    from speccheck.reading.loader import Limits
    from speccheck.reading.units import UnitSystem

__all__ = ["Cell", "FileResult", "Finding", "Result", "check", "check_text", "load_config"]

ConfigChoice = Union[None, bool, str, "os.PathLike[str]"]
"""``None``: found as the command line finds it; a path: that file; ``False``: none."""
Settings = Union[Mapping[str, Any], Iterable[Union[tuple[str, Any], str]], None]
"""What ``--set`` takes: ``{"laser.pulse_energy": "1 mJ"}``, pairs, or ``"INPUT=VALUE"`` texts."""

# ``column`` of a finding is the character column of its place in the file; ``sheet_column`` of a cell or a
# remedy is the column of the sheet it belongs to (the laser, an operating point, a stage)
FINDING_KEYS = ("file", "rule", "severity", "message", "line", "column", "quantities", "suspect", "candidates",
                "likely", "cause", "origin", "remedies")
CELL_KEYS = ("file", "sheet_column", "quantity", "status", "value", "low", "high", "unit", "display_unit", "stated",
             "assumed", "set", "inherited")
REMEDY_KEYS = ("file", "line", "rule", "input", "sheet_column", "parameter", "low", "high", "unit", "reachable",
               "stated")


@dataclass(frozen=True)
class Result:
    """What a check found: one ``FileResult`` per spec file, in the order checked (each with its
    ``findings`` and its ``sheet[column][quantity]`` cells, numbers in SI units), the exit code the
    command line gives for the same inputs (0 clean, 1 a finding at ``fail_on`` or worse, 2 an
    input that could not be read or used), and the notes the command line writes to standard error."""

    files: tuple[FileResult, ...]
    exit_code: int
    messages: tuple[str, ...] = ()
    fail_on: str = "error"
    data_files: frozenset[str] = frozenset()  # the measured data files the specs named, resolved

    @property
    def findings(self) -> tuple[Finding, ...]:
        """Every file's findings, in order."""
        return tuple(f for r in self.files for f in r.findings)

    def count(self, severity: str) -> int:
        return sum(r.count(severity) for r in self.files)

    def to_dict(self) -> dict[str, Any]:
        """The document ``speccheck check --format json`` writes for the same inputs."""
        from speccheck.formats import inert_results
        from speccheck.formats.json_format import document

        return document(inert_results(list(self.files)))

    def to_records(self, kind: str = "findings") -> list[dict[str, Any]]:
        """Flat records for a table (``pandas.DataFrame(result.to_records())``): ``"findings"``, one
        per finding (keys ``FINDING_KEYS``; ``quantities`` and ``candidates`` joined by ", ",
        ``remedies`` the number of inputs whose range was computed, None where none were), ``"cells"``,
        one per cell of every sheet (keys ``CELL_KEYS``), or ``"remedies"``, one per input of each
        finding's remedies (keys ``REMEDY_KEYS``: the range of that input that meets the finding's
        target); numbers in SI, an unbounded side ±inf, an unknown value None.  Every record of a kind
        has the same keys, and every value is a scalar."""
        if kind == "findings":
            return [{"file": r.path, "rule": f.rule, "severity": f.severity, "message": f.message,
                     "line": f.line, "column": f.column, "quantities": ", ".join(f.quantities),
                     "suspect": f.suspect, "candidates": ", ".join(f.candidates), "likely": f.likely,
                     "cause": f.cause, "origin": f.origin,
                     "remedies": None if f.remedies is None else len(f.remedies)}
                    for r in self.files for f in r.findings]
        if kind == "cells":
            return [{"file": r.path, "sheet_column": column, "quantity": q, "status": c.status, "value": c.value,
                     "low": -math.inf if c.low is None else c.low, "high": math.inf if c.high is None else c.high,
                     "unit": c.unit, "display_unit": c.display_unit,
                     "stated": c.text if c.text and c.status != "derived" else None, "assumed": c.assumed,
                     "set": c.overridden, "inherited": c.inherited} for r in self.files
                    for column, cells in r.sheet.items()
                    for q, c in cells.items()]
        if kind == "remedies":
            # an open side is ±inf; a remedy that no value reaches has no range at all: None on both sides
            return [{"file": r.path, "line": f.line, "rule": f.rule, "input": x.input, "sheet_column": x.column,
                     "parameter": x.parameter,
                     "low": None if not x.reachable else -math.inf if x.low is None else x.low,
                     "high": None if not x.reachable else math.inf if x.high is None else x.high,
                     "unit": x.unit, "reachable": x.reachable, "stated": x.stated}
                    for r in self.files for f in r.findings for x in (f.remedies or ())]
        raise ValueError(f"to_records: kind is 'findings', 'cells' or 'remedies', not {kind!r}")

    def _repr_html_(self) -> str:
        """A notebook's view: the counts, then each file's findings as a table (all text escaped)."""
        from speccheck.formats import inert

        def esc(text: object) -> str:
            return html.escape(inert(str(text)))

        from speccheck.formats.common import counts_text

        counts = counts_text(self.files)
        parts = [f"<div class=\"speccheck-result\"><p><b>speccheck</b>: {counts} in {len(self.files)} "
                 f"file{'s' if len(self.files) != 1 else ''}; exit code {self.exit_code}</p>"]
        parts += [f"<p>{esc(m)}</p>" for m in self.messages]
        for r in self.files:
            parts.append(f"<h4>{esc(r.path)}{' — ' + esc(r.title) if r.title else ''}</h4>")
            if not r.findings:
                parts.append("<p>no findings</p>")
                continue
            rows = "".join(f"<tr><td>{f.line or ''}:{f.column or ''}</td><td>{esc(f.severity)}</td>"
                           f"<td>{esc(f.rule)}</td><td style=\"text-align:left\">{esc(f.message)}</td></tr>"
                           for f in r.findings)
            parts.append("<table><tr><th>line:col</th><th>severity</th><th>rule</th><th>message</th></tr>"
                         f"{rows}</table>")
        return "".join(parts) + "</div>"


@dataclass(frozen=True)
class Found:
    """The spec files a list of paths names, as (name as given, path), and what to say about them."""

    files: tuple[tuple[str, Path], ...]
    messages: tuple[str, ...]
    unmatched: bool  # a glob matched no file, or nothing was found at all: the run exits 2


def load_config(choice: ConfigChoice = None) -> Config:
    """The project configuration: ``None`` finds it as the command line does (``speccheck.toml`` or a
    ``pyproject.toml`` with ``[tool.speccheck]``, from the current folder up to the git root), a path
    reads that file, ``False`` uses none.  A mistake in it raises ``reading.config.ConfigError``."""
    from speccheck.reading import config as cfg

    if choice is False:
        return cfg.DEFAULT
    if choice is True or not (choice is None or isinstance(choice, (str, os.PathLike))):
        raise TypeError(f"config: a path, None (find it) or False (none), not {choice!r}")
    if choice is not None:
        return cfg.load(Path(choice))
    try:
        found = cfg.find(Path.cwd())
    except OSError:  # the current folder is gone: there is nothing to find
        return cfg.DEFAULT
    return cfg.load(found) if found else cfg.DEFAULT


def find(paths: Iterable[str], config: Config) -> Found:
    """Folders and globs expanded into spec files, the configuration's include/exclude applied."""
    from speccheck.reading import config as cfg

    names = list(paths)
    expansion = files.spec_files(names, cfg.Selector(config) if config.include or config.exclude else None)
    messages = [f"no spec file matches {files.printable(repr(pattern))}" for pattern in expansion.unmatched]
    # nothing found: said once, of what was neither a glob already said nor a file the patterns left out
    rest = [n for n in names if n not in expansion.unmatched and n not in expansion.skipped]
    if not expansion.files and rest:
        messages.append("no spec files (*.yaml, *.yml) found in " + ", ".join(map(files.printable, rest)))
    messages += [f"skipped {files.printable(name)}: left out by the include/exclude patterns of "
                 f"{files.printable(str(config.path))}" for name in expansion.skipped]
    # nothing to check is a failure to find (exit 2), as a glob that matches nothing is, unless the
    # project's include/exclude left the files out (a hook handing over only files it excludes)
    nothing = not expansion.files and not expansion.skipped
    return Found(tuple(expansion.files), tuple(messages), bool(expansion.unmatched) or nothing)


def fail_level(config: Config, fail_on: str | None = None, strict: bool = False) -> str:
    """The lowest severity that fails the run: ``fail_on``, else the stricter of ``strict`` (warning)
    and the configuration's ``fail-on``."""
    if fail_on is not None:
        if fail_on not in SEVERITIES:
            raise ValueError(f"fail_on is one of {', '.join(SEVERITIES)}, not {fail_on!r}")
        return fail_on
    if strict:
        return SEVERITIES[max(SEVERITIES.index("warning"), SEVERITIES.index(config.fail_on))]
    return config.fail_on


def valid_setting(name: str, value: str) -> bool:
    """Whether ``INPUT=VALUE`` has the shape of a setting (the spec decides whether it has the input)."""
    return bool(name) and bool(value) and "." in name.strip(".")


def settings_of(sets: Settings) -> tuple[tuple[str, str], ...]:
    """``sets`` as the (INPUT, VALUE) pairs of ``--set``; a malformed one raises ``ValueError``."""
    if sets is None:
        return ()
    out = []
    for item in (sets.items() if isinstance(sets, Mapping) else sets):
        if isinstance(item, str):
            name, eq, value = item.partition("=")
            if not eq:
                raise ValueError(f"sets: expected INPUT=VALUE such as 'laser.pulse_energy=3 mJ', got {item!r}")
        else:
            name, value = item
        if isinstance(value, bool) or not isinstance(name, str) or not isinstance(value, (str, int, float)):
            raise ValueError(f"sets: {name!r}: a value is written as in a spec ('3 mJ', '>= 20 W'), not {value!r}")
        name, value = name.strip(), str(value).strip()
        if not valid_setting(name, value):
            raise ValueError(f"sets: expected an input such as laser.pulse_energy or lens.focal_length and a "
                             f"value, got {name!r}: {value!r}")
        out.append((name, value))
    return tuple(out)


_UNITS: list[UnitSystem] = []


def _units() -> UnitSystem:
    """The process's unit system for library calls (one pint registry per process)."""
    if not _UNITS:
        from speccheck.reading.units import UnitSystem

        _UNITS.append(UnitSystem())
    return _UNITS[0]


def run(found: Found, config: Config, *, settings: tuple[tuple[str, str], ...] = (), fail_on: str = "error",
        limits: Limits | None = None, jobs: int = 1, profiles: bool = False, remedies: str = "unmet",
        stdin: Any = None, units: UnitSystem | None = None) -> Result:
    """Check the files ``find`` found, each on its own (``batch``), and judge the run."""
    from speccheck.checking.document import Checker, Options
    from speccheck.reading.loader import Limits

    units = units if units is not None else _units()
    limits = limits if limits is not None else Limits()
    options = Options(limits=limits, tolerance=config.tolerance, tolerances=config.tolerances, profiles=profiles,
                      settings=settings, remedies=remedies)
    done = batch.check_files(list(found.files), lambda reader: Checker(units, options, read=reader),
                             limits.max_bytes, stdin, jobs)
    return _judged(done.results, found.messages + tuple(done.messages), found.unmatched or done.failed, config,
                   fail_on, done.read_paths)


def _judged(results: list[FileResult], messages: tuple[str, ...], io_failure: bool, config: Config,
            fail_on: str, read_paths: set[str]) -> Result:
    from speccheck.reading import config as cfg

    unset = [f"--set: {files.printable(r.path)}: {files.printable(p)}" for r in results for p in r.set_problems]
    if unset:  # a --set a file cannot take: nothing is reported
        return Result(tuple(results), 2, messages + tuple(unset), fail_on, frozenset(read_paths))
    results = cfg.apply(results, config)
    code = 2 if io_failure else 1 if cfg.failing(results, fail_on) else 0
    return Result(tuple(results), code, messages, fail_on, frozenset(read_paths))


def _names(paths: tuple[str | os.PathLike[str], ...]) -> list[str]:
    names = [os.fspath(p) for p in paths]
    if not names or any(not isinstance(n, str) or not n for n in names):
        raise ValueError("check: name one or more spec files, folders or globs (an empty path was given)")
    return names


def check(*paths: str | os.PathLike[str], config: ConfigChoice = None, sets: Settings = None,
          fail_on: str | None = None, jobs: int = 1) -> Result:
    """Check spec files, folders of them (``*.yaml``, ``*.yml``) and globs (``"specs/**/*.yaml"``) as
    ``speccheck check`` does: measured data files beside each spec, its inline suppressions, the
    project configuration (``config``, see ``load_config``), ``sets`` as ``--set`` (``{"laser.
    pulse_energy": "1 mJ"}``), ``fail_on`` as ``--fail-on``, ``jobs`` processes as ``--jobs``.
    ``"-"`` reads standard input.  A file that cannot be read is a finding and exit code 2; a
    mistake in the configuration gives no files, exit code 2 and the mistake in ``messages``."""
    names = _names(paths)
    settings = settings_of(sets)
    from speccheck.reading.config import ConfigError

    try:
        conf = load_config(config)
    except ConfigError as exc:
        return Result((), 2, (str(exc),))
    result = run(find(names, conf), conf, settings=settings, fail_on=fail_level(conf, fail_on), jobs=jobs)
    _units().save()  # remember pint's answers for the next run
    return result


def check_text(text: str | bytes, path: str = "<string>", base: str | os.PathLike[str] = ".", *,
               config: ConfigChoice = None, sets: Settings = None, fail_on: str | None = None) -> Result:
    """Check a spec given as text, reported under the name ``path``; the measured data files it
    names are read from the folder ``base`` (relative paths inside it only), and the project
    configuration is found from the current folder, as for ``check``."""
    from speccheck.checking.document import Checker, Options
    from speccheck.reading.config import ConfigError

    settings = settings_of(sets)
    try:
        conf = load_config(config)
    except ConfigError as exc:
        return Result((), 2, (str(exc),))
    reader = files.DataReader(folder=os.fspath(base))
    checker = Checker(_units(), Options(tolerance=conf.tolerance, tolerances=conf.tolerances, settings=settings),
                      read=reader)
    result, failed = batch.check_one(checker, text, path)
    judged = _judged([result], (), failed, conf, fail_level(conf, fail_on), reader.read_paths)
    _units().save()
    return judged
