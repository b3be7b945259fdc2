"""The drift chart (drift.chart) against published sound-speed physics and its own invariants."""

import math

import numpy as np
import pytest

from conftest import load_pitch_reference
from conftest import make_instrument as make
from drift import chart, thermal
from drift.instrument import load_instrument
from drift.bore_state import BoreProfile
from drift.errors import OutOfRangeError
from drift.scale import cents
from drift.climate import Climate, Player, Room, load_climate
from drift.constants import ZERO_CELSIUS
from drift.instrument import DEFAULT_INSTRUMENT
from references import cramer_sound_speed, davis_water_fraction

REST = Player(playing=False)


@pytest.fixture(scope="module")
def instrument(bundled_instruments):
    return bundled_instruments[DEFAULT_INSTRUMENT]


def resting(name, t_c, rh=0.0, player=REST):
    return Climate(name, Room(t_c + ZERO_CELSIUS, 101325.0, rh, 420e-6), player)


def drifts(result, climate_name):
    return np.array([r.drift_cents for r in result.rows if r.climate == climate_name])


def cramer_cents(t1, rh1, t0, rh0, p=101325.0):
    """1200 log2(c1/c0) with c from Cramer (1993), Eq. 15, water from Davis (1992)."""
    def c(t, rh):
        x_w = davis_water_fraction(t, p, rh)
        return cramer_sound_speed(t, p, x_w, 420e-6 * (1 - x_w))
    return 1200 * math.log2(c(t1, rh1) / c(t0, rh0))


def test_temperature_shift_follows_sound_speed(outside, instrument):
    """At rest in dry air, 20 -> 30 °C: every note shifts by 1200 log2(c30/c20) within 1 cent, c from
    Cramer (1993); wall losses and thermal expansion add only tenths of a cent."""
    result = chart.drift_chart(instrument, [resting("warm", 30.0)], reference=resting("cool", 20.0))
    outside.check(drifts(result, "warm"), cramer_cents(30.0, 0.0, 20.0, 0.0),
                  quantity="drift of every note of the default instrument at rest, dry air, 20 -> 30 °C",
                  source="1200 log2(c30/c20), c from Cramer (1993), Eq. 15, water from Davis (1992)", abs=1.0,
                  unit="cent")


def test_humidity_shift_follows_sound_speed(outside, instrument):
    """At rest at 30 °C, 0 -> 100 % RH: every note follows the sound-speed ratio of Cramer (1993)
    within 1 cent."""
    result = chart.drift_chart(instrument, [resting("wet", 30.0, 1.0)], reference=resting("dry", 30.0, 0.0))
    outside.check(drifts(result, "wet"), cramer_cents(30.0, 1.0, 30.0, 0.0),
                  quantity="drift of every note of the default instrument at rest, 30 °C, 0 -> 100 % RH",
                  source="1200 log2(c_wet/c_dry), c from Cramer (1993), Eq. 15, water from Davis (1992)", abs=1.0,
                  unit="cent")


def test_rule_of_thumb_three_cents_per_degree(outside, instrument):
    """About 3 cents per °C near room temperature (common practice)."""
    result = chart.drift_chart(instrument, [resting("21", 21.0, 0.5)], reference=resting("19", 19.0, 0.5))
    per_degree = drifts(result, "21") / 2.0
    # The band 2.5-3.5 cent/°C, checked as its midpoint give or take its half-width.
    outside.check(per_degree, 3.0, quantity="drift per °C of every note of the default instrument at rest, "
                  "19 -> 21 °C, 50 % RH", source="about 3 cents per °C (common practice)", abs=0.5, unit="cent/°C")


def test_reference_drift_is_zero_and_drift_is_antisymmetric(instrument):
    a, b = resting("a", 12.0, 0.3), resting("b", 27.0, 0.8)
    ab = chart.drift_chart(instrument, [a, b], reference=a)
    ba = chart.drift_chart(instrument, [a], reference=b)
    assert np.all(drifts(ab, "a") == 0.0)
    np.testing.assert_allclose(drifts(ab, "b"), -drifts(ba, "a"), atol=1e-9)


