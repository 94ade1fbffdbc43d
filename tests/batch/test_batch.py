"""Batch audits of a collection: jobs, workers, Dask, the index, errors, a clean stop.

Data: the SYNTHETIC demo collection (``reports_demo/collection/``: CoolProp
reference equations of state with planted faults, see ``make_demo_data.py``),
and water saturation pressures from IAPWS-95 (``iapws`` package) for the
grouped long table.
"""

from __future__ import annotations

import csv
import json
import os
import pickle
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

from audit.batch.jobs import Job, collect_jobs, split_long_table
from audit.batch.run import run_batch
from audit.batch.work import BatchSettings, run_job
from audit.cli import main
from tests.conftest import iapws_saturation_pressure

ROOT = Path(__file__).resolve().parents[2]
COLLECTION = ROOT / "reports_demo" / "collection"
#: what the collection's planted faults make of each dataset (reports_demo/make_demo_data.py)
# ethanol fails: its three rows printed in Pa under a kPa header lie above ethanol's critical pressure
# (the metadata names the substance, so the library's Pc is known)
EXPECTED = {"water_static_cell": "pass", "acetone_handbook": "pass", "ethanol_supplier": "fail",
            "cyclohexane_lab": "warn", "hexane_two_labs": "warn", "supplier_toluene_sheet": "warn"}


@pytest.fixture
def collection(tmp_path):
    folder = tmp_path / "collection"
    shutil.copytree(COLLECTION, folder)
    (folder / "broken.csv").write_text("T/K,comment\n300,no pressure column\n", encoding="utf-8")
    return folder


def _index(out):
    with open(out / "index.csv", encoding="utf-8-sig") as fh:
        return list(csv.DictReader(fh))


def test_jobs_of_a_folder_leave_metadata_files_out(collection):
    jobs = collect_jobs([collection])
    assert sorted(j.name for j in jobs) == sorted(list(EXPECTED) + ["broken"])
    assert {j.name: j.kind for j in jobs}["supplier_toluene_sheet"] == "sheet"
    assert all(pickle.loads(pickle.dumps(j)) == j for j in jobs)


def test_a_folder_on_two_workers_gives_every_dataset_its_verdict_and_an_index(collection, tmp_path):
    out = tmp_path / "out"
    code = main(["batch", str(collection), "--out", str(out), "--jobs", "2", "--no-progress",
                 "--audit-time", "2026-12-01T00:00:00Z"])
    assert code == 1  # the broken table is an error: the worst outcome
    rows = _index(out)
    assert {r["dataset"]: r["verdict"] for r in rows} == {**EXPECTED, "broken": "error"}
    assert rows[0]["dataset"] == "broken" and "pressure" in rows[0]["error"]
    order = [r["verdict"] for r in rows]
    assert order == sorted(order, key=["error", "fail", "warn", "pass"].index)
    # each dataset's own outputs, as `vpaudit check` writes them
    findings = json.loads((out / "ethanol_supplier" / "findings.json").read_text(encoding="utf-8"))
    assert [p["row"] for p in findings["points"] if p["status"] == "reject"] == [7, 8, 9]
    assert {(p["cause"] or {}).get("kind") for p in findings["points"] if p["status"] == "reject"} == {"pressure-unit"}
    html = (out / "index.html").read_text(encoding="utf-8")
    assert 'href="ethanol_supplier/findings.json"' in html and "default-src 'none'" in html


def test_one_process_and_two_give_the_same_outcomes(collection, tmp_path):
    jobs = collect_jobs([collection])
    one = run_batch(jobs, BatchSettings(str(tmp_path / "a")), workers=1, progress=False)
    two = run_batch(jobs, BatchSettings(str(tmp_path / "b")), workers=2, progress=False)

    def key(s):
        return sorted((o.name, o.severity, o.n_reject, o.n_suspect) for o in s.outcomes)

    assert key(one) == key(two) and len(one.outcomes) == 7


def test_a_dask_local_cluster_with_two_workers_gives_the_same_index(collection, tmp_path):
    jobs = collect_jobs([collection])
    local = run_batch(jobs, BatchSettings(str(tmp_path / "local")), workers=2, progress=False)
    dask = run_batch(jobs, BatchSettings(str(tmp_path / "dask")), workers=2, backend="dask", progress=False)
    assert not dask.interrupted
    assert sorted((o.name, o.severity, o.n_reject) for o in dask.outcomes) == \
        sorted((o.name, o.severity, o.n_reject) for o in local.outcomes)
    assert (tmp_path / "dask" / "water_static_cell" / "findings.json").exists()


