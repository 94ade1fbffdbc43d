"""The archive's schema: which revision an archive is at, and bringing it to head.

The migration scripts ship inside the package (``audit/archive/migrations``)
and run through alembic's API on a connection the archive opened; no
``alembic.ini`` is involved.
"""

from __future__ import annotations

from pathlib import Path

import sqlalchemy as sa
from alembic import command
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory

from .models import VERSION_TABLE

MIGRATIONS = Path(__file__).resolve().parent / "migrations"


def alembic_config(connection: sa.Connection | None = None) -> Config:
    """An alembic configuration for the packaged scripts, bound to ``connection``."""
    cfg = Config()
    cfg.set_main_option("script_location", str(MIGRATIONS))
    if connection is not None:
        cfg.attributes["connection"] = connection
    return cfg


def script_directory() -> ScriptDirectory:
    return ScriptDirectory.from_config(alembic_config())


def head_revision() -> str:
    """The newest schema revision this version of vpaudit knows."""
    head = script_directory().get_current_head()
    assert head is not None, "the archive's migration scripts are missing"
    return head


def known_revisions() -> set[str]:
    return {s.revision for s in script_directory().walk_revisions()}


def current_revision(connection: sa.Connection) -> str | None:
    """The revision recorded in the archive's version table (None for an empty database)."""
    return MigrationContext.configure(connection, opts={"version_table": VERSION_TABLE}).get_current_revision()


def upgrade(connection: sa.Connection, target: str = "head") -> None:
    """Run the migrations up to ``target`` inside the connection's current transaction.

    The caller begins the transaction (and, for SQLite, holds the write lock)
    and commits it: with the scripts inside it, an interrupted upgrade leaves
    the archive at the revision it had.
    """
    command.upgrade(alembic_config(connection), target)
