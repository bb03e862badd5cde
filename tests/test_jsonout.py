"""The fast JSON writers give the reference writer's text byte for byte.

:func:`dumps_reference` is the standard library's indenting encoder followed
by the flattening of number lists, the writer every stored output was made
with.  :func:`enumerator.render.jsonout.dumps` writes through orjson where
that gives the same text and otherwise through :func:`dumps_onepass` (one
pass, the standard library's C encoder for containers of scalars, repeated
ones remembered).  The property: any JSON-able document gives the same text
from all three (``json`` module semantics, Python documentation; the cases
below are common practice for encoders: types that compare equal but print
differently, signed zeros, non-finite floats, non-string keys, brackets
inside strings).  Where orjson's text differs from the standard library's
(numbers below 1e-4, NaN and infinities, enums and UUIDs, big integers;
orjson's README, "Serialize", checked here on orjson 3.13) the document must
go the one-pass way; every document of a corpus of commands must go the
orjson way and give the reference's bytes.
"""

from __future__ import annotations

import enum
import math
import uuid

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from enumerator.render import jsonout
from enumerator.render.jsonout import dumps, dumps_onepass, dumps_reference

SCALARS = (
    st.none()
    | st.booleans()
    | st.integers(min_value=-(10**20), max_value=10**20)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.sampled_from([0.0, -0.0, 1.0, 1, True, 1e-05, 1e16, -2.5])
    | st.text(max_size=8)
    | st.sampled_from(["[1,  2]", "[ -0.5 ,1e+3 ]", "x [1]", "é", "\n[2,\n3]"])
)
KEYS = st.text(max_size=5) | st.sampled_from(["[1,  2]", "a"]) | st.integers(-3, 3) | st.booleans() | st.none()
DOCS = st.recursive(
    SCALARS,
    lambda inner: st.lists(inner, max_size=5) | st.tuples(inner, inner) | st.dictionaries(KEYS, inner, max_size=5),
    max_leaves=40,
)


@settings(max_examples=400, deadline=None, derandomize=True)  # the same draws every run (reproducible CI)
@given(DOCS)
def test_any_document_is_written_as_the_reference_writes_it(doc):
    ref = dumps_reference(doc)
    assert dumps(doc) == ref
    assert dumps_onepass(doc) == ref


@pytest.mark.parametrize(
    "doc",
    [
        # equal keys, different text: the memo must keep them apart
        [{"x": 1}, {"x": 1.0}, {"x": True}, {"x": 0.0}, {"x": -0.0}],
        [{"p": [0.0, 1.0]}, {"p": [-0.0, 1.0]}, {"p": [0, 1]}, {"p": [0.0, 1]}],
        [[1, 2], [1.0, 2.0], [True, 2], ["a", 1], ["a", 1.0]],
        {"p": [math.nan, 1.0], "q": [math.inf], "r": {"s": -math.inf}},
        {"a": [], "b": {}, "c": [[]], "d": [{}], "e": ()},
        {2: "int key", 1.5: "float key", None: "none key", True: "bool key"},
        {"sites": [{"position": [0.0, -0.525731, 0.850651], "ligand": "a", "unit": 1}] * 3},
    ],
)
def test_edge_documents(doc):
    assert dumps(doc) == dumps_reference(doc)
    assert dumps_onepass(doc) == dumps_reference(doc)


def test_an_unknown_type_is_refused_as_json_refuses_it():
    with pytest.raises(TypeError):
        dumps({"x": {1, 2}})
    with pytest.raises(TypeError):
        dumps_reference({"x": {1, 2}})


class _Colour(enum.Enum):
    RED = 1


class _Text(str):
    pass


class _Number(enum.IntEnum):
    ONE = 1


def _nested(depth):
    doc: list = []
    inner = doc
    for _ in range(depth):
        inner.append([])
        inner = inner[0]
    return doc


# Each document orjson would write otherwise than the standard library (orjson 3.13, checked by hand:
# 1e-05 as 0.00001, 1e-07 as 1e-7, NaN and infinities as null, an Enum member as its value, a UUID as
# its text, 2**64 refused, a non-string key refused, nesting past 255 refused): the orjson route must decline it.
DECLINED = [
    {"x": 1e-05},
    {"x": [2.5e-05, 1.0]},
    {"x": -1e-07},
    {"x": 5e-324},
    {"x": math.nan},
    {"x": [1.0, -math.inf]},
    {"x": math.inf, "y": [math.inf, math.inf]},
    {"x": 2**64},
    {"x": -(2**63) - 1},
    {1: "int key"},
    {"x": _Text("a str subclass")},
    {"x": _Number.ONE},
    {_Text("key"): 1},
    _nested(300),  # orjson refuses nesting deeper than 255
]


