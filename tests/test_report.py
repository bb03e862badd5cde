"""The HTML report and its files (the browser run is in test_browser.py)."""

from __future__ import annotations

import json
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import pandas as pd
import pytest
from _cli import cli

from enumerator.cli import main
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.model.composition import Composition, LigandKind
from enumerator.render import tables
from enumerator.render.drawing import JMOL_COLOURS
from enumerator.render.report import pair_grid_html, polyhedron_svg, render_report, report_files
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse
from enumerator.workflow.report import build_report
from enumerator.workflow.result import Result

HOSTILE = "<script>alert(1)</script>"


def _hostile():
    bad = LigandKind(HOSTILE, ('"><b onmouseover=x>',))
    comp = Composition(f"M{HOSTILE}6", ((bad, 6),))
    geo = load_rules().geometry("OC-6")
    return Result(comp, geo, "OC-6 as requested", enumerate_isomers(comp, geo), notes=(HOSTILE,))


@pytest.fixture(scope="module")
def ru_page():
    return render_report(build_report([("Ru-1", analyse("[RuCl2(CO)2(PPh3)2]")), analyse("M(AA)2b2")]))


def test_user_strings_are_escaped():
    page = render_report(build_report([(HOSTILE, _hostile())], title=HOSTILE))
    assert "<script" not in page and "<b onmouseover" not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "&#34;&gt;&lt;b onmouseover=x&gt;" in page or "&quot;&gt;&lt;b onmouseover=x&gt;" in page


def test_page_is_self_contained_and_deterministic(ru_page):
    results = [analyse("[RuCl2(CO)2(PPh3)2]"), analyse("M(AA)2b2")]
    assert render_report(build_report(results)) == render_report(build_report(results))  # same input, same bytes
    urls = set(re.findall(r"https?://[^\s\"'<>)]+", ru_page))
    assert urls <= {"http://www.w3.org/2000/svg"}  # only the SVG namespace name, never fetched
    for bad in ("<link", "<script", "@import", "<iframe", 'src="http'):
        assert bad not in ru_page
    assert "Safety" in ru_page and "Carbon monoxide" in ru_page  # the cautions of the safety module
    # 5 geometric / 6 stereoisomers of [RuCl2(CO)2(PPh3)2]; M(AA)2b2: trans and the cis pair (common practice)
    assert ru_page.count('class="card"') == 6 + 3


def test_no_raw_data_on_the_page(ru_page):
    text = re.sub(r"<[^>]+>", " ", re.sub(r'src="data:[^"]+"', "", ru_page.split("</style>", 1)[1]))
    for raw in (
        "null",
        "true",
        "false",
        "None",
        "True",
        "False",
        "_distinct",
        "pairs_listed",
        "{",
        "descriptor_detail",
    ):
        assert raw not in text.split(), raw


def test_nothing_repeated(ru_page):
    # each IUPAC name once (the isomer table), the pair grid once, each section once per complex
    name = "(OC-6-12)-dicarbonyldichloridobis(triphenylphosphane)ruthenium(II)"
    assert ru_page.count(name) == 1
    assert ru_page.count('class="grid"') == 2
    for title in ("<h3>Metal centre</h3>", "<h3>Isomer table</h3>"):
        assert ru_page.count(title) == 2 - (title == "<h3>Metal centre</h3>")  # letters have no metal centre


def test_summary_comes_first_and_typesets(ru_page):
    assert ru_page.index('id="summary"') < ru_page.index('id="complex-1"')
    assert "[RuCl<sub>2</sub>(CO)<sub>2</sub>(PPh<sub>3</sub>)<sub>2</sub>]" in ru_page
    assert "C<sub>2v</sub>" in ru_page and "B<sub>2u</sub>" in ru_page
    # the all-trans isomer (D2h) shows a single CO band, which tells it apart by IR counts from the isomers
    # with cis CO groups (two strong bands); the trans-CO isomer 2 (C2v) has one strong band as well (its A1
    # stretch is IR-allowed but carries no dipole change for exactly trans CO), so 2/5 falls to Raman
    # (Cotton, Chemical Applications of Group Theory, 3rd ed., ch. 10; from memory)
    assert "IR band counts tell apart 4 pair(s): 1a/5, 1b/5, 3/5, 4/5" in ru_page
    assert (
        "IR band patterns (equal counts;" in ru_page
        and "Raman band counts (not IR) tell apart 1 pair(s): 2/5" in ru_page
    )


