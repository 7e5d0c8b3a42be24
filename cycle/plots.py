"""Figures of a solved cycle and of sweep results (matplotlib, non-interactive backend).

Each figure function returns ``(figure, data)``: ``data`` is exactly what was drawn, so tests
check the drawing against the results rather than only that a file appeared.

Style (our own): the Okabe-Ito colour-blind-safe palette, warm high-pressure lines in
vermilion, cold return lines in blue, liquid in bluish green, saturation dome in grey; units on
every axis.
"""

from dataclasses import dataclass, field

import numpy as np

PALETTE = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#F0E442", "#000000"]
HOT, COLD, LIQUID, DOME, INK = "#D55E00", "#0072B2", "#009E73", "#8C8C8C", "#222222"
WORK = "#CC79A7"
STYLE = {
    "figure.dpi": 100, "savefig.dpi": 150, "font.size": 10, "axes.titlesize": 11, "axes.labelsize": 10,
    "axes.grid": True, "grid.color": "#E3E3E3", "grid.linewidth": 0.7, "axes.spines.top": False,
    "axes.spines.right": False, "axes.prop_cycle": None, "legend.frameon": False,
    "font.family": "DejaVu Sans",
}


def _pyplot():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from cycler import cycler

    style = dict(STYLE, **{"axes.prop_cycle": cycler(color=PALETTE)})
    plt.rcParams.update(style)
    return plt


# -- T-s diagram --------------------------------------------------------------------------

@dataclass
class TsData:
    """What the T-s diagram draws.

    Attributes
    ----------
    points : list of (int, float, float)
        State number, specific entropy [J/(kg K)], temperature [K]: one per row of the state table.
    paths : list of (str, str, numpy.ndarray, numpy.ndarray)
        Kind (compression, isobar, isenthalp, split, mixing), label, entropy and temperature arrays.
    dome : (numpy.ndarray, numpy.ndarray)
        Entropy and temperature of the saturation curve, liquid side then vapour side.
    critical : (float, float)
        Entropy [J/(kg K)] and temperature [K] of the critical point.
    """

    points: list
    paths: list = field(default_factory=list)
    dome: tuple = ()
    critical: tuple = ()


def _dome(fluid, n=120):
    p = np.geomspace(fluid.p_triple * 1.0001, fluid.p_critical * (1 - 1e-5), n)
    liquid = [fluid.saturated_liquid(float(pk)) for pk in p]
    vapour = [fluid.saturated_vapour(float(pk)) for pk in p]
    s = np.array([st.s for st in liquid] + [st.s for st in vapour[::-1]])
    T = np.array([st.T for st in liquid] + [st.T for st in vapour[::-1]])
    return s, T


def _isobar(fluid, a, b, n=30):
    p = np.linspace(a.p, b.p, n)
    h = np.linspace(a.h, b.h, n)
    states = fluid.states_ph(p, h)
    return np.array([st.s for st in states]), np.array([st.T for st in states])


def _isenthalp(fluid, a, b, n=30):
    p = np.geomspace(a.p, b.p, n)
    states = fluid.states_ph(p, np.full(n, a.h))
    return np.array([st.s for st in states]), np.array([st.T for st in states])


def _compression(fluid, a, b, isothermal, n=30):
    """Compressor path: for the isothermal model temperature varies linearly with log p between
    the end states; for an adiabatic stage entropy does (a polytropic-like path)."""
    p = np.geomspace(a.p, b.p, n)
    frac = np.linspace(0.0, 1.0, n)
    if isothermal:
        states = [fluid.state_tp(a.T + f * (b.T - a.T), float(pk)) for f, pk in zip(frac, p)]
    else:
        states = [fluid.state_ps(float(pk), a.s + f * (b.s - a.s)) for f, pk in zip(frac, p)]
        states[-1] = b
    return np.array([st.s for st in states]), np.array([st.T for st in states])


