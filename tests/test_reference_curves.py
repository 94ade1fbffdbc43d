"""The reference curve of a named substance (audit.reference_curves).

Check values:
* water's normal boiling point, 373.124 K at 101 325 Pa on ITS-90 (IAPWS-95 release, as
  quoted by Wagner & Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002); value from memory);
* toluene's normal boiling point, 383.75 K (CRC Handbook of Chemistry and Physics; value from
  memory, the handbooks give 383.7–383.8 K), judged against the chemicals library's sets.
"""

import math

import pytest

from audit.model import Dataset, Metadata, Point
from audit.reference_curves import IAPWS_LIQUID_U_LNP, reference_curves
from audit.substances import with_library_constants


def _named(substance: str) -> Dataset:
    pt = Point(row=1, T_K=300.0, P_Pa=3500.0, T_text="300", P_text="3500")
    return with_library_constants(Dataset(points=(pt,), metadata=Metadata()), substance)


def test_water_curve_is_iapws_and_passes_the_normal_boiling_point():
    curves = reference_curves(Dataset(points=(), metadata=Metadata(substance="water")), 0.01)
    assert set(curves) == {"liquid", "solid", "unknown"}
    liquid = curves["liquid"]
    assert "IAPWS" in liquid.name
    assert math.exp(liquid.ln_p(373.124)[0]) == pytest.approx(101325.0, rel=2e-4)
    # one set: its stated uncertainty, not the floor given for correlations that state none
    assert liquid.u_ln_p(350.0)[0] == pytest.approx(IAPWS_LIQUID_U_LNP)
    # the branch of unknown phase has ice below the triple point and the liquid above
    unknown = curves["unknown"]
    assert unknown.covers([250.0, 300.0]).all()
    assert math.exp(unknown.ln_p(273.16)[0]) == pytest.approx(611.657, rel=1e-3)  # IAPWS R14-08 pt


def test_library_sets_for_toluene_bracket_its_boiling_point():
    ds = _named("toluene")
    curves = reference_curves(ds, 0.01)
    assert set(curves) == {"liquid", "unknown"}  # no sublimation correlation in the library
    liquid = curves["liquid"]
    assert len(liquid.sets) >= 3
    assert math.exp(liquid.ln_p(383.75)[0]) == pytest.approx(101325.0, rel=0.01)
    u = liquid.u_ln_p([383.75, 250.0])
    assert (u >= 0.01).all()  # never below the floor
    # nothing below the melting point: the liquid's correlations do not describe the solid
    T_melt = ds.metadata.constants["T_melting"].value
    assert not liquid.covers([T_melt - 5.0])[0]
    assert liquid.covers([T_melt + 50.0])[0]


def test_unknown_substance_has_no_curve():
    assert reference_curves(Dataset(points=(), metadata=Metadata()), 0.01) == {}


def test_a_set_whose_range_reaches_past_its_own_critical_temperature_does_not_raise():
    # found by the literature benchmark (seed 1038, benzene): a library set's stated upper
    # limit lies above the Tc of its own reduced (Wagner) form
    liquid = reference_curves(_named("benzene"), 0.01)["liquid"]
    T = [s.T_max for s in liquid.sets]
    ln = liquid.ln_p(T)
    assert ln.shape == (len(T),)
    assert all(math.isfinite(v) for v in liquid.ln_p([500.0]))


def test_slope_of_the_water_curve_matches_iapws_95():
    # d ln P/dT of the IAPWS-95 saturation curve (iapws package), central difference over ±0.5 K
    from tests.conftest import iapws_saturation_pressure

    liquid = reference_curves(Dataset(points=(), metadata=Metadata(substance="water")), 0.01)["liquid"]
    for T in (300.0, 373.124, 500.0):
        p = iapws_saturation_pressure([T - 0.5, T + 0.5])
        expected = (math.log(p[1]) - math.log(p[0])) / 1.0
        assert liquid.dlnp_dT([T])[0] == pytest.approx(expected, rel=1e-3)
