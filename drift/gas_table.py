"""Real-gas properties of moist air and breath from a shipped table, without CoolProp.

:func:`table_properties` gives the same seven properties as :func:`drift.air.gas_properties`
(sound speed, density, viscosity, thermal conductivity, cp, gamma, Prandtl) for N2-O2-Ar-CO2-H2O
mixtures, read from ``drift/data/gas_table.npz`` with numpy only. The table is written once by
``tools/make_gas_table.py`` from CoolProp's HEOS backend (Bell et al. 2014), the library that
:mod:`drift.air` calls state by state. Reading the table takes tens of milliseconds where
starting CoolProp takes seconds, and a lookup costs microseconds per state where CoolProp takes
milliseconds (``bench/bench_gas_table.py``). Everything is SI: K, Pa, kg, mol, mole fractions in
[0, 1].

Domain
------
Temperature 243.15 to 333.15 K (-30 to 60 °C); pressure 50 to 110 kPa; N2 and Ar in the ratio
of ISO 2533 dry air (:data:`drift.constants.DRY_AIR_N2_O2_AR`, within 1 %); on a dry
basis (fraction of the gas without its water) O2 from 0.05 to 0.21 and CO2 from 0 to 0.10; water
vapour from 0 to 1.01 p_sat(T) / p, which covers saturation with the enhancement factor of
:func:`drift.air.enhancement_factor` (at most 1.0061 here). p_sat is the saturation pressure over
liquid water (IAPWS-95, Wagner & Pruss 2002) from 0 °C up and over ice (Wagner et al. 2011,
Eq. 6) below, as in :func:`drift.air.saturation_vapour_pressure`. Outside it
:class:`drift.errors.OutOfRangeError` names the quantity and its allowed range.

Method
------
*Ideal gas, exact in composition.* In CoolProp's multi-fluid mixture model the ideal-gas part is
the mole-fraction sum of the pure fluids' ideal-gas parts (measured: CoolProp's mixture cp0 and
sum x_i cp0_i agree within a few ppm, the gap a smooth function that the factors below absorb).
So cp0 = sum x_i cp0_i(T) [J/(mol K)], M = sum x_i M_i [kg/mol], gamma0 = cp0 / (cp0 - R),
c0^2 = gamma0 R T / M and rho0 = p M / (R T), with R = 8.314462618 J/(mol K) as CoolProp's mixture
uses. The table holds cp0_i(T) of the five species every 1 K (cubic Lagrange interpolation), so
this part holds for any mole fractions.

*Real-gas factors.* At 50-110 kPa each property differs from its ideal-gas value by a factor
F = 1 + (at most about 4e-3) that varies smoothly with the state. The table holds F - 1 for sound
speed, density, cp and gamma, computed with CoolProp on a grid of temperature (every 3 K),
pressure (3 nodes), water (7 nodes), dry-basis O2 (4 nodes) and dry-basis CO2 (3 nodes), and
interpolates it with Lagrange polynomials: piecewise cubic in temperature and water, one
polynomial through all nodes in pressure (quadratic), O2 (cubic) and CO2 (quadratic). Water enters
as u = x_H2O p_min / (1.01 p_sat(T)) in [0, 1]: the grid reaches 1.01 times saturation at the
lowest pressure at every temperature; at higher pressure its upper nodes are supersaturated
states of the homogeneous gas (gas phase imposed), where CoolProp's values stay smooth. Because
F - 1 is small, a relative interpolation error of 1e-3 in it would cost only about 4e-6 of a
property; the measured errors are far smaller (below).

*Transport.* For these mixtures CoolProp (HelmholtzEOSMixtureBackend::calc_viscosity and
calc_conductivity) evaluates each pure fluid at the mixture's temperature and molar density rho
and mixes: eta = exp(sum x_i ln eta_i(T, rho)), lambda = sum x_i lambda_i(T, rho). The table
holds, for each species every 1 K, ln eta_i and ln lambda_i as quadratics in rho (fitted to
CoolProp from 10 to 70 mol/m^3; the domain spans 18 to 55 mol/m^3) and applies the same mixing
rules at rho = rho0 F_rho, so this part too holds for any mole fractions.

*One deliberate difference.* Pure water at the mixture's density lies inside its own vapour-liquid
dome. CoolProp's water conductivity (IAPWS 2011, Huber et al. 2012) then includes the
critical-enhancement term lambda_2 evaluated there; it grows without bound as the density
approaches water's vapour spinodal (measured: 20 mol/m^3 at 300 K, 31 at 313 K, 54 at 333 K) and
is zero past it. So CoolProp's mixture conductivity carries a spurious x_H2O lambda_2 wherever
p < rho_spinodal(T) R T (about 51 kPa at 27 °C, 57 kPa at 30 °C, 82 kPa at 40 °C, 112 kPa at
50 °C): tiny far below that pressure, percents just below it (measured: +2.8 % in saturated air
at 40 °C, 80 kPa; +1.9 % at 50 °C, 110 kPa, 50 % relative humidity), unbounded at it. The table
leaves lambda_2 out: its water conductivity is the smooth background lambda_0 lambda_1 of IAPWS
2011, fitted to CoolProp's own values at zero density and past the spinodal (80 to 160 mol/m^3),
where lambda_2 vanishes.

Accuracy
--------
Measured by ``tools/make_gas_table.py`` against direct CoolProp 8.0.0 evaluations at 4000
random states spread uniformly over the domain plus its 32 corners; worst relative deviation:
sound speed 3.4e-7, density 4.4e-7, cp 4.3e-7, gamma 2.4e-7, viscosity 6.9e-9, conductivity
4.4e-8 and Prandtl 4.4e-7, the last two against CoolProp with x_H2O lambda_2 taken out (against
CoolProp's raw conductivity the deviation is that term: above 1e-3 at 5.7 % of the states,
2.3e-1 at worst). A 1 % change of the N2 : Ar ratio moved no property by more than 5e-7. These
are worst cases over the check set, not proven bounds between its points.

References
----------
Bell, I. H., Wronski, J., Quoilin, S., Lemort, V. (2014). Pure and pseudo-pure fluid thermophysical
property evaluation and the open-source thermophysical property library CoolProp. Ind. Eng. Chem.
Res. 53, 2498-2508.
Huber, M. L., Perkins, R. A., Friend, D. G., Sengers, J. V., Assael, M. J., Metaxa, I. N.,
Miyagawa, K., Hellmann, R., Vogel, E. (2012). New international formulation for the thermal
conductivity of H2O. J. Phys. Chem. Ref. Data 41, 033102 (IAPWS R15-11).
Wagner, W., Pruss, A. (2002). The IAPWS formulation 1995 for the thermodynamic properties of
ordinary water substance. J. Phys. Chem. Ref. Data 31, 387.
Wagner, W., Riethmann, T., Feistel, R., Harvey, A. H. (2011). New equations for the sublimation
pressure and melting pressure of H2O ice Ih. J. Phys. Chem. Ref. Data 40, 043103.
"""

