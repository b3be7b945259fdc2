"""``drift chart`` as a user runs it."""

import json

import pytest

CHART_KEYS = {"instrument", "a4_hz", "reference", "climates", "rows", "summary"}
ROW_KEYS = {"note", "register", "climate", "frequency_hz", "drift_cents", "offset_from_equal_cents"}
SUMMARY_KEYS = {"climate", "mean_drift_cents", "min_drift_cents", "max_drift_cents", "spread_cents",
                "adjust_mm", "residual_spread_cents", "out_of_tolerance"}


@pytest.fixture(scope="module")
def chart_json():
    from conftest import run_drift

    return json.loads(run_drift("chart", "--format", "json", check_rc=0).stdout)


def test_default_chart_covers_every_bundled_climate(chart_json):
    from drift import climate

    assert CHART_KEYS <= set(chart_json)
    names = [c.name for c in climate.bundled_climates()]
    assert chart_json["climates"] == names
    assert chart_json["a4_hz"] == 440.0
    assert {r["climate"] for r in chart_json["rows"]} == set(names)
    assert all(ROW_KEYS <= set(r) for r in chart_json["rows"])
    assert [s["climate"] for s in chart_json["summary"]] == names
    assert all(SUMMARY_KEYS <= set(s) for s in chart_json["summary"])
    cold = next(s for s in chart_json["summary"] if s["climate"] == "frozen-parade")
    hot = next(s for s in chart_json["summary"] if s["climate"] == "sunny-lawn")
    assert cold["mean_drift_cents"] < 0 < hot["mean_drift_cents"]
    assert cold["adjust_mm"] < 0 < hot["adjust_mm"]


def test_table_fits_100_columns(drift_cli):
    text = drift_cli("chart", check_rc=0).stdout
    assert max(len(line) for line in text.splitlines()) <= 100
    assert "joint mm" in text and "winter-" in text


def test_csv_and_output_file(drift_cli, tmp_path):
    lines = drift_cli("chart", "--climate", "winter-church", "--climate", "lit-stage", "--format", "csv",
                      check_rc=0).stdout.splitlines()
    assert lines[0] == "note,register,climate,frequency_hz,drift_cents,offset_from_equal_cents"
    assert {line.split(",")[2] for line in lines[1:]} == {"winter-church", "lit-stage"}
    target = tmp_path / "chart.json"
    result = drift_cli("chart", "--climate", "cooled-hall", "--a4", "442", "--format", "json",
                       "--output", target, check_rc=0)
    assert result.stdout == ""
    doc = json.loads(target.read_text())
    assert doc["a4_hz"] == 442.0 and doc["climates"] == ["cooled-hall"]


def test_failed_run_leaves_output_file_untouched(drift_cli, tmp_path):
    target = tmp_path / "keep.txt"
    target.write_text("previous result\n")
    result = drift_cli("chart", "--climate", "nowhere", "--output", target)
    assert result.returncode == 2
    assert target.read_text() == "previous result\n"
    assert list(tmp_path.iterdir()) == [target]


@pytest.mark.parametrize("args, needle", [
    (["--climate", "winter-chruch"], "did you mean 'winter-church'"),
    (["no-such-instrument"], "no-such-instrument"),
    (["--a4", "1000"], "--a4"),
    (["--tolerance", "-1"], "--tolerance"),
    (["--reference", "missing.toml"], "missing.toml"),
])
def test_bad_input_exits_2(drift_cli, args, needle):
    result = drift_cli("chart", *args)
    assert result.returncode == 2
    assert needle in result.stderr and "Traceback" not in result.stderr


def test_bad_climate_file_names_file_and_key(drift_cli, tmp_path):
    path = tmp_path / "odd.toml"
    path.write_text('name = "odd"\n[air]\ntemperature_c = 20\nhumidity = 40\n')
    result = drift_cli("chart", "--climate", path)
    assert result.returncode == 2
    assert str(path) in result.stderr and "humidity" in result.stderr


def test_cold_and_hot_climates_carry_care_cautions(chart_json):
    """The default instrument is wooden: the freezing parade warns of cracking and freezing, the
    sunny lawn of heat and sun, and the set defers to the maker and local rules (common practice)."""
    topics = {(c["climate"], c["topic"]) for c in chart_json["cautions"]}
    assert {("frozen-parade", "cold"), ("frozen-parade", "freezing"), ("sunny-lawn", "heat")} <= topics
    assert not any(c["climate"] == "tuning-room" for c in chart_json["cautions"])
    assert "maker's instructions" in chart_json["care_note"]


def test_progress_bar_goes_to_a_terminal_stderr_only():
    """With stderr on a terminal (a pseudo-terminal here), a run of several seconds shows a progress
    bar there, and the JSON on stdout stays clean."""
    import os
    import pty
    import subprocess
    import sys

    leader, follower = pty.openpty()
    try:
        result = subprocess.run([sys.executable, "-m", "drift", "chart", "--format", "json"],
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
    assert json.loads(result.stdout)["rows"]