def test_element_colours_are_jmols():
    # Jmol's element colours as pymatgen ships them (pymatgen/vis/ElementColorSchemes.yaml)
    from pymatgen.vis.structure_vtk import EL_COLORS

    for el, rgb in EL_COLORS["Jmol"].items():
        if el in JMOL_COLOURS:
            assert JMOL_COLOURS[el] == "#{:02X}{:02X}{:02X}".format(*rgb), el
    assert {"H", "C", "N", "O", "P", "Cl", "Fe", "Ru", "Pt"} <= set(JMOL_COLOURS)


def test_structure_drawing_has_a_legend_and_a_ring():
    from enumerator.render.drawing import donor_atoms, molecule_figure
    from enumerator.structures.result import structure_set

    res = analyse("[CpFe(CO)2Cl]")
    s = structure_set(res).structures[0]
    iso = res.isomers[0]
    atoms = donor_atoms(s, [site.position for site in iso.sites])
    fig = molecule_figure(s, [(site.ligand, (a,)) for site, a in zip(iso.sites, atoms)])
    assert sorted(t.get_text() for t in fig.legends[0].get_texts()) == ["C", "Cl", "Fe", "O"]
    ax = fig.axes[0]
    # the five ring carbons are bonded in a ring (C5 cycle: 5 C-C bonds), and the ring is bound through one
    # dashed line to its centroid instead of five M-C lines
    dashed = [ln for ln in ax.lines if ln.get_linestyle() not in ("-", "solid")]
    assert len(dashed) == 1
    texts = [t for t in ax.texts if t.get_text() in ("Cp", "CO", "Cl")]
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    renderer = FigureCanvasAgg(fig).get_renderer()
    boxes = [t.get_window_extent(renderer) for t in texts]
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            assert not boxes[i].overlaps(boxes[j]), (texts[i].get_text(), texts[j].get_text())


def test_polyhedron_drawing_is_valid_svg_with_links():
    iso = analyse("M(AA)3").isomers[0]
    svg = polyhedron_svg(iso, ["AA"], "M")
    root = ET.fromstring(svg)  # well-formed XML
    ns = "{http://www.w3.org/2000/svg}"
    assert len(root.findall(f"{ns}circle")) == 6 + 1  # six donors and the metal
    assert len(root.findall(f"{ns}path")) == 3  # three chelate links in M(AA)3
    assert len(root.findall(f"{ns}line")) >= 12 + 6  # 12 octahedron edges, 6 M-donor bonds


def test_pair_grid_cis_trans_tetracarbonyl():
    # cis-M(CO)4L2 (C2v): 4 IR-active CO stretches; trans (D4h): 1 (Eu).
    # F. A. Cotton, Chemical Applications of Group Theory, 3rd ed. (1990), ch. 10 (from memory).
    res = analyse("Ma4b2", geometry="OC-6", reporters=(("a", "CO"),))
    top = {}
    for a in res.analyses:
        top.update(a.top_json())
    grid = pair_grid_html([i.id for i in res.isomers], top["pairs"])
    assert "IR" in grid and "none" not in grid.replace("none (hatched)", "")


def test_pair_grid_marks_indistinct_pairs_with_text_and_pattern():
    grid = pair_grid_html(
        ["1a", "1b"], [{"a": "1a", "b": "1b", "ir_distinct": False, "raman_distinct": False, "note": "enantiomers"}]
    )
    assert 'class="d0"' in grid and "none (enantiomers)" in grid  # text, not colour alone


def test_table_files_are_the_isomers_command_tables():
    # the report's CSV and LaTeX files come from the one writer of each kind (render/tables.py)
    res = analyse("[RuCl2(CO)2(PPh3)2]")
    files = dict(report_files(build_report([res])))
    stem = "01_RuCl2_CO_2_PPh3_2"
    assert sorted(files) == sorted(
        [f"{stem}.csv", f"{stem}.csv-metadata.json", f"{stem}.tex", "README.txt", "report.html"]
    )
    assert files[f"{stem}.csv"] == tables.csv(res)
    assert files[f"{stem}.tex"] == tables.latex(res)
    meta = json.loads(files[f"{stem}.csv-metadata.json"])
    assert any("Carbon monoxide" in x for x in meta["safety"]) and "Carbon monoxide" in files["README.txt"]
    tex = files[f"{stem}.tex"]
    assert "\\begin{longtable}" in tex and "\\bottomrule" in tex and "$C_{2v}$" in tex
    assert "M<script>alert(1)</script>6" in tables.latex(_hostile())  # LaTeX needs no HTML escaping


