"""Margins: uncertain inputs sampled, each sample a design point, the outputs as distributions.

An ``uncertainty:`` section of a scenario maps scenario keys (dotted, as in ``sweep:``) to
distributions of their value, with units::

    uncertainty:
      samples: 200
      seed: 1
      compressor.isothermal_efficiency: {normal: [0.6, 5 %]}     # mean, standard deviation
      heat_leak: {uniform: [4 W, 9 W]}                           # low, high
      recuperator.ua: {triangular: [300 W/K, 360 W/K, 380 W/K]}  # low, mode, high
      aftercooler.outlet_temperature: {lognormal: [305 K, 2 K]}  # mean, standard deviation

A standard deviation may be relative to the mean (``5 %``); ``normal`` and ``lognormal`` also
take a mapping ``{mean: ..., sd: ...}``.  ``target`` (a liquid rate) is what a plant of fixed
compressor flow must make.  The samples are a Latin hypercube (:class:`scipy.stats.qmc.LatinHypercube`,
seeded), mapped through each distribution's quantile function; a distribution that puts mass
outside a key's legal range (an efficiency above 1, a negative heat leak) is sampled truncated
to that range, and the run says how much mass was cut.  The samples become a ``zip`` sweep of
the sweep runner, so the results file, its resumption, local workers and Dask are the sweep's.

Sensitivity: Spearman's rank correlation coefficient of each input with each output
(:func:`scipy.stats.spearmanr`), a rank-based index; with independent inputs its square is about
the share of the output's (rank) variance the input explains.
"""

import math

from cycle.errors import ScenarioError
from cycle.results import json_safe
from cycle.scenario import key_kind
from cycle.sweep import COLUMN_UNITS, column_value, find_column, split_sweep
from cycle.units import UnitError, parse_quantity, shown

DISTRIBUTIONS = {"normal": 2, "uniform": 2, "triangular": 3, "lognormal": 2}
DEFAULT_SAMPLES = 200
MAX_SAMPLES = 100_000
# Mass [-] outside a key's legal range below which nothing is cut (and nothing is said).
TRUNCATION_NOTE = 1e-9
# Confidence levels of the compressor flow a plant with a liquid-rate target needs.
CONFIDENCE = (0.90, 0.95)
# The outputs summarised, in order: summary key, words, unit.
OUTPUTS = (
    ("liquid_rate_L_per_h", "liquid rate", "L/h"),
    ("liquid_yield", "liquid yield", "-"),
    ("work_kJ_per_kg_liquid", "work per kg liquid", "kJ/kg"),
    ("compressor_power_kW", "compressor power", "kW"),
    ("compressor_flow_kg_per_h", "compressor flow", "kg/h"),
    ("figure_of_merit", "figure of merit", "-"),
)
# Short headings of the sensitivity table's columns.
SENSITIVITY_COLUMNS = {"liquid_rate_L_per_h": "liquid rate", "liquid_yield": "yield",
                       "work_kJ_per_kg_liquid": "work/kg liq", "compressor_power_kW": "power",
                       "compressor_flow_kg_per_h": "flow", "figure_of_merit": "FOM"}
# Legal ranges (low, high, low included, high included) of dimensionless keys by the end of
# their name; others must be above 0.
_FRACTION_KEYS = ("efficiency", "effectiveness", "discharge_coefficient", "carnot_fraction")


def split_uncertainty(data):
    """(the scenario mapping without its uncertainty section, the section or None)."""
    if not isinstance(data, dict):
        return data, None
    data = dict(data)
    return data, data.pop("uncertainty", None)


