"""Scenario files: read, validate and convert to SI once, at the edge.

A scenario is a YAML mapping (see ``docs/scenario-format.md``).  Quantities are strings
with units (``"200 bar"``) or bare SI numbers.  Validation happens here, before any
property call, and every problem is reported as a one-line :class:`ScenarioError` that
names the key, what was expected and what was given.
"""

from dataclasses import dataclass, field, asdict
import difflib
import os
import re
from typing import Optional

from cycle.errors import ScenarioError
from cycle.heat_transfer import WALL_MATERIALS
from cycle.units import UnitError, parse_quantity, printable, shown

DEFAULT_AMBIENT_TEMPERATURE = 300.0  # K; the reference temperature of the textbook tables
DEFAULT_ZONES = 50
# Absolute roughness of drawn tubing [m]: 1.5 um (common practice; the usual table value for
# drawn copper, brass and stainless tubing).
DEFAULT_ROUGHNESS = 1.5e-6
# Wall materials a geometry may name: the keys of cycle.heat_transfer.WALL_MATERIALS (their fits).
WALL_MATERIAL_NAMES = tuple(WALL_MATERIALS)
# Highest stage discharge temperature before lhsim warns: 150 degC, common practice for
# lubricated reciprocating compressors (the oil and the valves set the limit).
DEFAULT_MAX_DISCHARGE_TEMPERATURE = 423.15  # K


@dataclass(frozen=True)
class CompressorSpec:
    """Compressor parameters: isothermal efficiency, or stages with isentropic efficiency.

    ``max_discharge_temperature`` [K] is the stage discharge temperature above which a run
    warns (staged model only: the isothermal model has no stage discharge).
    ``stage_pressures`` [Pa] are the discharge pressures of stages 1 to N-1 (None: equal
    pressure ratios); ``intercooler_temperature`` [K] (None: the aftercooler outlet
    temperature) and ``intercooler_pressure_drop`` [Pa] apply to the coolers between stages.
    Shaft power is gas power over ``mechanical_efficiency``, electric power is shaft power
    over ``motor_efficiency``.
    """

    isothermal_efficiency: Optional[float] = None
    stages: int = 1
    isentropic_efficiency: Optional[float] = None
    max_discharge_temperature: float = DEFAULT_MAX_DISCHARGE_TEMPERATURE
    stage_pressures: Optional[tuple] = None
    intercooler_temperature: Optional[float] = None
    intercooler_pressure_drop: float = 0.0
    mechanical_efficiency: float = 1.0
    motor_efficiency: float = 1.0

    @property
    def model(self):
        return "isothermal" if self.isothermal_efficiency is not None else "staged"


@dataclass(frozen=True)
class AftercoolerSpec:
    """Aftercooler outlet temperature [K] and pressure drop [Pa]."""

    outlet_temperature: float
    pressure_drop: float = 0.0


@dataclass(frozen=True)
class GeometrySpec:
    """A tube-in-tube recuperator's hardware (SI: m, W/(m K)).

    ``length`` None means the exchanger is sized (its length found for the recuperator's
    ``min_approach`` or ``effectiveness``); given, it is rated.  One of ``wall_conductivity``
    and ``wall_material``.
    """

    tubes: int
    inner_inside: float
    inner_outside: float
    outer_inside: float
    roughness: float = DEFAULT_ROUGHNESS
    wall_conductivity: Optional[float] = None
    wall_material: Optional[str] = None
    coil_diameter: Optional[float] = None
    length: Optional[float] = None
    type: str = "tube-in-tube"


@dataclass(frozen=True)
class RecuperatorSpec:
    """Counterflow recuperator: exactly one of effectiveness [-], min_approach [K], ua [W/K], or a
    geometry with its length (rated)."""

    effectiveness: Optional[float] = None
    min_approach: Optional[float] = None
    ua: Optional[float] = None
    zones: int = DEFAULT_ZONES
    high_side_pressure_drop: float = 0.0
    low_side_pressure_drop: float = 0.0
    geometry: Optional[GeometrySpec] = None

    @property
    def mode(self):
        for name in ("effectiveness", "min_approach", "ua"):
            if getattr(self, name) is not None:
                return name
        if self.geometry is not None and self.geometry.length is not None:
            return "length"
        raise AssertionError("recuperator spec without a sizing choice")


@dataclass(frozen=True)
class ProductionSpec:
    """Production target: a liquid rate, or a compressor flow.

    Attributes
    ----------
    liquid_mass_rate : float or None
        [kg/s]
    liquid_volume_rate : float or None
        Volume of saturated liquid [m3/s].
    liquid_gas_volume_rate : float or None
        The liquid as a volume of gas at ``volume_reference`` [m3/s there] (gas equivalent).
    compressor_flow : float or None
        Compressor mass flow [kg/s].
    compressor_volume_flow : float or None
        [m3/s]: at the compressor suction state (``volume_reference`` ``"suction"``) or of gas at
        a reference condition.
    volume_reference : str or None
        ``"suction"`` or a key of :data:`cycle.units.REFERENCE_CONDITIONS`.
    """

    liquid_mass_rate: Optional[float] = None
    liquid_volume_rate: Optional[float] = None
    compressor_flow: Optional[float] = None
    liquid_gas_volume_rate: Optional[float] = None
    compressor_volume_flow: Optional[float] = None
    volume_reference: Optional[str] = None


@dataclass(frozen=True)
class PrecoolingSpec:
    """Precooler between the warm and cold recuperators.

    Attributes
    ----------
    temperature : float
        High-pressure stream temperature leaving the precooler [K].
    coolant : str or None
        CoolProp name of a boiling-bath coolant, or None for a refrigerator.
    coolant_pressure : float
        Bath pressure [Pa].
    coolant_work : float or None
        Work charged per kg of coolant boiled off [J/kg]; None means the coolant's ideal work
        of liquefaction (a lower bound).
    refrigerator_cop : float or None
        Coefficient of performance of a precooling refrigerator rejecting heat at ambient [-].
    refrigerator_carnot_fraction : float or None
        Its COP as a fraction of the Carnot COP between the precooling temperature and ambient [-].
    cooler_capacity : tuple of (float, float) or None
        A cryocooler's or refrigerator's capacity curve, (temperature [K], capacity [W]) pairs
        with rising temperature.  Given instead of ``temperature``: the solve finds the
        temperature where the precooler load equals the capacity (and sets ``temperature``).
    cooler_input_power : float or None
        Power that cooler draws [W], charged to the product.
    """

    temperature: Optional[float] = None
    coolant: Optional[str] = None
    coolant_pressure: float = 101325.0
    coolant_work: Optional[float] = None
    refrigerator_cop: Optional[float] = None
    refrigerator_carnot_fraction: Optional[float] = None
    cooler_capacity: Optional[tuple] = None
    cooler_input_power: Optional[float] = None


