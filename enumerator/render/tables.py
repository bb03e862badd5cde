"""Tables for supporting information: Markdown, CSV and LaTeX.

* :func:`markdown` renders on a code host (GitHub-flavoured pipe tables;
  point groups with ``<sub>``);
* :func:`csv` is RFC 4180 (CRLF line ends, quoted where needed, UTF-8) and
  opens in a spreadsheet; the first columns repeat the formula and the
  geometry so several tables can be stacked; cautions follow as records
  whose first field starts with ``#``;
* :func:`latex` uses booktabs and typesets symmetry labels: ``C2v`` ->
  ``$C_{2v}$``, ``A1g`` -> ``$A_{1g}$``, ``E''`` -> ``$E''$``.

Every analysis's columns are included (:mod:`enumerator.render.sections`;
``Column.latex`` when given); the symbols are typeset by
:mod:`enumerator.render.typeset`.

>>> from enumerator.workflow.pipeline import analyse
>>> print(markdown(analyse("Ma5b", geometry="OC-6")).splitlines()[0])
### Ma5b on OC-6
"""

from __future__ import annotations

import csv as _csv
import io
from collections.abc import Sequence

from enumerator.isomers.occupancy import occupancy
from enumerator.render.sections import result_columns, result_sections, safety_lines
from enumerator.render.typeset import latex_escape, latex_species, latex_symbol, markdown_symbol
from enumerator.workflow.result import Result

__all__ = [
    "markdown",
    "csv",
    "latex",
    "rows",
    "csv_records",
    "write_csv",
    "latex_symbol",
    "latex_species",
    "latex_escape",
    "markdown_symbol",
]


def rows(res: Result) -> tuple[list[str], list[list[str]], list[list[str]]]:
    """(header, plain cells, LaTeX cells) of the isomer table.

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    (list of str, list of list of str, list of list of str)
    """
    extra = result_columns(res)
    header = ["isomer", "point group", "chiral", "enantiomer", *[c.header for c in extra], "sites"]
    plain, tex = [], []
    for iso in res.isomers:
        cells = [iso.id, iso.point_group, "yes" if iso.chiral else "no", iso.enantiomer or "-"]
        cells += [c.values.get(iso.id, "") for c in extra]
        cells.append(occupancy(iso))
        plain.append(cells)
        t = [iso.id, latex_symbol(iso.point_group), cells[2], cells[3]]
        for c in extra:
            t.append(c.latex.get(iso.id, "") if c.latex is not None else latex_escape(c.values.get(iso.id, "")))
        t.append(latex_escape(cells[-1]))
        tex.append(t)
    return header, plain, tex


def _summary(res: Result) -> str:
    iso = res.isomer_set
    return f"{iso.geometric_isomers} geometric isomer(s), {iso.stereoisomers} stereoisomer(s)" + (
        "" if iso.complete else " (incomplete list)"
    )


def _md_cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def markdown(res: Result) -> str:
    """A GitHub-flavoured Markdown section for one result.

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    str
        The heading, the table, the sections in code blocks, notes and cautions.
    """
    header, plain, _ = rows(res)
    out = [f"### {_md_cell(res.composition.formula)} on {res.geometry.symbol}", ""]
    out.append(f"Geometry: {_md_cell(res.geometry_reason)}.  ")
    out.append(_summary(res) + ".")
    out.append("")
    out.append("| " + " | ".join(_md_cell(h) for h in header) + " |")
    out.append("|" + "|".join("---" for _ in header) + "|")
    for cells in plain:
        c = list(cells)
        c[1] = markdown_symbol(c[1])
        out.append("| " + " | ".join(_md_cell(x) for x in c) + " |")
    for sec in result_sections(res):
        if sec.title == "Safety":
            continue
        out += ["", f"**{sec.title}**", "", "```text", sec.text.rstrip("\n"), "```"]
    for n in res.notes:
        out += ["", f"Note: {_md_cell(n)}"]
    safety = safety_lines(res)
    if safety:
        out += ["", "> **Safety.** " + " ".join(safety)]
    return "\n".join(out) + "\n"


def csv_records(res: Result) -> tuple[list[str], list[list[str]]]:
    """Header and records with the formula and geometry first.

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    (list of str, list of list of str)
    """
    header, plain, _ = rows(res)
    return ["formula", "geometry", *header], [[res.composition.formula, res.geometry.symbol, *r] for r in plain]


def csv(res: Result) -> str:
    """RFC 4180 CSV of the isomer table (CRLF line ends, UTF-8).

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    str
    """
    header, recs = csv_records(res)
    return write_csv(header, recs, safety_lines(res))


def write_csv(header: Sequence[str], records: Sequence[Sequence[str]], cautions: Sequence[str] = ()) -> str:
    """RFC 4180 CSV text: the header, the records padded to its width, then one ``# safety:`` record per caution.

    Parameters
    ----------
    header : sequence of str
    records : sequence of sequence of str
    cautions : sequence of str, optional

    Returns
    -------
    str
    """
    buf = io.StringIO()
    w = _csv.writer(buf, lineterminator="\r\n", quoting=_csv.QUOTE_MINIMAL)
    w.writerow(header)
    for r in records:
        w.writerow(list(r) + [""] * (len(header) - len(r)))
    for line in cautions:
        w.writerow(["# safety: " + line] + [""] * (len(header) - 1))
    return buf.getvalue()


def latex(res: Result) -> str:
    """A booktabs ``table`` environment (needs \\usepackage{booktabs}).

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    str
    """
    header, _, tex = rows(res)
    cols = "l" * len(header)
    cap = f"Isomers of {latex_escape(res.composition.formula)} on {res.geometry.symbol}: {latex_escape(_summary(res))}."
    out = [
        "% requires \\usepackage{booktabs}",
        "\\begin{table}",
        "\\centering",
        f"\\caption{{{cap}}}",
        f"\\begin{{tabular}}{{{cols}}}",
        "\\toprule",
        " & ".join(latex_escape(h) for h in header) + " \\\\",
        "\\midrule",
    ]
    for cells in tex:
        out.append(" & ".join(cells) + " \\\\")
    out.append("\\bottomrule")
    out.append("\\end{tabular}")
    safety = safety_lines(res)
    if safety:
        out.append("")
        out.append("\\par\\smallskip\\footnotesize Safety: " + latex_escape(" ".join(safety)))
    out.append("\\end{table}")
    return "\n".join(out) + "\n"
