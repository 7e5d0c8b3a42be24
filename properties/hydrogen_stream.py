"""Hydrogen streams of a frozen or of an equilibrium para fraction, as fluids a flowsheet uses.

A hydrogen stream away from any catalyst keeps its para fraction (self-conversion takes days):
:class:`FrozenHydrogen` is hydrogen of one fixed para fraction.  A stream flowing through a
catalyst-filled passage stays at the equilibrium para fraction of its local temperature:
:class:`EquilibriumHydrogen`.  Both give the calls the flowsheet makes of a
:class:`properties.Fluid` (``state_tp``, ``state_ph``, ``state_ps``, saturation states,
``temperatures_ph`` for an exchanger march), with the states of
:class:`properties.orthopara.OrthoParaHydrogen`: CoolProp's parahydrogen and orthohydrogen
equations of state mixed ideally on one reference.

Saturation (the model's own approximation).  The two modifications boil 0.11 K apart at 1 atm;
their mixture's bubble and dew points lie between.  A saturated liquid (vapour) of a given
para fraction is taken as the ideal mixture of the two modifications' own saturated liquids
(vapours) at the pressure: enthalpy, entropy and volume weighted by mass, the ideal entropy of
mixing added, the temperature the latent heat over the entropy of vaporisation (a mean of the
two saturation temperatures weighted by latent heat, as Raoult's law gives to first order in
their difference; so that a phase change at one para fraction is reversible in the model).  Between that state and the
nearest temperature at which both modifications are in one phase (1e-5 of the saturation
temperature beyond the farther one) the temperature, entropy and volume are interpolated
linearly in enthalpy.  A state between the saturated liquid and vapour is their homogeneous
mixture.  The band so bridged is under 0.15 K wide and holds under 1 kJ/kg.
"""

import math
import numbers

import numpy as np
import CoolProp
from CoolProp import CoolProp as CP
from scipy.optimize import brentq

from properties.errors import PropertyRangeError
from properties.fluid import get_fluid
from properties.orthopara import (NORMAL_PARA_FRACTION, PARTITION_T_MAX, OrthoParaState, equilibrium_para_fraction,
                                  get_ortho_para_hydrogen, rotational_functions)

# Newton's method on the temperature of a (p, h) state: relative step at which it stops, and
# the most steps before the bracketing solve takes over.
NEWTON_RTOL = 1e-11
NEWTON_STEPS = 30
# Brent's tolerance on the temperature of a state found on a branch [K].
BRANCH_XTOL = 1e-9
# How far beyond a saturation temperature (relative) both modifications are taken to be in one
# phase (CoolProp gives no one-phase state on the line itself).
SATURATION_MARGIN = 1e-5

_LIQUID_PHASES = (CP.iphase_liquid, CP.iphase_supercritical_liquid)
_VAPOUR_PHASES = (CP.iphase_gas, CP.iphase_supercritical_gas)


def _is_number(x):
    return isinstance(x, numbers.Real) and not isinstance(x, bool)


def equilibrium_fraction_and_slope(T):
    """(x_eq(T) [-], dx_eq/dT [1/K]) from one evaluation of the rotational partition functions.

    With r = z_ortho / z_para, d ln z / dT = U / T^2 (U the mean rotational energy over k), so
    dy/dT = -y (1 - y) (U_ortho - U_para) / T^2 for the para mole fraction y; the mass fraction
    follows (the molar masses differ by 3e-5).
    """
    _, _, Up, Uo = rotational_functions(T)
    x = equilibrium_para_fraction(T)
    model = get_ortho_para_hydrogen()
    Mp, Mo = model.para_molar_mass, model.ortho_molar_mass
    y = x / Mp / (x / Mp + (1.0 - x) / Mo)
    dy = -y * (1.0 - y) * (Uo - Up) / (T * T)
    dx_dy = Mp * Mo / (y * Mp + (1.0 - y) * Mo) ** 2
    return x, dx_dy * dy


