"""Climates (drift.climate): climate files, bundled scenarios, the standard atmosphere, the room,
the breath, blowing and play/rest plans."""

import pytest

from drift import climate
from drift.errors import DriftError, InputFileError, OutOfRangeError


def test_bundled_climates_cover_the_scenarios():
    climates = climate.bundled_climates()
    assert len(climates) >= 8
    assert all(c.description for c in climates)
    by_name = {c.name: c for c in climates}
    assert by_name["winter-church"].temperature_c < 12
    assert by_name["sunny-lawn"].temperature_c > 30
    assert by_name["tent-evening"].room.relative_humidity > 0.85
    assert by_name["frozen-parade"].temperature_c < 0
    assert by_name["cold-rehearsal"].player.playing is False
    # 1800-2500 m through ISO 2533: between 74.7 and 81.5 kPa.
    assert 74.7e3 < by_name["mountain-festival"].room.pressure_pa < 81.5e3


def test_minimal_file_takes_documented_defaults(write_toml):
    c = climate.load_climate(str(write_toml('name = "x"\n[air]\ntemperature_c = 12.5\n')))
    assert c.room.temperature_k == pytest.approx(285.65)
    assert c.room.pressure_pa == pytest.approx(101325.0)
    assert c.room.relative_humidity == pytest.approx(0.5)
    assert c.room.co2_fraction == pytest.approx(420e-6)
    assert c.player.playing is True and c.player.minutes_played is None
    assert c.player.breath == climate.DEFAULT_BREATH


def test_altitude_and_breath_overrides(outside, write_toml):
    text = ('name = "x"\n[air]\ntemperature_c = 10\naltitude_m = 1000\n'
            '[player]\nminutes_played = 5\nbreath_temperature_c = 33\nbreath_co2_pct = 5\n')
    c = climate.load_climate(str(write_toml(text)))
    # ISO 2533 at 1000 m: 89.876 kPa.
    outside.check(c.room.pressure_pa, 89876.0, quantity="pressure of a climate file at altitude 1000 m",
                  source="ISO 2533:1975 table value (from memory)", abs=2.0, unit="Pa")
    assert c.player.minutes_played == 5
    assert c.player.breath.temperature_k == pytest.approx(306.15)
    assert c.player.breath.co2_fraction == pytest.approx(0.05)


@pytest.mark.parametrize("text, needle", [
    ('name = "x"\n[air]\ntemprature_c = 10\n', "did you mean 'temperature_c'"),
    ('name = "x"\n[air]\ntemperature_c = 90\n', "[air] temperature_c = 90 is outside the allowed range -30 to 60"),
    ('name = "x"\n[air]\ntemperature_c = "warm"\n', "[air] temperature_c must be a number"),
    ('name = "x"\n[air]\ntemperature_c = 10\npressure_kpa = 100\naltitude_m = 10\n', "exclude each other"),
    ('[air]\ntemperature_c = 10\n', "name is missing"),
    ('name = "x"\n', "[air] is missing"),
    ('name = "x"\n[air]\ntemperature_c = 10\nrelative_humidity_pct = 120\n', "relative_humidity_pct"),
    ('name = "x"\n[air]\ntemperature_c = 10\n[player]\nplaying = "yes"\n', "[player] playing must be true or false"),
    ('name = "x"\ncolour = "red"\n[air]\ntemperature_c = 10\n', "colour is not a known key"),
    ('name = "x"\n[air\n', "not valid TOML"),
])
def test_bad_files_name_file_and_key(write_toml, text, needle):
    path = write_toml(text, "c.toml")
    with pytest.raises(InputFileError) as info:
        climate.load_climate(str(path))
    assert str(path) in str(info.value)
    assert needle in str(info.value)


def test_unknown_bundled_name_suggests():
    with pytest.raises(InputFileError, match="did you mean 'winter-church'") as info:
        climate.load_climate("winter-chruch")
    assert str(info.value).startswith("unknown climate 'winter-chruch'")
    assert "Bundled: cold-rehearsal, " in str(info.value)
    assert str(info.value).endswith("or give the path of a .toml file")


def test_iso_2533_pressures(outside):
    """ISO 2533:1975 (identical to the U.S. Standard Atmosphere 1976 below 11 km): 89 876 Pa at
    1000 m and 79 501 Pa at 2000 m geometric altitude (table values, from memory)."""
    outside.check(climate.pressure_from_altitude([1000.0, 2000.0]), [89876.0, 79501.0],
                  quantity="standard-atmosphere pressure at 1000 and 2000 m geometric altitude",
                  source="ISO 2533:1975 / U.S. Standard Atmosphere 1976 tables (from memory)", abs=2.0, unit="Pa")
    outside.check(float(climate.pressure_from_altitude(0.0)), 101325.0,
                  quantity="standard-atmosphere pressure at sea level", source="ISO 2533:1975 (from memory)",
                  rel=1e-6, unit="Pa")


