"""The maker's desk: the room temperature an instrument is in tune at, how each note moves with
the conditions there, the best design for a set of customers' climates, and a layout retuned for
another design condition.

*Design temperature.* The room temperature T* at which the instrument, played to its steady
state (or at rest) at a given humidity, has a mean offset of zero from equal temperament at A4.
*Designing for another temperature* T means making the instrument so that its notes are centred
there: to first order, every note shifted by the same amount, -m(T), where m(T) is the mean
offset of the instrument as it is at T (scaling every length of an instrument by s moves every
note by -1200 log2 s; :func:`scaled`). The offsets in a customer's climate of the design for T
are therefore the offsets of the instrument as it is, less m(T); the compromise temperature is
the T whose design has the smallest worst |mean offset| over the climates.

Each evaluation is a bore state (:func:`drift.thermal.bore_profile`) and a search of every note
(:func:`drift.pitch.frequencies_hz`); states asked for together are searched together.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from drift import layout, pitch, thermal
from drift.climate import DEFAULT_BREATH, Climate, Room, altitude_from_pressure, pressure_from_altitude
from drift.constants import LIMITS, ZERO_CELSIUS
from drift.errors import DriftError
from drift.instrument import Design, Instrument
from drift.scale import cents, equal_temperament_hz

#: The room temperatures searched for the design temperature [°C].
SEARCH_C = (-10.0, 45.0)
#: The coarse scan before the root is refined [°C]: 6 states searched together.
SCAN_C = tuple(np.linspace(*SEARCH_C, 6))
#: The root search stops when the mean offset is within FTOL_CENTS of its target [cent], or a
#: step is shorter than XTOL_K [K] (about 0.01 cent at 1 cent/K).
FTOL_CENTS = 1e-3
XTOL_K = 0.01
#: Half-steps of the central differences: room temperature [K], relative humidity [0-1],
#: altitude [m], CO2 in the dry breath [mol/mol]. Each is clipped to the allowed range
#: (drift.constants.LIMITS), making the difference one-sided at its ends.
STEP_K = 1.0
STEP_RH = 0.05
STEP_ALTITUDE_M = 500.0
STEP_CO2 = 0.005


@dataclass(frozen=True)
class NoteSensitivity:
    """How one note moves at the design state, per unit change of one condition [cent].

    Attributes: note, register; cents_per_k (room temperature, breath unchanged),
    cents_per_10pct_rh (room humidity, 10 percentage points), cents_per_km_altitude (pressure of
    the ISO 2533 atmosphere, room temperature held), cents_per_pct_co2 (CO2 in the dry breath, one
    percentage point).
    """

    note: str
    register: int
    cents_per_k: float
    cents_per_10pct_rh: float
    cents_per_km_altitude: float
    cents_per_pct_co2: float


@dataclass(frozen=True)
class ClimateOffset:
    """The notes of a design in one climate: mean offset from equal temperament, spread
    (highest minus lowest), and the note furthest from equal temperament with its offset
    [cent]."""

    climate: str
    mean_offset_cents: float
    spread_cents: float
    worst_note: str
    worst_offset_cents: float


@dataclass(frozen=True)
class DesignResult:
    """Outcome of :func:`design_study`.

    Attributes
    ----------
    instrument : str
    a4_hz : float
        The A4 of equal temperament [Hz].
    relative_humidity : float
        Room humidity of the design state [0-1].
    playing : bool
        True: played to the steady state; False: at rest.
    design_temperature_k : float
        Room temperature [K] at which the mean offset is zero.
    sensitivity : list of NoteSensitivity
        At the design state, in note order.
    climates : list of ClimateOffset
        The design's notes in each climate asked for.
    compromise_temperature_k : float or None
        The design temperature with the smallest worst |mean offset| over the climates [K]
        (None without climates).
    compromise_worst_cents : float or None
        That smallest worst |mean offset| [cent].
    evaluations : int
        Bore states computed.
    """

    instrument: str
    a4_hz: float
    relative_humidity: float
    playing: bool
    design_temperature_k: float
    sensitivity: list[NoteSensitivity]
    climates: list[ClimateOffset]
    compromise_temperature_k: float | None
    compromise_worst_cents: float | None
    evaluations: int


class _Evaluator:
    """Offsets [cent] of every note from equal temperament at ``a4_hz`` in batches of rooms, at
    the design's pressure and CO2 unless a room says otherwise; counts the bore states."""

    def __init__(self, instrument: Instrument, a4_hz: float, relative_humidity: float, playing: bool,
                 progress=None):
        self.instrument, self.playing, self.progress = instrument, playing, progress
        self.relative_humidity = relative_humidity
        self.equal_hz = np.array([equal_temperament_hz(n.name, a4_hz) for n in instrument.notes])
        self.count = 0
        self.near_hz = None

    def room(self, temperature_k: float, relative_humidity: float | None = None,
             pressure_pa: float | None = None) -> Room:
        d = self.instrument.design
        rh = self.relative_humidity if relative_humidity is None else relative_humidity
        return Room(temperature_k, d.pressure_pa if pressure_pa is None else pressure_pa, rh, d.co2_fraction)

    def offsets(self, rooms=(), breaths=None, climates=()) -> np.ndarray:
        """(states, notes) offsets [cent] in ``rooms`` (with ``breaths``, default the default
        breath; played or not as the study), or in ``climates`` (their own rooms and players);
        NaN where a register is out of reach."""
        breaths = breaths or [DEFAULT_BREATH] * len(rooms)
        profiles = [thermal.bore_profile(self.instrument, r, self.playing, None, b)
                    for r, b in zip(rooms, breaths)]
        profiles += [thermal.climate_profile(self.instrument, c) for c in climates]
        self.count += len(profiles)
        if self.near_hz is None:       # the first state searched in full, every state tracked from it
            self.near_hz = pitch.frequencies_hz(self.instrument, profiles[:1])[0]
        found = pitch.frequencies_hz(self.instrument, profiles, self.near_hz)
        if self.progress is not None:
            self.progress()
        return cents(found, self.equal_hz[None, :])

    def mean(self, temperature_k: float) -> float:
        """Mean offset [cent] at one room temperature."""
        return _mean(self.offsets([self.room(temperature_k)])[0])


