"""Which number is wrong, and why: one wrong value hidden among consistent ones.

The consistent base spec is computed in this test by hand from the published
formulas (E = P/f; P_pk = a E/τ with a = ln(1+√2) = 0.8814 for sech²;
τ_ac = 1.543 τ for sech²; I = 2P/(πw²) and F = 2E/(πw²) for a Gaussian beam;
ν = c/λ; E_ph = hc/λ), so each quantity is checked by at least two others.
"""

import math

import pytest

C = 299792458.0  # exact by definition of the metre (SI)
H = 6.62607015e-34  # exact by definition of the kilogram (SI 2019)
EV = 1.602176634e-19  # exact (SI 2019)

LAMBDA, RATE, POWER, TAU = 800e-9, 80e6, 1.2, 25e-15
ENERGY = POWER / RATE  # 15 nJ
PEAK = math.log(1 + math.sqrt(2)) * ENERGY / TAU  # sech² peak power factor
AC = 1.5427 * TAU  # sech² autocorrelation factor (published pulse-shape tables)
W = 1e-3  # 1/e² radius, m
INTENSITY = 2 * PEAK / (math.pi * W**2)  # W/m²
FLUENCE = 2 * ENERGY / (math.pi * W**2)
AVG_INTENSITY = 2 * POWER / (math.pi * W**2)

BASE = {
    "wavelength": f"{LAMBDA * 1e9:.6g} nm",
    "photon_energy": f"{H * C / LAMBDA / EV:.6g} eV",
    "carrier_frequency": f"{C / LAMBDA / 1e12:.6g} THz",
    "repetition_rate": f"{RATE / 1e6:.6g} MHz",
    "repetition_period": f"{1e9 / RATE:.6g} ns",
    "average_power": f"{POWER:.6g} W",
    "pulse_energy": f"{ENERGY * 1e9:.6g} nJ",
    "pulse_duration": f"{TAU * 1e15:.6g} fs",
    "autocorrelation_width": f"{AC * 1e15:.6g} fs",
    "peak_power": f"{PEAK / 1e3:.6g} kW",
    "beam_diameter": f"{2 * W * 1e3:.6g} mm",
    "beam_radius": f"{W * 1e3:.6g} mm",
    "peak_intensity": f"{INTENSITY * 1e-4:.6g} W/cm^2",
    "peak_fluence": f"{FLUENCE * 1e-4:.6g} J/cm^2",
    "average_intensity": f"{AVG_INTENSITY * 1e-4:.6g} W/cm^2",
}


def spec(**changes) -> str:
    values = dict(BASE, **changes)
    lines = ["defaults:", "  tolerance: 2%", "laser:", "  pulse_shape: sech2", "  beam_profile: gaussian"]
    lines += [f"  {k}: {v}" for k, v in values.items()]
    return "\n".join(lines) + "\n"


def test_the_base_spec_is_consistent(check):
    result = check(spec())
    assert [f for f in result.findings if f.severity == "error"] == []


CASES = [
    # (quantity, wrong value, expected cause id)
    ("pulse_energy", f"{ENERGY * 1e9:.6g} µJ", "prefix-up-3"),
    ("repetition_rate", f"{RATE / 1e6:.6g} kHz", "prefix-down-3"),
    ("average_power", f"{POWER:.6g} mW", "prefix-down-3"),
    ("pulse_duration", f"{TAU * 1e15:.6g} ps", "prefix-up-3"),
    ("beam_diameter", f"{W * 1e3:.6g} mm", "radius-as-diameter"),
    ("beam_radius", f"{2 * W * 1e3:.6g} mm", "diameter-as-radius"),
    ("beam_diameter", f"{2 * W * 1e3 * math.sqrt(math.log(2) / 2):.6g} mm", "fwhm-as-1/e2-diameter"),
    ("peak_intensity", f"{4 * INTENSITY * 1e-4:.6g} W/cm^2", "radius-diameter-intensity-high"),
    ("peak_intensity", f"{INTENSITY * 1e-4 / 4:.6g} W/cm^2", "radius-diameter-intensity-low"),
    ("peak_intensity", f"{INTENSITY * 1e-4 * 2 / math.log(2):.6g} W/cm^2", "fwhm-size-in-intensity"),
    ("pulse_duration", f"{AC * 1e15:.6g} fs", "autocorrelation-as-duration"),
    ("autocorrelation_width", f"{TAU * 1e15:.6g} fs", "duration-as-autocorrelation"),
    ("peak_power", f"{ENERGY / TAU / 1e3:.6g} kW", "shape-factor-left-out"),
    ("peak_intensity", f"{INTENSITY * 1e-4:.6g} W/m^2", "per-cm2-as-per-m2"),
    ("peak_fluence", f"{FLUENCE:.6g} J/cm^2", "per-m2-as-per-cm2"),
    ("repetition_rate", f"{2 * math.pi * RATE / 1e6:.6g} MHz", "angular-as-ordinary"),
    ("peak_intensity", f"{INTENSITY * 1e-4 / 2:.6g} W/cm^2", "flat-top-intensity"),
    ("peak_fluence", f"{2 * FLUENCE * 1e-4:.6g} J/cm^2", "gaussian-intensity-for-flat-top"),
]


