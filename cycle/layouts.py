"""The precooled and dual-pressure Linde-Hampson flowsheets (see :mod:`cycle.flowsheet`)."""

from scipy.optimize import brentq

from cycle.equipment import MakeupMixer, Precooler, Recuperator, ThrottleValve
from cycle.errors import NoLiquefactionError, ScenarioError, UnreachableSizingError
from cycle.flowsheet import Liquefier, Section, solve_section
from cycle.processes import carnot_cop, refrigeration_exergy


# The cooler balance: temperatures scanned over the capacity curve, Brent's tolerance on the
# precooling temperature [K], and the relative miss of load against capacity that is warned.
COOLER_SCAN = 9
COOLER_XTOL = 1e-7
COOLER_BALANCE_RTOL = 1e-6
# A warm recuperator given by its geometry: passes of the two sections until the pressure
# between them settles [Pa].
MID_PRESSURE_PASSES = 20
MID_PRESSURE_TOLERANCE = 1e-3


class PrecooledLindeHampson(Liquefier):
    """Warm recuperator -> precooler -> cold recuperator -> valve; the return gas passes back
    through the cold, then the warm recuperator.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.6
    (precooled Linde-Hampson system).
    """

    layout = "precooled"

    def __init__(self, scenario, fluid=None):
        super().__init__(scenario, fluid)
        sc = scenario
        self.warm = Recuperator(sc.warm_recuperator, "warm_recuperator")
        self.cold = Recuperator(sc.cold_recuperator, "cold_recuperator")
        self.precooler = Precooler(sc.precooling, sc.ambient_temperature)
        self.suction_pressure = (sc.low_pressure - sc.cold_recuperator.low_side_pressure_drop
                                 - sc.warm_recuperator.low_side_pressure_drop)
        self.mixer = MakeupMixer(self.suction_pressure, sc.ambient_temperature, sc.low_pressure)

    def _check_precooling(self, vapour):
        spec, T0 = self.scenario.precooling, self.T0
        if spec.temperature <= vapour.T:
            raise ScenarioError(f"precooling.temperature must be above the boiling temperature of "
                                f"{self.fluid.name} at low_pressure ({vapour.T:.2f} K), got {spec.temperature:g} K")
        if spec.temperature >= T0:
            raise ScenarioError(f"precooling.temperature must be below ambient_temperature ({T0:g} K), "
                                f"got {spec.temperature:g} K")
        if spec.coolant is not None:
            from properties import PropertyRangeError

            try:
                liquid, _ = self.precooler.coolant_states()
            except PropertyRangeError as err:
                raise ScenarioError(f"precooling.coolant_pressure gives no boiling {spec.coolant}: {err}") from None
            if liquid.T >= spec.temperature:
                raise ScenarioError(
                    f"precooling.temperature must be above the boiling temperature of the coolant "
                    f"{spec.coolant} at precooling.coolant_pressure ({liquid.T:.2f} K), got {spec.temperature:g} K")
            least = self.precooler.least_coolant_work()
            if spec.coolant_work is not None and spec.coolant_work < least:
                raise ScenarioError(
                    f"precooling.coolant_work must be at least {least / 1e3:.1f} kJ/kg, the exergy of the "
                    f"refrigeration one kg of {spec.coolant} delivers as it boils at {liquid.T:.2f} K (latent heat "
                    f"times (T0 / T_boil - 1)): less would make work from nothing; got {spec.coolant_work / 1e3:g} kJ/kg")
        elif spec.refrigerator_cop is not None:
            limit = carnot_cop(spec.temperature, T0)
            if spec.refrigerator_cop > limit * (1.0 + 1e-12):
                raise ScenarioError(
                    f"precooling.refrigerator_cop must be at most the Carnot value {limit:.4g} between "
                    f"precooling.temperature and ambient_temperature, got {spec.refrigerator_cop:g}")

    def _solve(self, xtol, maxiter):
        spec = self.scenario.precooling
        if spec.cooler_capacity is not None and spec.temperature is None:
            return self._solve_cooler(xtol, maxiter)
        return self._solve_at_temperature(xtol, maxiter)

    def _solve_cooler(self, xtol, maxiter):
        """The precooling temperature at which the load equals the cooler's capacity.

        The capacity curve is interpolated monotonically (piecewise cubic Hermite, PCHIP, which
        keeps the curve's rises and falls).  The load (compressor flow times precooler duty per
        kg) is scanned over the curve's temperatures where the cycle can run; the coldest
        crossing of load and capacity is refined by Brent's method on the temperature, each trial
        a whole solve of the cycle at that precooling temperature.
        """
        from dataclasses import replace

        from scipy.interpolate import PchipInterpolator

        from cycle.errors import CoolerTooSmallError

        fl, sc, spec, T0 = self.fluid, self.scenario, self.scenario.precooling, self.T0
        temps = [T for T, _ in spec.cooler_capacity]
        capacity = PchipInterpolator(temps, [Q for _, Q in spec.cooler_capacity])
        _, vapour = self.separator.saturation(fl)
        lo = max(temps[0], vapour.T * (1.0 + 1e-6))
        hi = min(temps[-1], sc.aftercooler.outlet_temperature * (1.0 - 1e-9), T0 * (1.0 - 1e-9))
        if not lo < hi:
            raise ScenarioError(
                f"precooling.cooler_capacity spans {temps[0]:g} to {temps[-1]:g} K, but the precooling temperature "
                f"must lie above the boiling temperature of {fl.name} at low_pressure ({vapour.T:.2f} K) and below "
                f"the aftercooler outlet and ambient temperatures: extend the curve")
        solved = {}

        def solve_at(T):
            if T not in solved:
                child = PrecooledLindeHampson(replace(sc, precooling=replace(spec, temperature=float(T))), fl)
                child._volume_mass_flow = self._volume_mass_flow
                child._reference_densities = self._reference_densities
                solved[T] = child._solve_at_temperature(xtol, maxiter)
            return solved[T]

        def gap(T):
            return solve_at(T).precooler_load - float(capacity(T))

        scan, errors = [], []
        for T in [lo + (hi - lo) * k / (COOLER_SCAN - 1) for k in range(COOLER_SCAN)]:
            try:
                scan.append((T, gap(T)))
            except (NoLiquefactionError, ScenarioError) as err:
                errors.append(err)
                scan.append((T, None))
        valid = [(T, g) for T, g in scan if g is not None]
        if not valid:
            raise errors[len(errors) // 2]
        for (Ta, ga), (Tb, gb) in zip(scan, scan[1:]):
            if ga is not None and gb is not None and ga > 0 >= gb:
                T = Tb if gb == 0 else brentq(gap, Ta, Tb, xtol=COOLER_XTOL, rtol=1e-14)
                break
        else:
            def at(T, g):
                load = g + float(capacity(T))
                return f"at {T:.2f} K a load of {load:.4g} W against a capacity of {float(capacity(T)):.4g} W"

            (T1, g1), (T2, g2) = valid[0], valid[-1]
            ends = at(T1, g1) if T1 == T2 else f"{at(T1, g1)}, {at(T2, g2)}"
            if all(g > 0 for _, g in valid):
                raise CoolerTooSmallError(
                    f"precooling.cooler_capacity is too small for this plant: the precooler load exceeds the "
                    f"capacity at every temperature of the curve where the cycle runs ({ends}); use a larger "
                    f"cooler or lower the production")
            raise ScenarioError(
                f"precooling.cooler_capacity is more than the load at every temperature of the curve where the "
                f"cycle runs ({ends}): the balance lies below {T1:.2f} K, outside the curve; extend the curve to "
                f"colder temperatures")
        result = solve_at(T)
        cap = float(capacity(T))
        least = result.precooler_load * (T0 / T - 1.0)
        if spec.cooler_input_power < least * (1.0 - 1e-12):
            raise ScenarioError(
                f"precooling.cooler_input_power {spec.cooler_input_power:g} W is less than the {least:.4g} W an ideal "
                f"(Carnot) refrigerator needs to lift {result.precooler_load:.4g} W from {T:.2f} K to ambient "
                f"{T0:g} K: the curve and the input power cannot both hold")
        miss = result.precooler_load - cap
        if abs(miss) > COOLER_BALANCE_RTOL * max(cap, 1e-300):
            result.warnings.append(
                f"precooling.cooler_capacity: the load {result.precooler_load:.6g} W misses the capacity "
                f"{cap:.6g} W at {T:.4f} K by {miss:+.3g} W")
        return replace(result, cooler_capacity=cap)

    def _solve_at_temperature(self, xtol, maxiter):
        conv = self.conversion
        if conv is None:
            return self._solve_pass(xtol, maxiter, None)
        # Hydrogen with a catalyst: the loop's para fractions are a fixed point of the whole
        # solve.  It is met at the first pass where the catalyst places fix them; with the
        # catalyst in the cold recuperator it is found by SciPy's root-finder (Powell's hybrid
        # method) on the change of the fractions over one pass.
        import numpy as np
        from scipy.optimize import root

        from cycle.conversion import FRACTION_TOLERANCE, PASSES

        T_boil = self.fluid.saturation_temperature(self.scenario.low_pressure)
        start = conv.first_guess(self.scenario.precooling.temperature, T_boil)
        passes = {}

        def solved(z):
            key = tuple(float(v) for v in z)
            if key not in passes:
                passes[key] = self._solve_pass(xtol, maxiter, key)
            return passes[key]

        def change(key):
            return max(abs(a - b) for a, b in zip(solved(key)[1], key))

        if change(start) > FRACTION_TOLERANCE:
            root(lambda z: np.array(solved(z)[1]) - z, np.array(solved(start)[1]), method="hybr",
                 options={"xtol": 0.1 * FRACTION_TOLERANCE, "maxfev": PASSES})
        best = min(passes, key=change)
        result = passes[best][0]
        if change(best) > FRACTION_TOLERANCE:
            result.warnings.append(
                f"hydrogen_conversion: the para fractions of the loop are off their steady state by "
                f"{change(best):.2e} (more than the {FRACTION_TOLERANCE:g} they are solved to) after {len(passes)} "
                f"passes of the solve")
        return result

    def _solve_pass(self, xtol, maxiter, fractions):
        """One solve of the cycle; with a catalyst (``fractions``, the loop's (x_hot, x_feed) of
        :class:`cycle.conversion.Conversion`) also the fractions that follow from it."""
        sc = self.scenario
        warm, cold = self.warm, self.cold
        conv = self.conversion
        hp_in, liquid, vapour = self._fixed_states(self.suction_pressure)
        self._check_precooling(vapour)
        T_pc = sc.precooling.temperature
        hot_fl = feed_fl = self.fluid
        if fractions is not None:
            x_hot, x_feed = fractions
            feed_fl, hot_fl = conv.frozen(x_feed), conv.passage_fluid(x_hot)
            vapour = feed_fl.saturated_vapour(sc.low_pressure)
            x_product = conv.product_fraction(x_feed, feed_fl, sc.low_pressure)
            liquid = conv.frozen(x_product).saturated_liquid(sc.low_pressure)
        # The pressure between the recuperators: the warm one's high-pressure outlet.  With a
        # geometry it follows from the warm recuperator's friction, which is solved after the cold
        # one (the precooler fixes the cold one's hot inlet): passes until it settles.
        p_mid_hot = warm.hot_outlet_pressure(hp_in.p)
        for _ in range(MID_PRESSURE_PASSES):
            if fractions is None:
                pc_out = cold_in = self._keyed_state("precooling.temperature", T_pc, p_mid_hot)
            else:
                pc_out = cold_in = conv.frozen(x_hot).state_tp(T_pc, p_mid_hot)
                if "continuous" in conv:  # onto the catalyst: to equilibrium at the inlet, adiabatically
                    cold_in = hot_fl.state_ph(p_mid_hot, pc_out.h)
            self._check_inversion(cold_in, cold.cold_outlet_pressure(vapour.p), precooled=True, fluid=hot_fl)
            # Cold section first: the precooler fixes its hot inlet.
            duty_c, prof_c, report_c, y, eps_c, eps_crit, m = self._solve_cold_end(
                cold, cold_in, liquid, vapour, xtol, maxiter, hot_fluid=hot_fl, cold_fluid=feed_fl)
            p_mid_cold = float(prof_c.cold_p[-1])
            mid_return = feed_fl.state_ph(p_mid_cold, vapour.h + duty_c / (1.0 - y))
            if fractions is not None:  # the suction's para fraction follows from the yield
                from properties.orthopara import NORMAL_PARA_FRACTION

                self.fluid = conv.frozen((1.0 - y) * x_feed + y * NORMAL_PARA_FRACTION)
                hp_in, _, _ = self._fixed_states(self.suction_pressure)

            # Warm section: both flows are known now.
            warm_section = Section(self.fluid, warm, hp_in, lambda d: [(mid_return, 1.0 - y)], mid_return.T,
                                   flow_of=lambda d: m, cold_fluid=feed_fl if fractions is not None else None)
            duty_w, prof_w, report_w = solve_section(warm_section, lambda d: m, 0.0, xtol, maxiter)
            settled = float(prof_w.hot_p[0])
            if warm.geometry is None or abs(settled - p_mid_hot) <= MID_PRESSURE_TOLERANCE:
                p_mid_hot = settled
                break
            p_mid_hot = settled
        fl = self.fluid
        eps_w = warm_section.effectiveness(duty_w)
        warm_out = fl.state_ph(p_mid_hot, hp_in.h - duty_w)
        if (warm_out.h < pc_out.h) if fractions is None else (warm_out.T < T_pc):
            raise ScenarioError(
                f"precooling.temperature {T_pc:g} K is above what the warm recuperator "
                f"already reaches ({warm_out.T:.2f} K): the precooler would have to heat; lower "
                f"precooling.temperature or give the warm recuperator less size")
        if fractions is None:
            _, precooler_duty = self.precooler.run(fl, warm_out)
        else:
            precooler_duty = warm_out.h - pc_out.h
        supply = self.precooler.supply(precooler_duty, m)

        cold_out = hot_fl.state_ph(float(prof_c.hot_p[0]), cold_in.h - duty_c)
        valve_in = cold_out if fractions is None else feed_fl.state_ph(cold_out.p, cold_out.h)
        valve_out = self.valve.run(feed_fl, valve_in)
        ret = feed_fl.state_ph(float(prof_w.cold_p[-1]), mid_return.h + duty_w / (1.0 - y))
        if warm.geometry is not None or cold.geometry is not None:
            self.mixer = MakeupMixer(ret.p, sc.ambient_temperature, sc.low_pressure)
        makeup, comp, hp_in, after_duty, streams, losses = self._warm_end(ret, y)
        streams += [
            ("aftercooler outlet, warm recuperator high-pressure inlet", hp_in, 1.0),
            ("warm recuperator high-pressure outlet, precooler inlet", warm_out, 1.0),
            ("precooler outlet, cold recuperator high-pressure inlet", pc_out, 1.0),
            ("cold recuperator high-pressure outlet, valve inlet", valve_in, 1.0),
            ("valve outlet, separator inlet", valve_out, 1.0),
            ("liquid product", liquid, y),
            ("separator vapour, cold recuperator low-pressure inlet", vapour, 1.0 - y),
            ("cold recuperator low-pressure outlet, warm recuperator low-pressure inlet", mid_return, 1.0 - y),
            ("warm recuperator low-pressure outlet", ret, 1.0 - y),
            ("make-up gas", makeup, y),
        ]
        q_leak = sc.heat_leak / m if m else 0.0
        T_sink = supply.sink_temperature
        losses.update({
            "warm_recuperator": self._exergy_loss([(hp_in, 1.0), (mid_return, 1.0 - y)],
                                                  [(warm_out, 1.0), (ret, 1.0 - y)]),
            "precooler": self._exergy_loss([(warm_out, 1.0)], [(pc_out, 1.0)], [(-precooler_duty, T_sink)]),
            ("coolant" if supply.coolant is not None else "precooling_refrigerator"):
                supply.work - refrigeration_exergy(precooler_duty, T_sink, self.T0),
            "cold_recuperator": self._exergy_loss([(pc_out, 1.0), (vapour, 1.0 - y)],
                                                  [(valve_in, 1.0), (mid_return, 1.0 - y)]),
        })
        losses.update(self._cold_end_losses(y, q_leak, valve_in, valve_out, 1.0, liquid, vapour))
        conversion = None
        if fractions is not None:
            conversion = self._conversion_accounts(losses, y, fl, warm_out, pc_out, cold_in, prof_c, hot_fl,
                                                   feed_fl, liquid, vapour)
        warn = []
        if supply.lower_bound:
            warn.append(f"the coolant {sc.precooling.coolant} is charged at its ideal work of liquefaction, "
                        f"{supply.coolant_work / 1e3:.1f} kJ/kg: a lower bound on the precooling work; give "
                        f"precooling.coolant_work for the real cost")
        result = self._finish(
            y=y, m=m, streams=streams, compressions=[(comp, 1.0)], after_duty=after_duty, makeup=makeup,
            liquid=liquid, throttle_outlet=valve_out,
            recuperators={"warm_recuperator": self._recuperator_result(duty_w, prof_w, eps_w, None),
                          "cold_recuperator": self._recuperator_result(duty_c, prof_c, eps_c, eps_crit)},
            reports={"cold_recuperator": report_c, "warm_recuperator": report_w}, losses=losses,
            precooling_work=supply.work, precooler_duty=precooler_duty, coolant=supply.coolant, warn=warn,
            valves=[(valve_in, sc.low_pressure, 1.0)], coolant_density=supply.coolant_density,
            valve_fluid=feed_fl, conversion=conversion,
            ideal_work=None if conversion is None else self._ideal_work(liquid))
        if fractions is None:
            return result
        return result, conv.settled(x_hot, x_feed, y, cold_out.T)

    def _ideal_work(self, liquid):
        """Ideal work of liquefaction [J/kg] from normal make-up gas at ambient temperature and
        low pressure to the product ``liquid`` as made: W = T0 (s_gas - s_liq) - (h_gas - h_liq)."""
        gas = self.makeup_fluid.state_tp(self.T0, self.scenario.low_pressure)
        return self.T0 * (gas.s - liquid.s) - (gas.h - liquid.h)

    def _conversion_accounts(self, losses, y, warm_fl, warm_out, pc_out, cold_in, prof_c, hot_fl, feed_fl, liquid,
                             vapour):
        """The conversion heat released at each catalyst place [J/kg compressed], and the exergy
        the conversion itself destroys moved from the unit it happens in to its own line
        ``ortho_para_conversion`` (changes ``losses``).  Returns the
        :class:`~cycle.conversion.ConversionResult`."""
        from cycle.conversion import ConversionResult, ideal_work_basis

        conv, T0, p_low = self.conversion, self.T0, self.scenario.low_pressure
        heat, destroyed = {}, {}
        T_pc = pc_out.T
        if "precooler" in conv:  # the stream converted at the precooling temperature
            before = warm_fl.state_tp(T_pc, pc_out.p)
            heat["precooler"] = before.h - pc_out.h
            destroyed["precooler"] = T0 * conv.conversion_loss(before, pc_out, T_pc)
        if "continuous" in conv:
            # At the passage inlet (adiabatic, where the stream arrives away from equilibrium), then
            # zone by zone: the para fraction times the ortho-to-para heat at each zone's mean.
            from properties.orthopara import get_ortho_para_hydrogen

            model = get_ortho_para_hydrogen()
            q = (cold_in.para_fraction - pc_out.para_fraction) * model.conversion_heat(T_pc, pc_out.p, 0.0, 1.0)
            T, p = prof_c.hot_T, prof_c.hot_p
            x = [hot_fl.fraction(float(t)) for t in T]
            for k in range(len(T) - 1):  # k = 0 is the cold end
                Tm, pm = 0.5 * float(T[k] + T[k + 1]), 0.5 * float(p[k] + p[k + 1])
                q += (x[k] - x[k + 1]) * model.conversion_heat(Tm, pm, 0.0, 1.0)
            heat["continuous"] = q
            destroyed["cold_recuperator"] = T0 * (cold_in.s - pc_out.s)  # the inlet step; zones are at equilibrium
        if "separator" in conv:  # the liquid converted in the pool, at the feed's boiling point
            unconverted = feed_fl.saturated_liquid(p_low)
            heat["separator"] = y * (unconverted.h - liquid.h)
            destroyed["separator"] = T0 * conv.conversion_loss(unconverted, liquid, vapour.T, y)
        for unit, value in destroyed.items():
            losses[unit] -= value
        losses["ortho_para_conversion"] = sum(destroyed.values())
        return ConversionResult(conv.places, liquid.para_fraction, heat,
                                ideal_work_basis(conv.places, liquid.para_fraction))


class DualPressureLindeHampson(Liquefier):
    """Two-section compression with a recirculated intermediate-pressure stream.

    Per kg compressed to the high pressure, the fraction i returns at the intermediate
    pressure through the recuperator to the high-pressure section; 1 - i is throttled on to the
    low pressure, where y is drawn as liquid and 1 - i - y returns to the low-pressure section.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.7
    (Linde dual-pressure system).
    """

    layout = "dual-pressure"

    def __init__(self, scenario, fluid=None):
        super().__init__(scenario, fluid)
        sc = scenario
        self.recuperator = rec = Recuperator(sc.recuperator)
        self.i = sc.dual_pressure.recirculated_fraction
        self.suction_flow = 1.0 - self.i
        self.intermediate_pressure = sc.dual_pressure.intermediate_pressure
        self.suction_pressure = rec.cold_outlet_pressure(sc.low_pressure)
        self.mixing_pressure = rec.cold_outlet_pressure(self.intermediate_pressure)
        self.first_valve = ThrottleValve(self.intermediate_pressure)
        self.mixer = MakeupMixer(self.suction_pressure, sc.ambient_temperature, sc.low_pressure)

    def _receiver(self):
        """Saturated liquid and vapour of the intermediate receiver, or None above the critical
        pressure (where the first valve's outlet is one phase and nothing separates)."""
        fl, p_i = self.fluid, self.intermediate_pressure
        if p_i >= fl.p_critical * (1 - 1e-6):
            return None
        return fl.saturated_liquid(p_i), fl.saturated_vapour(p_i)

    def _split(self, h_mid, sat):
        """What the intermediate receiver does with the first valve's outflow at ``h_mid`` [J/kg].

        The fraction i goes back through the recuperator, vapour first; the rest, liquid first,
        goes on to the second valve.  Returns (enthalpy returned, enthalpy to the second valve
        [J/kg], vapour fraction of the outflow or None where it is one phase).  Continuous in
        ``h_mid``, as the recycle solve needs.
        """
        i = self.i
        if sat is None:
            return h_mid, h_mid, None  # above the critical pressure: a plain tee
        liquid, vapour = sat
        if not liquid.h <= h_mid <= vapour.h:  # all liquid or all vapour: it leaves as it came
            return h_mid, h_mid, 0.0 if h_mid < liquid.h else 1.0
        q = (h_mid - liquid.h) / (vapour.h - liquid.h)
        h_back = vapour.h if q >= i else (q * vapour.h + (i - q) * liquid.h) / i
        return h_back, (h_mid - i * h_back) / (1.0 - i), q

    def _solve(self, xtol, maxiter):
        fl, sc, rec, i = self.fluid, self.scenario, self.recuperator, self.i
        hot_in, liquid, vapour = self._fixed_states(self.suction_pressure)
        self._check_inversion(hot_in, self.suction_pressure)
        yield_at, flow_at = self._yield_function(liquid, vapour, feed_flow=1.0 - i)
        p_i = self.intermediate_pressure
        sat = self._receiver()

        def yield_of(duty):
            return yield_at(self._split(hot_in.h - duty, sat)[1])

        def colds_of(duty):
            back = fl.state_ph(p_i, self._split(hot_in.h - duty, sat)[0])
            return [(vapour, max(0.0, 1.0 - i - yield_of(duty))), (back, i)]

        section = Section(fl, rec, hot_in, colds_of, vapour.T)
        lowest = max(0.0, hot_in.h - vapour.h)
        try:
            duty, prof, report = solve_section(section, lambda d: flow_at(yield_of(d)), lowest, xtol, maxiter)
        except UnreachableSizingError as err:
            raise ScenarioError(
                f"dual_pressure.recirculated_fraction {i:g} returns more gas at the intermediate pressure "
                f"than the recuperator can warm ({err}); lower it: it must stay well below 1 - y") from None
        y = yield_of(duty)
        eps = section.effectiveness(duty)
        m_fixed, _ = self._production(liquid)
        q0 = sc.heat_leak / m_fixed if m_fixed else 0.0
        # y = 0 where the second valve is fed at h = hg - q0 / (1 - i), all of it returning.
        h_feed0 = vapour.h - q0 / (1.0 - i)
        h_mid0 = h_feed0
        if sat is not None and h_feed0 < sat[1].h:
            h_mid0 = (1.0 - i) * h_feed0 + i * sat[1].h
        duty0 = hot_in.h - h_mid0
        back0 = fl.state_ph(p_i, self._split(h_mid0, sat)[0])
        eps_crit = rec.effectiveness(fl, hot_in, [(vapour, 1.0 - i), (back0, i)], duty0)
        if y <= 0:
            raise NoLiquefactionError(self._critical_message(eps, eps_crit, "recuperator"))
        if i >= 1.0 - y:
            raise ScenarioError(f"dual_pressure.recirculated_fraction must be below 1 - y = {1.0 - y:.4f} here "
                                f"(no gas would be left to return at the low pressure), got {i:g}")
        m = flow_at(y)

        hp_out = fl.state_ph(rec.hot_outlet_pressure(hot_in.p), hot_in.h - duty)
        mid = self.first_valve.run(fl, hp_out)
        h_back, h_feed, vapour_fraction = self._split(mid.h, sat)
        back = fl.state_ph(p_i, h_back)
        feed = fl.state_ph(p_i, h_feed)
        valve_out = self.valve.run(fl, feed)
        T_out = float(prof.cold_T[-1])
        lp_ret = fl.state_tp(T_out, self.suction_pressure)
        # The recirculated stream's outlet from the duty it took (exact even where it leaves at its
        # boiling temperature, where a (T, p) state would be ambiguous).
        ip_ret = fl.state_ph(self.mixing_pressure, back.h + (duty - (1.0 - i - y) * (lp_ret.h - vapour.h)) / i)
        if ip_ret.quality is not None:
            raise ScenarioError(
                f"dual_pressure.recirculated_fraction {i:g} is more than the recuperator can evaporate: the "
                f"recirculated stream leaves it still boiling (vapour fraction {ip_ret.quality:.3f} at "
                f"{ip_ret.T:.2f} K) and would carry liquid into the high-pressure section; lower the fraction "
                f"or dual_pressure.intermediate_pressure")
        makeup = self.mixer.makeup_state(fl)
        suction = self.mixer.run(fl, lp_ret, 1.0 - i - y, y)
        low = self.compressor.run(fl, suction, self.mixing_pressure, section="low-pressure section ",
                                  cool_after=True)
        from cycle.processes import mix

        hp_suction = mix(fl, self.mixing_pressure, [(1.0 - i, low.outlet.h), (i, ip_ret.h)])
        high = self.compressor.run(fl, hp_suction, sc.high_pressure, section="high-pressure section ")
        hp_in, after_duty = self.aftercooler.run(fl, high.outlet)

        streams = [("compressor suction (low-pressure section)", suction, 1.0 - i)]
        streams += [(label, st, 1.0 - i) for label, st in low.states]
        streams += [("intermediate mixing outlet, high-pressure section suction", hp_suction, 1.0)]
        streams += [(label, st, 1.0) for label, st in high.states]
        streams += [
            ("aftercooler outlet, recuperator high-pressure inlet", hp_in, 1.0),
            ("recuperator high-pressure outlet, first valve inlet", hp_out, 1.0),
        ]
        if vapour_fraction is None:
            streams.append(("first valve outlet (intermediate pressure)", mid, 1.0))
        else:
            streams += [("first valve outlet, intermediate receiver inlet", mid, 1.0),
                        ("receiver return, recuperator intermediate-pressure inlet", back, i),
                        ("receiver outflow, second valve inlet", feed, 1.0 - i)]
        streams += [
            ("second valve outlet, separator inlet", valve_out, 1.0 - i),
            ("liquid product", liquid, y),
            ("separator vapour, recuperator low-pressure inlet", vapour, 1.0 - i - y),
            ("recuperator low-pressure outlet", lp_ret, 1.0 - i - y),
            ("recuperator intermediate-pressure outlet", ip_ret, i),
            ("make-up gas", makeup, y),
        ]
        q_leak = sc.heat_leak / m if m else 0.0
        low_out = low.outlet
        losses = {
            "compressor": (self._exergy_loss([(suction, 1.0 - i)], [(low_out, 1.0 - i)],
                                             [(-(1.0 - i) * low.heat_rejected, self.T0)])
                           + self._exergy_loss([(hp_suction, 1.0)], [(hp_in, 1.0)],
                                               [(-(high.heat_rejected + after_duty), self.T0)])),
            "intermediate_mixing": self._exergy_loss([(low_out, 1.0 - i), (ip_ret, i)], [(hp_suction, 1.0)]),
            "recuperator": self._exergy_loss([(hot_in, 1.0), (vapour, 1.0 - i - y), (back, i)],
                                             [(hp_out, 1.0), (lp_ret, 1.0 - i - y), (ip_ret, i)]),
            "intermediate_valve": self._exergy_loss([(hp_out, 1.0)], [(mid, 1.0)]),
            "make_up_mixing": self._exergy_loss([(lp_ret, 1.0 - i - y), (makeup, y)], [(suction, 1.0 - i)]),
        }
        if vapour_fraction is not None:  # separating two phases in equilibrium: about nothing
            losses["intermediate_receiver"] = self._exergy_loss([(mid, 1.0)], [(back, i), (feed, 1.0 - i)])
        losses.update(self._cold_end_losses(y, q_leak, feed, valve_out, 1.0 - i, liquid, vapour))
        warn = []
        if vapour_fraction == 0.0:
            warn.append(f"the intermediate receiver gets no vapour (the first valve delivers liquid at "
                        f"{mid.T:.2f} K): the recirculated fraction {i:g} goes back as liquid and boils in the "
                        f"recuperator; lower dual_pressure.intermediate_pressure or the fraction for a vapour return")
        elif vapour_fraction is not None and vapour_fraction < i:
            warn.append(f"the intermediate receiver gets {vapour_fraction:.4f} of vapour per kg compressed, less "
                        f"than dual_pressure.recirculated_fraction {i:g}: {i - vapour_fraction:.4f} of its liquid "
                        f"goes back with the vapour and boils in the recuperator; for a vapour-only return lower the "
                        f"fraction (the vapour the receiver gets changes with it) or raise "
                        f"dual_pressure.intermediate_pressure")
        return self._finish(
            y=y, m=m, streams=streams, compressions=[(low, 1.0 - i), (high, 1.0)], after_duty=after_duty,
            makeup=makeup, liquid=liquid, throttle_outlet=valve_out,
            recuperators={"recuperator": self._recuperator_result(duty, prof, eps, eps_crit)},
            reports={"recuperator": report}, losses=losses, warn=warn,
            receiver_vapour_fraction=vapour_fraction,
            valves=[(hp_out, p_i, 1.0), (feed, sc.low_pressure, 1.0 - i)])
