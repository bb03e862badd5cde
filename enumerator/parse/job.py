"""Job files: several complexes with their options in one TOML file, read and checked.

::

    title = "Ru(II) dicarbonyl isomers"

    [defaults]                 # optional, applies to every complex
    geometry = "OC-6"

    [[complex]]
    label = "Ru-PPh3"
    formula = "[RuCl2(CO)2(PPh3)2]"
    # geometry = "OC-6"        spans = { dppe = "edge" }
    # arrangements = { dien = "fac" }   reporters = { a = "CO" }
    # limit = 100              options = { pick = "cis" }

    [[output]]                 # optional: files written by `isosieve job FILE --write`
    format = "markdown"        # table, markdown, csv, latex or json
    file = "ru.md"             # relative to the job file's folder

The keys of ``[[complex]]`` and ``[defaults]`` are the request options of
:data:`enumerator.parse.request.OPTIONS` (the ones a job file gives directly)
plus ``formula``, ``label`` and ``options``, a table of the options read by
an analysis stage (``pick``).  Every key and every option is checked before
anything runs: an unknown one gets the nearest names, and every message names
the file, the entry and the key.  :func:`load_job` reads a file,
:func:`parse_job` checks data already read; running a job is
:func:`enumerator.workflow.job.run_job`.

>>> job = parse_job({"complex": [{"formula": "Ma4b2", "options": {"pick": "cis"}}]}, "job.toml")
>>> job.entries[0].label, job.entries[0].request.pick
('Ma4b2', 'cis')
>>> parse_job({"complex": [{"formula": "Ma4b2", "options": {"pik": "cis"}}]}, "job.toml")
Traceback (most recent call last):
...
enumerator.errors.InputError: job.toml [[complex]] #1: unknown option 'pik'; did you mean 'pick'?
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from enumerator.errors import InputError
from enumerator.parse.request import Request, check_option, option_names, unknown_option
from enumerator.parse.text import check_label_text
from enumerator.rules.checks import read_toml
from enumerator.rules.ruleset import closest_names

__all__ = ["FORMATS", "Job", "JobEntry", "JobOutput", "load_job", "parse_job", "ENTRY_KEYS"]

#: Formats a job's ``[[output]]`` (and ``isosieve job --format``) may ask for.
FORMATS = ("table", "markdown", "csv", "latex", "json")
#: Keys of a ``[[complex]]`` entry; ``[defaults]`` takes the same but ``formula`` and ``label``.
ENTRY_KEYS = ("formula", "label", *option_names("entry"), "options")


@dataclass(frozen=True)
class JobEntry:
    """One ``[[complex]]``: its label (the formula when none is given) and its checked request."""

    label: str
    request: Request


@dataclass(frozen=True)
class JobOutput:
    """One ``[[output]]``: a format of :data:`FORMATS` and a file relative to the job's folder."""

    format: str
    file: str


@dataclass(frozen=True)
class Job:
    """A checked job file: title, complexes in file order, outputs, and the folder outputs are relative to."""

    title: str
    entries: tuple[JobEntry, ...]
    outputs: tuple[JobOutput, ...] = ()
    folder: str = "."


def _bad(where: str, what: str, fix: str) -> InputError:
    return InputError(f"{where}: {what}", fix)


def _keys(table: Mapping[str, Any], where: str, allowed: Sequence[str], required: Sequence[str] = ()) -> None:
    for k in required:
        if k not in table:
            raise _bad(where, f"missing key '{k}'", f"add {k} = ...")
    for k in table:
        if k not in allowed:
            near = closest_names(k, allowed)
            raise _bad(
                where, f"unknown key '{k}'", f"did you mean '{near[0]}'?" if near else f"allowed: {', '.join(allowed)}"
            )


def _stage_options(value: Any, where: str) -> dict[str, Any]:
    if not isinstance(value, Mapping):
        raise _bad(where, "'options' must be a table", 'write options = { pick = "cis" }')
    known = option_names("options")
    for name in value:
        if name not in known:
            raise unknown_option(name, known, where)
    return dict(value)


def _text(e: Mapping[str, Any], key: str, where: str, example: str) -> str:
    value = e[key]
    if not isinstance(value, str) or not value.strip():
        raise _bad(where, f"'{key}' must be a non-empty string", f"write {key} = {example}")
    return value.strip()


def _entry(raw: Any, defaults: Mapping[str, Any], where: str, rules: tuple[str, ...]) -> JobEntry:
    if not isinstance(raw, Mapping):
        raise _bad(where, "not a table", "write [[complex]] entries")
    e = {**defaults, **raw}
    for k in e:
        if k in option_names("options"):
            raise _bad(where, f"'{k}' is an analysis option", f"write options = {{ {k} = ... }}")
    _keys(e, where, ENTRY_KEYS, ("formula",))
    formula = _text(e, "formula", where, '"[RuCl2(CO)2(PPh3)2]"')
    label = _text(e, "label", where, '"1"') if "label" in e else formula
    check_label_text(label, f"{where}: label")
    options = {name: check_option(name, e.get(name), where) for name in option_names("entry")}
    options.update(
        (name, check_option(name, value, where)) for name, value in _stage_options(e.get("options", {}), where).items()
    )
    return JobEntry(label, Request(formula, rules=tuple(rules), **options))


