"""The command line (drift.cli), run in-process through click's test runner: every command's
output formats, documents and bad input. (The real console script: tests/test_main.py.)"""

import csv
import io
import json
import math

import numpy as np
import pytest

from conftest import BREATH_WARM_ROOM, BUNDLED, CONE, CYLINDER, TWO_HOLE_PIPE, WARM_ROOM, assert_refused
from drift import air, climate
from drift.constants import SPECIES
from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

# --------------------------------------------------------------------------------------------
# drift air
# --------------------------------------------------------------------------------------------

AIR_KEYS = {"temperature_c", "pressure_kpa", "relative_humidity_pct", "mole_fractions",
            "sound_speed_m_s", "density_kg_m3", "viscosity_pa_s", "thermal_conductivity_w_m_k",
            "heat_capacity_ratio", "condensed"}


def test_air_json_contract(cli):
    doc = json.loads(cli("air", "--temp", "25", "--rh", "60", "--format", "json").stdout)
    assert AIR_KEYS <= set(doc)
    assert set(doc["mole_fractions"]) == set(SPECIES)
    assert doc["temperature_c"] == pytest.approx(25.0)
    assert doc["relative_humidity_pct"] == pytest.approx(60.0)
    assert doc["condensed"] is False
    # Cramer (1993) Eq. 15 gives 347.3 m/s at 25 °C, 60 % RH, 101.325 kPa (evaluated in test_air).
    assert 346.5 < doc["sound_speed_m_s"] < 348.5


def test_air_altitude_and_breath(cli):
    doc = json.loads(cli("air", "--altitude", "2000", "--breath", "1", "--temp", "20", "--format", "json").stdout)
    # ISO 2533: 79.50 kPa at 2000 m.
    assert doc["pressure_kpa"] == pytest.approx(79.50, abs=0.01)
    assert doc["condensed"] is True
    assert doc["mole_fractions"]["CO2"] > 0.04


def test_gas_properties_option_computes_through_coolprop(cli):
    """``--gas-properties coolprop`` takes every state straight from CoolProp; it agrees with the
    default table within 5 ppm in sound speed (issue 9) and the next run is back on the table."""
    args = ("air", "--temp", "31", "--rh", "80", "--breath", "0.4", "--format", "json")
    direct = json.loads(cli("--gas-properties", "coolprop", *args).stdout)
    assert air.property_source() == "coolprop"
    tabled = json.loads(cli(*args).stdout)
    assert air.property_source() == "table"
    assert tabled["sound_speed_m_s"] == pytest.approx(direct["sound_speed_m_s"], rel=5e-6)
    assert tabled["density_kg_m3"] == pytest.approx(direct["density_kg_m3"], rel=1e-3)
    assert_refused(cli("--gas-properties", "guess", "air", code=None), "--gas-properties")


def test_air_table_and_csv(cli):
    table = cli("air").stdout
    assert "speed of sound" in table and "m/s" in table
    lines = cli("air", "--format", "csv").stdout.splitlines()
    assert len(lines) == 2 and "sound_speed_m_s" in lines[0] and "x_H2O" in lines[0]


@pytest.mark.parametrize("args, needle", [
    (["--temp", "75"], "--temp"),
    (["--rh", "-5"], "--rh"),
    (["--co2", "200000"], "--co2"),
    (["--breath", "2"], "--breath"),
    (["--pressure", "30"], "--pressure"),
    (["--pressure", "100", "--altitude", "300"], "--altitude"),
    (["--format", "xml"], "--format"),
    (["--temp", "warm"], "--temp"),
])
def test_air_bad_input_exits_2(cli, args, needle):
    assert_refused(cli("air", *args, code=None), needle)


# --------------------------------------------------------------------------------------------
# drift climates, drift instruments
# --------------------------------------------------------------------------------------------


def test_climates_command(cli):
    table = cli("climates").stdout
    assert "winter-church" in table and max(len(line) for line in table.splitlines()) <= 100
    doc = json.loads(cli("climates", "--format", "json").stdout)
    assert {c["name"] for c in doc["climates"]} >= {"winter-church", "sunny-lawn", "frozen-parade"}
    rows = list(csv.DictReader(io.StringIO(cli("climates", "--format", "csv").stdout)))
    assert {r["playing"] for r in rows} == {"true", "false"}    # not Python's True/False
    assert [r["name"] for r in rows] == [c["name"] for c in doc["climates"]]


