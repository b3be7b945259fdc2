"""Moist room air, exhaled breath and their mixture: composition and real-gas properties.

Everything here is SI: temperatures in K, pressures in Pa, humidity and fractions as numbers in
[0, 1]. Mole-fraction arrays have a last axis of length 5 in the order of
:data:`drift.constants.SPECIES` (N2, O2, Ar, CO2, H2O).

Properties come from CoolProp's HEOS backend (multi-fluid Helmholtz mixture model with its
bundled interaction parameters, gas phase imposed); CoolProp is imported on first use only.

References
----------
Bell, I. H., Wronski, J., Quoilin, S., Lemort, V. (2014). Pure and pseudo-pure fluid thermophysical
property evaluation and the open-source thermophysical property library CoolProp. Ind. Eng. Chem.
Res. 53, 2498-2508.
Wagner, W., Pruss, A. (2002). The IAPWS formulation 1995 for the thermodynamic properties of
ordinary water substance. J. Phys. Chem. Ref. Data 31, 387.
Wagner, W., Riethmann, T., Feistel, R., Harvey, A. H. (2011). New equations for the sublimation
pressure and melting pressure of H2O ice Ih. J. Phys. Chem. Ref. Data 40, 043103.
Davis, R. S. (1992). Equation for the determination of the density of moist air (1981/91).
Metrologia 29, 67-70.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np

from drift import constants as K
from drift.climate import DEFAULT_BREATH, Breath, Room
from drift.errors import OutOfRangeError, check_range

# --------------------------------------------------------------------------------------------
# Water vapour
# --------------------------------------------------------------------------------------------


#: Where real-gas properties and the saturation pressure over liquid water come from:
#: ``"table"`` (default), the shipped table of :mod:`drift.gas_table`, generated from CoolProp by
#: tools/make_gas_table.py, no CoolProp at run time; ``"coolprop"``, CoolProp itself, state by
#: state (for checking; about 2 s to load and a millisecond a state). Set with
#: :func:`set_property_source`.
PROPERTY_SOURCES = ("table", "coolprop")
_source = ["table"]


def set_property_source(source: str) -> str:
    """Take gas properties from ``"table"`` or ``"coolprop"`` from now on; returns the previous
    source. Every result computed after the call uses the new source."""
    if source not in PROPERTY_SOURCES:
        raise OutOfRangeError(f"property source '{source}' is not allowed; use one of: "
                              f"{', '.join(PROPERTY_SOURCES)}")
    previous, _source[0] = _source[0], source
    return previous


def property_source() -> str:
    """The current source of gas properties (:func:`set_property_source`)."""
    return _source[0]


@functools.cache
def _liquid_spline(source: str) -> tuple[np.ndarray, np.ndarray]:
    """The cubic spline (not-a-knot ends) of ln p_sat over liquid water through IAPWS-95 values
    from CoolProp, 0 to 100 °C every 0.25 K: its knots [K] (n,) and polynomial pieces (4, n - 1)
    in powers of (T - knot), highest first. Stored in the gas table (``"table"``, no scipy needed)
    or fitted now (``"coolprop"``). Between the nodes it reproduces CoolProp to better than 1e-7
    relative (tests/test_air.py)."""
    if source == "table":
        from drift.gas_table import _table

        table = _table()
        return table["liquid_t_k"], table["ln_p_sat_liquid_pieces"]
    import CoolProp.CoolProp as CP
    from scipy.interpolate import CubicSpline

    water = CP.AbstractState("HEOS", "Water")
    grid = np.linspace(K.ZERO_CELSIUS, K.ZERO_CELSIUS + 100.0, 401)
    values = []
    for t in grid:
        water.update(CP.QT_INPUTS, 0.0, float(t))
        values.append(water.p())
    return grid, CubicSpline(grid, np.log(values)).c


def _ln_liquid_saturation(temperature_k):
    """ln p_sat [ln Pa] over liquid water from :func:`_liquid_spline` (held constant in slope
    beyond its ends, which the callers never reach)."""
    knots, pieces = _liquid_spline(_source[0])
    t = np.asarray(temperature_k, dtype=float)
    i = np.clip(np.searchsorted(knots, t, side="right") - 1, 0, knots.size - 2)
    dx = t - knots[i]
    return ((pieces[0, i] * dx + pieces[1, i]) * dx + pieces[2, i]) * dx + pieces[3, i]


def sublimation_pressure(temperature_k):
    """Sublimation pressure of ice Ih [Pa] at temperature [K].

    Wagner et al. (2011), Eq. 6 (IAPWS R14-08): ln(p/pt) = theta^-1 * sum_i a_i theta^b_i,
    theta = T / 273.16 K, pt = 611.657 Pa.
    """
    theta = np.asarray(temperature_k, dtype=float) / K.WATER_TRIPLE_T
    series = np.sum(K.ICE_SUBLIMATION_A * theta[..., None] ** K.ICE_SUBLIMATION_B, axis=-1)
    return K.WATER_TRIPLE_P * np.exp(series / theta)


def saturation_vapour_pressure(temperature_k):
    """Saturation pressure of water vapour [Pa] at temperature [K].

    Over liquid water at and above 0 °C: IAPWS-95 (Wagner & Pruss 2002) through CoolProp's
    water, read from a cubic spline of ln p_sat on a 0.25 K grid (:func:`_liquid_spline`). Over
    ice below 0 °C: :func:`sublimation_pressure` (Wagner et al. 2011).
    """
    t = np.asarray(temperature_k, dtype=float)
    flat = t.ravel()
    out = np.empty_like(flat)
    cold = flat < K.ZERO_CELSIUS
    out[cold] = sublimation_pressure(flat[cold])
    if np.any(~cold):
        out[~cold] = np.exp(_ln_liquid_saturation(flat[~cold]))
    return out.reshape(t.shape)


def enhancement_factor(temperature_k, pressure_pa):
    """Enhancement factor of water vapour in air [-]: f = alpha + beta p + gamma t^2.

    Giacomo (1982), as in the CIPM-81/91 equation (Davis 1992, Eq. A1.3), t in °C, p in Pa.
    """
    t_c = np.asarray(temperature_k, dtype=float) - K.ZERO_CELSIUS
    p = np.asarray(pressure_pa, dtype=float)
    return K.ENHANCEMENT_ALPHA + K.ENHANCEMENT_BETA * p + K.ENHANCEMENT_GAMMA * t_c**2


def saturation_water_fraction(temperature_k, pressure_pa):
    """Mole fraction of water vapour [mol/mol] in air saturated at temperature [K], pressure [Pa].

    x_sat = f(p, t) p_sat(T) / p (Davis 1992, Eq. A1.2 with h = 1).
    """
    return (
        enhancement_factor(temperature_k, pressure_pa)
        * saturation_vapour_pressure(temperature_k)
        / np.asarray(pressure_pa, dtype=float)
    )


def water_fraction(temperature_k, pressure_pa, relative_humidity):
    """Mole fraction of water vapour [mol/mol] from relative humidity [0-1].

    x_w = RH f p_sat(T) / p (Davis 1992, Eq. A1.2).
    """
    return np.asarray(relative_humidity, dtype=float) * saturation_water_fraction(
        temperature_k, pressure_pa
    )


def _with_dry_part(dry_n2_o2_ar, co2, water):
    """Stack N2, O2, Ar (scaled to fill the dry remainder), CO2 and H2O into (..., 5) fractions."""
    co2 = np.asarray(co2, dtype=float)
    water = np.asarray(water, dtype=float)
    dry = np.asarray(dry_n2_o2_ar, dtype=float)
    dry = dry / dry.sum(axis=-1, keepdims=True)
    rest = ((1.0 - co2) * (1.0 - water))[..., None] * dry
    return np.concatenate([rest, (co2 * (1.0 - water))[..., None], water[..., None]], axis=-1)


def room_air(temperature_k, pressure_pa, relative_humidity, co2_fraction=K.DEFAULT_CO2_FRACTION):
    """Mole fractions (..., 5) of moist room air.

    The dry part is ISO 2533 dry air (:data:`drift.constants.DRY_AIR_N2_O2_AR`) with CO2 set to
    ``co2_fraction`` of the dry gas and N2, O2, Ar scaled to fill the rest; water vapour from
    :func:`water_fraction`; the dry part scales by (1 - x_w).
    """
    x_w = water_fraction(temperature_k, pressure_pa, relative_humidity)
    return _with_dry_part(K.DRY_AIR_N2_O2_AR, co2_fraction, x_w)


def breath_air(pressure_pa, breath: Breath = DEFAULT_BREATH):
    """Mole fractions (..., 5) of exhaled breath at pressure [Pa].

    Saturated with water at the breath temperature (:func:`saturation_water_fraction`); the dry
    part holds the breath's CO2 and O2, the rest N2 and Ar in the ratio of dry room air.
    """
    x_w = np.asarray(saturation_water_fraction(breath.temperature_k, pressure_pa))
    n2_ar = K.DRY_AIR_N2_O2_AR[[0, 2]] / K.DRY_AIR_N2_O2_AR[[0, 2]].sum()
    rest = 1.0 - breath.co2_fraction - breath.o2_fraction
    dry = np.array([n2_ar[0] * rest, breath.o2_fraction, n2_ar[1] * rest, breath.co2_fraction])
    return np.concatenate([(1.0 - x_w)[..., None] * dry, x_w[..., None]], axis=-1)


def mix(room_x, breath_x, breath_fraction, temperature_k, pressure_pa):
    """Mix breath into room air on a mole basis and cap water at saturation.

    x = (1 - phi) x_room + phi x_breath. Where the mixture holds more water than saturation at
    the local temperature allows (x_w > x_sat(T, p)), the excess condenses: x_w is set to x_sat
    and the dry part rescaled so the fractions sum to 1.

    Returns
    -------
    mole_fractions : ndarray (..., 5)
    condensed : ndarray of bool
        True where water was removed.
    """
    phi = np.asarray(breath_fraction, dtype=float)[..., None]
    x = (1.0 - phi) * np.asarray(room_x, dtype=float) + phi * np.asarray(breath_x, dtype=float)
    x_sat = saturation_water_fraction(temperature_k, pressure_pa)
    x = np.broadcast_to(x, np.broadcast_shapes(x.shape[:-1], np.shape(x_sat)) + (5,))
    condensed = x[..., 4] > x_sat * (1.0 + 1e-12)
    water = np.where(condensed, x_sat, x[..., 4])
    dry = x[..., :4] / x[..., :4].sum(axis=-1, keepdims=True)
    out = np.concatenate([dry * (1.0 - water)[..., None], water[..., None]], axis=-1)
    return out, condensed


# --------------------------------------------------------------------------------------------
# Real-gas properties
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class GasProperties:
    """Thermophysical properties of a gas, arrays of one shape.

    Attributes: sound_speed [m/s], density [kg/m^3], viscosity [Pa s], conductivity [W/(m K)],
    cp [J/(kg K)], gamma (cp/cv) [-], prandtl [-].
    """

    sound_speed: np.ndarray
    density: np.ndarray
    viscosity: np.ndarray
    conductivity: np.ndarray
    cp: np.ndarray
    gamma: np.ndarray
    prandtl: np.ndarray


@functools.cache
def _mixture_state():
    import CoolProp.CoolProp as CP

    state = CP.AbstractState("HEOS", "&".join(K.COOLPROP_FLUIDS))
    state.specify_phase(CP.iphase_gas)
    return state


@functools.lru_cache(maxsize=65536)
def _properties_at(temperature_k: float, pressure_pa: float, x: tuple) -> tuple:
    import CoolProp.CoolProp as CP

    state = _mixture_state()
    state.set_mole_fractions(list(x))
    state.update(CP.PT_INPUTS, pressure_pa, temperature_k)
    cp = state.cpmass()
    eta = state.viscosity()
    kappa = state.conductivity()
    return (state.speed_sound(), state.rhomass(), eta, kappa, cp, cp / state.cvmass(), cp * eta / kappa)


def gas_properties(temperature_k, pressure_pa, mole_fractions) -> GasProperties:
    """Real-gas properties of N2-O2-Ar-CO2-H2O mixtures.

    Speed of sound (thermodynamic, zero-frequency), density, cp and cv from the multi-fluid
    Helmholtz-energy mixture model of CoolProp's HEOS backend (Bell et al. 2014; pure fluids
    from their reference equations, IAPWS-95 for water); viscosity and thermal conductivity from
    CoolProp's mixture transport models. Gamma = cp/cv, Prandtl = cp eta / kappa.

    With the default source (:func:`set_property_source`) the values come from the shipped table
    of :mod:`drift.gas_table`, which reproduces CoolProp within 1e-6 relative over the allowed
    range (one deliberate difference in the conductivity of humid air below about 110 kPa and
    above 27 °C: see that module); with ``"coolprop"`` from CoolProp state by state, one
    AbstractState reused and repeated states served from a cache (state rounded to 1e-6 K,
    1e-3 Pa, 1e-12 mol/mol).

    Parameters
    ----------
    temperature_k, pressure_pa : array_like
        Temperature [K] and pressure [Pa], of one shape S.
    mole_fractions : array_like
        Mole fractions of N2, O2, Ar, CO2 and H2O, shape S + (5,).
    """
    t = np.asarray(temperature_k, dtype=float)
    p = np.asarray(pressure_pa, dtype=float)
    x = np.asarray(mole_fractions, dtype=float)
    shape = np.broadcast_shapes(t.shape, p.shape, x.shape[:-1])
    t = np.broadcast_to(t, shape).ravel()
    p = np.broadcast_to(p, shape).ravel()
    x = np.broadcast_to(x, shape + (5,)).reshape(-1, 5)
    check_range("temperature_c", t, offset=-K.ZERO_CELSIUS)
    check_range("pressure_kpa", p, scale=1e-3)
    if _source[0] == "table":
        from drift.gas_table import table_properties

        return GasProperties(*(np.reshape(v, shape) for v in table_properties(t, p, x)))
    # CoolProp cannot solve a mixture without both CO2 and water: a trace of 1e-12 stands in for
    # any smaller fraction (which the rounding of the cache key below would make zero).
    x = np.maximum(x, 1e-12)
    values = np.array(
        [
            _properties_at(round(ti, 6), round(pi, 3), tuple(np.round(xi, 12)))
            for ti, pi, xi in zip(t, p, x)
        ]
    ).reshape(shape + (7,))
    return GasProperties(*np.moveaxis(values, -1, 0))


@dataclass(frozen=True)
class AirState:
    """The gas at one or many points: its conditions, composition and properties.

    Attributes
    ----------
    temperature : ndarray [K]
    pressure : ndarray [Pa]
    mole_fractions : ndarray (..., 5) in the order N2, O2, Ar, CO2, H2O
    condensed : ndarray of bool, True where water was capped at saturation
    properties : GasProperties
    """

    temperature: np.ndarray
    pressure: np.ndarray
    mole_fractions: np.ndarray
    condensed: np.ndarray
    properties: GasProperties = field(repr=False)

    @property
    def relative_humidity(self):
        """Relative humidity [0-1] of the gas at its own temperature: x_w / x_sat(T, p)."""
        return self.mole_fractions[..., 4] / saturation_water_fraction(self.temperature, self.pressure)


def air_state(
    temperature_k,
    pressure_pa,
    room_temperature_k,
    room_relative_humidity,
    co2_fraction=K.DEFAULT_CO2_FRACTION,
    breath_fraction=0.0,
    breath: Breath = DEFAULT_BREATH,
) -> AirState:
    """The gas at local temperature(s) [K]: room air with a breath fraction mixed in.

    Room air has the water content of ``room_relative_humidity`` [0-1] at
    ``room_temperature_k`` [K] and CO2 ``co2_fraction`` [mol/mol] (:func:`room_air`); breath is
    :func:`breath_air`; the mixture with breath fraction phi [0-1] (mole basis) is taken to the
    local ``temperature_k`` and water capped at saturation there (:func:`mix`); properties from
    :func:`gas_properties`. ``temperature_k`` and ``breath_fraction`` may be arrays (for example one
    value per bore segment); the room values are scalars.
    """
    check_range("temperature_c", room_temperature_k, offset=-K.ZERO_CELSIUS)
    check_range("pressure_kpa", pressure_pa, scale=1e-3)
    check_range("relative_humidity_pct", room_relative_humidity, scale=100.0)
    check_range("co2_ppm", co2_fraction, scale=1e6)
    check_range("breath_fraction", breath_fraction)
    t = np.asarray(temperature_k, dtype=float)
    check_range("temperature_c", t, offset=-K.ZERO_CELSIUS)
    room_x = room_air(room_temperature_k, pressure_pa, room_relative_humidity, co2_fraction)
    x, condensed = mix(room_x, breath_air(pressure_pa, breath), breath_fraction, t, pressure_pa)
    shape = x.shape[:-1]
    t = np.broadcast_to(t, shape)
    p = np.broadcast_to(np.asarray(pressure_pa, dtype=float), shape)
    return AirState(t, p, x, condensed, gas_properties(t, p, x))


def air_properties(room: Room, breath_fraction=0.0, breath: Breath = DEFAULT_BREATH,
                   temperature_k=None) -> AirState:
    """Real-gas properties of the room air with a share of exhaled breath mixed in.

    Parameters
    ----------
    room : drift.climate.Room
        Temperature [K], pressure [Pa], relative humidity [0-1] and CO2 [mol/mol] of the room.
    breath_fraction : float or array_like
        Mole fraction of exhaled breath in the mixture [0-1].
    breath : drift.climate.Breath
        The exhaled breath (temperature, CO2 and O2 of its dry part).
    temperature_k : float or array_like, optional
        Temperature the mixture is taken to [K] (default: the room's); water beyond saturation
        there condenses (:func:`mix`).

    Returns
    -------
    AirState
        Conditions, mole fractions (N2, O2, Ar, CO2, H2O) and :class:`GasProperties` (speed of
        sound [m/s], density [kg/m^3], viscosity [Pa s], conductivity [W/(m K)], cp [J/(kg K)],
        gamma, Prandtl).

    Notes
    -----
    Composition from :func:`room_air`, :func:`breath_air` and :func:`mix`; properties from
    :func:`gas_properties` (CoolProp's HEOS mixture model, Bell et al. 2014).

    Examples
    --------
    >>> from drift import Room, air_properties
    >>> state = air_properties(Room(293.15, 101325.0, 0.5))
    >>> round(float(state.properties.sound_speed), 1)
    344.0
    """
    t = room.temperature_k if temperature_k is None else temperature_k
    return air_state(t, room.pressure_pa, room.temperature_k, room.relative_humidity, room.co2_fraction,
                     breath_fraction, breath)
