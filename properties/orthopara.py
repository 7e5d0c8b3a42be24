"""Hydrogen whose para fraction is a state variable: ortho and para mixed ideally.

Orthohydrogen (odd rotational quantum numbers J, nuclear-spin triplet) and parahydrogen (even J,
singlet) interconvert only on a catalyst, so a hydrogen stream carries its para fraction the
way a mixture carries its composition.  This module gives

- the equilibrium para fraction from the rotational partition functions of the two
  modifications (:func:`equilibrium_para_fraction`), and the heat released when normal
  hydrogen converts to equilibrium hydrogen (:func:`normal_to_equilibrium_heat`);
- states of any para fraction from CoolProp's own equations of state for parahydrogen and
  orthohydrogen, mixed ideally at the same temperature and pressure, on one enthalpy and
  entropy reference (:class:`OrthoParaHydrogen`).

The para fraction is a mass fraction.  The two equations of state carry molar masses that
differ by 3e-5 (relative), so it equals the mole fraction to within 1e-5.

Reference state (see docs/ortho-para-hydrogen.md).  Parahydrogen keeps CoolProp's reference
(h = s = 0 for the saturated liquid at 101.325 kPa).  Orthohydrogen is shifted by a constant
enthalpy and entropy so that, in the ideal gas at :data:`ANCHOR_TEMPERATURE`, its enthalpy and
entropy above parahydrogen's are those of the rotational partition functions: energies counted
from the para ground state J = 0, and the nuclear-spin degeneracy 3 of ortho included.  The
ideal entropy of mixing of the two modifications is included, so the mixture's Gibbs energy at
fixed T and p is lowest at the equilibrium para fraction.
"""

from dataclasses import dataclass, asdict
from functools import lru_cache
from typing import Optional
import math
import numbers

import numpy as np

from properties.errors import PropertyRangeError
from properties.fluid import get_fluid

# Second radiation constant c2 = h c / k [cm K], CODATA 2018 (exact since the 2019 SI): turns a
# term value in cm^-1 into a temperature.
SECOND_RADIATION_CONSTANT = 1.438776877  # cm K

# Rotational term values F(J) of H2 in its ground vibrational state [cm^-1], J = 0 ... 5.  From
# memory of the spectroscopic tables of the H2 ground state (Dabrowski, Can. J. Phys. 62 (1984)
# 1639; the same numbers follow from the Raman lines S0(0) 354.37 and S0(1) 587.03 cm^-1).
TERM_VALUES = (0.0, 118.4869, 354.3733, 705.5188, 1168.7985, 1740.1891)

# Above J = 5: F(J) = B x - D x^2 + H x^3 with x = J (J + 1), constants [cm^-1] fitted by least
# squares to TERM_VALUES J = 1 ... 5 (residuals below 0.001 cm^-1; B agrees with the published
# B0 = 59.33 cm^-1 of H2, v = 0).  Those levels hold under 0.1 % of the molecules at 1000 K.
ROTATIONAL_CONSTANTS = (59.33425, 0.0456224, 4.52502e-5)

# Molar gas constant [J/(mol K)], CODATA 2018 (exact since the 2019 SI).  CoolProp's hydrogen
# equations of state use 8.314472; the 1.2 ppm difference is far below anything computed here.
GAS_CONSTANT = 8.314462618

# Highest J summed: beyond it the terms are below 1e-12 of the sum up to 1000 K.
_J_MAX = 25

# Para fraction of normal hydrogen: the high-temperature limit of the equilibrium (3 ortho
# states of nuclear spin to 1 para).  Common practice.
NORMAL_PARA_FRACTION = 0.25

# Ideal-gas temperature [K] at which orthohydrogen's reference is tied to parahydrogen's: near
# ambient, where a liquefier takes its feed.  The anchor hardly matters: from 20 to 300 K the
# offset it gives moves by 0.4 J/mol (0.2 kJ/kg), the mismatch between the equations of state's
# ideal-gas heat capacities and the partition functions.
ANCHOR_TEMPERATURE = 300.0
# Pressure [Pa] standing in for the ideal gas at the anchor (residual parts below 1e-8 of h).
_ANCHOR_PRESSURE = 1.0

