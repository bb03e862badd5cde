"""Bad input never crashes: property-based fuzzing (hypothesis) of the
formula parsers, the rule-file loaders, job files, the output layer and the
command line.

The classes of bad input (DEVELOPERS.md, "Robustness") are held here too: a
look-alike or unprintable character is never read as part of a formula; an
accepted formula is within the bounds of ``enumerator.limits``; a job file is
read into safe outputs or refused; a rule file with values of the wrong type
is refused in one line; the output layer writes every file whole or leaves
everything as it was, with no temporary file behind.

The property everywhere: a call either succeeds or raises an
:class:`~enumerator.errors.IsosieveError` (InputError, RuleError,
CapacityError), never any other exception; a condensed formula that is
accepted has only ligands that were written as ligands (see
:func:`check_reading`); through the CLI, an error is one line on stderr,
exit status 2 for usage/input errors, 1 for internal errors, and no
traceback unless --debug (how the project reports errors; common practice
for command-line tools).  Example counts are kept modest so the file runs
in well under a minute; ``ISOSIEVE_FUZZ_SCALE=20`` runs twenty times the
examples (the parser properties alone then take about a minute and a half).
"""

from __future__ import annotations

import math
import os
import re
import shutil
import tempfile
from collections import Counter
from pathlib import Path

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from enumerator.errors import IsosieveError
from enumerator.parse.abstract import parse_abstract
from enumerator.parse.condensed import parse_condensed, read_condensed
from enumerator.parse.formula import parse_formula
from enumerator.rules.ligands import spelling_index, split_hapto
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import Request, run

RULES = load_rules()
#: ISOSIEVE_FUZZ_SCALE=20 runs twenty times the examples (a deep run, not for the suite)
SCALE = max(1, int(os.environ.get("ISOSIEVE_FUZZ_SCALE", "1") or 1))
_LENIENT = [HealthCheck.too_slow, HealthCheck.filter_too_much]
#: the suite draws the same examples every run (a failure in CI is reproducible, never a coin toss); a deep run
#: (ISOSIEVE_FUZZ_SCALE > 1) draws fresh ones
_FIXED = SCALE == 1
FAST = settings(max_examples=150 * SCALE, deadline=None, suppress_health_check=_LENIENT, derandomize=_FIXED)
SLOW = settings(max_examples=50 * SCALE, deadline=None, suppress_health_check=_LENIENT, derandomize=_FIXED)

# characters a chemist (or a bad paste) may type into a formula
FORMULA_CHARS = "Mabcdefxyz ABCR()[]{}0123456789+-−·.,;η⁵'\"\\/\t_*#=@CNOPHClBrFeRuMonrig"


def _one_line(text: str) -> str:
    """Drop line-break characters: an input that holds one is echoed in the
    message escaped, so the one-line rule holds (tested below)."""
    return "".join(c for c in text if len(("a" + c + "a").splitlines()) == 1)


formula_text = (st.text(alphabet=FORMULA_CHARS, max_size=24) | st.text(max_size=12)).map(_one_line)

# well-formed-looking abstract tokens, to reach the enumerator
TOKENS = ["a", "b", "c", "d", "(AA)", "(AB)", "(ABA)", "(ABC)", "(AAA)", "(ring)", "{AAA}", "{ABB}", "{AB}", "{", "}"]
TOKENS += ["2", "3", "(A)", "(", ")", "0", "10"]
abstract_like = st.lists(st.sampled_from(TOKENS), min_size=0, max_size=7).map(lambda ts: "M" + "".join(ts))


def _ok_or_isosieve(fn, *args, **kwargs):
    try:
        return fn(*args, **kwargs)
    except IsosieveError as exc:
        line = exc.line()
        assert line and len(line.splitlines()) == 1, repr(line)  # one line that names the problem
        return None


@FAST
@given(formula_text)
def test_abstract_parser_never_crashes(text):
    _ok_or_isosieve(parse_abstract, text)


@FAST
@given(formula_text)
def test_formula_dispatch_never_crashes(text):
    # abstract notation, else the condensed parser of real formulas
    _ok_or_isosieve(parse_formula, text, RULES)


