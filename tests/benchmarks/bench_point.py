"""Cost of one design point in HEOS (p, h) flash equivalents, and how it grows.

A script, not a test (pytest does not collect it).  Run from the repository root:

    python tests/benchmarks/bench_point.py [--write docs/performance.md] [--quick]

Measures, in one run on this machine:

1. the time of one bare CoolProp HEOS (p, h) flash (low-level AbstractState) on the states of
   the benchmark point's recuperator;
2. one converged 50-zone point with the recuperator sized by UA, divided by (1): the cost in
   flash equivalents (goal: 50 or less);
3. the same point by a straightforward script written here: PropsSI for every state and
   bisection on the recuperator duty (goal: lhsim at least 30 times faster, yields within 0.1 %);
4. growth with zones (25, 50, 100, 200; goal: 200 zones within 4.5 times the 50-zone cost) and with
   sweep size (10, 100, 1000 points, serial; linear);
5. where the time of a point goes: property calls (counted, times unit costs measured here) and
   the rest (Python).
"""

import argparse
import datetime
import pathlib
import platform
import statistics
import sys
import tempfile
import time

ROOT = pathlib.Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402
import CoolProp  # noqa: E402
from CoolProp import CoolProp as CP  # noqa: E402

from cycle.flowsheet import build_flowsheet  # noqa: E402
from cycle.scenario import parse_scenario  # noqa: E402
from properties import get_fluid  # noqa: E402

POINT = {
    "gas": "nitrogen", "ambient_temperature": 300.0, "low_pressure": 1.05e5, "high_pressure": 200e5,
    "compressor": {"isothermal_efficiency": 0.6},
    "recuperator": {"ua": 400.0, "zones": 50},
    "production": {"compressor_flow": 150 / 3600},
}


def timed(func, repeat):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        value = func()
        times.append(time.perf_counter() - start)
    return statistics.median(times), value


def flash_time(result):
    """Median time of one HEOS HmassP flash over the point's recuperator states."""
    prof = result.recuperator.profile
    fluid = get_fluid(result.scenario.gas)
    by = {s.name: s.state for s in result.states}
    hot_out = by["recuperator high-pressure outlet, valve inlet"]
    vapour = by["separator vapour, recuperator low-pressure inlet"]
    y = result.liquid_yield
    states = [(p, hot_out.h + q) for p, q in zip(prof.hot_p, prof.duty)]
    states += [(p, vapour.h + q / (1 - y)) for p, q in zip(prof.cold_p[1:], prof.duty[1:])]
    state = CoolProp.AbstractState("HEOS", fluid.name)

    def run():
        for p, h in states:
            state.update(CP.HmassP_INPUTS, h, p)

    t, _ = timed(run, 15)
    return t / len(states)


def stage_times(data, runs, wrapped):
    """Mean time per solve of ``data`` spent inside each of the ``wrapped`` functions, (owner,
    name, label), over ``runs`` solves, with "whole" the mean time of a solve: a dict by label."""
    spent_in = {label: 0.0 for _, _, label in wrapped}
    saved = []
    for owner, name, label in wrapped:
        inner = getattr(owner, name)

        def timed_call(*a, _inner=inner, _label=label, **k):
            start = time.perf_counter()
            try:
                return _inner(*a, **k)
            finally:
                spent_in[_label] += time.perf_counter() - start

        saved.append((owner, name, inner))
        setattr(owner, name, timed_call)
    try:
        start = time.perf_counter()
        for _ in range(runs):
            solve_point(data)
        whole = time.perf_counter() - start
    finally:
        for owner, name, inner in saved:
            setattr(owner, name, inner)
    out = {label: t / runs for label, t in spent_in.items()}
    out["whole"], out["runs"] = whole / runs, runs
    return out


def stage_table(say, what, spent, stages, rest):
    """Say a table of ``stages`` (label -> mean time [s]), the rest of ``spent["whole"]`` as ``rest``."""
    whole = spent["whole"]
    stages = dict(stages)
    stages[rest] = whole - sum(stages.values())
    say()
    say(f"Where {what}'s time goes by stage ({spent['runs']} runs timed with the stages wrapped: "
        f"{whole * 1e3:.2f} ms a point):")
    say()
    say("| stage | time | share |")
    say("|---|---|---|")
    for label, t in stages.items():
        say(f"| {label} | {t * 1e3:.2f} ms | {100 * t / whole:.0f} % |")


