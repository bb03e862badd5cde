"""A self-contained HTML report for supporting information.

:func:`render_report` turns one or more :class:`~enumerator.workflow.result.Result`
objects into one HTML page that needs no network: inline CSS, inline SVG
and ``data:`` images only, no scripts, no web fonts.  For each complex it
shows the isomer table (every analysis's columns), then one card per
isomer with

* a drawing of the ideal polyhedron (:func:`polyhedron_svg`: an oblique
  projection of the site vectors with the polyhedron edges, the M-donor
  bonds, the donor labels and the chelate/ring links, drawn here);
* its point group, IUPAC descriptor, stretch species and band counts and
  any other per-isomer keys the analyses add (read through the Analysis
  protocol, so a new analysis shows up without a change here);
* its predicted stick spectrum per reporter class
  (:func:`enumerator.vibrations.predict_bands` plotted by
  :func:`enumerator.render.plots.stick_spectrum` when that module is
  present, else by a small SVG plot drawn here) with the band list;

then the pair matrix (top-level ``pairs``) as a grid whose cells carry
text and a fill pattern as well as a colour, so it reads in greyscale, and
every analysis's text sections (safety cautions first and boxed).

Every string that can come from a user (formulae, ligand names from user
rule files, notes) goes through :func:`html.escape`.  The same input gives
byte-identical output.

>>> from enumerator.workflow.pipeline import analyse
>>> page = render_report([analyse("Ma4b2", geometry="OC-6")])
>>> page.startswith("<!DOCTYPE html>") and "<script" not in page
True
"""

from __future__ import annotations

import base64
import html
import json
import math
from collections.abc import Iterable, Mapping, Sequence
from typing import Any

from enumerator.analyses.safety import cautions as safety_cautions
from enumerator.isomers.enumeration import Isomer
from enumerator.render.sections import result_columns, result_sections
from enumerator.workflow.result import Result

__all__ = [
    "render_report",
    "polyhedron_svg",
    "pair_grid_html",
    "table_rows",
    "tables_csv",
    "tables_latex",
    "spectrum_svg",
]

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

