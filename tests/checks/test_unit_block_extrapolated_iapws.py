"""A block of rows printed in mmHg under a kPa header, at the cold end of the range.

Data: water's saturation pressure from the full IAPWS-95 formulation (Wagner &
Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002), doi:10.1063/1.1461829, via the
``iapws`` package); 1 mmHg = 133.322 387 415 Pa (NIST SP 811, B.8).  Eight rows
310–372 K in kPa with 0.2 % noise, four rows 280–308 K printed in mmHg.  The
consensus curve is an extrapolation below 310 K: the block's row nearest the data
reads right in mmHg, the far ones miss by the curve's own error there, and were
left without a cause.
"""

import numpy as np
import pytest

from audit.ingest import read_table
from audit.pipeline import run_audit

from ..thermo._data import iapws_liquid

MMHG_PA = 133.322387415


def _table(tmp_path):
    rng = np.random.default_rng(1)
    T_block, T_good = np.array([280.0, 292.0, 301.0, 308.0]), np.linspace(310.0, 372.0, 8)
    P_block = iapws_liquid(T_block) / MMHG_PA
    P_good = iapws_liquid(T_good) / 1000 * (1 + 0.002 * rng.standard_normal(8))
    rows = [(t, p) for t, p in zip(T_block, P_block)] + [(t, p) for t, p in zip(T_good, P_good)]
    path = tmp_path / "water_block.csv"
    path.write_text("T/K,P/kPa\n" + "".join(f"{t:.2f},{p:.5g}\n" for t, p in rows), encoding="utf-8")
    return path, T_block


def test_every_row_of_the_block_is_read_in_mmhg(tmp_path, default_profile):
    path, T_block = _table(tmp_path)
    res = run_audit(read_table(path), default_profile)
    block = res.points[:4]
    assert [p.status for p in block] == ["reject"] * 4
    assert [p.cause.kind for p in block] == ["pressure-unit"] * 4
    # the suggested values are the printed mmHg read as mmHg: IAPWS-95 to the 5 printed digits
    assert [p.cause.suggested_P_Pa for p in block] == pytest.approx(iapws_liquid(T_block), rel=1e-4)
    assert all(p.status == "ok" for p in res.points[4:])
