"""The self-contained HTML report for supporting information, formatted from a
:class:`~enumerator.workflow.report.Report` through a Jinja2 template.

Everything shown is computed before, by :mod:`enumerator.workflow.report`
(results, band patterns, 3D starting structures, cautions, file names,
version); this module only formats it, into ``templates/report.html.j2`` with
the screen-and-print style sheet ``templates/report.css``.  The page needs no
network: inline CSS, drawings as inline SVG, no scripts, no web fonts.

The page opens with a summary (per complex: the isomers and their point
groups, which technique tells which pairs apart, the predicted IR-active
bands, the cautions), then the details of each complex once each: the isomer
table (every column of the written tables, symbols and formulas typeset), the
pair grid, one card per isomer (a drawing, every field under a human label,
the predicted stick spectrum with axes, units and legend, and its band list),
the metal centre, the descriptor basis and the spectroscopy notes.  Drawings
of real formulas are the 3D starting structures in element colours
(:func:`enumerator.render.drawing.molecule_scene`) and the spectra are
:func:`enumerator.render.plots.spectra_scene`, both drawn as inline SVG by
:func:`enumerator.render.scene.scene_svg` (matplotlib is not imported; one
drawing per distinct spectrum, shared by the cards that show it); a letter
formula is drawn on its ideal polyhedron (:func:`polyhedron_svg`) with a
colour legend.

Jinja2 escapes every string that can come from a user (formulae, ligand names
from user rule files, labels, notes); the typeset pieces are built from escaped
text.  The same input gives byte-identical output.

>>> from enumerator.workflow.pipeline import analyse
>>> from enumerator.workflow.report import build_report
>>> page = render_report(build_report([analyse("Ma4b2", geometry="OC-6")]))
>>> page.startswith("<!DOCTYPE html>") and "<script" not in page
True
"""

from __future__ import annotations

import dataclasses
import html
import math
from collections.abc import Mapping, Sequence
from typing import Any

from markupsafe import Markup

from enumerator.analyses.centre import CentreAnalysis
from enumerator.analyses.descriptors import DescriptorAnalysis
from enumerator.analyses.safety import SafetyAnalysis
from enumerator.analyses.stretch import StretchAnalysis
from enumerator.isomers.enumeration import Isomer
from enumerator.render import tables
from enumerator.render.drawing import donor_atoms, molecule_scene
from enumerator.render.plots import spectra_scene
from enumerator.render.scene import scene_svg
from enumerator.render.sections import sections
from enumerator.render.typeset import formula_html, html_species, html_symbol, nucleus_html
from enumerator.structures.structure import Structure
from enumerator.workflow.report import ClassSpectrum, Report, ReportComplex
from enumerator.workflow.result import Result

__all__ = ["render_report", "report_files", "table_files", "polyhedron_svg", "pair_grid_html", "report_readme"]

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


# ---------------------------------------------------------------- typeset cells
_HTML_CELL = {"symbol": html_symbol, "species": html_species, "formula": formula_html}
_MAX_GRID = 12
_MAX_LISTED = 12


def _cell_html(kind: str, value: Any) -> Markup:
    text = tables.cell_text(value)
    f = _HTML_CELL.get(kind)
    return Markup(f(text) if f and text else nucleus_html(text))


def _isomer_table(res: Result) -> tuple[list[Markup], list[list[tuple[str, Markup]]]]:
    """The header and the rows of (kind, typeset cell); the kind is the cell's class (how it may wrap)."""
    df = res.to_dataframe()
    kinds = df.attrs.get("kinds", {})
    cols = [c for c in df.columns if c not in ("formula", "geometry")]
    head = [Markup(nucleus_html(c)) for c in cols]
    rows = [
        [(kinds.get(c, "text"), _cell_html(kinds.get(c, "text"), v)) for c, v in zip(cols, r)]
        for r in df[cols].itertuples(index=False, name=None)
    ]
    return head, rows


# ---------------------------------------------------------------- pieces of the summary
def _counts(res: Result) -> str:
    iso = res.isomer_set
    return f"{iso.geometric_isomers} geometric isomer(s), {iso.stereoisomers} stereoisomer(s)" + (
        "" if iso.complete else " (list stopped at the limit)"
    )


def _point_groups(res: Result) -> Markup:
    by: dict[str, list[str]] = {}
    for i in res.isomers:
        by.setdefault(i.point_group, []).append(i.id)
    parts = [f"{html_symbol(g)} ({html.escape(', '.join(ids))})" for g, ids in by.items()]
    return Markup("; ".join(parts))


