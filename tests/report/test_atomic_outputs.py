"""Outputs appear complete or not at all; one run at a time writes into a folder.

The results rendered are the hand-built water audit of ``conftest.py``
(IAPWS-95 and IAPWS R14-08 points through the ``iapws`` package).  The
failures are real system behaviour provoked at the system boundary: a full
disk (``os.fsync`` failing with ENOSPC after the bytes were written), a
Ctrl-C (``KeyboardInterrupt``, and a real SIGINT sent to this process), and
a lock held by another live process or left by a killed one.
"""

from __future__ import annotations

import errno
import json
import os
import signal
import subprocess
import sys
import textwrap

import pytest

from audit.errors import InputError
from audit.report import FILE_NAMES, write_outputs
from audit.report.atomic import LOCK_NAME, StagedFiles, folder_lock
from audit.report.findings_json import write_findings
from tests.report.conftest import with_time

ALL = ("json", "csv", "html", "pdf")


def _temporaries(folder):
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


def _outputs(folder):
    return sorted(p.name for p in folder.iterdir() if p.name in FILE_NAMES.values())


def _disk_full_on(call_number: int, folder, seen: list):
    """An ``os.fsync`` that fails like a full disk on its ``call_number``-th call;
    ``seen`` gets (size of the file synced, temporaries in ``folder``) per call."""
    real = os.fsync

    def fsync(fd):
        seen.append((os.fstat(fd).st_size, _temporaries(folder)))
        if len(seen) == call_number:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real(fd)

    return fsync


def test_full_disk_while_writing_the_pdf_leaves_no_file_and_no_temporary(tmp_path, rich_result,
                                                                          monkeypatch):
    seen = []
    # the fourth fsync is the PDF's (formats are staged in the order asked for)
    monkeypatch.setattr(os, "fsync", _disk_full_on(4, tmp_path, seen))
    with pytest.raises(InputError, match="No space left on device") as err:
        write_outputs(rich_result, tmp_path, ALL)
    monkeypatch.undo()
    assert "report.pdf" in err.value.message
    # the failure came after the PDF's bytes were on their way, with all four staged
    pdf_size, staged_then = seen[3]
    assert pdf_size > 10_000
    assert staged_then == sorted(f".{n}.{os.getpid()}.tmp" for n in FILE_NAMES.values())
    assert _outputs(tmp_path) == []
    assert _temporaries(tmp_path) == []


def test_interrupted_run_keeps_the_previous_complete_set(tmp_path, rich_result, monkeypatch):
    first = with_time(rich_result, "2026-01-01T00:00:00Z")
    write_outputs(first, tmp_path, ("json", "csv"))
    before = {n: (tmp_path / n).read_bytes() for n in _outputs(tmp_path)}

    from audit.report import pdf

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(pdf, "render_pdf", interrupted)
    second = with_time(rich_result, "2026-02-02T00:00:00Z")
    with pytest.raises(KeyboardInterrupt):
        write_outputs(second, tmp_path, ALL)
    # json, csv and html of the second audit were staged; none replaced the first audit's files
    assert {n: (tmp_path / n).read_bytes() for n in _outputs(tmp_path)} == before
    assert _temporaries(tmp_path) == []
    assert json.loads(before["findings.json"])["audited_at"] == "2026-01-01T00:00:00Z"


def test_a_failed_standalone_writer_leaves_the_previous_file(tmp_path, rich_result, monkeypatch):
    path = tmp_path / "findings.json"
    write_findings(with_time(rich_result, "2026-01-01T00:00:00Z"), path)
    before = path.read_bytes()
    monkeypatch.setattr(os, "fsync", lambda fd: (_ for _ in ()).throw(OSError(errno.EIO, "I/O error")))
    with pytest.raises(InputError, match="I/O error"):
        write_findings(with_time(rich_result, "2026-02-02T00:00:00Z"), path)
    monkeypatch.undo()
    assert path.read_bytes() == before
    assert _temporaries(tmp_path) == []


