"""``--format html``: one self-contained HTML page for a reviewer.

Per file: the title and path, the findings (``file:line:col``, severity, rule,
message, and the rule's explanation in a ``<details>`` block), the sheet as a
grid (rows are quantities, columns the laser and each operating point or
stage; stated, derived and conflict cells differ in colour *and* carry a text
mark), and plots: the temporal intensity profile of the pulse, its spectrum
and the beam radius around each focus; for a spec with operating points, their
table with a verdict per point and a plot of energy and power against rate with
the sheet's limits (``html_points.py``, which also writes the grid's cells).  A
laser-safety caution stands at the top whenever a file has a ``laser-safety``
finding, said there once: the finding in the file's list points to it.

Self-contained: inline CSS and inline SVG, no scripts, fonts, images or
links to anything outside the page, and a Content-Security-Policy that forbids
the browser to fetch anything.  Every text that comes from a spec (titles,
paths, names, messages) is escaped.  Same input, same bytes out.

The plots need matplotlib (the ``report`` extra), imported only here and only
when a report is written (``formats/plots.py``).  Without it the page is
written all the same and says how to get the plots.

What the sheet does not hold — the laser block's ``pulse_shape`` and which
column ends each branch of a splitter — comes with the ``FileResult``
(``pulse_shape``, ``branch_ends``); the page never reads the spec again.
"""

from __future__ import annotations

import importlib
import math
from html import escape
from typing import Callable

from speccheck._version import __version__
from speccheck.formats import cell_text, html_points
from speccheck.formats.common import counts_text
from speccheck.formats.html_style import CSS
from speccheck.records.findings import FileResult, Finding
from speccheck.physics.shapes import DEFAULT_SHAPE

INSTALL_HINT = "pip install 'speccheck[report]'"
MAX_CURVES = 8  # curves in one plot (a path with many branches shows its first ones)
MAX_FOCI = 6
_CSP = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'"

# ---------------------------------------------------------------- numbers
_Show = cell_text.Numbers


# ------------------------------------------------------- beyond the sheet
class _Context:
    """What the plots need beyond the sheet: the pulse shape and the branch ends (from the result)."""

    def __init__(self, result: FileResult) -> None:
        self.shape = result.pulse_shape or DEFAULT_SHAPE
        self.shape_source = ("as stated in the laser block" if result.pulse_shape_stated
                             else "not stated, so Gaussian is assumed as in the check")
        self.ends = [e for e in dict.fromkeys(result.branch_ends) if e in result.sheet and e != "laser"]


# ----------------------------------------------------------------- plots
def _plotter():
    """The plots module, or None and the reason it cannot be used."""
    try:
        return importlib.import_module("speccheck.formats.plots"), None
    except ImportError:
        return None, "matplotlib is not installed"
    except Exception as exc:  # a broken installation: no plots, never a failed report
        return None, f"matplotlib could not be loaded ({type(exc).__name__})"


def _positive(cells: dict, q: str) -> float | None:
    c = cells.get(q)
    v = c.value if c is not None else None
    return v if isinstance(v, float | int) and math.isfinite(v) and v > 0 else None