# Temperatures [K] the partition functions are used over: up to the equations of state's upper
# limit (vibrational excitation, ignored, is under 0.3 % of molecules at 1000 K).
PARTITION_T_MAX = 1000.0


def _is_number(x):
    return isinstance(x, numbers.Real) and not isinstance(x, bool)


def _term_values_K():
    """Rotational energies E_J / k [K] for J = 0 ... _J_MAX."""
    J = np.arange(_J_MAX + 1)
    x = J * (J + 1.0)
    B, D, H = ROTATIONAL_CONSTANTS
    F = B * x - D * x**2 + H * x**3
    F[: len(TERM_VALUES)] = TERM_VALUES
    return J, F * SECOND_RADIATION_CONSTANT


_J, _E = _term_values_K()
# Nuclear-spin-weighted degeneracies: para (even J) 1 (2J+1), ortho (odd J) 3 (2J+1).
_G = np.where(_J % 2 == 0, 1.0, 3.0) * (2 * _J + 1)
_ODD = _J % 2 == 1

#: Energy of the ortho ground state J = 1 above the para ground state J = 0, E1 / k [K].
ORTHO_GROUND_STATE_TEMPERATURE = float(_E[1])


def _check_temperature(T, what):
    if not _is_number(T) or not math.isfinite(T) or not 0.0 < T <= PARTITION_T_MAX:
        raise PropertyRangeError(f"{what}: temperature must be above 0 K and at most "
                                 f"{PARTITION_T_MAX:g} K, got {T!r}")


def _weights(T):
    """Boltzmann terms of the para (even J) and ortho (odd J) levels, each shifted by its own
    lowest level (J = 0, J = 1) so that neither sum underflows at low T."""
    return _G[~_ODD] * np.exp(-_E[~_ODD] / T), _G[_ODD] * np.exp(-(_E[_ODD] - _E[1]) / T)


def rotational_functions(T):
    """Rotational partition functions and mean rotational energies of para and ortho hydrogen.

    Energies are counted from the para ground state (J = 0); the ortho partition function
    carries the nuclear-spin weight 3.

    Parameters
    ----------
    T : float
        Temperature [K], above 0 and at most 1000.

    Returns
    -------
    tuple of float
        (z_para, z_ortho, U_para, U_ortho): partition functions [-] and mean rotational energies
        per molecule divided by k [K].

    References
    ----------
    A. Farkas, *Orthohydrogen, Parahydrogen and Heavy Hydrogen*, Cambridge University Press,
    1935, ch. 1 (the nuclear-spin-weighted rotational sums); H. W. Woolley, R. B. Scott and
    F. G. Brickwedde, J. Res. Natl. Bur. Stand. 41 (1948) 379 (the same sums with measured
    rotational levels).
    """
    _check_temperature(T, "rotational partition functions")
    wp, wo = _weights(T)
    zp, zo_shifted = wp.sum(), wo.sum()
    Up = float((wp * _E[~_ODD]).sum() / zp)
    Uo = float((wo * _E[_ODD]).sum() / zo_shifted)
    return float(zp), float(zo_shifted * math.exp(-_E[1] / T)), Up, Uo


def _ortho_to_para_mole_ratio(T):
    """Equilibrium n_ortho / n_para = z_ortho / z_para, without underflow at low T."""
    wp, wo = _weights(T)
    log_ratio = math.log(wo.sum()) - _E[1] / T - math.log(wp.sum())
    return math.exp(max(log_ratio, -745.0))


def _mass_from_mole(y, M_para, M_ortho):
    return y * M_para / (y * M_para + (1.0 - y) * M_ortho)