def _mean(offsets) -> float:
    offsets = np.asarray(offsets, dtype=float)
    return float(np.nanmean(offsets)) if np.any(np.isfinite(offsets)) else math.nan


def _root(evaluator: _Evaluator, scan_k, scan_means, target: float) -> float | None:
    """The first room temperature [K] of the scan's range where the mean offset equals
    ``target`` [cent], refined by :func:`illinois` from the scan's bracket; None when the scan
    shows no change of sign."""
    g = np.asarray(scan_means) - target
    for k in range(len(g) - 1):
        if g[k] == 0.0:
            return float(scan_k[k])
        if g[k] * g[k + 1] < 0.0:
            return illinois(lambda t: evaluator.mean(t) - target, scan_k[k], scan_k[k + 1], g[k], g[k + 1])
    return float(scan_k[-1]) if g[-1] == 0.0 else None


def illinois(f, a: float, b: float, fa: float, fb: float, xtol: float = XTOL_K, ftol: float = FTOL_CENTS,
             iterations: int = 50) -> float:
    """A root of ``f`` in the bracket [a, b], where ``fa = f(a)`` and ``fb = f(b)`` differ in sign.

    The Illinois variant of regula falsi (Dowell & Jarratt 1971, BIT 11, 168-174): the secant
    through the bracket's ends, halving the value kept at an end that stays twice running. It
    stops when |f| < ``ftol`` or a step is shorter than ``xtol``. On a nearly linear function,
    as the mean offset against room temperature is, it takes two or three evaluations.
    """
    side, x_prev = 0, math.inf
    x = a
    for _ in range(iterations):
        x = b - fb * (b - a) / (fb - fa)
        fx = f(x)
        if abs(fx) < ftol or abs(x - x_prev) < xtol or abs(b - a) < xtol:
            return float(x)
        if (fx > 0.0) == (fb > 0.0):
            b, fb = x, fx
            if side == -1:
                fa *= 0.5
            side = -1
        else:
            a, fa = x, fx
            if side == 1:
                fb *= 0.5
            side = 1
        x_prev = x
    return float(x)


