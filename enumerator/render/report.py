"""The self-contained HTML report for supporting information, formatted from a
:class:`~enumerator.workflow.report.Report`.

Everything shown is computed before, by :mod:`enumerator.workflow.report`
(results, band patterns, cautions, file names, version); this module only
formats it.  :func:`render_report` writes one HTML page that needs no
network: inline CSS, inline SVG and ``data:`` images only, no scripts, no
web fonts.  For each complex it shows the isomer table (every analysis's
columns), then one card per isomer with

* a drawing of the ideal polyhedron (:func:`polyhedron_svg`: an oblique
  projection of the site vectors with the polyhedron edges, the M-donor
  bonds, the donor labels and the chelate/ring links, drawn here);
* its point group, IUPAC descriptor, stretch species and band counts and
  any other per-isomer keys the analyses add (read through the Analysis
  protocol, so a new analysis shows up without a change here);
* its predicted stick spectrum per reporter class, drawn by
  :func:`enumerator.render.plots.stick_spectrum`, with the band list;

then the pair matrix (top-level ``pairs``) as a grid whose cells carry
text and a fill pattern as well as a colour, so it reads in greyscale, and
every analysis's text sections (safety cautions first and boxed).
:func:`report_files` adds each complex's CSV and LaTeX table, written by
:mod:`enumerator.render.tables` as ``isosieve isomers`` writes them.

Every string that can come from a user (formulae, ligand names from user
rule files, notes) goes through :func:`html.escape`.  The same input gives
byte-identical output.

>>> from enumerator.workflow.pipeline import analyse
>>> from enumerator.workflow.report import build_report
>>> page = render_report(build_report([analyse("Ma4b2", geometry="OC-6")]))
>>> page.startswith("<!DOCTYPE html>") and "<script" not in page
True
"""

from __future__ import annotations

import base64
import html
import json
import math
from collections.abc import Mapping, Sequence
from typing import Any

from enumerator.isomers.enumeration import Isomer
from enumerator.render import tables
from enumerator.render.plots import stick_spectrum
from enumerator.render.sections import result_sections
from enumerator.render.text import isomer_rows
from enumerator.workflow.report import ClassSpectrum, IsomerSpectra, Report, ReportComplex
from enumerator.workflow.result import Result

__all__ = ["render_report", "report_files", "polyhedron_svg", "pair_grid_html"]

#: Fill colours for ligand kinds, chosen to differ in lightness too.
_PALETTE = (
    "#1f77b4",
    "#ff7f0e",
    "#2ca02c",
    "#d62728",
    "#9467bd",
    "#8c564b",
    "#e377c2",
    "#17becf",
    "#bcbd22",
    "#7f7f7f",
)

