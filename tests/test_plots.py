"""Figures and the HTML report: the drawn data equal the results; files are real images."""

import base64
import html.parser
import pathlib
import shutil
import subprocess
import xml.etree.ElementTree as ET

import numpy as np
import pytest

from cycle import api, cli, plots
from cycle.report_html import build_report

ROOT = pathlib.Path(__file__).resolve().parents[1]
DEMOS = sorted((ROOT / "scenarios").glob("*.yaml"))


@pytest.fixture(scope="module")
def results():
    return {path.stem: api.run(path) for path in DEMOS}


def assert_real_png(path, min_std=0.02):
    import matplotlib.image

    pixels = matplotlib.image.imread(path)
    assert pixels.ndim == 3 and pixels.shape[0] > 200 and pixels.shape[1] > 300
    assert pixels[..., :3].std() > min_std  # not blank


@pytest.mark.parametrize("name", [p.stem for p in DEMOS])
def test_ts_points_are_the_state_table(results, name):
    result = results[name]
    data = plots.ts_data(result)
    assert data.points == [(st.number, st.state.s, st.state.T) for st in result.states]
    by_name = {st.name: st.state for st in result.states}
    for kind, label, s, T in data.paths:
        a, b = (by_name[part] for part in label.split(" -> "))
        assert (s[0], T[0]) == pytest.approx((a.s, a.T), rel=1e-6)
        assert (s[-1], T[-1]) == pytest.approx((b.s, b.T), rel=1e-6)
    kinds = {kind for kind, *_ in data.paths}
    assert {"compression", "isobar", "isenthalp", "split", "mixing"} <= kinds
    # Every numbered state is joined to the drawing by at least one path.
    joined = {part for _, label, _, _ in data.paths for part in label.split(" -> ")}
    assert joined == set(by_name)


def test_throttle_path_keeps_enthalpy_and_falls_into_the_dome(results):
    from properties import get_fluid

    result = results["nitrogen-bench"]
    data = plots.ts_data(result)
    (kind, label, s, T), = [p for p in data.paths if p[0] == "isenthalp"]
    fluid = get_fluid("nitrogen")
    inlet = {st.name: st.state for st in result.states}["recuperator high-pressure outlet, valve inlet"]
    end = fluid.state_ph(result.scenario.low_pressure, inlet.h)
    assert (s[-1], T[-1]) == pytest.approx((end.s, end.T))
    assert np.all(np.diff(s) > 0)  # entropy rises along the throttle


@pytest.mark.parametrize("name", [p.stem for p in DEMOS])
def test_every_figure_for_every_demo_is_a_real_image(results, name, tmp_path):
    paths = plots.write_figures(results[name], tmp_path, stem=name)
    assert sorted(p.name for p in paths) == sorted(f"{name}-{f}.{ext}" for f in plots.FIGURES for ext in ("png", "svg"))
    for path in paths:
        if path.suffix == ".png":
            assert_real_png(path)
        else:
            root = ET.parse(path).getroot()
            assert root.tag.endswith("svg") and len(list(root.iter())) > 50


def test_profile_and_loss_data(results):
    result = results["hydrogen-ln2-precooled"]
    data = plots.profile_data(result)
    assert set(data) == {"warm_recuperator", "cold_recuperator"}
    for name, d in data.items():
        rec = result.recuperators[name]
        assert d["pinch"][3] == rec.min_approach and d["pinch"][1] - d["pinch"][2] == pytest.approx(rec.min_approach)
        assert d["duty"][-1] == pytest.approx(result.compressor_flow * rec.duty / 1e3)
    losses = plots.loss_data(result)
    label, start, height, share = losses["bars"][-1]
    assert start + height == pytest.approx(losses["actual"], rel=1e-8)
    assert sum(b[3] for b in losses["bars"]) == pytest.approx(100.0, rel=1e-8)
    heights = [b[2] for b in losses["bars"][1:]]
    assert heights == sorted(heights, reverse=True)


SWEEP = {"gas": "nitrogen", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
         "compressor": {"isothermal_efficiency": 0.6}, "recuperator": {"effectiveness": 0.97, "zones": 10},
         "sweep": {"high_pressure": {"from": "60 bar", "to": "260 bar", "steps": 5}, "gas": ["nitrogen", "argon", "neon"]}}


