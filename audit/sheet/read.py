"""Read a vapor-pressure sheet file (TOML, our own format).

Format::

    [sheet]
    substance = "toluene"            # or cas = "108-88-3" (check digit verified); one is needed
    supplier = "…"                   # optional, free text
    product = "…"                    # optional, free text

    [equation]
    form = "antoine"                 # antoine | antoine-extended | clausius-clapeyron |
                                     # wagner-2.5-5 | wagner-3-6 | clarke-glew | expression
    coefficients = { A = 6.95464, B = 1344.8, C = 219.482 }
    expression = "A - B/(T + C)"     # only with form = "expression"
    gives = "log10"                  # the equation gives log10(P) | ln(P) | P ("none"); optional
    T_unit = "degC"                  # any temperature unit a table header may use; optional
    P_unit = "kPa"                   # any pressure unit a table header may use; optional
    range = [0.0, 130.0]             # stated validity, in T_unit; optional
    phase = "liquid"                 # liquid (default) | solid

    [table]                          # optional: values printed on the sheet
    T_unit = "degC"                  # optional: when absent, the table shares the equation's units
    P_unit = "kPa"
    rows = [[20, 2.91], [40, "7,880"], …]   # numbers, or text exactly as printed
    u_P_percent = 1.0                # optional

    [reference_equation]             # optional: as in a metadata file

Coefficient names per form: ``antoine`` A, B, C (log P = A − B/(T + C));
``antoine-extended`` A, B, C and optional D, E, F (log P = A − B/(T + C) + D·T
+ E·T² + F·ln T); ``clausius-clapeyron`` A, B (log P = A − B/T);
``wagner-2.5-5`` / ``wagner-3-6`` a, b, c, d, Tc, Pc (ln(P/Pc) = (Tc/T)(a τ +
b τ^1.5 + c τ^x + d τ^y), τ = 1 − T/Tc; Tc in T_unit, Pc in P_unit);
``clarke-glew`` theta, dG, dH, dCp and optional d_dCp_dT (SI: K, J/mol,
J/(mol K), J/(mol K²)); ``expression`` any names used in the formula
(:mod:`audit.sheet.expression`; T is the temperature).

Anything not understood is an :class:`~audit.errors.InputError` naming the
file and the key.
"""

from __future__ import annotations

import hashlib
import math
import os
import tomllib

from ..errors import InputError
from ..units import parse_plain_pressure_unit, parse_temperature_unit
from .model import SHEET_FORMS, Sheet, SheetRow, SheetTable, StatedReading

__all__ = ["read_sheet", "sheet_from_text"]

_SECTIONS = ("sheet", "equation", "table", "reference_equation")
_SHEET_KEYS = ("substance", "cas", "supplier", "product")
_EQUATION_KEYS = ("form", "coefficients", "expression", "gives", "T_unit", "P_unit", "range", "phase")
_TABLE_KEYS = ("T_unit", "P_unit", "rows", "u_P_percent")
_GIVES = {"log10": "log10", "log": "log10", "lg": "log10", "ln": "ln", "none": "none", "p": "none", "P": "none"}


def read_sheet(path) -> Sheet:
    """Read a sheet file; the file is only read, never changed."""
    name = os.fspath(path)
    try:
        with open(name, "rb") as fh:
            data = fh.read()
    except OSError as exc:
        raise InputError(f"cannot read the sheet: {exc.strerror or exc}", file=name) from None
    return sheet_from_text(data, name)


