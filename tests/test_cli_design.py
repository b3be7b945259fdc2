"""``drift design`` and ``drift retune`` on the command line, in-process (click's runner): the JSON
contract of issue 11, the formats, and bad input."""

import json

import pytest
from conftest import CYLINDER, assert_refused, invoke
from test_design import TUBE_415

CONTRACT = {"instrument", "a4_hz", "relative_humidity_pct", "design_temperature_c", "sensitivity", "climates",
            "compromise_temperature_c", "transposition_semitones"}
SENSITIVITY = {"note", "written_note", "cents_per_k", "cents_per_10pct_rh", "cents_per_km_altitude", "cents_per_pct_co2"}
CLIMATE = {"climate", "mean_offset_cents", "spread_cents", "worst_note", "written_worst_note", "worst_offset_cents"}


@pytest.fixture
def tube(write_toml):
    return write_toml(TUBE_415.format(a4="415"), "tube.toml")


def test_design_json_contract(tube, tmp_path):
    output = tmp_path / "design.json"
    invoke("design", tube, "--climate", "tuning-room", "--format", "json", "--output", output)
    doc = json.loads(output.read_text(encoding="utf-8"))
    assert set(doc) == CONTRACT
    assert doc["instrument"] == "tube 415" and doc["a4_hz"] == 415.0
    assert doc["relative_humidity_pct"] == pytest.approx(50.0)      # the file's default design humidity
    assert [s["note"] for s in doc["sensitivity"]] == ["G3", "D5"]
    assert all(set(s) == SENSITIVITY and all(isinstance(s[k], float) for k in SENSITIVITY - {"note", "written_note"})
               for s in doc["sensitivity"])
    assert [set(c) for c in doc["climates"]] == [CLIMATE] and doc["climates"][0]["climate"] == "tuning-room"
    assert isinstance(doc["compromise_temperature_c"], float)


def test_design_table_csv_and_options(tube):
    text = invoke("design", tube, "--rh", "80", "--at-rest").stdout
    assert "in tune on average at" in text and "at rest, 80 % RH, A4 = 415 Hz" in text
    assert "Compromise" not in text
    csv = invoke("design", tube, "--format", "csv").stdout.splitlines()
    assert csv[0] == ("instrument,design_temperature_c,note,cents_per_k,cents_per_10pct_rh,"
                      "cents_per_km_altitude,cents_per_pct_co2")
    assert len(csv) == 3


def test_design_without_a_root_says_which_way(tube, tmp_path):
    output = tmp_path / "kept.json"
    output.write_text("earlier result\n", encoding="utf-8")
    assert_refused(invoke("design", tube, "--a4", "440", "--output", output, code=None), "no design temperature",
                   "flat", "-10 and 45 °C")
    assert output.read_text(encoding="utf-8") == "earlier result\n"


@pytest.mark.parametrize("args, words", [
    (["--a4", "1000"], ["--a4", "380", "480"]),
    (["--rh", "120"], ["--rh"]),
    (["--climate", "no-such-climate"], ["no-such-climate"]),
])
def test_design_refuses_bad_options(tube, args, words):
    assert_refused(invoke("design", tube, *args, code=None), *words)


def test_design_refuses_a_nonsense_a4_in_the_file(write_toml):
    path = write_toml(TUBE_415.format(a4="1000"), "bad.toml")
    assert_refused(invoke("design", path, code=None), "bad.toml", "a4_hz", "480")


def test_design_and_retune_need_notes(write_toml):
    path = write_toml(CYLINDER, "plain.toml")
    assert_refused(invoke("design", path, code=None), "[[note]]")
    assert_refused(invoke("retune", path, "--room-temp", "20", "--output", path.with_name("x.toml"), code=None),
                   "[[note]]")


def test_retune_refuses_to_overwrite_its_input(tube):
    before = tube.read_bytes()
    assert_refused(invoke("retune", tube, "--room-temp", "18", "--output", tube, code=None), "output",
                   "is the input file")
    assert tube.read_bytes() == before


@pytest.mark.parametrize("args, words", [
    (["--room-temp", "99"], ["--room-temp", "60"]),
    (["--room-temp", "20", "--a4", "2"], ["--a4"]),
    (["--room-temp", "20"], ["--output"]),
])
def test_retune_refuses_bad_options(tube, tmp_path, args, words):
    extra = [] if "--output" in words else ["--output", tmp_path / "new.toml"]
    assert_refused(invoke("retune", tube, *args, *extra, code=None), *words)
    assert not (tmp_path / "new.toml").exists()


def test_retune_writes_a_file_that_reads_back(tube, tmp_path):
    # The tube has no holes: only the bore length at its joint moves, at rest (fast).
    from drift.instrument import load_instrument

    output = tmp_path / "tube-25.toml"
    text = invoke("retune", tube, "--room-temp", "25", "--at-rest", "--output", output).stdout
    assert "retuned for 25 °C, 50 % RH, at rest, A4 = 415 Hz" in text
    new = load_instrument(output)
    assert not new.design.playing and new.design.a4_hz == 415.0
    assert output.read_text(encoding="utf-8").startswith("# Retuned by drift retune from")


def test_retune_needs_something_to_move(write_toml, tmp_path):
    text = TUBE_415.format(a4="415").replace("[tuning]\nposition_mm = 100\n", "")
    path = write_toml(text, "fixed.toml")
    assert_refused(invoke("retune", path, "--room-temp", "20", "--output", tmp_path / "new.toml", code=None),
                   "nothing to move", "[tuning]")
    assert not (tmp_path / "new.toml").exists()


def test_retune_refuses_an_output_in_a_missing_folder(tube, tmp_path):
    target = tmp_path / "no-such-folder" / "new.toml"
    assert_refused(invoke("retune", tube, "--room-temp", "20", "--output", target, code=None), "--output",
                   "does not exist")
