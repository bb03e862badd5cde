"""Tables for people: plain monospaced text for the terminal."""

from __future__ import annotations

from collections.abc import Sequence

from enumerator.isomers.occupancy import occupancy
from enumerator.workflow.result import Result

__all__ = ["table", "isomer_table", "isomer_rows", "render"]


def table(header: Sequence[str], rows: Sequence[Sequence[str]], indent: str = "") -> str:
    """Left-aligned columns separated by two spaces, with a rule under the header."""
    widths = [len(h) for h in header]
    for r in rows:
        for k, cell in enumerate(r):
            widths[k] = max(widths[k], len(cell))
    line = lambda cells: indent + "  ".join(c.ljust(w) for c, w in zip(cells, widths)).rstrip()
    out = [line(header), indent + "  ".join("-" * w for w in widths)]
    out += [line(r) for r in rows]
    return "\n".join(out)


def isomer_rows(res: Result, wide: bool = True) -> tuple[list[str], list[list[str]]]:
    """Header and rows of the isomer table, every analysis's columns included
    (shared by the terminal table and the report; ``wide=False`` leaves out
    the wide columns, for the terminal)."""
    extra = [c for a in res.analyses for c in a.columns() if wide or not c.wide]
    header = [
        "isomer",
        "point group",
        "chiral",
        "enantiomer",
        *[c.header for c in extra],
        "sites (ligand:site numbers)",
    ]
    rows = []
    for iso in res.isomers:
        rows.append(
            [
                iso.id,
                iso.point_group,
                "yes" if iso.chiral else "no",
                iso.enantiomer or "-",
                *[str(c.values.get(iso.id, "")) for c in extra],
                occupancy(iso),
            ]
        )
    return header, rows


def isomer_table(res: Result) -> str:
    return table(*isomer_rows(res, wide=False))


def render(res: Result) -> str:
    iso = res.isomer_set
    head = [
        f"{res.composition.formula} on {res.geometry.symbol} ({res.geometry.name})",
        f"geometry: {res.geometry_reason}",
        f"{iso.geometric_isomers} geometric isomer(s), {iso.stereoisomers} stereoisomer(s)"
        + ("" if iso.complete else " listed so far (--limit reached)"),
        "",
        isomer_table(res),
    ]
    for a in res.analyses:
        for sec in a.sections():
            head += ["", sec.title, sec.text]
    for n in res.notes:
        head.append(f"note: {n}")
    return "\n".join(head) + "\n"
