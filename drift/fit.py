"""The player fitted to a tuner log: breath flow, breath temperature and the bore's heat exchange
from a dozen tuner readings taken over a warm-up.

A tuner log (CSV, docs/formats.md) holds one reading per row: minutes since the player started,
the note, the tuner's offset in cents from equal temperament at a given A4, and optionally
whether the instrument was being played or resting then. The thermal timeline of
:mod:`drift.thermal` and the resonances of :mod:`drift.pitch` predict each reading from three
player values; :func:`fit_player` finds the values (and one constant offset for the player's
embouchure, so that only the drift is fitted) by least squares.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Sequence

import numpy as np

from drift import pitch, thermal
from drift.climate import DEFAULT_BLOWING, Phase, Player, Room, plan_duration_s
from drift.constants import LONGEST_PLAN_S, ZERO_CELSIUS
from drift.errors import InputFileError, OutOfRangeError
from drift.files import choose, read_text_file
from drift.instrument import Instrument
from drift.scale import cents, equal_temperament_hz, note_to_midi
from drift.warmup import plan_frequencies, sample_times

#: Fewest readings a log must hold: four values are fitted, and two more leave the residual
#: something to say (a dozen or more are recommended, docs/guide.md).
FEWEST_READINGS = 6
#: Largest |reading| accepted [cent]: a reading further off is a different note or a misread tuner.
LARGEST_READING_CENTS = 100.0
#: Columns of a tuner log: required, then optional.
LOG_COLUMNS = ("minute", "note", "cents")
LOG_OPTIONAL = ("state", "comment")
#: The fitted values, their bounds and steps. Breath flow and heat-exchange factor are fitted as
#: their logarithm (positive, and their effects are closer to linear in it), within a factor of 10
#: of the excitation's default flow and of 1; breath temperature in °C within 20-40 °C (exhaled
#: air leaves the mouth near 34-35 °C, from memory: West, Respiratory Physiology; the band is
#: wider, as the fitted value is the breath's temperature where it enters the bore).
BOUNDS = (np.array([-math.log(10.0), 20.0, -math.log(10.0)]), np.array([math.log(10.0), 40.0, math.log(10.0)]))
#: Forward-difference steps of the Jacobian (2 % of the flow, 0.1 K, 2 % of the factor): each
#: moves the readings by tenths of a cent, far above the model's own noise (the resonance search
#: resolves 0.0002 cent, the thermal integration 1e-7 of the temperatures).
STEPS = np.array([0.02, 0.1, 0.02])
#: Typical size of each fitted value's change (trust-region scaling of the least squares).
X_SCALE = np.array([0.5, 2.0, 0.5])
#: Most trial points of the least squares (scipy's ``max_nfev``): each costs one model evaluation
#: (a thermal timeline and a resonance search at every reading), each accepted one three more for
#: its Jacobian.
MOST_TRIALS = 30


@dataclass(frozen=True)
class TunerLog:
    """Tuner readings (:func:`read_tuner_log`).

    Attributes: times_s (n,) [s] since the player started, strictly increasing; notes (n,) note
    names; cents (n,) the tuner's offset from equal temperament [cent]; states (n,) 'play' or
    'rest', or None when the log does not say; source, the file's name for messages.
    """

    times_s: np.ndarray
    notes: tuple[str, ...]
    cents: np.ndarray
    states: tuple[str, ...] | None = None
    source: str = ""


def read_tuner_log(path: str | Path) -> TunerLog:
    """Read a tuner log (CSV with a header: ``minute,note,cents`` and optionally ``state`` and
    ``comment``; lines starting with ``#`` are comments). Bad rows raise InputFileError naming the
    file, the line and the column."""
    path = Path(path)
    text = read_text_file(path, "tuner log")
    lines = [(n, line) for n, line in enumerate(text.splitlines(), 1)
             if line.strip() and not line.lstrip().startswith("#")]
    if not lines:
        raise InputFileError(f"{path}: the tuner log is empty; it needs a header line: minute,note,cents")
    rows = list(csv.reader(io.StringIO("\n".join(line for _, line in lines))))
    header = [h.strip().lower() for h in rows[0]]
    missing = [c for c in LOG_COLUMNS if c not in header]
    unknown = [c for c in header if c not in LOG_COLUMNS + LOG_OPTIONAL]
    if missing or unknown or len(set(header)) < len(header):
        raise InputFileError(f"{path}: line {lines[0][0]}: the header must name the columns minute, note, "
                             f"cents (required) and state, comment (optional), each once; found: {', '.join(header)}")
    times, notes, values, states = [], [], [], []
    for (number, _), row in zip(lines[1:], rows[1:]):
        cell = dict(zip(header, (c.strip() for c in row)))
        where = f"{path}: line {number}"
        if len(row) != len(header):
            raise InputFileError(f"{where}: {len(row)} values for {len(header)} columns")
        minute = _number(cell["minute"], where, "minute")
        reading = _number(cell["cents"], where, "cents")
        if not 0.0 <= minute <= LONGEST_PLAN_S / 60.0:
            raise InputFileError(f"{where}: minute {minute:g} is outside the allowed range 0 to "
                                 f"{LONGEST_PLAN_S / 60.0:g}")
        if times and not minute > times[-1]:
            raise InputFileError(f"{where}: minute {minute:g} does not come after the previous reading's "
                                 f"{times[-1]:g}; minutes must increase from row to row")
        if abs(reading) > LARGEST_READING_CENTS:
            raise InputFileError(f"{where}: cents {reading:g} is outside the allowed range "
                                 f"-{LARGEST_READING_CENTS:g} to {LARGEST_READING_CENTS:g}")
        if not cell["note"]:
            raise InputFileError(f"{where}: the note is missing")
        if "state" in cell and cell["state"].lower() not in ("play", "rest"):
            raise InputFileError(f"{where}: state '{cell['state']}' is not allowed; use play or rest")
        times.append(minute)
        notes.append(cell["note"])
        values.append(reading)
        states.append(cell.get("state", "").lower())
    if len(times) < FEWEST_READINGS:
        raise InputFileError(f"{path}: {len(times)} readings are too few; the fit needs at least "
                             f"{FEWEST_READINGS} (a dozen or more over the warm-up is better)")
    return TunerLog(np.array(times) * 60.0, tuple(notes), np.array(values),
                    tuple(states) if "state" in header else None, str(path))


def _number(text: str, where: str, column: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise InputFileError(f"{where}: {column} '{text}' is not a number") from None
    if not math.isfinite(value):
        raise InputFileError(f"{where}: {column} '{text}' is not a finite number")
    return value


def log_plan(log: TunerLog, plan: Sequence[Phase] | None = None) -> tuple[Phase, ...]:
    """The play/rest plan of a log, starting cold at minute 0 and ending at its last reading.

    With ``plan``: that plan, checked to last until the last reading and, where the log has a
    state column, to agree with every reading's state (a time on a boundary belongs to the earlier
    phase). Without: from the state column, each change of state placed halfway between the two
    readings either side of it; without a state column, playing throughout.
    """
    end = float(log.times_s[-1])
    if plan:
        plan = tuple(plan)
        ends = np.cumsum([p.duration_s for p in plan])
        if ends[-1] < end - 1e-9:
            raise OutOfRangeError(f"the plan lasts {ends[-1] / 60:g} min, but the last reading of "
                                  f"{log.source} is at minute {end / 60:g}")
        if log.states is not None:
            for t, state in zip(log.times_s, log.states):
                phase = plan[min(int(np.searchsorted(ends, t - 1e-9)), len(plan) - 1)]
                if phase.state != state:
                    raise OutOfRangeError(f"{log.source}: the reading at minute {t / 60:g} says {state}, "
                                          f"but the plan has the instrument {phase.state}ing then")
        return plan
    if log.states is None:
        return (Phase("play", end),)
    phases, start = [], 0.0
    for i in range(1, len(log.states)):
        if log.states[i] != log.states[i - 1]:
            change = 0.5 * (log.times_s[i - 1] + log.times_s[i])
            phases.append(Phase(log.states[i - 1], change - start))
            start = change
    phases.append(Phase(log.states[-1], end - start))
    return tuple(phases)


@dataclass(frozen=True)
class PlayerFit:
    """A player fitted to a tuner log.

    Attributes
    ----------
    flow_m3_s, flow_sd_m3_s : float
        Mean breath flow into the bore while playing [m^3/s] and its standard uncertainty.
    breath_temperature_k, breath_temperature_sd_k : float
        Breath temperature where it enters the bore [K] and its standard uncertainty [K].
    heat_transfer_factor, heat_transfer_factor_sd : float
        Factor [-] on the bore's internal heat exchange and its standard uncertainty.
    offset_cents, offset_sd_cents : float
        Constant offset of every reading (the player's embouchure) [cent].
    rms_cents : float
        Root mean square of the residuals [cent].
    correlation : ndarray (4, 4)
        Correlation of the four fitted values (flow, breath temperature, factor, offset).
    times_s, notes, readings_cents, fitted_cents
        The readings and the fitted model at each [s], [cent].
    curve_times_s : ndarray (t,), curve_notes : tuple of str, curve_cents : ndarray (t, k)
        The fitted warm-up of every note read, as the tuner would show it [cent], over the plan.
    plan : tuple of Phase
    a4_hz : float
        The tuner's A4 [Hz].
    evaluations : int
        Model evaluations (thermal timeline and resonance search at every reading) the fit took.
    converged : bool
        Whether the least squares met its tolerances within :data:`MOST_TRIALS` trial points.
    at_bounds : tuple of str
        Fitted values that ended on a bound of :data:`BOUNDS` (their uncertainty then means little).
    instrument, climate, log : str
        Names for reports.
    """

    flow_m3_s: float
    flow_sd_m3_s: float
    breath_temperature_k: float
    breath_temperature_sd_k: float
    heat_transfer_factor: float
    heat_transfer_factor_sd: float
    offset_cents: float
    offset_sd_cents: float
    rms_cents: float
    correlation: np.ndarray
    times_s: np.ndarray
    notes: tuple[str, ...]
    readings_cents: np.ndarray
    fitted_cents: np.ndarray
    curve_times_s: np.ndarray
    curve_notes: tuple[str, ...]
    curve_cents: np.ndarray
    plan: tuple
    a4_hz: float
    evaluations: int
    converged: bool
    at_bounds: tuple[str, ...] = ()
    instrument: str = ""
    climate: str = ""
    log: str = ""


def _note_name(name: str, by_name: dict, instrument: str, source: str) -> str:
    """The instrument's name of a logged note: the same name, or the same pitch spelled otherwise
    (A#4 for Bb4); else InputFileError with a did-you-mean and the instrument's notes."""
    if name in by_name:
        return name
    try:
        midi = note_to_midi(name)
        return next(n for n in by_name if note_to_midi(n) == midi)
    except (ValueError, StopIteration):
        pass
    try:
        return choose(name, by_name, f"note for {instrument}", "Its notes")
    except InputFileError as error:
        raise InputFileError(f"{source}: {error}") from None


#: Names of the fitted values, in the order of the parameter vector.
FITTED = ("breath flow", "breath temperature", "heat-exchange factor")


class LogModel:
    """The readings of a tuner log as the model predicts them, without the embouchure offset
    [cent], as a function of u = (ln(flow / default flow), breath temperature [°C],
    ln(heat-exchange factor)); each evaluation is remembered.

    The thermal timeline runs on the whole instrument (its flow path averages over every
    fingering); the resonance search only on the notes read.
    """

    def __init__(self, instrument: Instrument, room: Room, log: TunerLog, plan: Sequence[Phase] | None = None,
                 player: Player = Player(), a4_hz: float | None = None, progress=None):
        self.instrument, self.room, self.log, self.player, self.progress = instrument, room, log, player, progress
        self.a4_hz = instrument.design.a4_hz if a4_hz is None else float(a4_hz)
        self.plan = log_plan(log, plan)
        by_name = {}
        for note in instrument.fingerings():
            if note.name is not None:
                by_name.setdefault(note.name, note)
        self.read = tuple(_note_name(name, by_name, instrument.name, log.source) for name in log.notes)
        self.notes = tuple(dict.fromkeys(self.read))
        self.sub = dataclasses.replace(instrument, notes=tuple(by_name[n] for n in self.notes))
        self.column = np.array([self.notes.index(n) for n in self.read])
        self.target_hz = np.array([float(equal_temperament_hz(n, self.a4_hz)) for n in self.notes])
        self.flow_ref = DEFAULT_BLOWING[instrument.excitation].flow_m3_s
        self.blowing = player.blowing(instrument.excitation)
        self.cache: dict = {}
        self.near_hz = None

    def start(self) -> np.ndarray:
        """u of the player given, within :data:`BOUNDS`."""
        return np.clip([math.log(self.blowing.flow_m3_s / self.flow_ref),
                        self.player.breath.temperature_k - ZERO_CELSIUS,
                        math.log(self.blowing.heat_transfer_factor)], BOUNDS[0], BOUNDS[1])

    def values(self, u) -> np.ndarray:
        """(flow [m^3/s], breath temperature [K], heat-exchange factor [-]) of u."""
        return np.array([self.flow_ref * math.exp(u[0]), u[1] + ZERO_CELSIUS, math.exp(u[2])])

    def trajectory(self, u) -> thermal.Trajectory:
        """The thermal timeline of the plan with the player values of u."""
        flow, breath_k, factor = self.values(u)
        blowing = dataclasses.replace(self.blowing, flow_m3_s=flow, heat_transfer_factor=factor)
        breath = dataclasses.replace(self.player.breath, temperature_k=breath_k)
        return thermal.instrument_trajectory(self.instrument, self.room, self.plan, breath, blowing)

    def __call__(self, u) -> np.ndarray:
        """1200 log2(f / f_ET) of every reading's note at its time [cent] (n,)."""
        u = np.asarray(u, dtype=float)
        key = u.tobytes()
        if key not in self.cache:
            path = self.trajectory(u)
            profiles = [path.state(float(t)).profile for t in self.log.times_s]
            if self.near_hz is None:   # the first state searched in full, every state tracked from it
                self.near_hz = pitch.frequencies_hz(self.sub, profiles[:1])[0]
            f = pitch.frequencies_hz(self.sub, profiles, self.near_hz)
            played = f[np.arange(len(self.read)), self.column]
            if not np.all(np.isfinite(played)):
                missing = sorted({n for n, v in zip(self.read, played) if not np.isfinite(v)})
                raise OutOfRangeError(f"{self.instrument.name}: no playing resonance found for "
                                      f"{', '.join(missing)}")
            self.cache[key] = cents(played, self.target_hz[self.column])
            if self.progress is not None:
                self.progress(1)
        return self.cache[key]

    def jacobian(self, u) -> np.ndarray:
        """d readings / d u (n, 3) by forward differences of :data:`STEPS` (backward at an upper
        bound)."""
        base = self(u)
        out = np.empty((base.size, 3))
        for i, h in enumerate(STEPS):
            step = h if u[i] + h <= BOUNDS[1][i] else -h
            shifted = np.array(u, dtype=float)
            shifted[i] += step
            out[:, i] = (self(shifted) - base) / step
        return out

    def curve(self, u, offset_cents: float) -> tuple[np.ndarray, np.ndarray]:
        """Times [s] over the plan and the readings a tuner would show of every note read there
        [cent] (t, k) for u (:func:`drift.warmup.plan_frequencies`)."""
        grid = sample_times(self.plan, max(5.0, plan_duration_s(self.plan) / 200.0))
        return grid, cents(plan_frequencies(self.sub, self.trajectory(u), grid), self.target_hz[None, :]) + offset_cents


def fit_player(instrument: Instrument, room: Room, log: TunerLog, plan: Sequence[Phase] | None = None,
               player: Player = Player(), a4_hz: float | None = None, progress=None,
               names: tuple[str, str] = ("", "")) -> PlayerFit:
    """Fit the player's breath flow, breath temperature and heat-exchange factor to a tuner log.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    room : drift.climate.Room
        The room the readings were taken in.
    log : TunerLog
    plan : sequence of Phase, optional
        What the instrument did from minute 0 (default: :func:`log_plan`).
    player : drift.climate.Player
        Where the fit starts (its breath temperature, flow and factor) and the breath's
        composition.
    a4_hz : float, optional
        The tuner's A4 [Hz] (default: the instrument's design A4).
    progress : callable, optional
        Called with 1 after every model evaluation.
    names : (str, str)
        Names of the climate and the log, for reports.

    Returns
    -------
    PlayerFit

    Notes
    -----
    A reading of note j at time t is modelled as y = 1200 log2(f_j(t; p) / f_ET,j) + c: f_j the
    playing frequency of the bore state at t of the thermal timeline with the player values p
    (:class:`drift.thermal.Trajectory`, :func:`drift.pitch.frequencies_hz`), f_ET,j = A4
    2^((m_j - 69)/12) (ISO 16:1975), c the embouchure offset. c enters linearly and is
    eliminated (the residuals are centred: variable projection, Golub & Pereyra 1973, SIAM J.
    Numer. Anal. 10, 413-432); p = (ln flow, breath temperature, ln factor) is found by
    :func:`scipy.optimize.least_squares` (trust-region reflective, within :data:`BOUNDS`) with a
    forward-difference Jacobian (:data:`STEPS`). The standard uncertainties are the square roots
    of the diagonal of s^2 (J^T J)^-1 with J the Jacobian of the four values at the solution and
    s^2 = sum(r^2) / (n - 4) (the linearised covariance of nonlinear least squares; Seber &
    Wild 1989, Nonlinear Regression, Wiley, Sec. 2.1.4).
    """
    from scipy.optimize import least_squares

    pitch.check_sounds(instrument)
    model = LogModel(instrument, room, log, plan, player, a4_hz, progress)

    def centred(a):
        return a - np.mean(a, axis=0)

    solution = least_squares(lambda u: centred(model(u) - log.cents), model.start(),
                             jac=lambda u: centred(model.jacobian(u)), bounds=BOUNDS, x_scale=X_SCALE,
                             method="trf", ftol=1e-4, xtol=1e-4, gtol=1e-8, max_nfev=MOST_TRIALS)
    u = solution.x
    fitted = model(u)
    offset = float(np.mean(log.cents - fitted))
    residual = fitted + offset - log.cents
    n = residual.size
    flow, breath_k, factor = model.values(u)
    # The Jacobian in the values themselves (chain rule through the logarithms), and the offset.
    j = model.jacobian(u) / np.array([flow, 1.0, factor])
    j = np.column_stack([j, np.ones(n)])
    s2 = float(residual @ residual) / (n - 4)
    try:
        covariance = s2 * np.linalg.inv(j.T @ j)
    except np.linalg.LinAlgError:
        covariance = np.full((4, 4), np.inf)
    sd = np.sqrt(np.abs(np.diag(covariance)))
    with np.errstate(invalid="ignore", divide="ignore"):
        correlation = covariance / np.outer(sd, sd)
    at_bounds = tuple(name for name, x, low, high in zip(FITTED, u, *BOUNDS)
                      if min(x - low, high - x) < 1e-3 * (high - low))

    grid, curve = model.curve(u, offset)
    return PlayerFit(flow, float(sd[0]), breath_k, float(sd[1]), factor, float(sd[2]), offset, float(sd[3]),
                     float(np.sqrt(np.mean(residual ** 2))), correlation, log.times_s.copy(), model.read,
                     log.cents.copy(), fitted + offset, grid, model.notes, curve, model.plan, model.a4_hz,
                     len(model.cache),
                     bool(solution.status > 0), at_bounds, instrument.name, names[0], names[1] or log.source)

