"""lhsim against a published comparison of air liquefaction systems.

Source of every check value here: K. D. Timmerhaus, "Cryogenic Process Engineering", in
*Encyclopedia of Physical Science and Technology*, 3rd ed., Vol. 4, Academic Press, 2001, p. 22,
Table II "Comparison of several liquefaction systems using air as the working fluid", copied
with its header into ``tests/data/air-liquefaction-systems.csv``.  The table's assumptions
(inlet 294.4 K and 0.1 MPa, compressor isothermal efficiency eta_c, heat-exchanger
effectiveness eps, intermediate-pressure flow fraction i) are turned into lhsim scenarios by
:func:`scenario_for`; ``docs/make_air_table.py`` uses the same helpers to write
``docs/air-table.md``, which shows every value and difference.

The table was computed from the air property data of its day, not from CoolProp's reference
equation for air, and prints its yields to two or three figures.  Where the tolerance is wider
than that rounding, the reason is given beside it.
"""

import csv
import functools
import math
import pathlib

import pytest

from cycle.flowsheet import solve_scenario
from cycle.scenario import parse_scenario
from properties import get_fluid

ROOT = pathlib.Path(__file__).resolve().parents[1]
TABLE = ROOT / "tests" / "data" / "air-liquefaction-systems.csv"

# The table's stated inlet state (Timmerhaus 2001, Table II, heading).
INLET_TEMPERATURE = 294.4  # K
INLET_PRESSURE = 0.1e6  # Pa
TEXT_COLUMNS = ("system",)


def read_table(path=TABLE):
    """The rows of the air table as dictionaries: numbers as floats, empty cells as None."""
    with open(path, newline="", encoding="utf-8") as handle:
        lines = [line for line in handle if not line.startswith("#")]
    rows = []
    for raw in csv.DictReader(lines):
        row = {}
        for key, text in raw.items():
            if key in TEXT_COLUMNS:
                row[key] = text
            else:
                row[key] = float(text) if text.strip() else None
            row[f"{key}_text"] = text
        rows.append(row)
    return rows


ROWS = read_table()


def row_id(row):
    """A short label for a row: system, eta_c and eps."""
    if row["system"] == "ideal reversible":
        return "ideal reversible"
    return f"{row['system']} eta_c={row['eta_c']:g} eps={row['eps']:g}"


def scenario_for(row):
    """The lhsim scenario (a mapping, as read from YAML) of one row of the table.

    The ideal reversible row states only the inlet (and eta_c = 1): its value, the ideal work,
    depends only on the inlet temperature and pressure, so it gets the ideal simple cycle at
    20 MPa and reads ``ideal_work_kJ_per_kg_liquid`` from it.
    """
    high = row["p_high_MPa"] or 20.0
    eps = row["eps"] if row["eps"] is not None else 1.0
    data = {
        "name": f"Timmerhaus 2001, Table II: {row_id(row)}",
        "gas": "air",
        "ambient_temperature": f"{INLET_TEMPERATURE} K",
        "low_pressure": f"{row['p_low_MPa']:g} MPa",
        "high_pressure": f"{high:g} MPa",
        "compressor": {"isothermal_efficiency": row["eta_c"]},
        # In the precooled layout this one effectiveness applies to the warm and to the cold
        # recuperator (docs/scenario-format.md, `precooling`).
        "recuperator": {"effectiveness": eps},
    }
    if row["T_precool_K"] is not None:
        # An ideal (Carnot) precooling refrigerator: the table states no refrigerator efficiency,
        # and the independent calculation in the data file makes the same choice.
        data["precooling"] = {"temperature": f"{row['T_precool_K']:g} K", "refrigerator_carnot_fraction": 1.0}
    if row["p_intermediate_MPa"] is not None:
        data["dual_pressure"] = {"intermediate_pressure": f"{row['p_intermediate_MPa']:g} MPa",
                                 "recirculated_fraction": row["i"]}
    return data


@functools.lru_cache(maxsize=None)
def solved(index):
    """lhsim's result for ``ROWS[index]`` (each row is solved once per process)."""
    return solve_scenario(parse_scenario(scenario_for(ROWS[index])))


