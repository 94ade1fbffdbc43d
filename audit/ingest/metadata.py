"""The metadata file: what is known about the substance, in TOML.

Format (our own)::

    substance = "naphthalene"        # optional
    cas = "91-20-3"                  # optional; the check digit is verified
    notes = "..."                    # optional; text or list of texts
    tsonopoulos_class = "alkanol"    # optional; polar terms of the second virial coefficient
    [columns]                        # optional; same keys as the command-line choices
    temperature = "Temp"
    temperature_unit = "degC"
    [constants]                      # value, unit (any pint unit), source; optional uncertainty
    T_triple = { value = 353.37, unit = "K", source = "..." }
    [reference_equation]             # optional; see audit.thermo.reference.reference_from_table
    form = "antoine"
    parameters = { A = 6.95464, B = 1344.8, C = 219.482 }
    P_unit = "Torr"                  # any unit a table header may use
    T_unit = "degC"
    valid_from_K = 286.0
    valid_to_K = 410.0
    source = "..."

Each constant is converted to the SI unit listed in
:data:`audit.model.CONSTANT_UNITS` (the dipole moment stays in debye): a
temperature or pressure unit through the vocabulary the table headers use
(:mod:`audit.units`), anything else (``g/mol``, ``kJ/mol``, ``cm^3/mol``)
with pint's factors.  The reference equation (a table, or an array of tables, one per
branch) is validated here and kept verbatim.  Anything not understood is an
error naming the file and the key: a typo in a metadata file must not
silently drop a constant or a reference.
"""

from __future__ import annotations

import math
import os
import re
import tomllib

from audit import units as _units
from audit.errors import InputError
from audit.ingest.columns import OVERRIDE_FIELDS, ColumnOverrides
from audit.model import CONSTANT_UNITS, Constant, Metadata

_TOP_LEVEL = ("substance", "cas", "notes", "tsonopoulos_class", "columns", "constants", "reference_equation")
_CONSTANT_KEYS = ("value", "unit", "source", "uncertainty")
_COLUMN_KEYS = tuple(f for f in OVERRIDE_FIELDS if f != "substance")
_DIMENSIONLESS = {"", "1", "-", "dimensionless"}


def cas_number_is_valid(cas: str) -> bool:
    """True when ``cas`` has the CAS Registry Number form and check digit.

    The check digit is the sum of the other digits, each multiplied by its
    position counted from the right (starting at 1), modulo 10 (CAS, "CAS
    Registry Number" check-digit rule).
    """
    m = re.fullmatch(r"(\d{2,7})-(\d{2})-(\d)", cas.strip())
    if not m:
        return False
    digits = (m.group(1) + m.group(2))[::-1]
    return sum((i + 1) * int(d) for i, d in enumerate(digits)) % 10 == int(m.group(3))


def _convert(value: float, unit: str, target: str) -> float:
    """`value` in `unit` expressed in `target`.

    Temperature and pressure units of the shared vocabulary use its table (so
    'C', 'mm Hg' or 'Torr' mean what they mean in a header), the usual
    constant units ('g/mol', 'kJ/mol', 'cm^3/mol') pint's factors kept in
    :data:`audit.units.CONSTANT_FACTORS`; only other, free-form unit texts
    build pint's registry.
    """
    known = _units.known_si_affine(unit, target)
    if known is not None:
        return known[0] * value + known[1]
    factor = _units.constant_factor(unit, target)
    if factor is not None:
        return factor * value
    if target == "1" and unit.strip() in _DIMENSIONLESS:
        return float(value)
    ureg = _units.registry()
    if target == "1":
        target = "dimensionless"
    return float(ureg.Quantity(value, unit).to(target).magnitude)


def _number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


