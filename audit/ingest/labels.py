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
_POLYMORPH = re.compile(r"^(?:cr|s|solid|crystal)([ivx]+|\d+|[αβγδ]|alpha|beta|gamma|delta)(?:g|v)?$")
_ROMAN = {"1": "I", "2": "II", "3": "III", "4": "IV", "5": "V"}
_GREEK = {"alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ"}


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
    key = _key(label)
    if key in _SOLID or _POLYMORPH.match(key):
        return "solid"
    if key in _LIQUID:
        return "liquid"
    return "unknown"


def _key(label: str) -> str:
    return re.sub(r"[\s\-_/+.(),]+", "", label).lower()


def crystal_form_from_label(label: str) -> str | None:
    """The crystal form a solid's label names, or None.

    ``'cr I'``, ``'crI'``, ``'cr1'`` and ``'s1'`` give ``'I'``; ``'cr II'``, ``'cr2'``
    give ``'II'``; ``'cr α'``/``'cr alpha'`` give ``'α'``; a plain ``'cr'``,
    ``'solid'`` or ``'ice'`` names no form, nor do ``'cr-v'`` and ``'s-v'``
    (crystal–vapor: read as the equilibrium, not as form V).

    Examples
    --------
    >>> [crystal_form_from_label(x) for x in ("cr II", "crI", "s-3", "cr β", "solid alpha", "cr", "cr-v")]
    ['II', 'I', 'III', 'β', 'α', None, None]
    """
    key = _key(label)
    m = _POLYMORPH.match(key)
    if not m or key in _SOLID:  # 'cr-v', 's-v': crystal-vapor, not form V
        return None
    form = m.group(1)
    return _ROMAN.get(form) or _GREEK.get(form) or (form.upper() if form.isascii() else form)
