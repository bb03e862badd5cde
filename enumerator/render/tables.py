"""Tables for supporting information, all written from one pandas DataFrame per result.

The frame is :meth:`enumerator.workflow.result.Result.to_dataframe` (columns and
their kinds: :mod:`enumerator.workflow.table`); the writers here only format it:

* :func:`csv_text` -- plain CSV: the header, then one row per isomer, nothing
  else, so ``pandas.read_csv(path)`` needs no options.  Cautions and provenance go
  into a sidecar, :func:`csv_metadata` (a W3C CSV-on-the-Web metadata file,
  ``<name>.csv-metadata.json``, the name CSVW looks for beside a CSV file).  A
  cell that a spreadsheet would read as a formula (first character ``=``, ``+``,
  ``-``, ``@``, tab or carriage return) gets a leading apostrophe (OWASP's advice
  against CSV injection; common practice).
* :func:`latex_table` -- a booktabs ``longtable`` (breaks across pages) whose
  columns are paragraph columns sized as fractions of ``\\linewidth`` from the
  widths of their longest unbreakable words, so it fits the text width with no
  overfull box; a table too wide for a portrait page of 345 pt (the article class's
  text width) is turned (``landscape`` of pdflscape).  Point groups and Mulliken
  labels are typeset (``$C_{2v}$``, ``$A_{1g}$``), formulas with subscripts and
  superscripts, mass numbers raised (``$^{13}$C``); every other character that
  reaches the file is escaped, comments included.  The IUPAC names go into a
  second longtable below, so the main table stays narrow.  Preamble:
  :data:`LATEX_PACKAGES`.
* :func:`markdown_table` -- a GitHub-flavoured pipe table, symbols with
  ``<sub>``; every other character of a cell is HTML-escaped.

>>> from enumerator.workflow.pipeline import analyse
>>> print(csv(analyse("Ma5b", geometry="OC-6")).splitlines()[0])
formula,geometry,isomer,point group,chiral,enantiomer,descriptor,NMR environments,sites
"""

from __future__ import annotations

import io
import json
import re
from collections.abc import Callable, Iterable, Mapping, Sequence
from typing import TYPE_CHECKING, Any

from enumerator.render.sections import result_sections, safety_lines
from enumerator.render.typeset import (
    formula_html,
    formula_tex,
    html_species,
    html_symbol,
    latex_breakable,
    latex_escape,
    latex_species,
    latex_symbol,
    markdown_symbol,
    nucleus_html,
    nucleus_tex,
)
from enumerator.workflow.result import Result

if TYPE_CHECKING:
    import pandas as pd

__all__ = [
    "LATEX_PACKAGES",
    "frame",
    "csv",
    "csv_text",
    "csv_metadata",
    "neutralise",
    "latex",
    "latex_table",
    "latex_comment",
    "markdown",
    "markdown_table",
    "result_caption",
    "slug",
    "write_csv",
    "cell_text",
    "latex_symbol",
    "latex_species",
    "latex_escape",
    "markdown_symbol",
]

#: The preamble lines every LaTeX table of isosieve needs.
LATEX_PACKAGES = "\\usepackage{booktabs,longtable,array,pdflscape}"

#: Text width (pt) a portrait table must fit: the article class's at 10 pt; wider tables are turned.
PORTRAIT_PT = 345.0
#: Text width (pt) of a turned table: the article class's text height at 10 pt on A4 or Letter, rounded down.
LANDSCAPE_PT = 540.0
#: Font size of the tables (\footnotesize of the 10 pt classes).
FONT_PT = 8.0
#: Inter-column space each side of a cell (pt, \tabcolsep as the tables set it).
TABCOLSEP_PT = 3.0

# Computer Modern Roman glyph widths in em, grouped (Knuth, Computer Modern Typefaces, 1986): enough to size
# columns; a slight overestimate keeps the estimate on the safe side.
_WIDE = set("MW")
_CAPS = set("ABCDEFGHIJKLNOPQRSTUVXYZ")
_NARROW = set("iljtfr.,:;'!|()[]-")


def _em(text: str) -> float:
    w = 0.0
    for ch in text:
        if ch in _WIDE:
            w += 1.0
        elif ch in _CAPS:
            w += 0.76
        elif ch in _NARROW:
            w += 0.4
        elif ch in "mw":
            w += 0.84
        else:
            w += 0.56
    return w


# ---------------------------------------------------------------- the frame


