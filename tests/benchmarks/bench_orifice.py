"""Cost of one throttle-valve sizing (cycle.orifice.size_valve) in HEOS (p, h) flash equivalents.

A script, not a test (pytest does not collect it).  Run from the repository root:

    python tests/benchmarks/bench_orifice.py [--repeat 7]

For each fluid the unit is the median time of one bare CoolProp HEOS (p, h) flash (low-level
AbstractState, ``HmassP_INPUTS``) over single-phase states of that fluid spread over a
recuperator's range (1.05 to 200 bar, from 1.2 times the critical temperature, or its lowest
valid temperature, to 300 K), as bench_point.py measures a flash on its recuperator's states.
Each inlet is then sized (median of repeated calls) and its time divided by that unit.  The
property calls of one sizing are counted by standing in for the fluid's AbstractState.
"""

import argparse
import pathlib
import statistics
import sys
import time

ROOT = pathlib.Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402
import CoolProp  # noqa: E402
from CoolProp import CoolProp as CP  # noqa: E402

from cycle.orifice import size_valve  # noqa: E402
from properties import get_fluid  # noqa: E402

# (label, fluid, inlet maker, outlet pressure [Pa]): the kinds of valve inlet the program meets.
CASES = (
    ("nitrogen 200 bar 130 K (dense, enters the dome) -> 1.05 bar", "nitrogen",
     lambda f: f.state_tp(130.0, 200e5), 1.05e5),
    ("argon 180 bar 160 K -> 1.2 bar", "argon", lambda f: f.state_tp(160.0, 180e5), 1.2e5),
    ("nitrogen 30 bar 130 K (cold gas near saturation) -> 1 bar", "nitrogen",
     lambda f: f.state_tp(130.0, 30e5), 1e5),
    ("nitrogen saturated liquid 20 bar -> 1 bar", "nitrogen", lambda f: f.saturated_liquid(20e5), 1e5),
    ("nitrogen liquid 40 bar 100 K -> 1 bar", "nitrogen", lambda f: f.state_tp(100.0, 40e5), 1e5),
    ("hydrogen 120 bar 40 K -> 1.2 bar", "hydrogen", lambda f: f.state_tp(40.0, 120e5), 1.2e5),
    ("air 200 bar 140 K -> 1 bar (pseudo-pure: two-phase by bubble/dew states)", "air",
     lambda f: f.state_tp(140.0, 200e5), 1e5),
    ("nitrogen 5 bar 300 K -> 4.5 bar (not choked)", "nitrogen", lambda f: f.state_tp(300.0, 5e5), 4.5e5),
)


def median_time(func, repeat):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        func()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def flash_time(fluid, repeat):
    """Median time of one HEOS HmassP flash over single-phase states of ``fluid``."""
    state = CoolProp.AbstractState("HEOS", fluid.name)
    T_low = max(1.2 * fluid.T_critical, fluid.T_min + 1.0)
    states = []
    for p in np.geomspace(1.05e5, 200e5, 8):
        for T in np.linspace(T_low, 300.0, 8):
            state.update(CP.PT_INPUTS, p, T)
            states.append((p, state.hmass()))

    def run():
        for p, h in states:
            state.update(CP.HmassP_INPUTS, h, p)

    return median_time(run, repeat) / len(states)


class Counting:
    """Stands in for an AbstractState and counts the updates made to it."""

    NAMES = {CP.PSmass_INPUTS: "(p, s) flash", CP.HmassP_INPUTS: "(p, h) flash", CP.PQ_INPUTS: "(p, Q) update",
             CP.PT_INPUTS: "(p, T) update"}

    def __init__(self, inner):
        self._inner = inner
        self.counts = {}

    def update(self, pair, a, b):
        name = self.NAMES.get(pair, "other update")
        self.counts[name] = self.counts.get(name, 0) + 1
        return self._inner.update(pair, a, b)

    def __getattr__(self, name):
        return getattr(self._inner, name)


def counted_calls(fluid, inlet, p_out):
    """The property updates one sizing makes (the saturation cache emptied first)."""
    fluid._sat_cache.clear()
    counting = Counting(fluid._state)
    fluid._state = counting
    try:
        size_valve(fluid, inlet, p_out)
    finally:
        fluid._state = counting._inner if fluid._state is counting else fluid._state
    return counting.counts


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=7)
    args = parser.parse_args()
    units = {}
    print(f"CoolProp {CoolProp.__version__}; medians of {args.repeat} runs; compare as ratios.")
    print()
    print("| valve inlet -> outlet | one (p, h) flash | size_valve | flash equivalents | property updates counted |")
    print("|---|---|---|---|---|")
    for label, gas, make, p_out in CASES:
        fluid = get_fluid(gas)
        if gas not in units:
            units[gas] = flash_time(fluid, args.repeat)
        inlet = make(fluid)
        size_valve(fluid, inlet, p_out)  # warm up
        counts = counted_calls(fluid, inlet, p_out)
        t = median_time(lambda: size_valve(fluid, inlet, p_out), args.repeat)
        calls = ", ".join(f"{n} {name}" for name, n in sorted(counts.items(), key=lambda kv: -kv[1]))
        print(f"| {label} | {units[gas] * 1e6:.1f} us | {t * 1e3:.2f} ms | {t / units[gas]:.0f} | {calls} |")


if __name__ == "__main__":
    main()
