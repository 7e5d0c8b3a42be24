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
    "time_unit": ("[time]", "second"),
    # An actual volume flow of gas at a compressor's suction (written as any volume flow).
    "suction_volume_flow": ("[length] ** 3 / [time]", "meter ** 3 / second"),
    "length": ("[length]", "meter"),
    "wall_conductivity": ("[power] / [length] / [temperature]", "watt / meter / kelvin"),
    # Volume flows of gas at a reference condition (REFERENCE_CONDITIONS), in m^3/s there.
    "normal_volume_flow": ("[length] ** 3 / [time]", "Nm^3/s"),
    "standard_volume_flow": ("[length] ** 3 / [time]", "Sm^3/s"),
    "standard_us_volume_flow": ("[length] ** 3 / [time]", "scfm"),
}

# Reference conditions of gas volume flows: dimension -> (temperature [K], pressure [Pa], words).
REFERENCE_CONDITIONS = {
    "normal_volume_flow": (273.15, 101325.0, "0 degC and 1.01325 bar (normal conditions, DIN 1343)"),
    "standard_volume_flow": (288.15, 101325.0, "15 degC and 1.01325 bar (standard conditions, ISO 13443)"),
    # 60 degF = 519.67 R / 1.8; 14.696 psia with the psi of 6894.757293168 Pa.
    "standard_us_volume_flow": (519.67 / 1.8, 14.696 * 6894.757293168, "60 degF and 14.696 psia"),
}
# The gas volume flow spellings: Nm^3/h, Nm3/h, Nl/min, NL/min; Sm^3/h; scfm, scfh, scfd.
_GAS_VOLUME = re.compile(r"^(?P<ref>[NS])\s*(?P<unit>(?:m(?:\^3|\*\*3|3|\u00b3)|[lL])\s*/\s*[A-Za-z]+)$")
_SCF = re.compile(r"^(?i:scf(?P<time>[mhd]))$")
_SCF_TIME = {"m": "min", "h": "hour", "d": "day"}
# One standard cubic foot [m^3 at the US reference]: (0.3048 m)^3.
CUBIC_FOOT = 0.3048 ** 3
# Atmospheric pressure added to a gauge reading [Pa]: the standard atmosphere.
STANDARD_ATMOSPHERE = 101325.0

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


def parse_quantity(value, dimension, gauge=True):
    """Convert ``value`` to a float in the SI unit of ``dimension``.

    Parameters
    ----------
    value : str or float
        A number (taken as SI) or a string of a number and a unit (``"200 bar"``).
    dimension : str
        A key of :data:`DIMENSIONS`.  The gas volume flows (``normal_volume_flow``: ``Nm^3/h``,
        ``Nl/min``; ``standard_volume_flow``: ``Sm^3/h``; ``standard_us_volume_flow``: ``scfm``,
        ``scfh``) give m^3/s at their reference condition (:data:`REFERENCE_CONDITIONS`).
    gauge : bool
        For ``pressure``: take a gauge reading (``barg``, ``psig``) and add the standard
        atmosphere, 1.01325 bar.  False for a pressure difference, where a gauge unit is refused.

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
        absolute = _GAUGE[unit.lower()]
        if dimension == "dimensionless":
            raise UnitError(f"expected a plain number, got {shown(value)} (a gauge pressure)")
        if dimension != "pressure":
            raise UnitError(f"expected a {dimension.replace('_', ' ')} (for example in {_EXAMPLE[dimension]}), got "
                            f"{shown(value)} (a gauge pressure)")
        if not gauge:
            raise UnitError(f"a pressure drop is a difference and takes no gauge unit: write "
                            f"'{match.group(1)} {_SPELLINGS.get(absolute, absolute)}', got {shown(value)}")
        return parse_quantity(f"{match.group(1)} {absolute}", "pressure") + STANDARD_ATMOSPHERE
    if dimension in REFERENCE_CONDITIONS:
        return _gas_volume_flow(value, number, unit, dimension)
    dim, si = DIMENSIONS[dimension]
    if not unit:
        return number
    if dimension in ("volume_flow", "suction_volume_flow") and (_GAS_VOLUME.match(unit) or _SCF.match(unit)):
        raise UnitError(f"expected an actual volume flow (for example in L/h or m^3/h), got {shown(value)}: a "
                        f"volume of gas at reference conditions is not taken here")
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


def _gas_volume_flow(value, number, unit, dimension):
    """A gas volume flow at the reference condition of ``dimension`` [m^3/s there]."""
    ref = {"normal_volume_flow": "N", "standard_volume_flow": "S"}.get(dimension)
    example = {"N": "'10 Nm^3/h'", "S": "'10 Sm^3/h'", None: "'5 scfm'"}[ref]
    if not unit:
        return number
    gas = _GAS_VOLUME.match(unit)
    scf = _SCF.match(unit)
    if ref is not None and gas and gas.group("ref") == ref:
        # Nm3/h and Nm\u00b3/h are how plants write it: the power is read as m^3 here.
        volume = re.sub(r"^m(?:3|\u00b3)", "m^3", gas.group("unit"))
        return parse_quantity(f"{number!r} {volume}", "volume_flow")
    if ref is None and scf:
        return number * CUBIC_FOOT / parse_quantity(f"1 {_SCF_TIME[scf.group('time').lower()]}", "time_unit")
    raise UnitError(f"expected a {dimension.replace('_', ' ')} such as {example}, got {shown(value)}")


def gas_volume_text(value, dimension):
    """A gas volume flow [m^3/s at the reference of ``dimension``] as text :func:`parse_quantity`
    reads back to ``value``."""
    if dimension == "standard_us_volume_flow":
        return f"{value * 60.0 / CUBIC_FOOT!r} scfm"
    return f"{value!r} {DIMENSIONS[dimension][1]}"


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
    "length": "mm",
    "wall_conductivity": "W/(m K)",
    "suction_volume_flow": "m^3/h",
    "normal_volume_flow": "Nm^3/h",
    "standard_volume_flow": "Sm^3/h",
    "standard_us_volume_flow": "scfm",
}
