"""Helpers for ingest tests: write a table to a temporary file and read it."""

from __future__ import annotations

import pytest

from audit.ingest import ColumnOverrides, read_table


@pytest.fixture
def write_table(tmp_path):
    """Write text (UTF-8 unless bytes are given) to a file and return its path."""

    def _write(content, name="table.csv"):
        path = tmp_path / name
        path.write_bytes(content if isinstance(content, bytes) else content.encode("utf-8"))
        return path

    return _write


@pytest.fixture
def read_text(write_table):
    """Write a table and read it with :func:`read_table`."""

    def _read(content, name="table.csv", **overrides):
        return read_table(write_table(content, name), ColumnOverrides(**overrides) if overrides else None)

    return _read
