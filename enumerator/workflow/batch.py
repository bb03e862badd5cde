"""Screen many formulas: one :class:`BatchRow` per input, in input order.

Each formula is parsed and its centre counted in the calling process
(cheap); the isomers are enumerated once per *pattern* -- the composition
pattern with donor labels normalised within each ligand kind, the reporter
classes and the geometry -- so ``[RuCl2(CO)2(PPh3)2]`` and
``[OsBr2(CO)2(PMe3)2]`` share one enumeration and a repeated pattern costs
nothing.  With ``workers > 1`` the distinct patterns run in a
``concurrent.futures.ProcessPoolExecutor``; the rows still come out in
input order.  A bad formula becomes a row with ``error`` set; the rest go on.

>>> rows = list(screen(["Ma4b2", "[Co(NH3)4Cl2]+", "[Xx(CO)6]"]))
>>> [(r.formula, r.geometric_isomers, r.cached) for r in rows[:2]]
[('Ma4b2', 2, False), ('[Co(NH3)4Cl2]+', 2, True)]
>>> rows[2].error.startswith("formula '[Xx(CO)6]'")
True
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from typing import Any

from enumerator.errors import IsosieveError
from enumerator.model.composition import Composition

__all__ = ["BatchRow", "screen", "pattern_key", "row_to_dict", "HEADER", "row_cells"]


@dataclass(frozen=True)
class BatchRow:
    """One input formula's summary (or its error)."""

    index: int
    formula: str
    label: str = ""
    error: str | None = None
    metal: str | None = None
    charge: int | None = None
    oxidation_state: int | None = None
    d_electrons: int | None = None
    valence_electrons: int | None = None
    geometry: str | None = None
    geometry_reason: str = ""
    geometric_isomers: int | None = None
    stereoisomers: int | None = None
    complete: bool = True
    #: (isomer id, point group) per stereoisomer
    point_groups: tuple[tuple[str, str], ...] = ()
    #: (isomer id, reporter class, IR-active band count), when the stretch analysis ran
    ir_bands: tuple[tuple[str, str, int], ...] = ()
    safety: bool = False
    cached: bool = False


def pattern_key(comp: Composition, geometry: str, limit: int | None = None) -> tuple:
    """Cache key: what decides the isomers and their band counts.

    ``Composition.pattern`` with each kind's donor labels renamed a, b, c by
    first appearance within that kind (different kinds are never
    interchanged, so only the pattern within a kind matters), plus each
    kind's reporter class, the geometry and the limit."""
    parts = []
    for k, n in comp.parts:
        ren: dict[str, str] = {}
        donors = tuple(ren.setdefault(d, "abcdefghijkl"[len(ren)]) for d in k.donors)
        parts.append((donors, k.ring, k.spans, tuple(sorted(k.arrangements)), k.reporter, n))
    return (tuple(parts), geometry, limit)


def _enumerate(formula: str, geometry: str, rules: tuple[str, ...], limit: int | None) -> dict[str, Any]:
    """Worker: run the pipeline for one representative formula; plain data back."""
    from enumerator.workflow.pipeline import Request, run

    res = run(Request(formula=formula, geometry=geometry, rules=rules, limit=limit))
    doc = res.to_dict()
    bands = []
    for iso in doc["isomers"]:
        for cls, m in sorted((iso.get("modes") or {}).items()):
            if isinstance(m, dict) and isinstance(m.get("ir"), int):
                bands.append((iso["id"], cls, m["ir"]))
    return {
        "geometric_isomers": doc["geometric_isomers"],
        "stereoisomers": doc["stereoisomers"],
        "complete": doc["complete"],
        "point_groups": tuple((i["id"], i["point_group"]) for i in doc["isomers"]),
        "ir_bands": tuple(bands),
    }


def _guard(formula: str, geometry: str, rules: tuple[str, ...], limit: int | None) -> dict[str, Any]:
    try:
        return _enumerate(formula, geometry, rules, limit)
    except IsosieveError as exc:
        return {"error": exc.line()}
    except Exception as exc:  # an internal error stays in its row
        return {"error": f"internal error: {type(exc).__name__}: {exc}"}


