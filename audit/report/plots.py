"""The report's figures, drawn from an :class:`~audit.results.AuditResult`.

Each figure is rendered by matplotlib (object-oriented API, SVG canvas, no
pyplot state) to an SVG string that the HTML and PDF reports inline.  Nothing
is computed here except evaluating a fitted curve (``FitRecord.model.ln_p``)
on a grid to draw it, and choosing the axis ranges.

Design choices
--------------
* A point's *source* and its *status* are two codes on two channels, so that
  neither hides the other.  The source is the marker's shape and colour: one
  pair per source, in the order the sources first appear in the data and the
  same in every figure; colours from the Okabe–Ito palette [1]_ and shapes
  all different, so that the figures survive grayscale printing and
  colour-blind readers.  The status is the marker's fill: ok = filled,
  suspect = open, rejected = open with a heavier outline and a black × over
  it (:data:`STATUS_STYLE`).  The legend names the sources and shows the three
  fills in neutral grey.  Without sources every point has one shape and
  colour and the fill alone tells the status.
* An axis spans the points the audit kept (not rejected), so that a °C value
  in a kelvin column, or a source a hundred times off, does not squash
  everything else.  Points beyond it are drawn in one shaded strip along that
  edge, at their place on the other axis and without labels (labels pinned
  to an edge pile on top of each other); one line of text in the strip gives
  their count, and the caption lists their rows.
* Text is kept as SVG ``<text>`` in DejaVu Sans (``svg.fonttype = 'none'``):
  glyph paths (``'path'``) looked the same but made WeasyPrint about 1.6×
  slower on a 200-point report (thousands of ``<use>`` nodes); DejaVu ships
  with matplotlib and with WeasyPrint's usual font set.  ``svg.hashsalt`` is
  fixed and the date omitted, and every ``id`` is prefixed with the figure's
  name, so that the output is byte-reproducible and several figures can share
  one HTML document without clashing ids.
* Each set of like shapes is one SVG ``<path>``: all the markers of a source
  and status, all the error bars of a source, all the reference diamonds
  (:func:`_merging_svg_renderer`).  WeasyPrint's layout time grows with the
  number of SVG elements, so a figure costs about the same at 20 and at 2,000
  points; every point is still drawn as a vector shape of its own.
* Labels that come from the input (source names) are escaped for mathtext
  (``$``) and shortened; matplotlib escapes them as XML.

matplotlib is imported inside the functions: importing this module is cheap.

References
----------
.. [1] M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures
   and presentations that are friendly to colorblind people" (2002/2008),
   https://jfly.uni-koeln.de/color/.
"""

from __future__ import annotations

import functools
import io
import math
import re
from dataclasses import dataclass
from typing import Any, Iterable, Mapping, Sequence

from ..results import AuditResult, PointVerdict
from ..values import all_finite as _finite
from .numbers import pressure_text

__all__ = [
    "RenderedPlot",
    "STATUS_STYLE",
    "SOURCE_MARKERS",
    "SOURCE_COLOURS",
    "render_all",
    "plot_clapeyron",
    "plot_deviation",
    "plot_enthalpy",
    "plot_triple_point",
    "safe_label",
    "source_styles",
]

#: Okabe–Ito colours
OKABE_ITO = {
    "black": "#000000", "orange": "#E69F00", "sky_blue": "#56B4E9",
    "bluish_green": "#009E73", "yellow": "#F0E442", "blue": "#0072B2",
    "vermillion": "#D55E00", "reddish_purple": "#CC79A7",
}

#: How a point's status is drawn: the fill and outline of its source's marker
#: (never the shape or colour, which name the source).  ``edge_width`` [pt];
#: ``cross``: a black × drawn over the marker.
STATUS_STYLE: dict[str, dict[str, Any]] = {
    "ok": {"filled": True, "edge_width": 0.8, "cross": False, "label": "ok"},
    "suspect": {"filled": False, "edge_width": 1.2, "cross": False, "label": "suspect"},
    "reject": {"filled": False, "edge_width": 2.1, "cross": True, "label": "rejected"},
}

#: one shape per source, cycled.  Every shape is closed, so that open and
#: filled read apart; the × is left out (it marks a rejection) and so is the
#: diamond (it marks the reference correlation in the deviation plot).
SOURCE_MARKERS = ("o", "s", "^", "v", "P", "p", "<", ">", "h", "*")
#: one colour per source, cycled (7 against 10 shapes: 70 sources before a pair
#: repeats).  Yellow is left out: an open yellow marker is barely seen on white.
SOURCE_COLOURS = (OKABE_ITO["blue"], OKABE_ITO["vermillion"], OKABE_ITO["bluish_green"],
                  OKABE_ITO["reddish_purple"], OKABE_ITO["orange"], OKABE_ITO["sky_blue"],
                  OKABE_ITO["black"])
_MARKER_AREA = 30.0  # [pt²], matplotlib's scatter size
# triangles, the star and the plus cover less of their box than a circle:
# scaled so that every source's markers look about the same size
_AREA_SCALE = {"^": 1.25, "v": 1.25, "<": 1.25, ">": 1.25, "*": 1.8, "P": 1.1, "s": 0.85}
_NEUTRAL = "#707070"  # the status key: no source's colour
_CROSS = "#000000"
_STRIP_FILL = "#ececec"

_BRANCH_LINESTYLE = {"liquid": "-", "solid": "--", "unknown": "-."}
#: at most this many row numbers are written beside flagged points per figure;
#: beyond that the figure reads as a field of numbers (the table lists them all)
MAX_ROW_LABELS = 40
#: at most this many rows of the points beyond the axes are listed in a caption
MAX_CAPTION_ROWS = 30
_FIG_SIZE = (7.2, 4.2)  # inches, before the legend below; fits an A4 text column at 100 %
# fixed margins [in] rather than a layout engine: the constrained layout
# measured every tick label again and took half the drawing time
_MARGIN_IN = {"left": 0.79, "right": 0.22, "bottom": 0.55, "top": 0.13}
#: the axes' size [pt]; kept whatever the legend's height, so that the strips'
#: thickness in data units can be worked out before anything is drawn
_AXES_PT = ((_FIG_SIZE[0] - _MARGIN_IN["left"] - _MARGIN_IN["right"]) * 72,
            (_FIG_SIZE[1] - _MARGIN_IN["bottom"] - _MARGIN_IN["top"]) * 72)
_STRIP_PT = 24.0  # thickness of a margin strip: a row of markers and a line of text
_LEGEND_ROW_PT = 14.0  # one legend row at 8 pt: text and label spacing (measured 13.6)


@dataclass(frozen=True)
class RenderedPlot:
    """One figure of the report.

    Attributes
    ----------
    key : str
        Stable name (also the prefix of the SVG's ids).
    title : str
        Caption title.
    svg : str or None
        Inline SVG markup, or ``None`` when the figure was skipped.
    note : str
        What the figure shows, or why it was skipped (one line).
    """

    key: str
    title: str
    svg: str | None
    note: str

    @property
    def drawn(self) -> bool:
        return self.svg is not None


