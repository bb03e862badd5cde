"""Rule files: the folders in force, loaded and validated once into typed objects.

The built-in folder comes first; user folders given with ``--rules DIR``
follow, each mirroring the built-in layout::

    DIR/geometries/*.toml     one coordination geometry per file (enumerator.rules.geometries)
    DIR/ligands.toml          extra ligands (enumerator.rules.ligands)
    DIR/reporters.toml        extra reporter classes (enumerator.rules.reporters)
    DIR/forcefields.toml      force-field defaults (enumerator.rules.forcefields)
    DIR/element_names.toml    names of central atoms (enumerator.rules.element_names)
    DIR/geometry_choice.toml  which polyhedron a centre takes by default (enumerator.rules.geometry_choice)
    DIR/substitution/*.toml   extra substitution rule sets (enumerator.rules.substitution)

A user file is validated in full before it is used; an entry with the same
name as a built-in one replaces it for that run only.  Every problem is a
:class:`~enumerator.errors.RuleError` naming the file, the key and the fix
(:mod:`enumerator.rules.checks`).

A :class:`RuleSet` is a value: the folders and, for each user folder, the
modification time and size of every rule file in it.  Each loader caches its
answer by the rule set, so editing a user file (or adding one) gives a new
rule set and fresh answers; the built-in files are read once per process.

>>> rs = load_rules()
>>> rs.geometry("TBPY-5").coordination_number
5
>>> rs is load_rules()
True
"""

from __future__ import annotations

import os
from collections.abc import Iterable, Mapping
from functools import cached_property
from pathlib import Path
from types import MappingProxyType

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.geometry import Geometry
from enumerator.rules.checks import check_keys, closest_names, read_toml, rule_error
from enumerator.rules.geometries import load_geometries

__all__ = [
    "BUILTIN_RULES",
    "RULE_FILES",
    "RENAMED_GEOMETRIES",
    "RuleSet",
    "load_rules",
    "file_stamps",
    "read_toml",
    "check_keys",
    "closest_names",
    "rule_error",
]

#: Old spellings of built-in geometry symbols -> the symbol now used.  The hexagonal plane has no
#: IUPAC polyhedral symbol (IR-9.3.2.1), so 'HP-6', which looked like one, became the tool's own
#: 'hexplane-6'.  An old spelling is still read, with a one-line note (:meth:`RuleSet.geometry_note`).
RENAMED_GEOMETRIES: Mapping[str, str] = MappingProxyType({"HP-6": "hexplane-6"})

#: The rules folder shipped with the package.
#: In the source tree ``enumerator/builtin_rules`` is a link to the top-level
#: ``rules/``; a wheel carries the files themselves there (pyproject package-data).
#: The package's own copy comes first, so a stray ``rules`` folder beside an
#: installed package is never read.
BUILTIN_RULES = (Path(__file__).resolve().parent.parent / "builtin_rules").resolve()
if not BUILTIN_RULES.is_dir():  # a checkout where the link did not survive (e.g. no symlinks)
    BUILTIN_RULES = Path(__file__).resolve().parent.parent.parent / "rules"

#: Every file (or glob) a loader reads from a rule folder, relative to the folder.
RULE_FILES = (
    "geometries/*.toml",
    "ligands.toml",
    "reporters.toml",
    "forcefields.toml",
    "element_names.toml",
    "geometry_choice.toml",
    "substitution/*.toml",
)

#: (file, modification time in ns, size in bytes) of one rule file.
Stamp = tuple[str, int, int]


def _files_in(folder: Path, relative: str) -> list[Path]:
    if any(ch in relative for ch in "*?["):
        return sorted(folder.glob(relative))
    p = folder / relative
    return [p] if p.is_file() else []


