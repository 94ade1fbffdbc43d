"""A scattered source is judged by its own scatter, never by a more precise one's.

Synthetic compilation from IAPWS-95 water (``iapws`` package) with invented
labels: a modern static series at 0.01 % scatter (30 rows) and two older
series at 3 % (7 and 6 rows, fewer than a source needs for a scale of its own
alone), no uncertainty columns.  The older rows lie within 2.5 of their own
σ of the true curve, so none may be rejected.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.model import from_arrays
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure


def _compilation(seed):
    rng = np.random.default_rng(seed)
    T = np.concatenate([np.linspace(285.0, 365.0, 30), np.linspace(290.0, 360.0, 7),
                        np.linspace(295.0, 355.0, 6)])
    lnP = np.log(iapws_saturation_pressure(T))
    lnP[:30] += rng.normal(0, 0.0001, 30)
    lnP[30:] += np.clip(rng.normal(0, 0.03, 13), -0.075, 0.075)  # within 2.5 σ by construction
    src = ["Static 2015"] * 30 + ["Ebulliometer 1931"] * 7 + ["Isoteniscope 1948"] * 6
    return from_arrays(T, np.exp(lnP), source=src, substance="water")


def test_old_scattered_sources_are_judged_by_their_own_scatter(default_profile):
    # Before the fix every row of both older series was rejected (e.g. -0.4 % off at
    # "18.9 σ" of the precise series' 0.02 %).  A scale from six or seven points is itself
    # uncertain (the MAD's effective degrees of freedom are 0.37 (n - 1)), so an occasional
    # row at 2-2.5 σ of the true scatter still comes out beyond the limit: bound the share.
    rejected = total = 0
    for seed in range(100, 130):
        result = run_audit(_compilation(seed), default_profile)
        rejected += sum(p.status == "reject" for p in result.points[30:])
        total += 13
    assert rejected / total <= 0.05, f"{rejected} of {total} rows of the older series rejected"
    assert not [p.row for p in run_audit(_compilation(0), default_profile).points if p.status == "reject"]