def design_study(instrument: Instrument, climates=(), a4_hz: float | None = None,
                 relative_humidity: float | None = None, playing: bool = True, progress=None) -> DesignResult:
    """The design temperature of an instrument, its notes' sensitivities there, and its notes in
    customers' climates with the compromise design temperature.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
        With named notes.
    climates : sequence of drift.climate.Climate
        Customers' climates (room and player, as in a chart).
    a4_hz : float, optional
        A4 of equal temperament [Hz] (default: the file's ``[design] a4_hz``).
    relative_humidity : float, optional
        Room humidity of the design state [0-1] (default: the file's ``[design]``).
    playing : bool
        Played to the steady state (default) or at rest.
    progress : callable, optional
        Called without arguments after each batch of bore states.

    Returns
    -------
    DesignResult

    Raises
    ------
    drift.errors.DriftError
        Without named notes, or when the mean offset does not reach zero between
        :data:`SEARCH_C` (the message says whether the instrument is sharp or flat there).

    Notes
    -----
    The root of the mean offset m(T) is bracketed by a scan of :data:`SCAN_C` (one batch) and
    refined by the Illinois method (:func:`illinois`) to :data:`FTOL_CENTS` or :data:`XTOL_K`. The
    sensitivities are central differences (x+h and x-h in one batch; steps :data:`STEP_K`, :data:`STEP_RH`,
    :data:`STEP_ALTITUDE_M`, :data:`STEP_CO2`); the altitude of the design pressure comes from
    the ISO 2533 atmosphere (:func:`drift.climate.altitude_from_pressure`). With climates, the
    offsets of the design for T are o_C - m(T) (module docstring); the worst |mean offset|,
    max_C |M_C - m(T)|, is smallest where m(T) equals the midrange of the climates' means M_C,
    found on the same scan (the nearer end of the range when m(T) does not reach it).
    """
    if not instrument.notes:
        raise DriftError(f"{instrument.name}: the instrument file has no [[note]]; a design needs named notes")
    a4 = instrument.design.a4_hz if a4_hz is None else float(a4_hz)
    rh = instrument.design.relative_humidity if relative_humidity is None else float(relative_humidity)
    ev = _Evaluator(instrument, a4, rh, playing, progress)
    scan_k = np.array(SCAN_C) + ZERO_CELSIUS
    scan_means = [_mean(o) for o in ev.offsets([ev.room(t) for t in scan_k])]
    if not all(math.isfinite(m) for m in scan_means):
        raise DriftError(f"{instrument.name}: no note sounds between {SEARCH_C[0]:g} and {SEARCH_C[1]:g} °C")
    t_design = _root(ev, scan_k, scan_means, 0.0)
    if t_design is None:
        way = "sharp" if scan_means[0] > 0 else "flat"
        raise DriftError(
            f"{instrument.name}: no design temperature between {SEARCH_C[0]:g} and {SEARCH_C[1]:g} °C at "
            f"A4 = {a4:g} Hz: the notes are {way} throughout (mean {scan_means[0]:+.1f} cents at "
            f"{SEARCH_C[0]:g} °C, {scan_means[-1]:+.1f} at {SEARCH_C[1]:g} °C)")
    sensitivity = _sensitivities(ev, t_design)
    offsets, compromise, worst = [], None, None
    if climates:
        offsets = [_climate_offset(c, o, instrument) for c, o in zip(climates, ev.offsets(climates=climates))]
        means = [o.mean_offset_cents for o in offsets]
        target = shift = 0.5 * (max(means) + min(means))
        compromise = _root(ev, scan_k, scan_means, target)
        if compromise is None:   # m(T) does not reach the midrange: the end nearer to it
            k = int(np.argmin(np.abs(np.array(scan_means) - target)))
            compromise, shift = float(scan_k[k]), scan_means[k]
        worst = max(abs(m - shift) for m in means)
    return DesignResult(instrument.name, a4, rh, playing, t_design, sensitivity, offsets, compromise, worst,
                        ev.count)


