"""Which column holds what: header recognition and column choices.

A header is read as *name* + optional *unit*, in any of the usual styles:
``T/K``, ``T (°C)``, ``t [degC]``, ``temp_F``, ``T, K``, ``T in K``,
``P/kPa``, ``Pressure [Torr]``, ``psat_bar``, and log-pressure columns
``log10(P/Pa)``, ``log(P/kPa)`` (read as log10), ``lg(p/Pa)``, ``ln(p/kPa)``,
``log10 P [mmHg]``.  Names are matched case-insensitively, ignoring spaces,
underscores, hyphens, dots and brackets.

Choices given on the command line win over those in the metadata file, which
win over what the header says; every choice records where it came from.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, fields
from typing import Sequence

from audit.errors import InputError
from audit.ingest import units as _units
from audit.model import ColumnRole


@dataclass(frozen=True)
class ColumnOverrides:
    """Column and unit choices made by the user; each ``None`` means automatic.

    Attributes
    ----------
    temperature, pressure, phase, source, u_temperature, u_pressure : str or None
        Header (as printed) of the column to use for that role.
    temperature_unit : str or None
        Unit of the temperature column, e.g. ``'degC'``.
    pressure_unit : str or None
        Unit of the pressure column; ``'log10(P/kPa)'`` / ``'ln(p/Pa)'`` style
        for log columns.
    u_pressure_unit : str or None
        Unit of u(P); ``'%'`` for a relative uncertainty in percent.
    sheet : str or None
        Worksheet of an XLSX workbook (default: the first).
    substance : str or None
        Substance name (wins over the metadata file).
    """

    temperature: str | None = None
    temperature_unit: str | None = None
    pressure: str | None = None
    pressure_unit: str | None = None
    phase: str | None = None
    source: str | None = None
    u_temperature: str | None = None
    u_pressure: str | None = None
    u_pressure_unit: str | None = None
    sheet: str | None = None
    substance: str | None = None

    def over(self, other: "ColumnOverrides") -> "ColumnOverrides":
        """These choices, falling back to ``other`` where this one is None."""
        return ColumnOverrides(**{f.name: (getattr(self, f.name) if getattr(self, f.name) is not None
                                           else getattr(other, f.name)) for f in fields(self)})


OVERRIDE_FIELDS: tuple[str, ...] = tuple(f.name for f in fields(ColumnOverrides))

_VOCABULARY: dict[str, set[str]] = {
    "T": {"t", "temp", "temperature", "tsat", "ts", "saturationtemperature", "t90", "t68",
          "θ", "ϑ", "temperatures"},
    "P": {"p", "psat", "pressure", "vaporpressure", "vapourpressure", "pvap", "vp", "pv",
          "ps", "saturationpressure", "psub", "sublimationpressure", "p*", "pσ",
          "vappressure", "press", "pressures", "vaporpressures", "vapourpressures"},
    "phase": {"phase", "state", "ph"},
    "source": {"source", "ref", "reference", "references", "author", "authors", "lab",
               "laboratory", "citation", "sources"},
    "u_T": {"ut", "σt", "sigmat", "±t", "uncertaintyt", "tuncertainty", "tunc", "utemp",
            "utemperature", "uncertaintytemperature", "temperatureuncertainty"},
    "u_P": {"up", "σp", "sigmap", "±p", "uncertaintyp", "puncertainty", "punc",
            "upressure", "uncertaintypressure", "pressureuncertainty"},
    # relative u(P); the value says the unit used when the header gives none
    "u_P_rel": {"uprel", "urp", "urelp", "uprelative", "relup", "σrp", "up/p", "σp/p",
                "relativeup"},
}
_RELATIVE_DEFAULT_UNIT = {"up/p": "1", "σp/p": "1"}
_ROLE_WORD = {"T": "temperature", "P": "pressure", "phase": "phase", "source": "source",
              "u_T": "u(T)", "u_P": "u(P)"}
_ROLE_FIELD = {"T": "temperature", "P": "pressure", "phase": "phase", "source": "source",
               "u_T": "u_temperature", "u_P": "u_pressure"}


@dataclass(frozen=True)
class HeaderReading:
    """What a header says.

    Attributes
    ----------
    role : str or None
        ``'T'``, ``'P'``, ``'phase'``, ``'source'``, ``'u_T'``, ``'u_P'`` or
        ``None`` (not recognised).
    unit : str or None
        Canonical unit (``'degC'``, ``'kPa'``; ``'%'`` or ``'1'`` for a
        relative u(P)); ``None`` when the header gives none.
    log : {None, 'log10', 'ln'}
        For a log-pressure column.
    unit_text : str or None
        The unit as written in the header.
    unit_problem : str or None
        Why ``unit_text`` was not accepted.
    """

    role: str | None
    unit: str | None = None
    log: str | None = None
    unit_text: str | None = None
    unit_problem: str | None = None


def _name_key(name: str) -> str:
    return re.sub(r"[\s_\-.()\[\]{}]+", "", name).lower()


def _role_of_name(name: str) -> tuple[str | None, str | None]:
    """(role, default unit) of a header name without its unit."""
    key = _name_key(name)
    if not key:
        return None, None
    for role, words in _VOCABULARY.items():
        if key in words:
            if role == "u_P_rel":
                return "u_P", _RELATIVE_DEFAULT_UNIT.get(key, "%")
            return role, None
    # a name followed by its symbol: "Vapour pressure p", "temperature, T"
    m = re.match(r"^(.*\S)[\s,]+(\S{1,6})$", name.strip())
    if m:
        named, symbol = _role_of_name(m.group(1)), _role_of_name(m.group(2))
        if named[0] is not None and named[0] == symbol[0] and named[0] in ("T", "P"):
            return named
    return None, None


def _unit_for_role(role: str, unit_text: str) -> tuple[str | None, str | None]:
    """(canonical unit, problem) for a unit text in a column of ``role``."""
    if role in ("phase", "source"):
        return None, None
    try:
        if role in ("T", "u_T"):
            return _units.parse_temperature_unit(unit_text), None
        if role == "u_P":
            key = unit_text.strip().lower()
            if key in ("%", "percent", "pct", "%rel", "rel%", "rel.%", "% rel"):
                return "%", None
            if key in ("p", "1", "-", "fraction", "rel", "relative"):
                return "1", None
        return _units.parse_plain_pressure_unit(unit_text), None
    except ValueError as exc:
        return None, str(exc)


_BRACKET = re.compile(r"^(?P<name>.+?)\s*[(\[{]\s*(?P<unit>[^()\[\]{}]*?)\s*[)\]}]$")


def _splits(text: str):
    """Candidate (name, unit, strong) splits of a header, best style first."""
    m = _BRACKET.match(text)
    if m:
        yield m.group("name"), m.group("unit"), True
    for sep in ("/", ","):
        for i, ch in enumerate(text):
            if ch == sep:
                yield text[:i], text[i + 1:], True
    for m in re.finditer(r"\s+in\s+", text, re.IGNORECASE):
        yield text[:m.start()], text[m.end():], True
    for i, ch in enumerate(text):
        if ch == "_":
            yield text[:i], text[i + 1:], False
    for m in re.finditer(r"\s+", text):
        yield text[:m.start()], text[m.end():], False


def read_header(header: str) -> HeaderReading:
    """Read a column header as a role, a unit and (for pressure) a log base.

    Parameters
    ----------
    header : str
        As printed, e.g. ``'T (°C)'``, ``'log10(P/Pa)'``, ``'u(P)/%'``.

    Returns
    -------
    HeaderReading
        ``role`` is ``None`` when the header is not recognised.  A header
        whose name is recognised but whose unit is not (``'P/furlongs'``)
        has ``unit_problem`` set.
    """
    text = re.sub(r"\s+", " ", header.replace("\u00a0", " ")).strip()
    if not text:
        return HeaderReading(None)
    base, rest = _units.split_log_prefix(text)
    if base is not None and rest:
        inner = _read_plain_header(rest)
        if inner.role == "P":
            return HeaderReading("P", inner.unit, base, inner.unit_text, inner.unit_problem)
    return _read_plain_header(text)


def _read_plain_header(text: str) -> HeaderReading:
    role, default_unit = _role_of_name(text)
    if role is not None:
        return HeaderReading(role, default_unit)
    failed: HeaderReading | None = None
    for name, unit_text, strong in _splits(text):
        name, unit_text = name.strip(), unit_text.strip()
        role, _ = _role_of_name(name)
        if role is None or not unit_text:
            continue
        unit, problem = _unit_for_role(role, unit_text)
        if problem is None:
            return HeaderReading(role, unit, None, unit_text)
        if strong and failed is None:
            failed = HeaderReading(role, None, None, unit_text, problem)
    return failed or HeaderReading(None)


# --------------------------------------------------------------------------- choices

@dataclass(frozen=True)
class ColumnChoice:
    """One role's column: position, header, unit and where the choice came from."""

    role: str
    index: int
    column: str
    unit: str | None
    log: str | None
    how: str

    def as_role(self) -> ColumnRole:
        return ColumnRole(self.role, self.column, self.unit, self.log, self.how)


