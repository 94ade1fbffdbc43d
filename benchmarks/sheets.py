"""Supplier sheets: how often the decoder recovers the real units of published
coefficient sets stated wrongly, how often a right sheet passes without a
warning, and the time per sheet.

Data: the Antoine coefficient sets of Poling, Prausnitz & O'Connell, The
Properties of Gases and Liquids, 5th ed. (2000), as tabulated by the
``chemicals`` library (``Psat_data_AntoinePoling``: log10(P/Pa), T in K, with
each set's Tmin–Tmax).  For each set and seed:

* the set is re-expressed exactly in a random *true* reading (log10 or ln ×
  K, °C or °F × a pressure unit; ``Antoine.converted``), over its own range;
* a **mis-stated** sheet states a random wrong reading (one, two or three
  parts wrong; twins of one size such as mmHg/Torr are not "wrong");
* a **right** sheet states the true reading, or leaves one or more parts
  unstated;
* half the sheets carry a table of six values printed from the true equation
  (sharing the sheet's unit note, as tables on sheets do).

The reference is the first other published set the library holds for the
substance (Wagner, PPDS or DIPPR 101; never the Antoine set itself); a
substance with none is decided by its normal boiling point and physics.

Printed: the share decoded right among mis-stated sheets (target ≥ 98 %),
the share of right sheets accepted without a warning (target ≥ 99 %), both
per evidence kind, the misses' true and stated readings, and the median time
per sheet for the decoding alone and for the whole sheet audit (target
≤ 50 ms in-process).  No assertions: a measurement, not a test.

Run:  python benchmarks/sheets.py [--seed 5000] [--rounds 1] [--limit N]
"""

from __future__ import annotations

import argparse
import math
import statistics
import sys
import time
from collections import Counter
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import numpy as np  # noqa: E402

#: true and stated pressure units drawn from (one per size; the ingest's common units)
PRESSURE_UNITS = ("Pa", "kPa", "MPa", "bar", "mbar", "atm", "mmHg", "psi", "inHg")
TEMPERATURE_UNITS = ("K", "degC", "degF")
BASES = ("log10", "ln")


def _sheet_text(cas, A, B, C, stated, T_range, table):
    lines = ["[sheet]", f'cas = "{cas}"', "", "[equation]", 'form = "antoine"',
             f"coefficients = {{ A = {A!r}, B = {B!r}, C = {C!r} }}"]
    gives, T_unit, P_unit = stated
    if gives:
        lines.append(f'gives = "{gives}"')
    if T_unit:
        lines.append(f'T_unit = "{T_unit}"')
    if P_unit:
        lines.append(f'P_unit = "{P_unit}"')
    lines.append(f"range = [{T_range[0]!r}, {T_range[1]!r}]")
    if table:
        lines += ["", "[table]", "rows = [" + ", ".join(f'[{t!r}, "{p}"]' for t, p in table) + "]"]
    return "\n".join(lines) + "\n"


