"""Thermal state of a played bore: air temperature, breath content and wall temperature in time.

The model, in brief (equations, assumptions and sources in docs/physics.md, section "Thermal state"):

- **Air side, playing.** A mean breath flow enters the bore at the breath temperature, saturated,
  and flows down the bore to where it leaves (the first open tone hole of the note being played, or
  the open end). It exchanges heat with the wall through laminar internal convection (thermal entry
  length correlation of Hausen 1943, blended into Gnielinski 1976 above Re = 2300). The air holds so
  little heat that it is quasi-steady: over a segment at wall temperature T_w the air temperature
  approaches T_w as exp(-NTU). Where it cools below its dew point, water condenses (composition capped
  at saturation through the air layer) and the latent heat goes into the wall.
- **Wall.** Each bore segment is a cylindrical shell of the instrument's material, lumped into one
  or a few radial layers, conducting along the bore and through its thickness, and losing heat to the
  room by natural convection (Churchill & Chu 1975, horizontal cylinder) and radiation.
- **Rests.** No flow: the bore air takes the temperature of the inner wall (its own relaxation time
  is under a second), and the breath gas gives way to room air exponentially in time.
- The wall temperatures obey an ODE solved with :func:`scipy.integrate.solve_ivp` over a play/rest
  plan; the steady state solves the same heat balance with :func:`scipy.optimize.root`.

Gas properties are not evaluated inside the ODE: the air layer (CoolProp) is called for three
states up front (inflowing gas at its inlet temperature and at the mean of inlet and room
temperature, room air at room temperature) and the saturation water fraction is tabulated over the
temperature range of the problem and interpolated.

Materials of the wall are read from the package table ``drift/data/materials.toml``; each value
there carries its source.

References
----------
Churchill, S. W., Chu, H. H. S. (1975). Correlating equations for laminar and turbulent free
convection from a horizontal cylinder. Int. J. Heat Mass Transfer 18, 1049-1053.
Gnielinski, V. (1976). New equations for heat and mass transfer in turbulent pipe and channel flow.
Int. Chem. Eng. 16, 359-368.
Hausen, H. (1943). Darstellung des Wärmeüberganges in Rohren durch verallgemeinerte
Potenzbeziehungen. Z. VDI Beih. Verfahrenstech. 4, 91-98.
Incropera, F. P., DeWitt, D. P., Bergman, T. L., Lavine, A. S. (2007). Fundamentals of Heat and Mass
Transfer, 6th ed. Wiley (Eqs. 8.57, 8.62, 9.34; Tables A.1, A.3, A.11).
"""

from __future__ import annotations

import functools
import math
import tomllib
from dataclasses import dataclass, field
from importlib import resources
from typing import Sequence

import numpy as np

from drift import air
from drift import constants as K
from drift.errors import DriftError, InputFileError, OutOfRangeError

# --------------------------------------------------------------------------------------------
# Materials
# --------------------------------------------------------------------------------------------

_MATERIAL_KEYS = {
    "description": str,
    "expansion_per_k": float,
    "expansion_across_grain_per_k": float,
    "density_kg_m3": float,
    "specific_heat_j_kg_k": float,
    "conductivity_w_m_k": float,
    "conductivity_across_grain_w_m_k": float,
    "emissivity": float,
    "wall_mm": float,
    "sources": str,
}
_MATERIAL_REQUIRED = (
    "expansion_per_k",
    "density_kg_m3",
    "specific_heat_j_kg_k",
    "conductivity_w_m_k",
    "emissivity",
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
    wall_thickness: float
    sources: str

    @property
    def volumetric_heat_capacity(self) -> float:
        """Heat capacity per unit volume rho c [J/(m^3 K)]."""
        return self.density * self.specific_heat


def _positive(table_name: str, key: str, value, upper: float | None = None) -> float:
    where = f"materials.toml: [{table_name}] {key}"
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputFileError(f"{where} must be a number, got {value!r}")
    value = float(value)
    if not value > 0.0 or (upper is not None and value > upper):
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
    v = {k: _positive(name, k, table[k]) for k in _MATERIAL_REQUIRED if k != "emissivity"}
    emissivity = _positive(name, "emissivity", table["emissivity"], upper=1.0)
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
        emissivity=emissivity,
        wall_thickness=v["wall_mm"] * 1e-3,
        sources=str(table.get("sources", "")),
    )


@functools.cache
def materials() -> dict[str, Material]:
    """All materials of the bundled table ``drift/data/materials.toml``, by name."""
    text = resources.files("drift.data").joinpath("materials.toml").read_text(encoding="utf-8")
    data = tomllib.loads(text)
    return {name: _material_from_table(name, table) for name, table in data.items()}


def material(name: str) -> Material:
    """The wall material ``name`` from the bundled materials table.

    Raises :class:`InputFileError` naming the allowed materials when ``name`` is unknown.
    """
    table = materials()
    key = name.strip().lower().replace(" ", "_").replace("-", "_")
    if key not in table:
        raise InputFileError(
            f"unknown material {name!r}; allowed: {', '.join(sorted(table))}"
        )
    return table[key]


# --------------------------------------------------------------------------------------------
# Constants of the heat-transfer model
# --------------------------------------------------------------------------------------------

#: Stefan-Boltzmann constant [W/(m^2 K^4)], CODATA 2018.
STEFAN_BOLTZMANN = 5.670374419e-8
#: Molar gas constant [J/(mol K)], CODATA 2018 (exact).
MOLAR_GAS_CONSTANT = 8.314462618
#: Molar mass of water [kg/mol], IAPWS-95 (Wagner & Pruss 2002).
WATER_MOLAR_MASS = 0.018015268
#: Latent heat of vaporisation of water at 0 °C [J/kg] and its slope [J/(kg K)]:
#: L_v(T) = 2.501e6 - 2369 (T - 273.15), the linear fit of meteorology (Rogers & Yau 1989,
#: "A Short Course in Cloud Physics", Table 2.1; from memory). Within 0.01 % of IAPWS-95 between
#: 20 and 35 °C (checked against CoolProp in tests/test_thermal.py).
LATENT_HEAT_0C = 2.501e6
LATENT_HEAT_SLOPE = -2369.0
#: Latent heat of fusion of ice at 0 °C [J/kg] (CRC Handbook, 333.6 kJ/kg; from memory), added
#: below 0 °C where the air layer caps water at saturation over ice (deposition).
LATENT_HEAT_FUSION = 333.6e3


def latent_heat_condensation(temperature_k):
    """Heat released per kg of water vapour condensing [J/kg] at temperature [K].

    Above 0 °C, vapour to liquid: L_v = 2.501e6 - 2369 (T - 273.15) J/kg (Rogers & Yau 1989).
    Below 0 °C, vapour to ice: L_v + L_f with L_f = 333.6 kJ/kg, matching the air layer, which caps
    water at saturation over ice there.
    """
    t = np.asarray(temperature_k, dtype=float)
    latent = LATENT_HEAT_0C + LATENT_HEAT_SLOPE * (t - K.ZERO_CELSIUS)
    return np.where(t < K.ZERO_CELSIUS, latent + LATENT_HEAT_FUSION, latent)


# --------------------------------------------------------------------------------------------
# Heat-transfer correlations (pure, vectorised)
# --------------------------------------------------------------------------------------------


def nusselt_hausen_1943(graetz):
    """Mean Nusselt number [-] of laminar pipe flow over a thermal entry length.

    Nu_D = 3.66 + 0.0668 Gz / (1 + 0.04 Gz^(2/3)), Gz = (D/x) Re_D Pr, for a uniform wall
    temperature and a fully developed velocity profile; Nu_D -> 3.66 far from the entry.

    Parameters
    ----------
    graetz : array_like
        Graetz number Gz [-], >= 0.

    References
    ----------
    Hausen (1943); Incropera et al. (2007), Eq. 8.57.
    """
    gz = np.asarray(graetz, dtype=float)
    return 3.66 + 0.0668 * gz / (1.0 + 0.04 * gz ** (2.0 / 3.0))


