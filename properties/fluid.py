"""The fluid adapter: states, Joule-Thomson coefficient, inversion and saturation data.

Every state comes from CoolProp's low-level ``AbstractState`` with the HEOS backend (the
reference multiparameter equations of state).  One ``AbstractState`` is kept per fluid
per process (:func:`get_fluid`); states handed out are immutable :class:`State` objects.
"""

from dataclasses import replace
from functools import lru_cache
import math
import numbers

import numpy as np
from scipy.optimize import brentq
import CoolProp
from CoolProp import CoolProp as CP

from properties.errors import PropertyRangeError
from properties.fluids import resolve_fluid_name
from properties.state import State, two_phase_label

# Phase names in the trade's plain words (see docs/glossary.md, "phase"): "gas" above the
# critical temperature and below the critical pressure, "vapour" below the critical temperature.
_PHASES = {
    CP.iphase_liquid: "liquid",
    CP.iphase_gas: "vapour",
    CP.iphase_twophase: "two-phase",
    CP.iphase_supercritical: "supercritical fluid",
    CP.iphase_supercritical_gas: "gas",
    CP.iphase_supercritical_liquid: "compressed liquid",
    CP.iphase_critical_point: "critical point",
}

# A pressure this close (relative) to the critical pressure is "at" it: CoolProp's
# (p, h) flash has no solution there (see shared coolprop notes).
_CRITICAL_PRESSURE_BAND = 1e-9
# How far above the critical pressure (relative) such a flash is done instead [-].
CRITICAL_NUDGE = 1e-6
# States kept by Fluid.state_tp for a repeated (T, p).
_TP_CACHE = 4096


def _is_number(x):
    return isinstance(x, numbers.Real) and not isinstance(x, bool)


def _fmt_T(T):
    return f"{T:.6g} K"


def _fmt_p(p):
    return f"{p / 1e5:.6g} bar"


