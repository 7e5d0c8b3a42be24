"""Local heat transfer and friction of a tube-in-tube recuperator (cycle/heat_transfer.py).

Outside values, each named at its check: the published forms of Gnielinski's and Colebrook's
equations evaluated here by hand, exact laminar solutions (Shah and London 1978; Incropera and
DeWitt), Schmidt's critical Reynolds number of a coil, and the NIST fit of 304 stainless steel's
conductivity with the value its published summary works out at 123.15 K.  No textbook worked
example of these correlations was at hand in this session.
"""

import math

import pytest

from cycle import heat_transfer as hx


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
