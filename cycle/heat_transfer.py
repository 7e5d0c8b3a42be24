"""Heat transfer and friction in a tube-in-tube recuperator: the local coefficients a zone of the
march needs, from the field's libraries (``ht`` for Nusselt numbers, ``fluids`` for friction
factors) where they have the correlation, and written here (named, with their source) where they
do not.

The high-pressure stream flows inside the inner tubes, the return gas in the annulus around each.
Every function takes SI numbers and returns SI numbers; none calls CoolProp (the caller passes the
stream's transport properties).

References
----------
- V. Gnielinski, "New equations for heat and mass transfer in turbulent pipe and channel flow",
  *Int. Chem. Eng.* 16 (1976) 359-368: the turbulent tube correlation (``ht.conv_internal.
  turbulent_Gnielinski``), 2300 < Re < 5e6.
- V. Gnielinski, "Heat transfer coefficients for turbulent flow in concentric annular ducts",
  *Heat Transfer Eng.* 30 (2009) 431-436, and *VDI Heat Atlas*, 2nd ed., Springer, 2010, chapter
  G2: the annulus (its friction factor on a modified Reynolds number, the factor
  F_ann = 0.75 a^-0.17 for heat through the inner wall with the outer one insulated, and the
  laminar value 3.66 + 1.2 a^-0.8); the linear interpolation between Re = 2300 and 1e4 in the
  transition region (*VDI Heat Atlas*, G1).  Equations and constants from memory.
- C. F. Colebrook, *J. Inst. Civil Eng.* 11 (1939) 133-156: the Darcy friction factor of a
  rough tube, solved to machine precision by D. Clamond's explicit method (*Ind. Eng. Chem.
  Res.* 48 (2009) 3665-3671; ``fluids.friction.friction_factor``, method ``Clamond``), which,
  unlike the Lambert-W form, does not overflow at very large Reynolds numbers.
- Y. Mori and W. Nakayama, *Int. J. Heat Mass Transfer* 10 (1967) 681-695: turbulent flow in a
  helical coil (``ht.conv_internal.helical_turbulent_Nu_Mori_Nakayama``, ``fluids.
  helical_turbulent_fd_Mori_Nakayama``); the coil's critical Reynolds number by
  ``fluids.helical_Re_crit`` (Schmidt).
- E. D. Marquardt, J. P. Le and R. Radebaugh, "Cryogenic material properties database", 11th
  International Cryocooler Conference, 2000 (NIST): the thermal conductivity of 304 stainless
  steel, log10 k = sum a_i (log10 T)^i, 1 to 300 K.
- NIST Cryogenics Technologies Group, "Material properties: OFHC copper (UNS C10100/C10200)",
  trc.nist.gov/cryogenics/materials (page revised 2010-02-03), from the same program: the thermal
  conductivity of oxygen-free copper for residual resistivity ratios (RRR) of 50, 100, 150, 300
  and 500, log10 k = (a + c T^0.5 + e T + g T^1.5 + i T^2) / (1 + b T^0.5 + d T + f T^1.5 + h T^2),
  4 to 300 K, within 1 to 2 % of the data it was fitted to (the page's own figure).
"""

from dataclasses import dataclass
import math

import numpy as np

# The Reynolds numbers that bound the transition region of tubes and annuli (VDI Heat Atlas, G1).
RE_LAMINAR = 2300.0
RE_TURBULENT = 1e4
# Laminar, hydrodynamically and thermally developed flow in a tube with uniform heat flux:
# Nu = 48/11 (Incropera and DeWitt, *Fundamentals of Heat and Mass Transfer*, ch. 8).
NU_LAMINAR_TUBE = 48.0 / 11.0


