"""Up-front isomer counts as text or a JSON document (``isosieve count``).

>>> from enumerator.isomers.counting import CountResult, GeometryCount
>>> r = CountResult("Ma4b2", (GeometryCount("OC-6", "octahedron", 2, 2),), "OC-6 as requested")
>>> print(render_count(r), end="")
Ma4b2 on OC-6 (octahedron): 2 geometric isomer(s), 2 stereoisomer(s)
geometry: OC-6 as requested
counted by Burnside's lemma; nothing was enumerated (list them with 'isosieve isomers')
"""

from __future__ import annotations

from enumerator.isomers.counting import CountResult
from enumerator.render.jsonout import dumps

__all__ = ["render_count"]

_UNPLACEABLE = " (the ligands cannot all be placed together; allow wider chelate spans with --span)"
_FOOTER = "counted by Burnside's lemma; nothing was enumerated (list them with 'isosieve isomers')"


def render_count(result: CountResult, as_json: bool = False) -> str:
    """The output of ``isosieve count``.

    Parameters
    ----------
    result : CountResult
    as_json : bool
        The JSON document instead of text.

    Returns
    -------
    str
        Newline-terminated text.
    """
    if as_json:
        return dumps(result.to_dict())
    lines = [
        f"{result.formula} on {c.geometry} ({c.name}): "
        f"{c.geometric_isomers:,} geometric isomer(s), {c.stereoisomers:,} stereoisomer(s)"
        + ("" if c.stereoisomers else _UNPLACEABLE)
        for c in result.counts
    ]
    if result.geometry_reason is not None:
        lines.append(f"geometry: {result.geometry_reason}")
    lines.append(_FOOTER)
    return "\n".join(lines) + "\n"
