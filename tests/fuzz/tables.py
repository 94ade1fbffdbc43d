"""Whole generated tables for fuzzing the audit, and one end-to-end run of each.

Everything here is SYNTHETIC: invented curves, sources, labels and faults.

A table is drawn through a :class:`Chooser`, so the same generator runs under
hypothesis (:func:`tables`, a strategy, for ``make test``) and under a plain
seeded :class:`random.Random` (:class:`RandomChooser`, for the long campaign
in ``benchmarks/fuzz_campaign.py``); both are deterministic per seed.  The
structural choices (family, layout, encoding, header style, units, columns,
sources, which faults) go through the chooser; the per-row numbers come from
a ``random.Random`` seeded by one drawn integer, which keeps a 300-row table
cheap to draw under hypothesis.

Families
--------
``realistic``
    Solid and/or liquid branches from an Antoine-like curve
    ln P = A − B/(T + C) (the solid branch a Clausius–Clapeyron line) meeting
    at an invented triple point, 1–10 sources with pressure offsets,
    thermometer offsets and their own scatter, uncertainty columns, replicate
    groups, sometimes a metadata file with constants consistent (or not) with
    the curve, sometimes a reference equation; hostile features on top.
``water``
    The same, from the IAPWS auxiliary saturation and R14-08 sublimation
    equations of :mod:`audit.thermo.reference`, with ``substance = "water"``
    so that the reference-agreement and triple-point references are reached.
``garbage``
    Values log-uniform over 1–2000 K and 1e-10–1e9 Pa, random headers,
    random cells.
``degenerate``
    0–4 rows, one temperature, two temperatures, one-row sources, all
    identical rows.

:func:`run_table` writes a table to a file, reads it with
:func:`audit.ingest.read_table`, audits it with
:func:`audit.pipeline.run_audit`, writes findings.json and annotated.csv,
and checks the contract: an :class:`~audit.errors.InputError` or findings,
one point per input row in order, valid statuses, no internal error, every
number finite or null, the findings schema, the input file's bytes unchanged.
"""

from __future__ import annotations

import contextlib
import csv
import hashlib
import io
import json
import math
import os
import random
import re
import time
import traceback
import warnings
from dataclasses import dataclass, replace
from functools import lru_cache
from pathlib import Path
from typing import Callable, Sequence

R_GAS = 8.314462618  # molar gas constant [J/(mol K)], CODATA 2018 (exact)

LAYOUTS = ("csv", "tsv", "semicolon", "json", "xlsx")
ENCODINGS = ("utf-8", "utf-8-sig", "cp1252", "utf-16")
FAMILIES = ("realistic", "water", "garbage", "degenerate")
_FAMILY_WEIGHTS = (55, 15, 15, 15)
_SUFFIX = {"csv": ".csv", "tsv": ".tsv", "semicolon": ".csv", "json": ".json", "xlsx": ".xlsx"}

# --------------------------------------------------------------------------- choosers


class Chooser:
    """The choices a table generator makes; see the two implementations below."""

    def integer(self, lo: int, hi: int) -> int:  # inclusive
        raise NotImplementedError

    def real(self, lo: float, hi: float) -> float:
        raise NotImplementedError

    def pick(self, seq: Sequence):
        return seq[self.integer(0, len(seq) - 1)]

    def chance(self, p: float) -> bool:
        """True with probability ``p`` (a shrinking hypothesis draw goes to False)."""
        return self.integer(0, 999) >= round(1000 * (1.0 - p))

    def weighted(self, items: Sequence, weights: Sequence[int]):
        k = self.integer(0, sum(weights) - 1)
        for item, w in zip(items, weights):
            if k < w:
                return item
            k -= w
        return items[-1]

    def rng(self) -> random.Random:
        """A generator for the per-row numbers, seeded by one draw."""
        return random.Random(self.integer(0, 2**32 - 1))


class RandomChooser(Chooser):
    """Choices from a seeded :class:`random.Random` (the campaign)."""

    def __init__(self, seed: int):
        self._r = random.Random(seed)

    def integer(self, lo, hi):
        return self._r.randint(lo, hi)

    def real(self, lo, hi):
        return self._r.uniform(lo, hi)


class HypothesisChooser(Chooser):
    """Choices drawn by hypothesis (``draw`` of a ``st.composite``)."""

    def __init__(self, draw):
        self._draw = draw

    def integer(self, lo, hi):
        from hypothesis import strategies as st

        return self._draw(st.integers(lo, hi))

    def real(self, lo, hi):
        from hypothesis import strategies as st

        return self._draw(st.floats(lo, hi, allow_nan=False, allow_infinity=False))


# --------------------------------------------------------------------------- the table


@dataclass(frozen=True)
class Table:
    """A generated table as it will be printed, with the way to write it.

    Attributes
    ----------
    header : tuple of str
        Column headers as printed.
    rows : tuple of tuple of str
        Cell texts as printed with a decimal point (the semicolon layout with
        decimal commas converts them when writing).
    layout : str
        One of :data:`LAYOUTS`.
    encoding : str
        One of :data:`ENCODINGS` (text layouts and JSON; ignored for XLSX).
    metadata_toml : str or None
        A metadata file written beside the table (same stem, ``.toml``).
    substance : str or None
        Given as ``--substance`` would give it (library constants).
    family, features
        What was generated, for the reports of failures.
    """

    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    layout: str = "csv"
    encoding: str = "utf-8"
    newline: str = "\n"
    decimal_comma: bool = False
    quote_all: bool = False
    comment_lines: tuple[str, ...] = ()
    json_numbers: bool = True
    json_wrapped: bool = False
    xlsx_format: str | None = None
    metadata_toml: str | None = None
    substance: str | None = None
    family: str = ""
    features: tuple[str, ...] = ()

    @property
    def file_name(self) -> str:
        return "table" + _SUFFIX[self.layout]

    def expected_rows(self) -> int:
        """Data rows the ingest must keep: all, except blank rows after the last (text, XLSX)."""
        n = len(self.rows)
        if self.layout == "json":
            return n
        while n and all(not c.strip() for c in self.rows[n - 1]):
            n -= 1
        return n

    def encode(self) -> bytes:
        """The file's bytes."""
        if self.layout == "xlsx":
            return _xlsx_bytes(self)
        if self.layout == "json":
            text = _json_text(self)
        else:
            text = _delimited_text(self)
        if self.encoding == "cp1252":
            return text.encode("cp1252", errors="replace")
        return text.encode(self.encoding)

    def write(self, folder: Path) -> Path:
        """Write the table (and its metadata file) into ``folder``; return the table's path."""
        folder.mkdir(parents=True, exist_ok=True)
        path = folder / self.file_name
        path.write_bytes(self.encode())
        if self.metadata_toml is not None:
            path.with_suffix(".toml").write_text(self.metadata_toml, encoding="utf-8")
        return path

    def as_csv_text(self) -> str:
        """The table as plain UTF-8 CSV text (for reports; the layout is recorded beside)."""
        out = io.StringIO()
        w = csv.writer(out, lineterminator="\n")
        w.writerow(self.header)
        w.writerows(self.rows)
        return out.getvalue()

    def describe(self) -> str:
        return (f"{self.family} {self.layout}/{self.encoding}, {len(self.rows)} rows, "
                f"columns {list(self.header)}, features {list(self.features)}"
                + (", metadata file" if self.metadata_toml else "")
                + (f", substance {self.substance!r}" if self.substance else ""))