@dataclass(frozen=True)
class ConductivityFit:
    """A published fit of a wall material's thermal conductivity k [W/(m K)] in T [K].

    Attributes
    ----------
    form : str
        ``"log polynomial"``: log10 k = sum a_i (log10 T)^i, coefficients a_0, a_1, ...;
        ``"rational"``: log10 k = (a + c T^0.5 + e T + g T^1.5 + i T^2) / (1 + b T^0.5 + d T +
        f T^1.5 + h T^2), coefficients a to i in that order.  Both are the NIST cryogenic
        material properties forms.
    coefficients : tuple of float
    T_low, T_high : float
        The fit's range [K]; outside it the value at the nearer end is kept.
    """

    form: str
    coefficients: tuple
    T_low: float
    T_high: float

    def conductivity(self, T):
        """k [W/(m K)] at ``T`` [K] (a number or an array), clamped to the fit's range."""
        T = np.clip(T, self.T_low, self.T_high)
        if self.form == "log polynomial":
            x = np.log10(T)
            k = 10.0 ** np.polynomial.polynomial.polyval(x, self.coefficients)
        else:
            a, b, c, d, e, f, g, h, i = self.coefficients
            s = np.sqrt(T)
            k = 10.0 ** ((a + c * s + e * T + g * T * s + i * T * T)
                         / (1.0 + b * s + d * T + f * T * s + h * T * T))
        return float(k) if np.ndim(k) == 0 else k


# 304 stainless steel, NIST fit (Marquardt, Le and Radebaugh 2000), valid 1 to 300 K; above 300 K
# the 300 K value is kept (it rises by about 10 % to 400 K: common practice to take it flat there).
_SS304 = (-1.4087, 1.3982, 0.2543, -0.6260, 0.2334, 0.4256, -0.4658, 0.1650, -0.0199)
# Oxygen-free (OFHC) copper, NIST fits for RRR 50 to 500 (coefficients a to i as printed on the
# NIST OFHC copper page, revised 2010-02-03), valid 4 to 300 K.  Above
# 300 K the 300 K value is kept, as for 304: pure copper falls by about 2 % from 300 K to 400 K
# (401 to 393 W/(m K), Incropera and DeWitt, Table A.1; from memory), so flat is within 2 % there.
_OFHC_COPPER = {
    50: (1.8743, -0.41538, -0.6018, 0.13294, 0.26426, -0.0219, -0.051276, 0.0014871, 0.003723),
    100: (2.2154, -0.47461, -0.88068, 0.13871, 0.29505, -0.02043, -0.04831, 0.001281, 0.003207),
    150: (2.3797, -0.4918, -0.98615, 0.13942, 0.30475, -0.019713, -0.046897, 0.0011969, 0.0029988),
    300: (1.357, 0.3981, 2.669, -0.1346, -0.6683, 0.01342, 0.05773, 0.0002147, 0.0),
    500: (2.8075, -0.54074, -1.2777, 0.15362, 0.36444, -0.02105, -0.051727, 0.0012226, 0.0030964),
}
# The names a scenario may give.  Plain "copper" is OFHC copper of RRR 100, the usual figure for
# oxygen-free tube as drawn and annealed (common practice); phosphorus-deoxidised (DHP) tube has a
# far lower RRR and no NIST fit: docs/recuperator-geometry.md says what to give for it.
WALL_MATERIALS = {
    "stainless steel 304": ConductivityFit("log polynomial", _SS304, 1.0, 300.0),
    "copper": ConductivityFit("rational", _OFHC_COPPER[100], 4.0, 300.0),
    **{f"copper RRR {rrr}": ConductivityFit("rational", _OFHC_COPPER[rrr], 4.0, 300.0)
       for rrr in (50, 150, 300, 500)},
}


def wall_conductivity(material, T):
    """Thermal conductivity [W/(m K)] of a wall material at ``T`` [K] (clamped to its fit's range).

    Parameters
    ----------
    material : str
        A key of :data:`WALL_MATERIALS`.
    T : float or numpy.ndarray
        [K]
    """
    return WALL_MATERIALS[material].conductivity(T)


@dataclass(frozen=True)
class Coefficient:
    """A local heat-transfer coefficient and friction factor.

    Attributes
    ----------
    nusselt : float
        [-], on the passage's hydraulic diameter.
    friction : float
        Darcy friction factor [-].
    regime : str
        ``laminar``, ``transitional`` or ``turbulent``.
    """

    nusselt: float
    friction: float
    regime: str


def _regime(Re, Re_crit=RE_LAMINAR):
    return "laminar" if Re < Re_crit else "turbulent" if Re >= RE_TURBULENT else "transitional"


