"""Generated supplier vapor-pressure sheets (TOML) for fuzzing the sheet audit, and one run of each.

Everything here is SYNTHETIC: the suppliers, products, faults and most
coefficients are invented; the "realistic" coefficients start from published
rows of the ``chemicals`` library (``Psat_data_AntoinePoling``,
``Psat_data_WagnerMcGarry``, ``Psat_data_WagnerPoling``,
``Psat_data_Perrys2_8``) and are then re-expressed in randomly chosen stated
units, so the sheet's own table follows its equation the way a real sheet's
would.  Every generated text starts with a ``# SYNTHETIC`` comment.

A sheet is drawn through a :class:`~tests.fuzz.tables.Chooser` (the table
generator's), so the same code runs under hypothesis (:func:`sheets`, for
``make test``) and under a seeded :class:`random.Random`
(:func:`sheet_for_seed`, for a long campaign); both are deterministic.

Families
--------
``realistic``
    Every equation form from a real substance's coefficients, re-expressed in
    stated units (sometimes with a wrong or missing unit note), a stated range
    inside the coefficients' validity, a table computed from the equation
    (its own units or the equation's) with a few hostile cells, sometimes a
    ``[reference_equation]``.
``wild``
    The same skeleton with wild numbers: zero, negative, 1e300, subnormal,
    integers beyond a float, Antoine's pole (C = −T) inside the range, a
    Wagner Tc below the range, ranges reversed, at 0 K, negative, huge.
``expression``
    Random small formulas of the grammar of :mod:`audit.sheet.expression`
    (all its operator spellings, functions, Greek names) and hostile ones
    (unbalanced, too deep, too long, injection attempts, missing coefficients).
``hostile``
    Structure and bytes: unknown keys and sections, values of the wrong
    type, garbage units, phases and ``gives``, broken reference equations,
    rows of the wrong length, non-UTF-8 bytes, UTF-16, truncated or
    corrupted TOML.

:func:`run_sheet` reads one sheet with :func:`audit.sheet.read.sheet_from_text`,
audits it with :func:`audit.sheet.run.run_sheet_audit`, writes findings.json
and annotated.csv and checks the contract (see its docstring).
"""

from __future__ import annotations

import hashlib
import json
import math
import re
import time
import warnings
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

from .tables import (AUDIT_TIME, HUGE_CELLS, NONFINITE_CELLS, PRESSURE_SPELLINGS, TEMPERATURE_SPELLINGS,
                     TEXT_CELLS, ZERO_CELLS, Chooser, Failure, HypothesisChooser, Outcome, RandomChooser,
                     _debug_env, _failure, _profile, non_finite_paths)

R_GAS = 8.314462618  # molar gas constant [J/(mol K)], CODATA 2018 (exact)

FAMILIES = ("realistic", "wild", "expression", "hostile")
_FAMILY_WEIGHTS = (40, 20, 20, 20)
FORMS = ("antoine", "antoine-extended", "clausius-clapeyron", "wagner-2.5-5", "wagner-3-6", "clarke-glew",
         "expression")

# --------------------------------------------------------------------------- vocabulary


def _alias_spellings() -> tuple[dict[str, tuple[str, ...]], dict[str, tuple[str, ...]]]:
    """Every spelling the unit parser knows, by canonical unit: the table harness's header
    spellings plus the parser's own alias lists (read from :mod:`audit.units`, so that a new
    alias is fuzzed as soon as it exists)."""
    from audit import units

    temps = {u: tuple(dict.fromkeys(TEMPERATURE_SPELLINGS.get(u, ()) + units._TEMPERATURE_ALIASES.get(u, ())))
             for u in units.TEMPERATURE_UNITS}
    press = {u: tuple(dict.fromkeys(PRESSURE_SPELLINGS.get(u, ()) + units._PRESSURE_ALIASES.get(u, ())))
             for u in units.PRESSURE_UNITS}
    return temps, press


SHEET_T_SPELLINGS, SHEET_P_SPELLINGS = _alias_spellings()
GARBAGE_T_UNITS = ("furlongs", "", "   ", "°X", "K/s", "kK", "Kelvin?", "deg", "°", "C°", "T", "mK", "ΔK",
                   "K\u0000", "°C°")
GARBAGE_P_UNITS = ("mpa", "psig", "barg", "kPag", "mm", "in", "Pa/s", "kpa a", "bar g", "", " ", "N", "mmH2O",
                   "GPa", "cmHg", "kPa\u0000", "torr?")
GIVES_SPELLINGS = {"log10": ("log10", "log", "lg", " log10 "), "ln": ("ln", " ln"), "none": ("none", "p", "P")}
GARBAGE_GIVES = ("log2", "", "LOG10", "Ln", "exp", "log(P)", "ln P", "pressure", "NONE", "10", "e")
PHASES = ("liquid", "solid", "Liquid", " SOLID ")
GARBAGE_PHASES = ("gas", "", "vapor", "l", "s", "liquid/solid", "supercritical")
#: the substances the audit knows (constants, reference), with CAS numbers
KNOWN_SUBSTANCES = (("toluene", "108-88-3"), ("water", "7732-18-5"), ("benzene", "71-43-2"),
                    ("ethanol", "64-17-5"))
UNKNOWN_NAMES = ("Compound X-17 (SYNTHETIC)", "unobtainium", "Solvent Blend 4B", "水", "Tolüol",
                 "toluene (technical grade)", "a" * 300, "<script>alert(1)</script>", "None", "null", "108-88-3")
INVALID_CAS = ("108-88-4", "108-88", "abc", "0-00-0", "1089-88-3", "108883", "7732-18-6", "10-8-88-3",
               "--", "00000-00-0", "١٠٨-٨٨-٣")
SHEET_CELLS = ("7,880", "n/a", "406,98*", "1e999", "", " ", "-", "—", "12.3 (calc.)", "<0.01", "1.2E+03",
               "0,5", "1.234,5", "1 013,25")
WILD_NUMBERS = (0.0, -0.0, -1.0, 1e300, -1e300, 1.7976931348623157e308, 5e-324, 1e-300, 1e-12, -1e-12, 1e12,
                0, -5, 10**18, 2**63 - 1, -2**63, 2**70, 10**30, 10**400, 3.0, 273.15, -273.15, -459.67)
BAD_VALUES = ("1.5", "", True, False, [1.0], {"x": 1}, float("nan"), float("inf"), float("-inf"))
#: formulas a sheet might print (the coefficient names they use)
FORMULA_SHAPES = {
    "antoine": "A - B/(T + C)",
    "antoine-spelled": "A − B ÷ (T + C)",
    "antoine-exp": "exp(A - B/(T + C))",
    "antoine-pow": "10^(A - B/(T + C))",
    "dippr": "A + B/T + C*ln(T) + D*T^E",
    "wagner": "ln(Pc) + (Tc/T)*(a*(1 - T/Tc) + b*(1 - T/Tc)^1.5 + c*(1 - T/Tc)^2.5 + d*(1 - T/Tc)^5)",
    "cc": "A - B/T",
}
HOSTILE_FORMULAS = (
    "", "   ", "__import__('os').system('true')", "A.__class__", "T**T**T**T**T", "2T", "2(T+1)",
    "A - B/(T + C", "A - B/(T + C))", "ln()", "ln(T, 2)", "log(T)", "exp(exp(exp(exp(T))))", "1/0", "0^-1",
    "sqrt(-T)", "T^0.5^-2", "abs(T)^1e308", "1e999", "1e", "1..2", "T,1", "A=B", "A; B", "x²", "µ*T", "T @ T",
    "lambda: 0", "[T]", "{T}", "'T'", "A -- B", "A +- B", "-(-(-(-T)))", "(" * 60 + "T" + ")" * 60,
    "-" * 60 + "T", "T" + "^2" * 60, "T" + " + T" * 200, "ln(ln(ln(ln(T))))", "T^(1/3)", "(-T)^(1/3)",
    "exp(1000)", "exp(-1000)", "10^T", "T/0", "0/0", "log10(0)", "ln(-1)", "α - β/(T + γ)", "ϑ*T",
    "A\u00a0-\u00a0B/T", "A\t-\nB/T", "A ‐ B/T", "Ｔ + 1", "١ + T", "T\u0000", "A - B/(T + C) # comment",
)

