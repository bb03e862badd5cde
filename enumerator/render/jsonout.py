"""The JSON document: a stable, documented contract (see README, "JSON schema").

Keys are only ever added, never renamed.  Numbers are rounded so that the
same input gives byte-identical output on every machine.
"""

from __future__ import annotations

import json
import re
from typing import Any

from enumerator.isomers.enumeration import Isomer
from enumerator.workflow.result import SCHEMA_VERSION, Result

__all__ = ["result_to_dict", "dumps", "isomer_to_dict"]


def _r(x: float) -> float:
    v = round(float(x), 6)
    return 0.0 if v == 0 else v


def isomer_to_dict(iso: Isomer) -> dict[str, Any]:
    sites = []
    for s in iso.sites:
        d: dict[str, Any] = {
            "position": [_r(c) for c in s.position],
            "ligand": s.ligand,
            "donor": s.donor,
            "unit": s.unit,
            "donor_index": s.donor_index,
        }
        if s.ring:
            d["ring"] = True
        sites.append(d)
    return {
        "id": iso.id,
        "number": iso.number,
        "point_group": iso.point_group,
        "chiral": iso.chiral,
        "enantiomer": iso.enantiomer,
        "sites": sites,
    }


def result_to_dict(res: Result) -> dict[str, Any]:
    iso = res.isomer_set
    doc: dict[str, Any] = {
        "schema_version": SCHEMA_VERSION,
        "formula": res.composition.formula,
        "geometry": res.geometry.symbol,
        "geometry_reason": res.geometry_reason,
        "stereoisomers": iso.stereoisomers,
        "geometric_isomers": iso.geometric_isomers,
        "complete": iso.complete,
        "isomers": [isomer_to_dict(i) for i in iso.isomers],
        "notes": list(res.notes),
    }
    for a in res.analyses:
        for d, i in zip(doc["isomers"], iso.isomers):
            d.update(a.isomer_json(i.id))
        doc.update(a.top_json())
    return doc


_FLAT = re.compile(r"\[\s*(-?[\d.e+-]+(?:,\s*-?[\d.e+-]+)*)\s*\]")


def dumps(doc: Any) -> str:
    """Deterministic JSON text in the schema's key order; short numeric
    arrays (positions, characters) stay on one line."""
    text = json.dumps(doc, indent=2, ensure_ascii=False)
    text = _FLAT.sub(lambda m: "[" + ", ".join(x.strip() for x in m.group(1).split(",")) + "]", text)
    return text + "\n"