def _edges(names):
    """(kind, from-name, to-name) of every path between numbered states, by the flowsheet's names."""
    def has(name):
        return name in names

    edges = []
    comp = [n for n in names if "discharge" in n or "intercooler" in n or "(isothermal model" in n
            or n.startswith("compressor suction")
            or n.startswith("intermediate mixing")]
    for a, b in zip(comp, comp[1:]):
        if b.startswith("intermediate mixing"):
            edges.append(("mixing", a, b))
        elif "intercooler" in b:
            edges.append(("isobar", a, b))
        else:
            edges.append(("compression", a, b))
    after = next(n for n in names if n.startswith("aftercooler outlet"))
    edges.append(("isobar", comp[-1], after))
    if has("warm recuperator high-pressure outlet, precooler inlet"):  # precooled
        chain = [after, "warm recuperator high-pressure outlet, precooler inlet",
                 "precooler outlet, cold recuperator high-pressure inlet",
                 "cold recuperator high-pressure outlet, valve inlet"]
        edges += [("isobar", a, b) for a, b in zip(chain, chain[1:])]
        edges.append(("isenthalp", chain[-1], "valve outlet, separator inlet"))
        sep_in = "valve outlet, separator inlet"
        vapour = "separator vapour, cold recuperator low-pressure inlet"
        back = [vapour, "cold recuperator low-pressure outlet, warm recuperator low-pressure inlet",
                "warm recuperator low-pressure outlet"]
        edges += [("isobar", a, b) for a, b in zip(back, back[1:])]
        ret = back[-1]
    elif has("first valve outlet (intermediate pressure)") or has("first valve outlet, intermediate receiver inlet"):
        hp_out = "recuperator high-pressure outlet, first valve inlet"
        sep_in = "second valve outlet, separator inlet"
        vapour = "separator vapour, recuperator low-pressure inlet"
        if has("first valve outlet (intermediate pressure)"):  # dual pressure above the critical pressure
            mid = back = feed = "first valve outlet (intermediate pressure)"
            edges += [("isenthalp", hp_out, mid)]
        else:  # with the intermediate receiver
            mid = "first valve outlet, intermediate receiver inlet"
            back = "receiver return, recuperator intermediate-pressure inlet"
            feed = "receiver outflow, second valve inlet"
            edges += [("isenthalp", hp_out, mid), ("split", mid, back), ("split", mid, feed)]
        edges += [("isobar", after, hp_out), ("isenthalp", feed, sep_in),
                  ("isobar", vapour, "recuperator low-pressure outlet"),
                  ("isobar", back, "recuperator intermediate-pressure outlet"),
                  ("mixing", "recuperator intermediate-pressure outlet", "intermediate mixing outlet, high-pressure section suction")]
        ret = "recuperator low-pressure outlet"
    else:
        hp_out = "recuperator high-pressure outlet, valve inlet"
        sep_in = "valve outlet, separator inlet"
        vapour = "separator vapour, recuperator low-pressure inlet"
        edges += [("isobar", after, hp_out), ("isenthalp", hp_out, sep_in),
                  ("isobar", vapour, "recuperator low-pressure outlet")]
        ret = "recuperator low-pressure outlet"
    suction = comp[0]
    edges += [("split", sep_in, "liquid product"), ("split", sep_in, vapour),
              ("mixing", ret, suction), ("mixing", "make-up gas", suction)]
    return edges


def ts_data(result):
    """Compute what :func:`ts_diagram` draws (:class:`TsData`)."""
    from properties import get_fluid

    fluid = get_fluid(result.scenario.gas)
    fluid_of = None
    if result.conversion is not None and result.conversion.places:
        # Hydrogen with a catalyst: each path in the fluid of its own para fraction, a
        # conversion (the fraction changes along the path) as a straight line; the saturation
        # curve of the separator's feed.
        from properties.hydrogen_stream import frozen_hydrogen

        def fluid_of(a, b):
            return frozen_hydrogen(a.para_fraction) if a.para_fraction == b.para_fraction else None

        fluid = frozen_hydrogen(result.throttle_outlet.para_fraction)
    by_name = {st.name: st.state for st in result.states}
    names = [st.name for st in result.states]
    isothermal = result.scenario.compressor.isothermal_efficiency is not None
    data = TsData(points=[(st.number, st.state.s, st.state.T) for st in result.states])
    data.dome = _dome(fluid)
    crit = fluid.state_tp(fluid.T_critical * (1 + 1e-6), fluid.p_critical * (1 + 1e-6))
    data.critical = (crit.s, crit.T)
    for kind, a_name, b_name in _edges(names):
        a, b = by_name[a_name], by_name[b_name]
        path_fluid = fluid if fluid_of is None else fluid_of(a, b)
        if path_fluid is None:
            s, T = np.array([a.s, b.s]), np.array([a.T, b.T])
        elif kind == "compression":
            s, T = _compression(path_fluid, a, b, isothermal)
        elif kind == "isobar":
            s, T = _isobar(path_fluid, a, b)
        elif kind == "isenthalp":
            s, T = _isenthalp(path_fluid, a, b)
        else:
            s, T = np.array([a.s, b.s]), np.array([a.T, b.T])
        data.paths.append((kind, f"{a_name} -> {b_name}", s, T))
    return data


