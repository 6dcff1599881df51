"""The published schema: valid draft 2020-12, shipped, and in step with the tables."""

import json
from pathlib import Path

from jsonschema import Draft202012Validator

from speccheck.quantities import ALIASES, CATEGORICAL, MEASURED, QUANTITIES
from speccheck.schema import schema, schema_text

ROOT = Path(__file__).resolve().parent.parent


def test_the_schema_is_a_valid_draft_2020_12_schema():
    Draft202012Validator.check_schema(schema())
    assert schema()["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_the_installed_schema_is_the_published_file():
    assert json.loads(schema_text()) == json.loads((ROOT / "schemas" / "spec-v1.schema.json").read_text("utf-8"))


def test_the_block_keys_are_exactly_the_quantity_table():
    block = set(schema()["$defs"]["quantities"]["properties"])
    assert block == {q.name for q in QUANTITIES} | set(ALIASES) | set(CATEGORICAL) | set(MEASURED)


def test_every_example_spec_passes_the_schema_alone_where_it_should():
    import yaml

    validator = Draft202012Validator(schema())
    for name in ("oscillator-consistent.yaml", "amplifier-khz-consistent.yaml", "maker-sheet-one-wrong.yaml"):
        data = yaml.safe_load((ROOT / "example_specs" / name).read_text("utf-8"))
        assert not list(validator.iter_errors(data)), name