def test_instruments_listing(cli):
    doc = json.loads(cli("instruments", "--format", "json").stdout)
    names = [i["name"] for i in doc["instruments"]]
    assert names == list(BUNDLED)
    assert all(i["description"] for i in doc["instruments"])
    assert "side-blown-flute" in cli("instruments").stdout


# --------------------------------------------------------------------------------------------
# drift chart
# --------------------------------------------------------------------------------------------

CHART_KEYS = {"instrument", "a4_hz", "reference", "climates", "rows", "summary"}
ROW_KEYS = {"note", "register", "climate", "frequency_hz", "drift_cents", "offset_from_equal_cents"}
SUMMARY_KEYS = {"climate", "mean_drift_cents", "min_drift_cents", "max_drift_cents", "spread_cents",
                "adjust_mm", "residual_spread_cents", "out_of_tolerance"}


def test_default_chart_covers_every_bundled_climate(default_chart):
    assert CHART_KEYS <= set(default_chart)
    names = [c.name for c in climate.bundled_climates()]
    assert default_chart["climates"] == names
    assert default_chart["a4_hz"] == 440.0
    assert default_chart["instrument"] == DEFAULT_INSTRUMENT
    assert {r["climate"] for r in default_chart["rows"]} == set(names)
    assert all(ROW_KEYS <= set(r) for r in default_chart["rows"])
    assert [s["climate"] for s in default_chart["summary"]] == names
    assert all(SUMMARY_KEYS <= set(s) for s in default_chart["summary"])
    cold = next(s for s in default_chart["summary"] if s["climate"] == "frozen-parade")
    hot = next(s for s in default_chart["summary"] if s["climate"] == "sunny-lawn")
    assert cold["mean_drift_cents"] < 0 < hot["mean_drift_cents"]
    assert cold["adjust_mm"] < 0 < hot["adjust_mm"]


def test_cold_and_hot_climates_carry_care_cautions(default_chart):
    """The default instrument is wooden: the freezing parade warns of cracking and freezing, the
    sunny lawn of heat and sun, and the set defers to the maker and local rules (common practice)."""
    topics = {(c["climate"], c["topic"]) for c in default_chart["cautions"]}
    assert {("frozen-parade", "cold"), ("frozen-parade", "freezing"), ("sunny-lawn", "heat")} <= topics
    assert not any(c["climate"] == "tuning-room" for c in default_chart["cautions"])
    assert "maker's instructions" in default_chart["care_note"]


def test_chart_table_fits_100_columns(cli):
    # (the table of the default chart over every bundled climate: tests/test_render.py)
    text = cli("chart", "--climate", "winter-church").stdout
    assert max(len(line) for line in text.splitlines()) <= 100
    assert "joint mm" in text and "winter-" in text


def test_csv_and_output_file(cli, tmp_path):
    text = cli("chart", "--climate", "winter-church", "--climate", "lit-stage", "--format", "csv").stdout
    rows = list(csv.DictReader(io.StringIO(text)))
    assert text.splitlines()[0].startswith("kind,note,register,climate,frequency_hz,drift_cents,offset_from_equal_cents")
    assert {r["climate"] for r in rows if r["kind"] == "drift"} == {"winter-church", "lit-stage"}
    summary = [r for r in rows if r["kind"] == "summary"]
    assert [r["climate"] for r in summary] == ["winter-church", "lit-stage"]
    assert all(r["adjust_mm"] and r["spread_cents"] for r in summary)        # what the table's summary says
    assert any(r["kind"] == "caution" and r["text"] for r in rows)
    target = tmp_path / "chart.json"
    result = cli("chart", "--climate", "cooled-hall", "--a4", "442", "--format", "json", "--output", target)
    assert result.stdout == ""
    doc = json.loads(target.read_text())
    assert doc["a4_hz"] == 442.0 and doc["climates"] == ["cooled-hall"]
    (conditions,) = doc["conditions"]                      # each climate's conditions travel with it
    assert conditions["name"] == "cooled-hall" and conditions["temperature_c"] == 20.5


def test_failed_run_leaves_output_file_untouched(cli, tmp_path):
    target = tmp_path / "keep.txt"
    target.write_text("previous result\n")
    result = cli("chart", "--climate", "nowhere", "--output", target, code=None)
    assert_refused(result, "nowhere")
    assert target.read_text() == "previous result\n"
    assert list(tmp_path.iterdir()) == [target]


