"""A tube-in-tube recuperator as hardware: the march of equal-duty zones with local heat transfer,
friction and the pressures they give (:mod:`cycle.heat_transfer` for the correlations).

For a trial duty the zones are marched as in :func:`cycle.processes.counterflow_profile`, then
each zone gets, from CoolProp's transport properties of each stream at the zone's mean state:
Reynolds and Prandtl numbers, the two film coefficients, the wall's resistance, the conductance
per metre and so the zone's length (its duty over conductance per metre times its log-mean
temperature difference), and each stream's pressure drop over that length (friction and
acceleration).  The pressures those drops give are settled on a linear model of the march (no
property call) and checked by marching again (see :func:`rate`).

The high-pressure stream must stay one phase (a supercritical or superheated gas, or a
compressed liquid): a condensing zone is refused, since no condensation correlation is used.
"""

from dataclasses import dataclass, field, replace

import numpy as np

from cycle import heat_transfer as hx
from cycle.errors import PressureCollapseError, ScenarioError
from cycle.processes import ExchangerProfile

# The pressures are settled when a march's boundary pressures come back within this share of each
# stream's inlet pressure (0.01 Pa at 1 bar, 2 Pa at 200 bar: the temperatures then move by less
# than 1e-7 K), or after PRESSURE_PASSES marches (then the last change stands).
PRESSURE_RTOL = 1e-7
PRESSURE_PASSES = 30


