"""Local heat transfer and friction of a tube-in-tube recuperator (cycle/heat_transfer.py).

Outside values, each named at its check: the published forms of Gnielinski's and Colebrook's
equations evaluated here by hand, exact laminar solutions (Shah and London 1978; Incropera and
DeWitt), Schmidt's critical Reynolds number of a coil, the NIST fit of 304 stainless steel's
conductivity with the value its published summary works out at 123.15 K, textbook worked examples
of the friction factor (White; Cengel and Cimbala), Incropera and DeWitt's table of laminar annulus
Nusselt numbers (tests/data/annulus_laminar_nusselt.csv), and handbook values of copper's
conductivity against the NIST OFHC copper fits (tests/data/copper_conductivity.csv).  No textbook
worked example of Gnielinski's turbulent tube or annulus equation was found to check against.
"""

import csv
import math
import pathlib

import pytest

from cycle import heat_transfer as hx
from cycle.errors import ScenarioError
from cycle.scenario import parse_scenario
import properties  # noqa: F401  (CoolProp loads here, at collection, not inside the first scenario test)

DATA = pathlib.Path(__file__).resolve().parent / "data"


def read_table(name):
    """Rows of a tests/data CSV (its # header lines skipped), as dictionaries of text."""
    with open(DATA / name, newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(line for line in handle if not line.startswith("#")))


def colebrook(Re, eD):
    """Colebrook's implicit equation, 1/sqrt(f) = -2 log10(eD/3.7 + 2.51/(Re sqrt(f))), solved
    here by fixed-point iteration (Colebrook 1939)."""
    x = 0.02 ** -0.5
    for _ in range(200):
        x = -2.0 * math.log10(eD / 3.7 + 2.51 * x / Re)
    return x ** -2


@pytest.mark.parametrize("Re, eD", [(1e4, 0.0), (5e4, 1e-4), (3e5, 1e-3)])
def test_tube_turbulent_is_gnielinski_with_colebrook(Re, eD):
    Pr, D = 0.72, 4e-3
    c = hx.tube(Re, Pr, D, eD * D)
    f = colebrook(Re, eD)
    # Gnielinski (1976): Nu = (f/8)(Re - 1000) Pr / (1 + 12.7 sqrt(f/8)(Pr^(2/3) - 1))
    nu = (f / 8) * (Re - 1000) * Pr / (1 + 12.7 * math.sqrt(f / 8) * (Pr ** (2 / 3) - 1))
    assert c.regime == "turbulent"
    assert c.friction == pytest.approx(f, rel=1e-9)
    assert c.nusselt == pytest.approx(nu, rel=1e-9)


def test_smooth_tube_friction_on_the_moody_chart():
    # Smooth tube at Re = 1e5: f = 0.0180 (Moody chart; Colebrook gives 0.01799; from memory).
    assert hx.tube(1e5, 0.7, 0.01).friction == pytest.approx(0.0180, abs=2e-4)


def test_gnielinski_and_dittus_boelter_agree_where_both_hold():
    # Dittus-Boelter, Nu = 0.023 Re^0.8 Pr^0.4 (heating), agrees with Gnielinski to about 10-15 %
    # for gases at Re 1e4 to 1e5 (common practice: the two are quoted side by side in heat-transfer texts).
    for Re in (2e4, 1e5):
        assert hx.tube(Re, 0.7, 0.01).nusselt == pytest.approx(0.023 * Re ** 0.8 * 0.7 ** 0.4, rel=0.15)


def test_laminar_tube_and_a_continuous_transition():
    # Developed laminar flow, uniform heat flux: Nu = 48/11, f = 64/Re (Incropera and DeWitt, ch. 8).
    c = hx.tube(1000.0, 0.7, 0.01)
    assert c.regime == "laminar" and c.nusselt == pytest.approx(48 / 11) and c.friction == pytest.approx(0.064)
    below, above = hx.tube(2299.999, 0.7, 0.01), hx.tube(2300.001, 0.7, 0.01)
    assert above.regime == "transitional" and above.nusselt == pytest.approx(below.nusselt, rel=1e-5)
    end, turbulent = hx.tube(9999.999, 0.7, 0.01), hx.tube(1e4, 0.7, 0.01)
    assert end.nusselt == pytest.approx(turbulent.nusselt, rel=1e-5)


def test_turbulent_heat_transfer_rises_about_as_re_to_the_0_8():
    for a_Re in (3e4, 1e5):
        tube = hx.tube(2 * a_Re, 0.7, 0.005).nusselt / hx.tube(a_Re, 0.7, 0.005).nusselt
        ring = hx.annulus(2 * a_Re, 0.7, 0.5, 0.003).nusselt / hx.annulus(a_Re, 0.7, 0.5, 0.003).nusselt
        assert tube == pytest.approx(2 ** 0.8, rel=0.05) and ring == pytest.approx(2 ** 0.8, rel=0.05)


