"""Heat-transfer correlations (drift.heat_transfer) against independent correlations, IAPWS-95 and
the Stefan-Boltzmann law."""

import numpy as np
import pytest

from drift import heat_transfer


def test_latent_heat_against_iapws95(outside):
    # IAPWS-95 (Wagner & Pruss 2002) through CoolProp's water, an independent implementation.
    import CoolProp.CoolProp as CP

    temperatures = (283.15, 293.15, 308.15)
    outside.check([float(heat_transfer.latent_heat_condensation(t)) for t in temperatures],
                  [CP.PropsSI("H", "T", t, "Q", 1, "Water") - CP.PropsSI("H", "T", t, "Q", 0, "Water")
                   for t in temperatures],
                  quantity="latent heat of condensation of water, 10-35 °C",
                  source="IAPWS-95, Wagner & Pruss (2002), through CoolProp PropsSI (independent library)",
                  rel=5e-4, unit="J/kg")
    # Below 0 °C the vapour deposits as ice: sublimation heat about 2.834 MJ/kg at 0 °C
    # (IAPWS R14-08; from memory).
    outside.check(float(heat_transfer.latent_heat_condensation(273.0)), 2.834e6,
                  quantity="latent heat of deposition of water vapour as ice, 273.0 K",
                  source="IAPWS R14-08, sublimation heat at 0 °C (from memory)", rel=2e-3, unit="J/kg")


def test_hausen_tends_to_the_fully_developed_value(outside):
    # Fully developed laminar flow, uniform wall temperature: Nu_D = 3.66 (Incropera et al. 2007,
    # Eq. 8.55); the entry region transfers more.
    outside.check(float(heat_transfer.nusselt_hausen_1943(0.0)), 3.66,
                  quantity="Hausen's Nusselt number at Graetz number 0 (fully developed laminar pipe flow)",
                  source="Incropera et al. (2007), Eq. 8.55: Nu_D = 3.66", abs=1e-12)
    values = heat_transfer.nusselt_hausen_1943(np.array([1.0, 10.0, 100.0, 1000.0]))
    assert np.all(np.diff(values) > 0)


@pytest.mark.parametrize("re", [1e4, 3e4, 1e5])
def test_gnielinski_close_to_dittus_boelter(outside, re):
    # Dittus-Boelter, Nu = 0.023 Re^0.8 Pr^0.4 (Incropera et al. 2007, Eq. 8.60), an independent
    # correlation good to about 25 %; the two agree much closer for air at these Re.
    db = 0.023 * re**0.8 * 0.71**0.4
    outside.check(float(heat_transfer.nusselt_gnielinski_1976(re, 0.71)), db,
                  quantity="Gnielinski Nusselt number of turbulent pipe flow, Re 1e4-1e5, Pr 0.71",
                  source="Dittus-Boelter, Incropera et al. (2007), Eq. 8.60 (an independent correlation)",
                  rel=0.15)


@pytest.mark.parametrize("ra, c, n", [(1e3, 0.850, 0.188), (1e5, 0.480, 0.250), (1e6, 0.480, 0.250)])
def test_churchill_chu_close_to_morgan(outside, ra, c, n):
    # Morgan (1975) power laws for horizontal cylinders, Nu = C Ra^n (Incropera et al. 2007,
    # Table 9.1: Ra 1e2-1e4: C = 0.850, n = 0.188; 1e4-1e7: 0.480, 0.250). Two independent fits
    # of scattered data: they differ by 16 % at Ra = 1e3 and 9 % at 1e5 (measured), hence 20 %.
    outside.check(float(heat_transfer.nusselt_churchill_chu_1975(ra, 0.71)), c * ra**n,
                  quantity="Churchill-Chu Nusselt number of a horizontal cylinder, Ra 1e3-1e6, Pr 0.71",
                  source="Morgan (1975), Incropera et al. (2007), Table 9.1 (an independent fit)", rel=0.20)
    # Still air: conduction limit 0.60^2 = 0.36.
    outside.check(float(heat_transfer.nusselt_churchill_chu_1975(0.0, 0.71)), 0.36,
                  quantity="Churchill-Chu Nusselt number of a horizontal cylinder in still air (Ra = 0)",
                  source="Churchill & Chu (1975), conduction limit 0.60^2", rel=1e-6)


