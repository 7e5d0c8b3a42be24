"""The physics of each unit operation as plain functions of states and numbers.

All quantities are SI and specific: per kg of the stream that passes (J/kg, J/(kg K)),
or, where flows of several streams meet, per kg of compressor flow.  Unit-operation
objects (:mod:`cycle.equipment`) hold parameters and call these functions.
"""

from dataclasses import dataclass
import math

import numpy as np


def ideal_work_of_liquefaction(fluid, T0, p):
    """Minimum work to liquefy gas taken at ``T0`` [K] and ``p`` [Pa] to saturated liquid at ``p``.

    ``W_ideal = T0 (s1 - sf) - (h1 - hf)`` [J/kg]: also the exergy of the liquid relative to
    the gas at ambient conditions.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.1
    and Table 3.1 (ideal work of liquefaction of common gases from 300 K and 1 atm).
    """
    gas = fluid.state_tp(T0, p)
    liquid = fluid.saturated_liquid(p)
    return T0 * (gas.s - liquid.s) - (gas.h - liquid.h)


def compress_isothermal(fluid, inlet, p_out, T_out, efficiency, T0):
    """Compression with heat rejection to the surroundings, rated by isothermal efficiency.

    The reversible work from the inlet state to the outlet state ``(T_out, p_out)`` with
    heat exchanged only with surroundings at ``T0`` is ``T0 (s_in - s_out) - (h_in - h_out)``;
    with ``T_out = T_in = T0`` this is the textbook isothermal compression work.  The shaft
    work is that divided by the isothermal efficiency.

    Parameters
    ----------
    fluid : properties.Fluid
    inlet : properties.State
        Suction state.
    p_out : float
        Discharge pressure [Pa].
    T_out : float
        Discharge temperature [K] (the aftercooler temperature).
    efficiency : float
        Isothermal efficiency, 0 < efficiency <= 1 [-].
    T0 : float
        Temperature of the surroundings that take the heat [K].

    Returns
    -------
    outlet : properties.State
    work : float
        Shaft work [J/kg of gas compressed].
    heat_rejected : float
        Heat rejected by the compressor [J/kg], ``work - (h_out - h_in)``.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.2
    (reversible work of an isothermal compressor, and the isothermal efficiency).
    """
    outlet = fluid.state_tp(T_out, p_out)
    reversible = T0 * (inlet.s - outlet.s) - (inlet.h - outlet.h)
    work = reversible / efficiency
    return outlet, work, work - (outlet.h - inlet.h)


def compress_isentropic(fluid, inlet, p_out, efficiency):
    """One adiabatic compression stage rated by isentropic efficiency.

    ``h_out = h_in + (h_s - h_in) / efficiency`` with ``h_s`` at ``(p_out, s_in)``.

    Returns
    -------
    outlet : properties.State
    work : float
        Shaft work [J/kg].
    """
    ideal = fluid.state_ps(p_out, inlet.s)
    h_out = inlet.h + (ideal.h - inlet.h) / efficiency
    outlet = fluid.state_ph(p_out, h_out)
    return outlet, h_out - inlet.h


def stage_pressures(p_in, p_out, stages, pressure_drop=0.0):
    """Discharge pressure of each stage for equal pressure ratios [Pa] (common practice).

    Each intercooler between stages loses ``pressure_drop`` [Pa], so stage k + 1 draws at
    stage k's discharge less the drop; the common ratio r solves
    ``p_n = p_out`` with ``p_k = r (p_(k-1) - drop)`` and ``p_0 = p_in + drop``.
    """
    if pressure_drop == 0.0 or stages == 1:
        ratio = (p_out / p_in) ** (1.0 / stages)
        pressures = [p_in * ratio ** (k + 1) for k in range(stages)]
    else:
        from scipy.optimize import brentq

        def chain(r):
            p, out = p_in, []
            for _ in range(stages):
                p = r * p
                out.append(p)
                p -= pressure_drop
            return out

        hi = 2.0 * (p_out / p_in)
        while chain(hi)[-1] < p_out:
            hi *= 2.0
        ratio = brentq(lambda r: chain(r)[-1] - p_out, 1.0, hi, xtol=1e-14, rtol=1e-14)
        pressures = chain(ratio)
    pressures[-1] = p_out
    return pressures


