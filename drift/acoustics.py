"""The acoustic elements of a bore: lossy cylinders and cones, radiation, tone holes.

Pure functions on arrays; :mod:`drift.network` chains them into the input impedance of a whole
bore. The bore (:class:`drift.segments.Segments`) is a chain of conical and cylindrical segments; each
segment carries its own air (speed of sound c, density rho, viscosity eta, conductivity kappa,
heat capacity cp and ratio gamma). Every segment is a 2x2 matrix relating acoustic pressure p
and volume flow U at its two ends,

    [p_in, U_in] = [[A, B], [C, D]] [p_out, U_out],

so a load impedance Z_out = p_out/U_out seen through the segment becomes
Z_in = (A Z_out + B) / (C Z_out + D). Side holes are T-networks (two half series impedances and a
shunt) at segment junctions; the open end radiates as an unflanged pipe. Time convention
exp(+j omega t). SI units throughout: frequencies in Hz, lengths in m, impedances in Pa s/m^3.

References
----------
[1] Zwikker, C., Kosten, C. W. (1949). Sound Absorbing Materials. Elsevier, Ch. II.
[2] Keefe, D. H. (1984). Acoustical wave propagation in cylindrical ducts: transmission line
    parameter approximations for isothermal and nonisothermal boundary conditions. J. Acoust.
    Soc. Am. 75(1), 58-62.
[3] Levine, H., Schwinger, J. (1948). On the radiation of sound from an unflanged circular pipe.
    Phys. Rev. 73(4), 383-406.
[4] Norris, A. N., Sheng, I. C. (1989). Acoustic radiation from a circular pipe with an infinite
    flange. J. Sound Vib. 135(1), 85-93.
[5] Silva, F., Guillemain, Ph., Kergomard, J., Mallaroni, B., Norris, A. N. (2009).
    Approximation formulae for the acoustic radiation impedance of a cylindrical pipe.
    J. Sound Vib. 322, 255-263.
[6] Lefebvre, A., Scavone, G. P. (2012). Characterization of woodwind instrument toneholes with
    the finite element method. J. Acoust. Soc. Am. 131(4), 3153-3163.
[7] Dubos, V., Kergomard, J., Khettabi, A., Dalmont, J.-P., Keefe, D. H., Nederveen, C. J.
    (1999). Theory of sound propagation in a duct with a branched tube using modal
    decomposition. Acta Acustica 85, 153-169.
[8] Chaigne, A., Kergomard, J. (2016). Acoustics of Musical Instruments. Springer, Ch. 5 and 7.
[9] Fletcher, N. H., Rossing, T. D. (1998). The Physics of Musical Instruments, 2nd ed.
    Springer, Ch. 8.
[10] Nederveen, C. J., Jansen, J. K. M., van Hassel, R. R. (1998). Corrections for woodwind
    tone-hole calculations. Acustica 84(5) (authors from memory).
[11] Keefe, D. H. (1990). Woodwind air column models. J. Acoust. Soc. Am. 88(1), 35-51 (from
    memory).
[12] Dalmont, J.-P., Nederveen, C. J., Dubos, V., Ollivier, S., Meserette, V., te Sligte, E.
    (2002). Experimental determination of the equivalent circuit of an open side hole: linear
    and non linear behaviour. Acta Acustica united with Acustica 88(4), 567-575 (from memory).
"""

from __future__ import annotations

import functools
import math

import numpy as np

#: Low-frequency end correction of an unflanged pipe, in radii: Levine & Schwinger (1948) [3].
UNFLANGED_END_CORRECTION = 0.6133
#: The fields of :class:`drift.air.GasProperties` the acoustics uses.
AIR_FIELDS = ("sound_speed", "density", "viscosity", "conductivity", "cp", "gamma")

#: Above this |argument|, the Zwikker-Kosten Bessel ratio uses its asymptotic series.
_ASYMPTOTIC_FROM = 16.0


