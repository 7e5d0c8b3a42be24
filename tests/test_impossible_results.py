"""Impossible results are not successes (issue 10, item 9): an infinite or undefined number is
an error naming the input behind it; a heat leak that eats the product is said to be one; a high
pressure at exactly the critical pressure solves."""

import pytest

from cycle import cli
from cycle.errors import NoLiquefactionError, ScenarioError, TemperatureCrossError
from cycle.flowsheet import solve_scenario
from cycle.scenario import parse_scenario
from properties import get_fluid

BASE = {"gas": "nitrogen", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
        "compressor": {"isothermal_efficiency": 0.6}, "recuperator": {"effectiveness": 0.97}}


def solve(**changes):
    return solve_scenario(parse_scenario(dict(BASE, **changes)))


def test_an_infinite_production_is_refused_naming_it():
    with pytest.raises(ScenarioError, match=r"too large to represent .* production.liquid_rate 1e\+308") as info:
        solve(production={"liquid_rate": "1e308 kg/s"})
    assert "\n" not in str(info.value)


@pytest.mark.parametrize("production", [{"liquid_rate": "10 L/h"}, {"compressor_flow": "10 kg/h"}])
def test_a_heat_leak_that_eats_the_product_is_blamed(production):
    with pytest.raises(NoLiquefactionError, match=r"^no liquid: heat_leak 1e\+308 W takes") as info:
        solve(heat_leak="1e308 W", production=production)
    assert "effectiveness 0.97 cannot be reached" not in str(info.value)


def test_cli_exit_codes_for_impossible_results(tmp_path, capsys):
    path = tmp_path / "s.yaml"
    path.write_text("gas: nitrogen\nlow_pressure: 1.05 bar\nhigh_pressure: 200 bar\n"
                    "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.97}\n"
                    "production: {liquid_rate: 1e308 kg/s}\n")
    assert cli.main(["run", str(path)]) == 2
    path.write_text(path.read_text().replace("1e308 kg/s", "10 L/h") + "heat_leak: 1e308 W\n")
    assert cli.main(["run", str(path)]) == 3
    err = capsys.readouterr().err
    assert err.count("lhsim: error:") == 2 and "Traceback" not in err


@pytest.mark.parametrize("gas", ["nitrogen", "argon"])
def test_a_high_pressure_at_exactly_the_critical_pressure_solves(gas):
    pc = get_fluid(gas).p_critical
    at = solve(gas=gas, high_pressure=pc, recuperator={"effectiveness": 0.995})
    near = solve(gas=gas, high_pressure=pc * (1 + 1e-5), recuperator={"effectiveness": 0.995})
    assert at.liquid_yield > 0
    # 10 ppm of pressure moves the yield by far less than a per mille here.
    assert at.liquid_yield == pytest.approx(near.liquid_yield, rel=1e-3)
    assert at.solve.converged


def test_a_dual_pressure_design_whose_temperatures_cross_is_refused_with_exit_3(tmp_path, capsys):
    path = tmp_path / "d.yaml"
    path.write_text("gas: argon\nambient_temperature: 160 K\nlow_pressure: 1.3 bar\nhigh_pressure: 109.5 bar\n"
                    "compressor: {isothermal_efficiency: 1}\nrecuperator: {effectiveness: 0.97, zones: 10}\n"
                    "dual_pressure: {intermediate_pressure: 32.85 bar, recirculated_fraction: 0.5}\n")
    assert cli.main(["run", str(path)]) == 3
    assert "temperatures would cross" in capsys.readouterr().err
    with pytest.raises(TemperatureCrossError):
        solve_scenario(parse_scenario({
            "gas": "argon", "ambient_temperature": 160.0, "low_pressure": 1.3e5, "high_pressure": 109.5e5,
            "compressor": {"isothermal_efficiency": 1.0}, "recuperator": {"effectiveness": 0.97, "zones": 10},
            "dual_pressure": {"intermediate_pressure": 32.85e5, "recirculated_fraction": 0.5}}))
