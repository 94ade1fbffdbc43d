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

from dataclasses import replace

from .errors import InputError
from .model import Constant, Dataset

# constant name -> (chemicals function, its *_methods lister, SI unit)
_LOOKUPS = {
    "T_critical": ("critical", "Tc", "Tc_methods", "K"),
    "P_critical": ("critical", "Pc", "Pc_methods", "Pa"),
    "acentric_factor": ("acentric", "omega", "omega_methods", "1"),
    "T_boiling": ("phase_change", "Tb", "Tb_methods", "K"),
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
            methods = getattr(mod, lister)(cas)
            value = getattr(mod, func)(cas)
        except Exception:  # the library has no value: leave the constant unknown
            continue
        if value is None or not methods:
            continue
        consts[name] = Constant(float(value), unit, f"{version}, data set {methods[0]} (CAS {cas})")
    return found.common_name or name_or_cas, cas, consts


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
