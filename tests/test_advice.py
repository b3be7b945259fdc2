"""Care cautions (common practice: the usual advice of makers and repairers, no published source)."""

from drift import advice, air
from drift.climate import Climate
from drift.constants import ZERO_CELSIUS


def climate(t_c, rh_pct):
    return Climate("c", air.Room(t_c + ZERO_CELSIUS, 101325.0, rh_pct / 100.0))


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