def _pairs_text(pairs: Sequence[tuple[str, str]]) -> str:
    shown = ", ".join(f"{a}/{b}" for a, b in pairs[:_MAX_LISTED])
    return shown + (f" and {len(pairs) - _MAX_LISTED} more" if len(pairs) > _MAX_LISTED else "")


_TECH = {
    "IR": "IR band counts",
    "IRp": "IR band patterns (equal counts; positions or intensities predicted apart beyond the model's uncertainty)",
    "Ra": "Raman band counts (not IR)",
    "NMR": "NMR signal counts (not IR or Raman)",
}


def _telling(a: StretchAnalysis | None) -> list[str]:
    """Per technique, the pairs it is the cheapest to tell apart; the pairs no count separates."""
    if a is None or len(a.ids) < 2:
        return [] if a is None else ["only one isomer: nothing to tell apart"]
    n = len(a.ids)
    if n * (n - 1) // 2 > 2000:
        tally = a.pair_tally()
        return [f"{k}: {v} pair(s)" for k, v in sorted(tally.items())]
    by: dict[str, list[tuple[str, str]]] = {}
    for p in a.pairs():
        key = p.code
        by.setdefault(key, []).append((p.a, p.b))
    out = [f"{_TECH[k]} tell apart {len(by[k])} pair(s): {_pairs_text(by[k])}" for k in _TECH if k in by]
    if "--" in by:
        out.append(f"neither counts nor IR patterns tell apart {len(by['--'])} pair(s): {_pairs_text(by['--'])}")
    if "en" in by:
        out.append(
            f"enantiomers ({_pairs_text(by['en'])}): the same by IR, Raman and NMR in achiral media (use CD or X-ray)"
        )
    return out


def _band_cell(spec: ClassSpectrum | None) -> Markup:
    if spec is None:
        return Markup("")
    if spec.pattern is None:
        return Markup(html.escape(f"not predicted ({spec.error})"))
    bands = [b for b in spec.pattern.bands if b.ir_active]
    return Markup(
        ", ".join(f"{b.wavenumber:.0f} ({html_species(b.species or '?')})" for b in bands) or "none IR-active"
    )


def _band_rows(c: ReportComplex) -> tuple[list[str], list[list[Markup]]]:
    classes = sorted({s.reporter_class for sp in c.spectra for s in sp.classes})
    desc = c.result.analysis(DescriptorAnalysis)
    rows = []
    for iso, sp in zip(c.result.isomers, c.spectra):
        if iso.chiral and iso.id.endswith("b"):
            continue  # the mirror image has the same bands
        by = {s.reporter_class: s for s in sp.classes}
        d = desc.get(iso.id) if desc is not None else None
        label = iso.id + (f"/{iso.enantiomer}" if iso.enantiomer else "")
        rows.append(
            [Markup(html.escape(label)), Markup(html_symbol(iso.point_group)), Markup(html.escape(d.text if d else ""))]
            + [_band_cell(by.get(k)) for k in classes]
        )
    return classes, rows if classes else []


# ---------------------------------------------------------------- cards
def _structure_drawing(iso: Isomer, s: Structure, alt: str) -> Markup:
    """The structure as inline SVG (labelled for screen readers with ``alt``)."""
    atoms = donor_atoms(s, [site.position for site in iso.sites])
    units: dict[int, tuple[str, list[int]]] = {}
    for site, a in zip(iso.sites, atoms):
        units.setdefault(site.unit, (site.ligand, []))[1].append(a)
    scene = dataclasses.replace(molecule_scene(s, list(units.values())), description=alt)
    return Markup(scene_svg(scene))


def _drawing(c: ReportComplex, iso: Isomer, k: int) -> tuple[Markup, str]:
    comp = c.result.composition
    s = c.structures.structures[k] if c.structures is not None and k < len(c.structures.structures) else None
    if s is not None and s.kind == "full":
        alt = f"starting structure of isomer {iso.id} of {comp.formula}"
        caption = "Starting structure (RDKit, donors on the ideal polyhedron); hydrogen atoms left out."
        if s.note:
            caption += f" Warning: {s.note}."
        return _structure_drawing(iso, s, alt), caption
    kinds = [k.name for k in comp.kinds]
    legend = "".join(
        f'<span><i class="swatch" style="background:{_PALETTE[i % len(_PALETTE)]}"></i>{html.escape(n)}</span>'
        for i, n in enumerate(kinds)
    )
    svg = polyhedron_svg(iso, kinds, comp.metal)
    caption = "Ideal polyhedron: dashed edges are at the back, small numbers are site numbers."
    return Markup(f'{svg}<div class="legend">{legend}</div>'), caption


