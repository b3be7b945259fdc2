"""Bad input and its messages: every case of the table in docs/formats.md ("Bad input and its
messages") is run here in-process and must end with exit status 2, nothing on stdout, one to three
lines on stderr, and exactly the message the table shows.

:data:`CASES` is the one list of cases. ``python tools/bad_input_table.py`` runs them and writes
the table into docs/formats.md from the real messages; the test checks that the table lists
exactly these cases, in this order, and that each run still gives the message the table shows.
Every case fails before any heavy computation (reading files and options only), so the whole
list runs in a few seconds. These check the program's own contract; no outside source applies.
"""

from __future__ import annotations

import os
import re
from pathlib import Path

import pytest

#: A valid reed pipe: two holes, two notes, a tuning joint. Cases edit one line of it.
BASE = """name = "pipe"
excitation = "reed"
wall_mm = 4.0
[bore]
stations_mm = [[0, 15], [300, 15], [600, 20]]
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 8.0
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 7.0
[[note]]
name = "D3"
closed = ["h1", "h2"]
[[note]]
name = "E3"
closed = ["h2"]
[tuning]
position_mm = 100.0
"""

#: A valid climate file.
ROOM = """name = "room"
[air]
temperature_c = 18.0
relative_humidity_pct = 40
"""

#: A valid tuner log.
LOG = "minute,note,cents\n0.5,D3,-20\n1,E3,-18\n2,D3,-15\n"

#: Markers for files that are not text.
FOLDER, FIFO = "<folder>", "<fifo>"


def edit(base: str, old: str, new: str) -> str:
    """``base`` with its one line ``old`` replaced by ``new`` (``old`` "" appends ``new`` at the
    end, ``old`` None puts it first, among the top-level keys)."""
    if old is None:
        return new + "\n" + base
    if not old:
        return base + new + "\n"
    assert base.count(old + "\n") == 1, old
    return base.replace(old + "\n", new + ("\n" if new else ""))


def pipe(old: str, new: str) -> dict:
    return {"bad.toml": edit(BASE, old, new)}


def room(old: str, new: str) -> dict:
    return {"room.toml": edit(ROOM, old, new)}


