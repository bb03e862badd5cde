"""The HTML report and its tables (the browser run is in test_browser.py)."""

from __future__ import annotations

import csv
import io
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from _cli import cli

from enumerator.cli import main
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.model.composition import Composition, LigandKind
from enumerator.render import tables
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


def test_user_strings_are_escaped():
    page = render_report(build_report([_hostile()], title=HOSTILE))
    assert "<script" not in page and "<b onmouseover" not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "&quot;&gt;&lt;b onmouseover=x&gt;" in page


def test_page_is_self_contained_and_deterministic():
    results = [analyse("[RuCl2(CO)2(PPh3)2]"), analyse("M(AA)2b2")]
    a, b = render_report(build_report(results)), render_report(build_report(results))
    assert a == b  # same input, same bytes
    urls = set(re.findall(r"https?://[^\s\"'<>)]+", a))
    assert urls <= {"http://www.w3.org/2000/svg"}  # only the SVG namespace name, never fetched
    for bad in ("<link", "<script", "@import", "<iframe", 'src="http'):
        assert bad not in a
    assert "Safety" in a and "Carbon monoxide" in a  # the cautions of the safety module
    assert (
        a.count('class="card"') == 6 + 3
    )  # Ma2b2c2-type 5 geometric/6 stereo; M(AA)2b2: trans + cis pair (common practice)


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
    assert sorted(files) == ["01_RuCl2_CO_2_PPh3_2.csv", "01_RuCl2_CO_2_PPh3_2.tex", "report.html"]
    assert files["01_RuCl2_CO_2_PPh3_2.csv"] == tables.csv(res)
    assert files["01_RuCl2_CO_2_PPh3_2.tex"] == tables.latex(res)
    rows = list(csv.reader(io.StringIO(files["01_RuCl2_CO_2_PPh3_2.csv"])))
    assert rows[0][:4] == ["formula", "geometry", "isomer", "point group"] and rows[6][0].startswith("[RuCl2")
    tex = files["01_RuCl2_CO_2_PPh3_2.tex"]
    assert "\\begin{tabular}" in tex and "\\bottomrule" in tex and "$C_{2v}$" in tex
    assert "M<script>alert(1)</script>6" in tables.latex(_hostile())  # LaTeX needs no HTML escaping


def test_report_model_holds_what_the_page_shows():
    rep = build_report([analyse("[RuCl2(CO)2(PPh3)2]"), analyse("Ma4b2", geometry="OC-6")], title="t")
    ru, ab = rep.complexes
    assert ru.cautions and not ab.cautions  # CO cautions for the carbonyl only
    assert [s.isomer_id for s in ru.spectra] == [i.id for i in ru.result.isomers]
    assert all(c.reporter_class == "CO" and c.pattern is not None for s in ru.spectra for c in s.classes)
    assert ab.spectra[0].classes == ()  # no reporter class on the letters
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
    assert sorted(p.name for p in out.iterdir()) == ["01_Ma4b2.csv", "01_Ma4b2.tex", "report.html"]
    assert "<!DOCTYPE html>" in (out / "report.html").read_text()
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
