"""The gig plan (drift.gig): moments of a plan, an ensemble through a changing evening, the breaks
and the advice. The pitch and thermal models are checked in their own tests; these are
consistency checks of the job (one path against another of our own), said so at each."""

import dataclasses

import numpy as np
import pytest

from conftest import REGISTER_PIPE, TWO_HOLE_PIPE
from drift import chart, gig, thermal
from drift.climate import Climate, Player, Room, Weather, load_climate, parse_plan
from drift.ensemble import Member
from drift.errors import OutOfRangeError
from drift.files import read_toml_text
from drift.instrument import parse_instrument

PLAN = "play:2,rest:2,play:2"


def pipe(text, name):
    return dataclasses.replace(parse_instrument(read_toml_text(text, name), name), name=name)


JOINTED = pipe(TWO_HOLE_PIPE, "jointed")
FIXED = pipe(REGISTER_PIPE.format(excitation="reed", extra=""), "fixed")
EVENING = load_climate("hillside-evening")


@pytest.fixture(scope="module")
def duo():
    return gig.plan_gig([JOINTED, FIXED], EVENING, PLAN)


@pytest.fixture(scope="module")
def solo():
    return gig.plan_gig([JOINTED], EVENING, PLAN)


def test_moments_of_a_plan():
    marks = gig.plan_moments(parse_plan("play:10,rest:10,play:45,rest:20,play:45"))
    assert [(t / 60, label) for t, label, _ in marks] == [
        (0, "start"), (10, "after warm-up"), (20, "set 1"), (85, "set 2"), (130, "end")]
    assert [label for _, label, _ in gig.plan_moments(parse_plan("play:5"))] == ["start", "after warm-up"]
    with pytest.raises(OutOfRangeError, match="start with play"):
        gig.plan_moments(parse_plan("rest:5,play:5"))


def test_an_ensemble_of_one_is_that_instrument_alone(duo, solo):
    # Consistency: the instrument's numbers do not depend on who else plays.
    for m_duo, m_solo in zip(duo.moments, solo.moments):
        alone = m_solo.standings[0]
        together = next(s for s in m_duo.standings if s.instrument == "jointed")
        assert dataclasses.replace(together, from_ensemble_cents=0.0) == alone
        assert alone.from_ensemble_cents == 0.0 and m_solo.widest_gap_cents == 0.0


def test_ensemble_distances_and_widest_gap(duo):
    for m in duo.moments:
        means = [s.mean_drift_cents for s in m.standings]
        assert sum(s.from_ensemble_cents for s in m.standings) == pytest.approx(0.0, abs=1e-9)
        assert m.widest_gap_cents == pytest.approx(max(means) - min(means), abs=1e-12)
        assert m.room == EVENING.weather.room_at(m.time_s)
    # The pipe without a joint cannot move: the other tunes to it.
    assert duo.tune_to == "fixed"
    assert all(not s.joint_reachable and s.adjust_m is None for m in duo.moments for s in m.standings
               if s.instrument == "fixed")
    assert duo.advice[0].startswith("Tune to the fixed")


def test_after_warm_up_is_the_chart_after_that_much_playing():
    # Consistency with drift.chart: in a fixed room, the moment 'after warm-up' is the bore
    # played from cold for the warm-up's minutes (the same trajectory up to there).
    room = Room(295.15, 101325.0, 0.55)
    warm = Climate("warm", room, Player(True, 2.0))
    summary = chart.drift_chart(JOINTED, [warm]).summary[0]
    moment = gig.plan_gig([JOINTED], Climate("warm", room), PLAN).moments[1]
    assert moment.standings[0].mean_drift_cents == pytest.approx(summary.mean_drift_cents, abs=1e-9)
    assert moment.standings[0].adjust_m == pytest.approx(summary.adjust_m, abs=1e-9)


