"""The HTML report: a self-contained page with the sheet, the findings and the plots.

Structure, escaping, determinism and the page without matplotlib are checked
everywhere with the standard library's html.parser; the last test opens the
page in a real headless Chromium (skipped where Chromium, its driver or
selenium is missing) and saves a screenshot in test-artifacts/.
"""

from __future__ import annotations

import dataclasses
import io
import os
import shutil
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from speccheck.cli import run
from speccheck.records.findings import FileResult, Finding
from speccheck.formats import FORMATS
from speccheck.formats import html as html_format

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_specs"
PUMP_PROBE = EXAMPLES / "amplifier-pump-probe-path.yaml"
HHG = EXAMPLES / "hhg-argon.yaml"
ONE_WRONG = EXAMPLES / "maker-sheet-one-wrong.yaml"


def has_matplotlib() -> bool:
    try:
        import matplotlib  # noqa: F401
    except ImportError:
        return False
    return True


needs_matplotlib = pytest.mark.skipif(not has_matplotlib(), reason="matplotlib (the report extra) is not installed")


class Page(HTMLParser):
    """The parts of a page the tests look at: every start tag with its attributes, the text
    inside elements with a class or id, and the text of the whole page."""

    def __init__(self, text: str) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict]] = []
        self.text: list[str] = []
        self.feed(text)
        self.close()

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_startendtag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_data(self, data):
        self.text.append(data)

    def all(self, tag: str, **attrs) -> list[dict]:
        def matches(a: dict) -> bool:
            return all(value in (a.get(key.rstrip("_")) or "").split() for key, value in attrs.items())

        return [a for t, a in self.tags if t == tag and matches(a)]

    @property
    def plain(self) -> str:
        return "".join(self.text)


def report(tmp_path: Path, *specs: Path, name: str = "report.html") -> tuple[int, str]:
    out = tmp_path / name
    code = run(["check", "--no-config", "--format", "html", "-o", str(out), *map(str, specs)],
               io.StringIO(), io.StringIO())
    return code, out.read_text(encoding="utf-8")


def sheet_shape(path: Path, checker) -> tuple[int, int, int]:
    result = checker.check_text(path.read_bytes(), str(path))
    rows: list[str] = []
    for cells in result.sheet.values():
        rows += [q for q in cells if q not in rows]
    return len(rows), len(result.sheet), len(result.findings)


# ------------------------------------------------------------ structure
def test_html_is_a_registered_format_and_a_choice_of_the_command_line(tmp_path):
    assert FORMATS["html"] == "speccheck.formats.html"
    code, text = report(tmp_path, HHG)
    assert code == 0 and text.startswith("<!DOCTYPE html>")


def test_the_page_has_the_title_path_grid_and_every_finding(tmp_path, checker):
    code, text = report(tmp_path, PUMP_PROBE)
    assert code == 1  # the probe's duration target is not met: an error
    page = Page(text)
    n_rows, n_columns, n_findings = sheet_shape(PUMP_PROBE, checker)
    assert "Pump-probe beamline, bench 2" in page.plain
    assert str(PUMP_PROBE) in page.plain
    (table,) = page.all("table", class_="sheet")
    assert (int(table["data-rows"]), int(table["data-columns"])) == (n_rows, n_columns)
    assert len(page.all("th", scope="row")) == n_rows
    assert len(page.all("th", scope="col")) == n_columns + 1  # the quantity column and one per sheet column
    assert len(page.all("li", class_="finding")) == n_findings
    assert [a["data-rule"] for a in page.all("li", class_="finding")].count("target-not-met") == 1
    assert f"{PUMP_PROBE}:40:27" in page.plain  # file:line:col of the unmet target
    assert "a target requirement that the path does not meet" in page.plain  # the rule's summary
    assert len(page.all("details")) == n_findings  # each finding carries its rule's explanation


def test_stated_derived_and_conflict_cells_differ_in_colour_and_in_text(tmp_path):
    _, text = report(tmp_path, ONE_WRONG)
    page = Page(text)
    statuses = {a["data-status"] for a in page.all("td") if "data-status" in a}
    assert statuses == {"stated", "derived", "conflict"}
    (conflict,) = page.all("td", class_="c-conflict")
    assert conflict["data-status"] == "conflict" and conflict["title"].startswith("conflict")
    for status in ("stated", "derived", "conflict"):  # spoken to screen readers, not only coloured
        assert f"{status}: " in page.plain
    assert "≠ implied 19.4 … 20.6 µJ" in page.plain
    assert "suspect: laser.pulse_energy" in page.plain


