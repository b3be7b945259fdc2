"""Moist air, breath and their mixture (drift.air) against published equations, tables and an
independent humid-air model."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from drift import air
from drift.climate import Breath, Room
from drift.constants import ZERO_CELSIUS
from drift.errors import OutOfRangeError
from references import cramer_sound_speed, davis_water_fraction

# Molar masses [kg/mol] for the humidity ratio, IUPAC standard atomic weights (from memory).
MOLAR_MASS = np.array([28.0134e-3, 31.9988e-3, 39.948e-3, 44.0095e-3, 18.01528e-3])


CRAMER_GRID = [(t, rh, p) for t in (0, 5, 10, 15, 20, 25, 30) for rh in (0.0, 0.25, 0.5, 0.75, 1.0)
               for p in (75e3, 85e3, 95e3, 102e3)]


def test_sound_speed_against_cramer_1993(outside):
    """Cramer (1993) Eq. 15 over 0-30 °C, 0-100 % RH, 75-102 kPa: within its stated 300 ppm."""
    ours, reference = [], []
    for t_c, rh, p in CRAMER_GRID:
        T = t_c + ZERO_CELSIUS
        ours.append(float(air.air_state(T, p, T, rh, 420e-6).properties.sound_speed))
        x_w = davis_water_fraction(t_c, p, rh)
        reference.append(cramer_sound_speed(t_c, p, x_w, 420e-6 * (1 - x_w)))
    outside.check(ours, reference, quantity="speed of sound of moist air, 420 ppm CO2, 0-30 °C, 0-100 % RH, "
                  "75-102 kPa", source="Cramer (1993), Eq. 15; its stated accuracy 300 ppm", rel=300e-6, unit="m/s")


def test_water_fraction_against_davis_1992(outside):
    """x_w from IAPWS-95 p_sat against the CIPM-81/91 formula of Davis (1992), Eq. A1.4: 0.1 %."""
    grid = [(t_c, rh, p) for t_c, rh, p in CRAMER_GRID if rh > 0]
    ours = [float(air.water_fraction(t_c + ZERO_CELSIUS, p, rh)) for t_c, rh, p in grid]
    outside.check(ours, [davis_water_fraction(t_c, p, rh) for t_c, rh, p in grid],
                  quantity="water mole fraction of moist air, 0-30 °C, 25-100 % RH, 75-102 kPa",
                  source="Davis (1992), CIPM-81/91, Eq. A1.4 (enhancement factor and p_sat)", rel=1e-3)


# Saturation pressure of water over liquid [Pa], IAPWS-95 steam tables (Wagner & Pruss 2002,
# Table 13.1; values from memory) and the IAPWS-95 release check value at 275 K (Table 8).
IAPWS_SATURATION = [
    (273.16, 611.655),
    (275.0, 698.451),
    (293.15, 2339.2),
    (298.15, 3169.9),
    (313.15, 7384.9),
    (323.15, 12352.0),
    (333.15, 19946.0),
]


@pytest.mark.parametrize("temperature_k, expected_pa", IAPWS_SATURATION)
def test_saturation_pressure_over_water_against_iapws_tables(outside, temperature_k, expected_pa):
    outside.check(float(air.saturation_vapour_pressure(temperature_k)), expected_pa,
                  quantity="saturation vapour pressure over liquid water, 273.16-333.15 K",
                  source="IAPWS-95 tables, Wagner & Pruss (2002), Table 13.1, and Table 8 at 275 K (from memory)",
                  rel=1e-3, unit="Pa")


def test_sublimation_pressure_iapws_2011(outside):
    """Ice Ih: p = 611.657 Pa at the triple point (Wagner et al. 2011, Eq. 6 by construction) and the
    IAPWS R14-08 check value 8.947 352 740 189e-6 MPa at 230 K (from memory)."""
    outside.check(float(air.sublimation_pressure(273.16)), 611.657, quantity="sublimation pressure of ice at the "
                  "triple point", source="Wagner et al. (2011), Eq. 6", rel=1e-6, unit="Pa")
    outside.check(float(air.sublimation_pressure(230.0)), 8.947352740189, quantity="sublimation pressure of ice "
                  "at 230 K", source="IAPWS R14-08, check value (from memory)", rel=1e-6, unit="Pa")


@pytest.mark.parametrize("t_c", [-30.0, -20.0, -10.0, -2.0, 5.0, 20.0, 35.0, 50.0])
def test_saturation_fraction_against_coolprop_humid_air_model(outside, t_c):
    """Saturated water fraction against CoolProp's separate humid-air model (HAPropsSI 'psi_w',
    Hyland-Wexler-based, over ice below 0 °C): 0.2 %."""
    from CoolProp.HumidAirProp import HAPropsSI

    T = t_c + ZERO_CELSIUS
    expected = HAPropsSI("psi_w", "T", T, "P", 101325.0, "R", 1.0)
    outside.check(float(air.saturation_water_fraction(T, 101325.0)), expected,
                  quantity="saturated water mole fraction at 101.325 kPa, -30 to 50 °C",
                  source="CoolProp HAPropsSI 'psi_w' (Hyland-Wexler based; independent library)", rel=2e-3)


@pytest.mark.parametrize("t_c, rh, p", [(0, 0.3, 101325.0), (20, 0.5, 101325.0), (30, 0.9, 90e3),
                                        (45, 0.6, 101325.0), (-10, 0.8, 80e3)])
def test_density_and_humidity_ratio_against_coolprop_humid_air_model(outside, t_c, rh, p):
    """Density and humidity ratio against HAPropsSI ('Vha', 'W'): 0.2 %. HAPropsSI treats dry air as
    one pseudo-pure fluid (Lemmon et al. 2000) with no separate CO2, so CO2 is set to 0 here."""
    from CoolProp.HumidAirProp import HAPropsSI

    T = t_c + ZERO_CELSIUS
    state = air.air_state(T, p, T, rh, 0.0)
    x = state.mole_fractions
    ratio = x[4] * MOLAR_MASS[4] / float(np.dot(x[:4], MOLAR_MASS[:4]))
    outside.check(ratio, HAPropsSI("W", "T", T, "P", p, "R", rh), quantity="humidity ratio of moist air",
                  source="CoolProp HAPropsSI 'W' (independent library)", rel=2e-3, unit="kg/kg")
    outside.check(float(state.properties.density), 1.0 / HAPropsSI("Vha", "T", T, "P", p, "R", rh),
                  quantity="density of moist air", source="CoolProp HAPropsSI 'Vha' (independent library)",
                  rel=2e-3, unit="kg/m³")


def test_sound_speed_invariants(outside):
    """c rises with temperature and with humidity and falls with CO2 (Cramer 1993, Table III signs)."""
    def c(t_c=20.0, rh=0.5, co2=420e-6):
        T = t_c + ZERO_CELSIUS
        return float(air.air_state(T, 101325.0, T, rh, co2).properties.sound_speed)

    assert c(t_c=10) < c(t_c=20) < c(t_c=30)
    assert c(rh=0) < c(rh=0.5) < c(rh=1.0)
    assert c(co2=0.0) > c(co2=0.01) > c(co2=0.05)
    # The slope near room temperature is about 0.6 m/s per K (common practice).
    outside.check((c(t_c=21) - c(t_c=19)) / 2, 0.6, quantity="slope of the speed of sound at 20 °C, 50 % RH",
                  source="about 0.6 m/s per K (common practice)", abs=0.03, unit="m/s per K")


def test_dry_air_composition_and_co2():
    x = air.room_air(293.15, 101325.0, 0.0, 1000e-6)
    assert x.sum() == pytest.approx(1.0)
    assert x[3] == pytest.approx(1000e-6)
    # N2/O2 ratio of ISO 2533 dry air is kept when CO2 changes.
    assert x[0] / x[1] == pytest.approx(0.78084 / 0.209476)


def test_breath_composition():
    b = Breath(temperature_k=308.15, co2_fraction=0.05, o2_fraction=0.16)
    x = air.breath_air(101325.0, b)
    assert x.sum() == pytest.approx(1.0)
    dry = 1.0 - x[4]
    assert x[3] / dry == pytest.approx(0.05)
    assert x[1] / dry == pytest.approx(0.16)
    assert x[4] == pytest.approx(float(air.saturation_water_fraction(308.15, 101325.0)))
    assert x[0] / x[2] == pytest.approx(0.78084 / 0.00934)


def test_condensation_caps_water_at_saturation():
    state = air.air_state(293.15, 101325.0, 293.15, 0.5, breath_fraction=1.0)
    assert bool(state.condensed)
    assert float(state.relative_humidity) == pytest.approx(1.0)
    assert state.mole_fractions.sum() == pytest.approx(1.0)
    warm = air.air_state(310.15, 101325.0, 293.15, 0.5, breath_fraction=1.0)
    assert not bool(warm.condensed)


@settings(max_examples=40, deadline=None)
@given(t_c=st.floats(-30, 60), rh=st.floats(0, 1), phi=st.floats(0, 1), co2=st.floats(0, 0.1),
       p=st.floats(50e3, 110e3))
def test_mixture_is_a_valid_composition(t_c, rh, phi, co2, p):
    T = t_c + ZERO_CELSIUS
    room = air.room_air(T, p, rh, co2)
    x, condensed = air.mix(room, air.breath_air(p), phi, T, p)
    assert x.sum() == pytest.approx(1.0)
    assert np.all(x >= 0)
    assert x[4] <= float(air.saturation_water_fraction(T, p)) * (1 + 1e-9)


def test_vectorised_matches_scalar_and_shapes():
    temps = np.array([[280.0, 290.0], [300.0, 310.0]])
    state = air.air_state(temps, 95e3, 293.15, 0.4, breath_fraction=np.array([0.0, 0.5]))
    assert state.properties.sound_speed.shape == (2, 2)
    single = air.air_state(300.0, 95e3, 293.15, 0.4, breath_fraction=0.0)
    assert state.properties.sound_speed[1, 0] == pytest.approx(float(single.properties.sound_speed))


@pytest.mark.parametrize("kwargs, word", [
    (dict(temperature_k=400.0), "temperature"),
    (dict(pressure_pa=20e3), "pressure"),
    (dict(room_relative_humidity=1.5), "relative humidity"),
    (dict(co2_fraction=0.2), "co2"),
    (dict(breath_fraction=1.2), "breath fraction"),
    (dict(temperature_k=float("nan")), "temperature"),
])
def test_out_of_range_raises_project_error(kwargs, word):
    args = dict(temperature_k=293.15, pressure_pa=101325.0, room_temperature_k=293.15,
                room_relative_humidity=0.5)
    args.update(kwargs)
    with pytest.raises(OutOfRangeError, match=word):
        air.air_state(**args)


@pytest.mark.parametrize("source", air.PROPERTY_SOURCES)
def test_liquid_saturation_spline_matches_coolprop_between_nodes(outside, source):
    """The spline of ln p_sat reproduces CoolProp's IAPWS-95 saturation pressure off its grid,
    from the nodes stored in the gas table and from nodes computed through CoolProp alike."""
    import CoolProp.CoolProp as CP

    previous = air.set_property_source(source)
    try:
        temperatures = (273.2, 280.03, 291.61, 300.127, 315.9, 332.88)
        outside.check([float(air.saturation_vapour_pressure(t)) for t in temperatures],
                      [CP.PropsSI("P", "T", t, "Q", 0, "Water") for t in temperatures],
                      quantity="saturation vapour pressure between the spline's nodes",
                      source="CoolProp PropsSI, IAPWS-95 (Wagner & Pruss 2002) (independent library)",
                      rel=1e-7, unit="Pa")
    finally:
        air.set_property_source(previous)


def test_air_properties_of_a_room_with_breath():
    """The public entry point: the room's air at its own temperature, or taken to another one,
    is the mixture of :func:`drift.air.air_state` (the same model, reached through a Room)."""
    room = Room(298.15, 95e3, 0.6, 800e-6)
    state = air.air_properties(room)
    direct = air.air_state(298.15, 95e3, 298.15, 0.6, 800e-6)
    assert float(state.properties.sound_speed) == float(direct.properties.sound_speed)
    np.testing.assert_array_equal(state.mole_fractions, direct.mole_fractions)
    assert float(state.relative_humidity) == pytest.approx(0.6)
    warm = air.air_properties(room, breath_fraction=[0.0, 1.0], temperature_k=308.15)
    assert warm.properties.sound_speed.shape == (2,)
    assert float(warm.mole_fractions[1, 3]) == pytest.approx(0.045 * (1 - float(warm.mole_fractions[1, 4])))
    # c rises with temperature (Cramer 1993, Table III signs)
    assert float(warm.properties.sound_speed[0]) > float(state.properties.sound_speed)


def test_property_sources_agree_and_switch_back():
    """The shipped table (the default) and CoolProp state by state (issue 9: the API flag that
    computes straight through CoolProp for checking) agree on the same states: sound speed within
    5 ppm (about 0.01 cent) and the other properties within 0.1 %. CoolProp 8 (Bell et al. 2014)
    is the independent library here; the conductivity states stay outside the band where
    drift.gas_table deliberately leaves out water's critical term."""
    states = [(263.15, 101325.0, 0.8, 0.0), (293.15, 80000.0, 0.5, 0.3), (308.15, 101325.0, 0.2, 1.0)]
    assert air.property_source() == "table"
    tabled = [air.air_state(t, p, 293.15, rh, breath_fraction=phi) for t, p, rh, phi in states]
    previous = air.set_property_source("coolprop")
    try:
        direct = [air.air_state(t, p, 293.15, rh, breath_fraction=phi) for t, p, rh, phi in states]
    finally:
        air.set_property_source(previous)
    assert air.property_source() == "table"
    for a, b in zip(tabled, direct):
        assert float(a.properties.sound_speed) == pytest.approx(float(b.properties.sound_speed), rel=5e-6)
        for name in ("density", "viscosity", "conductivity", "cp", "gamma"):
            assert float(getattr(a.properties, name)) == pytest.approx(float(getattr(b.properties, name)),
                                                                        rel=1e-3), name
    with pytest.raises(OutOfRangeError, match="property source"):
        air.set_property_source("guess")


