"""The thermal state of the played bore (drift.thermal), against published equations and limits."""

import math

import numpy as np
import pytest

from drift import air, bore, thermal
from drift.errors import DriftError, InputFileError, OutOfRangeError

ROOM = air.Room(293.15, 101325.0, 0.5)
BRASS = thermal.material("yellow_brass")
WOOD = thermal.material("tropical_hardwood")


def tube(material, length=0.66, diameter=0.015, thickness=None, flow_fraction=None, segment=0.02):
    """A plain cylindrical bore of ``material``."""
    return thermal.wall_from_stations([[0.0, diameter], [length, diameter]],
                                      material.wall_thickness if thickness is None else thickness,
                                      material, segment, flow_fraction)


REED = thermal.Blowing(0.10e-3)


# --------------------------------------------------------------------------------------------
# Materials
# --------------------------------------------------------------------------------------------


def test_materials_table_complete_with_sources():
    table = thermal.materials()
    for name in ("yellow_brass", "nickel_silver", "sterling_silver", "tropical_hardwood", "ebonite", "abs"):
        m = table[name]
        assert m.sources.strip(), name
        assert 0 < m.emissivity <= 1
        assert m.wall_thickness > 0


@pytest.mark.parametrize("name, low, high", [
    # Density [kg/m3] ranges of the alloy families: ASM Handbook Vol. 2 (1990) data sheets and
    # Incropera et al. (2007) Table A.1/A.3 (from memory).
    ("yellow_brass", 8400, 8550),
    ("nickel_silver", 8600, 8800),
    ("sterling_silver", 10200, 10400),
    ("ebonite", 1100, 1250),
])
def test_material_densities_within_handbook_ranges(name, low, high):
    assert low <= thermal.material(name).density <= high


def test_brass_expansion_over_10_k_against_handbook():
    # ASM Handbook Vol. 2 (1990): cartridge/yellow brasses C26000-C27000 expand 19.9e-6 to
    # 20.3e-6 /K (20-300 °C; from memory). A 1 m brass tube heated by 10 K lengthens by
    # 199-203 µm; the bore layer's expansion law applies the table's coefficient.
    factor = bore.expansion_factors(303.15, BRASS.expansion_per_k, 293.15)
    growth_um = (factor - 1.0) * 1.0 * 1e6
    assert 199.0 - 0.5 <= growth_um <= 203.0 + 0.5


def test_wood_moves_less_along_the_grain_than_across():
    # Wood Handbook FPL-GTR-190 (2010), Ch. 4: along the grain 3.1e-6 to 4.5e-6 /K, across it
    # roughly ten times more (from memory).
    assert 3.1e-6 <= WOOD.expansion_per_k <= 4.5e-6
    assert WOOD.expansion_across_per_k > 5 * WOOD.expansion_per_k
    assert WOOD.conductivity_across < WOOD.conductivity


def test_unknown_material_names_the_allowed_ones():
    with pytest.raises(InputFileError, match="yellow_brass"):
        thermal.material("unobtainium")
    assert thermal.material("Yellow Brass") is BRASS


@pytest.mark.parametrize("table, needle", [
    ({"expansion_per_k": 1e-5, "density_kg_m3": -1.0, "specific_heat_j_kg_k": 1, "conductivity_w_m_k": 1,
      "emissivity": 0.5, "wall_mm": 1}, "density_kg_m3"),
    ({"expansion_per_k": 1e-5, "density_kg_m3": 1.0, "specific_heat_j_kg_k": 1, "conductivity_w_m_k": 1,
      "emissivity": 1.5, "wall_mm": 1}, "emissivity"),
    ({"expansion_per_k": 1e-5, "density_kg_m3": 1.0, "specific_heat_j_kg_k": 1, "conductivity_w_m_k": 1,
      "emissivity": 0.5, "wall_mm": 1, "colour": "red"}, "colour"),
    ({"expansion_per_k": 1e-5}, "missing"),
])
def test_bad_material_entries_are_named(table, needle):
    with pytest.raises(InputFileError, match=needle):
        thermal._material_from_table("x", table)


