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


def human(*argv) -> tuple[int, str]:
    out = io.StringIO()
    code = run(["check", "--no-config", *argv], stdout=out, stderr=io.StringIO())
    return code, out.getvalue()


def write_specs(tmp_path, **texts) -> list[str]:
    paths = []
    for name, text in texts.items():
        (tmp_path / f"{name}.yaml").write_text("spec_version: 1\n" + text)
        paths.append(str(tmp_path / f"{name}.yaml"))
    return paths


def test_human_output_says_the_caution_once_at_the_top_naming_every_file_it_applies_to(tmp_path):
    paths = write_specs(tmp_path, a="laser:\n  pulse_duration: 100 fs\n", b="laser:\n  average_power: 0.1 mW\n",
                        c="laser:\n  repetition_rate: 80 MHz\n")
    code, out = human(*paths)
    first = out.splitlines()[0]
    assert first.startswith("caution [laser-safety] laser safety: this beam can injure eyes")
    assert first.endswith(f"Applies to: {paths[0]}, {paths[2]}.")  # not the 0.1 mW beam
    assert out.count("IEC 60825-1") == 1 and out.count("laser-safety") == 1
    assert out.rstrip().splitlines()[-1] == "0 errors, 0 warnings, 0 notes, 1 caution in 3 files"
    assert code == 0


def test_without_a_hazardous_beam_there_is_no_caution_in_the_summary(tmp_path):
    (path,) = write_specs(tmp_path, weak="laser:\n  average_power: 0.1 mW\n")
    out = human(path)[1]
    assert "caution" not in out and out.rstrip().endswith("0 errors, 0 warnings, 0 notes in 1 file")


def test_the_caution_never_fails_a_run_even_when_notes_do(tmp_path):
    (only,) = write_specs(tmp_path, only="laser:\n  pulse_duration: 100 fs\n")
    from speccheck.formats import FORMATS

    for fmt in FORMATS:
        out = io.StringIO()
        assert run(["check", "--no-config", "--fail-on", "note", "--format", fmt, only], out, io.StringIO()) == 0, fmt
        assert "laser" in out.getvalue()  # still shown
    (noted,) = write_specs(tmp_path, noted="laser:\n  wavelength: 800 nm\n  pulse_duration: 100 fs\n"
                                           "  spectral_bandwidth: 30 nm\n")
    assert human("--fail-on", "note", noted)[0] == 1  # a note of another rule does fail it
    assert human(noted)[0] == 0


def test_a_files_own_figure_from_its_mpe_stays_beside_it_and_the_caution_is_said_once(tmp_path):
    paths = write_specs(tmp_path, plain="laser:\n  pulse_duration: 100 fs\n",
                        mpe="laser:\n  pulse_energy: 1 mJ\n  beam_diameter: 2 mm\n  pulse_duration: 100 fs\n"
                            "safety:\n  mpe: 1e-7 J/cm^2\n")
    out = human(*paths)[1]
    (own,) = [line for line in out.splitlines() if "log10(H/MPE)" in line]
    assert own.startswith(f"{paths[1]}:2:1: caution [laser-safety] With the MPE you gave (1e-7 J/cm^2)")
    assert "not an eyewear specification" in own and out.count("IEC 60825-1") == 1


def test_json_keeps_the_caution_with_each_file(tmp_path):
    import json

    paths = write_specs(tmp_path, a="laser:\n  pulse_duration: 100 fs\n", b="laser:\n  pulse_energy: 1 nJ\n")
    out = io.StringIO()
    run(["check", "--no-config", "--format", "json", *paths], out, io.StringIO())
    doc = json.loads(out.getvalue())
    assert [[f["rule"] for f in file["findings"]] for file in doc["files"]] == [["laser-safety"]] * 2
    assert doc["counts"]["note"] == 2


def test_every_summary_counts_the_caution_once_and_apart_from_the_notes(tmp_path):
    import speccheck

    spec = Path(__file__).resolve().parent.parent / "example_specs" / "maker-sheet-operating-points.yaml"
    texts = {}
    for fmt in ("human", "review", "html"):
        out = io.StringIO()
        run(["check", "--no-config", "--format", fmt, str(spec)], out, io.StringIO())
        texts[fmt] = out.getvalue()
    texts["notebook"] = speccheck.check_text(spec.read_text(encoding="utf-8"))._repr_html_()
    for fmt, text in texts.items():
        assert "2 notes, 1 caution" in text and "3 notes" not in text, fmt
    assert "Caution: line" in texts["review"] and "Note: line 8: laser safety" not in texts["review"]