@pytest.mark.parametrize("args, needle", [
    (["--climate", "winter-chruch"], "did you mean 'winter-church'"),
    (["no-such-instrument"], "no-such-instrument"),
    (["--a4", "1000"], "--a4"),
    (["--tolerance", "-1"], "--tolerance"),
    (["--reference", "missing.toml"], "missing.toml"),
])
def test_chart_bad_input_exits_2(cli, args, needle):
    assert_refused(cli("chart", *args, code=None), needle)


def test_bad_climate_file_names_file_and_key(cli, write_toml):
    path = write_toml('name = "odd"\n[air]\ntemperature_c = 20\nhumidity = 40\n', "odd.toml")
    assert_refused(cli("chart", "--climate", path, code=None), str(path), "humidity")


# --------------------------------------------------------------------------------------------
# drift resonances
# --------------------------------------------------------------------------------------------


def sound_speed(t_c, rh):
    x = air.room_air(t_c + 273.15, 101325.0, rh)
    return float(air.gas_properties(t_c + 273.15, 101325.0, x).sound_speed)


def test_closed_open_cylinder_from_a_hand_written_file(cli, write_toml):
    # f_n = (2n-1) c / 4 (L + 0.6133 a): Levine & Schwinger (1948) end correction, lossless.
    path = write_toml(CYLINDER, "tube.toml")
    doc = json.loads(cli("resonances", path, "--lossless", "--temp", "25", "--rh", "0",
                         "--count", "4", "--format", "json").stdout)
    assert doc["instrument"] == "tube"
    (fingering,) = doc["fingerings"]
    assert fingering["note"] is None and fingering["register"] is None
    c = sound_speed(25.0, 0.0)
    expected = [(2 * n - 1) * c / (4 * (0.6 + 0.6133 * 0.005)) for n in range(1, 5)]
    got = np.array(fingering["resonances_hz"])
    assert np.max(np.abs(1200 * np.log2(got / expected))) < 0.02


def test_truncated_cone_from_a_hand_written_file(cli, write_toml):
    # tan(k L') = -k x1 (Fletcher & Rossing 1998, Eq. 8.48; Benade 1976), x1 = 150 mm from the
    # apex; the unflanged end correction is taken as extra cone length L' = L + 0.6133 a_end,
    # an approximation good to about 1 Hz here (tolerance 3 Hz; measured 0.1-0.7 Hz).
    from scipy.optimize import brentq

    path = write_toml(CONE, "cone.toml")
    doc = json.loads(cli("resonances", path, "--lossless", "--rh", "0", "--count", "4", "--format", "json").stdout)
    got = np.array(doc["fingerings"][0]["resonances_hz"])
    c = sound_speed(20.0, 0.0)
    lp, x1 = 0.6 + 0.6133 * 0.025, 0.15
    g = lambda k: math.sin(k * lp) + k * x1 * math.cos(k * lp)
    ks = np.linspace(0.1, 30, 3000)
    roots = [brentq(g, a, b) for a, b in zip(ks[:-1], ks[1:]) if g(a) * g(b) < 0][:4]
    assert np.allclose(got, np.array(roots) * c / (2 * math.pi), atol=3.0)
    # a cone plays (nearly) all harmonics, not only the odd ones
    assert 1.9 < got[1] / got[0] < 2.2


def test_bundled_default_table_and_csv(cli):
    out = cli("resonances", "--count", "3").stdout
    lines = out.splitlines()
    assert lines[0] == "cylindrical-reed" and "f3 Hz" in lines[1]
    assert len(lines) == 3 + 18
    rows = list(csv.DictReader(io.StringIO(cli("resonances", "conical-reed", "--note", "Ab4", "--count", "2",
                                               "--format", "csv").stdout)))
    assert [(r["note"], r["register"], r["resonance"]) for r in rows] == [("Ab4", "2", "1"), ("Ab4", "2", "2")]
    assert 380 < float(rows[1]["frequency_hz"]) < 450  # register 2 is the second peak: Ab4 = 415 Hz


def test_warmer_room_raises_resonances(cli):
    def first(temp):
        doc = json.loads(cli("resonances", "side-blown-flute", "--note", "C4", "--temp", temp,
                             "--count", "1", "--format", "json").stdout)
        return doc["fingerings"][0]["resonances_hz"][0]

    # c ~ sqrt(T): 10 K warmer at 20 °C is about +29 cent (Fletcher & Rossing 1998, Sec. 8.1)
    assert 24 < 1200 * math.log2(first(30) / first(20)) < 34