def test_one_long_table_grouped_by_substance_and_source(tmp_path):
    T = np.linspace(290.0, 360.0, 12)
    P = np.array([iapws_saturation_pressure(t)[0] for t in T])
    lines = ["substance,lab,T/K,p/kPa"]
    lines += [f"water,Lab A,{t:.2f},{p / 1000:.6g}" for t, p in zip(T, P)]
    lines += [f"water,Lab B,{t + 1:.2f},{iapws_saturation_pressure(t + 1)[0] / 1000:.6g}" for t in T]
    src = tmp_path / "long.csv"
    src.write_text("\n".join(lines) + "\n", encoding="utf-8")
    jobs = split_long_table(str(src), ("substance", "lab"), tmp_path / "groups")
    assert [(j.name, j.substance) for j in jobs] == [("water_Lab_A", "water"), ("water_Lab_B", "water")]
    outcome = run_job(jobs[0], BatchSettings(str(tmp_path / "out")))
    assert outcome.error is None and outcome.n_rows == 12 and outcome.substance == "water"
    # the substance named by the group brings the library's constants: liquid water gets IAPWS
    findings = json.loads((tmp_path / "out" / "water_Lab_A" / "findings.json").read_text(encoding="utf-8"))
    ref = next(c for c in findings["checks"] if c["id"] == "reference-agreement")
    assert ref["status"] == "pass"


def test_a_workbook_with_two_worksheets_is_two_datasets(tmp_path):
    from openpyxl import Workbook

    wb = Workbook()
    for k, name in enumerate(("run 1", "run 2")):
        ws = wb.active if k == 0 else wb.create_sheet()
        ws.title = name
        ws.append(["T/K", "p/Pa"])
        for t in np.linspace(300, 350, 8):
            ws.append([float(t), float(iapws_saturation_pressure(t)[0])])
    path = tmp_path / "book.xlsx"
    wb.save(path)
    jobs = collect_jobs([path])
    assert [(j.name, j.worksheet) for j in jobs] == [("book_run_1", "run 1"), ("book_run_2", "run 2")]
    outcomes = [run_job(j, BatchSettings(str(tmp_path / "out"))) for j in jobs]
    assert all(o.error is None and o.n_rows == 8 for o in outcomes)


def test_an_unreadable_dataset_is_recorded_and_the_batch_goes_on(tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_bytes(b"\x00\x01\x02 not a table")
    outcome = run_job(Job("bad", str(bad)), BatchSettings(str(tmp_path / "out")))
    assert outcome.severity == "error" and outcome.error and "internal error" not in outcome.error
    assert not (tmp_path / "out" / "bad" / "findings.json").exists()


def test_ctrl_c_leaves_every_dataset_folder_complete_or_absent(tmp_path):
    folder = tmp_path / "many"
    folder.mkdir()
    for k in range(40):
        shutil.copy(COLLECTION / "cyclohexane_lab.csv", folder / f"t{k:02d}.csv")
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "audit", "batch", str(folder), "--out", str(out), "--jobs", "2",
                             "--format", "json,csv,html", "--no-progress"], cwd=ROOT,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, start_new_session=True,
                            # SIGINT back to its default in the child: a shell running the tests in the
                            # background starts them with SIGINT ignored, and the child would inherit that
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline and not any((out / f"t{k:02d}" / "report.html").exists() for k in range(40)):
        time.sleep(0.1)
    os.killpg(proc.pid, signal.SIGINT)  # as a terminal's Ctrl-C reaches the whole group
    proc.communicate(timeout=120)
    assert proc.returncode == 130
    rows = _index(out)
    finished = {r["dataset"] for r in rows}
    assert 0 < len(finished) < 40
    for k in range(40):
        d = out / f"t{k:02d}"
        present = {p.name for p in d.iterdir()} if d.exists() else set()
        complete = {"findings.json", "annotated.csv", "report.html"} <= present
        assert complete or not (present & {"findings.json", "annotated.csv", "report.html"}), (d, present)
        assert not [p for p in present if p.endswith(".tmp")], present
    assert "not audited" in (out / "index.html").read_text(encoding="utf-8")
