"""Playing frequencies (drift.pitch): the bundled instruments, air and wall effects, the resonance
search."""

import dataclasses
import math
import re

import numpy as np
import pytest

from conftest import BUNDLED, assert_refused, load_pitch_reference
from conftest import DRY_PROFILE as PROFILE
from conftest import first_resonances as first
from conftest import make_instrument as make
from drift import chart, instrument, pitch, resonance, thermal
from drift.climate import Room, load_climate
from drift.errors import DriftError
from drift.instrument import load_instrument
from drift.scale import cents, note_to_midi
from drift.bore_state import BoreProfile
from drift.thermal import design_profile
from references import nearest_note


def test_bundled_instruments_in_equal_temperament_at_design(design_notes):
    # A regression check of the bundled files, not an outside check: drift's own layout solver
    # (for the brass, a least-squares fit of the bore length and the loops or slide travels)
    # tuned them to A4 = 440 Hz (ISO 16) at their [design] condition, so every note must stay
    # within +-10 cent of equal temperament there while the model and the files agree. The
    # exception: a note on all three valves runs sharp (loops that put 1+2+3 in tune would put
    # the single valves out of it; the player pulls the third valve slide: common practice),
    # though less than the 50 cent or so of loops sized for single valves
    # (test_valve_combinations_run_sharp); the file's header names those beyond 10 cent.
    assert sorted(design_notes) == sorted(BUNDLED)
    for name, (ins, notes) in design_notes.items():
        assert len(notes) == len(ins.notes)
        dev = np.array([n.deviation_cents for n in notes])
        assert np.all(np.isfinite(dev)), name
        three = np.array([len(n.valves) == 3 for n in ins.notes])
        assert np.max(np.abs(dev[~three])) <= 10.0, (name, dev)
        assert np.all((dev[three] > 0.0) & (dev[three] < 50.0)), (name, dev)
        header = instrument.bundled_instrument_text(name).split("\n\n")[0]
        named = set(re.findall(r"(\w+) \(register", header.partition("# Beyond")[2].replace("\n#", "")))
        assert named == {n.note for n, d in zip(notes, dev) if abs(d) > 10.0}, name


def test_cylinder_reed_sounds_lower_than_longer_cone(design_notes):
    # Common practice (fact of the trade): a cylindrical reed instrument about 66 cm long sounds
    # its lowest note near D3, lower than a conical reed instrument about 71 cm long whose lowest
    # note is near Ab3 -- the closed cylinder's fundamental has lambda = 4L, the cone's 2L.
    cyl, cone = design_notes["cylindrical-reed"], design_notes["conical-reed"]
    low_cyl = min(n.frequency_hz for n in cyl[1])
    low_cone = min(n.frequency_hz for n in cone[1])
    assert nearest_note(low_cyl) == "D3"
    assert nearest_note(low_cone) == "Ab3"
    assert cyl[0].length_m < cone[0].length_m and low_cyl < low_cone


def test_registers_overblow_at_twelfth_and_octave(design_notes):
    # Benade (1976): the closed cylinder's second register is the third harmonic (a twelfth, 1902
    # cent), the cone's the second (an octave); the first fingering of each register differs so.
    for name, interval in (("cylindrical-reed", 19), ("conical-reed", 12), ("side-blown-flute", 12)):
        ins, notes = design_notes[name]
        low = next(n for n in notes if n.register == 1)
        high = next(n for n in notes if n.register == 2)
        assert note_to_midi(high.note) - note_to_midi(low.note) == interval
        assert abs(cents(high.frequency_hz, low.frequency_hz) - 100 * interval) < 20


