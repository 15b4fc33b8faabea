"""The command line as a user meets it: version, help laziness, exit codes, one-line errors."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from wizard import __version__

from conftest import EXAMPLES, ROOT, run_cli

MOTOR = EXAMPLES / "chiller-compressor-motor.toml"


def test_version():
    r = run_cli("--version")
    assert r.returncode == 0
    assert r.stdout.strip() == f"relaywright {__version__}"


def test_version_matches_the_package_metadata():
    from importlib.metadata import PackageNotFoundError, version

    try:
        assert version("relaywright") == __version__
    except PackageNotFoundError:
        pytest.skip("relaywright is not installed in this environment (run from a source tree)")


def test_help_imports_no_heavy_library_and_shows_the_caution():
    code = (
        "import sys, runpy\n"
        "sys.argv = ['relaywright', '--help']\n"
        "try:\n"
        "    runpy.run_module('wizard.cli', run_name='__main__')\n"
        "except SystemExit:\n"
        "    pass\n"
        "heavy = [m for m in ('pint', 'numpy', 'reportlab', 'questionary', 'pyhanko') if m in sys.modules]\n"
        "print('HEAVY=' + ','.join(heavy))\n"
    )
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, timeout=60)
    assert "HEAVY=\n" in r.stdout or r.stdout.rstrip().endswith("HEAVY=")
    assert "licensed engineer" in r.stdout
    for command in ("settings", "sheet", "verify", "new", "revise", "batch", "diff", "demo"):
        assert command in r.stdout


def test_settings_table_exit_0_and_caution():
    r = run_cli("settings", str(MOTOR))
    assert r.returncode in (0, 1), r.stderr
    assert "CH-M-101" in r.stdout
    assert "licensed engineer" in r.stdout


def test_settings_json_has_the_record_keys():
    r = run_cli("settings", str(MOTOR), "--json")
    assert r.returncode in (0, 1), r.stderr
    data = json.loads(r.stdout)
    for key in ("format", "tag", "kind", "revision", "practice", "inputs_fingerprint", "derived", "functions",
                "checks"):
        assert key in data
    assert data["format"] == "relaywright.settings/1"
    assert data["inputs_fingerprint"].startswith("sha256:")
    assert "licensed engineer" in r.stderr  # the caution goes to stderr so the JSON stays clean


@pytest.mark.parametrize("args, fragment", [
    (["settings", "no-such-file.toml"], "no such file"),
    (["settings", str(ROOT / "pyproject.toml")], "format: expected"),
    (["settings"], "Missing argument"),
    (["frobnicate"], "No such command"),
])
def test_bad_input_and_usage_exit_2_with_one_line(args, fragment):
    r = run_cli(*args)
    assert r.returncode == 2
    assert fragment in r.stderr
    assert "Traceback" not in r.stderr


def test_wrong_unit_in_file_names_file_key_and_value(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(MOTOR.read_text("utf-8").replace('rated_current = "186 A"', 'rated_current = "186 V"'))
    r = run_cli("settings", str(bad))
    assert r.returncode == 2
    lines = [line for line in r.stderr.splitlines() if line.strip()]
    assert len(lines) == 1
    assert "bad.toml: machine.rated_current:" in lines[0] and "'186 V'" in lines[0] and "a current" in lines[0]


def test_a_byte_order_mark_is_accepted(tmp_path):
    # some Windows editors start UTF-8 files with U+FEFF; it is not part of the TOML text
    bom = tmp_path / "bom.toml"
    bom.write_bytes(b"\xef\xbb\xbf" + MOTOR.read_bytes())
    r = run_cli("settings", str(bom))
    assert r.returncode in (0, 1), r.stderr


def test_a_bad_override_names_the_file_and_the_key(tmp_path):
    bad = tmp_path / "ov.toml"
    bad.write_text(MOTOR.read_text("utf-8") + '\n[overrides]\n"51LR.bogus" = "3 s"\n', "utf-8")
    r = run_cli("settings", str(bad))
    assert r.returncode == 2
    assert r.stderr.startswith(f"error: {bad}: overrides.51LR.bogus: function 51LR has no setting 'bogus'")
