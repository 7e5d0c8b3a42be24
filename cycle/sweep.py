"""Parameter sweeps from scenario files: points, validation, running, and a resumable file.

A ``sweep:`` section maps scenario keys (dotted for nested keys, ``gas`` included) to a list
of values or a range ``{from: ..., to: ..., steps: N, spacing: log}``; several keys form the
full grid, or (``mode: zip``) are paired.  Every point is validated before any is run.

Results reach the output file in small batches as points finish.  Running the same command
again computes only the points missing from the file; a partly written last line is dropped
and redone; when all points are in, the file is rewritten sorted by point, so that it equals
an uninterrupted run.  A sidecar ``<output>.lhsim.json`` holds the fingerprint of the scenario
that made the file and the file format; a different scenario, or a file of an older format, is
refused unless ``overwrite`` is given.

Swept quantities are written in the units of the summary keys, with the unit at the end of the
column name (:func:`swept_column`: ``high_pressure_bar``, ``ambient_temperature_K``,
``production.liquid_rate_L_per_h``); dimensionless keys, whole numbers and names keep the key.
"""

import copy
import csv
import hashlib
import io
import itertools
import json
import math
import os
import pathlib

from cycle.errors import NoLiquefactionError, ScenarioError
from cycle.scenario import key_kind, parse_scenario
from cycle.units import UnitError, parse_quantity

STATUSES = ("ok", "no-liquid", "invalid", "failed")
_RANGE_KEYS = {"from", "to", "steps", "spacing"}
# Format of results files: 1 wrote swept quantities in SI under the bare key; 2 writes them in
# the units below, the unit at the end of the column name.
RESULTS_FORMAT = 2

# The unit a swept quantity's column is written in, as the summary keys name theirs:
# dimension -> (column-name suffix, unit as printed, multiplier, divisor): the column value is
# the SI value times the multiplier over the divisor (two exact numbers, so that a value and
# its way back are each rounded once).
COLUMN_UNITS = {
    "pressure": ("bar", "bar", 1.0, 1e5),
    "temperature": ("K", "K", 1.0, 1.0),
    "temperature_difference": ("K", "K", 1.0, 1.0),
    "power": ("W", "W", 1.0, 1.0),
    "mass_flow": ("kg_per_h", "kg/h", 3600.0, 1.0),
    "volume_flow": ("L_per_h", "L/h", 3.6e6, 1.0),
    "thermal_conductance": ("W_per_K", "W/K", 1.0, 1.0),
    "specific_energy": ("kJ_per_kg", "kJ/kg", 1.0, 1e3),
}


# -- the sweep section --------------------------------------------------------------------

def split_sweep(data):
    """Return (the scenario mapping without its sweep section, the sweep section or None)."""
    if not isinstance(data, dict):
        return data, None
    data = dict(data)
    return data, data.pop("sweep", None)


def to_si(key, value, where="sweep."):
    """A swept value in SI: a number for quantities, text for names."""
    return _si_and_dimension(key, value, where)[0]


def dimension_of(key, value, where="sweep."):
    """The dimension (a key of :data:`COLUMN_UNITS`) ``value`` has as a value of ``key``;
    None for dimensionless keys, whole numbers and names."""
    return _si_and_dimension(key, value, where)[1]


def _si_and_dimension(key, value, where):
    kind = key_kind(key, where=where)
    if kind in ("gas", "text"):
        return str(value), None
    if kind == "integer":
        return int(value), None
    if kind == "number":
        return parse_quantity(value, "dimensionless"), None
    kinds = kind if isinstance(kind, tuple) else (kind,)
    errors = []
    for dimension in kinds:
        try:
            return parse_quantity(value, dimension), dimension
        except UnitError as err:
            errors.append(err)
    if len(kinds) == 1:
        raise errors[0]
    raise UnitError(f"expected a {' or '.join(k.replace('_', ' ') for k in kinds)}, got {value!r}")


def swept_column(key, dimension):
    """Column name of a swept key whose values have ``dimension``: the key with the unit of
    :data:`COLUMN_UNITS` at the end (``high_pressure`` -> ``high_pressure_bar``); the key
    itself for a dimension of None."""
    return key if dimension is None else f"{key}_{COLUMN_UNITS[dimension][0]}"