def test_joint_change_centres_the_mean_drift_when_applied(instrument):
    warm = resting("warm", 28.0, 0.5)
    result = chart.drift_chart(instrument, [warm], reference=resting("cool", 18.0, 0.5))
    s = result.summary[0]
    assert s.mean_drift_cents > 10 and s.adjust_m > 0           # sharp: pull the joint out
    changed = dataclass_free(instrument).with_joint_change(s.adjust_m)
    reference_hz = chart.frequencies(instrument, thermal.climate_profile(instrument, resting("cool", 18.0, 0.5)))
    applied = chart.frequencies(changed, thermal.climate_profile(instrument, warm))
    assert abs(np.mean(1200 * np.log2(applied / reference_hz))) < 0.01
    assert s.residual_spread_cents == pytest.approx(np.ptp(s.adjusted_drift_cents))


def dataclass_free(instrument):
    import dataclasses

    return dataclasses.replace(instrument, tuning=dataclasses.replace(
        instrument.tuning, min_change_m=-0.06, max_change_m=0.06))


def test_played_steady_state_is_sharp_and_short_tube_notes_most(instrument):
    """Played to steady state in a 20 °C room, every note is sharp against the cold instrument, and
    the short-tube notes of the first register more than the lowest note: the breath warms the
    input end most (the bore gradient; common practice)."""
    room = 20.0
    played = resting("played", room, 0.5, Player(playing=True))
    result = chart.drift_chart(instrument, [played], reference=resting("cold", room, 0.5))
    d = drifts(result, "played")
    assert np.all(d > 0)
    first = [i for i, n in enumerate(instrument.notes) if n.register == 1]
    lowest = min(first, key=lambda i: result.rows[i].frequency_hz)
    highest = max(first, key=lambda i: result.rows[i].frequency_hz)
    assert d[highest] > d[lowest]


def test_warning_when_the_joint_cannot_reach(instrument):
    import dataclasses

    tight = dataclasses.replace(instrument, tuning=dataclasses.replace(
        instrument.tuning, min_change_m=-0.0005, max_change_m=0.0005))
    result = chart.drift_chart(tight, [resting("hot", 35.0, 0.5)], reference=resting("cold", 5.0, 0.5))
    s = result.summary[0]
    assert s.adjust_m > 0.5e-3 and "exceeds what the joint allows" in s.warning


def test_chart_needs_named_notes(write_toml):
    from conftest import CYLINDER
    from drift.errors import DriftError
    from drift.instrument import load_instrument

    tube = load_instrument(write_toml(CYLINDER, "tube.toml"))
    with pytest.raises(DriftError, match="no \\[\\[note\\]\\]; a chart needs named notes"):
        chart.drift_chart(tube, [resting("warm", 30.0)])


def test_without_a_joint_the_drift_stands(two_hole_pipe):
    import dataclasses

    from drift.instrument import load_instrument

    pipe = dataclasses.replace(load_instrument(two_hole_pipe), tuning=None)
    result = chart.drift_chart(pipe, [resting("warm", 30.0)], reference=resting("cool", 20.0))
    s = result.summary[0]
    assert s.adjust_m is None and "no tuning joint" in s.warning
    assert s.residual_spread_cents == pytest.approx(s.spread_cents)
    # the default reference is the design condition, here at rest at 20 °C and 50 % RH
    assert chart.design_climate(pipe).name == "design"
    assert chart.design_climate(pipe).player.playing is False


REFERENCE = load_pitch_reference()


def test_secant_joint_change_matches_brent():
    # Two solvers on the same mean drift (not an outside check): the secant steps against
    # Brent's method of the reference, each to 1 um; they must agree within 0.01 mm.
    ins = load_instrument("cylindrical-reed")
    reference_hz = chart.frequencies(ins, thermal.climate_profile(ins, chart.design_climate(ins)))
    for name in ("winter-church", "lit-stage"):
        profile = thermal.climate_profile(ins, load_climate(name))
        drift = cents(chart.frequencies(ins, profile), reference_hz)
        new = chart.joint_change(ins, profile, reference_hz, drift)
        old = REFERENCE.reference_joint_change(ins, profile, reference_hz, drift)
        assert abs(new) > 1e-4 and abs(new - old) < 1e-5, (name, new, old)