def tube(Re, Pr, diameter, roughness=0.0, coil_diameter=None):
    """Inside a tube (or a helical coil of ``coil_diameter`` [m]).

    Straight tube: Gnielinski's correlation with Colebrook's friction factor above Re = 1e4,
    Nu = 48/11 with f = 64/Re below 2300, linear in Re between (VDI Heat Atlas, G1).  Coil:
    Mori and Nakayama above the coil's critical Reynolds number (Schmidt, ``fluids``), the
    straight tube's laminar values below it (a coil's secondary flow raises the laminar Nusselt
    number: taking the straight tube's errs on the safe side).
    """
    from fluids.friction import friction_factor
    from ht.conv_internal import turbulent_Gnielinski

    def turbulent(re):
        fd = friction_factor(Re=re, eD=roughness / diameter, Method="Clamond")
        return turbulent_Gnielinski(Re=re, Pr=Pr, fd=fd), fd

    if coil_diameter is not None:
        from fluids import helical_Re_crit, helical_turbulent_fd_Mori_Nakayama
        from ht.conv_internal import helical_turbulent_Nu_Mori_Nakayama

        Re_crit = helical_Re_crit(Di=diameter, Dc=coil_diameter)
        if Re >= Re_crit:
            return Coefficient(helical_turbulent_Nu_Mori_Nakayama(Re=Re, Pr=Pr, Di=diameter, Dc=coil_diameter),
                               helical_turbulent_fd_Mori_Nakayama(Re=Re, Di=diameter, Dc=coil_diameter), "turbulent")
        return Coefficient(NU_LAMINAR_TUBE, 64.0 / Re, "laminar")
    regime = _regime(Re)
    if regime == "turbulent":
        return Coefficient(*turbulent(Re), regime)
    if regime == "laminar":
        return Coefficient(NU_LAMINAR_TUBE, 64.0 / Re, regime)
    gamma = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
    nu_turbulent, _ = turbulent(RE_TURBULENT)
    fd = friction_factor(Re=Re, eD=roughness / diameter, Method="Clamond")
    return Coefficient((1.0 - gamma) * NU_LAMINAR_TUBE + gamma * nu_turbulent, fd, regime)


def annulus_friction(Re, a):
    """Darcy friction factor of a smooth concentric annulus of diameter ratio ``a`` = d_inner /
    D_outer (Gnielinski 2009): f = (1.8 log10 Re* - 1.5)^-2 on the modified Reynolds number
    Re* = Re [(1 + a^2) ln a + (1 - a^2)] / [(1 - a)^2 ln a]."""
    ln_a = math.log(a)
    re_star = Re * ((1.0 + a * a) * ln_a + (1.0 - a * a)) / ((1.0 - a) ** 2 * ln_a)
    return (1.8 * math.log10(re_star) - 1.5) ** -2


def annulus(Re, Pr, a, hydraulic_diameter, length=None):
    """In the annulus, heat through the inner wall, the outer wall insulated (Gnielinski 2009;
    VDI Heat Atlas, G2).

    Turbulent (Re >= 1e4): Nu = (f/8) Re Pr / (k1 + 12.7 sqrt(f/8) (Pr^(2/3) - 1)) [1 + (d_h /
    L)^(2/3)] F_ann with k1 = 1.07 + 900 / Re - 0.63 / (1 + 10 Pr) and F_ann = 0.75 a^-0.17.
    Laminar (Re < 2300), developed: Nu = 3.66 + 1.2 a^-0.8, f = 64/Re times the annulus's
    laminar factor (the exact laminar solution of a concentric annulus).  Linear in Re between.
    The entry term needs ``length`` [m]; without it the developed value is given.
    """
    regime = _regime(Re)

    def turbulent(re):
        fd = annulus_friction(re, a)
        k1 = 1.07 + 900.0 / re - 0.63 / (1.0 + 10.0 * Pr)
        entry = 1.0 + (hydraulic_diameter / length) ** (2.0 / 3.0) if length else 1.0
        nu = (fd / 8.0) * re * Pr / (k1 + 12.7 * math.sqrt(fd / 8.0) * (Pr ** (2.0 / 3.0) - 1.0))
        return nu * entry * 0.75 * a ** -0.17, fd

    nu_laminar = 3.66 + 1.2 * a ** -0.8
    ln_a = math.log(a)
    laminar_factor = (1.0 - a) ** 2 / (1.0 + a * a + (1.0 - a * a) / ln_a)
    if regime == "turbulent":
        return Coefficient(*turbulent(Re), regime)
    if regime == "laminar":
        return Coefficient(nu_laminar, 64.0 / Re * laminar_factor, regime)
    gamma = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
    nu_turbulent, _ = turbulent(RE_TURBULENT)
    friction = (1.0 - gamma) * 64.0 / Re * laminar_factor + gamma * annulus_friction(Re, a)
    return Coefficient((1.0 - gamma) * nu_laminar + gamma * nu_turbulent, friction, regime)