def frame(res: Result) -> pd.DataFrame:
    """The result's isomer table (:meth:`Result.to_dataframe`).

    Parameters
    ----------
    res : Result

    Returns
    -------
    pandas.DataFrame
    """
    return res.to_dataframe()


def _kinds(df: pd.DataFrame) -> Mapping[str, str]:
    return df.attrs.get("kinds", {})


def cell_text(v: Any) -> str:
    """A frame cell as text: '' for a missing value, else ``str``."""
    if v is None:
        return ""
    try:
        import pandas as pd

        if pd.isna(v):
            return ""
    except (TypeError, ValueError):
        pass
    return str(v)


# ---------------------------------------------------------------- CSV

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
_NUMBER = re.compile(r"[+-]?\d+(\.\d+)?")


def neutralise(cell: str) -> str:
    """A cell a spreadsheet would evaluate (first character ``= + - @``, tab, CR) with an apostrophe in front.

    Parameters
    ----------
    cell : str

    Returns
    -------
    str

    A plain number (``-1``, a ligand's charge) and a lone ``-`` stay as they are: no spreadsheet runs them.

    >>> neutralise("=HYPERLINK(1)"), neutralise("2A1 + B2"), neutralise("-1")
    ("'=HYPERLINK(1)", '2A1 + B2', '-1')
    """
    if not cell.startswith(_FORMULA_START) or cell == "-" or _NUMBER.fullmatch(cell):
        return cell
    return "'" + cell


def write_csv(header: Sequence[str], records: Iterable[Sequence[Any]]) -> str:
    """RFC 4180 CSV text (CRLF line ends): the header, then the records padded to its width; cells neutralised
    (:func:`neutralise`).

    Parameters
    ----------
    header : sequence of str
    records : iterable of sequence

    Returns
    -------
    str
    """
    buf = io.StringIO()
    import csv as _csv  # only for CSV output

    w = _csv.writer(buf, lineterminator="\r\n", quoting=_csv.QUOTE_MINIMAL)
    w.writerow([neutralise(str(h)) for h in header])
    for r in records:
        cells = [neutralise(cell_text(x)) for x in r]
        w.writerow(cells + [""] * (len(header) - len(cells)))
    return buf.getvalue()


def csv_text(df: pd.DataFrame) -> str:
    """A frame as plain CSV: the header and one row per isomer (no comment lines, no index).

    Parameters
    ----------
    df : pandas.DataFrame

    Returns
    -------
    str
    """
    return write_csv(list(df.columns), df.itertuples(index=False, name=None))


def csv(res: Result, df: pd.DataFrame | None = None) -> str:
    """The isomer table of one result as plain CSV (:func:`csv_text`).

    Parameters
    ----------
    res : Result
    df : pandas.DataFrame, optional
        Its frame (:func:`frame`) when the caller has it already.

    Returns
    -------
    str
    """
    return csv_text(frame(res) if df is None else df)


_DESCRIBE: tuple[tuple[str, str], ...] = (
    (r"^label$", "the complex's label in the job file"),
    (r"^formula$", "the formula as read"),
    (r"^geometry$", "IUPAC polyhedral symbol of the ideal geometry (IR-9.3.2)"),
    (r"^isomer$", "isomer id; a and b are the two enantiomers of a chiral isomer"),
    (r"^point group$", "Schoenflies point group of the ideal-polyhedron isomer"),
    (r"^chiral$", "yes when the isomer is chiral"),
    (r"^enantiomer$", "the id of its mirror image (empty when achiral)"),
    (r"^descriptor$", "IUPAC 2005 stereodescriptor (IR-9.3)"),
    (r"^prefix$", "everyday prefix (cis, trans, fac, mer ...)"),
    (r"^IUPAC name$", "additive name (IUPAC 2005 IR-9.2) with the descriptor in front"),
    (r" species$", "symmetry species (Mulliken labels) of the stretching modes of this reporter class"),
    (r" IR$", "number of IR-active stretching bands (a degenerate species is one band)"),
    (r" Raman$", "number of Raman-active stretching bands"),
    (r" NMR$", "number of NMR signals (environments) of this reporter class"),
    (r"^NMR environments$", "NMR environments of the other ligands, ligand(nucleus):count"),
    (r"^sites$", "which polyhedron sites (1-based) each ligand holds; chelates as linked tuples"),
)


def _describe(header: str) -> str:
    for pattern, text in _DESCRIBE:
        if re.search(pattern, header):
            return text
    return header


