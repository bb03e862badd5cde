"""Job files: several complexes with their options in one TOML file.

::

    title = "Ru(II) dicarbonyl isomers"

    [defaults]                 # optional, applies to every complex
    geometry = "OC-6"

    [[complex]]
    label = "Ru-PPh3"
    formula = "[RuCl2(CO)2(PPh3)2]"
    # geometry = "OC-6"        spans = { dppe = "edge" }
    # arrangements = { dien = "fac" }   reporters = { a = "CO" }
    # limit = 100              options = { name = "value" }

    [[output]]                 # optional: files written by `isosieve job FILE --write`
    format = "markdown"        # table, markdown, csv, latex or json
    file = "ru.md"             # relative to the job file's folder

Everything is validated before anything runs; messages name the file, the
entry and the key.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from enumerator.errors import InputError
from enumerator.workflow.pipeline import Request, run
from enumerator.workflow.result import Result

__all__ = ["Job", "JobEntry", "load_job", "parse_job", "run_job", "render_job", "FORMATS"]

FORMATS = ("table", "markdown", "csv", "latex", "json")
_ENTRY_KEYS = ("formula", "label", "geometry", "spans", "arrangements", "reporters", "limit", "options")


@dataclass(frozen=True)
class JobEntry:
    label: str
    request: Request


@dataclass(frozen=True)
class Job:
    title: str
    entries: tuple[JobEntry, ...]
    outputs: tuple[tuple[str, str], ...] = ()  # (format, file relative to folder)
    folder: str = "."


def _bad(where: str, what: str, fix: str) -> InputError:
    return InputError(f"{where}: {what}", fix)


def _keys(table: dict, where: str, allowed: Sequence[str], required: Sequence[str] = ()) -> None:
    from enumerator.rules.ruleset import closest_names

    for k in required:
        if k not in table:
            raise _bad(where, f"missing key '{k}'", f"add {k} = ...")
    for k in table:
        if k not in allowed:
            near = closest_names(k, allowed)
            raise _bad(
                where, f"unknown key '{k}'", f"did you mean '{near[0]}'?" if near else f"allowed: {', '.join(allowed)}"
            )


def _pairs(value: Any, where: str, key: str, example: str) -> tuple[tuple[str, str], ...]:
    if not isinstance(value, dict) or not all(isinstance(v, str) for v in value.values()):
        raise _bad(where, f"'{key}' must be a table of strings", f"write {key} = {example}")
    return tuple((str(k), v) for k, v in value.items())


def parse_job(data: dict[str, Any], where: str, rules: tuple[str, ...] = (), folder: str = ".") -> Job:
    """A validated :class:`Job` from parsed TOML."""
    _keys(data, where, ("title", "defaults", "complex", "output"), ("complex",))
    title = data.get("title", "")
    if not isinstance(title, str):
        raise _bad(where, "'title' must be a string", 'write title = "..."')
    defaults = data.get("defaults", {})
    if not isinstance(defaults, dict):
        raise _bad(where, "'defaults' must be a table", "write [defaults]")
    _keys(defaults, f"{where} [defaults]", [k for k in _ENTRY_KEYS if k not in ("formula", "label")])
    cx = data["complex"]
    if not isinstance(cx, list) or not cx:
        raise _bad(where, "'complex' must list at least one [[complex]]", "add [[complex]] with formula = ...")
    entries = []
    labels: set[str] = set()
    for k, raw in enumerate(cx, start=1):
        w = f"{where} [[complex]] #{k}"
        if not isinstance(raw, dict):
            raise _bad(w, "not a table", "write [[complex]] entries")
        e = {**defaults, **raw}
        _keys(e, w, _ENTRY_KEYS, ("formula",))
        formula = e["formula"]
        if not isinstance(formula, str) or not formula.strip():
            raise _bad(w, "'formula' must be a non-empty string", 'write formula = "[RuCl2(CO)2(PPh3)2]"')
        label = e.get("label", formula)
        if not isinstance(label, str) or not label.strip():
            raise _bad(w, "'label' must be a non-empty string", 'write label = "1"')
        if label in labels:
            raise _bad(w, f"label '{label}' is used twice", "give each complex its own label")
        labels.add(label)
        geometry = e.get("geometry")
        if geometry is not None and not isinstance(geometry, str):
            raise _bad(w, "'geometry' must be a string", 'write geometry = "OC-6"')
        limit = e.get("limit")
        if limit is not None and (not isinstance(limit, int) or isinstance(limit, bool) or limit < 1):
            raise _bad(w, "'limit' must be a positive integer", "write limit = 100")
        req = Request(
            formula=formula.strip(),
            geometry=geometry,
            spans=_pairs(e.get("spans", {}), w, "spans", '{ dppe = "edge" }'),
            arrangements=_pairs(e.get("arrangements", {}), w, "arrangements", '{ dien = "fac" }'),
            reporters=_pairs(e.get("reporters", {}), w, "reporters", '{ a = "CO" }'),
            limit=limit,
            rules=tuple(rules),
            options=_pairs(e.get("options", {}), w, "options", '{ name = "value" }'),
        )
        entries.append(JobEntry(label.strip(), req))
    outs = []
    raw_out = data.get("output", [])
    if not isinstance(raw_out, list):
        raise _bad(where, "'output' must be a list of [[output]] tables", "write [[output]] with format and file")
    for k, o in enumerate(raw_out, start=1):
        w = f"{where} [[output]] #{k}"
        if not isinstance(o, dict):
            raise _bad(w, "not a table", "write [[output]] entries")
        _keys(o, w, ("format", "file"), ("format", "file"))
        if o["format"] not in FORMATS:
            raise _bad(w, f"format {o['format']!r} is not one of {', '.join(FORMATS)}", 'write format = "markdown"')
        f = o["file"]
        if not isinstance(f, str) or not f.strip() or Path(f).is_absolute() or ".." in Path(f).parts:
            raise _bad(w, f"file {f!r} must be a relative path inside the job's folder", 'write file = "table.md"')
        outs.append((o["format"], f))
    return Job(title, tuple(entries), tuple(outs), folder)


def load_job(path: str, rules: tuple[str, ...] = ()) -> Job:
    """Read and validate a job file (TOML)."""
    import tomllib

    try:
        with open(path, "rb") as fh:
            data = tomllib.load(fh)
    except OSError as exc:
        raise InputError(f"cannot read job file '{path}' ({exc.strerror})", "check the path") from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"job file '{path}': TOML syntax error ({exc})", "fix the file at that line") from None
    return parse_job(data, str(path), rules, str(Path(path).parent))


def run_job(job: Job) -> list[tuple[JobEntry, Result]]:
    """Run every complex; an error names the complex's label."""
    out = []
    for e in job.entries:
        try:
            out.append((e, run(e.request)))
        except InputError as exc:
            raise InputError(f"complex '{e.label}': {exc.what}", exc.fix) from None
    return out


