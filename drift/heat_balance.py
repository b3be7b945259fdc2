"""The heat balance of a played bore: breath, bore air and wall, in a room that may change in time.

:class:`HeatBalance` holds the conductances, capacities and gas properties of one wall in one room
(with the walls of its valve loops beside it) and gives the net heat into every wall node for any
wall temperatures (the right-hand side of the ODE that :mod:`drift.thermal` integrates, and the
residual of its steady state).
:class:`ChangingHeatBalance` does the same in a room that changes in time (:class:`drift.climate.Weather`).
Outdoors, the sunshine absorbed by the outer surface heats the wall
(:func:`drift.heat_transfer.absorbed_sunshine`) and the wind adds to the air speed of the outside
forced convection (:func:`drift.heat_transfer.relative_air_speed`). The model and its sources
are described in :mod:`drift.thermal` and docs/physics.md, "Thermal state".

References
----------
Incropera, F. P., DeWitt, D. P., Bergman, T. L., Lavine, A. S. (2007). Fundamentals of Heat and Mass
Transfer, 6th ed. Wiley (Eqs. 3.27, 8.42b).
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from drift import air
from drift import constants as K
from drift.climate import Blowing, Breath, Room, Weather
from drift.errors import OutOfRangeError
from drift.heat_transfer import (absorbed_sunshine, latent_heat_condensation, outer_coefficient,
                                 pipe_conductance, relative_air_speed)
from drift.segments import Wall


@dataclass(frozen=True)
class _AirFlow:
    """The breath flowing down the bore over given wall temperatures (:meth:`HeatBalance.air_play`).

    air_k (n,) mean air temperature per segment [K]; outlet_k (n,) air leaving each segment [K];
    wall_w (n,) heat into each segment's wall [W] (sensible + latent); latent_w (n,) [W];
    condensation_kg_s (n,) [kg/s]; breath_heat_w, the heat the breath gives up: what the air gives
    every wall segment, sensible (constant cp) and latent [W].
    """

    air_k: np.ndarray
    outlet_k: np.ndarray
    wall_w: np.ndarray
    latent_w: np.ndarray
    condensation_kg_s: np.ndarray
    breath_heat_w: float


@dataclass(frozen=True)
class _Balance:
    """Diagnostics of the heat balance at one moment (:meth:`HeatBalance.heat_flows`), totals over the
    bore: the fields of :class:`ThermalState` of the same names."""

    air_k: np.ndarray
    breath_heat_w: float
    room_loss_w: float
    latent_w: float
    condensation_kg_s: float
    condensing: np.ndarray
    outlet_k: np.ndarray


#: A share of the breath flow below this counts as none (a billionth: far below any note's share,
#: and its NTU would overflow).
MIN_FLOW_SHARE = 1e-9


def radial_layers(wall: Wall) -> int:
    """Radial layers of the wall: one when its conduction resistance is small (Biot number
    h w / k below 0.1 with h = 10 W/(m^2 K), a typical outer coefficient), else four."""
    biot = 10.0 * np.max(wall.thickness_m) / wall.material.conductivity_across
    return 1 if biot < 0.1 else 4


class _Dynamics:
    """The ODE of the wall temperatures built on ``heat_flows(temps, playing, time_s)`` and
    ``room_at(time_s)``, shared by :class:`HeatBalance` and :class:`ChangingHeatBalance`."""

    n: int
    m: int
    capacity: np.ndarray

    def derivatives(self, y, playing: bool, time_s=None) -> np.ndarray:
        """Time derivatives of the ODE state (k, n m + 2) at a time [s]: wall temperatures [K/s],
        then the rates of the two heat totals [W] (breath heat given up, heat lost to the room)."""
        y = np.asarray(y, dtype=float)
        q, d = self.heat_flows(y[:, : self.n * self.m].reshape(-1, self.n, self.m), playing, time_s)
        return np.concatenate([(q / self.capacity).reshape(len(y), -1), d.breath_heat_w[:, None],
                               d.room_loss_w[:, None]], axis=1)

    def jacobian(self, y, playing: bool, time_s=None) -> np.ndarray:
        """d(:meth:`derivatives`)/dy (n m + 2, n m + 2) at one state, by forward differences of
        0.1 mK in every wall temperature, all evaluated in one batch (the heat totals enter
        nothing, so their columns are zero).

        A node of the inner layer moves the air, and so every node downstream, and one of the
        outer layer the heat lost to the room: each is perturbed alone. A node of a layer between
        them moves only its own row and its four neighbours' (conduction across and along the
        wall), so every third segment's node of such a layer is perturbed at once and each
        column read from its own rows (the colouring of Curtis, Powell & Reid 1974, J. Inst. Maths
        Applics 13, 117-119): the same columns from fewer evaluations (equal to rounding: the
        batched products of the air's recurrence round alike only for batches of one size).
        """
        y = np.asarray(y, dtype=float)
        size = y.size
        step = 1e-4
        alone, groups, (rows, cols, which) = self._difference_plan()
        batch = np.repeat(y[None, :], 1 + len(alone) + len(groups), axis=0)
        batch[1 + np.arange(len(alone)), alone] += step
        for g, members in enumerate(groups):
            batch[1 + len(alone) + g, members] += step
        f = self.derivatives(batch, playing, time_s)
        change = (f[1:] - f[0]) / step
        jac = np.zeros((size, size))
        jac[:, alone] = change[: len(alone)].T
        jac[rows, cols] = change[len(alone) + which, rows]
        return jac

    def _difference_plan(self):
        """The nodes perturbed alone, the groups perturbed together, and for the grouped nodes
        (row, column, group) of every entry they move (:meth:`jacobian`); kept once made."""
        plan = getattr(self, "_plan", None)
        if plan is None:
            n, m = self.n, self.m
            node = np.arange(n * m).reshape(n, m)
            middle = list(range(1, m - 1))
            alone = np.sort(node[:, [0, m - 1]].ravel()) if middle else np.arange(n * m)
            groups, rows, cols, which = [], [], [], []
            for layer in middle:
                for start in range(3):
                    segments = np.arange(start, n, 3)
                    if not segments.size:
                        continue
                    for i in segments:
                        around = [(i, layer - 1), (i, layer), (i, layer + 1), (i - 1, layer), (i + 1, layer)]
                        for a, b in around:
                            if 0 <= a < n:
                                rows.append(node[a, b])
                                cols.append(node[i, layer])
                                which.append(len(groups))
                    groups.append(node[segments, layer])
            plan = self._plan = (alone, groups, tuple(np.array(v, dtype=int) for v in (rows, cols, which)))
        return plan

    def rhs(self, playing: bool):
        def f(t, y):
            return self.derivatives(y[None, :], playing, t)[0]

        return f

    def jac(self, playing: bool):
        def f(t, y):
            return self.jacobian(y, playing, t)

        return f

    def stored_j(self, temps, time_s=None) -> float:
        """Heat held by the wall above room temperature [J]."""
        return float(np.sum(self.capacity * (temps - self.room_at(time_s).temperature_k)))


class HeatBalance(_Dynamics):
    """Precomputed conductances, capacities and gas properties of one wall in one room (its sun
    and wind included).

    A wall with valve loops (:attr:`drift.segments.Wall.branches`) is balanced with them in one
    state: the bore's segments, then each loop's (``parts`` names them: None for the bore, the
    valve's name for a loop, with its wall and its slice of the segments). A loop carries its
    share of the breath flow and takes in the air leaving the bore segment whose far edge lies
    nearest its valve, at that temperature and with the water it still holds there; what the loop
    does to the air returning to the bore is not carried on downstream (the loops hold a share of
    the flow over a short length; our approximation). No heat is conducted between the walls.
    """

    #: Times [s] where the heat flows change slope in time (none: the room does not change).
    kinks_s: tuple = ()

    def __init__(self, wall: Wall, room: Room, blowing: Blowing, breath: Breath,
                 layers: int | None = None):
        self.wall, self.room, self.blowing, self.breath = wall, room, blowing, breath
        m = radial_layers(wall) if layers is None else int(layers)
        if m < 1:
            raise OutOfRangeError("the wall needs at least one radial layer")
        # The bore's segments, then each valve loop's (wall.branches): one state, no conduction
        # between the walls (a zero axial conductance where one ends and the next begins).
        walls = [wall] + [b.wall for b in wall.branches]
        sizes = [w.positions_m.size for w in walls]
        self.n, self.m = n, m = sum(sizes), m
        edges = np.cumsum([0] + sizes)
        self.parts = [(name, w, slice(a, b)) for name, w, a, b in
                      zip([None] + [b.name for b in wall.branches], walls, edges[:-1], edges[1:])]
        shells = [w.shells(m) for w in walls]

        def joined(name):
            return np.concatenate([getattr(sh, name) for sh in shells])

        self.capacity, self.g_radial = joined("capacity_j_k"), joined("radial_w_k")
        self.g_axial = np.concatenate([np.concatenate([sh.axial_w_k, np.zeros((1, m))]) for sh in shells])[:-1]
        self.r_inner, self.r_outer = joined("inner_k_w"), joined("outer_k_w")
        self.outer_area, self.outer_diameter = joined("outer_area_m2"), joined("outer_diameter_m")
        self.t_room = room.temperature_k
        p = room.pressure_pa
        # Outdoors: the wind across the tube adds to its own motion; the sun heats the outer layer.
        own = blowing.air_speed_m_s
        self.air_speed = own if room.wind_m_s == 0.0 else float(relative_air_speed(own, room.wind_m_s))
        self.sun_w = (absorbed_sunshine(room.sun_w_m2, wall.material.solar_absorptance, self.outer_area)
                      if room.sun_w_m2 > 0.0 else None)

        # Gas properties, evaluated once (see the module docstring).
        room_x = air.room_air(room.temperature_k, p, room.relative_humidity, room.co2_fraction)
        breath_x = air.breath_air(p, breath)
        phi = blowing.inlet_breath_fraction
        self.t_in = phi * breath.temperature_k + (1.0 - phi) * room.temperature_k
        x_in, _ = air.mix(room_x, breath_x, phi, self.t_in, p)
        self.x_in_water = float(x_in[4])
        gas_in = air.gas_properties(self.t_in, p, x_in)
        # The flowing gas at the mean of inlet and room temperature, its water capped at
        # saturation there as it is in the bore (the excess condenses on the wall).
        t_film = 0.5 * (self.t_in + room.temperature_k)
        x_film, _ = air.mix(room_x, breath_x, phi, t_film, p)
        gas = air.gas_properties(t_film, p, x_film)
        room_gas = air.gas_properties(room.temperature_k, p, room_x)
        self.cp = float(gas.cp)
        self.k_gas = float(gas.conductivity)
        self.mu_gas = float(gas.viscosity)
        self.pr_gas = float(gas.prandtl)
        self.room_gas = room_gas
        molar_mass_in = float(gas_in.density) * K.MOLAR_GAS_CONSTANT * self.t_in / p
        self.mdot_in = float(gas_in.density) * blowing.flow_m3_s                  # [kg/s]
        self.ndot_dry_in = self.mdot_in / molar_mass_in * (1.0 - self.x_in_water)  # [mol/s]
        self.r_in = self.x_in_water / (1.0 - self.x_in_water)

        # Saturation water fraction over the temperature range of the problem, tabulated.
        low = min(room.temperature_k, self.t_in) - 2.0
        high = max(room.temperature_k, self.t_in) + 2.0
        self._t_grid = np.linspace(low, high, max(16, int((high - low) / 0.25) + 1))
        x_sat = air.saturation_water_fraction(self._t_grid, p)
        self._log_r_sat = np.log(x_sat / (1.0 - x_sat))

        # Internal convection, per segment (used while playing). The bore's flow enters at its
        # first segment with a share of the flow; a loop's flow at its first segment, from the
        # bore segment whose far edge lies nearest its valve (its ``parent``).
        n0 = sizes[0]
        w0 = np.asarray(wall.flow_fraction, dtype=float)
        blown = blowing.flow_m3_s > 0.0
        inlet = int(np.argmax(w0 > 0.0)) if np.any(w0 > 0.0) and blown else n0
        stop = inlet
        while stop < n0 and w0[stop] > 0.0:
            stop += 1
        # Breath fills the bore wherever the flow passes, and the dead-end cavity before the inlet
        # (mixed by the oscillating flow at the embouchure); beyond the last exit, room air.
        reached = w0 > 0.0
        reached[:inlet] = True
        phi_bore = np.where(reached, phi, 0.0) if blown else np.zeros(n0)
        share = [np.where((np.arange(n0) < stop) & blown, w0, 0.0)]
        parent, phi_play = [np.arange(n0) - 1], [phi_bore]
        distance = [np.maximum(wall.edges_m - wall.edges_m[min(inlet, n0 - 1)], 0.0)]
        parent[0][min(inlet, n0 - 1)] = -1
        for b, part in zip(wall.branches, self.parts[1:]):
            valve = int(np.argmin(np.abs(wall.edges_m[1:] - b.position_m)))
            fed = inlet <= valve < stop
            w = np.asarray(b.wall.flow_fraction, dtype=float) if fed else np.zeros(part[2].stop - part[2].start)
            share.append(w)
            parent.append(np.concatenate([[valve], np.arange(part[2].start, part[2].stop - 1)]))
            phi_play.append(np.where(w > 0.0, phi_bore[valve], 0.0))
            distance.append(b.wall.edges_m - b.wall.edges_m[0])
        w = np.concatenate(share)
        w[w < MIN_FLOW_SHARE] = 0.0
        parent = np.concatenate(parent)
        self.phi_play = np.concatenate(phi_play)
        self.mdot = w * self.mdot_in
        self.ndot_dry = w * self.ndot_dry_in
        self.mdot_cp = self.mdot * self.cp
        self.flows = self.mdot > 0.0
        ua = np.concatenate([pipe_conductance(x, self.mdot[part], 2.0 * wl.inner_radius_m, self.cp, self.k_gas,
                                              self.mu_gas, self.pr_gas) for x, (_, wl, part) in zip(distance, self.parts)])
        ua *= blowing.heat_transfer_factor
        # Convection in series with the conduction to the first layer's mid-radius.
        ua_eff = np.zeros(n)
        ua_eff[self.flows] = 1.0 / (1.0 / ua[self.flows] + self.r_inner[self.flows])
        self.ntu = np.zeros(n)
        self.ntu[self.flows] = ua_eff[self.flows] / self.mdot_cp[self.flows]
        self.decay = np.exp(-self.ntu)
        # Mean air temperature over a segment: T_w + (T_in - T_w) (1 - e^-NTU) / NTU (-> 1 as NTU -> 0).
        self.mean_share = np.ones(n)
        big = self.ntu > 1e-12
        self.mean_share[big] = (1.0 - self.decay[big]) / self.ntu[big]
        # Over the segments with flow (each after its parent), T_out,s = d_s T_out,parent + (1 - d_s)
        # T_w,s with T_out of the inlet's parent = T_in: a linear recurrence, T_out = W T_w + T_in v,
        # built here once (products only, no division). The runs of segments with flow (the bore's,
        # then each loop's) are kept for the water, which is capped run by run.
        # Where each segment with flow takes its air from: the inlet (-1), or its parent's place in
        # the order (the parent is a segment number). A run starts where that is not the segment
        # before it in the order.
        self.order = order = np.flatnonzero(self.flows)
        index = np.full(n, -1)
        index[order] = np.arange(order.size)
        up = np.where(parent[order] >= 0, index[np.maximum(parent[order], 0)], -1)
        self.outlet_weights = np.zeros((order.size, order.size))
        self.outlet_reach = np.zeros(order.size)
        for k, seg in enumerate(order):
            d = self.decay[seg]
            if up[k] >= 0:
                self.outlet_weights[k] = d * self.outlet_weights[up[k]]
                self.outlet_reach[k] = d * self.outlet_reach[up[k]]
            else:
                self.outlet_reach[k] = d
            self.outlet_weights[k, k] += 1.0 - d
        self.from_inlet = up < 0
        self.up_order = np.maximum(up, 0)
        self.up_segment = np.where(self.from_inlet, 0, order[self.up_order])
        starts = np.flatnonzero((up != np.arange(order.size) - 1) | self.from_inlet)
        self.runs = [slice(a, b) for a, b in zip(starts, np.append(starts[1:], order.size))]

    # -- pieces of the balance -----------------------------------------------------------------

    def r_sat(self, temperature_k):
        """Water-to-dry-gas mole ratio at saturation [mol/mol], from the table."""
        t = np.asarray(temperature_k, dtype=float)
        if np.any(t < self._t_grid[0]) or np.any(t > self._t_grid[-1]):
            x = air.saturation_water_fraction(t, self.room.pressure_pa)
            return x / (1.0 - x)
        return np.exp(np.interp(t, self._t_grid, self._log_r_sat))

    def air_play(self, t_inner):
        """The flowing air over inner-layer temperatures (k, n) [K], for k states at once.

        Segment by segment from the inlet (a valve loop from the bore segment feeding it),
        T_out = T_w + (T_up - T_w) exp(-NTU) with NTU = UA / (mdot cp) (uniform wall temperature
        over a segment; Incropera et al. 2007, Eq. 8.42b), T_up the air flowing in, and the
        segment's mean air temperature T_w + (T_up - T_w)(1 - exp(-NTU))/NTU. Water is capped at
        saturation at T_out, from the inlet along each run; the condensed water's latent heat goes
        into the wall. The breath's heat is what the air gives the walls, sensible and latent.

        Returns
        -------
        _AirFlow
            Its arrays (k, n), its ``breath_heat_w`` (k,).
        """
        n = self.n
        tw = np.asarray(t_inner, dtype=float)
        t_out = tw.copy()
        t_mean = tw.copy()
        k = tw.shape[0]
        order = self.order
        if not order.size:  # no flow at all
            zero = np.zeros((k, n))
            return _AirFlow(t_mean, np.full((k, n), np.nan), zero, zero, zero, np.zeros(k))
        from_inlet = self.from_inlet
        t_out[:, order] = tw[:, order] @ self.outlet_weights.T + self.t_in * self.outlet_reach
        t_up = np.where(from_inlet, self.t_in, t_out[:, self.up_segment])
        t_mean[:, order] = tw[:, order] + (t_up - tw[:, order]) * self.mean_share[order]
        sensible = self.mdot_cp[order] * (t_up - t_out[:, order])
        r_sat = self.r_sat(t_out[:, order])
        r_out = np.empty((k, order.size))
        for run in self.runs:
            first = run.start
            start = self.r_in if from_inlet[first] else r_out[:, self.up_order[first], None]
            r_out[:, run] = np.minimum.accumulate(np.minimum(start, r_sat[:, run]), axis=1)
        r_up = np.where(from_inlet, self.r_in, r_out[:, self.up_order])
        condensed_kg = self.ndot_dry[order] * (r_up - r_out) * K.WATER_MOLAR_MASS
        latent = condensed_kg * latent_heat_condensation(t_out[:, order])
        wall_w, latent_w, condensation = np.zeros((k, n)), np.zeros((k, n)), np.zeros((k, n))
        wall_w[:, order], latent_w[:, order], condensation[:, order] = sensible + latent, latent, condensed_kg
        outlet = np.full((k, n), np.nan)
        outlet[:, order] = t_out[:, order]
        return _AirFlow(t_mean, outlet, wall_w, latent_w, condensation, np.sum(sensible + latent, axis=1))

    def outer_conductance(self, t_outer):
        """Conductance from the outer layer to the room [W/K], per segment: wall conduction in
        series with convection and radiation (:func:`drift.heat_transfer.outer_coefficient`), the
        film evaluated at the outer layer's temperature."""
        h = outer_coefficient(t_outer, self.t_room, self.outer_diameter, self.room_gas, self.air_speed,
                              self.wall.material.emissivity)
        return 1.0 / (self.r_outer + 1.0 / (h * self.outer_area))

    def room_at(self, time_s=None) -> Room:
        """The room (the same at every time)."""
        return self.room

    def heat_flows(self, temps, playing: bool, time_s=None) -> tuple[np.ndarray, _Balance]:
        """Net heat into every wall node [W] (k, n, m) of k states of the wall (k, n, m) [K] at
        once, and the diagnostics of the balance (arrays with a first axis of k); the room loss is
        net of the sunshine absorbed. ``time_s`` is not used (the room does not change)."""
        temps = np.asarray(temps, dtype=float)
        k = temps.shape[0]
        q = np.zeros((k, self.n, self.m))
        if playing:
            a = self.air_play(temps[:, :, 0])
            q[:, :, 0] += a.wall_w
            t_air, latent, cond, given, outlet = (a.air_k, a.latent_w, a.condensation_kg_s, a.breath_heat_w,
                                                  a.outlet_k)
        else:
            t_air, latent, cond, given = temps[:, :, 0].copy(), np.zeros((k, self.n)), np.zeros((k, self.n)), \
                np.zeros(k)
            outlet = np.full((k, self.n), np.nan)
        if self.m > 1:
            f = self.g_radial * (temps[:, :, 1:] - temps[:, :, :-1])
            q[:, :, :-1] += f
            q[:, :, 1:] -= f
        if self.n > 1:
            f = self.g_axial * (temps[:, 1:] - temps[:, :-1])
            q[:, :-1] += f
            q[:, 1:] -= f
        loss = self.outer_conductance(temps[:, :, -1]) * (temps[:, :, -1] - self.t_room)
        if self.sun_w is not None:
            loss = loss - self.sun_w
        q[:, :, -1] -= loss
        return q, _Balance(t_air, given, np.sum(loss, axis=1), np.sum(latent, axis=1), np.sum(cond, axis=1),
                           np.asarray(cond) > 0.0, outlet)



class ChangingHeatBalance(_Dynamics):
    """The heat balance in a room that changes in time (:class:`drift.climate.Weather`).

    A :class:`HeatBalance` is built for the room at every time the weather gives; between two of
    them the heat flows (and the diagnostics) are interpolated linearly in time,
    q(t) = q_i + w (q_(i+1) - q_i) with w = (t - t_i) / (t_(i+1) - t_i), as the conditions
    themselves are. Terms linear in the conditions (the sunshine absorbed; the room loss at a fixed
    coefficient) are so exact; the rest (gas properties, convection coefficients) to first order
    over the interval. Where two neighbouring rooms are the same, q_(i+1) - q_i is exactly zero
    and the result is that of the fixed room, bit for bit.
    """

    def __init__(self, wall: Wall, weather: Weather, blowing: Blowing, breath: Breath,
                 layers: int | None = None):
        self.weather = weather
        self.models = [HeatBalance(wall, room, blowing, breath, layers) for room in weather.rooms]
        first = self.models[0]
        self.wall, self.blowing, self.breath = wall, blowing, breath
        self.n, self.m, self.capacity, self.phi_play = first.n, first.m, first.capacity, first.phi_play
        self.parts = first.parts
        self.kinks_s = _kinks(weather)

    def room_at(self, time_s=None) -> Room:
        """The room at a time [s] (the start's when None)."""
        return self.weather.room_at(0.0 if time_s is None else float(time_s))

    def heat_flows(self, temps, playing: bool, time_s=None) -> tuple[np.ndarray, _Balance]:
        """:meth:`HeatBalance.heat_flows` at a time [s], interpolated between the given rooms."""
        i, w = self.weather.bracket(0.0 if time_s is None else float(time_s))
        q, d = self.models[i].heat_flows(temps, playing)
        if w == 0.0:
            return q, d
        q1, d1 = self.models[i + 1].heat_flows(temps, playing)

        def blend(a, b):
            return a + w * (b - a)

        condensation = blend(d.condensation_kg_s, d1.condensation_kg_s)
        return blend(q, q1), _Balance(blend(d.air_k, d1.air_k), blend(d.breath_heat_w, d1.breath_heat_w),
                                      blend(d.room_loss_w, d1.room_loss_w), blend(d.latent_w, d1.latent_w),
                                      condensation, d.condensing | d1.condensing,
                                      blend(d.outlet_k, d1.outlet_k))


def _kinks(weather: Weather) -> tuple[float, ...]:
    """The given times [s] of a weather where some condition changes its rate (held after the
    last time): where the integration is best restarted."""
    t, rooms = weather.times_s, weather.rooms

    def rates(i):
        if i >= len(t) - 1:
            return (0.0,) * len(fields(Room))
        return tuple((getattr(rooms[i + 1], f.name) - getattr(rooms[i], f.name)) / (t[i + 1] - t[i])
                     for f in fields(Room))

    return tuple(t[i] for i in range(1, len(t)) if rates(i - 1) != rates(i))


def heat_balance(wall: Wall, room: Room | Weather, blowing: Blowing, breath: Breath,
                 layers: int | None = None):
    """The heat balance of a wall in a fixed room (:class:`HeatBalance`), or in weather that
    changes (:class:`ChangingHeatBalance`; a weather of one room is the fixed room)."""
    if isinstance(room, Weather):
        if len(room.rooms) == 1:
            room = room.rooms[0]
        else:
            return ChangingHeatBalance(wall, room, blowing, breath, layers)
    return HeatBalance(wall, room, blowing, breath, layers)