def test_the_laser_safety_caution_stands_at_the_top_when_a_file_has_one(tmp_path):
    _, text = report(tmp_path, HHG)
    assert text.index('class="caution"') < text.index('<section class="file"')
    assert "Wear eyewear rated for the wavelength" in text


def test_no_caution_without_a_laser_safety_finding(check, units):
    result = check("laser: {wavelength: 800 nm, pulse_duration: 30 fs}")
    assert all(f.rule != "laser-safety" for f in result.findings)
    text = html_format.render([result], units)
    assert 'class="caution"' not in text


def test_the_page_is_self_contained(tmp_path):
    _, text = report(tmp_path, *sorted(EXAMPLES.glob("*.yaml")))
    page = Page(text)
    for tag, attrs in page.tags:
        for key in ("src", "href", "xlink:href", "action", "data", "poster"):
            value = attrs.get(key)
            assert value is None or value.startswith("#"), (tag, key, value)
    assert "http://" not in text and "https://" not in text
    for tag in ("script", "link", "img", "iframe", "object", "embed", "base"):
        assert not page.all(tag), tag
    assert "@import" not in text and "url(" not in text.replace("url(#", "")
    (csp,) = [a for a in page.all("meta") if a.get("http-equiv") == "Content-Security-Policy"]
    assert "default-src 'none'" in csp["content"]


@needs_matplotlib
def test_the_plots_are_inline_svg_with_unique_ids(tmp_path):
    _, text = report(tmp_path, PUMP_PROBE, HHG)
    page = Page(text)
    figures = page.all("figure", class_="plot")
    assert len(figures) == 8  # per file: the pulse, its spectrum, the foci, the field at the branch ends
    svgs = page.all("svg")
    assert len(svgs) == 8 and all(s.get("role") == "img" for s in svgs)
    ids = [a["id"] for _, a in page.tags if "id" in a]
    assert len(ids) == len(set(ids))
    # the pulse at the laser and at the last column of each branch, with the sheet's durations
    assert "laser 35 fs; pump_lens 24.75 fs; probe_lens 56.83 fs" in page.plain
    # the pump arm's second harmonic is D/√2 across (the square of a Gaussian profile), so its focus
    # is √2 wider than a beam of the fundamental's size would give at 515 nm
    # (66.19 µm, not 4M²λf/(πD)'s 66.21: the exact waist of a beam whose Rayleigh range is 18.9 m, by a factor
    # 1/√(1 + (f/z_R)²), S. A. Self, Appl. Opt. 22, 658 (1983))
    assert "pump_lens: w0 14.04 µm" in page.plain and "probe_lens: w0 66.19 µm" in page.plain
    assert "a Gaussian profile (as stated in the laser block)" in page.plain


def test_same_input_same_bytes(tmp_path):
    _, first = report(tmp_path, PUMP_PROBE, HHG, name="a.html")
    _, second = report(tmp_path, PUMP_PROBE, HHG, name="b.html")
    assert first == second
    # and in a fresh process (nothing random, no date, no process-dependent ids)
    out = tmp_path / "c.html"
    env = dict(os.environ, PYTHONPATH=str(ROOT), PYTHONHASHSEED="12345")
    subprocess.run([sys.executable, "-m", "speccheck", "check", "--no-config", "--format", "html", "-o", str(out),
                    str(PUMP_PROBE), str(HHG)], cwd=tmp_path, env=env, capture_output=True, check=False)
    # run from another folder the paths are the same (absolute), so the page is too
    assert out.read_text(encoding="utf-8") == first


# -------------------------------------------------------------- hostile
HOSTILE_SPEC = """\
spec_version: 1
title: "<script>alert('title')</script> & </section><img src=x onerror=alert(1)>"
laser:
  wavelength: 800 nm
  repetition_rate: 1 kHz
  pulse_energy: 1 mJ
  pulse_duration: 30 fs
  spectral_bandwidth: 35 nm
  beam_diameter: 8 mm
path:
  - {name: "<b>lens</b> $\\\\frac{1}{0}$ {{x}}", kind: focus, focal_length: 500 mm}
"""