def test_annulus_laminar_friction_has_the_exact_limits():
    # f Re = 64 (1 - a)^2 / [1 + a^2 + (1 - a^2) / ln a] (Shah and London 1978): 64 for a pipe
    # (a -> 0), 96 for parallel plates (a -> 1); about 95.3 at a = 0.5 (from the formula).
    Re = 1000.0
    assert hx.annulus(Re, 0.7, 1e-6, 0.01).friction * Re == pytest.approx(64.0, rel=0.08)
    assert hx.annulus(Re, 0.7, 0.999, 0.01).friction * Re == pytest.approx(96.0, rel=1e-3)
    a = 0.5
    exact = 64 * (1 - a) ** 2 / (1 + a * a + (1 - a * a) / math.log(a))
    assert hx.annulus(Re, 0.7, a, 0.01).friction * Re == pytest.approx(exact, rel=1e-12)
    assert hx.annulus(Re, 0.7, a, 0.01).nusselt == pytest.approx(3.66 + 1.2 * a ** -0.8, rel=1e-12)


def test_annulus_turbulent_by_hand():
    # Gnielinski (2009), evaluated here by hand for a = 0.4, Re = 3e4, Pr = 0.7, no entry term.
    a, Re, Pr = 0.4, 3e4, 0.7
    re_star = Re * ((1 + a * a) * math.log(a) + (1 - a * a)) / ((1 - a) ** 2 * math.log(a))
    f = (1.8 * math.log10(re_star) - 1.5) ** -2
    k1 = 1.07 + 900 / Re - 0.63 / (1 + 10 * Pr)
    nu = (f / 8) * Re * Pr / (k1 + 12.7 * math.sqrt(f / 8) * (Pr ** (2 / 3) - 1)) * 0.75 * a ** -0.17
    c = hx.annulus(Re, Pr, a, 0.006)
    assert c.regime == "turbulent" and c.nusselt == pytest.approx(nu, rel=1e-12) and c.friction == pytest.approx(f)


def test_a_coil_transfers_more_and_stays_laminar_longer():
    # Schmidt: Re_crit = 2300 [1 + 8.6 (d / D_coil)^0.45] (fluids.helical_Re_crit); here d/D = 0.02.
    d, Dc = 4e-3, 0.2
    assert hx.tube(5000.0, 0.7, d, coil_diameter=Dc).regime == "laminar"
    from fluids import helical_Re_crit

    assert helical_Re_crit(Di=d, Dc=Dc) == pytest.approx(2300 * (1 + 8.6 * 0.02 ** 0.45), rel=1e-9)  # about 5700
    coil, straight = hx.tube(3e4, 0.7, d, coil_diameter=Dc), hx.tube(3e4, 0.7, d)
    assert coil.regime == "turbulent"
    assert coil.nusselt > straight.nusselt and coil.friction > straight.friction


def test_stainless_steel_conductivity_from_the_nist_fit():
    # NIST fit (Marquardt, Le and Radebaugh 2000) for 304 stainless steel: its published summary
    # works the fit out as 10.22 W/(m K) at 123.15 K; at 300 K it gives about 15 W/(m K).
    assert hx.wall_conductivity("stainless steel 304", 123.15) == pytest.approx(10.22, abs=0.01)
    assert hx.wall_conductivity("stainless steel 304", 300.0) == pytest.approx(15.0, rel=0.03)
    assert hx.wall_conductivity("stainless steel 304", 400.0) == hx.wall_conductivity("stainless steel 304", 300.0)


def test_conductance_per_length_by_hand():
    g = hx.TubeInTube(tubes=3, inner_inside=4e-3, inner_outside=6e-3, outer_inside=10e-3)
    h_i, h_o, k = 2000.0, 800.0, 15.0
    r = 1 / (h_i * math.pi * 4e-3) + math.log(6 / 4) / (2 * math.pi * k) + 1 / (h_o * math.pi * 6e-3)
    assert g.conductance_per_length(h_i, h_o, k) == pytest.approx(3 / r, rel=1e-12)
    assert g.annulus_hydraulic_diameter == pytest.approx(4e-3) and g.diameter_ratio == pytest.approx(0.6)
    assert g.annulus_area == pytest.approx(3 * math.pi * (1e-4 - 3.6e-5) / 4, rel=1e-12)


# -- Textbook worked examples of the friction factor -------------------------------------------