def _climate_offset(climate: Climate, offsets, instrument: Instrument) -> ClimateOffset:
    if not np.any(np.isfinite(offsets)):
        raise DriftError(f"{instrument.name}: no note sounds in climate {climate.name}")
    names = [n.name for n in instrument.notes]
    finite = np.where(np.isfinite(offsets), offsets, 0.0)
    k = int(np.argmax(np.abs(finite)))
    return ClimateOffset(climate.name, _mean(offsets), float(np.nanmax(offsets) - np.nanmin(offsets)), names[k],
                         float(offsets[k]))


def _pair(x: float, step: float, low: float, high: float) -> tuple[float, float]:
    """x - step and x + step, clipped to [low, high]."""
    return max(low, x - step), min(high, x + step)


def sensitivities(instrument: Instrument, temperature_k: float, relative_humidity: float | None = None,
                  a4_hz: float | None = None, playing: bool = True) -> list[NoteSensitivity]:
    """How each note moves per unit change of the room temperature, humidity, altitude and breath
    CO2, at one room temperature [K] (the file's ``[design]`` humidity, pressure and CO2 unless
    given; played to the steady state or at rest).

    Central differences of the notes' offsets, all eight states searched together; steps
    :data:`STEP_K`, :data:`STEP_RH`, :data:`STEP_ALTITUDE_M` (ISO 2533 atmosphere,
    :func:`drift.climate.pressure_from_altitude`, from the altitude of the design pressure) and
    :data:`STEP_CO2` around the default breath's CO2, each clipped to the allowed range.
    """
    d = instrument.design
    ev = _Evaluator(instrument, d.a4_hz if a4_hz is None else a4_hz,
                    d.relative_humidity if relative_humidity is None else relative_humidity, playing)
    return _sensitivities(ev, temperature_k)


def _sensitivities(ev: _Evaluator, temperature_k: float) -> list[NoteSensitivity]:
    """:func:`sensitivities` with the evaluator (and its count) of a study."""
    d = ev.instrument.design
    t_low, t_high = LIMITS["temperature_c"][:2]
    temps = _pair(temperature_k, STEP_K, t_low + ZERO_CELSIUS, t_high + ZERO_CELSIUS)
    rhs = _pair(ev.relative_humidity, STEP_RH, 0.0, 1.0)
    z_low, z_high = LIMITS["altitude_m"][:2]
    heights = _pair(float(altitude_from_pressure(d.pressure_pa)), STEP_ALTITUDE_M, z_low, z_high)
    co2 = _pair(DEFAULT_BREATH.co2_fraction, STEP_CO2, 0.0, LIMITS["breath_co2_pct"][1] / 100.0)
    rooms = ([ev.room(t) for t in temps] + [ev.room(temperature_k, relative_humidity=r) for r in rhs]
             + [ev.room(temperature_k, pressure_pa=float(pressure_from_altitude(z))) for z in heights]
             + [ev.room(temperature_k)] * 2)
    breaths = [DEFAULT_BREATH] * 6 + [dataclasses.replace(DEFAULT_BREATH, co2_fraction=c) for c in co2]
    o = ev.offsets(rooms, breaths)

    def slope(i, pair, per):
        return (o[i + 1] - o[i]) / (pair[1] - pair[0]) * per

    per_k, per_rh = slope(0, temps, 1.0), slope(2, rhs, 0.10)
    per_km, per_co2 = slope(4, heights, 1000.0), slope(6, co2, 0.01)
    return [NoteSensitivity(n.name, n.register, float(a), float(b), float(c), float(e))
            for n, a, b, c, e in zip(ev.instrument.notes, per_k, per_rh, per_km, per_co2)]


def scaled(instrument: Instrument, factor: float) -> Instrument:
    """The instrument with every length along the bore (stations, holes, embouchure, tuning
    joint) multiplied by ``factor``; diameters, chimneys and volumes kept.

    For a plain tube this moves every resonance by about -1200 log2(factor) cents (f = c / (2 L)
    or c / (4 L) with the end correction, which does not scale, Levine & Schwinger 1948); the
    design for another temperature is, to first order, the instrument scaled this way.
    """
    stations = instrument.stations_m.copy()
    stations[:, 0] *= factor
    holes = [dataclasses.replace(h, position_m=h.position_m * factor) for h in instrument.holes]
    inp = instrument.input_end
    inp = dataclasses.replace(inp, embouchure_position_m=inp.embouchure_position_m * factor)
    tuning = instrument.tuning
    if tuning is not None:
        tuning = dataclasses.replace(tuning, position_m=tuning.position_m * factor)
    return dataclasses.replace(instrument, stations_m=stations, holes=tuple(holes), input_end=inp, tuning=tuning)


