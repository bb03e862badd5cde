"""From a request to a result: the library call behind each command.

Each module computes one kind of frozen result whose ``to_dict()`` defines
its command's JSON; :mod:`enumerator.render` turns results into text, tables,
plots and pages, and the workflow never imports it.

* :mod:`.pipeline` -- :func:`~.pipeline.run` a :class:`~enumerator.parse.request.Request`
  through every analysis stage; :func:`~.pipeline.analyse` and
  :func:`~.pipeline.iter_isomers` for notebooks (``isosieve isomers``);
* :mod:`.result` -- the :class:`~.result.Result` of one formula and its JSON shape;
* :mod:`.job` -- a job file's complexes run into a :class:`~.job.JobResult` (``isosieve job``);
* :mod:`.report` -- the :class:`~.report.Report` of a job: results, band patterns, cautions, file names
  (``isosieve report``);
* :mod:`.batch` -- many formulas screened into a :class:`~.batch.BatchResult` (``isosieve batch``);
* :mod:`.bands` -- predicted and matched bands (``isosieve bands``, ``isosieve match``);
* :mod:`.queries` -- character tables, the geometry and ligand catalogues, counts and structures
  (``chartable``, ``geometries``, ``ligands``, ``count``, ``structures``).
"""
