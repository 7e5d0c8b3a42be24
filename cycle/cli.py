"""The ``lhsim`` command line.

Exit codes: 0 success; 2 invalid input (scenario, units, out-of-range state); 3 the cycle
makes no liquid.  Bad input gets a one-line message on stderr, never a traceback.
Heavy libraries (CoolProp, pandas, pint) are imported only inside the commands.
"""

import argparse
import json
import math
import sys

from cycle import __version__
from cycle.safety import CAUTIONS, SHORT_CAUTION

EXIT_INPUT = 2
EXIT_NO_LIQUID = 3
# Each command's --help points to the full cautions, which the top-level --help carries once.
SAFETY_POINTER = "safety: high pressure, cryogenic liquid, oxygen deficiency/enrichment, flammables: see lhsim --help"


class _Formatter(argparse.RawDescriptionHelpFormatter):
    pass


def _parser():
    parser = argparse.ArgumentParser(
        prog="lhsim",
        description="Simulate Linde-Hampson gas liquefaction cycles with real-gas properties.",
        epilog=CAUTIONS, formatter_class=_Formatter)
    parser.add_argument("--version", action="version", version=f"lhsim {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True

    run = sub.add_parser(
        "run", help="solve one scenario file and print its design point",
        description="Solve a scenario (YAML) and print the liquid yield, work, figure of merit, "
                    "sizing and the state table of every stream.",
        epilog=SAFETY_POINTER + "\n\nexit status: 0 solved; 2 invalid scenario; 3 the cycle makes no liquid (or the "
               "precooler's cooler cannot carry its load at any temperature of its curve).",
        formatter_class=_Formatter)
    run.add_argument("scenario", metavar="SCENARIO.yaml", help="scenario file")
    run.add_argument("--json", action="store_true",
                     help="print one JSON object and nothing else: scenario (SI), layout, summary, "
                          "exergy_losses_kJ_per_kg_liquid, states, warnings, solve, recuperator_profiles")
    run.add_argument("--plots", metavar="DIR",
                     help="also write the T-s diagram, recuperator profiles and loss chart (PNG and SVG) into DIR, "
                          "named after the scenario file (SCENARIO-ts-diagram.png, ...); DIR is made if missing "
                          "and checked before the solve")

    report = sub.add_parser(
        "report", help="one self-contained HTML report of a scenario (figures embedded)",
        description="Solve a scenario and write one HTML file with the scenario as given, the summary with "
                    "units, the state and exergy tables, warnings, the figures, the method and references, "
                    "and the safety cautions. It needs no network to view.",
        epilog=SAFETY_POINTER, formatter_class=_Formatter)
    report.add_argument("scenario", metavar="SCENARIO.yaml")
    report.add_argument("--out", required=True, metavar="FILE.html")

    plot = sub.add_parser(
        "plot", help="chart sweep results (one quantity against another, a line per category) or margins",
        description="Draw a column of a sweep results file against another, one line per value of --by; "
                    "points that made no liquid or failed are marked along the bottom axis. With --uncertainty, "
                    "draw the results of lhsim uncertainty: the main output's histogram with the target and "
                    "the inputs' rank correlations with it.",
        epilog=SAFETY_POINTER, formatter_class=_Formatter)
    plot.add_argument("results", metavar="RESULTS.csv", help="results of lhsim sweep or lhsim uncertainty (.csv or .parquet)")
    plot.add_argument("--x", metavar="KEY")
    plot.add_argument("--y", metavar="KEY")
    plot.add_argument("--uncertainty", action="store_true",
                      help="results of lhsim uncertainty: the distribution of the main output with the target "
                           "and the inputs' sensitivity, instead of --x and --y")
    plot.add_argument("--by", metavar="KEY", help="one line per value of this column (e.g. gas)")
    plot.add_argument("--out", metavar="FILE",
                      help="image file, .png or .svg (default: both, named after the results and the keys)")

    sweep = sub.add_parser(
        "sweep", help="run every point of a scenario's sweep section into a CSV or Parquet file",
        description="Run every point of the scenario's sweep: section (a grid, or zip-paired lists) and "
                    "write one row per point: the swept values (quantities in the summary keys' units, the unit at the "
                    "end of the column name: high_pressure_bar), status, message and every summary key. "
                    "Rows reach the file as points finish; run the same command again after an "
                    "interruption to compute only the missing points.",
        epilog=SAFETY_POINTER + "\n\nexit status: 0 the sweep ran (failed points say so in their status); "
                          "2 invalid scenario or sweep; 130 interrupted (results so far are kept).",
        formatter_class=_Formatter)
    sweep.add_argument("scenario", metavar="SCENARIO.yaml", help="scenario file with a sweep: section")
    _runner_options(sweep, "PATH", "points")
    sweep.add_argument("--max-points", type=int, default=None, metavar="N",
                       help="refuse a sweep of more than N points before computing any (default 1000000)")

    margins = sub.add_parser(
        "uncertainty", help="uncertain inputs in, production and power as distributions out, with what drives them",
        description="Draw the samples of the scenario's uncertainty: section (a seeded Latin hypercube through "
                    "each key's distribution), run each as a design point through the sweep runner (one row per "
                    "sample in RESULTS, resumable as a sweep is), and print the mean, standard deviation, P5, P50 "
                    "and P95 of liquid rate (or yield), work per kg liquid, compressor power and figure of merit; "
                    "the chance of meeting uncertainty.target at a fixed compressor flow, or the compressor flow "
                    "that meets a liquid-rate target with 90 and 95 % confidence; and the inputs that drive the "
                    "spread (Spearman's rank correlation, scipy.stats.spearmanr).",
        epilog=SAFETY_POINTER + "\n\nexit status: 0 the samples ran (failed samples say so in their status); "
                          "2 invalid scenario or uncertainty section; 130 interrupted (results so far are kept).",
        formatter_class=_Formatter)
    margins.add_argument("scenario", metavar="SCENARIO.yaml", help="scenario file with an uncertainty: section")
    _runner_options(margins, "RESULTS", "samples")
    margins.add_argument("--json", action="store_true", help="print the statistics as one JSON object and nothing else")

    compare = sub.add_parser(
        "compare", help="the same plant with several gases, ranked by figure of merit",
        description="Solve the scenario once per gas and rank the gases by figure of merit, with yield, "
                    "work per kg of liquid and, with a production target, compressor flow and power.",
        epilog=SAFETY_POINTER, formatter_class=_Formatter)
    compare.add_argument("scenario", metavar="SCENARIO.yaml")
    compare.add_argument("--gases", required=True, metavar="LIST", help="comma-separated, e.g. nitrogen,argon,methane")
    compare.add_argument("--at-optimum", action="store_true",
                         help="put each gas at its own best high_pressure (for the figure of merit) first")
    compare.add_argument("--between", nargs=2, metavar=("LOW", "HIGH"),
                         help="high_pressure bounds for --at-optimum (default '10 bar' '300 bar')")
    compare.add_argument("--json", action="store_true", help="print a JSON list of rows and nothing else")

    optimize = sub.add_parser(
        "optimize", help="the value of one or more keys that gives the most liquid or the least work",
        description="Search the scenario key(s) given by --vary within --between bounds for the goal; "
                    "one key by a bounded Brent search, several by Powell's method with bounds.",
        epilog=SAFETY_POINTER + "\n\ngoals: max-yield, min-work-per-liquid, max-figure-of-merit.",
        formatter_class=_Formatter)
    optimize.add_argument("scenario", metavar="SCENARIO.yaml")
    optimize.add_argument("--vary", action="append", required=True, metavar="KEY",
                          help="scenario key, dotted for nested keys (repeat with --between for several)")
    optimize.add_argument("--between", nargs=2, action="append", required=True, metavar=("LOW", "HIGH"),
                          help="bounds of the key before it, e.g. '50 bar' '400 bar'")
    optimize.add_argument("--goal", required=True, choices=["max-yield", "min-work-per-liquid",
                                                            "max-figure-of-merit"])
    optimize.add_argument("--json", action="store_true",
                          help='print {"vary": {KEY: optimum in SI}, "goal": ..., "summary": {...}} and nothing else')

    gas = sub.add_parser(
        "gas", help="properties of a gas at one state: Joule-Thomson coefficient, inversion, saturation",
        description="Print the state of a gas at a temperature and pressure (or a saturated state: a "
                    "vapour quality with a pressure or a temperature), its Joule-Thomson coefficient, "
                    "saturation temperature, inversion temperatures at that pressure and its maximum "
                    "inversion temperature.",
        epilog=SAFETY_POINTER + "\n\nQuantities take units ('300 K', '27 degC', '1 bar'); bare numbers are SI (K, Pa)."
                              "\nA saturated state: --quality Q with -p or -T (Q = 0 saturated liquid, 1 saturated "
                              "vapour);\nits Joule-Thomson coefficient is the two-phase one, dT_sat/dp.",
        formatter_class=_Formatter)
    gas.add_argument("name", metavar="NAME", help="gas name, e.g. nitrogen, argon, methane, air, hydrogen")
    gas.add_argument("--temperature", "-T", metavar="T", help="temperature, e.g. '300 K'")
    gas.add_argument("--pressure", "-p", metavar="P", help="pressure, e.g. '1 bar'")
    gas.add_argument("--quality", "-x", metavar="Q",
                     help="vapour mass fraction from 0 to 1 of a saturated state, with -p or -T (not both)")
    gas.add_argument("--json", action="store_true", help="print one JSON object and nothing else")
    return parser


def _fail(message, code=EXIT_INPUT):
    print(f"lhsim: error: {message}", file=sys.stderr)
    return code


def main(argv=None):
    """Entry point of the ``lhsim`` console script; returns the exit status."""
    commands = {"run": _cmd_run, "gas": _cmd_gas, "sweep": _cmd_sweep, "compare": _cmd_compare,
                "optimize": _cmd_optimize, "report": _cmd_report, "plot": _cmd_plot,
                "uncertainty": _cmd_uncertainty}
    try:  # a Ctrl-C from the first moment on is an interruption, not a traceback
        args = _parser().parse_args(argv)
        import warnings

        from cycle.errors import RecycleNotConvergedWarning

        # Every command says a missed target in its own output (Warnings, JSON, the message column).
        warnings.simplefilter("ignore", RecycleNotConvergedWarning)
        return commands[args.command](args)
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt:
        print("lhsim: interrupted", file=sys.stderr)
        return 130


def _runner_options(parser, out_name, points):
    """The sweep runner's options: --out, --workers, --dask, --overwrite."""
    parser.add_argument("--out", required=True, metavar=out_name, help="results file, .csv or .parquet")
    parser.add_argument("--workers", type=int, default=None, metavar="N",
                        help=f"local worker processes (default and most: the CPU count, and no more than the "
                             f"{points} left; 1 runs in this process)")
    parser.add_argument("--dask", metavar="ADDRESS",
                        help="run on a Dask distributed scheduler at ADDRESS, or 'local' to start one here")
    parser.add_argument("--overwrite", action="store_true",
                        help="replace an output file made by a different scenario")
    parser.add_argument("--dask-timeout", type=float, default=10.0, metavar="SECONDS",
                        help="how long to try to reach the scheduler at --dask ADDRESS (default 10)")


def _runner_problem(args):
    """What is wrong with the runner's options (one line), or None."""
    if args.workers is not None and args.workers < 1:
        return f"--workers must be 1 or more, got {args.workers}"
    if args.dask is not None and not args.dask.strip():
        return "--dask must be local or a scheduler address such as tcp://127.0.0.1:8786, got ''"
    if not (math.isfinite(args.dask_timeout) and args.dask_timeout > 0):
        return f"--dask-timeout must be a number of seconds above 0, got {args.dask_timeout:g}"
    return None


def _plots_folder_problem(folder):
    """Why ``folder`` cannot take the figures (None if it can): it must be a directory lhsim
    can write into, or one it can make."""
    import os
    import pathlib
    import tempfile

    path = pathlib.Path(folder)
    if path.exists():
        if not path.is_dir():
            return "it exists and is not a directory"
        try:
            with tempfile.TemporaryFile(dir=path):
                pass
        except OSError as err:
            return f"cannot write into it ({err.strerror or err})"
        return None
    parent = path.absolute().parent
    while not parent.exists():
        parent = parent.parent
    if not parent.is_dir():
        return f"cannot make it: {parent} is not a directory"
    if not os.access(parent, os.W_OK | os.X_OK):
        return f"cannot make it: {parent} is not writable"
    return None


def _cmd_run(args):
    from cycle.errors import NoLiquefactionError, ScenarioError
    from cycle.scenario import parse_scenario, read_mapping

    if args.plots:
        problem = _plots_folder_problem(args.plots)
        if problem:
            return _fail(f"--plots must name a directory lhsim can write into, got {args.plots}: {problem}")
    try:
        data = read_mapping(args.scenario)  # the file is read once
        for section, command, what in (("sweep", "sweep", "the points"), ("uncertainty", "uncertainty", "the samples")):
            if isinstance(data, dict) and data.get(section) is not None:
                print(f"lhsim: note: run solves the scenario without its {section} section; use lhsim {command} "
                      f"for {what}", file=sys.stderr)
        if isinstance(data, dict):
            data = {k: v for k, v in data.items() if k != "sweep"}
        scenario = parse_scenario(data)
        from cycle.flowsheet import solve_scenario

        result = solve_scenario(scenario)
    except ScenarioError as err:
        return _fail(str(err))
    except NoLiquefactionError as err:
        return _fail(str(err), EXIT_NO_LIQUID)
    if args.json:
        from cycle.results import json_safe

        print(json.dumps(json_safe(result.to_dict()), indent=2))
        if not result.solve.converged:
            print("lhsim: note: the solve did not meet its target; see solve and warnings in the JSON",
                  file=sys.stderr)
    else:
        from cycle.report import format_result

        print(format_result(result))
        print(SHORT_CAUTION)
    if args.plots:
        from cycle.plots import write_figures

        import pathlib

        try:
            paths = write_figures(result, args.plots, stem=pathlib.Path(args.scenario).stem)
        except OSError as err:
            return _fail(f"--plots: cannot write into {args.plots}: {err.strerror}")
        print(f"lhsim: wrote {len(paths)} figures into {args.plots}", file=sys.stderr)
    return 0


def _cmd_report(args):
    from cycle.errors import NoLiquefactionError, ScenarioError
    from cycle.scenario import load_scenario

    if not args.out.lower().endswith((".html", ".htm")):
        return _fail(f"--out must be an .html file, got {args.out}")
    try:
        scenario = load_scenario(args.scenario)
        from cycle.flowsheet import solve_scenario

        result = solve_scenario(scenario)
    except ScenarioError as err:
        return _fail(str(err))
    except NoLiquefactionError as err:
        return _fail(str(err), EXIT_NO_LIQUID)
    from cycle.report_html import build_report

    with open(args.scenario, encoding="utf-8") as handle:
        text = handle.read()
    margins = None
    data = _read(args.scenario)
    if isinstance(data, dict) and data.get("uncertainty") is not None:
        import pathlib
        import tempfile

        from cycle.uncertainty import run_uncertainty

        print("lhsim: running the samples of the uncertainty section for the report's Margins section",
              file=sys.stderr)
        try:
            with tempfile.TemporaryDirectory() as tmp:
                margins = run_uncertainty(data, pathlib.Path(tmp) / "margins.csv", progress=False)
        except ScenarioError as err:
            return _fail(str(err))
    try:
        with open(args.out, "w", encoding="utf-8") as handle:
            handle.write(build_report(result, text, margins=margins))
    except OSError as err:
        return _fail(f"--out: cannot write {args.out}: {err.strerror}")
    print(f"lhsim: wrote {args.out}", file=sys.stderr)
    return 0


def _cmd_plot(args):
    import pathlib

    from cycle.errors import ScenarioError

    path = pathlib.Path(args.results)
    if not path.exists():
        return _fail(f"results file {path} not found")
    import pandas as pd

    try:
        if path.suffix.lower() == ".parquet":
            frame = pd.read_parquet(path)
        else:
            frame = pd.read_csv(path, keep_default_na=False, na_values=[""], dtype={"message": str})
    except Exception as err:  # any unreadable file: say so in one line
        reason = (str(err).strip().splitlines() or [type(err).__name__])[0]
        return _fail(f"results file {path} could not be read as a table: {reason}")
    if not {"point", "status"} <= set(map(str, frame.columns)):
        return _fail(f"{path} is not an lhsim results file (it has no point and status columns); "
                     f"make one with lhsim sweep")
    if args.out and not args.out.lower().endswith((".png", ".svg")):
        return _fail(f"--out must end in .png or .svg, got {args.out}")
    if args.out:
        folder = pathlib.Path(args.out).absolute().parent
        if not folder.is_dir():
            what = "is not a folder" if folder.exists() else "does not exist"
            return _fail(f"--out {args.out}: the folder {folder} {what}; make it first, or choose another --out")
        if pathlib.Path(args.out).is_dir():
            return _fail(f"--out {args.out} is a folder; give a file name ending in .png or .svg")
    if args.uncertainty:
        if args.x or args.y or args.by:
            return _fail("--uncertainty draws its own chart: give it without --x, --y and --by")
        from cycle.uncertainty import stats_path

        side = stats_path(path)
        if not side.exists():
            return _fail(f"{path} has no statistics beside it ({side.name}): make it with lhsim uncertainty")
        from cycle.plots import uncertainty_chart

        try:
            fig, _ = uncertainty_chart(frame, json.loads(side.read_text(encoding="utf-8")))
        except (ValueError, KeyError) as err:
            return _fail(f"{side} could not be read as lhsim uncertainty statistics: {err}")
        name = f"{path.with_suffix('')}-uncertainty"
    else:
        if not (args.x and args.y):
            return _fail("plot needs --x and --y (or --uncertainty for the results of lhsim uncertainty)")
        from cycle.plots import sweep_chart

        try:
            fig, _ = sweep_chart(frame, args.x, args.y, args.by)
        except ScenarioError as err:
            return _fail(str(err))
        name = f"{path.with_suffix('')}-{args.y}-vs-{args.x}" + (f"-by-{args.by}" if args.by else "")
    outs = [args.out] if args.out else [f"{name}.png", f"{name}.svg"]
    import matplotlib.pyplot as plt

    try:
        for out in outs:
            fig.savefig(out, bbox_inches="tight")
    except OSError as err:
        return _fail(f"{'--out ' if args.out else ''}{out}: cannot write it: {err.strerror or err}")
    finally:
        plt.close(fig)
    print(f"lhsim: wrote {', '.join(outs)}", file=sys.stderr)
    return 0


def _emit(args, data, formatter_name):
    """Print ``data`` as JSON (``--json``) or as text by ``cycle.report.<formatter_name>``."""
    if args.json:
        from cycle.results import json_safe

        print(json.dumps(json_safe(data), indent=2))
    else:
        from cycle import report

        print(getattr(report, formatter_name)(data))
        print(SHORT_CAUTION)
    return 0


def _read(path):
    from cycle.scenario import read_mapping

    return read_mapping(path)


def _cmd_sweep(args):
    from cycle.errors import ScenarioError

    problem = _runner_problem(args)
    if problem:
        return _fail(problem)
    if args.max_points is not None and args.max_points < 1:
        return _fail(f"--max-points must be 1 or more, got {args.max_points}")
    try:
        data = _read(args.scenario)
        from cycle.sweep import run_sweep

        try:
            outcome = run_sweep(data, args.out, workers=args.workers, dask=args.dask, overwrite=args.overwrite,
                                dask_timeout=args.dask_timeout, max_points=args.max_points)
        except KeyboardInterrupt:
            print(f"lhsim: interrupted; the points finished so far are in {args.out}: run the same command "
                  f"again to compute the rest", file=sys.stderr)
            return 130
    except ScenarioError as err:
        return _fail(str(err))
    except OSError as err:  # what the results file's own checks did not foresee
        return _fail(f"--out {args.out}: {err.strerror or err}")
    print(f"{outcome['points']} points in {outcome['path']} ({outcome['computed']} computed now; "
          f"{outcome['no_liquid']} made no liquid, {outcome['failed']} failed or invalid)", file=sys.stderr)
    return 0


def _cmd_uncertainty(args):
    from cycle.errors import ScenarioError

    problem = _runner_problem(args)
    if problem:
        return _fail(problem)
    if args.workers is not None and args.dask is not None:
        return _fail("give --workers or --dask, not both")
    try:
        data = _read(args.scenario)
        from cycle.uncertainty import format_stats, run_uncertainty

        try:
            _, stats = run_uncertainty(data, args.out, workers=args.workers, dask=args.dask, overwrite=args.overwrite,
                                       progress=None if not args.json else False, dask_timeout=args.dask_timeout)
        except KeyboardInterrupt:
            print(f"lhsim: interrupted; the samples finished so far are in {args.out}: run the same command "
                  f"again to compute the rest", file=sys.stderr)
            return 130
    except ScenarioError as err:
        return _fail(str(err))
    except OSError as err:
        return _fail(f"--out {args.out}: {err.strerror or err}")
    if args.json:
        from cycle.results import json_safe

        print(json.dumps(json_safe(stats), indent=2))
    else:
        print(format_stats(stats))
        print(SHORT_CAUTION)
    return 0


def _cmd_compare(args):
    from cycle.errors import ScenarioError

    gases = [g.strip() for g in args.gases.split(",") if g.strip()]
    if not gases:
        return _fail("--gases: expected a comma-separated list such as nitrogen,argon")
    try:
        from cycle.studies import compare

        rows = compare(_read(args.scenario), gases, at_optimum=args.at_optimum,
                       between=tuple(args.between) if args.between else None)
    except ScenarioError as err:
        return _fail(str(err))
    return _emit(args, rows, "format_comparison")


def _cmd_optimize(args):
    from cycle.errors import NoLiquefactionError, ScenarioError

    if len(args.vary) != len(args.between):
        return _fail(f"give one --between LOW HIGH for each --vary, got {len(args.vary)} --vary and "
                     f"{len(args.between)} --between")
    try:
        from cycle.studies import optimize

        found = optimize(_read(args.scenario), [(k, lo, hi) for k, (lo, hi) in zip(args.vary, args.between)],
                         args.goal)
    except ScenarioError as err:
        return _fail(str(err))
    except NoLiquefactionError as err:
        return _fail(str(err), EXIT_NO_LIQUID)
    return _emit(args, found, "format_optimum")


def _cmd_gas(args):
    from cycle.units import UnitError, parse_quantity, shown

    if len(args.name) > 100:
        return _fail(f"NAME must be a gas name such as nitrogen, got {shown(args.name)} ({len(args.name)} characters)")
    quality = T = p = None
    if args.quality is not None:
        if (args.temperature is None) == (args.pressure is None):
            given = "both" if args.temperature is not None else "neither"
            return _fail(f"--quality needs one of --temperature or --pressure (a saturated state is fixed by "
                         f"either), got {given}")
        try:
            quality = parse_quantity(args.quality, "dimensionless")
        except UnitError as err:
            return _fail(f"--quality: {err}")
        if not 0.0 <= quality <= 1.0:
            return _fail(f"--quality must be from 0 (saturated liquid) to 1 (saturated vapour), got {args.quality}")
    elif args.temperature is None or args.pressure is None:
        missing = " and ".join(o for o, v in (("--temperature", args.temperature), ("--pressure", args.pressure))
                               if v is None)
        return _fail(f"give --temperature and --pressure, or one of them with --quality; missing {missing}")
    if args.temperature is not None:
        try:
            T = parse_quantity(args.temperature, "temperature")
        except UnitError as err:
            return _fail(f"--temperature: {err}")
    if args.pressure is not None:
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
        info = gas_properties(fluid, T, p, quality)
    except PropertyRangeError as err:
        if quality is not None:
            return _fail(f"{'--pressure' if p is not None else '--temperature'} with --quality: {err}")
        return _fail(str(err))
    return _emit(args, info, "format_gas")


def gas_properties(fluid, T=None, p=None, quality=None):
    """Everything ``lhsim gas`` reports, as a dictionary with units in the key names.

    With ``quality`` [-] and one of ``T`` [K] or ``p`` [Pa], the saturated state; its
    Joule-Thomson coefficient is then the two-phase one: at constant enthalpy inside the dome
    temperature follows the saturation line, so (dT/dp)_h = dT_sat/dp = T (v_g - v_f) / (h_g - h_f)
    (the Clausius-Clapeyron relation).
    """
    from properties import PropertyRangeError

    if quality is None:
        st = fluid.state_tp(T, p)
        jt = fluid.jt_coefficient(T, p)
    else:
        st = fluid.saturated_state(quality, p=p, T=T)
        liquid, vapour = fluid.saturated_state(0.0, p=st.p), fluid.saturated_state(1.0, p=st.p)
        jt = st.T * (1.0 / vapour.density - 1.0 / liquid.density) / (vapour.h - liquid.h)
    T_sat = fluid.saturation_temperature(st.p)
    try:
        T_inv_max = fluid.max_inversion_temperature()
    except PropertyRangeError:  # no root of T dB/dT - B within the search range
        T_inv_max = None
    return {
        "gas": fluid.name,
        "temperature_K": st.T,
        "pressure_bar": st.p / 1e5,
        "phase": st.phase,
        "quality": st.quality if quality is not None else None,
        "density_kg_per_m3": st.density,
        "enthalpy_kJ_per_kg": st.h / 1e3,
        "entropy_kJ_per_kg_K": st.s / 1e3,
        "jt_coefficient_K_per_bar": jt * 1e5,
        "saturation_temperature_K": T_sat,
        "inversion_temperatures_K": list(fluid.inversion_temperatures(st.p)),
        "max_inversion_temperature_K": T_inv_max,
        "critical_temperature_K": fluid.T_critical,
        "critical_pressure_bar": fluid.p_critical / 1e5,
        "triple_point_temperature_K": fluid.T_triple,
        "triple_point_pressure_bar": fluid.p_triple / 1e5,
    }


def main_exit():
    """Console-script wrapper: exit with the status :func:`main` returns (130 on Ctrl-C, however
    early)."""
    try:
        code = main()
    except KeyboardInterrupt:
        try:
            print("lhsim: interrupted", file=sys.stderr)
        except (OSError, KeyboardInterrupt):
            pass
        code = 130
    sys.exit(code)


if __name__ == "__main__":  # pragma: no cover
    main_exit()
