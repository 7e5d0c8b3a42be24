"""Linde-Hampson flowsheets: unit operations wired by named streams, and the recycle solve.

Three layouts share one solve:

- **simple**: compressor -> aftercooler -> recuperator -> valve -> separator; the vapour
  returns through the recuperator and mixes with make-up gas at compressor suction.
- **precooled**: warm recuperator -> precooler -> cold recuperator -> valve; the return gas
  passes back through both recuperators.
- **dual-pressure**: two-section compression low -> intermediate -> high; after the
  recuperator the high-pressure stream is throttled to the intermediate pressure, a fraction
  returns through the recuperator to the high-pressure section, the rest is throttled to the
  low pressure into the separator.

The recycle: the return flow depends on the yield, which depends on what the recuperator does
with that return flow.  The tear variable of each recuperator is its duty Q per kg of
compressor flow.  Given Q, the high-pressure outlet, the valves, the separator (with the heat
leak) and so the yield and the return flows follow in order; the recuperator's sizing equation
(effectiveness, minimum approach or UA) is the residual, driven to zero by
:func:`scipy.optimize.brentq`.  In the precooled layout the precooler fixes the temperature
between the two recuperators, so the cold one is solved first and the warm one after it.
"""

from dataclasses import dataclass
import math
import warnings

from scipy.optimize import RootResults, brentq, minimize_scalar

from cycle.equipment import Aftercooler, Compressor, MakeupMixer, Recuperator, Separator, ThrottleValve
from cycle.processes import ideal_work_of_liquefaction  # noqa: F401 (a textbook relation, re-exported)
from cycle.errors import (NoLiquefactionError, PressureCollapseError, RecycleNotConvergedWarning, ScenarioError,
                          TemperatureCrossError, UnreachableSizingError)
from cycle.results import CycleResult, RecuperatorResult, SolveReport, StreamState

# Relative tolerance of the tear variable; property flashes are good to ~1e-10 in h.
DUTY_RTOL = 1e-10
# What "converged" means: the sizing quantity the user gave is reached to within this
# (effectiveness absolute [-], minimum approach absolute [K], UA relative to the target [-]).
UA_RTOL = 1e-6
# An effectiveness of several cold streams carries the round-off of the flashes behind them
# (about 1e-9), so its tolerance is 1e-7: far below the three or four digits a design gives.
SIZING_TOLERANCE = {"effectiveness": 1e-7, "min_approach": 1e-6, "ua": UA_RTOL, "length": UA_RTOL}
# Relative size [-] of the work below which a negative exergy loss is round-off (and shown as 0).
LOSS_ROUND_OFF = 1e-8
# A compressor volume flow at suction: passes of the whole solve, and the relative miss of the
# volume flow at which they stop.
SUCTION_ITERATIONS = 12
SUCTION_RTOL = 1e-7
# Streams closer than this [K] touch: below the resolution of the property data, the exchanger
# is a perfect one and its UA is reported as unbounded (null).
TOUCH_APPROACH = 1e-6


# -- textbook relations -------------------------------------------------------------------

def ideal_yield(fluid, T, p_low, p_high):
    """Yield of the ideal simple Linde-Hampson cycle, y = (h1 - h2) / (h1 - hf).

    States 1 and 2 are at temperature ``T`` [K] and the low and high pressure [Pa], f is
    saturated liquid at the low pressure; the recuperator is perfect (effectiveness 1) and
    the cycle has no heat leak or pressure drop.  With ``T`` the precooler temperature this
    is also the yield of an ideal precooled cycle's cold section.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.4
    (simple Linde-Hampson system) and sec. 3.6 (precooled Linde-Hampson system).
    """
    h1 = fluid.state_tp(T, p_low).h
    h2 = fluid.state_tp(T, p_high).h
    hf = fluid.saturated_liquid(p_low).h
    return (h1 - h2) / (h1 - hf)


def finite_effectiveness_yield(fluid, T, p_low, p_high, effectiveness):
    """Yield of the simple cycle with a recuperator of effectiveness epsilon.

    ``y = [(h1 - h2) - (1 - eps)(h1 - hg)] / [(h1 - hf) - (1 - eps)(h1 - hg)]`` with g
    the saturated vapour at the low pressure.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.5
    (effect of heat-exchanger effectiveness on the Linde-Hampson system).
    """
    h1 = fluid.state_tp(T, p_low).h
    h2 = fluid.state_tp(T, p_high).h
    hf = fluid.saturated_liquid(p_low).h
    hg = fluid.saturated_vapour(p_low).h
    loss = (1.0 - effectiveness) * (h1 - hg)
    return ((h1 - h2) - loss) / ((h1 - hf) - loss)


def dual_pressure_ideal_yield(fluid, T, p_low, p_mid, p_high, recirculated_fraction):
    """Yield of the ideal dual-pressure cycle, y = [(h1 - h3) - i (h1 - h2)] / (h1 - hf).

    States 1, 2, 3 are at temperature ``T`` [K] and the low, intermediate and high pressure
    [Pa]; i is the fraction of the high-pressure flow recirculated at the intermediate
    pressure; the recuperator is perfect.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.7
    (Linde dual-pressure system).
    """
    h1 = fluid.state_tp(T, p_low).h
    h2 = fluid.state_tp(T, p_mid).h
    h3 = fluid.state_tp(T, p_high).h
    hf = fluid.saturated_liquid(p_low).h
    return ((h1 - h3) - recirculated_fraction * (h1 - h2)) / (h1 - hf)


# -- one recuperator seen from its tear variable ------------------------------------------

@dataclass
class Section:
    """A recuperator in a flowsheet: the fixed hot inlet, and the cold streams as they
    follow from a trial duty.

    Parameters
    ----------
    fluid : properties.Fluid
    recuperator : cycle.equipment.Recuperator
    hot_in : properties.State
    colds_of : callable
        ``colds_of(duty) -> [(inlet state, flow), ...]`` for a trial duty [J/kg compressed].
    T_floor : float
        Coldest cold-stream inlet temperature [K]: the hot stream cannot leave below it.
    flow_of : callable, optional
        ``flow_of(duty) -> compressor flow [kg/s]``, for a recuperator given by its geometry.
    cold_fluid : properties.Fluid, optional
        The cold streams' fluid where it is not ``fluid`` (hydrogen of another para fraction).
    """

    fluid: object
    recuperator: Recuperator
    hot_in: object
    colds_of: object
    T_floor: float
    calls: int = 0
    flow_of: object = None  # duty -> compressor flow [kg/s], for a recuperator given by its geometry
    cold_fluid: object = None  # the cold streams' fluid, where it is not the hot stream's

    def __post_init__(self):
        self._profiles = {}
        self.collapsed = []  # duties at which a rated exchanger's pressures would collapse

    def profile(self, duty, rough=False):
        """The march at ``duty`` (remembered: a root finder asks for the same duty again);
        ``rough``: a rated exchanger's pressures need not be settled (one march: a root finder's
        step), and a rough rating remembered is made again, settled, when one is asked for."""
        found = self._profiles.get(duty)
        if found is None or not (rough or found.rating is None or found.rating.settled):
            self.calls += 1
            flow = self.flow_of(duty) if self.recuperator.geometry is not None else None
            found = self.recuperator.profile(self.fluid, self.hot_in, self.colds_of(duty), duty, flow=flow,
                                             cold_fluid=self.cold_fluid, rough=rough)
            if len(self._profiles) > 64:
                self._profiles.clear()
            self._profiles[duty] = found
        return found

    def estimator(self, duty):
        """From the march at ``duty`` (made first if need be), ``estimate(duty) -> (min approach
        [K], UA per unit flow)`` at other duties with no property call, or None
        (:meth:`cycle.equipment.Recuperator.estimator`)."""
        self.profile(duty)
        found = self.recuperator.estimator(self.fluid, self.hot_in, self.colds_of(duty), duty, self.cold_fluid)
        return None if found is None else (lambda d: found(d, self.colds_of(d)))

    def length_estimator(self, duty):
        """From the rating at ``duty`` (made first if need be), ``estimate(duty) -> length [m]``
        at other duties with no property call, or None
        (:meth:`cycle.equipment.Recuperator.length_estimator`)."""
        found = self.recuperator.length_estimator(self.profile(duty, rough=True).rating, self.hot_in)
        if found is None:
            return None
        return lambda d: found(d, self.colds_of(d), self.flow_of(d))

    def duty_for_outlet(self, approach, Q_hi):
        """Duty at which the cold streams leave ``approach`` [K] below the hot inlet temperature
        (no march: only the end states).  The first guess of a minimum-approach solve; exact
        where the pinch is at the warm end."""
        fl, hot = self.cold_fluid or self.fluid, self.hot_in
        T_out = hot.T - approach

        def gap(duty):
            colds = self.colds_of(duty)
            wanted = sum(f * (fl.state_tp(T_out, self.recuperator.cold_outlet_pressure(st.p)).h - st.h)
                         for st, f in colds if f > 0 and T_out > st.T)
            return duty - wanted

        try:
            return brentq(gap, 0.0, Q_hi, xtol=1e-6 * Q_hi)
        except ValueError:
            return 0.5 * Q_hi

    def duty_from_ntu(self, ua, flow, Q_hi):
        """Duty of a counterflow exchanger of conductance ``ua`` [W/K] at ``flow`` [kg/s] by the
        effectiveness-NTU relation with mean heat capacities (a first guess for a UA solve).

        References
        ----------
        W. M. Kays and A. L. London, *Compact Heat Exchangers*, 3rd ed., McGraw-Hill, 1984
        (counterflow effectiveness-NTU relation).
        """
        import math as _m

        fl, hot = self.cold_fluid or self.fluid, self.hot_in
        span = hot.T - self.T_floor
        if not (_m.isfinite(flow) and flow > 0 and span > 0):
            return 0.5 * Q_hi
        colds = self.colds_of(0.5 * Q_hi)
        C_cold = sum(f * (fl.state_tp(hot.T, self.recuperator.cold_outlet_pressure(st.p)).h - st.h)
                     for st, f in colds if f > 0) / span
        C_hot = self.recuperator.max_hot_duty(self.fluid, hot, self.T_floor) / span
        C_min, C_max = min(C_cold, C_hot), max(C_cold, C_hot)
        ntu = ua / (flow * C_min)
        r = C_min / C_max
        if abs(1.0 - r) < 1e-9:
            eps = ntu / (1.0 + ntu)
        else:
            e = _m.exp(-ntu * (1.0 - r))
            eps = (1.0 - e) / (1.0 - r * e)
        return min(max(eps * C_min * span, 1e-6 * Q_hi), Q_hi * (1 - 1e-6))

    def effectiveness(self, duty):
        return self.recuperator.effectiveness(self.fluid, self.hot_in, self.colds_of(duty), duty, self.cold_fluid)

    def max_duty(self, limit_effectiveness):
        """Largest duty the second law allows: the hot stream cooled to the coldest inlet, or
        (``limit_effectiveness``) the cold streams warmed to the hot inlet temperature."""
        Q = self.recuperator.max_hot_duty(self.fluid, self.hot_in, self.T_floor)
        if limit_effectiveness and self.effectiveness(Q) > 1.0:
            Q = brentq(lambda d: self.effectiveness(d) - 1.0, 0.0, Q, xtol=DUTY_RTOL * Q, rtol=1e-14)
        return Q


