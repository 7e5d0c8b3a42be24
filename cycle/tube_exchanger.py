"""A tube-in-tube recuperator as hardware: the march of equal-duty zones with local heat transfer,
friction and the pressures they give (:mod:`cycle.heat_transfer` for the correlations).

For a trial duty the zones are marched as in :func:`cycle.processes.counterflow_profile`, then
each zone gets, from CoolProp's transport properties of each stream at the zone's mean state:
Reynolds and Prandtl numbers, the two film coefficients, the wall's resistance, the conductance
per metre and so the zone's length (its duty over conductance per metre times its log-mean
temperature difference), and each stream's pressure drop over that length (friction and
acceleration).  The pressures are marched again with those drops (the high-pressure stream from
the warm end, the return gas from the cold end) until they settle; the temperatures follow.

The high-pressure stream must stay one phase (a supercritical or superheated gas, or a
compressed liquid): a condensing zone is refused, since no condensation correlation is used.
"""

from dataclasses import dataclass
import math

import numpy as np

from cycle import heat_transfer as hx
from cycle.errors import PressureCollapseError, ScenarioError
from cycle.processes import ExchangerProfile

# The pressure iteration stops when no boundary pressure moves by more than this [Pa], or after
# PRESSURE_PASSES passes (then the last change is reported).
PRESSURE_TOLERANCE = 1e-4
PRESSURE_PASSES = 30


@dataclass(frozen=True)
class Wall:
    """The inner tube's wall: a constant conductivity [W/(m K)] or a material of
    :data:`cycle.heat_transfer.WALL_MATERIALS`."""

    conductivity: float = None
    material: str = None

    def at(self, T):
        return self.conductivity if self.conductivity is not None else hx.wall_conductivity(self.material, T)


@dataclass(frozen=True)
class RatedProfile:
    """The march of a tube-in-tube exchanger at one duty.

    Attributes
    ----------
    profile : cycle.processes.ExchangerProfile
        Temperatures and pressures at the zone boundaries (index 0 the cold end).
    zone_length : numpy.ndarray
        Length of each zone [m] (inf where the streams touch or cross).
    h_high, h_low : numpy.ndarray
        Film coefficients of the high-pressure (tube) and low-pressure (annulus) streams [W/(m2 K)].
    reynolds_high, reynolds_low : numpy.ndarray
    velocity_high, velocity_low : numpy.ndarray
        Mean velocities [m/s].
    mach_high, mach_low : numpy.ndarray
        Velocity over the (real-gas) speed of sound at the zone's mean state [-].
    regime_high, regime_low : tuple of str
    conductance : numpy.ndarray
        UA of each zone [W/K].
    passes : int
        Pressure passes made.
    """

    profile: ExchangerProfile
    zone_length: np.ndarray
    h_high: np.ndarray
    h_low: np.ndarray
    reynolds_high: np.ndarray
    reynolds_low: np.ndarray
    velocity_high: np.ndarray
    velocity_low: np.ndarray
    mach_high: np.ndarray
    mach_low: np.ndarray
    regime_high: tuple
    regime_low: tuple
    conductance: np.ndarray
    passes: int

    @property
    def length(self):
        """Length of the exchanger [m]."""
        return float(np.sum(self.zone_length))

    @property
    def position(self):
        """Distance of each zone boundary from the warm end [m] (index 0 the cold end)."""
        from_cold = np.concatenate([[0.0], np.cumsum(self.zone_length)])
        return from_cold[-1] - from_cold

    @property
    def ua(self):
        """Sum of the zones' conductances [W/K]."""
        return float(np.sum(self.conductance))

    @property
    def high_side_pressure_drop(self):
        return float(self.profile.hot_p[-1] - self.profile.hot_p[0])

    @property
    def low_side_pressure_drop(self):
        return float(self.profile.cold_p[0] - self.profile.cold_p[-1])


def _lmtd(a, b):
    if a <= 0 or b <= 0:
        return 0.0
    return a if abs(a - b) <= 1e-12 * max(a, b) else (a - b) / math.log(a / b)


