"""Batch files: the formulas (and labels) of ``isosieve batch``, read from text or CSV.

A batch file has one formula a line (blank lines and lines starting with
``#`` are skipped), or is a CSV file whose header has a ``formula`` column
and optionally a ``label`` column.  :func:`parse_formulas` reads text
already in hand, :func:`read_formulas` a file.

>>> parse_formulas("# screen\\n[Fe(CN)6]4-\\nMa4b2\\n", "screen.txt")
[('[Fe(CN)6]4-', ''), ('Ma4b2', '')]
>>> parse_formulas("label,formula\\nA,Ma5b\\n", "in.csv")
[('Ma5b', 'A')]
"""

from __future__ import annotations

import csv
import io

from enumerator.errors import InputError

__all__ = ["parse_formulas", "read_formulas"]


def parse_formulas(text: str, where: str) -> list[tuple[str, str]]:
    """(formula, label) pairs from the text of a batch file.

    Parameters
    ----------
    text : str
        The file's text.
    where : str
        The file name, for the message.

    Returns
    -------
    list of (str, str)
        In file order; the label is '' when the file gives none.

    Raises
    ------
    InputError
        The text holds no formulas.
    """
    # lines end at '\n' (and '\r\n') only: str.splitlines would also split at form feeds, separators and
    # U+2028, so a control character in a formula would quietly cut it into two rows instead of being refused
    lines = [ln.removesuffix("\r") for ln in text.split("\n")]
    lines = [ln for ln in lines if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise InputError(f"'{where}' holds no formulas", "write one formula a line, or a CSV with a 'formula' column")
    head = [h.strip().lower() for h in next(csv.reader([lines[0]]))]
    if "formula" not in head:
        return [(ln.strip(), "") for ln in lines]
    rows = list(csv.reader(io.StringIO("\n".join(lines))))
    fi = head.index("formula")
    li = head.index("label") if "label" in head else None
    out = []
    for r in rows[1:]:
        f = r[fi].strip() if fi < len(r) else ""
        out.append((f, r[li].strip() if li is not None and li < len(r) else ""))
    return out


def read_formulas(path: str) -> list[tuple[str, str]]:
    """(formula, label) pairs from a batch file (UTF-8, a byte-order mark allowed).

    Parameters
    ----------
    path : str

    Returns
    -------
    list of (str, str)

    Raises
    ------
    InputError
        The file cannot be read, is not UTF-8 or holds no formulas.
    """
    try:
        with open(path, "rb") as fh:
            raw = fh.read()
    except OSError as exc:
        raise InputError(f"cannot read '{path}' ({exc.strerror})", "check the path") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise InputError(
            f"'{path}' is not UTF-8 text (byte 0x{raw[exc.start]:02x} on line {line})", "save the file as UTF-8"
        ) from None
    return parse_formulas(text.replace("\r\n", "\n"), path)
