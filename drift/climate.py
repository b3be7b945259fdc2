"""Climates: the room around the instrument, the player, and the play/rest plan.

A climate file (TOML, documented in docs/formats.md) gives the room air (temperature, humidity,
pressure or altitude, CO2) and the player (playing or resting, minutes played, breath). Bundled
climates live in ``climates/`` at the top of the repository, shipped in the wheel as the package
``drift.climates``. This module also holds the ISO 2533 standard atmosphere (pressure from
altitude), the player's breath and blowing, and play/rest plans.

References
----------
ISO 2533:1975. Standard Atmosphere.
"""

from __future__ import annotations

import bisect
import dataclasses
import math
from dataclasses import dataclass, field, fields
from pathlib import Path
from typing import Sequence

import numpy as np

from drift import constants as K
from drift.constants import DEFAULT_CO2_FRACTION, LIMITS, STANDARD_PRESSURE, ZERO_CELSIUS
from drift.errors import InputFileError, OutOfRangeError, check_range
from drift.files import Table, bundled_files, bundled_folder, bundled_text, load_named, read_toml

TOP_KEYS = ("name", "description", "air", "player", "change")
AIR_KEYS = ("temperature_c", "relative_humidity_pct", "pressure_kpa", "altitude_m", "co2_ppm", "sun_w_m2",
            "wind_m_s")
#: The keys of a later condition (``[[change]]``); each one absent keeps the value before it.
CHANGE_KEYS = ("minute", "temperature_c", "relative_humidity_pct", "pressure_kpa", "sun_w_m2", "wind_m_s")
PLAYER_KEYS = ("playing", "minutes_played", "breath_temperature_c", "breath_co2_pct", "breath_o2_pct",
               "player_file")
#: Keys of a player file (``drift fit --write-player``); its ``[fit]`` table records the fit.
PLAYER_FILE_KEYS = ("name", "description", "breath_flow_l_s", "breath_temperature_c", "heat_exchange_factor",
                    "fit")
PLAYER_FIT_KEYS = ("instrument", "climate", "log", "readings", "rms_cents", "offset_cents",
                   "breath_flow_sd_l_s", "breath_temperature_sd_c", "heat_exchange_factor_sd")
#: Largest heat-exchange factor a player file may give [-].
LARGEST_HEAT_FACTOR = 100.0

#: Relative humidity assumed when a climate file gives none [0-1] (common practice for indoor air).
DEFAULT_RELATIVE_HUMIDITY = 0.5


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


def altitude_from_pressure(pressure_pa):
    """Geometric altitude [m] of the ISO 2533 standard atmosphere at a static pressure [Pa]: the
    inverse of :func:`pressure_from_altitude` (same equations and constants, solved for the
    altitude: H = T0 / L (1 - (p / p0) ** (R L / g0)), z = r H / (r - H)). Not range-checked: a
    pressure above sea level's gives a negative altitude."""
    p = np.asarray(pressure_pa, dtype=float)
    exponent = K.AIR_GAS_CONSTANT * K.LAPSE_RATE / K.STANDARD_GRAVITY
    h = K.STANDARD_TEMPERATURE / K.LAPSE_RATE * (1.0 - (p / K.STANDARD_PRESSURE) ** exponent)
    return K.EARTH_RADIUS * h / (K.EARTH_RADIUS - h)


@dataclass(frozen=True)
class Room:
    """The air around the instrument, and outdoors the sun and wind on it.

    Attributes: temperature_k [K], pressure_pa [Pa], relative_humidity [0-1],
    co2_fraction [mol/mol, of the dry air], sun_w_m2 (sunshine on the instrument, measured on a
    surface facing the sun [W/m^2]; 0 in the shade or indoors), wind_m_s (wind speed [m/s]; 0 in
    still air).
    """

    temperature_k: float
    pressure_pa: float = K.STANDARD_PRESSURE
    relative_humidity: float = 0.0
    co2_fraction: float = K.DEFAULT_CO2_FRACTION
    sun_w_m2: float = 0.0
    wind_m_s: float = 0.0

    def __post_init__(self):
        check_range("temperature_c", self.temperature_k, offset=-K.ZERO_CELSIUS)
        check_range("pressure_kpa", self.pressure_pa, scale=1e-3)
        check_range("relative_humidity_pct", self.relative_humidity, scale=100.0)
        check_range("co2_ppm", self.co2_fraction, scale=1e6)
        check_range("sun_w_m2", self.sun_w_m2)
        check_range("wind_m_s", self.wind_m_s)

    @property
    def temperature_c(self) -> float:
        return self.temperature_k - ZERO_CELSIUS