def sheet_from_text(data: bytes, file_name: str = "<sheet>") -> Sheet:
    """Parse the bytes of a sheet file (see the module docstring for the format)."""
    try:
        text = data.decode("utf-8-sig")  # a byte-order mark, as some editors write, is not text
        doc = tomllib.loads(text)
    except UnicodeDecodeError:
        raise InputError("the sheet is not UTF-8 text", file=file_name,
                         hint="save it as UTF-8 (a TOML file, see the README's sheet example)") from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"the sheet is not valid TOML: {exc}", file=file_name,
                         hint="see the README's sheet example") from None
    _only(doc, _SECTIONS, "the sheet", file_name)
    head = _table(doc, "sheet", file_name, required=True)
    _only(head, _SHEET_KEYS, "[sheet]", file_name)
    eq = _table(doc, "equation", file_name, required=True)
    _only(eq, _EQUATION_KEYS, "[equation]", file_name)

    substance = _text(head, "substance", "[sheet]", file_name)
    cas = _text(head, "cas", "[sheet]", file_name)
    if cas is not None:
        from ..ingest.metadata import cas_number_is_valid

        if not cas_number_is_valid(cas):
            raise InputError(f"[sheet] cas {cas!r} is not a valid CAS number (form or check digit)",
                             file=file_name, hint="write it as digits-digits-check digit, e.g. 108-88-3")
    if substance is None and cas is None:
        raise InputError("[sheet] names no substance", file=file_name,
                         hint="give substance = \"name\" or cas = \"CAS number\"")

    form = _text(eq, "form", "[equation]", file_name)
    if form is None:
        raise InputError("[equation] needs 'form'", file=file_name, hint=f"one of: {', '.join(SHEET_FORMS)}")
    form = form.strip().lower()
    if form not in SHEET_FORMS:
        raise InputError(f"[equation] form {form!r} is not known", file=file_name,
                         hint=f"one of: {', '.join(SHEET_FORMS)}")
    coefficients = _coefficients(eq, file_name)
    expression = _text(eq, "expression", "[equation]", file_name)
    notes: list[str] = []
    if form == "expression":
        if expression is None:
            raise InputError("[equation] form \"expression\" needs 'expression'", file=file_name,
                             hint="e.g. expression = \"A - B/(T + C)\"")
        from .expression import ExpressionError, parse_expression

        try:
            parsed = parse_expression(expression)
        except ExpressionError as exc:
            raise InputError(f"[equation] expression cannot be read: {exc}", file=file_name,
                             hint="the grammar: numbers, names, + - * / ^, ln log10 exp sqrt abs, "
                                  "parentheses; T is the temperature") from None
        missing = sorted(parsed.names - set(coefficients))
        if missing:
            raise InputError(f"[equation] expression uses coefficient(s) not given: {', '.join(missing)}",
                             file=file_name, hint="add them to coefficients")
    else:
        if expression is not None:
            raise InputError(f"[equation] 'expression' is only for form = \"expression\", not {form!r}",
                             file=file_name)
        required, optional = SHEET_FORMS[form]
        missing = [k for k in required if k not in coefficients]
        if missing:
            raise InputError(f"[equation] form {form!r} needs coefficient(s) {', '.join(missing)}",
                             file=file_name, hint=f"{form}: {', '.join(required)}"
                             + (f" (optional: {', '.join(optional)})" if optional else ""))
        unknown = sorted(set(coefficients) - set(required) - set(optional))
        if unknown:
            raise InputError(f"[equation] form {form!r} has no coefficient(s) {', '.join(unknown)}",
                             file=file_name, hint=f"{form}: {', '.join(required + optional)}")

    gives = eq.get("gives")
    if gives is not None:
        if not isinstance(gives, str) or gives.strip() not in _GIVES:
            raise InputError(f"[equation] gives = {gives!r} is not understood", file=file_name,
                             hint="log10, ln or none (the equation gives P itself)")
        gives = _GIVES[gives.strip()]
    stated = StatedReading(gives, _temperature_unit(eq, "[equation]", file_name),
                           _pressure_unit(eq, "[equation]", file_name))
    for what, value in (("gives", stated.log), ("T_unit", stated.T_unit), ("P_unit", stated.P_unit)):
        if value is None:
            notes.append(f"the sheet does not state [equation] {what}: every reading is tried")

    T_range = None
    if "range" in eq:
        r = eq["range"]
        if (not isinstance(r, list) or len(r) != 2 or not all(_is_number(v) for v in r)
                or not float(r[0]) < float(r[1])):
            raise InputError(f"[equation] range = {r!r} must be two numbers, low then high", file=file_name)
        T_range = (float(r[0]), float(r[1]))
    phase = (_text(eq, "phase", "[equation]", file_name) or "liquid").strip().lower()
    if phase not in ("liquid", "solid"):
        raise InputError(f"[equation] phase {phase!r} must be liquid or solid", file=file_name)

    table = None
    if "table" in doc:
        table = _read_table(_table(doc, "table", file_name, required=True), stated, file_name)
    ref = doc.get("reference_equation")
    if ref is not None:
        # refused now, with the file's name, rather than when the audit reaches for it
        from ..checks.reference_agreement import _from_metadata

        _from_metadata(ref, file_name)
    return Sheet(file_name=file_name, sha256=hashlib.sha256(data).hexdigest(), substance=substance, cas=cas,
                 form=form, coefficients=coefficients, stated=stated, T_range=T_range, phase=phase,
                 expression=expression, table=table, supplier=_text(head, "supplier", "[sheet]", file_name),
                 product=_text(head, "product", "[sheet]", file_name), text=text, notes=tuple(notes),
                 reference_equation=ref)


