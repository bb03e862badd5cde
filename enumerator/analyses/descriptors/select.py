"""Finding isomers by descriptor: what a chemist types after ``--pick``.

:func:`matches` accepts a full descriptor (``OC-6-32-C``, ``OC-6-11-Delta``),
one without its chirality symbol (``OC-6-32``: both enantiomers), a bare
configuration index (``32``), a chirality symbol, or a prefix (``cis``,
``trans``, ``fac``, ``mer``, ``all-cis``, or a combined one as printed).
Case, Greek or spelled-out Δ/Λ and typographic apostrophes do not matter.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = parse_abstract("Ma3b3")
>>> s = enumerate_isomers(comp, load_rules().geometry("OC-6"))
>>> [i.id for i in find_by_descriptor(s, comp, "mer")], [i.id for i in find_by_descriptor(s, comp, "oc-6-22")]
(['2'], ['1'])
"""

from __future__ import annotations

from collections.abc import Sequence

from enumerator.analyses.descriptors.chirality import SYMBOL_TEXT
from enumerator.analyses.descriptors.describe import Descriptor, describe_isomer
from enumerator.errors import InputError
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.model.composition import Composition

__all__ = ["matches", "find_by_descriptor", "picked_ids"]

_WORDS = ("cis", "trans", "fac", "mer", "all-cis", "all-trans")


def _normal(text: str) -> str:
    t = text.strip()
    for word, sym in (("Delta", "Δ"), ("Lambda", "Λ"), ("delta", "Δ"), ("lambda", "Λ")):
        t = t.replace(word, sym)
    return t.upper().replace("’", "'")


def _forms(d: Descriptor) -> list[str]:
    """Every written form of a descriptor that a typed text may equal (normalised)."""
    forms = [d.text, d.stereo_free]
    symbol = SYMBOL_TEXT.get(d.chirality, d.chirality) if d.chirality else None
    if d.configuration_index:
        forms.append(d.configuration_index)
    if symbol:
        forms.append(symbol)
    if d.configuration_index and symbol:
        forms.append(f"{d.configuration_index}-{symbol}")
    return [_normal(f) for f in forms]


def matches(d: Descriptor, text: str) -> bool:
    """Whether the typed ``text`` names the descriptor ``d`` (forms in the module docstring).

    Parameters
    ----------
    d : Descriptor
        One isomer's descriptor.
    text : str
        What was typed.

    Returns
    -------
    bool
    """
    t = text.strip()
    low = t.lower()
    if low in _WORDS:
        word = low.removeprefix("all-")
        return bool(d.prefixes) and all(w == word for _, w in d.prefixes)
    if d.prefix and low == d.prefix.lower():
        return True
    return _normal(t) in _forms(d)


def find_by_descriptor(isomer_set: IsomerSet, composition: Composition, text: str) -> list[Isomer]:
    """The isomers whose descriptor matches ``text``.

    Parameters
    ----------
    isomer_set : IsomerSet
        The isomers to search.
    composition : Composition
        Their composition (for the priorities).
    text : str
        A descriptor, part of one, or a prefix (see the module docstring).

    Returns
    -------
    list of Isomer
        In listing order; empty when none matches.
    """
    return [iso for iso in isomer_set.isomers if matches(describe_isomer(iso, composition), text)]


def picked_ids(
    descriptors: Sequence[tuple[str, Descriptor]], text: str, formula: str, error: str | None = None
) -> list[str]:
    """The isomer ids whose descriptor matches ``text`` (``--pick``).

    Parameters
    ----------
    descriptors : sequence of (str, Descriptor)
        Isomer id and descriptor, in listing order.
    text : str
        What was typed.
    formula : str
        The formula, for the message.
    error : str, optional
        Why no descriptors could be assigned, if so.

    Returns
    -------
    list of str
        At least one id.

    Raises
    ------
    InputError
        Descriptors could not be assigned, or none matches (the message lists the descriptors and
        prefixes present).
    """
    if error:
        raise InputError(
            f"--pick {text}: descriptors cannot be assigned here ({error})", "drop --pick or give the ligands SMILES"
        )
    keep = [k for k, d in descriptors if matches(d, text)]
    if not keep:
        present = sorted({d.text for _, d in descriptors})
        prefixes = sorted({d.prefix for _, d in descriptors if d.prefix})
        tail = f"; prefixes present: {' | '.join(prefixes)}" if prefixes else ""
        raise InputError(
            f"no isomer of {formula} matches the descriptor '{text}'",
            f"descriptors present: {', '.join(present)}{tail}",
        )
    return keep