def unit_costs(fluid_name):
    state = CoolProp.AbstractState("HEOS", fluid_name)
    state.update(CP.PT_INPUTS, 1e5, 300.0)
    D = state.rhomolar()
    out = {}
    for label, call in (
        ("DmolarT update", lambda: state.update(CP.DmolarT_INPUTS, D, 300.0)),
        ("PT update", lambda: state.update(CP.PT_INPUTS, 1e5, 300.0)),
        ("PQ update", lambda: state.update(CP.PQ_INPUTS, 1e5, 1.0)),
        ("partial derivative", lambda: state.first_partial_deriv(CP.iP, CP.iT, CP.iDmolar)),
    ):
        n = 2000
        t, _ = timed(lambda: [call() for _ in range(n)], 5)
        out[label] = t / n
    return out


class Counting:
    """Stands in for an AbstractState and counts the calls made to it."""

    def __init__(self, inner):
        self._inner = inner
        self.counts = {}

    def update(self, pair, a, b):
        name = {CP.DmolarT_INPUTS: "DmolarT update", CP.PT_INPUTS: "PT update", CP.PQ_INPUTS: "PQ update",
                CP.HmassP_INPUTS: "HmassP flash", CP.PSmass_INPUTS: "PSmass flash"}.get(pair, "other update")
        self.counts[name] = self.counts.get(name, 0) + 1
        return self._inner.update(pair, a, b)

    def first_partial_deriv(self, *args):
        self.counts["partial derivative"] = self.counts.get("partial derivative", 0) + 1
        return self._inner.first_partial_deriv(*args)

    def __getattr__(self, name):
        return getattr(self._inner, name)


def solve_point(data):
    return build_flowsheet(parse_scenario(data)).solve()


