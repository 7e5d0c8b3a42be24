"""Unit-operation objects: each holds its parameters and calls the physics in
:mod:`cycle.processes`.  The flowsheet (:mod:`cycle.flowsheet`) wires them by named streams.

All flows are per kg of compressor flow; duties and works are J per kg of compressor flow
unless a name says otherwise.
"""

from dataclasses import dataclass
import math

from cycle import processes
from cycle.errors import ScenarioError


# How the isothermal model's outlet state is named in state tables and figures.
ISOTHERMAL_LABEL = "(isothermal model: cooled in the machine)"


@dataclass(frozen=True)
class Stage:
    """One stage of a compressor train (or the one row of the isothermal model).

    Attributes
    ----------
    number : int
        Stage number within its compression (1 to N).
    suction, discharge : properties.State
        The gas entering and leaving the stage; for the isothermal model the discharge is the
        model's outlet at the cooling temperature, not a temperature a machine would show.
    work : float
        Gas work of the stage [J/kg through it].
    cooler_duty : float
        Heat taken by the cooler after the stage [J/kg]: an intercooler, or 0 where the stage
        feeds the aftercooler (its duty belongs to the aftercooler); for the isothermal model,
        the heat removed inside the machine.
    cooler_outlet : properties.State or None
        The intercooler's outlet, None where the stage feeds the aftercooler.
    """

    number: int
    suction: object
    discharge: object
    work: float
    cooler_duty: float = 0.0
    cooler_outlet: object = None


@dataclass(frozen=True)
class CompressionResult:
    """Outcome of the compressor train.

    Attributes
    ----------
    states : list of (str, properties.State)
        Named states after each stage and each intercooler, ending at the discharge.
    work : float
        Shaft work [J/kg compressed].
    heat_rejected : float
        Heat taken from the gas inside the compressor train (stage cooling and intercoolers) [J/kg].
    chiller_work : float
        Least work of the chillers that intercooling below ambient needs, an ideal (Carnot)
        refrigerator's [J/kg compressed]; 0 with intercoolers at or above ambient.
    warnings : tuple of str
        Stages discharging above ``compressor.max_discharge_temperature``, in words.
    stages : tuple of Stage
        The stages in order (one row for the isothermal model).
    model : str
        ``"staged"`` or ``"isothermal"``.
    """

    states: list
    work: float
    heat_rejected: float
    chiller_work: float = 0.0
    warnings: tuple = ()
    stages: tuple = ()
    model: str = "staged"

    @property
    def outlet(self):
        return self.states[-1][1]


