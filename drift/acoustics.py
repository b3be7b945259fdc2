"""Input impedance of a bore by the transfer-matrix method, with visco-thermal losses.

The bore (:class:`drift.segments.Segments`) is a chain of conical and cylindrical segments; each
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
"""

from __future__ import annotations

import bisect
import dataclasses
import functools
import math
import types

import numpy as np

#: Low-frequency end correction of an unflanged pipe, in radii: Levine & Schwinger (1948) [3].
UNFLANGED_END_CORRECTION = 0.6133
#: Low-frequency end correction of a pipe in an infinite flange, in radii (Norris & Sheng 1989 [4]).
FLANGED_END_CORRECTION = 0.8216
#: Outer end correction of a side hole, in hole radii: the mean of the unflanged and infinitely
#: flanged values, since a hole in a pipe wall radiates through a flange of finite, curved
#: extent (common practice; measured values lie between the two, e.g. Dalmont et al. 2002,
#: from memory).
HOLE_OUTER_END_CORRECTION = 0.5 * (UNFLANGED_END_CORRECTION + FLANGED_END_CORRECTION)

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


def hole_impedances(frequency_hz, hole_radius_m, bore_radius_m, chimney_m, props, lossless=False,
                    outer_correction_m=None):
    """Shunt and series impedances [Pa s/m^3] of side holes, open and closed.

    Each hole is the T-network of Keefe (1990) [11] and Dubos et al. (1999) [7]: a shunt Zs
    between two half series impedances Za/2. With S_h = pi b^2, S = pi a^2 (main bore),
    Zh = rho c / S_h and the chimney a lossy cylinder of the hole's radius (:func:`propagation_zk`)
    and height t + t_m (:func:`hole_corrections`):

        open:   Zs = j omega rho t_i / S_h + chimney(t + t_m) loaded by Zr,
                Zr = Zh [(kb)^2/4 + j k t_o],   t_o = 0.7175 b (:data:`HOLE_OUTER_END_CORRECTION`)
        closed: Zs = j omega rho t_i / S_h + Zc_h coth(Gamma_h (t + t_m))
        series: Za = j omega rho t_a / S, with t_a^o or t_a^c

    At low frequency a closed hole is the volume S_h (t + t_m) (Keefe 1990 [11]; Nederveen et
    al. 1998 [10]) and an open one the inertance rho (t_i + t + t_m + t_o) / S_h.

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
    to = HOLE_OUTER_END_CORRECTION * b if outer_correction_m is None else col(outer_correction_m)
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


def take_segments(props, index):
    """The per-segment properties (a :class:`drift.air.GasProperties` of arrays) at ``index``."""
    return type(props)(*(np.asarray(getattr(props, f.name))[index] for f in dataclasses.fields(props)))


def _product(p, q):
    """The 2x2 matrix product p q of two (A, B, C, D) tuples of arrays."""
    pa, pb, pc, pd = p
    qa, qb, qc, qd = q
    return pa * qa + pb * qc, pa * qb + pb * qd, pc * qa + pd * qc, pc * qb + pd * qd


class Network:
    """A bore with its air, ready to give its input impedance at any frequencies.

    Build once per geometry and air (:class:`drift.segments.Segments` and a
    :class:`drift.air.GasProperties` of arrays with one entry per segment); then :meth:`impedance`
    evaluates many frequencies and fingerings. :meth:`stack` joins several bore states of one
    topology (the same segments and holes, each state with its own dimensions, for example
    expanded by its own wall temperature, and its own air) into one network whose
    :meth:`impedance` evaluates them all in one pass along the bore.

    Attributes: ``seg`` and ``air``, the first state's Segments and GasProperties; ``n_states``
    (1 unless built by :meth:`stack`); ``batched``, True for a network built by :meth:`stack`
    (:meth:`impedance` then has a leading state axis).
    """

    def __init__(self, segments, segment_air, lossless: bool = False,
                 radiation: str = "norris-sheng-1989"):
        self.lossless, self.radiation, self.batched = lossless, radiation, False
        self._build((segments,), (segment_air,))

    @classmethod
    def stack(cls, networks) -> "Network":
        """One network of the bore states of ``networks`` (same topology, losses and radiation).

        Raises ValueError when the networks differ in topology (:attr:`topology`), losses or
        radiation model.
        """
        networks = list(networks)
        first = networks[0]
        if any((n.lossless, n.radiation) != (first.lossless, first.radiation) for n in networks):
            raise ValueError("stacked networks must share their loss and radiation models")
        net = cls.__new__(cls)
        net.lossless, net.radiation, net.batched = first.lossless, first.radiation, True
        net._build(tuple(s for n in networks for s in n.states_segments),
                   tuple(a for n in networks for a in n.states_air))
        return net

    @property
    def topology(self) -> tuple:
        """What networks must share to be stacked: segment count, cavity, excitation, hole
        segments and which segments are cones."""
        s = self.seg
        return (s.n, s.n_cavity, s.excitation, tuple(int(h) for h in s.hole_segment),
                tuple(bool(c) for c in self.is_cone))

    def _build(self, segments, airs):
        s0 = segments[0]
        self.seg, self.air = s0, airs[0]
        self.states_segments, self.states_air = segments, airs
        self.n_states = len(segments)

        def stack(values):
            return np.array([np.asarray(v, dtype=float) for v in values])

        self._len = stack([s.length_m for s in segments])            # (B, n) [m]
        self._r_in = stack([s.radius_in_m for s in segments])
        self._r_out = stack([s.radius_out_m for s in segments])
        self._r_mean = 0.5 * (self._r_in + self._r_out)
        cone = np.abs(self._r_out - self._r_in) > 1e-9 * self._r_mean
        self.r_mean, self.is_cone = self._r_mean[0], cone[0]
        self._air = {k: stack([getattr(a, k) for a in airs]) for k in AIR_FIELDS}
        hs = np.asarray(s0.hole_segment, dtype=int)
        self.n_holes = len(hs)
        if np.any(cone != cone[0]) or any((s.n, s.n_cavity, s.excitation) != (s0.n, s0.n_cavity, s0.excitation)
                                          or not np.array_equal(s.hole_segment, hs) for s in segments[1:]):
            raise ValueError("stacked bore states must share their segments, holes and cones")
        self._hole = {k: stack([getattr(s, k) for s in segments])
                      for k in ("hole_radius_m", "hole_chimney_m", "hole_bore_radius_m")}
        self._hole_air = {k: v[:, hs] for k, v in self._air.items()}
        self.hole_air = take_segments(airs[0], hs) if self.n_holes else None
        self._volume = stack([s.added_volume_m3 for s in segments])
        self._compliance = stack([s.reed_compliance_m3_pa for s in segments])
        self._emb_radius = stack([s.embouchure_radius_m for s in segments])
        self._emb_chimney = stack([s.embouchure_chimney_m for s in segments])
        self._emb_outer = stack([HOLE_OUTER_END_CORRECTION * s.embouchure_radius_m if s.embouchure_outer_correction_m
                                 is None else s.embouchure_outer_correction_m for s in segments])
        # holes sitting at the start of each segment
        self.holes_at = [[] for _ in range(s0.n)]
        for h, s in enumerate(hs):
            self.holes_at[int(s)].append(h)

    def resonance_spacing_hz(self) -> np.ndarray:
        """c / 2L [Hz] per state, the spacing of the resonances of the whole closed bore: L every
        segment plus the input's added volume as bore of the input's cross-section, c the lowest
        speed of sound along the bore (a shorter air column spaces its resonances wider)."""
        i0 = self.seg.n_cavity
        stiffness = self._air["density"][:, i0] * self._air["sound_speed"][:, i0] ** 2
        extra = (self._volume + self._compliance * stiffness) / (np.pi * self._r_in[:, i0] ** 2)
        return self._air["sound_speed"].min(axis=1) / (2.0 * (self._len.sum(axis=1) + extra))

    def _point_matrices(self, state, f):
        """(A, B, C, D) of every segment, each (n, P), for state[p] at frequency f[p]."""
        def col(v):
            return v[state].T

        air = {k: col(v) for k, v in self._air.items()}
        g, zc = propagation_zk(f[None, :], col(self._r_mean), **air, lossless=self.lossless)
        length = col(self._len)
        cone = self.is_cone
        if not np.any(cone):
            return cylinder_matrix(g, zc, length)
        out = [np.empty(g.shape, dtype=complex) for _ in range(4)]
        for where, values in ((~cone, cylinder_matrix(g[~cone], zc[~cone], length[~cone])),
                              (cone, cone_matrix(g[cone], zc[cone], col(self._r_in)[cone], col(self._r_out)[cone],
                                                 length[cone]))):
            for m, v in zip(out, values):
                m[where] = v
        return tuple(out)

    def impedance(self, frequency_hz, open_holes=None, paired: bool = False, state=None):
        """Input impedance [Pa s/m^3] at the input end (reed, lips) or as seen by the jet.

        Parameters
        ----------
        frequency_hz : (N,) [Hz], or (B, N) for a stacked network of B states
        open_holes : bool array (F, H) or None (all open)
            True where a hole is open. With ``paired`` False, every fingering is evaluated at
            every frequency: result (F, N), or (B, F, N) for a stacked network (each state at
            its own row of ``frequency_hz``, or all at one (N,) row). With ``paired`` True, row i
            of ``open_holes`` goes with frequency i: (N, H) -> result (N,).
        state : (N,) int, optional
            With ``paired``: the bore state of each frequency (default 0; required when the
            network holds several states).

        Notes
        -----
        Z is propagated from the radiation load at the open end to the input through every
        segment (Z <- (A Z + B)/(C Z + D)) and every hole (Z <- Za/2 + 1/(1/Zs + 1/(Z + Za/2))).
        Unpaired, with several fingerings, the closed bore above each fingering's first open
        hole is common to them: its matrix product (a closed hole as the matrix [[1 + Za Ys/2,
        Za (1 + Za Ys/4)], [Ys, 1 + Za Ys/2]], Ys = 1/Zs) is formed once per frequency and each
        fingering propagated only up to its first open hole (:meth:`_shared_upper_bore`). All
        states and frequencies go through one loop over the segments. Reed and lips: the
        admittance j omega (V/(rho c^2) + C) in parallel at the input, V the geometric volume
        (mouthpiece cavity, missing cone tip, lip cup) and C the reed's compliance [m^3/Pa]. The
        reed acts as the volume gamma p C of the air at the input (Nederveen 1998, Sec. 9,
        from memory), which with rho c^2 = gamma p (ideal gas) is the admittance j omega C: a
        volume that shrinks with the pressure. Jet: the embouchure hole's chimney (with inner and outer end
        corrections, :func:`hole_impedances`) loads the parallel combination of the stopped
        cavity and the bore, and its outer radiation impedance is in series; the minima of this
        impedance are the jet's resonances (Fletcher & Rossing 1998 [9], Sec. 16.3).
        """
        nh = self.n_holes
        if paired:
            f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
            if state is None and self.n_states > 1:
                raise ValueError("a paired evaluation of several bore states needs their state indices")
            st = np.zeros(f.shape, dtype=int) if state is None else np.broadcast_to(np.asarray(state, dtype=int), f.shape)
            rows = np.ones((len(f), nh), dtype=bool) if open_holes is None else np.asarray(open_holes, dtype=bool)
            if rows.shape != (len(f), nh):
                raise ValueError(f"open_holes must have shape ({len(f)}, {nh})")
            return self._evaluate(st, f, rows, paired=True)
        f = np.asarray(frequency_hz, dtype=float)
        b = self.n_states
        f = np.broadcast_to(f, (b, f.shape[-1])) if self.batched else np.atleast_1d(f)[None, :]
        rows = np.ones((1, nh), dtype=bool) if open_holes is None else np.asarray(open_holes, dtype=bool)
        if rows.ndim != 2 or rows.shape[1] != nh:
            raise ValueError(f"open_holes must have shape (F, {nh})")
        n = f.shape[1]
        z = self._evaluate(np.repeat(np.arange(f.shape[0]), n), f.ravel(), rows, paired=False)
        return z.reshape(len(rows), f.shape[0], n).transpose(1, 0, 2) if self.batched else z

    def _evaluate(self, st, f, rows, paired):
        if not paired and len(rows) == 1:        # one fingering: nothing to share
            return self._evaluate(st, f, np.broadcast_to(rows, (len(f), self.n_holes)), True)[None]
        seg = self.seg
        last, n_cav = seg.n - 1, seg.n_cavity
        a, b, c, d = self._point_matrices(st, f)
        air = self._air
        zr = radiation_unflanged(f, self._r_out[st, last], air["sound_speed"][st, last], air["density"][st, last],
                                 "levine-schwinger-1948" if self.lossless and self.radiation != "ideal"
                                 else self.radiation)
        if self.lossless:
            zr = 1j * zr.imag
        if self.n_holes:
            hole_air = types.SimpleNamespace(**{k: v[st].T for k, v in self._hole_air.items()})
            zso, zsc, zao, zac = hole_impedances(f, self._hole["hole_radius_m"][st].T,
                                                 self._hole["hole_bore_radius_m"][st].T,
                                                 self._hole["hole_chimney_m"][st].T, hole_air, self.lossless)
            zao, zac = 0.5 * zao, 0.5 * zac                  # half series impedances
            with np.errstate(divide="ignore", invalid="ignore"):
                yso, ysc = 1.0 / zso, np.where(np.isinf(zsc), 0.0, 1.0 / zsc)
        if paired:
            if self.n_holes:
                ys, za = np.where(rows.T, yso, ysc), np.where(rows.T, zao, zac)
            z = zr.astype(complex)
            for i in range(last, n_cav - 1, -1):
                z = (a[i] * z + b[i]) / (c[i] * z + d[i])
                for h in self.holes_at[i]:
                    z = za[h] + 1.0 / (ys[h] + 1.0 / (z + za[h]))
        else:
            z = self._shared_upper_bore(rows, f, zr, (a, b, c, d),
                                        (yso, ysc, zao, zac) if self.n_holes else None)
        i0 = n_cav
        rho0, c0 = air["density"][st, i0], air["sound_speed"][st, i0]
        omega = 2.0 * np.pi * f
        if seg.excitation in ("reed", "lips"):
            y_vol = 1j * omega * (self._volume[st] / (rho0 * c0**2) + self._compliance[st])
            return 1.0 / (1.0 / z + y_vol)
        return self._jet(st, f, z, a, b, c, d)

    def _shared_upper_bore(self, rows, f, zr, matrices, holes):
        """Z (F, P) of fingerings ``rows`` (F, H) at frequencies f (P,): each from the open end up
        to its first open hole, then through the closed bore above it as one matrix product,
        formed once per frequency for all fingerings (down to where at least three fingerings
        still use it; the others go on with the propagation of Z)."""
        seg = self.seg
        last, n_cav = seg.n - 1, seg.n_cavity
        a, b, c, d = matrices
        hs = np.asarray(seg.hole_segment, dtype=int)
        first = np.where(rows, hs[None, :], last + 1).min(axis=1) if self.n_holes else np.full(len(rows), last + 1)
        order = np.argsort(first, kind="stable")
        # the shared product reaches segment m: the third-highest first open hole
        m = int(np.sort(first)[-min(3, len(first))])
        first = [max(n_cav, min(int(v), m)) for v in first[order]]
        ordered = rows[order]
        z = np.empty((len(rows), len(f)), dtype=complex)
        z[:] = zr
        for i in range(last, first[0] - 1, -1):
            k = bisect.bisect_right(first, i)      # rows still below their first open hole
            zk = (a[i] * z[:k] + b[i]) / (c[i] * z[:k] + d[i])
            for h in self.holes_at[i]:
                is_open = ordered[:k, h][:, None]
                ys, za = np.where(is_open, holes[0][h], holes[1][h]), np.where(is_open, holes[2][h], holes[3][h])
                zk = za + 1.0 / (ys + 1.0 / (zk + za))
            z[:k] = zk
        product = None
        for i in range(n_cav, first[-1] + 1):
            lo, hi = bisect.bisect_left(first, i), bisect.bisect_right(first, i)
            if hi > lo and product is not None:
                pa, pb, pc, pd = product
                z[lo:hi] = (pa * z[lo:hi] + pb) / (pc * z[lo:hi] + pd)
            if i == first[-1]:
                break
            step = (a[i], b[i], c[i], d[i])
            for h in self.holes_at[i]:                                     # closed
                ys, za = holes[1][h], holes[3][h]
                ah = 1.0 + za * ys
                step = _product((ah, za * (1.0 + ah), ys, ah), step)
            product = step if product is None else _product(product, step)
        return z[np.argsort(order, kind="stable")]

    def _jet(self, st, f, z_bore, a, b, c, d):
        seg, air = self.seg, self._air
        i0 = seg.n_cavity
        # cavity seen from the embouchure: from the stopped end (U = 0) back to the embouchure;
        # a reversed segment swaps A and D.
        y = np.zeros(len(f), dtype=complex)  # admittance at the stopped end
        for i in range(i0):
            # looking from the embouchure side towards position 0 through segment i reversed:
            # Z_in = (D Z + B) / (C Z + A); in admittance form Y_in = (C + A Y) / (D + B Y)
            y = (c[i] + a[i] * y) / (d[i] + b[i] * y)
        with np.errstate(divide="ignore", invalid="ignore"):
            y_total = y + 1.0 / z_bore
        z_par = 1.0 / y_total
        a_bore = self._r_in[st, i0]
        be, te = self._emb_radius[st], self._emb_chimney[st]
        ti, tm, _, _ = hole_corrections(be, a_bore, te)
        props = {k: v[st, i0] for k, v in air.items()}
        rho, c0 = props["density"], props["sound_speed"]
        omega = 2.0 * np.pi * f
        se = np.pi * be**2
        g, zc = propagation_zk(f, be, **props, lossless=self.lossless)
        ca, cb, cc, cd = cylinder_matrix(g, zc, te + tm)
        load = z_par + 1j * omega * rho * ti / se
        z_hole = (ca * load + cb) / (cc * load + cd)
        k = omega / c0
        zh = rho * c0 / se
        z_out = zh * (0.25 * (k * be) ** 2 * (0.0 if self.lossless else 1.0) + 1j * k * self._emb_outer[st])
        return z_hole + z_out