def _hankel_series(order: int, terms: int) -> np.ndarray:
    """Coefficients c_k of the Hankel asymptotic series sum_k c_k w^k, w = 1/z (Abramowitz &
    Stegun 1964, Eq. 9.2.7: H1_nu(z) ~ sqrt(2/(pi z)) exp(j(z - nu pi/2 - pi/4)) sum (j)^k a_k(nu) / z^k,
    a_k(nu) = prod_{m=1..k} (4 nu^2 - (2m-1)^2) / (k! 8^k))."""
    mu = 4.0 * order**2
    out = np.empty(terms, dtype=complex)
    a = 1.0
    for k in range(terms):
        if k > 0:
            a *= (mu - (2 * k - 1) ** 2) / (8.0 * k)
        out[k] = a * (1j) ** k
    return out


def _series_ratio(num: np.ndarray, den: np.ndarray) -> np.ndarray:
    """Power-series coefficients of num(w) / den(w) (den[0] != 0)."""
    q = np.zeros_like(num)
    for k in range(len(num)):
        q[k] = (num[k] - np.dot(q[:k], den[k:0:-1])) / den[0]
    return q


#: J1(z)/J0(z) for large |z| with Im z < 0 equals -j * sum_k _RATIO[k] / z^k (to exponentially
#: small terms), from the Hankel series of H1_1 / H1_0.
_RATIO = _series_ratio(_hankel_series(1, 14), _hankel_series(0, 14))


#: On the ray z = sqrt(-j) r (r real), the Hankel series in u = 1/r (w^k = exp(j k pi/4) u^k), and
#: the power series of J0(z) and 2 J1(z)/z in u = r^2/4 (-z^2/4 = j u; coefficients j^k/(k!)^2
#: and j^k/(k! (k+1)!); 36 terms leave less than 1e-17 of the sum for r < 16), highest first.
_RATIO_REAL = (_RATIO * np.exp(0.25j * np.pi * np.arange(len(_RATIO))))[::-1]
_SMALL_SERIES = np.array([[[1j**k / math.factorial(k) ** 2], [1j**k / (math.factorial(k) * math.factorial(k + 1))]]
                          for k in reversed(range(36))])


def _horner(coefficients, u):
    return functools.reduce(lambda acc, c: acc * u + c, coefficients[1:], coefficients[0])


def _wall_ratio(r):
    """The Zwikker-Kosten wall function F(z) = 2 J1(z) / (z J0(z)) [1] on the ray
    z = exp(-j pi/4) r, r >= 0 real, where the model's arguments lie [-].

    Below :data:`_ASYMPTOTIC_FROM` the power series of J0 and J1 (Abramowitz & Stegun 1964,
    Eq. 9.1.10); beyond it the 14-term Hankel asymptotic series of J1/J0 (Eq. 9.2.7), whose
    relative error there is below 1e-9 (the neglected part is of order exp(-sqrt2 r)); both
    summed by Horner's rule in a real variable. tests/test_acoustics.py checks it against
    ``scipy.special.jv``."""
    r = np.asarray(r, dtype=float)
    small = r < _ASYMPTOTIC_FROM
    if not np.any(small):
        return (-2j * np.exp(0.25j * np.pi)) * _horner(_RATIO_REAL, 1.0 / r) / r
    out = np.empty(r.shape, dtype=complex)
    j0, j1 = _horner(_SMALL_SERIES, 0.25 * r[small] ** 2)
    out[small] = j1 / j0
    if not np.all(small):
        out[~small] = _wall_ratio(r[~small])
    return out


