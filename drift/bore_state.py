"""The state of the air and wall along a bore: what the thermal model hands to the acoustics.

A :class:`BoreProfile` samples the air temperature, the breath fraction and the wall temperature
at positions along the bore; :mod:`drift.thermal` makes them (at rest: uniform room air; played:
the heat balance), :mod:`drift.pitch` reads the gas at its segments through :meth:`BoreProfile.air_at`
and the wall temperature through :meth:`BoreProfile.wall_temperature_at`. SI units.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, fields

import numpy as np

from drift import air
from drift.climate import DEFAULT_BREATH, Breath, Room


@dataclass(frozen=True)
class BoreProfile:
    """Air temperature, breath fraction and wall temperature sampled along a bore.

    This is what the thermal layer hands to the acoustics layer. Values between samples are
    interpolated linearly, and held constant beyond the first and last sample.

    Attributes
    ----------
    room : Room
    positions_m : ndarray (n,) [m] from the input end, ascending
    temperature_k : ndarray (n,) air temperature [K]
    breath_fraction : ndarray (n,) [0-1], mole fraction of breath in the bore air
    wall_temperature_k : ndarray (n,) [K]
    breath : Breath
    loops : tuple of (str, BoreProfile)
        The state in each valve loop (by the valve's name), positions from the loop's start; none
        when the loops hold the state of the bore at their valve (at rest, for example).
    """

    room: Room
    positions_m: np.ndarray
    temperature_k: np.ndarray
    breath_fraction: np.ndarray
    wall_temperature_k: np.ndarray
    breath: Breath = DEFAULT_BREATH
    loops: tuple = ()

    @classmethod
    def uniform(cls, room: Room, breath_fraction: float = 0.0, breath: Breath = DEFAULT_BREATH):
        """Air and wall at room temperature everywhere, with a uniform breath fraction."""
        t = np.array([room.temperature_k])
        return cls(room, np.array([0.0]), t, np.array([float(breath_fraction)]), t, breath)

    def _interp(self, values, positions_m):
        return np.interp(np.asarray(positions_m, dtype=float), self.positions_m, values)

    def wall_temperature_at(self, positions_m):
        """Wall temperature [K] at positions [m]."""
        return self._interp(self.wall_temperature_k, positions_m)

    @functools.cached_property
    def sampled_air(self) -> air.AirState:
        """The gas at the profile's own sample positions, through :func:`drift.air.air_state` (computed once)."""
        return air.air_state(
            self.temperature_k,
            self.room.pressure_pa,
            self.room.temperature_k,
            self.room.relative_humidity,
            self.room.co2_fraction,
            np.clip(self.breath_fraction, 0.0, 1.0),
            self.breath,
        )

    def air_at(self, positions_m) -> air.AirState:
        """The gas (:class:`drift.air.AirState`) at positions [m] along the bore.

        The real-gas state is computed once at the profile's samples (:attr:`sampled_air`) and its
        temperature, composition and properties are interpolated linearly to ``positions_m``. The
        properties are smooth in temperature and composition, so between samples a few
        centimetres and a kelvin or two apart this differs from a fresh evaluation by far less
        than the model's own uncertainty (tests/test_thermal.py bounds it), and moving positions (a
        joint change, an expanded bore) costs no new CoolProp states.
        """
        x = np.asarray(positions_m, dtype=float)
        s = self.sampled_air
        if self.positions_m.size == 1:
            def at(values):
                return np.broadcast_to(np.asarray(values)[0], x.shape).copy()
        else:
            def at(values):
                return np.interp(x, self.positions_m, values)
        props = air.GasProperties(*(at(getattr(s.properties, f.name)) for f in fields(air.GasProperties)))
        fractions = np.stack([at(s.mole_fractions[:, i]) for i in range(5)], axis=-1)
        return air.AirState(at(s.temperature), at(s.pressure), fractions, at(s.condensed.astype(float)) > 0.5,
                        props)


def _merge_air(base: air.AirState, mask, other: air.AirState) -> air.AirState:
    """``other`` where ``mask`` is true, ``base`` elsewhere (arrays of one shape)."""
    def pick(a, b):
        return np.where(mask, b, a)

    props = air.GasProperties(*(pick(getattr(base.properties, f.name), getattr(other.properties, f.name))
                                for f in fields(air.GasProperties)))
    return air.AirState(pick(base.temperature, other.temperature), pick(base.pressure, other.pressure),
                        np.where(mask[..., None], other.mole_fractions, base.mole_fractions),
                        pick(base.condensed, other.condensed), props)


class PathProfile:
    """A bore profile seen along a note's played path (valve loops, slide extension;
    :class:`drift.segments.PlayedPath`): a point inside a valve loop takes the loop's own state
    (``profile.loops``) at its distance along the loop, or, where the profile has none, the state
    of the bore at the valve; the slide's extension takes the state of the bore at the slide;
    every other point the state of the bore where it lies without loops."""

    def __init__(self, profile: BoreProfile, path):
        self.profile, self.path = profile, path
        self._loops = dict(profile.loops)

    def _where(self, positions_m):
        """Positions on the bore, and for each insert with a state of its own: (mask, distance
        along it [m], its profile)."""
        x, inside, along = self.path.locate(positions_m)
        own = [(inside == k, along, self._loops[name]) for k, (_, _, name) in enumerate(self.path.inserts)
               if name in self._loops and np.any(inside == k)]
        return x, own

    def wall_temperature_at(self, positions_m):
        x, own = self._where(positions_m)
        t = self.profile.wall_temperature_at(x)
        for mask, along, loop in own:
            t = np.where(mask, loop.wall_temperature_at(along), t)
        return t

    def air_at(self, positions_m):
        x, own = self._where(positions_m)
        state = self.profile.air_at(x)
        for mask, along, loop in own:
            state = _merge_air(state, mask, loop.air_at(along))
        return state
