"""Detection benchmark of the ``outliers`` and ``source-agreement`` checks.

Labelled tables are generated from reference equations — IAPWS water
(Wagner & Pruss auxiliary equation) and ice Ih (IAPWS R14-08), and CoolProp
(HEOS) for toluene and n-hexane — printed as a table would print them
(T to 0.01 K, P to 5 significant figures in kPa, or Pa for ice), with one to
five sources, with and without uncertainty columns.  One fault per table
(or none): random errors of 4, 6 and 10 σ, a value printed in another
pressure unit, a misplaced decimal point, transposed digits of P or T, °C
written in a kelvin column, a block of rows printed in Pa in a kPa column;
and, in tables with three or more sources, sometimes a +3 % pressure-scale
or +0.3 K thermometer bias on one source.

By default the tables are the broad set (``make_broad_table``): water, ice Ih,
ice and water together (labelled or not, with water's triple point known or
not), and CoolProp's toluene, n-hexane, ethanol, acetone and benzene; 9–150
rows; the pressure column in any unit the ingest knows and the temperature in
K or °C; faults as above with the pressure unit and the 2–4-row block drawn
from every unit, and the temperature slip in both directions (°C value in a
kelvin column, kelvin value in a °C column).  Printed besides: per fault kind
the recall and the share of found rows with the right cause, the share of
clean datasets whose verdict is ``pass``, and the F1 of gross-error detection
(suspect or reject counted as flagged) beside that of the plain rule.
``--narrow`` draws the earlier tables, comparable with earlier rounds.

Each table is audited with ``audit.pipeline.run_audit`` under the default
profile.  A row counts as found when its final status (from any check) is
suspect or reject; the outliers check's own flags are shown beside.  The
same rows are judged by the plain approach (straight ln P–1/T least-squares
line per branch, |residual| > 3 s).  A decimal shift by a factor that is also
a ratio of two common units (×10 on a kPa column = hPa) counts as right when
named either way.  Seeds differ from those of the tests;
tune on one seed range (``--seed 1000``) and report another (``--seed 5000``).

Run:  python benchmarks/detection.py [--tables N] [--workers 2] [--seed 1000] [--profile default] [--narrow]
"""

from __future__ import annotations

import argparse
import math
import sys
import time
from collections import defaultdict
from functools import partial
from multiprocessing import Pool
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

NOISE = 0.002  # relative scatter of the generated pressures (0.2 %)
FAULTS = ("clean", "random-4σ", "random-6σ", "random-10σ", "pressure-unit", "unit-block", "decimal-shift",
          "digit-swap-P", "digit-swap-T", "temperature-unit")
#: a transposition that moves the value by less than this many σ is not a gross error: it is
#: reported on its own line ("digit-swap-P <10σ"), outside the gross-error target
GROSS_SIGMA = 10.0
REPORTED = FAULTS[1:8] + ("digit-swap-P <10σ",) + FAULTS[8:9] + ("digit-swap-T <10σ",) + FAULTS[9:]
EXPECTED_CAUSE = {"pressure-unit": "pressure-unit", "unit-block": "pressure-unit", "decimal-shift": "decimal-shift",
                  "digit-swap-P": "digit-swap", "digit-swap-T": "digit-swap", "temperature-unit": "temperature-unit",
                  "digit-swap-P <10σ": "digit-swap", "digit-swap-T <10σ": "digit-swap"}
SUBSTANCES = ("water", "ice", "toluene", "hexane")


def _curve(name):
    from audit.thermo.reference import ICE_SUBLIMATION, WATER_SATURATION

    if name == "water":
        return (280.0, 370.0), WATER_SATURATION.p, "liquid"
    if name == "ice":
        return (200.0, 272.0), ICE_SUBLIMATION.p, "solid"
    import CoolProp.CoolProp as CP

    fluid, rng_ = {"toluene": ("Toluene", (260.0, 380.0)), "hexane": ("n-Hexane", (230.0, 330.0))}[name]
    return rng_, (lambda T: np.array([CP.PropsSI("P", "T", float(t), "Q", 0, fluid) for t in np.atleast_1d(T)])), "liquid"