@pytest.mark.parametrize("args, words", [
    (("resonances", "no-such-horn"), ["unknown instrument 'no-such-horn'", "Bundled"]),
    (("resonances", "--note", "H4"), ["--note", "no note 'H4'"]),
    (("resonances", "--count", "0"), ["--count"]),
    (("resonances", "--temp", "90"), ["--temp"]),
    (("resonances", "--pressure", "100", "--altitude", "300"), ["--pressure or --altitude"]),
])
def test_resonances_bad_input_exits_2(cli, args, words):
    assert_refused(cli(*args, code=None), *words)


def test_bad_instrument_file_names_file_and_key(cli, write_toml):
    path = write_toml(CYLINDER.replace("[input]\nreed_volume_mm3", "[input]\nreed_volum_mm3"), "bad.toml")
    assert_refused(cli("resonances", path, code=None), "bad.toml", "reed_volum_mm3",
                   "did you mean 'reed_volume_mm3'")
    # the former single volume names the two keys that replace it
    path = write_toml(CYLINDER.replace("[input]\nreed_volume_mm3", "[input]\nadded_volume_mm3"), "old.toml")
    assert_refused(cli("resonances", path, code=None), "old.toml", "added_volume_mm3", "reed_volume_mm3",
                   "cavity_volume_mm3")


# --------------------------------------------------------------------------------------------
# drift warmup
# --------------------------------------------------------------------------------------------


def test_warmup_json_contract_rise_fall_and_settle(pipe_warmup):
    # The shared run: the test pipe, plan play:6,rest:3,play:3, every minute, JSON to a file.
    assert pipe_warmup.result.stdout == ""  # the document went to the file, whole
    doc = pipe_warmup.doc
    assert doc["plan"] == [{"state": "play", "minutes": 6.0}, {"state": "rest", "minutes": 3.0},
                           {"state": "play", "minutes": 3.0}]
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


def test_warmup_table_and_csv(cli, warmup_pipe, write_toml):
    # In a room at the breath's temperature (35 °C, saturated) the breath gives the bore no heat
    # and no water: the bore starts in its steady state, every note holds its pitch and the search
    # for the settle time from cold ends at its first step, which keeps these two runs short.
    # (The tables of a real warm-up: tests/test_render.py, on the shared run of the pipe.)
    room = write_toml(BREATH_WARM_ROOM, "room.toml")
    text = cli("warmup", warmup_pipe, "--plan", "play:2", "--step", "60", "--climate", room).stdout
    assert "minute" in text and "D3" in text and "steady" in text
    assert "play phase 1" in text and "2 cents" in text and "from cold" in text
    assert "within 2 cents of the steady state after 0.0 min" in text
    lines = cli("warmup", warmup_pipe, "--plan", "play:2", "--step", "60", "--climate", room,
                "--format", "csv").stdout.splitlines()
    rows = list(csv.DictReader(io.StringIO("\n".join(lines))))
    assert lines[0].startswith("kind,minute,state,note,frequency_hz,drift_cents,joint_mm")
    kinds = [r["kind"] for r in rows]
    assert kinds.count("row") == 3 * 3 and kinds.count("steady") == 3 and kinds.count("settle") == 1
    assert "from_cold" in kinds and "tune" in kinds
    rows = [r for r in rows if r["kind"] == "row"]
    for note in ("D3", "E3", "F#3"):
        drift = [float(r["drift_cents"]) for r in rows if r["note"] == note]
        assert max(drift) - min(drift) < 1e-6, (note, drift)


def test_warmup_climate_and_reference_files(cli, warmup_pipe, write_toml):
    room = write_toml(WARM_ROOM, "room.toml")
    doc = json.loads(cli("warmup", warmup_pipe, "--plan", "play:1", "--step", "60", "--climate", room,
                         "--reference", room, "--format", "json").stdout)
    assert doc["climate"] == "warm room" and doc["reference"] == "warm room"
    # The reference climate has no [player] table: played to steady state, so the first minute
    # of playing from cold is flat against it; at minute 0 the wall is at the room's 26 °C.
    bore0 = [b for b in doc["bore"] if b["minute"] == 0.0]
    assert bore0[-1]["wall_temperature_c"] == pytest.approx(26.0, abs=1e-6)
    assert all(r["drift_cents"] < 0 for r in doc["rows"])


