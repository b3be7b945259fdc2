"""Care cautions (common practice: the usual advice of makers and repairers, no published source)."""

import pytest

from drift import advice
from drift.climate import Climate, Room, Weather
from drift.constants import ZERO_CELSIUS


def climate(t_c, rh_pct):
    return Climate("c", Room(t_c + ZERO_CELSIUS, 101325.0, rh_pct / 100.0))


def topics(material, t_c, rh_pct):
    return [c.topic for c in advice.cautions(material, climate(t_c, rh_pct))]


def test_mild_room_needs_no_caution():
    assert topics("tropical_hardwood", 21, 50) == []
    assert topics("yellow_brass", 21, 50) == []


def test_cold_wood_warns_of_cracking_and_metal_of_frozen_lips():
    wood = advice.cautions("tropical_hardwood", climate(5, 50))
    assert [c.topic for c in wood] == ["cold"] and "crack" in wood[0].text
    frozen = topics("yellow_brass", -8, 70)
    assert frozen == ["cold", "freezing", "freezing"]
    assert "freezing" in topics("abs", -8, 70) and topics("abs", -8, 70).count("freezing") == 1


def test_heat_damp_and_dry():
    assert topics("abs", 33, 50) == ["heat"]
    assert topics("abs", 24, 92) == ["damp"]
    assert topics("tropical_hardwood", 22, 20) == ["dry"]
    assert topics("abs", 22, 20) == []



def test_every_caution_names_its_climate_and_the_set_defers_to_the_maker():
    cold = climate(-8, 90)
    assert all(c.climate == "c" and c.text for c in advice.cautions("tropical_hardwood", cold))
    assert "maker's instructions" in advice.DEFER and "local rules" in advice.DEFER
    # an unknown or missing material gets the general cautions only
    assert [c.topic for c in advice.cautions(None, climate(-8, 50))] == ["cold", "freezing"]


def changing(*points):
    """A climate whose (minute, t_c, rh_pct, sun) points change over the evening."""
    rooms = tuple(Room(t + ZERO_CELSIUS, 101325.0, rh / 100.0, sun_w_m2=sun) for _, t, rh, sun in points)
    return Climate("evening", rooms[0], weather=Weather(tuple(m * 60.0 for m, *_ in points), rooms))


# Each caution at its documented threshold (docs/guide.md, "Care cautions"; common practice):
# (topic, material, the climate just across the threshold, just inside it).
THRESHOLDS = [
    ("cold", "tropical_hardwood", (9.5, 50, 0), (10.5, 50, 0)),
    ("freezing", "yellow_brass", (-0.5, 50, 0), (0.5, 50, 0)),
    ("heat", "abs", (30.5, 40, 0), (29.5, 40, 0)),
    ("players", "abs", (27.0, 60, 0), (26.5, 60, 0)),
    ("players", "abs", (28.0, 60, 0), (28.0, 59, 0)),
    ("sun", "nickel_silver", (20.0, 50, 300), (20.0, 50, 290)),
    ("damp", "abs", (20.0, 86, 0), (20.0, 85, 0)),
    ("dry", "tropical_hardwood", (20.0, 29, 0), (20.0, 30, 0)),
]


@pytest.mark.parametrize("topic, material, across, inside", THRESHOLDS)
def test_each_caution_appears_exactly_past_its_threshold(topic, material, across, inside):
    def found(point):
        # The extreme comes an hour into a mild evening: the caution follows the extreme.
        evening = changing((0, 20.0, 50, 0), (60, *point))
        return [c for c in advice.cautions(material, evening) if c.topic == topic]

    assert found(across) and "at 60 min" in found(across)[0].when
    assert not found(inside)


@pytest.mark.parametrize("metal", advice.METALS)
def test_wood_only_cautions_never_reach_metal(metal):
    # Cold, sun and dry air crack wood; none of those lines for a metal instrument.
    harsh = changing((0, 5.0, 20, 800), (60, 35.0, 10, 800))

    def wood_lines(cautions):
        return [c for c in cautions if c.topic in ("cold", "sun", "dry") and ("crack" in c.text)]

    metal_cautions = advice.cautions(metal, harsh, 0.4)
    assert {c.topic for c in metal_cautions} >= {"cold", "heat", "sun"}
    assert wood_lines(metal_cautions) == []
    assert [c.topic for c in wood_lines(advice.cautions("tropical_hardwood", harsh, 0.85))] == ["cold", "sun", "dry"]


def test_extremes_of_an_evening():
    e = advice.extremes(changing((0, 29.0, 60, 450), (80, 25.0, 72, 0), (150, 21.0, 82, 0)))
    assert (e["hottest"].value, e["hottest"].time_s) == (29.0, 0.0)
    assert (e["coldest"].value, e["coldest"].time_s) == (21.0, 9000.0)
    assert e["sunniest"].value == 450.0 and e["dampest"].value == 82.0 and e["driest"].value == 60.0