class Input:
    """One uncertain scenario key: its distribution (SciPy, in SI) and legal range.

    Attributes
    ----------
    key : str
    dimension : str or None
        A key of :data:`cycle.sweep.COLUMN_UNITS`, None for a plain number.
    text : str
        The distribution as given, in words.
    cut : float
        Mass of the distribution outside the legal range, cut off [-].
    """

    def __init__(self, key, dimension, dist, low, high, text):
        self.key, self.dimension, self.dist, self.text = key, dimension, dist, text
        self.low, self.high = low, high
        self.u_low = float(dist.cdf(low)) if math.isfinite(low) else 0.0
        self.u_high = float(dist.cdf(high)) if math.isfinite(high) else 1.0
        self.cut = self.u_low + (1.0 - self.u_high)

    def value(self, u):
        """The SI value at the point ``u`` (0 to 1) of the truncated distribution."""
        x = float(self.dist.ppf(self.u_low + u * (self.u_high - self.u_low)))
        return min(max(x, self.low), self.high)

    def as_text(self, x):
        """An SI value as a scenario value in its column's unit ('3.2 W', '0.61')."""
        if self.dimension is None:
            return x
        _, unit, _, _ = COLUMN_UNITS[self.dimension]
        return f"{column_value(x, self.dimension)!r} {unit}"


def _legal(key, kind, dimension):
    """(low, high) of a key's values in SI; a low end of 0 is excluded where it must be."""
    name = key.rsplit(".", 1)[-1]
    if kind == "number":
        if name.endswith(_FRACTION_KEYS):
            return 1e-12, 1.0
        if name == "recirculated_fraction":
            return 1e-12, 1.0 - 1e-12
        return 1e-12, math.inf
    if dimension == "temperature":
        return 1e-12, 1000.0
    if dimension in ("power", "temperature_difference") or name.endswith("pressure_drop"):
        return 0.0, math.inf
    return 1e-300, math.inf


def _parse_value(key, value, dimension, full, difference=False):
    """A distribution parameter in SI."""
    dim = "temperature_difference" if difference and dimension == "temperature" else dimension
    try:
        return parse_quantity(value, dim or "dimensionless")
    except UnitError as err:
        raise ScenarioError(f"{full}: {err}") from None


def _spread(key, value, mean, dimension, full):
    """A standard deviation in SI: a quantity, or a percentage of the mean."""
    if isinstance(value, str) and value.strip().endswith("%"):
        try:
            share = float(value.strip()[:-1]) / 100.0
        except ValueError:
            raise ScenarioError(f"{full} must be a standard deviation or a percentage of the mean such as '5 %', "
                                f"got {shown(value)}") from None
        return share * abs(mean)
    return _parse_value(key, value, dimension, full, difference=True)


