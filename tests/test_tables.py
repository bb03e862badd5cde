"""The one table model and its writers: DataFrame, CSV (plain, with a sidecar), LaTeX (compiled), Markdown."""

from __future__ import annotations

import csv
import io
import json
import re
import shutil
import subprocess
from dataclasses import dataclass, replace
from types import MappingProxyType

import pandas as pd
import pytest

from enumerator.render import tables
from enumerator.render.tables import csv as to_csv
from enumerator.render.tables import latex, markdown
from enumerator.render.typeset import formula_html, formula_tex, latex_species, latex_symbol
from enumerator.workflow.pipeline import Request, analyse, run
from enumerator.workflow.table import TableColumn, analysis_columns


@pytest.mark.parametrize(
    "label, tex",
    [  # Schoenflies and Mulliken typography as printed in Cotton, Chemical Applications of Group Theory
        ("C2v", "$C_{2v}$"),
        ("D4h", "$D_{4h}$"),
        ("Oh", "$O_{h}$"),
        ("Td", "$T_{d}$"),
        ("Cs", "$C_{s}$"),
        ("C1", "$C_{1}$"),
        ("S4", "$S_{4}$"),
        ("Dinfh", "$D_{\\infty h}$"),
        ("Cinfv", "$C_{\\infty v}$"),
        ("A1g", "$A_{1g}$"),
        ("E'", "$E'$"),
        ("E''", "$E''$"),
        ("A2''", "$A_{2}''$"),
        ("T1u", "$T_{1u}$"),
        ("B2", "$B_{2}$"),
        ("E", "$E$"),
        ("Ag", "$A_{g}$"),
        ("Sigma_g+", "$\\Sigma_{g}^{+}$"),
    ],
)
def test_latex_symbols(label, tex):
    assert latex_symbol(label) == tex


def test_latex_species():
    assert latex_species("2A1 + B1 + B2") == "$2A_{1} + B_{1} + B_{2}$"
    assert latex_species("A1' + E'") == "$A_{1}' + E'$"


@pytest.mark.parametrize(
    "formula, tex, html",
    [  # counts as subscripts, charges and mass numbers as superscripts: IUPAC 2005 IR-3.3 and IR-4.3 (common practice)
        ("[Fe(CN)5(NO)]2-", "[Fe(CN)$_{5}$(NO)]$^{2-}$", "[Fe(CN)<sub>5</sub>(NO)]<sup>2-</sup>"),
        (
            "[Co(NH3)4Cl2]+",
            "[Co(NH$_{3}$)$_{4}$Cl$_{2}$]$^{+}$",
            "[Co(NH<sub>3</sub>)<sub>4</sub>Cl<sub>2</sub>]<sup>+</sup>",
        ),
        ("[Cr(CO)5(13CO)]", "[Cr(CO)$_{5}$($^{13}$CO)]", "[Cr(CO)<sub>5</sub>(<sup>13</sup>CO)]"),
        ("Ma2b2c2", "Ma$_{2}$b$_{2}$c$_{2}$", "Ma<sub>2</sub>b<sub>2</sub>c<sub>2</sub>"),
        ("(η5-C5H5)Fe(CO)2Cl", None, "(η<sup>5</sup>-C<sub>5</sub>H<sub>5</sub>)Fe(CO)<sub>2</sub>Cl"),
    ],
)
def test_formulas_are_typeset(formula, tex, html):
    if tex is not None:
        assert formula_tex(formula) == tex
    assert formula_html(formula) == html


@dataclass(frozen=True)
class _Fake:
    """An analysis of the test's own, with columns registered the way a new stage registers them."""

    def isomer_json(self, i):
        return {}

    def top_json(self):
        return {}


@analysis_columns.register(_Fake)
def _fake_columns(a):
    return (
        TableColumn("extra species", "species", MappingProxyType({"1": "A1 + E", "2": "A1"})),
        TableColumn("note|x", "text", MappingProxyType({"1": 'a_b, "q" <b>', "2": "=SUM(A1:A9)"})),
    )


@pytest.fixture(scope="module")
def res():
    r = run(Request("[Fe(CN)4(CO)2]2-"))
    return replace(r, analyses=r.analyses + (_Fake(),))


def test_dataframe_has_the_documented_columns():
    df = analyse("[RuCl2(CO)2(PPh3)2]").to_dataframe()
    assert list(df.columns) == [
        "formula",
        "geometry",
        "isomer",
        "point group",
        "chiral",
        "enantiomer",
        "descriptor",
        "prefix",
        "IUPAC name",
        "CO species",
        "CO IR",
        "CO IR predicted weak",  # isomer 2 (trans CO) has one IR-allowed band at zero bond-dipole intensity
        "CO Raman",
        "CO 13C NMR",
        "NMR environments",
        "sites",
    ]
    # five geometric isomers, one of them chiral: 6 stereoisomers (Housecroft & Sharpe, Inorganic Chemistry,
    # 4th ed., ch. 19, stereoisomers of octahedral MX2Y2Z2; from memory)
    assert len(df) == 6 and df["CO IR"].dtype == "int64"
    # all-trans D2h isomer: one IR-active CO band (B2u); Cotton, Chemical Applications of Group Theory, ch. 10
    assert df.set_index("isomer").loc["5", ["point group", "CO IR"]].tolist() == ["D2h", 1]