# --------------------------------------------------------------------------- TOML text


@dataclass(frozen=True)
class Raw:
    """Text put into the TOML document as written (a hostile value, or a deliberate syntax error)."""

    text: str


_BARE_KEY = re.compile(r"^[A-Za-z0-9_-]+$")
#: a document key whose Raw value is appended after every section (e.g. an array of tables)
RAW_TAIL = "__raw_tail__"


def toml_string(s: str) -> str:
    out = []
    for ch in s:
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif ord(ch) < 0x20 or ord(ch) == 0x7F:
            out.append(f"\\u{ord(ch):04X}")  # TOML forbids raw control characters in a basic string
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def toml_key(k: str) -> str:
    return k if _BARE_KEY.match(k) else toml_string(k)


def toml_value(v: Any) -> str:
    if isinstance(v, Raw):
        return v.text
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return toml_string(v)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{toml_key(k)} = {toml_value(x)}" for k, x in v.items()) + " }" if v else "{}"
    raise TypeError(f"no TOML for {v!r}")


def toml_document(sections: dict[str, Any], header: str) -> str:
    """The document's text: a comment line, then each section (a dict is a [table], anything
    else a top-level key, written first as TOML requires)."""
    lines = [f"# {header}"]
    for name, body in sections.items():
        if not isinstance(body, dict) and name != RAW_TAIL:
            lines.append(f"{toml_key(name)} = {toml_value(body)}")
    for name, body in sections.items():
        if not isinstance(body, dict):
            continue
        lines.append("")
        lines.append(f"[{toml_key(name)}]")
        for k, v in body.items():
            if k == "rows" and isinstance(v, list) and v and name == "table":
                lines.append("rows = [")
                lines += [f"  {toml_value(r)}," for r in v]
                lines.append("]")
            else:
                lines.append(f"{toml_key(k)} = {toml_value(v)}")
    if RAW_TAIL in sections:
        lines.append(sections[RAW_TAIL].text)
    return "\n".join(lines) + "\n"


# --------------------------------------------------------------------------- the case


@dataclass(frozen=True)
class SheetCase:
    """One generated sheet file.

    Attributes
    ----------
    data : bytes
        The file's bytes.
    family, features
        What was generated, for the reports of failures.
    n_rows : int or None
        Rows the ``[table]`` holds as generated; None when there is no table or the bytes were
        corrupted after the document was written (the contract then takes the count from the
        parsed sheet only).
    """

    data: bytes
    family: str = ""
    features: tuple[str, ...] = ()
    n_rows: int | None = None

    @property
    def text(self) -> str:
        return self.data.decode("utf-8", errors="backslashreplace")

    def describe(self) -> str:
        return (f"{self.family} sheet, {len(self.data)} bytes, features {list(self.features)}"
                + (f", {self.n_rows} table rows" if self.n_rows is not None else ""))


def case_from_text(text: str, family: str = "hand-made", n_rows: int | None = None) -> SheetCase:
    return SheetCase(text.encode("utf-8"), family, (), n_rows)


# --------------------------------------------------------------------------- library rows


@lru_cache(maxsize=1)
def _library_rows() -> dict[str, dict]:
    """Published coefficient rows by CAS (``chemicals``): Antoine (log10 P/Pa, T/K), Wagner 3-6,
    Wagner 2.5-5 and DIPPR 101, each row a plain dict; rows with a missing value are left out."""
    import chemicals.vapor_pressure as vp

    def rows(table, names):
        out = {}
        for cas, r in table.iterrows():
            values = {k: float(r[k]) for k in names}
            if all(math.isfinite(v) for v in values.values()):
                out[cas] = values
        return out

    antoine = rows(vp.Psat_data_AntoinePoling, ("A", "B", "C", "Tmin", "Tmax"))
    mcgarry = rows(vp.Psat_data_WagnerMcGarry, ("A", "B", "C", "D", "Tc", "Pc", "Tmin"))
    poling = rows(vp.Psat_data_WagnerPoling, ("A", "B", "C", "D", "Tc", "Pc", "Tmin", "Tmax"))
    perry = rows(vp.Psat_data_Perrys2_8, ("C1", "C2", "C3", "C4", "C5", "Tmin", "Tmax"))
    names = {cas: str(n).strip() for cas, n in vp.Psat_data_AntoinePoling["Chemical"].items()}
    return {"antoine": antoine, "mcgarry": mcgarry, "poling": poling, "perry": perry, "names": names,
            "antoine_cas": tuple(sorted(antoine))}


# --------------------------------------------------------------------------- units


def _kelvin_affine(unit: str) -> tuple[float, float]:
    from audit.units import kelvin_affine

    return kelvin_affine(unit)  # T_K = scale * T_unit + offset


def _pascal(unit: str) -> float:
    from audit.units import pascal_per

    return pascal_per(unit)


def _to_unit(T_K: float, unit: str) -> float:
    s, o = _kelvin_affine(unit)
    return (T_K - o) / s


_LN_BASE = {"log10": math.log(10.0), "ln": 1.0}


# --------------------------------------------------------------------------- equations in stated units


@dataclass
class _Equation:
    """A sheet equation as printed, with the curve its coefficients truly describe."""

    form: str
    coefficients: dict[str, Any]
    gives: str            # what the coefficients truly give: log10, ln, none
    T_unit: str           # the unit the coefficients truly use
    P_unit: str
    ln_p: Any             # T [K] -> ln(P/Pa) of the printed coefficients (math, not numpy)
    T_valid: tuple[float, float]  # [K]
    expression: str | None = None
    features: list[str] = field(default_factory=list)

    @property
    def source_cas(self) -> str | None:
        """The CAS number of the library row the coefficients come from (the last word of a
        ``…-row`` or ``…-from`` feature)."""
        for f in self.features:
            if f.split(" ")[0].endswith(("-row", "-from")):
                return f.split(" ")[-1]
        return None


def _antoine_rows(ch: Chooser, substance_cas: str | None) -> tuple[str, dict]:
    lib = _library_rows()
    if substance_cas in lib["antoine"] and ch.chance(0.8):
        return substance_cas, lib["antoine"][substance_cas]
    cas = ch.pick(lib["antoine_cas"])
    return cas, lib["antoine"][cas]


def _antoine_in_units(row: dict, base: str, T_unit: str, P_unit: str) -> dict[str, float]:
    """log10(P/Pa) = A − B/(T/K + C) re-expressed as log_base(P/P_unit) = A' − B'/(T_u + C')."""
    s, o = _kelvin_affine(T_unit)
    f = math.log(10.0) / _LN_BASE[base]
    return {"A": (row["A"] - math.log10(_pascal(P_unit))) * f, "B": row["B"] / s * f, "C": (o + row["C"]) / s}