class _MixedHydrogen:
    """What frozen and equilibrium hydrogen share; ``fraction(T)`` is the para fraction."""

    name = "hydrogen"

    def __init__(self):
        self.model = get_ortho_para_hydrogen()
        self._para = get_fluid("ParaHydrogen")
        self._ortho = get_fluid("OrthoHydrogen")
        self._fast = {"para": CoolProp.AbstractState("HEOS", "ParaHydrogen"),
                      "ortho": CoolProp.AbstractState("HEOS", "OrthoHydrogen")}
        parts = (self._para, self._ortho)
        # Saturation exists below both critical pressures (the lower bounds it).
        self.p_critical = min(f.p_critical for f in parts)
        self.T_critical = min(f.T_critical for f in parts)
        self.p_triple = max(f.p_triple for f in parts)
        self.T_triple = max(f.T_triple for f in parts)
        self.p_max = min(f.p_max for f in parts)
        self.T_min = max(f.T_min for f in parts)
        self.T_max = min(PARTITION_T_MAX, min(f.T_max for f in parts))
        self._sat_cache = {}

    # -- the para fraction ------------------------------------------------------------

    def fraction(self, T):
        """Para fraction [-] of the stream at temperature ``T`` [K]."""
        raise NotImplementedError

    def fraction_slope(self, T):
        """(para fraction [-], its derivative in temperature [1/K]) at ``T`` [K]."""
        raise NotImplementedError

    def _saturation_fraction(self, temperature):
        """Para fraction of a saturated state; ``temperature(x)`` is its saturation temperature [K]."""
        raise NotImplementedError

    # -- one-phase states -------------------------------------------------------------

    def melting_temperature(self, p):
        """Melting temperature [K] at ``p`` [Pa]: the higher of the two modifications' (None
        where neither has one there)."""
        found = [T for T in (self._para.melting_temperature(p), self._ortho.melting_temperature(p)) if T is not None]
        return max(found) if found else None

    def max_inversion_temperature(self):
        """Maximum Joule-Thomson inversion temperature [K], that of normal hydrogen's equation of
        state (the para fraction moves it by far less than the checks it serves need)."""
        return get_fluid("Hydrogen").max_inversion_temperature()

    def state_tp(self, T, p):
        """One-phase state at ``T`` [K] and ``p`` [Pa] (an :class:`~properties.orthopara.OrthoParaState`)."""
        if not _is_number(T) or not math.isfinite(T) or not 0.0 < T <= PARTITION_T_MAX:
            raise PropertyRangeError(f"hydrogen: no state at T = {T!r} K: the temperature must be above 0 and at "
                                     f"most {PARTITION_T_MAX:g} K")
        return self.model.state_tp(T, p, self.fraction(T))

    def _fast_h(self, T, p):
        """(h [J/kg], dh/dT along the stream [J/(kg K)], True where both modifications are in
        one phase) at ``T``, ``p``, by two direct CoolProp updates."""
        x, dx = self.fraction_slope(T)
        h = cp = 0.0
        phases = []
        try:
            for share, key, offset in ((x, "para", 0.0), (1.0 - x, "ortho", self.model.ortho_enthalpy_offset)):
                if share <= 0.0 and dx == 0.0:
                    continue
                st = self._fast[key]
                st.update(CP.PT_INPUTS, p, T)
                hk = st.hmass() + offset
                h += share * hk
                cp += share * st.cpmass()
                cp += dx * hk if key == "para" else -dx * hk
                phases.append(st.phase())
        except ValueError:
            return math.nan, math.nan, False
        mixed = any(ph in _LIQUID_PHASES for ph in phases) and any(ph in _VAPOUR_PHASES for ph in phases)
        return h, cp, not mixed and all(ph != CP.iphase_twophase for ph in phases)

    def _newton_T(self, p, h, T):
        """Temperature of the one-phase state (p, h) by Newton's method from ``T``, or None."""
        for _ in range(NEWTON_STEPS):
            hT, cp, ok = self._fast_h(T, p)
            if not (ok and math.isfinite(hT) and cp > 0):
                return None
            step = (h - hT) / cp
            T_new = min(max(T + step, 0.5 * T), 2.0 * T)
            if abs(T_new - T) <= NEWTON_RTOL * T:
                return T_new
            T = T_new
        return None

    def _limits(self, p):
        """Coldest and warmest temperature [K] of a one-phase state at ``p``: above both
        modifications' lowest temperature and melting line."""
        T_low = max(max(f.T_min, f.melting_temperature(p) or 0.0) for f in (self._para, self._ortho))
        return T_low * (1.0 + 1e-9), self.T_max

    def _branches(self, p):
        """The one-phase temperature branches at ``p``: [(T_a, T_b, name)], and the saturated
        liquid and vapour (None above the critical pressure)."""
        T_low, T_high = self._limits(p)
        if not self.p_triple < p < self.p_critical:
            return [(T_low, T_high, "one")], None, None
        T_sat = (self._para.saturation_temperature(p), self._ortho.saturation_temperature(p))
        liquid, vapour = self.saturated_liquid(p), self.saturated_vapour(p)
        return [(T_low, min(T_sat) * (1.0 - SATURATION_MARGIN), "liquid"),
                (max(T_sat) * (1.0 + SATURATION_MARGIN), T_high, "vapour")], liquid, vapour

    def _solve(self, p, value, prop):
        """The state at ``p`` with enthalpy (``prop`` "h") or entropy ("s") ``value``: on a
        one-phase branch by Brent's method, in a bridged band or in the two-phase region as the
        module docstring says."""
        what = "enthalpy" if prop == "h" else "entropy"
        if not (_is_number(p) and math.isfinite(p) and p > 0) or not (_is_number(value) and math.isfinite(value)):
            raise PropertyRangeError(f"hydrogen: no state at p = {p!r} Pa, {what} {value!r}: p must be above 0 and "
                                     f"the {what} a finite number")
        if p > self.p_max:
            raise PropertyRangeError(f"hydrogen: no state at p = {p / 1e5:.6g} bar: above the "
                                     f"{self.p_max / 1e5:g} bar limit of the equations of state")
        branches, liquid, vapour = self._branches(p)
        ends = []
        for a, b, kind in branches:
            try:
                sa, sb = self.state_tp(a, p), self.state_tp(b, p)
            except PropertyRangeError:
                ends.append(None)
                continue
            ends.append((sa, sb))
            if getattr(sa, prop) <= value <= getattr(sb, prop):
                T = brentq(lambda t: getattr(self.state_tp(t, p), prop) - value, a, b, xtol=BRANCH_XTOL, rtol=1e-15)
                return self.state_tp(T, p)
        if liquid is not None and None not in ends:
            (_, liquid_end), (vapour_start, _) = ends
            points = (liquid_end, liquid, vapour, vapour_start)
            for lo, hi in zip(points, points[1:]):
                a, b = getattr(lo, prop), getattr(hi, prop)
                if a <= value <= b:
                    return self._between(lo, hi, (value - a) / (b - a) if b > a else 0.0, two_phase=lo is liquid)
        raise PropertyRangeError(f"hydrogen: no state at p = {p / 1e5:.6g} bar, {what} {value:.6g} (SI): outside "
                                 f"the equations of state of para- and orthohydrogen")

    @staticmethod
    def _between(a, b, w, two_phase):
        """The state a fraction ``w`` of the way from ``a`` to ``b`` (linear in h, s and volume;
        for the two-phase region w is the vapour fraction)."""
        v = (1.0 - w) / a.density + w / b.density
        T = a.T + w * (b.T - a.T)
        x = a.para_fraction + w * (b.para_fraction - a.para_fraction)
        if two_phase:
            phase = "saturated liquid" if w == 0.0 else "saturated vapour" if w == 1.0 else "two-phase"
            quality = float(w)
        else:
            phase, quality = (a.phase if a.quality is None else b.phase), None
        return OrthoParaState(T, a.p, a.h + w * (b.h - a.h), a.s + w * (b.s - a.s), 1.0 / v, x, phase, quality)

    def state_ph(self, p, h, guess=None):
        """State at ``p`` [Pa] and ``h`` [J/kg]: one-phase, bridged band or two-phase
        (``guess`` is accepted for the interface of :meth:`properties.Fluid.state_ph`)."""
        return self._solve(p, h, "h")

    def state_ps(self, p, s, guess=None):
        """State at ``p`` [Pa] and ``s`` [J/(kg K)]: one-phase, bridged band or two-phase
        (``guess`` is accepted for the interface of :meth:`properties.Fluid.state_ps`; the
        solve starts from its own)."""
        return self._solve(p, s, "s")

    def states_ph(self, pressures, enthalpies):
        """Many (p, h) states (a list of :meth:`state_ph`; for drawing paths)."""
        h = np.atleast_1d(np.asarray(enthalpies, dtype=float))
        p = np.broadcast_to(np.asarray(pressures, dtype=float), h.shape)
        return [self.state_ph(float(pk), float(hk)) for pk, hk in zip(p, h)]

    def temperatures_ph(self, pressures, enthalpies, first=None):
        """Temperatures [K] of many (p, h) states along one stream, each by Newton's method from
        the one before (the first from :meth:`state_ph`, or from ``first``, (T [K], density)
        near it); a state Newton cannot settle (near saturation) is solved by :meth:`state_ph`."""
        h = np.atleast_1d(np.asarray(enthalpies, dtype=float))
        p = np.broadcast_to(np.asarray(pressures, dtype=float), h.shape)
        out = np.empty(h.shape)
        T = None if first is None else float(first[0])
        for k in range(h.size):
            found = self._newton_T(float(p[k]), float(h[k]), T) if T is not None else None
            if found is None:
                found = self.state_ph(float(p[k]), float(h[k])).T
            out[k] = T = found
        return out

    # -- saturation -------------------------------------------------------------------

    def _saturated(self, p, quality):
        kind = "saturated liquid" if quality == 0 else "saturated vapour"
        if not (_is_number(p) and self.p_triple <= p < self.p_critical):
            raise PropertyRangeError(
                f"hydrogen: no {kind} at p = {p!r} Pa: saturation is modelled from the triple-point pressure "
                f"{self.p_triple / 1e5:.4g} bar up to below the critical pressure {self.p_critical / 1e5:.5g} bar "
                f"(the lower of para- and orthohydrogen's)")
        key = (p, quality)
        found = self._sat_cache.get(key)
        if found is None:
            m = self.model
            para = (self._para.saturated_liquid(p), self._para.saturated_vapour(p))
            ortho = (self._ortho.saturated_liquid(p), self._ortho.saturated_vapour(p))
            L_p, L_o = para[1].h - para[0].h, ortho[1].h - ortho[0].h

            def temperature(x):  # latent heat over entropy of vaporisation: consistent with h and s
                return (x * L_p + (1.0 - x) * L_o) / (x * L_p / para[0].T + (1.0 - x) * L_o / ortho[0].T)

            x = self._saturation_fraction(temperature)
            k = 0 if quality == 0 else 1
            a, b = para[k], ortho[k]
            h = x * a.h + (1.0 - x) * (b.h + m.ortho_enthalpy_offset)
            s = x * a.s + (1.0 - x) * (b.s + m.ortho_entropy_offset) + m.mixing_entropy(x)
            v = x / a.density + (1.0 - x) / b.density
            found = OrthoParaState(temperature(x), float(p), h, s, 1.0 / v, x, kind, float(quality))
            if len(self._sat_cache) > 1024:
                self._sat_cache.clear()
            self._sat_cache[key] = found
        return found

    def saturated_liquid(self, p):
        """Saturated liquid at ``p`` [Pa] (module docstring: the ideal mixture of the two
        modifications' own saturated liquids)."""
        return self._saturated(p, 0.0)

    def saturated_vapour(self, p):
        """Saturated vapour at ``p`` [Pa] (as :meth:`saturated_liquid`)."""
        return self._saturated(p, 1.0)

    def saturation_temperature(self, p):
        """Saturation temperature [K] at ``p`` [Pa] (module docstring)."""
        return self.saturated_liquid(p).T


