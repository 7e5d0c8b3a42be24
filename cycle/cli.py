"""The ``lhsim`` command line.

Exit codes: 0 success; 2 invalid input (scenario, units, out-of-range state); 3 the cycle
makes no liquid.  Bad input gets a one-line message on stderr, never a traceback.
Heavy libraries (CoolProp, pandas, pint) are imported only inside the commands.
"""

import argparse
import json
import math
import sys

EXIT_INPUT = 2
EXIT_NO_LIQUID = 3

CAUTIONS = """\
safety: lhsim is a design aid, not a safety assessment. Liquefiers work with gas at high
pressure (stored energy; rated piping, relief valves), with cryogenic liquid (cold burns,
embrittlement, pressure rise as trapped liquid warms), with oxygen deficiency from nitrogen,
argon or helium released indoors and oxygen enrichment where air or oxygen condenses, and
with flammable gases (hydrogen, methane). Follow local codes, the gas supplier's safety data
and licensed engineering practice; have every design checked by a qualified person."""

SHORT_CAUTION = ("Caution: high pressure, cryogenic liquid, oxygen deficiency or enrichment, flammable "
                 "gases. Design aid only; follow local codes and licensed practice.")


class _Formatter(argparse.RawDescriptionHelpFormatter):
    pass


def _parser():
    parser = argparse.ArgumentParser(
        prog="lhsim",
        description="Simulate Linde-Hampson gas liquefaction cycles with real-gas properties.",
        epilog=CAUTIONS, formatter_class=_Formatter)
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True

    run = sub.add_parser(
        "run", help="solve one scenario file and print its design point",
        description="Solve a scenario (YAML) and print the liquid yield, work, figure of merit, "
                    "sizing and the state table of every stream.",
        epilog=CAUTIONS + "\n\nexit status: 0 solved; 2 invalid scenario; 3 the cycle makes no liquid.",
        formatter_class=_Formatter)
    run.add_argument("scenario", metavar="SCENARIO.yaml", help="scenario file")
    run.add_argument("--json", action="store_true",
                     help="print one JSON object (scenario, summary, states, warnings) and nothing else")

    gas = sub.add_parser(
        "gas", help="properties of a gas at one state: Joule-Thomson coefficient, inversion, saturation",
        description="Print the state of a gas at a temperature and pressure, its Joule-Thomson "
                    "coefficient, saturation temperature, inversion temperatures at that pressure and "
                    "its maximum inversion temperature.",
        epilog=CAUTIONS + "\n\nQuantities take units ('300 K', '27 degC', '1 bar'); bare numbers are SI (K, Pa).",
        formatter_class=_Formatter)
    gas.add_argument("name", metavar="NAME", help="gas name, e.g. nitrogen, argon, methane, air, hydrogen")
    gas.add_argument("--temperature", "-T", required=True, metavar="T", help="temperature, e.g. '300 K'")
    gas.add_argument("--pressure", "-p", required=True, metavar="P", help="pressure, e.g. '1 bar'")
    gas.add_argument("--json", action="store_true", help="print one JSON object and nothing else")
    return parser


def _fail(message, code=EXIT_INPUT):
    print(f"lhsim: error: {message}", file=sys.stderr)
    return code


def main(argv=None):
    """Entry point of the ``lhsim`` console script; returns the exit status."""
    args = _parser().parse_args(argv)
    try:
        if args.command == "run":
            return _cmd_run(args)
        return _cmd_gas(args)
    except BrokenPipeError:
        return 0


def _json_safe(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {k: _json_safe(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_json_safe(v) for v in value]
    return value


def _cmd_run(args):
    from cycle.errors import NoLiquefactionError, ScenarioError
    from cycle.scenario import load_scenario

    try:
        scenario = load_scenario(args.scenario)
        from cycle.flowsheet import solve_scenario

        result = solve_scenario(scenario)
    except ScenarioError as err:
        return _fail(str(err))
    except NoLiquefactionError as err:
        return _fail(str(err), EXIT_NO_LIQUID)
    if args.json:
        print(json.dumps(_json_safe(result.to_dict()), indent=2))
    else:
        from cycle.report import format_result

        print(format_result(result))
        print(SHORT_CAUTION)
    return 0


def _cmd_gas(args):
    from cycle.units import UnitError, parse_quantity

    try:
        T = parse_quantity(args.temperature, "temperature")
    except UnitError as err:
        return _fail(f"--temperature: {err}")
    try:
        p = parse_quantity(args.pressure, "pressure")
    except UnitError as err:
        return _fail(f"--pressure: {err}")
    from properties import PropertyRangeError, get_fluid

    try:
        fluid = get_fluid(args.name)
    except ValueError as err:
        return _fail(f"NAME: {err}")
    try:
        info = gas_properties(fluid, T, p)
    except PropertyRangeError as err:
        return _fail(str(err))
    if args.json:
        print(json.dumps(_json_safe(info), indent=2))
    else:
        from cycle.report import format_gas

        print(format_gas(info))
        print(SHORT_CAUTION)
    return 0


def gas_properties(fluid, T, p):
    """Everything ``lhsim gas`` reports, as a dictionary with units in the key names."""
    st = fluid.state_tp(T, p)
    T_sat = fluid.saturation_temperature(p)
    return {
        "gas": fluid.name,
        "temperature_K": st.T,
        "pressure_bar": st.p / 1e5,
        "phase": st.phase,
        "density_kg_per_m3": st.density,
        "enthalpy_kJ_per_kg": st.h / 1e3,
        "entropy_kJ_per_kg_K": st.s / 1e3,
        "jt_coefficient_K_per_bar": fluid.jt_coefficient(T, p) * 1e5,
        "saturation_temperature_K": T_sat,
        "inversion_temperatures_K": list(fluid.inversion_temperatures(p)),
        "max_inversion_temperature_K": fluid.max_inversion_temperature(),
        "critical_temperature_K": fluid.T_critical,
        "critical_pressure_bar": fluid.p_critical / 1e5,
        "triple_point_temperature_K": fluid.T_triple,
        "triple_point_pressure_bar": fluid.p_triple / 1e5,
    }



def main_exit():
    """Console-script wrapper: exit with the status :func:`main` returns."""
    sys.exit(main())


if __name__ == "__main__":  # pragma: no cover
    main_exit()
