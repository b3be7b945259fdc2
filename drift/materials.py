"""Wall materials of wind instruments: expansion, heat capacity, conductivity, emissivity, solar
absorptance.

The values live in the package table ``drift/data/materials.toml``, each with its source there
(handbook tables, marked "from memory" where recalled); this module reads and checks it.
"""

from __future__ import annotations

import math

import functools
from dataclasses import dataclass
from importlib import resources

from drift.errors import InputFileError
from drift.files import choose, read_toml_text, short_repr

_MATERIAL_KEYS = {
    "description": str,
    "expansion_per_k": float,
    "expansion_across_grain_per_k": float,
    "density_kg_m3": float,
    "specific_heat_j_kg_k": float,
    "conductivity_w_m_k": float,
    "conductivity_across_grain_w_m_k": float,
    "emissivity": float,
    "solar_absorptance": float,
    "wall_mm": float,
    "sources": str,
}
_MATERIAL_REQUIRED = (
    "expansion_per_k",
    "density_kg_m3",
    "specific_heat_j_kg_k",
    "conductivity_w_m_k",
    "emissivity",
    "solar_absorptance",
    "wall_mm",
)


@dataclass(frozen=True)
class Material:
    """A wall material, SI units.

    Attributes
    ----------
    name : str
        Key in the materials table.
    description : str
    expansion_per_k : float
        Linear thermal expansion coefficient along the bore axis [1/K].
    expansion_across_per_k : float
        Linear expansion across the bore axis [1/K] (differs from the axial value for wood;
        equal to it for isotropic materials).
    density : float
        [kg/m^3]
    specific_heat : float
        [J/(kg K)]
    conductivity : float
        Thermal conductivity along the bore axis [W/(m K)].
    conductivity_across : float
        Thermal conductivity through the wall [W/(m K)] (across the grain for wood).
    emissivity : float
        Total hemispherical emissivity of the outer surface [-].
    solar_absorptance : float
        Share of the sunshine falling on the outer surface that it absorbs [-].
    wall_thickness : float
        Typical wall thickness [m], used when an instrument gives none.
    sources : str
    """

    name: str
    description: str
    expansion_per_k: float
    expansion_across_per_k: float
    density: float
    specific_heat: float
    conductivity: float
    conductivity_across: float
    emissivity: float
    solar_absorptance: float
    wall_thickness: float
    sources: str

    @property
    def volumetric_heat_capacity(self) -> float:
        """Heat capacity per unit volume rho c [J/(m^3 K)]."""
        return self.density * self.specific_heat


def _positive(table_name: str, key: str, value, upper: float | None = None) -> float:
    where = f"materials.toml: [{table_name}] {key}"
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputFileError(f"{where} must be a number, got {short_repr(value)}")
    value = float(value) if abs(value) < 1e300 else math.inf
    if not 0.0 < value < math.inf or (upper is not None and value > upper):
        allowed = f"0 < value <= {upper:g}" if upper is not None else "a positive number"
        raise InputFileError(f"{where} = {value:g} is not allowed: use {allowed}")
    return value


def _material_from_table(name: str, table: dict) -> Material:
    unknown = sorted(set(table) - set(_MATERIAL_KEYS))
    if unknown:
        raise InputFileError(
            f"materials.toml: [{name}] has unknown key {unknown[0]!r}; "
            f"allowed: {', '.join(_MATERIAL_KEYS)}"
        )
    missing = [k for k in _MATERIAL_REQUIRED if k not in table]
    if missing:
        raise InputFileError(f"materials.toml: [{name}] is missing key {missing[0]!r}")
    fractions = ("emissivity", "solar_absorptance")
    v = {k: _positive(name, k, table[k], upper=1.0 if k in fractions else None) for k in _MATERIAL_REQUIRED}
    across_e = table.get("expansion_across_grain_per_k", v["expansion_per_k"])
    across_k = table.get("conductivity_across_grain_w_m_k", v["conductivity_w_m_k"])
    return Material(
        name=name,
        description=str(table.get("description", "")),
        expansion_per_k=v["expansion_per_k"],
        expansion_across_per_k=_positive(name, "expansion_across_grain_per_k", across_e),
        density=v["density_kg_m3"],
        specific_heat=v["specific_heat_j_kg_k"],
        conductivity=v["conductivity_w_m_k"],
        conductivity_across=_positive(name, "conductivity_across_grain_w_m_k", across_k),
        emissivity=v["emissivity"],
        solar_absorptance=v["solar_absorptance"],
        wall_thickness=v["wall_mm"] * 1e-3,
        sources=str(table.get("sources", "")),
    )


@functools.cache
def materials() -> dict[str, Material]:
    """All materials of the bundled table ``drift/data/materials.toml``, by name."""
    text = resources.files("drift.data").joinpath("materials.toml").read_text(encoding="utf-8")
    data = read_toml_text(text, "materials.toml", "materials table")
    return {name: _material_from_table(name, table) for name, table in data.items()}


def material(name: str) -> Material:
    """The wall material ``name`` from the bundled materials table.

    Raises :class:`InputFileError` naming the allowed materials when ``name`` is unknown.
    """
    table = materials()
    key = name.strip().lower().replace(" ", "_").replace("-", "_")
    return table[choose(key, table, "material")]


#: Wall material assumed when an instrument file names none, by excitation (common practice:
#: woodwind bodies of dense hardwood, brass instruments of yellow brass, flutes of nickel silver).
DEFAULT_MATERIALS = {"reed": "tropical_hardwood", "lips": "yellow_brass", "jet": "nickel_silver"}
