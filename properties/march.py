"""A fast (p, h) march: many single-phase states along one stream by Newton's method.

CoolProp's (p, h) flash on HEOS costs some 60 us a state; a density-temperature update costs
under 2 us.  Along an exchanger side the states change a little from zone to zone, so each is
solved by Newton's method on (T, molar density) for the two equations p(T, D) = p and
h(T, D) = h, with the analytic partial derivatives of the equation of state and the
neighbouring zone's solution as the start.  Two-phase states of a pure fluid come straight from
the saturation bounds at that pressure (two cheap PQ updates, cached); anything Newton does
not settle - a step out of range, a solution on the wrong side of the saturation curve, a
pseudo-pure fluid's two-phase band, no convergence in a few steps - goes to CoolProp's own
flash, so the answers are those of HEOS.
"""

import contextlib
import math
from typing import NamedTuple

import numpy as np
from CoolProp import CoolProp as CP

from properties.state import State, two_phase_label

_MAX_STEPS = 25
# Marches kept by PhMarch.remembering (a root finder's last few iterates, both sides of an exchanger).
_REMEMBERED = 6
# Converged when p is met to 1e-11 relative and h to 1e-7 J/kg (about 1e-10 K at cp ~ 1 kJ/(kg K)).
_P_RTOL = 1e-11
_H_ATOL = 1e-7
# A (p, s) state meets s to 1e-10 J/(kg K) (T ds below 1e-7 J/kg up to 1000 K).
_S_ATOL = 1e-10


def _extrapolated(last, h):
    """A (T, D) start for the state at ``h`` from up to two (h, T, D) of the states before it:
    on the straight line through two, the one's own with one, None with none."""
    if len(last) == 2 and last[1][0] != last[0][0]:
        (h0, T0, D0), (h1, T1, D1) = last
        w = (h - h1) / (h1 - h0)
        guess = (T1 + w * (T1 - T0), D1 + w * (D1 - D0))
        return guess if guess[0] > 0 and guess[1] > 0 else (T1, D1)
    return last[-1][1:] if last else None


def _taylor(slopes, p, h):
    """A (T, D) start for the state at (p, h) from the last state's value and slopes (dT/dp,
    dT/dh, dD/dp, dD/dh), with the curvature in h of the change of slope since the state before
    it where there is one; the last state's own (T, D) where that would not be positive."""
    before, (p1, h1, T1, D1, Tp, Th, Dp, Dh) = slopes
    dh, dp = h - h1, p - p1
    T, D = T1 + Tp * dp + Th * dh, D1 + Dp * dp + Dh * dh
    if before is not None and before[1] != h1:
        w = 0.5 * dh * dh / (h1 - before[1])
        T += w * (Th - before[5])
        D += w * (Dh - before[7])
    return (T, D) if T > 0 and D > 0 else (T1, D1)


class Marched(NamedTuple):
    """States of a march as arrays (index as given), with the local sensitivities a caller
    needs to estimate nearby states without marching again.

    Attributes
    ----------
    T : numpy.ndarray
        [K]
    density : numpy.ndarray
        [kg/m3]
    dT_dp, dT_dh : numpy.ndarray
        (dT/dp) at constant h [K/Pa] and (dT/dh) at constant p [K kg/J].
    drho_dp, drho_dh : numpy.ndarray
        (drho/dp) at constant h [kg/(m3 Pa)] and (drho/dh) at constant p [kg2/(m3 J)].
    quality : numpy.ndarray
        Vapour mass fraction of two-phase states, NaN for one-phase ones (whose
        sensitivities are 0: the march leaves them out).
    """

    T: np.ndarray
    density: np.ndarray
    dT_dp: np.ndarray
    dT_dh: np.ndarray
    drho_dp: np.ndarray
    drho_dh: np.ndarray
    quality: np.ndarray


