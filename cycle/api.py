"""A small Python interface for notebooks: scenarios in, results and pandas DataFrames out.

Example
-------
>>> from cycle import api
>>> scenario = api.load("scenarios/nitrogen-bench.yaml")
>>> result = api.run(scenario)
>>> result.summary()["liquid_yield"]                                   # doctest: +SKIP
>>> frame = api.sweep("scenarios/nitrogen-bench.yaml", {"high_pressure": {"from": "100 bar",
...                   "to": "300 bar", "steps": 9}}, out="nitrogen-sweep.csv")   # doctest: +SKIP
"""

import copy
import os
import pathlib
import tempfile

from cycle.scenario import parse_scenario, read_mapping


def _mapping(source):
    if isinstance(source, (str, os.PathLike)):
        return read_mapping(source)
    if isinstance(source, dict):
        return copy.deepcopy(source)
    raise TypeError(f"expected a scenario file path or mapping, got {type(source).__name__}")


def load(source):
    """A validated :class:`~cycle.scenario.Scenario` from a YAML file or a mapping (sweep set aside)."""
    data = _mapping(source)
    data.pop("sweep", None)
    return parse_scenario(data)


def run(scenario):
    """Solve a scenario (a :class:`~cycle.scenario.Scenario`, a path or a mapping) into a
    :class:`~cycle.results.CycleResult`; ``result.to_frame()`` is the state table."""
    from cycle.flowsheet import solve_scenario
    from cycle.scenario import Scenario

    if not isinstance(scenario, Scenario):
        scenario = load(scenario)
    return solve_scenario(scenario)


def sweep(source, axes=None, out=None, workers=1, dask=None, mode=None, overwrite=True, dask_timeout=10.0):
    """Run a sweep and return its results as a DataFrame (one row per point).

    The frame holds the columns of the results file, in its order (swept quantities in the
    units of the summary keys, the unit at the end of the name: ``high_pressure_bar``), and then,
    for each swept quantity, one more column under the bare key in SI (``high_pressure`` in
    Pa, ``production.liquid_rate`` in kg/s or m^3/s), so code can pass values straight back into
    a scenario mapping.

    Parameters
    ----------
    source : str, os.PathLike or dict
        Scenario file or mapping; its own ``sweep:`` section is used unless ``axes`` is given.
    axes : dict, optional
        Sweep section to use instead: key -> list of values or ``{from, to, steps[, spacing]}``.
    out : str or os.PathLike, optional
        Results file (.csv or .parquet) to keep; default a temporary file.
    workers : int
        Local worker processes (1: this process).
    dask : str, optional
        ``"local"`` or a scheduler address.
    mode : str, optional
        ``"grid"`` or ``"zip"``.
    overwrite : bool
        Replace an ``out`` file made by another scenario (default True in notebooks).
    dask_timeout : float
        Seconds to reach the scheduler at ``dask`` before giving up.

    ``out`` must be in a folder that exists; a problem with it, or a kept row that does not
    match its point, raises :class:`~cycle.errors.ScenarioError` naming the path.
    """
    from cycle.sweep import run_sweep

    data = _mapping(source)
    if axes is not None:
        data["sweep"] = dict(axes)
    if mode is not None:
        data.setdefault("sweep", {})["mode"] = mode
    with tempfile.TemporaryDirectory() as tmp:
        path = pathlib.Path(out) if out is not None else pathlib.Path(tmp) / "sweep.csv"
        run_sweep(data, path, workers=workers, dask=dask, overwrite=overwrite, progress=False,
                  dask_timeout=dask_timeout)
        import pandas as pd

        if path.suffix.lower() == ".parquet":
            frame = pd.read_parquet(path)
        else:
            frame = pd.read_csv(path, keep_default_na=False, na_values=[""], dtype={"message": str, "status": str})
    return with_si_columns(frame)


def with_si_columns(frame):
    """A sweep results frame with, after its own columns, each swept quantity in SI under its
    bare key (``high_pressure_bar`` -> ``high_pressure`` [Pa])."""
    from cycle.sweep import parse_column, si_value

    cols = list(frame.columns)
    swept = cols[cols.index("point") + 1: cols.index("status")] if "point" in cols and "status" in cols else []
    frame = frame.copy()
    if "message" in frame:  # an empty message is text, not a missing number
        frame["message"] = frame["message"].fillna("").astype(str)
    for column in swept:
        parsed = parse_column(str(column))
        if parsed is not None and parsed[1] is not None and parsed[0] not in frame.columns:
            key, dimension = parsed
            frame[key] = si_value(frame[column].astype(float), dimension)
    return frame


def compare(source, gases, at_optimum=False, between=None):
    """The same plant with each gas, ranked by figure of merit, as a DataFrame."""
    import pandas as pd

    from cycle.studies import compare as _compare

    return pd.DataFrame(_compare(_mapping(source), list(gases), at_optimum=at_optimum, between=between))


def optimize(source, vary, goal):
    """Best values of keys for a goal: ``vary`` maps each key to (low, high) bounds.

    Returns the dictionary ``lhsim optimize --json`` prints.
    """
    from cycle.studies import optimize as _optimize

    return _optimize(_mapping(source), [(key, lo, hi) for key, (lo, hi) in vary.items()], goal)


def uncertainty(source, out=None, workers=1, dask=None, overwrite=True):
    """Run a scenario's ``uncertainty:`` section (:mod:`cycle.uncertainty`).

    Parameters
    ----------
    source : str, os.PathLike or dict
        Scenario file or mapping with an uncertainty section.
    out : str or os.PathLike, optional
        Results file (.csv or .parquet) to keep; default a temporary file.
    workers : int
        Local worker processes (1: this process).
    dask : str, optional
        ``"local"`` or a scheduler address.
    overwrite : bool
        Replace an ``out`` file made by another scenario (default True in notebooks).

    Returns
    -------
    frame : pandas.DataFrame
        One row per sample (the results file's columns).
    stats : dict
        Means, standard deviations, percentiles, the production margin and the sensitivity
        indices (:func:`cycle.uncertainty.analyse`).
    """
    from cycle.uncertainty import run_uncertainty

    data = _mapping(source)
    with tempfile.TemporaryDirectory() as tmp:
        path = pathlib.Path(out) if out is not None else pathlib.Path(tmp) / "uncertainty.csv"
        return run_uncertainty(data, path, workers=workers, dask=dask, overwrite=overwrite, progress=False)

