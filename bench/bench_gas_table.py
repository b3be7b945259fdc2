"""Speed of the gas property table against direct CoolProp evaluations, per state.

Times drift.gas_table.table_properties and CoolProp's HEOS mixture (the calls drift.air makes:
PT update, then sound speed, density, viscosity, conductivity, cp, cv) on the same random states
for 1, 100 and 10,000 states, after timing each one's first use in this process.

Run: python bench/bench_gas_table.py   (about half a minute, most of it CoolProp's 10,000 states)
"""

import time

import numpy as np

from drift import constants as K
from drift import gas_table

COUNTS = (1, 100, 10_000)


def random_states(count, seed=1):
    """Random states inside the table's domain: uniform T, p, dry-basis O2 and CO2, and water
    up to 90 % of the table's own water limit (read from the table)."""
    rng = np.random.default_rng(seed)
    t = rng.uniform(243.15, 333.15, count)
    p = rng.uniform(50e3, 110e3, count)
    o2 = rng.uniform(0.05, 0.21, count)
    co2 = rng.uniform(0.0, 0.10, count)
    table = gas_table._table()
    ln_limit = np.interp(t, table["fine_t_k"], table["ln_water_limit_pa"])
    water = 0.9 * rng.uniform(0.0, 1.0, count) * np.exp(ln_limit) / p
    n2_ar = K.DRY_AIR_N2_O2_AR[[0, 2]] / K.DRY_AIR_N2_O2_AR[[0, 2]].sum()
    rest = 1.0 - o2 - co2
    dry = np.stack([n2_ar[0] * rest, o2, n2_ar[1] * rest, co2], axis=-1)
    return t, p, np.concatenate([(1.0 - water)[:, None] * dry, water[:, None]], axis=-1)


def time_table(t, p, x):
    repeats = max(3, 3000 // t.size)
    start = time.perf_counter()
    for _ in range(repeats):
        gas_table.table_properties(t, p, x)
    return (time.perf_counter() - start) / repeats


def time_coolprop(state, cp_module, t, p, x):
    start = time.perf_counter()
    for ti, pi, xi in zip(t, p, x):
        state.set_mole_fractions(list(xi))
        state.update(cp_module.PT_INPUTS, float(pi), float(ti))
        state.speed_sound(), state.rhomass(), state.viscosity(), state.conductivity()
        state.cpmass(), state.cvmass()
    return time.perf_counter() - start


def main():
    start = time.perf_counter()
    gas_table._table()
    print(f"table, first use (read {gas_table.TABLE_FILE}): {(time.perf_counter() - start) * 1e3:.0f} ms")
    start = time.perf_counter()
    import CoolProp.CoolProp as CP

    state = CP.AbstractState("HEOS", "&".join(K.COOLPROP_FLUIDS))
    state.specify_phase(CP.iphase_gas)
    print(f"CoolProp, first use (import, mixture state): {time.perf_counter() - start:.2f} s")

    print(f"{'states':>8} {'table per state':>16} {'CoolProp per state':>19} {'ratio':>7}")
    for count in COUNTS:
        t, p, x = random_states(count)
        ours = time_table(t, p, x) / count
        theirs = time_coolprop(state, CP, t, p, x) / count
        print(f"{count:>8} {ours * 1e6:>13.1f} us {theirs * 1e6:>16.1f} us {theirs / ours:>7.0f}")


if __name__ == "__main__":
    main()
