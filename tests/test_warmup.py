"""Warm-up in pitch (drift.warmup): sample times, settle times, and the warm-up of real bores."""

import math

import numpy as np
import pytest

from conftest import WARMED
from drift import pitch, thermal, warmup
from drift.climate import Room, parse_plan
from drift.errors import OutOfRangeError
from drift.instrument import load_instrument
from drift.scale import cents
from drift.segments import instrument_wall

ROOM = Room(293.15, 101325.0, 0.5)


def test_settle_time():
    t = np.arange(6.0)
    values = np.array([[5.0, 1.0], [3.0, 0.5], [1.0, 3.0], [1.5, 0.2], [0.1, 0.1], [0.0, 0.0]])
    # The largest distance minus 2 is +1 at t = 2 and -0.5 at t = 3: it crosses zero, linearly,
    # at 2 + 1 / 1.5 (by hand).
    assert warmup.settle_time(t, values, [0.0, 0.0], 2.0) == pytest.approx(2.0 + 1.0 / 1.5, abs=1e-12)
    assert warmup.settle_time(t, values, [0.0, 0.0], 10.0) == 0.0
    late_jump = values + np.array([[0.0, 0.0]] * 5 + [[5.0, 0.0]])
    assert warmup.settle_time(t, late_jump, [0.0, 0.0], 2.0) is None


def test_sample_times_include_every_phase_boundary():
    plan = parse_plan("play:2.5,rest:1")
    np.testing.assert_allclose(warmup.sample_times(plan, 60.0), [0.0, 60.0, 120.0, 150.0, 180.0, 210.0])
    with pytest.raises(OutOfRangeError, match="must be positive"):
        warmup.sample_times(plan, 0.0)
    with pytest.raises(OutOfRangeError, match="more than 5000 samples"):
        warmup.sample_times(parse_plan("play:600"), 1.0)


def test_key_notes_and_steady_drift():
    # The key notes are the lowest, middle and highest by reference pitch, and A4 (or the note
    # nearest 440 Hz), in ascending pitch; the steady drift is 1200 log2(f_steady / f_ref).
    ref = np.array([330.0, 262.0, 523.0, 440.0, 392.0])
    w = warmup.Warmup(("E4", "C4", "C5", "A4", "G4"), np.zeros(1), [], np.zeros((1, 5)), ref, np.zeros((1, 5)),
                      ref * 2 ** (3 / 1200), None, [], 2.0)
    assert [w.notes[i] for i in w.key_notes()] == ["C4", "G4", "A4", "C5"]
    np.testing.assert_allclose(w.steady_drift_cents, 3.0)
    no_a4 = warmup.Warmup(("C4", "E4", "B4"), np.zeros(1), [], np.zeros((1, 3)), np.array([262.0, 330.0, 494.0]),
                          np.zeros((1, 3)), np.zeros(3), None, [], 2.0)
    assert [no_a4.notes[i] for i in no_a4.key_notes()] == ["C4", "E4", "B4"]


def test_settle_from_cold_brackets_the_band(pipe_warmup):
    # The shared warm-up of the test pipe in its design room (20 °C, 50 % RH, as ROOM) found the
    # settle time from cold by root finding; half a minute either side of it, the worst note is
    # outside and inside the 2-cent band around the steady state.
    instrument = load_instrument(pipe_warmup.pipe)
    steady_hz = np.array([s["frequency_hz"] for s in pipe_warmup.doc["steady"]])
    cold = pipe_warmup.doc["settle_from_cold_minutes"]
    assert cold is not None
    t = cold * 60.0
    assert t > 60.0

    def worst(seconds):
        profile = thermal.bore_profile(instrument, ROOM, minutes_played=seconds / 60.0)
        f = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, profile)])
        return np.max(np.abs(1200 * np.log2(f / steady_hz)))

    assert worst(t - 30.0) > 2.0 > worst(t + 30.0)
    assert warmup.settle_from_cold(instrument, ROOM, steady_hz, 100.0) == 0.0


@pytest.mark.parametrize("name", WARMED)
def test_each_bundled_instrument_rises_falls_and_settles(bundled_warmups, name):
    doc = bundled_warmups[name]
    # (the shared runs use WARMUP_PLAN: 8 minutes' playing, then 3 minutes' rest)
    assert doc["instrument"] == name
    assert doc["plan"] == [{"state": "play", "minutes": 8.0}, {"state": "rest", "minutes": 3.0}]
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