def test_text_from_the_spec_is_escaped(tmp_path):
    spec = tmp_path / "hostile.yaml"
    spec.write_text(HOSTILE_SPEC, encoding="utf-8")
    code, text = report(tmp_path, spec)
    assert code in (0, 1)
    page = Page(text)
    assert not page.all("script") and not page.all("img") and not page.all("b")
    assert len(page.all("section", class_="file")) == 1
    assert "<script>alert('title')</script> & </section><img src=x onerror=alert(1)>" in page.plain
    assert "&lt;script&gt;" in text
    assert "<b>lens</b>" in page.plain  # the stage name, as text in the grid's header


@given(st.text(min_size=1, max_size=60))
@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
def test_any_title_is_text_and_never_markup(units, title):
    result = FileResult("a.yaml", (Finding("yaml-syntax", "error", title, "a.yaml", 1, 1),), {}, title)
    page = Page(html_format.render([result], units))
    assert [t for t, _ in page.tags] == [t for t, _ in Page(html_format.render(
        [dataclasses.replace(result, title="plain", findings=(dataclasses.replace(result.findings[0],
                                                                                  message="plain"),))],
        units)).tags]


def test_bad_input_gives_a_page_never_a_traceback(tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_bytes(b"laser: {wavelength: 800 nm\n\xff\xfe")
    empty = tmp_path / "empty.yaml"
    empty.write_text("", encoding="utf-8")
    errors = io.StringIO()
    out = tmp_path / "r.html"
    code = run(["check", "--no-config", "--format", "html", "-o", str(out), str(bad), str(empty),
                str(EXAMPLES / "typos-and-units.yaml"), str(tmp_path / "missing.yaml")], io.StringIO(), errors)
    assert code == 2 and "Traceback" not in errors.getvalue()
    page = Page(out.read_text(encoding="utf-8"))
    assert len(page.all("section", class_="file")) == 4
    assert "No sheet" in page.plain


def test_a_figure_that_cannot_be_drawn_is_left_out_with_a_word(tmp_path, units, checker):
    class Broken:
        @staticmethod
        def temporal(*args):
            raise ValueError("no")

        spectra = caustic = temporal

        @staticmethod
        def inline(svg, prefix, title):
            return svg

    result = checker.check_text(HHG.read_bytes(), str(HHG))
    page = Page(html_format.render([result], units, Broken))
    assert "Temporal intensity profile: not drawn (ValueError)." in page.plain
    assert not page.all("figure")


def test_without_matplotlib_the_page_says_how_to_get_the_plots(tmp_path, monkeypatch):
    monkeypatch.setitem(sys.modules, "matplotlib", None)  # import matplotlib now raises ImportError
    monkeypatch.delitem(sys.modules, "speccheck.formats.plots", raising=False)
    code, text = report(tmp_path, PUMP_PROBE)
    assert code == 1
    page = Page(text)
    assert "pip install 'speccheck[report]'" in page.plain
    assert "matplotlib is not installed" in page.plain
    assert not page.all("svg") and page.all("table", class_="sheet") and page.all("li", class_="finding")


def test_other_formats_never_import_matplotlib():
    spec = repr(str(PUMP_PROBE))
    code = ("import io, sys\n"
            "from speccheck.cli import run\n"
            "import speccheck.formats.html\n"  # importing the format is not writing a report
            "for fmt in ('human', 'json', 'review', 'sarif', 'junit', 'github', 'csv'):\n"
            f"    run(['check', '--no-config', '--format', fmt, {spec}], io.StringIO(), io.StringIO())\n"
            "print('matplotlib' in sys.modules)\n")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    done = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "False"


# ------------------------------------------------- beyond the sheet
def test_the_end_of_each_branch_comes_from_the_check(check):
    result = check("""
        laser: {wavelength: 800 nm, pulse_duration: 30 fs, pulse_energy: 1 mJ, beam_diameter: 5 mm}
        path:
          - {name: a, kind: optic}
          - name: split
            kind: splitter
            ratio: 50%
            branches:
              left: {path: [{name: l1, kind: optic}, {name: l2, kind: focus, focal_length: 100 mm}]}
              right: {path: []}
        """)
    assert html_format._Context(result).ends == ["l2", "right"]


@pytest.mark.parametrize("shape", ["gaussian", "sech2", "lorentzian", "flat_top"])
def test_the_shape_comes_from_the_check(check, shape):
    ctx = html_format._Context(check(f"laser: {{pulse_duration: 30 fs, pulse_shape: {shape}}}"))
    assert (ctx.shape, ctx.shape_source) == (shape, "as stated in the laser block")
    ctx = html_format._Context(check("laser: {pulse_duration: 30 fs}"))
    assert ctx.shape == "gaussian" and "assumed" in ctx.shape_source


@needs_matplotlib
def test_profiles_have_the_stated_fwhm():
    import numpy as np

    from speccheck.formats import plots

    x = np.linspace(-3, 3, 600_001)
    for name in ("gaussian", "sech2", "lorentzian", "flat_top"):
        for table in (plots.TEMPORAL, plots.SPECTRAL):
            y = table[name](x)
            above = x[y >= 0.5 * y.max()]
            assert above.max() - above.min() == pytest.approx(1.0, abs=1e-4), name


@needs_matplotlib
def test_the_svg_is_made_fit_for_html():
    from speccheck.formats import plots

    class Units:
        def factor(self, unit):
            return {"fs": 1e-15, "ps": 1e-12, "s": 1.0}.get(unit, 1.0)

    svg = plots.inline(plots.temporal(Units(), "gaussian", [("a", 30e-15)]), "q-", "T <1>")
    assert svg.startswith('<svg role="img" aria-labelledby="q-title"')
    assert "<?xml" not in svg and "DOCTYPE" not in svg and "xmlns" not in svg
    assert '<title id="q-title">T &lt;1&gt;</title>' in svg
    assert 'href="#q-' in svg and 'id="q-' in svg


def test_ci_runs_the_readme_test_command():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    command = readme.split("Run the tests:", 1)[1].split("```sh\n", 1)[1].split("\n", 1)[0]
    assert command == "pip install '.[test,report]' && pytest"
    assert (ROOT / ".ci" / "run").read_text(encoding="utf-8").rstrip().endswith(command)


# ----------------------------------------------------------- the browser
CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
CHROMEDRIVER = shutil.which("chromedriver")


@pytest.fixture
def browser(tmp_path):
    if not CHROMIUM:
        pytest.skip("Chromium is not installed (apt-get install chromium chromium-driver)")
    if not CHROMEDRIVER:
        pytest.skip("chromedriver is not installed (apt-get install chromium-driver)")
    try:
        from selenium import webdriver
        from selenium.webdriver.chrome.service import Service
    except ImportError:
        pytest.skip("selenium is not installed (pip install '.[browser]')")
    options = webdriver.ChromeOptions()
    options.binary_location = CHROMIUM
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
                "--disable-component-update", "--disable-sync", "--no-first-run", "--disable-dev-shm-usage",
                "--hide-scrollbars", "--window-size=1280,1000", f"--user-data-dir={tmp_path / 'profile'}"):
        options.add_argument(arg)
    options.set_capability("goog:loggingPrefs", {"browser": "ALL"})
    try:  # an explicit driver path: selenium never looks for (or downloads) a driver itself
        driver = webdriver.Chrome(options=options, service=Service(executable_path=CHROMEDRIVER))
    except Exception as exc:  # a driver that does not match the browser, no display libraries, …
        pytest.skip(f"Chromium could not be started: {type(exc).__name__}: {str(exc).splitlines()[0][:200]}")
    driver.set_page_load_timeout(60)
    try:
        yield driver
    finally:
        driver.quit()


