"""The JSON of every shipped example, byte for byte, as stored in tests/snapshots/.

The snapshot guards a change that must not change behaviour (a reorganisation of
the code).  A change that alters the output on purpose regenerates it:

    for f in example_specs/*.yaml; do
      python -m speccheck check --no-config --format json "$f" > "tests/snapshots/$(basename "$f" .yaml).json"
    done
"""

import io
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
    assert out.getvalue() == (SNAPSHOTS / f"{spec.stem}.json").read_text(encoding="utf-8")
