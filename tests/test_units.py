"""Quantity strings: spellings of the trade, and hints where pint would read a unit otherwise."""

import pytest

from cycle.units import UnitError, parse_quantity

# 1 psi = 6.894 757 E+03 Pa (NIST Special Publication 811, 2008, appendix B.9); the factor is
# exact to the digits given, so the tolerance is the float round-off.
PSI = 6894.757293168


def test_psia_is_absolute_psi():
    assert parse_quantity("3000 psia", "pressure") == pytest.approx(3000 * PSI, rel=1e-12)
    assert parse_quantity("3000 psia", "pressure") == parse_quantity("3000 psi", "pressure")


@pytest.mark.parametrize("text, absolute", [("30 psig", "psia"), ("200 barg", "bara"), ("300 kPag", "kPa")])
def test_gauge_pressures_are_refused_with_the_absolute_spelling(text, absolute):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, "pressure")
    message = str(info.value)
    assert message.startswith(f"gauge pressures are not accepted (give absolute pressure), got '{text}'")
    assert message.endswith(f"add the atmospheric pressure and write {absolute}")


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
