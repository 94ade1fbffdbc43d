"""The Tsonopoulos class of a substance: which polar terms its second virial coefficient takes.

Tsonopoulos [1] gives the reduced second virial coefficient a nonpolar part
(from Tc, Pc, ω) plus polar terms a/Tr⁶ − b/Tr⁸ whose form depends on the
kind of molecule: none for nonpolar ones; a = −2.14·10⁻⁴ μr − 4.308·10⁻²¹ μr⁸
for ketones, aldehydes, ethers, esters and nitriles; a = 0.0878 with
b = 0.00908 + 0.0006957 μr for aliphatic alcohols (methanol: b = 0.0525);
water its own.  Which kind a substance is follows from its functional group.

The table below names the kind of common solvents by CAS number — the
functional group of each is textbook chemistry, not a fitted value — and
:func:`tsonopoulos_class` says which kind was used and why.  A class given
in the metadata file (``tsonopoulos_class``) always wins; a substance not
in the table is taken as nonpolar, and the finding's notes say so.

References
----------
.. [1] C. Tsonopoulos, "An empirical correlation of second virial
   coefficients", AIChE J. 20, 263-272 (1974), doi:10.1002/aic.690200209.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["TSONOPOULOS_CLASSES", "CLASS_BY_CAS", "TsonopoulosClass", "tsonopoulos_class"]

#: kinds the correlation distinguishes (see :func:`audit.thermo.enthalpy.tsonopoulos_polar_terms`)
TSONOPOULOS_CLASSES = ("nonpolar", "water", "methanol", "alkanol", "ketone", "aldehyde", "ether", "ester",
                       "nitrile")

#: CAS number -> (kind, common name, functional group)
CLASS_BY_CAS: dict[str, tuple[str, str, str]] = {
    "7732-18-5": ("water", "water", "water"),
    "67-56-1": ("methanol", "methanol", "alcohol (methanol has terms of its own)"),
    "64-17-5": ("alkanol", "ethanol", "aliphatic alcohol"),
    "71-23-8": ("alkanol", "1-propanol", "aliphatic alcohol"),
    "67-63-0": ("alkanol", "2-propanol", "aliphatic alcohol"),
    "71-36-3": ("alkanol", "1-butanol", "aliphatic alcohol"),
    "78-92-2": ("alkanol", "2-butanol", "aliphatic alcohol"),
    "78-83-1": ("alkanol", "2-methyl-1-propanol", "aliphatic alcohol"),
    "75-65-0": ("alkanol", "2-methyl-2-propanol", "aliphatic alcohol"),
    "71-41-0": ("alkanol", "1-pentanol", "aliphatic alcohol"),
    "111-27-3": ("alkanol", "1-hexanol", "aliphatic alcohol"),
    "67-64-1": ("ketone", "acetone", "ketone"),
    "78-93-3": ("ketone", "2-butanone", "ketone"),
    "108-10-1": ("ketone", "4-methyl-2-pentanone", "ketone"),
    "108-94-1": ("ketone", "cyclohexanone", "ketone"),
    "75-07-0": ("aldehyde", "acetaldehyde", "aldehyde"),
    "123-38-6": ("aldehyde", "propanal", "aldehyde"),
    "60-29-7": ("ether", "diethyl ether", "ether"),
    "1634-04-4": ("ether", "methyl tert-butyl ether", "ether"),
    "109-99-9": ("ether", "tetrahydrofuran", "ether"),
    "115-10-6": ("ether", "dimethyl ether", "ether"),
    "141-78-6": ("ester", "ethyl acetate", "ester"),
    "79-20-9": ("ester", "methyl acetate", "ester"),
    "123-86-4": ("ester", "butyl acetate", "ester"),
    "107-31-3": ("ester", "methyl formate", "ester"),
    "75-05-8": ("nitrile", "acetonitrile", "nitrile"),
    "107-12-0": ("nitrile", "propionitrile", "nitrile"),
}


@dataclass(frozen=True)
class TsonopoulosClass:
    """The kind used (one of :data:`TSONOPOULOS_CLASSES`) and, in words, why."""

    kind: str
    reason: str


def tsonopoulos_class(cas: str | None, given: str | None = None) -> TsonopoulosClass:
    """The Tsonopoulos kind of a substance: as given, else by its functional group, else nonpolar.

    Parameters
    ----------
    cas : str or None
        CAS registry number (a name, no unit), or None when unknown.
    given : str, optional
        Name of the kind stated in the metadata file; wins when present.

    Returns
    -------
    TsonopoulosClass
        The kind's name and the reason for it.

    Examples
    --------
    >>> tsonopoulos_class("64-17-5").kind
    'alkanol'
    >>> tsonopoulos_class("67-64-1", given="nonpolar").reason
    'given in the metadata file'
    """
    if given:
        kind = given.strip().lower()
        if kind not in TSONOPOULOS_CLASSES:
            raise ValueError(f"unknown Tsonopoulos class {given!r}; one of {', '.join(TSONOPOULOS_CLASSES)}")
        return TsonopoulosClass(kind, "given in the metadata file")
    entry = CLASS_BY_CAS.get((cas or "").strip())
    if entry is not None:
        kind, name, group = entry
        return TsonopoulosClass(kind, f"{name} (CAS {cas}) is a{'n' if group[0] in 'aeiou' else ''} {group}")
    return TsonopoulosClass("nonpolar", "no polar class known for the substance (give tsonopoulos_class in "
                                        "the metadata file for a polar one); nonpolar assumed")
