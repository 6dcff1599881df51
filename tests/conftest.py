"""Shared fixtures: one unit system per test session and a small check harness."""

from __future__ import annotations

import textwrap

import pytest

from speccheck.check import Checker
from speccheck.units import UnitSystem


@pytest.fixture(scope="session")
def units() -> UnitSystem:
    return UnitSystem()


@pytest.fixture(scope="session")
def checker(units) -> Checker:
    return Checker(units)


@pytest.fixture
def check(checker):
    """check(yaml_text) -> FileResult; the text is dedented, 'spec_version: 1' added if missing."""

    def run(text: str, path: str = "spec.yaml"):
        text = textwrap.dedent(text).lstrip("\n")
        if "spec_version" not in text:
            text = "spec_version: 1\n" + text
        return checker.check_text(text, path)

    return run


def rules_of(result) -> list[tuple[str, int | None]]:
    """(rule, line) of every finding, in order."""
    return [(f.rule, f.line) for f in result.findings]


def cell(result, quantity: str, block: str = "laser"):
    return result.sheet[block][quantity]
