"""Two crystal forms and the liquid: a solid–solid transition.

Form I is ice Ih (IAPWS R14-08(2011), Wagner et al., J. Phys. Chem. Ref. Data 40,
043103 (2011), doi:10.1063/1.3657937, via ``iapws``) from 241 to 272 K; the liquid
is IAPWS-95 (doi:10.1063/1.1461829).  Form II is synthetic, marked as such: a
Clausius–Clapeyron curve below 240 K that meets ice Ih's curve at T_trs = 240 K with
a sublimation enthalpy 1.5 kJ/mol higher (constant), so that ΔH_trs(II → I) is
1.5 kJ/mol by construction and the data are consistent with Clapeyron.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.ingest import read_table
from audit.pipeline import run_audit
from audit.schema import validate_findings

from ..references.iapws_r10_06 import T_TRIPLE
from tests.conftest import iapws_saturation_pressure, iapws_sublimation_pressure

R = 8.314462618
T_TRS, DH_TRS = 240.0, 1500.0


def _apparent_dH_ice(T, h=1e-3):
    p = iapws_sublimation_pressure([T - h, T + h])
    return -R * (np.log(p[1]) - np.log(p[0])) / (1 / (T + h) - 1 / (T - h))


def _noise(rng):
    # clipped at 2σ: the tests below assert that no row is flagged, and the suspect level
    # lets through a family-wise 0.3 per branch of honest draws beyond about 2.6σ
    return float(np.clip(rng.standard_normal(), -2.0, 2.0))


def _table(tmp_path, labels=("cr II", "cr I", "liquid"), seed=1):
    rng = np.random.default_rng(seed)
    T2, T1, Tl = np.linspace(215.0, 239.0, 9), np.linspace(241.0, 272.0, 10), np.linspace(275.0, 330.0, 12)
    dH_II = _apparent_dH_ice(T_TRS) + DH_TRS
    P2 = iapws_sublimation_pressure([T_TRS])[0] * np.exp(-(dH_II / R) * (1 / T2 - 1 / T_TRS))
    rows = ([(labels[0], t, p) for t, p in zip(T2, P2)] + [(labels[1], t, p) for t, p in zip(T1, iapws_sublimation_pressure(T1))]
            + [(labels[2], t, p) for t, p in zip(Tl, iapws_saturation_pressure(Tl))])
    path = tmp_path / "two_forms.csv"
    path.write_text("T/K,P/Pa,phase\n" + "".join(f"{t:.2f},{p * (1 + 5e-4 * _noise(rng)):.6g},{ph}\n"
                                                 for ph, t, p in rows), encoding="utf-8")
    return path


@pytest.mark.parametrize("labels", [("cr II", "cr I", "liquid"), ("crII", "crI", "l"), ("s2", "s1", "liq"),
                                    ("cr β", "cr α", "liquid")])
def test_two_labelled_crystal_forms_give_the_transition(tmp_path, default_profile, labels):
    res = run_audit(read_table(_table(tmp_path, labels)), default_profile)
    assert [p.row for p in res.points if p.status != "ok"] == []
    chk = next(c for c in res.checks if c.id == "solid-transition")
    assert chk.status == "pass", chk.message
    (t,) = res.transitions
    assert (t.low_form, t.high_form) == {"cr II": ("II", "I"), "crII": ("II", "I"), "s2": ("II", "I"),
                                         "cr β": ("β", "α")}[labels[0]]
    assert abs(t.T_K - T_TRS) < 3 * t.u_T_K + 0.2
    assert t.dH_J_per_mol == pytest.approx(DH_TRS, abs=3 * t.u_dH_J_per_mol + 75)
    # ice Ih meets the liquid at the triple point (IAPWS R10-06: 273.16 K)
    assert abs(res.triple_point.T_K - T_TRIPLE) < 3 * res.triple_point.u_T_K + 0.1
    doc = res.to_findings()
    validate_findings(doc)  # schema 1, with the fields it gained
    assert doc["transitions"][0]["low_form"] == t.low_form
    assert {p["crystal_form"] for p in doc["points"] if p["phase"] == "solid"} == {t.low_form, t.high_form}
    assert {f.get("crystal_form") for f in doc["fits"] if f["branch"] == "solid"} == {t.low_form, t.high_form}


def test_two_forms_under_one_solid_label_bend_one_curve(tmp_path, default_profile):
    # the same rows labelled plain "cr": one solid branch through two curves, no transition
    res = run_audit(read_table(_table(tmp_path, ("cr", "cr", "liquid"))), default_profile)
    assert res.transitions == ()
    assert next(c for c in res.checks if c.id == "solid-transition").status == "skipped"


def _unlabelled(tmp_path, seed=1, second_form=True):
    path = _table(tmp_path, ("", "", ""), seed)
    text = path.read_text(encoding="utf-8").replace("T/K,P/Pa,phase", "T/K,P/Pa").replace(",\n", "\n")
    if not second_form:  # form II's rows replaced by ice Ih itself: one solid form
        lines = text.splitlines()
        rows = [ln.split(",") for ln in lines[1:]]
        for r in rows[:9]:
            r[1] = f"{iapws_sublimation_pressure([float(r[0])])[0]:.6g}"
        text = "\n".join([lines[0]] + [",".join(r) for r in rows]) + "\n"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_an_unlabelled_second_crystal_form_is_found_below_the_known_triple_point(tmp_path, seed):
    # no phase column; water named, so its triple point splits solid from liquid, and the solid
    # rows break again at 240 K, where the synthetic form II meets ice Ih
    from audit.cli import audit_file

    _, _, res = audit_file(str(_unlabelled(tmp_path, seed)), substance="water")
    split = next(c for c in res.checks if c.id == "branch-split")
    # within one spacing of the rows (3.4 K): next to the transition both forms' pressures agree,
    # so the neighbouring row may fall on either side
    assert abs(split.metrics["T_transition_K"] - T_TRS) < 3.5, split.message
    (t,) = res.transitions
    assert abs(t.T_K - T_TRS) < 3 * t.u_T_K + 0.3
    assert t.dH_J_per_mol == pytest.approx(DH_TRS, abs=3 * t.u_dH_J_per_mol + 100)
    assert abs(res.triple_point.T_K - T_TRIPLE) < 3 * res.triple_point.u_T_K + 0.1


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_one_unlabelled_solid_form_is_not_split_in_two(tmp_path, seed):
    # the same rows with ice Ih all the way down: its own curvature is no transition
    from audit.cli import audit_file

    _, _, res = audit_file(str(_unlabelled(tmp_path, seed, second_form=False)), substance="water")
    assert res.transitions == ()
    assert {p.phase for p in res.points} == {"solid", "liquid"}
