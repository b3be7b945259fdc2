"""The published constants of drift.constants against the standards and tables they cite.

Each check re-derives or restates the value from its source, independently of the module: exact
SI defining constants for CODATA values, the table values of ISO 2533:1975 for the standard
atmosphere, IUPAC atomic weights for molar masses.
"""

import math

import numpy as np
import pytest

from drift import constants as K

# SI defining constants, exact since 2019 (BIPM, The International System of Units, 9th ed.,
# 2019, Table 1).
BOLTZMANN = 1.380649e-23          # J/K
PLANCK = 6.62607015e-34           # J s
LIGHT_SPEED = 299792458.0         # m/s
AVOGADRO = 6.02214076e23          # 1/mol


def test_stefan_boltzmann_from_the_si_defining_constants():
    # sigma = 2 pi^5 k^4 / (15 h^3 c^2); CODATA 2018 gives 5.670374419e-8 W/(m^2 K^4), the
    # exact value rounded to 10 digits.
    sigma = 2 * math.pi**5 * BOLTZMANN**4 / (15 * PLANCK**3 * LIGHT_SPEED**2)
    assert K.STEFAN_BOLTZMANN == pytest.approx(sigma, rel=1e-9)


def test_molar_gas_constant_from_the_si_defining_constants():
    # R = N_A k, exact (CODATA 2018: 8.314462618... J/(mol K)).
    assert K.MOLAR_GAS_CONSTANT == pytest.approx(AVOGADRO * BOLTZMANN, rel=1e-10)


def test_water_molar_mass_within_iupac_atomic_weight_intervals():
    # IUPAC standard atomic weight intervals (Wieser et al. 2013, Pure Appl. Chem. 85, 1047;
    # from memory): H [1.00784, 1.00811], O [15.99903, 15.99977] g/mol.
    low, high = 2 * 1.00784 + 15.99903, 2 * 1.00811 + 15.99977
    assert low * 1e-3 <= K.WATER_MOLAR_MASS <= high * 1e-3
    # and IAPWS-95's own value, as CoolProp's water carries it (Wagner & Pruss 2002).
    import CoolProp.CoolProp as CP

    assert K.WATER_MOLAR_MASS == pytest.approx(CP.PropsSI("M", "Water"), rel=1e-9)


def test_iso_2533_sea_level_values():
    # ISO 2533:1975, Table 2 (from memory): p0 = 101 325 Pa, T0 = 288.15 K, g0 = 9.80665 m/s^2
    # (exact by definition, 3rd CGPM 1901), R = 287.052 87 J/(kg K), r = 6 356 766 m.
    assert K.STANDARD_PRESSURE == 101325.0
    assert K.STANDARD_TEMPERATURE == 288.15
    assert K.STANDARD_GRAVITY == 9.80665
    assert K.EARTH_RADIUS == 6356766.0
    # R = R* / M with R* = 8314.32 J/(kmol K) and M = 28.964 420 kg/kmol, the values ISO 2533
    # derives it from.
    assert K.AIR_GAS_CONSTANT == pytest.approx(8314.32 / 28.964420, rel=1e-7)


def test_iso_2533_derived_table_values():
    # Values printed in the ISO 2533:1975 / U.S. Standard Atmosphere 1976 tables (from memory),
    # recomputed from the constants: sea-level density 1.2250 kg/m^3, speed of sound
    # 340.294 m/s, the troposphere's exponent g0 / (R L) = 5.255 88, the tropopause at 11 km
    # geopotential at 216.65 K and 22 632 Pa.
    rho0 = K.STANDARD_PRESSURE / (K.AIR_GAS_CONSTANT * K.STANDARD_TEMPERATURE)
    assert rho0 == pytest.approx(1.2250, abs=5e-5)
    assert math.sqrt(1.4 * K.AIR_GAS_CONSTANT * K.STANDARD_TEMPERATURE) == pytest.approx(340.294, abs=5e-4)
    exponent = K.STANDARD_GRAVITY / (K.AIR_GAS_CONSTANT * K.LAPSE_RATE)
    assert exponent == pytest.approx(5.25588, abs=5e-6)
    t11 = K.STANDARD_TEMPERATURE - K.LAPSE_RATE * 11000.0
    assert t11 == pytest.approx(216.65, abs=1e-9)
    p11 = K.STANDARD_PRESSURE * (t11 / K.STANDARD_TEMPERATURE) ** exponent
    assert p11 == pytest.approx(22632.0, abs=0.5)


