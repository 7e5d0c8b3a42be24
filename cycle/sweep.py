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
from cycle.units import UnitError, parse_quantity, printable, shown

STATUSES = ("ok", "no-liquid", "invalid", "failed")
_RANGE_KEYS = {"from", "to", "steps", "spacing"}
# Most points a sweep may have unless the caller raises the limit (lhsim sweep --max-points):
# counted from the lengths of the lists and the steps of the ranges before any point is made,
# since every point is held in memory and validated before the first is solved.
MAX_POINTS = 1_000_000
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
    "length": ("m", "m", 1.0, 1.0),
    "suction_volume_flow": ("m3_per_h", "m^3/h", 3600.0, 1.0),
    "wall_conductivity": ("W_per_m_K", "W/(m K)", 1.0, 1.0),
    "normal_volume_flow": ("Nm3_per_h", "Nm^3/h", 3600.0, 1.0),
    "standard_volume_flow": ("Sm3_per_h", "Sm^3/h", 3600.0, 1.0),
    "standard_us_volume_flow": ("scfm", "scfm", 60.0, 0.3048 ** 3),
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
        whole = isinstance(value, float) and math.isfinite(value) and value == int(value)
        if isinstance(value, bool) or not (isinstance(value, int) or whole):
            raise UnitError(f"expected a whole number, got {shown(value)}")
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
    raise UnitError(f"expected a {' or '.join(k.replace('_', ' ') for k in kinds)}, got {shown(value)}")


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
                                f"{d2.replace('_', ' ')} (a column has one unit), got {shown(v1)} and {shown(v2)}")
        out[key] = next(iter(found), None)
    return out


def _range_steps(key, spec):
    """The number of values of a range section, after checking its keys (no value is made)."""
    unknown = {str(k) for k in spec} - _RANGE_KEYS
    if unknown:
        raise ScenarioError(f"sweep.{key}: unknown range key {printable(sorted(unknown)[0], 60)}; a range takes "
                            f"from, to, steps and optionally spacing (linear or log)")
    for part in ("from", "to", "steps"):
        if part not in spec:
            raise ScenarioError(f"sweep.{key}: a range needs from, to and steps, missing {part}")
    steps = spec["steps"]
    if isinstance(steps, bool) or not isinstance(steps, int) or not 1 <= steps <= 100000:
        raise ScenarioError(f"sweep.{key}.steps must be a whole number from 1 to 100000, got {shown(steps)}")
    return steps


def _range_values(key, spec):
    steps = _range_steps(key, spec)
    kind = key_kind(key)
    if kind in ("gas", "text"):
        raise ScenarioError(f"sweep.{key}: a range needs a numeric key; give a list of values instead")
    try:
        lo, hi = to_si(key, spec["from"]), to_si(key, spec["to"])
    except UnitError as err:
        raise ScenarioError(f"sweep.{key}: {err}") from None
    spacing = spec.get("spacing", "linear")
    if spacing not in ("linear", "log"):
        raise ScenarioError(f"sweep.{key}.spacing must be linear or log, got {shown(spacing)}")
    import numpy as np

    if spacing == "log":
        if lo <= 0 or hi <= 0:
            raise ScenarioError(f"sweep.{key}: log spacing needs from and to above 0, got {shown(spec['from'])} "
                                f"and {shown(spec['to'])}")
        values = np.geomspace(lo, hi, steps)
    else:
        values = np.linspace(lo, hi, steps)
    if kind == "integer":
        return [int(round(v)) for v in values]
    return [float(v) for v in values]


