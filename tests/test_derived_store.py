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
    assert len(geos) == len(_lines(STORE.read_text(encoding="utf-8"))[1])
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


def _lines(text: str) -> tuple[dict[str, Any], list[tuple[str, dict[str, Any]]]]:
    head, *rest = text.splitlines()
    return json.loads(head), [(k, json.loads(e)) for k, _, e in (line.partition("\t") for line in rest)]


def _text(head: dict[str, Any], entries: list[tuple[str, Any]]) -> str:
    return "".join([json.dumps(head) + "\n", *(f"{k}\t{json.dumps(e)}\n" for k, e in entries)])


_DAMAGE = {
    "not-json": lambda h, es: "{not json\n" + _text(h, es).partition("\n")[2],
    "other-format": lambda h, es: _text({**h, "format": FORMAT + 1}, es),
    "other-store": lambda h, es: _text({**h, "store": "something else"}, es),
    "cut-entry": lambda h, es: _text(h, []) + "".join(f"{k}\t{json.dumps(e)[:-9]}\n" for k, e in es),
    "bad-operation": lambda h, es: _text(h, [(k, {**e, "operations": [[[[1, 0, 0]] * 3, [0]]]}) for k, e in es]),
    "bad-table": lambda h, es: _text(h, [(k, {**e, "tables": [{"ranks": None}]}) for k, e in es]),
}


@pytest.mark.parametrize("damage_id", list(_DAMAGE))
def test_a_damaged_store_costs_time_not_answers(monkeypatch, tmp_path, damage_id):
    head, entries = _lines(STORE.read_text(encoding="utf-8"))
    oc = load_rules().geometry("OC-6")
    fresh_ops = derive_operations_afresh(oc.vectors)
    fresh_table = geometry_table_afresh(oc.vectors, tuple(range(48)), None)
    _with_store(monkeypatch, tmp_path, _DAMAGE[damage_id](head, entries))
    try:
        # a damaged part is not served; what is served is right
        ops, table = SOURCE.operations(oc.vectors), SOURCE.table(oc.vectors, tuple(range(48)), None)
        assert ops is None or _same(ops, fresh_ops)
        assert table is None or _same(table, fresh_table)
        if damage_id in ("not-json", "other-format", "other-store", "cut-entry"):
            assert (ops, table) == (None, None)
        else:  # one part damaged: that part alone is derived again
            assert (ops is None) == (damage_id == "bad-operation") and (table is None) == (damage_id == "bad-table")
        assert _same(derive_operations(oc.vectors), fresh_ops)
        assert _same(character_table(oc, tuple(range(48))), fresh_table)
    finally:
        caches.clear()


def test_an_intact_copy_of_the_store_is_served(monkeypatch, tmp_path):
    head, entries = _lines(STORE.read_text(encoding="utf-8"))
    oc = load_rules().geometry("OC-6")
    _with_store(monkeypatch, tmp_path, _text(head, entries))
    try:
        assert _same(SOURCE.operations(oc.vectors), derive_operations_afresh(oc.vectors))
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


def test_a_users_geometry_of_a_builtin_shape_is_derived_from_its_own_vectors(tmp_path):
    # the octahedron with sites 2 and 3 swapped: same shape and group, other site order, so other permutations
    text = (BUILTIN_RULES / "geometries" / "OC-6.toml").read_text(encoding="utf-8")
    swapped = text.replace("[1.0, 0.0, 0.0],\n  [0.0, 1.0, 0.0],", "[0.0, 1.0, 0.0],\n  [1.0, 0.0, 0.0],")
    assert swapped != text
    (tmp_path / "geometries").mkdir()
    (tmp_path / "geometries" / "OC-6.toml").write_text(swapped, encoding="utf-8")
    user = load_rules([tmp_path]).geometry("OC-6")
    builtin = load_rules().geometry("OC-6")
    assert user.vectors != builtin.vectors and SOURCE.operations(user.vectors) is None
    fresh = derive_operations_afresh(user.vectors)
    assert _same(user.operations, fresh) and [op.perm for op in fresh] != [op.perm for op in builtin.operations]
    every = tuple(range(len(fresh)))
    assert SOURCE.table(user.vectors, every, None) is None
    assert _same(character_table(user, every), geometry_table_afresh(user.vectors, every, None))