def _fields(iso: Isomer, res: Result) -> list[tuple[str, str]]:
    """What a card adds to the isomer table: the axes behind its Mulliken labels."""
    a = res.analysis(StretchAnalysis)
    if a is not None and iso.id in a.ids:
        return [("axes of the Mulliken labels", a.axes[a.ids.index(iso.id)])]
    return []


def _spectra(
    c: ReportComplex, k: int, iso: Isomer, descriptor: str, drawn: dict[Any, Markup] | None = None
) -> list[dict[str, Any]]:
    """The spectra of one card; ``drawn`` keeps each distinct spectrum's inline SVG, so that isomers with the
    same predicted bands (enantiomers always) share one drawing instead of laying it out again."""
    drawn = {} if drawn is None else drawn
    out: list[dict[str, Any]] = []
    for spec in c.spectra[k].classes:
        cls = spec.reporter_class
        if spec.pattern is None:
            out.append({"svg": "", "alt": f"{cls} bands not predicted: {spec.error}", "bands": []})
            continue
        # the figure names the complex and the class; the card around it names the isomer
        title = f"{c.result.composition.formula}, {cls} stretches"
        key = (title, tuple(spec.pattern.bands))
        if key not in drawn:
            drawn[key] = Markup(scene_svg(spectra_scene([(title, spec.pattern.bands)])))
        bands = [
            (
                f"{b.wavenumber:.0f}",
                Markup(html_species(b.species or "-")),
                f"{b.intensity:.2f}",
                "active" if b.ir_active else "inactive",
                "active" if b.raman_allowed else "inactive",
            )
            for b in spec.pattern.bands
        ]
        alt = f"predicted {cls} stick spectrum of isomer {iso.id}" + (f" ({descriptor})" if descriptor else "")
        out.append({"svg": drawn[key], "alt": alt, "bands": bands})
    return out


def _cards(c: ReportComplex) -> list[dict[str, Any]]:
    res = c.result
    desc = res.analysis(DescriptorAnalysis)
    cards = []
    drawn: dict[Any, Markup] = {}
    for k, iso in enumerate(res.isomers):
        d = desc.get(iso.id) if desc is not None else None
        drawing, caption = _drawing(c, iso, k)
        cards.append(
            {
                "id": iso.id,
                "group": Markup(html_symbol(iso.point_group)),
                "descriptor": d.text if d else "",
                "drawing": drawing,
                "caption": caption,
                "fields": _fields(iso, res),
                "spectra": _spectra(c, k, iso, d.text if d else "", drawn),
            }
        )
    return cards


# ---------------------------------------------------------------- details
def _lines(analysis: object, keep: int | None = None) -> list[str]:
    secs = sections(analysis)
    if keep is not None:
        secs = secs[keep : keep + 1]
    return [line.removeprefix("- ") for sec in secs for line in sec.text.splitlines() if line.strip()]


def _details(res: Result) -> dict[str, Any]:
    """The centre, descriptor and spectroscopy lines; the sections of analyses this page does not know."""
    out: dict[str, Any] = {"centre": [], "descriptors": [], "spectroscopy": [], "other": []}
    for a in res.analyses:
        if isinstance(a, CentreAnalysis):
            out["centre"] = _lines(a)
        elif isinstance(a, DescriptorAnalysis):
            out["descriptors"] = _lines(a, 0)
        elif isinstance(a, StretchAnalysis):
            secs = sections(a)
            out["spectroscopy"] = [ln for s in secs if s.title == "Spectroscopy notes" for ln in s.text.splitlines()]
        elif not isinstance(a, SafetyAnalysis):
            out["other"] += [(s.title, s.text.splitlines()) for s in sections(a)]
    return out


def _grid(res: Result) -> tuple[Markup | None, list[str]]:
    a = res.analysis(StretchAnalysis)
    if a is None or len(a.ids) < 2:
        return None, []
    if len(a.ids) <= _MAX_GRID:
        top: dict[str, Any] = {}
        for x in res.analyses:
            top.update(x.top_json())
        grid = pair_grid_html([i.id for i in res.isomers], top.get("pairs", []))
        return (Markup(grid) if grid else None), []
    tally = a.pair_tally()
    names = {"IR": "IR", "Raman": "Raman", "NMR": "NMR", "--": "no count", "en": "enantiomers (no count)"}
    lines = [f"{names.get(k, k)} first tells apart {v} pair(s)" for k, v in sorted(tally.items())]
    return None, [f"{len(a.ids)} isomers are too many for a grid: see the summary for the pairs."] + lines


