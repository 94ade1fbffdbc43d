"""Tables printed the way a paper would print them, from IAPWS-95 saturation
pressures (iapws package), with faults planted in the printed text."""

import numpy as np

from audit.model import Dataset, Point
from tests.conftest import iapws_saturation_pressure


def water_table(T_K, noise=0.001, seed=0, source=None, T_fmt="{:.2f}", P_sig=5, P_unit="kPa",
                T_unit="K", edits=None, T_shift=None, P_scale=None, phase="unknown"):
    """Points with T printed in `T_unit` (2 decimals) and P in kPa to `P_sig` significant figures.

    `edits` maps a 0-based index to a function (T_text, P_text) -> (T_text, P_text) applied to the
    printed texts; the SI values are re-read from the edited texts, as ingest would.
    `T_shift`/`P_scale` map a source name to a thermometer offset [K] / pressure factor.
    """
    rng = np.random.default_rng(seed)
    T_true = np.asarray(T_K, float)
    P = iapws_saturation_pressure(T_true) * np.exp(rng.normal(0, noise, T_true.size))
    pts = []
    factor = {"kPa": 1e3, "Pa": 1.0, "mmHg": 133.322387415}[P_unit]
    for i, (t, p) in enumerate(zip(T_true, P)):
        src = source[i] if isinstance(source, (list, tuple)) else source
        t_print = t + (T_shift or {}).get(src, 0.0)
        p_print = p * (P_scale or {}).get(src, 1.0)
        tv = t_print - 273.15 if T_unit == "degC" else t_print
        Tt = T_fmt.format(tv)
        Pt = f"{p_print / factor:.{P_sig}g}"
        if edits and i in edits:
            Tt, Pt = edits[i](Tt, Pt)
        T_read = float(Tt) + (273.15 if T_unit == "degC" else 0.0)
        pts.append(Point(row=i + 1, T_K=T_read, P_Pa=float(Pt) * factor, source=src, phase=phase, T_text=Tt, P_text=Pt,
                         T_text_unit=T_unit, P_text_unit=P_unit))
    return Dataset(points=tuple(pts)), P


def with_stated_u(ds, u_P_relative=0.001, u_T_K=0.01):
    """The same table stating u(P) as a fraction of each printed value and u(T) in kelvin."""
    from dataclasses import replace

    return Dataset(points=tuple(replace(p, u_P_Pa=u_P_relative * p.P_Pa, u_T_K=u_T_K) for p in ds.points))
