"""Write drift/data/gas_table.npz, the real-gas property table read by drift.gas_table.

Every number in the table comes from CoolProp's HEOS backend (Bell et al. 2014): the mixture
"Nitrogen&Oxygen&Argon&CarbonDioxide&Water" with the gas phase imposed, updated with PT_INPUTS,
and the five pure fluids. The method, the grid and the domain are described in the docstring of
drift/gas_table.py. After writing the table, the script compares it with direct CoolProp
evaluations at an independent set of random states (plus the corners of the domain) and prints
the worst relative deviation of each property and where it occurs.

Run from the repository root:  python tools/make_gas_table.py  [--check 4000] [--seed 2024]
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import CoolProp  # noqa: E402
import CoolProp.CoolProp as CP  # noqa: E402

from drift import constants as K  # noqa: E402
from drift import gas_table  # noqa: E402

OUTPUT = ROOT / "drift" / "data" / gas_table.TABLE_FILE

#: Domain of the table: temperature [K], pressure [Pa], dry-basis O2 and CO2 [mol/mol].
DOMAIN = {"t_k": (243.15, 333.15), "p_pa": (50e3, 110e3), "o2_dry": (0.05, 0.21),
          "co2_dry": (0.0, 0.10)}
#: Fine temperature grid [K]: ideal-gas cp0_i, the water limit, pure-fluid transport (cubic).
#: Both temperature grids reach 3 K past the domain, so the cubic stencils stay centred.
FINE_T_K = np.linspace(240.15, 336.15, 97)
#: Coarse grid of the real-gas factors, and the Lagrange order along each axis. The temperature
#: nodes are a subset of FINE_T_K.
RES_T_K = np.linspace(240.15, 336.15, 33)
RES_P_PA = np.linspace(50e3, 110e3, 3)
RES_U = np.linspace(0.0, 1.0, 7)
RES_O2 = np.linspace(0.05, 0.21, 4)
RES_CO2 = np.linspace(0.0, 0.10, 3)
assert RES_P_PA[[0, -1]].tolist() == list(DOMAIN["p_pa"])
assert RES_O2[[0, -1]].tolist() == list(DOMAIN["o2_dry"])
assert RES_CO2[[0, -1]].tolist() == list(DOMAIN["co2_dry"])
ORDERS = {"t_k": 3, "p_pa": 2, "u": 3, "o2": 3, "co2": 2}
#: Saturation pressure over liquid water, 0 to 100 °C every 0.25 K (IAPWS-95 through CoolProp):
#: the nodes of drift.air's cubic spline of ln p_sat (stored with the spline's pieces).
LIQUID_T_K = np.linspace(K.ZERO_CELSIUS, K.ZERO_CELSIUS + 100.0, 401)
#: Water limit: x_H2O <= WATER_LIMIT_FACTOR * p_sat(T) / p (covers the enhancement factor).
WATER_LIMIT_FACTOR = 1.01
#: Molar densities [mol/m^3] over which the pure-fluid transport quadratics are fitted; the
#: domain spans about 18 to 55 mol/m^3.
FIT_DENSITY = np.linspace(10.0, 70.0, 13)
#: Densities [mol/m^3] at which pure water is past its vapour spinodal for every table
#: temperature (checked below), so that CoolProp's IAPWS-2011 conductivity has no critical term;
#: with the zero-density value they fix water's background conductivity.
WATER_BACKGROUND_DENSITY = np.linspace(80.0, 160.0, 9)
#: CoolProp's mixture model fails (NaN pressure) when CO2 and H2O are both exactly zero; such
#: states are evaluated with these two fractions raised to this floor (the properties are
#: continuous there: 1e-12 moves them by about 1e-12 relative).
ZERO_FLOOR = 1e-12

FLUIDS = "&".join(K.COOLPROP_FLUIDS)
PROPERTY_NAMES = ("sound speed", "density", "viscosity", "conductivity", "cp", "gamma", "prandtl")


# --------------------------------------------------------------------------------------------
# CoolProp evaluations
# --------------------------------------------------------------------------------------------


def mixture_state():
    state = CP.AbstractState("HEOS", FLUIDS)
    state.specify_phase(CP.iphase_gas)
    return state


def composition(water, o2_dry, co2_dry):
    """Mole fractions (N, 5) from x_H2O and the dry-basis O2 and CO2; N2 : Ar as ISO dry air."""
    water, o2_dry, co2_dry = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in
                                                   (water, o2_dry, co2_dry)))
    n2_ar = K.DRY_AIR_N2_O2_AR[[0, 2]] / K.DRY_AIR_N2_O2_AR[[0, 2]].sum()
    rest = 1.0 - o2_dry - co2_dry
    dry = np.stack([n2_ar[0] * rest, o2_dry, n2_ar[1] * rest, co2_dry], axis=-1)
    return np.concatenate([(1.0 - water)[..., None] * dry, water[..., None]], axis=-1)


def floored(x):
    x = np.array(x, dtype=float)
    x[3:] = np.maximum(x[3:], ZERO_FLOOR)
    return x / x.sum()


def coolprop_thermo(state, t, p, x):
    """Sound speed, mass density, cp, gamma and molar density from the mixture, state by state."""
    out = np.empty((len(t), 5))
    for i, (ti, pi, xi) in enumerate(zip(t, p, x)):
        state.set_mole_fractions(list(floored(xi)))
        state.update(CP.PT_INPUTS, float(pi), float(ti))
        cp = state.cpmass()
        out[i] = (state.speed_sound(), state.rhomass(), cp, cp / state.cvmass(), state.rhomolar())
    return out


def coolprop_all(state, t, p, x):
    """The seven properties in the order of drift.gas_table, and the molar density, (N, 8)."""
    out = np.empty((len(t), 8))
    for i, (ti, pi, xi) in enumerate(zip(t, p, x)):
        state.set_mole_fractions(list(floored(xi)))
        state.update(CP.PT_INPUTS, float(pi), float(ti))
        cp = state.cpmass()
        eta = state.viscosity()
        kappa = state.conductivity()
        out[i] = (state.speed_sound(), state.rhomass(), eta, kappa, cp, cp / state.cvmass(),
                  cp * eta / kappa, state.rhomolar())
    return out


def saturation_pressure(t):
    """p_sat [Pa]: over liquid water from CoolProp (IAPWS-95) at and above 273.15 K, over ice
    below (Wagner et al. 2011, Eq. 6, coefficients in drift.constants)."""
    water = CP.AbstractState("HEOS", "Water")
    out = []
    for ti in np.atleast_1d(t):
        if ti >= K.ZERO_CELSIUS:
            water.update(CP.QT_INPUTS, 0.0, float(ti))
            out.append(water.p())
        else:
            theta = ti / K.WATER_TRIPLE_T
            series = np.sum(K.ICE_SUBLIMATION_A * theta ** K.ICE_SUBLIMATION_B)
            out.append(K.WATER_TRIPLE_P * np.exp(series / theta))
    return np.array(out)


def ideal_cp0():
    """cp0_i(T) [J/(mol K)] of the five pure fluids on FINE_T_K, (n, 5)."""
    out = np.empty((FINE_T_K.size, len(K.COOLPROP_FLUIDS)))
    for s, name in enumerate(K.COOLPROP_FLUIDS):
        fluid = CP.AbstractState("HEOS", name)
        fluid.specify_phase(CP.iphase_gas)
        for i, t in enumerate(FINE_T_K):
            fluid.update(CP.DmolarT_INPUTS, 1e-3, float(t))
            out[i, s] = fluid.cp0molar()
    return out


def transport_coefficients():
    """Quadratics in molar density of ln eta_i and ln lambda_i per species on FINE_T_K.

    Pure fluids are updated exactly as CoolProp's mixture transport does (a fresh pure-fluid
    state, DmolarT_INPUTS, phase not imposed). For water's conductivity the fit uses the value at
    zero density and values past the vapour spinodal, where IAPWS 2011's critical term is zero.

    Returns
    -------
    ln_viscosity_coef, ln_conductivity_coef : ndarray (n, 5, 3), ascending powers of
        rho [mol/m^3]
    fit_error : dict of the worst relative misfit of the quadratics at their own points
    """
    n, species = FINE_T_K.size, len(K.COOLPROP_FLUIDS)
    visc = np.empty((n, species, 3))
    cond = np.empty((n, species, 3))
    misfit = {"viscosity": 0.0, "conductivity": 0.0, "water background": 0.0}
    water_gas = CP.AbstractState("HEOS", "Water")
    water_gas.specify_phase(CP.iphase_gas)
    for s, name in enumerate(K.COOLPROP_FLUIDS):
        fluid = CP.AbstractState("HEOS", name)
        for i, t in enumerate(FINE_T_K):
            eta, lam = [], []
            for rho in FIT_DENSITY:
                fluid.update(CP.DmolarT_INPUTS, float(rho), float(t))
                eta.append(fluid.viscosity())
                lam.append(fluid.conductivity())
            c = np.polynomial.polynomial.polyfit(FIT_DENSITY, np.log(eta), 2)
            visc[i, s] = c
            fit = np.exp(np.polynomial.polynomial.polyval(FIT_DENSITY, c))
            misfit["viscosity"] = max(misfit["viscosity"], np.max(np.abs(fit / eta - 1)))
            if name != "Water":
                c = np.polynomial.polynomial.polyfit(FIT_DENSITY, np.log(lam), 2)
                fit = np.exp(np.polynomial.polynomial.polyval(FIT_DENSITY, c))
                misfit["conductivity"] = max(misfit["conductivity"], np.max(np.abs(fit / lam - 1)))
            else:
                rho_fit = np.concatenate([[1e-6], WATER_BACKGROUND_DENSITY])
                lam_fit = []
                for rho in rho_fit:
                    fluid.update(CP.DmolarT_INPUTS, float(rho), float(t))
                    lam_fit.append(fluid.conductivity())
                    if rho > 1.0:
                        water_gas.update(CP.DmolarT_INPUTS, float(rho), float(t))
                        slope = water_gas.first_partial_deriv(CP.iP, CP.iDmolar, CP.iT)
                        if slope >= 0:
                            raise RuntimeError(f"water at {rho} mol/m3, {t} K is not past its spinodal")
                c = np.polynomial.polynomial.polyfit(rho_fit, np.log(lam_fit), 2)
                fit = np.exp(np.polynomial.polynomial.polyval(rho_fit, c))
                misfit["water background"] = max(misfit["water background"],
                                                 np.max(np.abs(fit / lam_fit - 1)))
            cond[i, s] = c
    return visc, cond, misfit


def real_gas_factors(state, cp0_fine, ln_limit_fine, molar_mass, r):
    """F - 1 of sound speed, density, cp and gamma on the coarse grid, (nT, np, nu, no, nc, 4)."""
    tt, pp, uu, oo, cc = np.meshgrid(RES_T_K, RES_P_PA, RES_U, RES_O2, RES_CO2, indexing="ij")
    node = np.searchsorted(FINE_T_K, RES_T_K - 1e-9)
    assert np.allclose(FINE_T_K[node], RES_T_K)
    scale = np.exp(ln_limit_fine[node]) / RES_P_PA[0]  # x_H2O at u = 1, per temperature node
    water = uu * scale[:, None, None, None, None]
    x = composition(water, oo, cc).reshape(-1, 5)
    t, p = tt.ravel(), pp.ravel()
    values = coolprop_thermo(state, t, p, x)
    cp0 = np.einsum("ns,ns->n", x, np.repeat(cp0_fine[node], tt[0].size, axis=0))
    m = x @ molar_mass
    gamma0 = cp0 / (cp0 - r)
    ideal = np.stack([np.sqrt(gamma0 * r * t / m), p * m / (r * t), cp0 / m, gamma0], axis=-1)
    return (values[:, :4] / ideal - 1.0).reshape(tt.shape + (4,))


# --------------------------------------------------------------------------------------------
# Independent check
# --------------------------------------------------------------------------------------------


def water_critical_term(t, rho_molar):
    """IAPWS 2011 critical enhancement lambda_2 [W/(m K)] of pure water at T [K], rho [mol/m^3].

    Huber et al. (2012), J. Phys. Chem. Ref. Data 41, 033102 (IAPWS R15-11), Eqs. 11-13 with the
    constants of its Table 6: Lambda = 177.8514, q_D^-1 = 0.40 nm, nu = 0.630, gamma = 1.239,
    xi_0 = 0.13 nm, Gamma_0 = 0.06, T_R = 1.5 T_c; reducing constants T_c = 647.096 K,
    rho_c = 322 kg/m^3, p_c = 22.064 MPa, R = 461.51805 J/(kg K), 1e-3 W/(m K), 1e-6 Pa s. The
    derivatives, cp, cv and eta of water come from CoolProp at the same (T, rho), as CoolProp's
    own mixture conductivity uses them.
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
        chi = rb * (zeta - zeta_r * 1.5 / tb)
        if chi <= 0:
            continue
        y = 0.13 * (chi / 0.06) ** (0.630 / 1.239) / 0.40
        if y < 1.2e-7:
            continue
        kappa = cp / cv
        z = 2.0 / (np.pi * y) * ((1 - 1 / kappa) * np.arctan(y) + y / kappa
                                 - (1 - np.exp(-1 / (1 / y + y * y / (3 * rb * rb)))))
        out[i] = 177.8514 * rb * (cp / rw) * tb / (eta / 1e-6) * z * 1e-3
    return out