def parse_input(key, spec):
    """An :class:`Input` from ``key: {distribution: parameters}``."""
    from scipy import stats

    full = f"uncertainty.{key}"
    kind = key_kind(key, where="uncertainty.")
    if kind in ("gas", "text", "integer"):
        raise ScenarioError(f"{full}: only a quantity or a plain number can be uncertain, not a "
                            f"{'name' if kind != 'integer' else 'whole number'}")
    kinds = kind if isinstance(kind, tuple) else (kind,)
    if len(kinds) > 1:
        raise ScenarioError(f"{full}: a key that takes several kinds of quantity ({', '.join(kinds)}) cannot be "
                            f"uncertain yet")
    dimension = None if kind == "number" else kinds[0]
    if not isinstance(spec, dict) or len(spec) != 1 or next(iter(spec)) not in DISTRIBUTIONS:
        raise ScenarioError(f"{full} must be one distribution: {{normal: [mean, sd]}}, {{uniform: [low, high]}}, "
                            f"{{triangular: [low, mode, high]}} or {{lognormal: [mean, sd]}}, got {shown(spec)}")
    (name, params), = spec.items()
    where = f"{full}.{name}"
    if isinstance(params, dict) and name in ("normal", "lognormal"):
        if set(params) != {"mean", "sd"}:
            raise ScenarioError(f"{where} must give mean and sd, got {shown(params)}")
        params = [params["mean"], params["sd"]]
    if not isinstance(params, list) or len(params) != DISTRIBUTIONS[name]:
        shape = {"normal": "[mean, sd]", "lognormal": "[mean, sd]", "uniform": "[low, high]",
                 "triangular": "[low, mode, high]"}[name]
        raise ScenarioError(f"{where} must be a list {shape}, got {shown(params)}")
    if name in ("normal", "lognormal"):
        mean = _parse_value(key, params[0], dimension, where + " mean")
        sd = _spread(key, params[1], mean, dimension, where + " sd")
        if not (math.isfinite(mean) and math.isfinite(sd) and sd > 0):
            raise ScenarioError(f"{where}: the standard deviation must be above 0, got {shown(params[1])}")
        if name == "normal":
            dist = stats.norm(loc=mean, scale=sd)
        else:
            if mean <= 0:
                raise ScenarioError(f"{where}: a lognormal distribution needs a mean above 0, got {shown(params[0])}")
            sigma2 = math.log1p((sd / mean) ** 2)
            dist = stats.lognorm(s=math.sqrt(sigma2), scale=mean / math.sqrt(1.0 + (sd / mean) ** 2))
    else:
        values = [_parse_value(key, v, dimension, where) for v in params]
        if not all(math.isfinite(v) for v in values):
            raise ScenarioError(f"{where}: the values must be finite, got {shown(params)}")
        low, high = values[0], values[-1]
        if not low < high:
            raise ScenarioError(f"{where}: low must be below high, got {shown(params)}")
        if name == "uniform":
            dist = stats.uniform(loc=low, scale=high - low)
        else:
            mode = values[1]
            if not low <= mode <= high:
                raise ScenarioError(f"{where}: the mode must lie from low to high, got {shown(params)}")
            dist = stats.triang(c=(mode - low) / (high - low), loc=low, scale=high - low)
    lo, hi = _legal(key, kind, dimension)
    given = [str(v).strip() for v in params]
    text = {"normal": f"normal, mean {given[0]}, sd {given[-1]}", "lognormal": f"lognormal, mean {given[0]}, sd {given[-1]}",
            "uniform": f"uniform from {given[0]} to {given[-1]}",
            "triangular": f"triangular from {given[0]} to {given[-1]}, mode {given[1]}"}[name]
    found = Input(key, dimension, dist, lo, hi, text)
    if found.u_high - found.u_low <= 0.0:
        raise ScenarioError(f"{full}: the distribution {text} lies wholly outside the values the key can take")
    return found


def parse_section(section):
    """(inputs, samples, seed, target [SI] or None) of an ``uncertainty:`` section."""
    if not isinstance(section, dict) or not section:
        raise ScenarioError(f"uncertainty must map scenario keys to distributions, got {shown(section)}")
    section = dict(section)
    samples = section.pop("samples", DEFAULT_SAMPLES)
    if isinstance(samples, bool) or not isinstance(samples, int) or not 2 <= samples <= MAX_SAMPLES:
        raise ScenarioError(f"uncertainty.samples must be a whole number from 2 to {MAX_SAMPLES}, got {shown(samples)}")
    seed = section.pop("seed", 0)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise ScenarioError(f"uncertainty.seed must be a whole number 0 or more, got {shown(seed)}")
    target = section.pop("target", None)
    if target is not None:
        try:
            target = parse_quantity(target, "volume_flow")
        except UnitError as err:
            raise ScenarioError(f"uncertainty.target: {err} (a liquid rate such as '10 L/h')") from None
        if not target > 0:
            raise ScenarioError(f"uncertainty.target must be a liquid rate above 0, got {shown(section.get('target'))}")
    if not section:
        raise ScenarioError("uncertainty names no uncertain key: add one, e.g. heat_leak: {uniform: [4 W, 9 W]}")
    inputs = [parse_input(str(key), spec) for key, spec in section.items()]
    return inputs, samples, seed, target


def draw(inputs, samples, seed):
    """The samples [n x inputs] in SI: a seeded Latin hypercube through each quantile function."""
    from scipy.stats import qmc

    unit = qmc.LatinHypercube(d=len(inputs), seed=seed).random(samples)
    return [[inp.value(float(u)) for inp, u in zip(inputs, row)] for row in unit]


