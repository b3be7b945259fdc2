"""Heat-transfer correlations of the played instrument: convection inside and outside the bore,
radiation, and the latent heat of condensing breath. Pure functions on numpy arrays, SI units.

References
----------
Churchill, S. W., Chu, H. H. S. (1975). Correlating equations for laminar and turbulent free
convection from a horizontal cylinder. Int. J. Heat Mass Transfer 18, 1049-1053.
Churchill, S. W., Bernstein, M. (1977). A correlating equation for forced convection from gases
and liquids to a circular cylinder in crossflow. J. Heat Transfer 99, 300-306.
Gnielinski, V. (1976). New equations for heat and mass transfer in turbulent pipe and channel flow.
Int. Chem. Eng. 16, 359-368.
Hausen, H. (1943). Darstellung des Wärmeüberganges in Rohren durch verallgemeinerte
Potenzbeziehungen. Z. VDI Beih. Verfahrenstech. 4, 91-98.
Incropera, F. P., DeWitt, D. P., Bergman, T. L., Lavine, A. S. (2007). Fundamentals of Heat and Mass
Transfer, 6th ed. Wiley (Eqs. 1.9, 7.54, 8.57, 8.62, 9.34).
Rogers, R. R., Yau, M. K. (1989). A Short Course in Cloud Physics, 3rd ed. Pergamon.
"""

from __future__ import annotations

import numpy as np

from drift import constants as K


#: Width [K] below 0 °C over which condensing water turns from liquid to frost in
#: :func:`latent_heat_condensation`.
FROST_BAND_K = 0.1


def latent_heat_condensation(temperature_k):
    """Heat released per kg of water vapour condensing [J/kg] at temperature [K].

    Above 0 °C, vapour to liquid: L_v = 2.501e6 - 2369 (T - 273.15) J/kg (Rogers & Yau 1989).
    Below 0 °C, vapour to ice: L_v + L_f with L_f = 333.6 kJ/kg, matching the air layer, which caps
    water at saturation over ice there. The fusion heat is ramped in linearly over the
    :data:`FROST_BAND_K` just below 0 °C, so that the heat balance stays continuous and a steady
    state exists when the bore air sits at the freezing point (a regularisation, not physics:
    it moves no state outside that band).
    """
    t = np.asarray(temperature_k, dtype=float)
    latent = K.LATENT_HEAT_0C + K.LATENT_HEAT_SLOPE * (t - K.ZERO_CELSIUS)
    return latent + K.LATENT_HEAT_FUSION * np.clip((K.ZERO_CELSIUS - t) / FROST_BAND_K, 0.0, 1.0)


def nusselt_hausen_1943(graetz):
    """Mean Nusselt number [-] of laminar pipe flow over a thermal entry length.

    Nu_D = 3.66 + 0.0668 Gz / (1 + 0.04 Gz^(2/3)), Gz = (D/x) Re_D Pr, for a uniform wall
    temperature and a fully developed velocity profile; Nu_D -> 3.66 far from the entry.

    Parameters
    ----------
    graetz : array_like
        Graetz number Gz [-], >= 0.

    References
    ----------
    Hausen (1943); Incropera et al. (2007), Eq. 8.57.
    """
    gz = np.asarray(graetz, dtype=float)
    return 3.66 + 0.0668 * gz / (1.0 + 0.04 * gz ** (2.0 / 3.0))