def solve_section(section, flow_of=None, lowest_duty=0.0, xtol=None, maxiter=200):
    """Find the duty at which a recuperator meets its sizing.

    The root-finder works on the duty, but the solve is judged on the quantity the user gave:
    it is converged only where the achieved effectiveness, minimum approach or UA is within
    :data:`SIZING_TOLERANCE` of the target.  Where the target lies beyond what the streams can
    use (a UA so large that the streams would have to touch), the result is that of the
    limiting, perfect exchanger and the report says by how much the target was missed.

    Parameters
    ----------
    section : Section
    flow_of : callable, optional
        ``flow_of(duty) -> compressor flow [kg/s]`` (inf where no liquid forms); needed for ``ua``.
    lowest_duty : float
        Duty below which no liquid forms (where the flow depends on the yield) [J/kg].
    xtol : float, optional
        Absolute tolerance on the duty [J/kg]; default 1e-10 of the largest duty.
    maxiter : int
        Passed to :func:`scipy.optimize.brentq`.

    Returns
    -------
    duty : float
    profile : cycle.processes.ExchangerProfile
    report : cycle.results.SolveReport
    """
    rec = section.recuperator
    spec, key = rec.spec, rec.key
    mode = spec.mode
    Q_hi = section.max_duty(limit_effectiveness=mode != "effectiveness")
    tol = xtol if xtol is not None else DUTY_RTOL * Q_hi
    root = None

    if mode == "effectiveness":
        target, unit = spec.effectiveness, "-"

        def residual(duty):
            section.calls += 1
            return section.effectiveness(duty) - target

        f_hi = residual(Q_hi)
        if f_hi < 0:
            raise UnreachableSizingError(
                f"{key}.effectiveness {target:g} cannot be reached: the high-pressure stream would have to "
                f"leave colder than the returning gas ({section.T_floor:.2f} K); the most this exchanger "
                f"can reach here is {section.effectiveness(Q_hi):.4f}")
        if f_hi == 0.0:
            duty = Q_hi
        else:
            duty, root = brentq(residual, 0.0, Q_hi, xtol=tol, rtol=1e-14, maxiter=maxiter,
                                full_output=True, disp=False)
        achieved = section.effectiveness(duty)
        crossed = section.profile(duty)
        if crossed.min_approach < -SIZING_TOLERANCE["min_approach"]:
            k = crossed.min_approach_index
            raise TemperatureCrossError(
                f"{key}.effectiveness {target:g} is not reachable by a counterflow exchanger here: the stream "
                f"temperatures would cross inside it (the returning side {-crossed.min_approach:.3g} K above the "
                f"high-pressure side at {crossed.hot_T[k]:.1f} K), and heat cannot flow from cold to hot; lower "
                f"the effectiveness, or size the recuperator by min_approach")
    elif mode == "min_approach":
        target, unit = spec.min_approach, "K"

        def residual(duty):
            try:
                return section.profile(duty).min_approach - target
            except PressureCollapseError:  # a duty whose length the passages cannot carry: too large
                return -target - 1e3

        if target <= TOUCH_APPROACH and residual(Q_hi) > -SIZING_TOLERANCE["min_approach"]:
            duty = Q_hi  # the streams touch at the largest duty
        else:
            if target >= section.hot_in.T - section.T_floor:
                raise NoLiquefactionError(
                    f"no liquid: {key}.min_approach {target:g} K is more than the temperature difference "
                    f"between the high-pressure inlet ({section.hot_in.T:.2f} K) and the returning gas "
                    f"({section.T_floor:.2f} K)")
            guess = section.duty_for_outlet(target, Q_hi)
            lo, hi = _bracket(residual, guess, 0.0, Q_hi, decreasing=True)
            if lo != hi and (residual(lo) > 0) == (residual(hi) > 0):
                ends = sorted((residual(0.0) + target, residual(Q_hi) + target))
                raise UnreachableSizingError(
                    f"{key}.min_approach {target:g} K cannot be reached: from no duty to the largest the second "
                    f"law allows, the pinch stays between {ends[0]:.3g} and {ends[1]:.3g} K")
            if lo == hi:  # the first guess was the root (the pinch at the warm end)
                duty = lo
            else:
                duty, root = brentq(residual, lo, hi, xtol=tol, rtol=1e-14, maxiter=maxiter,
                                    full_output=True, disp=False)
        achieved = section.profile(duty).min_approach
    elif mode == "length":
        target, unit = spec.geometry.length, "m"
        duty, root, achieved, tol = _solve_length(section, lowest_duty, Q_hi, tol, maxiter)
        if target - achieved > SIZING_TOLERANCE["length"] * target and any(d > duty for d in section.collapsed):
            # The length needed stops short of the one given where the friction takes the pressures
            # down: the passages cannot carry this flow over that length.
            raise ScenarioError(
                f"{key}.geometry: the passages cannot carry this flow over {target:g} m: beyond about "
                f"{achieved:.4g} m a pressure would fall below 5 % of its inlet value along the exchanger (the "
                f"friction is far too high); use wider or more tubes, or a shorter exchanger")
    else:
        target, unit = spec.ua, "W/K"
        duty, root, achieved = _solve_ua(section, flow_of, lowest_duty, Q_hi, tol, maxiter)

    res = achieved - target
    allowed = SIZING_TOLERANCE[mode] * (target if mode in ("ua", "length") else 1.0)
    profile = section.profile(duty)
    if abs(res) <= allowed:
        status = "met"
        message = root.flag if root is not None else "the first guess or the bracket end is the root"
    elif profile.min_approach <= TOUCH_APPROACH or duty >= Q_hi * (1.0 - 1e-12):
        status = "limit"
        message = _limit_message(key, mode, target, achieved, res, profile, unit)
    else:
        status = "missed"
        u = "" if unit == "-" else f" {unit}"
        message = (f"{key}.{mode} reached {achieved:.10g}{u} against the {target:g}{u} asked for (off by "
                   f"{res:+.3g}{u}, more than the {allowed:.1g}{u} allowed) after "
                   f"{root.iterations if root is not None else 0} iterations"
                   f"{'; the root-finder says: ' + root.flag if root is not None else ''}")
    report = SolveReport(
        converged=status == "met" and (bool(root.converged) if root is not None else True),
        iterations=int(root.iterations) if root is not None else 0,
        function_calls=section.calls,
        method=getattr(root, "method", None) or "brentq",
        residual=float(res),
        residual_unit=unit,
        tolerance=float(tol),
        message=message,
        tear_variable=f"{key} duty per kg of compressor flow [J/kg]",
        target=float(target),
        achieved=float(achieved),
        residual_tolerance=float(allowed),
        status=status,
    )
    return duty, profile, report