def _read_constant(name: str, spec, file: str) -> Constant:
    key = f"constants.{name}"
    if name not in CONSTANT_UNITS:
        raise InputError(f"unknown constant {key!r}", file=file,
                         hint="known constants: " + ", ".join(CONSTANT_UNITS))
    if not isinstance(spec, dict):
        raise InputError(f"{key!r} must be a table {{ value = ..., unit = \"...\", source = \"...\" }}",
                         file=file)
    extra = [k for k in spec if k not in _CONSTANT_KEYS]
    if extra:
        raise InputError(f"{key!r} has unknown key(s) {', '.join(map(repr, extra))}", file=file,
                         hint="allowed: " + ", ".join(_CONSTANT_KEYS))
    for needed in ("value", "unit", "source"):
        if needed not in spec:
            raise InputError(f"{key!r} has no {needed!r}", file=file,
                             hint="every constant needs value, unit and source")
    value, unit, source = spec["value"], spec["unit"], spec["source"]
    if not _number(value):
        raise InputError(f"{key}.value must be a finite number, not {value!r}", file=file)
    if not isinstance(unit, str):
        raise InputError(f"{key}.unit must be text, e.g. \"K\", not {unit!r}", file=file)
    if not isinstance(source, str) or not source.strip():
        raise InputError(f"{key}.source must be a non-empty text naming where the value comes from",
                         file=file)
    uncertainty = spec.get("uncertainty")
    if uncertainty is not None and (not _number(uncertainty) or uncertainty < 0):
        raise InputError(f"{key}.uncertainty must be a finite number >= 0, not {uncertainty!r}",
                         file=file)
    target = CONSTANT_UNITS[name]
    try:
        si = _convert(float(value), unit, target)
        u_si = (None if uncertainty is None
                else abs(_convert(float(value) + float(uncertainty), unit, target) - si))
    except _units.RefusedUnit as exc:
        raise InputError(f"{key}.unit {unit!r} cannot be used: {exc}", file=file) from None
    except Exception as exc:  # noqa: BLE001 -- pint raises many types for unparseable unit text
        what = "dimensionless" if target == "1" else target
        raise InputError(f"{key}.unit {unit!r} cannot be converted to {what} ({type(exc).__name__})",
                         file=file, hint="write units the way pint reads them, e.g. 'kJ/mol', "
                                         "'g/mol', 'cm^3/mol', 'degC', 'MPa'") from None
    if not math.isfinite(si):
        raise InputError(f"{key} is out of range after conversion", file=file)
    return Constant(value=si, unit=target, source=source.strip(), uncertainty=u_si)


def _check_reference_equations(given, file: str) -> None:
    """Validate ``[reference_equation]`` (one table) or ``[[reference_equation]]`` (one per branch).

    Raises
    ------
    InputError
        Naming the metadata file and the key, e.g. ``reference_equation.P_unit``.
    """
    from audit.thermo.reference import REFERENCE_TABLE_KEYS, ReferenceTableError, reference_from_table

    tables = given if isinstance(given, list) else [given]
    if not tables or not all(isinstance(t, dict) for t in tables):
        raise InputError("'reference_equation' must be a table, or an array of tables ([[reference_equation]])",
                         file=file)
    branches: dict[str, str] = {}
    for i, table in enumerate(tables):
        prefix = "reference_equation" if len(tables) == 1 and not isinstance(given, list) \
            else f"reference_equation[{i}]"
        try:
            ref = reference_from_table(table)
        except ReferenceTableError as exc:
            key = f"{prefix}.{exc.key}" if exc.key else prefix
            shown = _value_at(table, exc.key)
            raise InputError(f"{key}{'' if shown is None else f' = {shown!r}'}: {exc}", file=file,
                             hint="keys: " + ", ".join(REFERENCE_TABLE_KEYS)
                                  + "; see 'vpaudit explain reference-agreement'") from None
        if ref.branch in branches:
            raise InputError(f"{prefix}.branch: a second reference equation for the {ref.branch} branch "
                             f"(the first is {branches[ref.branch]})", file=file)
        branches[ref.branch] = prefix


def _value_at(table: dict, dotted: str):
    """The scalar at a dotted key of `table`, or None (absent, or a table)."""
    node = table
    for part in dotted.split(".") if dotted else ():
        if not isinstance(node, dict) or part not in node:
            return None
        node = node[part]
    return None if isinstance(node, (dict, list)) or node is table else node


