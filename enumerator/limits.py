"""Bounds on what the tool reads, in one place: each says what it bounds and why the value.

Every input is bounded before the work it could make unbounded starts, and
each bound is refused with one line that names the range (an
:class:`~enumerator.errors.InputError` or, in a rule file, a
:class:`~enumerator.errors.RuleError`).  The values are generous for real
chemistry and small enough that nothing read within them can hang the tool
or exhaust its memory; ``DEVELOPERS.md`` ("Robustness") lists where each is
checked.

>>> MAX_CHARGE, MAX_SITES
(8, 24)
"""

from __future__ import annotations

__all__ = [
    "MAX_CHARGE",
    "MAX_SITES",
    "MAX_COUNT_DIGITS",
    "MAX_FORMULA_CHARS",
    "MAX_NESTING",
    "MAX_LABEL_CHARS",
    "MAX_TOML_DEPTH",
    "MAX_SMILES_CHARS",
    "MAX_SMILES_ATOMS",
    "SIZE_CAP",
    "ECHO_CHARS",
]

#: Largest overall charge of a complex, either sign.  Mononuclear complex ions carry at most a few charges
#: ([Fe(CN)6]4-, [Cr(CO)4]4-, [Mo(CN)8]4-); 8 leaves room for anything reported and refuses typing errors
#: such as 20- or 99999999999- before any arithmetic on them.
MAX_CHARGE = 8

#: Most coordination sites: of a geometry file, of a formula's donor atoms, and of any one count in a
#: formula.  The largest built-in polyhedron has 12 sites (IC-12) and coordination numbers above 16 are not
#: known for a single metal centre (from memory); 24 keeps the site bit masks, the placement lists and the
#: group derivation small.
MAX_SITES = 24

#: Most digits of a count or a charge (checked before the digits are turned into a number: Python refuses to
#: convert more than 4,300 digits, and no count above :data:`MAX_SITES` is used anyway).
MAX_COUNT_DIGITS = 4

#: Longest formula read, in characters.  The longest condensed formula of the catalogue's kind is well under
#: 100 characters; a longer text is a paste gone wrong.
MAX_FORMULA_CHARS = 500

#: Longest label or title (a job's ``title`` and ``label``, a batch file's label column), in characters: they
#: head tables and captions, where a paragraph is a paste gone wrong.
MAX_LABEL_CHARS = 300

#: Deepest nesting of brackets in a formula: ``[Mo(CO)3(P(OMe)3)3]`` nests three deep.
MAX_NESTING = 8

#: Deepest nesting of tables and arrays in a rule or job file (the rule files nest four deep at most);
#: checked after reading, and a file nested past Python's recursion limit is refused as well.
MAX_TOML_DEPTH = 32

#: Longest SMILES of a catalogue ligand, in characters (BINAP, the longest built-in one, has 81).
MAX_SMILES_CHARS = 400

#: Most atoms (hydrogens included) a catalogue ligand's SMILES may give (BINAP has 76).
MAX_SMILES_ATOMS = 300

#: Most stereoisomers any command enumerates at once without ``--limit``: the Burnside count is checked
#: first (:func:`enumerator.isomers.counting.check_size`).
SIZE_CAP = 200_000

#: Most characters of a user's text (a formula, a file name) a message echoes; the rest is counted.
ECHO_CHARS = 120
