"""Rule profiles: which checks run, with which thresholds and severity.

A profile is a TOML file.  The shipped profiles live in the top-level
``rules/`` folder (installed as the data package ``audit.rules``); a user may
pass the path of a profile of their own.  Every threshold is declared once, in
``rules/default.toml``; a profile that ``extends`` another changes only the
keys it names.  Each check declares the options it understands (type and
meaning) in :mod:`audit.checks`; an unknown key, a missing value or a wrong
type is an :class:`~audit.errors.InputError`.

Example
-------
.. code-block:: toml

    [profile]
    name = "strict-curation"
    description = "For reference-quality data"
    extends = "default"

    [limits]
    max_rows = 20000

    [checks.outliers]
    reject_alpha = 0.001
"""

from __future__ import annotations

import hashlib
import tomllib
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import Any, Mapping

from .frozen import FrozenMapping
from .options import Option
from .errors import InputError

SEVERITIES = ("warn", "fail")
_MAX_EXTENDS_DEPTH = 8


@dataclass(frozen=True)
class CheckSettings:
    """The resolved settings of one check in a profile."""

    enabled: bool
    severity: str
    options: Mapping[str, Any]

    def __getitem__(self, key: str) -> Any:
        return self.options[key]


#: what ``[limits]`` may say, declared and validated as a check's options are
LIMIT_OPTIONS: Mapping[str, Option] = FrozenMapping({
    "max_rows": Option(int, "most data rows one audit accepts; a larger table is refused with one "
                            "message before its rows become points", unit="rows", minimum=1),
})


@dataclass(frozen=True)
class Limits:
    """The resolved ``[limits]`` of a profile: how large an input one audit accepts.

    Attributes
    ----------
    max_rows : int
        Most data rows (blank rows inside the table included) [rows].
    """

    max_rows: int


@dataclass(frozen=True)
class RowLimit:
    """A profile's row limit, with the profile's name for the message.

    Attributes
    ----------
    max_rows : int
        Most data rows accepted [rows].
    profile : str
        Name of the profile that sets it.
    """

    max_rows: int
    profile: str

    def check(self, n_rows: int, file: str | None) -> None:
        """Raise the one :class:`~audit.errors.InputError` for a table above the limit.

        Parameters
        ----------
        n_rows : int
            Data rows of the table [rows].
        file : str or None
            The file, for the message.
        """
        if n_rows > self.max_rows:
            raise InputError(
                f"the table has {n_rows} data rows; profile {self.profile!r} audits at most "
                f"{self.max_rows} (limits.max_rows)", file=file,
                hint="split the table by source or raise the limit in a profile of your own")


@dataclass(frozen=True)
class Profile:
    """A resolved rule profile.

    Attributes
    ----------
    name : str
    description : str
    checks : mapping of check id to CheckSettings
    limits : Limits
        Size limits of the input (``[limits]``).
    sha256 : str
        SHA-256 of the profile file's bytes (of the named file itself; the
        profiles it extends are listed in ``chain``).
    path : str
        Where it was read from (``audit.rules/default.toml`` for shipped ones).
    chain : tuple of str
        The names of the profiles it was built from, base first.
    text : str
        The profile file's text, for embedding in archived reports.
    """

    name: str
    description: str
    checks: Mapping[str, CheckSettings]
    limits: Limits
    sha256: str
    path: str
    chain: tuple[str, ...] = ()
    text: str = field(default="", repr=False)

    def settings(self, check_id: str) -> CheckSettings:
        return self.checks[check_id]

    def is_enabled(self, check_id: str) -> bool:
        s = self.checks.get(check_id)
        return bool(s and s.enabled)

    @property
    def row_limit(self) -> RowLimit:
        """The row limit with this profile's name, for readers and :func:`audit.pipeline.run_audit`."""
        return RowLimit(self.limits.max_rows, self.name)


def shipped_profiles() -> list[str]:
    """Names of the profiles that ship with the tool."""
    return sorted(p.name[:-5] for p in resources.files("audit.rules").iterdir()
                  if p.name.endswith(".toml"))


def _read_profile_file(name_or_path: str | Path) -> tuple[str, bytes, str]:
    """Return (display path, bytes, stem) of a named or given profile."""
    text = str(name_or_path)
    looks_like_path = text.endswith(".toml") or "/" in text or "\\" in text
    if looks_like_path:
        path = Path(text)
        if not path.is_file():
            raise InputError("profile file not found", file=text,
                             hint="give an existing .toml file or a shipped profile name "
                                  f"({', '.join(shipped_profiles())})")
        return str(path), path.read_bytes(), path.stem
    resource = resources.files("audit.rules").joinpath(f"{text}.toml")
    if not resource.is_file():
        raise InputError(f"unknown profile {text!r}",
                         hint=f"shipped profiles: {', '.join(shipped_profiles())}; "
                              "or give the path of a .toml profile")
    return f"audit.rules/{text}.toml", resource.read_bytes(), text


def _parse(display: str, data: bytes) -> dict:
    try:
        return tomllib.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        raise InputError(f"not a valid TOML profile ({exc})", file=display,
                         hint="fix the TOML syntax") from None