@dataclass(frozen=True)
class ValveSpec:
    """Throttle valve: the discharge coefficient of its orifice [-] (None: the default of
    :mod:`cycle.orifice`, 0.61)."""

    discharge_coefficient: Optional[float] = None


@dataclass(frozen=True)
class DualPressureSpec:
    """Intermediate pressure [Pa] and the fraction of compressor flow returned at it [-]."""

    intermediate_pressure: float
    recirculated_fraction: float


@dataclass(frozen=True)
class Scenario:
    """A validated scenario in SI units (K, Pa, W, kg/s)."""

    gas: str
    ambient_temperature: float
    low_pressure: float
    high_pressure: float
    compressor: CompressorSpec
    aftercooler: AftercoolerSpec
    recuperator: RecuperatorSpec
    heat_leak: float = 0.0
    production: Optional[ProductionSpec] = None
    name: str = ""
    precooling: Optional[PrecoolingSpec] = None
    warm_recuperator: Optional[RecuperatorSpec] = None
    cold_recuperator: Optional[RecuperatorSpec] = None
    dual_pressure: Optional[DualPressureSpec] = None
    valve: ValveSpec = ValveSpec()
    hydrogen_conversion: tuple = ()
    source: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def layout(self):
        """``simple``, ``precooled`` or ``dual-pressure``."""
        if self.precooling is not None:
            return "precooled"
        if self.dual_pressure is not None:
            return "dual-pressure"
        return "simple"

    def to_dict(self):
        """The scenario in SI numbers, defaults filled in, without the source mapping."""
        out = asdict(self)
        out.pop("source")
        if self.compressor.isothermal_efficiency is not None:
            out["compressor"].pop("stages")
            for key in ("intercooler_pressure_drop",):
                out["compressor"].pop(key)
        if self.precooling is not None and self.precooling.coolant is None:
            out["precooling"].pop("coolant_pressure")
        for key, value in list(out.items()):
            if isinstance(value, dict):
                out[key] = {k: v for k, v in value.items() if v is not None}
            elif value is None and key in ("precooling", "warm_recuperator", "cold_recuperator",
                                           "dual_pressure", "recuperator"):
                del out[key]
        return out


# -- schema -------------------------------------------------------------------------------

# Volume flows of gas at a reference condition (cycle.units.REFERENCE_CONDITIONS).
GAS_VOLUME_FLOWS = ("normal_volume_flow", "standard_volume_flow", "standard_us_volume_flow")

# Kinds of key that hold a list, with what to do instead of sweeping one.
LIST_KINDS = {
    "pressure_list": "sweep compressor.stages (equal pressure ratios), or write one scenario per list",
    "capacity_curve": "sweep precooling.cooler_input_power, or write one scenario per curve",
}

# key -> kind; a kind is a dimension name for quantities, or one of
# "text", "gas", "integer", "number", a dict (a nested section), or a tuple of dimensions.
SCHEMA = {
    "name": "text",
    "gas": "gas",
    "ambient_temperature": "temperature",
    "low_pressure": "pressure",
    "high_pressure": "pressure",
    "compressor": {
        "isothermal_efficiency": "number",
        "stages": "integer",
        "isentropic_efficiency": "number",
        "max_discharge_temperature": "temperature",
        "stage_pressures": "pressure_list",
        "intercooler_temperature": "temperature",
        "intercooler_pressure_drop": "pressure",
        "mechanical_efficiency": "number",
        "motor_efficiency": "number",
    },
    "aftercooler": {
        "outlet_temperature": "temperature",
        "pressure_drop": "pressure",
    },
    "recuperator": {
        "effectiveness": "number",
        "min_approach": "temperature_difference",
        "ua": "thermal_conductance",
        "zones": "integer",
        "high_side_pressure_drop": "pressure",
        "low_side_pressure_drop": "pressure",
        "geometry": {
            "type": "text",
            "tubes": "integer",
            "inner_tube": {"inner_diameter": "length", "outer_diameter": "length"},
            "outer_tube": {"inner_diameter": "length"},
            "roughness": "length",
            "wall_conductivity": "wall_conductivity",
            "wall_material": "text",
            "coil_diameter": "length",
            "length": "length",
        },
    },
    "heat_leak": "power",
    "hydrogen_conversion": "text",
    "valve": {
        "discharge_coefficient": "number",
    },
    "precooling": {
        "temperature": "temperature",
        "coolant": "text",
        "coolant_pressure": "pressure",
        "coolant_work": "specific_energy",
        "refrigerator_cop": "number",
        "refrigerator_carnot_fraction": "number",
        "cooler_capacity": "capacity_curve",
        "cooler_input_power": "power",
    },
    "warm_recuperator": "recuperator",
    "cold_recuperator": "recuperator",
    "dual_pressure": {
        "intermediate_pressure": "pressure",
        "recirculated_fraction": "number",
    },
    "production": {
        "liquid_rate": ("mass_flow", "volume_flow") + GAS_VOLUME_FLOWS,
        "compressor_flow": ("mass_flow", "suction_volume_flow") + GAS_VOLUME_FLOWS,
    },
}

for _key in ("warm_recuperator", "cold_recuperator"):
    SCHEMA[_key] = SCHEMA["recuperator"]

_EXAMPLES = {
    "temperature": "'300 K'",
    "pressure": "'200 bar'",
    "power": "'5 W'",
    "mass_flow": "'8 kg/h'",
    "volume_flow": "'10 L/h'",
    "suction_volume_flow": "'50 m^3/h'",
    "temperature_difference": "'2 K'",
    "thermal_conductance": "'500 W/K'",
    "specific_energy": "'770 kJ/kg'",
    "length": "'6 mm'",
    "wall_conductivity": "'15 W/(m K)'",
}


def all_keys(schema=None, prefix=""):
    """Every key of ``schema`` (default :data:`SCHEMA`), dotted for nested keys."""
    schema = SCHEMA if schema is None else schema
    for key, kind in schema.items():
        yield prefix + key
        if isinstance(kind, dict):
            yield from all_keys(kind, prefix + key + ".")


def key_kind(key, where="sweep."):
    """Schema kind of a dotted scenario key (``compressor.stages`` -> ``"integer"``).

    Parameters
    ----------
    key : str
        Dotted scenario key.
    where : str
        How the caller names the key in messages: ``"sweep."`` gives ``sweep.{key}: ...``,
        ``"--vary "`` gives ``--vary {key}: ...``.

    Raises
    ------
    ScenarioError
        If ``key`` is not a scenario key, or names a whole section.
    """
    node = SCHEMA
    for part in key.split("."):
        if not isinstance(node, dict) or part not in node:
            close = difflib.get_close_matches(key, list(all_keys()), n=1, cutoff=0.5) if len(key) <= 100 else []
            hint = f"; did you mean {close[0]}?" if close else ""
            raise ScenarioError(f"{where}{printable(key, 60)}: not a scenario key{hint}")
        node = node[part]
    if isinstance(node, str) and node in LIST_KINDS:
        raise ScenarioError(f"{where}{key}: a list cannot be {'swept' if where == 'sweep.' else 'varied'}; "
                            f"{LIST_KINDS[node]}")
    if isinstance(node, dict):
        raise ScenarioError(f"{where}{key}: a section cannot be {'swept' if where == 'sweep.' else 'varied'}; "
                            f"use one of its keys, e.g. {key}.{next(iter(node))}")
    return node