class Compressor:
    """Compressor: isothermal efficiency, or stages with isentropic efficiency and intercooling.

    Parameters
    ----------
    spec : cycle.scenario.CompressorSpec
    cooling_temperature : float
        Temperature the intercoolers (and, for the isothermal model, the compressor itself)
        bring the gas to [K]: the aftercooler outlet temperature.
    ambient_temperature : float
        Temperature of the surroundings [K].
    """

    def __init__(self, spec, cooling_temperature, ambient_temperature):
        self.spec = spec
        self.cooling_temperature = cooling_temperature
        self.ambient_temperature = ambient_temperature

    def run(self, fluid, inlet, p_out, section="", cool_after=False):
        """Compress ``inlet`` to ``p_out`` [Pa]; return a :class:`CompressionResult`.

        Parameters
        ----------
        section : str
            Prefix for the state labels (``"low-pressure section "``).
        cool_after : bool
            Intercool the last stage's discharge too (a section that feeds another).

        Raises
        ------
        ScenarioError
            If a stage leaves the range of the equation of state (a stage too hot for it);
            the message names the stage and suggests more stages.
        """
        spec = self.spec
        last = f"{section}discharge" if section else "compressor discharge"
        if spec.isothermal_efficiency is not None:
            outlet, work, heat = processes.compress_isothermal(
                fluid, inlet, p_out, self.cooling_temperature, spec.isothermal_efficiency,
                self.ambient_temperature)
            # Not a discharge at a temperature a machine would show: the model rejects the heat
            # inside the compressor and delivers the gas at the aftercooler temperature.  Its
            # reversible work is the exergy rise to that state, so below ambient it already
            # counts the refrigeration; there is no stage discharge to check.
            label = f"{section}outlet" if section else "compressor outlet"
            stage = Stage(1, inlet, outlet, work, heat)
            return CompressionResult([(f"{label} {ISOTHERMAL_LABEL}", outlet)], work, heat,
                                     stages=(stage,), model="isothermal")
        from properties import PropertyRangeError

        states, rows, work, heat, chill = [], [], 0.0, 0.0, 0.0
        state = inlet
        n = spec.stages
        dp = spec.intercooler_pressure_drop
        T_cool = self.intercooler_temperature
        pressures = self.stage_pressures(inlet.p, p_out, cool_after)
        hot = []
        for k, p_stage in enumerate(pressures, start=1):
            if not p_stage > state.p:
                raise ScenarioError(
                    f"{_stage_name(k, n, section)} would draw at {state.p / 1e5:.4g} bar and discharge at "
                    f"{p_stage / 1e5:.4g} bar: compressor.intercooler_pressure_drop {dp / 1e5:g} bar takes more "
                    f"than the stage gives; lower it or use fewer stages")
            try:
                outlet, w = processes.compress_isentropic(fluid, state, p_stage, spec.isentropic_efficiency)
            except PropertyRangeError as err:
                raise ScenarioError(
                    f"{_stage_name(k, n, section)} leaves the range of the {fluid.name} equation of state at a "
                    f"pressure ratio of {p_stage / state.p:.3g} ({err}); {self._more_stages(fluid, inlet, p_out)}"
                ) from None
            work += w
            if outlet.T > spec.max_discharge_temperature:
                hot.append((k, outlet.T))
            states.append((last if k == n else f"{section}stage {k} discharge", outlet))
            suction = state
            state, duty, cooled = outlet, 0.0, None
            if k < n or cool_after:
                cooled, duty = processes.cool(fluid, outlet, T_cool, dp)
                heat += duty
                chill += processes.chiller_work(fluid, outlet, cooled, self.ambient_temperature)
                states.append((f"{section}intercooler {k} outlet", cooled))
                state = cooled
            rows.append(Stage(k, suction, outlet, w, duty, cooled))
        warn = ()
        if hot:
            warn = (self._hot_warning(fluid, inlet, p_out, section, hot),)
        return CompressionResult(states, work, heat, chill, warn, tuple(rows))

    @property
    def intercooler_temperature(self):
        """Temperature the intercoolers bring the gas to [K]."""
        T = self.spec.intercooler_temperature
        return self.cooling_temperature if T is None else T

    def stage_pressures(self, p_in, p_out, cool_after=False):
        """Discharge pressure of each stage [Pa]: as given, or equal ratios; with ``cool_after``
        the last stage discharges the intercooler's pressure drop above ``p_out``."""
        spec = self.spec
        dp = spec.intercooler_pressure_drop
        top = p_out + dp if cool_after else p_out
        if spec.stage_pressures is not None:
            return list(spec.stage_pressures) + [top]
        return processes.stage_pressures(p_in, top, spec.stages, dp)

    def _hot_warning(self, fluid, inlet, p_out, section, hot):
        """One sentence on the stages in ``hot`` [(stage, discharge temperature [K])]."""
        n, limit = self.spec.stages, self.spec.max_discharge_temperature
        stages = [k for k, _ in hot]
        if len(stages) == 1:
            who = f"stage {stages[0]} of {n}"
            verb = "discharges"
        else:
            who = f"stages {_and(str(k) for k in stages)} of {n}"
            verb = "discharge"
        if section:
            who += f" ({section.strip()})"
        temps = (f"{_and(f'{T:.1f}' for _, T in hot)} K "
                 f"({_and(f'{T - 273.15:.0f}' for _, T in hot)} degC)")
        r = (p_out / inlet.p) ** (1.0 / n)
        ratio = f"{r:.3g} " + ("in one stage" if n == 1 else "per stage")
        practice = " (common practice for a reciprocating stage: about 3 to 5)" if r > 5.0 else ""
        return (f"compressor {who} {verb} at {temps}, above compressor.max_discharge_temperature {limit:.2f} K "
                f"({limit - 273.15:.0f} degC), at a pressure ratio of {ratio}{practice}; "
                f"{self._more_stages(fluid, inlet, p_out)}")

    def _more_stages(self, fluid, inlet, p_out):
        """Advice: the fewest stages (up to the 12 allowed) that keep every discharge of this
        compression at or below ``max_discharge_temperature``, intercooled as now."""
        limit = self.spec.max_discharge_temperature
        for n in range(self.spec.stages + 1, 13):
            if self._hottest_discharge(fluid, inlet, p_out, n) <= limit:
                spread = (" at equal pressure ratios (compressor.stage_pressures left out)"
                          if self.spec.stage_pressures is not None else "")
                return (f"compress in more stages: compressor.stages {n}{spread} (intercooled to "
                        f"{self.intercooler_temperature:.5g} K) keeps every discharge below {limit:.2f} K")
        return (f"even compressor.stages 12 would not keep every discharge below {limit:.2f} K here: "
                f"intercool colder (compressor.intercooler_temperature) or use a better compressor "
                f"(compressor.isentropic_efficiency)")

    def _hottest_discharge(self, fluid, inlet, p_out, n):
        """Hottest stage discharge [K] of ``n`` intercooled stages (inf outside the fluid's range)."""
        from properties import PropertyRangeError

        state, hottest = inlet, 0.0
        dp = self.spec.intercooler_pressure_drop
        try:
            for p_stage in processes.stage_pressures(inlet.p, p_out, n, dp):
                if not p_stage > state.p:
                    return math.inf
                outlet, _ = processes.compress_isentropic(fluid, state, p_stage, self.spec.isentropic_efficiency)
                hottest = max(hottest, outlet.T)
                state, _ = processes.cool(fluid, outlet, self.intercooler_temperature, dp)
        except PropertyRangeError:
            return math.inf
        return hottest


