"""Throttle-valve sizing by the homogeneous equilibrium model (HEM), cycle.orifice.

Outside values and laws, each named beside its check:

- the ideal-gas critical mass flux, G* = rho0 sqrt(gamma p0 / rho0) (2 / (gamma + 1))^((gamma + 1) /
  (2 (gamma - 1))), and the critical pressure ratio (2 / (gamma + 1))^(gamma / (gamma - 1))
  (isentropic choked flow of a perfect gas: any gas-dynamics text, e.g. J. D. Anderson, *Modern
  Compressible Flow*, chapter on quasi-one-dimensional flow), with gamma = cp / cv from CoolProp
  at the inlet;
- choking as a law: at the throat of a choked single-phase flow the velocity G / rho is the speed
  of sound (same texts), with CoolProp's speed of sound;
- the direct summation of the nozzle equation, G = rho_t sqrt(-2 sum dp / rho) over small pressure
  steps along the isentrope, as two-phase relief-sizing practice states it (API Standard 520,
  Part I, 9th ed., 2014, Annex C; the method's place in the annex from memory), done here with
  CoolProp's PropsSI alone: an independent route (an integral of 1/rho, not a difference of
  enthalpies), and the grid maximum of rho sqrt(2 (h0 - h)) by PropsSI;
- J. C. Leung's omega method for a flashing saturated liquid (J. C. Leung, "A generalized
  correlation for one-component homogeneous equilibrium flashing choked flow", AIChE Journal
  32 (10), 1986, pp. 1743-1746: the title checked, the formulas below from memory).

No published worked example of a flashing cryogen through an orifice was found (searched: API 520
two-phase examples, omega-method examples, NASA SP-3046 real-gas critical-flow tables for nitrogen,
whose values were not at hand); none is invented here.
"""

import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from scipy.optimize import brentq

from cycle.errors import ScenarioError
from cycle.orifice import DEFAULT_DISCHARGE_COEFFICIENT, ValveSizing, hem_mass_flux, size_valve
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
    # These gases are not quite perfect here: |Z - 1| is 4e-4 to 2.4e-3 at the inlets, and gamma
    # changes along the expansion as cp does with temperature.  The differences measured are 3e-4
    # to 9e-4 (flux and throat pressure); 3e-3 allows for them, and a 1 % error in density or
    # enthalpy would fail.
    assert sized.choked
    assert sized.critical_mass_flux == pytest.approx(G_ideal, rel=3e-3)
    assert sized.throat_pressure == pytest.approx(p0 * (2 / (g + 1)) ** (g / (g - 1)), rel=3e-3)


@pytest.mark.parametrize("gas, T, p0", [("nitrogen", 300.0, 200e5), ("hydrogen", 300.0, 200e5),
                                        ("helium", 10.0, 20e5), ("methane", 250.0, 100e5)])
def test_a_choked_single_phase_flow_is_sonic_at_the_throat(gas, T, p0):
    fl = get_fluid(gas)
    inlet = fl.state_tp(T, p0)
    sized = size_valve(fl, inlet, 1e5)
    assert sized.choked and 1e5 < sized.throat_pressure < p0
    name, pt = fl.name, sized.throat_pressure
    rho, c = PropsSI("D", "P", pt, "S", inlet.s, name), PropsSI("A", "P", pt, "S", inlet.s, name)
    # dG/dp = 0 is u = c exactly; the throat is found to 1e-5 in ln p, which moves u / c by less
    # than 1e-5 (measured: 1e-6 or less).
    assert sized.critical_mass_flux / rho == pytest.approx(c, rel=1e-5)


def test_a_small_pressure_ratio_does_not_choke():
    fl = get_fluid("nitrogen")
    inlet = fl.state_tp(300.0, 5e5)
    sized = size_valve(fl, inlet, 4.5e5)
    assert not sized.choked and sized.throat_pressure == 4.5e5
    s0, h0 = PropsSI("S", "T", 300, "P", 5e5, "Nitrogen"), PropsSI("H", "T", 300, "P", 5e5, "Nitrogen")
    h, rho = PropsSI("H", "P", 4.5e5, "S", s0, "Nitrogen"), PropsSI("D", "P", 4.5e5, "S", s0, "Nitrogen")
    # the same flux from CoolProp directly: the two differ only by CoolProp's flash tolerance
    assert sized.critical_mass_flux == pytest.approx(rho * math.sqrt(2 * (h0 - h)), rel=1e-6)
    assert sized.to_dict()["throat_pressure_bar"] == sized.to_dict()["outlet_pressure_bar"] == 4.5


