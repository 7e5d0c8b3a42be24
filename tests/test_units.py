"""Quantity strings: spellings of the trade, and hints where pint would read a unit otherwise."""

import re

import pytest

from cycle.units import UnitError, parse_quantity

# 1 psi = 6.894 757 E+03 Pa (NIST Special Publication 811, 2008, appendix B.9); the factor is
# exact to the digits given, so the tolerance is the float round-off.
PSI = 6894.757293168


def test_psia_is_absolute_psi():
    assert parse_quantity("3000 psia", "pressure") == pytest.approx(3000 * PSI, rel=1e-12)
    assert parse_quantity("3000 psia", "pressure") == parse_quantity("3000 psi", "pressure")


# The standard atmosphere is 101 325 Pa (ISO 2533:1975; the definition of the atmosphere unit,
# NIST SP 811, 2008, B.8).  A gauge reading adds it; a pressure drop refuses a gauge unit.
ATM = 101325.0


@pytest.mark.parametrize("text, absolute", [("30 psig", 30 * PSI + ATM), ("200 barg", 200e5 + ATM),
                                            ("300 kPag", 300e3 + ATM), ("0 psig", ATM), ("2 MPag", 2e6 + ATM)])
def test_gauge_pressures_add_the_standard_atmosphere(text, absolute):
    assert parse_quantity(text, "pressure") == pytest.approx(absolute, rel=1e-12)


@pytest.mark.parametrize("text, written", [("0.5 barg", "'0.5 bar'"), ("3 psig", "'3 psi'")])
def test_a_pressure_difference_refuses_a_gauge_unit(text, written):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, "pressure", gauge=False)
    assert str(info.value) == f"a pressure drop is a difference and takes no gauge unit: write {written}, got '{text}'"


def test_a_gauge_unit_is_no_other_quantity():
    with pytest.raises(UnitError, match=r"expected a temperature .* got '3 barg' \(a gauge pressure\)"):
        parse_quantity("3 barg", "temperature")


# Reference volumes of gas: 1 ft = 0.3048 m exactly (NIST SP 811, 2008, B.9), so 1 scfm is
# 0.3048^3 m^3 per 60 s at 60 degF and 14.696 psia.
@pytest.mark.parametrize("text, dimension, m3_per_h", [
    ("10 Nm^3/h", "normal_volume_flow", 10.0), ("10 Nm3/h", "normal_volume_flow", 10.0),
    ("10 Nm\u00b3/h", "normal_volume_flow", 10.0), ("100 Nl/min", "normal_volume_flow", 6.0),
    ("100 NL/min", "normal_volume_flow", 6.0), ("4 Sm^3/h", "standard_volume_flow", 4.0),
    ("1 scfm", "standard_us_volume_flow", 0.3048 ** 3 * 60), ("60 SCFH", "standard_us_volume_flow", 0.3048 ** 3 * 60),
])
def test_gas_volume_flows_at_reference_conditions(text, dimension, m3_per_h):
    assert parse_quantity(text, dimension) * 3600 == pytest.approx(m3_per_h, rel=1e-12)


@pytest.mark.parametrize("text, dimension, fragment", [
    ("10 Sm^3/h", "normal_volume_flow", "expected a normal volume flow such as '10 Nm^3/h', got '10 Sm^3/h'"),
    ("10 m^3/h", "normal_volume_flow", "expected a normal volume flow"),
    ("10 Nm^3/h", "standard_us_volume_flow", "expected a standard us volume flow such as '5 scfm'"),
    ("10 Nm^3/h", "volume_flow", "a volume of gas at reference conditions is not taken here"),
])
def test_gas_volume_flows_refuse_another_reference(text, dimension, fragment):
    with pytest.raises(UnitError, match=re.escape(fragment)):
        parse_quantity(text, dimension)


@pytest.mark.parametrize("text, dimension, meant", [
    ("32 C", "temperature", "'32 degC'"),
    ("80 F", "temperature", "'80 degF'"),
    ("3 C", "temperature_difference", "'3 degC'"),
])
def test_c_and_f_hint_at_degc_and_degf(text, dimension, meant):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, dimension)
    message = str(info.value)
    assert f"got '{text}'" in message and f"did you mean {meant}?" in message and "\n" not in message


def test_the_hinted_spellings_are_the_temperatures_meant():
    # 32 degF is the ice point, 273.15 K (definition of the Fahrenheit scale); 80 degF = 299.817 K.
    assert parse_quantity("32 degF", "temperature") == pytest.approx(273.15, abs=1e-9)
    assert parse_quantity("80 degF", "temperature") == pytest.approx(299.8166667, abs=1e-6)
    assert parse_quantity("32 degC", "temperature") == pytest.approx(305.15, abs=1e-9)


def test_m3_per_h_hints_at_m_caret_3():
    with pytest.raises(UnitError) as info:
        parse_quantity("3 m3/h", "volume_flow")
    assert str(info.value) == "unknown unit 'm3/h' in '3 m3/h'; write powers with ^: did you mean '3 m^3/h'?"
    assert parse_quantity("3 m^3/h", "volume_flow") == pytest.approx(3 / 3600, rel=1e-12)


def test_no_hint_where_the_rewritten_unit_would_not_fit_either():
    with pytest.raises(UnitError) as info:
        parse_quantity("3 m3/h", "pressure")
    assert str(info.value) == "unknown unit 'm3/h' in '3 m3/h'"
    with pytest.raises(UnitError) as info:
        parse_quantity("32 C", "pressure")
    assert "did you mean" not in str(info.value)


def test_a_gauge_unit_is_no_plain_number():
    # Found by the hostile-input fuzz: "1 psig" as an efficiency raised a KeyError.
    with pytest.raises(UnitError, match=r"^expected a plain number, got '1 psig' \(a gauge pressure\)$"):
        parse_quantity("1 psig", "dimensionless")