def test_warmer_air_raises_every_note(outside, bundled_instruments):
    # c ~ sqrt(T): from 20 to 30 °C about +29 cent (Fletcher & Rossing 1998, Sec. 8.1); wall
    # expansion and losses change it by a cent or two. The band 24-34 cent is checked as its
    # midpoint give or take its half-width.
    ins = bundled_instruments["cylindrical-reed"]
    cool = pitch.note_frequencies(ins, BoreProfile.uniform(Room(293.15, relative_humidity=0.5)))
    warm = pitch.note_frequencies(ins, BoreProfile.uniform(Room(303.15, relative_humidity=0.5)))
    shift = np.array([cents(w.frequency_hz, c.frequency_hz) for w, c in zip(warm, cool)])
    outside.check(shift, 29.0, quantity="pitch shift of every note of the cylindrical reed instrument, "
                  "20 -> 30 °C, 50 % RH, walls at the air temperature",
                  source="c ~ sqrt(T), Fletcher & Rossing (1998), Sec. 8.1: about +29 cent", abs=5.0, unit="cent")


def test_covering_more_of_the_embouchure_flattens_every_note(bundled_instruments):
    # Rolling a flute in (the lip covering more of the embouchure hole) flattens it (Fletcher &
    # Rossing 1998, Ch. 16, from memory; common practice). The size of the effect is the model's
    # (docs/physics.md), only its direction is checked here.
    ins = bundled_instruments["side-blown-flute"]
    room = BoreProfile.uniform(Room(293.15, relative_humidity=0.5))
    def played(cover):
        changed = dataclasses.replace(ins, input_end=dataclasses.replace(ins.input_end, lip_cover=cover))
        return np.array([n.frequency_hz for n in pitch.note_frequencies(changed, room)])
    shift = cents(played(0.35), played(0.15))
    assert np.all(shift < 0)


def test_wall_expansion_lowers_pitch_by_alpha(bundled_instruments):
    # A bore uniformly expanded by (1 + alpha dT) at unchanged air plays lower by that factor
    # (dimensional scaling, lossless), i.e. -1200 log2(1 + alpha dT) cent. Everything must
    # scale: the reed's compliance, a property of the reed and not of the bore, is left out.
    import dataclasses

    ins = bundled_instruments["conical-reed"]
    ins = dataclasses.replace(ins, input_end=dataclasses.replace(ins.input_end, reed_compliance_m3_pa=0.0))
    room = Room(293.15, relative_humidity=0.5)
    t = np.array([room.temperature_k])
    plain = BoreProfile(room, np.array([0.0]), t, np.array([0.0]), t)
    hot_wall = BoreProfile(room, np.array([0.0]), t, np.array([0.0]), t + 40.0)
    alpha = ins.wall_material.expansion_per_k
    f0 = pitch.note_frequencies(ins, plain, lossless=True)
    f1 = pitch.note_frequencies(ins, hot_wall, lossless=True)
    shift = np.array([cents(b.frequency_hz, a.frequency_hz) for a, b in zip(f0, f1)])
    assert np.allclose(shift, -1200 * math.log2(1 + alpha * 40.0), atol=1e-3)


def test_resonances_and_unnamed_fingering(write_toml):
    ins = load_instrument(write_toml('name = "p"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 12], [400, 12]]\n',
                                     "p.toml"))
    found = pitch.find_resonances(ins, design_profile(ins), count=4)
    res = found.frequencies_hz
    assert len(res) == 1 and len(res[0]) == 4 and np.all(np.diff(res[0]) > 0)
    assert found.instrument == "p" and found.notes == ins.fingerings()
    (note,) = pitch.note_frequencies(ins, design_profile(ins))
    assert note.note is None and note.register is None and note.frequency_hz == pytest.approx(res[0][0])
    # A room fills the bore with its air, walls at its temperature: the same as its uniform profile.
    room = ins.design.room()
    np.testing.assert_array_equal(pitch.find_resonances(ins, room, count=4).frequencies_hz[0],
                                  pitch.find_resonances(ins, BoreProfile.uniform(room), count=4).frequencies_hz[0])


def test_refinement_reaches_hundredth_of_a_cent(bundled_instruments, design_profiles):
    # The bracketed refinement must locate each peak to < 0.01 cent: evaluating |Z| a hundredth
    # of a cent to either side gives smaller values.
    ins = bundled_instruments["cylindrical-reed"]
    profile = design_profiles["cylindrical-reed"]
    net = pitch.bore_network(ins, profile)
    notes = pitch.note_frequencies(ins, profile, network=net)
    mask = ins.open_mask()
    step = 2 ** (0.01 / 1200)
    for i, n in enumerate(notes):
        f = np.array([n.frequency_hz / step, n.frequency_hz, n.frequency_hz * step])
        z = np.abs(net.impedance(f, mask[i:i + 1]))[0]
        assert z[1] > z[0] and z[1] > z[2]


