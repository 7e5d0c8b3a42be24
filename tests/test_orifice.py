"""Throttle-valve sizing by the homogeneous equilibrium model (HEM).

Outside values:

- the ideal-gas critical mass flux, G* = rho0 sqrt(gamma p0 / rho0) (2 / (gamma + 1))^((gamma + 1) /
  (2 (gamma - 1))), and the critical pressure ratio (2 / (gamma + 1))^(gamma / (gamma - 1))
  (isentropic choked flow of a perfect gas: any gas-dynamics text, e.g. J. D. Anderson, *Modern
  Compressible Flow*, chapter on quasi-one-dimensional flow), with gamma = cp / cv from CoolProp
  at the inlet;
- the direct summation of the nozzle equation, G = rho_t sqrt(-2 sum dp / rho) over small pressure
  steps along the isentrope, as two-phase relief-sizing practice states it (API Standard 520,
  Part I, the HEM direct-integration method), done here with CoolProp's PropsSI alone: an
  independent route (an integral of 1/rho, not a difference of enthalpies).

No published worked example of a flashing cryogen through an orifice was at hand; the HEM flux
is checked by the two routes above.
"""

import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

from cycle.errors import ScenarioError
from cycle.orifice import DEFAULT_DISCHARGE_COEFFICIENT, hem_mass_flux, size_valve
from properties import get_fluid


@pytest.mark.parametrize("gas, T, p0", [("helium", 300.0, 5e5), ("nitrogen", 300.0, 2e5), ("argon", 350.0, 3e5)])
def test_a_warm_low_pressure_gas_chokes_as_the_ideal_gas_does(gas, T, p0):
    fl = get_fluid(gas)
    inlet = fl.state_tp(T, p0)
    sized = size_valve(fl, inlet, 0.05e5)  # argon freezes on the way down: the path stops where it must
    name = fl.name
    g = PropsSI("CPMASS", "T", T, "P", p0, name) / PropsSI("CVMASS", "T", T, "P", p0, name)
    rho = PropsSI("D", "T", T, "P", p0, name)
    G_ideal = rho * math.sqrt(g * p0 / rho) * (2 / (g + 1)) ** ((g + 1) / (2 * (g - 1)))
    # These gases deviate from the perfect gas by a few parts per thousand here (Z - 1 and the
    # change of cp with temperature along the expansion): 3e-3 covers it.
    assert sized.choked
    assert sized.critical_mass_flux == pytest.approx(G_ideal, rel=3e-3)
    assert sized.throat_pressure == pytest.approx(p0 * (2 / (g + 1)) ** (g / (g - 1)), rel=3e-3)


def test_a_small_pressure_ratio_does_not_choke():
    fl = get_fluid("nitrogen")
    inlet = fl.state_tp(300.0, 5e5)
    sized = size_valve(fl, inlet, 4.5e5)
    assert not sized.choked and sized.throat_pressure == 4.5e5
    s0, h0 = PropsSI("S", "T", 300, "P", 5e5, "Nitrogen"), PropsSI("H", "T", 300, "P", 5e5, "Nitrogen")
    h, rho = PropsSI("H", "P", 4.5e5, "S", s0, "Nitrogen"), PropsSI("D", "P", 4.5e5, "S", s0, "Nitrogen")
    assert sized.critical_mass_flux == pytest.approx(rho * math.sqrt(2 * (h0 - h)), rel=1e-6)


def direct_summation(name, p0, h0, s0, p_out, steps=3000):
    """max over p of rho_t sqrt(-2 sum dp / rho) by the trapezoid rule along the isentrope (PropsSI)."""
    ps = np.geomspace(p0, p_out, steps)
    v = np.array([1.0 / PropsSI("D", "P", p, "S", s0, name) for p in ps])
    integral = np.concatenate([[0.0], np.cumsum(0.5 * (v[1:] + v[:-1]) * -np.diff(ps))])
    G = np.sqrt(2 * integral) / v
    k = int(np.argmax(G))
    return G[k], ps[k]