def test_joint_change_out_of_reach_raises_the_same_error():
    # A 1.2 m cylinder with its joint 100 mm from the input, played at -20 °C against a 40 °C
    # reference: c falls by about 10 % (c ~ sqrt(T), any acoustics text), so the column would
    # have to shrink by about 110 mm, beyond the 60 mm search range.
    ins = make([[0, 14], [1200, 14]], tuning={"position_mm": 100.0, "min_change_mm": -2.0, "max_change_mm": 2.0},
               note=[{"name": "C2", "closed": []}])
    reference_hz = chart.frequencies(ins, BoreProfile.uniform(Room(313.15)))
    cold = BoreProfile.uniform(Room(253.15))
    with pytest.raises(OutOfRangeError, match="no joint change within ±60 mm centres the notes"):
        chart.joint_change(ins, cold, reference_hz)
    with pytest.raises(OutOfRangeError, match="no joint change within ±60 mm centres the notes"):
        REFERENCE.reference_joint_change(ins, cold, reference_hz,
                                         cents(chart.frequencies(ins, cold), reference_hz))


def test_sweep_over_a_process_pool_equals_the_charts_one_by_one():
    """drift_charts with a ProcessPoolExecutor's map gives the same charts as drift_chart in this
    process (issue 9: a sweep maps onto a process pool with no code change)."""
    from concurrent.futures import ProcessPoolExecutor

    instruments = [load_instrument("side-blown-flute"), load_instrument("conical-reed")]
    climates = [resting("cool", 12.0, 0.6)]
    with ProcessPoolExecutor(2) as pool:
        spread = chart.drift_charts(instruments, climates, map=pool.map)
    here = [chart.drift_chart(i, climates) for i in instruments]
    for a, b in zip(spread, here):
        assert a.instrument == b.instrument
        np.testing.assert_allclose([r.drift_cents for r in a.rows], [r.drift_cents for r in b.rows], rtol=0,
                                   atol=1e-9)
        assert a.summary[0].adjust_m == pytest.approx(b.summary[0].adjust_m, abs=1e-12)


def test_name_warnings_flag_beyond_half_a_semitone(outside):
    # Equal temperament: f = a4 2^((m - 69)/12) (ISO 16:1975 reference pitch), written out here;
    # a note is flagged beyond 50 cents (half of the 100-cent semitone) from its name.
    pipe = make([[0, 15], [600, 15]], note=[{"name": n} for n in ("C3", "D3", "E3", "F3")],
                design={"a4_hz": 415.0})
    et = {n: 415.0 * 2.0 ** ((m - 69) / 12.0) for n, m in (("C3", 48), ("D3", 50), ("E3", 52), ("F3", 53))}
    offsets = {"C3": 49.9, "D3": -49.9, "E3": 50.1, "F3": -150.0}
    played = [et[n] * 2.0 ** (offsets[n] / 1200.0) for n in et]
    flagged = chart.name_warnings(pipe, pipe.notes, played)
    assert [w.note for w in flagged] == ["E3", "F3"]
    for w in flagged:
        assert w.a4_hz == 415.0
        assert w.offset_cents == pytest.approx(offsets[w.note], abs=1e-9)
    outside.check([w.target_hz for w in flagged], [et[w.note] for w in flagged],
                  quantity="equal-tempered target frequencies of E3 and F3, A4 = 415 Hz",
                  source="f = a4 2^((m - 69)/12), ISO 16:1975 reference pitch", rel=1e-12, unit="Hz")
    # a note that does not sound (NaN) and an unnamed fingering are not flagged
    assert chart.name_warnings(pipe, pipe.notes, [np.nan] * 4) == ()
    assert chart.name_warnings(make([[0, 15], [600, 15]])) == ()
