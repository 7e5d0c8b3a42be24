"""Every demo scenario solves, closes its balances and keeps its production target."""

import pathlib
import subprocess
import sys

import pytest

from cycle.flowsheet import solve_scenario
from cycle.scenario import load_scenario

ROOT = pathlib.Path(__file__).resolve().parents[1]
DEMOS = sorted((ROOT / "scenarios").glob("*.yaml"))


def test_the_demos_cover_every_layout():
    layouts = {load_scenario(path).layout for path in DEMOS}
    assert layouts == {"simple", "precooled", "dual-pressure"}
    assert len(DEMOS) >= 6


@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_demo_solves_and_balances(path):
    sc = load_scenario(path)
    result = solve_scenario(sc)
    s = result.summary()
    assert result.solve.converged and not any("did not converge" in w for w in result.warnings)
    # A demo is a design an engineer could sign: nothing to warn about (hot stages, a chiller, ...).
    assert result.warnings == []
    assert abs(result.energy_balance_residual) < 1e-8
    ideal_plus_losses = result.ideal_work_per_kg_liquid + sum(result.exergy_losses_per_kg_liquid().values())
    assert ideal_plus_losses == pytest.approx(result.work_per_kg_liquid, rel=1e-8)
    assert 0 < s["figure_of_merit"] < 1 and 0 < s["liquid_yield"] < 1
    prod = sc.production
    if prod.liquid_volume_rate is not None:
        assert s["liquid_rate_L_per_h"] == pytest.approx(prod.liquid_volume_rate * 3.6e6, rel=1e-9)
    if prod.compressor_flow is not None:
        assert s["compressor_flow_kg_per_h"] == pytest.approx(prod.compressor_flow * 3600, rel=1e-12)
    # Every valve keeps enthalpy and raises entropy.
    states = [x.state for x in result.states]
    names = [x.name for x in result.states]
    for k, name in enumerate(names):
        if "valve outlet" in name:
            inlet = states[k - 1]
            assert states[k].h == pytest.approx(inlet.h, rel=1e-9, abs=1e-3) and states[k].s > inlet.s


def test_layout_drawings_are_what_the_script_draws(tmp_path):
    subprocess.run([sys.executable, str(ROOT / "docs" / "draw_layouts.py")], cwd=tmp_path, check=True,
                   capture_output=True, timeout=60)
    for made in (tmp_path / "docs" / "img").glob("*.svg"):
        assert made.read_text() == (ROOT / "docs" / "img" / made.name).read_text(), made.name


@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_summary_keys_are_known_before_solving(path):
    from cycle.results import summary_keys

    sc = load_scenario(path)
    assert list(solve_scenario(sc).summary()) == summary_keys(sc)
