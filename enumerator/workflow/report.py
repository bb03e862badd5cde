"""What the supporting-information report shows, computed once: a frozen :class:`Report`.

For each complex a report holds its :class:`~enumerator.workflow.result.Result`,
the predicted band pattern of every reporter class on every isomer
(:func:`enumerator.vibrations.pattern.band_pattern`: an energy-factored
Cotton--Kraihanzel force field solved by Wilson's GF method), the safety
cautions of its composition (:func:`enumerator.analyses.safety.cautions`),
and the names of its table files; for the whole page the title and the
isosieve version.  :func:`build_report` builds it from results,
:func:`report_from_job` from a job file in one call, and :func:`pending_report`
from a job file with the 3D embeddings going on in worker processes while the
caller writes the tables; :mod:`enumerator.render.report` only formats it.

>>> from enumerator.workflow.pipeline import analyse
>>> rep = build_report([analyse("[Cr(CO)5(PPh3)]")], title="SI")
>>> [(s.reporter_class, s.pattern.species) for s in rep.complexes[0].spectra[0].classes]
[('CO', '2A1 + B1 + E')]
>>> rep.files
('01_Cr_CO_5_PPh3.csv', '01_Cr_CO_5_PPh3.tex')
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from enumerator.analyses.safety import cautions
from enumerator.errors import IsosieveError
from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.structures.build import embed_ahead, embedding_items
from enumerator.structures.pool import EmbedAhead
from enumerator.structures.result import StructureSet, structure_set
from enumerator.vibrations.model import reporter_classes
from enumerator.vibrations.pattern import BandPattern, band_pattern
from enumerator.workflow.job import run_job_file
from enumerator.workflow.result import Result

__all__ = [
    "ClassSpectrum",
    "IsomerSpectra",
    "PendingReport",
    "ReportComplex",
    "Report",
    "build_report",
    "pending_report",
    "report_from_job",
    "version",
]


@dataclass(frozen=True)
class ClassSpectrum:
    """The predicted bands of one reporter class on one isomer, or why they could not be predicted."""

    reporter_class: str
    pattern: BandPattern | None = None
    error: str | None = None

    def to_dict(self) -> dict[str, Any]:
        """``reporter_class`` with the pattern's JSON object, or with ``error``."""
        if self.pattern is None:
            return {"reporter_class": self.reporter_class, "error": self.error}
        return self.pattern.to_dict()


@dataclass(frozen=True)
class IsomerSpectra:
    """The spectra of one isomer, one per reporter class that has bands (sorted by class)."""

    isomer_id: str
    classes: tuple[ClassSpectrum, ...]

    def to_dict(self) -> dict[str, Any]:
        """``id`` and the list of class spectra."""
        return {"id": self.isomer_id, "spectra": [c.to_dict() for c in self.classes]}


@dataclass(frozen=True)
class ReportComplex:
    """One complex of the report: its number (from 1), result, spectra per isomer, cautions, file stem, the
    label the job file gives it, and the 3D starting structures the drawings are made from (None for a
    letter formula, whose drawing is the ideal polyhedron)."""

    number: int
    result: Result
    spectra: tuple[IsomerSpectra, ...]
    cautions: tuple[str, ...]
    stem: str
    label: str = ""
    structures: StructureSet | None = None

    @property
    def files(self) -> tuple[str, str]:
        """The names of its CSV and LaTeX table files."""
        return f"{self.stem}.csv", f"{self.stem}.tex"

    def to_dict(self) -> dict[str, Any]:
        """The complex's number, files, cautions, spectra and result document."""
        return {
            "number": self.number,
            "label": self.label,
            "files": list(self.files),
            "cautions": list(self.cautions),
            "spectra": [s.to_dict() for s in self.spectra],
            "result": self.result.to_dict(),
        }


@dataclass(frozen=True)
class Report:
    """Everything the report page and its table files show."""

    title: str
    complexes: tuple[ReportComplex, ...]
    version: str

    @property
    def files(self) -> tuple[str, ...]:
        """The table files beside the page, complex by complex (CSV, then LaTeX)."""
        return tuple(f for c in self.complexes for f in c.files)

    def to_dict(self) -> dict[str, Any]:
        """Title, version, files and one object per complex."""
        return {
            "title": self.title,
            "version": self.version,
            "files": list(self.files),
            "complexes": [c.to_dict() for c in self.complexes],
        }


def version() -> str:
    """The installed isosieve version, or '(development)' when the package is not installed.

    Returns
    -------
    str
    """
    from importlib.metadata import PackageNotFoundError
    from importlib.metadata import version as installed

    try:
        return installed("isosieve")
    except PackageNotFoundError:  # pragma: no cover - running from a source tree
        return "(development)"


def _stem(number: int, formula: str) -> str:
    slug = re.sub(r"[^A-Za-z0-9]+", "_", formula).strip("_") or "complex"
    return f"{number:02d}_{slug}"


