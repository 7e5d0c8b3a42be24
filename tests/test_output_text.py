"""The design point reads as numbers: widths, signs, labels and words of our own."""

import json
import re

import pytest

from cycle import cli
from cycle.flowsheet import solve_scenario
from cycle.report import CRITICAL_NONE, STATE_COLUMNS, UA_UNBOUNDED, format_result, format_states, number
from cycle.scenario import load_scenario, parse_scenario
from properties import get_fluid

DEMOS = ["nitrogen-bench", "argon-unit", "methane-unit", "hydrogen-ln2-precooled", "neon-cryocooler-precooled",
         "air-dual-pressure"]


@pytest.fixture(scope="module")
def demos():
    return {name: solve_scenario(load_scenario(f"scenarios/{name}.yaml")) for name in DEMOS}


def precooled_near_boiling():
    # Precooled to 110 K at 200 bar, nitrogen throttled to 1 atm is already two-phase with no
    # cold recuperator at all: its critical effectiveness is below zero.
    return solve_scenario(parse_scenario({
        "gas": "nitrogen", "low_pressure": "1 atm", "high_pressure": "200 bar",
        "compressor": {"isothermal_efficiency": 0.6}, "recuperator": {"effectiveness": 0.9},
        "precooling": {"temperature": "110 K", "refrigerator_carnot_fraction": 0.3}}))


def test_a_critical_effectiveness_below_zero_reads_none_needed_and_is_null():
    result = precooled_near_boiling()
    assert result.recuperators["cold_recuperator"].critical_effectiveness < 0
    assert result.summary()["cold_recuperator_critical_effectiveness"] is None
    line = next(l for l in format_result(result).splitlines() if "critical effectiveness" in l)
    assert line.strip().endswith(CRITICAL_NONE)
    # The warm recuperator does not decide whether liquid forms: no such row at all.
    warm = format_result(result).split("Warm recuperator")[1].split("\n\n")[0]
    assert "critical effectiveness" not in warm


@pytest.mark.parametrize("value, fmt, text", [(-1e-12, "{:.1f}", "0.0"), (-0.04, "{:.1f}", "0.0"),
                                              (-0.05001, "{:.1f}", "-0.1"), (-3e-20, "{:.1e}", "-3.0e-20"),
                                              (0.0, "{:.2f}", "0.00"), (None, "{:.2f}", "-"),
                                              (float("nan"), "{:.2f}", "-")])
def test_numbers_that_round_to_zero_have_no_sign(value, fmt, text):
    assert number(value, fmt) == text


def test_no_negative_zero_anywhere_in_the_demos(demos):
    for result in demos.values():
        assert not re.search(r"-0\.0*(?![0-9e])", format_result(result))


def test_the_state_table_fits_100_columns_with_one_precision_per_column(demos):
    for name, result in demos.items():
        text = format_result(result)
        assert max(len(line) for line in text.splitlines()) <= 100, name
        table = format_states(result).splitlines()
        head = table[0]
        assert head.split()[:2] == ["#", "stream"]
        rows = [line for line in table[1:] if line[:2].strip()]
        assert len(rows) == len(result.states)
        for row, state in zip(rows, result.state_rows()):
            assert row[3:].startswith(state["stream"][:10])  # names left-aligned after the number
        decimals = {"T [K]": 2, "p [bar]": 3, "h [kJ/kg]": 2, "s [kJ/kg K]": 4, "flow [-]": 4, "flow [kg/h]": 3}
        for heading, _, fmt in STATE_COLUMNS:
            if heading in decimals:
                assert fmt == "{:." + str(decimals[heading]) + "f}"
        for state, line in zip(result.state_rows(), rows):  # the pressure cell as the column prints it
            assert f" {state['pressure_bar']:.3f} " in line


def test_the_isothermal_outlet_is_not_called_a_discharge(demos):
    names = [s.name for s in demos["nitrogen-bench"].states]
    assert "compressor outlet (isothermal model: cooled in the machine)" in names
    assert not any("discharge" in n for n in names)
    staged = [s.name for s in demos["argon-unit"].states]  # a staged compressor has real discharges
    assert "compressor discharge" in staged


def test_one_spelling_make_up(demos, capsys):
    for result in demos.values():
        assert "makeup" not in format_result(result).lower()
        assert "makeup" not in json.dumps(result.to_dict(), default=str).lower()
    assert "make-up mixing" in format_result(demos["nitrogen-bench"])


@pytest.mark.parametrize("gas, T, p, phase", [
    ("nitrogen", 300.0, 1e5, "gas"),                    # above its critical temperature (126.2 K)
    ("nitrogen", 100.0, 1e5, "vapour"),                 # below it, below the saturation pressure
    ("nitrogen", 70.0, 1e5, "liquid"),
    ("nitrogen", 300.0, 200e5, "supercritical fluid"),  # above the critical point (33.96 bar)
    ("nitrogen", 100.0, 200e5, "compressed liquid"),    # above the critical pressure, below Tc
])
def test_phase_names_are_plain_words(gas, T, p, phase):
    # Critical point of nitrogen 126.19 K, 33.96 bar (NIST Chemistry WebBook, from memory).
    assert get_fluid(gas).state_tp(T, p).phase == phase


def test_saturated_states_are_named_so(demos):
    by = {s.name: s.state for s in demos["nitrogen-bench"].states}
    assert by["liquid product"].phase == "saturated liquid"
    assert by["separator vapour, recuperator low-pressure inlet"].phase == "saturated vapour"
    assert by["valve outlet, separator inlet"].phase == "two-phase"


def test_unbounded_ua_reads_as_such():
    result = solve_scenario(parse_scenario({
        "gas": "nitrogen", "low_pressure": "1 atm", "high_pressure": "200 bar",
        "compressor": {"isothermal_efficiency": 1.0}, "recuperator": {"effectiveness": 1.0, "zones": 20},
        "production": {"compressor_flow": "10 kg/h"}}))
    assert result.summary()["recuperator_UA_W_per_K"] is None
    text = format_result(result)
    assert text.count(UA_UNBOUNDED) == 2  # per unit flow, and the total


def test_cli_text_lines_fit_and_the_caution_is_there(capsys):
    assert cli.main(["run", "scenarios/hydrogen-ln2-precooled.yaml"]) == 0
    out = capsys.readouterr().out
    assert max(len(line) for line in out.splitlines()) <= 100
    assert "Caution: high pressure" in out and "local codes" in out
