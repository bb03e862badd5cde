"""Drawings as plain geometry, laid out once and drawn by two renderers.

A :class:`Scene` is a frozen description of one picture: its size in points,
one or more :class:`Panel` areas (each a data range mapped onto a rectangle
of the picture, with optional axes: ticks, tick labels, axis labels, a
title and a legend), and in them polylines (:class:`Line`), filled discs
(:class:`Disc`) and texts (:class:`Label`, typeset as runs of plain text,
subscripts and superscripts).  The layout (where every item goes, which
ticks, which legend entries) is decided where the scene is built
(:mod:`enumerator.render.drawing` for structures,
:mod:`enumerator.render.plots` for stick spectra); the renderers only map it:

* :func:`scene_svg` writes inline SVG through the Jinja2 template
  ``templates/scene.svg.j2`` (the report page puts it in its cards): no
  matplotlib, no ids, every text escaped, numbers in fixed notation, so the
  same scene gives the same bytes;
* :func:`scene_figure` draws the scene into a bare matplotlib
  :class:`~matplotlib.figure.Figure` (no pyplot), or into given axes, for
  ``--plot`` files and notebooks.

Items are drawn in order of their ``z`` (ties in the order given), as
matplotlib orders artists by ``zorder``.

>>> s = Scene(100.0, 50.0, (Panel((0.0, 0.0, 1.0, 1.0), (0.0, 1.0), (0.0, 1.0),
...     (Label(0.5, 0.5, (("text", "a<b"),)),)),))
>>> "a&lt;b" in scene_svg(s)
True
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from enumerator.caches import cached

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = [
    "Line",
    "Disc",
    "Label",
    "Key",
    "Panel",
    "Scene",
    "Runs",
    "runs",
    "nice_ticks",
    "scene_svg",
    "scene_figure",
    "mpl_runs",
    "PX_PER_PT",
]

#: CSS pixels per point (96 / 72): the SVG is as large on screen as matplotlib's picture of the same scene.
PX_PER_PT = 96 / 72

#: Typeset text: (kind, text) runs, kind 'text', 'sub' or 'sup'.
Runs = tuple[tuple[str, str], ...]


def runs(text: str) -> Runs:
    """Plain text as one run.

    Parameters
    ----------
    text : str

    Returns
    -------
    tuple of (str, str)
    """
    return (("text", text),)


@dataclass(frozen=True)
class Line:
    """A polyline in data coordinates; ``width`` and ``dash`` (on, off, ...) in points."""

    points: tuple[tuple[float, float], ...]
    colour: str = "#000000"
    width: float = 1.0
    dash: tuple[float, ...] = ()
    z: float = 2.0
    round_cap: bool = False


@dataclass(frozen=True)
class Disc:
    """A filled circle; centre and radius in data units (the panel keeps equal aspect)."""

    x: float
    y: float
    r: float
    fill: str
    edge: str = "#000000"
    width: float = 0.6
    z: float = 1.0


@dataclass(frozen=True)
class Label:
    """Text at a data point: ``anchor`` 'start', 'middle' or 'end'; ``valign`` 'center' or 'bottom'; size in
    points; ``box`` draws a rounded white box behind it."""

    x: float
    y: float
    text: Runs
    size: float = 7.0
    anchor: str = "middle"
    valign: str = "center"
    colour: str = "#000000"
    box: bool = False
    z: float = 3.0


Item = Line | Disc | Label


@dataclass(frozen=True)
class Key:
    """A legend entry: a short line ('line'), a dashed line ('dashed') or a disc ('disc') in ``colour``."""

    text: Runs
    kind: str
    colour: str
    width: float = 1.0


@dataclass(frozen=True)
class Panel:
    """A data range drawn on the rectangle ``rect`` = (left, bottom, width, height), fractions of the picture.

    ``xlim`` may run high to low (IR spectra).  With ``frame`` the panel draws its axes box, the ticks
    (``xticks``/``yticks`` as (value, label); an empty label keeps the tick without text), ``xlabel``,
    ``ylabel``, and its ``legend`` at the upper left; ``title`` goes above the panel (left-aligned with
    ``title_left``).
    """

    rect: tuple[float, float, float, float]
    xlim: tuple[float, float]
    ylim: tuple[float, float]
    items: tuple[Item, ...]
    frame: bool = False
    xticks: tuple[tuple[float, str], ...] = ()
    yticks: tuple[tuple[float, str], ...] = ()
    xlabel: Runs = ()
    ylabel: Runs = ()
    title: Runs = ()
    title_size: float = 9.0
    title_left: bool = True
    legend: tuple[Key, ...] = ()
    legend_size: float = 6.5
    tick_size: float = 10.0


@dataclass(frozen=True)
class Scene:
    """One picture: ``width`` x ``height`` points, its panels, and a row of legend keys at the bottom centre
    (``legend``, e.g. the elements of a structure)."""

    width: float
    height: float
    panels: tuple[Panel, ...]
    legend: tuple[Key, ...] = ()
    legend_size: float = 7.0
    description: str = ""


def nice_ticks(lo: float, hi: float, target: int) -> tuple[tuple[float, str], ...]:
    """Round tick values inside [lo, hi] about ``target`` steps apart, with labels to the step's precision.

    The step is the smallest of 1, 2, 2.5, 5 (times a power of ten) at least (hi - lo) / target, as
    matplotlib's ``MaxNLocator`` chooses its steps (common practice).

    Parameters
    ----------
    lo, hi : float
        The range (either order).
    target : int
        About how many intervals.

    Returns
    -------
    tuple of (float, str)

    >>> nice_ticks(0.0, 1.25, 3)
    ((0.0, '0.0'), (0.5, '0.5'), (1.0, '1.0'))
    """
    lo, hi = min(lo, hi), max(lo, hi)
    raw = (hi - lo) / max(target, 1) or 1.0
    mag = 10.0 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * mag >= raw * (1 - 1e-9))
    digits = next(d for d in range(12) if abs(round(step, d) - step) <= 1e-9 * step)  # as many as the step has
    first = math.ceil(lo / step - 1e-9)
    out = []
    k = first
    while k * step <= hi + 1e-9 * step:
        v = round(k * step, 10)
        out.append((v, f"{0.0 if v == 0 else v:.{digits}f}"))
        k += 1
    return tuple(out)


# ---------------------------------------------------------------- SVG
def _f(x: float) -> str:
    v = round(x, 1)
    return f"{0.0 if v == 0 else v:.1f}"


class _Map:
    """Data -> SVG points (y downwards) for one panel."""

    def __init__(self, scene: Scene, p: Panel):
        left, bottom, w, h = p.rect
        self.x0, self.x1 = left * scene.width, (left + w) * scene.width
        self.y0, self.y1 = (1 - bottom - h) * scene.height, (1 - bottom) * scene.height
        self.sx = (self.x1 - self.x0) / ((p.xlim[1] - p.xlim[0]) or 1.0)
        self.sy = (self.y1 - self.y0) / ((p.ylim[1] - p.ylim[0]) or 1.0)
        self.xlim, self.ylim = p.xlim, p.ylim

    def x(self, v: float) -> float:
        return self.x0 + (v - self.xlim[0]) * self.sx

    def y(self, v: float) -> float:
        return self.y1 - (v - self.ylim[0]) * self.sy


def _text_width(text: Runs, size: float) -> float:
    """Estimated width in points (0.6 em a character, 0.7 of it in a sub- or superscript)."""
    return sum(0.6 * size * len(t) * (1.0 if k == "text" else 0.7) for k, t in text)


def _svg_runs(text: Runs) -> list[tuple[str, str]]:
    """(baseline-shift, text) per run; a superscript's hyphen becomes a minus sign."""
    out = []
    for kind, t in text:
        if kind == "sup":
            out.append(("super", t.replace("-", "\u2212")))
        else:
            out.append(("sub" if kind == "sub" else "", t))
    return out


