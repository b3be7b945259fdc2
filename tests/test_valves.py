"""Valves and slides in instrument files (drift/valves.py, read by drift/instrument.py)."""

import tomllib

import pytest

from drift import instrument, instrument_file
from drift.errors import InputFileError

#: A cylinder with two valves and a slide, and notes that use them.
VALVE_PIPE = """
name = "valve pipe"
excitation = "lips"
[bore]
stations_mm = [[0, 12], [1400, 12]]
[[valve]]
name = "v1"
position_mm = 600.0
stations_mm = [[0, 12], [170, 12]]
[[valve]]
name = "v2"
position_mm = 640.0
stations_mm = [[0, 12], [40, 11], [85, 12]]
[slide]
position_mm = 1000
positions_mm = [0, 40, 85]
max_travel_mm = 600
[tuning]
position_mm = 300
[[note]]
name = "C4"
register = 2
[[note]]
name = "A3"
register = 2
valves = ["v1", "v2"]
[[note]]
name = "A3"
register = 2
slide_position = 3
[[note]]
name = "G3"
register = 2
slide_mm = 250.5
"""


def test_valves_slide_and_notes_are_read(write_toml):
    ins = instrument.load_instrument(write_toml(VALVE_PIPE))
    assert [v.name for v in ins.valves] == ["v1", "v2"]
    assert ins.valves[1].loop_stations_m == ((0.0, 0.012), (0.04, 0.011), (0.085, 0.012))
    assert ins.valves[1].loop_length_m == pytest.approx(0.085)
    assert ins.slide.positions_m == pytest.approx((0.0, 0.04, 0.085)) and ins.slide.max_travel_m == 0.6
    assert [(n.valves, n.slide_m) for n in ins.notes] == [((), 0.0), (("v1", "v2"), 0.0), ((), 0.085),
                                                           ((), pytest.approx(0.2505))]
    text = instrument_file.to_toml(ins)
    again = instrument.parse_instrument(tomllib.loads(text), "again")
    assert again.valves == ins.valves and again.slide == ins.slide and again.notes == ins.notes
    # a note at a numbered position is written by its number, any other travel in mm
    assert "slide_position = 3" in text and "slide_mm = 250.5" in text and "slide_mm = 85" not in text
    # the tuning joint before the valves moves them and the slide with the bore beyond it
    moved = ins.with_joint_change(0.004)
    assert moved.valves[0].position_m == pytest.approx(0.604) and moved.slide.position_m == pytest.approx(1.004)


@pytest.mark.parametrize("edit, words", [
    (('valves = ["v1", "v2"]', 'valves = ["v4"]'), ["valves", "unknown valve 'v4'", "valves: v1, v2"]),
    (('valves = ["v1", "v2"]', 'valves = ["v1", "v1"]'), ["valves", "twice"]),
    (('valves = ["v1", "v2"]', 'valves = "v1"'), ["valves", "list of valve names"]),
    (("slide_position = 3", "slide_position = 4"), ["slide_position", "1 to 3"]),
    (("slide_mm = 250.5", "slide_mm = 700"), ["slide_mm", "max_travel_mm"]),
    (("slide_position = 3", "slide_position = 3\nslide_mm = 10"), ["slide_mm", "give one of them"]),
    (('name = "v2"', 'name = "v1"'), ["[[valve]] #2 name", "unique"]),
    (("position_mm = 640.0", "position_mm = 1400.0"), ["[[valve]] #2 position_mm", "inside the bore"]),
    (("[[0, 12], [170, 12]]", "[[5, 12], [170, 12]]"), ["[[valve]] #1 stations_mm", "start at position 0"]),
    (("positions_mm = [0, 40, 85]", "positions_mm = [0, 85, 40]"), ["[slide] positions_mm", "increase"]),
    (("positions_mm = [0, 40, 85]", "positions_mm = [0, 40, 850]"), ["positions_mm entry 3", "max_travel_mm"]),
    (("[tuning]\nposition_mm = 300", "[tuning]\nposition_mm = 600"), ["[tuning] position_mm", "valve v1"]),
])
def test_bad_valves_and_slides_name_file_and_key(write_toml, edit, words):
    text = VALVE_PIPE.replace(*edit, 1)
    assert text != VALVE_PIPE
    with pytest.raises(InputFileError) as info:
        instrument.load_instrument(write_toml(text, "brass.toml"))
    assert "brass.toml" in str(info.value)
    for word in words:
        assert word in str(info.value)


def test_slide_notes_need_a_slide(write_toml):
    text = VALVE_PIPE.split("[slide]")[0] + '[[note]]\nname = "C4"\nslide_position = 1\n'
    with pytest.raises(InputFileError, match="slide_position needs a \\[slide\\] table"):
        instrument.load_instrument(write_toml(text))