class Fluid:
    """One pure (or pseudo-pure) fluid and the property calls lhsim needs.

    Parameters
    ----------
    name : str
        Fluid name or alias, case-insensitive (see :func:`properties.resolve_fluid_name`).

    Notes
    -----
    Use :func:`get_fluid` rather than the constructor: it keeps one instance per fluid.
    """

    def __init__(self, name):
        self.name = resolve_fluid_name(name)
        self._state = CoolProp.AbstractState("HEOS", self.name)
        st = self._state
        self.molar_mass = st.molar_mass()  # kg/mol
        self.T_critical = st.T_critical()
        self.p_critical = st.p_critical()
        self.T_triple = st.Ttriple()
        self.p_triple = st.p_triple()
        self.T_min = st.Tmin()
        self.T_max = st.Tmax()
        self.p_max = st.pmax()
        self._has_melting_line = st.has_melting_line()
        self._max_inversion = None
        self._sat_cache = {}
        self._tp_cache = {}  # (T, p) -> State: a design point asks for the same few many times
        self._marcher = None

    def __repr__(self):
        return f"Fluid({self.name!r})"

    # -- range checks -----------------------------------------------------------------

    def _range_text(self):
        return (f"valid range for {self.name}: T from {_fmt_T(self.T_min)} (or the melting line) "
                f"to {_fmt_T(self.T_max)}, p above 0 up to {_fmt_p(self.p_max)}")

    def _fail(self, asked, reason):
        raise PropertyRangeError(f"{self.name}: no state at {asked}: {reason}; {self._range_text()}")

    def melting_temperature(self, p):
        """Melting temperature at pressure ``p`` [Pa] in K, or None where the fluid has no
        melting line in CoolProp or ``p`` is outside it.

        CoolProp's melting line for normal hydrogen lies below its own triple point (1.7 K at
        1 bar); for it the para-hydrogen line is used, shifted to start at normal hydrogen's
        triple point (the two differ by about 0.15 K).  No melting line is allowed below the
        triple-point temperature.
        """
        if not self._has_melting_line:
            return None
        try:
            T = self._state.melting_line(CP.iT, CP.iP, p)
        except ValueError:
            return None
        if T < self.T_triple and p >= self.p_triple:
            if self.name in ("Hydrogen", "OrthoHydrogen"):
                para = get_fluid("ParaHydrogen")
                T_para = para.melting_temperature(p)
                if T_para is not None:
                    return max(T_para + (self.T_triple - para.T_triple), self.T_triple)
            return self.T_triple
        return T

    def _check_p(self, p, asked):
        if not _is_number(p) or not math.isfinite(p) or p <= 0:
            self._fail(asked, "pressure must be a positive finite number")
        if p > self.p_max:
            self._fail(asked, f"pressure above the equation of state's limit {_fmt_p(self.p_max)}")

    def _check_T(self, T, p, asked):
        if not _is_number(T) or not math.isfinite(T) or T <= 0:
            self._fail(asked, "temperature must be a positive finite number")
        if T < self.T_min:
            self._fail(asked, f"temperature below the lowest the equation of state covers, {_fmt_T(self.T_min)}")
        if T > self.T_max:
            self._fail(asked, f"temperature above the highest the equation of state covers, {_fmt_T(self.T_max)}")
        Tm = self.melting_temperature(p)
        if Tm is not None and T < Tm:
            self._fail(asked, f"below the melting temperature {_fmt_T(Tm)} at that pressure (solid)")

    def _snapshot(self, p=None):
        """Freeze the current AbstractState; ``p`` replaces CoolProp's round-tripped pressure."""
        st = self._state
        q = st.Q()
        phase = _PHASES.get(st.phase(), "unknown")
        quality = float(q) if phase == "two-phase" and 0.0 <= q <= 1.0 else None
        if quality is not None:
            phase = two_phase_label(quality)
        return State(self.name, st.T(), float(p) if p is not None else st.p(), st.hmass(), st.smass(),
                     st.rhomass(), quality, phase)

    def _update(self, pair, a, b, asked):
        try:
            self._state.update(pair, float(a), float(b))
        except ValueError as err:
            self._reset_state()
            self._fail(asked, f"CoolProp could not solve it ({str(err).strip()})")

    def _reset_state(self):
        """A fresh AbstractState after a failed update: some failures leave the old one unusable
        (seen with air: a (p, s) flash just above its critical pressure makes every later update,
        a plain (p, T) included, fail with "p is not a valid number")."""
        self._state = CoolProp.AbstractState("HEOS", self.name)
        if self._marcher is not None:
            self._marcher.state = self._state

    def _check_result(self, asked):
        """A (p, h) or (p, s) flash may land outside the equation of state's temperatures."""
        T = self._state.T()
        if T > self.T_max * (1 + 1e-9):
            self._fail(asked, f"the state would be at {_fmt_T(T)}, above the highest temperature the "
                              f"equation of state covers, {_fmt_T(self.T_max)}")
        if T < self.T_min * (1 - 1e-9):
            self._fail(asked, f"the state would be at {_fmt_T(T)}, below the lowest temperature the "
                              f"equation of state covers, {_fmt_T(self.T_min)}")

    # -- states -----------------------------------------------------------------------

    def state_tp(self, T, p):
        """State at temperature ``T`` [K] and pressure ``p`` [Pa] (single phase).

        States are immutable; the last few thousand asked for are kept and given again."""
        key = (T, p)
        found = self._tp_cache.get(key)
        if found is not None:
            return found
        self._update_tp(T, p)
        found = self._snapshot(p)
        if len(self._tp_cache) >= _TP_CACHE:
            self._tp_cache.clear()
        self._tp_cache[key] = found
        return found

    def _update_tp(self, T, p):
        """The AbstractState updated to (T, p), after the range checks."""
        asked = f"T = {_fmt_T(T)}, p = {_fmt_p(p)}"
        self._check_p(p, asked)
        self._check_T(T, p, asked)
        self._update(CP.PT_INPUTS, p, T, asked)

    def _flash_pressure(self, p, asked):
        """The pressure a (p, h) or (p, s) flash is done at: ``p``, or, within 1e-9 of the critical
        pressure, where CoolProp's flash has no solution (see the CoolProp notes), the critical
        pressure raised by :data:`CRITICAL_NUDGE` (1 ppm: far below any pressure a plant knows).
        The state is still reported at ``p``."""
        self._check_p(p, asked)
        if abs(p / self.p_critical - 1.0) < _CRITICAL_PRESSURE_BAND:
            return self.p_critical * (1.0 + CRITICAL_NUDGE)
        return p

    def state_ph(self, p, h, guess=None):
        """State at pressure ``p`` [Pa] and specific enthalpy ``h`` [J/kg].

        ``guess`` is (T [K], density [kg/m3]) of a nearby state: the state is then solved by
        Newton's method from it (:meth:`properties.march.PhMarch.solve`, the HEOS answer to
        1e-6 K), with the flash as the fall-back."""
        if guess is not None and all(_is_number(g) and g > 0 for g in guess):
            return self._march.solve(p, h, (float(guess[0]), float(guess[1]) / self.molar_mass))
        asked = f"p = {_fmt_p(p)}, h = {h / 1e3:.6g} kJ/kg"
        self._update(CP.HmassP_INPUTS, h, self._flash_pressure(p, asked), asked)
        self._check_result(asked)
        return self._polished(self._snapshot(p), h=h, asked=asked)

    def state_ps(self, p, s, guess=None):
        """State at pressure ``p`` [Pa] and specific entropy ``s`` [J/(kg K)].

        ``guess`` is (T [K], density [kg/m3]) of a nearby state: a one-phase state is then
        solved by Newton's method from it (a density-temperature update a step, where the flash
        costs some fifty), and the flash is the fall-back."""
        if guess is not None:
            found = self._march.state_ps(p, s, (float(guess[0]), float(guess[1]) / self.molar_mass))
            if found is not None:
                return found
        asked = f"p = {_fmt_p(p)}, s = {s / 1e3:.6g} kJ/(kg K)"
        self._update(CP.PSmass_INPUTS, self._flash_pressure(p, asked), s, asked)
        self._check_result(asked)
        return self._polished(self._snapshot(p), s=s, asked=asked)

    def _polished(self, state, asked, h=None, s=None):
        """The flash's state carrying exactly the enthalpy (or entropy) asked for.

        CoolProp's flash meets its input to about 1e-8 (worse near the critical point), which
        shows in the plant's energy balance and as exergy losses a hair below zero.  The small
        miss is taken up at constant pressure, dh = T ds; a large one means the flash failed.
        """
        if h is not None:
            miss = h - state.h
            scale = abs(h) + 1e4
            polished = replace(state, h=float(h), s=state.s + miss / state.T)
        else:
            miss = (s - state.s) * state.T
            scale = abs(state.h) + 1e4
            polished = replace(state, s=float(s), h=state.h + miss)
        if abs(miss) > 1e-5 * scale:
            self._fail(asked, f"CoolProp's flash missed it by {abs(miss) / 1e3:.3g} kJ/kg (near the critical "
                              f"point its flash is unreliable); use a state slightly away from there")
        return polished

    def _saturated(self, p, quality):
        kind = "saturated liquid" if quality == 0 else "saturated vapour"
        asked = f"{kind}, p = {_fmt_p(p)}"
        self._check_p(p, asked)
        if p >= self.p_critical:
            self._fail(asked, f"no saturation at or above the critical pressure {_fmt_p(self.p_critical)}")
        if p < self.p_triple:
            self._fail(asked, f"no liquid below the triple-point pressure {_fmt_p(self.p_triple)}")
        key = (p, quality)
        cached = self._sat_cache.get(key)
        if cached is None:
            self._update(CP.PQ_INPUTS, p, quality, asked)
            cached = self._snapshot(p)
            if cached.quality is None:  # report saturation states as such
                cached = State(self.name, cached.T, cached.p, cached.h, cached.s, cached.density,
                               float(quality), two_phase_label(float(quality)))
            if len(self._sat_cache) > 4096:
                self._sat_cache.clear()
            self._sat_cache[key] = cached
        return cached

    def saturated_liquid(self, p):
        """Saturated liquid at pressure ``p`` [Pa] (the bubble point for pseudo-pure air)."""
        return self._saturated(p, 0)

    def saturated_vapour(self, p):
        """Saturated vapour at pressure ``p`` [Pa] (the dew point for pseudo-pure air)."""
        return self._saturated(p, 1)

    def saturation_temperature(self, p):
        """Saturation (bubble-point) temperature at ``p`` [Pa] in K; None at or above the
        critical pressure or below the triple-point pressure."""
        if not (self.p_triple <= p < self.p_critical):
            return None
        return self.saturated_liquid(p).T

    def saturated_state(self, quality, p=None, T=None):
        """Saturated state of vapour mass fraction ``quality`` [-] (0 liquid, 1 vapour) at
        pressure ``p`` [Pa] or temperature ``T`` [K] (give one).

        Raises :class:`PropertyRangeError` for a quality outside [0, 1], or a pressure or
        temperature outside the saturation line (from the triple point up to, not including,
        the critical point).  For pseudo-pure air CoolProp takes the bubble point at quality 0
        and the dew point at 1.
        """
        if (p is None) == (T is None):
            raise TypeError("give exactly one of p and T")
        at = f"p = {_fmt_p(p)}" if p is not None else f"T = {_fmt_T(T)}"
        asked = f"quality {quality!r}, {at}"
        if not _is_number(quality) or not 0.0 <= quality <= 1.0:
            self._fail(asked, "the quality (vapour mass fraction) must be from 0 to 1")
        if p is not None:
            self._check_p(p, asked)
            if p >= self.p_critical:
                self._fail(asked, f"no saturation at or above the critical pressure {_fmt_p(self.p_critical)}")
            if p < self.p_triple:
                self._fail(asked, f"no liquid below the triple-point pressure {_fmt_p(self.p_triple)}")
            self._update(CP.PQ_INPUTS, p, quality, asked)
        else:
            if not _is_number(T) or not math.isfinite(T) or T <= 0:
                self._fail(asked, "temperature must be a positive finite number")
            if T >= self.T_critical:
                self._fail(asked, f"no saturation at or above the critical temperature {_fmt_T(self.T_critical)}")
            if T < self.T_triple:
                self._fail(asked, f"no liquid below the triple-point temperature {_fmt_T(self.T_triple)}")
            self._update(CP.QT_INPUTS, quality, T, asked)
        st = self._snapshot(p)
        return State(self.name, st.T, st.p, st.h, st.s, st.density, float(quality), two_phase_label(float(quality)))

    def states_ph(self, pressures, enthalpies, guesses=None):
        """Many (p, h) states in one call: the march along an exchanger side.

        Each single-phase state is solved by Newton's method on (T, density) warm-started from
        the one before; two-phase states come from the saturation bounds at their pressure;
        whatever that does not settle goes to CoolProp's own flash (:mod:`properties.march`).
        The answers are those of :meth:`state_ph` to within 1e-6 K.

        Parameters
        ----------
        pressures : float or array_like
            Pressure of each state [Pa]; a scalar applies to all.
        enthalpies : array_like
            Specific enthalpy of each state [J/kg], in march order.
        guesses : array_like, optional
            Temperature guesses [K] for each state (for example a previous solve of the same
            stream), used instead of the neighbouring state to start Newton's method.

        Returns
        -------
        list of State
        """
        h = np.atleast_1d(np.asarray(enthalpies, dtype=float))
        p = np.broadcast_to(np.asarray(pressures, dtype=float), h.shape)
        starts = None
        if guesses is not None:
            starts = []
            for T, pk in zip(np.atleast_1d(guesses), p):
                try:
                    self._state.update(CP.PT_INPUTS, float(pk), float(T))
                    starts.append((float(T), self._state.rhomolar()))
                except ValueError:
                    starts.append(None)
        return self._march.march(p, h, starts)

    def temperatures_ph(self, pressures, enthalpies, first=None):
        """Temperatures [K] of many (p, h) states along one stream: :meth:`states_ph` without
        building the state objects (the exchanger march needs temperatures only).

        ``first`` is (T [K], density [kg/m3]) near the first state (otherwise found by CoolProp's
        flash where no saturation data start it).  Within :meth:`remembering`, a march along the
        same pressures as an earlier one starts from the linear estimate around it."""
        h = np.atleast_1d(np.asarray(enthalpies, dtype=float))
        p = np.broadcast_to(np.asarray(pressures, dtype=float), h.shape)
        return self._march.temperatures(p, h, first)

    def march_reference(self, pressures, enthalpies):
        """The nearest march made within :meth:`remembering` along these pressures, as
        (pressures, enthalpies, :class:`properties.march.Marched`), or None
        (:meth:`properties.march.PhMarch.reference`): what temperatures near it are estimated
        from, linearly in the changes of p and h, with no property call."""
        h = np.atleast_1d(np.asarray(enthalpies, dtype=float))
        p = np.broadcast_to(np.asarray(pressures, dtype=float), h.shape)
        return self._march.reference(p, h)

    def remembering(self):
        """A context in which exchanger marches start from the nearest earlier one
        (:meth:`properties.march.PhMarch.remembering`): a design point's root finder marches
        the same exchanger at nearby duties."""
        return self._march.remembering()

    def march_ph(self, pressures, enthalpies, guesses=None, first=None):
        """Many (p, h) states along one stream as arrays, with their sensitivities to p and h
        (a :class:`properties.march.Marched`).

        Parameters
        ----------
        pressures, enthalpies : array_like
            [Pa], [J/kg], in the order of the stream (each state starts from its neighbours').
        guesses : (array_like, array_like), optional
            Temperatures [K] and densities [kg/m3] near the states (a neighbouring march's).
        first : (float, float), optional
            Temperature [K] and density [kg/m3] near the first state (without ``guesses``, the
            first state is otherwise found by CoolProp's flash).
        """
        h = np.atleast_1d(np.asarray(enthalpies, dtype=float))
        p = np.broadcast_to(np.asarray(pressures, dtype=float), h.shape)
        return self._march.march_sensitivities(p, h, guesses, first)

    def transport_td(self, T, density):
        """Transport properties at many one-phase states given by temperature [K] and density
        [kg/m3]: arrays (dynamic viscosity [Pa s], thermal conductivity [W/(m K)], cp [J/(kg K)],
        speed of sound [m/s]).  Cheaper than :meth:`transport` (no pressure to solve for).

        Raises
        ------
        PropertyRangeError
            Where a state is two-phase, outside the equation of state, or CoolProp has no
            transport model for the fluid.
        """
        T = np.asarray(T, dtype=float).ravel()
        D = (np.asarray(density, dtype=float).ravel() / self.molar_mass).tolist()
        st = self._state
        update, inputs = st.update, CP.DmolarT_INPUTS
        mu, k, cp, a = st.viscosity, st.conductivity, st.cpmass, st.speed_sound
        out = []
        try:
            for D_i, T_i in zip(D, T.tolist()):  # Python floats: no NumPy scalar per call
                update(inputs, D_i, T_i)
                out.append((mu(), k(), cp(), a()))
        except ValueError as err:
            i = len(out)
            self._reset_state()
            self._fail(f"T = {_fmt_T(T[i])}, density = {D[i] * self.molar_mass:.6g} kg/m3 (transport properties)",
                       f"CoolProp has no transport property here ({str(err).strip()})")
        found = np.array(out).reshape(-1, 4).T
        return found[0], found[1], found[2], found[3]

    @property
    def _march(self):
        if self._marcher is None:
            from properties.march import PhMarch

            self._marcher = PhMarch(self)
        return self._marcher

    @staticmethod
    def _phase_name(index):
        return _PHASES.get(index, "unknown")

    # -- Joule-Thomson effect ---------------------------------------------------------

    def transport(self, T, p):
        """Transport properties at temperature ``T`` [K] and pressure ``p`` [Pa], one phase:
        (dynamic viscosity [Pa s], thermal conductivity [W/(m K)], cp [J/(kg K)], density
        [kg/m3], speed of sound [m/s]), from CoolProp's transport models for the fluid.

        Raises
        ------
        PropertyRangeError
            Outside the equation of state, on the saturation line, or where CoolProp has no
            transport model for the fluid.
        """
        asked = f"T = {_fmt_T(T)}, p = {_fmt_p(p)} (transport properties)"
        self._check_p(p, asked)
        self._check_T(T, p, asked)
        self._update(CP.PT_INPUTS, p, T, asked)
        st = self._state
        try:
            return st.viscosity(), st.conductivity(), st.cpmass(), st.rhomass(), st.speed_sound()
        except ValueError as err:
            self._reset_state()
            self._fail(asked, f"CoolProp has no transport property here ({str(err).strip()})")

    def jt_coefficient(self, T, p):
        """Joule-Thomson coefficient (dT/dp) at constant enthalpy [K/Pa] at ``T`` [K], ``p`` [Pa].

        Positive where an adiabatic throttle cools the fluid.
        """
        self._update_tp(T, p)
        return self._state.first_partial_deriv(CP.iT, CP.iP, CP.iHmass)

    def _jt_or_nan(self, T, p):
        try:
            return self.jt_coefficient(T, p)
        except PropertyRangeError:
            return math.nan

    def inversion_temperatures(self, p, points=240):
        """Temperatures at which the Joule-Thomson coefficient changes sign along the isobar ``p``.

        Parameters
        ----------
        p : float
            Pressure [Pa].
        points : int
            Size of the scan grid before each sign change is refined by Brent's method.

        Returns
        -------
        tuple of float
            Inversion temperatures [K], ascending; empty above the maximum inversion pressure.
            Below the critical pressure the isobar is scanned in the liquid and in the vapour
            separately (mu_JT jumps across the saturation temperature, which is no inversion).
        """
        self._check_p(p, f"inversion temperatures at p = {_fmt_p(p)}")
        T_low = max(self.T_min, self.melting_temperature(p) or self.T_min) * (1 + 1e-6)
        T_sat = self.saturation_temperature(p)
        segments = [(T_low, self.T_max)]
        if T_sat is not None:
            segments = [(T_low, T_sat * (1 - 1e-5)), (T_sat * (1 + 1e-5), self.T_max)]
        found = []
        for a, b in segments:
            if b <= a:
                continue
            grid = np.geomspace(a, b, points)
            mu = np.array([self._jt_or_nan(T, p) for T in grid])
            for k in range(points - 1):
                if np.isfinite(mu[k]) and np.isfinite(mu[k + 1]) and mu[k] * mu[k + 1] < 0:
                    found.append(brentq(self.jt_coefficient, grid[k], grid[k + 1], args=(p,), xtol=1e-6))
        return tuple(sorted(found))

    def max_inversion_temperature(self):
        """Maximum inversion temperature [K]: the upper inversion temperature as p -> 0.

        In the zero-pressure limit mu_JT cp = T dB/dT - B, with B the second virial
        coefficient, so the maximum inversion temperature is the root of T dB/dT - B = 0.
        The root is searched up to three times the equation of state's upper temperature;
        above that upper temperature (methane, for example) the value is an extrapolation.

        References
        ----------
        R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford University Press, 1985, sec. 3.3
        (the inversion curve and the virial form of mu_JT).
        """
        if self._max_inversion is None:
            st = self._state

            def f(T):
                st.update(CP.DmolarT_INPUTS, 1e-8, T)
                return T * st.dBvirial_dT() - st.Bvirial()

            a, b = self.T_critical, 3.0 * self.T_max
            if f(a) * f(b) > 0:
                raise PropertyRangeError(f"{self.name}: no maximum inversion temperature found "
                                         f"between {_fmt_T(a)} and {_fmt_T(b)}")
            self._max_inversion = brentq(f, a, b, xtol=1e-6)
        return self._max_inversion


@lru_cache(maxsize=None)
def _fluid_by_canonical_name(name):
    return Fluid(name)


def get_fluid(name):
    """Return the process-wide :class:`Fluid` for ``name`` (built once, on first use)."""
    return _fluid_by_canonical_name(resolve_fluid_name(name))