@dataclass(frozen=True)
class Weather:
    """Conditions that change in time: the room at given times, linear in between.

    Attributes
    ----------
    times_s : tuple of float
        Ascending times [s] from the start of the plan, the first 0.
    rooms : tuple of Room
        The room at each time. Between two times every quantity (temperature, pressure, humidity,
        CO2, sun, wind) is interpolated linearly in time; after the last time it is held.
    """

    times_s: tuple[float, ...]
    rooms: tuple[Room, ...]

    def __post_init__(self):
        t = self.times_s
        if len(t) != len(self.rooms) or not t or t[0] != 0.0 or any(b <= a for a, b in zip(t[:-1], t[1:])):
            raise OutOfRangeError("weather times must start at 0 and increase, one room per time")

    @classmethod
    def steady(cls, room: Room) -> "Weather":
        """The same room all the time."""
        return cls((0.0,), (room,))

    def bracket(self, time_s: float) -> tuple[int, float]:
        """(i, w): the room at ``time_s`` [s] is rooms[i] + w (rooms[i + 1] - rooms[i]), 0 <= w < 1
        (w = 0 before the first and after the last time)."""
        t = self.times_s
        if time_s <= t[0] or len(t) == 1:
            return 0, 0.0
        if time_s >= t[-1]:
            return len(t) - 1, 0.0
        i = bisect.bisect_right(t, time_s) - 1
        return i, (time_s - t[i]) / (t[i + 1] - t[i])

    def room_at(self, time_s: float) -> Room:
        """The room at a time [s]: linear between the given times, held after the last."""
        i, w = self.bracket(float(time_s))
        if w == 0.0:
            return self.rooms[i]
        a, b = self.rooms[i], self.rooms[i + 1]
        return Room(*(getattr(a, f.name) + w * (getattr(b, f.name) - getattr(a, f.name)) for f in fields(Room)))


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


@dataclass(frozen=True)
class Blowing:
    """How the instrument is blown and held: the breath flow through the bore while playing, how
    breath leaves it during rests, and the air moving past its outside.

    Attributes
    ----------
    flow_m3_s : float
        Mean volume flow of breath into the bore while playing [m^3/s], at the breath's
        temperature, averaged over the playing time (breaths included).
    inlet_breath_fraction : float
        Mole fraction of breath in the gas entering the bore [0-1]: 1 for reeds and lips; less for
        a jet, whose bore draws in room air entrained by the jet.
    exchange_time_s : float
        Time constant [s] with which breath gas in a resting bore gives way to room air.
    heat_transfer_factor : float
        Multiplier [-] on the internal convection coefficient (1 = the steady-flow correlations).
    air_speed_m_s : float
        Speed of the room air across the outside of the instrument [m/s]: draughts plus the
        instrument's own motion in the player's hands (0 = still air, natural convection only).
    """

    flow_m3_s: float
    inlet_breath_fraction: float = 1.0
    exchange_time_s: float = 30.0
    heat_transfer_factor: float = 1.0
    air_speed_m_s: float = 0.1

    def __post_init__(self):
        if not (0.0 <= self.flow_m3_s <= 10e-3) or not math.isfinite(self.flow_m3_s):
            raise OutOfRangeError(
                f"breath flow {self.flow_m3_s * 1e3:g} L/s is outside the allowed range 0 to 10 L/s")
        if not 0.0 <= self.inlet_breath_fraction <= 1.0:
            raise OutOfRangeError(
                f"inlet breath fraction {self.inlet_breath_fraction:g} is outside the allowed range 0 to 1")
        if not self.exchange_time_s > 0.0:
            raise OutOfRangeError("breath exchange time must be positive")
        if not self.heat_transfer_factor > 0.0:
            raise OutOfRangeError("heat transfer factor must be positive")
        if not 0.0 <= self.air_speed_m_s <= 20.0:
            raise OutOfRangeError(
                f"air speed {self.air_speed_m_s:g} m/s is outside the allowed range 0 to 20 m/s")


