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
ISO 2533:1975. Standard Atmosphere.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field, fields

import numpy as np

from drift import constants as K
from drift.errors import OutOfRangeError

#: Validity range of the air model, in boundary units: (low, high, unit label).
LIMITS = {
    "temperature_c": (-30.0, 60.0, "°C"),
    "pressure_kpa": (50.0, 110.0, "kPa"),
    "relative_humidity_pct": (0.0, 100.0, "%"),
    "co2_ppm": (0.0, 100_000.0, "ppm"),
    "breath_fraction": (0.0, 1.0, ""),
    "altitude_m": (-400.0, 5000.0, "m"),
    "breath_co2_pct": (0.0, 10.0, "%"),
    "breath_o2_pct": (5.0, 21.0, "%"),
}


def check_range(name: str, value, scale: float = 1.0, offset: float = 0.0) -> None:
    """Raise :class:`OutOfRangeError` if ``value*scale + offset`` leaves ``LIMITS[name]``.

    ``scale`` and ``offset`` turn an SI value into the boundary unit of ``name`` (for example
    ``offset=-273.15`` for a temperature in K checked against °C). NaN is out of range.
    """
    low, high, unit = LIMITS[name]
    shown = np.asarray(value, dtype=float) * scale + offset
    bad = ~((shown >= low - 1e-9) & (shown <= high + 1e-9))
    if np.any(bad):
        worst = np.atleast_1d(shown)[np.atleast_1d(bad)][0]
        label = name.replace("_", " ")
        raise OutOfRangeError(
            f"{label} {worst:g} {unit} is outside the allowed range {low:g} to {high:g} {unit}".strip()
        )


# --------------------------------------------------------------------------------------------
# Atmosphere and water vapour
# --------------------------------------------------------------------------------------------


def pressure_from_altitude(altitude_m):
    """Static pressure [Pa] of the ISO 2533 standard atmosphere at a geometric altitude [m].

    Troposphere layer: geopotential altitude H = r z / (r + z), then
    p = p0 (1 - L H / T0) ** (g0 / (R L)), with p0 = 101325 Pa, T0 = 288.15 K,
    L = 0.0065 K/m, g0 = 9.80665 m/s^2, R = 287.05287 J/(kg K) (ISO 2533:1975, Eqs. 8, 12).
    Valid here from -400 m to 5000 m.
    """
    z = np.asarray(altitude_m, dtype=float)
    check_range("altitude_m", z)
    h = K.EARTH_RADIUS * z / (K.EARTH_RADIUS + z)
    exponent = K.STANDARD_GRAVITY / (K.AIR_GAS_CONSTANT * K.LAPSE_RATE)
    return K.STANDARD_PRESSURE * (1.0 - K.LAPSE_RATE * h / K.STANDARD_TEMPERATURE) ** exponent


@functools.cache
def _water_state():
    import CoolProp.CoolProp as CP

    return CP.AbstractState("HEOS", "Water")


#: Grid of the saturation-pressure spline over liquid water [K]: 0 to 100 °C every 0.25 K.
_LIQUID_GRID_K = np.linspace(K.ZERO_CELSIUS, K.ZERO_CELSIUS + 100.0, 401)


@functools.cache
def _liquid_spline():
    """Cubic spline of ln p_sat over liquid water, fitted to IAPWS-95 values from CoolProp on
    :data:`_LIQUID_GRID_K`; it reproduces them to better than 1e-7 relative between the nodes
    (tests/test_air.py checks it against CoolProp at off-grid temperatures)."""
    import CoolProp.CoolProp as CP
    from scipy.interpolate import CubicSpline

    water = _water_state()
    values = []
    for t in _LIQUID_GRID_K:
        water.update(CP.QT_INPUTS, 0.0, float(t))
        values.append(water.p())
    return CubicSpline(_LIQUID_GRID_K, np.log(values))


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
    out[~cold] = np.exp(_liquid_spline()(flat[~cold]))
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


@dataclass(frozen=True)
class Breath:
    """Exhaled breath as it leaves the player.

    Defaults (from memory, textbook respiratory physiology, e.g. West, *Respiratory Physiology*):
    mixed expired gas near 16 % O2 and 4-5 % CO2 on a dry basis; exhaled air leaves the mouth
    near 34-35 °C, saturated with water vapour.

    Attributes
    ----------
    temperature_k : float
        Breath temperature [K] (default 308.15 K = 35 °C).
    co2_fraction : float
        CO2 in the dry part of the breath [mol/mol] (default 0.045).
    o2_fraction : float
        O2 in the dry part of the breath [mol/mol] (default 0.16).
    """

    temperature_k: float = 308.15
    co2_fraction: float = 0.045
    o2_fraction: float = 0.16

    def __post_init__(self):
        check_range("temperature_c", self.temperature_k, offset=-K.ZERO_CELSIUS)
        check_range("breath_co2_pct", self.co2_fraction, scale=100.0)
        check_range("breath_o2_pct", self.o2_fraction, scale=100.0)