def compression_work(p_low, p_high, eta_c, T0=INLET_TEMPERATURE):
    """Isothermal compression work of air from (T0, p_low) to (T0, p_high) over eta_c [J/kg],
    straight from the property states: [T0 (s1 - s2) - (h1 - h2)] / eta_c (Barron 1985, sec. 3.2)."""
    air = get_fluid("air")
    a, b = air.state_tp(T0, p_low), air.state_tp(T0, p_high)
    return (T0 * (a.s - b.s) - (a.h - b.h)) / eta_c


def indices(*systems):
    return [pytest.param(k, id=row_id(r)) for k, r in enumerate(ROWS) if r["system"] in systems]


CYCLES = ("simple", "precooled", "dual-pressure")


def is_loose_dual_pressure_row(row):
    return row["system"] == "dual-pressure" and row["eta_c"] == 0.7 and row["eps"] == 0.95


def reproduces_work(row):
    """Rows whose work and figure of merit lhsim reproduces: both simple rows and the ideal
    dual-pressure row (docs/air-table.md says why the others do not)."""
    return row["system"] == "simple" or (row["system"] == "dual-pressure" and row["eps"] == 1.0)


# -- the copy of the table ----------------------------------------------------------------

def test_the_copy_holds_the_seven_computed_rows_of_the_table():
    # Timmerhaus 2001, Table II, less its "observed" rows (see the file header): if rows went
    # missing, the parametrised checks below would silently shrink.
    assert TABLE.read_text(encoding="utf-8").startswith("# Source: K. D. Timmerhaus")
    assert [(r["system"], r["eta_c"], r["eps"]) for r in ROWS] == [
        ("ideal reversible", 1.0, None), ("simple", 1.0, 1.0), ("simple", 0.7, 0.95),
        ("precooled", 1.0, 1.0), ("precooled", 0.7, 0.95), ("dual-pressure", 1.0, 1.0),
        ("dual-pressure", 0.7, 0.95)]


# -- checks against the published values --------------------------------------------------

@pytest.mark.parametrize("index", indices("ideal reversible", *CYCLES))
def test_ideal_work_of_liquefaction(index):
    # Timmerhaus 2001, Table II, "ideal reversible" row: 715 kJ/kg.  lhsim gives 719.7 (0.7 %),
    # the difference between CoolProp's air and the table's older air data.  1 % admits that and
    # the rounding of 715 (0.07 %), and still fails a wrong dead state: taking T0 = 300 K
    # instead of 294.4 K gives 741 kJ/kg, 3.7 % high.  Every row's scenario must report it.
    published = ROWS[0]["work_kJ_per_kg_liquid"]
    assert solved(index).summary()["ideal_work_kJ_per_kg_liquid"] == pytest.approx(published, rel=0.01)


@pytest.mark.parametrize("index", indices(*CYCLES))
def test_liquid_yield(index):
    row = ROWS[index]
    if is_loose_dual_pressure_row(row):
        # Timmerhaus 2001, Table II, dual-pressure, eta_c 0.7, eps 0.95: 0.032 against lhsim's
        # 0.0337, 5.4 % apart, hence 6 %.  The table does not say how it defines the
        # effectiveness of the exchanger with two cold streams; lhsim's definition (the cold
        # streams' enthalpy rise over their rise to the high-pressure inlet temperature,
        # docs/glossary.md) gives 0.0337, and the independent calculation noted in the reference
        # data found no definition that gives 0.032 (in lhsim's definition, eps 0.9465 would:
        # docs/air-table.md).  At 6 MPa air is supercritical, so a receiver
        # separating liquid at the intermediate pressure would change nothing.
        tolerance = 0.06
    else:
        # Timmerhaus 2001, Table II: the other five yields agree within 1.3 %.  3 % covers the
        # rounding of the table (0.061 stands for 0.0605 to 0.0615, 0.8 %) and its older air data
        # (the ideal work differs by 0.7 %), and still fails a wrong layout or a misapplied
        # effectiveness: the simple row with eps 0.95 makes 28 % less liquid than with eps 1.
        tolerance = 0.03
    assert solved(index).liquid_yield == pytest.approx(row["yield"], rel=tolerance)


