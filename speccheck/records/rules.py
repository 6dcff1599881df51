"""The rule catalogue: every finding speccheck can report, one row each.

A rule has a stable kebab-case id, a default severity, a one-line summary and
an explanation (the physics or the reason, the formula, the source or
"common practice"), with a small failing and passing example.  Checks only
name a rule id; the checker looks the severity up here, so an unknown id
fails loudly.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from speccheck.records.findings import SEVERITIES


@dataclass(frozen=True)
class Rule:
    id: str
    severity: str
    summary: str
    explanation: str
    failing: str = ""
    passing: str = ""
    source: str = ""  # where the rule's physics or number comes from ("common practice" for a rule of thumb)

    def __post_init__(self) -> None:
        if self.severity not in SEVERITIES:
            raise ValueError(f"rule {self.id}: unknown severity {self.severity}")
        if self.id != self.id.lower() or " " in self.id:
            raise ValueError(f"rule id {self.id!r} must be kebab-case")


_RULES = (
    # ---- reading the file
    Rule("yaml-syntax", "error", "the file is not valid YAML",
         "The spec must be a YAML document; the message gives the parser's reason and position.",
         "laser: {wavelength: 800 nm", "laser: {wavelength: 800 nm}"),
    Rule("duplicate-key", "error", "a key appears twice in one mapping",
         "YAML parsers usually keep the last of two equal keys without a word, so one of two "
         "numbers is silently lost. speccheck reports both lines and keeps the first.",
         "laser:\n  pulse_energy: 25 nJ\n  pulse_energy: 2.5 nJ", "laser:\n  pulse_energy: 25 nJ"),
    Rule("unsupported-yaml-tag", "error", "a YAML tag that would construct an object",
         "Tags such as !!python/object are refused: speccheck never runs or constructs anything "
         "from its input.", "laser: !!python/object/apply:os.system [ls]", "laser: {}"),
    Rule("input-limit", "error", "the input exceeds a resource limit",
         "Files larger than the size limit, documents that expand (through aliases) to too many "
         "nodes, or nest too deeply are not read further, so no input can exhaust memory or time.",
         "a: &a [*b, *b, ...]  (an alias bomb)", "a small spec"),
    Rule("unreadable-file", "error", "a file could not be read",
         "The file does not exist, is not readable, or is a directory given where a file was expected."),
    Rule("internal-error", "error", "speccheck failed while checking this file",
         "An unexpected error inside speccheck stopped the check of this file, so its other findings "
         "are incomplete. The other files of the run are still checked and reported, and the run exits "
         "with code 2. Please report it with the spec that caused it; the message names the error. It "
         "cannot be disabled, lowered or suppressed, since the file was not fully checked."),
    # ---- the schema
    Rule("schema-violation", "error", "the document does not follow the spec schema",
         "The spec is validated against the published JSON Schema (schemas/, draft 2020-12); "
         "the message names the offending value and what the schema expects.",
         "spec_version: 2", "spec_version: 1"),
    Rule("unknown-key", "error", "a key the spec format does not define",
         "Every key of the spec format is fixed by the schema; an unknown key is usually a typo, "
         "so the message suggests the closest known key.",
         "laser:\n  pulse_enrgy: 25 nJ", "laser:\n  pulse_energy: 25 nJ"),
    # ---- single values
    Rule("invalid-value", "error", "a value that cannot be read as a quantity",
         "A value is '<number> <unit>', optionally with '± <tolerance>' or a bound '>= …' / '<= …', "
         "or a mapping {min, typical, max}.",
         "pulse_energy: about twenty-five", "pulse_energy: 25 nJ ± 1 nJ"),
    Rule("missing-unit", "error", "a dimensional quantity written without a unit",
         "Only dimensionless quantities (m2, duty_cycle, refractive_index, …) may be bare numbers; "
         "a bare 25 for an energy could be J, mJ or nJ.", "pulse_energy: 25", "pulse_energy: 25 nJ"),
    Rule("unknown-unit", "error", "a unit pint does not know",
         "Units are read by pint; the message gives pint's reason.", "pulse_energy: 25 nanojewels",
         "pulse_energy: 25 nJ"),
    Rule("wrong-dimension", "error", "a unit of the wrong dimension for its quantity",
         "Each quantity has one dimension (spectral_bandwidth accepts a length, a frequency or a "
         "wavenumber); the message says what was expected.", "average_power: 2 J", "average_power: 2 W"),
    Rule("non-positive-value", "error", "a zero or negative value",
         "Every quantity of a block is a positive magnitude.", "pulse_duration: -150 fs",
         "pulse_duration: 150 fs"),
    Rule("non-finite-value", "error", "NaN or an infinite value",
         "Values must be finite numbers.", "pulse_energy: .nan", "pulse_energy: 25 nJ"),
    Rule("empty-interval", "error", "min, typical and max that contradict each other",
         "In a mapping {min, typical, max}, min ≤ typical ≤ max must hold.",
         "average_power: {min: 25 W, max: 20 W}", "average_power: {min: 20 W, max: 25 W}"),
    Rule("duplicate-quantity", "error", "one quantity stated twice under different keys",
         "spectral_bandwidth and its twins (…_wavelength, …_wavenumber) state the same quantity; "
         "state it once.", "spectral_bandwidth: 8 nm\nspectral_bandwidth_wavelength: 8 nm",
         "spectral_bandwidth: 8 nm"),
    Rule("duplicate-name", "error", "two operating points (or stages) with the same name",
         "Every column of the sheet needs its own name.", "operating_points:\n  - {name: a}\n  - {name: a}",
         "operating_points:\n  - {name: a}\n  - {name: b}"),
    Rule("operating-point-beyond-limit", "error", "an operating point beyond the sheet's own maximum or minimum",
         "When the laser block of a maker's sheet gives a bound or a min/max range (average_power: <= 20 W), "
         "every operating point must stay inside it.",
         "laser:\n  average_power: <= 20 W\noperating_points:\n  - {name: 1 MHz, average_power: 25 W}",
         "laser:\n  average_power: <= 20 W\noperating_points:\n  - {name: 1 MHz, average_power: 18 W}"),
    Rule("measured-data", "error", "a measured data file that cannot be used",
         "A spectrum or autocorrelation file must exist next to the spec (a relative path inside its "
         "folder) and hold at least 8 rows of two finite numbers (at most 1,000,000), at least 8 of them "
         "at distinct wavelengths or delays (rows may come in any order; repeated ones are averaged), "
         "positive wavelengths, and one clear peak inside the data that stands above its noise and falls "
         "to half its height on both sides (a trace: on one side at least).",
         "spectrum: {file: missing.csv}", "spectrum: {file: spectrum.csv, wavelength_unit: nm}"),
    Rule("measured-data-quality", "warning", "measured data whose widths the numbers do not settle well",
         "A spectrum or autocorrelation file was used, but something in it makes its widths or its "
         "transform limit less certain than they look: no baseline clear of the peak on one or both "
         "sides (a scan window too narrow), a baseline that differs between the sides, a spectrum that "
         "touches the edge of the window, dips below half maximum between peaks, looks saturated or "
         "over-subtracted, a trace that is cut off or not symmetric, noise that stays high after "
         "smoothing, a transform limit whose interval is wide, or repeated wavelengths or delays. The "
         "message says which; the measured values and their intervals are used all the same. A longer "
         "scan, a dark spectrum taken at the same settings, or a lower detector gain usually fixes it.",
         "spectrum: {file: spectrum.csv}   # the window ends on the spectrum's wing",
         "spectrum: {file: spectrum.csv}   # baseline on both sides of the peak"),
    Rule("measured-mismatch", "error", "a stated value that its own measured data contradicts",
         "The FWHM bandwidth of a measured spectrum and the FWHM of a measured autocorrelation are "
         "compared with the stated spectral_bandwidth and autocorrelation_width: the bandwidth with the "
         "tolerance, the autocorrelation width (and the transform-limited duration) with the interval "
         "its data give.",
         "spectral_bandwidth: 8 nm   # spectrum.csv has 12 nm", "spectral_bandwidth: 12 nm"),
    # ---- the beam path
    Rule("outside-dispersion-range", "warning", "a material used outside its dispersion formula's range",
         "Each material's Sellmeier (or gas) formula is published with a wavelength range it was fitted "
         "over (the material table gives it with its source). Where the part of the spectrum that carries "
         "the pulse's energy, the centre ± one FWHM, reaches outside it, the GDD and TOD are extrapolated.",
         "fused_silica at 5 µm", "fused_silica at 800 nm"),
    Rule("above-barrier-suppression", "warning", "an intensity that ionizes the gas before the pulse's peak",
         "Above the barrier-suppression intensity I = c ε0 F²/2 with F = π ε0 I_p²/(Z e³) (≈ 4e9 (I_p/eV)⁴ "
         "W/cm² for Z = 1; S. Augst et al., Phys. Rev. Lett. 63, 2212 (1989)) the field lowers the "
         "Coulomb barrier below the ground state, and the neutral gas is gone before the peak arrives: "
         "the Keldysh parameter and the high-harmonic cutoff at the peak intensity no longer describe it.",
         "argon, peak_intensity 1e15 W/cm^2", "argon, peak_intensity 1e14 W/cm^2"),
    Rule("bandwidth-linearised", "note", "a bandwidth so wide that its wavelength–frequency conversion is linearised",
         "The sheet converts a bandwidth between wavelength and frequency with Δν = c Δλ/λ², the first-order "
         "form. The exact conversion of the half-maximum points λ ∓ Δλ/2 is c Δλ/(λ² − Δλ²/4); the two "
         "differ by (Δλ/λ)²/4, which passes 1% at Δλ/λ = 20%.",
         "wavelength: 800 nm\nspectral_bandwidth: 200 nm", "wavelength: 800 nm\nspectral_bandwidth: 40 nm"),
    Rule("manley-rowe-limit", "error", "a parametric output that takes more energy than its photons can carry",
         "Each pump photon becomes one signal and one idler photon, so the energy that reaches one output "
         "is at most λp/λout of the pump energy (the Manley–Rowe relations; J. M. Manley and H. E. Rowe, "
         "Proc. IRE 44, 904 (1956)). The stage's efficiency is taken as an energy efficiency.",
         "pump 800 nm, signal 1300 nm, efficiency 70%", "pump 800 nm, signal 1300 nm, efficiency 30%"),
    Rule("typical-values-disagree", "warning", "stated values that agree only at the edges of their tolerances",
         "A maker claims its typical numbers together, so they are checked against each other as well as "
         "the intervals: every relation whose values all have a typical number must hold within a margin "
         "(1% by default; defaults: {nominal_margin: …}), every limit must hold for the typical values, and "
         "a value stated only as a bound must hold the typical number the others imply. The intervals may "
         "agree because each tolerance stretches far enough; the typical values say whether the claim does.",
         "repetition_rate: 1 MHz\npulse_energy: 21 µJ\naverage_power: 20 W",
         "repetition_rate: 1 MHz\npulse_energy: 20 µJ\naverage_power: 20 W"),
    Rule("bandwidth-exceeds-carrier", "error", "a spectral bandwidth larger than its carrier frequency",
         "The FWHM bandwidth Δν of an optical pulse is centred on its carrier frequency ν0 = c/λ; a Δν "
         "larger than ν0 would put half the spectrum at negative frequencies. Usually a unit is wrong "
         "(THz for nm, cm^-1 for nm) or a digit slipped (definition of the spectral FWHM).",
         "wavelength: 800 nm\nspectral_bandwidth: 500 THz", "wavelength: 800 nm\nspectral_bandwidth: 5 THz"),
    Rule("fraction-clipped", "warning", "a share of the beam whose interval reaches past 0% or 100%",
         "A transmission, efficiency or splitter ratio is a fraction of the beam: it cannot be more than "
         "100% or less than 0%. An interval that reaches past an end (1.5 ± 0.6) is clipped there, and "
         "this warning says so; one wholly outside is a stage-parameter error.",
         "transmission: 0.95 ± 0.1", "transmission: 0.95 ± 0.04"),
    Rule("out-of-model-range", "error", "a stage that cannot be computed for the beam that enters it",
         "A number before the stage is so far outside what the stage's model is made for (a wavelength "
         "of 1e51 m into a glass, a beam shrunk by 1e-160 before a focus) that its arithmetic overflows "
         "or divides by zero. The stage is reported instead of a wrong number, and the rest of its "
         "branch is not followed.",
         "{kind: telescope, magnification: 1e-160} before a focus", "{kind: telescope, magnification: 0.5}"),
    Rule("stage-parameter", "error", "a stage parameter that is missing, misplaced or out of range",
         "Each stage kind takes its own parameters (`speccheck explain stage-parameter` lists them); "
         "a transmission or efficiency is at most 100%.",
         "- {name: lens, kind: focus}", "- {name: lens, kind: focus, focal_length: 150 mm}"),
    Rule("unknown-material", "error", "a material stage names a glass speccheck has no data for",
         "Materials come from the material table (physics/material_data.py) with published Sellmeier coefficients.",
         "material: quartz_glass", "material: fused_silica"),
    Rule("stage-model", "note", "an approximation a stage's physics makes",
         "Each stage states the model it takes: a harmonic's field is E(t)^n of the pump's (thin crystal, "
         "undepleted pump), a parametric output is as long as its pump and transform limited (a first "
         "estimate, common practice), a grating or prism pair is traced in first order and double pass, an "
         "unstated chirp sign covers both signs, a focus without M² takes M² ≥ 1."),
    Rule("splitter-exceeds-input", "error", "branches of a splitter that take more than the input",
         "The energies of the two branches of a splitter cannot add up to more than the beam entering it.",
         "branches: {pump: {fraction: 70%}, probe: {fraction: 40%}}",
         "branches: {pump: {fraction: 70%}, probe: {fraction: 30%}}"),
    Rule("photon-energy-not-conserved", "error", "signal and idler wavelengths that do not fit the pump",
         "In a parametric process 1/λp = 1/λs + 1/λi (photon-energy conservation).",
         "pump 800 nm, signal 1300 nm, idler 1800 nm", "pump 800 nm, signal 1300 nm, idler 2080 nm"),
    Rule("laser-chirp-mismatch", "error", "a laser's stated GDD that does not give its stated duration",
         "A laser block that states the GDD (and TOD) its pulse carries fixes its duration: the pulse of its "
         "shape at the transform limit of its bandwidth, with that phase, by FFT of the field. A stated "
         "pulse_duration outside that interval contradicts it.",
         "laser: {wavelength: 800 nm, pulse_duration: 100 fs, spectral_bandwidth: 15.7 nm, gdd: 5000 fs^2}",
         "laser: {wavelength: 800 nm, pulse_duration: 100 fs, spectral_bandwidth: 15.7 nm, gdd: 1730 fs^2}"),
    Rule("target-met", "note", "a target requirement that the path meets",
         "Each target line is a requirement at the last stage of its branch; the note gives the margin."),
    Rule("target-not-met", "error", "a target requirement that the path does not meet",
         "The finding gives the value the path reaches, the ratio to the requirement, and the stage that "
         "costs the most (the largest loss of intensity, or the largest broadening).",
         "target: {peak_intensity: '>= 1e16 W/cm^2'}", "target: {peak_intensity: '>= 1e14 W/cm^2'}"),
    Rule("target-uncertain", "warning", "a target requirement met only within part of the tolerances",
         "The path's interval for the quantity straddles the requirement."),
    Rule("target-unknown", "warning", "a target the path does not determine",
         "The numbers needed to compute the quantity at the end of the branch are not stated."),
    Rule("dispersion-compensation", "note", "the GDD and TOD that would give the highest peak power at the end",
         "At the end of a branch whose pulse is longer than its transform limit: the GDD (and the TOD, where it "
         "matters) to add for the highest peak power. They are the negatives of the net GDD and TOD, or, where "
         "fourth and higher orders matter, found by a search on the field's peak power. With an unstated chirp "
         "sign they are for positive chirp."),
    # ---- physical limits and safety
    Rule("self-focusing", "error", "a peak power above the critical power for self-focusing in a solid",
         "P_cr = 3.77 λ² / (8π n0 n2) for a Gaussian beam (Marburger's formula; J. H. Marburger, Prog. "
         "Quantum Electron. 4, 35 (1975)); n2 of each material from the material table, with its published "
         "range. Reported when the peak power is above P_cr and the collapse distance is shorter than the "
         "stage: the beam collapses inside the material and damages it.",
         "peak power 50 MW through 10 mm of fused silica at 800 nm (P_cr ≈ 2-3 MW)",
         "peak power 1 MW through 10 mm of fused silica"),
    Rule("self-focusing-risk", "note", "a peak power above the critical power, in a stage too short to collapse",
         "Above P_cr a collimated beam collapses after Marburger's distance z_f = 0.367 k a² / "
         "√((√(P/P_cr) − 0.852)² − 0.0219), a = w/√2 the 1/e intensity radius; when z_f is longer than "
         "the stage, the beam does not collapse there, and the accumulated B-integral is the figure to watch."),
    Rule("self-focusing-air", "warning", "a peak power above the critical power for self-focusing in air",
         "P_cr of air is a few GW near 800 nm (n2 ≈ 3-4e-23 m²/W): long air paths at higher peak power "
         "filament; a vacuum or helium path avoids it."),
    Rule("b-integral", "warning", "an accumulated B-integral above the limit",
         "B = (2π/λ) Σ n2 ∫ I_peak dz over the material stages is the nonlinear phase the pulse gathers (the "
         "entrance intensity times the plate's length, or times a Kerr length where the beam's size changes "
         "inside it); "
         "amplifier designs keep it below a few radians (common practice; `defaults: {b_integral_limit: 3}`)."),
    Rule("optic-damage", "error", "a peak fluence above an optic's rated damage threshold",
         "A stage's `damage_threshold: {fluence, pulse_duration, wavelength}` is the optic's rated value; "
         "the incident peak fluence is compared with it. For pulses longer than about 10 ps thresholds "
         "scale as √(τ/τ_ref) (common practice); for shorter pulses a rating does not transfer."),
    Rule("optic-damage-margin", "warning", "a peak fluence within the safety factor of an optic's rating",
         "Keep the fluence at least a safety factor below the rated threshold (default 2, common practice; "
         "`defaults: {damage_safety_factor: 2}`)."),
    Rule("damage-rating-not-transferable", "note", "a damage rating for another pulse duration",
         "Below about 10 ps, damage thresholds do not follow the √τ rule (common practice): the rating "
         "says little about this pulse."),
    Rule("spot-below-diffraction-limit", "error", "a focus spot smaller than the diffraction limit",
         "The 1/e² spot diameter of a focused Gaussian beam is at least 4 M² λ f / (π D) (Gaussian-beam "
         "optics); a smaller stated spot is impossible for the stated optics."),
    Rule("non-paraxial-focus", "note", "a focus tighter than the paraxial Gaussian model allows",
         "A 1/e² spot radius below λ/π, or a focusing numerical aperture above about 0.4 (the far-field half "
         "angle M²λ/(π w0) of the waist after a `focus` or `lens` stage; common practice), is outside the "
         "paraxial approximation: the spot size and the intensity there are estimates only.",
         "{name: objective, kind: focus, focal_length: 4 mm}  # on an 8 mm beam: NA ≈ 0.7",
         "{name: lens, kind: focus, focal_length: 100 mm}"),
    Rule("aperture-clipping", "warning", "a clear aperture that clips more than 1 % of the beam",
         "A stage's `clear_aperture` (its diameter) is compared with the 1/e² diameter of the beam on it, "
         "after the stage's `distance`. A Gaussian beam of 1/e² radius w through a circular aperture of "
         "radius a loses exp(−2a²/w²) of its power: more than 1 % when the aperture is below about 1.5× "
         "the beam's 1/e² diameter. The columns from that stage on count the loss; the clipped edge also "
         "diffracts, which they do not model (the beam is carried on as the same Gaussian).",
         "{name: window, kind: material, material: fused_silica, thickness: 3 mm, clear_aperture: 10 mm}"
         "  # on an 8 mm beam",
         "{name: window, kind: material, material: fused_silica, thickness: 3 mm, clear_aperture: 20 mm}"),
    Rule("beam-geometry-impossible", "error", "a laser beam's waist or divergence no Gaussian beam can have",
         "With `beam_diameter` at the laser's output plane and M², a `waist_position` z needs "
         "w² ≥ 2 M²λ|z|/π (no beam is narrower that far from its waist), and a full `beam_divergence` θ "
         "needs θ ≥ 4 M²λ/(π D) (the diffraction limit of the diameter). The beam is then taken at its "
         "waist at the output plane.",
         "laser: {wavelength: 1030 nm, beam_diameter: 0.2 mm, waist_position: 5 m}",
         "laser: {wavelength: 1030 nm, beam_diameter: 2 mm, waist_position: -0.5 m}"),
    Rule("strong-field-figures", "note", "ponderomotive energy, Keldysh parameter and HHG cutoff at the target",
         "U_p = e² E² / (4 m_e ω²) (≈ 9.33e-14 I[W/cm²] λ²[µm²] eV); γ = √(I_p / 2U_p) (Keldysh 1965); "
         "cutoff I_p + 3.17 U_p (three-step model, Corkum 1993); ionization energies from the NIST "
         "Atomic Spectra Database. Given when the target names a gas."),
    Rule("relativistic-intensity", "note", "a normalized vector potential a0 approaching 1",
         "a0 = e E / (m_e ω c) ≈ 0.855 λ[µm] √(I / 10^18 W/cm²); near 1 electrons become relativistic."),
    Rule("laser-safety", "note", "the usual laser-safety cautions",
         "Every spec of a pulsed or more-than-milliwatt beam carries the usual cautions. speccheck does not "
         "classify lasers or compute exposure limits: follow IEC 60825-1 or ANSI Z136.1, local rules and "
         "your laser safety officer."),
    # ---- physics
    Rule("relation-conflict", "error", "stated values that physics says cannot all be true",
         "The stated values are checked against every relation of the relation table (energy = "
         "power / rate, peak power = a·E/τ, intensity = k·P/(πw²), Δν = cΔλ/λ², …) with their "
         "tolerances. When they cannot all hold, speccheck names the value whose removal makes the "
         "rest consistent (the suspect), the value the rest implies for it, and the ratio between "
         "the two. `speccheck relations` lists the table.",
         "average_power: 2 W\nrepetition_rate: 80 MHz\npulse_energy: 25 µJ",
         "average_power: 2 W\nrepetition_rate: 80 MHz\npulse_energy: 25 nJ"),
    Rule("below-transform-limit", "error", "bandwidth and duration whose product is below the transform limit",
         "A pulse of a given shape cannot be shorter than its Fourier transform limit: "
         "Δν·τ ≥ 0.441 (Gaussian), 0.315 (sech²), 0.886 (flat top) for FWHMs "
         "(published pulse-shape tables); a Lorentzian intensity has no such limit and is not checked. "
         "A smaller product is physically impossible; often the autocorrelation width or the bandwidth "
         "in the wrong unit is the cause.",
         "wavelength: 800 nm\nspectral_bandwidth: 2 nm\npulse_duration: 50 fs",
         "wavelength: 800 nm\nspectral_bandwidth: 20 nm\npulse_duration: 50 fs"),
    Rule("strongly-chirped", "note", "a time-bandwidth product far above the transform limit",
         "A product more than twice the transform limit means a strongly chirped pulse (common "
         "practice): it could be compressed to a much shorter duration, or one of the two widths "
         "is not what it says.",
         "spectral_bandwidth: 40 nm\npulse_duration: 500 fs\nwavelength: 800 nm",
         "spectral_bandwidth: 10 nm\npulse_duration: 100 fs\nwavelength: 800 nm"),
    Rule("pulse-longer-than-period", "error", "a pulse longer than the time between pulses",
         "The duty cycle τ·f_rep must be below 1, or the 'pulses' overlap into a continuous beam.",
         "repetition_rate: 80 GHz\npulse_duration: 20 ps", "repetition_rate: 80 MHz\npulse_duration: 20 ps"),
    Rule("sub-cycle-pulse", "warning", "fewer than one optical cycle within the pulse",
         "N = τ / T_0 = τ c / λ below 1 is a sub-cycle pulse: possible only in exotic sources, and "
         "usually a unit slip in the duration or the wavelength.",
         "wavelength: 800 nm\npulse_duration: 1.5 fs", "wavelength: 800 nm\npulse_duration: 15 fs"),
    Rule("nothing-checked", "warning", "a spec that states nothing to check",
         "The laser block states no quantity and there are no operating points or path: every check passes "
         "because there is nothing to check, which is rarely what a file in a folder of specs means (an "
         "emptied or unfinished spec).",
         "laser: {}", "laser:\n  average_power: 1 W"),
    Rule("derived-out-of-range", "warning", "a derived number outside the range speccheck handles",
         "A number that follows from the stated ones lies outside 1e-100 … 1e100 in SI units, the range a "
         "stated value may have (beyond about 1e±308 a double cannot hold it and the sheet leaves it out); "
         "the numbers it comes from are far outside any experiment's, usually by a unit or exponent slip.",
         "repetition_rate: 1e-90 Hz\naverage_power: 1e99 W\npulse_duration: 100 fs",
         "repetition_rate: 1 kHz\naverage_power: 1 W\npulse_duration: 100 fs"),
    Rule("outside-ultrafast-range", "note", "a pulse duration outside 1 fs – 100 ps",
         "speccheck is made for femtosecond to picosecond pulses; the relations still hold outside "
         "that range, but a value there is often a unit slip.",
         "pulse_duration: 150 ns", "pulse_duration: 150 fs"),
    Rule("m2-below-one", "error", "a beam quality factor M² below 1",
         "M² ≥ 1 for every real beam; 1 is the ideal Gaussian (ISO 11146).", "m2: 0.8", "m2: 1.1"),
    Rule("assumed-shape", "note", "a number derived with an assumed pulse shape or beam profile",
         "Peak power, autocorrelation width, transform limit and intensity depend on the pulse shape "
         "and beam profile; when the spec does not state them, Gaussian is assumed.",
         "pulse_energy: 1 mJ\npulse_duration: 30 fs", "pulse_energy: 1 mJ\npulse_duration: 30 fs\n"
         "pulse_shape: gaussian"),
    # ---- inline suppressions (suppress.py)
    Rule("suppression-without-reason", "error", "an inline suppression that gives no reason",
         "A comment '# speccheck: allow <rule-id> -- <reason>' on the line of a value drops that rule's "
         "findings on that line. The reason after ' -- ' is required, so that whoever reads the spec "
         "later knows why the finding was accepted; without one the suppression still applies, but is "
         "reported.",
         "pulse_energy: 20 nJ  # speccheck: allow relation-conflict",
         "pulse_energy: 20 nJ  # speccheck: allow relation-conflict -- as printed on the maker's sheet"),
    Rule("invalid-suppression", "error", "an inline suppression that cannot be understood",
         "After '# speccheck:' comes 'allow', one or more rule ids separated by commas, ' -- ' and the "
         "reason. An unknown rule id (the message suggests the closest one), another word than 'allow', "
         "or a rule that cannot be suppressed (those that say the file was not read, and these "
         "suppression rules) is reported.",
         "m2: 0.9  # speccheck: allow m2-below-on -- measured with a clipped beam",
         "m2: 0.9  # speccheck: allow m2-below-one -- measured with a clipped beam"),
    Rule("unused-suppression", "warning", "an inline suppression that suppresses nothing",
         "A suppression whose rule reports nothing on its line is stale (the value was fixed, or the "
         "comment is on the wrong line) and would hide a later finding without anyone noticing; "
         "remove it.",
         "wavelength: 800 nm  # speccheck: allow sub-cycle-pulse -- a few-cycle source",
         "wavelength: 800 nm"),
)

# The source of each physics rule, shown by `speccheck explain` (values recalled rather than
# looked up say "from memory").
_SOURCES = {
    "below-transform-limit": "Fourier transform limit; pulse-shape tables, e.g. J.-C. Diels & W. Rudolph, "
                             "Ultrashort Laser Pulse Phenomena, 2nd ed. (2006), ch. 9 (from memory)",
    "strongly-chirped": "common practice",
    "pulse-longer-than-period": "definition of the duty cycle",
    "sub-cycle-pulse": "definition: N = τ c / λ",
    "outside-ultrafast-range": "the scope of speccheck (femtosecond to picosecond pulses)",
    "m2-below-one": "ISO 11146 (beam widths and propagation ratios)",
    "self-focusing": "J. H. Marburger, Prog. Quantum Electron. 4, 35 (1975); n2 values: the material table",
    "self-focusing-risk": "J. H. Marburger, Prog. Quantum Electron. 4, 35 (1975)",
    "self-focusing-air": "J. H. Marburger (1975); n2 of air: E. T. J. Nibbering et al., J. Opt. Soc. Am. B 14, "
                         "650 (1997); Yu. E. Geints et al., Appl. Phys. Lett. 99, 181114 (2011)",
    "measured-data-quality": "common practice",
    "b-integral": "common practice in amplifier design",
    "optic-damage": "the optic's own rating; √(τ/τ_ref) scaling above about 10 ps: common practice",
    "optic-damage-margin": "common practice (a safety factor of 2)",
    "damage-rating-not-transferable": "common practice",
    "spot-below-diffraction-limit": "Gaussian-beam optics (paraxial): 1/e² spot diameter 4 M² λ f / (π D)",
    "non-paraxial-focus": "Gaussian-beam optics: the paraxial approximation needs w0 ≫ λ/π; NA ≈ 0.4: common "
                          "practice",
    "aperture-clipping": "the Gaussian profile integrated over a disc (A. E. Siegman, Lasers, ch. 17, chapter from memory); 1 %: "
                         "common practice",
    "beam-geometry-impossible": "Gaussian-beam optics: w(z)² = w0² + (M²λz/(π w0))² (H. Kogelnik and T. Li, "
                                "Appl. Opt. 5, 1550 (1966); the embedded Gaussian, A. E. Siegman, Lasers)",
    "strong-field-figures": "L. V. Keldysh, Sov. Phys. JETP 20, 1307 (1965); P. B. Corkum, Phys. Rev. Lett. 71, "
                            "1994 (1993); ionization energies: NIST Atomic Spectra Database (from memory)",
    "relativistic-intensity": "a0 = e E / (m_e ω c) ≈ 0.855 λ[µm] √(I / 10^18 W/cm²) (published rule)",
    "laser-safety": "IEC 60825-1; ANSI Z136.1; your laser safety officer",
    "photon-energy-not-conserved": "photon-energy conservation, 1/λp = 1/λs + 1/λi",
    "dispersion-compensation": "Gaussian pulse with a quadratic spectral phase",
    "assumed-shape": "pulse-shape tables (see below-transform-limit)",
}
_RULES = tuple(replace(r, source=_SOURCES.get(r.id, r.source)) for r in _RULES)
unknown = set(_SOURCES) - {r.id for r in _RULES}
if unknown:  # pragma: no cover - table sanity
    raise ValueError(f"sources for unknown rules: {sorted(unknown)}")

RULES: dict[str, Rule] = {r.id: r for r in _RULES}

if len(RULES) != len(_RULES):  # pragma: no cover - table sanity
    raise ValueError("duplicate rule ids")


def rule(rule_id: str) -> Rule:
    try:
        return RULES[rule_id]
    except KeyError:
        raise KeyError(f"unknown rule id {rule_id!r}") from None
