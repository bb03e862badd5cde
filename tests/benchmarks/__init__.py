"""Benchmarks (figures, not pass/fail), run only on request; see conftest.py."""