#: Default blowing by excitation (estimates; see docs/physics.md, "Thermal state"). Reed and lips
#: send their whole flow down the bore; players' flows while sounding are of order 0.1-0.3 L/s
#: (Bouhuys 1965, J. Acoust. Soc. Am. 37, 453-456, measured flows of this order on woodwind and
#: brass players; from memory). The defaults are means over the playing time, breaths and short
#: rests included: 0.10 L/s for a reed, 0.15 L/s for lips. A jet blows most of its breath (order
#: 0.3 L/s) across the embouchure hole into the room; its bore sees a small net through-flow, taken
#: as 0.03 L/s, half of it entrained room air (estimates). The 30 s exchange time and the 0.1 m/s
#: air speed are justified in docs/physics.md.
DEFAULT_BLOWING = {
    "reed": Blowing(flow_m3_s=0.10e-3),
    "lips": Blowing(flow_m3_s=0.15e-3),
    "jet": Blowing(flow_m3_s=0.03e-3, inlet_breath_fraction=0.5),
}


def default_blowing(excitation: str) -> Blowing:
    """The default :class:`Blowing` of an excitation ('reed', 'lips' or 'jet')."""
    if excitation not in DEFAULT_BLOWING:
        raise InputFileError(f"excitation '{excitation}' is not allowed; use one of: reed, lips, jet")
    return DEFAULT_BLOWING[excitation]


PHASES = ("play", "rest")


@dataclass(frozen=True)
class Phase:
    """One part of a plan: playing or resting for a duration [s]."""

    state: str
    duration_s: float

    def __post_init__(self):
        if self.state not in PHASES:
            raise OutOfRangeError(f"plan state '{self.state}' is not allowed; use play or rest")
        if not (0.0 < self.duration_s <= K.LONGEST_PLAN_S):
            raise OutOfRangeError(
                f"plan duration {self.duration_s / 60.0:g} min is outside the allowed range "
                f"(more than 0, at most {K.LONGEST_PLAN_S / 60:g} min)")


def parse_plan(text: str) -> tuple[Phase, ...]:
    """Parse a plan such as ``"play:10,rest:3,play:5"`` (durations in minutes) into phases."""
    phases = []
    for part in (p.strip() for p in text.split(",")):
        state, sep, minutes = part.partition(":")
        state = state.strip().lower()
        if not sep or state not in PHASES:
            raise OutOfRangeError(
                f"plan part '{part}' is not of the form play:MINUTES or rest:MINUTES")
        try:
            value = float(minutes)
        except ValueError:
            raise OutOfRangeError(
                f"plan part '{part}': '{minutes.strip()}' is not a number of minutes") from None
        phases.append(Phase(state, value * 60.0))
    return tuple(phases)


def plan_duration_s(plan: Sequence[Phase]) -> float:
    """Total duration of a plan [s]."""
    return float(sum(p.duration_s for p in plan))


@dataclass(frozen=True)
class Player:
    """How the instrument is being played.

    Attributes
    ----------
    playing : bool
        False: the instrument rests at room temperature, full of room air.
    minutes_played : float or None
        Minutes of playing from a cold start; None: played long enough to reach steady state.
    breath : Breath
    flow_m3_s : float or None
        Mean breath flow into the bore while playing [m^3/s] (a player file's); None: the
        excitation's default (:data:`DEFAULT_BLOWING`).
    heat_transfer_factor : float
        Multiplier [-] on the bore's internal heat exchange (a player file's; default 1).
    """

    playing: bool = True
    minutes_played: float | None = None
    breath: Breath = DEFAULT_BREATH
    flow_m3_s: float | None = None
    heat_transfer_factor: float = 1.0

    def blowing(self, excitation: str) -> Blowing:
        """The excitation's default :class:`Blowing` with this player's breath flow and heat
        exchange factor."""
        base = default_blowing(excitation)
        flow = base.flow_m3_s if self.flow_m3_s is None else self.flow_m3_s
        if (flow, self.heat_transfer_factor) == (base.flow_m3_s, base.heat_transfer_factor):
            return base
        return dataclasses.replace(base, flow_m3_s=flow, heat_transfer_factor=self.heat_transfer_factor)


