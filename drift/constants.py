"""Physical constants and standard compositions, each with its source.

SI units throughout. Values marked "from memory" are recalled, not checked against the printed source.
"""

#: Species of the gas model, in the order used by every mole-fraction array.
SPECIES = ("N2", "O2", "Ar", "CO2", "H2O")
#: CoolProp fluid names for :data:`SPECIES`.
COOLPROP_FLUIDS = ("Nitrogen", "Oxygen", "Argon", "CarbonDioxide", "Water")

#: Dry air, mole fractions of the three main constituents: ISO 2533:1975, Table 1
#: (N2 78.084 %, O2 20.9476 %, Ar 0.934 %; from memory). Only their ratios are used: CO2 is set
#: separately and the trace gases (Ne, He, Kr, ...) are folded into these three by scaling.
_DRY_AIR_N2_O2_AR = (0.78084, 0.209476, 0.00934)

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
_ICE_SUBLIMATION_A = (-0.212144006e2, 0.273203819e2, -0.610598130e1)
_ICE_SUBLIMATION_B = (0.333333333e-2, 0.120666667e1, 0.170333333e1)

#: Stefan-Boltzmann constant [W/(m^2 K^4)], CODATA 2018.
STEFAN_BOLTZMANN = 5.670374419e-8
#: Molar gas constant [J/(mol K)], CODATA 2018 (exact).
MOLAR_GAS_CONSTANT = 8.314462618
#: Molar mass of water [kg/mol], IAPWS-95 (Wagner & Pruss 2002).
WATER_MOLAR_MASS = 0.018015268
#: Latent heat of vaporisation of water at 0 °C [J/kg] and its slope [J/(kg K)]:
#: L_v(T) = 2.501e6 - 2369 (T - 273.15), the linear fit of meteorology (Rogers & Yau 1989,
#: "A Short Course in Cloud Physics", Table 2.1; from memory). Within 0.01 % of IAPWS-95 between
#: 20 and 35 °C (checked against CoolProp in tests/test_heat_transfer.py).
LATENT_HEAT_0C = 2.501e6
LATENT_HEAT_SLOPE = -2369.0
#: Latent heat of fusion of ice at 0 °C [J/kg] (CRC Handbook, 333.6 kJ/kg; from memory).
LATENT_HEAT_FUSION = 333.6e3

#: Standard tuning frequency [Hz]: A4 = 440 Hz (ISO 16:1975).
A4_HZ = 440.0
#: Default "in tune" threshold [cent] (common practice: about 5 cents is where ensemble players
#: start to hear beating against a held reference).
TOLERANCE_CENTS = 5.0
#: Band around the steady state of playing [cent] within which the pitch counts as settled
#: (common practice: a couple of cents is below what a player corrects by ear in a held note).
SETTLE_CENTS = 2.0
#: Offset from the equal-temperament pitch of a note's name [cent] beyond which the note is
#: flagged: half a semitone, where the sound lies nearer the neighbouring name than its own
#: (equal temperament, ISO 16:1975 reference; the figure follows from the 100-cent semitone).
NAME_WARNING_CENTS = 50.0
#: Longest segment of a discretised bore [m], acoustic and thermal: short enough to follow a
#: temperature profile along the bore.
SEGMENT_LENGTH_M = 0.02
#: Longest play/rest plan, playing time or settle-time search [s] (10 h).
LONGEST_PLAN_S = 600.0 * 60.0
#: Longest a run may take by its estimate before it starts [min] unless the user allows more
#: (``--max-minutes``; drift/budget.py): about 20 times the longest estimate of a bundled
#: instrument's run with the commands' defaults over every bundled climate (14 s, a brass
#: retune), about 6 times that of a fit of a 12-reading log (51 s at most, brass); with the
#: estimate's error (0.44 to 1.63 times the measured time, docs/performance.md "Time budget") a
#: refused run would take at least about 3 min, long enough that a wait without a word looks
#: like a hang.
MAX_MINUTES = 5.0
#: The evening's plan when ``drift advise`` is given none [min]: a 10-minute warm-up, a wait, two
#: 45-minute sets with a 20-minute break (common practice for a concert in two halves).
GIG_PLAN = "play:10,rest:10,play:45,rest:20,play:45"

#: Validity range of the air model and of the conditions a user may give, in boundary units:
#: name -> (low, high, unit label).
LIMITS = {
    "temperature_c": (-30.0, 60.0, "°C"),
    "pressure_kpa": (50.0, 110.0, "kPa"),
    "relative_humidity_pct": (0.0, 100.0, "%"),
    "co2_ppm": (0.0, 100_000.0, "ppm"),
    "breath_fraction": (0.0, 1.0, ""),
    "altitude_m": (-400.0, 5000.0, "m"),
    "breath_co2_pct": (0.0, 10.0, "%"),
    "breath_o2_pct": (5.0, 21.0, "%"),
    # Sunshine on the instrument, normal to the beam: at most about 1100 W/m2 reaches the ground
    # at sea level (Duffie & Beckman 2013, Solar Engineering of Thermal Processes, Sec. 2.8;
    # from memory), below the solar constant 1361 W/m2 (Kopp & Lean 2011, Geophys. Res. Lett.
    # 38, L01706).
    "sun_w_m2": (0.0, 1200.0, "W/m²"),
    "wind_m_s": (0.0, 20.0, "m/s"),
}


#: The constants above that are arrays, made numpy arrays on first use: ``drift --help`` reads
#: this module and must not wait for numpy.
_ARRAYS = {"DRY_AIR_N2_O2_AR": _DRY_AIR_N2_O2_AR, "ICE_SUBLIMATION_A": _ICE_SUBLIMATION_A,
           "ICE_SUBLIMATION_B": _ICE_SUBLIMATION_B}


def __getattr__(name: str):
    if name in _ARRAYS:
        import numpy as np

        value = np.array(_ARRAYS[name])
        value.flags.writeable = False
        globals()[name] = value
        return value
    raise AttributeError(f"module 'drift.constants' has no attribute {name!r}")
