"""Tests of hydrogen with its para fraction as a state variable (``properties/orthopara.py``).

First the numbers, each against an outside source named beside it (the table in
``tests/data/equilibrium_para_fraction.csv``), then the laws (limits, the Gibbs-energy minimum,
the reference state against the partition functions), then the 75/25 mixture against CoolProp's
normal-hydrogen equation of state, then the errors a user sees.
"""

import csv
import dataclasses
import math
import pathlib

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from properties import PropertyRangeError, get_fluid
from properties.orthopara import (
    GAS_CONSTANT,
    NORMAL_PARA_FRACTION,
    OrthoParaState,
    equilibrium_para_fraction,
    get_ortho_para_hydrogen,
    normal_to_equilibrium_heat,
    rotational_functions,
)

DATA = pathlib.Path(__file__).parent / "data"
ATM = 101325.0  # Pa
BAR = 1e5  # Pa
KJ = 1e3  # J


@pytest.fixture(scope="module")
def hydrogen():
    return get_ortho_para_hydrogen()


def read_table(name):
    with open(DATA / name, newline="") as fh:
        return list(csv.DictReader(line for line in fh if not line.startswith("#")))


# -- 1. the equilibrium para fraction -----------------------------------------------------

@pytest.mark.parametrize("row", read_table("equilibrium_para_fraction.csv"), ids=lambda r: r["temperature_K"])
def test_equilibrium_para_fraction_matches_the_published_table(row):
    # Woolley, Scott and Brickwedde (1948) / NBS Monograph 168 (from memory), and one stored
    # encyclopaedia value; sources and tolerances explained in the CSV header.
    T = float(row["temperature_K"])
    assert equilibrium_para_fraction(T) == pytest.approx(float(row["para_fraction"]), abs=float(row["tolerance_abs"]))


def test_equilibrium_para_fraction_tends_to_a_quarter_when_hot_and_to_one_when_cold():
    # Limits of the nuclear-spin statistics (3 ortho spin states to 1 para): common practice.
    # 0.25 in mole fraction is 0.249994 in mass fraction (the two equations of state's molar
    # masses differ by 3e-5), hence 2e-5.
    assert equilibrium_para_fraction(1000.0) == pytest.approx(0.25, abs=2e-5)
    assert equilibrium_para_fraction(500.0) == pytest.approx(0.25, abs=2e-5)
    assert equilibrium_para_fraction(10.0) == pytest.approx(1.0, abs=1e-6)  # 1 - 9 exp(-17) ~ 4e-7
    assert equilibrium_para_fraction(0.5) == 1.0


def test_equilibrium_para_fraction_falls_steadily_with_temperature():
    T = np.geomspace(5.0, 400.0, 200)
    x = np.array([equilibrium_para_fraction(t) for t in T])
    assert np.all(np.diff(x) < 0)


# -- 2. conversion heats and the latent heat ----------------------------------------------

def test_ortho_to_para_conversion_heat_in_the_cold_gas_is_the_J1_level(hydrogen):
    # About 703 kJ/kg of ortho converted near 20 K (from memory; E(J=1) - E(J=0) = 118.49 cm^-1,
    # 170.5 K, 1417 J/mol). 1.5 kJ/kg covers memory of the last figure. Gas at 1 kPa, 20 K.
    assert hydrogen.conversion_heat(20.0, 1e3, 0.0, 1.0) == pytest.approx(703 * KJ, abs=1.5 * KJ)


def test_ortho_to_para_conversion_heat_in_the_liquid_is_that_of_free_rotation(hydrogen):
    # The molecules rotate almost freely in liquid hydrogen, so the conversion heat there is close
    # to the gas value (Farkas 1935, ch. 1; common practice). The equations of state put it 0.5 %
    # lower (ortho's latent heat is 4.4 kJ/kg above para's); 1 % allowed.
    liquid = hydrogen.conversion_heat(20.0, ATM, 0.0, 1.0)
    gas = hydrogen.conversion_heat(20.0, 1e3, 0.0, 1.0)
    assert hydrogen.state_tp(20.0, ATM, 0.5).phase == "liquid"
    assert liquid == pytest.approx(gas, rel=0.01)
    assert liquid < gas