@pytest.mark.parametrize("re, c, m", [(100.0, 0.683, 0.466), (1000.0, 0.683, 0.466), (1e4, 0.193, 0.618)])
def test_churchill_bernstein_close_to_hilpert(outside, re, c, m):
    # Hilpert's cross-flow power laws, Nu = C Re^m Pr^(1/3) (Incropera et al. 2007, Table 7.2:
    # Re 40-4000: 0.683, 0.466; 4000-40000: 0.193, 0.618).
    ref = c * re**m * 0.71 ** (1 / 3)
    outside.check(float(heat_transfer.nusselt_churchill_bernstein_1977(re, 0.71)), ref,
                  quantity="Churchill-Bernstein Nusselt number of a cylinder in cross flow, Re 100-1e4, Pr 0.71",
                  source="Hilpert, Incropera et al. (2007), Table 7.2 (an independent fit)", rel=0.12)


def test_mixed_convection_combines_by_the_fourth_power(outside):
    # Nu^4 = Nu_F^4 + Nu_N^4 (Churchill 1977, as in Incropera et al. 2007, Eq. 9.66; from memory):
    # equal parts give 2^(1/4) times either; one part alone is itself.
    outside.check([float(heat_transfer.nusselt_mixed(10.0, 10.0)), float(heat_transfer.nusselt_mixed(7.0, 0.0))],
                  [10.0 * 2 ** 0.25, 7.0], quantity="mixed-convection Nusselt number, Nu_F, Nu_N = 10, 10 and 7, 0",
                  source="Churchill (1977), Nu^4 = Nu_F^4 + Nu_N^4, as in Incropera et al. (2007), Eq. 9.66 "
                  "(from memory)", rel=1e-6)
    assert float(heat_transfer.nusselt_mixed(3.0, 4.0, exponent=2.0)) == pytest.approx(5.0)


def test_radiative_coefficient_reproduces_stefan_boltzmann(outside):
    # q = eps sigma (Ts^4 - Tr^4) (Incropera et al. 2007, Eq. 1.7); sigma = 5.670374419e-8 (CODATA 2018).
    ts, tr, eps = 310.0, 293.15, 0.9
    q = float(heat_transfer.radiative_coefficient(ts, tr, eps)) * (ts - tr)
    outside.check(q, eps * 5.670374419e-8 * (ts**4 - tr**4),
                  quantity="radiated heat flux, surface 310 K, surroundings 293.15 K, emissivity 0.9",
                  source="Incropera et al. (2007), Eq. 1.7; sigma from CODATA 2018", rel=1e-12, unit="W/m²")


def test_correlations_are_vectorised_and_propagate_nan():
    values = np.array([[0.0, 10.0], [100.0, np.nan]])
    for function, args in [(heat_transfer.nusselt_hausen_1943, (values,)),
                           (heat_transfer.nusselt_churchill_chu_1975, (values, 0.71)),
                           (heat_transfer.nusselt_churchill_bernstein_1977, (values, 0.71)),
                           (heat_transfer.latent_heat_condensation, (values + 280.0,))]:
        out = function(*args)
        assert out.shape == values.shape
        assert np.isnan(out[1, 1]) and np.all(np.isfinite(out.ravel()[:3]))
    assert np.isnan(heat_transfer.nusselt_gnielinski_1976(np.nan, 0.71))


# Air at 300 K and 1 atm, Incropera et al. (2007), Table A.4 (from memory): density [kg/m^3],
# viscosity [Pa s], conductivity [W/(m K)], cp [J/(kg K)], Prandtl number.
AIR_300K = dict(density=1.1614, viscosity=184.6e-7, conductivity=26.3e-3, cp=1007.0, prandtl=0.707)


def test_pipe_conductance_far_from_the_entry_is_fully_developed_laminar(outside):
    # Far downstream in laminar flow with a uniform wall temperature, Nu_D = 3.66 (Incropera et
    # al. 2007, Eq. 8.55): a segment of length dx conducts pi k 3.66 dx. 0.1 g/s of air in a
    # 15 mm pipe (Re about 460), segments 5 to 5.1 m from the entry: Gz = 4 mdot cp / (pi k x)
    # is about 1, where Hausen's local Nusselt number is within 1e-3 of 3.66.
    a = AIR_300K
    edges = np.array([5.0, 5.05, 5.1])
    ua = heat_transfer.pipe_conductance(edges, np.full(2, 1e-4), np.full(2, 0.015), a["cp"], a["conductivity"],
                                        a["viscosity"], a["prandtl"])
    outside.check(ua / (np.pi * a["conductivity"] * np.diff(edges)), 3.66,
                  quantity="Nusselt number of laminar pipe flow 5-5.1 m from the entry (Re about 460)",
                  source="Incropera et al. (2007), Eq. 8.55: Nu_D = 3.66; air from Table A.4 (from memory)",
                  rel=1e-3)