CONDENSED_PARTS = [
    "[",
    "]",
    "(",
    ")",
    "Ru",
    "Fe",
    "Mo",
    "Mn",
    "Co",
    "CO",
    "Cl",
    "PPh3",
    "NO",
    "CN",
    "Cp",
    "η5-",
    "eta5-",
    "en",
    "bpy",
    "acac",
    "2",
    "3",
    "6",
    "2-",
    "+",
    "−",
    "C5H5",
    "NH3",
    "py",
    "X",
    "Zz",
    "(NO)2",
    "dppe",
]
condensed_like = st.lists(st.sampled_from(CONDENSED_PARTS), min_size=0, max_size=9).map("".join)


@FAST
@given(condensed_like)
def test_condensed_parser_never_crashes(text):
    check_reading(text)  # defined below: never a crash, and never a ligand that was not written
    _ok_or_isosieve(parse_formula, text, RULES)


# --------------------------------------------------------------------------- the parser never invents a ligand
#
# Whatever the input, a formula the condensed parser accepts has only ligands that were written as
# ligands: each recorded span is exactly a catalogue spelling (its written hapticity picking the
# entry), each parenthesised group is exactly one ligand, no two spans overlap, every letter of the
# formula belongs to a ligand or the metal, and the multipliers written add up to the composition's
# counts.  Formulas are drawn from catalogue spellings, random groupings and random junk groups.

INDEX = spelling_index(RULES)
BARE = sorted(INDEX.bare)
#: (spelling, hapticity) for every reading of every spelling, prefix-only ones included
HAPTO_READINGS = sorted({(sp, r.bound_atoms) for sp, rs in INDEX.readings.items() for r in rs})
METALS = ["Fe", "Ru", "Mo", "W", "Co", "Pt", "Mn", "Cr", "Ni", "Rh", "Ir", "Os", "Re", "Zr", "V"]
PREFIXES = ["η{}-", "eta{}-", "h{}-", "η^{}-"]
COUNTS = ["", "", "", "2", "3", "4", "6"]
JUNK = "ABCDEFGHIKLMNOPRSTUVWXYZabcdefghiklmnoprstuvwxyz0123456789"


def _junk(word: str) -> bool:
    """A group text the catalogue cannot read, with or without a hapticity prefix."""
    eta, at = split_hapto(word)
    return INDEX.resolve(word[at:].strip(), eta) is None


@st.composite
def _piece(draw):
    """One written ligand: a catalogue spelling bare or in parentheses, with or without a hapticity, or junk."""
    kind = draw(st.sampled_from(["group", "group", "prefixed", "bare", "bare", "junk", "junk-bare"]))
    count = draw(st.sampled_from(COUNTS))
    if kind == "group":
        return f"({draw(st.sampled_from(BARE))}){count}"
    if kind == "prefixed":
        spelling, eta = draw(st.sampled_from(HAPTO_READINGS))
        eta += draw(st.sampled_from([0, 0, 0, 1, -1]))  # now and then a hapticity the catalogue lacks
        return f"({draw(st.sampled_from(PREFIXES)).format(eta)}{spelling}){count}"
    if kind == "bare":
        return draw(st.sampled_from(BARE)) + count
    word = draw(st.text(alphabet=JUNK, min_size=1, max_size=6))
    return f"({word}){count}" if kind == "junk" else word + count


@st.composite
def condensed_formulas(draw):
    pieces = draw(st.lists(_piece(), min_size=1, max_size=6))
    pieces.insert(draw(st.integers(0, len(pieces))), draw(st.sampled_from(METALS)))
    body = "".join(pieces)
    if draw(st.booleans()):
        return f"[{body}]{draw(st.sampled_from(['', '+', '2-', '3+', '−']))}"
    return body


def _groups(text: str, inside: set[int]) -> list[tuple[int, int]]:
    """The outermost parenthesised groups of the text, read independently of the parser; parentheses
    inside a ligand's own spelling (P(OMe)3 written bare) are part of that spelling, not a group."""
    out, depth, start = [], 0, 0
    for k, ch in enumerate(text):
        if k in inside:
            continue
        if ch == "(":
            depth, start = depth + 1, (k if depth == 0 else start)
        elif ch == ")":
            depth -= 1
            if depth == 0:
                out.append((start, k + 1))
    return out


def _claim(covered: set[int], start: int, end: int) -> None:
    span = set(range(start, end))
    assert not covered & span, "two spans overlap"
    covered |= span