# --------------------------------------------------------------------------------------------
# Correlations and constants
# --------------------------------------------------------------------------------------------


def test_latent_heat_against_iapws95():
    # IAPWS-95 (Wagner & Pruss 2002) through CoolProp's water, an independent implementation.
    import CoolProp.CoolProp as CP

    for t in (283.15, 293.15, 308.15):
        ref = CP.PropsSI("H", "T", t, "Q", 1, "Water") - CP.PropsSI("H", "T", t, "Q", 0, "Water")
        assert float(thermal.latent_heat_condensation(t)) == pytest.approx(ref, rel=5e-4)
    # Below 0 °C the vapour deposits as ice: sublimation heat about 2.834 MJ/kg at 0 °C
    # (IAPWS R14-08; from memory).
    assert float(thermal.latent_heat_condensation(273.0)) == pytest.approx(2.834e6, rel=2e-3)


def test_hausen_tends_to_the_fully_developed_value():
    # Fully developed laminar flow, uniform wall temperature: Nu_D = 3.66 (Incropera et al. 2007,
    # Eq. 8.55); the entry region transfers more.
    assert float(thermal.nusselt_hausen_1943(0.0)) == pytest.approx(3.66, abs=1e-12)
    values = thermal.nusselt_hausen_1943(np.array([1.0, 10.0, 100.0, 1000.0]))
    assert np.all(np.diff(values) > 0)


@pytest.mark.parametrize("re", [1e4, 3e4, 1e5])
def test_gnielinski_close_to_dittus_boelter(re):
    # Dittus-Boelter, Nu = 0.023 Re^0.8 Pr^0.4 (Incropera et al. 2007, Eq. 8.60), an independent
    # correlation good to about 25 %; the two agree much closer for air at these Re.
    db = 0.023 * re**0.8 * 0.71**0.4
    assert float(thermal.nusselt_gnielinski_1976(re, 0.71)) == pytest.approx(db, rel=0.15)


@pytest.mark.parametrize("ra, c, n", [(1e3, 0.850, 0.188), (1e5, 0.480, 0.250), (1e6, 0.480, 0.250)])
def test_churchill_chu_close_to_morgan(ra, c, n):
    # Morgan (1975) power laws for horizontal cylinders, Nu = C Ra^n (Incropera et al. 2007,
    # Table 9.1: Ra 1e2-1e4: C = 0.850, n = 0.188; 1e4-1e7: 0.480, 0.250). Two independent fits
    # of scattered data: they differ by 16 % at Ra = 1e3 and 9 % at 1e5 (measured), hence 20 %.
    assert float(thermal.nusselt_churchill_chu_1975(ra, 0.71)) == pytest.approx(c * ra**n, rel=0.20)
    # Still air: conduction limit 0.60^2 = 0.36.
    assert float(thermal.nusselt_churchill_chu_1975(0.0, 0.71)) == pytest.approx(0.36)


@pytest.mark.parametrize("re, c, m", [(100.0, 0.683, 0.466), (1000.0, 0.683, 0.466), (1e4, 0.193, 0.618)])
def test_churchill_bernstein_close_to_hilpert(re, c, m):
    # Hilpert's cross-flow power laws, Nu = C Re^m Pr^(1/3) (Incropera et al. 2007, Table 7.2:
    # Re 40-4000: 0.683, 0.466; 4000-40000: 0.193, 0.618).
    ref = c * re**m * 0.71 ** (1 / 3)
    assert float(thermal.nusselt_churchill_bernstein_1977(re, 0.71)) == pytest.approx(ref, rel=0.12)