# ---------------------------------------------------------------------------------
def render_all(result: AuditResult) -> tuple[RenderedPlot, ...]:
    """All figures of the report, in report order (skipped ones carry a note).

    There is no separate figure of the deviations by source: the deviation
    plot shows each source's points and fitted offset itself.
    """
    if result.sheet is not None:
        return plot_sheet_reference(result), plot_enthalpy(result)
    return (
        plot_clapeyron(result),
        plot_deviation(result),
        plot_enthalpy(result),
        plot_triple_point(result),
    )


# -- helpers ------------------------------------------------------------------------
def _plottable(points: Iterable[PointVerdict]) -> list[PointVerdict]:
    return [p for p in points if _finite(p.T_K, p.P_Pa) and p.T_K > 0 and p.P_Pa > 0
            and p.status in STATUS_STYLE]


def _is_flagged(p: PointVerdict) -> bool:
    return p.status in ("suspect", "reject", "unreadable") or bool(p.flags)


def safe_label(text: Any, limit: int = 28) -> str:
    """A label from the input, safe for matplotlib: ``$`` escaped, length capped."""
    s = " ".join(str(text).split())
    if len(s) > limit:
        s = s[: limit - 1] + "…"
    return s.replace("\\", "\\\\").replace("$", r"\$")


def _plain(text: Any, limit: int = 40) -> str:
    """A name from the input for a caption (HTML-escaped by the template), shortened."""
    s = " ".join(str(text).split())
    return s if len(s) <= limit else s[: limit - 1] + "…"


def _number_text(v: float, signed: bool = False) -> str:
    """``v`` to 3 significant figures with a true minus sign; only called on finite values."""
    return f"{v:{'+' if signed else ''}.3g}".replace("-", "−")


def _n_points(n: int) -> str:
    return f"{n} point" if n == 1 else f"{n} points"


def _row_key(row: Any):
    return (0, row, "") if isinstance(row, int) else (1, 0, str(row))


def _rows_text(rows: Iterable[Any]) -> str:
    """'3, 8, 45' — every row up to :data:`MAX_CAPTION_ROWS`, then 'and N more'."""
    rows = sorted(set(rows), key=_row_key)
    text = ", ".join(_plain(r, 20) for r in rows[:MAX_CAPTION_ROWS])
    more = len(rows) - MAX_CAPTION_ROWS
    return text + (f" and {more} more" if more > 0 else "")


# -- sources and statuses ------------------------------------------------------------
def source_styles(result: AuditResult) -> dict[str | None, tuple[str, str]]:
    """Marker shape and colour of each source, in the order the sources first appear.

    Parameters
    ----------
    result : AuditResult

    Returns
    -------
    dict
        Source name → (matplotlib marker, colour).  Points without a source
        are under ``None``: the only key when no point names a source, the
        last one when some do.
    """
    order = [s for s in result.dataset.sources if s]
    for p in result.points:
        if p.source and p.source not in order:  # a verdict's source missing from the dataset
            order.append(p.source)
    if not order:
        return {None: (SOURCE_MARKERS[0], SOURCE_COLOURS[0])}
    if any(not p.source for p in _plottable(result.points)):
        order.append(None)
    return {s: (SOURCE_MARKERS[i % len(SOURCE_MARKERS)], SOURCE_COLOURS[i % len(SOURCE_COLOURS)])
            for i, s in enumerate(order)}


def _style_key(styles: Mapping[str | None, tuple[str, str]], m: _Mark) -> str | None:
    """The key of ``styles`` a mark is drawn with (the first style for a source
    ``styles`` does not know, which :func:`source_styles` never leaves)."""
    return m.source if m.source in styles else next(iter(styles))


def _area(marker: str) -> float:
    return _MARKER_AREA * _AREA_SCALE.get(marker, 1.0)


def _source_name(source: str | None) -> str:
    return "no source given" if source is None else safe_label(source)


@dataclass(frozen=True)
class _Mark:
    """One point as a figure places it."""

    row: Any
    source: str | None
    status: str
    x: float
    y: float
    flagged: bool
    #: standard uncertainty in y units (0: no bar)
    u: float = 0.0
    #: deviation from the reference correlation [%], for the deviation plot
    ref: float | None = None


def _scatter_marks(ax, placed: Sequence[tuple[_Mark, float, float]],
                   styles: Mapping[str | None, tuple[str, str]]) -> None:
    """Markers: shape and colour by source, fill by status, one scatter per pair."""
    groups: dict[tuple[str | None, str], list[tuple[float, float]]] = {}
    for m, x, y in placed:
        groups.setdefault((_style_key(styles, m), m.status), []).append((x, y))
    crosses = []
    # statuses in rising severity and stacking order: a rejected marker is
    # never hidden under the filled ones around it
    for rank, (status, st) in enumerate(STATUS_STYLE.items()):
        for source, (marker, colour) in styles.items():
            xy = groups.get((source, status))
            if not xy:
                continue
            xs, ys = zip(*xy)
            # open markers are white inside, so that the error bar behind them
            # does not cross them (a crossed open circle reads like a symbol)
            ax.scatter(xs, ys, s=_area(marker), marker=marker,
                       facecolors=colour if st["filled"] else "#ffffff", edgecolors=colour,
                       linewidths=st["edge_width"], zorder=3 + 0.1 * rank)
            if st["cross"]:
                crosses.extend(xy)
    if crosses:
        xs, ys = zip(*crosses)
        ax.scatter(xs, ys, s=0.55 * _MARKER_AREA, marker="x", color=_CROSS, linewidths=1.0,
                   zorder=3.5)


def _status_handle(status: str):
    """The legend's key to a status: a neutral grey circle with the status's fill."""
    from matplotlib.lines import Line2D

    st = STATUS_STYLE[status]
    base = Line2D([], [], linestyle="none", marker="o", markersize=math.sqrt(_MARKER_AREA),
                  markerfacecolor=_NEUTRAL if st["filled"] else "#ffffff",
                  markeredgecolor=_NEUTRAL, markeredgewidth=st["edge_width"])
    if not st["cross"]:
        return base
    cross = Line2D([], [], linestyle="none", marker="x", color=_CROSS, markeredgewidth=1.0,
                   markersize=math.sqrt(0.55 * _MARKER_AREA))
    return (base, cross)  # drawn one over the other by matplotlib's tuple handler


def _point_key(styles, marks: Iterable[_Mark], dashed: Iterable[str | None] = ()) -> list:
    """Legend entries: each source drawn (a dashed line through its marker when
    its fitted offset is drawn), then each status drawn."""
    from matplotlib.lines import Line2D

    marks = list(marks)
    dashed = set(dashed)
    present = {_style_key(styles, m) for m in marks}
    entries = []
    if list(styles) != [None]:
        for source, (marker, colour) in styles.items():
            if source in present:
                handle = Line2D([], [], linestyle="--" if source in dashed else "none",
                                linewidth=1.3, color=colour, marker=marker,
                                markersize=math.sqrt(_area(marker)), markerfacecolor=colour,
                                markeredgecolor=colour,
                                markeredgewidth=STATUS_STYLE["ok"]["edge_width"])
                entries.append((handle, _source_name(source)))
    statuses = {m.status for m in marks}
    entries += [(_status_handle(s), STATUS_STYLE[s]["label"])
                for s in STATUS_STYLE if s in statuses]
    return entries


