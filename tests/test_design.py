"""The maker's desk (drift.design): design temperature, sensitivities, climates and compromise,
scaling, and retuning a layout.

Where a check goes through another job of drift (the chart), it is a consistency check between
two paths through the model, said so beside it; the outside checks are Cramer (1993) for the
sound speed at rest and the similarity of the wave equation for a scaled tube.
"""

import math
import tomllib

import numpy as np
import pytest
from conftest import invoke
from references import cramer_sound_speed, davis_water_fraction

from drift import chart, design
from drift.climate import Breath, Climate, Player, Room, pressure_from_altitude
from drift.constants import ZERO_CELSIUS
from drift.errors import DriftError
from drift.instrument import parse_instrument

#: A 462 mm reed cylinder of 15 mm bore with a tuning joint, its first and second registers named
#: for A4 = 415 Hz (G3 and the twelfth above, D5); its design temperature lies near 20 °C.
TUBE_415 = """
name = "tube 415"
excitation = "reed"
material = "tropical_hardwood"
[bore]
stations_mm = [[0, 15], [462, 15]]
[input]
reed_volume_mm3 = 0
[design]
a4_hz = {a4}
[tuning]
position_mm = 100
[[note]]
name = "G3"
closed = []
[[note]]
name = "D5"
closed = []
register = 2
"""


def tube_415(a4="415"):
    return parse_instrument(tomllib.loads(TUBE_415.format(a4=a4)), "tube.toml")


def at(temperature_k, ins, rh=None, pressure_pa=None, breath=None, playing=True, name="state"):
    """A climate at one room temperature with the instrument's design humidity, pressure and CO2."""
    d = ins.design
    room = Room(temperature_k, d.pressure_pa if pressure_pa is None else pressure_pa,
                d.relative_humidity if rh is None else rh, d.co2_fraction)
    return Climate(name, room, Player(playing=playing, breath=breath or Breath()))


def chart_offsets(ins, climates, a4_hz=None):
    """(climates, notes) offsets from equal temperament [cent] through drift_chart."""
    c = chart.drift_chart(ins, climates, a4_hz=a4_hz)
    return np.array([[r.offset_from_equal_cents for r in c.rows if r.climate == k.name] for k in climates])


def test_chart_at_the_design_temperature_is_centred(default_design):
    # Consistency check through the chart: at the returned temperature, played to the
    # steady state at the design humidity, the mean offset is zero within 0.3 cent.
    ins, _, result = default_design
    offsets = chart_offsets(ins, [at(result.design_temperature_k, ins)])
    assert abs(float(np.nanmean(offsets))) < 0.3
    assert -10.0 < result.design_temperature_k - ZERO_CELSIUS < 45.0


def test_sensitivities_agree_with_charts_at_shifted_conditions(default_design):
    # Consistency check through the chart: charts run at the conditions the sensitivities are
    # differences of (temperature +-1 K, humidity +-5 %, ISO 2533 altitude +-500 m from sea
    # level, breath CO2 4.5 +- 0.5 %) give the same slopes, to 0.01 cent per unit.
    ins, _, result = default_design
    t, rh = result.design_temperature_k, ins.design.relative_humidity
    climates = [at(t - 1, ins, name="t-"), at(t + 1, ins, name="t+"),
                at(t, ins, rh=rh - 0.05, name="rh-"), at(t, ins, rh=rh + 0.05, name="rh+"),
                at(t, ins, pressure_pa=float(pressure_from_altitude(-400.0)), name="z-"),
                at(t, ins, pressure_pa=float(pressure_from_altitude(500.0)), name="z+"),
                at(t, ins, breath=Breath(co2_fraction=0.040), name="co2-"),
                at(t, ins, breath=Breath(co2_fraction=0.050), name="co2+")]
    o = chart_offsets(ins, climates)
    slopes = {"cents_per_k": (o[1] - o[0]) / 2.0, "cents_per_10pct_rh": (o[3] - o[2]),
              # the design is at sea level: the step down stops at the range's -400 m
              "cents_per_km_altitude": (o[5] - o[4]) / 0.9, "cents_per_pct_co2": (o[7] - o[6])}
    for key, expected in slopes.items():
        got = [getattr(s, key) for s in result.sensitivity]
        assert got == pytest.approx(expected, abs=0.01), key


