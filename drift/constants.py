"""Physical constants and standard compositions, each with its source.

SI units throughout. Values marked "from memory" are recalled, not checked against the printed source.
"""

import numpy as np

#: Species of the gas model, in the order used by every mole-fraction array.
SPECIES = ("N2", "O2", "Ar", "CO2", "H2O")
#: CoolProp fluid names for :data:`SPECIES`.
COOLPROP_FLUIDS = ("Nitrogen", "Oxygen", "Argon", "CarbonDioxide", "Water")

#: Dry air, mole fractions of the three main constituents: ISO 2533:1975, Table 1
#: (N2 78.084 %, O2 20.9476 %, Ar 0.934 %; from memory). Only their ratios are used: CO2 is set
#: separately and the trace gases (Ne, He, Kr, ...) are folded into these three by scaling.
DRY_AIR_N2_O2_AR = np.array([0.78084, 0.209476, 0.00934])

#: Default CO2 of outdoor air [mol/mol]: about 420 ppm in the 2020s (common practice).
DEFAULT_CO2_FRACTION = 420e-6

#: Standard sea-level pressure [Pa], ISO 2533:1975.
STANDARD_PRESSURE = 101325.0
#: Standard sea-level temperature [K], ISO 2533:1975.
STANDARD_TEMPERATURE = 288.15
#: Temperature gradient of the ISO 2533 troposphere [K/m of geopotential altitude].
LAPSE_RATE = 0.0065
#: Standard acceleration of gravity [m/s^2], ISO 2533:1975.
STANDARD_GRAVITY = 9.80665
#: Specific gas constant of dry air used by ISO 2533:1975 [J/(kg K)].
AIR_GAS_CONSTANT = 287.05287
#: Earth radius used by ISO 2533:1975 to convert geometric to geopotential altitude [m].
EARTH_RADIUS = 6356766.0

#: Zero of the Celsius scale [K].
ZERO_CELSIUS = 273.15
#: Triple point of water, temperature [K] and pressure [Pa] (IAPWS R14-08(2011)).
WATER_TRIPLE_T = 273.16
WATER_TRIPLE_P = 611.657

#: Enhancement factor f = alpha + beta p + gamma t^2 (t in degC, p in Pa):
#: Giacomo (1982), Metrologia 18, 33, as kept in the CIPM-81/91 air-density equation
#: (Davis 1992, Metrologia 29, 67, Eq. A1.3).
ENHANCEMENT_ALPHA = 1.00062
ENHANCEMENT_BETA = 3.14e-8
ENHANCEMENT_GAMMA = 5.6e-7

#: Sublimation pressure of ice Ih: Wagner, Riethmann, Feistel & Harvey (2011), J. Phys. Chem. Ref.
#: Data 40, 043103 (IAPWS R14-08(2011)), Eq. 6: ln(p/pt) = (1/theta) sum a_i theta^b_i.
ICE_SUBLIMATION_A = np.array([-0.212144006e2, 0.273203819e2, -0.610598130e1])
ICE_SUBLIMATION_B = np.array([0.333333333e-2, 0.120666667e1, 0.170333333e1])