def test_normal_to_equilibrium_heat_at_the_normal_boiling_point():
    # 525-527 kJ/kg at 20.39 K (from memory of the NBS tables, McCarty, Hord and Roder, NBS
    # Monograph 168, 1981; and of Barron, Cryogenic Systems, 2nd ed., 1985, ch. 4): 526 +- 2.
    assert normal_to_equilibrium_heat(20.39) == pytest.approx(526 * KJ, abs=2 * KJ)
    # Same quantity from the equations of state in the liquid: within 1 % (free rotation, above).
    hydrogen = get_ortho_para_hydrogen()
    x_eq = equilibrium_para_fraction(20.2)
    eos = hydrogen.conversion_heat(20.2, ATM, NORMAL_PARA_FRACTION, x_eq)
    assert eos == pytest.approx(normal_to_equilibrium_heat(20.2), rel=0.01)


def test_normal_to_equilibrium_heat_vanishes_at_room_temperature():
    # At 300 K normal hydrogen is equilibrium hydrogen to within 7e-4 in para fraction (the table
    # above): the heat is a few tens of J/kg, under 0.1 kJ/kg.
    assert abs(normal_to_equilibrium_heat(300.0)) < 0.1 * KJ
    assert normal_to_equilibrium_heat(77.0) > 100 * KJ  # half the conversion is left at 77 K


def test_conversion_heat_exceeds_the_latent_heat_of_para_at_1_atm():
    # Latent heat of parahydrogen at 1 atm about 446 kJ/kg (from memory, NBS tables of para
    # hydrogen; 1 %). That the normal-to-equilibrium heat exceeds it, so that unconverted
    # liquid boils itself away, is the trade's reason for catalysts in liquefiers (common
    # practice).
    para = get_fluid("ParaHydrogen")
    latent = para.saturated_vapour(ATM).h - para.saturated_liquid(ATM).h
    assert latent == pytest.approx(446 * KJ, rel=0.01)
    assert normal_to_equilibrium_heat(20.27) > 1.1 * latent


# -- 3. laws: the reference state and the equilibrium --------------------------------------

@pytest.mark.parametrize("T", [20.0, 50.0, 100.0, 200.0, 300.0, 500.0])
def test_ortho_minus_para_in_the_ideal_gas_follows_the_partition_functions(hydrogen, T):
    # The two equations of state's ideal-gas heat capacities against the rotational partition
    # functions: after tying the reference at 300 K, H_o - H_p stays within 1 J/mol (found 0.4)
    # and S_o - S_p within 0.01 J/(mol K) (found 0.003) from 20 to 500 K. Gas at 1 Pa.
    zp, zo, Up, Uo = rotational_functions(T)
    ortho, para = hydrogen.state_tp(T, 1.0, 0.0), hydrogen.state_tp(T, 1.0, 1.0)
    dH = ortho.h * hydrogen.ortho_molar_mass - para.h * hydrogen.para_molar_mass
    dS = ortho.s * hydrogen.ortho_molar_mass - para.s * hydrogen.para_molar_mass
    assert dH == pytest.approx(GAS_CONSTANT * (Uo - Up), abs=1.0)
    assert dS == pytest.approx(GAS_CONSTANT * (math.log(zo / zp) + (Uo - Up) / T), abs=0.01)


@pytest.mark.parametrize("T,p", [(25.0, 1e3), (50.0, 1e4), (77.0, 1e5), (150.0, 1e5), (300.0, 1e5)])
def test_gibbs_energy_is_lowest_at_the_equilibrium_para_fraction(hydrogen, T, p):
    # Chemical equilibrium ortho <-> para: g = h - T s (ideal mixing entropy included) is least at
    # x_eq(T) from the partition functions. In the gas the residual parts of the two modifications
    # nearly cancel; found within 7e-5, 2e-4 allowed. Without the mixing entropy or the spin
    # degeneracy the minimum would lie at x = 0 or x = 1.
    def g(x):
        return hydrogen.h(T, p, x) - T * hydrogen.s(T, p, x)

    found = minimize_scalar(g, bounds=(1e-7, 1 - 1e-7), method="bounded", options={"xatol": 1e-9}).x
    assert found == pytest.approx(equilibrium_para_fraction(T), abs=2e-4)


def test_para_keeps_coolprops_reference_and_mixing_entropy_is_ideal(hydrogen):
    # Para fraction 1 is CoolProp's parahydrogen (h = s = 0 for saturated liquid at 1 atm); at
    # x = 0.5 the entropy is the mean plus R ln 2 / M (ideal mixing of equal numbers of moles).
    para = get_fluid("ParaHydrogen").state_tp(100.0, 10 * BAR)
    mix = hydrogen.state_tp(100.0, 10 * BAR, 1.0)
    assert (mix.h, mix.s, mix.density) == (para.h, para.s, para.density)
    s0, s1, s5 = (hydrogen.s(100.0, 10 * BAR, x) for x in (0.0, 1.0, 0.5))
    assert s5 - (s0 + s1) / 2 == pytest.approx(GAS_CONSTANT * math.log(2) / hydrogen.molar_mass(0.5), rel=1e-4)