def check_reading(text: str) -> bool:
    """Parse ``text``; on success assert every property above.  Returns whether it parsed."""
    try:
        reading = read_condensed(text, RULES, suggest=False)
    except IsosieveError as exc:
        assert len(exc.line().splitlines()) == 1
        return False
    t = reading.text
    covered: set[int] = set()
    _claim(covered, *reading.metal_span)
    m_end = reading.metal_span[1]
    if t[m_end : m_end + 1] == "1" and not t[m_end + 1 : m_end + 2].isdigit():
        _claim(covered, m_end, m_end + 1)  # 'Fe1(CO)5': a count of one metal atom, read as written (common practice)
    spelled: set[int] = set()
    for span in reading.ligands:
        spelling = t[span.start : span.end]
        assert INDEX.resolve(spelling, span.hapticity) == span.name, (text, spelling)  # exactly a spelling
        _claim(covered, span.start, span.end)
        spelled |= set(range(span.start, span.end))
        if span.prefix_start is not None:
            eta, at = split_hapto(t, span.prefix_start, span.start)
            assert eta == span.hapticity and t[at : span.start].strip() == ""
            _claim(covered, span.prefix_start, at)
        after = span.end
        if span.group is not None:
            a, b = span.group
            assert t[a] == "(" and t[b - 1] == ")" and a < (span.prefix_start or span.start) and span.end < b
            assert t[a + 1 : span.prefix_start or span.start].strip() == "" and t[span.end : b - 1].strip() == ""
            _claim(covered, a, a + 1)
            _claim(covered, b - 1, b)
            after = b
        digits = re.match(r"\d*", t[after:]).group(0)  # type: ignore[union-attr]
        assert span.count == (int(digits) if digits else 1), (text, span)
        _claim(covered, after, after + len(digits))
    # each parenthesised group of the text is exactly one ligand's group
    assert sorted(s.group for s in reading.ligands if s.group) == _groups(t, spelled), text
    # nothing else was read: what no span covers is brackets, spaces and the charge
    body_end = t.rfind("]")
    rest = "".join(ch for k, ch in enumerate(t[: body_end if body_end >= 0 else len(t)]) if k not in covered)
    assert set(rest) <= set("[] \t"), (text, rest)
    try:
        comp = parse_condensed(text, RULES, suggest=False)
    except IsosieveError as exc:  # read as written, but more sites than any geometry may have (limits.MAX_SITES)
        assert "coordination sites" in exc.line(), exc.line()
        return True
    assert sum(n for _k, n in comp.parts) == sum(s.count for s in reading.ligands)
    return True


@FAST
@given(condensed_formulas())
def test_condensed_reading_never_invents_a_ligand(text):
    check_reading(text)


@st.composite
def _catalogue_groups(draw):
    """A formula of parenthesised catalogue ligands only (right hapticities) and the counts it must give."""
    want: Counter[str] = Counter()
    pieces = []
    for _ in range(draw(st.integers(1, 5))):
        n = draw(st.integers(1, 6))
        if draw(st.booleans()):
            spelling = draw(st.sampled_from(BARE))
            pieces.append(f"({spelling}){n if n > 1 else ''}")
            want[INDEX.bare[spelling]] += n
        else:
            spelling, eta = draw(st.sampled_from(HAPTO_READINGS))
            pieces.append(f"({draw(st.sampled_from(PREFIXES)).format(eta)}{spelling}){n if n > 1 else ''}")
            want[INDEX.resolve(spelling, eta)] += n  # type: ignore[index]
    pieces.insert(draw(st.integers(0, len(pieces))), draw(st.sampled_from(METALS)))
    return "[" + "".join(pieces) + "]", want


@FAST
@given(_catalogue_groups())
def test_each_catalogue_group_is_its_one_ligand(case):
    text, want = case
    assert check_reading(text), text
    try:
        comp = parse_condensed(text, RULES)
    except IsosieveError as exc:  # more sites than limits.MAX_SITES: refused, never misread
        assert "coordination sites" in exc.line(), exc.line()
        return
    assert Counter({k.name: n for k, n in comp.parts}) == want