def as_sweep(data):
    """The scenario mapping with its uncertainty section turned into a ``zip`` sweep of the
    samples; returns (mapping, inputs, samples [SI], target, notes)."""
    base, section = split_uncertainty(data)
    if section is None:
        raise ScenarioError("the scenario has no uncertainty section: add uncertainty: {samples: 200, heat_leak: "
                            "{uniform: [4 W, 9 W]}}, for example")
    base, _ = split_sweep(base)
    inputs, samples, seed, target = parse_section(section)
    drawn = draw(inputs, samples, seed)
    sweep = {"mode": "zip"}
    for k, inp in enumerate(inputs):
        sweep[inp.key] = [inp.as_text(row[k]) for row in drawn]
    notes = [f"uncertainty.{inp.key}: {inp.text} puts {100.0 * inp.cut:.3g} % of its mass outside the values the "
             f"key can take; sampled truncated to them" for inp in inputs if inp.cut > TRUNCATION_NOTE]
    production = _production(base)
    if target is not None and production == "liquid_rate":
        notes.append("uncertainty.target is not used: production.liquid_rate sets the production of every sample, "
                     "and the compressor flow that meets it with 90 and 95 % confidence is reported instead")
    elif target is not None and production is None:
        notes.append("uncertainty.target is not used: the scenario has no production section, so the samples give "
                     "yields, not liquid rates (give production.compressor_flow to rate a plant)")
    return dict(base, sweep=sweep), inputs, drawn, target, notes


def run_uncertainty(data, out, workers=None, dask=None, overwrite=False, progress=None, dask_timeout=10.0):
    """Run every sample through the sweep runner into ``out`` and summarise.

    Returns
    -------
    frame : pandas.DataFrame
        The results file, one row per sample.
    stats : dict
        :func:`analyse`'s summary.
    """
    from cycle.sweep import run_sweep

    import json
    import pathlib

    mapping, inputs, _, target, notes = as_sweep(data)
    run_sweep(mapping, out, workers=workers, dask=dask, overwrite=overwrite, progress=progress,
              dask_timeout=dask_timeout, point_name="uncertainty sample")
    frame = read_results(out)
    stats = analyse(frame, inputs, target, _production(mapping), notes)
    # Beside the results: what lhsim plot --uncertainty draws from.
    side = stats_path(out)
    side.write_text(json.dumps(json_safe(stats), indent=1), encoding="utf-8")
    return frame, stats


def stats_path(out):
    """The statistics file written beside a results file: ``<results>.uncertainty.json``."""
    import pathlib

    out = pathlib.Path(out)
    return out.with_name(out.name + ".uncertainty.json")


def read_results(path):
    import pathlib

    import pandas as pd

    path = pathlib.Path(path)
    if path.suffix.lower() == ".parquet":
        return pd.read_parquet(path)
    return pd.read_csv(path, keep_default_na=False, na_values=[""], dtype={"message": str, "status": str})


def _production(mapping):
    """'compressor_flow' (a rated plant), 'liquid_rate' (a plant sized for it) or None."""
    production = mapping.get("production") or {}
    if not isinstance(production, dict):
        return None
    for key in ("compressor_flow", "liquid_rate"):
        if production.get(key) is not None:
            return key
    return None


def _stats(values):
    import numpy as np

    v = np.asarray(values, dtype=float)
    if v.size == 0:
        return None
    p5, p50, p95 = np.percentile(v, [5, 50, 95])
    return {"mean": float(v.mean()), "sd": float(v.std(ddof=1)) if v.size > 1 else 0.0,
            "p5": float(p5), "p50": float(p50), "p95": float(p95), "n": int(v.size)}


