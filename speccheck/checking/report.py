"""Where findings go: the report of one document, which stamps each finding's place and
severity (checks say what, the report says where), and what the checks may ask of the
checker that runs them."""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable, Protocol

from speccheck.physics.relations import Context
from speccheck.reading.loader import Document
from speccheck.reading.units import UnitSystem
from speccheck.reading.values import ValueParser
from speccheck.records.findings import Finding
from speccheck.records.rules import rule

if TYPE_CHECKING:
    from speccheck.checking.measured_data import DataFiles


class Services(Protocol):
    """What a check may use of the document checker: the units, the value grammar, the
    injected reader of data files (and the run's cache of them), and the relation context of a
    pulse shape and profile."""

    units: UnitSystem
    values: ValueParser
    read: Callable[[str, str], bytes] | None
    data_files: DataFiles  # the measured data files of the run, each read and analysed once

    def context(self, shape: str, profile: str) -> Context: ...


class Report:
    """Collects findings; stamps location and severity (checks never do)."""

    def __init__(self, path: str, doc: Document) -> None:
        self.path = path
        self.doc = doc
        self.findings: list[Finding] = []
        self.seen: set = set()
        self.dedupe = False
        self.points: dict[str, int] = {}  # the operating-point columns: name → index in the document

    def add(self, rule_id: str, message: str, at=(), *, key: bool = False, line=None, column=None,
            quantities=(), suspect=None, candidates=(), cause=None, likely=False, related=(),
            distinct=None) -> None:
        """``distinct`` tells apart findings of one rule at one place that are not repeats (the
        warnings about one data file): only the same rule, place and ``distinct`` is a repeat."""
        if line is None:
            line, column = self.doc.where(tuple(at), key=key)
        if self.dedupe and (rule_id, line, column, distinct) in self.seen:
            return
        self.seen.add((rule_id, line, column, distinct))
        origin = None
        if line == 0:  # a value set on the command line (loader.Document.mark_setting)
            origin, line, column = self.doc.settings[column - 1], None, None
        self.findings.append(Finding(rule_id, rule(rule_id).severity, message, self.path, line, column,
                                     tuple(quantities), suspect, tuple(candidates), cause, likely,
                                     tuple(sorted({self.doc.where(tuple(p))[0] for p in related}
                                                  - {line, None, 0})), origin))
