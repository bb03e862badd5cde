"""The library in a notebook: every result has to_dict() and to_dataframe(), a short repr and a compact
HTML view; plots come back as Figures and leave the backend alone."""

from __future__ import annotations

import pytest

from enumerator import analyse
from enumerator.routes.planner import RoutePlan, plan_routes
from enumerator.workflow.bands import BandsResult, MatchReport, match_spectrum, predict_spectra
from enumerator.workflow.batch import BatchResult, run_batch
from enumerator.workflow.job import JobResult, run_job
from enumerator.workflow.pipeline import Request
from enumerator.workflow.result import Result


@pytest.fixture(scope="module")
def results():
    from enumerator.parse.job import parse_job

    job = parse_job({"title": "t", "complex": [{"formula": "Ma4b2", "reporters": {"a": "CO"}}]}, "job.toml")
    return {
        "result": analyse("[RuCl2(CO)2(PPh3)2]"),
        "bands": predict_spectra(Request("[Cr(CO)5(PPh3)]")),
        "match": match_spectrum(Request("Ma4b2", reporters=(("a", "CO"),)), [1950.0]),
        "route": plan_routes("[PtCl4]2-", "cis-[PtCl2(NH3)2]"),
        "job": run_job(job),
        "batch": run_batch(["Ma5b", "[RuCl2(CO)2(PPh3)2]", "Mzz("]),
    }


@pytest.mark.parametrize("cls", [Result, BandsResult, MatchReport, RoutePlan, JobResult, BatchResult])
def test_one_naming_across_results(cls):
    for method in ("to_dict", "to_dataframe", "_repr_html_", "__repr__"):
        assert callable(getattr(cls, method)), (cls.__name__, method)


@pytest.mark.parametrize("name", ["result", "bands", "match", "route", "job", "batch"])
def test_short_repr_and_compact_html(results, name):
    r = results[name]
    assert len(repr(r)) < 120, repr(r)
    page = r._repr_html_()
    assert page.count("<table") == 1 and "<script" not in page and len(page) < 20_000


def test_tables_from_one_call(results):
    df = results["result"].to_dataframe()
    assert len(df) == 6 and "CO IR" in df  # 6 stereoisomers of [RuCl2(CO)2(PPh3)2] (from memory)
    bands = results["bands"].to_dataframe()
    # [Cr(CO)5L] (C4v): CO stretches 2A1 + B1 + E, three IR-active (Cotton, Chemical Applications of Group Theory,
    # 3rd ed., ch. 10; from memory)
    assert sorted(bands["species"]) == ["A1", "A1", "B1", "E"] and bands["IR"].sum() == 3
    match = results["match"].to_dataframe()
    # one band at 1950: trans-Ma4b2 (D4h, one IR band, Eu) ranks first (Cotton, ch. 10; from memory)
    assert match.loc[0, "point group"] == "D4h" and list(match["rank"]) == [1, 2]
    assert match["probability"].sum() == pytest.approx(1.0, abs=1e-3)  # equal priors, shares of the evidence
    route = results["route"].to_dataframe()
    # cis-[PtCl2(NH3)2] from [PtCl4]2- and two NH3 by the trans effect (Housecroft & Sharpe, 4th ed., ch. 26)
    assert route.loc[0, "reaches target"] and route.loc[0, "steps"] == 2
    job = results["job"].to_dataframe()
    assert list(job.columns[:3]) == ["label", "formula", "geometry"] and len(job) == 2


def test_result_frame_is_what_the_csv_writes(results, tmp_path):
    import pandas as pd

    from enumerator.render.tables import csv

    res = results["result"]
    p = tmp_path / "ru.csv"
    p.write_text(csv(res), encoding="utf-8")
    back = pd.read_csv(p, dtype=str, keep_default_na=False)
    df = res.to_dataframe().astype(str).replace({"None": ""})
    assert back.values.tolist() == df.values.tolist()


def test_batch_frame_has_a_row_per_input_row(results):
    df = results["batch"].to_dataframe()
    # Ma5b: one isomer on OC-6; [RuCl2(CO)2(PPh3)2]: 5 geometric isomers (from memory); 'Mzz(' is refused in its row
    assert list(df["formula"]) == ["Ma5b", "[RuCl2(CO)2(PPh3)2]", "Mzz("]
    assert list(df["geometric_isomers"][:2]) == [1, 5] and bool(df["error"][2])