_PLAIN_NUMBER = re.compile(r"^\s*[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*$")
_JSON_NUMBER = re.compile(r"^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?$")
_JSON_CONSTANTS = {"NaN", "Infinity", "-Infinity"}


def _delimited_text(t: Table) -> str:
    delimiter = {"csv": ",", "tsv": "\t", "semicolon": ";"}[t.layout]
    out = io.StringIO()
    for line in t.comment_lines:
        out.write(line + t.newline)
    w = csv.writer(out, delimiter=delimiter, lineterminator=t.newline,
                   quoting=csv.QUOTE_ALL if t.quote_all else csv.QUOTE_MINIMAL)
    w.writerow(t.header)
    for row in t.rows:
        if t.decimal_comma:
            row = tuple(c.replace(".", ",") if _PLAIN_NUMBER.match(c) else c for c in row)
        w.writerow(row)
    return out.getvalue()


def _json_text(t: Table) -> str:
    # written by hand so that the cells keep their printed digits and duplicate keys survive
    records = []
    for row in t.rows:
        items = []
        for key, cell in zip(t.header, row):
            if t.json_numbers and (_JSON_NUMBER.match(cell) or cell in _JSON_CONSTANTS):
                value = cell
            elif t.json_numbers and cell == "":
                value = "null"
            else:
                value = json.dumps(cell, ensure_ascii=False)
            items.append(f"{json.dumps(key, ensure_ascii=False)}: {value}")
        records.append("{" + ", ".join(items) + "}")
    body = "[\n  " + ",\n  ".join(records) + "\n]"
    if t.json_wrapped:
        body = '{"generator": "SYNTHETIC fuzz table", "data": ' + body + "}"
    return body + "\n"


def _xlsx_bytes(t: Table) -> bytes:
    import openpyxl
    from openpyxl.cell.cell import ILLEGAL_CHARACTERS_RE

    book = openpyxl.Workbook()
    ws = book.active
    ws.title = "data"
    for line in t.comment_lines:
        ws.append([line])
    ws.append([ILLEGAL_CHARACTERS_RE.sub("", h) for h in t.header])
    for row in t.rows:
        values = []
        for cell in row:
            if not cell.strip():
                values.append(None if cell == "" else cell)
                continue
            if _PLAIN_NUMBER.match(cell):
                v = float(cell)
                if math.isfinite(v):
                    values.append(v)
                    continue
            values.append(ILLEGAL_CHARACTERS_RE.sub("", cell))
        ws.append(values)
    if t.xlsx_format:
        for r in ws.iter_rows(min_row=2 + len(t.comment_lines)):
            for c in r:
                if isinstance(c.value, float):
                    c.number_format = t.xlsx_format
    out = io.BytesIO()
    book.save(out)
    return out.getvalue()


# --------------------------------------------------------------------------- vocabulary

#: canonical unit -> spellings used in headers (every unit the ingest knows; a test checks)
TEMPERATURE_SPELLINGS = {
    "K": ("K", "kelvin"),
    "degC": ("°C", "degC", "C", "deg C", "℃", "celsius"),
    "degF": ("°F", "degF", "F", "fahrenheit"),
    "degR": ("°R", "degR", "R", "rankine"),
}
PRESSURE_SPELLINGS = {
    "Pa": ("Pa", "pascal"), "mPa": ("mPa",), "hPa": ("hPa",), "kPa": ("kPa", "KPa", "kilopascal"),
    "MPa": ("MPa",), "bar": ("bar", "bara"), "mbar": ("mbar", "millibar"), "atm": ("atm",),
    "Torr": ("Torr", "torr"), "mTorr": ("mTorr",), "mmHg": ("mmHg", "mm Hg"),
    "psi": ("psi", "psia"), "inHg": ("inHg",), "kgf/cm2": ("kgf/cm2", "kg/cm²"),
}
T_NAMES = ("T", "t", "Temp", "Temperature", "T90", "θ", "Tsat")
P_NAMES = ("P", "p", "Pressure", "psat", "Vapor pressure", "pvap", "Psub")
UNIT_STYLES = ("{n}/{u}", "{n} ({u})", "{n} [{u}]", "{n}_{u}", "{n}, {u}", "{n} in {u}")
LOG_STYLES = ("log10({n}/{u})", "log({n}/{u})", "lg({n}/{u})", "ln({n}/{u})", "log10 {n} [{u}]")
BAD_HEADERS = ("", "x", "value", "T", "P", "P/furlongs", "T/parsecs", "p/mpa", "P/psig", "P/mm",
               "T/K", "P/kPa", "log10(P/Pa)", "#T/K", "Temperatur/K", "Druck/kPa", "T (K) ", " p/kPa")
SOLID_LABELS = ("solid", "s", "cr", "ice", "cr-g", "Solid", "cr II", "s/v")
LIQUID_LABELS = ("liquid", "l", "liq", "l/v", "Liquid", "l-g", "supercooled")
CRYSTAL_FORM_PAIRS = ((), (), (), ("cr II", "cr I"), ("s2", "s1"), ("cr β", "cr α"), ("crIII", "cr-II"))
ODD_LABELS = ("", "", "gas", "?", "sl", "l+s", "vapor", "—", "crystal?", "1")
SOURCE_NAMES = ("Arlen 1958", "Voss & Keller 1972", "Müller 1932", "Ødegård 2004", "李 2001",
                "Smith (1960)", "lab A", "lab B", "<b>x</b>", "a,b;c", 'src "q"', "1", "nan",
                "None", "Rossi 1899", "Tanaka 1988", "Dubois 2011", "x" * 120, " padded ", "R-7")
