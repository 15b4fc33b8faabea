"""Each command loads only the libraries its job needs (what it costs in time is measured by
benchmarks/bench_startup.py, not here), and the command-line values read without pydantic are read as typer
reads them."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest
import typer.main
from typer.testing import CliRunner

from wizard.cli import app
from wizard.cli_params import PlainArgument, PlainOption

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
HEAVY = ("pint", "pydantic", "numpy", "reportlab", "rich", "questionary", "pyhanko", "importlib.metadata")


def loaded_by(*args: str) -> set[str]:
    """Which of :data:`HEAVY` a ``relaywright`` process with ``args`` has imported when it ends."""
    code = ("import json, sys\nfrom wizard.cli import main\nsys.argv = ['relaywright', *sys.argv[1:]]\n"
            "try:\n    main()\nexcept SystemExit:\n    pass\n"
            f"sys.stderr.write('\\nLOADED ' + json.dumps(sorted(m for m in {HEAVY!r} if m in sys.modules)))")
    done = subprocess.run([sys.executable, "-c", code, *args], capture_output=True, text=True, cwd=ROOT)
    line = done.stderr.rsplit("LOADED ", 1)[-1]
    return set(json.loads(line))


def test_help_loads_none_of_the_heavy_libraries():
    assert loaded_by("--help") == set()
    assert loaded_by("sheet", "--help") == set()


def test_settings_as_json_loads_numpy_only(tmp_path):
    assert loaded_by("settings", str(EXAMPLES[0]), "--json") == {"numpy"}


def test_sheet_loads_numpy_and_reportlab_only(tmp_path):
    assert loaded_by("sheet", str(EXAMPLES[0]), "-o", str(tmp_path / "s.pdf")) == {"numpy", "reportlab"}


def test_diff_loads_numpy_only():
    # the change list is plain text wrapped by wizard.terminal: no rich
    assert loaded_by("diff", str(EXAMPLES[0]), str(EXAMPLES[1])) == {"numpy"}


def test_every_example_is_read_and_studied_without_pint():
    """pint's stored answers cover every unit the examples use (machines/unit_table.py)."""
    code = ("import sys\nfrom machines.files import load_case\nfrom machines.study import run_study\n"
            "for f in sys.argv[1:]:\n    run_study(*load_case(f))\nprint('pint' in sys.modules)")
    done = subprocess.run([sys.executable, "-c", code, *map(str, EXAMPLES)], capture_output=True, text=True,
                          cwd=ROOT, check=True)
    assert done.stdout.strip() == "False"


def test_commands_read_plain_parameters_without_pydantic():
    group = typer.main.get_command(app)
    ctx = typer.Context(group)
    for name in group.list_commands(ctx):
        command = group.get_command(ctx, name)
        kinds = {type(p) for p in command.get_params(ctx)}
        assert kinds <= {PlainArgument, PlainOption}, (name, kinds)


@pytest.mark.parametrize("args, message", [
    (["batch", "examples", "-o", "out", "--workers", "0"], "greater than or equal to 1"),
    (["batch", "examples", "-o", "out", "--workers", "two"], "valid integer"),
    (["settings"], "Missing argument"),
])
def test_bad_values_keep_typers_own_messages(args, message):
    result = CliRunner().invoke(app, args)
    assert result.exit_code == 2
    assert message in result.output


def test_values_are_read_as_typer_reads_them(tmp_path, monkeypatch):
    seen = {}

    def fake(directory, output, workers=None, force=False):
        seen.update(directory=directory, output=output, workers=workers, force=force)
        return 0

    monkeypatch.setattr("wizard.batch.run_batch", fake)
    result = CliRunner().invoke(app, ["batch", str(tmp_path), "-o", str(tmp_path / "o"), "--workers", "3"])
    assert result.exit_code == 0, result.output
    assert seen == {"directory": tmp_path, "output": tmp_path / "o", "workers": 3, "force": False}
    assert isinstance(seen["directory"], Path)
