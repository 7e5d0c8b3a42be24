"""Studies beyond one design point: the best value of a key for a goal, and gases side by side."""

import math

from cycle.errors import NoLiquefactionError, ScenarioError
from cycle.scenario import parse_scenario
from cycle.scenario import key_kind
from cycle.sweep import run_point, set_key, split_sweep, to_si
from cycle.units import UnitError

GOALS = {
    # goal -> (summary key, sign: +1 minimise, -1 maximise)
    "max-yield": ("liquid_yield", -1.0),
    "min-work-per-liquid": ("work_kJ_per_kg_liquid", 1.0),
    "max-figure-of-merit": ("figure_of_merit", -1.0),
}
# Objective value where a trial point makes no liquid: worse than any real point.
_PENALTY = 1e12


def _bounds(base, vary):
    out = []
    for key, low, high in vary:
        kind = key_kind(key)
        if kind in ("gas", "text"):
            raise ScenarioError(f"--vary {key}: only numeric keys can be optimised; use lhsim compare for gases")
        try:
            lo, hi = to_si(key, low), to_si(key, high)
        except UnitError as err:
            raise ScenarioError(f"--between for {key}: {err}") from None
        if not lo < hi:
            raise ScenarioError(f"--between for {key} must give LOW below HIGH, got {low!r} and {high!r}")
        for value in (lo, hi):
            try:
                parse_scenario(set_key(base, key, value))
            except ScenarioError as err:
                raise ScenarioError(f"--between for {key}: {value:g} (SI) gives an invalid scenario: {err}") from None
        out.append((key, lo, hi))
    return out


def optimize(data, vary, goal, xrtol=1e-6, maxiter=200):
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

    Returns
    -------
    dict
        ``vary`` (key -> optimum in SI), ``goal``, ``summary`` at the optimum, ``evaluations``,
        ``converged``, ``message``.

    Notes
    -----
    One key: bounded Brent search (:func:`scipy.optimize.minimize_scalar`).  Several: Powell's
    method with bounds (:func:`scipy.optimize.minimize`) on each key scaled to [0, 1].  A trial
    point that makes no liquid scores worse than any that does.
    """
    from scipy.optimize import minimize, minimize_scalar

    if goal not in GOALS:
        raise ScenarioError(f"--goal must be one of {', '.join(GOALS)}, got {goal!r}")
    base, _ = split_sweep(data)
    bounds = _bounds(base, vary)
    target, sign = GOALS[goal]
    calls = {"n": 0}

    def mapping_at(unit_x):
        mapping = base
        for (key, lo, hi), u in zip(bounds, unit_x):
            mapping = set_key(mapping, key, lo + min(max(u, 0.0), 1.0) * (hi - lo))
        return mapping

    def objective(unit_x):
        calls["n"] += 1
        status, _, summary = run_point(mapping_at(unit_x))
        if status != "ok":
            return _PENALTY
        return sign * summary[target]

    if len(bounds) == 1:
        found = minimize_scalar(lambda u: objective([u]), bounds=(0.0, 1.0), method="bounded",
                                options={"xatol": xrtol, "maxiter": maxiter})
        best, converged, message = [found.x], bool(found.success), str(found.message)
    else:
        found = minimize(objective, x0=[0.5] * len(bounds), method="Powell", bounds=[(0.0, 1.0)] * len(bounds),
                         options={"xtol": xrtol, "ftol": 1e-10, "maxiter": maxiter})
        best, converged, message = list(found.x), bool(found.success), str(found.message)
    if objective(best) >= _PENALTY:
        ranges = ", ".join(f"{key} from {lo:g} to {hi:g}" for key, lo, hi in bounds)
        raise NoLiquefactionError(f"no liquid anywhere the search went ({ranges}, SI units)")
    status, text, summary = run_point(mapping_at(best))
    return {
        "vary": {key: float(lo + min(max(u, 0.0), 1.0) * (hi - lo)) for (key, lo, hi), u in zip(bounds, best)},
        "goal": goal,
        "summary": summary,
        "evaluations": calls["n"],
        "converged": converged,
        "message": message,
    }


def compare(data, gases, at_optimum=False, between=None, goal="max-figure-of-merit"):
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

    Returns
    -------
    list of dict
        One row per gas: ``rank``, ``gas``, ``status``, ``message``, (``high_pressure`` [Pa] at
        the optimum), and the summary keys (None where the gas makes no liquid).
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
            try:
                found = optimize(mapping, [("high_pressure", low, _cap_pressure(gas, high))], goal)
                row.update(status="ok", message="", high_pressure=found["vary"]["high_pressure"])
                row.update({k: found["summary"].get(k) for k in keys})
            except NoLiquefactionError as err:
                row.update(status="no-liquid", message=str(err), high_pressure=None)
                row.update({k: None for k in keys})
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
    from properties import get_fluid

    p_max = get_fluid(gas).p_max
    return min(to_si("high_pressure", high), 0.999 * p_max)
