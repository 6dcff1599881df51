"""Project configuration: ``speccheck.toml`` or ``[tool.speccheck]`` in ``pyproject.toml``.

Keys (all optional)::

    tolerance = "5%"                      # default relative tolerance of plain values
    disable = ["strongly-chirped"]        # rules that are not reported
    fail-on = "error"                     # "error" | "warning" | "note": lowest level that fails
    include = ["specs/**/*.yaml"]         # only these files are checked (default: every *.yaml, *.yml)
    exclude = ["drafts", "vendor/**"]     # files and folders that are never checked

    [severity]                            # [tool.speccheck.severity] in pyproject.toml
    sub-cycle-pulse = "error"

The file is found by walking up from the current folder (``speccheck.toml``
wins over ``pyproject.toml`` in the same folder; a ``pyproject.toml`` without
a ``[tool.speccheck]`` table is passed over); the walk stops at the folder
that holds ``.git``.  Patterns are relative to the configuration file's
folder.

Parsing and applying are pure functions (``parse``, ``apply``, ``selects``);
only ``find`` and ``load`` touch the file system.  Every mistake in a
configuration is a ``ConfigError`` naming the file, the key and, where it
can be found, the line.
"""

from __future__ import annotations

import dataclasses
import difflib
import os
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Iterable, Mapping

from speccheck.reading.disk import read_regular
from speccheck.reading.patterns import compile_pattern, pattern_problem
from speccheck.records.findings import CAUTIONS, SEVERITIES, FileResult
from speccheck.records.rules import RULES

CONFIG_FILE = "speccheck.toml"
PYPROJECT = "pyproject.toml"
KEYS = ("tolerance", "tolerances", "disable", "severity", "include", "exclude", "fail-on")
FAIL_LEVELS = SEVERITIES  # "error" | "warning" | "note"
MAX_CONFIG_BYTES = 1024 * 1024  # a configuration file larger than this is refused

# Findings that say a file was not read or not fully checked: turning them off or down would
# let a file that was never checked pass, so neither the configuration nor a suppression may.
FIXED_RULES = frozenset({"yaml-syntax", "unreadable-file", "input-limit", "unsupported-yaml-tag",
                         "internal-error"})
# The laser-safety caution is always shown: it may not be disabled, lowered or suppressed.
ALWAYS_SHOWN = CAUTIONS


class ConfigError(Exception):
    """A mistake in a configuration file: ``str()`` is the whole message."""

    def __init__(self, path: str, message: str, key: str | None = None, line: int | None = None) -> None:
        self.path, self.key, self.line, self.message = path, key, line, message
        where = f"{path}:{line}" if line else path
        super().__init__(f"{where}: {key + ': ' if key else ''}{message}")


@dataclass(frozen=True)
class Config:
    path: str | None = None  # the file it was read from (None: the built-in defaults)
    root: str = "."  # the folder that include/exclude patterns are relative to
    tolerance: float | None = None
    tolerances: Mapping[str, float] = field(default_factory=lambda: MappingProxyType({}))  # per quantity
    disable: frozenset[str] = frozenset()
    severity: Mapping[str, str] = field(default_factory=lambda: MappingProxyType({}))  # rule -> level
    include: tuple[str, ...] = ()
    exclude: tuple[str, ...] = ()
    fail_on: str = "error"


DEFAULT = Config()


# ------------------------------------------------------------------ finding the file
def _has_section(text: str) -> bool:
    """Whether a pyproject.toml holds a ``tool.speccheck`` table, as TOML reads it (whichever way
    it is written: ``[tool.speccheck]``, ``[tool]`` with ``speccheck.x = …``, inline tables).  A
    file TOML cannot read counts when it seems to name the table, so its mistake is reported."""
    try:
        tool = tomllib.loads(text).get("tool")
    except (tomllib.TOMLDecodeError, RecursionError):
        return re.search(r"^\s*\[\s*tool\s*\.\s*speccheck\s*[\].]", text, re.M) is not None or \
            re.search(r"^\s*(?:tool\s*\.\s*)?speccheck\s*[.=]", text, re.M) is not None
    return isinstance(tool, dict) and "speccheck" in tool


def find(start: Path) -> Path | None:
    """The configuration that applies in ``start``: nearest folder upwards, stopping at the git root."""
    folder = start.absolute()
    while True:
        candidate = folder / CONFIG_FILE
        if os.path.lexists(candidate):  # found, so it is the configuration: one that is not a file is reported
            return candidate
        pyproject = folder / PYPROJECT
        if pyproject.is_file():
            try:
                if _has_section(read_regular(pyproject, MAX_CONFIG_BYTES).decode("utf-8", errors="replace")):
                    return pyproject
            except OSError:
                pass
        if (folder / ".git").exists() or folder.parent == folder:
            return None
        folder = folder.parent


def shown(path: Path) -> str:
    """A configuration path as messages show it: relative to the current folder when inside it."""
    rel = _relative(str(path), ".")
    return rel if rel is not None else str(path)