def ts_diagram(result):
    """The cycle on a temperature-entropy diagram with the gas's saturation dome.

    Returns
    -------
    (matplotlib.figure.Figure, TsData)
    """
    plt = _pyplot()
    data = ts_data(result)
    fig, ax = plt.subplots(figsize=(8.0, 6.0))
    ax.set_axisbelow(True)
    s_dome, T_dome = data.dome
    ax.fill(s_dome / 1e3, T_dome, color=DOME, alpha=0.12, lw=0)
    ax.plot(s_dome / 1e3, T_dome, color=DOME, lw=1.3, label="saturation curve")
    ax.plot([data.critical[0] / 1e3], [data.critical[1]], marker="D", color=DOME, ms=6, ls="none",
            label="critical point")
    style = {"compression": dict(color=WORK, lw=2.0), "isobar": dict(lw=2.0),
             "isenthalp": dict(color=COLD, lw=2.0, ls=(0, (5, 2))),
             "split": dict(color=LIQUID, lw=1.2, ls=":"), "mixing": dict(color=INK, lw=1.0, ls=":")}
    T0 = result.scenario.ambient_temperature
    labelled = set()
    for kind, label, s, T in data.paths:
        opts = dict(style[kind])
        if kind == "isobar":
            opts["color"] = HOT if np.mean(np.diff(T)) < 0 else COLD
        legend = {"compression": "compression", "isenthalp": "throttle (constant enthalpy)",
                  "split": "separator split", "mixing": "mixing"}.get(kind)
        if kind == "isobar":
            legend = "cooling at constant pressure" if opts["color"] == HOT else "warming at constant pressure"
        ax.plot(s / 1e3, T, label=legend if legend not in labelled else None, **opts)
        labelled.add(legend)
    s_span = np.ptp([p[1] for p in data.points] + list(s_dome)) or 1.0
    T_span = np.ptp([p[2] for p in data.points] + list(T_dome)) or 1.0
    placed = []
    for number, s, T in data.points:
        ax.plot(s / 1e3, T, "o", color="white", mec=INK, ms=5, zorder=5)
        # Points that nearly coincide (aftercooler outlet and discharge, say) get their labels
        # stacked instead of printed over each other.
        near = sum(1 for ps, pT in placed if abs(ps - s) < 0.02 * s_span and abs(pT - T) < 0.02 * T_span)
        placed.append((s, T))
        ax.annotate(str(number), (s / 1e3, T), xytext=(5 + 9 * near, 4), textcoords="offset points",
                    fontsize=9, color=INK, zorder=6)
    ax.axhline(T0, color=INK, lw=0.6, alpha=0.4, label=f"ambient temperature {T0:g} K")
    sc = result.scenario
    ax.set_xlabel("specific entropy s [kJ/(kg K)]")
    ax.set_ylabel("temperature T [K]")
    ax.set_title(f"{sc.name or sc.gas}: T-s diagram ({sc.layout} cycle, {sc.gas})")
    ax.legend(loc="upper left", fontsize=8)
    fig.tight_layout()
    return fig, data


# -- exchanger profiles -------------------------------------------------------------------