# -- 4. the 75/25 mixture against CoolProp's normal hydrogen ------------------------------

_GRID_T = [15, 18, 20, 22, 25, 28, 30, 32, 33.5, 35, 40, 50, 60, 80, 100, 150, 200, 300, 500, 1000]
_GRID_P = [0.5, 1, 2, 5, 10, 15, 20, 50, 100, 200]  # bar


def _normal_vs_mixture():
    hydrogen, normal = get_ortho_para_hydrogen(), get_fluid("Hydrogen")
    ref_mix, ref_n = hydrogen.state_tp(300.0, BAR, 0.25), normal.state_tp(300.0, BAR)
    rows = []
    for T in _GRID_T:
        for p in _GRID_P:
            try:
                a, b = hydrogen.state_tp(float(T), p * BAR, 0.25), normal.state_tp(float(T), p * BAR)
            except PropertyRangeError:  # near saturation, below melting, or the two-phase band
                continue
            rows.append((T, (a.h - ref_mix.h) - (b.h - ref_n.h), (a.s - ref_mix.s) - (b.s - ref_n.s),
                         a.density / b.density - 1))
    return np.array(rows)


def test_normal_mixture_agrees_with_coolprops_normal_hydrogen():
    # CoolProp's normal-hydrogen equation of state (Leachman et al. 2009, fitted to measurements of
    # normal hydrogen) against the 3:1 ideal mixture of its ortho and para equations (ortho built by
    # corresponding states): differences from the state at 300 K, 1 bar. Found: above 40 K |dh|
    # <= 1.9 kJ/kg, |ds| <= 21 J/(kg K), density 0.31 %; over the whole grid (liquid and the
    # critical region included) 3.2 kJ/kg, 75 J/(kg K), 1.05 %. Bounds a little above those.
    rows = _normal_vs_mixture()
    assert len(rows) > 150  # the grid was mostly single-phase: the comparison did happen
    warm = rows[rows[:, 0] >= 40]
    assert np.abs(warm[:, 1]).max() < 2.5 * KJ
    assert np.abs(warm[:, 2]).max() < 25.0
    assert np.abs(warm[:, 3]).max() < 0.004
    assert np.abs(rows[:, 1]).max() < 3.5 * KJ
    assert np.abs(rows[:, 2]).max() < 80.0
    assert np.abs(rows[:, 3]).max() < 0.012


# -- 5. the interface and its errors --------------------------------------------------------

def test_state_is_frozen_data_in_si_units(hydrogen):
    state = hydrogen.state_tp(80.0, 20 * BAR, 0.5)
    assert isinstance(state, OrthoParaState)
    assert state.to_dict()["para_fraction"] == 0.5 and state.phase == "supercritical fluid"
    assert 5.0 < state.density < 7.0  # ideal gas: p M / (R T) = 6.06 kg/m3; Z slightly above 1
    with pytest.raises(dataclasses.FrozenInstanceError):
        state.h = 0.0
    eq = hydrogen.equilibrium_state(80.0, 20 * BAR)
    assert eq.para_fraction == pytest.approx(equilibrium_para_fraction(80.0))
    assert hydrogen.conversion_heat(80.0, 20 * BAR, 0.3, 0.3) == 0.0


@pytest.mark.parametrize("args,words", [
    ((100.0, BAR, 1.2), ["para fraction must be from 0 to 1", "1.2"]),
    ((100.0, BAR, float("nan")), ["para fraction", "nan"]),
    ((100.0, -BAR, 0.5), ["pressure must be a positive"]),
    ((2000.0, BAR, 0.5), ["2000 K", "1000 K"]),
    ((20.3, ATM, 0.5), ["20.3 K", "para is", "two-phase region"]),
    ((13.9, ATM, 0.5), ["13.9", "OrthoHydrogen"]),
])
def test_out_of_range_states_are_refused_in_one_line(hydrogen, args, words):
    with pytest.raises(PropertyRangeError) as err:
        hydrogen.state_tp(*args)
    message = str(err.value)
    assert "\n" not in message
    for word in words:
        assert word in message


def test_pure_para_is_available_below_orthos_triple_point(hydrogen):
    # 13.9 K lies between the triple points of para (13.80 K) and ortho (14.01 K).
    assert hydrogen.state_tp(13.9, ATM, 1.0).phase == "liquid"