def equilibrium_para_fraction(T):
    """Para fraction of hydrogen in ortho-para equilibrium at temperature ``T``.

    x_eq = z_para / (z_para + z_ortho), with z_para = sum over even J of (2J+1) exp(-E_J/kT) and
    z_ortho = 3 sum over odd J of (2J+1) exp(-E_J/kT), E_J the measured rotational levels of H2
    (:data:`TERM_VALUES`).

    Parameters
    ----------
    T : float
        Temperature [K], above 0 and at most 1000.

    Returns
    -------
    float
        Equilibrium para fraction [-] (mass fraction; the mole fraction is within 1e-5 of it):
        0.25 at high temperature, 1 towards 0 K.

    References
    ----------
    A. Farkas, *Orthohydrogen, Parahydrogen and Heavy Hydrogen*, Cambridge University Press,
    1935, ch. 1; H. W. Woolley, R. B. Scott and F. G. Brickwedde, J. Res. Natl. Bur. Stand. 41
    (1948) 379.
    """
    _check_temperature(T, "equilibrium para fraction")
    y = 1.0 / (1.0 + _ortho_to_para_mole_ratio(T))
    model = get_ortho_para_hydrogen()
    return _mass_from_mole(y, model.para_molar_mass, model.ortho_molar_mass)


def normal_to_equilibrium_heat(T):
    """Heat released per kg when normal hydrogen (para fraction 0.25) is converted to
    equilibrium hydrogen at temperature ``T``, from the rotational energies alone.

    q = (x_eq(T) - 0.25) (U_ortho(T) - U_para(T)) R / M, the change of the mean rotational
    energy.  It holds for the gas and, to the extent that the molecules rotate freely there
    (very nearly so), for the liquid; :meth:`OrthoParaHydrogen.conversion_heat` gives the same
    quantity from the equations of state at a given pressure.

    Parameters
    ----------
    T : float
        Temperature [K], above 0 and at most 1000.

    Returns
    -------
    float
        Heat released [J/kg]: positive wherever x_eq exceeds 0.25, tending to 0 above 300 K.

    References
    ----------
    A. Farkas, *Orthohydrogen, Parahydrogen and Heavy Hydrogen*, Cambridge University Press,
    1935, ch. 1.
    """
    _check_temperature(T, "normal-to-equilibrium conversion heat")
    _, _, Up, Uo = rotational_functions(T)
    model = get_ortho_para_hydrogen()
    x_eq = equilibrium_para_fraction(T)
    return (x_eq - NORMAL_PARA_FRACTION) * (Uo - Up) * model.gas_constant / model.molar_mass(x_eq)


@dataclass(frozen=True, slots=True)
class OrthoParaState:
    """One state of hydrogen of a given para fraction, in SI units.

    Attributes
    ----------
    T : float
        Temperature [K].
    p : float
        Pressure [Pa].
    h : float
        Specific enthalpy [J/kg], on the common ortho-para reference (module docstring).
    s : float
        Specific entropy [J/(kg K)], same reference, ideal entropy of mixing included.
    density : float
        Mass density [kg/m3] (specific volumes of the two modifications added).
    para_fraction : float
        Mass fraction of parahydrogen [-].
    phase : str
        Phase name as for :class:`properties.State` (that of parahydrogen where the two differ
        only in name, e.g. "gas" and "supercritical fluid").
    quality : float or None
        Vapour mass fraction of a saturated or two-phase state
        (:mod:`properties.hydrogen_stream`), None in one phase.
    """

    T: float
    p: float
    h: float
    s: float
    density: float
    para_fraction: float
    phase: str
    quality: Optional[float] = None

    def to_dict(self):
        """Return the state as a plain dictionary of SI numbers."""
        return asdict(self)


_LIQUID = {"liquid"}
_VAPOUR = {"vapour", "gas"}


