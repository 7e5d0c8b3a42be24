"""The simple Linde-Hampson flowsheet: unit operations wired by named streams, and the
recycle solve.

Streams (numbered in the state table in this order)::

    suction -> [compressor (stages, intercoolers)] -> discharge -> [aftercooler] -> hp_in
    hp_in -> [recuperator, high-pressure side] -> hp_out -> [throttle valve] -> valve_out
    valve_out -> [separator] -> liquid (product) + vapour
    vapour -> [recuperator, low-pressure side] -> return -> [make-up mixer] + makeup -> suction

The recycle: the return flow (1 - y) depends on the yield y, which depends on what the
recuperator does with that return flow.  The tear variable is the recuperator duty Q per
kg of compressor flow.  Given Q, the high-pressure outlet, the valve, the separator (with
the heat leak) and so the yield and return flow follow in order; the recuperator's sizing
equation (effectiveness, minimum approach or UA) is then the residual, driven to zero by
:func:`scipy.optimize.brentq`.
"""

import math
import warnings

from scipy.optimize import brentq, minimize_scalar

from cycle.equipment import Aftercooler, Compressor, MakeupMixer, Recuperator, Separator, ThrottleValve
from cycle.errors import NoLiquefactionError, RecycleNotConvergedWarning, ScenarioError
from cycle.results import CycleResult, RecuperatorResult, SolveReport, StreamState

# Relative tolerance of the tear variable; property flashes are good to ~1e-10 in h.
DUTY_RTOL = 1e-10


def ideal_work_of_liquefaction(fluid, T0, p):
    """Minimum work to liquefy gas taken at ``T0`` [K] and ``p`` [Pa] to saturated liquid at ``p``.

    ``W_ideal = T0 (s1 - sf) - (h1 - hf)`` [J/kg].

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.1
    and Table 3.1 (ideal work of liquefaction of common gases from 300 K and 1 atm).
    """
    gas = fluid.state_tp(T0, p)
    liquid = fluid.saturated_liquid(p)
    return T0 * (gas.s - liquid.s) - (gas.h - liquid.h)


