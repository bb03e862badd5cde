"""The built-in geometries' stored symmetry (``rules/derived.json``) equals what the code derives now.

The reference is the derivation itself, run afresh
(:func:`enumerator.symmetry.derive.derive_operations_afresh`,
:func:`enumerator.symmetry.chartable.geometry_table_afresh`): every stored
operation and table must equal it, same dataclass values, same order, same
types; and the committed store must be what the writer writes today (else:
``python -m enumerator.rules.parsed``).  Vectors the store does not hold
exactly, and a damaged store, are derived as before.
"""

from __future__ import annotations

import dataclasses
import json
import shutil
from pathlib import Path
from typing import Any

import pytest

from enumerator import caches
from enumerator.rules import derived
from enumerator.rules.derived import FORMAT, SOURCE, STORE_NAME, build, entry_tables
from enumerator.rules.ruleset import BUILTIN_RULES, load_rules
from enumerator.symmetry import known
from enumerator.symmetry.chartable import character_table, geometry_table_afresh
from enumerator.symmetry.derive import derive_operations, derive_operations_afresh

STORE = BUILTIN_RULES / STORE_NAME


def _same(a: Any, b: Any) -> bool:
    """Equal values of equal types all the way down, through dataclasses and tuples (1 is not 1.0)."""
    if type(a) is not type(b):
        return False
    if dataclasses.is_dataclass(a) and not isinstance(a, type):
        return all(_same(getattr(a, f.name), getattr(b, f.name)) for f in dataclasses.fields(a))
    if isinstance(a, tuple):
        return len(a) == len(b) and all(_same(x, y) for x, y in zip(a, b))
    return bool(a == b)


def _builtin_geometries():
    return [g for g in load_rules().geometries.values() if not g.linear]


def test_store_rebuilds_to_the_committed_one():
    with open(STORE, encoding="utf-8") as fh:
        assert build(BUILTIN_RULES) == fh.read(), f"rules/{STORE_NAME} is stale: run python -m enumerator.rules.parsed"


def test_every_builtin_geometry_is_stored_and_equals_a_fresh_derivation():
    # reference: the derivation code run now (not cached, never from the store)
    geos = _builtin_geometries()
    assert len(geos) == len(json.loads(STORE.read_text(encoding="utf-8"))["geometries"])
    for g in geos:
        stored = SOURCE.operations(g.vectors)
        assert stored is not None, g.symbol
        fresh = derive_operations_afresh(g.vectors)
        assert _same(stored, fresh), g.symbol
        assert _same(g.operations, fresh) and _same(derive_operations(g.vectors), fresh), g.symbol
        for idx, ranks in entry_tables(len(fresh), len(g.vectors)):
            table = SOURCE.table(g.vectors, idx, ranks)
            assert table is not None, (g.symbol, ranks)
            assert _same(table, geometry_table_afresh(g.vectors, idx, ranks)), (g.symbol, ranks)
            assert _same(character_table(g, idx, ranks), table), (g.symbol, ranks)


@pytest.mark.parametrize(
    ("symbol", "order", "group"),
    # Cotton, Chemical Applications of Group Theory, 3rd ed. (1990), Appendix IIA: orders of Oh, Td, Ih, D4h
    [("OC-6", 48, "Oh"), ("T-4", 24, "Td"), ("IC-12", 120, "Ih"), ("SP-4", 16, "D4h")],
)
def test_stored_groups_have_the_textbook_orders(symbol, order, group):
    g = load_rules().geometry(symbol)
    ops = SOURCE.operations(g.vectors)
    assert ops is not None and len(ops) == order
    table = SOURCE.table(g.vectors, tuple(range(order)), None)
    assert table is not None and table.group == group and table.order == order
    assert sum(i.dimension**2 * i.parts for i in table.irreps) == order  # sum of squared dimensions (common practice)


def test_vectors_one_bit_off_are_derived_not_served():
    oc = load_rules().geometry("OC-6")
    x = oc.vectors[0][0]
    moved = ((x + 2e-16 if x else 5e-324, *oc.vectors[0][1:]), *oc.vectors[1:])
    assert moved != oc.vectors
    assert SOURCE.operations(moved) is None
    assert SOURCE.table(moved, tuple(range(48)), None) is None
    assert known.operations(moved) is None
    assert _same(derive_operations(moved), derive_operations_afresh(moved))


def test_a_table_the_store_lacks_is_computed():
    oc = load_rules().geometry("OC-6")
    assert SOURCE.table(oc.vectors, (0,), None) is None
    assert SOURCE.table(oc.vectors, tuple(range(48)), (1, 0, 0, 0, 0, 0)) is None


def _with_store(monkeypatch, tmp_path: Path, text: str) -> None:
    path = tmp_path / STORE_NAME
    path.write_text(text, encoding="utf-8")
    monkeypatch.setattr(derived, "_store_path", lambda: path)
    caches.clear()


@pytest.mark.parametrize(
    "damage",
    [
        lambda doc: "{not json",
        lambda doc: json.dumps({**doc, "format": FORMAT + 1}),
        lambda doc: json.dumps({**doc, "store": "something else"}),
        lambda doc: json.dumps(
            {**doc, "geometries": [{**e, "operations": [[[[1, 0, 0]] * 3, [0]]]} for e in doc["geometries"]]}
        ),
        lambda doc: json.dumps({**doc, "geometries": [{**e, "tables": [{"ranks": None}]} for e in doc["geometries"]]}),
    ],
    ids=["not-json", "other-format", "other-store", "bad-operation", "bad-table"],
)
def test_a_damaged_store_costs_time_not_answers(monkeypatch, tmp_path, damage, request):
    damage_id = request.node.callspec.id
    doc = json.loads(STORE.read_text(encoding="utf-8"))
    oc = load_rules().geometry("OC-6")
    fresh_ops = derive_operations_afresh(oc.vectors)
    fresh_table = geometry_table_afresh(oc.vectors, tuple(range(48)), None)
    _with_store(monkeypatch, tmp_path, damage(doc))
    try:
        # a damaged part is not served; what is served is right
        ops, table = SOURCE.operations(oc.vectors), SOURCE.table(oc.vectors, tuple(range(48)), None)
        assert ops is None or _same(ops, fresh_ops)
        assert table is None or _same(table, fresh_table)
        if damage_id in ("not-json", "other-format", "other-store"):
            assert (ops, table) == (None, None)
        else:  # one part damaged: that part alone is derived again
            assert (ops is None) == (damage_id == "bad-operation") and (table is None) == (damage_id == "bad-table")
        assert _same(derive_operations(oc.vectors), fresh_ops)
        assert _same(character_table(oc, tuple(range(48))), fresh_table)
    finally:
        caches.clear()


def test_a_missing_store_costs_time_not_answers(monkeypatch, tmp_path):
    oc = load_rules().geometry("OC-6")
    monkeypatch.setattr(derived, "_store_path", lambda: tmp_path / "absent.json")
    caches.clear()
    try:
        assert SOURCE.operations(oc.vectors) is None
        assert _same(derive_operations(oc.vectors), derive_operations_afresh(oc.vectors))
    finally:
        caches.clear()


def test_writer_writes_a_folder_copy(tmp_path):
    shutil.copytree(BUILTIN_RULES / "geometries", tmp_path / "geometries")
    out = derived.write(tmp_path)
    assert out.read_text(encoding="utf-8") == STORE.read_text(encoding="utf-8")


def test_installing_twice_keeps_one_source():
    derived.install()
    derived.install()
    assert sum(1 for s in known.installed() if s is SOURCE) == 1
