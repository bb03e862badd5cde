"""Screen many formulas: one :class:`BatchRow` per input, in input order, gathered in a :class:`BatchResult`.

Each formula is parsed and its centre counted in the calling process
(cheap); the isomers are enumerated once per *pattern* -- the composition
pattern with donor labels normalised within each ligand kind, the reporter
classes and the geometry -- so ``[RuCl2(CO)2(PPh3)2]`` and
``[OsBr2(CO)2(PMe3)2]`` share one enumeration and a repeated pattern costs
nothing.  With ``workers > 1`` and at least :data:`POOL_MIN_ROWS` rows
the input is cut into contiguous chunks, each screened whole (reading,
which dominates a typical library, and enumeration) in a
``concurrent.futures.ProcessPoolExecutor``; the rows come out in input
order, the same as with one process.  A bad formula becomes a row with ``error`` set; the rest go on.

:func:`screen` yields the rows one by one; :func:`run_batch` collects them
into a :class:`BatchResult` (whose ``to_dict()`` is the JSON of ``isosieve
batch --format json``) and :func:`screen_file` reads the formulas from a
file first (:func:`enumerator.parse.batch.read_formulas`).  The text, CSV
and Markdown tables are drawn by :mod:`enumerator.render.batch`.

>>> rows = list(screen(["Ma4b2", "[Co(NH3)4Cl2]+", "[Xx(CO)6]"]))
>>> [(r.formula, r.geometric_isomers, r.cached) for r in rows[:2]]
[('Ma4b2', 2, False), ('[Co(NH3)4Cl2]+', 2, True)]
>>> rows[2].error.startswith("formula '[Xx(CO)6]'")
True
>>> run_batch(["Ma5b"]).to_dict()["rows"][0]["isomers"]
[{'id': '1', 'point_group': 'C4v'}]
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Iterator, Sequence
from concurrent.futures import Future
from dataclasses import dataclass, field, fields, replace
from operator import attrgetter
from typing import TYPE_CHECKING, Any

from enumerator.analyses.centre import choose_geometry, count_electrons
from enumerator.analyses.safety import cautions
from enumerator.analyses.stretch import StretchAnalysis
from enumerator.errors import IsosieveError, shorten
from enumerator.limits import ECHO_CHARS
from enumerator.model.composition import Composition
from enumerator.parse.batch import read_formulas
from enumerator.parse.formula import parse_formula
from enumerator.parse.text import check_label_text
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.workflow.pipeline import Request, run
from enumerator.workflow.result import Result

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["BatchRow", "BatchResult", "PatternSummary", "screen", "run_batch", "screen_file", "pattern_key"]

#: (isomer id, point group) per stereoisomer.
PointGroups = tuple[tuple[str, str], ...]
#: (isomer id, reporter class, IR-active band count) per isomer and class.
IRBands = tuple[tuple[str, str, int], ...]


@dataclass(frozen=True)
class PatternSummary:
    """What one enumeration of a pattern gives every row that shares it (or the error it raised)."""

    geometric_isomers: int | None = None
    stereoisomers: int | None = None
    complete: bool = True
    point_groups: PointGroups = ()
    ir_bands: IRBands = ()
    error: str | None = None


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
    point_groups: PointGroups = ()
    #: (isomer id, reporter class, IR-active band count), when the stretch analysis ran
    ir_bands: IRBands = ()
    safety: bool = False
    cached: bool = False

    def to_dict(self) -> dict[str, Any]:
        """The JSON object of the row (``index`` counts from 1)."""
        return {
            "index": self.index + 1,
            "label": self.label,
            "formula": self.formula,
            "error": self.error,
            "metal": self.metal,
            "charge": self.charge,
            "oxidation_state": self.oxidation_state,
            "d_electrons": self.d_electrons,
            "valence_electrons": self.valence_electrons,
            "geometry": self.geometry,
            "geometry_reason": self.geometry_reason,
            "geometric_isomers": self.geometric_isomers,
            "stereoisomers": self.stereoisomers,
            "complete": self.complete,
            "isomers": [{"id": i, "point_group": g} for i, g in self.point_groups],
            "ir_bands": [{"isomer": i, "class": c, "ir": n} for i, c, n in self.ir_bands],
            "safety": self.safety,
            "cached": self.cached,
        }


@dataclass(frozen=True)
class BatchResult:
    """Every row of a screen, in input order."""

    rows: tuple[BatchRow, ...] = field(default=())

    @property
    def failed(self) -> tuple[BatchRow, ...]:
        """The rows that could not be analysed."""
        return tuple(r for r in self.rows if r.error)

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve batch --format json``: ``{"rows": [...]}``."""
        return {"rows": [r.to_dict() for r in self.rows]}

    def to_dataframe(self) -> pd.DataFrame:
        """One row per input row, the columns of :meth:`BatchRow.to_dict` (lists joined as text).

        Returns
        -------
        pandas.DataFrame
        """
        import pandas as pd

        docs = [r.to_dict() for r in self.rows]
        cols = list(docs[0]) if docs else []
        rows = [{k: ", ".join(map(str, v)) if isinstance(v, list) else v for k, v in d.items()} for d in docs]
        return pd.DataFrame(rows, columns=cols)

    def __repr__(self) -> str:
        return f"<BatchResult {len(self.rows)} row(s), {len(self.failed)} failed>"

    def _repr_html_(self) -> str:
        """The first 50 rows (:meth:`to_dataframe`) under a line with the counts."""
        import html

        df = self.to_dataframe()
        more = f" (first 50 of {len(df)} shown)" if len(df) > 50 else ""
        head = f"<p><b>{len(self.rows)} row(s), {len(self.failed)} could not be analysed{html.escape(more)}</b></p>"
        return head + df.head(50).to_html(index=False, escape=True, na_rep="")


