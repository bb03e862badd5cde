"""The HTML report in a real browser: Debian's Chromium driven by Playwright.

Playwright launches ``/usr/bin/chromium`` (its own browser download is not
used); ``.ci/run`` installs Chromium and poppler-utils with apt-get when they are
missing.  The tests skip, with the reason, only when the browser or the
Playwright package is absent.

For the ruthenium example (four complexes) and one complex with 30
stereoisomers, and for a page full of hostile strings, the tests check: no
console error, page error, dialog or network request; hostile strings shown as
text; no horizontal overflow at 1280 px; under print media every table fits the
printable width of A4 and Letter, and the PDF Chromium prints keeps the last
column of every isomer table; a screenshot that is not blank.
"""

from __future__ import annotations

import io
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.model.composition import Composition, LigandKind
from enumerator.render.report import render_report, report_files
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse
from enumerator.workflow.report import build_report, report_from_job
from enumerator.workflow.result import Result

CHROMIUM = "/usr/bin/chromium"
ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
]
HOSTILE = "<script>alert(1)</script>"
HOSTILE_DONOR = '"><img src=x onerror=alert(2)>'
EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
#: Printable width in CSS pixels (96 per inch) with the page's 12 mm margins: A4 is 210 mm wide, Letter 8.5 in
#: (ISO 216; ANSI/ASME Y14.1).
PRINTABLE = {"A4": (210 - 24) / 25.4 * 96, "Letter": (8.5 * 25.4 - 24) / 25.4 * 96}

pytestmark = pytest.mark.skipif(
    not Path(CHROMIUM).exists(), reason=f"no Chromium at {CHROMIUM} (.ci/run installs Debian's package)"
)


def _hostile_result() -> Result:
    bad = LigandKind(HOSTILE, (HOSTILE_DONOR,))
    comp = Composition(f"M{HOSTILE}6", ((bad, 6),))
    geo = load_rules().geometry("OC-6")
    return Result(comp, geo, "OC-6 as requested", enumerate_isomers(comp, geo), notes=(HOSTILE,))


@pytest.fixture(scope="module")
def browser():
    sync_api = pytest.importorskip("playwright.sync_api", reason="the playwright package is not installed")
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=ARGS)
        yield b
        b.close()


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    """The three report folders: the ruthenium example, a 30-isomer complex, a hostile page."""
    root = tmp_path_factory.mktemp("reports")
    job30 = root / "thirty.toml"
    job30.write_text(
        'title = "Thirty stereoisomers"\n[[complex]]\nlabel = "six different ligands"\n'
        'formula = "[RuHCl(CO)(PPh3)(py)(NH3)]"\n',
        encoding="utf-8",
    )
    reports = {
        "ruthenium": report_from_job(str(EXAMPLES / "ruthenium" / "ru_dicarbonyl.toml")),
        "thirty": report_from_job(str(job30)),
        "hostile": build_report([(HOSTILE, _hostile_result()), analyse("M(AA)2b2")], title=f"browser {HOSTILE}"),
    }
    out = {}
    for name, rep in reports.items():
        folder = root / name
        folder.mkdir()
        for fname, text in report_files(rep):
            (folder / fname).write_text(text, encoding="utf-8")
        out[name] = folder / "report.html"
    assert reports["thirty"].complexes[0].result.isomer_set.stereoisomers == 30  # Burnside count of Mabcdef, OC-6
    return out


def _open(browser, path: Path, width: int = 1280):
    """A page at the given width with every problem recorded: console errors, page errors, dialogs and any
    request that is not the file itself or a data: URI."""
    page = browser.new_page(viewport={"width": width, "height": 900})
    problems: list[str] = []
    page.on(
        "console", lambda m: problems.append(f"console {m.type}: {m.text}") if m.type in ("error", "assert") else None
    )
    page.on("pageerror", lambda e: problems.append(f"page error: {e}"))
    page.on("dialog", lambda d: (problems.append(f"dialog: {d.message}"), d.dismiss()))
    page.on(
        "request",
        lambda r: None if r.url.startswith(("file://", "data:")) else problems.append(f"request: {r.url}"),
    )
    page.goto(path.as_uri())
    page.wait_for_load_state("load")
    return page, problems


@pytest.mark.parametrize("name", ["ruthenium", "thirty", "hostile"])
def test_no_console_errors_dialogs_or_network(browser, pages, name):
    page, problems = _open(browser, pages[name])
    assert page.evaluate("document.querySelectorAll('script').length") == 0
    page.close()
    assert problems == []


def test_user_strings_are_text_not_markup(browser, pages):
    page, problems = _open(browser, pages["hostile"])
    got = page.evaluate(
        """() => ({
            text: document.body.innerText.includes('<script>alert(1)</script>'),
            title: document.title,
            scripts: document.querySelectorAll('script').length,
            onerror: document.querySelectorAll('[onerror]').length,
            cards: document.querySelectorAll('.card').length,
        })"""
    )
    page.close()
    assert got["scripts"] == 0 and got["onerror"] == 0 and problems == []
    assert got["text"] and got["title"] == f"browser {HOSTILE}"
    assert got["cards"] == 1 + 3  # M a6: one isomer; M(AA)2b2: trans and the cis pair (common practice)


