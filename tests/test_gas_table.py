"""Tests of drift.gas_table against direct evaluations by CoolProp.

Source of the reference values: CoolProp 8 (Bell, Wronski, Quoilin & Lemort 2014, Ind. Eng. Chem.
Res. 53, 2498-2508), an independent general-purpose property library: HEOS backend, mixture
"Nitrogen&Oxygen&Argon&CarbonDioxide&Water", gas phase imposed, PT_INPUTS, one state at a time.
The table itself was fitted to values from the same library at grid nodes (tools/make_gas_table.py);
these tests evaluate it at random states between the nodes, so they measure how faithfully the
table reproduces its source, which is the table's whole job.

Tolerances are the accuracy the table is specified to deliver, far looser than CoolProp's own
numerical precision (about 1e-10): 5 ppm in sound speed (about 0.009 cent of pitch), 0.1 % in the
other properties.
"""

import subprocess
import sys
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from drift import air, gas_table
from drift.constants import COOLPROP_FLUIDS, DRY_AIR_N2_O2_AR, ZERO_CELSIUS
from drift.errors import OutOfRangeError

ROOT = Path(__file__).resolve().parents[1]

T_RANGE = (243.15, 333.15)
P_RANGE = (50e3, 110e3)
O2_DRY = (0.05, 0.21)
CO2_DRY = (0.0, 0.10)
RANDOM_STATES = 320
SEED = 20240611

SOUND_SPEED_TOLERANCE = 5e-6
PROPERTY_TOLERANCE = 1e-3


def composition(water, o2_dry, co2_dry):
    """Mole fractions (N2, O2, Ar, CO2, H2O) with N2 : Ar as ISO 2533 dry air."""
    water, o2_dry, co2_dry = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                                   for v in (water, o2_dry, co2_dry)))
    n2_ar = DRY_AIR_N2_O2_AR[[0, 2]] / DRY_AIR_N2_O2_AR[[0, 2]].sum()
    rest = 1.0 - o2_dry - co2_dry
    dry = np.stack([n2_ar[0] * rest, o2_dry, n2_ar[1] * rest, co2_dry], axis=-1)
    return np.concatenate([(1.0 - water)[..., None] * dry, water[..., None]], axis=-1)


def states():
    """Random states over the whole domain (water up to saturation as drift.air defines it:
    f p_sat / p), then the 32 corners: each end of T, p, dry-basis O2 and CO2, dry and saturated."""
    rng = np.random.default_rng(SEED)
    t = rng.uniform(*T_RANGE, RANDOM_STATES)
    p = rng.uniform(*P_RANGE, RANDOM_STATES)
    humidity = rng.uniform(0.0, 1.0, RANDOM_STATES)
    o2 = rng.uniform(*O2_DRY, RANDOM_STATES)
    co2 = rng.uniform(*CO2_DRY, RANDOM_STATES)
    corners = np.array(np.meshgrid(T_RANGE, P_RANGE, [0.0, 1.0], O2_DRY, CO2_DRY,
                                   indexing="ij")).reshape(5, -1)
    t, p, humidity, o2, co2 = (np.concatenate([a, b])
                               for a, b in zip((t, p, humidity, o2, co2), corners))
    water = humidity * air.saturation_water_fraction(t, p)
    return t, p, composition(water, o2, co2)


