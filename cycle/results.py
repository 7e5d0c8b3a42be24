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
        Achieved minus target of the sizing quantity the user gave (effectiveness, minimum
        approach or UA), in ``residual_unit``.
    residual_unit : str
    tolerance : float
        Absolute tolerance on the tear variable [J/kg of compressor flow].
    tear_variable : str
    method : str
    message : str
    target : float
        The sizing quantity asked for, in ``residual_unit``.
    achieved : float
        The sizing quantity reached, in ``residual_unit``.
    residual_tolerance : float
        Largest ``|residual|`` that counts as converged, in ``residual_unit``.
    status : str
        ``met`` (converged), ``limit`` (the target lies beyond what the streams can use; the
        result is that of the limiting, perfect exchanger) or ``missed`` (the solve failed).
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
    target: float = float("nan")
    achieved: float = float("nan")
    residual_tolerance: float = float("nan")
    status: str = "met"

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
    critical_effectiveness : float or None
        Effectiveness below which the cycle makes no liquid at these conditions [-]; None for
        a recuperator whose size does not decide whether liquid forms (the warm one).
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
    critical_effectiveness: Optional[float]
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
    flow (for the dual-pressure cycle: of the flow compressed to the high pressure) unless the
    name says per kg of liquid; all in SI (J/kg, K, Pa, kg/s, W).

    Attributes
    ----------
    scenario : cycle.scenario.Scenario
    liquid_yield : float
        Liquid mass flow over compressor mass flow [-].
    work_per_kg_compressed : float
        Compressor shaft work [J/kg of compressor flow].
    precooling_work_per_kg_compressed : float
        Work charged for precooling (coolant or refrigerator) [J/kg of compressor flow].
    ideal_work_per_kg_liquid : float
        Minimum work of liquefaction, T0 (s1 - sf) - (h1 - hf) [J/kg of liquid].
    heat_leak_per_kg_compressed : float
        Cold-box heat leak [J/kg of compressor flow].
    compressor_heat_rejected : float
        Heat rejected by the compressor and its intercoolers [J/kg of compressor flow].
    aftercooler_duty : float
        [J/kg of compressor flow].
    precooler_duty : float
        Heat taken from the high-pressure stream in the precooler [J/kg of compressor flow].
    coolant_per_kg_compressed : float or None
        Coolant boiled off [kg per kg of compressor flow], for a coolant bath.
    liquid_density : float
        Saturated liquid density at the low pressure [kg/m3].
    recuperators : dict of str to RecuperatorResult
        ``recuperator``, or ``warm_recuperator`` and ``cold_recuperator``.
    states : list of StreamState
    throttle_outlet : properties.State
        State entering the separator.
    compressor_flow : float or None
        Compressor mass flow [kg/s], with a production target.
    energy_balance_residual : float
        (energy in - energy out) of the whole plant over the compressor work [-].
    exergy_losses : dict of str to float
        Exergy destroyed in each unit [J/kg of compressor flow].
    solve : SolveReport
        The recycle solve (for two recuperators, the combined count and the worse residual).
    sections : dict of str to SolveReport
        One solve report per recuperator.
    warnings : list of str
    receiver_vapour_fraction : float or None
        Dual-pressure layout below the critical pressure: vapour fraction of the first valve's
        outflow into the intermediate receiver [-]; None where it is one phase.
    compressions : tuple of (str, cycle.equipment.CompressionResult, float)
        Each compression with its section name (``""``, or ``"low-pressure"`` and
        ``"high-pressure"``) and its flow per kg of compressor flow.
    gas_work_per_kg_compressed : float
        Work done on the gas by the compressor stages [J/kg of compressor flow] (without the
        drive's losses and the chillers).
    drive_loss_per_kg_compressed : float
        Mechanical and motor losses of the compressor drive [J/kg of compressor flow].
    normal_density : float or None
        Density of the gas at 0 degC and 1.01325 bar (DIN 1343) [kg/m3]; None where it is not
        a gas there.
    valves : tuple of cycle.orifice.ValveSizing
        The throttle valves in flow order (the last one feeds the separator).
    precooler_load : float or None
        Heat the precooler takes [W], with a production target.
    coolant_liquid_density : float or None
        Density of the bath coolant as it is fed, saturated liquid [kg/m3].
    cooler_capacity : float or None
        Capacity of a precooler given by its capacity curve at the precooling temperature [W].
    conversion : cycle.conversion.ConversionResult or None
        Gas hydrogen: the ortho-para conversion (catalyst places, product para fraction,
        conversion heats, what the ideal work is for); None for other gases.
    """

    scenario: object
    liquid_yield: float
    work_per_kg_compressed: float
    ideal_work_per_kg_liquid: float
    heat_leak_per_kg_compressed: float
    compressor_heat_rejected: float
    aftercooler_duty: float
    liquid_density: float
    recuperators: dict
    states: list
    throttle_outlet: object
    compressor_flow: Optional[float]
    energy_balance_residual: float
    solve: SolveReport
    exergy_losses: dict = field(default_factory=dict)
    sections: dict = field(default_factory=dict)
    precooling_work_per_kg_compressed: float = 0.0
    precooler_duty: float = 0.0
    coolant_per_kg_compressed: Optional[float] = None
    warnings: list = field(default_factory=list)
    receiver_vapour_fraction: Optional[float] = None
    compressions: tuple = ()
    gas_work_per_kg_compressed: float = 0.0
    drive_loss_per_kg_compressed: float = 0.0
    normal_density: Optional[float] = None
    valves: tuple = ()
    precooler_load: Optional[float] = None
    coolant_liquid_density: Optional[float] = None
    cooler_capacity: Optional[float] = None
    conversion: Optional[object] = None

    @property
    def suction(self):
        """(compressor suction state, its flow per kg of compressor flow)."""
        _, first, flow = self.compressions[0]
        return first.stages[0].suction, flow

    @property
    def max_discharge_temperature(self):
        """Hottest stage discharge [K]; None for the isothermal model (no stage discharge)."""
        if any(c.model == "isothermal" for _, c, _ in self.compressions):
            return None
        return max(st.discharge.T for _, c, _ in self.compressions for st in c.stages)

    def compressor_stage_rows(self):
        """One dictionary per compressor stage, numbered along the whole train (the datasheet)."""
        m = self.compressor_flow
        rows = []
        number = 0
        last = len(self.compressions) - 1
        for k, (section, comp, flow) in enumerate(self.compressions):
            isothermal = comp.model == "isothermal"
            for st in comp.stages:
                number += 1
                feeds_aftercooler = k == last and st is comp.stages[-1]
                # the isothermal model's heat leaves inside the machine, not in an intercooler
                duty = self.aftercooler_duty if feeds_aftercooler else 0.0 if isothermal else st.cooler_duty
                outlet = None if feeds_aftercooler else st.cooler_outlet
                if feeds_aftercooler:
                    outlet_T = next(s.state.T for s in self.states if s.name.startswith("aftercooler outlet"))
                else:
                    outlet_T = outlet.T if outlet is not None else None
                row = {
                    "stage": number,
                    "section": section or None,
                    "model": ("isothermal-efficiency model: the heat of compression is removed inside the "
                              "machine, which delivers the gas at the cooling temperature; no stage discharge "
                              "temperature is modelled") if isothermal else "isentropic-efficiency stage",
                    "suction_pressure_bar": st.suction.p / 1e5,
                    "discharge_pressure_bar": st.discharge.p / 1e5,
                    "pressure_ratio": st.discharge.p / st.suction.p,
                    "suction_temperature_K": st.suction.T,
                    "discharge_temperature_K": None if isothermal else st.discharge.T,
                    "work_kJ_per_kg": st.work / 1e3,
                    "cooler": "aftercooler" if feeds_aftercooler else "intercooler",
                    "cooler_outlet_temperature_K": outlet_T,
                    "flow_per_kg_compressed": flow,
                    "mass_flow_kg_per_h": None if m is None else m * flow * 3600.0,
                    "suction_volume_flow_m3_per_h": None if m is None else m * flow / st.suction.density * 3600.0,
                    "power_kW": None if m is None else m * flow * st.work / 1e3,
                    "intercooler_duty_kW": None if m is None else m * (flow if not feeds_aftercooler else 1.0)
                    * duty / 1e3,
                }
                if isothermal:
                    row["heat_removed_in_machine_kW"] = None if m is None else m * flow * st.cooler_duty / 1e3
                rows.append(row)
        return rows

    @property
    def recuperator(self):
        """The recuperator of a one-recuperator cycle, or the cold one of a precooled cycle."""
        return self.recuperators.get("recuperator") or self.recuperators["cold_recuperator"]

    @property
    def total_work_per_kg_compressed(self):
        """Compressor plus precooling work [J/kg of compressor flow]."""
        return self.work_per_kg_compressed + self.precooling_work_per_kg_compressed

    @property
    def work_per_kg_liquid(self):
        """All work charged to the product, per kg of liquid [J/kg]."""
        return self.total_work_per_kg_compressed / self.liquid_yield

    @property
    def figure_of_merit(self):
        """Ideal work over actual work, both per kg of liquid [-]."""
        return self.ideal_work_per_kg_liquid / self.work_per_kg_liquid

    def exergy_losses_per_kg_liquid(self):
        """Exergy destroyed in each unit [J/kg of liquid], largest first."""
        items = sorted(self.exergy_losses.items(), key=lambda kv: -kv[1])
        return {name: value / self.liquid_yield for name, value in items}

    def summary(self):
        """The headline numbers, keyed by name with the unit at the end of the name."""
        y = self.liquid_yield
        out = {
            "liquid_yield": y,
            "work_kJ_per_kg_compressed": self.total_work_per_kg_compressed / 1e3,
            "work_kJ_per_kg_liquid": self.work_per_kg_liquid / 1e3,
            "compressor_work_kJ_per_kg_liquid": self.work_per_kg_compressed / y / 1e3,
            "precooling_work_kJ_per_kg_liquid": self.precooling_work_per_kg_compressed / y / 1e3,
            "ideal_work_kJ_per_kg_liquid": self.ideal_work_per_kg_liquid / 1e3,
            "figure_of_merit": self.figure_of_merit,
            "precooler_duty_kJ_per_kg_compressed": self.precooler_duty / 1e3,
        }
        if self.coolant_per_kg_compressed is not None:
            out["coolant_kg_per_kg_liquid"] = self.coolant_per_kg_compressed / y
        if self.conversion is not None:
            from properties.orthopara import storage_loss_fraction

            x = self.conversion.product_para_fraction
            out.update({
                "product_para_fraction": x,
                "conversion_heat_kJ_per_kg_liquid": self.conversion.total_heat / y / 1e3,
                "storage_loss_fraction_24h": storage_loss_fraction(24.0, x),
                "storage_loss_fraction_100h": storage_loss_fraction(100.0, x),
            })
        for name, rec in self.recuperators.items():
            out.update({
                f"{name}_effectiveness": rec.effectiveness,
                f"{name}_critical_effectiveness": _positive_or_none(rec.critical_effectiveness),
                f"{name}_min_approach_K": rec.min_approach,
                f"{name}_min_approach_position": rec.min_approach_position,
                f"{name}_warm_end_approach_K": rec.warm_end_approach,
                f"{name}_cold_end_approach_K": rec.cold_end_approach,
                f"{name}_duty_kJ_per_kg_compressed": rec.duty / 1e3,
                f"{name}_UA_W_per_K_per_kg_per_s": _finite_or_none(rec.ua_per_flow),
            })
        for name, rec in self.recuperators.items():
            rating = rec.profile.rating
            if rating is None:
                continue
            g = self.scenario_recuperator(name).geometry
            out.update({
                f"{name}_length_m": rating.length,
                f"{name}_area_m2": rating.length * g.tubes * np.pi * g.inner_outside,
                f"{name}_high_side_pressure_drop_bar": rating.high_side_pressure_drop / 1e5,
                f"{name}_low_side_pressure_drop_bar": rating.low_side_pressure_drop / 1e5,
                f"{name}_min_reynolds_high": float(np.min(rating.reynolds_high)),
                f"{name}_min_reynolds_low": float(np.min(rating.reynolds_low)),
                f"{name}_max_velocity_m_per_s": float(max(np.max(rating.velocity_high), np.max(rating.velocity_low))),
            })
        recs = list(self.recuperators.values())
        if "recuperator" not in self.recuperators:  # totals over the recuperators
            out["recuperator_min_approach_K"] = min(r.min_approach for r in recs)
            out["recuperator_duty_kJ_per_kg_compressed"] = sum(r.duty for r in recs) / 1e3
            out["recuperator_UA_W_per_K_per_kg_per_s"] = _finite_or_none(sum(r.ua_per_flow for r in recs))
        if self.scenario.layout == "dual-pressure":
            out["receiver_vapour_fraction"] = self.receiver_vapour_fraction
        out.update({
            "throttle_outlet_temperature_K": self.throttle_outlet.T,
            "throttle_outlet_quality": self.throttle_outlet.quality,
            "heat_rejected_kJ_per_kg_compressed": (self.compressor_heat_rejected + self.aftercooler_duty) / 1e3,
            "energy_balance_residual": self.energy_balance_residual,
            "max_discharge_temperature_K": self.max_discharge_temperature,
        })
        if self.scenario.layout == "precooled":
            out["precooling_temperature_K"] = self.scenario.precooling.temperature
        valve = self.valves[-1] if self.valves else None
        out["valve_critical_mass_flux_kg_per_m2_s"] = valve.critical_mass_flux if valve else None
        out["valve_choked"] = valve.choked if valve else None
        m = self.compressor_flow
        if m is not None:
            m_liq = m * y
            out.update({
                "compressor_flow_kg_per_h": m * 3600.0,
                "liquid_rate_kg_per_h": m_liq * 3600.0,
                "liquid_rate_L_per_h": m_liq / self.liquid_density * 3.6e6,
                "compressor_power_kW": m * self.work_per_kg_compressed / 1e3,
                "precooling_power_kW": m * self.precooling_work_per_kg_compressed / 1e3,
                "aftercooler_duty_kW": m * self.aftercooler_duty / 1e3,
                "heat_rejected_kW": m * (self.compressor_heat_rejected + self.aftercooler_duty) / 1e3,
                "precooler_duty_kW": m * self.precooler_duty / 1e3,
                "recuperator_duty_kW": m * sum(r.duty for r in recs) / 1e3,
                "recuperator_UA_W_per_K": _finite_or_none(m * sum(r.ua_per_flow for r in recs)),
                "heat_leak_W": self.scenario.heat_leak,
            })
            if len(recs) > 1:
                for name, rec in self.recuperators.items():
                    out[f"{name}_UA_W_per_K"] = _finite_or_none(m * rec.ua_per_flow)
                    out[f"{name}_duty_kW"] = m * rec.duty / 1e3
            if self.coolant_per_kg_compressed is not None:
                out["coolant_kg_per_h"] = m * self.coolant_per_kg_compressed * 3600.0
            suction, flow = self.suction
            rho_n = self.normal_density
            sc = self.scenario.compressor
            gas = m * self.gas_work_per_kg_compressed / 1e3
            out.update({
                "compressor_suction_volume_flow_m3_per_h": m * flow / suction.density * 3600.0,
                "compressor_normal_volume_flow_Nm3_per_h": m * flow / rho_n * 3600.0 if rho_n else None,
                "compressor_gas_power_kW": gas,
                "compressor_shaft_power_kW": gas / sc.mechanical_efficiency,
                "compressor_electric_power_kW": gas / sc.mechanical_efficiency / sc.motor_efficiency,
                "liquid_rate_Nm3_per_h": m_liq / rho_n * 3600.0 if rho_n else None,
                "valve_orifice_diameter_mm": (valve.orifice_diameter * 1e3 if valve and valve.orifice_diameter
                                              else None),
            })
            if self.scenario.layout == "precooled":
                out["precooler_load_W"] = self.precooler_load
            if self.coolant_per_kg_compressed is not None:
                kg_h = m * self.coolant_per_kg_compressed * 3600.0
                out["coolant_consumption_kg_per_h"] = kg_h
                out["coolant_consumption_L_per_h"] = kg_h / self.coolant_liquid_density * 1e3
        return out

    def scenario_recuperator(self, name):
        """The scenario's spec of recuperator ``name``."""
        return getattr(self.scenario, name)

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
            if getattr(s, "para_fraction", None) is not None:  # hydrogen with a catalyst
                row["para_fraction"] = s.para_fraction
            if self.compressor_flow is not None:
                row["mass_flow_kg_per_h"] = st.flow * self.compressor_flow * 3600.0
            rows.append(row)
        return rows

    def to_frame(self):
        """The state table as a pandas DataFrame indexed by stream number."""
        import pandas as pd

        return pd.DataFrame(self.state_rows()).set_index("number")

    def profile_rows(self, name=None):
        """A recuperator profile: duty from the cold end and the stream temperatures."""
        prof = (self.recuperators[name] if name else self.recuperator).profile
        rows = [{"duty_kJ_per_kg_compressed": float(q) / 1e3, "high_pressure_temperature_K": float(th),
                 "low_pressure_temperature_K": float(tc)}
                for q, th, tc in zip(prof.duty, prof.hot_T, prof.cold_T)]
        rating = prof.rating
        if rating is not None:
            # Boundary values, and on each row but the first those of the zone that ends there
            # (zone k lies between rows k - 1 and k, counted from the cold end).
            x = rating.position
            for k, row in enumerate(rows):
                zone = k - 1
                row.update({
                    "x_m": float(x[k]),
                    "pressure_high_bar": float(prof.hot_p[k]) / 1e5,
                    "pressure_low_bar": float(prof.cold_p[k]) / 1e5,
                    "h_high_W_per_m2K": float(rating.h_high[zone]) if zone >= 0 else None,
                    "h_low_W_per_m2K": float(rating.h_low[zone]) if zone >= 0 else None,
                    "reynolds_high": float(rating.reynolds_high[zone]) if zone >= 0 else None,
                    "reynolds_low": float(rating.reynolds_low[zone]) if zone >= 0 else None,
                })
        return rows

    def to_dict(self):
        """Everything ``lhsim run --json`` prints."""
        return {
            "scenario": self.scenario.to_dict(),
            "layout": self.scenario.layout,
            "summary": self.summary(),
            "exergy_losses_kJ_per_kg_liquid": {k: v / 1e3 for k, v in self.exergy_losses_per_kg_liquid().items()},
            "states": self.state_rows(),
            "warnings": list(self.warnings),
            "solve": dict(self.solve.to_dict(), sections={k: r.to_dict() for k, r in self.sections.items()}),
            "recuperator_profiles": {name: self.profile_rows(name) for name in self.recuperators},
            "compressor_stages": self.compressor_stage_rows(),
            "valves": [v.to_dict() for v in self.valves],
            **({} if self.conversion is None else {"ortho_para": self.conversion_dict()}),
        }

    def conversion_dict(self):
        """Gas hydrogen: the ortho-para conversion as plain numbers (``lhsim run --json``, key
        ``ortho_para``)."""
        c = self.conversion
        return {
            "catalyst": list(c.places),
            "product_para_fraction": c.product_para_fraction,
            "conversion_heat_kJ_per_kg_liquid": {place: q / self.liquid_yield / 1e3 for place, q in c.heat.items()},
            "ideal_work_basis": c.ideal_work_basis,
        }


def summary_keys(scenario):
    """The keys :meth:`CycleResult.summary` gives for a scenario, in order, without solving it
    (a sweep writes its file header before the first point is solved)."""
    keys = ["liquid_yield", "work_kJ_per_kg_compressed", "work_kJ_per_kg_liquid",
            "compressor_work_kJ_per_kg_liquid", "precooling_work_kJ_per_kg_liquid",
            "ideal_work_kJ_per_kg_liquid", "figure_of_merit", "precooler_duty_kJ_per_kg_compressed"]
    coolant = scenario.precooling is not None and scenario.precooling.coolant is not None
    if coolant:
        keys.append("coolant_kg_per_kg_liquid")
    if scenario.gas == "Hydrogen":
        keys += ["product_para_fraction", "conversion_heat_kJ_per_kg_liquid", "storage_loss_fraction_24h",
                 "storage_loss_fraction_100h"]
    names = ["warm_recuperator", "cold_recuperator"] if scenario.layout == "precooled" else ["recuperator"]
    for name in names:
        keys += [f"{name}_{k}" for k in ("effectiveness", "critical_effectiveness", "min_approach_K",
                                         "min_approach_position", "warm_end_approach_K", "cold_end_approach_K",
                                         "duty_kJ_per_kg_compressed", "UA_W_per_K_per_kg_per_s")]
    for name in names:
        spec = getattr(scenario, name)
        if spec is not None and spec.geometry is not None:
            keys += [f"{name}_{k}" for k in ("length_m", "area_m2", "high_side_pressure_drop_bar",
                                             "low_side_pressure_drop_bar", "min_reynolds_high", "min_reynolds_low",
                                             "max_velocity_m_per_s")]
    if "recuperator" not in names:
        keys += ["recuperator_min_approach_K", "recuperator_duty_kJ_per_kg_compressed",
                 "recuperator_UA_W_per_K_per_kg_per_s"]
    if scenario.layout == "dual-pressure":
        keys.append("receiver_vapour_fraction")
    keys += ["throttle_outlet_temperature_K", "throttle_outlet_quality", "heat_rejected_kJ_per_kg_compressed",
             "energy_balance_residual", "max_discharge_temperature_K"]
    if scenario.layout == "precooled":
        keys.append("precooling_temperature_K")
    keys += ["valve_critical_mass_flux_kg_per_m2_s", "valve_choked"]
    if scenario.production is not None:
        keys += ["compressor_flow_kg_per_h", "liquid_rate_kg_per_h", "liquid_rate_L_per_h", "compressor_power_kW",
                 "precooling_power_kW", "aftercooler_duty_kW", "heat_rejected_kW", "precooler_duty_kW",
                 "recuperator_duty_kW", "recuperator_UA_W_per_K", "heat_leak_W"]
        if len(names) > 1:
            for name in names:
                keys += [f"{name}_UA_W_per_K", f"{name}_duty_kW"]
        if coolant:
            keys.append("coolant_kg_per_h")
        keys += ["compressor_suction_volume_flow_m3_per_h", "compressor_normal_volume_flow_Nm3_per_h",
                 "compressor_gas_power_kW", "compressor_shaft_power_kW", "compressor_electric_power_kW",
                 "liquid_rate_Nm3_per_h", "valve_orifice_diameter_mm"]
        if scenario.layout == "precooled":
            keys.append("precooler_load_W")
        if coolant:
            keys += ["coolant_consumption_kg_per_h", "coolant_consumption_L_per_h"]
    return keys


def loss_label(name):
    """Words for an exergy-loss key: ``make_up_mixing`` -> ``make-up mixing``."""
    return name.replace("make_up", "make-up").replace("ortho_para", "ortho-para").replace("_", " ")


def _positive_or_none(x):
    """A critical effectiveness at or below zero means none is needed: throttling alone makes liquid."""
    return float(x) if x is not None and x > 0 else None


def _finite_or_none(x):
    return float(x) if np.isfinite(x) else None


def json_safe(value):
    """``value`` with every non-finite float (inf, nan), however deeply nested in dicts, lists
    and tuples, replaced by None: what JSON can hold."""
    if isinstance(value, float) and not np.isfinite(value):
        return None
    if isinstance(value, dict):
        return {k: json_safe(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_safe(v) for v in value]
    return value
