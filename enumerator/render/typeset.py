"""Symbols typeset for LaTeX and Markdown: point groups, Mulliken labels,
species strings and plain text made safe.

* :func:`latex_symbol`: ``C2v`` -> ``$C_{2v}$``, ``A1g`` -> ``$A_{1g}$``,
  ``E''`` -> ``$E''$``, ``Sigma_g+`` -> ``$\\Sigma_{g}^{+}$``;
* :func:`latex_species`: a reduction such as ``2A1 + B1`` in math mode;
* :func:`latex_escape`: LaTeX's special characters and the Greek letters
  and primes of descriptors and names;
* :func:`markdown_symbol`: ``C2v`` -> ``C<sub>2v</sub>`` (renders on a code host).

>>> latex_symbol("C2v"), latex_symbol("Dinfh"), latex_symbol("Cs")
('$C_{2v}$', '$D_{\\\\infty h}$', '$C_{s}$')
>>> latex_species("2A1 + B1 + E''")
"$2A_{1} + B_{1} + E''$"
>>> latex_escape("50% of κN")
'50\\\\% of $\\\\kappa$N'
>>> markdown_symbol("D4h")
'D<sub>4h</sub>'
>>> formula_tex("[Fe(CN)5(NO)]2-")
'[Fe(CN)$_{5}$(NO)]$^{2-}$'
>>> formula_html("[RuCl2(CO)(13CO)(PPh3)2]")
'[RuCl<sub>2</sub>(CO)(<sup>13</sup>CO)(PPh<sub>3</sub>)<sub>2</sub>]'
>>> html_species("2A1 + B2u")
'2A<sub>1</sub> + B<sub>2u</sub>'
"""

from __future__ import annotations

import re
from types import MappingProxyType

__all__ = [
    "latex_symbol",
    "latex_species",
    "latex_escape",
    "latex_breakable",
    "markdown_symbol",
    "html_symbol",
    "html_species",
    "formula_parts",
    "formula_tex",
    "formula_html",
    "nucleus_tex",
    "nucleus_html",
]