def load(path: Path) -> Config:
    """Read and parse one configuration file; every problem is a ``ConfigError``."""
    name = shown(path)
    try:
        raw = read_regular(path, MAX_CONFIG_BYTES)
    except OSError as exc:
        reason = "is a directory" if isinstance(exc, IsADirectoryError) else (exc.strerror or str(exc))
        raise ConfigError(name, f"cannot read the configuration: {reason}") from None
    if len(raw) > MAX_CONFIG_BYTES:
        raise ConfigError(name, f"the configuration is larger than {MAX_CONFIG_BYTES} bytes")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise ConfigError(name, f"the file is not UTF-8 text (byte {exc.start})") from None
    return parse(text, name, pyproject=path.name == PYPROJECT, root=str(path.absolute().parent))


# ------------------------------------------------------------------ parsing
def _line_of(text: str, key: str, table: str | None) -> int | None:
    """Best effort: the line where ``key`` is set, in ``[table]`` (None: before the first table)."""
    lines = text.splitlines()
    header = re.compile(r"^\s*\[")
    start = 0
    if table is not None:
        name = r"\s*\.\s*".join(re.escape(part) for part in table.split("."))
        wanted = re.compile(rf"^\s*\[\s*{name}\s*\]")
        start = next((i + 1 for i, line in enumerate(lines) if wanted.match(line)), None)
        if start is None:
            return None
    pattern = re.compile(rf"^\s*[\"']?{re.escape(key)}[\"']?\s*=")
    for i in range(start, len(lines)):
        if header.match(lines[i]):
            return None
        if pattern.match(lines[i]):
            return i + 1
    return None


def _guess(word: str, choices: Iterable[str]) -> str:
    match = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f"; did you mean {match[0]!r}?" if match else ""


def _kind(value) -> str:
    return {bool: "a boolean", int: "a number", float: "a number", str: "a string", list: "a list",
            dict: "a table"}.get(type(value), type(value).__name__)


