"""Character tables for people and for programs.

:func:`render_chartable` turns what :func:`enumerator.workflow.queries.character_tables`
returns (one named group's table, or the tables of a formula's isomers) into
the text of ``isosieve chartable`` or its JSON document.  Characters are
written exactly (:func:`enumerator.symmetry.chartable.format_character`).

>>> from enumerator.symmetry.chartable import named_table
>>> print(render_chartable(named_table("C2")), end="")
C2 (order 2), built from generators
axes: z = (0, 0, 1); x = (1, 0, 0)
<BLANKLINE>
   E  C2  linear, rotations  quadratic
-  -  --  -----------------  --------------
A  1  1   z, Rz              x2, y2, z2, xy
B  1  -1  x, y, Rx, Ry       xz, yz
<BLANKLINE>
IR active (x, y, z): A, B
Raman active (quadratic): A, B
"""

from __future__ import annotations

from collections.abc import Sequence

from enumerator.isomers.tables import IsomerTables
from enumerator.render.jsonout import dumps
from enumerator.render.text import table
from enumerator.symmetry.chartable import CharacterTable, format_character

__all__ = ["render_chartable", "table_text"]

_LINEAR = ("x", "y", "z", "Rx", "Ry", "Rz")


def _function_text(sets: Sequence[tuple[str, ...]]) -> str:
    return ", ".join(s[0] if len(s) == 1 else "(" + ", ".join(s) + ")" for s in sets)


def _rows(t: CharacterTable) -> list[list[str]]:
    golden = t.group in ("I", "Ih")
    rows = []
    for i in t.irreps:
        lin = [s for s in i.function_sets if s[0] in _LINEAR]
        quad = [s for s in i.function_sets if s not in lin]
        rows.append(
            [i.label, *[format_character(c, golden) for c in i.characters], _function_text(lin), _function_text(quad)]
        )
    return rows


def table_text(t: CharacterTable, title: str) -> str:
    """One table as text: the title, the axes line, the table, the activities.

    Parameters
    ----------
    t : CharacterTable
    title : str
        The first line.

    Returns
    -------
    str
        Newline-terminated text.
    """
    header = ["", *[c.label for c in t.classes], "linear, rotations", "quadratic"]
    lines = [title, f"axes: {t.axes_note}", "", table(header, _rows(t))]
    ir = [i.label for i in t.irreps if i.ir_active]
    ra = [i.label for i in t.irreps if i.raman_active]
    lines += [
        "",
        f"IR active (x, y, z): {', '.join(ir) or 'none'}",
        f"Raman active (quadratic): {', '.join(ra) or 'none'}",
    ]
    joined = [i.label for i in t.irreps if i.parts == 2]
    if joined:
        lines.append("E species marked by joining a complex-conjugate pair: " + ", ".join(joined))
    return "\n".join(lines) + "\n"


def render_chartable(result: CharacterTable | IsomerTables, as_json: bool = False) -> str:
    """The output of ``isosieve chartable``.

    Parameters
    ----------
    result : CharacterTable or IsomerTables
        A named group's table, or a formula's isomer tables.
    as_json : bool
        The JSON document instead of text.

    Returns
    -------
    str
    """
    if as_json:
        return dumps(result.to_dict())
    if isinstance(result, CharacterTable):
        return table_text(result, f"{result.group} (order {result.order}), built from generators")
    texts = [
        table_text(t, f"{t.group} (order {t.order}): isomer {iso_id} of {result.formula} on {result.geometry}")
        for iso_id, t in result.tables
    ]
    return "\n".join(texts)