def propagation_zk(frequency_hz, radius_m, sound_speed, density, viscosity, conductivity, cp,
                   gamma, lossless: bool = False):
    """Propagation constant Gamma [1/m] and characteristic impedance Zc [Pa s/m^3] of a tube.

    Zwikker-Kosten model [1] of a rigid cylindrical tube of radius a, as written by Keefe (1984)
    [2], Eqs. 1-4 (from memory), with series impedance and shunt admittance per unit length

        Z = j omega rho / S / (1 - F(k_v a)),   k_v^2 = -j omega rho / eta
        Y = j omega S / (rho c^2) (1 + (gamma - 1) F(k_t a)),   k_t^2 = -j omega rho cp / kappa

    with F(z) = 2 J1(z)/(z J0(z)) (:func:`_wall_ratio`), S = pi a^2; then Gamma = sqrt(Z Y) and
    Zc = sqrt(Z / Y). Lossless: Gamma = j omega / c, Zc = rho c / S.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz] (> 0).
    radius_m : array_like
        Tube radius [m].
    sound_speed, density, viscosity, conductivity, cp, gamma : array_like
        Air in the tube: c [m/s], rho [kg/m^3], eta [Pa s], kappa [W/(m K)], cp [J/(kg K)],
        gamma [-]. All inputs broadcast together.
    lossless : bool
        Drop the wall losses.

    Returns
    -------
    gamma_prop : ndarray of complex [1/m]
    zc : ndarray of complex [Pa s/m^3]
    """
    omega = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    a = np.asarray(radius_m, dtype=float)
    rho = np.asarray(density, dtype=float)
    c = np.asarray(sound_speed, dtype=float)
    s = np.pi * a**2
    if lossless:
        g = 1j * omega / c
        zc = rho * c / s + 0j * g
        return g + 0 * zc, zc
    shape = np.broadcast_shapes(omega.shape, a.shape, rho.shape, c.shape, np.shape(viscosity),
                                np.shape(conductivity), np.shape(cp), np.shape(gamma))
    rv = a * np.sqrt(omega * rho / np.asarray(viscosity, dtype=float))
    rt = a * np.sqrt(omega * rho * np.asarray(cp, dtype=float) / np.asarray(conductivity, dtype=float))
    fv, ft = _wall_ratio(np.stack([np.broadcast_to(rv, shape), np.broadcast_to(rt, shape)]))
    # Z Y = -(omega/c)^2 y/z and Z/Y = (rho c/S)^2 / (z y), with z = 1 - F_v, y = 1 + (gamma-1) F_t
    z, y = 1.0 - fv, 1.0 + (np.asarray(gamma, dtype=float) - 1.0) * ft
    return np.sqrt((-(omega / c) ** 2) * (y / z)), (rho * c / s) / np.sqrt(z * y)


def cylinder_matrix(gamma_prop, zc, length_m):
    """Transfer matrix (A, B, C, D) of a cylinder [-, Pa s/m^3, m^3/(Pa s), -].

    A = D = cosh(Gamma L), B = Zc sinh(Gamma L), C = sinh(Gamma L) / Zc (Keefe 1984 [2], Eq. 5, from memory;
    Chaigne & Kergomard 2016 [8], Sec. 5.5, from memory). det = A D - B C = 1 for any Gamma.
    """
    e = np.exp(np.asarray(gamma_prop) * np.asarray(length_m))
    ch, sh = 0.5 * (e + 1.0 / e), 0.5 * (e - 1.0 / e)       # sinh to 1e-16 absolute: ample here
    return ch, zc * sh, sh / zc, ch


def cone_matrix(gamma_prop, zc_mean, radius_in_m, radius_out_m, length_m):
    """Transfer matrix (A, B, C, D) of a truncated cone of spherical waves.

    With x1, x2 the signed distances of the two ends from the apex (x1 = r1 L / (r2 - r1),
    x2 = x1 + L), k = -j Gamma, and the lossless cone matrix (Fletcher & Rossing 1998 [9],
    Sec. 8.6; Chaigne & Kergomard 2016 [8], Sec. 7.3; derived here from p = [a cos k(x - x2) +
    b sin k(x - x2)] / x):

        A = (x2/x1) cos kL - sin kL / (k x1)
        B = j Z12 sin kL,                   Z12 = rho c / (pi r1 r2)
        C = (j / Z12) [sin kL (1 + 1/(k^2 x1 x2)) - L cos kL / (k x1 x2)]
        D = (x1/x2) [cos kL + sin kL / (k x1)]

    Losses enter the common way: the complex wavenumber and the normalised characteristic
    impedance of a cylinder of the segment's mean radius (rho c/S replaced by Zc S_mean/S)
    (Chaigne & Kergomard 2016 [8], Sec. 7.3.4, from memory). Lossless, det = 1 exactly.

    Parameters
    ----------
    gamma_prop : complex array [1/m]
        Propagation constant at the segment's mean radius.
    zc_mean : complex array [Pa s/m^3]
        Characteristic impedance at the mean radius.
    radius_in_m, radius_out_m, length_m : array [m]
        Must describe a real cone (r1 != r2).
    """
    r1 = np.asarray(radius_in_m, dtype=float)
    r2 = np.asarray(radius_out_m, dtype=float)
    length = np.asarray(length_m, dtype=float)
    k = -1j * np.asarray(gamma_prop)
    rm = 0.5 * (r1 + r2)
    z12 = zc_mean * rm**2 / (r1 * r2)
    x1 = r1 * length / (r2 - r1)
    x2 = x1 + length
    kl = k * length
    s, c = np.sin(kl), np.cos(kl)
    a = (x2 / x1) * c - s / (k * x1)
    b = 1j * z12 * s
    cc = (1j / z12) * (s * (1.0 + 1.0 / (k * k * x1 * x2)) - length * c / (k * x1 * x2))
    d = (x1 / x2) * (c + s / (k * x1))
    return a, b, cc, d