def test_tables_are_written_while_the_structures_are_embedded(tmp_path):
    # pending_report: the head is the report without its structures, the tables made from it are the finished
    # report's, and finishing gives what report_from_job gives (the page byte for byte; common practice)
    from enumerator.render.report import render_report, table_files
    from enumerator.workflow.report import pending_report, report_from_job

    job = tmp_path / "job.toml"
    job.write_text(
        'title = "t"\n[[complex]]\nformula = "[RuCl2(CO)2(PMe3)2]"\n[[complex]]\nformula = "Ma4b2"\n'
        'reporters = { a = "CO" }\n',
        encoding="utf-8",
    )
    heard: list[tuple[str, int, int]] = []
    with pending_report(str(job), progress=lambda *a: heard.append(a)) as pending:
        assert all(c.structures is None for c in pending.head.complexes)
        early = table_files(pending.head)
        done = pending.finish()
    assert done.complexes[0].structures is not None and done.complexes[1].structures is None
    # the progress bar hears of the analyses, the report parts, then each complex's structures
    assert heard[-2:] == [("3D structures of [RuCl2(CO)2(PMe3)2]", 1, 2), ("3D structures of Ma4b2", 2, 2)]
    assert early == table_files(done)
    assert render_report(done) == render_report(report_from_job(str(job)))


def test_each_complex_is_handed_over_as_soon_as_it_is_analysed(tmp_path):
    from enumerator.workflow.job import run_job_file

    job = tmp_path / "job.toml"
    job.write_text('[[complex]]\nformula = "Ma4b2"\n[[complex]]\nformula = "Ma3b3"\n', encoding="utf-8")
    seen = []
    result = run_job_file(str(job), each=seen.append)
    assert seen == list(result.results)


def test_report_model_holds_what_the_page_shows():
    rep = build_report([analyse("[RuCl2(CO)2(PPh3)2]"), analyse("Ma4b2", geometry="OC-6")], title="t")
    ru, ab = rep.complexes
    assert ru.cautions and not ab.cautions  # CO cautions for the carbonyl only
    assert [s.isomer_id for s in ru.spectra] == [i.id for i in ru.result.isomers]
    assert all(c.reporter_class == "CO" and c.pattern is not None for s in ru.spectra for c in s.classes)
    assert ab.spectra[0].classes == ()  # no reporter class on the letters
    assert ru.structures is not None and ab.structures is None  # letters are drawn on the polyhedron
    doc = rep.to_dict()
    assert doc["files"] == list(rep.files) and doc["complexes"][0]["result"]["formula"] == "[RuCl2(CO)2(PPh3)2]"


def test_report_command(tmp_path, capsys):
    job = tmp_path / "job.toml"
    job.write_text('title = "t"\n[[complex]]\nformula = "Ma4b2"\nreporters = { a = "CO" }\n', encoding="utf-8")
    out = tmp_path / "si"
    try:
        main(["report", str(job), "--out", str(out)])
    except SystemExit as exc:
        assert exc.code in (0, None)
    assert sorted(p.name for p in out.iterdir()) == [
        "01_Ma4b2.csv",
        "01_Ma4b2.csv-metadata.json",
        "01_Ma4b2.tex",
        "README.txt",
        "report.html",
    ]
    assert "<!DOCTYPE html>" in (out / "report.html").read_text()
    assert len(pd.read_csv(out / "01_Ma4b2.csv")) == 2  # cis and trans Ma4b2 (common practice)
    bad = tmp_path / "bad.toml"
    bad.write_text("[[complex]]\ngeometry = 'OC-6'\n", encoding="utf-8")
    try:
        main(["report", str(bad), "--out", str(tmp_path / "x")])
        code = 0
    except SystemExit as exc:
        code = exc.code
    err = capsys.readouterr().err
    assert code == 2 and err.count("\n") == 1 and "formula" in err
    assert not (tmp_path / "x" / "report.html").exists()


EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


@pytest.mark.parametrize(
    "job, complexes",
    [("ruthenium/ru_dicarbonyl.toml", 4), ("iron/fe_cyanide_nitrosyl.toml", 6)],
    ids=["ruthenium", "iron"],
)
def test_report_command_on_the_examples(tmp_path, job, complexes):
    # the checked-in job files use every key of the job format ([defaults], label, [[output]])
    out = tmp_path / "si"
    code, stdout, err = cli(["report", str(EXAMPLES / job), "--out", str(out)])
    assert code == 0 and err == "", err
    page = (out / "report.html").read_text(encoding="utf-8")
    assert page.count('<section id="complex-') == complexes
    assert len(list(out.glob("*.csv"))) == len(list(out.glob("*.tex"))) == complexes
    assert f"({complexes} complex(es))" in stdout
    for f in out.glob("*.csv"):
        df = pd.read_csv(f)  # the README's recipe: no options
        assert {"formula", "geometry", "isomer", "point group"} <= set(df.columns) and len(df) >= 1


# ---------------------------------------------------------------- drawings as scenes
def _inline_svgs(page: str) -> list[str]:
    return re.findall(r"<svg\b.*?</svg>", page, flags=re.S)