def _stage_name(k, n, section):
    """``compressor stage 2 of 3``, with the section in brackets where there are two."""
    return f"compressor stage {k} of {n}" + (f" ({section.strip()})" if section else "")


def _and(items):
    """``1, 2 and 3``."""
    items = list(items)
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


class Aftercooler:
    """Cools the compressed gas to ``outlet_temperature`` [K] with ``pressure_drop`` [Pa]."""

    def __init__(self, outlet_temperature, pressure_drop=0.0):
        self.outlet_temperature = outlet_temperature
        self.pressure_drop = pressure_drop

    def run(self, fluid, inlet):
        """Return (outlet state, duty [J/kg])."""
        return processes.cool(fluid, inlet, self.outlet_temperature, self.pressure_drop)

    def chiller_work(self, fluid, inlet, ambient_temperature):
        """Least work [J/kg] of the chiller an outlet below ``ambient_temperature`` [K] needs:
        an ideal (Carnot) refrigerator's (:func:`cycle.processes.chiller_work`); 0 otherwise."""
        outlet, _ = self.run(fluid, inlet)
        return processes.chiller_work(fluid, inlet, outlet, ambient_temperature)


class ThrottleValve:
    """Isenthalpic expansion to ``outlet_pressure`` [Pa]."""

    def __init__(self, outlet_pressure):
        self.outlet_pressure = outlet_pressure

    def run(self, fluid, inlet):
        return processes.throttle(fluid, inlet, self.outlet_pressure)


class Separator:
    """Phase separator at ``pressure`` [Pa]: saturated liquid drawn off, saturated vapour returned.

    The cold-box heat leak is charged here, at the coldest point (common practice: it is the
    conservative place, every joule boils product).
    """

    def __init__(self, pressure):
        self.pressure = pressure

    def saturation(self, fluid):
        """Saturated liquid and vapour at the separator pressure."""
        return fluid.saturated_liquid(self.pressure), fluid.saturated_vapour(self.pressure)

    def liquid_fraction(self, fluid, h_in, heat_in=0.0):
        """Fraction of the inflow drawn as liquid, with ``heat_in`` [J/kg of inflow]."""
        liquid, vapour = self.saturation(fluid)
        return processes.separator_liquid_fraction(h_in, liquid.h, vapour.h, heat_in)


class MakeupMixer:
    """Mixes the make-up gas (replacing the liquid drawn) into the return gas at compressor suction.

    The make-up gas is supplied at ``makeup_temperature`` [K] and ``makeup_pressure`` [Pa] (the
    ambient state the ideal work of liquefaction starts from) and expands into the suction
    pressure as it mixes.
    """

    def __init__(self, pressure, makeup_temperature, makeup_pressure=None):
        self.pressure = pressure
        self.makeup_temperature = makeup_temperature
        self.makeup_pressure = makeup_pressure if makeup_pressure is not None else pressure

    def makeup_state(self, fluid):
        return fluid.state_tp(self.makeup_temperature, self.makeup_pressure)

    def run(self, fluid, return_state, return_flow, makeup_flow, makeup_fluid=None):
        makeup = self.makeup_state(makeup_fluid or fluid)
        near = return_state if return_flow >= makeup_flow else None
        return processes.mix(fluid, self.pressure, [(return_flow, return_state.h), (makeup_flow, makeup.h)], near=near)


