"""The archive's first tables: audits, their checks and their output files.

Revision ID: 0001
Revises:
Create Date: 2026-12-01

The columns are written out here, not imported from ``audit.archive.models``:
a migration must keep creating exactly what it created the day it was
released, whatever the models say later.
"""

import sqlalchemy as sa
from alembic import op

revision = "0001"
down_revision = None
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "vpaudit_audits",
        sa.Column("id", sa.Integer, primary_key=True, autoincrement=True),
        sa.Column("kind", sa.String(16), nullable=False),
        sa.Column("input_name", sa.Text, nullable=False),
        sa.Column("input_sha256", sa.String(64), nullable=False),
        sa.Column("input_path", sa.Text),
        sa.Column("input_file_sha256", sa.String(64)),
        sa.Column("metadata_path", sa.Text),
        sa.Column("metadata_sha256", sa.String(64)),
        sa.Column("profile_name", sa.Text, nullable=False),
        sa.Column("profile_sha256", sa.String(64), nullable=False),
        sa.Column("profile_text", sa.Text, nullable=False),
        sa.Column("tool_version", sa.String(64), nullable=False),
        sa.Column("audited_at", sa.Text, nullable=False),
        sa.Column("audited_at_utc", sa.DateTime),
        sa.Column("recorded_at", sa.DateTime, nullable=False),
        sa.Column("verdict", sa.String(8), nullable=False),
        sa.Column("n_rows", sa.Integer, nullable=False),
        sa.Column("n_ok", sa.Integer, nullable=False),
        sa.Column("n_suspect", sa.Integer, nullable=False),
        sa.Column("n_reject", sa.Integer, nullable=False),
        sa.Column("n_unreadable", sa.Integer, nullable=False),
        sa.Column("substance", sa.Text),
        sa.Column("findings_json", sa.Text, nullable=False),
    )
    # the searches of Archive.search
    op.create_index("ix_vpaudit_audits_input_sha256", "vpaudit_audits", ["input_sha256"])
    op.create_index("ix_vpaudit_audits_audited_at_utc", "vpaudit_audits", ["audited_at_utc"])
    op.create_index("ix_vpaudit_audits_verdict", "vpaudit_audits", ["verdict"])
    op.create_index("ix_vpaudit_audits_substance", "vpaudit_audits", ["substance"])
    op.create_table(
        "vpaudit_checks",
        sa.Column("audit_id", sa.Integer, sa.ForeignKey("vpaudit_audits.id", ondelete="CASCADE"),
                  primary_key=True),
        sa.Column("position", sa.Integer, primary_key=True),
        sa.Column("check_id", sa.String(100), nullable=False),
        sa.Column("status", sa.String(16), nullable=False),
        sa.Column("message", sa.Text, nullable=False),
        sa.Column("key_metric", sa.JSON),
    )
    op.create_table(
        "vpaudit_outputs",
        sa.Column("audit_id", sa.Integer, sa.ForeignKey("vpaudit_audits.id", ondelete="CASCADE"),
                  primary_key=True),
        sa.Column("position", sa.Integer, primary_key=True),
        sa.Column("format", sa.String(16), nullable=False),
        sa.Column("path", sa.Text, nullable=False),
        sa.Column("sha256", sa.String(64), nullable=False),
        sa.Column("size_bytes", sa.BigInteger),
    )


def downgrade() -> None:
    op.drop_table("vpaudit_outputs")
    op.drop_table("vpaudit_checks")
    op.drop_table("vpaudit_audits")
