"""Sweeps, resumable results files, parallel and Dask runs, gas comparison and optimisation."""

import csv
import json
import os
import signal
import subprocess
import sys
import time

import numpy as np
import pytest

from cycle import api, cli
from cycle.errors import ScenarioError
from cycle.studies import compare, optimize
from cycle.sweep import expand, run_point, run_sweep
from properties import get_fluid

BASE = {
    "gas": "nitrogen", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
    "compressor": {"isothermal_efficiency": 0.6},
    "recuperator": {"effectiveness": 0.97, "zones": 10},
    "production": {"liquid_rate": "10 L/h"}, "heat_leak": "5 W",
}


def with_sweep(**sweep):
    return dict(BASE, sweep=sweep)


def read(path):
    with open(path, newline="") as handle:
        return list(csv.DictReader(handle))


# -- points ---------------------------------------------------------------------------------

def test_grid_zip_and_ranges():
    keys, points = expand(with_sweep(high_pressure={"from": "100 bar", "to": "300 bar", "steps": 3},
                                     gas=["nitrogen", "argon"]))
    assert keys == ["high_pressure", "gas"] and len(points) == 6
    assert [p[1]["high_pressure"] for p in points[::2]] == pytest.approx([100e5, 200e5, 300e5])
    assert points[1][1]["gas"] == "argon" and points[0][1]["recuperator"]["effectiveness"] == 0.97
    _, zipped = expand(with_sweep(mode="zip", high_pressure=["100 bar", "200 bar"],
                                  **{"recuperator.effectiveness": [0.9, 0.95]}))
    assert len(zipped) == 2 and zipped[1][1]["recuperator"]["effectiveness"] == 0.95
    _, logs = expand(with_sweep(heat_leak={"from": "1 W", "to": "100 W", "steps": 3, "spacing": "log"}))
    assert [p[1]["heat_leak"] for p in logs] == pytest.approx([1.0, 10.0, 100.0])
    _, nested = expand(with_sweep(**{"aftercooler.outlet_temperature": ["305 K"]}))
    assert nested[0][1]["aftercooler"] == {"outlet_temperature": "305 K"}


@pytest.mark.parametrize("sweep, message", [
    ({"recuperator.effectiveness": [0.9, 1.4]},
     "sweep point 1 (recuperator.effectiveness = 1.4) is invalid: recuperator.effectiveness must be above 0 and at most 1, got 1.4"),
    ({"recuperator.efectiveness": [0.9]}, "sweep.recuperator.efectiveness: not a scenario key; did you mean recuperator.effectiveness?"),
    ({"high_pressure": ["200 K"]}, "sweep point 0 (high_pressure = '200 K') is invalid: high_pressure: expected a pressure"),
    ({"mode": "zip", "high_pressure": ["100 bar", "200 bar"], "gas": ["argon"]}, "sweep.mode zip needs lists of one length"),
    ({"high_pressure": {"from": "100 bar", "to": "200 bar"}}, "a range needs from, to and steps, missing steps"),
    ({"high_pressure": {"from": "100 bar", "to": "200 bar", "steps": 3, "spacing": "cubic"}}, "spacing must be linear or log"),
    ({"high_pressure": "200 bar"}, "sweep.high_pressure must be a list of values or a range"),
    ({"recuperator": [1]}, "a section cannot be swept"),
    ({"gas": {"from": 1, "to": 2, "steps": 2}}, "a range needs a numeric key"),
    ({}, "sweep must map scenario keys"),
])
def test_invalid_sweeps_are_refused_before_any_point_runs(sweep, message, tmp_path):
    out = tmp_path / "r.csv"
    with pytest.raises(ScenarioError) as info:
        run_sweep(with_sweep(**sweep), out)
    assert message in str(info.value) and "\n" not in str(info.value)
    assert not out.exists()


def test_point_statuses(monkeypatch):
    assert run_point(dict(BASE))[0] == "ok"
    status, message, summary = run_point(dict(BASE, gas="hydrogen"))
    assert status == "no-liquid" and "precooling" in message and summary == {}
    assert run_point(dict(BASE, low_pressure="40 bar", high_pressure="200 bar"))[0] == "invalid"

    import cycle.flowsheet

    def broken(scenario, **options):
        raise RuntimeError("solver fell over")

    monkeypatch.setattr(cycle.flowsheet, "solve_scenario", broken)
    assert run_point(dict(BASE)) == ("failed", "RuntimeError: solver fell over", {})


# -- the results file -------------------------------------------------------------------

