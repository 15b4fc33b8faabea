"""Bad files of every kind: any mutation of a real machine file is read, studied and printed, or refused with our
one-line error; nothing else ever escapes (no traceback reaches a practitioner)."""

from __future__ import annotations

import tomllib
import warnings

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from machines.errors import InputError
from machines.files import case_from_dict
from machines.study import run_study

from conftest import EXAMPLES

BASES = [tomllib.loads(p.read_text("utf-8")) for p in sorted(EXAMPLES.glob("*.toml"))]
JUNK = st.one_of(
    st.sampled_from(["", "0", "-1 A", "1e30 A", "nan", "inf V", "abc", "1 kV", "0.01 s", "1000 s", "99 pu",
                     "0.5 pu", "3 pu", "C50", "5P20", "5/1 A", "1/1 V", "60 Hz", "1 rpm", "3600 rpm", "1 MVA",
                     "1 kW", "1e-9 uF", "100 uF", "1 ohm", "1e6 ohm", "A", "Z", "breaker", "solid", "x" * 300]),
    st.integers(-10, 10**6), st.floats(allow_nan=True, allow_infinity=True), st.booleans(),
    st.lists(st.integers(), max_size=2), st.dictionaries(st.text(max_size=3), st.integers(), max_size=2),
    st.text(max_size=40),
)
SCALES = st.sampled_from([0.01, 0.1, 0.5, 0.9, 1.1, 2.0, 10.0, 100.0])


def _leaves(table: dict, path=()):
    for k, v in table.items():
        if isinstance(v, dict):
            yield from _leaves(v, path + (k,))
        else:
            yield path + (k,), v


@st.composite
def mutated(draw):
    import copy

    data = copy.deepcopy(draw(st.sampled_from(BASES)))
    paths = list(_leaves(data))
    for _ in range(draw(st.integers(1, 3))):
        path, value = draw(st.sampled_from(paths))
        table = data
        for k in path[:-1]:
            table = table[k]
        how = draw(st.sampled_from(["delete", "junk", "scale"]))
        if how == "delete":
            table.pop(path[-1], None)
        elif how == "junk":
            table[path[-1]] = draw(JUNK)
        elif isinstance(value, str) and value[:1].isdigit():
            number, _, unit = value.partition(" ")
            try:
                table[path[-1]] = f"{float(number) * draw(SCALES):g} {unit}".strip()
            except ValueError:
                pass
    return data


@settings(max_examples=300, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_any_mutated_file_is_studied_or_refused_with_our_error(data):
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)  # a NaN or overflow inside the study is a bug too
        try:
            case, found = case_from_dict(data)
        except InputError as e:
            assert "\n" not in str(e) and str(e).split(":")[0]
            return
        try:
            record = run_study(case, found)
        except InputError as e:  # e.g. an override the study cannot use
            assert "\n" not in str(e)
            return
        text = record.dumps()
    assert '"format": "relaywright.settings/1"' in text
    assert "NaN" not in text and "Infinity" not in text


@pytest.mark.parametrize("text", ["", "[", "format = 1", "x = [1, 2", "\x00", "a = \"\\u0000\"", "[[machine]]",
                                  "format = \"relaywright.machine/1\"\nmachine = 5"])
def test_broken_toml_is_refused_with_one_line(tmp_path, text):
    from machines.files import load_case

    p = tmp_path / "m.toml"
    p.write_text(text, "utf-8")
    with pytest.raises(InputError) as err:
        load_case(p)
    assert "\n" not in str(err.value) and str(err.value).startswith(str(p))
