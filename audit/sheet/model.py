"""A supplier's vapor-pressure sheet as read: its equation, what it says the
equation's units are, its stated range and its table, all as printed.

Nothing here is interpreted: :mod:`audit.sheet.decode` decides what the
coefficients really are.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal, Mapping

LogBase = Literal["log10", "ln", "none"]

#: the equation forms a sheet may name, with their coefficient names (required, optional)
SHEET_FORMS: Mapping[str, tuple[tuple[str, ...], tuple[str, ...]]] = {
    "antoine": (("A", "B", "C"), ()),
    "antoine-extended": (("A", "B", "C"), ("D", "E", "F")),
    "clausius-clapeyron": (("A", "B"), ()),
    "wagner-2.5-5": (("a", "b", "c", "d", "Tc", "Pc"), ()),
    "wagner-3-6": (("a", "b", "c", "d", "Tc", "Pc"), ()),
    "clarke-glew": (("theta", "dG", "dH", "dCp"), ("d_dCp_dT",)),
    "expression": ((), ()),
}


@dataclass(frozen=True)
class StatedReading:
    """What the sheet says its equation gives and in which units (None: not stated).

    Attributes
    ----------
    log : {'log10', 'ln', 'none'} or None
        The equation gives log10 P, ln P, or P itself.
    T_unit : str or None
        Canonical temperature unit of the coefficients (``'K'``, ``'degC'``, ``'degF'``).
    P_unit : str or None
        Canonical pressure unit (``'Pa'``, ``'kPa'``, ``'mmHg'``, … as :mod:`audit.units` names them).
    """

    log: LogBase | None
    T_unit: str | None
    P_unit: str | None

    @property
    def complete(self) -> bool:
        return None not in (self.log, self.T_unit, self.P_unit)


@dataclass(frozen=True)
class SheetRow:
    """One row of the sheet's table, as printed and (when readable) as a number in its unit."""

    row: int
    T_text: str
    P_text: str
    T_value: float | None
    P_value: float | None
    reason: str | None = None


@dataclass(frozen=True)
class SheetTable:
    """The sheet's table: rows as printed, in the table's own units.

    ``units_given`` says whether the table states units of its own; when it does
    not, it shares the equation's (and a wrong unit note then applies to both).
    """

    rows: tuple[SheetRow, ...]
    T_unit: str
    P_unit: str
    units_given: bool
    u_P_percent: float | None = None


@dataclass(frozen=True)
class Sheet:
    """A vapor-pressure sheet.

    Attributes
    ----------
    file_name, sha256 : str
        The sheet file and the SHA-256 of its bytes.
    substance, cas : str or None
        The substance as named on the sheet.
    supplier, product : str or None
        Free text, shown in the report.
    form : str
        One of :data:`SHEET_FORMS`.
    coefficients : mapping of str to float
        As printed (in the units the sheet really uses, whatever it states).
    expression : str or None
        The formula of an ``expression`` sheet, as printed.
    stated : StatedReading
    T_range : (float, float) or None
        The stated validity range, in the stated temperature unit.
    phase : {'liquid', 'solid'}
        The phase the equation describes (liquid when not stated).
    table : SheetTable or None
    text : str
        The sheet file's text (embedded in the archived report).
    notes : tuple of str
        Decisions made while reading.
    """

    file_name: str
    sha256: str
    substance: str | None
    cas: str | None
    form: str
    coefficients: Mapping[str, float]
    stated: StatedReading
    T_range: tuple[float, float] | None
    phase: str = "liquid"
    expression: str | None = None
    table: SheetTable | None = None
    supplier: str | None = None
    product: str | None = None
    text: str = field(default="", repr=False)
    notes: tuple[str, ...] = ()
    #: the [reference_equation] table of the sheet, kept verbatim (see audit.checks.reference_agreement)
    reference_equation: Mapping | None = None