def test_radiative_coefficient_reproduces_stefan_boltzmann():
    # q = eps sigma (Ts^4 - Tr^4) (Incropera et al. 2007, Eq. 1.7); sigma = 5.670374419e-8 (CODATA 2018).
    ts, tr, eps = 310.0, 293.15, 0.9
    q = float(thermal.radiative_coefficient(ts, tr, eps)) * (ts - tr)
    assert q == pytest.approx(eps * 5.670374419e-8 * (ts**4 - tr**4), rel=1e-12)


# --------------------------------------------------------------------------------------------
# Limits
# --------------------------------------------------------------------------------------------


def test_not_playing_leaves_room_temperature_and_room_air():
    wall = tube(WOOD)
    states = thermal.timeline(wall, ROOM, thermal.parse_plan("rest:10"), [0, 300, 600], REED)
    for s in states:
        assert s.phase == "rest"
        np.testing.assert_allclose(s.profile.temperature_k, ROOM.temperature_k, atol=1e-9)
        np.testing.assert_allclose(s.profile.wall_temperature_k, ROOM.temperature_k, atol=1e-9)
        np.testing.assert_array_equal(s.profile.breath_fraction, 0.0)
    steady = thermal.steady_state(wall, ROOM, thermal.Blowing(0.0))
    np.testing.assert_allclose(steady.profile.temperature_k, ROOM.temperature_k, atol=1e-9)
    assert steady.breath_heat_w == 0.0


def test_not_playing_bore_profile_is_uniform_room_air(tmp_path):
    instrument = bore.load_instrument(_write_instrument(tmp_path))
    profile = thermal.bore_profile(instrument, ROOM, playing=False)
    np.testing.assert_array_equal(profile.temperature_k, ROOM.temperature_k)
    np.testing.assert_array_equal(profile.breath_fraction, 0.0)


def test_very_large_flow_keeps_breath_temperature_along_the_bore():
    # Energy balance of the air: with mdot cp much larger than the wall's losses the breath
    # cannot cool, and the steady wall approaches it too.
    steady = thermal.steady_state(tube(BRASS), ROOM, thermal.Blowing(10e-3))
    t_breath = air.DEFAULT_BREATH.temperature_k
    np.testing.assert_allclose(steady.profile.temperature_k, t_breath, atol=0.2)
    np.testing.assert_allclose(steady.profile.wall_temperature_k, t_breath, atol=0.5)
    np.testing.assert_array_equal(steady.profile.breath_fraction, 1.0)


def test_hot_room_warms_the_breath_without_condensation():
    hot = air.Room(313.15, 101325.0, 0.3)
    steady = thermal.steady_state(tube(BRASS), hot, REED)
    assert np.all(steady.profile.temperature_k > air.DEFAULT_BREATH.temperature_k - 1e-9)
    assert np.all(steady.profile.temperature_k < hot.temperature_k)
    assert steady.condensation_kg_s == 0.0


# --------------------------------------------------------------------------------------------
# Energy balance
# --------------------------------------------------------------------------------------------


@pytest.mark.parametrize("material", [BRASS, WOOD])
def test_energy_balance_closes_over_a_plan(material):
    # First law for the wall: heat given up by the breath = heat stored + heat lost to the room.
    wall = tube(material, flow_fraction=lambda x: np.where(x < 0.4, 1.0, 0.5))
    times = np.arange(0.0, 25.01, 0.5) * 60.0
    states = thermal.timeline(wall, ROOM, thermal.parse_plan("play:10,rest:5,play:10"), times, REED)
    for s in states[1:]:
        assert s.breath_heat_j == pytest.approx(s.stored_j + s.room_loss_j, rel=0.01)
    # The running totals against the trapezoid rule over the sampled heat flows (half-minute
    # samples of a smooth curve; the jumps at phase boundaries are sampled on both sides).
    play = [s for s in states if s.time_s <= 600.0]
    q_in = np.trapezoid([s.breath_heat_w for s in play], [s.time_s for s in play])
    assert play[-1].breath_heat_j == pytest.approx(q_in, rel=0.01)