def _temperature_error_size(pfun, T_true, T_printed):
    """|Δln P| / noise that a temperature misprint causes (inf off the curve's range)."""
    try:
        lo, hi = (float(np.log(pfun(np.array([t]))[0])) for t in (T_true, T_printed))
    except (ValueError, IndexError):
        return math.inf
    return abs(hi - lo) / NOISE if math.isfinite(hi - lo) else math.inf


def _swap(text, rng):
    from audit.diagnose import adjacent_swaps

    opts = adjacent_swaps(text)
    # a swap that changes the value by less than 0.5 % is not a gross error; skip those
    opts = [o for o in opts if abs(float(o) / float(text.replace(",", ".")) - 1) > 0.005]
    return opts[rng.integers(len(opts))] if opts else None


def unit_slip_for_factor(header_unit: str, printed_over_true: float) -> str | None:
    """The common unit a value printed `printed_over_true` times its size in `header_unit` is
    really written in, or None when no common unit is that size."""
    from audit.diagnose.units import COMMON_PRESSURE_UNITS, pressure_unit_size_Pa

    size = pressure_unit_size_Pa(header_unit) / printed_over_true
    return next((u for u in COMMON_PRESSURE_UNITS if abs(pressure_unit_size_Pa(u) / size - 1) < 1e-6), None)


def _plant_swap(texts, i, rng, size_of):
    """Transpose two adjacent digits of texts[i] in place: (size of the error in σ, [i]), or (inf, [])."""
    new = _swap(texts[i], rng)
    if not new:
        return math.inf, []
    size = size_of(texts[i], new)
    texts[i] = new
    return size, [i]


def make_table(seed):
    from audit.model import Dataset, Point

    rng = np.random.default_rng(seed)
    sub = SUBSTANCES[seed % len(SUBSTANCES)]
    (lo, hi), pfun, phase = _curve(sub)
    n = int(rng.integers(12, 31))
    T = np.sort(rng.uniform(lo, hi, n))
    T = np.round(T, 2)
    P = pfun(T) * np.exp(rng.normal(0, NOISE, n))
    n_src = int(rng.integers(1, 6))
    src = [f"S{(i % n_src) + 1}" for i in range(n)] if n_src > 1 or rng.random() < 0.5 else [None] * n
    with_u = rng.random() < 0.5
    fault = FAULTS[int(rng.integers(len(FAULTS)))]
    bias = None
    if n_src >= 3 and rng.random() < 0.4:
        bias = ("S2", "pressure-scale" if rng.random() < 0.5 else "temperature-offset")
    unit, fac = ("Pa", 1.0) if sub == "ice" else ("kPa", 1e3)
    T_txt, P_txt = [], []
    for i in range(n):
        t, p = T[i], P[i]
        if bias and src[i] == bias[0]:
            if bias[1] == "pressure-scale":
                p *= 1.03
            else:
                t += 0.3
        T_txt.append(f"{t:.2f}")
        P_txt.append(f"{p / fac:.5g}")
    bad: list[int] = []
    also = None  # a cause as right as the planted one (see benchmarks.compilations.Row)
    size = math.inf
    if fault != "clean":
        i = int(rng.integers(n))
        if fault.startswith("random"):
            k = float(fault.split("-")[1][:-1])
            P_txt[i] = f"{float(P_txt[i]) * math.exp(rng.choice([-1, 1]) * k * NOISE):.5g}"
            bad = [i]
        elif fault == "pressure-unit":
            alt = ["mmHg", "psi", "atm", "inHg"][int(rng.integers(4))]
            from audit.diagnose.units import pressure_unit_size_Pa

            P_txt[i] = f"{float(P_txt[i]) * fac / pressure_unit_size_Pa(alt):.5g}"
            bad = [i]
        elif fault == "unit-block":
            j = int(rng.integers(0, max(1, n - 3)))
            bad = list(range(j, min(n, j + 3)))
            for b in bad:
                P_txt[b] = f"{float(P_txt[b]) * (fac if unit == 'kPa' else 1e-3):.5g}"
        elif fault == "decimal-shift":
            power = int(rng.choice([-1, 1]))
            P_txt[i] = f"{float(P_txt[i]) * 10.0 ** power:.5g}"
            bad = [i]
            also = "pressure-unit" if unit_slip_for_factor(unit, 10.0 ** power) else None
        elif fault == "digit-swap-P":
            size, bad = _plant_swap(P_txt, i, rng, lambda a, b: abs(math.log(float(b) / float(a))) / NOISE)
        elif fault == "digit-swap-T":
            size, bad = _plant_swap(T_txt, i, rng, lambda a, b: _temperature_error_size(pfun, float(a), float(b)))
        elif fault == "temperature-unit":
            T_txt[i] = f"{float(T_txt[i]) - 273.15:.2f}"
            bad = [i]
        if not bad:
            fault = "clean"
        elif fault.startswith("digit-swap") and size < GROSS_SIGMA:
            fault += " <10σ"
    pts = []
    for i in range(n):
        pts.append(Point(row=i + 1, T_K=float(T_txt[i]), P_Pa=float(P_txt[i]) * fac, phase=phase, source=src[i],
                         u_T_K=0.01 if with_u else None, u_P_Pa=NOISE * float(P_txt[i]) * fac if with_u else None,
                         T_text=T_txt[i], P_text=P_txt[i], T_text_unit="K", P_text_unit=unit))
    return Dataset(points=tuple(pts)), {"fault": fault, "bad": bad, "bias": bias, "n_src": n_src, "with_u": with_u,
                                        "substance": sub, "also_right": also}



