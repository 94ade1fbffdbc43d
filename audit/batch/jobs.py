"""The datasets of a collection: one job per table, per workbook sheet, per sheet
file, or per group of rows of one long table.

A job is a small frozen, picklable description (paths and names, never data):
each worker reads its own input, so that a collection of 10⁵ tables is not held
in the parent's memory and a worker process or a Dask worker on another host
needs only the paths.
"""

from __future__ import annotations

import glob
import os
import re
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError

__all__ = ["Job", "collect_jobs", "TABLE_SUFFIXES", "SHEET_SUFFIX", "split_long_table"]

TABLE_SUFFIXES = (".csv", ".tsv", ".txt", ".xlsx", ".json")
SHEET_SUFFIX = ".sheet.toml"


@dataclass(frozen=True)
class Job:
    """One dataset of the collection.

    Attributes
    ----------
    name : str
        Unique within the collection; the output folder's name.
    path : str
        The input file (a table, or a supplier's sheet file).
    kind : {'table', 'sheet'}
    worksheet : str or None
        The XLSX worksheet holding the dataset.
    substance : str or None
        A substance named by the grouping column (looked up in the property library).
    """

    name: str
    path: str
    kind: str = "table"
    worksheet: str | None = None
    substance: str | None = None


def _safe(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9._-]+", "_", text).strip("._") or "dataset"


def _files(inputs) -> list[Path]:
    out: list[Path] = []
    for item in inputs:
        p = Path(item)
        if p.is_dir():
            out += sorted(q for q in p.iterdir() if q.is_file())
        elif any(ch in str(item) for ch in "*?["):
            out += sorted(Path(q) for q in glob.glob(str(item), recursive=True) if Path(q).is_file())
        elif p.is_file():
            out.append(p)
        else:
            raise InputError(f"no such file, folder or pattern: {item}", hint="give table files, folders or globs")
    return out


def _worksheets(path: Path) -> list[str]:
    from openpyxl import load_workbook

    try:
        wb = load_workbook(path, read_only=True)
    except Exception:  # left to the ingest to explain, as one dataset
        return []
    try:
        return list(wb.sheetnames)
    finally:
        wb.close()


def collect_jobs(inputs, *, split_worksheets: bool = True) -> list[Job]:
    """One job per dataset found in ``inputs`` (files, folders, glob patterns).

    A folder contributes its tables (``.csv .tsv .txt .xlsx .json``) and its sheet files
    (``*.sheet.toml``); a ``.toml`` with a table's stem is that table's metadata, not a
    dataset.  An XLSX workbook with several worksheets is one dataset per worksheet.
    """
    files = _files(inputs)
    stems = {f.with_suffix("") for f in files if f.suffix.lower() in TABLE_SUFFIXES}
    jobs: list[Job] = []
    for f in files:
        name = f.name
        if name.endswith(SHEET_SUFFIX):
            jobs.append(Job(_safe(name[:-len(SHEET_SUFFIX)]) + "_sheet", str(f), "sheet"))
        elif f.suffix.lower() == ".toml" and f.with_suffix("") in stems:
            continue  # a table's metadata file
        elif f.suffix.lower() == ".xlsx" and split_worksheets and len(sheets := _worksheets(f)) > 1:
            jobs += [Job(_safe(f"{f.stem}_{s}"), str(f), "table", worksheet=s) for s in sheets]
        elif f.suffix.lower() in TABLE_SUFFIXES:
            jobs.append(Job(_safe(f.stem), str(f), "table"))
    seen: dict[str, int] = {}
    unique = []
    for j in jobs:  # two inputs of one stem in different folders: number them
        n = seen.get(j.name, 0)
        seen[j.name] = n + 1
        unique.append(j if n == 0 else Job(f"{j.name}_{n + 1}", j.path, j.kind, j.worksheet, j.substance))
    return unique


def split_long_table(path: str, group_by: tuple[str, ...], out_dir: str | os.PathLike) -> list[Job]:
    """Split one long table into one table per group of ``group_by`` columns.

    Every row keeps its cells exactly as printed (read as text); each group's table
    is written, with the header, to ``out_dir`` and becomes a job.  A column named
    ``substance`` (any case) names the group's substance for the property library.

    Raises
    ------
    InputError
        When the file cannot be read as a table or a grouping column is not in its header.
    """
    import pandas as pd

    src = Path(path)
    try:
        if src.suffix.lower() == ".xlsx":
            frame = pd.read_excel(src, dtype=str, keep_default_na=False)
        else:
            sep = "\t" if src.suffix.lower() == ".tsv" else None
            frame = pd.read_csv(src, dtype=str, keep_default_na=False, sep=sep, engine="python",
                                comment=None)
    except Exception as exc:
        raise InputError(f"cannot read the table to group it: {exc}", file=str(src)) from None
    missing = [c for c in group_by if c not in frame.columns]
    if missing:
        raise InputError(f"grouping column(s) not in the header: {', '.join(missing)}", file=str(src),
                         hint=f"the header has: {', '.join(map(str, frame.columns))}")
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    substance_col = next((c for c in group_by if str(c).lower() == "substance"), None)
    jobs = []
    for key, rows in frame.groupby(list(group_by), sort=True):
        key = key if isinstance(key, tuple) else (key,)
        name = _safe("_".join(str(k) for k in key))
        target = out / f"{name}.csv"
        rows.drop(columns=list(group_by)).to_csv(target, index=False)
        substance = str(key[group_by.index(substance_col)]) if substance_col else None
        jobs.append(Job(name, str(target), "table", substance=substance))
    return jobs