DEFAULT_BREATH = Breath()


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
    """Real-gas properties of N2-O2-Ar-CO2-H2O mixtures, evaluated state by state.

    Speed of sound (thermodynamic, zero-frequency), density, cp and cv from the multi-fluid
    Helmholtz-energy mixture model of CoolProp's HEOS backend (Bell et al. 2014; pure fluids
    from their reference equations, IAPWS-95 for water); viscosity and thermal conductivity from
    CoolProp's mixture transport models. Gamma = cp/cv, Prandtl = cp eta / kappa.

    Inputs broadcast: ``temperature_k`` [K] and ``pressure_pa`` [Pa] of shape S, mole fractions of
    shape S + (5,). One AbstractState is reused, and repeated states are served from a cache
    (state rounded to 1e-6 K, 1e-3 Pa, 1e-12 mol/mol), so batches with repeated states are cheap.
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


# --------------------------------------------------------------------------------------------
# The room, and the gas along a bore
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Room:
    """The air around the instrument.

    Attributes: temperature_k [K], pressure_pa [Pa], relative_humidity [0-1],
    co2_fraction [mol/mol, of the dry air].
    """

    temperature_k: float
    pressure_pa: float = K.STANDARD_PRESSURE
    relative_humidity: float = 0.0
    co2_fraction: float = K.DEFAULT_CO2_FRACTION

    def __post_init__(self):
        check_range("temperature_c", self.temperature_k, offset=-K.ZERO_CELSIUS)
        check_range("pressure_kpa", self.pressure_pa, scale=1e-3)
        check_range("relative_humidity_pct", self.relative_humidity, scale=100.0)
        check_range("co2_ppm", self.co2_fraction, scale=1e6)


@dataclass(frozen=True)
class BoreProfile:
    """Air temperature, breath fraction and wall temperature sampled along a bore.

    This is what the thermal layer hands to the acoustics layer. Values between samples are
    interpolated linearly, and held constant beyond the first and last sample.

    Attributes
    ----------
    room : Room
    positions_m : ndarray (n,) [m] from the input end, ascending
    temperature_k : ndarray (n,) air temperature [K]
    breath_fraction : ndarray (n,) [0-1], mole fraction of breath in the bore air
    wall_temperature_k : ndarray (n,) [K]
    breath : Breath
    """

    room: Room
    positions_m: np.ndarray
    temperature_k: np.ndarray
    breath_fraction: np.ndarray
    wall_temperature_k: np.ndarray
    breath: Breath = DEFAULT_BREATH

    @classmethod
    def uniform(cls, room: Room, breath_fraction: float = 0.0, breath: Breath = DEFAULT_BREATH):
        """Air and wall at room temperature everywhere, with a uniform breath fraction."""
        t = np.array([room.temperature_k])
        return cls(room, np.array([0.0]), t, np.array([float(breath_fraction)]), t, breath)

    def _interp(self, values, positions_m):
        return np.interp(np.asarray(positions_m, dtype=float), self.positions_m, values)

    def wall_temperature_at(self, positions_m):
        """Wall temperature [K] at positions [m]."""
        return self._interp(self.wall_temperature_k, positions_m)

    @functools.cached_property
    def sampled_air(self) -> AirState:
        """The gas at the profile's own sample positions, through :func:`air_state` (computed once)."""
        return air_state(
            self.temperature_k,
            self.room.pressure_pa,
            self.room.temperature_k,
            self.room.relative_humidity,
            self.room.co2_fraction,
            np.clip(self.breath_fraction, 0.0, 1.0),
            self.breath,
        )

    def air_at(self, positions_m) -> AirState:
        """The gas (:class:`AirState`) at positions [m] along the bore.

        The real-gas state is computed once at the profile's samples (:attr:`sampled_air`) and its
        temperature, composition and properties are interpolated linearly to ``positions_m``. The
        properties are smooth in temperature and composition, so between samples a few
        centimetres and a kelvin or two apart this differs from a fresh evaluation by far less
        than the model's own uncertainty (tests/test_air.py bounds it), and moving positions (a
        joint change, an expanded bore) costs no new CoolProp states.
        """
        x = np.asarray(positions_m, dtype=float)
        s = self.sampled_air
        if self.positions_m.size == 1:
            def at(values):
                return np.broadcast_to(np.asarray(values)[0], x.shape).copy()
        else:
            def at(values):
                return np.interp(x, self.positions_m, values)
        props = GasProperties(*(at(getattr(s.properties, f.name)) for f in fields(GasProperties)))
        fractions = np.stack([at(s.mole_fractions[:, i]) for i in range(5)], axis=-1)
        return AirState(at(s.temperature), at(s.pressure), fractions, at(s.condensed.astype(float)) > 0.5,
                        props)


def state_record(state: AirState, breath_fraction: float = 0.0) -> dict:
    """One scalar :class:`AirState` as a flat dict in boundary units (the ``drift air`` JSON keys)."""
    props = state.properties
    x = np.asarray(state.mole_fractions, dtype=float)
    return {
        "temperature_c": float(state.temperature) - K.ZERO_CELSIUS,
        "pressure_kpa": float(state.pressure) * 1e-3,
        "relative_humidity_pct": float(state.relative_humidity) * 100.0,
        "breath_fraction": float(breath_fraction),
        "mole_fractions": {s: float(v) for s, v in zip(K.SPECIES, x)},
        "sound_speed_m_s": float(props.sound_speed),
        "density_kg_m3": float(props.density),
        "viscosity_pa_s": float(props.viscosity),
        "thermal_conductivity_w_m_k": float(props.conductivity),
        "heat_capacity_j_kg_k": float(props.cp),
        "heat_capacity_ratio": float(props.gamma),
        "prandtl_number": float(props.prandtl),
        "condensed": bool(state.condensed),
    }