def test_at_rest_cents_per_kelvin_follow_cramer(outside):
    # Cramer (1993), J. Acoust. Soc. Am. 93, 2510, Eq. 15 (tests/references.py), with the water
    # fraction at constant 50 % RH from Davis (1992): at rest the bore holds room air, so every
    # note moves by 1200 log2 of the sound-speed ratio, within 0.2 cent/K (the wall's expansion and
    # the losses make the rest).
    ins = tube_415()
    got = design.sensitivities(ins, ZERO_CELSIUS + 20.0, relative_humidity=0.5, playing=False)
    p = ins.design.pressure_pa
    c = [cramer_sound_speed(t, p, davis_water_fraction(t, p, 0.5), 420e-6) for t in (19.0, 21.0)]
    expected = 1200.0 * math.log2(c[1] / c[0]) / 2.0
    outside.check([s.cents_per_k for s in got], [expected] * len(got), quantity="cents per K of every note of a "
                  "reed tube at rest, 20 °C, 50 % RH", source="1200 log2 of the sound-speed ratio, Cramer (1993), "
                  "Eq. 15, water from Davis (1992)", abs=0.2, unit="cent/K")
    assert all(s.cents_per_pct_co2 == 0.0 for s in got)        # no breath in a resting bore


def test_a_file_at_415_gets_a_design_temperature_for_415():
    ins = tube_415()
    batches = []
    result = design.design_study(ins, progress=lambda: batches.append(1))
    assert result.a4_hz == 415.0
    assert len(batches) >= 3         # the scan, the root's steps, the sensitivities
    # consistency check through the chart, at A4 = 415 Hz
    offsets = chart_offsets(ins, [at(result.design_temperature_k, ins)], a4_hz=415.0)
    assert abs(float(np.nanmean(offsets))) < 0.3
    # the same notes against A4 = 440 Hz are about a semitone flat at any room temperature
    with pytest.raises(DriftError, match="flat throughout"):
        design.design_study(ins, a4_hz=440.0)


def test_compromise_is_no_worse_on_the_worst_climate(default_design):
    # The design for the compromise temperature, built as the instrument scaled in length so that
    # its mean offset there is zero (checked in a chart), and charted in the customers' climates:
    # its worst |mean offset| is no worse than the plain design's. Consistency check through the
    # chart and drift.design.scaled, not the job's own shift.
    ins, climates, result = default_design
    assert result.compromise_temperature_k is not None
    plain = np.nanmean(chart_offsets(ins, climates), axis=1)
    m = float(np.nanmean(chart_offsets(ins, [at(result.compromise_temperature_k, ins)])))
    compromise = design.scaled(ins, 2.0 ** (m / 1200.0))
    assert abs(float(np.nanmean(chart_offsets(compromise, [at(result.compromise_temperature_k, ins)])))) < 0.3
    moved = np.nanmean(chart_offsets(compromise, climates), axis=1)
    assert np.max(np.abs(moved)) <= np.max(np.abs(plain)) + 0.05
    # and the climates' summaries are those of the plain design
    assert [c.mean_offset_cents for c in result.climates] == pytest.approx(plain, abs=0.05)