def cool(fluid, inlet, T_out, pressure_drop=0.0):
    """Cool a stream to ``T_out`` [K] with a pressure drop [Pa]; return (outlet, duty [J/kg])."""
    outlet = fluid.state_tp(T_out, inlet.p - pressure_drop)
    return outlet, inlet.h - outlet.h


def chiller_work(fluid, inlet, outlet, T0):
    """Least work a cooler needs to take a stream from ``inlet`` to ``outlet`` when the only
    heat sink is the surroundings at ``T0`` [K]: the work of an ideal (Carnot) chiller [J/kg].

    Heat taken from the gas above ``T0`` goes to the surroundings for nothing.  Below ``T0`` it
    has to be pumped up to ``T0``: a Carnot refrigerator lifting ``dQ`` from the gas at ``T``
    needs ``dQ (T0 / T - 1)``, which summed from where the gas reaches ``T0`` to the outlet is
    the rise of the stream's exergy, ``(h_out - h_a) - T0 (s_out - s_a)``, with ``a`` the state
    at ``T0`` and the outlet pressure (the pressure drop is taken in the part above ambient), or
    the inlet if that is already below ``T0``.  A real chiller needs more: this is a lower bound.

    Parameters
    ----------
    fluid : properties.Fluid
    inlet, outlet : properties.State
        The stream entering and leaving the cooler.
    T0 : float
        Temperature of the surroundings [K].

    Returns
    -------
    float
        Work [J/kg of gas cooled], 0 where the surroundings take all the heat.

    Notes
    -----
    The same relation charges the rare cooler that has to warm the gas above ``T0`` (a cold
    compressor stage discharging below an intercooler temperature set above ambient): the
    surroundings warm the gas to ``T0`` for nothing, a Carnot heat pump the rest.  Either way
    the cooler destroys no negative exergy.

    References
    ----------
    R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.1
    (the least work of refrigeration and of liquefaction as an exergy difference,
    W = T0 (s1 - s2) - (h1 - h2)).
    """
    T_a, T_b = sorted((inlet.T, outlet.T))
    start = fluid.state_tp(T0, outlet.p) if T_a < T0 < T_b else inlet
    return max(0.0, (outlet.h - start.h) - T0 * (outlet.s - start.s))


def throttle(fluid, inlet, p_out):
    """Adiabatic expansion through a valve: enthalpy is kept (Joule-Thomson expansion)."""
    return fluid.state_ph(p_out, inlet.h)


def mix(fluid, p, flows_and_enthalpies, near=None):
    """Adiabatic mixing of streams at pressure ``p`` [Pa].

    Parameters
    ----------
    flows_and_enthalpies : sequence of (float, float)
        Mass flow (any consistent basis) and specific enthalpy [J/kg] of each stream.
    near : properties.State, optional
        A state close to the mixture (the largest inflow) that starts the solve.
    """
    total = sum(m for m, _ in flows_and_enthalpies)
    h = sum(m * h for m, h in flows_and_enthalpies) / total
    if near is not None and near.quality is None:
        return fluid.state_ph(p, h, guess=(near.T, near.density))
    return fluid.state_ph(p, h)


def separator_liquid_fraction(h_in, h_liquid, h_vapour, heat_in=0.0):
    """Fraction of a two-phase inflow drawn off as saturated liquid.

    Energy balance ``h_in + heat_in = x_l h_liquid + (1 - x_l) h_vapour``.

    Parameters
    ----------
    h_in : float
        Enthalpy of the inflow [J/kg].
    h_liquid, h_vapour : float
        Saturated liquid and vapour enthalpy at the separator pressure [J/kg].
    heat_in : float
        Heat leak into the separator per kg of inflow [J/kg].
    """
    return (h_vapour - h_in - heat_in) / (h_vapour - h_liquid)