def _check_keys(data, schema, prefix=""):
    if not isinstance(data, dict):
        raise ScenarioError(f"{prefix.rstrip('.') or 'scenario'} must be a mapping of keys to values, "
                            f"got {shown(data)}")
    for key, value in data.items():
        full = prefix + str(key)
        if key not in schema:
            candidates = list(all_keys(schema, prefix)) if prefix else list(all_keys(schema))
            close = difflib.get_close_matches(full, candidates, n=1, cutoff=0.5) if len(full) <= 100 else []
            hint = f"; did you mean {close[0]}?" if close else f"; valid keys here: {', '.join(schema)}"
            raise ScenarioError(f"unknown key {printable(full, 60)}{hint}")
        if isinstance(schema[key], dict):
            _check_keys(value if value is not None else {}, schema[key], full + ".")


def _quantity(data, key, dimension, full, gauge=None):
    """``data[key]`` in SI; ``gauge=False`` refuses gauge pressure units (a pressure drop is a
    difference: a gauge reading means nothing there); default: taken for pressures."""
    value = data[key]
    if value is None:
        raise ScenarioError(f"{full} is empty: expected a {dimension.replace('_', ' ')} such as {_EXAMPLES[dimension]}")
    if gauge is None:
        gauge = not key.endswith("pressure_drop")
    try:
        return parse_quantity(value, dimension, gauge=gauge)
    except UnitError as err:
        raise ScenarioError(f"{full}: {err}") from None


def _temperature(data, key, full):
    """A temperature key [K], above 0 K and at most 1000 K."""
    T = _quantity(data, key, "temperature", full)
    if not 0 < T <= 1000:
        raise ScenarioError(f"{full} must be above 0 K and at most 1000 K, got {data[key]!r}")
    return T


def _number(data, key, full):
    value = data[key]
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise ScenarioError(f"{full} must be a number, got {shown(value)}")
    try:
        return parse_quantity(value, "dimensionless")
    except UnitError as err:
        raise ScenarioError(f"{full}: {err}") from None


def _integer(data, key, full, low, high):
    value = data[key]
    if isinstance(value, bool) or not isinstance(value, int):
        raise ScenarioError(f"{full} must be a whole number from {low} to {high}, got {shown(value)}")
    if not low <= value <= high:
        raise ScenarioError(f"{full} must be a whole number from {low} to {high}, got {shown(value)}")
    return value


def _require(data, key, full, what):
    if key not in data or data[key] is None:
        raise ScenarioError(f"missing {full}: expected {what}")


def _between(value, full, low, high, low_open=True, high_open=False, given=None):
    below = value <= low if low_open else value < low
    above = value >= high if high_open else value > high
    if below or above:
        lo = "above" if low_open else "at least"
        hi = "below" if high_open else "at most"
        raise ScenarioError(f"{full} must be {lo} {low:g} and {hi} {high:g}, got {given if given is not None else value!r}")
    return value


def _exactly_one(data, names, section):
    given = [n for n in names if data.get(n) is not None]
    listed = ", ".join(f"{section}.{n}" for n in names[:-1]) + f" or {section}.{names[-1]}"
    if len(given) > 1:
        raise ScenarioError(f"give one of {listed}, not {' and '.join(section + '.' + g for g in given)}")
    if not given:
        raise ScenarioError(f"missing {section} choice: give one of {listed}")
    return given[0]


def _bar(p):
    return f"{p / 1e5:g} bar"