@dataclass(frozen=True)
class Wall:
    """The inner tube's wall: a constant conductivity [W/(m K)] or a material of
    :data:`cycle.heat_transfer.WALL_MATERIALS`."""

    conductivity: float = None
    material: str = None

    def at(self, T):
        """Conductivity [W/(m K)] at ``T`` [K] (a number or an array)."""
        if self.conductivity is not None:
            return np.full(np.shape(T), float(self.conductivity)) if np.ndim(T) else self.conductivity
        return hx.wall_conductivity(self.material, T)


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
        Marches made.
    settled : bool
        Whether the pressures were settled as for an answer (within :data:`PRESSURE_RTOL`, or
        after :data:`PRESSURE_PASSES` marches); False only for a rating asked for with a looser
        ``rtol`` that stopped short of it (a root finder's step, not an answer).
    base : object
        The last march, for the next duty's rating to start from (not part of the result).
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
    settled: bool = True
    base: object = field(default=None, repr=False, compare=False)

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
    """Log-mean of the end differences ``a`` and ``b`` (arrays) [K]; 0 where either is not
    positive (the streams touch or cross)."""
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    if a.size and a.min() > 0 and b.min() > 0:
        d = a - b
        if not (np.abs(d) <= 1e-6 * np.maximum(a, b)).any():  # the usual case, the same formula
            return d / np.log(a / b)
    ok = (a > 0) & (b > 0)
    a_, b_ = np.where(ok, a, 1.0), np.where(ok, b, 1.0)
    close = np.abs(a_ - b_) <= 1e-6 * np.maximum(a_, b_)
    ratio = np.where(close, 2.0, a_ / b_)
    # Near equal ends the series 1 - x/2 + x^2/3 of ln(1+x)/x keeps the full precision.
    x = a_ / b_ - 1.0
    mean = np.where(close, b_ / (1.0 - x / 2.0 + x * x / 3.0), (a_ - b_) / np.log(ratio))
    return np.where(ok, mean, 0.0)


@dataclass(frozen=True)
class _Pass:
    """One march of both streams at given boundary pressures, with all a zone needs and what the
    pressures come to from it (``new_hot``, ``new_cold``).  Kept so the next pass, or the next
    duty's first pass, can start from a linear estimate around it."""

    h_hot: np.ndarray
    h_cold: np.ndarray
    p_hot: np.ndarray
    p_cold: np.ndarray
    hot: object   # properties.march.Marched
    cold: object
    per_metre: np.ndarray      # conductance per metre of each zone [W/(m K)]
    friction_hot: np.ndarray   # f G^2 / (2 d): friction pressure drop per metre per specific volume
    friction_cold: np.ndarray
    lengths: np.ndarray
    new_hot: np.ndarray
    new_cold: np.ndarray
    inlets: tuple              # (hot p, hot h, cold p, cold h) it was made for
    G: tuple                   # mass fluxes of the hot and cold streams [kg/(m2 s)]
    duty: float                # [W]
    details: tuple             # h_i, h_o, re_i, re_o, v_i, v_o, ma_i, ma_o, regimes, conductance
    # How the conductances per metre changed with the duty [1/(m K)] from the last rating at another
    # duty and the same flow (a secant), or None: the model moves them along it.
    per_metre_slope: object = None
    # The pressures last settled on this march's model: where the next settle starts (a root
    # finder's steps are near one another).
    recent: dict = field(default_factory=dict, compare=False, repr=False)


def rate(fluid, geometry, wall, hot_in, hot_flow, cold_in, cold_flow, duty, zones, key="recuperator", start=None,
         rtol=PRESSURE_RTOL):
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
    start : RatedProfile, optional
        A neighbouring duty's rating (same inlet states): the pressures of the first march
        come from a linear estimate around it.  Fewer marches, the same answer to
        :data:`PRESSURE_RTOL`.
    rtol : float, optional
        The share of each inlet pressure within which a march's pressures must come back; a root
        finder's intermediate step may ask for less (``math.inf``: one march), and the rating
        then says whether it is ``settled`` all the same.

    Returns
    -------
    RatedProfile

    Raises
    ------
    ScenarioError
        Where the high-pressure stream would condense in a zone, or a pressure falls to zero
        (the tubes are far too small for the flow).

    Notes
    -----
    Each march (a "pass") solves both streams' states at the current boundary pressures, takes
    each zone's transport properties at its mean temperature and mean density, and from the
    correlations the zone's length and pressure drop, which give new boundary pressures.  Between
    marches the pressures are iterated on a linear model of the last march (its states'
    sensitivities to p and h, its conductances and friction frozen), which costs no property call;
    the next march checks the result.  The answer is accepted when a march's own pressures come
    back within :data:`PRESSURE_RTOL` of its inlet pressures.
    """
    n = zones
    q, h_hot, h_cold, G = _zone_grid(geometry, hot_in, hot_flow, cold_in, cold_flow, duty, n)
    inlets = (hot_in.p, hot_in.h, cold_in.p, cold_in.h)
    base = getattr(start, "base", None)
    guesses = None
    if base is not None and base.inlets == inlets and len(base.h_hot) == n + 1:
        p_hot, p_cold, guesses = _estimate(base, h_hot, h_cold, q, G, hot_in, cold_in)
    else:
        p_hot, p_cold = np.full(n + 1, float(hot_in.p)), np.full(n + 1, float(cold_in.p))
    slope = None
    for passes in range(1, PRESSURE_PASSES + 1):
        march = _march(fluid, geometry, wall, key, p_hot, p_cold, h_hot, h_cold, q, G, hot_in, cold_in, inlets,
                       guesses)
        if passes == 1 and guesses is not None and base.G[0] == G[0] and base.duty != duty:
            slope = (march.per_metre - base.per_metre) / (duty - base.duty)
        if slope is not None:
            march = replace(march, per_metre_slope=slope)
        change = _change(march.new_hot, p_hot, march.new_cold, p_cold, hot_in, cold_in)
        settled = change <= PRESSURE_RTOL or not np.all(np.isfinite(march.lengths))
        if settled or change <= rtol:
            break
        p_hot, p_cold, guesses = _estimate(march, h_hot, h_cold, q, G, hot_in, cold_in)
    settled = settled or rtol <= PRESSURE_RTOL  # after PRESSURE_PASSES the last change stands
    h_i, h_o, re_i, re_o, v_i, v_o, ma_i, ma_o, (reg_i, reg_o), conductance = march.details
    profile = ExchangerProfile(q / (hot_flow if hot_flow else 1.0), march.hot.T, march.cold.T, p_hot, p_cold)
    return RatedProfile(profile, march.lengths, h_i, h_o, re_i, re_o, v_i, v_o, ma_i, ma_o, reg_i, reg_o,
                        conductance, passes, settled, march)


def _change(new_hot, p_hot, new_cold, p_cold, hot_in, cold_in):
    """Largest move of a boundary pressure, as a share of its stream's inlet pressure."""
    return max(float(np.max(np.abs(new_hot - p_hot))) / hot_in.p, float(np.max(np.abs(new_cold - p_cold))) / cold_in.p)


def _new_pressures(lengths, v_hot, v_cold, friction_hot, friction_cold, G, hot_in, cold_in):
    """Boundary pressures from the zones' lengths and the streams' specific volumes at the
    boundaries [m3/kg]: friction (on each zone's mean volume) and acceleration."""
    dx = np.where(np.isfinite(lengths), lengths, 0.0)
    dp_hot = friction_hot * dx * 0.5 * (v_hot[:-1] + v_hot[1:]) + G[0] ** 2 * (v_hot[:-1] - v_hot[1:])
    dp_cold = friction_cold * dx * 0.5 * (v_cold[:-1] + v_cold[1:]) + G[1] ** 2 * (v_cold[1:] - v_cold[:-1])
    new_hot = hot_in.p - np.concatenate([np.cumsum(dp_hot[::-1])[::-1], [0.0]])  # from the warm end
    new_cold = cold_in.p - np.concatenate([[0.0], np.cumsum(dp_cold)])           # from the cold end
    return new_hot, new_cold


def _zone_grid(geometry, hot_in, hot_flow, cold_in, cold_flow, duty, zones):
    """The zone boundaries of a duty [W]: cumulative duty from the cold end [W], both streams'
    enthalpies [J/kg] there, and the mass fluxes (tubes, annuli) [kg/(m2 s)]."""
    q = np.linspace(0.0, duty, zones + 1)
    h_hot = hot_in.h - (duty - q) / hot_flow
    h_cold = cold_in.h + q / cold_flow
    return q, h_hot, h_cold, (hot_flow / geometry.tube_area, cold_flow / geometry.annulus_area)


def estimated_length(rated, geometry, hot_in, hot_flow, cold_in, cold_flow, duty):
    """The length [m] a tube-in-tube exchanger needs to pass ``duty`` [W], estimated with no
    property call on the linear model of the march of ``rated`` (a :class:`RatedProfile` of the
    same inlet states): its states' sensitivities, its conductances per metre and friction
    frozen, the pressures settled as in :func:`rate`.  None where the model leaves its range.
    What a root finder steps on between ratings."""
    base = getattr(rated, "base", None)
    if base is None or base.inlets != (hot_in.p, hot_in.h, cold_in.p, cold_in.h):
        return None
    q, h_hot, h_cold, G = _zone_grid(geometry, hot_in, hot_flow, cold_in, cold_flow, duty, len(base.h_hot) - 1)
    # The model misses by about the square of the relative step from its march (times a factor of
    # order one): its pressures need settle no closer than a hundredth of that.
    step = (duty - base.duty) / base.duty if base.duty else 1.0
    _, _, guesses, lengths = _estimate(base, h_hot, h_cold, q, G, hot_in, cold_in, lengths=True,
                                       rtol=max(0.1 * PRESSURE_RTOL, 1e-2 * step * step))
    if guesses is None or lengths is None or not np.all(np.isfinite(lengths)):
        return None
    return float(np.sum(lengths))


def _estimate(base, h_hot, h_cold, q, G, hot_in, cold_in, passes=40, lengths=False, rtol=0.1 * PRESSURE_RTOL):
    """Boundary pressures at enthalpies ``h_hot``, ``h_cold`` on the linear model of the march
    ``base``, iterated until they settle (to ``rtol`` of the inlet pressures, by default a tenth
    of :data:`PRESSURE_RTOL`); and the states' temperatures and densities there, as the next
    march's starting guesses (with ``lengths``, also the zones' lengths on the model [m]).

    The two streams are one (2, zones + 1) array (row 0 the hot stream) so that a settling pass
    costs a few NumPy operations; its arithmetic is that of :func:`_new_pressures`.
    """
    model = base.recent.get("model")
    if model is None:  # the march's arrays, both streams stacked
        hot, cold = base.hot, base.cold
        model = base.recent["model"] = tuple(np.stack(pair) for pair in (
            (base.h_hot, base.h_cold), (hot.T, cold.T), (hot.dT_dh, cold.dT_dh), (hot.density, cold.density),
            (hot.drho_dh, cold.drho_dh), (hot.dT_dp, cold.dT_dp), (hot.drho_dp, cold.drho_dp),
            (base.p_hot, base.p_cold)))
    h_base, T_base, dT_dh, r_base, drho_dh, dT_dp, drho_dp, p_base = model
    dh = np.stack([h_hot, h_cold]) - h_base
    T0 = T_base + dT_dh * dh
    r0 = r_base + drho_dh * dh
    per_metre = base.per_metre
    if base.per_metre_slope is not None and G[0] == base.G[0]:
        moved = per_metre + base.per_metre_slope * (q[-1] - base.duty)
        per_metre = moved if moved.min() > 0 else per_metre
    metres_per_kelvin = np.diff(q) / per_metre  # a zone's length times its log-mean difference
    # A flow other than the base's: friction scaled with the square of the mass flux (the friction
    # factors and conductances kept: an estimate, checked by the next march); halved, as it acts on
    # the sum of a zone's two boundary volumes.
    friction = 0.5 * np.stack([base.friction_hot * (G[0] / base.G[0]) ** 2,
                               base.friction_cold * (G[1] / base.G[1]) ** 2])
    # Acceleration: G^2 (v_out - v_in) of each stream, (v_cold - v_warm) for the hot one flowing to
    # the cold end, (v_warm - v_cold) for the return gas.
    accel = np.array([[G[0] ** 2], [-G[1] ** 2]])
    p_in = np.array([[hot_in.p], [cold_in.p]])
    tol = rtol * p_in
    cumulative = np.zeros_like(p_base)
    p = np.stack(_settle_start(base, q[-1]))
    settled = False
    for _ in range(passes):
        dp = p - p_base
        T = T0 + dT_dp * dp
        r = r0 + drho_dp * dp
        if r.min() <= 0:
            break
        gap = T[0] - T[1]
        a, b = gap[1:], gap[:-1]
        if a.min() <= 0 or b.min() <= 0:
            break
        zone_lengths = metres_per_kelvin / _lmtd(a, b)
        v = 1.0 / r
        drop = friction * zone_lengths * (v[:, :-1] + v[:, 1:]) + accel * (v[:, :-1] - v[:, 1:])
        np.cumsum(drop, axis=1, out=cumulative[:, 1:])
        # The hot stream loses from the warm end (index -1) down, the cold one from the cold end up.
        new = np.stack([hot_in.p - cumulative[0, -1] + cumulative[0], cold_in.p - cumulative[1]])
        settled = (np.abs(new - p) <= tol).all()
        p = new
        if settled:
            break
    else:
        settled = True  # after ``passes`` the last pressures stand
    if not settled or (p.min(axis=1) <= 0.05 * p_in[:, 0]).any():
        # The model leaves its range: march from the base's pressures.
        return (base.new_hot, base.new_cold, None) + ((None,) if lengths else ())
    base.recent["settled"] = base.recent.get("settled", [])[-1:] + [(float(q[-1]), p[0], p[1])]
    return (p[0], p[1], ((T[0], r[0]), (T[1], r[1]))) + ((zone_lengths,) if lengths else ())


def _settle_start(base, duty):
    """Where the pressures on the model of the march ``base`` start settling at ``duty`` [W]: on
    the line through the last two duties settled on it (its own new pressures before any)."""
    seen = base.recent.get("settled", [])
    if not seen:
        return base.new_hot, base.new_cold
    q1, hot1, cold1 = seen[-1]
    if len(seen) == 1 or seen[0][0] == q1:
        return hot1, cold1
    q0, hot0, cold0 = seen[0]
    w = (duty - q1) / (q1 - q0)
    return hot1 + w * (hot1 - hot0), cold1 + w * (cold1 - cold0)


def _march(fluid, geometry, wall, key, p_hot, p_cold, h_hot, h_cold, q, G, hot_in, cold_in, inlets, guesses):
    """One pass: both streams' states at the given boundary pressures, each zone's coefficients,
    length and pressure drop, and the boundary pressures they give."""
    from properties import PropertyRangeError

    n = len(q) - 1
    try:
        # The hot stream is marched from the warm end, where its state is known.
        hot_guess = (guesses[0][0][::-1], guesses[0][1][::-1]) if guesses else None
        hot = fluid.march_ph(p_hot[::-1], h_hot[::-1], hot_guess, first=(hot_in.T, hot_in.density))
        hot = type(hot)(*(a[::-1] for a in hot))
        cold = fluid.march_ph(p_cold, h_cold, guesses[1] if guesses else None)
    except PropertyRangeError as err:
        raise ScenarioError(f"{key}.geometry: {err}") from None
    T_hot, T_cold = hot.T, cold.T.copy()
    T_cold[0] = cold_in.T
    cold = cold._replace(T=T_cold)
    wet = np.flatnonzero(np.isfinite(hot.quality))
    if wet.size == 0 and hot_in.p < fluid.p_critical:
        wet = [k for k in range(n) if _two_phase(fluid, 0.5 * (p_hot[k] + p_hot[k + 1]), h_hot[k], h_hot[k + 1])]
    Th, Tc = 0.5 * (T_hot[:-1] + T_hot[1:]), 0.5 * (T_cold[:-1] + T_cold[1:])
    rho_h, rho_c = 0.5 * (hot.density[:-1] + hot.density[1:]), 0.5 * (cold.density[:-1] + cold.density[1:])
    try:
        if len(wet):
            raise PropertyRangeError("two-phase")
        mu_h, k_h, cp_h, a_h = fluid.transport_td(Th, rho_h)
    except PropertyRangeError:
        k = min(wet[0] if len(wet) else n - 1, n - 1)
        ph = 0.5 * (p_hot[k] + p_hot[k + 1])
        raise ScenarioError(
            f"{key}.geometry: the high-pressure stream would condense in zone {n - k} of {n} from the warm end (at "
            f"{ph / 1e5:.4g} bar, {Th[k]:.2f} K): no condensation correlation is used; raise high_pressure "
            f"above the critical pressure or give the recuperator by ua") from None
    try:
        mu_c, k_c, cp_c, a_c = fluid.transport_td(Tc, rho_c)
    except PropertyRangeError:  # a zone's mean state on the dew line: a hair into the vapour
        props = [fluid.transport(T * (1 + 1e-6) + 1e-6, 0.5 * (p_cold[j] + p_cold[j + 1])) for j, T in enumerate(Tc)]
        mu_c, k_c, cp_c, _, a_c = (np.array(c) for c in zip(*props))
    d_t, d_a, a = geometry.inner_inside, geometry.annulus_hydraulic_diameter, geometry.diameter_ratio
    re_i, re_o = G[0] * d_t / mu_h, G[1] * d_a / mu_c
    nu_i, f_i, reg_i = hx.tube_zones(re_i, mu_h * cp_h / k_h, d_t, geometry.roughness, geometry.coil_diameter)
    nu_o, f_o, reg_o = hx.annulus_zones(re_o, mu_c * cp_c / k_c, a, d_a)
    h_i, h_o = nu_i * k_h / d_t, nu_o * k_c / d_a
    per_metre = geometry.conductance_per_length(h_i, h_o, wall.at(0.5 * (Th + Tc)))
    lmtd = _lmtd(T_hot[1:] - T_cold[1:], T_hot[:-1] - T_cold[:-1])
    touching = lmtd <= 0
    with np.errstate(divide="ignore"):
        lengths = np.where(touching, np.inf, np.diff(q) / (per_metre * np.where(touching, 1.0, lmtd)))
    conductance = np.where(touching, np.inf, per_metre * lengths)
    friction_hot, friction_cold = f_i * G[0] ** 2 / (2.0 * d_t), f_o * G[1] ** 2 / (2.0 * d_a)
    new_hot, new_cold = _new_pressures(lengths, 1.0 / hot.density, 1.0 / cold.density, friction_hot, friction_cold,
                                       G, hot_in, cold_in)
    if np.min(new_hot) <= 0.05 * hot_in.p or np.min(new_cold) <= 0.05 * cold_in.p:
        raise PressureCollapseError(
            f"{key}.geometry: a pressure would fall below 5 % of its inlet value along the exchanger at this flow and duty (the "
            f"friction of the passages is far too high for the length needed): use wider or more tubes")
    v_i, v_o = G[0] / rho_h, G[1] / rho_c
    details = (h_i, h_o, re_i, re_o, v_i, v_o, v_i / a_h, v_o / a_c, (tuple(reg_i), tuple(reg_o)), conductance)
    return _Pass(h_hot, h_cold, p_hot, p_cold, hot, cold, per_metre, friction_hot, friction_cold, lengths, new_hot,
                 new_cold, inlets, G, float(q[-1]), details)


def _two_phase(fluid, p, h_a, h_b):
    """Whether a zone between enthalpies ``h_a`` and ``h_b`` at ``p`` (below the critical
    pressure) reaches inside the saturation dome."""
    liquid, vapour = fluid.saturated_liquid(p), fluid.saturated_vapour(p)
    return min(h_a, h_b) < vapour.h and max(h_a, h_b) > liquid.h


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