def column_value(value, dimension):
    """An SI value in its column's unit (names and dimensionless numbers unchanged)."""
    if dimension is None:
        return value
    _, _, times, over = COLUMN_UNITS[dimension]
    return value * times / over


def si_value(value, dimension):
    """A column value back in SI (the inverse of :func:`column_value`)."""
    if dimension is None:
        return value
    _, _, times, over = COLUMN_UNITS[dimension]
    return value * over / times


def display(key, value, dimension=None):
    """A key's SI value as people read it, in its column's unit: ``212.3 bar``, ``0.85``.

    ``dimension`` picks the unit where the key takes more than one kind of quantity
    (``production.liquid_rate``); without it such a value is shown in SI."""
    if dimension is None:
        kind = key_kind(key)
        if isinstance(kind, tuple):
            return f"{value:.6g} (SI)"
        dimension = kind if kind in COLUMN_UNITS else None
    if dimension is None:
        return f"{value:.6g}" if isinstance(value, float) else str(value)
    return f"{column_value(value, dimension):.6g} {COLUMN_UNITS[dimension][1]}"


def parse_column(column):
    """(scenario key, dimension) of a swept-key column name, or None for any other column."""
    for dimension, (suffix, *_) in COLUMN_UNITS.items():
        if column.endswith("_" + suffix):
            key = column[: -len(suffix) - 1]
            try:
                kind = key_kind(key)
            except ScenarioError:
                continue
            if dimension in (kind if isinstance(kind, tuple) else (kind,)):
                return key, dimension
    try:
        kind = key_kind(column)
    except ScenarioError:
        return None
    return (column, None) if kind in ("gas", "text", "integer", "number") else None


def find_column(columns, key):
    """The column of ``columns`` that holds ``key``: the key itself, or a swept quantity's
    column with its unit (``high_pressure`` finds ``high_pressure_bar``); None if neither."""
    columns = [str(c) for c in columns]
    if key in columns:
        return key
    try:
        kind = key_kind(key)
    except ScenarioError:
        return None
    for dimension in (kind if isinstance(kind, tuple) else (kind,)):
        if dimension in COLUMN_UNITS and swept_column(key, dimension) in columns:
            return swept_column(key, dimension)
    return None


def column_dimensions(keys, points):
    """For each swept key, the dimension its column is written in (None: no unit).

    A key that takes a mass flow or a volume flow (``production.liquid_rate``) must be given
    one way at every point, since a column has one unit."""
    out = {}
    for key in keys:
        found = {}
        for values, _ in points:
            try:
                found.setdefault(dimension_of(key, values[key]), values[key])
            except UnitError:
                continue  # validate() names the point
        if len(found) > 1:
            (d1, v1), (d2, v2) = list(found.items())[:2]
            raise ScenarioError(f"sweep.{key}: give every value as a {d1.replace('_', ' ')} or every value as a "
                                f"{d2.replace('_', ' ')} (a column has one unit), got {v1!r} and {v2!r}")
        out[key] = next(iter(found), None)
    return out


def _range_values(key, spec):
    unknown = set(spec) - _RANGE_KEYS
    if unknown:
        raise ScenarioError(f"sweep.{key}: unknown range key {sorted(unknown)[0]}; a range takes from, to, "
                            f"steps and optionally spacing (linear or log)")
    for part in ("from", "to", "steps"):
        if part not in spec:
            raise ScenarioError(f"sweep.{key}: a range needs from, to and steps, missing {part}")
    steps = spec["steps"]
    if isinstance(steps, bool) or not isinstance(steps, int) or not 1 <= steps <= 100000:
        raise ScenarioError(f"sweep.{key}.steps must be a whole number from 1 to 100000, got {steps!r}")
    kind = key_kind(key)
    if kind in ("gas", "text"):
        raise ScenarioError(f"sweep.{key}: a range needs a numeric key; give a list of values instead")
    try:
        lo, hi = to_si(key, spec["from"]), to_si(key, spec["to"])
    except UnitError as err:
        raise ScenarioError(f"sweep.{key}: {err}") from None
    spacing = spec.get("spacing", "linear")
    if spacing not in ("linear", "log"):
        raise ScenarioError(f"sweep.{key}.spacing must be linear or log, got {spacing!r}")
    import numpy as np

    if spacing == "log":
        if lo <= 0 or hi <= 0:
            raise ScenarioError(f"sweep.{key}: log spacing needs from and to above 0, got {spec['from']!r} "
                                f"and {spec['to']!r}")
        values = np.geomspace(lo, hi, steps)
    else:
        values = np.linspace(lo, hi, steps)
    if kind == "integer":
        return [int(round(v)) for v in values]
    return [float(v) for v in values]


