"""Bad files of every kind: any mutation of a real machine file is read, studied and printed, or refused with our
one-line error; nothing else ever escapes (no traceback reaches a practitioner), and nothing non-finite reaches
any output (JSON record, terminal table, the sheet's printed text).

The fuzz runs are derandomised (the same cases on every run). ``RELAYWRIGHT_FUZZ_CASES=10000`` runs more of them
by hand.
"""

from __future__ import annotations

import copy
import io
import json
import math
import os
import re
import tomllib
import warnings
from collections import Counter
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from machines.errors import InputError
from machines.files import case_from_dict, parse_toml
from machines.study import run_study

from conftest import EXAMPLES

BASES = [tomllib.loads(p.read_text("utf-8")) for p in sorted(EXAMPLES.glob("*.toml"))]
TEXTS = [p.read_text("utf-8") for p in sorted(EXAMPLES.glob("*.toml"))]
CASES = int(os.environ.get("RELAYWRIGHT_FUZZ_CASES", "500"))
JUNK = st.one_of(
    st.sampled_from(["", "0", "-1 A", "1e30 A", "nan", "inf V", "abc", "1 kV", "0.01 s", "1000 s", "99 pu",
                     "0.5 pu", "3 pu", "C50", "5P20", "5/1 A", "1/1 V", "60 Hz", "1 rpm", "3600 rpm", "1 MVA",
                     "1 kW", "1e-9 uF", "100 uF", "1 ohm", "1e6 ohm", "A", "Z", "breaker", "solid", "x" * 300,
                     "1e9 A", "0 A", "0 s", "0 pu", "0", "25.8 deg", "10/5 A", "144/120 V", "61 Hz",
                     "\x1b[2J", "a\u202eb", "P-101\x00", " ", "1" * 400]),
    st.integers(-10, 10**6), st.sampled_from([10**400, -(10**20), 2**63]),
    st.floats(allow_nan=True, allow_infinity=True), st.booleans(),
    st.lists(st.integers(), max_size=2), st.dictionaries(st.text(max_size=3), st.integers(), max_size=2),
    st.text(max_size=40),
)
SCALES = st.sampled_from([0.0, 0.01, 0.1, 0.5, 0.9, 1.1, 2.0, 10.0, 100.0, 1e6])
#: overrides a file may carry: each function's settings, by the value kinds they take
OVERRIDES = st.sampled_from(["49.pickup_current", "49.heating_time_constant", "49.cooling_time_constant",
                             "51LR.time_delay", "51LR.pickup_current", "50P.pickup_current", "46.k_constant",
                             "46.continuous_i2", "46.pickup_current", "66.starts_cold", "66.starts_hot",
                             "40.zone1_diameter", "40.zone1_offset", "24.trip_pickup", "24.time_delay",
                             "51V.time_dial", "51V.time_multiplier", "51V.curve", "32.pickup_power",
                             "59N.coverage", "81U.stage1_frequency", "27.pickup_voltage", "50G.pickup_current",
                             "87G.slope", "37.pickup_current", "66.minimum_time_between_starts"])
NON_FINITE = re.compile(r"(?<![A-Za-z])(inf|infinity|nan)(?![A-Za-z])", re.IGNORECASE)
#: Defects this fuzz found in the protection rule modules, reported to their owners and tolerated here (each hit
#: is shown as a PendingRuleFix warning) until the fix is merged; then the entry goes. Rule wording: a function
#: whose messages print a non-finite number ("trips in inf s") instead of words ("never trips"). Rule errors:
#: (module, exception) raised inside a rule module.
PENDING_WORDING: set[str] = set()
PENDING_ERRORS: set[tuple[str, str]] = set()


#: what the fuzz cases came to, by outcome (printed by the last test, for the hand run with many cases)
TALLY: Counter = Counter()


class PendingRuleFix(UserWarning):
    """A defect of a rule module that its owner is fixing (see PENDING_WORDING, PENDING_ERRORS)."""
RAW_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def _leaves(table: dict, path=()):
    for k, v in table.items():
        if isinstance(v, dict):
            yield from _leaves(v, path + (k,))
        else:
            yield path + (k,), v


@st.composite
def mutated(draw):
    data = copy.deepcopy(draw(st.sampled_from(BASES)))
    paths = list(_leaves(data))
    for _ in range(draw(st.integers(1, 3))):
        how = draw(st.sampled_from(["delete", "junk", "scale", "override"]))
        if how == "override":
            data.setdefault("overrides", {})[draw(OVERRIDES)] = draw(JUNK)
            continue
        path, value = draw(st.sampled_from(paths))
        table = data
        for k in path[:-1]:
            table = table.setdefault(k, {}) if isinstance(table, dict) else {}
        if not isinstance(table, dict):
            continue
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