@pytest.mark.parametrize("quantity, wrong, cause", CASES, ids=[f"{q}-{c}" for q, _, c in CASES])
def test_a_hidden_mistake_is_found_and_named(check, quantity, wrong, cause):
    result = check(spec(**{quantity: wrong}))
    conflicts = [f for f in result.findings if f.rule == "relation-conflict"]
    assert len(conflicts) == 1, [f.message for f in result.findings]
    (finding,) = conflicts
    assert finding.suspect == f"laser.{quantity}"
    assert finding.cause == cause, finding.message
    assert "Likely cause" in finding.message and "implies" in finding.message


def test_the_catalogue_covers_every_mistake_the_tests_inject():
    from speccheck.physics.mistakes import MISTAKES

    tested = {c for _, _, c in CASES}
    untested = {m.id for m in MISTAKES} - tested
    # the remaining rows are mirror images of tested ones (same code path, other factor)
    assert untested <= {"prefix-up-6", "prefix-up-9", "prefix-down-6", "prefix-down-9",
                        "1/e2-as-fwhm-diameter", "autocorrelation-in-peak", "ordinary-as-angular"}


def test_an_ambiguous_conflict_lists_candidates_with_their_implied_values(check):
    result = check("laser:\n  average_power: 2 W\n  repetition_rate: 80 MHz\n  pulse_energy: 2.5 nJ\n")
    (finding,) = result.findings
    assert finding.suspect is None and len(finding.candidates) == 3
    # By hand: E = P/f = 25 nJ; f = P/E = 800 MHz; P = E·f = 0.2 W.
    assert "implies 25 nJ" in finding.message
    assert "implies 800 MHz" in finding.message
    assert "implies 200 mW" in finding.message or "implies 0.2 W" in finding.message
    # A factor of 10 is no SI-prefix step (those are 10^3): no cause is claimed.
    assert "prefix" not in finding.message and finding.cause is None


@pytest.mark.parametrize("duration, named", [("141.4 fs", True), ("130 fs", False)])
def test_a_cause_is_named_only_when_the_ratio_matches_its_factor_within_the_tolerances(check, duration, named):
    # E = 10 µJ and P_pk = 94 MW for a Gaussian pulse give τ = 0.9394 E / P_pk = 99.9 fs (relation
    # table, by hand); the autocorrelation width of a Gaussian is √2 τ (published pulse-shape tables).
    # With every value known to 1 %, a ratio of 1.30 is not the factor 1.414 (8 % away), 1.414 is.
    result = check(f"""
        defaults: {{tolerance: 1%}}
        laser:
          pulse_shape: gaussian
          pulse_energy: 10 µJ
          peak_power: 94 MW
          pulse_duration: {duration}
        """)
    (finding,) = [f for f in result.findings if f.rule == "relation-conflict"]
    assert (finding.cause == "autocorrelation-as-duration") is named, finding.message


def test_the_one_candidate_a_catalogued_mistake_explains_is_the_likely_suspect(tmp_path):
    import io
    import json

    from speccheck.cli import run

    spec = tmp_path / "s.yaml"
    spec.write_text("spec_version: 1\ndefaults: {tolerance: 1%}\nlaser:\n  pulse_shape: gaussian\n"
                    "  pulse_energy: 10 µJ\n  peak_power: 94 MW\n  pulse_duration: 141.4 fs\n", encoding="utf-8")
    out = io.StringIO()
    run(["check", "--no-config", "--format", "json", str(spec)], out, io.StringIO())
    (f,) = [f for f in json.loads(out.getvalue())["files"][0]["findings"] if f["rule"] == "relation-conflict"]
    assert f["likely"] is True and f["suspect"] == "laser.pulse_duration" and f["line"] == 7
    assert set(f["candidates"]) == {"laser.pulse_energy", "laser.peak_power", "laser.pulse_duration"}
    assert "likely" in f["message"]


def test_a_limit_carried_along_the_path_is_reported_once_where_it_arose(check):
    result = check("""
        laser: {wavelength: 800 nm, pulse_duration: 10 fs, spectral_bandwidth: 10 nm, pulse_energy: 1 mJ}
        path:
          - {name: m, kind: optic, transmission: 90%}
          - {name: g, kind: dispersion, gdd: 100 fs^2}
        """)
    assert [(f.rule, f.line) for f in result.findings if f.rule == "below-transform-limit"] == [
        ("below-transform-limit", 2)]
