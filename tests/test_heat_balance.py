"""The heat balance outdoors and in changing weather (drift.heat_balance): sunshine through the
solar absorptance, wind through the Churchill-Bernstein correlation, and a room that changes in
time, against equations implemented here independently."""

import dataclasses
import math

import numpy as np
import pytest

from drift import pitch, thermal
from drift.climate import Blowing, Room, Weather, parse_plan
from drift.heat_balance import ChangingHeatBalance, HeatBalance, heat_balance
from drift.materials import material
from drift.segments import instrument_wall, wall_from_stations

BRASS = material("yellow_brass")
STILL = Blowing(0.0, air_speed_m_s=0.0)
REED = Blowing(0.10e-3)
SIGMA = 5.670374419e-8      # Stefan-Boltzmann constant [W/(m^2 K^4)] (CODATA 2018)
G = 9.80665                 # standard gravity [m/s^2] (ISO 80000-3)


def tube(absorptance=None, length=0.4, diameter=0.015):
    m = BRASS if absorptance is None else dataclasses.replace(BRASS, solar_absorptance=absorptance)
    return wall_from_stations([[0.0, diameter], [length, diameter]], m.wall_thickness, m, 0.02)


def air_at(t_k):
    """Dry air at t_k and 101.325 kPa through CoolProp (Lemmon et al. 2000, an independent
    library): kinematic viscosity, diffusivity [m^2/s], conductivity [W/(m K)], Prandtl number."""
    import CoolProp.CoolProp as CP

    rho, mu, k, cp = (CP.PropsSI(q, "T", t_k, "P", 101325.0, "Air") for q in ("D", "V", "L", "C"))
    return mu / rho, k / (rho * cp), k, mu * cp / k