def nusselt_gnielinski_1976(reynolds, prandtl):
    """Nusselt number [-] of fully developed turbulent pipe flow.

    Nu_D = (f/8)(Re - 1000) Pr / (1 + 12.7 (f/8)^(1/2) (Pr^(2/3) - 1)) with the Petukhov friction
    factor f = (0.790 ln Re - 1.64)^-2; valid for 3000 <= Re <= 5e6 and 0.5 <= Pr <= 2000.

    Parameters
    ----------
    reynolds : array_like
        Reynolds number Re_D [-].
    prandtl : array_like
        Prandtl number [-].

    References
    ----------
    Gnielinski (1976); Incropera et al. (2007), Eqs. 8.21 and 8.62.
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    f = (0.790 * np.log(re) - 1.64) ** -2
    return (f / 8.0) * (re - 1000.0) * pr / (1.0 + 12.7 * np.sqrt(f / 8.0) * (pr ** (2.0 / 3.0) - 1.0))


def nusselt_churchill_chu_1975(rayleigh, prandtl):
    """Mean Nusselt number [-] of free convection from a long horizontal isothermal cylinder.

    Nu_D = {0.60 + 0.387 Ra_D^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2, for Ra_D <= 1e12.

    Parameters
    ----------
    rayleigh : array_like
        Rayleigh number Ra_D = g beta |dT| D^3 / (nu alpha) [-], >= 0.
    prandtl : array_like
        Prandtl number of the surrounding air [-].

    References
    ----------
    Churchill & Chu (1975); Incropera et al. (2007), Eq. 9.34.
    """
    ra = np.asarray(rayleigh, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    return (0.60 + 0.387 * ra ** (1.0 / 6.0) / (1.0 + (0.559 / pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)) ** 2


def nusselt_churchill_bernstein_1977(reynolds, prandtl):
    """Mean Nusselt number [-] of a long cylinder in cross flow.

    Nu_D = 0.3 + 0.62 Re^(1/2) Pr^(1/3) / [1 + (0.4/Pr)^(2/3)]^(1/4) [1 + (Re/282000)^(5/8)]^(4/5),
    for Re_D Pr > 0.2; Nu_D -> 0.3 in still air.

    Parameters
    ----------
    reynolds : array_like
        Reynolds number Re_D = V D / nu [-], >= 0.
    prandtl : array_like
        Prandtl number [-].

    References
    ----------
    Churchill, S. W., Bernstein, M. (1977). J. Heat Transfer 99, 300-306; Incropera et al.
    (2007), Eq. 7.54.
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    return 0.3 + 0.62 * np.sqrt(re) * pr ** (1.0 / 3.0) / (1.0 + (0.4 / pr) ** (2.0 / 3.0)) ** 0.25 \
        * (1.0 + (re / 282000.0) ** (5.0 / 8.0)) ** 0.8


def nusselt_mixed(forced, natural, exponent: float = 4.0):
    """Mixed free and forced convection [-]: Nu^n = Nu_F^n + Nu_N^n.

    n = 4 for cylinders in transverse flow (Churchill 1977; Incropera et al. 2007, Eq. 9.66 and
    the text beside it; from memory), the flows taken as assisting.
    """
    forced = np.asarray(forced, dtype=float)
    natural = np.asarray(natural, dtype=float)
    return (forced**exponent + natural**exponent) ** (1.0 / exponent)


def radiative_coefficient(surface_k, surroundings_k, emissivity):
    """Linearised radiative heat-transfer coefficient [W/(m^2 K)] of a small grey body.

    h_r = eps sigma (T_s^2 + T_r^2)(T_s + T_r), so that q = h_r (T_s - T_r) = eps sigma
    (T_s^4 - T_r^4) exactly, the surroundings large and at T_r (Incropera et al. 2007, Eq. 1.9).

    Parameters
    ----------
    surface_k, surroundings_k : array_like
        Temperatures [K].
    emissivity : array_like
        Total hemispherical emissivity of the surface [-].
    """
    ts = np.asarray(surface_k, dtype=float)
    tr = np.asarray(surroundings_k, dtype=float)
    return emissivity * K.STEFAN_BOLTZMANN * (ts**2 + tr**2) * (ts + tr)


def pipe_conductance(distance_m, mass_flow_kg_s, diameter_m, cp, conductivity, viscosity, prandtl):
    """Air-to-wall conductance [W/K] of each segment of a pipe carrying a gas flow.

    Parameters
    ----------
    distance_m : array_like (n + 1,)
        Segment boundaries measured from where the flow enters [m] (0 before the entry).
    mass_flow_kg_s : array_like (n,)
        Mass flow through each segment [kg/s] (0: no flow, no conductance).
    diameter_m : array_like (n,)
        Inner diameter of each segment [m].
    cp, conductivity, viscosity, prandtl : float
        Heat capacity [J/(kg K)], thermal conductivity [W/(m K)], dynamic viscosity [Pa s] and
        Prandtl number [-] of the gas.

    Notes
    -----
    Laminar: the heat flow over a segment [x1, x2] of a pipe whose mean Nusselt number from the
    entry is Nu_m(x) (:func:`nusselt_hausen_1943`) is pi k [x Nu_m(x)] from x1 to x2; with
    Gz = Re Pr D / x = 4 mdot cp / (pi k x) this does not depend on the diameter, which lets it
    serve conical bores too. Turbulent (Re > 3000): pi k Nu dx with :func:`nusselt_gnielinski_1976`;
    a linear blend in Re between 2300 and 3000 (Incropera et al. 2007, Sec. 8.1, on the
    transition; the blend itself is an estimate).
    """
    mdot = np.asarray(mass_flow_kg_s, dtype=float)
    edges = np.asarray(distance_m, dtype=float)
    lengths = np.diff(edges)

    def x_nu(x):
        with np.errstate(divide="ignore", invalid="ignore"):
            gz = 4.0 * mdot * cp / (np.pi * conductivity * x)
            out = x * nusselt_hausen_1943(gz)
        return np.where(x > 0.0, out, 0.0)

    laminar = np.pi * conductivity * (x_nu(edges[1:]) - x_nu(edges[:-1]))
    reynolds = 4.0 * mdot / (np.pi * np.asarray(diameter_m, dtype=float) * viscosity)
    nu_turbulent = nusselt_gnielinski_1976(np.maximum(reynolds, 3000.0), prandtl)
    turbulent = np.pi * conductivity * nu_turbulent * lengths
    blend = np.clip((reynolds - 2300.0) / 700.0, 0.0, 1.0)
    ua = (1.0 - blend) * laminar + blend * np.maximum(laminar, turbulent)
    return np.where(mdot > 0.0, ua, 0.0)


def outer_coefficient(surface_k, room_k, diameter_m, room_gas, air_speed_m_s, emissivity):
    """Heat-transfer coefficient [W/(m^2 K)] from the outside of a horizontal tube to the room.

    Parameters
    ----------
    surface_k : array_like
        Outer surface temperature [K].
    room_k : float
        Room air and surroundings temperature [K].
    diameter_m : array_like
        Outer diameter [m].
    room_gas : drift.air.GasProperties
        The room air (density, viscosity, conductivity, cp, Prandtl number).
    air_speed_m_s : float
        Speed of the air across the tube [m/s]; 0: natural convection only.
    emissivity : float
        Total hemispherical emissivity of the surface [-].

    Notes
    -----
    Natural convection (:func:`nusselt_churchill_chu_1975`, Ra_D = g beta |dT| D^3 / (nu alpha)
    with beta = 2 / (T_s + T_r), the film's ideal-gas expansion coefficient), mixed with forced
    cross flow (:func:`nusselt_churchill_bernstein_1977`, :func:`nusselt_mixed`), plus radiation
    (:func:`radiative_coefficient`).
    """
    nu_room = float(room_gas.viscosity / room_gas.density)
    alpha_room = float(room_gas.conductivity / (room_gas.density * room_gas.cp))
    pr_room = float(room_gas.prandtl)
    dt = np.abs(surface_k - room_k)
    beta = 2.0 / (surface_k + room_k)
    ra = K.STANDARD_GRAVITY * beta * dt * diameter_m**3 / (nu_room * alpha_room)
    nu_natural = nusselt_churchill_chu_1975(ra, pr_room)
    if air_speed_m_s > 0.0:
        re = air_speed_m_s * diameter_m / nu_room
        nu = nusselt_mixed(nusselt_churchill_bernstein_1977(re, pr_room), nu_natural)
    else:
        nu = nu_natural
    h_conv = float(room_gas.conductivity) * nu / diameter_m
    return h_conv + radiative_coefficient(surface_k, room_k, emissivity)


def absorbed_sunshine(irradiance_w_m2, absorptance, outer_area_m2):
    """Sunshine absorbed by the outside of a long tube lit broadside [W].

    The beam of irradiance G [W/m^2] (measured on a surface facing the sun) falls on the tube's
    projected area D L, which is its outer area pi D L over pi; a share alpha (the surface's solar
    absorptance) of it is absorbed: Q = alpha G A_outer / pi (Incropera et al. 2007, Sec. 12.5:
    absorbed irradiation G_abs = alpha G, Eq. 12.42; from memory). The tube is taken square to the
    beam, the most it can catch; diffuse sky light and light reflected from the ground are left out.

    Parameters
    ----------
    irradiance_w_m2 : array_like
        Sunshine on a surface facing the sun [W/m^2].
    absorptance : array_like
        Solar absorptance of the outer surface [-].
    outer_area_m2 : array_like
        Outer surface area [m^2].
    """
    g = np.asarray(irradiance_w_m2, dtype=float)
    return np.asarray(absorptance, dtype=float) * g * np.asarray(outer_area_m2, dtype=float) / np.pi


def relative_air_speed(own_m_s, wind_m_s):
    """Root-mean-square speed [m/s] of the air across an instrument that moves at ``own_m_s`` in a
    wind of ``wind_m_s``, the two in independent directions: sqrt(v^2 + w^2) (the mean square of
    the difference of two independent velocities, one of them of random direction, is the sum of
    their mean squares). An estimate for the forced convection outside, not a correlation."""
    return np.hypot(np.asarray(own_m_s, dtype=float), np.asarray(wind_m_s, dtype=float))