@dataclass(frozen=True)
class ColumnAssignment:
    """The columns chosen for a table, with notes on what was decided."""

    choices: dict
    notes: tuple[str, ...]

    def get(self, role: str) -> ColumnChoice | None:
        return self.choices.get(role)

    def roles(self) -> tuple[ColumnRole, ...]:
        return tuple(c.as_role() for c in sorted(self.choices.values(), key=lambda c: c.index))


#: override fields that name a column; their command-line options end in ``-column``
_COLUMN_FIELDS = {"temperature", "pressure", "phase", "source", "u_temperature", "u_pressure"}


def option_name(field_name: str) -> str:
    """Command-line option for an override field, as ``vpaudit check`` spells it.

    ``temperature`` -> ``--temperature-column``; ``temperature_unit`` -> ``--temperature-unit``.
    """
    suffix = "_column" if field_name in _COLUMN_FIELDS else ""
    return "--" + (field_name + suffix).replace("_", "-")


def _how_to_set(field_name: str, example: str) -> str:
    return (f"{option_name(field_name)} {example} on the command line, or "
            f"{field_name} = \"{example.strip(chr(39))}\" under [columns] in the metadata file")


def _find_column(header: Sequence[str], wanted: str, field_name: str, how: str,
                 file: str) -> int:
    exact = [i for i, h in enumerate(header) if h == wanted]
    if not exact:
        key = wanted.strip().casefold()
        exact = [i for i, h in enumerate(header) if h.strip().casefold() == key]
    listing = ", ".join(repr(h) for h in header)
    if not exact:
        raise InputError(f"the column {wanted!r} chosen for {field_name} ({how}) is not in the table",
                         file=file, hint=f"the columns are: {listing}")
    if len(exact) > 1:
        raise InputError(f"more than one column is named {wanted!r}", file=file,
                         hint="rename one of them in the file")
    return exact[0]


