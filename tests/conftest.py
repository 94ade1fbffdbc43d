"""Shared fixtures.  Reference data come from the IAPWS releases through the
``iapws`` package (PyPI) unless a test says otherwise."""

from __future__ import annotations

import numpy as np
import pytest


def iapws_saturation_pressure(T_K):
    """Saturation pressure of water [Pa] from IAPWS-95 (iapws package).

    ``iapws.IAPWS95._Vapor_Pressure`` is documented as Pa but returns MPa.
    """
    from iapws import IAPWS95

    return np.array([IAPWS95._Vapor_Pressure(float(T)) * 1e6 for T in np.atleast_1d(T_K)])


def iapws_sublimation_pressure(T_K):
    """Sublimation pressure of ice Ih [Pa], IAPWS R14-08(2011) via iapws (returns MPa)."""
    from iapws._iapws import _Sublimation_Pressure

    return np.array([_Sublimation_Pressure(float(T)) * 1e6 for T in np.atleast_1d(T_K)])


@pytest.fixture
def default_profile():
    from audit.profiles import load_profile

    return load_profile("default")


@pytest.fixture
def profile_without(tmp_path):
    """A profile extending default with the named checks disabled (to test one check alone)."""
    from audit.profiles import load_profile

    def make(*check_ids):
        body = '[profile]\nname = "test"\nextends = "default"\n'
        for cid in check_ids:
            body += f'\n[checks.{cid}]\nenabled = false\n'
        path = tmp_path / "without.toml"
        path.write_text(body, encoding="utf-8")
        return load_profile(str(path))

    return make
