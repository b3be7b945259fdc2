"""An instrument cut into segments: short cones for the acoustics, wall shells for the heat balance.

:func:`discretise` cuts the bore into acoustic segments (split at every station and hole) for the
transfer-matrix model of :mod:`drift.acoustics`; :meth:`Segments.expanded` and
:func:`expanded_segments` apply the thermal expansion of the wall from the temperature the
dimensions are given at. :func:`instrument_wall` cuts the same bore into the wall segments of
the heat balance (:mod:`drift.thermal`), with the share of the breath flow that passes each.
SI units throughout.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from drift import acoustics
from drift.constants import SEGMENT_LENGTH_M
from drift.errors import OutOfRangeError
from drift.instrument import DEFAULT_REFERENCE_TEMPERATURE, Instrument, Note
from drift.materials import Material
from drift.valves import SLIDE_LEGS


# --------------------------------------------------------------------------------------------
# Acoustic segments
# --------------------------------------------------------------------------------------------

#: Shortest piece of bore cut as a segment of its own [m] (a nanometre, far below any drawing's
#: precision): shorter pieces are merged with their neighbour (see :func:`discretise`).
MIN_CUT_M = 1e-9


@dataclass(frozen=True)
class Segments:
    """The bore as a chain of conical (or cylindrical) segments, from the input end outwards.

    Attributes
    ----------
    start_m, length_m : ndarray (n,) [m]
        Start position (from the input end; negative for a lip mouthpiece's throat and backbore)
        and length of each segment.
    radius_in_m, radius_out_m : ndarray (n,) [m]
        Radius at the segment's start and end.
    n_cavity : int
        For jet excitation, the first ``n_cavity`` segments form the closed cavity between the
        stopped end (position 0) and the embouchure; the input point is the start of segment
        ``n_cavity``. 0 otherwise.
    hole_segment : ndarray (h,) of int
        Each hole sits at the start of this segment.
    hole_radius_m, hole_chimney_m, hole_bore_radius_m : ndarray (h,) [m]
        Hole radius, chimney height and main-bore radius at the hole.
    hole_position_m : ndarray (h,) [m]
    excitation : str
    added_volume_m3 : float
        Geometric volume in parallel at the input [m^3] (a reed mouthpiece's cavity or missing
        cone tip, or the lip cup); it expands with the bore.
    reed_compliance_m3_pa : float
        The reed's compliance in parallel at the input [m^3/Pa] (:class:`drift.instrument.InputEnd`).
    embouchure_radius_m, embouchure_chimney_m : float [m]
    embouchure_outer_correction_m : float [m]
        The embouchure's outer end correction, as a length of the hole (lip cover included).
    """

    start_m: np.ndarray
    length_m: np.ndarray
    radius_in_m: np.ndarray
    radius_out_m: np.ndarray
    n_cavity: int
    hole_segment: np.ndarray
    hole_radius_m: np.ndarray
    hole_chimney_m: np.ndarray
    hole_bore_radius_m: np.ndarray
    hole_position_m: np.ndarray
    excitation: str
    added_volume_m3: float = 0.0
    reed_compliance_m3_pa: float = 0.0
    embouchure_radius_m: float = 0.0
    embouchure_chimney_m: float = 0.0
    embouchure_outer_correction_m: float = 0.0

    @property
    def midpoints_m(self) -> np.ndarray:
        """Segment midpoints [m]."""
        return self.start_m + 0.5 * self.length_m

    @property
    def n(self) -> int:
        return len(self.length_m)

    def expanded(self, segment_axial, segment_radial, hole_radial) -> "Segments":
        """The segments with every dimension scaled by thermal expansion factors.

        Each segment's length scales by ``segment_axial`` (n,) and its radii by
        ``segment_radial`` (n,); positions follow as cumulative sums from the first start. Each
        hole's radius and chimney scale by ``hole_radial`` (h,) (a hole's position follows its
        segment). Factors are 1 + alpha (T - T_ref),
        see :func:`expansion_factors`.
        """
        ax = np.asarray(segment_axial, dtype=float)
        rad = np.asarray(segment_radial, dtype=float)
        length = self.length_m * ax
        start = self.start_m[0] * ax[0] + np.concatenate([[0.0], np.cumsum(length)[:-1]])
        hr = np.asarray(hole_radial, dtype=float)
        seg = self.hole_segment
        return dataclasses.replace(
            self,
            start_m=start,
            length_m=length,
            radius_in_m=self.radius_in_m * rad,
            radius_out_m=self.radius_out_m * rad,
            hole_radius_m=self.hole_radius_m * hr,
            hole_chimney_m=self.hole_chimney_m * hr,
            hole_bore_radius_m=self.hole_bore_radius_m * (rad[seg] if len(seg) else 1.0),
            hole_position_m=start[seg] if len(seg) else self.hole_position_m,
            added_volume_m3=self.added_volume_m3 * float(rad[self.n_cavity]) ** 3,
            embouchure_radius_m=self.embouchure_radius_m * float(rad[self.n_cavity]),
            embouchure_chimney_m=self.embouchure_chimney_m * float(rad[self.n_cavity]),
            embouchure_outer_correction_m=self.embouchure_outer_correction_m * float(rad[self.n_cavity]),
        )


def expansion_factors(wall_temperature_k, expansion_per_k: float,
                      reference_temperature_k: float = DEFAULT_REFERENCE_TEMPERATURE):
    """Linear thermal expansion factors 1 + alpha (T_wall - T_ref) [-].

    Parameters
    ----------
    wall_temperature_k : array_like
        Wall temperature [K], for example one value per segment.
    expansion_per_k : float
        Linear expansion coefficient of the wall material [1/K].
    reference_temperature_k : float
        Temperature the dimensions are given at [K].

    Notes
    -----
    The linear (first-order) law L(T) = L_ref (1 + alpha (T - T_ref)), valid for |alpha dT| << 1
    (any physics text, e.g. Incropera et al. 2007, Sec. 1; common practice).
    """
    return 1.0 + expansion_per_k * (np.asarray(wall_temperature_k, dtype=float) - reference_temperature_k)


def discretise(instrument: Instrument, max_segment_m: float = SEGMENT_LENGTH_M) -> Segments:
    """Cut the bore into segments, split at every station, hole and the embouchure.

    Between stations the bore is a cone (radius linear in position); each piece between two
    split points is cut into equal segments no longer than ``max_segment_m`` [m], so a
    temperature or composition profile along the bore can be followed segment by segment. For
    lips, a throat cylinder and a backbore cone are put before position 0.
    """
    if not max_segment_m > 0:
        raise ValueError("max_segment_m must be positive")
    st = instrument.stations_m
    x, r = st[:, 0], st[:, 1] / 2.0
    cuts = set(float(v) for v in x)
    cuts.update(h.position_m for h in instrument.holes)
    inp = instrument.input_end
    if instrument.excitation == "jet":
        cuts.add(inp.embouchure_position_m)
    edges = np.array(sorted(cuts))
    # split points closer than MIN_CUT_M (a station or hole 1e-300 mm from another) would make
    # segments whose cone matrices underflow: the nearer one gives way
    edges = np.append(edges[:-1][np.diff(edges) > MIN_CUT_M], edges[-1])
    points = [edges[0]]
    for a, b in zip(edges[:-1], edges[1:]):
        n = max(1, math.ceil((b - a) / max_segment_m - 1e-9))
        points.extend(np.linspace(a, b, n + 1)[1:])
    points = np.asarray(points)
    radius = np.interp(points, x, r)
    start, length = points[:-1], np.diff(points)
    r_in, r_out = radius[:-1], radius[1:]
    if instrument.excitation == "lips":
        r0 = r[0]
        rt = inp.throat_diameter_m / 2.0
        lt, lb = inp.throat_length_m, inp.backbore_length_m
        pre_start, pre_len, pre_in, pre_out = [], [], [], []
        if lt > 0:
            pre_start.append(-(lt + lb)); pre_len.append(lt); pre_in.append(rt); pre_out.append(rt)
        if lb > MIN_CUT_M:
            nb = max(1, math.ceil(lb / max_segment_m - 1e-9))
            xb = np.linspace(-lb, 0.0, nb + 1)
            rb = rt + (r0 - rt) * (xb + lb) / lb
            pre_start.extend(xb[:-1]); pre_len.extend(np.diff(xb)); pre_in.extend(rb[:-1]); pre_out.extend(rb[1:])
        start = np.concatenate([pre_start, start])
        length = np.concatenate([pre_len, length])
        r_in = np.concatenate([pre_in, r_in])
        r_out = np.concatenate([pre_out, r_out])
    n_cavity, outer = 0, 0.0
    if instrument.excitation == "jet":
        n_cavity = int(np.searchsorted(start, inp.embouchure_position_m - 1e-12))
        outer = inp.embouchure_outer_correction_m
        if outer is None:
            outer = float(acoustics.embouchure_outer_correction(
                inp.embouchure_diameter_m / 2, float(np.asarray(r_in)[n_cavity]), inp.embouchure_chimney_m, inp.lip_cover))
    hole_segment = np.array([int(np.argmin(np.abs(start - h.position_m))) for h in instrument.holes],
                            dtype=int)
    holes = instrument.holes
    return Segments(
        start_m=np.asarray(start, dtype=float),
        length_m=np.asarray(length, dtype=float),
        radius_in_m=np.asarray(r_in, dtype=float),
        radius_out_m=np.asarray(r_out, dtype=float),
        n_cavity=n_cavity,
        hole_segment=hole_segment,
        hole_radius_m=np.array([h.diameter_m / 2 for h in holes], dtype=float),
        hole_chimney_m=np.array([h.chimney_m for h in holes], dtype=float),
        hole_bore_radius_m=np.asarray(r_in, dtype=float)[hole_segment] if len(holes) else np.zeros(0),
        hole_position_m=np.array([h.position_m for h in holes], dtype=float),
        excitation=instrument.excitation,
        added_volume_m3=inp.added_volume_m3,
        reed_compliance_m3_pa=inp.reed_compliance_m3_pa,
        embouchure_radius_m=inp.embouchure_diameter_m / 2,
        embouchure_chimney_m=inp.embouchure_chimney_m,
        embouchure_outer_correction_m=outer,
    )


def expanded_segments(instrument: Instrument, wall_temperature_at,
                      max_segment_m: float = SEGMENT_LENGTH_M) -> Segments:
    """The acoustic segments of an instrument, expanded by the temperature of its wall.

    Parameters
    ----------
    instrument : Instrument
    wall_temperature_at : callable or None
        Wall temperature [K] at positions [m] (for example
        :meth:`drift.bore_state.BoreProfile.wall_temperature_at`); None: no expansion.
    max_segment_m : float
        Longest segment [m].

    Notes
    -----
    Every segment's length scales with the axial coefficient of the wall material and its radii
    with the across-grain coefficient, each at the wall temperature at its midpoint; each hole's
    radius and chimney with the across-grain coefficient at its position
    (:func:`expansion_factors`, from the instrument's reference temperature). Without a material
    in the file the bore is not expanded.
    """
    segs = discretise(instrument, max_segment_m)
    if wall_temperature_at is None or instrument.material is None:
        return segs
    m = instrument.wall_material
    t_ref = instrument.reference_temperature_k
    t_seg = wall_temperature_at(np.clip(segs.midpoints_m, 0.0, None))
    t_hole = wall_temperature_at(segs.hole_position_m)
    return segs.expanded(expansion_factors(t_seg, m.expansion_per_k, t_ref),
                         expansion_factors(t_seg, m.expansion_across_per_k, t_ref),
                         expansion_factors(t_hole, m.expansion_across_per_k, t_ref))


# --------------------------------------------------------------------------------------------
# The played path: the bore with the loops of the valves pressed and the slide's extension
# --------------------------------------------------------------------------------------------

#: Length of the short cone that stands for a step in diameter where a valve loop of another
#: diameter meets the bore [m] (station positions must increase strictly).
LOOP_STEP_M = 0.2e-3


@dataclass(frozen=True)
class PlayedPath:
    """The air path a note plays on, and where each point of it lies on the bore without loops.

    Attributes
    ----------
    instrument : Instrument
        The bore with the loops inserted (no valves, no slide, no notes): what the acoustics sees.
    inserts : tuple of (float, float, str or None)
        (position on the bore without loops [m], length inserted [m], the valve's name or None for
        the slide's extension) of each loop or extension, in the order they lie along the path.
    """

    instrument: Instrument
    inserts: tuple[tuple[float, float, str | None], ...]

    def locate(self, positions_m) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Where positions [m] on the path lie: their position on the bore without loops (a point
        inside an insert maps to the insert's position, a point beyond it moves back by its
        length), the index of the insert holding each point (-1: none) and the distance from that
        insert's start [m] (0 outside inserts)."""
        x = np.asarray(positions_m, dtype=float)
        out, inside, along = x.copy(), np.full(x.shape, -1), np.zeros(x.shape)
        offset = 0.0
        for k, (p, length, _) in enumerate(self.inserts):
            s = p + offset
            here = (x > s) & (x < s + length)
            out = np.where(here, p, np.where(x >= s + length, out - length, out))
            inside = np.where(here, k, inside)
            along = np.where(here, x - s, along)
            offset += length
        return out, inside, along


def played_path(instrument: Instrument, note: Note) -> PlayedPath:
    """The bore a note plays on: the loops of the valves it presses inserted at their positions,
    and the slide's extension (a cylinder of the bore diameter there, :data:`SLIDE_LEGS` times the
    travel long; :meth:`drift.instrument.Instrument.with_length_change`).

    A loop is drawn by its own stations; where its diameter differs from the bore's at the valve,
    a cone :data:`LOOP_STEP_M` long at each end stands for the step. Holes, the tuning joint and
    everything beyond an insert move down the bore by its length.
    """
    pressed = [v for v in instrument.valves if v.name in note.valves]
    base = dataclasses.replace(instrument, valves=(), slide=None, notes=())
    inserts = [(v.position_m, v) for v in pressed]
    if instrument.slide is not None and note.slide_m > 0:
        inserts.append((instrument.slide.position_m, SLIDE_LEGS * note.slide_m))
    path, placed = base, []
    # Farthest first, so the positions of the others hold; of two at one position, the one
    # inserted later comes first along the path.
    for order, (p, what) in enumerate(sorted(inserts, key=lambda item: -item[0])):
        before = path.length_m
        path = path.with_length_change(p, what) if isinstance(what, float) else _insert_loop(path, p, what)
        placed.append((p, -order, path.length_m - before, None if isinstance(what, float) else what.name))
    return PlayedPath(path, tuple((p, length, name) for p, _, length, name in sorted(placed)))


def _insert_loop(instrument: Instrument, position_m: float, valve) -> Instrument:
    """The instrument with a valve's loop inserted at ``position_m`` [m]."""
    loop = np.array(valve.loop_stations_m, dtype=float)
    d_joint = float(instrument.diameter_at(position_m))
    pieces = [(position_m, d_joint)]
    if abs(loop[0, 1] - d_joint) > 1e-9:
        loop[0, 0] = LOOP_STEP_M
    pieces += [(position_m + x, d) for x, d in loop if x > 0 or abs(d - d_joint) > 1e-9]
    end = pieces[-1][0]
    if abs(loop[-1, 1] - d_joint) > 1e-9:
        end += LOOP_STEP_M
        pieces.append((end, d_joint))
    grown = instrument.with_length_change(position_m, end - position_m)
    x = grown.stations_m
    keep = (x[:, 0] < position_m - 1e-12) | (x[:, 0] > end + 1e-12)
    stations = np.concatenate([x[keep & (x[:, 0] < position_m)], pieces, x[keep & (x[:, 0] > end)]])
    return dataclasses.replace(grown, stations_m=stations)


# --------------------------------------------------------------------------------------------
# Wall segments and the breath flow through them
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Wall:
    """The bore cut into segments, each with its wall: what the thermal model works on.

    Attributes
    ----------
    positions_m : ndarray (n,)
        Segment centres from the input end [m], ascending.
    lengths_m : ndarray (n,)
        Segment lengths [m]; segment i spans positions_m[i] -/+ lengths_m[i]/2, without gaps.
    inner_radius_m : ndarray (n,)
        Bore radius [m].
    thickness_m : ndarray (n,)
        Wall thickness [m].
    material : Material
    flow_fraction : ndarray (n,)
        Share [0-1] of the mean breath flow passing through each segment while playing, averaged
        over the notes played (1 down to the first open hole of each note, 0 below it). The flow
        enters at the first segment with a share above 0 (segments before it, such as the cavity
        between a flute's stopped end and its embouchure, see no through-flow) and the share does
        not grow from there on.
    branches : tuple of Branch
        Valve loops beside the bore (their own walls), fed by the air at their valve.
    """

    positions_m: np.ndarray
    lengths_m: np.ndarray
    inner_radius_m: np.ndarray
    thickness_m: np.ndarray
    material: Material
    flow_fraction: np.ndarray
    branches: tuple["Branch", ...] = ()

    def __post_init__(self):
        n = np.size(self.positions_m)
        for name in ("lengths_m", "inner_radius_m", "thickness_m", "flow_fraction"):
            value = np.asarray(getattr(self, name), dtype=float)
            if value.shape != (n,):
                raise OutOfRangeError(f"wall {name} must have one value per segment ({n})")
            if not np.all(np.isfinite(value)):
                raise OutOfRangeError(f"wall {name} must be finite")
        if n == 0:
            raise OutOfRangeError("a wall needs at least one segment")
        for name in ("lengths_m", "inner_radius_m", "thickness_m"):
            if np.any(np.asarray(getattr(self, name)) <= 0.0):
                raise OutOfRangeError(f"wall {name.replace('_', ' ')} must be positive")
        w = np.asarray(self.flow_fraction, dtype=float)
        first = int(np.argmax(w > 0.0)) if np.any(w > 0.0) else n
        if np.any(w < 0.0) or np.any(w > 1.0) or np.any(np.diff(w[first:]) > 1e-12):
            raise OutOfRangeError(
                "wall flow fraction must lie in [0, 1] and, from where the flow enters, not grow along the bore")

    def shells(self, layers: int) -> "Shells":
        """The wall of every segment cut into ``layers`` concentric layers of equal thickness:
        heat capacities and conductances (:class:`Shells`).

        Radial conduction between layer centres and to the two surfaces through cylindrical
        shells, R = ln(r2/r1) / (2 pi k L) (Incropera et al. 2007, Eq. 3.27), with the
        across-grain conductivity; axial conduction between neighbouring segments, layer by
        layer, with the axial one.
        """
        n, m = self.positions_m.size, int(layers)
        mat = self.material
        a = self.inner_radius_m
        b = a + self.thickness_m
        dx = self.lengths_m
        radii = a[:, None] + (b - a)[:, None] * np.linspace(0.0, 1.0, m + 1)[None, :]
        mid = 0.5 * (radii[:, :-1] + radii[:, 1:])
        area = np.pi * (radii[:, 1:] ** 2 - radii[:, :-1] ** 2)
        two_pi_k = 2.0 * np.pi * mat.conductivity_across * dx
        if n > 1:
            span = 0.5 * (dx[:-1] + dx[1:])
            axial = mat.conductivity * 0.5 * (area[:-1] + area[1:]) / span[:, None]
        else:
            axial = np.zeros((0, m))
        return Shells(
            capacity_j_k=mat.volumetric_heat_capacity * area * dx[:, None],
            radial_w_k=two_pi_k[:, None] / np.log(mid[:, 1:] / mid[:, :-1]) if m > 1 else np.zeros((n, 0)),
            axial_w_k=axial,
            inner_k_w=np.log(mid[:, 0] / a) / two_pi_k,
            outer_k_w=np.log(b / mid[:, -1]) / two_pi_k,
            outer_area_m2=2.0 * np.pi * b * dx,
            outer_diameter_m=2.0 * b,
        )

    @property
    def edges_m(self) -> np.ndarray:
        """Segment boundaries [m], (n + 1,)."""
        start = self.positions_m[0] - 0.5 * self.lengths_m[0]
        return start + np.concatenate([[0.0], np.cumsum(self.lengths_m)])


@dataclass(frozen=True)
class Branch:
    """A valve loop beside the bore, for the heat balance: its wall, and where its air comes from.

    Attributes
    ----------
    name : str
        The valve's name.
    position_m : float
        The valve's position on the bore without loops [m]: the loop takes in the air flowing
        there.
    wall : Wall
        The loop's segments, positions from the loop's start [m]; its ``flow_fraction`` is the
        share of the breath flow that passes the loop, averaged over the notes played (the share
        of notes that press the valve; 0: a loop never played, which stays at room temperature).
    """

    name: str
    position_m: float
    wall: Wall


@dataclass(frozen=True)
class Shells:
    """The wall layers of every segment (:meth:`Wall.shells`), n segments by m layers.

    Attributes
    ----------
    capacity_j_k : ndarray (n, m)
        Heat capacity of each layer [J/K].
    radial_w_k : ndarray (n, m - 1)
        Conductance between neighbouring layers' centres [W/K].
    axial_w_k : ndarray (n - 1, m)
        Conductance along the bore between neighbouring segments' layers [W/K].
    inner_k_w, outer_k_w : ndarray (n,)
        Resistance from the inner surface to the first layer's centre, and from the last layer's
        centre to the outer surface [K/W].
    outer_area_m2, outer_diameter_m : ndarray (n,)
        Outer surface [m^2] and outer diameter [m].
    """

    capacity_j_k: np.ndarray
    radial_w_k: np.ndarray
    axial_w_k: np.ndarray
    inner_k_w: np.ndarray
    outer_k_w: np.ndarray
    outer_area_m2: np.ndarray
    outer_diameter_m: np.ndarray


def flow_fraction_from_exits(positions_m, exits_m) -> np.ndarray:
    """Share of the breath flow reaching each position [0-1], averaged over notes.

    While a note sounds, the mean flow leaves the bore at its first open tone hole (or the open
    end): ``exits_m`` holds that position [m] for each note. Notes are weighted equally
    (assumption: a uniform use of the range). w(x) = (number of exits beyond x) / (number of notes).
    """
    x = np.asarray(positions_m, dtype=float)
    exits = np.atleast_1d(np.asarray(exits_m, dtype=float))
    if exits.size == 0:
        return np.ones_like(x)
    return np.mean(exits[None, :] > x[:, None], axis=1)


def wall_from_stations(stations_m, thickness_m, material: Material, segment_length_m=SEGMENT_LENGTH_M,
                       flow_fraction=None) -> Wall:
    """Cut a bore given by stations into segments of at most ``segment_length_m`` [m].

    Parameters
    ----------
    stations_m : array_like (k, 2)
        [position from the input end, inner diameter] [m], positions ascending; the bore is
        conical (linear in diameter) between stations.
    thickness_m : float or callable
        Wall thickness [m], or a function of position [m] returning it.
    material : Material
    segment_length_m : float
        Largest segment length [m].
    flow_fraction : None, callable or array_like
        Share of the flow reaching each segment: None = 1 everywhere; a callable of the segment
        centres [m]; or an array (n,) for the segments made.
    """
    st = np.asarray(stations_m, dtype=float)
    if st.ndim != 2 or st.shape[1] != 2 or st.shape[0] < 2:
        raise OutOfRangeError("bore stations must be pairs [position, diameter], at least two")
    if np.any(np.diff(st[:, 0]) < 0.0) or st[-1, 0] <= st[0, 0]:
        raise OutOfRangeError("bore station positions must ascend")
    total = st[-1, 0] - st[0, 0]
    n = max(1, int(math.ceil(total / segment_length_m - 1e-9)))
    edges = np.linspace(st[0, 0], st[-1, 0], n + 1)
    centres = 0.5 * (edges[:-1] + edges[1:])
    # Mean radius of a segment: the radius of equal volume of the conical pieces, sampled finely.
    fine = np.linspace(0.0, 1.0, 9)
    xs = edges[:-1, None] + np.diff(edges)[:, None] * fine[None, :]
    d = np.interp(xs, st[:, 0], st[:, 1])
    radius = 0.5 * np.sqrt(np.trapezoid(d**2, fine, axis=1))
    thickness = thickness_m(centres) if callable(thickness_m) else np.full(n, float(thickness_m))
    if flow_fraction is None:
        w = np.ones(n)
    elif callable(flow_fraction):
        w = np.asarray(flow_fraction(centres), dtype=float)
    else:
        w = np.asarray(flow_fraction, dtype=float)
    return Wall(centres, np.diff(edges), radius, np.asarray(thickness, dtype=float), material, w)


#: An open side hole lets the mean flow out when its diameter is at least this share of the bore
#: diameter there (estimate: a small register, octave or vent hole has a flow resistance many times
#: that of the bore below it, so the flow passes it by).
EXIT_HOLE_RATIO = 0.4


def flow_exits(instrument: Instrument) -> np.ndarray:
    """Where the mean flow leaves the bore [m], one position per fingering of ``instrument``.

    The first open side hole at least :data:`EXIT_HOLE_RATIO` of the local bore diameter wide,
    counted from the input end (for a jet, beyond the embouchure); the open end when there is none.
    """
    holes = instrument.holes
    length = instrument.length_m
    notes = instrument.fingerings()
    if not holes:
        return np.full(len(notes), length)
    pos = np.array([h.position_m for h in holes])
    dia = np.array([h.diameter_m for h in holes])
    big = dia >= EXIT_HOLE_RATIO * instrument.diameter_at(pos)
    mask = instrument.open_mask(notes) & big[None, :]
    candidates = np.where(mask, pos[None, :], np.inf)
    first = candidates.min(axis=1)
    return np.where(np.isfinite(first), first, length)


def instrument_wall(instrument: Instrument, segment_length_m: float = SEGMENT_LENGTH_M) -> Wall:
    """The :class:`Wall` of an instrument: its bore stations cut into segments, its wall thickness
    (``instrument.wall_thickness_m``) and material (``instrument.wall_material``), and the share of
    the flow reaching each segment averaged over its fingerings (:func:`flow_exits`,
    :func:`flow_fraction_from_exits`). For a jet the flow enters at the embouchure; the cavity
    between the stopped end and the embouchure sees none. Each valve's loop is a :class:`Branch`
    with the wall thickness at its valve and the share of fingerings that press it and blow past
    it (notes weighted equally, as for the exits)."""
    exits = flow_exits(instrument)
    inlet = instrument.input_end.embouchure_position_m if instrument.excitation == "jet" else -math.inf

    def share(x):
        return np.where(x >= inlet, flow_fraction_from_exits(x, exits), 0.0)

    thickness, material = instrument.wall_thickness_m, instrument.wall_material
    notes = instrument.fingerings()
    branches = []
    for v in instrument.valves:
        used = float(np.mean([v.name in n.valves and e > v.position_m for n, e in zip(notes, exits)])) \
            if notes else 0.0
        loop = wall_from_stations(np.array(v.loop_stations_m), thickness, material, segment_length_m,
                                  lambda x, used=used: np.full(np.shape(x), used))
        branches.append(Branch(v.name, v.position_m, loop))
    wall = wall_from_stations(instrument.stations_m, thickness, material, segment_length_m, share)
    return dataclasses.replace(wall, branches=tuple(branches))