#: The page's style sheet, one rule set a line.
_CSS = "\n".join(
    (
        "",
        "body{font-family:system-ui,-apple-system,'Segoe UI',Helvetica,Arial,sans-serif;"
        "margin:1.5rem auto;max-width:75rem;color:#111;background:#fff;line-height:1.35;"
        "padding:0 1rem}",
        "h1{font-size:1.6rem;margin:.2rem 0}h2{font-size:1.3rem;border-bottom:2px solid #333;"
        "margin-top:2rem}h3{font-size:1.05rem;margin:.3rem 0}",
        "table{border-collapse:collapse;margin:.5rem 0}th,td{border:1px solid #888;"
        "padding:.15rem .45rem;text-align:left;vertical-align:top;font-size:.9rem}",
        "th{background:#eee}",
        ".meta{color:#333;font-size:.9rem}",
        ".caution{border:3px solid #000;background:#fff3cd;padding:.4rem .8rem;margin:.8rem 0}",
        '.caution h3::before{content:"\\26A0  "}',
        ".cards{display:block}",
        ".card{border:1px solid #666;border-radius:4px;padding:.5rem;margin:.8rem 0;"
        "display:grid;grid-template-columns:250px minmax(0,1fr);gap:.4rem 1rem;break-inside:avoid}",
        ".card h3{grid-column:1/-1}",
        ".card dl{display:grid;grid-template-columns:max-content minmax(0,1fr);gap:.1rem .6rem;"
        "margin:0;font-size:.88rem}",
        ".card dt{font-weight:600}.card dd{margin:0;overflow-x:auto;overflow-wrap:break-word}",
        ".card dd table th,.card dd table td{font-size:.78rem;padding:.05rem .3rem}",
        ".specs{grid-column:1/-1;display:flex;flex-wrap:wrap;gap:1rem}",
        ".spec{width:24rem}.spec img,.spec svg{width:100%;height:auto}",
        "pre{white-space:pre-wrap;font-size:.85rem;background:#f6f6f6;padding:.4rem;border:1px solid #ddd}",
        "code{font-size:.85rem}",
        ".grid td{text-align:center;min-width:4.2rem;font-size:.8rem}",
        ".grid .d0{background:repeating-linear-gradient(45deg,#fff 0 4px,#bbb 4px 6px);font-weight:700}",
        ".grid .d1{background:#fde0c5}",
        ".grid .d2{background:#f59e5a}",
        ".grid .d3{background:#a4471a;color:#fff}",
        ".grid .self{background:#fff;color:#000}",
        ".grid .na{background:#fff;color:#555}",
        ".legend span{display:inline-block;border:1px solid #888;padding:0 .4rem;margin-right:.4rem;font-size:.8rem}",
        "footer{margin-top:2rem;font-size:.8rem;color:#333}",
        "",
    )
)


def _e(x: Any) -> str:
    return html.escape(str(x), quote=True)


def _num(x: float, nd: int = 1) -> str:
    v = round(float(x), nd)
    return f"{0.0 if v == 0 else v:.{nd}f}"


# ---------------------------------------------------------------- drawing
_ROT_Z = math.radians(-32.0)
_TILT = math.radians(20.0)


def _project(v: Sequence[float]) -> tuple[float, float, float]:
    """Oblique view: turn about z, tilt the top toward the viewer.
    Returns (screen x, screen y downwards, depth; larger depth = farther)."""
    x, y, z = (float(c) for c in v)
    cz, sz = math.cos(_ROT_Z), math.sin(_ROT_Z)
    x, y = cz * x - sz * y, sz * x + cz * y
    ct, st = math.cos(_TILT), math.sin(_TILT)
    y, z = ct * y - st * z, st * y + ct * z
    return x, -z, y