def load_profile(name_or_path: str | Path = "default") -> Profile:
    """Load, resolve (``extends``) and validate a rule profile.

    Parameters
    ----------
    name_or_path : str or Path
        A shipped profile name (see :func:`shipped_profiles`) or a path to a
        ``.toml`` file.

    Raises
    ------
    InputError
        Unknown check or option, wrong type, missing value, a loop in
        ``extends``.
    """
    from .checks import registry  # late: the registry imports the checks

    chain: list[tuple[str, dict]] = []
    seen: set[str] = set()
    current: str | Path | None = name_or_path
    first: tuple[str, bytes, str] | None = None
    while current is not None:
        display, data, stem = _read_profile_file(current)
        if first is None:
            first = (display, data, stem)
        if display in seen:
            raise InputError("profile extends itself in a loop", file=display,
                             hint="remove the circular 'extends'")
        seen.add(display)
        if len(seen) > _MAX_EXTENDS_DEPTH:
            raise InputError("profile 'extends' chain is too deep", file=display)
        doc = _parse(display, data)
        _validate_shape(display, doc)
        chain.append((display, doc))
        current = doc.get("profile", {}).get("extends")
        if current is not None and not isinstance(current, str):
            raise InputError("'extends' must be a profile name or path (text)", file=display)

    merged: dict[str, dict[str, Any]] = {}
    merged_limits: dict[str, Any] = {}
    for display, doc in reversed(chain):
        merged_limits.update(doc.get("limits", {}))
        for check_id, table in doc.get("checks", {}).items():
            merged.setdefault(check_id, {}).update(table)

    assert first is not None
    display0, data0, stem0 = first
    head = chain[0][1].get("profile", {})
    checks: dict[str, CheckSettings] = {}
    known = registry.all_checks()
    for check_id, check in known.items():
        table = dict(merged.get(check_id, {}))
        where = f"[checks.{check_id}]"
        if not table:
            raise InputError(f"profile has no section {where}", file=display0,
                             hint="extend the 'default' profile (extends = \"default\") or add the section")
        enabled = table.pop("enabled", None)
        severity = table.pop("severity", None)
        if not isinstance(enabled, bool):
            raise InputError(f"{where} enabled must be true or false", file=display0)
        if severity not in SEVERITIES:
            raise InputError(f"{where} severity must be one of {SEVERITIES}, got {severity!r}",
                             file=display0)
        options: dict[str, Any] = {}
        for opt_name, opt in check.options.items():
            if opt_name not in table:
                raise InputError(f"{where} is missing option {opt_name!r} ({opt.doc})",
                                 file=display0, hint="add it, or extend a profile that sets it")
            options[opt_name] = opt.validate(table.pop(opt_name), f"{where} {opt_name}", display0)
        if table:
            unknown = ", ".join(sorted(table))
            raise InputError(f"{where} has unknown option(s): {unknown}", file=display0,
                             hint=f"known options: {', '.join(sorted(check.options)) or 'none'}; "
                                  f"see 'vpaudit explain {check_id}'")
        checks[check_id] = CheckSettings(enabled=enabled, severity=severity,
                                         options=FrozenMapping(options))
    unknown_checks = sorted(set(merged) - set(known))
    if unknown_checks:
        raise InputError(f"unknown check(s) in profile: {', '.join(unknown_checks)}", file=display0,
                         hint=f"known checks: {', '.join(known)}")
    return Profile(
        name=str(head.get("name", stem0)),
        description=str(head.get("description", "")),
        checks=FrozenMapping(checks),
        limits=_resolve_limits(merged_limits, display0),
        sha256=hashlib.sha256(data0).hexdigest(),
        path=display0,
        chain=tuple(d for d, _ in reversed(chain)),
        text=data0.decode("utf-8"),
    )


def _resolve_limits(table: dict, display: str) -> Limits:
    """Validate the merged ``[limits]`` with the same rules as a check's options."""
    values = {}
    for key, opt in LIMIT_OPTIONS.items():
        if key not in table:
            raise InputError(f"[limits] is missing {key!r} ({opt.doc})", file=display,
                             hint="add it, or extend a profile that sets it")
        values[key] = opt.validate(table[key], f"[limits] {key}", display)
    return Limits(**values)


def _validate_shape(display: str, doc: dict) -> None:
    extra = set(doc) - {"profile", "limits", "checks"}
    if extra:
        raise InputError(f"unknown top-level key(s): {', '.join(sorted(extra))}", file=display,
                         hint="a profile has only [profile], [limits] and [checks.<id>] tables")
    limits = doc.get("limits", {})
    if not isinstance(limits, dict):
        raise InputError("[limits] must be a table", file=display)
    unknown_limits = set(limits) - set(LIMIT_OPTIONS)
    if unknown_limits:
        raise InputError(f"[limits] has unknown key(s): {', '.join(sorted(unknown_limits))}",
                         file=display, hint=f"allowed: {', '.join(LIMIT_OPTIONS)}")
    prof = doc.get("profile", {})
    if not isinstance(prof, dict):
        raise InputError("[profile] must be a table", file=display)
    unknown = set(prof) - {"name", "description", "extends"}
    if unknown:
        raise InputError(f"[profile] has unknown key(s): {', '.join(sorted(unknown))}", file=display,
                         hint="allowed: name, description, extends")
    checks = doc.get("checks", {})
    if not isinstance(checks, dict) or not all(isinstance(v, dict) for v in checks.values()):
        raise InputError("[checks] must hold one table per check, e.g. [checks.outliers]",
                         file=display)