def parse_scenario(data):
    """Validate a scenario mapping (as read from YAML) and convert it to SI.

    Parameters
    ----------
    data : dict
        The scenario as given: quantities as strings with units or SI numbers.

    Returns
    -------
    Scenario

    Raises
    ------
    ScenarioError
        On an unknown key, a missing value, a value of the wrong dimension, a non-physical
        value or two options that exclude each other.
    """
    if not isinstance(data, dict):
        raise ScenarioError(f"a scenario must be a mapping of keys to values, got {type(data).__name__}")
    # The uncertainty section belongs to lhsim uncertainty (cycle.uncertainty), which checks it.
    data = {k: v for k, v in data.items() if k != "uncertainty"}
    _check_keys(data, SCHEMA)

    name = data.get("name") or ""
    if isinstance(name, (list, dict)):
        raise ScenarioError(f"name must be text, got {shown(name)}")
    if not isinstance(name, str):
        name = str(name)
    # The name is printed as given: no control character (a terminal escape sequence) or
    # lone surrogate (unprintable) reaches the output, each is written as an escape.
    name = printable(name)

    _require(data, "gas", "gas", "a fluid name such as 'nitrogen'")
    from properties.fluids import resolve_fluid_name

    if not isinstance(data["gas"], str) or len(data["gas"]) > 100:
        raise ScenarioError(f"gas must be a fluid name such as 'nitrogen', got {shown(data['gas'])}")
    try:
        gas = resolve_fluid_name(str(data["gas"]))
    except ValueError as err:
        raise ScenarioError(str(err)) from None

    if data.get("ambient_temperature") is not None:
        T0 = _quantity(data, "ambient_temperature", "temperature", "ambient_temperature")
    else:
        T0 = DEFAULT_AMBIENT_TEMPERATURE
    if not 0 < T0 <= 1000:
        raise ScenarioError(f"ambient_temperature must be above 0 K and at most 1000 K, got "
                            f"{data.get('ambient_temperature')!r}")

    for key in ("low_pressure", "high_pressure"):
        _require(data, key, key, f"a pressure such as {_EXAMPLES['pressure']}")
    p_low = _quantity(data, "low_pressure", "pressure", "low_pressure")
    p_high = _quantity(data, "high_pressure", "pressure", "high_pressure")
    if p_low <= 0:
        raise ScenarioError(f"low_pressure must be above 0 (absolute), got {data['low_pressure']!r}")
    if p_high <= p_low:
        raise ScenarioError(f"high_pressure must be above low_pressure ({_bar(p_low)}), got {data['high_pressure']!r}")

    compressor = _parse_compressor(data.get("compressor"))
    aftercooler = _parse_aftercooler(data.get("aftercooler") or {}, T0, p_high, p_low)
    given_limit = (data.get("compressor") or {}).get("max_discharge_temperature")
    T_stage_in = aftercooler.outlet_temperature
    which = "aftercooler.outlet_temperature"
    if compressor.intercooler_temperature is not None and compressor.intercooler_temperature > T_stage_in:
        T_stage_in, which = compressor.intercooler_temperature, "compressor.intercooler_temperature"
    if given_limit is not None and compressor.max_discharge_temperature <= T_stage_in:
        raise ScenarioError(f"compressor.max_discharge_temperature must be above {which} "
                            f"({T_stage_in:g} K), the temperature the gas enters each stage at, "
                            f"got {given_limit!r}")
    p_hot_in = p_high - aftercooler.pressure_drop
    precooling = _parse_precooling(data.get("precooling"), aftercooler.outlet_temperature)
    dual = _parse_dual_pressure(data.get("dual_pressure"), p_low, p_hot_in)
    if precooling is not None and dual is not None:
        raise ScenarioError("give precooling or dual_pressure, not both (a precooled dual-pressure "
                            "cycle is not modelled yet)")
    warm = cold = None
    if precooling is None:
        for key in ("warm_recuperator", "cold_recuperator"):
            if data.get(key) is not None:
                raise ScenarioError(f"{key} needs precooling: without a precooler there is one recuperator, "
                                    f"give it as recuperator")
        recuperator = _parse_recuperator(data.get("recuperator"), p_hot_in, p_low)
    else:
        recuperator = None
        if data.get("recuperator") is not None:
            recuperator = _parse_recuperator(data["recuperator"], p_hot_in, p_low)
        sides = {}
        for key in ("warm_recuperator", "cold_recuperator"):
            if data.get(key) is not None:
                sides[key] = _parse_recuperator(data[key], p_hot_in, p_low, key)
            elif recuperator is not None:
                sides[key] = recuperator
            else:
                raise ScenarioError(f"missing {key}: with precooling give recuperator (for both "
                                    f"recuperators) or warm_recuperator and cold_recuperator")
        warm, cold = sides["warm_recuperator"], sides["cold_recuperator"]
        if warm.low_side_pressure_drop + cold.low_side_pressure_drop >= p_low:
            raise ScenarioError("warm_recuperator.low_side_pressure_drop plus cold_recuperator."
                                f"low_side_pressure_drop must be below low_pressure ({_bar(p_low)})")
        if warm.high_side_pressure_drop + cold.high_side_pressure_drop >= p_hot_in - p_low:
            raise ScenarioError("warm_recuperator.high_side_pressure_drop plus cold_recuperator."
                                f"high_side_pressure_drop must be below {_bar(p_hot_in - p_low)}, got "
                                f"{_bar(warm.high_side_pressure_drop + cold.high_side_pressure_drop)}")
    if dual is not None and dual.intermediate_pressure - recuperator.low_side_pressure_drop <= p_low:
        raise ScenarioError("dual_pressure.intermediate_pressure less recuperator.low_side_pressure_drop "
                            f"must stay above low_pressure ({_bar(p_low)})")

    suction = p_low - (recuperator.low_side_pressure_drop if precooling is None
                       else warm.low_side_pressure_drop + cold.low_side_pressure_drop)
    _check_stage_pressures(compressor, suction, p_high, "dual-pressure" if dual is not None else "other")
    production = _parse_production(data.get("production"))
    heat_leak = 0.0
    if data.get("heat_leak") is not None:
        heat_leak = _quantity(data, "heat_leak", "power", "heat_leak")
        if heat_leak < 0:
            raise ScenarioError(f"heat_leak must be 0 or more, got {data['heat_leak']!r}")
    if precooling is not None and precooling.cooler_capacity is not None and production is None:
        raise ScenarioError("precooling.cooler_capacity needs production: give production.liquid_rate or "
                            "production.compressor_flow (the cooler's capacity is a power, W)")
    if heat_leak > 0 and production is None:
        raise ScenarioError("heat_leak needs production: give production.liquid_rate or production.compressor_flow")
    for key, spec in (("recuperator", recuperator), ("warm_recuperator", warm), ("cold_recuperator", cold)):
        if spec is None or spec.geometry is None:
            continue
        if production is None:
            raise ScenarioError(f"{key}.geometry needs production: give production.liquid_rate or "
                                f"production.compressor_flow (heat transfer and friction depend on the flow)")
        if dual is not None:
            raise ScenarioError(f"{key}.geometry is not taken in the dual-pressure layout (its recuperator is a "
                                f"three-stream exchanger); give it by effectiveness, min_approach or ua")
    for key in ("recuperator", "warm_recuperator", "cold_recuperator"):
        spec = data.get(key)
        if isinstance(spec, dict) and spec.get("ua") is not None and production is None:
            raise ScenarioError(f"{key}.ua needs production: give production.liquid_rate or "
                                "production.compressor_flow (UA is an absolute size, W/K)")

    valve = ValveSpec()
    if (data.get("valve") or {}).get("discharge_coefficient") is not None:
        cd = _number(data["valve"], "discharge_coefficient", "valve.discharge_coefficient")
        valve = ValveSpec(_between(cd, "valve.discharge_coefficient", 0, 1,
                                   given=data["valve"]["discharge_coefficient"]))

    from cycle.conversion import parse_places

    conversion = parse_places(data.get("hydrogen_conversion"), gas)
    if conversion:
        if precooling is None:
            raise ScenarioError("hydrogen_conversion needs precooling: hydrogen is above its inversion temperature at "
                                "ambient, and the catalyst places are those of a precooled cycle")
        for key, spec in (("warm_recuperator", warm), ("cold_recuperator", cold)):
            if spec.geometry is not None:
                raise ScenarioError(f"{key}.geometry is not taken with hydrogen_conversion yet (the rating of a "
                                    f"converting stream is not modelled); give {key} by effectiveness, "
                                    f"min_approach or ua")

    return Scenario(gas=gas, ambient_temperature=T0, low_pressure=p_low, high_pressure=p_high,
                    compressor=compressor, aftercooler=aftercooler, recuperator=recuperator,
                    heat_leak=heat_leak, production=production, name=name, precooling=precooling,
                    warm_recuperator=warm, cold_recuperator=cold, dual_pressure=dual, valve=valve,
                    hydrogen_conversion=conversion, source=dict(data))


