"""The plots of the HTML report, drawn with matplotlib as inline SVG.

Only ``formats/html.py`` imports this module, and only when it writes a
report: importing it imports matplotlib (the optional ``report`` extra), so an
``ImportError`` here means "no plots", never a failed report.

Each function takes plain numbers in SI units (what ``html.py`` read from the
sheet) and returns one SVG document as text.  Figures are made with the
object-oriented API on an Agg canvas (no pyplot, no global backend switch),
inside an ``rc_context`` that fixes everything that would make two runs
differ: the hash salt of the SVG ids, no date or creator metadata, glyphs as
paths (no font lookup by the viewer), and no mathtext parsing of names taken
from the spec.
"""

from __future__ import annotations

import io
import math
import re
import warnings

import matplotlib
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.ticker import FuncFormatter, NullFormatter

from speccheck.reading.units import choose_unit, format_number, pretty_unit

_SECH2_T = 2.0 * math.acosh(math.sqrt(2.0))  # FWHM of sech² in units of its width: 1.7627
_SINC2_FWHM = 0.8858929  # FWHM of sinc²(πu) in u (numpy's sinc is sin(πu)/(πu))

# Normalised profiles with FWHM 1 in their variable (t/τ for time, (ν - ν0)/Δν for frequency).
TEMPORAL = {
    "gaussian": lambda x: np.exp(-4.0 * math.log(2.0) * x**2),
    "sech2": lambda x: 1.0 / np.cosh(_SECH2_T * x) ** 2,
    "lorentzian": lambda x: 1.0 / (1.0 + (2.0 * x) ** 2),
    "flat_top": lambda x: np.where(np.abs(x) <= 0.5, 1.0, 0.0),
}
# The spectrum drawn for each shape: the same profile for Gaussian, sech² (its own Fourier
# pair) and Lorentzian, sinc² for a flat top (the spectrum of a rectangular pulse).  An
# illustration of a spectrum with the sheet's FWHM, not a measured one.
SPECTRAL = {
    "gaussian": TEMPORAL["gaussian"],
    "sech2": TEMPORAL["sech2"],
    "lorentzian": TEMPORAL["lorentzian"],
    "flat_top": lambda y: np.sinc(_SINC2_FWHM * y) ** 2,
}
SHAPE_WORDS = {"gaussian": "Gaussian", "sech2": "sech²", "lorentzian": "Lorentzian", "flat_top": "flat top"}

_COLOURS = ("#1f4e9a", "#c2410c", "#15803d", "#7e22ce", "#a16207", "#0e7490", "#be185d", "#4b5563")
_RC = {
    "svg.hashsalt": "speccheck-report",
    "svg.fonttype": "path",
    "text.parse_math": False,
    "text.usetex": False,
    "font.family": "DejaVu Sans",
    "font.size": 9.0,
    "axes.titlesize": 9.5,
    "axes.grid": True,
    "grid.color": "#d4d4d8",
    "grid.linewidth": 0.6,
    "axes.edgecolor": "#52525b",
    "axes.linewidth": 0.8,
    "axes.spines.top": False,
    "axes.spines.right": False,
    "legend.frameon": False,
    "figure.dpi": 100,
    "path.simplify": True,
}
_METADATA = {"Date": None, "Creator": None, "Type": None, "Format": None}
MAX_LABEL = 40


def version() -> str:
    return matplotlib.__version__


def label(text: str) -> str:
    """A name from the spec, shortened for a legend (control characters dropped)."""
    text = "".join(ch if ch.isprintable() else " " for ch in str(text))
    return text if len(text) <= MAX_LABEL else text[: MAX_LABEL - 1] + "…"


def _figure(width: float, height: float, ncols: int = 1, right: float = 0.2) -> tuple[Figure, list]:
    """A figure with its axes placed by fixed margins in inches (left for the tick labels and the
    y label, bottom for the x label, top for a title; ``right`` wider for a second y axis).  A
    solver for the layout (matplotlib's constrained layout) took half of each figure's time (about
    170 ms against 80 ms for a three-curve plot), and the labels here are short and known."""
    fig = Figure(figsize=(width, height))
    FigureCanvasAgg(fig)
    fig.subplots_adjust(left=0.72 / width, right=1.0 - right / width, bottom=0.5 / height,
                        top=1.0 - 0.42 / height, wspace=0.95 / (width / ncols))
    axes = fig.subplots(1, ncols, squeeze=False)[0]
    return fig, list(axes)