def _polyline(m: _Map, pts: Sequence[tuple[float, float]]) -> str:
    """The points of a polyline in SVG units (0.1 pt), a point dropped where it and both neighbours lie on
    one horizontal row (the flat tails of a spectrum)."""
    import numpy as np

    xy = np.asarray(pts, dtype=float).reshape(-1, 2)
    # round half to even at 0.1 pt, as _f does; adding 0.0 turns -0.0 into 0.0
    x = np.round(m.x0 + (xy[:, 0] - m.xlim[0]) * m.sx, 1) + 0.0
    y = np.round(m.y1 - (xy[:, 1] - m.ylim[0]) * m.sy, 1) + 0.0
    keep = np.ones(len(y), dtype=bool)
    if len(y) > 2:
        keep[1:-1] = ~((y[1:-1] == y[:-2]) & (y[1:-1] == y[2:]))
    return " ".join(f"{a:.1f},{b:.1f}" for a, b in zip(x[keep].tolist(), y[keep].tolist()))


def _svg_item(m: _Map, it: Item) -> dict[str, Any]:
    if isinstance(it, Line):
        return {
            "kind": "line",
            "points": _polyline(m, it.points),
            "colour": it.colour,
            "width": _f(it.width) if it.width >= 0.1 else f"{it.width:.2f}",
            "dash": " ".join(_f(d * it.width) for d in it.dash),
            "cap": "round" if it.round_cap else "butt",
        }
    if isinstance(it, Disc):
        return {
            "kind": "disc",
            "x": _f(m.x(it.x)),
            "y": _f(m.y(it.y)),
            "r": _f(it.r * abs(m.sx)),
            "fill": it.fill,
            "edge": it.edge,
            "width": _f(it.width),
        }
    x, y = m.x(it.x), m.y(it.y)
    base = y + 0.35 * it.size if it.valign == "center" else y - 0.2 * it.size
    w = _text_width(it.text, it.size)
    left = x - {"start": 0.0, "middle": w / 2, "end": w}[it.anchor]
    box = None
    if it.box:
        pad = 0.15 * it.size
        box = {
            "x": _f(left - pad),
            "y": _f(base - 0.95 * it.size - pad),
            "w": _f(w + 2 * pad),
            "h": _f(1.25 * it.size + 2 * pad),
        }
    return {
        "kind": "text",
        "x": _f(x),
        "y": _f(base),
        "size": _f(it.size),
        "anchor": it.anchor,
        "colour": it.colour,
        "runs": _svg_runs(it.text),
        "box": box,
        "rotate": False,
    }


