"""A block of another compound's rows inside one series of a compilation.

Synthetic compilation with invented labels: three series of liquid water from
IAPWS-95 (W. Wagner, A. Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002),
doi:10.1063/1.1461829, via the ``iapws`` package), 0.2 % noise.  In series
"Lab B", four contiguous rows are replaced by saturation pressures of another
liquid at the same temperatures from CoolProp's reference equations of state
(methanol: about 2.5 times water's near 300 K; benzene: about 4 times).  Those
rows agree among themselves far better than with the water curve, and no unit
ratio is 2.5 or 4, so they are one block of another compound; the rest of
"Lab B" is kept.
"""

from __future__ import annotations

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

from audit.model import from_arrays
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure

BLOCK = range(5, 9)  # rows 6-9 of Lab B (0-based 5..8)


def _compilation(other: str, seed: int = 4):
    rng = np.random.default_rng(seed)
    Ta, Tb, Tc = np.linspace(285, 365, 12), np.linspace(288, 362, 14), np.linspace(292, 358, 10)
    Pb = iapws_saturation_pressure(Tb)
    Pb[list(BLOCK)] = [PropsSI("P", "T", t, "Q", 0, other) for t in Tb[list(BLOCK)]]
    T = np.concatenate([Ta, Tb, Tc])
    P = np.concatenate([iapws_saturation_pressure(Ta), Pb, iapws_saturation_pressure(Tc)])
    P = P * np.exp(rng.normal(0, 0.002, T.size))
    src = ["Lab A"] * 12 + ["Lab B"] * 14 + ["Lab C"] * 10
    return from_arrays(T, P, source=src, phase="liquid", substance="water")


@pytest.mark.parametrize("other", ["Methanol", "Benzene"])
def test_a_block_of_another_compound_is_named_and_the_series_kept(default_profile, other):
    result = run_audit(_compilation(other), default_profile)
    block_rows = {12 + k + 1 for k in BLOCK}
    for p in result.points:
        if p.row in block_rows:
            assert p.status == "reject" and p.cause is not None and p.cause.kind == "other-compound"
    assert not [p.row for p in result.points if p.row not in block_rows and p.status == "reject"]
    b = {s.source: s for s in result.sources}["Lab B"]
    assert b.status != "reject"  # the series as a whole is kept


def test_scattered_rejections_are_not_a_block(default_profile):
    # the same compilation without the block: nothing is called another compound
    rng = np.random.default_rng(4)
    T = np.linspace(285, 365, 36)
    P = iapws_saturation_pressure(T) * np.exp(rng.normal(0, 0.002, T.size))
    result = run_audit(from_arrays(T, P, source=["Lab A", "Lab B", "Lab C"] * 12, phase="liquid",
                                   substance="water"), default_profile)
    assert not [p.row for p in result.points if p.cause is not None and p.cause.kind == "other-compound"]


def test_a_level_jump_between_two_compounds_is_no_phase_change(default_profile):
    # unlabelled: ice Ih 230-270 K (IAPWS R14-08 via iapws; ΔH_sub ≈ 51 kJ/mol) below toluene
    # 300-380 K (CoolProp HEOS; ΔH_vap ≈ 36 kJ/mol). The low side is steeper, as a solid's
    # would be, but the two lines differ by a factor ~2 where they meet: not a triple point
    from tests.conftest import iapws_sublimation_pressure

    rng = np.random.default_rng(2)
    Ti, Tt = np.linspace(230.0, 270.0, 9), np.linspace(300.0, 380.0, 12)
    Pt = np.array([PropsSI("P", "T", t, "Q", 0, "Toluene") for t in Tt])
    T = np.r_[Ti, Tt]
    P = np.r_[iapws_sublimation_pressure(Ti), Pt] * (1 + 1e-3 * rng.standard_normal(T.size))
    res = run_audit(from_arrays(T, P), default_profile)
    split = next(c for c in res.checks if c.id == "branch-split")
    assert split.status == "warn" and "level jump" in split.message, split.message
    assert abs(split.metrics["gap_lnP"]) > 5 * split.metrics["u_gap_lnP"]
    assert {p.phase for p in res.points} == {"unknown"}
    assert res.triple_point is None