def profile_data(result, against=None):
    """Per recuperator: the x axis (cumulative duty from the cold end, or, for a recuperator given
    by its geometry, distance from the warm end: ``against`` ``"duty"`` or ``"length"``; default
    length where every recuperator has one), both temperature arrays, and the minimum approach mark."""
    m = result.compressor_flow
    rated = all(rec.profile.rating is not None for rec in result.recuperators.values())
    against = against or ("length" if rated else "duty")
    if against == "length" and not rated:
        raise ValueError("against='length' needs recuperators given by their geometry")
    out = {}
    for name, rec in result.recuperators.items():
        prof = rec.profile
        if against == "length":
            x, label = prof.rating.position, "distance from the warm end [m]"
        else:
            x = prof.duty * (m / 1e3 if m else 1e-3)
            label = f"cumulative duty from the cold end [{'kW' if m else 'kJ/kg of compressor flow'}]"
        k = prof.min_approach_index
        out[name] = {"duty": x, "duty_unit": "kW" if m else "kJ/kg of compressor flow", "x_label": label,
                     "hot_T": prof.hot_T, "cold_T": prof.cold_T,
                     "pinch": (float(x[k]), float(prof.hot_T[k]), float(prof.cold_T[k]), rec.min_approach)}
    return out


def exchanger_profiles(result, against=None):
    """Temperature of every stream against cumulative duty (or, for a recuperator given by its
    geometry, distance along it), one panel per recuperator (``against``: see :func:`profile_data`)."""
    plt = _pyplot()
    data = profile_data(result, against)
    fig, axes = plt.subplots(1, len(data), figsize=(6.2 * len(data), 4.6), squeeze=False)
    cold_label = "cold composite (two return streams)" if result.scenario.layout == "dual-pressure" else "return stream"
    for ax, (name, d) in zip(axes[0], data.items()):
        ax.plot(d["duty"], d["hot_T"], color=HOT, lw=2.0, label="high-pressure stream")
        ax.plot(d["duty"], d["cold_T"], color=COLD, lw=2.0, label=cold_label)
        q, th, tc, dT = d["pinch"]
        ax.plot([q, q], [tc, th], color=INK, lw=1.2)
        ax.plot([q, q], [tc, th], "_", color=INK, ms=10)
        # The label in the empty lower corner on the mark's side (the curves fall away from the warm
        # end, which is on the left against length and on the right against duty), above the legend.
        x_lo, x_hi = min(d["duty"]), max(d["duty"])
        left = q - x_lo < 0.5 * (x_hi - x_lo)
        ax.annotate(f"minimum approach {dT:.2f} K", (q, 0.5 * (th + tc)), xytext=(0.04 if left else 0.97, 0.3 if left else 0.12),
                    textcoords="axes fraction", ha="left" if left else "right", va="bottom", fontsize=9, color=INK,
                    arrowprops=dict(arrowstyle="->", color=INK, lw=0.8))
        ax.set_xlabel(d["x_label"])
        ax.set_ylabel("temperature T [K]")
        ax.set_title(name.replace("_", " "))
        # the warm end (where a pinch usually is) is on the left when drawn against length
        ax.legend(loc="lower left" if d["x_label"].startswith("distance") else "upper left", fontsize=8)
    fig.tight_layout()
    return fig, data


# -- loss chart ---------------------------------------------------------------------------

def loss_data(result):
    """Bars from ideal to actual work [kJ/kg liquid]: (label, start, height, share in percent)."""
    from cycle.results import loss_label

    total = result.work_per_kg_liquid / 1e3
    bars = [("ideal work", 0.0, result.ideal_work_per_kg_liquid / 1e3)]
    level = bars[0][2]
    for name, value in result.exergy_losses_per_kg_liquid().items():
        bars.append((loss_label(name), level, value / 1e3))
        level += value / 1e3
    return {"bars": [(label, start, height, 100.0 * height / total) for label, start, height in bars],
            "actual": total}


def loss_chart(result):
    """From ideal work to actual work: one bar per unit's exergy loss, largest first."""
    plt = _pyplot()
    data = loss_data(result)
    bars = data["bars"]
    fig, ax = plt.subplots(figsize=(8.0, 0.42 * len(bars) + 1.8))
    y = np.arange(len(bars) + 1)[::-1]
    for (label, start, height, share), yk in zip(bars, y[:-1]):
        colour = LIQUID if label == "ideal work" else HOT
        ax.barh(yk, height, left=start, color=colour, height=0.62)
        ax.text(start + height, yk, f"  {height:,.0f} ({share:.1f} %)", va="center", fontsize=8, color=INK)
    ax.barh(y[-1], data["actual"], color=COLD, height=0.62)
    ax.text(data["actual"], y[-1], f"  {data['actual']:,.0f} (100 %)", va="center", fontsize=8, color=INK)
    ax.set_yticks(y, [b[0] for b in bars] + ["actual work"])
    ax.set_xlabel("work and exergy destroyed per kg of liquid [kJ/kg]")
    ax.set_xlim(0, data["actual"] * 1.22)
    ax.set_title("Where the work goes: ideal work plus each unit's exergy loss")
    ax.grid(axis="y", visible=False)
    ax.set_axisbelow(True)
    fig.tight_layout()
    return fig, data