def test_changing_climate_at_constant_conditions_gives_the_fixed_numbers():
    room = Room(300.15, 92e3, 0.65, sun_w_m2=350.0, wind_m_s=1.2)
    fixed = gig.plan_gig([JOINTED], Climate("c", room), PLAN)
    steady = Climate("c", room, weather=Weather((0.0, 60.0, 200.0), (room, room, room)))
    changing = gig.plan_gig([JOINTED], steady, PLAN)
    assert changing.moments == fixed.moments
    assert [list(b.shift_cents) for b in changing.breaks] == [list(b.shift_cents) for b in fixed.breaks]


def test_first_note_after_a_break_is_the_played_state_over_the_cooled_wall():
    # Consistency of Trajectory.resumed: at the end of a rest it is the next play phase's own
    # start (same wall, the played heat balance over it); within a play phase, the state itself.
    plan = parse_plan(PLAN)
    trajectory = thermal.instrument_trajectory(JOINTED, Room(293.15, 101325.0, 0.5), plan)
    end_of_rest = trajectory.resumed(240.0)
    next_start = trajectory.state(240.0, 2)
    # The rest's dense output at its end and the next phase's first point agree to round-off.
    assert np.allclose(end_of_rest.wall_k, next_start.wall_k, rtol=0, atol=1e-9)
    assert np.allclose(end_of_rest.profile.temperature_k, next_start.profile.temperature_k, rtol=0, atol=1e-9)
    assert end_of_rest.phase == "play" and trajectory.state(240.0).phase == "rest"
    assert np.array_equal(trajectory.resumed(60.0).wall_k, trajectory.state(60.0).wall_k)


def test_break_length_that_needs_retuning_by_hand():
    # Shift 0 at the break's start, then 2, 4, 8 cents at 1, 2, 4 min: past 5 cents at 2.5 min.
    assert gig._crossing(np.array([60.0, 120.0, 240.0]), np.array([-2.0, -4.0, -8.0]), 5.0) == pytest.approx(150.0)
    assert gig._crossing(np.array([60.0]), np.array([1.0]), 5.0) is None
    assert gig._crossing(np.array([60.0]), np.array([9.0]), 5.0) == pytest.approx(5 / 9 * 60.0)


def test_same_instrument_twice_is_numbered():
    assert gig._labels(["jointed", "fixed", "jointed"]) == ["jointed 1", "fixed", "jointed 2"]


def test_cautions_name_their_instruments(duo):
    # hillside-evening starts at 29 °C, 60 % and 450 W/m2: the players' and the sun cautions.
    topics = {c.topic: c for c in duo.cautions}
    assert {"players", "sun"} <= set(topics)
    assert set(topics["players"].instruments) == {"jointed", "fixed"}
    assert "at 0 min" in topics["sun"].when


def test_a_member_with_the_ensembles_plan_as_its_own_gives_the_same_numbers(solo):
    # Consistency: reading the moments through Trajectory.resumed (own plans) agrees with the
    # phase-by-phase reading to round-off.
    own = gig.plan_gig([Member(JOINTED, "jointed", parse_plan(PLAN))], EVENING, PLAN)
    for a, b in zip(own.moments, solo.moments):
        assert a.standings[0].mean_drift_cents == pytest.approx(b.standings[0].mean_drift_cents, abs=1e-6)


def test_a_member_resting_longer_is_compared_at_the_ensembles_moments():
    # The second player rests a minute longer (minutes 2 to 5). At the start of set 1 (minute 4)
    # both walls have the same history, so both first notes agree; at the end (minute 6) the late
    # one has played one minute instead of two after a longer rest: a colder wall, flatter.
    late = gig.plan_gig([JOINTED, Member(JOINTED, "late", parse_plan("play:2,rest:3,play:1"))], EVENING, PLAN)
    on_time, resting = late.moments[2].standings
    assert resting.mean_drift_cents == pytest.approx(on_time.mean_drift_cents, abs=1e-4)
    on_time, resting = late.moments[3].standings
    assert resting.mean_drift_cents < on_time.mean_drift_cents - 0.1
    with pytest.raises(OutOfRangeError, match="must last as long"):
        gig.plan_gig([Member(JOINTED, "short", parse_plan("play:2"))], EVENING, PLAN)
