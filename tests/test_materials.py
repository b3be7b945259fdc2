"""Wall materials (drift.materials) against handbook ranges, and the strict reading of their table."""

import pytest

from drift import materials
from drift.errors import InputFileError
from drift.segments import expansion_factors

BRASS = materials.material("yellow_brass")
WOOD = materials.material("tropical_hardwood")


def test_materials_table_complete_with_sources():
    table = materials.materials()
    for name in ("yellow_brass", "nickel_silver", "sterling_silver", "tropical_hardwood", "ebonite", "abs"):
        m = table[name]
        assert m.sources.strip(), name
        assert 0 < m.emissivity <= 1
        assert m.wall_thickness > 0


@pytest.mark.parametrize("name, low, high", [
    # Density [kg/m3] ranges of the alloy families: ASM Handbook Vol. 2 (1990) data sheets and
    # Incropera et al. (2007) Table A.1/A.3 (from memory).
    ("yellow_brass", 8400, 8550),
    ("nickel_silver", 8600, 8800),
    ("sterling_silver", 10200, 10400),
    ("ebonite", 1100, 1250),
])
def test_material_densities_within_handbook_ranges(outside, name, low, high):
    # The range is checked as its midpoint give or take its half-width.
    outside.check(materials.material(name).density, (low + high) / 2, quantity=f"density of {name.replace('_', ' ')}",
                  source="ASM Handbook Vol. 2 (1990) data sheets; Incropera et al. (2007), Table A.1/A.3 "
                  "(from memory)", abs=(high - low) / 2, unit="kg/m³")


def test_brass_expansion_over_10_k_against_handbook(outside):
    # ASM Handbook Vol. 2 (1990): cartridge/yellow brasses C26000-C27000 expand 19.9e-6 to
    # 20.3e-6 /K (20-300 °C; from memory). A 1 m brass tube heated by 10 K lengthens by
    # 199-203 µm; the bore layer's expansion law applies the table's coefficient. The range,
    # widened by 0.5 µm either side, is checked as its midpoint give or take its half-width.
    factor = expansion_factors(303.15, BRASS.expansion_per_k, 293.15)
    growth_um = (factor - 1.0) * 1.0 * 1e6
    outside.check(growth_um, 201.0, quantity="growth of a 1 m yellow brass tube heated from 20 to 30 °C",
                  source="ASM Handbook Vol. 2 (1990), brasses C26000-C27000, 19.9e-6 to 20.3e-6 /K (from memory)",
                  abs=2.5, unit="µm")


def test_wood_moves_less_along_the_grain_than_across(outside):
    # Wood Handbook FPL-GTR-190 (2010), Ch. 4: along the grain 3.1e-6 to 4.5e-6 /K, across it
    # roughly ten times more (from memory). The range along the grain is checked as its midpoint
    # give or take its half-width.
    outside.check(WOOD.expansion_per_k, 3.8e-6, quantity="expansion coefficient of tropical hardwood along the grain",
                  source="Wood Handbook FPL-GTR-190 (2010), Ch. 4, 3.1e-6 to 4.5e-6 /K (from memory)", abs=0.7e-6,
                  unit="1/K")
    assert WOOD.expansion_across_per_k > 5 * WOOD.expansion_per_k
    assert WOOD.conductivity_across < WOOD.conductivity


def test_isotropic_materials_default_across_to_along():
    # Metals and plastics are isotropic: the across values default to the axial ones.
    assert BRASS.expansion_across_per_k == BRASS.expansion_per_k
    assert BRASS.conductivity_across == BRASS.conductivity
    assert BRASS.volumetric_heat_capacity == pytest.approx(BRASS.density * BRASS.specific_heat)


def test_unknown_material_names_the_allowed_ones():
    with pytest.raises(InputFileError, match="yellow_brass"):
        materials.material("unobtainium")
    assert materials.material("Yellow Brass") is BRASS
    assert materials.material("yellow-brass") is BRASS
    with pytest.raises(InputFileError, match="did you mean 'yellow_brass'"):
        materials.material("yelow brass")


def test_default_materials_exist():
    # Common practice: wooden reed instruments, brass lip instruments, nickel-silver flutes.
    assert set(materials.DEFAULT_MATERIALS) == {"reed", "lips", "jet"}
    for name in materials.DEFAULT_MATERIALS.values():
        assert materials.material(name).name == name


GOOD = {"expansion_per_k": 1e-5, "density_kg_m3": 1.0, "specific_heat_j_kg_k": 1, "conductivity_w_m_k": 1,
        "emissivity": 0.5, "solar_absorptance": 0.5, "wall_mm": 1}


@pytest.mark.parametrize("table, needle", [
    ({**GOOD, "density_kg_m3": -1.0}, "density_kg_m3"),
    ({**GOOD, "emissivity": 1.5}, "emissivity"),
    ({**GOOD, "solar_absorptance": 1.2}, "solar_absorptance"),
    ({**GOOD, "colour": "red"}, "colour"),
    ({"expansion_per_k": 1e-5}, "missing"),
    ({**GOOD, "wall_mm": "thin"}, "wall_mm must be a number"),
    ({**GOOD, "wall_mm": True}, "wall_mm must be a number"),
    ({**GOOD, "expansion_across_grain_per_k": 0.0}, "expansion_across_grain_per_k"),
])
def test_bad_material_entries_are_named(table, needle):
    with pytest.raises(InputFileError, match=needle) as info:
        materials._material_from_table("x", table)
    assert str(info.value).startswith("materials.toml: [x]")


def test_good_entry_converts_to_si():
    m = materials._material_from_table("x", {**GOOD, "wall_mm": 2.5})
    assert m.wall_thickness == pytest.approx(2.5e-3)
    assert m.expansion_across_per_k == m.expansion_per_k