def analyse(frame, inputs, target, production, notes=()):
    """Statistics of the outputs, the production margin and the sensitivity indices.

    Returns
    -------
    dict
        ``samples``, ``solved`` (status ok), ``no_liquid``, ``failed``; ``outputs``: per summary
        key its mean, sd, P5, P50, P95 over the solved samples; ``target_L_per_h`` and
        ``probability_of_target`` (fixed compressor flow: the share of all samples that make at
        least the target; a sample without liquid fails it) and its
        ``probability_of_target_standard_error``; ``flow_for_confidence`` (a
        liquid-rate target: the compressor flow, mass and suction volume, that meets the
        production in 90 and 95 % of the samples, None where more samples than that make no
        liquid); ``sensitivity``: per input and output Spearman's rho; ``sensitivity_method``;
        ``main_output``; ``notes``.
    """
    import numpy as np
    from scipy.stats import spearmanr

    n = len(frame)
    ok = frame[frame["status"] == "ok"]
    out = {"samples": n, "solved": int(len(ok)), "no_liquid": int((frame["status"] == "no-liquid").sum()),
           "failed": int(frame["status"].isin(["invalid", "failed"]).sum()), "outputs": {}, "notes": list(notes),
           "sensitivity_method": "Spearman's rank correlation coefficient rho (scipy.stats.spearmanr)"}
    # An output the scenario fixes (the compressor flow of a rated plant, the liquid rate of one
    # sized for it) has no spread to summarise.
    fixed_flow = production == "compressor_flow"
    fixed = "compressor_flow_kg_per_h" if fixed_flow else "liquid_rate_L_per_h"
    keys = [k for k, _, _ in OUTPUTS if k in frame.columns and ok[k].notna().any() and k != fixed]
    for key in keys:
        out["outputs"][key] = _stats(ok[key].dropna())
    main = "liquid_rate_L_per_h" if "liquid_rate_L_per_h" in keys else "liquid_yield"
    if not fixed_flow and "compressor_flow_kg_per_h" in keys:
        main = "compressor_flow_kg_per_h"
    out["main_output"] = main
    if fixed_flow and target is not None and "liquid_rate_L_per_h" in frame.columns:
        made = frame["liquid_rate_L_per_h"].where(frame["status"] == "ok")
        goal = float(f"{target * 3.6e6:.12g}")  # L/h, as written (no round-off from the unit conversion)
        out["target_L_per_h"] = goal
        out["probability_of_target"] = p = float((made >= goal).sum() / n) if n else None
        # Its sampling error as for independent samples, sqrt(p (1 - p) / n); a Latin hypercube
        # does no worse where the liquid rate is monotone in each input (McKay et al. 1979).
        out["probability_of_target_standard_error"] = math.sqrt(p * (1.0 - p) / n) if n else None
    if production == "liquid_rate" and "compressor_flow_kg_per_h" in frame.columns:
        flows = {}
        for column in ("compressor_flow_kg_per_h", "compressor_suction_volume_flow_m3_per_h"):
            if column not in frame.columns:
                continue
            v = frame[column].where(frame["status"] == "ok").to_numpy(dtype=float)
            v = np.where(np.isfinite(v), v, np.inf)  # a sample without liquid needs any flow
            flows[column] = {f"{int(100 * c)}": (float(np.quantile(v, c)) if np.isfinite(np.quantile(v, c)) else None)
                             for c in CONFIDENCE}
        out["flow_for_confidence"] = flows
    sens = {}
    for inp in inputs:
        column = find_column(list(frame.columns), inp.key)
        x = ok[column].to_numpy() if column is not None else None
        row = {}
        for key in keys:
            y = ok[key].to_numpy(dtype=float)
            good = np.isfinite(y)
            if x is None or good.sum() < 3 or np.ptp(y[good]) == 0 or len(set(x[good])) < 2:
                row[key] = 0.0
                continue
            rho = spearmanr(_numbers(x[good]), y[good]).statistic
            row[key] = float(rho) if math.isfinite(rho) else 0.0
        sens[inp.key] = row
    out["sensitivity"] = sens
    out["inputs"] = {inp.key: inp.text for inp in inputs}
    return out