def test_altitude_from_pressure_iso_2533(outside):
    """The same ISO 2533:1975 table values read backwards (89 876 Pa at 1000 m, 79 501 Pa at
    2000 m, from memory; 2 Pa is about 0.2 m there), and sea level at 101 325 Pa."""
    outside.check(climate.altitude_from_pressure([89876.0, 79501.0]), [1000.0, 2000.0], quantity="altitude "
                  "from the standard-atmosphere pressure", source="ISO 2533:1975 table values (from memory)", abs=0.3,
                  unit="m")
    assert float(climate.altitude_from_pressure(101325.0)) == pytest.approx(0.0, abs=1e-6)


def test_altitude_range():
    with pytest.raises(OutOfRangeError, match="altitude"):
        climate.pressure_from_altitude(9000.0)


@pytest.mark.parametrize("kwargs, needle", [
    ({"temperature_k": 400.0}, "temperature"),
    ({"temperature_k": 293.15, "pressure_pa": 20e3}, "pressure"),
    ({"temperature_k": 293.15, "relative_humidity": 1.5}, "relative humidity"),
    ({"temperature_k": 293.15, "co2_fraction": 0.2}, "co2"),
    ({"temperature_k": float("nan")}, "temperature"),
])
def test_room_refuses_conditions_outside_the_model(kwargs, needle):
    with pytest.raises(OutOfRangeError, match=needle):
        climate.Room(**kwargs)


@pytest.mark.parametrize("kwargs, needle", [
    ({"temperature_k": 350.0}, "temperature"),
    ({"co2_fraction": 0.2}, "breath co2"),
    ({"o2_fraction": 0.25}, "breath o2"),
])
def test_breath_refuses_conditions_outside_the_model(kwargs, needle):
    with pytest.raises(OutOfRangeError, match=needle):
        climate.Breath(**kwargs)


def test_parse_plan():
    plan = climate.parse_plan("play:10, rest:2.5,PLAY:5")
    assert [(p.state, p.duration_s) for p in plan] == [("play", 600.0), ("rest", 150.0), ("play", 300.0)]
    assert climate.plan_duration_s(plan) == 1050.0


@pytest.mark.parametrize("text, needle", [
    ("play10", "play:MINUTES"), ("sing:3", "play:MINUTES"), ("play:x", "not a number"),
    ("play:0", "allowed range"), ("rest:-1", "allowed range"), ("play:1000", "allowed range"),
    ("play:nan", "allowed range"),
])
def test_bad_plans_are_explained(text, needle):
    with pytest.raises(DriftError, match=needle):
        climate.parse_plan(text)


@pytest.mark.parametrize("kwargs, needle", [
    ({"flow_m3_s": -1e-4}, "breath flow"), ({"flow_m3_s": 1.0}, "breath flow"),
    ({"flow_m3_s": 1e-4, "inlet_breath_fraction": 2.0}, "inlet breath"),
    ({"flow_m3_s": 1e-4, "exchange_time_s": 0.0}, "exchange"),
    ({"flow_m3_s": 1e-4, "air_speed_m_s": -1.0}, "air speed"),
    ({"flow_m3_s": float("nan")}, "breath flow"),
])
def test_bad_blowing_is_refused(kwargs, needle):
    with pytest.raises(OutOfRangeError, match=needle):
        climate.Blowing(**kwargs)


def test_default_blowing_by_excitation():
    # Reed and lips send all their breath down the bore, a jet a little, half of it room air
    # (the estimates documented beside DEFAULT_BLOWING).
    assert climate.default_blowing("reed").inlet_breath_fraction == 1.0
    assert climate.default_blowing("lips").flow_m3_s > climate.default_blowing("reed").flow_m3_s
    jet = climate.default_blowing("jet")
    assert jet.inlet_breath_fraction == 0.5 and jet.flow_m3_s < climate.default_blowing("reed").flow_m3_s
    with pytest.raises(InputFileError, match="reed, lips, jet"):
        climate.default_blowing("bow")


#: A player file as ``drift fit --write-player`` writes it (docs/formats.md).
PLAYER_FILE = """name = "me"
breath_flow_l_s = 0.12
breath_temperature_c = 33.5
heat_exchange_factor = 1.4
[fit]
readings = 12
rms_cents = 0.6
"""


def test_player_file_gives_breath_flow_and_heat_exchange(write_toml):
    write_toml(PLAYER_FILE, "me.toml")
    c = climate.load_climate(str(write_toml('name = "x"\n[air]\ntemperature_c = 18\n'
                                            '[player]\nplayer_file = "me.toml"\n', "room.toml")))
    assert c.player.breath.temperature_k == pytest.approx(306.65)
    assert c.player.breath.co2_fraction == climate.DEFAULT_BREATH.co2_fraction
    blowing = c.player.blowing("jet")
    assert blowing.flow_m3_s == pytest.approx(0.12e-3)
    assert blowing.heat_transfer_factor == pytest.approx(1.4)
    # The excitation's other values stay (a jet's half-breath inlet).
    assert blowing.inlet_breath_fraction == climate.default_blowing("jet").inlet_breath_fraction
    # Without a player file, the excitation's default blowing.
    assert climate.Player().blowing("reed") == climate.default_blowing("reed")


