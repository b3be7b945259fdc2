"""The real command line in its own process: the installed console script, ``python -m drift``,
the start-up cost of ``--help``, and the progress bar on a terminal. (Everything else about the
commands is tested in-process, tests/test_cli.py.)"""

import json
import os
import shutil
import subprocess
import sys

import pytest

import drift


def run(args, **kwargs):
    return subprocess.run(args, capture_output=True, text=True, timeout=600, **kwargs)


def test_installed_console_script():
    script = shutil.which("drift")
    if script is None:
        pytest.skip("the drift console script is not on PATH")
    listing = run([script, "climates", "--format", "json"])
    assert listing.returncode == 0, listing.stderr
    assert "winter-church" in {c["name"] for c in json.loads(listing.stdout)["climates"]}
    # Bad input in a real process: exit status 2, one to three lines, no traceback.
    bad = run([script, "air", "--temp", "75"])
    assert bad.returncode == 2 and bad.stdout == ""
    assert "--temp" in bad.stderr and "Traceback" not in bad.stderr
    assert 1 <= len([line for line in bad.stderr.splitlines() if line.strip()]) <= 3


def test_python_m_drift_version():
    result = run([sys.executable, "-m", "drift", "--version"])
    assert result.returncode == 0
    assert result.stdout.strip() == f"drift, version {drift.__version__}"


@pytest.mark.parametrize("args", [["--help"], ["air", "--help"], ["--version"]])
def test_help_and_version_do_not_load_coolprop(args):
    # ``-X importtime`` lists every module the process imports on stderr (CPython documentation,
    # "Command line and environment"): CoolProp must not be among them.
    result = run([sys.executable, "-X", "importtime", "-m", "drift", *args])
    assert result.returncode == 0, result.stderr
    imported = [line.rsplit("|", 1)[-1].strip() for line in result.stderr.splitlines() if "|" in line]
    assert "drift.cli" in imported and "click" in imported  # the listing is there
    assert not any(name.startswith("CoolProp") for name in imported), [n for n in imported if "CoolProp" in n]
    assert result.stdout.strip()


def test_air_and_resonances_run_without_coolprop():
    """The common path reads the shipped gas table: CoolProp is never imported (issue 9)."""
    for args in (["air"], ["resonances", "--count", "2"]):
        result = run([sys.executable, "-X", "importtime", "-m", "drift", *args])
        assert result.returncode == 0, result.stderr
        imported = [line.rsplit("|", 1)[-1].strip() for line in result.stderr.splitlines() if "|" in line]
        assert "drift.gas_table" in imported
        assert not any(name.startswith("CoolProp") for name in imported)


def test_progress_bar_goes_to_a_terminal_stderr_only():
    """With stderr on a terminal (a pseudo-terminal here), a run of several seconds shows a progress
    bar there, and the JSON on stdout stays clean. (Gas properties straight from CoolProp make the
    run last: its start-up of a few seconds comes before the first step, the played design
    condition.)"""
    import pty

    leader, follower = pty.openpty()
    try:
        result = subprocess.run([sys.executable, "-m", "drift", "--gas-properties", "coolprop", "chart",
                                 "--climate", "cold-rehearsal", "--format", "json"],
                                stdout=subprocess.PIPE, stderr=follower, text=True, timeout=600)
        os.close(follower)
        follower = None
        seen = b""
        while True:
            try:
                chunk = os.read(leader, 4096)
            except OSError:
                break
            if not chunk:
                break
            seen += chunk
    finally:
        if follower is not None:
            os.close(follower)
        os.close(leader)
    assert result.returncode == 0
    assert b"computing" in seen
    doc = json.loads(result.stdout)
    assert doc["rows"] and doc["climates"] == ["cold-rehearsal"]
