"""Sweep throughput: serial vs two local workers vs a two-worker Dask LocalCluster.

A script, not a test (pytest does not collect it).  Run from the repository root:

    python tests/benchmarks/bench_sweep.py [--points 200] [--write docs/performance-sweeps.md]

It runs the same 200-point sweep three ways, checks the three results files are identical,
and prints points per second and the ratios to the serial run.  Start-up (process pool,
Dask cluster) is inside the timed region: it is what a user waits for.
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


def bench(points, write):
    steps_p = 20
    steps_ua = points // steps_p
    data = dict(SCENARIO, sweep={"high_pressure": {"from": "120 bar", "to": "300 bar", "steps": steps_p},
                                 "recuperator.ua": {"from": "450 W/K", "to": "900 W/K", "steps": steps_ua}})
    n = steps_p * steps_ua
    timings = {}
    with tempfile.TemporaryDirectory() as tmp:
        # Warm up this process (imports, fluid objects) so the serial run is not charged for them;
        # forked workers inherit the warm state, Dask workers pay their own start-up inside the timing.
        warm = dict(data, sweep={"high_pressure": {"from": "120 bar", "to": "300 bar", "steps": 4}})
        run_sweep(warm, pathlib.Path(tmp) / "warm.csv", workers=1, progress=False)
        files = {}
        for label, options in (("serial", {"workers": 1}), ("2 local workers", {"workers": 2}),
                               ("Dask LocalCluster, 2 workers", {"workers": 2, "dask": "local"})):
            path = pathlib.Path(tmp) / f"{len(files)}.csv"
            start = time.perf_counter()
            run_sweep(data, path, progress=False, **options)
            timings[label] = time.perf_counter() - start
            files[label] = path.read_bytes()
            print(f"{label:<32s} {timings[label]:8.2f} s  {n / timings[label]:8.1f} points/s", flush=True)
        same = len(set(files.values())) == 1
    serial = timings["serial"]
    lines = [
        "| run | time [s] | points/s | throughput / serial |",
        "|---|---|---|---|",
    ]
    for label, t in timings.items():
        lines.append(f"| {label} | {t:.2f} | {n / t:.1f} | {serial / t:.2f} |")
    verdict = "met" if serial / timings["2 local workers"] >= 1.8 else "NOT met"
    text = "\n".join(lines)
    print()
    print(text)
    print(f"\nresults identical across the three runs: {same}; goal (2 local workers >= 1.8 x serial): {verdict}")
    if write:
        stamp = datetime.date.today().isoformat()
        body = (f"# Sweep throughput\n\nMeasured by `python tests/benchmarks/bench_sweep.py --write {write}` on "
                f"{stamp}: {os.cpu_count()} CPUs, Python {platform.python_version()}, {platform.machine()}. "
                f"The sweep: {n} points of a nitrogen liquefier for 10 L/h with a UA-sized 100-zone recuperator "
                f"(high pressure x UA grid). Times include starting the worker processes or the Dask cluster.\n\n"
                f"{text}\n\nThe three results files are byte-identical: {same}. Goal: two local workers give at "
                f"least 1.8 times the serial throughput: **{verdict}**.\n")
        pathlib.Path(write).write_text(body)
        print(f"wrote {write}")
    return serial / timings["2 local workers"]


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--points", type=int, default=200)
    parser.add_argument("--write", metavar="FILE", help="also write the table to this Markdown file")
    args = parser.parse_args()
    bench(args.points, args.write)


if __name__ == "__main__":
    main()