def _parse_precooling(section, T_hot):
    if section is None:
        return None
    if section.get("cooler_capacity") is not None:
        return _parse_cooler(section, T_hot)
    if section.get("cooler_input_power") is not None:
        raise ScenarioError("precooling.cooler_input_power goes with precooling.cooler_capacity (a cooler given by "
                            "its capacity curve)")
    if section.get("temperature") is None:
        raise ScenarioError("missing precooling.temperature: expected the temperature the precooler "
                            "brings the high-pressure stream to, such as '80 K' (or give the cooler's "
                            "precooling.cooler_capacity curve)")
    T = _quantity(section, "temperature", "temperature", "precooling.temperature")
    if not 0 < T < T_hot:
        raise ScenarioError(f"precooling.temperature must be above 0 and below the aftercooler outlet "
                            f"temperature ({T_hot:g} K), got {section['temperature']!r}")
    kind = _exactly_one(section, ["coolant", "refrigerator_cop", "refrigerator_carnot_fraction", "cooler_capacity"],
                        "precooling")
    values = {"temperature": T}
    if kind != "coolant":
        for key in ("coolant_pressure", "coolant_work"):
            if section.get(key) is not None:
                raise ScenarioError(f"precooling.{key} goes with precooling.coolant, not with precooling.{kind}")
    if kind == "coolant":
        from properties.fluids import resolve_fluid_name

        try:
            values["coolant"] = resolve_fluid_name(str(section["coolant"]))
        except ValueError as err:
            raise ScenarioError(f"precooling.coolant: {err}".replace("gas must be", "expected")) from None
        if section.get("coolant_pressure") is not None:
            pc = _quantity(section, "coolant_pressure", "pressure", "precooling.coolant_pressure")
            if pc <= 0:
                raise ScenarioError(f"precooling.coolant_pressure must be above 0, got {section['coolant_pressure']!r}")
            values["coolant_pressure"] = pc
        if section.get("coolant_work") is not None:
            w = _quantity(section, "coolant_work", "specific_energy", "precooling.coolant_work")
            if w <= 0:
                raise ScenarioError(f"precooling.coolant_work must be above 0, got {section['coolant_work']!r}")
            values["coolant_work"] = w
    elif kind == "refrigerator_cop":
        cop = _number(section, "refrigerator_cop", "precooling.refrigerator_cop")
        if cop <= 0:
            raise ScenarioError(f"precooling.refrigerator_cop must be above 0, got {section['refrigerator_cop']!r}")
        values["refrigerator_cop"] = cop
    else:
        f = _number(section, "refrigerator_carnot_fraction", "precooling.refrigerator_carnot_fraction")
        values["refrigerator_carnot_fraction"] = _between(
            f, "precooling.refrigerator_carnot_fraction", 0, 1, given=section["refrigerator_carnot_fraction"])
    return PrecoolingSpec(**values)


def _parse_cooler(section, T_hot):
    """A precooler given by its cooler's capacity curve and input power."""
    key = "precooling.cooler_capacity"
    for other in ("temperature", "coolant", "coolant_pressure", "coolant_work", "refrigerator_cop",
                  "refrigerator_carnot_fraction"):
        if section.get(other) is not None:
            why = (" (lhsim finds it where the load equals the capacity)" if other == "temperature" else "")
            raise ScenarioError(f"give {key} without precooling.{other}{why}")
    curve = section["cooler_capacity"]
    if not isinstance(curve, list) or len(curve) < 2:
        raise ScenarioError(f"{key} must be a list of at least two [temperature, capacity] pairs, such as "
                            f"[['40 K', '20 W'], ['80 K', '90 W']], got {shown(curve)}")
    points = []
    for k, pair in enumerate(curve, start=1):
        full = f"{key}[{k}]"
        if not isinstance(pair, list) or len(pair) != 2:
            raise ScenarioError(f"{full} must be a [temperature, capacity] pair such as ['60 K', '50 W'], "
                                f"got {shown(pair)}")
        try:
            T = parse_quantity(pair[0], "temperature")
            Q = parse_quantity(pair[1], "power")
        except UnitError as err:
            raise ScenarioError(f"{full}: {err}") from None
        if not 0 < T < T_hot:
            raise ScenarioError(f"{full}: the temperature must be above 0 and below the aftercooler outlet "
                                f"temperature ({T_hot:g} K), got {shown(pair[0])}")
        if Q < 0:
            raise ScenarioError(f"{full}: the capacity must be 0 or more, got {shown(pair[1])}")
        if points and T <= points[-1][0]:
            raise ScenarioError(f"{key} must list its points with rising temperature, got {shown(pair[0])} "
                                f"after {points[-1][0]:g} K")
        points.append((T, Q))
    if section.get("cooler_input_power") is None:
        raise ScenarioError("missing precooling.cooler_input_power: expected the power the cooler draws, "
                            "such as '7.5 kW'")
    P = _quantity(section, "cooler_input_power", "power", "precooling.cooler_input_power")
    if P <= 0:
        raise ScenarioError(f"precooling.cooler_input_power must be above 0, got {section['cooler_input_power']!r}")
    return PrecoolingSpec(cooler_capacity=tuple(points), cooler_input_power=P)


def _parse_dual_pressure(section, p_low, p_hot_in):
    if section is None:
        return None
    for key, what in (("intermediate_pressure", "a pressure between low_pressure and high_pressure"),
                      ("recirculated_fraction", "a number between 0 and 1")):
        _require(section, key, f"dual_pressure.{key}", what)
    p_i = _quantity(section, "intermediate_pressure", "pressure", "dual_pressure.intermediate_pressure")
    if not p_low < p_i < p_hot_in:
        raise ScenarioError(f"dual_pressure.intermediate_pressure must be between low_pressure ({_bar(p_low)}) "
                            f"and the high pressure after the aftercooler ({_bar(p_hot_in)}), "
                            f"got {section['intermediate_pressure']!r}")
    i = _number(section, "recirculated_fraction", "dual_pressure.recirculated_fraction")
    _between(i, "dual_pressure.recirculated_fraction", 0, 1, high_open=True, given=section["recirculated_fraction"])
    return DualPressureSpec(intermediate_pressure=p_i, recirculated_fraction=i)


def _parse_compressor(section):
    if section is None:
        raise ScenarioError("missing compressor: expected compressor.isothermal_efficiency, or "
                            "compressor.stages with compressor.isentropic_efficiency")
    given = {k for k, v in section.items() if v is not None}
    if "isothermal_efficiency" in given and ("isentropic_efficiency" in given or "stages" in given):
        other = "isentropic_efficiency" if "isentropic_efficiency" in given else "stages"
        raise ScenarioError(f"give one of compressor.isothermal_efficiency or compressor.stages with "
                            f"compressor.isentropic_efficiency, not compressor.isothermal_efficiency and compressor.{other}")
    values = {}
    if section.get("max_discharge_temperature") is not None:
        values["max_discharge_temperature"] = _temperature(section, "max_discharge_temperature",
                                                           "compressor.max_discharge_temperature")
    for key in ("mechanical_efficiency", "motor_efficiency"):
        if section.get(key) is not None:
            eta = _number(section, key, f"compressor.{key}")
            values[key] = _between(eta, f"compressor.{key}", 0, 1, given=section[key])
    if section.get("isothermal_efficiency") is not None:
        for key in ("stage_pressures", "intercooler_temperature", "intercooler_pressure_drop"):
            if key in given:
                raise ScenarioError(f"compressor.{key} goes with compressor.stages and compressor.isentropic_efficiency, "
                                    f"not with compressor.isothermal_efficiency (that model has no stages)")
        eta = _number(section, "isothermal_efficiency", "compressor.isothermal_efficiency")
        _between(eta, "compressor.isothermal_efficiency", 0, 1, given=section["isothermal_efficiency"])
        return CompressorSpec(isothermal_efficiency=eta, **values)
    if section.get("isentropic_efficiency") is None:
        raise ScenarioError("missing compressor.isentropic_efficiency (with compressor.stages) or "
                            "compressor.isothermal_efficiency: expected a number between 0 and 1")
    eta = _number(section, "isentropic_efficiency", "compressor.isentropic_efficiency")
    _between(eta, "compressor.isentropic_efficiency", 0, 1, given=section["isentropic_efficiency"])
    stages = 1
    if section.get("stages") is not None:
        stages = _integer(section, "stages", "compressor.stages", 1, 12)
    if section.get("intercooler_temperature") is not None:
        values["intercooler_temperature"] = _temperature(section, "intercooler_temperature",
                                                         "compressor.intercooler_temperature")
    if section.get("intercooler_pressure_drop") is not None:
        dp = _quantity(section, "intercooler_pressure_drop", "pressure", "compressor.intercooler_pressure_drop",
                       gauge=False)
        if dp < 0:
            raise ScenarioError(f"compressor.intercooler_pressure_drop must be 0 or more, got "
                                f"{section['intercooler_pressure_drop']!r}")
        values["intercooler_pressure_drop"] = dp
    if section.get("stage_pressures") is not None:
        values["stage_pressures"] = _stage_pressure_list(section["stage_pressures"], stages)
    return CompressorSpec(stages=stages, isentropic_efficiency=eta, **values)