def parse(text: str, path: str = CONFIG_FILE, *, pyproject: bool = False, root: str = ".") -> Config:
    """Parse configuration text (TOML).  ``pyproject``: read ``[tool.speccheck]``."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(path, f"not valid TOML: {exc}") from None
    except RecursionError:  # tomllib recurses into nested arrays and inline tables
        raise ConfigError(path, "not usable TOML: arrays or tables nested too deeply") from None
    table_name = "tool.speccheck" if pyproject else None
    if pyproject:
        section = data.get("tool", {}).get("speccheck", {}) if isinstance(data.get("tool"), dict) else {}
        if not isinstance(section, dict):
            raise ConfigError(path, "[tool.speccheck] must be a table", "tool.speccheck")
    else:
        section = data
    prefix = "tool.speccheck." if pyproject else ""

    def fail(key: str, message: str, table: str | None = table_name) -> ConfigError:
        return ConfigError(path, message, prefix + key, _line_of(text, key.rsplit(".", 1)[-1], table))

    for key in section:
        if key not in KEYS:
            hint = _guess(key, KEYS)
            if key == "tool" and not pyproject:
                hint = f"; in {CONFIG_FILE} the keys stand at the top level, without [tool.speccheck]"
            raise fail(key, f"unknown key{hint} (known keys: {', '.join(KEYS)})")

    tolerance = None
    if "tolerance" in section:
        from speccheck.reading.values import ValueProblem, parse_tolerance

        try:
            tolerance = parse_tolerance(section["tolerance"])
        except ValueProblem as p:
            raise fail("tolerance", p.message) from None
    tolerances: dict[str, float] = {}
    raw_tolerances = section.get("tolerances", {})
    if not isinstance(raw_tolerances, dict):
        raise fail("tolerances", f"must be a table of quantity = tolerance, got {_kind(raw_tolerances)}")
    if raw_tolerances:
        from speccheck.reading.values import ValueProblem, parse_tolerance, tolerance_names

        known = tolerance_names()
        table = (table_name + ".tolerances") if pyproject else "tolerances"
        for name, raw in raw_tolerances.items():
            if name not in known:
                raise ConfigError(path, f"no quantity or stage parameter is called {name!r}{_guess(name, known)}",
                                  prefix + "tolerances." + name, _line_of(text, name, table))
            try:
                tolerances[name] = parse_tolerance(raw)
            except ValueProblem as p:
                raise ConfigError(path, p.message, prefix + "tolerances." + name, _line_of(text, name, table)) from None

    def rule_list(key: str) -> tuple[str, ...]:
        value = section.get(key, [])
        if isinstance(value, str):
            raise fail(key, f"must be a list of strings, like {key} = [{value!r}]")
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            raise fail(key, f"must be a list of strings, got {_kind(value)}")
        return tuple(value)

    disable = rule_list("disable")
    for rule_id in disable:
        _known_rule(rule_id, fail, "disable")

    severity: dict[str, str] = {}
    raw_severity = section.get("severity", {})
    if not isinstance(raw_severity, dict):
        raise fail("severity", f"must be a table of rule = level, got {_kind(raw_severity)}")
    for rule_id, level in raw_severity.items():
        sub = "severity." + rule_id
        table = (table_name + ".severity") if pyproject else "severity"
        if rule_id not in RULES:
            raise ConfigError(path, f"unknown rule{_guess(rule_id, RULES)} (`speccheck rules` lists them)",
                              prefix + sub, _line_of(text, rule_id, table))
        if rule_id in FIXED_RULES or rule_id in ALWAYS_SHOWN:
            why = "the laser-safety caution is always shown" if rule_id in ALWAYS_SHOWN else \
                "this rule says a file was not read"
            raise ConfigError(path, f"{why}; its level cannot be changed",
                              prefix + sub, _line_of(text, rule_id, table))
        if not isinstance(level, str) or level not in SEVERITIES:
            shown = repr(level) if isinstance(level, str) else _kind(level)
            extra = "; to turn a rule off, list it in disable" if level in ("off", "none", "ignore") else ""
            raise ConfigError(path, f"level must be one of {', '.join(SEVERITIES)}, got {shown}{extra}",
                              prefix + sub, _line_of(text, rule_id, table))
        if rule_id in disable:
            raise ConfigError(path, "this rule is also disabled; give it a level or disable it, not both",
                              prefix + sub, _line_of(text, rule_id, table))
        severity[rule_id] = level

    include = rule_list("include")
    exclude = rule_list("exclude")
    for key, patterns in (("include", include), ("exclude", exclude)):
        for pattern in patterns:
            problem = pattern_problem(pattern)
            if problem:
                raise fail(key, f"pattern {pattern!r}: {problem}")

    fail_on = section.get("fail-on", "error")
    if not isinstance(fail_on, str) or fail_on not in FAIL_LEVELS:
        shown = repr(fail_on) if isinstance(fail_on, str) else _kind(fail_on)
        raise fail("fail-on", f"must be one of {', '.join(FAIL_LEVELS)}, got {shown}")

    return Config(path, root, tolerance, MappingProxyType(tolerances), frozenset(disable), MappingProxyType(severity), include, exclude,
                  fail_on)


def _known_rule(rule_id: str, fail, key: str) -> None:
    if rule_id not in RULES:
        raise fail(key, f"unknown rule {rule_id!r}{_guess(rule_id, RULES)} (`speccheck rules` lists them)")
    if rule_id in FIXED_RULES:
        raise fail(key, f"rule {rule_id!r} says a file was not read and cannot be disabled")
    if rule_id in ALWAYS_SHOWN:
        raise fail(key, f"rule {rule_id!r} is the laser-safety caution and is always shown")


# ------------------------------------------------------------------ applying to findings
def apply(results: Iterable[FileResult], config: Config) -> list[FileResult]:
    """Drop disabled rules and apply severity overrides (new findings; the old are untouched)."""
    out = []
    for result in results:
        findings = tuple(
            dataclasses.replace(f, severity=config.severity[f.rule]) if f.rule in config.severity else f
            for f in result.findings if f.rule not in config.disable)
        out.append(result if findings == result.findings else dataclasses.replace(result, findings=findings))
    return out


def failing(results: Iterable[FileResult], fail_on: str) -> bool:
    """Whether any finding is at ``fail_on`` level or more severe; a caution never fails a run."""
    worst = SEVERITIES.index(fail_on)
    return any(SEVERITIES.index(f.severity) <= worst and f.rule not in CAUTIONS
               for r in results for f in r.findings)


def _relative(path: str, root: str) -> str | None:
    try:
        rel = os.path.relpath(os.path.abspath(path), os.path.abspath(root))
    except ValueError:  # another drive
        return None
    rel = rel.replace(os.sep, "/")
    if rel == ".." or rel.startswith("../"):
        return None
    return rel


def _prefixes(rel: str) -> list[str]:
    parts = rel.split("/")
    return ["/".join(parts[:i]) for i in range(1, len(parts) + 1)]


class Selector:
    """Decides which files and folders the project's patterns let through."""

    def __init__(self, config: Config) -> None:
        self.root = config.root
        self.include = [compile_pattern(p) for p in config.include]
        self.exclude = [compile_pattern(p) for p in config.exclude]

    def excluded(self, path: str) -> bool:
        """A file or folder that an exclude pattern matches, itself or through a parent folder."""
        rel = _relative(path, self.root)
        if rel is None or rel == ".":
            return False
        return any(p.fullmatch(prefix) for prefix in _prefixes(rel) for p in self.exclude)

    def selected(self, path: str) -> bool:
        """A file to check: not excluded, and matched by an include pattern when there are any."""
        if self.excluded(path):
            return False
        if not self.include:
            return True
        rel = _relative(path, self.root)
        return rel is None or any(p.fullmatch(rel) for p in self.include)