@dataclass(frozen=True)
class ExchangerProfile:
    """Temperatures of a two-stream counterflow exchanger at its zone boundaries.

    Index 0 is the cold end (hot outlet, cold inlet); the last index is the warm end.

    Attributes
    ----------
    duty : numpy.ndarray
        Cumulative duty from the cold end [J/kg of compressor flow].
    hot_T, cold_T : numpy.ndarray
        Temperatures of the hot and cold streams [K].
    hot_p, cold_p : numpy.ndarray
        Pressures [Pa].
    """

    duty: np.ndarray
    hot_T: np.ndarray
    cold_T: np.ndarray
    hot_p: np.ndarray
    cold_p: np.ndarray
    rating: object = None  # cycle.tube_exchanger.RatedProfile of a recuperator given by its geometry

    @property
    def approach(self):
        """Hot minus cold temperature at each zone boundary [K]."""
        return self.hot_T - self.cold_T

    @property
    def min_approach(self):
        """Smallest temperature difference between the streams [K] (the pinch)."""
        return float(np.min(self.approach))

    @property
    def min_approach_index(self):
        return int(np.argmin(self.approach))

    def ua(self):
        """Conductance per unit compressor flow, sum of zone duty over zone LMTD [W/K per kg/s].

        Infinite where the streams touch or cross.
        """
        return _ua_per_flow(self.duty, self.approach)


def _zone_lmtd(approach):
    """Each zone's log-mean temperature difference [K] from the ``approach`` [K] (all positive) at
    the zone boundaries; the arithmetic mean where the two ends are equal (and no 0 / 0)."""
    a, b = approach[:-1], approach[1:]
    close = np.abs(a - b) <= 1e-9 * b
    return np.where(close, 0.5 * (a + b), (a - b) / np.where(close, 1.0, np.log(a / b)))


def _ua_per_flow(duty, approach):
    """Sum of zone duty over zone LMTD [W/K per kg/s] of a profile's cumulative ``duty`` [J/kg]
    and ``approach`` [K] at the zone boundaries; infinite where the streams touch or cross."""
    if np.any(approach <= 0):
        return math.inf
    return float(np.sum(np.diff(duty) / _zone_lmtd(approach)))


def _hot_side(fluid, hot_in, hot_p_out, hot_flow, duty, zones):
    """Zone boundaries of the high-pressure stream, cold end first: duty fraction, cumulative
    duty [J/kg], pressure [Pa] (falling in proportion to the duty) and temperature [K]."""
    frac = np.linspace(0.0, 1.0, zones + 1)
    q = duty * frac
    h_hot = (hot_in.h - duty / hot_flow) + q / hot_flow
    p_hot = hot_p_out + frac * (hot_in.p - hot_p_out)
    # Marched from the warm end, where the inlet state starts it.
    warm_first = fluid.temperatures_ph(p_hot[-2::-1], h_hot[-2::-1], first=(hot_in.T, hot_in.density))
    hot_T = np.append(warm_first[::-1], hot_in.T)
    return frac, q, p_hot, hot_T


def counterflow_profile(fluid, hot_in, hot_p_out, hot_flow, cold_in, cold_p_out, cold_flow, duty, zones,
                        cold_fluid=None):
    """March a counterflow exchanger in ``zones`` equal-duty zones.

    Pressure falls on each side in proportion to the duty passed (a modelling choice:
    pressure drop follows the heat transferred).

    Parameters
    ----------
    fluid : properties.Fluid
    hot_in : properties.State
        Hot stream at its inlet (the warm end).
    hot_p_out : float
        Hot stream outlet pressure [Pa].
    hot_flow, cold_flow : float
        Mass flows on a common basis (per kg of compressor flow) [-].
    cold_in : properties.State
        Cold stream at its inlet (the cold end).
    cold_p_out : float
        Cold stream outlet pressure [Pa].
    duty : float
        Heat passed from hot to cold [J per kg of compressor flow].
    zones : int
        Number of equal-duty zones.
    cold_fluid : properties.Fluid, optional
        The cold stream's fluid where it differs from the hot stream's (hydrogen of another
        para fraction); default ``fluid``.

    Returns
    -------
    ExchangerProfile
    """
    frac, q, p_hot, hot_T = _hot_side(fluid, hot_in, hot_p_out, hot_flow, duty, zones)
    h_cold = cold_in.h + q / cold_flow
    p_cold = cold_in.p + frac * (cold_p_out - cold_in.p)
    cold_T = np.insert((cold_fluid or fluid).temperatures_ph(p_cold[1:], h_cold[1:]), 0, cold_in.T)
    return ExchangerProfile(q, hot_T, cold_T, p_hot, p_cold)