#: the broad tables (issue: every unit pair, both °C/K directions, known or unknown triple point,
#: one or two branches, five or more substances, 9-150 rows, uncertainties or not)
BROAD_FAULTS = ("clean", "random-4σ", "random-6σ", "random-10σ", "pressure-unit", "unit-block", "decimal-shift",
                "digit-swap-P", "digit-swap-T", "temperature-unit")
BROAD_SUBSTANCES = ("water", "ice", "ice+water", "toluene", "hexane", "ethanol", "acetone", "benzene")
_COOLPROP = {"toluene": ("Toluene", (260.0, 380.0)), "hexane": ("n-Hexane", (230.0, 330.0)),
             "ethanol": ("Ethanol", (260.0, 420.0)), "acetone": ("Acetone", (240.0, 380.0)),
             "benzene": ("Benzene", (285.0, 420.0))}


def _broad_curve(name):
    """(T range, T -> P [Pa], phase of each T) of one substance or water's two branches."""
    from audit.thermo.reference import ICE_SUBLIMATION, WATER_SATURATION

    if name == "water":
        return (275.0, 370.0), WATER_SATURATION.p, (lambda T: np.full(np.size(T), "liquid"))
    if name == "ice":
        return (200.0, 272.0), ICE_SUBLIMATION.p, (lambda T: np.full(np.size(T), "solid"))
    if name == "ice+water":
        def p(T):
            T = np.atleast_1d(np.asarray(T, float))
            out = np.empty(T.size)
            ice = T < 273.16
            if ice.any():
                out[ice] = ICE_SUBLIMATION.p(T[ice])
            if (~ice).any():
                out[~ice] = WATER_SATURATION.p(T[~ice])
            return out
        return (230.0, 330.0), p, (lambda T: np.where(np.atleast_1d(T) < 273.16, "solid", "liquid"))
    import CoolProp.CoolProp as CP

    fluid, rng_ = _COOLPROP[name]
    return rng_, (lambda T: np.array([CP.PropsSI("P", "T", float(t), "Q", 0, fluid) for t in np.atleast_1d(T)])), \
        (lambda T: np.full(np.size(T), "liquid"))


def _sig(x, digits=5):
    return f"{x:.{digits}g}"