def make_case(row, cas, rng, kind):
    """(sheet text, true reading, stated reading) for one published set."""
    from audit.sheet.decode import same_pressure_unit
    from audit.thermo.equations import Antoine
    from audit.units import kelvin_affine, pascal_per

    true = (str(rng.choice(BASES)), str(rng.choice(TEMPERATURE_UNITS)), str(rng.choice(PRESSURE_UNITS)))
    eq = Antoine(float(row.A), float(row.B), float(row.C), base="log10", P_unit="Pa", T_unit="K")
    conv = eq.converted(base=true[0], P_unit=true[2], T_unit=true[1])
    scale, offset = kelvin_affine(true[1])
    lo, hi = ((float(row.Tmin) - offset) / scale, (float(row.Tmax) - offset) / scale)
    lo, hi = round(lo, 2), round(hi, 2)
    if kind == "wrong":
        while True:
            stated = list(true)
            n_wrong = int(rng.integers(1, 4))
            for part in rng.choice(3, size=n_wrong, replace=False):
                stated[part] = str(rng.choice((BASES, TEMPERATURE_UNITS, PRESSURE_UNITS)[part]))
            if not (stated[0] == true[0] and stated[1] == true[1] and same_pressure_unit(stated[2], true[2])):
                break
    else:
        stated = list(true)
        for part in range(3):
            if rng.random() < 0.25:
                stated[part] = None
    table = None
    if rng.random() < 0.5:
        Ts = np.linspace(lo, hi, 8)[1:-1]
        table = []
        for t in Ts:
            T_K = scale * t + offset
            p = float(np.exp(conv.ln_p(T_K) - math.log(pascal_per(true[2]))))
            table.append((round(float(t), 2), f"{p:.4g}"))
    text = _sheet_text(cas, round(conv.A, 6), round(conv.B, 4), round(conv.C, 4), tuple(stated), (lo, hi), table)
    return text, true, tuple(stated)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seed", type=int, default=5000)
    ap.add_argument("--rounds", type=int, default=1, help="mis-stated and right sheets per set")
    ap.add_argument("--limit", type=int, default=None, help="only the first N sets")
    args = ap.parse_args(argv)

    import chemicals.vapor_pressure as vp

    from audit.profiles import load_profile
    from audit.sheet.decode import decode_sheet, same_pressure_unit
    from audit.sheet.read import sheet_from_text
    from audit.sheet.reference import sheet_reference
    from audit.sheet.run import decode_settings, run_sheet_audit
    from audit.substances import library_constants

    profile = load_profile("default")
    settings = decode_settings(profile)
    from audit.ingest.metadata import cas_number_is_valid

    table = vp.Psat_data_AntoinePoling.dropna(subset=["A", "B", "C", "Tmin", "Tmax"])
    # the library files a few mixtures under made-up numbers that no sheet could carry
    table = table[[cas_number_is_valid(c) for c in table.index]]
    if args.limit:
        table = table.iloc[:args.limit]
    rng = np.random.default_rng(args.seed)
    constants_of: dict = {}
    results = {"wrong": [], "right": []}
    t_decode, t_audit = [], []
    misses = []
    for cas, row in table.iterrows():
        if cas not in constants_of:
            try:
                constants_of[cas] = {k: c.value for k, c in library_constants(cas)[2].items()}
            except Exception:
                constants_of[cas] = {}
        for _ in range(args.rounds):
            for kind in ("wrong", "right"):
                text, true, stated = make_case(row, cas, rng, kind)
                sheet = sheet_from_text(text.encode(), f"{cas}.sheet.toml")
                ref = sheet_reference(sheet, cas, exclude=("AntoinePoling",))
                t0 = time.perf_counter()
                d = decode_sheet(sheet, ref, constants_of[cas], settings)
                t_decode.append(time.perf_counter() - t0)
                got = d.best
                right = got.log == true[0] and got.T_unit == true[1] and same_pressure_unit(got.P_unit, true[2])
                evidence = ("reference" if ref is not None else "boiling point/physics") + (
                    " + table" if sheet.table is not None else "")
                if kind == "wrong":
                    ok = right
                else:
                    t0 = time.perf_counter()
                    res = run_sheet_audit(sheet, profile, exclude_references=("AntoinePoling",))
                    t_audit.append(time.perf_counter() - t0)
                    units = next(c for c in res.checks if c.id == "sheet-units")
                    ok = right and units.status == "pass"
                results[kind].append((ok, evidence))
                if not ok:
                    misses.append((kind, row.Chemical.strip(), cas, true, stated, got, evidence,
                                   d.best_evidence.summary()))
    print(f"sets {len(table)}, rounds {args.rounds}, seed {args.seed}")
    for kind, label, target in (("wrong", "mis-stated sheets decoded right", 98.0),
                                ("right", "right sheets accepted without a warning", 99.0)):
        r = results[kind]
        share = 100 * sum(ok for ok, _ in r) / len(r)
        print(f"{label}: {sum(ok for ok, _ in r)}/{len(r)} = {share:.1f} % (target ≥ {target:g} %)")
        by = Counter(e for _, e in r)
        for e in sorted(by):
            sub = [ok for ok, ev in r if ev == e]
            print(f"    {e:32s} {sum(sub)}/{len(sub)} = {100 * sum(sub) / len(sub):.1f} %")
    print(f"time per sheet, median: decoding {1000 * statistics.median(t_decode):.1f} ms, whole sheet audit "
          f"{1000 * statistics.median(t_audit):.1f} ms (target ≤ 50 ms)")
    if misses:
        print(f"misses ({len(misses)}):")
        for kind, name, cas, true, stated, got, evidence, why in misses[:40]:
            print(f"  {kind:5s} {name[:22]:22s} {cas:12s} true {true} stated {stated} -> {got.log},{got.T_unit},"
                  f"{got.P_unit} [{evidence}] {why[:90]}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