@pytest.mark.parametrize("factor", [0.97, 1.04])
def test_a_scaled_plain_tube_moves_by_minus_1200_log2_s(outside, factor):
    # Similarity of the lossless wave equation: a closed-open tube sounds at
    # f_n = (2n - 1) c / (4 (L + delta)), delta = 0.6133 a the end correction of an unflanged
    # pipe (Levine & Schwinger 1948, Phys. Rev. 73, 383), which does not scale with the length.
    # So scaling L by s moves every resonance by -1200 log2((s L + delta) / (L + delta)),
    # -1200 log2(s) for delta -> 0; to 0.02 cent (delta varies as (ka)^2, ka ~ 0.01 here).
    from conftest import CYLINDER, DRY_PROFILE

    from drift import pitch

    tube = parse_instrument(tomllib.loads(CYLINDER), "tube.toml")
    base = pitch.find_resonances(tube, DRY_PROFILE, count=3, lossless=True).frequencies_hz[0]
    moved = pitch.find_resonances(design.scaled(tube, factor), DRY_PROFILE, count=3,
                                  lossless=True).frequencies_hz[0]
    length, delta = 0.6, 0.6133 * 0.005
    expected = -1200.0 * math.log2((factor * length + delta) / (length + delta))
    outside.check(moved, base * 2.0 ** (expected / 1200.0), quantity="first three resonances of a lossless "
                  "closed-open tube scaled in length", source="f ~ 1/(L + 0.6133 a), similarity of the wave "
                  "equation with the end correction of Levine & Schwinger (1948)", cents=0.02, unit="Hz")
    assert abs(expected + 1200.0 * math.log2(factor)) < 0.5     # close to -1200 log2(s)


# --------------------------------------------------------------------------------------------
# Retune
# --------------------------------------------------------------------------------------------


@pytest.fixture(scope="session")
def retuned_flute(tmp_path_factory):
    """``drift retune side-blown-flute --room-temp 16 --output FILE --format json``: the run,
    its document and the new instrument."""
    import json
    from types import SimpleNamespace

    from drift.instrument import load_instrument

    output = tmp_path_factory.mktemp("retune") / "flute-16.toml"
    result = invoke("retune", "side-blown-flute", "--room-temp", "16", "--output", output, "--format", "json")
    return SimpleNamespace(doc=json.loads(result.stdout), output=output, new=load_instrument(output),
                           old=load_instrument("side-blown-flute"))


def test_retune_lowers_the_rms_offset(retuned_flute):
    # Checked through charts of the old and the new layout at the new condition (16 °C played,
    # the file's humidity), not through the solver's own residuals.
    r = retuned_flute
    assert r.new.design.temperature_k == pytest.approx(ZERO_CELSIUS + 16.0)
    assert r.new.design.playing
    state = at(ZERO_CELSIUS + 16.0, r.old)
    before, after = chart_offsets(r.old, [state])[0], chart_offsets(r.new, [state])[0]
    rms = [float(np.sqrt(np.nanmean(x**2))) for x in (before, after)]
    assert rms[1] < 0.6 * rms[0]
    assert r.doc["rms_before_cents"] == pytest.approx(rms[0], abs=0.05)
    assert r.doc["rms_after_cents"] == pytest.approx(rms[1], abs=0.05)


def test_retune_keeps_holes_inside_the_bore_and_apart(retuned_flute):
    new = retuned_flute.new
    holes = sorted(new.holes, key=lambda h: h.position_m)
    assert [h.name for h in holes] == [h.name for h in sorted(retuned_flute.old.holes, key=lambda h: h.position_m)]
    for h in holes:
        top = new.input_end.embouchure_position_m
        assert top + h.diameter_m / 2 < h.position_m < new.length_m - h.diameter_m / 2
        assert h.diameter_m < float(new.diameter_at(h.position_m))
    for a, b in zip(holes[:-1], holes[1:]):
        assert b.position_m - a.position_m - (a.diameter_m + b.diameter_m) / 2 > 0.0
    moves = [h["move_mm"] for h in retuned_flute.doc["holes"]]
    assert retuned_flute.doc["largest_hole_move_mm"] == pytest.approx(max(abs(m) for m in moves))


def test_illinois_finds_known_roots():
    # Roots known in closed form: 2^(1/3) for x^3 - 2, and pi/2 for cos x (mathematical facts).
    for f, a, b, root in [(lambda x: x**3 - 2.0, 0.0, 3.0, 2.0 ** (1 / 3)), (math.cos, 0.0, 3.0, math.pi / 2)]:
        calls = []

        def counted(x, f=f):
            calls.append(x)
            return f(x)

        x = design.illinois(counted, a, b, f(a), f(b), xtol=1e-12, ftol=1e-12)
        assert x == pytest.approx(root, abs=1e-9)
        assert len(calls) < 20
