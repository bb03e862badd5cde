"""JSON text: a stable, documented contract (see README, "JSON schema").

The document's shape is defined once, by each result's ``to_dict()``
(:meth:`enumerator.workflow.result.Result.to_dict` for an isomer listing);
this module only writes it out.  Keys are only ever added, never renamed.

One text, three writers.  :func:`dumps_reference` defines it: the standard
library's ``json.dumps(doc, indent=2, ensure_ascii=False)`` with every array
of numbers joined onto one line.  :func:`dumps` gives the same bytes faster:
through orjson (a compiled encoder, https://github.com/ijl/orjson) where the
document is one orjson writes exactly as the standard library does, else
through :func:`dumps_onepass`, a pure-Python one-pass writer.  orjson differs
from the standard library in three places, each checked before its text is
used: it writes types the standard library refuses (enums, UUIDs; a
``marshal`` pass admits only the plain JSON types), it writes NaN and
infinities as ``null`` (found in that pass's packed floats), and it writes
numbers below 1e-4 in another form (``0.00001`` and ``1e-7`` for ``1e-05``
and ``1e-07``; found in its text).  tests/test_jsonout.py holds all three
writers byte-equal.

>>> print(dumps({"position": [0.0, 1.0, -1.0], "ids": ["1", "2"]}), end="")
{
  "position": [0.0, 1.0, -1.0],
  "ids": [
    "1",
    "2"
  ]
}
"""

from __future__ import annotations

import contextlib
import gc
import itertools
import json
import marshal
import math
import re
from collections.abc import Callable, Iterable, Iterator
from types import ModuleType
from typing import Any

from enumerator.caches import cached
from enumerator.workflow.result import Result, isomer_to_dict

_orjson: ModuleType | None
try:
    import orjson as _orjson
except ImportError:  # pragma: no cover - orjson is a dependency; without it dumps_onepass writes everything
    _orjson = None

__all__ = ["dumps", "dumps_onepass", "dumps_reference", "gc_paused", "result_to_dict", "isomer_to_dict"]


def result_to_dict(res: Result) -> dict[str, Any]:
    """The JSON document of a result; the same as ``res.to_dict()``.

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    dict
    """
    return res.to_dict()


_FLAT = re.compile(r"\[\s*(-?[\d.e+-]+(?:,\s*-?[\d.e+-]+)*)\s*\]")
_encode_str = json.encoder.encode_basestring
_INF = float("inf")
_C_ENCODER: Callable[..., Callable[[Any, int], Any]] | None = getattr(json.encoder, "c_make_encoder", None)


def _flat(m: re.Match[str]) -> str:
    return "[" + ", ".join(x.strip() for x in m.group(1).split(",")) + "]"


@contextlib.contextmanager
def gc_paused() -> Iterator[None]:
    """Pause the cyclic garbage collector for a block, and restore it as it was.

    For building and writing a large document of plain containers (no cycles:
    reference counting frees them); the collector's passes over millions of
    new objects otherwise cost as much as making them.
    """
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


def dumps_reference(doc: Any) -> str:
    """:func:`dumps` written with the standard library's (pure-Python, indenting) encoder.

    The slower route :func:`dumps` replaces, kept as the reference it must
    match byte for byte (tests/test_jsonout.py) and as the benchmarks'
    same-run baseline.

    Parameters
    ----------
    doc : object
        A JSON-serialisable document.

    Returns
    -------
    str
    """
    text = json.dumps(doc, indent=2, ensure_ascii=False)
    return _FLAT.sub(_flat, text) + "\n"


def _float(x: float) -> str:
    if x != x:
        return "NaN"
    if x == _INF:
        return "Infinity"
    if x == -_INF:
        return "-Infinity"
    return float.__repr__(x)


def _key(k: Any) -> str:
    """A dict key as :func:`json.dumps` writes it (str, or a number, bool or None turned to text)."""
    if isinstance(k, str):
        return _string(k)
    if k is True:
        return '"true"'
    if k is False:
        return '"false"'
    if k is None:
        return '"null"'
    if isinstance(k, int):
        return '"' + int.__repr__(k) + '"'
    if isinstance(k, float):
        return '"' + _float(k) + '"'
    raise TypeError(f"keys must be str, int, float, bool or None, not {type(k).__name__}")