def _svg(fig: Figure) -> str:
    buffer = io.StringIO()
    with warnings.catch_warnings():  # e.g. a glyph of a stage name missing from the font: drawn as a box
        warnings.simplefilter("ignore")
        fig.savefig(buffer, format="svg", metadata=_METADATA)
    return buffer.getvalue()


def _unit(units, si: float, preferred: str) -> tuple[str, float]:
    unit = choose_unit(units, si, preferred)
    return unit, units.factor(unit)


def _axis_points(shape: str, span: float, n: int = 801) -> np.ndarray:
    x = np.linspace(-span, span, n)
    if shape == "flat_top":  # vertical edges, not a slope between two samples
        edges = np.array([-0.5, -0.5, 0.5, 0.5]) + np.array([-1e-9, 0.0, 0.0, 1e-9])
        x = np.sort(np.concatenate([x, edges]))
    return x


def temporal(units, shape: str, curves: list[tuple[str, float]]) -> str:
    """Normalised intensity I(t) of each (column, FWHM duration in s), on one time axis."""
    profile = TEMPORAL[shape]
    longest = max(tau for _, tau in curves)
    span = 2.0 if shape in ("gaussian", "sech2", "flat_top") else 3.0  # in units of the longest τ
    unit, factor = _unit(units, longest, "fs")
    with matplotlib.rc_context(_RC):
        fig, (ax,) = _figure(6.4, 3.0)
        for i, (name, tau) in enumerate(curves):
            x = _axis_points(shape, span * longest / tau)
            ax.plot(x * tau / factor, profile(x), color=_COLOURS[i % len(_COLOURS)], linewidth=1.6,
                    label=f"{label(name)}: τ = {format_number(tau / factor)} {pretty_unit(unit)}")
        ax.set_xlabel(f"time ({pretty_unit(unit)})")
        ax.set_ylabel("intensity (normalised)")
        ax.set_ylim(0, 1.08)
        ax.set_title(f"Temporal intensity, {SHAPE_WORDS[shape]} pulse (FWHM τ)")
        ax.legend(loc="upper right", fontsize=8)
        return _svg(fig)


def spectra(units, shape: str, curves: list[tuple[str, float, float]]) -> str:
    """Normalised spectral intensity of each (column, centre wavelength in m, FWHM bandwidth in
    Hz), against wavelength: one panel per distinct centre, so a harmonic gets its own axis."""
    c = units.constants.c
    profile = SPECTRAL[shape]
    panels: list[list[tuple[str, float, float]]] = []
    for curve in curves:
        for panel in panels:
            if abs(panel[0][1] / curve[1] - 1.0) < 0.02:
                panel.append(curve)
                break
        else:
            panels.append([curve])
    panels = panels[:4]
    with matplotlib.rc_context(_RC):
        fig, axes = _figure(3.3 * len(panels) if len(panels) > 1 else 6.4, 3.0, len(panels))
        k = 0
        for ax, panel in zip(axes, panels):
            unit, factor = _unit(units, panel[0][1], "nm")
            for name, lam, dnu in panel:
                nu0 = c / lam
                y = np.linspace(-3.0, 3.0, 801)
                nu = nu0 + y * dnu
                keep = nu > 0.05 * nu0
                ax.plot(c / nu[keep] / factor, profile(y[keep]), color=_COLOURS[k % len(_COLOURS)],
                        linewidth=1.6, label=f"{label(name)}: {format_number(lam / factor)} {pretty_unit(unit)}, "
                        f"Δν = {format_number(dnu / 1e12)} THz")
                k += 1
            ax.set_xlabel(f"wavelength ({pretty_unit(unit)})")
            ax.set_ylim(0, 1.08)
            ax.legend(loc="upper right", fontsize=7.5)
        axes[0].set_ylabel("spectral intensity (normalised)")
        fig.suptitle(f"Spectrum, {SHAPE_WORDS[shape]} profile with the sheet's FWHM bandwidth", fontsize=9.5)
        return _svg(fig)