@pytest.mark.parametrize("T", [0.0, -5.0, 1500.0, float("inf"), "300"])
def test_partition_functions_refuse_temperatures_outside_their_range(T):
    with pytest.raises(PropertyRangeError, match="above 0 K and at most 1000 K"):
        equilibrium_para_fraction(T)
    with pytest.raises(PropertyRangeError):
        normal_to_equilibrium_heat(T)


# -- storage loss by self-conversion --------------------------------------------------------

def test_normal_liquid_boils_off_as_the_textbooks_say():
    # Normal liquid hydrogen in a perfectly insulated store: about 18 % evaporated in the first
    # 24 h and about 40 % in 100 h (R. F. Barron, *Cryogenic Systems*, 2nd ed., 1985, on the
    # second-order rate of Scott, Brickwedde, Urey and Wahl 1934; both figures from memory, so
    # 2 percentage points); about half in a week (the same source, from memory).
    from properties.orthopara import storage_loss_fraction

    assert storage_loss_fraction(24.0) == pytest.approx(0.18, abs=0.02)
    assert storage_loss_fraction(100.0) == pytest.approx(0.40, abs=0.025)
    assert storage_loss_fraction(168.0) == pytest.approx(0.50, abs=0.03)


def test_storage_loss_by_hand_and_its_limits():
    # The closed form checked by hand: x_o0 = 0.75, k = 0.0114 /h, 24 h -> x_o = 0.75 / 1.2052;
    # with q / L from the equations of state at 1 atm.
    from properties.orthopara import (SELF_CONVERSION_RATE, STORAGE_PRESSURE, STORAGE_TEMPERATURE,
                                      get_ortho_para_hydrogen, storage_loss_fraction)
    from properties import get_fluid

    model = get_ortho_para_hydrogen()
    q = model.conversion_heat(STORAGE_TEMPERATURE, STORAGE_PRESSURE, 0.0, 1.0)
    assert q == pytest.approx(700e3, rel=0.01)  # ortho -> para in the liquid, ~700 kJ/kg (checked above)
    L = [get_fluid(n).saturated_vapour(STORAGE_PRESSURE).h - get_fluid(n).saturated_liquid(STORAGE_PRESSURE).h
         for n in ("ParaHydrogen", "OrthoHydrogen")]
    latent = 0.25 * L[0] + 0.75 * L[1]
    x_o = 0.75 / (1 + SELF_CONVERSION_RATE * 0.75 * 24.0)
    assert storage_loss_fraction(24.0) == pytest.approx(1 - math.exp(-q / latent * (0.75 - x_o)), rel=1e-12)
    assert storage_loss_fraction(0.0) == 0.0
    assert storage_loss_fraction(24.0, 1.0) == 0.0  # all para: nothing to convert
    # More para at the start, less loss; and the loss never reaches the whole batch.
    losses = [storage_loss_fraction(100.0, x) for x in (0.25, 0.5, 0.9, 0.99)]
    assert losses == sorted(losses, reverse=True)
    assert storage_loss_fraction(1e7) < 1 - math.exp(-q / latent * 0.75) + 1e-6


@pytest.mark.parametrize("hours, x", [(-1.0, 0.25), (float("nan"), 0.25), (24.0, 1.2), ("a day", 0.25)])
def test_storage_loss_refuses_bad_input_in_one_line(hours, x):
    from properties import PropertyRangeError
    from properties.orthopara import storage_loss_fraction

    with pytest.raises(PropertyRangeError) as err:
        storage_loss_fraction(hours, x)
    assert "\n" not in str(err.value)


@pytest.mark.parametrize("T, p, x", [(300.0, 1e5, 0.25), (80.0, 200e5, 0.5), (40.0, 30e5, 0.9), (25.0, 5e5, 1.0),
                                     (18.0, ATM, 0.25), (60.0, ATM, 0.0), (33.5, 13.5e5, 0.6)])
def test_state_ph_round_trips_state_tp(T, p, x):
    model = get_ortho_para_hydrogen()
    st = model.state_tp(T, p, x)
    back = model.state_ph(p, st.h, x)
    assert back.T == pytest.approx(T, abs=1e-7)
    assert back.s == pytest.approx(st.s, rel=1e-9, abs=1e-6)


def test_state_ph_refuses_the_two_phase_band_in_one_line():
    model = get_ortho_para_hydrogen()
    liquid, vapour = model.state_tp(19.0, ATM, 0.5), model.state_tp(22.0, ATM, 0.5)
    with pytest.raises(PropertyRangeError, match="two-phase") as err:
        model.state_ph(ATM, 0.5 * (liquid.h + vapour.h), 0.5)
    assert "\n" not in str(err.value)
    with pytest.raises(PropertyRangeError):
        model.state_ph(-1.0, 0.0, 0.5)