class OrthoParaHydrogen:
    """Hydrogen of any para fraction: CoolProp's parahydrogen and orthohydrogen equations of
    state mixed ideally (enthalpy, entropy and volume mass-weighted at the same T and p, plus
    the ideal entropy of mixing), on one reference for both.

    Use :func:`get_ortho_para_hydrogen` rather than the constructor: it keeps one instance (and
    so one CoolProp state per modification) per process.

    Attributes
    ----------
    ortho_enthalpy_offset : float
        Constant added to CoolProp's orthohydrogen enthalpy [J/kg].
    ortho_entropy_offset : float
        Constant added to CoolProp's orthohydrogen entropy [J/(kg K)].

    Notes
    -----
    States where one modification is liquid and the other vapour (at 1 atm, between 20.27 and
    20.38 K) are refused: the two-phase region of the mixture is not modelled.  Between the
    triple points (13.80 K para, 14.01 K ortho) only pure para is available.

    References
    ----------
    J. W. Leachman, R. T. Jacobsen, S. G. Penoncello and E. W. Lemmon, "Fundamental equations
    of state for parahydrogen, normal hydrogen, and orthohydrogen", J. Phys. Chem. Ref. Data 38
    (2009) 721 (the equations of state CoolProp implements).
    """

    def __init__(self):
        self._para = get_fluid("ParaHydrogen")
        self._ortho = get_fluid("OrthoHydrogen")
        self.para_molar_mass = self._para.molar_mass  # kg/mol
        self.ortho_molar_mass = self._ortho.molar_mass  # kg/mol
        self.gas_constant = GAS_CONSTANT  # J/(mol K)
        self.ortho_enthalpy_offset = 0.0
        self.ortho_entropy_offset = 0.0
        self._set_reference()

    def __repr__(self):
        return "OrthoParaHydrogen()"

    def _set_reference(self):
        Ta, pa = ANCHOR_TEMPERATURE, _ANCHOR_PRESSURE
        para = self._para.state_tp(Ta, pa)
        ortho = self._ortho.state_tp(Ta, pa)
        zp, zo, Up, Uo = rotational_functions(Ta)
        R = self.gas_constant
        dH = (Uo - Up) * R  # J/mol, ortho above para
        dS = R * math.log(zo / zp) + dH / Ta  # J/(mol K)
        Mp, Mo = self.para_molar_mass, self.ortho_molar_mass
        self.ortho_enthalpy_offset = (para.h * Mp + dH) / Mo - ortho.h
        self.ortho_entropy_offset = (para.s * Mp + dS) / Mo - ortho.s

    def molar_mass(self, para_fraction):
        """Molar mass [kg/mol] of hydrogen of para (mass) fraction ``para_fraction`` [-]."""
        x = para_fraction
        return 1.0 / (x / self.para_molar_mass + (1.0 - x) / self.ortho_molar_mass)

    def mixing_entropy(self, para_fraction):
        """Ideal entropy of mixing of the two modifications [J/(kg K)]:
        -R/M [y ln y + (1 - y) ln(1 - y)], y the para mole fraction."""
        x = para_fraction
        M = self.molar_mass(x)
        y = x * M / self.para_molar_mass
        terms = sum(v * math.log(v) for v in (y, 1.0 - y) if v > 0.0)
        return -self.gas_constant * terms / M

    # -- states -----------------------------------------------------------------------

    def check_fraction(self, x, asked):
        """Raise :class:`PropertyRangeError` (naming ``asked``) unless ``x`` is a para fraction, 0 to 1."""
        if not _is_number(x) or not 0.0 <= x <= 1.0:
            raise PropertyRangeError(f"hydrogen: no state at {asked}: the para fraction must be "
                                     f"from 0 to 1, got {x!r}")

    def _parts(self, T, p, x):
        """(para state or None, ortho state or None) at T, p for para fraction x."""
        asked = f"T = {T!r} K, p = {p!r} Pa, para fraction {x!r}"
        self.check_fraction(x, asked)
        para = ortho = None
        try:
            if x > 0.0:
                para = self._para.state_tp(T, p)
            if x < 1.0:
                ortho = self._ortho.state_tp(T, p)
        except PropertyRangeError as err:
            raise PropertyRangeError(f"hydrogen at para fraction {x:g}: {err}") from None
        if para is not None and ortho is not None:
            phases = {para.phase, ortho.phase}
            if phases & _LIQUID and phases & _VAPOUR:
                raise PropertyRangeError(
                    f"hydrogen at para fraction {x:g}: no state at T = {T:.6g} K, p = {p / 1e5:.6g} bar: "
                    f"para is {para.phase} and ortho {ortho.phase} there (between their saturation "
                    f"temperatures); the mixture's two-phase region is not modelled, use T outside that band")
        return para, ortho

    def state_tp(self, T, p, para_fraction):
        """State at temperature ``T`` [K], pressure ``p`` [Pa] and para fraction
        ``para_fraction`` [-] (mass fraction, 0 to 1), single phase.

        Raises
        ------
        PropertyRangeError
            Outside either equation of state (temperature, pressure, melting line), on the
            saturation line, or where one modification is liquid and the other vapour.
        """
        x = para_fraction
        para, ortho = self._parts(T, p, x)
        h_o = s_o = None
        if ortho is not None:
            h_o = ortho.h + self.ortho_enthalpy_offset
            s_o = ortho.s + self.ortho_entropy_offset
        if para is None:
            h, s, v = h_o, s_o, 1.0 / ortho.density
        elif ortho is None:
            h, s, v = para.h, para.s, 1.0 / para.density
        else:
            h = x * para.h + (1.0 - x) * h_o
            s = x * para.s + (1.0 - x) * s_o + self.mixing_entropy(x)
            v = x / para.density + (1.0 - x) / ortho.density
        phase = (para or ortho).phase
        return OrthoParaState(float(T), float(p), h, s, 1.0 / v, float(x), phase)

    def state_ph(self, p, h, para_fraction):
        """State at pressure ``p`` [Pa], specific enthalpy ``h`` [J/kg] and para fraction [-],
        single phase: the temperature found by Brent's method to 1e-9 K on the branch whose
        enthalpies hold ``h`` (liquid below the lower of the two saturation temperatures at
        ``p``, vapour above the higher, each kept 1e-5 of itself off the line, where CoolProp
        gives no one-phase state; one branch at or above both critical pressures).

        Raises
        ------
        PropertyRangeError
            Where ``h`` lies in the mixture's two-phase band (or on a saturation line), or
            outside the equations of state.
        """
        from scipy.optimize import brentq

        x = para_fraction
        asked = f"p = {p!r} Pa, h = {h!r} J/kg, para fraction {x!r}"
        self.check_fraction(x, asked)
        if not (_is_number(p) and math.isfinite(p) and p > 0) or not (_is_number(h) and math.isfinite(h)):
            raise PropertyRangeError(f"hydrogen: no state at {asked}: p must be above 0 and h a finite number")
        parts = [f for f, share in ((self._para, x), (self._ortho, 1.0 - x)) if share > 0.0]
        T_low = max(max(f.T_min, f.melting_temperature(p) or 0.0) for f in parts) * (1.0 + 1e-9)
        T_high = min(PARTITION_T_MAX, min(f.T_max for f in parts))
        branches = [(T_low, T_high)]
        subcritical = [f for f in parts if p < f.p_critical]
        if subcritical:
            T_sat = [f.saturation_temperature(p) for f in subcritical]
            branches = [(T_low, min(T_sat) * (1.0 - 1e-5)), (max(T_sat) * (1.0 + 1e-5), T_high)]
        for a, b in branches:
            if not a < b:
                continue
            try:
                h_a, h_b = self.h(a, p, x), self.h(b, p, x)
            except PropertyRangeError:
                continue
            if h_a <= h <= h_b:
                T = brentq(lambda t: self.h(t, p, x) - h, a, b, xtol=1e-9, rtol=1e-15)
                return self.state_tp(T, p, x)
        raise PropertyRangeError(
            f"hydrogen at para fraction {x:g}: no single-phase state at p = {p / 1e5:.6g} bar, h = {h / 1e3:.6g} kJ/kg "
            f"(in the two-phase band, on a saturation line, or outside the equations of state); the mixture's "
            f"two-phase region is not modelled")

    def h(self, T, p, para_fraction):
        """Specific enthalpy [J/kg] at ``T`` [K], ``p`` [Pa] and para fraction [-]."""
        return self.state_tp(T, p, para_fraction).h

    def s(self, T, p, para_fraction):
        """Specific entropy [J/(kg K)] at ``T`` [K], ``p`` [Pa] and para fraction [-]."""
        return self.state_tp(T, p, para_fraction).s

    def equilibrium_state(self, T, p):
        """State at ``T`` [K], ``p`` [Pa] with the equilibrium para fraction at ``T``."""
        return self.state_tp(T, p, equilibrium_para_fraction(T))

    def conversion_heat(self, T, p, from_fraction, to_fraction):
        """Heat released per kg of hydrogen [J/kg] when its para fraction goes from
        ``from_fraction`` to ``to_fraction`` at constant temperature ``T`` [K] and pressure
        ``p`` [Pa]: h(T, p, from) - h(T, p, to).  Positive for ortho-to-para conversion.
        """
        return self.h(T, p, from_fraction) - self.h(T, p, to_fraction)


