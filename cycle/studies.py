"""Studies beyond one design point: the best value of a key for a goal, and gases side by side."""

import math

from cycle.errors import NoLiquefactionError, ScenarioError
from cycle.scenario import key_kind, parse_scenario
from cycle.sweep import dimension_of, display, run_point, set_key, split_sweep, to_si
from cycle.units import UnitError

GOALS = {
    # goal -> (summary key, sign: +1 minimise, -1 maximise)
    "max-yield": ("liquid_yield", -1.0),
    "min-work-per-liquid": ("work_kJ_per_kg_liquid", 1.0),
    "max-figure-of-merit": ("figure_of_merit", -1.0),
}
# Objective value where a trial point makes no liquid: worse than any real point.
_PENALTY = 1e12


# An optimum within this fraction of the search range from a bound is "on the bound".
BOUND_BAND = 1e-3


def _bounds(base, vary):
    """[(key, low [SI], high [SI], dimension)] of the ``vary`` list, each bound checked."""
    out = []
    for key, low, high in vary:
        kind = key_kind(key, where="--vary ")
        if kind in ("gas", "text"):
            raise ScenarioError(f"--vary {key}: only numeric keys can be optimised; use lhsim compare for gases")
        try:
            lo, dim_lo = to_si(key, low, where="--vary "), dimension_of(key, low, where="--vary ")
            hi, dim_hi = to_si(key, high, where="--vary "), dimension_of(key, high, where="--vary ")
        except UnitError as err:
            raise ScenarioError(f"--between for {key}: {err}") from None
        if dim_lo != dim_hi:
            raise ScenarioError(f"--between for {key}: give both bounds as a {dim_lo.replace('_', ' ')} or both as a "
                                f"{dim_hi.replace('_', ' ')}, got {low!r} and {high!r}")
        if not lo < hi:
            raise ScenarioError(f"--between for {key} must give LOW below HIGH, got {low!r} and {high!r}")
        for value in (lo, hi):
            try:
                parse_scenario(set_key(base, key, _scenario_value(value, kind, dim_lo)))
            except ScenarioError as err:
                raise ScenarioError(f"--between for {key}: {display(key, value, dim_lo)} gives an invalid "
                                    f"scenario: {err}") from None
        out.append((key, lo, hi, dim_lo))
    return out


def _scenario_value(value, kind, dimension):
    """An SI number as a scenario value: bare, unless the key takes several kinds of quantity
    (a bare number is then the first kind), when it carries its SI unit."""
    if isinstance(kind, tuple) and dimension != kind[0]:
        from cycle.units import DIMENSIONS, REFERENCE_CONDITIONS, gas_volume_text

        if dimension in REFERENCE_CONDITIONS:
            return gas_volume_text(value, dimension)
        return f"{value!r} {DIMENSIONS[dimension][1]}"
    return value


class _Progress:
    """Evaluations of a search, on standard error: a count, the rate and the best value so far."""

    def __init__(self, show, label, target):
        import sys

        self.bar = None
        self.target = target
        if sys.stderr.isatty() if show is None else show:
            import os

            from tqdm import tqdm

            try:
                width = os.get_terminal_size(sys.stderr.fileno()).columns
            except OSError:
                width = 0
            self.bar = tqdm(total=None, unit=" evaluations", desc=label, file=sys.stderr,
                            ncols=width if width >= 40 else 100)

    def step(self, best):
        if self.bar is not None:
            self.bar.update(1)
            if best is not None:
                self.bar.set_postfix_str(f"best {self.target} {best:.6g}")

    def close(self):
        if self.bar is not None:
            self.bar.close()