@pytest.mark.parametrize("player, needle", [
    ('player_file = "me.toml"\nbreath_temperature_c = 30\n', "exclude each other"),
    ('player_file = "missing.toml"\n', "no such player file"),
    ('player_file = "bad.toml"\n', "breath_flow_l_s = 20 is outside the allowed range 0 to 10 L/s"),
    ('player_file = "odd.toml"\n', "flow_rate is not a known key"),
])
def test_bad_player_files_are_named(write_toml, player, needle):
    write_toml(PLAYER_FILE, "me.toml")
    write_toml(PLAYER_FILE.replace("0.12", "20"), "bad.toml")
    write_toml(PLAYER_FILE.replace('name = "me"', "flow_rate = 1"), "odd.toml")
    path = write_toml(f'name = "x"\n[air]\ntemperature_c = 18\n[player]\n{player}', "room.toml")
    with pytest.raises(InputFileError, match=needle.replace("(", r"\(")) as info:
        climate.load_climate(str(path))
    # the climate file and its key come first, then the player file's own message
    assert str(info.value).startswith(f"{path}: [player] player_file ")


CHANGING = '''name = "evening"
[air]
temperature_c = 29
relative_humidity_pct = 60
altitude_m = 800
sun_w_m2 = 400
wind_m_s = 2
[[change]]
minute = 30
temperature_c = 25
sun_w_m2 = 0
[[change]]
minute = 90
relative_humidity_pct = 80
'''


def test_later_conditions_are_linear_in_time_and_held_after_the_last(write_toml):
    c = climate.load_climate(str(write_toml(CHANGING)))
    w = c.weather
    assert w.times_s == (0.0, 1800.0, 5400.0)
    # A key left out keeps the value before it (pressure from the altitude, wind, humidity).
    assert w.rooms[1].pressure_pa == c.room.pressure_pa and w.rooms[1].wind_m_s == 2.0
    assert w.rooms[1].relative_humidity == 0.6 and w.rooms[2].temperature_k == w.rooms[1].temperature_k
    # Halfway through the first change, by hand: 27 °C, 200 W/m2; a third into the second: 60 + 20/3 %.
    mid = w.room_at(900.0)
    assert mid.temperature_k == pytest.approx(300.15, abs=1e-12) and mid.sun_w_m2 == pytest.approx(200.0)
    assert w.room_at(3000.0).relative_humidity == pytest.approx(0.6 + 0.2 / 3)
    assert w.room_at(10 * 3600.0) == w.rooms[-1] and w.room_at(0.0) == c.room
    assert c.schedule() is w


def test_a_climate_without_changes_has_no_weather(write_toml):
    c = climate.load_climate(str(write_toml('name = "x"\n[air]\ntemperature_c = 12.5\n')))
    assert c.weather is None and c.schedule().rooms == (c.room,)
    assert c.room.sun_w_m2 == 0.0 and c.room.wind_m_s == 0.0


def test_bundled_evening_cools_after_sunset():
    evening = climate.load_climate("hillside-evening")
    rooms = evening.weather.rooms
    assert rooms[0].sun_w_m2 > 0 and rooms[-1].sun_w_m2 == 0
    assert [r.temperature_k for r in rooms] == sorted((r.temperature_k for r in rooms), reverse=True)


@pytest.mark.parametrize("extra, needle", [
    ('[[change]]\ntemperature_c = 20\n', "[[change]] #1 minute is missing"),
    ('[[change]]\nminute = 30\n[[change]]\nminute = 30\n', "[[change]] #2 minute = 30 must be later"),
    ('[[change]]\nminute = 0\n', "must be later than the condition before it (0 min)"),
    ('[[change]]\nminute = 10\nco2_ppm = 900\n', "co2_ppm is not a known key"),
    ('[[change]]\nminute = 10\nsun_w_m2 = 2000\n', "sun_w_m2 = 2000 is outside the allowed range 0 to 1200"),
    ('[[change]]\nminute = 10\nwind_m_s = -1\n', "wind_m_s = -1 is outside"),
    ('[[change]]\nminute = 700\n', "minute = 700 is outside the allowed range 0 to 600 min"),
    ('change = 3\n', "change must be an array of tables"),
])
def test_bad_changes_name_the_entry_and_key(write_toml, extra, needle):
    # top-level keys come before the [air] table in TOML
    text = 'name = "x"\n' + (extra if extra.startswith("change") else "") + \
        '[air]\ntemperature_c = 10\n' + ("" if extra.startswith("change") else extra)
    with pytest.raises(InputFileError) as info:
        climate.load_climate(str(write_toml(text, "c.toml")))
    assert needle in str(info.value) and "c.toml" in str(info.value)


def test_sun_and_wind_are_range_checked_in_the_room():
    with pytest.raises(OutOfRangeError, match="sun w m2"):
        climate.Room(293.15, sun_w_m2=-1.0)
    with pytest.raises(OutOfRangeError, match="wind m s"):
        climate.Room(293.15, wind_m_s=25.0)
    with pytest.raises(OutOfRangeError):
        climate.Weather((0.0, 0.0), (climate.Room(293.15), climate.Room(293.15)))