def csv_metadata(
    df: pd.DataFrame,
    csv_name: str,
    *,
    title: str,
    cautions: Sequence[str] = (),
    notes: Sequence[str] = (),
    version: str = "",
) -> str:
    """The sidecar of a CSV file: W3C CSV on the Web metadata (Tabular Metadata, W3C Recommendation 2015) with
    the title, every column's title and meaning, the safety cautions and the provenance.

    Parameters
    ----------
    df : pandas.DataFrame
        The frame written.
    csv_name : str
        The CSV file's name (the metadata's ``url``, relative to the sidecar).
    title : str
    cautions : sequence of str
        Safety cautions of the formulas in the table.
    notes : sequence of str
        Other notes (geometry choice, incomplete lists ...).
    version : str
        The isosieve version that wrote it.

    Returns
    -------
    str
        JSON text ending in a newline.
    """
    doc = {
        "@context": "http://www.w3.org/ns/csvw",
        "url": csv_name,
        "dc:title": title,
        "dc:creator": f"isosieve {version}".strip(),
        "dc:description": (
            "Isomers on ideal polyhedra with point groups, IUPAC descriptors and stretching-mode counts. "
            "Band counts are predicted from symmetry, not measured."
        ),
        "safety": list(cautions),
        "notes": list(notes),
        "tableSchema": {
            "columns": [
                {"name": f"c{k}", "titles": str(h), "dc:description": _describe(str(h))} for k, h in enumerate(df)
            ]
        },
    }
    return json.dumps(doc, ensure_ascii=False, indent=2) + "\n"


# ---------------------------------------------------------------- LaTeX

_TEX_OMIT = ("formula", "geometry", "chiral", "enantiomer", "IUPAC name", "label")


def latex_comment(text: str) -> str:
    """One safe ``%`` comment line: every line break and control character made a space, the rest escaped.

    Parameters
    ----------
    text : str

    Returns
    -------
    str

    >>> latex_comment("x\\n\\\\input{/etc/passwd}")
    '% x \\\\textbackslash{}input\\\\{/etc/passwd\\\\}'
    """
    flat = " ".join("".join(ch if ch.isprintable() else " " for ch in text).split())
    return "% " + latex_escape(flat)


def _texcell_text(kind: str, value: str) -> str:
    if not value:
        return ""
    if kind == "symbol":
        return latex_symbol(value)
    if kind == "species":
        return " + ".join(latex_species(t.strip()) for t in re.split(r"\s\+\s", value))
    if kind == "formula":
        return formula_tex(value)
    if kind in ("descriptor", "id", "count"):
        return latex_escape(value)
    return nucleus_tex(latex_breakable(value), escaped=True)


def _tex_head(header: str) -> str:
    return nucleus_tex(header)


def _tokens(kind: str, value: str) -> list[str]:
    if kind in ("descriptor", "id", "count", "symbol"):
        return [value]
    words = value.split(" ")
    if kind == "species":
        return [w for w in words if w != "+"] + ["+"]
    out: list[str] = []
    for w in words:
        out += re.split(r"(?<=[,;/])|(?<=[)\]])(?=[A-Za-z(\[])", w) if len(w) > 12 else [w]
    return out


def _widths(df: pd.DataFrame, cols: Sequence[str], kinds: Mapping[str, str]) -> tuple[list[float], list[float]]:
    """(least, preferred) content width in pt of each column: its longest unbreakable word, its longest cell."""
    least, pref = [], []
    for c in cols:
        kind = kinds.get(c, "text")
        cells = [cell_text(v) for v in df[c]]
        words = [w for v in cells for w in _tokens(kind, v)]
        scale = 0.8 if kind == "symbol" else 1.0
        lo = max([_em(w) * scale for w in words if w] + [_em(w) for w in c.split(" ")]) * FONT_PT + 1.5
        hi = max([lo] + [_em(v) * scale * FONT_PT + 1.5 for v in cells])
        least.append(lo)
        pref.append(min(hi, 160.0))
    return least, pref


def _fractions(least: Sequence[float], pref: Sequence[float]) -> tuple[list[float], bool]:
    """Column widths as fractions of the line width, and whether the table must be turned."""
    sep = 2 * TABCOLSEP_PT
    turned = sum(x + sep for x in least) > PORTRAIT_PT
    width = LANDSCAPE_PT if turned else PORTRAIT_PT
    w = [x + sep for x in least]
    room = width - sum(w)
    if room > 0:
        want = [max(p - x, 0.0) for p, x in zip(pref, least)]
        total = sum(want)
        give = [room * x / total for x in want] if total > room else list(want)
        w = [a + b for a, b in zip(w, give)]
        rest = width - sum(w)
        w = [a + rest * a / sum(w) for a in w]
    s = sum(w)
    return [round(a / s, 4) for a in w], turned