class Recuperator:
    """Counterflow recuperator: the high-pressure stream against one or more cold return streams.

    Sized by exactly one of ``effectiveness`` (the cold streams' enthalpy rise over their rise
    to the high-pressure inlet temperature), ``min_approach`` [K] (the internal pinch over the
    zones) or ``ua`` [W/K] (sum of zone duty over zone LMTD).  With several cold streams they
    form one composite and leave at a common temperature.

    Parameters
    ----------
    spec : cycle.scenario.RecuperatorSpec
    key : str
        The scenario key it was given under, for messages (``recuperator``, ``cold_recuperator``).

    Notes
    -----
    Cold streams are given as a list of ``(inlet state, flow)``, flows per kg of compressor flow.
    """

    def __init__(self, spec, key="recuperator"):
        self.spec = spec
        self.key = key
        self.zones = spec.zones
        self.geometry = self.wall = None
        if spec.geometry is not None:
            from cycle.heat_transfer import TubeInTube
            from cycle.tube_exchanger import Wall

            g = spec.geometry
            self.geometry = TubeInTube(g.tubes, g.inner_inside, g.inner_outside, g.outer_inside, g.roughness,
                                       g.coil_diameter)
            self.wall = Wall(g.wall_conductivity, g.wall_material)
        self._last_rating = None  # the last rated march: the next duty's starts from an estimate around it

    def hot_outlet_pressure(self, hot_in_p):
        return hot_in_p - self.spec.high_side_pressure_drop

    def cold_outlet_pressure(self, cold_in_p):
        return cold_in_p - self.spec.low_side_pressure_drop

    def effectiveness(self, fluid, hot_in, colds, duty, cold_fluid=None):
        """Effectiveness reached with ``duty`` [J/kg compressed] (``cold_fluid``: the cold
        streams' fluid where it is not the hot stream's)."""
        most = sum(flow * ((cold_fluid or fluid).state_tp(hot_in.T, self.cold_outlet_pressure(st.p)).h - st.h)
                   for st, flow in colds)
        return duty / most

    def profile(self, fluid, hot_in, colds, duty, zones=None, flow=None, cold_fluid=None, rough=False):
        """Temperature profile for ``duty`` [J/kg compressed] (:class:`~cycle.processes.ExchangerProfile`).

        With a geometry, ``flow`` [kg/s] is the compressor flow, and the profile carries the
        hardware's march (``rating``: lengths, coefficients, computed pressures); ``rough``: one
        march, its pressures not settled (a root finder's step; the rating says whether it is
        ``settled`` all the same).
        """
        zones = zones or self.zones
        if self.geometry is not None:
            from dataclasses import replace

            from cycle.tube_exchanger import PRESSURE_RTOL, rate

            (cold_in, cold_flow), = colds
            rated = rate(fluid, self.geometry, self.wall, hot_in, flow, cold_in, cold_flow * flow, duty * flow,
                         zones, self.key, start=self._last_rating, rtol=math.inf if rough else PRESSURE_RTOL)
            if duty > 0 and math.isfinite(rated.length):
                self._last_rating = rated
            return replace(rated.profile, rating=rated)
        hot_p_out = self.hot_outlet_pressure(hot_in.p)
        if len(colds) == 1:
            (cold_in, flow), = colds
            return processes.counterflow_profile(fluid, hot_in, hot_p_out, 1.0, cold_in,
                                                 self.cold_outlet_pressure(cold_in.p), flow, duty, zones,
                                                 cold_fluid=cold_fluid)
        return processes.composite_profile(
            fluid, hot_in, hot_p_out, 1.0,
            [(st, self.cold_outlet_pressure(st.p), flow) for st, flow in colds], duty, zones)

    def estimator(self, fluid, hot_in, colds, duty, cold_fluid=None):
        """From the march just made at ``duty``, a function ``estimate(duty, colds) -> (min
        approach [K], UA per unit flow)`` at other duties with no property call
        (:func:`cycle.processes.counterflow_estimator`); None for a recuperator given by its
        geometry or with several cold streams, or with nothing remembered to estimate from."""
        if self.geometry is not None or len(colds) != 1:
            return None
        (cold_in, flow), = colds
        found = processes.counterflow_estimator(fluid, hot_in, self.hot_outlet_pressure(hot_in.p), 1.0, cold_in,
                                                self.cold_outlet_pressure(cold_in.p), flow, duty, self.zones,
                                                cold_fluid=cold_fluid)
        if found is None:
            return None

        def estimate(Q, colds):
            if len(colds) != 1:
                return None
            (cold_in, flow), = colds
            return found(Q, cold_in, self.cold_outlet_pressure(cold_in.p), flow)

        return estimate

    def length_estimator(self, rated, hot_in):
        """From a rating (a :class:`cycle.tube_exchanger.RatedProfile` of this exchanger), a
        function ``estimate(duty [J/kg compressed], colds, flow [kg/s]) -> length [m]`` at other
        duties with no property call (:func:`cycle.tube_exchanger.estimated_length`; None where
        its model leaves its range); None without a geometry."""
        if self.geometry is None or rated is None:
            return None
        from cycle.tube_exchanger import estimated_length

        geometry = self.geometry

        def estimate(Q, colds, flow):
            if len(colds) != 1:
                return None
            (cold_in, cold_flow), = colds
            return estimated_length(rated, geometry, hot_in, flow, cold_in, cold_flow * flow, Q * flow)

        return estimate

    def max_hot_duty(self, fluid, hot_in, T_floor):
        """Duty that cools the hot stream to ``T_floor`` [K] (or its melting line) [J/kg compressed]."""
        hot_p_out = self.hot_outlet_pressure(hot_in.p)
        T_melt = fluid.melting_temperature(hot_p_out)
        if T_melt is not None and T_melt > T_floor:
            T_floor = T_melt * (1 + 1e-9)
        return hot_in.h - fluid.state_tp(T_floor, hot_p_out).h


