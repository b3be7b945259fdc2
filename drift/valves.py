"""Valves and slides of brass instruments, and the bore stations they and the bore are drawn with.

A valve, pressed, puts its loop of tubing into the air path at its position; a slide lengthens the
path continuously by twice its travel. :class:`Valve` and :class:`Slide` hold them (SI units);
the ``parse_*`` functions read their tables of an instrument file (docs/formats.md) and check
them, naming the file and key. The played path of a note is built in :mod:`drift.segments`
(:func:`drift.segments.played_path`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from drift.files import Table, short_repr

VALVE_KEYS = ("name", "position_mm", "stations_mm")
SLIDE_KEYS = ("position_mm", "positions_mm", "max_travel_mm")

#: A slide's air path grows by twice its travel: the tube runs out along one leg and back along
#: the other (common practice).
SLIDE_LEGS = 2
#: Largest slide travel accepted [m].
MAX_SLIDE_TRAVEL = 1.0


@dataclass(frozen=True)
class Valve:
    """A valve: pressed, it puts its loop of tubing into the air path at ``position_m``.

    Attributes: name, position_m [m] from the input end (along the bore without loops),
    loop_stations_m: ((position along the loop, inner diameter), ...) [m], from 0 to the loop's
    length, conical between stations.
    """

    name: str
    position_m: float
    loop_stations_m: tuple[tuple[float, float], ...]

    @property
    def loop_length_m(self) -> float:
        return self.loop_stations_m[-1][0]


@dataclass(frozen=True)
class Slide:
    """A slide at ``position_m`` [m]: moved out by a travel t, it adds a cylinder of the bore's
    diameter there, :data:`SLIDE_LEGS` t long. ``positions_m`` are the travels [m] of the numbered
    positions (first 0: the slide closed); ``max_travel_m`` [m] the longest travel."""

    position_m: float
    positions_m: tuple[float, ...]
    max_travel_m: float


def parse_valves(top: Table, stations: np.ndarray, holes) -> list[Valve]:
    """The ``[[valve]]`` tables: unique names, positions inside the bore and off the holes, loops
    drawn by stations like the bore's."""
    valves = []
    length = stations[-1, 0] * 1e3
    for t in top.tables("valve", VALVE_KEYS):
        name = t.string("name", required=True)
        if name in [v.name for v in valves]:
            t.fail("name", f"= '{name}' is used by another valve; valve names must be unique")
        pos = t.number("position_mm", required=True, low=0.0, high=length, unit="mm")
        if not 1e-6 < pos < length - 1e-6:
            t.fail("position_mm", f"= {pos:g} must lie inside the bore (0 to {length:g} mm, ends excluded)")
        for h in holes:
            if abs(h.position_m - pos * 1e-3) < h.diameter_m / 2:
                t.fail("position_mm", f"= {pos:g} lies within hole {h.name}")
        loop = parse_stations(t)
        valves.append(Valve(name, pos * 1e-3, tuple((float(x), float(d)) for x, d in loop)))
    return valves


def parse_slide(top: Table, stations: np.ndarray) -> Slide | None:
    """The ``[slide]`` table, or None."""
    if not top.has("slide"):
        return None
    t = top.table("slide", SLIDE_KEYS)
    length = stations[-1, 0] * 1e3
    pos = t.number("position_mm", required=True, low=0.0, high=length, unit="mm")
    if not 1e-6 < pos < length - 1e-6:
        t.fail("position_mm", f"= {pos:g} must lie inside the bore (0 to {length:g} mm, ends excluded)")
    top_travel = t.number("max_travel_mm", required=True, low=1.0, high=MAX_SLIDE_TRAVEL * 1e3, unit="mm")
    raw = t.data.get("positions_mm", [0.0])
    if not isinstance(raw, list) or not raw:
        t.fail("positions_mm", "must be a list of travels [mm], the first 0 (the slide closed)")
    travel = [t.check_number(f"positions_mm entry {i + 1}", v, 0.0, top_travel, "mm (at most max_travel_mm)")
              for i, v in enumerate(raw)]
    if travel[0] != 0.0 or np.any(np.diff(travel) <= 0):
        t.fail("positions_mm", "must start at 0 (the slide closed) and increase strictly")
    return Slide(pos * 1e-3, tuple(x * 1e-3 for x in travel), top_travel * 1e-3)


def parse_note_path(t: Table, valves, slide) -> tuple[tuple[str, ...], float]:
    """The valves a ``[[note]]`` presses and its slide travel [m], checked."""
    pressed = t.names("valves", [v.name for v in valves], "valve")
    travel = 0.0
    if t.has("slide_position") or t.has("slide_mm"):
        if slide is None:
            t.fail("slide_position" if t.has("slide_position") else "slide_mm", "needs a [slide] table")
        if t.has("slide_position") and t.has("slide_mm"):
            t.fail("slide_mm", "and slide_position both set the slide: give one of them")
        if t.has("slide_position"):
            n = t.data["slide_position"]
            count = len(slide.positions_m)
            if isinstance(n, bool) or not isinstance(n, int) or not 1 <= n <= count:
                t.fail("slide_position", f"= {short_repr(n)} must be a whole number from 1 to {count} "
                       "(the [slide] positions_mm)")
            travel = slide.positions_m[n - 1]
        else:
            travel = t.number("slide_mm", low=0.0, high=slide.max_travel_m * 1e3,
                              unit="mm (at most [slide] max_travel_mm)") * 1e-3
    return tuple(pressed), travel


def parse_stations(bore: Table) -> np.ndarray:
    """The ``stations_mm`` of a table (the bore, or a valve's loop) as an (n, 2) array of
    [position, diameter] [m]: at least two pairs, from position 0, positions strictly increasing."""
    raw = bore.data.get("stations_mm")
    if raw is None:
        bore.fail("stations_mm", "is missing (a list of [position_mm, diameter_mm] pairs is required)")
    if not isinstance(raw, list) or len(raw) < 2:
        bore.fail("stations_mm", "must list at least two [position_mm, diameter_mm] pairs")
    out = []
    for i, pair in enumerate(raw):
        if not isinstance(pair, list) or len(pair) != 2:
            bore.fail("stations_mm", f"entry {i + 1} must be a pair [position_mm, diameter_mm]")
        x = bore.check_number(f"stations_mm entry {i + 1} position", pair[0], 0.0, 10000.0, "mm")
        dia = bore.check_number(f"stations_mm entry {i + 1} diameter", pair[1], 0.5, 500.0, "mm")
        out.append((x * 1e-3, dia * 1e-3))
    out = np.array(out)
    if out[0, 0] != 0.0:
        bore.fail("stations_mm", f"must start at position 0 (the input end, or a loop's start), "
                                 f"not {out[0, 0] * 1e3:g} mm")
    if np.any(np.diff(out[:, 0]) <= 0):
        i = int(np.argmax(np.diff(out[:, 0]) <= 0)) + 2
        bore.fail("stations_mm", f"positions must increase strictly (entry {i})")
    return out
