"""The bore cut into segments (drift.segments): acoustic segments, thermal expansion, wall segments
and the breath flow through them."""

import numpy as np
import pytest

from conftest import REGISTER_PIPE, first_resonances, make_instrument, write_file
from drift import instrument, materials, segments
from drift.errors import OutOfRangeError

BRASS = materials.material("yellow_brass")
WOOD = materials.material("tropical_hardwood")


def tube(material, length=0.66, diameter=0.015, flow_fraction=None):
    return segments.wall_from_stations([[0.0, diameter], [length, diameter]], material.wall_thickness,
                                       material, 0.02, flow_fraction)


def test_discretise_splits_at_holes_and_keeps_length(two_hole_pipe):
    ins = instrument.load_instrument(two_hole_pipe)
    seg = segments.discretise(ins, 0.02)
    assert np.all(seg.length_m <= 0.02 + 1e-12)
    assert seg.start_m[-1] + seg.length_m[-1] == pytest.approx(0.6)
    assert np.allclose(seg.start_m[seg.hole_segment], [0.45, 0.4])
    assert np.allclose(seg.radius_in_m[1:], seg.radius_out_m[:-1])
    assert seg.hole_bore_radius_m[0] == pytest.approx(float(ins.diameter_at(0.45)) / 2)
    with pytest.raises(ValueError, match="positive"):
        segments.discretise(ins, 0.0)


def test_expansion_scales_positions_and_diameters(two_hole_pipe):
    ins = instrument.load_instrument(two_hole_pipe)
    seg = segments.discretise(ins)
    alpha, dT = 20e-6, 30.0
    k = segments.expansion_factors(np.full(seg.n, 293.15 + dT), alpha)
    assert k[0] == pytest.approx(1 + alpha * dT)
    kh = segments.expansion_factors(np.full(2, 293.15 + dT), alpha)
    big = seg.expanded(k, k, kh)
    end = big.start_m[-1] + big.length_m[-1]
    assert end == pytest.approx(0.6 * (1 + alpha * dT), rel=1e-12)
    assert np.allclose(big.hole_position_m, seg.hole_position_m * (1 + alpha * dT))
    assert np.allclose(big.hole_radius_m, seg.hole_radius_m * (1 + alpha * dT))
    assert np.allclose(big.radius_in_m, seg.radius_in_m * (1 + alpha * dT))


def test_expanded_segments_use_the_grain_of_the_wall(outside, tmp_path):
    # Linear expansion L = L_ref (1 + alpha dT) (common practice): a wooden bore 20 K above its
    # reference temperature lengthens with the along-grain coefficient and widens with the
    # across-grain one, each from the materials table.
    ins = instrument.load_instrument(write_file(tmp_path, REGISTER_PIPE.format(excitation="reed", extra=""),
                                                "pipe.toml"))
    plain = segments.discretise(ins)
    dT = 20.0
    hot = segments.expanded_segments(ins, lambda x: np.full(np.shape(x), ins.reference_temperature_k + dT))
    end = hot.start_m[-1] + hot.length_m[-1]
    law = "linear thermal expansion L = L_ref (1 + alpha dT) (common practice), alpha from the materials table"
    outside.check(end, 0.6 * (1 + WOOD.expansion_per_k * dT), quantity="length of a 600 mm wooden bore 20 K above "
                  "its reference temperature (along the grain)", source=law, rel=1e-12, unit="m")
    outside.check(hot.radius_in_m, plain.radius_in_m * (1 + WOOD.expansion_across_per_k * dT),
                  quantity="bore radii of a wooden bore 20 K above its reference temperature (across the grain)",
                  source=law, rel=1e-7, unit="m")
    outside.check(hot.hole_radius_m, plain.hole_radius_m * (1 + WOOD.expansion_across_per_k * dT),
                  quantity="hole radii of a wooden bore 20 K above its reference temperature (across the grain)",
                  source=law, rel=1e-7, unit="m")
    # at the reference temperature, or without a wall temperature, nothing moves
    same = segments.expanded_segments(ins, lambda x: np.full(np.shape(x), ins.reference_temperature_k))
    np.testing.assert_allclose(same.start_m, plain.start_m)
    np.testing.assert_allclose(segments.expanded_segments(ins, None).radius_in_m, plain.radius_in_m)
    # a file without a material is not expanded
    bare = make_instrument([[0, 15], [600, 15]])
    assert bare.material is None
    cold = segments.expanded_segments(bare, lambda x: np.full(np.shape(x), 250.0))
    np.testing.assert_array_equal(cold.length_m, segments.discretise(bare).length_m)


def test_lip_mouthpiece_throat_and_backbore_precede_the_bore():
    lips = make_instrument([[0, 12], [1000, 12], [1200, 60]], excitation="lips")
    seg = segments.discretise(lips)
    assert seg.start_m[0] == pytest.approx(-(instrument.DEFAULT_THROAT_LENGTH + instrument.DEFAULT_BACKBORE_LENGTH))
    assert seg.radius_in_m[0] == pytest.approx(instrument.DEFAULT_THROAT_DIAMETER / 2)
    # the backbore widens from the throat to the bore's first diameter at position 0
    first_bore = int(np.argmin(np.abs(seg.start_m)))
    assert seg.start_m[first_bore] == pytest.approx(0.0, abs=1e-12)
    assert seg.radius_out_m[first_bore - 1] == pytest.approx(0.006)