# --------------------------------------------------------------------------------------------
# The fast search against the straightforward reference search of bench/bench_pitch.py: two
# implementations of the same model, so agreement shows the same extrema are found, not that the
# model is right.
# --------------------------------------------------------------------------------------------

REFERENCE = load_pitch_reference()
#: The fast search must match the reference within this [cent] (issue 9's contract).
AGREEMENT_CENTS = 0.05


def test_refine_extrema_on_wide_brackets(outside, room_air):
    # refine_extrema on its own, from brackets a quarter of the way to the neighbouring modes:
    # closed-open pipe, ideal open end, (2n-1) c / 4L (Fletcher & Rossing 1998, Sec. 8.2).
    c = float(room_air.sound_speed[0])
    net = pitch.bore_network(make([[0, 10], [600, 10]]), PROFILE, lossless=True, radiation="ideal")
    expected = np.array([1, 3, 5]) * c / (4 * 0.6)
    spacing = c / (2 * 0.6)
    x1, x2, x3 = expected - 0.2 * spacing, expected + 0.03 * spacing, expected + 0.25 * spacing
    found = resonance.refine_extrema(net, np.ones((3, 0), dtype=bool), x1, x2, x3)
    outside.check(found, expected, quantity="first three resonances of a 600 mm closed-open pipe of 10 mm, "
                  "lossless, ideal open end, dry air at 20 °C", source="(2n-1) c / 4L, Fletcher & Rossing (1998), "
                  "Sec. 8.2; c from drift's air layer", rel=1e-6, unit="Hz")


def test_a_register_beyond_the_search_range_is_nan(outside, room_air):
    # A 20 mm closed-open tube, ideal open end: (2n-1) c / 4L = 4.3, 12.9, 21.5 kHz
    # (Fletcher & Rossing 1998, Sec. 8.2); the search ends at 15 kHz, so the third is not found
    # and a note in that register is NaN, as the reference search does.
    c = float(room_air.sound_speed[0])
    inst = make([[0, 10], [20, 10]])
    f = first(inst, count=3, lossless=True, radiation="ideal")
    assert len(f) == 2
    outside.check(f, np.array([1, 3]) * c / (4 * 0.02), quantity="first two resonances of a 20 mm closed-open "
                  "pipe of 10 mm, lossless, ideal open end, dry air at 20 °C",
                  source="(2n-1) c / 4L, Fletcher & Rossing (1998), Sec. 8.2; c from drift's air layer", rel=1e-6,
                  unit="Hz")
    (old,) = REFERENCE.reference_resonances(inst, PROFILE, 3, lossless=True, radiation="ideal")
    assert len(old) == 2
    third = instrument.Note("C8", (), 3)
    (note,) = pitch.note_frequencies(inst, PROFILE, lossless=True, notes=[third])
    assert math.isnan(note.frequency_hz)


def test_a_bore_where_no_note_sounds_is_refused_before_the_work(cli, write_toml):
    # Behaviour, not physics: a 20 mm tube's third resonance lies above the search (test above),
    # so a file whose only note is in that register leaves nothing to chart; with a second note in
    # reach the first stays NaN and nothing is refused.
    third = make([[0, 10], [20, 10]], note=[{"name": "C8", "register": 3}])
    with pytest.raises(DriftError, match="test.toml: no note sounds in the model"):
        pitch.check_sounds(third)
    pitch.check_sounds(make([[0, 10], [20, 10]], note=[{"name": "C8", "register": 3}, {"name": "C#8"}]))
    # A 0.5 mm bore behind the default reed (1000 mm³ of equivalent volume; the bore holds 59 mm³)
    # has no resonance at all: chart, warm-up, advice and retuning stop at once with one line,
    # exit 2, and write nothing.
    thin = write_toml('name = "thin"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 0.5], [300, 0.5]]\n'
                      '[[note]]\nname = "C4"\n', "thin.toml")
    for args in (["chart", thin, "--climate", "tuning-room"], ["warmup", thin, "--plan", "play:1"],
                 ["advise", thin, "--climate", "tuning-room"],
                 ["retune", thin, "--room-temp", "25", "--output", thin.parent / "new.toml"]):
        assert_refused(cli(*args, code=None), f"{thin}: no note sounds", "0.5 mm at its narrowest")
    assert not (thin.parent / "new.toml").exists()