def polyhedron_svg(isomer: Isomer, kinds: Sequence[str] = (), metal: str = "M", size: int = 240) -> str:
    """An inline SVG drawing of one isomer on its ideal polyhedron.

    An oblique projection (turned 32 degrees about z, tilted 20 degrees
    about x): edges behind the metal are dashed, far bonds are drawn first.
    Labels are text (ligand abbreviation for monodentates, donor for
    chelates), so the drawing does not depend on colour.

    Parameters
    ----------
    isomer : Isomer
    kinds : sequence of str
        The ligand names in the composition's order, for the colours (default: sorted site ligands).
    metal : str
        The metal's symbol, drawn in the centre (three characters at most).
    size : int
        Width and height in pixels.

    Returns
    -------
    str
        One ``<svg>`` element.
    """
    kinds = list(kinds) or sorted({s.ligand for s in isomer.sites})
    colour = {k: _PALETTE[i % len(_PALETTE)] for i, k in enumerate(kinds)}
    c = size / 2.0
    scale = size * 0.34
    pts = {s.index: _project(s.position) for s in isomer.sites}
    xy = {i: (c + scale * p[0], c + scale * p[1]) for i, p in pts.items()}
    depth = {i: p[2] for i, p in pts.items()}
    linked = {a for a, b, _ in isomer.links()} | {b for a, b, _ in isomer.links()}
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {size} {size}" width="{size}" height="{size}" '
        'role="img" '
        f'aria-label="{_e(isomer.geometry.symbol)} drawing of isomer {_e(isomer.id)}">',
        f"<title>isomer {_e(isomer.id)} on {_e(isomer.geometry.symbol)}</title>",
        f'<rect x="0" y="0" width="{size}" height="{size}" fill="#fff"/>',
    ]
    for a, b in sorted(isomer.geometry.edges):
        back = (depth[a] + depth[b]) / 2 > 0.05
        (x1, y1), (x2, y2) = xy[a], xy[b]
        dash = ' stroke-dasharray="4 3"' if back else ""
        out.append(
            f'<line x1="{_num(x1)}" y1="{_num(y1)}" x2="{_num(x2)}" y2="{_num(y2)}" '
            f'stroke="#9a9a9a" stroke-width="1"{dash}/>'
        )
    # far sites first, then the metal, then near sites
    order = sorted(isomer.sites, key=lambda s: (-depth[s.index], s.index))
    far = [s for s in order if depth[s.index] > 0]
    near = [s for s in order if depth[s.index] <= 0]

    def bond(s) -> str:
        x, y = xy[s.index]
        return f'<line x1="{_num(c)}" y1="{_num(c)}" x2="{_num(x)}" y2="{_num(y)}" stroke="#222" stroke-width="2"/>'

    out += [bond(s) for s in far]
    out += [bond(s) for s in near]
    out.append(f'<circle cx="{_num(c)}" cy="{_num(c)}" r="13" fill="#444" stroke="#000"/>')
    out.append(
        f'<text x="{_num(c)}" y="{_num(c + 4)}" text-anchor="middle" font-size="11" font-weight="700" '
        f'fill="#fff">{_e(metal[:3])}</text>'
    )
    # chelate and ring links: thick curves bulging away from the metal
    for a, b, name in isomer.links():
        (x1, y1), (x2, y2) = xy[a], xy[b]
        mx, my = (x1 + x2) / 2, (y1 + y2) / 2
        qx, qy = c + (mx - c) * 1.35, c + (my - c) * 1.35
        out.append(
            f'<path d="M{_num(x1)} {_num(y1)} Q{_num(qx)} {_num(qy)} {_num(x2)} {_num(y2)}" fill="none" '
            f'stroke="{colour.get(name, "#000")}" stroke-width="5" stroke-linecap="round" opacity="0.85"/>'
        )
        lx, ly = c + (mx - c) * 1.22, c + (my - c) * 1.22
        out.append(_label(lx, ly, name, 9, italic=True))
    for s in order:
        x, y = xy[s.index]
        fill = colour.get(s.ligand, "#000")
        out.append(
            f'<circle cx="{_num(x)}" cy="{_num(y)}" r="6" fill="{fill}" stroke="#000" stroke-width="1">'
            f"<title>site {s.index + 1}: {_e(s.ligand)} ({_e(s.donor)})</title></circle>"
        )
        text = s.donor if s.index in linked else s.ligand
        dx, dy = x - c, y - c
        n = math.hypot(dx, dy) or 1.0
        tx, ty = x + 15 * dx / n, y + 15 * dy / n + 4
        out.append(_label(tx, ty, f"{text}", 11))
        out.append(_label(x + 8 * (1 if dx >= 0 else -1), y - 7, str(s.index + 1), 7, grey=True))
    out.append("</svg>")
    return "".join(out)


def _label(x: float, y: float, text: str, size: int, italic: bool = False, grey: bool = False) -> str:
    style = ' font-style="italic"' if italic else ""
    fill = "#555" if grey else "#000"
    t = text if len(text) <= 10 else text[:9] + "\u2026"
    return (
        f'<text x="{_num(x)}" y="{_num(y)}" text-anchor="middle" font-size="{size}"{style} fill="{fill}" '
        f'stroke="#fff" stroke-width="3" paint-order="stroke">{_e(t)}</text>'
    )