#: (what the input holds, the command's arguments after ``drift``, files written first). Runs in a
#: folder of its own, so the messages show the names as typed.
CASES = [
    # files: what they are
    ("no such file", ["resonances", "missing.toml"], {}),
    ("a folder", ["resonances", "folder.toml"], {"folder.toml": FOLDER}),
    ("a named pipe (FIFO)", ["resonances", "fifo.toml"], {"fifo.toml": FIFO}),
    ("a device", ["resonances", "/dev/zero"], {}),
    ("larger than 1 MB", ["resonances", "big.toml"], {"big.toml": BASE + "#" * 1_000_001 + "\n"}),
    ("not UTF-8 (Latin-1 é)", ["resonances", "bad.toml"], {"bad.toml": BASE.replace('"pipe"', '"caf\xe9"').encode("latin-1")}),
    ("not TOML", ["resonances", "bad.toml"], pipe('name = "pipe"', "name = ")),
    ("a 5000-digit integer", ["resonances", "bad.toml"], pipe("wall_mm = 4.0", "wall_mm = 1" + "0" * 5000)),
    ("a 400-digit integer", ["resonances", "bad.toml"], pipe("wall_mm = 4.0", "wall_mm = 1" + "0" * 400)),
    ("arrays nested 2000 deep", ["resonances", "bad.toml"], pipe("wall_mm = 4.0", "wall_mm = " + "[" * 2000 + "]" * 2000)),
    ("unknown bundled name", ["resonances", "clarinett"], {}),
    # instrument file keys
    ("`colour = \"red\"`", ["resonances", "bad.toml"], pipe(None, 'colour = "red"')),
    ("`exitation = \"reed\"` (misspelt)", ["resonances", "bad.toml"], pipe('excitation = "reed"', 'exitation = "reed"')),
    ("no `name`", ["resonances", "bad.toml"], pipe('name = "pipe"', "")),
    ("`excitation = \"flute\"`", ["resonances", "bad.toml"], pipe('excitation = "reed"', 'excitation = "flute"')),
    ("`material = \"oak\"`", ["resonances", "bad.toml"], pipe(None, 'material = "oak"')),
    ("`wall_mm = nan`", ["resonances", "bad.toml"], pipe("wall_mm = 4.0", "wall_mm = nan")),
    ("`reference_temperature_c = inf`", ["resonances", "bad.toml"], pipe("wall_mm = 4.0", "reference_temperature_c = inf")),
    ("`wall_mm = \"4\"`", ["resonances", "bad.toml"], pipe("wall_mm = 4.0", 'wall_mm = "4"')),
    ("no `[bore]`", ["resonances", "bad.toml"], {"bad.toml": 'name = "pipe"\nexcitation = "reed"\n'}),
    ("`bore = \"wide\"`", ["resonances", "bad.toml"], {"bad.toml": 'name = "pipe"\nexcitation = "reed"\nbore = "wide"\n'}),
    ("one station", ["resonances", "bad.toml"], pipe("stations_mm = [[0, 15], [300, 15], [600, 20]]", "stations_mm = [[0, 15]]")),
    ("first station not at 0", ["resonances", "bad.toml"], pipe("stations_mm = [[0, 15], [300, 15], [600, 20]]", "stations_mm = [[5, 15], [300, 15], [600, 20]]")),
    ("positions not increasing", ["resonances", "bad.toml"], pipe("stations_mm = [[0, 15], [300, 15], [600, 20]]", "stations_mm = [[0, 15], [300, 15], [300, 20]]")),
    ("a station of three numbers", ["resonances", "bad.toml"], pipe("stations_mm = [[0, 15], [300, 15], [600, 20]]", "stations_mm = [[0, 15], [300, 15, 1], [600, 20]]")),
    ("a diameter of 0.2 mm", ["resonances", "bad.toml"], pipe("stations_mm = [[0, 15], [300, 15], [600, 20]]", "stations_mm = [[0, 15], [300, 0.2], [600, 20]]")),
    ("`hole = 5`", ["resonances", "bad.toml"], {"bad.toml": 'name = "pipe"\nexcitation = "reed"\nhole = 5\n[bore]\nstations_mm = [[0, 15], [600, 15]]\n'}),
    ("a hole wider than the bore", ["resonances", "bad.toml"], pipe("diameter_mm = 8.0", "diameter_mm = 18.0")),
    ("a hole beyond the bore's end", ["resonances", "bad.toml"], pipe("position_mm = 450.0", "position_mm = 650.0")),
    ("two holes named `h1`", ["resonances", "bad.toml"], pipe('name = "h2"', 'name = "h1"')),
    ("two holes at one position", ["resonances", "bad.toml"], pipe("position_mm = 450.0", "position_mm = 400.0")),
    ("overlapping holes", ["resonances", "bad.toml"], pipe("position_mm = 450.0", "position_mm = 408.0")),
    ("note `C99999`", ["resonances", "bad.toml"], pipe('name = "D3"', 'name = "C99999"')),
    ("note `H4`", ["resonances", "bad.toml"], pipe('name = "D3"', 'name = "H4"')),
    ("`closed` names an unknown hole", ["resonances", "bad.toml"], pipe('closed = ["h2"]', 'closed = ["h3"]')),
    ("`closed = \"h2\"`", ["resonances", "bad.toml"], pipe('closed = ["h2"]', 'closed = "h2"')),
    ("`register = 13`", ["resonances", "bad.toml"], pipe('closed = ["h2"]', 'closed = ["h2"]\nregister = 13')),
    ("`register = 1.5`", ["resonances", "bad.toml"], pipe('closed = ["h2"]', 'closed = ["h2"]\nregister = 1.5')),
    ("`[design] playing = \"yes\"`", ["resonances", "bad.toml"], pipe("", '[design]\nplaying = "yes"')),
    ("`[design] a4_hz = 500`", ["resonances", "bad.toml"], pipe("", "[design]\na4_hz = 500")),
    ("joint inside a hole", ["resonances", "bad.toml"], pipe("position_mm = 100.0", "position_mm = 452.0")),
    ("`[tuning] min_change_mm = 5`", ["resonances", "bad.toml"], pipe("position_mm = 100.0", "position_mm = 100.0\nmin_change_mm = 5")),
    ("`[input] added_volume_mm3` (old key)", ["resonances", "bad.toml"], pipe("", "[input]\nadded_volume_mm3 = 100")),
    ("a lip key for a reed", ["resonances", "bad.toml"], pipe("", "[input]\ncup_volume_mm3 = 100")),
    ("jet: lip cover and outer correction", ["resonances", "bad.toml"],
     {"bad.toml": edit(BASE.replace('"reed"', '"jet"'), "",
                       "[input]\nlip_cover_pct = 20\nembouchure_outer_correction_mm = 3")}),
    ("a 0.5 mm bore: no note sounds", ["chart", "bad.toml", "--climate", "tuning-room"],
     {"bad.toml": 'name = "thin"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 0.5], [600, 0.5]]\n'
                    '[[note]]\nname = "C4"\n'}),
    ("a 10 m wooden bore: a fit over the time budget", ["fit", "log.csv", "long.toml", "--plan", ",".join(["play:30,rest:30"] * 5)],
     {"long.toml": 'name = "long"\nexcitation = "reed"\nmaterial = "tropical_hardwood"\nwall_mm = 6.0\n[bore]\n'
                   'stations_mm = [[0, 47], [10000, 47]]\n[[note]]\nname = "C1"\n',
      "log.csv": "minute,note,cents\n" + "".join(f"{m},C1,{m - 20}\n" for m in range(1, 24, 3))}),
    # climate files
    ("no `[air] temperature_c`", ["chart", "--climate", "room.toml"], room("temperature_c = 18.0", "")),
    ("`pressure_kpa` and `altitude_m`", ["chart", "--climate", "room.toml"], room("", "pressure_kpa = 90\naltitude_m = 900")),
    ("`relative_humidity_pct = 120`", ["chart", "--climate", "room.toml"], room("relative_humidity_pct = 40", "relative_humidity_pct = 120")),
    ("`co2_ppm = nan`", ["chart", "--climate", "room.toml"], room("", "co2_ppm = nan")),
    ("`[[change]]` minutes not increasing", ["warmup", "--climate", "room.toml"],
     room("", "[[change]]\nminute = 30\n[[change]]\nminute = 20")),
    ("`[player] player_file` missing", ["warmup", "--climate", "room.toml"], room("", '[player]\nplayer_file = "me.toml"')),
    ("unknown bundled climate", ["chart", "--climate", "winter-chruch"], {}),
    # tuner log and ensemble
    ("log: no such file", ["fit", "log.csv"], {}),
    ("log: header without `cents`", ["fit", "log.csv"], {"log.csv": "minute,note\n0.5,D3\n"}),
    ("log: `cents` not a number", ["fit", "log.csv"], {"log.csv": LOG.replace("-18", "flat")}),
    ("log: minutes going back", ["fit", "log.csv"], {"log.csv": LOG.replace("2,D3", "0.7,D3")}),
    ("ensemble: no such file", ["advise", "--ensemble", "band.toml", "--climate", "tuning-room"], {}),
    ("ensemble: no `[[member]]`", ["advise", "--ensemble", "band.toml", "--climate", "tuning-room"],
     {"band.toml": 'name = "band"\n'}),
    # options of every command
    ("`--gas-properties` unknown", ["--gas-properties", "tables", "air"], {}),
    ("unknown option", ["air", "--temperature", "20"], {}),
    ("`--temp 61`", ["air", "--temp", "61"], {}),
    ("`--rh nan`", ["air", "--rh", "nan"], {}),
    ("`--pressure inf`", ["air", "--pressure", "inf"], {}),
    ("`--pressure` and `--altitude`", ["air", "--pressure", "90", "--altitude", "900"], {}),
    ("`--co2 -1`", ["air", "--co2", "-1"], {}),
    ("`--breath 1.5`", ["air", "--breath", "1.5"], {}),
    ("`--breath-co2 twelve`", ["air", "--breath-co2", "twelve"], {}),
    ("`--format xml`", ["air", "--format", "xml"], {}),
    ("`--count 21`", ["resonances", "--count", "21"], {}),
    ("`--note Z9`", ["resonances", "--note", "Z9"], {}),
    ("`--altitude 6000`", ["resonances", "--altitude", "6000"], {}),
    ("`--a4 nan`", ["chart", "--a4", "nan"], {}),
    ("`--tolerance 0`", ["chart", "--tolerance", "0"], {}),
    ("`--plot chart.gif`", ["chart", "--plot", "chart.gif"], {}),
    ("`--output` is the input", ["chart", "pipe.toml", "--output", "pipe.toml"], {"pipe.toml": BASE}),
    ("`--plan play:x`", ["warmup", "--plan", "play:x"], {}),
    ("`--plan play:0`", ["warmup", "--plan", "play:0"], {}),
    ("`--plan play:700`", ["warmup", "--plan", "play:700"], {}),
    ("`--step 0.5`", ["warmup", "--step", "0.5"], {}),
    ("`--rh 101`", ["design", "--rh", "101"], {}),
    ("`--a4 inf`", ["design", "--a4", "inf"], {}),
    ("no `--output`", ["retune", "--room-temp", "25"], {}),
    ("`--room-temp 70`", ["retune", "--room-temp", "70", "--output", "new.toml"], {}),
    ("`--output` in a missing folder", ["retune", "--room-temp", "25", "--output", "nowhere/new.toml"], {}),
    ("`--max-minutes nan`", ["warmup", "--max-minutes", "nan"], {}),
    ("`--max-minutes -1`", ["chart", "--max-minutes", "-1"], {}),
    ("`--max-minutes 0.001`: the run's estimate is over it", ["chart", "--climate", "tuning-room", "--max-minutes", "0.001"], {}),
    ("`--a4 379`", ["fit", "log.csv", "--a4", "379"], {"log.csv": LOG}),
    ("`--write-player` is the log", ["fit", "log.csv", "--write-player", "log.csv"], {"log.csv": LOG}),
    ("no `--climate`", ["advise", "cylindrical-reed"], {}),
    ("no instrument", ["advise", "--climate", "tuning-room"], {}),
    ("`--plan rest:10,play:20`", ["advise", "cylindrical-reed", "--climate", "tuning-room", "--plan", "rest:10,play:20"], {}),
    ("`--tolerance -1`", ["advise", "cylindrical-reed", "--climate", "tuning-room", "--tolerance", "-1"], {}),
    ("`--format csv`", ["advise", "cylindrical-reed", "--climate", "tuning-room", "--format", "csv"], {}),
    ("`--show` an unknown instrument", ["instruments", "--show", "trumpet"], {}),
    ("`--show` an unknown climate", ["climates", "--show", "winter-chruch"], {}),
]