def _string(o: str) -> str:
    text = _encode_str(o)
    # the reference writer's flattening pass also rewrites "[1,  2]" inside strings
    return _FLAT.sub(_flat, text) if "[" in text else text


def _scalar(o: Any) -> str | None:
    """The text of a JSON scalar, or None for a container or an unknown type."""
    t = type(o)
    if t is str:
        return _string(o)
    if t is float:
        return _float(o)
    if t is int:
        return int.__repr__(o)
    if o is None:
        return "null"
    if o is True:
        return "true"
    if o is False:
        return "false"
    if isinstance(o, str):
        return _string(o)
    if isinstance(o, int):
        return int.__repr__(o)
    if isinstance(o, float):
        return _float(o)
    return None


def _numeric_line(items: list[Any] | tuple[Any, ...]) -> str | None:
    """A non-empty list of finite numbers on one line, as the reference flattening writes it; else None."""
    parts = []
    for x in items:
        t = type(x)
        if t is float:
            if x != x or x == _INF or x == -_INF:
                return None
            parts.append(float.__repr__(x))
        elif t is int:
            parts.append(int.__repr__(x))
        elif isinstance(x, float):
            if x != x or x == _INF or x == -_INF:
                return None
            parts.append(float.__repr__(x))
        elif isinstance(x, int) and not isinstance(x, bool):
            parts.append(int.__repr__(x))
        else:
            return None
    return "[" + ", ".join(parts) + "]"


def _unknown(o: Any) -> Any:
    raise TypeError(f"Object of type {type(o).__name__} is not JSON serializable")


@cached(maxsize=64)
def _flat_encoder(level: int) -> Callable[[Any, int], Any]:
    """The standard library's C encoder writing items one a line at nesting ``level + 1``."""
    sep = ",\n" + "  " * (level + 1)
    assert _C_ENCODER is not None
    return _C_ENCODER(None, _unknown, _encode_str, None, ": ", sep, False, False, True)


def _sign(v: Any) -> Any:
    """Tell 0.0 from -0.0 (equal as keys, written differently)."""
    return tuple(math.copysign(1.0, x) if type(x) is float else 0.0 for x in v)


def _flat_key(items: Iterable[tuple[Any, Any]]) -> tuple[Any, ...] | None:
    """A key that fixes the text of a container of scalars and number lists, or None for any other container.

    Each value enters with its type (1, 1.0 and True are equal keys but
    different text) and the sign of a zero (0.0 and -0.0 likewise)."""
    parts: list[Any] = []
    add = parts.append
    for k, v in items:
        if k is not None and type(k) is not str:
            return None
        t = type(v)
        if t is str or t is int or t is bool or v is None:
            add((k, t, v))
        elif t is float:
            add((k, t, v, math.copysign(1.0, v)) if not v else (k, t, v))
        elif t is list or t is tuple:
            for x in v:
                tx = type(x)
                if tx is not float and tx is not int:
                    return None
            tv = tuple(v)
            add((k, t, tv, tuple(map(type, v)), _sign(v)) if 0 in tv else (k, t, tv, tuple(map(type, v))))
        else:
            return None
    return tuple(parts)


def _flat_text(o: dict[Any, Any] | list[Any] | tuple[Any, ...], level: int) -> str | None:
    """The indented text of a container of scalars and number lists, written by the C encoder; None where
    the C encoder's text would differ (a number that is not finite: the reference leaves its list multi-line)."""
    if _C_ENCODER is None:
        return None  # an interpreter without the C accelerator: the general writer does it all
    text = "".join(_flat_encoder(level)(o, 0))
    if "NaN" in text or "Infinity" in text:
        return None
    pad = "\n" + "  " * level
    text = text[0] + pad + "  " + text[1:-1] + pad + text[-1]
    # the same flattening as the reference pass: number lists onto one line, and
    # "[1,  2]" inside strings as it rewrites them too
    return _FLAT.sub(_flat, text) if "[" in text[1:] else text


