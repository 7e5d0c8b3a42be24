"""Scenario files: units to SI, defaults, and every error path (one line naming the key)."""

import pytest

from cycle.errors import ScenarioError
from cycle.flowsheet import solve_scenario
from cycle.scenario import DEFAULT_AMBIENT_TEMPERATURE, DEFAULT_ZONES, load_scenario, parse_scenario
from cycle.units import UnitError, parse_quantity


def base(**changes):
    data = {
        "gas": "nitrogen",
        "low_pressure": "1.01325 bar",
        "high_pressure": "200 bar",
        "compressor": {"isothermal_efficiency": 0.65},
        "recuperator": {"effectiveness": 0.97},
    }
    for key, value in changes.items():
        if value is None:
            data.pop(key, None)
        else:
            data[key] = value
    return data


def error_of(data):
    with pytest.raises(ScenarioError) as info:
        parse_scenario(data)
    message = str(info.value)
    assert "\n" not in message
    return message


@pytest.mark.parametrize("text, dimension, si", [
    ("200 bar", "pressure", 200e5),
    ("1 atm", "pressure", 101325.0),
    ("2.5 MPa", "pressure", 2.5e6),
    ("300 K", "temperature", 300.0),
    ("27 degC", "temperature", 300.15),
    ("80.33 degF", "temperature", 300.0),  # (80.33 - 32) / 1.8 + 273.15 = 300.0
    ("3 K", "temperature_difference", 3.0),
    ("3 degC", "temperature_difference", 3.0),
    ("9 degF", "temperature_difference", 5.0),
    ("10 L/h", "volume_flow", 10e-3 / 3600),
    ("8 kg/h", "mass_flow", 8 / 3600),
    ("5 W", "power", 5.0),
    ("500 W/K", "thermal_conductance", 500.0),
    (300, "temperature", 300.0),
    ("0.97", "dimensionless", 0.97),
])
def test_quantities_convert_to_si(text, dimension, si):
    assert parse_quantity(text, dimension) == pytest.approx(si, rel=1e-4)


@pytest.mark.parametrize("text, dimension, fragment", [
    ("200 K", "pressure", "expected a pressure"),
    ("two hundred bar", "pressure", "expected a number followed by a unit"),
    ("200 blorps", "pressure", "unknown unit"),
    ("10 barg", "temperature", "a gauge pressure"),
    ("300 kPag", "power", "a gauge pressure"),
    ("nan", "pressure", "expected a number"),
])
def test_bad_quantities_say_what_was_expected(text, dimension, fragment):
    with pytest.raises(UnitError, match=fragment):
        parse_quantity(text, dimension)


def test_defaults_and_si():
    sc = parse_scenario(base())
    assert sc.ambient_temperature == DEFAULT_AMBIENT_TEMPERATURE == 300.0
    assert sc.aftercooler.outlet_temperature == 300.0 and sc.aftercooler.pressure_drop == 0.0
    assert sc.recuperator.zones == DEFAULT_ZONES
    assert sc.high_pressure == pytest.approx(200e5)
    assert sc.gas == "Nitrogen"
    assert sc.production is None and sc.heat_leak == 0.0


def test_liquid_rate_by_mass_or_volume():
    by_volume = parse_scenario(base(production={"liquid_rate": "10 L/h"}))
    by_mass = parse_scenario(base(production={"liquid_rate": "8 kg/h"}))
    assert by_volume.production.liquid_volume_rate == pytest.approx(10e-3 / 3600)
    assert by_mass.production.liquid_mass_rate == pytest.approx(8 / 3600)