# -- margins ------------------------------------------------------------------------------

def uncertainty_data(frame, stats):
    """What :func:`uncertainty_chart` draws: the main output of every solved sample, its unit and
    words, the marks (target, P5/P50/P95 or the flows for 90 and 95 % confidence) and the
    sensitivity bars (input, Spearman's rho against the main output), largest first."""
    from cycle.uncertainty import OUTPUTS

    words = {k: (w, u) for k, w, u in OUTPUTS}
    main = stats["main_output"]
    ok = frame[frame["status"] == "ok"]
    values = ok[main].dropna().to_numpy(dtype=float)
    s = stats["outputs"][main]
    marks = [("P5", s["p5"]), ("P50", s["p50"]), ("P95", s["p95"])]
    if stats.get("target_L_per_h") is not None and main == "liquid_rate_L_per_h":
        marks.append((f"target {stats['target_L_per_h']:g} L/h "
                      f"(met by {100.0 * stats['probability_of_target']:.1f} % of samples)", stats["target_L_per_h"]))
    flows = (stats.get("flow_for_confidence") or {}).get(main) or {}
    marks += [(f"{c} % confidence", v) for c, v in flows.items() if v is not None]
    bars = sorted(((key, row.get(main, 0.0)) for key, row in stats["sensitivity"].items()), key=lambda kv: -abs(kv[1]))
    return {"output": main, "words": words[main][0], "unit": words[main][1], "values": values, "marks": marks,
            "bars": bars, "method": stats["sensitivity_method"], "samples": stats["samples"]}


def uncertainty_chart(frame, stats):
    """Two panels: the distribution of the main output over the samples with its marks, and the
    inputs' rank correlations with it."""
    plt = _pyplot()
    data = uncertainty_data(frame, stats)
    fig, (ax, bx) = plt.subplots(1, 2, figsize=(11.0, 4.6), gridspec_kw={"width_ratios": [1.4, 1.0]})
    unit = "" if data["unit"] == "-" else f" [{data['unit']}]"
    ax.hist(data["values"], bins=max(8, min(40, int(np.sqrt(len(data["values"]))) * 2)), color=COLD, alpha=0.75,
            edgecolor="white")
    for label, x in data["marks"]:
        percentile = label in ("P5", "P50", "P95")
        ax.axvline(x, color=INK if percentile else HOT, ls=":" if percentile else "-", lw=1.0 if percentile else 1.6,
                   label=("P5, P50, P95" if label == "P5" else None) if percentile else label)
    flows = (stats.get("flow_for_confidence") or {}).get(data["output"]) or {}
    for c, v in flows.items():
        if v is None:
            ax.plot([], [], " ", label=f"{c} % confidence: not reachable (too many samples make no liquid)")
    ax.set_xlabel(f"{data['words']}{unit}")
    ax.set_ylabel("samples")
    ax.set_axisbelow(True)
    ax.set_title(f"{data['words'].capitalize()} over {len(data['values'])} solved samples")
    ax.legend(fontsize=8, loc="best", frameon=True, framealpha=0.9, edgecolor="none")
    names = [k for k, _ in data["bars"]][::-1]
    rho = [v for _, v in data["bars"]][::-1]
    bx.barh(np.arange(len(names)), rho, color=[COLD if v >= 0 else HOT for v in rho], height=0.6)
    bx.set_yticks(np.arange(len(names)), names, fontsize=8)
    bx.axvline(0.0, color=INK, lw=0.8)
    noise = 2.0 / np.sqrt(max(len(data["values"]), 1))
    bx.axvspan(-noise, noise, color=DOME, alpha=0.15, lw=0)
    bx.set_xlim(-1.05, 1.05)
    bx.set_xlabel(f"Spearman's rho with {data['words']}\n(shaded: |rho| < {noise:.2f}, not told from no effect)")
    bx.set_title("What drives the spread")
    bx.set_axisbelow(True)
    fig.tight_layout()
    return fig, data


