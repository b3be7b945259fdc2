"""Published formulas, written out independently of drift, for the tests to compare against, and
test-only helpers that look inside drift's objects."""

import math

import numpy as np


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


def propagation_keefe1984(frequency_hz, radius_m, sound_speed, density, viscosity, conductivity, cp, gamma):
    """Gamma [1/m] and Zc [Pa s/m^3] from the large-r_v approximations of Keefe (1984).

    With r_v = a sqrt(omega rho / eta) and r_t = a sqrt(omega rho cp / kappa) (both >> 1):

        Z = (omega rho / S) [sqrt2/r_v + 3/r_v^2 + j (1 + sqrt2/r_v)]
        Y = (omega S / (rho c^2)) [(gamma-1)(sqrt2/r_t - 1/r_t^2) + j (1 + (gamma-1) sqrt2/r_t)]

    (Keefe 1984, J. Acoust. Soc. Am. 75(1), 58-62, Eqs. 8-9, equation numbers from memory; here
    re-derived as the two leading terms of the large-argument expansion of the Zwikker-Kosten
    functions). An independent check of :func:`drift.acoustics.propagation_zk`; valid to about
    1 % for r_v > 10.
    """
    omega = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    a = np.asarray(radius_m, dtype=float)
    rho = np.asarray(density, dtype=float)
    c = np.asarray(sound_speed, dtype=float)
    g = np.asarray(gamma, dtype=float)
    s = np.pi * a**2
    rv = a * np.sqrt(omega * rho / np.asarray(viscosity, dtype=float))
    rt = a * np.sqrt(omega * rho * np.asarray(cp, dtype=float) / np.asarray(conductivity, dtype=float))
    r2 = np.sqrt(2.0)
    z = omega * rho / s * (r2 / rv + 3.0 / rv**2 + 1j * (1.0 + r2 / rv))
    y = omega * s / (rho * c**2) * ((g - 1.0) * (r2 / rt - 1.0 / rt**2) + 1j * (1.0 + (g - 1.0) * r2 / rt))
    return np.sqrt(z * y), np.sqrt(z / y)


def transfer_matrices(network, frequency_hz):
    """(A, B, C, D) of every segment of a :class:`drift.network.Network` at frequencies [Hz],
    arrays (n, N): the network's own matrices, exposed for checks."""
    f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
    return network._point_matrices(np.zeros(f.shape, dtype=int), f)


#: Note names of the twelve pitch classes, from C (MIDI numbering; common practice).
PITCH_CLASSES = ("C", "C#", "D", "Eb", "E", "F", "F#", "G", "Ab", "A", "Bb", "B")


def nearest_note(frequency_hz, a4_hz=440.0):
    """Name of the equal-tempered note nearest a frequency [Hz]: m = round(69 + 12 log2(f / a4)),
    octave m // 12 - 1 (MIDI 1.0 numbering, A4 = 69, C4 = 60)."""
    m = round(69 + 12 * math.log2(frequency_hz / a4_hz))
    return f"{PITCH_CLASSES[m % 12]}{m // 12 - 1}"