def test_the_report_in_a_real_browser(browser, tmp_path, checker, request):
    from selenium.webdriver.common.by import By

    code, _ = report(tmp_path, PUMP_PROBE, ONE_WRONG)
    browser.get((tmp_path / "report.html").as_uri())
    assert browser.title == "speccheck report: 2 files"
    sections = browser.find_elements(By.CSS_SELECTOR, "section.file")
    assert len(sections) == 2
    for section, spec in zip(sections, (PUMP_PROBE, ONE_WRONG)):
        n_rows, n_columns, n_findings = sheet_shape(spec, checker)
        rows = section.find_elements(By.CSS_SELECTOR, "table.sheet tbody tr")
        assert len(rows) == n_rows
        assert all(len(r.find_elements(By.CSS_SELECTOR, "td")) == n_columns for r in rows)
        assert len(section.find_elements(By.CSS_SELECTOR, "li.finding")) == n_findings
    first, second = sections
    assert "target-not-met" in first.text and "relation-conflict" in second.text
    conflict = second.find_element(By.CSS_SELECTOR, "td.c-conflict")
    derived = second.find_element(By.CSS_SELECTOR, "td.c-derived")
    stated = second.find_element(By.CSS_SELECTOR, "td.c-stated")
    colours = {c.value_of_css_property("background-color") for c in (conflict, derived, stated)}
    assert len(colours) == 3  # three different looks …
    assert conflict.text.startswith("!") and derived.text.startswith("=")  # … and marked in text
    caution = browser.find_element(By.CSS_SELECTOR, "aside.caution")
    assert caution.is_displayed() and caution.rect["y"] < first.rect["y"]
    details = first.find_element(By.CSS_SELECTOR, "li.finding details")
    assert not details.find_element(By.CSS_SELECTOR, "p").is_displayed()
    details.find_element(By.CSS_SELECTOR, "summary").click()
    assert details.find_element(By.CSS_SELECTOR, "p").is_displayed()  # the rule's explanation opens
    if has_matplotlib():
        plots = browser.find_elements(By.CSS_SELECTOR, "figure.plot svg")
        # pump-probe: pulse, spectrum, the field at each branch end, foci; the maker's sheet (no bandwidth): pulse
        assert len(plots) == 5
        for svg in plots:  # drawn, not an empty box: glyphs and curves are there and have a size
            assert svg.size["width"] > 300 and svg.size["height"] > 100
            assert len(svg.find_elements(By.CSS_SELECTOR, "path")) > 20
    else:
        assert browser.find_element(By.ID, "no-plots").is_displayed()
    # nothing was fetched: the page is the only resource, and nothing was refused or failed
    assert browser.execute_script("return performance.getEntriesByType('resource').length") == 0
    severe = [e for e in browser.get_log("browser") if e.get("level") == "SEVERE"]
    assert not severe, severe
    # the wide grid scrolls inside its box; the page itself never scrolls sideways (screen-reader
    # words inside the grid would widen it if they escaped the box)
    assert browser.execute_script(
        "return document.documentElement.scrollWidth <= document.documentElement.clientWidth")
    height = browser.execute_script("return document.documentElement.scrollHeight")
    browser.set_window_size(1280, min(int(height) + 40, 16000))
    artifacts = Path(request.config.rootpath) / "test-artifacts"
    artifacts.mkdir(exist_ok=True)
    shot = artifacts / "html-report.png"
    assert browser.save_screenshot(str(shot)) and shot.stat().st_size > 10_000