@dataclass(frozen=True)
class TubeInTube:
    """Tube-in-tube geometry: ``tubes`` inner tubes, each inside its own outer tube.

    Attributes
    ----------
    tubes : int
    inner_inside, inner_outside : float
        Inner tube diameters [m].
    outer_inside : float
        Outer tube inner diameter [m].
    roughness : float
        [m]
    coil_diameter : float or None
        [m], for a helically wound pair.
    """

    tubes: int
    inner_inside: float
    inner_outside: float
    outer_inside: float
    roughness: float = 1.5e-6
    coil_diameter: float = None

    @property
    def tube_area(self):
        """Flow area inside the inner tubes [m2]."""
        return self.tubes * math.pi * self.inner_inside ** 2 / 4.0

    @property
    def annulus_area(self):
        """Flow area of the annuli [m2]."""
        return self.tubes * math.pi * (self.outer_inside ** 2 - self.inner_outside ** 2) / 4.0

    @property
    def annulus_hydraulic_diameter(self):
        """Four times the area over the wetted perimeter: D_o - d_o [m]."""
        return self.outer_inside - self.inner_outside

    @property
    def diameter_ratio(self):
        """a = d_o / D_i of the annulus [-]."""
        return self.inner_outside / self.outer_inside

    def conductance_per_length(self, h_tube, h_annulus, k_wall):
        """UA per metre of exchanger [W/(m K)]: tube film, wall (cylindrical) and annulus film in
        series, times the number of tubes.  ``h`` [W/(m2 K)], ``k_wall`` [W/(m K)]."""
        d_i, d_o = self.inner_inside, self.inner_outside
        resistance = (1.0 / (h_tube * math.pi * d_i) + math.log(d_o / d_i) / (2.0 * math.pi * k_wall)
                      + 1.0 / (h_annulus * math.pi * d_o))
        return self.tubes / resistance


# -- The same correlations over all zones at once -------------------------------------------
#
# The march evaluates the coefficients of every zone on every pass; one call of the scalar
# functions above costs some 15 us (most of it in argument handling), which made them the largest
# cost of a rated point.  These are the same equations on NumPy arrays; tests/test_heat_transfer.py
# checks them against the scalar functions (and so against ht and fluids) to 1e-12.

def _clamond(Re, eD):
    """Colebrook's Darcy friction factor by Clamond's method, as ``fluids.friction.Clamond``
    (D. Clamond, *Ind. Eng. Chem. Res.* 48 (2009) 3665-3671), on arrays."""
    X1 = eD * Re * 0.1239681863354175460160858261654858382699
    X2 = np.log(Re) - 0.7793974884556819406441139701653776731705
    F = X2 - 0.2
    X1F = X1 + F
    X1F1 = 1.0 + X1F
    E = (np.log(X1F) - 0.2) / X1F1
    F = F - (X1F1 + 0.5 * E) * E * X1F / (X1F1 + E * (1.0 + E / 3.0))
    X1F = X1 + F
    X1F1 = 1.0 + X1F
    E = (np.log(X1F) + F - X2) / X1F1
    b = X1F1 + E * (1.0 + E / 3.0)
    F = b / (b * F - (X1F1 + 0.5 * E) * E * X1F)
    return 1.325474527619599502640416597148504422899 * F * F


def _gnielinski(Re, Pr, fd):
    return (fd / 8.0) * (Re - 1e3) * Pr / (1.0 + 12.7 * np.sqrt(fd / 8.0) * (Pr ** (2.0 / 3.0) - 1.0))


def _regimes(Re, Re_crit=RE_LAMINAR):
    return np.where(Re < Re_crit, "laminar", np.where(Re >= RE_TURBULENT, "turbulent", "transitional"))