def sweep_axes(section):
    """Parse a sweep section into (mode, {key: [values]})."""
    if not isinstance(section, dict) or not section:
        raise ScenarioError(f"sweep must map scenario keys to lists of values or ranges, got {section!r}")
    section = dict(section)
    mode = section.pop("mode", "grid")
    if mode not in ("grid", "zip"):
        raise ScenarioError(f"sweep.mode must be grid or zip, got {mode!r}")
    if not section:
        raise ScenarioError("sweep names no key to sweep")
    axes = {}
    for key, spec in section.items():
        key = str(key)
        key_kind(key)
        if isinstance(spec, dict):
            axes[key] = _range_values(key, spec)
        elif isinstance(spec, list) and spec:
            axes[key] = list(spec)
        else:
            raise ScenarioError(f"sweep.{key} must be a list of values or a range "
                                f"{{from: ..., to: ..., steps: N}}, got {spec!r}")
    if mode == "zip":
        lengths = {key: len(v) for key, v in axes.items()}
        if len(set(lengths.values())) > 1:
            listed = ", ".join(f"{k} has {n}" for k, n in lengths.items())
            raise ScenarioError(f"sweep.mode zip needs lists of one length: {listed}")
    return mode, axes


def set_key(data, key, value):
    """A deep copy of a scenario mapping with the dotted ``key`` set to ``value``."""
    out = copy.deepcopy(data)
    node = out
    parts = key.split(".")
    for part in parts[:-1]:
        child = node.get(part)
        if not isinstance(child, dict):
            child = {}
            node[part] = child
        node = child
    node[parts[-1]] = value
    return out


def expand(data):
    """All points of a scenario mapping with a sweep section.

    Returns
    -------
    keys : list of str
        The swept keys, in file order.
    points : list of (dict, dict)
        For each point, the swept values as given and the full scenario mapping.
    """
    base, section = split_sweep(data)
    if section is None:
        raise ScenarioError("the scenario has no sweep section: add sweep: {high_pressure: [100 bar, 200 bar]}, "
                            "for example")
    mode, axes = sweep_axes(section)
    keys = list(axes)
    combos = zip(*axes.values()) if mode == "zip" else itertools.product(*axes.values())
    points = []
    for combo in combos:
        values = dict(zip(keys, combo))
        mapping = base
        for key, value in values.items():
            mapping = set_key(mapping, key, value)
        points.append((values, mapping))
    return keys, points


def validate(keys, points):
    """Parse every point; refuse the sweep on the first invalid one, naming key and value."""
    scenarios = []
    for k, (values, mapping) in enumerate(points):
        try:
            scenarios.append(parse_scenario(mapping))
        except ScenarioError as err:
            at = ", ".join(f"{key} = {value!r}" for key, value in values.items())
            raise ScenarioError(f"sweep point {k} ({at}) is invalid: {err}") from None
        for key, value in values.items():
            try:
                to_si(key, value)
            except UnitError as err:
                raise ScenarioError(f"sweep point {k}: {key} = {value!r}: {err}") from None
    column_dimensions(keys, points)
    return scenarios


def fingerprint(data):
    """A hash of the scenario mapping (sweep included) and the lhsim version."""
    from cycle import __version__

    text = json.dumps(data, sort_keys=True, default=str)
    return hashlib.sha256(f"{__version__}\n{text}".encode()).hexdigest()[:20]