@pytest.mark.parametrize("material", [BRASS, WOOD])
def test_breath_heat_against_humid_air_enthalpy(material):
    # The breath's heat from an independent humid-air model: CoolProp HAPropsSI (Hyland & Wexler
    # 1983 as in ASHRAE RP-1485), inlet saturated at 35 °C, outlet at the model's exit
    # temperature capped at saturation, condensate leaving as liquid at the exit temperature:
    # Q = mdot_da [h_in - h_out - (W_in - W_out) h_liquid]. CO2-rich breath is treated as air
    # (cp of its dry part differs by about 1 %, on the sensible fifth of the heat).
    import CoolProp.CoolProp as CP

    steady = thermal.steady_state(tube(material), ROOM, REED)
    p, t_in, t_out = ROOM.pressure_pa, air.DEFAULT_BREATH.temperature_k, float(steady.outlet_k[-1])
    w_in = CP.HAPropsSI("W", "T", t_in, "P", p, "R", 1.0)
    h_in = CP.HAPropsSI("H", "T", t_in, "P", p, "R", 1.0)
    mdot_da = REED.flow_m3_s / CP.HAPropsSI("Vha", "T", t_in, "P", p, "R", 1.0) / (1.0 + w_in)
    w_out = min(w_in, CP.HAPropsSI("W", "T", t_out, "P", p, "R", 1.0))
    h_out = CP.HAPropsSI("H", "T", t_out, "P", p, "W", w_out)
    h_liquid = CP.PropsSI("H", "T", t_out, "Q", 0, "Water") - CP.PropsSI("H", "T", 273.16, "Q", 0, "Water")
    q = mdot_da * (h_in - h_out - (w_in - w_out) * h_liquid)
    assert steady.breath_heat_w == pytest.approx(q, rel=0.01)
    # Steady: everything the breath gives up leaves through the outer surface.
    assert steady.room_loss_w == pytest.approx(steady.breath_heat_w, rel=1e-6)


# --------------------------------------------------------------------------------------------
# Time behaviour
# --------------------------------------------------------------------------------------------


def test_warm_up_is_monotone_and_a_rest_cools():
    wall = tube(WOOD)
    times = np.arange(0.0, 30.01, 1.0) * 60.0
    states = thermal.timeline(wall, ROOM, thermal.parse_plan("play:20,rest:10"), times, REED)
    play = np.array([s.wall_k for s in states if s.phase == "play"])
    rest = [s for s in states if s.phase == "rest"]
    # A cooperative heat-flow system started below its steady state rises monotonically.
    assert np.all(np.diff(play, axis=0) >= -1e-9)
    stored = [s.stored_j for s in rest]
    assert np.all(np.diff(stored) < 0)
    mean_air = [float(np.mean(s.profile.temperature_k)) for s in rest]
    assert np.all(np.diff(mean_air) < 0)
    assert rest[-1].profile.breath_fraction.max() < 1e-6  # 10 min = 20 exchange times


def test_steady_state_is_the_long_time_limit():
    wall = tube(WOOD, flow_fraction=lambda x: np.where(x < 0.3, 1.0, 0.6))
    steady = thermal.steady_state(wall, ROOM, REED)
    late = thermal.timeline(wall, ROOM, thermal.parse_plan("play:600"), [600 * 60.0], REED)[0]
    np.testing.assert_allclose(late.wall_k, steady.wall_k, atol=0.01)
    np.testing.assert_allclose(late.profile.temperature_k, steady.profile.temperature_k, atol=0.01)


def _time_to_63_percent(wall, blowing=REED):
    steady = thermal.steady_state(wall, ROOM, blowing)
    times = np.linspace(0.0, 120.0 * 60.0, 721)
    stored = np.array([s.stored_j for s in thermal.timeline(wall, ROOM, thermal.parse_plan("play:120"), times,
                                                              blowing)])
    return float(np.interp(1.0 - math.exp(-1.0), stored / steady.stored_j, times))


