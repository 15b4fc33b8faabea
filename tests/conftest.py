"""Shared test helpers: example paths and a way to run the CLI in a subprocess."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "examples"

#: a relay with the finest setting steps the file accepts: tests that reproduce a published or computed check value
#: test the method, not the rounding to a coarse relay step (which tests/test_steps.py covers)
FINE_RELAY = {"current_step": "0.0001 A", "voltage_step": "0.001 V", "time_step": "0.001 s",
              "time_constant_step": "0.1 s", "frequency_step": "0.001 Hz", "per_unit_step": "0.0001 pu",
              "impedance_step": "0.0001 ohm", "power_step": "0.001 W", "dial_step": "0.0001"}


def run_cli(*args: str, cwd: Path | None = None, env: dict | None = None, input: str | None = None,
            timeout: float = 120) -> subprocess.CompletedProcess:
    """Run ``python -m wizard.cli ARGS`` as a separate process, as a user would."""
    full_env = {**os.environ, **(env or {})}
    return subprocess.run([sys.executable, "-m", "wizard.cli", *args], cwd=cwd or ROOT, env=full_env,
                          capture_output=True, text=True, timeout=timeout, input=input,
                          stdin=None if input is not None else subprocess.DEVNULL)


@pytest.fixture
def examples() -> Path:
    return EXAMPLES