def read_metadata_and_columns(path: str | os.PathLike) -> tuple[Metadata, ColumnOverrides]:
    """Read a metadata file: the substance information and its column choices.

    Parameters
    ----------
    path : str or path-like
        The TOML file.

    Returns
    -------
    (Metadata, ColumnOverrides)

    Raises
    ------
    InputError
        Unreadable file, invalid TOML, unknown keys, wrong types, unknown
        constants or units that cannot be converted.
    """
    file = str(path)
    try:
        with open(path, "rb") as fh:
            data = fh.read()
    except OSError as exc:
        raise InputError(f"cannot read the metadata file ({exc.strerror or exc})", file=file) from None
    try:
        doc = tomllib.loads(data.decode("utf-8-sig"))
    except UnicodeDecodeError:
        raise InputError("the metadata file is not UTF-8 text", file=file) from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"invalid TOML: {exc}", file=file) from None
    unknown = [k for k in doc if k not in _TOP_LEVEL]
    if unknown:
        raise InputError(f"unknown key(s) in the metadata file: {', '.join(map(repr, unknown))}",
                         file=file, hint="allowed: " + ", ".join(_TOP_LEVEL))
    for key in ("substance", "cas"):
        if key in doc and not isinstance(doc[key], str):
            raise InputError(f"{key!r} must be text", file=file)
    cas = doc.get("cas")
    if cas is not None and not cas_number_is_valid(cas):
        raise InputError(f"'cas' = {cas!r} is not a valid CAS Registry Number (form or check digit)",
                         file=file, hint="write it like \"91-20-3\"")
    extra: dict[str, object] = {}
    if "tsonopoulos_class" in doc:
        from audit.thermo.polarity import TSONOPOULOS_CLASSES

        kind = doc["tsonopoulos_class"]
        if not isinstance(kind, str) or kind.strip().lower() not in TSONOPOULOS_CLASSES:
            raise InputError(f"'tsonopoulos_class' = {kind!r} is not a class of the Tsonopoulos correlation",
                             file=file, hint="one of " + ", ".join(TSONOPOULOS_CLASSES))
        extra["tsonopoulos_class"] = kind.strip().lower()
    if "notes" in doc:
        notes = doc["notes"]
        if isinstance(notes, str):
            notes = [notes]
        if not isinstance(notes, list) or not all(isinstance(n, str) for n in notes):
            raise InputError("'notes' must be a text or a list of texts", file=file)
        extra["notes"] = list(notes)
    if "reference_equation" in doc:
        _check_reference_equations(doc["reference_equation"], file)
        extra["reference_equation"] = doc["reference_equation"]
    columns = doc.get("columns", {})
    if not isinstance(columns, dict):
        raise InputError("'columns' must be a table", file=file)
    bad = [k for k in columns if k not in _COLUMN_KEYS]
    if bad:
        raise InputError(f"unknown key(s) under [columns]: {', '.join(map(repr, bad))}", file=file,
                         hint="allowed: " + ", ".join(_COLUMN_KEYS))
    for k, v in columns.items():
        if not isinstance(v, str):
            raise InputError(f"columns.{k} must be text, not {v!r}", file=file)
    if columns:
        extra["columns"] = dict(columns)
    constants_table = doc.get("constants", {})
    if not isinstance(constants_table, dict):
        raise InputError("'constants' must be a table", file=file)
    constants = {name: _read_constant(name, spec, file) for name, spec in constants_table.items()}
    metadata = Metadata(substance=doc.get("substance"), cas=cas, constants=constants, extra=extra)
    return metadata, ColumnOverrides(**columns)


def read_metadata(path: str | os.PathLike) -> Metadata:
    """Read a metadata TOML file.

    Parameters
    ----------
    path : str or path-like

    Returns
    -------
    Metadata
        Constants in SI (see :data:`audit.model.CONSTANT_UNITS`); the
        ``[columns]``, ``notes`` and ``[reference_equation]`` tables are kept
        in ``extra``.

    Raises
    ------
    InputError
        See :func:`read_metadata_and_columns`.
    """
    return read_metadata_and_columns(path)[0]