def water_critical_term(t, rho_molar):
    """Critical enhancement lambda_2 [W/(m K)] of the IAPWS 2011 conductivity of pure water.

    Huber et al. (2012), J. Phys. Chem. Ref. Data 41, 033102 (IAPWS R15-11), Eqs. 11-13 and the
    constants of its Table 6 (Lambda = 177.8514, q_D^-1 = 0.40 nm, nu = 0.630, gamma = 1.239,
    xi_0 = 0.13 nm, Gamma_0 = 0.06, T_R = 1.5 T_c), reducing constants T_c = 647.096 K,
    rho_c = 322 kg/m^3, p_c = 22.064 MPa, R = 461.51805 J/(kg K). Water's (d rho / d p)_T, cp, cv
    and viscosity at (T, rho) are CoolProp's, as in CoolProp's own evaluation.
    """
    tc, rhoc, pc, rw = 647.096, 322.0, 22.064e6, 461.51805
    water = CP.AbstractState("HEOS", "Water")
    water.specify_phase(CP.iphase_gas)
    out = np.zeros(len(t))
    for i, (ti, rho) in enumerate(zip(t, rho_molar)):
        water.update(CP.DmolarT_INPUTS, float(rho), float(ti))
        zeta = pc / rhoc * water.first_partial_deriv(CP.iDmass, CP.iP, CP.iT)
        cp, cv, eta, rho_mass = water.cpmass(), water.cvmass(), water.viscosity(), water.rhomass()
        water.update(CP.DmolarT_INPUTS, float(rho), 1.5 * tc)
        zeta_r = pc / rhoc * water.first_partial_deriv(CP.iDmass, CP.iP, CP.iT)
        rb, tb = rho_mass / rhoc, ti / tc
        delta_chi = rb * (zeta - zeta_r * 1.5 / tb)
        if delta_chi <= 0:
            continue  # Eq. 13: xi = 0, no enhancement
        y = 0.13 * (delta_chi / 0.06) ** (0.630 / 1.239) / 0.40
        if y < 1.2e-7:
            continue
        kappa = cp / cv
        z = 2.0 / (np.pi * y) * ((1 - 1 / kappa) * np.arctan(y) + y / kappa
                                 - (1 - np.exp(-1 / (1 / y + y * y / (3 * rb * rb)))))
        out[i] = 177.8514 * rb * (cp / rw) * tb / (eta / 1e-6) * z * 1e-3
    return out


def water_past_spinodal(t, rho_molar):
    """True where pure water at (T, rho) has (d p / d rho)_T < 0: there IAPWS 2011's Delta chi is
    negative and its critical term is zero by definition (Huber et al. 2012, Eq. 13)."""
    water = CP.AbstractState("HEOS", "Water")
    water.specify_phase(CP.iphase_gas)
    out = np.zeros(len(t), dtype=bool)
    for i, (ti, rho) in enumerate(zip(t, rho_molar)):
        water.update(CP.DmolarT_INPUTS, float(rho), float(ti))
        out[i] = water.first_partial_deriv(CP.iP, CP.iDmolar, CP.iT) < 0
    return out


@pytest.fixture(scope="module")
def comparison():
    """Table and CoolProp values at the test states.

    CoolProp 8 finds no density (NaN pressure) when the CO2 and H2O fractions are both exactly 0;
    there its reference is taken with each raised to 1e-12 (observed to move the properties by
    about 1e-12 relative).
    """
    t, p, x = states()
    state = CP.AbstractState("HEOS", "&".join(COOLPROP_FLUIDS))
    state.specify_phase(CP.iphase_gas)
    ref = np.empty((len(t), 7))
    for i, (ti, pi, xi) in enumerate(zip(t, p, x)):
        xi = xi.copy()
        xi[3:] = np.maximum(xi[3:], 1e-12)
        state.set_mole_fractions(list(xi / xi.sum()))
        state.update(CP.PT_INPUTS, float(pi), float(ti))
        cp = state.cpmass()
        ref[i] = (state.speed_sound(), state.rhomass(), state.viscosity(), state.conductivity(), cp,
                  cp / state.cvmass(), state.rhomolar())
    ours = np.stack(gas_table.table_properties(t, p, x), axis=-1)
    return {"t": t, "p": p, "x": x, "ours": ours, "ref": ref}


def where(c, i):
    dry = 1.0 - c["x"][i, 4]
    return (f"at {c['t'][i] - ZERO_CELSIUS:.2f} °C, {c['p'][i] * 1e-3:.2f} kPa, "
            f"x_H2O {c['x'][i, 4]:.4f}, O2 dry {c['x'][i, 1] / dry:.4f}, CO2 dry {c['x'][i, 3] / dry:.4f}")


#: The states compared: the random ones and the corners of :func:`states`.
STATES = (f"{RANDOM_STATES + 32} states, -30 to 60 °C, 50-110 kPa, dry to saturated, "
          "O2 5-21 % and CO2 0-10 % of the dry gas")
#: The reference of every comparison below.
COOLPROP = ("CoolProp 8 (Bell et al. 2014), HEOS mixture N2-O2-Ar-CO2-H2O, gas phase, "
            "state by state (independent library)")