def _ln_p_antoine(row: dict):
    return lambda T: math.log(10.0) * (row["A"] - row["B"] / (T + row["C"]))


def _draw_units(ch: Chooser, T_units=("K", "degC", "degF", "degR")) -> tuple[str, str, str]:
    base = ch.pick(("log10", "log10", "ln"))
    T_unit = ch.pick(T_units)
    P_unit = ch.pick(("Pa", "kPa", "mmHg", "bar", "Torr", "atm", "psi", "mbar", "hPa", "MPa", "inHg", "kgf/cm2",
                      "mPa", "mTorr"))
    return base, T_unit, P_unit


def _round_sig(ch: Chooser, v: float) -> float:
    if not math.isfinite(v) or v == 0:
        return v
    return float(f"{v:.{ch.integer(5, 9)}g}")


def _realistic_equation(ch: Chooser, form: str, cas: str | None) -> _Equation:
    lib = _library_rows()
    cas_a, row = _antoine_rows(ch, cas)
    T_valid = (row["Tmin"], row["Tmax"])
    if form in ("antoine", "antoine-extended"):
        base, T_unit, P_unit = _draw_units(ch)
        c = {k: _round_sig(ch, v) for k, v in _antoine_in_units(row, base, T_unit, P_unit).items()}
        s, o = _kelvin_affine(T_unit)
        k = _LN_BASE[base]
        extra = {}
        if form == "antoine-extended":
            for name in ("D", "E", "F"):
                if ch.chance(0.5):
                    # small enough to leave the curve physical: the wild family has the others
                    extra[name] = ch.pick({"D": (0.0, 1e-5, -1e-5, 1e-4), "E": (0.0, 1e-8, -1e-8, 2e-7),
                                           "F": (0.0, 0.01, -0.01)}[name])
        c.update(extra)

        P = _pascal(P_unit)

        def ln_p(T, c=c, s=s, o=o, k=k, P=P):
            Tu = (T - o) / s
            y = c["A"] - c["B"] / (Tu + c["C"]) + c.get("D", 0.0) * Tu + c.get("E", 0.0) * Tu * Tu
            if c.get("F"):
                y += c["F"] * math.log(Tu) if Tu > 0 else math.nan
            return k * y + math.log(P)

        return _Equation(form, c, base, T_unit, P_unit, ln_p, T_valid, features=[f"antoine-row {cas_a}"])
    if form == "clausius-clapeyron":
        # a straight line in 1/T through the Antoine curve's ends: ln P = a − b/T
        lnp = _ln_p_antoine(row)
        T1, T2 = T_valid
        b = (lnp(T2) - lnp(T1)) / (1 / T1 - 1 / T2)
        a = lnp(T1) + b / T1
        base, T_unit, P_unit = _draw_units(ch, ("K", "K", "degR"))
        s, _ = _kelvin_affine(T_unit)
        k = _LN_BASE[base]
        c = {"A": _round_sig(ch, (a - math.log(_pascal(P_unit))) / k), "B": _round_sig(ch, b / (s * k))}
        P = _pascal(P_unit)
        return _Equation(form, c, base, T_unit, P_unit,
                         lambda T, c=c, s=s, k=k, P=P: k * (c["A"] - c["B"] / (T / s)) + math.log(P),
                         T_valid, features=[f"cc-from {cas_a}"])
    if form in ("wagner-2.5-5", "wagner-3-6"):
        table = lib["mcgarry"] if form == "wagner-3-6" else lib["poling"]
        w_cas = cas if cas in table and ch.chance(0.8) else ch.pick(tuple(sorted(table)))
        w = table[w_cas]
        exps = (1.0, 1.5, 3.0, 6.0) if form == "wagner-3-6" else (1.0, 1.5, 2.5, 5.0)
        # Tc/T and T/Tc are ratios only on an absolute scale: K or °R (°C is in the wild family)
        _, T_unit, P_unit = _draw_units(ch, ("K", "K", "degR"))
        c = {"a": w["A"], "b": w["B"], "c": w["C"], "d": w["D"], "Tc": _round_sig(ch, _to_unit(w["Tc"], T_unit)),
             "Pc": _round_sig(ch, w["Pc"] / _pascal(P_unit))}

        def ln_p(T, w=w, exps=exps):
            tau = 1 - T / w["Tc"]
            if not tau > 0:
                return math.nan
            S = sum(x * tau ** e for x, e in zip((w["A"], w["B"], w["C"], w["D"]), exps))
            return math.log(w["Pc"]) + w["Tc"] / T * S

        lo = w["Tmin"]
        hi = min(w.get("Tmax", w["Tc"]), w["Tc"]) * 0.97
        return _Equation(form, c, "ln", T_unit, P_unit, ln_p, (lo, max(hi, lo + 1.0)),
                         features=[f"wagner-row {w_cas}"])
    if form == "clarke-glew":
        lnp = _ln_p_antoine(row)
        theta = round(0.5 * (T_valid[0] + T_valid[1]), ch.integer(0, 2))
        h = 1e-3
        slope = (lnp(theta + h) - lnp(theta - h)) / (2 * h)
        curv = (lnp(theta + h) - 2 * lnp(theta) + lnp(theta - h)) / (h * h)
        _, _, P_unit = _draw_units(ch)
        dH = R_GAS * theta ** 2 * slope
        # d(ΔH)/dT from the curve's second derivative: ΔH = R T² dlnP/dT
        dCp = R_GAS * (2 * theta * slope + theta ** 2 * curv)
        p_ref = _pascal(P_unit)  # p° is one unit of the sheet's pressure unit
        dG = -R_GAS * theta * (lnp(theta) - math.log(p_ref))
        c = {"theta": theta, "dG": _round_sig(ch, dG), "dH": _round_sig(ch, dH), "dCp": _round_sig(ch, dCp)}
        if ch.chance(0.3):
            c["d_dCp_dT"] = ch.pick((0.0, 0.05, -0.1))

        def ln_p(T, c=c, p_ref=p_ref):
            th, x = c["theta"], c.get("d_dCp_dT", 0.0)
            r = (-c["dG"] / th + c["dH"] * (1 / th - 1 / T) + c["dCp"] * (th / T - 1 + math.log(T / th))
                 + th / 2 * x * (T / th - th / T - 2 * math.log(T / th)))
            return r / R_GAS + math.log(p_ref)

        return _Equation(form, c, "ln", "K", P_unit, ln_p, T_valid, features=[f"clarke-glew-from {cas_a}"])
    return _realistic_expression(ch, cas, row, cas_a)


