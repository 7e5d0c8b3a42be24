"""Unit-operation objects: each holds its parameters and calls the physics in
:mod:`cycle.processes`.  The flowsheet (:mod:`cycle.flowsheet`) wires them by named streams.

All flows are per kg of compressor flow; duties and works are J per kg of compressor flow
unless a name says otherwise.
"""

from dataclasses import dataclass

from cycle import processes


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
        Heat rejected inside the compressor train (stage cooling and intercoolers) [J/kg].
    """

    states: list
    work: float
    heat_rejected: float

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

    def run(self, fluid, inlet, p_out):
        """Compress ``inlet`` to ``p_out`` [Pa]; return a :class:`CompressionResult`."""
        spec = self.spec
        if spec.isothermal_efficiency is not None:
            outlet, work, heat = processes.compress_isothermal(
                fluid, inlet, p_out, self.cooling_temperature, spec.isothermal_efficiency,
                self.ambient_temperature)
            return CompressionResult([("compressor discharge", outlet)], work, heat)
        states, work, heat = [], 0.0, 0.0
        state = inlet
        pressures = processes.stage_pressures(inlet.p, p_out, spec.stages)
        for k, p_stage in enumerate(pressures, start=1):
            state, w = processes.compress_isentropic(fluid, state, p_stage, spec.isentropic_efficiency)
            work += w
            label = "compressor discharge" if k == spec.stages else f"stage {k} discharge"
            states.append((label, state))
            if k < spec.stages:
                state, duty = processes.cool(fluid, state, self.cooling_temperature)
                heat += duty
                states.append((f"intercooler {k} outlet", state))
        return CompressionResult(states, work, heat)


class Aftercooler:
    """Cools the compressed gas to ``outlet_temperature`` [K] with ``pressure_drop`` [Pa]."""

    def __init__(self, outlet_temperature, pressure_drop=0.0):
        self.outlet_temperature = outlet_temperature
        self.pressure_drop = pressure_drop

    def run(self, fluid, inlet):
        """Return (outlet state, duty [J/kg])."""
        return processes.cool(fluid, inlet, self.outlet_temperature, self.pressure_drop)


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
    """Mixes the make-up gas (replacing the liquid drawn) into the return gas at compressor suction."""

    def __init__(self, pressure, makeup_temperature):
        self.pressure = pressure
        self.makeup_temperature = makeup_temperature

    def makeup_state(self, fluid):
        return fluid.state_tp(self.makeup_temperature, self.pressure)

    def run(self, fluid, return_state, return_flow, makeup_flow):
        makeup = self.makeup_state(fluid)
        return processes.mix(fluid, self.pressure, [(return_flow, return_state.h), (makeup_flow, makeup.h)])


class Recuperator:
    """Counterflow recuperator between the high-pressure stream and the cold return gas.

    Sized by exactly one of ``effectiveness`` (on the low-pressure stream: its enthalpy
    rise over the rise to the high-pressure inlet temperature), ``min_approach`` [K] (the
    internal pinch over the zones) or ``ua`` [W/K] (sum of zone duty over zone LMTD).

    Parameters
    ----------
    spec : cycle.scenario.RecuperatorSpec
    """

    def __init__(self, spec):
        self.spec = spec
        self.zones = spec.zones

    def pressures(self, hot_in_p, cold_in_p):
        """Outlet pressures of the hot and cold sides [Pa]."""
        return hot_in_p - self.spec.high_side_pressure_drop, cold_in_p - self.spec.low_side_pressure_drop

    def effectiveness(self, fluid, hot_in, cold_in, cold_flow, duty):
        """Effectiveness reached with ``duty`` [J/kg compressed] and ``cold_flow`` [-]."""
        _, cold_p_out = self.pressures(hot_in.p, cold_in.p)
        h_max = fluid.state_tp(hot_in.T, cold_p_out).h
        return duty / (cold_flow * (h_max - cold_in.h))

    def profile(self, fluid, hot_in, cold_in, cold_flow, duty, zones=None):
        """Temperature profile for ``duty`` [J/kg compressed] (:class:`~cycle.processes.ExchangerProfile`)."""
        hot_p_out, cold_p_out = self.pressures(hot_in.p, cold_in.p)
        return processes.counterflow_profile(fluid, hot_in, hot_p_out, 1.0, cold_in, cold_p_out,
                                             cold_flow, duty, zones or self.zones)

    def max_hot_duty(self, fluid, hot_in, cold_in):
        """Duty that cools the hot stream to the cold-inlet temperature [J/kg compressed]."""
        hot_p_out, _ = self.pressures(hot_in.p, cold_in.p)
        T_floor = cold_in.T
        T_melt = fluid.melting_temperature(hot_p_out)
        if T_melt is not None and T_melt > T_floor:
            T_floor = T_melt * (1 + 1e-9)
        return hot_in.h - fluid.state_tp(T_floor, hot_p_out).h
