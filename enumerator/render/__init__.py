"""Renderers: each turns a :class:`~enumerator.workflow.result.Result` into text.

They read plain data only and never compute chemistry.
"""
