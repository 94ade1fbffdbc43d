"""The report's figures, drawn from an :class:`~audit.results.AuditResult`.

Each figure is rendered by matplotlib (object-oriented API, SVG canvas, no
pyplot state) to an SVG string that the HTML and PDF reports inline.  Nothing
is computed here except evaluating a fitted curve (``FitRecord.model.ln_p``)
on a grid to draw it.

Design choices
--------------
* Status is shown by marker shape *and* colour (ok = filled circle, suspect =
  open triangle, reject = cross), so that the figures survive grayscale
  printing and colour-blind readers.  Colours are from the Okabe–Ito palette
  [1]_.
* Text is kept as SVG ``<text>`` in DejaVu Sans (``svg.fonttype = 'none'``):
  glyph paths (``'path'``) looked the same but made WeasyPrint about 1.6×
  slower on a 200-point report (thousands of ``<use>`` nodes); DejaVu ships
  with matplotlib and with WeasyPrint's usual font set.  ``svg.hashsalt`` is
  fixed and the date omitted, and every ``id`` is prefixed with the figure's
  name, so that the output is byte-reproducible and several figures can share
  one HTML document without clashing ids.
* Each set of like shapes is one SVG ``<path>``: all the markers of a status,
  all the error bars of a status, all the reference diamonds
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
from typing import Any, Iterable, Sequence

from ..results import AuditResult, PointVerdict

__all__ = [
    "RenderedPlot",
    "STATUS_STYLE",
    "render_all",
    "plot_clapeyron",
    "plot_deviation",
    "plot_enthalpy",
    "plot_triple_point",
    "plot_source_deviation",
]

#: Okabe–Ito colours
OKABE_ITO = {
    "black": "#000000", "orange": "#E69F00", "sky_blue": "#56B4E9",
    "bluish_green": "#009E73", "yellow": "#F0E442", "blue": "#0072B2",
    "vermillion": "#D55E00", "reddish_purple": "#CC79A7",
}

#: marker, colour and whether filled, per point status
STATUS_STYLE: dict[str, dict[str, Any]] = {
    "ok": {"marker": "o", "color": OKABE_ITO["blue"], "filled": True, "size": 22, "label": "ok"},
    "suspect": {"marker": "^", "color": OKABE_ITO["orange"], "filled": False, "size": 46,
                "label": "suspect"},
    "reject": {"marker": "X", "color": OKABE_ITO["vermillion"], "filled": True, "size": 56,
               "label": "rejected"},
}

_BRANCH_LINESTYLE = {"liquid": "-", "solid": "--", "unknown": "-."}
_SOURCE_MARKERS = ("o", "s", "D", "v", "P", "<", "h", ">", "*", "p")
_SOURCE_COLOURS = (OKABE_ITO["blue"], OKABE_ITO["vermillion"], OKABE_ITO["bluish_green"],
                   OKABE_ITO["reddish_purple"], OKABE_ITO["orange"], OKABE_ITO["sky_blue"],
                   OKABE_ITO["black"], "#999999")
#: at most this many row numbers are written beside flagged points per figure;
#: beyond that the labels overlap into an unreadable blot (the table lists all)
MAX_ROW_LABELS = 40
_FIG_SIZE = (7.2, 4.2)  # inches; fits an A4 text column at 100 %


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
    """All figures of the report, in report order (skipped ones carry a note)."""
    return (
        plot_clapeyron(result),
        plot_deviation(result),
        plot_enthalpy(result),
        plot_triple_point(result),
        plot_source_deviation(result),
    )


# -- helpers ------------------------------------------------------------------------
def _finite(*values) -> bool:
    return all(v is not None and isinstance(v, (int, float)) and math.isfinite(v) for v in values)


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


def _new_figure(size=_FIG_SIZE):
    from matplotlib.figure import Figure

    # fixed margins rather than a layout engine: the constrained layout
    # measured every tick label again and took half the drawing time
    fig = Figure(figsize=size, dpi=72)  # the SVG canvas: 1 px = 1 pt
    fig.subplots_adjust(left=0.11, right=0.97, bottom=0.13, top=0.97)
    ax = fig.add_subplot()
    ax.grid(True, color="#d9d9d9", linewidth=0.6)
    ax.set_axisbelow(True)
    return fig, ax


def _scatter_status(ax, xs, ys, status: str, *, label: str | None = None, zorder=3):
    st = STATUS_STYLE[status]
    if not xs:
        return
    face = st["color"] if st["filled"] else "none"
    ax.scatter(xs, ys, s=st["size"], marker=st["marker"], facecolors=face,
               edgecolors=st["color"], linewidths=1.2, zorder=zorder,
               label=st["label"] if label is None else label)


def _annotate_rows(ax, items: Sequence[tuple[float, float, Any]]) -> int:
    """Write row numbers beside flagged points; returns how many were left out."""
    for x, y, row in items[:MAX_ROW_LABELS]:
        ax.annotate(safe_label(row, 40), (x, y), xytext=(4, 4), textcoords="offset points",
                    fontsize=7.5, color="#222222", zorder=5)
    return max(0, len(items) - MAX_ROW_LABELS)


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
    """ln(p/Pa) against 1000 K/T: points by status, fitted curves by branch,
    the reference correlation when present; flagged points carry their row."""
    import numpy as np

    key, title = "clapeyron", "Clausius–Clapeyron plot"
    pts = _plottable(result.points)
    if not pts:
        return RenderedPlot(key, title, None, "no readable points with T > 0 and p > 0 to draw")
    fig, ax = _new_figure()
    kept = _kept(pts)
    px, xlim = _pinner([1000.0 / p.T_K for p in kept])
    py, ylim = _pinner([math.log(p.P_Pa) for p in kept])
    pinned = set()

    def xy(p):
        (x, ox), (y, oy) = px(1000.0 / p.T_K), py(math.log(p.P_Pa))
        if ox or oy:
            pinned.add(p.row)
        return x, y

    for status in STATUS_STYLE:
        sel = [xy(p) for p in pts if p.status == status]
        _scatter_status(ax, [x for x, _ in sel], [y for _, y in sel], status)
    for fit in result.fits:
        curve = _fit_curve(fit, *fit.T_range_K)
        if curve is None:
            continue
        T, y = curve
        style = "-" if fit.recommended else ":"
        ax.plot(1000.0 / T, y, color="#000000", linewidth=1.1,
                linestyle=_BRANCH_LINESTYLE.get(fit.branch, style) if fit.recommended else style,
                label=f"fit, {fit.branch} ({safe_label(fit.equation, 20)})", zorder=2)
    ref = (result.plot_data or {}).get("reference") or {}
    for branch, curve in (ref.get("curves") or {}).items():
        T = np.asarray(curve.get("T_K", ()), dtype=float)
        P = np.asarray(curve.get("P_Pa", ()), dtype=float)
        ok = np.isfinite(T) & np.isfinite(P) & (T > 0) & (P > 0)
        if ok.sum() >= 2:
            ax.plot(1000.0 / T[ok], np.log(P[ok]), color="#888888", linewidth=2.2, alpha=0.6,
                    linestyle="-", zorder=1,
                    label=f"reference, {safe_label(branch, 12)}: {safe_label(ref.get('name', ''), 24)}")
    flagged = [(*xy(p), p.row) for p in pts if _is_flagged(p)]
    left_out = _annotate_rows(ax, flagged)
    ax.set_xlim(*xlim)
    ax.set_ylim(*ylim)
    ax.set_xlabel("1000 K / T")
    ax.set_ylabel("ln(p/Pa)")
    ax.legend(loc="best", frameon=True, framealpha=0.9)
    note = ("points by status; lines are the fitted equations; flagged points carry their row number"
            + (f"; rejected row(s) {', '.join(map(str, sorted(pinned)))} lie outside the axes and are "
               "drawn at the edge" if pinned else "")
            + (f" ({left_out} more flagged rows not labelled)" if left_out else ""))
    return RenderedPlot(key, title, _to_svg(fig, key), note)


# -- 2. relative deviation vs T -----------------------------------------------------
def _deviation_limit(pts: Sequence[PointVerdict]) -> float:
    """Half-height of the deviation axis: the spread of the points that are not
    rejected (with their uncertainties), so that a gross outlier does not squash
    the scatter a curator needs to see."""
    kept = [p for p in pts if p.status != "reject"] or list(pts)
    span = max(abs(p.deviation_percent) + (p.u_percent if _finite(p.u_percent) else 0.0)
               for p in kept)
    return max(1.25 * span, 0.05)


def _pinner(kept: Sequence[float], pad: float = 0.06):
    """A function pinning a coordinate to the span of the kept (not rejected)
    points: a °C value in a kelvin column at 45 K must not squash the plot of
    everything else.  Returns (f, limits); f(v) -> (v or the edge, pinned?)."""
    lo, hi = min(kept), max(kept)
    margin = pad * (hi - lo) if hi > lo else max(abs(lo) * 0.05, 1.0)
    lo, hi = lo - margin, hi + margin

    def f(v: float) -> tuple[float, bool]:
        if v < lo:
            return lo + 0.3 * margin, True
        if v > hi:
            return hi - 0.3 * margin, True
        return v, False
    return f, (lo, hi)


def _kept(pts):
    return [p for p in pts if p.status != "reject"] or list(pts)


def _clip(value: float, limit: float) -> tuple[float, bool]:
    if abs(value) <= limit:
        return value, False
    return math.copysign(0.96 * limit, value), True


def _scatter_deviations(ax, pts, limit, *, with_errors=True) -> tuple[list, int]:
    """Points by status, those beyond ±limit (or outside the kept points'
    temperatures) pinned to the edge; returns the row labels to write and how
    many points were pinned."""
    labels, pinned = [], 0
    pt, xlim = _pinner([p.T_K for p in _kept(pts)])
    ax.set_xlim(*xlim)
    for status in STATUS_STYLE:
        sel = [p for p in pts if p.status == status]
        if not sel:
            continue
        xs, ys, err = [], [], []
        for p in sel:
            y, out_y = _clip(p.deviation_percent, limit)
            x, out_x = pt(p.T_K)
            out = out_x or out_y
            pinned += out
            xs.append(x)
            ys.append(y)
            err.append(0.0 if out or not _finite(p.u_percent) else p.u_percent)
            if out:
                labels.append((x, y, f"{p.row} ({p.deviation_percent:+.3g} %)"))
            elif _is_flagged(p):
                labels.append((x, y, str(p.row)))
        if with_errors and any(err):
            ax.errorbar(xs, ys, yerr=err, fmt="none", ecolor=STATUS_STYLE[status]["color"],
                        elinewidth=0.8, capsize=2, alpha=0.8, zorder=2)
        _scatter_status(ax, xs, ys, status)
    return labels, pinned


def plot_deviation(result: AuditResult) -> RenderedPlot:
    """100·(p − p_fit)/p_fit against T with the points' standard uncertainties,
    and the deviation from the reference correlation when one is used."""
    key, title = "deviation", "Deviation from the fitted equation"
    pts = [p for p in _plottable(result.points) if _finite(p.deviation_percent)]
    if not pts:
        return RenderedPlot(key, title, None,
                            "not drawn: no point has a deviation from a fitted equation "
                            "(no fit was made)")
    fig, ax = _new_figure()
    ax.axhline(0.0, color="#000000", linewidth=0.8, zorder=1)
    limit = _deviation_limit(pts)
    labels, pinned = _scatter_deviations(ax, pts, limit)
    ref_pts = [p for p in pts if _finite(p.reference_deviation_percent)]
    ref_note = ""
    if ref_pts:
        name = ((result.plot_data or {}).get("reference") or {}).get("name") or "reference"
        ys = [_clip(p.reference_deviation_percent, limit)[0] for p in ref_pts]
        ax.scatter([p.T_K for p in ref_pts], ys, marker="D", s=14, facecolors="none",
                   edgecolors="#777777", linewidths=0.9, zorder=2,
                   label=f"vs {safe_label(name, 30)}")
        ref_note = "; open grey diamonds: deviation from the reference correlation"
    left_out = _annotate_rows(ax, labels)
    ax.set_ylim(-limit, limit)
    ax.set_xlabel("T / K")
    ax.set_ylabel("100·(p − p_fit)/p_fit")
    ax.legend(loc="best", frameon=True, framealpha=0.9)
    note = ("bars are the points' standard uncertainties" + ref_note
            + (f"; {pinned} point(s) beyond the axis are drawn at its edge, labelled "
               "'row (deviation)'" if pinned else "")
            + (f" ({left_out} more flagged rows not labelled)" if left_out else ""))
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
    pts = [p for p in _plottable(result.points) if lo <= p.T_K <= hi]
    for status in STATUS_STYLE:
        sel = [p for p in pts if p.status == status]
        _scatter_status(ax, [1000.0 / p.T_K for p in sel], [math.log(p.P_Pa) for p in sel], status)
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
    ax.legend(loc="best", frameon=True, framealpha=0.9)
    return RenderedPlot(key, title, _to_svg(fig, key),
                        f"±{half:.3g} K around the estimated triple point; grey: a fit "
                        "extrapolated beyond its data")


# -- 5. deviation by source --------------------------------------------------------------
def plot_source_deviation(result: AuditResult) -> RenderedPlot:
    """Deviation from the fitted equation against T, one marker per source, with
    each source's mean bias as a horizontal line."""
    key, title = "sources", "Deviation by source"
    pts = [p for p in _plottable(result.points) if _finite(p.deviation_percent) and p.source]
    if not pts:
        why = "no sources named in the data" if not result.dataset.sources else \
            "no deviations from a fitted equation"
        return RenderedPlot(key, title, None, f"not drawn: {why}")
    fig, ax = _new_figure()
    ax.axhline(0.0, color="#000000", linewidth=0.8, zorder=1)
    order = list(dict.fromkeys(p.source for p in pts))
    bias = {s.source: s.bias_percent for s in result.sources if _finite(s.bias_percent)}
    limit = _deviation_limit(pts)
    pinned = 0
    pt, xlim = _pinner([p.T_K for p in _kept(pts)])
    ax.set_xlim(*xlim)
    for i, source in enumerate(order):
        sel = [p for p in pts if p.source == source]
        colour = _SOURCE_COLOURS[i % len(_SOURCE_COLOURS)]
        marker = _SOURCE_MARKERS[i % len(_SOURCE_MARKERS)]
        label = safe_label(source)
        for rejected in (False, True):
            group = [p for p in sel if (p.status == "reject") == rejected]
            if not group:
                continue
            xs, ys = [], []
            for p in group:
                y, out_y = _clip(p.deviation_percent, limit)
                x, out_x = pt(p.T_K)
                pinned += out_x or out_y
                xs.append(x)
                ys.append(y)
            if rejected:
                ax.scatter(xs, ys, marker=marker, s=40, facecolors="none",
                           edgecolors=colour, linewidths=1.2, zorder=3, label=f"{label} (rejected)")
            else:
                ax.scatter(xs, ys, marker=marker, s=26, color=colour,
                           edgecolors="#000000", linewidths=0.4, zorder=3, label=label)
        if source in bias and abs(bias[source]) <= limit:
            T = [p.T_K for p in sel]
            ax.hlines(bias[source], min(T), max(T), colors=colour, linestyles="--", linewidth=1.0)
    ax.set_ylim(-limit, limit)
    scale_note = (f"; {pinned} point(s) beyond the axis are drawn at its edge" if pinned else "")
    ax.set_xlabel("T / K")
    ax.set_ylabel("100·(p − p_fit)/p_fit")
    ax.legend(loc="best", frameon=True, framealpha=0.9, ncols=2 if len(order) > 5 else 1)
    return RenderedPlot(key, title, _to_svg(fig, key),
                        "one marker per source; dashed lines: the source's mean bias; open "
                        "markers: rejected points" + scale_note)