def _realistic_expression(ch: Chooser, cas: str | None, row: dict, cas_a: str) -> _Equation:
    lib = _library_rows()
    T_valid = (row["Tmin"], row["Tmax"])
    shape = ch.pick(tuple(FORMULA_SHAPES))
    text = FORMULA_SHAPES[shape]
    if shape in ("antoine", "antoine-spelled", "antoine-exp", "antoine-pow"):
        base, T_unit, P_unit = _draw_units(ch)
        gives = {"antoine-exp": "none", "antoine-pow": "none"}.get(shape, base)
        if shape == "antoine-exp":
            base = "ln"
        if shape == "antoine-pow":
            base = "log10"
        c = {k: _round_sig(ch, v) for k, v in _antoine_in_units(row, base, T_unit, P_unit).items()}
        return _Equation("expression", c, gives, T_unit, P_unit, _curve_of(c, base, T_unit, P_unit), T_valid,
                         text, [f"formula {shape}", f"antoine-row {cas_a}"])
    if shape == "dippr":
        p_cas = cas if cas in lib["perry"] and ch.chance(0.8) else ch.pick(tuple(sorted(lib["perry"])))
        p = lib["perry"][p_cas]
        c = {"A": p["C1"], "B": p["C2"], "C": p["C3"], "D": p["C4"], "E": p["C5"]}
        return _Equation("expression", c, "ln", "K", "Pa",
                         lambda T, c=c: c["A"] + c["B"] / T + c["C"] * math.log(T) + c["D"] * T ** c["E"],
                         (p["Tmin"], p["Tmax"]), text, [f"formula {shape}", f"perry-row {p_cas}"])
    if shape == "wagner":
        w_cas = cas if cas in lib["poling"] and ch.chance(0.8) else ch.pick(tuple(sorted(lib["poling"])))
        w = lib["poling"][w_cas]
        c = {"a": w["A"], "b": w["B"], "c": w["C"], "d": w["D"], "Tc": w["Tc"], "Pc": w["Pc"] / 1000.0}

        def ln_p(T, w=w):
            tau = 1 - T / w["Tc"]
            if not tau > 0:
                return math.nan
            return math.log(w["Pc"]) + w["Tc"] / T * (w["A"] * tau + w["B"] * tau ** 1.5 + w["C"] * tau ** 2.5
                                                        + w["D"] * tau ** 5)

        return _Equation("expression", c, "ln", "K", "kPa", ln_p, (w["Tmin"], 0.97 * w["Tmax"]), text,
                         [f"formula {shape}", f"wagner-row {w_cas}"])
    # "cc": through the Antoine curve's ends
    lnp = _ln_p_antoine(row)
    T1, T2 = T_valid
    b = (lnp(T2) - lnp(T1)) / (1 / T1 - 1 / T2)
    a = lnp(T1) + b / T1
    c = {"A": a / math.log(10.0), "B": b / math.log(10.0)}
    return _Equation("expression", c, "log10", "K", "Pa", lambda T, a=a, b=b: a - b / T, T_valid, text,
                     [f"formula {shape}", f"cc-from {cas_a}"])


def _curve_of(c: dict, base: str, T_unit: str, P_unit: str):
    s, o = _kelvin_affine(T_unit)

    def ln_p(T):
        Tu = (T - o) / s
        return _LN_BASE[base] * (c["A"] - c["B"] / (Tu + c["C"])) + math.log(_pascal(P_unit))

    return ln_p


# --------------------------------------------------------------------------- random formulas


_FUNCTIONS = ("ln", "log10", "exp", "sqrt", "abs")
_NAME_POOL = ("A", "B", "C", "D", "E", "a", "b", "Tc", "Pc", "k1", "x_2", "α", "β", "ϑ", "Ω", "theta", "T")
_OPS = {"+": ("+",), "-": ("-", "−"), "*": ("*", "×", "·"), "/": ("/", "÷"), "^": ("^", "**")}
_NUMBERS = ("1", "2", "0.5", "10", "273.15", ".5", "1e-3", "2E+2", "1.5e2", "0", "3.", "2e−3", "1e300", "1e-300")


def random_formula(ch: Chooser, depth: int = 0) -> str:
    """A formula of the grammar of :mod:`audit.sheet.expression`, with its other spellings."""
    leaf = depth >= 4 or ch.chance(0.3 + 0.15 * depth)
    if leaf:
        kind = ch.weighted(("number", "name", "T"), (3, 4, 4))
        if kind == "number":
            return ch.pick(_NUMBERS)
        return "T" if kind == "T" else ch.pick(_NAME_POOL)
    kind = ch.weighted(("binary", "call", "sign", "paren"), (6, 2, 1, 1))
    if kind == "binary":
        op = ch.pick(tuple(_OPS))
        spelled = ch.pick(_OPS[op])
        gap = ch.pick(("", " ", " ", "  "))
        return f"{random_formula(ch, depth + 1)}{gap}{spelled}{gap}{random_formula(ch, depth + 1)}"
    if kind == "call":
        return f"{ch.pick(_FUNCTIONS)}({random_formula(ch, depth + 1)})"
    if kind == "sign":
        return f"{ch.pick(('-', '+', '−'))}{random_formula(ch, depth + 1)}"
    return f"({random_formula(ch, depth + 1)})"


_TOKEN = re.compile(r"(?P<number>(?:\d+\.?\d*|\.\d+)(?:[eE][+\-−]?\d+)?)|(?P<name>[A-Za-zα-ωΑ-Ωϑ][A-Za-z0-9_α-ωΑ-Ωϑ]*)")


def _names_in(formula: str) -> list[str]:
    """Coefficient names a formula (probably) uses; numbers are skipped whole so that the 'e'
    of 1e-3 is not taken for a name.  A generator's guess, not the parser: a hostile formula
    may use a name this misses, which only makes its sheet an InputError."""
    names = {m.group("name") for m in _TOKEN.finditer(formula) if m.group("name")}
    return sorted(n for n in names if n not in _FUNCTIONS and n != "T")


# --------------------------------------------------------------------------- pieces of a sheet


def _draw_substance(ch: Chooser, features: list[str], realistic: bool) -> tuple[dict, str | None]:
    """The [sheet] table and the CAS whose coefficients a realistic sheet should use."""
    head: dict[str, Any] = {}
    weights = (55, 35, 10, 0, 0) if realistic else (45, 25, 12, 10, 8)
    kind = ch.weighted(("known", "library", "unknown", "invalid-cas", "none"), weights)
    cas = None
    if kind == "known":
        name, cas = ch.pick(KNOWN_SUBSTANCES)
        how = ch.pick(("name", "cas", "both", "both"))
        if how in ("name", "both"):
            head["substance"] = name
        if how in ("cas", "both"):
            head["cas"] = cas
    elif kind == "library":
        lib = _library_rows()
        cas = ch.pick(lib["antoine_cas"])
        if ch.chance(0.5):
            head["substance"] = lib["names"].get(cas, "unknown")
        head["cas"] = cas
    elif kind == "unknown":
        head["substance"] = ch.pick(UNKNOWN_NAMES)
    elif kind == "invalid-cas":
        head["substance"] = ch.pick(("toluene", "Compound X-17 (SYNTHETIC)"))
        head["cas"] = ch.pick(INVALID_CAS)
    features.append(f"substance-{kind}")
    if ch.chance(0.6):
        head["supplier"] = ch.pick(("Northfield Solvents (SYNTHETIC)", "Müller Chemie (SYNTHETIC)", "李 化工 (SYNTHETIC)",
                                    "ACME <b>bold</b> (SYNTHETIC)", "x" * 200))
    if ch.chance(0.4):
        head["product"] = ch.pick(("reagent grade, rev. 3", "Lot #42\nsecond line", "\"quoted\" grade", "—"))
    return head, cas


def _spelled_T(ch: Chooser, unit: str) -> str:
    return ch.pick(SHEET_T_SPELLINGS[unit])


def _spelled_P(ch: Chooser, unit: str) -> str:
    return ch.pick(SHEET_P_SPELLINGS[unit])