def test_interpolated_rows_agree_with_full_searches_at_every_row():
    # Issue 9: the warm-up's pitch comes from full searches at a few knots, interpolated in time;
    # at every row it must agree with a full search of that row's bore state within 0.05 cent.
    # (This compares two evaluations of the same model, not the model with the world.)
    inst = load_instrument("side-blown-flute")
    room = inst.design.room()
    plan = parse_plan("play:4,rest:2,play:2")
    result = warmup.warmup_timeline(inst, room, plan, step_s=15.0)
    full = np.array([[r.frequency_hz for r in pitch.note_frequencies(inst, s.profile)] for s in result.states])
    worst = np.max(np.abs(cents(result.frequencies_hz, full)))
    assert worst <= 0.05, worst


def test_trajectory_states_match_separate_integrations():
    # One integration with dense output against a fresh integration to each time: the wall
    # temperatures agree to the solver's tolerance (rtol 1e-7 of ~300 K, i.e. ~3e-5 K).
    inst = load_instrument("conical-reed")
    room = inst.design.room()
    plan = parse_plan("play:3,rest:1,play:1")
    trajectory = thermal.instrument_trajectory(inst, room, plan)
    for t in (30.0, 180.0, 200.0, 300.0):
        alone = thermal.instrument_timeline(inst, room, plan, [t])[0]
        assert np.allclose(trajectory.state(t).wall_k, alone.wall_k, rtol=0, atol=1e-4)


def test_phase_pitch_is_exact_at_knots_and_cheap():
    # A smooth made-up pitch curve (exponential approach, as a warming wall gives): the
    # interpolation stays within the tolerance and searches far fewer times than rows.
    calls = []

    def pitch_at(ts):
        calls.append(len(ts))
        return (440.0 * 2 ** ((-30.0 * np.exp(-np.asarray(ts) / 300.0)) / 1200.0))[:, None]

    times = np.arange(10.0, 3600.0 + 1e-9, 10.0)
    got = warmup.phase_pitch(pitch_at, 0.0, times)
    assert np.max(np.abs(cents(got, pitch_at(times)))) <= 0.05
    assert sum(calls[:-1]) < 40


def test_pchip_matches_scipy(outside):
    # The warm-up's monotone cubic against scipy.interpolate.PchipInterpolator (an independent
    # general-purpose library implementing Fritsch & Carlson 1980), on random and monotone data.
    from scipy.interpolate import PchipInterpolator

    rng = np.random.default_rng(7)
    ours, reference = [], []
    for n in (2, 3, 6, 15):
        x = np.sort(rng.uniform(0.0, 100.0, n))
        y = np.concatenate([rng.normal(size=(n, 2)), np.cumsum(rng.uniform(0, 1, (n, 1)), axis=0)], axis=1)
        q = np.linspace(x[0], x[-1], 301)
        ours.append(warmup.pchip(x, y, q))
        reference.append(PchipInterpolator(x, y, axis=0)(q))
    outside.check(np.concatenate(ours), np.concatenate(reference),
                  quantity="monotone cubic interpolation of random and monotone data, 2-15 knots, 301 points each",
                  source="scipy.interpolate.PchipInterpolator, Fritsch & Carlson (1980) (independent library)",
                  abs=1e-12)


def test_rest_rows_are_the_played_state_over_the_cooled_wall():
    # During a rest each row is the first note had playing resumed then: computed here apart
    # from Trajectory.resumed, from the resting wall through the played heat balance directly.
    # (Two evaluations of the same model; the tolerance is the interpolation's, 0.05 cent.)
    from drift.bore_state import BoreProfile
    from drift.climate import default_blowing
    from drift.heat_balance import HeatBalance

    inst = load_instrument("side-blown-flute")
    room = inst.design.room()
    plan = parse_plan("play:3,rest:2,play:1")
    result = warmup.warmup_timeline(inst, room, plan, step_s=30.0)
    trajectory = thermal.instrument_trajectory(inst, room, plan)
    wall = instrument_wall(inst)
    balance = HeatBalance(wall, room, default_blowing(inst.excitation), thermal.DEFAULT_BREATH)
    rows = [k for k, s in enumerate(result.states) if s.phase == "rest"]
    assert len(rows) == 4
    for k in rows:
        resting = trajectory.state(float(result.times_s[k]))
        assert resting.phase == "rest"
        _, flows = balance.heat_flows(resting.wall_k[None], True)
        mean_wall = np.sum(balance.capacity * resting.wall_k, axis=1) / np.sum(balance.capacity, axis=1)
        played = BoreProfile(room, wall.positions_m, flows.air_k[0], balance.phi_play, mean_wall)
        f = pitch.frequencies_hz(inst, [played])[0]
        assert np.max(np.abs(cents(result.frequencies_hz[k], f))) <= 0.05
    # On average the rest row lies above the resting bore (full of cooling room air), which is
    # what the rows showed before: warm breath refills the bore of the first note.
    resting_hz = pitch.frequencies_hz(inst, [trajectory.state(float(result.times_s[rows[-1]])).profile])[0]
    assert np.mean(cents(result.frequencies_hz[rows[-1]], resting_hz)) > 0.0