def test_dry_air_composition_against_iso_2533():
    # ISO 2533:1975, Table 1 (from memory): N2 78.084 %, O2 20.9476 %, Ar 0.934 %, CO2 0.0314 %,
    # the rest trace gases; mean molar mass of dry air 28.964 420 kg/kmol. Molar masses [g/mol]
    # from IUPAC atomic weights (from memory). drift keeps the ratios of the three main gases and
    # scales them to fill what CO2 leaves: with ISO's 314 ppm CO2 the molar mass comes within
    # 1e-4 of ISO's (the trace gases, about 30 ppm, are folded into the three).
    assert K.DRY_AIR_N2_O2_AR == pytest.approx([0.78084, 0.209476, 0.00934])
    co2 = 314e-6
    main = K.DRY_AIR_N2_O2_AR / K.DRY_AIR_N2_O2_AR.sum() * (1 - co2)
    molar_mass = float(np.dot(main, [28.0134, 31.9988, 39.948])) + co2 * 44.0095
    assert molar_mass == pytest.approx(28.964420, rel=1e-4)
    assert K.SPECIES == ("N2", "O2", "Ar", "CO2", "H2O")
    assert len(K.COOLPROP_FLUIDS) == len(K.SPECIES)


def test_water_triple_point():
    # T = 273.16 K (the ITS-90 fixed point; IAPWS R14-08) and p = 611.657 Pa (Guildner, Johnson &
    # Jones 1976, measured to +-0.010 Pa; the value of IAPWS R14-08, from memory). IAPWS-95
    # (CoolProp's water) puts its own triple-point pressure within that uncertainty.
    import CoolProp.CoolProp as CP

    assert K.WATER_TRIPLE_T == 273.16 == CP.PropsSI("Ttriple", "Water")
    assert K.WATER_TRIPLE_P == pytest.approx(CP.PropsSI("ptriple", "Water"), abs=0.010)
    assert K.ZERO_CELSIUS == 273.15  # by definition of the Celsius scale


def test_enhancement_factor_coefficients_of_cipm_81_91():
    # f = 1.000 62 + 3.14e-8 p + 5.6e-7 t^2 (Davis 1992, Metrologia 29, 67, Eq. A1.3).
    assert (K.ENHANCEMENT_ALPHA, K.ENHANCEMENT_BETA, K.ENHANCEMENT_GAMMA) == (1.00062, 3.14e-8, 5.6e-7)


def test_latent_heat_fit_against_steam_tables():
    # Enthalpy of vaporisation of water (IAPWS-95 steam tables, from memory): 2500.9 kJ/kg at
    # 0.01 °C, 2453.5 kJ/kg at 20 °C; the linear fit of Rogers & Yau (1989) within 1e-4.
    assert K.LATENT_HEAT_0C + K.LATENT_HEAT_SLOPE * 0.01 == pytest.approx(2500.9e3, rel=1e-4)
    assert K.LATENT_HEAT_0C + K.LATENT_HEAT_SLOPE * 20.0 == pytest.approx(2453.5e3, rel=1e-4)


def test_standard_pitch_and_default_co2():
    assert K.A4_HZ == 440.0  # ISO 16:1975
    # Outdoor CO2 in the 2020s: about 415-425 ppm (NOAA global monthly means; from memory).
    assert 400e-6 <= K.DEFAULT_CO2_FRACTION <= 430e-6


def test_limits_are_ordered_ranges_with_units():
    for name, (low, high, unit) in K.LIMITS.items():
        assert low < high, name
        assert isinstance(unit, str), name
    # The air model's temperature range holds the Cramer (1993) range tested in test_air.py.
    assert K.LIMITS["temperature_c"][0] <= 0.0 and K.LIMITS["temperature_c"][1] >= 30.0