def pattern_key(comp: Composition, geometry: str, limit: int | None = None) -> tuple:
    """Cache key: what decides the isomers and their band counts.

    Parameters
    ----------
    comp : Composition
    geometry : str
        Polyhedral symbol.
    limit : int, optional
        The stereoisomer limit.

    Returns
    -------
    tuple
        ``Composition.parts`` with each kind's donor labels renamed a, b, c by first appearance within that
        kind (different kinds are never interchanged, so only the pattern within a kind matters), plus each
        kind's topology (chain, tripod or ring), spans, arrangements, reporter class and count; the geometry and
        the limit.
    """
    parts = []
    for k, n in comp.parts:
        ren: dict[str, str] = {}
        donors = tuple(ren.setdefault(d, "abcdefghijkl"[len(ren)]) for d in k.donors)
        parts.append((donors, k.topology, k.spans, tuple(sorted(k.arrangements)), k.reporter, n))
    return (tuple(parts), geometry, limit)


def _ir_bands(res: Result) -> IRBands:
    a = res.analysis(StretchAnalysis)
    if a is None:
        return ()
    out = []
    for iso in res.isomers:
        modes = a.modes[a.ids.index(iso.id)]
        out += [(iso.id, m.reporter, m.ir) for m in sorted(modes, key=lambda m: m.reporter)]
    return tuple(out)


def _summarise(formula: str, geometry: str, rules: tuple[str, ...], limit: int | None) -> PatternSummary:
    """Worker: run the pipeline for one representative formula and keep what a row shows."""
    try:
        res = run(Request(formula=formula, geometry=geometry, rules=rules, limit=limit))
    except IsosieveError as exc:
        return PatternSummary(error=exc.line())
    except Exception as exc:  # an internal error (memory too) stays in its row
        return PatternSummary(error=f"internal error: {type(exc).__name__}: {shorten(str(exc), 200)}")
    iso = res.isomer_set
    return PatternSummary(
        geometric_isomers=iso.geometric_isomers,
        stereoisomers=iso.stereoisomers,
        complete=iso.complete,
        point_groups=tuple((i.id, i.point_group) for i in iso.isomers),
        ir_bands=_ir_bands(res),
    )