def _stage_pressure_list(given, stages):
    """``compressor.stage_pressures`` [Pa]: the discharge pressures of stages 1 to N-1, rising."""
    key = "compressor.stage_pressures"
    if stages == 1:
        raise ScenarioError(f"{key} needs compressor.stages of 2 or more (one stage discharges at high_pressure), "
                            f"got compressor.stages 1")
    if not isinstance(given, list) or len(given) != stages - 1:
        raise ScenarioError(f"{key} must be a list of {stages - 1} pressure{'s' if stages > 2 else ''} (the discharge "
                            f"pressures of stages 1 to {stages - 1} of {stages}; the last discharges at high_pressure), "
                            f"got {shown(given)}")
    out = []
    for k, value in enumerate(given, start=1):
        full = f"{key}[{k}]"
        if value is None:
            raise ScenarioError(f"{full} is empty: expected the discharge pressure of stage {k}, such as '10 bar'")
        try:
            p = parse_quantity(value, "pressure")
        except UnitError as err:
            raise ScenarioError(f"{full}: {err}") from None
        if out and p <= out[-1]:
            raise ScenarioError(f"{key} must rise from stage to stage, got {shown(given)} (stage {k} "
                                f"discharges at {_bar(p)}, stage {k - 1} at {_bar(out[-1])})")
        out.append(p)
    return tuple(out)


def _check_stage_pressures(compressor, p_suction, p_high, layout):
    """The stage pressures fit between the compressor suction and high_pressure."""
    given = compressor.stage_pressures
    if given is None:
        return
    key = "compressor.stage_pressures"
    if layout == "dual-pressure":
        raise ScenarioError(f"{key} is not taken in the dual-pressure layout (its two sections share "
                            f"compressor.stages, each at equal pressure ratios); leave it out")
    dp = compressor.intercooler_pressure_drop
    suction = p_suction
    for k, p in enumerate(list(given) + [p_high], start=1):
        if p <= suction:
            where = "the compressor suction" if k == 1 else f"stage {k}'s suction (after intercooler {k - 1})"
            raise ScenarioError(f"{key}: stage {k} must discharge above {where}, {_bar(suction)}, got "
                                f"{_bar(p)}{' (high_pressure)' if k > len(given) else ''}")
        suction = p - dp
        if k <= len(given) and suction <= 0:
            raise ScenarioError(f"compressor.intercooler_pressure_drop {_bar(dp)} is more than stage {k}'s "
                                f"discharge pressure {_bar(p)}")


def _parse_aftercooler(section, T0, p_high, p_low):
    T_out = T0
    if section.get("outlet_temperature") is not None:
        T_out = _temperature(section, "outlet_temperature", "aftercooler.outlet_temperature")
    dp = 0.0
    if section.get("pressure_drop") is not None:
        dp = _quantity(section, "pressure_drop", "pressure", "aftercooler.pressure_drop")
        if dp < 0 or p_high - dp <= p_low:
            raise ScenarioError(f"aftercooler.pressure_drop must be 0 or more and below high_pressure less "
                                f"low_pressure ({_bar(p_high - p_low)}), got {section['pressure_drop']!r}")
    return AftercoolerSpec(outlet_temperature=T_out, pressure_drop=dp)


def _parse_recuperator(section, p_hot_in, p_low, key="recuperator"):
    if section is None:
        raise ScenarioError(f"missing {key}: expected one of {key}.effectiveness, "
                            f"{key}.min_approach or {key}.ua")
    values = {}
    geometry = None
    if section.get("geometry") is not None:
        geometry = values["geometry"] = _parse_geometry(section["geometry"], f"{key}.geometry")
        for other in ("ua", "high_side_pressure_drop", "low_side_pressure_drop"):
            if section.get(other) is not None:
                why = ("the geometry gives the conductance" if other == "ua"
                       else "the geometry's friction gives the pressure drops")
                raise ScenarioError(f"give {key}.geometry without {key}.{other} ({why})")
    if geometry is not None and geometry.length is not None:
        for other in ("effectiveness", "min_approach"):
            if section.get(other) is not None:
                raise ScenarioError(f"give {key}.geometry.length (a rated exchanger) or {key}.{other} (its length "
                                    f"sized for it), not both")
        mode = None
    elif geometry is not None:
        mode = _exactly_one(section, ["effectiveness", "min_approach"], key)
    else:
        mode = _exactly_one(section, ["effectiveness", "min_approach", "ua"], key)
    if mode == "effectiveness":
        eps = _number(section, "effectiveness", f"{key}.effectiveness")
        values["effectiveness"] = _between(eps, f"{key}.effectiveness", 0, 1, given=section["effectiveness"])
    elif mode == "min_approach":
        dT = _quantity(section, "min_approach", "temperature_difference", f"{key}.min_approach")
        if dT < 0 or dT > 200:
            raise ScenarioError(f"{key}.min_approach must be from 0 to 200 K, got {section['min_approach']!r}")
        values["min_approach"] = dT
    elif mode == "ua":
        ua = _quantity(section, "ua", "thermal_conductance", f"{key}.ua")
        if ua <= 0:
            raise ScenarioError(f"{key}.ua must be above 0 W/K, got {section['ua']!r}")
        values["ua"] = ua
    if section.get("zones") is not None:
        values["zones"] = _integer(section, "zones", f"{key}.zones", 1, 2000)
    for side, limit in (("high_side_pressure_drop", p_hot_in - p_low), ("low_side_pressure_drop", p_low)):
        if section.get(side) is not None:
            dp = _quantity(section, side, "pressure", f"{key}.{side}")
            if dp < 0 or dp >= limit:
                raise ScenarioError(f"{key}.{side} must be 0 or more and below {_bar(limit)}, "
                                    f"got {section[side]!r}")
            values[side] = dp
    return RecuperatorSpec(**values)


