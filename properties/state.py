"""Immutable thermodynamic states."""

from dataclasses import dataclass, asdict
from typing import Optional


@dataclass(frozen=True, slots=True)
class State:
    """One equilibrium state of a pure fluid, in SI units.

    Attributes
    ----------
    fluid : str
        CoolProp name of the fluid.
    T : float
        Temperature [K].
    p : float
        Pressure [Pa].
    h : float
        Specific enthalpy [J/kg], on CoolProp's reference state for the fluid.
    s : float
        Specific entropy [J/(kg K)], on the same reference state.
    density : float
        Mass density [kg/m3].
    quality : float or None
        Vapour mass fraction for a two-phase or saturated state, None in a single phase.
    phase : str
        ``liquid`` (below the critical temperature and pressure, above the saturation pressure),
        ``vapour`` (below the critical temperature and the saturation pressure), ``two-phase``,
        ``gas`` (above the critical temperature, below the critical pressure), ``supercritical
        fluid`` (above both), ``compressed liquid`` (above the critical pressure, below the
        critical temperature) or ``critical point``.
    """

    fluid: str
    T: float
    p: float
    h: float
    s: float
    density: float
    quality: Optional[float]
    phase: str

    def to_dict(self):
        """Return the state as a plain dictionary of SI numbers."""
        return asdict(self)


def two_phase_label(quality):
    """Phase name of a state on or inside the saturation dome with vapour fraction ``quality``."""
    return "saturated liquid" if quality == 0.0 else "saturated vapour" if quality == 1.0 else "two-phase"
