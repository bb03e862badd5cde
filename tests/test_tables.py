"""Markdown, CSV and LaTeX tables."""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass, replace

import pytest

from enumerator.render.sections import Column, columns
from enumerator.render.tables import csv as to_csv
from enumerator.render.tables import latex, markdown
from enumerator.render.typeset import latex_species, latex_symbol
from enumerator.workflow.pipeline import Request, run


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


@dataclass(frozen=True)
class _Fake:
    """An analysis of the test's own, with columns registered the way a new stage registers them."""

    def isomer_json(self, i):
        return {}

    def top_json(self):
        return {}


@columns.register(_Fake)
def _fake_columns(a):
    return (
        Column("CO species", {"1": "A1 + E", "2": "A1"}, latex={"1": "$A_1 + E$", "2": "$A_1$"}),
        Column("note|x", {"1": 'a_b, "q"', "2": "50%"}),
    )


@pytest.fixture(scope="module")
def res():
    r = run(Request("[Fe(CN)4(CO)2]2-"))
    return replace(r, analyses=r.analyses + (_Fake(),))


def test_csv_roundtrip(res):
    text = to_csv(res)
    assert "\r\n" in text  # RFC 4180 line ends
    recs = list(csv.reader(io.StringIO(text, newline="")))
    assert recs[0][:5] == ["formula", "geometry", "isomer", "point group", "chiral"]
    data = [r for r in recs[1:] if not r[0].startswith("#")]
    assert [r[3] for r in data] == [i.point_group for i in res.isomers]
    assert 'a_b, "q"' in data[0]
    assert all(len(r) == len(recs[0]) for r in recs)
    assert any(r[0].startswith("# safety") for r in recs)  # cyanide and CO cautions


def test_latex(res):
    t = latex(res)
    for cmd in ("\\toprule", "\\midrule", "\\bottomrule", "\\begin{tabular}"):
        assert cmd in t
    assert "$C_{2v}$" in t and "$D_{4h}$" in t
    assert "$A_1 + E$" in t  # Column.latex used as given
    assert "50\\%" in t and "a\\_b" in t and "HCN" in t


def test_markdown(res):
    m = markdown(res)
    lines = m.splitlines()
    head = next(ln for ln in lines if ln.startswith("| isomer"))
    sep = lines[lines.index(head) + 1]
    assert sep.count("|") == head.count("|") - head.count("\\|")
    assert "C<sub>2v</sub>" in m and "note\\|x" in m and "Safety" in m


def test_an_analysis_without_renderers_adds_no_columns_or_sections(res):
    from enumerator.render.sections import result_sections, sections

    assert columns(object()) == () and sections(object()) == ()
    # the registered fake adds its two columns and no section
    assert [c.header for c in columns(res.analyses[-1])] == ["CO species", "note|x"]
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