@pytest.mark.parametrize("command", ["chart", "warmup"])
def test_output_may_not_overwrite_the_input(cli, tmp_path, command):
    source = tmp_path / "pipe.toml"
    source.write_text(TWO_HOLE_PIPE)
    result = cli(command, source, "--output", source, code=None)
    assert_refused(result, f"output {source} is the input file")
    assert source.read_text() == TWO_HOLE_PIPE


def test_warmup_output_kept_on_failure(cli, pipe_warmup, tmp_path):
    # (a whole document written to --output: the shared run above)
    out = tmp_path / "warmup.json"
    out.write_text("keep me")
    result = cli("warmup", pipe_warmup.pipe, "--plan", "play:0", "--format", "json", "--output", out, code=None)
    assert_refused(result, "--plan")
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
def test_warmup_bad_input_exits_2(cli, warmup_pipe, args, needle):
    assert_refused(cli("warmup", warmup_pipe, *args, code=None), needle)


def test_default_instrument_and_design_climate(bundled_warmups):
    # The shared run of the default instrument named no instrument and no climate.
    doc = bundled_warmups[DEFAULT_INSTRUMENT]
    assert doc["instrument"] == load_instrument(DEFAULT_INSTRUMENT).name
    assert doc["climate"].startswith("design room")
    assert doc["reference"].startswith("design condition")
    assert doc["plan"] == [{"state": "play", "minutes": 8.0}, {"state": "rest", "minutes": 3.0}]


# --------------------------------------------------------------------------------------------
# A4 from the instrument file, offsets from equal temperament, notes far from their names
# --------------------------------------------------------------------------------------------

#: A 600 mm reed pipe of 15 mm bore with one hole; the closed-hole note sounds near C#3 (about
#: 139 Hz), the open one near 178 Hz: F3 (+33 cents, kept) and D3 (+333 cents, flagged).
NAMED_PIPE = """
name = "named pipe"
excitation = "reed"
[bore]
stations_mm = [[0, 15], [600, 15]]
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 9.0
[[note]]
name = "C#3"
closed = ["h1"]
[[note]]
name = "F3"
closed = []
[[note]]
name = "D3"
closed = []
{design}
"""
#: MIDI numbers of the pipe's names, written out (C4 = 60, A4 = 69: MIDI 1.0 specification).
MIDI = {"C#3": 49, "F3": 53, "D3": 50}


def equal_hz(note, a4):
    """Twelve-tone equal temperament from A4, f = a4 2^((m - 69)/12) (ISO 16:1975 reference pitch;
    the definition of equal temperament), written out independently of drift.scale."""
    return a4 * 2.0 ** ((MIDI[note] - 69) / 12.0)


def test_chart_takes_a4_from_the_file_unless_given(cli, write_toml):
    path = write_toml(NAMED_PIPE.format(design="[design]\na4_hz = 415"), "pipe.toml")
    for args, a4 in (([], 415.0), (["--a4", "442"], 442.0)):
        doc = json.loads(cli("chart", path, "--climate", "lit-stage", *args, "--format", "json").stdout)
        assert doc["a4_hz"] == a4
        for r in doc["rows"] + doc["reference_notes"]:
            expected = 1200.0 * math.log2(r["frequency_hz"] / equal_hz(r["note"], a4))
            assert r["offset_from_equal_cents"] == pytest.approx(expected, abs=1e-9)
    table = cli("chart", path, "--climate", "lit-stage").stdout
    assert "A4 = 415 Hz" in table.splitlines()[0]


def test_chart_offsets_option_adds_the_table(cli, write_toml):
    path = write_toml(NAMED_PIPE.format(design=""), "pipe.toml")
    plain = cli("chart", path, "--climate", "lit-stage", "--climate", "winter-church").stdout
    assert "Offset from equal temperament" not in plain
    text = cli("chart", path, "--climate", "lit-stage", "--climate", "winter-church", "--offsets").stdout
    assert max(len(line) for line in text.splitlines()) <= 100
    doc = json.loads(cli("chart", path, "--climate", "lit-stage", "--climate", "winter-church",
                         "--format", "json").stdout)
    part = text.split("Offset from equal temperament")[1]
    assert "reference: design" in part.splitlines()[0]
    lines = {line.split()[0]: line.split()[1:] for line in part.splitlines()[5:8]}
    for r in doc["reference_notes"]:
        expected = [r["offset_from_equal_cents"]] + [
            x["offset_from_equal_cents"] for x in doc["rows"] if x["note"] == r["note"]]
        assert lines[r["note"]] == [f"{v:+.1f}" for v in expected]


