"""The published constants of drift.constants against the standards and tables they cite.

Each check re-derives or restates the value from its source, independently of the module: exact
SI defining constants for CODATA values, the table values of ISO 2533:1975 for the standard
atmosphere, IUPAC atomic weights for molar masses.
"""

import math

import numpy as np

from drift import constants as K

# SI defining constants, exact since 2019 (BIPM, The International System of Units, 9th ed.,
# 2019, Table 1).
BOLTZMANN = 1.380649e-23          # J/K
PLANCK = 6.62607015e-34           # J s
LIGHT_SPEED = 299792458.0         # m/s
AVOGADRO = 6.02214076e23          # 1/mol


def test_stefan_boltzmann_from_the_si_defining_constants(outside):
    # sigma = 2 pi^5 k^4 / (15 h^3 c^2); CODATA 2018 gives 5.670374419e-8 W/(m^2 K^4), the
    # exact value rounded to 10 digits.
    sigma = 2 * math.pi**5 * BOLTZMANN**4 / (15 * PLANCK**3 * LIGHT_SPEED**2)
    outside.check(K.STEFAN_BOLTZMANN, sigma, quantity="Stefan-Boltzmann constant",
                  source="2 pi^5 k^4 / (15 h^3 c^2) from the SI defining constants (BIPM SI Brochure, 9th ed., "
                  "2019, Table 1); CODATA 2018 rounds it to 10 digits", rel=1e-9, unit="W/(m² K⁴)")


def test_molar_gas_constant_from_the_si_defining_constants(outside):
    # R = N_A k, exact (CODATA 2018: 8.314462618... J/(mol K)).
    outside.check(K.MOLAR_GAS_CONSTANT, AVOGADRO * BOLTZMANN, quantity="molar gas constant",
                  source="N_A k from the SI defining constants (BIPM SI Brochure, 9th ed., 2019, Table 1; "
                  "CODATA 2018)", rel=1e-10, unit="J/(mol K)")


def test_water_molar_mass_within_iupac_atomic_weight_intervals(outside):
    # IUPAC standard atomic weight intervals (Wieser et al. 2013, Pure Appl. Chem. 85, 1047;
    # from memory): H [1.00784, 1.00811], O [15.99903, 15.99977] g/mol. The interval is checked
    # as its midpoint give or take its half-width.
    low, high = 2 * 1.00784 + 15.99903, 2 * 1.00811 + 15.99977
    outside.check(K.WATER_MOLAR_MASS, (low + high) / 2 * 1e-3, quantity="molar mass of water",
                  source="IUPAC standard atomic weight intervals of H and O, Wieser et al. (2013) (from memory)",
                  abs=(high - low) / 2 * 1e-3, unit="kg/mol")
    # and IAPWS-95's own value, as CoolProp's water carries it (Wagner & Pruss 2002).
    import CoolProp.CoolProp as CP

    outside.check(K.WATER_MOLAR_MASS, CP.PropsSI("M", "Water"), quantity="molar mass of water",
                  source="IAPWS-95, Wagner & Pruss (2002), as CoolProp's water carries it (independent library)",
                  rel=1e-9, unit="kg/mol")


def test_iso_2533_sea_level_values(outside):
    # ISO 2533:1975, Table 2 (from memory): p0 = 101 325 Pa, T0 = 288.15 K, g0 = 9.80665 m/s^2
    # (exact by definition, 3rd CGPM 1901), R = 287.052 87 J/(kg K), r = 6 356 766 m.
    iso = "ISO 2533:1975, Table 2 (from memory)"
    outside.check(K.STANDARD_PRESSURE, 101325.0, quantity="standard sea-level pressure", source=iso, abs=0.0,
                  unit="Pa")
    outside.check(K.STANDARD_TEMPERATURE, 288.15, quantity="standard sea-level temperature", source=iso,
                  abs=0.0, unit="K")
    outside.check(K.STANDARD_GRAVITY, 9.80665, quantity="standard acceleration of gravity",
                  source=iso + "; exact by definition, 3rd CGPM (1901)", abs=0.0, unit="m/s²")
    outside.check(K.EARTH_RADIUS, 6356766.0, quantity="nominal Earth radius of the standard atmosphere",
                  source=iso, abs=0.0, unit="m")
    # R = R* / M with R* = 8314.32 J/(kmol K) and M = 28.964 420 kg/kmol, the values ISO 2533
    # derives it from.
    outside.check(K.AIR_GAS_CONSTANT, 8314.32 / 28.964420, quantity="specific gas constant of dry air",
                  source="ISO 2533:1975, R* / M with R* = 8314.32 J/(kmol K), M = 28.964 420 kg/kmol (from memory)",
                  rel=1e-7, unit="J/(kg K)")