@frozen_dataclass
class RuleSet:
    """Every rule folder in force, built-in first.

    ``stamps`` holds the modification time and size of every rule file of the
    user folders (:func:`file_stamps`), so that two rule sets of the same
    folders are equal only while their files are unchanged.  Sections load
    lazily and are validated in full on first use.
    """

    folders: tuple[Path, ...]
    stamps: tuple[Stamp, ...] = ()

    def files(self, relative: str) -> list[Path]:
        """All files at ``relative`` (a file name or a glob under a folder), built-in first, then each user folder.

        Parameters
        ----------
        relative : str
            E.g. ``'ligands.toml'`` or ``'geometries/*.toml'``.

        Returns
        -------
        list of Path
            The files that exist, in folder order (a glob's matches sorted).
        """
        out: list[Path] = []
        for folder in self.folders:
            out.extend(_files_in(folder, relative))
        return out

    @cached_property
    def geometries(self) -> Mapping[str, Geometry]:
        """Every geometry in force by polyhedral symbol (read-only); see :mod:`enumerator.rules.geometries`."""
        return load_geometries(self.files("geometries/*.toml"), builtin=BUILTIN_RULES)

    def geometry(self, symbol: str) -> Geometry:
        """A geometry by its polyhedral symbol.

        Parameters
        ----------
        symbol : str
            E.g. ``'OC-6'``, in any case; an old spelling of :data:`RENAMED_GEOMETRIES` gives the
            renamed geometry.

        Returns
        -------
        Geometry

        Raises
        ------
        InputError
            No geometry has that symbol (with the nearest symbols).
        """
        geos = self.geometries
        for sym, g in geos.items():
            if sym.lower() == symbol.strip().lower():
                return g
        renamed = self._renamed(symbol)
        if renamed:
            return geos[renamed]
        near = closest_names(symbol, geos)
        hint = f"did you mean {' or '.join(near)}?" if near else f"known: {', '.join(sorted(geos))}"
        raise InputError(
            f"unknown geometry '{symbol}'", hint + " (or add rules/geometries/<SYMBOL>.toml via --rules DIR)"
        )

    def _renamed(self, symbol: str) -> str | None:
        """The symbol an old spelling now has, when no geometry in force has the old one."""
        key = symbol.strip().lower()
        for old, new in RENAMED_GEOMETRIES.items():
            held = any(sym.lower() == old.lower() for sym in self.geometries)
            if old.lower() == key and new in self.geometries and not held:
                return new
        return None

    def geometry_note(self, symbol: str | None) -> str | None:
        """The one-line pointer for an old spelling of a geometry symbol, else None.

        >>> load_rules().geometry_note("HP-6")[:34]
        'HP-6 is now written hexplane-6: th'

        Parameters
        ----------
        symbol : str or None
            A requested symbol (``--geometry``).

        Returns
        -------
        str or None
        """
        new = self._renamed(symbol) if symbol else None
        if symbol is None or new is None:
            return None
        return (
            f"{symbol.strip()} is now written {new}: the tool names the shape itself, "
            "as IUPAC lists no polyhedral symbol for it (IR-9.3.2.1)"
        )

    def default_geometry(self, cn: int) -> Geometry:
        """The geometry an abstract formula of coordination number ``cn`` gets.

        Parameters
        ----------
        cn : int
            The coordination number.

        Returns
        -------
        Geometry
            The one marked ``default_for_abstract``, else the first by symbol.

        Raises
        ------
        InputError
            No geometry has that coordination number.
        """
        for g in sorted(self.geometries.values(), key=lambda g: g.symbol):
            if g.coordination_number == cn and g.default_for_abstract:
                return g
        same = sorted(g.symbol for g in self.geometries.values() if g.coordination_number == cn)
        if same:
            return self.geometry(same[0])
        raise InputError(
            f"no geometry with coordination number {cn}",
            "check the formula's donor count or add a geometry file with --rules DIR",
        )


def file_stamps(folders: Iterable[Path]) -> tuple[Stamp, ...]:
    """The modification time and size of every rule file (:data:`RULE_FILES`) in the folders.

    Parameters
    ----------
    folders : iterable of Path
        Rule folders.

    Returns
    -------
    tuple of (str, int, int)
        (file, st_mtime_ns, st_size) per file, in folder and :data:`RULE_FILES` order.
    """
    out: list[Stamp] = []
    for folder in folders:
        for relative in RULE_FILES:
            for path in _files_in(folder, relative):
                st = path.stat()
                out.append((str(path), st.st_mtime_ns, st.st_size))
    return tuple(out)


def load_rules(user_folders: Iterable[str | os.PathLike[str]] = ()) -> RuleSet:
    """The rule set of the built-in rules plus the given user folders.

    Parameters
    ----------
    user_folders : iterable of str or PathLike, optional
        Folders laid out like the built-in one (``--rules DIR``), in order.

    Returns
    -------
    RuleSet
        The same object for the same folders while their files are unchanged.

    Raises
    ------
    InputError
        A folder does not exist.
    """
    folders = []
    for f in user_folders:
        p = Path(f).expanduser().resolve()
        if not p.is_dir():
            raise InputError(
                f"--rules folder '{f}' does not exist", "give a folder that holds geometries/, ligands.toml, ..."
            )
        folders.append(p)
    return _load(tuple([BUILTIN_RULES] + folders), file_stamps(folders))


@cached(maxsize=16)
def _load(folders: tuple[Path, ...], stamps: tuple[Stamp, ...]) -> RuleSet:
    return RuleSet(folders, stamps)
