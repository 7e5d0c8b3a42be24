"""Throttle-valve sizing: the critical (choked) mass flux of an isentropic homogeneous-equilibrium
expansion, and the least orifice that passes the valve's flow.

The homogeneous equilibrium model (HEM) takes the two phases at one velocity and in equilibrium.
Along an isentropic expansion from the valve inlet (p0, h0, s0) the mass flux through a throat
at pressure p is

    G(p) = rho(p, s0) sqrt(2 (h0 - h(p, s0))),

and the flux the valve can pass is its largest value between the inlet and the outlet pressure.
Where that largest value lies above the outlet pressure the flow is choked: a lower outlet
pressure passes no more.  Along an isentrope dh = dp / rho, so this is the same flux as the
direct numerical integration of the nozzle equation, G = rho_t sqrt(-2 int_p0^p dp / rho), that
two-phase relief-sizing practice uses: API Standard 520, Part I, *Sizing, Selection, and
Installation of Pressure-relieving Devices*, the homogeneous equilibrium (HEM) direct-integration
method for two-phase flow (10th ed., 2020; its annex on two-phase sizing: edition and annex from
memory).
"""

from dataclasses import dataclass
import math

from cycle.errors import ScenarioError

# Discharge coefficient of a sharp-edged orifice: about 0.6 (0.61 is common practice; no source).
DEFAULT_DISCHARGE_COEFFICIENT = 0.61
# Pressures of the first scan along the isentrope (logarithmically spaced, inlet excluded), and
# the tolerance on ln p of the refinement around the largest flux: the flux is flat there, so its
# error is of the order of the square of this.
SCAN_POINTS = 10
LOG_P_TOLERANCE = 1e-5
# Where CoolProp cannot flash a (p, s) state (pseudo-pure air near its critical point), the
# flux is taken a hair away [relative pressure]: the flux is smooth there to far better than this.
PRESSURE_NUDGES = (0.0, -1e-5, 1e-5, -1e-4, 1e-4, -1e-3, 1e-3)
# A throat this close above the outlet pressure [relative] is at the outlet: not choked.
CHOKE_MARGIN = 1e-6


@dataclass(frozen=True)
class ValveSizing:
    """The throttle valve's critical mass flux and orifice.

    Attributes
    ----------
    inlet_pressure, outlet_pressure : float
        [Pa]
    critical_mass_flux : float
        The largest HEM mass flux over the expansion from the inlet to the outlet pressure
        [kg/(m2 s)]: the flux the orifice is sized on.
    throat_pressure : float
        Where that largest flux lies [Pa]; the outlet pressure where the valve is not choked.
    choked : bool
        True where the largest flux lies above the outlet pressure.
    discharge_coefficient : float
        [-]
    mass_flow : float or None
        Flow through the valve [kg/s]; None without a production target.
    orifice_area : float or None
        ``mass_flow / (discharge_coefficient * critical_mass_flux)`` [m2].
    orifice_diameter : float or None
        Of a round orifice of that area [m].
    """

    inlet_pressure: float
    outlet_pressure: float
    critical_mass_flux: float
    throat_pressure: float
    choked: bool
    discharge_coefficient: float
    mass_flow: float = None
    orifice_area: float = None
    orifice_diameter: float = None

    def to_dict(self):
        """JSON keys, in display units."""
        def scaled(value, factor):
            return None if value is None else value * factor

        return {
            "valve_critical_mass_flux_kg_per_m2_s": self.critical_mass_flux,
            "valve_orifice_diameter_mm": scaled(self.orifice_diameter, 1e3),
            "valve_choked": self.choked,
            "inlet_pressure_bar": self.inlet_pressure / 1e5,
            "outlet_pressure_bar": self.outlet_pressure / 1e5,
            "throat_pressure_bar": self.throat_pressure / 1e5,
            "discharge_coefficient": self.discharge_coefficient,
            "orifice_area_mm2": scaled(self.orifice_area, 1e6),
            "mass_flow_kg_per_h": scaled(self.mass_flow, 3600.0),
        }


def isentropic_state(fluid, p, s):
    """(h [J/kg], density [kg/m3]) at ``p`` [Pa] and entropy ``s`` [J/(kg K)].

    CoolProp's (p, s) flash fails inside the two-phase region of a pseudo-pure fluid (air): there
    the state is the homogeneous mixture of the saturated liquid (bubble point) and vapour (dew
    point) at ``p`` with the vapour fraction x = (s - s_f) / (s_g - s_f), which is what the
    homogeneous equilibrium model takes anyway.
    """
    from properties import PropertyRangeError

    try:
        state = fluid.state_ps(p, s)
        return state.h, state.density
    except PropertyRangeError:
        if not fluid.p_triple < p < fluid.p_critical:
            raise
        liquid, vapour = fluid.saturated_liquid(p), fluid.saturated_vapour(p)
        if not liquid.s <= s <= vapour.s:
            raise
        x = (s - liquid.s) / (vapour.s - liquid.s)
        volume = (1.0 - x) / liquid.density + x / vapour.density
        return liquid.h + x * (vapour.h - liquid.h), 1.0 / volume