def direct_summation(name, p0, s0, p_out, steps=3000):
    """max over p of rho_t sqrt(-2 sum dp / rho) by the trapezoid rule along the isentrope (PropsSI)."""
    ps = np.geomspace(p0, p_out, steps)
    v = np.array([1.0 / PropsSI("D", "P", p, "S", s0, name) for p in ps])
    integral = np.concatenate([[0.0], np.cumsum(0.5 * (v[1:] + v[:-1]) * -np.diff(ps))])
    G = np.sqrt(2 * integral) / v
    k = int(np.argmax(G))
    return G[k], ps[k]


def grid_maximum(name, p0, h0, s0, p_out):
    """max over p of rho sqrt(2 (h0 - h)) (PropsSI): 400 log-spaced pressures, then 400 more
    between the neighbours of the best."""
    def G(p):
        return PropsSI("D", "P", p, "S", s0, name) * math.sqrt(2 * max(h0 - PropsSI("H", "P", p, "S", s0, name), 0))

    ps = np.geomspace(p0, p_out, 401)[1:]
    k = int(np.argmax([G(p) for p in ps]))
    fine = np.geomspace(ps[max(k - 1, 0)], ps[min(k + 1, len(ps) - 1)], 400)
    return max(G(p) for p in fine)


@pytest.mark.parametrize("case", ["saturated liquid", "subcooled liquid", "dense supercritical"])
def test_two_phase_flux_against_coolprop_directly(case):
    fl = get_fluid("nitrogen")
    if case == "saturated liquid":
        inlet, p_out = fl.saturated_liquid(20e5), 1e5
    elif case == "subcooled liquid":  # a dual-pressure second valve's kind of inlet
        inlet, p_out = fl.state_tp(100.0, 40e5), 1e5
    else:
        inlet, p_out = fl.state_tp(130.0, 200e5), 1.05e5
    sized = size_valve(fl, inlet, p_out)
    assert sized.choked
    # The grid maximum of the same formula: 800 PropsSI pressures in all, the second 400 within
    # 1.5e-2 in ln p of the maximum.  Where the maximum is a corner (the liquid's isentrope meeting
    # the saturation line) the grid misses it by up to its slope times the spacing (~5e-6).
    assert sized.critical_mass_flux == pytest.approx(grid_maximum("Nitrogen", inlet.p, inlet.h, inlet.s, p_out),
                                                     rel=1e-5)
    # The nozzle integral summed over 3000 log-spaced steps: the trapezoid rule and the grid's
    # maximum are good to ~1e-4.
    G, p_t = direct_summation("Nitrogen", inlet.p, inlet.s, p_out)
    assert sized.critical_mass_flux == pytest.approx(G, rel=2e-4)
    assert sized.throat_pressure == pytest.approx(p_t, rel=5e-3)


def leung_omega(name, p0):
    """Leung's omega method for a saturated liquid at p0 [Pa] (formulas from memory): omega =
    cp T0 p0 / v0 (v_fg / h_fg)^2; the critical pressure ratio eta solves eta^2 + (omega^2 -
    2 omega)(1 - eta)^2 + 2 omega^2 ln eta + 2 omega^2 (1 - eta) = 0; G = eta sqrt(p0 / (v0 omega))."""
    v0 = 1 / PropsSI("D", "P", p0, "Q", 0, name)
    v_fg = 1 / PropsSI("D", "P", p0, "Q", 1, name) - v0
    h_fg = PropsSI("H", "P", p0, "Q", 1, name) - PropsSI("H", "P", p0, "Q", 0, name)
    cp, T0 = PropsSI("CPMASS", "P", p0, "Q", 0, name), PropsSI("T", "P", p0, "Q", 0, name)
    w = cp * T0 * p0 / v0 * (v_fg / h_fg) ** 2
    eta = brentq(lambda e: e ** 2 + (w ** 2 - 2 * w) * (1 - e) ** 2 + 2 * w ** 2 * math.log(e) + 2 * w ** 2 * (1 - e),
                 1e-6, 1 - 1e-12)
    return eta * math.sqrt(p0 / (v0 * w)), eta


