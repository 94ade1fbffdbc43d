"""A read-only mapping for frozen results and profiles."""

from __future__ import annotations

from typing import Mapping

__all__ = ["FrozenMapping", "frozen", "thawed"]


class FrozenMapping(Mapping):
    """A read-only mapping that pickles (``types.MappingProxyType`` does not), so that a
    resolved profile travels to worker processes and Dask workers with the audit."""

    __slots__ = ("_data",)

    def __init__(self, data=()):
        object.__setattr__(self, "_data", dict(data))

    def __getitem__(self, key):
        return self._data[key]

    def __iter__(self):
        return iter(self._data)

    def __len__(self):
        return len(self._data)

    def __repr__(self):
        return f"FrozenMapping({self._data!r})"

    def __reduce__(self):
        return (FrozenMapping, (self._data,))

    def __setattr__(self, name, value):
        raise AttributeError("a FrozenMapping cannot be changed")


def frozen(value):
    """``value`` with every mapping (at any depth) made a FrozenMapping and every list a tuple:
    a frozen dataclass then holds nothing a caller could change behind its back."""
    if isinstance(value, FrozenMapping):
        return value
    if isinstance(value, Mapping):
        return FrozenMapping({k: frozen(v) for k, v in value.items()})
    if isinstance(value, list):
        return tuple(frozen(v) for v in value)
    return value


def thawed(value):
    """The plain-JSON shape of a frozen value: mappings as dicts, tuples as lists (at any depth)."""
    if isinstance(value, Mapping):
        return {k: thawed(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [thawed(v) for v in value]
    return value