SWEEP = with_sweep(high_pressure={"from": "60 bar", "to": "260 bar", "steps": 6}, gas=["nitrogen", "hydrogen"])


def test_sweep_file_columns_and_values(tmp_path):
    out = tmp_path / "r.csv"
    outcome = run_sweep(SWEEP, out, workers=1)
    rows = read(out)
    assert outcome == {"points": 12, "computed": 12, "no_liquid": 6, "failed": 0, "path": str(out)}
    assert [int(r["point"]) for r in rows] == list(range(12))
    assert list(rows[0])[:5] == ["point", "high_pressure_bar", "gas", "status", "message"]
    # Swept pressures in bar, the unit in the column name, as the summary keys carry theirs:
    # 60 to 260 bar in 6 steps is 40 bar apart.
    assert [float(r["high_pressure_bar"]) for r in rows[::2]] == pytest.approx([60, 100, 140, 180, 220, 260],
                                                                              rel=1e-12)
    by_gas = {g: [r for r in rows if r["gas"] == g] for g in ("nitrogen", "hydrogen")}
    assert {r["status"] for r in by_gas["hydrogen"]} == {"no-liquid"}
    assert all(r["liquid_yield"] == "" and "precooling" in r["message"] for r in by_gas["hydrogen"])
    one = api.run(dict(BASE, high_pressure=f"{rows[4]['high_pressure_bar']} bar"))
    assert float(rows[4]["liquid_yield"]) == one.summary()["liquid_yield"]  # exact: the same solve
    assert float(rows[4]["liquid_rate_L_per_h"]) == pytest.approx(10.0)