def make_broad_table(seed):
    """One table of the broad set: its Dataset and its labels (see BROAD_FAULTS, BROAD_SUBSTANCES)."""
    from audit.model import Dataset, Metadata, Point
    from audit.units import PRESSURE_UNITS, pascal_per

    rng = np.random.default_rng(seed)
    sub = BROAD_SUBSTANCES[int(rng.integers(len(BROAD_SUBSTANCES)))]
    (lo, hi), pfun, phase_of = _broad_curve(sub)
    n = int(round(math.exp(rng.uniform(math.log(9), math.log(150)))))
    T = np.round(np.sort(rng.uniform(lo, hi, n)), 2)
    P = pfun(T) * np.exp(rng.normal(0, NOISE, n))
    phases = phase_of(T)
    water = sub in ("water", "ice", "ice+water")
    known = water and rng.random() < 0.5           # --substance water given, or not
    labelled = rng.random() < 0.5                  # a phase column, or not
    n_src = int(rng.integers(1, 6))
    src = [f"S{(i % n_src) + 1}" for i in range(n)] if n_src > 1 or rng.random() < 0.5 else [None] * n
    with_u = rng.random() < 0.5
    units = list(PRESSURE_UNITS)
    P_unit = units[int(rng.integers(len(units)))]
    T_unit = "degC" if rng.random() < 0.3 else "K"
    size = pascal_per(P_unit)
    fault = BROAD_FAULTS[int(rng.integers(len(BROAD_FAULTS)))]
    bias = None
    if n_src >= 3 and rng.random() < 0.4:
        bias = ("S2", "pressure-scale" if rng.random() < 0.5 else "temperature-offset")
    T_print = T.copy()
    for i in range(n):
        if bias and src[i] == bias[0]:
            if bias[1] == "pressure-scale":
                P[i] *= 1.03
            else:
                T_print[i] += 0.3
    T_txt = [f"{(t - 273.15) if T_unit == 'degC' else t:.2f}" for t in T_print]
    P_txt = [_sig(p / size) for p in P]
    bad, also, size_sigma = [], None, math.inf

    def others(u):
        return [a for a in units if abs(math.log(pascal_per(a) / pascal_per(u))) > math.log(1.05)]

    if fault != "clean":
        i = int(rng.integers(n))
        if fault.startswith("random"):
            k = float(fault.split("-")[1][:-1])
            P_txt[i], bad = _sig(float(P_txt[i]) * math.exp(rng.choice([-1, 1]) * k * NOISE)), [i]
        elif fault == "pressure-unit":
            alt = others(P_unit)[int(rng.integers(len(others(P_unit))))]
            P_txt[i], bad = _sig(P[i] / pascal_per(alt)), [i]
        elif fault == "unit-block":
            alt = others(P_unit)[int(rng.integers(len(others(P_unit))))]
            length = int(rng.integers(2, 5))
            j = int(rng.integers(0, max(1, n - length + 1)))
            bad = list(range(j, min(n, j + length)))
            for b in bad:
                P_txt[b] = _sig(P[b] / pascal_per(alt))
        elif fault == "decimal-shift":
            power = int(rng.choice([-1, 1]))
            P_txt[i], bad = _sig(float(P_txt[i]) * 10.0 ** power), [i]
            also = "pressure-unit" if unit_slip_for_factor(P_unit, 10.0 ** power) else None
        elif fault == "digit-swap-P":
            size_sigma, bad = _plant_swap(P_txt, i, rng, lambda a, b: abs(math.log(float(b) / float(a))) / NOISE)
        elif fault == "digit-swap-T":
            off = 273.15 if T_unit == "degC" else 0.0
            size_sigma, bad = _plant_swap(T_txt, i, rng, lambda a, b: _temperature_error_size(
                pfun, float(a) + off, float(b) + off))
        elif fault == "temperature-unit":
            # both directions: a °C value in a kelvin column, a kelvin value in a °C column
            T_txt[i] = f"{T_print[i] - 273.15:.2f}" if T_unit == "K" else f"{T_print[i]:.2f}"
            bad = [i]
        if not bad:
            fault = "clean"
        elif fault.startswith("digit-swap") and size_sigma < GROSS_SIGMA:
            fault += " <10σ"
    pts = []
    for i in range(n):
        T_K = float(T_txt[i]) + (273.15 if T_unit == "degC" else 0.0)
        P_Pa = float(P_txt[i]) * size
        pts.append(Point(row=i + 1, T_K=T_K, P_Pa=P_Pa, phase=str(phases[i]) if labelled else "unknown",
                         source=src[i], u_T_K=0.01 if with_u else None,
                         u_P_Pa=NOISE * P_Pa if with_u else None, T_text=T_txt[i], P_text=P_txt[i],
                         T_text_unit=T_unit, P_text_unit=P_unit))
    md = Metadata(substance="water") if known else Metadata()
    return Dataset(points=tuple(pts), metadata=md), {
        "fault": fault, "bad": bad, "bias": bias, "n_src": n_src, "with_u": with_u, "substance": sub,
        "also_right": also, "P_unit": P_unit, "T_unit": T_unit, "labelled": labelled, "known": known,
        "two_branches": sub == "ice+water"}