def test_iso_2533_derived_table_values(outside):
    # Values printed in the ISO 2533:1975 / U.S. Standard Atmosphere 1976 tables (from memory),
    # recomputed from the constants: sea-level density 1.2250 kg/m^3, speed of sound
    # 340.294 m/s, the troposphere's exponent g0 / (R L) = 5.255 88, the tropopause at 11 km
    # geopotential at 216.65 K and 22 632 Pa.
    tables = "ISO 2533:1975 / U.S. Standard Atmosphere 1976 tables (from memory)"
    rho0 = K.STANDARD_PRESSURE / (K.AIR_GAS_CONSTANT * K.STANDARD_TEMPERATURE)
    outside.check(rho0, 1.2250, quantity="standard sea-level density", source=tables, abs=5e-5, unit="kg/m³")
    outside.check(math.sqrt(1.4 * K.AIR_GAS_CONSTANT * K.STANDARD_TEMPERATURE), 340.294,
                  quantity="standard sea-level speed of sound", source=tables, abs=5e-4, unit="m/s")
    exponent = K.STANDARD_GRAVITY / (K.AIR_GAS_CONSTANT * K.LAPSE_RATE)
    outside.check(exponent, 5.25588, quantity="troposphere pressure exponent g0 / (R L)", source=tables, abs=5e-6)
    t11 = K.STANDARD_TEMPERATURE - K.LAPSE_RATE * 11000.0
    outside.check(t11, 216.65, quantity="temperature at the tropopause, 11 km geopotential", source=tables,
                  abs=1e-9, unit="K")
    p11 = K.STANDARD_PRESSURE * (t11 / K.STANDARD_TEMPERATURE) ** exponent
    outside.check(p11, 22632.0, quantity="pressure at the tropopause, 11 km geopotential", source=tables,
                  abs=0.5, unit="Pa")


def test_dry_air_composition_against_iso_2533(outside):
    # ISO 2533:1975, Table 1 (from memory): N2 78.084 %, O2 20.9476 %, Ar 0.934 %, CO2 0.0314 %,
    # the rest trace gases; mean molar mass of dry air 28.964 420 kg/kmol. Molar masses [g/mol]
    # from IUPAC atomic weights (from memory). drift keeps the ratios of the three main gases and
    # scales them to fill what CO2 leaves: with ISO's 314 ppm CO2 the molar mass comes within
    # 1e-4 of ISO's (the trace gases, about 30 ppm, are folded into the three).
    outside.check(K.DRY_AIR_N2_O2_AR, [0.78084, 0.209476, 0.00934],
                  quantity="mole fractions of N2, O2 and Ar in dry air", source="ISO 2533:1975, Table 1 (from memory)",
                  rel=1e-6)
    co2 = 314e-6
    main = K.DRY_AIR_N2_O2_AR / K.DRY_AIR_N2_O2_AR.sum() * (1 - co2)
    molar_mass = float(np.dot(main, [28.0134, 31.9988, 39.948])) + co2 * 44.0095
    outside.check(molar_mass, 28.964420, quantity="mean molar mass of dry air with 314 ppm CO2",
                  source="ISO 2533:1975, Table 1 (from memory); molar masses from IUPAC atomic weights (from memory)",
                  rel=1e-4, unit="g/mol")
    assert K.SPECIES == ("N2", "O2", "Ar", "CO2", "H2O")
    assert len(K.COOLPROP_FLUIDS) == len(K.SPECIES)