def test_rerun_computes_only_missing_points_and_drops_a_cut_line(tmp_path):
    full = tmp_path / "full.csv"
    run_sweep(SWEEP, full, workers=1)
    part = tmp_path / "part.csv"
    run_sweep(SWEEP, part, workers=1)
    text = part.read_bytes()
    lines = text.split(b"\n")
    cut = b"\n".join(lines[:5]) + b"\n" + lines[5][: len(lines[5]) // 2]  # header, 4 rows, half a row
    part.write_bytes(cut)
    outcome = run_sweep(SWEEP, part, workers=1)
    assert outcome["computed"] == 8
    assert part.read_bytes() == full.read_bytes()


@pytest.mark.parametrize("key, values, column, expected", [
    ("ambient_temperature", ["27 degC", "310 K"], "ambient_temperature_K", [300.15, 310.0]),
    ("recuperator.min_approach", ["2 K", "9 degF"], "recuperator.min_approach_K", [2.0, 5.0]),
    ("heat_leak", ["5 W", "0.01 kW"], "heat_leak_W", [5.0, 10.0]),
    ("production.liquid_rate", ["10 L/h", "0.5 L/min"], "production.liquid_rate_L_per_h", [10.0, 30.0]),
    ("production.liquid_rate", ["8 kg/h", "0.002 kg/s"], "production.liquid_rate_kg_per_h", [8.0, 7.2]),
    ("production.compressor_flow", ["0.05 kg/s"], "production.compressor_flow_kg_per_h", [180.0]),
    ("aftercooler.pressure_drop", ["40 kPa"], "aftercooler.pressure_drop_bar", [0.4]),
    ("recuperator.zones", [10, 20], "recuperator.zones", [10, 20]),
])
def test_swept_columns_carry_the_unit_of_the_summary_keys(tmp_path, key, values, column, expected):
    from cycle.sweep import expand, validate, column_dimensions, columns_for

    data = dict(BASE, recuperator={"min_approach": "3 K", "zones": 10}, sweep={key: values})
    if key == "production.compressor_flow":
        data["production"] = {}  # one production target at a time
    keys, points = expand(data)
    dims = column_dimensions(keys, points)
    columns = columns_for(keys, validate(keys, points), dims)
    assert columns[1] == column and columns.count(column) == 1  # heat_leak_W is written once
    out = tmp_path / "r.csv"
    run_sweep(data, out, workers=1)
    assert [float(r[column]) for r in read(out)] == pytest.approx(expected, rel=1e-12)


def test_a_column_has_one_unit():
    with pytest.raises(ScenarioError) as info:
        run_sweep(with_sweep(**{"production.liquid_rate": ["10 L/h", "8 kg/h"]}), "unused.csv")
    assert str(info.value) == ("sweep.production.liquid_rate: give every value as a volume flow or every value "
                               "as a mass flow (a column has one unit), got '10 L/h' and '8 kg/h'")


def test_a_results_file_of_the_previous_format_is_refused_clearly(tmp_path):
    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    meta = json.loads((tmp_path / "r.csv.lhsim.json").read_text())
    assert meta["format"] == 2
    # What format 1 wrote: the same scenario's fingerprint, swept keys under their bare names in SI.
    old = dict(meta, columns=[c.replace("high_pressure_bar", "high_pressure") for c in meta["columns"]])
    del old["format"]
    (tmp_path / "r.csv.lhsim.json").write_text(json.dumps(old))
    with pytest.raises(ScenarioError) as info:
        run_sweep(SWEEP, out, workers=1)
    assert str(info.value) == (f"{out} was written by an older lhsim (results format 1: swept keys in SI, no unit "
                               f"in their column names); give --overwrite to compute it again in format 2, or "
                               f"choose another --out")
    assert run_sweep(SWEEP, out, workers=1, overwrite=True)["computed"] == 12


def test_a_different_scenario_is_refused_unless_overwrite(tmp_path):
    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    changed = dict(SWEEP, heat_leak="9 W")
    with pytest.raises(ScenarioError, match="holds results of a different scenario"):
        run_sweep(changed, out, workers=1)
    assert run_sweep(changed, out, workers=1, overwrite=True)["computed"] == 12
    stranger = tmp_path / "mine.csv"
    stranger.write_text("a,b\n1,2\n")
    with pytest.raises(ScenarioError, match="was not written by this sweep"):
        run_sweep(SWEEP, stranger, workers=1)


def test_parallel_and_dask_runs_equal_the_serial_run(tmp_path):
    serial, local, cluster = tmp_path / "s.csv", tmp_path / "p.csv", tmp_path / "d.csv"
    run_sweep(SWEEP, serial, workers=1)
    run_sweep(SWEEP, local, workers=2, batch_size=2)
    run_sweep(SWEEP, cluster, workers=2, dask="local", batch_size=3)
    assert local.read_bytes() == serial.read_bytes()
    assert cluster.read_bytes() == serial.read_bytes()


def test_parquet_output(tmp_path):
    import pandas as pd

    run_sweep(SWEEP, tmp_path / "r.csv", workers=1)
    run_sweep(SWEEP, tmp_path / "r.parquet", workers=2)
    frame = pd.read_parquet(tmp_path / "r.parquet")
    csv_frame = pd.read_csv(tmp_path / "r.csv", keep_default_na=False, na_values=[""])
    assert list(frame.columns) == list(csv_frame.columns) and len(frame) == 12
    assert np.allclose(frame["figure_of_merit"].astype(float), csv_frame["figure_of_merit"].astype(float),
                       equal_nan=True, rtol=0, atol=0)
    assert not (tmp_path / "r.parquet.journal.csv").exists()


def test_sigkill_then_rerun_gives_the_uninterrupted_file(tmp_path):
    import yaml

    scenario = _sweep_file(tmp_path, 120)
    out = tmp_path / "r.csv"
    cmd = [sys.executable, "-m", "cycle.cli", "sweep", str(scenario), "--out", str(out), "--workers", "1"]
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    deadline = time.time() + 90
    while time.time() < deadline and proc.poll() is None:
        if out.exists() and out.read_bytes().count(b"\n") > 20:
            break
        time.sleep(0.05)
    killed = proc.poll() is None
    if killed:
        os.kill(proc.pid, signal.SIGKILL)
    proc.wait(timeout=30)
    assert killed, "the sweep finished before it could be interrupted"
    lines_before = out.read_bytes().count(b"\n")
    assert 20 < lines_before < 121
    again = subprocess.run(cmd, capture_output=True, text=True, timeout=300)
    assert again.returncode == 0, again.stderr
    assert f"({121 - lines_before} computed now" in again.stderr or "computed now" in again.stderr
    reference = tmp_path / "ref.csv"
    run_sweep(yaml.safe_load(scenario.read_text()), reference, workers=2)
    assert out.read_bytes() == reference.read_bytes()


def test_cli_sweep(capsys, tmp_path):
    import yaml

    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP))
    out = tmp_path / "r.csv"
    assert cli.main(["sweep", str(scenario), "--out", str(out), "--workers", "2"]) == 0
    err = capsys.readouterr().err
    assert "\r" not in err  # no progress bar when stderr is not a terminal
    assert f"12 points in {out} (12 computed now; 6 made no liquid, 0 failed or invalid)" in err
    bad = tmp_path / "bad.yaml"
    bad.write_text(yaml.safe_dump(with_sweep(**{"recuperator.effectiveness": [2]})))
    assert cli.main(["sweep", str(bad), "--out", str(tmp_path / "x.csv")]) == 2
    assert "recuperator.effectiveness = 2" in capsys.readouterr().err
    assert cli.main(["sweep", str(scenario), "--out", str(tmp_path / "x.txt")]) == 2
    assert cli.main(["sweep", str(scenario), "--out", str(out), "--workers", "0"]) == 2