@dataclass(frozen=True)
class Climate:
    """A named condition: the room air and the player, and how the air changes over a plan.

    ``room`` is the condition at the start (minute 0); ``weather``, when the file lists later
    conditions (``[[change]]``), the room in time (:class:`Weather`), else None.
    """

    name: str
    room: Room
    player: Player = field(default_factory=Player)
    description: str = ""
    source: str = ""
    weather: Weather | None = None

    @property
    def temperature_c(self) -> float:
        return self.room.temperature_k - ZERO_CELSIUS

    def schedule(self) -> Weather:
        """The room in time: the ``weather``, or the one room held."""
        return self.weather or Weather.steady(self.room)


def _limits(name: str) -> dict:
    low, high, unit = LIMITS[name]
    return {"low": low, "high": high, "unit": unit}


def parse_climate(data: dict, path: str | Path) -> Climate:
    """Build a :class:`Climate` from a parsed climate file; bad keys or values raise InputFileError."""
    top = Table(data, path, "", TOP_KEYS)
    name = top.string("name", required=True)
    description = top.string("description", default="")
    air_table = top.table("air", AIR_KEYS, required=True)
    temperature_c = air_table.number("temperature_c", required=True, **_limits("temperature_c"))
    rh_pct = air_table.number("relative_humidity_pct", DEFAULT_RELATIVE_HUMIDITY * 100,
                              **_limits("relative_humidity_pct"))
    if air_table.has("pressure_kpa") and air_table.has("altitude_m"):
        air_table.fail("altitude_m", "and pressure_kpa exclude each other; give one of them")
    pressure = STANDARD_PRESSURE
    if air_table.has("pressure_kpa"):
        pressure = air_table.number("pressure_kpa", **_limits("pressure_kpa")) * 1e3
    elif air_table.has("altitude_m"):
        pressure = float(pressure_from_altitude(air_table.number("altitude_m", **_limits("altitude_m"))))
    co2_ppm = air_table.number("co2_ppm", DEFAULT_CO2_FRACTION * 1e6, **_limits("co2_ppm"))
    sun = air_table.number("sun_w_m2", 0.0, **_limits("sun_w_m2"))
    wind = air_table.number("wind_m_s", 0.0, **_limits("wind_m_s"))
    room = Room(temperature_c + ZERO_CELSIUS, pressure, rh_pct / 100.0, co2_ppm * 1e-6, sun, wind)
    weather = _parse_changes(top, room)

    player_table = top.table("player", PLAYER_KEYS)
    default = DEFAULT_BREATH
    breath_c = player_table.number("breath_temperature_c", default.temperature_k - ZERO_CELSIUS,
                                   **_limits("temperature_c"))
    fitted = {}
    if player_table.has("player_file"):
        if player_table.has("breath_temperature_c"):
            player_table.fail("player_file", "and breath_temperature_c exclude each other; the player file "
                                             "gives the breath temperature")
        name = player_table.string("player_file")
        try:
            fitted = load_player_file(Path(path).parent / name)
        except InputFileError as error:
            player_table.fail("player_file", f"= '{name}' cannot be used: {error}")
    breath = Breath(
        temperature_k=fitted.get("breath_temperature_k", breath_c + ZERO_CELSIUS),
        co2_fraction=player_table.number("breath_co2_pct", default.co2_fraction * 100,
                                         **_limits("breath_co2_pct")) / 100,
        o2_fraction=player_table.number("breath_o2_pct", default.o2_fraction * 100,
                                        **_limits("breath_o2_pct")) / 100,
    )
    player = Player(
        playing=player_table.boolean("playing", True),
        minutes_played=player_table.number("minutes_played", None, low=0.0, high=K.LONGEST_PLAN_S / 60,
                                           unit="min"),
        breath=breath,
        flow_m3_s=fitted.get("flow_m3_s"),
        heat_transfer_factor=fitted.get("heat_transfer_factor", 1.0),
    )
    return Climate(name, room, player, description, str(path), weather)