def counterflow_estimator(fluid, hot_in, hot_p_out, hot_flow, cold_in, cold_p_out, cold_flow, duty, zones,
                          cold_fluid=None):
    """The pinch and UA of the exchanger of :func:`counterflow_profile` at other duties, estimated
    from its march at ``duty`` (remembered by the fluids: :meth:`properties.Fluid.remembering`)
    by the marched states' linear sensitivities, with no property call; the error is of second
    order in the change of duty.  What a root finder steps on between marches.

    Returns
    -------
    callable or None
        ``estimate(duty, cold_in, cold_p_out, cold_flow) -> (min approach [K], UA per unit
        flow [W/K per kg/s])``; None where either side's march is not remembered.
    """
    frac = np.linspace(0.0, 1.0, zones + 1)
    h_hot = (hot_in.h - duty / hot_flow) + duty * frac / hot_flow
    p_hot = hot_p_out + frac * (hot_in.p - hot_p_out)
    h_cold = cold_in.h + duty * frac / cold_flow
    p_cold = cold_in.p + frac * (cold_p_out - cold_in.p)
    hot_ref = getattr(fluid, "march_reference", lambda p, h: None)(p_hot[-2::-1], h_hot[-2::-1])
    cold = cold_fluid or fluid
    cold_ref = getattr(cold, "march_reference", lambda p, h: None)(p_cold[1:], h_cold[1:])
    if hot_ref is None or cold_ref is None:
        return None
    P, H, m = hot_ref
    Pc, Hc, mc = cold_ref
    # Both sides are linear in the duty: the hot side (cold end first) T = a + b Q, the cold
    # side T = c + e Q / cold_flow (+ the change of its inlet), so the approach at every zone
    # boundary is C0 + C1 Q + C2 Q / cold_flow.
    n = zones + 1
    C0, C1, C2 = np.zeros(n), np.zeros(n), np.zeros(n)
    C0[:-1] = (m.T + m.dT_dh * (hot_in.h - H) + m.dT_dp * (p_hot[-2::-1] - P))[::-1]
    C1[:-1] = (-m.dT_dh * (1.0 - frac[-2::-1]) / hot_flow)[::-1]
    C0[-1] = hot_in.T
    ref_in, ref_p_out = cold_in, cold_p_out
    C0_cold = C0.copy()
    C0_cold[0] -= cold_in.T
    C0_cold[1:] -= mc.T + mc.dT_dh * (cold_in.h - Hc) + mc.dT_dp * (p_cold[1:] - Pc)
    C2[1:] = -mc.dT_dh * frac[1:]
    step = 1.0 / zones

    def estimate(Q, cold_in, cold_p_out, cold_flow):
        if cold_in is ref_in and cold_p_out == ref_p_out:
            approach = C0_cold + C1 * Q + C2 * (Q / cold_flow)
        else:  # the cold inlet moved: its own change, linearly
            approach = C0 + C1 * Q + C2 * (Q / cold_flow)
            approach[0] -= cold_in.T
            approach[1:] -= (mc.T + mc.dT_dh * (cold_in.h - Hc)
                             + mc.dT_dp * (cold_in.p + frac[1:] * (cold_p_out - cold_in.p) - Pc))
        least = float(approach.min())
        if not least > 0:
            return least, math.inf
        return least, Q * step * float(np.sum(1.0 / _zone_lmtd(approach)))  # equal-duty zones

    return estimate


def _h_at(fluid, T, p, state_in):
    """Enthalpy at (T, p) [J/kg] of a stream warming from ``state_in``.

    At the inlet temperature it is the inlet's.  On the saturation line (a stream boiling at
    constant pressure) the temperature is taken just above it, so the enthalpy jumps to the
    saturated vapour's; inside a pseudo-pure fluid's two-phase band (air) the enthalpy is
    interpolated linearly in temperature between bubble and dew point.
    """
    if T <= state_in.T:
        return state_in.h
    try:
        return fluid.state_tp(T, p).h
    except ValueError:
        pass
    if p < fluid.p_critical:
        liquid, vapour = fluid.saturated_liquid(p), fluid.saturated_vapour(p)
        if liquid.T * (1 - 1e-5) <= T <= vapour.T * (1 + 1e-5):
            if vapour.T - liquid.T > 1e-6 * liquid.T:  # pseudo-pure band
                w = min(max((T - liquid.T) / (vapour.T - liquid.T), 0.0), 1.0)
                return max(state_in.h, liquid.h + w * (vapour.h - liquid.h))
            return vapour.h if T >= liquid.T else liquid.h
    return fluid.state_tp(T * (1 + 3e-6), p).h


