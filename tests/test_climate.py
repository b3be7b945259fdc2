"""Climate files: bundled scenarios, strict parsing, bad input."""

import json

import pytest

from drift import air, climate
from drift.errors import InputFileError


def write(tmp_path, text, name="c.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


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


def test_minimal_file_takes_documented_defaults(tmp_path):
    c = climate.load_climate(str(write(tmp_path, 'name = "x"\n[air]\ntemperature_c = 12.5\n')))
    assert c.room.temperature_k == pytest.approx(285.65)
    assert c.room.pressure_pa == pytest.approx(101325.0)
    assert c.room.relative_humidity == pytest.approx(0.5)
    assert c.room.co2_fraction == pytest.approx(420e-6)
    assert c.player.playing is True and c.player.minutes_played is None
    assert c.player.breath == air.DEFAULT_BREATH


def test_altitude_and_breath_overrides(tmp_path):
    text = ('name = "x"\n[air]\ntemperature_c = 10\naltitude_m = 1000\n'
            '[player]\nminutes_played = 5\nbreath_temperature_c = 33\nbreath_co2_pct = 5\n')
    c = climate.load_climate(str(write(tmp_path, text)))
    # ISO 2533 at 1000 m: 89.876 kPa.
    assert c.room.pressure_pa == pytest.approx(89876.0, abs=2)
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
def test_bad_files_name_file_and_key(tmp_path, text, needle):
    path = write(tmp_path, text)
    with pytest.raises(InputFileError) as info:
        climate.load_climate(str(path))
    assert str(path) in str(info.value)
    assert needle in str(info.value)


def test_unknown_bundled_name_suggests():
    with pytest.raises(InputFileError, match="did you mean 'winter-church'"):
        climate.load_climate("winter-chruch")


def test_climates_command(drift_cli):
    table = drift_cli("climates", check_rc=0).stdout
    assert "winter-church" in table and max(len(line) for line in table.splitlines()) <= 100
    doc = json.loads(drift_cli("climates", "--format", "json", check_rc=0).stdout)
    assert {c["name"] for c in doc["climates"]} >= {"winter-church", "sunny-lawn", "frozen-parade"}