def _output(raw: Any, where: str) -> JobOutput:
    if not isinstance(raw, Mapping):
        raise _bad(where, "not a table", "write [[output]] entries")
    _keys(raw, where, ("format", "file"), ("format", "file"))
    if raw["format"] not in FORMATS:
        raise _bad(where, f"format {raw['format']!r} is not one of {', '.join(FORMATS)}", 'write format = "markdown"')
    f = raw["file"]
    if not isinstance(f, str) or not f.strip() or Path(f).is_absolute() or ".." in Path(f).parts:
        raise _bad(where, f"file {f!r} must be a relative path inside the job's folder", 'write file = "table.md"')
    last = f.replace("\\", "/").split("/")[-1]  # as written: pathlib would drop a trailing '/.'
    if "\0" in f:
        raise _bad(where, f"file {f!r} holds a NUL character (U+0000), which no file name may", "retype the name")
    if last.strip() in ("", ".", ".."):
        raise _bad(where, f"file {f!r} does not name a file", 'write file = "table.md"')
    return JobOutput(raw["format"], f)


def _entries(data: Mapping[str, Any], where: str, rules: tuple[str, ...]) -> tuple[JobEntry, ...]:
    defaults = data.get("defaults", {})
    if not isinstance(defaults, Mapping):
        raise _bad(where, "'defaults' must be a table", "write [defaults]")
    _keys(defaults, f"{where} [defaults]", [k for k in ENTRY_KEYS if k not in ("formula", "label")])
    cx = data["complex"]
    if not isinstance(cx, list) or not cx:
        raise _bad(where, "'complex' must list at least one [[complex]]", "add [[complex]] with formula = ...")
    entries: list[JobEntry] = []
    for k, raw in enumerate(cx, start=1):
        w = f"{where} [[complex]] #{k}"
        entry = _entry(raw, defaults, w, rules)
        if any(e.label == entry.label for e in entries):
            raise _bad(w, f"label '{entry.label}' is used twice", "give each complex its own label")
        entries.append(entry)
    return tuple(entries)


def parse_job(data: Mapping[str, Any], where: str, rules: Sequence[str] = (), folder: str = ".") -> Job:
    """A checked :class:`Job` from TOML data already read.

    Parameters
    ----------
    data : mapping
        The parsed TOML document.
    where : str
        The file name, put in front of every message.
    rules : sequence of str
        Rule folders in force (``--rules DIR``), given to every request.
    folder : str
        The folder ``[[output]]`` files are relative to.

    Returns
    -------
    Job

    Raises
    ------
    InputError
        A missing or unknown key or option (with the nearest names), a value of the wrong kind, a label used
        twice, an output format not in :data:`FORMATS`, an output path outside the folder, one that names no
        file ('.', 'sub/'), or two outputs naming one file.
    """
    _keys(data, where, ("title", "defaults", "complex", "output"), ("complex",))
    title = data.get("title", "")
    if not isinstance(title, str):
        raise _bad(where, "'title' must be a string", 'write title = "..."')
    check_label_text(title, f"{where}: title")
    entries = _entries(data, where, tuple(rules))
    raw_out = data.get("output", [])
    if not isinstance(raw_out, list):
        raise _bad(where, "'output' must be a list of [[output]] tables", "write [[output]] with format and file")
    outputs = tuple(_output(o, f"{where} [[output]] #{k}") for k, o in enumerate(raw_out, start=1))
    for k, o in enumerate(outputs):
        for j in range(k):
            if Path(outputs[j].file) == Path(o.file):
                raise _bad(
                    f"{where} [[output]] #{k + 1}",
                    f"file {o.file!r} is the file of [[output]] #{j + 1} ({outputs[j].file!r})",
                    "give each output its own file",
                )
    return Job(title, entries, outputs, folder)


def load_job(path: str, rules: Sequence[str] = ()) -> Job:
    """Read and check a job file (TOML).

    Parameters
    ----------
    path : str
        The job file; its folder is the one outputs are written to.
    rules : sequence of str
        Rule folders in force (``--rules DIR``).

    Returns
    -------
    Job

    Raises
    ------
    InputError
        The file cannot be read, is not UTF-8 TOML, nests too deeply, or does not check (:func:`parse_job`).
    """
    data = read_toml(path, _job_error)
    return parse_job(data, str(path), rules, str(Path(path).parent))


def _job_error(where: Any, what: str, fix: str) -> InputError:
    if what.startswith("cannot read"):
        return InputError(f"cannot read job file '{where}'{what[len('cannot read') :]}", "check the path")
    return InputError(f"job file '{where}': {what}", fix)