def computed_strings(record_json: dict):
    """Every string the study wrote into the record, with where it is (entered data left out: a description may
    be the word "nan")."""
    def walk(v, where):
        if isinstance(v, str):
            yield where, v
        elif isinstance(v, dict):
            for k, x in v.items():
                yield from walk(x, f"{where}.{k}")
        elif isinstance(v, list):
            for i, x in enumerate(v):
                yield from walk(x, f"{where}[{i}]")

    for key in ("derived", "functions", "checks", "drawings", "start_profiles"):
        yield from walk(record_json.get(key), key)


def non_finite_numbers(v, where="record"):
    if isinstance(v, float) and not math.isfinite(v):
        yield where
    elif isinstance(v, dict):
        for k, x in v.items():
            yield from non_finite_numbers(x, f"{where}.{k}")
    elif isinstance(v, list):
        for i, x in enumerate(v):
            yield from non_finite_numbers(x, f"{where}[{i}]")


def printed_sheet_text(record) -> list[str]:
    """The strings the sheet prints (its tables, built without drawing the PDF)."""
    from reports import tables

    out = []
    for rows in (tables.identification_rows(record), tables.derived_rows(record), tables.finding_rows(record),
                 tables.commissioning_rows(record), tables.tolerance_notes(record), tables.history_rows(record),
                 tables.signoff_rows(record)):
        for row in rows:
            out += [str(x) for x in row]
    for block in tables.settings_blocks(record):
        out += [block.title, block.basis, block.references]
        for row in block.rows:
            out += [str(x) for x in row]
    for _, items in tables.input_sections(record):
        out += [str(x) for item in items for x in item]
    return out


RULE_TEXT = ("basis", "message", "note", "label", "title", "description", "quantity", "initial_state",
             "tolerance_rule")


def _blank_rule_text(v):
    """The record's plain data with the sentences the rules wrote replaced by "x" (numbers and keys kept), so that
    what the terminal table and the sheet print of it shows only what the formatting paths add."""
    if isinstance(v, dict):
        return {k: ("x" if k in RULE_TEXT and isinstance(x, str) else _blank_rule_text(x)) for k, x in v.items()}
    if isinstance(v, list):
        return [_blank_rule_text(x) for x in v]
    return v


def rule_wording_hits(record) -> list[str]:
    """Non-finite numbers written into the rules' own sentences, as ``(function id, where, text)``."""
    data = record.to_json()
    hits = []
    for i, f in enumerate(data["functions"]):
        for where, text in computed_strings({"functions": [f]}):
            if NON_FINITE.search(text):
                hits.append((f["id"], where.replace("functions[0]", f"functions[{i}]"), text))
    for where, text in computed_strings({"checks": data["checks"], "derived": data["derived"]}):
        if NON_FINITE.search(text):
            hits.append((".".join(where.split(".")[:2]) if where.startswith("derived") else "", where, text))
    return hits


def non_finite_in_outputs(record) -> list[str]:
    """Where a non-finite value shows in the record's JSON (numbers), its terminal table or the sheet's text,
    beyond the rules' own sentences (:func:`rule_wording_hits` judges those)."""
    from reports.console import print_record

    data = record.to_json()
    found = [f"{w}: number" for w in non_finite_numbers(data)]
    plain = copy.copy(record)
    plain.functions = [copy.copy(f) for f in record.functions]
    for f in plain.functions:
        f.basis = "x"
        f.checks = [type(c)(c.status, "x") for c in f.checks]
        f.settings = {k: _with(s, note="x", label=s.label and "x") for k, s in f.settings.items()}
        f.test_points = [_with(t, description="x", quantity="x", initial_state="x", tolerance_rule="x")
                         for t in f.test_points]
    plain.checks = [type(c)(c.status, "x") for c in record.checks]
    plain.derived = {k: _with(s, note="x", label=s.label and "x") for k, s in record.derived.items()}
    table = io.StringIO()
    print_record(plain, file=table)
    entered = _entered_texts(record)
    found += [f"terminal: {line!r}" for line in table.getvalue().splitlines()
              if NON_FINITE.search(line) and not any(t and NON_FINITE.search(t) and t[:20] in line for t in entered)]
    found += [f"sheet: {s!r}" for s in printed_sheet_text(plain) if NON_FINITE.search(s) and s not in entered]
    return found


def _with(obj, **changes):
    import dataclasses

    return dataclasses.replace(obj, **{k: v for k, v in changes.items() if v is not None})


def _entered_texts(record) -> set[str]:
    out = {str(v) for v in (record.sheet or {}).values() if isinstance(v, str)}
    for table in (record.inputs or {}).values():
        if isinstance(table, dict):
            out |= {str(v) for v in table.values()}
    return out


def judge_rule_wording(record) -> None:
    hits = rule_wording_hits(record)
    if hits:
        TALLY["pending rule wording (non-finite number in a rule's sentence)"] += 1
    unexpected = [h for h in hits if h[0] not in PENDING_WORDING]
    assert not unexpected, unexpected
    for fid, where, text in hits:
        warnings.warn(PendingRuleFix(f"{fid} prints a non-finite number in {where}: {text[:80]!r}"))