def _svg_axes(scene: Scene, p: Panel, m: _Map) -> dict[str, Any]:
    """The frame, ticks, axis labels, title and legend of a panel, in SVG units."""
    out: dict[str, Any] = {"frame": None, "texts": [], "ticks": [], "legend": []}
    if p.frame:
        out["frame"] = {"x": _f(m.x0), "y": _f(m.y0), "w": _f(m.x1 - m.x0), "h": _f(m.y1 - m.y0)}
        for v, lab in p.xticks:
            x = m.x(v)
            out["ticks"].append((_f(x), _f(m.y1), _f(x), _f(m.y1 + 3.5)))
            if lab:
                out["texts"].append(_axis_text(x, m.y1 + 3.5 + p.tick_size, runs(lab), p.tick_size, "middle"))
        for v, lab in p.yticks:
            y = m.y(v)
            out["ticks"].append((_f(m.x0 - 3.5), _f(y), _f(m.x0), _f(y)))
            if lab:
                out["texts"].append(_axis_text(m.x0 - 5.5, y + 0.35 * p.tick_size, runs(lab), p.tick_size, "end"))
        if p.xlabel:
            y = m.y1 + 3.5 + 2.3 * p.tick_size
            out["texts"].append(_axis_text((m.x0 + m.x1) / 2, y, p.xlabel, p.tick_size, "middle"))
        if p.ylabel:
            widest = max((_text_width(runs(lab), p.tick_size) for _, lab in p.yticks), default=0.0)
            x = m.x0 - 9.5 - widest
            t = _axis_text(x, (m.y0 + m.y1) / 2, p.ylabel, p.tick_size, "middle")
            t["rotate"] = True
            out["texts"].append(t)
        out["legend"] = _svg_legend(p.legend, m.x0 + 5, m.y0 + 4, p.legend_size)
    if p.title:
        x = m.x0 if p.title_left else (m.x0 + m.x1) / 2
        out["texts"].append(
            _axis_text(x, m.y0 - 0.45 * p.title_size, p.title, p.title_size, "start" if p.title_left else "middle")
        )
    return out