def radiation_unflanged(frequency_hz, radius_m, sound_speed, density, model: str = "norris-sheng-1989"):
    """Radiation impedance [Pa s/m^3] of the open end of an unflanged, thin-walled pipe.

    ``"ideal"``: Zr = 0 (a pressure release, for validation against textbook formulas).

    ``"levine-schwinger-1948"``: the low-frequency expansion of Levine & Schwinger (1948) [3],
    Eqs. VI.5-6 (from memory), Zr / Zc = (ka)^2/4 + j 0.6133 ka (ka << 1).

    ``"norris-sheng-1989"`` (default): from the reflection coefficient R = -|R| exp(-2jk l),
    Zr = Zc (1 + R) / (1 - R), with the fits to Levine & Schwinger's exact solution quoted by
    Silva et al. (2009) [5] (Eqs. 13-14 there; equation numbers and coefficients from memory):

        |R| = (1 + 0.2 ka - 0.084 (ka)^2) / (1 + 0.2 ka + (0.5 - 0.084)(ka)^2)
        l / a = 0.6133 (1 + 0.044 (ka)^2) / (1 + 0.19 (ka)^2)

    valid for ka < 3.8 (the first higher mode); both tend to the low-frequency form above.

    Parameters
    ----------
    frequency_hz : array [Hz]; radius_m : float or array [m]; sound_speed [m/s]; density [kg/m^3]
    """
    f = np.asarray(frequency_hz, dtype=float)
    c = np.asarray(sound_speed, dtype=float)
    a = np.asarray(radius_m, dtype=float)
    k = 2.0 * np.pi * f / c
    ka = k * a
    zc = np.asarray(density, dtype=float) * c / (np.pi * a**2)
    if model == "ideal":
        return np.zeros(np.broadcast_shapes(np.shape(ka), np.shape(zc)), dtype=complex)
    if model == "levine-schwinger-1948":
        return zc * (0.25 * ka**2 + 1j * UNFLANGED_END_CORRECTION * ka)
    if model != "norris-sheng-1989":
        raise ValueError(f"unknown radiation model {model!r}")
    ka2 = ka**2
    mag = (1.0 + 0.2 * ka - 0.084 * ka2) / (1.0 + 0.2 * ka + (0.5 - 0.084) * ka2)
    corr = UNFLANGED_END_CORRECTION * (1.0 + 0.044 * ka2) / (1.0 + 0.19 * ka2)
    r = -mag * np.exp(-2j * ka * corr)
    return zc * (1.0 + r) / (1.0 - r)