def render_job(job: Job, results: Sequence[tuple[JobEntry, Result]], fmt: str) -> str:
    """All results in one document of the given format."""
    from enumerator.render import tables

    if fmt == "json":
        from enumerator.render.jsonout import dumps, result_to_dict

        return dumps({"title": job.title, "complexes": [{"label": e.label, **result_to_dict(r)} for e, r in results]})
    if fmt == "table":
        from enumerator.render.text import render

        parts = [job.title, "=" * len(job.title), ""] if job.title else []
        for e, r in results:
            parts += [f"== {e.label} ==", render(r)]
        return "\n".join(parts)
    if fmt == "markdown":
        parts = [f"# {job.title}", ""] if job.title else []
        for e, r in results:
            parts += [f"## {e.label}", "", tables.markdown(r)]
        return "\n".join(parts)
    if fmt == "latex":
        parts = [f"% {job.title}"] if job.title else []
        parts.append("% generated by isosieve; requires \\usepackage{booktabs}")
        for e, r in results:
            parts += ["", f"% {e.label}", tables.latex(r).replace("% requires \\usepackage{booktabs}\n", "")]
        return "\n".join(parts)
    if fmt == "csv":
        header: list[str] = ["label"]
        recs: list[dict[str, str]] = []
        cautions: list[str] = []
        for e, r in results:
            h, rows = tables.csv_records(r)
            for col in h:
                if col not in header:
                    header.append(col)
            recs += [{"label": e.label, **dict(zip(h, row))} for row in rows]
            for a in r.analyses:
                for line in a.top_json().get("safety", []):
                    if line not in cautions:
                        cautions.append(line)
        return tables.write_csv(header, [[d.get(c, "") for c in header] for d in recs], cautions)
    raise InputError(f"format '{fmt}' is not one of {', '.join(FORMATS)}", "use --format markdown")