def _state_units(ch: Chooser, eq: dict, truth: _Equation, hostile: bool, features: list[str]) -> None:
    """gives, T_unit and P_unit as the sheet states them: right, wrong, missing or garbage."""
    for key in ("gives", "T_unit", "P_unit"):
        what = ch.weighted(("right", "wrong", "missing", "garbage"), (70, 12, 14, 15 if hostile else 0))
        if what == "missing":
            features.append(f"{key}-missing")
            continue
        if what == "garbage":
            features.append(f"{key}-garbage")
            eq[key] = ch.pick({"gives": GARBAGE_GIVES, "T_unit": GARBAGE_T_UNITS, "P_unit": GARBAGE_P_UNITS}[key]
                              + BAD_VALUES[:3])
            continue
        if key == "gives":
            value = truth.gives if what == "right" else ch.pick(("log10", "ln", "none"))
            eq[key] = ch.pick(GIVES_SPELLINGS[value])
        elif key == "T_unit":
            eq[key] = _spelled_T(ch, truth.T_unit if what == "right" else ch.pick(tuple(SHEET_T_SPELLINGS)))
        else:
            eq[key] = _spelled_P(ch, truth.P_unit if what == "right" else ch.pick(tuple(SHEET_P_SPELLINGS)))
        if what == "wrong":
            features.append(f"{key}-wrong")


def _stated_T_unit(eq: dict, truth: _Equation) -> str:
    """The temperature unit the stated range is written in: the stated one when readable."""
    from audit.units import parse_temperature_unit

    try:
        return parse_temperature_unit(eq["T_unit"]) if isinstance(eq.get("T_unit"), str) else truth.T_unit
    except ValueError:
        return truth.T_unit


def _draw_range(ch: Chooser, eq: dict, truth: _Equation, wild: bool, features: list[str]) -> tuple[float, float]:
    """The stated range; returns the temperatures [K] the table should span."""
    lo_K, hi_K = truth.T_valid
    a = lo_K + ch.real(0.0, 0.3) * (hi_K - lo_K)
    b = hi_K - ch.real(0.0, 0.3) * (hi_K - lo_K)
    unit = _stated_T_unit(eq, truth)
    kind = ch.weighted(("normal", "missing", "reversed", "zero-K", "negative", "huge", "equal", "wide", "malformed"),
                       (70, 15, 0, 4, 0, 2, 0, 5, 0) if not wild else (25, 15, 8, 12, 10, 12, 4, 10, 4))
    digits = ch.integer(0, 3)
    lo, hi = round(_to_unit(a, unit), digits), round(_to_unit(b, unit), digits)
    if kind == "normal":
        eq["range"] = [lo, hi] if ch.chance(0.8) else [int(lo), int(hi) + 1]
    elif kind == "reversed":
        eq["range"] = [hi, lo]
    elif kind == "zero-K":
        eq["range"] = [round(_to_unit(0.0, unit), 2), hi]
    elif kind == "negative":
        eq["range"] = [ch.pick((-500.0, -1e6, -459.67, -273.15, -1.0)), ch.pick((hi, -1.0, 0.0))]
    elif kind == "huge":
        eq["range"] = ch.pick(([lo, 1e300], [-1e300, 1e300], [lo, 1e6], [1e300, 1.7976931348623157e308],
                               [5e-324, 1e-300]))
    elif kind == "equal":
        eq["range"] = [lo, lo]
    elif kind == "wide":
        eq["range"] = [round(_to_unit(1.0, unit), 2), round(_to_unit(5000.0, unit), 2)]
    elif kind == "malformed":
        eq["range"] = ch.pick(([lo], [lo, hi, hi], "0-100", [str(lo), hi], [lo, float("nan")], [lo, float("inf")],
                               [True, hi], [], [[lo], [hi]], 100, {"low": lo, "high": hi}, [lo, 10**400]))
    if kind != "normal":
        features.append(f"range-{kind}")
    return a, b


def _print_number(ch: Chooser, v: float, sig: int, as_text: bool) -> Any:
    if not math.isfinite(v):
        return ch.pick(("n/a", "", "-"))
    s = f"{v:.{sig}g}"
    if as_text:
        return s
    x = float(s)
    return int(x) if x.is_integer() and abs(x) < 1e15 and ch.chance(0.3) else x


def _draw_table(ch: Chooser, truth: _Equation, span: tuple[float, float], wild: bool, hostile: bool,
                features: list[str]) -> tuple[dict | None, int | None]:
    """The [table] (or None) and how many rows it holds."""
    kind = ch.weighted(("absent", "computed", "empty", "broken"), (25, 75, 0, 0) if not hostile else (20, 50, 15, 15))
    if kind == "absent":
        features.append("no-table")
        return None, None
    tab: dict[str, Any] = {}
    if kind == "empty":
        features.append("table-empty")
        tab["rows"] = ch.pick(([], Raw("[]"), "none", [[]]))
        return tab, None
    own = ch.chance(0.3)
    T_unit, P_unit = truth.T_unit, truth.P_unit
    if own:
        T_unit = ch.pick(("K", "degC", "degF", "degR"))
        P_unit = ch.pick(tuple(SHEET_P_SPELLINGS))
        if ch.chance(0.85):
            tab["T_unit"] = _spelled_T(ch, T_unit)
        if ch.chance(0.85):
            tab["P_unit"] = _spelled_P(ch, P_unit)
        if hostile and ch.chance(0.2):
            tab[ch.pick(("T_unit", "P_unit"))] = ch.pick(GARBAGE_P_UNITS + GARBAGE_T_UNITS)
        features.append("table-own-units")
    n = ch.pick((1, 2, 3, 5, 8, 8, 12, 20)) if not wild else ch.pick((1, 2, 3, 5, 40))
    a, b = span
    if not (math.isfinite(a) and math.isfinite(b)):
        a, b = 250.0, 350.0
    Ts = [a + (b - a) * i / max(n - 1, 1) for i in range(n)]
    s, o = _kelvin_affine(T_unit)
    t_dec = ch.integer(0, 3)
    p_sig = ch.integer(3, 6)
    text_T, text_P = ch.chance(0.3), ch.chance(0.5)
    rows: list[Any] = []
    for T in Ts:
        Tu = round((T - o) / s, t_dec)
        T = s * Tu + o  # the pressure printed beside a rounded temperature is the one at that temperature
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            try:
                lnP = truth.ln_p(T)
                P = math.exp(lnP) / _pascal(P_unit) if math.isfinite(lnP) else math.nan
            except (ValueError, OverflowError, ZeroDivisionError):
                P = math.nan
        T_cell: Any = f"{Tu:.{t_dec}f}" if text_T else (int(Tu) if t_dec == 0 else Tu)
        rows.append([T_cell, _print_number(ch, P, p_sig, text_P)])
    rng = ch.rng()
    faults = []
    for _ in range(ch.pick((0, 0, 1, 2, 4)) if not wild else ch.pick((1, 3, 8))):
        fault = ch.pick(("sheet-cell", "text-cell", "nonfinite", "huge", "zero", "duplicate-T", "decimal-comma",
                         "unit-slip", "swap", "negative"))
        i = rng.randrange(len(rows))
        j = rng.randrange(2)
        if fault == "sheet-cell":
            rows[i][j] = rng.choice(SHEET_CELLS)
        elif fault == "text-cell":
            rows[i][j] = rng.choice(TEXT_CELLS)
        elif fault == "nonfinite":
            rows[i][j] = rng.choice(NONFINITE_CELLS + (float("nan"), float("inf")))
        elif fault == "huge":
            rows[i][j] = rng.choice(HUGE_CELLS + (1e300, 10**400, 2**64, -1e300))
        elif fault == "zero":
            rows[i][j] = rng.choice(ZERO_CELLS + (0, 0.0, -0.0))
        elif fault == "duplicate-T":
            rows.insert(i, [rows[i][0], rows[i][1]])
        elif fault == "decimal-comma":
            rows[i][j] = str(rows[i][j]).replace(".", ",")
        elif fault == "unit-slip" and isinstance(rows[i][1], float):
            rows[i][1] = rows[i][1] * rng.choice((7.50062, 0.133322, 1000.0, 10.0, 0.1))
        elif fault == "swap":
            rows[i] = [rows[i][1], rows[i][0]]
        elif fault == "negative" and isinstance(rows[i][j], (int, float)):
            rows[i][j] = -rows[i][j]
        faults.append(fault)
    if faults:
        features.append("cells-" + "+".join(sorted(set(faults))))
    tab["rows"] = rows
    if ch.chance(0.3):
        tab["u_P_percent"] = ch.pick((1.0, 0.5, 5, 99.9, 0.001)) if not wild else ch.pick(
            (0, 100, -1, "1", 1e-300, float("nan"), True, 50))
    n_rows = len(rows)
    if kind == "broken":
        how = ch.pick(("short", "long", "scalar", "bool", "nested", "table-cell", "string-rows"))
        i = rng.randrange(len(rows))
        rows[i] = {"short": [rows[i][0]], "long": rows[i] + [1.0], "scalar": 5.0, "bool": [True, 1.0],
                   "nested": [[1.0], 2.0], "table-cell": [{"T": 1}, 2.0], "string-rows": "20, 2.91"}[how]
        features.append(f"row-{how}")
    return tab, n_rows