# -- running points -----------------------------------------------------------------------

def run_point(mapping):
    """Solve one scenario mapping; return (status, message, summary dict).

    An ``ok`` point's message holds the solve's warnings (a UA target the streams cannot use, a
    solve that missed its target, ...), empty where there are none.
    """
    from properties import PropertyRangeError
    from cycle.flowsheet import solve_scenario

    import warnings

    from cycle.errors import RecycleNotConvergedWarning

    try:
        with warnings.catch_warnings():  # said in the row's message instead
            warnings.simplefilter("ignore", RecycleNotConvergedWarning)
            result = solve_scenario(parse_scenario(mapping))
    except NoLiquefactionError as err:
        return "no-liquid", str(err), {}
    except (ScenarioError, PropertyRangeError) as err:
        return "invalid", str(err), {}
    except Exception as err:  # a bug or a solver failure: recorded, never stops the sweep
        return "failed", f"{type(err).__name__}: {err}", {}
    return "ok", "; ".join(result.warnings), result.summary()


def run_batch(batch):
    """Worker entry: ``batch`` is a list of (point index, scenario mapping); plain data only."""
    return [(index, run_point(mapping)) for index, mapping in batch]


def _cell(value):
    if value is None:
        return ""
    if isinstance(value, float):
        return "" if not math.isfinite(value) else repr(value)
    return str(value)


def columns_for(keys, scenarios, dimensions=None):
    """Header of a sweep file: point, the swept keys (:func:`swept_column`), status, message,
    then every summary key (one the swept columns already hold, such as ``heat_leak_W``, once)."""
    from cycle.results import summary_keys

    dimensions = dimensions or {}
    swept = [swept_column(key, dimensions.get(key)) for key in keys]
    summary = []
    for sc in scenarios:
        for key in summary_keys(sc):
            if key not in summary:
                summary.append(key)
    return ["point"] + swept + ["status", "message"] + [k for k in summary if k not in swept]


def make_row(columns, index, values, outcome, dimensions=None):
    status, message, summary = outcome
    dimensions = dimensions or {}
    row = {"point": index, "status": status, "message": message}
    for key, value in values.items():
        dimension = dimensions.get(key)
        row[swept_column(key, dimension)] = column_value(to_si(key, value), dimension)
    for key in columns:
        if key not in row:
            row[key] = summary.get(key)
    return [_cell(row[c]) for c in columns]


# -- the resumable results file -----------------------------------------------------------