class _Writer:
    """One document's indented text; containers of scalars with the same content are written once."""

    def __init__(self) -> None:
        self.out: list[str] = []
        self.memo: dict[Any, str | None] = {}

    def flat(self, o: Any, level: int, key: tuple[Any, ...]) -> bool:
        """Append the text of a flat container (cached by content); False where the C encoder cannot write it."""
        k = (level, type(o), key)
        text = self.memo.get(k, "")
        if text == "":
            text = self.memo[k] = _flat_text(o, level)
        if text is None:
            return False
        self.out.append(text)
        return True

    def write(self, o: Any, level: int) -> None:
        """Append the indented text of ``o`` at nesting ``level`` (two spaces a level)."""
        append = self.out.append
        if isinstance(o, dict):
            if not o:
                append("{}")
                return
            if type(o) is dict:
                key = _flat_key(o.items())
                if key is not None and self.flat(o, level, key):
                    return
            inner = ",\n" + "  " * (level + 1)
            sep = "{\n" + "  " * (level + 1)
            for k, v in o.items():
                append(sep)
                sep = inner
                append(_key(k))
                append(": ")
                leaf = _scalar(v)
                if leaf is not None:
                    append(leaf)
                else:
                    self.write(v, level + 1)
            append("\n" + "  " * level + "}")
            return
        if isinstance(o, (list, tuple)):
            if not o:
                append("[]")
                return
            line = _numeric_line(o)
            if line is not None:
                append(line)
                return
            if type(o) is list or type(o) is tuple:
                key = _flat_key(zip(itertools.repeat(None), o))
                if key is not None and self.flat(o, level, key):
                    return
            inner = ",\n" + "  " * (level + 1)
            sep = "[\n" + "  " * (level + 1)
            for v in o:
                append(sep)
                sep = inner
                leaf = _scalar(v)
                if leaf is not None:
                    append(leaf)
                else:
                    self.write(v, level + 1)
            append("\n" + "  " * level + "]")
            return
        leaf = _scalar(o)
        if leaf is None:
            raise TypeError(f"Object of type {type(o).__name__} is not JSON serializable")
        append(leaf)


#: A float ``marshal`` packed whose exponent bits are all set (NaN or an infinity): the type code
#: (``g``, or ``\xe7`` with the back-reference flag) and eight little-endian bytes, the last two
#: holding the sign and exponent.  Valid UTF-8 never has ``\x7f``/``\xff`` after a byte >= ``\xf0``,
#: so strings cannot match; any other chance match only sends the document to the one-pass writer.
#: (One pattern per type code: a literal first byte lets the regex engine skip ahead.)
_NON_FINITE = (
    re.compile(rb"g.{6}[\xf0-\xff][\x7f\xff]", re.DOTALL),
    re.compile(rb"\xe7.{6}[\xf0-\xff][\x7f\xff]", re.DOTALL),
)
#: orjson's exponent form of a number below 1e-4 (``1e-7``; found with the digit before it checked).
_EXPONENT = re.compile(rb"e-\d")
_DIGITS = frozenset(b"0123456789")


def _non_finite(packed: bytes) -> bool:
    """Whether a ``marshal`` dump may hold a NaN or an infinity (never False when it does)."""
    return any(p.search(packed) is not None for p in _NON_FINITE)


def _small_number(raw: bytes) -> bool:
    """Whether orjson's text may hold a number below 1e-4 (``0.00001``, ``1e-7``), written otherwise by
    ``float.__repr__`` (``1e-05``, ``1e-07``); never False when it does, and a match inside a string only
    sends the document to the one-pass writer."""
    if b"0.0000" in raw:
        return True
    return any(m.start() > 0 and raw[m.start() - 1] in _DIGITS for m in _EXPONENT.finditer(raw))


def _orjson_options() -> int:
    assert _orjson is not None
    # everything but the exact JSON types goes to ``default`` (which refuses it)
    return (
        _orjson.OPT_INDENT_2
        | _orjson.OPT_APPEND_NEWLINE
        | _orjson.OPT_PASSTHROUGH_DATACLASS
        | _orjson.OPT_PASSTHROUGH_DATETIME
        | _orjson.OPT_PASSTHROUGH_SUBCLASS
    )