def _reference_equation(ch: Chooser, cas: str | None, valid_mostly: bool, features: list[str]) -> dict | Any:
    lib = _library_rows()
    row = lib["antoine"].get(cas) or lib["antoine"][ch.pick(lib["antoine_cas"])]
    ref: dict[str, Any] = {"form": "antoine", "parameters": {"A": row["A"], "B": row["B"], "C": row["C"]},
                           "base": "log10", "P_unit": "Pa", "T_unit": "K", "valid_from_K": row["Tmin"],
                           "valid_to_K": row["Tmax"], "source": "SYNTHETIC test reference (Antoine, Poling 2000)"}
    if ch.chance(0.8 if valid_mostly else 0.3):
        features.append("reference-equation")
        return ref
    how = ch.pick(("missing-key", "string-parameter", "unknown-form", "reversed", "nan", "inf", "scalar",
                   "unknown-key", "bad-base", "bad-unit", "branch", "fixed", "empty", "zero-range", "list-params",
                   "huge"))
    features.append(f"reference-{how}")
    if how == "missing-key":
        ref.pop(ch.pick(("form", "parameters", "valid_from_K", "valid_to_K", "source")))
    elif how == "string-parameter":
        ref["parameters"]["B"] = ch.pick(("1327.62", "abc", ""))
    elif how == "unknown-form":
        ref["form"] = ch.pick(("dippr-101", "wagner-9", "", "ANTOINE", "clarke-glew", "clausius-clapeyron-2"))
    elif how == "reversed":
        ref["valid_from_K"], ref["valid_to_K"] = ref["valid_to_K"], ref["valid_from_K"]
    elif how == "nan":
        ref[ch.pick(("valid_from_K", "valid_to_K"))] = float("nan")
    elif how == "inf":
        ref["parameters"]["A"] = ch.pick((float("inf"), float("nan")))
    elif how == "scalar":
        return ch.pick(("antoine", 1.0, [1, 2], True))
    elif how == "unknown-key":
        ref["colour"] = "blue"
    elif how == "bad-base":
        ref["base"] = ch.pick(("log2", "", 10))
    elif how == "bad-unit":
        ref[ch.pick(("P_unit", "T_unit"))] = ch.pick(GARBAGE_P_UNITS[:6])
    elif how == "branch":
        ref["branch"] = ch.pick(("solid", "gas", 3))
    elif how == "fixed":
        ref["fixed"] = ch.pick(("x", {"p_ref": 1.0}, [1], {"A": "x"}))
    elif how == "empty":
        return {}
    elif how == "zero-range":
        ref["valid_from_K"] = ref["valid_to_K"] = 0.0
    elif how == "list-params":
        ref["parameters"] = [row["A"], row["B"], row["C"]]
    elif how == "huge":
        ref["parameters"]["A"] = 10**400 if ch.chance(0.5) else 1e300
    return ref


# --------------------------------------------------------------------------- wild coefficients


def _wild_coefficients(ch: Chooser, truth: _Equation, span: tuple[float, float], features: list[str]) -> None:
    """Replace some printed coefficients by wild numbers (in place); the pole of an Antoine
    equation sometimes lands inside the range."""
    c = truth.coefficients
    names = list(c)
    for _ in range(ch.integer(1, 3)):
        k = ch.pick(names)
        c[k] = ch.pick(WILD_NUMBERS)
        features.append(f"wild-{k}")
    if "C" in c and truth.form in ("antoine", "antoine-extended") and ch.chance(0.4):
        mid = 0.5 * (span[0] + span[1])
        c["C"] = -round(_to_unit(mid, truth.T_unit), ch.integer(0, 2))
        features.append("pole-in-range")
    if "Tc" in c and ch.chance(0.3):
        c["Tc"] = ch.pick((0.0, -1.0, round(_to_unit(span[0], truth.T_unit) * 0.5, 1), 1e300))
        features.append("wild-Tc")
    if "Pc" in c and ch.chance(0.2):
        c["Pc"] = ch.pick((0.0, -1.0, 1e-300))
        features.append("wild-Pc")


# --------------------------------------------------------------------------- the generator


