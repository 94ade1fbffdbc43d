"""``vpaudit demo``: audit the bundled synthetic demo tables.

Each demo table (``audit/demo_data/*``, SYNTHETIC, see
``reports_demo/README.md``) is copied with its metadata file into
``OUT/<name>/`` and audited there, so that every demo folder holds the input
it audited beside the findings and reports.  The demo records a fixed audit
time (or ``SOURCE_DATE_EPOCH`` when set) so that regenerating it gives the
same files.
"""

from __future__ import annotations

import os
import shutil
from importlib import resources
from pathlib import Path

DEMO_AUDIT_TIME = "2026-12-01T00:00:00Z"
DATA_SUFFIXES = (".csv", ".tsv", ".txt", ".xlsx", ".json")


SHEET_SUFFIX = ".sheet.toml"


def demo_inputs() -> list[str]:
    """File names of the bundled demo tables."""
    root = resources.files("audit.demo_data")
    return sorted(p.name for p in root.iterdir() if p.name.endswith(DATA_SUFFIXES))


def demo_sheets() -> list[str]:
    """File names of the bundled demo supplier sheets (``*.sheet.toml``)."""
    root = resources.files("audit.demo_data")
    return sorted(p.name for p in root.iterdir() if p.name.endswith(SHEET_SUFFIX))


def run_demo(out: Path, formats: str | None = None) -> list[Path]:
    from .files import audit_file, audit_sheet_file
    from .pipeline import audit_time
    from .report import available_formats, parse_formats, write_outputs

    fmts = parse_formats(formats or ",".join(available_formats()))
    fixed = None if os.environ.get("SOURCE_DATE_EPOCH") else DEMO_AUDIT_TIME
    root = resources.files("audit.demo_data")
    folders = []
    for name in demo_inputs():
        stem = Path(name).stem
        folder = out / stem
        folder.mkdir(parents=True, exist_ok=True)
        for companion in (name, f"{stem}.toml"):
            src = root.joinpath(companion)
            if src.is_file():
                with resources.as_file(src) as path:
                    shutil.copyfile(path, folder / companion)
        # audit the copy, by a path relative to the output folder's parent,
        # so that findings name the file as a reader of the folder sees it
        data = folder / name
        _, _, result = audit_file(str(data), audited_at=audit_time(fixed))
        write_outputs(result, folder, fmts, input_bytes=data.read_bytes())
        print(result.summary().splitlines()[0])
        print(f"  written to {folder}/")
        folders.append(folder)
    for name in demo_sheets():
        folder = out / name[:-len(SHEET_SUFFIX)].replace(".", "_").__add__("_sheet")
        folder.mkdir(parents=True, exist_ok=True)
        with resources.as_file(root.joinpath(name)) as path:
            shutil.copyfile(path, folder / name)
        sheet_path = folder / name
        _, _, result = audit_sheet_file(str(sheet_path), audited_at=audit_time(fixed))
        write_outputs(result, folder, fmts, input_bytes=sheet_path.read_bytes())
        print(f"{result.dataset.file_name}: verdict {result.verdict.upper()} — sheet decoded as "
              f"{result.sheet.decoded['label']}" + (" (not as stated)" if result.sheet.differs else ""))
        print(f"  written to {folder}/")
        folders.append(folder)
    return folders