def sweep_axes(section, max_points=MAX_POINTS):
    """Parse a sweep section into (mode, {key: [values]}).

    The points are counted from the lists' lengths and the ranges' steps (the product for a
    grid, the common length for zip) before any range's values are made; more than
    ``max_points`` refuses the sweep with the count.
    """
    if not isinstance(section, dict) or not section:
        raise ScenarioError(f"sweep must map scenario keys to lists of values or ranges, got {shown(section)}")
    section = dict(section)
    mode = section.pop("mode", "grid")
    if mode not in ("grid", "zip"):
        raise ScenarioError(f"sweep.mode must be grid or zip, got {shown(mode)}")
    if not section:
        raise ScenarioError("sweep names no key to sweep")
    lengths = {}
    for key, spec in section.items():
        key = str(key)
        key_kind(key)
        if isinstance(spec, dict):
            lengths[key] = _range_steps(key, spec)
        elif isinstance(spec, list) and spec:
            lengths[key] = len(spec)
        else:
            raise ScenarioError(f"sweep.{key} must be a list of values or a range "
                                f"{{from: ..., to: ..., steps: N}}, got {shown(spec)}")
    if mode == "zip" and len(set(lengths.values())) > 1:
        listed = ", ".join(f"{k} has {n}" for k, n in lengths.items())
        raise ScenarioError(f"sweep.mode zip needs lists of one length: {listed}")
    count = next(iter(lengths.values())) if mode == "zip" else math.prod(lengths.values())
    if count > max_points:
        made = " x ".join(f"{n} {k}" for k, n in lengths.items()) if mode == "grid" else "zip"
        raise ScenarioError(f"sweep has {count} points ({made}), more than the limit of {max_points}; sweep "
                            f"fewer values, or raise the limit (lhsim sweep --max-points N)")
    axes = {}
    for key, spec in section.items():
        axes[str(key)] = _range_values(str(key), spec) if isinstance(spec, dict) else list(spec)
    return mode, axes


def set_key(data, key, value):
    """A deep copy of a scenario mapping with the dotted ``key`` set to ``value``."""
    out = copy.deepcopy(data)
    _put(out, key, value)
    return out


def _put(data, key, value):
    """Set the dotted ``key`` of a scenario mapping to ``value`` in place."""
    node = data
    parts = key.split(".")
    for part in parts[:-1]:
        child = node.get(part)
        if not isinstance(child, dict):
            child = {}
            node[part] = child
        node = child
    node[parts[-1]] = value


def expand(data, max_points=MAX_POINTS):
    """All points of a scenario mapping with a sweep section.

    Parameters
    ----------
    data : dict
        The scenario mapping with its sweep section, as read from YAML.
    max_points : int
        Most points accepted (default :data:`MAX_POINTS`); the count is checked before any
        point is made.

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
    mode, axes = sweep_axes(section, max_points)
    keys = list(axes)
    combos = zip(*axes.values()) if mode == "zip" else itertools.product(*axes.values())
    points = []
    for combo in combos:
        values = dict(zip(keys, combo))
        mapping = copy.deepcopy(base)  # one copy per point, however many keys are swept
        for key, value in values.items():
            _put(mapping, key, value)
        points.append((values, mapping))
    return keys, points


def validate(keys, points, point_name="sweep point"):
    """Parse every point; refuse the sweep on the first invalid one, naming key and value
    (``point_name`` is what a point is called in the message)."""
    scenarios = []
    for k, (values, mapping) in enumerate(points):
        try:
            scenarios.append(parse_scenario(mapping))
        except ScenarioError as err:
            at = ", ".join(f"{key} = {shown(value)}" for key, value in values.items())
            raise ScenarioError(f"{point_name} {k} ({at}) is invalid: {err}") from None
        for key, value in values.items():
            try:
                to_si(key, value)
            except UnitError as err:
                raise ScenarioError(f"{point_name} {k}: {key} = {shown(value)}: {err}") from None
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
    if isinstance(value, bool):  # a yes-or-no summary value (valve_choked) in a float column: 1.0 or 0.0
        return repr(float(value))
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


def column_types(keys, columns, dimensions=None):
    """The type of every column of a results file: ``int``, ``float`` or ``text``.

    ``point`` and swept whole numbers are ``int``; ``status``, ``message``, gases and swept
    text are ``text``; swept quantities, swept plain numbers and the summary keys are ``float``.
    A Parquet file is written and read with these types, so a cell reads back as it was written.
    """
    dimensions = dimensions or {}
    types = {column: "float" for column in columns}
    types.update(point="int", status="text", message="text")
    for key in keys:
        kind = key_kind(key)
        types[swept_column(key, dimensions.get(key))] = {"integer": "int", "gas": "text", "text": "text"}.get(
            kind if isinstance(kind, str) else "", "float")
    return types


def swept_cells(values, dimensions=None):
    """The cells a point's swept values are written as: {column: text}."""
    dimensions = dimensions or {}
    out = {}
    for key, value in values.items():
        dimension = dimensions.get(key)
        written = column_value(to_si(key, value), dimension)
        if isinstance(written, int) and not isinstance(written, bool) and key_kind(key) != "integer":
            written = float(written)  # a float column: 1 and 1.0 are one value, written one way
        out[swept_column(key, dimension)] = _cell(written)
    return out


