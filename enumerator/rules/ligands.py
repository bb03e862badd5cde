"""The ligand catalogue: ``rules/ligands.toml`` (plus any user ``ligands.toml``
given with ``--rules DIR``), loaded and checked once per rule set.

Each entry says how a real ligand occupies coordination sites (donor
elements in chain order, denticity, hapticity, ring), the placements it
allows (chelate spans, fac/mer), how it is counted (charge in the ionic
model, electrons donated in the covalent and the ionic count) and its
stretch-reporter class.  Every SMILES is parsed by RDKit at load, and the
atom-map numbers of its bound atoms, its formal charge and its donor
elements are checked against the other keys.

Look-up (:func:`find_ligand`) tries the exact name, then the exact alias,
then a case-insensitive match that must be unique.  Formulas use the exact
(case-sensitive) spellings only, because case carries meaning there
(``CO`` carbonyl, ``Co`` cobalt).

>>> from enumerator.rules.ruleset import load_rules
>>> cat = load_ligands(load_rules())
>>> e = cat["PPh3"]
>>> e.donors, e.charge, e.electrons_covalent, e.electrons_ionic
(('P',), 0, 2, 2)
>>> find_ligand(load_rules(), "C5H5").name
'Cp'
>>> find_ligand(load_rules(), "cp").kind().ring
True
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any, Mapping

from enumerator.model.composition import ARRANGEMENTS, LigandKind
from enumerator.model.elements import element_symbols
from enumerator.errors import InputError, RuleError
from enumerator.model.geometry import SPANS
from enumerator.rules.ruleset import RuleSet, check_keys, closest_names, read_toml

__all__ = ["LigandEntry", "load_ligands", "find_ligand", "all_spellings", "REPORTER_NAME"]

#: A reporter class name: letters and digits, starting with a capital.
REPORTER_NAME = re.compile(r"^[A-Z][A-Za-z0-9]{0,7}$")

_REQUIRED = ("name", "label", "smiles", "donors", "denticity", "charge", "electrons_covalent", "electrons_ionic")
_OPTIONAL = ("aliases", "hapticity", "ring", "spans", "arrangements", "reporter", "nitrosyl", "note", "source", "iupac", "enclose")
_NAME = re.compile(r"^[^\s\[\]]{1,32}$")


@dataclass(frozen=True)
class LigandEntry:
    """One catalogued ligand."""

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

    @property
    def bound_atoms(self) -> int:
        """Atoms bound to the metal (the hapticity, else the denticity)."""
        return self.hapticity or self.denticity

    def meta(self) -> tuple[tuple[str, object], ...]:
        """Catalogue data carried by the :class:`LigandKind` (sorted pairs)."""
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
        """The ligand as the isomer enumerator sees it."""
        if self.ring:
            donors = (self.donors[0],) * 3
        else:
            donors = self.donors
        return LigandKind(
            name=self.name,
            donors=donors,
            ring=self.ring,
            spans=self.spans,
            arrangements=frozenset(self.arrangements),
            reporter=self.reporter,
            meta=self.meta(),
        )


def _fail(where: str, what: str, fix: str) -> RuleError:
    return RuleError(f"{where}: {what}", fix)


def _str_list(value: Any, where: str, key: str, example: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(x, str) and x.strip() for x in value):
        raise _fail(where, f"'{key}' must be a list of strings", f"write {key} = {example}")
    return tuple(x.strip() for x in value)


def _int(value: Any, where: str, key: str) -> int:
    if not isinstance(value, int) or isinstance(value, bool):
        raise _fail(where, f"'{key}' must be an integer, not {value!r}", f"write {key} = 2")
    return value


def _parse_entry(data: Mapping[str, Any], where: str) -> LigandEntry:
    check_keys(data, where, _REQUIRED, _OPTIONAL)
    name = data["name"]
    if not isinstance(name, str) or not _NAME.match(name):
        raise _fail(where, f"name {name!r} must be 1-32 characters without spaces or square brackets", 'write e.g. name = "PPh3"')
    where = f"{where} ({name})"
    label = data["label"]
    if not isinstance(label, str) or not label.strip():
        raise _fail(where, "'label' must be a non-empty string", 'write e.g. label = "triphenylphosphine"')
    aliases = _str_list(data.get("aliases", []), where, "aliases", '["C5H5"]')
    for a in aliases:
        if not _NAME.match(a):
            raise _fail(where, f"alias {a!r} must be 1-32 characters without spaces or square brackets", "remove the spaces")
    donors = _str_list(data["donors"], where, "donors", '["P", "P"]')
    symbols = element_symbols()
    for d in donors:
        if d not in symbols:
            raise _fail(where, f"donor {d!r} is not an element symbol", 'write the donor element, e.g. donors = ["N"]')
    dent = _int(data["denticity"], where, "denticity")
    ring = data.get("ring", False)
    if not isinstance(ring, bool):
        raise _fail(where, "'ring' must be true or false", "write ring = true")
    hapticity = data.get("hapticity")
    if hapticity is not None:
        hapticity = _int(hapticity, where, "hapticity")
        if hapticity < 2:
            raise _fail(where, f"hapticity {hapticity} is below 2", "leave 'hapticity' out for a ligand bound through one atom per site")
    if ring:
        if dent != 3 or len(donors) != 3 or len(set(donors)) != 1:
            raise _fail(where, "a ring ligand caps a facial triad: it needs denticity = 3 and three equal donors", 'write donors = ["C", "C", "C"] and denticity = 3')
        if hapticity is None or hapticity < 3:
            raise _fail(where, "a ring ligand needs its hapticity (3 or more)", "write e.g. hapticity = 5 for a cyclopentadienyl")
    elif dent != len(donors):
        raise _fail(where, f"denticity {dent} but {len(donors)} donors are listed", "list one donor element per occupied site")
    if dent < 1:
        raise _fail(where, "denticity must be at least 1", "write denticity = 1")
    if hapticity is not None and not ring and hapticity < dent:
        raise _fail(where, f"hapticity {hapticity} is below the denticity {dent}", "check both keys")
    charge = _int(data["charge"], where, "charge")
    e_cov = _int(data["electrons_covalent"], where, "electrons_covalent")
    e_ion = _int(data["electrons_ionic"], where, "electrons_ionic")
    if e_cov < 0 or e_ion < 0:
        raise _fail(where, "electron counts cannot be negative", "give the electrons the ligand donates")
    if e_ion - e_cov != -charge:
        raise _fail(
            where,
            f"electrons_ionic ({e_ion}) - electrons_covalent ({e_cov}) must equal -charge ({-charge})",
            "an anion X- gives one electron more in the ionic count than in the covalent count",
        )
    spans = _str_list(data.get("spans", []), where, "spans", '["edge"]')
    for s in spans:
        if s not in SPANS:
            raise _fail(where, f"span {s!r} is not one of {', '.join(SPANS)}", 'write e.g. spans = ["edge"]')
    if spans and (ring or dent < 2):
        raise _fail(where, "'spans' applies to chelate chains only", "remove 'spans'")
    if spans and len(spans) not in (1, dent - 1):
        raise _fail(where, f"{len(spans)} spans for {dent - 1} chain links", "give one span for all links or one per link")
    arr = _str_list(data.get("arrangements", []), where, "arrangements", '["fac"]')
    for a in arr:
        if a not in ARRANGEMENTS:
            raise _fail(where, f"arrangement {a!r} is not fac or mer", 'write arrangements = ["fac"], ["mer"] or ["fac", "mer"]')
    if arr and (ring or dent != 3):
        raise _fail(where, "'arrangements' applies to tridentate chains only", "remove 'arrangements'")
    if set(arr) == set(ARRANGEMENTS):
        arr = ()  # either: no restriction
    reporter = data.get("reporter")
    if reporter is not None and (not isinstance(reporter, str) or not REPORTER_NAME.match(reporter)):
        raise _fail(where, f"reporter {reporter!r} is not a class name", 'write e.g. reporter = "CO"')
    nitrosyl = data.get("nitrosyl")
    if nitrosyl is not None and nitrosyl not in ("linear", "bent"):
        raise _fail(where, f"nitrosyl {nitrosyl!r} is not 'linear' or 'bent'", 'write nitrosyl = "linear"')
    note = data.get("note", "")
    if not isinstance(note, str):
        raise _fail(where, "'note' must be a string", "quote it")
    iupac = data.get("iupac")
    if iupac is not None and (not isinstance(iupac, str) or not iupac.strip() or iupac != iupac.strip()):
        raise _fail(where, "'iupac' must be a non-empty name without surrounding spaces", 'write e.g. iupac = "triphenylphosphane"')
    enclose = data.get("enclose", False)
    if not isinstance(enclose, bool):
        raise _fail(where, "'enclose' must be true or false", "write enclose = true")
    if enclose and iupac is None:
        raise _fail(where, "'enclose' without 'iupac'", 'give the name too, e.g. iupac = "pyridine"')
    smiles = data["smiles"]
    if not isinstance(smiles, str) or not smiles.strip():
        raise _fail(where, "'smiles' must be a non-empty string", 'write e.g. smiles = "[C-:1]#[O+]"')
    entry = LigandEntry(
        name=name, label=label.strip(), smiles=smiles.strip(), donors=donors, denticity=dent, charge=charge,
        electrons_covalent=e_cov, electrons_ionic=e_ion, aliases=aliases, hapticity=hapticity, ring=ring,
        spans=spans, arrangements=tuple(sorted(arr)), reporter=reporter, nitrosyl=nitrosyl, note=note,
        source=str(data.get("source", "")), iupac=iupac, enclose=enclose,
    )
    check_smiles(entry, where)
    return entry


def check_smiles(entry: LigandEntry, where: str) -> None:
    """Parse the SMILES with RDKit and check map numbers, charge and donors."""
    from rdkit import Chem, RDLogger

    RDLogger.DisableLog("rdApp.*")
    try:
        params = Chem.SmilesParserParams()
        params.removeHs = False
        mol = Chem.MolFromSmiles(entry.smiles, params)
    finally:
        RDLogger.EnableLog("rdApp.*")
    if mol is None:
        raise _fail(where, f"RDKit cannot parse the SMILES {entry.smiles!r}", "check brackets, ring closures and aromaticity")
    maps: dict[int, str] = {}
    for atom in mol.GetAtoms():
        n = atom.GetAtomMapNum()
        if n:
            if n in maps:
                raise _fail(where, f"atom-map number {n} appears twice in the SMILES", "number the bound atoms 1, 2, ... once each")
            maps[n] = atom.GetSymbol()
    want = entry.bound_atoms
    if sorted(maps) != list(range(1, want + 1)):
        raise _fail(
            where,
            f"the SMILES marks atoms {sorted(maps) or 'none'} but the ligand binds through {want} atom(s)",
            f"put atom-map numbers 1..{want} on the bound atoms, e.g. [P:1]",
        )
    if entry.hapticity is None:
        for k, d in enumerate(entry.donors, start=1):
            if maps[k] != d:
                raise _fail(where, f"donor {k} is {d!r} but SMILES atom :{k} is {maps[k]!r}", "make 'donors' follow the map numbers")
    else:
        bad = sorted({e for e in maps.values()} - set(entry.donors))
        if bad:
            raise _fail(where, f"bound atom element {bad[0]!r} is not among the donors {list(entry.donors)}", "check 'donors' and the map numbers")
    q = Chem.GetFormalCharge(mol)
    if q != entry.charge:
        raise _fail(where, f"charge is {entry.charge} but the SMILES has formal charge {q}", "write the free ligand as in the ionic model (e.g. [Cl-:1])")


@dataclass(frozen=True)
class _Catalogue:
    entries: tuple[tuple[str, LigandEntry], ...]
    spellings: tuple[tuple[str, str], ...]  # spelling -> canonical name


@lru_cache(maxsize=16)
def _catalogue(rules: RuleSet) -> _Catalogue:
    entries: dict[str, LigandEntry] = {}
    paths = rules.files("ligands.toml")
    for path in paths:
        data = read_toml(path)
        check_keys(data, str(path), required=("ligand",), optional=())
        table = data["ligand"]
        if not isinstance(table, list):
            raise RuleError(f"{path}: 'ligand' must be an array of tables", "write each entry under [[ligand]]")
        seen: set[str] = set()
        for k, raw in enumerate(table):
            where = f"{path} [[ligand]] #{k + 1}"
            if not isinstance(raw, dict):
                raise RuleError(f"{where}: not a table", "write each entry under [[ligand]]")
            e = _parse_entry(raw, where)
            if e.name in seen:
                raise RuleError(f"{where}: ligand '{e.name}' is defined twice in this file", "keep one entry")
            seen.add(e.name)
            entries[e.name] = LigandEntry(**{**e.__dict__, "source": str(path)})
    spellings: dict[str, str] = {}
    for name in entries:
        spellings[name] = name
    for e in entries.values():
        for a in e.aliases:
            if a in spellings and spellings[a] != e.name:
                raise RuleError(
                    f"{e.source}: alias '{a}' of ligand '{e.name}' is already the name or an alias of '{spellings[a]}'",
                    "remove or rename the alias",
                )
            spellings[a] = e.name
    return _Catalogue(tuple(sorted(entries.items())), tuple(sorted(spellings.items())))


def load_ligands(rules: RuleSet) -> dict[str, LigandEntry]:
    """Every catalogued ligand by canonical name (built-in, then user files;
    a user entry with the same name replaces the built-in one)."""
    return dict(_catalogue(rules).entries)


def all_spellings(rules: RuleSet) -> dict[str, str]:
    """Every accepted spelling (names and aliases, case as written) -> canonical name."""
    return dict(_catalogue(rules).spellings)


def find_ligand(rules: RuleSet, text: str) -> LigandEntry:
    """A ligand by name or alias; exact first, then a unique case-insensitive
    match.  Unknown names raise InputError with the nearest names."""
    cat = _catalogue(rules)
    entries = dict(cat.entries)
    spell = dict(cat.spellings)
    t = text.strip()
    if t in spell:
        return entries[spell[t]]
    lower = {}
    for s, n in spell.items():
        lower.setdefault(s.lower(), set()).add(n)
    hits = lower.get(t.lower(), set())
    if len(hits) == 1:
        return entries[next(iter(hits))]
    if len(hits) > 1:
        raise InputError(f"ligand '{text}' is ambiguous", f"write one of {', '.join(sorted(hits))} exactly")
    raise unknown_ligand(rules, t)


def unknown_ligand(rules: RuleSet, text: str, context: str = "") -> InputError:
    """The error for an unknown ligand name, with the nearest known names."""
    near = closest_names(text, all_spellings(rules))
    hint = f"did you mean {', '.join(near)}?" if near else "see the catalogue with: isosieve ligands"
    return InputError(
        f"unknown ligand '{text}'{context}",
        hint + " (add your own in a ligands.toml under --rules DIR)",
    )
