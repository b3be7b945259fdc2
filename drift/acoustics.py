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
"""

from __future__ import annotations

import dataclasses

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


def bessel_ratio(z):
    """F(z) = 2 J1(z) / (z J0(z)) for complex z with Im z <= 0 [-].

    The Zwikker-Kosten wall function [1] (Chaigne & Kergomard 2016 [8], Eq. 5.137, from
    memory). Evaluated with exponentially scaled Bessel functions (``scipy.special.jve``) for
    |z| < 16, and beyond it with the 14-term Hankel asymptotic series of J1/J0 (Abramowitz &
    Stegun 1964, Eq. 9.2.7), whose relative error there is below 1e-9 (the neglected part is of
    order exp(-sqrt2 |z|)).
    """
    from scipy import special

    z = np.asarray(z, dtype=complex)
    out = np.empty(z.shape, dtype=complex)
    small = np.abs(z) < _ASYMPTOTIC_FROM
    if np.any(small):
        zs = z[small]
        out[small] = 2.0 * special.jve(1, zs) / (zs * special.jve(0, zs))
    if not np.all(small):
        zl = z[~small]
        w = 1.0 / zl
        series = np.polyval(_RATIO[::-1], w)
        out[~small] = -2j * series * w
    return out


def propagation_zk(frequency_hz, radius_m, sound_speed, density, viscosity, conductivity, cp,
                   gamma, lossless: bool = False):
    """Propagation constant Gamma [1/m] and characteristic impedance Zc [Pa s/m^3] of a tube.

    Zwikker-Kosten model [1] of a rigid cylindrical tube of radius a, as written by Keefe (1984)
    [2], Eqs. 1-4 (from memory), with series impedance and shunt admittance per unit length

        Z = j omega rho / S / (1 - F(k_v a)),   k_v^2 = -j omega rho / eta
        Y = j omega S / (rho c^2) (1 + (gamma - 1) F(k_t a)),   k_t^2 = -j omega rho cp / kappa

    with F(z) = 2 J1(z)/(z J0(z)) (:func:`bessel_ratio`), S = pi a^2; then Gamma = sqrt(Z Y) and
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
    minus_j = np.exp(-0.25j * np.pi)  # sqrt(-j)
    rv = a * np.sqrt(omega * rho / np.asarray(viscosity, dtype=float))
    rt = a * np.sqrt(omega * rho * np.asarray(cp, dtype=float) / np.asarray(conductivity, dtype=float))
    fv = bessel_ratio(np.broadcast_to(minus_j * rv, shape))
    ft = bessel_ratio(np.broadcast_to(minus_j * rt, shape))
    z = 1j * omega * rho / s / (1.0 - fv)
    y = 1j * omega * s / (rho * c**2) * (1.0 + (np.asarray(gamma, dtype=float) - 1.0) * ft)
    return np.sqrt(z * y), np.sqrt(z / y)


def cylinder_matrix(gamma_prop, zc, length_m):
    """Transfer matrix (A, B, C, D) of a cylinder [-, Pa s/m^3, m^3/(Pa s), -].

    A = D = cosh(Gamma L), B = Zc sinh(Gamma L), C = sinh(Gamma L) / Zc (Keefe 1984 [2], Eq. 5, from memory;
    Chaigne & Kergomard 2016 [8], Sec. 5.5, from memory). det = A D - B C = 1 for any Gamma.
    """
    gl = np.asarray(gamma_prop) * np.asarray(length_m)
    ch, sh = np.cosh(gl), np.sinh(gl)
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
    """Length corrections of a side hole [m]: inner t_i, series open t_a^o and closed t_a^c.

    With delta = b/a (hole over bore radius) and chimney height t, fits to finite-element
    results of Lefebvre & Scavone (2012) [6] (Eqs. 9, 11 and 12 there; equation numbers and coefficients from
    memory):

        t_i   = b (0.822 - 0.095 d - 1.566 d^2 + 2.138 d^3 - 1.640 d^4 + 0.502 d^5)
        t_a^o = b d^2 (-0.35 + 0.06 tanh(2.7 t / b))
        t_a^c = b d^2 (-0.12 - 0.17 tanh(2.4 t / b))

    The series corrections are negative lengths (the hole shortens the main bore's inertance),
    the form of Dubos et al. (1999) [7], Eq. 74 (from memory).
    """
    b = np.asarray(hole_radius_m, dtype=float)
    d = b / np.asarray(bore_radius_m, dtype=float)
    t = np.asarray(chimney_m, dtype=float)
    ti = b * (0.822 - 0.095 * d - 1.566 * d**2 + 2.138 * d**3 - 1.640 * d**4 + 0.502 * d**5)
    tao = b * d**2 * (-0.35 + 0.06 * np.tanh(2.7 * t / b))
    tac = b * d**2 * (-0.12 - 0.17 * np.tanh(2.4 * t / b))
    return ti, tao, tac