def field(units, profiles) -> str:
    """The pulse's field at each branch end (``records.findings.FieldProfile``): its temporal
    intensity, and its spectrum with the spectral phase on a second axis."""
    with matplotlib.rc_context(_RC):
        fig, (ax_t, ax_s) = _figure(7.2, 3.0, 2, right=0.7)
        widest = max(max(abs(p.time[0]), abs(p.time[-1])) for p in profiles)
        tu, tf = _unit(units, widest, "fs")
        lu, lf = _unit(units, profiles[0].wavelength[len(profiles[0].wavelength) // 2], "nm")
        ax_p = ax_s.twinx()
        for i, p in enumerate(profiles):
            colour = _COLOURS[i % len(_COLOURS)]
            ax_t.plot(np.asarray(p.time) / tf, p.intensity, color=colour, linewidth=1.4, label=label(p.column))
            lam = np.asarray(p.wavelength) / lf
            ax_s.plot(lam, p.spectrum, color=colour, linewidth=1.4, label=label(p.column))
            ax_p.plot(lam, p.phase, color=colour, linewidth=1.0, linestyle="--")
        ax_t.set_xlabel(f"time from the peak ({pretty_unit(tu)})")
        ax_t.set_ylabel("intensity (normalised)")
        ax_t.set_ylim(0, 1.08)
        ax_t.legend(loc="upper right", fontsize=7.5)
        ax_s.set_xlabel(f"wavelength ({pretty_unit(lu)})")
        ax_s.set_ylabel("spectral intensity (normalised)")
        ax_s.set_ylim(0, 1.08)
        ax_p.set_ylabel("spectral phase (rad, dashed)")
        fig.suptitle("The pulse's field at the end of each branch", fontsize=9.5)
        return _svg(fig)


def caustic(units, foci: list[tuple[str, float, float]]) -> str:
    """The 1/e² beam radius w(z) = w0 √(1 + (z/z_R)²) over ±3 z_R around each (column, w0 in m,
    z_R in m), one panel per focus."""
    foci = foci[:6]
    n = len(foci)
    with matplotlib.rc_context(_RC):
        fig, axes = _figure(3.3 * n if n > 1 else 6.4, 3.0, n)
        for i, (ax, (name, w0, zr)) in enumerate(zip(axes, foci)):
            zu, zf = _unit(units, 3.0 * zr, "mm")
            wu, wf = _unit(units, w0 * math.sqrt(10.0), "µm")
            z = np.linspace(-3.0 * zr, 3.0 * zr, 601)
            w = w0 * np.sqrt(1.0 + (z / zr) ** 2)
            colour = _COLOURS[i % len(_COLOURS)]
            ax.fill_between(z / zf, -w / wf, w / wf, color=colour, alpha=0.18, linewidth=0)
            ax.plot(z / zf, w / wf, color=colour, linewidth=1.6)
            ax.plot(z / zf, -w / wf, color=colour, linewidth=1.6)
            for side in (-1.0, 1.0):
                ax.axvline(side * zr / zf, color="#71717a", linewidth=0.8, linestyle="--")
            ax.set_title(f"{label(name)}: w0 = {format_number(w0 / wf)} {pretty_unit(wu)}, "
                         f"z_R = {format_number(zr / zf)} {pretty_unit(zu)}", fontsize=8.5)
            ax.set_xlabel(f"z from the focus ({pretty_unit(zu)})")
            if i == 0:
                ax.set_ylabel(f"±w(z), 1/e² radius ({pretty_unit(wu)})")
        fig.suptitle("Beam radius around each focus (dashed: ±z_R)", fontsize=9.5)
        return _svg(fig)


def operating_points(units, points: list, limits: dict) -> str:
    """Pulse energy and average power against repetition rate (log-log), one panel each, for
    (name, rate in Hz, energy, power, has an error) with energy and power as (value, low, high)
    in SI or None; bars for the intervals, and the sheet's limits dashed: a bound on the power
    is also E = P/f on the energy panel, a bound on the energy P = E·f on the power panel, a
    bound on the rate a vertical line on both."""
    rates = [p[1] for p in points]
    for side in limits.get("repetition_rate", ()):
        if side:
            rates.append(side)
    f = np.geomspace(min(rates) / 2.0, max(rates) * 2.0, 200)
    fu, ff = _unit(units, max(rates), "kHz")
    panels = (("pulse_energy", 2, "µJ", "pulse energy"), ("average_power", 3, "W", "average power"))
    with matplotlib.rc_context(_RC):
        fig, axes = _figure(6.4, 3.0, 2)
        for ax, (q, k, preferred, name) in zip(axes, panels):
            values = [p[k][0] for p in points if p[k] is not None] or [1.0]
            yu, yf = _unit(units, max(values), preferred)
            for i, p in enumerate(points):
                if p[k] is None:
                    continue
                value, low, high = p[k]
                lo = value - (low if low is not None else value)
                hi = (high - value) if high is not None else 0.0
                ax.errorbar([p[1] / ff], [value / yf], yerr=[[lo / yf], [hi / yf]], fmt="x" if p[4] else "o",
                            color="#b91c1c" if p[4] else _COLOURS[0], markersize=6, capsize=3, linewidth=1.2)
                tag = label(p[0])
                note = ax.annotate(tag if len(tag) <= 16 else tag[:15] + "…", (p[1] / ff, value / yf),
                                   textcoords="offset points", xytext=(5, 4), fontsize=7, clip_on=True)
                note.set_in_layout(False)  # a long name never squeezes the axes
            other = "average_power" if q == "pulse_energy" else "pulse_energy"
            for side in limits.get(q, ()):
                if side:
                    ax.axhline(side / yf, color="#52525b", linestyle="--", linewidth=0.9)
            for side in limits.get(other, ()):
                if side:  # E = P/f, or P = E·f
                    curve = side / f if q == "pulse_energy" else side * f
                    ax.plot(f / ff, curve / yf, color="#a16207", linestyle="--", linewidth=0.9)
            for side in limits.get("repetition_rate", ()):
                if side:
                    ax.axvline(side / ff, color="#52525b", linestyle=":", linewidth=0.9)
            ax.set_xscale("log")
            ax.set_yscale("log")
            for axis in (ax.xaxis, ax.yaxis):
                axis.set_major_formatter(FuncFormatter(lambda v, _: format_number(v, 3)))
                axis.set_minor_formatter(NullFormatter())
            ax.set_xlim(f[0] / ff, f[-1] / ff)
            top = max(v for v in values) / yf
            ax.set_ylim(min(v for v in values) / yf / 3.0, top * 3.0)
            ax.set_xlabel(f"repetition rate ({pretty_unit(fu)})")
            ax.set_ylabel(f"{name} ({pretty_unit(yu)})")
        fig.suptitle("Operating points against the sheet's limits (dashed)", fontsize=9.5)
        return _svg(fig)


# ------------------------------------------------------------- into HTML
_ID = re.compile(r'\bid="([^"]+)"')
_REF = re.compile(r'(href="#|url\(#)([^")]+)')


def inline(svg: str, prefix: str, title: str) -> str:
    """An SVG document made fit to sit inside HTML: no XML prolog or DOCTYPE, no namespace
    URLs (the HTML parser puts <svg> in its namespace itself), ids prefixed so that several
    figures on one page never share one, sized by CSS, and labelled for screen readers."""
    from html import escape

    start = svg.find("<svg")
    svg = svg[start:] if start >= 0 else svg
    svg = re.sub(r'\s+xmlns(:xlink)?="[^"]*"', "", svg, count=2)
    svg = re.sub(r'^<svg([^>]*?)\swidth="[^"]*"\sheight="[^"]*"', r"<svg\1", svg, count=1)
    svg = _ID.sub(lambda m: f'id="{prefix}{m.group(1)}"', svg)
    svg = _REF.sub(lambda m: f"{m.group(1)}{prefix}{m.group(2)}", svg)
    head = f'<svg role="img" aria-labelledby="{prefix}title"'
    svg = svg.replace("<svg", head, 1)
    close = svg.find(">") + 1
    return svg[:close] + f'<title id="{prefix}title">{escape(title)}</title>' + svg[close:]