def _state_at_end(fluid, p, h, T):
    """The state at ``p`` [Pa], ``h`` [J/kg] at an exchanger's end, started from the march's
    temperature ``T`` [K] there (the flash where that start cannot be had)."""
    from properties import PropertyRangeError

    try:
        near = fluid.state_tp(T, p)
    except (PropertyRangeError, ValueError):
        return fluid.state_ph(p, h)
    return fluid.state_ph(p, h, guess=(near.T, near.density))


def _limit_message(key, mode, target, achieved, res, profile, unit):
    """Why a sizing target lies beyond what the streams can use, in words."""
    k = profile.min_approach_index
    last = len(profile.duty) - 1
    where = ("at the warm end" if k == last else "at the cold end" if k == 0
             else f"{profile.duty[k] / profile.duty[-1]:.0%} of the duty from the cold end")
    if profile.min_approach <= TOUCH_APPROACH:
        why = (f"at {achieved:.4g} {unit} the streams are already within {TOUCH_APPROACH:g} K of each other "
               f"{where} (the resolution of the property data)")
    else:
        why = (f"at {achieved:.4g} {unit} the duty is already the largest the second law allows (pinch "
               f"{profile.min_approach:.3g} K {where})")
    return (f"{key}.{mode} {target:g} {unit} is more than these streams can use: {why}, so the "
            f"{key.replace('_', ' ')} acts as a perfect one and more UA changes nothing; the target is missed: "
            f"{-res:.4g} {unit} ({-100.0 * res / target:.1f} %) of it is more than the streams can use, and the "
            f"result is that of the perfect exchanger")


def _bracket(f, guess, lo, hi, decreasing, step=None):
    """A bracket [a, b] of a root of the monotone ``f`` between ``lo`` and ``hi``, searched
    outwards from ``guess`` in steps that double from ``step`` (default 1 % of the span; each
    evaluation is a march)."""
    f0 = f(guess)
    if f0 == 0.0:
        return guess, guess
    up = (f0 > 0) == decreasing  # the root lies above the guess
    step = 0.01 * (hi - lo) if step is None else step
    a = guess
    while True:
        b = min(hi, a + step) if up else max(lo, a - step)
        fb = f(b)
        if (fb > 0) != (f0 > 0) or b in (lo, hi):
            return (a, b) if up else (b, a)
        a, f0, step = b, fb, 2.0 * step


# Marches Newton's method on estimated profiles may take before the bracketing solve takes over.
ESTIMATE_STEPS = 8


def _secant_on_model(residual, duty, value, slope, lowest_duty, Q_hi, floor, curved=False):
    """Secant steps on a model's ``residual`` (cheap: no property call) from ``duty``, where it
    is ``value``, and a first ``slope``, to its root: (root, last slope), or None where the model
    gives no value.  Far from ``duty`` the next march corrects what the model misses, so the
    steps need only settle to a thousandth of the distance from it (near it, to ``floor``); a
    step past an end of the range goes halfway to it, and one to where the model gives no value
    (its streams cross) is halved until it does.  With ``curved``, from the third point on, the
    step is that of inverse quadratic interpolation through the last three where they bracket
    the root (two evaluations fewer a rated exchanger's first model, whose residual is curved
    over the step; near the perfect exchanger a UA's residual is not well fitted by it)."""
    x0, g0 = duty, value
    seen = [(x0, g0)]
    for _ in range(40):
        x1 = x0 - g0 / slope
        if curved and len(seen) >= 3:
            x1 = _inverse_quadratic(seen[-3:], x0, x1)
        if not lowest_duty < x1 < Q_hi:
            x1 = 0.5 * (x0 + (Q_hi if x1 >= Q_hi else lowest_duty))
        if abs(x1 - x0) <= max(floor, 1e-3 * abs(x1 - duty)):
            return x1, slope
        g1 = residual(x1)
        for _ in range(8):
            if g1 is not None:
                break
            x1 = 0.5 * (x0 + x1)
            g1 = residual(x1)
        if g1 is None or g1 == g0:
            return None
        slope = (g1 - g0) / (x1 - x0)
        x0, g0 = x1, g1
        seen.append((x0, g0))
    return None


def _inverse_quadratic(points, x_last, x_secant):
    """The root of the quadratic in the residual through three (duty, residual) ``points``
    (inverse quadratic interpolation, as in Brent's method) where their residuals are of both
    signs and it lies among them, no more than twice as far from ``x_last`` as the secant step
    ``x_secant``; otherwise the secant step."""
    (xa, ga), (xb, gb), (xc, gc) = points
    if ga == gb or gb == gc or ga == gc:
        return x_secant
    if min(ga, gb, gc) >= 0 or max(ga, gb, gc) <= 0:
        return x_secant
    x = (xa * gb * gc / ((ga - gb) * (ga - gc)) + xb * ga * gc / ((gb - ga) * (gb - gc))
         + xc * ga * gb / ((gc - ga) * (gc - gb)))
    if math.isfinite(x) and min(xa, xb, xc) < x < max(xa, xb, xc) and abs(x - x_last) <= 2.0 * abs(x_secant - x_last):
        return x
    return x_secant


def _steps_on_estimates(section, flow_of, target, guess, lowest_duty, Q_hi, tol):
    """The duty at which the UA meets ``target`` by Newton's method on the march: each real
    march at a duty is followed by the root, near it, of the UA of profiles estimated from that
    march by its linear sensitivities (:meth:`Section.estimator`, no property call),
    found by secant steps; the next march is made there.  The estimate is exact at the march
    and its error is of second order in the duty step, so the marches converge quadratically:
    three to five from the effectiveness-NTU guess where Brent's method needs eight.

    Returns (duty, report) once a step is within ``tol`` and the UA rises with the duty there
    (the branch of least compressor flow), with the last march at the duty returned; None where
    it cannot go on (no estimate, streams touching, a step out of range, no convergence), and
    the bracketing solve takes over (the marches made are remembered).
    """

    # The residual on 1/UA, 1/target - 1/UA: it falls to zero where the UA climbs steeply (the
    # streams closing in), so secant steps from such a guess take fewer evaluations.
    def estimated(duty):
        m = flow_of(duty)
        found = model(duty) if math.isfinite(m) else None
        if found is None or found[0] <= TOUCH_APPROACH:
            return None
        return 1.0 / target - 1.0 / (m * found[1])

    duty, slope = guess, None
    for step in range(1, ESTIMATE_STEPS + 1):
        m = flow_of(duty)
        if not math.isfinite(m):
            return None
        prof = section.profile(duty)  # the march
        if prof.min_approach <= TOUCH_APPROACH:
            return None
        x0, g0 = duty, 1.0 / target - 1.0 / (m * prof.ua())
        if slope is not None and slope > 0 and abs(g0 / slope) <= 0.01 * tol:
            # The last slope puts the root within a hundredth of tol (a slope off by half would
            # still put it within tol): no model is needed to know this march is the answer.
            return duty, RootResults(duty, step, step, 0, method="newton-on-estimates")
        model = section.estimator(duty)
        if model is None:
            return None
        if slope is None:  # the first march: the slope of the estimate a small step away
            x1 = duty + max(1e-6 * Q_hi, 10.0 * tol) * (1.0 if duty < 0.5 * (lowest_duty + Q_hi) else -1.0)
            g1 = estimated(x1)
            if g1 is None or g1 == g0:
                return None
            slope = (g1 - g0) / (x1 - x0)
        found = _secant_on_model(estimated, x0, g0, slope, lowest_duty, Q_hi, 0.1 * tol)
        if found is None or not found[1] > 0:
            return None
        nxt, slope = found
        if abs(nxt - duty) <= tol:
            return duty, RootResults(duty, step, step, 0, method="newton-on-estimates")
        duty = nxt
    return None


