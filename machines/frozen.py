"""Frozen value classes: ``@dataclass(frozen=True)`` with equality, hash and repr defined once for all of them.

Python 3.11 compiles six methods for every frozen dataclass when its module is imported (``__init__``,
``__repr__``, ``__eq__``, ``__hash__``, ``__setattr__``, ``__delattr__``); with some thirty such classes on every
command's path that was a tenth of a ``relaywright settings`` process. :func:`frozen` lets the dataclass machinery
compile only ``__init__``, the one method that differs from class to class, and gives every class the same
methods for the rest, with the meaning the generated ones have (Python documentation, ``dataclasses``: *eq*,
*frozen*, *unsafe_hash* and *repr*): two objects are equal when they are of the same class and their compared
fields are equal, the hash is the hash of those fields, the repr names the class and its ``repr=True`` fields, and
once ``__init__`` has set a field no field can be assigned or deleted (:class:`dataclasses.FrozenInstanceError`).
:func:`mutable` does the same for mutable record classes (equality and repr shared, unhashable).

>>> from dataclasses import field
>>> @frozen
... class Ratio:
...     primary: float
...     secondary: float = 1.0
...     note: str = field(default="", compare=False)
>>> Ratio(200.0) == Ratio(200.0, 1.0, "other note"), hash(Ratio(200.0)) == hash((200.0, 1.0))
(True, True)
>>> Ratio(200.0)
Ratio(primary=200.0, secondary=1.0, note='')
>>> Ratio(200.0).primary = 100.0
Traceback (most recent call last):
dataclasses.FrozenInstanceError: cannot assign to field 'primary'
"""

from __future__ import annotations

from dataclasses import FrozenInstanceError, dataclass, fields
from typing import TypeVar

T = TypeVar("T")

_COMPARED: dict[type, tuple[str, ...]] = {}
_HASHED: dict[type, tuple[str, ...]] = {}
_SHOWN: dict[type, tuple[str, ...]] = {}
_FIELDS: dict[type, frozenset[str]] = {}


def _names(cache: dict[type, tuple[str, ...]], cls: type, keep) -> tuple[str, ...]:
    names = cache.get(cls)
    if names is None:
        names = cache[cls] = tuple(f.name for f in fields(cls) if keep(f))
    return names


def _compared(cls: type) -> tuple[str, ...]:
    return _names(_COMPARED, cls, lambda f: f.compare)


def value_eq(self, other) -> bool:
    """Equal when of the same class with equal compared fields (as a dataclass's generated ``__eq__``)."""
    if other.__class__ is not self.__class__:
        return NotImplemented
    return all(getattr(self, n) == getattr(other, n) for n in _compared(self.__class__))


def value_hash(self) -> int:
    """The hash of the hashed fields: ``hash=True``, or compared with ``hash=None`` (as a frozen dataclass's)."""
    names = _names(_HASHED, self.__class__, lambda f: f.hash if f.hash is not None else f.compare)
    return hash(tuple(getattr(self, n) for n in names))


def value_repr(self) -> str:
    """``Class(field=value, ...)`` over the ``repr=True`` fields (as a dataclass's generated ``__repr__``)."""
    names = _names(_SHOWN, self.__class__, lambda f: f.repr)
    return f"{self.__class__.__qualname__}(" + ", ".join(f"{n}={getattr(self, n)!r}" for n in names) + ")"


def set_once(self, name: str, value) -> None:
    """A field is set by ``__init__`` and never again; nothing else is set (as a frozen dataclass)."""
    names = _FIELDS.get(self.__class__)
    if names is None:
        names = _FIELDS[self.__class__] = frozenset(f.name for f in fields(self.__class__))
    if name in self.__dict__ or name not in names:
        raise FrozenInstanceError(f"cannot assign to field {name!r}")
    object.__setattr__(self, name, value)


def never_delete(self, name: str) -> None:
    """No field is deleted (as a frozen dataclass)."""
    raise FrozenInstanceError(f"cannot delete field {name!r}")


def _share(cls: type, methods: tuple) -> None:
    """Give ``cls`` the shared methods it does not define itself (the dataclass machinery keeps a class's own)."""
    for name, method in methods:
        if name not in cls.__dict__ or (name == "__hash__" and cls.__dict__[name] is None):
            setattr(cls, name, method)


def frozen(cls: type[T]) -> type[T]:
    """``@dataclass(frozen=True)`` with the shared methods of the module notes."""
    own = {n for n in ("__setattr__", "__delattr__") if n in cls.__dict__}
    if own:
        raise TypeError(f"{cls.__name__} is frozen: it cannot define {', '.join(sorted(own))}")
    cls = dataclass(eq=False, repr=False)(cls)
    _share(cls, (("__eq__", value_eq), ("__hash__", value_hash), ("__repr__", value_repr),
                 ("__setattr__", set_once), ("__delattr__", never_delete)))
    return cls


def mutable(cls: type[T]) -> type[T]:
    """``@dataclass`` (mutable, compared by value, unhashable) with the shared equality and repr."""
    cls = dataclass(eq=False, repr=False)(cls)
    _share(cls, (("__eq__", value_eq), ("__repr__", value_repr)))
    if "__hash__" not in cls.__dict__:
        cls.__hash__ = None
    return cls