def _parse_changes(top: Table, room: Room) -> Weather | None:
    """The ``[[change]]`` list: later conditions by minute, each key absent keeping its value."""
    changes = top.tables("change", CHANGE_KEYS)
    if not changes:
        return None
    times, rooms = [0.0], [room]
    for change in changes:
        minute = change.number("minute", required=True, low=0.0, high=K.LONGEST_PLAN_S / 60, unit="min")
        if minute * 60.0 <= times[-1]:
            change.fail("minute", f"= {minute:g} must be later than the condition before it "
                                  f"({times[-1] / 60.0:g} min)")
        last = rooms[-1]
        values = {}
        for key, attribute, scale, offset in (("temperature_c", "temperature_k", 1.0, ZERO_CELSIUS),
                                              ("relative_humidity_pct", "relative_humidity", 0.01, 0.0),
                                              ("pressure_kpa", "pressure_pa", 1e3, 0.0),
                                              ("sun_w_m2", "sun_w_m2", 1.0, 0.0),
                                              ("wind_m_s", "wind_m_s", 1.0, 0.0)):
            value = change.number(key, None, **_limits(key))
            values[attribute] = getattr(last, attribute) if value is None else value * scale + offset
        times.append(minute * 60.0)
        rooms.append(dataclasses.replace(last, **values))
    return Weather(tuple(times), tuple(rooms))


def load_player_file(path: str | Path) -> dict:
    """The values of a player file (docs/formats.md, written by ``drift fit --write-player``):
    ``flow_m3_s`` [m^3/s], ``breath_temperature_k`` [K] and ``heat_transfer_factor`` [-]. Its
    ``[fit]`` table (how the values were fitted) is checked for known keys and not used."""
    top = Table(read_toml(path, "player file"), path, "", PLAYER_FILE_KEYS)
    top.string("name", default="")
    top.string("description", default="")
    top.table("fit", PLAYER_FIT_KEYS)
    return {
        "flow_m3_s": top.number("breath_flow_l_s", required=True, low=0.0, high=10.0, unit="L/s") * 1e-3,
        "breath_temperature_k": top.number("breath_temperature_c", required=True,
                                           **_limits("temperature_c")) + ZERO_CELSIUS,
        "heat_transfer_factor": top.number("heat_exchange_factor", required=True, low=1e-3,
                                           high=LARGEST_HEAT_FACTOR),
    }


def _bundled_dir():
    """The folder of the bundled climates (``climates/`` beside the package in a source checkout)."""
    return bundled_folder("drift.climates", Path(__file__).resolve().parent.parent / "climates")


def bundled_climate_text(name: str) -> str:
    """The file of a bundled climate as text (docs/formats.md): a start for one's own."""
    return bundled_text(name, _bundled_dir(), "climate")


def bundled_climates() -> list[Climate]:
    """Every bundled climate (invented demonstration conditions), sorted by name.

    Examples
    --------
    >>> from drift import bundled_climates
    >>> [c.name for c in bundled_climates()][:3]
    ['cold-rehearsal', 'cooled-hall', 'frozen-parade']
    """
    files = bundled_files(_bundled_dir())
    return [load_climate(name) for name in sorted(files)]


def load_climate(source: str | Path) -> Climate:
    """A climate by bundled name (see :func:`bundled_climates`) or by path to a climate file.

    Parameters
    ----------
    source : str or path
        A bundled name, or the path of a climate file (docs/formats.md).

    Returns
    -------
    Climate
        The room (SI units) and the player.

    Raises
    ------
    drift.errors.InputFileError
        For unknown names (with a did-you-mean suggestion and the bundled names) and for any
        bad key or value, naming the file and the key.

    Examples
    --------
    >>> from drift import load_climate
    >>> church = load_climate("winter-church")
    >>> round(church.room.temperature_k - 273.15, 1)
    9.0
    """
    data, label = load_named(source, _bundled_dir(), "climates", "climate")
    return parse_climate(data, label)