def make_row(columns, index, values, outcome, dimensions=None):
    status, message, summary = outcome
    row = {"point": str(index), "status": status, "message": message}
    row.update(swept_cells(values, dimensions))
    return [row[c] if c in row else _cell(summary.get(c)) for c in columns]


# -- the resumable results file -----------------------------------------------------------

_TMP = ".lhsim-tmp"  # the end of a temporary file's name: .NAME.RANDOM.lhsim-tmp beside NAME


def _reason(err):
    """An OSError as people read it: its text without the errno number."""
    return err.strerror or str(err) or type(err).__name__


def _write_new(path, write):
    """Make ``path`` anew: ``write(handle)`` into a temporary file beside it (created with
    O_EXCL, so never through a link someone left at its name), flush it to disk, then rename it
    over ``path`` in one step (a link at ``path`` is replaced, its target left alone)."""
    import tempfile

    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=_TMP)
    try:
        with os.fdopen(fd, "wb") as handle:
            write(handle)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    _sync_folder(path.parent)


def _sync_folder(folder):
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _append(path, data):
    """Append bytes to an existing regular file (never through a link) and flush them to disk."""
    fd = os.open(path, os.O_WRONLY | os.O_APPEND | getattr(os, "O_NOFOLLOW", 0))
    try:
        view = memoryview(data)
        while view:
            view = view[os.write(fd, view):]
        os.fsync(fd)
    finally:
        os.close(fd)


def _csv_bytes(rows):
    text = io.StringIO()
    csv.writer(text, lineterminator="\n").writerows(rows)
    return text.getvalue().encode("utf-8")


