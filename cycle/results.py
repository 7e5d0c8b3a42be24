"""Results of a solved cycle: frozen dataclasses with units in their field docs,
``to_dict()`` for JSON and ``to_frame()`` for pandas."""

from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from cycle.processes import ExchangerProfile


@dataclass(frozen=True)
class SolveReport:
    """How the recycle solve went, in the manner of ``scipy.optimize.OptimizeResult``.

    Attributes
    ----------
    converged : bool
    iterations : int
        Iterations of the root-finder on the tear variable.
    function_calls : int
    residual : float
        Residual of the sizing equation at the solution, in ``residual_unit``.
    residual_unit : str
    tolerance : float
        Absolute tolerance on the tear variable [J/kg of compressor flow].
    tear_variable : str
    method : str
    message : str
    """

    converged: bool
    iterations: int
    function_calls: int
    residual: float
    residual_unit: str
    tolerance: float
    tear_variable: str = "recuperator duty per kg of compressor flow [J/kg]"
    method: str = "brentq"
    message: str = ""

    def to_dict(self):
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


@dataclass(frozen=True)
class StreamState:
    """One numbered stream of the flowsheet.

    Attributes
    ----------
    number : int
    name : str
    state : properties.State
    flow : float
        Mass flow per kg of compressor flow [-].
    """

    number: int
    name: str
    state: object
    flow: float


@dataclass(frozen=True)
class RecuperatorResult:
    """Performance of the recuperator.

    Attributes
    ----------
    duty : float
        Heat passed from the high-pressure stream [J/kg of compressor flow].
    effectiveness : float
        Low-pressure-stream enthalpy rise over its rise to the high-pressure inlet temperature [-].
    critical_effectiveness : float
        Effectiveness below which the cycle makes no liquid at these conditions [-].
    min_approach : float
        Smallest temperature difference between the streams over the zone boundaries [K].
    min_approach_position : float
        Where the minimum approach lies, as the fraction of duty from the cold end [-].
    min_approach_hot_temperature : float
        High-pressure stream temperature at the minimum approach [K].
    ua_per_flow : float
        Conductance per unit compressor flow [W/K per kg/s]; inf where the streams touch.
    profile : ExchangerProfile
    """

    duty: float
    effectiveness: float
    critical_effectiveness: float
    min_approach: float
    min_approach_position: float
    min_approach_hot_temperature: float
    ua_per_flow: float
    profile: ExchangerProfile

    @property
    def warm_end_approach(self):
        return float(self.profile.approach[-1])

    @property
    def cold_end_approach(self):
        return float(self.profile.approach[0])