def test_inline_drawings_are_valid_svg_and_the_page_needs_no_matplotlib(ru_page):
    svgs = _inline_svgs(ru_page)
    # [RuCl2(CO)2(PPh3)2]: six structures and six spectrum drawings; M(AA)2b2: three polyhedra (common practice)
    assert len(svgs) == 6 + 6 + 3
    for svg in svgs:
        root = ET.fromstring(svg)  # well-formed XML (xml.etree)
        assert root.tag == "{http://www.w3.org/2000/svg}svg" and "id=" not in svg  # no ids to clash on the page
    assert 'src="data:' not in ru_page  # drawings are inline, not base64 pictures
    import subprocess
    import sys

    code = (
        "import sys; from enumerator.workflow.pipeline import analyse; from enumerator.workflow.report import "
        "build_report; from enumerator.render.report import render_report; "
        "render_report(build_report([analyse('[RuCl2(CO)2(PPh3)2]')])); print('matplotlib' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"


def test_one_drawing_per_distinct_spectrum(ru_page):
    # the enantiomers 1a/1b have the same predicted bands, so their cards hold the same drawing; the six cards
    # of [RuCl2(CO)2(PPh3)2] show five distinct spectra (five geometric isomers; common practice)
    spectra = [s for s in _inline_svgs(ru_page) if "wavenumber / cm" in s]
    assert len(spectra) == 6 and len(set(spectra)) == 5


def test_scene_text_is_escaped_and_svg_deterministic():
    from enumerator.render.scene import Label, Panel, Scene, scene_svg

    hostile = (("text", '<script>&"x"'), ("sub", "<b>"))
    scene = Scene(100.0, 60.0, (Panel((0.1, 0.1, 0.8, 0.8), (0.0, 1.0), (0.0, 1.0), (Label(0.5, 0.5, hostile),)),))
    svg = scene_svg(scene)
    root = ET.fromstring(svg)
    assert "<script" not in svg and "<b>" not in svg
    assert "".join(root.itertext()).strip() == '<script>&"x"<b>'
    assert scene_svg(scene) == svg  # same scene, same bytes


def test_one_scene_two_renderers_draw_the_same_things():
    from enumerator.render.drawing import donor_atoms, molecule_scene
    from enumerator.render.scene import Disc, Line, scene_figure, scene_svg
    from enumerator.structures.result import structure_set

    res = analyse("[CpFe(CO)2Cl]")
    s = structure_set(res).structures[0]
    atoms = donor_atoms(s, [site.position for site in res.isomers[0].sites])
    scene = molecule_scene(s, [(site.ligand, (a,)) for site, a in zip(res.isomers[0].sites, atoms)])
    items = scene.panels[0].items
    root = ET.fromstring(scene_svg(scene))
    ns = "{http://www.w3.org/2000/svg}"
    fig = scene_figure(scene)
    ax = fig.axes[0]
    n_lines, n_discs = sum(isinstance(i, Line) for i in items), sum(isinstance(i, Disc) for i in items)
    assert len(root.findall(f".//{ns}polyline")) == len(ax.lines) == n_lines
    keys = len(scene.legend)  # the element keys are discs too in the SVG, a legend in matplotlib
    assert len(root.findall(f".//{ns}circle")) == n_discs + keys and len(ax.patches) == n_discs
    assert sorted(t.get_text() for t in fig.legends[0].get_texts()) == ["C", "Cl", "Fe", "O"]


@pytest.mark.parametrize(
    "lo, hi, n", [(1908.0, 2075.0, 9), (0.0, 1.25, 3), (1800.0, 2200.0, 9), (0.0, 3.7, 4), (1870.0, 2062.0, 9)]
)
def test_ticks_are_matplotlibs(lo, hi, n):
    # the tick values matplotlib's MaxNLocator picks with the same steps, inside the range, and the labels its
    # default ScalarFormatter writes for them (reference library)
    from matplotlib.figure import Figure
    from matplotlib.ticker import MaxNLocator

    from enumerator.render.scene import nice_ticks

    ref = [v for v in MaxNLocator(nbins=n, steps=[1, 2, 2.5, 5, 10]).tick_values(lo, hi) if lo <= v <= hi]
    ticks = nice_ticks(lo, hi, n)
    assert [v for v, _ in ticks] == pytest.approx(ref)
    ax = Figure().add_subplot()
    ax.set_xlim(lo, hi)
    ax.set_xticks(ref)
    labels = ax.xaxis.get_major_formatter().format_ticks(ref)
    assert [t for _, t in ticks] == [x.replace("\u2212", "-") for x in labels]