def test_time_constant_grows_with_wall_heat_capacity():
    thin = _time_to_63_percent(tube(BRASS, thickness=0.0005))
    thick = _time_to_63_percent(tube(BRASS, thickness=0.0010))
    wood = _time_to_63_percent(tube(WOOD))
    assert thin < thick < wood
    # Metal warms several times faster than a thick wooden body (common practice).
    assert wood > 3 * thin


def test_lumped_cooling_against_the_exponential_law():
    # Lumped capacitance (Incropera et al. 2007, Eq. 5.6): theta/theta_i = exp(-h A t / (rho V c)).
    # One thin brass segment 0.2 K above the room, resting; h from the published correlations
    # (Churchill & Chu 1975, Churchill & Bernstein 1977, mixed with n = 4) plus radiation,
    # evaluated here from CoolProp air at the room state.
    length, d, w = 0.1, 0.015, 0.0005
    wall = thermal.Wall(np.array([length / 2]), np.array([length]), np.array([d / 2]), np.array([w]), BRASS,
                        np.array([1.0]))
    blowing = thermal.Blowing(0.1e-3, air_speed_m_s=0.1)
    start = dict(vars(thermal.timeline(wall, ROOM, thermal.parse_plan("rest:1"), [0.0], blowing)[0]))
    start["wall_k"] = np.array([[ROOM.temperature_k + 0.2]])
    initial = thermal.ThermalState(**start)
    tau_times = np.array([0.0, 600.0, 1200.0])
    states = thermal.timeline(wall, ROOM, thermal.parse_plan("rest:20"), tau_times, blowing, initial=initial)
    theta = np.array([s.wall_k[0, 0] - ROOM.temperature_k for s in states])

    x = air.room_air(ROOM.temperature_k, ROOM.pressure_pa, ROOM.relative_humidity)
    g = air.gas_properties(ROOM.temperature_k, ROOM.pressure_pa, x)
    nu, alpha, k, pr = g.viscosity / g.density, g.conductivity / (g.density * g.cp), g.conductivity, g.prandtl
    D = d + 2 * w
    ts = ROOM.temperature_k + 0.1  # mean excess over the decay, for the weak Ra^(1/6) dependence
    ra = 9.80665 * (2 / (ts + ROOM.temperature_k)) * 0.1 * D**3 / (nu * alpha)
    nu_n = (0.60 + 0.387 * ra ** (1 / 6) / (1 + (0.559 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
    re = 0.1 * D / nu
    nu_f = 0.3 + 0.62 * re**0.5 * pr ** (1 / 3) / (1 + (0.4 / pr) ** (2 / 3)) ** 0.25 * (1 + (re / 282000) ** 0.625) ** 0.8
    h = k / D * (nu_f**4 + nu_n**4) ** 0.25 + 4 * BRASS.emissivity * 5.670374419e-8 * ROOM.temperature_k**3
    capacity = BRASS.density * BRASS.specific_heat * math.pi * ((d / 2 + w) ** 2 - (d / 2) ** 2) * length
    tau = capacity / (h * math.pi * D * length)
    np.testing.assert_allclose(theta[1:] / theta[0], np.exp(-tau_times[1:] / tau), rtol=0.01)


def test_breath_gives_way_to_room_air_at_rest():
    wall = tube(BRASS)
    tau = REED.exchange_time_s
    states = thermal.timeline(wall, ROOM, thermal.parse_plan("play:2,rest:5"), [120.0, 120.0 + tau, 420.0], REED)
    assert states[0].phase == "play" and np.all(states[0].profile.breath_fraction == 1.0)
    np.testing.assert_allclose(states[1].profile.breath_fraction, math.exp(-1.0), rtol=1e-12)
    assert states[2].profile.breath_fraction.max() < 1e-4
    # At rest the air sits at the inner wall temperature (no flow to keep it apart).
    np.testing.assert_allclose(states[1].profile.temperature_k, states[1].wall_k[:, 0])


# --------------------------------------------------------------------------------------------
# Condensation
# --------------------------------------------------------------------------------------------


def test_condensation_starts_at_the_dew_point_of_the_air_layer():
    # A jet-like inlet (half breath, half room air) enters below saturation; water condenses
    # exactly where the air, cooling along the bore, passes the dew point of its own water
    # content, found here from the air layer's saturation fraction by root finding.
    from scipy.optimize import brentq

    blowing = thermal.Blowing(0.05e-3, inlet_breath_fraction=0.5)
    steady = thermal.steady_state(tube(BRASS, length=1.5), ROOM, blowing)
    p = ROOM.pressure_pa
    t_in = 0.5 * (air.DEFAULT_BREATH.temperature_k + ROOM.temperature_k)
    room_x = air.room_air(ROOM.temperature_k, p, ROOM.relative_humidity)
    x_in, condensed = air.mix(room_x, air.breath_air(p), 0.5, t_in, p)
    assert not condensed
    dew = brentq(lambda t: float(air.saturation_water_fraction(t, p)) - x_in[4], 270.0, t_in)
    outlet = steady.outlet_k
    assert outlet.min() < dew - 0.5 < dew + 0.5 < outlet.max()  # the case crosses the dew point
    clear = np.abs(outlet - dew) > 0.01
    np.testing.assert_array_equal(steady.condensing[clear], outlet[clear] < dew)


def test_saturated_breath_condenses_from_the_first_segment_and_heats_the_wall():
    steady = thermal.steady_state(tube(BRASS), ROOM, REED)
    assert steady.condensing[0]
    assert steady.latent_w > 0.5 * steady.breath_heat_w  # most of the heat is the vapour's
    # The bore air the acoustics layer receives is capped at saturation by the air layer.
    state = steady.profile.air_at(steady.profile.positions_m)
    assert np.all(state.condensed)
    np.testing.assert_allclose(state.relative_humidity, 1.0, rtol=1e-9)


# --------------------------------------------------------------------------------------------
# Magnitudes (practitioners' reports, from memory)
# --------------------------------------------------------------------------------------------


def test_warm_up_magnitudes_in_a_20_c_room():
    # After several minutes of playing in a room near 20 °C the air near the mouthpiece is
    # roughly 8-12 K above the room and much less at the far end (players' reports, from memory).
    wall = tube(WOOD, flow_fraction=lambda x: thermal.flow_fraction_from_exits(x, np.linspace(0.25, 0.66, 19)))
    state = thermal.timeline(wall, ROOM, thermal.parse_plan("play:5"), [300.0], REED)[0]
    excess = state.profile.temperature_k - ROOM.temperature_k
    near = excess[state.profile.positions_m < 0.1].mean()
    far = excess[-1]
    assert 8.0 <= near <= 15.0
    assert far < 0.3 * near


# --------------------------------------------------------------------------------------------
# Plans, bad input, instruments
# --------------------------------------------------------------------------------------------


def test_parse_plan():
    plan = thermal.parse_plan("play:10, rest:2.5,PLAY:5")
    assert [(p.state, p.duration_s) for p in plan] == [("play", 600.0), ("rest", 150.0), ("play", 300.0)]
    assert thermal.plan_duration_s(plan) == 1050.0


@pytest.mark.parametrize("text, needle", [
    ("play10", "play:MINUTES"), ("sing:3", "play:MINUTES"), ("play:x", "not a number"),
    ("play:0", "allowed range"), ("rest:-1", "allowed range"), ("play:1000", "allowed range"),
    ("play:nan", "allowed range"),
])
def test_bad_plans_are_explained(text, needle):
    with pytest.raises(DriftError, match=needle):
        thermal.parse_plan(text)


@pytest.mark.parametrize("kwargs, needle", [
    ({"flow_m3_s": -1e-4}, "breath flow"), ({"flow_m3_s": 1.0}, "breath flow"),
    ({"flow_m3_s": 1e-4, "inlet_breath_fraction": 2.0}, "inlet breath"),
    ({"flow_m3_s": 1e-4, "exchange_time_s": 0.0}, "exchange"),
    ({"flow_m3_s": 1e-4, "air_speed_m_s": -1.0}, "air speed"),
    ({"flow_m3_s": float("nan")}, "breath flow"),
])
def test_bad_blowing_is_refused(kwargs, needle):
    with pytest.raises(OutOfRangeError, match=needle):
        thermal.Blowing(**kwargs)


def test_bad_walls_and_times_are_refused():
    with pytest.raises(OutOfRangeError, match="flow fraction"):
        tube(BRASS, flow_fraction=lambda x: np.where(x < 0.3, 0.5, 1.0))
    with pytest.raises(OutOfRangeError, match="positive"):
        thermal.wall_from_stations([[0.0, 0.015], [0.5, 0.015]], 0.0, BRASS)
    with pytest.raises(OutOfRangeError, match="within the plan"):
        thermal.timeline(tube(BRASS), ROOM, thermal.parse_plan("play:1"), [120.0], REED)
    with pytest.raises(OutOfRangeError, match="within the plan"):
        thermal.timeline(tube(BRASS), ROOM, thermal.parse_plan("play:1"), [float("nan")], REED)


def test_settle_time():
    t = np.arange(6.0)
    values = np.array([[5.0, 1.0], [3.0, 0.5], [1.0, 3.0], [1.5, 0.2], [0.1, 0.1], [0.0, 0.0]])
    assert thermal.settle_time(t, values, [0.0, 0.0], 2.0) == 3.0
    assert thermal.settle_time(t, values, [0.0, 0.0], 10.0) == 0.0
    late_jump = values + np.array([[0.0, 0.0]] * 5 + [[5.0, 0.0]])
    assert thermal.settle_time(t, late_jump, [0.0, 0.0], 2.0) is None


def _write_instrument(tmp_path, excitation="reed", extra=""):
    text = f"""
name = "test pipe"
excitation = "{excitation}"
material = "tropical_hardwood"
{extra}
[bore]
stations_mm = [[0.0, 15.0], [600.0, 15.0]]
[[hole]]
name = "register"
position_mm = 150.0
diameter_mm = 3.0
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 9.0
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 9.0
[[note]]
name = "D3"
closed = ["register", "h1", "h2"]
[[note]]
name = "E3"
closed = ["register", "h2"]
[[note]]
name = "F#3"
closed = ["register"]
[[note]]
name = "A4"
closed = ["h1", "h2"]
register = 2
"""
    path = tmp_path / "pipe.toml"
    path.write_text(text)
    return path


def test_flow_leaves_at_the_first_large_open_hole(tmp_path):
    instrument = bore.load_instrument(_write_instrument(tmp_path))
    # D3: all closed -> open end; E3: h1 open; F#3: h2 open; A4: register hole open (too small to
    # take the flow) -> open end.
    np.testing.assert_allclose(thermal.flow_exits(instrument), [0.6, 0.45, 0.40, 0.6])
    wall = thermal.instrument_wall(instrument)
    w = wall.flow_fraction
    assert w[0] == 1.0 and w[-1] == 0.5
    assert wall.material is WOOD
    assert wall.thickness_m[0] == pytest.approx(WOOD.wall_thickness)


def test_instrument_profiles_warm_with_minutes_played(tmp_path):
    instrument = bore.load_instrument(_write_instrument(tmp_path))
    cold = thermal.bore_profile(instrument, ROOM, minutes_played=0.0)
    five = thermal.bore_profile(instrument, ROOM, minutes_played=5.0)
    steady = thermal.bore_profile(instrument, ROOM)
    assert np.all(five.wall_temperature_k >= cold.wall_temperature_k)
    assert np.all(steady.wall_temperature_k >= five.wall_temperature_k - 1e-9)
    np.testing.assert_allclose(cold.wall_temperature_k, ROOM.temperature_k)
    assert np.all(cold.breath_fraction == 1.0)  # the bore fills with breath at the first note
    with pytest.raises(OutOfRangeError, match="minutes played"):
        thermal.bore_profile(instrument, ROOM, minutes_played=-1.0)


def test_settle_from_cold_brackets_the_band(tmp_path):
    from drift import pitch

    instrument = bore.load_instrument(_write_instrument(tmp_path))
    steady = thermal.bore_profile(instrument, ROOM)
    steady_hz = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, steady)])
    t = thermal.settle_from_cold(instrument, ROOM, steady_hz, 2.0)
    assert t is not None and t > 60.0

    def worst(seconds):
        profile = thermal.bore_profile(instrument, ROOM, minutes_played=seconds / 60.0)
        f = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, profile)])
        return np.max(np.abs(1200 * np.log2(f / steady_hz)))

    assert worst(t - 30.0) > 2.0 > worst(t + 30.0)
    assert thermal.settle_from_cold(instrument, ROOM, steady_hz, 100.0) == 0.0