# -- optimisation and comparison --------------------------------------------------------

IDEAL = {"gas": "nitrogen", "ambient_temperature": "300 K", "low_pressure": "1.01325 bar",
         "high_pressure": "200 bar", "compressor": {"isothermal_efficiency": 1.0},
         "recuperator": {"effectiveness": 1.0, "zones": 4}}


@pytest.mark.parametrize("gas", ["nitrogen", "argon"])
def test_ideal_yield_is_highest_where_the_compressed_gas_lies_on_the_inversion_curve(gas):
    # y = (h1 - h2)/(h1 - hf) is largest where dh2/dp at T0 is zero, i.e. mu_JT(T0, p) = 0
    # (mu_JT = -(dh/dp)_T / cp): the textbook optimum pressure of the simple cycle (Barron, 1985, sec. 3.4).
    found = optimize(dict(IDEAL, gas=gas), [("high_pressure", "100 bar", "1000 bar")], "max-yield")
    p_opt = found["vary"]["high_pressure"]
    fluid = get_fluid(gas)
    assert abs(fluid.jt_coefficient(300.0, p_opt) * 1e5) < 2e-4  # K/bar; the slope is ~1e-3 K/bar per bar
    assert 300e5 < p_opt < 700e5
    assert found["summary"]["liquid_yield"] >= api.run(dict(IDEAL, gas=gas, high_pressure=0.9 * p_opt)).liquid_yield


def test_optimize_several_keys_and_json_contract(capsys, tmp_path):
    import yaml

    scenario = tmp_path / "dual.yaml"
    scenario.write_text(yaml.safe_dump(dict(IDEAL, gas="air", compressor={"isothermal_efficiency": 0.6},
                                            recuperator={"effectiveness": 0.98, "zones": 4},
                                            dual_pressure={"intermediate_pressure": "60 bar",
                                                           "recirculated_fraction": 0.5})))
    argv = ["optimize", str(scenario), "--vary", "dual_pressure.recirculated_fraction", "--between", "0.2", "0.85",
            "--vary", "dual_pressure.intermediate_pressure", "--between", "20 bar", "120 bar",
            "--goal", "min-work-per-liquid", "--json"]
    assert cli.main(argv) == 0
    found = json.loads(capsys.readouterr().out)
    assert set(found) >= {"vary", "goal", "summary"} and found["goal"] == "min-work-per-liquid"
    i, p_i = found["vary"]["dual_pressure.recirculated_fraction"], found["vary"]["dual_pressure.intermediate_pressure"]
    assert 0.2 <= i <= 0.85 and 20e5 <= p_i <= 120e5
    start = api.run(yaml.safe_load(scenario.read_text())).summary()["work_kJ_per_kg_liquid"]
    assert found["summary"]["work_kJ_per_kg_liquid"] < start
    assert cli.main(["optimize", str(scenario), "--vary", "gas", "--between", "1", "2", "--goal", "max-yield"]) == 2
    assert cli.main(["optimize", str(scenario), "--vary", "high_pressure", "--between", "300 bar", "100 bar",
                     "--goal", "max-yield"]) == 2


def test_compare_ranks_by_figure_of_merit(capsys):
    rows = compare(dict(BASE), ["nitrogen", "argon", "hydrogen", "methane"])
    assert [r["rank"] for r in rows] == [1, 2, 3, 4]
    ok = [r for r in rows if r["status"] == "ok"]
    assert [r["figure_of_merit"] for r in ok] == sorted((r["figure_of_merit"] for r in ok), reverse=True)
    assert rows[-1]["gas"] == "hydrogen" and rows[-1]["status"] == "no-liquid"
    assert rows[-1]["liquid_yield"] is None and "compressor_power_kW" in rows[0]
    assert cli.main(["compare", "scenarios/nitrogen-bench.yaml", "--gases", "nitrogen,argon", "--json"]) == 0
    listed = json.loads(capsys.readouterr().out)
    assert {r["gas"] for r in listed} == {"nitrogen", "argon"}
    assert all({"gas", "status", "liquid_yield", "figure_of_merit"} <= set(r) for r in listed)
    assert cli.main(["compare", "scenarios/nitrogen-bench.yaml", "--gases", "nitrogen,unobtanium"]) == 2