def test_pieces_shorter_than_a_nanometre_are_merged():
    # Found by tests/test_properties.py: a station, hole or backbore 1e-300 mm long made a cone
    # whose transfer matrix divided by zero (a numpy warning, an error in this suite).
    pipe = make_instrument([[0, 10], [1e-300, 12], [300, 14], [300 + 1e-13, 10], [600, 12]],
                           holes=[{"name": "h", "position_mm": 3e-300, "diameter_mm": 2.0}])
    lips = make_instrument([[0, 1], [50, 1]], excitation="lips", input={"backbore_length_mm": 1e-300})
    for ins in (pipe, lips):
        seg = segments.discretise(ins)
        assert seg.length_m.min() > segments.MIN_CUT_M
        assert len(first_resonances(ins, count=2)) == 2


def test_jet_cavity_segments_end_at_the_embouchure():
    flute = make_instrument([[0, 19], [620, 19]], excitation="jet",
                            input={"embouchure_position_mm": 17.0, "embouchure_diameter_mm": 10.0})
    seg = segments.discretise(flute)
    assert seg.n_cavity >= 1
    assert seg.start_m[seg.n_cavity] == pytest.approx(0.017)


def test_flow_fraction_from_exits():
    # w(x) = (number of exits beyond x) / (number of notes).
    x = np.array([0.1, 0.3, 0.5, 0.7])
    np.testing.assert_allclose(segments.flow_fraction_from_exits(x, [0.2, 0.6, 0.8, 0.8]), [1.0, 0.75, 0.75, 0.5])
    np.testing.assert_allclose(segments.flow_fraction_from_exits(x, []), 1.0)


def test_flow_leaves_at_the_first_large_open_hole(register_pipe):
    ins = instrument.load_instrument(register_pipe)
    # D3: all closed -> open end; E3: h1 open; F#3: h2 open; A4: register hole open (too small to
    # take the flow) -> open end.
    np.testing.assert_allclose(segments.flow_exits(ins), [0.6, 0.45, 0.40, 0.6])
    wall = segments.instrument_wall(ins)
    w = wall.flow_fraction
    assert w[0] == 1.0 and w[-1] == 0.5
    assert wall.material is WOOD
    assert wall.thickness_m[0] == pytest.approx(WOOD.wall_thickness)


def test_wall_segments_cover_the_bore_with_equal_volume_radii():
    # A cone from 10 to 12 mm over 0.1 m in one segment: the radius of equal volume is
    # sqrt((r1^2 + r1 r2 + r2^2) / 3) (volume of a frustum, pi h (r1^2 + r1 r2 + r2^2) / 3). The
    # wall model integrates d^2 over 9 samples by the trapezoid rule, whose error here,
    # (b - a)^3 f'' / (12 n^2) relative to the integral, is 9e-5 on r^2: tolerance 1e-4 on r.
    wall = segments.wall_from_stations([[0.0, 0.010], [0.1, 0.012]], 0.001, BRASS, 0.1)
    r1, r2 = 0.005, 0.006
    assert wall.inner_radius_m[0] == pytest.approx(np.sqrt((r1**2 + r1 * r2 + r2**2) / 3), rel=1e-4)
    long = tube(BRASS)
    np.testing.assert_allclose(long.edges_m[[0, -1]], [0.0, 0.66])
    assert np.all(long.lengths_m <= 0.02 + 1e-12)


def test_bad_walls_are_refused():
    with pytest.raises(OutOfRangeError, match="flow fraction"):
        tube(BRASS, flow_fraction=lambda x: np.where(x < 0.3, 0.5, 1.0))
    with pytest.raises(OutOfRangeError, match="positive"):
        segments.wall_from_stations([[0.0, 0.015], [0.5, 0.015]], 0.0, BRASS)
    with pytest.raises(OutOfRangeError, match="pairs"):
        segments.wall_from_stations([[0.0, 0.015]], 0.001, BRASS)
    with pytest.raises(OutOfRangeError, match="ascend"):
        segments.wall_from_stations([[0.5, 0.015], [0.0, 0.015]], 0.001, BRASS)


def test_wall_refuses_nan_and_mismatched_arrays():
    good = dict(positions_m=np.array([0.01, 0.03]), lengths_m=np.array([0.02, 0.02]),
                inner_radius_m=np.array([0.0075, 0.0075]), thickness_m=np.array([0.001, 0.001]),
                material=BRASS, flow_fraction=np.array([1.0, 1.0]))
    segments.Wall(**good)
    with pytest.raises(OutOfRangeError, match="finite"):
        segments.Wall(**{**good, "inner_radius_m": np.array([0.0075, np.nan])})
    with pytest.raises(OutOfRangeError, match="one value per segment"):
        segments.Wall(**{**good, "thickness_m": np.array([0.001])})