def test_notes_far_from_their_names_are_flagged_by_every_command(cli, write_toml):
    path = write_toml(NAMED_PIPE.format(design=""), "pipe.toml")
    docs = {
        "resonances": json.loads(cli("resonances", path, "--count", "1", "--format", "json").stdout),
        "chart": json.loads(cli("chart", path, "--climate", "lit-stage", "--format", "json").stdout),
        "warmup": json.loads(cli("warmup", path, "--plan", "play:1", "--step", "60",
                                 "--format", "json").stdout),
    }
    design = {r["note"]: r["frequency_hz"] for r in docs["chart"]["reference_notes"]}
    offsets = {n: 1200.0 * math.log2(f / equal_hz(n, 440.0)) for n, f in design.items()}
    # the pipe is as described: one note in tune, one within 50 cents, one far beyond
    assert abs(offsets["C#3"]) < 10 and 20 < offsets["F3"] < 45 and offsets["D3"] > 250
    for command, doc in docs.items():
        (w,) = doc["name_warnings"]
        assert w["note"] == "D3" and w["a4_hz"] == 440.0, command
        assert w["equal_temperament_hz"] == pytest.approx(equal_hz("D3", 440.0), rel=1e-12)
        assert w["offset_from_equal_cents"] == pytest.approx(offsets["D3"], abs=1e-6), command
    line = f"warning: D3 is {offsets['D3']:+.0f} cents from its name at the design condition"
    tables = {
        "resonances": cli("resonances", path, "--count", "1").stdout,
        "chart": cli("chart", path, "--climate", "lit-stage").stdout,
        "warmup": cli("warmup", path, "--plan", "play:1", "--step", "60").stdout,
    }
    for command, text in tables.items():
        flagged = [x for x in text.splitlines() if x.startswith("warning: ")]
        assert len(flagged) == 1 and flagged[0].startswith(line), (command, text)
    # CSV has no place for it: the same line goes to standard error
    result = cli("resonances", path, "--count", "1", "--format", "csv")
    assert result.stderr.strip().startswith("drift: " + line) and "warning" not in result.stdout
    # --note shows one fingering: only its own warning
    only = json.loads(cli("resonances", path, "--note", "F3", "--count", "1", "--format", "json").stdout)
    assert only["name_warnings"] == []


def test_bundled_instruments_sound_near_their_names(cli):
    for name in ("cylindrical-reed", "conical-reed", "side-blown-flute"):
        doc = json.loads(cli("resonances", name, "--count", "1", "--format", "json").stdout)
        assert doc["name_warnings"] == [], name


@pytest.mark.parametrize("args, words", [
    (["chart", "--a4", "nan"], ["--a4", "not a finite number", "380.0<=x<=480.0", "drift chart --help"]),
    (["chart", "--tolerance", "inf"], ["--tolerance", "0.0<x<=100.0"]),
    (["warmup", "--step", "nan"], ["--step", "not a finite number"]),
    (["air", "--temp", "-inf"], ["--temp", "-30.0<=x<=60.0"]),
    (["chart", "--bogus"], ["No such option '--bogus'", "drift chart --help"]),
    (["nosuch"], ["No such command 'nosuch'"]),
])
def test_option_errors_are_one_line_and_refuse_nan(cli, args, words):
    result = cli(*args, code=None)
    assert_refused(result, *words)
    assert len(result.stderr.strip().splitlines()) == 1 and "Usage:" not in result.stderr


# --------------------------------------------------------------------------------------------
# drift advise
# --------------------------------------------------------------------------------------------

#: The JSON contract of `drift advise` (issue "The gig planner"): these keys at least.
ADVISE_KEYS = {"instruments", "climate", "moments", "advice", "cautions"}
MOMENT_KEYS = {"minute", "label", "instruments", "widest_gap_cents"}
STANDING_KEYS = {"instrument", "mean_drift_cents", "adjust_mm", "joint_reachable", "from_ensemble_cents",
                 "out_of_tolerance", "written_out_of_tolerance", "transposition_semitones"}


