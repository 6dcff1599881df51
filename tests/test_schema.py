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
        for how in range(13):
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
            elif how == 10:  # a number without its unit, where the schema wants text
                x["laser"]["pulse_energy"] = 25
            elif how == 11:
                x["laser"]["average_power"] = {"min": 20, "max": "25 W"}
            elif how == 12:
                x["path"] = [{"name": "w", "kind": "material", "material": "fused_silica", "thickness": 5,
                              "transmission": 0.9, "damage_threshold": {"fluence": 1}}]
            spoilt.append(x)
    for doc in docs + spoilt + [None, [], "text", {"spec_version": 1, "laser": {}, "target": {"gas": "argon"}}]:
        assert fast(doc) == reference.is_valid(doc), doc


def _properties(node, where="schema"):
    """(place, name, schema) of every property the schema defines, wherever it stands."""
    if isinstance(node, dict):
        for name, sub in node.get("properties", {}).items():
            yield f"{where}.{name}", name, sub
        for key, sub in node.items():
            yield from _properties(sub, f"{where}.{key}")
    elif isinstance(node, list):
        for i, sub in enumerate(node):
            yield from _properties(sub, f"{where}[{i}]")


def test_every_key_of_the_schema_has_a_description():
    found = list(_properties(schema()))
    assert len(found) > 140  # the walk reaches the blocks, the stage parameters and the value parts
    assert {"schema.$defs.stage.divide_by", "schema.$defs.quantity.anyOf[2].min"} <= {
        place for place, _, _ in found}
    missing = [place for place, _, sub in found if not (isinstance(sub, dict) and sub.get("description"))]
    assert not missing, "\n".join(missing)


def test_a_key_with_a_dimension_is_text_in_the_schema_and_a_dimensionless_one_may_be_a_number():
    from speccheck.reading.dimensions import dimensions

    defs = schema()["$defs"]
    places = [(("laser", k), p) for k, p in defs["quantities"]["properties"].items()]
    places += [(("path", 0, k), p) for k, p in defs["stage"]["properties"].items()]
    places += [(("path", 0, "damage_threshold", k), p)
               for k, p in defs["stage"]["properties"]["damage_threshold"]["properties"].items()]
    places += [(("safety", "mpe"), schema()["properties"]["safety"]["properties"]["mpe"])]
    refs = {at: p.get("$ref", "").rsplit("/", 1)[-1] for at, p in places}
    assert refs[("laser", "pulse_energy")] == "with_unit" and refs[("laser", "m2")] == "quantity"
    assert refs[("path", 0, "divide_by")] == "quantity" and refs[("path", 0, "incidence_angle")] == "with_unit"
    for at, ref in refs.items():
        if dimensions(at):
            assert ref in ("with_unit", "unit_text"), at
        elif ref in ("with_unit", "unit_text"):
            raise AssertionError(f"{at} is dimensionless by the tables but text-only in the schema")
    validator = Draft202012Validator(schema())
    assert not validator.is_valid({"spec_version": 1, "laser": {"pulse_energy": 25}})
    assert not validator.is_valid({"spec_version": 1, "laser": {"pulse_energy": {"min": 20}}})
    assert validator.is_valid({"spec_version": 1, "laser": {"pulse_energy": "25 nJ", "m2": 1.1,
                                                            "average_power": {"min": "2 W"}},
                               "path": [{"name": "p", "kind": "pulse_picker", "divide_by": 10,
                                         "transmission": 0.8}]})


BARE = """\
spec_version: 1
laser:
  wavelength: 800 nm
  repetition_rate: 80 MHz
  average_power: 2
  pulse_energy: {min: 20, max: 30 nJ}
operating_points:
  - {name: low, pulse_duration: 30}
path:
  - {name: m, kind: material, material: fused_silica, thickness: 5, measured: {average_power: 3}}
  - {name: g, kind: grating_compressor, groove_density: 1200, incidence_angle: 28, separation: 5 mm,
     damage_threshold: {fluence: 1}}
target:
  peak_intensity: 5
"""


def test_a_bare_number_on_a_dimensional_key_is_the_missing_unit_finding_not_a_schema_error(checker):
    result = checker.check_text(BARE, "bare.yaml")
    found = [(f.rule, f.line) for f in result.findings if f.severity == "error"]
    # one finding per bare number, the value grammar's where it reads the value, the schema's where the
    # path stopped before it (the measured power after the glass, the grating's rating, the target)
    assert found == [("missing-unit", 5), ("missing-unit", 6), ("missing-unit", 8), ("missing-unit", 10),
                     ("missing-unit", 10), ("missing-unit", 11), ("missing-unit", 11), ("missing-unit", 12),
                     ("missing-unit", 14)]
    words = {f.message for f in result.findings}
    assert "laser.average_power: '2' has no unit; expected a power such as '2 W'" in words
    assert "laser.pulse_energy.min: '20' has no unit; expected an energy such as '25 nJ'" in words
    assert "path.0.measured.average_power: '3' has no unit; expected a power such as '2 W'" in words
    assert "g.incidence_angle: '28' has no unit; an angle needs deg or rad ('28 deg' or '0.49 rad')" in words
    assert "path.1.damage_threshold.fluence: '1' has no unit; expected a fluence such as '1 J/cm^2'" in words
    assert "target.peak_intensity: '5' has no unit; expected an intensity such as '1e14 W/cm^2'" in words


def test_the_schema_alone_names_a_bare_number_in_the_value_grammars_words():
    from speccheck.reading.schema import validate

    assert validate({"spec_version": 1, "laser": {"pulse_energy": 25, "m2": 1.1}}) == [
        ("missing-unit", ("laser", "pulse_energy"),
         "laser.pulse_energy: '25' has no unit; expected an energy such as '25 nJ'", False)]


def test_an_empty_file_says_it_holds_no_spec(checker):
    for text in ("", "# only a comment\n"):
        [f] = checker.check_text(text, "empty.yaml").findings
        assert f.rule == "schema-violation" and "holds no spec" in f.message and "None" not in f.message