def check_states(seed, count, ln_limit_fine):
    """Random states over the domain (uniform in T, p, fraction of the water limit, dry O2 and
    CO2) followed by the 32 corners (each bound of T, p, O2, CO2; dry and at the water limit)."""
    rng = np.random.default_rng(seed)
    t = rng.uniform(*DOMAIN["t_k"], count)
    p = rng.uniform(*DOMAIN["p_pa"], count)
    frac = rng.uniform(0.0, 1.0, count)
    o2 = rng.uniform(*DOMAIN["o2_dry"], count)
    co2 = rng.uniform(*DOMAIN["co2_dry"], count)
    corners = np.array(np.meshgrid(DOMAIN["t_k"], DOMAIN["p_pa"], [0.0, 1.0], DOMAIN["o2_dry"],
                                   DOMAIN["co2_dry"], indexing="ij")).reshape(5, -1)
    t, p, frac, o2, co2 = (np.concatenate([a, b]) for a, b in zip((t, p, frac, o2, co2), corners))
    limit = np.exp(np.interp(t, FINE_T_K, ln_limit_fine)) / p
    # Stay just inside the limit: the table's own limit is interpolated, not exact.
    water = frac * limit * (1.0 - 1e-6)
    return t, p, composition(water, o2, co2)


def report(table, state, seed, count):
    t, p, x = check_states(seed, count, table["ln_water_limit_pa"])
    start = time.perf_counter()
    reference = coolprop_all(state, t, p, x)
    elapsed = time.perf_counter() - start
    ours = np.stack(gas_table.evaluate(table, t, p, x), axis=-1)
    water_term = x[:, 4] * water_critical_term(t, reference[:, 7])
    print(f"check: {len(t)} states ({count} random, seed {seed}, and 32 corners); "
          f"CoolProp took {elapsed:.1f} s")
    print(f"  {'property':<14} {'worst rel. dev.':>16}   where (T °C, p kPa, x_H2O, O2 dry, CO2 dry)")
    deviation = np.abs(ours / reference[:, :7] - 1.0)
    cleaned = reference[:, 3] - water_term
    rows = list(enumerate(PROPERTY_NAMES))
    for k, name in rows:
        dev = deviation[:, k]
        label = name
        if name == "conductivity":
            label = "conductivity*"
            dev = np.abs(ours[:, 3] / cleaned - 1.0)
        elif name == "prandtl":
            label = "prandtl*"
            dev = np.abs(ours[:, 6] / (reference[:, 4] * reference[:, 2] / cleaned) - 1.0)
        i = int(np.argmax(dev))
        dry = 1.0 - x[i, 4]
        print(f"  {label:<14} {dev[i]:16.2e}   ({t[i] - K.ZERO_CELSIUS:.2f}, {p[i] * 1e-3:.2f}, "
              f"{x[i, 4]:.4f}, {x[i, 1] / dry:.4f}, {x[i, 3] / dry:.4f})")
    raw = deviation[:, 3]
    print("  * against CoolProp's conductivity less x_H2O times IAPWS-2011's critical term of water")
    print(f"    at the mixture density (see drift/gas_table.py). Against CoolProp's raw value: "
          f"worst {raw.max():.2e}, above 1e-3 at {np.mean(raw > 1e-3) * 100:.1f} % of the states")
    return deviation


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=OUTPUT, help="where to write the table")
    parser.add_argument("--check", type=int, default=4000, help="random states in the check")
    parser.add_argument("--seed", type=int, default=2024, help="seed of the check states")
    args = parser.parse_args(argv)

    start = time.perf_counter()
    state = mixture_state()
    r = state.gas_constant()
    molar_mass = np.array([CP.AbstractState("HEOS", f).molar_mass() for f in K.COOLPROP_FLUIDS])
    cp0 = ideal_cp0()
    ln_limit = np.log(WATER_LIMIT_FACTOR * saturation_pressure(FINE_T_K))
    visc, cond, misfit = transport_coefficients()
    liquid_ln_p = np.log(saturation_pressure(LIQUID_T_K))
    # Its cubic spline (not-a-knot ends), stored as polynomial pieces so that drift evaluates it
    # with numpy alone.
    from scipy.interpolate import CubicSpline

    liquid_pieces = CubicSpline(LIQUID_T_K, liquid_ln_p).c
    residual = real_gas_factors(state, cp0, ln_limit, molar_mass, r)
    table = {
        "layout": np.array(gas_table.LAYOUT),
        "coolprop_version": np.array(CoolProp.__version__),
        "species": np.array(K.SPECIES),
        "gas_constant": np.array(r),
        "molar_mass": molar_mass,
        **{f"domain_{name}": np.array(bounds) for name, bounds in DOMAIN.items()},
        "fine_t_k": FINE_T_K,
        "cp0": cp0,
        "ln_water_limit_pa": ln_limit,
        "liquid_t_k": LIQUID_T_K,
        "ln_p_sat_liquid_pa": liquid_ln_p,
        "ln_p_sat_liquid_pieces": liquid_pieces,
        "ln_viscosity_coef": visc,
        "ln_conductivity_coef": cond,
        "res_t_k": RES_T_K,
        "res_p_pa": RES_P_PA,
        "res_u": RES_U,
        "res_o2": RES_O2,
        "res_co2": RES_CO2,
        "residual": residual,
        **{f"order_{name}": np.array(order) for name, order in ORDERS.items()},
    }
    args.output.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(suffix=".npz", dir=args.output.parent)
    try:
        with os.fdopen(handle, "wb") as stream:
            np.savez_compressed(stream, **table)
        os.chmod(temporary, 0o644)
        os.replace(temporary, args.output)
    except BaseException:
        os.unlink(temporary)
        raise
    built = time.perf_counter() - start
    print(f"wrote {args.output} ({args.output.stat().st_size / 1024:.0f} KiB) in {built:.1f} s "
          f"with CoolProp {CoolProp.__version__}: {residual[..., 0].size} mixture states, "
          f"{FINE_T_K.size} temperatures x {len(K.COOLPROP_FLUIDS)} pure fluids")
    print("  worst misfit of the transport quadratics at their points: "
          + ", ".join(f"{k} {v:.1e}" for k, v in misfit.items()))
    report(gas_table.load_table(args.output), state, args.seed, args.check)
    print(f"total {time.perf_counter() - start:.1f} s")


if __name__ == "__main__":
    main()
