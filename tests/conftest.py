"""Shared test helpers."""

import subprocess
import sys

import pytest


def run_drift(*args, check_rc=None):
    """Run the real command line in a subprocess; return the CompletedProcess."""
    result = subprocess.run([sys.executable, "-m", "drift", *map(str, args)], capture_output=True,
                            text=True, timeout=600)
    if check_rc is not None:
        assert result.returncode == check_rc, result.stderr
    return result


@pytest.fixture
def drift_cli():
    return run_drift
