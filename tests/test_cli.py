"""The command line: output contract, exit codes, one-line errors, cautions in --help.

Most tests call ``cycle.cli.main`` in-process (CoolProp costs ~2.5 s to import per
process); two run the real console entry point in a subprocess.
"""

import json
import subprocess
import sys

import pytest

from cycle import cli

NITROGEN = "scenarios/nitrogen-bench.yaml"

SUMMARY_KEYS = {
    "liquid_yield", "work_kJ_per_kg_compressed", "work_kJ_per_kg_liquid", "ideal_work_kJ_per_kg_liquid",
    "figure_of_merit", "recuperator_min_approach_K", "throttle_outlet_temperature_K",
}
PRODUCTION_KEYS = {
    "compressor_flow_kg_per_h", "liquid_rate_kg_per_h", "liquid_rate_L_per_h", "compressor_power_kW",
    "recuperator_duty_kW", "recuperator_UA_W_per_K",
}


def run(capsys, *argv):
    code = cli.main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_run_json_contract(capsys):
    code, out, err = run(capsys, "run", NITROGEN, "--json")
    assert code == 0 and err == ""
    data = json.loads(out)  # stdout holds exactly one JSON object
    assert {"scenario", "summary", "states", "warnings"} <= set(data)
    assert SUMMARY_KEYS | PRODUCTION_KEYS <= set(data["summary"])
    summary = data["summary"]
    assert summary["liquid_rate_L_per_h"] == pytest.approx(10.0, rel=1e-9)  # the scenario's target
    assert 0 < summary["liquid_yield"] < 0.1
    assert summary["figure_of_merit"] == pytest.approx(
        summary["ideal_work_kJ_per_kg_liquid"] / summary["work_kJ_per_kg_liquid"], rel=1e-12)
    assert data["scenario"]["gas"] == "Nitrogen"
    assert data["scenario"]["high_pressure"] == pytest.approx(200e5)
    numbers = [row["number"] for row in data["states"]]
    assert numbers == list(range(1, len(numbers) + 1))
    assert {"temperature_K", "pressure_bar", "enthalpy_kJ_per_kg", "quality", "phase"} <= set(data["states"][0])


def test_run_text_shows_the_numbers_and_a_caution(capsys):
    code, out, _ = run(capsys, "run", NITROGEN)
    assert code == 0
    data = json.loads(run(capsys, "run", NITROGEN, "--json")[1])
    assert f"{data['summary']['liquid_yield']:.5f}" in out
    assert f"{data['summary']['compressor_power_kW']:.3f}" in out
    assert "liquid product" in out and "Caution" in out


def test_invalid_scenario_exits_2_with_one_line(capsys, tmp_path):
    path = tmp_path / "bad.yaml"
    path.write_text("gas: nitrogen\nlow_pressure: 1 bar\nhigh_pressure: 200 K\n"
                    "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.95}\n")
    code, out, err = run(capsys, "run", str(path), "--json")
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "high_pressure" in err and "Traceback" not in err


@pytest.mark.parametrize("gas", ["hydrogen", "neon", "helium"])
def test_no_liquid_exits_3_and_names_precooling(capsys, tmp_path, gas):
    path = tmp_path / "h2.yaml"
    path.write_text(f"gas: {gas}\nlow_pressure: 1.2 bar\nhigh_pressure: 150 bar\n"
                    "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.99}\n")
    code, out, err = run(capsys, "run", str(path))
    assert code == 3 and out == ""
    assert "precooling" in err and "maximum inversion temperature" in err


def test_effectiveness_below_critical_exits_3(capsys, tmp_path):
    path = tmp_path / "weak.yaml"
    path.write_text("gas: nitrogen\nlow_pressure: 1 bar\nhigh_pressure: 100 bar\n"
                    "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.8}\n")
    code, _, err = run(capsys, "run", str(path))
    assert code == 3 and "below the critical value" in err


def test_gas_json(capsys):
    code, out, err = run(capsys, "gas", "nitrogen", "--temperature", "300 K", "--pressure", "1 bar", "--json")
    assert code == 0 and err == ""
    data = json.loads(out)
    # N2 at 300 K, 1 bar: mu_JT about 0.21-0.22 K/bar (handbook, from memory); 77.24 K boiling
    # at 1 bar (Span et al. 2000 via CoolProp); maximum inversion near 620 K (Barron, from memory).
    assert data["jt_coefficient_K_per_bar"] == pytest.approx(0.215, rel=0.04)
    assert data["saturation_temperature_K"] == pytest.approx(77.24, abs=0.01)
    assert data["max_inversion_temperature_K"] == pytest.approx(621, rel=0.03)
    assert len(data["inversion_temperatures_K"]) >= 1