def generate_sheet(ch: Chooser, family: str | None = None) -> SheetCase:
    """One sheet of ``family`` (drawn when None); see the module docstring."""
    if family is None:
        family = ch.weighted(FAMILIES, _FAMILY_WEIGHTS)
    features: list[str] = []
    # hostile structure only in the hostile family, so that the others reach the audit
    realistic = family != "hostile"
    head, cas = _draw_substance(ch, features, realistic)
    if family == "expression":
        form = "expression"
    else:
        form = ch.pick(FORMS)
    features.append(form)
    truth = _realistic_equation(ch, form, cas)
    features += truth.features
    if truth.source_cas != cas:
        features.append("foreign-row")  # the coefficients are another substance's (or the name is unknown)
    wild = family == "wild"
    eq: dict[str, Any] = {"form": form}
    if ch.chance(0.05):
        eq["form"] = ch.pick((form.upper(), f" {form} ", form.replace("-", "_")))
        features.append("form-spelled")
    coefficients: dict[str, Any] = dict(truth.coefficients)
    expression = truth.expression
    if family == "expression":
        how = ch.weighted(("random", "realistic", "hostile"), (50, 30, 20))
        if how == "random":
            expression = random_formula(ch)
            coefficients = {n: ch.pick((1.0, 2.5, -3.0, 1000.0, 0.5, 1e-3, 0.0, 1e300, 273.15)) for n in
                            _names_in(expression)}
            if not coefficients or ch.chance(0.3):
                coefficients[ch.pick(("A", "B", "k"))] = 1.0  # an unused coefficient is allowed
            features.append("formula-random")
        elif how == "hostile":
            expression = ch.pick(HOSTILE_FORMULAS)
            coefficients = {n: 1.5 for n in _names_in(expression)} or {"A": 1.0}
            features.append("formula-hostile")
        if ch.chance(0.1) and len(coefficients) > 1:
            coefficients.pop(ch.pick(sorted(coefficients)))
            features.append("coefficient-missing")
    span = (truth.T_valid[0] + 0.1 * (truth.T_valid[1] - truth.T_valid[0]),
            truth.T_valid[1] - 0.1 * (truth.T_valid[1] - truth.T_valid[0]))
    if wild:
        truth.coefficients = coefficients
        _wild_coefficients(ch, truth, span, features)
        coefficients = truth.coefficients
    eq["coefficients"] = coefficients
    if expression is not None:
        eq["expression"] = expression
    _state_units(ch, eq, truth, not realistic, features)
    span = _draw_range(ch, eq, truth, wild, features)
    if ch.chance(0.5):
        if realistic:
            eq["phase"] = ch.pick(PHASES[:1] * 3 + PHASES)
        else:
            eq["phase"] = ch.pick(PHASES) if ch.chance(0.8) else ch.pick(GARBAGE_PHASES)
        features.append(f"phase-{eq['phase'].strip().lower()}")
    table, n_rows = _draw_table(ch, truth, span, wild, not realistic, features)
    doc: dict[str, Any] = {"sheet": head, "equation": eq}
    if table is not None:
        doc["table"] = table
    if ch.chance(0.15 if family != "hostile" else 0.4):
        doc["reference_equation"] = _reference_equation(ch, cas, realistic, features)
    if family == "hostile":
        n_rows = _structural_hostility(ch, doc, features, n_rows)
    text = toml_document(doc, f"SYNTHETIC sheet generated by tests/fuzz/sheets.py ({family})")
    data = text.encode("utf-8")
    if family == "hostile" and ch.chance(0.35):
        data = _byte_hostility(ch, text, features)
        n_rows = None
    return SheetCase(data, family, tuple(features), n_rows)


def _structural_hostility(ch: Chooser, doc: dict, features: list[str], n_rows: int | None) -> int | None:
    """Wrong types, unknown keys and sections, missing pieces (in place)."""
    for _ in range(ch.integer(1, 3)):
        how = ch.pick(("unknown-key-sheet", "unknown-key-equation", "unknown-key-table", "unknown-section",
                       "section-scalar", "missing-sheet", "missing-equation", "no-coefficients", "coefficient-type",
                       "coefficient-huge-int", "form-unknown", "form-missing", "form-type", "expression-on-antoine",
                       "phase-garbage", "substance-empty", "substance-type", "cas-type", "table-array",
                       "rows-scalar", "unit-type", "gives-type", "coefficients-list", "empty-document"))
        features.append(how)
        eq = doc.get("equation") if isinstance(doc.get("equation"), dict) else {}
        if how == "unknown-key-sheet" and isinstance(doc.get("sheet"), dict):
            doc["sheet"][ch.pick(("Substance", "name", "CAS", "grade"))] = "x"
        elif how == "unknown-key-equation":
            eq[ch.pick(("Form", "unit", "coefficient", "T_range", "p_unit"))] = "x"
        elif how == "unknown-key-table" and isinstance(doc.get("table"), dict):
            doc["table"][ch.pick(("row", "units", "u_T"))] = 1
        elif how == "unknown-section":
            doc[ch.pick(("metadata", "constants", "Sheet", "columns"))] = {"x": 1}
        elif how == "section-scalar":
            doc[ch.pick(("sheet", "equation", "table", "reference_equation"))] = ch.pick(("x", 1, [1, 2], True))
        elif how == "missing-sheet":
            doc.pop("sheet", None)
        elif how == "missing-equation":
            doc.pop("equation", None)
        elif how == "no-coefficients":
            eq.pop("coefficients", None) if ch.chance(0.5) else eq.update(coefficients={})
        elif how == "coefficient-type" and isinstance(eq.get("coefficients"), dict) and eq["coefficients"]:
            eq["coefficients"][ch.pick(sorted(eq["coefficients"]))] = ch.pick(BAD_VALUES)
        elif how == "coefficient-huge-int" and isinstance(eq.get("coefficients"), dict) and eq["coefficients"]:
            eq["coefficients"][ch.pick(sorted(eq["coefficients"]))] = ch.pick((10**400, -10**400, 2**64))
        elif how == "form-unknown":
            eq["form"] = ch.pick(("antoine2", "wagner", "Antoine extended", "", "dippr-101", "clarke glew"))
        elif how == "form-missing":
            eq.pop("form", None)
        elif how == "form-type":
            eq["form"] = ch.pick((1, True, ["antoine"]))
        elif how == "expression-on-antoine" and eq.get("form") != "expression":
            eq["expression"] = "A - B/(T + C)"
        elif how == "phase-garbage":
            eq["phase"] = ch.pick(GARBAGE_PHASES + (1, True))
        elif how == "substance-empty" and isinstance(doc.get("sheet"), dict):
            doc["sheet"]["substance"] = ch.pick(("", "   ", "\t"))
        elif how == "substance-type" and isinstance(doc.get("sheet"), dict):
            doc["sheet"]["substance"] = ch.pick((1, ["toluene"], {"name": "x"}))
        elif how == "cas-type" and isinstance(doc.get("sheet"), dict):
            doc["sheet"]["cas"] = ch.pick((108883, ["108-88-3"]))
        elif how == "table-array":
            rows = doc["table"].get("rows", [[1.0, 2.0]]) if isinstance(doc.get("table"), dict) else [[1.0, 2.0]]
            doc.pop("table", None)
            doc[RAW_TAIL] = Raw("\n[[table]]\nrows = " + toml_value(rows) + "\n")
        elif how == "rows-scalar" and isinstance(doc.get("table"), dict):
            doc["table"]["rows"] = ch.pick(("20, 2.91", 3, {"a": 1}))
            n_rows = None
        elif how == "unit-type":
            eq[ch.pick(("T_unit", "P_unit"))] = ch.pick((1, ["K"], True))
        elif how == "gives-type":
            eq["gives"] = ch.pick((10, True, ["log10"]))
        elif how == "coefficients-list":
            eq["coefficients"] = [1.0, 2.0, 3.0]
        elif how == "empty-document":
            doc.clear()
    return n_rows