def test_compare_at_optimum_beats_the_given_pressure():
    plain = {r["gas"]: r for r in compare(dict(BASE, high_pressure="100 bar"), ["nitrogen", "argon"])}
    best = {r["gas"]: r for r in compare(dict(BASE, high_pressure="100 bar"), ["nitrogen", "argon"],
                                         at_optimum=True, between=("50 bar", "400 bar"))}
    for gas in ("nitrogen", "argon"):
        assert best[gas]["figure_of_merit"] >= plain[gas]["figure_of_merit"]
        assert 50e5 <= best[gas]["high_pressure"] <= 400e5


def test_api_for_notebooks(tmp_path):
    frame = api.sweep(BASE, {"recuperator.effectiveness": [0.95, 0.97, 0.99]})
    assert list(frame["recuperator.effectiveness"]) == [0.95, 0.97, 0.99]
    assert frame["liquid_yield"].is_monotonic_increasing
    # The file's columns (bar), then the same values in SI under the bare key (Pa).
    both = api.sweep(BASE, {"high_pressure": ["100 bar", "150 bar"], "gas": ["nitrogen"]})
    assert list(both.columns[:3]) == ["point", "high_pressure_bar", "gas"] and both.columns[-1] == "high_pressure"
    assert list(both["high_pressure_bar"]) == [100.0, 150.0] and list(both["high_pressure"]) == [100e5, 150e5]
    assert list(both["message"]) == ["", ""]  # ok points: empty text, not NaN
    result = api.run("scenarios/argon-unit.yaml")
    assert result.to_frame().loc[1, "stream"] == "compressor suction"
    table = api.compare("scenarios/nitrogen-bench.yaml", ["nitrogen", "argon"])
    assert list(table["rank"]) == [1, 2]


def _sweep_file(tmp_path, steps):
    import yaml

    # Points sized by minimum approach over 60 zones take some 20 ms each: slow enough to be
    # interrupted half-way on any machine.
    slow = dict(BASE, recuperator={"min_approach": "2 K", "zones": 60})
    scenario = tmp_path / "sweep.yaml"
    scenario.write_text(yaml.safe_dump(dict(slow, sweep={"high_pressure": {"from": "60 bar", "to": "300 bar",
                                                                          "steps": steps}})))
    return scenario


def test_ctrl_c_keeps_the_rows_and_says_how_to_finish(tmp_path):
    scenario, out = _sweep_file(tmp_path, 150), tmp_path / "r.csv"
    cmd = [sys.executable, "-m", "cycle.cli", "sweep", str(scenario), "--out", str(out), "--workers", "2"]
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.time() + 90
    while time.time() < deadline and proc.poll() is None:
        if out.exists() and out.read_bytes().count(b"\n") > 10:
            break
        time.sleep(0.05)
    assert proc.poll() is None, "the sweep finished before it could be interrupted"
    proc.send_signal(signal.SIGINT)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 130
    assert "run the same command again" in err and "Traceback" not in err
    kept = out.read_bytes().count(b"\n") - 1
    assert 10 <= kept < 150
    again = subprocess.run(cmd, capture_output=True, text=True, timeout=300)
    assert again.returncode == 0 and f"({150 - kept} computed now" in again.stderr
    assert len(read(out)) == 150


def test_progress_bar_shows_points_failures_and_time_left(tmp_path, capsys):
    run_sweep(SWEEP, tmp_path / "r.csv", workers=1, progress=True)
    shown = capsys.readouterr().err
    # done; hydrogen's six points counted as no liquid, apart from failures; time left
    assert "12/12" in shown and "no liquid 6, failed 0" in shown and "<00:00" in shown
    run_sweep(SWEEP, tmp_path / "q.csv", workers=1)  # stderr is not a terminal here: quiet
    assert capsys.readouterr().err == ""


# -- what the studies say -----------------------------------------------------------------