@FAST
@given(
    st.sampled_from(BARE),
    st.text(alphabet=JUNK, min_size=1, max_size=6).filter(_junk),
    st.sampled_from(COUNTS),
    st.sampled_from(METALS),
)
def test_a_junk_group_is_refused(spelling, junk, count, metal):
    # a group the catalogue cannot read is refused, whatever surrounds it; never split into pieces
    assert not check_reading(f"[{metal}({spelling})({junk}){count}]")


@FAST
@given(st.lists(st.sampled_from(BARE) | st.text(alphabet=JUNK + "()*-", max_size=3), min_size=1, max_size=5))
def test_index_agrees_with_a_scan(parts):
    # the indexed longest match is the old scan over every spelling, longest first
    text = "".join(parts)
    longest_first = sorted(BARE, key=lambda sp: (-len(sp), sp))
    for start in range(len(text)):
        scan = next((start + len(sp) for sp in longest_first if text.startswith(sp, start)), start)
        assert INDEX.longest(text, start, len(text)) == scan


@pytest.mark.parametrize("text", ["η5-", "Ruη5-"])
def test_trailing_hapticity_prefix_is_an_input_error(text):
    condensed = pytest.importorskip("enumerator.parse.condensed")
    with pytest.raises(IsosieveError):
        condensed.parse_condensed(text, RULES)


SMALL_GEOMETRIES = ["T-4", "SP-4", "TBPY-5", "SPY-5", "OC-6", "TPR-6", "HP-6", "PBPY-7", "CU-8", "SAPR-8"]


@SLOW
@given(abstract_like, st.sampled_from(SMALL_GEOMETRIES + [None]), st.integers(min_value=1, max_value=4))
def test_abstract_formulas_through_the_enumerator(text, symbol, limit):
    comp = _ok_or_isosieve(parse_abstract, text)
    assume(comp is not None and comp.donor_count <= 8)
    _ok_or_isosieve(run, Request(formula=text, geometry=symbol, limit=limit))


# --------------------------------------------------------------------------- rule files


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, (int, float)):
        if isinstance(v, float) and not math.isfinite(v):
            return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf")
        return repr(v)
    if isinstance(v, str):
        return '"' + v.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'
    if isinstance(v, list):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    raise TypeError(v)


def _toml(d: dict) -> str:
    return "".join(f"{k} = {_toml_value(v)}\n" for k, v in d.items())


