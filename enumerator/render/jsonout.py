"""JSON text: a stable, documented contract (see README, "JSON schema").

The document's shape is defined once, by each result's ``to_dict()``
(:meth:`enumerator.workflow.result.Result.to_dict` for an isomer listing);
this module only writes it out.  Keys are only ever added, never renamed.

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

import json
import re
from typing import Any

from enumerator.workflow.result import Result, isomer_to_dict

__all__ = ["dumps", "result_to_dict", "isomer_to_dict"]


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


def dumps(doc: Any) -> str:
    """Deterministic JSON text in the document's key order; short numeric
    arrays (positions, characters) stay on one line.

    Parameters
    ----------
    doc : object
        A JSON-serialisable document (a ``to_dict()`` result).

    Returns
    -------
    str
        Two-space indented JSON, non-ASCII kept, ending in a newline.
    """
    text = json.dumps(doc, indent=2, ensure_ascii=False)
    text = _FLAT.sub(lambda m: "[" + ", ".join(x.strip() for x in m.group(1).split(",")) + "]", text)
    return text + "\n"