def _figures(result: FileResult, ctx: _Context, units, show: _Show) -> list[tuple[str, str, Callable]]:
    """(title, caption, draw) of each plot the sheet has the numbers for."""
    sheet = result.sheet
    columns = ["laser"] + ctx.ends if "laser" in sheet else []
    figures = []
    curves: list = []
    for c in columns:
        tau = _positive(sheet[c], "pulse_duration")
        if not tau:
            continue
        for k, (names, tau2) in enumerate(curves):
            if abs(tau / tau2 - 1) < 1e-9:  # one curve, both names
                curves[k] = (f"{names}, {c}", tau2)
                break
        else:
            curves.append((c, tau))
    curves = curves[:MAX_CURVES]
    shape_words = {"gaussian": "Gaussian", "sech2": "sech²", "lorentzian": "Lorentzian", "flat_top": "flat-top"}
    shape = shape_words.get(ctx.shape, ctx.shape)
    if curves:
        where = "at the laser" + ("" if not ctx.ends else " and at the end of the path" if len(ctx.ends) == 1
                                  else " and at the end of each branch")
        caption = (f"Temporal intensity {where}: a {shape} profile ({ctx.shape_source}) with the sheet's FWHM "
                   "durations: " + "; ".join(f"{c} {show(t, show.prefixed(t, 'fs'))}" for c, t in curves) + ".")
        figures.append(("Temporal intensity profile", caption,
                        lambda p, curves=curves: p.temporal(units, ctx.shape, curves)))
    spectra: list = []
    for c in columns:
        lam, dnu = _positive(sheet[c], "wavelength"), _positive(sheet[c], "spectral_bandwidth")
        if not (lam and dnu):
            continue
        for k, (names, lam2, dnu2) in enumerate(spectra):
            if abs(lam / lam2 - 1) < 1e-9 and abs(dnu / dnu2 - 1) < 1e-9:  # one curve, both names
                spectra[k] = (f"{names}, {c}", lam2, dnu2)
                break
        else:
            spectra.append((c, lam, dnu))
    spectra = spectra[:MAX_CURVES]
    if spectra:
        caption = ("Spectrum: a " + shape + " profile in frequency with the sheet's FWHM bandwidth, centred at "
                   "its wavelength (an illustration, not a measured spectrum): " + "; ".join(
                       f"{c} {show(lam, show.prefixed(lam, 'nm'))}, Δν {show(dnu, show.prefixed(dnu, 'THz'))}"
                       for c, lam, dnu in spectra) + ".")
        figures.append(("Spectrum", caption, lambda p, spectra=spectra: p.spectra(units, ctx.shape, spectra)))
    if result.fields:
        shown = result.fields[:MAX_CURVES]
        caption = ("The pulse's field at the end of each branch, computed along the path (not an idealised "
                   "shape): the temporal intensity by FFT of the field, and the spectrum with its spectral "
                   "phase (dashed; its constant and group delay removed): " + ", ".join(p.column for p in shown)
                   + ".")
        figures.append(("The pulse's field", caption, lambda p, shown=shown: p.field(units, shown)))
    foci = []
    first = next(iter(sheet.values()), {}).get("beam_radius")
    for c, cells in sheet.items():  # a column at a waist (its distance to it 0) narrower than the laser's beam
        w0, zr, ahead = _positive(cells, "beam_radius"), _positive(cells, "rayleigh_range"), cells.get("waist_distance")
        at_waist = ahead is None or ahead.value is not None and abs(ahead.value) <= 1e-6 * (zr or 1.0)
        if w0 and zr and at_waist and not (first and first.value and w0 >= 0.5 * first.value):
            foci.append((c, w0, zr))
    foci = foci[:MAX_FOCI]
    if foci:
        caption = ("Beam radius around each focus, w(z) = w0 √(1 + (z/z_R)²), over ±3 z_R: " + "; ".join(
            f"{c}: w0 {show(w0, show.prefixed(w0, 'µm'))}, z_R {show(zr, show.prefixed(zr, 'mm'))}"
            for c, w0, zr in foci) + ".")
        figures.append(("Beam radius around the focus", caption, lambda p, foci=foci: p.caustic(units, foci)))
    return figures


# ------------------------------------------------------------------ page
def _where(f: Finding) -> str:
    from speccheck.formats.common import place

    return place(f)