def _read_table(tab: dict, stated: StatedReading, file_name: str) -> SheetTable:
    from ..ingest.numbers import read_number

    _only(tab, _TABLE_KEYS, "[table]", file_name)
    T_unit = _temperature_unit(tab, "[table]", file_name)
    P_unit = _pressure_unit(tab, "[table]", file_name)
    units_given = T_unit is not None or P_unit is not None
    rows = tab.get("rows")
    if not isinstance(rows, list) or not rows:
        raise InputError("[table] needs rows = [[T, P], …]", file=file_name)
    out = []
    for i, r in enumerate(rows, start=1):
        if not isinstance(r, list) or len(r) != 2:
            raise InputError(f"[table] row {i} must be [T, P]", file=file_name, row=i)
        cells = []
        for value in r:
            if _is_number(value):
                cells.append((repr(float(value)) if isinstance(value, float) else str(value), float(value), None))
            elif isinstance(value, str):
                comma = "," in value and "." not in value
                cell = read_number(value, decimal_comma=comma)
                cells.append((value, cell.value, None if cell.value is not None else cell.problem))
            else:
                raise InputError(f"[table] row {i}: {value!r} is neither a number nor text", file=file_name, row=i)
        (T_text, T_value, T_problem), (P_text, P_value, P_problem) = cells
        reason = "; ".join(f"{what} cell {text!r}: {problem}" for what, text, problem in
                           (("temperature", T_text, T_problem), ("pressure", P_text, P_problem)) if problem)
        out.append(SheetRow(i, T_text, P_text, T_value, P_value, reason or None))
    u = tab.get("u_P_percent")
    if u is not None and (not _is_number(u) or not 0 < float(u) < 100):
        raise InputError(f"[table] u_P_percent = {u!r} must be a number between 0 and 100", file=file_name)
    return SheetTable(tuple(out), T_unit or stated.T_unit or "K", P_unit or stated.P_unit or "Pa",
                      units_given, None if u is None else float(u))


# -- small readers ----------------------------------------------------------------
def _only(table: dict, allowed, where: str, file_name: str) -> None:
    unknown = sorted(set(table) - set(allowed))
    if unknown:
        raise InputError(f"{where} has unknown key(s): {', '.join(unknown)}", file=file_name,
                         hint=f"allowed: {', '.join(allowed)}")


def _table(doc: dict, key: str, file_name: str, required: bool) -> dict:
    value = doc.get(key)
    if value is None:
        if required:
            raise InputError(f"the sheet has no [{key}] table", file=file_name, hint="see the README's sheet example")
        return {}
    if not isinstance(value, dict):
        raise InputError(f"[{key}] must be a table", file=file_name)
    return value


def _text(table: dict, key: str, where: str, file_name: str) -> str | None:
    value = table.get(key)
    if value is None:
        return None
    if not isinstance(value, str) or not value.strip():
        raise InputError(f"{where} {key} must be non-empty text", file=file_name)
    return value.strip()


def _coefficients(eq: dict, file_name: str) -> dict[str, float]:
    c = eq.get("coefficients")
    if not isinstance(c, dict) or not c:
        raise InputError("[equation] needs coefficients = { name = number, … }", file=file_name)
    out = {}
    for k, v in c.items():
        if not _is_number(v):
            raise InputError(f"[equation] coefficient {k} = {v!r} is not a finite number", file=file_name)
        out[str(k)] = float(v)
    return out


def _is_number(v) -> bool:
    if not isinstance(v, (int, float)) or isinstance(v, bool):
        return False
    try:  # TOML integers have no size limit; one beyond a float is not a usable number
        return math.isfinite(float(v))
    except OverflowError:
        return False


def _unit(table: dict, key: str, parse, where: str, file_name: str) -> str | None:
    """The canonical unit a table's ``key`` names (None when absent), read by ``parse``."""
    text = _text(table, key, where, file_name)
    if text is None:
        return None
    try:
        return parse(text)
    except ValueError as exc:  # RefusedUnit (a gauge pressure, say) is one too
        raise InputError(f"{where} {key}: {exc}", file=file_name) from None


def _temperature_unit(table: dict, where: str, file_name: str) -> str | None:
    return _unit(table, "T_unit", parse_temperature_unit, where, file_name)


def _pressure_unit(table: dict, where: str, file_name: str) -> str | None:
    return _unit(table, "P_unit", parse_plain_pressure_unit, where, file_name)
