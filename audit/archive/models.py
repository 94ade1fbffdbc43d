"""The archive's tables at the head revision, as SQLAlchemy Core objects for queries.

The tables are created and changed only by the migration scripts in
``migrations/versions`` (each keeps its own frozen copy of what it creates);
these definitions describe the result so that queries can name the columns.
``tests/archive/test_schema.py`` compares the two on a fresh archive.

Every name carries the ``vpaudit_`` prefix, and so does alembic's version
table, because a lab may keep the archive in a PostgreSQL database that other
applications (with their own ``alembic_version``) share.
"""

from __future__ import annotations

import sqlalchemy as sa

#: alembic's version table for the archive (one row: the schema revision)
VERSION_TABLE = "vpaudit_schema_version"

metadata = sa.MetaData()

audits = sa.Table(
    "vpaudit_audits", metadata,
    sa.Column("id", sa.Integer, primary_key=True, autoincrement=True),
    sa.Column("kind", sa.String(16), nullable=False),
    sa.Column("input_name", sa.Text, nullable=False),
    sa.Column("input_sha256", sa.String(64), nullable=False, index=True),
    sa.Column("input_path", sa.Text),
    sa.Column("input_file_sha256", sa.String(64)),
    sa.Column("metadata_path", sa.Text),
    sa.Column("metadata_sha256", sa.String(64)),
    sa.Column("profile_name", sa.Text, nullable=False),
    sa.Column("profile_sha256", sa.String(64), nullable=False),
    # the profile file's text: the profile may be edited or gone when the audit is compared
    sa.Column("profile_text", sa.Text, nullable=False),
    sa.Column("tool_version", sa.String(64), nullable=False),
    sa.Column("audited_at", sa.Text, nullable=False),
    sa.Column("audited_at_utc", sa.DateTime, index=True),
    sa.Column("recorded_at", sa.DateTime, nullable=False),
    sa.Column("verdict", sa.String(8), nullable=False, index=True),
    sa.Column("n_rows", sa.Integer, nullable=False),
    sa.Column("n_ok", sa.Integer, nullable=False),
    sa.Column("n_suspect", sa.Integer, nullable=False),
    sa.Column("n_reject", sa.Integer, nullable=False),
    sa.Column("n_unreadable", sa.Integer, nullable=False),
    sa.Column("substance", sa.Text, index=True),
    sa.Column("findings_json", sa.Text, nullable=False),
    # added by revision 0002 (filled there for records written before it)
    sa.Column("findings_sha256", sa.String(64)),
    sa.Column("schema_revision", sa.String(32)),
)

checks = sa.Table(
    "vpaudit_checks", metadata,
    sa.Column("audit_id", sa.Integer, sa.ForeignKey("vpaudit_audits.id", ondelete="CASCADE"),
              primary_key=True),
    sa.Column("position", sa.Integer, primary_key=True),
    sa.Column("check_id", sa.String(100), nullable=False),
    sa.Column("status", sa.String(16), nullable=False),
    sa.Column("message", sa.Text, nullable=False),
    sa.Column("key_metric", sa.JSON),
)

outputs = sa.Table(
    "vpaudit_outputs", metadata,
    sa.Column("audit_id", sa.Integer, sa.ForeignKey("vpaudit_audits.id", ondelete="CASCADE"),
              primary_key=True),
    sa.Column("position", sa.Integer, primary_key=True),
    sa.Column("format", sa.String(16), nullable=False),
    sa.Column("path", sa.Text, nullable=False),
    sa.Column("sha256", sa.String(64), nullable=False),
    sa.Column("size_bytes", sa.BigInteger),
)