def assign_columns(header: Sequence[str], overrides: ColumnOverrides,
                   origins: dict[str, str], file: str) -> ColumnAssignment:
    """Choose the temperature, pressure and optional columns of a table.

    Parameters
    ----------
    header : sequence of str
        Column headers as printed.
    overrides : ColumnOverrides
        The merged user choices.
    origins : dict
        For each set field of ``overrides``: ``'command line'`` or
        ``'metadata file'``.
    file : str
        File name for error messages.

    Returns
    -------
    ColumnAssignment

    Raises
    ------
    InputError
        No temperature or pressure column, two candidates for one role, a
        unit that is missing or not accepted, or a chosen column not found.
    """
    readings = [read_header(h) for h in header]
    notes: list[str] = []
    chosen: dict[str, tuple[int, str]] = {}  # role -> (index, how)
    taken: set[int] = set()
    for role, field_name in _ROLE_FIELD.items():
        wanted = getattr(overrides, field_name)
        if wanted is not None:
            idx = _find_column(header, wanted, field_name, origins.get(field_name, "command line"), file)
            if idx in taken:
                raise InputError(f"the column {wanted!r} is chosen for two roles", file=file,
                                 column=wanted, hint="choose a different column for one of them")
            chosen[role] = (idx, origins.get(field_name, "command line"))
            taken.add(idx)
    for role, field_name in _ROLE_FIELD.items():
        if role in chosen:
            continue
        candidates = [i for i, r in enumerate(readings) if r.role == role and i not in taken]
        clean = [i for i in candidates if readings[i].unit_problem is None]
        if clean and len(clean) < len(candidates):
            # A column with an understood unit beats one whose unit is not understood
            # ('P/kPa' beside 'p/p0 ratio'); the other is reported, not used.
            for i in candidates:
                if i not in clean:
                    notes.append(f"column {header[i]!r} looks like {_ROLE_WORD[role]} but its unit "
                                 f"{readings[i].unit_text!r} is not understood; not used")
            candidates = clean
        if len(candidates) > 1:
            names = " and ".join(f"{header[i]!r} (column {i + 1})" for i in candidates[:3])
            if role in ("phase", "source"):
                notes.append(f"several columns look like {_ROLE_WORD[role]} labels ({names}); "
                             f"used {header[candidates[0]]!r}")
            else:
                raise InputError(
                    f"ambiguous header: more than one column looks like {_ROLE_WORD[role]}: {names}",
                    file=file,
                    hint="choose one with " + _how_to_set(field_name, repr(header[candidates[0]])))
        if candidates:
            chosen[role] = (candidates[0], "header")
            taken.add(candidates[0])
    listing = ", ".join(repr(h) for h in header)
    for role in ("T", "P"):
        if role not in chosen:
            field_name = _ROLE_FIELD[role]
            example = "'T/K' or 'T (°C)'" if role == "T" else "'P/kPa' or 'log10(P/Pa)'"
            raise InputError(
                f"no {_ROLE_WORD[role]} column recognised among the columns {listing}",
                file=file,
                hint=f"name it like {example}, or choose it with {option_name(field_name)} NAME "
                     f"(or {field_name} = \"NAME\" under [columns] in the metadata file)")

    choices: dict[str, ColumnChoice] = {}
    for role in ("T", "P", "u_T", "u_P", "phase", "source"):
        if role not in chosen:
            continue
        idx, how = chosen[role]
        reading = readings[idx]
        column = header[idx]
        unit, log = None, None
        if role in ("T", "P", "u_T", "u_P"):
            unit, log, how = _resolve_unit(role, column, reading, overrides, origins, how,
                                           choices, notes, file)
        if role == "u_T" and column.strip().startswith("U"):
            notes.append(f"column {column!r} is read as a standard uncertainty; if it is an "
                         "expanded uncertainty (capital U, usually k = 2), divide it by k first")
        choices[role] = ColumnChoice(role, idx, column, unit, log, how)
    if choices.get("u_P") and choices["u_P"].column.strip().startswith("U"):
        notes.append(f"column {choices['u_P'].column!r} is read as a standard uncertainty; if it "
                     "is an expanded uncertainty (capital U, usually k = 2), divide it by k first")
    unused = [h for i, h in enumerate(header) if i not in taken and h.strip()]
    if unused:
        notes.append("columns not used: " + ", ".join(repr(h) for h in unused))
    return ColumnAssignment(choices, tuple(notes))


