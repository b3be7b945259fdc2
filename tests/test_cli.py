"""The command line as a user runs it: ``python -m drift ...`` in a subprocess."""

import json
import subprocess
import sys

import pytest

from drift.constants import SPECIES

AIR_KEYS = {"temperature_c", "pressure_kpa", "relative_humidity_pct", "mole_fractions",
            "sound_speed_m_s", "density_kg_m3", "viscosity_pa_s", "thermal_conductivity_w_m_k",
            "heat_capacity_ratio", "condensed"}


def test_help_and_version_do_not_load_coolprop():
    code = ("import sys; from click.testing import CliRunner; from drift.cli import main;"
            "r = CliRunner().invoke(main, ['--help']); assert r.exit_code == 0, r.output;"
            "r = CliRunner().invoke(main, ['air', '--help']); assert r.exit_code == 0, r.output;"
            "r = CliRunner().invoke(main, ['--version']); assert r.exit_code == 0;"
            "print('CoolProp' in sys.modules, r.output.strip())")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    loaded, version = out.stdout.strip().split(" ", 1)
    assert loaded == "False"
    assert version.startswith("drift, version ")


def test_air_json_contract(drift_cli):
    result = drift_cli("air", "--temp", "25", "--rh", "60", "--format", "json", check_rc=0)
    doc = json.loads(result.stdout)
    assert AIR_KEYS <= set(doc)
    assert set(doc["mole_fractions"]) == set(SPECIES)
    assert doc["temperature_c"] == pytest.approx(25.0)
    assert doc["relative_humidity_pct"] == pytest.approx(60.0)
    assert doc["condensed"] is False
    # Cramer (1993) Eq. 15 gives 347.3 m/s at 25 °C, 60 % RH, 101.325 kPa (evaluated in test_air).
    assert 346.5 < doc["sound_speed_m_s"] < 348.5


def test_air_altitude_and_breath(drift_cli):
    doc = json.loads(drift_cli("air", "--altitude", "2000", "--breath", "1", "--temp", "20",
                               "--format", "json", check_rc=0).stdout)
    # ISO 2533: 79.50 kPa at 2000 m.
    assert doc["pressure_kpa"] == pytest.approx(79.50, abs=0.01)
    assert doc["condensed"] is True
    assert doc["mole_fractions"]["CO2"] > 0.04


def test_air_table_and_csv(drift_cli):
    table = drift_cli("air", check_rc=0).stdout
    assert "speed of sound" in table and "m/s" in table
    lines = drift_cli("air", "--format", "csv", check_rc=0).stdout.splitlines()
    assert len(lines) == 2 and "sound_speed_m_s" in lines[0] and "x_H2O" in lines[0]


@pytest.mark.parametrize("args, needle", [
    (["--temp", "75"], "--temp"),
    (["--rh", "-5"], "--rh"),
    (["--co2", "200000"], "--co2"),
    (["--breath", "2"], "--breath"),
    (["--pressure", "30"], "--pressure"),
    (["--pressure", "100", "--altitude", "300"], "--altitude"),
    (["--format", "xml"], "--format"),
    (["--temp", "warm"], "--temp"),
])
def test_air_bad_input_exits_2_without_traceback(drift_cli, args, needle):
    result = drift_cli("air", *args)
    assert result.returncode == 2
    assert needle in result.stderr
    assert "Traceback" not in result.stderr