def _solve_ua(section, flow_of, lowest_duty, Q_hi, tol, maxiter):
    """Duty that a recuperator of the given UA passes.

    Where the streams touch or cross, UA is infinite; the residual there is a large finite
    stand-in (a thousand times the target), which Brent's method treats as any other value
    of the right sign.  Returns (duty, Brent's report or None, the UA reached [W/K]).
    """
    key = section.recuperator.key
    target = section.recuperator.spec.ua
    stand_in = 1e3 * target

    def ua_abs(duty):
        m = flow_of(duty)
        if not math.isfinite(m):
            return stand_in
        prof = section.profile(duty)
        if prof.min_approach <= TOUCH_APPROACH:  # touching, to the resolution of the properties
            return stand_in
        return m * prof.ua()

    def excess(duty):
        return ua_abs(duty) - target

    if flow_of(0.0) != flow_of(Q_hi):
        # The flow is m_liq / y: UA(Q) falls, then rises as the streams close in.  The design
        # point is on the rising branch (least compressor flow): the first root above any duty
        # whose UA is below the target.  The effectiveness-NTU guess usually is one; otherwise
        # the least-UA duty is searched, and if even that UA is too large, no design exists.
        try:  # start where the exchanger would reach an effectiveness of 0.97 (no march needed)
            guess = brentq(lambda d: section.effectiveness(d) - 0.97, lowest_duty, Q_hi, xtol=1e-6 * Q_hi)
        except ValueError:
            guess = 0.5 * (lowest_duty + Q_hi)
        m = flow_of(guess)
        for _ in range(3):
            if not math.isfinite(m):
                break
            guess = section.duty_from_ntu(target, m, Q_hi)
            m = flow_of(guess)
        found = _steps_on_estimates(section, flow_of, target, guess, lowest_duty, Q_hi, tol)
        if found is not None and abs(excess(found[0])) <= UA_RTOL * target:
            return found[0], found[1], ua_abs(found[0])
        def too_small():
            found = minimize_scalar(ua_abs, bounds=(lowest_duty + 1e-9 * Q_hi, Q_hi), method="bounded",
                                    options={"xatol": 1e-4 * Q_hi})
            if found.fun > target:
                raise NoLiquefactionError(
                    f"{key}.ua {target:g} W/K is too small for this production: the least UA that makes it "
                    f"at these conditions is about {found.fun:.4g} W/K (and it needs "
                    f"{flow_of(found.x) * 3600:.4g} kg/h of compressor flow)")
            return found.x

        f0 = excess(guess)
        if f0 >= 0 and not excess(guess * (1 - 1e-3)) < f0:
            guess = too_small()  # not on the rising branch: find a duty below the target first
        lo, hi = _bracket(excess, guess, lowest_duty, Q_hi, decreasing=False)
        if lo != hi and (excess(lo) > 0) == (excess(hi) > 0):  # walked past the least UA
            lo, hi = _bracket(excess, too_small(), lowest_duty, Q_hi, decreasing=False)
    else:
        guess = section.duty_from_ntu(target, flow_of(0.5 * Q_hi), Q_hi)
        found = _steps_on_estimates(section, flow_of, target, guess, 0.0, Q_hi, tol)
        if found is not None and abs(excess(found[0])) <= UA_RTOL * target:
            return found[0], found[1], ua_abs(found[0])
        lo, hi = _bracket(excess, guess, 0.0, Q_hi, decreasing=False)
    if lo == hi:
        return lo, None, ua_abs(lo)
    if excess(lo) < 0 and excess(hi) < 0:
        # Even at the largest duty the streams allow, the UA asked for is not used up: the
        # exchanger is as good as a perfect one here.
        return hi, None, ua_abs(hi)
    duty, root = brentq(excess, lo, hi, xtol=tol, rtol=1e-14, maxiter=maxiter, full_output=True, disp=False)
    if abs(excess(duty)) <= UA_RTOL * target:
        return duty, root, ua_abs(duty)
    # A tolerance on the duty does not bound the UA where it climbs steeply (the streams closing
    # in, where UA grows like the log of the approach): bisect on, to the last representable duty
    # or to where the streams touch.
    a, b = (lo, hi) if excess(lo) < 0 else (hi, lo)
    a, b = (duty, b) if excess(duty) < 0 else (a, duty)
    for _ in range(200):
        mid = 0.5 * (a + b)
        if mid in (a, b):
            break
        f = excess(mid)
        if abs(f) <= UA_RTOL * target:
            return mid, root, ua_abs(mid)
        a, b = (mid, b) if f < 0 else (a, mid)
    if ua_abs(b) == stand_in:  # the streams touch at b: the result is the perfect exchanger's
        return b, root, ua_abs(a)
    return a, root, ua_abs(a)


# Duties at which a rated exchanger's length is first looked at, as fractions of the span from the
# least duty that makes liquid to the largest the second law allows.
LENGTH_SCAN = (0.05, 0.2, 0.4, 0.6, 0.75, 0.85, 0.92, 0.96, 0.98, 0.99, 0.995, 0.999)


def _length_steps(section, needed, target, duty, lowest_duty, Q_hi):
    """The duty at which a rated exchanger of a fixed flow needs ``target`` metres, by Newton's
    method on the ratings, as :func:`_steps_on_estimates` does for a UA: after each rating, the
    root of the length of the linear model built from it (its conductances per metre and
    friction frozen: :meth:`Section.length_estimator`) by secant steps on 1/length, and the next
    rating there.  Returns (duty, report, length reached, duty tolerance) once a rating meets the
    length to a tenth of its tolerance, or None (the bracketing solve takes over)."""
    allowed = 0.1 * SIZING_TOLERANCE["length"] * target
    slope = None
    for step in range(1, ESTIMATE_STEPS + 1):
        L = needed(duty, rough=True)
        if not (math.isfinite(L) and L > 0):
            return None
        if abs(L - target) <= allowed and slope is not None:
            if not section.profile(duty, rough=True).rating.settled:
                L = needed(duty)  # the pressures settled at this duty, the length checked again
            if abs(L - target) <= allowed:
                # The duty tolerance that meets the length to a tenth of its own: |dL/dQ| = L^2 |d(1/L)/dQ|.
                xtol = max(allowed / (target * target * abs(slope)), 4e-16 * Q_hi)
                return duty, RootResults(duty, step, step, 0, method="newton-on-estimates"), L, xtol
        model = section.length_estimator(duty)
        if model is None:
            return None

        def gap(d):
            found = model(d)
            return None if found is None or not found > 0 else 1.0 / found - 1.0 / target

        # The model's own value at the march (its pressures settled: a rough march's length differs
        # from it by about the pressures' change), so that its first secant slope is its own.
        x0, g0 = duty, gap(duty)
        if g0 is None:
            return None
        if slope is None:
            x1 = duty + 1e-6 * Q_hi * (1.0 if duty < 0.5 * (lowest_duty + Q_hi) else -1.0)
            g1 = gap(x1)
            if g1 is None or g1 == g0:
                return None
            slope = (g1 - g0) / (x1 - x0)
        found = _secant_on_model(gap, x0, g0, slope, lowest_duty, Q_hi, 4e-16 * Q_hi, curved=True)
        if found is None or not found[1] < 0:  # 1/length falls as the duty rises
            return None
        if abs(found[0] - x0) <= 1e-12 * Q_hi:  # no way on (the length is beyond what the streams can use)
            return None
        duty, slope = found
    return None


