"""Margins: the uncertainty section, its samples, statistics and sensitivity indices.

The check of the statistics is the first-order (delta-method) propagation of the input standard
deviations through finite-difference derivatives (common practice, e.g. the GUM's law of
propagation of uncertainty, JCGM 100:2008, sec. 5.1): for a near-linear output the sampled mean
and standard deviation must agree with it.
"""

import math

import numpy as np
import pandas as pd
import pytest
import yaml

from cycle import api, cli
from cycle.errors import ScenarioError
from cycle.uncertainty import as_sweep, parse_section

DEMO = "scenarios/nitrogen-bench-margins.yaml"


def bench(section, **changes):
    with open("scenarios/nitrogen-bench.yaml", encoding="utf-8") as f:
        data = yaml.safe_load(f)
    data.update(changes)
    data["uncertainty"] = section
    return data


def test_the_same_file_gives_the_same_samples_and_results(tmp_path):
    data = bench({"samples": 12, "seed": 7, "heat_leak": {"uniform": ["4 W", "9 W"]},
                  "compressor.isothermal_efficiency": {"normal": [0.6, "5 %"]}})
    a, sa = api.uncertainty(data, out=tmp_path / "a.csv")
    b, sb = api.uncertainty(data, out=tmp_path / "b.csv")
    pd.testing.assert_frame_equal(a, b)
    assert sa == sb
    # The samples fill the strata of a Latin hypercube: one per twelfth of the uniform range.
    leak = np.sort(a["heat_leak_W"].to_numpy())
    assert np.array_equal(np.floor((leak - 4.0) / 5.0 * 12), np.arange(12))
    other = api.uncertainty(dict(data, uncertainty=dict(data["uncertainty"], seed=8)), out=tmp_path / "c.csv")[0]
    assert not np.array_equal(other["heat_leak_W"], a["heat_leak_W"])


def test_mean_and_sd_agree_with_first_order_propagation(tmp_path):
    # Small spreads around the bench plant: power and work per kg are near-linear there.
    mu = {"heat_leak": 6.0, "compressor.isothermal_efficiency": 0.6}
    sd = {"heat_leak": 0.5, "compressor.isothermal_efficiency": 0.01}
    data = bench({"samples": 128, "seed": 11,
                  "heat_leak": {"normal": [f"{mu['heat_leak']} W", f"{sd['heat_leak']} W"]},
                  "compressor.isothermal_efficiency": {"normal": [mu["compressor.isothermal_efficiency"],
                                                                  sd["compressor.isothermal_efficiency"]]}})
    frame, stats = api.uncertainty(data, out=tmp_path / "d.csv")

    def power(**values):
        point = bench({})
        point.pop("uncertainty")
        point["heat_leak"] = f"{values.get('heat_leak', mu['heat_leak'])} W"
        point["compressor"] = {"isothermal_efficiency": values.get("compressor.isothermal_efficiency",
                                                                    mu["compressor.isothermal_efficiency"])}
        return api.run(api.load(point)).summary()["compressor_power_kW"]

    centre = power()
    variance = 0.0
    for key in mu:
        h = 0.5 * sd[key]
        slope = (power(**{key: mu[key] + h}) - power(**{key: mu[key] - h})) / (2 * h)
        variance += (slope * sd[key]) ** 2
    got = stats["outputs"]["compressor_power_kW"]
    assert got["mean"] == pytest.approx(centre, rel=2e-3)
    # Sampling error of an sd from 128 samples is about 1/sqrt(2 n) = 6 %; the tolerance is 15 %.
    assert got["sd"] == pytest.approx(math.sqrt(variance), rel=0.15)


def test_a_resumed_run_equals_an_uninterrupted_one(tmp_path, capsys):
    data = bench({"samples": 10, "seed": 3, "heat_leak": {"uniform": ["4 W", "9 W"]}})
    path = tmp_path / "m.yaml"
    path.write_text(yaml.safe_dump(data))
    whole, cut = tmp_path / "whole.csv", tmp_path / "cut.csv"
    assert cli.main(["uncertainty", str(path), "--out", str(whole), "--workers", "1"]) == 0
    assert cli.main(["uncertainty", str(path), "--out", str(cut), "--workers", "1"]) == 0
    lines = cut.read_text().splitlines(keepends=True)
    cut.write_text("".join(lines[:6]) + lines[6][:10])  # five rows and a torn sixth, as after a crash
    assert cli.main(["uncertainty", str(path), "--out", str(cut), "--workers", "1"]) == 0
    assert cut.read_bytes() == whole.read_bytes()
    out = capsys.readouterr().out
    assert "10 samples: 10 solved" in out