class FrozenHydrogen(_MixedHydrogen):
    """Hydrogen of one fixed para fraction (no catalyst: the composition is frozen).

    Parameters
    ----------
    para_fraction : float
        Mass fraction of parahydrogen [-], 0 to 1 (0.25 is normal hydrogen).
    """

    def __init__(self, para_fraction):
        super().__init__()
        self.model.check_fraction(para_fraction, "a frozen hydrogen stream")
        self.para_fraction = float(para_fraction)

    def __repr__(self):
        return f"FrozenHydrogen({self.para_fraction!r})"

    def fraction(self, T):
        return self.para_fraction

    def fraction_slope(self, T):
        return self.para_fraction, 0.0

    def _saturation_fraction(self, temperature):
        return self.para_fraction


class EquilibriumHydrogen(_MixedHydrogen):
    """Hydrogen kept at the equilibrium para fraction of its temperature (a stream on a
    catalyst: it converts as it cools, and the conversion heat is part of its enthalpy)."""

    def __repr__(self):
        return "EquilibriumHydrogen()"

    def fraction(self, T):
        return equilibrium_para_fraction(T)

    def fraction_slope(self, T):
        return equilibrium_fraction_and_slope(T)

    def _saturation_fraction(self, temperature):
        x = equilibrium_para_fraction(temperature(1.0))
        for _ in range(3):  # the saturation temperature depends (a little) on the fraction
            x = equilibrium_para_fraction(temperature(x))
        return x


_FROZEN = {}


def frozen_hydrogen(para_fraction):
    """The process-wide :class:`FrozenHydrogen` of ``para_fraction`` (kept while few are asked for)."""
    key = float(para_fraction)
    found = _FROZEN.get(key)
    if found is None:
        if len(_FROZEN) > 64:
            _FROZEN.clear()
        found = _FROZEN[key] = FrozenHydrogen(key)
    return found


def normal_hydrogen():
    """Frozen hydrogen of the normal para fraction 0.25."""
    return frozen_hydrogen(NORMAL_PARA_FRACTION)
