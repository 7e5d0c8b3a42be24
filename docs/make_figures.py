"""Make the figures shown in docs/figures.md and the README from the demo scenarios.

Run from the repository root:  python docs/make_figures.py   (or ... sweep: only the sweep charts,
... margins: only the margins chart)
"""

import pathlib
import sys
import tempfile

ROOT = pathlib.Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from cycle import api, plots  # noqa: E402
from cycle.sweep import run_sweep  # noqa: E402

IMG = ROOT / "docs" / "img"

SWEEP = {
    "gas": "nitrogen", "ambient_temperature": "300 K", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
    "compressor": {"isothermal_efficiency": 0.6}, "recuperator": {"effectiveness": 0.97, "zones": 20},
    "production": {"liquid_rate": "10 L/h"}, "heat_leak": "5 W",
    "sweep": {"high_pressure": {"from": "40 bar", "to": "300 bar", "steps": 14},
              "gas": ["nitrogen", "argon", "air", "neon"]},
}


def demo_figures():
    """The figures of the demo scenarios, named as ``lhsim run --plots`` names them."""
    written = []
    for stem, figures in (("nitrogen-bench", ("ts-diagram", "exchanger-profiles", "losses")),
                          ("hydrogen-ln2-precooled", ("ts-diagram", "exchanger-profiles")),
                          ("air-dual-pressure", ("ts-diagram", "exchanger-profiles"))):
        result = api.run(ROOT / "scenarios" / f"{stem}.yaml")
        for name in figures:
            fig, _ = plots.FIGURES[name](result)
            path = IMG / f"{stem}-{name}.png"
            plots.save(fig, path)
            written.append(path)
    return written


def sweep_figures():
    """The sweep charts: a results file made in a temporary folder, drawn by its bare key."""
    written = []
    with tempfile.TemporaryDirectory() as tmp:
        out = pathlib.Path(tmp) / "sweep.csv"
        run_sweep(SWEEP, out, workers=2, progress=False)
        import pandas as pd

        frame = pd.read_csv(out, keep_default_na=False, na_values=[""])
    for y in ("liquid_yield", "work_kJ_per_kg_liquid"):
        fig, _ = plots.sweep_chart(frame, "high_pressure", y, "gas")
        path = IMG / f"sweep-{y}-vs-high_pressure.png"
        plots.save(fig, path)
        written.append(path)
    return written


def margins_figure():
    """The chart of ``lhsim plot RESULTS --uncertainty`` for the margins demo."""
    frame, stats = api.uncertainty(ROOT / "scenarios" / "nitrogen-bench-margins.yaml", workers=2)
    fig, _ = plots.uncertainty_chart(frame, stats)
    path = IMG / "nitrogen-bench-margins-uncertainty.png"
    plots.save(fig, path)
    return [path]


def main(argv=None):
    """``python docs/make_figures.py`` makes every figure; ``... sweep`` only the sweep charts,
    ``... margins`` only the margins chart."""
    argv = sys.argv[1:] if argv is None else argv
    IMG.mkdir(parents=True, exist_ok=True)
    if argv == ["margins"]:
        written = margins_figure()
    else:
        written = [] if argv == ["sweep"] else demo_figures() + margins_figure()
        written += sweep_figures()
    for path in written:
        print(f"wrote {path.relative_to(ROOT)}")


if __name__ == "__main__":
    main()