def test_sweep_chart_draws_the_results(tmp_path, capsys):
    from cycle.sweep import run_sweep
    import pandas as pd

    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    frame = pd.read_csv(out, keep_default_na=False, na_values=[""])
    fig, data = plots.sweep_chart(frame, "high_pressure", "liquid_yield", "gas")
    assert data["x"] == "high_pressure_bar"  # the bare key finds its column with the unit
    assert data["x_label"] == "high pressure [bar]" and data["y_label"] == "liquid yield [-]"
    lines = {value: (xs, ys) for value, xs, ys in data["lines"]}
    ok = frame[(frame.gas == "argon") & (frame.status == "ok")].sort_values("high_pressure_bar")
    assert np.array_equal(lines["argon"][0], ok.high_pressure_bar.to_numpy())  # drawn as written: bar
    assert lines["argon"][0][0] == pytest.approx(60.0, rel=1e-12)
    assert np.array_equal(lines["argon"][1], ok.liquid_yield.to_numpy())
    misses = {value: xs for value, xs, _ in data["misses"]}
    assert len(misses["neon"]) == 5 and len(lines["neon"][0]) == 0  # neon: no liquid without precooling
    assert data["legend"] == ["nitrogen", "argon", "neon", "no liquid (on the axis)"]
    _, same = plots.sweep_chart(frame, "high_pressure_bar", "liquid_yield", "gas")  # the full column name too
    assert [v for v, _, _ in same["lines"]] == list(lines)
    assert plots.axis_label("work_kJ_per_kg_liquid")[0] == "work [kJ/kg of liquid]"
    assert plots.axis_label("recuperator.ua")[0] == "recuperator: ua [W/K]"  # a bare key in SI
    assert plots.axis_label("recuperator.ua_W_per_K") == ("recuperator: ua [W/K]", 1.0)
    assert plots.axis_label("production.liquid_rate_L_per_h") == ("production: liquid rate [L/h]", 1.0)
    assert cli.main(["plot", str(out), "--x", "high_pressure", "--y", "figure_of_merit", "--by", "gas"]) == 0
    for ext in ("png", "svg"):
        made = tmp_path / f"r-figure_of_merit-vs-high_pressure-by-gas.{ext}"
        assert made.exists()
    assert_real_png(tmp_path / "r-figure_of_merit-vs-high_pressure-by-gas.png")
    capsys.readouterr()
    assert cli.main(["plot", str(out), "--x", "high_pressure", "--y", "nonsense"]) == 2
    err = capsys.readouterr().err
    assert "column nonsense is not in the results" in err and err.count("\n") == 1
    assert cli.main(["plot", str(out), "--x", "high_pressure", "--y", "liquid_yield", "--out", str(tmp_path / "a.svg")]) == 0
    ET.parse(tmp_path / "a.svg")


def test_run_plots_option(tmp_path, capsys):
    figs = tmp_path / "new" / "figs"  # made, parents too
    assert cli.main(["run", "scenarios/air-dual-pressure.yaml", "--plots", str(figs)]) == 0
    assert cli.main(["run", "scenarios/nitrogen-bench.yaml", "--plots", str(figs)]) == 0
    names = sorted(p.name for p in figs.iterdir())  # two scenarios, one folder: nothing overwritten
    assert names == sorted(f"{stem}-{f}.{ext}" for stem in ("air-dual-pressure", "nitrogen-bench")
                           for f in plots.FIGURES for ext in ("png", "svg"))
    assert plots.figure_stem(api.run("scenarios/nitrogen-bench.yaml")) == "bench-nitrogen-liquefier-10-l-h"


@pytest.fixture
def no_solve(monkeypatch):
    """Fail loudly if the scenario is solved: the --plots check must come first."""
    import cycle.flowsheet

    def solve(*args, **kwargs):
        raise AssertionError("solved before --plots was checked")

    monkeypatch.setattr(cycle.flowsheet, "solve_scenario", solve)