def _axis_text(x: float, y: float, text: Runs, size: float, anchor: str) -> dict[str, Any]:
    return {"x": _f(x), "y": _f(y), "size": _f(size), "anchor": anchor, "runs": _svg_runs(text), "rotate": False}


def _svg_legend(keys: Sequence[Key], x: float, y: float, size: float) -> list[dict[str, Any]]:
    """Keys one under another from (x, y): a 2 em sample, then the text."""
    out = []
    for k, key in enumerate(keys):
        cy = y + (k + 0.5) * 1.4 * size
        out.append(_legend_key(key, x, cy, size))
    return out


def _legend_key(key: Key, x: float, cy: float, size: float) -> dict[str, Any]:
    return {
        "kind": key.kind,
        "x1": _f(x),
        "x2": _f(x + 2 * size),
        "cx": _f(x + 1.0 * size),
        "cy": _f(cy),
        "r": _f(0.42 * size),
        "colour": key.colour,
        "width": _f(key.width),
        "dash": _f(3 * key.width) + " " + _f(1.6 * key.width),
        "text": _axis_text(
            x + 2.2 * size if key.kind == "disc" else x + 2.6 * size, cy + 0.35 * size, key.text, size, "start"
        ),
    }


def _svg_figure_legend(scene: Scene) -> list[dict[str, Any]]:
    """The scene's bottom legend: one row, centred (at most six keys a row, further rows above)."""
    size = scene.legend_size
    rows = [scene.legend[k : k + 6] for k in range(0, len(scene.legend), 6)]
    out = []
    for r, row in enumerate(rows):
        # as matplotlib lays out a legend row: a 2 em handle, 0.2 em pad, the text, 0.8 em to the next
        widths = [3.0 * size + _text_width(k.text, size) for k in row]
        x = (scene.width - sum(widths)) / 2
        cy = scene.height - 0.9 * size - (len(rows) - 1 - r) * 1.5 * size
        for key, w in zip(row, widths):
            out.append(_legend_key(key, x, cy, size))
            x += w
    return out


def scene_svg(scene: Scene) -> str:
    """The scene as one inline ``<svg>`` element (no XML declaration, no ids, all text escaped).

    Parameters
    ----------
    scene : Scene

    Returns
    -------
    str
        The same bytes for the same scene.
    """
    panels = []
    for p in scene.panels:
        m = _Map(scene, p)
        items = sorted(p.items, key=lambda it: it.z)
        panels.append({"items": [_svg_item(m, it) for it in items], **_svg_axes(scene, p, m)})
    return _template().render(
        width=_f(scene.width),
        height=_f(scene.height),
        px_width=_f(scene.width * PX_PER_PT),
        px_height=_f(scene.height * PX_PER_PT),
        description=scene.description,
        panels=panels,
        legend=_svg_figure_legend(scene),
    )


@cached(maxsize=1)
def _template() -> Any:
    """The compiled SVG template (compiled once; Jinja2 templates are not changed by rendering)."""
    import jinja2

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("enumerator.render", "templates"),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        trim_blocks=False,
    )
    return env.get_template("scene.svg.j2")


