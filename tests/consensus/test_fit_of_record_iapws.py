"""One fit of record per branch, checked on IAPWS-95 water (iapws package).

Three invented sources interleaved over 280–370 K, 12 points each, 0.1 % noise;
source "B" planted 5 % high.  The consensus leaves B out of its fit of record, and
every number the audit reports for the branch — point deviations, the ``fits``
entry, the enthalpy values — must come from that one fit.  The check value for
the curve itself is IAPWS-95's saturation pressure (W. Wagner, A. Pruß,
J. Phys. Chem. Ref. Data 31, 387 (2002), doi:10.1063/1.1461829, via the iapws
package): with 0.1 % noise on 24 accepted points the fit reproduces it to
about 0.1 %; a fit that kept B would sit about 1.7 % high.
"""

import dataclasses
import pickle

import numpy as np
import pytest

from audit.pipeline import run_audit
from tests.checks._planted import water_table
from tests.conftest import iapws_saturation_pressure

T_GRID = np.linspace(280.0, 370.0, 36)
SOURCES = ["A", "B", "C"] * 12


def _audit(default_profile):
    ds, _ = water_table(T_GRID, noise=0.001, seed=3, source=SOURCES, phase="liquid", P_scale={"B": 1.05})
    return ds, run_audit(ds, default_profile, audited_at="2024-01-01T00:00:00Z")


def test_the_fit_of_record_leaves_the_biased_source_out_and_matches_iapws(default_profile):
    _, res = _audit(default_profile)
    (fit,) = [f for f in res.fits if f.branch == "liquid"]
    assert "B" in fit.extra["fit_of_record"]
    ok = [p for p in res.points if p.source in ("A", "C") and p.status != "reject"]
    assert fit.n_used == len(ok)
    T = np.linspace(282.0, 368.0, 30)
    dev = 100 * (fit.model.p(T) / iapws_saturation_pressure(T) - 1)
    assert np.max(np.abs(dev)) < 0.15


def test_every_deviation_and_enthalpy_comes_from_the_one_fit(default_profile):
    _, res = _audit(default_profile)
    (fit,) = [f for f in res.fits if f.branch == "liquid"]
    eq = fit.model
    for p in res.points:
        if p.source in ("A", "C"):  # B's deviations are reported after its offset is removed
            expected = 100 * (p.P_Pa / float(eq.p(np.array([p.T_K]))[0]) - 1)
            assert abs(p.deviation_percent - expected) < 1e-9
    # enthalpy at exactly the temperatures of the points the fit rests on (B not among them)
    h_T = sorted(h.T_K for h in res.enthalpy if h.branch == "liquid")
    fitted_T = sorted(p.T_K for p in res.points if p.source in ("A", "C") and p.status != "reject")
    assert np.allclose(h_T, fitted_T)


def test_the_consensus_model_is_frozen_and_picklable(default_profile):
    from audit.checks.outliers import Outliers
    from audit.context import AuditContext

    ds, _ = water_table(T_GRID, noise=0.001, seed=3, source=SOURCES, phase="liquid", P_scale={"B": 1.05})
    ctx = AuditContext(dataset=ds, profile=default_profile)
    Outliers().run(ctx)
    model = pickle.loads(pickle.dumps(ctx.consensus))
    branch = model.get("liquid")
    assert branch.form_name == ctx.consensus.get("liquid").form_name
    assert "B" in branch.source_shifts and np.isclose(branch.source_shifts["B"].offset_lnP, np.log(1.05), atol=0.005)
    with pytest.raises(dataclasses.FrozenInstanceError):
        branch.form_name = "x"