def nusselt_gnielinski_1976(reynolds, prandtl):
    """Nusselt number [-] of fully developed turbulent pipe flow.

    Nu_D = (f/8)(Re - 1000) Pr / (1 + 12.7 (f/8)^(1/2) (Pr^(2/3) - 1)) with the Petukhov friction
    factor f = (0.790 ln Re - 1.64)^-2; valid for 3000 <= Re <= 5e6 and 0.5 <= Pr <= 2000.

    Parameters
    ----------
    reynolds : array_like
        Reynolds number Re_D [-].
    prandtl : array_like
        Prandtl number [-].

    References
    ----------
    Gnielinski (1976); Incropera et al. (2007), Eqs. 8.21 and 8.62.
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    f = (0.790 * np.log(re) - 1.64) ** -2
    return (f / 8.0) * (re - 1000.0) * pr / (1.0 + 12.7 * np.sqrt(f / 8.0) * (pr ** (2.0 / 3.0) - 1.0))


def nusselt_churchill_chu_1975(rayleigh, prandtl):
    """Mean Nusselt number [-] of free convection from a long horizontal isothermal cylinder.

    Nu_D = {0.60 + 0.387 Ra_D^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2, for Ra_D <= 1e12.

    Parameters
    ----------
    rayleigh : array_like
        Rayleigh number Ra_D = g beta |dT| D^3 / (nu alpha) [-], >= 0.
    prandtl : array_like
        Prandtl number of the surrounding air [-].

    References
    ----------
    Churchill & Chu (1975); Incropera et al. (2007), Eq. 9.34.
    """
    ra = np.asarray(rayleigh, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    return (0.60 + 0.387 * ra ** (1.0 / 6.0) / (1.0 + (0.559 / pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)) ** 2


def nusselt_churchill_bernstein_1977(reynolds, prandtl):
    """Mean Nusselt number [-] of a long cylinder in cross flow.

    Nu_D = 0.3 + 0.62 Re^(1/2) Pr^(1/3) / [1 + (0.4/Pr)^(2/3)]^(1/4) [1 + (Re/282000)^(5/8)]^(4/5),
    for Re_D Pr > 0.2; Nu_D -> 0.3 in still air.

    Parameters
    ----------
    reynolds : array_like
        Reynolds number Re_D = V D / nu [-], >= 0.
    prandtl : array_like
        Prandtl number [-].

    References
    ----------
    Churchill, S. W., Bernstein, M. (1977). J. Heat Transfer 99, 300-306; Incropera et al.
    (2007), Eq. 7.54.
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    return 0.3 + 0.62 * np.sqrt(re) * pr ** (1.0 / 3.0) / (1.0 + (0.4 / pr) ** (2.0 / 3.0)) ** 0.25 \
        * (1.0 + (re / 282000.0) ** (5.0 / 8.0)) ** 0.8


def nusselt_mixed(forced, natural, exponent: float = 4.0):
    """Mixed free and forced convection [-]: Nu^n = Nu_F^n + Nu_N^n.

    n = 4 for cylinders in transverse flow (Churchill 1977; Incropera et al. 2007, Eq. 9.66 and
    the text beside it; from memory), the flows taken as assisting.
    """
    forced = np.asarray(forced, dtype=float)
    natural = np.asarray(natural, dtype=float)
    return (forced**exponent + natural**exponent) ** (1.0 / exponent)


def radiative_coefficient(surface_k, surroundings_k, emissivity):
    """Linearised radiative heat-transfer coefficient [W/(m^2 K)] of a small grey body.

    h_r = eps sigma (T_s^2 + T_r^2)(T_s + T_r), so that q = h_r (T_s - T_r) = eps sigma
    (T_s^4 - T_r^4) exactly, the surroundings large and at T_r (Incropera et al. 2007, Eq. 1.9).

    Parameters
    ----------
    surface_k, surroundings_k : array_like
        Temperatures [K].
    emissivity : array_like
        Total hemispherical emissivity of the surface [-].
    """
    ts = np.asarray(surface_k, dtype=float)
    tr = np.asarray(surroundings_k, dtype=float)
    return emissivity * STEFAN_BOLTZMANN * (ts**2 + tr**2) * (ts + tr)


# --------------------------------------------------------------------------------------------
# Geometry of the wall
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Wall:
    """The bore cut into segments, each with its wall: what the thermal model works on.

    Attributes
    ----------
    positions_m : ndarray (n,)
        Segment centres from the input end [m], ascending.
    lengths_m : ndarray (n,)
        Segment lengths [m]; segment i spans positions_m[i] -/+ lengths_m[i]/2, without gaps.
    inner_radius_m : ndarray (n,)
        Bore radius [m].
    thickness_m : ndarray (n,)
        Wall thickness [m].
    material : Material
    flow_fraction : ndarray (n,)
        Share [0-1] of the mean breath flow passing through each segment while playing, averaged
        over the notes played (1 down to the first open hole of each note, 0 below it). The flow
        enters at the first segment with a share above 0 (segments before it, such as the cavity
        between a flute's stopped end and its embouchure, see no through-flow) and the share does
        not grow from there on.
    """

    positions_m: np.ndarray
    lengths_m: np.ndarray
    inner_radius_m: np.ndarray
    thickness_m: np.ndarray
    material: Material
    flow_fraction: np.ndarray

    def __post_init__(self):
        n = np.size(self.positions_m)
        for name in ("lengths_m", "inner_radius_m", "thickness_m", "flow_fraction"):
            value = np.asarray(getattr(self, name), dtype=float)
            if value.shape != (n,):
                raise OutOfRangeError(f"wall {name} must have one value per segment ({n})")
            if not np.all(np.isfinite(value)):
                raise OutOfRangeError(f"wall {name} must be finite")
        if n == 0:
            raise OutOfRangeError("a wall needs at least one segment")
        for name in ("lengths_m", "inner_radius_m", "thickness_m"):
            if np.any(np.asarray(getattr(self, name)) <= 0.0):
                raise OutOfRangeError(f"wall {name.replace('_', ' ')} must be positive")
        w = np.asarray(self.flow_fraction, dtype=float)
        first = int(np.argmax(w > 0.0)) if np.any(w > 0.0) else n
        if np.any(w < 0.0) or np.any(w > 1.0) or np.any(np.diff(w[first:]) > 1e-12):
            raise OutOfRangeError(
                "wall flow fraction must lie in [0, 1] and, from where the flow enters, not grow along the bore")

    @property
    def edges_m(self) -> np.ndarray:
        """Segment boundaries [m], (n + 1,)."""
        start = self.positions_m[0] - 0.5 * self.lengths_m[0]
        return start + np.concatenate([[0.0], np.cumsum(self.lengths_m)])


def flow_fraction_from_exits(positions_m, exits_m) -> np.ndarray:
    """Share of the breath flow reaching each position [0-1], averaged over notes.

    While a note sounds, the mean flow leaves the bore at its first open tone hole (or the open
    end): ``exits_m`` holds that position [m] for each note. Notes are weighted equally
    (assumption: a uniform use of the range). w(x) = (number of exits beyond x) / (number of notes).
    """
    x = np.asarray(positions_m, dtype=float)
    exits = np.atleast_1d(np.asarray(exits_m, dtype=float))
    if exits.size == 0:
        return np.ones_like(x)
    return np.mean(exits[None, :] > x[:, None], axis=1)


def wall_from_stations(stations_m, thickness_m, material: Material, segment_length_m=0.02,
                       flow_fraction=None) -> Wall:
    """Cut a bore given by stations into segments of at most ``segment_length_m`` [m].

    Parameters
    ----------
    stations_m : array_like (k, 2)
        [position from the input end, inner diameter] [m], positions ascending; the bore is
        conical (linear in diameter) between stations.
    thickness_m : float or callable
        Wall thickness [m], or a function of position [m] returning it.
    material : Material
    segment_length_m : float
        Largest segment length [m].
    flow_fraction : None, callable or array_like
        Share of the flow reaching each segment: None = 1 everywhere; a callable of the segment
        centres [m]; or an array (n,) for the segments made.
    """
    st = np.asarray(stations_m, dtype=float)
    if st.ndim != 2 or st.shape[1] != 2 or st.shape[0] < 2:
        raise OutOfRangeError("bore stations must be pairs [position, diameter], at least two")
    if np.any(np.diff(st[:, 0]) < 0.0) or st[-1, 0] <= st[0, 0]:
        raise OutOfRangeError("bore station positions must ascend")
    total = st[-1, 0] - st[0, 0]
    n = max(1, int(math.ceil(total / segment_length_m - 1e-9)))
    edges = np.linspace(st[0, 0], st[-1, 0], n + 1)
    centres = 0.5 * (edges[:-1] + edges[1:])
    # Mean radius of a segment: the radius of equal volume of the conical pieces, sampled finely.
    fine = np.linspace(0.0, 1.0, 9)
    xs = edges[:-1, None] + np.diff(edges)[:, None] * fine[None, :]
    d = np.interp(xs, st[:, 0], st[:, 1])
    radius = 0.5 * np.sqrt(np.trapezoid(d**2, fine, axis=1))
    thickness = thickness_m(centres) if callable(thickness_m) else np.full(n, float(thickness_m))
    if flow_fraction is None:
        w = np.ones(n)
    elif callable(flow_fraction):
        w = np.asarray(flow_fraction(centres), dtype=float)
    else:
        w = np.asarray(flow_fraction, dtype=float)
    return Wall(centres, np.diff(edges), radius, np.asarray(thickness, dtype=float), material, w)


# --------------------------------------------------------------------------------------------
# The breath flow
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Blowing:
    """How the instrument is blown and held: the breath flow through the bore while playing, how
    breath leaves it during rests, and the air moving past its outside.

    Attributes
    ----------
    flow_m3_s : float
        Mean volume flow of breath into the bore while playing [m^3/s], at the breath's
        temperature, averaged over the playing time (breaths included).
    inlet_breath_fraction : float
        Mole fraction of breath in the gas entering the bore [0-1]: 1 for reeds and lips; less for
        a jet, whose bore draws in room air entrained by the jet.
    exchange_time_s : float
        Time constant [s] with which breath gas in a resting bore gives way to room air.
    heat_transfer_factor : float
        Multiplier [-] on the internal convection coefficient (1 = the steady-flow correlations).
    air_speed_m_s : float
        Speed of the room air across the outside of the instrument [m/s]: draughts plus the
        instrument's own motion in the player's hands (0 = still air, natural convection only).
    """

    flow_m3_s: float
    inlet_breath_fraction: float = 1.0
    exchange_time_s: float = 30.0
    heat_transfer_factor: float = 1.0
    air_speed_m_s: float = 0.1

    def __post_init__(self):
        if not (0.0 <= self.flow_m3_s <= 10e-3) or not math.isfinite(self.flow_m3_s):
            raise OutOfRangeError(
                f"breath flow {self.flow_m3_s * 1e3:g} L/s is outside the allowed range 0 to 10 L/s")
        if not 0.0 <= self.inlet_breath_fraction <= 1.0:
            raise OutOfRangeError(
                f"inlet breath fraction {self.inlet_breath_fraction:g} is outside the allowed range 0 to 1")
        if not self.exchange_time_s > 0.0:
            raise OutOfRangeError("breath exchange time must be positive")
        if not self.heat_transfer_factor > 0.0:
            raise OutOfRangeError("heat transfer factor must be positive")
        if not 0.0 <= self.air_speed_m_s <= 20.0:
            raise OutOfRangeError(
                f"air speed {self.air_speed_m_s:g} m/s is outside the allowed range 0 to 20 m/s")


#: Default blowing by excitation (estimates; see docs/physics.md, "Thermal state"). Reed and lips
#: send their whole flow down the bore; players' flows while sounding are of order 0.1-0.3 L/s
#: (Bouhuys 1965, J. Acoust. Soc. Am. 37, 453-456, measured flows of this order on woodwind and
#: brass players; from memory). The defaults are means over the playing time, breaths and short
#: rests included: 0.10 L/s for a reed, 0.15 L/s for lips. A jet blows most of its breath (order
#: 0.3 L/s) across the embouchure hole into the room; its bore sees a small net through-flow, taken
#: as 0.03 L/s, half of it entrained room air (estimates). The 30 s exchange time and the 0.1 m/s
#: air speed are justified in docs/physics.md.
DEFAULT_BLOWING = {
    "reed": Blowing(flow_m3_s=0.10e-3),
    "lips": Blowing(flow_m3_s=0.15e-3),
    "jet": Blowing(flow_m3_s=0.03e-3, inlet_breath_fraction=0.5),
}


def default_blowing(excitation: str) -> Blowing:
    """The default :class:`Blowing` of an excitation ('reed', 'lips' or 'jet')."""
    if excitation not in DEFAULT_BLOWING:
        raise InputFileError(f"excitation '{excitation}' is not allowed; use one of: reed, lips, jet")
    return DEFAULT_BLOWING[excitation]


# --------------------------------------------------------------------------------------------
# Play/rest plans
# --------------------------------------------------------------------------------------------

PHASES = ("play", "rest")


@dataclass(frozen=True)
class Phase:
    """One part of a plan: playing or resting for a duration [s]."""

    state: str
    duration_s: float

    def __post_init__(self):
        if self.state not in PHASES:
            raise OutOfRangeError(f"plan state '{self.state}' is not allowed; use play or rest")
        if not (0.0 < self.duration_s <= 600.0 * 60.0):
            raise OutOfRangeError(
                f"plan duration {self.duration_s / 60.0:g} min is outside the allowed range "
                "(more than 0, at most 600 min)")


def parse_plan(text: str) -> tuple[Phase, ...]:
    """Parse a plan such as ``"play:10,rest:3,play:5"`` (durations in minutes) into phases."""
    phases = []
    for part in (p.strip() for p in text.split(",")):
        state, sep, minutes = part.partition(":")
        state = state.strip().lower()
        if not sep or state not in PHASES:
            raise OutOfRangeError(
                f"plan part '{part}' is not of the form play:MINUTES or rest:MINUTES")
        try:
            value = float(minutes)
        except ValueError:
            raise OutOfRangeError(
                f"plan part '{part}': '{minutes.strip()}' is not a number of minutes") from None
        phases.append(Phase(state, value * 60.0))
    return tuple(phases)


def plan_duration_s(plan: Sequence[Phase]) -> float:
    """Total duration of a plan [s]."""
    return float(sum(p.duration_s for p in plan))


# --------------------------------------------------------------------------------------------
# The heat balance
# --------------------------------------------------------------------------------------------


def _auto_layers(wall: Wall) -> int:
    """Radial layers of the wall: one when its conduction resistance is small (Biot number
    h w / k below 0.1 with h = 10 W/(m^2 K), a typical outer coefficient), else four."""
    biot = 10.0 * np.max(wall.thickness_m) / wall.material.conductivity_across
    return 1 if biot < 0.1 else 4


class _Model:
    """Precomputed conductances, capacities and gas properties of one wall in one room."""

    def __init__(self, wall: Wall, room: air.Room, blowing: Blowing, breath: air.Breath,
                 layers: int | None = None):
        self.wall, self.room, self.blowing, self.breath = wall, room, blowing, breath
        m = _auto_layers(wall) if layers is None else int(layers)
        if m < 1:
            raise OutOfRangeError("the wall needs at least one radial layer")
        self.n, self.m = n, m = wall.positions_m.size, m
        mat = wall.material
        a = wall.inner_radius_m
        b = a + wall.thickness_m
        dx = wall.lengths_m
        radii = a[:, None] + (b - a)[:, None] * np.linspace(0.0, 1.0, m + 1)[None, :]
        mid = 0.5 * (radii[:, :-1] + radii[:, 1:])
        area = np.pi * (radii[:, 1:] ** 2 - radii[:, :-1] ** 2)
        self.capacity = mat.volumetric_heat_capacity * area * dx[:, None]  # (n, m) [J/K]
        two_pi_k = 2.0 * np.pi * mat.conductivity_across * dx
        # Radial conduction between layer centres (cylindrical shell, Incropera Eq. 3.27).
        self.g_radial = two_pi_k[:, None] / np.log(mid[:, 1:] / mid[:, :-1]) if m > 1 else np.zeros((n, 0))
        self.r_inner = np.log(mid[:, 0] / a) / two_pi_k      # inner surface -> first layer [K/W]
        self.r_outer = np.log(b / mid[:, -1]) / two_pi_k     # last layer -> outer surface [K/W]
        # Axial conduction between neighbouring segments, layer by layer.
        if n > 1:
            span = 0.5 * (dx[:-1] + dx[1:])
            self.g_axial = mat.conductivity * 0.5 * (area[:-1] + area[1:]) / span[:, None]
        else:
            self.g_axial = np.zeros((0, m))
        self.outer_area = 2.0 * np.pi * b * dx
        self.outer_diameter = 2.0 * b
        self.t_room = room.temperature_k
        p = room.pressure_pa

        # Gas properties, evaluated once (see the module docstring).
        room_x = air.room_air(room.temperature_k, p, room.relative_humidity, room.co2_fraction)
        breath_x = air.breath_air(p, breath)
        phi = blowing.inlet_breath_fraction
        self.t_in = phi * breath.temperature_k + (1.0 - phi) * room.temperature_k
        x_in, _ = air.mix(room_x, breath_x, phi, self.t_in, p)
        self.x_in_water = float(x_in[4])
        gas_in = air.gas_properties(self.t_in, p, x_in)
        t_film = 0.5 * (self.t_in + room.temperature_k)
        gas = air.gas_properties(t_film, p, x_in)
        room_gas = air.gas_properties(room.temperature_k, p, room_x)
        self.cp = float(gas.cp)
        self.k_gas = float(gas.conductivity)
        self.mu_gas = float(gas.viscosity)
        self.pr_gas = float(gas.prandtl)
        self.k_room = float(room_gas.conductivity)
        self.pr_room = float(room_gas.prandtl)
        self.nu_room = float(room_gas.viscosity / room_gas.density)
        self.alpha_room = float(room_gas.conductivity / (room_gas.density * room_gas.cp))
        molar_mass_in = float(gas_in.density) * MOLAR_GAS_CONSTANT * self.t_in / p
        self.mdot_in = float(gas_in.density) * blowing.flow_m3_s                  # [kg/s]
        self.ndot_dry_in = self.mdot_in / molar_mass_in * (1.0 - self.x_in_water)  # [mol/s]
        self.r_in = self.x_in_water / (1.0 - self.x_in_water)

        # Saturation water fraction over the temperature range of the problem, tabulated.
        low = min(room.temperature_k, self.t_in) - 2.0
        high = max(room.temperature_k, self.t_in) + 2.0
        self._t_grid = np.linspace(low, high, max(16, int((high - low) / 0.25) + 1))
        x_sat = air.saturation_water_fraction(self._t_grid, p)
        self._log_r_sat = np.log(x_sat / (1.0 - x_sat))

        # Internal convection, per segment (used while playing).
        w = np.asarray(wall.flow_fraction, dtype=float)
        self.inlet = int(np.argmax(w > 0.0)) if np.any(w > 0.0) and blowing.flow_m3_s > 0.0 else n
        # Breath fills the bore wherever the flow passes, and the dead-end cavity before the inlet
        # (mixed by the oscillating flow at the embouchure); beyond the last exit, room air.
        reached = w > 0.0
        reached[: self.inlet] = True
        self.phi_play = np.where(reached, phi, 0.0) if blowing.flow_m3_s > 0.0 else np.zeros(n)
        self.mdot = w * self.mdot_in
        self.ndot_dry = w * self.ndot_dry_in
        self.mdot_cp = self.mdot * self.cp
        self.exit_share = w - np.append(w[1:], 0.0)          # flow leaving after each segment
        self.flows = self.mdot > 0.0
        ua = self._inner_conductance(wall, w) * blowing.heat_transfer_factor
        # Convection in series with the conduction to the first layer's mid-radius.
        ua_eff = np.zeros(n)
        ua_eff[self.flows] = 1.0 / (1.0 / ua[self.flows] + self.r_inner[self.flows])
        self.ntu = np.zeros(n)
        self.ntu[self.flows] = ua_eff[self.flows] / self.mdot_cp[self.flows]
        self.decay = np.exp(-self.ntu)
        # Mean air temperature over a segment: T_w + (T_in - T_w) (1 - e^-NTU) / NTU (-> 1 as NTU -> 0).
        self.mean_share = np.ones(n)
        big = self.ntu > 1e-12
        self.mean_share[big] = (1.0 - self.decay[big]) / self.ntu[big]

    def _inner_conductance(self, wall: Wall, w: np.ndarray) -> np.ndarray:
        """Air-to-inner-surface conductance of each segment [W/K].

        Laminar: the heat flow over a segment [x1, x2] of a pipe whose mean Nusselt number from the
        entry is Nu_m(x) is pi k [x Nu_m(x)] from x1 to x2; with Gz = Re Pr D / x = 4 mdot cp /
        (pi k x) this does not depend on the diameter, which lets it serve conical bores too
        (Hausen 1943). Turbulent (Re > 3000): pi k Nu dx with Gnielinski (1976); linear blend in Re
        between 2300 and 3000.
        """
        mdot = w * self.mdot_in
        first = min(self.inlet, wall.positions_m.size - 1)
        edges = np.maximum(wall.edges_m - wall.edges_m[first], 0.0)

        def x_nu(x, md):
            x = np.asarray(x, dtype=float)
            with np.errstate(divide="ignore", invalid="ignore"):
                gz = 4.0 * md * self.cp / (np.pi * self.k_gas * x)
                out = x * nusselt_hausen_1943(gz)
            return np.where(x > 0.0, out, 0.0)

        laminar = np.pi * self.k_gas * (x_nu(edges[1:], mdot) - x_nu(edges[:-1], mdot))
        diameter = 2.0 * wall.inner_radius_m
        reynolds = 4.0 * mdot / (np.pi * diameter * self.mu_gas)
        turbulent = np.pi * self.k_gas * nusselt_gnielinski_1976(np.maximum(reynolds, 3000.0),
                                                                 self.pr_gas) * wall.lengths_m
        blend = np.clip((reynolds - 2300.0) / 700.0, 0.0, 1.0)
        ua = (1.0 - blend) * laminar + blend * np.maximum(laminar, turbulent)
        return np.where(mdot > 0.0, ua, 0.0)

    # -- pieces of the balance -----------------------------------------------------------------

    def r_sat(self, temperature_k):
        """Water-to-dry-gas mole ratio at saturation [mol/mol], from the table."""
        t = np.asarray(temperature_k, dtype=float)
        if np.any(t < self._t_grid[0]) or np.any(t > self._t_grid[-1]):
            x = air.saturation_water_fraction(t, self.room.pressure_pa)
            return x / (1.0 - x)
        return np.exp(np.interp(t, self._t_grid, self._log_r_sat))

    def air_play(self, t_inner):
        """The flowing air over inner-layer temperatures (n,) [K].

        Segment by segment from the inlet, T_out = T_w + (T_in - T_w) exp(-NTU) with
        NTU = UA / (mdot cp) (uniform wall temperature over a segment; Incropera et al. 2007,
        Eq. 8.42b), and the segment's mean air temperature T_w + (T_in - T_w)(1 - exp(-NTU))/NTU.
        Water is capped at saturation at T_out; the condensed water's latent heat goes into the
        wall.

        Returns
        -------
        dict with ``air_k`` (n,) mean air temperature per segment [K], ``outlet_k`` (n,) air
        leaving each segment [K], ``wall_w`` (n,) heat into each segment's wall [W] (sensible +
        latent), ``latent_w`` (n,), ``condensation_kg_s`` (n,), and ``breath_heat_w``, the heat the
        breath gives up: sensible heat of the inflow minus that of every outflow (constant cp),
        plus the latent heat released [W].
        """
        n = self.n
        t_out = np.array(t_inner, dtype=float, copy=True)
        t_mean = t_out.copy()
        if self.inlet >= n:  # no flow at all
            zero = np.zeros(n)
            return {"air_k": t_mean, "outlet_k": np.full(n, np.nan), "wall_w": zero, "latent_w": zero,
                    "condensation_kg_s": zero, "breath_heat_w": 0.0}
        t = self.t_in
        decay, share, flows = self.decay.tolist(), self.mean_share.tolist(), self.flows.tolist()
        tw = t_out.tolist()
        for i in range(self.inlet, n):
            if not flows[i]:
                break  # the flow share does not grow: no flow from here on
            t_mean[i] = tw[i] + (t - tw[i]) * share[i]
            t = tw[i] + (t - tw[i]) * decay[i]
            t_out[i] = t
        t_up = np.concatenate([[self.t_in], t_out[:-1]])
        t_up[self.inlet] = self.t_in
        sensible = np.where(self.flows, self.mdot_cp * (t_up - t_out), 0.0)
        r_out = np.full(n, self.r_in)
        r_out[self.flows] = np.minimum.accumulate(np.minimum(self.r_in, self.r_sat(t_out[self.flows])))
        r_up = np.concatenate([[self.r_in], r_out[:-1]])
        r_up[self.inlet] = self.r_in
        condensed_kg = np.where(self.flows, self.ndot_dry * (r_up - r_out), 0.0) * WATER_MOLAR_MASS
        latent = condensed_kg * latent_heat_condensation(t_out)
        inflow = self.mdot_cp[self.inlet] * self.t_in if self.inlet < n else 0.0
        outflow = float(np.sum(self.exit_share * self.mdot_in * self.cp * np.where(self.flows, t_out, 0.0)))
        return {"air_k": t_mean, "outlet_k": np.where(self.flows, t_out, np.nan), "wall_w": sensible + latent,
                "latent_w": latent, "condensation_kg_s": condensed_kg,
                "breath_heat_w": inflow - outflow + float(np.sum(latent))}

    def outer_conductance(self, t_outer):
        """Conductance from the outer layer to the room [W/K], per segment: wall conduction in
        series with convection (natural, Churchill & Chu 1975, mixed with forced cross flow,
        Churchill & Bernstein 1977) and radiation, the film evaluated at the outer layer's
        temperature."""
        tr = self.t_room
        dt = np.abs(t_outer - tr)
        beta = 2.0 / (t_outer + tr)
        ra = K.STANDARD_GRAVITY * beta * dt * self.outer_diameter**3 / (self.nu_room * self.alpha_room)
        nu_natural = nusselt_churchill_chu_1975(ra, self.pr_room)
        if self.blowing.air_speed_m_s > 0.0:
            re = self.blowing.air_speed_m_s * self.outer_diameter / self.nu_room
            nu = nusselt_mixed(nusselt_churchill_bernstein_1977(re, self.pr_room), nu_natural)
        else:
            nu = nu_natural
        h_conv = self.k_room * nu / self.outer_diameter
        h_rad = radiative_coefficient(t_outer, tr, self.wall.material.emissivity)
        return 1.0 / (self.r_outer + 1.0 / ((h_conv + h_rad) * self.outer_area))

    def heat_flows(self, temps, playing: bool):
        """Net heat into every wall node [W] (n, m), and the diagnostics of the balance."""
        q = np.zeros((self.n, self.m))
        if playing:
            a = self.air_play(temps[:, 0])
            q[:, 0] += a["wall_w"]
            t_air, latent, cond, given, outlet = (a["air_k"], a["latent_w"], a["condensation_kg_s"],
                                                  a["breath_heat_w"], a["outlet_k"])
        else:
            t_air, latent, cond, given = temps[:, 0].copy(), np.zeros(self.n), np.zeros(self.n), 0.0
            outlet = np.full(self.n, np.nan)
        if self.m > 1:
            f = self.g_radial * (temps[:, 1:] - temps[:, :-1])
            q[:, :-1] += f
            q[:, 1:] -= f
        if self.n > 1:
            f = self.g_axial * (temps[1:] - temps[:-1])
            q[:-1] += f
            q[1:] -= f
        loss = self.outer_conductance(temps[:, -1]) * (temps[:, -1] - self.t_room)
        q[:, -1] -= loss
        return q, {"air_k": t_air, "breath_heat_w": given, "room_loss_w": float(np.sum(loss)),
                   "latent_w": float(np.sum(latent)), "condensation_kg_s": float(np.sum(cond)),
                   "condensing": np.asarray(cond) > 0.0, "outlet_k": outlet}

    def rhs(self, playing: bool):
        n, m, cap = self.n, self.m, self.capacity

        def f(_t, y):
            temps = y[: n * m].reshape(n, m)
            q, d = self.heat_flows(temps, playing)
            return np.concatenate([(q / cap).ravel(), [d["breath_heat_w"], d["room_loss_w"]]])

        return f

    def stored_j(self, temps) -> float:
        """Heat held by the wall above room temperature [J]."""
        return float(np.sum(self.capacity * (temps - self.t_room)))


# --------------------------------------------------------------------------------------------
# Results and the public API
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class ThermalState:
    """The instrument at one moment: the profile handed to the acoustics layer, and the balance.

    Attributes
    ----------
    time_s : float
        Time since the start of the plan [s] (inf for the steady state).
    phase : str
        'play' or 'rest'.
    profile : air.BoreProfile
        Air temperature, breath fraction and (mean) wall temperature at the segment centres.
    wall_k : ndarray (n, m)
        Temperature of every wall layer [K], inner layer first.
    breath_heat_w : float
        Heat the breath gives up in the bore at this moment [W] (sensible + latent).
    room_loss_w : float
        Heat the outer surface loses to the room [W].
    latent_w : float
        Latent heat of condensation released into the wall [W].
    condensation_kg_s : float
        Water condensing in the bore [kg/s].
    condensing : ndarray of bool (n,)
        Segments where water condenses.
    outlet_k : ndarray (n,)
        Temperature of the air leaving each segment while playing [K] (NaN where no flow passes
        and while resting).
    stored_j : float
        Heat held by the wall above room temperature [J].
    breath_heat_j, room_loss_j : float
        Heat given up by the breath and lost to the room since the start of the plan [J].
    """

    time_s: float
    phase: str
    profile: air.BoreProfile
    wall_k: np.ndarray = field(repr=False)
    breath_heat_w: float = 0.0
    room_loss_w: float = 0.0
    latent_w: float = 0.0
    condensation_kg_s: float = 0.0
    condensing: np.ndarray = field(default=None, repr=False)
    outlet_k: np.ndarray = field(default=None, repr=False)
    stored_j: float = 0.0
    breath_heat_j: float = 0.0
    room_loss_j: float = 0.0

    @property
    def minute(self) -> float:
        return self.time_s / 60.0


def _state(model: _Model, time_s, phase, temps, breath_fraction, totals=(0.0, 0.0)) -> ThermalState:
    q, d = model.heat_flows(temps, phase == "play")
    wall_mean = np.sum(model.capacity * temps, axis=1) / np.sum(model.capacity, axis=1)
    profile = air.BoreProfile(model.room, model.wall.positions_m.copy(), d["air_k"],
                              np.asarray(breath_fraction, dtype=float), wall_mean, model.breath)
    return ThermalState(float(time_s), phase, profile, temps.copy(), d["breath_heat_w"], d["room_loss_w"],
                        d["latent_w"], d["condensation_kg_s"], d["condensing"], d["outlet_k"],
                        model.stored_j(temps),
                        float(totals[0]), float(totals[1]))


def steady_state(wall: Wall, room: air.Room, blowing: Blowing, breath: air.Breath = air.DEFAULT_BREATH,
                 layers: int | None = None) -> ThermalState:
    """The thermal state of a bore played long enough: wall heat balance at rest in time.

    Solves, for every wall node, 0 = (heat from the breath) + (conduction from neighbours) - (loss
    to the room) with :func:`scipy.optimize.root` (Powell hybrid method), started from the room
    temperature; the residual is checked to 1e-9 W per node.

    Parameters
    ----------
    wall : Wall
    room : air.Room
    blowing : Blowing
    breath : air.Breath
    layers : int, optional
        Radial layers of the wall (default: 1 for thin conductive walls, 4 otherwise).

    Returns
    -------
    ThermalState
        With ``time_s = inf`` and ``phase = 'play'``.
    """
    from scipy.optimize import root

    model = _Model(wall, room, blowing, breath, layers)
    shape = (model.n, model.m)

    def residual(y):
        return model.heat_flows(y.reshape(shape), True)[0].ravel()

    guess = np.full(model.n * model.m, room.temperature_k)
    solution = root(residual, guess, method="hybr", options={"xtol": 1e-12})
    worst = float(np.max(np.abs(residual(solution.x))))
    if not solution.success and worst > 1e-9:
        # Fall back on a long integration of the transient, then polish.
        y = _integrate(model, True, guess, 0.0, 4 * 3600.0, [4 * 3600.0])[0][-1]
        solution = root(residual, y, method="hybr", options={"xtol": 1e-12})
        worst = float(np.max(np.abs(residual(solution.x))))
        if worst > 1e-6:
            raise OutOfRangeError(f"the steady thermal state did not converge (residual {worst:.2g} W)")
    return _state(model, math.inf, "play", solution.x.reshape(shape), model.phi_play)


def _integrate(model: _Model, playing: bool, y0, t0, t1, t_eval):
    """Integrate the wall temperatures (and two heat totals) from t0 to t1 [s]; values at t_eval."""
    from scipy.integrate import solve_ivp

    n_nodes = model.n * model.m
    y0 = np.asarray(y0, dtype=float)
    if y0.size == n_nodes:
        y0 = np.concatenate([y0, [0.0, 0.0]])
    sol = solve_ivp(model.rhs(playing), (t0, t1), y0, method="LSODA", t_eval=np.asarray(t_eval, dtype=float),
                    rtol=1e-7, atol=np.concatenate([np.full(n_nodes, 1e-6), [1e-3, 1e-3]]))
    if not sol.success:
        raise OutOfRangeError(f"the thermal integration failed: {sol.message}")
    return sol.y[:n_nodes].T, sol.y[n_nodes:].T, sol.y[:, -1] if sol.y.shape[1] else y0


def timeline(wall: Wall, room: air.Room, plan: Sequence[Phase], times_s, blowing: Blowing,
             breath: air.Breath = air.DEFAULT_BREATH, initial: ThermalState | None = None,
             layers: int | None = None) -> list[ThermalState]:
    """Thermal states at chosen times of a play/rest plan.

    The plan starts from ``initial`` (default: wall at room temperature, bore full of room air).
    While playing, the wall temperatures follow C dT/dt = (heat from the breath) + (conduction) -
    (loss to the room), integrated by :func:`scipy.integrate.solve_ivp` (LSODA, rtol 1e-7); the air
    is quasi-steady over the wall. While resting there is no flow, the air takes the inner-wall
    temperature and the breath fraction decays as exp(-t / tau) with tau =
    ``blowing.exchange_time_s``. A time on the boundary between two phases belongs to the earlier one;
    time 0 to the first.

    Parameters
    ----------
    wall : Wall
    room : air.Room
    plan : sequence of Phase
    times_s : array_like
        Times from the start of the plan [s], within [0, total duration].
    blowing : Blowing
    breath : air.Breath
    initial : ThermalState, optional
        State to start from (its wall layers and breath fraction).
    layers : int, optional
        Radial layers of the wall.

    Returns
    -------
    list of ThermalState, one per time, in the order of ``times_s``.
    """
    if not plan:
        raise OutOfRangeError("a plan needs at least one phase")
    model = _Model(wall, room, blowing, breath, layers)
    times = np.asarray(times_s, dtype=float).ravel()
    total = plan_duration_s(plan)
    if times.size and (np.any(~np.isfinite(times)) or times.min() < 0.0 or times.max() > total + 1e-9):
        raise OutOfRangeError(f"times must lie within the plan, 0 to {total / 60.0:g} min")
    shape = (model.n, model.m)
    if initial is None:
        y = np.full(model.n * model.m, room.temperature_k)
        phi = np.zeros(model.n)
    else:
        if initial.wall_k.shape != shape:
            raise OutOfRangeError("the initial state does not belong to this wall (segments or layers differ)")
        y = initial.wall_k.ravel().copy()
        phi = np.interp(wall.positions_m, initial.profile.positions_m, initial.profile.breath_fraction)
    y = np.concatenate([y, [0.0, 0.0]])
    order = np.argsort(times, kind="stable")
    out: list[ThermalState | None] = [None] * times.size
    start = 0.0
    k = 0
    for index, phase in enumerate(plan):
        end = start + phase.duration_s if index < len(plan) - 1 else total
        playing = phase.state == "play"
        picks = []
        while k < order.size and (times[order[k]] <= end + 1e-9):
            picks.append(order[k])
            k += 1
        wanted = np.clip(np.array([times[i] for i in picks]), start, end)
        t_eval, where = np.unique(np.append(wanted, end), return_inverse=True)
        walls, totals, y = _integrate(model, playing, y, start, end, t_eval)
        phi_start = phi
        for j, i in enumerate(picks):
            if playing:
                phi_now = model.phi_play
            else:
                phi_now = phi_start * math.exp(-(wanted[j] - start) / blowing.exchange_time_s)
            row = where[j]
            out[i] = _state(model, times[i], phase.state, walls[row].reshape(shape), phi_now, totals[row])
        phi = model.phi_play if playing else phi_start * math.exp(-(end - start) / blowing.exchange_time_s)
        start = end
    return out


def settle_time(times_s, values, steady_values, tolerance) -> float | None:
    """Earliest time [s] from which every series stays within ``tolerance`` of its steady value.

    Parameters
    ----------
    times_s : array_like (t,)
        Ascending sample times [s].
    values : array_like (t, k)
        k series sampled at those times (for example cents of every note).
    steady_values : array_like (k,)
        The value each series settles to.
    tolerance : float
        Allowed distance, in the unit of ``values``.

    Returns
    -------
    float or None
        The first sample time after which no sample leaves the band; None if the last sample is
        still outside it.
    """
    t = np.asarray(times_s, dtype=float)
    v = np.asarray(values, dtype=float).reshape(t.size, -1)
    inside = np.all(np.abs(v - np.asarray(steady_values, dtype=float).reshape(1, -1)) <= tolerance, axis=1)
    if not inside.size or not inside[-1]:
        return None
    outside = np.flatnonzero(~inside)
    return float(t[0] if outside.size == 0 else t[outside[-1] + 1])


# --------------------------------------------------------------------------------------------
# Instruments
# --------------------------------------------------------------------------------------------

#: Wall material assumed when an instrument file names none, by excitation (common practice:
#: woodwind bodies of dense hardwood, brass instruments of yellow brass, flutes of nickel silver).
DEFAULT_MATERIALS = {"reed": "tropical_hardwood", "lips": "yellow_brass", "jet": "nickel_silver"}

#: An open side hole lets the mean flow out when its diameter is at least this share of the bore
#: diameter there (estimate: a small register, octave or vent hole has a flow resistance many times
#: that of the bore below it, so the flow passes it by).
EXIT_HOLE_RATIO = 0.4


def instrument_material(instrument) -> Material:
    """The wall material of an instrument: its ``material`` key, else the default of its excitation."""
    return material(instrument.material or DEFAULT_MATERIALS[instrument.excitation])


def flow_exits(instrument) -> np.ndarray:
    """Where the mean flow leaves the bore [m], one position per fingering of ``instrument``.

    The first open side hole at least :data:`EXIT_HOLE_RATIO` of the local bore diameter wide,
    counted from the input end (for a jet, beyond the embouchure); the open end when there is none.
    """
    holes = instrument.holes
    length = instrument.length_m
    notes = instrument.fingerings()
    if not holes:
        return np.full(len(notes), length)
    pos = np.array([h.position_m for h in holes])
    dia = np.array([h.diameter_m for h in holes])
    big = dia >= EXIT_HOLE_RATIO * instrument.diameter_at(pos)
    mask = instrument.open_mask(notes) & big[None, :]
    candidates = np.where(mask, pos[None, :], np.inf)
    first = candidates.min(axis=1)
    return np.where(np.isfinite(first), first, length)


def instrument_wall(instrument, segment_length_m: float = 0.02) -> Wall:
    """The :class:`Wall` of an instrument: its bore stations cut into segments, its wall thickness
    (``instrument.wall_thickness_m``) and material (:func:`instrument_material`), and the share of
    the flow reaching each segment averaged over its fingerings (:func:`flow_exits`,
    :func:`flow_fraction_from_exits`). For a jet the flow enters at the embouchure; the cavity
    between the stopped end and the embouchure sees none."""
    exits = flow_exits(instrument)
    inlet = instrument.input_end.embouchure_position_m if instrument.excitation == "jet" else -math.inf

    def share(x):
        return np.where(x >= inlet, flow_fraction_from_exits(x, exits), 0.0)

    return wall_from_stations(instrument.stations_m, instrument.wall_thickness_m,
                              instrument_material(instrument), segment_length_m, share)


def instrument_blowing(instrument) -> Blowing:
    """The default :class:`Blowing` of an instrument (by its excitation, :data:`DEFAULT_BLOWING`)."""
    return default_blowing(instrument.excitation)


def instrument_steady_state(instrument, room: air.Room, breath: air.Breath = air.DEFAULT_BREATH,
                            blowing: Blowing | None = None) -> ThermalState:
    """:func:`steady_state` of an instrument (its wall from :func:`instrument_wall`)."""
    return steady_state(instrument_wall(instrument), room, blowing or instrument_blowing(instrument), breath)


def instrument_timeline(instrument, room: air.Room, plan: Sequence[Phase], times_s,
                        breath: air.Breath = air.DEFAULT_BREATH, blowing: Blowing | None = None,
                        initial: ThermalState | None = None) -> list[ThermalState]:
    """:func:`timeline` of an instrument (its wall from :func:`instrument_wall`)."""
    blowing = blowing or instrument_blowing(instrument)
    return timeline(instrument_wall(instrument), room, plan, times_s, blowing, breath, initial)


def bore_profile(instrument, room: air.Room, playing: bool = True, minutes_played: float | None = None,
                 breath: air.Breath = air.DEFAULT_BREATH, blowing: Blowing | None = None) -> air.BoreProfile:
    """The bore profile of an instrument in a room, for the acoustics layer.

    Parameters
    ----------
    instrument : drift.bore.Instrument
    room : air.Room
    playing : bool
        False: the instrument rests at room temperature, full of room air.
    minutes_played : float or None
        Minutes of playing from a cold start (instrument at room temperature, full of room air);
        None: played long enough for the steady state.
    breath : air.Breath
    blowing : Blowing, optional
        Default: :func:`instrument_blowing`.
    """
    if not playing:
        return air.BoreProfile.uniform(room, 0.0, breath)
    if minutes_played is None:
        return instrument_steady_state(instrument, room, breath, blowing).profile
    if not 0.0 <= minutes_played <= 600.0:
        raise OutOfRangeError(f"minutes played {minutes_played:g} is outside the allowed range 0 to 600")
    if minutes_played == 0.0:
        plan, t = (Phase("play", 60.0),), 0.0
    else:
        plan, t = (Phase("play", minutes_played * 60.0),), minutes_played * 60.0
    return instrument_timeline(instrument, room, plan, [t], breath, blowing)[0].profile


def climate_profile(instrument, climate) -> air.BoreProfile:
    """The bore profile of an instrument in a :class:`drift.climate.Climate`: its room, and its
    player's ``playing``, ``minutes_played`` and breath (:func:`bore_profile`)."""
    p = climate.player
    return bore_profile(instrument, climate.room, p.playing, p.minutes_played, p.breath)


def design_profile(instrument, breath: air.Breath = air.DEFAULT_BREATH) -> air.BoreProfile:
    """The bore profile of an instrument's ``[design]`` condition: at rest (uniform room air), or,
    with ``playing = true``, the steady state of playing in the design room."""
    design = instrument.design
    return bore_profile(instrument, design.room(), design.playing, None, breath)


# --------------------------------------------------------------------------------------------
# Warm-up in pitch
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Warmup:
    """The pitch of every note over a play/rest plan.

    Attributes
    ----------
    notes : tuple of str
        Note labels (the fingering's name, or ``fingering N``).
    times_s : ndarray (t,)
        Sample times [s].
    states : list of ThermalState (t,)
        The thermal state at each time (``phase`` says play or rest).
    frequencies_hz : ndarray (t, k)
        Playing frequency of each note at each time [Hz].
    reference_hz : ndarray (k,)
        Frequency of each note at the reference condition [Hz].
    drift_cents : ndarray (t, k)
        1200 log2(f / f_reference) [cent].
    steady_hz : ndarray (k,)
        Frequency of each note in the steady state of playing in the same room [Hz].
    steady : ThermalState
    settle : list of (phase index, start [s], settled [s] or None)
        For each play phase: the first sample time from which every note stays within
        ``tolerance_cents`` of its steady-state frequency until the phase ends.
    tolerance_cents : float
    plan : tuple of Phase
    instrument, climate, reference : str
        Names for the report.
    settle_from_cold_s : float or None
        Time [s] of continuous playing from a cold start after which every note is within
        ``tolerance_cents`` of its steady state (:func:`settle_from_cold`); None beyond 10 h.
    inlet_position_m : float
        Centre of the segment where the breath enters the bore [m] (the embouchure for a jet).
    """

    notes: tuple[str, ...]
    times_s: np.ndarray
    states: list
    frequencies_hz: np.ndarray
    reference_hz: np.ndarray
    drift_cents: np.ndarray
    steady_hz: np.ndarray
    steady: ThermalState
    settle: list
    tolerance_cents: float
    plan: tuple = ()
    instrument: str = ""
    climate: str = ""
    reference: str = ""
    settle_from_cold_s: float | None = None
    inlet_position_m: float = 0.0

    def key_notes(self) -> list[int]:
        """Indices of a handful of notes, in ascending pitch: the lowest, the middle and the highest
        (by reference frequency) and the tuning note (A4 if there is one, else the note nearest
        440 Hz)."""
        f = self.reference_hz
        valid = np.flatnonzero(np.isfinite(f))
        if valid.size == 0:
            return list(range(min(4, len(self.notes))))
        by_pitch = valid[np.argsort(f[valid])]
        picks = {int(by_pitch[0]), int(by_pitch[len(by_pitch) // 2]), int(by_pitch[-1])}
        if "A4" in self.notes:
            picks.add(self.notes.index("A4"))
        else:
            picks.add(int(valid[np.argmin(np.abs(np.log(f[valid] / 440.0)))]))
        return sorted(picks, key=lambda i: f[i])

    def document(self) -> dict:
        """The result as plain data in boundary units (the JSON contract of ``drift warmup``)."""
        rows, bore_rows = [], []
        for t, state, freqs, drift in zip(self.times_s, self.states, self.frequencies_hz, self.drift_cents):
            minute = round(float(t) / 60.0, 6)
            for note, f, d in zip(self.notes, freqs, drift):
                rows.append({"minute": minute, "state": state.phase, "note": note, "frequency_hz": float(f),
                             "drift_cents": float(d)})
            p = state.profile
            for x, ta, tw, phi in zip(p.positions_m, p.temperature_k, p.wall_temperature_k, p.breath_fraction):
                bore_rows.append({"minute": minute, "position_mm": round(float(x) * 1e3, 3),
                                  "air_temperature_c": float(ta) - K.ZERO_CELSIUS,
                                  "wall_temperature_c": float(tw) - K.ZERO_CELSIUS,
                                  "breath_fraction": float(phi)})
        steady_drift = 1200.0 * np.log2(self.steady_hz / self.reference_hz)
        return {
            "instrument": self.instrument,
            "climate": self.climate,
            "reference": self.reference,
            "plan": [{"state": p.state, "minutes": p.duration_s / 60.0} for p in self.plan],
            "tolerance_cents": self.tolerance_cents,
            "rows": rows,
            "bore": bore_rows,
            "steady": [{"note": n, "frequency_hz": float(f), "drift_cents": float(d)}
                       for n, f, d in zip(self.notes, self.steady_hz, steady_drift)],
            "settle": [{"phase": i + 1, "start_minute": s / 60.0,
                        "settled_minute": None if t is None else t / 60.0,
                        "minutes_to_settle": None if t is None else (t - s) / 60.0}
                       for i, s, t in self.settle],
            "key_notes": [self.notes[i] for i in self.key_notes()],
            "settle_from_cold_minutes": (None if self.settle_from_cold_s is None
                                         else self.settle_from_cold_s / 60.0),
            "inlet_position_mm": round(self.inlet_position_m * 1e3, 3),
        }


def sample_times(plan: Sequence[Phase], step_s: float) -> np.ndarray:
    """Times [s] every ``step_s`` from 0 to the end of the plan, plus every phase boundary."""
    if not step_s > 0.0:
        raise OutOfRangeError(f"step {step_s:g} s must be positive")
    total = plan_duration_s(plan)
    if total / step_s > 5000:
        raise OutOfRangeError(f"step {step_s:g} s gives more than 5000 samples over {total / 60:g} min")
    bounds = np.cumsum([0.0] + [p.duration_s for p in plan])
    grid = np.arange(0.0, total + 1e-9, step_s)
    return np.unique(np.round(np.concatenate([grid, bounds]), 9))


#: Longest continuous playing searched for a settle time [s] (10 h).
SETTLE_SEARCH_S = 600.0 * 60.0


def settle_from_cold(instrument, room: air.Room, steady_hz, tolerance_cents: float = 2.0,
                     breath: air.Breath = air.DEFAULT_BREATH, blowing: Blowing | None = None,
                     notes=None, progress=None, resolution_s: float = 5.0) -> float | None:
    """Time [s] of continuous playing from a cold start until every note is within
    ``tolerance_cents`` of its steady-state frequency ``steady_hz`` [Hz].

    Found by bracketed root finding (:func:`scipy.optimize.brentq`, to ``resolution_s``) on
    g(t) = max over notes |1200 log2(f(t) / f_steady)| - tolerance, each f(t) from a fresh
    timeline of t seconds' playing. This assumes the approach is monotone, as the wall
    temperatures are when warming from cold; returns 0 when the first note is already inside and
    None when 10 h of playing do not reach the band.
    """
    from scipy.optimize import brentq

    from drift import pitch

    notes = instrument.fingerings() if notes is None else tuple(notes)
    steady_hz = np.asarray(steady_hz, dtype=float)

    def gap(t):
        t = float(t)
        plan = (Phase("play", max(t, 1.0)),)
        state = instrument_timeline(instrument, room, plan, [t], breath, blowing)[0]
        f = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, state.profile, notes=notes)])
        if progress is not None:
            progress()
        return float(np.nanmax(np.abs(1200.0 * np.log2(f / steady_hz)))) - tolerance_cents

    if gap(0.0) <= 0.0:
        return 0.0
    if gap(SETTLE_SEARCH_S) > 0.0:
        return None
    return float(brentq(gap, 0.0, SETTLE_SEARCH_S, xtol=resolution_s))


def warmup(instrument, room: air.Room, plan: Sequence[Phase], step_s: float = 30.0,
           breath: air.Breath = air.DEFAULT_BREATH, reference: air.BoreProfile | None = None,
           blowing: Blowing | None = None, tolerance_cents: float = 2.0, progress=None,
           names: tuple[str, str] = ("", "")) -> Warmup:
    """The pitch of every note of ``instrument`` over a play/rest plan starting cold.

    Thermal states at :func:`sample_times` (:func:`instrument_timeline`) are turned into note
    frequencies by :func:`drift.pitch.note_frequencies`; drift is in cents against ``reference``
    (default :func:`design_profile`). The settle time of each play phase is measured on the
    sample grid against the steady state of playing (:func:`instrument_steady_state`,
    :func:`settle_time`), and for continuous playing from cold (:func:`settle_from_cold`).
    ``progress``, if given, is called once per profile evaluated;
    ``names`` are the (climate, reference) names for the report.
    """
    from drift import pitch

    times = sample_times(plan, step_s)
    states = instrument_timeline(instrument, room, plan, times, breath, blowing)
    steady = instrument_steady_state(instrument, room, breath, blowing)
    reference = design_profile(instrument, breath) if reference is None else reference
    notes = instrument.fingerings()
    labels = tuple(n.name if n.name else f"fingering {i + 1}" for i, n in enumerate(notes))

    def hz(profile):
        out = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, profile, notes=notes)])
        if progress is not None:
            progress()
        return out

    freqs = np.array([hz(s.profile) for s in states])
    ref = hz(reference)
    steady_hz = hz(steady.profile)
    drift = 1200.0 * np.log2(freqs / ref[None, :])
    steady_cents = 1200.0 * np.log2(freqs / steady_hz[None, :])
    settle = []
    start = 0.0
    for index, phase in enumerate(plan):
        end = start + phase.duration_s
        if phase.state == "play":
            # A boundary time belongs to the phase before it (see :func:`timeline`).
            after_start = (times > start + 1e-9) | ((times <= 1e-9) if index == 0 else False)
            inside = after_start & (times <= end + 1e-9)
            t = settle_time(times[inside], steady_cents[inside], np.zeros(len(notes)), tolerance_cents)
            settle.append((index, start, t))
        start = end
    from_cold = settle_from_cold(instrument, room, steady_hz, tolerance_cents, breath, blowing, notes,
                                 progress)
    wall = instrument_wall(instrument)
    inlet = wall.positions_m[int(np.argmax(wall.flow_fraction > 0.0))]
    return Warmup(labels, times, states, freqs, ref, drift, steady_hz, steady, settle, tolerance_cents,
                  tuple(plan), instrument.name, names[0], names[1], from_cold, float(inlet))
