"""The published schema: valid draft 2020-12, shipped, and in step with the tables."""

import json
from pathlib import Path

from jsonschema import Draft202012Validator

from speccheck.physics.quantities import ALIASES, CATEGORICAL, LASER_BEAM, LASER_CHIRP, MEASURED, QUANTITIES
from speccheck.reading.schema import schema, schema_text

ROOT = Path(__file__).resolve().parent.parent


def test_the_schema_is_a_valid_draft_2020_12_schema():
    Draft202012Validator.check_schema(schema())
    assert schema()["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_the_installed_schema_is_the_published_file():
    assert json.loads(schema_text()) == json.loads((ROOT / "schemas" / "spec-v1.schema.json").read_text("utf-8"))


def test_the_block_keys_are_exactly_the_quantity_table():
    block = set(schema()["$defs"]["quantities"]["properties"])
    assert block == {q.name for q in QUANTITIES} | set(ALIASES) | set(CATEGORICAL) | set(MEASURED) | set(LASER_CHIRP) | set(LASER_BEAM)


def test_every_example_spec_passes_the_schema_alone_where_it_should():
    import yaml

    validator = Draft202012Validator(schema())
    for name in ("oscillator-consistent.yaml", "amplifier-khz-consistent.yaml", "maker-sheet-one-wrong.yaml"):
        data = yaml.safe_load((ROOT / "example_specs" / name).read_text("utf-8"))
        assert not list(validator.iter_errors(data)), name


def test_the_compiled_schema_agrees_with_jsonschema_on_valid_broken_and_hostile_documents():
    import copy

    import yaml

    from speccheck.reading.fastschema import compile_schema

    fast = compile_schema(schema())
    reference = Draft202012Validator(schema())
    docs = [yaml.safe_load(p.read_text("utf-8")) for p in sorted((ROOT / "example_specs").glob("*.yaml"))]
    spoilt = []
    for d in docs:
        for how in range(10):
            x = copy.deepcopy(d)
            if how == 0:
                x["laser"]["wavelenght"] = "800 nm"
            elif how == 1:
                x["spec_version"] = True
            elif how == 2:
                x["laser"]["pulse_shape"] = "triangle"
            elif how == 3:
                x["laser"]["pulse_energy"] = {}
            elif how == 4:
                x.pop("laser")
            elif how == 5:
                x["laser"]["m2"] = [1.1]
            elif how == 6:
                x["operating_points"] = [{"name": "low", "average_power": "1 W"}, {"nmae": "x"}]
            elif how == 7:
                x["path"] = [{"name": "a", "kind": "optic", "transmision": 0.9}]
            elif how == 8:
                x["path"] = [{"name": "s", "kind": "splitter", "ratio": 0.5,
                              "branches": {"a": {"path": []}, "b": {"pth": []}}}]
            elif how == 9:
                x["defaults"] = {"b_integral_limit": 0}
            spoilt.append(x)
    for doc in docs + spoilt + [None, [], "text", {"spec_version": 1, "laser": {}, "target": {"gas": "argon"}}]:
        assert fast(doc) == reference.is_valid(doc), doc
