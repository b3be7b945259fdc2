"""Rendering (drift.render): JSON and CSV text, tables, documents in boundary units, and the atomic
writing of output files."""

import csv
import io
import json
import math
import os
import signal
import stat

import numpy as np
import pytest

from drift import render
from drift.climate import Room, load_climate
from drift.errors import DriftError
from drift.instrument import Note
from drift.pitch import Resonances


def test_json_turns_nan_and_infinity_into_null_and_numpy_into_python():
    doc = {"a": math.nan, "b": [1.0, math.inf, -math.inf], "c": np.float64(2.5), "d": np.int64(3),
           "e": (np.bool_(True), "°C"), "f": {"g": np.float32(np.nan)}}
    text = render.to_json(doc)
    assert text.endswith("}\n") and "NaN" not in text and "Infinity" not in text
    assert "°C" in text  # not escaped
    assert json.loads(text) == {"a": None, "b": [1.0, None, None], "c": 2.5, "d": 3, "e": [True, "°C"],
                                "f": {"g": None}}


def test_csv_header_columns_and_empty_cells_for_nan():
    rows = [{"note": "D3", "drift_cents": 1.5, "extra": "x"}, {"note": "E3", "drift_cents": math.nan}]
    text = render.to_csv(rows, ["note", "drift_cents"])
    assert text == "note,drift_cents\nD3,1.5\nE3,\n"
    assert render.to_csv([{"b": 1, "a": 2}]).splitlines()[0] == "b,a"  # columns default to the first row's
    assert render.to_csv([], ["x"]) == "x\n"


def test_write_text_replaces_whole_files(tmp_path):
    target = tmp_path / "out.txt"
    render.write_text("first\n", target)
    render.write_text("second\n", str(target))
    assert target.read_text() == "second\n"
    assert [p.name for p in tmp_path.iterdir()] == ["out.txt"]


def test_write_text_failure_leaves_the_old_file_untouched(tmp_path):
    target = tmp_path / "keep.txt"
    target.write_text("previous result\n")
    # A lone surrogate cannot be encoded as UTF-8: the write fails once the temporary file exists.
    with pytest.raises(UnicodeEncodeError):
        render.write_text("x" * 100_000 + "\udc80", target)
    assert target.read_text() == "previous result\n"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.txt"]  # no temporary file left behind
    missing = tmp_path / "no-such-folder" / "out.txt"
    with pytest.raises(DriftError) as info:
        render.write_text("text", missing)
    assert str(info.value).startswith(f"{missing}: cannot write the output") and ".tmp" not in str(info.value)
    assert [p.name for p in tmp_path.iterdir()] == ["keep.txt"]


def test_write_text_keeps_the_mode_or_takes_the_umask(tmp_path):
    kept = tmp_path / "kept.txt"
    kept.write_text("old\n")
    kept.chmod(0o644)
    render.write_text("new\n", kept)
    assert stat.S_IMODE(kept.stat().st_mode) == 0o644
    previous = os.umask(0o027)
    try:
        render.write_text("new\n", tmp_path / "fresh.txt")
    finally:
        os.umask(previous)
    assert stat.S_IMODE((tmp_path / "fresh.txt").stat().st_mode) == 0o640


def test_write_text_writes_through_a_symlink(tmp_path):
    real = tmp_path / "real.json"
    real.write_text("old\n")
    link = tmp_path / "link.json"
    link.symlink_to(real)
    render.write_text("new\n", link)
    assert link.is_symlink() and real.read_text() == "new\n"


def test_sigterm_while_writing_leaves_no_temporary_file(tmp_path, monkeypatch):
    target = tmp_path / "out.txt"
    target.write_text("previous\n")
    real_replace = os.replace

    def terminated(*args):
        os.kill(os.getpid(), signal.SIGTERM)  # arrives inside the write window
        real_replace(*args)

    monkeypatch.setattr(os, "replace", terminated)
    with pytest.raises(SystemExit) as info:
        render.write_text("new\n", target)
    assert info.value.code == 128 + signal.SIGTERM
    assert [p.name for p in tmp_path.iterdir()] == ["out.txt"] and target.read_text() == "previous\n"
    assert signal.getsignal(signal.SIGTERM) == signal.SIG_DFL  # the handler is put back


def test_write_text_without_a_path_goes_to_standard_output(capsys):
    render.write_text("to the terminal\n", None)
    assert capsys.readouterr().out == "to the terminal\n"