@pytest.mark.parametrize("gas, p0", [("nitrogen", 5e5), ("argon", 5e5), ("methane", 5e5)])
def test_a_flashing_saturated_liquid_agrees_with_the_omega_method(gas, p0):
    fl = get_fluid(gas)
    sized = size_valve(fl, fl.saturated_liquid(p0), 1e5)
    G, eta = leung_omega(fl.name, p0)
    # The omega method replaces the isentrope's specific volume by a function linear in 1/p from
    # the inlet; at these reduced pressures (0.1 to 0.15) that holds well: the differences
    # measured are 0.1 to 0.3 % (flux) and 1 % (pressure ratio).  At 20 bar nitrogen (0.6 of the
    # critical pressure) it is 8 %: the check is kept where the method is meant to hold.
    assert sized.choked
    assert sized.critical_mass_flux == pytest.approx(G, rel=1e-2)
    assert sized.throat_pressure / p0 == pytest.approx(eta, rel=2e-2)


def test_the_orifice_from_mass_flow_and_discharge_coefficient():
    fl = get_fluid("argon")
    inlet = fl.state_tp(160.0, 180e5)
    m = 0.02  # kg/s
    sized = size_valve(fl, inlet, 1.2e5, m, 0.7)
    # by hand: A = m / (Cd G), d = sqrt(4 A / pi)
    area = m / (0.7 * sized.critical_mass_flux)
    assert sized.orifice_area == pytest.approx(area, rel=1e-12)
    assert sized.orifice_diameter == pytest.approx(math.sqrt(4 * area / math.pi), rel=1e-12)
    out = sized.to_dict()
    assert out["valve_orifice_diameter_mm"] == pytest.approx(sized.orifice_diameter * 1e3, rel=1e-12)
    assert out["orifice_area_mm2"] == pytest.approx(area * 1e6, rel=1e-12)
    assert out["mass_flow_kg_per_h"] == pytest.approx(72.0, rel=1e-12)
    assert out["discharge_coefficient"] == 0.7 and out["valve_choked"] is True
    # the same valve with the default coefficient needs an orifice sqrt(0.7 / 0.61) times as wide
    default = size_valve(fl, inlet, 1.2e5, m)
    assert default.orifice_diameter / sized.orifice_diameter == pytest.approx(math.sqrt(0.7 / 0.61), rel=1e-9)


def test_without_a_mass_flow_the_orifice_is_unknown():
    fl = get_fluid("argon")
    without = size_valve(fl, fl.state_tp(160.0, 180e5), 1.2e5)
    assert isinstance(without, ValveSizing)
    assert without.mass_flow is None and without.orifice_area is None and without.orifice_diameter is None
    assert without.discharge_coefficient == DEFAULT_DISCHARGE_COEFFICIENT == 0.61
    out = without.to_dict()
    assert out["valve_orifice_diameter_mm"] is None and out["orifice_area_mm2"] is None
    assert out["mass_flow_kg_per_h"] is None
    assert out["inlet_pressure_bar"] == 180.0 and out["outlet_pressure_bar"] == 1.2


@pytest.mark.parametrize("bad", [0.0, -0.5, 1.2, float("nan"), "0.6", True])
def test_a_discharge_coefficient_outside_0_to_1_is_refused(bad):
    fl = get_fluid("nitrogen")
    with pytest.raises(ScenarioError, match="valve.discharge_coefficient must be above 0 and at most 1, got"):
        size_valve(fl, fl.state_tp(300.0, 5e5), 1e5, 0.01, bad)


def test_bad_pressures_and_flows_are_refused_in_one_line():
    fl = get_fluid("nitrogen")
    inlet = fl.state_tp(300.0, 5e5)
    for p_out in (5e5, 6e5, 0.0, -1e5, float("nan")):
        with pytest.raises(ScenarioError, match="needs an outlet pressure below its inlet pressure"):
            size_valve(fl, inlet, p_out)
    for m in (-0.01, float("nan")):
        with pytest.raises(ScenarioError, match="mass flow must be a number of kg/s, 0 or more"):
            size_valve(fl, inlet, 1e5, m)
    # saturated vapour at 0.2 bar still accelerates when its isentrope reaches the triple point
    # (0.125 bar; the ideal-gas choking ratio would be near 0.53): no maximum can be found
    with pytest.raises(ScenarioError) as err:
        size_valve(fl, fl.saturated_vapour(0.2e5), 0.01e5)
    text = str(err.value)
    assert "before its mass flux peaks" in text and "triple-point pressure" in text and "\n" not in text