def test_an_optimum_on_a_bound_is_flagged_and_taken_at_the_bound(capsys, tmp_path):
    import yaml

    # With this plant the figure of merit still rises at 150 bar (its best pressure lies above
    # 300 bar), so a search capped at 150 bar ends on its upper bound.
    rising = [api.run(dict(BASE, high_pressure=f"{p} bar")).figure_of_merit for p in (140, 150)]
    assert rising[1] > rising[0]
    found = optimize(dict(BASE), [("high_pressure", "50 bar", "150 bar")], "max-figure-of-merit")
    assert found["vary"]["high_pressure"] == 150e5  # the bound itself, not 149.9998 bar
    assert found["on_bound"] == {"high_pressure": "upper"}
    assert found["notes"] == ["high_pressure is on the upper bound of the search (150 bar): the best value may "
                              "lie beyond it; widen --between to look further"]
    assert found["summary"]["figure_of_merit"] == pytest.approx(rising[1], rel=1e-12)
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(BASE))
    argv = ["optimize", str(scenario), "--vary", "high_pressure", "--between", "50 bar", "150 bar",
            "--goal", "max-figure-of-merit"]
    assert cli.main(argv + ["--json"]) == 0
    out, err = capsys.readouterr()
    assert err == ""  # no progress display when stderr is not a terminal, and never on stdout
    data = json.loads(out)
    assert data["on_bound"] == {"high_pressure": "upper"} and data["notes"] == found["notes"]
    assert cli.main(argv) == 0
    text = capsys.readouterr().out
    assert "150.00 bar  (upper bound)" in text and f"note: {found['notes'][0]}" in text


def test_an_interior_optimum_is_not_on_a_bound():
    # The ideal cycle's best pressure for yield lies near 390 bar (see the inversion-curve test).
    found = optimize(dict(IDEAL), [("high_pressure", "100 bar", "1000 bar")], "max-yield")
    assert 300e5 < found["vary"]["high_pressure"] < 700e5
    assert found["on_bound"] == {} and found["notes"] == []


def test_optimize_shows_its_evaluations_on_stderr(capsys):
    found = optimize(dict(BASE), [("high_pressure", "50 bar", "150 bar")], "max-yield", progress=True)
    out, err = capsys.readouterr()
    assert out == ""
    assert f"optimize: {found['evaluations']} evaluations" in err
    assert f"best liquid_yield {found['summary']['liquid_yield']:.6g}" in err


def test_compare_at_optimum_gives_the_real_reason_and_flags_bounds(capsys, tmp_path):
    import yaml

    rows = {r["gas"]: r for r in compare(dict(BASE), ["nitrogen", "hydrogen"], at_optimum=True,
                                         between=("50 bar", "150 bar"))}
    hydrogen = rows["hydrogen"]
    assert hydrogen["status"] == "no-liquid" and hydrogen["on_bound"] is None
    assert "maximum inversion temperature" in hydrogen["message"] and "precooling" in hydrogen["message"]
    assert "no point of the search made liquid: high_pressure from 50 bar to 150 bar" in hydrogen["message"]
    nitrogen = rows["nitrogen"]
    assert nitrogen["high_pressure"] == 150e5 and nitrogen["on_bound"] == "upper"
    assert nitrogen["note"].startswith("high_pressure is on the upper bound of the search (150 bar)")
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(BASE))
    assert cli.main(["compare", str(scenario), "--gases", "nitrogen,hydrogen", "--at-optimum",
                     "--between", "50 bar", "150 bar"]) == 0
    text = capsys.readouterr().out
    assert "Optimum on a bound of the search (the best pressure may lie outside it):" in text
    assert f"  nitrogen: {nitrogen['note']}" in text and "maximum inversion temperature" in text


@pytest.mark.parametrize("key, message", [
    ("recuperator", "--vary recuperator: a section cannot be varied; use one of its keys, e.g. recuperator.effectiveness"),
    ("high_presure", "--vary high_presure: not a scenario key; did you mean high_pressure?"),
])
def test_vary_errors_say_vary(capsys, tmp_path, key, message):
    import yaml

    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(BASE))
    assert cli.main(["optimize", str(scenario), "--vary", key, "--between", "1", "2", "--goal", "max-yield"]) == 2
    assert capsys.readouterr().err == f"lhsim: error: {message}\n"


def test_optimize_a_volume_rate_keeps_its_unit():
    # Bounds in L/h are volume flows: the optimiser must not hand them back as kg/s.
    found = optimize(dict(BASE), [("production.liquid_rate", "5 L/h", "20 L/h")], "max-figure-of-merit")
    assert found["summary"]["liquid_rate_L_per_h"] == pytest.approx(20.0, rel=1e-9)  # the heat leak weighs less
    assert found["on_bound"] == {"production.liquid_rate": "upper"}