def test_pipe_conductance_entry_region_and_no_flow():
    # The thermal entry region transfers more than the developed flow downstream (Incropera et
    # al. 2007, Fig. 8.10); a segment the flow does not reach conducts nothing.
    a = AIR_300K
    edges = np.linspace(0.0, 0.6, 31)
    flow = np.where(edges[:-1] < 0.4, 1e-4, 0.0)
    ua = heat_transfer.pipe_conductance(edges, flow, np.full(30, 0.015), a["cp"], a["conductivity"],
                                        a["viscosity"], a["prandtl"])
    per_length = ua[:20] / np.diff(edges)[:20]
    assert np.all(np.diff(per_length) < 0)
    assert per_length[-1] > np.pi * a["conductivity"] * 3.66
    np.testing.assert_array_equal(ua[20:], 0.0)


def test_pipe_conductance_turbulent_against_dittus_boelter(outside):
    # Re = 4 mdot / (pi D mu) = 1e4: the Gnielinski correlation it uses agrees with Dittus-Boelter,
    # Nu = 0.023 Re^0.8 Pr^0.4 (Incropera et al. 2007, Eq. 8.60), to 15 % (see above).
    a = AIR_300K
    d = 0.015
    mdot = 1e4 * np.pi * d * a["viscosity"] / 4
    edges = np.array([2.0, 2.02])
    ua = heat_transfer.pipe_conductance(edges, [mdot], [d], a["cp"], a["conductivity"], a["viscosity"], a["prandtl"])
    nu = float(ua[0]) / (np.pi * a["conductivity"] * 0.02)
    outside.check(nu, 0.023 * 1e4**0.8 * a["prandtl"] ** 0.4,
                  quantity="Nusselt number of turbulent pipe flow from the pipe conductance, Re 1e4",
                  source="Dittus-Boelter, Incropera et al. (2007), Eq. 8.60 (an independent correlation)",
                  rel=0.15)


def test_outer_coefficient_in_still_air_at_room_temperature(outside):
    # No temperature difference and no wind: conduction limit of Churchill & Chu, Nu_D = 0.36
    # (0.60^2), plus the linearised radiation 4 eps sigma T^3 (Incropera et al. 2007, Eq. 1.9;
    # sigma from CODATA 2018).
    from drift.air import GasProperties

    a = AIR_300K
    gas = GasProperties(sound_speed=347.0, density=a["density"], viscosity=a["viscosity"],
                        conductivity=a["conductivity"], cp=a["cp"], gamma=1.4, prandtl=a["prandtl"])
    d, eps, t = 0.02, 0.9, 300.0
    h = heat_transfer.outer_coefficient(np.array([t]), t, d, gas, 0.0, eps)
    expected = 0.36 * a["conductivity"] / d + 4 * eps * 5.670374419e-8 * t**3
    outside.check(float(h[0]), expected,
                  quantity="outer heat-transfer coefficient of a 20 mm tube in still air at 300 K, emissivity 0.9",
                  source="Churchill & Chu (1975) conduction limit Nu_D = 0.36; Incropera et al. (2007), Eq. 1.9; "
                  "sigma from CODATA 2018; air from Table A.4 (from memory)", rel=1e-9, unit="W/(m² K)")
    # a draught and a warmer surface both raise it
    windy = heat_transfer.outer_coefficient(np.array([t]), t, d, gas, 1.0, eps)
    warm = heat_transfer.outer_coefficient(np.array([t + 10.0]), t, d, gas, 0.0, eps)
    assert float(windy[0]) > float(h[0]) and float(warm[0]) > float(h[0])


def test_absorbed_sunshine_is_alpha_g_times_the_projected_area():
    # A cylinder lit broadside intercepts G D L (its shadow); alpha of it is absorbed
    # (Incropera et al. 2007, Sec. 12.5; the geometry of a cylinder's shadow).
    d, length, alpha, g = 0.02, 0.5, 0.4, 900.0
    outer = np.pi * d * length
    assert float(heat_transfer.absorbed_sunshine(g, alpha, outer)) == pytest.approx(alpha * g * d * length, rel=1e-12)
    assert float(heat_transfer.absorbed_sunshine(0.0, alpha, outer)) == 0.0


def test_relative_air_speed_adds_in_quadrature():
    # Mean square of v + w for w of random direction: |v|^2 + |w|^2 (the cross term averages out).
    rng = np.random.default_rng(1)
    angle = rng.uniform(0.0, 2 * np.pi, 200_000)
    v, w = 0.3, 2.0
    rms = np.sqrt(np.mean((v + w * np.cos(angle)) ** 2 + (w * np.sin(angle)) ** 2))
    assert float(heat_transfer.relative_air_speed(v, w)) == pytest.approx(rms, rel=1e-2)
    assert float(heat_transfer.relative_air_speed(0.1, 0.0)) == pytest.approx(0.1, rel=1e-15)
