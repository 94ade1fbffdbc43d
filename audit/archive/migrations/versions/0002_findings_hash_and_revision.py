"""Each audit record keeps the SHA-256 of its findings text and the schema revision it was written under.

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-01

With the hash, ``Archive.verify`` proves that the archived findings document
is the one recorded; with the revision, a reader years later knows which
layout a record was written in.  Records written under 0001 get both here:
the hash of their findings text as it stands, and revision "0001".
"""

import hashlib

import sqlalchemy as sa
from alembic import op

revision = "0002"
down_revision = "0001"
branch_labels = None
depends_on = None


def upgrade() -> None:
    with op.batch_alter_table("vpaudit_audits") as batch:
        batch.add_column(sa.Column("findings_sha256", sa.String(64)))
        batch.add_column(sa.Column("schema_revision", sa.String(32)))
    audits = sa.table("vpaudit_audits", sa.column("id", sa.Integer), sa.column("findings_json", sa.Text),
                      sa.column("findings_sha256", sa.String), sa.column("schema_revision", sa.String))
    conn = op.get_bind()
    rows = conn.execute(sa.select(audits.c.id, audits.c.findings_json)).all()
    for audit_id, text in rows:
        conn.execute(audits.update().where(audits.c.id == audit_id).values(
            findings_sha256=hashlib.sha256(text.encode("utf-8")).hexdigest(), schema_revision="0001"))


def downgrade() -> None:
    with op.batch_alter_table("vpaudit_audits") as batch:
        batch.drop_column("schema_revision")
        batch.drop_column("findings_sha256")