# ---------------------------------------------------------------- matplotlib
def mpl_runs(text: Runs) -> str:
    """Runs as a matplotlib string: subscripts and superscripts in mathtext, ``$`` in the text escaped.

    Parameters
    ----------
    text : tuple of (str, str)

    Returns
    -------
    str

    >>> mpl_runs((("text", "cm"), ("sup", "-1")))
    'cm$^{-1}$'
    """
    out = []
    for kind, t in text:
        out.append(t.replace("$", "\\$") if kind == "text" else (f"$_{{{t}}}$" if kind == "sub" else f"$^{{{t}}}$"))
    return "".join(out)


def _mpl_item(ax: Axes, it: Item) -> None:
    if isinstance(it, Line):
        xs, ys = [p[0] for p in it.points], [p[1] for p in it.points]
        ls: Any = (0, it.dash) if it.dash else "-"
        cap = "round" if it.round_cap else "butt"
        ax.plot(xs, ys, color=it.colour, lw=it.width, ls=ls, zorder=it.z, solid_capstyle=cap)
    elif isinstance(it, Disc):
        from matplotlib.patches import Circle

        ax.add_patch(Circle((it.x, it.y), it.r, facecolor=it.fill, edgecolor=it.edge, lw=it.width, zorder=it.z))
    else:
        box = {"boxstyle": "round,pad=0.15", "fc": "white", "ec": "#888888", "lw": 0.5, "alpha": 0.9}
        ax.text(
            it.x,
            it.y,
            mpl_runs(it.text),
            ha={"start": "left", "middle": "center", "end": "right"}[it.anchor],
            va=it.valign,
            fontsize=it.size,
            color=it.colour,
            zorder=it.z,
            bbox=box if it.box else None,
        )


def _handles(keys: Sequence[Key]) -> list[Any]:
    from matplotlib.lines import Line2D

    out = []
    for k in keys:
        if k.kind == "disc":
            out.append(
                Line2D([], [], marker="o", ls="", markersize=6, markerfacecolor=k.colour, markeredgecolor="#000")
            )
        else:
            out.append(Line2D([], [], color=k.colour, lw=k.width, ls="--" if k.kind == "dashed" else "-"))
    return out


def _mpl_panel(ax: Axes, p: Panel) -> None:
    for it in p.items:
        _mpl_item(ax, it)
    ax.set_xlim(*p.xlim)
    ax.set_ylim(*p.ylim)
    if not p.frame:
        ax.set_aspect("equal")
        ax.axis("off")
    else:
        ax.set_xticks([v for v, _ in p.xticks], [lab for _, lab in p.xticks])
        ax.set_yticks([v for v, _ in p.yticks], [lab for _, lab in p.yticks])
        if p.xlabel:
            ax.set_xlabel(mpl_runs(p.xlabel))
        if p.ylabel:
            ax.set_ylabel(mpl_runs(p.ylabel))
        if p.legend:
            ax.legend(
                _handles(p.legend),
                [mpl_runs(k.text) for k in p.legend],
                fontsize=p.legend_size,
                loc="upper left",
                frameon=False,
            )
    if p.title:
        ax.set_title(mpl_runs(p.title), fontsize=p.title_size, loc="left" if p.title_left else "center")


def scene_figure(scene: Scene, axes: Sequence[Axes] | None = None) -> Figure:
    """The scene drawn with matplotlib: a bare Figure of the scene's size, or into ``axes`` (one per panel).

    Parameters
    ----------
    scene : Scene
    axes : sequence of matplotlib Axes, optional
        Draw the panels here instead of on a new figure (the picture's size and legend row are then the
        caller's).

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.figure import Figure

    if axes is None:
        fig = Figure(figsize=(scene.width / 72, scene.height / 72))
        axes = [fig.add_axes(p.rect) for p in scene.panels]
        if scene.legend:
            fig.legend(
                _handles(scene.legend),
                [mpl_runs(k.text) for k in scene.legend],
                loc="lower center",
                ncol=min(len(scene.legend), 6),
                fontsize=scene.legend_size,
                frameon=False,
                handletextpad=0.2,
                columnspacing=0.8,
            )
    else:
        fig = axes[0].get_figure()  # type: ignore[assignment]
    for ax, p in zip(axes, scene.panels):
        _mpl_panel(ax, p)
    return fig