def _centre(comp: Composition, symbol: str, reason: str, limit: int | None) -> tuple[BatchRow, tuple]:
    """The row fields that follow from a centre (formula text aside) and its pattern key."""
    real = comp.metal != "M"
    ec = count_electrons(comp) if real else None
    row = BatchRow(
        index=0,
        formula="",
        metal=comp.metal if real else None,
        charge=comp.charge,
        oxidation_state=ec.oxidation_state if ec else None,
        d_electrons=ec.d_electrons if ec else None,
        valence_electrons=ec.valence_electrons if ec else None,
        geometry=symbol,
        geometry_reason=reason,
        safety=bool(cautions(comp)),
    )
    return row, pattern_key(comp, symbol, limit)


class _Reader:
    """Rows of one screen before enumeration: each formula read once, each centre worked out once.

    What :func:`enumerator.workflow.pipeline.prepare` does for one request,
    with the request's options checked and the rules loaded once for the
    whole screen.  A centre is keyed by its ligands, metal and charge (the
    formula text aside: two spellings of one complex share it); only a
    geometry refusal names the formula, and refusals are not kept."""

    def __init__(self, geometry: str | None, rules: tuple[str, ...], limit: int | None) -> None:
        self.geometry, self.limit = geometry, limit
        self.rules: RuleSet | None = None
        self.setup_error: str | None = None
        try:
            Request("", geometry=geometry, rules=rules, limit=limit)  # the options, checked once
            self.rules = load_rules(rules)
        except IsosieveError as exc:
            self.setup_error = exc.line()
        self.formulas: dict[str, tuple[BatchRow, tuple | None]] = {}
        self.centres: dict[tuple, tuple[BatchRow, tuple]] = {}

    def row(self, formula: str) -> tuple[BatchRow, tuple | None]:
        """The row of one formula, index and label left out (its pattern key None for an error): a repeat
        costs one look-up."""
        hit = self.formulas.get(formula)
        if hit is None:
            hit = self.formulas[formula] = self._read(formula)
        return hit

    def _read(self, formula: str) -> tuple[BatchRow, tuple | None]:
        if self.setup_error is not None:
            return BatchRow(0, _shown(formula), error=self.setup_error), None
        rules = self.rules
        assert rules is not None
        try:
            comp = parse_formula(formula, rules)
            ident = (comp.parts, comp.metal, comp.charge)
            done = self.centres.get(ident)
            if done is None:
                symbol, reason = choose_geometry(comp, rules, self.geometry)
                symbol = rules.geometry(symbol).symbol
                done = _centre(comp, symbol, reason, self.limit)
                if comp.formula not in reason:  # a reason that quotes the formula stays with it
                    self.centres[ident] = done
        except IsosieveError as exc:
            return BatchRow(0, _shown(formula), error=exc.line()), None
        except Exception as exc:  # an internal error (memory too) stays in its row; the screen goes on
            return BatchRow(
                0, _shown(formula), error=f"internal error: {type(exc).__name__}: {shorten(str(exc), 200)}"
            ), None
        row = done[0]
        return BatchRow(0, formula, "", *_REST(row)), done[1]


def _read_row(reader: _Reader, formula: str, label: str) -> tuple[BatchRow, tuple | None]:
    """One input row through the reader, its label checked first (a refused label is that row's error)."""
    if label:
        try:
            check_label_text(label, "label")
        except IsosieveError as exc:
            return BatchRow(0, _shown(formula), error=exc.line()), None
    return reader.row(formula)


#: The fields of a row after index, formula and label, in order.
_REST = attrgetter(*(f.name for f in fields(BatchRow)[3:]))


def _relabel(row: BatchRow, index: int, label: str) -> BatchRow:
    """The row at another place in the input, with its label (one constructor call, no field-by-field copy)."""
    return BatchRow(index, row.formula, label, *_REST(row))


def _with(row: BatchRow, summary: PatternSummary, cached: bool) -> BatchRow:
    if summary.error is not None:
        return replace(row, error=summary.error, cached=cached)
    r = row
    return BatchRow(
        r.index,
        r.formula,
        r.label,
        r.error,
        r.metal,
        r.charge,
        r.oxidation_state,
        r.d_electrons,
        r.valence_electrons,
        r.geometry,
        r.geometry_reason,
        summary.geometric_isomers,
        summary.stereoisomers,
        summary.complete,
        summary.point_groups,
        summary.ir_bands,
        r.safety,
        cached,
    )


