"""Ingest: real-world P–T tables -> :class:`audit.model.Dataset`.

Public API
----------
ColumnOverrides
    Column and unit choices (command line / metadata file).
read_table(path, overrides=None, metadata_path=None) -> Dataset
    CSV, TSV, semicolon CSV with decimal commas, XLSX, JSON; every data row
    becomes one point, in order.
read_metadata(path) -> Metadata
    The substance's metadata TOML file.

Importing this package is cheap: pint and openpyxl are imported on first use.
"""

from audit.ingest.columns import ColumnOverrides
from audit.ingest.metadata import read_metadata
from audit.ingest.table import read_table

__all__ = ["ColumnOverrides", "read_table", "read_metadata"]