class ResultsFile:
    """A CSV (or Parquet, through a CSV journal) that rows reach as they finish.

    Parameters
    ----------
    path : str or os.PathLike
    columns : list of str
    fingerprint : str
        Of the scenario that makes the file.
    points : int
        How many points the sweep has.
    overwrite : bool
        Replace a file made by a different scenario.
    """

    def __init__(self, path, columns, fingerprint, points, overwrite=False):
        self.path = pathlib.Path(path)
        self.parquet = self.path.suffix.lower() == ".parquet"
        if self.path.suffix.lower() not in (".csv", ".parquet"):
            raise ScenarioError(f"--out must end in .csv or .parquet, got {self.path.name}")
        self.journal = self.path.with_name(self.path.name + ".journal.csv") if self.parquet else self.path
        self.meta = self.path.with_name(self.path.name + ".lhsim.json")
        self.columns = columns
        self.fingerprint = fingerprint
        self.points = points
        self.rows = {}
        self._open(overwrite)

    def _open(self, overwrite):
        exists = self.path.exists() or self.journal.exists()
        if exists and not overwrite:
            try:
                meta = json.loads(self.meta.read_text())
            except (OSError, ValueError):
                meta = None
            if not isinstance(meta, dict):
                raise ScenarioError(f"{self.path} exists and was not written by this sweep; give --overwrite "
                                    f"to replace it, or choose another --out")
            if meta.get("format", 1) != RESULTS_FORMAT:
                raise ScenarioError(f"{self.path} was written by an older lhsim (results format "
                                    f"{meta.get('format', 1)}: swept keys in SI, no unit in their column names); "
                                    f"give --overwrite to compute it again in format {RESULTS_FORMAT}, or choose "
                                    f"another --out")
            if meta.get("fingerprint") != self.fingerprint or meta.get("columns") != self.columns:
                raise ScenarioError(f"{self.path} holds results of a different scenario or sweep; give "
                                    f"--overwrite to replace it, or choose another --out")
            if self.journal.exists():
                self._read_journal()
            elif self.parquet:
                self._read_parquet()
        else:
            for stale in (self.path, self.journal):
                if stale.exists():
                    stale.unlink()
        self.path.parent.mkdir(parents=True, exist_ok=True)
        self.meta.write_text(json.dumps({"format": RESULTS_FORMAT, "fingerprint": self.fingerprint,
                                         "columns": self.columns, "points": self.points}, indent=1))
        if not self.journal.exists():
            self._rewrite_journal()

    def _read_journal(self):
        raw = self.journal.read_bytes()
        if raw and not raw.endswith(b"\n"):  # a line cut off by a crash: drop it, redo that point
            raw = raw[: raw.rfind(b"\n") + 1]
            with open(self.journal, "wb") as handle:
                handle.write(raw)
        reader = csv.reader(io.StringIO(raw.decode("utf-8")))
        header = next(reader, None)
        if header != self.columns:
            raise ScenarioError(f"{self.journal} has other columns than this sweep; give --overwrite")
        for cells in reader:
            if len(cells) != len(self.columns) or not cells[0].isdigit():
                continue
            index = int(cells[0])
            if index < self.points and cells[self.columns.index("status")] in STATUSES:
                self.rows.setdefault(index, cells)

    def _read_parquet(self):
        import pandas as pd

        frame = pd.read_parquet(self.path)
        for record in frame.astype(str).replace({"nan": "", "None": ""}).itertuples(index=False):
            cells = list(record)
            self.rows.setdefault(int(cells[0]), cells)
        self._rewrite_journal()

    @property
    def done(self):
        return set(self.rows)

    def add(self, rows):
        """Append finished rows (lists of cells) and make them durable."""
        fresh = [cells for cells in rows if int(cells[0]) not in self.rows]
        if not fresh:
            return
        with open(self.journal, "a", newline="", encoding="utf-8") as handle:
            writer = csv.writer(handle, lineterminator="\n")
            writer.writerows(fresh)
            handle.flush()
            os.fsync(handle.fileno())
        for cells in fresh:
            self.rows[int(cells[0])] = cells
        if self.parquet:
            self._write_parquet()

    def _rewrite_journal(self):
        tmp = self.journal.with_name(self.journal.name + ".tmp")
        with open(tmp, "w", newline="", encoding="utf-8") as handle:
            writer = csv.writer(handle, lineterminator="\n")
            writer.writerow(self.columns)
            writer.writerows(self.rows[k] for k in sorted(self.rows))
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, self.journal)

    def _write_parquet(self):
        frame = self.frame()
        tmp = self.path.with_name(self.path.name + ".tmp")
        frame.to_parquet(tmp, index=False)
        os.replace(tmp, self.path)

    def frame(self):
        """The rows so far as a DataFrame, numbers parsed."""
        import pandas as pd

        text = io.StringIO()
        writer = csv.writer(text, lineterminator="\n")
        writer.writerow(self.columns)
        writer.writerows(self.rows[k] for k in sorted(self.rows))
        text.seek(0)
        return pd.read_csv(text, keep_default_na=False, na_values=[""], dtype={"message": str, "status": str})

    def finish(self):
        """All points in: rewrite sorted (CSV) and drop the journal (Parquet)."""
        self._rewrite_journal()
        if self.parquet:
            self._write_parquet()
            self.journal.unlink()


# -- the runner ---------------------------------------------------------------------------

def _batches(items, size):
    for k in range(0, len(items), size):
        yield items[k:k + size]


