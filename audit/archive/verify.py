"""Hashing recorded files, and telling whether each is still as recorded."""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

from .records import FileCheck

_CHUNK = 1 << 20


def sha256_file(path: str | os.PathLike) -> tuple[str, int]:
    """SHA-256 (hex) and size in bytes of a file, read in chunks (reports can be large).

    Raises
    ------
    OSError
        The file cannot be read (``FileNotFoundError`` when it is not there).
    """
    h = hashlib.sha256()
    size = 0
    with open(path, "rb") as fh:
        while chunk := fh.read(_CHUNK):
            h.update(chunk)
            size += len(chunk)
    return h.hexdigest(), size


def sha256_text(text: str) -> str:
    """SHA-256 (hex) of a text's UTF-8 bytes."""
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


class FileHasher:
    """Hashes each file once per verification, however many audits recorded it.

    An input audited under several profiles is recorded by each of those
    audits; re-reading it for each would multiply the work for nothing.
    """

    def __init__(self) -> None:
        self._seen: dict[str, tuple[str | None, str]] = {}

    def check(self, audit_id: int, role: str, path: str, recorded: str) -> FileCheck:
        key = os.path.abspath(path)
        if key not in self._seen:
            try:
                if not Path(key).is_file():
                    raise FileNotFoundError(key)
                self._seen[key] = (sha256_file(key)[0], "read")
            except FileNotFoundError:
                self._seen[key] = (None, "missing")
            except OSError:
                self._seen[key] = (None, "unreadable")
        actual, how = self._seen[key]
        if how != "read":
            status = how
        else:
            status = "ok" if actual == recorded else "changed"
        return FileCheck(audit_id, role, path, recorded, actual, status)  # type: ignore[arg-type]


def check_findings_text(audit_id: int, text: str, recorded: str) -> FileCheck:
    """The archived findings text against the hash recorded with it."""
    actual = sha256_text(text)
    return FileCheck(audit_id, "findings", "(archived findings document)", recorded, actual,
                     "ok" if actual == recorded else "changed")