def test_a_bore_longer_than_the_20_hz_band_keeps_its_lowest_resonance(outside, room_air):
    # A 10 m closed-open cylinder, 20 mm bore, lossless: (2n-1) c / 4(L + 0.6133 a) = 8.6, 25.7,
    # 42.9 Hz (Levine & Schwinger 1948): the first lies below the search's usual 20 Hz start, and
    # the search reaches down for it rather than numbering the second as the first.
    c = float(room_air.sound_speed[0])
    f = first(make([[0, 20], [10000, 20]]), count=3, lossless=True)
    n = np.arange(1, 4)
    outside.check(f, (2 * n - 1) * c / (4 * (10.0 + 0.6133 * 0.01)), quantity="first three resonances of a "
                  "lossless 10 m closed-open cylinder, 20 mm bore", source="(2n-1) c / 4(L + 0.6133 a), Levine & "
                  "Schwinger (1948)", cents=0.02, unit="Hz")


@pytest.mark.parametrize("name", ["cylindrical-reed", "conical-reed", "side-blown-flute"])
def test_every_note_sits_on_its_extremum_to_a_thousandth_of_a_cent(name):
    # The definition of the playing frequency (Benade 1976, Ch. 21-22; Fletcher & Rossing 1998,
    # Secs. 15.2, 16.3): |Z| at its maximum (reed) or minimum (jet). Evaluating |Z| directly a
    # thousandth of a cent to either side of every found frequency must give smaller (larger)
    # values: the search's accuracy claim (0.0002 cent) with margin, in a played state.
    ins = instrument.load_instrument(name)
    profile = thermal.climate_profile(ins, chart.design_climate(ins))
    net = pitch.bore_network(ins, profile)
    notes = pitch.note_frequencies(ins, profile, network=net)
    mask = ins.open_mask()
    sign = -1.0 if ins.excitation == "jet" else 1.0
    for i, n in enumerate(notes):
        f = n.frequency_hz * 2.0 ** (np.array([-0.001, 0.0, 0.001]) / 1200)
        z = sign * np.abs(net.impedance(f, mask[i:i + 1]))[0]
        assert z[1] > z[0] and z[1] > z[2], (name, n.note)


@pytest.mark.parametrize("name", ["cylindrical-reed", "conical-reed", "side-blown-flute"])
def test_new_search_matches_the_reference_search(name):
    # Compares two implementations of the same model (not an outside check): every note, and
    # the first four resonances of every fingering, in a cold and a hot bundled climate and at
    # the design condition, within AGREEMENT_CENTS, with the same register numbering.
    ins = instrument.load_instrument(name)
    states = [chart.design_climate(ins), load_climate("frozen-parade"), load_climate("sunny-lawn")]
    profiles = [thermal.climate_profile(ins, c) for c in states]
    batched = pitch.state_frequencies([ins] * len(profiles), profiles)
    for c, profile, new in zip(states, profiles, batched):
        old = REFERENCE.reference_frequencies(ins, profile)
        assert np.array_equal(np.isnan(new), np.isnan(old)), c.name
        assert np.nanmax(np.abs(cents(new, old))) < AGREEMENT_CENTS, c.name
        single = np.array([n.frequency_hz for n in pitch.note_frequencies(ins, profile)])
        assert np.nanmax(np.abs(cents(single, old))) < AGREEMENT_CENTS, c.name
        for a, b in zip(pitch.find_resonances(ins, profile, count=4).frequencies_hz,
                        REFERENCE.reference_resonances(ins, profile, 4)):
            assert len(a) == len(b), c.name
            assert np.max(np.abs(cents(a, b))) < AGREEMENT_CENTS, c.name


