"""The laser-safety caution: shown for hazardous beams, with the standards and a disclaimer."""

import io
from pathlib import Path

from speccheck.cli import run

EXAMPLES = Path(__file__).resolve().parent.parent / "example_specs"


def test_every_pulsed_spec_carries_the_caution(check):
    result = check("laser:\n  pulse_duration: 100 fs\n", safety=True)
    (finding,) = [f for f in result.findings if f.rule == "laser-safety"]
    assert finding.severity == "note"
    for words in ("IEC 60825-1", "ANSI Z136.1", "laser safety officer", "eyewear",
                  "does not classify lasers or compute exposure limits"):
        assert words in finding.message


def test_a_continuous_beam_of_a_few_mw_carries_it_and_a_weak_one_does_not(check):
    assert [f.rule for f in check("laser:\n  average_power: 5 mW\n", safety=True).findings] == ["laser-safety"]
    assert check("laser:\n  average_power: 0.1 mW\n", safety=True).findings == ()


def test_an_mpe_from_the_safety_officer_gives_an_indicative_optical_density(check):
    # Peak fluence 2E/(πw²) = 2 × 1 mJ/(π (0.1 cm)²) = 63.7 mJ/cm²; log10(63.7e-3 / 1e-7) = 5.8.
    result = check("laser:\n  pulse_energy: 1 mJ\n  beam_diameter: 2 mm\n  pulse_duration: 100 fs\n"
                   "safety:\n  mpe: 1e-7 J/cm^2\n", safety=True)
    (finding,) = [f for f in result.findings if f.rule == "laser-safety"]
    assert "log10(H/MPE) = 5.8" in finding.message and "not an eyewear specification" in finding.message


def test_the_caution_shows_in_human_output():
    out = io.StringIO()
    run(["check", "--no-sheet", str(EXAMPLES / "oscillator-consistent.yaml")], stdout=out, stderr=io.StringIO())
    assert "laser-safety" in out.getvalue() and "IEC 60825-1" in " ".join(out.getvalue().split())


def test_the_caution_cannot_be_disabled_lowered_or_suppressed(tmp_path, monkeypatch):
    spec = tmp_path / "s.yaml"
    spec.write_text("spec_version: 1\nlaser:  # speccheck: allow laser-safety -- we know\n  pulse_duration: 100 fs\n")
    out = io.StringIO()
    run(["check", "--no-config", "--format", "json", str(spec)], stdout=out, stderr=io.StringIO())
    rules = [f["rule"] for f in __import__("json").loads(out.getvalue())["files"][0]["findings"]]
    assert "laser-safety" in rules and "invalid-suppression" in rules
    monkeypatch.chdir(tmp_path)
    for config in ('[tool.speccheck]\ndisable = ["laser-safety"]\n',
                   '[tool.speccheck.severity]\nlaser-safety = "error"\n'):
        (tmp_path / "pyproject.toml").write_text(config)
        err = io.StringIO()
        assert run(["check", str(spec)], stdout=io.StringIO(), stderr=err) == 2
        assert "laser-safety" in err.getvalue()