def ideal_yield(fluid, T, p_low, p_high):
    """Yield of the ideal simple Linde-Hampson cycle, y = (h1 - h2) / (h1 - hf).

    States 1 and 2 are at temperature ``T`` [K] and the low and high pressure [Pa], f is
    saturated liquid at the low pressure; the recuperator is perfect (effectiveness 1) and
    the cycle has no heat leak or pressure drop.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.4,
    eq. for the simple Linde-Hampson system.
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


class SimpleLindeHampson:
    """The simple Linde-Hampson liquefier of a :class:`~cycle.scenario.Scenario`.

    Parameters
    ----------
    scenario : cycle.scenario.Scenario
    fluid : properties.Fluid, optional
        Defaults to the process-wide fluid object for ``scenario.gas``.
    """

    def __init__(self, scenario, fluid=None):
        from properties import get_fluid

        self.scenario = sc = scenario
        self.fluid = fluid or get_fluid(sc.gas)
        rec = sc.recuperator
        self.suction_pressure = sc.low_pressure - rec.low_side_pressure_drop
        self.compressor = Compressor(sc.compressor, sc.aftercooler.outlet_temperature, sc.ambient_temperature)
        self.aftercooler = Aftercooler(sc.aftercooler.outlet_temperature, sc.aftercooler.pressure_drop)
        self.recuperator = Recuperator(rec)
        self.valve = ThrottleValve(sc.low_pressure)
        self.separator = Separator(sc.low_pressure)
        self.mixer = MakeupMixer(self.suction_pressure, sc.ambient_temperature)

    # -- checks before solving --------------------------------------------------------

    def _check_pressures(self):
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

    def _check_inversion(self, hot_in, return_p):
        fl = self.fluid
        T_inv = fl.max_inversion_temperature()
        if hot_in.T >= T_inv:
            raise NoLiquefactionError(
                f"no liquid: the recuperator hot end ({hot_in.T:.1f} K) is above the maximum inversion "
                f"temperature of {fl.name} ({T_inv:.0f} K), where throttling warms the gas; precooling "
                f"below that temperature is needed (a precooler before the recuperator's cold section)")
        warm_return = fl.state_tp(hot_in.T, return_p)
        if warm_return.h <= hot_in.h:
            raise NoLiquefactionError(
                f"no liquid: at {hot_in.T:.1f} K, {fl.name} at {hot_in.p / 1e5:g} bar holds more enthalpy "
                f"than at the return pressure {return_p / 1e5:g} bar, so even a perfect recuperator makes "
                f"no liquid (the high pressure lies beyond the inversion curve); lower high_pressure")

    def _keyed_state(self, key, T, p):
        from properties import PropertyRangeError

        try:
            return self.fluid.state_tp(T, p)
        except PropertyRangeError as err:
            raise ScenarioError(f"{key} {T:g} K gives no valid state at {p / 1e5:g} bar: {err}") from None

    # -- the solve --------------------------------------------------------------------

    def solve(self, xtol=None, maxiter=200):
        """Converge the recycle and return a :class:`~cycle.results.CycleResult`.

        Parameters
        ----------
        xtol : float, optional
            Absolute tolerance on the recuperator duty [J/kg]; default ``1e-10`` times the
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
        from properties import PropertyRangeError

        try:
            return self._solve(xtol, maxiter)
        except PropertyRangeError as err:
            raise ScenarioError(f"the scenario asks for a state outside the property range: {err}") from None

    def _solve(self, xtol, maxiter):
        sc, fl = self.scenario, self.fluid
        rec = self.recuperator
        self._check_pressures()

        # Fixed states: the recuperator hot inlet and the separator saturation states.
        hot_in_ref = self._keyed_state("aftercooler.outlet_temperature", sc.aftercooler.outlet_temperature,
                                       sc.high_pressure)
        self._keyed_state("ambient_temperature", sc.ambient_temperature, self.suction_pressure)
        hot_in, _ = self.aftercooler.run(fl, hot_in_ref)
        liquid, vapour = self.separator.saturation(fl)
        for key, T in (("ambient_temperature", sc.ambient_temperature),
                       ("aftercooler.outlet_temperature", hot_in_ref.T)):
            if T <= vapour.T:
                raise ScenarioError(f"{key} must be above the boiling temperature of {fl.name} at "
                                    f"low_pressure ({vapour.T:.2f} K), got {T:g} K")
        return_p = self.suction_pressure
        self._check_inversion(hot_in, return_p)

        production = sc.production
        m_liq = None
        m_fixed = None
        if production is not None:
            if production.compressor_flow is not None:
                m_fixed = production.compressor_flow
            elif production.liquid_mass_rate is not None:
                m_liq = production.liquid_mass_rate
            else:
                m_liq = production.liquid_volume_rate * liquid.density
        Q_leak = sc.heat_leak

        def yield_of(duty):
            h_hp_out = hot_in.h - duty
            if m_liq is not None:  # the heat leak per kg compressed is Q_leak * y / m_liq
                return (vapour.h - h_hp_out) / (vapour.h - liquid.h + Q_leak / m_liq)
            q = Q_leak / m_fixed if m_fixed else 0.0
            return self.separator.liquid_fraction(fl, h_hp_out, q)

        def flow_of(y):
            if m_fixed is not None:
                return m_fixed
            if m_liq is not None:
                return m_liq / y if y > 0 else math.inf
            return None

        mode = rec.spec.mode
        counter = {"calls": 0}

        def profile_at(duty):
            return rec.profile(fl, hot_in, vapour, 1.0 - yield_of(duty), duty)

        def eps_at(duty):
            return rec.effectiveness(fl, hot_in, vapour, 1.0 - yield_of(duty), duty)

        # The largest duty the second law allows: the high-pressure stream cooled to the
        # returning vapour's temperature, or the return gas warmed to the high-pressure inlet
        # temperature (effectiveness 1), whichever comes first.
        Q_hi = rec.max_hot_duty(fl, hot_in, vapour)
        if mode != "effectiveness" and eps_at(Q_hi) > 1.0:
            Q_hi = brentq(lambda d: eps_at(d) - 1.0, 0.0, Q_hi, xtol=DUTY_RTOL * Q_hi, rtol=1e-14)
        tol = xtol if xtol is not None else DUTY_RTOL * Q_hi

        def crit_eps():
            # y = 0 when the high-pressure outlet leaves with h = hg - q (all return flow = 1).
            q = Q_leak / m_fixed if m_fixed else 0.0
            if m_liq is not None:
                q = 0.0
            return rec.effectiveness(fl, hot_in, vapour, 1.0, hot_in.h - vapour.h + q)

        if mode == "effectiveness":
            target, unit = rec.spec.effectiveness, "-"

            def residual(duty):
                counter["calls"] += 1
                return eps_at(duty) - target
        elif mode == "min_approach":
            target, unit = rec.spec.min_approach, "K"

            def residual(duty):
                counter["calls"] += 1
                return profile_at(duty).min_approach - target
        else:
            target, unit = rec.spec.ua, "W/K"

        if mode == "ua":
            duty, root = self._solve_ua(fl, profile_at, yield_of, flow_of, Q_hi, tol, maxiter, counter)
            prof = profile_at(duty)
            res = flow_of(yield_of(duty)) * prof.ua() - target
        else:
            f_hi = residual(Q_hi)
            if mode == "effectiveness" and f_hi < 0:
                raise NoLiquefactionError(
                    f"recuperator.effectiveness {target:g} cannot be reached: the high-pressure stream "
                    f"would have to leave colder than the returning vapour ({vapour.T:.2f} K); the most "
                    f"this exchanger can reach here is {eps_at(Q_hi):.4f}")
            # At the largest duty the streams touch, so a zero minimum approach lies there.
            if f_hi == 0.0 or (mode == "min_approach" and f_hi > -1e-6):
                duty, root = Q_hi, None
            else:
                if mode == "min_approach" and residual(0.0) < 0:
                    raise NoLiquefactionError(
                        f"no liquid: recuperator.min_approach {target:g} K is more than the temperature "
                        f"difference between the high-pressure inlet ({hot_in.T:.2f} K) and the returning "
                        f"vapour ({vapour.T:.2f} K)")
                duty, root = brentq(residual, 0.0, Q_hi, xtol=tol, rtol=1e-14, maxiter=maxiter,
                                    full_output=True, disp=False)
            res = residual(duty)
            prof = profile_at(duty)

        converged = root.converged if root is not None else True
        report = SolveReport(
            converged=bool(converged),
            iterations=int(root.iterations) if root is not None else 0,
            function_calls=counter["calls"],
            residual=float(res),
            residual_unit=unit,
            tolerance=float(tol),
            message=(root.flag if root is not None else "solution at the bracket end"),
        )
        warn = []
        if not converged:
            text = f"recycle solve did not converge after {report.iterations} iterations ({report.message})"
            warnings.warn(text, RecycleNotConvergedWarning, stacklevel=3)
            warn.append(text)

        y = yield_of(duty)
        eps = eps_at(duty)
        eps_crit = crit_eps()
        if y <= 0:
            raise NoLiquefactionError(
                f"no liquid: the recuperator effectiveness here, {eps:.4f}, is below the critical value "
                f"{eps_crit:.4f} for these pressures and temperatures (and heat leak); raise the "
                f"effectiveness or the high pressure, or precool")
        return self._assemble(duty, y, prof, eps, eps_crit, hot_in_ref, hot_in, liquid, vapour,
                              flow_of(y), report, warn)

    def _solve_ua(self, fl, profile_at, yield_of, flow_of, Q_hi, tol, maxiter, counter):
        """Solve for the duty that a recuperator of the given UA passes."""
        target = self.recuperator.spec.ua

        def pinch(duty):
            counter["calls"] += 1
            return profile_at(duty).min_approach

        # The largest duty the streams allow: where they touch (minimum approach 0).
        if pinch(Q_hi) >= 0:
            Q_touch = Q_hi
        else:
            Q_touch = brentq(pinch, 0.0, Q_hi, xtol=tol, maxiter=maxiter)

        def ua_abs(duty):
            counter["calls"] += 1
            y = yield_of(duty)
            m = flow_of(y)
            if not math.isfinite(m):
                return math.inf
            return m * profile_at(duty).ua()

        hi = Q_touch * (1 - 1e-9)
        if self.scenario.production.compressor_flow is not None:
            lo = 0.0
        else:
            # With a liquid-rate target the flow is m_liq / y: UA(Q) falls, then rises as the
            # streams close in.  The design point is on the rising branch (least flow).
            y0 = max(0.0, min(Q_touch, self._duty_for_zero_yield(yield_of, Q_touch)))
            found = minimize_scalar(ua_abs, bounds=(y0 + 1e-9 * Q_touch, hi), method="bounded",
                                    options={"xatol": 1e-6 * Q_touch})
            lo = found.x
            if found.fun > target:
                raise NoLiquefactionError(
                    f"recuperator.ua {target:g} W/K is too small for this production: the least UA that "
                    f"makes it at these conditions is {found.fun:.4g} W/K (and it needs "
                    f"{flow_of(yield_of(lo)) * 3600:.4g} kg/h of compressor flow)")
        duty, root = brentq(lambda d: ua_abs(d) - target, lo, hi, xtol=tol, rtol=1e-14,
                            maxiter=maxiter, full_output=True, disp=False)
        return duty, root

    @staticmethod
    def _duty_for_zero_yield(yield_of, Q_hi):
        y_lo, y_hi = yield_of(0.0), yield_of(Q_hi)
        if y_lo >= 0:
            return 0.0
        if y_hi <= 0:
            return Q_hi
        return brentq(yield_of, 0.0, Q_hi, xtol=1e-12 * Q_hi)

    def _assemble(self, duty, y, prof, eps, eps_crit, hot_in_ref, hot_in, liquid, vapour, m, report, warn):
        sc, fl = self.scenario, self.fluid
        rec = self.recuperator
        hot_p_out, cold_p_out = rec.pressures(hot_in.p, vapour.p)
        hp_out = fl.state_ph(hot_p_out, hot_in.h - duty)
        valve_out = self.valve.run(fl, hp_out)
        ret = fl.state_ph(cold_p_out, vapour.h + duty / (1.0 - y))
        makeup = self.mixer.makeup_state(fl)
        suction = self.mixer.run(fl, ret, 1.0 - y, y)
        comp = self.compressor.run(fl, suction, sc.high_pressure)
        discharge = comp.outlet
        hp_in, after_duty = self.aftercooler.run(fl, discharge)
        q_leak = sc.heat_leak / m if m else 0.0

        named = [("compressor suction", suction, 1.0)]
        named += [(label, st, 1.0) for label, st in comp.states]
        named += [
            ("aftercooler outlet, recuperator high-pressure inlet", hp_in, 1.0),
            ("recuperator high-pressure outlet, valve inlet", hp_out, 1.0),
            ("valve outlet, separator inlet", valve_out, 1.0),
            ("liquid product", liquid, y),
            ("separator vapour, recuperator low-pressure inlet", vapour, 1.0 - y),
            ("recuperator low-pressure outlet", ret, 1.0 - y),
            ("make-up gas", makeup, y),
        ]
        states = [StreamState(k, name, st, flow) for k, (name, st, flow) in enumerate(named, start=1)]

        # Whole plant: work, make-up gas and heat leak in; liquid and rejected heat out.
        energy_in = comp.work + y * makeup.h + q_leak
        energy_out = y * liquid.h + comp.heat_rejected + after_duty
        balance = (energy_in - energy_out) / comp.work

        k = prof.min_approach_index
        recuperator = RecuperatorResult(
            duty=duty, effectiveness=eps, critical_effectiveness=eps_crit,
            min_approach=prof.min_approach, min_approach_position=float(prof.duty[k] / duty) if duty else 0.0,
            min_approach_hot_temperature=float(prof.hot_T[k]), ua_per_flow=prof.ua(), profile=prof)
        if prof.min_approach < -1e-6:
            warn.append(f"temperatures cross inside the recuperator (minimum approach {prof.min_approach:.3g} K "
                        f"at {prof.hot_T[k]:.1f} K): effectiveness {eps:.4g} is not reachable by a real "
                        f"counterflow exchanger at these conditions")
        if valve_out.quality is None:
            warn.append("the valve outlet is not two-phase: liquid comes only from the margin of heat leak")
        return CycleResult(
            scenario=sc, liquid_yield=y, work_per_kg_compressed=comp.work,
            ideal_work_per_kg_liquid=ideal_work_of_liquefaction(fl, sc.ambient_temperature, sc.low_pressure),
            heat_leak_per_kg_compressed=q_leak, compressor_heat_rejected=comp.heat_rejected,
            aftercooler_duty=after_duty, liquid_density=liquid.density, recuperator=recuperator,
            states=states, throttle_outlet=valve_out, compressor_flow=m, energy_balance_residual=balance,
            solve=report, warnings=warn)


def solve_scenario(scenario, **options):
    """Build the flowsheet for ``scenario`` and solve it; ``options`` go to ``solve``."""
    return SimpleLindeHampson(scenario).solve(**options)