_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',Helvetica,Arial,sans-serif;margin:1.5rem auto;max-width:75rem;color:#111;background:#fff;line-height:1.35;padding:0 1rem}
h1{font-size:1.6rem;margin:.2rem 0}h2{font-size:1.3rem;border-bottom:2px solid #333;margin-top:2rem}h3{font-size:1.05rem;margin:.3rem 0}
table{border-collapse:collapse;margin:.5rem 0}th,td{border:1px solid #888;padding:.15rem .45rem;text-align:left;vertical-align:top;font-size:.9rem}
th{background:#eee}
.meta{color:#333;font-size:.9rem}
.caution{border:3px solid #000;background:#fff3cd;padding:.4rem .8rem;margin:.8rem 0}
.caution h3::before{content:"\\26A0  "}
.cards{display:block}
.card{border:1px solid #666;border-radius:4px;padding:.5rem;margin:.8rem 0;display:grid;grid-template-columns:250px minmax(0,1fr);gap:.4rem 1rem;break-inside:avoid}
.card h3{grid-column:1/-1}
.card dl{display:grid;grid-template-columns:max-content minmax(0,1fr);gap:.1rem .6rem;margin:0;font-size:.88rem}
.card dt{font-weight:600}.card dd{margin:0;overflow-x:auto;overflow-wrap:break-word}
.card dd table th,.card dd table td{font-size:.78rem;padding:.05rem .3rem}
.specs{grid-column:1/-1;display:flex;flex-wrap:wrap;gap:1rem}
.spec{width:24rem}.spec img,.spec svg{width:100%;height:auto}
pre{white-space:pre-wrap;font-size:.85rem;background:#f6f6f6;padding:.4rem;border:1px solid #ddd}
code{font-size:.85rem}
.grid td{text-align:center;min-width:4.2rem;font-size:.8rem}
.grid .d0{background:repeating-linear-gradient(45deg,#fff 0 4px,#bbb 4px 6px);font-weight:700}
.grid .d1{background:#fde0c5}
.grid .d2{background:#f59e5a}
.grid .d3{background:#a4471a;color:#fff}
.grid .self{background:#fff;color:#000}
.grid .na{background:#fff;color:#555}
.legend span{display:inline-block;border:1px solid #888;padding:0 .4rem;margin-right:.4rem;font-size:.8rem}
footer{margin-top:2rem;font-size:.8rem;color:#333}
"""


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

    ``kinds`` orders the ligand names for the colours (the composition's
    order).  Labels are text (ligand abbreviation for monodentates, donor
    and ligand for chelates), so the drawing does not depend on colour.
    """
    kinds = list(kinds) or sorted({s.ligand for s in isomer.sites})
    colour = {k: _PALETTE[i % len(_PALETTE)] for i, k in enumerate(kinds)}
    c = size / 2.0
    scale = size * 0.34
    pts = {s.index: _project(s.position) for s in isomer.sites}
    xy = {i: (c + scale * p[0], c + scale * p[1]) for i, p in pts.items()}
    depth = {i: p[2] for i, p in pts.items()}
    dentate = {}
    for s in isomer.sites:
        dentate[s.ligand] = dentate.get(s.ligand, 0)
    linked = {a for a, b, _ in isomer.links()} | {b for a, b, _ in isomer.links()}
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {size} {size}" width="{size}" height="{size}" role="img" '
        f'aria-label="{_e(isomer.geometry.symbol)} drawing of isomer {_e(isomer.id)}">',
        f"<title>isomer {_e(isomer.id)} on {_e(isomer.geometry.symbol)}</title>",
        f'<rect x="0" y="0" width="{size}" height="{size}" fill="#fff"/>',
    ]
    for a, b in sorted(isomer.geometry.edges):
        back = (depth[a] + depth[b]) / 2 > 0.05
        (x1, y1), (x2, y2) = xy[a], xy[b]
        dash = ' stroke-dasharray="4 3"' if back else ""
        out.append(
            f'<line x1="{_num(x1)}" y1="{_num(y1)}" x2="{_num(x2)}" y2="{_num(y2)}" stroke="#9a9a9a" stroke-width="1"{dash}/>'
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
        f'<text x="{_num(c)}" y="{_num(c + 4)}" text-anchor="middle" font-size="11" font-weight="700" fill="#fff">{_e(metal[:3])}</text>'
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
            f'<circle cx="{_num(x)}" cy="{_num(y)}" r="6" fill="{fill}" stroke="#000" stroke-width="1"><title>site {s.index + 1}: {_e(s.ligand)} ({_e(s.donor)})</title></circle>'
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
def spectrum_svg(bands: Sequence[Any], label: str = "", width: int = 340, height: int = 150) -> str:
    """A small inline SVG stick spectrum (used when enumerator.render.plots
    is not available).  Bands need .wavenumber, .intensity, .species."""
    if not bands:
        return ""
    wn = [float(b.wavenumber) for b in bands]
    lo, hi = min(wn) - 40, max(wn) + 40
    left, right, top, bottom = 34, width - 10, 12, height - 30

    def X(w: float) -> float:  # wavenumber axis decreasing to the right (IR convention)
        return left + (hi - w) / (hi - lo) * (right - left)

    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {width} {height}" role="img" aria-label="predicted stick spectrum {_e(label)}">',
        f'<rect x="0" y="0" width="{width}" height="{height}" fill="#fff"/>',
        f'<line x1="{left}" y1="{bottom}" x2="{right}" y2="{bottom}" stroke="#000"/>',
        f'<line x1="{left}" y1="{top}" x2="{left}" y2="{bottom}" stroke="#000"/>',
    ]
    step = 50 if hi - lo > 150 else 20
    t = math.ceil(lo / step) * step
    while t <= hi:
        out.append(f'<line x1="{_num(X(t))}" y1="{bottom}" x2="{_num(X(t))}" y2="{bottom + 4}" stroke="#000"/>')
        out.append(f'<text x="{_num(X(t))}" y="{bottom + 15}" font-size="9" text-anchor="middle">{t}</text>')
        t += step
    out.append(
        f'<text x="{(left + right) / 2:.1f}" y="{height - 3}" font-size="9" text-anchor="middle">wavenumber / cm\u207b\u00b9 {_e(label)}</text>'
    )
    for b in bands:
        x = X(float(b.wavenumber))
        inten = max(0.0, min(1.0, float(b.intensity)))
        y = bottom - inten * (bottom - top)
        if inten > 0:
            out.append(
                f'<line x1="{_num(x)}" y1="{bottom}" x2="{_num(x)}" y2="{_num(y)}" stroke="#000" stroke-width="2"/>'
            )
        else:  # IR-forbidden: a dotted marker on the axis
            out.append(
                f'<line x1="{_num(x)}" y1="{bottom}" x2="{_num(x)}" y2="{bottom - 10}" stroke="#000" stroke-dasharray="2 2"/>'
            )
        out.append(
            f'<text x="{_num(x)}" y="{_num(y - 3)}" font-size="8" text-anchor="middle">{_e(b.species or "")}</text>'
        )
    out.append("</svg>")
    return "".join(out)


def _spectra_html(iso: Isomer, rules) -> str:
    try:
        from enumerator.vibrations import predict_bands, reporter_classes
    except ImportError:
        return ""
    from enumerator.errors import IsosieveError

    parts = []
    for cls in reporter_classes(iso):
        try:
            bands = predict_bands(iso, cls, rules=rules)
        except IsosieveError as exc:
            parts.append(f'<p class="meta">{_e(cls)} bands: not predicted ({_e(exc.line())})</p>')
            continue
        if not bands:
            continue
        img = ""
        try:
            from enumerator.render import plots  # issue 6

            svg = plots.stick_spectrum(bands, fmt="svg")
            data = base64.b64encode(svg if isinstance(svg, bytes) else str(svg).encode()).decode("ascii")
            img = f'<img alt="predicted {_e(cls)} stick spectrum of isomer {_e(iso.id)}" src="data:image/svg+xml;base64,{data}">'
        except (ImportError, AttributeError):  # plots module not (yet) present
            img = spectrum_svg(bands, f"({cls})")
        rows = "".join(
            f"<tr><td>{_num(b.wavenumber, 0)}</td><td>{_e(b.species or '-')}</td><td>{_num(b.intensity, 2)}</td></tr>"
            for b in bands
        )
        parts.append(
            f'<div class="spec"><h3>predicted {_e(cls)} stretches</h3>{img}'
            f"<table><tr><th>cm\u207b\u00b9</th><th>species</th><th>rel. IR intensity</th></tr>{rows}</table></div>"
        )
    return "".join(parts)


# ---------------------------------------------------------------- tables
def table_rows(res: Result) -> tuple[list[str], list[list[str]]]:
    """The isomer table shown in the report (also written as CSV / LaTeX)."""
    from enumerator.render.text import isomer_rows

    return isomer_rows(res)


def tables_csv(res: Result) -> str:
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    header, rows = table_rows(res)
    w.writerow(header)
    w.writerows(rows)
    return buf.getvalue()


_TEX = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
}


def _tex(s: str) -> str:
    return "".join(_TEX.get(ch, ch) for ch in str(s))


def tables_latex(res: Result) -> str:
    """The isomer table as a LaTeX tabular (booktabs), columns' own LaTeX
    cells where an analysis gives them."""
    extra = result_columns(res)
    header, rows = table_rows(res)
    lines = [
        f"% isomers of {_tex(res.composition.formula)} on {_tex(res.geometry.symbol)}; needs \\usepackage{{booktabs}}",
        "\\begin{tabular}{" + "l" * len(header) + "}",
        "\\toprule",
        " & ".join(_tex(h) for h in header) + r" \\",
        "\\midrule",
    ]
    for iso, row in zip(res.isomers, rows):
        cells = [_tex(x) for x in row]
        for k, col in enumerate(extra):
            if col.latex is not None and iso.id in col.latex:
                cells[4 + k] = col.latex[iso.id]
        lines.append(" & ".join(cells) + r" \\")
    lines += ["\\bottomrule", "\\end{tabular}", ""]
    return "\n".join(lines)


def _table_html(header: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    head = "".join(f"<th>{_e(h)}</th>" for h in header)
    body = "".join("<tr>" + "".join(f"<td>{_e(c)}</td>" for c in r) + "</tr>" for r in rows)
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


# ---------------------------------------------------------------- pair grid
_TECH_ORDER = ("ir", "raman", "nmr")


def _pair_ids(entry: Mapping[str, Any]) -> tuple[str, str] | None:
    for ka, kb in (("a", "b"), ("first", "second"), ("isomer_a", "isomer_b"), ("i", "j")):
        if ka in entry and kb in entry:
            return str(entry[ka]), str(entry[kb])
    for key in ("pair", "isomers", "ids"):
        v = entry.get(key)
        if isinstance(v, (list, tuple)) and len(v) == 2:
            return str(v[0]), str(v[1])
    return None


def _distinguishers(entry: Mapping[str, Any]) -> list[str]:
    """Which techniques tell a pair apart, as short labels."""
    for key in ("distinguished_by", "by", "techniques", "methods"):
        v = entry.get(key)
        if isinstance(v, (list, tuple)):
            return [str(x) for x in v]
    out = []
    for k, v in entry.items():
        if k in ("a", "b", "pair", "isomers", "ids", "first", "second", "isomer_a", "isomer_b", "i", "j"):
            continue
        if isinstance(v, bool) and v:
            out.append(k[: -len("_distinct")] if k.endswith("_distinct") else k)
        elif isinstance(v, Mapping):
            flag = v.get("distinguishable", v.get("distinct", v.get("differs")))
            if flag is True:
                out.append(k)
    return out


def _short(label: str) -> str:
    low = label.lower()
    return {"ir": "IR", "raman": "Raman", "nmr": "NMR"}.get(low, label)


def pair_grid_html(ids: Sequence[str], pairs: Any) -> str:
    """The pair matrix: each cell names the techniques that tell the two
    isomers apart ('none' hatched when none does)."""
    cells: dict[tuple[str, str], list[str]] = {}
    notes: dict[tuple[str, str], str] = {}
    entries: list[Mapping[str, Any]] = []
    if isinstance(pairs, Mapping):
        for k, v in pairs.items():
            if isinstance(v, Mapping):
                e = dict(v)
                if _pair_ids(e) is None:
                    a, _, b = str(k).replace("|", "/").replace(",", "/").partition("/")
                    e["pair"] = [a.strip(), b.strip()]
                entries.append(e)
    elif isinstance(pairs, (list, tuple)):
        entries = [e for e in pairs if isinstance(e, Mapping)]
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
    if not cells:
        return ""
    head = "".join(f"<th>{_e(i)}</th>" for i in ids)
    rows = []
    for a in ids:
        tds = []
        for b in ids:
            if a == b:
                tds.append('<td class="self">\u2014</td>')
                continue
            d = cells.get((a, b))
            if d is None:
                tds.append('<td class="na">n/a</td>')
                continue
            cls = f"d{min(len(d), 3)}"
            text = " + ".join(d) if d else "none"
            if not d and (a, b) in notes:
                text += f" ({notes[(a, b)]})"
            tip = f' title="{_e(notes[(a, b)])}"' if (a, b) in notes else ""
            tds.append(f'<td class="{cls}"{tip}>{_e(text)}</td>')
        rows.append(f"<tr><th>{_e(a)}</th>{''.join(tds)}</tr>")
    legend = (
        '<p class="legend"><span class="d0" style="background:repeating-linear-gradient(45deg,#fff 0 4px,#bbb 4px 6px)">none (hatched): '
        'not distinguishable</span><span style="background:#fde0c5">one technique</span>'
        '<span style="background:#f59e5a">two</span><span style="background:#a4471a;color:#fff">three or more</span></p>'
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
def _complex_html(n: int, res: Result, rules) -> tuple[str, list[str]]:
    comp = res.composition
    iso_set = res.isomer_set
    kinds = [k.name for k in comp.kinds]
    cautions: list[str] = []
    sections: list[str] = []
    for sec in result_sections(res):
        block = f"<h3>{_e(sec.title)}</h3><pre>{_e(sec.text)}</pre>"
        if _is_caution(sec.title):
            cautions.append(block)
        else:
            sections.append(block)
    if not cautions:  # the safety stage did not run: ask the safety module directly
        lines = safety_cautions(comp)
        if lines:
            cautions.append("<h3>Safety</h3><pre>" + _e("\n".join(f"- {x}" for x in lines)) + "</pre>")
    top: dict[str, Any] = {}
    for a in res.analyses:
        top.update(a.top_json())
    per: dict[str, dict[str, Any]] = {i.id: {} for i in res.isomers}
    for a in res.analyses:
        for i in res.isomers:
            per[i.id].update(a.isomer_json(i.id))

    out = [f'<section id="complex-{n}"><h2>{n}. {_e(comp.formula)}</h2>']
    out.append(
        f'<p class="meta">geometry {_e(res.geometry.symbol)} ({_e(res.geometry.name)}): {_e(res.geometry_reason)}<br>'
        f"{iso_set.geometric_isomers} geometric isomer(s), {iso_set.stereoisomers} stereoisomer(s)"
        + ("" if iso_set.complete else " (list stopped at the limit)")
        + "</p>"
    )
    if res.geometry.fluxional:
        out.append(
            '<p class="meta">This polyhedron is marked fluxional: isomers may interconvert in solution on the NMR time scale.</p>'
        )
    for note in res.notes:
        out.append(f'<p class="meta">note: {_e(note)}</p>')
    out += [f'<div class="caution">{c}</div>' for c in cautions]
    header, rows = table_rows(res)
    out.append(_table_html(header, rows))
    out.append('<div class="cards">')
    for iso in res.isomers:
        data = per[iso.id]
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
        out.append(
            f'<div class="card" id="c{n}-isomer-{_e(iso.id)}"><h3>isomer {_e(iso.id)}</h3>'
            + polyhedron_svg(iso, kinds, comp.metal)
            + f"<dl>{body}</dl>"
            + f'<div class="specs">{_spectra_html(iso, rules)}</div>'
            + "</div>"
        )
    out.append("</div>")
    if "pairs" in top:
        grid = pair_grid_html([i.id for i in res.isomers], top["pairs"])
        if grid:
            out.append("<h3>Which isomer pairs can be told apart</h3>" + grid)
        else:
            out.append("<h3>Isomer pairs</h3>" + _value_html(top["pairs"]))
    for key, value in top.items():
        if key == "pairs" or (cautions and _is_caution(key)):
            continue
        out.append(f"<h3>{_e(key.replace('_', ' '))}</h3><div>{_value_html(value)}</div>")
    out += sections
    out.append("</section>")
    return "".join(out), cautions


def render_report(
    results: Iterable[Result], *, title: str = "isosieve report", rules=None, files: Sequence[str] = ()
) -> str:
    """The whole HTML page for the given results (one section per complex).

    ``rules`` is passed on to the band prediction; ``files`` lists the
    companion table files to mention in the page."""
    results = list(results)
    blocks = [_complex_html(n, res, rules)[0] for n, res in enumerate(results, 1)]
    toc = "".join(f'<li><a href="#complex-{n}">{_e(r.composition.formula)}</a></li>' for n, r in enumerate(results, 1))
    head = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{_e(title)}</title>",
        f"<style>{_CSS}</style></head><body>",
        f"<h1>{_e(title)}</h1>",
        '<p class="meta">Ideal-polyhedron isomers, point groups, stretching-mode species and predicted bands. '
        "Drawings are projections of the ideal polyhedron (dashed edges are at the back; small numbers are site numbers). "
        "Band positions come from an energy-factored force field and are estimates, not measurements.</p>",
    ]
    if files:
        head.append(
            '<p class="meta">Tables also written as: ' + ", ".join(f"<code>{_e(f)}</code>" for f in files) + "</p>"
        )
    head.append(f"<nav><ol>{toc}</ol></nav>")
    tail = [f"<footer>written by isosieve {_e(_version())}</footer></body></html>", ""]
    return "\n".join(head + blocks + tail)


def _version() -> str:
    try:
        from importlib.metadata import version

        return version("isosieve")
    except Exception:  # pragma: no cover - not installed
        return "(development)"
