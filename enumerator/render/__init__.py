"""Renderers: each turns a frozen result of :mod:`enumerator.workflow` into text, tables, plots or a page.

They read plain data only and never compute chemistry.  One writer of each
kind serves every command: :mod:`.text` (terminal tables), :mod:`.tables`
(Markdown, CSV, LaTeX of the isomer table), :mod:`.jsonout` (a ``to_dict()``
written out), :mod:`.plots` (matplotlib figures); :mod:`.sections` and
:mod:`.typeset` draw the analyses' columns and symbols for all of them.  A
module per command puts them together: :mod:`.result` (``isomers``),
:mod:`.job`, :mod:`.report`, :mod:`.batch`, :mod:`.ligands`,
:mod:`.structures`, :mod:`.bands`, :mod:`.routes`, :mod:`.network`,
:mod:`.chartable`, :mod:`.geometries`, :mod:`.count`.
"""
