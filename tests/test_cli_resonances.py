"""``drift resonances`` and ``drift instruments`` run as a user runs them (subprocess)."""

import csv
import io
import json
import math

import numpy as np
import pytest

from drift import air

CYLINDER = 'name = "tube"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 10], [600, 10]]\n[input]\nadded_volume_mm3 = 0\n'
CONE = 'name = "cone"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 10], [600, 50]]\n[input]\nadded_volume_mm3 = 0\n'


def sound_speed(t_c, rh):
    x = air.room_air(t_c + 273.15, 101325.0, rh)
    return float(air.gas_properties(t_c + 273.15, 101325.0, x).sound_speed)


def test_closed_open_cylinder_from_a_hand_written_file(tmp_path, drift_cli):
    # f_n = (2n-1) c / 4 (L + 0.6133 a): Levine & Schwinger (1948) end correction, lossless.
    path = tmp_path / "tube.toml"
    path.write_text(CYLINDER)
    doc = json.loads(drift_cli("resonances", path, "--lossless", "--temp", "25", "--rh", "0",
                               "--count", "4", "--format", "json", check_rc=0).stdout)
    assert doc["instrument"] == "tube"
    (fingering,) = doc["fingerings"]
    assert fingering["note"] is None and fingering["register"] is None
    c = sound_speed(25.0, 0.0)
    expected = [(2 * n - 1) * c / (4 * (0.6 + 0.6133 * 0.005)) for n in range(1, 5)]
    got = np.array(fingering["resonances_hz"])
    assert np.max(np.abs(1200 * np.log2(got / expected))) < 0.02


def test_truncated_cone_from_a_hand_written_file(tmp_path, drift_cli):
    # tan(k L') = -k x1 (Fletcher & Rossing 1998, Eq. 8.48; Benade 1976), x1 = 150 mm from the
    # apex; the unflanged end correction is taken as extra cone length L' = L + 0.6133 a_end,
    # an approximation good to about 1 Hz here (tolerance 3 Hz; measured 0.1-0.7 Hz).
    from scipy.optimize import brentq

    path = tmp_path / "cone.toml"
    path.write_text(CONE)
    doc = json.loads(drift_cli("resonances", path, "--lossless", "--rh", "0", "--count", "4",
                               "--format", "json", check_rc=0).stdout)
    got = np.array(doc["fingerings"][0]["resonances_hz"])
    c = sound_speed(20.0, 0.0)
    lp, x1 = 0.6 + 0.6133 * 0.025, 0.15
    g = lambda k: math.sin(k * lp) + k * x1 * math.cos(k * lp)
    ks = np.linspace(0.1, 30, 3000)
    roots = [brentq(g, a, b) for a, b in zip(ks[:-1], ks[1:]) if g(a) * g(b) < 0][:4]
    assert np.allclose(got, np.array(roots) * c / (2 * math.pi), atol=3.0)
    # a cone plays (nearly) all harmonics, not only the odd ones
    assert 1.9 < got[1] / got[0] < 2.2


def test_bundled_default_table_and_csv(drift_cli):
    out = drift_cli("resonances", "--count", "3", check_rc=0).stdout
    lines = out.splitlines()
    assert lines[0] == "cylindrical-reed" and "f3 Hz" in lines[1]
    assert len(lines) == 3 + 18
    rows = list(csv.DictReader(io.StringIO(drift_cli("resonances", "conical-reed", "--note", "Ab4",
                                                     "--count", "2", "--format", "csv", check_rc=0).stdout)))
    assert [(r["note"], r["register"], r["n"]) for r in rows] == [("Ab4", "2", "1"), ("Ab4", "2", "2")]
    assert 380 < float(rows[1]["frequency_hz"]) < 450  # register 2 is the second peak: Ab4 = 415 Hz


def test_warmer_room_raises_resonances(drift_cli):
    def first(temp):
        doc = json.loads(drift_cli("resonances", "side-blown-flute", "--note", "C4", "--temp", temp,
                                   "--count", "1", "--format", "json", check_rc=0).stdout)
        return doc["fingerings"][0]["resonances_hz"][0]

    # c ~ sqrt(T): 10 K warmer at 20 °C is about +29 cent (Fletcher & Rossing 1998, Sec. 8.1)
    assert 24 < 1200 * math.log2(first(30) / first(20)) < 34


def test_instruments_listing(drift_cli):
    doc = json.loads(drift_cli("instruments", "--format", "json", check_rc=0).stdout)
    names = [i["name"] for i in doc["instruments"]]
    assert names == ["conical-reed", "cylindrical-reed", "side-blown-flute"]
    assert all(i["description"] for i in doc["instruments"])
    assert "side-blown-flute" in drift_cli("instruments", check_rc=0).stdout


@pytest.mark.parametrize("args, words", [
    (("resonances", "no-such-horn"), ["unknown instrument 'no-such-horn'", "Bundled"]),
    (("resonances", "--note", "H4"), ["--note", "no note 'H4'"]),
    (("resonances", "--count", "0"), ["--count"]),
    (("resonances", "--temp", "90"), ["--temp"]),
    (("resonances", "--pressure", "100", "--altitude", "300"), ["--pressure or --altitude"]),
])
def test_bad_input_exits_2_without_traceback(drift_cli, args, words):
    result = drift_cli(*args)
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    for word in words:
        assert word in result.stderr


def test_bad_instrument_file_names_file_and_key(tmp_path, drift_cli):
    path = tmp_path / "bad.toml"
    path.write_text(CYLINDER.replace("[input]\nadded_volume_mm3", "[input]\nadded_volum_mm3"))
    result = drift_cli("resonances", path)
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert "bad.toml" in result.stderr and "added_volum_mm3" in result.stderr
    assert "did you mean 'added_volume_mm3'" in result.stderr
