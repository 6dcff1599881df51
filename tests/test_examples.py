"""The shipped example specs give exactly the findings they are written to show."""

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent / "example_specs"

EXPECTED = {
    "oscillator-consistent.yaml": [],
    "amplifier-khz-consistent.yaml": [],
    "maker-sheet-one-wrong.yaml": [("relation-conflict", 11, "laser.pulse_energy")],
    "proposal-intensity-claim.yaml": [("relation-conflict", 19, "laser.peak_intensity")],
    # the 50 MW target is judged at each point: not met at 2 MHz, not judged at 100 kHz (its values clash)
    "maker-sheet-operating-points.yaml": [("relation-conflict", 19, None),
                                          ("operating-point-beyond-limit", 28, None),
                                          ("target-unknown", 31, None), ("target-not-met", 31, None)],  # by point
    # its spectrum is noisy: the transform limit is known only to 137-183 fs, and an interval that
    # wide (over 20 % of the value) is a warning (physics/spectra.py, method step 6)
    "fibre-oscillator-measured.yaml": [("relation-conflict", 13, "laser.pulse_duration"),
                                       ("measured-data-quality", 14, None)],
    "amplifier-pump-probe-path.yaml": [("target-not-met", 41, None)],
    "proposal-focus-path.yaml": [("target-not-met", 26, None)],
    "rod-self-focusing.yaml": [("self-focusing", 17, None), ("b-integral", 17, None)],
    "mirror-damage.yaml": [("optic-damage", 21, None)],
    "impossible-focus.yaml": [("spot-below-diffraction-limit", 19, None)],
    "hhg-argon.yaml": [],
    # the grating pair cancels the stretcher's GDD, but its TOD and the window's leave 33.9 fs
    "cpa-grating-compressor.yaml": [("target-not-met", 30, None), ("target-not-met", 31, None)],
    # a peak power that allows for a pedestal, consistent once the sheet states its share
    "fibre-laser-pedestal.yaml": [],
    # the beam traced in space: the pick-off's aperture clips; a 1 % focal length moves the waist by more
    # than its Rayleigh range, so the intensity at a fixed plane is uncertain
    "window-before-focus.yaml": [("aperture-clipping", 24, None), ("target-uncertain", 28, None)],
    "typos-and-units.yaml": [("unknown-key", 9, None), ("wrong-dimension", 10, None),
                             ("missing-unit", 11, None), ("duplicate-key", 13, None)],
}


def test_every_example_is_listed_here():
    assert sorted(p.name for p in ROOT.glob("*.yaml")) == sorted(EXPECTED)


@pytest.fixture(scope="module")
def reading_checker(units):
    from speccheck.checking.document import Checker
    from speccheck.files import read_beside

    return Checker(units, read=read_beside)


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_example_findings(reading_checker, name):
    result = reading_checker.check_text((ROOT / name).read_bytes(), str(ROOT / name))
    got = [(f.rule, f.line, f.suspect) for f in result.findings if f.severity != "note"]
    assert got == EXPECTED[name]


def test_the_consistent_examples_derive_their_headline_numbers(checker):
    result = checker.check_text((ROOT / "amplifier-khz-consistent.yaml").read_bytes(), "amp")
    peak = result.sheet["laser"]["peak_power"]
    # By hand: ≥ 0.9394 × 4.8 mJ / 35 fs = 1.29e11 W (the duration is an upper bound).
    assert peak.status == "derived" and peak.low == pytest.approx(0.9394 * 4.8e-3 / 35e-15, rel=1e-3)


def test_the_hhg_example_reports_its_cutoff(reading_checker):
    result = reading_checker.check_text((ROOT / "hhg-argon.yaml").read_bytes(), "hhg-argon.yaml")
    (finding,) = [f for f in result.findings if f.rule == "strong-field-figures"]
    assert "cutoff" in finding.message and "argon" in finding.message


def test_every_example_starts_with_the_schema_modeline_and_it_points_at_the_schema():
    for spec in sorted(ROOT.glob("*.yaml")):
        first = spec.read_text(encoding="utf-8").splitlines()[0]
        prefix = "# yaml-language-server: $schema="
        assert first.startswith(prefix), spec.name
        target = (spec.parent / first[len(prefix):]).resolve()
        assert target == (ROOT.parent / "schemas" / "spec-v1.schema.json").resolve(), spec.name
