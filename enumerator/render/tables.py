"""Tables for supporting information: Markdown, CSV and LaTeX.

* :func:`markdown` renders on a code host (GitHub-flavoured pipe tables;
  point groups with ``<sub>``);
* :func:`csv` is RFC 4180 (CRLF line ends, quoted where needed, UTF-8) and
  opens in a spreadsheet; the first columns repeat the formula and the
  geometry so several tables can be stacked; cautions follow as records
  whose first field starts with ``#``;
* :func:`latex` uses booktabs and typesets symmetry labels: ``C2v`` ->
  ``$C_{2v}$``, ``A1g`` -> ``$A_{1g}$``, ``E''`` -> ``$E''$``.

Every analysis's columns are included (``Column.latex`` when given).

>>> latex_symbol("C2v"), latex_symbol("Dinfh"), latex_symbol("Cs")
('$C_{2v}$', '$D_{\\\\infty h}$', '$C_{s}$')
>>> latex_species("2A1 + B1 + E''")
"$2A_{1} + B_{1} + E''$"
"""

from __future__ import annotations

import csv as _csv
import io
import re
from collections.abc import Sequence

from enumerator.isomers.occupancy import occupancy
from enumerator.workflow.result import Result

__all__ = ["markdown", "csv", "latex", "rows", "latex_symbol", "latex_species", "latex_escape", "markdown_symbol"]

_GROUP = re.compile(r"^(Dinf|Cinf|[CDSTOI])(\d*)([a-z]*)$")
_IRREP = re.compile(r"^(Sigma|Delta|Pi|Phi|[ABETGH])_?(\d*)([gu]?)((?:'{1,2})?)([+-]?)$")
_GREEK = {"Sigma": r"\Sigma", "Pi": r"\Pi", "Delta": r"\Delta", "Phi": r"\Phi"}


def latex_escape(text: str) -> str:
    """Plain text made safe for LaTeX."""
    rep = {
        "\\": r"\textbackslash{}",
        "&": r"\&",
        "%": r"\%",
        "$": r"\$",
        "#": r"\#",
        "_": r"\_",
        "{": r"\{",
        "}": r"\}",
        "~": r"\textasciitilde{}",
        "^": r"\textasciicircum{}",
        "η": r"$\eta$",
        "×": r"$\times$",
        "κ": r"$\kappa$",
        "′": r"$'$",
        "″": r"$''$",
        "Δ": r"$\Delta$",
        "Λ": r"$\Lambda$",
        "−": r"$-$",
    }
    return "".join(rep.get(ch, ch) for ch in text)


def _group_tex(label: str) -> str | None:
    m = _GROUP.match(label)
    if not m:
        return None
    head, num, tail = m.groups()
    if head in ("Dinf", "Cinf"):
        return f"{head[0]}_{{\\infty {tail}}}" if tail else f"{head[0]}_{{\\infty}}"
    sub = num + tail
    return f"{head}_{{{sub}}}" if sub else head


def _irrep_tex(label: str) -> str | None:
    m = _IRREP.match(label)
    if not m:
        return None
    head, num, gu, primes, pm = m.groups()
    head = _GREEK.get(head, head)
    sub = num + gu
    out = head + (f"_{{{sub}}}" if sub else "")
    if pm:
        out += f"^{{{pm}}}"
    return out + primes


def latex_symbol(label: str) -> str:
    """A point-group or Mulliken label in math mode, else escaped text."""
    tex = (
        _group_tex(label) if _GROUP.match(label) and not _IRREP.match(label) else _irrep_tex(label) or _group_tex(label)
    )
    return f"${tex}$" if tex else latex_escape(label)


def latex_species(text: str) -> str:
    """'2A1 + B1 + B2' -> '$2A_{1} + B_{1} + B_{2}$' (unknown text is escaped)."""
    terms = [t.strip() for t in text.split("+")] if text.strip() else []
    out = []
    for t in terms:
        m = re.match(r"^(\d*)\s*(\S+)$", t)
        if not m:
            return latex_escape(text)
        tex = _irrep_tex(m.group(2))
        if tex is None:
            return latex_escape(text)
        out.append(m.group(1) + tex)
    return "$" + " + ".join(out) + "$" if out else latex_escape(text)


def markdown_symbol(label: str) -> str:
    """'C2v' -> 'C<sub>2v</sub>' (renders on a code host)."""
    m = _GROUP.match(label)
    if not m:
        return label
    head, num, tail = m.groups()
    if head in ("Dinf", "Cinf"):
        return f"{head[0]}<sub>∞{tail}</sub>"
    sub = num + tail
    return f"{head}<sub>{sub}</sub>" if sub else head


def rows(res: Result) -> tuple[list[str], list[list[str]], list[list[str]]]:
    """(header, plain cells, LaTeX cells) of the isomer table."""
    extra = [c for a in res.analyses for c in a.columns()]
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


def _safety(res: Result) -> list[str]:
    for a in res.analyses:
        j = a.top_json()
        if "safety" in j:
            return list(j["safety"])
    return []


def _summary(res: Result) -> str:
    iso = res.isomer_set
    return f"{iso.geometric_isomers} geometric isomer(s), {iso.stereoisomers} stereoisomer(s)" + (
        "" if iso.complete else " (incomplete list)"
    )


def _md_cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def markdown(res: Result) -> str:
    """A GitHub-flavoured Markdown section for one result."""
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
    for a in res.analyses:
        for sec in a.sections():
            if sec.title == "Safety":
                continue
            out += ["", f"**{sec.title}**", "", "```text", sec.text.rstrip("\n"), "```"]
    for n in res.notes:
        out += ["", f"Note: {_md_cell(n)}"]
    safety = _safety(res)
    if safety:
        out += ["", "> **Safety.** " + " ".join(safety)]
    return "\n".join(out) + "\n"


def csv_records(res: Result) -> tuple[list[str], list[list[str]]]:
    """Header and records with the formula and geometry first."""
    header, plain, _ = rows(res)
    return ["formula", "geometry", *header], [[res.composition.formula, res.geometry.symbol, *r] for r in plain]


def csv(res: Result) -> str:
    """RFC 4180 CSV of the isomer table (CRLF line ends, UTF-8)."""
    header, recs = csv_records(res)
    return write_csv(header, recs, _safety(res))


def write_csv(header: Sequence[str], records: Sequence[Sequence[str]], cautions: Sequence[str] = ()) -> str:
    buf = io.StringIO()
    w = _csv.writer(buf, lineterminator="\r\n", quoting=_csv.QUOTE_MINIMAL)
    w.writerow(header)
    for r in records:
        w.writerow(list(r) + [""] * (len(header) - len(r)))
    for line in cautions:
        w.writerow(["# safety: " + line] + [""] * (len(header) - 1))
    return buf.getvalue()


def latex(res: Result) -> str:
    """A booktabs ``table`` environment (needs \\usepackage{booktabs})."""
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
    safety = _safety(res)
    if safety:
        out.append("")
        out.append("\\par\\smallskip\\footnotesize Safety: " + latex_escape(" ".join(safety)))
    out.append("\\end{table}")
    return "\n".join(out) + "\n"