def test_white_example_oil_in_a_cast_iron_pipe():
    # F. M. White, Fluid Mechanics, McGraw-Hill, ch. 6, Example 6.7 (its number in the edition whose
    # text was read; other editions may number it differently): oil of nu = 1e-5 m2/s at 0.2 m3/s
    # through 500 m of 200 mm cast-iron pipe, epsilon = 0.26 mm (White's Table 6.1), so
    # epsilon/d = 0.0013 and Re_d = V d / nu = 128,000 as the example rounds it.
    Q, d, nu, eps, L, g = 0.2, 0.2, 1e-5, 0.26e-3, 500.0, 9.81
    V = Q / (math.pi * d * d / 4)
    Re = V * d / nu
    assert V == pytest.approx(6.4, abs=0.05) and Re == pytest.approx(128_000, rel=0.01)  # the example's V and Re
    f = hx.tube(Re, 10.0, d, eps).friction  # the Prandtl number does not enter the friction factor
    # "Read f = 0.0225" off the Moody chart, interpolating at epsilon/d = 0.0013 (the example's
    # text): a chart reading, good to about 2 %.
    assert f == pytest.approx(0.0225, rel=0.02)
    # The example's Colebrook value, f = 0.0227, and head loss, h_f = f (L/d) V^2 / 2g = 117 m:
    # both FROM MEMORY of the example; to its three figures.
    assert f == pytest.approx(0.0227, abs=1e-4)
    assert f * (L / d) * V * V / (2 * g) == pytest.approx(117.0, abs=0.5)


def test_cengel_cimbala_example_water_in_a_stainless_pipe():
    # Y. A. Cengel and J. M. Cimbala, Fluid Mechanics: Fundamentals and Applications, McGraw-Hill,
    # ch. 8, example "Determining the head loss in a water pipe" (Example 8-3 in the edition the
    # FOSSEE Scilab textbook companion transcribes; its inputs were read there): water at 60 degF,
    # rho = 62.36 lbm/ft3, mu = 7.536e-4 lbm/(ft s), 0.2 ft3/s through 200 ft of 2 in stainless
    # pipe, epsilon = 0.000007 ft.  Worked here in the example's own units (Re and epsilon/D do
    # not care).
    rho, mu, D, Q, L, g = 62.36, 7.536e-4, 2 / 12, 0.2, 200.0, 32.2
    V = Q / (math.pi * D * D / 4)
    Re = rho * V * D / mu
    f = hx.tube(Re, 7.0, D, 0.000007).friction
    # The example's Re = 126,400, f = 0.0174 (Colebrook) and head loss h_L = 27.3 ft: FROM MEMORY
    # of the example; to its three or four figures.
    assert Re == pytest.approx(126_400, rel=1e-3)
    assert f == pytest.approx(0.0174, abs=1e-4)
    assert f * (L / D) * V * V / (2 * g) == pytest.approx(27.3, abs=0.1)


@pytest.mark.parametrize("row", read_table("annulus_laminar_nusselt.csv"), ids=lambda r: r["diameter_ratio"])
def test_laminar_annulus_against_incropera_table(row):
    # Incropera and DeWitt, ch. 8, the annulus table (tests/data/annulus_laminar_nusselt.csv):
    # heat through the inner wall, the outer insulated.  The code's 3.66 + 1.2 a^-0.8 is Martin's
    # fit to these exact solutions (VDI Heat Atlas, G2); 4 % covers its largest miss, at the
    # thinnest core (3.5 % at a = 0.05; 0.98 % at a = 0.25 and less above).
    a, published = float(row["diameter_ratio"]), float(row["nusselt_inner"])
    c = hx.annulus(1000.0, 0.7, a, 0.01)
    assert c.regime == "laminar"
    assert c.nusselt == pytest.approx(published, rel=0.04 if a < 0.25 else 0.01)


# -- Copper walls -------------------------------------------------------------------------------

@pytest.mark.parametrize("row", read_table("copper_conductivity.csv"),
                         ids=lambda r: f"{r['source']}-{r['material']}-{r['T_K']}K")
def test_copper_conductivity_against_handbook_values(row):
    # CDA fact sheet (2001) and Incropera and DeWitt, Table A.1 (from memory): see the CSV's header
    # for the sources and for why each tolerance is what it is.
    k = hx.wall_conductivity(row["material"], float(row["T_K"]))
    assert k == pytest.approx(float(row["k_W_per_mK"]), rel=float(row["tolerance_rel"]))


def test_copper_purity_matters_cold_and_hardly_warm():
    # Matthiessen's rule (common practice): impurities add a resistivity that does not depend on
    # temperature, so below about 50 K the conductivity rises with RRR, while near room temperature,
    # where the lattice's share dominates, the grades lie within a few per cent of each other.
    names = ["copper RRR 50", "copper", "copper RRR 150", "copper RRR 300", "copper RRR 500"]  # RRR rising
    cold = [hx.wall_conductivity(n, 20.0) for n in names]
    warm = [hx.wall_conductivity(n, 300.0) for n in names]
    assert all(b > 1.2 * a for a, b in zip(cold, cold[1:]))
    assert max(warm) / min(warm) < 1.03
    # And copper conducts some 70 times better than 304 stainless steel at 77 K (547 against 7.9).
    ratio = hx.wall_conductivity("copper", 77.0) / hx.wall_conductivity("stainless steel 304", 77.0)
    assert 60 < ratio < 80


