"""Phase labels as printed -> the model's phase vocabulary.

Solid–vapor (sublimation) and liquid–vapor (vaporization) equilibria are
labelled in many ways: ``s``, ``cr``, ``ice``, ``cr-g``, ``l``, ``liq``,
``l/v``...  Labels not recognised map to ``'unknown'``; the caller reports
which labels those were, so nothing is decided silently.
"""

from __future__ import annotations

import re

_SOLID = {"solid", "s", "cr", "c", "crystal", "crystals", "crystalline", "cryst", "ice",
          "iceih", "iceh", "sol", "sub", "subl", "sublimation", "sv", "sg", "crg", "crv",
          "solidvapor", "solidvapour", "solidgas"}
_LIQUID = {"liquid", "l", "liq", "lq", "melt", "lv", "lg", "liquidvapor", "liquidvapour",
           "liquidgas", "vaporization", "vaporisation", "evaporation", "supercooledliquid",
           "subcooledliquid", "supercooled", "subcooled", "scl"}
_POLYMORPH = re.compile(r"^(?:cr|s|solid|crystal)(?:[ivx]+|\d+|[αβγδ])(?:g|v)?$")


def phase_from_label(label: str) -> str:
    """Map a printed phase label to ``'solid'``, ``'liquid'`` or ``'unknown'``.

    Parameters
    ----------
    label : str
        As printed, e.g. ``'cr II'``, ``'Liquid'``, ``'l-g'``.

    Returns
    -------
    str
        ``'solid'``, ``'liquid'`` or ``'unknown'`` (also for an empty label).
    """
    key = re.sub(r"[\s\-_/+.()]+", "", label).lower()
    if key in _SOLID or _POLYMORPH.match(key):
        return "solid"
    if key in _LIQUID:
        return "liquid"
    return "unknown"