def write_inputs(folder: Path, files: dict) -> None:
    for name, content in files.items():
        path = folder / name
        if content == FOLDER:
            path.mkdir()
        elif content == FIFO:
            os.mkfifo(path)
        elif isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")


def run_case(case, folder: Path):
    """Write the case's files into ``folder`` (empty) and run it there, in-process; the click
    runner's result."""
    from click.testing import CliRunner

    from drift.cli import main

    _, args, files = case
    write_inputs(folder, files)
    here = os.getcwd()
    os.chdir(folder)
    try:
        return CliRunner().invoke(main, args)
    finally:
        os.chdir(here)


def command_cell(args) -> str:
    shown = [a if len(a) <= 24 else a[:21] + "..." for a in args]
    return "`drift " + " ".join(shown) + "`"


def message_cell(stderr: str) -> str:
    """The message as a table cell: lines joined by <br>, "|" escaped."""
    lines = [line.strip() for line in stderr.splitlines() if line.strip()]
    return "<br>".join(line.replace("|", "\\|") for line in lines)


DOC = Path(__file__).resolve().parents[1] / "docs" / "formats.md"
TABLE_START = "<!-- bad-input table: written by tools/bad_input_table.py from tests/test_bad_input.py -->"
TABLE_END = "<!-- end of the bad-input table -->"
HEADER = "| # | input | command | message (stderr; exit status 2) |\n| --- | --- | --- | --- |\n"


