"""Published formulas, written out independently of drift, for the tests to compare against."""

import math


def cramer_sound_speed(t_c, p_pa, x_w, x_c):
    """Zero-frequency speed of sound in humid air [m/s]: Cramer (1993), J. Acoust. Soc. Am. 93(5),
    2510-2516, Eq. 15 with the coefficients of its Table III; t in °C, p in Pa, mole fractions of
    water vapour x_w and CO2 x_c. Valid 0-30 °C, 75-102 kPa, x_w up to 0.06, x_c up to 0.01."""
    a = [331.5024, 0.603055, -0.000528, 51.471935, 0.1495874, -0.000782, -1.82e-7, 3.73e-8,
         -2.93e-10, -85.20931, -0.228525, 5.91e-5, -2.835149, -2.15e-13, 29.179762, 0.000486]
    t = t_c
    return (a[0] + a[1] * t + a[2] * t**2
            + (a[3] + a[4] * t + a[5] * t**2) * x_w
            + (a[6] + a[7] * t + a[8] * t**2) * p_pa
            + (a[9] + a[10] * t + a[11] * t**2) * x_c
            + a[12] * x_w**2 + a[13] * p_pa**2 + a[14] * x_c**2 + a[15] * x_w * p_pa * x_c)


def davis_water_fraction(t_c, p_pa, rh):
    """x_w = h f p_sv / p with p_sv = exp(A T^2 + B T + C + D/T) and f = 1.00062 + 3.14e-8 p + 5.6e-7 t^2:
    Davis (1992), Metrologia 29, 67, Eqs. A1.2-A1.4 (CIPM-81/91)."""
    T = t_c + 273.15
    p_sv = math.exp(1.2378847e-5 * T**2 - 1.9121316e-2 * T + 33.93711047 - 6.3431645e3 / T)
    f = 1.00062 + 3.14e-8 * p_pa + 5.6e-7 * t_c**2
    return rh * f * p_sv / p_pa
