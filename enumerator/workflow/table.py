"""One table model for every isomer table: the columns of a Result, and its pandas DataFrame.

Every written table (``isosieve isomers --format csv|latex|markdown``, the job
outputs, the report's tables) and :meth:`Result.to_dataframe` come from the
same columns, in the same order and under the same headers:

``formula``, ``geometry``, ``isomer``, ``point group``, ``chiral``,
``enantiomer``, ``descriptor``, ``prefix``, ``IUPAC name``, then per reporter
class ``<class> species``, ``<class> IR``, ``<class> Raman``,
``<class> <nucleus> NMR`` (band and signal counts as integers; where some
isomer has IR-allowed bands the bond-dipole model predicts at zero intensity,
``<class> IR predicted weak`` follows ``<class> IR``, which counts them too), then
``NMR environments`` (the other ligands) and ``sites``.

A column the analyses give no value for (no descriptor for a letter formula
on a shape without an IUPAC symbol, no reporter class) is left out, never
filled with placeholders.  Each :class:`TableColumn` carries a ``kind`` that
tells a writer how to typeset its cells (a point group, a species string, a
descriptor, a formula); the writers in :mod:`enumerator.render.tables` read
it from ``DataFrame.attrs["kinds"]``.

A new analysis stage adds its columns by registering a function for its type:
``@analysis_columns.register(MyAnalysis)``.

>>> from enumerator.workflow.pipeline import analyse
>>> df = analyse("Ma4b2", geometry="OC-6", reporters={"a": "CO"}).to_dataframe()
>>> list(df.columns)[:5]
['formula', 'geometry', 'isomer', 'point group', 'chiral']
>>> df[["isomer", "point group", "CO IR"]].values.tolist()
[['1', 'C2v', 4], ['2', 'D4h', 1]]
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from functools import singledispatch
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

from enumerator.analyses.descriptors import DescriptorAnalysis
from enumerator.analyses.stretch import StretchAnalysis
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.occupancy import occupancy
from enumerator.workflow.result import Result

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["KINDS", "TableColumn", "analysis_columns", "table_columns", "result_frame", "frame_of", "join_frames"]

#: How a writer typesets a column's cells: plain text, an isomer id, a chemical formula, a point group, a
#: species string (Mulliken labels), an IUPAC descriptor, an integer count, a name, a site list.
KINDS = ("text", "id", "formula", "symbol", "species", "descriptor", "count", "name", "sites")

Cell = str | int | None


@frozen_dataclass
class TableColumn:
    """One column of the isomer table: header, kind (one of :data:`KINDS`) and a cell per isomer id.

    ``wide`` marks a column the terminal table leaves out (a full name)."""

    header: str
    kind: str
    values: Mapping[str, Cell]
    wide: bool = False


@singledispatch
def analysis_columns(analysis: object) -> tuple[TableColumn, ...]:
    """The isomer-table columns one analysis adds (none unless a function is registered for its type).

    Parameters
    ----------
    analysis : object
        One entry of ``Result.analyses``.

    Returns
    -------
    tuple of TableColumn
    """
    return ()


@analysis_columns.register(DescriptorAnalysis)
def _descriptor_columns(a: DescriptorAnalysis) -> tuple[TableColumn, ...]:
    if not a.descriptors:
        return ()
    cols = [TableColumn("descriptor", "descriptor", MappingProxyType({k: d.text for k, d in a.descriptors}))]
    if any(d.prefix for _, d in a.descriptors):
        cols.append(TableColumn("prefix", "text", MappingProxyType({k: d.prefix or "" for k, d in a.descriptors})))
    if a.names:
        cols.append(TableColumn("IUPAC name", "name", MappingProxyType(dict(a.names)), wide=True))
    return tuple(cols)


@analysis_columns.register(StretchAnalysis)
def _stretch_columns(a: StretchAnalysis) -> tuple[TableColumn, ...]:
    cols = []
    for ci, cls in enumerate(a.classes):
        nuc = a.info[ci].nucleus
        per = [(i, a.modes[k][ci]) for k, i in enumerate(a.ids)]
        cols.append(TableColumn(f"{cls} species", "species", MappingProxyType({i: m.species for i, m in per})))
        cols.append(TableColumn(f"{cls} IR", "count", MappingProxyType({i: m.ir for i, m in per})))
        if any(m.ir_weak for _, m in per):
            # symmetry-allowed bands the bond-dipole model leaves at zero intensity, counted in IR as well
            weak = MappingProxyType({i: m.ir_weak for i, m in per})
            cols.append(TableColumn(f"{cls} IR predicted weak", "count", weak))
        cols.append(TableColumn(f"{cls} Raman", "count", MappingProxyType({i: m.raman for i, m in per})))
        cols.append(TableColumn(f"{cls} {nuc} NMR", "count", MappingProxyType({i: m.nmr for i, m in per})))
    other = {}
    for k, i in enumerate(a.ids):
        other[i] = " ".join(
            f"{x.ligand}{'(' + x.nucleus + ')' if x.nucleus else ''}:{x.environments}"
            for x in a.nmr[k]
            if x.ligand not in a.reporter_ligands
        )
    if any(other.values()):
        cols.append(TableColumn("NMR environments", "text", MappingProxyType(other)))
    return tuple(cols)


def table_columns(res: Result, wide: bool = True) -> tuple[TableColumn, ...]:
    """Every column of a result's isomer table, in the order of every writer.

    Parameters
    ----------
    res : Result
        The analysed formula.
    wide : bool, optional
        Keep the wide columns (False: the terminal table).

    Returns
    -------
    tuple of TableColumn
    """
    ids = [i.id for i in res.isomers]
    formula, symbol = res.composition.formula, res.geometry.symbol
    cols = [
        TableColumn("formula", "formula", MappingProxyType(dict.fromkeys(ids, formula))),
        TableColumn("geometry", "text", MappingProxyType(dict.fromkeys(ids, symbol))),
        TableColumn("isomer", "id", MappingProxyType({i: i for i in ids})),
        TableColumn("point group", "symbol", MappingProxyType({i.id: i.point_group for i in res.isomers})),
        TableColumn("chiral", "text", MappingProxyType({i.id: "yes" if i.chiral else "no" for i in res.isomers})),
        TableColumn("enantiomer", "id", MappingProxyType({i.id: i.enantiomer or "" for i in res.isomers})),
    ]
    for a in res.analyses:
        cols += analysis_columns(a)
    cols.append(TableColumn("sites", "sites", MappingProxyType({i.id: occupancy(i) for i in res.isomers})))
    return tuple(c for c in cols if wide or not c.wide)


def frame_of(columns: Iterable[TableColumn], ids: Iterable[str]) -> pd.DataFrame:
    """A DataFrame with one row per isomer id and one column per table column; ``attrs["kinds"]`` maps each
    header to its kind.

    Parameters
    ----------
    columns : iterable of TableColumn
    ids : iterable of str
        The isomer ids, in row order.

    Returns
    -------
    pandas.DataFrame
    """
    import pandas as pd

    cols = list(columns)
    ids = list(ids)
    data: dict[str, list[Any]] = {c.header: [c.values.get(i, None) for i in ids] for c in cols}
    df = pd.DataFrame(data, columns=[c.header for c in cols])
    for c in cols:
        if c.kind == "count" and df[c.header].notna().all():
            df[c.header] = df[c.header].astype("int64")
    df.attrs["kinds"] = {c.header: c.kind for c in cols}
    return df


def result_frame(res: Result, wide: bool = True) -> pd.DataFrame:
    """The isomer table of one result as a DataFrame (:func:`table_columns`, one row per stereoisomer).

    Parameters
    ----------
    res : Result
    wide : bool, optional
        Keep the wide columns.

    Returns
    -------
    pandas.DataFrame
    """
    return frame_of(table_columns(res, wide), [i.id for i in res.isomers])


def join_frames(frames: Iterable[tuple[str, pd.DataFrame]]) -> pd.DataFrame:
    """Several results' tables stacked, a ``label`` column in front; the union of the columns in first-seen
    order (a column one result lacks is empty in its rows).

    Parameters
    ----------
    frames : iterable of (str, pandas.DataFrame)
        A label and a frame from :func:`result_frame`, per complex.

    Returns
    -------
    pandas.DataFrame
    """
    import pandas as pd

    parts, kinds = [], {"label": "text"}
    for label, df in frames:
        part = df.copy()
        part.insert(0, "label", label)
        kinds.update(df.attrs.get("kinds", {}))
        parts.append(part)
    if not parts:
        out = pd.DataFrame({"label": []})
    else:
        order: list[str] = []
        for p in parts:
            order += [c for c in p.columns if c not in order]
        out = pd.concat(parts, ignore_index=True)[order]
        for h, kind in kinds.items():
            if kind == "count" and h in out and out[h].notna().all():
                out[h] = out[h].astype("int64")
            elif kind == "count" and h in out:
                out[h] = out[h].astype("Int64")
    out.attrs["kinds"] = {c: kinds.get(c, "text") for c in out.columns}
    return out