from __future__ import annotations

import functools
from importlib import resources

import numpy as np

from drift import constants as K
from drift.errors import OutOfRangeError

#: File name of the table inside the package ``drift.data``.
TABLE_FILE = "gas_table.npz"

#: Version of the table layout this module reads (the ``layout`` entry of the file).
LAYOUT = 1

#: Allowed deviation of Ar / (N2 + Ar) from its value in ISO 2533 dry air [relative].
ARGON_SHARE_TOLERANCE = 0.01

#: Allowed deviation of the sum of the mole fractions from 1.
_SUM_TOLERANCE = 1e-6

#: Slack on the range checks, in the unit of each limit (rounding of values on the boundary).
_SLACK = 1e-9

#: Number of states interpolated at once: small blocks stay in the processor's cache.
_CHUNK = 64


@functools.cache
def _table() -> dict:
    """The shipped table as a dict of arrays, read once per process."""
    with resources.files("drift.data").joinpath(TABLE_FILE).open("rb") as handle:
        return load_table(handle)


def load_table(source) -> dict:
    """Read a gas table written by ``tools/make_gas_table.py``.

    Parameters
    ----------
    source : path or binary file
        An ``.npz`` file.

    Returns
    -------
    dict
        Arrays by name (see the generator for their meaning and units).
    """
    with np.load(source, allow_pickle=False) as data:
        table = {name: data[name] for name in data.files}
    if int(table["layout"]) != LAYOUT:
        raise ValueError(f"gas table layout {int(table['layout'])} is not the supported {LAYOUT}")
    for name in ("p_pa", "o2", "co2"):
        if int(table["order_" + name]) != table["res_" + name].size - 1:
            raise ValueError(f"gas table: the {name} axis must use one polynomial through all nodes")
    _rows(table)
    _fine(table)
    return table


