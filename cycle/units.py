"""Quantities with units, parsed once at the edge (scenario files, command line) into SI.

Strings such as ``"200 bar"``, ``"10 L/h"`` or ``"27 degC"`` are parsed by pint; a bare
number is taken as already in SI.  The core of lhsim never sees a unit.
"""

from functools import lru_cache
import math
import re

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")

# Dimension name -> (pint dimensionality string, SI unit for conversion)
DIMENSIONS = {
    "temperature": ("[temperature]", "kelvin"),
    "pressure": ("[pressure]", "pascal"),
    "power": ("[power]", "watt"),
    "mass_flow": ("[mass] / [time]", "kilogram / second"),
    "volume_flow": ("[length] ** 3 / [time]", "meter ** 3 / second"),
    "temperature_difference": ("[temperature]", "kelvin"),
    "thermal_conductance": ("[power] / [temperature]", "watt / kelvin"),
    "specific_energy": ("[length] ** 2 / [time] ** 2", "joule / kilogram"),
    "dimensionless": ("", ""),
}

# Units a user may write in the style of the trade; pint would misread a few of them.
_SPELLINGS = {
    "bara": "bar",
    "psia": "psi",  # absolute psi; pint knows only psi (which is absolute too)
    "kg/hr": "kg/h",
    "l/h": "L/h",
    "l/hr": "L/h",
    "L/hr": "L/h",
    "l/min": "L/min",
}


# Gauge pressure spellings (refused: lhsim works in absolute pressure), with the absolute
# spelling to write instead once the atmospheric pressure is added.
_GAUGE = {"barg": "bara", "psig": "psia", "kpag": "kPa", "mpag": "MPa", "pag": "Pa", "mbarg": "mbar"}
# Temperature units as people write them that pint reads otherwise (C is the coulomb, F the farad).
_TEMPERATURE_LOOKALIKES = {"C": "degC", "deg C": "degC", "oC": "degC", "F": "degF", "deg F": "degF", "oF": "degF"}
# A power written as a digit after a letter (m3, ft3, cm2): pint wants m^3.
_DIGIT_POWER = re.compile(r"(?<=[A-Za-z])([23])(?![\d.])")
# A temperature difference written in an offset unit means the difference in that unit.
_OFFSET_UNITS = {"degC": "delta_degC", "°C": "delta_degC", "celsius": "delta_degC", "degree_Celsius": "delta_degC",
                 "degF": "delta_degF", "°F": "delta_degF", "fahrenheit": "delta_degF",
                 "degree_Fahrenheit": "delta_degF"}


class UnitError(ValueError):
    """A quantity string could not be read, or has the wrong dimension."""


@lru_cache(maxsize=1)
def registry():
    """The shared pint unit registry (built on first use: pint is slow to import)."""
    import pint

    ureg = pint.UnitRegistry()
    return ureg


def parse_quantity(value, dimension):
    """Convert ``value`` to a float in the SI unit of ``dimension``.

    Parameters
    ----------
    value : str or float
        A number (taken as SI) or a string of a number and a unit (``"200 bar"``).
    dimension : str
        A key of :data:`DIMENSIONS`.

    Returns
    -------
    float
        The value in SI (K, Pa, W, kg/s, m3/s, W/K).

    Raises
    ------
    UnitError
        Unreadable value, unknown unit or wrong dimension; the message says which.
    """
    if isinstance(value, bool):
        raise UnitError(f"expected a number with a unit, got {value!r}")
    if isinstance(value, (int, float)):
        value = float(value)
        if not math.isfinite(value):
            raise UnitError(f"expected a finite number, got {value!r}")
        return value
    if not isinstance(value, str):
        raise UnitError(f"expected a number with a unit, got {value!r}")
    match = _NUMBER.match(value)
    if not match:
        raise UnitError(f"expected a number followed by a unit, got {value!r}")
    number, unit = float(match.group(1)), match.group(2)
    if not math.isfinite(number):
        raise UnitError(f"expected a finite number, got {value!r}")
    unit = _SPELLINGS.get(unit, unit)
    if unit.lower() in _GAUGE:
        raise UnitError(f"gauge pressures are not accepted (give absolute pressure), got {value!r}; add the "
                        f"atmospheric pressure and write {_GAUGE[unit.lower()]}")
    dim, si = DIMENSIONS[dimension]
    if not unit:
        return number
    import pint

    ureg = registry()
    try:
        if dimension == "temperature_difference" and unit in _OFFSET_UNITS:
            unit = _OFFSET_UNITS[unit]
        quantity = ureg.Quantity(number, unit)
    except (pint.errors.UndefinedUnitError, AttributeError, ValueError, TypeError) as err:
        raise UnitError(f"unknown unit {unit!r} in {value!r}{_hint(match.group(1), unit, dimension)}") from err
    if dim == "":
        if not quantity.dimensionless:
            raise UnitError(f"expected a plain number, got {value!r}")
        return float(quantity.to("dimensionless").magnitude)
    if quantity.dimensionality != ureg.get_dimensionality(dim):
        raise UnitError(f"expected a {dimension.replace('_', ' ')} (for example in {_EXAMPLE[dimension]}), "
                        f"got {value!r}{_hint(match.group(1), unit, dimension)}")
    out = float(quantity.to(si).magnitude)
    if not math.isfinite(out):
        raise UnitError(f"expected a finite number, got {value!r}")
    return out


def _hint(number, unit, dimension):
    """A "did you mean" for a unit written the way people write it but pint reads otherwise."""
    if dimension in ("temperature", "temperature_difference") and unit in _TEMPERATURE_LOOKALIKES:
        return f" (pint does not read {unit!r} as a temperature); did you mean '{number} {_TEMPERATURE_LOOKALIKES[unit]}'?"
    power = _DIGIT_POWER.sub(r"^\1", unit)
    if power != unit:
        try:
            parse_quantity(f"{number} {power}", dimension)
        except UnitError:
            return ""
        return f"; write powers with ^: did you mean '{number} {power}'?"
    return ""


_EXAMPLE = {
    "temperature": "K",
    "pressure": "bar",
    "power": "W",
    "mass_flow": "kg/h",
    "volume_flow": "L/h",
    "temperature_difference": "K",
    "thermal_conductance": "W/K",
    "specific_energy": "kJ/kg",
}