@pytest.mark.parametrize("data, expected", [
    (base(recuperator={"efectiveness": 0.97}), "unknown key recuperator.efectiveness; did you mean recuperator.effectiveness?"),
    (base(high_presure="200 bar"), "unknown key high_presure; did you mean high_pressure?"),
    (base(high_pressure="200 K"), "high_pressure: expected a pressure (for example in bar), got '200 K'"),
    (base(high_pressure=None), "missing high_pressure: expected a pressure such as '200 bar'"),
    (base(gas=None), "missing gas"),
    (base(gas="unobtanium"), "gas must be a known pure fluid"),
    (base(recuperator={"effectiveness": 1.4}), "recuperator.effectiveness must be above 0 and at most 1, got 1.4"),
    (base(recuperator={"effectiveness": 0.9, "ua": "100 W/K"}),
     "give one of recuperator.effectiveness, recuperator.min_approach or recuperator.ua, not recuperator.effectiveness and recuperator.ua"),
    (base(recuperator={"zones": 10}), "missing recuperator choice"),
    (base(recuperator={"ua": "300 W/K"}), "recuperator.ua needs production"),
    (base(heat_leak="5 W"), "heat_leak needs production"),
    (base(production={"liquid_rate": "10 L/h", "compressor_flow": "100 kg/h"}),
     "give one of production.liquid_rate or production.compressor_flow, not"),
    (base(production={"liquid_rate": "10 W"}), "production.liquid_rate: expected a mass flow"),
    (base(compressor={"isothermal_efficiency": 0.6, "stages": 2}), "give one of compressor.isothermal_efficiency"),
    (base(compressor={"stages": 2}), "missing compressor.isentropic_efficiency"),
    (base(compressor={"stages": 2.5, "isentropic_efficiency": 0.8}), "compressor.stages must be a whole number"),
    (base(compressor={"isothermal_efficiency": 0}), "compressor.isothermal_efficiency must be above 0"),
    (base(compressor=None), "missing compressor"),
    (base(low_pressure="-1 bar"), "low_pressure must be above 0"),
    (base(high_pressure="1 bar"), "high_pressure must be above low_pressure"),
    (base(recuperator={"effectiveness": 0.9, "low_side_pressure_drop": "2 bar"}),
     "recuperator.low_side_pressure_drop must be 0 or more and below"),
    (base(recuperator={"effectiveness": 0.9, "zones": 0}), "recuperator.zones must be a whole number from 1"),
    (base(recuperator={"min_approach": "-2 K"}), "recuperator.min_approach must be from 0"),
    (base(heat_leak="-5 W", production={"compressor_flow": "10 kg/h"}), "heat_leak must be 0 or more"),
    (base(production={"compressor_flow": "0 kg/h"}), "production.compressor_flow must be above 0"),
    (base(ambient_temperature="-20 K"), "ambient_temperature must be above 0 K and at most 1000 K, got '-20 K'"),
    (base(high_pressure="1e400 bar"), "high_pressure: expected a finite number, got '1e400 bar'"),
    (base(recuperator={"min_approach": "9 degF"}), None),
    (base(compressor={"isothermal_efficiency": None, "stages": 2, "isentropic_efficiency": 0.8}), None),
    (base(recuperator="high"), "recuperator must be a mapping"),
    (base(recuperator={"effectiveness": "high"}), "recuperator.effectiveness: expected a number followed by a unit"),
])
def test_invalid_scenarios_get_one_line_naming_the_key(data, expected):
    if expected is None:  # valid after all
        parse_scenario(data)
    else:
        assert expected in error_of(data)


def test_non_mapping_scenario():
    assert "mapping" in error_of(["gas", "nitrogen"])


def test_low_pressure_above_critical_is_refused_at_solve():
    with pytest.raises(ScenarioError, match="low_pressure must be below the critical pressure of Nitrogen"):
        solve_scenario(parse_scenario(base(low_pressure="40 bar")))


def test_state_outside_the_property_range_is_a_scenario_error():
    # Oxygen's equation of state stops at 800 bar (CoolProp); asking for 900 bar is an input error.
    with pytest.raises(ScenarioError, match="high_pressure must be at most 800 bar"):
        solve_scenario(parse_scenario(base(gas="oxygen", high_pressure="900 bar")))
    # Below the melting line of nitrogen at 200 bar (67.4 K, Span et al. 2000 via CoolProp).
    with pytest.raises(ScenarioError, match="melting"):
        solve_scenario(parse_scenario(base(aftercooler={"outlet_temperature": "65 K"})))


def test_files(tmp_path):
    good = tmp_path / "good.yaml"
    good.write_text("gas: argon\nlow_pressure: 1 bar\nhigh_pressure: 150 bar\n"
                    "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.95}\n")
    assert load_scenario(good).gas == "Argon"
    broken = tmp_path / "broken.yaml"
    broken.write_text("gas: argon\nlow_pressure: [1 bar\n")
    with pytest.raises(ScenarioError, match="not valid YAML at line"):
        load_scenario(broken)
    empty = tmp_path / "empty.yaml"
    empty.write_text("")
    with pytest.raises(ScenarioError, match="is empty"):
        load_scenario(empty)
    with pytest.raises(ScenarioError, match="not found"):
        load_scenario(tmp_path / "missing.yaml")


def test_temperatures_below_the_boiling_point_are_refused_with_their_key():
    with pytest.raises(ScenarioError, match=r"^ambient_temperature must be above the boiling temperature"):
        solve_scenario(parse_scenario(base(ambient_temperature="70 K", aftercooler={"outlet_temperature": "300 K"})))
    with pytest.raises(ScenarioError, match=r"^aftercooler.outlet_temperature 65 K gives no valid state"):
        solve_scenario(parse_scenario(base(aftercooler={"outlet_temperature": "65 K"})))


def test_yaml_pitfalls(tmp_path):
    doubled = tmp_path / "doubled.yaml"
    doubled.write_text("gas: nitrogen\ngas: argon\nlow_pressure: 1 bar\n")
    with pytest.raises(ScenarioError, match="key gas is given twice \\(line 2\\)"):
        load_scenario(doubled)
    latin = tmp_path / "latin.yaml"
    latin.write_bytes(b"gas: \xff\xfe nitrogen\n")
    with pytest.raises(ScenarioError, match="is not UTF-8 text"):
        load_scenario(latin)