def _lagrange(coordinate, count: int, order: int):
    """Stencil and weights of Lagrange interpolation on a uniform grid of ``count`` nodes.

    ``coordinate`` is in grid steps from the first node (N,). Uses ``order + 1`` consecutive
    nodes, centred on the interval holding the coordinate where the grid allows.

    Returns
    -------
    index : ndarray of int (N, order + 1)
    weight : ndarray (N, order + 1)
    """
    k = order + 1
    nodes, denominator = _lagrange_nodes(k)
    start = np.minimum(np.maximum(np.floor(coordinate).astype(np.int64) - (k - 1) // 2, 0), count - k)
    # w_j = prod_{m != j} (t - m) / (j - m), as (product over m < j) (product over m > j).
    d = (coordinate - start)[:, None] - nodes
    ones = np.ones((d.shape[0], 1))
    left = np.concatenate([ones, np.cumprod(d[:, :-1], axis=1)], axis=1)
    right = np.concatenate([np.cumprod(d[:, :0:-1], axis=1)[:, ::-1], ones], axis=1)
    return start[:, None] + nodes, left * right / denominator


@functools.cache
def _lagrange_nodes(k: int):
    """Nodes 0..k-1 and the denominators prod_{m != j} (j - m) of the Lagrange basis."""
    nodes = np.arange(k)
    differences = np.where(nodes[:, None] == nodes, 1, nodes[:, None] - nodes)
    return nodes, differences.prod(axis=1).astype(float)


#: Columns of the packed fine-grid table: cp0 of the 5 species, the water limit, then the
#: transport quadratics (5 species x 3 powers) of ln eta and of ln lambda.
_FINE_COLUMNS = (5, 1, 15, 15)


def _fine(table: dict) -> np.ndarray:
    """The fine-grid tables packed side by side, (n, 36), made once per table."""
    fine = table.get("_fine")
    if fine is None:
        n = table["fine_t_k"].size
        fine = np.concatenate([table["cp0"], table["ln_water_limit_pa"][:, None],
                               table["ln_viscosity_coef"].reshape(n, -1),
                               table["ln_conductivity_coef"].reshape(n, -1)], axis=1)
        table["_fine"] = fine
    return fine


def _rows(table: dict) -> np.ndarray:
    """The real-gas factors rearranged for :func:`_real_gas_factors`, made once per table.

    ``residual`` (nT, np, nu, nO2, nCO2, 4) becomes (nT * nu, np * nO2 * nCO2 * 4): one
    contiguous row per (temperature, water) node, so a lookup copies 16 rows per state. Single
    precision halves the memory traffic; rounding F - 1 (at most about 4e-3) to it changes a
    property by less than 1e-9.
    """
    rows = table.get("_rows")
    if rows is None:
        res = table["residual"]
        rows = np.ascontiguousarray(res.transpose(0, 2, 1, 3, 4, 5), dtype=np.float32).reshape(
            res.shape[0] * res.shape[2], -1)
        table["_rows"] = rows
    return rows


def _real_gas_factors(table: dict, t, p, u, o2_dry, co2_dry):
    """F - 1 of sound speed, density, cp and gamma (N, 4), interpolated on the coarse grid.

    Piecewise Lagrange polynomials in temperature and water (stencils of ``order + 1`` nodes),
    one polynomial through all nodes in pressure, O2 and CO2; the weights multiply as a tensor
    product.
    """
    rows = _rows(table)
    stencil = {}
    for name, coordinate in (("t_k", t), ("p_pa", p), ("u", u), ("o2", o2_dry), ("co2", co2_dry)):
        nodes = table["res_" + name]
        order = int(table["order_" + name])
        stencil[name] = _lagrange((coordinate - nodes[0]) / (nodes[1] - nodes[0]), nodes.size, order)
    n_u = table["res_u"].size
    n = t.size
    row_index = (stencil["t_k"][0][:, :, None] * n_u + stencil["u"][0][:, None, :]).reshape(n, -1)
    row_weight = (stencil["t_k"][1][:, :, None] * stencil["u"][1][:, None, :]).reshape(n, -1)
    w_p, w_o, w_c = stencil["p_pa"][1], stencil["o2"][1], stencil["co2"][1]
    global_weight = (w_p[:, :, None, None] * w_o[:, None, :, None] * w_c[:, None, None, :]).reshape(n, -1)
    row_weight = row_weight.astype(rows.dtype)
    global_weight = global_weight.astype(rows.dtype)
    out = np.empty((n, 4))
    for lo in range(0, n, _CHUNK):
        hi = min(lo + _CHUNK, n)
        block = rows[row_index[lo:hi]]  # (m, 16, np * nO2 * nCO2 * 4)
        near = np.einsum("nk,nkm->nm", row_weight[lo:hi], block).reshape(hi - lo, -1, 4)
        out[lo:hi] = np.matmul(global_weight[lo:hi, None, :], near)[:, 0, :]
    return out


def _fail(quantity: str, value: float, low: float, high: float, unit: str = "") -> None:
    unit = f" {unit}" if unit else ""
    raise OutOfRangeError(
        f"{quantity} {value:g}{unit} is outside the range of the gas property table, "
        f"{low:g} to {high:g}{unit}"
    )


def _check(quantity, values, low, high, scale=1.0, offset=0.0, unit=""):
    """Raise OutOfRangeError if any of ``values`` (shown as values*scale + offset) leaves [low, high]."""
    shown = values * scale + offset
    bad = ~((shown >= low - _SLACK) & (shown <= high + _SLACK))
    if np.any(bad):
        _fail(quantity, shown[bad][0], low, high, unit)


def table_properties(temperature_k, pressure_pa, mole_fractions):
    """Real-gas properties of N2-O2-Ar-CO2-H2O mixtures read from the shipped table.

    The same quantities as :func:`drift.air.gas_properties`, from the table described in the
    module docstring: an ideal-gas part from tabulated per-species cp0_i(T) (cp0 = sum x_i cp0_i,
    M = sum x_i M_i) times a tabulated real-gas factor for sound speed, density, cp and gamma;
    viscosity and conductivity
    by CoolProp's mixing rules, eta = exp(sum x_i ln eta_i(T, rho)) and
    lambda = sum x_i lambda_i(T, rho), over tabulated pure-fluid values; Prandtl = cp eta / lambda.
    Worst deviations from direct CoolProp evaluations at 4032 states over the domain: 3.4e-7 in
    sound speed, below 5e-7 in the others (conductivity: see the module docstring for the water
    term the table leaves out).

    Parameters
    ----------
    temperature_k : array_like, shape S
        Temperature [K], 243.15 to 333.15.
    pressure_pa : array_like, shape S
        Pressure [Pa], 50e3 to 110e3.
    mole_fractions : array_like, shape S + (5,)
        Mole fractions [mol/mol] in the order N2, O2, Ar, CO2, H2O (:data:`drift.constants.SPECIES`),
        summing to 1; N2 : Ar as in ISO dry air within 1 %; dry-basis O2 0.05-0.21 and CO2 0-0.10;
        water from 0 to 1.01 p_sat(T) / p. The three inputs broadcast together.

    Returns
    -------
    sound_speed : ndarray [m/s]
        Thermodynamic (zero-frequency) speed of sound.
    density : ndarray [kg/m^3]
    viscosity : ndarray [Pa s]
        Dynamic viscosity.
    conductivity : ndarray [W/(m K)]
        Thermal conductivity.
    cp : ndarray [J/(kg K)]
        Isobaric specific heat capacity.
    gamma : ndarray [-]
        cp / cv.
    prandtl : ndarray [-]
        cp eta / lambda.

    Raises
    ------
    OutOfRangeError
        If a temperature, pressure or composition lies outside the table's domain (or is NaN).
    ValueError
        If the last axis of ``mole_fractions`` is not of length 5.
    """
    t = np.asarray(temperature_k, dtype=float)
    p = np.asarray(pressure_pa, dtype=float)
    x = np.asarray(mole_fractions, dtype=float)
    if x.ndim == 0 or x.shape[-1] != len(K.SPECIES):
        raise ValueError(f"mole_fractions must have a last axis of length {len(K.SPECIES)}")
    shape = np.broadcast_shapes(t.shape, p.shape, x.shape[:-1])
    t = np.broadcast_to(t, shape).ravel()
    p = np.broadcast_to(p, shape).ravel()
    x = np.broadcast_to(x, shape + (len(K.SPECIES),)).reshape(-1, len(K.SPECIES))
    values = evaluate(_table(), t, p, x)
    return tuple(v.reshape(shape) for v in values)


def evaluate(table: dict, t, p, x):
    """:func:`table_properties` on flat arrays with a given table (T (N,) [K], p (N,) [Pa], x (N, 5)).

    Checks the domain, then returns the seven property arrays (N,) in the order and units of
    :func:`table_properties`.
    """
    if t.size == 0:
        return tuple(np.empty(0) for _ in range(7))
    t_min, t_max = table["domain_t_k"]
    p_min, p_max = table["domain_p_pa"]
    _check("temperature", t, t_min - K.ZERO_CELSIUS, t_max - K.ZERO_CELSIUS,
           offset=-K.ZERO_CELSIUS, unit="°C")
    _check("pressure", p, p_min * 1e-3, p_max * 1e-3, scale=1e-3, unit="kPa")
    total = x.sum(axis=-1)
    bad = ~(np.abs(total - 1.0) <= _SUM_TOLERANCE)
    if np.any(bad):
        raise OutOfRangeError(f"mole fractions sum to {total[bad][0]:.9g}; the gas property table "
                              f"needs a sum of 1 (within {_SUM_TOLERANCE:g})")
    bad = ~(x.min(axis=-1) >= -_SLACK)
    if np.any(bad):
        raise OutOfRangeError(f"mole fraction {x.min(axis=-1)[bad][0]:g} is negative; the gas "
                              f"property table needs fractions from 0 to 1")
    n2, o2, ar, co2, water = x.T
    iso = K.DRY_AIR_N2_O2_AR
    iso_share = iso[2] / (iso[0] + iso[2])
    with np.errstate(invalid="ignore", divide="ignore"):
        share = ar / (n2 + ar)
        dry = 1.0 - water
        o2_dry = o2 / dry
        co2_dry = co2 / dry
    tol = ARGON_SHARE_TOLERANCE * iso_share
    _check("argon share of argon plus nitrogen", share, iso_share - tol, iso_share + tol)
    _check("dry-basis O2 mole fraction", o2_dry, *table["domain_o2_dry"])
    _check("dry-basis CO2 mole fraction", co2_dry, *table["domain_co2_dry"])

    # Fine temperature grid: ideal-gas cp0_i, the water limit, pure-fluid transport.
    fine = table["fine_t_k"]
    step = fine[1] - fine[0]
    idx, w = _lagrange((t - fine[0]) / step, fine.size, 3)
    values = np.matmul(w[:, None, :], _fine(table)[idx])[:, 0, :]
    cp0_i, ln_limit, visc, cond = np.split(values, np.cumsum(_FINE_COLUMNS)[:-1], axis=1)
    ln_limit = ln_limit[:, 0]
    visc = visc.reshape(-1, 5, 3)
    cond = cond.reshape(-1, 5, 3)

    limit = np.exp(ln_limit) / p
    over = ~((water >= -_SLACK) & (water <= limit * (1.0 + 1e-9)))
    if np.any(over):
        i = np.flatnonzero(over)[0]
        raise OutOfRangeError(
            f"water vapour mole fraction {water[i]:g} is outside the range of the gas property "
            f"table at {t[i] - K.ZERO_CELSIUS:g} °C and {p[i] * 1e-3:g} kPa, 0 to {limit[i]:g} "
            f"(1.01 times the saturation pressure over p)"
        )

    # Real-gas factors on the coarse grid.
    u = water * table["res_p_pa"][0] / np.exp(ln_limit)
    factors = 1.0 + _real_gas_factors(table, t, p, u, o2_dry, co2_dry)
    f_c, f_rho, f_cp, f_gamma = factors.T

    r = float(table["gas_constant"])
    molar_mass = x @ table["molar_mass"]
    cp0 = np.einsum("ns,ns->n", x, cp0_i)
    gamma0 = cp0 / (cp0 - r)
    sound_speed = np.sqrt(gamma0 * r * t / molar_mass) * f_c
    molar_density = p / (r * t) * f_rho
    density = molar_density * molar_mass
    cp = cp0 / molar_mass * f_cp
    gamma = gamma0 * f_gamma
    powers = molar_density[:, None] ** np.arange(visc.shape[-1])
    viscosity = np.exp(np.einsum("ns,nsj,nj->n", x, visc, powers))
    conductivity = np.einsum("ns,ns->n", x, np.exp(np.einsum("nsj,nj->ns", cond, powers)))
    prandtl = cp * viscosity / conductivity
    return sound_speed, density, viscosity, conductivity, cp, gamma, prandtl