@pytest.mark.parametrize("width", [1280, 800])
@pytest.mark.parametrize("name", ["ruthenium", "thirty", "hostile"])
def test_no_horizontal_overflow_at_1280_px(browser, pages, name, width):
    # 1280 px: a laptop screen; 800 px: half of one (the isomer table tightens below 64rem)
    page, _ = _open(browser, pages[name], width)
    widths = page.evaluate(
        """() => ({page: document.documentElement.scrollWidth,
                   widest: Math.max(...[...document.querySelectorAll('body *')]
                                         .map(e => e.getBoundingClientRect().right))})"""
    )
    page.close()
    assert widths["page"] <= width and widths["widest"] <= width, widths


@pytest.mark.parametrize("paper", ["A4", "Letter"])
@pytest.mark.parametrize("name", ["ruthenium", "thirty"])
def test_print_keeps_every_column(browser, pages, name, paper):
    width = int(PRINTABLE[paper])
    page, _ = _open(browser, pages[name], width)
    page.emulate_media(media="print")
    tables = page.evaluate(
        """() => [...document.querySelectorAll('table')].map(t => ({
            right: t.getBoundingClientRect().right, scroll: t.scrollWidth, client: t.clientWidth,
            cells: Math.max(...[...t.querySelectorAll('th,td')].map(c => c.getBoundingClientRect().right))}))"""
    )
    page.close()
    assert tables
    for t in tables:
        assert t["right"] <= width + 0.5 and t["cells"] <= width + 0.5 and t["scroll"] <= t["client"] + 1, t


@pytest.mark.skipif(not shutil.which("pdftotext"), reason="pdftotext (poppler-utils) is missing")
@pytest.mark.parametrize("name, tables", [("ruthenium", 4), ("thirty", 1)])
def test_printed_pdf_keeps_the_last_column(browser, pages, name, tables, tmp_path):
    page, _ = _open(browser, pages[name])
    page.emulate_media(media="print")
    pdf = tmp_path / "report.pdf"
    page.pdf(path=str(pdf), format="A4")
    page.close()
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True, check=True).stdout
    # every isomer table's header row ends with 'sites'; the card field 'sites (ligand: site numbers)' is counted apart
    heads = [ln for ln in text.splitlines() if ln.split()[:1] == ["isomer"] and ln.rstrip().endswith("sites")]
    assert len(heads) >= tables, heads
    # narrow print columns may wrap a two-word header ('NMR' over 'environments'), so look for the words
    assert "IUPAC name" in text and "environments" in text


@pytest.mark.parametrize("name", ["ruthenium", "thirty"])
def test_screenshot_is_not_blank(browser, pages, name, tmp_path):
    from PIL import Image

    page, _ = _open(browser, pages[name])
    png = page.screenshot(full_page=False)
    page.evaluate("document.querySelector('.card').scrollIntoView()")
    card = page.screenshot(full_page=False)
    page.close()
    for shot in (png, card):
        img = np.asarray(Image.open(io.BytesIO(shot)).convert("L"), dtype=float)
        assert img.shape == (900, 1280)
        assert img.std() > 10  # a blank page has std 0 (common practice threshold)
        assert (img < 128).mean() > 0.01  # at least 1 % dark pixels: text and drawings rendered


def test_same_page_twice_is_the_same_bytes(pages):
    rep = build_report([analyse("[CpFe(CO)2Cl]")])
    assert render_report(rep) == render_report(rep)


@pytest.mark.parametrize("media", ["screen", "print"])
@pytest.mark.parametrize("width", [1280, 400])
def test_inline_drawings_render_inside_their_cards(browser, pages, media, width):
    # every drawing is inline SVG laid out by the browser: it has a size, stays inside its card at a laptop
    # width, on a phone-sized screen and in print, and its texts are laid out (not empty boxes)
    page, problems = _open(browser, pages["ruthenium"], width)
    page.emulate_media(media=media)
    got = page.evaluate(
        """() => [...document.querySelectorAll('.card svg')].map(s => {
            const r = s.getBoundingClientRect(), c = s.closest('.card').getBoundingClientRect();
            const texts = [...s.querySelectorAll('text')];
            return {w: r.width, h: r.height, inside: r.left >= c.left - 0.5 && r.right <= c.right + 0.5,
                    texts: texts.length, laid: texts.filter(t => t.getBBox().width > 0).length};
        })"""
    )
    page.close()
    assert problems == [] and len(got) >= 2 * 24  # 24 isomers in the example: a structure and a spectrum each
    for g in got:
        assert g["w"] > 50 and g["h"] > 50 and g["inside"], g
        assert g["texts"] > 0 and g["laid"] == g["texts"], g
