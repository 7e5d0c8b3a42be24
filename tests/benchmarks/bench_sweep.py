"""Sweep throughput: serial vs two local workers vs a two-worker Dask LocalCluster.

A script, not a test (pytest does not collect it).  Run from the repository root:

    python tests/benchmarks/bench_sweep.py [--points 200] [--write docs/performance-sweeps.md]

It runs the same 200-point sweep three ways, checks the results files are identical, and prints
points per second and the ratios to the serial run, with the machine's own limit beside them (the
same points in two bare forked processes).  Start-up (process pool, Dask cluster) is inside the
timed region: it is what a user waits for.
"""

import argparse
import datetime
import os
import pathlib
import platform
import sys
import tempfile
import time

ROOT = pathlib.Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from cycle.sweep import run_sweep  # noqa: E402

SCENARIO = {
    "name": "benchmark: nitrogen bench liquefier, UA-sized recuperator",
    "gas": "nitrogen", "ambient_temperature": "300 K", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
    "compressor": {"stages": 3, "isentropic_efficiency": 0.75},
    "aftercooler": {"outlet_temperature": "305 K", "pressure_drop": "0.3 bar"},
    "recuperator": {"ua": "400 W/K", "zones": 100, "high_side_pressure_drop": "0.5 bar",
                    "low_side_pressure_drop": "0.04 bar"},
    "heat_leak": "5 W", "production": {"liquid_rate": "10 L/h"},
}


def _run_points(mappings):
    from cycle.sweep import run_point

    for mapping in mappings:
        run_point(mapping)


def ceiling(data):
    """The machine's own limit: the sweep's points solved in one process, then split between two
    forked processes with no sweep machinery (no pool, no results file): (serial s, two s)."""
    import multiprocessing

    from cycle.sweep import expand

    mappings = [mapping for _, mapping in expand(data)[1]]
    start = time.perf_counter()
    _run_points(mappings)
    serial = time.perf_counter() - start
    context = multiprocessing.get_context("fork")
    start = time.perf_counter()
    halves = [context.Process(target=_run_points, args=(mappings[k::2],)) for k in range(2)]
    for process in halves:
        process.start()
    for process in halves:
        process.join()
    return serial, time.perf_counter() - start


def bench(points, write, rounds):
    import statistics

    steps_p = 20
    steps_ua = points // steps_p
    data = dict(SCENARIO, sweep={"high_pressure": {"from": "120 bar", "to": "300 bar", "steps": steps_p},
                                 "recuperator.ua": {"from": "450 W/K", "to": "900 W/K", "steps": steps_ua}})
    n = steps_p * steps_ua
    timings = {}
    runs = (("serial", {"workers": 1}), ("2 local workers", {"workers": 2}),
            ("Dask LocalCluster, 2 workers", {"workers": 2, "dask": "local"}))
    with tempfile.TemporaryDirectory() as tmp:
        # Warm up this process (imports, fluid objects) so the serial run is not charged for them;
        # forked workers inherit the warm state, Dask workers pay their own start-up inside the timing.
        warm = dict(data, sweep={"high_pressure": {"from": "120 bar", "to": "300 bar", "steps": 4}})
        run_sweep(warm, pathlib.Path(tmp) / "warm.csv", workers=1, progress=False)
        files = {}
        seen = {label: [] for label, _ in runs}
        limits = []
        # Serial and two-worker runs alternate, ``rounds`` times, with the machine's own limit
        # measured in each round: this virtual machine's two CPUs are shared, and what two
        # processes can do together changes from minute to minute.
        for r in range(rounds):
            for label, options in runs:
                if "dask" in options and r:
                    continue  # its start-up dominates: once is enough
                path = pathlib.Path(tmp) / f"{label}-{r}.csv"
                start = time.perf_counter()
                run_sweep(data, path, progress=False, **options)
                seen[label].append(time.perf_counter() - start)
                files[label] = path.read_bytes()
                print(f"{label:<32s} {seen[label][-1]:8.2f} s  {n / seen[label][-1]:8.1f} points/s", flush=True)
            limits.append(ceiling(data))
            print(f"{'two bare processes':<32s} {limits[-1][1]:8.2f} s  ({limits[-1][0] / limits[-1][1]:.2f} x "
                  f"one bare process)", flush=True)
        timings = {label: statistics.median(v) for label, v in seen.items()}
        same = len(set(files.values())) == 1
    serial = timings["serial"]
    bare = statistics.median(a / b for a, b in limits)
    ratio = serial / timings["2 local workers"]
    lines = [
        "| run | time [s] | points/s | throughput / serial |",
        "|---|---|---|---|",
    ]
    for label, t in timings.items():
        lines.append(f"| {label} | {t:.2f} | {n / t:.1f} | {serial / t:.2f} |")
    lines.append(f"| the same points in two bare processes (no pool, no results file): the machine's limit | | | "
                 f"{bare:.2f} |")
    verdict = "met" if ratio >= 1.8 else "NOT met"
    text = "\n".join(lines)
    print()
    print(text)
    print(f"\nresults identical across the runs: {same}; goal (2 local workers >= 1.8 x serial): {verdict}; "
          f"two bare processes: {bare:.2f} x, so the sweep machinery keeps {ratio / bare:.0%} of what the machine gives")
    if write:
        stamp = datetime.date.today().isoformat()
        body = (f"# Sweep throughput\n\nMeasured by `python tests/benchmarks/bench_sweep.py --write {write}` on "
                f"{stamp}: {os.cpu_count()} CPUs, Python {platform.python_version()}, {platform.machine()}. "
                f"The sweep: {n} points of a nitrogen liquefier for 10 L/h with a UA-sized 100-zone recuperator "
                f"(high pressure x UA grid). Times include starting the worker processes or the Dask cluster; "
                f"medians of {rounds} rounds (the Dask run once).\n\n"
                f"{text}\n\nThe results files are byte-identical: {same}. Goal: two local workers give at "
                f"least 1.8 times the serial throughput: **{verdict}** ({ratio:.2f} x).\n\n" + NOTES.format(
                    bare=bare, share=ratio / bare))
        pathlib.Path(write).write_text(body)
        print(f"wrote {write}")
    return ratio


NOTES = """The last row is the ceiling: the same points split between two forked processes that do
nothing else, against one. This virtual machine's two CPUs are shared with other machines, and
what two processes get together changes from minute to minute (1.2 to 1.9 times one, seen on
2026-12-04); the sweep kept {share:.0%} of the {bare:.2f} times measured alongside it here. Where
the ceiling is below 1.8, no sweep can meet the goal on that machine at that time; the ratio of the
sweep to the ceiling is what this code controls (start-up, batches, the results file).

The Dask LocalCluster run is slower than the serial one here because starting the cluster (a
scheduler and two worker processes, each importing CoolProp) takes several seconds, which a
sweep of a few seconds cannot win back; on a long sweep, or on a cluster kept up between studies
([studies.md](studies.md), "One cluster for many studies"), the start-up is paid once and the
batches run in parallel as with local processes. Points are sent in batches of about
len/(16 x workers) (at most 25) so that scheduling costs little and the last batches do not leave a
worker idle for long.
"""


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--points", type=int, default=200)
    parser.add_argument("--write", metavar="FILE", help="also write the table to this Markdown file")
    parser.add_argument("--rounds", type=int, default=3, help="serial and two-worker runs, alternating")
    args = parser.parse_args()
    bench(args.points, args.write, args.rounds)


if __name__ == "__main__":
    main()
