"""Text sections drawn from each analysis.

The analyses of a :class:`~enumerator.workflow.result.Result` are data; this
module turns each kind into titled text blocks (terminal, Markdown):
:func:`sections` dispatches on the analysis type
(:func:`functools.singledispatch`); an analysis with no renderer registered
adds nothing, and a new stage registers its own with
``@sections.register(MyAnalysis)``.  :func:`result_sections` collects them
over a result in stage order.  The isomer-table columns are not drawn here:
every table comes from the result's DataFrame
(:mod:`enumerator.workflow.table`).

>>> from enumerator.workflow.pipeline import analyse
>>> r = analyse("Ma3b3", geometry="OC-6", reporters=(("a", "CO"),))
>>> [s.title for s in result_sections(r)][:2]
['Safety', 'Descriptors']
"""

from __future__ import annotations

from functools import singledispatch

from enumerator.analyses.centre import CentreAnalysis
from enumerator.analyses.descriptors import DescriptorAnalysis
from enumerator.analyses.safety import SafetyAnalysis
from enumerator.analyses.stretch import MAX_LISTED_PAIRS, StretchAnalysis
from enumerator.frozen import frozen_dataclass
from enumerator.workflow.result import Result

__all__ = [
    "Section",
    "sections",
    "result_sections",
    "safety_lines",
    "pair_matrix_text",
    "pair_tally_text",
]


@frozen_dataclass
class Section:
    """A titled block of text shown after the isomer table."""

    title: str
    text: str


@singledispatch
def sections(analysis: object) -> tuple[Section, ...]:
    """The text sections of one analysis (none unless a renderer is registered for its type).

    Parameters
    ----------
    analysis : object
        One entry of ``Result.analyses``.

    Returns
    -------
    tuple of Section
    """
    return ()


def result_sections(res: Result) -> list[Section]:
    """Every analysis's sections in stage order.

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    list of Section
    """
    return [s for a in res.analyses for s in sections(a)]


def safety_lines(res: Result) -> tuple[str, ...]:
    """The safety cautions the pipeline attached to a result (empty when none apply).

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    tuple of str
    """
    a = res.analysis(SafetyAnalysis)
    return a.lines if a is not None else ()


# ---------------------------------------------------------------- safety


@sections.register(SafetyAnalysis)
def safety_sections(a: SafetyAnalysis) -> tuple[Section, ...]:
    """One "Safety" section: the cautions as a bulleted list.

    Parameters
    ----------
    a : SafetyAnalysis

    Returns
    -------
    tuple of Section
    """
    return (Section("Safety", "\n".join(f"- {line}" for line in a.lines)),)


# ---------------------------------------------------------------- centre


def _count_lines(a: CentreAnalysis) -> list[str]:
    c = a.count
    cov = " + ".join([f"{c.metal} {c.group}"] + [f"{name} {n}×{ec}" for name, n, _, ec, _, _ in c.ligands])
    if c.charge:
        cov += f" - charge ({c.charge:+d})"
    ion = " + ".join([f"d{c.d_electrons}"] + [f"{name} {n}×{ei}" for name, n, _, _, ei, _ in c.ligands])
    comment = f" ({a.check.comment})" if a.check and a.check.comment else ""
    return [
        f"covalent count: {cov} = {c.valence_electrons}",
        f"ionic count:    {ion} = {c.valence_electrons_ionic}",
        f"valence electrons: {c.valence_electrons}{comment}",
    ] + [f"warning: {w}" for w in a.warnings]


@sections.register(CentreAnalysis)
def centre_sections(a: CentreAnalysis) -> tuple[Section, ...]:
    """One "Metal centre" section: the label, both electron counts worked out, a departure from the
    electron-count rules on its own ``warning:`` line, nitrosyl binding, notes.

    Parameters
    ----------
    a : CentreAnalysis

    Returns
    -------
    tuple of Section
    """
    c = a.count
    lines = [f"{c.label}" + (f", {c.enemark_feltham} (Enemark–Feltham)" if c.enemark_feltham else "")]
    if c.valence_electrons is not None and c.group is not None:
        lines += _count_lines(a)
    for name, _, b in c.nitrosyls:
        lines.append(f"{name}: {b} M-N-O, counted as {'NO+ (3-electron)' if b == 'linear' else 'NO- (1-electron)'}")
    lines += [f"note: {n}" for n in a.notes]
    return (Section("Metal centre", "\n".join(lines)),)


# ---------------------------------------------------------------- descriptors


@sections.register(DescriptorAnalysis)
def descriptor_sections(a: DescriptorAnalysis) -> tuple[Section, ...]:
    """ "Descriptors" (the basis, shared descriptors, chiral isomers without a symbol) and "IUPAC names".

    Parameters
    ----------
    a : DescriptorAnalysis

    Returns
    -------
    tuple of Section
    """
    lines = []
    if a.error:
        lines.append(f"not assigned: {a.error}")
    else:
        lines.append(
            f"IUPAC 2005 IR-9.3; priority numbers from {a.basis}" + ("; priming convention applied" if a.primed else "")
        )
    for desc, ids in a.shared:
        lines.append(f"{desc} is shared by isomers {', '.join(ids)}: the configuration index does not tell them apart")
    if a.no_symbol:
        lines.append(
            f"isomers {', '.join(a.no_symbol)} are chiral, but neither C/A nor the skew-lines convention decides a "
            "symbol for them: tell the enantiomers apart by isomer id"
        )
    out = [Section("Descriptors", "\n".join(lines))]
    if a.names:
        width = max(len(k) for k, _ in a.names)
        out.append(
            Section(
                "IUPAC names (IR-9.2, descriptor of IR-9.3 in front)",
                "\n".join(f"{k:<{width}}  {v}" for k, v in a.names),
            )
        )
    elif a.name_note:
        out.append(Section("IUPAC names", f"not given: {a.name_note}"))
    return tuple(out)


