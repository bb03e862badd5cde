"""Helpers shared by the tests (tests/ is on sys.path under pytest, so ``from support.oracles import ...``).

* :mod:`support.golden` - stored command outputs (``golden/``) and how to compare with them;
* :mod:`support.oracles` - brute-force checks the algorithms are compared with;
* :mod:`support.libraries` - generated formula libraries for the batch benchmarks.
"""