@pytest.mark.parametrize("gas, T, p, p_out", [
    ("nitrogen", 130.0, 200e5, 1.05e5), ("argon", 160.0, 180e5, 1.2e5), ("hydrogen", 40.0, 120e5, 1.2e5),
    ("neon", 40.0, 100e5, 1.3e5), ("methane", 200.0, 100e5, 1.2e5), ("air", 140.0, 200e5, 1e5),
    ("nitrogen", 90.0, 20e5, 1e5), ("nitrogen", 130.0, 30e5, 1e5), ("air", 110.0, 40e5, 1e5),
    ("oxygen", 150.0, 100e5, 1e5), ("helium", 10.0, 20e5, 1e5),
])
def test_every_kind_of_inlet_gives_a_maximum(gas, T, p, p_out):
    fl = get_fluid(gas)
    inlet = fl.state_tp(T, p)
    sized = size_valve(fl, inlet, p_out)
    G = sized.critical_mass_flux
    assert math.isfinite(G) and G > 0 and sized.choked
    # a maximum: no nearby pressure passes more (1e-9 for the flash's noise)
    for nearby in (0.98, 0.999, 1.001, 1.02):
        p_near = min(max(sized.throat_pressure * nearby, p_out), p * 0.999)
        assert hem_mass_flux(fl, inlet, p_near) <= G * (1 + 1e-9)


def test_awkward_pressures_are_handled():
    fl = get_fluid("nitrogen")
    # an inlet or an outlet at exactly the critical pressure, where CoolProp's flash has no solution
    at_critical = size_valve(fl, fl.state_tp(130.0, fl.p_critical), 1e5)
    assert at_critical.choked and math.isfinite(at_critical.critical_mass_flux)
    to_critical = size_valve(fl, fl.state_tp(130.0, 200e5), fl.p_critical)
    assert not to_critical.choked and to_critical.throat_pressure == fl.p_critical
    assert to_critical.critical_mass_flux > 0
    # an outlet below the triple-point pressure (0.125 bar): the path ends where the liquid would
    # freeze, long after the flux has peaked (at 14 bar), so the answer is the one to 1 bar
    liquid = fl.saturated_liquid(20e5)
    below = size_valve(fl, liquid, 0.05e5)
    to_1_bar = size_valve(fl, liquid, 1e5)
    assert below.choked
    assert below.critical_mass_flux == pytest.approx(to_1_bar.critical_mass_flux, rel=1e-6)
    assert below.throat_pressure == pytest.approx(to_1_bar.throat_pressure, rel=1e-4)


def test_a_valve_in_every_layout():
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


def test_the_scan_stops_once_the_flux_has_fallen_past_its_maximum(monkeypatch):
    # Nitrogen from 200 bar, 130 K to 1.05 bar: the flux peaks near 19 bar (where the isentrope
    # meets the saturation line), between the fourth and fifth of the ten scanned pressures; the
    # scan stops after the sixth (8.6 bar), two falls later, and Brent's search refines between
    # the neighbours of the largest.  Nothing below 8 bar is evaluated; the maximum is the grid's.
    import cycle.orifice as orifice

    fl = get_fluid("nitrogen")
    inlet = fl.state_tp(130.0, 200e5)
    calls = []
    original = orifice.hem_mass_flux
    monkeypatch.setattr(orifice, "hem_mass_flux", lambda *a, **k: calls.append(a[2]) or original(*a, **k))
    sized = size_valve(fl, inlet, 1.05e5)
    assert min(calls) > 8e5 and sum(1 for p in calls if p < 10e5) == 1
    assert sized.critical_mass_flux == pytest.approx(grid_maximum("Nitrogen", inlet.p, inlet.h, inlet.s, 1.05e5),
                                                     rel=1e-5)
