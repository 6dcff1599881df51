"""Shared fixtures: one unit system per test session and a small check harness."""

from __future__ import annotations

import dataclasses
import textwrap

import pytest

from speccheck.checking.document import Checker
from speccheck.reading.units import UnitSystem


@pytest.fixture(scope="session")
def units() -> UnitSystem:
    # No table on disk: every unit and constant here comes from pint itself.
    return UnitSystem(table=False)


@pytest.fixture(scope="session")
def checker(units) -> Checker:
    return Checker(units)


@pytest.fixture
def check(checker):
    """check(yaml_text) -> FileResult; the text is dedented, 'spec_version: 1' added if missing.

    The laser-safety caution that nearly every spec carries is left out, so that tests can
    state exactly the findings they are about (test_safety.py checks the caution itself)."""

    def run(text: str, path: str = "spec.yaml", safety: bool = False):
        text = textwrap.dedent(text).lstrip("\n")
        if "spec_version" not in text:
            text = "spec_version: 1\n" + text
        result = checker.check_text(text, path)
        if safety:
            return result
        return dataclasses.replace(result, findings=tuple(f for f in result.findings if f.rule != "laser-safety"))

    return run


def rules_of(result) -> list[tuple[str, int | None]]:
    """(rule, line) of every finding, in order."""
    return [(f.rule, f.line) for f in result.findings]


def cell(result, quantity: str, block: str = "laser"):
    return result.sheet[block][quantity]