def _random_instrument(rng, excitation):
    """An invented bore (2-5 stations, 150-1500 mm), up to six holes and cross fingerings."""
    length = rng.uniform(150.0, 1500.0)
    x = np.concatenate([[0.0], np.sort(rng.uniform(0.0, length, rng.integers(0, 4))), [length]])
    d = rng.uniform(4.0, 25.0, len(x))
    stations = [[float(a), float(b)] for a, b in zip(x, d)]
    holes = []
    for k, p in enumerate(np.sort(rng.uniform(0.3 * length, 0.95 * length, rng.integers(0, 7)))):
        size = float(rng.uniform(1.5, max(1.6, 0.8 * np.interp(p, x, d))))
        if all(abs(p - h["position_mm"]) > (size + h["diameter_mm"]) / 2 + 1 for h in holes):
            holes.append({"name": f"h{k}", "position_mm": float(p), "diameter_mm": size,
                          "chimney_mm": float(rng.uniform(1.0, 8.0))})
    data = {"name": "random", "excitation": excitation, "bore": {"stations_mm": stations}}
    if holes:
        data["hole"] = holes
        names = [h["name"] for h in holes]
        data["note"] = [{"name": "C4", "closed": names[: len(names) - j], "register": int(rng.integers(1, 4))}
                        for j in range(len(names) + 1)] + [{"name": "D4", "closed": names[::2], "register": 1}]
    if excitation == "reed":
        data["input"] = {"reed_volume_mm3": float(rng.uniform(0.0, 3000.0)),
                         "cavity_volume_mm3": float(rng.uniform(0.0, 3000.0))}
    if excitation == "jet":
        at = rng.uniform(5.0, 0.1 * length)
        data["input"] = {"embouchure_position_mm": float(at),
                         "embouchure_diameter_mm": float(rng.uniform(0.4, 0.9) * np.interp(at, x, d))}
    return instrument.parse_instrument(data, "random.toml")


@pytest.mark.parametrize("seed", range(12))
def test_new_search_matches_the_reference_on_invented_bores(seed):
    # Two implementations of the same model (not an outside check), on invented bores that
    # have closely spaced extrema (cross fingerings, small holes, lip mouthpieces): the first
    # five resonances of every fingering, the same register numbering, within AGREEMENT_CENTS.
    rng = np.random.default_rng(seed)
    ins = _random_instrument(rng, ("reed", "lips", "jet")[seed % 3])
    profile = BoreProfile.uniform(Room(float(rng.uniform(260.0, 310.0)),
                                               relative_humidity=float(rng.uniform(0.0, 1.0))))
    for a, b in zip(pitch.find_resonances(ins, profile, count=5).frequencies_hz,
                    REFERENCE.reference_resonances(ins, profile, 5)):
        assert len(a) == len(b)
        assert np.max(np.abs(cents(a, b))) < AGREEMENT_CENTS


# --------------------------------------------------------------------------------------------
# Valves and slides: the played path (drift.segments.played_path) through the acoustics
# --------------------------------------------------------------------------------------------

#: A closed-open cylinder [m]: its resonances are odd multiples of c / 4 (L + delta), delta the
#: end correction of the open end, 0.6133 r for an unflanged pipe at low ka (Levine & Schwinger
#: 1948).
CYLINDER_LENGTH, CYLINDER_RADIUS = 1.2, 0.006
END_CORRECTION = 0.6133 * CYLINDER_RADIUS


def _interval_cents(added_m):
    """1200 log2 of the length ratio of the cylinder with ``added_m`` [m] inserted, with the end
    correction in both lengths, and a tolerance: a tenth of the end correction's share of the
    interval (the low-frequency end correction of the radiation models differs from Levine &
    Schwinger's 0.6133 r by a few per cent at most at these ka below 0.01; from memory)."""
    plain = 1200 * np.log2((CYLINDER_LENGTH + added_m) / CYLINDER_LENGTH)
    corrected = 1200 * np.log2((CYLINDER_LENGTH + END_CORRECTION + added_m) / (CYLINDER_LENGTH + END_CORRECTION))
    return corrected, 0.1 * abs(plain - corrected)