def hem_mass_flux(fluid, inlet, p):
    """HEM mass flux [kg/(m2 s)] through a throat at ``p`` [Pa] after an isentropic expansion
    from ``inlet``: rho(p, s0) sqrt(2 (h0 - h(p, s0)))."""
    from properties import PropertyRangeError

    for nudge in PRESSURE_NUDGES:
        try:
            h, density = isentropic_state(fluid, p * (1.0 + nudge), inlet.s)
            break
        except PropertyRangeError:
            if nudge == PRESSURE_NUDGES[-1]:
                raise
    drop = inlet.h - h
    return density * math.sqrt(2.0 * drop) if drop > 0 else 0.0


def size_valve(fluid, inlet, outlet_pressure, mass_flow=None, discharge_coefficient=DEFAULT_DISCHARGE_COEFFICIENT):
    """Critical mass flux, choking and least orifice of a throttle valve.

    Parameters
    ----------
    fluid : properties.Fluid
    inlet : properties.State
        The valve inlet.
    outlet_pressure : float
        [Pa], below the inlet pressure.
    mass_flow : float, optional
        Flow through the valve [kg/s], for the orifice.
    discharge_coefficient : float
        Of the orifice, above 0 and at most 1.

    Returns
    -------
    ValveSizing

    Raises
    ------
    ScenarioError
        If the discharge coefficient is out of range, or the expansion leaves the range of the
        fluid's equation of state.
    """
    from scipy.optimize import minimize_scalar

    from properties import PropertyRangeError

    if not 0 < discharge_coefficient <= 1:
        raise ScenarioError(f"valve.discharge_coefficient must be above 0 and at most 1, got {discharge_coefficient!r}")
    p0, p_out = inlet.p, outlet_pressure
    if not 0 < p_out < p0:
        raise ScenarioError(f"a throttle valve needs an outlet pressure below its inlet pressure ({p0 / 1e5:g} bar), "
                            f"got {p_out / 1e5:g} bar")

    def flux(log_p):
        return hem_mass_flux(fluid, inlet, math.exp(log_p))

    lo, hi = math.log(p_out), math.log(p0)
    points = [hi + (lo - hi) * k / SCAN_POINTS for k in range(1, SCAN_POINTS + 1)]
    fluxes = []
    for k, x in enumerate(points):
        try:
            fluxes.append(flux(x))
        except PropertyRangeError as err:
            # The expansion leaves the equation of state (a gas expanded far enough freezes): the
            # path ends at the last pressure reached, which is enough where the flux peaks before it.
            if k < 2 or fluxes[-1] >= fluxes[-2]:
                raise ScenarioError(f"the valve's isentropic expansion from {p0 / 1e5:g} bar to {p_out / 1e5:g} bar "
                                    f"leaves the range of the {fluid.name} equation of state before its mass flux "
                                    f"peaks: {err}") from None
            points, lo = points[:k], points[k - 1]
            break
    try:
        best = max(range(len(points)), key=fluxes.__getitem__)
        if best == len(points) - 1 and fluxes[best] >= fluxes[best - 1]:
            # the flux still rises at the outlet: look just above it for a maximum past the scan
            left = points[best - 1]
            found = minimize_scalar(lambda x: -flux(x), bounds=(lo, left), method="bounded",
                                    options={"xatol": LOG_P_TOLERANCE})
            x, G = (found.x, -found.fun) if -found.fun > fluxes[best] else (lo, fluxes[best])
        else:
            a = points[best + 1] if best + 1 < len(points) else lo
            b = points[best - 1] if best > 0 else hi
            found = minimize_scalar(lambda x: -flux(x), bounds=(a, b), method="bounded",
                                    options={"xatol": LOG_P_TOLERANCE})
            x, G = (found.x, -found.fun) if -found.fun >= fluxes[best] else (points[best], fluxes[best])
    except PropertyRangeError as err:
        raise ScenarioError(f"the valve's isentropic expansion from {p0 / 1e5:g} bar to {p_out / 1e5:g} bar leaves "
                            f"the range of the {fluid.name} equation of state: {err}") from None
    throat, G = math.exp(float(x)), float(G)
    choked = throat > p_out * (1.0 + CHOKE_MARGIN)
    if not choked:
        throat, G = p_out, hem_mass_flux(fluid, inlet, p_out)
    area = diameter = None
    if mass_flow is not None:
        area = mass_flow / (discharge_coefficient * G)
        diameter = math.sqrt(4.0 * area / math.pi)
    return ValveSizing(p0, p_out, G, throat, choked, discharge_coefficient, mass_flow, area, diameter)