def _solve_length(section, lowest_duty, Q_hi, tol, maxiter):
    """Duty that a tube-in-tube exchanger of the given length passes (a rated exchanger).

    The length needed grows without bound as the streams close in at the largest duty; with a
    liquid-rate target it also grows where the flow does (little liquid).  The duties of
    :data:`LENGTH_SCAN` are marched; the design point is the first duty, from the least, at which
    the length needed rises through the length given (the branch of least compressor flow), refined
    by Brent's method.  Returns (duty, Brent's report or None, the length reached [m], the
    tolerance on the duty the root-finder worked to).
    """
    key = section.recuperator.key
    target = section.recuperator.spec.geometry.length

    def needed(duty, rough=False):
        if not math.isfinite(section.flow_of(duty)):
            return math.inf
        try:
            prof = section.profile(duty, rough=rough)
        except PressureCollapseError:
            section.collapsed.append(duty)
            return math.inf
        if prof.min_approach <= TOUCH_APPROACH:
            return math.inf
        return prof.rating.length

    if section.flow_of(0.0) == section.flow_of(Q_hi):
        # A fixed flow: the length needed rises with the duty, without bound as the streams close
        # in, so its inverse falls nearly linearly to zero there.  First guess from the
        # effectiveness-NTU relation with the conductance per metre of one march; a secant step
        # on 1/length from the two; a bracket around that; Brent's method on 1/length, stopped
        # when the duty is known well enough that the length is met to a tenth of its tolerance.
        try:
            d0 = brentq(lambda d: section.effectiveness(d) - 0.9, lowest_duty, Q_hi, xtol=1e-6 * Q_hi)
        except ValueError:
            d0 = 0.5 * (lowest_duty + Q_hi)
        L0 = needed(d0, rough=True)
        found = _length_steps(section, needed, target, d0, lowest_duty, Q_hi) if math.isfinite(L0) else None
        if found is not None:
            return found
        if math.isfinite(L0) and L0 > 0:
            def gap(d):  # 1/length needed - 1/length given [1/m]: rises as the duty falls
                return 1.0 / needed(d) - 1.0 / target

            per_metre = section.profile(d0).rating.ua / L0
            guess = section.duty_from_ntu(per_metre * target, section.flow_of(d0), Q_hi)
            guess = min(max(guess, lowest_duty), Q_hi)
            g0, g1 = gap(d0), gap(guess)
            slope = (g1 - g0) / (guess - d0) if guess != d0 and g1 != g0 else -abs(g0) / (Q_hi - lowest_duty)
            if slope < 0 and math.isfinite(needed(guess)):
                step = -g1 / slope
                estimate = min(max(guess + step, lowest_duty), Q_hi)
                # The duty tolerance that meets the length to a tenth of its own: |dL/dQ| = L^2 |d(1/L)/dQ|.
                xtol = max(0.1 * SIZING_TOLERANCE["length"] / (target * abs(slope)), 4e-16 * Q_hi)
                if abs(gap(estimate)) * target * target <= 0.1 * SIZING_TOLERANCE["length"] * target:
                    return estimate, None, needed(estimate), xtol
                seen = (d0, guess, estimate)
                below = [d for d in seen if gap(d) > 0]  # duties too small for the length
                above = [d for d in seen if gap(d) <= 0]
                if below and above:
                    lo, hi = max(below), min(above)
                else:
                    lo, hi = _bracket(lambda d: -gap(d), estimate, lowest_duty, Q_hi, decreasing=False,
                                      step=max(2.0 * abs(gap(estimate) / slope), 10.0 * xtol))
                if lo == hi:
                    return lo, None, needed(lo), xtol
                if gap(lo) > 0 >= gap(hi):
                    duty, root = brentq(gap, lo, hi, xtol=xtol, rtol=1e-14, maxiter=maxiter, full_output=True,
                                        disp=False)
                    return duty, root, needed(duty), xtol
    span = Q_hi - lowest_duty
    duties = [lowest_duty] + [lowest_duty + f * span for f in LENGTH_SCAN]
    lengths = [needed(d) for d in duties]
    below = [k for k, L in enumerate(lengths) if L < target]
    if not below:
        least = min(lengths)
        if not math.isfinite(least):
            raise ScenarioError(
                f"{key}.geometry: the passages cannot carry this flow at any duty (a pressure would fall below 5 % "
                f"of its inlet value along the exchanger): use wider or more tubes")
        raise NoLiquefactionError(
            f"{key}.geometry.length {target:g} m is too short for this production: the exchanger needs at least "
            f"about {least:.4g} m at these conditions")
    first = below[0]
    above = next((k for k in range(first + 1, len(duties)) if lengths[k] >= target), None)
    if above is None:  # even close to the limit the length is not used up: a near-perfect exchanger
        return duties[-1], None, lengths[-1], tol
    duty, root = brentq(lambda d: needed(d) - target, duties[above - 1], duties[above], xtol=tol, rtol=1e-14,
                        maxiter=maxiter, full_output=True, disp=False)
    return duty, root, needed(duty), tol


def _without_round_off(losses, work):
    """Exergy losses with the round-off of a loss that is zero in principle (a separator of
    phases in equilibrium, a reversible compressor) set to 0 [J/kg]; a loss more negative than
    that is left as it is, for the tests of the second law to find."""
    floor = -LOSS_ROUND_OFF * abs(work)
    return {name: 0.0 if floor <= value < 0.0 else value for name, value in losses.items()}


def _no_catalyst():
    """The conversion result of a hydrogen cycle without catalyst: the product is normal hydrogen."""
    from cycle.conversion import ConversionResult, ideal_work_basis
    from properties.orthopara import NORMAL_PARA_FRACTION

    return ConversionResult((), NORMAL_PARA_FRACTION, {}, ideal_work_basis((), NORMAL_PARA_FRACTION))


def _combined_report(reports):
    reports = list(reports)
    if len(reports) == 1:
        return reports[0]
    worst = max(reports, key=lambda r: abs(r.residual) / r.residual_tolerance if r.residual_tolerance else 0.0)
    return SolveReport(
        converged=all(r.converged for r in reports),
        status=next((r.status for r in reports if r.status != "met"), "met"),
        target=worst.target, achieved=worst.achieved, residual_tolerance=worst.residual_tolerance,
        iterations=sum(r.iterations for r in reports),
        function_calls=sum(r.function_calls for r in reports),
        residual=worst.residual, residual_unit=worst.residual_unit,
        tolerance=max(r.tolerance for r in reports),
        tear_variable="; ".join(r.tear_variable for r in reports),
        message="; ".join(r.message for r in reports))


# -- the flowsheets -----------------------------------------------------------------------