# ---------------------------------------------------------------- spectra
def _spectrum_html(iso_id: str, spec: ClassSpectrum) -> str:
    cls = spec.reporter_class
    if spec.pattern is None:
        return f'<p class="meta">{_e(cls)} bands: not predicted ({_e(spec.error)})</p>'
    bands = spec.pattern.bands
    data = base64.b64encode(stick_spectrum(bands, fmt="svg")).decode("ascii")
    img = (
        f'<img alt="predicted {_e(cls)} stick spectrum of isomer {_e(iso_id)}" src="data:image/svg+xml;base64,{data}">'
    )
    rows = "".join(
        f"<tr><td>{_num(b.wavenumber, 0)}</td><td>{_e(b.species or '-')}</td><td>{_num(b.intensity, 2)}</td></tr>"
        for b in bands
    )
    return (
        f'<div class="spec"><h3>predicted {_e(cls)} stretches</h3>{img}'
        f"<table><tr><th>cm\u207b\u00b9</th><th>species</th><th>rel. IR intensity</th></tr>{rows}</table></div>"
    )


# ---------------------------------------------------------------- tables
def _table_html(header: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    head = "".join(f"<th>{_e(h)}</th>" for h in header)
    body = "".join("<tr>" + "".join(f"<td>{_e(c)}</td>" for c in r) + "</tr>" for r in rows)
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


# ---------------------------------------------------------------- pair grid
_TECH_ORDER = ("ir", "ir (pattern)", "raman", "nmr")


def _pair_ids(entry: Mapping[str, Any]) -> tuple[str, str] | None:
    for ka, kb in (("a", "b"), ("first", "second"), ("isomer_a", "isomer_b"), ("i", "j")):
        if ka in entry and kb in entry:
            return str(entry[ka]), str(entry[kb])
    for key in ("pair", "isomers", "ids"):
        v = entry.get(key)
        if isinstance(v, (list, tuple)) and len(v) == 2:
            return str(v[0]), str(v[1])
    return None


#: Pair keys that qualify a verdict rather than name a technique.
_QUALIFIER_KEYS = ("ir_bond_dipole_distinct", "ir_pattern_distinct", "cheapest_qualifier", "cheapest")


def _distinguishers(entry: Mapping[str, Any]) -> list[str]:
    """Which techniques tell a pair apart, as short labels ('IR (pattern)' for the IR pattern tier; IR counts
    that differ only by bands predicted weak are left out, as the pair verdicts leave them out)."""
    for key in ("distinguished_by", "by", "techniques", "methods"):
        v = entry.get(key)
        if isinstance(v, (list, tuple)):
            return [str(x) for x in v]
    out = []
    for k, v in entry.items():
        if k in ("a", "b", "pair", "isomers", "ids", "first", "second", "isomer_a", "isomer_b", "i", "j"):
            continue
        if k in _QUALIFIER_KEYS:
            continue
        if isinstance(v, bool) and v:
            out.append(k[: -len("_distinct")] if k.endswith("_distinct") else k)
        elif isinstance(v, Mapping):
            flag = v.get("distinguishable", v.get("distinct", v.get("differs")))
            if flag is True:
                out.append(k)
    if "ir" in out and entry.get("ir_bond_dipole_distinct") is False:
        out.remove("ir")
    if entry.get("ir_pattern_distinct") is True and "ir" not in out:
        out.append("IR (pattern)")
    return out


def _short(label: str) -> str:
    low = label.lower()
    return {"ir": "IR", "raman": "Raman", "nmr": "NMR"}.get(low, label)


def _pair_entries(pairs: Any) -> list[Mapping[str, Any]]:
    """The pair entries of a list, or of a mapping keyed "a|b" (the pair then read from the key)."""
    if isinstance(pairs, (list, tuple)):
        return [e for e in pairs if isinstance(e, Mapping)]
    entries: list[Mapping[str, Any]] = []
    if isinstance(pairs, Mapping):
        for k, v in pairs.items():
            if isinstance(v, Mapping):
                e = dict(v)
                if _pair_ids(e) is None:
                    a, _, b = str(k).replace("|", "/").replace(",", "/").partition("/")
                    e["pair"] = [a.strip(), b.strip()]
                entries.append(e)
    return entries


Cells = dict[tuple[str, str], list[str]]
Notes = dict[tuple[str, str], str]


def _pair_cells(entries: Sequence[Mapping[str, Any]]) -> tuple[Cells, Notes]:
    """The techniques (IR, Raman, NMR first) and the note of each pair, both ways round."""
    cells: Cells = {}
    notes: Notes = {}
    for e in entries:
        ab = _pair_ids(e)
        if ab is None:
            continue
        d = sorted(
            {_short(x) for x in _distinguishers(e)},
            key=lambda s: (_TECH_ORDER.index(s.lower()) if s.lower() in _TECH_ORDER else 9, s),
        )
        cells[ab] = cells[(ab[1], ab[0])] = d
        note = e.get("note") or e.get("reason") or ""
        if note:
            notes[ab] = notes[(ab[1], ab[0])] = str(note)
    return cells, notes


def _grid_cell(a: str, b: str, cells: Cells, notes: Notes) -> str:
    if a == b:
        return '<td class="self">\u2014</td>'
    d = cells.get((a, b))
    if d is None:
        return '<td class="na">n/a</td>'
    text = " + ".join(d) if d else "none"
    if not d and (a, b) in notes:
        text += f" ({notes[(a, b)]})"
    tip = f' title="{_e(notes[(a, b)])}"' if (a, b) in notes else ""
    return f'<td class="d{min(len(d), 3)}"{tip}>{_e(text)}</td>'


def pair_grid_html(ids: Sequence[str], pairs: Any) -> str:
    """The pair matrix: each cell names the techniques that tell the two isomers apart ('none' hatched when
    none does), so it reads without colour.

    Parameters
    ----------
    ids : sequence of str
        The isomer ids, in table order.
    pairs : list or mapping
        The top-level ``pairs`` of a result: entries ``{"a", "b", "ir_distinct", "raman_distinct",
        "nmr_distinct", "note", "ir_bond_dipole_distinct", "ir_pattern_distinct"}``; ``distinguished_by``
        lists and mappings keyed "a|b" are read too.

    Returns
    -------
    str
        The grid and its legend, or '' when no entry names a pair.
    """
    cells, notes = _pair_cells(_pair_entries(pairs))
    if not cells:
        return ""
    head = "".join(f"<th>{_e(i)}</th>" for i in ids)
    rows = [f"<tr><th>{_e(a)}</th>{''.join(_grid_cell(a, b, cells, notes) for b in ids)}</tr>" for a in ids]
    legend = (
        '<p class="legend"><span class="d0" '
        'style="background:repeating-linear-gradient(45deg,#fff 0 4px,#bbb 4px 6px)">none (hatched): '
        'not distinguishable</span><span style="background:#fde0c5">one technique</span>'
        '<span style="background:#f59e5a">two</span>'
        '<span style="background:#a4471a;color:#fff">three or more</span>'
        "<span>IR = IR band counts differ; IR (pattern) = the predicted IR band patterns differ beyond the band "
        "model's uncertainty (idealised bond-dipole intensities); IR counts that differ only by bands predicted "
        "weak are not counted</span></p>"
    )
    return (
        '<table class="grid"><thead><tr><th>isomer</th>'
        + head
        + "</tr></thead><tbody>"
        + "".join(rows)
        + "</tbody></table>"
        + legend
    )


# ---------------------------------------------------------------- generic values
def _value_html(v: Any) -> str:
    if isinstance(v, str):
        return _e(v)
    if isinstance(v, bool) or v is None:
        return _e(json.dumps(v))
    if isinstance(v, (int, float)):
        return _e(_num(v, 4).rstrip("0").rstrip(".") if isinstance(v, float) else v)
    if isinstance(v, Mapping) and v and all(isinstance(x, Mapping) for x in v.values()):
        keys: list[str] = []
        for x in v.values():
            for k in x:
                if k not in keys:
                    keys.append(k)
        head = "".join(f"<th>{_e(k)}</th>" for k in keys)
        body = "".join(
            f"<tr><th>{_e(name)}</th>" + "".join(f"<td>{_value_html(x.get(k, ''))}</td>" for k in keys) + "</tr>"
            for name, x in v.items()
        )
        return f"<table><tr><th></th>{head}</tr>{body}</table>"
    if isinstance(v, Mapping):
        return "; ".join(f"{_e(k)}: {_value_html(x)}" for k, x in v.items())
    if isinstance(v, (list, tuple)) and all(not isinstance(x, (Mapping, list, tuple)) for x in v):
        return _e(", ".join(str(x) for x in v))
    return f"<code>{_e(json.dumps(v, ensure_ascii=False, sort_keys=True))}</code>"


def _descriptor_text(v: Any) -> str:
    if isinstance(v, str):
        return v
    if isinstance(v, Mapping):
        return str(v.get("text", ""))
    return ""


_CAUTION_WORDS = ("safety", "caution", "hazard", "danger", "warning")


def _is_caution(title: str) -> bool:
    t = title.lower()
    return any(w in t for w in _CAUTION_WORDS)


# ---------------------------------------------------------------- page
def _caution_blocks(c: ReportComplex) -> tuple[list[str], list[str]]:
    """(boxed caution blocks, other section blocks) of one complex.

    Sections whose title speaks of safety are boxed; when the pipeline attached none, the cautions of the
    composition are boxed instead."""
    cautions: list[str] = []
    sections: list[str] = []
    for sec in result_sections(c.result):
        block = f"<h3>{_e(sec.title)}</h3><pre>{_e(sec.text)}</pre>"
        (cautions if _is_caution(sec.title) else sections).append(block)
    if not cautions and c.cautions:
        cautions.append("<h3>Safety</h3><pre>" + _e("\n".join(f"- {x}" for x in c.cautions)) + "</pre>")
    return cautions, sections


def _meta_html(res: Result) -> list[str]:
    iso_set = res.isomer_set
    out = [
        f'<p class="meta">geometry {_e(res.geometry.symbol)} ({_e(res.geometry.name)}): {_e(res.geometry_reason)}<br>'
        f"{iso_set.geometric_isomers} geometric isomer(s), {iso_set.stereoisomers} stereoisomer(s)"
        + ("" if iso_set.complete else " (list stopped at the limit)")
        + "</p>"
    ]
    if res.geometry.fluxional:
        out.append(
            '<p class="meta">This polyhedron is marked fluxional: '
            "isomers may interconvert in solution on the NMR time scale.</p>"
        )
    out += [f'<p class="meta">note: {_e(note)}</p>' for note in res.notes]
    return out


def _card_html(n: int, iso: Isomer, data: Mapping[str, Any], spectra: IsomerSpectra, res: Result) -> str:
    comp = res.composition
    dl = [
        ("point group", iso.point_group),
        ("chiral", ("yes, enantiomer " + (iso.enantiomer or "?")) if iso.chiral else "no"),
    ]
    desc = _descriptor_text(data.get("descriptor"))
    if desc:
        dl.append(("IUPAC descriptor", desc))
    body = "".join(f"<dt>{_e(k)}</dt><dd>{_e(v)}</dd>" for k, v in dl)
    for key, value in data.items():
        if key == "descriptor" and desc:
            continue
        label = "stretch species and band counts" if key == "modes" else key.replace("_", " ")
        body += f"<dt>{_e(label)}</dt><dd>{_value_html(value)}</dd>"
    specs = "".join(_spectrum_html(iso.id, spec) for spec in spectra.classes)
    return (
        f'<div class="card" id="c{n}-isomer-{_e(iso.id)}"><h3>isomer {_e(iso.id)}</h3>'
        + polyhedron_svg(iso, [k.name for k in comp.kinds], comp.metal)
        + f"<dl>{body}</dl>"
        + f'<div class="specs">{specs}</div>'
        + "</div>"
    )


def _top_html(res: Result, top: Mapping[str, Any], boxed: bool) -> list[str]:
    """The pair grid and the other top-level keys of the analyses (caution keys left out when boxed)."""
    out = []
    if "pairs" in top:
        grid = pair_grid_html([i.id for i in res.isomers], top["pairs"])
        if grid:
            out.append("<h3>Which isomer pairs can be told apart</h3>" + grid)
        else:
            out.append("<h3>Isomer pairs</h3>" + _value_html(top["pairs"]))
    for key, value in top.items():
        if key == "pairs" or (boxed and _is_caution(key)):
            continue
        out.append(f"<h3>{_e(key.replace('_', ' '))}</h3><div>{_value_html(value)}</div>")
    return out


def _complex_html(c: ReportComplex) -> str:
    res, n = c.result, c.number
    cautions, sections = _caution_blocks(c)
    top: dict[str, Any] = {}
    per: dict[str, dict[str, Any]] = {i.id: {} for i in res.isomers}
    for a in res.analyses:
        top.update(a.top_json())
        for i in res.isomers:
            per[i.id].update(a.isomer_json(i.id))
    out = [f'<section id="complex-{n}"><h2>{n}. {_e(res.composition.formula)}</h2>', *_meta_html(res)]
    out += [f'<div class="caution">{x}</div>' for x in cautions]
    out.append(_table_html(*isomer_rows(res)))
    out.append('<div class="cards">')
    out += [_card_html(n, i, per[i.id], s, res) for i, s in zip(res.isomers, c.spectra)]
    out.append("</div>")
    out += _top_html(res, top, bool(cautions))
    out += sections
    out.append("</section>")
    return "".join(out)


def render_report(report: Report) -> str:
    """The whole HTML page of a report (one section per complex).

    Parameters
    ----------
    report : Report
        Built by :func:`enumerator.workflow.report.build_report`.

    Returns
    -------
    str
        The page, ending in a newline.
    """
    toc = "".join(
        f'<li><a href="#complex-{c.number}">{_e(c.result.composition.formula)}</a></li>' for c in report.complexes
    )
    head = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{_e(report.title)}</title>",
        f"<style>{_CSS}</style></head><body>",
        f"<h1>{_e(report.title)}</h1>",
        '<p class="meta">Ideal-polyhedron isomers, point groups, stretching-mode species and predicted bands. '
        "Drawings are projections of the ideal polyhedron (dashed edges are at the back; small numbers are site "
        "numbers). Band positions come from an energy-factored force field and are estimates, not measurements.</p>",
    ]
    if report.files:
        head.append(
            '<p class="meta">Tables also written as: '
            + ", ".join(f"<code>{_e(f)}</code>" for f in report.files)
            + "</p>"
        )
    head.append(f"<nav><ol>{toc}</ol></nav>")
    blocks = [_complex_html(c) for c in report.complexes]
    tail = [f"<footer>written by isosieve {_e(report.version)}</footer></body></html>", ""]
    return "\n".join(head + blocks + tail)


def report_files(report: Report) -> list[tuple[str, str]]:
    """Every file of the report: each complex's CSV and LaTeX table, then ``report.html``.

    The tables are the ones ``isosieve isomers --format csv|latex`` writes
    (:func:`enumerator.render.tables.csv`, :func:`enumerator.render.tables.latex`).

    Parameters
    ----------
    report : Report

    Returns
    -------
    list of (str, str)
        File name and text, in the order to write them.
    """
    out = []
    for c in report.complexes:
        csv_name, tex_name = c.files
        out += [(csv_name, tables.csv(c.result)), (tex_name, tables.latex(c.result))]
    out.append(("report.html", render_report(report)))
    return out