def hole_impedances(frequency_hz, hole_radius_m, bore_radius_m, chimney_m, props, lossless=False,
                    outer_correction_m=None):
    """Shunt and series impedances [Pa s/m^3] of side holes, open and closed.

    Each hole is the T-network of Keefe (1990) and Dubos et al. (1999) [7]: a shunt impedance Zs
    between two half series impedances Za/2 (Lefebvre & Scavone 2012 [6], Eq. 2, from memory).
    With Zh = rho c / (pi b^2) and the chimney (height t) a lossy cylinder of the hole's radius
    (:func:`propagation_zk`):

        open:   Zs = j omega rho t_i / S_h + chimney(t) loaded by Zr,
                Zr = Zh [(kb)^2/4 + j k t_o],   t_o = 0.7175 b (:data:`HOLE_OUTER_END_CORRECTION`)
        closed: Zs = j omega rho t_i / S_h + Zc_h coth(Gamma_h t)
        series: Za = j omega rho t_a / S_h, with t_a^o or t_a^c (:func:`hole_corrections`)

    Parameters
    ----------
    frequency_hz : (N,) [Hz]
    hole_radius_m, bore_radius_m, chimney_m : (H,) [m]
    props : object with arrays (H,) sound_speed, density, viscosity, conductivity, cp, gamma
    outer_correction_m : (H,) [m] or None
        Outer end corrections replacing the default t_o.

    Returns
    -------
    zs_open, zs_closed, za_open, za_closed : ndarray (H, N) complex
    """
    f = np.asarray(frequency_hz, dtype=float)[None, :]
    b = np.asarray(hole_radius_m, dtype=float)[:, None]
    a = np.asarray(bore_radius_m, dtype=float)[:, None]
    t = np.asarray(chimney_m, dtype=float)[:, None]
    p = {k: np.asarray(getattr(props, k), dtype=float)[:, None]
         for k in ("sound_speed", "density", "viscosity", "conductivity", "cp", "gamma")}
    rho, c = p["density"], p["sound_speed"]
    omega = 2.0 * np.pi * f
    sh = np.pi * b**2
    ti, tao, tac = hole_corrections(b, a, t)
    g, zc = propagation_zk(f, b, **p, lossless=lossless)
    k = omega / c
    to = HOLE_OUTER_END_CORRECTION * b if outer_correction_m is None else np.asarray(outer_correction_m)[:, None]
    zh = rho * c / sh
    zr = zh * (0.25 * (k * b) ** 2 * (0.0 if lossless else 1.0) + 1j * k * to)
    th = np.tanh(g * t)
    inner = 1j * omega * rho * ti / sh
    zs_open = inner + zc * (zr + zc * th) / (zc + zr * th)
    with np.errstate(divide="ignore", invalid="ignore"):
        zs_closed = inner + np.where(t > 0, zc / th, np.inf)
    za_open = 1j * omega * rho * tao / sh
    za_closed = 1j * omega * rho * tac / sh
    return zs_open, zs_closed, za_open, za_closed


def take_segments(props, index):
    """The per-segment properties (a :class:`drift.air.GasProperties` of arrays) at ``index``."""
    return type(props)(*(np.asarray(getattr(props, f.name))[index] for f in dataclasses.fields(props)))