@pytest.fixture(scope="module")
def advised(tmp_path_factory):
    """`drift advise` of a small jointed pipe, twice (an ensemble of two: once from an ensemble
    file, once as an argument), through the bundled summer evening, as JSON."""
    from conftest import TWO_HOLE_PIPE, invoke, write_file

    folder = tmp_path_factory.mktemp("advise")
    path = write_file(folder, TWO_HOLE_PIPE, "pipe.toml")
    band = write_file(folder, 'name = "duo"\nplan = "play:2,rest:2,play:2"\n[[member]]\ninstrument = "pipe.toml"\n',
                      "duo.toml")
    out = tmp_path_factory.mktemp("advise-out") / "gig.json"
    invoke("advise", path, "--ensemble", band, "--climate", "hillside-evening", "--format", "json", "--output", out)
    return path, json.loads(out.read_text(encoding="utf-8"))


def test_advise_json_contract(advised):
    _, doc = advised
    assert ADVISE_KEYS <= set(doc)
    assert doc["instruments"] == ["pipe 1", "pipe 2"] and doc["climate"] == "hillside-evening"
    assert [m["label"] for m in doc["moments"]] == ["start", "after warm-up", "set 1", "end"]
    assert [m["minute"] for m in doc["moments"]] == [0, 2, 4, 6]
    for m in doc["moments"]:
        assert MOMENT_KEYS <= set(m) and len(m["instruments"]) == 2
        for s in m["instruments"]:
            assert STANDING_KEYS <= set(s)
            assert isinstance(s["joint_reachable"], bool) and isinstance(s["out_of_tolerance"], list)
            assert s["adjust_mm"] is None or math.isfinite(s["adjust_mm"])
    assert all(isinstance(a, str) and a for a in doc["advice"])
    assert all(c.endswith("(common practice)") for c in doc["cautions"])
    assert "maker's instructions" in doc["care_note"]


def test_advise_sheet_reads_on_a_phone(advised):
    from drift import sheet

    _, doc = advised
    text = sheet.gig_sheet(doc)
    assert max(len(line) for line in text.splitlines()) <= 60
    assert "AFTER WARM-UP, minute 2" in text and "CARE (common practice)" in text
    assert "nan" not in text.lower()


def test_advise_written_names_for_a_transposing_instrument(cli, write_toml, two_hole_pipe):
    # A duo of the test pipe in B-flat (transposition_semitones = 2) and at concert pitch, with a
    # tolerance so tight that both notes stay out. A part for an instrument in B-flat is written
    # a major second above the sound (common practice): sounding D3, E3 are written E3, F#3.
    from drift import sheet

    bb = write_toml(TWO_HOLE_PIPE.replace('name = "pipe"', 'name = "bb pipe"\ntransposition_semitones = 2', 1),
                    "bb.toml")
    args = ["advise", bb, two_hole_pipe, "--climate", "tuning-room", "--plan", "play:1", "--tolerance", "0.01"]
    doc = json.loads(cli(*args, "--format", "json").stdout)
    for m in doc["moments"]:
        bb_pipe, pipe = m["instruments"]
        assert (bb_pipe["transposition_semitones"], pipe["transposition_semitones"]) == (2, 0)
        assert bb_pipe["out_of_tolerance"] == pipe["out_of_tolerance"] == ["D3", "E3"]
        assert bb_pipe["written_out_of_tolerance"] == ["E3", "F#3"]
        assert pipe["written_out_of_tolerance"] == ["D3", "E3"]
    text = cli(*args, "--written").stdout
    assert text == sheet.gig_sheet(doc, written=True)
    assert "Written notes: bb pipe in Bb; pipe as sounding." in text.splitlines()[1]
    assert "  bb pipe still out: E3, F#3" in text and "  pipe still out: D3, E3" in text
    assert "bb pipe still out: D3, E3" in sheet.gig_sheet(doc) and "Written notes" not in sheet.gig_sheet(doc)