def plain_flags(ds):
    """Straight ln P = a + b/T line per branch, flag |r| > 3 s (the plain approach)."""
    out = set()
    by = defaultdict(list)
    for i, p in enumerate(ds.points):
        if p.readable and p.T_K > 0 and p.P_Pa > 0:
            by[p.phase].append(i)
    for idx in by.values():
        T = np.array([ds.points[i].T_K for i in idx])
        y = np.log([ds.points[i].P_Pa for i in idx])
        X = np.column_stack([np.ones_like(T), 1 / T])
        b, *_ = np.linalg.lstsq(X, y, rcond=None)
        r = y - X @ b
        s = r.std(ddof=2)
        out |= {idx[j] for j in np.flatnonzero(np.abs(r) > 3 * s)}
    return out


def run_one(seed, profile="default", broad=True):
    from audit.pipeline import run_audit
    from audit.profiles import load_profile

    ds, lab = (make_broad_table if broad else make_table)(seed)
    res = run_audit(ds, load_profile(profile), audited_at="2024-01-01T00:00:00Z")
    out = next(c for c in res.checks if c.id == "outliers")
    by_check = {r - 1 for r in out.point_status}
    # the verdict a curator reads: the point's status from every check (e.g. a °C value in
    # a kelvin column is rejected by physical-range before the outlier test sees it)
    st = {p.row - 1: p.status for p in res.points if p.status != "ok"}
    causes = {p.row - 1: p.cause.kind for p in res.points if p.cause is not None}
    src_flags = {s.source for s in res.sources if s.status != "ok"}
    patterns = {s.source: s.pattern for s in res.sources}
    lab = {**lab, "verdict": res.verdict}
    return lab, st, causes, plain_flags(ds), src_flags, patterns, len(ds.points), by_check