def test_copper_is_flat_outside_its_fit_like_304():
    # The NIST copper fits hold from 4 to 300 K; outside, the end value is kept (as for 304).
    for name in ("copper", "copper RRR 500"):
        assert hx.wall_conductivity(name, 400.0) == hx.wall_conductivity(name, 300.0)
        assert hx.wall_conductivity(name, 2.0) == hx.wall_conductivity(name, 4.0)
        assert hx.wall_conductivity(name, 299.0) > hx.wall_conductivity(name, 300.0)  # still falling at the end


def _bench(wall_material):
    return {"gas": "nitrogen", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
            "compressor": {"isothermal_efficiency": 0.6},
            "recuperator": {"min_approach": "3 K", "zones": 30,
                            "geometry": {"tubes": 6, "inner_tube": {"inner_diameter": "4 mm", "outer_diameter": "6 mm"},
                                         "outer_tube": {"inner_diameter": "12 mm"},
                                         "wall_material": wall_material}},
            "production": {"compressor_flow": "30 kg/h"}}


@pytest.mark.parametrize("given, name", [("copper", "copper"), ("Copper RRR 50", "copper RRR 50"),
                                         ("  copper   rrr 300 ", "copper RRR 300"),
                                         ("Stainless Steel 304", "stainless steel 304")])
def test_a_scenario_names_a_wall_material(given, name):
    geometry = parse_scenario(_bench(given)).recuperator.geometry
    assert geometry.wall_material == name and geometry.wall_conductivity is None
    assert name in hx.WALL_MATERIALS


@pytest.mark.parametrize("given", ["brass", "copper RRR 75", "304", ""])
def test_an_unknown_wall_material_gets_one_line_listing_the_names(given):
    with pytest.raises(ScenarioError) as info:
        parse_scenario(_bench(given))
    message = str(info.value)
    assert "\n" not in message
    assert message.startswith("recuperator.geometry.wall_material must be one of stainless steel 304, copper, "
                              "copper RRR 50, copper RRR 150, copper RRR 300, copper RRR 500, got ")


# -- the array forms the march uses, against the scalar ones (and so against ht and fluids) ------

RE_GRID = [500.0, 2299.0, 2300.0, 3000.0, 6000.0, 9999.0, 1e4, 2.5e4, 1e5, 7e5, 4e6]
PR_GRID = [0.68, 0.9, 1.0, 2.5]


@pytest.mark.parametrize("coil", [None, 0.3])
@pytest.mark.parametrize("roughness", [0.0, 1.5e-6, 5e-5])
def test_tube_zones_equal_the_scalar_tube(coil, roughness):
    import numpy as np

    d = 6e-3
    Re = np.array([r for r in RE_GRID for _ in PR_GRID])
    Pr = np.array([p for _ in RE_GRID for p in PR_GRID])
    nu, fd, regimes = hx.tube_zones(Re, Pr, d, roughness, coil)
    for k in range(Re.size):
        one = hx.tube(Re[k], Pr[k], d, roughness, coil)
        assert nu[k] == pytest.approx(one.nusselt, rel=1e-12), (Re[k], Pr[k])
        assert fd[k] == pytest.approx(one.friction, rel=1e-12), (Re[k], Pr[k])
        assert regimes[k] == one.regime


@pytest.mark.parametrize("a", [0.2, 0.36, 0.8])
def test_annulus_zones_equal_the_scalar_annulus(a):
    import numpy as np

    d_h = 14e-3
    Re = np.array([r for r in RE_GRID for _ in PR_GRID])
    Pr = np.array([p for _ in RE_GRID for p in PR_GRID])
    nu, fd, regimes = hx.annulus_zones(Re, Pr, a, d_h)
    for k in range(Re.size):
        one = hx.annulus(Re[k], Pr[k], a, d_h)
        assert nu[k] == pytest.approx(one.nusselt, rel=1e-12), (Re[k], Pr[k])
        assert fd[k] == pytest.approx(one.friction, rel=1e-12), (Re[k], Pr[k])
        assert regimes[k] == one.regime


def test_wall_conductivity_on_arrays_equals_the_scalar():
    import numpy as np

    T = np.array([2.0, 20.0, 77.0, 150.0, 300.0, 350.0])
    for name in hx.WALL_MATERIALS:
        many = hx.wall_conductivity(name, T)
        assert many == pytest.approx([hx.wall_conductivity(name, float(t)) for t in T], rel=1e-13)