@dataclass(frozen=True)
class CycleResult:
    """A solved Linde-Hampson design point.  Specific quantities are per kg of compressor
    flow unless the name says per kg of liquid; all in SI (J/kg, K, Pa, kg/s, W).

    Attributes
    ----------
    scenario : cycle.scenario.Scenario
    liquid_yield : float
        Liquid mass flow over compressor mass flow [-].
    work_per_kg_compressed : float
        Compressor shaft work [J/kg of compressor flow].
    ideal_work_per_kg_liquid : float
        Minimum work of liquefaction, T0 (s1 - sf) - (h1 - hf) [J/kg of liquid].
    heat_leak_per_kg_compressed : float
        Cold-box heat leak [J/kg of compressor flow].
    compressor_heat_rejected : float
        Heat rejected by the compressor and its intercoolers [J/kg of compressor flow].
    aftercooler_duty : float
        [J/kg of compressor flow].
    liquid_density : float
        Saturated liquid density at the low pressure [kg/m3].
    recuperator : RecuperatorResult
    states : list of StreamState
    throttle_outlet : properties.State
    compressor_flow : float or None
        Compressor mass flow [kg/s], with a production target.
    energy_balance_residual : float
        (energy in - energy out) of the whole plant over the compressor work [-].
    solve : SolveReport
    warnings : list of str
    """

    scenario: object
    liquid_yield: float
    work_per_kg_compressed: float
    ideal_work_per_kg_liquid: float
    heat_leak_per_kg_compressed: float
    compressor_heat_rejected: float
    aftercooler_duty: float
    liquid_density: float
    recuperator: RecuperatorResult
    states: list
    throttle_outlet: object
    compressor_flow: Optional[float]
    energy_balance_residual: float
    solve: SolveReport
    warnings: list = field(default_factory=list)

    @property
    def work_per_kg_liquid(self):
        """Compressor work per kg of liquid [J/kg]."""
        return self.work_per_kg_compressed / self.liquid_yield

    @property
    def figure_of_merit(self):
        """Ideal work over actual work, both per kg of liquid [-]."""
        return self.ideal_work_per_kg_liquid / self.work_per_kg_liquid

    def summary(self):
        """The headline numbers, keyed by name with the unit at the end of the name."""
        rec = self.recuperator
        out = {
            "liquid_yield": self.liquid_yield,
            "work_kJ_per_kg_compressed": self.work_per_kg_compressed / 1e3,
            "work_kJ_per_kg_liquid": self.work_per_kg_liquid / 1e3,
            "ideal_work_kJ_per_kg_liquid": self.ideal_work_per_kg_liquid / 1e3,
            "figure_of_merit": self.figure_of_merit,
            "recuperator_effectiveness": rec.effectiveness,
            "recuperator_critical_effectiveness": rec.critical_effectiveness,
            "recuperator_min_approach_K": rec.min_approach,
            "recuperator_min_approach_position": rec.min_approach_position,
            "recuperator_warm_end_approach_K": rec.warm_end_approach,
            "recuperator_cold_end_approach_K": rec.cold_end_approach,
            "recuperator_duty_kJ_per_kg_compressed": rec.duty / 1e3,
            "recuperator_UA_W_per_K_per_kg_per_s": _finite_or_none(rec.ua_per_flow),
            "throttle_outlet_temperature_K": self.throttle_outlet.T,
            "throttle_outlet_quality": self.throttle_outlet.quality,
            "heat_rejected_kJ_per_kg_compressed": (self.compressor_heat_rejected + self.aftercooler_duty) / 1e3,
            "energy_balance_residual": self.energy_balance_residual,
        }
        m = self.compressor_flow
        if m is not None:
            m_liq = m * self.liquid_yield
            out.update({
                "compressor_flow_kg_per_h": m * 3600.0,
                "liquid_rate_kg_per_h": m_liq * 3600.0,
                "liquid_rate_L_per_h": m_liq / self.liquid_density * 3.6e6,
                "compressor_power_kW": m * self.work_per_kg_compressed / 1e3,
                "aftercooler_duty_kW": m * self.aftercooler_duty / 1e3,
                "heat_rejected_kW": m * (self.compressor_heat_rejected + self.aftercooler_duty) / 1e3,
                "recuperator_duty_kW": m * rec.duty / 1e3,
                "recuperator_UA_W_per_K": _finite_or_none(m * rec.ua_per_flow),
                "heat_leak_W": self.scenario.heat_leak,
            })
        return out

    def state_rows(self):
        """One dictionary per numbered stream, in display units named in the keys."""
        rows = []
        for st in self.states:
            s = st.state
            row = {
                "number": st.number,
                "stream": st.name,
                "temperature_K": s.T,
                "pressure_bar": s.p / 1e5,
                "enthalpy_kJ_per_kg": s.h / 1e3,
                "entropy_kJ_per_kg_K": s.s / 1e3,
                "density_kg_per_m3": s.density,
                "quality": s.quality,
                "phase": s.phase,
                "flow_per_kg_compressed": st.flow,
            }
            if self.compressor_flow is not None:
                row["mass_flow_kg_per_h"] = st.flow * self.compressor_flow * 3600.0
            rows.append(row)
        return rows

    def to_frame(self):
        """The state table as a pandas DataFrame indexed by stream number."""
        import pandas as pd

        return pd.DataFrame(self.state_rows()).set_index("number")

    def profile_rows(self):
        """The recuperator profile: duty from the cold end and both stream temperatures."""
        prof = self.recuperator.profile
        return [{"duty_kJ_per_kg_compressed": float(q) / 1e3, "high_pressure_temperature_K": float(th),
                 "low_pressure_temperature_K": float(tc)}
                for q, th, tc in zip(prof.duty, prof.hot_T, prof.cold_T)]

    def to_dict(self):
        """Everything ``lhsim run --json`` prints."""
        return {
            "scenario": self.scenario.to_dict(),
            "summary": self.summary(),
            "states": self.state_rows(),
            "warnings": list(self.warnings),
            "solve": self.solve.to_dict(),
            "recuperator_profile": self.profile_rows(),
        }


def _finite_or_none(x):
    return float(x) if np.isfinite(x) else None