def check_against_coolprop(outside, c, measured, expected, *, quantity, source=COOLPROP, rel, unit="",
                           rows=None):
    """``outside.check`` of table values against reference values at the states ``rows`` (all by
    default), naming the state of the largest deviation when it fails."""
    rows = np.arange(len(c["t"])) if rows is None else np.flatnonzero(rows)
    try:
        outside.check(measured, expected, quantity=quantity, source=source, rel=rel, unit=unit)
    except AssertionError as error:
        i = int(np.argmax(np.abs(np.asarray(measured) / np.asarray(expected) - 1.0)))
        raise AssertionError(f"{error}; {where(c, rows[i])}") from None


def test_states_cover_the_domain(comparison):
    t, p, x = comparison["t"], comparison["p"], comparison["x"]
    assert len(t) >= 300 + 32
    assert t.min() == T_RANGE[0] and t.max() == T_RANGE[1]
    assert p.min() == P_RANGE[0] and p.max() == P_RANGE[1]
    saturated = np.isclose(x[:, 4], air.saturation_water_fraction(t, p), rtol=1e-12)
    assert np.sum(x[:, 4] == 0) >= 16 and np.sum(saturated) >= 16


def test_sound_speed_within_5_ppm_of_coolprop(outside, comparison):
    c = comparison
    check_against_coolprop(outside, c, c["ours"][:, 0], c["ref"][:, 0],
                           quantity=f"speed of sound from the shipped table, {STATES}", rel=SOUND_SPEED_TOLERANCE,
                           unit="m/s")


@pytest.mark.parametrize("column, name, unit", [(1, "density", "kg/m³"), (2, "viscosity", "Pa s"),
                                                (4, "cp", "J/(kg K)"), (5, "gamma", "")])
def test_property_within_0_1_percent_of_coolprop(outside, comparison, column, name, unit):
    c = comparison
    check_against_coolprop(outside, c, c["ours"][:, column], c["ref"][:, column],
                           quantity=f"{name} from the shipped table, {STATES}", rel=PROPERTY_TOLERANCE, unit=unit)


def test_conductivity_against_coolprop_where_water_has_no_critical_term(outside, comparison):
    """Plain CoolProp, at the states where its water conductivity carries no IAPWS-2011 critical
    term: dry gas, or pure water past its vapour spinodal at the mixture's (T, rho)."""
    c = comparison
    clean = (c["x"][:, 4] == 0) | water_past_spinodal(c["t"], c["ref"][:, 6])
    assert clean.sum() >= 100  # the comparison below is not empty
    check_against_coolprop(outside, c, c["ours"][clean, 3], c["ref"][clean, 3], rows=clean,
                           quantity=f"thermal conductivity from the shipped table, the {int(clean.sum())} states "
                           "of the set where water has no critical term (dry, or past water's vapour spinodal)",
                           rel=PROPERTY_TOLERANCE, unit="W/(m K)")


def test_conductivity_against_coolprop_less_water_critical_term(outside, comparison):
    """Everywhere: CoolProp's mixture conductivity, sum x_i lambda_i(T, rho), less x_H2O lambda_2,
    the IAPWS-2011 critical term of water evaluated at the mixture density, which the table
    leaves out by design (see drift.gas_table). That term reaches far beyond 0.1 % near water's
    vapour spinodal, which this state set must cross for the test to mean something."""
    c = comparison
    term = c["x"][:, 4] * water_critical_term(c["t"], c["ref"][:, 6])
    assert np.max(term / c["ref"][:, 3]) > 10 * PROPERTY_TOLERANCE
    check_against_coolprop(outside, c, c["ours"][:, 3], c["ref"][:, 3] - term,
                           quantity=f"thermal conductivity from the shipped table, {STATES}",
                           source=COOLPROP + ", less x_H2O times water's critical term of Huber et al. (2012), "
                           "IAPWS R15-11, Eqs. 11-13, Table 6", rel=PROPERTY_TOLERANCE, unit="W/(m K)")


def test_prandtl_number(outside, comparison):
    """Pr = cp eta / lambda from CoolProp (lambda less the water term as above); the tolerance is
    the sum of the three factors' tolerances."""
    c = comparison
    lam = c["ref"][:, 3] - c["x"][:, 4] * water_critical_term(c["t"], c["ref"][:, 6])
    check_against_coolprop(outside, c, c["ours"][:, 6], c["ref"][:, 4] * c["ref"][:, 2] / lam,
                           quantity=f"Prandtl number from the shipped table, {STATES}",
                           source=COOLPROP + ": cp eta / lambda, lambda less x_H2O times water's critical term of "
                           "Huber et al. (2012)", rel=3 * PROPERTY_TOLERANCE)