def _colspec(fractions: Sequence[float]) -> str:
    cell = ">{{\\raggedright\\arraybackslash}}p{{\\dimexpr {:.4f}\\linewidth-2\\tabcolsep\\relax}}"
    return "".join(cell.format(f) for f in fractions)


def latex_table(
    df: pd.DataFrame,
    caption: str,
    label: str,
    *,
    cautions: Sequence[str] = (),
    omit: Sequence[str] = _TEX_OMIT,
) -> str:
    """A frame as a booktabs ``longtable`` that fits the text width (turned when it cannot), then the IUPAC
    names as a second longtable and the cautions as a paragraph.

    Parameters
    ----------
    df : pandas.DataFrame
        With ``attrs["kinds"]`` (:mod:`enumerator.workflow.table`).
    caption : str
        Plain text (escaped here; formulas in it are typeset when given as the frame's formula).
    label : str
        ``\\label`` key; characters other than letters, digits, ``:``, ``-`` and ``_`` are dropped.
    cautions : sequence of str
        Safety cautions, printed under the table.
    omit : sequence of str
        Columns shown elsewhere (the caption, the names table).

    Returns
    -------
    str
        Needs :data:`LATEX_PACKAGES` in the preamble.
    """
    kinds = _kinds(df)
    cols = [c for c in df.columns if c not in omit]
    least, pref = _widths(df, cols, kinds)
    fr, turned = _fractions(least, pref)
    spec = _colspec(fr)
    key = re.sub(r"[^A-Za-z0-9:_-]", "", label)
    head = " & ".join(_tex_head(c) for c in cols) + " \\\\"
    n = len(cols)
    out = [
        "\\begingroup\\footnotesize\\setlength{\\tabcolsep}{3pt}",
        f"\\begin{{longtable}}{{@{{}}{spec}@{{}}}}",
        f"\\caption{{{caption}}}\\label{{{key}}}\\\\",
        "\\toprule",
        head,
        "\\midrule",
        "\\endfirsthead",
        f"\\multicolumn{{{n}}}{{@{{}}l}}{{\\tablename~\\thetable{{}} (continued)}}\\\\",
        "\\toprule",
        head,
        "\\midrule",
        "\\endhead",
        "\\bottomrule",
        "\\endfoot",
    ]
    for row in df[cols].itertuples(index=False, name=None):
        out.append(" & ".join(_texcell_text(kinds.get(c, "text"), cell_text(v)) for c, v in zip(cols, row)) + " \\\\")
    out.append("\\end{longtable}")
    out.append("\\endgroup")
    if turned:
        out = ["\\begin{landscape}", *out, "\\end{landscape}"]
    if "IUPAC name" in df.columns and df["IUPAC name"].map(cell_text).any():
        out += _names_table(df, key)
    if cautions:
        out.append("\\par\\noindent{\\footnotesize\\textbf{Safety.} " + latex_escape(" ".join(cautions)) + "}\\par")
    return "\n".join(out) + "\n"


def _names_table(df: pd.DataFrame, key: str) -> list[str]:
    idcol = ["label", "isomer"] if "label" in df.columns and df["label"].nunique() > 1 else ["isomer"]
    fr = [0.14] * len(idcol) + [1.0 - 0.14 * len(idcol)]
    spec = _colspec(fr)
    out = [
        "\\begingroup\\footnotesize\\setlength{\\tabcolsep}{3pt}",
        f"\\begin{{longtable}}{{@{{}}{spec}@{{}}}}",
        f"\\caption{{IUPAC names (IR-9.2) with the IR-9.3 descriptor in front.}}\\label{{{key}-names}}\\\\",
        "\\toprule",
        " & ".join(idcol + ["IUPAC name"]) + " \\\\",
        "\\midrule",
        "\\endhead",
        "\\bottomrule",
        "\\endfoot",
    ]
    for row in df[[*idcol, "IUPAC name"]].itertuples(index=False, name=None):
        cells = [latex_breakable(cell_text(x)) for x in row]
        out.append(" & ".join(cells) + " \\\\")
    return out + ["\\end{longtable}", "\\endgroup"]