def test_water_triple_point(outside):
    # T = 273.16 K (the ITS-90 fixed point; IAPWS R14-08) and p = 611.657 Pa (Guildner, Johnson &
    # Jones 1976, measured to +-0.010 Pa; the value of IAPWS R14-08, from memory). IAPWS-95
    # (CoolProp's water) puts its own triple-point pressure within that uncertainty.
    import CoolProp.CoolProp as CP

    outside.check(K.WATER_TRIPLE_T, 273.16, quantity="triple-point temperature of water",
                  source="ITS-90 fixed point; IAPWS R14-08", abs=0.0, unit="K")
    outside.check(K.WATER_TRIPLE_T, CP.PropsSI("Ttriple", "Water"), quantity="triple-point temperature of water",
                  source="IAPWS-95, Wagner & Pruss (2002), as CoolProp's water carries it (independent library)",
                  abs=0.0, unit="K")
    outside.check(K.WATER_TRIPLE_P, CP.PropsSI("ptriple", "Water"), quantity="triple-point pressure of water",
                  source="IAPWS-95 through CoolProp (independent library); tolerance the +-0.010 Pa of Guildner, "
                  "Johnson & Jones (1976) (from memory)", abs=0.010, unit="Pa")
    outside.check(K.ZERO_CELSIUS, 273.15, quantity="0 °C in kelvin", source="definition of the Celsius scale",
                  abs=0.0, unit="K")


def test_enhancement_factor_coefficients_of_cipm_81_91(outside):
    # f = 1.000 62 + 3.14e-8 p + 5.6e-7 t^2 (Davis 1992, Metrologia 29, 67, Eq. A1.3).
    davis = "Davis (1992), CIPM-81/91, Eq. A1.3"
    outside.check(K.ENHANCEMENT_ALPHA, 1.00062, quantity="enhancement factor coefficient alpha", source=davis,
                  abs=0.0)
    outside.check(K.ENHANCEMENT_BETA, 3.14e-8, quantity="enhancement factor coefficient beta", source=davis,
                  abs=0.0, unit="1/Pa")
    outside.check(K.ENHANCEMENT_GAMMA, 5.6e-7, quantity="enhancement factor coefficient gamma", source=davis,
                  abs=0.0, unit="1/K²")


def test_latent_heat_fit_against_steam_tables(outside):
    # Enthalpy of vaporisation of water (IAPWS-95 steam tables, from memory): 2500.9 kJ/kg at
    # 0.01 °C, 2453.5 kJ/kg at 20 °C; the linear fit of Rogers & Yau (1989) within 1e-4.
    t_c = np.array([0.01, 20.0])
    outside.check(K.LATENT_HEAT_0C + K.LATENT_HEAT_SLOPE * t_c, [2500.9e3, 2453.5e3],
                  quantity="enthalpy of vaporisation of water from the linear fit, 0.01 and 20 °C",
                  source="IAPWS-95 steam tables (from memory)", rel=1e-4, unit="J/kg")


def test_standard_pitch_and_default_co2(outside):
    outside.check(K.A4_HZ, 440.0, quantity="standard pitch A4", source="ISO 16:1975", abs=0.0, unit="Hz")
    # Outdoor CO2 in the 2020s: about 415-425 ppm (NOAA global monthly means; from memory),
    # checked as its midpoint give or take its half-width.
    outside.check(K.DEFAULT_CO2_FRACTION, 420e-6, quantity="default CO2 mole fraction of outdoor air",
                  source="NOAA global monthly means, 2020s, about 415-425 ppm (from memory)", abs=5e-6)


def test_limits_are_ordered_ranges_with_units():
    for name, (low, high, unit) in K.LIMITS.items():
        assert low < high, name
        assert isinstance(unit, str), name
    # The air model's temperature range holds the Cramer (1993) range tested in test_air.py.
    assert K.LIMITS["temperature_c"][0] <= 0.0 and K.LIMITS["temperature_c"][1] >= 30.0
