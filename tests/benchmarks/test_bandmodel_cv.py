"""Leave-one-complex-out validation of the additive band model against the generic constants.

Run on request (it refits the model once per complex, a few minutes on two cores)::

    python3 -m pytest tests/benchmarks/test_bandmodel_cv.py --benchmark-only -s

It prints, per band category, the number of cross-validated bands, the MAE and the maximum error (cm-1) of
the additive model (parameters refitted without the held-out complex; parameters only it touches reset), of
the generic constants of rules/forcefields.toml, with the same order-keeping assignment, and of the additive
model in-sample (fitted to every complex: the gap to the cross-validated figure shows how much is
overfitting); the goals on complexes outside the fit are MAE <= 12 (neutral carbonyls), 20 (charged
carbonyls), 15 (cyanides), 25 (nitrosyls).
The same figures are written in the header of rules/bandmodel.toml by python -m enumerator.vibrations.calibrate.
Not a timed test: it records the figures as extra_info and runs once.
"""

from __future__ import annotations

import pytest

pytest.importorskip("pytest_benchmark")

from enumerator.vibrations.calibrate import (
    CATEGORIES,
    Problem,
    cross_validate,
    figures,
    fit,
    in_sample,
    resolved_dataset,
)

GOALS = {"CO neutral": 12.0, "CO charged": 20.0, "CN": 15.0, "NO linear": 25.0, "NO bent": 25.0}


def _table(figs, ins) -> str:
    lines = [
        f"{'category':<12}{'n':>5}{'MAE':>8}{'max':>8}   | generic {'MAE':>7}{'max':>8}   "
        f"| in-sample {'MAE':>5}{'max':>7}   goal (cross-validated MAE)"
    ]
    for cat in CATEGORIES:
        a, g, i = figs["additive"][cat], figs["generic"][cat], ins[cat]
        if not a.get("n"):
            lines.append(f"{cat:<12}{0:>5}   no measured bands in the fit")
            continue
        goal = GOALS.get(cat)
        verdict = "" if goal is None else (f"<= {goal:g}: " + ("met" if a["mae"] <= goal else "NOT met"))
        if a["n"] < 5:
            verdict += " (too few bands to judge)"
        lines.append(
            f"{cat:<12}{a['n']:>5}{a['mae']:>8}{a['max']:>8}   |         {g['mae']:>7}{g['max']:>8}   "
            f"|           {i['mae']:>5}{i['max']:>7}   {verdict}"
        )
    return "\n".join(lines)


def test_bandmodel_loco(benchmark):
    samples, _ = resolved_dataset()
    problem = Problem([s for s in samples if s.row.fit])
    p = fit(problem)

    def run():
        return figures(cross_validate(problem, p))

    figs = benchmark.pedantic(run, rounds=1, iterations=1)
    ins = in_sample(problem, p)
    print("\n" + _table(figs, ins))
    benchmark.extra_info["figures"] = figs
    benchmark.extra_info["in_sample"] = ins
    assert figs["additive"]["CO neutral"]["n"] > 0