def _byte_hostility(ch: Chooser, text: str, features: list[str]) -> bytes:
    how = ch.pick(("latin-1", "cp1252", "utf-16", "bom", "stray-byte", "nul", "truncate", "flip", "duplicate-key",
                   "duplicate-section", "empty", "not-toml", "crlf", "overlong-utf8"))
    features.append(f"bytes-{how}")
    data = text.encode("utf-8")
    if how in ("latin-1", "cp1252"):
        marked = text.replace("SYNTHETIC sheet", "SYNTHETIC sheet — Müller °C", 1)
        return marked.encode(how, errors="replace")
    if how == "utf-16":
        return text.encode("utf-16")
    if how == "bom":
        return text.encode("utf-8-sig")
    if how == "stray-byte":
        i = ch.integer(0, len(data))
        return data[:i] + ch.pick((b"\xff", b"\xc3", b"\x80", b"\xed\xa0\x80")) + data[i:]
    if how == "nul":
        i = ch.integer(0, len(data))
        return data[:i] + b"\x00" + data[i:]
    if how == "truncate":
        return data[:ch.integer(0, len(data))]
    if how == "flip":
        i = ch.integer(0, max(len(text) - 1, 0))
        return (text[:i] + ch.pick(("[", "]", '"', "=", "\n", "{", "#", "'")) + text[i + 1:]).encode("utf-8")
    if how == "duplicate-key":
        return text.replace("[equation]\n", "[equation]\nform = \"antoine\"\n", 1).replace(
            "[sheet]\n", "[sheet]\nsubstance = \"x\"\nsubstance = \"y\"\n", 1).encode("utf-8")
    if how == "duplicate-section":
        return (text + "\n[sheet]\nsupplier = \"again\"\n").encode("utf-8")
    if how == "empty":
        return b""
    if how == "not-toml":
        return ch.pick((b"T/K,P/kPa\n300,3.5\n", b"\x89PNG\r\n\x1a\n", b"{\"sheet\": {}}", b"<?xml version=\"1.0\"?>"))
    if how == "crlf":
        return text.replace("\n", "\r\n").encode("utf-8")
    return data.replace(b"\"", b"\xc0\xa2", 1)  # an overlong encoding of '"'


# --------------------------------------------------------------------------- hypothesis and seeds


def sheets(family: str | None = None):
    """A hypothesis strategy of :class:`SheetCase` (of ``family`` if given)."""
    from hypothesis import strategies as st

    @st.composite
    def _sheets(draw):
        return generate_sheet(HypothesisChooser(draw), family)

    return _sheets()


def sheet_for_seed(seed: int, family: str | None = None) -> SheetCase:
    """The sheet a campaign draws for ``seed`` (deterministic)."""
    return generate_sheet(RandomChooser(seed), family)


# --------------------------------------------------------------------------- one run


def sheet_contract_failures(case: SheetCase, sheet, result) -> list[Failure]:
    """What the finished sheet audit promises, checked (see :func:`run_sheet`)."""
    out: list[Failure] = []

    def fail(what: str, message: str):
        out.append(Failure("contract", what, message))

    n = len(sheet.table.rows) if sheet.table is not None else 0
    if case.n_rows is not None and sheet.table is not None and n != case.n_rows:
        fail("rows", f"the sheet's table has {n} rows, {case.n_rows} were written")
    rows = [p.row for p in result.points]
    if rows != list(range(1, n + 1)):
        fail("rows", f"expected points for rows 1..{n} in order, got {len(rows)}: {rows[:8]}")
    if sheet.sha256 != hashlib.sha256(case.data).hexdigest():
        fail("input", "the sheet's sha256 is not that of its bytes")
    for c in result.checks:
        if c.message.startswith("internal error"):
            out.append(Failure("check", f"internal error in {c.id}", c.message))
    if tuple(result.internal_errors) != ():
        out.append(Failure("check", "internal error", "; ".join(result.internal_errors)))
    try:
        doc = result.to_findings()
    except Exception as exc:  # noqa: BLE001 -- recorded as a failure
        out.append(_failure("contract", exc))
        return out
    bad = non_finite_paths(doc)
    if bad:
        fail("non-finite", f"{len(bad)} non-finite number(s) in to_findings(): {bad[:3]}")
    if len(doc.get("points", ())) != n:
        fail("rows", f"findings hold {len(doc.get('points', ()))} points for {n} table rows")
    try:
        json.dumps(doc, allow_nan=False)
    except (TypeError, ValueError) as exc:
        fail("not JSON", f"to_findings() is not strict JSON: {exc}")
    else:
        # jsonschema is a test dependency: an ImportError here is a broken environment, not a skip
        import jsonschema

        from audit.schema import findings_schema

        # every violation, not only the first: one sheet often breaks the schema in two places
        errors = list(jsonschema.Draft202012Validator(findings_schema()).iter_errors(doc))
        if errors:
            fail("schema", "findings break the schema: " + "; ".join(
                f"at {e.json_path}: {e.message[:160]}" for e in errors[:4]))
    return out


def run_sheet(case: SheetCase, folder: Path, formats: tuple[str, ...] = ("json", "csv"),
              profile: str = "default") -> Outcome:
    """Read, audit and report one sheet; check everything promised.

    A failure is: an exception other than ``InputError`` from
    ``sheet_from_text``; any exception from ``run_sheet_audit`` (which runs
    with ``VPAUDIT_DEBUG=1``, so a check's exception surfaces here with its
    traceback instead of as an "internal error" skip) or from the writers; an
    internal error recorded anyway; points that are not the table's rows in
    order; a non-finite number in, or a schema violation of, ``to_findings()``;
    the input bytes or the sheet file changed.
    """
    from audit.errors import InputError
    from audit.sheet.read import sheet_from_text
    from audit.sheet.run import run_sheet_audit

    folder.mkdir(parents=True, exist_ok=True)
    path = folder / "supplier.sheet.toml"
    path.write_bytes(case.data)
    data = bytes(case.data)
    digest = hashlib.sha256(data).hexdigest()
    failures: list[Failure] = []
    kind, message = "findings", ""
    t0, c0 = time.perf_counter(), time.process_time()
    with _debug_env(), warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        sheet = result = None
        try:
            sheet = sheet_from_text(data, path.name)
        except InputError as exc:
            kind, message = "input-error", exc.message
        except Exception as exc:  # noqa: BLE001 -- any other exception from the reader is a bug
            failures.append(_failure("read", exc))
        if sheet is not None:
            try:
                result = run_sheet_audit(sheet, _profile(profile), audited_at=AUDIT_TIME)
            except Exception as exc:  # noqa: BLE001 -- a sheet the reader accepted must be audited
                failures.append(_failure("audit", exc))
        if result is not None:
            failures += sheet_contract_failures(case, sheet, result)
            try:
                from audit.report import write_outputs

                write_outputs(result, folder / "out", formats, input_bytes=path.read_bytes())
            except Exception as exc:  # noqa: BLE001
                failures.append(_failure("report", exc))
    seconds, cpu = time.perf_counter() - t0, time.process_time() - c0
    seen = tuple(dict.fromkeys(f"{w.filename.rsplit('/', 1)[-1]}:{w.lineno}: {w.category.__name__}: "
                               f"{str(w.message)[:80]}" for w in caught))
    if hashlib.sha256(data).hexdigest() != digest or data != case.data:
        failures.append(Failure("contract", "input modified", "the input bytes changed during the audit"))
    if path.read_bytes() != case.data:
        failures.append(Failure("contract", "input modified", f"{path.name} changed during the audit"))
    if failures:
        kind = "failure"
    n = len(sheet.table.rows) if sheet is not None and sheet.table is not None else 0
    return Outcome(kind, tuple(failures), message, seconds, n, cpu, seen)


def failure_report(case: SheetCase, outcome: Outcome, limit: int = 6000) -> str:
    """The sheet's description and text and each failure with its traceback (for a failing example)."""
    lines = [case.describe(), "----- sheet text -----", case.text[:limit], "----- failures -----"]
    for f in outcome.failures:
        lines.append(str(f))
        if f.trace:
            lines.append(f.trace)
    return "\n".join(lines)
