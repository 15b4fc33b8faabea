"""`relaywright diff OLD.toml NEW.toml` as a user runs it: a separate process, its output and exit code."""

from __future__ import annotations

import copy
import tomllib

import pytest
from conftest import EXAMPLES, run_cli

from machines.compare import compare
from machines.files import dumps, load_case
from machines.study import run_study
from reports.changes import format_changes
from wizard.flow import MOTOR, input_labels

WIDE = {"COLUMNS": "200"}


@pytest.fixture
def old(tmp_path):
    path = tmp_path / "old.toml"
    path.write_text((EXAMPLES / "chiller-compressor-motor.toml").read_text("utf-8"), "utf-8")
    return path


def revised(old, tmp_path, **sections):
    data = tomllib.loads(old.read_text("utf-8"))
    data = copy.deepcopy(data)
    for section, values in sections.items():
        data.setdefault(section, {}).update(values)
    path = tmp_path / "new.toml"
    path.write_text(dumps(data), "utf-8")
    return path


def test_nameplate_change_is_listed(old, tmp_path):
    new = revised(old, tmp_path, machine={"rated_current": "190 A"}, sheet={"revision": 2})
    result = run_cli("diff", str(old), str(new), env=WIDE)
    assert result.returncode == 0, result.stderr
    line = next(x for x in result.stdout.splitlines() if "Full-load current" in x)
    assert line == "  Full-load current: 186 A → 190 A"  # the question's label, not the key
    assert "machine.rated_current" not in result.stdout
    assert "sheet.revision" not in result.stdout  # bookkeeping, not a change of the machine
    assert "licensed engineer" in result.stdout


def test_every_change_compare_finds_is_printed(old, tmp_path):
    new = revised(old, tmp_path, machine={"rated_current": "190 A"}, instruments={"phase_ct": "300/5 A"})
    a, b = load_case(old), load_case(new)
    changes = compare(a[0], run_study(*a), b[0], run_study(*b), labels=input_labels(MOTOR))
    result = run_cli("diff", str(old), str(new), env=WIDE)
    assert result.returncode == 0, result.stderr
    assert result.stdout.splitlines()[:-1] == format_changes(changes)  # then the caution
    for change in changes:
        assert f"  {change.name}: {change.old} → {change.new}" in result.stdout


def test_same_machine_in_other_units_has_no_changes(old, tmp_path):
    # SI Brochure, 9th ed., table 7: 4.16 kV = 4160 V and 250 MVA = 250000 kVA
    new = revised(old, tmp_path, machine={"rated_voltage": "4160 V"}, supply={"fault_level": "250000 kVA"})
    result = run_cli("diff", str(old), str(new), env=WIDE)
    assert result.returncode == 0, result.stderr
    assert "no changes" in result.stdout


def test_bad_file_is_one_line(old, tmp_path):
    new = revised(old, tmp_path, machine={"frequency": "60 V"})
    result = run_cli("diff", str(old), str(new), env=WIDE)
    assert result.returncode == 2
    first = result.stderr.strip().splitlines()[0]
    assert first.startswith(f"error: {new}: machine.frequency") and "60 V" in first
    assert "Traceback" not in result.stderr


def test_missing_file_is_one_line(old, tmp_path):
    result = run_cli("diff", str(old), str(tmp_path / "nope.toml"), env=WIDE)
    assert result.returncode == 2
    assert "no such file" in result.stderr and "Traceback" not in result.stderr


def test_a_motor_against_a_generator_is_warned(old):
    result = run_cli("diff", str(old), str(EXAMPLES / "gas-engine-generator.toml"), env=WIDE)
    assert result.returncode == 0, result.stderr
    assert result.stdout.startswith("warning: these are different kinds of machine: the first file is an induction "
                                    "motor, the second a synchronous generator")


def test_nothing_is_cut_on_a_narrow_pipe(old, tmp_path):
    # a pipe is not a terminal: each change is one whole line, whatever COLUMNS says; labels are never truncated
    new = revised(old, tmp_path, machine={"rated_current": "190 A"})
    result = run_cli("diff", str(old), str(new), env={"COLUMNS": "60"})
    groups, body = {}, []
    for line in result.stdout.splitlines():
        if line.endswith("):"):
            body = groups.setdefault(line, [])
        elif line.startswith("  "):
            body.append(line)
    assert groups and all(len(b) == len(set(b)) for b in groups.values())  # no two alike within a group
    assert not any("…" in line or "..." in line for b in groups.values() for line in b)