def _resolve_unit(role, column, reading, overrides, origins, how, choices, notes, file):
    """(unit, log, how) for a numeric column; raises InputError when unusable."""
    unit_field = {"T": "temperature_unit", "P": "pressure_unit", "u_P": "u_pressure_unit"}.get(role)
    given = getattr(overrides, unit_field) if unit_field else None
    header_role_matches = reading.role == role
    if given is not None:
        where = origins.get(unit_field, "command line")
        try:
            if role == "T":
                unit, log = _units.parse_temperature_unit(given), None
            elif role == "P":
                pu = _units.parse_pressure_unit(given)
                unit, log = pu.unit, pu.log
            else:
                unit, problem = _unit_for_role("u_P", given)
                if problem:
                    raise ValueError(problem)
                log = None
        except ValueError as exc:
            raise InputError(f"the {_ROLE_WORD[role]} unit {given!r} ({where}) is not accepted: {exc}",
                             file=file, column=column) from None
        if header_role_matches and reading.unit is not None and (reading.unit, reading.log) != (unit, log):
            shown = _units.PressureUnit(reading.unit, reading.log).text if role == "P" else reading.unit
            notes.append(f"column {column!r}: the header says {shown}, but {given!r} was given "
                         f"({where}) and is used")
        # The role records its strongest origin: command line > metadata file > header.
        rank = {"header": 0, "metadata file": 1, "command line": 2}
        if rank.get(where, 2) > rank.get(how, 0):
            how = where
        return unit, log, how
    if header_role_matches and reading.unit_problem:
        raise InputError(f"the {_ROLE_WORD[role]} unit {reading.unit_text!r} is not accepted: "
                         f"{reading.unit_problem}", file=file, column=column,
                         hint=("correct the header, or give the unit with " + _how_to_set(unit_field, "'kPa'")
                               if unit_field else None))
    if header_role_matches and reading.unit is not None:
        if reading.unit_text is None and reading.unit in ("%", "1"):
            what = "in percent" if reading.unit == "%" else "as a fraction of P"
            notes.append(f"column {column!r} is read as a relative u(P) {what}")
        return reading.unit, reading.log, how
    # no unit in the header
    if role == "T":
        raise InputError("the temperature unit is not given", file=file, column=column,
                         hint="write it in the header (e.g. 'T/K' or 'T (°C)'), or give "
                              + _how_to_set("temperature_unit", "K"))
    if role == "P":
        raise InputError("the pressure unit is not given", file=file, column=column,
                         hint="write it in the header (e.g. 'P/kPa' or 'log10(P/Pa)'), or give "
                              + _how_to_set("pressure_unit", "kPa"))
    if role == "u_T":
        t_unit = choices["T"].unit
        notes.append(f"column {column!r} has no unit; read in the temperature column's unit ({t_unit})")
        return t_unit, None, how
    p = choices["P"]
    if p.log is not None:
        raise InputError("the u(P) unit is not given and the pressure column is a logarithm",
                         file=file, column=column,
                         hint="write the unit in the header (e.g. 'u(P)/kPa' or 'u(P)/%'), or give "
                              + _how_to_set("u_pressure_unit", "%"))
    notes.append(f"column {column!r} has no unit; read in the pressure column's unit ({p.unit})")
    return p.unit, None, how