def _items(formulas: Iterable[str | tuple[str, str]]) -> list[tuple[int, str, str]]:
    out = []
    for k, f in enumerate(formulas):
        formula, label = (f, "") if isinstance(f, str) else (f[0], f[1])
        out.append((k, formula.strip(), label))
    return out


#: Fewer input rows than this are screened in one process whatever ``workers`` (starting processes would cost
#: more than they save).
POOL_MIN_ROWS = 2_000


def screen(
    formulas: Iterable[str | tuple[str, str]],
    *,
    rules: Sequence[str] = (),
    workers: int = 1,
    geometry: str | None = None,
    limit: int | None = None,
) -> Iterator[BatchRow]:
    """One row per formula (or (formula, label) pair), in input order.

    Parameters
    ----------
    formulas : iterable of str or (str, str)
        Formulas, or (formula, label) pairs.
    rules : sequence of str
        Rule folders in force (``--rules DIR``).
    workers : int
        Processes: with ``workers > 1`` and at least :data:`POOL_MIN_ROWS` rows the input is cut into
        ``workers`` contiguous chunks, each screened whole (reading and enumeration) in its own process; the
        rows are the same as with one process.
    geometry : str, optional
        One geometry for every formula (default: chosen per formula).
    limit : int, optional
        Stop each enumeration after this many stereoisomers.

    Yields
    ------
    BatchRow
        ``error`` set for a formula that cannot be read or analysed, or whose enumeration would exceed the
        size cap (:data:`enumerator.limits.SIZE_CAP`, unless ``limit``): the row says so and the screen goes
        on; ``cached`` when an earlier row had the same pattern.  A refused row shows its formula with
        control characters escaped and shortened to :data:`enumerator.limits.ECHO_CHARS` characters.
    """
    rules = tuple(rules)
    items = _items(formulas)
    if workers > 1 and len(items) >= POOL_MIN_ROWS:
        yield from _pooled(items, rules, workers, geometry, limit)
    else:
        for row, _ in _screen_rows(items, rules, geometry, limit):
            yield row


def _screen_rows(
    items: Sequence[tuple[int, str, str]],
    rules: tuple[str, ...],
    geometry: str | None,
    limit: int | None,
    relabel: bool = True,
) -> Iterator[tuple[BatchRow, tuple | None]]:
    """The rows of ``items`` in this process, each with its pattern key (None for a refused row).

    With ``relabel=False`` each row comes without its index and label (one object per formula and cache state,
    shared by its repeats)."""
    reader = _Reader(geometry, rules, limit)
    prepared = [(k, label, *_read_row(reader, formula, label)) for k, formula, label in items]
    done: dict[tuple, PatternSummary] = {}
    seen: set[tuple] = set()
    # a formula's finished row, by whether its pattern was seen before: a repeat is relabelled
    finished: dict[tuple[str, bool], BatchRow] = {}
    for k, label, row, key in prepared:
        if key is None:  # a refused row: its text escaped and shortened
            yield (_relabel(row, k, _shown(label)) if relabel else row), None
            continue
        cached = key in seen
        out = finished.get((row.formula, cached))
        if out is None:
            summary = done.get(key)
            if summary is None:
                summary = done[key] = _summarise(row.formula, key[1], rules, limit)
            out = finished[(row.formula, cached)] = _with(row, summary, cached)
        yield (_relabel(out, k, label) if relabel else out), key
        seen.add(key)


#: What a worker sends back for a chunk: its distinct rows with their pattern keys, and per input row the
#: place of its row in that list (a repeated formula is sent once; index and label are put back here).
_Chunk = tuple[list[tuple[BatchRow, tuple | None]], list[int]]


