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
"""

from __future__ import annotations

import re
from types import MappingProxyType

__all__ = ["latex_symbol", "latex_species", "latex_escape", "markdown_symbol"]

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