def test_coolprop_takes_a_trace_of_breath_in_dry_co2_free_air():
    """Found by tests/test_properties.py: a breath fraction of 1e-131 in dry air without CO2 gave
    fractions that the cache key rounded to zero, and CoolProp failed ("p is not a valid number").
    The trace changes nothing measurable: the state equals the breath-free one."""
    room = Room(293.15, 101325.0, 0.0, 0.0)
    previous = air.set_property_source("coolprop")
    try:
        traced = air.air_properties(room, 3.3e-131).properties
        clean = air.air_properties(room, 0.0).properties
    finally:
        air.set_property_source(previous)
    assert float(traced.sound_speed) == pytest.approx(float(clean.sound_speed), rel=1e-12)


def test_dry_air_without_co2_is_a_valid_state_in_both_sources():
    """CoolProp 8 cannot solve a mixture with neither CO2 nor water; drift gives it a trace of
    1e-12 there, so `drift air --rh 0 --co2 0` works in both sources and they agree."""
    state = air.air_state(293.15, 101325.0, 293.15, 0.0, 0.0)
    previous = air.set_property_source("coolprop")
    try:
        direct = air.air_state(293.15, 101325.0, 293.15, 0.0, 0.0)
    finally:
        air.set_property_source(previous)
    assert float(state.properties.sound_speed) == pytest.approx(float(direct.properties.sound_speed), rel=5e-6)
