"""copied-values on synthetic compilations of water data.

SYNTHETIC DATA: every source label below is invented; the "measurements" are
water's saturation pressure from IAPWS-95 (Wagner & Pruss, J. Phys. Chem.
Ref. Data 31, 387 (2002), doi:10.1063/1.1461829) through the ``iapws``
package, printed to a stated number of digits, with invented noise where a
test says so.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from audit.checks.copied_values import (
    coincidence_probability,
    printed_value,
    same_printed,
)
from audit.frozen import thawed
from audit.model import Dataset, Point
from audit.pipeline import run_audit
from audit.profiles import load_profile
from tests.conftest import iapws_saturation_pressure

MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B


def _rows(source, T, P_kPa_text, T_digits=2, start=1):
    """Points of one source: temperatures printed with T_digits decimals, pressures in kPa as given."""
    return [Point(row=start + i, T_K=float(f"{t:.{T_digits}f}"), P_Pa=float(p) * 1000, phase="liquid",
                  source=source, T_text=f"{t:.{T_digits}f}", P_text=p, P_text_unit="kPa")
            for i, (t, p) in enumerate(zip(T, P_kPa_text))]


def _dataset(*groups):
    pts, row = [], 1
    for g in groups:
        for p in g:
            pts.append(Point(**{**p.__dict__, "row": row}))
            row += 1
    return Dataset(points=tuple(pts), header=("T/K", "p/kPa", "source"),
                   cells=tuple((p.T_text, p.P_text, p.source or "") for p in pts), file_name="<synthetic>")


def _printed(P_Pa, sig):
    return [f"{p / 1000:.{sig}g}" for p in P_Pa]


def _noisy(T, rel, seed):
    return iapws_saturation_pressure(T) * (1 + rel * np.random.default_rng(seed).standard_normal(len(T)))


def _copied(res):
    return next(c for c in res.checks if c.id == "copied-values")


def _profile(tmp_path, **options):
    body = '[profile]\nname = "test"\nextends = "default"\n\n[checks.copied-values]\n'
    body += "".join(f"{k} = {v}\n" for k, v in options.items())
    path = tmp_path / "copied.toml"
    path.write_text(body, encoding="utf-8")
    return load_profile(str(path))


# --- the probability model, against a numerical integration --------------------------------

@pytest.mark.parametrize("width, mu, sigma", [(1.0, 0.0, 0.3), (1.0, 0.7, 0.5), (0.2, 0.0, 1.0),
                                              (1e-5, 2e-5, 2e-4), (0.5, -0.3, 0.05)])
def test_coincidence_probability_matches_numerical_integration(width, mu, sigma):
    # E[max(0, 1-|d|/w)] for d ~ N(mu, sigma^2), by the trapezoid rule on a fine grid
    d = np.linspace(mu - 12 * sigma, mu + 12 * sigma, 400001)
    dens = np.exp(-0.5 * ((d - mu) / sigma) ** 2) / (sigma * math.sqrt(2 * math.pi))
    expected = np.trapezoid(np.clip(1 - np.abs(d) / width, 0, None) * dens, d)
    assert coincidence_probability(width, mu, sigma) == pytest.approx(expected, rel=1e-6, abs=1e-12)


def test_coincidence_probability_limits():
    # no scatter: the triangle itself; large scatter: w/(sqrt(2 pi) sigma), the density at 0 times w
    assert coincidence_probability(1.0, 0.25, 0.0) == pytest.approx(0.75)
    assert coincidence_probability(1.0, 2.0, 0.0) == 0.0
    assert coincidence_probability(1e-3, 0.0, 1.0) == pytest.approx(1e-3 / math.sqrt(2 * math.pi), rel=1e-3)


def test_cells_match_as_printed_numbers_at_the_coarser_precision():
    same = [printed_value(t) for t in ("10.02", "10.020", " 1.002e1", "10,02", "10.0234", "10.015")]
    assert all(same_printed(same[0], x) for x in same)
    assert not same_printed(printed_value("10.02"), printed_value("10.03"))
    assert not same_printed(printed_value("10.0250"), printed_value("10.0249"))  # same precision: digits differ
    assert same_printed(printed_value("300.15"), printed_value("300.2"))
    assert printed_value("0.0870").digits == 3 and printed_value("760.0").digits == 4
    # an integer's trailing zeros may be padding: "1000" is read as one digit (the cautious reading here)
    assert printed_value("760").digits == 2 and printed_value("1000").digits == 1
    assert printed_value("1000").step == 1000 and printed_value("101325").step == 1
    assert printed_value("3.5").digits == 2 and printed_value("1.2e-3").digits == 2
    # one unit in the last digit as a difference in ln P: 0.01/10.02 for kPa, ln(10)*0.001 for log10
    assert printed_value("10.02", "kPa").resolution_lnP == pytest.approx(0.01 / 10.02, rel=1e-12)
    assert printed_value("3.123", "log10(P/Pa)").resolution_lnP == pytest.approx(math.log(10) * 1e-3, rel=1e-12)
    for junk in ("nan", "n/a", "", "inf", "0"):
        assert printed_value(junk).value is None


# --- synthetic compilations -----------------------------------------------------------------

def test_series_republished_with_temperatures_shifted_by_2_K(default_profile):
    T_a = np.arange(300.0, 336.0, 5.0)  # 8 rows
    P_a = _printed(iapws_saturation_pressure(T_a), 6)
    orig = _rows("Ostrander 1958 (synthetic)", T_a, P_a)
    other_T = np.array([302.5, 317.5, 332.5])
    other = _rows("Vaillant 2004 (synthetic)", other_T, _printed(_noisy(other_T, 5e-4, 1), 6))
    # the copy: rows 2-8 of the original, temperatures +2 K, after two rows of its own
    own_T = np.array([280.0, 290.0])
    copy = (_rows("Lindqvist 1969 (synthetic)", own_T, _printed(_noisy(own_T, 5e-4, 2), 6))
            + _rows("Lindqvist 1969 (synthetic)", T_a[1:] + 2.0, P_a[1:]))
    res = run_audit(_dataset(orig, other, copy), default_profile)
    chk = _copied(res)
    assert chk.status == "warn", chk.message
    assert chk.metrics["n_pairs"] == 1
    pair = chk.metrics["pairs"][0]
    assert (pair["source_a"], pair["source_b"]) == ("Ostrander 1958 (synthetic)", "Lindqvist 1969 (synthetic)")
    # a frozen result holds its lists as tuples
    assert list(pair["rows_a"]) == [2, 3, 4, 5, 6, 7, 8]
    assert list(pair["rows_b"]) == [14, 15, 16, 17, 18, 19, 20]
    assert pair["shared"] == "pressure" and pair["ratio"] is None
    assert pair["shift_K"] == pytest.approx(2.0, abs=1e-9)
    assert pair["shift_spread_K"] == pytest.approx(0.0, abs=1e-9)
    assert "'Ostrander 1958 (synthetic)' and 'Lindqvist 1969 (synthetic)' print the same 7 pressures" in chk.message
    assert "rows 2–8 and 14–20" in chk.message and "+2.00 K" in chk.message
    flagged = {f.row for f in chk.flags}
    assert flagged == set(range(2, 9)) | set(range(14, 21))
    assert not chk.point_status  # which copy to keep is the curator's call


def test_series_republished_unchanged(default_profile):
    T = np.arange(300.0, 361.0, 10.0)
    P = _printed(iapws_saturation_pressure(T), 6)
    T_b = np.arange(305.0, 366.0, 10.0)
    res = run_audit(_dataset(_rows("Arkwright 1961 (synthetic)", T, P),
                             _rows("Bellamy 1975 (synthetic)", T_b, _printed(_noisy(T_b, 5e-4, 3), 6)),
                             _rows("Cordier 1980 (synthetic)", T[:5], P[:5])), default_profile)
    chk = _copied(res)
    assert [(p["source_a"], p["source_b"], p["rows_a"], p["rows_b"]) for p in thawed(chk.metrics["pairs"])] == [
        ("Arkwright 1961 (synthetic)", "Cordier 1980 (synthetic)", [1, 2, 3, 4, 5], [15, 16, 17, 18, 19])]
    assert chk.metrics["pairs"][0]["shift_K"] == 0.0
    assert "at the same temperatures" in chk.message


def test_copy_re_rounded_to_fewer_digits_is_still_a_copy(default_profile):
    # the copier printed one decimal fewer in T and five digits instead of six in P
    T = np.arange(300.15, 340.0, 5.0)  # 8 rows
    P_a = _printed(iapws_saturation_pressure(T), 6)
    P_b = [f"{float(p):.5g}" for p in P_a]
    res = run_audit(_dataset(_rows("Pemberton 1949 (synthetic)", T, P_a),
                             _rows("Quist 1972 (synthetic)", T, P_b, T_digits=1)), default_profile)
    chk = _copied(res)
    assert chk.metrics["n_pairs"] == 1, chk.message
    pair = chk.metrics["pairs"][0]
    assert pair["shared"] == "pressure" and list(pair["rows_a"]) == list(range(1, 9))
    assert abs(pair["shift_K"]) <= 0.05 + 1e-9  # half a unit of the coarser printed temperature
    assert "at the same temperatures" in chk.message


def test_copy_through_a_pressure_factor_at_the_same_temperatures(default_profile):
    # the copier multiplied by 1.01325 (atm taken for bar) and printed 6 digits again
    T = np.arange(300.0, 341.0, 5.0)
    P = iapws_saturation_pressure(T)
    P_a = _printed(P, 6)
    P_b = [f"{float(p) * 1.01325:.6g}" for p in P_a]
    res = run_audit(_dataset(_rows("Harrow 1955 (synthetic)", T, P_a), _rows("Iverson 1966 (synthetic)", T, P_b)),
                    default_profile)
    chk = _copied(res)
    assert chk.metrics["n_pairs"] == 1, chk.message
    pair = chk.metrics["pairs"][0]
    assert pair["shared"] == "temperature" and len(pair["rows_a"]) == 9
    # the factor is recovered to the rounding of 6 printed digits
    assert pair["ratio"] == pytest.approx(1.01325, rel=1e-5)
    assert "constant ratio 1.0132" in chk.message


def test_independent_precise_sources_at_the_same_round_temperatures_are_not_copies(default_profile):
    T = np.arange(300.0, 371.0, 10.0)
    res = run_audit(_dataset(_rows("Dahl 1983 (synthetic)", T, _printed(_noisy(T, 5e-4, 11), 6), T_digits=0),
                             _rows("Espinosa 1999 (synthetic)", T, _printed(_noisy(T, 5e-4, 12), 6), T_digits=0)),
                    default_profile)
    chk = _copied(res)
    assert chk.status == "pass", chk.message
    assert chk.metrics["n_pairs"] == 0


def test_temperatures_the_same_to_the_printed_digits_imply_no_pressure_difference(default_profile):
    # pairs of independent sources (own noise 0.01 %, the best data) at one set of temperatures,
    # printed 300.9 K and 300.85 K: the 0.05 K is rounding, not a shift that would make equal
    # pressures improbable (read as a shift, 17 of these 20 pairs were called copies)
    T = np.arange(300.85, 340.0, 5.0)  # 8 rows
    for seed in range(20):
        four = [str(int(round(p, 3 - math.floor(math.log10(p))))) for p in _noisy(T, 1e-4, 200 + seed)]
        pts_a = [Point(row=i + 1, T_K=float(f"{t:.1f}"), P_Pa=float(x), source="Rask 1931 (synthetic)",
                       T_text=f"{t:.1f}", P_text=x) for i, (t, x) in enumerate(zip(T, four))]
        pts_b = [Point(row=i + 1, T_K=float(f"{t:.2f}"), P_Pa=float(f"{p:.1f}"), source="Sorel 1958 (synthetic)",
                       T_text=f"{t:.2f}", P_text=f"{p:.1f}") for i, (t, p) in enumerate(zip(T, _noisy(T, 1e-4, 100 + seed)))]
        chk = _copied(run_audit(_dataset(pts_a, pts_b), default_profile))
        assert chk.metrics["n_pairs"] == 0, (seed, chk.message)


def test_a_biased_independent_source_is_not_a_rescaled_copy(default_profile):
    # 1 % high with its own 0.05 % scatter: a constant ratio, but not to the printed digits
    T = np.arange(300.0, 371.0, 5.0)
    res = run_audit(_dataset(_rows("Falk 1970 (synthetic)", T, _printed(_noisy(T, 5e-4, 21), 6), T_digits=0),
                             _rows("Gorski 1990 (synthetic)", T, _printed(1.01 * _noisy(T, 5e-4, 22), 6),
                                   T_digits=0)), default_profile)
    assert _copied(res).metrics["n_pairs"] == 0


def test_two_digit_handbook_values_agree_by_chance_at_the_same_temperatures(tmp_path, default_profile):
    T = np.arange(300.0, 401.0, 5.0)  # 21 rows
    a = _printed(_noisy(T, 5e-4, 31), 2)
    b = _printed(_noisy(T, 5e-4, 32), 2)
    shared = sum(x == y for x, y in zip(a, b))
    assert shared >= 18  # the two tables do print nearly the same digits
    ds = _dataset(_rows("Handbook A (synthetic)", T, a, T_digits=0), _rows("Handbook B (synthetic)", T, b, T_digits=0))
    # below the digit floor: not compared at all
    assert _copied(run_audit(ds, default_profile)).metrics["n_pairs"] == 0
    # compared, the chance model still calls a two-digit agreement at the same temperatures chance
    lenient = _profile(tmp_path, min_significant_digits=1)
    chk = _copied(run_audit(ds, lenient))
    assert chk.status == "pass", chk.message
    # ... but the same two digits at temperatures 2 K higher (IAPWS-95: P up ~11 %) are not chance
    shifted = _dataset(_rows("Handbook A (synthetic)", T, a, T_digits=0),
                       _rows("Handbook C (synthetic)", T + 2.0, a, T_digits=0))
    chk = _copied(run_audit(shifted, lenient))
    assert chk.metrics["n_pairs"] >= 1
    assert all(p["shift_K"] == pytest.approx(2.0) for p in chk.metrics["pairs"])


def test_replicates_inside_one_source_are_not_copies(default_profile):
    T = np.arange(300.0, 341.0, 10.0)
    P = _printed(iapws_saturation_pressure(T), 6)
    # each state printed twice within one source; the other source is independent
    rep = _rows("Jansen 1977 (synthetic)", np.repeat(T, 2), list(np.repeat(P, 2)))
    ind = _rows("Kowalski 2011 (synthetic)", T + 5.0, _printed(_noisy(T + 5.0, 5e-4, 41), 6))
    assert _copied(run_audit(_dataset(rep, ind), default_profile)).metrics["n_pairs"] == 0
    chk = _copied(run_audit(_dataset(rep), default_profile))
    assert chk.status == "skipped" and chk.message == "fewer than two named sources"


def test_no_source_column_is_skipped(default_profile):
    T = np.arange(300.0, 341.0, 10.0)
    pts = [Point(**{**p.__dict__, "source": None}) for p in _rows("x", T, _printed(iapws_saturation_pressure(T), 6))]
    chk = _copied(run_audit(_dataset(pts), default_profile))
    assert chk.status == "skipped" and chk.message == "fewer than two named sources"
    assert thawed(chk.metrics["pairs"]) == [] and chk.metrics["n_pairs"] == 0


def test_odd_input_does_not_raise(default_profile):
    T = np.arange(300.0, 341.0, 10.0)
    P = _printed(iapws_saturation_pressure(T), 6)
    junk = [Point(row=1, T_K=310.0, P_Pa=6000.0, source="Junk (synthetic)", T_text="n/a", P_text="nan"),
            Point(row=1, T_K=None, P_Pa=None, source="Junk (synthetic)", T_text="?", P_text="?",
                  status="unreadable", reason="not a number")]
    single = _rows("One row (synthetic)", [315.0], ["8.0"])
    same = [_rows(f"Copy {k} (synthetic)", T, P) for k in range(3)]
    chk = _copied(run_audit(_dataset(junk, single, *same), default_profile))
    # three identical sources: each of the three pairs, nothing from the junk or the one-row source
    assert sorted((p["source_a"], p["source_b"]) for p in chk.metrics["pairs"]) == [
        ("Copy 0 (synthetic)", "Copy 1 (synthetic)"), ("Copy 0 (synthetic)", "Copy 2 (synthetic)"),
        ("Copy 1 (synthetic)", "Copy 2 (synthetic)")]


def test_findings_json_carries_the_pairs(tmp_path):
    # through the file reader: a semicolon table in mmHg with decimal commas (synthetic)
    from audit.cli import main
    from audit.schema import validate_findings

    T_c = np.arange(20.0, 81.0, 5.0)
    P = iapws_saturation_pressure(T_c + 273.15) / MMHG
    a = [f"{v:.5g}".replace(".", ",") for v in P]
    lines = ["Temperature (°C);Vapour pressure (mmHg);Reference"]
    lines += [f"{t:.1f}".replace(".", ",") + f";{p};Morland 1952 (synthetic)" for t, p in zip(T_c, a)]
    lines += [f"{t + 1.5:.1f}".replace(".", ",") + f";{p};Norberg 1960 (synthetic)" for t, p in zip(T_c[3:], a[3:])]
    data = tmp_path / "compiled.csv"
    data.write_text("\n".join(lines) + "\n", encoding="utf-8")
    main(["check", str(data), "--out", str(tmp_path / "out"), "--format", "json"])
    findings = json.loads((tmp_path / "out" / "findings.json").read_text("utf-8"))
    validate_findings(findings)
    chk = next(c for c in findings["checks"] if c["id"] == "copied-values")
    assert chk["status"] == "warn"
    [pair] = chk["metrics"]["pairs"]
    assert set(pair) >= {"source_a", "source_b", "rows_a", "rows_b", "shift_K", "shift_spread_K", "shared", "ratio"}
    assert pair["rows_a"] == list(range(4, 14)) and pair["rows_b"] == list(range(14, 24))
    assert pair["shift_K"] == pytest.approx(1.5, abs=1e-9) and pair["shared"] == "pressure"
    assert chk["metrics"]["n_pairs"] == 1


def test_pressures_shared_at_temperatures_a_unit_offset_apart_are_not_a_copy(default_profile):
    # Two independent 0.01 % series at the same set points 290-350 K (IAPWS-95 water), one
    # printing its temperatures in °C under the kelvin header (a temperature-unit slip, 273.15 K
    # "shift").  Their three-digit pressures agree, as independent precise data do; read as a
    # shifted copy the 273 K shift made that agreement look impossible and the pair was called
    # copied.  A copy is shifted by a correction of a few kelvin (max_shift_K), not by a unit.
    T = np.arange(290.0, 351.0, 10.0)
    a = _rows("Kelvin 1975 (synthetic)", T, _printed(_noisy(T, 1e-4, 41), 3), T_digits=3)
    b = _rows("Celsius 1988 (synthetic)", T - 273.15, _printed(_noisy(T, 1e-4, 42), 4), T_digits=2)
    assert sum(same_printed(printed_value(x.P_text), printed_value(y.P_text)) for x, y in zip(a, b)) >= 5
    assert _copied(run_audit(_dataset(a, b), default_profile)).metrics["n_pairs"] == 0


def test_a_copy_shifted_by_a_constant_correction_is_found_and_one_that_wanders_is_not(default_profile):
    # One series (IAPWS-95 water, 0.05 %, five digits) republished with every temperature
    # +1.50 K: found.  The same pressures beside temperatures whose shift wanders by 0.5-3 K
    # are no copy of that kind (a biased series at its own set points agrees as loosely).
    T = np.array([300.13, 304.87, 311.02, 313.55, 319.90, 322.41, 328.76])
    P = _printed(_noisy(T, 5e-4, 43), 5)
    orig = _rows("Origin 1961 (synthetic)", T, P)
    shifted = _rows("Reprint 1979 (synthetic)", T + 1.5, P)
    chk = _copied(run_audit(_dataset(orig, shifted), default_profile))
    assert chk.metrics["n_pairs"] == 1 and chk.metrics["pairs"][0]["shift_K"] == pytest.approx(1.5, abs=0.01)
    wander = _rows("Loose 1979 (synthetic)", T + np.array([0.5, 3.0, 1.0, 2.5, 0.5, 3.0, 1.0]), P)
    assert _copied(run_audit(_dataset(orig, wander), default_profile)).metrics["n_pairs"] == 0


def test_gap_match_probability_counts_alike_steps():
    from audit.checks.copied_values import gap_match_probability

    # two series on one 5 K grid space their temperatures alike by design: no evidence
    assert gap_match_probability([300.0, 305.0, 310.0, 315.0], [301.0, 306.0, 311.0], 0.2) == 1.0
    # steps 2.0, 3.5, 1.2 against 2.1, 4.4: one pair of six within 0.2 K
    assert gap_match_probability([300.0, 302.0, 305.5, 306.7], [290.0, 292.1, 296.5], 0.2) == pytest.approx(1 / 6)


def test_a_shifted_copy_of_two_digit_pressures_at_irregular_temperatures_is_found(default_profile):
    # two printed digits coincide easily, but not six times in a row at a constant 2.5 K shift
    # with the original's irregular steps: a copy whatever the digits
    rng = np.random.default_rng(7)
    T = np.sort(rng.uniform(290.0, 360.0, 6))
    P = _printed(_noisy(T, 0.01, 8), 2)
    other = np.linspace(285.0, 365.0, 9)
    res = run_audit(_dataset(_rows("Ostrow 1938 (synthetic)", T, P),
                             _rows("Pell 1961 (synthetic)", T + 2.5, P, start=20),
                             _rows("Quarry 1975 (synthetic)", other, _printed(_noisy(other, 0.002, 9), 5), start=40)),
                    default_profile)
    chk = _copied(res)
    pairs = {frozenset((p["source_a"], p["source_b"])) for p in chk.metrics["pairs"]}
    assert pairs == {frozenset(("Ostrow 1938 (synthetic)", "Pell 1961 (synthetic)"))}, chk.message


def test_independent_two_digit_series_on_one_even_grid_are_not_copies(default_profile):
    # the same 5 K grid (shifted 1 K) and two digits each, independent noise of 1 %
    T = np.arange(290.0, 361.0, 5.0)
    res = run_audit(_dataset(_rows("Roan 1921 (synthetic)", T, _printed(_noisy(T, 0.01, 21), 2), T_digits=0),
                             _rows("Sable 1933 (synthetic)", T + 1.0, _printed(_noisy(T + 1.0, 0.01, 22), 2),
                                   T_digits=0, start=30)),
                    default_profile)
    assert _copied(res).metrics["n_pairs"] == 0, _copied(res).message