@dataclass(frozen=True)
class PrecoolingSupply:
    """What the precooler's heat costs.

    Attributes
    ----------
    work : float
        Work charged [J/kg of compressor flow].
    sink_temperature : float
        Temperature at which the heat is taken up: the bath's boiling point, or the
        precooling temperature for a refrigerator [K].
    coolant : float or None
        Coolant boiled off [kg per kg of compressor flow], for a bath.
    coolant_work : float or None
        Work charged per kg of coolant [J/kg].
    lower_bound : bool
        True where the coolant is charged at its ideal work of liquefaction.
    coolant_density : float or None
        Density of the coolant as it is fed, saturated liquid at the bath pressure [kg/m3].
    """

    work: float
    sink_temperature: float
    coolant: float = None
    coolant_work: float = None
    lower_bound: bool = False
    coolant_density: float = None


class Precooler:
    """Brings the high-pressure stream to ``spec.temperature`` and says what that costs.

    A boiling bath of ``spec.coolant`` at ``spec.coolant_pressure`` takes the heat as latent
    heat (liquid in, saturated vapour out, its cold not recovered), charged at
    ``spec.coolant_work`` per kg boiled off (default: the coolant's ideal work of
    liquefaction from ambient, a lower bound).  A refrigerator rejecting heat at ambient takes
    it at the precooling temperature with ``spec.refrigerator_cop``, or with a fraction of the
    Carnot COP.

    Parameters
    ----------
    spec : cycle.scenario.PrecoolingSpec
    ambient_temperature : float
        [K]
    """

    def __init__(self, spec, ambient_temperature):
        self.spec = spec
        self.ambient_temperature = ambient_temperature

    def run(self, fluid, inlet):
        """Return (outlet state at the precooling temperature, duty [J/kg])."""
        return processes.cool(fluid, inlet, self.spec.temperature)

    def coolant_states(self):
        """Saturated liquid and vapour of the bath coolant."""
        from properties import get_fluid

        coolant = get_fluid(self.spec.coolant)
        p = self.spec.coolant_pressure
        return coolant.saturated_liquid(p), coolant.saturated_vapour(p)

    def least_coolant_work(self):
        """Least work per kg of coolant boiled off that the second law allows [J/kg]: the exergy
        of the refrigeration the bath delivers, latent heat times (T0 / T_boil - 1)."""
        liquid, vapour = self.coolant_states()
        return processes.refrigeration_exergy(vapour.h - liquid.h, liquid.T, self.ambient_temperature)

    def supply(self, duty, flow=None):
        """Cost of ``duty`` [J/kg compressed] of precooling (:class:`PrecoolingSupply`);
        ``flow`` [kg/s] is the compressor flow, needed for a cooler given by its input power."""
        spec, T0 = self.spec, self.ambient_temperature
        if spec.cooler_capacity is not None:
            return PrecoolingSupply(spec.cooler_input_power / flow, spec.temperature)
        if spec.coolant is not None:
            from properties import get_fluid

            liquid, vapour = self.coolant_states()
            boiled = duty / (vapour.h - liquid.h)
            per_kg = spec.coolant_work
            lower = per_kg is None
            if lower:
                per_kg = processes.ideal_work_of_liquefaction(get_fluid(spec.coolant), T0, spec.coolant_pressure)
            return PrecoolingSupply(boiled * per_kg, liquid.T, boiled, per_kg, lower, liquid.density)
        cop = spec.refrigerator_cop
        if cop is None:
            cop = spec.refrigerator_carnot_fraction * processes.carnot_cop(spec.temperature, T0)
        return PrecoolingSupply(duty / cop, spec.temperature)
