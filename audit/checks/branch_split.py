"""Check ``branch-split``: solid and liquid branches in an unlabelled table."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..results import CheckResult, PointFlag
from .fits import known_triple_point, points_data
from ._util import skipped
from .registry import Check, Option, register


@register
class BranchSplit(Check):
    """Find the solid and liquid branches when the table has no phase labels.

    **What it checks.** When usable rows carry no phase label, whether ln P
    against 1/T is better described by two straight lines than by one (a
    slope break), scanning every split between temperature neighbours
    (F-test, Bonferroni-adjusted).  The split is accepted only when it is
    significant and the low-temperature side is the steeper one — the
    enthalpy of sublimation exceeds that of vaporization by the enthalpy of
    fusion — and the pressure is continuous there: a break where the two
    lines differ by more than ``max_gap_sigma`` standard uncertainties of
    their difference and by more than ``min_jump_percent`` is a jump in
    level, rows of another compound or in another unit, reported as such,
    never as a phase change.  The search runs on the rows that are not gross
    errors (a repeated-median line, then a robust curve, see
    ``_without_gross_errors``): a °C value in a kelvin column or a block in
    another unit would otherwise drag a least-squares break anywhere.  When
    the rows name two sources or more, the
    break must also be a drop of ΔH (a hinge in ln P vs 1/T) significant
    against smooth curves — ΔH linear and quadratic in T — with a level and
    a weight (its own scatter) for each source: series of unequal scatter
    and level otherwise fake a break in one liquid curve.  With a known
    triple point (``T_triple`` or ``T_melting`` of the metadata or the
    substance library, or water's) no break is searched for: rows below it
    are solid, the others liquid.  Among the unlabelled solid rows a second
    break that passes the same tests, with ``min_transition_dH_ratio`` in
    place of ``min_dH_ratio``, is a transition between two crystal forms:
    the rows below it are named form II, those above form I.  Rows below the break are then treated as solid and rows above
    as liquid, each with a flag saying the phase was inferred.

    **Why it matters.** A table that runs through the triple point without
    labels mixes two curves; fitting one curve through both bends it and
    makes good points look like outliers.  A break with the shallower side
    at low temperature is not a triple point and is left alone.

    **Method.** Unlabelled usable rows are sorted by temperature. With a known
    triple point no break is searched for: rows below T_triple are solid, the
    others liquid, except rows above ``max_solid_pressure_ratio`` times a known
    triple-point pressure, which no row below the triple point can reach (they
    are in error and are judged with the liquid); a side of fewer than
    ``min_points_per_side`` rows that are all gross errors joins the other side. Otherwise, in this order: (1)
    gross errors are set aside — Siegel's repeated-median line of ln P on 1/T
    drops rows more than a factor 3 off it, then a Tukey-robust three-constant
    (constant-ΔCp) fit drops rows more than 10 robust σ (normal-consistent
    MAD) and 5 % off it; (2) two straight lines ln P = a + b/T are fitted by
    least squares on each side of every split between distinct temperature
    neighbours (weighted by the stated u(T), u(P) when given), and the F-test
    of two lines against one (Chow's test) gives the best split, its p-value
    Bonferroni-adjusted over the splits tried; (3) the best break is judged:
    significant with a gap of the two lines' ln P at the break beyond
    ``max_gap_sigma`` u and ``min_jump_percent`` is a level jump; it must be
    significant at ``alpha``; the ratio of the low-T to high-T apparent ΔH =
    −R·b must reach ``min_dH_ratio``; (4) the split is refined by refitting
    each side (constant-ΔCp form with six temperatures or more, else a line)
    and moving to the neighbouring split of least total squared residual; (5)
    an F-test of the two sides (line below, curve above, Huber-weighted)
    against one constant-ΔCp curve, Bonferroni-adjusted, must be significant
    at ``alpha`` (else it is curvature); (6) with two sources or more, a hinge
    in ln P vs 1/T with a level per source (weighted by each source's own MAD
    scatter when no uncertainties are given) must be a significant drop of ΔH
    against ΔH linear in T and against ΔH quadratic in T (four-term
    Clarke–Glew), the larger adjusted p counting. An accepted break makes the
    rows below it solid and the rows above liquid; the same procedure among
    the solid rows, with ``min_transition_dH_ratio``, finds a second crystal
    form.

    **Example.** ice + water 230–300 K unlabelled → "break at 273.2 K (adjusted
    p = 1e-15): slopes 51.1 and 45.0 kJ/mol; rows 1–12 solid, 13–25 liquid".

    **Options.** ``alpha``, ``min_points_per_side``, ``min_dH_ratio``, ``max_gap_sigma``,
    ``min_jump_percent``, ``min_transition_dH_ratio``, ``max_solid_pressure_ratio``.
    """

    id = "branch-split"
    title = "Solid and liquid branches of unlabelled data"
    method = ("Two-segment least-squares fit of ln P against 1/T at every split between T "
              "neighbours; F-test of two lines against one, Bonferroni-adjusted over the splits; "
              "accepted only when the low-T side is steeper (ΔH_sub > ΔH_vap).")
    references = (
        "G. C. Chow, Econometrica 28, 591 (1960), doi:10.2307/1910133 — test for a break.",
        "ΔH_sub = ΔH_vap + ΔH_fus at the triple point (Kirchhoff/Hess), e.g. Atkins' Physical Chemistry, §4B.",
        "A. F. Siegel, Biometrika 69, 242 (1982), doi:10.1093/biomet/69.1.242 — repeated medians (gross-error "
        "screen).",
    )
    options = {
        "alpha": Option(float, "significance level (adjusted) of the slope break [-]", "", 1e-15, 0.5),
        "min_points_per_side": Option(int, "fewest distinct temperatures on each side of a break [-]", "", 3, 1000),
        "min_dH_ratio": Option(float, "smallest ratio of low-T to high-T apparent ΔH taken as a "
                               "solid/liquid break [-]", "", 1.0, 3.0),
        "max_gap_sigma": Option(float, "largest difference of the two lines' ln P at the break, in standard "
                                "uncertainties of that difference, for a phase change [-]", "", 1.0, 100.0),
        "min_jump_percent": Option(float, "smallest difference of the two lines' P at the break taken as a "
                                   "level jump (straight lines through curved branches miss by a few %)",
                                   "%", 0.0, 1000.0),
        "max_solid_pressure_ratio": Option(float, "with a known triple point: an unlabelled row below its "
                                           "temperature and above this many times its pressure lies on "
                                           "neither curve and is judged with the liquid [-]", "", 1.0, 1e6),
        "min_transition_dH_ratio": Option(float, "smallest ratio of low-T to high-T apparent ΔH_sub taken as "
                                          "a transition between two crystal forms [-]", "", 1.0, 3.0),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        unlabelled = sorted((p for p in ctx.usable() if p.phase == "unknown"), key=lambda p: (p.T_K, p.row))
        labelled = [p for p in ctx.usable() if p.phase != "unknown"]
        if not unlabelled:
            return skipped(self, "every usable row carries a phase label")
        known = known_triple_point(ctx)
        if known is not None:
            # rows rejected before (beyond Pc, say) still lie on one side of the triple point; their
            # branch lets source-agreement diagnose their source with the rest of its rows
            rejected = [p for p in ctx.dataset.points if p.readable and p.phase == "unknown"
                        and ctx.status[p.row] == "reject" and math.isfinite(p.T_K) and math.isfinite(p.P_Pa)]
            return self._by_known_triple_point(unlabelled, labelled, known, s, rejected)
        if labelled:
            return skipped(self, f"{len(unlabelled)} rows lack a phase label while {len(labelled)} have one; "
                                 "the unlabelled rows are audited as their own branch")
        m = s["min_points_per_side"]
        if len(unlabelled) < 2 * m:
            return skipped(self, f"{len(unlabelled)} unlabelled rows; a break needs {m} on each side")
        every = sorted(unlabelled, key=lambda p: (p.T_K, p.row))
        j = _judge_break(every, s, s["min_dH_ratio"])
        brk, metrics = j.slope_break, j.metrics
        if j.outcome == "too few rows":
            return skipped(self, f"{j.n_kept} unlabelled rows without gross errors; a break needs {m} "
                                 "on each side")
        if j.outcome == "untestable":
            return skipped(self, f"no slope break could be tested: {j.error}")
        if j.outcome == "level jump":
            # not a phase change whatever the slopes say: the pressure jumps at the break
            return CheckResult(self.id, self.title, s.severity,
                               f"one branch with a level jump: at {brk.T_break:.2f} K the pressure changes by a "
                               f"factor {math.exp(brk.gap_lnP):.3g} ({abs(brk.gap_lnP) / brk.u_gap_lnP:.1f} u of "
                               f"the difference; limits {s['max_gap_sigma']} u and {s['min_jump_percent']} %) — "
                               "not a phase change (which keeps "
                               "P continuous) but rows of another compound or in another unit on one side; "
                               "phases left unknown", metrics)
        if j.outcome in ("not significant", "not steep"):
            why = ("not significant" if j.outcome == "not significant" else
                   "the low-temperature side is not steep enough to be a solid")
            return CheckResult(self.id, self.title, "pass",
                               f"one branch: best {_describe(brk, brk.T_break)} — {why} (limits p < {s['alpha']}, "
                               f"ratio ≥ {s['min_dH_ratio']})", metrics)
        if j.outcome == "curvature":
            return CheckResult(self.id, self.title, "pass",
                               f"one branch: the best {_describe(brk, brk.T_break)} is explained by the "
                               f"curvature of a single curve (constant ΔCp; adjusted p = "
                               f"{metrics['p_vs_one_curve_adjusted']:.2g} ≥ {s['alpha']})", metrics)
        if j.outcome == "no step":
            return CheckResult(self.id, self.title, "pass",
                               f"one branch: the best {_describe(brk, brk.T_break)} is no drop of ΔH "
                               "beyond a smooth curve once each source has its own level and weight "
                               f"(adjusted p = {metrics['step_p_adjusted']:.2g}, limit {s['alpha']})", metrics)
        T_break = j.T_break
        desc = _describe(brk, T_break)
        # every unlabelled row, kept for the search or not, takes the side of the break it lies on
        inferred = {p.row: ("solid" if p.T_K < T_break else "liquid") for p in every}
        forms = _second_crystal_form([p for p in every if inferred[p.row] == "solid"], s)
        basis = f"the {desc}"
        text = ""
        if forms is not None:
            T_trs, form_desc = forms
            inferred = _name_forms(inferred, {p.row: p.T_K for p in every}, T_trs)
            basis += f" and a second crystal form below the {form_desc}"
            text = f"; below the {form_desc} a second crystal form (named II by the audit; I above)"
            metrics["T_transition_K"] = T_trs
        flags = tuple(PointFlag(r, self.id, s.severity, f"phase inferred as {ph} from {basis}")
                      for r, ph in inferred.items())
        n_s = sum(1 for v in inferred.values() if v.startswith("solid"))
        return CheckResult(self.id, self.title, s.severity,
                           f"no phase labels; {desc}: {n_s} rows taken as solid, {len(inferred) - n_s} as "
                           f"liquid{text} — label the phases to confirm", metrics, flags, phase_inferred=inferred,
                           phase_basis=basis)

    def _by_known_triple_point(self, unlabelled, labelled, known, s, rejected=()):
        """Unlabelled rows below the known triple-point temperature are solid, the others liquid.

        A side holding only a few rows that are all gross errors against the
        whole set (a kelvin value in a °C column puts an ice row at 510 K) is
        no branch: those rows join the other side, where a fit judges them.
        Rows ``rejected`` before get their side too (counted apart).
        """
        limit = (known.P_Pa * s["max_solid_pressure_ratio"] if known.P_Pa is not None and known.P_Pa > 0
                 else math.inf)

        def side(p):
            # below the triple point both curves stay under the triple-point pressure: a row far
            # above it lies on neither and is in error (a temperature in °C under a kelvin header, a
            # pressure in another unit); it is judged with the liquid, where the rest of its source
            # and a unit reading can explain it, not made a solid branch of its own
            return "solid" if p.T_K < known.T_K and not p.P_Pa > limit else "liquid"

        inferred = {p.row: side(p) for p in unlabelled}
        impossible = {p.row for p in unlabelled if p.T_K < known.T_K and p.P_Pa > limit}
        inferred = _lone_gross_rows_joined(unlabelled, inferred, s["min_points_per_side"])
        n_s = sum(1 for v in inferred.values() if v == "solid")
        n_l = len(inferred) - n_s
        sides = " and ".join(t for t in (f"{n_s} solid (below)" if n_s else "",
                                          f"{n_l} liquid (at or above)" if n_l else "") if t)
        message = (f"{len(inferred)} rows without a phase label taken as {sides} by the known triple point "
                   f"{known.T_K:.6g} K ({known.source})"
                   + (f"; {len(labelled)} rows keep their labels" if labelled else ""))
        if impossible:
            message += (f"; {len(impossible)} row(s) below it but above {s['max_solid_pressure_ratio']:g} × the "
                        f"triple-point pressure {known.P_Pa:.4g} Pa lie on neither curve: judged with the liquid")
        metrics = {"T_triple_K": known.T_K, "triple_point_source": known.source, "n_solid": n_s, "n_liquid": n_l,
                   "n_above_triple_pressure": len(impossible)}
        basis = f"the known triple point {known.T_K:.6g} K ({known.source})"
        status = "pass"
        forms = None if labelled else _second_crystal_form([p for p in unlabelled if inferred[p.row] == "solid"], s)
        if forms is not None:
            T_trs, form_desc = forms
            inferred = _name_forms(inferred, {p.row: p.T_K for p in unlabelled}, T_trs)
            basis += f" and a second crystal form below the {form_desc}"
            message += (f"; below the {form_desc} a second crystal form (named II by the audit, I above) — "
                        "label the forms to confirm")
            metrics["T_transition_K"] = T_trs
            status = s.severity
        before = {p.row: side(p) for p in rejected if p.row not in inferred}
        if forms is not None:
            before = _name_forms(before, {p.row: p.T_K for p in rejected}, forms[0])
        inferred = {**inferred, **before}
        return CheckResult(self.id, self.title, status, message, metrics, phase_inferred=inferred,
                           phase_basis=basis)


def _lone_gross_rows_joined(points, inferred: dict, few: int) -> dict:
    """Rows of a side with fewer than `few` rows, all gross errors, take the other side's phase."""
    sides = {ph: [p for p in points if inferred[p.row] == ph] for ph in set(inferred.values())}
    if len(sides) != 2:
        return inferred
    small, large = sorted(sides, key=lambda ph: len(sides[ph]))
    if len(sides[small]) >= few or len(sides[large]) < few:
        return inferred
    pts = sorted(points, key=lambda p: p.T_K)
    kept = _without_gross_errors(np.array([p.T_K for p in pts]), np.array([p.P_Pa for p in pts]))
    gross = {p.row for p, k in zip(pts, kept) if not k}
    if not all(p.row in gross for p in sides[small]):
        return inferred
    return {r: (large if ph == small else ph) for r, ph in inferred.items()}


def _name_forms(inferred: dict, T_of_row: dict, T_transition: float) -> dict:
    """Solid rows below the transition become form 'II', the others form 'I' (names of the audit)."""
    return {r: (("solid II" if T_of_row[r] < T_transition else "solid I") if ph == "solid" else ph)
            for r, ph in inferred.items()}


def _second_crystal_form(points, s) -> tuple[float, str] | None:
    """A transition between two crystal forms among unlabelled solid rows: (T [K], description) or None.

    The same tests as a solid/liquid break (:func:`_judge_break`), with a
    smaller least ratio of the two sides' enthalpies
    (``min_transition_dH_ratio``: an enthalpy of transition is a few percent
    of the enthalpy of sublimation).
    """
    if len(points) < 2 * s["min_points_per_side"]:
        return None
    j = _judge_break(sorted(points, key=lambda p: (p.T_K, p.row)), s, s["min_transition_dH_ratio"])
    if j.outcome != "break":
        return None
    return j.T_break, _describe(j.slope_break, j.T_break)


@dataclass(frozen=True)
class BreakJudgement:
    """What :func:`_judge_break` found.

    ``outcome`` is the first test the best break failed — ``'too few rows'``
    (without gross errors), ``'untestable'`` (``error`` says why), ``'level
    jump'``, ``'not significant'``, ``'not steep'``, ``'curvature'``, ``'no
    step'`` — or ``'break'`` when it passed them all; ``T_break`` [K] is then
    where it lies (after the sides' curves refined the split).
    """

    outcome: str
    slope_break: object = None
    T_break: float = math.nan
    metrics: dict = field(default_factory=dict)
    n_kept: int = 0
    error: str = ""


def _judge_break(points, s, min_ratio: float) -> BreakJudgement:
    """The tests a slope break among unlabelled rows must pass to be a phase change.

    On the rows that are not gross errors (:func:`_without_gross_errors`):
    the best two-line break, significant at ``alpha``; the pressure
    continuous across it (else a level jump); the low-temperature side
    steeper by at least `min_ratio`; beyond the curvature of one curve; and,
    when the rows name two sources or more, a drop of ΔH beyond smooth curves
    with a level and weight per source.  `points` are sorted by T.
    """
    from ..thermo.triple_point import find_slope_break

    m = s["min_points_per_side"]
    data = points_data("unknown", points)
    kept = _without_gross_errors(data.T, data.P)
    n_kept = int(kept.sum())
    if n_kept < 2 * m:
        return BreakJudgement("too few rows", n_kept=n_kept)
    T, P = data.T[kept], data.P[kept]
    u_T = None if data.u_T is None else data.u_T[kept]
    u_P = None if data.u_P is None else data.u_P[kept]
    try:
        brk = find_slope_break(T, P, min_points_per_side=m, u_T=u_T, u_P=u_P)
    except ValueError as exc:
        return BreakJudgement("untestable", n_kept=n_kept, error=str(exc))
    ratio = brk.dH_low / brk.dH_high if brk.dH_high > 0 else float("nan")
    metrics = {"T_break_K": brk.T_break, "p_value_adjusted": brk.p_value_adjusted, "F": brk.F,
               "dH_low_J_per_mol": brk.dH_low, "dH_high_J_per_mol": brk.dH_high, "dH_ratio": ratio,
               "gap_lnP": brk.gap_lnP, "u_gap_lnP": brk.u_gap_lnP}

    def judged(outcome, T_break=math.nan):
        return BreakJudgement(outcome, brk, T_break, metrics, n_kept)

    significant = brk.p_value_adjusted < s["alpha"]
    if (significant and not abs(brk.gap_lnP) <= s["max_gap_sigma"] * brk.u_gap_lnP
            and abs(brk.gap_lnP) > math.log1p(s["min_jump_percent"] / 100)):
        return judged("level jump")
    if not significant:
        return judged("not significant")
    if not (brk.solid_side_steeper and ratio >= min_ratio):
        return judged("not steep")
    Ts = T[brk.order]
    split = _refine_split(Ts, P[brk.order], brk.split, m)
    F, p_curve = _kink_beyond_curvature(Ts, P[brk.order], split, brk.n_tested)
    metrics.update({"F_vs_one_curve": F, "p_vs_one_curve_adjusted": p_curve})
    if not p_curve < s["alpha"]:
        return judged("curvature")
    sources = [p.source for p, k in zip(data.points, kept) if k]
    if len({x for x in sources if x}) >= 2:
        step = _step_beyond_smooth_curves(T, P, u_T, u_P, sources, m)
        metrics.update(step)
        if not (step["step_p_adjusted"] < s["alpha"] and step["step_dH_J_per_mol"] < 0):
            return judged("no step")
    T_break = brk.T_break
    if split != brk.split:  # midpoint in 1/T of the refined neighbours
        T_break = 2.0 / (1.0 / Ts[split - 1] + 1.0 / Ts[split])
        metrics.update({"T_break_K": T_break, "T_break_two_lines_K": brk.T_break})
    return judged("break", T_break)


def _describe(brk, T_break: float) -> str:
    return (f"slope break at {T_break:.2f} K (adjusted p = {brk.p_value_adjusted:.2g}): apparent ΔH "
            f"{brk.dH_low / 1e3:.4g} kJ/mol below, {brk.dH_high / 1e3:.4g} kJ/mol above")


def _without_gross_errors(T, P) -> np.ndarray:
    """Rows that are not gross errors, to search a break among.

    Two stages.  The repeated-median line of ln P on 1/T (50 % breakdown:
    rows in another unit or scale do not carry it) removes what lies more
    than a factor 3 off it — a straight line misses the bend through a
    triple point by tens of percent at the ends of a wide range, never by a
    factor 3.  Then a Tukey-robust constant-ΔCp curve through the rest, which
    follows the bend to a few percent, removes what lies more than 10 robust σ
    (and 5 %) off it.
    """
    from ..thermo.fitting import fit_equation
    from ..thermo.stats import mad_scale, repeated_median_line

    y = np.log(P)
    with np.errstate(divide="ignore", invalid="ignore"):
        line = repeated_median_line(1.0 / T, y)
    r = line.residuals
    ok = np.isfinite(r)
    if ok.sum() < 4:
        return ok
    ok &= np.abs(r - np.median(r[ok])) <= np.log(3.0)
    try:
        fit = fit_equation(T[ok], P[ok], "cc3", robust=True)
    except (ValueError, np.linalg.LinAlgError):  # too few or degenerate rows: the line's cut stands
        return ok
    r2 = y[ok] - fit.equation.ln_p(T[ok])
    limit = max(10.0 * mad_scale(r2), np.log(1.05))
    keep = ok.copy()
    keep[ok] = np.abs(r2 - np.median(r2)) <= limit
    return keep


def _source_scales(T, P, sources) -> np.ndarray | None:
    """u(P) [Pa] of each point from its source's robust scatter about one curve, or None.

    None when the rows name fewer than two sources.  Each source of four rows
    or more gets the normal-consistent MAD of its residuals about a Huber fit
    of the constant-ΔCp form to all rows, taken about the source's own median
    (a source's level is no scatter); smaller sources get the largest of
    those (never judged by a more precise series' scatter).
    """
    from ..thermo.fitting import fit_equation
    from ..thermo.stats import mad_scale

    names = np.array([s or "" for s in sources], dtype=object)
    named = [x for x in dict.fromkeys(names) if x]
    if len(named) < 2:
        return None
    try:
        r = fit_equation(T, P, "cc3", robust="huber").residuals_lnP
    except (ValueError, np.linalg.LinAlgError):
        return None
    own = {}
    for name in named:
        mine = r[names == name]
        if mine.size >= 4:
            own[name] = mad_scale(mine)  # about its own median: a level is no scatter
    if not own:
        return None
    widest = max(own.values())
    floor = 1e-6  # a source printed alike at every row has no MAD; keep its weight finite
    rel = np.array([max(own.get(x, widest), floor) for x in names])
    return rel * P


def _step_beyond_smooth_curves(T, P, u_T, u_P, sources, m: int) -> dict:
    """The most significant step of ΔH(T) in a compilation, against two smooth curves.

    A solid/liquid junction is a drop of ΔH by ΔH_fus where T rises; with
    several sources each gets its own level (a series 2 % high is no phase
    change) and, without stated uncertainties, its own scatter as weight.  The
    step must be significant both against ΔH linear in T and against ΔH
    quadratic in T (Clarke–Glew, 4 terms): over a wide range precise series
    show that ΔH is not linear, and the larger p-value is returned.
    """
    from ..thermo.enthalpy import enthalpy_steps
    from ..thermo.fitting import InsufficientData

    if u_T is None and u_P is None:
        u_P = _source_scales(T, P, sources)
    groups = np.asarray([x or "" for x in sources], dtype=object)
    try:
        lin = enthalpy_steps(T, P, u_T, u_P, min_points_per_side=m, groups=groups)
        quad = enthalpy_steps(T, P, u_T, u_P, min_points_per_side=m, groups=groups, form="clarke-glew",
                              fixed={"n_terms": 4})
    except (InsufficientData, ValueError):
        return {"step_p_adjusted": 1.0, "step_dH_J_per_mol": 0.0, "step_T_K": math.nan}
    return {"step_p_adjusted": max(lin.p_value_adjusted, quad.p_value_adjusted), "step_dH_J_per_mol": lin.dH_step,
            "step_T_K": lin.T_step}


def _kink_beyond_curvature(T, P, split: int, n_tested: int) -> tuple[float, float]:
    """F-test: two branches (line below, constant-ΔCp curve above) vs one curved branch.

    A single liquid curve bends (ΔCp < 0), so two straight lines beat one
    line even without a phase change; a solid/liquid junction must beat one
    *curved* branch.  Huber-weighted fits keep a gross error from faking a
    kink; the p-value is Bonferroni-adjusted over the splits tried.
    """
    from ..thermo.distributions import f_sf

    from ..thermo.fitting import distinct_temperatures, fit_equation

    def rss(fit):
        return float(np.sum(fit.weights * fit.residuals_lnP ** 2))

    n = T.size
    one = fit_equation(T, P, "cc3", robust="huber")
    lo = fit_equation(T[:split], P[:split], "cc2", robust="huber")
    hi = fit_equation(T[split:], P[split:], _side_form(distinct_temperatures(T[split:])), robust="huber")
    k_two = 2 + hi.n_params
    dof = n - k_two
    if dof <= 0:
        return float("nan"), 1.0
    rss2 = rss(lo) + rss(hi)
    extra = k_two - 3
    if rss2 <= 0:
        return float("inf"), 0.0
    F = ((rss(one) - rss2) / extra) / (rss2 / dof)
    p = f_sf(F, extra, dof) if F > 0 else 1.0
    return float(F), min(1.0, p * max(n_tested, 1))


def _side_form(n_temperatures: int) -> str:
    """The constant-ΔCp form for a side with six temperatures or more, else a line."""
    return "cc3" if n_temperatures >= 6 else "cc2"


def _refine_split(T, P, split: int, min_side: int, max_rounds: int = 5) -> int:
    """Move the split to where each side's own curve fits its points best.

    The two-line search takes both sides as straight lines; the liquid side,
    usually the longer, curves (ΔCp < 0), which can pull a point next to the
    break onto the wrong side.  Each round fits each side with the
    constant-ΔCp form (a line when a side is short), then chooses, among
    the splits near the current one, the one with the least total squared
    residual against the two curves.
    """
    from ..thermo.fitting import fit_equation

    y = np.log(P)
    n = T.size
    # sides are counted in distinct temperatures (T is sorted): replicates add no shape
    distinct_upto = np.cumsum(np.diff(T, prepend=-np.inf) > 0)
    n_T = int(distinct_upto[-1])

    def side_temperatures(k):
        below = int(distinct_upto[k - 1])
        return below, n_T - below

    for _ in range(max_rounds):
        n_lo, n_hi = side_temperatures(split)
        f_lo = fit_equation(T[:split], P[:split], _side_form(n_lo), robust="huber")
        f_hi = fit_equation(T[split:], P[split:], _side_form(n_hi), robust="huber")
        r_lo = (y - f_lo.equation.ln_p(T)) ** 2
        r_hi = (y - f_hi.equation.ln_p(T)) ** 2
        candidates = [k for k in range(max(1, split - 3), min(n - 1, split + 3) + 1)
                      if T[k] != T[k - 1] and min(side_temperatures(k)) >= min_side]
        if not candidates:
            break
        best = min(candidates, key=lambda k: r_lo[:k].sum() + r_hi[k:].sum())
        if best == split:
            break
        split = best
    return split