@dataclass(frozen=True)
class RetuneResult:
    """Outcome of :func:`retune`.

    Attributes
    ----------
    instrument : drift.instrument.Instrument
        The retuned instrument; its ``[design]`` is the new condition.
    before_cents, after_cents : ndarray
        Each note's offset from equal temperament at the new condition [cent], before and after.
    hole_moves_m : dict
        Hole name -> move along its own body [m] (> 0 away from the input end), the bore length
        change at the joint left out.
    length_change_m : float
        Bore length added (> 0) or removed at the tuning joint [m]; 0 without a joint.
    evaluations : int
        Residual evaluations of the least-squares solver.
    """

    instrument: Instrument
    before_cents: np.ndarray
    after_cents: np.ndarray
    hole_moves_m: dict
    length_change_m: float
    evaluations: int

    @property
    def largest_move_m(self) -> float:
        """The largest |hole move| [m] (0 without holes)."""
        return max((abs(v) for v in self.hole_moves_m.values()), default=0.0)


def _offsets(instrument: Instrument, profile) -> np.ndarray:
    """Each note's offset [cent] from equal temperament at the design A4; NaN where its register
    is out of reach."""
    found = pitch.note_frequencies(instrument, profile)
    return np.array([math.nan if n.deviation_cents is None else n.deviation_cents for n in found])


def rms_cents(values) -> float:
    """Root mean square [cent] of the finite values."""
    values = np.asarray(values, dtype=float)
    return float(np.sqrt(np.nanmean(np.square(values)))) if np.any(np.isfinite(values)) else math.nan


#: Largest bore length change at the tuning joint a retune may make, as a fraction of the bore.
LENGTH_CHANGE_FRACTION = 0.05
#: Relative tolerances of the least-squares solve on the cost and on the hole positions (in mm).
#: On the bundled instruments, the solver's defaults (1e-8) took 11-78 % more evaluations for
#: the same RMS offset to 0.01 cent, and 1e-3 stopped one of them far from it.
FTOL, XTOL = 1e-4, 1e-5
#: Wall kept between a hole's edge and the joint, the bore's end or the input end [m].
EDGE_M = 1e-3


def _bounds(instrument: Instrument, removal_m: float):
    """Position limits [m] of each hole for the solver: inside the bore (a diameter from its
    ends, beyond a jet's embouchure), where the bore is wider than the hole, on its own side of
    the tuning joint (clear of it after a removal of up to ``removal_m`` [m] there), and short of
    the midpoints to its neighbours, so holes keep their order. Holes with no room to move are
    left out."""
    ins = instrument
    top = ins.input_end.embouchure_position_m if ins.excitation == "jet" else 0.0
    x = np.linspace(0.0, ins.length_m, 2001)
    ordered = sorted(ins.holes, key=lambda h: h.position_m)
    out = {}
    for i, h in enumerate(ordered):
        lo, hi = top + h.diameter_m, ins.length_m - h.diameter_m
        wide = ins.diameter_at(x) > h.diameter_m
        here = int(np.searchsorted(x, h.position_m))
        narrow_below = np.flatnonzero(~wide[:here])
        narrow_above = np.flatnonzero(~wide[here:])
        if narrow_below.size:
            lo = max(lo, x[narrow_below[-1]] + EDGE_M)
        if narrow_above.size:
            hi = min(hi, x[here + narrow_above[0]] - EDGE_M)
        if ins.tuning is not None:
            j = ins.tuning.position_m
            if h.position_m > j:
                lo = max(lo, j + removal_m + h.diameter_m / 2 + EDGE_M)
            else:
                hi = min(hi, j - h.diameter_m / 2 - EDGE_M)
        if i > 0:
            lo = max(lo, 0.5 * (ordered[i - 1].position_m + h.position_m))
        if i + 1 < len(ordered):
            hi = min(hi, 0.5 * (h.position_m + ordered[i + 1].position_m))
        if hi - lo > 1e-5:
            out[h.name] = (lo, hi)
    return out


