"""Written note names in documents (drift/notation.py) and the --written option."""

import json

from drift import notation


def test_written_names_beside_the_sounding_ones():
    doc = {"instrument": "horn", "rows": [{"note": "F3", "climate": "x"}, {"note": None}],
           "key_notes": ["F3"], "climates": [{"worst_note": "Bb3"}]}
    out = notation.add_written_notes(doc, 7)
    assert out["rows"][0] == {"note": "F3", "written_note": "C4", "climate": "x"}
    assert out["rows"][1] == {"note": None, "written_note": None}
    assert out["climates"][0] == {"worst_note": "Bb3", "written_worst_note": "F4"}
    assert out["key_notes"] == ["F3"] and out["transposition_semitones"] == 7
    assert "written_note" not in doc["rows"][0]          # the document given is left as it was
    shown = notation.as_written(out)
    assert shown["rows"][0]["note"] == "C4" and shown["key_notes"] == ["C4"]
    assert shown["climates"][0]["worst_note"] == "F4"
    assert shown["instrument"] == "horn (written notes, in F)"


def test_written_option_on_the_command_line(cli, write_toml, two_hole_pipe):
    text = two_hole_pipe.read_text(encoding="utf-8").replace('name = "pipe"',
                                                            'name = "pipe"\ntransposition_semitones = 2', 1)
    path = write_toml(text, "bb.toml")
    doc = json.loads(cli("resonances", path, "--count", "1", "--format", "json").stdout)
    assert [(f["note"], f["written_note"]) for f in doc["fingerings"]] == [("D3", "E3"), ("E3", "F#3")]
    table = cli("resonances", path, "--count", "1", "--written").stdout
    assert "in Bb" in table and "F#3" in table and "D3" not in table
    assert "D3" in cli("resonances", path, "--count", "1").stdout