def _finding(f: Finding) -> str:
    from speccheck.records.rules import RULES

    e = escape
    out = [f'<li class="finding {e(f.severity)}" data-rule="{e(f.rule)}">',
           f'<div class="head"><span class="badge {e(f.severity)}">{e(f.severity)}</span>'
           f'<code class="where">{e(_where(f))}</code><code class="rule">{e(f.rule)}</code></div>',
           f'<p class="msg">{e(f.message)}</p>' if f.rule != "laser-safety" else  # said once, at the top
           '<p class="msg">The <a href="#laser-safety">laser-safety caution</a> at the top of this report '
           "applies to this file.</p>"]
    meta = []
    if f.suspect:
        meta.append(f"suspect: <code>{e(f.suspect)}</code>")
    if f.candidates:
        meta.append("one of: " + ", ".join(f"<code>{e(c)}</code>" for c in f.candidates))
    if f.cause:
        meta.append(f"likely mistake: <code>{e(f.cause)}</code>")
    if meta:
        out.append(f'<p class="meta">{"; ".join(meta)}</p>')
    rule = RULES.get(f.rule)
    if rule is not None:
        out.append(f"<details><summary>About <code>{e(rule.id)}</code>: {e(rule.summary)}</summary>"
                   f"<p>{e(rule.explanation)}</p>")
        if rule.failing:
            out.append(f"<p>Fails:</p><pre>{e(rule.failing)}</pre>")
        if rule.passing:
            out.append(f"<p>Passes:</p><pre>{e(rule.passing)}</pre>")
        out.append("</details>")
    out.append("</li>")
    return "".join(out)


def _grid(result: FileResult, show: _Show, n: int) -> str:
    sheet = result.sheet
    rows: list[str] = []
    for cells in sheet.values():
        rows += [q for q in cells if q not in rows]
    if not rows:
        return '<p class="notice">No sheet: the spec was not read far enough to fill one in.</p>'
    from speccheck.physics.quantities import BY_NAME

    e = escape
    out = ['<p class="legend">Cells: <span class="c-stated">stated</span>'
           '<span class="c-derived"><span class="mark">=</span>derived</span>'
           '<span class="c-conflict"><span class="mark">!</span>conflict</span>'
           '<span><span class="assumed">(default)</span> a default value</span>'
           + "".join(f'<span><span class="mark">{e(mark)}</span>{e(words)}</span>' if mark != cell_text.SET_MARK
                     else f'<span><span class="assumed">(--set)</span> {e(words)}</span>'
                     for mark, words in cell_text.legend(c for cells in sheet.values() for c in cells.values()))
           + '</p>',
           f'<div class="scroll" role="region" aria-labelledby="sheet-{n}" tabindex="0">'
           f'<table class="sheet" data-rows="{len(rows)}" data-columns="{len(sheet)}">'
           f'<caption id="sheet-{n}">Sheet: {len(rows)} quantities × {len(sheet)} '
           f'column{"" if len(sheet) == 1 else "s"}</caption>',
           '<thead><tr><th scope="col">quantity</th>'
           + "".join(f'<th scope="col">{e(name)}</th>' for name in sheet) + "</tr></thead><tbody>"]
    for q in rows:
        meaning = BY_NAME[q].meaning if q in BY_NAME else ""
        title = f' title="{e(meaning)}"' if meaning else ""
        line = [f'<tr><th scope="row"{title}>{e(q)}</th>']
        for name in sheet:
            cell = sheet[name].get(q)
            if cell is None:
                line.append('<td class="c-none"></td>')
                continue
            line.append(html_points.cell(cell, show))
        line.append("</tr>")
        out.append("".join(line))
    out.append("</tbody></table></div>")
    return "".join(out)


def _plots(result: FileResult, units, show: _Show, plotter, n: int) -> str:
    if not result.sheet:
        return ""
    ctx = _Context(result)
    figures = _figures(result, ctx, units, show)
    if not figures:
        return ('<h3>Plots</h3><p class="notice">No plots: the sheet has no pulse duration, bandwidth or '
                "focus to draw.</p>")
    out = ["<h3>Plots</h3>"]
    if plotter is None:
        names = ", ".join(title.lower() for title, _, _ in figures)
        out.append(f'<p class="notice">Plots not drawn ({escape(names)}): they need matplotlib, '
                   f"<code>{escape(INSTALL_HINT)}</code>.</p>")
        return "".join(out)
    for k, (title, caption, draw) in enumerate(figures):
        try:
            svg = plotter.inline(draw(plotter), f"f{n}p{k}-", title)
        except Exception as exc:  # a figure that cannot be drawn is left out, never a failed report
            out.append(f'<p class="notice">{escape(title)}: not drawn ({escape(type(exc).__name__)}).</p>')
            continue
        out.append(f'<figure class="plot" data-plot="{k}">{svg}<figcaption>{escape(caption)}</figcaption>'
                   "</figure>")
    return "".join(out)