def straightforward(data, tol=1e-7):
    """The same point the plain way: PropsSI for every state, bisection on the duty."""
    PropsSI = CP.PropsSI
    fluid = "Nitrogen"
    T0, p_low, p_high = data["ambient_temperature"], data["low_pressure"], data["high_pressure"]
    m, ua_target, n = data["production"]["compressor_flow"], data["recuperator"]["ua"], data["recuperator"]["zones"]
    h3 = PropsSI("H", "T", T0, "P", p_high, fluid)
    hf = PropsSI("H", "P", p_low, "Q", 0, fluid)
    hg = PropsSI("H", "P", p_low, "Q", 1, fluid)
    Tg = PropsSI("T", "P", p_low, "Q", 1, fluid)
    h_ret_max = PropsSI("H", "T", T0, "P", p_low, fluid)

    def ua_of(Q):
        y = (hg - (h3 - Q)) / (hg - hf)
        ua = 0.0
        prev = None
        for k in range(n + 1):
            q = Q * k / n
            th = PropsSI("T", "P", p_high, "H", h3 - Q + q, fluid)
            tc = PropsSI("T", "P", p_low, "H", hg + q / (1 - y), fluid)
            dT = th - tc
            if dT <= 0:
                return float("inf"), y
            if prev is not None:
                a, b = prev, dT
                lmtd = 0.5 * (a + b) if abs(a - b) < 1e-9 * a else (a - b) / np.log(a / b)
                ua += (Q / n) / lmtd
            prev = dT
        return m * ua, y

    lo = 0.0
    hi = min(h3 - PropsSI("H", "T", Tg, "P", p_high, fluid), (h_ret_max - hg) * (1 - 0.0))
    while hi - lo > tol * hi:
        mid = 0.5 * (lo + hi)
        if ua_of(mid)[0] < ua_target:
            lo = mid
        else:
            hi = mid
    return ua_of(0.5 * (lo + hi))[1]


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--write", metavar="FILE")
    parser.add_argument("--quick", action="store_true", help="fewer repeats and no 1000-point sweep")
    args = parser.parse_args()
    repeat = 3 if args.quick else 7
    lines = []

    def say(text=""):
        print(text, flush=True)
        lines.append(text)

    solve_point(POINT)  # warm up: fluid objects, caches
    # The flash and the point timed in turn, five rounds: the median of the rounds' ratios (this
    # machine's speed drifts within a run; a ratio of times taken together drifts less).
    rounds = []
    for _ in range(5):
        t_point, result = timed(lambda: solve_point(POINT), repeat)
        t_flash = flash_time(result)
        rounds.append((t_point / t_flash, t_point, t_flash))
    rounds.sort()
    cost, t_point, t_flash = rounds[len(rounds) // 2]
    spread = (rounds[0][0], rounds[-1][0])
    say("| measure | value | goal | met |")
    say("|---|---|---|---|")
    say(f"| one HEOS (p, h) flash (median over the point's recuperator states) | {t_flash * 1e6:.1f} us | | |")
    say(f"| one converged 50-zone UA point | {t_point * 1e3:.2f} ms | | |")
    say(f"| point cost in flash equivalents (median of 5 rounds; {spread[0]:.0f} to {spread[1]:.0f}) | {cost:.0f} | "
        f"<= 50 | {'yes' if cost <= 50 else 'no'} |")
    say(f"| recuperator marches (profile evaluations) per point | {result.solve.function_calls} | | |")

    t_plain, y_plain = timed(lambda: straightforward(POINT), 1)
    ratio = t_plain / t_point
    dy = abs(y_plain / result.liquid_yield - 1)
    say(f"| straightforward PropsSI + bisection script | {t_plain:.2f} s | | |")
    say(f"| ... slower than lhsim by | {ratio:.0f} x | >= 30 x | {'yes' if ratio >= 30 else 'no'} |")
    say(f"| ... yield difference | {100 * dy:.4f} % | <= 0.1 % | {'yes' if dy <= 1e-3 else 'no'} |")

    zone_times = {}
    for zones in (25, 50, 100, 200):
        data = dict(POINT, recuperator=dict(POINT["recuperator"], zones=zones))
        solve_point(data)
        zone_times[zones], _ = timed(lambda: solve_point(data), repeat)
    growth = zone_times[200] / zone_times[50]
    for zones, t in zone_times.items():
        say(f"| {zones} zones | {t * 1e3:.2f} ms ({t / zone_times[50]:.2f} x the 50-zone point) | | |")
    say(f"| 200 zones over 50 zones | {growth:.2f} x | <= 4.5 x | {'yes' if growth <= 4.5 else 'no'} |")

    # The same plant with its recuperator given by a tube-in-tube geometry, rated for its length.
    geometry = dict(POINT, recuperator={"zones": 50, "geometry": {
        "tubes": 6, "inner_tube": {"inner_diameter": 6e-3, "outer_diameter": 8e-3},
        "outer_tube": {"inner_diameter": 22e-3}, "wall_material": "stainless steel 304", "length": 40.0}})
    solve_point(geometry)
    t_geometry, rated = timed(lambda: solve_point(geometry), repeat)
    g_ratio = t_geometry / t_point
    say(f"| one converged 50-zone geometry point (rated, 40 m) | {t_geometry * 1e3:.2f} ms, "
        f"{rated.solve.function_calls} marches | | |")
    say(f"| ... over the 50-zone UA point | {g_ratio:.1f} x | <= 3 x | {'yes' if g_ratio <= 3 else 'no'} |")

    from cycle.sweep import run_sweep

    sizes = (10, 100) if args.quick else (10, 100, 1000)
    per_point = {}
    with tempfile.TemporaryDirectory() as tmp:
        for size in sizes:
            data = dict(POINT, sweep={"recuperator.ua": {"from": 300.0, "to": 600.0, "steps": size}})
            start = time.perf_counter()
            run_sweep(data, pathlib.Path(tmp) / f"{size}.csv", workers=1, progress=False)
            per_point[size] = (time.perf_counter() - start) / size
    for size, t in per_point.items():
        say(f"| {size}-point sweep, serial | {t * 1e3:.2f} ms per point | linear | |")

    fluid = get_fluid("nitrogen")
    counting = Counting(fluid._state)
    fluid._state = counting
    fluid._marcher = None
    try:
        solve_point(POINT)
    finally:
        fluid._state = counting._inner
        fluid._marcher = None
    costs = unit_costs("Nitrogen")
    costs["HmassP flash"] = t_flash
    costs["PSmass flash"] = t_flash
    spent = sum(costs.get(name, 0.0) * n for name, n in counting.counts.items())
    say()
    say("Where one point's time goes (calls counted in one solve, times unit costs measured above):")
    say()
    say("| property call | calls | unit cost | time |")
    say("|---|---|---|---|")
    for name, n in sorted(counting.counts.items(), key=lambda kv: -kv[1]):
        unit = costs.get(name, 0.0)
        say(f"| {name} | {n} | {unit * 1e6:.2f} us | {unit * n * 1e3:.2f} ms |")
    say(f"| all property calls | | | {spent * 1e3:.2f} ms ({100 * spent / t_point:.0f} % of the point) |")
    say(f"| the rest (Python: loops, State objects, root finding) | | | {(t_point - spent) * 1e3:.2f} ms "
        f"({100 * (t_point - spent) / t_point:.0f} %) |")

    # Where the point's time goes by stage: the marches, the Newton steps on estimated profiles
    # between them (the linear models and their evaluations), the valve's sizing, the rest.
    import cycle.equipment as equipment
    import cycle.flowsheet as flowsheet
    import cycle.orifice as orifice
    import cycle.tube_exchanger as tube_exchanger
    from properties.fluid import Fluid

    spent = stage_times(POINT, 5 * repeat, [(equipment.Recuperator, "profile", "marches"),
                                            (flowsheet, "_steps_on_estimates", "steps"),
                                            (orifice, "size_valve", "valve sizing")])
    stage_table(say, "one point", spent, {
        "recuperator marches (3 a point, both sides)": spent["marches"],
        "Newton steps on estimated profiles (models and their evaluations)": spent["steps"] - spent["marches"],
        "valve sizing (HEM critical flux)": spent["valve sizing"]}, "the rest (states, compressor, exergy, results)")

    # The same for the rated geometry point: its marches (of which the zones' transport
    # properties), the length model's evaluations between them, the rest.
    spent = stage_times(geometry, 2 * repeat, [(tube_exchanger, "rate", "ratings"),
                                               (Fluid, "transport_td", "transport"),
                                               (tube_exchanger, "estimated_length", "model")])
    stage_table(say, "the rated geometry point", spent, {
        f"marches ({rated.solve.function_calls} a point: both streams, correlations, pressures), less their "
        f"transport properties": spent["ratings"] - spent["transport"],
        "transport properties of every zone (one density-temperature update each)": spent["transport"],
        "length model evaluations between the marches (no property call)": spent["model"]},
        "the rest (first duty, states, valve, exergy, results)")

    if args.write:
        head = (f"# Performance\n\nMeasured by `python tests/benchmarks/bench_point.py --write {args.write}` on "
                f"{datetime.date.today().isoformat()}: Python {platform.python_version()}, CoolProp "
                f"{CoolProp.__version__}, {platform.machine()}, 2 cores. The point: nitrogen 1.05 -> 200 bar, "
                f"isothermal compressor, recuperator sized by UA = 400 W/K over 50 zones, 150 kg/h compressor "
                f"flow. Times are medians of repeated runs; compare them as ratios (this virtual machine's speed "
                f"changes between sessions by up to three times, the ratios by a few per cent).\n\n")
        notes = """
## What makes a point cheap

- **The march** (`properties/march.py`): each recuperator state is solved by Newton's method on
  (T, molar density) with CoolProp's `DmolarT_INPUTS` and analytic partial derivatives; two-phase
  states come from cached saturation bounds at their pressure; CoolProp's own flash is the
  fall-back. A fresh march starts each state from the one before (its value and slopes, curved as
  the slopes changed), the hot side from its known inlet, so no state needs the flash.
  `tests/test_march.py` checks |dT| <= 1e-6 K against the flash over random states of twelve
  fluids, across saturation and near the critical point.
- **Marches that remember** (`Fluid.remembering`, within one design point only, so a point's
  answer never depends on what was solved before it): a march along the pressures of an earlier
  one starts every state from the linear estimate around the nearest (its sensitivities from
  Newton's Jacobian), and all its states are stepped together, one density-temperature update a
  state a pass.
- **Three marches a UA point** (`_steps_on_estimates` in `cycle/flowsheet.py`, `method`
  `newton-on-estimates` in the solve report): after each march, the root of the UA of a linear
  model of the exchanger built from it (`processes.counterflow_estimator`: the hot side linear in
  the duty, no property call) is found by secant steps, and the next march is made there. The
  model is exact at the march and its error is of second order in the duty step, so the marches
  converge quadratically (from the effectiveness-NTU guess 0.8 % off: 1.6e-2 J/kg after the
  second march, below the duty tolerance after the third) where Brent's method in a bracket took
  eight. Brent's method remains the fall-back, and for the other sizings. The tolerance on the duty
  is unchanged: 1e-10 of its largest value (about 2e-5 J/kg), reported as `tolerance`.
- **No flash left on the way**: a valve's isentropic states by Newton from the nearest one found
  along the isentrope (`Fluid.state_ps(..., guess=)`), the exchanger's end states and the suction
  mix from a nearby state (`Fluid.state_ph(..., guess=)`), repeated (T, p) states from a cache.
- **A rated geometry point** (`cycle/tube_exchanger.py`, `docs/recuperator-geometry.md`): the
  correlations on NumPy arrays for all zones at once, transport properties from one
  density-temperature update per zone, and the length by Newton's method on the marches
  (`_length_steps`): each step one march whose pressures are not settled first (a rough rating),
  the next duty from the root of the length of that march's linear model (its conductances per
  metre moved along their secant in the duty from the march before, its pressures settled on the
  model, both streams in one array; the first, far, root by inverse quadratic steps), and the
  pressures settled only at the duty that meets the length. Four marches a point (19.2, 40.86,
  39.9999, 39.999999 m for 40 m) where five settled ratings took eleven. A model evaluation far
  from its march settles its pressures only to a hundredth of the model's own error there.
- **The valve's flux scan** stops once the flux has fallen twice past its largest (one maximum
  along an isentrope): 13 isentropic states where 19 were, the same bracket and answer.
- **Start-up**: `lhsim --help` and argument errors import neither CoolProp, pandas, matplotlib,
  SciPy nor Dask (a test checks this); importing CoolProp costs about 2.5 s per process, paid once.
- Answers: the yields of the demos and of 72 UA points (nitrogen, argon, methane, air; three UAs,
  both kinds of production, 20 to 200 zones) agree with those before this work within 3e-9
  relative, valve fluxes within 5e-8 (measured once with a script, 2026-12-03); after the
  rated-point work of 2026-12-04 the same 82 UA and demo points within 2e-8, the demos' valve
  keys identical, and 24 rated points (nitrogen, argon, methane; 12, 35 and 80 m; 20 and 50
  zones; the part-load demo's flows) within 8e-8 of their yields before it.
  `tests/test_honest_solves.py` checks Newton on estimates against Brent's method on four UA
  points, `tests/test_geometry.py` on four rated ones.

## Where the time goes, and what was tried

- **A UA point** is now mostly its three marches (about 500 density-temperature updates: the
  first, fresh, march takes two Newton passes a state; the second, started 1.6 kJ/kg away, two;
  the third, one), each update with its partial derivatives and the Python around it about 5 us;
  then the model and its secant steps (about ten evaluations), the valve (13 isentropic states)
  and the results. Its cost in flash equivalents depends on the machine: 40 to 44 in the runs of
  2026-12-04, where nearly the same code measured 49 to 54 on 2026-12-03, on a machine whose
  flash took 2.2 times as long and the point 3 times. Tried and left out,
  measured: a cubic Hermite start for the second march between the first march's states (the
  second march then takes one pass a state, 197 updates down to 102, but the interpolation costs
  about as much as the pass it saves: the point's time unchanged within 1 %); the two Newton loops
  of the batch march merged into one (no change beyond the noise); inverse quadratic steps for the
  UA model (one evaluation fewer, but near the perfect exchanger it steps off the residual's
  curve); a looser final-step test in Newton's method (the starts are not close enough for it to
  count); second derivatives of T in h for the model (a better root, not good enough to save the
  third march).
- **A rated geometry point** is four marches, each with the transport properties of every zone
  (two fifths of a march: CoolProp's conductivity with its critical enhancement costs three
  times a density-temperature update), and the length model's evaluations between them. Three
  marches would need the third to meet the length to 1e-7 and its pressures to 1e-7: it comes
  within 2.4e-6 and 3.5e-5. Tried and left out, measured: film coefficients read off the last
  march by each stream's enthalpy (the second march 1e-3 off instead of 2e-2, the third 2.6e-7,
  still short of 1e-7, so four marches and slower); the second march settled before its model is
  used (the third then 1.6e-7 off: the same).
- **Tabulated properties** (TTSE/bicubic) are left out: the march already gives HEOS answers at a
  fraction of the flash cost, and the tables' error and the crash seen when building them in the
  worker process would need their own measurement across the demos and a sweep before use.
"""
        pathlib.Path(args.write).write_text(head + "\n".join(lines) + "\n" + notes)
        print(f"wrote {args.write}")


if __name__ == "__main__":
    main()
