"""Shared fixtures for the test suite."""

from __future__ import annotations

import pytest

from enumerator.rules.ruleset import load_rules


@pytest.fixture(scope="session")
def rules():
    return load_rules()