@pytest.mark.parametrize("case", ["saturated liquid", "dense supercritical"])
def test_two_phase_flux_against_the_direct_summation(case):
    fl = get_fluid("nitrogen")
    if case == "saturated liquid":
        inlet, p_out = fl.saturated_liquid(20e5), 1e5
    else:
        inlet, p_out = fl.state_tp(130.0, 200e5), 1.05e5
    sized = size_valve(fl, inlet, p_out)
    G, p_t = direct_summation("Nitrogen", inlet.p, inlet.h, inlet.s, p_out)
    # 3000 log-spaced steps: the trapezoid rule and the grid's maximum are good to ~1e-4.
    assert sized.choked
    assert sized.critical_mass_flux == pytest.approx(G, rel=2e-4)
    assert sized.throat_pressure == pytest.approx(p_t, rel=5e-3)


def test_the_orifice_from_mass_flow_and_discharge_coefficient():
    fl = get_fluid("argon")
    inlet = fl.state_tp(160.0, 180e5)
    m = 0.02  # kg/s
    sized = size_valve(fl, inlet, 1.2e5, m, 0.7)
    area = m / (0.7 * sized.critical_mass_flux)
    assert sized.orifice_area == pytest.approx(area, rel=1e-12)
    assert sized.orifice_diameter == pytest.approx(math.sqrt(4 * area / math.pi), rel=1e-12)
    assert sized.to_dict()["valve_orifice_diameter_mm"] == pytest.approx(sized.orifice_diameter * 1e3, rel=1e-12)
    without = size_valve(fl, inlet, 1.2e5)
    assert without.orifice_area is None and without.orifice_diameter is None
    assert without.discharge_coefficient == DEFAULT_DISCHARGE_COEFFICIENT == 0.61
    for bad in (0.0, 1.2):
        with pytest.raises(ScenarioError, match="valve.discharge_coefficient must be above 0 and at most 1"):
            size_valve(fl, inlet, 1.2e5, m, bad)


@pytest.mark.parametrize("gas, T, p, p_out", [
    ("nitrogen", 130.0, 200e5, 1.05e5), ("argon", 160.0, 180e5, 1.2e5), ("hydrogen", 40.0, 120e5, 1.2e5),
    ("neon", 40.0, 100e5, 1.3e5), ("methane", 200.0, 100e5, 1.2e5), ("air", 140.0, 200e5, 1e5),
    ("nitrogen", 90.0, 20e5, 1e5),
])
def test_every_demo_kind_of_inlet_gives_a_maximum(gas, T, p, p_out):
    fl = get_fluid(gas)
    inlet = fl.state_tp(T, p)
    sized = size_valve(fl, inlet, p_out)
    G = sized.critical_mass_flux
    assert math.isfinite(G) and G > 0
    for nearby in (0.98, 1.02):
        p_near = min(max(sized.throat_pressure * nearby, p_out), p * 0.999)
        assert hem_mass_flux(fl, inlet, p_near) <= G * (1 + 1e-9)


def test_a_valve_in_every_layout(tmp_path):
    from cycle.flowsheet import solve_scenario
    from cycle.scenario import load_scenario

    for demo, count in (("nitrogen-bench", 1), ("hydrogen-ln2-precooled", 1), ("air-dual-pressure", 2)):
        result = solve_scenario(load_scenario(f"scenarios/{demo}.yaml"))
        assert len(result.valves) == count
        last = result.valves[-1]
        s = result.summary()
        assert s["valve_critical_mass_flux_kg_per_m2_s"] == last.critical_mass_flux
        assert s["valve_choked"] == last.choked
        # the last valve passes the flow that reaches the separator
        feed = 1.0 - (result.scenario.dual_pressure.recirculated_fraction if count == 2 else 0.0)
        assert last.mass_flow == pytest.approx(result.compressor_flow * feed, rel=1e-12)
        assert s["valve_orifice_diameter_mm"] == pytest.approx(last.orifice_diameter * 1e3, rel=1e-12)