def composite_profile(fluid, hot_in, hot_p_out, hot_flow, colds, duty, zones):
    """March a counterflow exchanger with one hot stream and several cold streams.

    The cold streams are lumped into one composite curve: each takes heat from its own inlet
    temperature up, and all leave at one common warm-end temperature (parallel passages in a
    multi-stream exchanger).  A cold stream's pressure falls linearly with its temperature
    between inlet and outlet; the hot stream's falls in proportion to the duty passed.

    Parameters
    ----------
    fluid : properties.Fluid
    hot_in : properties.State
        Hot stream at its inlet (the warm end).
    hot_p_out : float
        Hot stream outlet pressure [Pa].
    hot_flow : float
        Hot stream flow per kg of compressor flow [-].
    colds : sequence of (properties.State, float, float)
        Each cold stream's inlet state, outlet pressure [Pa] and flow [-].
    duty : float
        Heat passed [J per kg of compressor flow].
    zones : int
        Number of equal-duty zones.

    Returns
    -------
    ExchangerProfile
        ``cold_T`` is the composite temperature; ``cold_p`` the pressure of the first cold stream.

    References
    ----------
    B. Linnhoff et al., *A User Guide on Process Integration for the Efficient Use of Energy*,
    IChemE, 1982 (composite curves of several streams).
    """
    from scipy.optimize import brentq

    T_low = min(st.T for st, _, _ in colds)

    def absorbed(T, T_out):
        total = 0.0
        for st, p_out, flow in colds:
            if T <= st.T:
                continue
            span = T_out - st.T
            p = p_out if span <= 0 else st.p + (p_out - st.p) * min(1.0, (T - st.T) / span)
            total += flow * (_h_at(fluid, T, p, st) - st.h)
        return total

    def outlet_absorbed(T):
        return sum(flow * (_h_at(fluid, T, p_out, st) - st.h) for st, p_out, flow in colds)

    T_top = hot_in.T
    if outlet_absorbed(T_top) < duty:  # a temperature cross: the cold side must leave above the hot inlet
        T_top = hot_in.T * 1.5
    if duty <= 0:
        T_out = T_low
    else:
        T_out = brentq(lambda T: outlet_absorbed(T) - duty, T_low, T_top, xtol=1e-9, rtol=1e-13)

    _, q, p_hot, hot_T = _hot_side(fluid, hot_in, hot_p_out, hot_flow, duty, zones)
    cold_T = np.empty(zones + 1)
    cold_T[0], cold_T[-1] = T_low, T_out
    at_outlet = absorbed(T_out, T_out)
    for k in range(1, zones):
        if at_outlet < q[k]:  # the outlet lies on a boiling plateau and this boundary is on it
            cold_T[k] = T_out
            continue
        cold_T[k] = brentq(lambda T: absorbed(T, T_out) - q[k], T_low, T_out, xtol=1e-9, rtol=1e-13)
    first, p_first, _ = colds[0]
    span = max(T_out - first.T, 1e-12)
    cold_p = first.p + (p_first - first.p) * np.clip((cold_T - first.T) / span, 0.0, 1.0)
    return ExchangerProfile(q, hot_T, cold_T, p_hot, cold_p)


def carnot_cop(T_cold, T_hot):
    """Coefficient of performance of a Carnot refrigerator lifting heat from ``T_cold`` to
    ``T_hot`` [K]: T_cold / (T_hot - T_cold) [-]."""
    return T_cold / (T_hot - T_cold)


def refrigeration_exergy(duty, T_cold, T0):
    """Exergy of ``duty`` [J/kg] of refrigeration delivered at ``T_cold`` [K] with surroundings at
    ``T0`` [K]: duty (T0 / T_cold - 1), the least work that can provide it [J/kg]."""
    return duty * (T0 / T_cold - 1.0)
