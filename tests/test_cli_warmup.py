"""``drift warmup`` as a user runs it: ``python -m drift warmup ...`` in a subprocess."""

import json

import pytest

PIPE = """
name = "test pipe"
excitation = "reed"
material = "tropical_hardwood"
[bore]
stations_mm = [[0.0, 15.0], [600.0, 15.0]]
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 9.0
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 9.0
[[note]]
name = "D3"
closed = ["h1", "h2"]
[[note]]
name = "E3"
closed = ["h2"]
[[note]]
name = "F#3"
closed = []
"""

ROOM = """
name = "warm room"
[air]
temperature_c = 26.0
relative_humidity_pct = 40
"""


@pytest.fixture
def pipe(tmp_path):
    path = tmp_path / "pipe.toml"
    path.write_text(PIPE)
    return path


def test_json_contract_rise_fall_and_settle(drift_cli, pipe):
    doc = json.loads(drift_cli("warmup", pipe, "--plan", "play:6,rest:3,play:3", "--step", "60",
                               "--format", "json", check_rc=0).stdout)
    assert {"instrument", "climate", "reference", "rows", "bore"} <= set(doc)
    assert doc["instrument"] == "test pipe"
    row = doc["rows"][0]
    assert set(row) >= {"minute", "state", "note", "frequency_hz", "drift_cents"}
    assert {"minute", "position_mm", "air_temperature_c"} <= set(doc["bore"][0])
    minutes = sorted({r["minute"] for r in doc["rows"]})
    assert minutes == [float(m) for m in range(13)]
    states = {r["minute"]: r["state"] for r in doc["rows"]}
    assert states[6.0] == "play" and states[7.0] == "rest" and states[10.0] == "play"
    d3 = {r["minute"]: r["drift_cents"] for r in doc["rows"] if r["note"] == "D3"}
    assert d3[1.0] < d3[3.0] < d3[6.0]          # a rise while played
    assert d3[9.0] < d3[7.0] < d3[6.0]          # a fall during the rest
    assert [s["phase"] for s in doc["settle"]] == [1, 3]
    assert doc["settle_from_cold_minutes"] > 6.0  # a wooden body is not settled after 6 min
    first_air = [b["air_temperature_c"] for b in doc["bore"] if b["minute"] == 6.0]
    assert first_air[0] > first_air[-1] > 20.0  # warmest at the input end


def test_table_and_csv(drift_cli, pipe):
    text = drift_cli("warmup", pipe, "--plan", "play:2", "--step", "60", check_rc=0).stdout
    assert "minute" in text and "D3" in text and "steady" in text
    assert "play phase 1" in text and "2 cents" in text and "from cold" in text
    lines = drift_cli("warmup", pipe, "--plan", "play:2", "--step", "60", "--format", "csv",
                      check_rc=0).stdout.splitlines()
    assert lines[0] == "minute,state,note,frequency_hz,drift_cents"
    assert len(lines) == 1 + 3 * 3


def test_climate_and_reference_files(drift_cli, pipe, tmp_path):
    room = tmp_path / "room.toml"
    room.write_text(ROOM)
    doc = json.loads(drift_cli("warmup", pipe, "--plan", "play:1", "--step", "60", "--climate", room,
                               "--reference", room, "--format", "json", check_rc=0).stdout)
    assert doc["climate"] == "warm room" and doc["reference"] == "warm room"
    # The reference climate has no [player] table: played to steady state, so the first minute
    # of playing from cold is flat against it; at minute 0 the wall is at the room's 26 °C.
    bore0 = [b for b in doc["bore"] if b["minute"] == 0.0]
    assert bore0[-1]["wall_temperature_c"] == pytest.approx(26.0, abs=1e-6)
    assert all(r["drift_cents"] < 0 for r in doc["rows"])


def test_output_file_written_whole_and_kept_on_failure(drift_cli, pipe, tmp_path):
    out = tmp_path / "warmup.json"
    drift_cli("warmup", pipe, "--plan", "play:1", "--step", "60", "--format", "json", "--output", out, check_rc=0)
    assert json.loads(out.read_text())["instrument"] == "test pipe"
    out.write_text("keep me")
    result = drift_cli("warmup", pipe, "--plan", "play:0", "--format", "json", "--output", out)
    assert result.returncode == 2
    assert out.read_text() == "keep me"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".warmup")] == []


@pytest.mark.parametrize("args, needle", [
    (["--plan", "play10"], "--plan"),
    (["--plan", "nap:3"], "--plan"),
    (["--plan", "play:0"], "--plan"),
    (["--step", "0"], "--step"),
    (["--climate", "nowhere-at-all"], "nowhere-at-all"),
    (["--format", "xml"], "--format"),
])
def test_bad_input_exits_2_without_traceback(drift_cli, pipe, args, needle):
    result = drift_cli("warmup", pipe, *args)
    assert result.returncode == 2
    assert needle in result.stderr
    assert "Traceback" not in result.stderr


@pytest.mark.parametrize("name", ["cylindrical-reed", "conical-reed", "side-blown-flute"])
def test_each_bundled_instrument_rises_falls_and_settles(drift_cli, name):
    doc = json.loads(drift_cli("warmup", name, "--plan", "play:8,rest:3,play:4", "--step", "60",
                               "--format", "json", check_rc=0).stdout)
    notes = doc["key_notes"]
    cents = {(r["minute"], r["note"]): r["drift_cents"] for r in doc["rows"]}
    for note in notes:
        assert cents[(0.0, note)] < cents[(4.0, note)] < cents[(8.0, note)]   # a rise while played
    # A fall in the rest: the warm breath stops and the wall cools. The lowest note of a wooden
    # bore may first rise a little as the heavier, CO2-rich breath leaves its cool lower end, so
    # the fall is asserted for the highest note and for the mean of all notes.
    top = notes[-1]
    assert cents[(11.0, top)] < cents[(9.0, top)] < cents[(8.0, top)]
    every = sorted({r["note"] for r in doc["rows"]})
    mean = {m: sum(cents[(m, n)] for n in every) / len(every) for m in (8.0, 9.0, 11.0)}
    assert mean[11.0] < mean[9.0] < mean[8.0]
    assert doc["settle_from_cold_minutes"] is not None and doc["settle_from_cold_minutes"] > 0.0


def test_default_instrument_and_design_climate(drift_cli):
    from drift import bore

    doc = json.loads(drift_cli("warmup", "--plan", "play:1", "--step", "60", "--format", "json",
                               check_rc=0).stdout)
    instrument = bore.load_instrument(bore.DEFAULT_INSTRUMENT)
    assert doc["instrument"] == instrument.name
    assert doc["climate"].startswith("design room")
    assert doc["reference"].startswith("design condition")
    assert doc["plan"] == [{"state": "play", "minutes": 1.0}]
