"""Synthetic vapor-pressure data for the thermo tests (seeded, reproducible)."""

import numpy as np


def noisy(p, rel, seed):
    """Multiply pressures by (1 + rel·N(0, 1)): a relative standard uncertainty `rel`."""
    rng = np.random.default_rng(seed)
    return np.asarray(p) * (1.0 + rel * rng.standard_normal(np.shape(p)))


def iapws_liquid(T):
    """Saturation pressure [Pa] from the full IAPWS-95 formulation (iapws package).

    ``iapws.IAPWS95(T=..., x=0).P`` is in MPa.
    """
    from iapws import IAPWS95

    return np.array([IAPWS95(T=float(t), x=0).P * 1e6 for t in np.atleast_1d(T)])


def iapws_ice(T):
    """Sublimation pressure [Pa] from the iapws package (its function returns MPa)."""
    from iapws._iapws import _Sublimation_Pressure

    return np.array([_Sublimation_Pressure(float(t)) * 1e6 for t in np.atleast_1d(T)])