def _caution(results: list[FileResult]) -> str:
    by_message: dict[str, list[str]] = {}
    for r in results:
        for f in r.findings:
            if f.rule == "laser-safety":
                by_message.setdefault(f.message, [])
                if r.path not in by_message[f.message]:
                    by_message[f.message].append(r.path)
    if not by_message:
        return ""
    out = ['<aside class="caution" id="laser-safety" role="note" aria-labelledby="caution-h">'
           '<h2 id="caution-h"><span aria-hidden="true">⚠ </span>Laser safety</h2>']
    for message, paths in by_message.items():
        text = message[len("laser safety: "):] if message.lower().startswith("laser safety: ") else message
        text = text[:1].upper() + text[1:]
        out.append(f"<p>{escape(text)}</p>")
        if len(results) > 1:
            out.append('<p class="meta">For: ' + ", ".join(f"<code>{escape(p)}</code>" for p in paths) + "</p>")
    out.append("</aside>")
    return "".join(out)


def render(results: list[FileResult], units, plotter=None, why: str | None = None) -> str:
    show = _Show(units)

    n = len(results)
    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
           f'<meta http-equiv="Content-Security-Policy" content="{_CSP}">',
           '<meta name="viewport" content="width=device-width, initial-scale=1">',
           f'<meta name="generator" content="speccheck {escape(__version__)}">',
           "<title>" + escape(f"speccheck report: {results[0].title or results[0].path}" if n == 1
                              else f"speccheck report: {n} files") + "</title>",
           f"<style>{CSS}</style></head><body>",
           '<header><h1>speccheck report</h1>'
           f'<p class="summary" id="summary">{counts_text(results)} in {n} file{"" if n == 1 else "s"}</p></header>',
           _caution(results)]
    if plotter is None and any(r.sheet for r in results):
        out.append(f'<p class="notice" id="no-plots">This report has no plots: {escape(why or "no plotting")}. '
                   f"To get them, install the report extra: <code>{escape(INSTALL_HINT)}</code></p>")
    if n > 1:
        out.append('<nav aria-label="files"><ol>' + "".join(
            f'<li><a href="#file-{i + 1}">{escape(r.path)}</a> — {escape(r.title or "")} '
            f'<span class="meta">({counts_text([r])})</span></li>'
            for i, r in enumerate(results)) + "</ol></nav>")
    out.append("<main>")
    for i, r in enumerate(results, 1):
        heading = r.title or r.path
        out.append(f'<section class="file" id="file-{i}" aria-labelledby="file-{i}-h">'
                   f'<h2 id="file-{i}-h">{escape(heading)}</h2>'
                   f'<p class="path"><code>{escape(r.path)}</code></p>'
                   + "".join(f'<p class="set">With <code>--set {escape(t)}</code> (the file is unchanged)</p>'
                             for t in r.settings)
                   + f'<p class="counts">{counts_text([r])}</p>'
                   "<h3>Findings</h3>")
        if r.findings:
            out.append('<ol class="findings">' + "".join(_finding(f) for f in r.findings) + "</ol>")
        else:
            out.append("<p>No findings.</p>")
        out.append("<h3>Sheet</h3>" + _grid(r, show, i))
        out.append(html_points.section(r, units, show, plotter, i))
        out.append(_plots(r, units, show, plotter, i))
        out.append("</section>")
    out.append("</main>")
    out.append(f"<footer>Written by speccheck {escape(__version__)}. Values are shown in the units of the spec; "
               "hover a cell for its interval.</footer></body></html>\n")
    return "\n".join(part for part in out if part)


def write(results: list[FileResult], out, options=None) -> None:
    units = getattr(options, "units", None)
    if units is None:
        from speccheck.reading.units import UnitSystem

        units = UnitSystem()
    plotter, why = _plotter()
    out.write(render(results, units, plotter, why))