# -- sweep charts -------------------------------------------------------------------------

_SUFFIX_UNITS = [("_kJ_per_kg_compressed", "kJ/kg of compressor flow"), ("_kJ_per_kg_liquid", "kJ/kg of liquid"),
                 ("_W_per_K_per_kg_per_s", "W/K per kg/s"), ("_W_per_K", "W/K"), ("_kg_per_kg_liquid", "kg/kg of liquid"),
                 ("_kg_per_h", "kg/h"), ("_L_per_h", "L/h"), ("_kW", "kW"), ("_W", "W"), ("_K", "K")]
# Legend entries a sweep chart shows at most; beyond, lines are summarised by colour and style.
LEGEND_ENTRIES = 8
_MARKERS = ["o", "s", "^", "D", "v", "P", "X", "*"]
_STYLES = ["-", "--", ":", "-."]


def _words(key):
    return key.replace("_", " ").replace(".", ": ")


def _quantity(column):
    """(words, unit as printed or "-" or None for names, factor to apply) of a results column."""
    from cycle.scenario import key_kind
    from cycle.sweep import COLUMN_UNITS, parse_column

    if column in ("liquid_yield", "figure_of_merit", "energy_balance_residual") or column.endswith(
            ("_effectiveness", "_position", "_quality")):
        return _words(column), "-", 1.0
    swept = parse_column(column)
    if swept is not None:
        key, dimension = swept
        if dimension is not None:
            return _words(key), COLUMN_UNITS[dimension][1], 1.0
        return _words(key), (None if key_kind(key) in ("gas", "text") else "-"), 1.0
    for suffix, unit in _SUFFIX_UNITS:
        if column.endswith(suffix):
            return _words(column[: -len(suffix)]), unit, 1.0
    try:
        kind = key_kind(column)
    except Exception:
        return _words(column), None, 1.0
    kind = kind[0] if isinstance(kind, tuple) else kind
    if kind in COLUMN_UNITS:  # a swept quantity in SI under its bare key (the Python interface's frames)
        _, unit, times, over = COLUMN_UNITS[kind]
        return _words(column), unit, times / over
    return _words(column), "-", 1.0


def axis_label(key):
    """Quantity and unit for a column: swept keys by the unit their column name ends with (or
    from the scenario schema for a bare key in SI), summary keys from the unit their name ends
    with (as in the glossary).  Returns (label, factor to apply)."""
    words, unit, factor = _quantity(key)
    return (f"{words} [{unit}]" if unit else words), factor


def legend_text(column, value):
    """One swept value as a legend shows it: quantity, value and the unit of the axes."""
    words, unit, factor = _quantity(column)
    if unit is None:
        return str(value) if column == "gas" else f"{words} {value}"
    try:
        number = f"{float(value) * factor:.6g}"
    except (TypeError, ValueError):
        return f"{words} {value}"
    return f"{words} {number}" + ("" if unit == "-" else f" {unit}")


def sweep_data(frame, x, y, by=None):
    """Lines per category and the points that made no liquid or failed.

    ``x``, ``y`` and ``by`` are column names or, for swept quantities, their bare keys
    (``high_pressure`` finds the column ``high_pressure_bar``).
    """
    from cycle.errors import ScenarioError
    from cycle.sweep import find_column

    found = []
    for key in [x, y] + ([by] if by else []):
        column = find_column(frame.columns, key)
        if column is None:
            raise ScenarioError(f"column {key} is not in the results; columns: {', '.join(map(str, frame.columns))}")
        found.append(column)
    x, y = found[0], found[1]
    by = found[2] if by else None
    x_label, fx = axis_label(x)
    y_label, fy = axis_label(y)
    # Other swept keys (the columns between "point" and "status" of a sweep file) would zigzag a
    # line: each of their combinations gets a line of its own.
    cols = list(frame.columns)
    swept = cols[cols.index("point") + 1: cols.index("status")] if "point" in cols and "status" in cols else []
    keys = ([by] if by else []) + [k for k in swept if k not in (x, by) and frame[k].nunique() > 1]
    if keys:
        groups = []
        for value, part in frame.groupby(keys if len(keys) > 1 else keys[0], sort=False):
            value = value if isinstance(value, tuple) else (value,)
            parts = [legend_text(k, v) for k, v in zip(keys, value)]
            groups.append((parts, part))
    else:
        groups = [(None, frame)]
    lines, misses, heads, tails = [], [], [], []
    for parts, part in groups:
        part = part.sort_values(x)
        ok = part[part["status"] == "ok"] if "status" in part else part
        bad = part[part["status"] != "ok"] if "status" in part else part.iloc[0:0]
        label = ", ".join(parts) if parts else None
        heads.append(parts[0] if parts else None)
        tails.append(", ".join(parts[1:]) if parts and len(parts) > 1 else None)
        lines.append((label, ok[x].to_numpy(float) * fx, ok[y].to_numpy(float) * fy))
        misses.append((label, bad[x].to_numpy(float) * fx, list(bad["status"]) if len(bad) else []))
    return {"x": x, "y": y, "x_label": x_label, "y_label": y_label, "lines": lines, "misses": misses,
            "by": by, "keys": keys, "heads": heads, "tails": tails}