def _annotate_rows(ax, items: Sequence[tuple[float, float, Any]]) -> int:
    """Write row numbers beside flagged points; returns how many were left out.

    Call once the axis limits are final.  A label goes up-right of its point,
    else down-left, down-right or up-left, whichever first clears every label
    already written (down-left before down-right: on the falling ln p curve
    the next points lie down-right).  A label with no clear place is left out
    and counted: two numbers printed over each other read as a third.  At
    most :data:`MAX_ROW_LABELS` are written.
    """
    (x0, x1), (y0, y1) = ax.get_xlim(), ax.get_ylim()
    sx, sy = _AXES_PT[0] / (x1 - x0), _AXES_PT[1] / (y1 - y0)  # [pt per data unit]
    taken: list[tuple[float, float, float, float]] = []
    written = 0
    for x, y, row in items:
        if written == MAX_ROW_LABELS:
            break
        text = safe_label(row, 40)
        # 7.5 pt digits are about 4.8 pt wide and 5.5 pt tall: a little margin on both
        w, h = 4.9 * len(text) + 1.5, 7.5
        px, py = (x - x0) * sx, (y - y0) * sy
        for dx, dy in ((4, 4), (-4 - w, -4 - h), (4, -4 - h), (-4 - w, 4)):
            box = (px + dx, py + dy, px + dx + w, py + dy + h)
            if not any(box[0] < b[2] and b[0] < box[2] and box[1] < b[3] and b[1] < box[3]
                       for b in taken):
                taken.append(box)
                ax.annotate(text, (x, y), xytext=(dx, dy), textcoords="offset points",
                            fontsize=7.5, color="#222222", zorder=5, va="bottom", ha="left")
                written += 1
                break
    return len(items) - written


# -- figure, legend ------------------------------------------------------------------
def _place_axes(fig, legend_in: float = 0.0) -> None:
    """Figure height grown by ``legend_in`` [in] below the axes; the axes' size unchanged."""
    w, h = _FIG_SIZE[0], _FIG_SIZE[1] + legend_in
    fig.set_size_inches(w, h)
    fig.subplots_adjust(left=_MARGIN_IN["left"] / w, right=1 - _MARGIN_IN["right"] / w,
                        bottom=(_MARGIN_IN["bottom"] + legend_in) / h,
                        top=1 - _MARGIN_IN["top"] / h)


def _new_figure():
    from matplotlib.figure import Figure

    fig = Figure(figsize=_FIG_SIZE, dpi=72)  # the SVG canvas: 1 px = 1 pt
    ax = fig.add_subplot()
    _place_axes(fig)
    ax.grid(True, color="#d9d9d9", linewidth=0.6)
    ax.set_axisbelow(True)
    return fig, ax


