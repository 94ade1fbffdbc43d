"""Source verdicts on literature-benchmark compilations that once went wrong.

The CSV files in ``tests/regressions/data/`` are synthetic compilations drawn by
``benchmarks/compilations.py`` from CoolProp's reference curves (HEOS), with
invented labels; the first line of each says what went wrong before the fix.
They are audited as a user runs them, through ``vpaudit check``, and the
planted faults (read from the generator, listed beside each test) must be
found while the good sources keep their rows.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from audit.cli import main

DATA = Path(__file__).parents[1] / "regressions" / "data"


def _sources_of(name, tmp_path):
    out = tmp_path / "out"
    assert main(["check", str(DATA / name), "--out", str(out), "--format", "json"]) in (0, 1)
    doc = json.loads((out / "findings.json").read_text(encoding="utf-8"))
    return {s["source"]: s for s in doc["sources"]}, doc["points"]


def test_a_narrow_precise_series_does_not_make_the_wide_ones_look_off(tmp_path):
    # Seed 1150 of the literature benchmark (CoolProp methanol, invented labels; planted:
    # "García 1907" read 3.6 K high, about -15 % in P; "Okafor 1924", two rows, printed in
    # atm under the mmHg header).  Before the fix every source passed with u of 40-400 %.
    sources, points = _sources_of("narrow_precise_series_beside_wide_scattered.csv", tmp_path)
    garcia = sources["García 1907"]
    assert garcia["status"] in ("suspect", "reject") and garcia["pattern"] == "temperature-offset"
    assert garcia["temperature_offset_K"] == pytest.approx(3.6, abs=0.5)
    okafor = [p for p in points if p["source"] == "Okafor 1924"]
    assert [p["status"] for p in okafor] == ["reject", "reject"]
    assert all(p["cause"]["kind"] == "pressure-unit" for p in okafor)
    for good in ("Jensen 2011", "Larsen 1920", "Dubois 1952"):
        assert sources[good]["status"] == "ok", sources[good]
        assert sources[good]["u_bias_percent"] < 5, sources[good]


def test_most_sources_are_never_judged_off(tmp_path):
    # Seed 1190 (CoolProp toluene, invented labels; planted: "Baker 2006" and "Ivanova 1960"
    # thermometers 1.07 K and 1.10 K low, "García 1916" printed in another unit, x130).
    sources, points = _sources_of("most_sources_judged_off.csv", tmp_path)
    for off in ("Baker 2006", "Ivanova 1960"):
        assert sources[off]["status"] in ("suspect", "reject"), sources[off]
        assert sources[off]["temperature_offset_K"] == pytest.approx(-1.08, abs=0.3), sources[off]
    assert sources["García 1916"]["status"] == "reject"
    assert sources["García 1916"]["cause"]["kind"] == "pressure-unit"
    for good in ("Nakamura 2020", "Jensen 1933", "Okafor 1923", "Eriksen 1968"):
        rejected = [p["row"] for p in points if p["source"] == good and p["status"] == "reject"]
        assert not rejected, (good, rejected)


@pytest.mark.parametrize("name", ["liquid_benzene_compilation_no_phase_break.csv",
                                  "liquid_toluene_compilation_no_phase_break.csv"])
def test_a_liquid_compilation_of_unequal_series_is_not_split_into_phases(tmp_path, name):
    # Seeds 1022 (benzene, 10 series, 0.02-6 % scatter, 250-526 K) and 1058 (toluene, 4 series,
    # 0.03-3.5 %), all liquid by CoolProp (triple points 278.7 K and 178 K), no phase column.
    # Before the fix a slope break made of series levels and scatters was taken for a triple
    # point: 49 and 45 liquid rows labelled "solid", and triple-point failed.
    out = tmp_path / "out"
    assert main(["check", str(DATA / name), "--out", str(out), "--format", "json"]) in (0, 1)
    doc = json.loads((out / "findings.json").read_text(encoding="utf-8"))
    assert {p["phase"] for p in doc["points"]} == {"unknown"}
    split = next(c for c in doc["checks"] if c["id"] == "branch-split")
    assert split["status"] == "pass", split["message"]
    assert next(c for c in doc["checks"] if c["id"] == "triple-point")["status"] == "skipped"