def hole_corrections(hole_radius_m, bore_radius_m, chimney_m):
    """Length corrections of a side hole [m]: inner t_i, matching volume t_m, series t_a^o, t_a^c.

    With delta = b/a (hole over main-bore radius) and chimney height t (along the hole's axis):

        t_i   = b (0.822 - 0.095 d - 1.566 d^2 + 2.138 d^3 - 1.640 d^4 + 0.502 d^5)
        t_m   = b d (1 + 0.207 d^3) / 8
        t_a^o = b d^2 (-0.35 + 0.06 tanh(2.7 t / b))
        t_a^c = -b d^2 / (1.78 coth(1.78 t / b) + 0.940 + 0.540 d + 0.285 d^2)

    t_i (inner end correction) and t_a^o are the finite-element fits of Lefebvre & Scavone (2012)
    [6] (their Eqs. 9 and 11; equation numbers and coefficients from memory); t_m, the volume
    between the curved bore wall and the hole's inner end as a length of hole, is Nederveen et al.
    (1998) [10] and Dubos et al. (1999) [7] (coefficients from memory); t_a^c is Dubos et al.
    (1999) [7], closed hole (from memory): it vanishes with the height (coth -> inf), since a
    closed hole of no height is no hole. t_i and t_m are lengths of hole (cross-section pi b^2);
    t_a^o and t_a^c are lengths of main bore (pi a^2), negative: the hole shortens the bore's
    inertance.

    Parameters
    ----------
    hole_radius_m, bore_radius_m, chimney_m : array_like [m]

    Returns
    -------
    ti, tm, tao, tac : ndarray [m]
    """
    b = np.asarray(hole_radius_m, dtype=float)
    d = b / np.asarray(bore_radius_m, dtype=float)
    t = np.asarray(chimney_m, dtype=float)
    ti = b * (0.822 - 0.095 * d - 1.566 * d**2 + 2.138 * d**3 - 1.640 * d**4 + 0.502 * d**5)
    tm = b * d * (1.0 + 0.207 * d**3) / 8.0
    tao = b * d**2 * (-0.35 + 0.06 * np.tanh(2.7 * t / b))
    th = np.tanh(1.78 * t / b)  # written with tanh so that t = 0 gives 0, not inf / inf
    tac = -b * d**2 * th / (1.78 + (0.940 + 0.540 * d + 0.285 * d**2) * th)
    return ti, tm, tao, tac


def outer_end_correction(hole_radius_m, bore_radius_m, chimney_m):
    """Outer (radiation) end correction t_o [m] of an open side hole, at low frequency.

        t_o = b [0.822 - 0.47 (b / (a + t))^0.8]

    Dalmont et al. (2002) [12] (their fit; coefficients and form from memory, as quoted by
    Lefebvre & Scavone 2012 [6]: not checked against the printed text). The pipe's outer surface
    acts as a finite, curved flange around the hole; seen from the hole it is the larger the
    smaller the hole is against the outer radius a + t (bore radius plus chimney, taken as the
    wall). As b / (a + t) -> 0 the correction tends to the infinitely flanged 0.822 b (Norris &
    Sheng 1989 [4]); a hole as wide as the pipe gets 0.35 b. The correction is a length of hole
    (cross-section pi b^2).

    Parameters
    ----------
    hole_radius_m, bore_radius_m, chimney_m : array_like [m]
        Hole radius b, main-bore radius a and chimney height t.

    Returns
    -------
    ndarray [m]
    """
    b = np.asarray(hole_radius_m, dtype=float)
    return b * (0.822 - 0.47 * (b / (np.asarray(bore_radius_m, dtype=float)
                                     + np.asarray(chimney_m, dtype=float))) ** 0.8)


