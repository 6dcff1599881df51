"""Validation against the published JSON Schema, errors mapped to YAML lines.

The schema file lives in ``schemas/`` at the top of the repository and is
installed as the package ``speccheck.schemas``.  The validator is compiled
once per process.  Errors are ranked like ``jsonschema.exceptions.best_match``
(most specific first), unknown keys get a "did you mean" suggestion, and every
error is located through the document's path-to-line map.
"""

from __future__ import annotations

import difflib
import json
from functools import lru_cache
from importlib import resources
from pathlib import Path

SCHEMA_FILE = "spec-v1.schema.json"
MAX_UNKNOWN_KEYS = 50  # "did you mean" for each of at most this many unknown keys in one mapping


def schema_text() -> str:
    try:
        return resources.files("speccheck.schemas").joinpath(SCHEMA_FILE).read_text("utf-8")
    except ModuleNotFoundError:  # running from a source tree that is not installed
        return (Path(__file__).resolve().parents[2] / "schemas" / SCHEMA_FILE).read_text("utf-8")


@lru_cache(maxsize=1)
def schema() -> dict:
    return json.loads(schema_text())


@lru_cache(maxsize=1)
def _fast():
    from speccheck.reading.fastschema import compile_schema

    return compile_schema(schema())


@lru_cache(maxsize=1)
def _validator():
    from jsonschema import Draft202012Validator

    return Draft202012Validator(schema())


def _resolve(node: dict) -> dict:
    """Merge a node with the definitions it refers to (properties and items)."""
    merged = dict(node)
    props = dict(node.get("properties", {}))
    while "$ref" in merged:
        target = schema()["$defs"][merged.pop("$ref").rsplit("/", 1)[1]]
        props.update(target.get("properties", {}))
        merged = {**target, **merged}
    merged["properties"] = props
    return merged


def _subschema(path) -> dict:
    """The schema that applies at a document path (refs followed, list items entered)."""
    node = _resolve(schema())
    for key in path:
        if isinstance(key, int):
            node = _resolve(node.get("items", {}))
        else:
            node = _resolve(node["properties"].get(key, {}))
    return node


def validate(data) -> list[tuple[str, tuple, str, bool]]:
    """Schema problems as (rule, path, message, at_key), in document order."""
    if _fast()(data):
        return []  # the common case, without importing jsonschema
    from jsonschema.exceptions import relevance

    problems = []
    for error in sorted(_validator().iter_errors(data), key=relevance):
        path = tuple(error.absolute_path)
        if error.validator in ("additionalProperties", "unevaluatedProperties") and isinstance(error.instance, dict):
            known = sorted(_subschema(path).get("properties", {}))
            unknown = sorted(set(error.instance) - set(known), key=str)
            if len(unknown) > MAX_UNKNOWN_KEYS:
                where = ".".join(map(str, path)) or "the top level"
                problems.append(("unknown-key", path, f"{len(unknown)} unknown keys in {where} (the first "
                                 f"{MAX_UNKNOWN_KEYS} are reported one by one)", False))
                unknown = unknown[:MAX_UNKNOWN_KEYS]
            for key in unknown:
                where = ".".join(map(str, path)) or "the top level"
                guess = difflib.get_close_matches(str(key), known, n=1, cutoff=0.6)
                hint = f"; did you mean {guess[0]!r}?" if guess else f"; known keys: {', '.join(known)}"
                problems.append(("unknown-key", path + (key,), f"unknown key {key!r} in {where}{hint}", True))
            continue
        unit = _missing_unit(error.instance, path)
        if unit is not None:
            problems.append(("missing-unit", unit[0], unit[1], False))
            continue
        problems.append(("schema-violation", path, _message(error, path), False))
    return problems


def _number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def _missing_unit(value, path) -> tuple[tuple, str] | None:
    """(path, message) for a number written without its unit where the schema wants a value with
    one, in the value grammar's words; None for any other problem."""
    from speccheck.reading.dimensions import PARTS, dimensions
    from speccheck.reading.values import ValueProblem, missing_unit

    where = path
    if isinstance(value, dict) and value and set(value) <= set(PARTS) \
            and all(isinstance(v, str) or _number(v) for v in value.values()):
        numbers = [k for k in PARTS if k in value and _number(value[k])]
        if not numbers:
            return None
        where, value = path + (numbers[0],), value[numbers[0]]
    dims = dimensions(where) if _number(value) else ()
    if not dims:
        return None
    label = ".".join(map(str, where))
    if dims == ("angle",):
        from speccheck.reading.angles import parse_angle

        try:
            parse_angle(label, value, 0.0)
        except ValueProblem as e:
            return path, str(e)
    return path, missing_unit(label, str(value), dims)


def _message(error, path) -> str:
    where = ".".join(map(str, path)) or "the document"
    if error.validator == "anyOf" and error.schema in (schema()["$defs"]["quantity"], schema()["$defs"]["with_unit"]):
        return (f"{where}: expected a value like '25 nJ', '25 nJ ± 1 nJ', '>= 20 W' or "
                f"{{min: …, typical: …, max: …}}, got {_short(error.instance)}")
    if error.validator == "const":
        return f"{where}: must be {error.validator_value!r}, got {_short(error.instance)}"
    if error.validator == "enum":
        return f"{where}: {_short(error.instance)} is not one of {', '.join(map(str, error.validator_value))}"
    if error.validator == "required":
        return f"{where}: {error.message}"
    if error.validator == "type" and not error.absolute_path and error.instance is None:
        return "the file holds no spec (it is empty or only comments): expected a mapping with spec_version and laser"
    if error.validator == "type":
        return f"{where}: expected {error.validator_value}, got {_short(error.instance)}"
    return f"{where}: {error.message}"


def _short(value) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."
