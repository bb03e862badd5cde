"""The ligand catalogue: ``rules/ligands.toml`` (plus any user ``ligands.toml``
given with ``--rules DIR``), loaded and checked once per rule set.

Each entry says how a real ligand occupies coordination sites (donor
elements in chain order, denticity, hapticity, topology: a chain, a facial
tripod or an η-ring on one site), the placements it allows (chelate spans,
fac/mer), how it is counted (charge in the ionic
model, electrons donated in the covalent and the ionic count) and its
stretch-reporter class.  Every SMILES is parsed by RDKit at load, and the
atom-map numbers of its bound atoms, its formal charge and its donor
elements are checked against the other keys.

Look-up (:func:`find_ligand`) tries the exact name, then the exact alias,
then a case-insensitive match that must be unique.  Formulas use the exact
(case-sensitive) spellings only, because case carries meaning there
(``CO`` carbonyl, ``Co`` cobalt); :func:`spelling_index` indexes them for
the formula parser (longest match by growing a prefix, a set look-up per
character).

Hapticity: a spelling may carry a hapticity prefix (``η2-H2``, the
dihydrogen ligand), and is then read only with that prefix, so ``RuH2``
keeps its two hydrides.  One ligand catalogued at two hapticities (η3- and
η1-allyl, η8- and η4-cot) shares its spellings between the two entries: the
hapticity written picks the entry, and a spelling written without one means
the entry marked ``hapto_default = true``.  At load, entries that share a
spelling must bind through different numbers of atoms, have SMILES of the
same molecular formula (charge aside: one ligand), and exactly one of them
must be the default.

>>> from enumerator.rules.ruleset import load_rules
>>> cat = load_ligands(load_rules())
>>> e = cat["PPh3"]
>>> e.donors, e.charge, e.electrons_covalent, e.electrons_ionic
(('P',), 0, 2, 2)
>>> find_ligand(load_rules(), "C5H5").name
'Cp'
>>> k = find_ligand(load_rules(), "cp").kind()
>>> k.ring, k.denticity
(True, 1)
>>> cat["tacn"].kind().topology
'tripod'
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from functools import cached_property
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.limits import MAX_SMILES_ATOMS, MAX_SMILES_CHARS
from enumerator.model.composition import ARRANGEMENTS, TOPOLOGIES, LigandKind
from enumerator.model.elements import element_symbols
from enumerator.model.geometry import SPANS
from enumerator.rules.checks import check_keys, closest_names, quiet_rdkit, read_toml, rule_error
from enumerator.rules.ruleset import BUILTIN_RULES, RuleSet

__all__ = [
    "LigandEntry",
    "load_ligands",
    "find_ligand",
    "all_spellings",
    "spelling_index",
    "split_hapto",
    "SpellingIndex",
    "Reading",
    "HAPTO_PREFIX",
    "unknown_ligand",
    "parse_entry",
    "check_smiles",
    "REPORTER_NAME",
]

#: A reporter class name: letters and digits, starting with a capital.
REPORTER_NAME = re.compile(r"^[A-Z][A-Za-z0-9]{0,7}$")

_REQUIRED = ("name", "label", "smiles", "donors", "denticity", "charge", "electrons_covalent", "electrons_ionic")
_OPTIONAL = (
    "aliases",
    "hapticity",
    "ring",
    "topology",
    "spans",
    "arrangements",
    "reporter",
    "nitrosyl",
    "note",
    "source",
    "iupac",
    "enclose",
    "hapto_default",
)
_NAME = re.compile(r"^[^\s\[\]]{1,32}$")


@frozen_dataclass
class LigandEntry:
    """One catalogued ligand: one ``[[ligand]]`` table, checked.

    The keys are those of the catalogue schema (DEVELOPERS.md, "Catalogue
    schema"); ``source`` is the file the entry was read from.
    """

    name: str
    label: str
    smiles: str
    donors: tuple[str, ...]
    denticity: int
    charge: int
    electrons_covalent: int
    electrons_ionic: int
    aliases: tuple[str, ...] = ()
    hapticity: int | None = None
    ring: bool = False
    spans: tuple[str, ...] = ()
    arrangements: tuple[str, ...] = ()
    reporter: str | None = None
    nitrosyl: str | None = None
    note: str = ""
    source: str = ""
    #: name in an IUPAC additive name (None: not nameable) and whether it is enclosed
    iupac: str | None = None
    enclose: bool = False
    #: the entry a shared spelling means when no hapticity is written (see :class:`SpellingIndex`)
    hapto_default: bool = False
    #: 'chain', 'tripod' or 'ring' (kept equal to ``ring``)
    topology: str = "chain"

    @property
    def bound_atoms(self) -> int:
        """Atoms bound to the metal (the hapticity, else the denticity)."""
        return self.hapticity or self.denticity

    def meta(self) -> tuple[tuple[str, object], ...]:
        """Catalogue data carried by the :class:`LigandKind` (sorted pairs; part of its equality).

        Returns
        -------
        tuple of (str, object)
            SMILES, charge, electron counts, label and, where given, hapticity,
            nitrosyl shape and IUPAC naming, sorted by key.
        """
        d: dict[str, object] = {
            "smiles": self.smiles,
            "charge": self.charge,
            "electrons_covalent": self.electrons_covalent,
            "electrons_ionic": self.electrons_ionic,
            "label": self.label,
            "catalogue": True,
        }
        if self.hapticity:
            d["hapticity"] = self.hapticity
        if self.nitrosyl:
            d["nitrosyl"] = self.nitrosyl
        if self.iupac:
            d["iupac"] = self.iupac
            d["enclose"] = self.enclose
        return tuple(sorted(d.items()))

    def kind(self) -> LigandKind:
        """The ligand as the isomer enumerator sees it.

        Returns
        -------
        LigandKind
            With the entry's topology: an η-ring on one site, a tripod on a face, else a chain; made once
            per entry (every formula that names the ligand shares it: it is immutable).
        """
        return self._kind

    @cached_property
    def _kind(self) -> LigandKind:
        return LigandKind(
            name=self.name,
            donors=self.donors,
            topology=self.topology,
            spans=self.spans,
            arrangements=frozenset(self.arrangements),
            reporter=self.reporter,
            meta=self.meta(),
        )


def _str_list(value: Any, where: str, key: str, example: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(x, str) and x.strip() for x in value):
        raise rule_error(where, f"'{key}' must be a list of strings", f"write {key} = {example}")
    return tuple(x.strip() for x in value)


def _int(value: Any, where: str, key: str) -> int:
    if not isinstance(value, int) or isinstance(value, bool):
        raise rule_error(where, f"'{key}' must be an integer, not {value!r}", f"write {key} = 2")
    return value


def _flag(data: Mapping[str, Any], where: str, key: str) -> bool:
    value = data.get(key, False)
    if not isinstance(value, bool):
        raise rule_error(where, f"'{key}' must be true or false", f"write {key} = true")
    return value


def _name(data: Mapping[str, Any], where: str) -> str:
    name = data["name"]
    if not isinstance(name, str) or not _NAME.match(name):
        raise rule_error(
            where,
            f"name {name!r} must be 1-32 characters without spaces or square brackets",
            'write e.g. name = "PPh3"',
        )
    return name


def _label_and_aliases(data: Mapping[str, Any], where: str) -> tuple[str, tuple[str, ...]]:
    label = data["label"]
    if not isinstance(label, str) or not label.strip():
        raise rule_error(where, "'label' must be a non-empty string", 'write e.g. label = "triphenylphosphine"')
    aliases = _str_list(data.get("aliases", []), where, "aliases", '["C5H5"]')
    for a in aliases:
        if not _NAME.match(a):
            raise rule_error(
                where, f"alias {a!r} must be 1-32 characters without spaces or square brackets", "remove the spaces"
            )
    return label.strip(), aliases


def _donors(data: Mapping[str, Any], where: str) -> tuple[str, ...]:
    donors = _str_list(data["donors"], where, "donors", '["P", "P"]')
    symbols = element_symbols()
    for d in donors:
        if d not in symbols:
            raise rule_error(
                where, f"donor {d!r} is not an element symbol", 'write the donor element, e.g. donors = ["N"]'
            )
    return donors


def _hapticity(data: Mapping[str, Any], where: str) -> int | None:
    hapticity = data.get("hapticity")
    if hapticity is None:
        return None
    hapticity = _int(hapticity, where, "hapticity")
    if hapticity < 2:
        raise rule_error(
            where,
            f"hapticity {hapticity} is below 2",
            "leave 'hapticity' out for a ligand bound through one atom per site",
        )
    return hapticity


def _topology(data: Mapping[str, Any], where: str) -> str:
    """'chain', 'tripod' or 'ring' from the keys 'topology' and 'ring' (which must agree)."""
    ring = _flag(data, where, "ring")
    topology = data.get("topology", "ring" if ring else "chain")
    if topology not in TOPOLOGIES:
        raise rule_error(
            where,
            f"topology {topology!r} is not one of {', '.join(TOPOLOGIES)}",
            'write topology = "tripod" for a face-capping tripod (Tp, tacn), or leave it out for a chain',
        )
    if ring and topology != "ring":
        raise rule_error(where, f"'ring = true' but topology = {topology!r}", "give one of them")
    return str(topology)


def _check_ring(donors: tuple[str, ...], dent: int, hapticity: int | None, where: str) -> None:
    if dent != 1 or len(donors) != 1:
        raise rule_error(
            where,
            "an η-ring occupies one site of its own (the piano-stool idealisation): "
            f"denticity is {dent} with {len(donors)} donor(s)",
            'write denticity = 1 and donors = ["C"]',
        )
    if hapticity is None or hapticity < 3:
        raise rule_error(
            where, "a ring ligand needs its hapticity (3 or more)", "write e.g. hapticity = 5 for a cyclopentadienyl"
        )


def _check_tripod(donors: tuple[str, ...], dent: int, hapticity: int | None, where: str) -> None:
    if dent != 3 or len(donors) != 3:
        raise rule_error(
            where,
            f"a tripod caps one face with three donors: denticity is {dent} with {len(donors)} donor(s)",
            'write denticity = 3 and donors = ["N", "N", "N"]',
        )
    if hapticity is not None:
        raise rule_error(where, "a tripod binds through its three donor atoms", "remove 'hapticity'")


def _binding(data: Mapping[str, Any], where: str, donors: tuple[str, ...]) -> tuple[int, str, int | None]:
    """Denticity, topology and hapticity, checked against each other and the donors."""
    dent = _int(data["denticity"], where, "denticity")
    topology = _topology(data, where)
    hapticity = _hapticity(data, where)
    if topology == "ring":
        _check_ring(donors, dent, hapticity, where)
    elif topology == "tripod":
        _check_tripod(donors, dent, hapticity, where)
    elif dent != len(donors):
        raise rule_error(
            where, f"denticity {dent} but {len(donors)} donors are listed", "list one donor element per occupied site"
        )
    if dent < 1:
        raise rule_error(where, "denticity must be at least 1", "write denticity = 1")
    if hapticity is not None and topology == "chain" and hapticity < dent:
        raise rule_error(where, f"hapticity {hapticity} is below the denticity {dent}", "check both keys")
    return dent, topology, hapticity


def _electrons(data: Mapping[str, Any], where: str) -> tuple[int, int, int]:
    """Charge (ionic model) and the electrons donated in the covalent and the ionic count."""
    charge = _int(data["charge"], where, "charge")
    e_cov = _int(data["electrons_covalent"], where, "electrons_covalent")
    e_ion = _int(data["electrons_ionic"], where, "electrons_ionic")
    if e_cov < 0 or e_ion < 0:
        raise rule_error(where, "electron counts cannot be negative", "give the electrons the ligand donates")
    if e_ion - e_cov != -charge:
        raise rule_error(
            where,
            f"electrons_ionic ({e_ion}) - electrons_covalent ({e_cov}) must equal -charge ({-charge})",
            "an anion X- gives one electron more in the ionic count than in the covalent count",
        )
    return charge, e_cov, e_ion


def _spans(data: Mapping[str, Any], where: str, dent: int, topology: str) -> tuple[str, ...]:
    spans = _str_list(data.get("spans", []), where, "spans", '["edge"]')
    for s in spans:
        if s not in SPANS:
            raise rule_error(where, f"span {s!r} is not one of {', '.join(SPANS)}", 'write e.g. spans = ["edge"]')
    if spans and (topology != "chain" or dent < 2):
        raise rule_error(where, "'spans' applies to chelate chains only", "remove 'spans'")
    if spans and len(spans) not in (1, dent - 1):
        raise rule_error(
            where, f"{len(spans)} spans for {dent - 1} chain links", "give one span for all links or one per link"
        )
    return spans


def _arrangements(data: Mapping[str, Any], where: str, dent: int, topology: str) -> tuple[str, ...]:
    arr = _str_list(data.get("arrangements", []), where, "arrangements", '["fac"]')
    for a in arr:
        if a not in ARRANGEMENTS:
            raise rule_error(
                where, f"arrangement {a!r} is not fac or mer", 'write arrangements = ["fac"], ["mer"] or ["fac", "mer"]'
            )
    if arr and topology == "tripod":
        raise rule_error(
            where, "a tripod always caps a face, so 'arrangements' does not apply", "remove 'arrangements'"
        )
    if arr and (topology != "chain" or dent != 3):
        raise rule_error(where, "'arrangements' applies to tridentate chains only", "remove 'arrangements'")
    if set(arr) == set(ARRANGEMENTS):
        return ()  # either: no restriction
    return tuple(sorted(arr))


def _reporter_and_nitrosyl(data: Mapping[str, Any], where: str) -> tuple[str | None, str | None]:
    reporter = data.get("reporter")
    if reporter is not None and (not isinstance(reporter, str) or not REPORTER_NAME.match(reporter)):
        raise rule_error(where, f"reporter {reporter!r} is not a class name", 'write e.g. reporter = "CO"')
    nitrosyl = data.get("nitrosyl")
    if nitrosyl is not None and nitrosyl not in ("linear", "bent"):
        raise rule_error(where, f"nitrosyl {nitrosyl!r} is not 'linear' or 'bent'", 'write nitrosyl = "linear"')
    return reporter, nitrosyl


def _note_and_naming(data: Mapping[str, Any], where: str) -> tuple[str, str | None, bool]:
    """The note, the name inside an additive name, and whether that name is enclosed."""
    note = data.get("note", "")
    if not isinstance(note, str):
        raise rule_error(where, "'note' must be a string", "quote it")
    iupac = data.get("iupac")
    if iupac is not None and (not isinstance(iupac, str) or not iupac.strip() or iupac != iupac.strip()):
        raise rule_error(
            where,
            "'iupac' must be a non-empty name without surrounding spaces",
            'write e.g. iupac = "triphenylphosphane"',
        )
    enclose = _flag(data, where, "enclose")
    if enclose and iupac is None:
        raise rule_error(where, "'enclose' without 'iupac'", 'give the name too, e.g. iupac = "pyridine"')
    return note, iupac, enclose


def _smiles(data: Mapping[str, Any], where: str) -> str:
    smiles = data["smiles"]
    if not isinstance(smiles, str) or not smiles.strip():
        raise rule_error(where, "'smiles' must be a non-empty string", 'write e.g. smiles = "[C-:1]#[O+]"')
    if len(smiles.strip()) > MAX_SMILES_CHARS:
        raise rule_error(
            where,
            f"the SMILES has {len(smiles.strip()):,} characters, more than the {MAX_SMILES_CHARS} read",
            "a catalogue ligand is one small molecule; check the SMILES",
        )
    return smiles.strip()


def parse_entry(data: Mapping[str, Any], where: str, smiles_now: bool = True, source: str | None = None) -> LigandEntry:
    """One validated catalogue entry from a ``[[ligand]]`` table.

    The keys are checked in the order of the catalogue schema (name, label
    and aliases, donors, denticity/topology/hapticity, charge and electron counts,
    spans, arrangements, reporter, nitrosyl, note and naming, SMILES), then
    the SMILES against them (:func:`check_smiles`).

    Parameters
    ----------
    data : Mapping[str, Any]
        The table as parsed from TOML.
    where : str
        The file and entry number, for messages (the ligand's name is added).
    smiles_now : bool, optional
        Check the SMILES against the other keys now (default); False for the
        built-in catalogue, whose SMILES the test suite checks.
    source : str, optional
        The entry's ``source`` (the file it was read from); default: the table's own ``source`` key.

    Returns
    -------
    LigandEntry

    Raises
    ------
    RuleError
        The first problem found, naming the file, the entry, the ligand and the key.
    """
    check_keys(data, where, _REQUIRED, _OPTIONAL)
    name = _name(data, where)
    where = f"{where} ({name})"
    label, aliases = _label_and_aliases(data, where)
    donors = _donors(data, where)
    dent, topology, hapticity = _binding(data, where, donors)
    charge, e_cov, e_ion = _electrons(data, where)
    spans = _spans(data, where, dent, topology)
    arrangements = _arrangements(data, where, dent, topology)
    reporter, nitrosyl = _reporter_and_nitrosyl(data, where)
    note, iupac, enclose = _note_and_naming(data, where)
    entry = LigandEntry(
        name=name,
        label=label,
        smiles=_smiles(data, where),
        donors=donors,
        denticity=dent,
        charge=charge,
        electrons_covalent=e_cov,
        electrons_ionic=e_ion,
        aliases=aliases,
        hapticity=hapticity,
        ring=topology == "ring",
        topology=topology,
        spans=spans,
        arrangements=arrangements,
        reporter=reporter,
        nitrosyl=nitrosyl,
        note=note,
        source=str(data.get("source", "")) if source is None else source,
        iupac=iupac,
        enclose=enclose,
        hapto_default=_flag(data, where, "hapto_default"),
    )
    if smiles_now:
        check_smiles(entry, where)
    return entry


def _read_smiles(smiles: str) -> Any:
    """The RDKit molecule of a SMILES (hydrogens kept), or None; RDKit's own messages are held back."""
    from rdkit import Chem, rdBase

    params: Any = Chem.SmilesParserParams()  # Any: RDKit's stubs type the property setters wrongly
    params.removeHs = False
    with rdBase.BlockLogs():
        return Chem.MolFromSmiles(smiles, params)


def _atom_maps(mol: Any, where: str) -> dict[int, str]:
    """Atom-map number -> element symbol of the mapped (bound) atoms."""
    maps: dict[int, str] = {}
    for atom in mol.GetAtoms():
        n = atom.GetAtomMapNum()
        if n:
            if n in maps:
                raise rule_error(
                    where,
                    f"atom-map number {n} appears twice in the SMILES",
                    "number the bound atoms 1, 2, ... once each",
                )
            maps[n] = atom.GetSymbol()
    return maps


def check_smiles(entry: LigandEntry, where: str) -> None:
    """Check an entry's SMILES against its other keys.

    RDKit must parse it; the atom-map numbers must be exactly 1..bound atoms
    (the hapticity, else the denticity); without a hapticity map ``k`` sits on
    ``donors[k-1]``'s element, with one every mapped atom is a donor element;
    and the SMILES's formal charge must equal ``charge``.

    Parameters
    ----------
    entry : LigandEntry
        The entry, its other keys already checked.
    where : str
        The file, entry and ligand, for messages.

    Raises
    ------
    RuleError
        The first mismatch found.
    """
    from rdkit import Chem

    mol = _read_smiles(entry.smiles)
    if mol is None:
        raise rule_error(
            where, f"RDKit cannot parse the SMILES {entry.smiles!r}", "check brackets, ring closures and aromaticity"
        )
    atoms = mol.GetNumAtoms() + sum(a.GetTotalNumHs() for a in mol.GetAtoms())
    if atoms > MAX_SMILES_ATOMS:
        raise rule_error(
            where,
            f"the SMILES gives {atoms:,} atoms (hydrogens included), more than the {MAX_SMILES_ATOMS} allowed",
            "a catalogue ligand is one small molecule; check the SMILES",
        )
    maps = _atom_maps(mol, where)
    want = entry.bound_atoms
    if sorted(maps) != list(range(1, want + 1)):
        raise rule_error(
            where,
            f"the SMILES marks atoms {sorted(maps) or 'none'} but the ligand binds through {want} atom(s)",
            f"put atom-map numbers 1..{want} on the bound atoms, e.g. [P:1]",
        )
    if entry.hapticity is None:
        for k, d in enumerate(entry.donors, start=1):
            if maps[k] != d:
                raise rule_error(
                    where,
                    f"donor {k} is {d!r} but SMILES atom :{k} is {maps[k]!r}",
                    "make 'donors' follow the map numbers",
                )
    else:
        bad = sorted(set(maps.values()) - set(entry.donors))
        if bad:
            raise rule_error(
                where,
                f"bound atom element {bad[0]!r} is not among the donors {list(entry.donors)}",
                "check 'donors' and the map numbers",
            )
    q = Chem.GetFormalCharge(mol)
    if q != entry.charge:
        raise rule_error(
            where,
            f"charge is {entry.charge} but the SMILES has formal charge {q}",
            "write the free ligand as in the ionic model (e.g. [Cl-:1])",
        )


#: A hapticity prefix as formulas write it: ``η5-``, ``η^5-``, ``eta5-``, ``h5-`` (superscript digits too).
HAPTO_PREFIX = re.compile(r"(?:η\^?|eta\^?|h)([0-9⁰¹²³⁴⁵⁶⁷⁸⁹]{1,2})-")
_SUPERSCRIPT = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")


def split_hapto(text: str, start: int = 0, end: int | None = None) -> tuple[int | None, int]:
    """The hapticity prefix written at ``text[start:end]``, if any, and where the spelling after it starts.

    Parameters
    ----------
    text : str
    start, end : int, optional
        The part of ``text`` to read (all of it by default).

    Returns
    -------
    (int or None, int)
        The hapticity (None without a prefix) and the index just after the prefix (``start`` without one).

    Examples
    --------
    >>> split_hapto("η2-H2"), split_hapto("(eta5-Cp)", 1), split_hapto("CO")
    ((2, 3), (5, 6), (None, 0))
    """
    m = HAPTO_PREFIX.match(text, start, len(text) if end is None else end)
    if not m:
        return None, start
    return int(m.group(1).translate(_SUPERSCRIPT)), m.end()


@frozen_dataclass
class Reading:
    """One catalogue entry a spelling can stand for.

    ``prefixed`` is true when the catalogue spells the entry this way only
    with its hapticity prefix (``η2-H2`` for dihydrogen): the spelling then
    means the entry only when the prefix is written.
    """

    name: str
    bound_atoms: int
    prefixed: bool


@frozen_dataclass
class SpellingIndex:
    """Every spelling of a catalogue, indexed for look-up by the formula parser.

    ``readings`` maps a spelling, its hapticity prefix removed, to the entries
    it can stand for, fewest bound atoms last: one ligand catalogued at two
    hapticities shares its spellings (``C3H5`` is η3-allyl and η1-allyl).
    ``bare`` maps each spelling that may be written without a prefix to the
    entry it then means: the only one, or among entries that share it the one
    marked ``hapto_default``.  ``stems`` holds every leading part of every
    spelling, so the longest spelling at a position is found by growing the
    match one character at a time, one set look-up per character, instead
    of trying every spelling in turn.

    Examples
    --------
    >>> from enumerator.rules.ruleset import load_rules
    >>> ix = spelling_index(load_rules())
    >>> text = "PPh3Cl"
    >>> text[: ix.longest(text, 0, len(text))]
    'PPh3'
    >>> ix.resolve("C3H5", None), ix.resolve("C3H5", 1), ix.resolve("H2", 2), ix.resolve("H2", None)
    ('allyl', 'eta1-allyl', 'dihydrogen', None)
    """

    readings: Mapping[str, tuple[Reading, ...]]
    bare: Mapping[str, str]
    stems: frozenset[str]

    def longest(self, text: str, start: int, end: int, prefixed: bool = False) -> int:
        """Where the longest spelling at ``text[start:end]`` ends (``start`` when none fits).

        Parameters
        ----------
        text : str
        start, end : int
        prefixed : bool, optional
            A hapticity prefix was written before ``start``: spellings read
            only with a prefix count too.

        Returns
        -------
        int
        """
        table: Mapping[str, object] = self.readings if prefixed else self.bare
        best = start
        j = start + 1
        while j <= end and text[start:j] in self.stems:
            if text[start:j] in table:
                best = j
            j += 1
        return best

    def resolve(self, spelling: str, eta: int | None) -> str | None:
        """The entry a spelling means with the hapticity written before it.

        Parameters
        ----------
        spelling : str
            Without its prefix.
        eta : int or None
            The hapticity written (None: no prefix).

        Returns
        -------
        str or None
            The canonical name, or None when the catalogue has no such reading.
        """
        if eta is None:
            return self.bare.get(spelling)
        for r in self.readings.get(spelling, ()):
            if r.bound_atoms == eta:
                return r.name
        return None

    def refusal(self, spelling: str, eta: int | None) -> tuple[str, str] | None:
        """Why a known spelling has no reading at the hapticity written: (what, fix), or None if it is unknown.

        Parameters
        ----------
        spelling : str
            Without its prefix; :meth:`resolve` gave None for it.
        eta : int or None

        Returns
        -------
        (str, str) or None
        """
        found = self.readings.get(spelling, ())
        if not found:
            return None
        have = ", ".join(f"η{r.bound_atoms} ({r.name})" for r in found)
        written = " or ".join(f"η{r.bound_atoms}-{spelling}" for r in found)
        if eta is None:
            return f"{spelling} is catalogued only with its hapticity: {have}", f"write {written}"
        return (
            f"η{eta}-{spelling} is not in the catalogue ({spelling} is catalogued as {have})",
            f"write {written}, or add an η{eta} entry in a ligands.toml under --rules DIR",
        )


@frozen_dataclass
class _Catalogue:
    """The ligands of one rule set, read-only: by canonical name, by spelling, by lower-case spelling, indexed."""

    entries: Mapping[str, LigandEntry]
    spellings: Mapping[str, str]  # spelling as written -> canonical name (a shared one: its default)
    folded: Mapping[str, frozenset[str]]  # lower-case spelling -> canonical names
    index: SpellingIndex


def _file_entries(path: Path) -> list[LigandEntry]:
    """The entries of one ligands.toml, each checked, in file order.

    A user's file is checked in full, its SMILES parsed by RDKit, so that a
    bad entry fails at load; the built-in catalogue's SMILES are checked by
    the test suite (tests/test_lazy_rules.py), which spares every command
    the RDKit import and 200-odd SMILES parses."""
    data = read_toml(path)
    check_keys(data, str(path), required=("ligand",), optional=())
    table = data["ligand"]
    if not isinstance(table, list):
        raise rule_error(path, "'ligand' must be an array of tables", "write each entry under [[ligand]]")
    seen: set[str] = set()
    out = []
    builtin = BUILTIN_RULES in Path(path).resolve().parents
    for k, raw in enumerate(table):
        where = f"{path} [[ligand]] #{k + 1}"
        if not isinstance(raw, dict):
            raise rule_error(where, "not a table", "write each entry under [[ligand]]")
        e = parse_entry(raw, where, smiles_now=not builtin, source=str(path))
        if e.name in seen:
            raise rule_error(where, f"ligand '{e.name}' is defined twice in this file", "keep one entry")
        seen.add(e.name)
        out.append(e)
    return out


def _hill_formula(smiles: str) -> str:
    """The molecular formula of a SMILES, its charge left off (C3H5 for the allyl anion)."""
    from rdkit.Chem import rdMolDescriptors

    return re.sub(r"[+-]\d*$", "", rdMolDescriptors.CalcMolFormula(_read_smiles(smiles)))


def _readings(entries: Mapping[str, LigandEntry]) -> dict[str, dict[str, Reading]]:
    """Spelling (prefix removed) -> canonical name -> reading, every name and alias of every entry."""
    out: dict[str, dict[str, Reading]] = {}
    for e in entries.values():
        for s in (e.name, *e.aliases):
            eta, at = split_hapto(s)
            base = s[at:]
            if eta is not None and (not base or eta != e.bound_atoms):
                raise rule_error(
                    f"{e.source} ({e.name})",
                    f"spelling '{s}' says η{eta} but the ligand binds through {e.bound_atoms} atom(s)",
                    f"write the prefix η{e.bound_atoms}- followed by the spelling, or leave the prefix out",
                )
            old = out.setdefault(base, {}).get(e.name)
            out[base][e.name] = Reading(e.name, e.bound_atoms, eta is not None and (old is None or old.prefixed))
    return out


def _builtin(entry: LigandEntry) -> bool:
    """Whether an entry comes from the built-in catalogue (whose SMILES the test suite checks)."""
    return BUILTIN_RULES in Path(entry.source).resolve().parents


def _shared(base: str, found: Mapping[str, Reading], entries: Mapping[str, LigandEntry]) -> str | None:
    """Check a spelling that several entries share; the entry it means without a prefix (None: none or one).

    That the entries are one molecule (equal SMILES formulas, by RDKit) is
    checked at load when a user's entry takes part; among built-in entries
    the test suite checks it (tests/test_lazy_rules.py)."""
    by_atoms: dict[int, str] = {}
    first = next(iter(found))
    same_molecule = all(_builtin(entries[r.name]) for r in found.values())
    molecule = "" if same_molecule else _hill_formula(entries[first].smiles)
    for r in found.values():
        where = f"{entries[r.name].source} ({r.name})"
        if r.bound_atoms in by_atoms:
            raise rule_error(
                where,
                f"spelling '{base}' is already the name or an alias of '{by_atoms[r.bound_atoms]}', "
                f"which binds through as many atoms ({r.bound_atoms})",
                "remove or rename the spelling (entries share a spelling only at different hapticities)",
            )
        by_atoms[r.bound_atoms] = r.name
        if not same_molecule and _hill_formula(entries[r.name].smiles) != molecule:
            raise rule_error(
                where,
                f"spelling '{base}' is shared with '{first}', a different molecule (SMILES formulas differ)",
                "entries share a spelling only when they are one ligand at different hapticities",
            )
    bare = sorted(r.name for r in found.values() if not r.prefixed)
    if len(bare) < 2:
        return None
    defaults = [n for n in bare if entries[n].hapto_default]
    if len(defaults) != 1:
        raise rule_error(
            f"{entries[bare[-1]].source} ({', '.join(bare)})",
            f"spelling '{base}' is shared by {', '.join(bare)} and {len(defaults)} of them carry hapto_default",
            "mark exactly one with hapto_default = true: it is read when no hapticity is written",
        )
    return defaults[0]


def _spelling_index(entries: Mapping[str, LigandEntry]) -> tuple[dict[str, str], SpellingIndex]:
    """Every spelling as written -> canonical name, and the index; shared spellings checked."""
    readings = _readings(entries)
    bare: dict[str, str] = {}
    defaults: set[str] = set()
    for base, found in readings.items():
        chosen = _shared(base, found, entries) if len(found) > 1 else None
        if chosen is not None:
            defaults.add(chosen)
            bare[base] = chosen
        elif not all(r.prefixed for r in found.values()):
            bare[base] = next(r.name for r in found.values() if not r.prefixed)
    for e in entries.values():
        if e.hapto_default and e.name not in defaults:
            raise rule_error(
                f"{e.source} ({e.name})",
                "'hapto_default' on a ligand that shares no spelling with an entry at another hapticity",
                "remove it: it only chooses among entries that share a spelling",
            )
    spellings: dict[str, str] = {}
    for e in entries.values():
        for s in (e.name, *e.aliases):
            eta, at = split_hapto(s)
            spellings[s] = e.name if eta is not None else bare[s]
    stems = frozenset(base[:k] for base in readings for k in range(1, len(base) + 1))
    index = SpellingIndex(
        MappingProxyType(
            {b: tuple(sorted(f.values(), key=lambda r: (-r.bound_atoms, r.name))) for b, f in sorted(readings.items())}
        ),
        MappingProxyType(dict(sorted(bare.items()))),
        stems,
    )
    return spellings, index


@cached(maxsize=16)
def _catalogue(rules: RuleSet) -> _Catalogue:
    entries: dict[str, LigandEntry] = {}
    with quiet_rdkit():  # RDKit's findings become one RuleError line, not pages of its own log
        for path in rules.files("ligands.toml"):
            for e in _file_entries(path):
                entries[e.name] = e
        spellings, index = _spelling_index(entries)
    folded: dict[str, set[str]] = {}
    for s, n in spellings.items():
        folded.setdefault(s.lower(), set()).add(n)
    return _Catalogue(
        MappingProxyType(dict(sorted(entries.items()))),
        MappingProxyType(dict(sorted(spellings.items()))),
        MappingProxyType({k: frozenset(v) for k, v in folded.items()}),
        index,
    )


def load_ligands(rules: RuleSet) -> Mapping[str, LigandEntry]:
    """Every catalogued ligand by canonical name.

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force: built-in first, then the user files; a
        user entry with the same name replaces the built-in one.

    Returns
    -------
    Mapping[str, LigandEntry]
        Read-only, sorted by name; loaded and checked once per rule set.

    Raises
    ------
    RuleError
        Any entry of any file in force is malformed, or a spelling is shared
        other than by one ligand at different hapticities with one default.
    """
    return _catalogue(rules).entries


def all_spellings(rules: RuleSet) -> Mapping[str, str]:
    """Every accepted spelling (names and aliases, case as written) -> canonical name.

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force.

    Returns
    -------
    Mapping[str, str]
        Read-only, sorted by spelling.  A spelling that entries share at
        different hapticities maps to the one marked ``hapto_default``; a
        spelling written with its prefix (``η2-H2``) to its own entry.
    """
    return _catalogue(rules).spellings


def spelling_index(rules: RuleSet) -> SpellingIndex:
    """The catalogue's spellings indexed for the formula parser (see :class:`SpellingIndex`).

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force.

    Returns
    -------
    SpellingIndex
        Built and checked once per rule set, with the catalogue.
    """
    return _catalogue(rules).index


def find_ligand(rules: RuleSet, text: str) -> LigandEntry:
    """A ligand by name or alias, with an optional hapticity prefix: exact first, then a unique case-insensitive match.

    A spelling that several entries share (one ligand at two hapticities)
    means the entry of the hapticity written (``η1-C3H5``), else the entry
    marked ``hapto_default``.

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force.
    text : str
        A name or alias (surrounding spaces ignored), e.g. 'PPh3', 'cp', 'η2-H2'.

    Returns
    -------
    LigandEntry

    Raises
    ------
    InputError
        The spelling is unknown (with the nearest names), is not catalogued at
        the hapticity written (with the hapticities it has), or matches several
        ligands when case is ignored.
    """
    cat = _catalogue(rules)
    t = text.strip()
    eta, at = split_hapto(t)
    name = cat.index.resolve(t[at:], eta)
    if name is not None:
        return cat.entries[name]
    refused = cat.index.refusal(t[at:], eta)
    if refused is not None:
        raise InputError(f"ligand '{t}': {refused[0]}", refused[1])
    hits = cat.folded.get(t.lower(), frozenset())
    if len(hits) == 1:
        return cat.entries[next(iter(hits))]
    if len(hits) > 1:
        raise InputError(f"ligand '{text}' is ambiguous", f"write one of {', '.join(sorted(hits))} exactly")
    raise unknown_ligand(rules, t)


def unknown_ligand(rules: RuleSet, text: str, context: str = "") -> InputError:
    """The error for an unknown ligand name, with the nearest known names.

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force.
    text : str
        The name given.
    context : str, optional
        Appended to the message (e.g. where the name was read).

    Returns
    -------
    InputError
        To be raised by the caller.
    """
    near = closest_names(text, all_spellings(rules))
    hint = f"did you mean {', '.join(near)}?" if near else "see the catalogue with: isosieve ligands"
    return InputError(
        f"unknown ligand '{text}'{context}",
        hint + " (add your own in a ligands.toml under --rules DIR)",
    )