#: The trade's valves and the intervals they lower by [semitones]: the second a semitone, the
#: first a tone, the third a minor third (common practice).
TRADE_VALVES = {"v2": 1, "v1": 2, "v3": 3}


def _valved_cylinder(valves, combos, slide=None):
    """The cylinder with the named valves of :data:`TRADE_VALVES`, each loop 2^(n/12) - 1 of the
    bore long for its n semitones (the length-ratio rule, sized here without end correction), and
    one note per valve combination."""
    d = 2e3 * CYLINDER_RADIUS
    loops = [{"name": v, "position_mm": 500.0 + 10 * TRADE_VALVES[v],
              "stations_mm": [[0, d], [CYLINDER_LENGTH * 1e3 * (2 ** (TRADE_VALVES[v] / 12) - 1), d]]}
             for v in valves]
    extra = {"valve": loops, "note": [{"name": "C3", "valves": list(c)} for c in combos]}
    if slide is not None:
        extra["slide"] = slide
        extra["note"] = [{"name": "C3", "slide_position": k + 1} for k in range(len(slide["positions_mm"]))]
    return make([[0, d], [CYLINDER_LENGTH * 1e3, d]], **extra)


def test_a_valve_loop_lowers_the_note_by_its_length_ratio(outside):
    # A loop of 2^(n/12) - 1 of the bore's length lowers a cylinder's note by n semitones, 1200
    # log2 of the length ratio: within the end-correction difference (under a cent here), and to
    # a tenth of it once the end correction is counted in both lengths. Lossless: the boundary
    # layer's dispersion lowers a narrow tube's low notes by another cent or two, more for the
    # longer path (not part of the length ratio).
    ins = _valved_cylinder(TRADE_VALVES, [(), ("v2",), ("v1",), ("v3",)])
    f = [r[0] for r in pitch.find_resonances(ins, PROFILE, count=1, lossless=True).frequencies_hz]
    for k, valve in enumerate(("v2", "v1", "v3"), start=1):
        loop = ins.valves[list(TRADE_VALVES).index(valve)].loop_length_m
        expected, tolerance = _interval_cents(loop)
        outside.check(cents(f[0], f[k]), expected, abs=tolerance, unit="cent",
                      quantity=f"lowering by valve {valve}'s loop of {loop * 1e3:.1f} mm on a {CYLINDER_LENGTH} m "
                               "cylinder",
                      source="1200 log2 of the length ratio (quarter-wave cylinder), end correction 0.6133 r "
                             "(Levine & Schwinger 1948); the valve intervals of a semitone, a tone and a "
                             "minor third: common practice")
        assert abs(cents(f[0], f[k]) - 100 * TRADE_VALVES[valve]) < 1.0


def test_valve_combinations_run_sharp(outside):
    # Loops sized for one valve each add too little length together: 1+2 sound about 10 cents
    # sharp of a minor third, 1+3 about 30 cents of a fourth, 1+2+3 about 50 cents of a tritone
    # (common practice); the sharpness is 1200 log2 of the shortfall in length ratio.
    combos = [(), ("v1", "v2"), ("v1", "v3"), ("v1", "v2", "v3")]
    ins = _valved_cylinder(TRADE_VALVES, combos)
    f = [r[0] for r in pitch.find_resonances(ins, PROFILE, count=1, lossless=True).frequencies_hz]
    sharp = []
    for combo, fc in zip(combos[1:], f[1:]):
        semitones = [TRADE_VALVES[v] for v in combo]
        added = sum(CYLINDER_LENGTH * (2 ** (n / 12) - 1) for n in semitones)
        expected, tolerance = _interval_cents(added)
        outside.check(cents(f[0], fc), expected, abs=tolerance, unit="cent",
                      quantity=f"lowering by valves {'+'.join(v[1] for v in combo)} together on a cylinder",
                      source="1200 log2 of the length ratio, end correction 0.6133 r (Levine & Schwinger "
                             "1948); combinations run sharp: common practice")
        sharp.append(100 * sum(semitones) - cents(f[0], fc))
    # about 10, 30 and 50 cents sharp (common practice; from memory)
    assert 5 < sharp[0] < 15 and 20 < sharp[1] < 40 and 40 < sharp[2] < 60, sharp


