"""Sources that are wrong as a whole: another compound's data in a compilation.

Synthetic compilations with invented labels: two series of water from
IAPWS-95 (``iapws`` package) and one series of another liquid at similar
temperatures from CoolProp's reference equations of state (benzene,
methanol, toluene), 0.3 % noise.  Apparent ΔH_vap near 325 K, from the same
references: water about 43 kJ/mol, benzene 33, methanol 37, toluene 37 —
each far more than a thermometer or gauge error could change a slope.
"""

from __future__ import annotations

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

from audit.model import from_arrays
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure


def _compilation(other: str | None, seed: int = 1, bias: float = 0.0, dT: float = 0.0):
    rng = np.random.default_rng(seed)
    Ta, Tb, Tx = np.linspace(285, 365, 12), np.linspace(290, 360, 10), np.linspace(295, 355, 8)
    Px = (np.array([PropsSI("P", "T", t, "Q", 0, other) for t in Tx]) if other
          else iapws_saturation_pressure(Tx + dT) * (1 + bias))
    T = np.concatenate([Ta, Tb, Tx])
    P = np.concatenate([iapws_saturation_pressure(Ta), iapws_saturation_pressure(Tb), Px])
    P = P * np.exp(rng.normal(0, 0.003, T.size))
    return from_arrays(T, P, source=["Lab A"] * 12 + ["Lab B"] * 10 + ["Lab X"] * 8, phase="liquid",
                       substance="water")


# toluene, whose pressures near 325 K lie within a few percent of water's, is not flagged
# as off the others and so not tested for its slope (see source-agreement's Method)
@pytest.mark.parametrize("other", ["Benzene", "Methanol"])
def test_another_compound_is_named_and_the_rest_kept(default_profile, other):
    result = run_audit(_compilation(other), default_profile)
    x = {s.source: s for s in result.sources}["Lab X"]
    assert x.status == "reject" and x.extra["cause"]["kind"] == "other-compound"
    rows_x = [p for p in result.points if p.source == "Lab X"]
    assert all(p.status == "reject" and p.cause.kind == "other-compound" for p in rows_x)
    good = [p for p in result.points if p.source != "Lab X"]
    assert not [p.row for p in good if p.status == "reject"]


@pytest.mark.parametrize("bias,dT", [(0.03, 0.0), (-0.2, 0.0), (0.0, 0.5), (0.0, -3.0)])
def test_a_biased_series_of_this_substance_is_not_another_compound(default_profile, bias, dT):
    # a gauge 3 % or 20 % off, a thermometer 0.5 K or 3 K off: offsets, not another substance
    result = run_audit(_compilation(None, bias=bias, dT=dT), default_profile)
    causes = [s.extra.get("cause") for s in result.sources]
    assert not [c for c in causes if c and c["kind"] == "other-compound"]


def test_a_level_beyond_any_gauge_or_thermometer_error_is_another_compound(default_profile):
    # "Lab X" prints water's curve (IAPWS-95) times 4.9: the substance's slope, so the
    # enthalpy test cannot tell, and 4.9 is no ratio of two pressure units.  A factor of two
    # (max_gauge_error_percent) or 10 K (max_thermometer_error_K, here about 30 K) bounds a
    # miscalibration; beyond both the series is taken for another compound's data.
    result = run_audit(_compilation(None, bias=3.9), default_profile)
    x = {s.source: s for s in result.sources}["Lab X"]
    assert x.status == "reject" and x.extra["cause"]["kind"] == "other-compound"
    assert x.bias_percent == pytest.approx(390, rel=0.05)
    assert all(p.status == "reject" and p.cause.kind == "other-compound"
               for p in result.points if p.source == "Lab X")
    assert not [p for p in result.points if p.source != "Lab X" and p.status == "reject"]
    # a gauge 40 % high stays a pressure-scale finding without a cause
    x = {s.source: s for s in run_audit(_compilation(None, bias=0.4), default_profile).sources}["Lab X"]
    assert x.status != "ok" and not (x.extra.get("cause") or {})


def test_isolated_series_in_mmhg_is_a_unit_not_another_compound(default_profile):
    # water compiled from IAPWS-IF97 (see the file's first line): the series below the others
    # is judged against the consensus's slope extrapolated 25 K down, whose uncertainty
    # (from the fit's covariance) now counts beside the series' own
    from pathlib import Path

    from audit.ingest import read_table

    path = Path(__file__).parents[1] / "regressions" / "data" / "isolated_mmhg_series_below_the_others.csv"
    result = run_audit(read_table(path), default_profile)
    jensen = {s.source: s for s in result.sources}["Jensen 1956"]
    cause = jensen.extra["cause"]
    assert cause["kind"] == "pressure-unit"
    # 1 mmHg = 133.322 387 415 Pa (NIST SP 811, B.8): kPa read as mmHg is ×0.133322
    assert cause["factor"] == pytest.approx(0.133322387415, rel=1e-9)
    assert [p.status for p in result.points if p.source == "Jensen 1956"] == ["reject"] * 16
    # the right series just above it (IAPWS-IF97 at 351-361 K) is not judged against the two mmHg
    # rows the outliers check had left of Jensen's (remnant_share): it keeps every row
    assert {s.source: s for s in result.sources}["Chen 1905"].status == "ok"
    assert all(p.status == "ok" for p in result.points if p.source == "Chen 1905")