def test_an_input_without_effect_gets_a_sensitivity_near_zero(tmp_path):
    # The motor efficiency changes the power drawn, never the liquid made.
    with open(DEMO, encoding="utf-8") as f:
        data = yaml.safe_load(f)
    data["uncertainty"]["samples"] = 64
    data["uncertainty"]["compressor.motor_efficiency"] = {"uniform": [0.85, 0.95]}
    frame, stats = api.uncertainty(data, out=tmp_path / "e.csv")
    rho = stats["sensitivity"]
    assert abs(rho["compressor.motor_efficiency"]["liquid_rate_L_per_h"]) < 2 / math.sqrt(64)
    assert rho["recuperator.ua"]["liquid_rate_L_per_h"] > 0.9  # the UA drives the liquid rate
    assert rho["compressor.motor_efficiency"]["compressor_power_kW"] < -0.5


def test_the_demo_states_its_margin(tmp_path):
    frame, stats = api.uncertainty(DEMO, out=tmp_path / "f.csv")
    assert stats["samples"] == 200 and stats["solved"] == 200
    made = frame["liquid_rate_L_per_h"]
    assert stats["probability_of_target"] == pytest.approx((made >= 10.0).mean(), abs=1e-12)
    assert 0.5 < stats["probability_of_target"] < 1.0  # measured: 90 %
    p = stats["probability_of_target"]  # binomial standard error of a share of 200
    assert stats["probability_of_target_standard_error"] == pytest.approx(math.sqrt(p * (1 - p) / 200), rel=1e-12)
    s = stats["outputs"]["liquid_rate_L_per_h"]
    assert s["p5"] < s["p50"] < s["p95"] and s["p50"] == pytest.approx(np.median(made), rel=1e-12)
    assert "compressor_flow_kg_per_h" not in stats["outputs"]  # the flow is fixed


def test_a_liquid_rate_target_gives_the_flow_for_confidence(tmp_path):
    data = bench({"samples": 20, "seed": 5, "target": "10 L/h", "heat_leak": {"uniform": ["4 W", "12 W"]},
                  "recuperator.effectiveness": {"triangular": [0.96, 0.975, 0.98]}})
    frame, stats = api.uncertainty(data, out=tmp_path / "g.csv")
    flows = stats["flow_for_confidence"]["compressor_flow_kg_per_h"]
    assert flows["90"] == pytest.approx(np.quantile(frame["compressor_flow_kg_per_h"], 0.9), rel=1e-12)
    assert flows["90"] <= flows["95"]
    assert stats["main_output"] == "compressor_flow_kg_per_h"
    # The liquid rate is the scenario's own production: no spread, no row, and the target not used.
    assert "liquid_rate_L_per_h" not in stats["outputs"] and "probability_of_target" not in stats
    assert any(n.startswith("uncertainty.target is not used: production.liquid_rate") for n in stats["notes"])


def test_without_production_the_yield_is_the_main_output():
    data = bench({"target": "10 L/h", "recuperator.effectiveness": {"uniform": [0.96, 0.98]}})
    del data["production"], data["heat_leak"]
    *_, notes = as_sweep(data)
    assert notes == ["uncertainty.target is not used: the scenario has no production section, so the samples give "
                     "yields, not liquid rates (give production.compressor_flow to rate a plant)"]


def test_mass_outside_a_keys_range_is_cut_and_said(tmp_path):
    data = bench({"samples": 16, "recuperator.effectiveness": {"normal": [0.99, "2 %"]}})
    mapping, inputs, drawn, _, notes = as_sweep(data)
    assert max(row[0] for row in drawn) <= 1.0
    assert len(notes) == 1 and notes[0].startswith("uncertainty.recuperator.effectiveness: normal, mean 0.99, sd 2 %")
    assert "of its mass outside the values the key can take; sampled truncated to them" in notes[0]
    z = (1.0 - 0.99) / (0.02 * 0.99)  # the mass above an effectiveness of 1: P(Z > z)
    assert inputs[0].cut == pytest.approx(0.5 * math.erfc(z / math.sqrt(2.0)), rel=1e-9)


@pytest.mark.parametrize("section, message", [
    ({"heat_leak": {"beta": [1, 2]}}, "uncertainty.heat_leak must be one distribution"),
    ({"heat_leak": {"normal": ["6 W", "0 W"]}}, "uncertainty.heat_leak.normal: the standard deviation must be above 0"),
    ({"heat_leak": {"uniform": ["9 W", "4 W"]}}, "uncertainty.heat_leak.uniform: low must be below high"),
    ({"heat_leak": {"uniform": ["4 K", "9 K"]}}, "uncertainty.heat_leak.uniform:"),
    ({"heat_leak": {"triangular": ["4 W", "10 W", "9 W"]}}, "uncertainty.heat_leak.triangular: the mode must lie"),
    ({"gas": {"uniform": [1, 2]}}, "uncertainty.gas: only a quantity or a plain number can be uncertain"),
    ({"heat_lek": {"uniform": ["4 W", "9 W"]}}, "uncertainty.heat_lek: not a scenario key; did you mean heat_leak?"),
    ({"samples": 1, "heat_leak": {"uniform": ["4 W", "9 W"]}}, "uncertainty.samples must be a whole number from 2"),
    ({"samples": 10}, "uncertainty names no uncertain key"),
    ({"heat_leak": {"uniform": ["-9 W", "-4 W"]}}, "uncertainty.heat_leak: the distribution uniform from -9 W to -4 W lies wholly"),
])
def test_bad_sections_are_refused_in_one_line(section, message):
    with pytest.raises(ScenarioError) as info:
        parse_section(section)
    assert str(info.value).startswith(message) and "\n" not in str(info.value)