def _unique(items):
    out = []
    for item in items:
        if item not in out:
            out.append(item)
    return out


def sweep_chart(frame, x, y, by=None):
    """``y`` against ``x`` from a sweep results table, one line per value of ``by`` (and per
    combination of the other swept keys); points that made no liquid or failed are marked along
    the bottom.

    The legend sits outside the data, to the right, with at most :data:`LEGEND_ENTRIES` entries:
    one per line while they fit; beyond, one per colour (the first key; a numeric key with more
    values than the palette has colours gets a colour bar instead) and one per line style (the
    other keys; summarised in one entry when there are more combinations than styles).
    """
    import matplotlib.lines as mlines

    plt = _pyplot()
    data = sweep_data(frame, x, y, by)
    fig, ax = plt.subplots(figsize=(7.5, 5.0))
    heads, tails = _unique(data["heads"]), _unique(data["tails"])
    head_key = data["keys"][0] if data["keys"] else None
    numeric_heads = head_key is not None and _quantity(head_key)[1] is not None
    colourbar = None
    if len(heads) > len(PALETTE) and numeric_heads:
        from matplotlib import cm, colors

        values = sorted(frame[head_key].dropna().unique())
        norm = colors.Normalize(vmin=float(values[0]), vmax=float(values[-1]))
        cmap = plt.get_cmap("viridis")
        by_head = {legend_text(head_key, v): cmap(norm(float(v))) for v in values}
        colour_of = by_head.get
        colourbar = cm.ScalarMappable(norm=norm, cmap=cmap)
    else:
        def colour_of(head):
            return PALETTE[heads.index(head) % len(PALETTE)]
    data["colours"], data["styles"] = [], []
    statuses = set()
    for (value, xs, ys), (_, bx, bad), head, tail in zip(data["lines"], data["misses"], data["heads"], data["tails"]):
        colour = colour_of(head)
        style = _STYLES[tails.index(tail) % len(_STYLES)]
        marker = _MARKERS[heads.index(head) % len(_MARKERS)] if colourbar is None else "o"
        data["colours"].append(colour)
        data["styles"].append(style)
        if len(xs):
            ax.plot(xs, ys, marker=marker, ms=4, color=colour, lw=1.8, ls=style)
        for status, mark in (("no-liquid", "x"), ("other", "^")):
            at = [xk for xk, sk in zip(bx, bad) if (sk == "no-liquid") == (status == "no-liquid")]
            if at:
                statuses.add(status)
                ax.plot(at, np.zeros(len(at)), mark, color=colour, ms=7, mew=1.6, mfc="none",
                        transform=ax.get_xaxis_transform(), clip_on=False)
    entries = []  # (handle, label)
    for status, mark, text in (("no-liquid", "x", "no liquid (on the axis)"),
                               ("other", "^", "failed or invalid (on the axis)")):
        if status in statuses:
            entries.append((mlines.Line2D([], [], color=INK, marker=mark, ls="none", mfc="none", mew=1.4), text))
    budget = LEGEND_ENTRIES - len(entries)
    lines = []
    if head_key is not None and len(data["lines"]) <= budget:
        for (value, _, _), colour, style, head in zip(data["lines"], data["colours"], data["styles"], data["heads"]):
            marker = _MARKERS[heads.index(head) % len(_MARKERS)] if colourbar is None else "o"
            lines.append((mlines.Line2D([], [], color=colour, ls=style, marker=marker, ms=4, lw=1.8), value))
    elif head_key is not None:
        # Colours first (the --by key), then line styles in what room is left.
        need_styles = len(tails) > 1
        room = budget - (1 if need_styles else 0)
        colour_entries = []
        if colourbar is None:
            shown = heads if len(heads) <= room else heads[: room - 1]
            colour_entries = [(mlines.Line2D([], [], color=colour_of(h), marker=_MARKERS[k % len(_MARKERS)], ms=4,
                                             lw=1.8), h) for k, h in enumerate(shown)]
            if len(shown) < len(heads):
                repeat = " (colours repeat)" if len(heads) > len(PALETTE) else ""
                colour_entries.append((mlines.Line2D([], [], color="none"),
                                       f"and {len(heads) - len(shown)} more{repeat}"))
        style_entries = []
        if need_styles:
            if len(tails) <= min(len(_STYLES), budget - len(colour_entries)):
                style_entries = [(mlines.Line2D([], [], color=INK, ls=_STYLES[k], lw=1.4), tail)
                                 for k, tail in enumerate(tails)]
            else:
                others = [_quantity(k)[0] for k in data["keys"][1:]]
                what = (f"value of {others[0]}" if len(others) == 1
                        else f"combination of {', '.join(others[:-1])} and {others[-1]}")
                style_entries = [(mlines.Line2D([], [], color=INK, ls="--", lw=1.4),
                                  f"{len(tails)} lines per colour, one per {what}")]
        lines = colour_entries + style_entries
    entries = lines + entries
    data["legend"] = [label for _, label in entries]
    if entries:  # room for the legend beside the data, not taken from it
        widest = max(len(label) for label in data["legend"])
        fig.set_size_inches(min(7.5 + 0.065 * widest + 0.6, 12.5), 5.0)
    if colourbar is not None:
        bar = fig.colorbar(colourbar, ax=ax, location="bottom", pad=0.16, fraction=0.05, aspect=40)
        bar.set_label(axis_label(head_key)[0])
    if entries:
        ax.legend([h for h, _ in entries], [lab for _, lab in entries], loc="upper left",
                  bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0, fontsize=8)
    ax.set_xlabel(data["x_label"])
    ax.set_ylabel(data["y_label"])
    ax.set_title(f"{data['y_label'].split(' [')[0]} against {data['x_label'].split(' [')[0]}")
    fig.tight_layout()
    return fig, data