def _legend_below(fig, ax, entries: Sequence[tuple[Any, str]]) -> None:
    """The legend under the axes, in as many columns as the labels allow.

    Inside the axes a legend naming several sources, the three statuses and
    the curves covers a good part of the points whatever corner it takes, so
    the figure grows downward to hold it instead.
    """
    entries = list(entries) + list(zip(*ax.get_legend_handles_labels()))
    if not entries:
        return
    handles, labels = zip(*entries)
    # label widths estimated (about 5 pt a character at 8 pt, plus the handle
    # and column gap) rather than measured: measuring text costs a draw pass
    entry_pt = 42 + 5.0 * max(len(lab) for lab in labels)
    ncols = max(1, min(4, len(entries), int((_FIG_SIZE[0] * 72 - 24) // entry_pt)))
    rows = -(-len(entries) // ncols)
    # the rows, the legend's inner padding and its gap below the anchor (about 11 pt)
    legend_in = (rows * _LEGEND_ROW_PT + 16) / 72
    _place_axes(fig, legend_in)
    fig.legend(handles, labels, loc="upper center", ncols=ncols, frameon=False,
               bbox_to_anchor=(0.5, legend_in / (_FIG_SIZE[1] + legend_in)),
               handletextpad=0.5, columnspacing=1.6)


# -- axes that span the kept points, with strips for the rest -------------------------
@dataclass(frozen=True)
class _Box:
    """The data range the axes show at full scale [data units]."""

    x0: float
    x1: float
    y0: float
    y1: float

    def side(self, x: float, y: float) -> str:
        """Where a point lies: 'in', or the strip it goes to ('above', 'below', 'left', 'right').

        Beyond in y wins over beyond in x: the deviation (or pressure) is what
        the reader looks for first; the other coordinate is then held at the edge.
        """
        if y > self.y1:
            return "above"
        if y < self.y0:
            return "below"
        if x < self.x0:
            return "left"
        if x > self.x1:
            return "right"
        return "in"


def _span(values: Sequence[float], pad: float = 0.06) -> tuple[float, float]:
    lo, hi = min(values), max(values)
    margin = pad * (hi - lo) if hi > lo else max(abs(lo) * 0.05, 1.0)
    return lo - margin, hi + margin


@dataclass(frozen=True)
class _Frame:
    """The box, the strips in use and where every mark is drawn."""

    box: _Box
    #: (mark, x drawn, y drawn, side) for every mark
    placed: tuple[tuple[_Mark, float, float, str], ...]
    #: thickness of a strip along x and along y [data units]
    band_x: float
    band_y: float

    @property
    def beyond(self) -> dict[str, list[_Mark]]:
        out: dict[str, list[_Mark]] = {}
        for m, _, _, side in self.placed:
            if side != "in":
                out.setdefault(side, []).append(m)
        return out

    def inside(self) -> list[tuple[_Mark, float, float]]:
        return [(m, x, y) for m, x, y, side in self.placed if side == "in"]


# markers sit in the strip's inner part, its text in the outer part: they never overlap
_STRIP_MARKER_AT, _STRIP_TEXT_AT = 0.33, 0.74


def _frame(box: _Box, marks: Sequence[_Mark]) -> _Frame:
    """Where each mark is drawn: at its place inside the box, else in a strip."""
    sides = [box.side(m.x, m.y) for m in marks]
    n_y = len({"above", "below"} & set(sides))
    n_x = len({"left", "right"} & set(sides))
    # the strips take a fixed thickness [pt] from the axes; the box gets the rest
    band_y = (box.y1 - box.y0) * _STRIP_PT / (_AXES_PT[1] - n_y * _STRIP_PT)
    band_x = (box.x1 - box.x0) * _STRIP_PT / (_AXES_PT[0] - n_x * _STRIP_PT)
    # a coordinate also beyond the box is held a little inside it, so that the
    # axes' clip does not halve the marker
    ix, iy = 0.012 * (box.x1 - box.x0), 0.012 * (box.y1 - box.y0)
    placed = []
    for m, side in zip(marks, sides):
        x = m.x if box.x0 <= m.x <= box.x1 else min(max(m.x, box.x0 + ix), box.x1 - ix)
        y = m.y if box.y0 <= m.y <= box.y1 else min(max(m.y, box.y0 + iy), box.y1 - iy)
        if side == "above":
            y = box.y1 + _STRIP_MARKER_AT * band_y
        elif side == "below":
            y = box.y0 - _STRIP_MARKER_AT * band_y
        elif side == "left":
            x = box.x0 - _STRIP_MARKER_AT * band_x
        elif side == "right":
            x = box.x1 + _STRIP_MARKER_AT * band_x
        placed.append((m, x, y, side))
    return _Frame(box, tuple(placed), band_x, band_y)


def _draw_frame(ax, frame: _Frame, text_for: Mapping[str, str]) -> None:
    """Axis limits, the shaded strips with their text, and ticks on the box only.

    ``text_for[side]`` is the strip's text, '{n}' standing for its count of points.
    """
    from matplotlib.ticker import FixedLocator, MaxNLocator

    box, beyond = frame.box, frame.beyond
    bx, by = frame.band_x, frame.band_y
    x0, x1 = box.x0 - bx * ("left" in beyond), box.x1 + bx * ("right" in beyond)
    y0, y1 = box.y0 - by * ("below" in beyond), box.y1 + by * ("above" in beyond)
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    edge = {"color": "#9a9a9a", "linewidth": 0.6, "linestyle": (0, (3, 2)), "zorder": 0.7}
    text = {"fontsize": 7.5, "color": "#333333", "zorder": 5, "va": "center"}
    for side, marks in sorted(beyond.items()):
        label = text_for[side].format(n=_n_points(len(marks)))
        if side in ("above", "below"):
            lo, hi = (box.y1, y1) if side == "above" else (y0, box.y0)
            ax.axhspan(lo, hi, color=_STRIP_FILL, linewidth=0, zorder=0.6)
            ax.axhline(box.y1 if side == "above" else box.y0, **edge)
            at = box.y1 + _STRIP_TEXT_AT * by if side == "above" else box.y0 - _STRIP_TEXT_AT * by
            ax.text(0.008, at, label, transform=ax.get_yaxis_transform(), ha="left", **text)
        else:
            lo, hi = (x0, box.x0) if side == "left" else (box.x1, x1)
            ax.axvspan(lo, hi, color=_STRIP_FILL, linewidth=0, zorder=0.6)
            ax.axvline(box.x0 if side == "left" else box.x1, **edge)
            at = box.x0 - _STRIP_TEXT_AT * bx if side == "left" else box.x1 + _STRIP_TEXT_AT * bx
            ax.text(at, 0.5, label, transform=ax.get_xaxis_transform(), ha="center",
                    rotation=90, **text)
    # ticks only along the box: a tick inside a strip would give its markers a
    # value they do not have
    for axis, lo, hi, strips in ((ax.xaxis, box.x0, box.x1, bx * (x1 - x0 > box.x1 - box.x0)),
                                 (ax.yaxis, box.y0, box.y1, by * (y1 - y0 > box.y1 - box.y0))):
        if strips:
            tol = 1e-9 * (hi - lo)
            ticks = [t for t in MaxNLocator(nbins=7).tick_values(lo, hi)
                     if lo - tol <= t <= hi + tol]
            axis.set_major_locator(FixedLocator(ticks))


def _strip_note(frame: _Frame, names: Mapping[str, str]) -> str:
    """The caption's account of the points beyond the axes: count, strips, rows."""
    beyond = frame.beyond
    total = sum(len(v) for v in beyond.values())
    if not total:
        return ""
    rows = _rows_text(m.row for v in beyond.values() for m in v)
    order = [s for s in ("above", "below", "left", "right") if s in beyond]
    if len(order) == 1:
        where = f"the axis, drawn without labels in the shaded {names[order[0]]} strip"
    else:
        where = ("the axes, drawn without labels in the shaded strips ("
                 + ", ".join(f"{len(beyond[s])} in the {names[s]}" for s in order) + ")")
    return f"; {_n_points(total)} beyond {where}: row{'s' if total > 1 else ''} {rows}"


def _clipped(x, y, box: _Box):
    """A curve with its vertices outside the box masked (NaN), so that it stops at the strips."""
    import numpy as np

    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    out = (x < box.x0) | (x > box.x1) | (y < box.y0) | (y > box.y1)
    return x, np.where(out, np.nan, y)
def _to_svg(fig, key: str) -> str:
    import matplotlib

    buf = io.StringIO()
    width, height = fig.get_size_inches()
    # drawn straight onto the SVG renderer (what savefig does, less the
    # raster-mixing wrapper: no artist here is rasterized)
    with matplotlib.rc_context(_RC | {"svg.hashsalt": f"vpaudit-{key}"}):
        renderer = _merging_svg_renderer()(
            width * 72, height * 72, buf, image_dpi=72,
            metadata={"Date": None, "Creator": None, "Format": None, "Type": None})
        fig.draw(renderer)
        renderer.finalize()
    return _clean_svg(buf.getvalue(), key)


@functools.cache
def _merging_svg_renderer():
    """matplotlib's SVG renderer, writing each uniformly styled set of shapes as one path.

    The stock renderer writes one ``<use>`` per marker, one element per member
    of a collection (each error bar) and a ``<g>`` around every artist.
    WeasyPrint parses, styles, clips and draws every SVG element on its own, so
    a 2,000-point report (some 20,000 elements in its figures) took over ten
    seconds to lay out.  Here all the markers of a line, and all the members of
    a collection that share one colour and line style, become a single
    ``<path>``, and the artists' groups (which carry nothing but an id) are
    left out.  The shapes, places and stacking order between artists are those
    of the stock renderer; within one set all fills are painted before all
    outlines, which only shows where markers of one set overlap.
    """
    import inspect

    import numpy as np
    from matplotlib.backends.backend_svg import RendererSVG
    from matplotlib.path import Path
    from matplotlib.transforms import IdentityTransform

    # recent matplotlib releases pass hatch colours through the collection
    # calls; older ones do not accept the argument
    takes_hatchcolors = "hatchcolors" in inspect.signature(RendererSVG._iter_collection).parameters

    def hatch_kw(hatchcolors):
        return {"hatchcolors": [] if hatchcolors is None else hatchcolors} if takes_hatchcolors else {}

    def codes_of(path):
        if path.codes is not None:
            return path.codes
        codes = np.full(len(path.vertices), Path.LINETO, dtype=Path.code_type)
        codes[:1] = Path.MOVETO
        return codes

    class MergingRendererSVG(RendererSVG):
        def open_group(self, s, gid=None):
            pass

        def close_group(self, s):
            pass

        def _draw_merged(self, gc, pieces, rgbFace):
            merged = Path(np.concatenate([v for v, _ in pieces]),
                          np.concatenate([c for _, c in pieces]))
            # simplification could drop a short error-bar cap merged into a long path
            merged.should_simplify = False
            self.draw_path(gc, merged, IdentityTransform(), rgbFace)

        def draw_markers(self, gc, marker_path, marker_trans, path, trans, rgbFace=None):
            at = np.array([v[-2:] for v, _ in path.iter_segments(trans, simplify=False)
                           if len(v)], dtype=float).reshape(-1, 2)
            at = at[np.isfinite(at).all(axis=1)]
            if not len(at):
                return
            shape = marker_trans.transform(marker_path.vertices)
            verts = (shape[None, :, :] + at[:, None, :]).reshape(-1, 2)
            self._draw_merged(gc, [(verts, np.tile(codes_of(marker_path), len(at)))], rgbFace)

        def draw_path_collection(self, gc, master_transform, paths, all_transforms, offsets,
                                 offset_trans, facecolors, edgecolors, linewidths, linestyles,
                                 antialiaseds, urls, offset_position, *, hatchcolors=None):
            uniform = (all(len(v) <= 1 for v in (facecolors, edgecolors, linewidths, linestyles))
                       and all(u is None for u in urls) and gc.get_hatch() is None)
            if not uniform:
                return super().draw_path_collection(
                    gc, master_transform, paths, all_transforms, offsets, offset_trans,
                    facecolors, edgecolors, linewidths, linestyles, antialiaseds, urls,
                    offset_position, **hatch_kw(hatchcolors))
            raw = [(t.transform(p.vertices), codes_of(p)) for p, t in
                   self._iter_collection_raw_paths(master_transform, paths, all_transforms)]
            pieces, style = [], None
            for xo, yo, i, gc0, face in self._iter_collection(
                    gc, range(len(raw)), offsets, offset_trans, facecolors, edgecolors,
                    linewidths, linestyles, antialiaseds, urls, offset_position,
                    **hatch_kw(hatchcolors)):
                if style is None:  # uniform: the first member's style is every member's
                    style = self.new_gc(), face
                    style[0].copy_properties(gc0)
                pieces.append((raw[i][0] + (xo, yo), raw[i][1]))
            if style is not None:
                self._draw_merged(style[0], pieces, style[1])
                style[0].restore()

    return MergingRendererSVG


_RC = {
    "svg.fonttype": "none",
    "svg.image_inline": True,
    "font.family": "DejaVu Sans",
    "font.size": 9.5,
    "axes.titlesize": 10,
    "legend.fontsize": 8,
    "path.simplify": True,
}


def _clean_svg(svg: str, key: str) -> str:
    """Inline-ready SVG: no prolog/DOCTYPE/metadata/comments, ids prefixed with ``key``."""
    svg = re.sub(r"^<\?xml[^>]*\?>\s*", "", svg)
    svg = re.sub(r"<!DOCTYPE[^>]*>\s*", "", svg)
    svg = re.sub(r"<metadata>.*?</metadata>\s*", "", svg, flags=re.S)
    # matplotlib writes each text as a comment beside its glyph paths; the text
    # may come from the input, and the page needs no comments
    svg = re.sub(r"<!--.*?-->\s*", "", svg, flags=re.S)
    # ids are matched after a space, not a word boundary: ten times faster on
    # the megabytes of path data of a 2,000-point figure
    ids = set(re.findall(r'\sid="([^"]+)"', svg))

    def rename(match: re.Match) -> str:
        ref = match.group(2)
        return f"{match.group(1)}{key}-{ref}" if ref in ids else match.group(0)

    svg = re.sub(r'(\sid=")([^"]+)(?=")', rename, svg)
    svg = re.sub(r'(href="#)([^"]+)(?=")', rename, svg)
    svg = re.sub(r"(url\(#)([^)]+)(?=\))", rename, svg)
    svg = svg.replace("<svg ", f'<svg role="img" aria-labelledby="{key}-caption" class="plot" ', 1)
    # Defence in depth: the figure is inserted unescaped into the report, so it
    # must not carry anything active or any reference that a viewer would fetch.
    # Text content is inert (matplotlib escapes it as XML) and may legitimately
    # show input such as 'file:///…' as a legend label: check tags and attributes.
    lowered = re.sub(r">[^<]*<", "><", svg).lower()
    for forbidden in ("<script", "<foreignobject", "<image", "javascript:", "file:", "href=\"http"):
        if forbidden in lowered:
            raise ValueError(f"refusing to inline an SVG containing {forbidden!r}")
    return svg.strip()


def _fit_curve(fit, T_lo: float, T_hi: float, n: int = 200):
    """(T, ln p) of a fitted equation on [T_lo, T_hi], or None when it cannot be evaluated."""
    import numpy as np

    model = getattr(fit, "model", None)
    if model is None or not (_finite(T_lo, T_hi) and 0 < T_lo < T_hi):
        return None
    T = np.linspace(T_lo, T_hi, n)
    try:
        with np.errstate(all="ignore"):
            y = np.asarray(model.ln_p(T), dtype=float)
    except (ValueError, ArithmeticError, TypeError):
        return None
    ok = np.isfinite(y)
    if ok.sum() < 2:
        return None
    return T[ok], y[ok]


# -- 1. ln p vs 1000/T ------------------------------------------------------------------
def plot_clapeyron(result: AuditResult) -> RenderedPlot:
    """ln(p/Pa) against 1000 K/T: points by source and status, fitted curves by
    branch, the reference correlation when present; flagged points carry their row."""
    import numpy as np

    key, title = "clapeyron", "Clausius–Clapeyron plot"
    pts = _plottable(result.points)
    if not pts:
        return RenderedPlot(key, title, None, "no readable points with T > 0 and p > 0 to draw")
    styles = source_styles(result)
    marks = [_Mark(p.row, p.source or None, p.status, 1000.0 / p.T_K, math.log(p.P_Pa),
                   _is_flagged(p)) for p in pts]
    kept = [m for m in marks if m.status != "reject"] or marks
    frame = _frame(_Box(*_span([m.x for m in kept]), *_span([m.y for m in kept])), marks)
    box = frame.box
    fig, ax = _new_figure()
    for fit in result.fits:
        curve = _fit_curve(fit, *fit.T_range_K)
        if curve is None:
            continue
        T, y = curve
        style = "-" if fit.recommended else ":"
        ax.plot(*_clipped(1000.0 / T, y, box), color="#000000", linewidth=1.1,
                linestyle=_BRANCH_LINESTYLE.get(fit.branch, style) if fit.recommended else style,
                label=f"fit, {fit.branch} ({safe_label(fit.equation, 20)})", zorder=2)
    ref = (result.plot_data or {}).get("reference") or {}
    for branch, curve in (ref.get("curves") or {}).items():
        T = np.asarray(curve.get("T_K", ()), dtype=float)
        P = np.asarray(curve.get("P_Pa", ()), dtype=float)
        ok = np.isfinite(T) & np.isfinite(P) & (T > 0) & (P > 0)
        if ok.sum() >= 2:
            ax.plot(*_clipped(1000.0 / T[ok], np.log(P[ok]), box), color="#888888",
                    linewidth=2.2, alpha=0.6, linestyle="-", zorder=1,
                    label=f"reference, {safe_label(branch, 12)}: {safe_label(ref.get('name', ''), 24)}")
    inside = frame.inside()
    _scatter_marks(ax, [(m, x, y) for m, x, y, _ in frame.placed], styles)
    # along x a strip on the left holds the hot end, on the right the cold end:
    # the text is turned a quarter to the left, so ▲ points left and ▼ right
    _draw_frame(ax, frame, {
        "above": f"▲ {{n}} above p = {pressure_text(math.exp(box.y1), 3)}",
        "below": f"▼ {{n}} below p = {pressure_text(math.exp(box.y0), 3)}",
        "left": f"▲ {{n}} above T = {_number_text(1000.0 / box.x0)} K",
        "right": f"▼ {{n}} below T = {_number_text(1000.0 / box.x1)} K"})
    left_out = _annotate_rows(ax, [(x, y, m.row) for m, x, y in inside if m.flagged])
    ax.set_xlabel("1000 K / T")
    ax.set_ylabel("ln(p/Pa)")
    _legend_below(fig, ax, _point_key(styles, marks))
    by_source = "colour and shape: source; " if list(styles) != [None] else ""
    note = (f"points as printed ({by_source}fill: status); lines are the fitted equations; "
            "flagged points carry their row number"
            + _strip_note(frame, {"above": "upper", "below": "lower", "left": "left (hot)",
                                  "right": "right (cold)"})
            + (f"; {left_out} flagged rows not labelled, to keep the labels apart"
               if left_out else ""))
    return RenderedPlot(key, title, _to_svg(fig, key), note)


# -- 2. relative deviation vs T, as printed ---------------------------------------------
#: a point or offset line stays on the deviation axis while covering it leaves
#: the consensus points at least 1/_SQUASH of the half-height (see _deviation_limit)
_SQUASH = 5.0


def _deviation_marks(points: Iterable[PointVerdict]) -> list[_Mark]:
    """The deviation plot's points: x = T [K], y = deviation as printed [%].

    y is ``PointVerdict.printed_deviation_percent``: 100·(p − p_fit)/p_fit of
    the point as the input prints it, its source's fitted offset *not*
    removed, so that a source that is off shows where it lies; ``u`` is the
    point's standard uncertainty [%].  Points without a finite deviation (not
    judged) are left out.
    """
    out = []
    for p in _plottable(points):
        y = p.printed_deviation_percent
        if not _finite(y):
            continue
        u = p.u_percent if _finite(p.u_percent) and p.u_percent > 0 else 0.0
        ref = p.reference_deviation_percent if _finite(p.reference_deviation_percent) else None
        out.append(_Mark(p.row, p.source or None, p.status, p.T_K, y, _is_flagged(p), u, ref))
    return out


def _offset_lines(points: Iterable[PointVerdict]
                  ) -> dict[str, tuple[tuple[float, ...], tuple[float, ...]]]:
    """Each source's fitted offset as a line: source → (T [K], offset [%]) sorted by T.

    The offset is ``PointVerdict.source_offset_percent`` of the source's points
    that are not rejected (a rejected point's T may be the very fault, e.g. °C
    in a kelvin column): constant for a pressure-scale offset, varying with T
    for a thermometer offset.  Only sources with a nonzero offset.
    """
    by: dict[str, list[tuple[float, float]]] = {}
    for p in _plottable(points):
        if p.source and p.status != "reject" and _finite(p.source_offset_percent):
            by.setdefault(p.source, []).append((p.T_K, float(p.source_offset_percent)))
    return {s: tuple(zip(*sorted(v))) for s, v in by.items() if any(o != 0.0 for _, o in v)}


def _source_offsets(points: Iterable[PointVerdict]) -> dict[str, list[float]]:
    """Source → the nonzero fitted offsets [%] of all its points, rejected ones included."""
    out: dict[str, list[float]] = {}
    for p in points:
        if p.source and _finite(p.source_offset_percent) and p.source_offset_percent != 0:
            out.setdefault(p.source, []).append(float(p.source_offset_percent))
    return out


def _offset_text(offset: float) -> str:
    """'+20 %', or as a factor ('×100') beyond a doubling or a halving, where
    per cent no longer read well."""
    if offset >= 100 or offset <= -50:
        return f"×{_number_text(1 + offset / 100)}"
    return f"{_number_text(offset, True)} %"


def _deviation_limit(marks: Sequence[_Mark],
                     lines: Mapping[str, tuple[Sequence[float], Sequence[float]]]) -> float:
    """Half-height of the deviation axis [%].

    The axis always covers the points the consensus accepted as they are (ok,
    and of a source with no offset), bars included: their scatter is what the
    fit is judged by.  It is widened to cover each other kept point and each
    offset line as long as that leaves those accepted points at least 1/5 of
    the half-height (about 25 pt); a source tens of per cent (or a factor of
    100) off would otherwise flatten them to a line.  What is not covered goes
    to the margin strips, counted and listed in the caption.  Rejected points
    never set the range.
    """
    kept = [m for m in marks if m.status != "reject"]
    accepted = ([m for m in kept if m.status == "ok" and m.source not in lines]
                or kept or list(marks))
    # a floor of 0.05 %: a perfect synthetic table must still get a readable axis
    base = max(max(abs(m.y) + m.u for m in accepted), 0.05)
    reach = [abs(m.y) + m.u for m in kept] + [abs(o) for _, off in lines.values() for o in off]
    return _round_up(1.1 * max([base] + [r for r in reach if r <= _SQUASH * base]))


def _round_up(v: float) -> float:
    """``v`` > 0 rounded up to two significant figures: the strips' text then
    reads '+2.6 %', not '+2.59 %'."""
    step = 10.0 ** (math.floor(math.log10(v)) - 1)
    return round(math.ceil(v / step - 1e-9) * step, 12)


def plot_deviation(result: AuditResult) -> RenderedPlot:
    """100·(p − p_fit)/p_fit of the points as printed against T, with their
    standard uncertainties, each source's fitted offset as a line in its
    colour, and the deviation from the reference correlation when one is used."""
    key, title = "deviation", "Deviation from the consensus fit"
    marks = _deviation_marks(result.points)
    if not marks:
        return RenderedPlot(key, title, None,
                            "not drawn: no point has a deviation from a fitted equation "
                            "(no fit was made)")
    styles = source_styles(result)
    lines = _offset_lines(result.points)
    limit = _deviation_limit(marks, lines)
    kept = [m for m in marks if m.status != "reject"] or marks
    frame = _frame(_Box(*_span([m.x for m in kept]), -limit, limit), marks)
    box = frame.box
    fig, ax = _new_figure()
    ax.axhline(0.0, color="#000000", linewidth=0.8, zorder=1)
    inside = frame.inside()
    for source, (_, colour) in styles.items():
        bars = [(x, y, m.u) for m, x, y in inside
                if _style_key(styles, m) == source and m.u > 0]
        if bars:
            xs, ys, us = zip(*bars)
            # cut at the box: a bar must not reach into a strip
            ax.errorbar(xs, ys, yerr=[[min(u, y - box.y0) for y, u in zip(ys, us)],
                                      [min(u, box.y1 - y) for y, u in zip(ys, us)]],
                        fmt="none", ecolor=colour, elinewidth=0.8, capsize=2, alpha=0.8, zorder=2)
    drawn_lines, off_axis = [], []
    for source, (T, off) in lines.items():
        colour = styles.get(source, styles.get(None, (None, "#000000")))[1]
        if len(T) == 1:  # one kept point: a short level mark rather than no line
            T, off = (T[0] - 0.01 * (box.x1 - box.x0), T[0] + 0.01 * (box.x1 - box.x0)), off * 2
        xs, ys = _clipped(T, off, box)
        if any(math.isfinite(v) for v in ys):
            ax.plot(xs, ys, color=colour, linestyle=(0, (5, 2.5)), linewidth=1.4, zorder=2.5)
            drawn_lines.append(source)
    # every source whose offset is (partly) off the axis is named with it, also
    # one whose points were all rejected and so has no line
    for source, off in _source_offsets(result.points).items():
        if any(abs(o) > limit for o in off):
            lo, hi = min(off), max(off)
            span = _offset_text(lo) if lo == hi else f"{_offset_text(lo)} to {_offset_text(hi)}"
            off_axis.append(f"{_plain(source)} ({span})")
    ref_in = [(x, m.ref) for m, x, _ in inside if m.ref is not None and abs(m.ref) <= limit]
    n_ref = sum(m.ref is not None for m in marks)
    ref_note = ""
    if ref_in:
        name = ((result.plot_data or {}).get("reference") or {}).get("name") or "reference"
        ax.scatter(*zip(*ref_in), marker="D", s=14, facecolors="none", edgecolors="#777777",
                   linewidths=0.9, zorder=2, label=f"vs {safe_label(name, 30)}")
        ref_note = "; open grey diamonds: deviation from the reference correlation"
        if n_ref > len(ref_in):
            ref_note += f" ({n_ref - len(ref_in)} beyond the axis not drawn)"
    _scatter_marks(ax, [(m, x, y) for m, x, y, _ in frame.placed], styles)
    _draw_frame(ax, frame, {
        "above": f"▲ {{n}} above {_number_text(box.y1, True)} %",
        "below": f"▼ {{n}} below {_number_text(box.y0, True)} %",
        "left": f"▲ {{n}} below T = {_number_text(box.x0)} K",
        "right": f"▼ {{n}} above T = {_number_text(box.x1)} K"})
    left_out = _annotate_rows(ax, [(x, y, m.row) for m, x, y in inside if m.flagged])
    ax.set_xlabel("T / K")
    ax.set_ylabel("100·(p − p_fit)/p_fit")
    _legend_below(fig, ax, _point_key(styles, marks, drawn_lines))
    sourced = list(styles) != [None]
    note = ("points as printed, against the consensus fit of their branch"
            + ("; colour and shape: source; fill: status" if sourced else "; fill: status")
            + "; bars: the points' standard uncertainties"
            + ("; dashed line in a source's colour: the offset the consensus fitted to that "
               "source and removed before judging its points" if drawn_lines else "")
            + (f"; fitted offset beyond the axis: {'; '.join(off_axis)}" if off_axis else "")
            + ref_note
            + _strip_note(frame, {"above": "upper", "below": "lower", "left": "left",
                                  "right": "right"})
            + (f"; {left_out} flagged rows not labelled, to keep the labels apart"
               if left_out else ""))
    return RenderedPlot(key, title, _to_svg(fig, key), note)


# -- 3. implied enthalpy -----------------------------------------------------------------
def plot_enthalpy(result: AuditResult) -> RenderedPlot:
    """ΔH implied by the fitted equations against T, with its standard-uncertainty
    band, and the local (moving-window) estimates when present."""
    key, title = "enthalpy", "Implied enthalpy of vaporization / sublimation"
    values = [e for e in result.enthalpy if _finite(e.T_K, e.dH_J_per_mol)]
    local = [d for d in ((result.plot_data or {}).get("local_enthalpy") or ())
             if _finite(d.get("T_K"), d.get("dH_J_per_mol"))]
    if not values and not local:
        return RenderedPlot(key, title, None, "not drawn: the audit derived no enthalpy")
    fig, ax = _new_figure()
    branch_colour = {"liquid": OKABE_ITO["blue"], "solid": OKABE_ITO["bluish_green"],
                     "unknown": OKABE_ITO["reddish_purple"]}
    for branch in sorted({e.branch for e in values}):
        sel = sorted((e for e in values if e.branch == branch), key=lambda e: e.T_K)
        colour = branch_colour.get(branch, "#444444")
        T = [e.T_K for e in sel]
        H = [e.dH_J_per_mol / 1000 for e in sel]
        kind = "corrected" if all(e.real_gas_corrected for e in sel) else "apparent"
        u = [e.u_dH_J_per_mol / 1000 if _finite(e.u_dH_J_per_mol) else 0.0 for e in sel]
        if len(sel) >= 2:
            ax.plot(T, H, color=colour, linewidth=1.4, linestyle=_BRANCH_LINESTYLE.get(branch, "-"),
                    label=f"{branch}, from fit ({kind})")
            if any(u):
                ax.fill_between(T, [h - d for h, d in zip(H, u)], [h + d for h, d in zip(H, u)],
                                color=colour, alpha=0.18, linewidth=0, label=f"{branch}, ± u")
        else:
            ax.errorbar(T, H, yerr=u if any(u) else None, fmt="s", color=colour, capsize=3,
                        label=f"{branch}, from fit ({kind})")
        apparent = [(e.T_K, e.dH_apparent_J_per_mol / 1000) for e in sel
                    if e.real_gas_corrected and _finite(e.dH_apparent_J_per_mol)]
        if len(apparent) >= 2:
            ax.plot(*zip(*apparent), color=colour, linewidth=0.9, linestyle=":",
                    label=f"{branch}, apparent (ideal gas)")
    for branch in sorted({str(d.get("branch", "unknown")) for d in local}):
        sel = [d for d in local if str(d.get("branch", "unknown")) == branch]
        err = [d.get("u_dH_J_per_mol") / 1000 if _finite(d.get("u_dH_J_per_mol")) else 0.0
               for d in sel]
        ax.errorbar([d["T_K"] for d in sel], [d["dH_J_per_mol"] / 1000 for d in sel],
                    yerr=err if any(err) else None, fmt="o", markersize=4, mfc="white",
                    color=branch_colour.get(branch, "#444444"), elinewidth=0.8, capsize=2,
                    label=f"{safe_label(branch, 12)}, local windows")
    ax.set_xlabel("T / K")
    ax.set_ylabel("ΔH / (kJ mol⁻¹)")
    ax.legend(loc="best", frameon=True, framealpha=0.9)
    return RenderedPlot(key, title, _to_svg(fig, key),
                        "lines: enthalpy implied by the fitted equation; band: ± standard "
                        "uncertainty; open circles: estimates from local windows of points")


# -- 4. triple point ---------------------------------------------------------------------
def _reference_triple(ref) -> tuple[float | None, float | None, str]:
    if not ref:
        return None, None, ""
    T = ref.get("T_K")
    P = ref.get("P_Pa")
    name = ref.get("name") or ref.get("source") or "reference"
    return (T if _finite(T) else None), (P if _finite(P) else None), str(name)


def plot_triple_point(result: AuditResult) -> RenderedPlot:
    """Zoom on the crossing of the solid and liquid branches (the triple point)."""
    key, title = "triple", "Triple point: crossing of the branches"
    tp = result.triple_point
    if tp is None or not _finite(tp.T_K, tp.P_Pa) or tp.T_K <= 0 or tp.P_Pa <= 0:
        return RenderedPlot(key, title, None, "not drawn: no triple point was estimated")
    half = max(0.06 * tp.T_K, 5.0)  # a window that shows both branches' slopes
    lo, hi = tp.T_K - half, tp.T_K + half
    fig, ax = _new_figure()
    for fit in result.fits:
        curve = _fit_curve(fit, max(lo, 1e-3), hi)
        if curve is None:
            continue
        T, y = curve
        inside = (T >= fit.T_range_K[0]) & (T <= fit.T_range_K[1])
        ls = _BRANCH_LINESTYLE.get(fit.branch, "-")
        ax.plot(1000.0 / T[inside], y[inside], color="#000000", linewidth=1.1, linestyle=ls,
                label=f"fit, {fit.branch}")
        ax.plot(1000.0 / T[~inside], y[~inside], color="#999999", linewidth=1.0, linestyle=ls,
                label=f"fit, {fit.branch} (extrapolated)" if (~inside).any() else None)
    styles = source_styles(result)
    marks = [_Mark(p.row, p.source or None, p.status, 1000.0 / p.T_K, math.log(p.P_Pa),
                   _is_flagged(p)) for p in _plottable(result.points) if lo <= p.T_K <= hi]
    _scatter_marks(ax, [(m, m.x, m.y) for m in marks], styles)
    x0, y0 = 1000.0 / tp.T_K, math.log(tp.P_Pa)
    xerr = 1000.0 * tp.u_T_K / tp.T_K ** 2 if _finite(tp.u_T_K) else None
    yerr = tp.u_P_Pa / tp.P_Pa if _finite(tp.u_P_Pa) else None
    ax.errorbar([x0], [y0], xerr=xerr, yerr=yerr, fmt="*", markersize=12,
                color=OKABE_ITO["reddish_purple"], mec="#000000", capsize=3, zorder=6,
                label="triple point from the data")
    T_ref, P_ref, ref_name = _reference_triple(tp.reference)
    if T_ref and P_ref and T_ref > 0 and P_ref > 0:
        ax.scatter([1000.0 / T_ref], [math.log(P_ref)], marker="s", s=70, facecolors="none",
                   edgecolors="#000000", linewidths=1.4, zorder=6,
                   label=f"reference: {safe_label(ref_name, 24)}")
    elif T_ref and T_ref > 0:
        ax.axvline(1000.0 / T_ref, color="#000000", linestyle=":", linewidth=1.0,
                   label=f"reference T: {safe_label(ref_name, 24)}")
    ax.set_xlabel("1000 K / T")
    ax.set_ylabel("ln(p/Pa)")
    # the points keep their look from the Clausius–Clapeyron plot, whose legend
    # names it: a key here would make this figure, printed half-width beside the
    # enthalpy, twice as tall as that one
    ax.legend(loc="best", frameon=True, framealpha=0.9)
    return RenderedPlot(key, title, _to_svg(fig, key),
                        f"±{_number_text(half)} K around the estimated triple point; points drawn as in "
                        "the Clausius–Clapeyron plot; grey: a fit extrapolated beyond its data")


# -- a supplier's sheet: its equation against the reference -----------------------------
def plot_sheet_reference(result: AuditResult) -> RenderedPlot:
    """100·(P_sheet/P_ref − 1) over the stated range: the equation as decoded (solid), as the
    sheet states it when that differs (dashed), and the sheet's table rows (markers by status)."""
    key, title = "sheet", "The sheet's equation against the reference"
    data = (result.plot_data or {}).get("sheet_reference") or {}
    T = [t for t in data.get("T_K", ())]
    dev = list(data.get("deviation_percent", ()))
    pairs = [(t, d) for t, d in zip(T, dev) if _finite(t, d)]
    if len(pairs) < 2:
        return RenderedPlot(key, title, None, "not drawn: no reference to compare the equation with over "
                                              "its stated range")
    fig, ax = _new_figure()
    ax.axhline(0.0, color="#000000", linewidth=0.8, zorder=1)
    ax.plot(*zip(*pairs), color=OKABE_ITO["blue"], linewidth=1.6, label="the equation as decoded", zorder=3)
    spans = [abs(d) for _, d in pairs]
    stated = [(t, d) for t, d in zip(T, data.get("stated_deviation_percent", ())) if _finite(t, d)]
    note_stated = ""
    if stated:
        ax.plot(*zip(*stated), color=OKABE_ITO["vermillion"], linewidth=1.4, linestyle="--",
                label=f"as stated: {safe_label(data.get('stated_label', ''), 40)}", zorder=2)
        note_stated = ("; dashed: the equation read as the sheet states it"
                       + (f" (up to {max(abs(d) for _, d in stated):.3g} % off)" if stated else ""))
    rows = [r for r in data.get("table", ()) if _finite(r.get("T_K"), r.get("deviation_percent"))]
    for status, marker, fill in (("ok", "o", True), ("reject", "X", False), ("suspect", "^", False)):
        sel = [r for r in rows if r.get("status") == status]
        if sel:
            ax.scatter([r["T_K"] for r in sel], [r["deviation_percent"] for r in sel], marker=marker, s=36,
                       facecolors=OKABE_ITO["bluish_green"] if fill else "none",
                       edgecolors=OKABE_ITO["bluish_green"] if fill else "#000000", linewidths=1.0, zorder=4,
                       label=f"table rows, {STATUS_STYLE[status]['label'] if status in STATUS_STYLE else status}")
    limit = max(max(spans) * 1.3, 0.5)
    kept = [r for r in rows if abs(r["deviation_percent"]) <= 4 * limit]
    limit = max([limit] + [abs(r["deviation_percent"]) * 1.15 for r in kept])
    beyond = [r["row"] for r in rows if abs(r["deviation_percent"]) > limit]
    ax.set_ylim(-limit, limit)
    if stated and max(abs(d) for _, d in stated) > limit:
        note_stated += ", beyond the axis"
    ax.set_xlabel("T / K")
    ax.set_ylabel("100·(p − p_ref)/p_ref")
    ax.legend(loc="best", frameon=True, framealpha=0.9)
    note = (f"against {data.get('name', 'the reference')}, over the stated range where it is valid"
            + note_stated
            + (f"; table rows beyond the axis: {', '.join(map(str, beyond))}" if beyond else ""))
    return RenderedPlot(key, title, _to_svg(fig, key), note)