def optimize(data, vary, goal, xrtol=1e-6, maxiter=200, progress=None, label="optimize"):
    """The values of ``vary`` keys, within bounds, that best meet ``goal``.

    Parameters
    ----------
    data : dict
        Scenario mapping as read from YAML (a sweep section is ignored).
    vary : list of (str, str or float, str or float)
        Dotted scenario key and its lower and upper bound (strings with units, or SI numbers).
    goal : str
        ``max-yield``, ``min-work-per-liquid`` or ``max-figure-of-merit``.
    xrtol : float
        Tolerance on each key, relative to its range.
    maxiter : int
    progress : bool, optional
        Show the evaluations on standard error (count, rate, best value so far); default when
        standard error is a terminal.
    label : str
        What the progress line is called.

    Returns
    -------
    dict
        ``vary`` (key -> optimum in SI), ``goal``, ``summary`` at the optimum, ``evaluations``,
        ``converged``, ``message``, ``on_bound`` (key -> ``"lower"`` or ``"upper"`` for each key
        whose optimum lies on a bound of the search; empty otherwise) and ``notes`` (one
        sentence per such key).

    Raises
    ------
    NoLiquefactionError
        No point of the search makes liquid; the message is the cycle's own reason at the last
        point the search settled on (for example the maximum inversion temperature).

    Notes
    -----
    One key: bounded Brent search (:func:`scipy.optimize.minimize_scalar`).  Several: Powell's
    method with bounds (:func:`scipy.optimize.minimize`) on each key scaled to [0, 1].  A trial
    point that makes no liquid scores worse than any that does.  An optimum within
    :data:`BOUND_BAND` of the range from a bound is compared with the bound itself, which is
    taken if it is at least as good; either way the key is reported ``on_bound``.
    """
    from scipy.optimize import minimize, minimize_scalar

    if goal not in GOALS:
        raise ScenarioError(f"--goal must be one of {', '.join(GOALS)}, got {goal!r}")
    base, _ = split_sweep(data)
    bounds = _bounds(base, vary)
    target, sign = GOALS[goal]
    calls = {"n": 0, "best": None}
    shown = _Progress(progress, label, target)

    def value_at(bound, u):
        key, lo, hi, _ = bound
        return lo + min(max(u, 0.0), 1.0) * (hi - lo)

    def mapping_at(unit_x):
        mapping = base
        for bound, u in zip(bounds, unit_x):
            mapping = set_key(mapping, bound[0], _scenario_value(value_at(bound, u), key_kind(bound[0]), bound[3]))
        return mapping

    def objective(unit_x):
        calls["n"] += 1
        status, _, summary = run_point(mapping_at(unit_x))
        score = sign * summary[target] if status == "ok" else _PENALTY
        if status == "ok" and (calls["best"] is None or score < sign * calls["best"]):
            calls["best"] = summary[target]
        shown.step(calls["best"])
        return score

    try:
        if len(bounds) == 1:
            found = minimize_scalar(lambda u: objective([u]), bounds=(0.0, 1.0), method="bounded",
                                    options={"xatol": xrtol, "maxiter": maxiter})
            best, converged, message = [float(found.x)], bool(found.success), str(found.message)
        else:
            found = minimize(objective, x0=[0.5] * len(bounds), method="Powell", bounds=[(0.0, 1.0)] * len(bounds),
                             options={"xtol": xrtol, "ftol": 1e-10, "maxiter": maxiter})
            best, converged, message = [float(u) for u in found.x], bool(found.success), str(found.message)
        score = objective(best)
        if score < _PENALTY:
            best, score = _settle_on_bounds(best, score, objective)
    finally:
        shown.close()
    if score >= _PENALTY:
        status, reason, _ = run_point(mapping_at(best))
        ranges = ", ".join(f"{key} from {display(key, lo, dim)} to {display(key, hi, dim)}"
                           for key, lo, hi, dim in bounds)
        if status == "no-liquid":
            raise NoLiquefactionError(f"{reason} (no point of the search made liquid: {ranges})")
        raise ScenarioError(f"no point of the search could be solved ({ranges}); at the last one: {reason}")
    status, text, summary = run_point(mapping_at(best))
    on_bound, notes = {}, []
    for (key, lo, hi, dim), u in zip(bounds, best):
        side = "lower" if u <= BOUND_BAND else "upper" if u >= 1.0 - BOUND_BAND else None
        if side is None:
            continue
        on_bound[key] = side
        edge = display(key, lo if side == "lower" else hi, dim)
        notes.append(f"{key} is on the {side} bound of the search ({edge}): the best value may lie "
                     f"{'below' if side == 'lower' else 'beyond'} it; widen --between to look further")
    return {
        "vary": {bound[0]: float(value_at(bound, u)) for bound, u in zip(bounds, best)},
        "goal": goal,
        "summary": summary,
        "evaluations": calls["n"],
        "converged": converged,
        "message": message,
        "on_bound": on_bound,
        "notes": notes,
    }