class Liquefier:
    """What every layout shares: units, checks, production target, exergy and assembly.

    Parameters
    ----------
    scenario : cycle.scenario.Scenario
    fluid : properties.Fluid, optional
        Defaults to the process-wide fluid object for ``scenario.gas``.
    """

    layout = None

    def __init__(self, scenario, fluid=None):
        from properties import get_fluid

        self.scenario = sc = scenario
        self.fluid = fluid or get_fluid(sc.gas)
        # Hydrogen with a catalyst: every stream is hydrogen of its own para fraction, on the
        # ortho-para reference (cycle.conversion); the make-up gas is normal hydrogen.
        self.conversion = self.makeup_fluid = None
        if getattr(sc, "hydrogen_conversion", ()):
            from cycle.conversion import Conversion

            self.conversion = Conversion(sc.hydrogen_conversion)
            self.fluid = self.makeup_fluid = Conversion.frozen(0.25)
        self.T0 = sc.ambient_temperature
        self.compressor = Compressor(sc.compressor, sc.aftercooler.outlet_temperature, sc.ambient_temperature)
        self.aftercooler = Aftercooler(sc.aftercooler.outlet_temperature, sc.aftercooler.pressure_drop)
        self.separator = Separator(sc.low_pressure)
        self.valve = ThrottleValve(sc.low_pressure)
        self._reference_densities = {}
        self._volume_mass_flow = None

    # Flow through the compressor suction per kg of compressor flow.
    suction_flow = 1.0

    def solve(self, xtol=None, maxiter=200):
        """Converge the recycle and return a :class:`~cycle.results.CycleResult`.

        Parameters
        ----------
        xtol : float, optional
            Absolute tolerance on each recuperator duty [J/kg]; default ``1e-10`` times the
            largest duty the high-pressure stream can give.
        maxiter : int
            Passed to :func:`scipy.optimize.brentq`.

        Raises
        ------
        NoLiquefactionError
            If the cycle makes no liquid; the message says why.
        ScenarioError
            If the scenario asks for a state outside the fluid's range.
        """
        import contextlib

        from properties import PropertyRangeError

        # The root finders march each exchanger at nearby duties: each march starts from the
        # nearest one before it (forgotten after this point).
        remembering = getattr(self.fluid, "remembering", contextlib.nullcontext)
        try:
            with remembering():
                result = self._solve_production(xtol, maxiter)
        except PropertyRangeError as err:
            raise ScenarioError(f"the scenario asks for a state outside the property range: {err}") from None
        except OverflowError as err:
            raise ScenarioError(f"the scenario's numbers are too large to compute with ({err}); check "
                                f"production and heat_leak") from None
        self._check_finite(result)
        return result

    def _check_finite(self, result):
        """An impossible number (inf, nan) is never a result: say which input made it."""
        bad = [k for k, v in result.summary().items() if isinstance(v, float) and not math.isfinite(v)]
        if not bad:
            return
        prod = self.scenario.production
        given = ""
        if prod is not None:
            given = "; ".join(f"production.{k} {v:g} (SI)" for k, v in (
                ("liquid_rate", prod.liquid_mass_rate), ("liquid_rate", prod.liquid_volume_rate),
                ("liquid_rate", prod.liquid_gas_volume_rate), ("compressor_flow", prod.compressor_volume_flow),
                ("compressor_flow", prod.compressor_flow)) if v is not None)
        if self.scenario.heat_leak > 0:
            given += f"{'; ' if given else ''}heat_leak {self.scenario.heat_leak:g} W"
        raise ScenarioError(f"the scenario gives numbers too large to represent ({', '.join(bad[:3])} "
                            f"{'are' if len(bad) > 1 else 'is'} infinite or undefined){': ' + given if given else ''}; "
                            f"give a production and a heat leak a plant can have")

    # -- checks -----------------------------------------------------------------------

    def _keyed_state(self, key, T, p):
        from properties import PropertyRangeError

        try:
            return self.fluid.state_tp(T, p)
        except PropertyRangeError as err:
            raise ScenarioError(f"{key} {T:g} K gives no valid state at {p / 1e5:g} bar: {err}") from None

    def _fixed_states(self, suction_pressure):
        """Check pressures and temperatures; return the hot inlet and the saturation states."""
        fl, sc = self.fluid, self.scenario
        if sc.low_pressure >= fl.p_critical:
            raise ScenarioError(f"low_pressure must be below the critical pressure of {fl.name} "
                                f"({fl.p_critical / 1e5:.4g} bar) for liquid to be drawn, got {sc.low_pressure / 1e5:g} bar")
        if sc.low_pressure <= fl.p_triple:
            raise ScenarioError(f"low_pressure must be above the triple-point pressure of {fl.name} "
                                f"({fl.p_triple / 1e5:.4g} bar), got {sc.low_pressure / 1e5:g} bar")
        if sc.high_pressure > fl.p_max:
            raise ScenarioError(f"high_pressure must be at most {fl.p_max / 1e5:g} bar, the limit of the "
                                f"{fl.name} equation of state, got {sc.high_pressure / 1e5:g} bar")
        discharge = self._keyed_state("aftercooler.outlet_temperature", sc.aftercooler.outlet_temperature,
                                      sc.high_pressure)
        self._keyed_state("ambient_temperature", sc.ambient_temperature, suction_pressure)
        hot_in, _ = self.aftercooler.run(fl, discharge)
        liquid, vapour = self.separator.saturation(fl)
        for key, T in (("ambient_temperature", sc.ambient_temperature),
                       ("aftercooler.outlet_temperature", discharge.T)):
            if T <= vapour.T:
                raise ScenarioError(f"{key} must be above the boiling temperature of {fl.name} at "
                                    f"low_pressure ({vapour.T:.2f} K), got {T:g} K")
        return hot_in, liquid, vapour

    def _check_inversion(self, hot, return_p, precooled=False, fluid=None):
        """No liquid if throttling from the recuperator's hot end warms the gas (``fluid``: that
        of the stream ``hot``, where it is not the cycle's)."""
        fl = fluid or self.fluid
        T_inv = fl.max_inversion_temperature()
        if hot.T >= T_inv:
            if precooled:
                raise ScenarioError(
                    f"precooling.temperature must be below the maximum inversion temperature of {fl.name} "
                    f"({T_inv:.0f} K), got {hot.T:g} K")
            raise NoLiquefactionError(
                f"no liquid: the recuperator hot end ({hot.T:.1f} K) is above the maximum inversion "
                f"temperature of {fl.name} ({T_inv:.0f} K), where throttling warms the gas; add a "
                f"precooling section (precooling: temperature below {T_inv:.0f} K, e.g. a liquid-nitrogen "
                f"bath) to the scenario")
        warm_return = fl.state_tp(hot.T, return_p)
        if warm_return.h <= hot.h:
            raise NoLiquefactionError(
                f"no liquid: at {hot.T:.1f} K, {fl.name} at {hot.p / 1e5:g} bar holds more enthalpy "
                f"than at the return pressure {return_p / 1e5:g} bar, so even a perfect recuperator makes "
                f"no liquid (the high pressure lies beyond the inversion curve); lower high_pressure")

    def _production(self, liquid):
        """(fixed compressor flow [kg/s] or None, liquid mass rate target [kg/s] or None)."""
        prod = self.scenario.production
        if prod is None:
            return None, None
        if prod.compressor_flow is not None:
            return prod.compressor_flow, None
        if prod.compressor_volume_flow is not None:
            return self._volume_mass_flow, None
        if prod.liquid_mass_rate is not None:
            return None, prod.liquid_mass_rate
        if prod.liquid_gas_volume_rate is not None:
            rho = self.reference_density(prod.volume_reference, "production.liquid_rate")
            return None, prod.liquid_gas_volume_rate * rho
        return None, prod.liquid_volume_rate * liquid.density

    def reference_density(self, reference, key=None):
        """Density of the gas at a reference condition of :data:`cycle.units.REFERENCE_CONDITIONS`
        [kg/m3] (real gas, from the equation of state).

        Where the fluid is not a gas there (it boils above the reference temperature at the
        reference pressure), None; with ``key`` that is an error naming the key.
        """
        from cycle.units import REFERENCE_CONDITIONS

        found = self._reference_densities.get(reference)
        if found is None:
            T, p, words = REFERENCE_CONDITIONS[reference]
            fl = self.fluid
            boils = fl.saturation_temperature(p) if fl.p_triple < p < fl.p_critical else None
            if boils is not None and boils >= T:
                found = (None, f"{fl.name} is not a gas at {words}: it boils at {boils:.2f} K there")
            else:
                found = (fl.state_tp(T, p).density, "")
            self._reference_densities[reference] = found
        rho, why = found
        if rho is None and key is not None:
            raise ScenarioError(f"{key}: a volume of gas at reference conditions needs a gas there; {why}; give "
                                f"a mass flow")
        return rho

    def _solve_production(self, xtol, maxiter):
        """Solve, with a compressor volume flow turned into its mass flow first.

        At reference conditions the density is fixed; at the compressor suction it depends on
        the suction temperature (and, for a recuperator given by its geometry, the suction
        pressure), which the solve decides: the mass flow is found by successive substitution,
        m = V rho_suction / (suction flow per kg compressed), until the solve's own suction volume
        flow meets V to :data:`SUCTION_RTOL` (the suction density barely depends on the flow).
        """
        prod = self.scenario.production
        if prod is None or prod.compressor_volume_flow is None:
            return self._solve(xtol, maxiter)
        V = prod.compressor_volume_flow
        if prod.volume_reference != "suction":
            self._volume_mass_flow = V * self.reference_density(prod.volume_reference, "production.compressor_flow")
            return self._solve(xtol, maxiter)
        m = V * self.fluid.state_tp(self.T0, self.suction_pressure).density / self.suction_flow
        for _ in range(SUCTION_ITERATIONS):
            self._volume_mass_flow = m
            result = self._solve(xtol, maxiter)
            suction, flow = result.suction
            missed = (m * flow / suction.density - V) / V  # the volume flow this solve has, against V
            if abs(missed) <= SUCTION_RTOL:
                return result
            m = V * suction.density / flow
        result.warnings.append(
            f"production.compressor_flow: the suction volume flow reached is off by {missed:+.2e} of the "
            f"{V * 3600:g} m^3/h asked for after {SUCTION_ITERATIONS} passes (the mass flow did not settle)")
        return result

    def _yield_function(self, liquid, vapour, feed_flow=1.0):
        """Yield as a function of the enthalpy entering the low-pressure valve.

        ``feed_flow`` of compressor flow [-] reaches the separator; the heat leak is charged
        there: per kg compressed ``Q_leak / m`` with ``m`` fixed, or ``Q_leak y / m_liq``.
        """
        m_fixed, m_liq = self._production(liquid)
        Q_leak = self.scenario.heat_leak
        hg, hf = vapour.h, liquid.h

        def yield_of(h_in):
            if m_liq is not None:
                return feed_flow * (hg - h_in) / (hg - hf + Q_leak / m_liq)
            q = Q_leak / m_fixed if m_fixed else 0.0
            return (feed_flow * (hg - h_in) - q) / (hg - hf)

        def flow_of(y):
            if m_fixed is not None:
                return m_fixed
            if m_liq is not None:
                return m_liq / y if y > 0 else math.inf
            return None

        return yield_of, flow_of

    def _solve_cold_end(self, rec, hot_in, liquid, vapour, xtol, maxiter, hot_fluid=None, cold_fluid=None):
        """Solve the recuperator whose high-pressure outlet feeds the valve into the separator.

        ``hot_fluid`` and ``cold_fluid`` are its two sides' fluids where they are not the
        cycle's (hydrogen streams of their own para fractions).  Returns (duty, profile, solve
        report, yield, effectiveness, critical effectiveness, compressor flow [kg/s] or None);
        raises NoLiquefactionError where the yield is not positive.
        """
        fl, sc = hot_fluid or self.fluid, self.scenario
        yield_at, flow_at = self._yield_function(liquid, vapour)

        def yield_of(duty):
            return yield_at(hot_in.h - duty)

        if sc.heat_leak > 0 and not yield_of(rec.max_hot_duty(fl, hot_in, vapour.T)) > 0:
            raise NoLiquefactionError(
                f"no liquid: heat_leak {sc.heat_leak:g} W takes more than all the refrigeration this cycle can "
                f"make at this production, even with a perfect {rec.key.replace('_', ' ')}; lower heat_leak or "
                f"raise the production")
        section = Section(fl, rec, hot_in, lambda d: [(vapour, 1.0 - yield_of(d))], vapour.T,
                          flow_of=lambda d: flow_at(yield_of(d)), cold_fluid=cold_fluid)
        lowest = max(0.0, hot_in.h - vapour.h)  # below this duty no liquid (liquid-rate target)
        duty, prof, report = solve_section(section, lambda d: flow_at(yield_of(d)), lowest, xtol, maxiter)
        y = yield_of(duty)
        eps = section.effectiveness(duty)
        m_fixed, _ = self._production(liquid)
        q0 = sc.heat_leak / m_fixed if m_fixed else 0.0
        # y = 0 when the high-pressure outlet leaves with h = hg - q (all the flow returns).
        eps_crit = rec.effectiveness(fl, hot_in, [(vapour, 1.0)], hot_in.h - vapour.h + q0, cold_fluid)
        # Also no liquid where the solve stopped at the least duty, short of its sizing (a rated
        # exchanger too short to reach the critical effectiveness): the yield there is round-off.
        at_least = report.status == "missed" and duty <= lowest + 1e-12 * abs(hot_in.h)
        if at_least and rec.spec.mode == "length":
            raise NoLiquefactionError(
                f"no liquid: {rec.key}.geometry.length {report.target:g} m is too short to make liquid at this "
                f"production: it needs {report.achieved:.4g} m to reach the critical effectiveness {eps_crit:.4f} for "
                f"these pressures and temperatures (and heat leak); lengthen it or raise the high pressure, or "
                f"precool")
        if y <= 0 or at_least:
            raise NoLiquefactionError(self._critical_message(eps, eps_crit, rec.key.replace("_", " ")))
        return duty, prof, report, y, eps, eps_crit, flow_at(y)

    def _critical_message(self, eps, eps_crit, key):
        Q = self.scenario.heat_leak
        if Q > 0 and (eps >= eps_crit or not math.isfinite(eps)):
            # The recuperator does its part; what is left of the Joule-Thomson effect goes into the leak.
            return (f"no liquid: heat_leak {Q:g} W takes all the refrigeration this cycle makes at this "
                    f"production (the {key} effectiveness {eps:.4f} is above its critical value without "
                    f"the leak); lower heat_leak or raise the production")
        if eps_crit >= 1.0 and self.conversion is not None and "continuous" in self.conversion:
            return (f"no liquid: even a perfect {key} could not make liquid here (its critical effectiveness "
                    f"would be {eps_crit:.4f}, above 1): with hydrogen_conversion continuous the whole flow converts "
                    f"in the cold recuperator's passage (the para-rich return gas mixes in at the suction and "
                    f"back-converts at the passage inlet), and that heat is more than the return gas can take; "
                    f"precool colder, or put the catalyst in the precooler and the separator")
        if eps_crit >= 1.0:
            return (f"no liquid: even a perfect {key} could not make liquid here (its critical "
                    f"effectiveness would be {eps_crit:.4f}, above 1): the heat leak or the conditions take "
                    f"more than the Joule-Thomson effect gives; lower the heat leak, raise the high "
                    f"pressure or the flow, or precool")
        spec = self.scenario.recuperator if key == "recuperator" else self.scenario.cold_recuperator
        sizing = ""
        if spec is not None and spec.mode != "effectiveness":
            if spec.mode == "min_approach":
                name, value = "min_approach", f"{spec.min_approach:g} K"
            elif spec.mode == "ua":
                name, value = "ua", f"{spec.ua:g} W/K"
            else:  # a rated exchanger
                name, value = "geometry.length", f"{spec.geometry.length:g} m"
            sizing = f" (with {key.replace(' ', '_')}.{name} {value})"
        remedy = "lengthen it" if spec is not None and spec.mode == "length" else "raise the effectiveness"
        return (f"no liquid: the {key} effectiveness here{sizing}, {eps:.4f}, is below the critical value "
                f"{eps_crit:.4f} for these pressures and temperatures (and heat leak); {remedy} or raise the "
                f"high pressure, or precool")

    # -- results ----------------------------------------------------------------------

    @staticmethod
    def _recuperator_result(duty, prof, eps, eps_crit):
        k = prof.min_approach_index
        return RecuperatorResult(
            duty=duty, effectiveness=eps, critical_effectiveness=eps_crit, min_approach=prof.min_approach,
            min_approach_position=float(prof.duty[k] / duty) if duty else 0.0,
            min_approach_hot_temperature=float(prof.hot_T[k]),
            ua_per_flow=prof.ua() if prof.min_approach > TOUCH_APPROACH else math.inf, profile=prof)

    def _exergy_loss(self, ins, outs, heat=()):
        """Exergy destroyed in a unit, T0 S_gen [J/kg of compressor flow].

        ``ins`` and ``outs`` are ``(state, flow)``; ``heat`` is ``(Q into the unit [J/kg], T of
        the source [K])``; heat rejected to ambient is negative Q at T0.
        """
        T0 = self.T0
        s_gen = sum(f * st.s for st, f in outs) - sum(f * st.s for st, f in ins)
        s_gen -= sum(Q / T for Q, T in heat)
        return T0 * s_gen

    def _finish(self, *, y, m, streams, compressions, after_duty, makeup, liquid, throttle_outlet,
                recuperators, reports, losses, valves, precooling_work=0.0, precooler_duty=0.0, coolant=None,
                warn=(), receiver_vapour_fraction=None, coolant_density=None, cooler_capacity=None,
                valve_fluid=None, ideal_work=None, conversion=None):
        """Assemble the :class:`~cycle.results.CycleResult`.

        ``valves`` are ``(inlet state, outlet pressure [Pa], flow per kg compressed)`` in flow
        order; each is sized for its critical mass flux (:func:`cycle.orifice.size_valve`), with
        ``valve_fluid`` where the valves' fluid is not the cycle's.  ``ideal_work`` [J/kg liquid]
        is the ideal work of liquefaction of the product made, where that is not the cycle
        fluid's (hydrogen with a catalyst); ``conversion`` is its
        :class:`~cycle.conversion.ConversionResult`.
        """
        from cycle.orifice import size_valve

        sc = self.scenario
        warn = list(warn) + [text for c, _ in compressions for text in c.warnings]
        names = ("",) if len(compressions) == 1 else ("low-pressure", "high-pressure")
        # The drive: shaft power is gas power over the mechanical efficiency, electric power is
        # shaft power over the motor efficiency; what they lose leaves as heat at ambient.
        gas_work = sum(flow * c.work for c, flow in compressions)
        eta_drive = sc.compressor.mechanical_efficiency * sc.compressor.motor_efficiency
        drive = gas_work * (1.0 / eta_drive - 1.0)
        if drive > 0:
            losses = dict(losses, compressor_drive=drive)
        # Cooling below ambient needs a chiller, charged at an ideal (Carnot) one's work (a lower
        # bound; 0 where every cooler is at or above ambient): the intercoolers' from each
        # compression, the aftercooler's after the last compression, which feeds it.  The
        # chiller's work leaves with the heat it lifts to the surroundings at T0, so it adds itself
        # to the heat rejected and to the compressor train's exergy loss (which every layout
        # computes with the train's heat rejected at T0).
        feed, feed_flow = compressions[-1]
        chill = (sum(flow * c.chiller_work for c, flow in compressions)
                 + feed_flow * self.aftercooler.chiller_work(self.fluid, feed.outlet, self.T0))
        comp_work = gas_work + drive + chill
        comp_heat = sum(flow * c.heat_rejected for c, flow in compressions) + chill + drive
        if chill:
            losses = dict(losses, compressor=losses["compressor"] + chill)
        T_after = sc.aftercooler.outlet_temperature
        if T_after < self.T0:
            where = (f"aftercooler.outlet_temperature {T_after:g} K is below ambient_temperature {self.T0:g} K: "
                     f"cooling the gas to it needs a chiller (refrigeration below ambient)")
            if sc.compressor.isothermal_efficiency is not None:
                warn.append(f"{where}; the isothermal compressor model counts it in its own work (the reversible "
                            f"work is the exergy rise to the cold outlet), at compressor.isothermal_efficiency")
            else:
                power = f" ({m * chill / 1e3:.4g} kW)" if m else ""
                warn.append(f"{where}; it is charged as an ideal (Carnot) chiller, {chill / 1e3:.4g} kJ/kg "
                            f"compressed{power} added to the compressor work and to its exergy loss: a lower "
                            f"bound, a real chiller needs more")
        q_leak = sc.heat_leak / m if m else 0.0
        # Whole plant: work, make-up gas and heat leak in; liquid and rejected heat out.
        energy_in = comp_work + y * makeup.h + q_leak
        energy_out = y * liquid.h + comp_heat + after_duty + precooler_duty
        balance = (energy_in - energy_out) / comp_work
        if throttle_outlet.quality is None:
            warn.append("the valve outlet is not two-phase: liquid comes only from the margin of heat leak")
        for name, rec in recuperators.items():
            if rec.profile.rating is not None:
                from cycle.tube_exchanger import warnings_for

                warn += warnings_for(name, rec.profile.rating)
        for name, report in reports.items():
            if report.converged:
                continue
            if report.status == "limit":
                text = report.message
            else:
                text = f"recycle solve of the {name.replace('_', ' ')} did not converge: {report.message}"
            warnings.warn(text, RecycleNotConvergedWarning, stacklevel=4)
            warn.append(text)
        states = [StreamState(k, name, st, flow) for k, (name, st, flow) in enumerate(streams, start=1)]
        cd = sc.valve.discharge_coefficient
        sized = tuple(size_valve(valve_fluid or self.fluid, inlet, p_out, None if m is None else m * flow,
                                 **({} if cd is None else {"discharge_coefficient": cd}))
                      for inlet, p_out, flow in valves)
        return CycleResult(
            scenario=sc, liquid_yield=y, work_per_kg_compressed=comp_work,
            ideal_work_per_kg_liquid=(ideal_work_of_liquefaction(self.fluid, self.T0, sc.low_pressure)
                                      if ideal_work is None else ideal_work),
            heat_leak_per_kg_compressed=q_leak, compressor_heat_rejected=comp_heat,
            aftercooler_duty=after_duty, liquid_density=liquid.density, recuperators=recuperators,
            states=states, throttle_outlet=throttle_outlet, compressor_flow=m,
            energy_balance_residual=balance, solve=_combined_report(reports.values()), sections=reports,
            exergy_losses=_without_round_off(losses, comp_work + precooling_work),
            precooling_work_per_kg_compressed=precooling_work,
            precooler_duty=precooler_duty, coolant_per_kg_compressed=coolant, warnings=warn,
            receiver_vapour_fraction=receiver_vapour_fraction,
            compressions=tuple((name, c, flow) for name, (c, flow) in zip(names, compressions)),
            gas_work_per_kg_compressed=gas_work, drive_loss_per_kg_compressed=drive,
            normal_density=self.reference_density("normal_volume_flow"), valves=sized,
            precooler_load=m * precooler_duty if m is not None and sc.layout == "precooled" else None,
            coolant_liquid_density=coolant_density, cooler_capacity=cooler_capacity,
            conversion=conversion if conversion is not None or sc.gas != "Hydrogen" else _no_catalyst())

    def _warm_end(self, ret, y):
        """Make-up mixing, compression and aftercooling of the return gas ``ret`` (flow 1 - y).

        Returns (make-up state, compression result, aftercooler outlet, aftercooler duty, the
        numbered streams so far, and the exergy losses of compressor and mixing).
        """
        fl = self.fluid
        makeup = self.mixer.makeup_state(self.makeup_fluid or fl)
        suction = self.mixer.run(fl, ret, 1.0 - y, y, self.makeup_fluid)
        comp = self.compressor.run(fl, suction, self.scenario.high_pressure)
        hp_in, after_duty = self.aftercooler.run(fl, comp.outlet)
        streams = [("compressor suction", suction, 1.0)] + [(label, st, 1.0) for label, st in comp.states]
        losses = {
            "compressor": self._exergy_loss([(suction, 1.0)], [(hp_in, 1.0)],
                                            [(-(comp.heat_rejected + after_duty), self.T0)]),
            "make_up_mixing": self._exergy_loss([(ret, 1.0 - y), (makeup, y)], [(suction, 1.0)]),
        }
        return makeup, comp, hp_in, after_duty, streams, losses

    def _cold_end_losses(self, y, q_leak, valve_in, valve_out, feed, liquid, vapour, valve="throttle_valve"):
        """Exergy destroyed in the last valve, the separator and by the heat leak [J/kg compressed].

        ``feed`` of compressor flow passes the valve into the separator; the heat leak ``q_leak``
        [J/kg compressed] crosses the insulation from ambient to the separator temperature.
        """
        return {
            valve: self._exergy_loss([(valve_in, feed)], [(valve_out, feed)]),
            "separator": self._exergy_loss([(valve_out, feed)], [(liquid, y), (vapour, feed - y)],
                                           [(q_leak, vapour.T)]),
            "heat_leak": q_leak * (self.T0 / vapour.T - 1.0),
        }


