"""Climates: the room around the instrument and how it is being played.

A climate file (TOML, documented in docs/formats.md) gives the room air (temperature, humidity,
pressure or altitude, CO2) and the player (playing or resting, minutes played, breath). Bundled
climates live in ``climates/`` at the top of the repository, shipped in the wheel as the package
``drift.climates``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

from drift import air
from drift.constants import DEFAULT_CO2_FRACTION, STANDARD_PRESSURE, ZERO_CELSIUS
from drift.errors import InputFileError
from drift.files import Table, read_toml

TOP_KEYS = ("name", "description", "air", "player")
AIR_KEYS = ("temperature_c", "relative_humidity_pct", "pressure_kpa", "altitude_m", "co2_ppm")
PLAYER_KEYS = ("playing", "minutes_played", "breath_temperature_c", "breath_co2_pct", "breath_o2_pct")

#: Relative humidity assumed when a climate file gives none [0-1] (common practice for indoor air).
DEFAULT_RELATIVE_HUMIDITY = 0.5


@dataclass(frozen=True)
class Player:
    """How the instrument is being played.

    Attributes
    ----------
    playing : bool
        False: the instrument rests at room temperature, full of room air.
    minutes_played : float or None
        Minutes of playing from a cold start; None: played long enough to reach steady state.
    breath : air.Breath
    """

    playing: bool = True
    minutes_played: float | None = None
    breath: air.Breath = air.DEFAULT_BREATH


@dataclass(frozen=True)
class Climate:
    """A named condition: the room air and the player."""

    name: str
    room: air.Room
    player: Player = field(default_factory=Player)
    description: str = ""
    source: str = ""

    @property
    def temperature_c(self) -> float:
        return self.room.temperature_k - ZERO_CELSIUS



def _limits(name: str) -> dict:
    low, high, unit = air.LIMITS[name]
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
        pressure = float(air.pressure_from_altitude(air_table.number("altitude_m", **_limits("altitude_m"))))
    co2_ppm = air_table.number("co2_ppm", DEFAULT_CO2_FRACTION * 1e6, **_limits("co2_ppm"))
    room = air.Room(temperature_c + ZERO_CELSIUS, pressure, rh_pct / 100.0, co2_ppm * 1e-6)

    player_table = top.table("player", PLAYER_KEYS)
    default = air.DEFAULT_BREATH
    breath = air.Breath(
        temperature_k=player_table.number("breath_temperature_c", default.temperature_k - ZERO_CELSIUS,
                                          **_limits("temperature_c")) + ZERO_CELSIUS,
        co2_fraction=player_table.number("breath_co2_pct", default.co2_fraction * 100,
                                         **_limits("breath_co2_pct")) / 100,
        o2_fraction=player_table.number("breath_o2_pct", default.o2_fraction * 100,
                                        **_limits("breath_o2_pct")) / 100,
    )
    player = Player(
        playing=player_table.boolean("playing", True),
        minutes_played=player_table.number("minutes_played", None, low=0.0, high=600.0, unit="min"),
        breath=breath,
    )
    return Climate(name, room, player, description, str(path))


def _bundled_dir():
    """The folder of bundled climates: the installed package ``drift.climates``, or, when drift is
    imported from a source checkout, ``climates/`` beside the package."""
    try:
        folder = resources.files("drift.climates")
        if folder.is_dir():
            return folder
    except ModuleNotFoundError:
        pass
    return Path(__file__).resolve().parent.parent / "climates"


def bundled_climates() -> list[Climate]:
    """Every bundled climate, sorted by file name."""
    folder = _bundled_dir()
    files = sorted((f for f in folder.iterdir() if f.name.endswith(".toml")), key=lambda f: f.name)
    return [parse_climate(read_toml(f, "climate file"), f"climates/{f.name}") for f in files]


def load_climate(name_or_path: str) -> Climate:
    """A bundled climate by name, or a climate file by path."""
    candidate = Path(name_or_path)
    if candidate.suffix == ".toml" or candidate.exists():
        return parse_climate(read_toml(candidate, "climate file"), candidate)
    climates = {c.name: c for c in bundled_climates()}
    if name_or_path in climates:
        return climates[name_or_path]
    import difflib

    close = difflib.get_close_matches(name_or_path, list(climates), n=1)
    hint = f"; did you mean '{close[0]}'?" if close else ""
    raise InputFileError(
        f"climate '{name_or_path}' is neither a bundled climate nor a file{hint} "
        f"(bundled: {', '.join(climates)})"
    )


def climate_record(c: Climate) -> dict:
    """A climate as a flat dict in boundary units."""
    return {
        "name": c.name,
        "temperature_c": round(c.temperature_c, 3),
        "relative_humidity_pct": round(c.room.relative_humidity * 100, 3),
        "pressure_kpa": round(c.room.pressure_pa * 1e-3, 3),
        "co2_ppm": round(c.room.co2_fraction * 1e6, 1),
        "playing": c.player.playing,
        "minutes_played": c.player.minutes_played,
        "description": c.description,
    }