def outcome(data) -> tuple[int, object]:
    """What the CLI would do with this machine data: (exit code, record or error). Anything but our InputError
    escaping is a failure of the test."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)  # a NaN or overflow inside the study is a bug too
        try:
            case, found = case_from_dict(data)
            record = run_study(case, found)
        except InputError as e:
            message = str(e)
            assert "\n" not in message and message.split(":")[0], message
            assert not RAW_CONTROL.search(message), message
            assert "could not complete" not in message
            return 2, e
        except RuntimeWarning:
            raise
        except Exception as e:
            import traceback

            where = Path(traceback.extract_tb(e.__traceback__)[-1].filename)
            if where.parent.name == "protection" and (where.name, type(e).__name__) in PENDING_ERRORS:
                warnings.warn(PendingRuleFix(f"{where.name}: {type(e).__name__}: {e}"))
                return -1, e
            raise
    record.dumps()  # allow_nan=False: a non-finite number here raises
    return (1 if record.worst == "fail" else 0), record


@settings(max_examples=CASES, deadline=None, derandomize=True, database=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(mutated())
def test_any_mutated_file_is_studied_or_refused_with_our_error(data):
    code, result = outcome(data)
    TALLY[f"file: exit {code}" if code >= 0 else "file: pending rule error"] += 1
    if code == -1:
        return  # a pending rule-module fix (reported as a warning)
    assert code in (0, 1, 2)
    if code != 2:
        text = result.dumps()
        assert '"format": "relaywright.settings/1"' in text
        assert not RAW_CONTROL.search(text)
        assert not non_finite_in_outputs(result), non_finite_in_outputs(result)
        judge_rule_wording(result)


@st.composite
def mutated_text(draw):
    """A machine file's text with a few random edits: characters changed, lines dropped or doubled."""
    lines = draw(st.sampled_from(TEXTS)).split("\n")
    for _ in range(draw(st.integers(1, 4))):
        i = draw(st.integers(0, len(lines) - 1))
        how = draw(st.sampled_from(["char", "drop", "double", "insert"]))
        if how == "drop":
            lines.pop(i)
        elif how == "double":
            lines.insert(i, lines[i])
        elif how == "insert":
            lines.insert(i, draw(st.sampled_from(["[machine]", "x = 1", "rated_current = \"1 A\"", "[[sheet]]",
                                                  "tag = \"\\u001b[2J\"", "\"\" = 1", "a.b.c = 1", "[overrides]",
                                                  "\"49.pickup_current\" = \"0 A\"", "revision = 1.5"])))
        elif lines[i]:
            j = draw(st.integers(0, len(lines[i]) - 1))
            lines[i] = lines[i][:j] + draw(st.characters(max_codepoint=0x2FFF)) + lines[i][j + 1:]
        if not lines:
            lines = [""]
    return "\n".join(lines)


@settings(max_examples=CASES, deadline=None, derandomize=True, database=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(mutated_text())
def test_any_mutated_text_is_studied_or_refused_with_our_error(text):
    try:
        data = parse_toml(text, "m.toml")
    except InputError as e:
        TALLY["text: not valid TOML (exit 2)"] += 1
        assert "\n" not in str(e) and str(e).startswith("m.toml: not valid TOML")
        assert not RAW_CONTROL.search(str(e))
        return
    code, result = outcome(data)
    TALLY[f"text: exit {code}" if code >= 0 else "text: pending rule error"] += 1
    if code in (0, 1):
        assert not non_finite_in_outputs(result), non_finite_in_outputs(result)
        judge_rule_wording(result)


def test_fuzz_tally(capsys):
    """Not a check: prints what the fuzz cases above came to (``pytest -s``, or in the -rA report)."""
    if TALLY:
        print("fuzz cases by outcome: " + "; ".join(f"{k}: {v}" for k, v in sorted(TALLY.items())))


@pytest.mark.parametrize("text", ["", "[", "format = 1", "x = [1, 2", "\x00", "a = \"\\u0000\"", "[[machine]]",
                                  "format = \"relaywright.machine/1\"\nmachine = 5", "a = " + "1" * 5000])
def test_broken_toml_is_refused_with_one_line(tmp_path, text):
    from machines.files import load_case

    p = tmp_path / "m.toml"
    p.write_text(text, "utf-8")
    with pytest.raises(InputError) as err:
        load_case(p)
    assert "\n" not in str(err.value) and str(err.value).startswith(str(p))


@pytest.mark.parametrize("path", sorted(EXAMPLES.glob("*.toml")), ids=lambda p: p.stem)
def test_no_non_finite_value_in_any_output_of_the_examples(path):
    from machines.files import load_case

    record = run_study(*load_case(path))
    assert non_finite_in_outputs(record) == []
    assert rule_wording_hits(record) == []  # the examples: no pending fix tolerated
    assert json.loads(record.dumps())["format"] == "relaywright.settings/1"
