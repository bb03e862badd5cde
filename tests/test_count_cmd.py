"""The up-front Burnside count (enumerator.isomers.counting) and `isosieve count`.

The chelate extension of the count (placement cycles + bit-mask DP) is
checked against the enumerator, which works by a different method
(stabiliser-chain orbit construction), and against textbook counts.
"""

from __future__ import annotations

import io
import json
from contextlib import redirect_stderr, redirect_stdout

import pytest
from support.golden import GOLDEN, GOLDEN_DIR  # tests/ is on sys.path under pytest

from enumerator.cli import main
from enumerator.errors import InputError
from enumerator.isomers.counting import CountResult, GeometryCount, burnside_counts, count_isomers
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.parse.abstract import parse_abstract
from enumerator.render.count import render_count
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import apply_settings
from enumerator.workflow.queries import count_formula

RULES = load_rules()

CHELATES = [
    "M(AA)2b2",
    "M(AB)2b2",
    "M(AA)3",
    "M(AB)3",
    "M(AAA)b3",
    "M(ABA)b3",
    "M(ABC)b3",
    "M(ring)a3",
    "M(ring)abc",
    "M(AB)abcd",
    "M(AA)b2c2",
    "M(AB)a2bc",
    "M(AA)4",
    "M(AB)4",
    "M(AB)ab",
    "M(AA)ab",
    "M(ABC)(AB)ab",
    "M(AA)(AB)ab",
    "M(AB)(AB)",
    "M(AB)a",
    "M(AAA)(AB)abc",
    "M(AA)2",
    "M(AB)2a2b",
    "M(ABA)(AA)",
    "M(AA)a2b",
    # tripods (a face each) and eta-rings (one site of the largest site stabiliser)
    "M(ring)a",
    "M(ring)2",
    "M(ring)a2",
    "M(ring)ab",
    "M{AAA}",
    "M(ring)2ab",
    "M{AAA}b",
    "M{ABC}d",
    "M(ring)a2bc",
    "M(ring)2abc",
    "M{AAA}bc",
    "M{ABB}cd",
    "M(ring)(AA)bc",
    "M{AAA}b3",
    "M{ABB}cde",
    "M{AAA}2",
    "M(ring){AAA}ab",
    "M(ring)2a2bc",
    "M{ABC}(AB)c",
    "M(ring)a2b2c2",
    "M{AAA}b2cd",
    "M{AAA}(ring)a2b2",
    "M(ring)2{AAA}abc",
]
GEOMETRIES = [
    "L-2",
    "TP-3",
    "TPY-3",
    "TS-3",
    "T-4",
    "SP-4",
    "SS-4",
    "TBPY-5",
    "SPY-5",
    "OC-6",
    "TPR-6",
    "hexplane-6",
    "PBPY-7",
    "OCF-7",
    "TPRS-7",
    "CU-8",
    "SAPR-8",
    "HBPY-8",
    "DD-8",
]


def _enumerated(comp, geo) -> tuple[int, int]:
    try:
        s = enumerate_isomers(comp, geo)
    except InputError:
        return (0, 0)
    return (s.geometric_isomers, s.stereoisomers)


@pytest.mark.parametrize("symbol", GEOMETRIES)
def test_chelate_counts_agree_with_the_enumerator(symbol):
    # independent method: the enumerator's orbit construction (common practice: two methods must agree)
    geo = RULES.geometry(symbol)
    checked = 0
    for f in CHELATES:
        comp = parse_abstract(f)
        if comp.donor_count != geo.coordination_number:
            continue
        assert burnside_counts(comp, geo) == _enumerated(comp, geo), f
        checked += 1
    assert checked or symbol in ("TP-3",)


@pytest.mark.parametrize(
    "symbol,formula,spans,arrangements",
    [
        ("OC-6", "M(AA)b4", [("AA", "trans")], []),
        ("OC-6", "M(AA)2b2", [("AA", "any")], []),
        ("OC-6", "M(AAA)b3", [], [("AAA", "mer")]),
        ("OC-6", "M(ABA)(AB)b", [], [("ABA", "fac")]),
        ("CU-8", "M(AA)4", [("AA", "trans")], []),
        ("IC-12", "M(AA)6", [], []),
        ("IC-12", "M(ring)a3b3c3d2", [], []),
        ("IC-12", "M{AAA}a3b3c3", [], []),
    ],
)
def test_span_and_arrangement_settings_agree(symbol, formula, spans, arrangements):
    # independent method: the enumerator (common practice)
    geo = RULES.geometry(symbol)
    comp = apply_settings(parse_abstract(formula), spans, arrangements)
    assert burnside_counts(comp, geo) == _enumerated(comp, geo)