def _complex_view(c: ReportComplex) -> dict[str, Any]:
    res = c.result
    head, rows = _isomer_table(res)
    classes, band_rows = _band_rows(c)
    grid, tally = _grid(res)
    return {
        "number": c.number,
        "label": c.label,
        "formula": Markup(formula_html(res.composition.formula)),
        "geometry": f"{res.geometry.symbol} ({res.geometry.name})",
        "reason": res.geometry_reason,
        "counts": _counts(res),
        "point_groups": _point_groups(res),
        "fluxional": res.geometry.fluxional,
        "notes": list(res.notes),
        "cautions": list(c.cautions),
        "telling": _telling(res.analysis(StretchAnalysis)),
        "band_classes": classes,
        "band_rows": band_rows,
        "table_head": head,
        "table_rows": rows,
        "grid": grid,
        "tally": tally,
        "cards": _cards(c),
        **_details(res),
    }


# ---------------------------------------------------------------- page
def _environment() -> Any:
    import jinja2

    return jinja2.Environment(
        loader=jinja2.PackageLoader("enumerator.render", "templates"),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        keep_trailing_newline=True,
    )


def _css() -> Markup:
    from importlib.resources import files

    return Markup((files("enumerator.render") / "templates" / "report.css").read_text(encoding="utf-8"))


def render_report(report: Report) -> str:
    """The whole HTML page of a report: the summary, then one section per complex.

    Parameters
    ----------
    report : Report
        Built by :func:`enumerator.workflow.report.build_report`.

    Returns
    -------
    str
        The page, ending in a newline.
    """
    page = (
        _environment()
        .get_template("report.html.j2")
        .render(
            title=report.title,
            css=_css(),
            files=[f for c in report.complexes for f in c.files],
            latex_packages=tables.LATEX_PACKAGES,
            complexes=[_complex_view(c) for c in report.complexes],
            version=report.version,
        )
    )
    return page if page.endswith("\n") else page + "\n"


def report_readme(report: Report) -> str:
    """README.txt of a report folder: what each file is, the safety cautions, the provenance.

    Parameters
    ----------
    report : Report

    Returns
    -------
    str
    """
    lines = [report.title, "=" * len(report.title), "", f"Written by isosieve {report.version}.", "", "Files:"]
    lines.append("  report.html  the report (self-contained; print it to PDF from a browser)")
    for c in report.complexes:
        csv_name, tex_name = c.files
        what = c.result.composition.formula + (f" ({c.label})" if c.label else "")
        lines.append(f"  {csv_name}  isomer table of {what}: plain CSV, one row per isomer (pandas.read_csv reads it)")
        lines.append(f"  {csv_name}-metadata.json  its column meanings, cautions and notes (W3C CSV on the Web)")
        lines.append(f"  {tex_name}  the same table for LaTeX; preamble: {tables.LATEX_PACKAGES}")
    cautions: list[str] = []
    for c in report.complexes:
        cautions += [x for x in c.cautions if x not in cautions]
    if cautions:
        lines += ["", "Safety:"] + [f"  - {x}" for x in cautions]
    lines += [
        "",
        "Band positions are estimates from an energy-factored force field, not measurements; isomers are on ideal",
        "polyhedra.",
    ]
    return "\n".join(lines) + "\n"


def table_files(report: Report) -> list[tuple[str, str]]:
    """Every file of the report but the page: each complex's CSV (with its sidecar) and LaTeX table, then
    README.txt.  None of them shows a 3D structure, so a report whose structures are still being embedded
    (:func:`enumerator.workflow.report.pending_report`) gives the same files.

    The tables are the ones ``isosieve isomers --format csv|latex`` writes
    (:func:`enumerator.render.tables.csv`, :func:`enumerator.render.tables.latex`), from one frame per complex.

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
        res = c.result
        df = tables.frame(res)
        meta = tables.csv_metadata(
            df,
            csv_name,
            title=f"{report.title}: {res.composition.formula}" + (f" ({c.label})" if c.label else ""),
            cautions=c.cautions,
            notes=[res.geometry_reason, *res.notes],
            version=report.version,
        )
        out += [(csv_name, tables.csv(res, df)), (f"{csv_name}-metadata.json", meta), (tex_name, tables.latex(res, df))]
    out.append(("README.txt", report_readme(report)))
    return out


def report_files(report: Report) -> list[tuple[str, str]]:
    """Every file of the report: :func:`table_files`, then ``report.html`` (:func:`render_report`).

    Parameters
    ----------
    report : Report

    Returns
    -------
    list of (str, str)
        File name and text, in the order to write them.
    """
    return [*table_files(report), ("report.html", render_report(report))]