def sunlit_excess_k(absorptance, sun, wind, room_k=298.15, diameter=0.016):
    """Steady excess temperature [K] of a long thin-walled tube at rest, lit broadside: absorbed
    alpha G D per unit length = (h_conv + h_rad) (T_s - T_r) pi D, with free convection after
    Churchill & Chu (1975; Incropera et al. 2007, Eq. 9.34), cross flow after Churchill &
    Bernstein (1977; Eq. 7.54), the two mixed as Nu^4 = Nu_F^4 + Nu_N^4 (Churchill 1977), and
    grey-body radiation to large surroundings (Eq. 1.9), solved by bisection."""
    nu, alpha, k, pr = air_at(room_k)

    def imbalance(dt):
        ts = room_k + dt
        ra = G * (2.0 / (ts + room_k)) * dt * diameter**3 / (nu * alpha)
        nu_n = (0.60 + 0.387 * ra ** (1 / 6) / (1 + (0.559 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
        re = wind * diameter / nu
        nu_f = 0.3 + 0.62 * re**0.5 * pr ** (1 / 3) / (1 + (0.4 / pr) ** (2 / 3)) ** 0.25 \
            * (1 + (re / 282000) ** (5 / 8)) ** 0.8
        nusselt = (nu_f**4 + nu_n**4) ** 0.25 if wind > 0 else nu_n
        h = k * nusselt / diameter + BRASS.emissivity * SIGMA * (ts**2 + room_k**2) * (ts + room_k)
        return absorptance * sun * diameter - h * dt * math.pi * diameter

    low, high = 1e-6, 80.0
    for _ in range(80):
        mid = 0.5 * (low + high)
        low, high = (mid, high) if imbalance(mid) > 0 else (low, mid)
    return 0.5 * (low + high)


@pytest.mark.parametrize("absorptance, sun, wind", [(0.4, 600.0, 0.0), (0.9, 800.0, 0.0), (0.4, 600.0, 3.0)])
def test_sunlit_tube_at_rest_against_the_surface_balance(outside, absorptance, sun, wind):
    # The 0.5 mm brass wall conducts so well (Biot number under 1e-3) that the surface balance
    # above holds to the differences between the air properties of the model (a mixture of
    # N2, O2, Ar, CO2) and CoolProp's pseudo-pure air: 1.5 % in conductivity, 1.2 % in Prandtl
    # number at 25 °C (measured), hence 2 % (measured gap +0.7 to +0.9 %).
    room = Room(298.15, 101325.0, 0.0, sun_w_m2=sun, wind_m_s=wind)
    wall = tube(absorptance)
    steady = thermal.steady_state(wall, room, STILL)
    excess = float(np.mean(steady.wall_k)) - 298.15
    expected = sunlit_excess_k(absorptance, sun, wind, diameter=0.015 + 2 * BRASS.wall_thickness)
    outside.check(excess, expected, quantity=f"steady excess temperature of a sunlit brass tube at rest, "
                  f"absorptance {absorptance}, {sun:g} W/m², wind {wind:g} m/s", source="surface balance with "
                  "Churchill & Chu (1975), Churchill & Bernstein (1977), Stefan-Boltzmann, air from CoolProp "
                  "(Lemmon et al. 2000)", rel=0.02, unit="K")


def test_wind_lowers_the_wall_temperature_of_a_sunlit_instrument():
    # Churchill & Bernstein (1977): Nu grows with Re, so each stronger wind carries more heat away.
    excess = [float(np.mean(thermal.steady_state(tube(0.4), Room(298.15, 101325.0, 0.5, sun_w_m2=600.0,
                                                                      wind_m_s=w), REED).wall_k)) - 298.15
              for w in (0.0, 0.5, 2.0, 6.0)]
    assert all(b < a for a, b in zip(excess[:-1], excess[1:])), excess


def test_sun_warms_the_bore_and_raises_every_note_more_on_a_dark_surface(bundled_instruments):
    # The same played instrument in the same air, its surface polished (alpha 0.1) or dark
    # (alpha 0.9): a warmer bore raises the speed of sound, hence every note (c ~ sqrt(T)).
    ins = bundled_instruments["side-blown-flute"]
    wall = instrument_wall(ins)
    shade = Room(298.15, 101325.0, 0.5)
    sun = dataclasses.replace(shade, sun_w_m2=700.0)
    blowing = Blowing(0.03e-3, inlet_breath_fraction=0.5)

    def played(absorptance, room):
        w = dataclasses.replace(wall, material=dataclasses.replace(wall.material, solar_absorptance=absorptance))
        return thermal.steady_state(w, room, blowing).profile

    profiles = [played(0.1, shade), played(0.1, sun), played(0.9, sun)]
    f_shade, f_bright, f_dark = pitch.frequencies_hz(ins, profiles)
    assert np.mean(profiles[1].temperature_k) > np.mean(profiles[0].temperature_k)
    assert np.all(f_bright > f_shade) and np.all(f_dark > f_bright)


def test_weather_at_constant_conditions_is_the_fixed_room_bit_for_bit():
    room = Room(301.15, 95e3, 0.6, sun_w_m2=300.0, wind_m_s=1.0)
    weather = Weather((0.0, 300.0, 900.0), (room, room, room))
    plan = parse_plan("play:8,rest:4,play:6")
    fixed = thermal.Trajectory(tube(), room, plan, REED)
    changing = thermal.Trajectory(tube(), weather, plan, REED)
    assert isinstance(changing.model, ChangingHeatBalance) and isinstance(fixed.model, HeatBalance)
    for t in (0.0, 200.0, 480.0, 600.0, 1080.0):
        a, b = fixed.state(t), changing.state(t)
        assert np.array_equal(a.wall_k, b.wall_k)
        assert np.array_equal(a.profile.temperature_k, b.profile.temperature_k)
        assert a.room_loss_j == b.room_loss_j


def test_weather_of_one_room_is_the_fixed_model():
    room = Room(293.15, 101325.0, 0.5)
    assert isinstance(heat_balance(tube(), Weather.steady(room), REED, thermal.DEFAULT_BREATH), HeatBalance)


def test_changing_weather_ends_at_the_steady_state_of_the_last_room():
    # Conditions held after the last change: the wall relaxes to the fixed room's steady state
    # (time constant of the brass tube about 5 min, so 3 h later it is there to 1e-3 K).
    warm, cool = Room(303.15, 101325.0, 0.5, sun_w_m2=400.0), Room(293.15, 101325.0, 0.7, wind_m_s=2.0)
    weather = Weather((0.0, 1800.0), (warm, cool))
    end = thermal.Trajectory(tube(), weather, parse_plan("play:210"), REED).state(210 * 60.0)
    steady = thermal.steady_state(tube(), cool, REED)
    assert np.max(np.abs(end.wall_k - steady.wall_k)) < 1e-3
    assert end.profile.room == cool


def test_heat_flows_between_two_rooms_are_interpolated_linearly():
    # Sunshine enters the balance linearly, so halfway through a change from no sun to full sun
    # the heat into a wall at the room's temperature is half of the full sun's (alpha G A / pi).
    dark = Room(293.15, 101325.0, 0.5)
    lit = dataclasses.replace(dark, sun_w_m2=800.0)
    wall = tube(0.5)
    model = ChangingHeatBalance(wall, Weather((0.0, 600.0), (dark, lit)), STILL, thermal.DEFAULT_BREATH)
    temps = np.full((1, model.n, model.m), 293.15)
    q, _ = model.heat_flows(temps, False, 300.0)
    area = 2 * math.pi * (wall.inner_radius_m + wall.thickness_m) * wall.lengths_m
    assert np.sum(q) == pytest.approx(0.5 * 0.5 * 800.0 * np.sum(area) / math.pi, rel=1e-9)


@pytest.mark.parametrize("playing", [True, False])
def test_grouped_differences_are_the_full_jacobian(playing):
    # Consistency of the forward-difference plan (not an outside check): a four-layer wooden
    # wall with a valve loop, perturbing the middle layers' nodes three segments apart gives the
    # columns of perturbing every node alone, from 18 + 6 evaluations instead of 36: equal to the
    # rounding of the differences (a 1e-4 K step on 300 K: about 1e-16 * 300 / 1e-4 = 3e-10).
    from drift.climate import DEFAULT_BREATH
    from drift.segments import Branch

    wood = material("tropical_hardwood")
    bore = wall_from_stations([[0.0, 0.015], [0.16, 0.015]], 0.006, wood, 0.02)
    loop = wall_from_stations([[0.0, 0.015], [0.02, 0.015]], 0.006, wood, 0.02, lambda x: np.full(x.shape, 0.5))
    model = heat_balance(dataclasses.replace(bore, branches=(Branch("v", 0.08, loop),)), Room(288.15), REED,
                         DEFAULT_BREATH)
    assert (model.n, model.m) == (9, 4)
    y = np.concatenate([288.15 + np.random.default_rng(3).uniform(0.0, 15.0, 36), [0.0, 0.0]])
    grouped = model.jacobian(y, playing)
    batch = np.repeat(y[None, :], 37, axis=0)
    batch[np.arange(1, 37), np.arange(36)] += 1e-4
    f = model.derivatives(batch, playing)
    alone = np.zeros_like(grouped)
    alone[:, :36] = ((f[1:] - f[0]) / 1e-4).T
    assert len(model._difference_plan()[0]) + len(model._difference_plan()[1]) == 24
    np.testing.assert_allclose(grouped, alone, rtol=0, atol=1e-9)
    assert np.max(np.abs(alone)) > 0.05