# ---------------------------------------------------------------- stretch modes and pairs

#: Above this many isomers the pair matrix gives way to the tally.
MATRIX_MAX = 24
#: At most this many isomers are listed in the axes section.
AXES_MAX = 40
_LEGEND_CODES = (
    "IR = IR band counts differ; IRp = IR told apart by the band pattern (positions and intensities predicted "
    "by the band model differ beyond its uncertainty; idealised bond-dipole intensities), not by counts; "
    "Ra = Raman counts; NMR = NMR signal counts; cost order IR < IRp < Raman < NMR"
)
_LEGEND_TAIL = (
    "-- = told apart by none of these; en = enantiomers (same by IR, Raman and NMR in achiral media: use CD or X-ray)"
)
_WEAK_NOTE = (
    "IR counts bands symmetry allows; '(n predicted weak)': n of them have zero bond-dipole intensity (trans "
    "oscillators in phase), expect them weak or absent; IR counts that differ only by such bands are not used "
    "to tell a pair apart"
)


@sections.register(StretchAnalysis)
def stretch_sections(a: StretchAnalysis) -> tuple[Section, ...]:
    """The axes behind the Mulliken labels, the pair matrix (or tally) with its IR pattern tier, and the
    spectroscopy notes.

    Parameters
    ----------
    a : StretchAnalysis

    Returns
    -------
    tuple of Section
    """
    lines = [f"{i} ({a.groups[k]}): {a.axes[k]}" for k, i in enumerate(a.ids[:AXES_MAX])]
    if len(a.ids) > AXES_MAX:
        lines.append(f"... {len(a.ids) - AXES_MAX} more in --json ('axes')")
    out = [
        Section("Axes behind the Mulliken labels (rule in the README)", "\n".join(lines)),
        Section(
            "Which isomer pairs IR, Raman or NMR tell apart (band / signal counts, IR band patterns)",
            pair_matrix_text(a),
        ),
    ]
    notes = []
    flux = a.fluxional_note()
    if flux:
        notes.append(flux)
    if any(m.ir_weak for ms in a.modes for m in ms):
        notes.append(_WEAK_NOTE)
    for c in a.info:
        notes.append(f"{c.key}: typical {c.bond} stretch {c.window[0]:g}-{c.window[1]:g} cm-1 ({c.source})")
    if notes:
        out.append(Section("Spectroscopy notes", "\n".join(notes)))
    return tuple(out)


def pair_tally_text(a: StretchAnalysis) -> str:
    """How many pairs each technique tells apart first, with the legend (for many isomers).

    Parameters
    ----------
    a : StretchAnalysis

    Returns
    -------
    str
    """
    n = len(a.ids)
    tally = a.pair_tally()
    total = n * (n - 1) // 2
    where = "list in --json 'pairs'" if total <= MAX_LISTED_PAIRS else "per-isomer numbers in --json 'pair_signatures'"
    body = f"{n} isomers, {total} pairs ({where}): " + ", ".join(f"{k} {v}" for k, v in sorted(tally.items()))
    legend = "first verdict that tells the pair apart (cost order IR < IR (pattern) < Raman < NMR); " + _LEGEND_TAIL
    return "\n".join([body, legend, a.pattern_status()])


def pair_matrix_text(a: StretchAnalysis) -> str:
    """The isomer-by-isomer matrix of the cheapest technique that tells each pair apart, its legend and the
    pairs no count tells apart; the tally (:func:`pair_tally_text`) above :data:`MATRIX_MAX` isomers.

    Parameters
    ----------
    a : StretchAnalysis

    Returns
    -------
    str
    """
    n = len(a.ids)
    if n > MATRIX_MAX:
        return pair_tally_text(a)
    if n < 2:
        return "only one isomer: nothing to tell apart"
    pairs = a.pairs()
    cell: dict[tuple[str, str], str] = {}
    for p in pairs:
        cell[(p.a, p.b)] = cell[(p.b, p.a)] = p.code
    legend = "cell = cheapest verdict: " + _LEGEND_CODES + "; " + _LEGEND_TAIL
    w = max(3, max(len(i) for i in a.ids))
    rows = [" " * w + " " + " ".join(i.rjust(w) for i in a.ids)]
    for x in a.ids:
        rows.append(x.rjust(w) + " " + " ".join(("." if x == y else cell[(x, y)]).rjust(w) for y in a.ids))
    tail = []
    same = [(p.a, p.b) for p in pairs if p.cheapest is None and p.note != "enantiomers"]
    if same:
        shown = ", ".join(f"{x}/{y}" for x, y in same[:12]) + (" ..." if len(same) > 12 else "")
        tail.append(f"told apart by none of these: {shown}")
    weak_only = [(p.a, p.b) for p in pairs if p.ir and not p.ir_dipole and p.note != "enantiomers"]
    if weak_only:
        shown = ", ".join(f"{x}/{y}" for x, y in weak_only[:12]) + (" ..." if len(weak_only) > 12 else "")
        tail.append(f"IR counts differ only by bands predicted weak: {shown}")
    tail.append(a.pattern_status())
    return "\n".join(["\n".join(rows), legend] + tail)