def tube_zones(Re, Pr, diameter, roughness=0.0, coil_diameter=None):
    """:func:`tube` for arrays of Reynolds and Prandtl numbers: (Nusselt numbers, Darcy friction
    factors, regimes), each an array."""
    Re, Pr = np.asarray(Re, dtype=float), np.asarray(Pr, dtype=float)
    if coil_diameter is not None:
        from fluids import helical_Re_crit

        Re_crit = helical_Re_crit(Di=diameter, Dc=coil_diameter)
        r = diameter / coil_diameter
        # Mori and Nakayama, as ht.conv_internal.helical_turbulent_Nu_Mori_Nakayama and
        # fluids.helical_turbulent_fd_Mori_Nakayama.
        low_pr = Pr < 1.0
        term1 = np.where(low_pr, Pr / (26.2 * (Pr ** (2.0 / 3.0) - 0.074)) * Re ** 0.8 * r ** 0.1,
                         Pr ** 0.4 / 41.0 * Re ** (5.0 / 6.0) * r ** (1.0 / 12.0))
        term2 = np.where(low_pr, 1.0 + 0.098 * (Re * r * r) ** -0.2, 1.0 + 0.061 / (Re * r ** 2.5) ** (1.0 / 6.0))
        dean = (Re * r * r) ** -0.2
        fd = 0.3 / math.sqrt(1.0 / r) * dean * (1.0 + 0.112 * dean)
        turbulent = Re >= Re_crit
        return (np.where(turbulent, term1 * term2, NU_LAMINAR_TUBE), np.where(turbulent, fd, 64.0 / Re),
                np.where(turbulent, "turbulent", "laminar"))
    eD = roughness / diameter
    fd = _clamond(np.maximum(Re, 10.0), eD)
    nu_turbulent = _gnielinski(Re, Pr, fd)
    nu_at_1e4 = _gnielinski(RE_TURBULENT, Pr, _clamond(np.array(RE_TURBULENT), eD))
    gamma = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
    nu = np.where(Re >= RE_TURBULENT, nu_turbulent,
                  np.where(Re < RE_LAMINAR, NU_LAMINAR_TUBE, (1.0 - gamma) * NU_LAMINAR_TUBE + gamma * nu_at_1e4))
    return nu, np.where(Re < RE_LAMINAR, 64.0 / Re, fd), _regimes(Re)


def annulus_zones(Re, Pr, a, hydraulic_diameter):
    """:func:`annulus` (developed flow) for arrays of Reynolds and Prandtl numbers: (Nusselt
    numbers, Darcy friction factors, regimes), each an array."""
    Re, Pr = np.asarray(Re, dtype=float), np.asarray(Pr, dtype=float)
    ln_a = math.log(a)
    star = ((1.0 + a * a) * ln_a + (1.0 - a * a)) / ((1.0 - a) ** 2 * ln_a)

    def turbulent(re):
        fd = (1.8 * np.log10(re * star) - 1.5) ** -2
        k1 = 1.07 + 900.0 / re - 0.63 / (1.0 + 10.0 * Pr)
        nu = (fd / 8.0) * re * Pr / (k1 + 12.7 * np.sqrt(fd / 8.0) * (Pr ** (2.0 / 3.0) - 1.0))
        return nu * 0.75 * a ** -0.17, fd

    nu_laminar = 3.66 + 1.2 * a ** -0.8
    laminar_factor = (1.0 - a) ** 2 / (1.0 + a * a + (1.0 - a * a) / ln_a)
    nu_t, fd_t = turbulent(np.maximum(Re, 10.0))
    nu_1e4, _ = turbulent(RE_TURBULENT)
    f_laminar = 64.0 / Re * laminar_factor
    gamma = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
    laminar, turb = Re < RE_LAMINAR, Re >= RE_TURBULENT
    nu = np.where(turb, nu_t, np.where(laminar, nu_laminar, (1.0 - gamma) * nu_laminar + gamma * nu_1e4))
    fd = np.where(turb, fd_t, np.where(laminar, f_laminar, (1.0 - gamma) * f_laminar + gamma * fd_t))
    return nu, fd, _regimes(Re)