def embouchure_outer_correction(hole_radius_m, bore_radius_m, chimney_m, lip_cover):
    """Outer end correction [m] of a flute's embouchure hole partly covered by the lower lip.

    The lip leaves the fraction 1 - f of the hole's area open. The opening is taken as a hole of
    that area, radius b_o = b sqrt(1 - f), with the side-hole correction t_o(b_o)
    (:func:`outer_end_correction`); its inertance rho t_o(b_o) / (pi b_o^2) is returned as a
    length of the whole hole (cross-section pi b^2):

        t_e = t_o(b sqrt(1 - f)) / (1 - f).

    Covering more of the hole lengthens the correction and lowers every note: rolling the flute
    in flattens, rolling out sharpens (Fletcher & Rossing 1998 [9], Ch. 16, from memory; common
    practice). This equal-area opening is our approximation: it leaves out the lip's and face's
    own flange and the jet's shape, and has no published check here.

    Parameters
    ----------
    hole_radius_m, bore_radius_m, chimney_m : array_like [m]
        Embouchure hole radius b, bore radius a at the hole and chimney height t.
    lip_cover : array_like [-]
        Covered fraction f of the hole's area, 0 <= f < 1.

    Returns
    -------
    ndarray [m]
    """
    open_fraction = 1.0 - np.asarray(lip_cover, dtype=float)
    b_open = np.asarray(hole_radius_m, dtype=float) * np.sqrt(open_fraction)
    return outer_end_correction(b_open, bore_radius_m, chimney_m) / open_fraction


def hole_impedances(frequency_hz, hole_radius_m, bore_radius_m, chimney_m, props, lossless=False,
                    outer_correction_m=None):
    """Shunt and series impedances [Pa s/m^3] of side holes, open and closed.

    Each hole is the T-network of Keefe (1990) [11] and Dubos et al. (1999) [7]: a shunt Zs
    between two half series impedances Za/2. With S_h = pi b^2, S = pi a^2 (main bore),
    Zh = rho c / S_h and the chimney a lossy cylinder of the hole's radius (:func:`propagation_zk`)
    and height t + t_m (:func:`hole_corrections`):

        open:   Zs = j omega rho t_i / S_h + chimney(t + t_m) loaded by Zr,
                Zr = Zh [(kb)^2/4 + j k t_o],   t_o of :func:`outer_end_correction`
        closed: Zs = j omega rho t_i / S_h + Zc_h coth(Gamma_h (t + t_m))
        series: Za = j omega rho t_a / S, with t_a^o or t_a^c

    At low frequency a closed hole is the volume S_h (t + t_m) (Keefe 1990 [11]; Nederveen et
    al. 1998 [10]) and an open one the inertance rho (t_i + t + t_m + t_o) / S_h. The radiation
    resistance (kb)^2/4 is the unflanged pipe's (Levine & Schwinger 1948 [3]).

    Parameters
    ----------
    frequency_hz : (N,) [Hz]
    hole_radius_m, bore_radius_m, chimney_m : (H,) or (H, N) [m]
        One value per hole, or per hole and frequency (several bore states at once).
    props : object with arrays (H,) or (H, N) sound_speed, density, viscosity, conductivity, cp, gamma
    outer_correction_m : (H,) or (H, N) [m] or None
        Outer end corrections replacing the default t_o.

    Returns
    -------
    zs_open, zs_closed, za_open, za_closed : ndarray (H, N) complex
    """
    def col(v):  # (H,) -> (H, 1); (H, N) stays
        return np.asarray(v, dtype=float)[:, None] if np.ndim(v) == 1 else np.asarray(v, dtype=float)

    f = np.asarray(frequency_hz, dtype=float)[None, :]
    b, a, t = col(hole_radius_m), col(bore_radius_m), col(chimney_m)
    p = {k: col(getattr(props, k)) for k in AIR_FIELDS}
    rho, c = p["density"], p["sound_speed"]
    omega = 2.0 * np.pi * f
    sh = np.pi * b**2
    ti, tm, tao, tac = hole_corrections(b, a, t)
    height = t + tm
    g, zc = propagation_zk(f, b, **p, lossless=lossless)
    k = omega / c
    to = outer_end_correction(b, a, t) if outer_correction_m is None else col(outer_correction_m)
    zh = rho * c / sh
    zr = zh * (0.25 * (k * b) ** 2 * (0.0 if lossless else 1.0) + 1j * k * to)
    th = np.tanh(g * height)
    inner = 1j * omega * rho * ti / sh
    zs_open = inner + zc * (zr + zc * th) / (zc + zr * th)
    zs_closed = inner + zc / th
    s = np.pi * a**2
    za_open = 1j * omega * rho * tao / s
    za_closed = 1j * omega * rho * tac / s
    return zs_open, zs_closed, za_open, za_closed