def _prepare(index: int, formula: str, label: str, geometry: str | None, rules: tuple[str, ...], limit: int | None):
    from enumerator.analyses.centre import count_electrons
    from enumerator.analyses.safety import cautions
    from enumerator.workflow.pipeline import Request, prepare

    comp, geo, reason = prepare(Request(formula=formula, geometry=geometry, rules=rules, limit=limit))
    row = dict(
        index=index,
        formula=formula,
        label=label,
        metal=comp.metal if comp.metal != "M" else None,
        charge=comp.charge,
        geometry=geo.symbol,
        geometry_reason=reason,
        safety=bool(cautions(comp)),
    )
    if comp.metal != "M":
        ec = count_electrons(comp)
        row.update(
            oxidation_state=ec.oxidation_state, d_electrons=ec.d_electrons, valence_electrons=ec.valence_electrons
        )
    return row, pattern_key(comp, geo.symbol, limit)


def screen(
    formulas: Iterable[str | tuple[str, str]],
    *,
    rules: tuple[str, ...] = (),
    workers: int = 1,
    geometry: str | None = None,
    limit: int | None = None,
) -> Iterator[BatchRow]:
    """One row per formula (or (formula, label) pair), in input order."""
    items = []
    for k, f in enumerate(formulas):
        formula, label = (f, "") if isinstance(f, str) else (f[0], f[1])
        items.append((k, formula.strip(), label))
    prepared: list[tuple[dict | None, tuple | None, str | None]] = []
    for k, formula, label in items:
        try:
            row, key = _prepare(k, formula, label, geometry, tuple(rules), limit)
            prepared.append((row, key, None))
        except IsosieveError as exc:
            prepared.append(({"index": k, "formula": formula, "label": label}, None, exc.line()))
    first: dict[tuple, str] = {}
    for row, key, err in prepared:
        if key is not None and key not in first:
            first[key] = row["formula"]  # type: ignore[index]
    done: dict[tuple, Any] = {}
    pool = None
    if workers > 1 and len(first) > 1:
        from concurrent.futures import ProcessPoolExecutor

        pool = ProcessPoolExecutor(max_workers=workers)
        for key, formula in first.items():
            done[key] = pool.submit(_guard, formula, key[1], tuple(rules), limit)
    try:
        seen: set[tuple] = set()
        for row, key, err in prepared:
            assert row is not None
            if err is not None or key is None:
                yield BatchRow(**row, error=err)
                continue
            if key not in done:
                done[key] = _guard(first[key], key[1], tuple(rules), limit)
            value = done[key]
            if hasattr(value, "result"):
                value = value.result()
                done[key] = value
            cached = key in seen
            seen.add(key)
            if "error" in value:
                yield BatchRow(**row, error=value["error"], cached=cached)
            else:
                yield BatchRow(**row, **value, cached=cached)
    finally:
        if pool is not None:
            pool.shutdown(cancel_futures=True)


#: Column headers of the batch table (text, CSV).
HEADER = [
    "#",
    "label",
    "formula",
    "metal",
    "oxidation state",
    "d",
    "VE",
    "geometry",
    "geometric isomers",
    "stereoisomers",
    "point groups",
    "IR bands",
    "error",
]


def _s(x: Any) -> str:
    return "" if x is None else str(x)


def row_cells(r: BatchRow) -> list[str]:
    pgs = " ".join(f"{i}:{g}" for i, g in r.point_groups)
    bands = " ".join(f"{i}:{c}={n}" for i, c, n in r.ir_bands)
    return [
        str(r.index + 1),
        r.label,
        r.formula,
        _s(r.metal),
        _s(r.oxidation_state),
        _s(r.d_electrons),
        _s(r.valence_electrons),
        _s(r.geometry),
        _s(r.geometric_isomers),
        _s(r.stereoisomers),
        pgs,
        bands,
        r.error or "",
    ]


def row_to_dict(r: BatchRow) -> dict[str, Any]:
    """The JSON object of one row."""
    return {
        "index": r.index + 1,
        "label": r.label,
        "formula": r.formula,
        "error": r.error,
        "metal": r.metal,
        "charge": r.charge,
        "oxidation_state": r.oxidation_state,
        "d_electrons": r.d_electrons,
        "valence_electrons": r.valence_electrons,
        "geometry": r.geometry,
        "geometry_reason": r.geometry_reason,
        "geometric_isomers": r.geometric_isomers,
        "stereoisomers": r.stereoisomers,
        "complete": r.complete,
        "isomers": [{"id": i, "point_group": g} for i, g in r.point_groups],
        "ir_bands": [{"isomer": i, "class": c, "ir": n} for i, c, n in r.ir_bands],
        "safety": r.safety,
        "cached": r.cached,
    }
