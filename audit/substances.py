"""Reference constants of a named substance from a property library.

Given ``--substance NAME`` (or a CAS number), the critical constants,
acentric factor, normal boiling point, triple point, melting point, enthalpy of fusion,
dipole moment and molar mass come from the ``chemicals`` package (PyPI),
which names the data set each value is taken from; that name goes into the
constant's ``source``.  Values given in the metadata file always win over
library values.  ``chemicals`` is imported only when a substance is looked
up, so the audit itself stays cheap to import.
"""

from __future__ import annotations

import math
from dataclasses import replace

from .errors import InputError
from .model import Constant, Dataset

# constant name -> (chemicals function, its *_methods lister, SI unit)
_LOOKUPS = {
    "T_boiling": ("phase_change", "Tb", "Tb_methods", "K"),  # first: Tc is checked against it
    "T_critical": ("critical", "Tc", "Tc_methods", "K"),
    "P_critical": ("critical", "Pc", "Pc_methods", "Pa"),
    "acentric_factor": ("acentric", "omega", "omega_methods", "1"),
    "T_triple": ("triple", "Tt", "Tt_methods", "K"),
    "P_triple": ("triple", "Pt", "Pt_methods", "Pa"),
    "T_melting": ("phase_change", "Tm", "Tm_methods", "K"),
    "dH_fusion": ("phase_change", "Hfus", "Hfus_methods", "J/mol"),
    "dipole_moment": ("dipole", "dipole_moment", "dipole_moment_methods", "debye"),
}


def library_constants(name_or_cas: str) -> tuple[str, str, dict[str, Constant]]:
    """Look up (common name, CAS, constants) of a substance in ``chemicals``."""
    import importlib

    try:
        import chemicals
        from chemicals.identifiers import search_chemical
    except ImportError:  # pragma: no cover - a declared dependency
        raise InputError("the property library 'chemicals' is not installed",
                         hint="pip install chemicals, or give the constants in the metadata file") from None
    try:
        found = search_chemical(name_or_cas)
    except Exception:
        raise InputError(f"substance {name_or_cas!r} not found in the property library "
                         f"(chemicals {chemicals.__version__})",
                         hint="check the spelling or give a CAS number, or put the constants in the "
                              "metadata file") from None
    cas = found.CASs
    version = f"chemicals {chemicals.__version__}"
    consts: dict[str, Constant] = {}
    if found.MW:
        consts["molar_mass"] = Constant(found.MW / 1000, "kg/mol", f"{version}, identifiers database")
    for name, (module, func, lister, unit) in _LOOKUPS.items():
        mod = importlib.import_module(f"chemicals.{module}")
        try:
            methods = list(getattr(mod, lister)(cas))
        except Exception:  # the library has no value: leave the constant unknown
            continue
        # the library's first data set is its preferred one, but a set can carry a plain error
        # (phenanthrene's Tc is 0.869 K in one of them): the first value that is physically
        # possible is taken, and the ones passed over are named
        passed_over = []
        for method in methods:
            try:
                value = getattr(mod, func)(cas, method=method)
            except Exception:
                continue
            if value is None or not _plausible(name, float(value), consts):
                passed_over.append(f"{method}: {value}")
                continue
            source = f"{version}, data set {method} (CAS {cas})"
            if passed_over:
                source += f"; passed over as impossible: {', '.join(passed_over)}"
            consts[name] = Constant(float(value), unit, source)
            break
    return found.common_name or name_or_cas, cas, consts


def _plausible(name: str, value: float, known: dict[str, Constant]) -> bool:
    """Whether a library value can be physical (bounds are generous: they catch unit and
    transcription errors, not inaccuracy)."""
    if not math.isfinite(value):
        return False
    Tb = known.get("T_boiling")
    if name in ("T_critical", "T_boiling", "T_triple", "T_melting"):
        if not 1.0 < value < 10000.0:
            return False
        if name == "T_critical" and Tb is not None and value <= Tb.value:
            return False
        return True
    if name in ("P_critical", "P_triple"):
        return 0.0 < value < 1e9
    return True


def with_library_constants(dataset: Dataset, substance: str | None) -> Dataset:
    """Return ``dataset`` with library constants added where the metadata has none."""
    if not substance:
        return dataset
    common, cas, consts = library_constants(substance)
    merged = dict(consts)
    merged.update(dataset.metadata.constants)  # the user's metadata wins
    md = replace(dataset.metadata, substance=dataset.metadata.substance or substance,
                 cas=dataset.metadata.cas or cas, constants=merged)
    note = (f"reference constants for {common} (CAS {cas}) from the chemicals library where the "
            f"metadata gave none: {', '.join(sorted(set(consts) - set(dataset.metadata.constants))) or 'none'}")
    return replace(dataset, metadata=md, notes=dataset.notes + (note,))
