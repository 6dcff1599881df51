"""Packaging as people expect: a licence, the typing marker installed with the package, one version."""

from importlib import metadata, resources
from pathlib import Path

import speccheck

ROOT = Path(__file__).resolve().parent.parent


def test_the_installed_package_carries_its_typing_marker_and_schema():
    assert (resources.files("speccheck") / "py.typed").is_file()
    assert (resources.files("speccheck.schemas") / "spec-v1.schema.json").is_file()


def test_the_version_is_written_once_and_installed_as_such():
    assert metadata.version("speccheck") == speccheck.__version__
    written = [p for p in ROOT.joinpath("speccheck").rglob("*.py") if speccheck.__version__ in p.read_text("utf-8")]
    assert [p.name for p in written] == ["_version.py"]


def test_the_licence_and_the_source_distribution_list():
    assert "MIT License" in (ROOT / "LICENSE").read_text("utf-8")
    manifest = (ROOT / "MANIFEST.in").read_text("utf-8")
    for folder in ("tests", "example_specs", "benchmarks", "schemas"):
        assert f"graft {folder}" in manifest


def test_the_public_api_is_typed_strictly():
    # the API promises its types (py.typed): mypy --strict on the modules users import from
    import subprocess
    import sys

    import pytest

    pytest.importorskip("mypy", reason="mypy is in the test extra")
    done = subprocess.run([sys.executable, "-m", "mypy", "--strict", "--follow-imports=silent", "--no-incremental",
                           "speccheck/api.py", "speccheck/__init__.py"], capture_output=True, text=True, cwd=ROOT)
    assert done.returncode == 0, done.stdout + done.stderr


def test_the_test_extra_asks_for_the_numpy_the_tests_use():
    # np.trapezoid (the tests' independent quadratures) exists from numpy 2.0 on
    import re
    import tomllib

    extra = tomllib.loads((ROOT / "pyproject.toml").read_text("utf-8"))["project"]["optional-dependencies"]["test"]
    uses = [p.name for p in (ROOT / "tests").glob("*.py") if "np.trapezoid" in p.read_text("utf-8")]
    floor = next((tuple(map(int, m.groups())) for r in extra if (m := re.fullmatch(r"numpy>=(\d+)\.(\d+)", r))), None)
    assert not uses or (floor is not None and floor >= (2, 0)), uses
