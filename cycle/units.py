"""Quantities with units, parsed once at the edge (scenario files, command line) into SI.

Strings such as ``"200 bar"``, ``"10 L/h"`` or ``"27 degC"`` are parsed by pint; a bare
number is taken as already in SI.  The core of lhsim never sees a unit.
"""

from functools import lru_cache
import math
import re
import reprlib
import unicodedata

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")

# Longest quantity string read [characters]: "1.01325 bar", "0.4 kilogram / hour" are far
# shorter; a longer one is refused before any parsing.
MAX_QUANTITY_LENGTH = 100
# Largest power a unit may carry (m^3, s^-2 need far less).
MAX_UNIT_POWER = 10
# Longest value shown in an error message [characters].
SHOWN_LENGTH = 60

# The tokens of a unit expression: unit names, operators, numbers (powers only), a sign.
_UNIT_TOKEN = re.compile(r"\s*(?:(?P<op>\*\*|[*/^()\u00b7])|(?P<name>(?:[^\W\d_]|[\u00b0%])[\w\u00b0]*)"
                         r"|(?P<number>(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)|(?P<sign>[-+]))")

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


_SHORT = reprlib.Repr()
_SHORT.maxstring, _SHORT.maxother, _SHORT.maxlevel = SHOWN_LENGTH, SHOWN_LENGTH, 3
_SHORT.maxlist = _SHORT.maxtuple = _SHORT.maxdict = _SHORT.maxset = 6


def shown(value):
    """``repr(value)`` for an error message: at most :data:`SHOWN_LENGTH` characters, control
    characters escaped, and bounded work however large or deeply shared ``value`` is."""
    text = _SHORT.repr(value)
    if len(text) > SHOWN_LENGTH:
        text = text[:SHOWN_LENGTH - 3] + "..."
    return printable(text)


# Characters that must not reach a terminal as they are: controls (escape sequences start
# with one), format characters (bidirectional overrides), lone surrogates, line separators.
_UNPRINTABLE = {"Cc", "Cf", "Cs", "Zl", "Zp"}


def printable(text, limit=None):
    """``text`` with every control or format character and lone surrogate written as an
    escape (``\\x1b``, ``\\u202e``, ``\\ud800``); cut to ``limit`` characters (with ``...``) if given."""
    text = str(text)
    if limit is not None and len(text) > limit:
        text = text[:max(limit - 3, 0)] + "..."
    if text.isascii() and text.isprintable():
        return text
    out = []
    for ch in text:
        if unicodedata.category(ch) in _UNPRINTABLE:
            code = ord(ch)
            out.append(f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}" if code < 0x10000
                       else f"\\U{code:08x}")
        else:
            out.append(ch)
    return "".join(out)


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
        raise UnitError(f"expected a number with a unit, got {shown(value)}")
    if isinstance(value, (int, float)):
        try:
            value = float(value)
        except OverflowError:  # an integer beyond the float range
            raise UnitError(f"expected a finite number, got {shown(value)}") from None
        if not math.isfinite(value):
            raise UnitError(f"expected a finite number, got {value!r}")
        return value
    if not isinstance(value, str):
        raise UnitError(f"expected a number with a unit, got {shown(value)}")
    if len(value) > MAX_QUANTITY_LENGTH:
        raise UnitError(f"expected a number with a unit (at most {MAX_QUANTITY_LENGTH} characters), got "
                        f"{shown(value)} ({len(value)} characters)")
    match = _NUMBER.match(value)
    if not match:
        raise UnitError(f"expected a number followed by a unit, got {shown(value)}")
    number, unit = float(match.group(1)), match.group(2)
    if not math.isfinite(number):
        raise UnitError(f"expected a finite number, got {shown(value)}")
    unit = _SPELLINGS.get(unit, unit)
    if unit.lower() in _GAUGE:
        raise UnitError(f"gauge pressures are not accepted (give absolute pressure), got {shown(value)}; add the "
                        f"atmospheric pressure and write {_GAUGE[unit.lower()]}")
    dim, si = DIMENSIONS[dimension]
    if not unit:
        return number
    _check_unit(unit, value)
    import pint

    ureg = registry()
    if dimension == "temperature_difference" and unit in _OFFSET_UNITS:
        unit = _OFFSET_UNITS[unit]
    # The unit has passed _check_unit, so pint sees only names, operators and powers; any
    # exception it still raises on the string is an unreadable unit, never a crash.
    try:
        quantity = ureg.Quantity(number, unit)
    except pint.errors.UndefinedUnitError as err:
        raise UnitError(f"unknown unit {shown(unit)} in {shown(value)}{_hint(match.group(1), unit, dimension)}") from err
    except Exception as err:  # noqa: BLE001 - pint's parser raises many kinds on odd strings
        raise UnitError(f"expected a number followed by a unit, got {shown(value)} (the unit cannot be "
                        f"read: {type(err).__name__})") from err
    try:
        if dim == "":
            if not quantity.dimensionless:
                raise UnitError(f"expected a plain number, got {shown(value)}")
            out = float(quantity.to("dimensionless").magnitude)
        elif quantity.dimensionality != ureg.get_dimensionality(dim):
            raise UnitError(f"expected a {dimension.replace('_', ' ')} (for example in {_EXAMPLE[dimension]}), "
                            f"got {shown(value)}{_hint(match.group(1), unit, dimension)}")
        else:
            out = float(quantity.to(si).magnitude)
    except UnitError:
        raise
    except Exception as err:  # noqa: BLE001 - overflow and the like while converting
        raise UnitError(f"expected a finite number, got {shown(value)} ({type(err).__name__} converting "
                        f"it to {si or 'a plain number'})") from err
    if not math.isfinite(out):
        raise UnitError(f"expected a finite number, got {shown(value)}")
    return out


