"""Care cautions (common practice: the usual advice of makers and repairers, no published source)."""

from drift import advice
from drift.climate import Climate, Room
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