def test_air_document_table_and_csv():
    from drift import air

    state = air.air_properties(Room(298.15, 90e3, 0.6), breath_fraction=0.25)
    doc = render.air_document(state, 0.25)
    assert doc["temperature_c"] == pytest.approx(25.0) and doc["pressure_kpa"] == pytest.approx(90.0)
    assert doc["relative_humidity_pct"] == pytest.approx(100.0 * float(state.relative_humidity))
    assert doc["breath_fraction"] == 0.25 and doc["condensed"] is False
    assert sum(doc["mole_fractions"].values()) == pytest.approx(1.0)
    table = render.air_table(doc)
    assert "speed of sound" in table and "mole fraction CO2" in table and "supersaturated" not in table
    assert "supersaturated" in render.air_table({**doc, "condensed": True})
    (row,) = csv.DictReader(io.StringIO(render.air_csv(doc)))
    assert float(row["sound_speed_m_s"]) == pytest.approx(doc["sound_speed_m_s"])
    assert float(row["x_H2O"]) == pytest.approx(doc["mole_fractions"]["H2O"])


def test_climate_and_instrument_records(bundled_instruments):
    c = load_climate("mountain-festival")
    record = render.climate_record(c)
    assert record["name"] == "mountain-festival"
    assert record["pressure_kpa"] == pytest.approx(c.room.pressure_pa / 1e3, abs=1e-3)
    assert record["temperature_c"] == pytest.approx(c.temperature_c, abs=1e-3)
    ins = bundled_instruments["side-blown-flute"]
    rec = render.instrument_record(ins)
    assert rec["length_mm"] == pytest.approx(ins.length_m * 1e3)
    assert (rec["holes"], rec["notes"], rec["excitation"]) == (len(ins.holes), len(ins.notes), "jet")


def test_resonances_document_shows_registers_only_for_named_notes():
    named = Resonances("x", (Note("C4", (), 1), Note("C5", (), 2)), [np.array([262.0, 524.0]), np.array([524.0])])
    doc = render.resonances_document(named)
    assert [(f["note"], f["register"]) for f in doc["fingerings"]] == [("C4", 1), ("C5", 2)]
    bare = render.resonances_document(Resonances("tube", (Note(None, (), 1),), [np.array([100.0, 300.0])]))
    assert bare["fingerings"] == [{"note": None, "register": None, "resonances_hz": [100.0, 300.0]}]
    table = render.resonances_table(bare)
    assert table.splitlines()[0] == "tube" and "(all open)" in table and "f2 Hz" in table
    rows = list(csv.DictReader(io.StringIO(render.resonances_csv(doc))))
    assert [(r["note"], r["resonance"]) for r in rows] == [("C4", "1"), ("C4", "2"), ("C5", "1")]


def test_default_chart_table_fits_100_columns(default_chart):
    # The table of the default chart (every bundled climate) splits its columns into blocks that
    # fit 100 characters.
    text = render.chart_table(default_chart)
    assert max(len(line) for line in text.splitlines()) <= 100
    assert "joint mm" in text and "winter-" in text
    assert "Care:" in text and "maker's instructions" in text
    for name in default_chart["climates"]:
        assert name.split("-")[0] in text


def test_chart_csv_is_long_format(default_chart):
    rows = list(csv.DictReader(io.StringIO(render.chart_csv(default_chart))))
    kinds = [r["kind"] for r in rows]
    assert kinds.count("drift") == len(default_chart["rows"])
    assert kinds.count("summary") == len(default_chart["climates"])
    assert kinds.count("caution") == len(default_chart["cautions"])


def test_warmup_table_and_csv(pipe_warmup):
    doc = pipe_warmup.doc
    text = render.warmup_table(doc)
    assert "minute" in text and "D3" in text and "steady" in text
    assert "play phase 1" in text and "play phase 2" not in text and "play phase 3" in text
    assert "2 cents" in text and "from cold" in text
    rows = list(csv.DictReader(io.StringIO(render.warmup_csv(doc))))
    assert [r["kind"] for r in rows].count("row") == 3 * 13  # three notes, minutes 0 to 12
    settle = [r for r in rows if r["kind"] == "settle"]
    assert [r["phase"] for r in settle] == [str(s["phase"]) for s in doc["settle"]]