def _settle_on_bounds(best, score, objective):
    """Move each coordinate within BOUND_BAND of a bound onto it where that is no worse."""
    best = list(best)
    for k, u in enumerate(best):
        edge = 0.0 if u <= BOUND_BAND else 1.0 if u >= 1.0 - BOUND_BAND else None
        if edge is None or u == edge:
            continue
        trial = best[:k] + [edge] + best[k + 1:]
        trial_score = objective(trial)
        if trial_score <= score:
            best, score = trial, trial_score
    return best, score


def compare(data, gases, at_optimum=False, between=None, goal="max-figure-of-merit", progress=None):
    """The same plant with each gas, ranked by figure of merit.

    Parameters
    ----------
    data : dict
        Scenario mapping as read from YAML.
    gases : list of str
    at_optimum : bool
        Put each gas at its own best ``high_pressure`` for ``goal`` first.
    between : (str, str), optional
        Bounds of that search; default 10 bar to 300 bar (capped at each gas's equation of state).
    goal : str
    progress : bool, optional
        Show each gas's search on standard error (see :func:`optimize`).

    Returns
    -------
    list of dict
        One row per gas: ``rank``, ``gas``, ``status``, ``message`` (why a gas makes no liquid:
        the cycle's own reason), with ``at_optimum`` also ``high_pressure`` [Pa] at the optimum,
        ``on_bound`` (``"lower"``, ``"upper"`` or None) and ``note``, and the summary keys (None
        where the gas makes no liquid).
    """
    from cycle.results import summary_keys
    from properties.fluids import resolve_fluid_name

    base, _ = split_sweep(data)
    rows = []
    for gas in gases:
        try:
            resolve_fluid_name(gas)
        except ValueError as err:
            raise ScenarioError(f"--gases: {err}") from None
        mapping = set_key(base, "gas", gas)
        keys = summary_keys(parse_scenario(mapping))
        row = {"gas": gas}
        if at_optimum:
            low, high = between or ("10 bar", "300 bar")
            cap, capped = _cap_pressure(gas, high)
            try:
                found = optimize(mapping, [("high_pressure", low, cap)], goal, progress=progress,
                                 label=f"optimize {gas}")
            except NoLiquefactionError as err:
                row.update(status="no-liquid", message=str(err), high_pressure=None, on_bound=None, note="")
                row.update({k: None for k in keys})
            else:
                side = found["on_bound"].get("high_pressure")
                note = found["notes"][0] if found["notes"] else ""
                if side == "upper" and capped:
                    note = (f"high_pressure is on the upper bound of the search ({display('high_pressure', cap)}), "
                            f"the highest pressure {gas}'s equation of state covers")
                row.update(status="ok", message="", high_pressure=found["vary"]["high_pressure"], on_bound=side,
                           note=note)
                row.update({k: found["summary"].get(k) for k in keys})
        else:
            status, message, summary = run_point(mapping)
            row.update(status=status, message=message)
            row.update({k: summary.get(k) for k in keys})
        rows.append(row)

    def order(row):
        fom = row.get("figure_of_merit")
        return (row["status"] != "ok", -(fom if fom is not None else -math.inf))

    rows.sort(key=order)
    return [dict(rank=k, **row) for k, row in enumerate(rows, start=1)]


def _cap_pressure(gas, high):
    """The upper bound of a gas's pressure search [Pa], and whether its equation of state set it."""
    from properties import get_fluid

    p_max = 0.999 * get_fluid(gas).p_max
    try:
        asked = to_si("high_pressure", high, where="--between ")
    except UnitError as err:
        raise ScenarioError(f"--between for high_pressure: {err}") from None
    return (p_max, True) if p_max < asked else (asked, False)