_FLAT_BYTES = re.compile(_FLAT.pattern.encode("ascii"))


def _flat_memo() -> Callable[[re.Match[str]], str]:
    """:func:`_flat` remembering each distinct match (a listing repeats the same few positions)."""
    memo: dict[str, str] = {}

    def flat(m: re.Match[str]) -> str:
        whole = m.group()
        out = memo.get(whole)
        if out is None:
            out = memo[whole] = _flat(m)
        return out

    return flat


def _flatten_split(parts: list[bytes]) -> None:
    """Rewrite, in place, the number lists of ``_FLAT_BYTES.split(text)`` (every second item) as the
    reference's flattening pass writes them: each distinct one is rewritten once and the rest mapped
    in C (a listing repeats the same few positions tens of thousands of times).

    Only for ASCII text, where the bytes pattern matches what the reference's
    str pattern matches (its ``\\s`` and ``\\d`` also take Unicode spaces and
    digits, which JSON text can hold only inside strings and only unescaped,
    so only as non-ASCII).
    """
    lists = parts[1::2]
    memo = {x: b"[" + b", ".join(n.strip() for n in x.split(b",")) + b"]" for x in set(lists)}
    parts[1::2] = map(memo.__getitem__, lists)


def _orjson_text(doc: Any) -> str | None:
    """The reference text written through orjson, or None where orjson's would differ or it is missing.

    ``marshal`` admits the plain JSON types only (exact str, int, float, bool,
    None, list, tuple, dict; orjson also writes enums, UUIDs and fragments) and
    packs every float in binary, where a NaN or an infinity is found (orjson
    writes those ``null``); orjson itself refuses non-string keys, integers
    beyond 64 bits, lone surrogates and nesting deeper than 255; small numbers
    are found in its text.
    """
    if _orjson is None:
        return None
    try:
        packed = marshal.dumps(doc)
    except (ValueError, RecursionError):
        return None
    if _non_finite(packed):
        return None
    del packed
    try:
        raw = _orjson.dumps(doc, default=_unknown, option=_orjson_options())
    except TypeError:
        return None
    if _small_number(raw):
        return None
    # each step drops the text before it, so that at most two copies of the document's text are alive
    if raw.isascii():
        parts = _FLAT_BYTES.split(raw)  # text, number list, text, ..., text
        del raw
        _flatten_split(parts)
        joined = b"".join(parts)
        del parts
        return joined.decode("ascii")
    text = raw.decode()
    del raw
    return _FLAT.sub(_flat_memo(), text)


def dumps_onepass(doc: Any) -> str:
    """:func:`dumps` written by a pure-Python one-pass writer: the route for documents orjson cannot write.

    Containers of scalars go through the standard library's C encoder and
    repeated ones are written once; everything else is indented here.

    Parameters
    ----------
    doc : object
        A JSON-serialisable document.

    Returns
    -------
    str
    """
    w = _Writer()
    w.write(doc, 0)
    w.out.append("\n")
    return "".join(w.out)


def dumps(doc: Any) -> str:
    """Deterministic JSON text in the document's key order; short numeric
    arrays (positions, characters) stay on one line.

    The text is that of ``json.dumps(doc, indent=2, ensure_ascii=False)``
    with every array of numbers joined onto one line
    (:func:`dumps_reference`), byte for byte.  It is written through orjson
    where the document lets orjson match that text (plain JSON types, finite
    floats, none below 1e-4; see the module's guide), else by
    :func:`dumps_onepass`; the standard library's pure-Python indenting
    encoder, whose cost dominated large listings, is not used.

    Parameters
    ----------
    doc : object
        A JSON-serialisable document (a ``to_dict()`` result).

    Returns
    -------
    str
        Two-space indented JSON, non-ASCII kept, ending in a newline.
    """
    text = _orjson_text(doc)
    return dumps_onepass(doc) if text is None else text