def rate(fluid, geometry, wall, hot_in, hot_flow, cold_in, cold_flow, duty, zones, key="recuperator", start=None):
    """March a tube-in-tube exchanger passing ``duty`` [W].

    Parameters
    ----------
    fluid : properties.Fluid
    geometry : cycle.heat_transfer.TubeInTube
    wall : Wall
    hot_in : properties.State
        High-pressure stream at the warm end (inside the inner tubes).
    hot_flow, cold_flow : float
        Mass flows [kg/s].
    cold_in : properties.State
        Return gas at the cold end (in the annuli).
    duty : float
        [W]
    zones : int
    key : str
        The scenario key, for messages.
    start : (numpy.ndarray, numpy.ndarray), optional
        Boundary pressures of the hot and cold streams to start the pressure passes from (a
        neighbouring duty's): fewer passes, the same answer to :data:`PRESSURE_TOLERANCE`.

    Returns
    -------
    RatedProfile

    Raises
    ------
    ScenarioError
        Where the high-pressure stream would condense in a zone, or a pressure falls to zero
        (the tubes are far too small for the flow).
    """
    from properties import PropertyRangeError

    n = zones
    q = np.linspace(0.0, duty, n + 1)  # cumulative from the cold end [W]
    h_hot = hot_in.h - (duty - q) / hot_flow
    h_cold = cold_in.h + q / cold_flow
    if start is not None and len(start[0]) == n + 1:
        p_hot = hot_in.p + (np.asarray(start[0]) - start[0][-1])
        p_cold = cold_in.p + (np.asarray(start[1]) - start[1][0])
    else:
        p_hot = np.full(n + 1, hot_in.p)
        p_cold = np.full(n + 1, cold_in.p)
    G_hot = hot_flow / geometry.tube_area
    G_cold = cold_flow / geometry.annulus_area
    d_t, d_a, a = geometry.inner_inside, geometry.annulus_hydraulic_diameter, geometry.diameter_ratio
    for passes in range(1, PRESSURE_PASSES + 1):
        try:
            T_hot = fluid.temperatures_ph(p_hot, h_hot)
            T_cold = fluid.temperatures_ph(p_cold, h_cold)
        except PropertyRangeError as err:
            raise ScenarioError(f"{key}.geometry: {err}") from None
        T_cold[0] = cold_in.T
        lengths, conductance = np.empty(n), np.empty(n)
        h_i, h_o, re_i, re_o, v_i, v_o, ma_i, ma_o, vol_h, vol_c = (np.empty(n) for _ in range(10))
        reg_i, reg_o = [], []
        dp_hot, dp_cold = np.empty(n), np.empty(n)
        for k in range(n):
            Th, Tc = 0.5 * (T_hot[k] + T_hot[k + 1]), 0.5 * (T_cold[k] + T_cold[k + 1])
            ph, pc = 0.5 * (p_hot[k] + p_hot[k + 1]), 0.5 * (p_cold[k] + p_cold[k + 1])
            try:
                if ph < fluid.p_critical and _two_phase(fluid, ph, h_hot[k], h_hot[k + 1]):
                    raise PropertyRangeError("two-phase")
                mu_h, k_h, cp_h, rho_h, a_h = fluid.transport(Th, ph)
            except PropertyRangeError:
                raise ScenarioError(
                    f"{key}.geometry: the high-pressure stream would condense in zone {k + 1} of {n} (at "
                    f"{ph / 1e5:.4g} bar, {Th:.2f} K): no condensation correlation is used; raise high_pressure "
                    f"above the critical pressure or give the recuperator by ua") from None
            try:
                mu_c, k_c, cp_c, rho_c, a_c = fluid.transport(Tc, pc)
            except PropertyRangeError:  # the return gas at its dew point: a hair into the vapour
                mu_c, k_c, cp_c, rho_c, a_c = fluid.transport(Tc * (1 + 1e-6) + 1e-6, pc)
            re_i[k], re_o[k] = G_hot * d_t / mu_h, G_cold * d_a / mu_c
            c_i = hx.tube(re_i[k], mu_h * cp_h / k_h, d_t, geometry.roughness, geometry.coil_diameter)
            c_o = hx.annulus(re_o[k], mu_c * cp_c / k_c, a, d_a)
            h_i[k], h_o[k] = c_i.nusselt * k_h / d_t, c_o.nusselt * k_c / d_a
            reg_i.append(c_i.regime)
            reg_o.append(c_o.regime)
            v_i[k], v_o[k] = G_hot / rho_h, G_cold / rho_c
            ma_i[k], ma_o[k] = v_i[k] / a_h, v_o[k] / a_c
            vol_h[k], vol_c[k] = 1.0 / rho_h, 1.0 / rho_c
            per_m = geometry.conductance_per_length(h_i[k], h_o[k], wall.at(0.5 * (Th + Tc)))
            lmtd = _lmtd(T_hot[k + 1] - T_cold[k + 1], T_hot[k] - T_cold[k])
            dq = q[k + 1] - q[k]
            lengths[k] = dq / (per_m * lmtd) if lmtd > 0 else math.inf
            conductance[k] = per_m * lengths[k] if lmtd > 0 else math.inf
            dx = lengths[k] if math.isfinite(lengths[k]) else 0.0
            dp_hot[k] = c_i.friction * dx / d_t * G_hot ** 2 / (2.0 * rho_h)
            dp_cold[k] = c_o.friction * dx / d_a * G_cold ** 2 / (2.0 * rho_c)
        # Acceleration: G^2 times the change of specific volume over each zone, with the volumes
        # at the boundaries taken from the zone means (the ends from the end states).
        v_hot = _boundary_volumes(vol_h, 1.0 / _density(fluid, T_hot[0], p_hot[0]), 1.0 / hot_in.density)
        v_cold = _boundary_volumes(vol_c, 1.0 / cold_in.density, 1.0 / _density(fluid, T_cold[-1], p_cold[-1]))
        dp_hot += G_hot ** 2 * (v_hot[:-1] - v_hot[1:])  # flowing from the warm end to the cold end
        dp_cold += G_cold ** 2 * (v_cold[1:] - v_cold[:-1])
        new_hot = hot_in.p - np.concatenate([np.cumsum(dp_hot[::-1])[::-1], [0.0]])
        new_cold = cold_in.p - np.concatenate([[0.0], np.cumsum(dp_cold)])
        if np.min(new_hot) <= 0.05 * hot_in.p or np.min(new_cold) <= 0.05 * cold_in.p:
            raise PressureCollapseError(
                f"{key}.geometry: a pressure would fall below 5 % of its inlet value along the exchanger at this flow and duty (the "
                f"friction of the passages is far too high for the length needed): use wider or more tubes")
        change = max(float(np.max(np.abs(new_hot - p_hot))), float(np.max(np.abs(new_cold - p_cold))))
        p_hot, p_cold = new_hot, new_cold
        if change <= PRESSURE_TOLERANCE:
            break
    T_hot = fluid.temperatures_ph(p_hot, h_hot)
    T_cold = fluid.temperatures_ph(p_cold, h_cold)
    T_cold[0] = cold_in.T
    profile = ExchangerProfile(q / (hot_flow if hot_flow else 1.0), T_hot, T_cold, p_hot, p_cold)
    return RatedProfile(profile, lengths, h_i, h_o, re_i, re_o, v_i, v_o, ma_i, ma_o, tuple(reg_i), tuple(reg_o),
                        conductance, passes)