def test_when_to_tune(bundled_warmups):
    # The tuning time is where the mean drift enters, for good, the band around its steady value.
    doc = bundled_warmups["side-blown-flute"]
    notes = sorted({r["note"] for r in doc["rows"]})
    cents_at = {}
    for r in doc["rows"]:
        cents_at.setdefault(r["minute"], []).append(r["drift_cents"])
    steady = np.mean([s["drift_cents"] for s in doc["steady"]])
    tune = doc["tune_minute"]
    first_play = [m for m in cents_at if m <= 8.0]
    for m in first_play:
        inside = abs(np.mean(cents_at[m]) - steady) <= doc["tolerance_cents"]
        assert inside == (m >= tune), (m, tune)
    assert len(notes) == len(doc["steady"])
    assert doc["tune_adjust_mm"] is not None and math.isfinite(doc["tune_adjust_mm"])


def test_joint_column_is_the_exact_joint_solve_to_one_percent(bundled_instruments):
    # Consistency of the linearised joint column (joint_settings) with the exact secant solve of
    # drift.chart.joint_changes, at the first and last rows of a short warm-up: the curvature the
    # column neglects is of the order of delta / L, about 1 % of the change.
    from drift import chart

    inst = bundled_instruments["cylindrical-reed"]
    result = warmup.warmup_timeline(inst, inst.design.room(), "play:2", step_s=120.0)
    rows = [0, len(result.times_s) - 1]
    exact = chart.joint_changes(inst, [result.states[k].profile for k in rows], result.reference_hz,
                                [result.drift_cents[k] for k in rows])
    for k, (change, _) in zip(rows, exact):
        assert abs(change) > 1e-3            # a change of some mm to check against
        assert result.joint_m[k] == pytest.approx(change, rel=0.01)


#: A brass tube with one valve loop, played by one of its two notes.
LOOP_TUBE = """
name = "loop tube"
excitation = "lips"
material = "yellow_brass"
[bore]
stations_mm = [[0, 11], [900, 11], [1300, 60]]
[[valve]]
name = "1"
position_mm = 300.0
stations_mm = [[0, 11], [140, 11]]
[[note]]
name = "B3"
register = 2
[[note]]
name = "A3"
register = 2
valves = ["1"]
"""


def test_warm_up_shows_the_valve_loop_warming(write_toml):
    from drift import render

    ins = load_instrument(write_toml(LOOP_TUBE))
    w = warmup.warmup_timeline(ins, Room(288.15, relative_humidity=0.5), "play:1", step_s=60.0)
    assert w.loop_note == 1 and 1 in w.key_notes()
    doc = render.warmup_document(w)
    loop = [r["air_temperature_c"] for r in doc["loops"]]
    assert [r["minute"] for r in doc["loops"]] == [0, 1] and {r["valve"] for r in doc["loops"]} == {"1"}
    (steady,) = doc["steady_loops"]
    assert 15.0 < loop[0] < loop[1] < steady["air_temperature_c"] < 35.0
    assert 15.0 < steady["wall_temperature_c"] < steady["air_temperature_c"]
    lines = render.warmup_table(doc).splitlines()
    assert "loop 1 °C" in lines[1] and f"{loop[1]:.1f}" in lines[4]
    csv_kinds = [line.split(",")[0] for line in render.warmup_csv(doc).splitlines()[1:]]
    assert csv_kinds.count("loop") == 2 and csv_kinds.count("steady_loop") == 1