def _summary(res: Result) -> str:
    iso = res.isomer_set
    return f"{iso.geometric_isomers} geometric isomer(s), {iso.stereoisomers} stereoisomer(s)" + (
        "" if iso.complete else " (incomplete list)"
    )


def slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower() or "complex"


def result_caption(res: Result) -> str:
    """The LaTeX caption of one result's table: formula (typeset), geometry, counts, what a and b mean.

    Parameters
    ----------
    res : Result

    Returns
    -------
    str
    """
    chiral = any(i.chiral for i in res.isomers)
    tail = " Isomers a and b are enantiomers." if chiral else ""
    return (
        f"Isomers of {formula_tex(res.composition.formula)} on {latex_escape(res.geometry.symbol)} "
        f"({latex_escape(res.geometry.name)}): {latex_escape(_summary(res))}.{tail}"
    )


def latex(res: Result, df: pd.DataFrame | None = None) -> str:
    """One result's LaTeX tables (:func:`latex_table`) with a comment naming the packages they need.

    Parameters
    ----------
    res : Result
    df : pandas.DataFrame, optional
        Its frame (:func:`frame`) when the caller has it already.

    Returns
    -------
    str
    """
    body = latex_table(
        frame(res) if df is None else df,
        result_caption(res),
        f"tab:isosieve-{slug(res.composition.formula)}",
        cautions=safety_lines(res),
    )
    return f"% isosieve table; preamble: {LATEX_PACKAGES}\n" + body


# ---------------------------------------------------------------- Markdown


def _md_escape(text: str) -> str:
    import html

    return html.escape(text, quote=False).replace("|", "\\|").replace("\n", " ").replace("\r", " ")


_MD_CELL: Mapping[str, Callable[[str], str]] = {
    "symbol": html_symbol,
    "species": html_species,
    "formula": formula_html,
}


def _mdcell_text(kind: str, value: str) -> str:
    f = _MD_CELL.get(kind)
    if f is not None:
        return f(value).replace("|", "\\|")
    return nucleus_html(value).replace("|", "\\|").replace("\n", " ") if value else ""


def markdown_table(df: pd.DataFrame, omit: Sequence[str] = ("formula", "geometry")) -> str:
    """A frame as a GitHub-flavoured pipe table; symbols, species and formulas with ``<sub>``, every other
    character HTML-escaped.

    Parameters
    ----------
    df : pandas.DataFrame
    omit : sequence of str
        Columns given in the heading instead.

    Returns
    -------
    str
        Lines without a final newline.
    """
    kinds = _kinds(df)
    cols = [c for c in df.columns if c not in omit]
    out = [
        "| " + " | ".join(nucleus_html(c).replace("|", "\\|") for c in cols) + " |",
        "|" + "|".join("---" for _ in cols) + "|",
    ]
    for row in df[cols].itertuples(index=False, name=None):
        out.append(
            "| " + " | ".join(_mdcell_text(kinds.get(c, "text"), cell_text(v)) for c, v in zip(cols, row)) + " |"
        )
    return "\n".join(out)


def _fence(text: str) -> str:
    ticks = max((len(m) for m in re.findall(r"`+", text)), default=0)
    return "`" * max(3, ticks + 1)


def markdown(res: Result) -> str:
    """A GitHub-flavoured Markdown section for one result: heading, table, sections, notes, cautions.

    Parameters
    ----------
    res : Result

    Returns
    -------
    str
    """
    out = [f"### {formula_html(res.composition.formula)} on {_md_escape(res.geometry.symbol)}", ""]
    out.append(f"Geometry: {_md_escape(res.geometry_reason)}.  ")
    out.append(_summary(res) + ".")
    df = frame(res)
    out += ["", markdown_table(df)]
    for sec in result_sections(res):
        if sec.title == "Safety" or (sec.title.startswith("IUPAC names (") and "IUPAC name" in df.columns):
            continue  # the cautions close the section; the names are a column of the table
        fence = _fence(sec.text)
        out += ["", f"**{_md_escape(sec.title)}**", "", f"{fence}text", sec.text.rstrip("\n"), fence]
    for n in res.notes:
        out += ["", f"Note: {_md_escape(n)}"]
    safety = safety_lines(res)
    if safety:
        out += ["", "> **Safety.** " + _md_escape(" ".join(safety))]
    return "\n".join(out) + "\n"