def _numbers(column):
    """A results column of an input as numbers (its values may be written with their unit)."""
    import numpy as np

    def number(v):
        if isinstance(v, str):
            return float(v.split()[0])
        return float(v)

    return np.array([number(v) for v in column])


def margin_sentences(stats):
    """The production margin in sentences: the chance of the target at a fixed compressor flow,
    or the compressor flow that meets the production with each confidence."""
    found = []
    if stats.get("probability_of_target") is not None:
        se = stats.get("probability_of_target_standard_error")
        found.append(f"probability of making at least {stats['target_L_per_h']:g} L/h at this compressor flow: "
                     f"{100.0 * stats['probability_of_target']:.1f} %"
                     + (f" (sampling error about {100.0 * se:.1f} %, one standard error)" if se else ""))
    flows = stats.get("flow_for_confidence") or {}
    for column, label, unit in (("compressor_flow_kg_per_h", "compressor flow", "kg/h"),
                                ("compressor_suction_volume_flow_m3_per_h", "suction volume flow", "m3/h")):
        if column in flows:
            parts = [f"{c} %: " + (f"{v:.4g} {unit}" if v is not None else
                                   "not reachable (too many samples make no liquid)") for c, v in flows[column].items()]
            found.append(f"{label} that meets the production with confidence " + ", ".join(parts))
    return found


def ranked_sensitivity(stats):
    """(main output, [(input, its row of rho)] largest |rho| with the main output first, the
    |rho| below which an input cannot be told from no effect: 2/sqrt(solved samples))."""
    main = stats["main_output"]
    ranked = sorted(stats["sensitivity"].items(), key=lambda kv: -abs(kv[1].get(main, 0.0)))
    return main, ranked, 2.0 / math.sqrt(max(stats["solved"], 1))


def format_stats(stats):
    """The summary as text for a terminal."""
    import textwrap

    words = {k: (w, u) for k, w, u in OUTPUTS}
    lines = ["Uncertain inputs"] + [f"  {key}: {text}" for key, text in stats["inputs"].items()] + [""]
    lines += [f"{stats['samples']} samples: {stats['solved']} solved, {stats['no_liquid']} made no liquid, "
              f"{stats['failed']} failed or invalid", "",
             f"  {'output':<26s} {'mean':>11s} {'sd':>10s} {'P5':>11s} {'P50':>11s} {'P95':>11s}  unit"]
    for key, s in stats["outputs"].items():
        w, u = words[key]
        lines.append(f"  {w:<26s} {s['mean']:>11.5g} {s['sd']:>10.3g} {s['p5']:>11.5g} {s['p50']:>11.5g} "
                     f"{s['p95']:>11.5g}  {u}")
    margin = margin_sentences(stats)
    if margin:
        lines.append("")
        for m in margin:
            lines += textwrap.wrap(m, 100, initial_indent="  ", subsequent_indent="    ")
    main, ranked, noise = ranked_sensitivity(stats)
    lines += [""] + textwrap.wrap(
        f"What drives the spread: {stats['sensitivity_method']} of each input with each output, largest first "
        f"for {words[main][0]} (with {stats['solved']} samples, |rho| below about {noise:.2f} cannot be told from "
        f"no effect):", 100)
    shown_keys = [k for k in stats["outputs"] if k in SENSITIVITY_COLUMNS]
    width = max([len(k) for k, _ in ranked] + [5])
    lines.append(f"  {'input':<{width}s} " + " ".join(f"{SENSITIVITY_COLUMNS[k]:>12s}" for k in shown_keys))
    for key, row in ranked:
        lines.append(f"  {key:<{width}s} " + " ".join(f"{row.get(k, 0.0):>+12.3f}" for k in shown_keys))
    if stats["notes"]:
        lines.append("")
        for note in stats["notes"]:
            lines += textwrap.wrap(f"note: {note}", 100, initial_indent="  ", subsequent_indent="    ")
    return "\n".join(lines)