class PhMarch:
    """Solve (p, h) states for one :class:`~properties.fluid.Fluid`, warm-started.

    Parameters
    ----------
    fluid : properties.fluid.Fluid
    """

    def __init__(self, fluid):
        self.fluid = fluid
        self.state = fluid._state
        self.M = fluid.molar_mass
        self._bounds = {}
        self.newton_states = 0
        self.flash_states = 0
        self._memory = None  # recent marches (pressures, enthalpies, Marched) while remembering

    @contextlib.contextmanager
    def remembering(self):
        """Within the block, a temperature march (:meth:`temperatures`) starts every state from
        the linear estimate around the nearest march already made along the same pressures (a
        root finder's earlier iterate): one Newton step where there were two or three.  What
        is remembered is forgotten at the end, so each block's answers depend on its own calls
        only (a design point solves the same whatever was solved before it)."""
        outer, self._memory = self._memory, []
        try:
            yield self
        finally:
            self._memory = outer

    def bounds(self, p):
        """Saturation data at ``p`` [Pa]: (T_bubble, T_dew, h_l, h_v, s_l, s_v, D_l, D_v), or None
        at or above the critical pressure and below the triple point."""
        fl = self.fluid
        if not fl.p_triple < p < fl.p_critical * (1 - 1e-9):
            return None
        cached = self._bounds.get(p)
        if cached is None:
            st = self.state
            st.update(CP.PQ_INPUTS, p, 0.0)
            liquid = (st.T(), st.hmass(), st.smass(), st.rhomolar())
            st.update(CP.PQ_INPUTS, p, 1.0)
            vapour = (st.T(), st.hmass(), st.smass(), st.rhomolar())
            cached = (liquid[0], vapour[0], liquid[1], vapour[1], liquid[2], vapour[2], liquid[3], vapour[3])
            if len(self._bounds) > 20000:
                self._bounds.clear()
            self._bounds[p] = cached
        return cached

    def solve(self, p, h, guess=None, full=True):
        """The state at (p, h); ``guess`` is (T [K], molar density [mol/m3]) of a nearby state.

        With ``full="sensitivities"``, ``(T, molar density, quality or None, jacobian or None)``
        is returned instead of a :class:`State`, where ``jacobian`` is (dp/dT, dp/dD, dh/dT,
        dh/dD) at the state (or at Newton's last iterate, within about 1e-4 K of it)."""
        fl = self.fluid
        if not (0.0 < p <= fl.p_max) or abs(p / fl.p_critical - 1.0) < 1e-9 or h != h:
            return self._flash(p, h, full)  # the flash checks the pressure, and steps off the critical one
        sat = self.bounds(p)
        side = None
        if sat is not None:
            T_b, T_d, h_l, h_v, s_l, s_v, D_l, D_v = sat
            if h_l <= h <= h_v:
                if abs(T_d - T_b) > 1e-9 * T_b:  # pseudo-pure: the two-phase band is not isothermal
                    return self._flash(p, h, full)
                q = (h - h_l) / (h_v - h_l)
                self.newton_states += 1
                if full == "sensitivities":
                    return T_b, 1.0 / ((1.0 - q) / D_l + q / D_v), q, None
                rho = 1.0 / ((1.0 - q) / (D_l * self.M) + q / (D_v * self.M))
                return State(fl.name, T_b, float(p), float(h), s_l + q * (s_v - s_l), rho, float(q), two_phase_label(q))
            side = "liquid" if h < h_l else "vapour"
            if guess is None or (side == "liquid" and guess[0] >= T_b) or (side == "vapour" and guess[0] <= T_d):
                guess = (T_b * (1 - 1e-4), D_l) if side == "liquid" else (T_d * (1 + 1e-4), D_v)
        if guess is None:
            return self._flash(p, h, full)
        jacobian = [] if full == "sensitivities" else None
        found = self._newton(p, h, guess[0], guess[1], final_step=full is not True, jacobian=jacobian)
        if found is None:
            return self._flash(p, h, full)
        T, D = found
        if sat is not None:
            if (side == "liquid" and T > sat[0]) or (side == "vapour" and T < sat[1]):
                return self._flash(p, h, full)
        if not fl.T_min <= T <= fl.T_max or (T < 2.0 * fl.T_triple and self._below_melting(T, p)):
            return self._flash(p, h, full)
        st = self.state
        self.newton_states += 1
        if full == "sensitivities":
            return T, D, None, tuple(jacobian) if jacobian else self._jacobian()
        return State(fl.name, T, float(p), float(h), st.smass(), st.rhomass(), None,
                     fl._phase_name(st.phase()))

    def state_ps(self, p, s, guess):
        """The one-phase state at (p, s) [Pa, J/(kg K)] by Newton's method from ``guess``, (T [K],
        molar density [mol/m3]) of a nearby state (a valve's inlet, for the states along its
        isentrope); None where it does not settle there on the right side of the saturation
        curve, or the state is two-phase (the caller's flash or mixture then decides)."""
        fl = self.fluid
        if not (0.0 < p <= fl.p_max) or abs(p / fl.p_critical - 1.0) < 1e-9 or s != s:
            return None
        sat = self.bounds(p)
        side = None
        if sat is not None:
            T_b, T_d, _, _, s_l, s_v, D_l, D_v = sat
            if s_l <= s <= s_v or abs(T_d - T_b) > 1e-9 * T_b:
                return None
            side = "liquid" if s < s_l else "vapour"
            if (side == "liquid" and guess[0] >= T_b) or (side == "vapour" and guess[0] <= T_d):
                guess = (T_b * (1 - 1e-4), D_l) if side == "liquid" else (T_d * (1 + 1e-4), D_v)
        found = self._newton(p, s, guess[0], guess[1], entropy=True)
        if found is None:
            return None
        T, _ = found
        if sat is not None and ((side == "liquid" and T > sat[0]) or (side == "vapour" and T < sat[1])):
            return None
        if not fl.T_min <= T <= fl.T_max or (T < 2.0 * fl.T_triple and self._below_melting(T, p)):
            return None
        st = self.state
        return State(fl.name, T, float(p), st.hmass(), float(s), st.rhomass(), None, fl._phase_name(st.phase()))

    def _below_melting(self, T, p):
        T_melt = self.fluid.melting_temperature(p)
        return T_melt is not None and T < T_melt

    def _jacobian(self):
        st = self.state
        return (st.first_partial_deriv(CP.iP, CP.iT, CP.iDmolar), st.first_partial_deriv(CP.iP, CP.iDmolar, CP.iT),
                st.first_partial_deriv(CP.iHmass, CP.iT, CP.iDmolar),
                st.first_partial_deriv(CP.iHmass, CP.iDmolar, CP.iT))

    def _newton(self, p, h, T, D, final_step=False, jacobian=None, entropy=False):
        """Newton's method on (T, D); with ``final_step`` a last step small enough that the
        next would change T by far less than 1e-6 K (quadratic convergence) is taken without
        evaluating the state there (temperature-only marches).  A list given as ``jacobian``
        receives the last partial derivatives evaluated (empty if none was).  With ``entropy``,
        ``h`` is a specific entropy [J/(kg K)] to meet (a (p, s) state) instead."""
        st = self.state
        second, value, atol = (CP.iSmass, st.smass, _S_ATOL) if entropy else (CP.iHmass, st.hmass, _H_ATOL)
        for _ in range(_MAX_STEPS):
            try:
                st.update(CP.DmolarT_INPUTS, D, T)
            except ValueError:
                return None
            f_p = st.p() - p
            f_h = value() - h
            if abs(f_p) <= _P_RTOL * p and abs(f_h) <= atol:
                return T, D
            dp_dT = st.first_partial_deriv(CP.iP, CP.iT, CP.iDmolar)
            dp_dD = st.first_partial_deriv(CP.iP, CP.iDmolar, CP.iT)
            dh_dT = st.first_partial_deriv(second, CP.iT, CP.iDmolar)
            dh_dD = st.first_partial_deriv(second, CP.iDmolar, CP.iT)
            det = dp_dT * dh_dD - dp_dD * dh_dT
            if det == 0.0 or not math.isfinite(det):
                return None
            if jacobian is not None:
                jacobian[:] = (dp_dT, dp_dD, dh_dT, dh_dD)
            dT = (-f_p * dh_dD + f_h * dp_dD) / det
            dD = (-dp_dT * f_h + dh_dT * f_p) / det
            # Damp steps that would take T or D past zero or far from where they were.
            scale = 1.0
            if abs(dT) > 0.2 * T:
                scale = min(scale, 0.2 * T / abs(dT))
            if dD < 0 and -dD > 0.5 * D:
                scale = min(scale, 0.5 * D / -dD)
            T += scale * dT
            D += scale * dD
            if final_step and scale == 1.0 and abs(dT) < 1e-4 and abs(dD) < 1e-7 * D:
                return T, D
        return None

    def _flash(self, p, h, full=True):
        self.flash_states += 1
        st = self.fluid.state_ph(p, h)
        if full == "sensitivities":
            one_phase = st.quality is None
            return st.T, st.density / self.M, st.quality, self._jacobian() if one_phase else None
        return st

    def march(self, pressures, enthalpies, guesses=None):
        """Solve states in order, each a :class:`State` started from a straight-line
        extrapolation of the two before (or from ``guesses``)."""
        out = []
        last = []  # up to two (h, T, D) of the latest single-phase states, newest last
        for k, (p, h) in enumerate(zip(pressures, enthalpies)):
            p, h = float(p), float(h)
            guess = guesses[k] if guesses is not None and guesses[k] is not None else _extrapolated(last, h)
            solved = self.solve(p, h, guess)
            out.append(solved)
            last = (last + [(h, solved.T, solved.density / self.M)])[-2:] if solved.quality is None else []
        return out

    def march_sensitivities(self, pressures, enthalpies, guesses=None, first=None):
        """Solve states in order as :meth:`march`, and return them as :class:`Marched` arrays with
        each one-phase state's sensitivities to p and h (from the Jacobian Newton's method
        already has: no extra property call).  ``guesses`` is (temperatures [K], densities
        [kg/m3]) near every state; ``first`` (T, density) near the first one only."""
        n = len(enthalpies)
        T, rho, q = np.empty(n), np.empty(n), np.full(n, np.nan)
        dT_dp, dT_dh, drho_dp, drho_dh = np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n)
        M = self.M
        done = np.zeros(n, dtype=bool)
        if guesses is not None:
            # Every state has its own start: Newton's steps for all at once, one property
            # update a state a pass; what they do not settle is solved one by one below.
            done, T_b, D_b, jac = self._together(np.asarray(pressures, dtype=float),
                                                 np.asarray(enthalpies, dtype=float),
                                                 np.asarray(guesses[0], dtype=float), np.asarray(guesses[1], dtype=float) / M)
            dp_dT, dp_dD, dh_dT, dh_dD = jac
            det = dp_dT * dh_dD - dp_dD * dh_dT
            with np.errstate(divide="ignore", invalid="ignore"):
                T[done], rho[done] = T_b[done], D_b[done] * M
                dT_dp[done], dT_dh[done] = (dh_dD / det)[done], (-dp_dD / det)[done]
                drho_dp[done], drho_dh[done] = (-dh_dT / det * M)[done], (dp_dT / det * M)[done]
            self.newton_states += int(done.sum())
            if done.all():
                return Marched(T, rho, dT_dp, dT_dh, drho_dp, drho_dh, q)
        p_max, p_c = self.fluid.p_max, self.fluid.p_critical
        pl = np.asarray(pressures, dtype=float).tolist()
        hl = np.asarray(enthalpies, dtype=float).tolist()
        last, slopes = [], None
        for k in range(n):
            if done[k]:
                continue
            p, h = pl[k], hl[k]
            if guesses is not None:
                guess = (float(guesses[0][k]), float(guesses[1][k]) / M)
            elif k == 0 and first is not None:
                guess = (float(first[0]), float(first[1]) / M)
            elif slopes is not None:
                guess = _taylor(slopes, p, h)
            else:
                guess = _extrapolated(last, h)
            found = None
            # The common case inline (one phase, a start on its side of the saturation curve);
            # anything else as solve() does it.
            if guess is not None and 0.0 < p <= p_max and abs(p / p_c - 1.0) >= 1e-9 and h == h:
                where = self._one_phase_side(p, h)
                if where is not None:
                    side, limit, start = where
                    if side * (guess[0] - limit) <= 0.0 and side != 0.0:  # a start on the other side
                        guess = start
                    found = self._settle(p, h, guess[0], guess[1], side, limit)
            if found is not None:
                Tk, Dk, a, b, c, d = found
                self.newton_states += 1
                qk, jac = None, (a, b, c, d)
            else:
                Tk, Dk, qk, jac = self.solve(p, h, guess, full="sensitivities")
            T[k], rho[k] = Tk, Dk * M
            if qk is not None:
                q[k] = qk
                last, slopes = [], None
                continue
            last = (last + [(h, Tk, Dk)])[-2:]
            if jac is not None:
                dp_dT, dp_dD, dh_dT, dh_dD = jac
                det = dp_dT * dh_dD - dp_dD * dh_dT
                sT_p, sT_h, sD_p, sD_h = dh_dD / det, -dp_dD / det, -dh_dT / det, dp_dT / det
                dT_dp[k], dT_dh[k], drho_dp[k], drho_dh[k] = sT_p, sT_h, sD_p * M, sD_h * M
                # The next start: this state's own slopes, curved as they changed since the last.
                here = (p, h, Tk, Dk, sT_p, sT_h, sD_p, sD_h)
                slopes = (slopes[1] if slopes is not None else None, here)
            else:
                slopes = None
        return Marched(T, rho, dT_dp, dT_dh, drho_dp, drho_dh, q)

    def _one_phase_side(self, p, h):
        """Where a one-phase state at (p, h) must lie: ``(side, limit, start)`` with ``side`` -1
        for a liquid (T below ``limit``, the bubble point), +1 for a vapour (above the dew
        point) and 0 with no saturation curve at ``p``; ``start`` the (T, molar density) just
        inside that side.  None where the state is two-phase or in a pseudo-pure fluid's band
        (:meth:`solve` takes those)."""
        fl = self.fluid
        if not fl.p_triple < p < fl.p_critical * (1 - 1e-9):
            return 0.0, 0.0, None
        T_b, T_d, h_l, h_v, _, _, D_l, D_v = self.bounds(p)
        if h_l <= h <= h_v or abs(T_d - T_b) > 1e-9 * T_b:
            return None
        if h < h_l:
            return -1.0, T_b, (T_b * (1 - 1e-4), D_l)
        return 1.0, T_d, (T_d * (1 + 1e-4), D_v)

    def _settle(self, p, h, T, D, side, limit):
        """One one-phase state by Newton's method (:meth:`_newton`, with its final step) from
        (T [K], D [mol/m3]), without :meth:`solve`'s checks of where the state may lie (the
        march has made them): (T, D, dp/dT, dp/dD, dh/dT, dh/dD) with the partial derivatives of
        the last state evaluated, or None where it does not settle, lands on the wrong side of
        the saturation curve (``side`` -1: below ``limit``, the bubble point; +1: above it, the
        dew point; 0: no curve) or outside the range."""
        jacobian = []
        found = self._newton(p, h, T, D, final_step=True, jacobian=jacobian)
        if found is None:
            return None
        T, D = found
        fl = self.fluid
        if (side < 0 and T > limit) or (side > 0 and T < limit) or not fl.T_min <= T <= fl.T_max:
            return None
        if T < 2.0 * fl.T_triple and self._below_melting(T, p):
            return None
        return (T, D) + (tuple(jacobian) if jacobian else self._jacobian())

    def _together(self, p, h, T, D):
        """Newton's method on (T, D) for many one-phase states at once from their own starts
        (``T`` [K], ``D`` [mol/m3]): the steps, damping and tests of :meth:`_newton`, taken for
        every state in turn in each pass (a density-temperature update and its partial
        derivatives a state a pass) instead of state after state to the end.  Returns
        (settled mask, T, D, Jacobian rows (dp/dT, dp/dD, dh/dT, dh/dD)); a state is left
        unsettled (for :meth:`solve`) where it is two-phase or might be, its start is on the
        other side of the saturation curve, a step fails, or it lands outside the range."""
        fl, st = self.fluid, self.state
        n = len(h)
        active = (p > 0.0) & (p <= fl.p_max) & (np.abs(p / fl.p_critical - 1.0) >= 1e-9) & np.isfinite(h)
        active &= (T > 0) & (D > 0)
        side = [0.0] * n  # -1 liquid (T must stay below the bubble point), +1 vapour, 0 neither
        limit = [0.0] * n
        pl, hl, Tl, Dl = p.tolist(), h.tolist(), T.tolist(), D.tolist()
        act = active.tolist()
        for k in range(n):
            if not act[k]:
                continue
            where = self._one_phase_side(pl[k], hl[k])
            if where is None:
                act[k] = False
            else:
                side[k], limit[k], _ = where
                act[k] = side[k] == 0.0 or side[k] * (Tl[k] - limit[k]) > 0.0
        done = [False] * n
        f_p, f_h = [0.0] * n, [0.0] * n
        j0, j1, j2, j3 = [0.0] * n, [0.0] * n, [0.0] * n, [0.0] * n
        iP, iT, iD, iH, DT = CP.iP, CP.iT, CP.iDmolar, CP.iHmass, CP.DmolarT_INPUTS
        deriv = st.first_partial_deriv
        for _ in range(6):
            todo = [k for k in range(n) if act[k] and not done[k]]
            if not todo:
                break
            for k in todo:
                try:
                    st.update(DT, Dl[k], Tl[k])
                except ValueError:
                    act[k] = False
                    continue
                f_p[k] = st.p() - pl[k]
                f_h[k] = st.hmass() - hl[k]
                j0[k], j1[k] = deriv(iP, iT, iD), deriv(iP, iD, iT)
                j2[k], j3[k] = deriv(iH, iT, iD), deriv(iH, iD, iT)
            for k in todo:
                if not act[k]:
                    continue
                fp, fh = f_p[k], f_h[k]
                if abs(fp) <= _P_RTOL * pl[k] and abs(fh) <= _H_ATOL:
                    done[k] = True
                    continue
                a, b, c, d = j0[k], j1[k], j2[k], j3[k]
                det = a * d - b * c
                if det == 0.0 or not math.isfinite(det):
                    act[k] = False
                    continue
                dT = (-fp * d + fh * b) / det
                dD = (-a * fh + c * fp) / det
                Tk, Dk = Tl[k], Dl[k]
                scale = 1.0
                if abs(dT) > 0.2 * Tk:
                    scale = 0.2 * Tk / abs(dT)
                if dD < 0 and -dD > 0.5 * Dk:
                    scale = min(scale, 0.5 * Dk / -dD)
                Tl[k], Dl[k] = Tk + scale * dT, Dk + scale * dD
                # A full step this small leaves the next far below 1e-6 K: taken without evaluating.
                if scale == 1.0 and abs(dT) < 1e-4 and abs(dD) < 1e-7 * Dk:
                    done[k] = True
        T, D = np.array(Tl), np.array(Dl)
        jac = np.array([j0, j1, j2, j3])
        active, done = np.array(act, dtype=bool), np.array(done, dtype=bool)
        side, limit = np.array(side), np.array(limit)
        done &= active
        wrong = ((side < 0) & (T > limit)) | ((side > 0) & (T < limit)) | (T < fl.T_min) | (T > fl.T_max)
        done &= ~wrong
        for k in np.flatnonzero(done & (T < 2.0 * fl.T_triple)):
            if self._below_melting(float(T[k]), float(p[k])):
                done[k] = False
        return done, T, D, jac

    def temperatures(self, pressures, enthalpies, first=None):
        """Temperatures [K] of the states in order (:meth:`march_sensitivities`), started where
        :meth:`remembering` has a march along the same pressures from the linear estimate
        around it, otherwise from the neighbouring states (``first``: (T, density) near the
        first)."""
        p = np.asarray(pressures, dtype=float)
        h = np.asarray(enthalpies, dtype=float)
        guesses = self._estimate(p, h) if self._memory is not None else None
        marched = self.march_sensitivities(p, h, guesses, None if guesses is not None else first)
        if self._memory is not None:
            n = len(p)
            ends = (float(p[0]), float(p[n // 2]), float(p[-1])) if n else ()
            self._memory.append((p.copy(), h.copy(), marched, ends))
            del self._memory[:-_REMEMBERED]
        return marched.T

    def reference(self, pressures, enthalpies):
        """The nearest march remembered (:meth:`remembering`) along these pressures, as
        (pressures [Pa], enthalpies [J/kg], :class:`Marched`), or None: the states and linear
        sensitivities from which temperatures near it are estimated without a property call,
        T = T_ref + dT/dp (p - p_ref) + dT/dh (h - h_ref), to second order in the change."""
        if not self._memory:
            return None
        return self._nearest(np.asarray(pressures, dtype=float), np.asarray(enthalpies, dtype=float))

    def _nearest(self, p, h):
        best, gap = None, math.inf
        n = len(p)
        ends = (float(p[0]), float(p[n // 2]), float(p[-1])) if n else ()
        for P, H, m, at in reversed(self._memory):  # the newest first: usually the one
            if len(P) != n or any(abs(a - b) > 1e-3 * abs(b) for a, b in zip(at, ends)):
                continue  # (only a start is chosen: three pressures are enough to tell)
            d = float(np.abs(H - h).max())
            if d < gap:
                best, gap = (P, H, m), d
                if d == 0.0:
                    break
        return best

    def _estimate(self, p, h):
        """(T, density) estimates of the states at ``p``, ``h`` from the nearest remembered
        march of as many states at pressures within 0.1 %, or None."""
        best = self._nearest(p, h)
        if best is None:
            return None
        P, H, m = best
        dp, dh = p - P, h - H
        T = m.T + m.dT_dp * dp + m.dT_dh * dh
        rho = m.density + m.drho_dp * dp + m.drho_dh * dh
        bad = ~((T > 0) & (rho > 0))
        T[bad], rho[bad] = m.T[bad], m.density[bad]
        return T, rho