@lru_cache(maxsize=None)
def get_ortho_para_hydrogen():
    """Return the process-wide :class:`OrthoParaHydrogen` (built once, on first use)."""
    return OrthoParaHydrogen()


# Second-order rate constant of ortho-to-para self-conversion in liquid hydrogen near its normal
# boiling point, dx_o/dt = -k x_o^2 with x_o the ortho fraction [1/h].  R. B. Scott, F. G.
# Brickwedde, H. C. Urey and M. H. Wahl, J. Chem. Phys. 2 (1934) 454 (the value as textbooks of
# cryogenic engineering quote it, e.g. R. F. Barron, *Cryogenic Systems*, 2nd ed., Oxford, 1985;
# from memory).
SELF_CONVERSION_RATE = 0.0114  # 1/h
# Where the stored liquid sits: at 1 atm, a little below parahydrogen's boiling point (20.27 K)
# so that both modifications are liquid there [K, Pa].
STORAGE_TEMPERATURE = 20.0
STORAGE_PRESSURE = 101325.0


def storage_loss_fraction(hours, para_fraction=NORMAL_PARA_FRACTION):
    """Share of a stored liquid-hydrogen batch boiled off in ``hours`` by the heat of its own
    ortho-to-para conversion (no heat leak), starting at ``para_fraction``.

    The ortho fraction falls as x_o(t) = x_o0 / (1 + k x_o0 t) (second order, rate constant
    :data:`SELF_CONVERSION_RATE`); the vapour leaves with the liquid's composition, so each kg of
    ortho converted in the remaining liquid boils q / L kg of it, q the ortho-to-para conversion
    heat of the liquid and L its latent heat (both at 1 atm, from the equations of state: about
    700 and 446 kJ/kg).  With q / L taken constant, the liquid left is m / m0 = exp(-(q / L)
    (x_o0 - x_o(t))).

    Parameters
    ----------
    hours : float
        Storage time [h], 0 or more.
    para_fraction : float
        Para fraction of the liquid as it enters storage (0.25 for normal hydrogen).

    Returns
    -------
    float
        Fraction of the liquid evaporated [-].
    """
    if not _is_number(hours) or not math.isfinite(hours) or hours < 0:
        raise PropertyRangeError(f"storage time must be 0 h or more, got {hours!r}")
    model = get_ortho_para_hydrogen()
    model.check_fraction(para_fraction, "storage loss")
    x_o0 = 1.0 - para_fraction
    x_o = x_o0 / (1.0 + SELF_CONVERSION_RATE * x_o0 * hours)
    q = model.conversion_heat(STORAGE_TEMPERATURE, STORAGE_PRESSURE, 0.0, 1.0)  # per kg of ortho converted
    latent = (para_fraction * _latent_heat(model._para) + x_o0 * _latent_heat(model._ortho))
    return 1.0 - math.exp(-(q / latent) * (x_o0 - x_o))


def _latent_heat(fluid):
    return fluid.saturated_vapour(STORAGE_PRESSURE).h - fluid.saturated_liquid(STORAGE_PRESSURE).h
