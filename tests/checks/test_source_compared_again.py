"""Sources compared again once one of them is explained.

Synthetic compilations with invented labels, every pressure from IAPWS-95
saturation pressures of water (``iapws`` package) with 0.3 % noise:

* a precise series printed in millimetres of mercury under a pascal header
  (133.322 Pa per mmHg, NIST SP 811) beside good series — the
  good series must not be called off for disagreeing with it, with two
  comparable sources or with three.
"""

from __future__ import annotations

import numpy as np

from audit.model import from_arrays
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure

MMHG_PA = 133.322387415  # NIST SP 811 (2008), Appendix B.8


def _sources(spans, factors, seed=3, noise=0.003):
    rng = np.random.default_rng(seed)
    T, P, src = [], [], []
    for k, ((lo, hi, n), f) in enumerate(zip(spans, factors)):
        t = np.linspace(lo, hi, n)
        T.append(t)
        P.append(iapws_saturation_pressure(t) * f * np.exp(rng.normal(0, noise, n)))
        src += [f"Lab {chr(65 + k)} (synthetic)"] * n
    return np.concatenate(T), np.concatenate(P), src


def _audit(default_profile, spans, factors):
    T, P, src = _sources(spans, factors)
    return run_audit(from_arrays(T, P, source=src, phase="liquid", substance="water"), default_profile)


def test_two_comparable_sources_the_good_one_is_not_off_once_the_other_is_read_in_mmHg(default_profile):
    # Labs C and D print two rows each: too few to be compared, enough for the consensus
    result = _audit(default_profile, [(290, 360, 12), (295, 355, 10), (300, 340, 2), (310, 350, 2)],
                    [1.0, 1 / MMHG_PA, 1.0, 1.0])
    recs = {s.source: s for s in result.sources}
    bad = recs["Lab B (synthetic)"]
    assert bad.extra["cause"]["kind"] == "pressure-unit"
    good = recs["Lab A (synthetic)"]
    assert good.status == "ok", good.extra
    assert not [p.row for p in result.points if p.source == "Lab A (synthetic)" and p.status == "reject"]


def test_three_sources_the_unit_slip_is_set_aside_not_the_two_that_agree(default_profile):
    result = _audit(default_profile, [(285, 365, 14), (290, 360, 12), (295, 355, 10)], [1.0, 1.0, 1 / MMHG_PA])
    recs = {s.source: s for s in result.sources}
    assert recs["Lab C (synthetic)"].extra["cause"]["kind"] == "pressure-unit"
    for name in ("Lab A (synthetic)", "Lab B (synthetic)"):
        assert recs[name].status == "ok", (name, recs[name].extra)
        assert not recs[name].extra.get("cause")