def test_gas_above_critical_pressure_has_null_saturation(capsys):
    code, out, _ = run(capsys, "gas", "N2", "-T", "27 degC", "-p", "50 bar", "--json")
    assert code == 0 and json.loads(out)["saturation_temperature_K"] is None


def test_gas_text_and_errors(capsys):
    code, out, _ = run(capsys, "gas", "argon", "-T", "300 K", "-p", "1 bar")
    assert code == 0 and "Joule-Thomson coefficient" in out and "K/bar" in out
    code, out, err = run(capsys, "gas", "argon", "-T", "300 bar", "-p", "1 bar")
    assert code == 2 and "--temperature" in err and "expected a temperature" in err and out == ""
    code, _, err = run(capsys, "gas", "kryptonite", "-T", "300 K", "-p", "1 bar")
    assert code == 2 and "did you mean" in err
    code, _, err = run(capsys, "gas", "nitrogen", "-T", "60 K", "-p", "200 bar")
    assert code == 2 and "melting" in err and err.count("\n") == 1


def help_text(capsys, argv):
    with pytest.raises(SystemExit) as info:
        cli.main(argv)
    assert info.value.code == 0
    return capsys.readouterr().out


def test_top_level_help_carries_the_cautions_once(capsys):
    from cycle.safety import CAUTIONS

    out = help_text(capsys, ["--help"])
    assert out.count(CAUTIONS) == 1
    for word in ("high", "pressure", "cryogenic", "oxygen deficiency", "enrichment", "flammable", "local codes"):
        assert word in out


@pytest.mark.parametrize("command", ["run", "report", "plot", "sweep", "compare", "optimize", "gas"])
def test_each_command_help_points_to_the_cautions_in_one_line(capsys, command):
    from cycle.safety import CAUTIONS

    out = help_text(capsys, [command, "--help"])
    assert CAUTIONS.splitlines()[0] not in out  # the paragraph is not repeated
    pointer = [line for line in out.splitlines() if line.startswith("safety:")]
    assert pointer == [cli.SAFETY_POINTER]
    for word in ("high pressure", "cryogenic", "oxygen deficiency", "enrichment", "flammable", "lhsim --help"):
        assert word in pointer[0]


def test_version(capsys):
    from cycle import __version__

    assert help_text(capsys, ["--version"]) == f"lhsim {__version__}\n"


def test_console_entry_point_in_a_real_process(tmp_path):
    ok = subprocess.run([sys.executable, "-m", "cycle.cli", "run", "scenarios/methane-unit.yaml", "--json"],
                        capture_output=True, text=True, timeout=120)
    assert ok.returncode == 0, ok.stderr
    assert json.loads(ok.stdout)["summary"]["compressor_flow_kg_per_h"] == pytest.approx(60.0)
    bad = tmp_path / "bad.yaml"
    bad.write_text("gas: nitrogen\nlow_pressure: 1 bar\n")
    fail = subprocess.run([sys.executable, "-m", "cycle.cli", "run", str(bad)],
                          capture_output=True, text=True, timeout=120)
    assert fail.returncode == 2 and fail.stdout == ""
    assert fail.stderr.strip() == "lhsim: error: missing high_pressure: expected a pressure such as '200 bar'"


