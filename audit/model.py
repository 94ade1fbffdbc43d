"""The dataset model: what every stage after ingest sees.

Ingest turns a file of any layout into a :class:`Dataset`; nothing downstream
knows the file format.  Values are SI (kelvin, pascal); every input data row is
present exactly once, in input order, with the original text of its cells, so
that later checks can read the printed digits (rounding, transposed digits) and
the annotated CSV can reproduce the input unchanged.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Literal, Mapping

Phase = Literal["solid", "liquid", "unknown"]
IngestStatus = Literal["ok", "unreadable"]

PHASES: tuple[str, ...] = ("solid", "liquid", "unknown")


def is_solid(branch: str) -> bool:
    """True for the solid branch and for the branch of one crystal form ('solid II')."""
    return branch == "solid" or branch.startswith("solid ")


def base_phase(branch: str) -> str:
    """'solid' for any solid branch, else the branch itself ('liquid', 'unknown')."""
    return "solid" if is_solid(branch) else branch


def crystal_form_of(branch: str) -> str | None:
    """The crystal form a branch is of ('II' for 'solid II'), None for the others."""
    return branch[len("solid "):] if branch.startswith("solid ") else None


@dataclass(frozen=True)
class Point:
    """One input data row, normalised.

    Attributes
    ----------
    row : int
        1-based number of the data row (the first row under the header is 1).
    T_K, P_Pa : float or None
        Temperature [K] and pressure [Pa]; ``None`` when the cell could not be
        read as a number.
    phase : {'solid', 'liquid', 'unknown'}
        Phase as labelled in the input (``unknown`` when no label was given).
    source : str or None
        Source label, as printed.
    u_T_K, u_P_Pa : float or None
        Standard uncertainties [K], [Pa] (a relative u(P) is already converted).
    T_text, P_text : str
        The temperature and pressure cells exactly as printed.
    status : {'ok', 'unreadable'}
        Ingest status; later checks may mark a readable point suspect or reject.
    reason : str or None
        Why a point is unreadable.
    P_text_unit : str
        Unit of the printed pressure (e.g. ``'mmHg'``), or ``'log10(P/Pa)'``
        style for log columns; lets a check reason about the printed digits.
    T_text_unit : str
        Unit of the printed temperature (``'K'``, ``'degC'``, ...).
    """

    row: int
    T_K: float | None
    P_Pa: float | None
    phase: Phase = "unknown"
    source: str | None = None
    u_T_K: float | None = None
    u_P_Pa: float | None = None
    T_text: str = ""
    P_text: str = ""
    status: IngestStatus = "ok"
    reason: str | None = None
    T_text_unit: str = "K"
    P_text_unit: str = "Pa"
    #: the crystal form a solid row's label names ('I', 'II', 'α', …), None when it names none
    crystal_form: str | None = None

    @property
    def readable(self) -> bool:
        return self.status == "ok" and self.T_K is not None and self.P_Pa is not None


@dataclass(frozen=True)
class Constant:
    """A reference constant with its provenance (SI value)."""

    value: float
    unit: str
    source: str
    uncertainty: float | None = None

    def to_dict(self) -> dict:
        d = {"value": self.value, "unit": self.unit, "source": self.source}
        if self.uncertainty is not None:
            d["uncertainty"] = self.uncertainty
        return d


#: Names of the reference constants the audit understands, with their SI unit.
CONSTANT_UNITS: Mapping[str, str] = {
    "molar_mass": "kg/mol",
    "T_triple": "K",
    "P_triple": "Pa",
    "T_melting": "K",
    "T_critical": "K",
    "P_critical": "Pa",
    "acentric_factor": "1",
    "T_boiling": "K",
    "dH_fusion": "J/mol",
    "dipole_moment": "debye",
    "V_solid": "m^3/mol",
    "Z_rackett": "1",
    "dH_vap_calorimetric": "J/mol",
    "T_dH_vap_calorimetric": "K",
    "dH_sub_calorimetric": "J/mol",
    "T_dH_sub_calorimetric": "K",
}


@dataclass(frozen=True)
class Metadata:
    """What is known about the substance, and how the table was read."""

    substance: str | None = None
    cas: str | None = None
    constants: Mapping[str, Constant] = field(default_factory=dict)
    #: free-form extra information (e.g. a reference equation), kept as read
    extra: Mapping[str, object] = field(default_factory=dict)

    def get(self, name: str) -> float | None:
        c = self.constants.get(name)
        return None if c is None else c.value


@dataclass(frozen=True)
class ColumnRole:
    """How one input column was interpreted."""

    role: str  # "T", "P", "phase", "source", "u_T", "u_P"
    column: str  # header as printed
    unit: str | None = None  # unit as understood, e.g. "degC", "mmHg", "%"
    log: str | None = None  # None, "log10" or "ln" for log-pressure columns
    how: str = "header"  # "header", "command line", "metadata file"


@dataclass(frozen=True)
class Dataset:
    """A vapor-pressure table in SI with every row kept.

    Attributes
    ----------
    points : tuple of Point
        One per input data row, in input order.
    header : tuple of str
        Column names as printed, in input order.
    cells : tuple of tuple of str
        Every input data row's cells as printed (same order as ``header``).
    columns : tuple of ColumnRole
        Which column was read as what.
    metadata : Metadata
    file_name : str
        The input file name as given.
    sha256 : str
        SHA-256 of the input file's bytes.
    file_format : str
        ``csv``, ``tsv``, ``csv-semicolon``, ``xlsx`` or ``json``.
    notes : tuple of str
        What ingest decided on the user's behalf (encoding, decimal comma, ...).
    """

    points: tuple[Point, ...]
    header: tuple[str, ...] = ()
    cells: tuple[tuple[str, ...], ...] = ()
    columns: tuple[ColumnRole, ...] = ()
    metadata: Metadata = field(default_factory=Metadata)
    file_name: str = ""
    sha256: str = ""
    file_format: str = ""
    notes: tuple[str, ...] = ()

    @property
    def n_rows(self) -> int:
        return len(self.points)

    def readable_points(self) -> list[Point]:
        return [p for p in self.points if p.readable and _finite_positive(p)]

    @property
    def sources(self) -> list[str]:
        seen: dict[str, None] = {}
        for p in self.points:
            if p.source:
                seen.setdefault(p.source, None)
        return list(seen)


def _finite_positive(p: Point) -> bool:
    return (
        p.T_K is not None
        and p.P_Pa is not None
        and math.isfinite(p.T_K)
        and math.isfinite(p.P_Pa)
        and p.T_K > 0
        and p.P_Pa > 0
    )


def from_arrays(T_K, P_Pa, *, phase=None, source=None, u_T_K=None, u_P_Pa=None,
                substance=None, constants=None, file_name="<arrays>") -> Dataset:
    """Build a dataset from arrays (tests, benchmarks, programmatic use).

    The printed text of each value is its ``repr`` in SI.
    """
    n = len(T_K)

    def pick(seq, i):
        if seq is None:
            return None
        if isinstance(seq, str):
            return seq
        return seq[i]

    pts = []
    for i in range(n):
        T = float(T_K[i])
        P = float(P_Pa[i])
        pts.append(Point(
            row=i + 1, T_K=T, P_Pa=P,
            phase=pick(phase, i) or "unknown",
            source=pick(source, i),
            u_T_K=None if pick(u_T_K, i) is None else float(pick(u_T_K, i)),
            u_P_Pa=None if pick(u_P_Pa, i) is None else float(pick(u_P_Pa, i)),
            T_text=repr(T), P_text=repr(P),
        ))
    consts = {k: (v if isinstance(v, Constant) else Constant(float(v), CONSTANT_UNITS.get(k, ""), "given"))
              for k, v in (constants or {}).items()}
    header = ("T/K", "P/Pa")
    cells = tuple((p.T_text, p.P_text) for p in pts)
    return Dataset(points=tuple(pts), header=header, cells=cells,
                   columns=(ColumnRole("T", "T/K", "K"), ColumnRole("P", "P/Pa", "Pa")),
                   metadata=Metadata(substance=substance, constants=consts),
                   file_name=file_name, sha256="", file_format="arrays")
