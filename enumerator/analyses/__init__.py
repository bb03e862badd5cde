"""Analyses of an isomer set: centre chemistry, safety, stretch species and
NMR environments, IUPAC descriptors and names.

Each analysis is computed by a stage function ``(result, request) ->
analysis | None`` listed in :data:`enumerator.workflow.pipeline.STAGES`; the
analysis is a frozen data object that knows the JSON keys it adds
(``isomer_json`` / ``top_json``) and nothing about text, which
:mod:`enumerator.render.sections` draws from it.

* :mod:`.centre`: electron counts and the default geometry;
* :mod:`.safety`: cautions for CO, CN, NO and related ligands;
* :mod:`.descriptors`: IUPAC stereodescriptors (IR-9.3), with :mod:`.cip`
  for the priorities and :mod:`.names` for additive names (IR-9.2);
* :mod:`.stretch`: stretch species, band counts, NMR environments and the
  pairs they tell apart;
* :mod:`.views`: what they read of a result and a request.
"""