def run_sweep(data, out, workers=None, dask=None, overwrite=False, progress=None, batch_size=None):
    """Run a sweep and write its results file.

    Parameters
    ----------
    data : dict
        The scenario mapping with its sweep section, as read from YAML.
    out : str or os.PathLike
        ``.csv`` or ``.parquet``.
    workers : int, optional
        Local worker processes; default the CPU count; 1 runs in this process.
    dask : str, optional
        ``"local"`` (start a LocalCluster of ``workers`` processes) or a scheduler address.
    overwrite : bool
        Replace a results file made by a different scenario.
    progress : bool, optional
        Show a progress bar (points done, how many made no liquid, how many failed, time left);
        default when standard error is a terminal.
    batch_size : int, optional
        Points per task sent to a worker; default a few tasks per worker.

    Returns
    -------
    dict
        ``points``, ``computed`` (this run), ``no_liquid`` (status ``no-liquid``), ``failed``
        (status ``invalid`` or ``failed``), ``path``; the counts are over the whole file.
    """
    import sys

    keys, points = expand(data)
    scenarios = validate(keys, points)
    dimensions = column_dimensions(keys, points)
    columns = columns_for(keys, scenarios, dimensions)
    results = ResultsFile(out, columns, fingerprint(data), len(points), overwrite)
    todo = [(k, mapping) for k, (values, mapping) in enumerate(points) if k not in results.done]
    workers = workers or os.cpu_count() or 1
    # A few batches per worker: few enough that scheduling costs little, enough to balance load.
    size = batch_size or max(1, min(25, math.ceil(len(todo) / (16 * workers)) if todo else 1))
    batches = list(_batches(todo, size))
    show = sys.stderr.isatty() if progress is None else progress
    status_at = columns.index("status")
    counts = {"no-liquid": 0, "failed": 0}

    def count(status):
        if status == "no-liquid":
            counts["no-liquid"] += 1
        elif status != "ok":
            counts["failed"] += 1

    for cells in results.rows.values():
        count(cells[status_at])
    bar = None
    if show:
        from tqdm import tqdm

        try:
            width = os.get_terminal_size(sys.stderr.fileno()).columns
        except OSError:
            width = 0
        bar = tqdm(total=len(points), initial=len(results.done), unit="point", file=sys.stderr,
                   desc="sweep", ncols=width if width >= 40 else 100)
        bar.set_postfix_str(progress_note(counts))

    def record(done_batch):
        rows = [make_row(columns, index, points[index][0], outcome, dimensions) for index, outcome in done_batch]
        results.add(rows)
        for _, outcome in done_batch:
            count(outcome[0])
        if bar is not None:
            bar.update(len(done_batch))
            bar.set_postfix_str(progress_note(counts))

    try:
        if dask:
            _run_dask(batches, dask, workers, record)
        elif workers == 1 or len(batches) <= 1:
            for batch in batches:
                record(run_batch(batch))
        else:
            _run_processes(batches, workers, record)
    finally:
        if bar is not None:
            bar.close()
    results.finish()
    return {"points": len(points), "computed": len(todo), "no_liquid": counts["no-liquid"],
            "failed": counts["failed"], "path": str(out)}


def progress_note(counts):
    """What the progress bar shows beside the count: no liquid apart from failures."""
    return f"no liquid {counts['no-liquid']}, failed {counts['failed']}"


def _run_processes(batches, workers, record):
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor, as_completed

    method = "fork" if "fork" in multiprocessing.get_all_start_methods() else "spawn"
    pool = ProcessPoolExecutor(max_workers=workers, mp_context=multiprocessing.get_context(method))
    try:
        futures = [pool.submit(run_batch, batch) for batch in batches]
        for future in as_completed(futures):
            record(future.result())
    except BaseException:
        for future in futures:
            future.cancel()
        pool.shutdown(wait=False, cancel_futures=True)
        raise
    pool.shutdown()


def _run_dask(batches, address, workers, record):
    from distributed import Client, LocalCluster, as_completed

    cluster = None
    if address == "local":
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                               dashboard_address=None, silence_logs=40)
        client = Client(cluster)
    else:
        client = Client(address)
    try:
        futures = client.map(run_batch, batches, pure=False)
        for future in as_completed(futures):
            record(future.result())
    finally:
        client.close()
        if cluster is not None:
            cluster.close()