def test_plots_folder_is_checked_before_the_solve(tmp_path, capsys, no_solve, monkeypatch):
    a_file = tmp_path / "figures"
    a_file.write_text("not a folder")
    cases = [(a_file, "it exists and is not a directory"),
             (a_file / "sub", f"cannot make it: {a_file} is not a directory")]
    for folder, reason in cases:
        assert cli.main(["run", "scenarios/nitrogen-bench.yaml", "--plots", str(folder)]) == 2
        out, err = capsys.readouterr()
        assert out == ""
        assert err == f"lhsim: error: --plots must name a directory lhsim can write into, got {folder}: {reason}\n"
    import tempfile

    def refuse(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(tempfile, "TemporaryFile", refuse)  # as if the folder were read-only
    assert cli.main(["run", "scenarios/nitrogen-bench.yaml", "--plots", str(tmp_path)]) == 2
    assert capsys.readouterr().err == (f"lhsim: error: --plots must name a directory lhsim can write into, got "
                                       f"{tmp_path}: cannot write into it (Permission denied)\n")


class _Collector(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags, self.text, self.sources = [], [], []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.sources += [value for key, value in attrs if key in ("src", "href")]

    def handle_data(self, data):
        self.text.append(data)


def test_report_is_self_contained_html_with_the_numbers(results, tmp_path):
    import datetime

    path = ROOT / "scenarios" / "nitrogen-bench.yaml"
    page = build_report(results["nitrogen-bench"], path.read_text(), when=datetime.date(2026, 12, 1))
    parser = _Collector()
    parser.feed(page)
    text = " ".join(parser.text)
    # The same labels, values and units as the text output, never raw JSON keys; rows that do
    # not apply to a simple cycle (precooling) are left out.
    from cycle.report import format_result, summary_sections

    terminal = format_result(results["nitrogen-bench"])
    for _, rows in summary_sections(results["nitrogen-bench"]):
        for label, value, unit in rows:
            assert f"{label.strip()} {value} {unit}".strip() in text
            assert label in terminal and value in terminal
    assert "figure of merit 0.0554" in text and "compressor power 30.803 kW" in text
    for raw in ("liquid_yield", "figure_of_merit", "compressor_power_kW", "precooling", "_kJ_per_kg"):
        assert raw not in text.replace("name: Bench", "")
    assert parser.tags.count("img") == 3 and parser.tags.count("table") >= 3
    assert all(src.startswith("data:image/png;base64,") for src in parser.sources)  # no network
    assert "2026-12-01" in text and "lhsim 0.1.0" in text
    for word in ("high pressure", "cryogenic", "oxygen deficiency", "oxygen enrichment", "flammable", "local codes"):
        assert word in text
    assert "Barron" in text and "ideal work of liquefaction" in text
    assert "name: Bench nitrogen liquefier, 10 L/h" in text  # the scenario as given
    png = base64.b64decode(parser.sources[0].split(",", 1)[1])
    assert png[:8] == b"\x89PNG\r\n\x1a\n"


def test_report_command(tmp_path, capsys):
    out = tmp_path / "r.html"
    assert cli.main(["report", "scenarios/hydrogen-ln2-precooled.yaml", "--out", str(out)]) == 0
    assert out.stat().st_size > 50_000
    assert cli.main(["report", "scenarios/hydrogen-ln2-precooled.yaml", "--out", str(tmp_path / "r.txt")]) == 2


CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium not installed (.ci/run installs it)")
def test_report_renders_in_a_real_browser(tmp_path):
    out = tmp_path / "r.html"
    assert cli.main(["report", "scenarios/nitrogen-bench.yaml", "--out", str(out)]) == 0
    shot = tmp_path / "shot.png"
    subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                    "--disable-background-networking", "--disable-component-update", "--disable-sync",
                    f"--user-data-dir={tmp_path / 'profile'}", "--window-size=1200,1800",
                    f"--screenshot={shot}", out.as_uri()], capture_output=True, timeout=120)
    assert_real_png(shot, min_std=0.05)
    import matplotlib.image

    pixels = matplotlib.image.imread(shot)[..., :3]
    # The T-s diagram and the tables put many non-white pixels on the page.
    assert (pixels.mean(axis=2) < 0.9).mean() > 0.02


def test_other_swept_keys_get_lines_of_their_own(tmp_path):
    from cycle.sweep import run_sweep
    import pandas as pd

    data = dict(SWEEP, sweep={"high_pressure": {"from": "100 bar", "to": "200 bar", "steps": 3},
                              "recuperator.effectiveness": [0.95, 0.99], "gas": ["nitrogen", "argon"]})
    out = tmp_path / "r.csv"
    run_sweep(data, out, workers=1)
    frame = pd.read_csv(out, keep_default_na=False, na_values=[""])
    _, drawn = plots.sweep_chart(frame, "high_pressure", "liquid_yield", "gas")
    labels = [value for value, _, _ in drawn["lines"]]
    assert len(labels) == 4 and "argon, recuperator: effectiveness 0.99" in labels
    for _, xs, _ in drawn["lines"]:
        assert list(xs) == sorted(xs) and len(xs) == 3  # one point per pressure: no zigzag


def _legend_outside(fig):
    fig.canvas.draw()
    ax = fig.axes[0]
    legend = ax.get_legend().get_window_extent()
    return legend.x0 >= ax.get_window_extent().x1