def test_the_cli_json_and_a_file_without_the_section(tmp_path, capsys):
    import json

    data = bench({"samples": 6, "heat_leak": {"uniform": ["4 W", "9 W"]}})
    path = tmp_path / "m.yaml"
    path.write_text(yaml.safe_dump(data))
    assert cli.main(["uncertainty", str(path), "--out", str(tmp_path / "h.csv"), "--workers", "1", "--json"]) == 0
    stats = json.loads(capsys.readouterr().out)
    assert stats["samples"] == 6 and "heat_leak" in stats["sensitivity"]
    assert stats["sensitivity_method"].startswith("Spearman")
    assert cli.main(["uncertainty", "scenarios/nitrogen-bench.yaml", "--out", str(tmp_path / "i.csv")]) == 2
    assert "the scenario has no uncertainty section" in capsys.readouterr().err
    # Other commands set the section aside, and run says so.
    capsys.readouterr()
    assert cli.main(["run", str(path)]) == 0
    assert ("run solves the scenario without its uncertainty section; use lhsim uncertainty for the samples"
            in capsys.readouterr().err)


def test_the_pictures_and_the_report_section(tmp_path, capsys):
    from cycle.plots import uncertainty_data

    data = bench({"samples": 8, "heat_leak": {"uniform": ["4 W", "9 W"]}}, production={"compressor_flow": "140 kg/h"})
    data["uncertainty"]["target"] = "10 L/h"
    path = tmp_path / "m.yaml"
    path.write_text(yaml.safe_dump(data))
    results = tmp_path / "m.csv"
    assert cli.main(["uncertainty", str(path), "--out", str(results), "--workers", "1"]) == 0
    assert cli.main(["plot", str(results), "--uncertainty"]) == 0
    assert (tmp_path / "m-uncertainty.png").stat().st_size > 10_000
    frame, stats = api.uncertainty(data, out=results)
    drawn = uncertainty_data(frame, stats)
    assert drawn["output"] == "liquid_rate_L_per_h" and len(drawn["values"]) == 8
    assert any(label.startswith("target 10 L/h") and abs(x - 10.0) < 1e-9 for label, x in drawn["marks"])
    assert [k for k, _ in drawn["bars"]] == ["heat_leak"] and drawn["bars"][0][1] < -0.9
    # Without its statistics file a results file cannot be drawn this way: said in one line.
    (tmp_path / "m.csv.uncertainty.json").unlink()
    assert cli.main(["plot", str(results), "--uncertainty"]) == 2
    assert "make it with lhsim uncertainty" in capsys.readouterr().err
    report = tmp_path / "r.html"
    assert cli.main(["report", str(path), "--out", str(report)]) == 0
    text = report.read_text()
    assert "<h2>Margins</h2>" in text and "Probability of making at least 10 L/h" in text
    assert "Spearman" in text and "uniform from 4 W to 9 W" in text
    assert "<h2>Margins</h2>" not in (lambda out: (cli.main(["report", "scenarios/nitrogen-bench.yaml", "--out",
                                                              str(out)]), out.read_text())[1])(tmp_path / "n.html")


def test_an_invalid_sample_refuses_the_run_before_any_solves(tmp_path):
    data = bench({"samples": 8, "high_pressure": {"uniform": ["0.5 bar", "3 bar"]}})
    # The first sample (of 0.5 to 3 bar) already leaves no room for the aftercooler's 0.4 bar drop.
    with pytest.raises(ScenarioError, match=r"^uncertainty sample 0 \(high_pressure = '[0-9.]+ bar'\) is invalid: "
                                            r"aftercooler.pressure_drop must be 0 or more and below high_pressure"):
        api.uncertainty(data, out=tmp_path / "x.csv")
    assert not (tmp_path / "x.csv").exists()


def test_every_key_of_the_statistics_is_in_the_glossary(tmp_path):
    import pathlib

    glossary = (pathlib.Path(__file__).resolve().parents[1] / "docs" / "glossary.md").read_text()
    rated = bench({"samples": 4, "target": "10 L/h", "heat_leak": {"uniform": ["4 W", "9 W"]}},
                  production={"compressor_flow": "140 kg/h"})
    sized = bench({"samples": 4, "heat_leak": {"uniform": ["4 W", "9 W"]}})
    keys = set()
    for k, data in enumerate((rated, sized)):
        _, stats = api.uncertainty(data, out=tmp_path / f"{k}.csv")
        keys |= set(stats) | set(stats["outputs"]) | {s for v in stats["outputs"].values() for s in v}
        keys |= set(stats.get("flow_for_confidence", {}))
    for key in sorted(keys):
        assert f"`{key}`" in glossary, key