@pytest.mark.parametrize("args, words", [
    (["advise", "--climate", "hillside-evening"], ["INSTRUMENT", "--ensemble"]),
    (["advise", "--ensemble", "no-such-band.toml", "--climate", "hillside-evening"], ["no-such-band.toml"]),
    (["advise", "side-blown-flute"], ["--climate"]),
    (["advise", "side-blown-flute", "--climate", "nowhere"], ["nowhere"]),
    (["advise", "side-blown-flute", "--climate", "hillside-evening", "--plan", "rest:5,play:5"],
     ["--plan", "start with play"]),
    (["advise", "side-blown-flute", "--climate", "hillside-evening", "--plan", "play:x"], ["--plan", "minutes"]),
    (["advise", "side-blown-flute", "--climate", "hillside-evening", "--a4", "500"], ["--a4", "380"]),
    (["advise", "side-blown-flute", "--climate", "hillside-evening", "--format", "csv"], ["--format", "text"]),
    (["advise", "side-blowen-flute", "--climate", "hillside-evening"], ["side-blown-flute"]),
])
def test_advise_bad_input_exits_2(cli, args, words):
    assert_refused(cli(*args, code=None), *words)


def test_advise_bad_climate_change_names_file_and_key(cli, tmp_path):
    bad = tmp_path / "evening.toml"
    bad.write_text('name = "e"\n[air]\ntemperature_c = 25\n[[change]]\nminute = 20\n[[change]]\nminute = 10\n',
                   encoding="utf-8")
    target = tmp_path / "gig.txt"
    target.write_text("keep me", encoding="utf-8")
    result = cli("advise", "side-blown-flute", "--climate", bad, "--output", target, code=None)
    assert_refused(result, "evening.toml", "[[change]] #2 minute")
    assert target.read_text(encoding="utf-8") == "keep me"


def test_warmup_carries_the_climates_cautions_and_every_note(cli, warmup_pipe, write_toml, bundled_warmups):
    # The breath-warm room (35 °C, 100 % RH) crosses the heat, players' and damp thresholds
    # (docs/guide.md, "Care cautions"; common practice).
    room = write_toml(BREATH_WARM_ROOM, "room.toml")
    doc = json.loads(cli("warmup", warmup_pipe, "--plan", "play:2", "--step", "60", "--climate", room,
                         "--format", "json").stdout)
    assert {c["topic"] for c in doc["cautions"]} == {"heat", "players", "damp"}
    assert "maker's instructions" in doc["care_note"]
    from drift import render

    flute = bundled_warmups["side-blown-flute"]
    header = render.warmup_table(flute, all_notes=True).splitlines()[1]
    assert all(f"{n} ¢" in header for n in {r["note"] for r in flute["rows"]})
    assert len(flute["key_notes"]) < len({r["note"] for r in flute["rows"]})


def test_brass_instruments_through_chart_design_and_advise():
    # The brass families run through every command a band's technician uses (their warm-ups:
    # tests/test_warmup.py, every bundled instrument): a chart in one climate, the maker's design
    # study, and a short evening for the two together, with written notes.
    from conftest import invoke

    chart = json.loads(invoke("chart", "slide-brass", "--climate", "winter-church", "--format", "json").stdout)
    assert chart["instrument"] == "slide-brass" and chart["rows"]
    assert all(math.isfinite(r["drift_cents"]) and r["drift_cents"] < 0 for r in chart["rows"])  # a cold church
    design = json.loads(invoke("design", "valved-brass", "--format", "json").stdout)
    assert 10.0 < design["design_temperature_c"] < 35.0
    sheet = invoke("advise", "valved-brass", "slide-brass", "--climate", "winter-church", "--plan",
                   "play:5,rest:2,play:5", "--written").stdout
    assert "valved-brass" in sheet and "slide-brass" in sheet and "Bb" in sheet


@pytest.mark.parametrize("command, name", [("instruments", "valved-brass"), ("climates", "hillside-evening")])
def test_show_prints_the_bundled_file_to_start_ones_own(tmp_path, command, name):
    # The printed file, saved and loaded as one's own, is the bundled one (its source aside).
    import dataclasses

    from conftest import invoke

    text = invoke(command, "--show", name).stdout
    own = tmp_path / "mine.toml"
    own.write_text(text, encoding="utf-8")
    if command == "instruments":
        mine, bundled = load_instrument(own), load_instrument(name)
    else:
        mine, bundled = climate.load_climate(own), climate.load_climate(name)
    compared = [f.name for f in dataclasses.fields(bundled) if f.name != "source"]
    assert len(compared) > 3
    for field in compared:
        a, b = getattr(mine, field), getattr(bundled, field)
        assert np.array_equal(a, b) if isinstance(b, np.ndarray) else a == b, field