def test_slide_positions_a_semitone_apart(outside):
    # A slide moved out by t adds 2 t of tubing (two legs; common practice): travels of
    # L (2^(k/12) - 1) / 2 put seven positions a semitone apart (common practice).
    travel = [CYLINDER_LENGTH * 1e3 * (2 ** (k / 12) - 1) / 2 for k in range(7)]
    slide = {"position_mm": 800.0, "positions_mm": travel, "max_travel_mm": 700.0}
    ins = _valved_cylinder((), [], slide=slide)
    f = np.array([r[0] for r in pitch.find_resonances(ins, PROFILE, count=1, lossless=True).frequencies_hz])
    steps = cents(f[:-1], f[1:])
    expected = [_interval_cents(2 * t * 1e-3)[0] for t in travel]
    tolerance = min(_interval_cents(2 * t * 1e-3)[1] for t in travel[1:])
    outside.check(cents(f[0], f), expected, abs=tolerance, unit="cent",
                  quantity="lowering at the seven slide positions of a cylinder",
                  source="1200 log2 of the length ratio, end correction 0.6133 r (Levine & Schwinger "
                         "1948); seven positions a semitone apart: common practice")
    np.testing.assert_allclose(steps, 100.0, atol=1.0)


def test_valved_notes_in_every_frequency_function():
    # the three ways to the playing frequencies agree for notes on several played paths
    ins = _valved_cylinder(("v2", "v1"), [(), ("v2",), ("v1",), ("v1", "v2")])
    profile = design_profile(ins)
    by_note = [n.frequency_hz for n in pitch.note_frequencies(ins, profile)]
    by_state = pitch.state_frequencies([ins, ins], [profile, profile])
    by_search = [r[0] for r in pitch.find_resonances(ins, profile, count=1).frequencies_hz]
    np.testing.assert_allclose(by_state[0], by_note, rtol=1e-9)
    np.testing.assert_allclose(by_state[1], by_note, rtol=1e-9)
    np.testing.assert_allclose(by_search, by_note, rtol=1e-6)
    assert by_note[0] > by_note[1] > by_note[2] > by_note[3]


def test_a_note_through_a_loop_plays_in_the_loops_own_air():
    # Played steadily, a loop taken by a third of the notes is cooler than the bore at its valve:
    # the notes through it sound lower than with the loop holding the bore's state there, the
    # open note not at all; inside the loop the path reads the loop's own air.
    from drift.bore_state import PathProfile
    from drift.segments import played_path

    ins = _valved_cylinder(("v2", "v1"), [(), ("v2",), ("v1",)])
    profile = thermal.instrument_steady_state(ins, Room(293.15)).profile
    loops = dict(profile.loops)
    assert set(loops) == {"v2", "v1"}
    at_valve = profile.air_at([ins.valves[1].position_m]).temperature[0]
    assert np.max(loops["v1"].temperature_k) < at_valve
    with_loops = pitch.state_frequencies([ins], [profile])[0]
    as_bore = pitch.state_frequencies([ins], [dataclasses.replace(profile, loops=())])[0]
    assert with_loops[0] == as_bore[0]
    assert np.all(with_loops[1:] < as_bore[1:] - 0.01 * as_bore[1:] / 1200)   # > 0.01 cent lower
    path = played_path(ins, ins.notes[2])
    ((start, length, name),) = path.inserts
    assert name == "v1"
    along = np.linspace(0.01, 0.99, 7) * length
    seen = PathProfile(profile, path).air_at(start + along).temperature
    np.testing.assert_array_equal(seen, loops["v1"].air_at(along).temperature)
