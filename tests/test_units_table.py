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


# -- the table cannot change an answer


def _table(cache):
    (table_file,) = cache.glob("units-*.json")
    return table_file, json.loads(table_file.read_text("utf-8"))


def test_a_tampered_entry_is_dropped_and_answered_again(cache):
    first = UnitSystem()
    first.parse("nJ")
    first.parse("fs")
    first.save()
    table_file, table = _table(cache)
    table["units"]["fs"][1] = float("nan")  # a non-finite factor
    table["units"]["10**10**10"] = ["10**10**10", 1.0, "1", "dimensionless"]  # a text the screen refuses
    table["units"]["ps"] = ["ps", "1e-12", "s", "[time]"]  # a factor that is not a number
    table_file.write_text(json.dumps(table))
    second = UnitSystem()
    assert second.parse("fs").factor == pytest.approx(1e-15)  # recomputed by pint
    assert "10**10**10" not in second._table and "ps" not in second._table
    with pytest.raises(Exception):
        second.parse("10**10**10")  # the screen runs before the table is consulted
    second.save()
    _, rewritten = _table(cache)
    assert "10**10**10" not in rewritten["units"] and rewritten["units"]["fs"][1] == pytest.approx(1e-15)


def test_a_table_whose_defining_constants_are_not_the_si_ones_is_not_used(cache):
    UnitSystem().save()
    table_file, table = _table(cache)
    table["constants"]["c"] = 3e8  # the SI defines c = 299 792 458 m/s exactly (2019 redefinition)
    table_file.write_text(json.dumps(table))
    system = UnitSystem()
    assert system.constants.c == 299792458.0


def test_runs_that_save_at_the_same_time_keep_each_others_entries(cache):
    a, b = UnitSystem(), UnitSystem()  # both start from the same (empty) table
    a.parse("nJ")
    b.parse("kHz")
    a.save()
    b.save()  # the last writer merges instead of replacing
    _, table = _table(cache)
    assert {"nJ", "kHz"} <= set(table["units"])


def test_the_cache_folder_is_the_platforms(monkeypatch):
    import platformdirs

    from speccheck.reading import unit_table

    monkeypatch.delenv("SPECCHECK_CACHE_DIR", raising=False)
    monkeypatch.delenv("SPECCHECK_NO_CACHE", raising=False)
    assert str(unit_table.path()).startswith(platformdirs.user_cache_dir("speccheck", appauthor=False))


def test_the_table_is_named_for_the_pint_that_answers():
    # read from pint's metadata folder beside it, without importing importlib.metadata: the same version
    from importlib.metadata import version

    from speccheck.reading import unit_table

    assert unit_table._pint_version() == version("pint")
