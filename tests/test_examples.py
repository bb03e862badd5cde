"""The checked-in examples regenerate byte for byte.

If an analysis changes on purpose, refresh them with
``isosieve job examples/<folder>/<file>.toml --write`` (and the batch
command named in examples/iron/screen.txt)."""

from __future__ import annotations

from pathlib import Path

import pytest

from enumerator.parse.job import load_job
from enumerator.render.batch import render_batch
from enumerator.render.job import job_files
from enumerator.workflow.batch import screen_file
from enumerator.workflow.job import run_job

EX = Path(__file__).resolve().parent.parent / "examples"
JOBS = sorted(EX.glob("*/*.toml"))


@pytest.mark.parametrize("path", JOBS, ids=lambda p: p.name)
def test_job_outputs_regenerate(path):
    job = load_job(str(path))
    assert job.outputs
    for file, text in job_files(run_job(job)):
        assert text.encode("utf-8") == file.read_bytes(), (
            f"{file.name} is stale: run isosieve job {path.relative_to(EX.parent)} --write"
        )


def test_batch_example_regenerates():
    result = screen_file(str(EX / "iron" / "screen.txt"))
    assert render_batch(result, "csv").encode("utf-8") == (EX / "iron" / "screen.csv").read_bytes()


def test_examples_carry_safety():
    for p in EX.glob("*/*.md"):
        assert "Safety" in p.read_text(encoding="utf-8")


def test_ru_example_counts():
    # from memory: [RuCl2(CO)2(PPh3)2] has five geometric isomers; the dppe chelate (cis-only) fewer
    job = load_job(str(EX / "ruthenium" / "ru_dicarbonyl.toml"))
    res = {c.label: c.result for c in run_job(job).complexes}
    assert res["Ru-1 (PPh3)"].isomer_set.geometric_isomers == 5
    assert (
        res["Ru-3 (dppe chelate)"].isomer_set.geometric_isomers == 3
    )  # from memory: M(AA)b2c2 has 3 geometric isomers


@pytest.mark.parametrize(
    "body, words",
    [
        ('[[complex]]\nformula = "[Co(NH3)4Cl2]+"\ngeometri = "OC-6"\n', "did you mean 'geometry'"),
        ('title = "x"\n', "missing key 'complex'"),
        ('[[complex]]\nformula = "Ma4b2"\nlimit = 0\n', "positive integer"),
        ('[[complex]]\nformula = "Ma4b2"\noptions = { pik = "cis" }\n', "unknown option 'pik'; did you mean 'pick'"),
        ('[[complex]]\nformula = "Ma4b2"\npick = "cis"\n', "options = { pick = ... }"),
        ('[defaults]\nspans = { AA = "across" }\n[[complex]]\nformula = "M(AA)b4"\n', "span 'across'"),
        ('[[complex]]\nformula = "Ma4b2"\nreporters = { a = 1 }\n', "table of strings"),
        ('[[complex]]\nformula = "Ma4b2"\n[[output]]\nformat = "pdf"\nfile = "a.pdf"\n', "format 'pdf'"),
        ('[[complex]]\nformula = "Ma4b2"\n[[output]]\nformat = "csv"\nfile = "../a.csv"\n', "relative path"),
    ],
)
def test_job_validation(tmp_path, body, words):
    from enumerator.errors import InputError

    p = tmp_path / "job.toml"
    p.write_text(body, encoding="utf-8")
    with pytest.raises(InputError) as exc:
        load_job(str(p))
    assert words in exc.value.line() and "job.toml" in exc.value.line()
