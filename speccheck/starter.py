"""Starter specs for ``speccheck new``: a commented, consistent spec of each kind.

Every scenario is invented; each starter passes ``speccheck check`` without an
error or a warning (``tests/test_cli_repo.py`` checks that), so editing one
and re-checking shows exactly what the edit changed.
"""

from __future__ import annotations

KINDS = ("oscillator", "amplifier", "fibre", "proposal")

_HEADER = """\
# A speccheck spec: the numbers of one setup, each with its unit.
# `speccheck check {name}` fills in every number that follows from these and
# reports any that contradict each other; `speccheck explain <rule-id>` says why.
# Values: "25 nJ", "25 nJ ± 1 nJ", "25 nJ +/- 4%", ">= 20 W", "<= 300 fs",
# or {{min: 20 W, typical: 22 W, max: 25 W}}.  Any unit pint knows works.
# To accept a finding on purpose, end its line with a comment
# 'speccheck: allow <rule-id> -- <reason>' (after a '#').
"""

_BODIES = {
    "oscillator": """\
spec_version: 1
title: Mode-locked oscillator for a multiphoton microscope (example)
defaults:
  tolerance: 5%                     # relative tolerance of every plain value below
laser:
  wavelength: 920 nm                # centre wavelength
  repetition_rate: 76 MHz
  average_power: 1.5 W
  pulse_energy: 19.7 nJ             # = average_power / repetition_rate
  pulse_duration: 120 fs            # intensity FWHM (not the autocorrelation width)
  pulse_shape: sech2                # gaussian | sech2 | lorentzian | flat_top
  spectral_bandwidth: 9 nm          # FWHM; nm, THz or cm^-1
  peak_power: 145 kW                # 0.88 × pulse_energy / pulse_duration for sech²
  beam_diameter: 1.5 mm             # 1/e² intensity diameter
  beam_profile: gaussian            # gaussian | flat_top
  m2: 1.1                           # beam quality, at least 1
""",
    "amplifier": """\
spec_version: 1
title: 100 kHz ytterbium amplifier for a pump-probe bench (example)
defaults:
  tolerance: 5%
laser:
  wavelength: 1030 nm
  repetition_rate: 100 kHz
  average_power: 10 W ± 0.5 W       # its own tolerance
  pulse_energy: 100 µJ              # = 10 W / 100 kHz
  pulse_duration: <= 350 fs         # a bound, as on a maker's sheet
  pulse_shape: sech2
  spectral_bandwidth: 4.5 nm        # FWHM
  beam_diameter: 4 mm               # 1/e² diameter at the output
  beam_profile: gaussian
  m2: "<= 1.3"
""",
    "fibre": """\
spec_version: 1
title: Erbium fibre oscillator seeding a frequency comb (example)
defaults:
  tolerance: 5%
laser:
  wavelength: 1560 nm
  repetition_rate: 50 MHz
  average_power: 150 mW
  pulse_energy: 3 nJ                # = 150 mW / 50 MHz
  pulse_duration: 200 fs            # intensity FWHM
  pulse_shape: sech2
  spectral_bandwidth: 15 nm         # FWHM; time-bandwidth product 0.37 (limit 0.315)
  beam_diameter: 0.5 mm             # 1/e² diameter after the collimator
  beam_profile: gaussian
  m2: 1.05
""",
    "proposal": """\
spec_version: 1
title: Beam-time proposal, strong-field photoemission from nanotips (example)
defaults:
  tolerance: 5%
laser:
  wavelength: 800 nm
  repetition_rate: 1 kHz
  average_power: 3 W
  pulse_energy: 3 mJ                # = 3 W / 1 kHz
  pulse_duration: 35 fs             # intensity FWHM at the sample
  pulse_shape: gaussian
  spectral_bandwidth: 30 nm         # FWHM
  beam_diameter: 30 µm              # 1/e² diameter at the focus
  beam_profile: gaussian
  peak_intensity: ">= 1e16 W/cm^2"  # what the experiment needs: the numbers above give 2.3e16
""",
}


def starter(kind: str = "oscillator", name: str = "spec.yaml", schema: str | None = None) -> str:
    """The starter spec text of ``kind``; ``schema``: a path or URL for the editor modeline."""
    if kind not in _BODIES:
        raise KeyError(f"unknown kind {kind!r}; choose one of {', '.join(KINDS)}")
    modeline = f"# yaml-language-server: $schema={schema}\n" if schema else ""
    return modeline + _HEADER.format(name=name) + _BODIES[kind]