def _check_unit(unit, value):
    """Refuse a unit that is not ``name [(*|/| ) name]... `` with powers (``^`` or ``**``) and
    parentheses, so that no other expression reaches pint's evaluator, and a second number
    before the unit (``"2 1 bar"``) is not read as a product."""
    tokens = []
    at = 0
    while at < len(unit):
        match = _UNIT_TOKEN.match(unit, at)
        if match is None or match.end() == at:
            if unit[at:].strip() == "":
                break
            raise UnitError(f"expected a number followed by a unit of names, *, /, ^ and parentheses, got "
                            f"{shown(value)} ({shown(unit[at:].strip()[0])} cannot be part of a unit)")
        kind = match.lastgroup
        tokens.append((kind, match.group(kind)))
        at = match.end()
    if tokens and tokens[0][0] == "number":
        raise UnitError(f"expected one number followed by a unit, got {shown(value)} (a second number "
                        f"stands before the unit)")

    def fail(why):
        raise UnitError(f"expected a number followed by a unit, got {shown(value)} ({why})")

    depth = 0
    expect_operand = True  # a name or "(" must come next
    k = 0
    after_power = False  # the token before was the number of a power
    while k < len(tokens):
        kind, text = tokens[k]
        powered, after_power = after_power, False
        if kind == "name":
            expect_operand = False
        elif text == "(":
            depth += 1
            expect_operand = True
        elif text == ")":
            if expect_operand:
                fail("')' where a unit name belongs" if depth else "')' without its '('")
            depth -= 1
            if depth < 0:
                fail("')' without its '('")
        elif text in ("^", "**"):
            if expect_operand:
                fail(f"{text!r} without a unit before it")
            if powered:
                fail("a power of a power; multiply the powers")
            k += 1
            sign = ""
            if k < len(tokens) and tokens[k][0] == "sign":
                sign, k = tokens[k][1], k + 1
            if k >= len(tokens) or tokens[k][0] != "number":
                fail(f"{text!r} needs a number after it")
            power = float(sign + tokens[k][1])
            if not abs(power) <= MAX_UNIT_POWER:
                fail(f"a power in a unit must be from -{MAX_UNIT_POWER} to {MAX_UNIT_POWER}")
            after_power = True
        elif kind == "op":  # *, / or a middle dot
            if expect_operand:
                fail(f"{text!r} without a unit before it")
            expect_operand = True
        elif kind == "number":
            fail("a number inside a unit can only be a power, as in m^3")
        else:  # a sign outside a power
            fail(f"{text!r} outside a power")
        k += 1
    if depth:
        fail("'(' without its ')'")
    if expect_operand and tokens:
        fail(f"{tokens[-1][1]!r} needs a unit after it")


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
