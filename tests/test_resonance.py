"""Tracking resonances from known frequencies (drift.resonance.track_resonances); the full search
and its refinement are checked in tests/test_pitch.py."""

import numpy as np
import pytest

from conftest import BUNDLED
from drift import pitch, resonance
from drift.bore_state import BoreProfile
from drift.climate import Room
from drift.scale import cents


@pytest.mark.parametrize("name", BUNDLED)
def test_tracked_notes_are_the_full_search_to_its_tolerance(bundled_instruments, design_notes, design_profiles,
                                                            name):
    # Consistency of two of our own routes, not an outside check: from the design frequencies,
    # the notes of a cold room (5 °C, resting bore, some 30 to 60 cents flat) are tracked to the
    # full search's refinement tolerance (0.0004 cent).
    ins, found = design_notes[name]
    near = np.array([n.frequency_hz for n in found])
    cold = [BoreProfile.uniform(Room(278.15, relative_humidity=0.6))]
    full = pitch.frequencies_hz(ins, cold)
    tracked = pitch.frequencies_hz(ins, cold, near)
    assert np.all(np.isfinite(tracked))
    assert np.max(np.abs(cents(tracked, full))) < 4e-4
    assert np.min(np.abs(cents(full, near))) > 10.0          # the cold room is well away from the design


def test_a_window_without_one_extremum_is_left_to_the_full_search(bundled_instruments, design_profiles,
                                                                   design_notes):
    # Halfway (in cents) between two registers of one fingering there is no extremum within
    # 150 cents when they are more than 300 cents apart: NaN, and frequencies_hz searches in full.
    ins = bundled_instruments["cylindrical-reed"]
    net = pitch.bore_network(ins, design_profiles["cylindrical-reed"])
    rows = ins.open_mask(ins.fingerings()[:1])
    (peaks,) = resonance.search_resonances(net, rows, [2])
    assert cents(peaks[1], peaks[0]) > 300.0
    between = np.sqrt(peaks[0] * peaks[1])
    tracked = resonance.track_resonances(net, np.repeat(rows, 3, axis=0), [peaks[0], between, peaks[1]])
    assert np.isnan(tracked[1])
    assert abs(cents(tracked[0], peaks[0])) < 4e-4 and abs(cents(tracked[2], peaks[1])) < 4e-4
    near = np.array([n.frequency_hz for n in design_notes["cylindrical-reed"][1]])
    near[0] = between                      # the first note's guess leaves its window empty
    full = pitch.frequencies_hz(ins, [design_profiles["cylindrical-reed"]])
    again = pitch.frequencies_hz(ins, [design_profiles["cylindrical-reed"]], near)
    np.testing.assert_array_equal(again, full)