TEXT_CELLS = ("abc", "<0.1", ">1e5", "~12.3", "ca. 5", "1.2±0.1", "1.2 +/- 0.1", "12.3a", "12.3*",
              "(12.5)", "[3.4]", "=A1*2", "1,234.5", "1.2D+03", "1.2×10^3", "12-14", "5%", "n/a",
              "—", "-", "?", "null", "TRUE", "1.2.3", "0x1F", "١٢٣", "１２", "e5", ".", "+", "1e",
              "12,5", " 12.5 ", "12 345", "1 013.25", "−12.5", "<script>alert(1)</script>",
              "file:///etc/passwd", "\u00a012.5", "12.5\u2009", "\t", '"', "'", "a\nb", "1e-5e3")
NONFINITE_CELLS = ("nan", "NaN", "-nan", "inf", "-inf", "Infinity", "∞", "1e400", "-1e400")
HUGE_CELLS = ("1e308", "-1e308", "1.7976931348623157e308", "1e300", "9.99e307", "1e-320",
              "5e-324", "1e-300", "1e30", "123456789012345678901234567890", "1e19", "-1e19")
ZERO_CELLS = ("0", "0.0", "-0", "0e0", "+0.000")
HOSTILE = ("text", "nonfinite", "huge", "zero", "negative", "empty", "blank-rows", "identical",
           "replicates", "monotonic-break", "gross", "decimal-shift", "unit-block", "celsius-in-K",
           "digit-swap", "extra-cells", "short-rows", "unicode-minus", "grouped", "wrong-labels")


# --------------------------------------------------------------------------- printing


def _fmt_sig(v: float, s: int) -> str:
    return f"{v:.{s}g}"


def _fmt_fixed(v: float, d: int) -> str:
    return f"{v:.{d}f}"


@dataclass
class _Column:
    role: str            # T P phase source uT uP extra
    header: str
    unit: str | None = None
    log: str | None = None
    rel: str | None = None   # uP: '%' or '1' relative, None absolute in `unit`
    t_scale: float = 1.0     # uT with no unit: in the T column's scale [unit/K]


def _pick_header(ch: Chooser, role: str) -> _Column:

    if role == "T":
        unit = ch.pick(tuple(TEMPERATURE_SPELLINGS))
        text = ch.pick(UNIT_STYLES).format(n=ch.pick(T_NAMES), u=ch.pick(TEMPERATURE_SPELLINGS[unit]))
        return _Column("T", text, unit)
    if role == "P":
        unit = ch.pick(tuple(PRESSURE_SPELLINGS))
        spelled = ch.pick(PRESSURE_SPELLINGS[unit])
        if ch.chance(0.25):
            style = ch.pick(LOG_STYLES)
            log = "ln" if style.startswith("ln") else "log10"
            return _Column("P", style.format(n=ch.pick(("P", "p")), u=spelled), unit, log)
        return _Column("P", ch.pick(UNIT_STYLES).format(n=ch.pick(P_NAMES), u=spelled), unit)
    if role == "phase":
        return _Column("phase", ch.pick(("phase", "Phase", "state")))
    if role == "source":
        return _Column("source", ch.pick(("source", "Source", "ref", "Reference", "author")))
    if role == "uT":
        kind = ch.weighted(("K", "none", "mK?"), (60, 35, 5))
        if kind == "none":
            return _Column("uT", ch.pick(("u(T)", "uT", "σT")), None)
        if kind == "mK?":
            return _Column("uT", "u(T)/mK", None)  # not a temperature unit: an InputError or a note
        return _Column("uT", ch.pick(("u(T)/K", "u(T) (K)", "U(T)/K", "sigma_T [K]")), "K")
    if role == "uP":
        kind = ch.pick(("%", "%", "abs", "frac", "none"))
        if kind == "%":
            return _Column("uP", ch.pick(("u(P)/%", "u(p) (%)", "U(P)/%", "ur(P)", "u_r(p)")), rel="%")
        if kind == "frac":
            return _Column("uP", "u(P)/P", rel="1")
        if kind == "none":
            return _Column("uP", ch.pick(("u(P)", "uP", "σp")))  # the pressure column's unit
        unit = ch.pick(tuple(PRESSURE_SPELLINGS))
        return _Column("uP", f"u(P)/{PRESSURE_SPELLINGS[unit][0]}", unit)
    return _Column("extra", ch.pick(("No.", "comment", "Remark", "", "method", "x")))


@dataclass
class _Point:
    T: float          # [K]
    P: float          # [Pa]
    phase: str        # solid / liquid
    source: str | None = None
    uT: float | None = None    # [K]
    uP_rel: float | None = None