_GROUP = re.compile(r"^(Dinf|Cinf|[CDSTOI])(\d*)([a-z]*)$")
_IRREP = re.compile(r"^(Sigma|Delta|Pi|Phi|[ABETGH])_?(\d*)([gu]?)((?:'{1,2})?)([+-]?)$")
_GREEK = MappingProxyType({"Sigma": r"\Sigma", "Pi": r"\Pi", "Delta": r"\Delta", "Phi": r"\Phi"})
_ESCAPES = MappingProxyType(
    {
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
)


def latex_escape(text: str) -> str:
    """Plain text made safe for LaTeX (special characters escaped, Greek letters and primes in math mode).

    Parameters
    ----------
    text : str

    Returns
    -------
    str
    """
    return "".join(_ESCAPES.get(ch, ch) for ch in text)


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
    """A point-group or Mulliken label in math mode, else escaped text.

    Parameters
    ----------
    label : str
        'C2v', 'Dinfh', 'A1g', "E''", ...

    Returns
    -------
    str
    """
    tex = (
        _group_tex(label) if _GROUP.match(label) and not _IRREP.match(label) else _irrep_tex(label) or _group_tex(label)
    )
    return f"${tex}$" if tex else latex_escape(label)


def latex_species(text: str) -> str:
    """'2A1 + B1 + B2' -> '$2A_{1} + B_{1} + B_{2}$' (unknown text is escaped).

    Parameters
    ----------
    text : str
        A species string as the reduction writes it.

    Returns
    -------
    str
    """
    terms = [t.strip() for t in re.split(r"\s\+\s", text)] if text.strip() else []
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
    """'C2v' -> 'C<sub>2v</sub>' (renders on a code host).

    Parameters
    ----------
    label : str
        A point-group label.

    Returns
    -------
    str
    """
    m = _GROUP.match(label)
    if not m:
        return label
    head, num, tail = m.groups()
    if head in ("Dinf", "Cinf"):
        return f"{head[0]}<sub>∞{tail}</sub>"
    sub = num + tail
    return f"{head}<sub>{sub}</sub>" if sub else head


def latex_breakable(text: str) -> str:
    """Escaped text that may break after a comma, a closing bracket or a slash (long names and prefixes in
    narrow table columns; an explicit hyphen is a break point of its own).

    Parameters
    ----------
    text : str

    Returns
    -------
    str

    >>> print(latex_breakable("cis(Cl),trans(CO),cis(PPh3)"))
    cis(Cl),\\allowbreak{}trans(CO),\\allowbreak{}cis(PPh3)
    """
    out = []
    for k, ch in enumerate(text):
        out.append(latex_escape(ch))
        nxt = text[k + 1] if k + 1 < len(text) else ""
        if nxt and len(text) > 12 and (ch in ",;/" or (ch in ")]" and (nxt.isalpha() or nxt in "(["))):
            out.append("\\allowbreak{}")
    return "".join(out)


def html_symbol(label: str) -> str:
    """A point-group or Mulliken label as HTML: ``C2v`` -> ``C<sub>2v</sub>``, ``A1g`` -> ``A<sub>1g</sub>``,
    ``Sigma_g+`` -> ``Σ<sub>g</sub><sup>+</sup>``; anything else escaped.

    Parameters
    ----------
    label : str

    Returns
    -------
    str
    """
    import html

    if _GROUP.match(label) and not _IRREP.match(label):
        return markdown_symbol(label)
    m = _IRREP.match(label)
    if not m:
        return markdown_symbol(label) if _GROUP.match(label) else html.escape(label)
    head, num, gu, primes, pm = m.groups()
    head = {"Sigma": "Σ", "Pi": "Π", "Delta": "Δ", "Phi": "Φ"}.get(head, head)
    sub = num + gu
    return head + (f"<sub>{sub}</sub>" if sub else "") + (f"<sup>{pm}</sup>" if pm else "") + primes


def html_species(text: str) -> str:
    """A species string as HTML, each Mulliken label with its subscripts (unknown text escaped).

    Parameters
    ----------
    text : str

    Returns
    -------
    str
    """
    import html

    out = []
    for t in (t.strip() for t in re.split(r"\s\+\s", text)) if text.strip() else ():
        m = re.match(r"^(\d*)\s*(\S+)$", t)
        if not m or not _IRREP.match(m.group(2)):
            return html.escape(text)
        out.append(m.group(1) + html_symbol(m.group(2)))
    return " + ".join(out) if out else html.escape(text)


_HAPTO = re.compile(r"(η|eta|h)(\d+)-")
_CHARGE = re.compile(r"(?<=[\]\)A-Za-z0-9])(\d*[+\-−])$")


def formula_parts(formula: str) -> tuple[tuple[str, str], ...]:
    """A formula cut into (kind, text) runs the way chemists typeset it: 'sub' for counts, 'sup' for an
    isotope mass number (``13CO``), a hapticity (``η5-``) or the charge, 'text' for the rest.

    Parameters
    ----------
    formula : str
        A condensed or abstract formula as the parser reads it.

    Returns
    -------
    tuple of (str, str)

    >>> formula_parts("[Co(NH3)4Cl2]+")[-4:]
    (('text', 'Cl'), ('sub', '2'), ('text', ']'), ('sup', '+'))
    """
    charge = ""
    body = formula
    m = _CHARGE.search(formula)
    if m and ("[" in formula or not m.group(1)[-1:].isdigit()):
        charge, body = m.group(1).replace("−", "-"), formula[: m.start()]
    out: list[tuple[str, str]] = []

    def add(kind: str, text: str) -> None:
        if out and out[-1][0] == kind:
            out[-1] = (kind, out[-1][1] + text)
        else:
            out.append((kind, text))

    i = 0
    while i < len(body):
        h = _HAPTO.match(body, i)
        if h and (i == 0 or not body[i - 1].isalpha()):
            add("text", "η")
            add("sup", h.group(2))
            add("text", "-")
            i = h.end()
            continue
        ch = body[i]
        if ch.isdigit():
            j = i
            while j < len(body) and body[j].isdigit():
                j += 1
            before = body[i - 1] if i else ""
            isotope = (before in ("", "(", "[", " ", "-") or before.isspace()) and j < len(body) and body[j].isupper()
            add(
                "sup" if isotope else ("sub" if before and (before.isalnum() or before in ")]}") else "text"), body[i:j]
            )
            i = j
            continue
        add("text", ch)
        i += 1
    if charge:
        add("sup", charge)
    return tuple(out)


def formula_tex(formula: str) -> str:
    """A formula for LaTeX: counts as subscripts, mass numbers, hapticities and the charge as superscripts.

    Parameters
    ----------
    formula : str

    Returns
    -------
    str
    """
    out = []
    for kind, text in formula_parts(formula):
        if kind == "text":
            out.append(latex_escape(text))
        else:
            out.append(f"$_{{{latex_escape(text)}}}$" if kind == "sub" else f"$^{{{latex_escape(text)}}}$")
    return "".join(out)


def formula_html(formula: str) -> str:
    """A formula as HTML (``<sub>``/``<sup>``), every character escaped.

    Parameters
    ----------
    formula : str

    Returns
    -------
    str
    """
    import html

    out = []
    for kind, text in formula_parts(formula):
        t = html.escape(text)
        out.append(t if kind == "text" else f"<{kind}>{t}</{kind}>")
    return "".join(out)


_NUCLEUS = re.compile(r"(?<![A-Za-z0-9])(\d{1,3})([A-Z][a-z]?)(?![A-Za-z0-9])")


def nucleus_tex(text: str, escaped: bool = False) -> str:
    """Text with every nucleus (``13C``, ``31P``) written with its mass number raised, for LaTeX.

    Parameters
    ----------
    text : str
    escaped : bool, optional
        The text is LaTeX already (escape nothing more).

    Returns
    -------
    str

    >>> nucleus_tex("PPh3(31P):2")
    'PPh3($^{31}$P):2'
    """
    return _NUCLEUS.sub(r"$^{\1}$\2", text if escaped else latex_escape(text))


def nucleus_html(text: str) -> str:
    """Text with every nucleus (``13C``) written with its mass number raised, for HTML (escaped).

    Parameters
    ----------
    text : str

    Returns
    -------
    str
    """
    import html

    return _NUCLEUS.sub(r"<sup>\1</sup>\2", html.escape(text, quote=False))