def _removal_limit(instrument: Instrument) -> float:
    """The most bore length [m] a removal at the joint may take: short of the first hole below
    the joint and of the bore's end (as a negative change)."""
    ins = instrument
    j = ins.tuning.position_m
    below = [h.position_m - h.diameter_m / 2 - EDGE_M - j for h in ins.holes if h.position_m > j]
    return -max(min(below + [ins.length_m - j - EDGE_M]), 0.0)


def retune(instrument: Instrument, temperature_k: float, relative_humidity: float | None = None,
           a4_hz: float | None = None, playing: bool = True, progress=None) -> RetuneResult:
    """Move the holes (and the bore length at the tuning joint) so that every note lands on equal
    temperament at another design condition.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
        With named notes and at least one hole or a tuning joint.
    temperature_k : float
        Room temperature of the new design condition [K].
    relative_humidity : float, optional
        [0-1] (default: the file's ``[design]``); pressure and CO2 are the file's.
    a4_hz : float, optional
        [Hz] (default: the file's ``[design] a4_hz``).
    playing : bool
        The new condition is played to the steady state (default) or at rest.
    progress : callable, optional
        Called with the number of layouts evaluated after each evaluation of the notes.

    Returns
    -------
    RetuneResult

    Notes
    -----
    The hole-layout solver that made the bundled instruments (:func:`drift.layout.tune_layout`:
    ``scipy.optimize.least_squares``, trust-region reflective) moves the hole positions within
    bounds that keep each hole inside the bore, where the bore is wider than the hole, on its side
    of the joint and between its neighbours (:func:`_bounds`), with the solver's penalty on walls
    thinner than 2 mm between holes; diameters are kept. With a joint, the bore length there is a
    variable too (within :data:`LENGTH_CHANGE_FRACTION` of the bore). A played bore's state
    depends on where the breath leaves it, which moves with the holes: the solve uses the state of
    the starting layout, and the offsets reported after are computed afresh in the state of the
    final layout (a second solve in that state, as tools/make_demo_instruments.py makes, lowered
    the RMS offset of the bundled instruments retuned for 14 °C by 0.00-0.14 cent, for twice the
    time).
    """
    if not instrument.notes:
        raise DriftError(f"{instrument.name}: the instrument file has no [[note]]; a retune needs named notes")
    pitch.check_sounds(instrument)
    d = instrument.design
    condition = Design(temperature_k, d.relative_humidity if relative_humidity is None else relative_humidity,
                       d.pressure_pa, d.co2_fraction, playing, d.a4_hz if a4_hz is None else a4_hz)
    start = dataclasses.replace(instrument, design=condition)
    length_at, length_bounds = None, (0.0, 0.0)
    if instrument.tuning is not None:
        span = LENGTH_CHANGE_FRACTION * instrument.length_m
        length_at, length_bounds = instrument.tuning.position_m, (max(_removal_limit(instrument), -span), span)
    bounds = _bounds(instrument, -length_bounds[0])
    if not bounds and length_at is None:
        raise DriftError(f"{instrument.name}: nothing to move: no hole has room to move and there is no "
                         "[tuning] joint")
    profile = thermal.design_profile(start)
    before = _offsets(start, profile)
    result = layout.tune_layout(start, profile, holes=list(bounds), vary_diameters=False, position_bounds_m=bounds,
                                length_change_at_m=length_at, length_change_bounds_m=length_bounds,
                                ftol=FTOL, xtol=XTOL, batch_jacobian=True, progress=progress)
    current = result.instrument
    if playing:
        profile = thermal.design_profile(current)
    after = _offsets(current, profile)
    change = current.length_m - instrument.length_m
    joint = instrument.tuning.position_m if instrument.tuning is not None else math.inf
    moves = {h.name: n.position_m - h.position_m - (change if h.position_m > joint else 0.0)
             for h, n in zip(instrument.holes, current.holes)}
    return RetuneResult(current, before, after, moves, change, result.evaluations)