# -- writing ------------------------------------------------------------------------------

FIGURES = {"ts-diagram": ts_diagram, "exchanger-profiles": exchanger_profiles, "losses": loss_chart}


def save(fig, path):
    """Save a figure (format from the file name: .png or .svg) and close it."""
    import matplotlib.pyplot as plt

    fig.savefig(path, bbox_inches="tight")
    plt.close(fig)


def figure_stem(result):
    """A file-name stem for a result's figures when no scenario file names it: the scenario's
    name in lower case, runs of other characters as one hyphen (``scenario`` if it has none)."""
    import re

    return re.sub(r"[^a-z0-9]+", "-", (result.scenario.name or "").lower()).strip("-") or "scenario"


def write_figures(result, folder, formats=("png", "svg"), stem=None):
    """Write every figure of a result into ``folder`` as ``{stem}-{figure}.{format}``
    (``nitrogen-bench-ts-diagram.png``), so that the figures of two scenarios never overwrite
    each other; return the paths written.

    Parameters
    ----------
    stem : str, optional
        Usually the scenario file's stem; default :func:`figure_stem`.
    """
    import pathlib

    folder = pathlib.Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    stem = stem or figure_stem(result)
    paths = []
    for name, draw in FIGURES.items():
        fig, _ = draw(result)
        for fmt in formats:
            path = folder / f"{stem}-{name}.{fmt}"
            fig.savefig(path, bbox_inches="tight")
            paths.append(path)
        import matplotlib.pyplot as plt

        plt.close(fig)
    return paths


def figure_png(fig):
    """A figure as PNG bytes (for embedding), closing it."""
    import io

    import matplotlib.pyplot as plt

    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", bbox_inches="tight")
    plt.close(fig)
    return buffer.getvalue()