class Network:
    """A bore with its air, ready to give its input impedance at any frequencies.

    Build once per geometry and air (:class:`drift.segments.Segments` and a
    :class:`drift.air.GasProperties` of arrays with one entry per segment); then :meth:`impedance`
    evaluates many frequencies and fingerings.
    """

    def __init__(self, segments, segment_air, lossless: bool = False,
                 radiation: str = "norris-sheng-1989"):
        self.seg = segments
        self.air = segment_air
        self.lossless = lossless
        self.radiation = radiation
        r_mean = 0.5 * (segments.radius_in_m + segments.radius_out_m)
        self.r_mean = r_mean
        self.is_cone = np.abs(segments.radius_out_m - segments.radius_in_m) > 1e-9 * r_mean
        self.hole_air = take_segments(segment_air, segments.hole_segment) if len(segments.hole_segment) else None
        self.n_holes = len(segments.hole_segment)
        # holes sitting at the start of each segment
        self.holes_at = [[] for _ in range(segments.n)]
        for h, s in enumerate(segments.hole_segment):
            self.holes_at[int(s)].append(h)

    def _matrices(self, f):
        """(A, B, C, D) of every segment, each (n, N)."""
        s, air = self.seg, self.air
        col = lambda v: np.asarray(v)[:, None]
        g, zc = propagation_zk(f[None, :], col(self.r_mean), col(air.sound_speed), col(air.density),
                               col(air.viscosity), col(air.conductivity), col(air.cp), col(air.gamma),
                               lossless=self.lossless)
        a, b, c, d = cylinder_matrix(g, zc, col(s.length_m))
        if np.any(self.is_cone):
            i = self.is_cone
            ca, cb, cc, cd = cone_matrix(g[i], zc[i], col(s.radius_in_m[i]), col(s.radius_out_m[i]),
                                         col(s.length_m[i]))
            a, b, c, d = a.copy(), b.copy(), c.copy(), d.copy()
            a[i], b[i], c[i], d[i] = ca, cb, cc, cd
        return a, b, c, d

    def impedance(self, frequency_hz, open_holes=None, paired: bool = False):
        """Input impedance [Pa s/m^3] at the input end (reed, lips) or as seen by the jet.

        Parameters
        ----------
        frequency_hz : (N,) [Hz]
        open_holes : bool array (F, H) or None (all open)
            True where a hole is open. With ``paired`` False, every fingering is evaluated at
            every frequency: result (F, N). With ``paired`` True, row i of ``open_holes`` goes
            with frequency i: (N, H) -> result (N,).

        Notes
        -----
        Z is propagated from the radiation load at the open end to the input through every
        segment (Z <- (A Z + B)/(C Z + D)) and every hole (Z <- Za/2 + 1/(1/Zs + 1/(Z + Za/2))).
        Reed and lips: a compliance j omega V/(rho c^2) in parallel at the input (the reed's
        equivalent volume, or the lip cup). Jet: the embouchure hole's chimney (with inner and
        outer end corrections, :func:`hole_impedances`) loads the parallel combination of the
        stopped cavity and the bore, and its outer radiation impedance is in series; the minima
        of this impedance are the jet's resonances (Fletcher & Rossing 1998 [9], Sec. 16.3).
        """
        f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
        seg, air = self.seg, self.air
        nh = self.n_holes
        if open_holes is None:
            open_holes = np.ones((1 if not paired else len(f), nh), dtype=bool)
        open_holes = np.asarray(open_holes, dtype=bool)
        if open_holes.ndim != 2 or open_holes.shape[1] != nh:
            raise ValueError(f"open_holes must have shape (F, {nh})")
        a, b, c, d = self._matrices(f)
        last = seg.n - 1
        zr = radiation_unflanged(f, seg.radius_out_m[last], air.sound_speed[last], air.density[last],
                                 "levine-schwinger-1948" if self.lossless and self.radiation != "ideal"
                                 else self.radiation)
        if self.lossless:
            zr = 1j * zr.imag
        shape = (len(f),) if paired else (open_holes.shape[0], len(f))
        z = np.broadcast_to(zr, shape).astype(complex)
        if nh:
            zso, zsc, zao, zac = hole_impedances(f, seg.hole_radius_m, seg.hole_bore_radius_m,
                                                 seg.hole_chimney_m, self.hole_air, self.lossless)
        for i in range(last, seg.n_cavity - 1, -1):
            z = (a[i] * z + b[i]) / (c[i] * z + d[i])
            for h in self.holes_at[i]:
                is_open = open_holes[:, h] if paired else open_holes[:, h][:, None]
                zs = np.where(is_open, zso[h], zsc[h])
                za = 0.5 * np.where(is_open, zao[h], zac[h])
                with np.errstate(divide="ignore", invalid="ignore"):
                    ys = np.where(np.isinf(zs), 0.0, 1.0 / zs)
                z = za + 1.0 / (ys + 1.0 / (z + za))
        i0 = seg.n_cavity
        rho0, c0 = air.density[i0], air.sound_speed[i0]
        omega = 2.0 * np.pi * f
        if seg.excitation in ("reed", "lips"):
            y_vol = 1j * omega * seg.added_volume_m3 / (rho0 * c0**2)
            return 1.0 / (1.0 / z + y_vol)
        return self._jet(f, z, a, b, c, d)

    def _jet(self, f, z_bore, a, b, c, d):
        seg, air = self.seg, self.air
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
        a_bore = seg.radius_in_m[i0]
        be = seg.embouchure_radius_m
        te = seg.embouchure_chimney_m
        ti, _, _ = hole_corrections(be, a_bore, max(te, 1e-6))
        rho, c0 = float(air.density[i0]), float(air.sound_speed[i0])
        omega = 2.0 * np.pi * f
        se = np.pi * be**2
        g, zc = propagation_zk(f, be, air.sound_speed[i0], air.density[i0], air.viscosity[i0],
                               air.conductivity[i0], air.cp[i0], air.gamma[i0], lossless=self.lossless)
        ca, cb, cc, cd = cylinder_matrix(g, zc, te)
        load = z_par + 1j * omega * rho * ti / se
        z_hole = (ca * load + cb) / (cc * load + cd)
        to = seg.embouchure_outer_correction_m
        if to is None:
            to = HOLE_OUTER_END_CORRECTION * be
        k = omega / c0
        zh = rho * c0 / se
        z_out = zh * (0.25 * (k * be) ** 2 * (0.0 if self.lossless else 1.0) + 1j * k * to)
        return z_hole + z_out
