"""Helpers shared by the tests: stored command outputs (``golden/``) and how to compare with them."""