def table_rows(messages) -> str:
    """The table's text for :data:`CASES` and their messages."""
    rows = [f"| {i} | {what} | {command_cell(args)} | {message} |"
            for i, ((what, args, _), message) in enumerate(zip(CASES, messages), start=1)]
    return HEADER + "\n".join(rows) + "\n"


def documented_rows() -> list[list[str]]:
    """The cells of the table in docs/formats.md (unescaped)."""
    text = DOC.read_text(encoding="utf-8")
    body = text.split(TABLE_START, 1)[1].split(TABLE_END, 1)[0]
    rows = [line for line in body.strip().splitlines() if line.startswith("| ")][2:]
    return [[cell.strip() for cell in re.split(r"(?<!\\)\|", row)[1:-1]] for row in rows]


def test_the_table_lists_every_case_in_order():
    rows = documented_rows()
    assert len(CASES) >= 40
    assert [(r[0], r[1], r[2]) for r in rows] == [
        (str(i), what, command_cell(args)) for i, (what, args, _) in enumerate(CASES, start=1)]


@pytest.mark.parametrize("number", range(1, len(CASES) + 1))
def test_each_case_gives_its_documented_message(number, tmp_path):
    case = CASES[number - 1]
    result = run_case(case, tmp_path)
    assert result.exit_code == 2, (case, result.stdout, result.stderr, result.exception)
    assert isinstance(result.exception, SystemExit), result.exception      # no traceback
    assert result.stdout == ""
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    assert 1 <= len(lines) <= 3, result.stderr
    assert lines[0].startswith("drift: error: ")
    assert message_cell(result.stderr) == documented_rows()[number - 1][3]