def test_states_from_the_air_layer_are_accepted():
    """Room air saturated at the cold end with 10 % CO2, and breath at both O2 limits: inside."""
    t = np.array([T_RANGE[0], T_RANGE[1]])
    for p in P_RANGE:
        room = air.room_air(t, p, 1.0, 0.1)
        for o2 in O2_DRY:
            breath = air.breath_air(p, air.Breath(temperature_k=308.15, co2_fraction=0.1,
                                                  o2_fraction=o2))
            mixed, _ = air.mix(room, breath, 0.5, t, p)
            for x in (room, mixed):
                values = gas_table.table_properties(t, p, x)
                assert all(np.all(np.isfinite(v)) for v in values)


def test_broadcasting_matches_state_by_state():
    t = np.array([[250.0], [300.0], [330.0]])
    p = np.array([55e3, 80e3, 101325.0, 109e3])
    x = composition(0.0005, 0.2, 0.03)
    values = gas_table.table_properties(t, p, x)
    assert all(v.shape == (3, 4) for v in values)
    for i in range(3):
        for j in range(4):
            single = gas_table.table_properties(float(t[i, 0]), float(p[j]), x)
            assert all(v.shape == () for v in single)
            assert np.allclose([v[i, j] for v in values], single, rtol=1e-13, atol=0)


def test_scalar_fractions_shape_is_checked():
    with pytest.raises(ValueError):
        gas_table.table_properties(300.0, 1e5, [0.78, 0.21, 0.01])


ROOM = composition(0.001, 0.2, 0.001)


@pytest.mark.parametrize(
    "t, p, x, words",
    [
        (243.0, 1e5, ROOM, ("temperature", "-30 to 60 °C")),
        (333.3, 1e5, ROOM, ("temperature", "-30 to 60 °C")),
        (np.nan, 1e5, ROOM, ("temperature", "-30 to 60 °C")),
        (300.0, 49.9e3, ROOM, ("pressure", "50 to 110 kPa")),
        (300.0, 110.1e3, ROOM, ("pressure", "50 to 110 kPa")),
        (300.0, 1e5, composition(0.04, 0.2, 0.001), ("water vapour", "saturation")),
        (260.0, 1e5, composition(0.003, 0.2, 0.001), ("water vapour", "saturation")),
        (300.0, 1e5, composition(0.01, 0.04, 0.001), ("O2", "0.05 to 0.21")),
        (300.0, 1e5, composition(0.01, 0.22, 0.001), ("O2", "0.05 to 0.21")),
        (300.0, 1e5, composition(0.01, 0.15, 0.11), ("CO2", "0 to 0.1")),
        (300.0, 1e5, np.array([0.78, 0.2, 0.0094, 0.0006, 0.011]), ("sum", "1")),
        (300.0, 1e5, np.array([0.79, 0.2, 0.0094, 0.0106, -0.01]), ("negative",)),
        (300.0, 1e5, np.array([0.78, 0.2, 0.0194, 0.0006, 0.0]), ("argon",)),
    ],
)
def test_outside_the_domain_raises(t, p, x, words):
    with pytest.raises(OutOfRangeError) as caught:
        gas_table.table_properties(t, p, x)
    for word in words:
        assert word in str(caught.value)


def test_module_runs_without_coolprop_or_scipy():
    code = (
        "import sys\n"
        "from drift.gas_table import table_properties\n"
        "x = [0.78084 * 0.9995, 0.209476 * 0.9995, 0.00934 * 0.9995, 0.0004, 0.0001]\n"
        "s = sum(x); x = [v / s for v in x]\n"
        "c = table_properties(293.15, 101325.0, x)[0]\n"
        "assert 340 < c < 346, c  # about 343 m/s in air at 20 °C (common practice)\n"
        "loaded = sorted(m for m in sys.modules if m.split('.')[0] in ('CoolProp', 'scipy'))\n"
        "print(loaded)\n"
    )
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                            cwd=ROOT, env={"PYTHONPATH": str(ROOT), "PATH": ""}, timeout=120)
    assert result.returncode == 0, result.stderr
    assert result.stdout.strip() == "[]"
