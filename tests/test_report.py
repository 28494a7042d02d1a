"""HTML reports: built from the results, escaped, self-contained, and seen in a real browser.

The browser checks load each report in Debian's headless chromium (tests/browser.py): the
headings render, every picture decodes (naturalWidth > 0), nothing reaches the console, and
the page refers to nothing outside itself.
"""

import json
import re

import pytest
from browser import Browser, find_browser
from click.testing import CliRunner
from workbench_files import write_capture

from taumatch.cli import main
from taumatch.report import Headline, Notes, Report, Section, Table, render_html

ROOT = __import__("pathlib").Path(__file__).resolve().parents[1]


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture(scope="module")
def browser():
    exe = find_browser()
    if exe is None:
        pytest.skip("no headless browser: install Debian's chromium (apt-get install chromium; "
                    ".ci/run does so where it runs as root) or set TAUMATCH_BROWSER")
    b = Browser(exe)
    yield b
    b.close()


@pytest.fixture(scope="module")
def probe_csv(tmp_path_factory):
    """A textbook over-compensated capture (gain error +5 %), named with markup in it."""
    return write_capture(tmp_path_factory.mktemp("cap") / "probe <b>&amp.csv", 0.05, seed=31)


def test_everything_is_escaped():
    """Text from outside (file names, notes) never becomes markup."""
    r = Report("<script>alert(1)</script>", (("capture", 'a"b<i>.csv'),),
               Headline("x & y", "good"),
               (Section("<h2>", (Notes("warning", ("<img src=x onerror=alert(1)>",)),
                                 Table(("<th>",), (("<td>",),)))),))
    page = render_html(r)
    assert "<script>" not in page and "<img src=x" not in page and "<i>" not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "&lt;img src=x onerror=alert(1)&gt;" in page
    assert re.findall(r"<h2>(.*?)</h2>", page) == ["Inputs", "&lt;h2&gt;"]


def test_headline_tone_is_checked():
    with pytest.raises(ValueError, match="tone must be one of"):
        Headline("x", "green")


def test_diagnose_report(probe_csv, tmp_path, browser):
    out = tmp_path / "diag.html"
    r = run("diagnose", probe_csv, "--tip-r", "9M", "--report", out)
    assert r.exit_code == 0, r.output
    page = out.read_text()
    assert "<b>" not in page and "probe &lt;b&gt;&amp;amp.csv" in page
    seen = browser.load(out)
    assert seen["console"] == []
    assert seen["external"] == []
    assert seen["headings"][0] == "Compensation diagnosis: probe <b>&amp.csv"
    for h in ("Inputs", "Trim", "Fitted divider", "Checks", "Capture", "Pictures", "All figures"):
        assert h in seen["headings"], h
    assert seen["visible"]
    assert len(seen["images"]) == 2
    assert all(i["complete"] and i["width"] > 0 and i["height"] > 0 for i in seen["images"])
    # the numbers are the diagnosis's own: the JSON of the same run gives the same trim
    js = json.loads(run("diagnose", probe_csv, "--tip-r", "9M", "--json").output)
    from taumatch.units import format_uncertain

    tr = js["arm_trims"]["shunt"]
    assert format_uncertain(abs(tr["change"]), tr["change_stderr"], "F") in page
    assert "over-compensated" in page


def test_bandwidth_report_carries_the_cautions(tmp_path, browser):
    """A 1 kV column: the report shows the high-voltage cautions the command prints."""
    out = tmp_path / "hv.html"
    spec = ROOT / "examples" / "hv-divider.toml"
    r = run("bandwidth", spec, "--report", out)
    assert r.exit_code == 0, r.output
    cautions = [line[len("caution: "):] for line in r.output.splitlines()
                if line.startswith("caution: ")]
    assert cautions
    seen = browser.load(out)
    assert seen["console"] == [] and seen["external"] == []
    for h in ("Inputs", "Figures", "Rise-time budget", "High-voltage cautions", "Pictures"):
        assert h in seen["headings"], h
    assert seen["images"] and all(i["width"] > 0 for i in seen["images"])
    from html import escape

    page = out.read_text()
    assert all(escape(c) in page for c in cautions)


def test_divider_report_with_monte_carlo(tmp_path, browser):
    out = tmp_path / "div.html"
    r = run("divider", "--ratio", "100", "--input-resistance", "10M", "--cable-c", "90p", "--voltage", "5k",
            "--monte-carlo", "2000", "--seed", "3", "--report", out)
    assert r.exit_code == 0, r.output
    seen = browser.load(out)
    assert seen["console"] == [] and seen["external"] == []
    for h in ("Design", "Tolerance budget", "Monte Carlo", "High-voltage cautions", "Pictures"):
        assert h in seen["headings"], h
    assert len(seen["images"]) == 2 and all(i["width"] > 0 for i in seen["images"])


@pytest.mark.parametrize("name, why", [("r.txt", "name it with .html"),
                                       ("missing/r.html", "does not exist")])
def test_bad_report_path_is_refused_before_work(probe_csv, tmp_path, name, why):
    r = CliRunner().invoke(main, ["diagnose", str(probe_csv), "--report", str(tmp_path / name)])
    assert r.exit_code == 2 and why in r.output
    assert not (tmp_path / name).exists()


def test_report_may_not_overwrite_the_input(probe_csv, tmp_path):
    spec = tmp_path / "chain.html"
    spec.write_text("x")
    r = run("bandwidth", spec, "--report", spec)
    assert r.exit_code == 2 and "the input" in r.output
    assert spec.read_text() == "x"


def test_batch_report_links_each_capture(tmp_path, browser):
    """The overview of a batch: every capture a row, linked to its own report; a broken one
    named among those not diagnosed."""
    folder = tmp_path / "drawer"
    folder.mkdir()
    write_capture(folder / "a.csv", 0.05, seed=32, periods=4)
    write_capture(folder / "b.csv", -0.03, seed=33, periods=4)
    (folder / "c.csv").write_text("not a capture\n")
    out, page = tmp_path / "out", tmp_path / "overview.html"
    r = run("batch", folder, "--jobs", "1", "--out", out, "--report", page)
    assert r.exit_code == 1, r.output
    for html in (out / "index.html", page):
        seen = browser.load(html)
        assert seen["console"] == [] and seen["external"] == []
        for h in ("Inputs", "Captures", "Captures not diagnosed", "Pictures"):
            assert h in seen["headings"], h
        assert len(seen["images"]) == 1 and seen["images"][0]["width"] > 0
    text = page.read_text()
    assert 'href="out/a_csv.html"' in text and 'href="out/b_csv.html"' in text
    assert (out / "a_csv.html").exists() and not (out / "c_csv.html").exists()
    assert "c.csv: unreadable" in text
