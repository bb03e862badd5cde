"""Names of the species along a route: reading a formula with its
descriptor, finding the isomers a descriptor names, and naming a product.

A start or target is written as a formula with a descriptor in front: an
everyday prefix (``cis-``, ``trans-``, ``fac-``, ``mer-``) or a configuration
index in parentheses (IUPAC 2005, IR-9.3.3).  :func:`parse_species` splits
the two; :func:`resolve_species` finds the isomers the descriptor names,
through :func:`enumerator.analyses.descriptors.find_by_descriptor`, with
:func:`everyday_prefix` as the reading of cis/trans/fac/mer where the IUPAC
descriptor carries no prefix.

>>> parse_species("cis-[PtCl2(NH3)2]")
('[PtCl2(NH3)2]', 'cis')
>>> parse_species("(OC-6-22)-Ma4b2")
('Ma4b2', 'OC-6-22')
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.routes.keys import enumerate_isomers_cached
>>> comp = parse_abstract("Ma3b3")
>>> fac, mer = enumerate_isomers_cached(comp, load_rules().geometry("OC-6")).isomers
>>> everyday_prefix(fac, comp), name_isomer(mer, comp)
('fac', ('mer', 'OC-6-21'))
"""

from __future__ import annotations

import itertools
import re

from enumerator.analyses.descriptors import describe_isomer, find_by_descriptor
from enumerator.errors import InputError, IsosieveError
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.model.composition import Composition

__all__ = ["parse_species", "resolve_species", "everyday_prefix", "name_isomer"]

_PREFIX = re.compile(r"^\s*(cis|trans|fac|mer)\s*-\s*(.+)$", re.IGNORECASE)
_PAREN = re.compile(r"^\s*\(([A-Za-z]{1,5}-\d{1,2}(?:-[0-9A-Za-z]+)*|\d+(?:-[A-Za-z]+)?)\)\s*-?\s*(.+)$")
_EVERYDAY = ("cis", "trans", "fac", "mer")


def parse_species(text: str) -> tuple[str, str | None]:
    """Split a formula with a descriptor into the two.

    Parameters
    ----------
    text : str
        E.g. 'cis-[PtCl2(NH3)2]', '(OC-6-22)-Ma4b2' or '(2)-Ma2b2'.

    Returns
    -------
    (str, str or None)
        The formula and the descriptor (None when there is none; an
        everyday prefix is returned in lower case).

    Examples
    --------
    >>> parse_species("(SP-4-2)-[PtCl2(NH3)2]")
    ('[PtCl2(NH3)2]', 'SP-4-2')
    >>> parse_species("Ma4")
    ('Ma4', None)
    """
    m = _PREFIX.match(text)
    if m:
        return m.group(2).strip(), m.group(1).lower()
    m = _PAREN.match(text)
    if m:
        return m.group(2).strip(), m.group(1)
    return text.strip(), None


def resolve_species(iset: IsomerSet, comp: Composition, descriptor: str | None, *, role: str) -> list[Isomer]:
    """The isomers (all of one geometric isomer) a descriptor names.

    Parameters
    ----------
    iset : IsomerSet
        Every isomer of the composition on the chosen geometry.
    comp : Composition
        The composition (for the descriptor and the messages).
    descriptor : str or None
        cis/trans/fac/mer, a configuration index or a full descriptor; None
        is accepted only when the composition has one geometric isomer.
    role : str
        'start' or 'target', for the message.

    Returns
    -------
    list of Isomer
        One isomer, or both enantiomers of a chiral geometric isomer.

    Raises
    ------
    InputError
        No descriptor where one is needed, none of the isomers fits it, or
        it fits several geometric isomers.
    """
    if descriptor is None:
        if iset.geometric_isomers == 1:
            return list(iset.isomers)
        raise InputError(
            f"{comp.formula} has {iset.geometric_isomers} geometric isomers; the {role} needs a descriptor",
            f"write e.g. cis-{comp.formula}, trans-..., fac-/mer- or a configuration index as in"
            f' ({iset.geometry.symbol}-<index>)-{comp.formula} (see `isosieve isomers "{comp.formula}"`)',
        )
    found = list(find_by_descriptor(iset, comp, descriptor))
    if not found and descriptor in _EVERYDAY:
        found = [i for i in iset.isomers if everyday_prefix(i, comp) == descriptor]
    if not found:
        raise InputError(
            f"no isomer of {comp.formula} is '{descriptor}'",
            f'see `isosieve isomers "{comp.formula}"` for the isomers and their descriptors',
        )
    numbers = {i.number for i in found}
    if len(numbers) > 1:
        raise InputError(
            f"'{descriptor}' fits {len(numbers)} geometric isomers of {comp.formula}",
            "give the configuration index instead, e.g. (OC-6-22)-FORMULA",
        )
    return found


def everyday_prefix(iso: Isomer, comp: Composition) -> str | None:
    """cis/trans/fac/mer read from the site relations of an isomer.

    Every monodentate ligand present twice (cis/trans, four or more sites) or
    three times on six sites (fac/mer) must agree; failing those, the prefix
    tells how the only two single ligands sit (Ma4bc, Ma2bc).

    Parameters
    ----------
    iso : Isomer
    comp : Composition

    Returns
    -------
    str or None
        The prefix, or None when there is no single one.
    """
    geo = iso.geometry
    labels: set[str] = set()
    singles: list[int] = []
    for kind, n in comp.parts:
        if kind.denticity != 1:
            continue
        sites = iso.sites_of(kind.name)
        if n == 1:
            singles.extend(sites)
        elif n == 2 and geo.coordination_number >= 4:
            labels.add(geo.relation(sites[0], sites[1]))
        elif n == 3 and geo.coordination_number == 6:
            trans = any(geo.relation(a, b) == "trans" for a, b in itertools.combinations(sites, 2))
            labels.add("mer" if trans else "fac")
    if not labels and len(singles) == 2 and geo.coordination_number >= 4:
        labels.add(geo.relation(singles[0], singles[1]))
    if len(labels) == 1:
        return labels.pop()
    return None


def name_isomer(iso: Isomer, comp: Composition) -> tuple[str | None, str | None]:
    """The everyday prefix and the IUPAC descriptor of an isomer.

    The prefix is the IUPAC descriptor's own (cis/trans/fac/mer) where it has
    one, else :func:`everyday_prefix`.  When the descriptor cannot be
    computed (e.g. a ligand without SMILES for the CIP ranking), the
    descriptor is None and the prefix comes from the site relations.

    Parameters
    ----------
    iso : Isomer
    comp : Composition

    Returns
    -------
    (str or None, str or None)
        The prefix and the descriptor text.
    """
    try:
        d = describe_isomer(iso, comp)
    except IsosieveError:
        return everyday_prefix(iso, comp), None
    return (d.prefix or everyday_prefix(iso, comp)), d.text
