"""Ensemble files (drift.ensemble): members, their instruments and own plans, and bad input."""

import pytest

from conftest import TWO_HOLE_PIPE, write_file
from drift.climate import parse_plan
from drift.ensemble import load_ensemble
from drift.errors import InputFileError

GOOD = '''name = "trio"
plan = "play:2,rest:2,play:2"
[[member]]
instrument = "pipe.toml"
label = "first"
[[member]]
instrument = "pipe.toml"
plan = "play:2,rest:3,play:1"
'''


def test_members_with_their_instruments_and_plans(tmp_path):
    write_file(tmp_path, TWO_HOLE_PIPE, "pipe.toml")
    ensemble = load_ensemble(write_file(tmp_path, GOOD, "trio.toml"))
    assert ensemble.name == "trio" and ensemble.plan == parse_plan("play:2,rest:2,play:2")
    first, second = ensemble.members
    assert (first.label, second.label) == ("first", "pipe")       # the instrument's name by default
    assert first.plan is None and second.plan == parse_plan("play:2,rest:3,play:1")
    assert first.instrument.name == "pipe"


@pytest.mark.parametrize("text, needle", [
    ('name = "x"\n', "[[member]] is missing"),
    ('name = "x"\n[[member]]\nlabel = "a"\n', "[[member]] #1 instrument is missing"),
    ('name = "x"\n[[member]]\ninstrument = "side-blowen-flute"\n', "did you mean 'side-blown-flute'"),
    ('name = "x"\n[[member]]\ninstrument = "pipe.toml"\nplan = "play:x"\n', "[[member]] #1 plan = 'play:x'"),
    ('name = "x"\nplan = "play:5"\n[[member]]\ninstrument = "pipe.toml"\nplan = "play:4"\n',
     "must last as long as the ensemble's plan (5 min)"),
    ('name = "x"\n[[member]]\ninstrument = "pipe.toml"\nseat = 3\n', "seat is not a known key"),
])
def test_bad_ensembles_name_file_member_and_key(tmp_path, text, needle):
    write_file(tmp_path, TWO_HOLE_PIPE, "pipe.toml")
    with pytest.raises(InputFileError) as info:
        load_ensemble(write_file(tmp_path, text, "band.toml"))
    assert needle in str(info.value) and "band.toml" in str(info.value)