def _parse_geometry(section, key):
    """A ``geometry`` section of a recuperator: a tube-in-tube exchanger's hardware."""
    kind = section.get("type", "tube-in-tube")
    if kind != "tube-in-tube":
        raise ScenarioError(f"{key}.type must be tube-in-tube, got {shown(kind)}")

    def length(data, name, full, required=True):
        if data.get(name) is None:
            if required:
                raise ScenarioError(f"missing {full}: expected a length such as {_EXAMPLES['length']}")
            return None
        value = _quantity(data, name, "length", full)
        if not 0 < value < 1e3:
            raise ScenarioError(f"{full} must be above 0 and below 1000 m, got {data[name]!r}")
        return value

    inner = section.get("inner_tube") or {}
    outer = section.get("outer_tube") or {}
    d_i = length(inner, "inner_diameter", f"{key}.inner_tube.inner_diameter")
    d_o = length(inner, "outer_diameter", f"{key}.inner_tube.outer_diameter")
    D_i = length(outer, "inner_diameter", f"{key}.outer_tube.inner_diameter")
    if not d_i < d_o:
        raise ScenarioError(f"{key}.inner_tube.outer_diameter must be above its inner_diameter ({d_i * 1e3:g} mm), "
                            f"got {inner['outer_diameter']!r}")
    if not d_o < D_i:
        raise ScenarioError(f"{key}.outer_tube.inner_diameter must be above the inner tube's outer_diameter "
                            f"({d_o * 1e3:g} mm): the return gas needs an annulus, got {outer['inner_diameter']!r}")
    values = {"inner_inside": d_i, "inner_outside": d_o, "outer_inside": D_i, "tubes": 1}
    if section.get("tubes") is not None:
        values["tubes"] = _integer(section, "tubes", f"{key}.tubes", 1, 10000)
    rough = length(section, "roughness", f"{key}.roughness", required=False) if section.get("roughness") != 0 else 0.0
    if rough is not None:
        if rough >= 0.05 * d_i:
            raise ScenarioError(f"{key}.roughness must be below 5 % of the inner tube's inner diameter, got "
                                f"{section['roughness']!r}")
        values["roughness"] = rough
    walls = [name for name in ("wall_conductivity", "wall_material") if section.get(name) is not None]
    if len(walls) != 1:
        raise ScenarioError(f"give one of {key}.wall_conductivity or {key}.wall_material"
                            + (", not both" if walls else ""))
    if walls[0] == "wall_conductivity":
        k = _quantity(section, "wall_conductivity", "wall_conductivity", f"{key}.wall_conductivity")
        if not 0 < k <= 1e4:
            raise ScenarioError(f"{key}.wall_conductivity must be above 0 and at most 10000 W/(m K), got "
                                f"{section['wall_conductivity']!r}")
        values["wall_conductivity"] = k
    else:
        given = " ".join(str(section["wall_material"]).lower().split())
        name = next((n for n in WALL_MATERIAL_NAMES if n.lower() == given), None)
        if name is None:
            raise ScenarioError(f"{key}.wall_material must be one of {', '.join(WALL_MATERIAL_NAMES)}, got "
                                f"{shown(section['wall_material'])}")
        values["wall_material"] = name
    coil = length(section, "coil_diameter", f"{key}.coil_diameter", required=False)
    if coil is not None:
        if coil <= 3 * D_i:
            raise ScenarioError(f"{key}.coil_diameter must be more than three outer-tube diameters "
                                f"({3 * D_i * 1e3:g} mm), got {section['coil_diameter']!r}")
        values["coil_diameter"] = coil
    values["length"] = length(section, "length", f"{key}.length", required=False)
    return GeometrySpec(**values)


def _parse_production(section):
    if section is None:
        return None
    key = _exactly_one(section, ["liquid_rate", "compressor_flow"], "production")
    full = f"production.{key}"
    value = section[key]
    if value is None:
        raise ScenarioError(f"{full} is empty")
    found = None
    for dimension in SCHEMA["production"][key]:
        try:
            found = dimension, parse_quantity(value, dimension)
            break
        except UnitError as err:
            if "write powers with ^" in str(err):
                raise ScenarioError(f"{full}: {err}") from None  # a unit written m3: the hint says ^
            continue
    if found is None:
        what = ("a mass flow such as '8 kg/h', a volume of liquid such as '10 L/h', or the gas equivalent "
                "such as '6 Nm^3/h'" if key == "liquid_rate" else
                "a mass flow such as '60 kg/h', a volume flow at the compressor suction such as '50 m^3/h' or "
                "'800 L/min', or a volume of gas at reference conditions such as '40 Nm^3/h', '40 Sm^3/h' or '25 scfm'")
        raise ScenarioError(f"{full}: expected {what}, got {shown(value)}")
    dimension, rate = found
    if rate <= 0:
        raise ScenarioError(f"{full} must be above 0, got {value!r}")
    if key == "compressor_flow":
        if dimension == "mass_flow":
            return ProductionSpec(compressor_flow=rate)
        return ProductionSpec(compressor_volume_flow=rate,
                              volume_reference="suction" if dimension == "suction_volume_flow" else dimension)
    if dimension == "mass_flow":
        return ProductionSpec(liquid_mass_rate=rate)
    if dimension == "volume_flow":
        return ProductionSpec(liquid_volume_rate=rate)
    return ProductionSpec(liquid_gas_volume_rate=rate, volume_reference=dimension)


# Limits on a scenario file, checked before any value is built (docs/scenario-format.md,
# "Limits"): its size, how deep sections and lists nest, and how many values it holds once
# every alias is expanded (about what a file of the largest size holds written out, so that
# only aliases repeating values reach it: a few lines of aliases can otherwise stand for
# billions of values).
MAX_FILE_BYTES = 1024 * 1024
MAX_DEPTH = 20
MAX_VALUES = 250_000

# Characters YAML allows in a document (YAML 1.1, 5.1: printable characters); any other one,
# a NUL byte for instance, is refused with its line and column.
_NOT_YAML = re.compile("[^\t\n\r\x20-\x7e\x85\xa0-\ud7ff\ue000-\ufffd\U00010000-\U0010ffff]")