def _screen_chunk(
    items: list[tuple[int, str, str]], rules: tuple[str, ...], geometry: str | None, limit: int | None
) -> _Chunk:
    """Worker (top level, so a spawned process can import it): one contiguous chunk screened whole."""
    table: list[tuple[BatchRow, tuple | None]] = []
    place: dict[int, int] = {}  # by the identity of a shared row object (the table keeps each alive)
    refs = []
    for row, key in _screen_rows(items, rules, geometry, limit, relabel=False):
        at = place.get(id(row))
        if at is None:
            at = place[id(row)] = len(table)
            table.append((row, key))
        refs.append(at)
    return table, refs


def _pooled(
    items: list[tuple[int, str, str]], rules: tuple[str, ...], workers: int, geometry: str | None, limit: int | None
) -> Iterator[BatchRow]:
    """The rows of ``items`` screened in ``workers`` contiguous chunks, one process each, in input order.

    A chunk's first row of a pattern is marked ``cached`` here when an earlier chunk had the pattern, so the
    rows equal those of one process."""
    from concurrent.futures import ProcessPoolExecutor

    size = -(-len(items) // workers)
    chunks = [items[i : i + size] for i in range(0, len(items), size)]
    pool = ProcessPoolExecutor(max_workers=len(chunks))
    try:
        futures = [pool.submit(_screen_chunk, chunk, rules, geometry, limit) for chunk in chunks]
        seen: set[tuple] = set()
        for chunk, future in zip(chunks, futures, strict=True):
            table, refs = _collect(future, chunk)
            fixed: dict[int, BatchRow] = {}
            for (k, _, label), at in zip(chunk, refs, strict=True):
                row, key = table[at]
                if key is None:
                    yield _relabel(row, k, _shown(label))
                    continue
                if not row.cached and key in seen:
                    row = fixed.get(at) or fixed.setdefault(at, replace(row, cached=True))
                yield _relabel(row, k, label)
                seen.add(key)
    finally:
        pool.shutdown(cancel_futures=True)


def _collect(future: Future[_Chunk], chunk: list[tuple[int, str, str]]) -> _Chunk:
    """A worker's rows, or a row error for each of its chunk's rows when the worker died (memory, a broken
    pool)."""
    try:
        return future.result()
    except Exception as exc:  # BrokenProcessPool and the like: this chunk's rows fail, the other chunks go on
        error = f"the worker process failed ({type(exc).__name__}); run this row alone"
        return [(BatchRow(0, _shown(f), error=error), None) for _, f, _ in chunk], list(range(len(chunk)))


def _shown(text: str) -> str:
    """A refused row's text as the table shows it: control characters escaped, long text shortened."""
    escaped = "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in text)
    return shorten(escaped, ECHO_CHARS)


def run_batch(
    formulas: Iterable[str | tuple[str, str]],
    *,
    rules: Sequence[str] = (),
    workers: int = 1,
    geometry: str | None = None,
    limit: int | None = None,
    progress: Callable[[str, int, int], None] | None = None,
) -> BatchResult:
    """Every row of :func:`screen`, collected.

    Parameters
    ----------
    formulas, rules, workers, geometry, limit
        As for :func:`screen`.
    progress : callable, optional
        Called as ``progress(formula, done, total)`` after each row (a progress bar).

    Returns
    -------
    BatchResult
    """
    items = list(formulas)
    rows = []
    for row in screen(items, rules=rules, workers=workers, geometry=geometry, limit=limit):
        rows.append(row)
        if progress is not None:
            progress(row.formula, len(rows), len(items))
    return BatchResult(tuple(rows))


def screen_file(
    path: str,
    *,
    rules: Sequence[str] = (),
    workers: int = 1,
    geometry: str | None = None,
    limit: int | None = None,
    progress: Callable[[str, int, int], None] | None = None,
) -> BatchResult:
    """Read the formulas of a batch file and screen them.

    Parameters
    ----------
    path : str
        One formula a line ('#' comments), or a CSV file with a 'formula' (and optional 'label') column.
    rules, workers, geometry, limit, progress
        As for :func:`run_batch`.

    Returns
    -------
    BatchResult

    Raises
    ------
    InputError
        The file cannot be read or holds no formulas.
    """
    return run_batch(
        read_formulas(path), rules=rules, workers=workers, geometry=geometry, limit=limit, progress=progress
    )
