"""`relaywright diff OLD.toml NEW.toml` as a user runs it: a separate process, its output and exit code."""

from __future__ import annotations

import copy
import tomllib

import pytest
from conftest import EXAMPLES, run_cli

from machines.compare import compare
from machines.files import dumps, load_case
from machines.study import run_study

WIDE = {"COLUMNS": "200"}  # rich folds table cells at the 80 columns of a pipe


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
    line = next(x for x in result.stdout.splitlines() if "machine.rated_current" in x)
    assert "186 A" in line and "→" in line and "190 A" in line
    assert "sheet.revision" not in result.stdout  # bookkeeping, not a change of the machine
    assert "licensed engineer" in result.stdout


def test_every_change_compare_finds_is_printed(old, tmp_path):
    new = revised(old, tmp_path, machine={"rated_current": "190 A"}, instruments={"phase_ct": "300/5 A"})
    a, b = load_case(old), load_case(new)
    changes = compare(a[0], run_study(*a), b[0], run_study(*b))
    result = run_cli("diff", str(old), str(new), env=WIDE)
    assert result.returncode == 0, result.stderr
    for change in changes:
        assert change.key in result.stdout and change.new in result.stdout


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