@pytest.mark.parametrize(
    "formula,expected",
    [
        ("M(AA)3", (1, 2)),  # Delta/Lambda tris-chelate; Cotton & Wilkinson, Advanced Inorganic Chemistry (from memory)
        ("M(AA)2b2", (2, 3)),  # trans + cis pair; Miessler & Tarr, Inorganic Chemistry (from memory)
        ("M(AB)3", (2, 4)),  # fac and mer, each chiral; Housecroft & Sharpe, Inorganic Chemistry (from memory)
        ("Mabcdef", (15, 30)),  # Miessler & Tarr, Inorganic Chemistry (from memory)
    ],
)
def test_textbook_counts(formula, expected):
    assert burnside_counts(parse_abstract(formula), RULES.geometry("OC-6")) == expected


def test_twelve_different_ligands_on_the_icosahedron():
    # 12!/60 rotations = 7,983,360 (no labelling is fixed by a non-identity op); Burnside's lemma by hand
    assert burnside_counts(parse_abstract("Mabcdefghijkl"), RULES.geometry("IC-12")) == (3991680, 7983360)


def test_donor_count_mismatch_is_none():
    assert burnside_counts(parse_abstract("Ma5"), RULES.geometry("OC-6")) is None


def _cli(args):
    out, err = io.StringIO(), io.StringIO()
    code = 0
    with redirect_stdout(out), redirect_stderr(err):
        try:
            main(args)
        except SystemExit as exc:
            code = exc.code or 0
    return code, out.getvalue(), err.getvalue()


def test_count_command_text_and_json():
    code, out, _ = _cli(["count", "M(AA)2b2"])
    assert code == 0 and "2 geometric isomer(s), 3 stereoisomer(s)" in out  # Miessler & Tarr (from memory)
    code, out, _ = _cli(["count", "Ma4b2", "--all", "--json"])
    doc = json.loads(out)
    got = {r["geometry"]: r["geometric_isomers"] for r in doc["counts"]}
    # the historical argument: octahedron 2, trigonal prism 3, hexagonal plane 3 (Werner; from memory)
    assert got["OC-6"] == 2 and got["TPR-6"] == 3 and got["hexplane-6"] == 3


def test_count_command_errors_are_one_line():
    code, out, err = _cli(["count", "M(AA)3", "-g", "TP-3"])
    assert code == 2 and out == "" and len(err.strip().splitlines()) == 1 and err.startswith("isosieve: error:")


def test_count_result_json_shape():
    # one geometry: the reason is reported; every geometry: it is not
    one = count_formula("Ma4b2", geometry="OC-6").to_dict()
    assert list(one) == ["formula", "method", "counts", "geometry_reason"]
    assert one["counts"] == [{"geometry": "OC-6", "name": "octahedron", "geometric_isomers": 2, "stereoisomers": 2}]
    every = count_formula("Ma4b2", every=True).to_dict()
    assert "geometry_reason" not in every
    assert [c["geometry"] for c in every["counts"]] == ["OC-6", "TPR-6", "hexplane-6"]


def test_unplaceable_ligands_are_said_in_text():
    res = CountResult("M(AA)3", (GeometryCount("TPR-6", "trigonal prism", 0, 0),))
    assert "cannot all be placed together" in render_count(res)


def test_count_isomers_runs_the_enumerators_checks():
    with pytest.raises(InputError):
        count_isomers(parse_abstract("Ma5"), [RULES.geometry("OC-6")])


@pytest.mark.parametrize("name", [n for n in GOLDEN if n.startswith("count_")])
def test_count_output_is_byte_identical(name):
    code, out, err = _cli(list(GOLDEN[name]))
    assert code == 0, err
    assert out.encode("utf-8") == (GOLDEN_DIR / name).read_bytes()