def test_formats_not_asked_for_are_left_alone(tmp_path, rich_result):
    write_outputs(with_time(rich_result, "2026-01-01T00:00:00Z"), tmp_path, ("json", "csv"))
    old_csv = (tmp_path / "annotated.csv").read_bytes()
    write_outputs(with_time(rich_result, "2026-02-02T00:00:00Z"), tmp_path, ("json",))
    assert json.loads((tmp_path / "findings.json").read_text("utf-8"))["audited_at"] == "2026-02-02T00:00:00Z"
    assert (tmp_path / "annotated.csv").read_bytes() == old_csv


def test_sigint_during_the_renames_waits_for_the_whole_set(tmp_path, monkeypatch):
    # Python's own Ctrl-C handler, whatever this process started with (a shell running the tests
    # in the background starts them with SIGINT ignored)
    previous = signal.signal(signal.SIGINT, signal.default_int_handler)
    try:
        _sigint_between_renames(tmp_path, monkeypatch)
    finally:
        signal.signal(signal.SIGINT, previous)


def _sigint_between_renames(tmp_path, monkeypatch):
    renamed = []
    real_replace = os.replace

    def replace(src, dst):
        if not renamed:
            os.kill(os.getpid(), signal.SIGINT)  # a real Ctrl-C, between two renames
        real_replace(src, dst)
        renamed.append(os.path.basename(dst))

    with pytest.raises(KeyboardInterrupt):
        with StagedFiles() as staged:
            staged.write(tmp_path / "findings.json", b'{"a": 1}\n')
            staged.write(tmp_path / "annotated.csv", b"a\n1\n")
            monkeypatch.setattr(os, "replace", replace)
    monkeypatch.undo()
    # the interruption took effect only once both renames were done
    assert renamed == ["findings.json", "annotated.csv"]
    assert _outputs(tmp_path) == ["annotated.csv", "findings.json"]
    assert _temporaries(tmp_path) == []


def test_second_writer_into_a_locked_folder_gets_an_input_error(tmp_path, rich_result):
    with folder_lock(tmp_path):
        with pytest.raises(InputError, match="another vpaudit run is writing into") as err:
            write_outputs(rich_result, tmp_path, ("json",))
        assert "choose another --out" in err.value.message
        assert _outputs(tmp_path) == []
    # released on leaving the block: the next run writes
    write_outputs(rich_result, tmp_path, ("json",))
    assert _outputs(tmp_path) == ["findings.json"]


def test_lock_released_on_error(tmp_path):
    with pytest.raises(RuntimeError):
        with folder_lock(tmp_path):
            raise RuntimeError("a bug inside the block")
    with folder_lock(tmp_path):
        pass


_HOLDER = textwrap.dedent("""
    import sys
    from audit.report.atomic import folder_lock
    with folder_lock(sys.argv[1]):
        print("held", flush=True)
        sys.stdin.read()
""")


@pytest.mark.skipif(sys.platform == "win32", reason="SIGKILL is POSIX")
def test_lock_held_by_another_process_then_left_by_a_killed_one(tmp_path, rich_result):
    holder = subprocess.Popen([sys.executable, "-c", _HOLDER, str(tmp_path)],
                              stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout.readline().strip() == "held"
        with pytest.raises(InputError, match=f"another vpaudit run is writing into {tmp_path}"):
            write_outputs(rich_result, tmp_path, ("json",))
        holder.kill()  # SIGKILL: no clean-up of any kind runs in the holder
        holder.wait()
    finally:
        if holder.poll() is None:
            holder.kill()
            holder.wait()
    assert holder.returncode == -signal.SIGKILL
    # the dead holder's lock file is still there and does not block
    assert (tmp_path / LOCK_NAME).exists()
    write_outputs(rich_result, tmp_path, ("json",))
    assert json.loads((tmp_path / "findings.json").read_text("utf-8"))["audited_at"] == rich_result.audited_at


def test_temporaries_of_a_killed_run_are_removed_other_files_kept(tmp_path, rich_result):
    stale = tmp_path / ".report.pdf.4242.tmp"
    stale.write_bytes(b"%PDF-1.7 half a report")
    mine = tmp_path / ".notes.txt.4242.tmp"
    mine.write_text("not ours")
    write_outputs(rich_result, tmp_path, ("json",))
    assert not stale.exists()
    assert mine.exists()
    assert _outputs(tmp_path) == ["findings.json"]