def test_correlations_are_vectorised_and_propagate_nan():
    values = np.array([[0.0, 10.0], [100.0, np.nan]])
    for function, args in [(thermal.nusselt_hausen_1943, (values,)),
                           (thermal.nusselt_churchill_chu_1975, (values, 0.71)),
                           (thermal.nusselt_churchill_bernstein_1977, (values, 0.71)),
                           (thermal.latent_heat_condensation, (values + 280.0,))]:
        out = function(*args)
        assert out.shape == values.shape
        assert np.isnan(out[1, 1]) and np.all(np.isfinite(out.ravel()[:3]))
    assert np.isnan(thermal.nusselt_gnielinski_1976(np.nan, 0.71))


def test_wall_refuses_nan_and_mismatched_arrays():
    good = dict(positions_m=np.array([0.01, 0.03]), lengths_m=np.array([0.02, 0.02]),
                inner_radius_m=np.array([0.0075, 0.0075]), thickness_m=np.array([0.001, 0.001]),
                material=BRASS, flow_fraction=np.array([1.0, 1.0]))
    thermal.Wall(**good)
    with pytest.raises(OutOfRangeError, match="finite"):
        thermal.Wall(**{**good, "inner_radius_m": np.array([0.0075, np.nan])})
    with pytest.raises(OutOfRangeError, match="one value per segment"):
        thermal.Wall(**{**good, "thickness_m": np.array([0.001])})


def test_design_and_climate_profiles(tmp_path):
    from drift import climate

    played = bore.load_instrument(_write_instrument(tmp_path, extra="[design]\nplaying = true\ntemperature_c = 22.0"))
    design = thermal.design_profile(played)
    steady = thermal.instrument_steady_state(played, played.design.room()).profile
    np.testing.assert_allclose(design.temperature_k, steady.temperature_k)
    assert design.room.temperature_k == pytest.approx(295.15)
    resting = bore.load_instrument(_write_instrument(tmp_path))
    np.testing.assert_array_equal(thermal.design_profile(resting).temperature_k, 293.15)

    c = climate.parse_climate({"name": "c", "air": {"temperature_c": 20.0, "relative_humidity_pct": 50},
                               "player": {"minutes_played": 3}}, "c.toml")
    from_climate = thermal.climate_profile(resting, c)
    direct = thermal.bore_profile(resting, c.room, True, 3.0)
    np.testing.assert_allclose(from_climate.wall_temperature_k, direct.wall_temperature_k)
    assert np.all(from_climate.wall_temperature_k > 293.15)