# ------------------------------------------------------------ the field
FIELD_SPEC = """spec_version: 1
laser: {wavelength: 800 nm, pulse_duration: 30 fs, spectral_bandwidth: 31.4 nm, pulse_energy: 1 mJ,
        repetition_rate: 1 kHz, pulse_shape: gaussian}
path:
  - {name: stretch, kind: dispersion, gdd: 1000 fs^2}
"""


def test_the_field_at_a_branch_end_is_kept_for_the_report_only(units):
    from speccheck.checking.document import Checker, Options

    assert Checker(units).check_text(FIELD_SPEC, "x.yaml").fields == ()  # the other formats never pay for it
    result = Checker(units, Options(profiles=True)).check_text(FIELD_SPEC, "x.yaml")
    (profile,) = result.fields
    assert profile.column == "stretch"
    import numpy as np

    # the spectral phase is the stage's GDD: a parabola φ = GDD Δω²/2, fitted here to the plotted samples
    # (numpy's polyfit against the parameter the stage was given)
    omega = 2 * np.pi * 299792458.0 / np.asarray(profile.wavelength)
    w0 = 2 * np.pi * 299792458.0 / 800e-9
    curvature = np.polyfit(omega - w0, np.asarray(profile.phase), 2)[0]
    assert 2 * curvature == pytest.approx(1000e-30, rel=0.01)
    # the plotted intensity's half-maximum width is the sheet's duration (the closed form for a chirped
    # Gaussian, τ0 √(1 + (4 ln2 φ/τ0²)²) = 97.3 fs for τ0 = 29.97 fs), to the plot's time step
    t, inten = np.asarray(profile.time), np.asarray(profile.intensity)
    hot = t[inten >= 0.5]
    assert hot[-1] - hot[0] == pytest.approx(result.sheet["stretch"]["pulse_duration"].value, rel=0.03)


@needs_matplotlib
def test_the_report_plots_the_field_at_the_end_of_the_path(tmp_path):
    spec = tmp_path / "f.yaml"
    spec.write_text(FIELD_SPEC, encoding="utf-8")
    _, text = report(tmp_path, spec)
    page = Page(text)
    assert "The pulse's field at the end of each branch, computed along the path" in page.plain
    assert len(page.all("svg")) == 3  # the idealised pulse and spectrum, and the field
