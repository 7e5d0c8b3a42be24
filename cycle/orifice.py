"""Throttle-valve sizing: the critical (choked) mass flux of an isentropic homogeneous-equilibrium
expansion, and the least orifice that passes the valve's flow.

The homogeneous equilibrium model (HEM) takes the two phases at one velocity and in equilibrium.
Along an isentropic expansion from the valve inlet (p0, h0, s0) the mass flux through a throat
at pressure p is

    G(p) = rho(p, s0) sqrt(2 (h0 - h(p, s0))),

and the flux the valve can pass is its largest value between the inlet and the outlet pressure.
Where that largest value lies above the outlet pressure the flow is choked: a lower outlet
pressure passes no more.  Along an isentrope dh = dp / rho, so this is the same flux as the
direct numerical integration of the nozzle equation, G = rho_t sqrt(-2 int_p0^pt dp / rho), that
two-phase relief-sizing practice uses (see :func:`size_valve` for the reference).

Imports of the property layer and SciPy are deferred to the calls: importing this module loads
neither CoolProp nor SciPy (start-up stays quick).
"""

from dataclasses import dataclass
import math
import numbers

from cycle.errors import ScenarioError

# Discharge coefficient of a sharp-edged orifice: about 0.6 (0.61 is common practice; no source).
DEFAULT_DISCHARGE_COEFFICIENT = 0.61
# Pressures of the first scan along the isentrope (logarithmically spaced from the inlet, which is
# excluded, to the outlet, included).
SCAN_POINTS = 10
# Tolerance on ln p of the bounded search around the largest scanned flux.  Where the flux is
# smooth at its maximum its error is of the order of the square of this; where the maximum is a
# corner (the isentrope of a liquid meeting the saturation line) it is at most the slope of ln G
# in ln p (below 0.5 in the cases tried) times this.  Measured on thirteen inlets of eight fluids
# against a search to 1e-10: 5e-7 or less (the 1e-6 aimed at).
LOG_P_TOLERANCE = 1e-5
# A maximum that lies less than this above the outlet pressure [relative] is at the outlet: the
# valve is not choked.  It is the resolution of the search itself.
CHOKE_MARGIN = LOG_P_TOLERANCE
# Where CoolProp cannot flash a (p, s) state (pseudo-pure air near its critical point), the
# flux is taken a hair away [relative pressure]: the flux is smooth there to far better than this.
PRESSURE_NUDGES = (0.0, -1e-5, 1e-5, -1e-4, 1e-4, -1e-3, 1e-3)


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
        True where the largest flux lies above the outlet pressure (by more than
        :data:`CHOKE_MARGIN`, relative).
    discharge_coefficient : float
        [-]
    mass_flow : float or None
        Flow through the valve [kg/s]; None without a production target.
    orifice_area : float or None
        ``mass_flow / (discharge_coefficient * critical_mass_flux)`` [m2]; None without a mass flow.
    orifice_diameter : float or None
        Of a round orifice of that area [m]; None without a mass flow.
    """

    inlet_pressure: float
    outlet_pressure: float
    critical_mass_flux: float
    throat_pressure: float
    choked: bool
    discharge_coefficient: float
    mass_flow: float | None = None
    orifice_area: float | None = None
    orifice_diameter: float | None = None

    def to_dict(self):
        """JSON keys, in display units (bar, mm, mm2, kg/h); None where unknown."""
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


def isentropic_state(fluid, p, s, near=None):
    """(h [J/kg], density [kg/m3], T [K], one-phase) at ``p`` [Pa] and entropy ``s`` [J/(kg K)]
    (``near``: (T [K], density [kg/m3]) of a state on the same isentrope, which starts a
    one-phase solve).

    Between the triple-point and the critical pressure the saturation states at ``p`` are taken
    first (cheap: CoolProp's saturation curves); where ``s`` lies between them the state is their
    homogeneous mixture at the vapour fraction x = (s - s_f) / (s_g - s_f), which is what the
    homogeneous equilibrium model takes (and, for a pure fluid, what CoolProp's (p, s) flash
    returns there, to 1e-15).  For pseudo-pure air, whose (p, s) flash can fail in that region,
    f is the bubble point and g the dew point.  Elsewhere the state is CoolProp's (p, s) flash.
    """
    from properties import PropertyRangeError

    if fluid.p_triple <= p < fluid.p_critical:
        try:
            liquid, vapour = fluid.saturated_liquid(p), fluid.saturated_vapour(p)
        except PropertyRangeError:  # a hair below the critical pressure: let the flash decide
            liquid = vapour = None
        if liquid is not None and liquid.s <= s <= vapour.s:
            x = (s - liquid.s) / (vapour.s - liquid.s) if vapour.s > liquid.s else 0.0
            volume = (1.0 - x) / liquid.density + x / vapour.density
            return liquid.h + x * (vapour.h - liquid.h), 1.0 / volume, liquid.T, False
    state = fluid.state_ps(p, s, guess=near)
    return state.h, state.density, state.T, state.quality is None


def hem_mass_flux(fluid, inlet, p, starts=None):
    """HEM mass flux [kg/(m2 s)] through a throat at ``p`` [Pa] after an isentropic expansion
    from ``inlet`` (a :class:`properties.State`): rho(p, s0) sqrt(2 (h0 - h(p, s0))).

    ``starts`` (a dict, pressure -> (T, density)) collects the one-phase states found along the
    isentrope; the nearest in pressure starts the next solve (the inlet where it is empty).

    Raises :class:`properties.PropertyRangeError` where no state can be had at ``p`` nor at the
    pressures a hair away (:data:`PRESSURE_NUDGES`).
    """
    from properties import PropertyRangeError

    near = (inlet.T, inlet.density)
    if starts:
        near = starts[min(starts, key=lambda q: abs(math.log(q / p)))]
    for nudge in PRESSURE_NUDGES:
        try:
            h, density, T, one_phase = isentropic_state(fluid, p * (1.0 + nudge), inlet.s, near=near)
            if one_phase and starts is not None:
                starts[p * (1.0 + nudge)] = (T, density)
            break
        except PropertyRangeError:
            if nudge == PRESSURE_NUDGES[-1]:
                raise
    drop = inlet.h - h
    return density * math.sqrt(2.0 * drop) if drop > 0 else 0.0


def _one_line(err):
    return " ".join(str(err).split())


def _is_number(x):
    return isinstance(x, numbers.Real) and not isinstance(x, bool) and math.isfinite(x)


def size_valve(fluid, inlet, outlet_pressure, mass_flow=None, discharge_coefficient=DEFAULT_DISCHARGE_COEFFICIENT):
    """Critical mass flux, choking and least orifice of a throttle valve (HEM, direct integration).

    The flux G(p) = rho(p, s0) sqrt(2 (h0 - h(p, s0))) is scanned at up to :data:`SCAN_POINTS`
    pressures spaced logarithmically from the inlet to the outlet pressure (down to where it has
    fallen twice in a row: it has one maximum along an isentrope); its largest value is refined
    by a bounded Brent search on ln p between the scanned neighbours (to
    :data:`LOG_P_TOLERANCE`).  Where the largest scanned flux is at the outlet and the flux still
    rises there (one more evaluation just above the outlet tells), the valve is not choked and
    the flux is G at the outlet.  An expansion that leaves the equation of state on the way down
    (below the triple-point pressure, or colder than the equation of state goes) ends at the last
    pressure reached, provided the flux has already passed its maximum there.

    Parameters
    ----------
    fluid : properties.Fluid
        The fluid (one pure or pseudo-pure fluid).
    inlet : properties.State
        The valve inlet state (p0, h0, s0).
    outlet_pressure : float
        Valve outlet pressure [Pa], below the inlet pressure.
    mass_flow : float, optional
        Flow through the valve [kg/s], for the orifice; None leaves the orifice unknown.
    discharge_coefficient : float
        Discharge coefficient of the orifice [-], above 0 and at most 1.  The default, 0.61, is
        common practice for a sharp-edged orifice (no source).

    Returns
    -------
    ValveSizing

    Raises
    ------
    ScenarioError
        If the discharge coefficient, the mass flow or the outlet pressure is out of range, or the
        expansion leaves the range of the fluid's equation of state before its flux peaks.  Its
        message is one line.

    References
    ----------
    API Standard 520, *Sizing, Selection, and Installation of Pressure-relieving Devices*,
    Part I, *Sizing and Selection*, 9th ed., American Petroleum Institute, July 2014, Annex C
    (sizing for two-phase liquid/vapour relief).  The edition and that its Annex C holds the
    two-phase methods were checked; that the annex gives the homogeneous direct-integration
    method (the nozzle integral summed numerically along an isentropic, homogeneous-equilibrium
    path, then its maximum) is from memory, as is that a 10th edition (2020) keeps it.
    """
    if not _is_number(discharge_coefficient) or not 0 < discharge_coefficient <= 1:
        raise ScenarioError(f"valve.discharge_coefficient must be above 0 and at most 1, got {discharge_coefficient!r}")
    # (an infinite flow passes: the flowsheet names the input behind it)
    if mass_flow is not None and (not isinstance(mass_flow, numbers.Real) or isinstance(mass_flow, bool)
                                  or not mass_flow >= 0):
        raise ScenarioError(f"the valve's mass flow must be a number of kg/s, 0 or more, got {mass_flow!r}")
    p0, p_out = inlet.p, outlet_pressure
    if not _is_number(p_out) or not 0 < p_out < p0:
        raise ScenarioError(f"a throttle valve needs an outlet pressure below its inlet pressure ({p0 / 1e5:g} bar), "
                            f"got {p_out / 1e5 if _is_number(p_out) else p_out!r} bar")
    G, throat = _largest_flux(fluid, inlet, p_out)
    choked = throat > p_out * (1.0 + CHOKE_MARGIN)
    if G <= 0:
        raise ScenarioError(f"the valve's pressure drop, {p0 / 1e5:g} to {p_out / 1e5:g} bar, is too small to size an "
                            f"orifice on (no flux above the property noise); give a larger pressure drop")
    area = diameter = None
    if mass_flow is not None:
        area = mass_flow / (discharge_coefficient * G)
        diameter = math.sqrt(4.0 * area / math.pi)
    return ValveSizing(p0, p_out, G, throat, choked, discharge_coefficient, mass_flow, area, diameter)


def _largest_flux(fluid, inlet, p_out):
    """(largest flux [kg/(m2 s)], its pressure [Pa]) over [p_out, inlet.p]; the outlet pressure
    itself, and G there, where the largest lies within :data:`CHOKE_MARGIN` of it."""
    from scipy.optimize import minimize_scalar

    from properties import PropertyRangeError

    p0 = inlet.p
    lo, hi = math.log(p_out), math.log(p0)
    where = f"the valve's isentropic expansion from {p0 / 1e5:g} bar to {p_out / 1e5:g} bar"

    starts = {}  # one-phase states along the isentrope: each solve starts from the nearest

    def flux(x):
        return hem_mass_flux(fluid, inlet, p_out if x == lo else math.exp(x), starts)

    xs, Gs = [], []
    for k in range(1, SCAN_POINTS + 1):
        x = lo if k == SCAN_POINTS else hi + (lo - hi) * k / SCAN_POINTS
        try:
            G = flux(x)
        except PropertyRangeError as err:
            # The expansion leaves the equation of state (a liquid or a gas expanded below its
            # triple-point pressure freezes): the path ends at the last pressure reached, which is
            # enough where the flux has already passed its maximum.
            if len(Gs) < 2 or Gs[-1] >= Gs[-2]:
                hint = (f"; give an outlet pressure above the triple-point pressure, {fluid.p_triple / 1e5:.4g} bar"
                        if p_out < fluid.p_triple else "")
                raise ScenarioError(f"{where} leaves the range of the {fluid.name} equation of state before its "
                                    f"mass flux peaks: {_one_line(err)}{hint}") from None
            break
        xs.append(x)
        Gs.append(G)
        if len(Gs) >= 3 and Gs[-1] < Gs[-2] < Gs[-3]:
            # Fallen twice past its largest: along an isentrope the flux has one maximum, so it
            # lies between the scanned neighbours of the largest, and the rest of the way down
            # need not be scanned.
            break
    best = max(range(len(Gs)), key=Gs.__getitem__)
    try:
        if best == len(Gs) - 1:
            # The largest scanned flux is at the outlet (the path reached it: a path cut short has
            # its largest flux before its end).  If the flux still rises there the valve is not
            # choked: along an isentrope the flux has one maximum.
            if flux(lo + CHOKE_MARGIN) <= Gs[best]:
                return Gs[best], p_out
            bounds = (lo, xs[best - 1])
        else:
            bounds = (xs[best + 1], xs[best - 1] if best > 0 else hi)
        found = minimize_scalar(lambda x: -flux(x), bounds=bounds, method="bounded",
                                options={"xatol": LOG_P_TOLERANCE})
    except PropertyRangeError as err:
        raise ScenarioError(f"{where} leaves the range of the {fluid.name} equation of state: {_one_line(err)}") from None
    x, G = (float(found.x), float(-found.fun)) if -found.fun > Gs[best] else (xs[best], Gs[best])
    if x - lo <= CHOKE_MARGIN and xs[-1] == lo:
        return Gs[-1], p_out
    return G, (p_out if x == lo else math.exp(x))