@pytest.mark.parametrize("index", [p for p in indices(*CYCLES) if reproduces_work(ROWS[p.values[0]])])
def test_work_and_figure_of_merit_of_the_rows_that_reproduce(index):
    # Timmerhaus 2001, Table II: both simple rows and the ideal dual-pressure row.  Measured
    # differences are at most 2.4 % (work) and 2.1 % (figure of merit).  3 %: the table's work
    # is its compression work over its yield, so it carries the yield's rounding (up to 0.8 %)
    # and the table's older air data, whose compression work from 0.1 to 20 MPa is about 1 %
    # above CoolProp's (450.6 against 445.9 kJ/kg, from the ideal simple row).
    row, summary = ROWS[index], solved(index).summary()
    assert summary["work_kJ_per_kg_liquid"] == pytest.approx(row["work_kJ_per_kg_liquid"], rel=0.03)
    assert summary["figure_of_merit"] == pytest.approx(row["figure_of_merit"], rel=0.03)


@pytest.mark.parametrize("index", indices("precooled"))
def test_precooled_work_is_at_least_the_compression_work_over_the_yield(index):
    # The table's precooled works are NOT fitted: no consistent accounting reproduces them.
    # Timmerhaus 2001, Table II, precooled eta_c 1.0: 2240 kJ/kg x yield 0.179 is 401 kJ per kg
    # compressed, less than the isothermal compression of air from 0.1 to 20 MPa alone
    # (445.9 kJ/kg on CoolProp), and the precooling refrigerator can only add work; the same
    # holds for the eta_c 0.7 row (3700 x 0.158 = 585 < 445.9 / 0.7 = 637).  The second assert
    # records that, so the test fails if the copy of the table changes.  What is tested is the
    # bound: lhsim charges at least the compression work per kg of liquid.  The bound is not a
    # law to round-off (a return gas colder than ambient lowers the compressor's work by about
    # 0.04 % at eps 0.95), but here the refrigerator adds 1.6 % to 2.5 %, so 1e-6 is ample.
    row, result = ROWS[index], solved(index)
    floor = compression_work(row["p_low_MPa"] * 1e6, row["p_high_MPa"] * 1e6, row["eta_c"])
    assert result.work_per_kg_liquid >= floor / result.liquid_yield * (1.0 - 1e-6)
    assert row["work_kJ_per_kg_liquid"] * 1e3 < floor / row["yield"]
    # The bound has content only if lhsim charges the refrigerator: a Carnot refrigerator at
    # 228 K against 294.4 K costs (294.4 / 228 - 1) = 0.29 J of work per J of precooler duty.
    T_p = row["T_precool_K"]
    assert result.precooling_work_per_kg_compressed == pytest.approx(
        result.precooler_duty * (INLET_TEMPERATURE / T_p - 1.0), rel=1e-9)


# -- the independent CoolProp calculation printed beside the table -------------------------

INDEPENDENT = (("yield", "coolprop_yield"), ("work_kJ_per_kg_liquid", "coolprop_work_kJ_per_kg_liquid"),
               ("figure_of_merit", "coolprop_figure_of_merit"))


def printed_tolerance(text):
    """Half a unit in the last printed digit of ``text``."""
    decimals = len(text.split(".")[1]) if "." in text else 0
    return 0.5 * 10.0 ** -decimals


@pytest.mark.parametrize("index", indices("ideal reversible", *CYCLES))
def test_agreement_with_the_independent_coolprop_calculation(index):
    # The last three columns of tests/data/air-liquefaction-systems.csv: an independent
    # calculation of the table's assumptions on CoolProp (HEOS), given with the reference data
    # "for orientation"; not a published value.  It is the same equation of state, so lhsim
    # must agree to the printed digits: half a unit in the last digit, plus 0.01 % for CoolProp
    # versions and solver tolerances.
    row, result = ROWS[index], solved(index)
    lhsim = {"yield": result.liquid_yield, "work_kJ_per_kg_liquid": result.work_per_kg_liquid / 1e3,
             "figure_of_merit": result.figure_of_merit}
    if row["system"] == "ideal reversible":
        lhsim = {"work_kJ_per_kg_liquid": result.ideal_work_per_kg_liquid / 1e3}
    checked = 0
    for name, column in INDEPENDENT:
        if row[column] is None or name not in lhsim:
            continue
        expected = row[column]
        tolerance = printed_tolerance(row[f"{column}_text"]) + 1e-4 * abs(expected)
        assert math.isclose(lhsim[name], expected, rel_tol=0.0, abs_tol=tolerance), (name, lhsim[name], expected)
        checked += 1
    assert checked == (1 if row["system"] == "ideal reversible" else 3)
