"""The table of pint's answers kept on disk between runs."""

import io
import json

import pytest

from speccheck.cli import run
from speccheck.reading.units import UnitSystem


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv("SPECCHECK_CACHE_DIR", str(tmp_path))
    monkeypatch.delenv("SPECCHECK_NO_CACHE", raising=False)
    return tmp_path


def test_a_run_leaves_a_table_whose_values_are_pints(cache, units, tmp_path):
    spec = tmp_path / "s.yaml"
    spec.write_text("spec_version: 1\nlaser:\n  pulse_energy: 25 µJ\n  peak_intensity: 1e14 W/cm^2\n")
    assert run(["check", "--no-config", str(spec)], stdout=io.StringIO(), stderr=io.StringIO()) == 0
    (table_file,) = cache.glob("units-*.json")
    table = json.loads(table_file.read_text("utf-8"))
    assert table["constants"]["c"] == units.constants.c  # from pint's CODATA values
    assert table["constants"]["m_e"] == units.constants.m_e
    assert table["units"]["µJ"][1] == pytest.approx(1e-6) and table["units"]["W/cm^2"][1] == pytest.approx(1e4)


def test_a_later_run_answers_known_units_without_pint(cache, tmp_path):
    first = UnitSystem()
    first.parse("nJ")
    first.save()
    second = UnitSystem()
    assert second._registry is None  # pint not loaded
    assert second.parse("nJ").factor == pytest.approx(1e-9)
    assert second._registry is None
    assert second.parse("kHz").factor == pytest.approx(1e3)  # a new unit: pint answers
    assert second._registry is not None


def test_a_damaged_table_is_ignored_and_rewritten(cache):
    UnitSystem().save()
    (table_file,) = cache.glob("units-*.json")
    table_file.write_text("{not json")
    system = UnitSystem()
    assert system.parse("fs").factor == pytest.approx(1e-15)
    system.save()
    assert json.loads(table_file.read_text("utf-8"))["units"]["fs"][1] == pytest.approx(1e-15)


def test_the_table_can_be_turned_off(cache, monkeypatch):
    monkeypatch.setenv("SPECCHECK_NO_CACHE", "1")
    system = UnitSystem()
    system.parse("nJ")
    system.save()
    assert list(cache.iterdir()) == []