def test_legend_units_as_on_the_axes_at_most_eight_entries_outside_the_data(tmp_path):
    from cycle.sweep import run_sweep
    import pandas as pd

    # 3 gases x 2 effectivenesses x 2 ambient temperatures = 12 lines: too many to list.
    data = dict(SWEEP, sweep={"high_pressure": ["100 bar", "200 bar"], "gas": ["nitrogen", "argon", "methane"],
                              "recuperator.effectiveness": [0.95, 0.99], "ambient_temperature": ["290 K", "27 degC"]})
    out = tmp_path / "r.csv"
    run_sweep(data, out, workers=1)
    frame = pd.read_csv(out, keep_default_na=False, na_values=[""])
    fig, drawn = plots.sweep_chart(frame, "high_pressure", "liquid_yield", "gas")
    assert len(drawn["lines"]) == 12 and len(drawn["legend"]) <= plots.LEGEND_ENTRIES
    assert drawn["legend"] == ["nitrogen", "argon", "methane",  # one per colour, then one per line style
                               "recuperator: effectiveness 0.95, ambient temperature 290 K",
                               "recuperator: effectiveness 0.95, ambient temperature 300.15 K",
                               "recuperator: effectiveness 0.99, ambient temperature 290 K",
                               "recuperator: effectiveness 0.99, ambient temperature 300.15 K"]
    assert _legend_outside(fig)
    # More combinations than line styles: one entry says so.
    data["sweep"] = {"high_pressure": ["100 bar", "200 bar"], "gas": ["nitrogen", "argon"],
                     "recuperator.effectiveness": [0.95, 0.96, 0.97, 0.98, 0.99]}
    run_sweep(data, tmp_path / "q.csv", workers=1)
    fig, drawn = plots.sweep_chart(pd.read_csv(tmp_path / "q.csv"), "high_pressure", "liquid_yield", "gas")
    assert drawn["legend"] == ["nitrogen", "argon", "5 lines per colour, one per value of recuperator: effectiveness"]
    # Four gases leave too little room for four style entries beside the no-liquid entry.
    data["sweep"] = {"high_pressure": ["100 bar", "200 bar"], "gas": ["nitrogen", "argon", "methane", "neon"],
                     "recuperator.effectiveness": [0.95, 0.99], "ambient_temperature": ["290 K", "27 degC"]}
    run_sweep(data, tmp_path / "s.csv", workers=1)
    fig, drawn = plots.sweep_chart(pd.read_csv(tmp_path / "s.csv"), "high_pressure", "liquid_yield", "gas")
    assert drawn["legend"] == ["nitrogen", "argon", "methane", "neon", "4 lines per colour, one per combination of "
                               "recuperator: effectiveness and ambient temperature", "no liquid (on the axis)"]
    assert _legend_outside(fig)
    # Few lines: one entry each, with the unit of the axes (300.15 K for 27 degC).
    few = frame[frame["recuperator.effectiveness"] == 0.99]
    few = few[few.gas == "nitrogen"]
    fig, drawn = plots.sweep_chart(few, "high_pressure", "liquid_yield", "ambient_temperature")
    assert drawn["legend"] == ["ambient temperature 290 K", "ambient temperature 300.15 K"]
    assert _legend_outside(fig)


def test_many_numeric_values_get_a_colour_bar(tmp_path):
    from cycle.sweep import run_sweep
    import pandas as pd

    data = dict(SWEEP, sweep={"high_pressure": ["100 bar", "200 bar"],
                              "heat_leak": {"from": "0 W", "to": "10 W", "steps": 11}},
                production={"liquid_rate": "10 L/h"})
    out = tmp_path / "r.csv"
    run_sweep(data, out, workers=1)
    frame = pd.read_csv(out, keep_default_na=False, na_values=[""])
    fig, drawn = plots.sweep_chart(frame, "high_pressure", "liquid_yield", "heat_leak")
    assert len(drawn["lines"]) == 11 and drawn["legend"] == []  # the colour bar says which is which
    assert len(fig.axes) == 2 and fig.axes[1].get_xlabel() == "heat leak [W]"
    assert len(set(map(tuple, drawn["colours"]))) == 11


def test_plot_refuses_a_file_that_is_not_results(tmp_path, capsys):
    table = tmp_path / "other.csv"
    table.write_text("a,b\n1,2\n")
    assert cli.main(["plot", str(table), "--x", "a", "--y", "b"]) == 2
    err = capsys.readouterr().err
    assert err == (f"lhsim: error: {table} is not an lhsim results file (it has no point and status columns); "
                   f"make one with lhsim sweep\n")
    assert cli.main(["plot", str(ROOT / "scenarios" / "nitrogen-bench.yaml"), "--x", "a", "--y", "b"]) == 2
    err = capsys.readouterr().err
    assert "is not an lhsim results file" in err and err.count("\n") == 1
    binary = tmp_path / "r.parquet"
    binary.write_bytes(b"\x00\x01 not parquet")
    assert cli.main(["plot", str(binary), "--x", "a", "--y", "b"]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"lhsim: error: results file {binary} could not be read as a table") and err.count("\n") == 1