VALID_OC6 = {
    "symbol": "XO-6",
    "name": "test octahedron",
    "sites": [[0.0, 0.0, 1.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [-1.0, 0.0, 0.0], [0.0, -1.0, 0.0], [0.0, 0.0, -1.0]],
}
KEYS = [
    "symbol",
    "name",
    "sites",
    "coordination_number",
    "default_span",
    "fluxional",
    "note",
    "default_for_abstract",
    "source",
    "site",
    "Symbol",
]
scalar = st.one_of(
    st.integers(min_value=-(10**20), max_value=10**20),
    st.floats(allow_nan=True, allow_infinity=True),
    st.booleans(),
    st.text(max_size=8),
    st.sampled_from(["OC-6", "edge", "trans", "XO-6", ""]),
)
value = st.recursive(scalar, lambda inner: st.lists(inner, max_size=7), max_leaves=25)
site = st.lists(
    st.one_of(st.floats(min_value=-1e3, max_value=1e3), st.integers(-3, 3), st.sampled_from([1e308, -1e308, 1e-320])),
    min_size=2,
    max_size=4,
)


@st.composite
def geometry_tables(draw):
    d = dict(VALID_OC6)
    for _ in range(draw(st.integers(min_value=0, max_value=3))):
        action = draw(st.sampled_from(["drop", "set", "sites", "site"]))
        if action == "drop" and d:
            d.pop(draw(st.sampled_from(sorted(d))))
        elif action == "set":
            d[draw(st.sampled_from(KEYS))] = draw(value)
        elif action == "sites":
            d["sites"] = draw(st.lists(site, min_size=0, max_size=9))
        elif action == "site" and isinstance(d.get("sites"), list) and d["sites"]:
            sites = list(d["sites"])
            sites[draw(st.integers(0, len(sites) - 1))] = draw(site)
            d["sites"] = sites
    return _toml(d)


raw_toml = st.one_of(
    geometry_tables(),
    st.text(alphabet="abc=[]{}\"'#\n 0123.,-+xyz", max_size=60),
    st.binary(max_size=40).map(lambda b: b.decode("latin-1")),
)


def _with_rules(files: dict[str, str]):
    folder = Path(tempfile.mkdtemp(prefix="isosieve-fuzz-"))
    for rel, text in files.items():
        p = folder / rel
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(text, encoding="utf-8", errors="surrogateescape")
    return folder


BUILTIN_SYMBOLS = sorted(RULES.geometries)


@SLOW
@given(raw_toml)
def test_geometry_loader_never_crashes(text):
    folder = _with_rules({"geometries/X.toml": text})
    try:
        rs = _ok_or_isosieve(load_rules, [folder])
        if rs is not None:
            geos = _ok_or_isosieve(lambda: rs.geometries)
            if geos is not None and "XO-6" in geos:
                g = geos["XO-6"]
                _ok_or_isosieve(lambda: (g.operations, g.point_group, g.edges))
        # a user folder, however broken, never changes the built-in geometries
        assert sorted(load_rules().geometries) == BUILTIN_SYMBOLS
    finally:
        shutil.rmtree(folder, ignore_errors=True)


LIGAND_ENTRY = (
    '[[ligand]]\nname = "Zq"\nlabel = "test"\nsmiles = "[Cl-:1]"\ndonors = ["Cl"]\ndenticity = 1\ncharge = -1\n'
    "electrons_covalent = 1\nelectrons_ionic = 2\n"
)
ligand_text = st.one_of(
    raw_toml,
    st.lists(st.sampled_from(LIGAND_ENTRY.splitlines(keepends=True)), max_size=10).map("".join),
    st.builds(
        lambda k, v: LIGAND_ENTRY.replace(k, v),
        st.sampled_from(['"Zq"', '"[Cl-:1]"', '["Cl"]', "= 1\n", "= -1\n"]),
        st.sampled_from(['""', '"C1CC"', "[]", '= "x"\n', "= 99\n", "[1, 2]", '"[C:1]#[O:1]"']),
    ),
)


@SLOW
@given(ligand_text)
def test_ligand_catalogue_loader_never_crashes(text):
    ligands = pytest.importorskip("enumerator.rules.ligands")
    folder = _with_rules({"ligands.toml": text})
    try:
        rs = _ok_or_isosieve(load_rules, [folder])
        if rs is not None:
            _ok_or_isosieve(ligands.load_ligands, rs)
        assert "CO" in ligands.load_ligands(load_rules())  # defaults intact
    finally:
        shutil.rmtree(folder, ignore_errors=True)


# --------------------------------------------------------------------------- the command line


from _cli import cli  # noqa: E402  (tests/ is on sys.path under pytest)

OPTION_VALUES = {
    "--geometry": ["OC-6", "oc-6", "XX-9", "", "IC-12", "L-2", "TP-3"],
    "--span": ["AA=trans", "AA", "=x", "b=trans", "AA=wide", "AA=any"],
    "--arrangement": ["AAA=fac", "ABA=mer", "b=fac", "AAA=zig", "AAA="],
    "--reporter": ["a=CO", "a", "q=CO", "a=", "a=co"],
    "--limit": ["1", "0", "-3", "x", "2"],
    "--format": ["table", "json", "csv", "yaml"],
}


@st.composite
def isomers_args(draw):
    args = ["isomers", draw(st.one_of(abstract_like, condensed_like, formula_text))]
    for _ in range(draw(st.integers(0, 3))):
        opt = draw(st.sampled_from(sorted(OPTION_VALUES)))
        args += [opt, draw(st.sampled_from(OPTION_VALUES[opt]))]
    if draw(st.booleans()):
        args.append("--json")
    return args


@SLOW
@given(isomers_args())
def test_cli_errors_are_one_line_with_status_2(args):
    assume(not args[1].endswith(("η5-", "eta5-")))  # known crash, see test_trailing_hapticity_prefix_is_an_input_error
    code, out, err = cli(args)
    assert code in (0, 2), (args, code, err)
    assert "Traceback" not in err
    if code == 2:
        lines = err.strip().splitlines()
        if err.startswith("isosieve: error:"):
            assert len(lines) == 1, err  # a library error: exactly one line
        else:  # a click usage error (bad option value): ends with click's 'Error: ...' line
            assert lines and lines[-1].startswith("Error:"), err


@pytest.mark.parametrize(
    "args",
    [
        ["isomers"],
        ["isomers", "Ma6", "--nonsense"],
        ["isomers", "Ma6", "--limit", "0"],
        ["nosuchcommand"],
    ],
)
def test_usage_errors_exit_2_without_traceback(args):
    code, out, err = cli(args)
    assert code == 2 and "Traceback" not in err and out == ""


def test_usage_errors_are_one_line():
    code, out, err = cli(["isomers", "Ma6", "--nonsense"])
    assert code == 2 and len(err.strip().splitlines()) == 1


def test_input_with_a_line_break_still_gives_one_line():
    code, out, err = cli(["isomers", "Ma4\nb2"])
    assert code == 2 and len(err.strip().splitlines()) == 1


def test_internal_error_exit_1_one_line_and_traceback_only_with_debug(monkeypatch):
    import enumerator.workflow.pipeline as pipeline

    def boom(req, **kw):
        raise ZeroDivisionError("synthetic failure\nsecond line")

    monkeypatch.setattr(pipeline, "run", boom)
    code, out, err = cli(["isomers", "Ma6"])
    assert code == 1 and len(err.strip().splitlines()) == 1 and "internal error" in err and "Traceback" not in err
    with pytest.raises(ZeroDivisionError):  # --debug lets the traceback through
        cli(["--debug", "isomers", "Ma6"])


@pytest.mark.parametrize(
    "files,needle",
    [
        ({"geometries/bad.toml": "symbol = 'OC-6'\nname = 'x'\nsites = [[0,0,1], [0,0,1]]\n"}, "point the same way"),
        (
            {"geometries/bad.toml": "symbol = 'Q-2'\nname = 'x'\nsites = [[0,0,1], [1,0,0]]\nspan = 'edge'\n"},
            "unknown key 'span'",
        ),
        ({"geometries/bad.toml": "symbol = \n"}, "TOML syntax error"),
        (
            {"geometries/bad.toml": "symbol = 'Q-2'\nname = 'x'\nsites = [[0, 0, 1e-320], [1, 0, 0]]\n"},
            "sites[0] is the zero vector",
        ),
        ({"geometries/bad.toml": "symbol = 'Q-2'\nname = 'x'\nsites = [[0, 0, 1], [1, 0, nan]]\n"}, "sites[1]"),
    ],
)
def test_cli_rule_errors_name_the_file(files, needle):
    # before the fix in rules.py, huge components ([1e308, 1e308, 0]) overflowed into an internal error
    folder = _with_rules(files)
    try:
        code, out, err = cli(["--rules", str(folder), "isomers", "Ma6"])
        assert code == 2 and len(err.strip().splitlines()) == 1, err
        assert "bad.toml" in err and needle in err, err
    finally:
        shutil.rmtree(folder, ignore_errors=True)


# --------------------------------------------------------------------------- bounds and characters

from enumerator.limits import MAX_CHARGE, MAX_FORMULA_CHARS, MAX_SITES  # noqa: E402

# characters that look like formula characters but are not ASCII, and characters that print nothing
LOOKALIKES = "аеорсхАВСЕНМОРТ３０１２ßﬀ३٣᠓０Ｍ"
UNPRINTABLE = "\x00\x07\t\x0b\x0c\r\x1b\x1c\x7f\x85\u00a0\u2028\u200b\u200e\u202e\ufeff"


@st.composite
def tainted_formulas(draw):
    """A formula the parsers accept, with one look-alike or unprintable character put in somewhere."""
    base = draw(st.sampled_from(["Ma4b2", "M(AA)2b2", "[RuCl2(CO)2(PPh3)2]", "[Co(NH3)6]3+", "Mabcdef", "[Cr(CO)6]"]))
    ch = draw(st.sampled_from(LOOKALIKES + UNPRINTABLE))
    k = draw(st.integers(0, len(base)))
    return base[:k] + ch + base[k:], ch


@FAST
@given(tainted_formulas())
def test_no_lookalike_or_unprintable_character_is_read(case):
    # the letter notation takes ASCII only and no formula holds a control, format or unusual space character
    # (DEVELOPERS.md, "Robustness"); what is refused names the character by its code point
    text, ch = case
    try:
        parse_formula(text, RULES)
    except IsosieveError as exc:
        line = exc.line()
        assert len(line.splitlines()) == 1
        if ch in UNPRINTABLE:  # named by its code point
            assert f"U+{ord(ch):04X}" in line, line
        else:  # a look-alike: named, or the place where the reading stopped
            assert f"U+{ord(ch):04X}" in line or "position" in line, line
        return
    # accepted only where the character changes nothing the tool reads: nowhere, for these characters
    raise AssertionError(f"{text!r} was read")


number = st.one_of(st.integers(0, 40).map(str), st.integers(0, 10**30).map(str), st.just("9" * 4400), st.just(""))
formula_with_numbers = st.builds(
    lambda tpl, a, b, q, sign: tpl.format(a=a, b=b, q=q, s=sign),
    st.sampled_from(["Ma{a}b{b}", "[RuCl{a}(CO){b}]", "[Cr(CO){a}]{q}{s}", "[Co(NH3){a}Cl{b}]{q}{s}", "M(AA){a}b{b}"]),
    number,
    number,
    number,
    st.sampled_from(["+", "-"]),
)


@FAST
@given(formula_with_numbers)
def test_what_is_accepted_is_within_the_bounds(text):
    # limits.py: a charge at most MAX_CHARGE either sign, at most MAX_SITES donor sites, a formula of at most
    # MAX_FORMULA_CHARS characters; anything outside is one line, never a hang (numbers of 4,400 digits included)
    try:
        comp = parse_formula(text, RULES)
    except IsosieveError as exc:
        assert len(exc.line().splitlines()) == 1 and len(exc.line()) <= 600
        return
    assert len(text) <= MAX_FORMULA_CHARS
    assert abs(comp.charge) <= MAX_CHARGE
    assert sum(n * len(k.donors) for k, n in comp.parts) <= MAX_SITES


# --------------------------------------------------------------------------- job files

from enumerator.parse.job import load_job  # noqa: E402

JOB_LINES = [
    'title = "t"\n',
    'title = "a\\nb"\n',
    "title = 5\n",
    "[defaults]\n",
    "limit = 3\n",
    "limit = 0\n",
    'geometry = "OC-6"\n',
    'geometry = "XX-9"\n',
    "[[complex]]\n",
    'formula = "Ma4b2"\n',
    'formula = "[Cr(CO)6]99999999999-"\n',
    'formula = "Ma\\u0430b5"\n',
    'formula = ""\n',
    'label = "x"\n',
    'label = "x\\u0007"\n',
    "label = []\n",
    "limt = 2\n",
    "[[output]]\n",
    'format = "json"\n',
    'format = "pdf"\n',
    'file = "out.json"\n',
    'file = "job.toml"\n',
    'file = "."\n',
    'file = "../x"\n',
    'file = "/etc/passwd"\n',
    'file = "a\\u0000b"\n',
    'file = "sub/"\n',
    "a = [[[[[[[[[[]]]]]]]]]]\n",
    "= broken\n",
]


@SLOW
@given(st.lists(st.sampled_from(JOB_LINES), min_size=1, max_size=12))
def test_job_files_are_read_or_refused_in_one_line(lines):
    # a job file either reads into a Job whose outputs are safe to write, or is refused with one line
    folder = Path(tempfile.mkdtemp(prefix="isosieve-fuzz-job-"))
    try:
        job_file = folder / "job.toml"
        job_file.write_text("".join(lines), encoding="utf-8")
        try:
            job = load_job(str(job_file))
        except IsosieveError as exc:
            assert len(exc.line().splitlines()) == 1, exc.line()
            return
        assert job.title.isprintable() or not job.title
        for e in job.entries:
            assert e.label.isprintable(), e.label
        names = [Path(o.file) for o in job.outputs]
        assert len(set(names)) == len(names)
        for n in names:
            assert not n.is_absolute() and ".." not in n.parts and "\0" not in str(n) and n.name not in ("", ".")
    finally:
        shutil.rmtree(folder, ignore_errors=True)


# --------------------------------------------------------------------------- the output layer

import enumerator.cli.output as output  # noqa: E402
from enumerator.errors import InputError  # noqa: E402

NAME_PARTS = ["a.json", "b.txt", "sub/", "nofolder/x", "..", ".", "", "\0", "-", "x" * 300, "é", " ", "a/b/c.md"]


@SLOW
@given(
    st.lists(
        st.tuples(st.lists(st.sampled_from(NAME_PARTS), min_size=1, max_size=3).map("".join), st.binary(max_size=64)),
        min_size=1,
        max_size=4,
    ),
    st.booleans(),
)
def test_the_output_layer_writes_all_or_nothing(files, existing):
    # every write either puts each file in place with exactly its bytes, or raises InputError (one line) and
    # leaves every file as it was; either way no temporary file stays behind (cli/output.py, module docstring)
    folder = Path(tempfile.mkdtemp(prefix="isosieve-fuzz-out-"))
    try:
        if existing:
            (folder / "a.json").write_bytes(b"old")
        before = {p: p.read_bytes() for p in folder.rglob("*") if p.is_file()}
        targets = [(str(folder / n) if n != "-" else "-", data) for n, data in files]
        assume(all(t != "-" for t, _ in targets))
        try:
            output.write_files(targets, inputs=())
        except InputError as exc:
            assert len(exc.line().splitlines()) == 1
            after = {p: p.read_bytes() for p in folder.rglob("*") if p.is_file()}
            assert after == before
        else:
            for t, data in targets:
                assert Path(t).read_bytes() == data
        assert not [p for p in folder.rglob(f"{output.TEMP_PREFIX}*")]
    finally:
        shutil.rmtree(folder, ignore_errors=True)


# --------------------------------------------------------------------------- reporters, force fields, substitution

REPORTERS = (
    '[class.CO]\nname = "terminal carbonyl"\nbond = "C-O"\nnucleus = "13C"\nir_window_cm1 = [1850, 2125]\n'
    'window_source = "test"\n'
)
FORCEFIELDS = (
    '[class.CO]\nlabel = "terminal carbonyl"\natoms = ["C", "O"]\nk_trans_same = 16.4\nk_trans_other = 15.5\n'
    'k_no_trans = 16.0\nkc = 0.30\nkt = 0.60\nrange = [1850.0, 2125.0]\nsource = "test"\n'
)
SUBSTITUTION = (
    'name = "mine"\ntitle = "x"\nsource = "x"\ngeometries = ["SP-4"]\nlabilises = "trans"\n'
    'series = ["CN", "Cl", "NH3"]\nties = "statistical"\npriority = 30\n'
)
WRONG_VALUES = ["5", '"x"', "[]", "{}", "[1, 2, 3]", '["Cx", "O"]', "-1e308", "nan", '"\\u0007"', "true", "[[[[[]]]]]"]


def _loaders():
    from enumerator.rules.forcefields import load_forcefields
    from enumerator.rules.reporters import load_reporters
    from enumerator.rules.substitution import load_substitution_rules

    return {
        "reporters.toml": (REPORTERS, load_reporters),
        "forcefields.toml": (FORCEFIELDS, load_forcefields),
        "substitution/mine.toml": (SUBSTITUTION, load_substitution_rules),
    }


@st.composite
def broken_rule_files(draw):
    rel = draw(st.sampled_from(sorted(_loaders())))
    lines = _loaders()[rel][0].splitlines(keepends=True)
    for _ in range(draw(st.integers(1, 3))):
        k = draw(st.integers(0, len(lines) - 1))
        if "=" in lines[k]:
            key = lines[k].split("=", 1)[0]
            lines[k] = f"{key}= {draw(st.sampled_from(WRONG_VALUES))}\n"
        else:
            lines[k] = draw(st.sampled_from(["[class.CO.x]\n", "[class]\n", "class = 5\n", ""]))
    return rel, "".join(lines)


@SLOW
@given(broken_rule_files())
def test_rule_files_with_wrong_types_are_refused_in_one_line(case):
    # a rule file with a value of the wrong type is refused with one line naming the file, never an internal
    # error (DEVELOPERS.md, "Robustness": reporters.toml 'class = 5' used to end in exit status 1)
    rel, text = case
    folder = _with_rules({rel: text})
    try:
        rs = _ok_or_isosieve(load_rules, [folder])
        if rs is not None:
            _ok_or_isosieve(_loaders()[rel][1], rs)
    finally:
        shutil.rmtree(folder, ignore_errors=True)
