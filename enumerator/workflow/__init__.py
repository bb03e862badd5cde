"""Orchestration: the pipeline from request to result, batch screening and job files."""
