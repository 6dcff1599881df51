"""Findings and sheet cells: the immutable records the checker produces."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import NamedTuple

SEVERITIES = ("error", "warning", "note")
SEVERITY_RANK = {s: i for i, s in enumerate(SEVERITIES)}
# Rules whose findings are cautions (the laser-safety one): shown for every spec they concern
# whatever the configuration says, said once per run where a format allows, and never what
# makes a run fail (``--fail-on note`` leaves them out).
CAUTIONS = frozenset({"laser-safety"})


@dataclass(frozen=True)
class Finding:
    rule: str
    severity: str
    message: str
    path: str
    line: int | None = None  # 1-based
    column: int | None = None  # 1-based
    quantities: tuple[str, ...] = ()
    suspect: str | None = None
    candidates: tuple[str, ...] = ()
    cause: str | None = None  # id of the likely mistake (mistakes.py), when one matches
    likely: bool = False  # the suspect is one of several candidates, the only one a catalogued mistake explains
    # the lines of the other values the finding concerns: a suppression on any of them applies to it
    related_lines: tuple[int, ...] = ()
    # where a finding's place is a value set on the command line (``--set INPUT=VALUE``), not a
    # line of the file: that setting as typed (``line`` and ``column`` are then None)
    origin: str | None = None
    # what would meet a target: one ``Remedy`` per input it depends on (None: not computed)
    remedies: tuple["Remedy", ...] | None = None

    def __post_init__(self) -> None:
        if self.severity not in SEVERITY_RANK:
            raise ValueError(f"unknown severity {self.severity!r}")

    def sort_key(self) -> tuple:
        """Findings are listed by place; at one place in the order the check made them (a stable sort:
        the laser block, then each operating point in the sheet's order, then the path), so a target
        judged at every operating point is said point by point, as the sheet's columns run."""
        return (self.path, self.line or 0, self.column or 0)


@dataclass(frozen=True)
class Remedy:
    """The range of one input over which a target is met, all else unchanged (nominal values).

    ``low``/``high`` in SI (None: unbounded on that side); ``reachable`` False when no value in
    the range searched meets it; ``stated`` False for a parameter's default value.  ``value``
    (the input's nominal value now) and ``display_unit`` are for the wording, not the JSON."""

    input: str  # "<column>.<parameter>"
    column: str
    parameter: str
    low: float | None
    high: float | None
    unit: str  # SI
    reachable: bool
    stated: bool
    value: float | None = None
    display_unit: str = ""
    # whether each end is where the target stops being met (True) or where the input stops being
    # what it can be (False: a share of the beam at 1, a pulse at its transform limit)
    binding: tuple[bool, bool] = (True, True)


class Cell(NamedTuple):
    """One quantity of one column of the sheet, in SI units (an immutable record; a named tuple,
    because a sheet holds thousands of them and they are made in the checker's inner loop)."""

    status: str  # "stated" | "derived" | "conflict"
    low: float | None  # None: unbounded
    high: float | None
    value: float | None  # the number to show: stated typical value or interval centre
    unit: str  # SI unit of the numbers
    display_unit: str = ""  # unit the user wrote, or a sensible one
    implied_low: float | None = None  # for conflicts: what the rest of the spec implies
    implied_high: float | None = None
    assumed: bool = False  # a default value, not stated by the user
    text: str = ""  # the value as the user wrote it (stated and conflict cells)
    overridden: bool = False  # set on the command line (``--set``), not read from the file
    inherited: bool = False  # an operating point's value taken from the laser block, not restated there


@dataclass(frozen=True)
class FieldProfile:
    """The pulse's field at a column, for the report's plots: its temporal intensity and its
    spectrum with the spectral phase, as plain numbers (normalised to a peak of 1)."""

    column: str
    time: tuple[float, ...]  # s, from the peak
    intensity: tuple[float, ...]
    wavelength: tuple[float, ...]  # m, ascending
    spectrum: tuple[float, ...]  # spectral intensity per unit frequency
    phase: tuple[float, ...]  # rad, its constant and group delay removed


@dataclass(frozen=True)
class FileResult:
    path: str
    findings: tuple[Finding, ...]
    sheet: dict[str, dict[str, Cell]] = field(default_factory=dict)
    title: str | None = None
    pulse_shape: str | None = None  # the laser's pulse shape as the check used it
    pulse_shape_stated: bool = False  # False: not stated, the default was assumed
    branch_ends: tuple[str, ...] = ()  # the column that ends each branch of the beam path
    operating_points: tuple[str, ...] = ()  # the columns that are operating points of a maker's sheet
    fields: tuple[FieldProfile, ...] = ()  # the pulse's field at each branch end, where the path built it
    settings: tuple[str, ...] = ()  # the --set INPUT=VALUE applied to this file, with what moved along
    set_problems: tuple[str, ...] = ()  # a --set this file cannot take: the file is not checked

    def count(self, severity: str) -> int:
        return sum(1 for f in self.findings if f.severity == severity)