def _yaml_loader():
    """PyYAML's C safe loader where built (much faster), else the pure-Python one, that
    refuses a key given twice in one mapping and a key that is not a name or number."""
    import yaml

    base = getattr(yaml, "CSafeLoader", yaml.SafeLoader)

    class Loader(base):
        """Safe YAML for scenario files; ``scenario_path`` names the file in messages."""

        scenario_path = "<scenario>"

    def mapping(loader, node, deep=False):
        seen = set()
        for key_node, _ in node.value:
            if key_node.tag == "tag:yaml.org,2002:merge":  # <<: *defaults, merged below
                continue
            key = loader.construct_object(key_node, deep=True)
            line = key_node.start_mark.line + 1
            try:
                hash(key)
            except TypeError:
                raise ScenarioError(f"scenario file {loader.scenario_path}: line {line}: a key must be a name, "
                                    f"got the {type(key).__name__} {shown(key)}") from None
            if key in seen:
                raise ScenarioError(f"scenario file {loader.scenario_path}: key {printable(key, 60)} is given "
                                    f"twice (line {line}); give each key once")
            seen.add(key)
        return yaml.SafeLoader.construct_mapping(loader, node, deep=deep)

    Loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_MAPPING_TAG, mapping)
    return Loader


def _measure(root, path):
    """Refuse a YAML node graph nested deeper than :data:`MAX_DEPTH`, holding more than
    :data:`MAX_VALUES` values with aliases expanded, or holding itself through an alias.

    Aliases share nodes, so the expanded size is counted once per node (a walk with an
    explicit stack: no recursion, time in proportion to the file, not to the expansion)."""
    import yaml

    def children(node):
        if isinstance(node, yaml.MappingNode):
            return [n for pair in node.value for n in pair]
        if isinstance(node, yaml.SequenceNode):
            return node.value
        return ()

    size, depth, open_ = {}, {}, set()
    stack = [(root, False)]
    while stack:
        node, closing = stack.pop()
        key = id(node)
        if closing:
            open_.discard(key)
            kids = children(node)
            size[key] = 1 + sum(size[id(k)] for k in kids)
            collection = isinstance(node, (yaml.MappingNode, yaml.SequenceNode))
            depth[key] = 1 + max((depth[id(k)] for k in kids), default=0) if collection else 0
            line = node.start_mark.line + 1
            if depth[key] > MAX_DEPTH:
                raise ScenarioError(f"scenario file {path}: the value at line {line} nests sections or lists "
                                    f"more than {MAX_DEPTH} levels deep; at most {MAX_DEPTH} are allowed")
            if size[key] > MAX_VALUES:
                raise ScenarioError(f"scenario file {path}: the value at line {line} holds more than "
                                    f"{MAX_VALUES} values once its aliases are expanded (each use of an alias "
                                    f"counts its values again); at most {MAX_VALUES} are allowed")
            continue
        if key in size:
            continue
        if key in open_:
            raise ScenarioError(f"scenario file {path}: the value at line {node.start_mark.line + 1} contains "
                                f"itself through an alias; a value cannot hold itself")
        open_.add(key)
        stack.append((node, True))
        for kid in children(node):
            if id(kid) not in size:
                stack.append((kid, False))


def read_mapping(path):
    """Read a YAML scenario file into a plain mapping, without validating it.

    The file is read once and refused before any value is built if it is larger than
    :data:`MAX_FILE_BYTES`, holds a character YAML does not allow (a NUL byte), nests deeper
    than :data:`MAX_DEPTH` or expands to more than :data:`MAX_VALUES` values through aliases.
    Merge keys (``<<: *defaults``) are YAML and are accepted.

    Raises
    ------
    ScenarioError
        If the file is missing, unreadable, too large, not YAML or empty, or beyond a limit.
    """
    import yaml

    try:
        with open(path, "rb") as handle:
            raw = handle.read(MAX_FILE_BYTES + 1)
            if len(raw) > MAX_FILE_BYTES:
                try:
                    size = os.fstat(handle.fileno()).st_size
                except OSError:
                    size = 0
                # a device or a pipe has no size to tell
                size = f"{size} bytes" if size > MAX_FILE_BYTES else f"more than {MAX_FILE_BYTES} bytes"
                raise ScenarioError(f"scenario file {path} is too large: {size}, at most {MAX_FILE_BYTES} bytes "
                                    f"(1 MiB) are read; give many sweep points as ranges")
    except FileNotFoundError:
        raise ScenarioError(f"scenario file {path} not found") from None
    except OSError as err:
        raise ScenarioError(f"scenario file {path} could not be read: {err.strerror or err}") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise ScenarioError(f"scenario file {path} is not UTF-8 text; save it as UTF-8") from None
    bad = _NOT_YAML.search(text)
    if bad:
        line = text.count("\n", 0, bad.start()) + 1
        column = bad.start() - (text.rfind("\n", 0, bad.start()) + 1) + 1
        raise ScenarioError(f"scenario file {path}: line {line}, column {column} holds the control character "
                            f"U+{ord(bad.group()):04X}, which YAML does not allow; remove it")
    loader = _yaml_loader()(text)
    loader.scenario_path = path
    try:
        node = loader.get_single_node()
        if node is None:
            data = None
        else:
            _measure(node, path)
            data = loader.construct_document(node)
    except yaml.YAMLError as err:
        mark = getattr(err, "problem_mark", None)
        where = f" at line {mark.line + 1}" if mark is not None else ""
        problem = getattr(err, "problem", None) or str(err)
        if "nesting depth" in str(problem):  # libyaml's own limit, 1000 levels
            raise ScenarioError(f"scenario file {path}{where}: sections or lists nest more than {MAX_DEPTH} "
                                f"levels deep; at most {MAX_DEPTH} are allowed") from None
        raise ScenarioError(f"scenario file {path} is not valid YAML{where}: "
                            f"{printable(' '.join(str(problem).split()), 200)}") from None
    except ScenarioError:
        raise
    except ValueError as err:  # an integer of more digits than Python converts (4300)
        raise ScenarioError(f"scenario file {path} holds a value that cannot be read: "
                            f"{printable(str(err).split(':')[0], 100)}") from None
    except RecursionError:  # the pure-Python parser on a deeply nested file
        raise ScenarioError(f"scenario file {path}: sections or lists nest more than {MAX_DEPTH} levels "
                            f"deep; at most {MAX_DEPTH} are allowed") from None
    finally:
        loader.dispose()
    if data is None:
        raise ScenarioError(f"scenario file {path} is empty: expected a mapping with gas, low_pressure, ...")
    return data


def load_scenario(path):
    """Read and validate a YAML scenario file (a ``sweep:`` section in it is set aside).

    Parameters
    ----------
    path : str or os.PathLike
        Path of the scenario file.

    Returns
    -------
    Scenario
    """
    return load_scenario_and_sweep(path)[0]


def load_scenario_and_sweep(path):
    """Read a YAML scenario file once; validate the scenario and hand back its sweep section.

    Parameters
    ----------
    path : str or os.PathLike
        Path of the scenario file.

    Returns
    -------
    scenario : Scenario
        The scenario without its sweep section.
    sweep : object or None
        The ``sweep:`` section as given (not validated), None where the file has none.
    """
    data = read_mapping(path)
    sweep = None
    if isinstance(data, dict):
        sweep = data.get("sweep")
        data = {k: v for k, v in data.items() if k != "sweep"}
    return parse_scenario(data), sweep