def _print_rows(ch: Chooser, rng: random.Random, cols: list[_Column], pts: list[_Point],
                labels: bool) -> list[list[str]]:
    from audit import units as U

    T_col = next((c for c in cols if c.role == "T"), None)
    t_dec = ch.integer(0, 4)
    p_sig = ch.integer(3, 7)
    log_dec = ch.integer(3, 6)
    u_sig = ch.integer(1, 3)
    sol_label, liq_label = ch.pick(SOLID_LABELS), ch.pick(LIQUID_LABELS)
    # sometimes two crystal forms: below the solids' median temperature one, above it the other,
    # or (hostile) drawn at random row by row
    forms = ch.pick(CRYSTAL_FORM_PAIRS)
    solid_T = sorted(pt.T for pt in pts if pt.phase == "solid")
    split_T = solid_T[len(solid_T) // 2] if solid_T else 0.0
    interleaved = ch.integer(0, 1) == 1
    rows = []
    for pt in pts:
        row = []
        for c in cols:
            if c.role == "T":
                scale, offset = U.kelvin_per_unit(c.unit)
                row.append(_fmt_fixed((pt.T - offset) / scale, t_dec))
            elif c.role == "P":
                v = pt.P / U.pascal_per_unit(c.unit)
                if c.log is None:
                    row.append(_fmt_sig(v, p_sig))
                elif v > 0:
                    row.append(_fmt_fixed(math.log10(v) if c.log == "log10" else math.log(v), log_dec))
                else:
                    row.append("nan")
            elif c.role == "phase":
                if not labels or rng.random() < 0.05:
                    row.append("")
                else:
                    if pt.phase == "solid" and forms:
                        low = rng.random() < 0.5 if interleaved else pt.T < split_T
                        row.append(forms[0] if low else forms[1])
                    else:
                        row.append(sol_label if pt.phase == "solid" else liq_label)
            elif c.role == "source":
                row.append(pt.source or "")
            elif c.role == "uT":
                if pt.uT is None:
                    row.append("")
                else:
                    scale = 1.0 if c.unit == "K" or T_col is None else 1.0 / U.kelvin_per_unit(T_col.unit)[0]
                    row.append(_fmt_sig(pt.uT * scale, u_sig))
            elif c.role == "uP":
                if pt.uP_rel is None:
                    row.append("")
                elif c.rel == "%":
                    row.append(_fmt_sig(100 * pt.uP_rel, u_sig))
                elif c.rel == "1":
                    row.append(_fmt_sig(pt.uP_rel, u_sig))
                else:
                    unit = c.unit
                    if unit is None:
                        P_col = next((x for x in cols if x.role == "P"), None)
                        unit = P_col.unit if P_col is not None else "Pa"
                    row.append(_fmt_sig(pt.uP_rel * pt.P / U.pascal_per_unit(unit), u_sig))
            else:
                row.append(rng.choice(("", "a", "1", "fit", "x")))
        rows.append(row)
    return rows


# --------------------------------------------------------------------------- curves


@dataclass(frozen=True)
class Curve:
    """An invented substance: solid (Clausius–Clapeyron) and liquid (Antoine-like) branches.

    Liquid: ln P = A − B/(T + C), through (Tt, Pt) with slope ΔH_vap/(R Tt²) there.
    Solid: ln P = ln Pt − ΔH_sub/R · (1/T − 1/Tt), ΔH_sub = ΔH_vap + ΔH_fus.
    """

    Tt: float       # [K]
    Pt: float       # [Pa]
    dH_vap: float   # at Tt [J/mol]
    dH_fus: float   # [J/mol]
    C: float        # Antoine offset [K]

    @property
    def B(self) -> float:
        return self.dH_vap * (self.Tt + self.C) ** 2 / (R_GAS * self.Tt ** 2)

    @property
    def A(self) -> float:
        return math.log(self.Pt) + self.B / (self.Tt + self.C)

    def p(self, T: float, phase: str) -> float:
        if phase == "solid":
            return self.Pt * math.exp(-(self.dH_vap + self.dH_fus) / R_GAS * (1.0 / T - 1.0 / self.Tt))
        return math.exp(self.A - self.B / (T + self.C))

    def T_at(self, P: float) -> float:
        """Liquid-branch temperature at pressure ``P`` [K]."""
        return self.B / (self.A - math.log(P)) - self.C


class _WaterCurve:
    Tt, Pt, dH_fus = 273.16, 611.657, 6006.0  # IAPWS triple point; ΔH_fus of ice Ih (handbook)

    def p(self, T: float, phase: str) -> float:
        from audit.thermo.reference import ICE_SUBLIMATION, WATER_SATURATION
        import numpy as np

        eq = ICE_SUBLIMATION if phase == "solid" else WATER_SATURATION
        return float(np.exp(eq.ln_p(np.array([T]))[0]))


def _draw_curve(ch: Chooser) -> Curve:
    return Curve(Tt=ch.real(120.0, 450.0), Pt=10 ** ch.real(-3.0, 5.3), dH_vap=ch.real(20e3, 80e3),
                 dH_fus=ch.real(3e3, 40e3), C=ch.real(-60.0, 0.0))


def _branch_ranges(ch: Chooser, curve, water: bool) -> dict[str, tuple[float, float]]:
    which = ch.pick(("liquid", "solid", "both", "both", "both"))
    out = {}
    if which in ("solid", "both"):
        lo = curve.Tt - ch.real(5.0, 90.0 if not water else 70.0)
        out["solid"] = (max(lo, 30.0 if not water else 200.0), curve.Tt - ch.real(0.0, 3.0))
    if which in ("liquid", "both"):
        hi = curve.Tt + ch.real(5.0, 300.0)
        if water:
            hi = min(hi, 640.0)
        else:
            hi = min(hi, curve.T_at(5e6)) if curve.A > math.log(5e6) else hi
        out["liquid"] = (curve.Tt + ch.real(0.0, 3.0), max(hi, curve.Tt + 4.0))
    return out


# --------------------------------------------------------------------------- families


def _realistic_points(ch: Chooser, rng: random.Random, curve, ranges, n: int,
                      features: list[str]) -> tuple[list[_Point], bool]:
    n_sources = ch.pick((0, 1, 1, 2, 3, 4, 5, 7, 10))
    names = list(SOURCE_NAMES[:14]) if ch.chance(0.8) else list(SOURCE_NAMES)
    rng.shuffle(names)
    sources = []
    for k in range(max(n_sources, 1)):
        biased = ch.chance(0.15)
        sources.append(dict(
            name=names[k % len(names)] if n_sources else None,
            bias=(rng.choice((-1, 1)) * rng.uniform(0.02, 0.10)) if biased else rng.gauss(0.0, 0.002),
            dT=rng.choice((0.0, 0.0, 0.0, rng.uniform(-1.0, 1.0))),
            noise=10 ** rng.uniform(-3.3, -1.7),
            weight=rng.choice((1, 1, 2, 5, 0)),   # 0: a one-row source
        ))
    if n_sources:
        features.append(f"{n_sources}-sources")
    with_u = ch.chance(0.4)
    branches = list(ranges)
    pts: list[_Point] = []
    total_w = sum(s["weight"] for s in sources) or 1
    for s in sources:
        s["left"] = 1 if s["weight"] == 0 else max(1, round(n * s["weight"] / total_w))
    k = 0
    while len(pts) < n:
        s = sources[k % len(sources)]
        k += 1
        if s["left"] <= 0 and any(x["left"] > 0 for x in sources):
            continue
        s["left"] -= 1
        phase = rng.choice(branches)
        lo, hi = ranges[phase]
        T = rng.uniform(lo, hi)
        P = curve.p(T + s["dT"], phase) * (1 + s["bias"]) * math.exp(rng.gauss(0.0, s["noise"]))
        T += rng.gauss(0.0, 0.01)
        pts.append(_Point(T, P, phase, s["name"],
                          uT=rng.choice((0.01, 0.02, 0.05, 0.1)) if with_u else None,
                          uP_rel=s["noise"] * rng.uniform(0.7, 1.5) if with_u else None))
    order = ch.pick(("T", "T", "source", "shuffled", "descending", "branch"))
    if order == "T":
        pts.sort(key=lambda p: p.T)
    elif order == "descending":
        pts.sort(key=lambda p: -p.T)
    elif order == "source":
        pts.sort(key=lambda p: (p.source or "", p.T))
    elif order == "branch":
        pts.sort(key=lambda p: (p.phase, p.T))
    else:
        rng.shuffle(pts)
    return pts, with_u


def _metadata_toml(ch: Chooser, rng: random.Random, curve, water: bool, features: list[str]) -> str | None:
    if water:
        kind = ch.pick(("substance", "substance", "cas", "none-table"))
        if kind == "none-table":
            return None
        lines = ['substance = "water"'] if kind == "substance" else ['cas = "7732-18-5"']
        if ch.chance(0.5):
            lines += ["[constants]",
                      'molar_mass = { value = 18.015268, unit = "g/mol", source = "IAPWS-95" }',
                      'T_critical = { value = 647.096, unit = "K", source = "IAPWS-95" }',
                      'P_critical = { value = 22.064, unit = "MPa", source = "IAPWS-95" }',
                      'acentric_factor = { value = 0.3443, unit = "1", source = "handbook" }']
        features.append("water-metadata")
        return "\n".join(lines) + "\n"
    if not ch.chance(0.5):
        return None
    features.append("metadata")
    if ch.chance(0.03):
        features.append("bad-metadata")
        return ch.pick(('bogus = 1\n', '[constants]\nT_triple = { value = 1, unit = "furlong", source = "x" }\n',
                        'cas = "12-34-5"\n', '[constants\n'))
    wrong = ch.chance(0.2)  # constants that disagree with the data
    f = (lambda: rng.uniform(0.7, 1.3)) if wrong else (lambda: 1.0)
    if wrong:
        features.append("wrong-constants")
    c = {
        "T_triple": (curve.Tt * f(), "K"), "P_triple": (curve.Pt * f() / 1000, "kPa"),
        "dH_fusion": (curve.dH_fus * f() / 1000, "kJ/mol"),
        "molar_mass": (rng.uniform(30, 300), "g/mol"),
        "T_critical": (curve.Tt * rng.uniform(1.8, 2.4), "K"),
        "P_critical": (rng.uniform(1.5, 8.0), "MPa"),
        "acentric_factor": (rng.uniform(0.0, 0.6), "1"),
        "dH_vap_calorimetric": (curve.dH_vap * f() / 1000, "kJ/mol"),
        "T_dH_vap_calorimetric": (curve.Tt + 10.0, "K"),
        "V_solid": (rng.uniform(2e-5, 2e-4), "m^3/mol"),
        "Z_rackett": (rng.uniform(0.2, 0.3), "1"),
    }
    if curve.A > math.log(101325.0):
        c["T_boiling"] = (curve.T_at(101325.0) * f(), "K")
    keys = [k for k in c if ch.chance(0.6)]
    lines = [f'substance = "{ch.pick(("synthetic-a", "synthetic-b", "naphthalene-like"))}"', "[constants]"]
    for k in keys:
        v, u = c[k]
        lines.append(f'{k} = {{ value = {v:.6g}, unit = "{u}", source = "SYNTHETIC" }}')
    if ch.chance(0.25):
        features.append("reference-equation")
        lo = curve.Tt + 1.0
        A10, B10 = curve.A / math.log(10), curve.B / math.log(10)
        lines += ["[reference_equation]", 'form = "antoine"',
                  f"parameters = {{ A = {A10 * (1.002 if wrong else 1.0):.8g}, B = {B10:.8g}, C = {curve.C:.8g} }}",
                  'base = "log10"', 'P_unit = "Pa"', 'T_unit = "K"',
                  f"valid_from_K = {lo:.6g}", f"valid_to_K = {lo + 150.0:.6g}", 'branch = "liquid"',
                  'source = "SYNTHETIC"']
    return "\n".join(lines) + "\n"


def _columns(ch: Chooser, with_u: bool, n_sources_present: bool, labels: bool) -> list[_Column]:
    cols = [_pick_header(ch, "T"), _pick_header(ch, "P")]
    if labels or ch.chance(0.2):
        cols.append(_pick_header(ch, "phase"))
    if n_sources_present:
        cols.append(_pick_header(ch, "source"))
    if with_u:
        if ch.chance(0.7):
            cols.append(_pick_header(ch, "uT"))
        if ch.chance(0.9):
            cols.append(_pick_header(ch, "uP"))
    if ch.chance(0.15):
        cols.append(_pick_header(ch, "extra"))
    if ch.chance(0.5):
        order = [ch.integer(0, 1000) for _ in cols]
        cols = [c for _, c in sorted(zip(order, cols), key=lambda x: x[0])]
    return cols


def _hostile(ch: Chooser, rng: random.Random, cols: list[_Column], rows: list[list[str]],
             pts: list[_Point], features: list[str], p: float) -> list[list[str]]:
    """Put faults into printed rows (and the points they came from)."""
    if not rows:
        return rows
    ti = next((i for i, c in enumerate(cols) if c.role == "T"), 0)
    pi = next((i for i, c in enumerate(cols) if c.role == "P"), min(1, len(cols) - 1))
    numeric = [i for i, c in enumerate(cols) if c.role in ("T", "P", "uT", "uP")] or [0]
    n = len(rows)

    def get(r: int, i: int) -> str:
        return rows[r][i] if i < len(rows[r]) else ""

    def put(r: int, i: int, value: str) -> None:
        if i < len(rows[r]):  # a short row keeps its shortness
            rows[r][i] = value

    def some(k_max=5):
        return [rng.randrange(n) for _ in range(rng.randint(1, min(k_max, n)))]

    for kind in HOSTILE:
        if not ch.chance(p):
            continue
        features.append(kind)
        if kind in ("text", "nonfinite", "huge", "zero"):
            pool = {"text": TEXT_CELLS, "nonfinite": NONFINITE_CELLS, "huge": HUGE_CELLS,
                    "zero": ZERO_CELLS}[kind]
            for r in some():
                put(r, rng.choice(numeric + [ti, pi]), rng.choice(pool))
        elif kind == "negative":
            for r in some():
                i = rng.choice((ti, pi))
                put(r, i, "-" + get(r, i).lstrip("-"))
        elif kind == "empty":
            for r in some():
                put(r, rng.randrange(len(cols)), "")
        elif kind == "blank-rows":
            for _ in range(rng.randint(1, 3)):
                rows.insert(rng.randrange(len(rows) + 1), [""] * len(cols) if rng.random() < 0.7 else [])
        elif kind == "identical":
            for r in some(3):
                for _ in range(rng.randint(1, 3)):
                    rows.insert(r, list(rows[r]))
        elif kind == "replicates":
            for r in some(4):
                for _ in range(rng.randint(1, 3)):
                    twin = list(rows[r])
                    try:
                        v = float(twin[pi])
                        twin[pi] = _fmt_sig(v * (1 + rng.gauss(0.0, 0.003)), 6)
                    except (ValueError, IndexError):
                        pass
                    rows.insert(r + 1, twin)
        elif kind == "monotonic-break" and len(rows) > 3:
            a = rng.randrange(len(rows) - 2)
            b = min(len(rows), a + rng.randint(2, 10))
            rows[a:b] = rows[a:b][::-1]
            if rng.random() < 0.5:
                r = rng.randrange(len(rows))
                try:  # a pressure that goes the wrong way with temperature
                    put(r, pi, _fmt_sig(float(get(r, pi)) * rng.choice((0.5, 0.8, 1.25, 2.0)), 6))
                except (ValueError, IndexError):
                    pass
        elif kind in ("gross", "decimal-shift", "unit-block", "celsius-in-K"):
            rs = some(3) if kind != "unit-block" else list(range(rng.randrange(n), n))[:rng.randint(2, 12)]
            factor = {"gross": rng.choice((1.5, 3.0, 0.3, 10.0)), "decimal-shift": rng.choice((10.0, 0.1, 100.0)),
                      "unit-block": rng.choice((1000.0, 0.001, 133.322, 1 / 133.322, 100.0))}.get(kind)
            for r in rs:
                if r >= len(rows):
                    continue
                i = ti if kind == "celsius-in-K" else pi
                try:
                    v = float(get(r, i))
                except (ValueError, IndexError):
                    continue
                put(r, i, _fmt_fixed(v - 273.15, 2) if kind == "celsius-in-K" else _fmt_sig(v * factor, 6))
        elif kind == "digit-swap":
            for r in some(3):
                i = rng.choice((ti, pi))
                s = get(r, i)
                digits = [k for k in range(len(s) - 1) if s[k].isdigit() and s[k + 1].isdigit() and s[k] != s[k + 1]]
                if digits:
                    k = rng.choice(digits)
                    put(r, i, s[:k] + s[k + 1] + s[k] + s[k + 2:])
        elif kind == "extra-cells":
            for r in some(3):
                rows[r] = rows[r] + [rng.choice(("1.5", "x", "", "2,5"))] * rng.randint(1, 2)
        elif kind == "short-rows":
            for r in some(3):
                rows[r] = rows[r][:rng.randrange(len(rows[r]) + 1)]
        elif kind == "unicode-minus":
            for r in some():
                put(r, ti, "−" + get(r, ti).lstrip("-"))
        elif kind == "grouped":
            for r in some():
                try:
                    v = float(get(r, pi))
                except (ValueError, IndexError):
                    continue
                if 1000 <= abs(v) < 1e9:
                    put(r, pi, f"{v:,.1f}".replace(",", " "))
        elif kind == "wrong-labels":
            phi = next((i for i, c in enumerate(cols) if c.role == "phase"), None)
            if phi is not None:
                for r in some(6):
                    if phi < len(rows[r]):
                        put(r, phi, rng.choice(SOLID_LABELS + LIQUID_LABELS + ODD_LABELS))
    return rows


def _structure(ch: Chooser, rng: random.Random, pts: list[_Point], curve, features: list[str]) -> None:
    """All rows at one temperature, or two temperatures only (on the curve)."""
    shape = ch.weighted(("free", "one-T", "two-T"), (90, 5, 5))
    if shape == "free" or not pts:
        return
    features.append(shape)
    temps = [pts[0].T] if shape == "one-T" else [pts[0].T, pts[-1].T + rng.uniform(1.0, 20.0)]
    for k, pt in enumerate(pts):
        pt.T = temps[k % len(temps)]
        pt.P = curve.p(pt.T, pt.phase) * math.exp(rng.gauss(0.0, 0.003))


def _n_rows(ch: Chooser) -> int:
    return ch.weighted((ch.integer(0, 4), ch.integer(5, 40), ch.integer(41, 120), ch.integer(121, 300)),
                       (8, 45, 30, 17))


def _layout(ch: Chooser, table_kwargs: dict, features: list[str]) -> None:
    layout = ch.pick(LAYOUTS)
    table_kwargs["layout"] = layout
    if layout in ("csv", "tsv", "semicolon"):
        table_kwargs["encoding"] = ch.pick(ENCODINGS)
        table_kwargs["newline"] = ch.pick(("\n", "\r\n"))
        table_kwargs["quote_all"] = ch.chance(0.1)
        if ch.chance(0.15):
            table_kwargs["comment_lines"] = ("# SYNTHETIC fuzz table", "")
        if layout == "semicolon":
            table_kwargs["decimal_comma"] = ch.chance(0.8)
    elif layout == "json":
        table_kwargs["encoding"] = ch.pick(("utf-8", "utf-8", "utf-8-sig", "utf-16"))
        table_kwargs["json_numbers"] = ch.chance(0.8)
        table_kwargs["json_wrapped"] = ch.chance(0.3)
    else:
        table_kwargs["encoding"] = "utf-8"
        table_kwargs["xlsx_format"] = ch.pick((None, None, "0.00", "0.000E+00", "0.0000"))
        if ch.chance(0.1):
            table_kwargs["comment_lines"] = ("# SYNTHETIC fuzz table",)
    features.append(f"{layout}/{table_kwargs['encoding']}")


def generate_table(ch: Chooser, family: str | None = None) -> Table:
    """Draw one whole table.

    Parameters
    ----------
    ch : Chooser
        Where the choices come from (hypothesis or a seeded random).
    family : str, optional
        One of :data:`FAMILIES`; drawn when omitted.

    Returns
    -------
    Table
    """
    family = family or ch.weighted(FAMILIES, _FAMILY_WEIGHTS)
    rng = ch.rng()
    features: list[str] = []
    kwargs: dict = {}
    _layout(ch, kwargs, features)
    if family in ("realistic", "water", "degenerate"):
        water = family == "water"
        curve = _WaterCurve() if water else _draw_curve(ch)
        ranges = _branch_ranges(ch, curve, water)
        n = ch.integer(0, 4) if family == "degenerate" else _n_rows(ch)
        pts, with_u = _realistic_points(ch, rng, curve, ranges, n, features)
        if family == "degenerate":
            shape = ch.pick(("one-T", "two-T", "identical", "one-row-sources", "as-is"))
            features.append(shape)
            if shape in ("one-T", "two-T"):
                temps = [pts[0].T if pts else 300.0, (pts[0].T if pts else 300.0) + 5.0]
                for k, pt in enumerate(pts):
                    pt.T = temps[0] if shape == "one-T" else temps[k % 2]
            elif shape == "identical" and pts:
                pts = [replace(pts[0]) for _ in pts]
            elif shape == "one-row-sources":
                for k, pt in enumerate(pts):
                    pt.source = f"S{k}"
        else:
            _structure(ch, rng, pts, curve, features)
        labels = ch.chance(0.6)
        has_sources = any(p.source for p in pts)
        cols = _columns(ch, with_u, has_sources, labels)
        rows = _print_rows(ch, rng, cols, pts, labels)
        hostile_p = ch.pick((0.0, 0.0, 0.05, 0.1, 0.25)) if family != "degenerate" else 0.1
        rows = _hostile(ch, rng, cols, rows, pts, features, hostile_p)
        kwargs["metadata_toml"] = _metadata_toml(ch, rng, curve, water, features)
        if water and ch.chance(0.05):
            kwargs["substance"] = "water"
        elif not water and ch.chance(0.04):
            # a real substance's name on an invented curve: its reference correlation disagrees
            # with every row, at any level and slope
            kwargs["substance"] = ch.pick(("toluene", "benzene", "ethanol"))
            features.append("named-other-substance")
        header = [c.header for c in cols]
    else:
        header, rows = _garbage(ch, rng, features)
    if ch.chance(0.03):
        # a header the ingest may refuse: replaced, duplicated or unit-less column names
        i = ch.integer(0, len(header) - 1)
        header[i] = ch.pick(BAD_HEADERS)
        features.append("odd-header")
    if not header[0].strip() or header[0].lstrip().startswith("#"):
        header[0] = "T/K" if header[0] != "T/K" else "P/kPa"  # a blank or '#' first header is not a header
    return Table(header=tuple(header), rows=tuple(tuple(r) for r in rows), family=family,
                 features=tuple(features), **kwargs)


def _garbage(ch: Chooser, rng: random.Random, features: list[str]) -> tuple[list[str], list[list[str]]]:
    cols = [_pick_header(ch, "T"), _pick_header(ch, "P")]
    for role in ("phase", "source", "uT", "uP", "extra"):
        if ch.chance(0.3):
            cols.append(_pick_header(ch, role))
    rng.shuffle(cols)
    n = _n_rows(ch)
    pts = []
    lnT = (math.log(1.0), math.log(2000.0))
    lnP = (math.log(1e-10), math.log(1e9))
    sorted_T = ch.chance(0.5)
    for _ in range(n):
        pts.append(_Point(math.exp(rng.uniform(*lnT)), math.exp(rng.uniform(*lnP)),
                          rng.choice(("solid", "liquid")), rng.choice((None, "A", "B", "C")),
                          uT=rng.choice((None, 0.0, 0.1, 50.0)), uP_rel=rng.choice((None, 0.0, 0.01, 5.0))))
    if sorted_T:
        pts.sort(key=lambda p: p.T)
    rows = _print_rows(ch, rng, cols, pts, labels=ch.chance(0.5))
    rows = _hostile(ch, rng, cols, rows, pts, features, 0.3)
    features.append("garbage")
    return [c.header for c in cols], rows


# --------------------------------------------------------------------------- hypothesis


def tables(family: str | None = None):
    """A hypothesis strategy of whole :class:`Table` objects (of ``family`` if given)."""
    from hypothesis import strategies as st

    @st.composite
    def _tables(draw):
        return generate_table(HypothesisChooser(draw), family)

    return _tables()


def table_for_seed(seed: int, family: str | None = None) -> Table:
    """The table the campaign draws for ``seed`` (deterministic)."""
    return generate_table(RandomChooser(seed), family)


# --------------------------------------------------------------------------- one run


@dataclass(frozen=True)
class Failure:
    """One broken promise of the audit on one table.

    ``stage`` is where it happened (``ingest``, ``substance``, ``audit``,
    ``check``, ``contract``, ``report``); ``frame`` the innermost
    ``audit/`` frame of the traceback, ``file:line (function)``.
    """

    stage: str
    exc_type: str
    message: str
    frame: str = ""
    trace: str = ""

    @property
    def key(self) -> str:
        head = re.sub(r"\d+(\.\d+)?(e[+-]?\d+)?", "#", self.message.splitlines()[0] if self.message else "")[:70]
        return f"{self.stage}: {self.exc_type} at {self.frame or '?'}: {head}"

    def __str__(self) -> str:
        return f"{self.stage}: {self.exc_type} at {self.frame or '?'}: {self.message[:300]}"


@dataclass(frozen=True)
class Outcome:
    """How one table went: ``findings``, ``input-error`` or ``failure`` (with failures)."""

    kind: str
    failures: tuple[Failure, ...] = ()
    message: str = ""
    seconds: float = 0.0
    n_rows: int = 0
    #: processor time of the run [s] (beside the wall time, which a loaded machine stretches)
    cpu_seconds: float = 0.0
    #: "file:line: Category: message" of each warning the run emitted (information, not failures)
    warnings: tuple[str, ...] = ()


_POINT_STATUSES = {"ok", "suspect", "reject", "unreadable"}
_CHECK_STATUSES = {"pass", "warn", "fail", "skipped"}
_VERDICTS = {"pass", "warn", "fail"}
AUDIT_TIME = "2000-01-01T00:00:00Z"


def innermost_audit_frame(exc: BaseException) -> str:
    """``audit/…/file.py:line (function)`` of the deepest frame inside the package."""
    best = ""
    for fr in traceback.extract_tb(exc.__traceback__):
        path = fr.filename.replace(os.sep, "/")
        k = path.rfind("/audit/")
        if k >= 0 and "/tests/" not in path[:k + 1] and "/site-packages/" not in path:
            best = f"{path[k + 1:]}:{fr.lineno} ({fr.name})"
    return best


def _failure(stage: str, exc: BaseException) -> Failure:
    return Failure(stage, type(exc).__name__, str(exc), innermost_audit_frame(exc),
                   "".join(traceback.format_exception(exc))[-4000:])


@lru_cache(maxsize=4)
def _profile(name: str = "default"):
    from audit.profiles import load_profile

    return load_profile(name)


@contextlib.contextmanager
def _debug_env():
    """VPAUDIT_DEBUG=1: the audit's last guard lets an exception through, with its traceback."""
    old = os.environ.get("VPAUDIT_DEBUG")
    os.environ["VPAUDIT_DEBUG"] = "1"
    try:
        yield
    finally:
        if old is None:
            os.environ.pop("VPAUDIT_DEBUG", None)
        else:
            os.environ["VPAUDIT_DEBUG"] = old


def non_finite_paths(obj, path: str = "$") -> list[str]:
    """JSON paths of every number in ``obj`` that is not finite (NaN, ±inf)."""
    bad: list[str] = []
    if isinstance(obj, bool) or obj is None or isinstance(obj, str):
        return bad
    if isinstance(obj, dict):
        for k, v in obj.items():
            bad += non_finite_paths(v, f"{path}.{k}")
    elif isinstance(obj, (list, tuple)):
        for i, v in enumerate(obj):
            bad += non_finite_paths(v, f"{path}[{i}]")
    elif isinstance(obj, (int, float)) or hasattr(obj, "__float__"):
        try:
            if not math.isfinite(float(obj)):
                bad.append(f"{path} = {obj!r}")
        except (OverflowError, TypeError, ValueError):
            bad.append(f"{path} = {obj!r}")
    return bad


def contract_failures(table: Table, dataset, result) -> list[Failure]:
    """What the finished audit promises about the table, checked."""
    out: list[Failure] = []

    def fail(what: str, message: str):
        out.append(Failure("contract", what, message))

    n = table.expected_rows()
    rows = [p.row for p in result.points]
    if rows != list(range(1, n + 1)):
        fail("rows", f"expected rows 1..{n} in order, got {len(rows)} points: {rows[:8]}…")
    if [p.row for p in dataset.points] != rows:
        fail("rows", "the result's rows are not the dataset's rows")
    for p in result.points:
        if p.status not in _POINT_STATUSES:
            fail("status", f"row {p.row}: status {p.status!r}")
            break
    for c in result.checks:
        if c.status not in _CHECK_STATUSES:
            fail("status", f"check {c.id}: status {c.status!r}")
        if c.message.startswith("internal error"):
            out.append(Failure("check", f"internal error in {c.id}", c.message))
    for text in getattr(result, "internal_errors", ()):
        if not any(text.split(":")[0] in f.exc_type for f in out):
            out.append(Failure("check", "internal error", text))
    if result.verdict not in _VERDICTS:
        fail("status", f"verdict {result.verdict!r}")
    try:
        doc = result.to_findings()
    except Exception as exc:  # noqa: BLE001 -- the harness records it as a failure
        out.append(_failure("contract", exc))
        return out
    bad = non_finite_paths(doc)
    if bad:
        fail("non-finite", f"{len(bad)} non-finite number(s) in to_findings(): {bad[:3]}")
    try:
        json.dumps(doc, allow_nan=False)
    except (TypeError, ValueError) as exc:
        fail("not JSON", f"to_findings() is not strict JSON: {exc}")
    else:
        try:
            from audit.schema import validate_findings

            validate_findings(doc)
        except ImportError:
            pass
        except Exception as exc:  # noqa: BLE001 -- jsonschema.ValidationError and friends
            fail("schema", f"findings break the schema: {str(exc).splitlines()[0][:200]}")
    return out


def run_table(table: Table, folder: Path, formats: tuple[str, ...] = ("json", "csv"),
              profile: str = "default") -> Outcome:
    """Write, read, audit and report one table; check everything promised.

    Parameters
    ----------
    table : Table
    folder : Path
        An empty working folder (the table, its metadata and the outputs go there).
    formats : tuple of str
        Outputs to write with :func:`audit.report.write_outputs`.
    profile : str
        Rule profile name.

    Returns
    -------
    Outcome
    """
    from audit.errors import InputError
    from audit.ingest import read_table
    from audit.pipeline import run_audit
    from audit.substances import with_library_constants

    path = table.write(folder)
    watched = [p for p in (path, path.with_suffix(".toml")) if p.exists()]
    before = {p: hashlib.sha256(p.read_bytes()).hexdigest() for p in watched}
    failures: list[Failure] = []
    kind, message = "findings", ""
    t0, c0 = time.perf_counter(), time.process_time()
    with _debug_env(), warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        dataset = result = None
        try:
            dataset = read_table(path)
        except InputError as exc:
            kind, message = "input-error", exc.message
        except Exception as exc:  # noqa: BLE001 -- any other exception from ingest is a bug
            failures.append(_failure("ingest", exc))
        if dataset is not None and table.substance:
            try:
                dataset = with_library_constants(dataset, table.substance)
            except InputError as exc:
                kind, message, dataset = "input-error", exc.message, None
            except Exception as exc:  # noqa: BLE001
                failures.append(_failure("substance", exc))
                dataset = None
        if dataset is not None:
            try:
                result = run_audit(dataset, _profile(profile), audited_at=AUDIT_TIME)
            except Exception as exc:  # noqa: BLE001 -- run_audit may raise nothing at all
                failures.append(_failure("audit", exc))
        if result is not None:
            failures += contract_failures(table, dataset, result)
            try:
                from audit.report import write_outputs

                write_outputs(result, folder / "out", formats, input_bytes=path.read_bytes())
            except Exception as exc:  # noqa: BLE001
                failures.append(_failure("report", exc))
    seconds, cpu = time.perf_counter() - t0, time.process_time() - c0
    seen = tuple(dict.fromkeys(f"{_short(w.filename)}:{w.lineno}: {w.category.__name__}: {str(w.message)[:80]}"
                               for w in caught))
    for p, digest in before.items():
        if hashlib.sha256(p.read_bytes()).hexdigest() != digest:
            failures.append(Failure("contract", "input modified", f"{p.name} changed during the audit"))
    if failures:
        kind = "failure"
    return Outcome(kind, tuple(failures), message, seconds, len(table.rows), cpu, seen)


def _short(filename: str) -> str:
    path = filename.replace(os.sep, "/")
    k = path.rfind("/audit/")
    return path[k + 1:] if k >= 0 else path.rsplit("/", 2)[-1]


# --------------------------------------------------------------------------- reproducers


def minimise(table: Table, still_fails: Callable[[Table], bool], budget: int = 200) -> Table:
    """A smaller table that still fails the same way (rows, then columns, then cells removed).

    ``still_fails`` is called at most ``budget`` times.
    """
    calls = 0

    def ok(t: Table) -> bool:
        nonlocal calls
        calls += 1
        return still_fails(t)

    rows = list(table.rows)
    chunk = max(1, len(rows) // 2)
    while chunk >= 1 and calls < budget:
        i, shrunk = 0, False
        while i < len(rows) and calls < budget:
            trial = rows[:i] + rows[i + chunk:]
            if trial != rows and ok(replace(table, rows=tuple(trial))):
                rows, shrunk = trial, True
            else:
                i += chunk
        if not shrunk:
            chunk //= 2
    best = replace(table, rows=tuple(rows))
    for j in reversed(range(len(best.header))):
        if calls >= budget or len(best.header) <= 1:
            break
        trial = replace(best, header=best.header[:j] + best.header[j + 1:],
                        rows=tuple(r[:j] + r[j + 1:] for r in best.rows))
        if ok(trial):
            best = trial
    if best.metadata_toml is not None and calls < budget and ok(replace(best, metadata_toml=None)):
        best = replace(best, metadata_toml=None)
    if best.layout != "csv" and calls < budget:
        plain = replace(best, layout="csv", encoding="utf-8", decimal_comma=False, comment_lines=())
        if ok(plain):
            best = plain
    return best


def table_to_json(table: Table) -> str:
    """The table's full description (re-creatable with :func:`table_from_json`)."""
    from dataclasses import asdict

    return json.dumps(asdict(table), ensure_ascii=False, indent=1) + "\n"


def table_from_json(text: str) -> Table:
    d = json.loads(text)
    d["header"] = tuple(d["header"])
    d["rows"] = tuple(tuple(r) for r in d["rows"])
    d["comment_lines"] = tuple(d.get("comment_lines", ()))
    d["features"] = tuple(d.get("features", ()))
    return Table(**d)