def _two_phase(fluid, p, h_a, h_b):
    """Whether a zone between enthalpies ``h_a`` and ``h_b`` at ``p`` (below the critical
    pressure) reaches inside the saturation dome."""
    liquid, vapour = fluid.saturated_liquid(p), fluid.saturated_vapour(p)
    return min(h_a, h_b) < vapour.h and max(h_a, h_b) > liquid.h


def _density(fluid, T, p):
    from properties import PropertyRangeError

    try:
        return fluid.state_tp(T, p).density
    except PropertyRangeError:  # on the saturation line: the vapour's
        return fluid.state_tp(T * (1 + 1e-6), p).density


def _boundary_volumes(means, first, last):
    """Specific volumes at the zone boundaries [m3/kg]: the ends given, each interior boundary the
    mean of its two zones' volumes."""
    inner = 0.5 * (means[:-1] + means[1:])
    return np.concatenate([[first], inner, [last]])


# A return-side pressure drop above this share of the return gas's inlet pressure is warned
# (it sets the compressor suction and the liquid temperature); and a gas faster than this Mach
# number (compressibility then matters and the correlations were fitted without it).
LOW_SIDE_DROP_SHARE = 0.10
MACH_LIMIT = 0.3


def _zone_list(zones, n):
    """``zones 3 to 7 and 12`` of ``n``, counted from the warm end, for cold-end indices."""
    numbers = sorted(n - k for k in zones)
    runs, start, last = [], numbers[0], numbers[0]
    for z in numbers[1:] + [None]:
        if z is not None and z == last + 1:
            last = z
            continue
        runs.append(f"{start}" if start == last else f"{start} to {last}")
        if z is not None:
            start = last = z
    text = runs[0] if len(runs) == 1 else ", ".join(runs[:-1]) + " and " + runs[-1]
    return f"zone{'s' if len(numbers) > 1 else ''} {text} of {n} (from the warm end)"


def warnings_for(key, rating):
    """What a designer must hear about a rated exchanger, in words: a large return-side pressure
    drop, a gas near sonic speed, zones where the flow is laminar or transitional."""
    out = []
    prof = rating.profile
    n = len(rating.zone_length)
    p_in = float(prof.cold_p[0])
    drop = rating.low_side_pressure_drop
    if drop > LOW_SIDE_DROP_SHARE * p_in:
        out.append(f"{key}: the return gas loses {drop / 1e5:.3g} bar in the annuli, {100 * drop / p_in:.0f} % of its "
                   f"{p_in / 1e5:.4g} bar (more than {100 * LOW_SIDE_DROP_SHARE:.0f} %): the compressor draws at "
                   f"{float(prof.cold_p[-1]) / 1e5:.4g} bar; use wider annuli or more tubes")
    for side, mach, velocity in (("high-pressure stream", rating.mach_high, rating.velocity_high),
                                 ("return gas", rating.mach_low, rating.velocity_low)):
        fast = [k for k in range(n) if mach[k] > MACH_LIMIT]
        if fast:
            k = max(fast, key=lambda j: mach[j])
            out.append(f"{key}: the {side} reaches {velocity[k]:.0f} m/s (Mach {mach[k]:.2f}, above {MACH_LIMIT:g}) in "
                       f"{_zone_list(fast, n)}: compressibility matters there and the friction and heat-transfer "
                       f"correlations do not cover it; use wider passages or more tubes")
    for side, regimes in (("high-pressure stream", rating.regime_high), ("return gas", rating.regime_low)):
        weak = [k for k in range(n) if regimes[k] != "turbulent"]
        if weak:
            kinds = " or ".join(sorted({regimes[k] for k in weak}))
            out.append(f"{key}: the {side} is {kinds} (Re below 10000) in {_zone_list(weak, n)}, where the "
                       f"correlations are least sure (laminar: developed-flow values; transitional: interpolated)")
    return out