@pytest.mark.parametrize("doc", DECLINED)
def test_documents_orjson_writes_otherwise_go_the_one_pass_way(doc):
    pytest.importorskip("orjson")
    assert jsonout._orjson_text(doc) is None
    assert dumps(doc) == dumps_reference(doc)


@pytest.mark.parametrize("doc", [{"x": _Colour.RED}, {"x": uuid.UUID(int=1)}, {"x": {1, 2}}, {"x": b"1"}])
def test_types_the_reference_refuses_are_refused(doc):
    # orjson writes enums and UUIDs; the reference (the standard library) refuses them, and so must dumps
    pytest.importorskip("orjson")
    assert jsonout._orjson_text(doc) is None
    with pytest.raises(TypeError):
        dumps_reference(doc)
    with pytest.raises(TypeError):
        dumps(doc)


@pytest.mark.parametrize(
    "doc",
    [
        # numbers at the edges of float.__repr__'s fixed and exponent forms (Python documentation,
        # "Floating Point Arithmetic"): the same text from orjson
        {"x": [1e-04, 0.0001234, 1e15, 1e16, 1.2345678901234568e17, 1.7976931348623157e308, -0.0, 0.0]},
        {"x": "text with e-5 and 0.00001 inside a string is not a number"},
        {"s": 'é \u2028 \x7f \x00 \x1f " \\ \U0001f600', "t": "[1,  2] [ -0.5 ,1e+3 ]"},
        {"big": [2**63 - 1, -(2**63), 2**64 - 1]},
        # Unicode spaces and digits inside strings: the reference's str pattern takes them as \s and \d
        # (Python documentation, "re": Unicode matching is the default for str patterns)
        {"s": ["[1,\u00a02]", "[\u0663,\u20031]", "[1,\u2028 2]"], "p": [0.5, 1.0]},
    ],
)
def test_orjson_route_matches_the_reference_at_the_edges(doc):
    pytest.importorskip("orjson")
    text = jsonout._orjson_text(doc)
    ref = dumps_reference(doc)
    assert text in (None, ref)  # None only where a string looks like a small number
    if "text with" not in str(doc):
        assert text == ref


#: Commands whose JSON documents make the corpus (every command with --json, common practice: the
#: documents the test suite and the README produce).
CORPUS = [
    ["isomers", "Ma3b3c3d3", "-g", "IC-12", "--json"],
    ["isomers", "Ma2b2c2", "--json"],
    ["isomers", "M(AA)2b2", "--json"],
    ["isomers", "[Fe(CN)5(NO)]2-", "--json"],
    ["isomers", "[RuCl2(CO)2(PPh3)2]", "--json"],
    ["isomers", "Mabcdefgh", "-g", "CU-8", "--json"],
    ["isomers", "[Mo(CO)3(PPh3)3]", "--json"],
    ["bands", "[Cr(CO)6]", "--json"],
    ["bands", "[Mo(CO)3(PPh3)3]", "--json"],
    ["match", "[Mo(CO)3(PPh3)3]", "--bands", "1950,1860,1840", "--json"],
    ["match", "Ma3b3", "--reporter", "a=CO", "--bands", "2050,1975,1947", "--json"],
    ["route", "[PtCl4]2-", "--target", "cis-[PtCl2(NH3)2]", "--json"],
    ["network", "[Cr(CO)6]", "--target", "[Cr(CO)3(PPh3)3]", "--json"],
    ["count", "M(AA)b4", "--span", "AA=trans", "--json"],
    ["chartable", "Ih", "--json"],
    ["ligands", "--json"],
    ["geometries", "--json"],
    ["job", "examples/ruthenium/ru_dicarbonyl.toml", "--format", "json"],
    ["batch", "examples/iron/screen.txt", "--format", "json"],
]


@pytest.mark.parametrize("args", CORPUS, ids=lambda a: " ".join(a[:3]))
def test_every_command_document_goes_the_orjson_way_with_the_reference_bytes(args, monkeypatch):
    pytest.importorskip("orjson")
    from pathlib import Path

    from _cli import cli

    monkeypatch.chdir(Path(__file__).resolve().parent.parent)
    seen = []
    orjson_text = jsonout._orjson_text

    def spy(doc):
        text = orjson_text(doc)
        seen.append((doc, text))
        return text

    monkeypatch.setattr(jsonout, "_orjson_text", spy)
    code, out, err = cli(args)
    assert code == 0, err
    assert seen
    for doc, text in seen:
        assert text is not None  # the fast route was taken
        assert text == dumps_reference(doc)
    assert out.endswith(seen[-1][1])
