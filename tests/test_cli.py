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


@pytest.mark.parametrize("argv", [["--help"], ["run", "--help"], ["gas", "--help"]])
def test_help_carries_the_cautions(capsys, argv):
    with pytest.raises(SystemExit) as info:
        cli.main(argv)
    assert info.value.code == 0
    out = capsys.readouterr().out
    for word in ("high", "pressure", "cryogenic", "oxygen deficiency", "enrichment", "flammable", "local codes"):
        assert word in out


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