def _spectra(iso: Isomer, rules: RuleSet | None, comp: Composition | None = None) -> IsomerSpectra:
    out = []
    for cls in reporter_classes(iso):
        try:
            pattern = band_pattern(iso, cls, rules=rules, composition=comp)
        except IsosieveError as exc:
            out.append(ClassSpectrum(cls, error=exc.line()))
            continue
        if pattern.bands:
            out.append(ClassSpectrum(cls, pattern))
    return IsomerSpectra(iso.id, tuple(out))


#: Progress callback: (what is being done, steps done, steps in all).
Progress = Callable[[str, int, int], None]


def _structures(res: Result, ahead: EmbedAhead) -> StructureSet | None:
    """The 3D starting structures of a real formula's isomers (None for letters)."""
    if res.composition.metal == "M":
        return None
    return structure_set(res, ahead=ahead)


def _complexes(
    items: Sequence[tuple[str, Result]], rules: RuleSet | None, progress: Progress | None
) -> tuple[ReportComplex, ...]:
    """Every complex's part of the report but its 3D structures."""
    out = []
    for n, (label, res) in enumerate(items, 1):
        spectra = tuple(_spectra(i, rules, res.composition) for i in res.isomers)
        out.append(
            ReportComplex(n, res, spectra, tuple(cautions(res.composition)), _stem(n, res.composition.formula), label)
        )
        if progress is not None:
            progress(res.composition.formula, n, len(items))
    return tuple(out)


def _with_structures(head: Report, ahead: EmbedAhead, progress: Progress | None = None) -> Report:
    """The report with every real formula's 3D structures (waits for the embeddings worked out ahead); the
    progress callback hears of each complex as its structures come in."""
    out = []
    for c in head.complexes:
        out.append(replace(c, structures=_structures(c.result, ahead)))
        if progress is not None:
            progress(f"3D structures of {c.result.composition.formula}", c.number, len(head.complexes))
    return replace(head, complexes=tuple(out))


def build_report(
    results: Iterable[Result | tuple[str, Result]],
    *,
    title: str = "isosieve report",
    rules: RuleSet | None = None,
    progress: Progress | None = None,
) -> Report:
    """The report of the given results: band patterns, 3D structures, cautions and file names computed here.

    Parameters
    ----------
    results : iterable of Result or (label, Result)
        One per complex, in the order shown.
    title : str
        The page title.
    rules : RuleSet, optional
        The rules in force, for the force constants (default: the built-in rules).
    progress : callable, optional
        Called as ``progress(what, done, total)`` after each complex (a progress bar).

    Returns
    -------
    Report
    """
    items = [r if isinstance(r, tuple) else ("", r) for r in results]
    # every complex's embeddings at once, in worker processes when that pays (structures/pool.py)
    with embed_ahead(res for _, res in items) as ahead:
        head = Report(title, _complexes(items, rules, progress), version())
        return _with_structures(head, ahead, progress)


@dataclass(frozen=True)
class PendingReport:
    """A report whose 3D structures are still being embedded (:func:`pending_report`).

    ``head`` is the whole report but the structures (every complex's ``structures`` is None): enough for the
    table files, which show no structure.  :meth:`finish` waits for the embeddings and gives the whole report,
    telling ``progress`` (if any) of each complex as its structures come in.
    """

    head: Report
    ahead: EmbedAhead
    progress: Progress | None = None

    def finish(self) -> Report:
        """The whole report, with the 3D structures (waits for them).

        Returns
        -------
        Report
        """
        return _with_structures(self.head, self.ahead, self.progress)


@contextmanager
def pending_report(
    path: str, rules: Sequence[str] = (), title: str | None = None, progress: Progress | None = None
) -> Iterator[PendingReport]:
    """Run a job file and start its report's 3D embeddings in worker processes: the embeddings of each
    complex start as soon as it is analysed, and go on while the caller writes the tables from ``head``.

    The report is the one :func:`report_from_job` gives (it is this, finished at once).

    Parameters
    ----------
    path, rules, title, progress
        As for :func:`report_from_job`.

    Yields
    ------
    PendingReport
        Valid inside the ``with`` block only (leaving it stops the workers).

    Raises
    ------
    InputError
        The job file cannot be read or checked, or a complex cannot be analysed.
    """
    with EmbedAhead() as ahead:
        job = run_job_file(path, rules, progress, each=lambda res: ahead.add(embedding_items([res])))
        items = [(c.label, c.result) for c in job.complexes]
        head = Report(
            title or job.title or Path(path).stem, _complexes(items, load_rules(tuple(rules)), progress), version()
        )
        yield PendingReport(head, ahead, progress)


def report_from_job(
    path: str, rules: Sequence[str] = (), title: str | None = None, progress: Progress | None = None
) -> Report:
    """Read, check and run a job file and build its report.

    Parameters
    ----------
    path : str
        The TOML job file (:mod:`enumerator.parse.job`).
    rules : sequence of str
        Rule folders in force (``--rules DIR``).
    title : str, optional
        The page title (default: the job file's title, else its name).
    progress : callable, optional
        As for :func:`build_report`; called for the analyses of the complexes, then for their report parts.

    Returns
    -------
    Report

    Raises
    ------
    InputError
        The job file cannot be read or checked, or a complex cannot be analysed.
    """
    with pending_report(path, rules, title, progress) as pending:
        return pending.finish()
