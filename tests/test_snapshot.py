"""The JSON of every shipped example as stored in tests/snapshots/ (byte for byte, or floats to 1e-7).

The snapshot guards a change that must not change behaviour (a reorganisation of
the code).  A change that alters the output on purpose regenerates it:

    for f in example_specs/*.yaml; do
      python -m speccheck check --no-config --format json "$f" > "tests/snapshots/$(basename "$f" .yaml).json"
    done
"""

import io
import json
from pathlib import Path

import pytest

from speccheck.cli import run

ROOT = Path(__file__).resolve().parent.parent
SNAPSHOTS = ROOT / "tests" / "snapshots"
EXAMPLES = sorted((ROOT / "example_specs").glob("*.yaml"))


def test_every_example_has_a_snapshot():
    assert sorted(p.stem for p in EXAMPLES) == sorted(p.stem for p in SNAPSHOTS.glob("*.json"))


@pytest.mark.parametrize("spec", EXAMPLES, ids=lambda p: p.stem)
def test_json_of_the_example_is_unchanged(spec, monkeypatch):
    monkeypatch.chdir(ROOT)  # the document names the file as given, relative to the root
    out = io.StringIO()
    run(["check", "--no-config", "--format", "json", f"example_specs/{spec.name}"], out, io.StringIO())
    stored = (SNAPSHOTS / f"{spec.stem}.json").read_text(encoding="utf-8")
    if out.getvalue() != stored:  # byte for byte, but for the last digits a machine's libm may round otherwise
        assert same(json.loads(out.getvalue()), json.loads(stored)), "the example's JSON changed"


def same(a, b, rel: float = 1e-7) -> bool:
    """Equal documents, floats within ``rel`` (the last digits of a transcendental function's result are
    not the same on every CPU and math library, and a search to a tolerance of 1e-7 may end elsewhere within
    it); every other value, key and order exactly."""
    if isinstance(a, float) and isinstance(b, (int, float)) or isinstance(b, float) and isinstance(a, (int, float)):
        return a == b or abs(a - b) <= rel * max(abs(a), abs(b))
    if isinstance(a, dict) and isinstance(b, dict):
        return list(a) == list(b) and all(same(a[k], b[k], rel) for k in a)
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(same(x, y, rel) for x, y in zip(a, b))
    return type(a) is type(b) and a == b


def test_the_comparison_tells_a_changed_document_from_a_rounding():
    assert same({"x": [1.0, "a"]}, {"x": [1.0 + 1e-15, "a"]})
    assert not same({"x": [1.0, "a"]}, {"x": [1.0 + 1e-6, "a"]})
    assert not same({"x": 1.0, "y": 2}, {"y": 2, "x": 1.0})  # the order of keys is part of the document
    assert not same({"x": "a"}, {"x": "b"}) and not same([1], [1, 2])
