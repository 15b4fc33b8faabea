"""The shared value methods of machines.frozen behave as the methods Python's dataclasses generate.

Reference: the standard library's ``dataclasses`` (the same class declared with ``@dataclass(frozen=True)`` or
``@dataclass``), compared on generated objects.
"""

from __future__ import annotations

import copy
import dataclasses
import pickle
from dataclasses import FrozenInstanceError, field

import pytest
from hypothesis import given
from hypothesis import strategies as st

from machines.frozen import frozen, mutable
from machines.model import Ratio


def _declare(decorator):
    @decorator
    class Part:
        a: float
        b: str = "x"
        c: tuple = ()
        note: str = field(default="", compare=False)
        secret: int = field(default=0, repr=False)

    return Part


Ours, Theirs = _declare(frozen), _declare(dataclasses.dataclass(frozen=True))
OursMutable, TheirsMutable = _declare(mutable), _declare(dataclasses.dataclass)
values = st.tuples(st.floats(allow_nan=False), st.sampled_from(["x", "y"]), st.sampled_from([(), (1,), (1, 2)]),
                   st.sampled_from(["", "n"]), st.integers(0, 2))


@given(values, values)
def test_equality_hash_and_repr_as_a_frozen_dataclass(u, v):
    ours, theirs = (Ours(*u), Ours(*v)), (Theirs(*u), Theirs(*v))
    assert (ours[0] == ours[1]) == (theirs[0] == theirs[1])
    assert hash(ours[0]) == hash(theirs[0])
    assert repr(ours[0]) == repr(theirs[0])


@given(values, values)
def test_a_mutable_record_compares_and_shows_as_a_dataclass(u, v):
    assert (OursMutable(*u) == OursMutable(*v)) == (TheirsMutable(*u) == TheirsMutable(*v))
    assert repr(OursMutable(*u)) == repr(TheirsMutable(*u))
    with pytest.raises(TypeError):
        hash(OursMutable(*u))


def test_no_field_can_be_assigned_or_deleted_and_nothing_added():
    p = Ours(1.0)
    for action in (lambda: setattr(p, "a", 2.0), lambda: delattr(p, "a"), lambda: setattr(p, "other", 1)):
        with pytest.raises(FrozenInstanceError):
            action()
    assert p.a == 1.0


def test_another_class_is_never_equal():
    assert Ours(1.0) != Theirs(1.0)
    assert Ours(1.0) != (1.0, "x", (), "", 0)


def test_replace_copy_and_pickle_keep_the_value():
    p = Ours(1.0, "y", (1,), "n", 2)
    assert dataclasses.replace(p, a=3.0) == Ours(3.0, "y", (1,), "n", 2)
    assert copy.copy(p) == p and copy.deepcopy(p) == p
    r = Ratio(200.0, 1.0)
    assert pickle.loads(pickle.dumps(r)) == r and hash(pickle.loads(pickle.dumps(r))) == hash(r)


def test_a_frozen_class_cannot_define_its_own_setattr():
    with pytest.raises(TypeError, match="__setattr__"):
        @frozen
        class Bad:
            a: float

            def __setattr__(self, name, value):  # pragma: no cover - refused before any instance
                object.__setattr__(self, name, value)