class _DeferredInterrupt:
    """Hold a Ctrl-C (SIGINT) back while a file is written; raise it when the write is done.

    Python runs signal handlers between bytecodes, so a solve in CoolProp is never cut off
    half-way by one; this keeps a batch of rows and its Parquet copy from being cut off
    between two steps.  Outside the main thread it does nothing (signals go to that thread).
    """

    def __enter__(self):
        import signal
        import threading

        self.caught, self.previous = [], None
        if threading.current_thread() is threading.main_thread():
            try:
                self.previous = signal.signal(signal.SIGINT, lambda signum, frame: self.caught.append(signum))
            except ValueError:
                self.previous = None
        return self

    def __exit__(self, *exc):
        import signal

        if self.previous is None:
            return False
        signal.signal(signal.SIGINT, self.previous)
        if self.caught and exc[0] is None:
            if callable(self.previous):
                self.previous(signal.SIGINT, None)
        return False


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
    types : dict, optional
        Column -> ``int``, ``float`` or ``text`` (:func:`column_types`); default ``point`` int,
        ``status`` and ``message`` text, the rest float.
    expected : list of dict, optional
        For each point, the cells of its swept columns (:func:`swept_cells`): a kept row whose
        swept cells differ from its point's is refused.

    While it is open the file is locked (``<output>.lhsim.lock`` beside it): a second sweep into
    the same file is refused at once.  Every problem with the file or its folder is a
    :class:`~cycle.errors.ScenarioError` naming the path; nothing already written is removed
    unless ``overwrite`` is given.
    """

    def __init__(self, path, columns, fingerprint, points, overwrite=False, types=None, expected=None):
        self.path = pathlib.Path(path)
        self.parquet = self.path.suffix.lower() == ".parquet"
        if self.path.suffix.lower() not in (".csv", ".parquet"):
            raise ScenarioError(f"--out must end in .csv or .parquet, got {self.path.name}")
        self.columns = list(columns)
        self.fingerprint = fingerprint
        self.points = points
        self.types = dict(column_types([], self.columns), **(types or {}))
        self.expected = expected
        self.rows = {}
        self.changed = False
        self._lock_fd = None
        self._settle_path()
        self.journal = self.path.with_name(self.path.name + ".journal.csv") if self.parquet else self.path
        self.meta = self.path.with_name(self.path.name + ".lhsim.json")
        self._lock()
        try:
            self._open(overwrite)
        except BaseException:
            self.close()
            raise

    # -- where the file is, and who writes it --

    def _settle_path(self):
        path = self.path
        if path.is_symlink():
            target = path.resolve()
            meta = target.with_name(target.name + ".lhsim.json")
            if not (target.is_file() and isinstance(self._load_meta(meta), dict)):
                raise ScenarioError(f"--out {path} is a symbolic link to {target}, which is not an lhsim results "
                                    f"file; give the path of the file itself, or choose another --out")
            self.path = path = target  # a link to a results file: work on the file, beside it
        folder = path.parent
        if not folder.is_dir():
            what = "is not a folder" if folder.exists() else "does not exist"
            raise ScenarioError(f"--out {path}: the folder {folder} {what}; lhsim does not make folders for "
                                f"results: make it first, or choose another --out")
        if path.is_dir():
            raise ScenarioError(f"--out {path} is a folder; give a file name ending in .csv or .parquet")
        if path.exists() and not path.is_file():
            raise ScenarioError(f"--out {path} is not a regular file; give a file name ending in .csv or .parquet")

    def _lock(self):
        try:
            import fcntl
        except ImportError:  # no flock on this system: no lock
            return
        lock = self.path.with_name(self.path.name + ".lhsim.lock")
        try:
            fd = os.open(lock, os.O_RDWR | os.O_CREAT | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_CLOEXEC", 0),
                         0o644)
        except OSError as err:
            raise ScenarioError(f"--out {self.path}: cannot make files in {self.path.parent} "
                                f"({_reason(err)}: {lock})") from None
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            os.close(fd)
            raise ScenarioError(f"{self.path} is being written by another lhsim sweep (it holds {lock.name}); "
                                f"wait for that sweep to finish, or choose another --out") from None
        except OSError as err:
            os.close(fd)
            raise ScenarioError(f"--out {self.path}: cannot lock {lock} ({_reason(err)})") from None
        self._lock_fd = fd

    def close(self):
        """Release the lock (the lock file stays, empty, beside the results)."""
        if self._lock_fd is not None:
            os.close(self._lock_fd)
            self._lock_fd = None

    @property
    def inherited_fds(self):
        """File descriptors a forked worker should close (the lock)."""
        return () if self._lock_fd is None else (self._lock_fd,)

    # -- reading what is there --

    @staticmethod
    def _load_meta(meta):
        try:
            return json.loads(meta.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            return None

    def _refuse_link(self, path):
        if path.is_symlink():
            raise ScenarioError(f"{path} is a symbolic link; lhsim writes only files it makes itself beside the "
                                f"results: remove the link, or choose another --out")

    def _open(self, overwrite):
        for path in (self.journal, self.meta):
            self._refuse_link(path)
        self._drop_stale_temporaries()
        exists = self.path.exists() or self.journal.exists()
        try:
            if exists and not overwrite:
                self._check_meta()
                if self.journal.exists():
                    self._read_journal()
                elif self.parquet:
                    self._read_parquet()
            else:
                for stale in (self.path, self.journal):
                    if stale.exists():
                        stale.unlink()
            meta = {"format": RESULTS_FORMAT, "fingerprint": self.fingerprint, "columns": self.columns,
                    "points": self.points}
            text = json.dumps(meta, indent=1).encode("utf-8")
            try:
                same = self.meta.read_bytes() == text
            except OSError:
                same = False
            if not same:
                _write_new(self.meta, lambda handle: handle.write(text))
            if not self.journal.exists() and not (self.parquet and self.path.exists()):
                self._rewrite_journal()
        except OSError as err:
            raise ScenarioError(f"--out {self.path}: {_reason(err)} ({getattr(err, 'filename', None) or self.path})"
                                ) from None

    def _drop_stale_temporaries(self):
        import glob

        for name in {self.path.name, self.journal.name, self.meta.name}:
            for stale in self.path.parent.glob(f".{glob.escape(name)}.*{_TMP}"):
                try:
                    if stale.is_file() or stale.is_symlink():
                        stale.unlink()
                except OSError:
                    pass

    def _check_meta(self):
        if not self.meta.exists():
            raise ScenarioError(f"{self.path} exists and was not written by this sweep (it has no {self.meta.name} "
                                f"beside it); give --overwrite to replace it, or choose another --out")
        meta = self._load_meta(self.meta)
        if not isinstance(meta, dict):
            got = "unreadable" if meta is None else f"a JSON {type(meta).__name__}"
            raise ScenarioError(f"{self.meta} is not an lhsim sidecar (expected a JSON object with the sweep's "
                                f"fingerprint, got {got}), so {self.path} was not written by this sweep; give "
                                f"--overwrite to replace it, or choose another --out")
        if meta.get("format", 1) != RESULTS_FORMAT:
            raise ScenarioError(f"{self.path} was written by an older lhsim (results format "
                                f"{meta.get('format', 1)}: swept keys in SI, no unit in their column names); "
                                f"give --overwrite to compute it again in format {RESULTS_FORMAT}, or choose "
                                f"another --out")
        if meta.get("fingerprint") != self.fingerprint or meta.get("columns") != self.columns:
            raise ScenarioError(f"{self.path} holds results of a different scenario or sweep; give "
                                f"--overwrite to replace it, or choose another --out")

    def _refuse_row(self, where, index, what):
        at = f"{where} (point {index})" if index is not None else where
        raise ScenarioError(f"{at} does not belong to this sweep: {what}; the file is left as it is: give "
                            f"--overwrite to compute the sweep again, or choose another --out")

    def _keep(self, where, cells, seen):
        """Check one row read back against its point and keep it."""
        if len(cells) != len(self.columns):
            self._refuse_row(where, None, f"it has {len(cells)} cells, the header {len(self.columns)}")
        text = cells[0]
        if not (text.isascii() and text.isdigit()) or int(text) >= self.points or str(int(text)) != text:
            self._refuse_row(where, None, f"point {text!r} is not a point index of this sweep "
                                          f"(0 to {self.points - 1})")
        index = int(text)
        if index in seen:
            self._refuse_row(where, index, f"point {index} is there twice (also {seen[index]})")
        row = dict(zip(self.columns, cells))
        if row["status"] not in STATUSES:
            self._refuse_row(where, index, f"status {row['status']!r} is not one of {', '.join(STATUSES)}")
        if self.expected is not None:
            for column, cell in self.expected[index].items():
                if row.get(column) != cell:
                    self._refuse_row(where, index, f"{column} is {row.get(column)!r}, the point has {cell!r}")
        for column, cell in row.items():
            kind = self.types.get(column, "float")
            if kind == "text" or cell == "":
                continue
            try:
                ok = (int(cell) >= 0 and cell.strip() == cell) if kind == "int" else math.isfinite(float(cell))
            except ValueError:
                ok = False
            if not ok:
                self._refuse_row(where, index, f"{column} is {cell!r}, not a {'whole' if kind == 'int' else 'finite'} "
                                               f"number")
            if row["status"] != "ok" and column not in self.expected_columns and column != "point":
                self._refuse_row(where, index, f"a point with status {row['status']} has no {column}, "
                                               f"got {cell!r}")
        seen[index] = where
        self.rows[index] = cells

    @property
    def expected_columns(self):
        if self.expected:
            return set(self.expected[0])
        return {c for c in self.columns[1:self.columns.index("status")]} if "status" in self.columns else set()

    def _read_journal(self):
        fd = os.open(self.journal, os.O_RDWR | getattr(os, "O_NOFOLLOW", 0))
        try:
            with os.fdopen(fd, "rb", closefd=False) as handle:
                raw = handle.read()
            if raw and not raw.endswith(b"\n"):  # a line cut off by a crash: drop it, redo that point
                raw = raw[: raw.rfind(b"\n") + 1]
                os.ftruncate(fd, len(raw))
                os.fsync(fd)
        finally:
            os.close(fd)
        if not raw:
            return
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError as err:
            line = raw[: err.start].count(b"\n") + 1
            raise ScenarioError(f"{self.journal} line {line} is not UTF-8 text (byte {err.start}), so it was not "
                                f"written by lhsim; the file is left as it is: give --overwrite to compute the "
                                f"sweep again, or choose another --out") from None
        reader = csv.reader(io.StringIO(text, newline=""))
        seen = {}
        try:
            header = next(reader, None)
            if header != self.columns:
                raise ScenarioError(f"{self.journal} has other columns than this sweep; give --overwrite to "
                                    f"compute the sweep again, or choose another --out")
            for cells in reader:
                self._keep(f"{self.journal} line {reader.line_num}", cells, seen)
        except csv.Error as err:
            raise ScenarioError(f"{self.journal} line {reader.line_num} is not CSV ({err}); give --overwrite to "
                                f"compute the sweep again, or choose another --out") from None

    def _read_parquet(self):
        import pyarrow.parquet as pq

        try:
            table = pq.read_table(self.path)
        except Exception as err:  # truncated, damaged or not Parquet at all
            reason = (str(err).strip().splitlines() or [type(err).__name__])[0]
            raise ScenarioError(f"{self.path} is not a readable Parquet file ({reason}); the file is left as it "
                                f"is: give --overwrite to compute the sweep again, or choose another --out") from None
        if table.column_names != self.columns:
            raise ScenarioError(f"{self.path} has other columns than this sweep; give --overwrite to compute the "
                                f"sweep again, or choose another --out")
        data = [table.column(k).to_pylist() for k in range(table.num_columns)]
        seen = {}
        for n in range(table.num_rows):
            self._keep(f"{self.path} row {n + 1}", [_parquet_cell(column[n]) for column in data], seen)

    # -- writing --

    @property
    def done(self):
        return set(self.rows)

    def add(self, rows):
        """Append finished rows (lists of cells) and make them durable."""
        fresh = [cells for cells in rows if int(cells[0]) not in self.rows]
        if not fresh:
            return
        with _DeferredInterrupt():
            try:
                if not self.journal.exists():  # a Parquet file being resumed: its journal, from the file
                    self._rewrite_journal()
                _append(self.journal, _csv_bytes(fresh))
            except OSError as err:
                raise ScenarioError(f"cannot write {self.journal}: {_reason(err)}; the {len(self.rows)} points "
                                    f"written before are kept: put it right and run the same command again") from None
            for cells in fresh:
                self.rows[int(cells[0])] = cells
            self.changed = True
            if self.parquet:
                self._write_parquet()

    def _canonical(self):
        return _csv_bytes([self.columns] + [self.rows[k] for k in sorted(self.rows)])

    def _rewrite_journal(self):
        data = self._canonical()
        _write_new(self.journal, lambda handle: handle.write(data))

    def _write_parquet(self):
        import pyarrow.parquet as pq

        table = self.table()
        try:
            _write_new(self.path, lambda handle: pq.write_table(table, handle))
        except OSError as err:
            raise ScenarioError(f"cannot write {self.path}: {_reason(err)}; every finished point is kept in "
                                f"{self.journal}: put it right and run the same command again") from None

    def table(self):
        """The rows so far as a pyarrow Table with the column types of :func:`column_types`."""
        import pyarrow as pa

        ordered = [self.rows[k] for k in sorted(self.rows)]
        arrays, fields = [], []
        for j, name in enumerate(self.columns):
            cells = [row[j] for row in ordered]
            kind = self.types.get(name, "float")
            if kind == "text":
                arrays.append(pa.array(cells, pa.string()))
            elif kind == "int":
                arrays.append(pa.array([int(c) if c != "" else None for c in cells], pa.int64()))
            else:
                arrays.append(pa.array([float(c) if c != "" else None for c in cells], pa.float64()))
            fields.append(pa.field(name, arrays[-1].type))
        return pa.Table.from_arrays(arrays, schema=pa.schema(fields))

    def frame(self):
        """The rows so far as a DataFrame, with the column types of :func:`column_types`."""
        return self.table().to_pandas()

    def finish(self):
        """All points in: rewrite sorted (CSV) and drop the journal (Parquet).  A file that is
        already complete and in order is left untouched, byte for byte."""
        with _DeferredInterrupt():
            try:
                if self.parquet:
                    if self.journal.exists() or self.changed or not self.path.exists():
                        self._write_parquet()
                        self.journal.unlink()
                        _sync_folder(self.path.parent)
                else:
                    with open(self.journal, "rb") as handle:
                        current = handle.read()
                    if current != self._canonical():
                        self._rewrite_journal()
            except OSError as err:
                raise ScenarioError(f"cannot write {self.path}: {_reason(err)}; every finished point is kept in "
                                    f"{self.journal}: put it right and run the same command again") from None


def _parquet_cell(value):
    """A Parquet value back as the cell it was written from."""
    if value is None:
        return ""
    if isinstance(value, float):
        return _cell(value)
    if isinstance(value, bool):
        return str(value)
    return str(value)


# -- the runner ---------------------------------------------------------------------------

def _batches(items, size):
    for k in range(0, len(items), size):
        yield items[k:k + size]


DASK_TIMEOUT = 10.0  # seconds to reach a Dask scheduler before giving up


def run_sweep(data, out, workers=None, dask=None, overwrite=False, progress=None, batch_size=None,
              dask_timeout=DASK_TIMEOUT, max_points=None, point_name="sweep point"):
    """Run a sweep and write its results file.

    Parameters
    ----------
    data : dict
        The scenario mapping with its sweep section, as read from YAML.
    out : str or os.PathLike
        ``.csv`` or ``.parquet``, in a folder that exists.
    workers : int, optional
        Local worker processes; default the CPU count; 1 runs in this process.  Never more
        than the CPU count or the points left to compute.
    dask : str, optional
        ``"local"`` (start a LocalCluster of ``workers`` processes) or a scheduler address.
    overwrite : bool
        Replace a results file made by a different scenario.
    progress : bool, optional
        Show a progress bar (points done, how many made no liquid, how many failed, time left);
        default when standard error is a terminal.
    batch_size : int, optional
        Points per task sent to a worker; default a few tasks per worker.
    dask_timeout : float
        Seconds to reach the Dask scheduler at ``dask`` before giving up (a ScenarioError).
    max_points : int, optional
        Most points the sweep may have (default :data:`MAX_POINTS`); more refuses it at once
        with the count, before any point is made.
    point_name : str
        What an invalid point is called in the error (``"uncertainty sample"`` for the samples
        of :mod:`cycle.uncertainty`).

    Returns
    -------
    dict
        ``points``, ``computed`` (this run), ``no_liquid`` (status ``no-liquid``), ``failed``
        (status ``invalid`` or ``failed``), ``path``; the counts are over the whole file.
    """
    import sys

    if dask is not None and not str(dask).strip():
        raise ScenarioError("--dask must be local or a scheduler address such as tcp://127.0.0.1:8786, got ''")
    if not (isinstance(dask_timeout, (int, float)) and math.isfinite(dask_timeout) and dask_timeout > 0):
        raise ScenarioError(f"--dask-timeout must be a number of seconds above 0, got {dask_timeout!r}")
    keys, points = expand(data, MAX_POINTS if max_points is None else max_points)
    scenarios = validate(keys, points, point_name)
    dimensions = column_dimensions(keys, points)
    columns = columns_for(keys, scenarios, dimensions)
    client = None
    if dask and dask != "local":  # reach the scheduler before touching the results file
        client = _dask_client(dask, dask_timeout)
    try:
        results = ResultsFile(out, columns, fingerprint(data), len(points), overwrite,
                              types=column_types(keys, columns, dimensions),
                              expected=[swept_cells(values, dimensions) for values, _ in points])
    except BaseException:
        if client is not None:
            client.close()
        raise
    try:
        return _run(results, points, columns, dimensions, workers, dask, client, progress, batch_size, sys.stderr)
    finally:
        if client is not None:
            client.close()
        results.close()


def _run(results, points, columns, dimensions, workers, dask, client, progress, batch_size, stderr):
    todo = [(k, mapping) for k, (values, mapping) in enumerate(points) if k not in results.done]
    workers = workers or os.cpu_count() or 1
    if client is None:  # local processes: no more than the CPUs, nor than the points left
        workers = max(1, min(workers, os.cpu_count() or 1, len(todo) or 1))
    # A few batches per worker: few enough that scheduling costs little, enough to balance load.
    size = batch_size or max(1, min(25, math.ceil(len(todo) / (16 * workers)) if todo else 1))
    batches = list(_batches(todo, size))
    show = stderr.isatty() if progress is None else progress
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
            width = os.get_terminal_size(stderr.fileno()).columns
        except (OSError, ValueError):
            width = 0
        bar = tqdm(total=len(points), initial=len(results.done), unit="point", file=stderr,
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
        if dask and batches:
            _run_dask(batches, dask, workers, record, client)
        elif workers == 1 or len(batches) <= 1:
            for batch in batches:
                record(run_batch(batch))
        else:
            _run_processes(batches, workers, record, results.inherited_fds)
    finally:
        if bar is not None:
            bar.close()
    results.finish()
    return {"points": len(points), "computed": len(todo), "no_liquid": counts["no-liquid"],
            "failed": counts["failed"], "path": str(results.path)}


def progress_note(counts):
    """What the progress bar shows beside the count: no liquid apart from failures."""
    return f"no liquid {counts['no-liquid']}, failed {counts['failed']}"


def _worker_start(parent, inherited=()):
    """Initializer of a local worker process.

    The worker ignores Ctrl-C (the terminal sends it to every process of the group; the parent
    stops the workers), closes the parent's lock on the results file, and exits as soon as its
    parent is gone, even by SIGKILL: on Linux by PR_SET_PDEATHSIG, everywhere by a thread that
    watches the parent's process id.
    """
    import signal
    import sys
    import threading
    import time

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    for fd in inherited:
        try:
            os.close(fd)
        except OSError:
            pass
    if sys.platform == "linux":
        try:
            import ctypes

            ctypes.CDLL(None, use_errno=True).prctl(1, int(signal.SIGKILL), 0, 0, 0)  # PR_SET_PDEATHSIG
        except (OSError, AttributeError):
            pass
    if os.getppid() != parent:  # the parent died before the request took hold
        os._exit(1)

    def watch():
        while os.getppid() == parent:
            time.sleep(0.2)
        os._exit(1)

    threading.Thread(target=watch, name="lhsim-parent-watch", daemon=True).start()


def _run_processes(batches, workers, record, inherited=()):
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor, as_completed

    method = "fork" if "fork" in multiprocessing.get_all_start_methods() else "spawn"
    pool = ProcessPoolExecutor(max_workers=workers, mp_context=multiprocessing.get_context(method),
                               initializer=_worker_start,
                               initargs=(os.getpid(), tuple(inherited) if method == "fork" else ()))
    futures = []
    try:
        futures = [pool.submit(run_batch, batch) for batch in batches]
        for future in as_completed(futures):
            record(future.result())
    except BaseException:
        # Interrupted, or a batch could not be written: stop the workers now (a batch they are
        # solving is not in the file and is computed again on the next run), and wait for them.
        for future in futures:
            future.cancel()
        processes = list((getattr(pool, "_processes", None) or {}).values())
        for process in processes:
            process.terminate()
        pool.shutdown(wait=False, cancel_futures=True)
        for process in processes:
            process.join(timeout=10)
        raise
    pool.shutdown()


def _dask_client(address, timeout):
    """A Client of the scheduler at ``address``, or a one-line ScenarioError within ``timeout`` s."""
    import logging

    from distributed import Client

    quiet = logging.getLogger("distributed")
    level = quiet.level
    quiet.setLevel(logging.CRITICAL)
    try:
        _ask_scheduler(address, timeout)  # Client waits without end on a port that never answers
        return Client(address, timeout=timeout)
    except (ValueError, TypeError) as err:
        reason = (str(err).strip().splitlines() or [type(err).__name__])[0]
        raise ScenarioError(f"--dask must be local or a scheduler address such as tcp://127.0.0.1:8786 "
                            f"(tls:// needs distributed's TLS certificates configured), got {address!r}: "
                            f"{reason}") from None
    except Exception as err:  # OSError, TimeoutError and what a failed handshake raises
        reason = (str(err).strip().splitlines() or [type(err).__name__])[0]
        raise ScenarioError(f"--dask {address}: no Dask scheduler answered within {timeout:g} s "
                            f"(--dask-timeout): {reason}") from None
    finally:
        quiet.setLevel(level)


def _ask_scheduler(address, timeout):
    """Connect to ``address`` and ask the scheduler who it is, all within ``timeout`` seconds."""
    import asyncio

    from distributed.comm import connect
    from distributed.security import Security

    async def ask():
        comm = await connect(address, timeout=timeout, **Security().get_connection_args("client"))
        try:
            await comm.write({"op": "identity", "reply": True})
            await comm.read()
        finally:
            comm.abort()

    try:
        asyncio.run(asyncio.wait_for(ask(), timeout))
    except asyncio.TimeoutError:
        raise OSError("the port takes connections, but nothing there answers as a Dask scheduler") from None


def _run_dask(batches, address, workers, record, client=None):
    from distributed import Client, LocalCluster, as_completed

    cluster = None
    own = client is None
    if address == "local":
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                               dashboard_address=None, silence_logs=40)
        client = Client(cluster)
    elif client is None:
        client = _dask_client(address, DASK_TIMEOUT)
    try:
        futures = client.map(run_batch, batches, pure=False)
        for future in as_completed(futures):
            record(future.result())
    finally:
        if own:
            client.close()
        if cluster is not None:
            cluster.close()