class SimpleLindeHampson(Liquefier):
    """The simple Linde-Hampson liquefier of a :class:`~cycle.scenario.Scenario`."""

    layout = "simple"

    def __init__(self, scenario, fluid=None):
        super().__init__(scenario, fluid)
        rec = scenario.recuperator
        self.suction_pressure = scenario.low_pressure - rec.low_side_pressure_drop
        self.recuperator = Recuperator(rec)
        self.mixer = MakeupMixer(self.suction_pressure, scenario.ambient_temperature, scenario.low_pressure)

    def _solve(self, xtol, maxiter):
        fl, sc, rec = self.fluid, self.scenario, self.recuperator
        hot_in, liquid, vapour = self._fixed_states(self.suction_pressure)
        self._check_inversion(hot_in, self.suction_pressure)
        duty, prof, report, y, eps, eps_crit, m = self._solve_cold_end(rec, hot_in, liquid, vapour, xtol, maxiter)

        # The pressures the march ends at: the typed-in drops, or a geometry's friction.
        hp_out = _state_at_end(fl, float(prof.hot_p[0]), hot_in.h - duty, float(prof.hot_T[0]))
        valve_out = self.valve.run(fl, hp_out)
        ret = _state_at_end(fl, float(prof.cold_p[-1]), vapour.h + duty / (1.0 - y), float(prof.cold_T[-1]))
        if rec.geometry is not None:
            self.mixer = MakeupMixer(ret.p, sc.ambient_temperature, sc.low_pressure)
        makeup, comp, hp_in, after_duty, streams, losses = self._warm_end(ret, y)
        streams += [
            ("aftercooler outlet, recuperator high-pressure inlet", hp_in, 1.0),
            ("recuperator high-pressure outlet, valve inlet", hp_out, 1.0),
            ("valve outlet, separator inlet", valve_out, 1.0),
            ("liquid product", liquid, y),
            ("separator vapour, recuperator low-pressure inlet", vapour, 1.0 - y),
            ("recuperator low-pressure outlet", ret, 1.0 - y),
            ("make-up gas", makeup, y),
        ]
        q_leak = sc.heat_leak / m if m else 0.0
        losses["recuperator"] = self._exergy_loss([(hp_in, 1.0), (vapour, 1.0 - y)], [(hp_out, 1.0), (ret, 1.0 - y)])
        losses.update(self._cold_end_losses(y, q_leak, hp_out, valve_out, 1.0, liquid, vapour))
        return self._finish(
            y=y, m=m, streams=streams, compressions=[(comp, 1.0)], after_duty=after_duty, makeup=makeup,
            liquid=liquid, throttle_outlet=valve_out,
            recuperators={"recuperator": self._recuperator_result(duty, prof, eps, eps_crit)},
            reports={"recuperator": report}, losses=losses, valves=[(hp_out, sc.low_pressure, 1.0)])


def build_flowsheet(scenario):
    """The flowsheet object for a scenario's layout."""
    from cycle.layouts import DualPressureLindeHampson, PrecooledLindeHampson

    kind = {"simple": SimpleLindeHampson, "precooled": PrecooledLindeHampson,
            "dual-pressure": DualPressureLindeHampson}[scenario.layout]
    return kind(scenario)


def solve_scenario(scenario, **options):
    """Build the flowsheet for ``scenario`` and solve it; ``options`` go to ``solve``."""
    return build_flowsheet(scenario).solve(**options)