def test_csv_loads_with_a_bare_read_csv(res, tmp_path):
    # the README's pandas recipe: pd.read_csv(path) with no options gives one row per isomer
    p = tmp_path / "fe.csv"
    p.write_text(to_csv(res), encoding="utf-8")
    df = pd.read_csv(p)
    assert len(df) == len(res.isomers) == 2  # cis and trans [Fe(CN)4(CO)2]2- (common practice)
    assert list(df["point group"]) == ["C2v", "D4h"] and df["isomer"].dtype == "int64"
    # two CO cis (C2v): A1 + B1, two IR bands; trans (D4h): A1g + A2u, one (Cotton, Chemical Applications of
    # Group Theory, 3rd ed., ch. 10; from memory)
    assert df["CO IR"].tolist() == [2, 1]
    text = to_csv(res)
    assert "\r\n" in text and "#" not in text.splitlines()[1]  # RFC 4180 line ends, no comment rows
    recs = list(csv.reader(io.StringIO(text, newline="")))
    assert all(len(r) == len(recs[0]) for r in recs)
    assert "'=SUM(A1:A9)" in text  # a formula a spreadsheet would run is neutralised (OWASP, CSV injection)


def test_csv_sidecar_holds_the_cautions(res):
    meta = json.loads(tables.csv_metadata(res.to_dataframe(), "fe.csv", title="t", cautions=["CN caution"]))
    assert meta["@context"] == "http://www.w3.org/ns/csvw" and meta["url"] == "fe.csv"  # W3C CSVW (2015)
    assert meta["safety"] == ["CN caution"]
    titles = [c["titles"] for c in meta["tableSchema"]["columns"]]
    assert titles == list(res.to_dataframe().columns)


def test_latex_typesets_and_escapes(res):
    t = latex(res)
    for cmd in ("\\toprule", "\\midrule", "\\bottomrule", "\\begin{longtable}", "\\caption{", "\\label{tab:"):
        assert cmd in t
    assert "$C_{2v}$" in t and "$D_{4h}$" in t and "$A_{1}$ + $E$" in t
    assert "[Fe(CN)$_{4}$(CO)$_{2}$]$^{2-}$" in t  # the caption's formula
    assert "CO $^{13}$C NMR" in t
    assert "\\_b" in t and "HCN" in t and "<b>" in t


def test_titles_in_latex_comments_cannot_start_a_line():
    from enumerator.render.tables import latex_comment

    line = latex_comment("x\n\\input{/etc/passwd}\r\u2028y")
    assert "\n" not in line and "\r" not in line and "\\input{" not in line
    assert line.startswith("% x \\textbackslash{}input")


def test_markdown(res):
    m = markdown(res)
    lines = m.splitlines()
    head = next(ln for ln in lines if ln.startswith("| isomer"))
    sep = lines[lines.index(head) + 1]
    assert sep.count("|") == head.count("|") - head.count("\\|")
    assert "C<sub>2v</sub>" in m and "A<sub>1</sub> + E" in m and "note\\|x" in m and "Safety" in m
    assert "<b>" not in m and "&lt;b&gt;" in m  # HTML in a cell is text
    assert "[Fe(CN)<sub>4</sub>(CO)<sub>2</sub>]<sup>2-</sup>" in m


def test_an_analysis_without_columns_adds_none(res):
    from enumerator.render.sections import result_sections, sections

    assert analysis_columns(object()) == () and sections(object()) == ()
    assert [c.header for c in analysis_columns(res.analyses[-1])] == ["extra species", "note|x"]
    assert all(s.title for s in result_sections(res))


def test_json_shape_is_defined_by_the_result():
    from enumerator.render.jsonout import result_to_dict

    r = run(Request("[Fe(CN)4(CO)2]2-"))
    doc = r.to_dict()
    assert result_to_dict(r) == doc
    assert list(doc)[:9] == [
        "schema_version",
        "formula",
        "geometry",
        "geometry_reason",
        "stereoisomers",
        "geometric_isomers",
        "complete",
        "isomers",
        "notes",
    ]
    assert {"centre", "safety", "descriptor_rules", "pairs", "pair_tally"} <= set(doc)


def test_notebook_view_is_compact():
    r = analyse("[RuCl2(CO)2(PPh3)2]")
    assert len(repr(r)) < 120 and "[RuCl2(CO)2(PPh3)2]" in repr(r)
    page = r._repr_html_()
    assert page.count("<tr") == 1 + 6 and "Safety" in page and "IUPAC name" not in page


_COMPILE = [
    "[RuCl2(CO)2(PPh3)2]",  # a turned table with a names table
    "[Fe(CN)4(CO)2]2-",
    "[RuHCl(CO)(PPh3)(py)(NH3)]",  # 30 stereoisomers: the longtable breaks across pages
    "M(AA)2b2",
    "[Mo(CO)3(PMe3)3]",
    "(η5-C5H5)Fe(CO)2Cl",
]


@pytest.mark.skipif(not shutil.which("pdflatex"), reason="pdflatex is missing (.ci/run installs texlive-latex-base)")
@pytest.mark.parametrize("preamble", ["", "\\usepackage[a4paper,margin=25mm]{geometry}"], ids=["article", "a4"])
def test_latex_compiles_without_overfull_boxes(tmp_path, preamble):
    body = "\n".join(latex(analyse(f)) for f in _COMPILE)
    hostile = tables.latex_comment("x\n\\input{/etc/passwd}")
    doc = "\n".join(
        [
            "\\documentclass{article}",
            preamble,
            tables.LATEX_PACKAGES,
            "\\begin{document}",
            hostile,
            body,
            "\\end{document}",
        ]
    )
    (tmp_path / "si.tex").write_text(doc, encoding="utf-8")
    run_ = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", "si.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=300,
    )
    log = (tmp_path / "si.log").read_text(encoding="utf-8", errors="replace")
    assert run_.returncode == 0, log[-3000:]
    assert not re.findall(r"Overfull \\[hv]box.*", log), re.findall(r"Overfull \\[hv]box.*", log)
    assert "(/etc/passwd" not in log  # TeX logs every file it opens as "(path"