def _f1(tp, fp, fn):
    return 2 * tp / (2 * tp + fp + fn) if tp else 0.0


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--tables", type=int, default=600)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--seed", type=int, default=1000)
    ap.add_argument("--profile", default="default", help="rule profile name or .toml path")
    ap.add_argument("--narrow", action="store_true",
                    help="the earlier tables (four substances, kPa or Pa headers, K only, 12-30 rows, "
                         "blocks of 3 rows): figures comparable with earlier rounds")
    a = ap.parse_args(argv)
    seeds = list(range(a.seed, a.seed + a.tables))
    t0 = time.time()
    results = []
    with Pool(a.workers) as pool:
        for k, r in enumerate(pool.imap_unordered(partial(run_one, profile=a.profile, broad=not a.narrow), seeds,
                                                  chunksize=4), 1):
            results.append(r)
            if k % 50 == 0:
                print(f"  {k}/{len(seeds)} tables, {time.time() - t0:.0f} s", flush=True)
    found = defaultdict(lambda: [0, 0, 0, 0])  # fault -> [rows, found by audit, by plain, by outliers alone]
    clean = [0, 0, 0, 0]  # clean rows, suspect, reject, plain flagged
    cause_ok = cause_n = 0
    bias_n = bias_found = bias_pattern_ok = 0
    unbiased_sources = false_src = 0
    cause_by = defaultdict(lambda: [0, 0])  # fault -> [cause right, found]
    gross_kinds = {"random-10σ", "pressure-unit", "unit-block", "decimal-shift", "digit-swap-P", "digit-swap-T",
                   "temperature-unit"}
    gross_counts = [[0, 0, 0], [0, 0, 0]]  # audit, plain: [true positives, false positives, false negatives]
    for lab, st, causes, plain, src_flags, patterns, n, by_check in results:
        for i in range(n):
            if i in lab["bad"]:
                f = found[lab["fault"]]
                f[0] += 1
                f[1] += i in st
                f[2] += i in plain
                f[3] += i in by_check
                if i in st:
                    right = i in causes and causes[i] in (EXPECTED_CAUSE.get(lab["fault"], ""), lab.get("also_right"))
                    cause_by[lab["fault"]][0] += right
                    cause_by[lab["fault"]][1] += 1
                if i in causes:
                    cause_n += 1
                    cause_ok += causes[i] in (EXPECTED_CAUSE.get(lab["fault"], ""), lab.get("also_right"))
                if lab["fault"] in gross_kinds:
                    for counts, flagged in ((gross_counts[0], i in st), (gross_counts[1], i in plain)):
                        counts[0 if flagged else 2] += 1
            else:
                clean[0] += 1
                clean[1] += st.get(i) == "suspect"
                clean[2] += st.get(i) == "reject"
                clean[3] += i in plain
                # every flag on a row without a planted fault is a false alarm
                gross_counts[0][1] += i in st
                gross_counts[1][1] += i in plain
        if lab["n_src"] >= 2:
            names = {f"S{j + 1}" for j in range(lab["n_src"])}
            for s in names:
                if lab["bias"] and s == lab["bias"][0]:
                    bias_n += 1
                    bias_found += s in src_flags
                    bias_pattern_ok += patterns.get(s) == lab["bias"][1]
                else:
                    unbiased_sources += 1
                    false_src += s in src_flags
    pct = lambda x, y: f"{100 * x / y:6.1f} %" if y else "    n/a"
    print(f"\n{len(results)} tables (seeds {a.seed}–{a.seed + a.tables - 1}, profile {a.profile}) in "
          f"{time.time() - t0:.0f} s; noise {100 * NOISE:.1f} %\n")
    print(f"{'fault':18s} {'rows':>5s} {'audit found':>12s} {'outliers only':>14s} {'plain found':>12s}")
    for f in REPORTED:
        n, x, y, z = found[f]
        print(f"{f:18s} {n:5d} {pct(x, n):>12s} {pct(z, n):>14s} {pct(y, n):>12s}")
    for label, group in (("4–6σ (target ≥ 80 %)", ("random-4σ", "random-6σ")),
                         ("gross (target ≥ 98 %)", ("random-10σ", "pressure-unit", "unit-block", "decimal-shift",
                                                 "digit-swap-P", "digit-swap-T",
                                                   "temperature-unit"))):
        n = sum(found[f][0] for f in group)
        x = sum(found[f][1] for f in group)
        print(f"{label:18s} {n:5d} {pct(x, n):>12s}")
    print(f"\nclean rows: {clean[0]}; audit suspect {pct(clean[1], clean[0])}, reject {pct(clean[2], clean[0])}, "
          f"suspect or reject {pct(clean[1] + clean[2], clean[0])}; plain flagged {pct(clean[3], clean[0])}")
    print(f"cause right: {cause_ok}/{cause_n} diagnosed = {pct(cause_ok, cause_n)}")
    print(f"\n{'cause kind':18s} {'rows':>5s} {'recall':>9s} {'cause right':>12s}   (of the rows found)")
    for f in REPORTED:
        if f in EXPECTED_CAUSE and found[f][0]:
            n, x = found[f][0], found[f][1]
            print(f"{f:18s} {n:5d} {pct(x, n):>9s} {pct(cause_by[f][0], cause_by[f][1]):>12s}")
    clean_tables = [lab for lab, *_ in results if lab["fault"] == "clean" and not lab["bias"]]
    passed = sum(lab["verdict"] == "pass" for lab in clean_tables)
    print(f"\nclean datasets (no fault, no biased source) with verdict pass: {passed}/{len(clean_tables)} = "
          f"{pct(passed, len(clean_tables))} (target ≥ 80 %)")
    f1_audit, f1_plain = _f1(*gross_counts[0]), _f1(*gross_counts[1])
    print(f"gross-error detection F1 (suspect or reject counted as flagged): audit {f1_audit:.3f}, plain "
          f"straight-line 3σ rule {f1_plain:.3f}, ratio {f1_audit / f1_plain if f1_plain else math.inf:.2f} "
          f"(target ≥ 1.3)")
    print(f"biased sources found: {bias_found}/{bias_n} = {pct(bias_found, bias_n)}; pattern right "
          f"{pct(bias_pattern_ok, bias_n)}; false source flags {false_src}/{unbiased_sources} = "
          f"{pct(false_src, unbiased_sources)} (plain approach: no source analysis)")


if __name__ == "__main__":
    main()