def test_help_imports_no_heavy_library():
    code = ("import sys; from cycle import cli\n"
            "try:\n    cli.main(['--help'])\nexcept SystemExit:\n    pass\n"
            "heavy = [m for m in ('CoolProp', 'pandas', 'matplotlib', 'dask', 'scipy') if m in sys.modules]\n"
            "print('HEAVY=' + ','.join(heavy))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0
    assert out.stdout.strip().splitlines()[-1] == "HEAVY="


def test_gas_without_a_maximum_inversion_temperature_in_range(capsys):
    # R134a: T dB/dT - B has no root below three times CoolProp's upper temperature.
    code, out, _ = run(capsys, "gas", "R134a", "-T", "300 K", "-p", "1 bar", "--json")
    assert code == 0 and json.loads(out)["max_inversion_temperature_K"] is None


# -- saturated states by quality -----------------------------------------------------------

def gas_json(capsys, *argv):
    code, out, err = run(capsys, "gas", *argv, "--json")
    assert code == 0 and err == "", err
    return json.loads(out)


def test_gas_saturated_state_by_pressure_and_quality(capsys):
    liquid = gas_json(capsys, "nitrogen", "-p", "1 atm", "--quality", "0")
    vapour = gas_json(capsys, "nitrogen", "-p", "1 atm", "--quality", "1")
    half = gas_json(capsys, "nitrogen", "-p", "1 atm", "--quality", "0.5")
    # Nitrogen at 1 atm: normal boiling point 77.355 K, saturated liquid 806.08 kg/m3, latent heat
    # 199.2 kJ/kg (NIST Chemistry WebBook, fluid properties, from the Span et al. 2000 equation of
    # state that CoolProp implements; density and latent heat from memory). Tolerances: the
    # printed digits of the source.
    assert liquid["temperature_K"] == pytest.approx(77.355, abs=0.001)
    assert liquid["density_kg_per_m3"] == pytest.approx(806.08, abs=0.05)
    assert vapour["enthalpy_kJ_per_kg"] - liquid["enthalpy_kJ_per_kg"] == pytest.approx(199.2, abs=0.1)
    assert liquid["phase"] == "saturated liquid" and vapour["phase"] == "saturated vapour"
    assert half["phase"] == "two-phase" and half["quality"] == 0.5
    # The lever rule: h at x = 0.5 is the mean of the saturated ends (a law, to round-off).
    assert half["enthalpy_kJ_per_kg"] == pytest.approx(
        0.5 * (liquid["enthalpy_kJ_per_kg"] + vapour["enthalpy_kJ_per_kg"]), rel=1e-9)


def test_gas_saturated_state_by_temperature_and_quality(capsys):
    state = gas_json(capsys, "argon", "-T", "87.302 K", "-x", "25 %")
    # Argon's normal boiling point is 87.302 K at 1.01325 bar (NIST Chemistry WebBook, Tegeler
    # et al. 1999 equation of state; from memory): the saturation pressure found from T.
    assert state["pressure_bar"] == pytest.approx(1.01325, rel=2e-5)
    assert state["quality"] == 0.25 and state["saturation_temperature_K"] == pytest.approx(87.302, abs=1e-6)


def test_two_phase_joule_thomson_coefficient_is_the_slope_of_the_saturation_line(capsys):
    from properties import get_fluid

    # Inside the dome T follows the saturation line, so (dT/dp)_h = dT_sat/dp (Clausius-
    # Clapeyron); checked against a central difference of CoolProp's saturation temperature,
    # whose truncation error at +-0.01 bar is far below the 1e-5 tolerance.
    state = gas_json(capsys, "nitrogen", "-p", "2 bar", "-x", "0.3")
    fluid = get_fluid("nitrogen")
    slope = (fluid.saturation_temperature(2.01e5) - fluid.saturation_temperature(1.99e5)) / 0.02  # K/bar
    assert state["jt_coefficient_K_per_bar"] == pytest.approx(slope, rel=1e-5)
    code, out, _ = run(capsys, "gas", "nitrogen", "-p", "2 bar", "-x", "0.3")
    assert code == 0 and "(two-phase, quality 0.3)" in out and "Joule-Thomson coefficient (dT_sat/dp)" in out


@pytest.mark.parametrize("argv, message", [
    (["-p", "40 bar", "-x", "0.5"], "--pressure with --quality: Nitrogen: no state at quality 0.5, p = 40 bar: no "
                                    "saturation at or above the critical pressure 33.958 bar"),
    (["-T", "130 K", "-x", "1"], "--temperature with --quality: Nitrogen: no state at quality 1.0, T = 130 K: no "
                                 "saturation at or above the critical temperature 126.192 K"),
    (["-T", "50 K", "-x", "0"], "no liquid below the triple-point temperature 63.151 K"),
    (["-x", "0.5"], "--quality needs one of --temperature or --pressure (a saturated state is fixed by either), "
                    "got neither"),
    (["-T", "80 K", "-p", "1 bar", "-x", "0.5"], "--quality needs one of --temperature or --pressure (a saturated "
                                                 "state is fixed by either), got both"),
    (["-p", "1 bar", "-x", "1.5"], "--quality must be from 0 (saturated liquid) to 1 (saturated vapour), got 1.5"),
    (["-p", "1 bar", "-x", "half"], "--quality: expected a number followed by a unit, got 'half'"),
    (["-T", "300 K"], "give --temperature and --pressure, or one of them with --quality; missing --pressure"),
])
def test_gas_quality_errors(capsys, argv, message):
    code, out, err = run(capsys, "gas", "nitrogen", *argv)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert err.startswith("lhsim: error: ") and message in err
