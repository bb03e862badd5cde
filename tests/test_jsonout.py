"""The fast JSON writer gives the reference writer's text byte for byte.

:func:`enumerator.render.jsonout.dumps` writes the document in one pass,
using the standard library's C encoder for containers of scalars and
remembering the text of repeated ones; :func:`dumps_reference` is the
standard library's indenting encoder followed by the flattening of number
lists, the writer every stored output was made with.  The property: any
JSON-able document gives the same text from both (``json`` module
semantics, Python documentation; the cases below are common practice for
encoders: types that compare equal but print differently, signed zeros,
non-finite floats, non-string keys, brackets inside strings).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from enumerator.render.jsonout import dumps, dumps_reference

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
    assert dumps(doc) == dumps_reference(doc)


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


def test_an_unknown_type_is_refused_as_json_refuses_it():
    with pytest.raises(TypeError):
        dumps({"x": {1, 2}})
    with pytest.raises(TypeError):
        dumps_reference({"x": {1, 2}})
