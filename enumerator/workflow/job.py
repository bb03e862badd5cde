"""Running a job file: every complex analysed, in file order, as one :class:`JobResult`.

A job is read and checked by :mod:`enumerator.parse.job`; :func:`run_job`
runs each entry's request through the pipeline and :func:`run_job_file` does
both in one call.  The result's ``to_dict()`` is the JSON of ``isosieve job
--format json``; :mod:`enumerator.render.job` writes its other formats and
the files its ``[[output]]`` tables ask for.

>>> from enumerator.parse.job import parse_job
>>> job = parse_job({"title": "t", "complex": [{"label": "x", "formula": "Ma5b"}]}, "job.toml")
>>> r = run_job(job)
>>> [(c.label, c.result.isomer_set.geometric_isomers) for c in r.complexes]
[('x', 1)]
>>> sorted(r.to_dict())
['complexes', 'title']
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from enumerator.errors import InputError
from enumerator.parse.job import Job, JobOutput, load_job
from enumerator.workflow.pipeline import run
from enumerator.workflow.result import Result

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["JobComplex", "JobResult", "run_job", "run_job_file"]


@dataclass(frozen=True)
class JobComplex:
    """One complex of a job: its label and its result."""

    label: str
    result: Result

    def to_dict(self) -> dict[str, Any]:
        """The complex's JSON object: ``label`` followed by the result's document."""
        return {"label": self.label, **self.result.to_dict()}


@dataclass(frozen=True)
class JobResult:
    """Every complex of a job, analysed, with the job's title, outputs and folder."""

    title: str
    complexes: tuple[JobComplex, ...]
    outputs: tuple[JobOutput, ...] = ()
    folder: str = "."

    @property
    def results(self) -> tuple[Result, ...]:
        """The results alone, in file order."""
        return tuple(c.result for c in self.complexes)

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve job --format json``: the title and one object per complex."""
        return {"title": self.title, "complexes": [c.to_dict() for c in self.complexes]}

    def to_dataframe(self, wide: bool = True) -> pd.DataFrame:
        """Every complex's isomer table stacked, a ``label`` column in front (the columns of
        :meth:`Result.to_dataframe`; a column one complex lacks is empty in its rows).

        Parameters
        ----------
        wide : bool, optional
            Keep the wide columns (the IUPAC name).

        Returns
        -------
        pandas.DataFrame
        """
        from enumerator.workflow.table import join_frames

        return join_frames((c.label, c.result.to_dataframe(wide)) for c in self.complexes)

    def __repr__(self) -> str:
        return f"<JobResult {self.title!r}: {len(self.complexes)} complex(es)>"

    def _repr_html_(self) -> str:
        """One line per complex: label, formula, geometry, isomer counts."""
        import html

        rows = "".join(
            f"<tr><td>{html.escape(c.label)}</td><td>{html.escape(c.result.composition.formula)}</td>"
            f"<td>{html.escape(c.result.geometry.symbol)}</td><td>{c.result.isomer_set.geometric_isomers}</td>"
            f"<td>{c.result.isomer_set.stereoisomers}</td></tr>"
            for c in self.complexes
        )
        return (
            f"<p><b>{html.escape(self.title)}</b></p><table><tr><th>label</th><th>formula</th><th>geometry</th>"
            f"<th>geometric isomers</th><th>stereoisomers</th></tr>{rows}</table>"
        )


def run_job(
    job: Job,
    progress: Callable[[str, int, int], None] | None = None,
    each: Callable[[Result], None] | None = None,
) -> JobResult:
    """Run every complex of a checked job.

    Parameters
    ----------
    job : Job
    progress : callable, optional
        Called as ``progress(label, done, total)`` after each complex (a progress bar).
    each : callable, optional
        Called with each complex's Result as soon as it is analysed (a report starts its 3D embeddings so).

    Returns
    -------
    JobResult

    Raises
    ------
    InputError
        A complex that cannot be analysed; the message starts with its label.
    """
    out = []
    for e in job.entries:
        try:
            out.append(JobComplex(e.label, run(e.request)))
        except InputError as exc:
            raise InputError(f"complex '{e.label}': {exc.what}", exc.fix) from None
        if each is not None:
            each(out[-1].result)
        if progress is not None:
            progress(e.label, len(out), len(job.entries))
    return JobResult(job.title, tuple(out), job.outputs, job.folder)


def run_job_file(
    path: str,
    rules: Sequence[str] = (),
    progress: Callable[[str, int, int], None] | None = None,
    each: Callable[[Result], None] | None = None,
) -> JobResult:
    """Read, check and run a job file.

    Parameters
    ----------
    path : str
        The TOML job file.
    rules : sequence of str
        Rule folders in force (``--rules DIR``).
    progress, each : callable, optional
        As for :func:`run_job`.

    Returns
    -------
    JobResult

    Raises
    ------
    InputError
        The file cannot be read or checked (:func:`enumerator.parse.job.load_job`), or a complex cannot be
        analysed.
    """
    return run_job(load_job(path, rules), progress, each)
