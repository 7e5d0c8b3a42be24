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
    "kg/hr": "kg/h",
    "l/h": "L/h",
    "l/hr": "L/h",
    "L/hr": "L/h",
    "l/min": "L/min",
}


# Gauge pressure spellings (refused: lhsim works in absolute pressure).
_GAUGE = {"barg", "psig", "kpag", "mpag", "pag", "mbarg"}
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
        raise UnitError(f"gauge pressures are not accepted (give absolute pressure), got {value!r}")
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
        raise UnitError(f"unknown unit {unit!r} in {value!r}") from err
    if dim == "":
        if not quantity.dimensionless:
            raise UnitError(f"expected a plain number, got {value!r}")
        return float(quantity.to("dimensionless").magnitude)
    if quantity.dimensionality != ureg.get_dimensionality(dim):
        raise UnitError(f"expected a {dimension.replace('_', ' ')} (for example in {_EXAMPLE[dimension]}), got {value!r}")
    out = float(quantity.to(si).magnitude)
    if not math.isfinite(out):
        raise UnitError(f"expected a finite number, got {value!r}")
    return out


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
